//! How every command ends: one error type, [`CliError`], and one table of exit statuses,
//! [`Kind::exit_status`].
//!
//! A command returns `Result<Kind, CliError>`: `Ok` with the outcome of an answer it printed
//! (`Done`, or `NotHadamard` after a `verify` report, `Undecided` after an `equiv` report…), or
//! `Err` with an error it has not printed. [`finish`] prints the error — the sentence on stderr
//! and, with `--json`, one object on stdout — and turns the kind into the exit status. No
//! command picks a number of its own; the table is documented in `docs/cli.md` (a test checks
//! the two agree).

use hadamard_core::formats::{Location, ParseError};
use serde::Serialize;
use serde_json::{json, Map, Value};
use std::fmt;
use std::process::ExitCode;

/// How a command ended. Its exit status comes from [`Kind::exit_status`] alone.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Kind {
    /// The answer is yes, or the work is done: a Hadamard matrix, a file written, a search
    /// finished, an audit with no failure.
    Done,
    /// A well-formed ±1 matrix that is not Hadamard (`verify`; `derive` and `equiv` refuse it).
    NotHadamard,
    /// A matrix with erased `?` entries: not a ±1 matrix yet.
    Incomplete,
    /// Two Hadamard matrices that are not equivalent.
    Inequivalent,
    /// A derived object that is not defined for this matrix, or over its size limit.
    NotDefined,
    /// `audit` found a stored matrix, entry or seed row that fails.
    AuditFailed,
    /// A command line that does not parse or asks for something that does not exist (an
    /// unknown format, kernel, route, row); clap's own errors are of this kind.
    Usage,
    /// An input that cannot be opened or read, or is larger than the byte limit.
    Unreadable,
    /// An input that is read but malformed; the message names its place.
    Malformed,
    /// A well-formed input larger than `--max-order`.
    OverMaxOrder,
    /// A recipe that does not replay: malformed, refused by a construction, or giving a
    /// matrix other than the one it names.
    BadRecipe,
    /// Output, a checkpoint, a database or a socket that cannot be written or opened.
    Io,
    /// A check the program makes on its own work failed (a bug: please report it).
    Internal,
    /// No implemented route reaches the order (or it is above the build limit).
    NoRoute,
    /// The search for an equivalence ran out of its node budget.
    Undecided,
    /// A search stopped (Ctrl-C, SIGTERM) before its end; its checkpoint resumes it.
    Stopped,
    /// A second Ctrl-C quit a search at once, without finishing its batch.
    Interrupted,
}

impl Kind {
    /// Every kind, in the order of the table.
    #[cfg(test)]
    pub const ALL: [Kind; 17] = [
        Kind::Done,
        Kind::NotHadamard,
        Kind::Incomplete,
        Kind::Inequivalent,
        Kind::NotDefined,
        Kind::AuditFailed,
        Kind::Usage,
        Kind::Unreadable,
        Kind::Malformed,
        Kind::OverMaxOrder,
        Kind::BadRecipe,
        Kind::Io,
        Kind::Internal,
        Kind::NoRoute,
        Kind::Undecided,
        Kind::Stopped,
        Kind::Interrupted,
    ];

    /// **The exit-status table**, the only place a number is chosen:
    /// 0 yes or done · 1 a well-formed input and the answer is no · 2 the command could not
    /// run on what it was given (usage, input, I/O) · 3 no answer yet: beyond what this
    /// program builds, or beyond the budget or the time it was given · 130 quit at once by a
    /// second Ctrl-C (the shell's status for an interrupt, 128 + SIGINT).
    pub const fn exit_status(self) -> u8 {
        match self {
            Kind::Done => 0,
            Kind::NotHadamard
            | Kind::Incomplete
            | Kind::Inequivalent
            | Kind::NotDefined
            | Kind::AuditFailed => 1,
            Kind::Usage
            | Kind::Unreadable
            | Kind::Malformed
            | Kind::OverMaxOrder
            | Kind::BadRecipe
            | Kind::Io
            | Kind::Internal => 2,
            Kind::NoRoute | Kind::Undecided | Kind::Stopped => 3,
            Kind::Interrupted => 130,
        }
    }

    /// The name in `--json` errors (`not_hadamard`, `usage`, …).
    #[cfg(test)]
    pub fn name(self) -> String {
        serde_json::to_value(self)
            .ok()
            .and_then(|v| v.as_str().map(str::to_owned))
            .unwrap_or_default()
    }

    pub fn exit_code(self) -> ExitCode {
        ExitCode::from(self.exit_status())
    }
}

/// An error a command did not print: what kind it is, a sentence for people (with the place,
/// when there is one), the place again for programs, and any fields that help a program.
#[derive(Debug)]
pub struct CliError {
    pub kind: Kind,
    pub message: String,
    pub location: Location,
    /// More fields for the `--json` object, in order.
    pub details: Vec<(String, Value)>,
}

impl CliError {
    pub fn new(kind: Kind, message: impl Into<String>) -> CliError {
        CliError {
            kind,
            message: message.into(),
            location: Location::Nowhere,
            details: Vec::new(),
        }
    }

    pub fn usage(message: impl Into<String>) -> CliError {
        CliError::new(Kind::Usage, message)
    }

    pub fn unreadable(message: impl Into<String>) -> CliError {
        CliError::new(Kind::Unreadable, message)
    }

    pub fn io(message: impl Into<String>) -> CliError {
        CliError::new(Kind::Io, message)
    }

    pub fn internal(message: impl Into<String>) -> CliError {
        CliError::new(Kind::Internal, message)
    }

    /// A malformed input of this kind at a place; `message` is the sentence without it.
    pub fn at(kind: Kind, location: Location, message: &str) -> CliError {
        let placed = ParseError {
            message: message.to_owned(),
            location,
            over_max_order: false,
        };
        CliError {
            kind,
            message: placed.to_string(),
            location,
            details: Vec::new(),
        }
    }

    /// One more field for the `--json` object.
    pub fn with(mut self, key: &str, value: impl Serialize) -> CliError {
        self.details.push((
            key.to_owned(),
            serde_json::to_value(value).unwrap_or(Value::Null),
        ));
        self
    }

    /// The same error with `prefix: ` before its sentence (say, the file it is about).
    pub fn in_file(mut self, prefix: &str) -> CliError {
        self.message = format!("{prefix}: {}", self.message);
        self
    }

    /// The `--json` object: `{"error": sentence, "kind", "location", "exit_status", …}`.
    pub fn to_json(&self) -> Value {
        let mut v = Map::new();
        v.insert("error".into(), json!(self.message));
        v.insert("kind".into(), json!(self.kind));
        v.insert("location".into(), json!(self.location));
        v.insert("exit_status".into(), json!(self.kind.exit_status()));
        for (k, x) in &self.details {
            v.insert(k.clone(), x.clone());
        }
        Value::Object(v)
    }

    /// Prints the error (stderr for people; also stdout as JSON with `--json`) and gives its
    /// exit status.
    pub fn report(&self, as_json: bool) -> ExitCode {
        if as_json {
            println!(
                "{}",
                serde_json::to_string_pretty(&self.to_json()).unwrap_or_default()
            );
        }
        eprintln!("hadamard: {}", self.message);
        self.kind.exit_code()
    }
}

impl fmt::Display for CliError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for CliError {}

impl From<ParseError> for CliError {
    fn from(p: ParseError) -> CliError {
        let kind = if p.over_max_order {
            Kind::OverMaxOrder
        } else {
            Kind::Malformed
        };
        CliError {
            kind,
            message: p.to_string(),
            location: p.location,
            details: Vec::new(),
        }
    }
}

/// Where a `serde_json` error is, as a place in the text it read.
pub fn json_location(e: &serde_json::Error) -> Location {
    if e.line() == 0 {
        Location::Nowhere
    } else {
        Location::LineCol {
            line: e.line(),
            col: e.column(),
        }
    }
}

/// Ends a command: the outcome's exit status, or the error printed and its status.
pub fn finish(result: Result<Kind, CliError>, as_json: bool) -> ExitCode {
    match result {
        Ok(kind) => kind.exit_code(),
        Err(e) => e.report(as_json),
    }
}

/// A command line clap refused. `--help` and `--version` print and exit 0 as clap does; a
/// usage error is printed by clap on stderr, and with `--json` among the arguments also as
/// the JSON error object on stdout. The status is [`Kind::Usage`]'s, which is clap's own 2.
pub fn clap_failed(e: clap::Error, as_json: bool) -> ExitCode {
    if !e.use_stderr() {
        e.exit();
    }
    if as_json {
        let text = e.render().to_string();
        let first = text.lines().next().unwrap_or("");
        let message = first.strip_prefix("error: ").unwrap_or(first).trim();
        let err = CliError::usage(message).with("usage", text.trim_end());
        println!(
            "{}",
            serde_json::to_string_pretty(&err.to_json()).unwrap_or_default()
        );
    }
    let _ = e.print();
    Kind::Usage.exit_code()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn docs_cli_md_has_the_same_exit_status_table() {
        // docs/cli.md's table `| status | kinds | meaning |`: every kind in exactly one row,
        // the row of its status.
        let doc = include_str!("../../../docs/cli.md");
        let rows: Vec<(u8, &str)> = doc
            .lines()
            .filter_map(|l| {
                let cells: Vec<&str> = l.split('|').map(str::trim).collect();
                let status = cells.get(1)?.parse::<u8>().ok()?;
                Some((status, *cells.get(2)?))
            })
            .collect();
        assert_eq!(
            rows.iter().map(|r| r.0).collect::<Vec<_>>(),
            [0, 1, 2, 3, 130],
            "docs/cli.md: the exit-status table"
        );
        for k in Kind::ALL {
            let tag = format!("`{}`", k.name());
            let found: Vec<u8> = rows
                .iter()
                .filter(|(_, kinds)| kinds.split(',').any(|c| c.trim() == tag))
                .map(|r| r.0)
                .collect();
            assert_eq!(found, [k.exit_status()], "{tag} in docs/cli.md's table");
        }
        let listed: usize = rows.iter().map(|(_, kinds)| kinds.split(',').count()).sum();
        assert_eq!(
            listed,
            Kind::ALL.len(),
            "docs/cli.md lists a kind the code lacks"
        );
    }

    #[test]
    fn usage_errors_keep_clap_s_status_and_interface_statuses_hold() {
        // The interface contract: verify 0 Hadamard · 1 not · 2 unreadable, malformed or
        // usage; build 0 written · 3 no implemented route. clap exits 2 on usage errors.
        let e = clap::Command::new("t")
            .try_get_matches_from(["t", "--nope"])
            .expect_err("an unknown option");
        assert_eq!(e.exit_code(), i32::from(Kind::Usage.exit_status()));
        assert_eq!(Kind::Done.exit_status(), 0);
        assert_eq!(Kind::NotHadamard.exit_status(), 1);
        for k in [Kind::Unreadable, Kind::Malformed, Kind::Usage] {
            assert_eq!(k.exit_status(), 2, "{k:?}");
        }
        assert_eq!(Kind::NoRoute.exit_status(), 3);
    }

    #[test]
    fn a_parse_error_keeps_its_place_in_the_json() {
        let e = CliError::at(
            Kind::Malformed,
            Location::LineCol { line: 3, col: 7 },
            "`x` is not + or -",
        );
        let v = e.to_json();
        assert_eq!(v["error"], "line 3, column 7: `x` is not + or -");
        assert_eq!(v["kind"], "malformed");
        assert_eq!(v["location"], json!({"line": 3, "column": 7}));
        assert_eq!(v["exit_status"], 2);
    }
}
