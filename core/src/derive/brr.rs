//! Balanced repeated replication (BRR): half-sample patterns for variance estimation in
//! surveys with two primary sampling units (PSUs) per stratum.
//!
//! One idea: give stratum h a row of a normalised Hadamard matrix of order n and replicate r a
//! column; in replicate r stratum h keeps PSU 1 when the entry is +1 and PSU 2 when it is −1.
//! Every row but the first has n/2 entries of each sign, so each PSU is used in exactly half
//! of the replicates (balance), and any two such rows are orthogonal, so each pair of strata
//! is split every way equally often (full orthogonal balance); the replicate variance
//! estimator is then the full half-sample estimator for linear statistics. The constant first
//! row is left out — a stratum given it would keep PSU 1 in every replicate and contribute no
//! variance — so k strata need n − 1 ≥ k, and the smallest usable order is the smallest known
//! order n > k. This is common practice in survey statistics with no single source; the
//! method is McCarthy's ("Replication: an approach to the analysis of data from complex
//! surveys", Vital and Health Statistics, Series 2, No. 14, 1966 [recalled]).
//!
//! The answer lists the n replicates as rows, each holding the k strata's signs.

use super::{orthogonal_and_balanced, write_csv, DeriveError};
use crate::verify::Verified;
use serde::Serialize;

/// The replicate sign patterns for k strata.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Replication {
    pub kind: &'static str,
    /// The number of strata k.
    pub strata: usize,
    /// The number of replicates: the order n of the matrix.
    pub replicates: usize,
    pub source_id: String,
    /// The id of the normalised matrix the signs are read from.
    pub normalized_id: String,
    /// Stratum h (from 1) uses row h of the normalised matrix; row 0, the constant row, is
    /// never used.
    pub rows_used: Vec<usize>,
    /// `signs[r][h−1]`: in replicate r (from 0), +1 keeps PSU 1 of stratum h, −1 keeps PSU 2.
    pub signs: Vec<Vec<i8>>,
    /// Computed on `signs`: each stratum keeps each PSU in half the replicates.
    pub balanced: bool,
    /// Computed on `signs`: any two strata's sign columns are orthogonal.
    pub orthogonal: bool,
    pub note: String,
    pub reference: &'static str,
}

/// The replicates for `strata` strata from `h`, which needs order > `strata`.
pub fn replication(h: &Verified, strata: usize) -> Result<Replication, DeriveError> {
    let n = h.order();
    if strata == 0 {
        return Err(DeriveError::new("strata", "give at least one stratum"));
    }
    if strata >= n {
        return Err(DeriveError::new("strata", format!("{strata} strata need a matrix of order greater than {strata} (the constant row is left out); this one has order {n}")));
    }
    if n.saturating_mul(strata) > super::MAX_CELLS {
        return Err(DeriveError::new(
            "strata",
            format!("{n} replicates × {strata} strata is more than the {} cells a replicate set is made with", super::MAX_CELLS),
        ));
    }
    let hn = h.matrix().normalized();
    let signs: Vec<Vec<i8>> = (0..n)
        .map(|r| (1..=strata).map(|s| hn.get(s, r)).collect())
        .collect();
    let (orthogonal, balanced) = orthogonal_and_balanced(&signs, strata);
    Ok(Replication {
        kind: "balanced-repeated-replication",
        strata,
        replicates: n,
        source_id: h.id().to_owned(),
        normalized_id: crate::id::matrix_id(&hn),
        rows_used: (1..=strata).collect(),
        signs,
        balanced,
        orthogonal,
        note: format!("{n} replicates for {strata} strata: in replicate r, stratum h keeps PSU 1 where the sign is +1 and PSU 2 where it is −1 (weight 2 for the kept PSU, 0 for the other). Rows 1..{strata} of the normalised matrix are used; its constant row 0 is left out."),
        reference: "McCarthy, Vital and Health Statistics Series 2 No. 14 (1966): common practice, no single source",
    })
}

impl Replication {
    /// CSV: a header `replicate,stratum_1,…`, then one line per replicate of ±1 signs.
    pub fn write_csv(&self, out: &mut dyn std::io::Write) -> std::io::Result<()> {
        let header = std::iter::once("replicate".to_owned())
            .chain((1..=self.strata).map(|h| format!("stratum_{h}")))
            .collect::<Vec<_>>();
        let body = self.signs.iter().enumerate().map(|(r, row)| {
            std::iter::once(r.to_string())
                .chain(row.iter().map(|s| s.to_string()))
                .collect::<Vec<_>>()
        });
        write_csv(std::iter::once(header).chain(body), out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::paley_one;

    #[test]
    fn eleven_strata_from_order_twelve_are_balanced_and_orthogonal() {
        let r = replication(&paley_one(11).unwrap(), 11).unwrap();
        assert_eq!(
            (r.replicates, r.signs.len(), r.signs[0].len()),
            (12, 12, 11)
        );
        assert!(r.balanced && r.orthogonal);
        assert_eq!(
            replication(&paley_one(11).unwrap(), 12)
                .unwrap_err()
                .parameter,
            "strata"
        );
    }
}
