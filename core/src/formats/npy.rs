//! NumPy's `.npy` files.
//!
//! One idea: a `.npy` file is a short header — a Python dict literal naming the dtype, the
//! memory order and the shape — followed by exactly rows·cols·itemsize bytes of data. So the
//! header is checked completely first (version, dtype, shape, the order limit, and that the data
//! has exactly the declared length, in checked arithmetic) and only then is anything allocated;
//! that is what makes a lying header harmless. In any dtype, +1 and −1 are two fixed bit
//! patterns, so the data is read by comparing patterns, never by converting numbers.
//!
//! Reference: the format is specified in NumPy's `numpy/lib/format.py` (NEP 1).

use super::{Format, Location, ParseError, Parsed, ReadOptions};
use crate::matrix::Matrix;
use std::io;

const MAGIC: &[u8] = b"\x93NUMPY";

/// An element type we can read: integer, unsigned or float, of 1 to 8 bytes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct Dtype {
    kind: u8,
    size: usize,
    big_endian: bool,
}

impl Dtype {
    fn parse(descr: &str) -> Result<Dtype, String> {
        let b = descr.as_bytes();
        let (order, rest) = match b.first() {
            Some(&o @ (b'<' | b'>' | b'|' | b'=')) => (o, &b[1..]),
            _ => (b'=', b),
        };
        let unsupported =
            || format!("dtype '{descr}' is not supported: use an integer or float dtype");
        let (&kind, digits) = rest.split_first().ok_or_else(unsupported)?;
        let size = std::str::from_utf8(digits)
            .ok()
            .and_then(|d| d.parse::<usize>().ok())
            .ok_or_else(unsupported)?;
        match (kind, size) {
            (b'b', _) => {
                return Err(format!(
                    "dtype '{descr}' is bool, which cannot hold -1: save the matrix as int8"
                ))
            }
            (b'i' | b'u', 1 | 2 | 4 | 8) | (b'f', 2 | 4 | 8) => {}
            _ => return Err(unsupported()),
        }
        if order == b'|' && size > 1 {
            return Err(format!(
                "dtype '{descr}' has no byte order but {size}-byte elements"
            ));
        }
        Ok(Dtype {
            kind,
            size,
            big_endian: order == b'>',
        })
    }

    /// The bit pattern of +1.
    fn plus(self) -> u64 {
        match (self.kind, self.size) {
            (b'f', 2) => 0x3C00,
            (b'f', 4) => 0x3F80_0000,
            (b'f', _) => 0x3FF0_0000_0000_0000,
            _ => 1,
        }
    }

    /// The bit pattern of −1, if the dtype has one.
    fn minus(self) -> Option<u64> {
        match (self.kind, self.size) {
            (b'u', _) => None,
            (b'f', 2) => Some(0xBC00),
            (b'f', 4) => Some(0xBF80_0000),
            (b'f', _) => Some(0xBFF0_0000_0000_0000),
            (_, 8) => Some(u64::MAX),
            (_, s) => Some((1u64 << (8 * s)) - 1),
        }
    }

    /// An element's value, for messages.
    fn show(self, v: u64) -> String {
        let bits = 8 * self.size as u32;
        match self.kind {
            b'i' => (((v << (64 - bits)) as i64) >> (64 - bits)).to_string(),
            b'u' => v.to_string(),
            _ => {
                let x = match self.size {
                    2 => f16_to_f64(v as u16),
                    4 => f64::from(f32::from_bits(v as u32)),
                    _ => f64::from_bits(v),
                };
                format!("{x:?}")
            }
        }
    }

    fn name(self) -> String {
        let order = if self.size == 1 {
            '|'
        } else if self.big_endian {
            '>'
        } else {
            '<'
        };
        format!("{order}{}{}", self.kind as char, self.size)
    }
}

/// IEEE 754 half precision to double, for showing a bad float16 element.
fn f16_to_f64(h: u16) -> f64 {
    let sign = if h >> 15 == 1 { -1.0 } else { 1.0 };
    let exp = i32::from((h >> 10) & 0x1F);
    let frac = f64::from(h & 0x3FF);
    sign * match exp {
        0 => frac * 2f64.powi(-24),
        31 if frac == 0.0 => f64::INFINITY,
        31 => f64::NAN,
        e => (1.0 + frac / 1024.0) * 2f64.powi(e - 15),
    }
}

struct Header {
    dtype: Dtype,
    fortran: bool,
    rows: usize,
    cols: usize,
    /// Where the shape tuple is, for errors about it.
    shape_at: usize,
    data_start: usize,
}

/// A value in the header dict.
enum Value {
    Str(String),
    Bool(bool),
    Tuple(Vec<usize>),
}

/// A reader of the small Python-literal subset that `.npy` headers are written in.
struct Lit<'a> {
    s: &'a [u8],
    pos: usize,
    /// Offset of `s` in the file, so errors name file bytes.
    base: usize,
}

impl Lit<'_> {
    fn err(&self, msg: impl Into<String>) -> ParseError {
        ParseError::new(
            Location::Byte(self.base + self.pos),
            format!("bad .npy header: {}", msg.into()),
        )
    }

    fn ws(&mut self) {
        while self
            .s
            .get(self.pos)
            .is_some_and(|c| c.is_ascii_whitespace())
        {
            self.pos += 1;
        }
    }

    fn eat(&mut self, c: u8) -> bool {
        self.ws();
        if self.s.get(self.pos) == Some(&c) {
            self.pos += 1;
            true
        } else {
            false
        }
    }

    fn string(&mut self) -> Result<String, ParseError> {
        self.ws();
        let q = match self.s.get(self.pos) {
            Some(&q @ (b'\'' | b'"')) => q,
            _ => return Err(self.err("expected a quoted string")),
        };
        let start = self.pos + 1;
        let len = self.s[start..]
            .iter()
            .position(|&c| c == q)
            .ok_or_else(|| self.err("unterminated string"))?;
        self.pos = start + len + 1;
        Ok(String::from_utf8_lossy(&self.s[start..start + len]).into_owned())
    }

    fn int(&mut self) -> Result<usize, ParseError> {
        self.ws();
        let start = self.pos;
        let mut v: usize = 0;
        while let Some(&c @ b'0'..=b'9') = self.s.get(self.pos) {
            v = v
                .checked_mul(10)
                .and_then(|v| v.checked_add(usize::from(c - b'0')))
                .ok_or_else(|| {
                    self.pos = start;
                    self.err("a dimension of the shape is too large")
                })?;
            self.pos += 1;
        }
        if self.pos == start {
            return Err(self.err("expected a whole number in the shape"));
        }
        // Python 2 wrote long integers as `3L`.
        if self.s.get(self.pos) == Some(&b'L') {
            self.pos += 1;
        }
        Ok(v)
    }

    fn value(&mut self) -> Result<Value, ParseError> {
        self.ws();
        let rest = &self.s[self.pos..];
        if rest.starts_with(b"True") || rest.starts_with(b"False") {
            let t = rest.starts_with(b"True");
            self.pos += if t { 4 } else { 5 };
            return Ok(Value::Bool(t));
        }
        match rest.first() {
            Some(b'\'' | b'"') => self.string().map(Value::Str),
            Some(b'(') => {
                self.pos += 1;
                let mut dims = Vec::new();
                while !self.eat(b')') {
                    if dims.len() >= 32 {
                        return Err(self.err("shape has too many dimensions"));
                    }
                    dims.push(self.int()?);
                    if !self.eat(b',') {
                        if self.eat(b')') {
                            break;
                        }
                        return Err(self.err("expected ',' or ')' in the shape"));
                    }
                }
                Ok(Value::Tuple(dims))
            }
            Some(b'[') => Err(self.err("structured dtypes are not supported")),
            _ => Err(self.err("expected a string, True, False or a tuple")),
        }
    }
}

fn parse_header(bytes: &[u8]) -> Result<Header, ParseError> {
    if !bytes.starts_with(MAGIC) {
        return Err(ParseError::new(
            Location::Byte(0),
            "not a .npy file: it does not start with \\x93NUMPY",
        ));
    }
    let (major, minor) = match bytes.get(6..8) {
        Some(&[a, b]) => (a, b),
        _ => {
            return Err(ParseError::new(
                Location::Byte(bytes.len()),
                "truncated .npy header",
            ))
        }
    };
    let (len, start): (Option<usize>, usize) = match major {
        1 => (
            bytes
                .get(8..10)
                .map(|b| usize::from(u16::from_le_bytes([b[0], b[1]]))),
            10,
        ),
        2 | 3 => (
            bytes
                .get(8..12)
                .and_then(|b| usize::try_from(u32::from_le_bytes([b[0], b[1], b[2], b[3]])).ok()),
            12,
        ),
        _ => {
            return Err(ParseError::new(
                Location::Byte(6),
                format!("unsupported .npy version {major}.{minor}"),
            ))
        }
    };
    let len =
        len.ok_or_else(|| ParseError::new(Location::Byte(bytes.len()), "truncated .npy header"))?;
    let end = start.checked_add(len).filter(|&e| e <= bytes.len()).ok_or_else(|| {
        ParseError::new(
            Location::Byte(bytes.len()),
            format!("truncated .npy header: it declares {len} bytes, the file has {} after the preamble", bytes.len() - start.min(bytes.len())),
        )
    })?;
    let mut p = Lit {
        s: &bytes[start..end],
        pos: 0,
        base: start,
    };
    if !p.eat(b'{') {
        return Err(p.err("expected '{'"));
    }
    let (mut descr, mut fortran, mut shape) = (None, None, None);
    while !p.eat(b'}') {
        let key_at = p.pos;
        let key = p.string()?;
        if !p.eat(b':') {
            return Err(p.err("expected ':'"));
        }
        p.ws();
        let value_at = p.base + p.pos;
        let value = p.value()?;
        match (key.as_str(), value) {
            ("descr", Value::Str(s)) => descr = Some((s, value_at)),
            ("fortran_order", Value::Bool(f)) => fortran = Some(f),
            ("shape", Value::Tuple(t)) => shape = Some((t, value_at)),
            ("descr" | "fortran_order" | "shape", _) => {
                p.pos = key_at;
                return Err(p.err(format!("'{key}' has a value of the wrong kind")));
            }
            _ => {}
        }
        if !p.eat(b',') {
            if p.eat(b'}') {
                break;
            }
            return Err(p.err("expected ',' or '}'"));
        }
    }
    let missing = |k: &str| {
        ParseError::new(
            Location::Byte(start),
            format!("bad .npy header: no '{k}' key"),
        )
    };
    let (descr, descr_at) = descr.ok_or_else(|| missing("descr"))?;
    let fortran = fortran.ok_or_else(|| missing("fortran_order"))?;
    let (shape, shape_at) = shape.ok_or_else(|| missing("shape"))?;
    let dtype = Dtype::parse(&descr).map_err(|m| ParseError::new(Location::Byte(descr_at), m))?;
    let [rows, cols] = shape[..] else {
        return Err(ParseError::new(
            Location::Byte(shape_at),
            format!(
                "the array has {} dimensions; a matrix has 2 (rows, cols)",
                shape.len()
            ),
        ));
    };
    Ok(Header {
        dtype,
        fortran,
        rows,
        cols,
        shape_at,
        data_start: end,
    })
}

pub(super) fn read(bytes: &[u8], opts: &ReadOptions) -> Result<Parsed, ParseError> {
    let h = parse_header(bytes)?;
    let (rows, cols, size) = (h.rows, h.cols, h.dtype.size);
    let shape_err = |m: String| ParseError::new(Location::Byte(h.shape_at), m);
    if rows == 0 || cols == 0 {
        return Err(shape_err(format!("empty matrix: shape ({rows}, {cols})")));
    }
    if rows.max(cols) > opts.max_order {
        return Err(shape_err(format!(
            "shape ({rows}, {cols}) is above the maximum order {}",
            opts.max_order
        ))
        .past_max_order());
    }
    let need = rows
        .checked_mul(cols)
        .and_then(|n| n.checked_mul(size))
        .ok_or_else(|| shape_err(format!("shape ({rows}, {cols}) is too large")))?;
    let have = bytes.len() - h.data_start;
    if have < need {
        return Err(ParseError::new(
            Location::Byte(bytes.len()),
            format!(
                "truncated: shape ({rows}, {cols}) of {} needs {need} bytes of data, the file has {have}",
                h.dtype.name()
            ),
        ));
    }
    if have > need {
        return Err(ParseError::new(
            Location::Byte(h.data_start + need),
            format!(
                "{} bytes after the end of the data (one array per file)",
                have - need
            ),
        ));
    }
    let data = &bytes[h.data_start..];
    // Fortran order stores the transpose in C order: read that, then transpose.
    let (srows, scols) = if h.fortran {
        (cols, rows)
    } else {
        (rows, cols)
    };
    let mut m = Matrix::ones(srows, scols);
    let row_bytes = scols * size;
    let scale = scaled_patterns(data, h.dtype, cols);
    let pats = scale
        .as_ref()
        .map_or((h.dtype.plus(), h.dtype.minus()), |(p, m, _)| {
            (*p, Some(*m))
        });
    for i in 0..srows {
        let row = &data[i * row_bytes..(i + 1) * row_bytes];
        if let Err(j) = pack_row(row, h.dtype, pats, m.row_words_mut(i)) {
            let k = i * scols + j;
            let (r, c) = if h.fortran { (j, i) } else { (i, j) };
            let v = load(&row[j * size..(j + 1) * size], h.dtype.big_endian);
            let want = match &scale {
                Some((_, _, shown)) => format!("{shown} or -{shown} (the file is scaled by 1/√{cols}, as its first element says)"),
                None if h.dtype.kind == b'f' => {
                    format!("1 or -1 (or ±1/√{cols} throughout, for a scaled float file)")
                }
                None => "1 or -1".to_string(),
            };
            return Err(ParseError::new(
                Location::Element(k),
                format!(
                    "value {} is not {want} (at [{r}, {c}] in NumPy indexing)",
                    h.dtype.show(v)
                ),
            ));
        }
    }
    let matrix = if h.fortran { m.transpose() } else { m };
    Ok(Parsed {
        matrix,
        format: Format::Npy,
        erasures: Vec::new(),
    })
}

/// A float file scaled to orthonormal rows, as `H / sqrt(n)` or this registry's
/// `npy-f64-scaled` download writes it: every entry ±1/√n. When the first element is not ±1
/// but its magnitude is 1/√cols (to the dtype's precision), the bit patterns of +c and −c,
/// and c for messages. Every other element must then be exactly one of the two patterns, so
/// the reading stays a comparison of patterns and a mixed file is refused.
fn scaled_patterns(data: &[u8], dtype: Dtype, cols: usize) -> Option<(u64, u64, String)> {
    if dtype.kind != b'f' || cols < 2 || data.len() < dtype.size {
        return None;
    }
    let first = load(&data[..dtype.size], dtype.big_endian);
    let sign = 1u64 << (8 * dtype.size - 1);
    let plus = first & !sign;
    if plus == dtype.plus() {
        return None;
    }
    let value = match dtype.size {
        2 => f16_to_f64(plus as u16),
        4 => f64::from(f32::from_bits(plus as u32)),
        _ => f64::from_bits(plus),
    };
    let want = 1.0 / (cols as f64).sqrt();
    let tolerance = match dtype.size {
        2 => 2e-3,
        4 => 1e-6,
        _ => 1e-12,
    };
    ((value - want).abs() <= tolerance * want).then(|| (plus, plus | sign, format!("{value:?}")))
}

/// One element as an unsigned integer of its bytes.
#[inline]
fn load(el: &[u8], big_endian: bool) -> u64 {
    let fold = |v: u64, &b: &u8| (v << 8) | u64::from(b);
    if big_endian {
        el.iter().fold(0, fold)
    } else {
        el.iter().rev().fold(0, fold)
    }
}

/// Packs one stored row into `out`; on a value that is not ±1, its index in the row.
fn pack_row(
    row: &[u8],
    dtype: Dtype,
    (plus, minus): (u64, Option<u64>),
    out: &mut [u64],
) -> Result<(), usize> {
    match dtype.size {
        1 if minus.is_some() => pack_i8(row, out),
        1 => pack_n::<1>(row, false, plus, minus, out),
        2 => pack_n::<2>(row, dtype.big_endian, plus, minus, out),
        4 => pack_n::<4>(row, dtype.big_endian, plus, minus, out),
        _ => pack_n::<8>(row, dtype.big_endian, plus, minus, out),
    }
}

fn pack_n<const N: usize>(
    row: &[u8],
    big: bool,
    plus: u64,
    minus: Option<u64>,
    out: &mut [u64],
) -> Result<(), usize> {
    for (j, el) in row.chunks_exact(N).enumerate() {
        let v = load(el, big);
        if v == plus {
            continue;
        }
        if Some(v) != minus {
            return Err(j);
        }
        out[j / 64] |= 1 << (j % 64);
    }
    Ok(())
}

/// int8, eight at a time: +1 is 0x01 and −1 is 0xFF, so bit 7 is the sign and the byte must
/// then equal 0x01 or 0xFF as that bit says.
fn pack_i8(row: &[u8], out: &mut [u64]) -> Result<(), usize> {
    const LANES: u64 = 0x0101_0101_0101_0101;
    let mut chunks = row.chunks_exact(8);
    for (k, eight) in (&mut chunks).enumerate() {
        let mut a = [0u8; 8];
        a.copy_from_slice(eight);
        let w = u64::from_le_bytes(a);
        let signs = (w >> 7) & LANES;
        if w != (signs * 0xFF) | LANES {
            let bad = eight
                .iter()
                .position(|&b| b != 0x01 && b != 0xFF)
                .unwrap_or(0);
            return Err(8 * k + bad);
        }
        let byte = signs.wrapping_mul(0x0102_0408_1020_4080) >> 56;
        out[k / 8] |= byte << (8 * (k % 8));
    }
    let base = row.len() - chunks.remainder().len();
    for (t, &b) in chunks.remainder().iter().enumerate() {
        let j = base + t;
        match b {
            0x01 => {}
            0xFF => out[j / 64] |= 1 << (j % 64),
            _ => return Err(j),
        }
    }
    Ok(())
}

/// The header of a version 1.0 file: magic, version, length, and the dict padded with spaces
/// and ended by `\n` so that the data starts at a multiple of 64 bytes, as NumPy writes it.
fn header(descr: &str, rows: usize, cols: usize) -> Vec<u8> {
    let dict =
        format!("{{'descr': '{descr}', 'fortran_order': False, 'shape': ({rows}, {cols}), }}");
    let unpadded = MAGIC.len() + 4 + dict.len() + 1;
    let pad = (64 - unpadded % 64) % 64;
    let len = dict.len() + pad + 1;
    let mut h = Vec::with_capacity(MAGIC.len() + 4 + len);
    h.extend_from_slice(MAGIC);
    h.extend_from_slice(&[1, 0]);
    // The dict is under a hundred bytes for any shape a usize can hold.
    h.extend_from_slice(&(len as u16).to_le_bytes());
    h.extend_from_slice(dict.as_bytes());
    h.resize(h.len() + pad, b' ');
    h.push(b'\n');
    h
}

/// int8, version 1.0, C order.
pub(super) fn write_i8(m: &Matrix, out: &mut dyn io::Write) -> io::Result<()> {
    out.write_all(&header("|i1", m.rows(), m.cols()))?;
    let mut buf = vec![0u8; m.cols()];
    for i in 0..m.rows() {
        for (j, b) in buf.iter_mut().enumerate() {
            *b = if m.is_negative(i, j) { 0xFF } else { 0x01 };
        }
        out.write_all(&buf)?;
    }
    Ok(())
}

/// Little-endian float64: ±1, or ±1/√cols when `scaled`.
pub(super) fn write_f64(m: &Matrix, scaled: bool, out: &mut dyn io::Write) -> io::Result<()> {
    out.write_all(&header("<f8", m.rows(), m.cols()))?;
    let s = if scaled && m.cols() > 0 {
        1.0 / (m.cols() as f64).sqrt()
    } else {
        1.0
    };
    let (plus, minus) = (s.to_le_bytes(), (-s).to_le_bytes());
    let mut buf = Vec::with_capacity(8 * m.cols());
    for i in 0..m.rows() {
        buf.clear();
        for j in 0..m.cols() {
            buf.extend_from_slice(if m.is_negative(i, j) { &minus } else { &plus });
        }
        out.write_all(&buf)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn header_is_padded_to_64() {
        for (r, c) in [(1, 1), (12, 12), (4096, 4096), (usize::MAX, usize::MAX)] {
            let h = header("|i1", r, c);
            assert_eq!(h.len() % 64, 0);
            assert_eq!(h.last(), Some(&b'\n'));
            let parsed = parse_header(&h).map_err(|e| e.to_string()).unwrap();
            assert_eq!(
                (parsed.rows, parsed.cols, parsed.data_start),
                (r, c, h.len())
            );
        }
    }

    #[test]
    fn dtypes() {
        let d = Dtype::parse(">i4").unwrap();
        assert_eq!(
            (d.kind, d.size, d.big_endian, d.minus()),
            (b'i', 4, true, Some(0xFFFF_FFFF))
        );
        assert_eq!(d.show(0xFFFF_FFFE), "-2");
        assert!(Dtype::parse("|b1").unwrap_err().contains("bool"));
        assert!(Dtype::parse("<c16").is_err());
        assert!(Dtype::parse("<i3").is_err());
        assert!(Dtype::parse("<i99999999999999999999999").is_err());
        assert!(Dtype::parse("|i2").is_err());
        assert_eq!(f16_to_f64(0x3C00), 1.0);
        assert_eq!(f16_to_f64(0xC000), -2.0);
        let f2 = Dtype::parse("<f2").unwrap();
        assert_eq!(f2.show(0x3800), "0.5");
    }

    #[test]
    fn int8_fast_path_finds_the_bad_element() {
        let mut row = vec![0x01u8; 21];
        row[3] = 0xFF;
        row[20] = 0xFF;
        let mut out = [0u64; 1];
        assert_eq!(pack_i8(&row, &mut out), Ok(()));
        assert_eq!(out[0], (1 << 3) | (1 << 20));
        for bad in [0, 5, 12, 20] {
            let mut r = row.clone();
            r[bad] = 0x00;
            assert_eq!(pack_i8(&r, &mut [0u64; 1]), Err(bad));
        }
    }
}
