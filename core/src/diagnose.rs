//! The verdict on a matrix as it was read, and what follows from it: one rule for the CLI, the
//! HTTP API (and the catalogue behind it), the Python package and the page.
//!
//! The rule:
//! - **incomplete** when any entry is erased (`?`): the input is not a ±1 matrix yet, whatever
//!   the check says about the entries as stored (+1 in their place). What the erased entries
//!   can be is settled by [`repair::complete`] (one completion, none, several, or undecided
//!   within the limits);
//! - otherwise **hadamard** when the exact check passed;
//! - otherwise **not hadamard**, and [`repair::wrong_signs`] looks for the wrong signs that
//!   explain the failure (one wrong sign is located by the pattern of its failing pairs; a
//!   few, by rebuilding suspect rows or columns), returning the corrected matrix only when the
//!   exact check passes on it.
//!
//! [`diagnose`] takes the report of the exact check rather than running it, because each
//! front end runs the check its own way (the CLI with a chosen kernel and a clock around it,
//! the page in slices or on Web Workers, the catalogue through [`crate::verify::certify`]).

use crate::matrix::Matrix;
use crate::repair::{self, CompletionLimits, CompletionReport, SignRepair};
use crate::verify::Report;
use serde::{Deserialize, Serialize};

/// The verdict on a matrix as read.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Verdict {
    /// Every entry is known and H·Hᵀ = nI.
    Hadamard,
    /// Some entries are erased, so it is not a ±1 matrix yet.
    Incomplete,
    /// Every entry is known and the exact check failed.
    NotHadamard,
}

impl Verdict {
    /// The name in JSON answers: `hadamard`, `incomplete` or `not_hadamard`.
    pub fn name(self) -> &'static str {
        match self {
            Verdict::Hadamard => "hadamard",
            Verdict::Incomplete => "incomplete",
            Verdict::NotHadamard => "not_hadamard",
        }
    }
}

impl std::fmt::Display for Verdict {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// The verdict and what was found after it.
#[derive(Clone, Debug)]
pub struct Diagnosis {
    /// The verdict on the matrix as read.
    pub verdict: Verdict,
    /// The wrong signs that explain the failure: looked for only when the verdict is
    /// [`Verdict::NotHadamard`], and `None` when none were found.
    pub repair: Option<SignRepair>,
    /// What the erased entries can be: present exactly when the verdict is
    /// [`Verdict::Incomplete`].
    pub completion: Option<CompletionReport>,
    /// The erased entries, (row, col) from 0, as read.
    pub erasures: Vec<(usize, usize)>,
}

impl Diagnosis {
    /// True when the matrix as read is Hadamard.
    pub fn is_hadamard(&self) -> bool {
        self.verdict == Verdict::Hadamard
    }
}

/// The verdict on `m` with its erased entries at `erasures` (stored as +1 in `m`), from
/// `report`, which must be the exact check's report on `m`; then the completion or the repair
/// the verdict calls for, with `limits` on the completion.
pub fn diagnose(
    m: &Matrix,
    erasures: &[(usize, usize)],
    report: &Report,
    limits: CompletionLimits,
) -> Diagnosis {
    debug_assert_eq!((report.order, report.cols), (m.rows(), m.cols()));
    let verdict = if !erasures.is_empty() {
        Verdict::Incomplete
    } else if report.hadamard {
        Verdict::Hadamard
    } else {
        Verdict::NotHadamard
    };
    let completion =
        (verdict == Verdict::Incomplete).then(|| repair::complete(m, erasures, limits));
    let repair = (verdict == Verdict::NotHadamard)
        .then(|| repair::wrong_signs(m, report))
        .flatten();
    Diagnosis {
        verdict,
        repair,
        completion,
        erasures: erasures.to_vec(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::repair::Completion;
    use crate::verify::verify;

    /// Sylvester's matrix of order 2^k, Hadamard (J. J. Sylvester, Phil. Mag. 34 (1867)
    /// 461–475).
    fn sylvester(k: u32) -> Matrix {
        let n = 1usize << k;
        Matrix::from_fn(n, n, |i, j| (i & j).count_ones() % 2 == 1)
    }

    fn diagnosis(m: &Matrix, erasures: &[(usize, usize)]) -> Diagnosis {
        diagnose(m, erasures, &verify(m), CompletionLimits::default())
    }

    #[test]
    fn a_complete_hadamard_matrix_is_hadamard_and_nothing_follows() {
        let d = diagnosis(&sylvester(4), &[]);
        assert_eq!(d.verdict, Verdict::Hadamard);
        assert!(d.is_hadamard() && d.repair.is_none() && d.completion.is_none());
    }

    #[test]
    fn erased_entries_make_it_incomplete_even_when_the_check_passes() {
        // With +1 in the erased places the matrix is still Sylvester's (the entries erased
        // are +1 there), so the check passes; the verdict is still incomplete, and the
        // completion is the matrix itself.
        let h = sylvester(4);
        let erased = [(0, 0), (3, 4), (6, 9)];
        assert!(erased.iter().all(|&(i, j)| !h.is_negative(i, j)));
        let d = diagnosis(&h, &erased);
        assert_eq!(d.verdict, Verdict::Incomplete);
        assert!(d.repair.is_none());
        let c = d.completion.expect("a completion report");
        assert_eq!(c.erased, 3);
        match c.outcome {
            Completion::Unique { matrix, .. } => assert_eq!(matrix.matrix(), &h),
            other => panic!("expected one completion, got {other:?}"),
        }
    }

    #[test]
    fn one_and_two_wrong_signs_are_located() {
        // Two distinct Hadamard matrices of order n differ in at least n entries
        // (references.md#r14-erasures-and-wrong-signs), so with fewer than n/2 changes the
        // only correction is the matrix the damage was done to.
        let h = sylvester(4);
        for flips in [vec![(6, 9)], vec![(2, 3), (11, 14)]] {
            let mut m = h.clone();
            for &(i, j) in &flips {
                m.flip(i, j);
            }
            let d = diagnosis(&m, &[]);
            assert_eq!(d.verdict, Verdict::NotHadamard, "{flips:?}");
            assert!(d.completion.is_none());
            let r = d.repair.expect("the wrong signs");
            assert_eq!(r.entries, flips);
            assert_eq!(r.corrected.matrix(), &h);
            assert!(r.unique_within_distance);
        }
    }

    #[test]
    fn a_matrix_far_from_hadamard_is_not_hadamard_without_a_repair() {
        // Order 6 has no Hadamard matrix (references.md#r1-impossible-orders).
        let d = diagnosis(&Matrix::ones_square(6), &[]);
        assert_eq!(d.verdict, Verdict::NotHadamard);
        assert!(d.repair.is_none() && d.completion.is_none());
    }
}
