//! What the literature says about orders up to 2000, read from `seed-catalogue/orders/literature.txt`.
//!
//! One idea: the program may call an order *open* only when a published source does, so the
//! list of open orders is data with a reference on every line, not code. The file is embedded
//! with `include_str!` (core does no I/O) and parsed once; a malformed line is an error that
//! names its line, and the test suite requires the embedded file to parse cleanly.

use std::fmt;
use std::sync::OnceLock;

/// The embedded file.
pub const TEXT: &str = include_str!("../../../seed-catalogue/orders/literature.txt");

/// One order-specific line.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct OrderEntry {
    pub order: u64,
    pub open: bool,
    pub note: String,
    pub reference: String,
    pub line: usize,
}

/// A `range A B known` rule.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct RangeRule {
    pub from: u64,
    pub to: u64,
    pub note: String,
    pub reference: String,
    pub line: usize,
}

/// A history milestone.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Milestone {
    pub year: u32,
    pub event: String,
    pub reference: String,
}

/// The parsed file.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Literature {
    pub orders: Vec<OrderEntry>,
    pub ranges: Vec<RangeRule>,
    pub history: Vec<Milestone>,
}

/// A line that could not be read.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ParseError {
    pub line: usize,
    pub message: String,
}

impl fmt::Display for ParseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "literature.txt line {}: {}", self.line, self.message)
    }
}

impl std::error::Error for ParseError {}

/// Parses the grammar documented at the top of `literature.txt`.
pub fn parse(text: &str) -> Result<Literature, ParseError> {
    let mut lit = Literature::default();
    for (k, raw) in text.lines().enumerate() {
        let line = k + 1;
        let err = |message: String| ParseError { line, message };
        let s = raw.trim();
        if s.is_empty() || s.starts_with('#') {
            continue;
        }
        let parts: Vec<&str> = s.split('|').map(str::trim).collect();
        let [head, note, reference] = parts[..] else {
            return Err(err(format!(
                "expected `head | note | reference`, found {} field(s)",
                parts.len()
            )));
        };
        if note.is_empty() || reference.is_empty() {
            return Err(err("the note and the reference must not be empty".into()));
        }
        let words: Vec<&str> = head.split_whitespace().collect();
        let num = |w: &str| {
            w.parse::<u64>()
                .map_err(|_| err(format!("`{w}` is not a whole number")))
        };
        let (note, reference) = (note.to_string(), reference.to_string());
        match words[..] {
            [kind @ ("open" | "known"), n] => {
                let order = num(n)?;
                if !order.is_multiple_of(4) {
                    return Err(err(format!("{order} is not a multiple of 4")));
                }
                if lit.orders.iter().any(|e| e.order == order) {
                    return Err(err(format!("order {order} is listed twice")));
                }
                lit.orders.push(OrderEntry {
                    order,
                    open: kind == "open",
                    note,
                    reference,
                    line,
                });
            }
            ["range", a, b, "known"] => {
                let (from, to) = (num(a)?, num(b)?);
                if from > to {
                    return Err(err(format!("empty range {from}..{to}")));
                }
                lit.ranges.push(RangeRule {
                    from,
                    to,
                    note,
                    reference,
                    line,
                });
            }
            ["history", y] => {
                let year = y.parse().map_err(|_| err(format!("`{y}` is not a year")))?;
                lit.history.push(Milestone {
                    year,
                    event: note,
                    reference,
                });
            }
            _ => return Err(err(format!("unknown entry `{head}`"))),
        }
    }
    Ok(lit)
}

/// The embedded file, parsed once.
///
/// # Panics
/// If the embedded file does not parse; the test suite rules that out.
pub fn embedded() -> &'static Literature {
    static LIT: OnceLock<Literature> = OnceLock::new();
    LIT.get_or_init(|| parse(TEXT).unwrap_or_else(|e| panic!("embedded {e}")))
}

/// The literature's verdict on one order.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Verdict<'a> {
    /// Listed open.
    Open(&'a OrderEntry),
    /// Known, with an order-specific line if there is one, and the rule that covers it.
    Known(Option<&'a OrderEntry>, &'a RangeRule),
    /// The file says nothing (n above every range, or not a multiple of 4).
    Silent,
}

impl Literature {
    /// What the file says about order n.
    pub fn verdict(&self, n: u64) -> Verdict<'_> {
        let entry = self.orders.iter().find(|e| e.order == n);
        if let Some(e) = entry.filter(|e| e.open) {
            return Verdict::Open(e);
        }
        match self
            .ranges
            .iter()
            .find(|r| r.from <= n && n <= r.to && n.is_multiple_of(4))
        {
            Some(r) => Verdict::Known(entry, r),
            None => Verdict::Silent,
        }
    }

    /// The open orders, ascending.
    pub fn open_orders(&self) -> Vec<u64> {
        let mut v: Vec<u64> = self
            .orders
            .iter()
            .filter(|e| e.open)
            .map(|e| e.order)
            .collect();
        v.sort_unstable();
        v
    }

    /// The largest order any range rule covers: above it the file is silent.
    pub fn horizon(&self) -> u64 {
        self.ranges.iter().map(|r| r.to).max().unwrap_or(0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn embedded_file_parses() {
        let lit = parse(TEXT).unwrap();
        // Đoković, Combinatorica 28 (2008): 13 open orders ≤ 2000; minus 1004 (Đoković, Golubitsky
        // and Kotsireas, J. Combin. Des. 22, 2014) leaves these 12.
        assert_eq!(
            lit.open_orders(),
            [668, 716, 892, 1132, 1244, 1388, 1436, 1676, 1772, 1916, 1948, 1964]
        );
        assert_eq!(lit.horizon(), 2000);
        assert!(lit.history.iter().any(|m| m.year == 1962));
        for e in lit.orders.iter().filter(|e| e.open) {
            // Derived (references.md#r3-open-orders): each open n/4 is a prime ≡ 3 mod 4.
            assert!(
                crate::arith::is_prime(e.order / 4) && e.order / 4 % 4 == 3,
                "{}",
                e.order
            );
        }
    }

    #[test]
    fn errors_name_their_line() {
        let e = parse("# c\n\nopen 668 | x | y\nopen 670 | x | y\n").unwrap_err();
        assert_eq!((e.line, e.message.contains("multiple of 4")), (4, true));
        assert_eq!(parse("open 668 | x\n").unwrap_err().line, 1);
        assert_eq!(parse("\nfoo 4 | x | y\n").unwrap_err().line, 2);
        assert_eq!(
            parse("known 4 | x | y\nknown 4 | x | y").unwrap_err().line,
            2
        );
        assert!(parse("range 4 x known | a | b")
            .unwrap_err()
            .message
            .contains("`x`"));
    }
}
