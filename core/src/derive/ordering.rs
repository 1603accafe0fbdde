//! Row orders, and output scaled by 1/√n.
//!
//! - **Natural**: the rows as given.
//! - **Sequency (Walsh)**: the *sequency* of a row is its number of sign changes from left to
//!   right, 0..n−1. Sequency order sorts the rows by it, and is defined only when the rows'
//!   sequencies are distinct (then they are exactly 0..n−1, each once). Sylvester's matrices
//!   have this property: their rows are the Walsh functions (Walsh, Amer. J. Math. 45, 1923).
//!   Many matrices do not: no Hadamard matrix of order 12 has rows of every sequency (Webb and
//!   Kennedy, IEEE Trans. Computers 20(5), 1971 [recalled]). [`sequency_report`] computes the
//!   sequencies of the given matrix and says which rows share one.
//! - **Dyadic (Paley)**: defined for Sylvester's matrix of order 2^m up to row order and row
//!   signs. Its rows are then the characters x ↦ (−1)^{i·x} of Z₂^m, with columns indexed by
//!   x in binary; row i's index is read off the columns 2^b (bit b of i is set when that entry,
//!   times the row's first entry, is −1). Paley order lists the rows with i = bitreverse_m(p) for
//!   p = 0..n−1 (Paley, Proc. London Math. Soc. 34, 1932 [recalled]); p is then the Gray code of
//!   the row's sequency.
//!
//! Reordering rows keeps a matrix Hadamard but changes its id, so the reordered matrix is
//! certified again and carries its own id.
//!
//! **Scaled** output divides every entry by √n, so the rows are orthonormal (H/√n is an
//! orthogonal matrix). That is *not* what "normalised" means in this trade: a normalised
//! matrix has its first row and column all +1. Scaled files say so in their own text.

use super::DeriveError;
use crate::matrix::Matrix;
use crate::verify::{certify, Verified};
use serde::{Deserialize, Serialize};
use std::str::FromStr;

/// A row order.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum RowOrder {
    Natural,
    Sequency,
    Dyadic,
}

impl FromStr for RowOrder {
    type Err = DeriveError;
    fn from_str(s: &str) -> Result<RowOrder, DeriveError> {
        match s {
            "natural" => Ok(RowOrder::Natural),
            "sequency" | "walsh" => Ok(RowOrder::Sequency),
            "dyadic" | "paley" => Ok(RowOrder::Dyadic),
            _ => Err(DeriveError::new(
                "order",
                format!("unknown row order `{s}`: use natural, sequency or dyadic"),
            )),
        }
    }
}

/// The number of sign changes along row i.
pub fn sequency(m: &Matrix, i: usize) -> usize {
    (1..m.cols())
        .filter(|&j| m.is_negative(i, j) != m.is_negative(i, j - 1))
        .count()
}

/// Whether sequency order is defined for a matrix, and why not when it is not.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct SequencyReport {
    /// Each row's sequency, in the given order.
    pub sequencies: Vec<usize>,
    /// True when the sequencies are distinct (so exactly 0..n−1).
    pub distinct: bool,
    /// Groups of rows (from 0) that share a sequency, when not distinct (at most 10 listed).
    pub shared: Vec<Vec<usize>>,
    pub note: String,
}

/// Computes every row's sequency and says whether sequency order is defined.
pub fn sequency_report(m: &Matrix) -> SequencyReport {
    let n = m.rows();
    let sequencies: Vec<usize> = (0..n).map(|i| sequency(m, i)).collect();
    let mut by: Vec<Vec<usize>> = vec![Vec::new(); m.cols().max(1)];
    for (i, &s) in sequencies.iter().enumerate() {
        by[s].push(i);
    }
    let shared: Vec<Vec<usize>> = by
        .iter()
        .filter(|g| g.len() > 1)
        .take(10)
        .cloned()
        .collect();
    let distinct = shared.is_empty();
    let mut note = if distinct {
        "the rows have distinct sequencies 0..n−1, so sequency (Walsh) order is defined".to_owned()
    } else {
        let missing = by.iter().filter(|g| g.is_empty()).count();
        format!("sequency order is not defined for this matrix: its rows do not have distinct sequencies ({} sequencies are shared, {missing} of 0..{} are missing; rows {:?} share sequency {})", by.iter().filter(|g| g.len() > 1).count(), n.saturating_sub(1), shared[0], sequencies[shared[0][0]])
    };
    if n == 12 && !distinct {
        note.push_str("; no Hadamard matrix of order 12 has rows of every sequency (Webb and Kennedy, IEEE Trans. Computers 20(5), 1971)");
    }
    SequencyReport {
        sequencies,
        distinct,
        shared,
        note,
    }
}

/// For Sylvester's matrix up to row order and signs (columns in natural order), the Walsh
/// index of every row; `None` for any other matrix.
pub fn walsh_indices(m: &Matrix) -> Option<Vec<usize>> {
    let n = m.rows();
    if n == 0 || !n.is_power_of_two() || m.cols() != n {
        return None;
    }
    let bits = n.trailing_zeros();
    let mut out = Vec::with_capacity(n);
    for r in 0..n {
        let flip = m.is_negative(r, 0);
        let mut index = 0;
        for b in 0..bits {
            if m.is_negative(r, 1 << b) != flip {
                index |= 1 << b;
            }
        }
        // The row must be the character (−1)^{popcount(index & x)} times its first entry.
        if !(0..n).all(|x| m.is_negative(r, x) == (flip ^ ((index & x).count_ones() % 2 == 1))) {
            return None;
        }
        out.push(index);
    }
    Some(out)
}

fn bit_reverse(p: usize, bits: u32) -> usize {
    if bits == 0 {
        0
    } else {
        p.reverse_bits() >> (usize::BITS - bits)
    }
}

/// A reordered matrix.
#[derive(Debug)]
pub struct Reordered {
    pub order_kind: RowOrder,
    /// `source_rows[k]`: the row of the given matrix that is row k of the result.
    pub source_rows: Vec<usize>,
    /// Row k's sequency in the result.
    pub sequencies: Vec<usize>,
    /// The result, certified again.
    pub matrix: Verified,
    pub note: String,
}

/// `h` with its rows in `order`, or why that order is not defined for it.
pub fn reorder(h: &Verified, order: RowOrder) -> Result<Reordered, DeriveError> {
    let m = h.matrix();
    let n = m.rows();
    let (source_rows, note): (Vec<usize>, String) = match order {
        RowOrder::Natural => ((0..n).collect(), "the rows as given".to_owned()),
        RowOrder::Sequency => {
            let rep = sequency_report(m);
            if !rep.distinct {
                return Err(DeriveError::new("order", rep.note));
            }
            let mut rows: Vec<usize> = (0..n).collect();
            rows.sort_by_key(|&i| rep.sequencies[i]);
            (
                rows,
                "sequency (Walsh) order: row k has k sign changes".to_owned(),
            )
        }
        RowOrder::Dyadic => {
            let Some(idx) = walsh_indices(m) else {
                return Err(DeriveError::new("order", "dyadic (Paley) order is defined only for Sylvester's matrix of order 2^m (up to row order and row signs, with its columns in natural order); this matrix is not one"));
            };
            let bits = n.trailing_zeros();
            let mut by_index = vec![0; n];
            for (r, &i) in idx.iter().enumerate() {
                by_index[i] = r;
            }
            (
                (0..n).map(|p| by_index[bit_reverse(p, bits)]).collect(),
                "dyadic (Paley) order: row p is the Walsh function with index bitreverse(p)"
                    .to_owned(),
            )
        }
    };
    let mut out = Matrix::ones(n, m.cols());
    for (k, &r) in source_rows.iter().enumerate() {
        out.row_words_mut(k).copy_from_slice(m.row_words(r));
    }
    let sequencies = (0..n).map(|k| sequency(&out, k)).collect();
    let matrix = certify(out).map_err(|_| DeriveError::new("matrix", "the reordered matrix failed the exact check (a bug: row permutations keep a matrix Hadamard)"))?;
    Ok(Reordered {
        order_kind: order,
        source_rows,
        sequencies,
        matrix,
        note,
    })
}

/// A float format for scaled output.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ScaledFormat {
    /// CSV with a first comment line stating the scaling (`numpy.loadtxt` skips it).
    Csv,
    /// `{"scaled": true, "scale": "1/sqrt(n)", "factor": …, "note": …, "matrix": [[…]]}`.
    Json,
    /// NumPy float64 `.npy`; the scaling is in the file name the caller gives it.
    Npy,
}

/// The note every scaled file carries.
pub fn scaled_note(n: usize) -> String {
    format!("SCALED: entries are ±1/√{n} = ±{}, so the rows are orthonormal. Scaled is not normalised (normalised means the first row and column are all +1).", 1.0 / (n as f64).sqrt())
}

/// Writes `m` scaled by 1/√(columns) in a float format.
pub fn write_scaled(
    m: &Matrix,
    f: ScaledFormat,
    out: &mut dyn std::io::Write,
) -> std::io::Result<()> {
    let c = m.cols().max(1);
    let s = 1.0 / (c as f64).sqrt();
    let (plus, minus) = (format!("{s}"), format!("{}", -s));
    let row = |i: usize| -> String {
        (0..m.cols())
            .map(|j| {
                if m.is_negative(i, j) {
                    minus.as_str()
                } else {
                    plus.as_str()
                }
            })
            .collect::<Vec<_>>()
            .join(",")
    };
    match f {
        ScaledFormat::Npy => crate::formats::write_to(
            m,
            &crate::formats::WriteFormat::NpyF64 { scaled: true },
            out,
        ),
        ScaledFormat::Csv => {
            writeln!(out, "# {}", scaled_note(m.cols()))?;
            for i in 0..m.rows() {
                writeln!(out, "{}", row(i))?;
            }
            Ok(())
        }
        ScaledFormat::Json => {
            let note = serde_json::to_string(&scaled_note(m.cols())).unwrap_or_default();
            write!(out, "{{\"scaled\": true, \"scale\": \"1/sqrt(n)\", \"factor\": {s}, \"note\": {note},\n \"matrix\": [")?;
            for i in 0..m.rows() {
                write!(out, "{}\n  [{}]", if i == 0 { "" } else { "," }, row(i))?;
            }
            writeln!(out, "]}}")
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, paley_two, sylvester};

    #[test]
    fn sylvester_has_every_sequency_and_a_paley_order() {
        let h = sylvester(5).unwrap();
        let s = reorder(&h, RowOrder::Sequency).unwrap();
        assert_eq!(s.sequencies, (0..32).collect::<Vec<_>>());
        let d = reorder(&h, RowOrder::Dyadic).unwrap();
        // Row p of the Paley order has the sequency whose Gray code is p.
        for (p, &seq) in d.sequencies.iter().enumerate() {
            assert_eq!(seq ^ (seq >> 1), p);
        }
        // Dyadic order is found again after the rows are shuffled and one is negated.
        let mut m = s.matrix.into_matrix();
        m.negate_row(5);
        let shuffled = certify(m).unwrap();
        let again = reorder(&shuffled, RowOrder::Dyadic).unwrap();
        assert_eq!(again.sequencies, d.sequencies);
    }

    #[test]
    fn order_twelve_has_no_sequency_order() {
        for h in [paley_one(11).unwrap(), paley_two(5).unwrap()] {
            let rep = sequency_report(h.matrix());
            assert!(!rep.distinct);
            assert!(rep.note.contains("Webb and Kennedy"));
            let e = reorder(&h, RowOrder::Sequency).unwrap_err();
            assert_eq!(e.parameter, "order");
            assert!(reorder(&h, RowOrder::Dyadic).is_err());
        }
    }

    #[test]
    fn scaled_text_says_it_is_scaled() {
        let h = sylvester(2).unwrap();
        let mut out = Vec::new();
        write_scaled(h.matrix(), ScaledFormat::Csv, &mut out).unwrap();
        let t = String::from_utf8(out).unwrap();
        assert!(t.starts_with("# SCALED"));
        assert!(t.contains("\n0.5,-0.5,0.5,-0.5\n"), "{t}");
    }
}
