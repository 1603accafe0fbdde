//! Building a route: walk the tree bottom-up, calling [`crate::construct`] at every node.
//!
//! Every matrix a node returns has passed the exact check (the constructors return
//! [`Verified`]), so a route either yields a verified matrix or an error that names the node.
//! A [`Recipe`] is a route tree written down as JSON together with the id of the matrix it
//! gave: the tree carries every parameter and, for seed leaves, the sequences themselves, so
//! replaying it needs nothing else and gives the identical matrix.

use super::step::{Construction, GolayPart, SeedData};
use super::{order_info, Method, Route, Status, Step};
use crate::construct::sequences::{
    BaseSequences, GolayPair, GsQuadruple, TSequences, TurynType, Williamson,
};
use crate::construct::{self, ConstructError};
use crate::verify::Verified;
use serde::{Deserialize, Serialize};
use std::fmt;

/// The largest order [`build`] attempts: n²/8 bytes, 128 MiB at 2^15. Larger orders with a
/// buildable route are reported `known`, with a note, not `constructible`.
pub const MAX_BUILD_ORDER: u64 = 1 << 15;

/// The `format` of a recipe this version writes and reads.
pub const RECIPE_FORMAT: &str = "hadamard-recipe/1";

/// Why a route gave no matrix.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum BuildError {
    /// A node this program cannot carry out (yet): the method, its order, and why.
    NotBuildable {
        method: Method,
        order: u64,
        reason: String,
    },
    /// A constructor refused its input or its result failed the exact check.
    Construct {
        method: Method,
        order: u64,
        error: ConstructError,
    },
    /// The order has no buildable route; the status and the note say what is known.
    NoRoute {
        order: u64,
        status: Status,
        note: String,
    },
    /// The order is above [`MAX_BUILD_ORDER`].
    TooLarge { order: u64 },
    /// A recipe that is malformed or whose parts do not fit together.
    BadRecipe(String),
    /// The replayed matrix is not the one the recipe names.
    IdMismatch { expected: String, got: String },
}

impl fmt::Display for BuildError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            BuildError::NotBuildable {
                method,
                order,
                reason,
            } => write!(f, "cannot build {method:?} of order {order}: {reason}"),
            BuildError::Construct {
                method,
                order,
                error,
            } => write!(f, "{method:?} of order {order} failed: {error}"),
            BuildError::NoRoute { order, note, .. } => {
                write!(f, "no implemented route for order {order}: {note}")
            }
            BuildError::TooLarge { order } => write!(
                f,
                "order {order} is above the build limit {MAX_BUILD_ORDER}"
            ),
            BuildError::BadRecipe(why) => write!(f, "bad recipe: {why}"),
            BuildError::IdMismatch { expected, got } => {
                write!(f, "recipe names matrix {expected} but replay gave {got}")
            }
        }
    }
}

impl std::error::Error for BuildError {}

/// A route written down for replay.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Recipe {
    /// Always [`RECIPE_FORMAT`].
    pub format: String,
    pub order: u64,
    /// The id of the matrix the recipe gives, when known; [`build_recipe`] checks it.
    pub id: Option<String>,
    pub tree: Step,
}

/// The recipe for a route, without an id (build it and set `id` to pin the matrix).
pub fn recipe_for(route: &Route) -> Recipe {
    Recipe {
        format: RECIPE_FORMAT.to_string(),
        order: route.tree.order,
        id: None,
        tree: route.tree.clone(),
    }
}

/// Replays a recipe; when it names an id, the matrix must have that id.
pub fn build_recipe(r: &Recipe) -> Result<Verified, BuildError> {
    if r.format != RECIPE_FORMAT {
        return Err(BuildError::BadRecipe(format!(
            "unknown format `{}`, expected `{RECIPE_FORMAT}`",
            r.format
        )));
    }
    if r.tree.order != r.order {
        return Err(BuildError::BadRecipe(format!(
            "the recipe is for order {} but its tree gives {}",
            r.order, r.tree.order
        )));
    }
    let v = build_step(&r.tree)?;
    match &r.id {
        Some(id) if id != v.id() => Err(BuildError::IdMismatch {
            expected: id.clone(),
            got: v.id().to_string(),
        }),
        _ => Ok(v),
    }
}

/// Builds a route's matrix.
pub fn build(route: &Route) -> Result<Verified, BuildError> {
    build_step(&route.tree)
}

/// Builds order n by its best buildable route.
pub fn build_order(n: u64) -> Result<Verified, BuildError> {
    if n > MAX_BUILD_ORDER {
        return Err(BuildError::TooLarge { order: n });
    }
    let info = order_info(n);
    match info.routes.iter().find(|r| r.buildable) {
        Some(r) => build(r),
        None => Err(BuildError::NoRoute {
            order: n,
            status: info.status,
            note: info.note,
        }),
    }
}

fn bad(s: &Step, why: impl fmt::Display) -> BuildError {
    BuildError::BadRecipe(format!("{:?} of order {}: {why}", s.method(), s.order))
}

/// What a node yields: a verified matrix, or one of the sequence families.
enum Built {
    Matrix(Verified),
    Williamson(Williamson),
    TSeq(TSequences),
    Golay(GolayPair),
    Base(BaseSequences),
    Turyn(TurynType),
    Gs(GsQuadruple),
}

impl Built {
    /// The index the tree records in `order` for this node (see [`Step`]).
    fn index(&self) -> usize {
        match self {
            Built::Matrix(v) => v.order(),
            Built::Williamson(w) => w.m(),
            Built::TSeq(t) => t.len(),
            Built::Golay(g) => g.len(),
            Built::Base(b) => b.a.len(),
            Built::Turyn(t) => t.n(),
            Built::Gs(g) => g.v(),
        }
    }

    fn what(&self) -> &'static str {
        match self {
            Built::Matrix(_) => "a Hadamard matrix",
            Built::Williamson(_) => "Williamson matrices",
            Built::TSeq(_) => "T-sequences",
            Built::Golay(_) => "a Golay pair",
            Built::Base(_) => "base sequences",
            Built::Turyn(_) => "Turyn-type sequences",
            Built::Gs(_) => "a Goethals–Seidel quadruple",
        }
    }
}

fn build_step(s: &Step) -> Result<Verified, BuildError> {
    match build_node(s)? {
        Built::Matrix(v) => Ok(v),
        other => Err(bad(
            s,
            format!("the route yields {}, not a matrix", other.what()),
        )),
    }
}

/// The node's children, exactly `N` of them.
fn children<const N: usize>(s: &Step) -> Result<[Built; N], BuildError> {
    if s.children.len() != N {
        return Err(bad(
            s,
            format!("needs {N} ingredient(s), found {}", s.children.len()),
        ));
    }
    let built = s
        .children
        .iter()
        .map(build_node)
        .collect::<Result<Vec<_>, _>>()?;
    Ok(built
        .try_into()
        .unwrap_or_else(|_| unreachable!("length checked above")))
}

/// A seed leaf: the sequences it carries, checked against their defining identity.
fn seed_leaf(s: &Step, data: &SeedData) -> Result<Built, BuildError> {
    let (b, valid) = match data {
        SeedData::Williamson(w) => (Built::Williamson(w.clone()), w.is_valid()),
        SeedData::Gs(g) => (Built::Gs(g.clone()), g.is_valid()),
        SeedData::Tseq(t) => (Built::TSeq(t.clone()), t.is_valid()),
        SeedData::Base(x) => (Built::Base(x.clone()), x.is_valid()),
        SeedData::Turyn(x) => (Built::Turyn(x.clone()), x.is_valid()),
        SeedData::Golay(g) => (Built::Golay(g.clone()), g.is_valid()),
    };
    if !valid {
        return Err(BuildError::Construct {
            method: s.method(),
            order: s.order,
            error: ConstructError::Hypothesis(format!(
                "the seed's {} fail their defining identity",
                b.what()
            )),
        });
    }
    Ok(b)
}

fn build_node(s: &Step) -> Result<Built, BuildError> {
    if s.order > MAX_BUILD_ORDER {
        return Err(BuildError::TooLarge { order: s.order });
    }
    let constructed = |r: Result<Verified, ConstructError>| {
        r.map(Built::Matrix).map_err(|error| BuildError::Construct {
            method: s.method(),
            order: s.order,
            error,
        })
    };
    let wrong = |b: &Built| bad(s, format!("cannot use {} here", b.what()));
    let built = match &s.construction {
        Construction::Sylvester { k } => constructed(construct::sylvester::sylvester(*k))?,
        Construction::PaleyOne { q } => constructed(construct::paley::paley_one(*q))?,
        Construction::PaleyTwo { q } => constructed(construct::paley::paley_two(*q))?,
        Construction::TwinPrimePower { q } => {
            constructed(construct::twin_prime::twin_prime_power(*q))?
        }
        Construction::Kronecker {} => match children::<2>(s)? {
            [Built::Matrix(a), Built::Matrix(b)] => {
                constructed(construct::kronecker::kronecker(&a, &b))?
            }
            [x, y] => {
                return Err(wrong(if matches!(x, Built::Matrix(_)) {
                    &y
                } else {
                    &x
                }))
            }
        },
        Construction::ConferenceProduct { q } => match children::<1>(s)? {
            [Built::Matrix(h)] => constructed(
                construct::paley::paley_conference(*q)
                    .and_then(|c| construct::conference::conference_product(&c, &h)),
            )?,
            [x] => return Err(wrong(&x)),
        },
        Construction::Miyamoto { q } => match children::<1>(s)? {
            [Built::Matrix(k)] => constructed(construct::miyamoto::miyamoto(*q, &k))?,
            [x] => return Err(wrong(&x)),
        },
        Construction::SkewDoubling {} => match children::<1>(s)? {
            [Built::Matrix(h)] => constructed(construct::skew::skew_double(&h))?,
            [x] => return Err(wrong(&x)),
        },
        Construction::Williamson { .. } => match children::<1>(s)? {
            [Built::Williamson(w)] => constructed(construct::williamson::williamson_array(&w))?,
            [x] => return Err(wrong(&x)),
        },
        Construction::GoethalsSeidel { .. } => match children::<1>(s)? {
            [Built::Gs(g)] => constructed(construct::goethals_seidel::goethals_seidel(&g))?,
            [x] => return Err(wrong(&x)),
        },
        Construction::TSequences { .. } => match children::<1>(s)? {
            [Built::TSeq(t)] => constructed(construct::t_sequences::t_sequences(&t))?,
            [x] => return Err(wrong(&x)),
        },
        Construction::CooperWallis { .. } => match children::<2>(s)? {
            [Built::TSeq(t), Built::Williamson(w)] => {
                constructed(construct::cooper_wallis::cooper_wallis(&t, &w))?
            }
            [x, y] => {
                return Err(wrong(if matches!(x, Built::TSeq(_)) { &y } else { &x }));
            }
        },
        Construction::Seed(leaf) => seed_leaf(s, &leaf.data)?,
        Construction::TurynWilliamson { q } => {
            Built::Williamson(construct::turyn_williamson::turyn_williamson(*q).map_err(
                |error| BuildError::Construct {
                    method: s.method(),
                    order: s.order,
                    error,
                },
            )?)
        }
        Construction::GolayDoubling {} => match children::<1>(s)? {
            [Built::Golay(g)] => Built::Golay(construct::t_sequences::golay_doubling(&g)),
            [x] => return Err(wrong(&x)),
        },
        Construction::GolayProduct {} => match children::<2>(s)? {
            [Built::Golay(a), Built::Golay(b)] => {
                Built::Golay(construct::t_sequences::golay_product(&a, &b))
            }
            [x, y] => return Err(wrong(if matches!(x, Built::Golay(_)) { &y } else { &x })),
        },
        Construction::GolayToT { part, .. } => match children::<1>(s)? {
            [Built::Golay(g)] => {
                let k = match part {
                    GolayPart::G => 0,
                    GolayPart::GPlusOne => 1,
                    GolayPart::TwiceGPlusOne => 2,
                };
                let mut ts = construct::t_sequences::golay_to_t(&g);
                Built::TSeq(ts.swap_remove(k))
            }
            [x] => return Err(wrong(&x)),
        },
        Construction::GolayPairsToBase { .. } => match children::<2>(s)? {
            [Built::Golay(a), Built::Golay(b)] => {
                Built::Base(construct::t_sequences::golay_pairs_to_base(&a, &b))
            }
            [x, y] => return Err(wrong(if matches!(x, Built::Golay(_)) { &y } else { &x })),
        },
        Construction::BaseToT {} => match children::<1>(s)? {
            [Built::Base(b)] => Built::TSeq(construct::t_sequences::base_to_t(&b)),
            [x] => return Err(wrong(&x)),
        },
        Construction::TurynToBase { .. } => match children::<1>(s)? {
            [Built::Turyn(t)] => Built::Base(construct::t_sequences::turyn_to_base(&t)),
            [x] => return Err(wrong(&x)),
        },
        Construction::Literature { .. }
        | Construction::Published { .. }
        | Construction::Yamada { .. } => {
            let reason = match s.construction {
                Construction::Yamada { .. } => {
                    "this construction is listed from the literature and not implemented"
                }
                _ => "it rests on a published result whose data this program does not hold",
            };
            return Err(BuildError::NotBuildable {
                method: s.method(),
                order: s.order,
                reason: reason.to_string(),
            });
        }
    };
    if built.index() as u64 != s.order {
        return Err(bad(
            s,
            format!(
                "gave {} of index {} where the tree says {}",
                built.what(),
                built.index(),
                s.order
            ),
        ));
    }
    Ok(built)
}
