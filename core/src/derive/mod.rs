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
        DeriveError {
            parameter: parameter.to_owned(),
            message: message.into(),
        }
    }
}

impl fmt::Display for DeriveError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.parameter, self.message)
    }
}

impl std::error::Error for DeriveError {}

/// A cell of text a user chose (a factor name, a level label) made safe for spreadsheets:
/// one that starts with `=`, `+`, `-`, `@`, a tab or a carriage return would be read as a
/// formula, so it gets a leading `'` (the usual neutralisation of CSV formula injection,
/// common practice as described by OWASP). Numbers (`-1`, `+2.5`) are left alone: they are
/// values, not names.
pub fn csv_text_cell(s: &str) -> std::borrow::Cow<'_, str> {
    let risky = s.starts_with(['=', '+', '-', '@', '\t', '\r']);
    if risky && s.trim().parse::<f64>().is_err() {
        std::borrow::Cow::Owned(format!("'{s}"))
    } else {
        std::borrow::Cow::Borrowed(s)
    }
}

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
    // Each column packed as two bit strings over the runs: nonzero, and negative. The inner
    // product of columns a and b is then |both nonzero| − 2·|both nonzero, signs differ|.
    let words = rows.len().div_ceil(64);
    let mut nonzero = vec![vec![0u64; words]; cols];
    let mut negative = vec![vec![0u64; words]; cols];
    for (r, row) in rows.iter().enumerate() {
        for (c, &x) in row.iter().enumerate().take(cols) {
            if x != 0 {
                nonzero[c][r / 64] |= 1 << (r % 64);
            }
            if x < 0 {
                negative[c][r / 64] |= 1 << (r % 64);
            }
        }
    }
    let count = |v: &[u64]| v.iter().map(|w| w.count_ones() as i64).sum::<i64>();
    let balanced = (0..cols).all(|c| count(&nonzero[c]) == 2 * count(&negative[c]));
    let orthogonal = (0..cols).all(|a| {
        (a + 1..cols).all(|b| {
            let (mut both, mut differ) = (0i64, 0i64);
            for w in 0..words {
                let m = nonzero[a][w] & nonzero[b][w];
                both += m.count_ones() as i64;
                differ += (m & (negative[a][w] ^ negative[b][w])).count_ones() as i64;
            }
            both == 2 * differ
        })
    });
    (orthogonal, balanced)
}

/// The largest order codes and screening designs are made for: their output grows as n².
pub const MAX_ORDER: usize = 8192;

/// The most bytes a design's JSON or CSV may take, estimated from its runs, factors and level
/// labels before it is built: the cell count alone does not bound the answer, since every
/// cell of a CSV repeats a level label the user chose.
pub const MAX_OUTPUT_BYTES: usize = 64 << 20;

/// The most cells (runs × factors, replicates × strata) a design or replicate set may have.
pub const MAX_CELLS: usize = 1 << 26;

#[cfg(test)]
mod csv_cell_tests {
    use super::csv_text_cell;

    #[test]
    fn formula_like_names_are_neutralised_numbers_are_not() {
        for (cell, out) in [
            ("=HYPERLINK(\"x\")", "'=HYPERLINK(\"x\")"),
            ("+cmd", "'+cmd"),
            ("-2+3", "'-2+3"),
            ("@SUM(A1)", "'@SUM(A1)"),
            ("\tx", "'\tx"),
            ("-1", "-1"),
            ("+1", "+1"),
            ("-2.5e3", "-2.5e3"),
            ("temperature", "temperature"),
        ] {
            assert_eq!(csv_text_cell(cell), out, "{cell:?}");
        }
    }
}

#[cfg(test)]
mod tests {
    use super::orthogonal_and_balanced;

    #[test]
    fn the_design_check_sees_a_non_orthogonal_or_unbalanced_table() {
        let good = vec![
            vec![1, 1],
            vec![1, -1],
            vec![-1, 1],
            vec![-1, -1],
            vec![0, 0],
        ];
        assert_eq!(orthogonal_and_balanced(&good, 2), (true, true));
        let skewed = vec![vec![1, 1], vec![1, 1], vec![-1, -1], vec![-1, -1]];
        assert_eq!(orthogonal_and_balanced(&skewed, 2), (false, true));
        let lopsided = vec![vec![1, 1], vec![1, -1], vec![1, 1], vec![-1, -1]];
        assert!(!orthogonal_and_balanced(&lopsided, 2).1);
    }
}
