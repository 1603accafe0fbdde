//! The matrix id: the lowercase hex SHA-256 of the canonical text.
//!
//! The canonical text of a matrix is each row written as `+` (for +1) and `-` (for −1), each row
//! followed by `\n`, and no other bytes. Anyone can check an id with standard tools:
//! `hadamard build 12 --format pm | sha256sum`. The id names the exact matrix, not its
//! equivalence class. It is computed row by row, so a large matrix is never written out whole.

use crate::matrix::Matrix;
use sha2::{Digest, Sha256};

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
}
