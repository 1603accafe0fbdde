//! The conference product: a symmetric conference matrix of order c and a Hadamard matrix of
//! order h give a Hadamard matrix of order c·h.
//!
//! Hypotheses: C symmetric with zero diagonal, ±1 elsewhere and CCᵀ = (c − 1)I (such as Paley's
//! of order q + 1, q ≡ 1 mod 4, see [`super::paley::paley_conference`]); H Hadamard of even
//! order h. Then, with K = I_(h/2) ⊗ [[0, 1], [−1, 0]],
//!
//! ```text
//! M = C ⊗ H + I_c ⊗ (K·H)
//! ```
//!
//! is Hadamard of order c·h. The identity behind it is the usual one for conference matrices
//! (compare Paley 1933 \[recalled\]). Derivation: K is skew and orthogonal (KKᵀ = I), so
//!
//! ```text
//! MMᵀ = CCᵀ ⊗ HHᵀ + C ⊗ (HHᵀKᵀ) + Cᵀ ⊗ (KHHᵀ) + I ⊗ (KHHᵀKᵀ)
//!     = (c − 1)h·I + h·C ⊗ (Kᵀ + K) + h·I = c·h·I,
//! ```
//!
//! using C = Cᵀ and Kᵀ = −K. Entry-wise, M is ±1 because exactly one of the two terms is
//! nonzero in each h × h block: C ⊗ H off the diagonal blocks, K·H on them.

use super::paley::Conference;
use super::{finish, hypothesis, ConstructError};
use crate::matrix::Matrix;
use crate::verify::Verified;

/// C ⊗ H + I ⊗ (K·H), of order c·h. Needs h even.
pub fn conference_product(c: &Conference, h: &Verified) -> Result<Verified, ConstructError> {
    let hm = h.matrix();
    let (n, hn) = (c.order(), hm.order());
    if hn % 2 != 0 {
        return hypothesis(format!("the Hadamard order {hn} must be even"));
    }
    let s = c.signs();
    let m = Matrix::from_fn(n * hn, n * hn, |r, col| {
        let (bi, x, bj, y) = (r / hn, r % hn, col / hn, col % hn);
        if bi != bj {
            s.is_negative(bi, bj) != hm.is_negative(x, y)
        } else if x % 2 == 0 {
            // (K·H) row 2t is H row 2t + 1.
            hm.is_negative(x + 1, y)
        } else {
            // (K·H) row 2t + 1 is −(H row 2t).
            !hm.is_negative(x - 1, y)
        }
    });
    finish(m)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_conference, paley_one, paley_two, sylvester};

    #[test]
    fn cases_6x4_14x12_6x20() {
        // Orders 6·4, 14·12 and 6·20: the cases the derivation was first checked on [derived].
        let c6 = paley_conference(5).unwrap();
        let c14 = paley_conference(13).unwrap();
        assert_eq!(
            conference_product(&c6, &sylvester(2).unwrap())
                .unwrap()
                .order(),
            24
        );
        assert_eq!(
            conference_product(&c14, &paley_one(11).unwrap())
                .unwrap()
                .order(),
            168
        );
        assert_eq!(
            conference_product(&c6, &paley_one(19).unwrap())
                .unwrap()
                .order(),
            120
        );
    }

    #[test]
    fn more_products_verify() {
        for (q, h) in [
            (9u64, paley_two(5).unwrap()),
            (17, sylvester(3).unwrap()),
            (25, paley_one(7).unwrap()),
        ] {
            let c = paley_conference(q).unwrap();
            let m = conference_product(&c, &h).unwrap();
            assert_eq!(m.order(), (q as usize + 1) * h.order());
        }
    }

    #[test]
    fn odd_order_is_refused() {
        let c = paley_conference(5).unwrap();
        assert!(matches!(
            conference_product(&c, &sylvester(0).unwrap()),
            Err(ConstructError::Hypothesis(_))
        ));
    }
}
