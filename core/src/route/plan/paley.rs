//! Routes from finite fields: Paley's two constructions, the twin prime power difference set,
//! and the conference matrix product over Paley's symmetric conference matrix.

use super::super::step::Construction;
use super::super::{Route, Step};
use super::rank::route;
use super::{refs, Planner};
use crate::arith::prime_power;

impl Planner {
    /// Paley I (order q + 1, q ≡ 3 mod 4), Paley II (2(q + 1), q ≡ 1 mod 4) and the twin prime
    /// power construction ((q + 1)², q and q + 2 prime powers): leaves, no smaller order needed.
    pub(super) fn field_routes(&self, n: u64, out: &mut Vec<Route>) {
        if let Some(t) = self.paley_one(n) {
            out.push(route(t));
        }
        if let Some(q) = Some(n / 2 - 1).filter(|&q| n % 8 == 4 && prime_power(q).is_some()) {
            out.push(route(Step::new(
                Construction::PaleyTwo { q },
                n,
                refs::PALEY,
                vec![],
            )));
        }
        let s = isqrt(n);
        if s * s == n && s >= 4 && prime_power(s - 1).is_some() && prime_power(s + 1).is_some() {
            out.push(route(Step::new(
                Construction::TwinPrimePower { q: s - 1 },
                n,
                refs::TWIN,
                vec![],
            )));
        }
    }

    /// Paley I to order n, also the skew leaf of [`Planner::skew_route`].
    pub(super) fn paley_one(&self, n: u64) -> Option<Step> {
        (n >= 4 && n.is_multiple_of(4) && prime_power(n - 1).is_some())
            .then(|| Step::new(Construction::PaleyOne { q: n - 1 }, n, refs::PALEY, vec![]))
    }

    /// Conference products c·h: C⊗H + I⊗(K·H) with c = q + 1, q ≡ 1 mod 4 a prime power, and
    /// h a multiple of 4 reached by its own best route.
    pub(super) fn conference_products(&mut self, n: u64, divs: &[u64], out: &mut Vec<Route>) {
        for &c in divs.iter().filter(|&&c| c >= 6 && c % 4 == 2) {
            let h = n / c;
            if !h.is_multiple_of(4) || prime_power(c - 1).is_none() {
                continue;
            }
            if let Some(rh) = self.best(h) {
                out.push(route(Step::new(
                    Construction::ConferenceProduct { q: c - 1 },
                    n,
                    refs::CONFERENCE,
                    vec![rh.tree],
                )));
            }
        }
    }
}

/// ⌊√n⌋.
fn isqrt(n: u64) -> u64 {
    let mut r = (n as f64).sqrt() as u64;
    while r * r > n {
        r -= 1;
    }
    while (r + 1) * (r + 1) <= n {
        r += 1;
    }
    r
}
