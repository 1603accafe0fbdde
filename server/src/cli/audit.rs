//! `hadamard audit`: re-verify every stored matrix from its bits.
//!
//! For each row of the catalogue: the blob must fit its order, the exact check must pass,
//! and the SHA-256 of its canonical text must be the id it is stored under. Exit 0 when every
//! matrix passes (there must never be one that fails), 1 when any fails, 2 when the database
//! cannot be read. The file is opened read-only; a running server can keep serving.

use crate::catalogue::certify_stored;
use crate::store::{self, matrices, Mode, Store};
use serde_json::json;
use std::path::PathBuf;
use std::process::ExitCode;
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

pub fn run(args: AuditArgs) -> ExitCode {
    let start = Instant::now();
    let store = match Store::open(&args.db, Mode::ReadOnly, 1) {
        Ok(s) => s,
        Err(e) => {
            eprintln!("hadamard: cannot open {}: {e}", args.db.display());
            return ExitCode::from(2);
        }
    };
    let mut checked = 0u64;
    let mut failures = Vec::new();
    let walked = store.read(|c| {
        matrices::for_each(c, |rec, bits| {
            checked += 1;
            let problem = if rec.order == 0 {
                Some("its order is not a positive integer".to_owned())
            } else {
                certify_stored(&rec.id, rec.order, &bits).err()
            };
            if let Some(p) = problem {
                failures.push(json!({"id": rec.id, "order": rec.order, "problem": p}));
            }
        })
    });
    let integrity = store.read(store::integrity_check);
    if let Err(e) = walked {
        eprintln!("hadamard: cannot read {}: {e}", args.db.display());
        return ExitCode::from(2);
    }
    let integrity = match integrity {
        Ok(v) => v,
        Err(e) => vec![e.to_string()],
    };
    let sqlite_ok = integrity == ["ok"];
    let ok = failures.is_empty() && sqlite_ok;
    if args.json {
        let v = json!({
            "database": args.db.display().to_string(),
            "checked": checked,
            "failed": failures.len(),
            "failures": failures,
            "integrity_check": integrity,
            "ok": ok,
            "elapsed_ms": start.elapsed().as_secs_f64() * 1e3,
        });
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        for f in &failures {
            println!(
                "FAILED {} (order {}): {}",
                f["id"].as_str().unwrap_or(""),
                f["order"],
                f["problem"].as_str().unwrap_or("")
            );
        }
        if !sqlite_ok {
            println!("SQLite integrity_check: {}", integrity.join("; "));
        }
        println!(
            "audited {checked} stored matrices in {:.1} s: {} failed; SQLite integrity {}",
            start.elapsed().as_secs_f64(),
            failures.len(),
            if sqlite_ok { "ok" } else { "NOT ok" }
        );
    }
    if ok {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    }
}
