//! T-sequences and the sequence families that produce them: base sequences, Turyn-type
//! sequences and Golay pairs, and Golay's and Turyn's ways of combining Golay pairs.
//!
//! One idea: every family here is a set of sequences whose aperiodic autocorrelations N(s) sum
//! to 0 for s ≥ 1, and each map below turns one such set into another by an identity on those
//! sums; the last step, T-sequences to a Goethals–Seidel quadruple, turns aperiodic into
//! periodic, because P_x(s) = N_x(s) + N_x(t − s).
//!
//! - **T-sequences → Hadamard** (Turyn, "Hadamard matrices, Baumert–Hall units, four-symbol
//!   sequences, pulse compression, and surface wave encodings", J. Combin. Theory A 16, 1974
//!   \[recalled\]): with exactly one Tᵢ nonzero at each position, a = T₁+T₂+T₃+T₄,
//!   b = T₁+T₂−T₃−T₄, c = T₁−T₂+T₃−T₄, d = T₁−T₂−T₃+T₄ are ±1, and
//!   Σ N_a,b,c,d = 4·Σ N_Tᵢ = 0, so the periodic sums vanish too: the Goethals–Seidel array
//!   gives order 4t.
//! - **Base sequences BS(n+p, n) → T-sequences of length 2n+p** (standard \[recalled\]; derived here):
//!   T₁ = ½(A+B) ‖ 0ⁿ, T₂ = ½(A−B) ‖ 0ⁿ, T₃ = 0ⁿ⁺ᵖ ‖ ½(C+D), T₄ = 0ⁿ⁺ᵖ ‖ ½(C−D). Since
//!   N_(x+y)/2 + N_(x−y)/2 = (N_x + N_y)/2, the sum is half that of the base sequences.
//! - **Turyn-type TT(n) → BS(2n−1, n) = (C‖D, C‖−D, A, B)** (Best, Đoković, Kharaghani and
//!   Ramp, J. Combin. Des. 21, 2013): N_(C‖D) + N_(C‖−D) = 2N_C + 2N_D
//!   because the cross terms between C and ±D cancel.
//! - **Golay pair (A, B) of length g** (derived here) gives T-sequences of length g
//!   (½(A+B), ½(A−B), 0, 0), of length g + 1 ((½(A+B), 0), (½(A−B), 0), (0…0, 1), 0), and of
//!   length 2g + 1 through BS(g+1, g) = (A‖1, A‖−1, B, B), whose sum is 2(N_A + N_B) = 0.
//! - **Two Golay pairs → base sequences** (derived from items 9 and 11): pairs (A, B) of length
//!   g₁ and (C, D) of length g₂ ≤ g₁ are base sequences BS(g₁, g₂), since N_A + N_B = 0 and
//!   N_C + N_D = 0 separately; so they give T-sequences of length g₁ + g₂ through the map above
//!   (which needs only N_A + N_B + N_C + N_D = 0, whatever p is).
//! - **Golay doubling** (Golay, "Complementary series", IRE Trans. Inform. Theory 7, 1961
//!   \[recalled\]):
//!   (A‖B, A‖−B) is a Golay pair of length 2g.
//! - **Turyn's product** (Turyn 1974, as cited by Jedwab and Parker, J. Combin. Des. 17, 2009):
//!   pairs (A, B) of length m and (C, D) of length n give a pair of length mn. Derivation on
//!   the unit circle: with P = ½(C+D), Q = ½(C−D), |P|² + |Q|² = n; take
//!   E(z) = A(zⁿ)P(z) + B(zⁿ)Q(z) and F(z) = B̃(zⁿ)P(z) − Ã(zⁿ)Q(z), where X̃ is X reversed
//!   (on |z| = 1, X̃(zⁿ) = z^(n(m−1))·conj(X(zⁿ))). Then
//!   |E|² + |F|² = (|A|² + |B|²)(|P|² + |Q|²) = 2m·n, the cross terms cancelling. Entry ni + j
//!   of E is aᵢpⱼ + bᵢqⱼ and of F is b_(m−1−i)pⱼ − a_(m−1−i)qⱼ: ±1, as exactly one of pⱼ, qⱼ
//!   is nonzero.

use super::arrays::{Group, Reversal};
use super::goethals_seidel::gs_matrix;
use super::sequences::{BaseSequences, GolayPair, TSequences, TurynType};
use super::{finish, hypothesis, ConstructError};
use crate::verify::Verified;

/// The ±1 rows a, b, c, d = T₁ ± T₂ ± T₃ ± T₄ (signs as in Turyn's map) of T-sequences.
pub(crate) fn t_to_rows(t: &TSequences) -> [Vec<i8>; 4] {
    let [t1, t2, t3, t4] = &t.t;
    let comb = |s2: i8, s3: i8, s4: i8| -> Vec<i8> {
        (0..t.len())
            .map(|i| t1[i] + s2 * t2[i] + s3 * t3[i] + s4 * t4[i])
            .collect()
    };
    [
        comb(1, 1, 1),
        comb(1, -1, -1),
        comb(-1, 1, -1),
        comb(-1, -1, 1),
    ]
}

/// The Hadamard matrix of order 4t from T-sequences of length t (checked with `is_valid`).
pub fn t_sequences(t: &TSequences) -> Result<Verified, ConstructError> {
    if !t.is_valid() {
        return hypothesis(
            "not T-sequences: need one nonzero entry per position and aperiodic sums 0",
        );
    }
    finish(gs_matrix(
        Group::cyclic(t.len()),
        Reversal::BackIdentity,
        &t_to_rows(t),
    ))
}

fn half_sum(x: &[i8], y: &[i8], sign: i8) -> Vec<i8> {
    x.iter().zip(y).map(|(&a, &b)| (a + sign * b) / 2).collect()
}

/// T-sequences of length 2n + p from base sequences BS(n + p, n).
pub fn base_to_t(b: &BaseSequences) -> TSequences {
    let (l, n) = (b.a.len(), b.c.len());
    let front =
        |v: Vec<i8>| -> Vec<i8> { v.into_iter().chain(std::iter::repeat_n(0, n)).collect() };
    let back = |v: Vec<i8>| -> Vec<i8> { std::iter::repeat_n(0, l).chain(v).collect() };
    TSequences {
        t: [
            front(half_sum(&b.a, &b.b, 1)),
            front(half_sum(&b.a, &b.b, -1)),
            back(half_sum(&b.c, &b.d, 1)),
            back(half_sum(&b.c, &b.d, -1)),
        ],
    }
}

/// Base sequences BS(2n − 1, n) = (C‖D, C‖−D, A, B) from Turyn-type sequences TT(n).
pub fn turyn_to_base(tt: &TurynType) -> BaseSequences {
    let cd: Vec<i8> = tt.c.iter().chain(&tt.d).copied().collect();
    let c_minus_d: Vec<i8> =
        tt.c.iter()
            .copied()
            .chain(tt.d.iter().map(|&x| -x))
            .collect();
    BaseSequences {
        a: cd,
        b: c_minus_d,
        c: tt.a.clone(),
        d: tt.b.clone(),
    }
}

/// The T-sequences of lengths g, g + 1 and 2g + 1 from a Golay pair of length g, in that order.
pub fn golay_to_t(g: &GolayPair) -> Vec<TSequences> {
    let n = g.len();
    let p = half_sum(&g.a, &g.b, 1);
    let m = half_sum(&g.a, &g.b, -1);
    let zeros = |k: usize| vec![0i8; k];
    let length_g = TSequences {
        t: [p.clone(), m.clone(), zeros(n), zeros(n)],
    };
    let pad = |v: &[i8], last: i8| -> Vec<i8> { v.iter().copied().chain([last]).collect() };
    let length_g1 = TSequences {
        t: [pad(&p, 0), pad(&m, 0), pad(&zeros(n), 1), zeros(n + 1)],
    };
    let bs = BaseSequences {
        a: pad(&g.a, 1),
        b: pad(&g.a, -1),
        c: g.b.clone(),
        d: g.b.clone(),
    };
    vec![length_g, length_g1, base_to_t(&bs)]
}

/// Base sequences BS(g₁, g₂) from Golay pairs of lengths g₁ and g₂ (the longer pair first,
/// whichever order they are given in); with [`base_to_t`], T-sequences of length g₁ + g₂.
pub fn golay_pairs_to_base(x: &GolayPair, y: &GolayPair) -> BaseSequences {
    let (long, short) = if x.len() >= y.len() { (x, y) } else { (y, x) };
    BaseSequences {
        a: long.a.clone(),
        b: long.b.clone(),
        c: short.a.clone(),
        d: short.b.clone(),
    }
}

/// Golay's doubling: (A‖B, A‖−B), of length 2g.
pub fn golay_doubling(g: &GolayPair) -> GolayPair {
    GolayPair {
        a: g.a.iter().chain(&g.b).copied().collect(),
        b: g.a.iter().copied().chain(g.b.iter().map(|&x| -x)).collect(),
    }
}

/// Turyn's product of Golay pairs of lengths m and n: a Golay pair of length mn.
pub fn golay_product(x: &GolayPair, y: &GolayPair) -> GolayPair {
    let (m, n) = (x.len(), y.len());
    let p = half_sum(&y.a, &y.b, 1);
    let q = half_sum(&y.a, &y.b, -1);
    let mut e = Vec::with_capacity(m * n);
    let mut f = Vec::with_capacity(m * n);
    for i in 0..m {
        for j in 0..n {
            e.push(x.a[i] * p[j] + x.b[i] * q[j]);
            f.push(x.b[m - 1 - i] * p[j] - x.a[m - 1 - i] * q[j]);
        }
    }
    GolayPair { a: e, b: f }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::sequences::from_text;

    fn pair(a: &str, b: &str) -> GolayPair {
        GolayPair {
            a: from_text(a).unwrap(),
            b: from_text(b).unwrap(),
        }
    }

    /// A Golay pair of length 10 found by exhaustive search (first in the search order).
    fn search_golay(len: usize) -> GolayPair {
        let to_seq = |bits: u32| -> Vec<i8> {
            (0..len)
                .map(|i| if bits >> i & 1 == 1 { -1 } else { 1 })
                .collect()
        };
        for a in 0u32..1 << len {
            let sa = to_seq(a);
            for b in 0u32..1 << len {
                let g = GolayPair {
                    a: sa.clone(),
                    b: to_seq(b),
                };
                if g.is_valid() {
                    return g;
                }
            }
        }
        panic!("no Golay pair of length {len}");
    }

    #[test]
    fn golay_lengths_and_their_t_sequences() {
        let g2 = pair("++", "+-");
        let g4 = golay_doubling(&g2);
        assert!(g4.is_valid());
        let g10 = search_golay(10);
        // Golay pairs exist for lengths 2^a 10^b 26^c (Jedwab and Parker, J. Combin. Des. 17, 2009 [read]); 20 = 2·10,
        // 40 = 4·10, 80 = 8·10 through Turyn's product and doubling.
        let g20 = golay_product(&g2, &g10);
        let g40 = golay_product(&g10, &g4);
        let g80 = golay_doubling(&g40);
        let g100 = golay_product(&g10, &g10);
        for (g, len) in [
            (&g4, 4),
            (&g10, 10),
            (&g20, 20),
            (&g40, 40),
            (&g80, 80),
            (&g100, 100),
        ] {
            assert_eq!(g.len(), len);
            assert!(g.is_valid(), "length {len}");
        }
        for g in [&g2, &g4, &g10, &g20] {
            let ts = golay_to_t(g);
            let lens: Vec<usize> = ts.iter().map(|t| t.len()).collect();
            assert_eq!(lens, vec![g.len(), g.len() + 1, 2 * g.len() + 1]);
            for t in &ts {
                assert!(t.is_valid());
                assert_eq!(t_sequences(t).unwrap().order(), 4 * t.len());
            }
        }
    }

    #[test]
    fn two_golay_pairs_give_t_sequences_of_the_summed_length() {
        let g2 = pair("++", "+-");
        let g10 = search_golay(10);
        let g20 = golay_product(&g2, &g10);
        for (x, y) in [(&g10, &g2), (&g2, &g10), (&g10, &g10), (&g20, &g10)] {
            let bs = golay_pairs_to_base(x, y);
            assert!(bs.is_valid());
            let t = base_to_t(&bs);
            assert!(t.is_valid());
            assert_eq!(t.len(), x.len() + y.len());
            assert_eq!(t_sequences(&t).unwrap().order(), 4 * t.len());
        }
    }

    #[test]
    fn turyn_type_to_base_to_t() {
        // TT(n) exist for every even n ≤ 38 (Best, Đoković, Kharaghani and Ramp 2013 [read]); found here by search.
        for n in [2usize, 4, 6] {
            let tt = search_tt(n);
            let bs = turyn_to_base(&tt);
            assert!(bs.is_valid());
            assert_eq!((bs.a.len(), bs.c.len()), (2 * n - 1, n));
            let t = base_to_t(&bs);
            assert!(t.is_valid());
            assert_eq!(t.len(), 3 * n - 1);
            assert_eq!(t_sequences(&t).unwrap().order(), 4 * (3 * n - 1));
        }
    }

    /// The first TT(n) in a simple search order (a₀ = b₀ = c₀ = d₀ = +1).
    fn search_tt(n: usize) -> TurynType {
        let seq = |bits: u64, len: usize| -> Vec<i8> {
            (0..len)
                .map(|i| {
                    if i > 0 && bits >> (i - 1) & 1 == 1 {
                        -1
                    } else {
                        1
                    }
                })
                .collect()
        };
        let total = (4 * n - 4) as u32;
        for bits in 0u64..1 << total {
            let k = (n - 1) as u32;
            let mask = (1u64 << k) - 1;
            let tt = TurynType {
                a: seq(bits & mask, n),
                b: seq(bits >> k & mask, n),
                c: seq(bits >> (2 * k) & mask, n),
                d: seq(bits >> (3 * k), n - 1),
            };
            if tt.is_valid() {
                return tt;
            }
        }
        panic!("no TT({n})");
    }

    #[test]
    fn invalid_t_sequences_are_refused() {
        let t = TSequences {
            t: [vec![1, 1], vec![0, 0], vec![0, 0], vec![0, 0]],
        };
        assert!(matches!(
            t_sequences(&t),
            Err(ConstructError::Hypothesis(_))
        ));
    }
}
