//! The exact Hadamard check and the verification report.
//!
//! One idea: H·Hᵀ = nI says exactly that every two distinct rows are orthogonal (the diagonal
//! of a ±1 Gram matrix is n by itself). On bit-packed rows the inner product of rows i and j is
//! `n − 2·popcount(rᵢ ⊕ rⱼ)`, so the check is: for every pair i < j, the rows differ in exactly
//! n/2 places. Nothing is sampled and nothing is rounded; the verdict `hadamard: true` comes
//! only from this pass over all n(n−1)/2 pairs.
//!
//! Two families of [`Kernel`] do the counting:
//! - tiles: the pairs are visited in 4×4 tiles of rows, so each loaded word serves four
//!   products and the sixteen running popcounts stay in registers (scalar `count_ones`, the
//!   POPCNT instruction, AVX-512 VPOPCNTDQ eight words at a time, or wasm32's
//!   `i8x16.popcnt` two words at a time);
//! - bit-sliced ([`sliced`]): one bit lane per pair, carry-save adders over a transposed panel
//!   of rows, no popcount in the loop: 128 pairs per `v128` in wasm32 with simd128, 256 per
//!   `__m256i` with AVX2, 512 per `__m512i` with AVX-512. It takes every matrix with an even
//!   number of columns (below 65 535); other shapes go to the tile named by
//!   [`Kernel::for_shape`]. A pair it flags is recounted exactly with popcount.
//!
//! The kernel is a parameter ([`verify_with`], [`is_hadamard_with`],
//! [`Progressive::with_kernel`]); [`Kernel::best`] picks the fastest this CPU has, detected
//! at run time on x86-64 (`is_x86_feature_detected!`) and fixed at build time in wasm32,
//! where the simd128 kernels exist only when the crate is compiled with
//! `-C target-feature=+simd128` (the browser app is). Natively the work is spread over
//! threads. In wasm32 it runs on the caller's thread, either in steps of bounded size so that
//! a page can yield between them ([`Progressive`]), or cut into shares that Web Workers check
//! and the page merges exactly ([`Split`], [`check_share`], [`Merge`]).
//!
//! [`Verified`] is the only proof this crate accepts that a matrix is Hadamard: it can be made
//! only by [`certify`], which runs the exact check.

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
    let mut acc = PairTally::new(0);
    acc.stop_at_first = true;
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
    kernel.assert_available();
    let check = || {
        let mut tally = PairTally::new(cap);
        gram_pass(m, kernel, &mut tally);
        tally
    };
    // Natively the id (one SHA-256 chain, serial) and the properties run beside the check,
    // which takes whatever threads are left.
    #[cfg(not(target_arch = "wasm32"))]
    let (tally, facts) = rayon::join(check, || facts(m));
    #[cfg(target_arch = "wasm32")]
    let (tally, facts) = (check(), facts(m));
    report_from(facts, tally, kernel)
}

/// The name of the kernel [`verify`] uses on this machine ([`Kernel::best`]).
pub fn kernel_name() -> &'static str {
    Kernel::best().name()
}
