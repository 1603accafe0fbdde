//! Answers for users who need a size rather than an order: dimensions d = 2^a·m₀, and the
//! smallest usable order at least k.

use super::{order_possible, OrderInfo, Planner, Status, MAX_BUILD_ORDER};
use serde::{Deserialize, Serialize};

/// One way to write a dimension as a power of two times a Hadamard order.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Factoring {
    /// a in d = 2^a·m₀.
    pub power_of_two: u32,
    /// m₀, the dense factor (1 when d is itself a power of two).
    pub dense: u64,
    /// The status of order m₀.
    pub status: Status,
    /// The factored form, e.g. `2^5 · 428`.
    pub factored: String,
}

/// Every usable factoring of a dimension, smallest dense factor (largest power of two) first.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Advice {
    pub dimension: u64,
    /// Only factorings through orders that are constructible or known.
    pub options: Vec<Factoring>,
    /// Factorings that go only through open or uncovered orders, for the record.
    pub blocked: Vec<Factoring>,
    /// A plain-words summary, saying so plainly when there is no option.
    pub note: String,
}

/// The factorings of d as 2^a·m₀ through a constructible or known order m₀, ranked by m₀
/// ascending (so the largest power of two comes first). H_{2^a} ⊗ H_{m₀} is then a Hadamard
/// matrix of size d whose only dense part has order m₀.
pub fn dimension_advice(d: u64) -> Advice {
    let mut p = Planner::new();
    let mut options = Vec::new();
    let mut blocked = Vec::new();
    if d > 0 {
        for a in (0..=d.trailing_zeros()).rev() {
            let m0 = d >> a;
            if !order_possible(m0) {
                continue;
            }
            let status = p.status(m0);
            let factored = match (a, m0) {
                (0, _) => format!("{m0}"),
                (_, 1) => format!("2^{a}"),
                _ => format!("2^{a} · {m0}"),
            };
            let f = Factoring {
                power_of_two: a,
                dense: m0,
                status,
                factored,
            };
            match status {
                Status::Constructible | Status::Known => options.push(f),
                _ => blocked.push(f),
            }
        }
    }
    let note = if !order_possible(d) {
        format!("No Hadamard matrix of size {d} exists: the size must be 1, 2 or a multiple of 4.")
    } else if options.is_empty() {
        format!(
            "No Hadamard matrix of size {d} is known: every factoring 2^a·m₀ goes through an order that is open or not covered ({}).",
            blocked.iter().map(|f| f.factored.clone()).collect::<Vec<_>>().join(", ")
        )
    } else {
        let best = &options[0];
        let built = options.iter().find(|f| f.status == Status::Constructible);
        let mut s = format!(
            "Smallest dense factor: {} ({:?}).",
            best.factored, best.status
        )
        .replace("Constructible", "constructible")
        .replace("Known", "known");
        match built {
            Some(b) if b != best => s.push_str(&format!(
                " The smallest this program builds now: {}.",
                b.factored
            )),
            None => s.push_str(" This program cannot build any of them yet."),
            _ => {}
        }
        s
    };
    Advice {
        dimension: d,
        options,
        blocked,
        note,
    }
}

/// How far past k the smallest-order searches look: orders k to k + this. Without a bound, a
/// search for a constructible order above [`MAX_BUILD_ORDER`] never ends (nothing above it is
/// constructible) and the planner's memo grows with every order stepped over.
pub const SMALLEST_SEARCH_SPAN: u64 = 4096;

/// The last order the searches from k look at (see [`SMALLEST_SEARCH_SPAN`]).
pub fn smallest_search_limit(k: u64) -> u64 {
    k.max(1).saturating_add(SMALLEST_SEARCH_SPAN)
}

fn smallest_with(k: u64, limit: u64, ok: impl Fn(Status) -> bool) -> Option<OrderInfo> {
    let mut p = Planner::new();
    let mut n = k.max(1);
    while n <= limit {
        if order_possible(n) && ok(p.status(n)) {
            return Some(p.order_info(n));
        }
        n = if n < 4 {
            n + 1
        } else {
            n.checked_add(4 - n % 4)?
        };
    }
    None
}

/// The smallest order n ≥ k that is constructible or known. For balanced repeated replication
/// with k strata, ask for k + 1, so that a replicate set can avoid the constant column.
///
/// None when there is none up to [`smallest_search_limit`]`(k)`.
pub fn smallest_known_at_least(k: u64) -> Option<OrderInfo> {
    smallest_with(k, smallest_search_limit(k), |s| {
        matches!(s, Status::Constructible | Status::Known)
    })
}

/// The smallest order n ≥ k that this program builds now. None when there is none up to
/// [`smallest_search_limit`]`(k)` or [`MAX_BUILD_ORDER`], whichever is smaller: nothing above
/// the build limit is constructible, so a k above it is answered at once.
pub fn smallest_constructible_at_least(k: u64) -> Option<OrderInfo> {
    smallest_with(k, smallest_search_limit(k).min(MAX_BUILD_ORDER), |s| {
        s == Status::Constructible
    })
}
