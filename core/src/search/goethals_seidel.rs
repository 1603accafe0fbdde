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
use num_integer::gcd;
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
    /// Those fixed by the multipliers H = ⟨multipliers⟩, as sign choices on H's orbits.
    Orbits {
        multipliers: Vec<usize>,
        /// The orbits of H on Z_v, the orbit of 0 first, then by least element.
        orbits: Vec<Vec<usize>>,
        /// True when −1 ∈ H: every candidate is symmetric.
        symmetric: bool,
    },
    /// Fixed by H, each block with its own [`BlockType`], as sign choices on its [`Basis`].
    Typed {
        multipliers: Vec<usize>,
        types: [BlockType; 4],
        /// The basis of each block (blocks of the same type share one).
        bases: [Arc<Basis>; 4],
        /// True when every block is symmetric (type or −1 ∈ H): reported as Williamson.
        symmetric: bool,
    },
}

struct Decomposition {
    rows: [Arc<Vec<Seq>>; 4],
    outer: [usize; 2],
    inner: [usize; 2],
    /// The sequences of block `outer[0]` the units iterate: all of them, or (typed searches)
    /// only the least of each class under the multipliers.
    lead: Arc<Vec<Seq>>,
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
    /// A skew-type block needs x and −x in different orbits for every x ≠ 0; this orbit
    /// (given by its least element) contains both.
    SkewImpossible { block: usize, element: usize },
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
            ShapeError::SkewImpossible { block, element } => write!(
                f,
                "block {} cannot be skew-type: {element} and −{element} lie in the same orbit of the multipliers (skew needs −1 outside the group, and v odd)",
                block + 1
            ),
        }
    }
}

impl std::error::Error for ShapeError {}

/// The group ⟨g⟩ of units mod v, sorted.
pub fn multiplier_group(v: usize, g: usize) -> Vec<usize> {
    generated_group(v, &[g])
}

/// The group generated by the units `gens` mod v, sorted: the closure of {1} under
/// multiplication by each generator.
pub fn generated_group(v: usize, gens: &[usize]) -> Vec<usize> {
    if v < 2 {
        return vec![0];
    }
    let mut seen = vec![false; v];
    seen[1] = true;
    let mut h = vec![1];
    let mut next = 0;
    while next < h.len() {
        let x = h[next];
        next += 1;
        for &g in gens {
            let y = x * (g % v) % v;
            if !seen[y] {
                seen[y] = true;
                h.push(y);
            }
        }
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

/// Every group of multipliers mod v with at most `max_orbits` orbits, as (generators, order
/// of the group, orbits), the groups with fewest orbits first: the cyclic groups ⟨g⟩ by their
/// least generator, then (for v ≤ 1000, where the units need not be cyclic) the groups ⟨g, g'⟩
/// that are not cyclic.
pub fn multiplier_choices(v: usize, max_orbits: usize) -> Vec<(Vec<usize>, usize, usize)> {
    let mut seen: std::collections::BTreeSet<Vec<usize>> = Default::default();
    let mut out = Vec::new();
    let units: Vec<usize> = (2..v).filter(|&g| gcd(g, v) == 1).collect();
    let mut consider = |gens: Vec<usize>, out: &mut Vec<(Vec<usize>, usize, usize)>| {
        let h = generated_group(v, &gens);
        if seen.contains(&h) {
            return;
        }
        let k = orbits(v, &h).len();
        seen.insert(h.clone());
        if k <= max_orbits {
            out.push((gens, h.len(), k));
        }
    };
    for &g in &units {
        consider(vec![g], &mut out);
    }
    if v <= 1000 && !units_are_cyclic(v) {
        for (i, &g) in units.iter().enumerate() {
            for &g2 in &units[i + 1..] {
                consider(vec![g, g2], &mut out);
            }
        }
    }
    out.sort_by(|a, b| (a.2, a.0.len(), &a.0).cmp(&(b.2, b.0.len(), &b.0)));
    out
}

/// True when the units mod v form a cyclic group, so every group of multipliers is some ⟨g⟩:
/// v = 1, 2, 4, p^k or 2p^k for an odd prime p (Gauss's primitive-root theorem, common
/// practice).
fn units_are_cyclic(v: usize) -> bool {
    let odd_prime_power =
        |n: usize| crate::arith::prime_power(n as u64).is_some_and(|(p, _)| p != 2);
    v <= 4 || odd_prime_power(v) || (v.is_multiple_of(2) && odd_prime_power(v / 2))
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

/// The extra structure one block of a typed multiplier search has, on top of being fixed by
/// the multipliers H ([`GsSearch::with_types`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum BlockType {
    /// None: one free sign per orbit of H.
    Any,
    /// Symmetric, aₓ = a₋ₓ: one free sign per orbit of ⟨H, −1⟩.
    Symmetric,
    /// Skew-type, a₀ = +1 and a₋ₓ = −aₓ for x ≠ 0: one free sign per pair of orbits {O, −O}.
    /// A skew-type first block makes the Goethals–Seidel matrix skew-Hadamard (H + Hᵀ = 2I).
    Skew,
}

impl BlockType {
    /// The name `--types` takes: `any`, `sym` or `skew`.
    pub fn name(self) -> &'static str {
        match self {
            BlockType::Any => "any",
            BlockType::Symmetric => "sym",
            BlockType::Skew => "skew",
        }
    }
}

impl std::str::FromStr for BlockType {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim() {
            "any" | "none" => Ok(BlockType::Any),
            "sym" | "symmetric" => Ok(BlockType::Symmetric),
            "skew" => Ok(BlockType::Skew),
            other => Err(format!(
                "unknown block type `{other}` (expected any, sym or skew)"
            )),
        }
    }
}

/// Reads four block types separated by commas, e.g. `sym,sym,sym,any`.
pub fn parse_types(s: &str) -> Result<[BlockType; 4], String> {
    let parts: Vec<&str> = s.split(',').collect();
    if parts.len() != 4 {
        return Err(format!(
            "expected four block types separated by commas, found {} in `{s}`",
            parts.len()
        ));
    }
    let mut out = [BlockType::Any; 4];
    for (i, p) in parts.iter().enumerate() {
        out[i] = p.parse().map_err(|e| format!("block {}: {e}", i + 1))?;
    }
    Ok(out)
}

/// `sym,sym,sym,any`.
pub fn types_text(types: &[BlockType; 4]) -> String {
    types.map(|t| t.name()).join(",")
}

/// Checks, independently of the search's bookkeeping, that a quadruple has the structure a
/// typed search looks for: each block fixed by the group `gens` generate mod v (aₕₓ = aₓ) and
/// of its type. The error names the block (1–4) and the first position that fails.
pub fn check_structure(
    q: &GsQuadruple,
    gens: &[usize],
    types: &[BlockType; 4],
) -> Result<(), String> {
    let v = q.v();
    let h = generated_group(v, gens);
    for (i, (a, t)) in q.a.iter().zip(types).enumerate() {
        let block = i + 1;
        if a.len() != v {
            return Err(format!("block {block}: length {} is not {v}", a.len()));
        }
        for x in 0..v {
            if let Some(&m) = h.iter().find(|&&m| a[m * x % v] != a[x]) {
                return Err(format!(
                    "block {block}: not fixed by the multiplier {m} (entries {x} and {})",
                    m * x % v
                ));
            }
            let minus = (v - x) % v;
            match t {
                BlockType::Any => {}
                BlockType::Symmetric if a[minus] != a[x] => {
                    return Err(format!("block {block}: not symmetric at {x}"));
                }
                BlockType::Skew if x == 0 && a[0] != 1 => {
                    return Err(format!("block {block}: skew-type needs a₀ = +1"));
                }
                BlockType::Skew if x != 0 && a[minus] != -a[x] => {
                    return Err(format!("block {block}: not skew-type at {x}"));
                }
                _ => {}
            }
        }
    }
    Ok(())
}

/// How the free signs of one block type become a sequence: aₓ = c for each fixed (x, c),
/// and aₓ = ±c for each (x, c) of variable j, the sign − when bit j is set.
pub struct Basis {
    v: usize,
    fixed: Vec<(usize, i32)>,
    vars: Vec<Vec<(usize, i32)>>,
}

impl Basis {
    /// The basis of block type `t` over the orbits of H (the orbit of 0 first, as [`orbits`]
    /// lists them). `block` only names the block in an error.
    fn new(
        v: usize,
        orbits: &[Vec<usize>],
        t: BlockType,
        block: usize,
    ) -> Result<Self, ShapeError> {
        let mut at = vec![0usize; v];
        for (i, o) in orbits.iter().enumerate() {
            for &x in o {
                at[x] = i;
            }
        }
        let negative = |i: usize| at[(v - orbits[i][0]) % v];
        let mut fixed = Vec::new();
        let mut vars = Vec::new();
        let mut used = vec![false; orbits.len()];
        fn plus(o: &[usize], c: i32) -> impl Iterator<Item = (usize, i32)> + '_ {
            o.iter().map(move |&x| (x, c))
        }
        for i in 0..orbits.len() {
            if used[i] {
                continue;
            }
            let j = negative(i);
            used[i] = true;
            used[j] = true;
            match t {
                BlockType::Any => {
                    used[j] = j == i;
                    vars.push(plus(&orbits[i], 1).collect());
                }
                BlockType::Symmetric => {
                    let mut var: Vec<(usize, i32)> = plus(&orbits[i], 1).collect();
                    if j != i {
                        var.extend(plus(&orbits[j], 1));
                    }
                    vars.push(var);
                }
                BlockType::Skew if orbits[i][0] == 0 => fixed.push((0, 1)),
                BlockType::Skew if j == i => {
                    return Err(ShapeError::SkewImpossible {
                        block,
                        element: orbits[i][0],
                    })
                }
                BlockType::Skew => {
                    vars.push(plus(&orbits[i], 1).chain(plus(&orbits[j], -1)).collect());
                }
            }
        }
        Ok(Basis { v, fixed, vars })
    }

    fn expand(&self, bits: u64) -> Vec<i32> {
        let mut a = vec![0i32; self.v];
        for &(x, c) in &self.fixed {
            a[x] = c;
        }
        for (j, var) in self.vars.iter().enumerate() {
            let s = if bits >> j & 1 == 1 { -1 } else { 1 };
            for &(x, c) in var {
                a[x] = s * c;
            }
        }
        a
    }

    /// The bits of a sequence that this basis spans, or `None` when it does not span it.
    pub fn bits_of(&self, a: &[i8]) -> Option<u64> {
        let mut bits = 0u64;
        for (j, var) in self.vars.iter().enumerate() {
            let (x, c) = var[0];
            if a[x] as i32 != c {
                bits |= 1 << j;
            }
        }
        let back = self.expand(bits);
        back.iter()
            .zip(a)
            .all(|(&p, &q)| p == q as i32)
            .then_some(bits)
    }

    /// True when some sign choice has row sum `sum` (a subset-sum over the parts' weights).
    fn reaches(&self, sum: i64) -> bool {
        let mut sums: std::collections::BTreeSet<i64> =
            [self.fixed.iter().map(|&(_, c)| c as i64).sum()].into();
        for var in &self.vars {
            let w: i64 = var.iter().map(|&(_, c)| c as i64).sum();
            sums = sums.iter().flat_map(|&t| [t + w, t - w]).collect();
        }
        sums.contains(&sum)
    }

    /// The number of free signs.
    pub fn len(&self) -> usize {
        self.vars.len()
    }

    /// True when there is no free sign.
    pub fn is_empty(&self) -> bool {
        self.vars.is_empty()
    }

    /// The sign pattern of the multiplier u: the image under x → ux of the sequence with `bits`
    /// is the sequence with `map(bits)`, where variable j goes to `to[j]`, negated when
    /// `flip[j]` (skew-type pairs can swap their sides).
    fn multiplier_map(&self, u: usize) -> (Vec<usize>, Vec<bool>) {
        let mut var_at = vec![(usize::MAX, 0i32); self.v];
        for (j, var) in self.vars.iter().enumerate() {
            for &(x, c) in var {
                var_at[x] = (j, c);
            }
        }
        self.vars
            .iter()
            .map(|var| {
                let (x, c) = var[0];
                let (j2, c2) = var_at[u * x % self.v];
                (j2, c * c2 < 0)
            })
            .unzip()
    }
}

/// The row sum and Fourier coefficients (at the probe frequencies) of each part of a basis, so
/// that a sign choice's spectrum is a signed sum of them.
struct Spectra {
    base: Vec<(f64, f64)>,
    parts: Vec<Vec<(f64, f64)>>,
    weights: Vec<i64>,
    fixed_sum: i64,
}

impl Spectra {
    fn new(basis: &Basis, probes: &[usize]) -> Self {
        let v = basis.v;
        let (cos, sin) = unit_circle(v);
        let fourier = |part: &[(usize, i32)]| -> Vec<(f64, f64)> {
            probes
                .iter()
                .map(|&k| {
                    part.iter().fold((0.0, 0.0), |(re, im), &(x, c)| {
                        let t = x * k % v;
                        (re + c as f64 * cos[t], im + c as f64 * sin[t])
                    })
                })
                .collect()
        };
        Spectra {
            base: fourier(&basis.fixed),
            parts: basis.vars.iter().map(|var| fourier(var)).collect(),
            weights: basis
                .vars
                .iter()
                .map(|var| var.iter().map(|&(_, c)| c as i64).sum())
                .collect(),
            fixed_sum: basis.fixed.iter().map(|&(_, c)| c as i64).sum(),
        }
    }

    fn row_sum(&self, b: u64) -> i64 {
        let s: i64 = (0..self.weights.len())
            .map(|j| {
                if b >> j & 1 == 1 {
                    -self.weights[j]
                } else {
                    self.weights[j]
                }
            })
            .sum();
        s + self.fixed_sum
    }

    /// The candidate of sign choice `b` if its power spectrum is ≤ 4v at every probe.
    fn candidate(&self, basis: &Basis, b: u64, probes: &[usize]) -> Option<Seq> {
        let v = basis.v;
        let limit = 4.0 * v as f64 + 1e-6;
        let mut psd = Vec::with_capacity(probes.len());
        for (p, &(re0, im0)) in self.base.iter().enumerate() {
            let (mut re, mut im) = (re0, im0);
            for (j, part) in self.parts.iter().enumerate() {
                let (pr, pi) = part[p];
                if b >> j & 1 == 1 {
                    re -= pr;
                    im -= pi;
                } else {
                    re += pr;
                    im += pi;
                }
            }
            let x = re * re + im * im;
            if x > limit {
                return None;
            }
            psd.push(x);
        }
        let a = basis.expand(b);
        let paf = probes
            .iter()
            .map(|&s| (0..v).map(|i| a[i] * a[(i + s) % v]).sum())
            .collect();
        Some(Seq { bits: b, paf, psd })
    }
}

/// The candidates of one block type and row sum: the sign choices whose sequence has that sum
/// and a power spectrum ≤ 4v at every probe frequency, sorted by bits.
fn basis_sequences_with_sum(basis: &Basis, sum: i64, probes: &[usize]) -> Vec<Seq> {
    let spectra = Spectra::new(basis, probes);
    let k = basis.vars.len();
    let total = 1u64 << k;
    let chunk = 1u64 << k.saturating_sub(8);
    let mut out: Vec<Seq> = (0..total.div_ceil(chunk))
        .into_par_iter()
        .flat_map_iter(|c| {
            let spectra = &spectra;
            (c * chunk..((c + 1) * chunk).min(total))
                .filter(move |&b| spectra.row_sum(b) == sum)
                .filter_map(move |b| spectra.candidate(basis, b, probes))
        })
        .collect();
    out.sort_by_key(|s| s.bits);
    out
}

/// The sequences of `all` that are the least (by bits) of their images under the
/// multipliers `maps` (one per coset of H in the units).
fn leaders(all: &[Seq], maps: &[(Vec<usize>, Vec<bool>)]) -> Vec<usize> {
    all.par_iter()
        .enumerate()
        .filter(|(_, s)| {
            maps.iter().all(|(to, flip)| {
                let mut image = 0u64;
                for (j, (&t, &f)) in to.iter().zip(flip).enumerate() {
                    if (s.bits >> j & 1 == 1) != f {
                        image |= 1 << t;
                    }
                }
                image >= s.bits
            })
        })
        .map(|(i, _)| i)
        .collect()
}

/// One shift (and frequency) of each orbit of ⟨H, −1⟩ on the nonzero residues: where PAF and
/// power spectrum of an H-invariant sequence are compared.
fn probes_of(v: usize, h: &[usize]) -> Vec<usize> {
    let mut with_minus: Vec<usize> = h.iter().flat_map(|&x| [x, v - x]).collect();
    with_minus.sort_unstable();
    with_minus.dedup();
    orbits(v, &with_minus)
        .iter()
        .skip(1)
        .map(|o| o[0])
        .collect()
}

/// The candidates of one (block type, row sum).
type RowsOf = ((BlockType, i64), Arc<Vec<Seq>>);

/// One representative of each coset of H in the units mod v, other than H itself.
fn coset_representatives(v: usize, h: &[usize]) -> Vec<usize> {
    let mut covered = vec![false; v];
    for &x in h {
        covered[x] = true;
    }
    let mut out = Vec::new();
    for u in 2..v {
        if covered[u] || gcd(u, v) != 1 {
            continue;
        }
        out.push(u);
        for &x in h {
            covered[u * x % v] = true;
        }
    }
    out
}

/// The ways of giving the row sums of one decomposition of 4v to the four blocks: a skew-type
/// block has row sum 1 (a₀ = 1 and the rest cancels); blocks of the same type are
/// interchangeable, so their sums are taken non-increasing.
fn typed_sums(sums: [i64; 4], types: &[BlockType; 4]) -> Vec<[i64; 4]> {
    let mut out = std::collections::BTreeSet::new();
    for p in permutations4() {
        let s = p.map(|i| sums[i]);
        let ok = (0..4).all(|i| types[i] != BlockType::Skew || s[i] == 1)
            && (0..4).all(|i| (i + 1..4).all(|j| types[i] != types[j] || s[i] >= s[j]));
        if ok {
            out.insert(s);
        }
    }
    out.into_iter().rev().collect()
}

fn permutations4() -> Vec<[usize; 4]> {
    let mut out = Vec::new();
    for a in 0..4 {
        for b in 0..4 {
            for c in 0..4 {
                let d = 6 - a - b - c;
                if a != b && a != c && b != c && d < 4 && d != a && d != b && d != c {
                    out.push([a, b, c, d]);
                }
            }
        }
    }
    out
}

/// The multipliers reduced mod v and the group they generate, or the first that is not a unit
/// mod v (an empty list is refused too).
fn unit_group(v: usize, gens: &[usize]) -> Result<(Vec<usize>, Vec<usize>), ShapeError> {
    if let Some(&g) = gens.iter().find(|&&g| v < 2 || gcd(g % v, v) != 1) {
        return Err(ShapeError::NotAUnit { v, multiplier: g });
    }
    if gens.is_empty() {
        return Err(ShapeError::NotAUnit { v, multiplier: 0 });
    }
    let gens: Vec<usize> = gens.iter().map(|g| g % v).collect();
    let h = generated_group(v, &gens);
    Ok((gens, h))
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
        Self::with_multipliers(v, &[g])
    }

    /// Prepares the search over the sequences of length v fixed by the group the multipliers
    /// `gens` generate mod v.
    pub fn with_multipliers(v: usize, gens: &[usize]) -> Result<Self, ShapeError> {
        let (gens, h) = unit_group(v, gens)?;
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
                multipliers: gens,
                orbits,
                symmetric,
            },
            decompositions,
        })
    }

    /// Prepares the search over the quadruples whose blocks are all fixed by the group the
    /// multipliers `gens` generate mod v, block i also of type `types[i]` (symmetric,
    /// skew-type or neither), whether or not −1 is in the group. Only the least of each class
    /// of the iterated block under the other units (x → ux maps a solution to a solution) is
    /// tried, so every quadruple found is one of a class; none found proves there is no such
    /// quadruple with these types and this group.
    pub fn with_types(v: usize, gens: &[usize], types: [BlockType; 4]) -> Result<Self, ShapeError> {
        let (gens, h) = unit_group(v, gens)?;
        let orbits = self::orbits(v, &h);
        let mut by_type: Vec<(BlockType, Arc<Basis>)> = Vec::new();
        let mut bases = Vec::new();
        for (i, &t) in types.iter().enumerate() {
            if let Some((_, b)) = by_type.iter().find(|(u, _)| *u == t) {
                bases.push(b.clone());
                continue;
            }
            let b = Arc::new(Basis::new(v, &orbits, t, i)?);
            if b.len() > MAX_ORBITS {
                return Err(ShapeError::TooManyOrbits { orbits: b.len() });
            }
            by_type.push((t, b.clone()));
            bases.push(b);
        }
        let bases: [Arc<Basis>; 4] = [0, 1, 2, 3].map(|i| bases[i].clone());
        let minus_one_in_h = h.contains(&(v - 1));
        let symmetric = types
            .iter()
            .all(|&t| t == BlockType::Symmetric || (minus_one_in_h && t == BlockType::Any));
        let probes = probes_of(v, &h);
        let reps = coset_representatives(v, &h);
        let mut cache: Vec<RowsOf> = Vec::new();
        let mut lead_cache: Vec<RowsOf> = Vec::new();
        let mut decompositions = Vec::new();
        for sums in four_squares(4 * v as i64, v as i64 % 2) {
            for s in typed_sums(sums, &types) {
                // Orbit sizes often leave some block no sign choice with its row sum: skip the
                // decomposition before any candidate list is made.
                if (0..4).any(|i| !bases[i].reaches(s[i])) {
                    continue;
                }
                let mut get = |i: usize| -> Arc<Vec<Seq>> {
                    let k = (types[i], s[i]);
                    if let Some((_, r)) = cache.iter().find(|(t, _)| *t == k) {
                        return r.clone();
                    }
                    let r = Arc::new(basis_sequences_with_sum(&bases[i], s[i], &probes));
                    cache.push((k, r.clone()));
                    r
                };
                let rows = [0, 1, 2, 3].map(&mut get);
                // Of the three pairings and the two sides, the one with the least work: the
                // outer pair's products (divided by the multiplier classes of its larger
                // block) plus the table's.
                let len = |i: usize| rows[i].len() as f64;
                let classes = (reps.len() + 1) as f64;
                let mut best: Option<(f64, [usize; 2], [usize; 2])> = None;
                for (p, q) in [([0, 1], [2, 3]), ([0, 2], [1, 3]), ([0, 3], [1, 2])] {
                    for (o, t) in [(p, q), (q, p)] {
                        let o = if len(o[0]) >= len(o[1]) {
                            o
                        } else {
                            [o[1], o[0]]
                        };
                        let cost = len(o[0]) * len(o[1]) / classes + len(t[0]) * len(t[1]);
                        if best.as_ref().is_none_or(|b| cost < b.0) {
                            best = Some((cost, o, t));
                        }
                    }
                }
                let (_, outer, inner) = best.expect("three pairings");
                let k = (types[outer[0]], s[outer[0]]);
                let lead = match lead_cache.iter().find(|(t, _)| *t == k) {
                    Some((_, r)) => r.clone(),
                    None => {
                        let basis = &bases[outer[0]];
                        let maps: Vec<_> = reps.iter().map(|&u| basis.multiplier_map(u)).collect();
                        let all = &rows[outer[0]];
                        let r: Arc<Vec<Seq>> = Arc::new(
                            leaders(all, &maps)
                                .into_iter()
                                .map(|i| Seq {
                                    bits: all[i].bits,
                                    paf: all[i].paf.clone(),
                                    psd: all[i].psd.clone(),
                                })
                                .collect(),
                        );
                        lead_cache.push((k, r.clone()));
                        r
                    }
                };
                decompositions.push(Decomposition {
                    rows,
                    outer,
                    inner,
                    lead,
                    table: OnceLock::new(),
                });
            }
        }
        Ok(GsSearch {
            v,
            shape: Shape::Typed {
                multipliers: gens,
                types,
                bases,
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
            Shape::Typed { bases, .. } => bases.iter().map(|b| b.len()).max().unwrap_or(0),
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
                    lead: rows[outer[0]].clone(),
                    rows,
                    outer,
                    inner,
                    table: OnceLock::new(),
                }
            })
            .collect()
    }

    fn expand(&self, block: usize, bits: u64) -> Vec<i8> {
        let a = match &self.shape {
            Shape::Plain => expand(self.v, bits),
            Shape::Orbits { orbits, .. } => expand_orbits(self.v, orbits, bits),
            Shape::Typed { bases, .. } => bases[block].expand(bits),
        };
        a.into_iter().map(|x| x as i8).collect()
    }

    /// The result line of four chosen sequences: a Williamson line when they are symmetric
    /// (−1 is a multiplier), a Goethals–Seidel line otherwise; `None` if the exact identity
    /// fails (it never should: the table only narrows the candidates).
    fn result(&self, picks: [u64; 4]) -> Option<String> {
        let quad = GsQuadruple {
            a: [0, 1, 2, 3].map(|i| self.expand(i, picks[i])),
        };
        if !quad.is_valid() {
            return None;
        }
        if let Shape::Typed {
            multipliers, types, ..
        } = &self.shape
        {
            check_structure(&quad, multipliers, types).ok()?;
        }
        if matches!(
            self.shape,
            Shape::Orbits {
                symmetric: true,
                ..
            } | Shape::Typed {
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
            Shape::Orbits { multipliers, .. } => {
                let gens: Vec<String> = multipliers.iter().map(|g| g.to_string()).collect();
                format!("gs v={} multiplier={}", self.v, gens.join(","))
            }
            Shape::Typed {
                multipliers, types, ..
            } => {
                let gens: Vec<String> = multipliers.iter().map(|g| g.to_string()).collect();
                format!(
                    "gs v={} multiplier={} types={}",
                    self.v,
                    gens.join(","),
                    types_text(types)
                )
            }
        }
    }

    fn units(&self) -> Vec<Unit> {
        super::slice_units(
            self.decompositions
                .iter()
                .map(|d| (!d.rows.iter().any(|r| r.is_empty())).then(|| d.lead.len())),
        )
    }

    fn run_unit(&self, u: &Unit) -> Vec<String> {
        let d = &self.decompositions[u.decomposition];
        let table = self.table(d);
        let (x, y) = (&d.lead, &d.rows[d.outer[1]]);
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
        // Every v ≤ 12 has a quadruple: Williamson ones for odd v (references.md#r7-williamson-orders)
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
        // The units mod 15 are Z₂ × Z₄, not cyclic: ⟨4, 11⟩ = {1, 4, 11, 14} is a Klein four-group
        // (each element squares to 1), which no single multiplier generates, and the list of
        // choices offers it with its two generators.
        assert!(!units_are_cyclic(15) && !units_are_cyclic(8) && !units_are_cyclic(213));
        assert!(units_are_cyclic(4) && units_are_cyclic(125) && units_are_cyclic(2 * 997));
        let klein = generated_group(15, &[4, 11]);
        assert_eq!(klein, vec![1, 4, 11, 14]);
        assert!(klein.iter().all(|&x| x * x % 15 == 1));
        let choices = multiplier_choices(15, MAX_ORBITS);
        assert!(choices
            .iter()
            .any(|(g, size, _)| g.len() == 2 && *size == 4));
        assert!(choices
            .iter()
            .all(|(g, size, _)| generated_group(15, g).len() == *size));
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
        // Williamson matrices of order 43 exist (references.md#r7-williamson-orders); with the
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
        // input of order 292 = 4·73 (known to exist: references.md#r3-open-orders).
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

#[cfg(test)]
mod typed_tests {
    use super::*;
    use crate::construct::sequences::from_text;
    use crate::search::run_to_end;
    use std::collections::{BTreeSet, HashMap};

    fn paf(a: &[i8], s: usize) -> i64 {
        let v = a.len();
        (0..v).map(|i| a[i] as i64 * a[(i + s) % v] as i64).sum()
    }

    /// The class of a quadruple under what the typed search identifies: the multiplier maps
    /// x → ux (u a unit; applied to all four blocks), negating a symmetric or untyped block, and
    /// exchanging blocks of the same type. The least image, written as text.
    fn class(q: &[Vec<i8>; 4], types: &[BlockType; 4]) -> String {
        let v = q[0].len();
        let mut best: Option<String> = None;
        for u in (1..v).filter(|&u| gcd(u, v) == 1) {
            let mut blocks: Vec<(BlockType, Vec<i8>)> = (0..4)
                .map(|i| {
                    let mut b = vec![0i8; v];
                    for x in 0..v {
                        b[u * x % v] = q[i][x];
                    }
                    let sum: i64 = b.iter().map(|&x| x as i64).sum();
                    if types[i] != BlockType::Skew && sum < 0 {
                        b.iter_mut().for_each(|x| *x = -*x);
                    }
                    (types[i], b)
                })
                .collect();
            blocks.sort();
            let text = blocks
                .iter()
                .map(|(t, b)| format!("{}:{}", t.name(), crate::construct::sequences::to_text(b)))
                .collect::<Vec<_>>()
                .join(" ");
            if best.as_ref().is_none_or(|b| text < *b) {
                best = Some(text);
            }
        }
        best.unwrap()
    }

    /// Every quadruple of the given types fixed by H = ⟨g⟩, by brute force straight from the
    /// definitions (no bases, no probes, no spectrum), as classes.
    fn brute_force(v: usize, g: usize, types: &[BlockType; 4]) -> BTreeSet<String> {
        let h = multiplier_group(v, g);
        let orb = orbits(v, &h);
        let all: Vec<Vec<i8>> = (0..1u64 << orb.len())
            .map(|b| {
                expand_orbits(v, &orb, b)
                    .into_iter()
                    .map(|x| x as i8)
                    .collect()
            })
            .collect();
        let of_type = |t: BlockType| -> Vec<(Vec<i8>, Vec<i64>)> {
            all.iter()
                .filter(|a| {
                    let probe = GsQuadruple {
                        a: [(*a).clone(), (*a).clone(), (*a).clone(), (*a).clone()],
                    };
                    check_structure(&probe, &[g], &[t; 4]).is_ok()
                })
                .map(|a| (a.clone(), (1..v).map(|s| paf(a, s)).collect()))
                .collect()
        };
        let lists: Vec<_> = types.iter().map(|&t| of_type(t)).collect();
        let mut pairs: HashMap<Vec<i64>, Vec<(usize, usize)>> = HashMap::new();
        for (k, c) in lists[2].iter().enumerate() {
            for (l, d) in lists[3].iter().enumerate() {
                let key: Vec<i64> = c.1.iter().zip(&d.1).map(|(x, y)| -(x + y)).collect();
                pairs.entry(key).or_default().push((k, l));
            }
        }
        let mut out = BTreeSet::new();
        for a in &lists[0] {
            for b in &lists[1] {
                let key: Vec<i64> = a.1.iter().zip(&b.1).map(|(x, y)| x + y).collect();
                for &(k, l) in pairs.get(&key).map_or(&[][..], |p| p) {
                    let q = [
                        a.0.clone(),
                        b.0.clone(),
                        lists[2][k].0.clone(),
                        lists[3][l].0.clone(),
                    ];
                    assert!(GsQuadruple { a: q.clone() }.is_valid());
                    out.insert(class(&q, types));
                }
            }
        }
        out
    }

    fn found_classes(v: usize, g: usize, types: [BlockType; 4]) -> BTreeSet<String> {
        let search = GsSearch::with_types(v, &[g], types).unwrap();
        run_to_end(&search, None)
            .iter()
            .map(|line| {
                let mut cat = crate::seed::SeedCatalogue::default();
                cat.add_text("result", &format!("{line} | test; 2026-12-03"));
                assert!(cat.rejected.is_empty(), "{:?}", cat.rejected);
                let q = cat.goethals_seidel[0].data.clone();
                assert!(check_structure(&q, &[g], &types).is_ok(), "{line}");
                class(&q.a, &types)
            })
            .collect()
    }

    #[test]
    fn a_typed_search_finds_a_quadruple_of_every_class_that_brute_force_finds() {
        // The Goethals–Seidel condition (PAF sum 0 at every nonzero shift; Goethals and Seidel,
        // J. Austral. Math. Soc. 11, 1970) checked by brute force over every H-invariant
        // sequence of each type; the search, with its bases, probes, spectral filter, row-sum
        // assignment and multiplier leaders, must reach every class. v = 19, H = ⟨7⟩ = {1, 7, 11}
        // (7³ = 343 = 18·19 + 1), −1 ∉ H: 7 orbits, 4 symmetric signs, 3 skew-type signs.
        for types in ["sym,sym,sym,any", "skew,sym,sym,sym", "skew,any,sym,any"] {
            let t = parse_types(types).unwrap();
            let brute = brute_force(19, 7, &t);
            assert!(!brute.is_empty(), "{types}");
            assert_eq!(found_classes(19, 7, t), brute, "{types}");
        }
    }

    #[test]
    fn types_parse_and_impossible_shapes_are_refused() {
        assert_eq!(
            parse_types("sym, skew,any,symmetric"),
            Ok([
                BlockType::Symmetric,
                BlockType::Skew,
                BlockType::Any,
                BlockType::Symmetric
            ])
        );
        assert!(parse_types("sym,sym,any").unwrap_err().contains("four"));
        assert!(parse_types("sym,sym,any,odd")
            .unwrap_err()
            .contains("block 4"));
        // −1 ∈ ⟨7⟩ mod 43 (7 has order 6, 7³ ≡ −1): no block can be skew-type.
        assert!(matches!(
            GsSearch::with_types(43, &[7], parse_types("skew,sym,sym,sym").unwrap()),
            Err(ShapeError::SkewImpossible { block: 0, .. })
        ));
        // Even v: v/2 = −v/2, so no skew-type block.
        assert!(matches!(
            GsSearch::with_types(46, &[3], parse_types("any,any,any,skew").unwrap()),
            Err(ShapeError::SkewImpossible { block: 3, .. })
        ));
    }

    /// Known quadruples, copied from `shared/data/gs/gs_v067_order268.txt`,
    /// `gs_v127_order508.txt` and `gs_v163_order652.txt` (the project brief's checked data,
    /// found by a separate search written in C, each file stating its group and types).
    const KNOWN: [(usize, usize, &str, [&str; 4]); 3] = [
        (
            67,
            29,
            "sym,sym,sym,any",
            [
                "-++++-++-+----++--++++-+---+-++--++--++-+---+-++++--++----+-++-++++",
                "-+++-+-+++-+++--+---+--+-+--++++----++++--+-+--+---+--+++-+++-+-+++",
                "+--+--+---+-++-+-+-+++++++++----++++----+++++++++-+-+-++-+---+--+--",
                "++--+++--+++--++++-+-++++-+--++--+++-++-++-+---++++++---+---+-+-+++",
            ],
        ),
        (
            127,
            2,
            "skew,sym,sym,sym",
            [
                "+----+---+++-+-+-++-+++---++--++-+++++--+++-+----+-++-+-----+-++--+-+++++-+--+-++++-+---++-----+--++--+++---+--+-+-+---+++-++++",
                "-++-+---++-+-+--+++--+++--+--+--+-++++-+-++++++--+--++-+-+++---++---+++-+-++--+--++++++-+-++++-+--+--+--+++--+++--+-+-++---+-++",
                "-------+-+-+--++-+++-++--+-++++---+-++++-+++++---+++-++++-+++------+++-++++-+++---+++++-++++-+---++++-+--++-+++-++--+-+-+------",
                "---+-++--++++----++-+++-+----+-+-++-++-+++++++-+++---+-+--++-++--++-++--+-+---+++-+++++++-++-++-+-+----+-+++-++----++++--++-+--",
            ],
        ),
        (
            163,
            40,
            "sym,any,any,any",
            [
                "--+--+-+-++-++--+-+-----+-++---+++++++---++-+++++-++--+-++--+++++-+++---+-+++--++--++--+++-+---+++-+++++--++-+--++-+++++-++---+++++++---++-+-----+-+--++-++-+-+--+-",
                "+--++---+++++-+-+++-----+-+-+---++++-----++++-++-+++--+-++--+-++--+-++-+-+++---+---++-+++-+++-+++++-+------+----+++---++++-------+++------++-++--+-+-+-++-+-++-+++-",
                "+---------+-+--+---++--++-+--++----++--+-++-+-++--+++-++-+-++++-+--+--+-+-+---+--++++--+++-+-+-+++--++---+-+++++---+--+---+++++-+++++-+-++-----+++-++-+--++-+-+--++",
                "+----++-+-+-++-+-+---++++++++-++---+++-+-++-+---+-++--++---+-++-++-+----+-+--++--+--+-+-++-+-+-++++++++--+-+-+++---+------++-++++++++-+++++--+++++++--+--+++-++---+",
            ],
        ),
    ];

    #[test]
    fn the_known_solutions_pass_the_structure_check_and_the_search_bookkeeping() {
        for (v, g, types, rows) in KNOWN {
            let t = parse_types(types).unwrap();
            let q = GsQuadruple {
                a: rows.map(|r| from_text(r).unwrap()),
            };
            assert!(q.v() == v && q.is_valid(), "v = {v}");
            assert_eq!(check_structure(&q, &[g], &t), Ok(()), "v = {v}");
            // One wrong entry (and its orbit) breaks the identity and the structure.
            let mut bad = q.clone();
            bad.a[3][1] = -bad.a[3][1];
            assert!(!bad.is_valid() && check_structure(&bad, &[g], &t).is_err());
            // Each block is spanned by its type's basis, and it (or its negative: the search
            // takes row sums ≥ 0 for symmetric and untyped blocks) is in the candidate list
            // of its row sum, so the search would meet it.
            let h = multiplier_group(v, g);
            let orb = orbits(v, &h);
            let probes = probes_of(v, &h);
            for (i, row) in q.a.iter().enumerate() {
                let basis = Basis::new(v, &orb, t[i], i).unwrap();
                let mut row = row.clone();
                let sum: i64 = row.iter().map(|&x| x as i64).sum();
                if sum < 0 {
                    row.iter_mut().for_each(|x| *x = -*x);
                }
                let bits = basis.bits_of(&row).expect("spanned by its basis");
                let spectra = Spectra::new(&basis, &probes);
                assert_eq!(spectra.row_sum(bits), sum.abs(), "v = {v}, block {i}");
                assert!(spectra.candidate(&basis, bits, &probes).is_some());
            }
            // The skew-type first block of v = 127 makes the Goethals–Seidel matrix
            // skew-Hadamard (H + Hᵀ = 2I; Goethals and Seidel 1970), as core's exact check says.
            let built = crate::construct::goethals_seidel::goethals_seidel(&q).unwrap();
            let skew = crate::verify::properties(built.matrix()).skew;
            assert_eq!(skew, t[0] == BlockType::Skew, "v = {v}");
        }
    }
}
