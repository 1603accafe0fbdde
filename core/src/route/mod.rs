//! Which published constructions give a Hadamard matrix of order n, and the order's status.
//!
//! One idea: a *route* is a tree of constructions whose leaves are things we hold (Sylvester's
//! 2×2, a finite field, a seed-catalogue entry) or things a paper proves exist (Williamson
//! matrices of order 23, Turyn-type sequences TT(36)). A route is *buildable* when every leaf is
//! one we hold and every node is implemented in [`crate::construct`]; building walks the tree
//! and every matrix it returns has passed [`crate::verify`]. An order's [`Status`] follows from
//! its routes and, up to 2000, from the literature file `seed-catalogue/orders/literature.txt`
//! ([`literature`]), which is the only source allowed to call an order open.
//!
//! Planning works on divisors and factorisations, never by scanning all smaller orders, so
//! [`order_info`] answers for n up to 10¹² in milliseconds; one [`Planner`] memoises best routes
//! per order, which is what makes [`coverage`] fast.
//!
//! **Addition to the interface contract**: besides `constructible`, `known`, `open` and
//! `impossible`, a status can be `uncovered`: n > 2000 is 1, 2 or a multiple of 4, but no route
//! this program knows reaches it. No source we read lists open orders above 2000, so we do not
//! call such an order open (documented in `docs/constructions.md`).

mod advice;
mod build;
pub mod literature;
mod plan;
mod step;
#[cfg(test)]
mod tests;

pub use advice::{
    dimension_advice, smallest_constructible_at_least, smallest_known_at_least,
    smallest_search_limit, Advice, Factoring, SMALLEST_SEARCH_SPAN,
};
pub use build::{
    build, build_order, build_recipe, recipe_for, BuildError, Recipe, MAX_BUILD_ORDER,
    RECIPE_FORMAT,
};
pub use plan::{Planner, SeedIndex};
pub use step::{
    method_name, Construction, Family, GolayPart, SeedData, SeedLeaf, Step, YamadaCase,
};

use serde::{Deserialize, Serialize};

/// What is known about an order.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Status {
    /// This program can build one now.
    Constructible,
    /// The literature has one; this program cannot build it yet.
    Known,
    /// No Hadamard matrix of this order is known to anyone (only orders the literature lists).
    Open,
    /// n is not 1, 2 or a multiple of 4.
    Impossible,
    /// n > 2000, a possible order, but no route this program knows reaches it.
    Uncovered,
}

/// The name of a [`Construction`] (its `method` in a recipe): a plain enum for ranking, filters
/// and errors. The parameters live in [`Construction`].
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Method {
    /// H₂^{⊗k}: order 2^k (Sylvester 1867).
    Sylvester,
    /// Paley's first construction: q+1, q ≡ 3 mod 4 (Paley 1933).
    PaleyOne,
    /// Paley's second construction: 2(q+1), q ≡ 1 mod 4 (Paley 1933).
    PaleyTwo,
    /// H_a ⊗ H_b.
    Kronecker,
    /// C⊗H + I⊗(K·H) with C Paley's symmetric conference matrix of order q+1, q ≡ 1 mod 4.
    ConferenceProduct,
    /// The twin prime power difference set: (q+1)² (Stanton and Sprott 1958).
    TwinPrimePower,
    /// Williamson's array on Williamson matrices of order m: 4m (Williamson 1944).
    Williamson,
    /// The Goethals–Seidel array on a quadruple of order v: 4v (Goethals and Seidel 1970).
    GoethalsSeidel,
    /// T-sequences of length t in the Goethals–Seidel array: 4t (Turyn 1974).
    TSequences,
    /// T-sequences of length t with Williamson matrices of order w: 4tw (Cooper and Wallis 1972).
    CooperWallis,
    /// A skew matrix of order h doubled to a skew matrix of order 2h.
    SkewDoubling,
    /// Miyamoto's theorem: q ≡ 1 mod 4 a prime power and an order q−1 give 4q (1991), by this
    /// program's own array (`construct::miyamoto`). Yamada's first theorem is its case
    /// K = H₂ ⊗ H_{(q−1)/2}.
    Miyamoto,
    /// Yamada's second theorem (1989): q ≡ 5 mod 8 and a skew order (q+3)/2 give 4(q+2).
    /// Listed, not built.
    Yamada,
    /// The whole order is known from the literature file; no construction of ours reaches it.
    Literature,
    /// A leaf: sequence data from the embedded seed catalogue.
    Seed,
    /// A leaf: sequence data a paper proves exist, not in our seed catalogue.
    Published,
    /// A Golay pair of length g₁g₂ from pairs of lengths g₁ and g₂ (Turyn 1974).
    GolayProduct,
    /// A Golay pair of length 2g from one of length g (Golay 1961).
    GolayDoubling,
    /// T-sequences of length g, g+1 or 2g+1 from a Golay pair of length g.
    GolayToT,
    /// Base sequences BS(g₁, g₂) from Golay pairs of lengths g₁ ≥ g₂ (so T-length g₁ + g₂).
    GolayPairsToBase,
    /// T-sequences of length 2n+p from base sequences BS(n+p, n).
    BaseToT,
    /// Base sequences BS(2n−1, n) from Turyn-type sequences TT(n).
    TurynToBase,
    /// Turyn's Williamson matrices of order (q+1)/2, q ≡ 1 mod 4 (Turyn 1972).
    TurynWilliamson,
}

impl Method {
    /// True when a node of this method yields a Hadamard matrix (its `order` is a matrix
    /// order), rather than sequence data indexed by a length.
    pub fn yields_matrix(self) -> bool {
        use Method::*;
        match self {
            Sylvester | PaleyOne | PaleyTwo | Kronecker | ConferenceProduct | TwinPrimePower
            | Williamson | GoethalsSeidel | TSequences | CooperWallis | SkewDoubling | Miyamoto
            | Yamada | Literature => true,
            Seed | Published | GolayProduct | GolayDoubling | GolayToT | GolayPairsToBase
            | BaseToT | TurynToBase | TurynWilliamson => false,
        }
    }

    /// The construction's name as its papers call it, for headings ("Paley's first
    /// construction").
    pub fn title(self) -> &'static str {
        match self {
            Method::Sylvester => "Sylvester's doubling",
            Method::PaleyOne => "Paley's first construction",
            Method::PaleyTwo => "Paley's second construction",
            Method::Kronecker => "Kronecker product",
            Method::ConferenceProduct => "Conference-matrix product",
            Method::TwinPrimePower => "Twin prime power difference set",
            Method::Williamson => "Williamson's array",
            Method::GoethalsSeidel => "Goethals–Seidel array",
            Method::TSequences => "T-sequences in the Goethals–Seidel array",
            Method::CooperWallis => "Cooper–Wallis (T-sequences with Williamson matrices)",
            Method::SkewDoubling => "Skew doubling",
            Method::Miyamoto => "Miyamoto's theorem",
            Method::Yamada => "Yamada's theorems",
            Method::Literature => "Known from the literature",
            Method::Seed => "Sequence data from our seed catalogue",
            Method::Published => "Sequence data proved to exist in print",
            Method::GolayProduct => "Golay pair product",
            Method::GolayDoubling => "Golay pair doubling",
            Method::GolayToT => "T-sequences from a Golay pair",
            Method::GolayPairsToBase => "Base sequences from two Golay pairs",
            Method::BaseToT => "T-sequences from base sequences",
            Method::TurynToBase => "Base sequences from Turyn-type sequences",
            Method::TurynWilliamson => "Turyn's Williamson matrices",
        }
    }

    /// The construction in a sentence ("best by Paley's first construction").
    pub fn phrase(self) -> &'static str {
        match self {
            Method::Sylvester => "Sylvester's construction",
            Method::PaleyOne => "Paley's first construction",
            Method::PaleyTwo => "Paley's second construction",
            Method::Kronecker => "a Kronecker product",
            Method::ConferenceProduct => "a conference matrix product",
            Method::TwinPrimePower => "the twin prime power construction",
            Method::Williamson => "Williamson's array",
            Method::GoethalsSeidel => "the Goethals–Seidel array",
            Method::TSequences => "T-sequences in the Goethals–Seidel array",
            Method::CooperWallis => "the Cooper–Wallis construction",
            Method::SkewDoubling => "skew doubling",
            Method::Miyamoto => "Miyamoto's 4q theorem",
            Method::Yamada
            | Method::Literature
            | Method::Seed
            | Method::Published
            | Method::GolayProduct
            | Method::GolayDoubling
            | Method::GolayToT
            | Method::GolayPairsToBase
            | Method::BaseToT
            | Method::TurynToBase
            | Method::TurynWilliamson => "a published construction",
        }
    }
}

/// A whole route for an order, with what ranks it.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Route {
    pub method: Method,
    pub tree: Step,
    pub buildable: bool,
    /// A rough estimate of the 64-bit word operations needed to build (not verify) the matrix.
    pub cost: f64,
    /// The largest factor that is not Sylvester: what a fast transform would have to multiply
    /// densely. A Kronecker factor 2^a counts as cheap; a conference product C⊗H + I⊗KH counts
    /// its conference order c.
    pub largest_dense_factor: u64,
    /// The smaller orders, fields and sequences it uses, in words.
    pub ingredients: Vec<String>,
    /// True when the route yields a skew matrix (H + Hᵀ = 2I).
    pub skew: bool,
}

/// Everything the program says about one order.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct OrderInfo {
    pub order: u64,
    pub status: Status,
    /// Best first: buildable, then smallest dense factor, then cheapest.
    pub routes: Vec<Route>,
    /// A plain-words explanation of the status.
    pub note: String,
    /// What the literature file says about this order, with its reference.
    pub literature: Option<String>,
}

/// The status and routes of order n. Fast for n up to 10¹² and beyond.
pub fn order_info(n: u64) -> OrderInfo {
    Planner::new().order_info(n)
}

/// The status of every n ≤ max that is 1, 2 or a multiple of 4, ascending.
pub fn coverage(max: u64) -> Vec<(u64, Status)> {
    let mut p = Planner::new();
    let mut out = Vec::new();
    for n in [1, 2]
        .into_iter()
        .chain((4..=max).step_by(4))
        .filter(|&n| n <= max)
    {
        out.push((n, p.status(n)));
    }
    out
}

/// True when a Hadamard matrix of order n can exist at all.
pub fn order_possible(n: u64) -> bool {
    n == 1 || n == 2 || (n > 0 && n.is_multiple_of(4))
}
