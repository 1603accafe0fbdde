//! `hadamard audit`: re-check everything the server serves.
//!
//! For each stored matrix: the id's form, the blob fits its order, the exact check passes,
//! the SHA-256 of its canonical text is the id it is stored under, every text field reads,
//! and its properties are those of the matrix. For each catalogue entry: its matrix is stored
//! and has the entry's order, and the recipe names that order and id. For the seed tables:
//! every row's JSON reads and agrees with its columns. A bad row is reported (table, rowid,
//! id) and the audit goes on. Exit 0 when every
//! matrix passes (there must never be one that fails), 1 when any fails, 2 when the database
//! cannot be read. The file is opened read-only; a running server can keep serving.

use super::error::{CliError, Kind};
use crate::catalogue::certify_stored;
use crate::store::{self, Mode, Store, StoreError};
use hadamard_core::verify;
use rusqlite::types::ValueRef;
use rusqlite::Connection;
use serde_json::{json, Value};
use std::path::PathBuf;
use std::time::Instant;

#[derive(clap::Args)]
pub struct AuditArgs {
    /// The SQLite file of the catalogue.
    #[arg(long, value_name = "PATH", default_value = super::serve::DEFAULT_DB)]
    db: PathBuf,
    /// Print one JSON object on stdout instead of text for people.
    #[arg(long)]
    json: bool,
}

impl AuditArgs {
    pub fn json(&self) -> bool {
        self.json
    }
}

pub fn run(args: AuditArgs) -> Result<Kind, CliError> {
    let start = Instant::now();
    let store = Store::open(&args.db, Mode::ReadOnly, 1)
        .map_err(|e| CliError::unreadable(format!("cannot open {}: {e}", args.db.display())))?;
    let mut report = Report::default();
    let walked = store.read(|c| {
        audit_matrices(c, &mut report)?;
        audit_catalogue_entries(c, &mut report)?;
        audit_seed_tables(c, &mut report)?;
        Ok(())
    });
    let integrity = store.read(store::integrity_check);
    if let Err(e) = walked {
        return Err(CliError::unreadable(format!(
            "cannot read {}: {e}",
            args.db.display()
        )));
    }
    let integrity = match integrity {
        Ok(v) => v,
        Err(e) => vec![e.to_string()],
    };
    let sqlite_ok = integrity == ["ok"];
    let ok = report.failures.is_empty() && sqlite_ok;
    if args.json {
        let v = json!({
            "database": args.db.display().to_string(),
            "checked": report.matrices,
            "checked_catalogue_entries": report.entries,
            "checked_seed_rows": report.seed_rows,
            "failed": report.failures.len(),
            "failures": report.failures,
            "integrity_check": integrity,
            "ok": ok,
            "elapsed_ms": start.elapsed().as_secs_f64() * 1e3,
        });
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        for f in &report.failures {
            let table = f["table"].as_str().unwrap_or("");
            let problem = f["problem"].as_str().unwrap_or("");
            match f["id"].as_str() {
                Some(id) => println!("FAILED {id} ({table} row {}): {problem}", f["rowid"]),
                None => println!("FAILED {table} row {}: {problem}", f["rowid"]),
            }
        }
        if !sqlite_ok {
            println!("SQLite integrity_check: {}", integrity.join("; "));
        }
        println!(
            "audited {} stored matrices, {} catalogue entries and {} seed rows in {:.1} s: {} failed; SQLite integrity {}",
            report.matrices,
            report.entries,
            report.seed_rows,
            start.elapsed().as_secs_f64(),
            report.failures.len(),
            if sqlite_ok { "ok" } else { "NOT ok" }
        );
    }
    Ok(if ok { Kind::Done } else { Kind::AuditFailed })
}

#[derive(Default)]
struct Report {
    matrices: u64,
    entries: u64,
    seed_rows: u64,
    failures: Vec<Value>,
}

impl Report {
    fn fail(&mut self, table: &str, rowid: i64, id: Option<&str>, problem: impl Into<String>) {
        self.failures.push(json!({
            "table": table,
            "rowid": rowid,
            "id": id,
            "problem": problem.into(),
        }));
    }
}

/// A column read as text, or why it cannot be (NULL, not text, not UTF-8): a bad field is a
/// finding about its row, never the end of the audit.
fn text(r: &rusqlite::Row<'_>, k: usize, name: &str) -> Result<String, String> {
    match r.get_ref(k) {
        Ok(ValueRef::Text(t)) => std::str::from_utf8(t)
            .map(str::to_owned)
            .map_err(|e| format!("{name} is not valid UTF-8 ({e})")),
        Ok(ValueRef::Null) => Err(format!("{name} is NULL")),
        Ok(_) => Err(format!("{name} is not text")),
        Err(e) => Err(format!("{name} cannot be read: {e}")),
    }
}

fn optional_text(r: &rusqlite::Row<'_>, k: usize, name: &str) -> Result<Option<String>, String> {
    match r.get_ref(k) {
        Ok(ValueRef::Null) => Ok(None),
        _ => text(r, k, name).map(Some),
    }
}

fn integer(r: &rusqlite::Row<'_>, k: usize, name: &str) -> Result<i64, String> {
    match r.get_ref(k) {
        Ok(ValueRef::Integer(v)) => Ok(v),
        _ => Err(format!("{name} is not an integer")),
    }
}

fn parse_json(s: &str, name: &str) -> Result<Value, String> {
    serde_json::from_str(s).map_err(|e| format!("{name} is not JSON: {e}"))
}

/// Every stored matrix: id, order, bits (the exact check and the id of the content), every
/// text field, and the properties recomputed from the matrix.
fn audit_matrices(c: &Connection, rep: &mut Report) -> Result<(), StoreError> {
    let mut st = c.prepare(
        "SELECT rowid, id, n, bits, properties_json, invariant_kind, invariant, origin, recipe_json, received_format, created_at, check_name, kernel, verified_at FROM matrices ORDER BY rowid",
    )?;
    let mut rows = st.query([])?;
    while let Some(r) = rows.next()? {
        rep.matrices += 1;
        let rowid = r.get::<_, i64>(0).unwrap_or(-1);
        let id = match text(r, 1, "id") {
            Ok(id) if hadamard_core::id::is_id(&id) => id,
            Ok(id) => {
                rep.fail(
                    "matrices",
                    rowid,
                    Some(&id),
                    "the id is not 64 lowercase hex digits",
                );
                continue;
            }
            Err(p) => {
                rep.fail("matrices", rowid, None, p);
                continue;
            }
        };
        let mut problems = Vec::new();
        for (k, name) in [
            (4, "properties_json"),
            (7, "origin"),
            (10, "created_at"),
            (11, "check_name"),
            (12, "kernel"),
            (13, "verified_at"),
        ] {
            if let Err(p) = text(r, k, name) {
                problems.push(p);
            }
        }
        for (k, name) in [
            (5, "invariant_kind"),
            (6, "invariant"),
            (8, "recipe_json"),
            (9, "received_format"),
        ] {
            if let Err(p) = optional_text(r, k, name) {
                problems.push(p);
            }
        }
        if let Ok(Some(recipe)) = optional_text(r, 8, "recipe_json") {
            if let Err(p) = parse_json(&recipe, "recipe_json") {
                problems.push(p);
            }
        }
        let order = integer(r, 2, "n")
            .ok()
            .and_then(|n| usize::try_from(n).ok())
            .filter(|&n| n > 0);
        let bits = match r.get_ref(3) {
            Ok(ValueRef::Blob(b)) => Some(b.to_vec()),
            _ => None,
        };
        match (order, bits) {
            (None, _) => problems.push("its order is not a positive integer".to_owned()),
            (_, None) => problems.push("bits is not a blob".to_owned()),
            (Some(n), Some(bits)) => match certify_stored(&id, n, &bits) {
                Err(p) => problems.push(p),
                Ok(v) => {
                    // The properties served must be those of the matrix.
                    let want =
                        serde_json::to_value(verify::properties(v.matrix())).unwrap_or(Value::Null);
                    match text(r, 4, "properties_json")
                        .and_then(|p| parse_json(&p, "properties_json"))
                    {
                        Ok(have) if have == want => {}
                        Ok(_) => problems.push(
                            "properties_json differs from the properties of the stored matrix"
                                .to_owned(),
                        ),
                        Err(p) if !problems.contains(&p) => problems.push(p),
                        Err(_) => {}
                    }
                }
            },
        }
        for p in problems {
            rep.fail("matrices", rowid, Some(&id), p);
        }
    }
    Ok(())
}

/// Every catalogue entry: its matrix is stored, has the entry's order, and the recipe names
/// that order and that id.
fn audit_catalogue_entries(c: &Connection, rep: &mut Report) -> Result<(), StoreError> {
    let mut st = c.prepare(
        "SELECT e.rowid, e.n, e.matrix_id, e.recipe_json, m.n FROM catalogue_entries e LEFT JOIN matrices m ON m.id = e.matrix_id ORDER BY e.n",
    )?;
    let mut rows = st.query([])?;
    while let Some(r) = rows.next()? {
        rep.entries += 1;
        let rowid = r.get::<_, i64>(0).unwrap_or(-1);
        let id = text(r, 2, "matrix_id").ok();
        let mut problems = Vec::new();
        let n = integer(r, 1, "n");
        if let Err(p) = &n {
            problems.push(p.clone());
        }
        match (&n, r.get_ref(4)) {
            (_, Ok(ValueRef::Null)) => {
                problems.push("the entry points at a matrix that is not stored".to_owned())
            }
            (Ok(n), Ok(ValueRef::Integer(m))) if m != *n => problems.push(format!(
                "the entry of order {n} points at a matrix of order {m}"
            )),
            _ => {}
        }
        match text(r, 3, "recipe_json").and_then(|s| parse_json(&s, "recipe_json")) {
            Err(p) => problems.push(p),
            Ok(recipe) => {
                if let Ok(n) = n {
                    if recipe["order"].as_i64() != Some(n) {
                        problems.push(format!(
                            "the recipe is for order {}, not the entry's order {n}",
                            recipe["order"]
                        ));
                    }
                }
                if recipe["id"].as_str().is_some() && recipe["id"].as_str() != id.as_deref() {
                    problems.push("the recipe pins a different matrix id".to_owned());
                }
            }
        }
        for p in problems {
            rep.fail("catalogue_entries", rowid, id.as_deref(), p);
        }
    }
    Ok(())
}

/// The seed tables the order pages are served from: each order's JSON names its order and
/// status; each sequence's data is JSON.
fn audit_seed_tables(c: &Connection, rep: &mut Report) -> Result<(), StoreError> {
    let mut st = c.prepare("SELECT rowid, n, status, info_json FROM orders ORDER BY n")?;
    let mut rows = st.query([])?;
    while let Some(r) = rows.next()? {
        rep.seed_rows += 1;
        let rowid = r.get::<_, i64>(0).unwrap_or(-1);
        let n = integer(r, 1, "n");
        let status = text(r, 2, "status");
        let info = text(r, 3, "info_json").and_then(|s| parse_json(&s, "info_json"));
        let mut problems: Vec<String> = [&n.as_ref().err(), &status.as_ref().err()]
            .iter()
            .filter_map(|e| e.map(|e| e.to_owned()))
            .collect();
        match &info {
            Err(p) => problems.push(p.clone()),
            Ok(info) => {
                if let Ok(n) = &n {
                    if info["order"].as_i64() != Some(*n) {
                        problems.push(format!("info_json is for order {}, not {n}", info["order"]));
                    }
                }
                if let Ok(s) = &status {
                    if info["status"].as_str() != Some(s.as_str()) {
                        problems.push(format!(
                            "info_json says status {}, the row says {s}",
                            info["status"]
                        ));
                    }
                }
            }
        }
        for p in problems {
            rep.fail("orders", rowid, None, p);
        }
    }
    let mut st =
        c.prepare("SELECT rowid, family, length, data_json FROM sequences ORDER BY rowid")?;
    let mut rows = st.query([])?;
    while let Some(r) = rows.next()? {
        rep.seed_rows += 1;
        let rowid = r.get::<_, i64>(0).unwrap_or(-1);
        let mut problems = Vec::new();
        if let Err(p) = text(r, 1, "family") {
            problems.push(p);
        }
        if let Err(p) = integer(r, 2, "length") {
            problems.push(p);
        }
        if let Err(p) = text(r, 3, "data_json").and_then(|s| parse_json(&s, "data_json")) {
            problems.push(p);
        }
        for p in problems {
            rep.fail("sequences", rowid, None, p);
        }
    }
    Ok(())
}
