//! Exact linear algebra over GF(3), bit-sliced, for the completion of erased entries.
//!
//! Every linear equation with integer coefficients that a completion satisfies over ℤ also holds
//! modulo 3, and +1 and −1 stay distinct modulo 3. So if Gauss–Jordan elimination modulo 3
//! shows that an unknown is fixed (its pivot row has no free column), every integer solution
//! with entries ±1 has that value there: the conclusion is a proof, not an estimate. An
//! unknown forced to 0 modulo 3, or an inconsistent system, proves that no ±1 solution exists.
//! (Working modulo 3 can only lose information, never invent it: the rank modulo 3 is at most
//! the rank over ℚ.)
//!
//! A vector over GF(3) is two bit planes: `nz` (the entry is non-zero) and `sg` (the entry is 2,
//! that is −1), 64 entries to a word, so a row operation is about ten word operations per 64
//! entries. Natively the rows of each elimination step are shared among the cores
//! (rayon); in wasm32 one thread does them.

/// A linear system over GF(3) in `vars` unknowns; the right-hand side is column `vars`.
pub(crate) struct System {
    vars: usize,
    /// Words per bit plane.
    w: usize,
    /// Row k is `data[2wk .. 2w(k+1)]`: `w` words of `nz`, then `w` words of `sg`.
    data: Vec<u64>,
    rows: usize,
}

/// What elimination proved about each unknown.
pub(crate) enum Solved {
    /// No assignment of ±1 values satisfies the system.
    Contradiction,
    /// `Some(v)` (v = ±1) where the system fixes the unknown, `None` where it does not.
    Values(Vec<Option<i8>>),
}

impl System {
    pub(crate) fn new(vars: usize) -> System {
        System {
            vars,
            w: (vars + 1).div_ceil(64),
            data: Vec::new(),
            rows: 0,
        }
    }

    pub(crate) fn len(&self) -> usize {
        self.rows
    }

    /// Adds Σ coef·x_var = rhs, with coefficients ±1 and distinct unknowns.
    pub(crate) fn push(&mut self, terms: &[(usize, i8)], rhs: i64) {
        let w = self.w;
        let start = self.data.len();
        self.data.resize(start + 2 * w, 0);
        let row = &mut self.data[start..];
        let mut put = |col: usize, v: i64| {
            let v = v.rem_euclid(3);
            if v != 0 {
                row[col / 64] |= 1 << (col % 64);
                if v == 2 {
                    row[w + col / 64] |= 1 << (col % 64);
                }
            }
        };
        for &(var, coef) in terms {
            put(var, coef as i64);
        }
        put(self.vars, rhs);
        self.rows += 1;
    }

    fn get(&self, r: usize, col: usize) -> u8 {
        let base = 2 * self.w * r;
        let bit = 1u64 << (col % 64);
        if self.data[base + col / 64] & bit == 0 {
            0
        } else if self.data[base + self.w + col / 64] & bit == 0 {
            1
        } else {
            2
        }
    }

    /// Gauss–Jordan elimination; returns what is forced.
    pub(crate) fn solve(mut self) -> Solved {
        let (w, vars) = (self.w, self.vars);
        let stride = 2 * w;
        let mut rank = 0usize;
        let mut pivot_cols: Vec<usize> = Vec::new();
        let mut pivot = vec![0u64; stride];
        for col in 0..vars {
            if rank == self.rows {
                break;
            }
            let (word, bit) = (col / 64, 1u64 << (col % 64));
            let Some(p) = (rank..self.rows).find(|&r| self.data[stride * r + word] & bit != 0)
            else {
                continue;
            };
            if p != rank {
                let (a, b) = self.data.split_at_mut(stride * p);
                a[stride * rank..stride * (rank + 1)].swap_with_slice(&mut b[..stride]);
            }
            // Scale the pivot row so the pivot is 1 (negate it if it is 2).
            let prow = &mut self.data[stride * rank..stride * (rank + 1)];
            if prow[w + word] & bit != 0 {
                for k in 0..w {
                    prow[w + k] = !prow[w + k] & prow[k];
                }
            }
            pivot.copy_from_slice(prow);
            let (pn, ps) = pivot.split_at(w);
            let at = rank;
            let update = |(r, row): (usize, &mut [u64])| {
                if r == at || row[word] & bit == 0 {
                    return;
                }
                // row −= a·pivot with a = row's entry: a = 1 adds 2·pivot, a = 2 adds pivot.
                let flip = if row[w + word] & bit == 0 {
                    u64::MAX
                } else {
                    0
                };
                let (tn, ts) = row.split_at_mut(w);
                add_into(
                    &mut tn[word..],
                    &mut ts[word..],
                    &pn[word..],
                    &ps[word..],
                    flip,
                );
            };
            let rows = &mut self.data[..stride * self.rows];
            // Natively the rows are shared among the cores; in wasm32 one thread does them all.
            #[cfg(not(target_arch = "wasm32"))]
            {
                use rayon::prelude::*;
                rows.par_chunks_mut(stride)
                    .enumerate()
                    .with_min_len(256)
                    .for_each(update);
            }
            #[cfg(target_arch = "wasm32")]
            rows.chunks_mut(stride).enumerate().for_each(update);
            pivot_cols.push(col);
            rank += 1;
        }
        // A row 0 = c with c ≠ 0 is a contradiction.
        for r in rank..self.rows {
            if self.get(r, vars) != 0 {
                return Solved::Contradiction;
            }
        }
        let mut values = vec![None; vars];
        let (last_word, last_mask) = (vars / 64, (1u64 << (vars % 64)) - 1);
        for (k, &col) in pivot_cols.iter().enumerate() {
            let row = &self.data[stride * k..stride * k + w];
            // The pivot row fixes its unknown when no other unknown is left in it.
            let others = row.iter().enumerate().any(|(i, &x)| {
                let mut x = if i == col / 64 {
                    x & !(1u64 << (col % 64))
                } else {
                    x
                };
                if i == last_word {
                    x &= last_mask;
                } else if i > last_word {
                    x = 0;
                }
                x != 0
            });
            if others {
                continue;
            }
            values[col] = match self.get(k, vars) {
                0 => return Solved::Contradiction,
                1 => Some(1),
                _ => Some(-1),
            };
        }
        Solved::Values(values)
    }
}

/// (tn, ts) += (pn, ps ^ flip) over GF(3), word by word.
#[inline]
fn add_into(tn: &mut [u64], ts: &mut [u64], pn: &[u64], ps: &[u64], flip: u64) {
    for (((a, s), &b), &t) in tn.iter_mut().zip(ts.iter_mut()).zip(pn).zip(ps) {
        let (n1, s1, n2, s2) = (*a, *s, b, t ^ flip);
        let same = n1 & n2 & !(s1 ^ s2);
        *a = (n1 ^ n2) | same;
        *s = (n1 & !n2 & s1) | (n2 & !n1 & s2) | (same & !s1);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn small_system_is_solved_exactly() {
        // x0 + x1 = 0, x0 − x1 = 2, x2 free: x0 = 1, x1 = −1 over ℤ [worked by hand].
        let mut s = System::new(3);
        s.push(&[(0, 1), (1, 1)], 0);
        s.push(&[(0, 1), (1, -1)], 2);
        match s.solve() {
            Solved::Values(v) => assert_eq!(v, vec![Some(1), Some(-1), None]),
            Solved::Contradiction => panic!("consistent"),
        }
    }

    #[test]
    fn a_value_of_zero_is_a_contradiction() {
        // x0 + x1 = 0 and x0 − x1 = 0 force x0 = 0, which is not ±1.
        let mut s = System::new(2);
        s.push(&[(0, 1), (1, 1)], 0);
        s.push(&[(0, 1), (1, -1)], 0);
        assert!(matches!(s.solve(), Solved::Contradiction));
    }

    #[test]
    fn addition_table_of_gf3() {
        // Every pair of GF(3) elements, in every one of 64 lanes, against integer arithmetic.
        for a in 0..3u8 {
            for b in 0..3u8 {
                for neg in [false, true] {
                    let enc = |v: u8| -> (u64, u64) {
                        match v {
                            0 => (0, 0),
                            1 => (u64::MAX, 0),
                            _ => (u64::MAX, u64::MAX),
                        }
                    };
                    let (mut n1, mut s1) = (vec![enc(a).0], vec![enc(a).1]);
                    let (n2, s2) = enc(b);
                    add_into(
                        &mut n1,
                        &mut s1,
                        &[n2],
                        &[s2],
                        if neg { u64::MAX } else { 0 },
                    );
                    let want = (a as i32 + if neg { -(b as i32) } else { b as i32 }).rem_euclid(3);
                    let got = if n1[0] == 0 {
                        0
                    } else if s1[0] == 0 {
                        1
                    } else {
                        2
                    };
                    assert_eq!(got, want, "{a} {} {b}", if neg { "-" } else { "+" });
                }
            }
        }
    }
}
