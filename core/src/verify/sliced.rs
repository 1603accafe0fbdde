//! The bit-sliced exact check: one bit lane per pair of rows, 128 pairs per `v128` in wasm32
//! with `simd128`, 256 per `__m256i` with AVX2 and 512 per `__m512i` with AVX-512.
//!
//! The popcount tile spends most of its time counting bits of rᵢ ⊕ rⱼ, one pair at a time.
//! This kernel counts without a population count. Fix a panel of rows j (`B` blocks of one
//! vector's lanes each) and transpose it, so that column c of the panel is one vector per
//! block whose lane t is the entry of row j₀ + t in column c. For a row i, let S be the smaller
//! of the sets of columns where row i has a −1 (S₁) or a +1 (S₀). The number of columns where
//! rows i and j differ is
//!
//! - |S₁| + pop(j) − 2·X(j) when S = S₁, and
//! - 2·X(j) + |S₁| − pop(j) when S = S₀,
//!
//! where pop(j) is the number of −1 entries of row j and X(j) is the number of them in the
//! columns of S. Rows i and j are orthogonal exactly when they differ in n/2 columns, that is
//! when 2·X(j) = pop(j) − d with d = | |S₁| − n/2 |, in both cases. X is a sum of the panel's
//! columns over S, at most n/2 of them: one vector per column and block counts a vector's worth
//! of pairs, and the sum is kept bit-sliced (plane k holds bit k of every lane's count) by
//! carry-save adders, sixteen columns per tree, as in the Harley–Seal population count
//! (H. S. Warren, *Hacker's Delight*, 2nd ed., Addison-Wesley 2012, §5-1; W. Muła, N. Kurz and
//! D. Lemire, "Faster population counts using AVX2 instructions", *The Computer Journal* 61(1),
//! 2018), with a second tree over the first tree's sixteens and a ripple counter above that.
//! The comparison with pop(j) − d is done bit-sliced as well, for all lanes at once; only a
//! lane that fails is looked at one by one, and its inner product is recounted exactly with
//! `popcount` ([`Matrix::row_dot`]).
//!
//! Cost: a carry-save adder is five bitwise instructions (two with AVX-512's three-input
//! `vpternlogq`), so a column of S costs about 5 + 1 load per block (2 + 1 with AVX-512),
//! plus the second tree (1/16 of that) — per vector of lanes, that is per 128, 256 or 512
//! pairs. S holds at most half the columns.
//!
//! The code is written once over the [`Lanes`] trait; each instruction set implements it and
//! has an entry point compiled for it (`#[target_feature]` natively, chosen at run time by
//! the caller; `simd128` in wasm32 at build time).
//!
//! Limits: an even number of columns (with an odd number no two rows are orthogonal, and the
//! tile reports them) and fewer than 65 535 columns (the counts' bit planes are sized for
//! that).

// Without a vector instruction set to instantiate it for (wasm32 without simd128, other
// architectures) the generic kernel is unused.
#![cfg_attr(
    not(any(
        target_arch = "x86_64",
        all(target_arch = "wasm32", target_feature = "simd128")
    )),
    allow(dead_code)
)]

use super::pass::PairTally;
use crate::matrix::{transpose64, Matrix};

/// Bit planes of the counts compared: counts and pop(j) are below 2¹⁸.
const PLANES: usize = 18;

/// Whether this kernel can check a matrix of `rows` × `cols`.
pub fn fits_shape(rows: usize, cols: usize) -> bool {
    cols.is_multiple_of(2) && cols < u16::MAX as usize && rows >= 2
}

/// A vector of one-bit lanes and the bitwise operations the kernel needs.
///
/// The implementations call instructions of one instruction set. They are only reached
/// through that set's entry points below, which the caller runs only on a CPU that has it.
pub(super) trait Lanes: Copy + Send + Sync {
    /// Lanes per vector (a multiple of 64).
    const LANES: usize;
    fn zero() -> Self;
    fn xor(a: Self, b: Self) -> Self;
    fn and(a: Self, b: Self) -> Self;
    fn or(a: Self, b: Self) -> Self;
    /// a ∧ ¬b.
    fn andnot(a: Self, b: Self) -> Self;
    fn not(a: Self) -> Self;
    fn any(a: Self) -> bool;
    /// The vector at `p` (any alignment).
    ///
    /// # Safety
    /// `p` points to `LANES / 8` readable bytes.
    unsafe fn load(p: *const u8) -> Self;
    /// The vector whose lanes 64k.. are the bits of `w[k]`.
    fn from_words(w: &[u64]) -> Self;
    /// The lanes as words, 64 at a time (`out` holds `LANES / 64`).
    fn to_words(self, out: &mut [u64]);
    /// A carry-save adder: adds `a` and `b` into the sum bits `acc` and returns the carries,
    /// of twice the weight.
    #[inline(always)]
    fn csa(acc: &mut Self, a: Self, b: Self) -> Self {
        let u = Self::xor(*acc, a);
        let carry = Self::or(Self::and(*acc, a), Self::and(u, b));
        *acc = Self::xor(u, b);
        carry
    }
}

/// Adds eight vectors `x(0..8)` into the counters (ones, twos, fours) and returns the carry
/// of weight eight.
#[inline(always)]
fn add8<V: Lanes>(x: impl Fn(usize) -> V, o: &mut V, t: &mut V, f: &mut V) -> V {
    let ta = V::csa(o, x(0), x(1));
    let tb = V::csa(o, x(2), x(3));
    let fa = V::csa(t, ta, tb);
    let ta = V::csa(o, x(4), x(5));
    let tb = V::csa(o, x(6), x(7));
    let fb = V::csa(t, ta, tb);
    V::csa(f, fa, fb)
}

/// Adds sixteen vectors `x(0..16)` into the counters `s` = (ones, twos, fours, eights) and
/// returns the carry of weight sixteen.
#[inline(always)]
fn add16<V: Lanes>(x: impl Fn(usize) -> V, s: &mut [V; 4]) -> V {
    let [o, t, f, e] = s;
    let ea = add8(&x, o, t, f);
    let eb = add8(|k| x(k + 8), o, t, f);
    V::csa(e, ea, eb)
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

/// Writes the columns of S for a row (its words, complemented when `flip`, the last one cut
/// to `cols`) into `out` as byte offsets into the transposed panel (`stride` bytes from one
/// column to the next), padded with the offset of column `cols` (all zero) to a multiple of
/// sixteen; returns the padded length. `out` holds at least cols + 24 entries. (Offsets
/// rather than indices save the kernel a shift per column: about 15% at order 4096 in wasm.)
#[inline(always)]
fn columns_of(row: &[u64], cols: usize, flip: bool, stride: u32, out: &mut [u32]) -> usize {
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
                *d = (base + p as u32) * stride;
            }
            len += b.count_ones() as usize;
        }
    }
    while !len.is_multiple_of(16) {
        out[len] = cols as u32 * stride;
        len += 1;
    }
    len
}

/// The lanes t with `from <= t < to`, as words.
#[inline]
fn lane_range_words(from: usize, to: usize, out: &mut [u64]) {
    for (h, w) in out.iter_mut().enumerate() {
        let lo = h * 64;
        let (a, b) = (from.clamp(lo, lo + 64) - lo, to.clamp(lo, lo + 64) - lo);
        *w = if a >= b {
            0
        } else {
            let hi = if b == 64 { !0u64 } else { (1u64 << b) - 1 };
            hi & (!0u64 << a)
        };
    }
}

/// The largest number of words a vector holds (512 lanes).
const MAX_WORDS: usize = 8;

/// The transposed panel of rows `j_lo..j_hi` (at most `B` blocks of `V::LANES` rows):
/// `cols + 1` columns (the last all zero, for padding) of `B` vectors each, and pop(j) of
/// its rows bit-sliced.
pub(super) struct Panel<V: Lanes, const B: usize> {
    j_lo: usize,
    j_hi: usize,
    columns: Vec<V>,
    pop: [[V; PLANES]; B],
    rows: [V; B],
}

impl<V: Lanes, const B: usize> Panel<V, B> {
    /// Rows per panel.
    pub const ROWS: usize = B * V::LANES;

    #[inline(always)]
    fn new(m: &Matrix, j_lo: usize, j_hi: usize) -> Self {
        debug_assert!(j_hi - j_lo <= Self::ROWS);
        let cols = m.cols();
        let wv = V::LANES / 64;
        let mut columns = vec![V::zero(); (cols + 1) * B];
        // Column c, block b, word h is word (c·B + b)·wv + h of the vectors.
        let words = columns.as_mut_ptr() as *mut u64;
        let mut block = [0u64; 64];
        for b in 0..B {
            for h in 0..wv {
                let r0 = j_lo + b * V::LANES + h * 64;
                if r0 >= j_hi {
                    break;
                }
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
                        let c = bj * 64 + k;
                        // SAFETY: c < cols, b < B, h < wv: inside the (cols + 1)·B vectors.
                        unsafe { *words.add((c * B + b) * wv + h) = word };
                    }
                }
            }
        }
        let mut pop = [[V::zero(); PLANES]; B];
        let mut rows = [V::zero(); B];
        for b in 0..B {
            let mut rw = [0u64; MAX_WORDS];
            let mut pw = [[0u64; MAX_WORDS]; PLANES];
            for t in 0..V::LANES {
                let j = j_lo + b * V::LANES + t;
                if j >= j_hi {
                    break;
                }
                let (h, bit) = (t / 64, 1u64 << (t % 64));
                rw[h] |= bit;
                let p = m.row_negatives(j);
                for (k, plane) in pw.iter_mut().enumerate() {
                    if (p >> k) & 1 == 1 {
                        plane[h] |= bit;
                    }
                }
            }
            rows[b] = V::from_words(&rw[..wv]);
            for k in 0..PLANES {
                pop[b][k] = V::from_words(&pw[k][..wv]);
            }
        }
        Panel {
            j_lo,
            j_hi,
            columns,
            pop,
            rows,
        }
    }
}

/// Adds the carry `c` (of the weight of plane 0) into the ripple counter `q`.
#[inline(always)]
fn ripple<V: Lanes>(q: &mut [V], mut c: V) {
    for p in q.iter_mut() {
        let carry = V::and(*p, c);
        *p = V::xor(*p, c);
        c = carry;
        if !V::any(c) {
            return;
        }
    }
}

/// Every pair (i, j) with i in `i_lo..i_hi`, i < j, and j in the panel, into `tally`.
#[inline(always)]
fn pass<V: Lanes, const B: usize>(
    m: &Matrix,
    panel: &Panel<V, B>,
    i_lo: usize,
    i_hi: usize,
    tally: &mut PairTally,
) {
    let (j_lo, j_hi) = (panel.j_lo, panel.j_hi);
    let cols = m.cols();
    let lanes = V::LANES;
    let wv = lanes / 64;
    let stride = (B * lanes / 8) as u32;
    let z = V::zero();
    let mut list = vec![0u32; cols + 24];
    let blocks = (j_hi - j_lo).div_ceil(lanes);
    for i in i_lo..i_hi.min(j_hi.saturating_sub(1)) {
        let row = m.row_words(i);
        let neg = m.row_negatives(i);
        let flip = neg > cols / 2;
        let len = columns_of(row, cols, flip, stride, &mut list);
        // Blocks with a lane j > i.
        let b0 = (i + 1).saturating_sub(j_lo) / lanes;
        let mut low = [[z; 4]; B];
        let mut high = [[z; 4]; B];
        let mut sixteens = [[z; 16]; B];
        let mut top = [[z; PLANES - 8]; B];
        let mut filled = 0;
        let cs = panel.columns.as_ptr() as *const u8;
        for chunk in list[..len].chunks_exact(16) {
            for b in b0..blocks {
                // SAFETY: every entry of `list` is the offset of a column c ≤ cols, and the
                // panel holds (cols + 1)·B vectors, so c·stride + (lanes/8)·b is inside it.
                let x = |k: usize| unsafe {
                    V::load(cs.add(*chunk.get_unchecked(k) as usize + (lanes / 8) * b))
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
            let x: [V; PLANES] = std::array::from_fn(|k| match k {
                0..4 => low[b][k],
                4..8 => high[b][k - 4],
                _ => top[b][k - 8],
            });
            // pop(j) − d, bit-sliced with a borrow; it must be even, not negative, and twice X.
            let mut borrow = z;
            let mut differs = z;
            for (k, &p) in panel.pop[b].iter().enumerate() {
                let (bit, next) = if (d >> k) & 1 == 0 {
                    (V::xor(p, borrow), V::andnot(borrow, p))
                } else {
                    (V::not(V::xor(p, borrow)), V::or(V::not(p), borrow))
                };
                borrow = next;
                let want = if k == 0 { z } else { x[k - 1] };
                differs = V::or(differs, V::xor(bit, want));
            }
            differs = V::or(differs, V::or(borrow, x[PLANES - 1]));
            let base = j_lo + b * lanes;
            let mut range = [0u64; MAX_WORDS];
            lane_range_words((i + 1).saturating_sub(base), lanes, &mut range[..wv]);
            let live = V::and(panel.rows[b], V::from_words(&range[..wv]));
            let bad = V::and(differs, live);
            if V::any(bad) {
                let mut words = [0u64; MAX_WORDS];
                bad.to_words(&mut words[..wv]);
                for (h, &w0) in words[..wv].iter().enumerate() {
                    let mut w = w0;
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

/// Checks the rows i in a range against a panel.
type PassFn<'a, V, const B: usize> = dyn Fn(&Panel<V, B>, usize, usize, &mut PairTally) + Sync + 'a;

/// Every pair (i, j), i < j, with j in `j_lo..j_hi`, in panels of `Panel::<V, B>::ROWS`,
/// each transposed by `make` and checked by `run`; with `parallel`, the rows i of a panel
/// are spread over threads.
#[allow(unused_variables)]
fn check_rows<V: Lanes, const B: usize>(
    m: &Matrix,
    j_lo: usize,
    j_hi: usize,
    parallel: bool,
    tally: &mut PairTally,
    make: &(dyn Fn(usize, usize) -> Panel<V, B> + Sync),
    run: &PassFn<'_, V, B>,
) {
    let rows = Panel::<V, B>::ROWS;
    let mut p0 = j_lo;
    while p0 < j_hi {
        let p1 = (p0 + rows).min(j_hi);
        let panel = make(p0, p1);
        #[cfg(not(target_arch = "wasm32"))]
        if parallel && p1 > 256 {
            use rayon::prelude::*;
            // Rows i below the panel cost the same each; cut them into about sixteen pieces.
            let piece = (p1 / 16).max(32);
            let (cap, stop) = (tally.cap, tally.stop_at_first);
            let parts: Vec<PairTally> = (0..p1.div_ceil(piece))
                .into_par_iter()
                .with_max_len(1)
                .map(|k| {
                    let mut t = PairTally::new(cap);
                    t.stop_at_first = stop;
                    run(&panel, k * piece, ((k + 1) * piece).min(p1), &mut t);
                    t
                })
                .collect();
            for t in parts {
                tally.merge(t);
            }
            if tally.done() {
                return;
            }
            p0 = p1;
            continue;
        }
        run(&panel, 0, p1, tally);
        if tally.done() {
            return;
        }
        p0 = p1;
    }
}

/// wasm32 with `simd128`: 128 lanes per `v128`, two blocks per panel (256 rows, the
/// `Split`'s panel there).
#[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
pub mod wasm {
    use super::*;
    use std::arch::wasm32::*;

    #[derive(Clone, Copy)]
    pub(in crate::verify) struct W(v128);
    // SAFETY: a plain 16-byte value.
    unsafe impl Send for W {}
    unsafe impl Sync for W {}

    impl Lanes for W {
        const LANES: usize = 128;
        #[inline(always)]
        fn zero() -> Self {
            W(u64x2(0, 0))
        }
        #[inline(always)]
        fn xor(a: Self, b: Self) -> Self {
            W(v128_xor(a.0, b.0))
        }
        #[inline(always)]
        fn and(a: Self, b: Self) -> Self {
            W(v128_and(a.0, b.0))
        }
        #[inline(always)]
        fn or(a: Self, b: Self) -> Self {
            W(v128_or(a.0, b.0))
        }
        #[inline(always)]
        fn andnot(a: Self, b: Self) -> Self {
            W(v128_andnot(a.0, b.0))
        }
        #[inline(always)]
        fn not(a: Self) -> Self {
            W(v128_not(a.0))
        }
        #[inline(always)]
        fn any(a: Self) -> bool {
            v128_any_true(a.0)
        }
        #[inline(always)]
        unsafe fn load(p: *const u8) -> Self {
            W(v128_load(p as *const v128))
        }
        #[inline(always)]
        fn from_words(w: &[u64]) -> Self {
            W(u64x2(w[0], w[1]))
        }
        #[inline(always)]
        fn to_words(self, out: &mut [u64]) {
            out[0] = u64x2_extract_lane::<0>(self.0);
            out[1] = u64x2_extract_lane::<1>(self.0);
        }
        #[inline(always)]
        fn csa(acc: &mut Self, a: Self, b: Self) -> Self {
            let u = v128_xor(acc.0, a.0);
            // The majority of acc, a, b: b where acc and a differ, acc where they agree.
            let carry = v128_bitselect(b.0, acc.0, u);
            acc.0 = v128_xor(u, b.0);
            W(carry)
        }
    }

    /// Blocks per panel.
    pub const BLOCKS: usize = 2;

    /// Every pair (i, j), i < j, with j in `j_lo..j_hi`, into `tally`.
    pub(in crate::verify) fn check(m: &Matrix, j_lo: usize, j_hi: usize, tally: &mut PairTally) {
        check_rows::<W, BLOCKS>(
            m,
            j_lo,
            j_hi,
            false,
            tally,
            &|a, b| Panel::new(m, a, b),
            &|p, a, b, t| pass(m, p, a, b, t),
        );
    }
}

/// x86-64: AVX2 (256 lanes per `__m256i`) and AVX-512 (512 lanes per `__m512i`, carry-save
/// adders by `vpternlogq`), each compiled for its instruction set and called only when the
/// CPU reports it.
#[cfg(target_arch = "x86_64")]
pub mod x86 {
    use super::*;
    use std::arch::x86_64::*;

    #[derive(Clone, Copy)]
    pub(in crate::verify) struct Y(__m256i);
    // SAFETY: a plain 32-byte value.
    unsafe impl Send for Y {}
    unsafe impl Sync for Y {}

    // SAFETY (every `unsafe` block in this impl): these run only inside `check_avx2`'s
    // callees, compiled with AVX2 and called only when the CPU reports AVX2.
    impl Lanes for Y {
        const LANES: usize = 256;
        #[inline(always)]
        fn zero() -> Self {
            Y(unsafe { _mm256_setzero_si256() })
        }
        #[inline(always)]
        fn xor(a: Self, b: Self) -> Self {
            Y(unsafe { _mm256_xor_si256(a.0, b.0) })
        }
        #[inline(always)]
        fn and(a: Self, b: Self) -> Self {
            Y(unsafe { _mm256_and_si256(a.0, b.0) })
        }
        #[inline(always)]
        fn or(a: Self, b: Self) -> Self {
            Y(unsafe { _mm256_or_si256(a.0, b.0) })
        }
        #[inline(always)]
        fn andnot(a: Self, b: Self) -> Self {
            // _mm256_andnot_si256(x, y) is ¬x ∧ y.
            Y(unsafe { _mm256_andnot_si256(b.0, a.0) })
        }
        #[inline(always)]
        fn not(a: Self) -> Self {
            Y(unsafe { _mm256_xor_si256(a.0, _mm256_set1_epi64x(-1)) })
        }
        #[inline(always)]
        fn any(a: Self) -> bool {
            unsafe { _mm256_testz_si256(a.0, a.0) == 0 }
        }
        #[inline(always)]
        unsafe fn load(p: *const u8) -> Self {
            Y(_mm256_loadu_si256(p as *const __m256i))
        }
        #[inline(always)]
        fn from_words(w: &[u64]) -> Self {
            Y(unsafe { _mm256_loadu_si256(w[..4].as_ptr() as *const __m256i) })
        }
        #[inline(always)]
        fn to_words(self, out: &mut [u64]) {
            unsafe { _mm256_storeu_si256(out[..4].as_mut_ptr() as *mut __m256i, self.0) }
        }
    }

    #[derive(Clone, Copy)]
    pub(in crate::verify) struct Z(__m512i);
    // SAFETY: a plain 64-byte value.
    unsafe impl Send for Z {}
    unsafe impl Sync for Z {}

    // SAFETY (every `unsafe` block in this impl): these run only inside `check_avx512`'s
    // callees, compiled with AVX-512F and called only when the CPU reports it.
    impl Lanes for Z {
        const LANES: usize = 512;
        #[inline(always)]
        fn zero() -> Self {
            Z(unsafe { _mm512_setzero_si512() })
        }
        #[inline(always)]
        fn xor(a: Self, b: Self) -> Self {
            Z(unsafe { _mm512_xor_si512(a.0, b.0) })
        }
        #[inline(always)]
        fn and(a: Self, b: Self) -> Self {
            Z(unsafe { _mm512_and_si512(a.0, b.0) })
        }
        #[inline(always)]
        fn or(a: Self, b: Self) -> Self {
            Z(unsafe { _mm512_or_si512(a.0, b.0) })
        }
        #[inline(always)]
        fn andnot(a: Self, b: Self) -> Self {
            Z(unsafe { _mm512_andnot_si512(b.0, a.0) })
        }
        #[inline(always)]
        fn not(a: Self) -> Self {
            Z(unsafe { _mm512_ternarylogic_epi64::<0x55>(a.0, a.0, a.0) })
        }
        #[inline(always)]
        fn any(a: Self) -> bool {
            unsafe { _mm512_test_epi64_mask(a.0, a.0) != 0 }
        }
        #[inline(always)]
        unsafe fn load(p: *const u8) -> Self {
            Z(_mm512_loadu_si512(p as *const _))
        }
        #[inline(always)]
        fn from_words(w: &[u64]) -> Self {
            Z(unsafe { _mm512_loadu_si512(w[..8].as_ptr() as *const _) })
        }
        #[inline(always)]
        fn to_words(self, out: &mut [u64]) {
            unsafe { _mm512_storeu_si512(out[..8].as_mut_ptr() as *mut _, self.0) }
        }
        #[inline(always)]
        fn csa(acc: &mut Self, a: Self, b: Self) -> Self {
            // Truth tables of three inputs (acc, a, b → bits 7..0 of the immediate):
            // majority 0xE8, parity 0x96.
            unsafe {
                let carry = _mm512_ternarylogic_epi64::<0xE8>(acc.0, a.0, b.0);
                acc.0 = _mm512_ternarylogic_epi64::<0x96>(acc.0, a.0, b.0);
                Z(carry)
            }
        }
    }

    /// Blocks per panel with AVX2 (512 rows).
    pub const AVX2_BLOCKS: usize = 4;
    /// Blocks per panel with AVX-512 (512 rows).
    pub const AVX512_BLOCKS: usize = 4;

    #[target_feature(enable = "avx2,popcnt")]
    unsafe fn panel_avx2(m: &Matrix, a: usize, b: usize) -> Panel<Y, AVX2_BLOCKS> {
        Panel::new(m, a, b)
    }

    #[target_feature(enable = "avx2,popcnt")]
    unsafe fn pass_avx2(
        m: &Matrix,
        p: &Panel<Y, AVX2_BLOCKS>,
        a: usize,
        b: usize,
        t: &mut PairTally,
    ) {
        pass(m, p, a, b, t)
    }

    #[target_feature(enable = "avx512f,popcnt")]
    unsafe fn panel_avx512(m: &Matrix, a: usize, b: usize) -> Panel<Z, AVX512_BLOCKS> {
        Panel::new(m, a, b)
    }

    #[target_feature(enable = "avx512f,popcnt")]
    unsafe fn pass_avx512(
        m: &Matrix,
        p: &Panel<Z, AVX512_BLOCKS>,
        a: usize,
        b: usize,
        t: &mut PairTally,
    ) {
        pass(m, p, a, b, t)
    }

    /// Every pair (i, j), i < j, with j in `j_lo..j_hi`, with AVX2.
    ///
    /// # Safety
    /// The CPU has AVX2.
    pub(in crate::verify) unsafe fn check_avx2(
        m: &Matrix,
        j_lo: usize,
        j_hi: usize,
        parallel: bool,
        tally: &mut PairTally,
    ) {
        check_rows::<Y, AVX2_BLOCKS>(
            m,
            j_lo,
            j_hi,
            parallel,
            tally,
            // SAFETY: the caller checked AVX2.
            &|a, b| unsafe { panel_avx2(m, a, b) },
            &|p, a, b, t| unsafe { pass_avx2(m, p, a, b, t) },
        );
    }

    /// Every pair (i, j), i < j, with j in `j_lo..j_hi`, with AVX-512.
    ///
    /// # Safety
    /// The CPU has AVX-512F.
    pub(in crate::verify) unsafe fn check_avx512(
        m: &Matrix,
        j_lo: usize,
        j_hi: usize,
        parallel: bool,
        tally: &mut PairTally,
    ) {
        check_rows::<Z, AVX512_BLOCKS>(
            m,
            j_lo,
            j_hi,
            parallel,
            tally,
            // SAFETY: the caller checked AVX-512F.
            &|a, b| unsafe { panel_avx512(m, a, b) },
            &|p, a, b, t| unsafe { pass_avx512(m, p, a, b, t) },
        );
    }
}
