//! Objects made from a Hadamard matrix, and the conventions they depend on.
//!
//! One idea: every object here is a re-reading of a matrix that has passed the exact check
//! (each builder takes a [`Verified`](crate::verify::Verified)), and each one states the
//! property that makes it what it is — and checks that property on what it built, so the
//! statement in the output is computed, not assumed.
//!
//! - [`screening`]: two-level orthogonal main-effect designs (Plackett–Burman), with a recorded
//!   random run order, fold-over and centre points;
//! - [`brr`]: replicate sign patterns for balanced repeated replication in survey statistics;
//! - [`codes`]: the Hadamard codes (full, punctured, shortened) with their minimum distance;
//! - [`block_design`]: the symmetric 2-(n−1, n/2−1, n/4−1) design;
//! - [`ordering`]: natural, sequency (Walsh) and dyadic (Paley) row orders, and output scaled by
//!   1/√n, which is *not* "normalised" (first row and column all +1);
//! - [`equivalence`]: deciding whether two matrices are equivalent, with a checked certificate,
//!   a differing invariant, or an honest "undecided";
//! - [`invariant`]: the 4-profile and the stronger invariants built from it;
//! - [`rng`]: the small documented generator that makes a randomisation reproducible from its seed.
//!
//! Conventions shared by all of them: rows and columns are counted from 0; in binary objects
//! (codes, designs) +1 is written 0 and −1 is written 1, as in the code literature (the
//! homomorphism from ({0,1}, ⊕) to ({+1,−1}, ·)).

pub mod block_design;
pub mod brr;
pub mod codes;
pub mod equivalence;
pub mod invariant;
pub mod ordering;
pub mod rng;
pub mod screening;

use std::fmt;

/// A request that cannot be met, naming the parameter at fault.
#[derive(Clone, Debug, PartialEq, Eq, serde::Serialize)]
pub struct DeriveError {
    /// The parameter (or `matrix`) the problem is with.
    pub parameter: String,
    /// What is wrong, in words.
    pub message: String,
}

impl DeriveError {
    pub(crate) fn new(parameter: &str, message: impl Into<String>) -> DeriveError {
        DeriveError { parameter: parameter.to_owned(), message: message.into() }
    }
}

impl fmt::Display for DeriveError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.parameter, self.message)
    }
}

impl std::error::Error for DeriveError {}

/// Writes `rows` as CSV: cells separated by commas, one row per line. Cells are quoted when
/// they hold a comma, a quote or a line break (RFC 4180).
pub fn write_csv<I, R, S>(rows: I, out: &mut dyn std::io::Write) -> std::io::Result<()>
where
    I: IntoIterator<Item = R>,
    R: IntoIterator<Item = S>,
    S: AsRef<str>,
{
    for row in rows {
        let mut line = String::new();
        for (k, cell) in row.into_iter().enumerate() {
            if k > 0 {
                line.push(',');
            }
            let c = cell.as_ref();
            if c.contains([',', '"', '\n', '\r']) {
                line.push('"');
                line.push_str(&c.replace('"', "\"\""));
                line.push('"');
            } else {
                line.push_str(c);
            }
        }
        line.push('\n');
        out.write_all(line.as_bytes())?;
    }
    Ok(())
}

/// Whether the columns of a ±1 (or 0 for centre points) table are pairwise orthogonal and
/// each sums to zero: the defining properties of an orthogonal two-level design.
pub(crate) fn orthogonal_and_balanced(rows: &[Vec<i8>], cols: usize) -> (bool, bool) {
    let mut orthogonal = true;
    let mut balanced = true;
    for a in 0..cols {
        let sum: i64 = rows.iter().map(|r| r[a] as i64).sum();
        balanced &= sum == 0;
        for b in a + 1..cols {
            let dot: i64 = rows.iter().map(|r| r[a] as i64 * r[b] as i64).sum();
            orthogonal &= dot == 0;
        }
    }
    (orthogonal, balanced)
}
