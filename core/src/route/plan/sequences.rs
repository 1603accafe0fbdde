//! Routes through sequence data: Williamson's array, the Goethals–Seidel array, T-sequences in
//! the Goethals–Seidel array, and Cooper–Wallis; with the sources of their sequences (seed
//! leaves, Turyn's Williamson family, Golay pairs and their products, base and Turyn-type
//! sequences, and the published families we do not hold).

use super::super::step::{Construction, Family, GolayPart, SeedData, Step};
use super::super::Route;
use super::rank::route;
use super::seeds::{seed_leaf, seed_reference};
use super::{refs, Planner};
use crate::arith::{divisors, prime_power};

/// The odd orders m for which Williamson matrices are known (references.md#r7-williamson-orders). None exist
/// for 35, 47, 53, 59 (Đoković 1993; Holzmann, Kharaghani and Tayfeh-Rezaie 2008).
pub const WILLIAMSON_KNOWN: &[u64] = &[
    1, 3, 5, 7, 9, 11, 13, 15, 17, 19, 21, 23, 25, 27, 29, 31, 33, 37, 39, 41, 43, 45, 49, 51, 55,
    57, 61, 63,
];

/// The published source for Williamson matrices of odd order m, when the literature has them.
fn williamson_paper(m: u64) -> Option<&'static str> {
    match m {
        23 => Some(refs::WILLIAMSON_23),
        _ if WILLIAMSON_KNOWN.contains(&m) => Some(refs::WILLIAMSON_KNOWN),
        _ => None,
    }
}

/// The published source for Turyn-type sequences TT(n), when the literature has them.
fn turyn_paper(n: u64) -> Option<&'static str> {
    match n {
        36 => Some(refs::TT36),
        _ if n.is_multiple_of(2) && n <= 38 => Some(refs::TT_KNOWN),
        _ => None,
    }
}

/// True when g = 2^a·10^b·26^c, that is g = 2^x·5^y·13^z with x ≥ y + z.
fn is_published_golay_length(g: u64) -> bool {
    let mut rest = g;
    let mut val = |p: u64| {
        let mut k = 0;
        while rest > 0 && rest.is_multiple_of(p) {
            rest /= p;
            k += 1;
        }
        k
    };
    let (x, y, z) = (val(2), val(5), val(13));
    g > 0 && rest == 1 && x >= y + z
}

/// Every g ≤ max of the form 2^a·10^b·26^c, ascending (a few hundred even for max = 10¹²).
fn published_golay_lengths(max: u64) -> Vec<u64> {
    let mut out = Vec::new();
    let mut p10 = 1u64;
    while p10 <= max {
        let mut p26 = p10;
        while p26 <= max {
            let mut g = p26;
            while g <= max {
                out.push(g);
                g *= 2;
            }
            p26 = p26.saturating_mul(26);
        }
        p10 = p10.saturating_mul(10);
    }
    out.sort_unstable();
    out
}

impl Planner {
    /// Williamson's array 4m, the Goethals–Seidel array 4v, T-sequences 4t (each with n/4 the
    /// index), and Cooper–Wallis 4tw with t ≥ 2 a T-length and w ≥ 3 a Williamson order.
    pub(super) fn sequence_routes(&mut self, n: u64, out: &mut Vec<Route>) {
        let quarter = n / 4;
        if let Some(w) = self.williamson_source(quarter) {
            out.push(route(Step::new(
                Construction::Williamson { m: quarter },
                n,
                refs::WILLIAMSON,
                vec![w],
            )));
        }
        if let Some(gs) = self.goethals_seidel(n) {
            out.push(route(gs));
        }
        if let Some(t) = self.t_source(quarter) {
            out.push(route(Step::new(
                Construction::TSequences { t: quarter },
                n,
                refs::T_SEQUENCES,
                vec![t],
            )));
        }
        for &t in divisors(quarter)
            .iter()
            .filter(|&&t| t >= 2 && quarter / t >= 3)
        {
            let w = quarter / t;
            let (Some(ts), Some(ws)) = (self.t_source(t), self.williamson_source(w)) else {
                continue;
            };
            out.push(route(Step::new(
                Construction::CooperWallis { t, w },
                n,
                refs::COOPER_WALLIS,
                vec![ts, ws],
            )));
        }
    }

    /// The Goethals–Seidel array on the seed quadruple of length n/4, if the catalogue has one.
    pub(super) fn goethals_seidel(&self, n: u64) -> Option<Step> {
        let quarter = n / 4;
        let e = self
            .seeds
            .gs
            .get(&quarter)
            .filter(|_| n.is_multiple_of(4))?;
        let leaf = Step::new(
            seed_leaf(e, SeedData::Gs(e.data.clone())),
            quarter,
            &e.provenance,
            vec![],
        );
        Some(Step::new(
            Construction::GoethalsSeidel { v: quarter },
            n,
            refs::GOETHALS_SEIDEL,
            vec![leaf],
        ))
    }

    /// Williamson matrices of order m: from the seed catalogue, Turyn's family, or a paper.
    pub(super) fn williamson_source(&self, m: u64) -> Option<Step> {
        if let Some(e) = self.seeds.williamson.get(&m) {
            return Some(Step::new(
                seed_leaf(e, SeedData::Williamson(e.data.clone())),
                m,
                &seed_reference(&e.provenance, williamson_paper(m)),
                vec![],
            ));
        }
        let turyn =
            (m % 2 == 1 && m >= 3 && prime_power(2 * m - 1).is_some() && (2 * m - 1) % 4 == 1)
                .then(|| {
                    Step::new(
                        Construction::TurynWilliamson { q: 2 * m - 1 },
                        m,
                        refs::TURYN_WILLIAMSON,
                        vec![],
                    )
                });
        if turyn.as_ref().is_some_and(|t| t.buildable) {
            return turyn;
        }
        if let Some(reference) = williamson_paper(m) {
            return Some(Step::new(
                Construction::Published {
                    kind: Family::Williamson,
                },
                m,
                reference,
                vec![],
            ));
        }
        turyn
    }

    /// T-sequences of length t, best source first (buildable before published).
    pub(super) fn t_source(&mut self, t: u64) -> Option<Step> {
        if let Some(s) = self.tlen.get(&t) {
            return s.clone();
        }
        let mut cands: Vec<Step> = Vec::new();
        if let Some(e) = self.seeds.tseq.get(&t) {
            cands.push(Step::new(
                seed_leaf(e, SeedData::Tseq(e.data.clone())),
                t,
                &e.provenance,
                vec![],
            ));
        }
        if let Some(e) = self.seeds.base.get(&t) {
            let leaf = Step::new(
                seed_leaf(e, SeedData::Base(e.data.clone())),
                e.data.a.len() as u64,
                &e.provenance,
                vec![],
            );
            cands.push(Step::new(
                Construction::BaseToT {},
                t,
                refs::BASE_TO_T,
                vec![leaf],
            ));
        }
        if t % 3 == 2 {
            let n = (t + 1) / 3;
            let tt = if let Some(e) = self.seeds.turyn.get(&n) {
                Some(Step::new(
                    seed_leaf(e, SeedData::Turyn(e.data.clone())),
                    n,
                    &seed_reference(&e.provenance, turyn_paper(n)),
                    vec![],
                ))
            } else if n.is_multiple_of(2) && n <= 38 {
                Some(Step::new(
                    Construction::Published {
                        kind: Family::Turyn,
                    },
                    n,
                    turyn_paper(n).unwrap_or(refs::TT_KNOWN),
                    vec![],
                ))
            } else {
                None
            };
            if let Some(tt) = tt {
                let base = Step::new(
                    Construction::TurynToBase { n },
                    2 * n - 1,
                    refs::TURYN_TO_BASE,
                    vec![tt],
                );
                cands.push(Step::new(
                    Construction::BaseToT {},
                    t,
                    refs::BASE_TO_T,
                    vec![base],
                ));
            }
        }
        for (g, part) in [
            (Some(t), GolayPart::G),
            (t.checked_sub(1), GolayPart::GPlusOne),
            ((t % 2 == 1).then(|| (t - 1) / 2), GolayPart::TwiceGPlusOne),
        ] {
            let Some(g) = g.filter(|&g| g >= 1) else {
                continue;
            };
            if let Some(gs) = self.golay_source(g) {
                cands.push(Step::new(
                    Construction::GolayToT { g, part },
                    t,
                    refs::GOLAY_TO_T,
                    vec![gs],
                ));
            }
        }
        // Two Golay pairs g₁ ≥ g₂ with g₁ + g₂ = t, as base sequences BS(g₁, g₂), when nothing
        // above is buildable.
        if !cands.iter().any(|c| c.buildable) {
            for g1 in published_golay_lengths(t).into_iter().rev() {
                let g2 = t - g1;
                if g2 > g1 || !is_published_golay_length(g2) {
                    continue;
                }
                let (Some(a), Some(b)) = (self.golay_source(g1), self.golay_source(g2)) else {
                    continue;
                };
                let base = Step::new(
                    Construction::GolayPairsToBase { g1, g2 },
                    g1,
                    refs::GOLAY_PAIRS_TO_BASE,
                    vec![a, b],
                );
                let t_seq = Step::new(Construction::BaseToT {}, t, refs::BASE_TO_T, vec![base]);
                let done = t_seq.buildable;
                cands.push(t_seq);
                if done {
                    break;
                }
            }
        }
        cands.sort_by_key(|s| {
            (
                !s.buildable,
                matches!(s.construction, Construction::GolayToT { g, .. } if g != t),
            )
        });
        let best = cands.into_iter().next();
        self.tlen.insert(t, best.clone());
        best
    }

    /// A Golay pair of length g: seed, doubling, product, or published (2^a·10^b·26^c).
    pub(super) fn golay_source(&mut self, g: u64) -> Option<Step> {
        if let Some(s) = self.golay.get(&g) {
            return s.clone();
        }
        let mut found = None;
        if let Some(e) = self.seeds.golay.get(&g) {
            found = Some(Step::new(
                seed_leaf(e, SeedData::Golay(e.data.clone())),
                g,
                &e.provenance,
                vec![],
            ));
        }
        if found.is_none() && g.is_multiple_of(2) && g > 2 {
            if let Some(h) = self.golay_source(g / 2).filter(|h| h.buildable) {
                found = Some(Step::new(
                    Construction::GolayDoubling {},
                    g,
                    refs::GOLAY,
                    vec![h],
                ));
            }
        }
        if found.is_none() {
            let seeds: Vec<u64> = self
                .seeds
                .golay
                .keys()
                .copied()
                .filter(|&s| s > 2 && g.is_multiple_of(s) && g > s)
                .collect();
            for s in seeds {
                if let (Some(a), Some(b)) = (
                    self.golay_source(s),
                    self.golay_source(g / s).filter(|b| b.buildable),
                ) {
                    found = Some(Step::new(
                        Construction::GolayProduct {},
                        g,
                        refs::GOLAY_PRODUCT,
                        vec![a, b],
                    ));
                    break;
                }
            }
        }
        if found.is_none() && is_published_golay_length(g) {
            found = Some(Step::new(
                Construction::Published {
                    kind: Family::Golay,
                },
                g,
                refs::GOLAY_LENGTHS,
                vec![],
            ));
        }
        self.golay.insert(g, found.clone());
        found
    }
}
