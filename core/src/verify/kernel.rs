//! The kernels of the check: which exist, and the popcount tiles.

use super::sliced;
use crate::matrix::Matrix;

/// Rows per tile side.
pub(super) const T: usize = 4;

/// A kernel of the exact check. Every kernel gives the same verdict and the same failing pairs
/// (the tests compare each with a naive count); they differ in speed and in the CPUs that have
/// them.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Kernel {
    /// The portable 4×4 tile, `count_ones` per word.
    Scalar,
    /// x86-64 with POPCNT: the tile with the hardware instruction.
    Popcnt,
    /// x86-64 with AVX-512F and VPOPCNTDQ: the tile, eight words per instruction.
    Avx512Tile,
    /// x86-64 with AVX2: the bit-sliced kernel, 256 pairs per `__m256i`.
    Avx2Sliced,
    /// x86-64 with AVX-512F: the bit-sliced kernel, 512 pairs per `__m512i`.
    Avx512Sliced,
    /// wasm32 built with simd128: the tile, two words per `v128` by `i8x16.popcnt`.
    Simd128Tile,
    /// wasm32 built with simd128: the bit-sliced kernel, 128 pairs per `v128`.
    Simd128Sliced,
}

impl Kernel {
    /// Every kernel, whether this CPU has it or not.
    pub const ALL: [Kernel; 7] = [
        Kernel::Scalar,
        Kernel::Popcnt,
        Kernel::Avx512Tile,
        Kernel::Avx2Sliced,
        Kernel::Avx512Sliced,
        Kernel::Simd128Tile,
        Kernel::Simd128Sliced,
    ];

    /// The kernels this CPU (and this build) has, in the order of [`Kernel::ALL`].
    pub fn available() -> Vec<Kernel> {
        Kernel::ALL
            .into_iter()
            .filter(|k| k.is_available())
            .collect()
    }

    /// True when this CPU and this build can run the kernel.
    pub fn is_available(self) -> bool {
        match self {
            Kernel::Scalar => true,
            #[cfg(target_arch = "x86_64")]
            Kernel::Popcnt => is_x86_feature_detected!("popcnt"),
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512Tile => {
                is_x86_feature_detected!("avx512f")
                    && is_x86_feature_detected!("avx512vpopcntdq")
                    && is_x86_feature_detected!("popcnt")
            }
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx2Sliced => {
                is_x86_feature_detected!("avx2") && is_x86_feature_detected!("popcnt")
            }
            #[cfg(target_arch = "x86_64")]
            Kernel::Avx512Sliced => {
                is_x86_feature_detected!("avx512f") && is_x86_feature_detected!("popcnt")
            }
            #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
            Kernel::Simd128Tile | Kernel::Simd128Sliced => true,
            #[allow(unreachable_patterns)]
            _ => false,
        }
    }

    /// The fastest kernel this CPU has, as measured (`cargo bench -p hadamard-core --bench
    /// verify`, docs/performance.md): the AVX-512 VPOPCNTDQ tile where the CPU has it (on an
    /// Intel Xeon of the Sapphire Rapids class it beat the AVX-512 bit-sliced kernel at every
    /// order from 1024 to 8192, whose panel waits in L2 there: 25.9 against 32.0 ms at 4096
    /// on a quiet machine), else the bit-sliced kernel (AVX-512, then AVX2, then simd128 in
    /// wasm32; with AVX2 alone 55 ms against 145 ms for the POPCNT tile at 4096), else the
    /// POPCNT tile. [`Kernel::for_shape`] then picks a tile for the shapes a sliced kernel
    /// does not take.
    pub fn best() -> Kernel {
        [
            Kernel::Avx512Tile,
            Kernel::Avx512Sliced,
            Kernel::Avx2Sliced,
            Kernel::Simd128Sliced,
            Kernel::Popcnt,
        ]
        .into_iter()
        .find(|k| k.is_available())
        .unwrap_or(Kernel::Scalar)
    }

    /// The name recorded in reports.
    pub fn name(self) -> &'static str {
        match self {
            #[cfg(target_arch = "wasm32")]
            Kernel::Scalar => "wasm32-scalar-tiled",
            #[cfg(not(target_arch = "wasm32"))]
            Kernel::Scalar => "scalar-tiled",
            Kernel::Popcnt => "popcnt-tiled",
            Kernel::Avx512Tile => "avx512-vpopcntdq-tiled",
            Kernel::Avx2Sliced => "avx2-sliced",
            Kernel::Avx512Sliced => "avx512-sliced",
            Kernel::Simd128Tile => "wasm32-simd128-tiled",
            Kernel::Simd128Sliced => "wasm32-simd128-sliced",
        }
    }

    /// The kernel named `name` ([`Kernel::name`], or `"best"`), if there is one.
    pub fn from_name(name: &str) -> Option<Kernel> {
        if name == "best" {
            return Some(Kernel::best());
        }
        Kernel::ALL
            .into_iter()
            .find(|k| k.name() == name || (*k == Kernel::Scalar && name == "scalar-tiled"))
    }

    /// True for the bit-sliced kernels.
    pub fn is_sliced(self) -> bool {
        matches!(
            self,
            Kernel::Avx2Sliced | Kernel::Avx512Sliced | Kernel::Simd128Sliced
        )
    }

    /// The kernel that checks a matrix of this shape: the kernel itself, except that a
    /// bit-sliced kernel leaves the shapes it does not take (an odd number of columns, one
    /// row, 65 535 columns or more) to a tile: the AVX-512 tile where the CPU has VPOPCNTDQ,
    /// the simd128 tile in wasm32, else the POPCNT tile.
    pub fn for_shape(self, rows: usize, cols: usize) -> Kernel {
        if !self.is_sliced() || sliced::fits_shape(rows, cols) {
            return self;
        }
        match self {
            Kernel::Simd128Sliced => Kernel::Simd128Tile,
            Kernel::Avx512Sliced if Kernel::Avx512Tile.is_available() => Kernel::Avx512Tile,
            _ => Kernel::Popcnt,
        }
    }

    pub(super) fn assert_available(self) {
        assert!(
            self.is_available(),
            "the {} kernel is not available on this CPU",
            self.name()
        );
    }
}

impl std::fmt::Display for Kernel {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.name())
    }
}

/// The popcounts of rᵢ ⊕ rⱼ for the 4×4 tile of rows i0.., j0.., by the tile `kernel` (an
/// available one).
#[inline]
pub(super) fn tile(kernel: Kernel, m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
    match kernel {
        #[cfg(target_arch = "x86_64")]
        // SAFETY: the kernel is available, so the CPU reports AVX-512F and VPOPCNTDQ.
        Kernel::Avx512Tile => unsafe { x86::tile_avx512(m, i0, j0, acc) },
        #[cfg(target_arch = "x86_64")]
        // SAFETY: the kernel is available, so the CPU reports POPCNT.
        Kernel::Popcnt => unsafe { x86::tile_popcnt(m, i0, j0, acc) },
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        Kernel::Simd128Tile => wasm_simd::tile_simd128(m, i0, j0, acc),
        _ => tile_scalar(m, i0, j0, acc),
    }
}

/// The words of rows i0..i0+T, one tile's side.
#[inline(always)]
pub(super) fn four_rows(m: &Matrix, i0: usize) -> [&[u64]; T] {
    std::array::from_fn(|r| m.row_words(i0 + r))
}

/// The portable tile: sixteen running popcounts over the rows' words.
#[inline(always)]
pub(super) fn tile_scalar(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
    let w = m.words_per_row();
    let (a, b) = (four_rows(m, i0), four_rows(m, j0));
    let (a0, a1, a2, a3) = (&a[0][..w], &a[1][..w], &a[2][..w], &a[3][..w]);
    let (b0, b1, b2, b3) = (&b[0][..w], &b[1][..w], &b[2][..w], &b[3][..w]);
    let mut s = [[0u32; T]; T];
    for k in 0..w {
        let x = [a0[k], a1[k], a2[k], a3[k]];
        let y = [b0[k], b1[k], b2[k], b3[k]];
        for r in 0..T {
            for c in 0..T {
                s[r][c] += (x[r] ^ y[c]).count_ones();
            }
        }
    }
    *acc = s;
}

#[cfg(target_arch = "x86_64")]
mod x86 {
    use super::{Matrix, T};
    use std::arch::x86_64::*;

    #[target_feature(enable = "popcnt")]
    pub unsafe fn tile_popcnt(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
        super::tile_scalar(m, i0, j0, acc)
    }

    #[target_feature(enable = "avx512f,avx512vpopcntdq")]
    pub unsafe fn tile_avx512(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
        let w = m.words_per_row();
        let bits = m.words().as_ptr();
        let row = |i: usize| bits.add(i * w) as *const i64;
        let (a0, a1, a2, a3) = (row(i0), row(i0 + 1), row(i0 + 2), row(i0 + 3));
        let (b0, b1, b2, b3) = (row(j0), row(j0 + 1), row(j0 + 2), row(j0 + 3));
        let z = _mm512_setzero_si512();
        let mut s = [z; 16];
        macro_rules! step {
            ($ld:expr) => {{
                let x = [$ld(a0), $ld(a1), $ld(a2), $ld(a3)];
                let y = [$ld(b0), $ld(b1), $ld(b2), $ld(b3)];
                for r in 0..T {
                    for c in 0..T {
                        let d = _mm512_xor_si512(x[r], y[c]);
                        s[r * T + c] = _mm512_add_epi64(s[r * T + c], _mm512_popcnt_epi64(d));
                    }
                }
            }};
        }
        let full = w / 8 * 8;
        let mut k = 0;
        while k < full {
            step!(|p: *const i64| _mm512_loadu_si512(p.add(k) as *const _));
            k += 8;
        }
        if k < w {
            let mask: __mmask8 = (1u8 << (w - k)) - 1;
            step!(|p: *const i64| _mm512_maskz_loadu_epi64(mask, p.add(k)));
        }
        // Sixteen horizontal sums by a transposing tree: 8 vectors become one vector of their
        // 8 sums in 21 instructions, instead of a full reduction each.
        let lo = hsum8([s[0], s[1], s[2], s[3], s[4], s[5], s[6], s[7]]);
        let hi = hsum8([s[8], s[9], s[10], s[11], s[12], s[13], s[14], s[15]]);
        let mut out = [0u64; 16];
        _mm512_storeu_si512(out.as_mut_ptr() as *mut _, lo);
        _mm512_storeu_si512(out.as_mut_ptr().add(8) as *mut _, hi);
        for r in 0..T {
            for c in 0..T {
                acc[r][c] = out[r * T + c] as u32;
            }
        }
    }

    /// Lane k of the result is the sum of the eight lanes of v[k].
    #[inline]
    #[target_feature(enable = "avx512f")]
    unsafe fn hsum8(v: [__m512i; 8]) -> __m512i {
        let pair = |a: __m512i, b: __m512i| {
            _mm512_add_epi64(_mm512_unpacklo_epi64(a, b), _mm512_unpackhi_epi64(a, b))
        };
        let (p01, p23, p45, p67) = (
            pair(v[0], v[1]),
            pair(v[2], v[3]),
            pair(v[4], v[5]),
            pair(v[6], v[7]),
        );
        let quad = |a: __m512i, b: __m512i| {
            _mm512_add_epi64(
                _mm512_shuffle_i64x2::<0b10_00_10_00>(a, b),
                _mm512_shuffle_i64x2::<0b11_01_11_01>(a, b),
            )
        };
        let (q0, q1) = (quad(p01, p23), quad(p45, p67));
        quad(q0, q1)
    }
}

#[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
mod wasm_simd {
    use super::{Matrix, T};
    use std::arch::wasm32::*;

    /// Steps of one `v128` (two words) before the byte counters are widened: a byte of
    /// `i8x16.popcnt` is at most 8, and 31 · 8 = 248 still fits in a byte.
    const STEPS_PER_FLUSH: usize = 31;

    /// The sum of the sixteen bytes of `v`.
    #[inline(always)]
    fn byte_sum(v: v128) -> u32 {
        let s = i32x4_extadd_pairwise_u16x8(i16x8_extadd_pairwise_u8x16(v));
        (i32x4_extract_lane::<0>(s)
            + i32x4_extract_lane::<1>(s)
            + i32x4_extract_lane::<2>(s)
            + i32x4_extract_lane::<3>(s)) as u32
    }

    /// The 4×4 tile of popcounts of rᵢ ⊕ rⱼ, two words at a time; an odd last word is counted
    /// with `i64.popcnt`.
    #[inline(always)]
    pub fn tile_simd128(m: &Matrix, i0: usize, j0: usize, acc: &mut [[u32; T]; T]) {
        let w = m.words_per_row();
        let (a, b) = (super::four_rows(m, i0), super::four_rows(m, j0));
        let steps = w / 2;
        let load = |row: &[u64], k: usize| -> v128 {
            let pair = &row[2 * k..2 * k + 2];
            // SAFETY: `pair` is two initialised u64, 16 bytes; v128_load has no alignment
            // requirement.
            unsafe { v128_load(pair.as_ptr() as *const v128) }
        };
        let mut s = [[0u32; T]; T];
        let mut k = 0;
        while k < steps {
            let end = (k + STEPS_PER_FLUSH).min(steps);
            let mut bytes = [[u8x16_splat(0); T]; T];
            while k < end {
                let x = [load(a[0], k), load(a[1], k), load(a[2], k), load(a[3], k)];
                for c in 0..T {
                    let y = load(b[c], k);
                    for r in 0..T {
                        bytes[r][c] = u8x16_add(bytes[r][c], i8x16_popcnt(v128_xor(x[r], y)));
                    }
                }
                k += 1;
            }
            for r in 0..T {
                for c in 0..T {
                    s[r][c] += byte_sum(bytes[r][c]);
                }
            }
        }
        if w % 2 == 1 {
            for r in 0..T {
                for c in 0..T {
                    s[r][c] += (a[r][w - 1] ^ b[c][w - 1]).count_ones();
                }
            }
        }
        *acc = s;
    }
}
