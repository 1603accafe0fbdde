//! Golay pairs, base sequences BS(n+1, n) and Turyn-type sequences TT(n), by backtracking
//! from both ends of every sequence at once.
//!
//! All three are families of ±1 sequences X₁..X_r of lengths Lⱼ with weights wⱼ such that
//! Σⱼ wⱼ N_Xⱼ(s) = 0 for every shift s ≥ 1 (N the aperiodic autocorrelation):
//!
//! | family | lengths | weights |
//! |---|---|---|
//! | Golay pair of length g | g, g | 1, 1 |
//! | BS(n+1, n) | n+1, n+1, n, n | 1, 1, 1, 1 |
//! | TT(n) (Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21, 2013) | n, n, n, n−1 | 1, 1, 2, 2 |
//!
//! The idea, standard since the first computer searches for these sequences: N_X(s) involves
//! only the first and the last L−s entries of X. So fix the entries from both ends inwards, one
//! layer at a time, in the order of the longest sequence's shifts: at level k (shift
//! s = L_max − k) sequence j gets its entries at depth dⱼ = Lⱼ − s from each end, and the shift s
//! is then fully determined and must sum to 0. With x₀ = 1, the two new entries enter that sum
//! linearly (N_X(s) = known + x₍Lⱼ₋dⱼ₎ + x₍dⱼ₋₁₎·x₍Lⱼ₋₁₎), so each level is a small
//! subset-sum over at most two entries per sequence; the deep shifts (s near L) are checked
//! first, and they prune hardest.
//!
//! Normalisations (each keeps at least one member of every class in the search):
//! - every sequence starts with +1 (negate it);
//! - for TT(n) with n even, a₍ₙ₋₁₎ = +1 (alternate all four by (−1)ⁱ: this flips the last entry
//!   of the length-n sequences and keeps the first entries).
//!
//! TT classes follow references.md#r8-ttn-counts-and-existence: negate any one, reverse any one, swap A and B, and
//! alternate all four; the canonical form is the least image under that group.

use super::Search;
use crate::construct::sequences::{to_text, BaseSequences, GolayPair, TurynType};

/// Which family, and its parameter.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Family {
    /// Golay pairs of length g.
    Golay(usize),
    /// Base sequences BS(n+1, n).
    Base(usize),
    /// Turyn-type sequences TT(n).
    Turyn(usize),
}

/// What the search reports.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Mode {
    /// Normalised solutions as found.
    Solutions,
    /// Class representatives (TT only: other families report solutions).
    Classes,
}

impl Family {
    fn lengths(&self) -> Vec<usize> {
        match *self {
            Family::Golay(g) => vec![g, g],
            Family::Base(n) => vec![n + 1, n + 1, n, n],
            Family::Turyn(n) => vec![n, n, n, n.saturating_sub(1)],
        }
    }
    fn weights(&self) -> Vec<i64> {
        match self {
            Family::Golay(_) => vec![1, 1],
            Family::Base(_) => vec![1, 1, 1, 1],
            Family::Turyn(_) => vec![1, 1, 2, 2],
        }
    }
    /// (sequence, position, value) fixed by the normalisations.
    fn pins(&self) -> Vec<(usize, usize, i8)> {
        let lens = self.lengths();
        let mut p: Vec<(usize, usize, i8)> = (0..lens.len())
            .filter(|&j| lens[j] > 0)
            .map(|j| (j, 0, 1))
            .collect();
        if let Family::Turyn(n) = *self {
            if n % 2 == 0 && n >= 2 {
                p.push((0, n - 1, 1));
            }
        }
        p
    }
}

/// The seed-catalogue line (without provenance) of a solution.
pub fn line(family: Family, x: &[Vec<i8>]) -> String {
    match family {
        Family::Golay(g) => format!("golay g={g} a={} b={}", to_text(&x[0]), to_text(&x[1])),
        Family::Base(n) => format!(
            "base n={n} p=1 a={} b={} c={} d={}",
            to_text(&x[0]),
            to_text(&x[1]),
            to_text(&x[2]),
            to_text(&x[3])
        ),
        Family::Turyn(n) => format!(
            "turyn n={n} a={} b={} c={} d={}",
            to_text(&x[0]),
            to_text(&x[1]),
            to_text(&x[2]),
            to_text(&x[3])
        ),
    }
}

fn is_solution(family: Family, x: &[Vec<i8>]) -> bool {
    match family {
        Family::Golay(_) => GolayPair {
            a: x[0].clone(),
            b: x[1].clone(),
        }
        .is_valid(),
        Family::Base(_) => BaseSequences {
            a: x[0].clone(),
            b: x[1].clone(),
            c: x[2].clone(),
            d: x[3].clone(),
        }
        .is_valid(),
        Family::Turyn(_) => TurynType {
            a: x[0].clone(),
            b: x[1].clone(),
            c: x[2].clone(),
            d: x[3].clone(),
        }
        .is_valid(),
    }
}

/// The class representative of a TT(n) under the equivalence of references.md#r8-ttn-counts-and-existence.
pub fn turyn_canonical(x: &[Vec<i8>]) -> Vec<Vec<i8>> {
    let positive = |v: Vec<i8>| {
        if v.first() == Some(&-1) {
            v.iter().map(|e| -e).collect()
        } else {
            v
        }
    };
    let mut best: Option<Vec<Vec<i8>>> = None;
    for alt in 0..2 {
        for swap in 0..2 {
            for rev in 0..16u32 {
                let mut y: Vec<Vec<i8>> = x.to_vec();
                if swap == 1 {
                    y.swap(0, 1);
                }
                for (j, v) in y.iter_mut().enumerate() {
                    if rev >> j & 1 == 1 {
                        v.reverse();
                    }
                    if alt == 1 {
                        for (i, e) in v.iter_mut().enumerate() {
                            if i % 2 == 1 {
                                *e = -*e;
                            }
                        }
                    }
                }
                let y: Vec<Vec<i8>> = y.into_iter().map(positive).collect();
                if best.as_ref().is_none_or(|b| &y < b) {
                    best = Some(y);
                }
            }
        }
    }
    best.unwrap_or_else(|| x.to_vec())
}

/// The backtracking search for one family and parameter.
pub struct AperiodicSearch {
    family: Family,
    mode: Mode,
    lens: Vec<usize>,
    weights: Vec<i64>,
    longest: usize,
    /// The level at which the tree is cut into units.
    split: usize,
}

/// The choices of one level, for [`AperiodicSearch::product`].
struct Level<'a> {
    lists: &'a [[Choice; 4]; 4],
    counts: &'a [usize; 4],
    which: &'a [usize; 4],
    k: usize,
    max_rest: &'a [i64; 5],
    s: usize,
}

/// A unit: a partial assignment at the split level (0 = unset).
pub struct Unit {
    x: Vec<Vec<i8>>,
}

/// One way to fill a sequence's new entries at a level: the shift's value and the entries.
#[derive(Clone, Copy)]
struct Choice {
    value: i64,
    p: i8,
    q: i8,
}

impl AperiodicSearch {
    /// Prepares the search. `target_units` is roughly how many units the tree is cut into.
    pub fn new(family: Family, mode: Mode) -> Self {
        let lens = family.lengths();
        let longest = *lens.iter().max().unwrap_or(&0);
        let mut s = AperiodicSearch {
            family,
            mode,
            weights: family.weights(),
            lens,
            longest,
            split: 0,
        };
        // Cut where there are a few thousand partial assignments, so both cores stay busy and
        // progress moves; a cut after the last level (small cases) is one unit per solution.
        let mut level_nodes = vec![s.start()];
        let mut level = 1;
        while level < s.longest && level_nodes.len() < 2000 {
            let mut next = Vec::new();
            for x in &level_nodes {
                s.expand(x.clone(), level, level + 1, &mut |y| next.push(y.to_vec()));
            }
            level_nodes = next;
            level += 1;
        }
        s.split = level;
        s
    }

    fn start(&self) -> Vec<Vec<i8>> {
        let mut x: Vec<Vec<i8>> = self.lens.iter().map(|&l| vec![0i8; l]).collect();
        for (j, p, v) in self.family.pins() {
            x[j][p] = v;
        }
        x
    }

    /// The choices for sequence j at level `level` (written to `out`, returning how many), or
    /// `Err(value)` when the sequence has nothing new there and contributes `value` as it is.
    fn choices(
        &self,
        x: &[Vec<i8>],
        j: usize,
        level: usize,
        out: &mut [Choice; 4],
    ) -> Result<usize, i64> {
        let l = self.lens[j];
        let s = self.longest - level;
        if s >= l {
            return Err(0);
        }
        let d = l - s;
        let y = &x[j];
        let known: i64 = (0..d)
            .filter(|&i| y[i] != 0 && y[i + s] != 0)
            .map(|i| y[i] as i64 * y[i + s] as i64)
            .sum();
        let (p, q) = (d - 1, l - d);
        if d > l.div_ceil(2) || (y[p] != 0 && y[q] != 0) {
            return Err(known);
        }
        let opts = |cur: i8| -> &'static [i8] {
            match cur {
                1 => &[1],
                -1 => &[-1],
                _ => &[1, -1],
            }
        };
        // The terms of N(s) that `known` skipped: those with an unset end, which can only be
        // i = 0 (partner q) and i = p (partner l − 1).
        let mut n = 0;
        for &vp in opts(y[p]) {
            for &vq in opts(y[q]) {
                if p == q && vq != vp {
                    continue;
                }
                let get = |pos: usize| -> i64 {
                    if pos == p {
                        vp as i64
                    } else if pos == q {
                        vq as i64
                    } else {
                        y[pos] as i64
                    }
                };
                let mut extra = 0;
                if y[0] == 0 || y[s] == 0 {
                    extra += get(0) * get(s);
                }
                if p != 0 && (y[p] == 0 || y[p + s] == 0) {
                    extra += get(p) * get(p + s);
                }
                out[n] = Choice {
                    value: known + extra,
                    p: vp,
                    q: vq,
                };
                n += 1;
            }
        }
        Ok(n)
    }

    /// Extends `x` from `level` to `stop` (exclusive), calling `found` at each node of level `stop`.
    fn expand(
        &self,
        mut x: Vec<Vec<i8>>,
        level: usize,
        stop: usize,
        found: &mut dyn FnMut(&[Vec<i8>]),
    ) {
        self.descend(&mut x, level, stop, found);
    }

    fn descend(
        &self,
        x: &mut Vec<Vec<i8>>,
        level: usize,
        stop: usize,
        found: &mut dyn FnMut(&[Vec<i8>]),
    ) {
        if level >= stop || level >= self.longest {
            found(x);
            return;
        }
        if !self.sums_can_fit(x) {
            return;
        }
        let s = self.longest - level;
        let mut fixed = 0i64;
        let empty = Choice {
            value: 0,
            p: 0,
            q: 0,
        };
        let mut lists = [[empty; 4]; 4];
        let mut counts = [0usize; 4];
        let mut which = [0usize; 4];
        let mut k = 0;
        for j in 0..self.lens.len() {
            match self.choices(x, j, level, &mut lists[k]) {
                Ok(n) => {
                    counts[k] = n;
                    which[k] = j;
                    k += 1;
                }
                Err(v) => fixed += self.weights[j] * v,
            }
        }
        // What the remaining sequences can still add, to cut the product early.
        let mut max_rest = [0i64; 5];
        for i in (0..k).rev() {
            let w = self.weights[which[i]];
            max_rest[i] = max_rest[i + 1]
                + lists[i][..counts[i]]
                    .iter()
                    .map(|c| (w * c.value).abs())
                    .max()
                    .unwrap_or(0);
        }
        let level_choices = Level {
            lists: &lists,
            counts: &counts,
            which: &which,
            k,
            max_rest: &max_rest,
            s,
        };
        self.product(x, &level_choices, 0, fixed, level, stop, found);
    }

    // The recursion's state is these few values; a struct for them would only rename them.
    #[allow(clippy::too_many_arguments)]
    fn product(
        &self,
        x: &mut Vec<Vec<i8>>,
        lv: &Level<'_>,
        i: usize,
        sum: i64,
        level: usize,
        stop: usize,
        found: &mut dyn FnMut(&[Vec<i8>]),
    ) {
        if sum.abs() > lv.max_rest[i] {
            return;
        }
        if i == lv.k {
            if sum == 0 {
                self.descend(x, level + 1, stop, found);
            }
            return;
        }
        let j = lv.which[i];
        let l = self.lens[j];
        let d = l - lv.s;
        let (p, q) = (d - 1, l - d);
        let (old_p, old_q) = (x[j][p], x[j][q]);
        for c in &lv.lists[i][..lv.counts[i]] {
            x[j][p] = c.p;
            x[j][q] = c.q;
            self.product(
                x,
                lv,
                i + 1,
                sum + self.weights[j] * c.value,
                level,
                stop,
                found,
            );
        }
        x[j][p] = old_p;
        x[j][q] = old_q;
    }

    /// The identity at every shift gives Σⱼ wⱼ|Xⱼ(z)|² = Σⱼ wⱼLⱼ on the unit circle; at z = 1
    /// and z = −1 that is a weighted sum of squares of (alternating) row sums. With some entries
    /// unset each sum lies in an interval; if even the smallest squares overshoot, no
    /// completion exists. It prunes the deep levels, where few entries are left.
    fn sums_can_fit(&self, x: &[Vec<i8>]) -> bool {
        let total: i64 = self
            .weights
            .iter()
            .zip(&self.lens)
            .map(|(w, &l)| w * l as i64)
            .sum();
        for alternating in [false, true] {
            let mut least = 0i64;
            for (j, y) in x.iter().enumerate() {
                let (mut sum, mut free) = (0i64, 0i64);
                for (i, &e) in y.iter().enumerate() {
                    if e == 0 {
                        free += 1;
                    } else if alternating && i % 2 == 1 {
                        sum -= e as i64;
                    } else {
                        sum += e as i64;
                    }
                }
                // The final sum is in [sum − free, sum + free], of the parity of the length.
                let low = if sum.abs() <= free {
                    (self.lens[j] % 2) as i64
                } else {
                    sum.abs() - free
                };
                least += self.weights[j] * low * low;
            }
            if least > total {
                return false;
            }
        }
        true
    }

    fn report(&self, x: &[Vec<i8>]) -> Option<String> {
        if x.iter().any(|v| v.contains(&0)) || !is_solution(self.family, x) {
            return None;
        }
        match (self.family, self.mode) {
            (Family::Turyn(_), Mode::Classes) => Some(line(self.family, &turyn_canonical(x))),
            _ => Some(line(self.family, x)),
        }
    }
}

impl Search for AperiodicSearch {
    type Unit = Unit;

    fn describe(&self) -> String {
        let (kind, p) = match self.family {
            Family::Golay(g) => ("golay g", g),
            Family::Base(n) => ("base p=1 n", n),
            Family::Turyn(n) => ("turyn n", n),
        };
        let mode = match self.mode {
            Mode::Solutions => "solutions",
            Mode::Classes => "classes",
        };
        format!("{kind}={p} mode={mode}")
    }

    fn units(&self) -> Vec<Unit> {
        let mut out = Vec::new();
        self.expand(self.start(), 1, self.split, &mut |y| {
            out.push(Unit { x: y.to_vec() })
        });
        out
    }

    fn run_unit(&self, u: &Unit) -> Vec<String> {
        let mut out = Vec::new();
        self.expand(u.x.clone(), self.split, usize::MAX, &mut |y| {
            out.extend(self.report(y))
        });
        out.sort();
        out.dedup();
        out
    }
}

/// Turyn's product of Golay pairs: from (a, b) of length m and (c, d) of length n, the pair
/// (e, f) of length mn with e₍ⱼₙ₊ᵢ₎ = aⱼpᵢ + bⱼqᵢ and f₍ⱼₙ₊ᵢ₎ = b₍ₘ₋₁₋ⱼ₎pᵢ − a₍ₘ₋₁₋ⱼ₎qᵢ, where
/// p = (c + d)/2 and q = (c − d)/2 (Turyn, J. Combin. Theory A 16, 1974 [recalled]; the
/// identity |E|² + |F|² = 2mn on the unit circle is derived in docs/search.md). The result is
/// checked by [`GolayPair::is_valid`] before it is returned.
pub fn golay_product(x: &GolayPair, y: &GolayPair) -> Option<GolayPair> {
    let (m, n) = (x.len(), y.len());
    let p: Vec<i8> = (0..n).map(|i| (y.a[i] + y.b[i]) / 2).collect();
    let q: Vec<i8> = (0..n).map(|i| (y.a[i] - y.b[i]) / 2).collect();
    let mut e = vec![0i8; m * n];
    let mut f = vec![0i8; m * n];
    for j in 0..m {
        for i in 0..n {
            e[j * n + i] = x.a[j] * p[i] + x.b[j] * q[i];
            f[j * n + i] = x.b[m - 1 - j] * p[i] - x.a[m - 1 - j] * q[i];
        }
    }
    let g = GolayPair { a: e, b: f };
    g.is_valid().then_some(g)
}

/// Golay's doubling: (a;b, a;−b) is a Golay pair of length 2g (Golay, IRE Trans. 1961 [recalled]).
pub fn golay_double(x: &GolayPair) -> Option<GolayPair> {
    let a = [x.a.clone(), x.b.clone()].concat();
    let b = [x.a.clone(), x.b.iter().map(|v| -v).collect()].concat();
    let g = GolayPair { a, b };
    g.is_valid().then_some(g)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::search::run_to_end;

    fn count(family: Family, mode: Mode) -> usize {
        run_to_end(&AperiodicSearch::new(family, mode), None).len()
    }

    #[test]
    fn turyn_type_class_counts_up_to_8() {
        // Published TT(n) class counts (Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21,
        // 2013) [references.md#r8-ttn-counts-and-existence].
        for (n, classes) in [(2, 1), (4, 1), (6, 4), (8, 6)] {
            assert_eq!(count(Family::Turyn(n), Mode::Classes), classes, "n = {n}");
        }
    }

    #[test]
    fn no_turyn_type_of_odd_small_length() {
        // "No TT(n) exist for odd n ≤ 9" [references.md#r8-ttn-counts-and-existence]; n = 3, 7 also follow
        // from the weight equation mod 8 [derived].
        for n in [3, 5, 7] {
            assert_eq!(count(Family::Turyn(n), Mode::Solutions), 0, "n = {n}");
        }
    }

    #[test]
    fn golay_pairs_of_length_10_exist_and_3_do_not() {
        // Golay pairs exist for lengths 2^a·10^b·26^c (references.md#r6-base-sequences-and-t-sequences) and not
        // for length 3: a length-g pair needs 2g to be a sum of two squares [derived: row sums].
        let ten = run_to_end(
            &AperiodicSearch::new(Family::Golay(10), Mode::Solutions),
            Some(1),
        );
        assert!(!ten.is_empty());
        assert_eq!(count(Family::Golay(3), Mode::Solutions), 0);
        assert!(count(Family::Golay(8), Mode::Solutions) > 0);
    }

    #[test]
    fn base_sequences_small() {
        for n in 1..=6 {
            let found = run_to_end(
                &AperiodicSearch::new(Family::Base(n), Mode::Solutions),
                Some(1),
            );
            assert!(!found.is_empty(), "BS({}, {n})", n + 1);
        }
    }

    #[test]
    fn products_and_doubling_of_found_pairs() {
        let two = GolayPair {
            a: vec![1, 1],
            b: vec![1, -1],
        };
        let ten = run_to_end(
            &AperiodicSearch::new(Family::Golay(10), Mode::Solutions),
            Some(1),
        );
        let mut cat = crate::seed::SeedCatalogue::default();
        cat.add_text("found", &format!("{} | test\n", ten[0]));
        let ten = cat.golay[0].data.clone();
        assert_eq!(golay_product(&ten, &two).map(|g| g.len()), Some(20));
        assert_eq!(golay_product(&two, &ten).map(|g| g.len()), Some(20));
        assert_eq!(golay_product(&ten, &ten).map(|g| g.len()), Some(100));
        assert_eq!(golay_double(&ten).map(|g| g.len()), Some(20));
    }

    #[test]
    fn search_is_deterministic_and_sharding_covers_it() {
        use crate::search::{merge, run, Hooks, RunConfig, Shard};
        use std::sync::atomic::AtomicBool;
        let s = AperiodicSearch::new(Family::Turyn(8), Mode::Solutions);
        let whole = run_to_end(&s, None);
        assert_eq!(
            whole,
            run_to_end(
                &AperiodicSearch::new(Family::Turyn(8), Mode::Solutions),
                None
            )
        );
        let stop = AtomicBool::new(false);
        let parts = (0..3).flat_map(|index| {
            let config = RunConfig {
                shard: Shard { index, count: 3 },
                limit: None,
                batch: 7,
            };
            run(
                &s,
                config,
                None,
                Hooks {
                    progress: &|_, _| {},
                    checkpoint: &mut |_| {},
                    stop: &stop,
                },
            )
            .unwrap()
            .results
        });
        assert_eq!(merge(parts), whole);
    }
}
