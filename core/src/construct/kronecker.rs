//! The Kronecker product of two Hadamard matrices.
//!
//! Theorem (Sylvester 1867, in the form [[H, H], [H, −H]] = H₂ ⊗ H; general form standard): if
//! A and B are Hadamard of orders a and b, then (A ⊗ B)(A ⊗ B)ᵀ = AAᵀ ⊗ BBᵀ = ab·I, so A ⊗ B is
//! Hadamard of order ab.

use super::{finish, ConstructError};
use crate::matrix::Matrix;
use crate::verify::Verified;

/// A ⊗ B, of order a·b: entry (i·b + k, j·b + l) is a_ij · b_kl.
pub fn kronecker(a: &Verified, b: &Verified) -> Result<Verified, ConstructError> {
    finish(Matrix::kronecker(a.matrix(), b.matrix()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, sylvester};

    #[test]
    fn products_verify() {
        let h2 = sylvester(1).unwrap();
        let h12 = paley_one(11).unwrap();
        let p = kronecker(&h2, &h12).unwrap();
        assert_eq!(p.order(), 24);
        let p = kronecker(&h12, &h12).unwrap();
        assert_eq!(p.order(), 144);
        // Sylvester's recursion: H₂ ⊗ H₂ᵏ = H₂ᵏ⁺¹ [Sylvester 1867].
        assert_eq!(
            kronecker(&h2, &sylvester(4).unwrap()).unwrap(),
            sylvester(5).unwrap()
        );
    }
}
