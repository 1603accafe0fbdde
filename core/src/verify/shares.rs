//! The check cut into shares that run elsewhere (Web Workers), and their exact merge.

use super::kernel::Kernel;
use super::pass::{panel_pairs, panel_pass, panel_rows, PairTally};
use super::report::{report_from, Facts, FailingPair, Report};
use crate::matrix::Matrix;
use serde::{Deserialize, Serialize};

/// The exact check cut into shares, for callers that run them elsewhere and merge the results:
/// the browser hands them to Web Workers, each holding its own copy of the matrix.
///
/// Share `s` is every pair (i, j), i < j, whose row j lies in the `s`-th panel of rows (the
/// panels [`verify`] itself uses), so the shares are disjoint and together hold all
/// n(n−1)/2 pairs. [`Merge`] accepts each share once and makes a report only when it has all
/// of them.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Split {
    order: usize,
    cols: usize,
    panel: usize,
    shares: usize,
}

impl Split {
    /// How the check of `m` is cut.
    pub fn of(m: &Matrix) -> Split {
        let panel = panel_rows(m);
        Split {
            order: m.rows(),
            cols: m.cols(),
            panel,
            shares: m.rows().div_ceil(panel),
        }
    }

    /// The number of shares (at least one for a non-empty matrix).
    pub fn shares(&self) -> usize {
        self.shares
    }

    /// The number of row pairs in share `s`; later shares hold more.
    pub fn pairs_in(&self, s: usize) -> u64 {
        panel_pairs(self.order, self.panel, s)
    }

    /// The number of row pairs in all.
    pub fn pairs(&self) -> u64 {
        let n = self.order as u64;
        n * n.saturating_sub(1) / 2
    }
}

/// What the exact check found in one share. Serialisable, so it can cross from a Web Worker.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Share {
    /// Which share of the [`Split`].
    pub share: usize,
    /// The shape of the matrix checked, so a share of another matrix is refused.
    pub order: usize,
    /// Its number of columns.
    pub cols: usize,
    /// The first failing pairs of the share in (i, j) order, at most the cap.
    pub failing_pairs: Vec<FailingPair>,
    /// How many pairs of the share fail in all.
    pub failing_pairs_total: u64,
    /// The kernel that checked it.
    pub kernel: String,
}

/// Runs the exact check on share `s` of `m`'s [`Split`], keeping at most `cap` failing pairs.
///
/// # Panics
/// When `s` is not a share of the split (`s >= Split::of(m).shares()`).
pub fn check_share(m: &Matrix, s: usize, cap: usize) -> Share {
    let split = Split::of(m);
    assert!(
        s < split.shares,
        "share {s} of a split into {}",
        split.shares
    );
    let kernel = Kernel::best();
    let mut tally = PairTally::new(cap);
    panel_pass(m, kernel, split.panel, s, &mut tally);
    let failing_pairs_total = tally.total;
    Share {
        share: s,
        order: m.rows(),
        cols: m.cols(),
        failing_pairs: tally.into_pairs(),
        failing_pairs_total,
        kernel: kernel.for_shape(m.rows(), m.cols()).name().to_string(),
    }
}
/// Why [`Merge`] refused a share or could not finish.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum MergeError {
    /// The share or facts belong to a matrix of another shape.
    OtherMatrix,
    /// There is no such share in the split.
    NoSuchShare(usize),
    /// That share was merged before.
    Again(usize),
    /// Shares are missing: the first of them, and how many.
    Missing { first: usize, count: usize },
}

impl std::fmt::Display for MergeError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            MergeError::OtherMatrix => write!(f, "a result for a matrix of another shape"),
            MergeError::NoSuchShare(s) => write!(f, "share {s} is not part of the split"),
            MergeError::Again(s) => write!(f, "share {s} was merged twice"),
            MergeError::Missing { first, count } => {
                write!(f, "{count} shares are missing, the first is {first}")
            }
        }
    }
}

impl std::error::Error for MergeError {}

/// The shares of a [`Split`] merged into one report, exactly: the total is the sum of the
/// shares' totals, and the listed pairs are the first `cap` of all shares together, in (i, j)
/// order, whatever order the shares arrive in.
pub struct Merge {
    split: Split,
    merged: Vec<bool>,
    left: usize,
    pairs_done: u64,
    tally: PairTally,
    kernel: Option<String>,
}

impl Merge {
    /// Starts merging the shares of `m`'s split, keeping at most `cap` failing pairs.
    pub fn new(m: &Matrix, cap: usize) -> Merge {
        let split = Split::of(m);
        Merge {
            split,
            merged: vec![false; split.shares],
            left: split.shares,
            pairs_done: 0,
            tally: PairTally::new(cap),
            kernel: None,
        }
    }

    /// The split being merged.
    pub fn split(&self) -> Split {
        self.split
    }

    /// Adds one share; returns the fraction of all pairs merged so far.
    pub fn add(&mut self, share: Share) -> Result<f64, MergeError> {
        if share.order != self.split.order || share.cols != self.split.cols {
            return Err(MergeError::OtherMatrix);
        }
        let s = share.share;
        match self.merged.get_mut(s) {
            None => return Err(MergeError::NoSuchShare(s)),
            Some(true) => return Err(MergeError::Again(s)),
            Some(seen) => *seen = true,
        }
        self.left -= 1;
        self.pairs_done += self.split.pairs_in(s);
        match &mut self.kernel {
            None => self.kernel = Some(share.kernel),
            Some(k) if *k != share.kernel && !k.split(" + ").any(|x| x == share.kernel) => {
                k.push_str(" + ");
                k.push_str(&share.kernel);
            }
            Some(_) => {}
        }
        let mut part = PairTally::new(self.tally.cap);
        part.total = share.failing_pairs_total;
        part.heap = share
            .failing_pairs
            .into_iter()
            .map(|p| (p.i, p.j, p.dot))
            .collect();
        self.tally.merge(part);
        Ok(self.progress())
    }

    /// The fraction of all pairs merged (1.0 when every share is in).
    pub fn progress(&self) -> f64 {
        if self.left == 0 {
            1.0
        } else {
            self.pairs_done as f64 / self.split.pairs().max(1) as f64
        }
    }

    /// True when every share has been merged.
    pub fn is_complete(&self) -> bool {
        self.left == 0
    }

    /// The report, the same as [`verify_with_cap`] gives, from every share and the matrix's
    /// [`Facts`] (computed elsewhere, or by [`facts`]). Its `kernel` names the kernels that
    /// checked the shares.
    pub fn finish(self, facts: Facts) -> Result<Report, MergeError> {
        if facts.order != self.split.order || facts.cols != self.split.cols {
            return Err(MergeError::OtherMatrix);
        }
        if let Some(first) = self.merged.iter().position(|&m| !m) {
            return Err(MergeError::Missing {
                first,
                count: self.left,
            });
        }
        let mut report = report_from(facts, self.tally, Kernel::best());
        if let Some(k) = self.kernel {
            report.kernel = k;
        }
        Ok(report)
    }
}
