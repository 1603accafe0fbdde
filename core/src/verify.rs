//! The exact Hadamard check and the verification report.
//!
//! One idea: H·Hᵀ = nI says exactly that every two distinct rows are orthogonal (the diagonal
//! of a ±1 Gram matrix is n by itself). On bit-packed rows the inner product of rows i and j is
//! `n − 2·popcount(rᵢ ⊕ rⱼ)`, so the check is: for every pair i < j, the rows differ in exactly
//! n/2 places. Nothing is sampled and nothing is rounded; the verdict `hadamard: true` comes
//! only from this pass over all n(n−1)/2 pairs.
//!
//! How the parts fit, from the answer down to the instructions:
//!
//! - `report`: what a verdict says. [`Report`] (the failures, the failing pairs, the id, the
//!   [`Properties`]), the [`Facts`] a report holds beside the pair check, and [`Verified`],
//!   the only proof this crate accepts that a matrix is Hadamard: only [`certify`] makes one,
//!   and it runs the exact check.
//! - `pass`: the walk over all pairs. The rows j are cut into panels; every pair (i, j) with
//!   i < j and j in a panel is counted by a kernel and the failing ones go to a tally, which
//!   keeps the first `cap` in (i, j) order exactly however the panels are spread over threads.
//!   [`Progressive`] walks the same panels a few at a time, for a page that must yield.
//! - `kernel`: which [`Kernel`] counts. The popcount tiles live there (scalar, POPCNT,
//!   AVX-512 VPOPCNTDQ, wasm32 simd128), and `sliced` holds the bit-sliced kernels (AVX2,
//!   AVX-512, simd128), written once over a vector trait. The kernel is a parameter
//!   ([`verify_with`], [`is_hadamard_with`], [`Progressive::with_kernel`]); [`Kernel::best`]
//!   picks the fastest this CPU has. A kernel never changes a verdict, only its speed.
//! - `checked`: the check in two steps, [`check_with`] then [`Checked::report`], for a
//!   caller that computes the id elsewhere (`hadamard verify` hashes a canonical file itself).
//! - `shares`: the pass cut into [`Split`] shares (one per panel) that Web Workers check with
//!   [`check_share`], and the exact [`Merge`] of their results into the same [`Report`] that
//!   [`verify`] gives.
//!
//! The functions here are the entry points: [`verify`] (the report) and [`is_hadamard`] (the
//! verdict alone, stopping at the first failing pair). Natively the pair check is spread over
//! threads and runs beside the id and properties; in wasm32 it runs on the caller's thread.

use crate::id::matrix_id;
use crate::matrix::Matrix;

mod checked;
mod kernel;
mod pass;
mod report;
mod shares;
mod sliced;
#[cfg(test)]
mod tests;

pub use checked::{check_with, Checked};
pub use kernel::Kernel;
pub use pass::Progressive;
use pass::{gram_pass, PairTally};
use report::report_from;
pub use report::{
    certify, facts, order_possible, properties, Facts, FailingPair, Failure, Properties, Report,
    Verified, CHECK_NAME, CHECK_VERSION, DEFAULT_PAIR_CAP,
};
pub use shares::{check_share, Merge, MergeError, Share, Split};

/// True exactly when `m` is a Hadamard matrix. Stops at the first failing pair.
pub fn is_hadamard(m: &Matrix) -> bool {
    is_hadamard_with(m, Kernel::best())
}

/// [`is_hadamard`] with the given kernel.
///
/// # Panics
/// When this CPU lacks the kernel ([`Kernel::is_available`]).
pub fn is_hadamard_with(m: &Matrix, kernel: Kernel) -> bool {
    kernel.assert_available();
    if !m.is_square() || !order_possible(m.rows()) {
        return false;
    }
    let mut acc = PairTally::first_only();
    gram_pass(m, kernel, &mut acc);
    acc.total == 0
}

/// The full report for `m`, listing at most [`DEFAULT_PAIR_CAP`] failing pairs.
pub fn verify(m: &Matrix) -> Report {
    verify_with_cap(m, DEFAULT_PAIR_CAP)
}

/// The full report for `m`, listing at most `cap` failing pairs.
pub fn verify_with_cap(m: &Matrix, cap: usize) -> Report {
    verify_with(m, cap, Kernel::best())
}

/// The full report for `m` by the given kernel, listing at most `cap` failing pairs. The
/// report is the same whatever the kernel, except for its `kernel` field.
///
/// # Panics
/// When this CPU lacks the kernel ([`Kernel::is_available`]).
pub fn verify_with(m: &Matrix, cap: usize, kernel: Kernel) -> Report {
    // Natively the id (one SHA-256 chain, serial) runs beside the check and the properties,
    // which take whatever threads are left.
    #[cfg(not(target_arch = "wasm32"))]
    let (checked, id) = rayon::join(|| check_with(m, cap, kernel), || matrix_id(m));
    #[cfg(target_arch = "wasm32")]
    let (checked, id) = (check_with(m, cap, kernel), matrix_id(m));
    checked.report(id)
}

/// The name of the kernel [`verify`] uses on this machine ([`Kernel::best`]).
pub fn kernel_name() -> &'static str {
    Kernel::best().name()
}
