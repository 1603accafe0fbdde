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

use crate::id::matrix_id;
use crate::matrix::Matrix;
use serde::{Deserialize, Serialize};

mod checked;
mod sliced;

pub use checked::{check_with, Checked};

/// How many failing pairs a report lists at most. The total count is always exact.
pub const DEFAULT_PAIR_CAP: usize = 64;

/// The name and version of the exact check, recorded with every verification.
pub const CHECK_NAME: &str = "exact-gram-popcount";
/// Bump when the check's meaning changes (never for speed-only changes).
pub const CHECK_VERSION: u32 = 1;

/// Two rows that are not orthogonal, and their inner product.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct FailingPair {
    /// The first row, 0-based (i < j).
    pub i: usize,
    /// The second row, 0-based.
    pub j: usize,
    /// Their inner product over the integers (0 would have been orthogonal).
    pub dot: i64,
}

/// The properties users filter by. All are exact.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Properties {
    /// The first row and the first column are all +1.
    pub normalized: bool,
    /// H = Hᵀ.
    pub symmetric: bool,
    /// H + Hᵀ = 2I: the diagonal is +1 and h_ij = −h_ji off it.
    pub skew: bool,
    /// Every row sum and every column sum is the same number.
    pub regular: bool,
    /// The excess: the sum of all entries.
    pub excess: i64,
}

/// Why a well-formed ±1 matrix is not Hadamard.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Failure {
    /// Rows ≠ columns.
    NotSquare,
    /// n is not 1, 2 or a multiple of 4, so no Hadamard matrix of order n exists (a standard
    /// theorem: normalise, then count how the first three rows agree).
    ImpossibleOrder,
    /// Some pairs of distinct rows are not orthogonal.
    RowsNotOrthogonal,
}

/// Everything the exact check found.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Report {
    /// The order n (the number of rows).
    pub order: usize,
    /// The number of columns (equal to `order` for a square matrix).
    pub cols: usize,
    /// True exactly when H·Hᵀ = nI and H is square.
    pub hadamard: bool,
    /// The reasons it is not, in the order above; empty when it is.
    pub failures: Vec<Failure>,
    /// The matrix id: SHA-256 of the canonical text.
    pub sha256: String,
    /// The properties.
    pub properties: Properties,
    /// The first failing pairs, in row order, at most the cap.
    pub failing_pairs: Vec<FailingPair>,
    /// How many pairs i < j fail in all.
    pub failing_pairs_total: u64,
    /// The check that decided, and its version.
    pub check: String,
    /// The kernel that ran (for performance records; it never changes the verdict).
    pub kernel: String,
}

/// A matrix the exact check has passed. The only way to make one is [`certify`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Verified {
    matrix: Matrix,
    id: String,
}

impl Verified {
    /// The matrix.
    pub fn matrix(&self) -> &Matrix {
        &self.matrix
    }
    /// Its id.
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Its order.
    pub fn order(&self) -> usize {
        self.matrix.rows()
    }
    /// Gives the matrix back.
    pub fn into_matrix(self) -> Matrix {
        self.matrix
    }
}

/// Runs the exact check; on success returns the proof, otherwise the report saying why not.
pub fn certify(m: Matrix) -> Result<Verified, Box<Report>> {
    if is_hadamard(&m) {
        let id = matrix_id(&m);
        Ok(Verified { matrix: m, id })
    } else {
        Err(Box::new(verify(&m)))
    }
}

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

/// True when n is 1, 2 or a multiple of 4: the only orders a Hadamard matrix can have.
pub fn order_possible(n: usize) -> bool {
    n == 1 || n == 2 || (n > 0 && n.is_multiple_of(4))
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

fn finish_report(m: &Matrix, tally: PairTally, kernel: Kernel) -> Report {
    report_from(facts(m), tally, kernel)
}

fn report_from(facts: Facts, tally: PairTally, kernel: Kernel) -> Report {
    let Facts {
        order,
        cols,
        sha256,
        properties,
    } = facts;
    let total = tally.total;
    let pairs = tally.into_pairs();
    let mut failures = Vec::new();
    if order != cols {
        failures.push(Failure::NotSquare);
    }
    if !order_possible(order) {
        failures.push(Failure::ImpossibleOrder);
    }
    if total > 0 {
        failures.push(Failure::RowsNotOrthogonal);
    }
    Report {
        order,
        cols,
        hadamard: failures.is_empty(),
        failures,
        sha256,
        properties,
        failing_pairs: pairs,
        failing_pairs_total: total,
        check: format!("{CHECK_NAME}/v{CHECK_VERSION}"),
        kernel: kernel.for_shape(order, cols).name().to_string(),
    }
}

/// The properties of any ±1 matrix.
pub fn properties(m: &Matrix) -> Properties {
    let n = m.rows();
    let square = m.is_square();
    let normalized = n > 0 && m.row_negatives(0) == 0 && (0..n).all(|i| !m.is_negative(i, 0));
    let t = m.transpose();
    let (symmetric, skew) = if square {
        let symmetric = t == *m;
        // Skew: the diagonal is +1, and entry (i,j) is the negation of (j,i) off the diagonal,
        // so H ⊕ Hᵀ is all ones except on the diagonal.
        let tail = crate::matrix::tail_mask(n);
        let skew = (0..n).all(|i| {
            let (a, b) = (m.row_words(i), t.row_words(i));
            !m.is_negative(i, i)
                && a.iter().zip(b).enumerate().all(|(k, (x, y))| {
                    let mut want = if k + 1 == a.len() { tail } else { u64::MAX };
                    if k == i / 64 {
                        want &= !(1u64 << (i % 64));
                    }
                    (x ^ y) == want
                })
        });
        (symmetric, skew)
    } else {
        (false, false)
    };
    let sum = |x: &Matrix, i: usize| x.cols() as i64 - 2 * x.row_negatives(i) as i64;
    let row_sums: Vec<i64> = (0..n).map(|i| sum(m, i)).collect();
    let excess = row_sums.iter().sum();
    let regular = n > 0
        && row_sums.iter().all(|&r| r == row_sums[0])
        && (0..t.rows()).all(|j| sum(&t, j) == row_sums[0]);
    Properties {
        normalized,
        symmetric,
        skew,
        regular,
        excess,
    }
}

/// The running count of failing pairs.
///
/// It keeps the `cap` smallest failing pairs in (i, j) order in a bounded max-heap, so the
/// kept list is exact however the work is split between threads, and memory stays O(cap)
/// even when every pair fails.
struct PairTally {
    cap: usize,
    heap: std::collections::BinaryHeap<(usize, usize, i64)>,
    total: u64,
    stop_at_first: bool,
}

impl PairTally {
    fn new(cap: usize) -> PairTally {
        PairTally {
            cap,
            heap: std::collections::BinaryHeap::new(),
            total: 0,
            stop_at_first: false,
        }
    }
    #[inline]
    fn record(&mut self, i: usize, j: usize, dot: i64) {
        self.total += 1;
        if self.heap.len() < self.cap {
            self.heap.push((i, j, dot));
        } else if let Some(top) = self.heap.peek() {
            if (i, j) < (top.0, top.1) {
                self.heap.pop();
                self.heap.push((i, j, dot));
            }
        }
    }
    fn merge(&mut self, other: PairTally) {
        let total = self.total + other.total;
        for (i, j, d) in other.heap {
            self.record(i, j, d);
        }
        self.total = total;
    }
    fn done(&self) -> bool {
        self.stop_at_first && self.total > 0
    }
    fn into_pairs(self) -> Vec<FailingPair> {
        let mut v: Vec<FailingPair> = self
            .heap
            .into_iter()
            .map(|(i, j, dot)| FailingPair { i, j, dot })
            .collect();
        v.sort_unstable_by_key(|p| (p.i, p.j));
        v
    }
}

/// Rows per tile side.
const T: usize = 4;

/// A kernel of the exact check. Every kernel gives the same verdict and the same failing pairs
/// (the tests compare each with a naive count); they differ in speed and in the CPUs that have
/// them.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Kernel {
    /// The portable 4×4 tile, `count_ones` per word.
    Scalar,
    /// x86-64 with POPCNT: the tile with the hardware instruction.
    Popcnt,
    /// x86-64 with AVX-512F and VPOPCNTDQ: the tile, eight words per instruction.
    Avx512Tile,
    /// x86-64 with AVX2: the bit-sliced kernel, 256 pairs per `__m256i`.
    Avx2Sliced,
    /// x86-64 with AVX-512F: the bit-sliced kernel, 512 pairs per `__m512i`.
    Avx512Sliced,
    /// wasm32 built with simd128: the tile, two words per `v128` by `i8x16.popcnt`.
    Simd128Tile,
    /// wasm32 built with simd128: the bit-sliced kernel, 128 pairs per `v128`.
    Simd128Sliced,
}

impl Kernel {
    /// Every kernel, whether this CPU has it or not.
    pub const ALL: [Kernel; 7] = [
        Kernel::Scalar,
        Kernel::Popcnt,
        Kernel::Avx512Tile,
        Kernel::Avx2Sliced,
        Kernel::Avx512Sliced,
        Kernel::Simd128Tile,
        Kernel::Simd128Sliced,
    ];

    /// The kernels this CPU (and this build) has, in the order of [`Kernel::ALL`].
    pub fn available() -> Vec<Kernel> {
        Kernel::ALL
            .into_iter()
            .filter(|k| k.is_available())
            .collect()
    }

    /// True when this CPU and this build can run the kernel.
    pub fn is_available(self) -> bool {
        match self {
            Kernel::Scalar => true,
            #[cfg(target_arch = "x86_64")]
            Kernel::Popcnt => is_x86_feature_detected!("popcnt"),
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512Tile => {
                is_x86_feature_detected!("avx512f")
                    && is_x86_feature_detected!("avx512vpopcntdq")
                    && is_x86_feature_detected!("popcnt")
            }
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2Sliced => {
                is_x86_feature_detected!("avx2") && is_x86_feature_detected!("popcnt")
            }
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512Sliced => {
                is_x86_feature_detected!("avx512f") && is_x86_feature_detected!("popcnt")
            }
            #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
            Kernel::Simd128Tile | Kernel::Simd128Sliced => true,
            #[allow(unreachable_patterns)]
            _ => false,
        }
    }

    /// The fastest kernel this CPU has, as measured (`cargo bench -p hadamard-core --bench
    /// verify`, docs/performance.md): the AVX-512 VPOPCNTDQ tile where the CPU has it (on an
    /// Intel Xeon of the Sapphire Rapids class it beat the AVX-512 bit-sliced kernel at every
    /// order from 1024 to 8192, whose panel waits in L2 there: 25.9 against 32.0 ms at 4096
    /// on a quiet machine), else the bit-sliced kernel (AVX-512, then AVX2, then simd128 in
    /// wasm32; with AVX2 alone 55 ms against 145 ms for the POPCNT tile at 4096), else the
    /// POPCNT tile. [`Kernel::for_shape`] then picks a tile for the shapes a sliced kernel
    /// does not take.
    pub fn best() -> Kernel {
        [
            Kernel::Avx512Tile,
            Kernel::Avx512Sliced,
            Kernel::Avx2Sliced,
            Kernel::Simd128Sliced,
            Kernel::Popcnt,
        ]
        .into_iter()
        .find(|k| k.is_available())
        .unwrap_or(Kernel::Scalar)
    }

    /// The name recorded in reports.
    pub fn name(self) -> &'static str {
        match self {
            #[cfg(target_arch = "wasm32")]
            Kernel::Scalar => "wasm32-scalar-tiled",
            #[cfg(not(target_arch = "wasm32"))]
            Kernel::Scalar => "scalar-tiled",
            Kernel::Popcnt => "popcnt-tiled",
            Kernel::Avx512Tile => "avx512-vpopcntdq-tiled",
            Kernel::Avx2Sliced => "avx2-sliced",
            Kernel::Avx512Sliced => "avx512-sliced",
            Kernel::Simd128Tile => "wasm32-simd128-tiled",
            Kernel::Simd128Sliced => "wasm32-simd128-sliced",
        }
    }

    /// The kernel named `name` ([`Kernel::name`], or `"best"`), if there is one.
    pub fn from_name(name: &str) -> Option<Kernel> {
        if name == "best" {
            return Some(Kernel::best());
        }
        Kernel::ALL
            .into_iter()
            .find(|k| k.name() == name || (*k == Kernel::Scalar && name == "scalar-tiled"))
    }

    /// True for the bit-sliced kernels.
    pub fn is_sliced(self) -> bool {
        matches!(
            self,
            Kernel::Avx2Sliced | Kernel::Avx512Sliced | Kernel::Simd128Sliced
        )
    }

    /// The kernel that checks a matrix of this shape: the kernel itself, except that a
    /// bit-sliced kernel leaves the shapes it does not take (an odd number of columns, one
    /// row, 65 535 columns or more) to a tile: the AVX-512 tile where the CPU has VPOPCNTDQ,
    /// the simd128 tile in wasm32, else the POPCNT tile.
    pub fn for_shape(self, rows: usize, cols: usize) -> Kernel {
        if !self.is_sliced() || sliced::fits_shape(rows, cols) {
            return self;
        }
        match self {
            Kernel::Simd128Sliced => Kernel::Simd128Tile,
            Kernel::Avx512Sliced if Kernel::Avx512Tile.is_available() => Kernel::Avx512Tile,
            _ => Kernel::Popcnt,
        }
    }

    fn assert_available(self) {
        assert!(
            self.is_available(),
            "the {} kernel is not available on this CPU",
            self.name()
        );
    }
}

impl std::fmt::Display for Kernel {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// Rows per panel of the tiles (and of a [`Split`]): the panel of rows j is kept hot in the L1
/// cache (about 32 KiB) while every tile of rows i above it streams past, so each word is
/// fetched from memory about n/P times instead of n/4 times.
fn panel_rows(m: &Matrix) -> usize {
    // In wasm32 with simd128 a panel is the bit-sliced kernel's two blocks of 128 rows. It is
    // fixed at build time, not by the kernel chosen at run time, so a `Split` is the same
    // on the page and in every worker.
    #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
    {
        let _ = m;
        return sliced::wasm::BLOCKS * 128;
    }
    #[allow(unreachable_code)]
    let row_bytes = (m.words_per_row() * 8).max(8);
    ((32 * 1024 / row_bytes) / T * T).clamp(T, 1024)
}

/// The number of row pairs (i, j), i < j, with j in panel `p`.
fn panel_pairs(n: usize, panel: usize, p: usize) -> u64 {
    let (j0, j1) = (p * panel, ((p + 1) * panel).min(n));
    (j0..j1).map(|j| j as u64).sum()
}

/// Visits every pair i < j of rows once, recording those whose popcount is not n/2.
fn gram_pass(m: &Matrix, kernel: Kernel, tally: &mut PairTally) {
    let kernel = kernel.for_shape(m.rows(), m.cols());
    // Enough work to be worth a second thread: about 2·10⁶ word products.
    let parallel = cfg!(not(target_arch = "wasm32"))
        && (m.rows() * m.rows() / 2) * m.words_per_row() > 2_000_000;
    if kernel.is_sliced() {
        // The bit-sliced kernels cut the rows j into panels of their own width.
        sliced_pass(m, kernel, 0, m.rows(), parallel, tally);
        return;
    }
    let panel = panel_rows(m);
    let panels = m.rows().div_ceil(panel);
    #[cfg(not(target_arch = "wasm32"))]
    {
        if panels > 1 && parallel {
            use rayon::prelude::*;
            let stop = tally.stop_at_first;
            let cap = tally.cap;
            // Later panels hold more pairs; hand them out first so the threads finish together.
            let parts: Vec<PairTally> = (0..panels)
                .rev()
                .collect::<Vec<_>>()
                .into_par_iter()
                .with_max_len(1)
                .map(|p| {
                    let mut t = PairTally::new(cap);
                    t.stop_at_first = stop;
                    panel_pass(m, kernel, panel, p, &mut t);
                    t
                })
                .collect();
            for p in parts {
                tally.merge(p);
            }
            return;
        }
    }
    for p in 0..panels {
        panel_pass(m, kernel, panel, p, tally);
        if tally.done() {
            return;
        }
    }
}

/// Every pair (i, j), i < j, with j in `j_lo..j_hi`, by a bit-sliced kernel.
fn sliced_pass(
    m: &Matrix,
    kernel: Kernel,
    j_lo: usize,
    j_hi: usize,
    parallel: bool,
    tally: &mut PairTally,
) {
    debug_assert!(kernel.is_available() && sliced::fits_shape(m.rows(), m.cols()));
    let _ = (j_lo, j_hi, &tally, parallel);
    match kernel {
        // SAFETY: the kernel is available (checked by every public entry point), so the CPU
        // has AVX2 or AVX-512F.
        #[cfg(target_arch = "x86_64")]
        Kernel::Avx2Sliced => unsafe { sliced::x86::check_avx2(m, j_lo, j_hi, parallel, tally) },
        #[cfg(target_arch = "x86_64")]
        Kernel::Avx512Sliced => unsafe {
            sliced::x86::check_avx512(m, j_lo, j_hi, parallel, tally)
        },
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        Kernel::Simd128Sliced => sliced::wasm::check(m, j_lo, j_hi, tally),
        _ => unreachable!("{} is not a bit-sliced kernel here", kernel.name()),
    }
}

/// All pairs (i, j) with i < j and j in panel `p` (rows p·panel .. (p+1)·panel).
fn panel_pass(m: &Matrix, kernel: Kernel, panel: usize, p: usize, tally: &mut PairTally) {
    let n = m.rows();
    let kernel = kernel.for_shape(m.rows(), m.cols());
    let (j_lo, j_hi) = (p * panel, ((p + 1) * panel).min(n));
    if kernel.is_sliced() {
        if j_hi > j_lo {
            sliced_pass(m, kernel, j_lo, j_hi, false, tally);
        }
        return;
    }
    let mut i0 = 0;
    while i0 < j_hi {
        let full_i = i0 + T <= n;
        let mut j0 = j_lo.max(i0 / T * T);
        while j0 < j_hi {
            if full_i && j0 + T <= j_hi {
                let mut acc = [[0u32; T]; T];
                tile(kernel, m, i0, j0, &mut acc);
                // Nearly every tile of a Hadamard matrix: sixteen orthogonal pairs.
                if acc.iter().flatten().all(|&pc| 2 * pc as usize == m.cols()) {
                    j0 += T;
                    continue;
                }
                for (a, row) in acc.iter().enumerate() {
                    for (b, &pc) in row.iter().enumerate() {
                        let (i, j) = (i0 + a, j0 + b);
                        if j > i {
                            check_pair(m, i, j, pc, tally);
                        }
                    }
                }
            } else {
                for i in i0..(i0 + T).min(n) {
                    for j in j0.max(i + 1)..(j0 + T).min(j_hi) {
                        let pc = m
                            .row_words(i)
                            .iter()
                            .zip(m.row_words(j))
                            .map(|(x, y)| (x ^ y).count_ones())
                            .sum();
                        check_pair(m, i, j, pc, tally);
                    }
                }
            }
            j0 += T;
        }
        if tally.done() {
            return;
        }
        i0 += T;
    }
}

#[inline]
fn check_pair(m: &Matrix, i: usize, j: usize, popcount: u32, tally: &mut PairTally) {
    let dot = m.cols() as i64 - 2 * popcount as i64;
    if dot != 0 {
        tally.record(i, j, dot);
    }
}

/// The popcounts of rᵢ ⊕ rⱼ for the 4×4 tile of rows i0.., j0.., by the tile `kernel` (an
/// available one).
#[inline]
fn tile(kernel: Kernel, m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
    match kernel {
        #[cfg(target_arch = "x86_64")]
        // SAFETY: the kernel is available, so the CPU reports AVX-512F and VPOPCNTDQ.
        Kernel::Avx512Tile => unsafe { x86::tile_avx512(m, i0, j0, acc) },
        #[cfg(target_arch = "x86_64")]
        // SAFETY: the kernel is available, so the CPU reports POPCNT.
        Kernel::Popcnt => unsafe { x86::tile_popcnt(m, i0, j0, acc) },
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        Kernel::Simd128Tile => wasm_simd::tile_simd128(m, i0, j0, acc),
        _ => tile_scalar(m, i0, j0, acc),
    }
}

/// The words of rows i0..i0+T, one tile's side.
#[inline(always)]
fn four_rows(m: &Matrix, i0: usize) -> [&[u64]; T] {
    std::array::from_fn(|r| m.row_words(i0 + r))
}

/// The portable tile: sixteen running popcounts over the rows' words.
#[inline(always)]
fn tile_scalar(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
    let w = m.words_per_row();
    let (a, b) = (four_rows(m, i0), four_rows(m, j0));
    let (a0, a1, a2, a3) = (&a[0][..w], &a[1][..w], &a[2][..w], &a[3][..w]);
    let (b0, b1, b2, b3) = (&b[0][..w], &b[1][..w], &b[2][..w], &b[3][..w]);
    let mut s = [[0u32; T]; T];
    for k in 0..w {
        let x = [a0[k], a1[k], a2[k], a3[k]];
        let y = [b0[k], b1[k], b2[k], b3[k]];
        for r in 0..T {
            for c in 0..T {
                s[r][c] += (x[r] ^ y[c]).count_ones();
            }
        }
    }
    *acc = s;
}

/// The name of the kernel [`verify`] uses on this machine ([`Kernel::best`]).
pub fn kernel_name() -> &'static str {
    Kernel::best().name()
}

#[cfg(target_arch = "x86_64")]
mod x86 {
    use super::{Matrix, T};
    use std::arch::x86_64::*;

    #[target_feature(enable = "popcnt")]
    pub unsafe fn tile_popcnt(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
        super::tile_scalar(m, i0, j0, acc)
    }

    #[target_feature(enable = "avx512f,avx512vpopcntdq")]
    pub unsafe fn tile_avx512(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
        let w = m.words_per_row();
        let bits = m.words().as_ptr();
        let row = |i: usize| bits.add(i * w) as *const i64;
        let (a0, a1, a2, a3) = (row(i0), row(i0 + 1), row(i0 + 2), row(i0 + 3));
        let (b0, b1, b2, b3) = (row(j0), row(j0 + 1), row(j0 + 2), row(j0 + 3));
        let z = _mm512_setzero_si512();
        let mut s = [z; 16];
        macro_rules! step {
            ($ld:expr) => {{
                let x = [$ld(a0), $ld(a1), $ld(a2), $ld(a3)];
                let y = [$ld(b0), $ld(b1), $ld(b2), $ld(b3)];
                for r in 0..T {
                    for c in 0..T {
                        let d = _mm512_xor_si512(x[r], y[c]);
                        s[r * T + c] = _mm512_add_epi64(s[r * T + c], _mm512_popcnt_epi64(d));
                    }
                }
            }};
        }
        let full = w / 8 * 8;
        let mut k = 0;
        while k < full {
            step!(|p: *const i64| _mm512_loadu_si512(p.add(k) as *const _));
            k += 8;
        }
        if k < w {
            let mask: __mmask8 = (1u8 << (w - k)) - 1;
            step!(|p: *const i64| _mm512_maskz_loadu_epi64(mask, p.add(k)));
        }
        // Sixteen horizontal sums by a transposing tree: 8 vectors become one vector of their
        // 8 sums in 21 instructions, instead of a full reduction each.
        let lo = hsum8([s[0], s[1], s[2], s[3], s[4], s[5], s[6], s[7]]);
        let hi = hsum8([s[8], s[9], s[10], s[11], s[12], s[13], s[14], s[15]]);
        let mut out = [0u64; 16];
        _mm512_storeu_si512(out.as_mut_ptr() as *mut _, lo);
        _mm512_storeu_si512(out.as_mut_ptr().add(8) as *mut _, hi);
        for r in 0..T {
            for c in 0..T {
                acc[r][c] = out[r * T + c] as u32;
            }
        }
    }

    /// Lane k of the result is the sum of the eight lanes of v[k].
    #[inline]
    #[target_feature(enable = "avx512f")]
    unsafe fn hsum8(v: [__m512i; 8]) -> __m512i {
        let pair = |a: __m512i, b: __m512i| {
            _mm512_add_epi64(_mm512_unpacklo_epi64(a, b), _mm512_unpackhi_epi64(a, b))
        };
        let (p01, p23, p45, p67) = (
            pair(v[0], v[1]),
            pair(v[2], v[3]),
            pair(v[4], v[5]),
            pair(v[6], v[7]),
        );
        let quad = |a: __m512i, b: __m512i| {
            _mm512_add_epi64(
                _mm512_shuffle_i64x2::<0b10_00_10_00>(a, b),
                _mm512_shuffle_i64x2::<0b11_01_11_01>(a, b),
            )
        };
        let (q0, q1) = (quad(p01, p23), quad(p45, p67));
        quad(q0, q1)
    }
}

#[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
mod wasm_simd {
    use super::{Matrix, T};
    use std::arch::wasm32::*;

    /// Steps of one `v128` (two words) before the byte counters are widened: a byte of
    /// `i8x16.popcnt` is at most 8, and 31 · 8 = 248 still fits in a byte.
    const STEPS_PER_FLUSH: usize = 31;

    /// The sum of the sixteen bytes of `v`.
    #[inline(always)]
    fn byte_sum(v: v128) -> u32 {
        let s = i32x4_extadd_pairwise_u16x8(i16x8_extadd_pairwise_u8x16(v));
        (i32x4_extract_lane::<0>(s)
            + i32x4_extract_lane::<1>(s)
            + i32x4_extract_lane::<2>(s)
            + i32x4_extract_lane::<3>(s)) as u32
    }

    /// The 4×4 tile of popcounts of rᵢ ⊕ rⱼ, two words at a time; an odd last word is counted
    /// with `i64.popcnt`.
    #[inline(always)]
    pub fn tile_simd128(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
        let w = m.words_per_row();
        let (a, b) = (super::four_rows(m, i0), super::four_rows(m, j0));
        let steps = w / 2;
        let load = |row: &[u64], k: usize| -> v128 {
            let pair = &row[2 * k..2 * k + 2];
            // SAFETY: `pair` is two initialised u64, 16 bytes; v128_load has no alignment
            // requirement.
            unsafe { v128_load(pair.as_ptr() as *const v128) }
        };
        let mut s = [[0u32; T]; T];
        let mut k = 0;
        while k < steps {
            let end = (k + STEPS_PER_FLUSH).min(steps);
            let mut bytes = [[u8x16_splat(0); T]; T];
            while k < end {
                let x = [load(a[0], k), load(a[1], k), load(a[2], k), load(a[3], k)];
                for c in 0..T {
                    let y = load(b[c], k);
                    for r in 0..T {
                        bytes[r][c] = u8x16_add(bytes[r][c], i8x16_popcnt(v128_xor(x[r], y)));
                    }
                }
                k += 1;
            }
            for r in 0..T {
                for c in 0..T {
                    s[r][c] += byte_sum(bytes[r][c]);
                }
            }
        }
        if w % 2 == 1 {
            for r in 0..T {
                for c in 0..T {
                    s[r][c] += (a[r][w - 1] ^ b[c][w - 1]).count_ones();
                }
            }
        }
        *acc = s;
    }
}

/// Verification in bounded steps, for a caller that must stay responsive (the browser).
///
/// Each [`Progressive::step`] checks a few block rows; [`Progressive::finish`] gives the same
/// report as [`verify`] would.
pub struct Progressive<'a> {
    m: &'a Matrix,
    kernel: Kernel,
    panel: usize,
    next_panel: usize,
    panels: usize,
    tally: PairTally,
    pairs_done: u64,
}

impl<'a> Progressive<'a> {
    /// Starts checking `m` with the best kernel here.
    pub fn new(m: &'a Matrix, cap: usize) -> Progressive<'a> {
        Progressive::with_kernel(m, cap, Kernel::best())
    }

    /// Starts checking `m` with the given kernel.
    ///
    /// # Panics
    /// When this CPU lacks the kernel ([`Kernel::is_available`]).
    pub fn with_kernel(m: &'a Matrix, cap: usize, kernel: Kernel) -> Progressive<'a> {
        kernel.assert_available();
        let panel = panel_rows(m);
        Progressive {
            m,
            kernel,
            panel,
            next_panel: 0,
            panels: m.rows().div_ceil(panel),
            tally: PairTally::new(cap),
            pairs_done: 0,
        }
    }

    /// Checks panels until about `budget` row pairs have been done; returns the fraction of
    /// all pairs done so far (1.0 when finished).
    pub fn step(&mut self, budget: u64) -> f64 {
        let n = self.m.rows() as u64;
        let total = (n * n.saturating_sub(1) / 2).max(1);
        let mut spent = 0;
        while self.next_panel < self.panels && spent < budget {
            panel_pass(
                self.m,
                self.kernel,
                self.panel,
                self.next_panel,
                &mut self.tally,
            );
            let pairs = panel_pairs(self.m.rows(), self.panel, self.next_panel);
            spent += pairs;
            self.pairs_done += pairs;
            self.next_panel += 1;
        }
        if self.is_done() {
            1.0
        } else {
            self.pairs_done as f64 / total as f64
        }
    }

    /// True when every pair has been checked.
    pub fn is_done(&self) -> bool {
        self.next_panel >= self.panels
    }

    /// The report. Checks whatever is left first.
    pub fn finish(mut self) -> Report {
        while !self.is_done() {
            self.step(u64::MAX);
        }
        finish_report(self.m, self.tally, self.kernel)
    }
}

/// The exact check cut into shares, for callers that run them elsewhere and merge the results:
/// the browser hands them to Web Workers, each holding its own copy of the matrix.
///
/// Share `s` is every pair (i, j), i < j, whose row j lies in the `s`-th panel of rows (the
/// panels [`verify`] itself uses), so the shares are disjoint and together hold all
/// n(n−1)/2 pairs. [`Merge`] accepts each share once and makes a report only when it has all
/// of them.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Split {
    order: usize,
    cols: usize,
    panel: usize,
    shares: usize,
}

impl Split {
    /// How the check of `m` is cut.
    pub fn of(m: &Matrix) -> Split {
        let panel = panel_rows(m);
        Split {
            order: m.rows(),
            cols: m.cols(),
            panel,
            shares: m.rows().div_ceil(panel),
        }
    }

    /// The number of shares (at least one for a non-empty matrix).
    pub fn shares(&self) -> usize {
        self.shares
    }

    /// The number of row pairs in share `s`; later shares hold more.
    pub fn pairs_in(&self, s: usize) -> u64 {
        panel_pairs(self.order, self.panel, s)
    }

    /// The number of row pairs in all.
    pub fn pairs(&self) -> u64 {
        let n = self.order as u64;
        n * n.saturating_sub(1) / 2
    }
}

/// What the exact check found in one share. Serialisable, so it can cross from a Web Worker.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Share {
    /// Which share of the [`Split`].
    pub share: usize,
    /// The shape of the matrix checked, so a share of another matrix is refused.
    pub order: usize,
    /// Its number of columns.
    pub cols: usize,
    /// The first failing pairs of the share in (i, j) order, at most the cap.
    pub failing_pairs: Vec<FailingPair>,
    /// How many pairs of the share fail in all.
    pub failing_pairs_total: u64,
    /// The kernel that checked it.
    pub kernel: String,
}

/// Runs the exact check on share `s` of `m`'s [`Split`], keeping at most `cap` failing pairs.
///
/// # Panics
/// When `s` is not a share of the split (`s >= Split::of(m).shares()`).
pub fn check_share(m: &Matrix, s: usize, cap: usize) -> Share {
    let split = Split::of(m);
    assert!(
        s < split.shares,
        "share {s} of a split into {}",
        split.shares
    );
    let kernel = Kernel::best();
    let mut tally = PairTally::new(cap);
    panel_pass(m, kernel, split.panel, s, &mut tally);
    let failing_pairs_total = tally.total;
    Share {
        share: s,
        order: m.rows(),
        cols: m.cols(),
        failing_pairs: tally.into_pairs(),
        failing_pairs_total,
        kernel: kernel.for_shape(m.rows(), m.cols()).name().to_string(),
    }
}

/// The id and properties of a matrix: the part of a [`Report`] that is not the pair check,
/// so that it too can run in a worker while the shares are checked.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Facts {
    /// The shape they were computed for.
    pub order: usize,
    /// Its number of columns.
    pub cols: usize,
    /// The matrix id.
    pub sha256: String,
    /// The properties.
    pub properties: Properties,
}

/// The id and properties of `m`.
pub fn facts(m: &Matrix) -> Facts {
    Facts {
        order: m.rows(),
        cols: m.cols(),
        sha256: matrix_id(m),
        properties: properties(m),
    }
}

/// Why [`Merge`] refused a share or could not finish.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum MergeError {
    /// The share or facts belong to a matrix of another shape.
    OtherMatrix,
    /// There is no such share in the split.
    NoSuchShare(usize),
    /// That share was merged before.
    Again(usize),
    /// Shares are missing: the first of them, and how many.
    Missing { first: usize, count: usize },
}

impl std::fmt::Display for MergeError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            MergeError::OtherMatrix => write!(f, "a result for a matrix of another shape"),
            MergeError::NoSuchShare(s) => write!(f, "share {s} is not part of the split"),
            MergeError::Again(s) => write!(f, "share {s} was merged twice"),
            MergeError::Missing { first, count } => {
                write!(f, "{count} shares are missing, the first is {first}")
            }
        }
    }
}

impl std::error::Error for MergeError {}

/// The shares of a [`Split`] merged into one report, exactly: the total is the sum of the
/// shares' totals, and the listed pairs are the first `cap` of all shares together, in (i, j)
/// order, whatever order the shares arrive in.
pub struct Merge {
    split: Split,
    merged: Vec<bool>,
    left: usize,
    pairs_done: u64,
    tally: PairTally,
    kernel: Option<String>,
}

impl Merge {
    /// Starts merging the shares of `m`'s split, keeping at most `cap` failing pairs.
    pub fn new(m: &Matrix, cap: usize) -> Merge {
        let split = Split::of(m);
        Merge {
            split,
            merged: vec![false; split.shares],
            left: split.shares,
            pairs_done: 0,
            tally: PairTally::new(cap),
            kernel: None,
        }
    }

    /// The split being merged.
    pub fn split(&self) -> Split {
        self.split
    }

    /// Adds one share; returns the fraction of all pairs merged so far.
    pub fn add(&mut self, share: Share) -> Result<f64, MergeError> {
        if share.order != self.split.order || share.cols != self.split.cols {
            return Err(MergeError::OtherMatrix);
        }
        let s = share.share;
        match self.merged.get_mut(s) {
            None => return Err(MergeError::NoSuchShare(s)),
            Some(true) => return Err(MergeError::Again(s)),
            Some(seen) => *seen = true,
        }
        self.left -= 1;
        self.pairs_done += self.split.pairs_in(s);
        match &mut self.kernel {
            None => self.kernel = Some(share.kernel),
            Some(k) if *k != share.kernel && !k.split(" + ").any(|x| x == share.kernel) => {
                k.push_str(" + ");
                k.push_str(&share.kernel);
            }
            Some(_) => {}
        }
        let mut part = PairTally::new(self.tally.cap);
        part.total = share.failing_pairs_total;
        part.heap = share
            .failing_pairs
            .into_iter()
            .map(|p| (p.i, p.j, p.dot))
            .collect();
        self.tally.merge(part);
        Ok(self.progress())
    }

    /// The fraction of all pairs merged (1.0 when every share is in).
    pub fn progress(&self) -> f64 {
        if self.left == 0 {
            1.0
        } else {
            self.pairs_done as f64 / self.split.pairs().max(1) as f64
        }
    }

    /// True when every share has been merged.
    pub fn is_complete(&self) -> bool {
        self.left == 0
    }

    /// The report, the same as [`verify_with_cap`] gives, from every share and the matrix's
    /// [`Facts`] (computed elsewhere, or by [`facts`]). Its `kernel` names the kernels that
    /// checked the shares.
    pub fn finish(self, facts: Facts) -> Result<Report, MergeError> {
        if facts.order != self.split.order || facts.cols != self.split.cols {
            return Err(MergeError::OtherMatrix);
        }
        if let Some(first) = self.merged.iter().position(|&m| !m) {
            return Err(MergeError::Missing {
                first,
                count: self.left,
            });
        }
        let mut report = report_from(facts, self.tally, Kernel::best());
        if let Some(k) = self.kernel {
            report.kernel = k;
        }
        Ok(report)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sylvester(k: u32) -> Matrix {
        let n = 1usize << k;
        Matrix::from_fn(n, n, |i, j| (i & j).count_ones() % 2 == 1)
    }

    /// Runs `f` with every kernel this CPU has, at the same time on threads of their own
    /// (the kernel is a parameter, so they cannot race; one after another in wasm32, which
    /// has no threads here), and prints which kernels ran and which are absent on this CPU.
    fn each_kernel(f: impl Fn(Kernel) + Sync) {
        let (here, absent): (Vec<Kernel>, Vec<Kernel>) =
            Kernel::ALL.into_iter().partition(|k| k.is_available());
        if cfg!(target_arch = "wasm32") {
            here.iter().for_each(|&k| f(k));
        } else {
            std::thread::scope(|s| {
                for &k in &here {
                    let f = &f;
                    s.spawn(move || f(k));
                }
            });
        }
        // Once per test binary: the list is the same for every call.
        static PRINTED: std::sync::Once = std::sync::Once::new();
        let names = |v: &[Kernel]| v.iter().map(|k| k.name()).collect::<Vec<_>>().join(", ");
        PRINTED.call_once(|| {
            println!(
                "verify tests: kernels that ran on this CPU: {}; absent: {}",
                names(&here),
                if absent.is_empty() {
                    "none".to_string()
                } else {
                    names(&absent)
                }
            )
        });
    }

    /// Every pair i < j whose rows are not orthogonal, by the plain inner product.
    fn naive_failing_pairs(m: &Matrix) -> Vec<FailingPair> {
        let mut want = Vec::new();
        for i in 0..m.rows() {
            for j in i + 1..m.rows() {
                let dot = m.row_dot(i, j);
                if dot != 0 {
                    want.push(FailingPair { i, j, dot });
                }
            }
        }
        want
    }

    fn random_matrix(rows: usize, cols: usize, seed: &mut u64) -> Matrix {
        Matrix::from_fn(rows, cols, |_, _| {
            *seed ^= *seed << 13;
            *seed ^= *seed >> 7;
            *seed ^= *seed << 17;
            *seed & 1 == 1
        })
    }

    #[test]
    fn every_kernel_counts_like_the_scalar_tile() {
        // Widths around the simd128 kernel's two-word steps and its widening every 31 steps
        // (62 words), and the AVX-512 kernel's eight-word steps.
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        assert_eq!(kernel_name(), "wasm32-simd128-sliced");
        let tiles: Vec<Kernel> = Kernel::available()
            .into_iter()
            .filter(|k| !k.is_sliced())
            .collect();
        let mut seed = 0x2545f4914f6cdd1du64;
        for words in [1, 2, 3, 7, 8, 9, 16, 61, 62, 63, 64, 65, 124, 125, 130] {
            for cols in [words * 64 - 5, words * 64] {
                let m = random_matrix(8, cols, &mut seed);
                let mut want = [[0u32; T]; T];
                tile_scalar(&m, 0, 4, &mut want);
                for &kernel in &tiles {
                    let mut got = [[0u32; T]; T];
                    tile(kernel, &m, 0, 4, &mut got);
                    assert_eq!(got, want, "kernel {kernel}, {cols} columns");
                }
                // All ones against all ones differ nowhere; rows and their negations everywhere.
                let mut h = Matrix::ones(8, cols);
                for i in 4..6 {
                    h.negate_row(i);
                }
                tile_scalar(&h, 0, 4, &mut want);
                assert_eq!(want[0], [cols as u32, cols as u32, 0, 0]);
                for &kernel in &tiles {
                    let mut got = [[0u32; T]; T];
                    tile(kernel, &h, 0, 4, &mut got);
                    assert_eq!(got, want, "kernel {kernel}, {cols} columns");
                }
            }
        }
    }

    #[test]
    fn shares_merged_in_any_order_give_the_report() {
        let mut seed = 0x9e3779b97f4a7c15u64;
        let mut flipped = sylvester(9);
        flipped.flip(300, 17);
        let cases = [
            random_matrix(130, 130, &mut seed),
            random_matrix(301, 640, &mut seed),
            flipped,
            sylvester(10),
        ];
        for m in &cases {
            let want = verify_with_cap(m, 20);
            let split = Split::of(m);
            assert_eq!(
                (0..split.shares()).map(|s| split.pairs_in(s)).sum::<u64>(),
                split.pairs()
            );
            // Last share first (the order the browser hands them out), then an interleaving.
            let orders: [Vec<usize>; 2] = [
                (0..split.shares()).rev().collect(),
                (0..split.shares())
                    .step_by(2)
                    .chain((1..split.shares()).step_by(2))
                    .collect(),
            ];
            for order in orders {
                let mut merge = Merge::new(m, 20);
                let mut last = 0.0;
                for &s in &order {
                    let f = merge.add(check_share(m, s, 20)).unwrap();
                    assert!(f >= last);
                    last = f;
                }
                assert!(merge.is_complete() && last == 1.0);
                let mut got = merge.finish(facts(m)).unwrap();
                got.kernel = want.kernel.clone();
                assert_eq!(got, want, "order {}", m.rows());
            }
        }
    }

    #[test]
    fn a_merge_refuses_repeats_strangers_and_gaps() {
        let mut h = sylvester(10);
        h.flip(1000, 3);
        let split = Split::of(&h);
        assert!(split.shares() > 2);
        let mut merge = Merge::new(&h, 10);
        merge.add(check_share(&h, 0, 10)).unwrap();
        assert_eq!(merge.add(check_share(&h, 0, 10)), Err(MergeError::Again(0)));
        let mut stranger = check_share(&h, 1, 10);
        stranger.order = 512;
        assert_eq!(merge.add(stranger), Err(MergeError::OtherMatrix));
        let mut beyond = check_share(&h, 1, 10);
        beyond.share = split.shares();
        assert_eq!(
            merge.add(beyond),
            Err(MergeError::NoSuchShare(split.shares()))
        );
        merge.add(check_share(&h, 2, 10)).unwrap();
        assert!(!merge.is_complete());
        assert_eq!(
            merge.finish(facts(&h)),
            Err(MergeError::Missing {
                first: 1,
                count: split.shares() - 2
            })
        );
        let mut all = Merge::new(&h, 10);
        for s in 0..split.shares() {
            all.add(check_share(&h, s, 10)).unwrap();
        }
        assert_eq!(
            all.finish(facts(&sylvester(9))),
            Err(MergeError::OtherMatrix)
        );
    }

    #[test]
    fn sylvester_passes_every_kernel() {
        // Sylvester's matrices are Hadamard (J. J. Sylvester, Phil. Mag. 34 (1867) 461–475).
        each_kernel(|kernel| {
            for k in 0..=10 {
                let h = sylvester(k);
                let r = verify_with(&h, 10, kernel);
                assert!(r.hadamard, "k={k} kernel={kernel}");
                assert_eq!(r.failing_pairs_total, 0);
                assert_eq!(r.kernel, kernel.for_shape(h.rows(), h.cols()).name());
                assert!(is_hadamard_with(&h, kernel), "k={k} kernel={kernel}");
            }
        });
    }

    #[test]
    fn one_flip_fails_every_pair_through_its_row() {
        // Flipping entry (r, c) changes the dot of row r with every other row by ±2, so exactly
        // n − 1 pairs fail, all containing row r.
        let mut h = sylvester(6);
        h.flip(37, 5);
        let r = verify_with_cap(&h, 1000);
        assert!(!r.hadamard);
        assert_eq!(r.failing_pairs_total, 63);
        assert!(r.failing_pairs.iter().all(|p| p.i == 37 || p.j == 37));
        assert!(r.failing_pairs.iter().all(|p| p.dot.abs() == 2));
    }

    #[test]
    fn failing_pairs_match_a_naive_count() {
        // Random ±1 matrices of awkward shapes, including ones spanning several panels.
        let mut seed = 0x9e3779b97f4a7c15u64;
        for &(n, cols) in &[
            (1, 1),
            (3, 3),
            (5, 7),
            (17, 17),
            (130, 130),
            (301, 64),
            (520, 8),
            (1030, 4),
        ] {
            let m = Matrix::from_fn(n, cols, |_, _| {
                seed ^= seed << 13;
                seed ^= seed >> 7;
                seed ^= seed << 17;
                seed & 1 == 1
            });
            let want = naive_failing_pairs(&m);
            each_kernel(|kernel| {
                let r = verify_with(&m, 50, kernel);
                assert_eq!(
                    r.failing_pairs_total,
                    want.len() as u64,
                    "n={n} cols={cols}"
                );
                assert_eq!(
                    r.failing_pairs,
                    want[..want.len().min(50)].to_vec(),
                    "n={n} cols={cols}"
                );
                let mut p = Progressive::with_kernel(&m, 50, kernel);
                p.step(1);
                assert_eq!(p.finish().failing_pairs_total, want.len() as u64);
                assert_eq!(is_hadamard_with(&m, kernel), is_hadamard(&m));
            });
        }
    }

    #[test]
    fn damaged_paley_matrices_fail_exactly_the_naive_pairs() {
        // Paley I matrices (R. E. A. C. Paley, J. Math. Phys. 12 (1933) 311–320) of orders
        // that are not multiples of 64, one spanning two panels of 256 rows, checked whole,
        // cut to fewer rows than columns, with negated rows (rows of every weight, the first
        // with no −1 at all), and with a few entries flipped: every kernel must report exactly
        // the pairs a naive inner product finds.
        let mut seed = 0x51a3_c0de_77e1_f00du64;
        let mut next = |k: usize| {
            seed ^= seed << 13;
            seed ^= seed >> 7;
            seed ^= seed << 17;
            (seed % k as u64) as usize
        };
        for q in [11u64, 19, 43, 107, 163, 271, 331] {
            let h = crate::construct::paley::paley_one(q).unwrap().into_matrix();
            let n = h.rows();
            let mut cases = vec![h.clone()];
            cases.push(Matrix::from_fn(n * 2 / 3, n, |i, j| h.is_negative(i, j)));
            let mut negated = h.clone();
            for i in (1..n).step_by(3) {
                negated.negate_row(i);
            }
            cases.push(negated.clone());
            for flips in [1, 2, 5] {
                let mut d = negated.clone();
                for _ in 0..flips {
                    let (i, j) = (next(n), next(n));
                    d.set(i, j, -d.get(i, j));
                }
                cases.push(d);
            }
            for m in &cases {
                let want = naive_failing_pairs(m);
                each_kernel(|kernel| {
                    let r = verify_with(m, 1000, kernel);
                    assert_eq!(r.failing_pairs_total, want.len() as u64, "q={q} {kernel}");
                    assert_eq!(
                        r.failing_pairs,
                        want[..want.len().min(1000)],
                        "q={q} {kernel}"
                    );
                    assert_eq!(
                        is_hadamard_with(m, kernel),
                        want.is_empty() && m.is_square()
                    );
                });
            }
        }
    }

    #[test]
    fn inner_products_of_every_size_are_told_apart() {
        // Row k is one row of the Sylvester matrix of order 2048 with its first 2k entries
        // negated, so rows k < l have inner product 2048 − 4(l − k) when 2l ≤ 2048: every
        // inner product ≡ 0 (mod 4) between −2048 and 2048 occurs, so the bit-sliced kernel's
        // counts miss their targets by every amount, in every bit. Every kernel must agree
        // with a naive count.
        let n = 2048;
        let rows = 1030;
        let base = |j: usize| (5 & j).count_ones() % 2 == 1;
        let m = Matrix::from_fn(rows, n, |k, j| base(j) ^ (j < 2 * k));
        let want = naive_failing_pairs(&m);
        assert!(want.len() > 500_000, "few failing pairs: {}", want.len());
        each_kernel(|kernel| {
            let r = verify_with(&m, 100, kernel);
            assert_eq!(r.failing_pairs_total, want.len() as u64, "{kernel}");
            assert_eq!(r.failing_pairs, want[..100], "{kernel}");
        });
    }

    #[test]
    fn properties_of_small_matrices() {
        let h2 = sylvester(1);
        let p = properties(&h2);
        assert!(p.normalized && p.symmetric && !p.skew);
        // [[1,1],[-1,1]] is skew: H + Hᵀ = 2I.
        let s = Matrix::from_rows(&[[1i8, 1], [-1, 1]]).unwrap();
        let p = properties(&s);
        assert!(p.skew && !p.symmetric && !p.normalized);
        // A regular Hadamard matrix of order 4: J − 2I (row sums 2).
        let j = Matrix::from_fn(4, 4, |i, k| i == k);
        let p = properties(&j);
        assert!(p.regular && p.symmetric);
        assert_eq!(p.excess, 8);
        assert!(verify(&j).hadamard);
    }

    #[test]
    fn six_by_six_is_never_hadamard() {
        let m = Matrix::ones_square(6);
        let r = verify(&m);
        assert!(!r.hadamard);
        assert!(r.failures.contains(&Failure::ImpossibleOrder));
    }

    #[test]
    fn progressive_matches_verify() {
        let mut h = sylvester(7);
        h.flip(3, 3);
        let mut p = Progressive::new(&h, 10);
        let mut last = 0.0;
        while !p.is_done() {
            let f = p.step(500);
            assert!(f >= last);
            last = f;
        }
        assert_eq!(p.finish(), verify_with_cap(&h, 10));
    }
}
