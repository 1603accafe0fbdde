//! The bit-packed ±1 matrix.
//!
//! One idea: a ±1 entry is one bit. Bit `j` of row `i` is set when the entry is −1, so a row of
//! n entries is ⌈n/64⌉ machine words, and the inner product of two rows is
//! `n − 2·popcount(rᵢ ⊕ rⱼ)`: the number of places where they agree minus the number where they
//! differ. Every check and construction in this crate works on these words directly.
//!
//! The padding bits past the last column of each row are always zero. Every method that writes
//! words keeps that true, so whole-word XOR and popcount never see garbage.
//!
//! A `Matrix` is only a ±1 array; it says nothing about being Hadamard. That is
//! [`crate::verify`]'s job alone.

use std::fmt;

/// A dense rows × cols matrix of ±1 entries, one bit per entry (set = −1), rows word-aligned.
#[derive(Clone, PartialEq, Eq, Hash)]
pub struct Matrix {
    rows: usize,
    cols: usize,
    words: usize,
    bits: Vec<u64>,
}

/// Words needed for a row of `cols` entries.
#[inline]
pub const fn words_for(cols: usize) -> usize {
    cols.div_ceil(64)
}

/// The canonical text of eight entries, for each byte of a row's bits (bit 0 first; set = −1).
const CANONICAL_BYTE: [[u8; 8]; 256] = {
    let mut t = [[b'+'; 8]; 256];
    let mut b = 0;
    while b < 256 {
        let mut k = 0;
        while k < 8 {
            if (b >> k) & 1 == 1 {
                t[b][k] = b'-';
            }
            k += 1;
        }
        b += 1;
    }
    t
};

impl Matrix {
    /// The all-(+1) matrix of the given shape.
    pub fn ones(rows: usize, cols: usize) -> Matrix {
        let words = words_for(cols);
        Matrix {
            rows,
            cols,
            words,
            bits: vec![0; rows * words],
        }
    }

    /// The all-(+1) square matrix of order n.
    pub fn ones_square(n: usize) -> Matrix {
        Matrix::ones(n, n)
    }

    /// Builds a matrix from a predicate that says which entries are −1.
    pub fn from_fn(
        rows: usize,
        cols: usize,
        mut negative: impl FnMut(usize, usize) -> bool,
    ) -> Matrix {
        let mut m = Matrix::ones(rows, cols);
        for i in 0..rows {
            let row = m.row_words_mut(i);
            for j in 0..cols {
                if negative(i, j) {
                    row[j / 64] |= 1 << (j % 64);
                }
            }
        }
        m
    }

    /// Builds a matrix from ±1 values given row by row. Returns `None` if a value is not ±1 or
    /// the rows are ragged.
    pub fn from_rows<R: AsRef<[i8]>>(rows: &[R]) -> Option<Matrix> {
        let r = rows.len();
        let c = rows.first().map_or(0, |x| x.as_ref().len());
        let mut m = Matrix::ones(r, c);
        for (i, row) in rows.iter().enumerate() {
            let row = row.as_ref();
            if row.len() != c {
                return None;
            }
            for (j, &v) in row.iter().enumerate() {
                match v {
                    1 => {}
                    -1 => m.set_negative(i, j, true),
                    _ => return None,
                }
            }
        }
        Some(m)
    }

    /// Builds a matrix from packed words, `words_for(cols)` per row. Padding bits are cleared.
    /// Returns `None` if the slice has the wrong length.
    pub fn from_words(rows: usize, cols: usize, mut bits: Vec<u64>) -> Option<Matrix> {
        let words = words_for(cols);
        if bits.len() != rows * words {
            return None;
        }
        let mask = tail_mask(cols);
        if words > 0 {
            for i in 0..rows {
                bits[i * words + words - 1] &= mask;
            }
        }
        Some(Matrix {
            rows,
            cols,
            words,
            bits,
        })
    }

    /// Number of rows.
    #[inline]
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// Number of columns.
    #[inline]
    pub fn cols(&self) -> usize {
        self.cols
    }

    /// True when rows == cols.
    #[inline]
    pub fn is_square(&self) -> bool {
        self.rows == self.cols
    }

    /// The order: the number of rows. (For a square matrix, also the number of columns.)
    #[inline]
    pub fn order(&self) -> usize {
        self.rows
    }

    /// Words per row.
    #[inline]
    pub fn words_per_row(&self) -> usize {
        self.words
    }

    /// All packed words, row-major, `words_per_row()` per row.
    #[inline]
    pub fn words(&self) -> &[u64] {
        &self.bits
    }

    /// The packed words of row `i`.
    #[inline]
    pub fn row_words(&self, i: usize) -> &[u64] {
        &self.bits[i * self.words..(i + 1) * self.words]
    }

    /// The packed words of row `i`, mutably. Callers must leave the padding bits zero.
    #[inline]
    pub fn row_words_mut(&mut self, i: usize) -> &mut [u64] {
        let w = self.words;
        &mut self.bits[i * w..(i + 1) * w]
    }

    /// True when entry (i, j) is −1.
    #[inline]
    pub fn is_negative(&self, i: usize, j: usize) -> bool {
        debug_assert!(i < self.rows && j < self.cols);
        (self.bits[i * self.words + j / 64] >> (j % 64)) & 1 == 1
    }

    /// Entry (i, j) as ±1.
    #[inline]
    pub fn get(&self, i: usize, j: usize) -> i8 {
        if self.is_negative(i, j) {
            -1
        } else {
            1
        }
    }

    /// Sets entry (i, j) to −1 (`true`) or +1 (`false`).
    #[inline]
    pub fn set_negative(&mut self, i: usize, j: usize, negative: bool) {
        let w = &mut self.bits[i * self.words + j / 64];
        let b = 1u64 << (j % 64);
        if negative {
            *w |= b;
        } else {
            *w &= !b;
        }
    }

    /// Sets entry (i, j) to `v`, which must be ±1 (anything ≥ 0 is taken as +1).
    #[inline]
    pub fn set(&mut self, i: usize, j: usize, v: i8) {
        self.set_negative(i, j, v < 0);
    }

    /// Negates entry (i, j).
    #[inline]
    pub fn flip(&mut self, i: usize, j: usize) {
        self.bits[i * self.words + j / 64] ^= 1 << (j % 64);
    }

    /// Negates row i.
    pub fn negate_row(&mut self, i: usize) {
        let mask = tail_mask(self.cols);
        let row = self.row_words_mut(i);
        for w in row.iter_mut() {
            *w = !*w;
        }
        if let Some(last) = row.last_mut() {
            *last &= mask;
        }
    }

    /// Negates column j.
    pub fn negate_col(&mut self, j: usize) {
        for i in 0..self.rows {
            self.flip(i, j);
        }
    }

    /// Swaps rows a and b.
    pub fn swap_rows(&mut self, a: usize, b: usize) {
        if a == b {
            return;
        }
        let w = self.words;
        let (lo, hi) = if a < b { (a, b) } else { (b, a) };
        let (first, second) = self.bits.split_at_mut(hi * w);
        first[lo * w..(lo + 1) * w].swap_with_slice(&mut second[..w]);
    }

    /// The inner product of rows i and j over the integers.
    #[inline]
    pub fn row_dot(&self, i: usize, j: usize) -> i64 {
        let d: u32 = self
            .row_words(i)
            .iter()
            .zip(self.row_words(j))
            .map(|(a, b)| (a ^ b).count_ones())
            .sum();
        self.cols as i64 - 2 * d as i64
    }

    /// The number of −1 entries in row i.
    #[inline]
    pub fn row_negatives(&self, i: usize) -> usize {
        self.row_words(i)
            .iter()
            .map(|w| w.count_ones() as usize)
            .sum()
    }

    /// The transpose, by 64×64 bit-block transposes.
    pub fn transpose(&self) -> Matrix {
        let mut t = Matrix::ones(self.cols, self.rows);
        let mut block = [0u64; 64];
        for bi in (0..self.rows).step_by(64) {
            for bj in 0..self.words {
                let h = (self.rows - bi).min(64);
                for (k, slot) in block.iter_mut().enumerate() {
                    *slot = if k < h {
                        self.bits[(bi + k) * self.words + bj]
                    } else {
                        0
                    };
                }
                transpose64(&mut block);
                let cj = bj * 64;
                let w = (self.cols - cj).min(64);
                for (k, &word) in block.iter().enumerate().take(w) {
                    t.bits[(cj + k) * t.words + bi / 64] = word;
                }
            }
        }
        t
    }

    /// The Kronecker product A ⊗ B: entry ((i·p + k), (j·q + l)) is a_ij · b_kl.
    pub fn kronecker(a: &Matrix, b: &Matrix) -> Matrix {
        let (p, q) = (b.rows, b.cols);
        let mut out = Matrix::ones(a.rows * p, a.cols * q);
        let mut row_b_neg = Vec::with_capacity(b.words);
        for i in 0..a.rows {
            for k in 0..p {
                let r = i * p + k;
                row_b_neg.clear();
                row_b_neg.extend(b.row_words(k).iter().map(|w| !w));
                // Write each block of q entries: b's row k, negated where a_ij = −1.
                for j in 0..a.cols {
                    let src: &[u64] = if a.is_negative(i, j) {
                        &row_b_neg
                    } else {
                        b.row_words(k)
                    };
                    out.write_bits(r, j * q, src, q);
                }
            }
        }
        out
    }

    /// Writes `len` bits taken from `src` (bit 0 first) into row `r` starting at column `c0`.
    fn write_bits(&mut self, r: usize, c0: usize, src: &[u64], len: usize) {
        let row = self.row_words_mut(r);
        let mut done = 0;
        while done < len {
            let take = (len - done).min(64);
            let mut chunk = extract(src, done, take);
            if take < 64 {
                chunk &= (1u64 << take) - 1;
            }
            let c = c0 + done;
            let (wi, off) = (c / 64, c % 64);
            row[wi] &= !(mask_bits(take) << off);
            row[wi] |= chunk << off;
            if off + take > 64 {
                let spill = off + take - 64;
                row[wi + 1] &= !mask_bits(spill);
                row[wi + 1] |= chunk >> (64 - off);
            }
            done += take;
        }
    }

    /// The normalised form: columns negated so the first row is all +1, then rows negated so
    /// the first column is all +1. It is equivalent to `self`, and Hadamard exactly when `self` is.
    pub fn normalized(&self) -> Matrix {
        let mut m = self.clone();
        if m.rows == 0 {
            return m;
        }
        // Negating column j for every −1 in row 0 is an XOR of every row with row 0.
        let first: Vec<u64> = m.row_words(0).to_vec();
        for i in 0..m.rows {
            for (w, f) in m.row_words_mut(i).iter_mut().zip(&first) {
                *w ^= f;
            }
        }
        for i in 0..m.rows {
            if m.cols > 0 && m.is_negative(i, 0) {
                m.negate_row(i);
            }
        }
        m
    }

    /// The ±1 entries as `i8`, row-major.
    pub fn to_i8_rows(&self) -> Vec<Vec<i8>> {
        (0..self.rows)
            .map(|i| (0..self.cols).map(|j| self.get(i, j)).collect())
            .collect()
    }

    /// Appends the canonical text of the matrix to `out`: each row as `+`/`-` characters followed
    /// by `\n`. This text is what the matrix id hashes (see [`crate::id`]).
    pub fn write_canonical_row(&self, i: usize, out: &mut Vec<u8>) {
        let row = self.row_words(i);
        out.reserve(self.cols + 1);
        // Eight entries at a time, one byte of the row (lowest bit first) to eight characters:
        // the id hashes this text, so it is on the path of every verification.
        let bytes = self.cols / 8;
        for k in 0..bytes {
            let byte = (row[k / 8] >> (8 * (k % 8))) as u8;
            out.extend_from_slice(&CANONICAL_BYTE[byte as usize]);
        }
        for j in bytes * 8..self.cols {
            out.push(if (row[j / 64] >> (j % 64)) & 1 == 1 {
                b'-'
            } else {
                b'+'
            });
        }
        out.push(b'\n');
    }

    /// The whole canonical text.
    pub fn canonical_text(&self) -> String {
        let mut out = Vec::with_capacity(self.rows * (self.cols + 1));
        for i in 0..self.rows {
            self.write_canonical_row(i, &mut out);
        }
        // Only '+', '-' and '\n' were written.
        String::from_utf8(out).unwrap_or_default()
    }
}

impl fmt::Debug for Matrix {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(f, "Matrix {}×{}", self.rows, self.cols)?;
        if self.rows <= 64 && self.cols <= 128 {
            f.write_str(&self.canonical_text())?;
        }
        Ok(())
    }
}

/// Mask of the valid bits in the last word of a row of `cols` entries.
#[inline]
pub const fn tail_mask(cols: usize) -> u64 {
    match cols % 64 {
        0 => u64::MAX,
        r => (1u64 << r) - 1,
    }
}

#[inline]
const fn mask_bits(k: usize) -> u64 {
    if k >= 64 {
        u64::MAX
    } else {
        (1u64 << k) - 1
    }
}

/// Bits [start, start+len) of a little-endian bit string, len ≤ 64, as the low bits of a word.
#[inline]
fn extract(src: &[u64], start: usize, len: usize) -> u64 {
    let (wi, off) = (start / 64, start % 64);
    let lo = src.get(wi).copied().unwrap_or(0) >> off;
    if off == 0 || off + len <= 64 {
        lo
    } else {
        lo | (src.get(wi + 1).copied().unwrap_or(0) << (64 - off))
    }
}

/// In-place transpose of a 64×64 bit matrix (row k = word k, column j = bit j).
pub(crate) fn transpose64(a: &mut [u64; 64]) {
    let mut j = 32;
    let mut m: u64 = 0x0000_0000_FFFF_FFFF;
    while j != 0 {
        let mut k = 0;
        while k < 64 {
            let t = ((a[k] >> j) ^ a[k + j]) & m;
            a[k] ^= t << j;
            a[k + j] ^= t;
            k = (k + j + 1) & !j;
        }
        j >>= 1;
        m ^= m << j;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn naive_kron(a: &Matrix, b: &Matrix) -> Matrix {
        Matrix::from_fn(a.rows() * b.rows(), a.cols() * b.cols(), |r, c| {
            let v = a.get(r / b.rows(), c / b.cols()) * b.get(r % b.rows(), c % b.cols());
            v < 0
        })
    }

    fn pseudo(rows: usize, cols: usize, seed: u64) -> Matrix {
        let mut s = seed;
        Matrix::from_fn(rows, cols, |_, _| {
            s ^= s << 13;
            s ^= s >> 7;
            s ^= s << 17;
            s & 1 == 1
        })
    }

    #[test]
    fn transpose_matches_definition() {
        for &(r, c) in &[(1, 1), (3, 70), (64, 64), (65, 130), (130, 7), (200, 200)] {
            let m = pseudo(r, c, (r * 1000 + c) as u64);
            let t = m.transpose();
            assert_eq!((t.rows(), t.cols()), (c, r));
            for i in 0..r {
                for j in 0..c {
                    assert_eq!(m.get(i, j), t.get(j, i));
                }
            }
            assert_eq!(t.transpose(), m);
        }
    }

    #[test]
    fn kronecker_matches_definition() {
        for &(a, b) in &[
            ((2, 2), (3, 3)),
            ((3, 5), (7, 70)),
            ((2, 2), (64, 64)),
            ((5, 3), (33, 33)),
        ] {
            let x = pseudo(a.0, a.1, 7);
            let y = pseudo(b.0, b.1, 11);
            assert_eq!(Matrix::kronecker(&x, &y), naive_kron(&x, &y));
        }
    }

    #[test]
    fn padding_stays_zero() {
        let mut m = pseudo(5, 70, 3);
        m.negate_row(2);
        assert_eq!(m.row_words(2)[1] & !tail_mask(70), 0);
        let k = Matrix::kronecker(&pseudo(3, 3, 1), &m);
        for i in 0..k.rows() {
            assert_eq!(k.row_words(i).last().unwrap() & !tail_mask(k.cols()), 0);
        }
    }

    #[test]
    fn normalized_has_plus_first_row_and_column() {
        let m = pseudo(9, 70, 5).normalized();
        assert_eq!(m.row_negatives(0), 0);
        assert!((0..9).all(|i| !m.is_negative(i, 0)));
    }

    #[test]
    fn row_dot_and_swap() {
        let m = Matrix::from_rows(&[[1i8, 1], [1, -1]]).unwrap();
        assert_eq!(m.row_dot(0, 1), 0);
        assert_eq!(m.row_dot(1, 1), 2);
        let mut s = pseudo(6, 100, 9);
        let (r1, r4) = (s.row_words(1).to_vec(), s.row_words(4).to_vec());
        s.swap_rows(4, 1);
        assert_eq!(s.row_words(1), &r4[..]);
        assert_eq!(s.row_words(4), &r1[..]);
        assert_eq!(m.canonical_text(), "++\n+-\n");
    }
}
