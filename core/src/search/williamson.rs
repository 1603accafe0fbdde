//! Williamson quadruples: symmetric circulant ±1 matrices A, B, C, D of odd order m with
//! A² + B² + C² + D² = 4mI (Williamson, Duke Math. J. 11, 1944), by spectral filtering and
//! meet-in-the-middle on periodic autocorrelations.
//!
//! The idea: a symmetric ±1 row of odd length m is fixed by its first h = (m−1)/2 entries after
//! a₀, and the identity is Σ P_X(s) = 0 for s = 1..h (P the periodic autocorrelation). So split
//! the four into two pairs and ask for P_A + P_B = −(P_C + P_D): tabulate one side, look the
//! other up. What makes the sides small:
//!
//! - **Normalisation.** Negate each so a₀ = b₀ = c₀ = d₀ = 1. Then a row sum is
//!   r = 1 + 2Σᵢ₌₁..ₕ aᵢ ≡ m (mod 4), so its sign is fixed by its absolute value.
//! - **Row sums.** r_A² + r_B² + r_C² + r_D² = 4m (take the four blocks' row sums on the
//!   identity). Reordering the four, take |r_A| ≥ |r_B| ≥ |r_C| ≥ |r_D|.
//! - **Spectral (PSD) filter.** For a symmetric row the DFT is real,
//!   Â(k) = 1 + 2Σᵢ aᵢ cos(2πik/m), and Σ_X X̂(k)² = 4m at every k; so a single row with
//!   Â(k)² > 4m, or a pair with Â(k)² + B̂(k)² > 4m, is dropped (the standard filter of the
//!   computer searches, e.g. Holzmann, Kharaghani and Tayfeh-Rezaie, Des. Codes Cryptogr. 46,
//!   2008).
//! - **Sign lemma.** With a₀ = b₀ = c₀ = d₀ = 1, aᵢbᵢcᵢdᵢ = −1 for i ≠ 0 [recalled, standard;
//!   the tests check it against the search without it]. So the entrywise product of C and D is
//!   minus that of A and B, and it joins the PAF vector in the lookup key.
//!
//! Classes: two quadruples are equivalent when one comes from the other by reordering the four,
//! negating any of them, and a multiplier x ↦ kx (gcd(k, m) = 1) applied to all four. On
//! normalised symmetric rows negation is used up and k ≡ −k, so the canonical form is the least,
//! over k, of the sorted four rows.

use super::Search;
use crate::construct::sequences::{to_text, Williamson};
use num_integer::gcd;
use rayon::prelude::*;
use std::sync::OnceLock;

/// What a Williamson search reports.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Mode {
    /// Every solution's class representative: run to the end for the list of classes.
    Classes,
    /// Solutions as found (pair with a `limit` to stop at the first).
    Solutions,
}

/// A symmetric row: bit i−1 of `bits` set means aᵢ = a₍ₘ₋ᵢ₎ = −1 (a₀ = 1 always).
#[derive(Clone, Debug)]
struct Row {
    bits: u64,
    /// P(s) for s = 1..h.
    paf: Vec<i32>,
    /// Â(k)² for k = 1..h.
    psd: Vec<f64>,
}

/// The search for Williamson quadruples of one odd order.
pub struct WilliamsonSearch {
    m: usize,
    mode: Mode,
    sign_lemma: bool,
    /// The row-sum decompositions (r₁ ≥ r₂ ≥ r₃ ≥ r₄ > 0, Σrᵢ² = 4m), each with its rows.
    decompositions: Vec<Decomposition>,
}

/// One way to write 4m as four odd squares, with the candidate rows for each row sum and a
/// choice of which two rows are tabulated.
struct Decomposition {
    /// Indices into the four positions: `outer` pair iterated, `inner` pair tabulated.
    outer: [usize; 2],
    inner: [usize; 2],
    rows: [std::sync::Arc<Vec<Row>>; 4],
    /// The outer rows that are least among their multiplier images: a multiplier applied to
    /// all four moves any solution to one whose first outer row is such a leader.
    leaders: Vec<u32>,
    table: OnceLock<Vec<(u64, u32, u32)>>,
}

/// A unit: one decomposition and a range of its outer rows.
pub type Unit = super::SliceUnit;

fn mask(h: usize) -> u64 {
    if h == 0 {
        0
    } else {
        u64::MAX >> (64 - h)
    }
}

/// The full row of length m from its free bits.
fn expand(m: usize, bits: u64) -> Vec<i8> {
    let mut a = vec![1i8; m];
    for i in 1..=(m - 1) / 2 {
        if bits >> (i - 1) & 1 == 1 {
            a[i] = -1;
            a[m - i] = -1;
        }
    }
    a
}

fn make_row(m: usize, bits: u64, cos: &[Vec<f64>]) -> Option<Row> {
    let h = (m - 1) / 2;
    let limit = 4.0 * m as f64 + 1e-6;
    let mut psd = Vec::with_capacity(h);
    for row in cos.iter().skip(1).take(h) {
        let mut x = 1.0;
        for (i, c) in row.iter().enumerate().skip(1).take(h) {
            x += if bits >> (i - 1) & 1 == 1 {
                -2.0 * c
            } else {
                2.0 * c
            };
        }
        let p = x * x;
        if p > limit {
            return None;
        }
        psd.push(p);
    }
    let a = expand(m, bits);
    let paf = (1..=h)
        .map(|s| (0..m).map(|i| a[i] as i32 * a[(i + s) % m] as i32).sum())
        .collect();
    Some(Row { bits, paf, psd })
}

/// Every symmetric normalised row of odd length m with the given signed row sum that passes
/// the PSD filter, sorted by bits.
fn rows_with_sum(m: usize, sum: i64) -> Vec<Row> {
    let h = (m - 1) / 2;
    // r = m − 4·(number of −1 among a₁..aₕ).
    let neg = (m as i64 - sum) / 4;
    let cos: Vec<Vec<f64>> = (0..=h)
        .map(|k| {
            (0..=h)
                .map(|i| (2.0 * std::f64::consts::PI * (i * k) as f64 / m as f64).cos())
                .collect()
        })
        .collect();
    let total = 1u64 << h;
    let chunk = 1u64 << h.saturating_sub(8);
    let mut rows: Vec<Row> = (0..total.div_ceil(chunk))
        .into_par_iter()
        .flat_map_iter(|c| {
            let cos = &cos;
            (c * chunk..((c + 1) * chunk).min(total))
                .filter(move |b| b.count_ones() as i64 == neg)
                .filter_map(move |b| make_row(m, b, cos))
        })
        .collect();
    rows.sort_by_key(|r| r.bits);
    rows
}

/// The decompositions of 4m into four positive odd squares, r₁ ≥ r₂ ≥ r₃ ≥ r₄.
pub fn four_odd_squares(n: i64) -> Vec<[i64; 4]> {
    let mut out = Vec::new();
    let mut r1 = 1;
    while r1 * r1 <= n {
        let mut r2 = 1;
        while r2 <= r1 && r1 * r1 + r2 * r2 <= n {
            let mut r3 = 1;
            while r3 <= r2 && r1 * r1 + r2 * r2 + r3 * r3 <= n {
                let rest = n - r1 * r1 - r2 * r2 - r3 * r3;
                let r4 = (rest as f64).sqrt().round() as i64;
                if r4 * r4 == rest && r4 % 2 == 1 && r4 <= r3 {
                    out.push([r1, r2, r3, r4]);
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

fn key(bits: u64, paf: impl Iterator<Item = i32>) -> u64 {
    // FNV-1a over the product bits and the PAF vector; collisions are re-checked exactly.
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for b in bits.to_le_bytes() {
        h = (h ^ b as u64).wrapping_mul(0x100_0000_01b3);
    }
    for p in paf {
        for b in p.to_le_bytes() {
            h = (h ^ b as u64).wrapping_mul(0x100_0000_01b3);
        }
    }
    h
}

fn pair_fits(m: usize, x: &Row, y: &Row) -> bool {
    let limit = 4.0 * m as f64 + 1e-6;
    x.psd.iter().zip(&y.psd).all(|(p, q)| p + q <= limit)
}

impl WilliamsonSearch {
    /// Prepares the search for order m (odd): the decompositions and their candidate rows.
    /// `sign_lemma` uses aᵢbᵢcᵢdᵢ = −1 in the lookup key (turn it off only to test the lemma).
    pub fn new(m: usize, mode: Mode, sign_lemma: bool) -> Self {
        assert!(
            m % 2 == 1 && m <= 127,
            "Williamson search needs odd m ≤ 127"
        );
        let mut cache: Vec<(i64, std::sync::Arc<Vec<Row>>)> = Vec::new();
        let mut get = |s: i64| -> std::sync::Arc<Vec<Row>> {
            if let Some((_, r)) = cache.iter().find(|(t, _)| *t == s) {
                return r.clone();
            }
            let r = std::sync::Arc::new(rows_with_sum(m, s));
            cache.push((s, r.clone()));
            r
        };
        let mut decompositions = four_odd_squares(4 * m as i64)
            .into_iter()
            .map(|abs| {
                let sums = abs.map(|r| {
                    if (r - m as i64).rem_euclid(4) == 0 {
                        r
                    } else {
                        -r
                    }
                });
                let rows = sums.map(&mut get);
                // Pair the largest candidate set with the smallest (it minimises the number of
                // pairs built), and tabulate the side with fewer pairs.
                let mut order = [0usize, 1, 2, 3];
                order.sort_by_key(|&i| std::cmp::Reverse(rows[i].len()));
                let p = [order[0], order[3]];
                let q = [order[1], order[2]];
                let size = |x: [usize; 2]| rows[x[0]].len() as u128 * rows[x[1]].len() as u128;
                let (outer, inner) = if size(p) >= size(q) { (p, q) } else { (q, p) };
                let leaders = (0..rows[outer[0]].len() as u32)
                    .filter(|&i| is_leader(m, rows[outer[0]][i as usize].bits))
                    .collect();
                Decomposition {
                    outer,
                    inner,
                    rows,
                    leaders,
                    table: OnceLock::new(),
                }
            })
            .collect::<Vec<_>>();
        // Cheapest first (pairs to build on both sides), so a limited run reaches an easy
        // solution before an expensive table.
        let cost = |d: &Decomposition| {
            let n = |i: usize| d.rows[i].len() as u128;
            d.leaders.len() as u128 * n(d.outer[1]) + n(d.inner[0]) * n(d.inner[1])
        };
        decompositions.sort_by_key(cost);
        WilliamsonSearch {
            m,
            mode,
            sign_lemma,
            decompositions,
        }
    }

    fn h(&self) -> usize {
        (self.m - 1) / 2
    }

    fn table<'a>(&self, d: &'a Decomposition) -> &'a Vec<(u64, u32, u32)> {
        d.table.get_or_init(|| {
            let (x, y) = (&d.rows[d.inner[0]], &d.rows[d.inner[1]]);
            let m = self.m;
            let full = mask(self.h());
            let lemma = self.sign_lemma;
            let mut t: Vec<(u64, u32, u32)> = (0..x.len())
                .into_par_iter()
                .flat_map_iter(|i| {
                    let xi = &x[i];
                    y.iter()
                        .enumerate()
                        .filter(move |(_, yj)| pair_fits(m, xi, yj))
                        .map(move |(j, yj)| {
                            let prod = if lemma {
                                !(xi.bits ^ yj.bits) & full
                            } else {
                                0
                            };
                            (
                                key(prod, xi.paf.iter().zip(&yj.paf).map(|(p, q)| -(p + q))),
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

    /// Order the four rows of a found solution as A, B, C, D (positions 0..3 of the decomposition).
    fn solution(&self, picks: [u64; 4]) -> Williamson {
        let [a, b, c, e] = picks.map(|bits| expand(self.m, bits));
        Williamson { a, b, c, d: e }
    }

    /// The class representative of a normalised quadruple, as four row bit sets.
    pub fn canonical(m: usize, rows: [u64; 4]) -> [u64; 4] {
        let h = (m - 1) / 2;
        let mut best: Option<[u64; 4]> = None;
        for k in 1..=h.max(1) {
            if gcd(k, m) != 1 {
                continue;
            }
            let mut image = rows.map(|bits| multiply(m, bits, k));
            image.sort_unstable();
            if best.is_none_or(|b| image < b) {
                best = Some(image);
            }
        }
        best.unwrap_or(rows)
    }
}

/// The row's image under the multiplier x ↦ kx.
fn multiply(m: usize, bits: u64, k: usize) -> u64 {
    let h = (m - 1) / 2;
    let mut out = 0u64;
    for i in 1..=h {
        let mut j = (k * i) % m;
        if j > h {
            j = m - j;
        }
        if bits >> (j - 1) & 1 == 1 {
            out |= 1 << (i - 1);
        }
    }
    out
}

/// True when no multiplier gives a smaller row.
fn is_leader(m: usize, bits: u64) -> bool {
    (2..=(m - 1) / 2)
        .filter(|&k| gcd(k, m) == 1)
        .all(|k| multiply(m, bits, k) >= bits)
}

/// The free bits of a normalised symmetric row.
fn bits_of(a: &[i8]) -> u64 {
    (1..=(a.len() - 1) / 2)
        .filter(|&i| a[i] == -1)
        .fold(0, |acc, i| acc | 1 << (i - 1))
}

/// The class representative of any Williamson quadruple of odd order, as a quadruple.
pub fn canonical_form(w: &Williamson) -> Williamson {
    let m = w.m();
    let norm = |x: &[i8]| -> u64 {
        if x[0] == 1 {
            bits_of(x)
        } else {
            bits_of(&x.iter().map(|v| -v).collect::<Vec<_>>())
        }
    };
    let c = WilliamsonSearch::canonical(m, [norm(&w.a), norm(&w.b), norm(&w.c), norm(&w.d)]);
    let [a, b, cc, d] = c.map(|bits| expand(m, bits));
    Williamson { a, b, c: cc, d }
}

/// The seed-catalogue line (without provenance) for a quadruple.
pub fn line(w: &Williamson) -> String {
    format!(
        "williamson m={} a={} b={} c={} d={}",
        w.m(),
        to_text(&w.a),
        to_text(&w.b),
        to_text(&w.c),
        to_text(&w.d)
    )
}

impl Search for WilliamsonSearch {
    type Unit = Unit;

    fn describe(&self) -> String {
        let mode = match self.mode {
            Mode::Classes => "classes",
            Mode::Solutions => "solutions",
        };
        format!(
            "williamson m={} mode={mode}{}",
            self.m,
            if self.sign_lemma {
                ""
            } else {
                " no-sign-lemma"
            }
        )
    }

    fn units(&self) -> Vec<Unit> {
        super::slice_units(
            self.decompositions
                .iter()
                .map(|d| (!d.rows.iter().any(|r| r.is_empty())).then_some(d.leaders.len())),
        )
    }

    fn run_unit(&self, u: &Unit) -> Vec<String> {
        let d = &self.decompositions[u.decomposition];
        let table = self.table(d);
        let (x, y) = (&d.rows[d.outer[0]], &d.rows[d.outer[1]]);
        let (p, q) = (&d.rows[d.inner[0]], &d.rows[d.inner[1]]);
        let full = mask(self.h());
        let mut out = Vec::new();
        for xi in d.leaders[u.from..u.to].iter().map(|&i| &x[i as usize]) {
            for yj in y.iter() {
                if !pair_fits(self.m, xi, yj) {
                    continue;
                }
                let prod = if self.sign_lemma {
                    (xi.bits ^ yj.bits) & full
                } else {
                    0
                };
                let k = key(prod, xi.paf.iter().zip(&yj.paf).map(|(a, b)| a + b));
                let start = table.partition_point(|e| e.0 < k);
                for &(_, i, j) in table[start..].iter().take_while(|e| e.0 == k) {
                    let (pi, qj) = (&p[i as usize], &q[j as usize]);
                    let sums_vanish =
                        (0..self.h()).all(|s| xi.paf[s] + yj.paf[s] + pi.paf[s] + qj.paf[s] == 0);
                    let lemma_holds =
                        !self.sign_lemma || (xi.bits ^ yj.bits ^ pi.bits ^ qj.bits) & full == full;
                    if !(sums_vanish && lemma_holds) {
                        continue;
                    }
                    let mut picks = [0u64; 4];
                    picks[d.outer[0]] = xi.bits;
                    picks[d.outer[1]] = yj.bits;
                    picks[d.inner[0]] = pi.bits;
                    picks[d.inner[1]] = qj.bits;
                    let w = match self.mode {
                        Mode::Solutions => self.solution(picks),
                        Mode::Classes => {
                            let c = Self::canonical(self.m, picks);
                            self.solution(c)
                        }
                    };
                    debug_assert!(w.is_valid());
                    if w.is_valid() {
                        out.push(line(&w));
                    }
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

    fn classes(m: usize) -> usize {
        run_to_end(&WilliamsonSearch::new(m, Mode::Classes, true), None).len()
    }

    #[test]
    fn class_counts_up_to_13() {
        // Published counts of inequivalent Williamson quadruples (Holzmann, Kharaghani and
        // Tayfeh-Rezaie, Des. Codes Cryptogr. 46, 2008) [references.md#r7-williamson-orders].
        let published = [(1, 1), (3, 1), (5, 1), (7, 2), (9, 3), (11, 1), (13, 4)];
        for (m, count) in published {
            assert_eq!(classes(m), count, "m = {m}");
        }
    }

    #[test]
    fn the_sign_lemma_loses_no_class() {
        // The lemma aᵢbᵢcᵢdᵢ = −1 [recalled, standard] is checked here against the search
        // without it: same classes for m ≤ 11.
        for m in [3, 5, 7, 9, 11] {
            let with = run_to_end(&WilliamsonSearch::new(m, Mode::Classes, true), None);
            let without = run_to_end(&WilliamsonSearch::new(m, Mode::Classes, false), None);
            assert_eq!(with, without, "m = {m}");
        }
    }

    #[test]
    fn first_solutions_are_valid_and_deterministic() {
        for m in [15, 17, 19] {
            let s = WilliamsonSearch::new(m, Mode::Solutions, true);
            let one = run_to_end(&s, Some(1));
            assert!(!one.is_empty(), "m = {m}");
            assert_eq!(
                one,
                run_to_end(&WilliamsonSearch::new(m, Mode::Solutions, true), Some(1))
            );
            let mut cat = crate::seed::SeedCatalogue::default();
            cat.add_text("found", &format!("{} | test\n", one[0]));
            assert!(cat.rejected.is_empty() && cat.williamson.len() == 1);
        }
    }

    #[test]
    fn canonical_form_is_a_class_invariant() {
        // A multiplier and a reordering of a found quadruple give the same representative.
        let one = run_to_end(&WilliamsonSearch::new(13, Mode::Solutions, true), Some(1));
        let mut cat = crate::seed::SeedCatalogue::default();
        cat.add_text("found", &format!("{} | test\n", one[0]));
        let w = cat.williamson[0].data.clone();
        let k = 2;
        let mul = |x: &Vec<i8>| (0..13).map(|i| x[(k * i) % 13]).collect::<Vec<i8>>();
        let moved = Williamson {
            a: mul(&w.d),
            b: mul(&w.a).iter().map(|v| -v).collect(),
            c: mul(&w.c),
            d: mul(&w.b),
        };
        assert!(moved.is_valid());
        assert_eq!(canonical_form(&moved), canonical_form(&w));
    }
}
