//! The planner: every route this program knows for an order, memoised per order.

use super::literature::{self, Verdict};
use super::step::{Construction, Family, GolayPart, SeedData, SeedLeaf, YamadaCase};
use super::{order_possible, Method, OrderInfo, Route, Status, Step, MAX_BUILD_ORDER};
use crate::arith::{divisors, prime_power};
use crate::construct::sequences::{
    BaseSequences, GolayPair, GsQuadruple, TSequences, TurynType, Williamson,
};
use crate::seed::{self, Entry};
use std::collections::{BTreeMap, BTreeSet, HashMap};

/// References, one place each.
pub(crate) mod refs {
    pub const SYLVESTER: &str = "Sylvester, Phil. Mag. 34 (1867)";
    pub const PALEY: &str = "Paley, J. Math. Phys. 12 (1933)";
    pub const KRONECKER: &str =
        "Sylvester, Phil. Mag. 34 (1867): the tensor product of Hadamard matrices";
    pub const CONFERENCE: &str = "conference matrix product C⊗H + I⊗(K·H), K = I⊗[[0,1],[−1,0]], over Paley's symmetric conference matrix (Paley, J. Math. Phys. 12, 1933) [derived; see references.md#r5-the-conference-matrix-product]";
    pub const TWIN: &str = "Stanton and Sprott, Canad. J. Math. 10 (1958) [recalled]";
    pub const WILLIAMSON: &str = "Williamson, Duke Math. J. 11 (1944)";
    pub const GOETHALS_SEIDEL: &str = "Goethals and Seidel, J. Austral. Math. Soc. 11 (1970)";
    pub const T_SEQUENCES: &str =
        "Turyn, J. Combin. Theory A 16 (1974) [recalled]: T-sequences in the Goethals–Seidel array";
    pub const COOPER_WALLIS: &str = "Cooper and Wallis, Bull. Austral. Math. Soc. 7 (1972) [recalled]: T-sequences with Williamson matrices";
    pub const SKEW_DOUBLING: &str = "a skew matrix of order h doubles to a skew matrix of order 2h (standard [recalled]; the block form is derived and verified in construct::skew)";
    pub const MIYAMOTO: &str = "Miyamoto, J. Combin. Theory A 57 (1991) 86–108: order 4q from a prime power q ≡ 1 mod 4 and any order q − 1 (the array is this program's own, construct::miyamoto)";
    pub const MIYAMOTO_YAMADA: &str = "Yamada's first theorem (Yamada, J. Austral. Math. Soc. A 46 (1989)) as the case K = H₂ ⊗ H_{(q−1)/2} of Miyamoto, J. Combin. Theory A 57 (1991) 86–108 (the array is this program's own, construct::miyamoto)";
    pub const YAMADA: &str = "Yamada, J. Austral. Math. Soc. A 46 (1989)";
    pub const GOLAY: &str = "Golay, IRE Trans. Inform. Theory 7 (1961) [recalled]";
    pub const GOLAY_PRODUCT: &str =
        "Turyn, J. Combin. Theory A 16 (1974); Jedwab and Parker, J. Combin. Des. 17 (2009)";
    pub const GOLAY_LENGTHS: &str = "Golay pairs of every length 2^a·10^b·26^c: Turyn, J. Combin. Theory A 16 (1974); Jedwab and Parker, J. Combin. Des. 17 (2009)";
    pub const GOLAY_TO_T: &str = "T-sequences of lengths g, g+1 and 2g+1 from a Golay pair of length g (Turyn, J. Combin. Theory A 16, 1974 [recalled])";
    pub const BASE_TO_T: &str = "T-sequences of length 2n+p from base sequences BS(n+p, n) (Turyn, J. Combin. Theory A 16, 1974 [recalled])";
    pub const GOLAY_PAIRS_TO_BASE: &str = "Golay pairs of lengths g₁ ≥ g₂ are base sequences BS(g₁, g₂), so T-sequences of length g₁ + g₂ [references.md#r6-base-sequences-and-t-sequences; checked in construct::t_sequences]";
    pub const TURYN_TO_BASE: &str = "BS(2n−1, n) = (C;D, C;−D, A, B) from TT(n): Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21 (2013)";
    pub const TT_KNOWN: &str = "Turyn-type sequences TT(n) exist for every even n ≤ 38: Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21 (2013)";
    pub const TT36: &str = "TT(36): Kharaghani and Tayfeh-Rezaie, J. Combin. Des. 13 (2005)";
    pub const TURYN_WILLIAMSON: &str = "Turyn, J. Combin. Theory A 12 (1972)";
    pub const WILLIAMSON_KNOWN: &str = "Williamson matrices of this order are known: Holzmann, Kharaghani and Tayfeh-Rezaie, Des. Codes Cryptogr. 46 (2008), and the works it cites";
    pub const WILLIAMSON_23: &str = "Baumert, Golomb and Hall, Bull. Amer. Math. Soc. 68 (1962)";
}

/// The odd orders m for which Williamson matrices are known (references.md#r7-williamson-orders). None exist
/// for 35, 47, 53, 59 (Đoković 1993; Holzmann, Kharaghani and Tayfeh-Rezaie 2008).
pub const WILLIAMSON_KNOWN: &[u64] = &[
    1, 3, 5, 7, 9, 11, 13, 15, 17, 19, 21, 23, 25, 27, 29, 31, 33, 37, 39, 41, 43, 45, 49, 51, 55,
    57, 61, 63,
];

/// How many routes of one method an [`OrderInfo`] lists (the best ones).
const PER_METHOD: usize = 3;

/// The seed catalogue indexed by the parameter each entry yields.
#[derive(Debug, Default)]
pub struct SeedIndex {
    williamson: BTreeMap<u64, &'static Entry<Williamson>>,
    gs: BTreeMap<u64, &'static Entry<GsQuadruple>>,
    tseq: BTreeMap<u64, &'static Entry<TSequences>>,
    /// Keyed by the T-length 2n+p they give.
    base: BTreeMap<u64, &'static Entry<BaseSequences>>,
    /// Keyed by n.
    turyn: BTreeMap<u64, &'static Entry<TurynType>>,
    golay: BTreeMap<u64, &'static Entry<GolayPair>>,
}

impl SeedIndex {
    /// Indexes [`seed::embedded`], keeping the first entry for each parameter.
    pub fn embedded() -> SeedIndex {
        let cat = seed::embedded();
        let mut ix = SeedIndex::default();
        for e in &cat.williamson {
            ix.williamson.entry(e.data.m() as u64).or_insert(e);
        }
        for e in &cat.goethals_seidel {
            ix.gs.entry(e.data.v() as u64).or_insert(e);
        }
        for e in &cat.t_sequences {
            ix.tseq.entry(e.data.len() as u64).or_insert(e);
        }
        for e in &cat.base {
            ix.base
                .entry((e.data.a.len() + e.data.c.len()) as u64)
                .or_insert(e);
        }
        for e in &cat.turyn_type {
            ix.turyn.entry(e.data.n() as u64).or_insert(e);
        }
        for e in &cat.golay {
            ix.golay.entry(e.data.len() as u64).or_insert(e);
        }
        ix
    }
}

/// A seed leaf for a catalogue entry.
fn seed_leaf(e: &Entry<impl Sized>, data: SeedData) -> Construction {
    Construction::Seed(SeedLeaf {
        source: e.source.clone(),
        provenance: e.provenance.clone(),
        data,
    })
}

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

/// A seed leaf's reference: where our data came from, and, when a paper first found data of
/// this kind, that paper too (our search found its own, but the order's history is the paper's).
fn seed_reference(provenance: &str, paper: Option<&str>) -> String {
    match paper {
        Some(p) => format!("{provenance}; first published: {p}"),
        None => provenance.to_string(),
    }
}

fn dense_factor(s: &Step) -> u64 {
    let below = || s.children.iter().map(dense_factor).max().unwrap_or(1);
    match &s.construction {
        Construction::Sylvester { .. } => 1,
        Construction::Kronecker {} | Construction::SkewDoubling {} => below(),
        Construction::ConferenceProduct { q } => (q + 1).max(below()),
        _ => s.order,
    }
}

fn cost(s: &Step) -> f64 {
    let below: f64 = s
        .children
        .iter()
        .filter(|c| c.construction.yields_matrix())
        .map(cost)
        .sum();
    let n = s.order as f64;
    let own = match &s.construction {
        Construction::Sylvester { .. }
        | Construction::Kronecker {}
        | Construction::SkewDoubling {} => n * n / 64.0,
        Construction::ConferenceProduct { .. } => 2.0 * n * n / 64.0 + n * n / 8.0,
        c if c.yields_matrix() => n * n,
        _ => 0.0,
    };
    own + below
}

fn ingredients(s: &Step, out: &mut BTreeSet<String>) {
    match &s.construction {
        Construction::Sylvester { .. } => {
            out.insert(format!("Sylvester's H({})", s.order));
        }
        Construction::PaleyOne { q }
        | Construction::PaleyTwo { q }
        | Construction::ConferenceProduct { q }
        | Construction::Miyamoto { q }
        | Construction::Yamada { q, .. }
        | Construction::TurynWilliamson { q } => {
            out.insert(format!("the field GF({q})"));
        }
        Construction::TwinPrimePower { q } => {
            out.insert(format!("the fields GF({q}) and GF({})", q + 2));
        }
        Construction::Seed(leaf) => {
            let kind = leaf.data.family();
            out.insert(format!(
                "{} of {} {} (seed catalogue {})",
                kind.words(),
                kind.index_name(),
                s.order,
                leaf.source
            ));
        }
        Construction::Published { kind } => {
            out.insert(format!(
                "{} of {} {} (published: {})",
                kind.words(),
                kind.index_name(),
                s.order,
                s.reference
            ));
        }
        Construction::Literature { .. } => {
            out.insert(format!(
                "a Hadamard matrix of order {} (literature: {})",
                s.order, s.reference
            ));
        }
        _ => {}
    }
    for c in &s.children {
        ingredients(c, out);
    }
}

fn is_skew(s: &Step) -> bool {
    matches!(
        s.construction,
        Construction::PaleyOne { .. } | Construction::SkewDoubling {}
    ) || gs_first_block_skew(s)
}

/// True for a Goethals–Seidel step whose first sequence is skew-type (a₀ = +1, a₋ₓ = −aₓ):
/// its matrix is then skew-Hadamard, the case Goethals and Seidel built their array for.
fn gs_first_block_skew(s: &Step) -> bool {
    matches!(s.construction, Construction::GoethalsSeidel { .. })
        && s.children.first().is_some_and(|c| match &c.construction {
            Construction::Seed(SeedLeaf {
                data: SeedData::Gs(g),
                ..
            }) => crate::construct::sequences::is_skew_type(&g.a[0]),
            _ => false,
        })
}

/// Turns a matrix-yielding tree into a ranked route.
pub(crate) fn route(tree: Step) -> Route {
    let mut ing = BTreeSet::new();
    ingredients(&tree, &mut ing);
    Route {
        method: tree.method(),
        buildable: tree.buildable,
        cost: cost(&tree),
        largest_dense_factor: dense_factor(&tree),
        ingredients: ing.into_iter().collect(),
        skew: is_skew(&tree),
        tree,
    }
}

/// The ranking: buildable first, then the smallest dense factor, then specific constructions
/// before the generic literature entry, then the cheapest.
fn rank(a: &Route, b: &Route) -> std::cmp::Ordering {
    let key = |r: &Route| {
        (
            !r.buildable,
            r.largest_dense_factor,
            r.method == Method::Literature,
        )
    };
    key(a).cmp(&key(b)).then(a.cost.total_cmp(&b.cost))
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
        if n < 4 {
            return out;
        }
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
        let divs = divisors(n);
        // Kronecker products a·b, a ≤ b, both possible orders, not both powers of two.
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
        // Conference products c·h, c = q+1 with q ≡ 1 mod 4, h a multiple of 4.
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
        // Cooper–Wallis 4tw with t ≥ 2 a T-length and w ≥ 3 a Williamson order.
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

    fn paley_one(&self, n: u64) -> Option<Step> {
        (n >= 4 && n.is_multiple_of(4) && prime_power(n - 1).is_some())
            .then(|| Step::new(Construction::PaleyOne { q: n - 1 }, n, refs::PALEY, vec![]))
    }

    /// The Goethals–Seidel array on the seed quadruple of length n/4, if the catalogue has one.
    fn goethals_seidel(&self, n: u64) -> Option<Step> {
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

    /// A skew route to order h: Paley I, or skew doubling of a skew route to h/2.
    fn skew_route(&mut self, h: u64) -> Option<Step> {
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

    fn miyamoto_yamada(&mut self, n: u64, out: &mut Vec<Route>) {
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

    /// Williamson matrices of order m: from the seed catalogue, Turyn's family, or a paper.
    fn williamson_source(&self, m: u64) -> Option<Step> {
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
    pub(crate) fn t_source(&mut self, t: u64) -> Option<Step> {
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
    fn golay_source(&mut self, g: u64) -> Option<Step> {
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

fn uses_only(s: &Step, only: &[Method]) -> bool {
    (s.method() == Method::Literature || only.contains(&s.method()))
        && s.children.iter().all(|c| uses_only(c, only))
}

/// ⌊√n⌋.
pub(crate) fn isqrt(n: u64) -> u64 {
    let mut r = (n as f64).sqrt() as u64;
    while r * r > n {
        r -= 1;
    }
    while (r + 1) * (r + 1) <= n {
        r += 1;
    }
    r
}
