//! The line formats — `pm`, `int` (CSV) and `bits` — and the text writers, JSON included.
//!
//! One idea: nearly every line of a real file is plain ASCII of exactly the expected length, so
//! each row is first tried on a fast path that checks and packs eight characters at a time
//! (SWAR: in `+`/`-`, and in `0`/`1`, the two characters differ in a single bit, and a multiply
//! gathers eight such bits into one byte). Only a row that fails it is read again character by
//! character, by the general path that knows separators, `−`, `?` and comments and names the
//! exact column of any error. Both paths build the same bits; the fast one is only quicker.

use super::rows::{Builder, Shape};
use super::{describe_at, line_col, Format, ParseError, Parsed, ReadOptions, WriteFormat};
use crate::matrix::Matrix;
use std::io;

/// The three line formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Kind {
    Pm,
    Int,
    Bits,
}

/// U+2212 MINUS SIGN in UTF-8.
pub(super) const MINUS: &[u8] = "\u{2212}".as_bytes();

/// Where the line starting at `start` ends: (end of its text without `\r\n` or `\n`, start of
/// the next line).
pub(super) fn line_end(body: &[u8], start: usize) -> (usize, usize) {
    match body[start..].iter().position(|&c| c == b'\n') {
        Some(k) => {
            let nl = start + k;
            let end = if nl > start && body[nl - 1] == b'\r' {
                nl - 1
            } else {
                nl
            };
            (end, nl + 1)
        }
        None => (body.len(), body.len()),
    }
}

/// If a line ends exactly at `end` (a `\n`, `\r\n`, or the end of input), the start of the next.
fn line_ends_at(body: &[u8], end: usize) -> Option<usize> {
    match body.get(end) {
        None if end == body.len() => Some(end),
        Some(b'\n') => Some(end + 1),
        Some(b'\r') if body.get(end + 1) == Some(&b'\n') => Some(end + 2),
        _ => None,
    }
}

fn is_blank(c: u8) -> bool {
    c == b' ' || c == b'\t'
}

/// Reads a whole line-format input (without its byte-order mark).
pub(super) fn read(body: &[u8], kind: Kind, opts: &ReadOptions) -> Result<Parsed, ParseError> {
    let format = match kind {
        Kind::Pm => Format::Pm,
        Kind::Int => Format::Int,
        Kind::Bits => Format::Bits,
    };
    let mut b = Builder::new(opts.max_order);
    let mut one_is_negative = opts.bits_one_is_negative;
    let mut ended_by: Option<usize> = None;
    let (mut pos, mut line) = (0, 0);
    while pos < body.len() {
        line += 1;
        let start = pos;
        // The fast path at the predicted end of the row, which saves looking for the newline.
        if kind != Kind::Int && ended_by.is_none() {
            if let Some(c) = b.cols() {
                if let Some(next) = start.checked_add(c).and_then(|end| line_ends_at(body, end)) {
                    if b.try_row(c, |out| {
                        pack(kind, &body[start..start + c], one_is_negative, out)
                    }) {
                        pos = next;
                        continue;
                    }
                }
            }
        }
        let (end, next) = line_end(body, start);
        pos = next;
        let text = &body[start..end];
        let Some(first) = text.iter().position(|&c| !is_blank(c)) else {
            if b.rows() > 0 && ended_by.is_none() {
                ended_by = Some(line);
            }
            continue;
        };
        if text[first] == b'#' {
            if kind == Kind::Bits && b.rows() == 0 {
                match bits_header(&text[first + 1..]) {
                    Some(Ok(v)) => one_is_negative = v,
                    Some(Err(())) => {
                        return Err(ParseError::new(
                            line_col(body, line, start, start + first),
                            "unrecognised bits header: expected '# bits: 1 = -1, 0 = +1' or '# bits: 1 = +1, 0 = -1'",
                        ))
                    }
                    None => {}
                }
            }
            continue;
        }
        if let Some(blank) = ended_by {
            return Err(ParseError::new(
                line_col(body, line, start, start + first),
                format!("more rows after the blank line {blank} that ended the matrix (one matrix per input)"),
            ));
        }
        let last = text
            .iter()
            .rposition(|&c| !is_blank(c))
            .map_or(0, |k| k + 1);
        if first == 0 {
            let row = &text[..last];
            let packed = match (kind, b.cols()) {
                (Kind::Int, Some(c)) => b.try_row(c, |out| pack_int(row, c, out)),
                (Kind::Int, None) => false,
                _ => b.try_row(row.len(), |out| pack(kind, row, one_is_negative, out)),
            };
            if packed {
                continue;
            }
        }
        let at = |pos: usize, msg: String| ParseError::new(line_col(body, line, start, pos), msg);
        let row = b.rows();
        b.begin_row()
            .map_err(|s| s.into_error(row, |m| at(start + first, m)))?;
        general_row(
            kind,
            body,
            start,
            last,
            one_is_negative,
            opts.allow_erasures,
            &mut b,
        )
        .map_err(|(pos, e)| match e {
            Bad::Shape(s) => s.into_error(row, |m| at(pos, m)),
            Bad::Message(m) => at(pos, m),
        })?;
    }
    match b.finish() {
        Some((matrix, erasures)) => Ok(Parsed {
            matrix,
            format,
            erasures,
        }),
        None => Err(ParseError::new(
            super::Location::Nowhere,
            "empty input: no matrix rows",
        )),
    }
}

/// What went wrong in a row, before the reader attaches the line.
enum Bad {
    Shape(Shape),
    Message(String),
}

impl From<Shape> for Bad {
    fn from(s: Shape) -> Bad {
        Bad::Shape(s)
    }
}

/// The general path: reads the row in `body[start..start + len]` (blanks already trimmed from
/// the end) entry by entry. Errors carry the byte offset they are at.
fn general_row(
    kind: Kind,
    body: &[u8],
    start: usize,
    len: usize,
    one_is_negative: bool,
    allow_erasures: bool,
    b: &mut Builder,
) -> Result<(), (usize, Bad)> {
    let end = start + len;
    let mut i = start;
    // In `int`: whether the last thing seen was a comma still waiting for its entry.
    let mut comma_at: Option<usize> = None;
    let mut after_entry = false;
    while i < end {
        let c = body[i];
        if is_blank(c) {
            i += 1;
            continue;
        }
        if c == b'?' {
            if !allow_erasures {
                return Err((
                    i,
                    Bad::Message("'?' (an erased entry) is not allowed here".to_string()),
                ));
            }
            b.push_erased().map_err(|s| (i, s.into()))?;
            i += 1;
            comma_at = None;
            after_entry = true;
            continue;
        }
        match kind {
            Kind::Pm => {
                let (negative, len) = match c {
                    b'+' => (false, 1),
                    b'-' => (true, 1),
                    _ if body[i..end].starts_with(MINUS) => (true, MINUS.len()),
                    _ => {
                        let msg = format!("expected '+' or '-', found {}", describe_at(body, i));
                        return Err((i, Bad::Message(msg)));
                    }
                };
                b.push(negative).map_err(|s| (i, s.into()))?;
                i += len;
            }
            Kind::Bits => {
                let negative = match c {
                    b'0' => !one_is_negative,
                    b'1' => one_is_negative,
                    _ => {
                        let msg = format!("expected '0' or '1', found {}", describe_at(body, i));
                        return Err((i, Bad::Message(msg)));
                    }
                };
                b.push(negative).map_err(|s| (i, s.into()))?;
                i += 1;
            }
            Kind::Int => {
                if c == b',' {
                    if !after_entry {
                        return Err((
                            i,
                            Bad::Message("empty field: expected +1 or -1 before ','".to_string()),
                        ));
                    }
                    comma_at = Some(i);
                    after_entry = false;
                    i += 1;
                    continue;
                }
                let tok_end = body[i..end]
                    .iter()
                    .position(|&c| is_blank(c) || c == b',')
                    .map_or(end, |k| i + k);
                let negative = int_entry(&body[i..tok_end]).ok_or_else(|| {
                    let msg = format!("expected +1 or -1, found '{}'", shown(&body[i..tok_end]));
                    (i, Bad::Message(msg))
                })?;
                b.push(negative).map_err(|s| (i, s.into()))?;
                i = tok_end;
                comma_at = None;
                after_entry = true;
            }
        }
    }
    if let Some(c) = comma_at {
        return Err((
            c,
            Bad::Message("empty field: expected +1 or -1 after ','".to_string()),
        ));
    }
    b.end_row().map_err(|s| (end, s.into()))
}

/// An `int` token: `1`, `+1`, `-1`, `−1`, each optionally followed by `.` and one or more `0`s.
/// Returns whether it is −1.
fn int_entry(tok: &[u8]) -> Option<bool> {
    let (negative, rest) = match tok {
        [b'+', rest @ ..] => (false, rest),
        [b'-', rest @ ..] => (true, rest),
        _ => match tok.strip_prefix(MINUS) {
            Some(rest) => (true, rest),
            None => (false, tok),
        },
    };
    match rest {
        [b'1'] => Some(negative),
        [b'1', b'.', zeros @ ..] if !zeros.is_empty() && zeros.iter().all(|&z| z == b'0') => {
            Some(negative)
        }
        _ => None,
    }
}

/// A token for a message: valid UTF-8 text, cut at 24 characters.
pub(super) fn shown(tok: &[u8]) -> String {
    let s = String::from_utf8_lossy(tok);
    let mut out: String = s
        .chars()
        .take(24)
        .collect::<String>()
        .escape_debug()
        .collect();
    if s.chars().count() > 24 {
        out.push('…');
    }
    out
}

/// A `# bits: …` header (the text after `#`): `None` if it is some other comment, `Some(Err)` if
/// it starts with `bits:` but does not say a mapping, else whether `1` is −1.
pub(super) fn bits_header(comment: &[u8]) -> Option<Result<bool, ()>> {
    let s: Vec<u8> = comment
        .iter()
        .copied()
        .filter(|&c| !c.is_ascii_whitespace())
        .collect();
    let s = String::from_utf8_lossy(&s).replace('\u{2212}', "-");
    let rest = s.strip_prefix("bits:")?;
    let mut one_is_negative: Option<bool> = None;
    for part in rest.split(',') {
        let says = match part {
            "1=-1" | "0=+1" | "0=1" => true,
            "1=+1" | "1=1" | "0=-1" => false,
            _ => return Some(Err(())),
        };
        if one_is_negative.is_some_and(|v| v != says) {
            return Some(Err(()));
        }
        one_is_negative = Some(says);
    }
    Some(one_is_negative.ok_or(()))
}

/// The fast path: packs a row of plain ASCII entries, one byte each, into `out`. False if any
/// byte is not an entry of `kind` (then nothing it wrote matters).
fn pack(kind: Kind, row: &[u8], one_is_negative: bool, out: &mut [u64]) -> bool {
    match kind {
        // '+' = 0x2B and '-' = 0x2D: XOR with '+' leaves 0x00 or 0x06; bit 2 marks '-'.
        Kind::Pm => {
            let full = row.len() / 64;
            match super::pm_simd::pack_full_words(row, out) {
                Some(true) => pack_swar(&row[full * 64..], &mut out[full..], 0x2B, 0x06, 2, false),
                Some(false) => false,
                None => pack_swar(row, out, 0x2B, 0x06, 2, false),
            }
        }
        // '0' = 0x30 and '1' = 0x31: XOR with '0' leaves 0x00 or 0x01; bit 0 marks '1'.
        Kind::Bits => pack_swar(row, out, 0x30, 0x01, 0, !one_is_negative),
        Kind::Int => false,
    }
}

/// The fast path for `int`: exactly `cols` entries `1` or `-1`, each followed by one comma,
/// space or tab, except the last. False on anything else (the general path then reads it).
fn pack_int(row: &[u8], cols: usize, out: &mut [u64]) -> bool {
    let (mut i, mut j) = (0, 0);
    loop {
        let negative = match row.get(i) {
            Some(b'1') => false,
            Some(b'-') if row.get(i + 1) == Some(&b'1') => true,
            _ => return false,
        };
        i += 1 + usize::from(negative);
        if j >= cols {
            return false;
        }
        out[j / 64] |= u64::from(negative) << (j % 64);
        j += 1;
        match row.get(i) {
            None => return j == cols,
            Some(b',' | b' ' | b'\t') => i += 1,
            Some(_) => return false,
        }
    }
}

const LANES: u64 = 0x0101_0101_0101_0101;

/// Eight bytes at a time: each byte XOR `base` must be 0 or `diff` (whose lowest set bit is
/// `bit`), and that bit, gathered from the eight bytes by one multiply, is the entry's sign.
#[inline]
fn pack_swar(row: &[u8], out: &mut [u64], base: u8, diff: u8, bit: u32, invert: bool) -> bool {
    let base8 = LANES * u64::from(base);
    let flip = if invert { u64::MAX } else { 0 };
    let mut chunks = row.chunks_exact(64);
    for (w, chunk) in out.iter_mut().zip(&mut chunks) {
        let mut word = 0u64;
        for (k, eight) in chunk.chunks_exact(8).enumerate() {
            let mut a = [0u8; 8];
            a.copy_from_slice(eight);
            let x = u64::from_le_bytes(a) ^ base8;
            let signs = (x >> bit) & LANES;
            // Valid iff each byte is exactly 0 or `diff`, as its sign bit says.
            if x != signs * u64::from(diff) {
                return false;
            }
            // Byte k's bit 0 moves to bit 56 + k; nothing collides, so no carries.
            word |= (signs.wrapping_mul(0x0102_0408_1020_4080) >> 56) << (8 * k);
        }
        *w = word ^ flip;
    }
    let tail = chunks.remainder();
    if !tail.is_empty() {
        let mut word = 0u64;
        for (k, &c) in tail.iter().enumerate() {
            let x = c ^ base;
            if x != 0 && x != diff {
                return false;
            }
            word |= u64::from((x >> bit) & 1) << k;
        }
        if invert {
            word = !word & ((1u64 << tail.len()) - 1);
        }
        match out.last_mut() {
            Some(last) => *last = word,
            None => return false,
        }
    }
    true
}

/// Output is gathered into chunks of about this many bytes before each write to the sink.
const CHUNK: usize = 1 << 16;

/// Writes `pm`, `csv`, `bits` or `json`, a row at a time.
pub(super) fn write(m: &Matrix, f: &WriteFormat, out: &mut dyn io::Write) -> io::Result<()> {
    let mut buf = Vec::with_capacity(CHUNK + 4 * m.cols() + 8);
    match f {
        WriteFormat::Bits {
            one_is_negative: true,
        } => buf.extend_from_slice(b"# bits: 1 = -1, 0 = +1\n"),
        WriteFormat::Bits {
            one_is_negative: false,
        } => buf.extend_from_slice(b"# bits: 1 = +1, 0 = -1\n"),
        WriteFormat::Json if m.rows() == 0 => buf.extend_from_slice(b"[]\n"),
        _ => {}
    }
    for i in 0..m.rows() {
        let row = m.row_words(i);
        let neg = |j: usize| (row[j / 64] >> (j % 64)) & 1 == 1;
        match f {
            WriteFormat::Bits { one_is_negative } => {
                buf.extend((0..m.cols()).map(|j| {
                    if neg(j) == *one_is_negative {
                        b'1'
                    } else {
                        b'0'
                    }
                }));
                buf.push(b'\n');
            }
            WriteFormat::Csv => {
                for j in 0..m.cols() {
                    if j > 0 {
                        buf.push(b',');
                    }
                    buf.extend_from_slice(if neg(j) { b"-1" } else { b"1" });
                }
                buf.push(b'\n');
            }
            WriteFormat::Json => {
                buf.extend_from_slice(if i == 0 { b"[[" } else { b" [" });
                for j in 0..m.cols() {
                    if j > 0 {
                        buf.push(b',');
                    }
                    buf.extend_from_slice(if neg(j) { b"-1" } else { b"1" });
                }
                buf.extend_from_slice(if i + 1 == m.rows() { b"]]\n" } else { b"],\n" });
            }
            _ => m.write_canonical_row(i, &mut buf),
        }
        if buf.len() >= CHUNK {
            out.write_all(&buf)?;
            buf.clear();
        }
    }
    out.write_all(&buf)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn swar_agrees_with_the_slow_path() {
        // Lengths and bad places on both sides of the AVX2 path's 32- and 64-byte blocks.
        for len in [1usize, 7, 8, 9, 31, 32, 33, 63, 64, 65, 127, 128, 130, 200] {
            let row: Vec<u8> = (0..len)
                .map(|j| if (j * 7 + j / 3) % 3 == 0 { b'-' } else { b'+' })
                .collect();
            let mut out = vec![0u64; len.div_ceil(64)];
            assert!(pack(Kind::Pm, &row, true, &mut out));
            for (j, &c) in row.iter().enumerate() {
                assert_eq!(
                    (out[j / 64] >> (j % 64)) & 1 == 1,
                    c == b'-',
                    "len {len} col {j}"
                );
            }
            let bits: Vec<u8> = row
                .iter()
                .map(|&c| if c == b'-' { b'1' } else { b'0' })
                .collect();
            let mut again = vec![0u64; out.len()];
            assert!(pack(Kind::Bits, &bits, true, &mut again));
            assert_eq!(again, out);
            assert!(pack(Kind::Bits, &bits, false, &mut again));
            for (j, &c) in row.iter().enumerate() {
                assert_eq!((again[j / 64] >> (j % 64)) & 1 == 1, c == b'+');
            }
            for k in [0, len / 2, len - 1, 31, 32, 63, 64, 100, 127] {
                if k >= len {
                    continue;
                }
                for bad in [b'*', b')', b'/', b'1', b' ', 0xAB, b'+' | 0x80] {
                    let mut r = row.clone();
                    r[k] = bad;
                    assert!(
                        !pack(Kind::Pm, &r, true, &mut out),
                        "len {len} byte {bad:#x} at {k}"
                    );
                }
            }
        }
    }

    #[test]
    fn int_fast_path() {
        let mut out = [0u64; 1];
        assert!(pack_int(b"1,-1 1\t-1", 4, &mut out));
        assert_eq!(out[0], 0b1010);
        for bad in [
            &b"1,-1,1"[..],
            b"1,-1,1,-1,",
            b"1,,-1,1,1",
            b"1,-1,1,+1",
            b"1,-1,1,-1,1",
            b"1.0,1,1,1",
        ] {
            assert!(
                !pack_int(bad, 4, &mut [0u64; 1]),
                "{}",
                String::from_utf8_lossy(bad)
            );
        }
    }

    #[test]
    fn int_tokens() {
        for (t, v) in [
            ("1", false),
            ("+1", false),
            ("-1", true),
            ("\u{2212}1", true),
            ("1.0", false),
            ("-1.000", true),
        ] {
            assert_eq!(int_entry(t.as_bytes()), Some(v), "{t}");
        }
        for t in ["", "0", "2", "11", "1.", "1.5", "--1", "+-1", "1e0", "-"] {
            assert_eq!(int_entry(t.as_bytes()), None, "{t}");
        }
    }

    #[test]
    fn bits_headers() {
        assert_eq!(bits_header(b" bits: 1 = -1, 0 = +1"), Some(Ok(true)));
        assert_eq!(bits_header(b" bits: 1 = +1, 0 = -1"), Some(Ok(false)));
        assert_eq!(bits_header(b"bits:0=-1"), Some(Ok(false)));
        assert_eq!(bits_header(b" bits: 1 = -1, 0 = -1"), Some(Err(())));
        assert_eq!(bits_header(b" bits: maybe"), Some(Err(())));
        assert_eq!(bits_header(b" a Sylvester matrix"), None);
    }
}
