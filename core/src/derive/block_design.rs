//! The symmetric 2-(n−1, n/2−1, n/4−1) design of a normalised Hadamard matrix.
//!
//! Normalise H, delete its first row and column, and read the remaining (n−1)×(n−1) core as an
//! incidence matrix: point j (column j, from 1) lies in block i (row i, from 1) when the entry
//! is +1. Each row but the first has n/2 entries +1, one of them in column 0, so each block has
//! n/2 − 1 points. Two columns j ≠ j′ of a normalised matrix (Hᵀ is Hadamard and normalised
//! too) are both +1 in n/4 rows, one of them row 0, so every pair of points lies in exactly
//! n/4 − 1 blocks: a symmetric 2-(n−1, n/2−1, n/4−1) design, for every order n ≥ 8 divisible by
//! 4 (Hall, Combinatorial Theory, 2nd ed. 1986, ch. 14 [recalled]; order 4 gives the degenerate
//! λ = 0 case). The pair counts are computed on the blocks listed, not assumed.

use super::{write_csv, DeriveError};
use crate::matrix::Matrix;
use crate::verify::Verified;
use serde::Serialize;

/// A symmetric 2-(v, k, λ) design, points and blocks counted from 0.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct SymmetricDesign {
    pub kind: &'static str,
    pub order: usize,
    pub source_id: String,
    pub normalized_id: String,
    /// Points: v = n − 1 (point p is column p + 1 of the normalised matrix).
    pub v: usize,
    /// Blocks: b = v (block i is row i + 1).
    pub b: usize,
    /// Points per block.
    pub k: usize,
    /// Blocks through any two points.
    pub lambda: usize,
    /// Computed: every block has k points and every pair of points lies in exactly λ blocks.
    pub verified_pairs: bool,
    /// Block i's points, from 0.
    pub blocks: Vec<Vec<usize>>,
    pub reference: &'static str,
}

/// The largest order whose design is made: checking every pair of points costs n³/64.
pub const DESIGN_MAX_ORDER: usize = 4096;

/// The design of `h`, which needs order ≥ 4.
pub fn symmetric_design(h: &Verified) -> Result<SymmetricDesign, DeriveError> {
    let n = h.order();
    if n < 4 {
        return Err(DeriveError::new("matrix", format!("the symmetric design needs an order of at least 4 (a multiple of 4); this matrix has order {n}")));
    }
    if n > DESIGN_MAX_ORDER {
        return Err(DeriveError::new(
            "matrix",
            format!("the symmetric design is made (and its pairs checked) up to order {DESIGN_MAX_ORDER}; this matrix has order {n}"),
        ));
    }
    let hn = h.matrix().normalized();
    let v = n - 1;
    // Incidence by points: bit i of point p's row is set when point p lies in block i.
    let by_point = Matrix::from_fn(v, v, |p, i| !hn.is_negative(i + 1, p + 1));
    let blocks: Vec<Vec<usize>> = (0..v)
        .map(|i| (0..v).filter(|&p| by_point.is_negative(p, i)).collect())
        .collect();
    let (k, lambda) = (n / 2 - 1, n / 4 - 1);
    let mut ok = blocks.iter().all(|b| b.len() == k);
    for p in 0..v {
        for q in p + 1..v {
            let common: u32 = by_point
                .row_words(p)
                .iter()
                .zip(by_point.row_words(q))
                .map(|(a, b)| (a & b).count_ones())
                .sum();
            ok &= common as usize == lambda;
        }
    }
    Ok(SymmetricDesign {
        kind: "symmetric-design",
        order: n,
        source_id: h.id().to_owned(),
        normalized_id: crate::id::matrix_id(&hn),
        v,
        b: v,
        k,
        lambda,
        verified_pairs: ok,
        blocks,
        reference: "Hall, Combinatorial Theory (2nd ed., 1986), ch. 14",
    })
}

impl SymmetricDesign {
    /// CSV: the incidence matrix, one line per block, `1` where the point lies in it.
    pub fn write_csv(&self, out: &mut dyn std::io::Write) -> std::io::Result<()> {
        let rows = self.blocks.iter().map(|b| {
            let mut r = vec!["0"; self.v];
            for &p in b {
                r[p] = "1";
            }
            r
        });
        write_csv(rows, out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, sylvester};

    #[test]
    fn every_pair_lies_in_lambda_blocks() {
        for h in [
            sylvester(3).unwrap(),
            paley_one(11).unwrap(),
            paley_one(23).unwrap(),
            sylvester(6).unwrap(),
        ] {
            let d = symmetric_design(&h).unwrap();
            assert!(d.verified_pairs);
            assert_eq!(
                (d.v, d.k, d.lambda),
                (h.order() - 1, h.order() / 2 - 1, h.order() / 4 - 1)
            );
        }
    }
}
