//! The published constructions, one module each.
//!
//! One idea: a construction is a theorem, "from these ingredients, this array is Hadamard", and
//! the code states the hypotheses, builds the array, and then lets [`crate::verify::certify`]
//! decide. Every public builder returns `Result<Verified, ConstructError>`: a hypothesis that
//! fails is reported before any work, and a built matrix that fails the exact check (a bug, or
//! bad input data that slipped past its own check) comes back as the check's report rather
//! than as a matrix. Nothing here returns an unchecked `Matrix` that claims to be Hadamard.
//!
//! The array constructions share one crate-private builder (`arrays`): a 4×4 array of group-developed
//! blocks, some multiplied by a reversal R on either side, written straight into bits.

pub mod conference;
pub mod cooper_wallis;
pub mod goethals_seidel;
pub mod kronecker;
pub mod miyamoto;
pub mod paley;
pub mod sequences;
pub mod skew;
pub mod sylvester;
pub mod t_sequences;
pub mod turyn_williamson;
pub mod twin_prime;
pub mod williamson;

pub(crate) mod arrays;

use crate::matrix::Matrix;
use crate::verify::{certify, Report, Verified};
use std::fmt;

/// Why a construction gave no matrix.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum ConstructError {
    /// The input does not meet the theorem's hypotheses; the text says which one.
    Hypothesis(String),
    /// The array was built but the exact check rejected it; the report says where.
    NotVerified(Box<Report>),
}

impl fmt::Display for ConstructError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ConstructError::Hypothesis(why) => write!(f, "hypothesis not met: {why}"),
            ConstructError::NotVerified(r) => write!(
                f,
                "built a matrix of order {} that is not Hadamard ({} failing row pairs)",
                r.order, r.failing_pairs_total
            ),
        }
    }
}

impl std::error::Error for ConstructError {}

/// Shorthand for a hypothesis failure.
pub(crate) fn hypothesis<T>(why: impl Into<String>) -> Result<T, ConstructError> {
    Err(ConstructError::Hypothesis(why.into()))
}

/// Runs the exact check on a built matrix.
pub(crate) fn finish(m: Matrix) -> Result<Verified, ConstructError> {
    certify(m).map_err(ConstructError::NotVerified)
}

pub use conference::conference_product;
pub use cooper_wallis::cooper_wallis;
pub use goethals_seidel::goethals_seidel;
pub use kronecker::kronecker;
pub use miyamoto::miyamoto;
pub use paley::{
    hadamard_from_conference, jacobsthal, paley_conference, paley_one, paley_two, Conference,
};
pub use skew::skew_double;
pub use sylvester::sylvester;
pub use t_sequences::{
    base_to_t, golay_doubling, golay_pairs_to_base, golay_product, golay_to_t, t_sequences,
    turyn_to_base,
};
pub use turyn_williamson::turyn_williamson;
pub use twin_prime::twin_prime_power;
pub use williamson::{quaternion_array, williamson_array, Block};
