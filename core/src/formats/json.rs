//! JSON: an array of arrays of ±1.
//!
//! One idea: the only JSON we accept is two levels of arrays holding numbers, so a hand-written
//! parser can walk the bytes once, keeping the current line and where it began, and feed each
//! number to the row builder as it passes. There is no tree of values, memory stays at the
//! packed bits, and every error has a line and a column.

use super::rows::Builder;
use super::text::shown;
use super::{describe_at, line_col, Format, Location, ParseError, Parsed, ReadOptions};

struct Cursor<'a> {
    b: &'a [u8],
    pos: usize,
    line: usize,
    line_start: usize,
}

impl Cursor<'_> {
    fn skip_ws(&mut self) {
        while let Some(&c) = self.b.get(self.pos) {
            match c {
                b' ' | b'\t' | b'\r' => self.pos += 1,
                b'\n' => {
                    self.pos += 1;
                    self.line += 1;
                    self.line_start = self.pos;
                }
                _ => break,
            }
        }
    }

    fn peek(&self) -> Option<u8> {
        self.b.get(self.pos).copied()
    }

    /// An error at byte `at`, which must be on the current line.
    fn err(&self, at: usize, msg: impl Into<String>) -> ParseError {
        ParseError::new(line_col(self.b, self.line, self.line_start, at), msg)
    }

    fn found(&self) -> String {
        describe_at(self.b, self.pos)
    }

    /// A number equal to ±1; returns whether it is −1.
    fn entry(&mut self) -> Result<bool, ParseError> {
        let start = self.pos;
        let len = self.b[start..]
            .iter()
            .position(|c| !matches!(c, b'+' | b'-' | b'0'..=b'9' | b'.' | b'e' | b'E'))
            .unwrap_or(self.b.len() - start);
        let tok = &self.b[start..start + len];
        let negative = match tok {
            b"1" | b"1.0" => false,
            b"-1" | b"-1.0" => true,
            b"" => return Err(self.err(start, format!("expected 1 or -1, found {}", self.found()))),
            _ => match json_number(tok) {
                Some(v) => match exact_unit(tok) {
                    Some(negative) => negative,
                    None if v == 1.0 || v == -1.0 => {
                        return Err(self.err(
                            start,
                            format!(
                                "{} is not exactly 1 or -1: it only rounds to {} in floating point; write 1 or -1",
                                shown(tok),
                                v
                            ),
                        ))
                    }
                    None => {
                        return Err(
                            self.err(start, format!("expected 1 or -1, found {}", shown(tok)))
                        )
                    }
                },
                None => {
                    return Err(self.err(start, format!("'{}' is not a JSON number", shown(tok))))
                }
            },
        };
        self.pos += len;
        Ok(negative)
    }
}

/// For a token that follows JSON's number grammar: `Some(is_negative)` when its exact decimal
/// value is 1 or −1 (`1`, `-1.0`, `1.00`, `10E-1`), `None` otherwise, so that numbers which
/// only round to ±1 in binary floating point (`1.00000000000000011`,
/// `-0.99999999999999999999`) are not taken for entries.
fn exact_unit(tok: &[u8]) -> Option<bool> {
    let negative = tok.first() == Some(&b'-');
    let body = &tok[usize::from(negative)..];
    let (mantissa, exp) = match body.iter().position(|c| matches!(c, b'e' | b'E')) {
        Some(k) => (&body[..k], &body[k + 1..]),
        None => (body, &b""[..]),
    };
    let (int, frac) = match mantissa.iter().position(|&c| c == b'.') {
        Some(k) => (&mantissa[..k], &mantissa[k + 1..]),
        None => (mantissa, &b""[..]),
    };
    // The value is digits × 10^(exp − |frac|); an exponent too long to matter is not ±1.
    let exp: i64 = if exp.is_empty() {
        0
    } else {
        std::str::from_utf8(exp).ok()?.parse().ok()?
    };
    let digits: Vec<u8> = int.iter().chain(frac).copied().collect();
    let first = digits.iter().position(|&c| c != b'0')?;
    let last = digits.iter().rposition(|&c| c != b'0')?;
    let trailing = (digits.len() - 1 - last) as i64;
    let scale = exp.checked_sub(frac.len() as i64)?.checked_add(trailing)?;
    (first == last && digits[first] == b'1' && scale == 0).then_some(negative)
}

/// The value of a token that follows JSON's number grammar exactly, else `None`.
fn json_number(tok: &[u8]) -> Option<f64> {
    let mut i = usize::from(tok.first() == Some(&b'-'));
    let digits = |i: usize| tok[i..].iter().take_while(|c| c.is_ascii_digit()).count();
    let int = digits(i);
    if int == 0 || (int > 1 && tok[i] == b'0') {
        return None;
    }
    i += int;
    if tok.get(i) == Some(&b'.') {
        let frac = digits(i + 1);
        if frac == 0 {
            return None;
        }
        i += 1 + frac;
    }
    if matches!(tok.get(i), Some(b'e' | b'E')) {
        i += 1;
        if matches!(tok.get(i), Some(b'+' | b'-')) {
            i += 1;
        }
        let exp = digits(i);
        if exp == 0 {
            return None;
        }
        i += exp;
    }
    if i != tok.len() {
        return None;
    }
    std::str::from_utf8(tok).ok()?.parse().ok()
}

pub(super) fn read(body: &[u8], opts: &ReadOptions) -> Result<Parsed, ParseError> {
    let mut p = Cursor {
        b: body,
        pos: 0,
        line: 1,
        line_start: 0,
    };
    let mut b = Builder::new(opts.max_order);
    p.skip_ws();
    if p.peek() != Some(b'[') {
        return Err(p.err(
            p.pos,
            format!("expected '[' to start the matrix, found {}", p.found()),
        ));
    }
    p.pos += 1;
    p.skip_ws();
    if p.peek() == Some(b']') {
        return Err(p.err(p.pos, "empty matrix: the array has no rows"));
    }
    loop {
        p.skip_ws();
        let row = b.rows();
        if p.peek() != Some(b'[') {
            return Err(p.err(
                p.pos,
                format!("expected '[' to start row {}, found {}", row + 1, p.found()),
            ));
        }
        b.begin_row()
            .map_err(|s| s.into_error(row, |m| p.err(p.pos, m)))?;
        p.pos += 1;
        p.skip_ws();
        if p.peek() == Some(b']') {
            return Err(p.err(p.pos, format!("row {} is empty", row + 1)));
        }
        loop {
            p.skip_ws();
            let at = p.pos;
            let negative = p.entry()?;
            b.push(negative)
                .map_err(|s| s.into_error(row, |m| p.err(at, m)))?;
            p.skip_ws();
            match p.peek() {
                Some(b',') => p.pos += 1,
                Some(b']') => break,
                _ => {
                    let msg = format!(
                        "expected ',' or ']' after an entry of row {}, found {}",
                        row + 1,
                        p.found()
                    );
                    return Err(p.err(p.pos, msg));
                }
            }
        }
        b.end_row()
            .map_err(|s| s.into_error(row, |m| p.err(p.pos, m)))?;
        p.pos += 1;
        p.skip_ws();
        match p.peek() {
            Some(b',') => p.pos += 1,
            Some(b']') => break,
            _ => {
                let msg = format!(
                    "expected ',' or ']' after row {}, found {}",
                    row + 1,
                    p.found()
                );
                return Err(p.err(p.pos, msg));
            }
        }
    }
    p.pos += 1;
    p.skip_ws();
    if p.pos < body.len() {
        return Err(p.err(
            p.pos,
            format!("unexpected {} after the end of the matrix", p.found()),
        ));
    }
    match b.finish() {
        Some((matrix, erasures)) => Ok(Parsed {
            matrix,
            format: Format::Json,
            erasures,
        }),
        None => Err(ParseError::new(Location::Nowhere, "empty matrix")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_follow_json() {
        for (t, v) in [
            ("1", 1.0),
            ("-1.00", -1.0),
            ("1e0", 1.0),
            ("10E-1", 1.0),
            ("0.1e1", 1.0),
            ("2", 2.0),
        ] {
            assert_eq!(json_number(t.as_bytes()), Some(v), "{t}");
        }
        for t in ["01", "+1", "1.", ".5", "1e", "--1", "1-", "-"] {
            assert_eq!(json_number(t.as_bytes()), None, "{t}");
        }
    }

    /// Exact decimal ±1 only: the nearest binary64 of the first two rejected tokens is ±1
    /// (IEEE 754 round to nearest; Python's `float('1.00000000000000011') == 1.0` agrees).
    #[test]
    fn entries_must_be_exactly_one() {
        for (t, neg) in [
            ("1", false),
            ("-1", true),
            ("1.0", false),
            ("-1.00", true),
            ("1e0", false),
            ("10E-1", false),
            ("0.1e1", false),
            ("-100e-2", true),
        ] {
            assert_eq!(exact_unit(t.as_bytes()), Some(neg), "{t}");
        }
        for t in [
            "1.00000000000000011",
            "-0.99999999999999999999",
            "0",
            "-0.0",
            "2",
            "11e-1",
            "1e99999999999999999999",
            "0.1",
        ] {
            assert_eq!(exact_unit(t.as_bytes()), None, "{t}");
        }
        assert_eq!(json_number(b"1.00000000000000011"), Some(1.0));
        assert_eq!(json_number(b"-0.99999999999999999999"), Some(-1.0));
        let opts = ReadOptions::default();
        let e = read(b"[[1, 1],\n [1, -0.99999999999999999999]]", &opts).unwrap_err();
        assert_eq!(e.location, Location::LineCol { line: 2, col: 6 }, "{e}");
        assert!(e.to_string().contains("not exactly"), "{e}");
    }
}
