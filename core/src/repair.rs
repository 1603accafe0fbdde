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
//! **Several wrong signs.** [`wrong_signs`] (in `repair/signs.rs`): suspect rows (or
//! columns) are rebuilt from the orthogonal complement of the others, and the correction is
//! proven the only one within its distance when it changes fewer than n/2 entries.
//!
//! **Erased entries.** [`complete`] first uses the linear structure. For rows i and j whose
//! erased columns are disjoint, ⟨r_i, r_j⟩ = 0 is linear in the unknowns of both rows; the same
//! holds for columns, since Hᵀ·H = nI too. (A fully known row is disjoint from every row, so
//! each row with unknowns must also be orthogonal to all fully known rows: those are among the
//! equations.) The system is solved exactly modulo 3 (`repair/gf3.rs`): an unknown the system
//! fixes modulo 3 is fixed over the integers, because +1 and −1 differ modulo 3. The fixed
//! entries are filled in, which makes more pairs linear, and this repeats until a round fixes
//! nothing. This follows the observation that about n²/log n random erasures still determine a
//! Hadamard matrix (J. Kline, "Geometric search for Hadamard matrices", Theoret. Comput. Sci.
//! 778 (2019) 33–46), by elimination rather than by that paper's algorithm
//! (references.md#r14-erasures-and-wrong-signs).
//!
//! What is left goes to a backtracking search. For each pair of rows it keeps the part S of the
//! inner product already known and the number K of terms still unknown; a partial assignment
//! survives only while every pair has |S| ≤ K and S ≡ K (mod 2). It counts completions up to a
//! limit. `Unique` is reported only when proven (the equations fixed every entry, or the search
//! was exhaustive), `Several` with two distinct completions, `Undecided` with the entries still
//! unknown. Every completion returned has passed the exact check.

mod gf3;
mod signs;

pub use signs::{wrong_signs, Axis, SignRepair};

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

/// Bounds on the completion.
#[derive(Clone, Copy, Debug)]
pub struct CompletionLimits {
    /// Refuse more erased entries than this (the linear system takes about U²/2 bytes).
    pub max_erasures: usize,
    /// Stop the search after visiting this many partial assignments.
    pub max_nodes: u64,
    /// Stop counting completions after this many.
    pub max_count: u64,
}

impl Default for CompletionLimits {
    fn default() -> Self {
        CompletionLimits {
            max_erasures: 12_000,
            max_nodes: 2_000_000,
            max_count: 1000,
        }
    }
}

/// How a unique completion was proven unique.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Proof {
    /// The linear equations alone fix every erased entry.
    Linear,
    /// The linear equations fixed some entries and an exhaustive search found one way to fill
    /// the rest.
    Search,
}

/// What the erased entries can be.
#[derive(Clone, Debug)]
pub enum Completion {
    /// Exactly one completion is Hadamard (proven as `proof` says).
    Unique {
        id: String,
        matrix: Verified,
        proof: Proof,
    },
    /// No completion is Hadamard (proven).
    None,
    /// More than one; `complete` says whether `count` is the exact number (false: at least).
    /// `examples` holds two distinct completions, both checked.
    Several {
        count: u64,
        complete: bool,
        examples: Vec<Verified>,
    },
    /// The search limit was reached before the answer was known. `remaining` are the entries
    /// still unknown (the others were fixed by the linear equations); `candidate` is a
    /// completion found, if any, not proven to be the only one.
    Undecided {
        explored: u64,
        remaining: Vec<(usize, usize)>,
        candidate: Option<Verified>,
    },
}

/// The answer of [`complete`] with what the linear phase did.
#[derive(Clone, Debug)]
pub struct CompletionReport {
    pub outcome: Completion,
    /// Erased entries (distinct, inside the matrix).
    pub erased: usize,
    /// How many of them the linear equations fixed.
    pub determined: usize,
    /// Rounds of the linear phase (each: build the equations, eliminate, fix).
    pub rounds: usize,
    /// Linear equations used, summed over the rounds.
    pub equations: usize,
}

/// Finds the Hadamard completions of `m` whose entries at `erasures` (row, col) are unknown:
/// first by the linear equations of orthogonality (see the module comment), then by the search
/// for whatever they leave open.
pub fn complete(
    m: &Matrix,
    erasures: &[(usize, usize)],
    limits: CompletionLimits,
) -> CompletionReport {
    let n = m.rows();
    let mut vars: Vec<(usize, usize)> = erasures
        .iter()
        .copied()
        .filter(|&(i, j)| i < n && j < m.cols())
        .collect();
    vars.sort_unstable();
    vars.dedup();
    let mut report = CompletionReport {
        outcome: Completion::None,
        erased: vars.len(),
        determined: 0,
        rounds: 0,
        equations: 0,
    };
    if !m.is_square() || !order_possible(n) {
        return report;
    }
    if vars.len() > limits.max_erasures {
        report.outcome = Completion::Undecided {
            explored: 0,
            remaining: vars,
            candidate: None,
        };
        return report;
    }
    let mut m = m.clone();
    let mut unknown = Matrix::ones(n, n);
    for &(i, j) in &vars {
        unknown.set_negative(i, j, true);
        m.set_negative(i, j, false);
    }
    if !linear_phase(&mut m, &mut unknown, &mut report) {
        return report;
    }
    let vars: Vec<(usize, usize)> = vars
        .into_iter()
        .filter(|&(i, j)| unknown.is_negative(i, j))
        .collect();
    report.determined = report.erased - vars.len();
    report.outcome = search(&m, unknown, &vars, limits);
    report
}

/// Fixes the entries the linear equations force, round after round. Returns false (with
/// `report.outcome` = `None`) when the equations have no ±1 solution.
fn linear_phase(m: &mut Matrix, unknown: &mut Matrix, report: &mut CompletionReport) -> bool {
    let n = m.rows();
    loop {
        let mut index = vec![usize::MAX; n * n];
        let mut count = 0usize;
        for i in 0..n {
            for (k, &w) in unknown.row_words(i).iter().enumerate() {
                let mut bits = w;
                while bits != 0 {
                    index[i * n + k * 64 + bits.trailing_zeros() as usize] = count;
                    count += 1;
                    bits &= bits - 1;
                }
            }
        }
        if count == 0 {
            return true;
        }
        // Pairs of rows, then pairs of columns (index transposed), taken in turn.
        let by_rows = linear_equations(m, unknown, |i, c| index[i * n + c]);
        let (mt, ut) = (m.transpose(), unknown.transpose());
        let by_cols = linear_equations(&mt, &ut, |c, i| index[i * n + c]);
        let cap = 2 * count + 64;
        let mut sys = gf3::System::new(count);
        let (mut a, mut b) = (by_rows.into_iter(), by_cols.into_iter());
        while sys.len() < cap {
            let mut any = false;
            for (terms, rhs) in a.next().into_iter().chain(b.next()) {
                sys.push(&terms, rhs);
                any = true;
            }
            if !any {
                break;
            }
        }
        report.rounds += 1;
        report.equations += sys.len();
        let values = match sys.solve() {
            gf3::Solved::Contradiction => {
                report.outcome = Completion::None;
                return false;
            }
            gf3::Solved::Values(v) => v,
        };
        let mut fixed = 0usize;
        for i in 0..n {
            for c in 0..n {
                let k = index[i * n + c];
                if k == usize::MAX {
                    continue;
                }
                if let Some(v) = values[k] {
                    m.set(i, c, v);
                    unknown.set_negative(i, c, false);
                    fixed += 1;
                }
            }
        }
        if fixed == 0 {
            return true;
        }
    }
}

/// The linear equations ⟨r_i, r_j⟩ = 0 of the row pairs whose unknown entries lie in disjoint
/// columns: Σ_{c unknown in i} h_jc·x_ic + Σ_{c unknown in j} h_ic·x_jc = −(known part).
/// A pair with a fully known row is one of these, so every row is tied to all fully known
/// rows. `var(i, c)` numbers the unknown at (i, c).
fn linear_equations(
    m: &Matrix,
    unknown: &Matrix,
    var: impl Fn(usize, usize) -> usize,
) -> Vec<(Vec<(usize, i8)>, i64)> {
    let n = m.rows();
    let has: Vec<bool> = (0..n)
        .map(|i| unknown.row_words(i).iter().any(|&w| w != 0))
        .collect();
    let mut out = Vec::new();
    for i in 0..n {
        for j in i + 1..n {
            if !has[i] && !has[j] {
                continue;
            }
            let (ui, uj) = (unknown.row_words(i), unknown.row_words(j));
            if ui.iter().zip(uj).any(|(a, b)| a & b != 0) {
                continue;
            }
            let (mut open, mut diff) = (0i64, 0i64);
            for ((a, b), (x, y)) in ui
                .iter()
                .zip(uj)
                .zip(m.row_words(i).iter().zip(m.row_words(j)))
            {
                let any = a | b;
                open += any.count_ones() as i64;
                diff += ((x ^ y) & !any).count_ones() as i64;
            }
            let known = (n as i64 - open) - 2 * diff;
            let mut terms = Vec::with_capacity(open as usize);
            for (row, other, u) in [(i, j, ui), (j, i, uj)] {
                for (k, &w) in u.iter().enumerate() {
                    let mut bits = w;
                    while bits != 0 {
                        let c = k * 64 + bits.trailing_zeros() as usize;
                        terms.push((var(row, c), m.get(other, c)));
                        bits &= bits - 1;
                    }
                }
            }
            out.push((terms, -known));
        }
    }
    out
}

/// The backtracking search over the entries still unknown.
fn search(
    m: &Matrix,
    unknown: Matrix,
    vars: &[(usize, usize)],
    limits: CompletionLimits,
) -> Completion {
    let n = m.rows();
    if vars.is_empty() {
        return match certify(m.clone()) {
            Ok(v) => Completion::Unique {
                id: v.id().to_string(),
                matrix: v,
                proof: Proof::Linear,
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
        examples: Vec::new(),
        limits,
    };
    s.init();
    if !s.feasible_all() {
        return Completion::None;
    }
    let finished = s.dfs(vars, 0);
    let mut examples = std::mem::take(&mut s.examples);
    match (s.found, finished) {
        (0, true) => Completion::None,
        (1, true) => match examples.pop() {
            Some(v) => Completion::Unique {
                id: matrix_id(v.matrix()),
                matrix: v,
                proof: Proof::Search,
            },
            None => Completion::None,
        },
        (0 | 1, false) => Completion::Undecided {
            explored: s.nodes,
            remaining: vars.to_vec(),
            candidate: examples.pop(),
        },
        (k, done) => Completion::Several {
            count: k,
            complete: done,
            examples,
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
    /// The first two completions found.
    examples: Vec<Verified>,
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
                if self.examples.len() < 2 {
                    self.examples.push(v);
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
    use crate::derive::rng::SplitMix64;
    use crate::verify::verify;

    /// Sylvester's matrix of order 2^k, for the tests here and in `signs`.
    pub(super) fn sylvester(k: u32) -> Matrix {
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
        match complete(&m, &erased, CompletionLimits::default()).outcome {
            Completion::Unique { matrix, .. } => assert_eq!(matrix.matrix(), &h),
            other => panic!("expected a unique completion, got {other:?}"),
        }
    }

    #[test]
    fn a_fully_erased_row_has_two_completions() {
        let h = sylvester(3);
        let erased: Vec<(usize, usize)> = (0..8).map(|c| (6, c)).collect();
        match complete(&h, &erased, CompletionLimits::default()).outcome {
            Completion::Several {
                count: 2,
                complete: true,
                examples,
            } => {
                assert_eq!(examples.len(), 2);
                assert_ne!(examples[0].id(), examples[1].id());
                let mut neg = h.clone();
                neg.negate_row(6);
                assert!(examples.iter().any(|v| v.matrix() == &h));
                assert!(examples.iter().any(|v| v.matrix() == &neg));
            }
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
        match complete(&m, &erased, CompletionLimits::default()).outcome {
            Completion::Unique { matrix, .. } => assert_eq!(matrix.matrix(), &h),
            other => panic!("expected unique, got {other:?}"),
        }
    }

    /// A scrambled Sylvester matrix: seeded row and column permutations and negations.
    fn scrambled(k: u32, seed: u64) -> Matrix {
        let h = sylvester(k);
        let n = h.rows();
        let mut rng = SplitMix64::new(seed);
        let (mut p, mut q): (Vec<usize>, Vec<usize>) = ((0..n).collect(), (0..n).collect());
        rng.shuffle(&mut p);
        rng.shuffle(&mut q);
        let (rs, cs): (Vec<bool>, Vec<bool>) = (
            (0..n).map(|_| rng.next_u64() & 1 == 1).collect(),
            (0..n).map(|_| rng.next_u64() & 1 == 1).collect(),
        );
        Matrix::from_fn(n, n, |i, j| h.is_negative(p[i], q[j]) ^ rs[i] ^ cs[j])
    }

    fn erase(h: &Matrix, count: usize, seed: u64) -> (Matrix, Vec<(usize, usize)>) {
        let n = h.rows();
        let mut cells: Vec<usize> = (0..n * n).collect();
        SplitMix64::new(seed).shuffle(&mut cells);
        let erased: Vec<(usize, usize)> = cells[..count].iter().map(|&k| (k / n, k % n)).collect();
        let mut m = h.clone();
        for &(i, j) in &erased {
            m.set_negative(i, j, false);
        }
        (m, erased)
    }

    #[test]
    fn linear_equations_complete_many_random_erasures_in_order_64() {
        // ⌊64²/(2 ln 64)⌋ = 492 erased entries, the load the issue asks for.
        let h = scrambled(6, 3);
        let (m, erased) = erase(&h, 492, 4);
        let rep = complete(&m, &erased, CompletionLimits::default());
        assert_eq!(rep.erased, 492);
        match rep.outcome {
            Completion::Unique { matrix, proof, .. } => {
                assert_eq!(matrix.matrix(), &h);
                assert_eq!(proof, Proof::Linear);
            }
            other => panic!("expected unique, got {other:?}"),
        }
    }

    #[test]
    fn an_impossible_pattern_is_refused() {
        // Erase part of a row whose known part already disagrees with every completion: flip
        // a known entry of a row with erasures, so the linear equations have no ±1 solution.
        let h = scrambled(5, 9);
        let (mut m, erased) = erase(&h, 40, 10);
        let known = (0..32)
            .find(|&c| !erased.contains(&(0, c)))
            .expect("a known entry");
        m.flip(0, known);
        assert!(matches!(
            complete(&m, &erased, CompletionLimits::default()).outcome,
            Completion::None
        ));
    }

    #[test]
    fn a_search_stopped_after_one_completion_is_undecided_not_several() {
        // With a node budget too small to finish, one completion found is not "several".
        let h = sylvester(3);
        let erased: Vec<(usize, usize)> = (0..8).map(|c| (6, c)).collect();
        let limits = CompletionLimits {
            max_nodes: 9,
            ..CompletionLimits::default()
        };
        match complete(&h, &erased, limits).outcome {
            Completion::Undecided { remaining, .. } => assert_eq!(remaining.len(), 8),
            other => panic!("expected undecided, got {other:?}"),
        }
    }
}
