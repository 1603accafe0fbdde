//! The JSON of the two repair answers, `repair` (wrong signs) and `completion` (erased
//! entries), shared by `hadamard verify --json` and the upload endpoint.

use hadamard_core::repair::{Axis, Completion, CompletionReport, Proof, SignRepair};
use serde_json::{json, Value};

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
