//! Format detection.
//!
//! One idea: the formats are told apart by which characters can appear in them, and the first
//! row almost always settles it, so detection reads one row and stops — except for the one
//! truly ambiguous row, single `1`s apart (`int`, or spaced-out `bits` whose row holds no `0`),
//! where it reads on until a row decides. The rules are listed in the module docs of
//! [`super`].

use super::text::{bits_header, line_end, MINUS};
use super::{line_col, strip_bom, Format, ParseError};

pub(super) struct Sniff {
    pub(super) format: Format,
    /// Set when the first row looks like no format at all (binary garbage, prose): the error
    /// to report if the caller did not force a format.
    pub(super) unrecognised: Option<ParseError>,
}

/// What one row says about the format.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Says {
    Is(Format),
    /// Only single `1`s (and `?`s) apart: `int`, unless a later row says `bits`.
    OnesApart,
    /// Only `?`s: no evidence.
    Nothing,
    /// No character of any format; the offset of the first one that is not a blank.
    Garbage(usize),
}

pub(super) fn sniff(bytes: &[u8]) -> Sniff {
    let sure = |format| Sniff {
        format,
        unrecognised: None,
    };
    if bytes.starts_with(b"\x93NUMPY") {
        return sure(Format::Npy);
    }
    let body = strip_bom(bytes);
    if body.iter().find(|c| !c.is_ascii_whitespace()) == Some(&b'[') {
        return sure(Format::Json);
    }
    let mut ones_apart = false;
    let (mut pos, mut line) = (0, 0);
    while pos < body.len() {
        line += 1;
        let start = pos;
        let (end, next) = line_end(body, start);
        pos = next;
        let text = &body[start..end];
        match text.iter().position(|&c| c != b' ' && c != b'\t') {
            None => continue,
            // The `bits` writer's mapping header says what follows, even for a lone `1`.
            Some(k) if text[k] == b'#' => {
                if bits_header(&text[k + 1..]).is_some() {
                    return sure(Format::Bits);
                }
                continue;
            }
            Some(_) => {}
        }
        match (row_says(text), ones_apart) {
            (Says::Is(Format::Bits), _) => return sure(Format::Bits),
            (Says::Is(f), false) => return sure(f),
            (Says::Is(_) | Says::Garbage(_), true) => return sure(Format::Int),
            (Says::OnesApart, _) => ones_apart = true,
            (Says::Nothing, _) => {}
            (Says::Garbage(k), false) => {
                let msg = format!(
                    "not a matrix in any format read here (pm, int, bits, json, npy): found {}",
                    super::describe_at(body, start + k)
                );
                return Sniff {
                    format: Format::Int,
                    unrecognised: Some(ParseError::new(
                        line_col(body, line, start, start + k),
                        msg,
                    )),
                };
            }
        }
    }
    sure(if ones_apart { Format::Int } else { Format::Pm })
}

fn row_says(text: &[u8]) -> Says {
    // A row that starts with a character of no format is not a row: prose, or binary.
    if let Some(k) = text.iter().position(|&c| c != b' ' && c != b'\t') {
        if !matches!(text[k], b'+' | b'-' | b'?' | b'0'..=b'9' | b'.' | b',')
            && !text[k..].starts_with(MINUS)
        {
            return Says::Garbage(k);
        }
    }
    let (mut int, mut pm, mut zero, mut one, mut adjacent) = (false, false, false, false, false);
    let mut garbage = None;
    // Length of the current run of `0`/`1`/`?` characters, and whether it holds a digit.
    let (mut run, mut run_digit) = (0usize, false);
    let mut i = 0;
    while i < text.len() {
        let c = text[i];
        let sign_len = if c == b'+' || c == b'-' {
            1
        } else if text[i..].starts_with(MINUS) {
            MINUS.len()
        } else {
            0
        };
        if sign_len > 0 {
            if text.get(i + sign_len).is_some_and(u8::is_ascii_digit) {
                int = true;
            } else {
                pm = true;
            }
            i += sign_len;
            run = 0;
            run_digit = false;
            continue;
        }
        match c {
            b'0' | b'1' | b'?' => {
                zero |= c == b'0';
                one |= c == b'1';
                run += 1;
                run_digit |= c != b'?';
                adjacent |= run >= 2 && run_digit;
            }
            b'2'..=b'9' | b'.' | b',' => int = true,
            b' ' | b'\t' => {}
            _ => {
                garbage.get_or_insert(i);
            }
        }
        if !matches!(c, b'0' | b'1' | b'?') {
            run = 0;
            run_digit = false;
        }
        i += 1;
    }
    if int {
        Says::Is(Format::Int)
    } else if pm {
        Says::Is(Format::Pm)
    } else if zero || adjacent {
        Says::Is(Format::Bits)
    } else if one {
        Says::OnesApart
    } else if let Some(k) = garbage {
        Says::Garbage(k)
    } else {
        Says::Nothing
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_decide() {
        let cases: &[(&str, Format)] = &[
            ("+-+-\n", Format::Pm),
            ("+ - ? -\n", Format::Pm),
            ("\u{2212}+\n", Format::Pm),
            ("1 1\n1 -1\n", Format::Int),
            ("1,-1\n", Format::Int),
            ("+1 -1\n", Format::Int),
            ("\u{2212}1 1\n", Format::Int),
            ("1.0 -1.0\n", Format::Int),
            ("11\n10\n", Format::Bits),
            ("1 0\n", Format::Bits),
            ("1 1\n1 0\n", Format::Bits),
            ("1 1\n1 1\n", Format::Int),
            ("1?\n", Format::Bits),
            ("??\n+-\n", Format::Pm),
            ("# comment 1 0\n+-\n", Format::Pm),
            ("# bits: 1 = +1, 0 = -1\n1\n", Format::Bits),
            ("\u{feff}[[1]]", Format::Json),
            ("  \n[[1]]", Format::Json),
            ("", Format::Pm),
        ];
        for &(text, want) in cases {
            assert_eq!(sniff(text.as_bytes()).format, want, "{text:?}");
        }
        assert_eq!(sniff(b"\x93NUMPY\x01\x00").format, Format::Npy);
    }

    #[test]
    fn garbage_is_named() {
        let s = sniff(b"\n\x89PNG\r\n");
        let e = s.unrecognised.expect("garbage");
        assert_eq!(
            e.location,
            super::super::Location::LineCol { line: 2, col: 1 }
        );
        assert!(sniff(b"++x-").unrecognised.is_none());
    }
}
