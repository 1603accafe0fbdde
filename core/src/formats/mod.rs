//! Reading and writing the formats people exchange Hadamard matrices in.
//!
//! One idea: every reader walks its input once, straight into the packed bits of a [`Matrix`],
//! checking shape and limits as it goes, and stops at the first problem with a [`ParseError`]
//! that names the place (line and column for text, element index or byte offset for `.npy`).
//! Nothing is allocated beyond a small multiple of the input's own size, and no input, however
//! hostile, makes a reader panic.
//!
//! A reader only builds a ±1 array; whether it is Hadamard is [`crate::verify`]'s question. A
//! rectangular matrix reads fine; a ragged one does not.
//!
//! # Reading
//!
//! | format | what a row looks like | notes |
//! |---|---|---|
//! | `pm`   | `+-+-` or `+ - + -` | `-` or U+2212 `−` for −1; spaces and tabs between entries are allowed |
//! | `int`  | `1,-1,1` or `1 -1 1` | entries `1`, `+1`, `-1`, `−1`, and the float spellings `1.0`, `-1.00`; separators are spaces, tabs, or one comma (CSV) |
//! | `bits` | `0110` or `0 1 1 0` | by default `1` is −1 and `0` is +1 ([`ReadOptions::bits_one_is_negative`]) |
//! | `json` | `[[1,-1],[-1,1]]` | numbers equal to ±1 (`1`, `-1.0`, `1e0`), whitespace anywhere |
//! | `npy`  | NumPy `.npy` v1, v2, v3 | dtypes `i1 i2 i4 i8 u1 u2 u4 u8 f2 f4 f8`, either byte order, C or Fortran order, 2-D |
//!
//! Rules shared by the three line formats (`pm`, `int`, `bits`):
//! - one row per line; LF or CRLF; an optional UTF-8 byte-order mark; spaces and tabs at either
//!   end of a line are ignored;
//! - a line whose first non-blank character is `#` is a comment, anywhere in the file. No entry
//!   of any format starts with `#`, so a comment is never mistaken for a row;
//! - in `bits`, a comment before the first row of the form `# bits: 1 = -1, 0 = +1` (or
//!   `# bits: 1 = +1, 0 = -1`) sets which digit is −1 and overrides the option; this is the line
//!   the `bits` writer puts first;
//! - `?` is an erased entry when [`ReadOptions::allow_erasures`] is set: it is read as +1 and its
//!   place is listed in [`Parsed::erasures`]. JSON and `.npy` have no erasures;
//! - blank lines before the matrix and after it are fine. A blank line ends the matrix: a row
//!   after it is an error, since it most likely starts a second matrix (one matrix per input);
//! - every row must have as many entries as the first; a ragged row is an error at the place it
//!   went wrong (the first extra entry, or the end of a short row);
//! - columns are counted in characters, from 1: `−` is one column, the byte-order mark none.
//!
//! `.npy`: `bool` is refused (it cannot hold −1), as are complex, string, object and structured
//! dtypes. An unsigned dtype cannot hold −1 either, so it reads only all-(+1) data. Element
//! indices in errors are positions in the file's data (NumPy's `a.ravel(order='K')`), counted
//! from 0. The header is checked completely, including that the data has exactly the declared
//! length, before anything is allocated. A byte-order of `=` is read as little-endian.
//!
//! Orders above [`ReadOptions::max_order`] (rows or columns) and empty inputs are errors.
//!
//! # Detection
//!
//! [`detect`] decides in this order:
//! 1. `npy` if the input starts with NumPy's magic `\x93NUMPY`;
//! 2. `json` if its first character other than whitespace (after a byte-order mark) is `[`;
//! 3. `bits` if a comment before the first row is a `# bits:` mapping header;
//! 4. otherwise the first row (the first line that is neither blank nor a comment) decides.
//!    If it starts with a character that begins no entry of any format (a letter, a control
//!    byte), the input is refused as unrecognised, at that character. Else:
//!    - any digit 2–9, a `.`, a `,`, or a sign directly before a digit means `int`;
//!    - else any `+`, `-` or `−` means `pm`;
//!    - else a `0`, or two of `0`/`1`/`?` side by side with a digit among them, means `bits`;
//!    - else a row of single `1`s (and `?`s) apart from each other is `int` — unless a later row
//!      shows a `0` or adjacent digits, which makes the whole file `bits`;
//!    - a row of only `?` defers to the next row.
//!
//! So `1 1` is `int`, `11` and `1 0` are `bits`, and `+1 -1` is `int`. Forcing a format with
//! [`ReadOptions::format`] skips detection.
//!
//! # Writing
//!
//! [`write_to`] streams row by row into any [`std::io::Write`] the caller owns: it never holds a
//! second copy of the n² entries. `pm` output is exactly the canonical text that
//! [`crate::id::matrix_id`] hashes. `npy` is int8, version 1.0, C order, with the header padded
//! the way NumPy pads it. `NpyF64 { scaled: true }` writes ±1/√c (c = columns) as float64, so
//! each row is a unit vector: *scaled*, the orthonormal matrix H/√n — not *normalized*, which
//! in this trade means first row and column all +1. PNG is an indexed picture, one square of
//! `scale` pixels per entry (see [`WriteFormat::Png`]).

mod json;
mod npy;
mod picture;
mod pm_simd;
mod rows;
mod sniff;
mod text;

use crate::matrix::Matrix;
use serde::ser::SerializeMap;
use serde::{Serialize, Serializer};
use std::fmt;
use std::str::FromStr;

/// An input format.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Format {
    /// Rows of `+` and `-`.
    Pm,
    /// ±1 integers separated by spaces, tabs or commas (CSV).
    Int,
    /// Rows of `0`/`1` digits.
    Bits,
    /// An array of arrays of ±1.
    Json,
    /// NumPy `.npy`.
    Npy,
}

impl Format {
    /// Every format.
    pub const ALL: [Format; 5] = [
        Format::Pm,
        Format::Int,
        Format::Bits,
        Format::Json,
        Format::Npy,
    ];

    /// The short name used on the command line and in APIs.
    pub fn name(self) -> &'static str {
        match self {
            Format::Pm => "pm",
            Format::Int => "int",
            Format::Bits => "bits",
            Format::Json => "json",
            Format::Npy => "npy",
        }
    }
}

impl fmt::Display for Format {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// A format name that is not one we know.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct UnknownFormat(pub String);

impl fmt::Display for UnknownFormat {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "unknown format '{}'", self.0)
    }
}

impl std::error::Error for UnknownFormat {}

impl FromStr for Format {
    type Err = UnknownFormat;

    /// `pm`, `int` (or `csv`), `bits`, `json`, `npy`, in any case.
    fn from_str(s: &str) -> Result<Format, UnknownFormat> {
        match s.to_ascii_lowercase().as_str() {
            "pm" => Ok(Format::Pm),
            "int" | "csv" => Ok(Format::Int),
            "bits" => Ok(Format::Bits),
            "json" => Ok(Format::Json),
            "npy" => Ok(Format::Npy),
            _ => Err(UnknownFormat(s.to_string())),
        }
    }
}

/// How to read an input.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ReadOptions {
    /// Force a format; `None` detects it (see the module docs).
    pub format: Option<Format>,
    /// The largest number of rows, and of columns, accepted. Default 2¹⁵.
    pub max_order: usize,
    /// In `bits`, whether `1` means −1 (the default) or +1. A mapping header in the file wins.
    pub bits_one_is_negative: bool,
    /// Whether `?` is accepted as an erased entry in `pm`, `int` and `bits`. Default true.
    pub allow_erasures: bool,
}

impl Default for ReadOptions {
    fn default() -> ReadOptions {
        ReadOptions {
            format: None,
            max_order: 1 << 15,
            bits_one_is_negative: true,
            allow_erasures: true,
        }
    }
}

/// A matrix as read, with what the reader learned on the way.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Parsed {
    /// The entries; an erased entry is stored as +1.
    pub matrix: Matrix,
    /// The format it was read as (detected or forced).
    pub format: Format,
    /// The (row, column) of each `?` entry, counted from 0, in reading order.
    pub erasures: Vec<(usize, usize)>,
}

/// Where in the input an error is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Location {
    /// Text formats: 1-based line and column, the column counted in characters.
    LineCol { line: usize, col: usize },
    /// `.npy`: the index of the element in the file's data, from 0.
    Element(usize),
    /// `.npy`: a byte offset in the file, from 0.
    Byte(usize),
    /// The input as a whole (for example, it is empty).
    Nowhere,
}

impl Serialize for Location {
    /// `{"line": L, "column": C}`, `{"element": K}`, `{"byte": B}`, or `null`.
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        match *self {
            Location::LineCol { line, col } => {
                let mut m = s.serialize_map(Some(2))?;
                m.serialize_entry("line", &line)?;
                m.serialize_entry("column", &col)?;
                m.end()
            }
            Location::Element(k) => {
                let mut m = s.serialize_map(Some(1))?;
                m.serialize_entry("element", &k)?;
                m.end()
            }
            Location::Byte(b) => {
                let mut m = s.serialize_map(Some(1))?;
                m.serialize_entry("byte", &b)?;
                m.end()
            }
            Location::Nowhere => s.serialize_none(),
        }
    }
}

impl<'de> serde::Deserialize<'de> for Location {
    /// The form [`Location`]'s `Serialize` writes, read back (for the API's clients).
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Location, D::Error> {
        #[derive(serde::Deserialize)]
        #[serde(deny_unknown_fields)]
        struct Place {
            line: Option<usize>,
            column: Option<usize>,
            element: Option<usize>,
            byte: Option<usize>,
        }
        let place: Option<Place> = serde::Deserialize::deserialize(d)?;
        Ok(match place {
            None => Location::Nowhere,
            Some(Place {
                line: Some(line),
                column: Some(col),
                element: None,
                byte: None,
            }) => Location::LineCol { line, col },
            Some(Place {
                line: None,
                column: None,
                element: Some(k),
                byte: None,
            }) => Location::Element(k),
            Some(Place {
                line: None,
                column: None,
                element: None,
                byte: Some(b),
            }) => Location::Byte(b),
            Some(_) => {
                return Err(serde::de::Error::custom(
                    "a location is {line, column}, {element} or {byte}",
                ))
            }
        })
    }
}

/// Why an input could not be read, and where.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct ParseError {
    /// What is wrong, in words, without the place.
    pub message: String,
    /// The place.
    pub location: Location,
    /// True when the input is well-formed so far but larger than [`ReadOptions::max_order`]:
    /// a limit of the reader, not a fault of the file (a server answers 413, not 400).
    #[serde(skip_serializing_if = "std::ops::Not::not")]
    pub over_max_order: bool,
}

impl ParseError {
    pub(crate) fn new(location: Location, message: impl Into<String>) -> ParseError {
        ParseError {
            message: message.into(),
            location,
            over_max_order: false,
        }
    }

    /// The same error, marked as past the order limit.
    pub(crate) fn past_max_order(self) -> ParseError {
        ParseError {
            over_max_order: true,
            ..self
        }
    }
}

impl fmt::Display for ParseError {
    /// `line 3, column 7: …`, `element 17: …`, `byte 10: …`, or the bare message.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.location {
            Location::LineCol { line, col } => {
                write!(f, "line {line}, column {col}: {}", self.message)
            }
            Location::Element(k) => write!(f, "element {k}: {}", self.message),
            Location::Byte(b) => write!(f, "byte {b}: {}", self.message),
            Location::Nowhere => f.write_str(&self.message),
        }
    }
}

impl std::error::Error for ParseError {}

const BOM: &[u8] = b"\xEF\xBB\xBF";

/// The input without a leading UTF-8 byte-order mark.
fn strip_bom(bytes: &[u8]) -> &[u8] {
    bytes.strip_prefix(BOM).unwrap_or(bytes)
}

/// Which format `bytes` is in, by the rules in the module docs. Never fails: input that looks
/// like nothing is called `int`, whose reader then says what is wrong with it.
pub fn detect(bytes: &[u8]) -> Format {
    sniff::sniff(bytes).format
}

/// Reads one matrix.
pub fn read(bytes: &[u8], opts: &ReadOptions) -> Result<Parsed, ParseError> {
    let format = match opts.format {
        Some(f) => f,
        None => {
            let s = sniff::sniff(bytes);
            if let Some(e) = s.unrecognised {
                return Err(e);
            }
            s.format
        }
    };
    match format {
        Format::Npy => npy::read(bytes, opts),
        Format::Json => json::read(strip_bom(bytes), opts),
        Format::Pm => text::read(strip_bom(bytes), text::Kind::Pm, opts),
        Format::Int => text::read(strip_bom(bytes), text::Kind::Int, opts),
        Format::Bits => text::read(strip_bom(bytes), text::Kind::Bits, opts),
    }
}

/// An output format.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum WriteFormat {
    /// The canonical text: `+`/`-`, each row ended by `\n`. Its SHA-256 is the matrix id.
    Pm,
    /// `1,-1,…` rows, each ended by `\n`.
    Csv,
    /// A mapping header `# bits: 1 = -1, 0 = +1` (or the other way), then rows of digits.
    Bits { one_is_negative: bool },
    /// `[[1,-1,…],` one row per line `…]`.
    Json,
    /// NumPy `.npy`, int8, version 1.0, C order.
    Npy,
    /// NumPy `.npy`, little-endian float64: ±1, or ±1/√c when `scaled` (c = columns).
    NpyF64 { scaled: bool },
    /// An indexed-colour PNG: +1 off-white, −1 ink blue, `marked_rows` tinted red. Each entry is
    /// a `scale`×`scale` square; `scale: 0` picks one that makes the picture about 512 pixels
    /// wide. The picture is kept to at most 16384 pixels a side: the scale is lowered to fit,
    /// and past 16384 entries a pixel shades a block of entries by its share of −1s.
    Png { scale: u32, marked_rows: Vec<usize> },
}

impl WriteFormat {
    /// The short name (as accepted by `FromStr`).
    pub fn name(&self) -> &'static str {
        match self {
            WriteFormat::Pm => "pm",
            WriteFormat::Csv => "csv",
            WriteFormat::Bits { .. } => "bits",
            WriteFormat::Json => "json",
            WriteFormat::Npy => "npy",
            WriteFormat::NpyF64 { scaled: false } => "npy-f64",
            WriteFormat::NpyF64 { scaled: true } => "npy-f64-scaled",
            WriteFormat::Png { .. } => "png",
        }
    }

    /// The media type for HTTP responses.
    pub fn media_type(&self) -> &'static str {
        match self {
            WriteFormat::Pm | WriteFormat::Bits { .. } => "text/plain; charset=utf-8",
            WriteFormat::Csv => "text/csv; charset=utf-8",
            WriteFormat::Json => "application/json",
            WriteFormat::Npy | WriteFormat::NpyF64 { .. } => "application/octet-stream",
            WriteFormat::Png { .. } => "image/png",
        }
    }

    /// The usual file extension, without the dot.
    pub fn extension(&self) -> &'static str {
        match self {
            WriteFormat::Pm => "txt",
            WriteFormat::Csv => "csv",
            WriteFormat::Bits { .. } => "bits",
            WriteFormat::Json => "json",
            WriteFormat::Npy | WriteFormat::NpyF64 { .. } => "npy",
            WriteFormat::Png { .. } => "png",
        }
    }
}

impl FromStr for WriteFormat {
    type Err = UnknownFormat;

    /// `pm`, `csv` (or `int`), `bits` (1 = −1), `json`, `npy` (int8), `npy-f64`,
    /// `npy-f64-scaled`, `png` (automatic scale, no marked rows); in any case.
    fn from_str(s: &str) -> Result<WriteFormat, UnknownFormat> {
        match s.to_ascii_lowercase().as_str() {
            "pm" => Ok(WriteFormat::Pm),
            "csv" | "int" => Ok(WriteFormat::Csv),
            "bits" => Ok(WriteFormat::Bits {
                one_is_negative: true,
            }),
            "json" => Ok(WriteFormat::Json),
            "npy" => Ok(WriteFormat::Npy),
            "npy-f64" => Ok(WriteFormat::NpyF64 { scaled: false }),
            "npy-f64-scaled" => Ok(WriteFormat::NpyF64 { scaled: true }),
            "png" => Ok(WriteFormat::Png {
                scale: 0,
                marked_rows: Vec::new(),
            }),
            _ => Err(UnknownFormat(s.to_string())),
        }
    }
}

/// Writes `m` in format `f`, appending to `out`.
pub fn write(m: &Matrix, f: &WriteFormat, out: &mut Vec<u8>) {
    // A Vec never refuses bytes, and every picture size is valid for the PNG encoder (see
    // `picture::write`), so there is no error to report here.
    let _ = write_to(m, f, out);
}

/// Writes `m` in format `f` to `out`, row by row. Fails only when `out` does.
pub fn write_to(m: &Matrix, f: &WriteFormat, out: &mut dyn std::io::Write) -> std::io::Result<()> {
    match f {
        WriteFormat::Pm | WriteFormat::Csv | WriteFormat::Bits { .. } | WriteFormat::Json => {
            text::write(m, f, out)
        }
        WriteFormat::Npy => npy::write_i8(m, out),
        WriteFormat::NpyF64 { scaled } => npy::write_f64(m, *scaled, out),
        WriteFormat::Png { scale, marked_rows } => picture::write(m, *scale, marked_rows, out),
    }
}

/// The location of byte `pos` in a text, given the 1-based number of its line and the offset at
/// which that line starts: the column counts characters (UTF-8 lead bytes), from 1.
fn line_col(body: &[u8], line: usize, line_start: usize, pos: usize) -> Location {
    let pos = pos.min(body.len());
    let start = line_start.min(pos);
    let col = 1 + body[start..pos]
        .iter()
        .filter(|&&b| !(0x80..0xC0).contains(&b))
        .count();
    Location::LineCol { line, col }
}

/// How the character at `pos` is shown in a message: `'x'`, `byte 0x93`, or `end of input`.
fn describe_at(body: &[u8], pos: usize) -> String {
    let Some(&b) = body.get(pos) else {
        return "end of input".to_string();
    };
    let len = match b {
        0x00..=0x7F => 1,
        0xC0..=0xDF => 2,
        0xE0..=0xEF => 3,
        0xF0..=0xF7 => 4,
        _ => 0,
    };
    let ch = body
        .get(pos..pos + len)
        .and_then(|s| std::str::from_utf8(s).ok())
        .and_then(|s| s.chars().next());
    match ch {
        Some('\n') => "end of line".to_string(),
        Some(c) => format!("'{}'", c.escape_debug()),
        None => format!("byte 0x{b:02x}"),
    }
}

#[cfg(test)]
mod tests;
