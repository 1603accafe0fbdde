//! Several wrong signs: suspects, projection, rounding, and the exact check.
//!
//! If H′ is Hadamard and the observed H differs from it in a few entries, the rows of H that
//! carry no wrong entry are still pairwise orthogonal, while a row with wrong entries fails with
//! most others. [`wrong_signs`] drops, one at a time, the row failing with the most rows still
//! kept until the kept rows are pairwise orthogonal (the good rows G); the dropped ones are the
//! suspects. The true rows of the suspects span the orthogonal complement of G, so each
//! suspect's true row is the ±1 vector of that complement nearest the observed one: project the
//! observed row v onto the complement, exactly in integers as n·v − Σ_{g∈G} ⟨v, g⟩·g (the good
//! rows are orthogonal with norm² n), and take signs. The same is tried on the columns, and the
//! smaller correction is kept. Nothing is reported unless the corrected matrix passes the exact
//! check.
//!
//! With k suspects each carrying f wrong entries, coordinate c of the projection divided by n is
//! (1 − 2f/n)·h′_c plus k − 1 terms of size at most 2f/n, so the signs are right whenever
//! 2fk < n − 2f [derived].
//!
//! **Uniqueness.** Two distinct Hadamard matrices A ≠ B of order n differ in at least n entries
//! [derived here]: write δ_k for the number of entries where rows a_k and b_k differ. For j ≠ k,
//! ⟨b_j, a_k⟩ = ⟨b_j, a_k − b_k⟩, so |⟨b_j, a_k⟩| ≤ 2δ_k; and expanding b_j in the orthogonal
//! basis of A's rows gives Σ_{k≠j} ⟨b_j, a_k⟩² = n² − (n − 2δ_j)² = 4δ_j(n − δ_j). Taking j with
//! the largest δ_j, δ_j(n − δ_j) ≤ Σ_{k≠j} δ_k² ≤ δ_j·(D − δ_j) where D = Σ δ_k, so D ≥ n.
//! Hence a correction changing d entries with 2d < n is the only Hadamard matrix within d
//! changes of the observed matrix (another one would be within 2d < n of it), and it is the
//! nearest. For 2d ≥ n the question is left open and reported as such
//! (references.md#r14-erasures-and-wrong-signs).

use crate::matrix::Matrix;
use crate::verify::{certify, order_possible, Report, Verified};

/// Which lines were rebuilt.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Axis {
    Rows,
    Columns,
}

/// Wrong signs found and corrected.
#[derive(Clone, Debug)]
pub struct SignRepair {
    /// Every corrected entry, (row, column) from 0, in row-major order.
    pub entries: Vec<(usize, usize)>,
    /// The id of the corrected matrix.
    pub corrected_id: String,
    /// The corrected matrix, verified.
    pub corrected: Verified,
    /// Whether suspect rows or suspect columns were rebuilt.
    pub axis: Axis,
    /// The lines rebuilt (row or column indices, from 0).
    pub suspects: Vec<usize>,
    /// True when 2·d < n, which proves that no other Hadamard matrix is within d changes.
    pub unique_within_distance: bool,
}

/// Most suspects tried: beyond a quarter of the lines the observed matrix is not "near" one.
fn max_suspects(n: usize) -> usize {
    n / 4
}

/// Work limit (rows × rows × columns) of the projection, so a hopeless input costs little.
const MAX_WORK: u64 = 3_000_000_000;

/// Finds a set of wrong signs whose correction makes `m` Hadamard, if the failures in `report`
/// (`verify(m)`'s) are explained by few rows or few columns carrying them.
pub fn wrong_signs(m: &Matrix, report: &Report) -> Option<SignRepair> {
    let n = m.rows();
    if report.hadamard || !m.is_square() || !order_possible(n) || n < 2 {
        return None;
    }
    // Near a Hadamard matrix most row pairs are orthogonal; a random matrix has almost none.
    if report.failing_pairs_total > (n * n / 4) as u64 {
        return None;
    }
    // One wrong sign has a cheaper exact test (its pattern of failing pairs).
    if let Some(r) = super::single_wrong_entry(m, report) {
        return Some(SignRepair {
            entries: vec![(r.row, r.col)],
            corrected_id: r.corrected_id,
            corrected: r.corrected,
            axis: Axis::Rows,
            suspects: vec![r.row],
            unique_within_distance: 2 < n,
        });
    }
    let by_rows = rebuild(m).map(|(fixed, sus)| (fixed, sus, Axis::Rows));
    let by_cols =
        rebuild(&m.transpose()).map(|(fixed, sus)| (fixed.transpose(), sus, Axis::Columns));
    type Candidate = (Verified, Vec<(usize, usize)>, Vec<usize>, Axis);
    let mut best: Option<Candidate> = None;
    for (fixed, suspects, axis) in [by_rows, by_cols].into_iter().flatten() {
        let Ok(v) = certify(fixed) else { continue };
        let entries = differences(m, v.matrix());
        if best.as_ref().is_none_or(|b| entries.len() < b.1.len()) {
            best = Some((v, entries, suspects, axis));
        }
    }
    let (v, entries, suspects, axis) = best?;
    Some(SignRepair {
        unique_within_distance: 2 * entries.len() < n,
        corrected_id: v.id().to_string(),
        corrected: v,
        entries,
        axis,
        suspects,
    })
}

fn differences(a: &Matrix, b: &Matrix) -> Vec<(usize, usize)> {
    let mut out = Vec::new();
    for i in 0..a.rows() {
        for (k, (x, y)) in a.row_words(i).iter().zip(b.row_words(i)).enumerate() {
            let mut d = x ^ y;
            while d != 0 {
                out.push((i, k * 64 + d.trailing_zeros() as usize));
                d &= d - 1;
            }
        }
    }
    out
}

/// Rebuilds the suspect rows of `m` from the orthogonal complement of the others; returns the
/// candidate (not yet checked) and the suspects.
fn rebuild(m: &Matrix) -> Option<(Matrix, Vec<usize>)> {
    let n = m.rows();
    let words = m.words_per_row();
    // fails[i]: bit j set when rows i and j are not orthogonal.
    let mut fails = vec![0u64; n * words];
    let mut count = vec![0usize; n];
    for i in 0..n {
        for j in i + 1..n {
            if m.row_dot(i, j) != 0 {
                fails[i * words + j / 64] |= 1 << (j % 64);
                fails[j * words + i / 64] |= 1 << (i % 64);
                count[i] += 1;
                count[j] += 1;
            }
        }
    }
    let mut kept = vec![true; n];
    let mut suspects = Vec::new();
    loop {
        let (worst, &c) = count
            .iter()
            .enumerate()
            .filter(|&(i, _)| kept[i])
            .max_by_key(|&(i, &c)| (c, std::cmp::Reverse(i)))?;
        if c == 0 {
            break;
        }
        if suspects.len() >= max_suspects(n) {
            return None;
        }
        kept[worst] = false;
        suspects.push(worst);
        for j in 0..n {
            if fails[worst * words + j / 64] >> (j % 64) & 1 == 1 && kept[j] {
                count[j] -= 1;
            }
        }
    }
    if suspects.is_empty() {
        return None;
    }
    let good: Vec<usize> = (0..n).filter(|&i| kept[i]).collect();
    if (suspects.len() as u64) * (good.len() as u64) * (n as u64) > MAX_WORK {
        return None;
    }
    let mut fixed = m.clone();
    let mut acc = vec![0i64; n];
    for &b in &suspects {
        // acc = n·v − Σ_g ⟨v, g⟩·g, with g_c = 1 − 2·bit_gc.
        let mut total = 0i64;
        acc.iter_mut().for_each(|a| *a = 0);
        for &g in &good {
            let d = m.row_dot(b, g);
            if d == 0 {
                continue;
            }
            total += d;
            for (k, &word) in m.row_words(g).iter().enumerate() {
                let mut bits = word;
                while bits != 0 {
                    acc[k * 64 + bits.trailing_zeros() as usize] += 2 * d;
                    bits &= bits - 1;
                }
            }
        }
        for (c, &a) in acc.iter().enumerate() {
            let p = n as i64 * m.get(b, c) as i64 - total + a;
            if p == 0 {
                return None;
            }
            fixed.set_negative(b, c, p < 0);
        }
    }
    Some((fixed, suspects))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::derive::rng::SplitMix64;
    use crate::verify::verify;

    use crate::repair::tests::sylvester;

    #[test]
    fn random_wrong_signs_are_corrected_in_order_128() {
        let h = sylvester(7);
        let mut rng = SplitMix64::new(15);
        for _ in 0..10 {
            let mut bad = h.clone();
            let mut flipped = Vec::new();
            while flipped.len() < 8 {
                let (r, c) = (rng.below(128) as usize, rng.below(128) as usize);
                if !flipped.contains(&(r, c)) {
                    flipped.push((r, c));
                    bad.flip(r, c);
                }
            }
            flipped.sort_unstable();
            let rep = wrong_signs(&bad, &verify(&bad)).expect("8 wrong signs in order 128");
            assert_eq!(rep.corrected.matrix(), &h);
            assert_eq!(rep.entries, flipped);
            assert!(rep.unique_within_distance);
        }
    }

    #[test]
    fn a_random_matrix_is_not_repaired() {
        let mut rng = SplitMix64::new(7);
        let m = Matrix::from_fn(64, 64, |_, _| rng.next_u64() & 1 == 1);
        assert!(wrong_signs(&m, &verify(&m)).is_none());
    }

    #[test]
    fn a_whole_wrong_column_is_rebuilt_along_the_columns() {
        // Many wrong signs in one column: every row fails, but one column explains them.
        let h = sylvester(5);
        let mut bad = h.clone();
        // Ten rows is more than the quarter of the rows tried as suspects.
        let rows = [1, 3, 4, 9, 12, 17, 20, 25, 28, 30];
        for r in rows {
            bad.flip(r, 6);
        }
        let rep = wrong_signs(&bad, &verify(&bad)).expect("one column carries them");
        assert_eq!(rep.corrected.matrix(), &h);
        assert_eq!(rep.axis, Axis::Columns);
        assert_eq!(rep.entries, rows.map(|r| (r, 6)).to_vec());
        assert!(rep.unique_within_distance);
    }
}
