//! Goethals–Seidel quadruples: four ±1 sequences of length v whose periodic autocorrelations
//! sum to 0 off shift 0, the input of the Goethals–Seidel array (Goethals and Seidel,
//! J. Austral. Math. Soc. 11, 1970), by spectral filtering and meet-in-the-middle.
//!
//! The idea is the Williamson search's ([`super::williamson`]) without symmetry: the PAF of a
//! sequence does not change under rotation, reversal or negation, so each of the four is taken
//! as the least of its rotations and reversals, negated to a row sum ≥ 0; the row sums satisfy
//! Σ rᵢ² = 4v and are ordered r₁ ≥ r₂ ≥ r₃ ≥ r₄; a sequence (or pair) whose power spectrum
//! |Â(k)|² exceeds 4v at some k is dropped (Σ |X̂(k)|² = 4v at every k); and one pair's
//! PAF sum P_A + P_B is looked up, negated, in a table of the other pair's.
//!
//! **With a group of multipliers** ([`GsSearch::with_multiplier`]) the search reaches far longer
//! lengths by looking only at sequences fixed by a subgroup H = ⟨g⟩ of the units mod v: aᵢ = a_{hi}
//! for every h ∈ H. Such a sequence is a choice of sign on each orbit of H on Z_v, so there are
//! 2^(orbits) of them instead of 2^v; and its PAF and power spectrum are constant on the orbits of
//! ⟨H, −1⟩ on the nonzero shifts and frequencies (substitute i → hi in Σ aᵢa_{i+hs}), so one value
//! per orbit is all the meet-in-the-middle compares. Restricting to H-invariant sequences, with
//! the sets of −1 entries unions of orbits, is the classical way of building supplementary
//! difference sets from cyclotomy (Storer, *Cyclotomy and Difference Sets*, 1967 [recalled]),
//! and the search for orbit-invariant Williamson and Goethals–Seidel quadruples is the method
//! of Đoković's searches of the 1990s (e.g. Đoković, J. Combin. Des. 1 (1993) [recalled]). The
//! group may turn out to admit no quadruple: the search is then a proof of that, for this H
//! only. When −1 ∈ H every sequence is symmetric, and a quadruple is a Williamson quadruple,
//! reported as one.

use super::Search;
use crate::construct::sequences::{to_text, GsQuadruple, Williamson};
use rayon::prelude::*;
use std::sync::{Arc, OnceLock};

/// A candidate sequence: bit i set means aᵢ = −1 (without multipliers), or that the entries
/// of orbit i are −1 (with them).
struct Seq {
    bits: u64,
    /// P(s) at the probe shifts.
    paf: Vec<i32>,
    /// |Â(k)|² at the probe frequencies.
    psd: Vec<f64>,
}

/// Which sequences are candidates.
enum Shape {
    /// All of them, up to rotation, reversal and negation (v ≤ 40).
    Plain,
    /// Those fixed by the multipliers H = ⟨multiplier⟩, as sign choices on H's orbits.
    Orbits {
        multiplier: usize,
        /// The orbits of H on Z_v, the orbit of 0 first, then by least element.
        orbits: Vec<Vec<usize>>,
        /// True when −1 ∈ H: every candidate is symmetric.
        symmetric: bool,
    },
}

struct Decomposition {
    rows: [Arc<Vec<Seq>>; 4],
    outer: [usize; 2],
    inner: [usize; 2],
    table: OnceLock<Vec<(u64, u32, u32)>>,
}

/// The search for Goethals–Seidel quadruples of one length v: every one for v ≤ 40, or those
/// fixed by a group of multipliers for longer lengths.
pub struct GsSearch {
    v: usize,
    shape: Shape,
    decompositions: Vec<Decomposition>,
}

/// The most orbits a multiplier search enumerates (2^orbits sign choices per sequence).
pub const MAX_ORBITS: usize = 30;

/// Why a multiplier search cannot be set up.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum ShapeError {
    /// The multiplier is not a unit mod v.
    NotAUnit { v: usize, multiplier: usize },
    /// H has more orbits than [`MAX_ORBITS`].
    TooManyOrbits { orbits: usize },
}

impl std::fmt::Display for ShapeError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ShapeError::NotAUnit { v, multiplier } => {
                write!(f, "the multiplier {multiplier} is not a unit mod {v} (it must be coprime to v)")
            }
            ShapeError::TooManyOrbits { orbits } => write!(
                f,
                "the multipliers have {orbits} orbits; at most {MAX_ORBITS} can be enumerated (choose a multiplier of larger order)"
            ),
        }
    }
}

impl std::error::Error for ShapeError {}

fn gcd(mut a: usize, mut b: usize) -> usize {
    while b != 0 {
        (a, b) = (b, a % b);
    }
    a
}

/// The group ⟨g⟩ of units mod v, sorted.
pub fn multiplier_group(v: usize, g: usize) -> Vec<usize> {
    let mut h = vec![1 % v.max(1)];
    let mut x = g % v;
    while v > 1 && x != 1 && !h.contains(&x) {
        h.push(x);
        x = x * g % v;
    }
    h.sort_unstable();
    h
}

/// The orbits of the multiplier group `h` on Z_v: the orbit of 0 first, then by least element.
pub fn orbits(v: usize, h: &[usize]) -> Vec<Vec<usize>> {
    let mut seen = vec![false; v];
    let mut out = Vec::new();
    for x in 0..v {
        if seen[x] {
            continue;
        }
        let mut o: Vec<usize> = h.iter().map(|&m| m * x % v).collect();
        o.sort_unstable();
        o.dedup();
        for &y in &o {
            seen[y] = true;
        }
        out.push(o);
    }
    out
}

/// Every cyclic group of multipliers mod v with at most `max_orbits` orbits, as (least
/// generator, order of the group, orbits), the groups with fewest orbits first.
pub fn multiplier_choices(v: usize, max_orbits: usize) -> Vec<(usize, usize, usize)> {
    let mut seen: Vec<Vec<usize>> = Vec::new();
    let mut out = Vec::new();
    for g in 2..v {
        if gcd(g, v) != 1 {
            continue;
        }
        let h = multiplier_group(v, g);
        if seen.contains(&h) {
            continue;
        }
        let k = orbits(v, &h).len();
        seen.push(h.clone());
        if k <= max_orbits {
            out.push((g, h.len(), k));
        }
    }
    out.sort_by_key(|&(g, _, k)| (k, g));
    out
}

/// A unit: a decomposition and a range of its outer sequences.
pub type Unit = super::SliceUnit;

fn least_image(v: usize, bits: u64) -> u64 {
    let full = if v == 64 { u64::MAX } else { (1u64 << v) - 1 };
    let rev = (0..v)
        .filter(|&i| bits >> i & 1 == 1)
        .fold(0u64, |a, i| a | 1 << (v - 1 - i));
    let mut best = u64::MAX;
    for x in [bits, rev] {
        let mut y = x;
        for _ in 0..v {
            best = best.min(y);
            y = ((y << 1) | (y >> (v - 1))) & full;
        }
    }
    best
}

fn make_seq(a: &[i32], bits: u64, probes: &[usize], cos: &[f64], sin: &[f64]) -> Option<Seq> {
    let v = a.len();
    let limit = 4.0 * v as f64 + 1e-6;
    let mut psd = Vec::with_capacity(probes.len());
    for &k in probes {
        let (mut re, mut im) = (0.0, 0.0);
        for (i, &x) in a.iter().enumerate() {
            let t = (i * k) % v;
            re += x as f64 * cos[t];
            im += x as f64 * sin[t];
        }
        let p = re * re + im * im;
        if p > limit {
            return None;
        }
        psd.push(p);
    }
    let paf = probes
        .iter()
        .map(|&s| (0..v).map(|i| a[i] * a[(i + s) % v]).sum())
        .collect();
    Some(Seq { bits, paf, psd })
}

fn unit_circle(v: usize) -> (Vec<f64>, Vec<f64>) {
    let angle = |t: usize| 2.0 * std::f64::consts::PI * t as f64 / v as f64;
    (
        (0..v).map(|t| angle(t).cos()).collect(),
        (0..v).map(|t| angle(t).sin()).collect(),
    )
}

fn sequences_with_sum(v: usize, sum: i64, probes: &[usize]) -> Vec<Seq> {
    let neg = ((v as i64 - sum) / 2) as u32;
    let (cos, sin) = unit_circle(v);
    let total = 1u64 << v;
    let chunk = 1u64 << v.saturating_sub(10);
    let mut out: Vec<Seq> = (0..total.div_ceil(chunk))
        .into_par_iter()
        .flat_map_iter(|c| {
            let (cos, sin) = (&cos, &sin);
            (c * chunk..((c + 1) * chunk).min(total))
                .filter(move |b| b.count_ones() == neg && least_image(v, *b) == *b)
                .filter_map(move |b| make_seq(&expand(v, b), b, probes, cos, sin))
        })
        .collect();
    out.sort_by_key(|s| s.bits);
    out
}

/// The sign choices on `orbits` (bit i: orbit i is −1) whose sequence has row sum `sum`.
fn orbit_sequences_with_sum(
    v: usize,
    orbits: &[Vec<usize>],
    sum: i64,
    probes: &[usize],
) -> Vec<Seq> {
    let neg = (v as i64 - sum) / 2;
    let sizes: Vec<i64> = orbits.iter().map(|o| o.len() as i64).collect();
    let (cos, sin) = unit_circle(v);
    let total = 1u64 << orbits.len();
    let chunk = 1u64 << orbits.len().saturating_sub(8);
    let mut out: Vec<Seq> = (0..total.div_ceil(chunk))
        .into_par_iter()
        .flat_map_iter(|c| {
            let (cos, sin, sizes) = (&cos, &sin, &sizes);
            (c * chunk..((c + 1) * chunk).min(total))
                .filter(move |&b| {
                    (0..sizes.len())
                        .filter(|i| b >> i & 1 == 1)
                        .map(|i| sizes[i])
                        .sum::<i64>()
                        == neg
                })
                .filter_map(move |b| make_seq(&expand_orbits(v, orbits, b), b, probes, cos, sin))
        })
        .collect();
    out.sort_by_key(|s| s.bits);
    out
}

fn expand_orbits(v: usize, orbits: &[Vec<usize>], bits: u64) -> Vec<i32> {
    let mut a = vec![1i32; v];
    for (i, o) in orbits.iter().enumerate() {
        if bits >> i & 1 == 1 {
            for &x in o {
                a[x] = -1;
            }
        }
    }
    a
}

/// The decompositions of n into four squares of integers ≥ 0 of the parity of v, largest first.
pub(crate) fn four_squares(n: i64, parity: i64) -> Vec<[i64; 4]> {
    let mut out = Vec::new();
    let start = parity;
    let mut r1 = start;
    while r1 * r1 <= n {
        let mut r2 = start;
        while r2 <= r1 {
            let mut r3 = start;
            while r3 <= r2 {
                let rest = n - r1 * r1 - r2 * r2 - r3 * r3;
                if rest >= 0 {
                    let r4 = (rest as f64).sqrt().round() as i64;
                    if r4 * r4 == rest && r4 % 2 == parity && r4 <= r3 {
                        out.push([r1, r2, r3, r4]);
                    }
                }
                r3 += 2;
            }
            r2 += 2;
        }
        r1 += 2;
    }
    out.sort_by(|x, y| y.cmp(x));
    out
}

fn key(paf: impl Iterator<Item = i32>) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for p in paf {
        for b in p.to_le_bytes() {
            h = (h ^ b as u64).wrapping_mul(0x100_0000_01b3);
        }
    }
    h
}

fn pair_fits(v: usize, x: &Seq, y: &Seq) -> bool {
    let limit = 4.0 * v as f64 + 1e-6;
    x.psd.iter().zip(&y.psd).all(|(p, q)| p + q <= limit)
}

fn expand(v: usize, bits: u64) -> Vec<i32> {
    (0..v)
        .map(|i| if bits >> i & 1 == 1 { -1 } else { 1 })
        .collect()
}

/// The seed-catalogue line (without provenance) of a quadruple.
pub fn line(q: &GsQuadruple) -> String {
    format!(
        "gs v={} a={} b={} c={} d={}",
        q.v(),
        to_text(&q.a[0]),
        to_text(&q.a[1]),
        to_text(&q.a[2]),
        to_text(&q.a[3])
    )
}

impl GsSearch {
    /// Prepares the search over all sequences of length v ≤ 40: decompositions of 4v and
    /// their candidate sequences.
    pub fn new(v: usize) -> Self {
        assert!(
            (1..=40).contains(&v),
            "Goethals–Seidel search needs 1 ≤ v ≤ 40"
        );
        // PAF and spectrum are compared at the shifts (and frequencies) 1..=⌊v/2⌋, or, with
        // multipliers, at one representative of each orbit of ⟨H, −1⟩ on the nonzero residues.
        let probes: Vec<usize> = (1..=v / 2).collect();
        let candidates = |s: i64| sequences_with_sum(v, s, &probes);
        let decompositions = Self::decompositions(v, candidates);
        GsSearch {
            v,
            shape: Shape::Plain,
            decompositions,
        }
    }

    /// Prepares the search over the sequences of length v fixed by the multipliers ⟨g⟩ mod v.
    pub fn with_multiplier(v: usize, g: usize) -> Result<Self, ShapeError> {
        if v < 2 || gcd(g % v, v) != 1 {
            return Err(ShapeError::NotAUnit { v, multiplier: g });
        }
        let h = multiplier_group(v, g % v);
        let orbits = self::orbits(v, &h);
        if orbits.len() > MAX_ORBITS {
            return Err(ShapeError::TooManyOrbits {
                orbits: orbits.len(),
            });
        }
        let symmetric = h.contains(&(v - 1));
        let mut with_minus: Vec<usize> = h.iter().flat_map(|&x| [x, v - x]).collect();
        with_minus.sort_unstable();
        with_minus.dedup();
        let probes: Vec<usize> = self::orbits(v, &with_minus)
            .iter()
            .skip(1)
            .map(|o| o[0])
            .collect();
        let candidates = |s: i64| orbit_sequences_with_sum(v, &orbits, s, &probes);
        let decompositions = Self::decompositions(v, candidates);
        Ok(GsSearch {
            v,
            shape: Shape::Orbits {
                multiplier: g % v,
                orbits,
                symmetric,
            },
            decompositions,
        })
    }

    /// The number of sign choices each sequence has: orbits with multipliers, v without.
    pub fn degrees_of_freedom(&self) -> usize {
        match &self.shape {
            Shape::Plain => self.v,
            Shape::Orbits { orbits, .. } => orbits.len(),
        }
    }

    fn decompositions(v: usize, candidates: impl Fn(i64) -> Vec<Seq>) -> Vec<Decomposition> {
        let mut cache: Vec<(i64, Arc<Vec<Seq>>)> = Vec::new();
        let mut get = |s: i64| -> Arc<Vec<Seq>> {
            if let Some((_, r)) = cache.iter().find(|(t, _)| *t == s) {
                return r.clone();
            }
            let r = Arc::new(candidates(s));
            cache.push((s, r.clone()));
            r
        };
        four_squares(4 * v as i64, v as i64 % 2)
            .into_iter()
            .map(|sums| {
                let rows = sums.map(&mut get);
                let mut order = [0usize, 1, 2, 3];
                order.sort_by_key(|&i| std::cmp::Reverse(rows[i].len()));
                let p = [order[0], order[3]];
                let q = [order[1], order[2]];
                let size = |x: [usize; 2]| rows[x[0]].len() as u128 * rows[x[1]].len() as u128;
                let (outer, inner) = if size(p) >= size(q) { (p, q) } else { (q, p) };
                Decomposition {
                    rows,
                    outer,
                    inner,
                    table: OnceLock::new(),
                }
            })
            .collect()
    }

    fn expand(&self, bits: u64) -> Vec<i8> {
        let a = match &self.shape {
            Shape::Plain => expand(self.v, bits),
            Shape::Orbits { orbits, .. } => expand_orbits(self.v, orbits, bits),
        };
        a.into_iter().map(|x| x as i8).collect()
    }

    /// The result line of four chosen sequences: a Williamson line when they are symmetric
    /// (−1 is a multiplier), a Goethals–Seidel line otherwise; `None` if the exact identity
    /// fails (it never should: the table only narrows the candidates).
    fn result(&self, picks: [u64; 4]) -> Option<String> {
        let quad = GsQuadruple {
            a: picks.map(|b| self.expand(b)),
        };
        if !quad.is_valid() {
            return None;
        }
        if matches!(
            self.shape,
            Shape::Orbits {
                symmetric: true,
                ..
            }
        ) {
            let [a, b, c, d] = quad.a;
            let w = Williamson { a, b, c, d };
            return w.is_valid().then(|| super::williamson::line(&w));
        }
        Some(line(&quad))
    }

    fn table<'a>(&self, d: &'a Decomposition) -> &'a Vec<(u64, u32, u32)> {
        d.table.get_or_init(|| {
            let (x, y) = (&d.rows[d.inner[0]], &d.rows[d.inner[1]]);
            let v = self.v;
            let mut t: Vec<(u64, u32, u32)> = (0..x.len())
                .into_par_iter()
                .flat_map_iter(|i| {
                    let xi = &x[i];
                    y.iter()
                        .enumerate()
                        .filter(move |(_, yj)| pair_fits(v, xi, yj))
                        .map(move |(j, yj)| {
                            (
                                key(xi.paf.iter().zip(&yj.paf).map(|(p, q)| -(p + q))),
                                i as u32,
                                j as u32,
                            )
                        })
                })
                .collect();
            t.par_sort_unstable();
            t
        })
    }
}

impl Search for GsSearch {
    type Unit = Unit;

    fn describe(&self) -> String {
        match &self.shape {
            Shape::Plain => format!("gs v={}", self.v),
            Shape::Orbits { multiplier, .. } => format!("gs v={} multiplier={multiplier}", self.v),
        }
    }

    fn units(&self) -> Vec<Unit> {
        super::slice_units(
            self.decompositions
                .iter()
                .map(|d| (!d.rows.iter().any(|r| r.is_empty())).then(|| d.rows[d.outer[0]].len())),
        )
    }

    fn run_unit(&self, u: &Unit) -> Vec<String> {
        let d = &self.decompositions[u.decomposition];
        let table = self.table(d);
        let (x, y) = (&d.rows[d.outer[0]], &d.rows[d.outer[1]]);
        let (p, q) = (&d.rows[d.inner[0]], &d.rows[d.inner[1]]);
        let mut out = Vec::new();
        for xi in &x[u.from..u.to] {
            for yj in y.iter() {
                if !pair_fits(self.v, xi, yj) {
                    continue;
                }
                let k = key(xi.paf.iter().zip(&yj.paf).map(|(a, b)| a + b));
                let start = table.partition_point(|e| e.0 < k);
                for &(_, i, j) in table[start..].iter().take_while(|e| e.0 == k) {
                    let (pi, qj) = (&p[i as usize], &q[j as usize]);
                    if !(0..xi.paf.len())
                        .all(|s| xi.paf[s] + yj.paf[s] + pi.paf[s] + qj.paf[s] == 0)
                    {
                        continue;
                    }
                    let mut picks = [0u64; 4];
                    picks[d.outer[0]] = xi.bits;
                    picks[d.outer[1]] = yj.bits;
                    picks[d.inner[0]] = pi.bits;
                    picks[d.inner[1]] = qj.bits;
                    out.extend(self.result(picks));
                }
            }
        }
        out.sort();
        out.dedup();
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::search::run_to_end;

    #[test]
    fn small_lengths_have_quadruples() {
        // Every v ≤ 12 has a quadruple: Williamson ones for odd v (constructions.md §3 [read])
        // are among them, and the search must find some for each v here.
        for v in 1..=12 {
            let found = run_to_end(&GsSearch::new(v), Some(1));
            assert!(!found.is_empty(), "v = {v}");
        }
    }

    #[test]
    fn multiplier_groups_and_their_orbits() {
        // 3 has order 3 mod 13 (27 = 2·13 + 1): H = {1, 3, 9}, and Z_13 splits into {0} and
        // four orbits of three (the cubic cyclotomic classes, common practice).
        assert_eq!(multiplier_group(13, 3), vec![1, 3, 9]);
        let o = orbits(13, &[1, 3, 9]);
        assert_eq!(o.len(), 5);
        assert_eq!(o[0], vec![0]);
        assert_eq!(o[1], vec![1, 3, 9]);
        assert!(o.iter().skip(1).all(|x| x.len() == 3));
        // Orbits partition Z_v, also when v is composite and orbits have different sizes.
        let o = orbits(15, &multiplier_group(15, 2));
        let mut all: Vec<usize> = o.concat();
        all.sort_unstable();
        assert_eq!(all, (0..15).collect::<Vec<_>>());
        assert!(matches!(
            GsSearch::with_multiplier(15, 3),
            Err(ShapeError::NotAUnit { .. })
        ));
        // 2 has order 14 mod 113 (2^7 = 128 ≡ 15, 15² = 225 ≡ −1), so ⟨−1⟩ = {1, 112} has 57 orbits.
        assert!(matches!(
            GsSearch::with_multiplier(113, 112),
            Err(ShapeError::TooManyOrbits { orbits: 57 })
        ));
        // 2^7 = 128 ≡ 1 mod 127: seven multipliers, 126/7 = 18 orbits and {0}.
        assert_eq!(orbits(127, &multiplier_group(127, 2)).len(), 19);
        assert_eq!(
            GsSearch::with_multiplier(13, 3).map(|s| s.degrees_of_freedom()),
            Ok(5)
        );
    }

    /// A result line read back by the seed parser, which checks its defining identity.
    fn parsed(line: &str) -> crate::seed::SeedCatalogue {
        let mut cat = crate::seed::SeedCatalogue::default();
        cat.add_text("result", &format!("{line} | test; 2026-12-02"));
        assert!(cat.rejected.is_empty(), "{:?}", cat.rejected);
        cat
    }

    #[test]
    fn multipliers_reach_lengths_the_plain_search_cannot() {
        // Williamson matrices of order 43 exist (constructions.md §3 [recalled]); with the
        // multipliers ⟨7⟩ = {1, 7, 6, 42, 36, 37} ∋ −1 mod 43 the quadruples are symmetric, so
        // they come out as Williamson lines, and each passes the exact identity.
        let found = run_to_end(&GsSearch::with_multiplier(43, 7).unwrap(), Some(1));
        assert!(!found.is_empty());
        for line in &found {
            let cat = parsed(line);
            assert_eq!(cat.williamson.len(), 1, "{line}");
            assert!(cat.williamson[0].data.is_valid() && cat.williamson[0].data.m() == 43);
        }
        // Without −1 in the group the result is a Goethals–Seidel quadruple of length 73, the
        // input of order 292 = 4·73 (known to exist: constructions.md §1 [recalled]).
        let found = run_to_end(&GsSearch::with_multiplier(73, 2).unwrap(), Some(1));
        assert!(!found.is_empty());
        for line in &found {
            let cat = parsed(line);
            assert_eq!(cat.goethals_seidel.len(), 1, "{line}");
            assert!(
                cat.goethals_seidel[0].data.is_valid() && cat.goethals_seidel[0].data.v() == 73
            );
        }
    }
}
