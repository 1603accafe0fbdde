//! The twin prime power construction: q and q + 2 both odd prime powers give a Hadamard matrix
//! of order (q + 1)².
//!
//! Reference: R. G. Stanton and D. A. Sprott, "A family of difference sets", Canad. J. Math. 10
//! (1958) 73–77 \[recalled\]. The difference set and the bordering are derived here and the
//! result goes through the exact check.
//!
//! Let G = GF(q) × GF(q + 2), of order v = q(q + 2), with χ and χ' the quadratic characters.
//! The set
//!
//! ```text
//! D = {(x, y) : x ≠ 0, y ≠ 0, χ(x)·χ'(y) = 1}  ∪  {(x, 0) : x ∈ GF(q)}
//! ```
//!
//! has k = (q − 1)(q + 1)/2 + q = (v − 1)/2 elements and is a (v, k, λ) difference set with
//! λ = (v − 3)/4. Its incidence matrix N (N_gh = 1 when h − g ∈ D) has NNᵀ = (k − λ)I + λJ and
//! row sums k. Writing v = 4n − 1, so k = 2n − 1 and λ = n − 1, the ±1 matrix B = 2N − J has
//! BBᵀ = 4(k − λ)I + (v − 4k + 4λ)J = (v + 1)I − J and row sums 2k − v = −1. Hence
//!
//! ```text
//! H = [[1, 1ᵀ],
//!      [1, B ]]
//! ```
//!
//! is Hadamard of order v + 1 = (q + 1)²: the border row meets row g in 1 + (−1) = 0, and rows
//! g ≠ h of B meet in −1, made 0 by the border column. Elements (x, y) are indexed
//! x·(q + 2) + y with field indices as in [`crate::field`].

use super::{finish, hypothesis, ConstructError};
use crate::field::Field;
use crate::matrix::Matrix;
use crate::verify::Verified;

/// The bordered Stanton–Sprott difference set, of order (q + 1)², for odd prime powers q and
/// q + 2.
pub fn twin_prime_power(q: u64) -> Result<Verified, ConstructError> {
    if q.is_multiple_of(2) {
        return hypothesis(format!("q = {q} must be odd"));
    }
    let (Some(f1), Some(f2)) = (Field::new(q), Field::new(q + 2)) else {
        return hypothesis(format!(
            "q = {q} and q + 2 = {} must both be prime powers",
            q + 2
        ));
    };
    let (a, b) = (q as usize, q as usize + 2);
    let v = a * b;
    let (c1, c2) = (f1.chi_table(), f2.chi_table());
    let in_d = |x: u32, y: u32| y == 0 || c1[x as usize] * c2[y as usize] == 1;
    let h = Matrix::from_fn(v + 1, v + 1, |i, j| {
        if i == 0 || j == 0 {
            return false;
        }
        let (g, h) = (i - 1, j - 1);
        let dx = f1.sub((h / b) as u32, (g / b) as u32);
        let dy = f2.sub((h % b) as u32, (g % b) as u32);
        // B = 2N − J: +1 on the difference set, −1 off it.
        !in_d(dx, dy)
    });
    finish(h)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn twin_prime_orders() {
        // (3, 5), (5, 7), (11, 13), (17, 19) are twin primes; (25, 27) and (7, 9) twin prime powers
        // [derived: arith::prime_power].
        for (q, order) in [
            (3u64, 16usize),
            (5, 36),
            (11, 144),
            (17, 324),
            (25, 676),
            (7, 64),
        ] {
            assert_eq!(twin_prime_power(q).unwrap().order(), order);
        }
    }

    #[test]
    fn non_twins_are_refused() {
        for q in [2u64, 13, 19, 21, 31] {
            assert!(
                matches!(twin_prime_power(q), Err(ConstructError::Hypothesis(_))),
                "q={q}"
            );
        }
    }
}
