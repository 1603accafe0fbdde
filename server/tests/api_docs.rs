//! `docs/api.md` against the one list of the API (`hadamard_core::wire::endpoints`): every
//! endpoint, format and status is documented, nothing is documented that does not exist, the
//! status table is the list's word for word, and the contract endpoints are marked so.
//! The router itself refuses a route that is not in the list (`app::listed`), and the
//! snapshot tests (`http_snapshots.rs`) reach every listed endpoint on a real server.

use hadamard_core::formats::WriteFormat;
use hadamard_core::wire::endpoints::{
    Endpoint, DOWNLOAD_FORMATS, ENDPOINTS, ERROR_STATUSES, UPLOAD_FORMATS,
};
use std::collections::BTreeSet;

fn docs() -> String {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../docs/api.md");
    std::fs::read_to_string(path).expect("docs/api.md")
}

/// The text of every `code span` on a line.
fn spans(line: &str) -> Vec<&str> {
    line.split('`').skip(1).step_by(2).collect()
}

/// `METHOD /api/path` in a code span, without its query.
fn endpoint_in(span: &str) -> Option<(String, String)> {
    let (method, rest) = span.split_once(' ')?;
    if !matches!(method, "GET" | "POST" | "PUT" | "PATCH" | "DELETE" | "HEAD") {
        return None;
    }
    let path = rest.trim();
    if path != "/api" && !path.starts_with("/api/") {
        return None;
    }
    let path = path.split('?').next().unwrap_or(path);
    Some((method.to_owned(), path.to_owned()))
}

fn listed(filter: impl Fn(&Endpoint) -> bool) -> BTreeSet<(String, String)> {
    ENDPOINTS
        .iter()
        .filter(|e| filter(e))
        .map(|e| (e.method.to_owned(), e.path.to_owned()))
        .collect()
}

#[test]
fn every_endpoint_is_documented_and_nothing_else() {
    let text = docs();
    let documented: BTreeSet<(String, String)> = text
        .lines()
        .flat_map(spans)
        .filter_map(endpoint_in)
        .collect();
    let listed = listed(|_| true);
    let missing: Vec<_> = listed.difference(&documented).collect();
    let extra: Vec<_> = documented.difference(&listed).collect();
    assert!(
        missing.is_empty(),
        "listed but not in docs/api.md: {missing:?}"
    );
    assert!(extra.is_empty(), "in docs/api.md but not listed: {extra:?}");
    // The headings marked **contract** are the contract's endpoints.
    let marked: BTreeSet<(String, String)> = text
        .lines()
        .filter(|l| l.starts_with('#') && l.contains("**contract**"))
        .flat_map(spans)
        .filter_map(endpoint_in)
        .collect();
    assert_eq!(marked, self::listed(|e| e.contract));
}

#[test]
fn the_status_table_is_the_lists() {
    let text = docs();
    let rows: Vec<(u16, String)> = text
        .lines()
        .map(str::trim)
        .filter_map(|l| {
            let cells: Vec<&str> = l
                .strip_prefix('|')?
                .strip_suffix('|')?
                .split(" | ")
                .collect();
            let code = cells.first()?.trim().parse::<u16>().ok()?;
            Some((code, cells[1..].join(" | ").trim().to_owned()))
        })
        .collect();
    let want: Vec<(u16, String)> = ERROR_STATUSES
        .iter()
        .map(|(c, w)| (*c, w.to_string()))
        .collect();
    for (got, want) in rows.iter().zip(&want) {
        assert_eq!(got, want, "docs/api.md's status table, row {}", want.0);
    }
    assert_eq!(rows.len(), want.len(), "{rows:?}");
}

#[test]
fn every_format_is_documented_with_its_media_type() {
    let text = docs();
    // The download table: `| \`name\` … | body | \`media type\` |`, after its header.
    let table: Vec<&str> = text
        .lines()
        .skip_while(|l| !l.starts_with("| `format` |"))
        .skip(2)
        .take_while(|l| l.starts_with('|'))
        .collect();
    assert!(!table.is_empty(), "the download table is missing");
    let mut documented = BTreeSet::new();
    for row in table {
        let cells: Vec<&str> = row.trim_matches('|').split(" | ").collect();
        let media = spans(cells.last().unwrap())[0];
        for name in spans(cells[0]) {
            let f: WriteFormat = name
                .parse()
                .unwrap_or_else(|_| panic!("`{name}` is documented but no format"));
            assert_eq!(f.media_type(), media, "{name}");
            documented.insert(f.name());
        }
    }
    let listed: BTreeSet<&str> = DOWNLOAD_FORMATS.iter().copied().collect();
    assert_eq!(documented, listed);
    // The upload's `?format=` names.
    let upload = text
        .lines()
        .flat_map(spans)
        .find_map(|s| s.strip_prefix("?format=").filter(|f| f.contains('|')))
        .expect("the upload's ?format= names");
    assert_eq!(upload.split('|').collect::<Vec<_>>(), UPLOAD_FORMATS);
}
