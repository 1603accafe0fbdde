//! Routes that combine smaller Hadamard matrices: Sylvester's powers of H₂, Kronecker
//! products, and skew doubling.

use super::super::step::Construction;
use super::super::{order_possible, Route, Step};
use super::rank::{gs_first_block_skew, route};
use super::{refs, Planner};

impl Planner {
    /// H₂^{⊗k} when n = 2^k.
    pub(super) fn sylvester(&self, n: u64, out: &mut Vec<Route>) {
        if n.is_power_of_two() {
            out.push(route(Step::new(
                Construction::Sylvester {
                    k: n.trailing_zeros(),
                },
                n,
                refs::SYLVESTER,
                vec![],
            )));
        }
    }

    /// Kronecker products a·b, a ≤ b, both possible orders, not both powers of two, each
    /// factor by its own best route.
    pub(super) fn kronecker_products(&mut self, n: u64, divs: &[u64], out: &mut Vec<Route>) {
        for &a in divs.iter().filter(|&&a| a >= 2 && a <= n / a) {
            let b = n / a;
            if !(order_possible(a) && order_possible(b))
                || (a.is_power_of_two() && b.is_power_of_two())
            {
                continue;
            }
            if let (Some(ra), Some(rb)) = (self.best(a), self.best(b)) {
                out.push(route(Step::new(
                    Construction::Kronecker {},
                    n,
                    refs::KRONECKER,
                    vec![ra.tree, rb.tree],
                )));
            }
        }
    }

    /// A skew matrix of order n/2 doubled.
    pub(super) fn skew_doubling(&mut self, n: u64, out: &mut Vec<Route>) {
        if n.is_multiple_of(8) {
            if let Some(h) = self.skew_route(n / 2) {
                out.push(route(Step::new(
                    Construction::SkewDoubling {},
                    n,
                    refs::SKEW_DOUBLING,
                    vec![h],
                )));
            }
        }
    }

    /// A skew route to order h: Paley I, or skew doubling of a skew route to h/2.
    pub(super) fn skew_route(&mut self, h: u64) -> Option<Step> {
        if let Some(s) = self.skew.get(&h) {
            return s.clone();
        }
        let gs = self.goethals_seidel(h).filter(gs_first_block_skew);
        let s = self.paley_one(h).or(gs).or_else(|| {
            (h.is_multiple_of(8))
                .then(|| self.skew_route(h / 2))
                .flatten()
                .map(|c| {
                    Step::new(
                        Construction::SkewDoubling {},
                        h,
                        refs::SKEW_DOUBLING,
                        vec![c],
                    )
                })
        });
        self.skew.insert(h, s.clone());
        s
    }
}
