//! The sequence families that feed the array constructions, and their defining identities.
//!
//! One idea runs through all of them: a Hadamard matrix built from circulant blocks is
//! Hadamard exactly when some sum of autocorrelations of its first rows vanishes away from
//! shift 0. Aperiodic autocorrelation `N_a(s) = Σ_{i < len−s} aᵢ·aᵢ₊ₛ` is the one for Golay
//! pairs, base sequences, T-sequences and Turyn-type sequences; periodic autocorrelation
//! `P_a(s) = Σ_i aᵢ·a₍ᵢ₊ₛ₎ mod len` is the one for Williamson and Goethals–Seidel
//! quadruples. Each type here checks its identity in `is_valid`, so data read from the seed
//! catalogue or found by a search can be told good or bad before any matrix is built.
//!
//! Entries are `i8`: ±1, and also 0 for T-sequences.

use serde::{Deserialize, Serialize};

/// Aperiodic autocorrelation of `a` at shift `s` (0 when s ≥ len).
pub fn naf(a: &[i8], s: usize) -> i64 {
    if s >= a.len() {
        return 0;
    }
    a.iter()
        .zip(&a[s..])
        .map(|(&x, &y)| x as i64 * y as i64)
        .sum()
}

/// Periodic autocorrelation of `a` at shift `s` (taken mod len).
pub fn paf(a: &[i8], s: usize) -> i64 {
    let n = a.len();
    if n == 0 {
        return 0;
    }
    let s = s % n;
    (0..n).map(|i| a[i] as i64 * a[(i + s) % n] as i64).sum()
}

/// True when every entry is ±1.
pub fn is_pm1(a: &[i8]) -> bool {
    a.iter().all(|&x| x == 1 || x == -1)
}

/// True when `a` is symmetric as a circulant first row: aᵢ = a₍ₘ₋ᵢ₎.
pub fn is_symmetric_row(a: &[i8]) -> bool {
    let m = a.len();
    (1..m).all(|i| a[i] == a[m - i])
}

/// A Golay pair: ±1 sequences of one length with N_a(s) + N_b(s) = 0 for every s ≥ 1.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct GolayPair {
    pub a: Vec<i8>,
    pub b: Vec<i8>,
}

impl GolayPair {
    /// The length g.
    pub fn len(&self) -> usize {
        self.a.len()
    }
    /// True for the empty pair (never valid).
    pub fn is_empty(&self) -> bool {
        self.a.is_empty()
    }
    /// Checks the defining identity.
    pub fn is_valid(&self) -> bool {
        let g = self.a.len();
        g > 0
            && self.b.len() == g
            && is_pm1(&self.a)
            && is_pm1(&self.b)
            && (1..g).all(|s| naf(&self.a, s) + naf(&self.b, s) == 0)
    }
}

/// Base sequences BS(n+p, n): ±1 sequences A, B of length n+p and C, D of length n whose
/// aperiodic autocorrelations sum to 0 at every shift s ≥ 1.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct BaseSequences {
    pub a: Vec<i8>,
    pub b: Vec<i8>,
    pub c: Vec<i8>,
    pub d: Vec<i8>,
}

impl BaseSequences {
    /// Checks the lengths, the entries and the identity.
    pub fn is_valid(&self) -> bool {
        let (l, n) = (self.a.len(), self.c.len());
        l > 0
            && self.b.len() == l
            && self.d.len() == n
            && l >= n
            && [&self.a, &self.b, &self.c, &self.d]
                .iter()
                .all(|x| is_pm1(x))
            && (1..l)
                .all(|s| naf(&self.a, s) + naf(&self.b, s) + naf(&self.c, s) + naf(&self.d, s) == 0)
    }
}

/// Turyn-type sequences TT(n): ±1 sequences A, B, C of length n and D of length n−1 with
/// N_A + N_B + 2N_C + 2N_D = 0 at every shift s ≥ 1 (Best, Đoković, Kharaghani and Ramp,
/// J. Combin. Des. 21, 2013).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct TurynType {
    pub a: Vec<i8>,
    pub b: Vec<i8>,
    pub c: Vec<i8>,
    pub d: Vec<i8>,
}

impl TurynType {
    /// The parameter n (the length of A).
    pub fn n(&self) -> usize {
        self.a.len()
    }
    /// Checks the lengths, the entries and the identity.
    pub fn is_valid(&self) -> bool {
        let n = self.a.len();
        n >= 2
            && self.b.len() == n
            && self.c.len() == n
            && self.d.len() == n - 1
            && [&self.a, &self.b, &self.c, &self.d]
                .iter()
                .all(|x| is_pm1(x))
            && (1..n).all(|s| {
                naf(&self.a, s) + naf(&self.b, s) + 2 * naf(&self.c, s) + 2 * naf(&self.d, s) == 0
            })
    }
}

/// T-sequences of length t: four (0, ±1) sequences with exactly one nonzero entry among the
/// four at each position, whose aperiodic autocorrelations sum to 0 at every shift s ≥ 1.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct TSequences {
    pub t: [Vec<i8>; 4],
}

impl TSequences {
    /// The length t.
    pub fn len(&self) -> usize {
        self.t[0].len()
    }
    /// True for the empty family (never valid).
    pub fn is_empty(&self) -> bool {
        self.t[0].is_empty()
    }
    /// Checks the lengths, the one-nonzero-per-position rule and the identity.
    pub fn is_valid(&self) -> bool {
        let t = self.len();
        t > 0
            && self
                .t
                .iter()
                .all(|x| x.len() == t && x.iter().all(|&v| (-1..=1).contains(&v)))
            && (0..t).all(|i| self.t.iter().filter(|x| x[i] != 0).count() == 1)
            && (1..t).all(|s| self.t.iter().map(|x| naf(x, s)).sum::<i64>() == 0)
    }
}

/// Williamson matrices of odd order m, given by the first rows of four symmetric circulant ±1
/// matrices A, B, C, D with A² + B² + C² + D² = 4mI (Williamson, Duke Math. J. 11, 1944).
/// For symmetric circulants that is: the periodic autocorrelations sum to 0 off shift 0.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Williamson {
    pub a: Vec<i8>,
    pub b: Vec<i8>,
    pub c: Vec<i8>,
    pub d: Vec<i8>,
}

impl Williamson {
    /// The order m of each block.
    pub fn m(&self) -> usize {
        self.a.len()
    }
    /// Checks symmetry, entries and the identity.
    pub fn is_valid(&self) -> bool {
        let rows = [&self.a, &self.b, &self.c, &self.d];
        let m = self.a.len();
        m > 0
            && rows
                .iter()
                .all(|x| x.len() == m && is_pm1(x) && is_symmetric_row(x))
            && (1..m).all(|s| rows.iter().map(|x| paf(x, s)).sum::<i64>() == 0)
    }
}

/// Four ±1 sequences of length v whose periodic autocorrelations sum to 0 off shift 0: the
/// first rows of circulants A₀..A₃ with Σ AᵢAᵢᵀ = 4vI, as the Goethals–Seidel array needs
/// (Goethals and Seidel, J. Austral. Math. Soc. 11, 1970).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct GsQuadruple {
    pub a: [Vec<i8>; 4],
}

impl GsQuadruple {
    /// The length v.
    pub fn v(&self) -> usize {
        self.a[0].len()
    }
    /// Checks entries and the identity.
    pub fn is_valid(&self) -> bool {
        let v = self.v();
        v > 0
            && self.a.iter().all(|x| x.len() == v && is_pm1(x))
            && (1..v).all(|s| self.a.iter().map(|x| paf(x, s)).sum::<i64>() == 0)
    }
}

/// True when a ±1 sequence is skew-type: a₀ = +1 and a₋ₓ = −aₓ (indices mod v) for x ≠ 0. As
/// the first row of A₀ in the Goethals–Seidel array it makes the matrix skew-Hadamard
/// (H + Hᵀ = 2I): A₀ + A₀ᵀ = 2I, and the off-diagonal blocks pair up as X and −Xᵀ.
pub fn is_skew_type(a: &[i8]) -> bool {
    let v = a.len();
    v > 0 && a[0] == 1 && (1..v).all(|x| a[v - x] == -a[x])
}

/// Writes a (0, ±1) sequence as text: `+`, `-` and `0`.
pub fn to_text(a: &[i8]) -> String {
    a.iter()
        .map(|&x| match x {
            1 => '+',
            -1 => '-',
            _ => '0',
        })
        .collect()
}

/// Reads a sequence written by [`to_text`]. Returns the index of the first bad character.
pub fn from_text(s: &str) -> Result<Vec<i8>, usize> {
    s.chars()
        .enumerate()
        .map(|(i, c)| match c {
            '+' => Ok(1),
            '-' | '\u{2212}' => Ok(-1),
            '0' => Ok(0),
            _ => Err(i),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(x: &str) -> Vec<i8> {
        from_text(x).unwrap()
    }

    #[test]
    fn golay_pair_of_length_two_and_a_bad_one() {
        // The length-2 pair (++, +-) is the standard seed of Golay's recursion [common practice].
        assert!(GolayPair {
            a: s("++"),
            b: s("+-")
        }
        .is_valid());
        assert!(!GolayPair {
            a: s("++"),
            b: s("++")
        }
        .is_valid());
    }

    #[test]
    fn williamson_of_order_one_and_three() {
        // m = 1: A = B = C = D = (1): 4·1 = 4·1. m = 3: A = J, B = C = D = J − 2I gives
        // A² + 3(J − 2I)² = 3J + 3(3J − 4J + 4I) = 12I [derived].
        let one = Williamson {
            a: s("+"),
            b: s("+"),
            c: s("+"),
            d: s("+"),
        };
        assert!(one.is_valid());
        let three = Williamson {
            a: s("+++"),
            b: s("+--"),
            c: s("+--"),
            d: s("+--"),
        };
        assert!(three.is_valid());
        let bad = Williamson {
            a: s("+++"),
            b: s("+++"),
            c: s("+--"),
            d: s("+--"),
        };
        assert!(!bad.is_valid());
    }

    #[test]
    fn text_round_trip() {
        let a = vec![1, -1, 0, 1];
        assert_eq!(from_text(&to_text(&a)).unwrap(), a);
        assert_eq!(from_text("+x"), Err(1));
    }

    #[test]
    fn t_sequences_of_length_one() {
        let t = TSequences {
            t: [vec![1], vec![0], vec![0], vec![0]],
        };
        assert!(t.is_valid());
        let two_nonzero = TSequences {
            t: [vec![1], vec![1], vec![0], vec![0]],
        };
        assert!(!two_nonzero.is_valid());
    }
}
