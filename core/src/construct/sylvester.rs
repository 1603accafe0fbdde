//! Sylvester's matrices: the Kronecker powers of H₂ = [[1, 1], [1, −1]].
//!
//! Theorem (J. J. Sylvester, "Thoughts on inverse orthogonal matrices…", Phil. Mag. 34, 1867
//! \[recalled\]): if H
//! is Hadamard of order n then [[H, H], [H, −H]] is Hadamard of order 2n. Starting from (1) this
//! gives order 2ᵏ for every k ≥ 0, and the matrix is symmetric.
//!
//! One idea: the (i, j) entry of H₂^⊗k is (−1)^popcount(i & j), so each 64-column word of a row
//! is a fixed pattern for the low six bits of i, complemented when the high bits of i and of
//! the word index have odd common parity.

use super::{finish, hypothesis, ConstructError};
use crate::matrix::{tail_mask, words_for, Matrix};
use crate::verify::Verified;

/// The largest k accepted: order 2¹⁶ = 65536 (512 MiB of bits).
pub const MAX_K: u32 = 16;

/// Sylvester's matrix of order 2ᵏ, entry (i, j) = (−1)^popcount(i & j). Symmetric.
pub fn sylvester(k: u32) -> Result<Verified, ConstructError> {
    if k > MAX_K {
        return hypothesis(format!("k = {k} exceeds the supported maximum {MAX_K}"));
    }
    finish(sylvester_matrix(k))
}

/// The matrix itself, unchecked (for callers inside the crate that certify later).
pub(crate) fn sylvester_matrix(k: u32) -> Matrix {
    let n = 1usize << k;
    let w = words_for(n);
    // low[r] has bit b set when popcount(r & b) is odd, for r, b < 64.
    let low: Vec<u64> = (0..64u64)
        .map(|r| {
            (0..64u64)
                .filter(|b| (r & b).count_ones() % 2 == 1)
                .fold(0, |acc, b| acc | 1 << b)
        })
        .collect();
    let mask = tail_mask(n);
    let mut bits = Vec::with_capacity(n * w);
    for i in 0..n {
        let base = low[i % 64];
        let hi = i / 64;
        for wi in 0..w {
            let word = if (hi & wi).count_ones() % 2 == 1 {
                !base
            } else {
                base
            };
            bits.push(if wi + 1 == w { word & mask } else { word });
        }
    }
    // The length is n·w by construction.
    Matrix::from_words(n, n, bits).unwrap_or_else(|| Matrix::ones_square(n))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::verify::properties;

    #[test]
    fn orders_one_to_1024_verify_and_are_symmetric() {
        for k in 0..=10 {
            let h = sylvester(k).unwrap();
            assert_eq!(h.order(), 1 << k);
            assert!(properties(h.matrix()).symmetric);
        }
    }

    #[test]
    fn entries_follow_the_popcount_rule() {
        // Sylvester's recursion [[H, H], [H, −H]] (Sylvester 1867) gives (−1)^popcount(i&j).
        let h = sylvester(7).unwrap();
        let m = h.matrix();
        for i in 0..128 {
            for j in 0..128 {
                assert_eq!(m.is_negative(i, j), (i & j).count_ones() % 2 == 1);
            }
        }
        // H₂ itself: [[1, 1], [1, −1]] (Sylvester 1867 [recalled]).
        assert_eq!(
            sylvester(1).unwrap().matrix().to_i8_rows(),
            vec![vec![1, 1], vec![1, -1]]
        );
    }

    #[test]
    fn too_large_is_a_hypothesis_error() {
        assert!(matches!(
            sylvester(MAX_K + 1),
            Err(ConstructError::Hypothesis(_))
        ));
    }
}
