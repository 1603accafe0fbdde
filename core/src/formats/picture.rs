//! The PNG picture of a matrix.
//!
//! One idea: a ±1 matrix is a two-colour image, so it is written as an indexed PNG whose
//! palette holds our colours — +1 a warm off-white, −1 a deep ink blue, and the same two tinted
//! red for marked rows — and streamed one scanline at a time, never as a whole bitmap. When the
//! matrix is too large for one pixel per entry within the size limit, a pixel covers a square
//! block of entries and is shaded between the two colours by the block's share of −1s.

use crate::matrix::Matrix;
use std::io::{self, Write};

/// The longest side of a picture, in pixels.
const MAX_SIDE: usize = 16384;
/// The width an automatic scale aims for.
const AUTO_SIDE: usize = 512;
/// Shades between +1 and −1, both ends included.
const SHADES: usize = 16;

const PLUS: [u8; 3] = [0xf4, 0xef, 0xe6];
const MINUS: [u8; 3] = [0x1d, 0x35, 0x57];
const MARK: [u8; 3] = [0xe6, 0x39, 0x46];
/// How much of the mark colour a marked row takes.
const MARK_BLEND: f64 = 0.45;

fn mix(a: [u8; 3], b: [u8; 3], t: f64) -> [u8; 3] {
    let m = |x: u8, y: u8| (f64::from(x) + (f64::from(y) - f64::from(x)) * t).round() as u8;
    [m(a[0], b[0]), m(a[1], b[1]), m(a[2], b[2])]
}

/// Indices 0..16 go from +1 to −1; 16..32 are the same, marked.
fn palette() -> Vec<u8> {
    let mut p = Vec::with_capacity(2 * SHADES * 3);
    for marked in [false, true] {
        for s in 0..SHADES {
            let c = mix(PLUS, MINUS, s as f64 / (SHADES - 1) as f64);
            let c = if marked { mix(c, MARK, MARK_BLEND) } else { c };
            p.extend_from_slice(&c);
        }
    }
    p
}

/// The layout: entries per pixel side (`block`), and pixels per block (`scale`).
fn layout(rows: usize, cols: usize, scale: u32) -> (usize, usize) {
    let side = rows.max(cols).max(1);
    if side > MAX_SIDE {
        return (side.div_ceil(MAX_SIDE), 1);
    }
    let wanted = match scale {
        0 => AUTO_SIDE / side,
        s => s as usize,
    };
    (1, wanted.clamp(1, MAX_SIDE / side))
}

pub(super) fn write(
    m: &Matrix,
    scale: u32,
    marked_rows: &[usize],
    out: &mut dyn io::Write,
) -> io::Result<()> {
    // An empty matrix is drawn as a single +1 pixel: PNG has no empty pictures.
    let (rows, cols) = if m.rows() == 0 || m.cols() == 0 {
        (0, 0)
    } else {
        (m.rows(), m.cols())
    };
    let (block, scale) = layout(rows, cols, scale);
    let (brows, bcols) = (rows.div_ceil(block), cols.div_ceil(block));
    let (width, height) = ((bcols * scale).max(1), (brows * scale).max(1));
    let mut marked = vec![false; rows];
    for &r in marked_rows {
        if let Some(x) = marked.get_mut(r) {
            *x = true;
        }
    }
    let to_io = |e: png::EncodingError| io::Error::other(e);
    // Both sides are at most MAX_SIDE, so they fit a u32.
    let mut enc = png::Encoder::new(out, width as u32, height as u32);
    enc.set_color(png::ColorType::Indexed);
    enc.set_depth(png::BitDepth::Eight);
    enc.set_palette(palette());
    let mut w = enc.write_header().map_err(to_io)?;
    let mut s = w.stream_writer().map_err(to_io)?;
    let mut line = vec![0u8; width];
    if rows == 0 {
        s.write_all(&line)?;
    }
    let mut counts = vec![0usize; bcols];
    for br in 0..brows {
        let r0 = br * block;
        let r1 = (r0 + block).min(rows);
        counts.fill(0);
        for i in r0..r1 {
            for j in 0..cols {
                counts[j / block] += usize::from(m.is_negative(i, j));
            }
        }
        let is_marked = marked[r0..r1].iter().any(|&x| x);
        for (bc, &n) in counts.iter().enumerate() {
            let c0 = bc * block;
            let cells = (r1 - r0) * ((c0 + block).min(cols) - c0);
            let shade = (n * (SHADES - 1) + cells / 2) / cells;
            let index = (shade + if is_marked { SHADES } else { 0 }) as u8;
            line[bc * scale..(bc + 1) * scale].fill(index);
        }
        for _ in 0..scale {
            s.write_all(&line)?;
        }
    }
    s.finish().map_err(to_io)?;
    w.finish().map_err(to_io)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn layout_keeps_to_the_limit() {
        assert_eq!(layout(12, 12, 0), (1, 42));
        assert_eq!(layout(12, 12, 4), (1, 4));
        assert_eq!(layout(4096, 4096, 8), (1, 4));
        assert_eq!(layout(20000, 20000, 3), (2, 1));
        assert_eq!(layout(0, 0, 0), (1, 512));
    }

    #[test]
    fn palette_ends_are_our_colours() {
        let p = palette();
        assert_eq!(p.len(), 96);
        assert_eq!(&p[..3], &PLUS);
        assert_eq!(&p[45..48], &MINUS);
    }
}
