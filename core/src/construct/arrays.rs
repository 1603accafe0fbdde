//! The shared builder for 4×4 arrays of group-developed blocks (Williamson, Goethals–Seidel,
//! Cooper–Wallis).
//!
//! One idea: every block is A_f = (f(y − x))ₓ,ᵧ for a ±1 function f on a finite abelian group
//! G = Z_n₁ × Z_n₂ (a circulant when n₁ = 1), possibly multiplied by a reversal R, the
//! permutation matrix of an involution ρ of G: (A·R)ₓ,ᵧ = A_(x, ρ(y)) and
//! (R·A)ₓ,ᵧ = A_(ρ(x), y). So an array is fully described by, per cell, a sign, which function,
//! and whether R stands on the left, the right, or neither; the entries are written straight
//! into the bit-packed matrix.

use crate::matrix::Matrix;

/// The group Z_n₁ × Z_n₂; element (x₁, x₂) has index x₁·n₂ + x₂.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Group {
    pub n1: usize,
    pub n2: usize,
}

impl Group {
    /// The cyclic group Z_v.
    pub fn cyclic(v: usize) -> Group {
        Group { n1: 1, n2: v }
    }
    pub fn order(&self) -> usize {
        self.n1 * self.n2
    }
    /// y − x.
    #[inline]
    pub fn sub(&self, y: usize, x: usize) -> usize {
        let (y1, y2, x1, x2) = (y / self.n2, y % self.n2, x / self.n2, x % self.n2);
        ((y1 + self.n1 - x1) % self.n1) * self.n2 + (y2 + self.n2 - x2) % self.n2
    }
    /// −x.
    #[inline]
    pub fn neg(&self, x: usize) -> usize {
        self.sub(0, x)
    }
}

/// Which involution R permutes by.
#[derive(Clone, Copy, Debug)]
pub(crate) enum Reversal {
    /// x ↦ v − 1 − x on the indices: the back-identity matrix.
    BackIdentity,
    /// x ↦ −x in the group.
    Negation,
}

/// One cell of the array: `sign` · (R on the left?) · A_block · (R on the right?).
#[derive(Clone, Copy, Debug)]
pub(crate) struct Cell {
    pub negative: bool,
    pub block: usize,
    pub r_left: bool,
    pub r_right: bool,
}

/// Writes the 4v × 4v array. `f[b]` is the function of block b, indexed by group element;
/// every value must be ±1.
pub(crate) fn four_by_four(
    g: Group,
    rev: Reversal,
    f: &[Vec<i8>; 4],
    layout: &[[Cell; 4]; 4],
) -> Matrix {
    let v = g.order();
    let rho = |x: usize| match rev {
        Reversal::BackIdentity => v - 1 - x,
        Reversal::Negation => g.neg(x),
    };
    // The values as sign bits, so each entry is one lookup.
    let neg: Vec<Vec<bool>> = f
        .iter()
        .map(|row| row.iter().map(|&e| e < 0).collect())
        .collect();
    let mut m = Matrix::ones_square(4 * v);
    for (bi, cells) in layout.iter().enumerate() {
        for x in 0..v {
            let i = bi * v + x;
            for (bj, c) in cells.iter().enumerate() {
                let xr = if c.r_left { rho(x) } else { x };
                let fb = &neg[c.block];
                for y in 0..v {
                    let yc = if c.r_right { rho(y) } else { y };
                    if fb[g.sub(yc, xr)] != c.negative {
                        m.set_negative(i, bj * v + y, true);
                    }
                }
            }
        }
    }
    m
}
