//! The JSON objects that more than one front end prints: the verification answer of
//! `hadamard verify --json` and the `--at-least` answer of `hadamard advise --json`. The CLI and
//! the Python package (`python/`) both call these, so the two cannot drift apart. Objects that
//! are plain serialisations of a core type (`OrderInfo` for `routes`, `Advice` for
//! `advise --dimension`) need no function here: callers serialise the type itself.
//!
//! Core reads no clock, so the time the check took is measured by the caller and passed in.

use crate::diagnose::Diagnosis;
use crate::repair::{Axis, Completion, CompletionReport, Proof, SignRepair};
use crate::route::{self, OrderInfo};
use crate::verify::Report;
use serde_json::{json, Value};

/// The object `hadamard verify --json` prints: the report, with the verdict for the matrix as
/// read ([`Diagnosis`]: `verdict`, and `hadamard` true only for the verdict `hadamard`), the
/// format it was read as, 0-based failing pairs, the time the check took, and the repair and
/// completion (`null` when not relevant).
pub fn verification(report: &Report, f: &Diagnosis, format: &str, elapsed_ms: f64) -> Value {
    let mut v = serde_json::to_value(report).unwrap_or(Value::Null);
    if let Value::Object(o) = &mut v {
        o.insert("verdict".into(), json!(f.verdict));
        o.insert("hadamard".into(), json!(f.is_hadamard()));
        o.insert("format".into(), json!(format));
        o.insert("failing_pairs_index_base".into(), json!(0));
        o.insert("elapsed_ms".into(), json!(elapsed_ms));
        o.insert("erased_entries".into(), json!(f.erasures.len()));
        o.insert(
            "repair".into(),
            f.repair.as_ref().map_or(Value::Null, repair_json),
        );
        o.insert(
            "completion".into(),
            f.completion
                .as_ref()
                .map_or(Value::Null, |c| completion_json(c, &f.erasures)),
        );
    }
    v
}

/// How many entries the JSON lists at most (the counts are always given).
const LIST_CAP: usize = 10_000;

pub fn repair_json(r: &SignRepair) -> Value {
    let n = r.corrected.order();
    let m = r.corrected.matrix();
    let entries: Vec<Value> = r
        .entries
        .iter()
        .map(|&(i, j)| json!({"row": i, "col": j, "was": -m.get(i, j), "now": m.get(i, j)}))
        .collect();
    let mut v = json!({
        "kind": if r.entries.len() == 1 { "single_wrong_entry" } else { "wrong_signs" },
        "count": r.entries.len(),
        "entries": entries,
        "index_base": 0,
        "along": match r.axis { Axis::Rows => "rows", Axis::Columns => "columns" },
        "suspects": r.suspects,
        "corrected_sha256": r.corrected_id,
        "unique_within_distance": r.unique_within_distance,
        "uniqueness": uniqueness_note(r, n),
    });
    if let ([(i, j)], Value::Object(o)) = (r.entries.as_slice(), &mut v) {
        o.insert("row".into(), json!(i));
        o.insert("col".into(), json!(j));
    }
    v
}

pub fn uniqueness_note(r: &SignRepair, n: usize) -> String {
    let d = r.entries.len();
    if r.unique_within_distance {
        format!("two distinct Hadamard matrices of order {n} differ in at least {n} entries, and 2·{d} < {n}, so no other Hadamard matrix is within {d} changes of the input")
    } else {
        format!("not decided: 2·{d} ≥ {n}, so the bound (distinct Hadamard matrices differ in at least n entries) does not exclude another one within {d} changes")
    }
}

fn positions(list: &[(usize, usize)]) -> Value {
    json!(list
        .iter()
        .take(LIST_CAP)
        .map(|&(i, j)| [i, j])
        .collect::<Vec<_>>())
}

pub fn completion_json(c: &CompletionReport, erasures: &[(usize, usize)]) -> Value {
    let mut v = match &c.outcome {
        Completion::Unique { id, matrix, proof } => {
            let m = matrix.matrix();
            let values: Vec<[i64; 3]> = erasures
                .iter()
                .take(LIST_CAP)
                .map(|&(i, j)| [i as i64, j as i64, m.get(i, j) as i64])
                .collect();
            json!({
                "kind": "unique",
                "completed_sha256": id,
                "proof": match proof { Proof::Linear => "linear", Proof::Search => "linear+search" },
                "values": values,
            })
        }
        Completion::None => json!({"kind": "none"}),
        Completion::Several {
            count,
            complete,
            examples,
        } => {
            let differ: Vec<(usize, usize)> = match examples.as_slice() {
                [a, b, ..] => erasures
                    .iter()
                    .copied()
                    .filter(|&(i, j)| a.matrix().get(i, j) != b.matrix().get(i, j))
                    .collect(),
                _ => Vec::new(),
            };
            json!({
                "kind": "several",
                "count": count,
                "count_is_exact": complete,
                "completions": examples.iter().map(|v| v.id()).collect::<Vec<_>>(),
                "differ_at": positions(&differ),
            })
        }
        Completion::Undecided {
            explored,
            remaining,
            candidate,
        } => json!({
            "kind": "undecided",
            "explored_nodes": explored,
            "remaining_entries": remaining.len(),
            "remaining": positions(remaining),
            "candidate_sha256": candidate.as_ref().map(|v| v.id()),
        }),
    };
    if let Value::Object(o) = &mut v {
        o.insert("erased_entries".into(), json!(c.erased));
        o.insert("determined_by_equations".into(), json!(c.determined));
        o.insert("linear_rounds".into(), json!(c.rounds));
        o.insert("linear_equations".into(), json!(c.equations));
        o.insert("index_base".into(), json!(0));
    }
    v
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
    use crate::diagnose::diagnose;
    use crate::repair::CompletionLimits;
    use crate::verify::verify;

    #[test]
    fn one_wrong_sign_is_named_in_the_answer() {
        let mut m = paley_one(11).unwrap().into_matrix();
        m.flip(3, 5);
        let r = verify(&m);
        let f = diagnose(&m, &[], &r, CompletionLimits::default());
        let v = verification(&r, &f, "pm", 0.0);
        assert_eq!(v["hadamard"], json!(false));
        assert_eq!(v["verdict"], json!("not_hadamard"));
        assert_eq!(v["repair"]["row"], json!(3));
        assert_eq!(v["repair"]["col"], json!(5));
        assert_eq!(v["completion"], Value::Null);
    }

    #[test]
    fn an_erased_entry_is_not_hadamard_until_completed() {
        let h = paley_one(11).unwrap();
        let m = h.matrix().clone();
        let r = verify(&m);
        let f = diagnose(&m, &[(2, 2)], &r, CompletionLimits::default());
        let v = verification(&r, &f, "pm", 0.0);
        assert_eq!(v["hadamard"], json!(false));
        assert_eq!(v["verdict"], json!("incomplete"));
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
