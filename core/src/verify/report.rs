//! What a verdict says: the report, the properties, and the proof [`Verified`].

use super::pass::PairTally;
use super::{is_hadamard, verify, Kernel};
use crate::id::matrix_id;
use crate::matrix::Matrix;
use serde::{Deserialize, Serialize};

/// How many failing pairs a report lists at most. The total count is always exact.
pub const DEFAULT_PAIR_CAP: usize = 64;

/// The name and version of the exact check, recorded with every verification.
pub const CHECK_NAME: &str = "exact-gram-popcount";
/// Bump when the check's meaning changes (never for speed-only changes).
pub const CHECK_VERSION: u32 = 1;

/// Two rows that are not orthogonal, and their inner product.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct FailingPair {
    /// The first row, 0-based (i < j).
    pub i: usize,
    /// The second row, 0-based.
    pub j: usize,
    /// Their inner product over the integers (0 would have been orthogonal).
    pub dot: i64,
}

/// The properties users filter by. All are exact.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Properties {
    /// The first row and the first column are all +1.
    pub normalized: bool,
    /// H = Hᵀ.
    pub symmetric: bool,
    /// H + Hᵀ = 2I: the diagonal is +1 and h_ij = −h_ji off it.
    pub skew: bool,
    /// Every row sum and every column sum is the same number.
    pub regular: bool,
    /// The excess: the sum of all entries.
    pub excess: i64,
}

/// Why a well-formed ±1 matrix is not Hadamard.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Failure {
    /// Rows ≠ columns.
    NotSquare,
    /// n is not 1, 2 or a multiple of 4, so no Hadamard matrix of order n exists (a standard
    /// theorem: normalise, then count how the first three rows agree).
    ImpossibleOrder,
    /// Some pairs of distinct rows are not orthogonal.
    RowsNotOrthogonal,
}

/// Everything the exact check found.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Report {
    /// The order n (the number of rows).
    pub order: usize,
    /// The number of columns (equal to `order` for a square matrix).
    pub cols: usize,
    /// True exactly when H·Hᵀ = nI and H is square.
    pub hadamard: bool,
    /// The reasons it is not, in the order above; empty when it is.
    pub failures: Vec<Failure>,
    /// The matrix id: SHA-256 of the canonical text.
    pub sha256: String,
    /// The properties.
    pub properties: Properties,
    /// The first failing pairs, in row order, at most the cap.
    pub failing_pairs: Vec<FailingPair>,
    /// How many pairs i < j fail in all.
    pub failing_pairs_total: u64,
    /// The check that decided, and its version.
    pub check: String,
    /// The kernel that ran (for performance records; it never changes the verdict).
    pub kernel: String,
}

/// A matrix the exact check has passed. The only way to make one is [`certify`].
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Verified {
    matrix: Matrix,
    id: String,
}

impl Verified {
    /// The matrix.
    pub fn matrix(&self) -> &Matrix {
        &self.matrix
    }
    /// Its id.
    pub fn id(&self) -> &str {
        &self.id
    }
    /// Its order.
    pub fn order(&self) -> usize {
        self.matrix.rows()
    }
    /// Gives the matrix back.
    pub fn into_matrix(self) -> Matrix {
        self.matrix
    }
}

/// Runs the exact check; on success returns the proof, otherwise the report saying why not.
pub fn certify(m: Matrix) -> Result<Verified, Box<Report>> {
    if is_hadamard(&m) {
        let id = matrix_id(&m);
        Ok(Verified { matrix: m, id })
    } else {
        Err(Box::new(verify(&m)))
    }
}

/// True when n is 1, 2 or a multiple of 4: the only orders a Hadamard matrix can have.
pub fn order_possible(n: usize) -> bool {
    n == 1 || n == 2 || (n > 0 && n.is_multiple_of(4))
}

pub(super) fn finish_report(m: &Matrix, tally: PairTally, kernel: Kernel) -> Report {
    report_from(facts(m), tally, kernel)
}

pub(super) fn report_from(facts: Facts, tally: PairTally, kernel: Kernel) -> Report {
    let Facts {
        order,
        cols,
        sha256,
        properties,
    } = facts;
    let total = tally.total;
    let pairs = tally.into_pairs();
    let mut failures = Vec::new();
    if order != cols {
        failures.push(Failure::NotSquare);
    }
    if !order_possible(order) {
        failures.push(Failure::ImpossibleOrder);
    }
    if total > 0 {
        failures.push(Failure::RowsNotOrthogonal);
    }
    Report {
        order,
        cols,
        hadamard: failures.is_empty(),
        failures,
        sha256,
        properties,
        failing_pairs: pairs,
        failing_pairs_total: total,
        check: format!("{CHECK_NAME}/v{CHECK_VERSION}"),
        kernel: kernel.for_shape(order, cols).name().to_string(),
    }
}

/// The properties of any ±1 matrix.
pub fn properties(m: &Matrix) -> Properties {
    let n = m.rows();
    let square = m.is_square();
    let normalized = n > 0 && m.row_negatives(0) == 0 && (0..n).all(|i| !m.is_negative(i, 0));
    let t = m.transpose();
    let (symmetric, skew) = if square {
        let symmetric = t == *m;
        // Skew: the diagonal is +1, and entry (i,j) is the negation of (j,i) off the diagonal,
        // so H ⊕ Hᵀ is all ones except on the diagonal.
        let tail = crate::matrix::tail_mask(n);
        let skew = (0..n).all(|i| {
            let (a, b) = (m.row_words(i), t.row_words(i));
            !m.is_negative(i, i)
                && a.iter().zip(b).enumerate().all(|(k, (x, y))| {
                    let mut want = if k + 1 == a.len() { tail } else { u64::MAX };
                    if k == i / 64 {
                        want &= !(1u64 << (i % 64));
                    }
                    (x ^ y) == want
                })
        });
        (symmetric, skew)
    } else {
        (false, false)
    };
    let sum = |x: &Matrix, i: usize| x.cols() as i64 - 2 * x.row_negatives(i) as i64;
    let row_sums: Vec<i64> = (0..n).map(|i| sum(m, i)).collect();
    let excess = row_sums.iter().sum();
    let regular = n > 0
        && row_sums.iter().all(|&r| r == row_sums[0])
        && (0..t.rows()).all(|j| sum(&t, j) == row_sums[0]);
    Properties {
        normalized,
        symmetric,
        skew,
        regular,
        excess,
    }
}

/// The id and properties of a matrix: the part of a [`Report`] that is not the pair check,
/// so that it too can run in a worker while the shares are checked.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Facts {
    /// The shape they were computed for.
    pub order: usize,
    /// Its number of columns.
    pub cols: usize,
    /// The matrix id.
    pub sha256: String,
    /// The properties.
    pub properties: Properties,
}

/// The id and properties of `m`.
pub fn facts(m: &Matrix) -> Facts {
    Facts {
        order: m.rows(),
        cols: m.cols(),
        sha256: matrix_id(m),
        properties: properties(m),
    }
}
