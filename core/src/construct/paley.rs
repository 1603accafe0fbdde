//! Paley's two constructions from the quadratic character of GF(q), and the symmetric
//! conference matrix behind the second.
//!
//! Reference: R. E. A. C. Paley, "On orthogonal matrices", J. Math. Phys. 12 (1933) \[recalled\].
//!
//! One idea: the Jacobsthal matrix Q, Q_xy = χ(x − y) over the q elements of GF(q), satisfies
//! QJ = JQ = 0 and QQᵀ = qI − J, and Qᵀ = χ(−1)·Q. Bordering Q with a row and a column of
//! ones turns these two identities into orthogonality.
//!
//! - **Paley I.** q ≡ 3 (mod 4), so χ(−1) = −1 and Q is skew. S = [[0, 1ᵀ], [−1, Q]] is skew
//!   with SSᵀ = qI, so H = I + S is a *skew* Hadamard matrix of order q + 1.
//! - **Paley II.** q ≡ 1 (mod 4), so Q is symmetric, and C = [[0, 1ᵀ], [1, Q]] is a symmetric
//!   conference matrix of order q + 1 (CCᵀ = qI). Then H = [[C + I, C − I], [C − I, −C − I]]
//!   is a *symmetric* Hadamard matrix of order 2(q + 1).
//!
//! Rows and columns of Q are indexed by the field elements in the order of [`crate::field`];
//! the border is row and column 0.

use super::{finish, hypothesis, ConstructError};
use crate::field::Field;
use crate::matrix::Matrix;
use crate::verify::Verified;

/// The Jacobsthal matrix of GF(q) as signs: bit (x, y) is set when χ(x − y) = −1. The diagonal,
/// where Q is 0, has its bit clear.
pub fn jacobsthal(f: &Field) -> Matrix {
    let q = f.q() as usize;
    let chi: Vec<bool> = f.chi_table().iter().map(|&c| c < 0).collect();
    Matrix::from_fn(q, q, |x, y| chi[f.sub(x as u32, y as u32) as usize])
}

fn field_for(q: u64, residue: u64) -> Result<Field, ConstructError> {
    if q % 4 != residue {
        return hypothesis(format!("q = {q} is not ≡ {residue} (mod 4)"));
    }
    match Field::new(q) {
        Some(f) => Ok(f),
        None => hypothesis(format!(
            "q = {q} is not a prime power of at most {}",
            crate::field::MAX_Q
        )),
    }
}

/// Paley I: for a prime power q ≡ 3 (mod 4), the skew Hadamard matrix H = I + S of order q + 1,
/// S = [[0, 1ᵀ], [−1, Q]].
pub fn paley_one(q: u64) -> Result<Verified, ConstructError> {
    let f = field_for(q, 3)?;
    let jac = jacobsthal(&f);
    let n = q as usize + 1;
    let h = Matrix::from_fn(n, n, |i, j| match (i, j) {
        (0, _) => false,
        (_, 0) => true,
        _ => i != j && jac.is_negative(i - 1, j - 1),
    });
    finish(h)
}

/// A symmetric conference matrix: zero diagonal, ±1 elsewhere, C = Cᵀ and CCᵀ = (c − 1)I.
///
/// Stored as a sign matrix whose diagonal bits are clear; the diagonal entries are 0. The only
/// ways to make one run the exact check, so holding a `Conference` is proof of the identity.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Conference {
    signs: Matrix,
}

impl Conference {
    /// Checks `signs` (diagonal ignored) and wraps it. Fails unless the off-diagonal signs form
    /// a symmetric conference matrix.
    pub fn from_signs(mut signs: Matrix) -> Result<Conference, ConstructError> {
        let c = signs.rows();
        if !signs.is_square() || c < 2 {
            return hypothesis("a conference matrix must be square of order at least 2");
        }
        for i in 0..c {
            signs.set_negative(i, i, false);
        }
        if signs.transpose() != signs {
            return hypothesis("the sign matrix is not symmetric");
        }
        // With +1 placeholders on the diagonal, the popcount dot of rows i ≠ j counts the true
        // zero-diagonal product plus s_ji (column i) plus s_ij (column j), i.e. plus 2·s_ij.
        for i in 0..c {
            for j in i + 1..c {
                let placeholder = if signs.is_negative(i, j) { -2 } else { 2 };
                if signs.row_dot(i, j) != placeholder {
                    return hypothesis(format!("rows {i} and {j} are not orthogonal"));
                }
            }
        }
        Ok(Conference { signs })
    }
    /// The order c.
    pub fn order(&self) -> usize {
        self.signs.rows()
    }
    /// Entry (i, j): 0 on the diagonal, ±1 elsewhere.
    pub fn get(&self, i: usize, j: usize) -> i8 {
        if i == j {
            0
        } else {
            self.signs.get(i, j)
        }
    }
    /// The off-diagonal signs (diagonal bits clear).
    pub fn signs(&self) -> &Matrix {
        &self.signs
    }
}

/// Paley's symmetric conference matrix C = [[0, 1ᵀ], [1, Q]] of order q + 1, q ≡ 1 (mod 4).
pub fn paley_conference(q: u64) -> Result<Conference, ConstructError> {
    let f = field_for(q, 1)?;
    let jac = jacobsthal(&f);
    let n = q as usize + 1;
    let signs = Matrix::from_fn(n, n, |i, j| i > 0 && j > 0 && jac.is_negative(i - 1, j - 1));
    Conference::from_signs(signs)
}

/// The symmetric Hadamard matrix [[C + I, C − I], [C − I, −C − I]] of order 2c from a
/// symmetric conference matrix C of order c (Paley 1933, his second construction).
///
/// Why: with C = Cᵀ and C² = (c − 1)I, (C ± I)² = cI ± 2C, so the block rows have squared norm
/// (cI + 2C) + (cI − 2C) = 2cI and inner product (C + I)(C − I) − (C − I)(C + I) = 0.
pub fn hadamard_from_conference(c: &Conference) -> Result<Verified, ConstructError> {
    let n = c.order();
    let s = c.signs();
    let h = Matrix::from_fn(2 * n, 2 * n, |i, j| {
        let (bi, x, bj, y) = (i / n, i % n, j / n, j % n);
        if x == y {
            // Diagonal of C + I is 1, of C − I is −1, of −C − I is −1.
            bi == 1 || bj == 1
        } else {
            s.is_negative(x, y) != (bi == 1 && bj == 1)
        }
    });
    finish(h)
}

/// Paley II: for a prime power q ≡ 1 (mod 4), the symmetric Hadamard matrix of order 2(q + 1).
pub fn paley_two(q: u64) -> Result<Verified, ConstructError> {
    hadamard_from_conference(&paley_conference(q)?)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::verify::properties;

    #[test]
    fn paley_one_orders_are_skew_hadamard() {
        // Prime powers q ≡ 3 (mod 4) up to 251 [derived: arith::prime_power and q mod 4].
        let qs = [
            3u64, 7, 11, 19, 23, 27, 31, 43, 47, 59, 67, 71, 79, 83, 103, 107, 127, 131, 139, 151,
            163, 167, 179, 191, 199, 211, 223, 227, 239, 243, 251,
        ];
        for q in qs {
            let h = paley_one(q).unwrap();
            assert_eq!(h.order() as u64, q + 1);
            // Paley 1933: the first construction is skew (H + Hᵀ = 2I).
            assert!(properties(h.matrix()).skew, "q={q}");
        }
    }

    #[test]
    fn paley_two_orders_are_symmetric_hadamard() {
        let qs = [
            5u64, 9, 13, 17, 25, 29, 37, 41, 49, 53, 61, 73, 81, 89, 97, 101, 109, 113, 121, 125,
        ];
        for q in qs {
            let h = paley_two(q).unwrap();
            assert_eq!(h.order() as u64, 2 * (q + 1));
            // Paley 1933: the second construction is symmetric.
            assert!(properties(h.matrix()).symmetric, "q={q}");
        }
    }

    #[test]
    fn wrong_residues_and_non_prime_powers_are_refused() {
        for q in [5u64, 9, 15, 21, 35] {
            assert!(
                matches!(paley_one(q), Err(ConstructError::Hypothesis(_))),
                "q={q}"
            );
        }
        for q in [3u64, 7, 21, 45, 8] {
            assert!(
                matches!(paley_two(q), Err(ConstructError::Hypothesis(_))),
                "q={q}"
            );
        }
    }

    #[test]
    fn jacobsthal_identities() {
        // QJ = 0 and QQᵀ = qI − J (Paley 1933), checked with the 0 diagonal restored.
        for q in [5u64, 7, 9, 27, 49] {
            let f = Field::new(q).unwrap();
            let jac = jacobsthal(&f);
            let n = q as usize;
            let e = |x: usize, y: usize| if x == y { 0i64 } else { jac.get(x, y) as i64 };
            for x in 0..n {
                assert_eq!((0..n).map(|y| e(x, y)).sum::<i64>(), 0);
                for y in 0..n {
                    let d: i64 = (0..n).map(|z| e(x, z) * e(y, z)).sum();
                    assert_eq!(d, if x == y { q as i64 - 1 } else { -1 });
                }
            }
        }
    }

    #[test]
    fn conference_checks_reject_a_bad_sign() {
        let c = paley_conference(13).unwrap();
        assert_eq!(c.order(), 14);
        assert_eq!(c.get(3, 3), 0);
        let mut s = c.signs().clone();
        s.flip(2, 5);
        s.flip(5, 2);
        assert!(Conference::from_signs(s).is_err());
    }

    #[test]
    fn paley_near_two_thousand() {
        // 1999 is prime and ≡ 3 (mod 4); 1009 is prime and ≡ 1 (mod 4) [derived: arith].
        assert_eq!(paley_one(1999).unwrap().order(), 2000);
        assert_eq!(paley_two(1009).unwrap().order(), 2020);
    }
}
