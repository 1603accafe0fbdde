//! The JSON objects that more than one front end prints: the verification answer of
//! `hadamard verify --json` and the `--at-least` answer of `hadamard advise --json`. The CLI and
//! the Python package (`python/`) both call these, so the two cannot drift apart. Objects that
//! are plain serialisations of a core type (`OrderInfo` for `routes`, `Advice` for
//! `advise --dimension`) need no function here: callers serialise the type itself.
//!
//! Core reads no clock, so the time the check took is measured by the caller and passed in.

use crate::matrix::Matrix;
use crate::repair::{self, Completion, Repair};
use crate::route::{self, OrderInfo};
use crate::verify::Report;
use serde_json::{json, Value};

/// What follows the exact check: whether the matrix as read is Hadamard (a matrix with erased
/// entries is not, until they are known), the one wrong sign that explains a failure, and what
/// the erased entries can be.
#[derive(Clone, Debug)]
pub struct FollowUp {
    /// True when the check passed and nothing is erased.
    pub hadamard: bool,
    /// The single wrong entry, looked for only when the matrix failed and nothing is erased.
    pub repair: Option<Repair>,
    /// The completions, looked for only when entries are erased.
    pub completion: Option<Completion>,
    /// How many entries are erased.
    pub erased: usize,
}

/// Runs the repair or the completion that `report` (which must be `verify(m)`'s) calls for.
/// `erasures` are the (row, col) of entries that are unknown; they are stored as +1 in `m`.
pub fn follow_up(m: &Matrix, erasures: &[(usize, usize)], report: &Report) -> FollowUp {
    let erased = !erasures.is_empty();
    let hadamard = report.hadamard && !erased;
    let completion =
        erased.then(|| repair::complete(m, erasures, repair::CompletionLimits::default()));
    let repair = (!hadamard && !erased)
        .then(|| repair::single_wrong_entry(m, report))
        .flatten();
    FollowUp {
        hadamard,
        repair,
        completion,
        erased: erasures.len(),
    }
}

/// The object `hadamard verify --json` prints: the report, with the verdict for the matrix as
/// read, the format it was read as, 0-based failing pairs, the time the check took, and the
/// repair and completion (`null` when not relevant).
pub fn verification(report: &Report, f: &FollowUp, format: &str, elapsed_ms: f64) -> Value {
    let mut v = serde_json::to_value(report).unwrap_or(Value::Null);
    if let Value::Object(o) = &mut v {
        o.insert("hadamard".into(), json!(f.hadamard));
        o.insert("format".into(), json!(format));
        o.insert("failing_pairs_index_base".into(), json!(0));
        o.insert("elapsed_ms".into(), json!(elapsed_ms));
        o.insert("erased_entries".into(), json!(f.erased));
        o.insert(
            "repair".into(),
            f.repair.as_ref().map_or(Value::Null, repair_json),
        );
        o.insert(
            "completion".into(),
            f.completion.as_ref().map_or(Value::Null, completion_json),
        );
    }
    v
}

fn repair_json(r: &Repair) -> Value {
    json!({
        "kind": "single_wrong_entry",
        "row": r.row,
        "col": r.col,
        "index_base": 0,
        "corrected_sha256": r.corrected_id,
    })
}

fn completion_json(c: &Completion) -> Value {
    match c {
        Completion::Unique { id, .. } => json!({"kind": "unique", "completed_sha256": id}),
        Completion::None => json!({"kind": "none"}),
        Completion::Several { count, complete } => {
            json!({"kind": "several", "count": count, "count_is_exact": complete})
        }
        Completion::GaveUp { explored } => json!({"kind": "undecided", "explored_nodes": explored}),
    }
}

/// The smallest known and the smallest constructible order ≥ k, as
/// `hadamard advise --at-least K --json` prints them.
pub fn smallest_at_least(k: u64) -> (Option<OrderInfo>, Option<OrderInfo>, Value) {
    let known = route::smallest_known_at_least(k);
    let built = route::smallest_constructible_at_least(k);
    let short = |o: &Option<OrderInfo>| {
        o.as_ref()
            .map(|i| json!({"order": i.order, "status": i.status}))
    };
    let v = json!({
        "at_least": k,
        "smallest_known": short(&known),
        "smallest_constructible": short(&built),
    });
    (known, built, v)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::construct::paley_one;
    use crate::verify::verify;

    #[test]
    fn one_wrong_sign_is_named_in_the_answer() {
        let mut m = paley_one(11).unwrap().into_matrix();
        m.flip(3, 5);
        let r = verify(&m);
        let f = follow_up(&m, &[], &r);
        let v = verification(&r, &f, "pm", 0.0);
        assert_eq!(v["hadamard"], json!(false));
        assert_eq!(v["repair"]["row"], json!(3));
        assert_eq!(v["repair"]["col"], json!(5));
        assert_eq!(v["completion"], Value::Null);
    }

    #[test]
    fn an_erased_entry_is_not_hadamard_until_completed() {
        let h = paley_one(11).unwrap();
        let m = h.matrix().clone();
        let r = verify(&m);
        let f = follow_up(&m, &[(2, 2)], &r);
        let v = verification(&r, &f, "pm", 0.0);
        assert_eq!(v["hadamard"], json!(false));
        assert_eq!(v["erased_entries"], json!(1));
        assert_eq!(v["completion"]["kind"], json!("unique"));
        assert_eq!(v["completion"]["completed_sha256"], json!(h.id()));
    }

    #[test]
    fn smallest_known_at_least_is_a_multiple_of_four() {
        // A Hadamard order above 2 is a multiple of 4 (common practice).
        let (_, _, v) = smallest_at_least(13);
        assert_eq!(v["smallest_known"]["order"], json!(16));
    }
}
