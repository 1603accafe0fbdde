//! Building a route: walk the tree bottom-up, calling [`crate::construct`] at every node.
//!
//! Every matrix a node returns has passed the exact check (the constructors return
//! [`Verified`]), so a route either yields a verified matrix or an error that names the node.
//! A [`Recipe`] is a route tree written down as JSON together with the id of the matrix it
//! gave: the tree carries every parameter and, for seed leaves, the sequences themselves, so
//! replaying it needs nothing else and gives the identical matrix.

use super::{order_info, Method, Route, Status, Step};
use crate::construct::{self, ConstructError};
use crate::field::MAX_Q;
use crate::verify::Verified;
use serde::{Deserialize, Serialize};
use serde_json::Value;
use std::collections::BTreeMap;
use std::fmt;

/// The largest order [`build`] attempts: n²/8 bytes, 128 MiB at 2^15. Larger orders with a
/// buildable route are reported `known`, with a note, not `constructible`.
pub const MAX_BUILD_ORDER: u64 = 1 << 15;

/// The `format` of a recipe this version writes and reads.
pub const RECIPE_FORMAT: &str = "hadamard-recipe/1";

/// True when this program can carry out a node of this method with these parameters; the
/// single place that says which constructions are implemented.
pub(crate) fn implemented(method: Method, params: &BTreeMap<String, Value>) -> bool {
    let q_ok = || {
        params
            .get("q")
            .and_then(Value::as_u64)
            .is_some_and(|q| q <= MAX_Q)
    };
    match method {
        Method::Sylvester | Method::Kronecker | Method::Seed => true,
        Method::PaleyOne | Method::PaleyTwo => q_ok(),
        _ => false,
    }
}

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

fn param(s: &Step, key: &str) -> Result<u64, BuildError> {
    s.params.get(key).and_then(Value::as_u64).ok_or_else(|| {
        BuildError::BadRecipe(format!(
            "{:?} of order {} needs a whole-number `{key}`",
            s.method, s.order
        ))
    })
}

fn build_step(s: &Step) -> Result<Verified, BuildError> {
    if s.order > MAX_BUILD_ORDER {
        return Err(BuildError::TooLarge { order: s.order });
    }
    let constructed = |r: Result<Verified, ConstructError>| {
        r.map_err(|error| BuildError::Construct {
            method: s.method,
            order: s.order,
            error,
        })
    };
    let v = match s.method {
        Method::Sylvester => {
            let k = u32::try_from(param(s, "k")?)
                .map_err(|_| BuildError::BadRecipe("k too large".into()))?;
            constructed(construct::sylvester::sylvester(k))?
        }
        Method::PaleyOne => constructed(construct::paley::paley_one(param(s, "q")?))?,
        Method::PaleyTwo => constructed(construct::paley::paley_two(param(s, "q")?))?,
        Method::Kronecker => {
            let [a, b] = &s.children[..] else {
                return Err(BuildError::BadRecipe(format!(
                    "a Kronecker product needs two factors, found {}",
                    s.children.len()
                )));
            };
            let (a, b) = (build_step(a)?, build_step(b)?);
            constructed(construct::kronecker::kronecker(&a, &b))?
        }
        m => {
            let reason = match m {
                Method::Literature | Method::Published => {
                    "it rests on a published result whose data this program does not hold"
                        .to_string()
                }
                Method::Miyamoto | Method::Yamada => {
                    "this construction is listed from the literature and not implemented"
                        .to_string()
                }
                _ => "this construction is not implemented yet".to_string(),
            };
            return Err(BuildError::NotBuildable {
                method: m,
                order: s.order,
                reason,
            });
        }
    };
    if v.order() as u64 != s.order {
        return Err(BuildError::BadRecipe(format!(
            "{:?} gave order {} where the tree says {}",
            s.method,
            v.order(),
            s.order
        )));
    }
    Ok(v)
}
