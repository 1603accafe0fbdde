//! Routes by Miyamoto's 4q theorem (with Yamada's first theorem as its case K = H₂ ⊗ H), and
//! Yamada's second theorem, which is listed and not built.

use super::super::step::{Construction, YamadaCase};
use super::super::{Route, Step};
use super::rank::route;
use super::{refs, Planner};
use crate::arith::prime_power;

impl Planner {
    /// Order n = 4q from a prime power q ≡ 1 mod 4 and any route to q − 1; and 4(q + 2) from
    /// q ≡ 5 mod 8 and a skew route to (q + 3)/2.
    pub(super) fn miyamoto_yamada(&mut self, n: u64, out: &mut Vec<Route>) {
        let q = n / 4;
        if q % 4 == 1 && prime_power(q).is_some() {
            let direct = self.best(q - 1);
            if let Some(h) = &direct {
                out.push(route(Step::new(
                    Construction::Miyamoto { q },
                    n,
                    refs::MIYAMOTO,
                    vec![h.tree.clone()],
                )));
            }
            // Yamada's first theorem: q ≡ 1 mod 8 and order (q−1)/2, doubled to K of order
            // q − 1 = 2·((q−1)/2) by a Kronecker product with H₂, then Miyamoto's 4q. Listed
            // apart only when it is not already the best route to q − 1.
            if q % 8 == 1 {
                if let (Some(two), Some(half)) = (self.best(2), self.best((q - 1) / 2)) {
                    let doubled = Step::new(
                        Construction::Kronecker {},
                        q - 1,
                        refs::KRONECKER,
                        vec![two.tree, half.tree],
                    );
                    if direct.as_ref().is_none_or(|d| d.tree != doubled) {
                        out.push(route(Step::new(
                            Construction::Miyamoto { q },
                            n,
                            refs::MIYAMOTO_YAMADA,
                            vec![doubled],
                        )));
                    }
                }
            }
        }
        if let Some(q) = q
            .checked_sub(2)
            .filter(|&q| q % 8 == 5 && prime_power(q).is_some())
        {
            if let Some(h) = self.skew_route((q + 3) / 2) {
                out.push(route(Step::new(
                    Construction::Yamada {
                        case: YamadaCase::Second,
                        q,
                    },
                    n,
                    refs::YAMADA,
                    vec![h],
                )));
            }
        }
    }
}
