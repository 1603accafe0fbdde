//! Deciding whether two Hadamard matrices are equivalent.
//!
//! A and B of order n are *equivalent* when B = P·D·A·E·Q for permutation matrices P, Q and
//! diagonal ±1 matrices D, E: B[σ(i)][τ(j)] = ε_i·δ_j·A[i][j]. There are three answers:
//!
//! - **equivalent**, with the [`Certificate`] (σ, ε, τ, δ), which is checked entry by entry
//!   ([`check_certificate`]) before it is reported;
//! - **inequivalent**, with an invariant that differs ([`super::invariant`]: the 4-profile,
//!   then the 4-profile of the transpose, the row and column profiles, and the row-pair and
//!   column-pair profiles), or, when every
//!   invariant agrees, because the exhaustive search below found no equivalence;
//! - **undecided**, when the search used up its node budget first. Core reads no clock, so
//!   the limit is a number of search nodes passed in by the caller.
//!
//! The search is a backtracking isomorphism search in the spirit of McKay's reduction of
//! Hadamard equivalence to graph isomorphism (Discrete Math. 27, 1979 [recalled]): rows of A
//! are matched to rows of B one at a time, and the matched rows refine the columns of both
//! matrices into classes by their (sign-normalised) entries in those rows.
//! - The first row of A is matched, with sign +1, to each row of B in turn: (ε, δ) and
//!   (−ε, −δ) give the same map, so its sign is free. Its entries fix the column signs δ up to
//!   the column map: column j of A can only go to a column c of B with δ_j = B[b₁][c]·A[i₁][j].
//! - Each further pair (i ↦ r, sign s) splits every column class by the entry A[i][j]·A[i₁][j]
//!   against s·B[r][c]·B[b₁][c]. A pair is tried only when, for every class, the sums of these
//!   entries agree; the unmatched rows of A and of B must have the same multiset of such
//!   signatures (up to sign), or the branch is cut. Rows and columns start in classes of
//!   equal row (column) profile, so the invariants prune from the first step.
//! - The next row of A is the one with the fewest candidates in B. When every column class is
//!   a single column, τ and δ are determined, every row's image is looked up, and the result is
//!   checked as a certificate.
//!
//! The search is exhaustive over the images of one row of A, so running out of candidates
//! proves the matrices inequivalent.

use super::invariant::{Invariants, Profile};
use super::DeriveError;
use crate::matrix::Matrix;
use crate::verify::Verified;
use serde::{Deserialize, Serialize};
use std::collections::HashMap;

/// The largest order whose invariants are computed (their cost grows as n⁵).
pub const INVARIANT_MAX_ORDER: usize = 128;

/// The node budget used when the caller has no better idea.
pub const DEFAULT_NODE_BUDGET: u64 = 2_000_000;

/// B[row_map[i]][col_map[j]] = row_signs[i]·col_signs[j]·A[i][j] for all i, j.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Certificate {
    pub row_map: Vec<usize>,
    pub row_signs: Vec<i8>,
    pub col_map: Vec<usize>,
    pub col_signs: Vec<i8>,
}

fn is_permutation(p: &[usize], n: usize) -> bool {
    let mut seen = vec![false; n];
    p.len() == n
        && p.iter()
            .all(|&x| x < n && !std::mem::replace(&mut seen[x], true))
}

/// True when `c` carries `a` to `b` exactly (and is made of permutations and signs).
pub fn check_certificate(a: &Matrix, b: &Matrix, c: &Certificate) -> bool {
    let n = a.rows();
    if a.cols() != n || b.rows() != n || b.cols() != n {
        return false;
    }
    if !is_permutation(&c.row_map, n)
        || !is_permutation(&c.col_map, n)
        || c.row_signs.len() != n
        || c.col_signs.len() != n
    {
        return false;
    }
    if !c
        .row_signs
        .iter()
        .chain(&c.col_signs)
        .all(|&s| s == 1 || s == -1)
    {
        return false;
    }
    (0..n).all(|i| {
        (0..n).all(|j| {
            b.get(c.row_map[i], c.col_map[j]) == c.row_signs[i] * c.col_signs[j] * a.get(i, j)
        })
    })
}

/// The verdict.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Verdict {
    Equivalent,
    Inequivalent,
    Undecided,
}

/// An invariant that tells the two matrices apart.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct DifferingInvariant {
    /// `profile4`, `profile4_transpose`, `row_profiles`, `column_profiles`,
    /// `row_pair_profiles` or `column_pair_profiles`.
    pub name: String,
    pub a: serde_json::Value,
    pub b: serde_json::Value,
}

/// The answer to "are A and B equivalent?".
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct EquivalenceReport {
    pub order: usize,
    pub a_id: String,
    pub b_id: String,
    pub verdict: Verdict,
    /// When equivalent: the certificate, already checked.
    pub certificate: Option<Certificate>,
    /// When inequivalent by an invariant: which one, and both values.
    pub invariant: Option<DifferingInvariant>,
    /// Whether the invariants were computed (orders up to [`INVARIANT_MAX_ORDER`]).
    pub invariants_compared: bool,
    /// Search nodes used, and the budget.
    pub nodes: u64,
    pub node_budget: u64,
    pub note: String,
}

/// Decides whether `a` and `b` are equivalent, searching at most `node_budget` nodes.
pub fn equivalence(
    a: &Verified,
    b: &Verified,
    node_budget: u64,
) -> Result<EquivalenceReport, DeriveError> {
    let n = a.order();
    if b.order() != n {
        return Err(DeriveError::new("b", format!("the matrices have different orders ({n} and {}), so they are not equivalent; equivalence compares matrices of one order", b.order())));
    }
    let (am, bm) = (a.matrix(), b.matrix());
    let mut report = EquivalenceReport {
        order: n,
        a_id: a.id().to_owned(),
        b_id: b.id().to_owned(),
        verdict: Verdict::Undecided,
        certificate: None,
        invariant: None,
        invariants_compared: false,
        nodes: 0,
        node_budget,
        note: String::new(),
    };
    let mut classes = None;
    if n <= INVARIANT_MAX_ORDER {
        let (ia, ra, ca) = Invariants::with_lists(am);
        let (ib, rb, cb) = Invariants::with_lists(bm);
        report.invariants_compared = true;
        if let Some(name) = ia.first_difference(&ib) {
            report.verdict = Verdict::Inequivalent;
            report.note = format!("inequivalent: their {} differ, an invariant of every row and column permutation and negation", describe(name));
            report.invariant = Some(DifferingInvariant {
                name: name.to_owned(),
                a: ia.value_of(name),
                b: ib.value_of(name),
            });
            return Ok(report);
        }
        classes = Some((class_ids(&ra, &rb), class_ids(&ca, &cb)));
    }
    let ((row_a, row_b), (col_a, col_b)) =
        classes.unwrap_or_else(|| ((vec![0; n], vec![0; n]), (vec![0; n], vec![0; n])));
    let mut s = Search::new(am, bm, row_a, row_b, node_budget);
    let found = s.run(col_a, col_b);
    report.nodes = s.nodes;
    match found {
        Outcome::Found(c) => {
            // The search's own leaf check already ran; this is the check the report rests on.
            if !check_certificate(am, bm, &c) {
                return Err(DeriveError::new("certificate", "the search produced a certificate that does not check (a bug); nothing is claimed"));
            }
            report.verdict = Verdict::Equivalent;
            report.note =
                "equivalent: the certificate maps A onto B entry by entry, and was checked"
                    .to_owned();
            report.certificate = Some(c);
        }
        Outcome::Exhausted => {
            report.verdict = Verdict::Inequivalent;
            report.note = if report.invariants_compared {
                "inequivalent: every invariant agrees, but the exhaustive search found no equivalence".to_owned()
            } else {
                "inequivalent: the exhaustive search found no equivalence".to_owned()
            };
        }
        Outcome::OutOfBudget => {
            report.note = format!("undecided: no equivalence was found within the budget of {node_budget} search nodes{}; a larger budget may decide it", if report.invariants_compared { ", and every invariant agrees" } else { " (the invariants are not computed at this order)" });
        }
    }
    Ok(report)
}

/// An invariant's name in words.
fn describe(name: &str) -> &'static str {
    match name {
        "profile4" => "4-profiles",
        "profile4_transpose" => "4-profiles of the transposes",
        "row_profiles" => "row profiles (4-profile counts through each row)",
        "column_profiles" => "column profiles (4-profile counts through each column)",
        "row_pair_profiles" => "row-pair profiles (4-profile counts through each pair of rows)",
        _ => "column-pair profiles (4-profile counts through each pair of columns)",
    }
}

/// Dense class ids shared by both lists: equal profiles get equal ids.
fn class_ids(a: &[Profile], b: &[Profile]) -> (Vec<u32>, Vec<u32>) {
    let mut ids: HashMap<&Profile, u32> = HashMap::new();
    let mut id = |p| {
        let next = ids.len() as u32;
        *ids.entry(p).or_insert(next)
    };
    let x = a.iter().map(&mut id).collect();
    let y = b.iter().map(&mut id).collect();
    (x, y)
}

enum Outcome {
    Found(Certificate),
    Exhausted,
    OutOfBudget,
}

struct Search {
    n: usize,
    a: Vec<i8>,
    b: Vec<i8>,
    row_a: Vec<u32>,
    row_b: Vec<u32>,
    b_rows: HashMap<Vec<i8>, usize>,
    nodes: u64,
    budget: u64,
    out_of_budget: bool,
}

/// A row's sums over the column classes, with the sign that makes its first nonzero sum
/// positive, keyed with the row's class.
type Key = (u32, Vec<i32>);

impl Search {
    fn new(am: &Matrix, bm: &Matrix, row_a: Vec<u32>, row_b: Vec<u32>, budget: u64) -> Search {
        let n = am.rows();
        let flat = |m: &Matrix| {
            (0..n)
                .flat_map(|i| (0..n).map(move |j| (i, j)))
                .map(|(i, j)| m.get(i, j))
                .collect::<Vec<i8>>()
        };
        let b = flat(bm);
        let b_rows = (0..n)
            .map(|r| (b[r * n..(r + 1) * n].to_vec(), r))
            .collect();
        Search {
            n,
            a: flat(am),
            b,
            row_a,
            row_b,
            b_rows,
            nodes: 0,
            budget,
            out_of_budget: false,
        }
    }

    fn run(&mut self, col_a: Vec<u32>, col_b: Vec<u32>) -> Outcome {
        let n = self.n;
        if n == 0 {
            return Outcome::Found(Certificate {
                row_map: vec![],
                row_signs: vec![],
                col_map: vec![],
                col_signs: vec![],
            });
        }
        // The first row of A: the one whose class has the fewest members in B.
        let count_b = |c: u32| self.row_b.iter().filter(|&&x| x == c).count();
        let i1 = (0..n).min_by_key(|&i| count_b(self.row_a[i])).unwrap_or(0);
        let mut state = State {
            assigned: vec![None; n],
            used: vec![false; n],
            col_a,
            col_b,
            i1,
            b1: 0,
        };
        for b1 in 0..n {
            if self.row_b[b1] != self.row_a[i1] {
                continue;
            }
            state.b1 = b1;
            state.assigned[i1] = Some((b1, 1));
            state.used[b1] = true;
            if let Some(c) = self.descend(&mut state) {
                return Outcome::Found(c);
            }
            state.assigned[i1] = None;
            state.used[b1] = false;
            if self.out_of_budget {
                return Outcome::OutOfBudget;
            }
        }
        Outcome::Exhausted
    }

    fn na(&self, s: &State, i: usize, j: usize) -> i8 {
        self.a[i * self.n + j] * self.a[s.i1 * self.n + j]
    }

    fn nb(&self, s: &State, r: usize, c: usize) -> i8 {
        self.b[r * self.n + c] * self.b[s.b1 * self.n + c]
    }

    fn key(&self, class: u32, sums: Vec<i32>) -> (Key, i8) {
        let sign = match sums.iter().find(|&&x| x != 0) {
            Some(&x) if x < 0 => -1,
            _ => 1,
        };
        let canon = if sign < 0 {
            sums.iter().map(|x| -x).collect()
        } else {
            sums
        };
        ((class, canon), sign)
    }

    fn descend(&mut self, s: &mut State) -> Option<Certificate> {
        self.nodes += 1;
        if self.nodes > self.budget {
            self.out_of_budget = true;
            return None;
        }
        let n = self.n;
        // Both sides use one id space; the refinement keeps their sets of ids equal.
        let classes = 1 + *s.col_a.iter().chain(&s.col_b).max().unwrap_or(&0) as usize;
        if classes == n && s.col_a.iter().max() == s.col_b.iter().max() {
            return self.complete(s);
        }
        // Signatures of the unmatched rows on both sides.
        let mut a_keys: Vec<(usize, Key, i8)> = Vec::new();
        let mut b_keys: HashMap<Key, Vec<(usize, i8)>> = HashMap::new();
        for i in (0..n).filter(|&i| s.assigned[i].is_none()) {
            let mut sums = vec![0i32; classes];
            for j in 0..n {
                sums[s.col_a[j] as usize] += self.na(s, i, j) as i32;
            }
            let (k, sg) = self.key(self.row_a[i], sums);
            a_keys.push((i, k, sg));
        }
        for r in (0..n).filter(|&r| !s.used[r]) {
            let mut sums = vec![0i32; classes];
            for c in 0..n {
                sums[s.col_b[c] as usize] += self.nb(s, r, c) as i32;
            }
            let (k, sg) = self.key(self.row_b[r], sums);
            b_keys.entry(k).or_default().push((r, sg));
        }
        // The multisets must agree.
        let mut need: HashMap<&Key, usize> = HashMap::new();
        for (_, k, _) in &a_keys {
            *need.entry(k).or_default() += 1;
        }
        if need.len() != b_keys.len()
            || need
                .iter()
                .any(|(k, &c)| b_keys.get(*k).map_or(0, Vec::len) != c)
        {
            return None;
        }
        // The row of A with the fewest candidates.
        let weight = |k: &Key| b_keys[k].len() * if k.1.iter().all(|&x| x == 0) { 2 } else { 1 };
        let (i, key, sa) = a_keys.iter().min_by_key(|(_, k, _)| weight(k)).cloned()?;
        let zero = key.1.iter().all(|&x| x == 0);
        let candidates: Vec<(usize, i8)> = b_keys[&key]
            .iter()
            .flat_map(|&(r, sb)| {
                if zero {
                    vec![(r, 1), (r, -1)]
                } else {
                    vec![(r, sa * sb)]
                }
            })
            .collect();
        for (r, sign) in candidates {
            let saved = (s.col_a.clone(), s.col_b.clone());
            self.refine(s, i, r, sign);
            s.assigned[i] = Some((r, sign));
            s.used[r] = true;
            let found = self.descend(s);
            s.assigned[i] = None;
            s.used[r] = false;
            (s.col_a, s.col_b) = saved;
            if found.is_some() || self.out_of_budget {
                return found;
            }
        }
        None
    }

    /// Splits the column classes by row i of A and row r (times `sign`) of B.
    fn refine(&self, s: &mut State, i: usize, r: usize, sign: i8) {
        let mut ids: HashMap<(u32, i8), u32> = HashMap::new();
        let mut id = |k| {
            let next = ids.len() as u32;
            *ids.entry(k).or_insert(next)
        };
        let new_a: Vec<u32> = (0..self.n)
            .map(|j| id((s.col_a[j], self.na(s, i, j))))
            .collect();
        let new_b: Vec<u32> = (0..self.n)
            .map(|c| id((s.col_b[c], sign * self.nb(s, r, c))))
            .collect();
        s.col_a = new_a;
        s.col_b = new_b;
    }

    /// Every column class is one column: read off τ and δ, look up every row's image.
    fn complete(&self, s: &State) -> Option<Certificate> {
        let n = self.n;
        let mut col_map = vec![0; n];
        let ids = 1 + *s.col_a.iter().chain(&s.col_b).max().unwrap_or(&0) as usize;
        let mut where_b = vec![usize::MAX; ids];
        for c in 0..n {
            where_b[s.col_b[c] as usize] = c;
        }
        for j in 0..n {
            col_map[j] = where_b[s.col_a[j] as usize];
            if col_map[j] == usize::MAX {
                return None;
            }
        }
        let col_signs: Vec<i8> = (0..n)
            .map(|j| self.b[s.b1 * n + col_map[j]] * self.a[s.i1 * n + j])
            .collect();
        let mut row_map = vec![0; n];
        let mut row_signs = vec![1i8; n];
        let mut used = vec![false; n];
        let mut target = vec![0i8; n];
        for i in 0..n {
            for j in 0..n {
                target[col_map[j]] = col_signs[j] * self.a[i * n + j];
            }
            let (r, e) = match self.b_rows.get(&target) {
                Some(&r) => (r, 1),
                None => {
                    let neg: Vec<i8> = target.iter().map(|x| -x).collect();
                    (*self.b_rows.get(&neg)?, -1)
                }
            };
            if std::mem::replace(&mut used[r], true) {
                return None;
            }
            row_map[i] = r;
            row_signs[i] = e;
        }
        let c = Certificate {
            row_map,
            row_signs,
            col_map,
            col_signs,
        };
        let (a, b) = (self.matrix(&self.a), self.matrix(&self.b));
        check_certificate(&a, &b, &c).then_some(c)
    }

    fn matrix(&self, flat: &[i8]) -> Matrix {
        Matrix::from_fn(self.n, self.n, |i, j| flat[i * self.n + j] < 0)
    }
}

struct State {
    assigned: Vec<Option<(usize, i8)>>,
    used: Vec<bool>,
    col_a: Vec<u32>,
    col_b: Vec<u32>,
    i1: usize,
    b1: usize,
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, paley_two, sylvester};
    use crate::derive::rng::SplitMix64;
    use crate::verify::certify;

    /// A random equivalent of `h`: rows and columns permuted and negated.
    pub(crate) fn scramble(h: &Matrix, seed: u64) -> Matrix {
        let n = h.rows();
        let mut g = SplitMix64::new(seed);
        let mut rows: Vec<usize> = (0..n).collect();
        let mut cols: Vec<usize> = (0..n).collect();
        g.shuffle(&mut rows);
        g.shuffle(&mut cols);
        let rs: Vec<bool> = (0..n).map(|_| g.next_u64() & 1 == 1).collect();
        let cs: Vec<bool> = (0..n).map(|_| g.next_u64() & 1 == 1).collect();
        Matrix::from_fn(n, n, |i, j| h.is_negative(rows[i], cols[j]) ^ rs[i] ^ cs[j])
    }

    /// A random Hadamard matrix of order n, normalised: a backtracking search over the rows
    /// with first entry +1 and n/2 entries −1, tried in a shuffled order.
    pub(crate) fn random_hadamard(n: usize, seed: u64) -> Verified {
        fn extend(rows: &mut Vec<usize>, cands: &[usize], all: &[Vec<i8>], n: usize) -> bool {
            if rows.len() == n - 1 {
                return true;
            }
            for (k, &c) in cands.iter().enumerate() {
                let rest: Vec<usize> = cands[k + 1..]
                    .iter()
                    .copied()
                    .filter(|&d| {
                        all[c]
                            .iter()
                            .zip(&all[d])
                            .map(|(x, y)| (x * y) as i32)
                            .sum::<i32>()
                            == 0
                    })
                    .collect();
                if rest.len() + rows.len() + 1 < n - 1 {
                    continue;
                }
                rows.push(c);
                if extend(rows, &rest, all, n) {
                    return true;
                }
                rows.pop();
            }
            false
        }
        let mut all: Vec<Vec<i8>> = Vec::new();
        for bits in 0u32..1 << (n - 1) {
            if bits.count_ones() as usize == n / 2 {
                all.push(
                    std::iter::once(1)
                        .chain((0..n - 1).map(|j| if bits >> j & 1 == 1 { -1 } else { 1 }))
                        .collect(),
                );
            }
        }
        let mut order: Vec<usize> = (0..all.len()).collect();
        SplitMix64::new(seed).shuffle(&mut order);
        let mut rows = Vec::new();
        assert!(extend(&mut rows, &order, &all, n));
        let mut m: Vec<Vec<i8>> = vec![vec![1; n]];
        m.extend(rows.iter().map(|&r| all[r].clone()));
        certify(Matrix::from_rows(&m).unwrap()).unwrap()
    }

    #[test]
    fn scrambled_copies_are_found_equivalent_with_a_checked_certificate() {
        for h in [
            sylvester(4).unwrap(),
            paley_one(11).unwrap(),
            paley_one(23).unwrap(),
            sylvester(5).unwrap(),
            paley_one(31).unwrap(),
            paley_two(13).unwrap(),
        ] {
            let b = certify(scramble(h.matrix(), h.order() as u64)).unwrap();
            let r = equivalence(&h, &b, DEFAULT_NODE_BUDGET).unwrap();
            assert_eq!(
                r.verdict,
                Verdict::Equivalent,
                "order {}: {}",
                h.order(),
                r.note
            );
            assert!(check_certificate(
                h.matrix(),
                b.matrix(),
                r.certificate.as_ref().unwrap()
            ));
        }
    }

    #[test]
    fn order_twelve_is_one_class() {
        // references.md#r9-equivalence-classes: every Hadamard matrix of order 12 is equivalent to every other.
        let p1 = paley_one(11).unwrap();
        let p2 = paley_two(5).unwrap();
        let r = equivalence(&p1, &p2, DEFAULT_NODE_BUDGET).unwrap();
        assert_eq!(r.verdict, Verdict::Equivalent, "{}", r.note);
        for seed in 0..5 {
            let h = random_hadamard(12, seed);
            assert_eq!(
                equivalence(&p1, &h, DEFAULT_NODE_BUDGET).unwrap().verdict,
                Verdict::Equivalent
            );
        }
    }

    #[test]
    fn order_sixteen_has_five_classes_told_apart_by_the_invariants() {
        // references.md#r9-equivalence-classes (Hall's classification): five classes of order 16.
        let mut reps: Vec<Verified> = vec![sylvester(4).unwrap()];
        for seed in 0..60 {
            let h = random_hadamard(16, seed);
            let mut new = true;
            for r in &reps {
                let v = equivalence(r, &h, DEFAULT_NODE_BUDGET).unwrap();
                assert_ne!(v.verdict, Verdict::Undecided);
                if v.verdict == Verdict::Equivalent {
                    new = false;
                    break;
                }
            }
            if new {
                reps.push(h);
            }
        }
        assert_eq!(reps.len(), 5);
        let mut names = std::collections::BTreeSet::new();
        for x in 0..5 {
            for y in x + 1..5 {
                let v = equivalence(&reps[x], &reps[y], 0).unwrap();
                assert!(v.invariant.is_some(), "classes {x} and {y}: {}", v.note);
                names.insert(v.invariant.unwrap().name);
            }
        }
        // The 4-profile alone does not separate them; the pair profiles are needed.
        assert!(
            names.contains("row_pair_profiles") || names.contains("column_pair_profiles"),
            "{names:?}"
        );
    }

    #[test]
    fn the_search_alone_proves_inequivalence_by_exhaustion() {
        // Without the invariants' classes, the search must still decide order 16 exactly:
        // Sylvester's class against others is exhausted (10⁵ to 5·10⁵ nodes each), a scrambled
        // copy is found.
        let s = sylvester(4).unwrap();
        let bare = |a: &Verified, b: &Verified| {
            let n = a.order();
            let mut search = Search::new(
                a.matrix(),
                b.matrix(),
                vec![0; n],
                vec![0; n],
                DEFAULT_NODE_BUDGET,
            );
            search.run(vec![0; n], vec![0; n])
        };
        let mut exhausted = 0;
        for seed in 0..3 {
            let h = random_hadamard(16, seed);
            let decided = equivalence(&s, &h, DEFAULT_NODE_BUDGET).unwrap().verdict;
            match (decided, bare(&s, &h)) {
                (Verdict::Inequivalent, Outcome::Exhausted) => exhausted += 1,
                (Verdict::Equivalent, Outcome::Found(c)) => {
                    assert!(check_certificate(s.matrix(), h.matrix(), &c))
                }
                (v, _) => panic!("seed {seed}: the search alone disagrees with {v:?}"),
            }
        }
        assert!(exhausted > 0);
        let copy = certify(scramble(s.matrix(), 5)).unwrap();
        assert!(matches!(bare(&s, &copy), Outcome::Found(_)));
    }

    #[test]
    fn different_invariants_and_orders() {
        let s = sylvester(5).unwrap();
        let p = paley_one(31).unwrap();
        let r = equivalence(&s, &p, 0).unwrap();
        assert_eq!(
            (r.verdict, r.invariant.as_ref().map(|i| i.name.as_str())),
            (Verdict::Inequivalent, Some("profile4"))
        );
        assert_eq!(
            equivalence(&s, &sylvester(4).unwrap(), 10)
                .unwrap_err()
                .parameter,
            "b"
        );
    }

    #[test]
    fn a_zero_budget_is_undecided_not_wrong() {
        let h = sylvester(5).unwrap();
        let b = certify(scramble(h.matrix(), 3)).unwrap();
        let r = equivalence(&h, &b, 0).unwrap();
        assert_eq!(r.verdict, Verdict::Undecided);
    }

    #[test]
    fn a_wrong_certificate_is_refused() {
        let h = sylvester(3).unwrap();
        let id: Vec<usize> = (0..8).collect();
        let mut c = Certificate {
            row_map: id.clone(),
            row_signs: vec![1; 8],
            col_map: id,
            col_signs: vec![1; 8],
        };
        assert!(check_certificate(h.matrix(), h.matrix(), &c));
        c.row_signs[2] = -1;
        assert!(!check_certificate(h.matrix(), h.matrix(), &c));
        c.row_signs[2] = 1;
        c.row_map[0] = 1;
        assert!(!check_certificate(h.matrix(), h.matrix(), &c));
    }
}
