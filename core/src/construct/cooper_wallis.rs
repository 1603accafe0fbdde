//! The Cooper–Wallis construction: T-sequences of length t and Williamson matrices of order w
//! give a Hadamard matrix of order 4tw.
//!
//! Reference: J. Cooper and J. S. Wallis, "A construction for Hadamard arrays", Bull. Austral.
//! Math. Soc. 7 (1972) \[recalled\]; the route through Baumert–Hall arrays.
//!
//! With Xᵢ = circ(Tᵢ) (t × t, entries 0, ±1, exactly one Xᵢ nonzero at each place) and
//! Williamson A, B, C, D of order w, put
//!
//! ```text
//! Y₁ =  X₁⊗A + X₂⊗B + X₃⊗C + X₄⊗D
//! Y₂ = −X₁⊗B + X₂⊗A + X₃⊗D − X₄⊗C
//! Y₃ = −X₁⊗C − X₂⊗D + X₃⊗A + X₄⊗B
//! Y₄ = −X₁⊗D + X₂⊗C − X₃⊗B + X₄⊗A
//! ```
//!
//! Each Yᵢ is ±1 and group-developed over G = Z_t × Z_w: (X⊗A) at ((i, k), (j, l)) is
//! T[j − i]·a[l − k]; so the Yᵢ commute. Write Yᵢ = Σⱼ Xⱼ ⊗ Wᵢⱼ, where (Wᵢⱼ) is the 4×4
//! array of signed blocks above. Then ΣᵢYᵢYᵢᵀ = Σⱼ,ₖ XⱼXₖᵀ ⊗ Σᵢ WᵢⱼWᵢₖᵀ, and
//! Σᵢ WᵢⱼWᵢₖᵀ = δⱼₖ(A² + B² + C² + D²) = δⱼₖ·4wI: the columns of (Wᵢⱼ) are orthogonal because
//! the blocks are symmetric and commute (for columns 1 and 2: AB − BA + CD − DC = 0). So ΣᵢYᵢYᵢᵀ = (Σⱼ XⱼXⱼᵀ) ⊗ 4wI = 4tw·I, since the periodic
//! autocorrelations of T-sequences sum to 0 off shift 0 and to t at shift 0. The Yᵢ then fill the
//! Goethals–Seidel array with R the permutation x ↦ −x of G, which satisfies YR = RYᵀ for every
//! group-developed Y, as the back-identity does for circulants.

use super::arrays::{Group, Reversal};
use super::goethals_seidel::gs_matrix;
use super::sequences::{TSequences, Williamson};
use super::{finish, hypothesis, ConstructError};
use crate::verify::Verified;

/// Signs and Williamson blocks of Y₁..Y₄, per Tᵢ: `(sign, block)` with A, B, C, D = 0..3.
const Y: [[(i8, usize); 4]; 4] = [
    [(1, 0), (1, 1), (1, 2), (1, 3)],
    [(-1, 1), (1, 0), (1, 3), (-1, 2)],
    [(-1, 2), (-1, 3), (1, 0), (1, 1)],
    [(-1, 3), (1, 2), (-1, 1), (1, 0)],
];

/// The Hadamard matrix of order 4tw from T-sequences of length t and Williamson matrices of
/// order w (both checked with `is_valid` first).
pub fn cooper_wallis(t: &TSequences, w: &Williamson) -> Result<Verified, ConstructError> {
    if !t.is_valid() {
        return hypothesis("not T-sequences");
    }
    if !w.is_valid() {
        return hypothesis("not Williamson matrices");
    }
    let (tl, wl) = (t.len(), w.m());
    let blocks = [&w.a, &w.b, &w.c, &w.d];
    let g = Group { n1: tl, n2: wl };
    let f: [Vec<i8>; 4] = Y.map(|terms| {
        (0..g.order())
            .map(|e| {
                let (u, v) = (e / wl, e % wl);
                // Exactly one Tᵢ is nonzero at u, so this is ±1.
                terms
                    .iter()
                    .zip(&t.t)
                    .map(|(&(s, b), ti)| s * ti[u] * blocks[b][v])
                    .sum()
            })
            .collect()
    });
    finish(gs_matrix(g, Reversal::Negation, &f))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::sequences::GolayPair;
    use crate::construct::t_sequences::golay_to_t;

    #[test]
    fn orders_4tw() {
        let cat = crate::seed::embedded();
        let g2 = GolayPair {
            a: vec![1, 1],
            b: vec![1, -1],
        };
        let mut ts: Vec<TSequences> = cat.t_sequences.iter().map(|e| e.data.clone()).collect();
        // T-lengths 2, 3, 5 from the Golay pair of length 2 (see construct::t_sequences).
        ts.extend(golay_to_t(&g2));
        for t in &ts {
            for e in &cat.williamson {
                let h = cooper_wallis(t, &e.data).unwrap();
                assert_eq!(h.order(), 4 * t.len() * e.data.m());
            }
        }
        // t = 3, w = 3 → 36, the case the derivation was first checked on [derived].
        let t3 = &golay_to_t(&g2)[1];
        let w3 = &cat
            .williamson
            .iter()
            .find(|e| e.data.m() == 3)
            .unwrap()
            .data;
        assert_eq!(cooper_wallis(t3, w3).unwrap().order(), 36);
    }
}
