//! One verdict rule for every front end: the same damaged inputs get the same verdict, the same
//! located wrong signs and the same completion from core's `diagnose`, from `hadamard verify
//! --json` (the real binary) and from `POST /api/matrices` (the real server on loopback, with a
//! real SQLite file).
//!
//! The inputs are Sylvester's matrix of order 16 (Hadamard: J. J. Sylvester, Phil. Mag. 34
//! (1867) 461–475), damaged in known places, so the expected answer is known without the
//! program: the entries flipped are the wrong signs, and the matrix they were flipped in is
//! the correction and the completion. With d < n/2 = 8 changes no other Hadamard matrix is
//! as near (references.md#r14-erasures-and-wrong-signs).

mod common;

use common::{hadamard, sha256_of, sylvester_variant, Server};
use hadamard_core::diagnose::diagnose;
use hadamard_core::formats::{self, ReadOptions};
use hadamard_core::repair::{Completion, CompletionLimits};
use hadamard_core::verify::verify;
use serde_json::Value;

/// What a front end said, in the terms the three share.
#[derive(Debug, PartialEq, Eq)]
struct Said {
    verdict: String,
    /// The wrong signs located, (row, col) from 0, and the id of the corrected matrix.
    repair: Option<(Vec<(usize, usize)>, String)>,
    /// The kind of completion, and the id of the completed matrix when it is unique.
    completion: Option<(String, Option<String>)>,
}

/// Core's own answer.
fn through_core(text: &str) -> Said {
    let parsed = formats::read(text.as_bytes(), &ReadOptions::default()).expect("readable");
    let report = verify(&parsed.matrix);
    let d = diagnose(
        &parsed.matrix,
        &parsed.erasures,
        &report,
        CompletionLimits::default(),
    );
    Said {
        verdict: d.verdict.name().to_string(),
        repair: d.repair.map(|r| (r.entries, r.corrected_id)),
        completion: d.completion.map(|c| match c.outcome {
            Completion::Unique { id, .. } => ("unique".to_string(), Some(id)),
            Completion::None => ("none".to_string(), None),
            Completion::Several { .. } => ("several".to_string(), None),
            Completion::Undecided { .. } => ("undecided".to_string(), None),
        }),
    }
}

/// The answer in the JSON both the CLI and the API give (`verdict`, `repair`, `completion`).
fn from_json(v: &Value) -> Said {
    let repair = v.get("repair").filter(|r| !r.is_null()).map(|r| {
        let entries = r["entries"]
            .as_array()
            .expect("repair entries")
            .iter()
            .map(|e| {
                let at = |k: &str| e[k].as_u64().expect("an index") as usize;
                (at("row"), at("col"))
            })
            .collect();
        let id = r["corrected_sha256"].as_str().expect("an id").to_string();
        (entries, id)
    });
    let completion = v.get("completion").filter(|c| !c.is_null()).map(|c| {
        (
            c["kind"].as_str().expect("a kind").to_string(),
            c["completed_sha256"].as_str().map(str::to_string),
        )
    });
    Said {
        verdict: v["verdict"].as_str().expect("a verdict").to_string(),
        repair,
        completion,
    }
}

/// Sylvester's matrix of order 16 as `pm` text with `flips` negated and `erased` turned to `?`.
fn damaged(h: &str, flips: &[(usize, usize)], erased: &[(usize, usize)]) -> String {
    let mut b = h.as_bytes().to_vec();
    for &(i, j) in flips {
        let at = i * 17 + j;
        b[at] = if b[at] == b'+' { b'-' } else { b'+' };
    }
    for &(i, j) in erased {
        b[i * 17 + j] = b'?';
    }
    String::from_utf8(b).expect("text")
}

#[test]
fn the_verdict_is_the_same_through_core_the_cli_and_the_api() {
    let dir = tempfile::tempdir().expect("a temporary directory");
    let s = Server::start(&dir.path().join("registry.sqlite3"), &[]);
    let h = sylvester_variant(4, 0b0110_0101);
    let id = sha256_of(&h);
    let minus: Vec<(usize, usize)> = (0..16)
        .flat_map(|i| (0..16).map(move |j| (i, j)))
        .filter(|&(i, j)| h.as_bytes()[i * 17 + j] == b'-')
        .collect();
    let plus: Vec<(usize, usize)> = (0..16)
        .flat_map(|i| (0..16).map(move |j| (i, j)))
        .filter(|&(i, j)| h.as_bytes()[i * 17 + j] == b'+')
        .collect();
    let one = vec![(5, 11)];
    let two = vec![(2, 3), (9, 14)];
    // Erased −1 entries: with ? read as +1 the check fails, yet the verdict is "incomplete".
    let erased_minus: Vec<(usize, usize)> = minus.iter().copied().step_by(9).collect();
    // Erased +1 entries: with ? read as +1 the check passes, and the verdict is still
    // "incomplete", not "hadamard".
    let erased_plus: Vec<(usize, usize)> = plus.iter().copied().step_by(11).collect();
    let said = |verdict: &str, repair: Option<&[(usize, usize)]>, completed: bool| Said {
        verdict: verdict.into(),
        repair: repair.map(|e| (e.to_vec(), id.clone())),
        completion: completed.then(|| ("unique".to_string(), Some(id.clone()))),
    };
    let cases = [
        ("complete", h.clone(), said("hadamard", None, false)),
        (
            "one wrong sign",
            damaged(&h, &one, &[]),
            said("not_hadamard", Some(&one), false),
        ),
        (
            "two wrong signs",
            damaged(&h, &two, &[]),
            said("not_hadamard", Some(&two), false),
        ),
        (
            "erased −1 entries",
            damaged(&h, &[], &erased_minus),
            said("incomplete", None, true),
        ),
        (
            "erased +1 entries",
            damaged(&h, &[], &erased_plus),
            said("incomplete", None, true),
        ),
        // Order 6 has no Hadamard matrix (references.md#r1-impossible-orders), and no few
        // wrong signs explain an all-ones matrix.
        (
            "impossible order",
            "++++++\n".repeat(6),
            said("not_hadamard", None, false),
        ),
    ];
    assert!(erased_minus.len() >= 10 && erased_plus.len() >= 10);
    for (name, text, want) in &cases {
        assert_eq!(&through_core(text), want, "core: {name}");

        let file = dir.path().join("input.txt");
        std::fs::write(&file, text).expect("write the input");
        let out = hadamard()
            .args(["verify", "--json"])
            .arg(&file)
            .output()
            .expect("run hadamard verify");
        let v: Value = serde_json::from_slice(&out.stdout).expect("one JSON object");
        assert_eq!(&from_json(&v), want, "CLI: {name}");
        assert_eq!(v["hadamard"], want.verdict == "hadamard", "CLI: {name}");
        let code = if want.verdict == "hadamard" { 0 } else { 1 };
        assert_eq!(out.status.code(), Some(code), "CLI exit status: {name}");

        let r = s.post("/api/matrices", text.as_bytes());
        let b = r.json();
        if want.verdict == "hadamard" {
            assert_eq!(r.status, 201, "API: {name}: {b}");
            assert_eq!(b["id"], id.as_str(), "API: {name}");
        } else {
            assert_eq!(r.status, 422, "API: {name}: {b}");
        }
        assert_eq!(&from_json(&b), want, "API: {name}");
    }
}
