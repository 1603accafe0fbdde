//! The planner: every route this program knows to an order, and the best one.
//!
//! **What a plan is.** A route to order n is a tree of [`Step`]s. The root yields a Hadamard
//! matrix of order n; each child is an ingredient its construction needs: a smaller Hadamard
//! matrix (a Kronecker factor, the H of a conference product, the K of Miyamoto's 4q), or
//! sequence data (Williamson matrices, a Goethals–Seidel quadruple, T-sequences, Golay pairs,
//! base or Turyn-type sequences). Leaves need nothing: Sylvester's H₂^{⊗k}, a finite field
//! (Paley I and II, the twin prime powers), a seed-catalogue entry carrying its sequences, a
//! family a paper proves exists (`published`, not buildable), or the literature table's word
//! that the order is known (`literature`, not buildable). A step is *buildable* when its
//! construction is implemented (`Construction::implemented`) and all its children are
//! buildable; `route/build.rs` then walks the tree and every node's matrix is verified.
//!
//! **How ingredients are chosen.** [`Planner::routes`] asks every family in turn, each in its
//! own file, always in the same order (which also breaks ties in the ranking):
//! - [`products`]: Sylvester when n = 2^k; Kronecker products a·b over the divisors of n; and,
//!   after the sequence routes, skew doubling of a skew route to n/2;
//! - [`paley`]: Paley I (n − 1 a prime power ≡ 3 mod 4), Paley II (n/2 − 1 ≡ 1 mod 4), the twin
//!   prime powers (n = (q+1)², q and q+2 prime powers), and conference products c·h
//!   (c = q+1, q ≡ 1 mod 4);
//! - [`sequences`]: Williamson's array, the Goethals–Seidel array, T-sequences and
//!   Cooper–Wallis 4tw, with the sources of their sequences: a seed leaf first, then a
//!   construction of our own (Turyn's Williamson family, Golay doubling and products, Golay
//!   pairs to T-sequences, base sequences from Turyn-type ones or from two Golay pairs), then a
//!   published family we do not hold ([`seeds`] indexes the embedded catalogue);
//! - [`miyamoto`]: Miyamoto's 4q (Yamada's first theorem as its case K = H₂ ⊗ H), and Yamada's
//!   second theorem, listed only;
//! - last, the literature table's entry for n, when it lists n as known.
//!
//! Only divisors and factorisations of n are looked at, never all smaller orders, which is why
//! an order near 10¹² is answered in milliseconds.
//!
//! **Costs and ranking** ([`rank`]). Each route has a `largest_dense_factor` (the largest
//! factor that is not Sylvester: what a fast transform would multiply densely; a conference
//! product counts its conference order), a rough `cost` in 64-bit word operations to build it,
//! and `skew` (H + Hᵀ = 2I). Routes are ranked buildable first, then by the smallest dense
//! factor, then specific constructions before the literature entry, then cheapest.
//! [`Planner::order_info`] keeps the best [`PER_METHOD`] routes of each method.
//!
//! **Recursion and memoisation.** A smaller Hadamard ingredient is the *best* route to that
//! order ([`Planner::best`]), memoised per order, and so are the skew routes, the T-sequence
//! sources per length and the Golay pairs per length. One planner answers many orders fast
//! (that is what makes `coverage` cheap); each child order divides n or is smaller than n, so
//! the recursion ends.
//!
//! **Limits.** An order is `constructible` only when its best route is buildable and n ≤
//! [`MAX_BUILD_ORDER`]; above it a buildable route makes the order `known`. Finite fields are
//! limited to `field::MAX_Q` (`Construction::implemented`). Up to 2000 the literature table
//! (`seed-catalogue/orders/literature.txt`) is the only source that calls an order `open`;
//! above 2000 an order no route reaches is `uncovered`, never `open`.
//!
//! A new construction is offered by a method of [`Planner`] in the file of its family, called
//! from [`Planner::routes`]; ARCHITECTURE.md lists the other places it needs.

mod miyamoto;
mod paley;
mod products;
mod rank;
pub(crate) mod refs;
mod seeds;
mod sequences;

pub use seeds::SeedIndex;

use super::literature::{self, Verdict};
use super::step::Construction;
use super::{order_possible, Method, OrderInfo, Route, Status, Step, MAX_BUILD_ORDER};
use crate::arith::divisors;
use rank::{rank, route};
use std::collections::HashMap;

/// How many routes of one method an [`OrderInfo`] lists (the best ones).
const PER_METHOD: usize = 3;

/// The planner: memoised best routes per order. Reuse one for many questions.
pub struct Planner {
    seeds: SeedIndex,
    best: HashMap<u64, Option<Route>>,
    skew: HashMap<u64, Option<Step>>,
    golay: HashMap<u64, Option<Step>>,
    tlen: HashMap<u64, Option<Step>>,
    lit: &'static literature::Literature,
    /// When set, only routes whose nodes all use these methods (and the literature entry).
    only: Option<Vec<Method>>,
}

impl Default for Planner {
    fn default() -> Self {
        Self::new()
    }
}

impl Planner {
    /// A planner over the embedded seed catalogue and literature file.
    pub fn new() -> Planner {
        Planner::with_seeds(SeedIndex::embedded())
    }

    /// A planner over a given seed index.
    pub fn with_seeds(seeds: SeedIndex) -> Planner {
        Planner {
            seeds,
            best: HashMap::new(),
            skew: HashMap::new(),
            golay: HashMap::new(),
            tlen: HashMap::new(),
            lit: literature::embedded(),
            only: None,
        }
    }

    /// A planner that uses only the given methods (the literature entry is always kept), for
    /// measuring what a subset of the constructions covers.
    pub fn only(methods: &[Method]) -> Planner {
        Planner {
            only: Some(methods.to_vec()),
            ..Planner::new()
        }
    }

    /// The best route to order n, if any.
    pub fn best(&mut self, n: u64) -> Option<Route> {
        if let Some(r) = self.best.get(&n) {
            return r.clone();
        }
        let r = self.routes(n).into_iter().next();
        self.best.insert(n, r.clone());
        r
    }

    /// The status of order n.
    pub fn status(&mut self, n: u64) -> Status {
        if !order_possible(n) {
            return Status::Impossible;
        }
        let best = self.best(n);
        match (&best, self.lit.verdict(n)) {
            (Some(r), _) if r.buildable && n <= MAX_BUILD_ORDER => Status::Constructible,
            (_, Verdict::Open(_)) => Status::Open,
            (Some(_), _) => Status::Known,
            (None, Verdict::Known(..)) => Status::Known,
            (None, Verdict::Silent) => Status::Uncovered,
        }
    }

    /// Everything about order n.
    pub fn order_info(&mut self, n: u64) -> OrderInfo {
        let status = self.status(n);
        let mut routes = if order_possible(n) {
            self.routes(n)
        } else {
            Vec::new()
        };
        if status == Status::Constructible {
            routes.retain(|r| r.method != Method::Literature);
        }
        let mut per: HashMap<Method, usize> = HashMap::new();
        routes.retain(|r| {
            let k = per.entry(r.method).or_default();
            *k += 1;
            *k <= PER_METHOD
        });
        let literature = match self.lit.verdict(n) {
            Verdict::Open(e) => Some(format!("open: {} ({})", e.note, e.reference)),
            Verdict::Known(Some(e), _) => Some(format!("known: {} ({})", e.note, e.reference)),
            Verdict::Known(None, r) => Some(format!("known: {} ({})", r.note, r.reference)),
            Verdict::Silent => None,
        };
        let note = self.note(n, status, routes.first());
        OrderInfo {
            order: n,
            status,
            routes,
            note,
            literature,
        }
    }

    fn note(&mut self, n: u64, status: Status, best: Option<&Route>) -> String {
        match status {
            Status::Impossible => {
                let below = (1..n).rev().find(|&m| order_possible(m));
                let above = n.checked_add(1).map(|s| s + (4 - s % 4) % 4);
                let near = match (below, above) {
                    (Some(b), Some(a)) => format!("the nearest possible orders are {b} and {a}"),
                    (None, Some(a)) => format!("the smallest possible order above it is {a}"),
                    (Some(b), None) => format!("the nearest possible order is {b}"),
                    (None, None) => String::new(),
                };
                format!(
                    "No Hadamard matrix of order {n} can exist: the order must be 1, 2 or a multiple of 4 (normalise the matrix and count where its first three rows agree); {near}."
                )
            }
            Status::Constructible => format!(
                "This program builds order {n} now, best by {} (largest dense factor {}).",
                best.map_or(Method::Sylvester, |r| r.method).phrase(),
                best.map_or(1, |r| r.largest_dense_factor)
            ),
            Status::Known if best.is_some_and(|r| r.buildable) => format!(
                "Order {n} has a route this program could carry out, but it is above the build limit of {MAX_BUILD_ORDER} (a dense matrix of order n takes n²/8 bytes); it is known."
            ),
            Status::Known => format!(
                "A Hadamard matrix of order {n} is known in the literature, but this program cannot build one yet; the routes below say how and where it was found."
            ),
            Status::Open => format!(
                "No Hadamard matrix of order {n} is known to anyone: it is one of the open orders up to 2000 in the literature ({}).",
                self.lit.open_orders().iter().map(u64::to_string).collect::<Vec<_>>().join(", ")
            ),
            Status::Uncovered => format!(
                "Order {n} is not covered by any route this program knows. That does not make it open: no source we read lists the open orders above {}.",
                self.lit.horizon()
            ),
        }
    }

    /// Every route for n, ranked best first.
    pub fn routes(&mut self, n: u64) -> Vec<Route> {
        let mut out = Vec::new();
        if !order_possible(n) {
            return out;
        }
        self.sylvester(n, &mut out);
        if n < 4 {
            return out;
        }
        self.field_routes(n, &mut out);
        let divs = divisors(n);
        self.kronecker_products(n, &divs, &mut out);
        self.conference_products(n, &divs, &mut out);
        self.sequence_routes(n, &mut out);
        self.skew_doubling(n, &mut out);
        self.miyamoto_yamada(n, &mut out);
        if let Verdict::Known(entry, rule) = self.lit.verdict(n) {
            let (note, reference) = match entry {
                Some(e) => (&e.note, &e.reference),
                None => (&rule.note, &rule.reference),
            };
            out.push(route(Step::new(
                Construction::Literature { note: note.clone() },
                n,
                reference,
                vec![],
            )));
        }
        if let Some(only) = &self.only {
            out.retain(|r| uses_only(&r.tree, only));
        }
        out.sort_by(rank);
        out
    }
}

fn uses_only(s: &Step, only: &[Method]) -> bool {
    (s.method() == Method::Literature || only.contains(&s.method()))
        && s.children.iter().all(|c| uses_only(c, only))
}
