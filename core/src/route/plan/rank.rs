//! What ranks a route: its cost, its largest dense factor, whether it is skew, and the
//! ingredients it names; and the order routes are listed in.

use super::super::step::{Construction, SeedData, SeedLeaf};
use super::super::{Method, Route, Step};
use std::collections::BTreeSet;

/// The largest factor a fast transform would have to multiply densely: 1 for Sylvester, the
/// larger factor's for a Kronecker product or skew doubling, the conference order q + 1 or the
/// child's for a conference product, and the order itself for every other construction.
fn dense_factor(s: &Step) -> u64 {
    let below = || s.children.iter().map(dense_factor).max().unwrap_or(1);
    match &s.construction {
        Construction::Sylvester { .. } => 1,
        Construction::Kronecker {} | Construction::SkewDoubling {} => below(),
        Construction::ConferenceProduct { q } => (q + 1).max(below()),
        _ => s.order,
    }
}

/// A rough count of 64-bit word operations to build (not verify) the matrix: n²/64 for the
/// bit-parallel products, 2n²/64 + n²/8 for a conference product, n² for a construction that
/// sets entries one by one; plus the matrix children's costs (sequence data costs nothing).
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

/// The fields, seed entries, published families and literature entries a route rests on, in
/// words.
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
pub(super) fn gs_first_block_skew(s: &Step) -> bool {
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
pub(super) fn route(tree: Step) -> Route {
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
pub(super) fn rank(a: &Route, b: &Route) -> std::cmp::Ordering {
    let key = |r: &Route| {
        (
            !r.buildable,
            r.largest_dense_factor,
            r.method == Method::Literature,
        )
    };
    key(a).cmp(&key(b)).then(a.cost.total_cmp(&b.cost))
}
