//! Repair: finding the one wrong sign, and filling in erased entries.
//!
//! Matrices copied from papers often carry a single wrong sign, or entries that could not be
//! read. Orthogonality is a strong constraint, so both can often be settled exactly.
//!
//! **One wrong sign.** If H′ is Hadamard and H differs from it in entry (r, c) alone, then
//! H·Hᵀ differs from nI exactly in row and column r: the inner product of row r with every
//! other row j is `2·h_rc·h_jc`, so all n − 1 pairs through row r fail with inner product ±2,
//! and the pattern of signs down the failing pairs is column c of H, up to the sign of h_rc.
//! [`single_wrong_entry`] looks for that pattern, flips the entry, and returns the corrected
//! matrix only if the exact check passes on it.
//!
//! **Erased entries.** [`complete`] searches the ±1 values of the erased entries by
//! backtracking. For each pair of rows it keeps the part S of the inner product already known
//! and the number K of terms still unknown; a partial assignment survives only while every
//! pair has |S| ≤ K and S ≡ K (mod 2). It counts completions up to a limit and reports a
//! unique one, none, several, or that the limit was reached. Every completion it returns has
//! passed the exact check.

use crate::id::matrix_id;
use crate::matrix::{tail_mask, Matrix};
use crate::verify::{certify, order_possible, Failure, Report, Verified};

/// A single wrong entry and the corrected matrix.
#[derive(Clone, Debug)]
pub struct Repair {
    /// Row of the wrong entry, 0-based.
    pub row: usize,
    /// Column of the wrong entry, 0-based.
    pub col: usize,
    /// The id of the corrected matrix.
    pub corrected_id: String,
    /// The corrected matrix, verified.
    pub corrected: Verified,
}

/// Finds the one entry whose sign, flipped, makes `m` Hadamard, if the failures in `report`
/// are explained by one. `report` must be `verify(m)`'s.
pub fn single_wrong_entry(m: &Matrix, report: &Report) -> Option<Repair> {
    let n = m.rows();
    if report.hadamard || !m.is_square() || !order_possible(n) || n < 2 {
        return None;
    }
    if report.failures != [Failure::RowsNotOrthogonal]
        || report.failing_pairs_total != (n - 1) as u64
    {
        return None;
    }
    let first = report.failing_pairs.first()?;
    let t = m.transpose();
    for r in [first.i, first.j] {
        if !report.failing_pairs.iter().all(|p| p.i == r || p.j == r) {
            continue;
        }
        // target bit j: the inner product of rows r and j is −2, i.e. h_rc·h_jc = −1.
        let mut target = vec![0u64; m.words_per_row()];
        let mut ok = true;
        for j in (0..n).filter(|&j| j != r) {
            match m.row_dot(r, j) {
                2 => {}
                -2 => target[j / 64] |= 1 << (j % 64),
                _ => {
                    ok = false;
                    break;
                }
            }
        }
        if !ok {
            continue;
        }
        // Column c fits when (bit_jc ⊕ bit_rc) = target_j for every j ≠ r.
        let skip_r = !(1u64 << (r % 64));
        let tail = tail_mask(n);
        for c in 0..n {
            let flip = if m.is_negative(r, c) { u64::MAX } else { 0 };
            let col = t.row_words(c);
            let fits = col.iter().zip(&target).enumerate().all(|(k, (&x, &want))| {
                let mut mask = if k + 1 == col.len() { tail } else { u64::MAX };
                if k == r / 64 {
                    mask &= skip_r;
                }
                ((x ^ flip) ^ want) & mask == 0
            });
            if fits {
                let mut fixed = m.clone();
                fixed.flip(r, c);
                if let Ok(v) = certify(fixed) {
                    return Some(Repair {
                        row: r,
                        col: c,
                        corrected_id: v.id().to_string(),
                        corrected: v,
                    });
                }
            }
        }
    }
    None
}

/// Bounds on the completion search.
#[derive(Clone, Copy, Debug)]
pub struct CompletionLimits {
    /// Refuse more erased entries than this.
    pub max_erasures: usize,
    /// Stop after visiting this many partial assignments.
    pub max_nodes: u64,
    /// Stop counting completions after this many.
    pub max_count: u64,
}

impl Default for CompletionLimits {
    fn default() -> Self {
        CompletionLimits {
            max_erasures: 4096,
            max_nodes: 2_000_000,
            max_count: 1000,
        }
    }
}

/// What the erased entries can be.
#[derive(Clone, Debug)]
pub enum Completion {
    /// Exactly one completion is Hadamard.
    Unique { id: String, matrix: Verified },
    /// No completion is Hadamard.
    None,
    /// More than one; `complete` says whether `count` is the exact number (false: at least).
    Several { count: u64, complete: bool },
    /// The search limit was reached before the answer was known.
    GaveUp { explored: u64 },
}

/// Counts the Hadamard completions of `m` whose entries at `erasures` (row, col) are unknown.
pub fn complete(m: &Matrix, erasures: &[(usize, usize)], limits: CompletionLimits) -> Completion {
    let n = m.rows();
    if !m.is_square() || !order_possible(n) {
        return Completion::None;
    }
    if erasures.len() > limits.max_erasures {
        return Completion::GaveUp { explored: 0 };
    }
    let mut unknown = Matrix::ones(n, n);
    for &(i, j) in erasures {
        if i < n && j < n {
            unknown.set_negative(i, j, true);
        }
    }
    let mut vars: Vec<(usize, usize)> = erasures
        .iter()
        .copied()
        .filter(|&(i, j)| i < n && j < n)
        .collect();
    vars.sort_unstable();
    vars.dedup();
    if vars.is_empty() {
        return match certify(m.clone()) {
            Ok(v) => Completion::Unique {
                id: v.id().to_string(),
                matrix: v,
            },
            Err(_) => Completion::None,
        };
    }
    let mut erased_rows: Vec<usize> = vars.iter().map(|v| v.0).collect();
    erased_rows.dedup();
    let mut slot = vec![usize::MAX; n];
    for (k, &r) in erased_rows.iter().enumerate() {
        slot[r] = k;
    }
    // Fully known rows must already be orthogonal to each other.
    let known: Vec<usize> = (0..n).filter(|&i| slot[i] == usize::MAX).collect();
    for (a, &i) in known.iter().enumerate() {
        for &j in &known[a + 1..] {
            if m.row_dot(i, j) != 0 {
                return Completion::None;
            }
        }
    }
    let mut s = Search {
        n,
        m: m.clone(),
        unknown,
        slot,
        sums: vec![0; erased_rows.len() * n],
        open: vec![0; erased_rows.len() * n],
        rows: erased_rows,
        nodes: 0,
        found: 0,
        first: None,
        limits,
    };
    s.init();
    if !s.feasible_all() {
        return Completion::None;
    }
    let finished = s.dfs(&vars, 0);
    match (s.found, finished) {
        (0, true) => Completion::None,
        (1, true) => match s.first.take() {
            Some(v) => Completion::Unique {
                id: matrix_id(v.matrix()),
                matrix: v,
            },
            None => Completion::None,
        },
        (0, false) => Completion::GaveUp { explored: s.nodes },
        (k, done) => Completion::Several {
            count: k,
            complete: done,
        },
    }
}

struct Search {
    n: usize,
    m: Matrix,
    /// Bit set where the entry is still unknown.
    unknown: Matrix,
    /// For each row, its index among the rows with erasures, or usize::MAX.
    slot: Vec<usize>,
    /// sums[k·n + j]: the known part of the inner product of erased row k with row j.
    sums: Vec<i64>,
    /// open[k·n + j]: how many of its terms are still unknown.
    open: Vec<i64>,
    rows: Vec<usize>,
    nodes: u64,
    found: u64,
    first: Option<Verified>,
    limits: CompletionLimits,
}

impl Search {
    fn init(&mut self) {
        let n = self.n;
        for (k, &r) in self.rows.iter().enumerate() {
            for j in 0..n {
                if j == r {
                    continue;
                }
                let (mut open, mut diff) = (0i64, 0i64);
                for ((u, v), (x, y)) in self
                    .unknown
                    .row_words(r)
                    .iter()
                    .zip(self.unknown.row_words(j))
                    .zip(self.m.row_words(r).iter().zip(self.m.row_words(j)))
                {
                    let any = u | v;
                    open += any.count_ones() as i64;
                    diff += ((x ^ y) & !any).count_ones() as i64;
                }
                let known = n as i64 - open;
                self.sums[k * n + j] = known - 2 * diff;
                self.open[k * n + j] = open;
            }
        }
    }

    fn ok(&self, k: usize, j: usize) -> bool {
        let (s, o) = (self.sums[k * self.n + j], self.open[k * self.n + j]);
        s.abs() <= o && (s + o) % 2 == 0
    }

    fn feasible_all(&self) -> bool {
        (0..self.rows.len()).all(|k| (0..self.n).all(|j| j == self.rows[k] || self.ok(k, j)))
    }

    /// Makes entry (r, c) known with sign `neg`, updating every pair through row r; `undo`
    /// reverses it. Returns whether every touched pair stays feasible.
    fn assign(&mut self, r: usize, c: usize, neg: bool, undo: bool) -> bool {
        let n = self.n;
        let kr = self.slot[r];
        if !undo {
            self.m.set_negative(r, c, neg);
            self.unknown.set_negative(r, c, false);
        }
        let v: i64 = if neg { -1 } else { 1 };
        let sign = if undo { -1 } else { 1 };
        let mut feasible = true;
        for j in 0..n {
            if j == r || self.unknown.is_negative(j, c) {
                continue;
            }
            let d = v * self.m.get(j, c) as i64 * sign;
            self.sums[kr * n + j] += d;
            self.open[kr * n + j] -= sign;
            let kj = self.slot[j];
            if kj != usize::MAX {
                self.sums[kj * n + r] += d;
                self.open[kj * n + r] -= sign;
                feasible &= self.ok(kj, r);
            }
            feasible &= self.ok(kr, j);
        }
        if undo {
            self.unknown.set_negative(r, c, true);
            self.m.set_negative(r, c, false);
        }
        feasible
    }

    /// Returns false if it stopped early (limits).
    fn dfs(&mut self, vars: &[(usize, usize)], at: usize) -> bool {
        if at == vars.len() {
            if let Ok(v) = certify(self.m.clone()) {
                self.found += 1;
                if self.first.is_none() {
                    self.first = Some(v);
                }
            }
            return self.found < self.limits.max_count;
        }
        let (r, c) = vars[at];
        for neg in [false, true] {
            self.nodes += 1;
            if self.nodes > self.limits.max_nodes {
                return false;
            }
            let feasible = self.assign(r, c, neg, false);
            let go_on = !feasible || self.dfs(vars, at + 1);
            self.assign(r, c, neg, true);
            if !go_on {
                return false;
            }
        }
        true
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::verify::verify;

    fn sylvester(k: u32) -> Matrix {
        let n = 1usize << k;
        Matrix::from_fn(n, n, |i, j| (i & j).count_ones() % 2 == 1)
    }

    #[test]
    fn every_single_flip_is_located() {
        let h = sylvester(4);
        for r in 0..16 {
            for c in 0..16 {
                let mut bad = h.clone();
                bad.flip(r, c);
                let rep =
                    single_wrong_entry(&bad, &verify(&bad)).expect("one flip is always explained");
                // In order 16 the flip is found at its own place.
                assert_eq!((rep.row, rep.col), (r, c));
                assert_eq!(rep.corrected.matrix(), &h);
            }
        }
    }

    #[test]
    fn two_flips_are_not_called_one() {
        let mut bad = sylvester(5);
        bad.flip(1, 2);
        bad.flip(7, 9);
        assert!(single_wrong_entry(&bad, &verify(&bad)).is_none());
    }

    #[test]
    fn a_whole_erased_row_is_completed_uniquely_up_to_its_known_entry() {
        // Rows orthogonal to 15 known rows of a Hadamard matrix of order 16 span one line, so a
        // row with all but one entry erased has exactly one completion [derived].
        let h = sylvester(4);
        let erased: Vec<(usize, usize)> = (1..16).map(|c| (5, c)).collect();
        let mut m = h.clone();
        for &(i, j) in &erased {
            m.set_negative(i, j, false);
        }
        match complete(&m, &erased, CompletionLimits::default()) {
            Completion::Unique { matrix, .. } => assert_eq!(matrix.matrix(), &h),
            other => panic!("expected a unique completion, got {other:?}"),
        }
    }

    #[test]
    fn a_fully_erased_row_has_two_completions() {
        let h = sylvester(3);
        let erased: Vec<(usize, usize)> = (0..8).map(|c| (6, c)).collect();
        match complete(&h, &erased, CompletionLimits::default()) {
            Completion::Several {
                count: 2,
                complete: true,
            } => {}
            other => panic!("expected ±row, got {other:?}"),
        }
    }

    #[test]
    fn scattered_erasures_in_order_32() {
        let h = sylvester(5);
        let erased = [
            (0, 3),
            (4, 4),
            (9, 31),
            (17, 2),
            (30, 30),
            (31, 0),
            (12, 19),
        ];
        let mut m = h.clone();
        for &(i, j) in &erased {
            m.set_negative(i, j, false);
        }
        match complete(&m, &erased, CompletionLimits::default()) {
            Completion::Unique { matrix, .. } => assert_eq!(matrix.matrix(), &h),
            other => panic!("expected unique, got {other:?}"),
        }
    }
}
