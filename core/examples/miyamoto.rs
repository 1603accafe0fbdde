//! Builds the order-4q matrix of `construct::miyamoto` from a K the caller supplies, so that an
//! outside tool can scramble K itself and check the result (`tests/python/test_miyamoto.py`).
//!
//! Usage: `cargo run --release -p hadamard-core --example miyamoto -- Q KFILE OUTFILE`
//!
//! KFILE is any matrix format core reads (`pm`, `int`/CSV, `bits`, `json`, `npy`); K must pass
//! the exact check. OUTFILE gets the matrix of order 4q as `+`/`-` text. Errors go to stderr with
//! exit status 1 (K unreadable or not Hadamard) or 2 (usage).

use hadamard_core::construct::miyamoto;
use hadamard_core::formats::{read, write, ReadOptions, WriteFormat};
use hadamard_core::verify::certify;
use std::process::ExitCode;

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let [q, kfile, out] = &args[..] else {
        eprintln!("usage: miyamoto Q KFILE OUTFILE");
        return ExitCode::from(2);
    };
    let Ok(q) = q.parse::<u64>() else {
        eprintln!("Q must be a whole number, found `{q}`");
        return ExitCode::from(2);
    };
    let bytes = match std::fs::read(kfile) {
        Ok(b) => b,
        Err(e) => {
            eprintln!("{kfile}: {e}");
            return ExitCode::from(1);
        }
    };
    let parsed = match read(&bytes, &ReadOptions::default()) {
        Ok(p) => p,
        Err(e) => {
            eprintln!("{kfile}: {e}");
            return ExitCode::from(1);
        }
    };
    let k = match certify(parsed.matrix) {
        Ok(k) => k,
        Err(r) => {
            eprintln!(
                "{kfile}: K is not Hadamard ({} failing row pairs)",
                r.failing_pairs_total
            );
            return ExitCode::from(1);
        }
    };
    let h = match miyamoto(q, &k) {
        Ok(h) => h,
        Err(e) => {
            eprintln!("q = {q}: {e}");
            return ExitCode::from(1);
        }
    };
    let mut text = Vec::new();
    write(h.matrix(), &WriteFormat::Pm, &mut text);
    if let Err(e) = std::fs::write(out, text) {
        eprintln!("{out}: {e}");
        return ExitCode::from(1);
    }
    ExitCode::SUCCESS
}
