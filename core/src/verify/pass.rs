//! The pass over all pairs of rows, whole or in bounded steps, and the tally it keeps.

use super::kernel::{tile, Kernel, T};
use super::report::{finish_report, FailingPair, Report};
use super::sliced;
use crate::matrix::Matrix;

/// The running count of failing pairs.
///
/// It keeps the `cap` smallest failing pairs in (i, j) order in a bounded max-heap, so the
/// kept list is exact however the work is split between threads, and memory stays O(cap)
/// even when every pair fails.
pub(super) struct PairTally {
    pub(super) cap: usize,
    pub(super) heap: std::collections::BinaryHeap<(usize, usize, i64)>,
    pub(super) total: u64,
    pub(super) stop_at_first: bool,
}

impl PairTally {
    pub(super) fn new(cap: usize) -> PairTally {
        PairTally {
            cap,
            heap: std::collections::BinaryHeap::new(),
            total: 0,
            stop_at_first: false,
        }
    }
    #[inline]
    pub(super) fn record(&mut self, i: usize, j: usize, dot: i64) {
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
    pub(super) fn merge(&mut self, other: PairTally) {
        let total = self.total + other.total;
        for (i, j, d) in other.heap {
            self.record(i, j, d);
        }
        self.total = total;
    }
    pub(super) fn done(&self) -> bool {
        self.stop_at_first && self.total > 0
    }
    pub(super) fn into_pairs(self) -> Vec<FailingPair> {
        let mut v: Vec<FailingPair> = self
            .heap
            .into_iter()
            .map(|(i, j, dot)| FailingPair { i, j, dot })
            .collect();
        v.sort_unstable_by_key(|p| (p.i, p.j));
        v
    }
}

/// Rows per panel of the tiles (and of a [`Split`]): the panel of rows j is kept hot in the L1
/// cache (about 32 KiB) while every tile of rows i above it streams past, so each word is
/// fetched from memory about n/P times instead of n/4 times.
pub(super) fn panel_rows(m: &Matrix) -> usize {
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
pub(super) fn panel_pairs(n: usize, panel: usize, p: usize) -> u64 {
    let (j0, j1) = (p * panel, ((p + 1) * panel).min(n));
    (j0..j1).map(|j| j as u64).sum()
}

/// Visits every pair i < j of rows once, recording those whose popcount is not n/2.
pub(super) fn gram_pass(m: &Matrix, kernel: Kernel, tally: &mut PairTally) {
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
pub(super) fn panel_pass(
    m: &Matrix,
    kernel: Kernel,
    panel: usize,
    p: usize,
    tally: &mut PairTally,
) {
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
