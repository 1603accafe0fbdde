//! The format fixtures: every file in `tests/fixtures/formats/` is read, and the result must
//! match the `.expect` file beside it (`NAME.EXT.expect`).
//!
//! An `.expect` file has one verdict line and optional extra lines:
//! - `ok rows=R cols=C format=F sha256=ID [erasures=K]` — the id is computed by the Python
//!   scripts that wrote the fixtures (hashlib over the canonical text), not by this crate;
//! - `error line=L col=C`, `error element=K`, `error byte=B`, or `error nowhere`;
//! - `options: format=F max_order=N erasures=off` — read options other than the defaults;
//! - `message: TEXT` — a piece of the error message that must appear in it.
//!
//! The fixtures are regenerated with `make_text.py` and `make_npy.py` (NumPy is the outside
//! reference for `.npy`).

use hadamard_core::formats::{read, Location, ReadOptions};
use hadamard_core::id::matrix_id;
use std::collections::BTreeMap;
use std::path::Path;

fn fields(line: &str) -> BTreeMap<&str, &str> {
    line.split_whitespace()
        .filter_map(|kv| kv.split_once('='))
        .collect()
}

fn check(path: &Path, expect: &str) -> Result<(), String> {
    let bytes = std::fs::read(path).map_err(|e| e.to_string())?;
    let mut lines = expect.lines();
    let verdict = lines.next().ok_or("empty .expect file")?;
    let mut opts = ReadOptions::default();
    let mut message = None;
    for line in lines {
        if let Some(o) = line.strip_prefix("options:") {
            for (k, v) in fields(o) {
                match k {
                    "format" => opts.format = Some(v.parse().map_err(|e| format!("{e}"))?),
                    "max_order" => opts.max_order = v.parse().map_err(|_| "bad max_order")?,
                    "erasures" => opts.allow_erasures = v != "off",
                    _ => return Err(format!("unknown option {k}")),
                }
            }
        } else if let Some(m) = line.strip_prefix("message:") {
            message = Some(m.trim());
        }
    }
    let got = read(&bytes, &opts);
    let f = fields(verdict);
    match (verdict.split_whitespace().next(), got) {
        (Some("ok"), Ok(p)) => {
            let seen = format!(
                "rows={} cols={} format={} sha256={} erasures={}",
                p.matrix.rows(),
                p.matrix.cols(),
                p.format.name(),
                matrix_id(&p.matrix),
                p.erasures.len()
            );
            let want = format!(
                "rows={} cols={} format={} sha256={} erasures={}",
                f.get("rows").unwrap_or(&"?"),
                f.get("cols").unwrap_or(&"?"),
                f.get("format").unwrap_or(&"?"),
                f.get("sha256").unwrap_or(&"?"),
                f.get("erasures").unwrap_or(&"0")
            );
            if seen != want {
                return Err(format!("read {seen}, expected {want}"));
            }
            Ok(())
        }
        (Some("error"), Err(e)) => {
            let place = match e.location {
                Location::LineCol { line, col } => format!("line={line} col={col}"),
                Location::Element(k) => format!("element={k}"),
                Location::Byte(b) => format!("byte={b}"),
                Location::Nowhere => "nowhere".to_string(),
            };
            let want = verdict.trim_start_matches("error").trim();
            if place != want {
                return Err(format!("error at {place}, expected at {want}: {e}"));
            }
            if let Some(m) = message {
                if !e.message.contains(m) {
                    return Err(format!("message {:?} does not contain {m:?}", e.message));
                }
            }
            Ok(())
        }
        (_, Ok(p)) => Err(format!(
            "read a {}×{} matrix, expected {verdict}",
            p.matrix.rows(),
            p.matrix.cols()
        )),
        (_, Err(e)) => Err(format!("error {e}, expected {verdict}")),
    }
}

#[test]
fn every_fixture_reads_as_expected() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/fixtures/formats");
    let mut entries: Vec<_> = std::fs::read_dir(&dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| {
            !matches!(
                p.extension().and_then(|x| x.to_str()),
                Some("expect" | "py" | "md")
            )
        })
        .filter(|p| p.is_file())
        .collect();
    entries.sort();
    let mut failures = Vec::new();
    for path in &entries {
        let mut expect_path = path.clone().into_os_string();
        expect_path.push(".expect");
        let result = match std::fs::read_to_string(&expect_path) {
            Ok(expect) => check(path, &expect),
            Err(_) => Err("no .expect file beside it".to_string()),
        };
        if let Err(e) = result {
            failures.push(format!(
                "{}: {e}",
                path.file_name().unwrap_or_default().to_string_lossy()
            ));
        }
    }
    assert!(
        entries.len() >= 40,
        "only {} fixtures found in {}",
        entries.len(),
        dir.display()
    );
    assert!(
        failures.is_empty(),
        "{} of {} fixtures failed:\n{}",
        failures.len(),
        entries.len(),
        failures.join("\n")
    );
}
