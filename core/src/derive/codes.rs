//! The Hadamard codes, binary codes read from the rows of a normalised matrix.
//!
//! Write +1 as 0 and −1 as 1. Two distinct rows of a Hadamard matrix of order n agree in n/2
//! places, so as binary words they are at Hamming distance n/2; a row and the negation of
//! another are at distance n/2 as well, and a row and its own negation at n. Normalising makes
//! column 0 constant, and deleting it keeps the distances between rows and lowers those between
//! a row and a negated row by one. Hence, for n ≥ 2 (MacWilliams and Sloane, The Theory of
//! Error-Correcting Codes, 1977, ch. 2 §3 [recalled]):
//!
//! | code | words | length | size | minimum distance |
//! |---|---|---|---|---|
//! | full | the rows of H and of −H | n | 2n | n/2 |
//! | punctured | the same, column 0 deleted | n − 1 | 2n | n/2 − 1 |
//! | shortened | the rows of H only, column 0 deleted | n − 1 | n | n/2 |
//!
//! The distance stated is computed from the words listed (every pair) up to
//! [`DISTANCE_CHECK_MAX_ORDER`]; above it the theorem's value is stated and marked so.

use super::{write_csv, DeriveError};
use crate::matrix::Matrix;
use crate::verify::Verified;
use serde::Serialize;
use std::str::FromStr;

/// Which Hadamard code.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum CodeKind {
    Full,
    Punctured,
    Shortened,
}

impl FromStr for CodeKind {
    type Err = DeriveError;
    fn from_str(s: &str) -> Result<CodeKind, DeriveError> {
        match s {
            "full" => Ok(CodeKind::Full),
            "punctured" => Ok(CodeKind::Punctured),
            "shortened" => Ok(CodeKind::Shortened),
            _ => Err(DeriveError::new(
                "variant",
                format!("unknown code `{s}`: use full, punctured or shortened"),
            )),
        }
    }
}

/// The largest order whose minimum distance is computed over all pairs of words.
pub const DISTANCE_CHECK_MAX_ORDER: usize = 1024;

/// A Hadamard code.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct HadamardCode {
    pub kind: &'static str,
    pub variant: CodeKind,
    pub order: usize,
    pub source_id: String,
    pub normalized_id: String,
    pub length: usize,
    pub size: usize,
    /// The minimum Hamming distance.
    pub min_distance: usize,
    /// True when `min_distance` was computed over every pair of words listed.
    pub distance_computed: bool,
    pub mapping: &'static str,
    /// The words, each as a string of `0`/`1`: the rows first, then (full, punctured) their
    /// negations in the same order.
    #[serde(serialize_with = "words_as_strings")]
    pub words: Matrix,
    pub reference: &'static str,
}

fn words_as_strings<S: serde::Serializer>(m: &Matrix, s: S) -> Result<S::Ok, S::Error> {
    s.collect_seq((0..m.rows()).map(|i| word(m, i)))
}

fn word(m: &Matrix, i: usize) -> String {
    (0..m.cols())
        .map(|j| if m.is_negative(i, j) { '1' } else { '0' })
        .collect()
}

/// The smallest Hamming distance between two distinct rows of `m` (bits as the binary word).
pub fn min_distance(m: &Matrix) -> Option<usize> {
    let mut best: Option<usize> = None;
    for i in 0..m.rows() {
        for j in i + 1..m.rows() {
            let d = m
                .row_words(i)
                .iter()
                .zip(m.row_words(j))
                .map(|(a, b)| (a ^ b).count_ones() as usize)
                .sum();
            best = Some(best.map_or(d, |b: usize| b.min(d)));
        }
    }
    best
}

/// The code `variant` from `h`.
pub fn hadamard_code(h: &Verified, variant: CodeKind) -> Result<HadamardCode, DeriveError> {
    let n = h.order();
    if n < 2 {
        return Err(DeriveError::new(
            "matrix",
            format!("the Hadamard codes need an order of at least 2; this matrix has order {n}"),
        ));
    }
    if n > super::MAX_ORDER {
        return Err(DeriveError::new(
            "matrix",
            format!(
                "the Hadamard codes are made up to order {}; this matrix has order {n}",
                super::MAX_ORDER
            ),
        ));
    }
    let hn = h.matrix().normalized();
    let (skip, negations) = match variant {
        CodeKind::Full => (0, true),
        CodeKind::Punctured => (1, true),
        CodeKind::Shortened => (1, false),
    };
    let length = n - skip;
    let size = if negations { 2 * n } else { n };
    let words = Matrix::from_fn(size, length, |w, j| {
        let neg = hn.is_negative(w % n, j + skip);
        if w >= n {
            !neg
        } else {
            neg
        }
    });
    let theorem = match variant {
        CodeKind::Full | CodeKind::Shortened => n / 2,
        CodeKind::Punctured => n / 2 - 1,
    };
    let computed = (n <= DISTANCE_CHECK_MAX_ORDER)
        .then(|| min_distance(&words))
        .flatten();
    Ok(HadamardCode {
        kind: "hadamard-code",
        variant,
        order: n,
        source_id: h.id().to_owned(),
        normalized_id: crate::id::matrix_id(&hn),
        length,
        size,
        min_distance: computed.unwrap_or(theorem),
        distance_computed: computed.is_some(),
        mapping: "+1 is written 0, -1 is written 1",
        words,
        reference: "MacWilliams and Sloane, The Theory of Error-Correcting Codes (1977), ch. 2 §3",
    })
}

impl HadamardCode {
    /// CSV: one word per line, its bits separated by commas.
    pub fn write_csv(&self, out: &mut dyn std::io::Write) -> std::io::Result<()> {
        let m = &self.words;
        write_csv(
            (0..m.rows())
                .map(|i| (0..m.cols()).map(move |j| if m.is_negative(i, j) { "1" } else { "0" })),
            out,
        )
    }

    /// Plain text: one word of `0`/`1` per line.
    pub fn write_text(&self, out: &mut dyn std::io::Write) -> std::io::Result<()> {
        for i in 0..self.words.rows() {
            out.write_all(word(&self.words, i).as_bytes())?;
            out.write_all(b"\n")?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, sylvester};

    #[test]
    fn parameters_of_the_three_codes() {
        for h in [
            sylvester(3).unwrap(),
            paley_one(11).unwrap(),
            paley_one(19).unwrap(),
            sylvester(5).unwrap(),
        ] {
            let n = h.order();
            for (v, len, size, d) in [
                (CodeKind::Full, n, 2 * n, n / 2),
                (CodeKind::Punctured, n - 1, 2 * n, n / 2 - 1),
                (CodeKind::Shortened, n - 1, n, n / 2),
            ] {
                let c = hadamard_code(&h, v).unwrap();
                assert_eq!(
                    (c.length, c.size, c.min_distance, c.distance_computed),
                    (len, size, d, true),
                    "{v:?} n={n}"
                );
            }
        }
    }
}
