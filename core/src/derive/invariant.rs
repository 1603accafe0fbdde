//! Equivalence invariants: the 4-profile, and stronger invariants built from the same counts.
//!
//! Two Hadamard matrices are *equivalent* when one becomes the other by permuting rows and
//! columns and negating rows and columns. For four distinct rows i < j < k < l the number
//! |Σ_c h_ic·h_jc·h_kc·h_lc| is unchanged by negating a row (the sum changes sign) or a column
//! (four factors flip), and permutations only permute the quadruples. So the multiset of these
//! values over all C(n,4) quadruples, the *4-profile*, is an invariant (Cooper, Milas and
//! Wallis, "Hadamard equivalence", in Combinatorial Mathematics, LNM 686, 1978 [recalled]).
//! Every value is ≡ n (mod 8).
//!
//! Stronger, by the same argument:
//! - the 4-profile of the transpose (H is equivalent to K exactly when Hᵀ is to Kᵀ);
//! - the *row profiles*: for each row r, the counts of the values over the quadruples that
//!   contain r; the sorted list of these per-row counts is invariant, because an equivalence
//!   maps the quadruples through r to those through the image of r. Likewise for columns.
//!
//! - the *pair profiles*: the same counts over the quadruples through each pair of rows, as a
//!   sorted list; and for pairs of columns.
//!
//! The 4-profile, its transpose and the row and column profiles do not separate the five
//! classes of order 16 (two of them agree on all four); the pair profiles do (see the tests).
//! [`Invariants`] holds all six. Equal invariants prove nothing; a difference proves the
//! matrices inequivalent. Cost: C(n,4)·⌈n/64⌉ word operations for each of rows and columns.

use crate::matrix::Matrix;
use serde::Serialize;
use std::collections::BTreeMap;

/// A profile: value |Σ| ↦ number of quadruples with that value.
pub type Profile = BTreeMap<u64, u64>;

/// The 4-profile of the rows of `m` (any shape; rows are the points).
pub fn profile4(m: &Matrix) -> Profile {
    quadruples(m, false).0
}

/// The 4-profile, each row's profile (in row order) and each pair of rows' profile (sorted);
/// the lists are empty unless `per_row`.
fn quadruples(m: &Matrix, per_row: bool) -> (Profile, Vec<Profile>, Vec<Profile>) {
    let n = m.rows();
    let c = m.cols();
    let w = m.words_per_row();
    let mut histogram = vec![0u64; c + 1];
    // rows[r][d]: quadruples through row r whose product has d entries −1.
    let mut rows = if per_row {
        vec![vec![0u64; c + 1]; n]
    } else {
        Vec::new()
    };
    // pairs[i·n + j][d], i < j: the same for the quadruples through rows i and j.
    let mut pairs = if per_row {
        vec![vec![0u64; c + 1]; n * n]
    } else {
        Vec::new()
    };
    let mut ab = vec![0u64; w];
    let mut abc = vec![0u64; w];
    for i in 0..n {
        for j in i + 1..n {
            for (t, (x, y)) in ab.iter_mut().zip(m.row_words(i).iter().zip(m.row_words(j))) {
                *t = x ^ y;
            }
            for k in j + 1..n {
                for (t, (x, y)) in abc.iter_mut().zip(ab.iter().zip(m.row_words(k))) {
                    *t = x ^ y;
                }
                for l in k + 1..n {
                    let d = abc
                        .iter()
                        .zip(m.row_words(l))
                        .map(|(x, y)| (x ^ y).count_ones())
                        .sum::<u32>() as usize;
                    histogram[d] += 1;
                    if per_row {
                        for r in [i, j, k, l] {
                            rows[r][d] += 1;
                        }
                        for p in [
                            i * n + j,
                            i * n + k,
                            i * n + l,
                            j * n + k,
                            j * n + l,
                            k * n + l,
                        ] {
                            pairs[p][d] += 1;
                        }
                    }
                }
            }
        }
    }
    let fold = |h: &[u64]| -> Profile {
        let mut p = Profile::new();
        for (d, &k) in h.iter().enumerate() {
            if k > 0 {
                *p.entry((c as i64 - 2 * d as i64).unsigned_abs())
                    .or_default() += k;
            }
        }
        p
    };
    let mut pair_profiles: Vec<Profile> = (0..if per_row { n } else { 0 })
        .flat_map(|i| (i + 1..n).map(move |j| i * n + j))
        .map(|p| fold(&pairs[p]))
        .collect();
    pair_profiles.sort();
    (
        fold(&histogram),
        rows.iter().map(|h| fold(h)).collect(),
        pair_profiles,
    )
}

/// The invariants used to prove two matrices inequivalent, strongest last.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Invariants {
    /// The 4-profile of the rows.
    pub profile4: Profile,
    /// The 4-profile of the columns (of the transpose).
    pub profile4_transpose: Profile,
    /// Each row's profile over the quadruples through it, sorted.
    pub row_profiles: Vec<Profile>,
    /// Each column's profile, sorted.
    pub column_profiles: Vec<Profile>,
    /// Each pair of rows' profile, sorted.
    pub row_pair_profiles: Vec<Profile>,
    /// Each pair of columns' profile, sorted.
    pub column_pair_profiles: Vec<Profile>,
}

impl Invariants {
    /// All four invariants of a square matrix.
    pub fn of(m: &Matrix) -> Invariants {
        let (inv, _, _) = Invariants::with_lists(m);
        inv
    }

    /// The invariants, and each row's and each column's own profile in their given order.
    pub fn with_lists(m: &Matrix) -> (Invariants, Vec<Profile>, Vec<Profile>) {
        let (profile4, rows, row_pair_profiles) = quadruples(m, true);
        let (profile4_transpose, cols, column_pair_profiles) = quadruples(&m.transpose(), true);
        let sorted = |v: &Vec<Profile>| {
            let mut s = v.clone();
            s.sort();
            s
        };
        let inv = Invariants {
            profile4,
            profile4_transpose,
            row_profiles: sorted(&rows),
            column_profiles: sorted(&cols),
            row_pair_profiles,
            column_pair_profiles,
        };
        (inv, rows, cols)
    }

    /// The name of the first invariant that differs, weakest first, or `None`.
    pub fn first_difference(&self, other: &Invariants) -> Option<&'static str> {
        if self.profile4 != other.profile4 {
            Some("profile4")
        } else if self.profile4_transpose != other.profile4_transpose {
            Some("profile4_transpose")
        } else if self.row_profiles != other.row_profiles {
            Some("row_profiles")
        } else if self.column_profiles != other.column_profiles {
            Some("column_profiles")
        } else if self.row_pair_profiles != other.row_pair_profiles {
            Some("row_pair_profiles")
        } else if self.column_pair_profiles != other.column_pair_profiles {
            Some("column_pair_profiles")
        } else {
            None
        }
    }

    /// The invariant called `name` (one of [`Invariants::first_difference`]'s answers) as JSON.
    pub fn value_of(&self, name: &str) -> serde_json::Value {
        let v = match name {
            "profile4" => serde_json::to_value(&self.profile4),
            "profile4_transpose" => serde_json::to_value(&self.profile4_transpose),
            "row_profiles" => serde_json::to_value(&self.row_profiles),
            "column_profiles" => serde_json::to_value(&self.column_profiles),
            "row_pair_profiles" => serde_json::to_value(&self.row_pair_profiles),
            "column_pair_profiles" => serde_json::to_value(&self.column_pair_profiles),
            _ => Ok(serde_json::Value::Null),
        };
        v.unwrap_or(serde_json::Value::Null)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::{paley_one, sylvester};

    fn map(pairs: &[(u64, u64)]) -> Profile {
        pairs.iter().copied().collect()
    }

    #[test]
    fn regression_values_from_constructions_md() {
        // references.md#r10-the-4-profile (the project's own computation, regression values only).
        assert_eq!(
            profile4(sylvester(3).unwrap().matrix()),
            map(&[(0, 56), (8, 14)])
        );
        assert_eq!(profile4(paley_one(11).unwrap().matrix()), map(&[(4, 495)]));
        assert_eq!(
            profile4(sylvester(4).unwrap().matrix()),
            map(&[(0, 1680), (16, 140)])
        );
        assert_eq!(
            profile4(paley_one(19).unwrap().matrix()),
            map(&[(4, 4560), (12, 285)])
        );
    }

    #[test]
    fn unchanged_by_an_equivalence() {
        let h = paley_one(19).unwrap().into_matrix();
        let mut g = h.clone();
        g.negate_row(3);
        g.negate_col(5);
        g.swap_rows(1, 7);
        let t = g.transpose();
        let mut g = t.clone();
        g.swap_rows(0, 13);
        let g = g.transpose();
        assert_eq!(Invariants::of(&h), Invariants::of(&g));
    }
}
