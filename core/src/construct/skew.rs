//! Doubling a skew Hadamard matrix.
//!
//! A Hadamard matrix H is *skew* when H + Hᵀ = 2I, i.e. H = I + S with S skew-symmetric.
//! Theorem (a standard fact, recalled rather than read; derived below and checked by the exact
//! check on every output): if H is skew Hadamard of order h, then
//!
//! ```text
//! K = [[ H,   H  ],
//!      [ −Hᵀ, Hᵀ ]]
//! ```
//!
//! is skew Hadamard of order 2h.
//!
//! Derivation. The diagonal blocks H and Hᵀ = I − S both have the form I + (skew), and the
//! off-diagonal blocks satisfy (−Hᵀ) = −(H)ᵀ, so K + Kᵀ = 2I. Row blocks: HHᵀ + HHᵀ = 2hI and
//! HᵀH + HᵀH = 2hI (HᵀH = hI for any Hadamard H), and their product is H(−H) + H·H = 0.
//! (The tempting [[H, H − 2I], …] fails: H − 2I = −Hᵀ, which commutes with H only when H is
//! symmetric.)

use super::{finish, hypothesis, ConstructError};
use crate::matrix::Matrix;
use crate::verify::{properties, Verified};

/// [[H, H], [−Hᵀ, Hᵀ]], skew Hadamard of order 2h, from a skew Hadamard H of order h.
pub fn skew_double(h: &Verified) -> Result<Verified, ConstructError> {
    let m = h.matrix();
    if !properties(m).skew {
        return hypothesis("the matrix is not skew (H + Hᵀ ≠ 2I)");
    }
    let n = m.order();
    let t = m.transpose();
    let k = Matrix::from_fn(2 * n, 2 * n, |i, j| match (i < n, j < n) {
        (true, true) => m.is_negative(i, j),
        (true, false) => m.is_negative(i, j - n),
        (false, true) => !t.is_negative(i - n, j),
        (false, false) => t.is_negative(i - n, j - n),
    });
    finish(k)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, sylvester};

    #[test]
    fn doubling_keeps_skew() {
        for q in [3u64, 7, 11, 19, 27] {
            let mut h = paley_one(q).unwrap();
            for _ in 0..3 {
                let d = skew_double(&h).unwrap();
                assert_eq!(d.order(), 2 * h.order());
                // The defining property H + Hᵀ = 2I, checked by verify::properties.
                assert!(properties(d.matrix()).skew);
                h = d;
            }
        }
    }

    #[test]
    fn order_two_skew_doubles_to_every_power_of_two() {
        let two = crate::verify::certify(Matrix::from_rows(&[[1i8, 1], [-1, 1]]).unwrap()).unwrap();
        let mut h = two;
        for _ in 0..6 {
            h = skew_double(&h).unwrap();
            assert!(properties(h.matrix()).skew);
        }
        assert_eq!(h.order(), 128);
    }

    #[test]
    fn symmetric_input_is_refused() {
        assert!(matches!(
            skew_double(&sylvester(3).unwrap()),
            Err(ConstructError::Hypothesis(_))
        ));
    }
}
