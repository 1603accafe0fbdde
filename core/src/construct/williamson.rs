//! The Williamson array, and its quaternion-type generalisation.
//!
//! Theorem (J. Williamson, "Hadamard's determinant theorem and the sum of four squares", Duke
//! Math. J. 11, 1944): if A, B, C, D are symmetric circulant ±1 matrices of order m with
//! A² + B² + C² + D² = 4mI, then
//!
//! ```text
//! [[ A,  B,  C,  D],
//!  [−B,  A, −D,  C],
//!  [−C,  D,  A, −B],
//!  [−D, −C,  B,  A]]
//! ```
//!
//! is Hadamard of order 4m. (Symmetric circulants commute, so the off-diagonal block products
//! cancel in pairs.)
//!
//! The same array is Hadamard for other commuting-or-anticommuting families too ("quaternion
//! type" or Williamson type). A published order-140 example (m = 35, where
//! Williamson matrices do not exist): A, B, D circulant and C the circulant of c with its
//! columns reversed (circ(c)·R, R the back-identity). [`quaternion_array`] builds the array
//! from any such blocks; the exact check decides whether it is Hadamard.

use super::arrays::{four_by_four, Cell, Group, Reversal};
use super::sequences::Williamson;
use super::{finish, hypothesis, ConstructError};
use crate::verify::Verified;

/// The Williamson array's layout: (negative?, block) per cell.
const LAYOUT: [[(bool, usize); 4]; 4] = [
    [(false, 0), (false, 1), (false, 2), (false, 3)],
    [(true, 1), (false, 0), (true, 3), (false, 2)],
    [(true, 2), (false, 3), (false, 0), (true, 1)],
    [(true, 3), (true, 2), (false, 1), (false, 0)],
];

/// One block of a quaternion-type array, given by its first row.
#[derive(Clone, Copy, Debug)]
pub enum Block<'a> {
    /// circ(a): entry (i, j) = a[(j − i) mod m].
    Circulant(&'a [i8]),
    /// circ(a)·R, the circulant with its columns reversed: entry (i, j) = a[(m − 1 − j − i) mod m].
    ColumnsReversed(&'a [i8]),
}

impl<'a> Block<'a> {
    fn row(&self) -> &'a [i8] {
        match *self {
            Block::Circulant(a) | Block::ColumnsReversed(a) => a,
        }
    }
}

/// The Williamson array of order 4m from Williamson matrices (checked with `is_valid` first).
pub fn williamson_array(w: &Williamson) -> Result<Verified, ConstructError> {
    if !w.is_valid() {
        return hypothesis("not Williamson matrices: need symmetric ±1 rows with periodic autocorrelations summing to 0");
    }
    quaternion_array([
        Block::Circulant(&w.a),
        Block::Circulant(&w.b),
        Block::Circulant(&w.c),
        Block::Circulant(&w.d),
    ])
}

/// The Williamson array filled with the four given blocks (A, B, C, D in that order), of order
/// 4m. Only the exact check says whether the result is Hadamard.
pub fn quaternion_array(blocks: [Block<'_>; 4]) -> Result<Verified, ConstructError> {
    let m = blocks[0].row().len();
    if m == 0 || blocks.iter().any(|b| b.row().len() != m) {
        return hypothesis("the four first rows must be nonempty and of one length");
    }
    if blocks
        .iter()
        .any(|b| b.row().iter().any(|&x| x != 1 && x != -1))
    {
        return hypothesis("the first rows must be ±1");
    }
    let f = blocks.map(|b| b.row().to_vec());
    let layout = LAYOUT.map(|row| {
        row.map(|(negative, block)| Cell {
            negative,
            block,
            r_left: false,
            r_right: matches!(blocks[block], Block::ColumnsReversed(_)),
        })
    });
    finish(four_by_four(
        Group::cyclic(m),
        Reversal::BackIdentity,
        &f,
        &layout,
    ))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::sequences::from_text;
    use crate::verify::properties;

    #[test]
    fn seed_williamson_build() {
        for e in &crate::seed::embedded().williamson {
            let h = williamson_array(&e.data).unwrap();
            assert_eq!(h.order(), 4 * e.data.m());
        }
    }

    #[test]
    fn order_140_quaternion_example() {
        // The m = 35 quaternion-type example from the encyclopedia article on the Williamson
        // conjecture (2019 example) [read, via the project's constructions notes]: it must verify as
        // H·Hᵀ = 140·I.
        let a = from_text("--+--+--+++-+----+-+++--+--+-------").unwrap();
        let b = from_text("+---+---+-++-+--+-++-+---+---++++++").unwrap();
        let c = from_text("-++---+-+--+--++--+++++-+-+++++-+--").unwrap();
        let d = from_text("+----+++-+-+--++--+-+-+++----++---+").unwrap();
        let h = quaternion_array([
            Block::Circulant(&a),
            Block::Circulant(&b),
            Block::ColumnsReversed(&c),
            Block::Circulant(&d),
        ])
        .unwrap();
        assert_eq!(h.order(), 140);
        assert!(!properties(h.matrix()).symmetric);
        // With C left as a plain circulant the array is not Hadamard.
        let plain = quaternion_array([
            Block::Circulant(&a),
            Block::Circulant(&b),
            Block::Circulant(&c),
            Block::Circulant(&d),
        ]);
        assert!(matches!(plain, Err(ConstructError::NotVerified(_))));
    }

    #[test]
    fn invalid_williamson_is_refused() {
        let s = |x: &str| from_text(x).unwrap();
        let bad = Williamson {
            a: s("+++"),
            b: s("+++"),
            c: s("+--"),
            d: s("+--"),
        };
        assert!(matches!(
            williamson_array(&bad),
            Err(ConstructError::Hypothesis(_))
        ));
    }
}
