//! The matrix id: the lowercase hex SHA-256 of the canonical text.
//!
//! The canonical text of a matrix is each row written as `+` (for +1) and `-` (for −1), each row
//! followed by `\n`, and no other bytes. Anyone can check an id with standard tools:
//! `hadamard build 12 --format pm | sha256sum`. The id names the exact matrix, not its
//! equivalence class. It is computed row by row, so a large matrix is never written out whole.

use crate::matrix::Matrix;
use sha2::{Digest, Sha256};
use std::sync::atomic::{AtomicBool, Ordering};

/// The id of `m`: lowercase hex SHA-256 of its canonical text.
pub fn matrix_id(m: &Matrix) -> String {
    let mut h = Sha256::new();
    let mut buf = Vec::with_capacity(m.cols() + 1);
    for i in 0..m.rows() {
        buf.clear();
        m.write_canonical_row(i, &mut buf);
        h.update(&buf);
    }
    hex(&h.finalize())
}

/// The id of the matrix whose canonical text `bytes` are, when they are one: rows of the same
/// length of `+` and `-` only, each ended by `\n`, and nothing else (no byte-order mark, no
/// `\r`, no comment). Gives (id, rows, columns), the id being [`matrix_id`] of that matrix;
/// `None` when `bytes` are anything else, or when `stop` was set meanwhile (it is looked at
/// every few rows, so a caller that learns the input is unreadable can stop it early).
///
/// A file in the `pm` format as this project writes it is its own canonical text, so its id
/// can be hashed straight from the file, on another thread while the file is parsed and
/// checked, without writing the text out again.
pub fn canonical_text_id(bytes: &[u8], stop: &AtomicBool) -> Option<(String, usize, usize)> {
    let cols = bytes.iter().position(|&c| c == b'\n')?;
    if cols == 0 || !bytes.len().is_multiple_of(cols + 1) {
        return None;
    }
    let rows = bytes.len() / (cols + 1);
    let mut h = Sha256::new();
    for (k, line) in bytes.chunks_exact(cols + 1).enumerate() {
        // Every byte but the last is '+' or '-' (branch-free, so it is vectorised).
        let odd = line[..cols]
            .iter()
            .fold(0u8, |acc, &c| acc | u8::from(c != b'+' && c != b'-'));
        if odd != 0 || line[cols] != b'\n' || (k % 64 == 0 && stop.load(Ordering::Relaxed)) {
            return None;
        }
        h.update(line);
    }
    Some((hex(&h.finalize()), rows, cols))
}

/// The SHA-256 of arbitrary bytes, lowercase hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    hex(&Sha256::digest(bytes))
}

/// True when `s` has the shape of an id: 64 lowercase hex digits.
pub fn is_id(s: &str) -> bool {
    s.len() == 64
        && s.bytes()
            .all(|b| b.is_ascii_digit() || (b'a'..=b'f').contains(&b))
}

fn hex(bytes: &[u8]) -> String {
    const DIGITS: &[u8; 16] = b"0123456789abcdef";
    let mut s = String::with_capacity(bytes.len() * 2);
    for &b in bytes {
        s.push(DIGITS[(b >> 4) as usize] as char);
        s.push(DIGITS[(b & 15) as usize] as char);
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn id_is_sha256_of_canonical_text() {
        let m = Matrix::from_rows(&[[1i8, 1], [1, -1]]).unwrap();
        // Outside reference: `printf '++\n+-\n' | sha256sum` (GNU coreutils).
        assert_eq!(
            matrix_id(&m),
            "5c43885b5ad323435abc049650347108889203320297cc6e8c3b7fe586af3a61"
        );
        assert_eq!(sha256_hex(b"++\n+-\n"), matrix_id(&m));
        assert!(is_id(&matrix_id(&m)));
    }

    #[test]
    fn canonical_text_is_hashed_as_it_is() {
        let go = AtomicBool::new(false);
        // Outside reference: `printf '++\n+-\n' | sha256sum` (GNU coreutils), as above.
        let want = "5c43885b5ad323435abc049650347108889203320297cc6e8c3b7fe586af3a61";
        assert_eq!(
            canonical_text_id(b"++\n+-\n", &go),
            Some((want.to_string(), 2, 2))
        );
        // The 12×3 text of a pseudo-random matrix: its id is matrix_id of that matrix.
        let m = Matrix::from_fn(12, 3, |i, j| (i * 7 + j * 5) % 3 == 1);
        let mut text = Vec::new();
        for i in 0..12 {
            m.write_canonical_row(i, &mut text);
        }
        assert_eq!(canonical_text_id(&text, &go), Some((matrix_id(&m), 12, 3)));
        // Anything that is not exactly a canonical text is left to matrix_id of the parsed
        // matrix: a \r, a missing last newline, a ragged row, another character, a BOM.
        for bad in [
            &b"++\r\n+-\r\n"[..],
            b"++\n+-",
            b"++\n+-+\n",
            b"++\n+1\n",
            b"\xEF\xBB\xBF++\n+-\n",
            b"\n\n",
            b"",
        ] {
            assert_eq!(canonical_text_id(bad, &go), None, "{bad:?}");
        }
        // Stopped: no id.
        assert_eq!(canonical_text_id(b"++\n+-\n", &AtomicBool::new(true)), None);
    }
}
