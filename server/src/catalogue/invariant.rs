//! The equivalence invariant stored with each matrix: the 4-profile.
//!
//! Two Hadamard matrices are *equivalent* when one becomes the other by permuting rows and
//! columns and negating rows and columns. For four distinct rows i < j < k < l, the number
//! |Σ_c h_ic·h_jc·h_kc·h_lc| is unchanged by negating any row (it flips the sign of the sum)
//! or any column (each of the four factors in that column flips, an even number), and
//! permuting rows or columns only permutes the quadruples and the terms of each sum. So the
//! multiset of these values over all C(n,4) quadruples, the *4-profile*, is the same for
//! equivalent matrices (Cooper, Milas and Wallis, "Hadamard equivalence", 1978 [recalled]).
//! Different profiles prove two matrices inequivalent; equal profiles prove nothing.
//!
//! The counting is core's ([`hadamard_core::derive::invariant::profile4`]). Cost: C(n,4)·⌈n/64⌉ word operations, about 1.1·10⁷ at n = 128 (tens of milliseconds) and
//! 7·10⁸ at n = 256 (about a second). We compute it for n ≤ [`PROFILE_MAX_ORDER`] only; above
//! that no invariant is stored and uploads say that equivalence was not examined.
//!
//! The profile is stored as canonical JSON text, `{"<value>": count, ...}` with values in
//! ascending numeric order, so equal profiles are equal strings and can be matched by index.

use hadamard_core::Matrix;

/// The kind name stored beside the value.
pub const PROFILE_KIND: &str = "profile4";

/// The largest order whose 4-profile is computed.
pub const PROFILE_MAX_ORDER: usize = 128;

/// The 4-profile of `m` as canonical JSON text, or `None` above [`PROFILE_MAX_ORDER`].
pub fn profile4(m: &Matrix) -> Option<String> {
    let n = m.rows();
    if n > PROFILE_MAX_ORDER || m.cols() != n {
        return None;
    }
    let counts = hadamard_core::derive::invariant::profile4(m);
    let body: Vec<String> = counts.iter().map(|(v, c)| format!("\"{v}\":{c}")).collect();
    Some(format!("{{{}}}", body.join(",")))
}

#[cfg(test)]
mod tests {
    use super::*;
    use hadamard_core::construct::{paley_one, sylvester};

    fn total(profile: &str) -> u64 {
        let v: serde_json::Value = serde_json::from_str(profile).expect("profile is JSON");
        v.as_object()
            .expect("an object")
            .values()
            .map(|c| c.as_u64().expect("a count"))
            .sum()
    }

    #[test]
    fn counts_every_quadruple_and_is_unchanged_by_equivalence() {
        let h = sylvester(4).expect("H16").into_matrix();
        let p = profile4(&h).expect("small order");
        assert_eq!(total(&p), 16 * 15 * 14 * 13 / 24);
        // Negate a row and a column, swap two rows: an equivalent matrix, the same profile.
        let mut g = h.clone();
        g.negate_row(3);
        g.negate_col(5);
        g.swap_rows(1, 7);
        assert_eq!(profile4(&g).as_deref(), Some(p.as_str()));
    }

    #[test]
    fn tells_inequivalent_matrices_apart() {
        // Sylvester's H32 and Paley's order 32 (q = 31) are inequivalent: Paley I of order
        // q + 1 > 8 is not equivalent to a Sylvester matrix; the 4-profiles differ.
        let s = sylvester(5).expect("H32").into_matrix();
        let p = paley_one(31).expect("Paley 32").into_matrix();
        assert_ne!(profile4(&s), profile4(&p));
    }

    #[test]
    fn is_not_computed_above_the_limit() {
        let h = sylvester(8).expect("H256").into_matrix();
        assert_eq!(profile4(&h), None);
    }
}
