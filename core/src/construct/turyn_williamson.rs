//! Turyn's infinite family of Williamson matrices: for a prime power q ≡ 1 (mod 4), Williamson
//! matrices of order m = (q + 1)/2.
//!
//! Reference: R. J. Turyn, "An infinite class of Williamson matrices", J. Combin. Theory A 12
//! (1972) (the statement \[read\]). The construction below is derived here from
//! that statement's idea — a symmetric conference matrix of order q + 1 made of circulant
//! blocks — and every output is checked with `Williamson::is_valid` before it is returned.
//!
//! Derivation. Work in GF(q²) with primitive element ω, and let bar be the Frobenius x ↦ x^q.
//! - The points of the projective line over GF(q) are GF(q²)*/GF(q)*. For x, y in GF(q²),
//!   β(x, y) = x̄y − xȳ is GF(q)-bilinear, alternating, and β̄ = −β, so β/δ ∈ GF(q) for
//!   δ = ω^((q+1)/2) (δ̄ = δ^q = −δ). Up to a constant factor, β/δ is the determinant of x, y
//!   as vectors over GF(q), so M_xy = χ(β(x, y)/δ) on a set of representatives is a
//!   conference matrix (a ±1 diagonal rescaling of the usual one), symmetric as χ(−1) = 1.
//! - u = ω^(q−1) has norm uū = 1 and order q + 1; U = ⟨u⟩ meets GF(q)* in {±1}, so U·GF(q)*
//!   has index 2 in GF(q²)*, with cosets U·GF(q)* and ωU·GF(q)*. Representatives: xₐ = uᵃ and
//!   yₐ = ω·u^(a+s), a ∈ Z_m (u^m = −1 and χ(−1) = 1, so the sign ambiguity is harmless).
//! - β(uˢx, uˢy) = (uū)ˢβ(x, y) = β(x, y), so the blocks are circulant:
//!   E_ab = e(b − a) with e(k) = χ(β(1, uᵏ)/δ), and the y–y block is χ(ωω̄)·E = −E because
//!   ωω̄ = ω^(q+1) generates GF(q)*. The x–y block is F_ab = f(b − a + s) with
//!   f(k) = χ(β(1, ω·uᵏ)/δ). E is symmetric (e(−k) = e(k)); applying the Frobenius gives
//!   f(−k) = f(k + 1), so F is symmetric when 2s ≡ 1 (mod m), i.e. s = (m + 1)/2 (m is odd).
//! - So W = [[E, F], [F, −E]] is a symmetric conference matrix with circulant symmetric blocks
//!   and W² = qI gives E² + F² = qI. Then A = I + E, B = −I + E, C = D = F satisfy
//!   A² + B² + C² + D² = 2E² + 2I + 2F² = 2(q + 1)I = 4mI.
//!
//! χ over GF(q) is read off GF(q²) logarithms: z ∈ GF(q)* is ω^((q+1)t), a square in GF(q)
//! exactly when t is even, i.e. when log_ω z ≡ 0 (mod 2(q + 1)). Needs q² ≤ [`MAX_Q`].

use super::sequences::Williamson;
use super::{hypothesis, ConstructError};
use crate::field::{Field, MAX_Q};

/// Turyn's Williamson matrices of order (q + 1)/2, for a prime power q ≡ 1 (mod 4) with
/// q² ≤ 2²⁰.
pub fn turyn_williamson(q: u64) -> Result<Williamson, ConstructError> {
    if q % 4 != 1 {
        return hypothesis(format!("q = {q} is not ≡ 1 (mod 4)"));
    }
    if q.checked_mul(q).is_none_or(|qq| qq > MAX_Q) {
        return hypothesis(format!(
            "q² = {} exceeds the field limit {MAX_Q}",
            q as u128 * q as u128
        ));
    }
    let Some(f) = Field::new(q * q) else {
        return hypothesis(format!("q = {q} is not a prime power"));
    };
    let n = q * q - 1;
    let m = (q as usize).div_ceil(2); // (q + 1)/2, q odd
    let log_delta = q.div_ceil(2); // δ = ω^((q+1)/2)
                                   // χ_q(β(1, ω^L)/δ) with β(1, y) = y − ȳ = ω^L − ω^(qL).
    let chi_beta = |l: u64| -> i8 {
        let beta = f.sub(f.exp(l), f.exp(q * l % n));
        if beta == 0 {
            return 0;
        }
        let z = (f.log(beta) as u64 + n - log_delta) % n;
        if !z.is_multiple_of(q + 1) {
            // β/δ not in GF(q) would contradict the derivation; the check below would fail.
            return 0;
        }
        if z.is_multiple_of(2 * (q + 1)) {
            1
        } else {
            -1
        }
    };
    let s = m.div_ceil(2); // (m + 1)/2, m odd
    let lu = q - 1; // u = ω^(q−1)
    let e: Vec<i8> = (0..m).map(|k| chi_beta(lu * k as u64 % n)).collect();
    let fr: Vec<i8> = (0..m)
        .map(|k| chi_beta((1 + lu * ((k + s) % m) as u64) % n))
        .collect();
    let a: Vec<i8> = e
        .iter()
        .enumerate()
        .map(|(k, &x)| if k == 0 { 1 } else { x })
        .collect();
    let b: Vec<i8> = e
        .iter()
        .enumerate()
        .map(|(k, &x)| if k == 0 { -1 } else { x })
        .collect();
    let w = Williamson {
        a,
        b,
        c: fr.clone(),
        d: fr,
    };
    if !w.is_valid() {
        return hypothesis(format!(
            "the construction did not give Williamson matrices for q = {q}"
        ));
    }
    Ok(w)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::williamson_array;

    #[test]
    fn turyn_family_is_williamson() {
        // Prime powers q ≡ 1 (mod 4) [derived: arith]; Turyn 1972 gives order (q + 1)/2.
        for q in [
            5u64, 9, 13, 17, 25, 29, 37, 41, 49, 53, 61, 73, 81, 89, 97, 101, 109, 113, 121, 125,
            169, 241, 625, 1021,
        ] {
            let w = turyn_williamson(q).unwrap();
            assert_eq!(2 * w.m() as u64, q + 1);
            if q < 130 {
                assert_eq!(williamson_array(&w).unwrap().order() as u64, 2 * (q + 1));
            }
        }
    }

    #[test]
    fn refused_outside_the_hypotheses() {
        for q in [3u64, 7, 15, 21, 1025] {
            assert!(turyn_williamson(q).is_err(), "q={q}");
        }
    }
}
