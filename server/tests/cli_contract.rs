//! The command line's contract, run on the real binary: every command that takes `--json`
//! prints a failure as one JSON object on stdout with the exit status of `docs/cli.md`'s
//! table; the help of every command and the main error texts are pinned by snapshots
//! (`tests/snapshots/`, reviewed with `cargo insta review` or rewritten with
//! `INSTA_UPDATE=always`).
//!
//! Every run happens in a fresh directory holding the few files it reads, named relatively, so
//! no temporary path reaches a snapshot; nothing timed is snapshotted.

use serde_json::Value;
use std::collections::BTreeSet;
use std::path::Path;
use std::process::{Command, Output};

const HADAMARD: &str = env!("CARGO_BIN_EXE_hadamard");

/// A `pm` file malformed at line 3, column 3.
const BAD_PM: &str = "++++\n+-+-\n++x-\n+--+\n";
/// A well-formed ±1 matrix of order 4 that is not Hadamard: rows 1 and 2 are equal.
const NOT_HADAMARD: &str = "++++\n++++\n++--\n+--+\n";

/// A directory with `bad.txt`, `nh.txt` and `h12.txt` (the program's own order-12 matrix).
fn workdir() -> tempfile::TempDir {
    let dir = tempfile::tempdir().expect("a temporary directory");
    std::fs::write(dir.path().join("bad.txt"), BAD_PM).expect("write");
    std::fs::write(dir.path().join("nh.txt"), NOT_HADAMARD).expect("write");
    let built = run(dir.path(), &["build", "12", "-o", "h12.txt"]);
    assert!(built.status.success(), "build 12: {built:?}");
    dir
}

fn run(dir: &Path, args: &[&str]) -> Output {
    Command::new(HADAMARD)
        .args(args)
        .current_dir(dir)
        .env_remove("RUST_LOG")
        .output()
        .expect("the hadamard binary runs")
}

/// The subcommands `hadamard <path> --help` lists, without `help`.
fn subcommands(path: &[&str]) -> Vec<String> {
    let mut args = path.to_vec();
    args.push("--help");
    let out = run(Path::new("."), &args);
    let text = String::from_utf8_lossy(&out.stdout).into_owned();
    let Some(start) = text.find("Commands:\n") else {
        return Vec::new();
    };
    text[start + "Commands:\n".len()..]
        .lines()
        .take_while(|l| l.starts_with("  "))
        .filter_map(|l| l.split_whitespace().next())
        .filter(|c| *c != "help")
        .map(str::to_owned)
        .collect()
}

/// Every command path (`[]`, `["verify"]`, `["derive", "code"]`, …), parents first.
fn every_command() -> Vec<Vec<String>> {
    let mut all = vec![Vec::new()];
    let mut k = 0;
    while k < all.len() {
        let path = all[k].clone();
        let refs: Vec<&str> = path.iter().map(String::as_str).collect();
        for sub in subcommands(&refs) {
            let mut p = path.clone();
            p.push(sub);
            all.push(p);
        }
        k += 1;
    }
    all
}

fn help(path: &[String]) -> String {
    let mut args: Vec<&str> = path.iter().map(String::as_str).collect();
    args.push("--help");
    let out = run(Path::new("."), &args);
    assert!(out.status.success(), "{args:?}: {out:?}");
    String::from_utf8(out.stdout).expect("UTF-8 help")
}

/// A failing command line under `--json` for every command that takes `--json`, with the kind
/// and exit status `docs/cli.md`'s table gives it, and (for malformed input) the place.
const JSON_FAILURES: &[(&[&str], &str, i32)] = &[
    (&["verify", "--json", "bad.txt"], "malformed", 2),
    (
        &["verify", "--json", "--kernel", "nope", "nh.txt"],
        "usage",
        2,
    ),
    (&["routes", "--json", "twelve"], "usage", 2),
    (&["coverage", "--json", "--max", "-1"], "usage", 2),
    (&["advise", "--json", "--dimension", "x"], "usage", 2),
    (
        &["audit", "--json", "--db", "missing.sqlite3"],
        "unreadable",
        2,
    ),
    (
        &["derive", "screening", "--json", "nh.txt"],
        "not_hadamard",
        1,
    ),
    (
        &["derive", "brr", "--json", "--strata", "4", "bad.txt"],
        "malformed",
        2,
    ),
    (
        &["derive", "code", "--json", "missing.txt"],
        "unreadable",
        2,
    ),
    (
        &["derive", "symmetric-design", "--json", "bad.txt"],
        "malformed",
        2,
    ),
    (&["equiv", "--json", "h12.txt", "nh.txt"], "not_hadamard", 1),
    (
        &["search", "williamson", "--json", "--length", "4"],
        "usage",
        2,
    ),
    (&["search", "golay", "--json"], "usage", 2),
    (
        &[
            "search",
            "base",
            "--json",
            "--n",
            "3",
            "--checkpoint",
            "bad.txt",
        ],
        "malformed",
        2,
    ),
    (&["search", "turyn", "--json", "--n", "x"], "usage", 2),
    (&["search", "gs", "--json", "--length", "43"], "usage", 2),
    (
        &["search", "merge", "--json", "missing.json"],
        "unreadable",
        2,
    ),
];

#[test]
fn every_json_failure_is_one_json_object_with_the_table_s_status() {
    let dir = workdir();
    // Every command that takes `--json` has a case above, and every case is such a command.
    let with_json: BTreeSet<String> = every_command()
        .into_iter()
        .filter(|p| {
            !p.is_empty()
                && help(p)
                    .lines()
                    .any(|l| l.trim_start().starts_with("--json"))
        })
        .map(|p| p.join(" "))
        .collect();
    let cased: BTreeSet<String> = JSON_FAILURES
        .iter()
        .map(|(args, _, _)| {
            args.iter()
                .take_while(|a| !a.starts_with('-'))
                .copied()
                .collect::<Vec<_>>()
                .join(" ")
        })
        .collect();
    assert_eq!(cased, with_json, "the commands with --json");
    // `derive ordering --format report` and `derive row --format json` answer in JSON too.
    let extra: &[(&[&str], &str, i32)] = &[
        (
            &["derive", "ordering", "--format", "report", "nh.txt"],
            "not_hadamard",
            1,
        ),
        (
            &[
                "derive", "row", "--row", "99", "--format", "json", "h12.txt",
            ],
            "usage",
            2,
        ),
    ];
    for (args, kind, status) in JSON_FAILURES.iter().chain(extra) {
        let out = run(dir.path(), args);
        let stdout = String::from_utf8_lossy(&out.stdout);
        let stderr = String::from_utf8_lossy(&out.stderr);
        let v: Value = serde_json::from_str(&stdout)
            .unwrap_or_else(|e| panic!("{args:?}: stdout is not one JSON value ({e}): {stdout}"));
        assert_eq!(v["kind"], *kind, "{args:?}: {v}");
        assert_eq!(out.status.code(), Some(*status), "{args:?}: {stderr}");
        assert_eq!(v["exit_status"], *status, "{args:?}");
        let sentence = v["error"].as_str().unwrap_or_default();
        assert!(!sentence.is_empty(), "{args:?}: {v}");
        assert!(stderr.contains(sentence), "{args:?}: stderr {stderr:?}");
        assert!(v.get("location").is_some(), "{args:?}: {v}");
    }
    // The place of a malformed matrix (the interface contract: line and column, 1-based).
    let out = run(dir.path(), &["verify", "--json", "bad.txt"]);
    let v: Value = serde_json::from_slice(&out.stdout).expect("JSON");
    assert_eq!(v["location"], serde_json::json!({"line": 3, "column": 3}));
    // A checkpoint that is not JSON at all: serde_json's place, line 1 column 1.
    let out = run(
        dir.path(),
        &[
            "search",
            "base",
            "--json",
            "--n",
            "3",
            "--checkpoint",
            "bad.txt",
        ],
    );
    let v: Value = serde_json::from_slice(&out.stdout).expect("JSON");
    assert_eq!(v["location"]["line"], 1, "{v}");
}

#[test]
fn answers_that_are_verdicts_keep_their_status() {
    let dir = workdir();
    // verify: 0 Hadamard, 1 not (interface contract), each with its usual JSON.
    let ok = run(dir.path(), &["verify", "--json", "h12.txt"]);
    assert_eq!(ok.status.code(), Some(0));
    let no = run(dir.path(), &["verify", "--json", "nh.txt"]);
    assert_eq!(no.status.code(), Some(1));
    let v: Value = serde_json::from_slice(&no.stdout).expect("JSON");
    assert_eq!(v["hadamard"], false);
    // build: 3 when no implemented route reaches the order (interface contract).
    assert_eq!(run(dir.path(), &["build", "6"]).status.code(), Some(3));
    // equiv of a matrix and itself: equivalent.
    let same = run(dir.path(), &["equiv", "h12.txt", "h12.txt"]);
    assert_eq!(same.status.code(), Some(0), "{same:?}");
}

#[test]
fn the_old_option_names_still_work() {
    let dir = workdir();
    let a = run(
        dir.path(),
        &["derive", "ordering", "--order", "natural", "h12.txt"],
    );
    let b = run(
        dir.path(),
        &["derive", "ordering", "--row-order", "natural", "h12.txt"],
    );
    assert!(a.status.success() && b.status.success(), "{a:?} {b:?}");
    assert_eq!(a.stdout, b.stdout);
    let old = run(
        dir.path(),
        &["search", "williamson", "--order", "3", "--all", "--quiet"],
    );
    let new = run(
        dir.path(),
        &["search", "williamson", "--length", "3", "--all", "--quiet"],
    );
    assert!(old.status.success() && new.status.success(), "{old:?}");
    // The same lines, the provenance stating `--length` for both.
    assert_eq!(old.stdout, new.stdout);
    assert!(String::from_utf8_lossy(&new.stdout).contains("--length 3"));
}

#[test]
fn help_texts() {
    for path in every_command() {
        let name = if path.is_empty() {
            "help".to_owned()
        } else {
            format!("help_{}", path.join("_"))
        };
        insta::assert_snapshot!(name, help(&path));
    }
}

/// The main error texts, with their exit status, as a person sees them.
#[test]
fn error_texts() {
    let dir = workdir();
    let cases: &[(&str, &[&str])] = &[
        ("verify_malformed", &["verify", "bad.txt"]),
        ("verify_malformed_json", &["verify", "--json", "bad.txt"]),
        ("verify_missing_file", &["verify", "missing.txt"]),
        (
            "verify_unknown_format",
            &["verify", "--format", "xls", "nh.txt"],
        ),
        ("verify_no_path", &["verify"]),
        ("build_impossible_order", &["build", "6"]),
        ("build_unknown_route", &["build", "12", "--route", "nope"]),
        ("build_bad_recipe", &["build", "--recipe", "bad.txt"]),
        ("build_unknown_format", &["build", "12", "--format", "xls"]),
        (
            "convert_unknown_format",
            &["convert", "nh.txt", "--to", "xls"],
        ),
        ("derive_not_hadamard", &["derive", "code", "nh.txt"]),
        (
            "derive_row_outside",
            &["derive", "row", "--row", "12", "h12.txt"],
        ),
        (
            "derive_sequency_undefined",
            &["derive", "ordering", "--row-order", "sequency", "h12.txt"],
        ),
        ("equiv_not_hadamard", &["equiv", "h12.txt", "nh.txt"]),
        (
            "search_even_williamson",
            &["search", "williamson", "--length", "4"],
        ),
        (
            "search_bad_types",
            &[
                "search",
                "gs",
                "--length",
                "67",
                "--multiplier",
                "29",
                "--types",
                "sym,sym",
            ],
        ),
        ("search_merge_missing", &["search", "merge", "missing.json"]),
        ("unknown_command", &["frobnicate"]),
    ];
    for (name, args) in cases {
        let out = run(dir.path(), args);
        let text = format!(
            "$ hadamard {}\nexit status: {}\n--- stdout\n{}--- stderr\n{}",
            args.join(" "),
            out.status
                .code()
                .map_or("none".to_owned(), |c| c.to_string()),
            String::from_utf8_lossy(&out.stdout),
            String::from_utf8_lossy(&out.stderr),
        );
        insta::assert_snapshot!(format!("error_{name}"), text);
    }
}
