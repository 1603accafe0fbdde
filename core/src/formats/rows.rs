//! The row builder the text and JSON readers feed.
//!
//! One idea: the first row fixes the number of columns, and from then on every row is packed
//! straight onto the end of one growing word vector, so a reader never holds the entries twice
//! and the shape rules (ragged rows, the order limit) live in one place. The builder knows
//! nothing about where an entry came from; it says what went wrong and the reader says where.

use super::ParseError;
use crate::matrix::{words_for, Matrix};

/// A shape rule an entry or row broke.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Shape {
    /// A row went past the length of the first row.
    PastFirstRow { expected: usize },
    /// The first row went past the order limit.
    PastMaxOrder { max: usize },
    /// A row ended before the length of the first row.
    ShortRow { got: usize, expected: usize },
    /// One row more than the order limit.
    TooManyRows { max: usize },
}

impl Shape {
    /// The error for row `row`, placed by `make`, and marked when it is the order limit.
    pub(super) fn into_error(
        self,
        row: usize,
        make: impl FnOnce(String) -> ParseError,
    ) -> ParseError {
        let limit = matches!(self, Shape::PastMaxOrder { .. } | Shape::TooManyRows { .. });
        let e = make(self.message(row));
        if limit {
            e.past_max_order()
        } else {
            e
        }
    }

    /// The message, for row `row` (0-based; shown 1-based).
    pub(super) fn message(self, row: usize) -> String {
        let r = row + 1;
        match self {
            Shape::PastFirstRow { expected } => {
                format!("row {r} has more than {expected} entries (the first row has {expected})")
            }
            Shape::PastMaxOrder { max } => {
                format!("row {r} has more than {max} entries, the maximum order")
            }
            Shape::ShortRow { got, expected } => {
                format!(
                    "row {r} has {got} entries, expected {expected} (the length of the first row)"
                )
            }
            Shape::TooManyRows { max } => format!("more than {max} rows, the maximum order"),
        }
    }
}

pub(super) struct Builder {
    max_order: usize,
    cols: Option<usize>,
    rows: usize,
    words: Vec<u64>,
    cur: Vec<u64>,
    len: usize,
    erasures: Vec<(usize, usize)>,
}

impl Builder {
    pub(super) fn new(max_order: usize) -> Builder {
        Builder {
            max_order,
            cols: None,
            rows: 0,
            words: Vec::new(),
            cur: Vec::new(),
            len: 0,
            erasures: Vec::new(),
        }
    }

    /// The number of columns, once the first row is complete.
    pub(super) fn cols(&self) -> Option<usize> {
        self.cols
    }

    /// The number of complete rows.
    pub(super) fn rows(&self) -> usize {
        self.rows
    }

    /// Checks that one more row is allowed; call before its first entry.
    pub(super) fn begin_row(&self) -> Result<(), Shape> {
        if self.rows >= self.max_order {
            return Err(Shape::TooManyRows {
                max: self.max_order,
            });
        }
        Ok(())
    }

    /// Appends one entry to the current row.
    #[inline]
    pub(super) fn push(&mut self, negative: bool) -> Result<(), Shape> {
        match self.cols {
            Some(c) if self.len >= c => return Err(Shape::PastFirstRow { expected: c }),
            None if self.len >= self.max_order => {
                return Err(Shape::PastMaxOrder {
                    max: self.max_order,
                })
            }
            _ => {}
        }
        let w = self.len / 64;
        if w >= self.cur.len() {
            self.cur.push(0);
        }
        self.cur[w] |= u64::from(negative) << (self.len % 64);
        self.len += 1;
        Ok(())
    }

    /// Appends an erased entry: +1, with its place recorded.
    pub(super) fn push_erased(&mut self) -> Result<(), Shape> {
        self.push(false)?;
        self.erasures.push((self.rows, self.len - 1));
        Ok(())
    }

    /// Ends the current row.
    pub(super) fn end_row(&mut self) -> Result<(), Shape> {
        let expected = *self.cols.get_or_insert(self.len);
        if self.len != expected {
            return Err(Shape::ShortRow {
                got: self.len,
                expected,
            });
        }
        self.cur.resize(words_for(expected), 0);
        self.words.extend_from_slice(&self.cur);
        self.cur.fill(0);
        self.len = 0;
        self.rows += 1;
        Ok(())
    }

    /// The fast path: offers room for a whole row of `len` entries, which `fill` packs and
    /// returns true, or leaves half-done and returns false. Nothing is kept on false, nor when
    /// the row would break a shape rule (the slow path then says which). `fill` must leave the
    /// bits past `len` zero.
    pub(super) fn try_row(&mut self, len: usize, fill: impl FnOnce(&mut [u64]) -> bool) -> bool {
        let fits = match self.cols {
            Some(c) => c == len,
            None => len > 0 && len <= self.max_order,
        };
        if !fits || self.len != 0 || self.rows >= self.max_order {
            return false;
        }
        let start = self.words.len();
        self.words.resize(start + words_for(len), 0);
        if !fill(&mut self.words[start..]) {
            self.words.truncate(start);
            return false;
        }
        self.cols = Some(len);
        self.rows += 1;
        true
    }

    /// The matrix and its erasures; `None` when there are no rows.
    pub(super) fn finish(self) -> Option<(Matrix, Vec<(usize, usize)>)> {
        let cols = self.cols?;
        if self.rows == 0 {
            return None;
        }
        Matrix::from_words(self.rows, cols, self.words).map(|m| (m, self.erasures))
    }
}
