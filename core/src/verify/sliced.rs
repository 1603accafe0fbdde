//! The bit-sliced exact check for wasm32 with `simd128`: 128 pairs at once, one lane per pair.
//!
//! The popcount tile spends most of its time in `i8x16.popcnt`, which V8 lowers on x86-64 to
//! a nibble-table sequence of about eight instructions. This kernel counts without it. Fix a
//! panel of up to 256 rows j (two blocks of 128) and transpose it, so that column c of the
//! panel is one `v128` per block whose lane t is the entry of row j₀ + t in column c. For a row
//! i, let S be the smaller of the sets of columns where row i has a −1 (S₁) or a +1 (S₀). The
//! number of columns where rows i and j differ is
//!
//! - |S₁| + pop(j) − 2·X(j) when S = S₁, and
//! - 2·X(j) + |S₁| − pop(j) when S = S₀,
//!
//! where pop(j) is the number of −1 entries of row j and X(j) is the number of them in the
//! columns of S. Rows i and j are orthogonal exactly when they differ in n/2 columns, that is
//! when 2·X(j) = pop(j) − d with d = | |S₁| − n/2 |, in both cases. X is a sum of the panel's
//! columns over S, at most n/2 of them: one `v128` per column and block counts 128 pairs, and
//! the sum is kept bit-sliced (plane k holds bit k of every lane's count) by carry-save adders,
//! sixteen columns per tree, as in the Harley–Seal population count (H. S. Warren, *Hacker's
//! Delight*, 2nd ed., Addison-Wesley 2012, §5-1; W. Muła, N. Kurz and D. Lemire, "Faster
//! population counts using AVX2 instructions", *The Computer Journal* 61(1), 2018), with a
//! second tree over the first tree's sixteens and a ripple counter above that. The comparison
//! with pop(j) − d is done bit-sliced as well, for all 128 lanes at once; only a lane that
//! fails is looked at one by one, and its inner product is recounted with `popcount`.
//!
//! It costs about six vector instructions per column of S and block, against about ten per two
//! words and pair for the tile, and S holds at most half the columns.
//!
//! Limits: an even number of columns (with an odd number no two rows are orthogonal, and the
//! tile reports them) and fewer than 65 535 columns (the counts' bit planes are sized for
//! that).

use super::PairTally;
use crate::matrix::{transpose64, Matrix};
use std::arch::wasm32::*;

/// Lanes per block.
const LANES: usize = 128;
/// Blocks per pass over S: one list of S serves this many blocks of 128 rows j.
pub const BLOCKS: usize = 2;
/// Bit planes of the counts compared: counts and pop(j) are below 2¹⁸.
const PLANES: usize = 18;

/// Whether this kernel can check `m`.
pub fn fits(m: &Matrix) -> bool {
    fits_shape(m.rows(), m.cols())
}

/// Whether this kernel can check a matrix of `rows` × `cols`.
pub fn fits_shape(rows: usize, cols: usize) -> bool {
    cols % 2 == 0 && cols < u16::MAX as usize && rows >= 2
}

/// A carry-save adder on 128 lanes: adds `a` and `b` into the sum bits `acc` and returns the
/// carries, of twice the weight.
#[inline(always)]
fn csa(acc: &mut v128, a: v128, b: v128) -> v128 {
    let u = v128_xor(*acc, a);
    // The majority of acc, a, b: b where acc and a differ, acc where they agree.
    let carry = v128_bitselect(b, *acc, u);
    *acc = v128_xor(u, b);
    carry
}

/// Adds eight vectors `x(0..8)` into the counters (ones, twos, fours) and returns the carry
/// of weight eight.
#[inline(always)]
fn add8(x: impl Fn(usize) -> v128, o: &mut v128, t: &mut v128, f: &mut v128) -> v128 {
    let ta = csa(o, x(0), x(1));
    let tb = csa(o, x(2), x(3));
    let fa = csa(t, ta, tb);
    let ta = csa(o, x(4), x(5));
    let tb = csa(o, x(6), x(7));
    let fb = csa(t, ta, tb);
    csa(f, fa, fb)
}

/// Adds sixteen vectors `x(0..16)` into the counters `s` = (ones, twos, fours, eights) and
/// returns the carry of weight sixteen.
#[inline(always)]
fn add16(x: impl Fn(usize) -> v128, s: &mut [v128; 4]) -> v128 {
    let [o, t, f, e] = s;
    let ea = add8(&x, o, t, f);
    let eb = add8(|k| x(k + 8), o, t, f);
    csa(e, ea, eb)
}

/// Bit positions of each byte value, for writing the set bits of a word as indices.
static POSITIONS: [[u8; 8]; 256] = {
    let mut t = [[0u8; 8]; 256];
    let mut b = 0;
    while b < 256 {
        let (mut k, mut n) = (0, 0);
        while k < 8 {
            if (b >> k) & 1 == 1 {
                t[b][n] = k as u8;
                n += 1;
            }
            k += 1;
        }
        b += 1;
    }
    t
};

/// Bytes from one column of the transposed panel to the next.
const STRIDE: u32 = (BLOCKS * 16) as u32;

/// Writes the columns of S for a row (its words, complemented when `flip`, the last one cut
/// to `cols`) into `out` as byte offsets into the transposed panel, padded with the offset of
/// column `cols` (all zero) to a multiple of sixteen; returns the padded length. `out` holds
/// at least cols + 24 entries. (Offsets rather than indices save the kernel a shift per
/// column: about 15% at order 4096.)
fn columns_of(row: &[u64], cols: usize, flip: bool, out: &mut [u32]) -> usize {
    debug_assert!(out.len() >= cols + 24);
    let x = if flip { !0u64 } else { 0 };
    let mut len = 0usize;
    for (k, &w0) in row.iter().enumerate() {
        let mut w = w0 ^ x;
        let left = cols - k * 64;
        if left < 64 {
            w &= (1u64 << left) - 1;
        }
        for by in 0..8 {
            let b = ((w >> (8 * by)) & 0xff) as usize;
            let base = (k * 64 + 8 * by) as u32;
            // Eight writes whatever the byte, then advance by its count: no branch per bit.
            // `len` ≤ (columns so far) and `out` has eight to spare past `cols`.
            let dst = &mut out[len..len + 8];
            for (d, &p) in dst.iter_mut().zip(&POSITIONS[b]) {
                *d = (base + p as u32) * STRIDE;
            }
            len += b.count_ones() as usize;
        }
    }
    while len % 16 != 0 {
        out[len] = cols as u32 * STRIDE;
        len += 1;
    }
    len
}

/// One lane's bit as a `v128` with only that lane set.
#[inline]
fn lane_bit(t: usize) -> v128 {
    if t < 64 {
        u64x2(1 << t, 0)
    } else {
        u64x2(0, 1 << (t - 64))
    }
}

/// The lanes t with `from <= t < to` (lanes are bits, lane 0 the lowest of the low half).
#[inline]
fn lane_range(from: usize, to: usize) -> v128 {
    let half = |lo: usize| -> u64 {
        let (a, b) = (from.clamp(lo, lo + 64) - lo, to.clamp(lo, lo + 64) - lo);
        if a >= b {
            0
        } else {
            let hi = if b == 64 { !0u64 } else { (1u64 << b) - 1 };
            hi & (!0u64 << a)
        }
    };
    u64x2(half(0), half(64))
}

/// The transposed panel: `cols + 1` columns (the last all zero, for padding) of `BLOCKS`
/// vectors each, and pop(j) of its rows bit-sliced.
struct Panel {
    columns: Vec<v128>,
    pop: [[v128; PLANES]; BLOCKS],
    rows: [v128; BLOCKS],
}

fn transpose_panel(m: &Matrix, j_lo: usize, j_hi: usize) -> Panel {
    let cols = m.cols();
    let z = u64x2(0, 0);
    let mut columns = vec![z; (cols + 1) * BLOCKS];
    let mut block = [0u64; 64];
    let mut halves = vec![[0u64; 2]; cols];
    for b in 0..BLOCKS {
        for h in 0..2 {
            let r0 = j_lo + b * LANES + h * 64;
            for bj in 0..m.words_per_row() {
                for (k, slot) in block.iter_mut().enumerate() {
                    *slot = if r0 + k < j_hi {
                        m.row_words(r0 + k)[bj]
                    } else {
                        0
                    };
                }
                transpose64(&mut block);
                for (k, &word) in block.iter().enumerate().take((cols - bj * 64).min(64)) {
                    halves[bj * 64 + k][h] = word;
                }
            }
        }
        for (c, hw) in halves.iter().enumerate() {
            columns[c * BLOCKS + b] = u64x2(hw[0], hw[1]);
        }
    }
    let mut pop = [[z; PLANES]; BLOCKS];
    let mut rows = [z; BLOCKS];
    for j in j_lo..j_hi {
        let t = j - j_lo;
        let (b, lane) = (t / LANES, lane_bit(t % LANES));
        rows[b] = v128_or(rows[b], lane);
        let p = m.row_negatives(j);
        for (k, plane) in pop[b].iter_mut().enumerate() {
            if (p >> k) & 1 == 1 {
                *plane = v128_or(*plane, lane);
            }
        }
    }
    Panel { columns, pop, rows }
}

/// Adds the carry `c` (of the weight of plane 0) into the ripple counter `q`.
#[inline(always)]
fn ripple(q: &mut [v128], mut c: v128) {
    for p in q.iter_mut() {
        let carry = v128_and(*p, c);
        *p = v128_xor(*p, c);
        c = carry;
        if !v128_any_true(c) {
            return;
        }
    }
}

/// Every pair (i, j), i < j, with j in `j_lo..j_hi` (at most `BLOCKS`·128 rows), into `tally`.
pub fn panel_pass(m: &Matrix, j_lo: usize, j_hi: usize, tally: &mut PairTally) {
    debug_assert!(fits(m) && j_hi - j_lo <= BLOCKS * LANES);
    let cols = m.cols();
    let panel = transpose_panel(m, j_lo, j_hi);
    let z = u64x2(0, 0);
    let mut list = vec![0u32; cols + 24];
    let blocks = (j_hi - j_lo).div_ceil(LANES);
    for i in 0..j_hi.saturating_sub(1) {
        let row = m.row_words(i);
        let neg = m.row_negatives(i);
        let flip = neg > cols / 2;
        let len = columns_of(row, cols, flip, &mut list);
        // Blocks with a lane j > i.
        let b0 = (i + 1).saturating_sub(j_lo) / LANES;
        let mut low = [[z; 4]; BLOCKS];
        let mut high = [[z; 4]; BLOCKS];
        let mut sixteens = [[z; 16]; BLOCKS];
        let mut top = [[z; PLANES - 8]; BLOCKS];
        let mut filled = 0;
        let cs = panel.columns.as_ptr() as *const u8;
        for chunk in list[..len].chunks_exact(16) {
            for b in b0..blocks {
                // SAFETY: every entry of `list` is the offset of a column c ≤ cols, and the
                // panel holds (cols + 1)·BLOCKS vectors, so c·STRIDE + 16·b is inside it.
                let x = |k: usize| unsafe {
                    v128_load(cs.add(*chunk.get_unchecked(k) as usize + 16 * b) as *const v128)
                };
                sixteens[b][filled] = add16(x, &mut low[b]);
            }
            filled += 1;
            if filled == 16 {
                for b in b0..blocks {
                    let c = add16(|k| sixteens[b][k], &mut high[b]);
                    ripple(&mut top[b], c);
                }
                filled = 0;
            }
        }
        if filled > 0 {
            for b in b0..blocks {
                sixteens[b][filled..].fill(z);
                let c = add16(|k| sixteens[b][k], &mut high[b]);
                ripple(&mut top[b], c);
            }
        }
        let d = neg.abs_diff(cols / 2);
        for b in b0..blocks {
            // X's planes, low to high.
            let x: [v128; PLANES] = std::array::from_fn(|k| match k {
                0..4 => low[b][k],
                4..8 => high[b][k - 4],
                _ => top[b][k - 8],
            });
            // pop(j) − d, bit-sliced with a borrow; it must be even, not negative, and twice X.
            let mut borrow = z;
            let mut differs = z;
            for (k, &p) in panel.pop[b].iter().enumerate() {
                let (bit, next) = if (d >> k) & 1 == 0 {
                    (v128_xor(p, borrow), v128_andnot(borrow, p))
                } else {
                    (v128_not(v128_xor(p, borrow)), v128_or(v128_not(p), borrow))
                };
                borrow = next;
                let want = if k == 0 { z } else { x[k - 1] };
                differs = v128_or(differs, v128_xor(bit, want));
            }
            differs = v128_or(differs, v128_or(borrow, x[PLANES - 1]));
            let base = j_lo + b * LANES;
            let lanes = v128_and(
                panel.rows[b],
                lane_range((i + 1).saturating_sub(base), LANES),
            );
            let bad = v128_and(differs, lanes);
            if v128_any_true(bad) {
                for (h, mut w) in [u64x2_extract_lane::<0>(bad), u64x2_extract_lane::<1>(bad)]
                    .into_iter()
                    .enumerate()
                {
                    while w != 0 {
                        let j = base + h * 64 + w.trailing_zeros() as usize;
                        w &= w - 1;
                        let dot = m.row_dot(i, j);
                        if dot != 0 {
                            tally.record(i, j, dot);
                        }
                    }
                }
            }
        }
        if tally.done() {
            return;
        }
    }
}
