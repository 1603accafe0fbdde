//! The Goethals–Seidel array.
//!
//! Theorem (J. M. Goethals and J. J. Seidel, "A skew Hadamard matrix of order 36", J. Austral.
//! Math. Soc. 11, 1970 \[title recalled\]): if A₀, A₁, A₂, A₃ are circulant ±1 matrices of order v with
//! Σ AᵢAᵢᵀ = 4vI — equivalently, their first rows have periodic autocorrelations summing to 0
//! off shift 0 — and R is the back-identity, then
//!
//! ```text
//! [[ A₀,    A₁R,   A₂R,   A₃R ],
//!  [−A₁R,   A₀,   −RA₃,   RA₂ ],
//!  [−A₂R,   RA₃,   A₀,   −RA₁ ],
//!  [−A₃R,  −RA₂,   RA₁,   A₀  ]]
//! ```
//!
//! is Hadamard of order 4v. Unlike Williamson's array, the blocks need not be symmetric: R
//! turns a circulant into a symmetric back-circulant (AR = RAᵀ), which is what makes the
//! off-diagonal products cancel.

use super::arrays::{four_by_four, Cell, Group, Reversal};
use super::sequences::GsQuadruple;
use super::{finish, hypothesis, ConstructError};
use crate::matrix::Matrix;
use crate::verify::Verified;

const fn c(negative: bool, block: usize, r_left: bool, r_right: bool) -> Cell {
    Cell {
        negative,
        block,
        r_left,
        r_right,
    }
}

/// The Goethals–Seidel layout, with R written as r_left / r_right.
pub(crate) const LAYOUT: [[Cell; 4]; 4] = [
    [
        c(false, 0, false, false),
        c(false, 1, false, true),
        c(false, 2, false, true),
        c(false, 3, false, true),
    ],
    [
        c(true, 1, false, true),
        c(false, 0, false, false),
        c(true, 3, true, false),
        c(false, 2, true, false),
    ],
    [
        c(true, 2, false, true),
        c(false, 3, true, false),
        c(false, 0, false, false),
        c(true, 1, true, false),
    ],
    [
        c(true, 3, false, true),
        c(true, 2, true, false),
        c(false, 1, true, false),
        c(false, 0, false, false),
    ],
];

/// The array over any abelian group Z_n₁ × Z_n₂ with R the negation x ↦ −x (for Cooper–Wallis),
/// or the cyclic group with R the back-identity.
pub(crate) fn gs_matrix(g: Group, rev: Reversal, f: &[Vec<i8>; 4]) -> Matrix {
    four_by_four(g, rev, f, &LAYOUT)
}

/// The Goethals–Seidel array of order 4v from a quadruple (checked with `is_valid` first).
pub fn goethals_seidel(g: &GsQuadruple) -> Result<Verified, ConstructError> {
    if !g.is_valid() {
        return hypothesis(
            "not a Goethals–Seidel quadruple: periodic autocorrelations must sum to 0 off shift 0",
        );
    }
    finish(gs_matrix(
        Group::cyclic(g.v()),
        Reversal::BackIdentity,
        &g.a,
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn williamson_quadruples_are_gs_quadruples() {
        // Williamson's rows have PAFs summing to 0, so they also feed this array.
        for e in &crate::seed::embedded().williamson {
            let w = &e.data;
            let g = GsQuadruple {
                a: [w.a.clone(), w.b.clone(), w.c.clone(), w.d.clone()],
            };
            assert_eq!(goethals_seidel(&g).unwrap().order(), 4 * w.m());
        }
    }

    #[test]
    fn every_normalised_quadruple_of_length_5_builds() {
        // Exhaustive: all quadruples of length 5 with first entries +1 that pass is_valid; some
        // have non-symmetric rows, which Williamson's array could not use.
        let mut found = 0;
        let mut non_symmetric = 0;
        for bits in 0u32..1 << 16 {
            let row = |k: u32| -> Vec<i8> {
                let mut r = vec![1i8];
                r.extend((0..4).map(|b| if bits >> (4 * k + b) & 1 == 1 { -1 } else { 1 }));
                r
            };
            let g = GsQuadruple {
                a: [row(0), row(1), row(2), row(3)],
            };
            if !g.is_valid() {
                continue;
            }
            found += 1;
            if g.a
                .iter()
                .any(|r| !crate::construct::sequences::is_symmetric_row(r))
            {
                non_symmetric += 1;
            }
            if found % 97 == 1 {
                assert_eq!(goethals_seidel(&g).unwrap().order(), 20);
            }
        }
        assert!(found > 0 && non_symmetric > 0);
        for e in &crate::seed::embedded().goethals_seidel {
            assert_eq!(goethals_seidel(&e.data).unwrap().order(), 4 * e.data.v());
        }
    }
}
