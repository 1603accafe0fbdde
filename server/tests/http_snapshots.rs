//! Snapshots of the API's answers: every endpoint of `core::wire::endpoints::ENDPOINTS` asked
//! once (and its main refusals) on a real `hadamard serve` over loopback with a real SQLite
//! file. Each JSON answer is
//! - read into its `hadamard_core::wire` type, as the web page reads it (so the page's types
//!   fit what the server sends),
//! - answered with a status its endpoint declares,
//! - compared with its committed snapshot (`tests/snapshots/`), with the fields that change
//!   from run to run or machine to machine redacted (times, the counting kernel, the version,
//!   the seed catalogue's counts).
//!
//! A renamed field, a changed shape or a new status shows up here as a diff to review.
//! The module `docs` below checks `docs/api.md` against the same list.
//! To accept an intended change: `INSTA_UPDATE=always cargo test --release -p hadamard-server
//! --test http_snapshots`, then review `git diff`.

mod common;

use common::{request, sha256_of, Resp, Server};
use hadamard_core::wire::endpoints::{declares, endpoint_of, DOWNLOAD_FORMATS, ENDPOINTS};
use hadamard_core::wire::{
    self, ApiIndex, BrrAnswer, CatalogueMatrix, CoverageEntry, DimensionAnswer, EquivalenceAnswer,
    ErrorBody, Health, IdPrefixAnswer, MatrixInfo, MatrixList, NotHadamardBody, OrderAnswer,
    RowAnswer, SequencyAnswer, UploadAnswer,
};
use serde::de::DeserializeOwned;
use serde_json::{json, Value};
use std::collections::BTreeSet;

/// Fields whose values differ between runs or machines.
const VOLATILE: &[&str] = &[
    "created_at",
    "uploaded_at",
    "constructed_at",
    "verified_at",
    "built_at",
    "kernel",
    "version",
    "seed_sequences",
];

fn redact(v: &mut Value) {
    match v {
        Value::Object(o) => {
            for (k, x) in o.iter_mut() {
                if VOLATILE.contains(&k.as_str()) {
                    *x = json!("[redacted]");
                } else {
                    redact(x);
                }
            }
        }
        Value::Array(a) => a.iter_mut().for_each(redact),
        _ => {}
    }
}

/// The server, and the endpoints asked so far.
struct Session {
    s: Server,
    seen: BTreeSet<&'static str>,
}

impl Session {
    fn send(&mut self, method: &str, path: &str, headers: &[(&str, &str)], body: &[u8]) -> Resp {
        let r = request(self.s.addr, method, path, headers, body);
        if let Some(e) = endpoint_of(method, path) {
            assert!(
                declares(e, r.status),
                "{method} {path} answered {}, which {} does not declare: {}",
                r.status,
                e.path,
                r.text()
            );
            self.seen.insert(e.path);
        }
        r
    }

    /// A JSON answer: its status checked, read into `T`, snapshotted (redacted) as `name`.
    fn json<T: DeserializeOwned>(
        &mut self,
        name: &str,
        method: &str,
        path: &str,
        body: &[u8],
        status: u16,
    ) -> T {
        let r = self.send(method, path, &[], body);
        assert_eq!(r.status, status, "{method} {path}: {}", r.text());
        assert_eq!(r.header("content-type"), Some("application/json"), "{path}");
        let typed: T = serde_json::from_slice(&r.body).unwrap_or_else(|e| {
            panic!(
                "{method} {path}: the answer does not fit its type: {e}\n{}",
                r.text()
            )
        });
        let mut v: Value = serde_json::from_slice(&r.body).unwrap();
        redact(&mut v);
        insta::assert_json_snapshot!(
            name,
            json!({"request": format!("{method} {path}"), "status": r.status, "body": v})
        );
        typed
    }

    fn get<T: DeserializeOwned>(&mut self, name: &str, path: &str) -> T {
        self.json(name, "GET", path, b"", 200)
    }

    /// A file answer: status, the headers that name it, and its SHA-256 (and its text when
    /// it is short text).
    fn file(&mut self, path: &str, headers: &[(&str, &str)]) -> (Resp, Value) {
        let r = self.send("GET", path, headers, b"");
        let text = std::str::from_utf8(&r.body)
            .ok()
            .filter(|t| t.len() <= 400)
            .map(str::to_owned);
        let mut v = json!({"request": format!("GET {path}"), "status": r.status});
        for h in [
            "content-type",
            "content-disposition",
            "etag",
            "cache-control",
            "location",
            "x-bits-minus",
            "x-scaled",
            "x-matrix-id",
        ] {
            if let Some(x) = r.header(h) {
                v[h] = json!(x);
            }
        }
        if !r.body.is_empty() {
            v["sha256"] = json!(hadamard_core::id::sha256_hex(&r.body));
            v["bytes"] = json!(r.body.len());
        }
        if let Some(t) = text.filter(|t| !t.is_empty()) {
            v["text"] = json!(t);
        }
        (r, v)
    }
}

/// ±1 entries of a `pm` text.
fn entries(pm: &str) -> Vec<Vec<i64>> {
    pm.lines()
        .map(|l| l.chars().map(|c| if c == '-' { -1 } else { 1 }).collect())
        .collect()
}

#[test]
fn every_endpoint_answers_as_its_snapshot() {
    let dir = tempfile::tempdir().unwrap();
    let mut t = Session {
        s: Server::start(
            &dir.path().join("registry.sqlite3"),
            &["--max-order", "64", "--max-body", "100000"],
        ),
        seen: BTreeSet::new(),
    };

    // The list, and the service.
    let index: ApiIndex = t.get("index", "/api");
    assert_eq!(index, ApiIndex::new());
    let health: Health = t.get("health", "/api/health");
    assert!(health.store_writable);

    // Orders.
    let o12: OrderAnswer = t.get("order_12", "/api/orders/12");
    // The plain form the page reads is the typed one the planner writes.
    let typed: hadamard_core::route::OrderInfo =
        serde_json::from_value(serde_json::to_value(&o12).unwrap()).unwrap();
    assert_eq!(typed.routes.len(), o12.routes.len());
    assert_eq!(o12.status, hadamard_core::route::Status::Constructible);
    // 6 is not 1, 2 or a multiple of 4: no Hadamard matrix of order 6 exists (the standard
    // necessary condition; common practice).
    let o6: OrderAnswer = t.get("order_6", "/api/orders/6");
    assert_eq!(o6.status, hadamard_core::route::Status::Impossible);
    let cov: Vec<CoverageEntry> = t.get("coverage_40", "/api/coverage?max=40");
    assert_eq!(
        cov.iter().map(|e| e.order).collect::<Vec<_>>(),
        [1, 2, 4, 8, 12, 16, 20, 24, 28, 32, 36, 40]
    );
    let dim: DimensionAnswer = t.get("dimension_24", "/api/dimensions/24");
    assert_eq!(dim.dimension, 24);
    let sk: OrderAnswer = t.get("smallest_known_13", "/api/smallest-known?at-least=13");
    assert_eq!(sk.order, 16);

    // The catalogue's matrix of order 12, and its listing.
    let m: CatalogueMatrix = t.get("order_12_matrix", "/api/orders/12/matrix");
    assert!(m.built_now);
    let id = m.id.clone();
    let (r, v) = t.file("/api/orders/12/matrix/download?format=csv", &[]);
    assert_eq!(r.status, 303);
    insta::assert_json_snapshot!("order_12_matrix_download", v);
    let list: MatrixList = t.get("order_12_matrices", "/api/orders/12/matrices");
    assert_eq!(list.catalogue_entry.as_deref(), Some(id.as_str()));
    let p: IdPrefixAnswer = t.get("id_prefix", &format!("/api/id-prefix/{}", &id[..8]));
    assert_eq!(p.ids, std::slice::from_ref(&id));

    // The stored matrix: metadata, every download, a row.
    let info: MatrixInfo = t.get("matrix_12", &format!("/api/matrices/{id}"));
    // Its recipe, as the answer gives it, replays to the same matrix.
    let recipe: hadamard_core::route::Recipe =
        serde_json::from_value(serde_json::to_value(info.provenance.recipe().unwrap()).unwrap())
            .unwrap();
    assert_eq!(
        hadamard_core::route::build_recipe(&recipe).unwrap().id(),
        id
    );
    assert_eq!(
        info.downloads
            .keys()
            .map(String::as_str)
            .collect::<BTreeSet<_>>(),
        DOWNLOAD_FORMATS.iter().copied().collect()
    );
    let mut files = Vec::new();
    let mut pm = String::new();
    for f in DOWNLOAD_FORMATS {
        let (r, v) = t.file(&format!("/api/matrices/{id}/download?format={f}"), &[]);
        assert_eq!(r.status, 200, "{f}");
        if *f == "pm" {
            pm = r.text();
        }
        files.push(v);
    }
    insta::assert_json_snapshot!("matrix_12_downloads", files);
    // The id is the SHA-256 of the pm text (the interface contract), and the matrix is
    // Hadamard by the definition H·Hᵀ = nI, computed here in plain integers.
    assert_eq!(sha256_of(&pm), id);
    let h = entries(&pm);
    for (i, a) in h.iter().enumerate() {
        for (j, b) in h.iter().enumerate() {
            let dot: i64 = a.iter().zip(b).map(|(x, y)| x * y).sum();
            assert_eq!(dot, if i == j { 12 } else { 0 }, "rows {i}, {j}");
        }
    }
    let (r, v) = t.file(
        &format!("/api/matrices/{id}/download?format=pm"),
        &[("If-None-Match", &format!("\"{id}.pm\""))],
    );
    assert_eq!(r.status, 304);
    insta::assert_json_snapshot!("matrix_12_download_304", v);
    let row: RowAnswer = t.get("matrix_12_row_1", &format!("/api/matrices/{id}/rows/1"));
    assert_eq!(row.pm, pm.lines().nth(1).unwrap());

    // Uploads: stored now, already stored, not Hadamard, incomplete, malformed, too large.
    let mut lines: Vec<String> = pm.lines().map(str::to_owned).collect();
    let negate = |l: &str| -> String {
        l.chars()
            .map(|c| if c == '-' { '+' } else { '-' })
            .collect()
    };
    lines[1] = negate(&lines[1]);
    let other = lines.join("\n") + "\n";
    let up: UploadAnswer = t.json("upload_201", "POST", "/api/matrices", other.as_bytes(), 201);
    assert_eq!(up.id, sha256_of(&other));
    let again: UploadAnswer = t.json("upload_200", "POST", "/api/matrices", other.as_bytes(), 200);
    assert!(!again.stored_now);
    let mut wrong = lines.clone();
    wrong[3] = format!("{}{}", negate(&wrong[3][..1]), &wrong[3][1..]);
    let wrong = wrong.join("\n") + "\n";
    let nh: NotHadamardBody = t.json(
        "upload_422_not_hadamard",
        "POST",
        "/api/matrices",
        wrong.as_bytes(),
        422,
    );
    // One wrong sign in row 3 breaks its orthogonality with each of the other 11 rows.
    assert_eq!(nh.report.failing_pairs_total, 11);
    let mut erased = lines.clone();
    erased[5] = format!("?{}", &erased[5][1..]);
    let erased = erased.join("\n") + "\n";
    let inc: ErrorBody = t.json(
        "upload_422_incomplete",
        "POST",
        "/api/matrices",
        erased.as_bytes(),
        422,
    );
    assert_eq!(inc.erased_entries, Some(1));
    let bad: ErrorBody = t.json(
        "upload_400_malformed",
        "POST",
        "/api/matrices",
        b"+-\n-x\n",
        400,
    );
    assert_eq!(bad.kind, Some(wire::ErrorKind::Malformed));
    let big = format!("{}\n", "+".repeat(68)).repeat(68);
    let over: ErrorBody = t.json(
        "upload_413_over_max_order",
        "POST",
        "/api/matrices",
        big.as_bytes(),
        413,
    );
    assert_eq!(over.limit, Some(64));

    // Derived objects.
    let base = format!("/api/matrices/{id}/derive");
    let _: Value = t.get(
        "derive_screening",
        &format!("{base}/screening?factors=3&seed=1"),
    );
    let _: Value = t.get("derive_brr", &format!("{base}/brr?strata=3"));
    let code: Value = t.get("derive_code", &format!("{base}/code?variant=shortened"));
    // The shortened Hadamard code of order 12: length 11, 12 words, minimum distance 6
    // (the (n−1, n, n/2) code of a Hadamard matrix; MacWilliams and Sloane, ch. 2, recalled).
    assert_eq!(
        (&code["length"], &code["size"], &code["min_distance"]),
        (&json!(11), &json!(12), &json!(6))
    );
    let design: Value = t.get(
        "derive_symmetric_design",
        &format!("{base}/symmetric-design"),
    );
    // A Hadamard 2-(4t−1, 2t−1, t−1) design, t = 3 (common practice).
    assert_eq!(
        (&design["v"], &design["k"], &design["lambda"]),
        (&json!(11), &json!(5), &json!(2))
    );
    let seq: SequencyAnswer = t.get("derive_sequency", &format!("{base}/sequency"));
    assert_eq!(seq.sequencies.len(), 12);
    let (r, v) = t.file(&format!("{base}/ordering?order=natural&format=pm"), &[]);
    assert_eq!(r.status, 200);
    insta::assert_json_snapshot!("derive_ordering_natural", v);
    if !seq.distinct {
        let e: ErrorBody = t.json(
            "derive_ordering_422",
            "GET",
            &format!("{base}/ordering?order=sequency"),
            b"",
            422,
        );
        assert!(e.sequency.is_some());
    }
    let brr: BrrAnswer<Value> = t.get("brr_3", "/api/brr?strata=3");
    assert_eq!(brr.smallest_constructible_order, 4);
    let eq: EquivalenceAnswer = t.get(
        "equivalence",
        &format!("/api/equivalence?a={id}&b={}", up.id),
    );
    // Negating a row gives an equivalent matrix (the definition of equivalence).
    assert_eq!(
        eq.verdict,
        hadamard_core::derive::equivalence::Verdict::Equivalent
    );

    // Refusals any client meets.
    let _: ErrorBody = t.json("matrix_400_bad_id", "GET", "/api/matrices/xyz", b"", 400);
    let _: ErrorBody = t.json(
        "matrix_404",
        "GET",
        &format!("/api/matrices/{}", "0".repeat(64)),
        b"",
        404,
    );
    let _: ErrorBody = t.json("unknown_404", "GET", "/api/nothing-here", b"", 404);
    let _: ErrorBody = t.json("method_405", "DELETE", "/api/matrices", b"", 405);
    let _: ErrorBody = t.json(
        "derive_kind_404",
        "GET",
        &format!("{base}/nothing"),
        b"",
        404,
    );
    let _: ErrorBody = t.json(
        "order_12_row_404",
        "GET",
        &format!("/api/matrices/{id}/rows/12"),
        b"",
        404,
    );

    // Every listed endpoint was asked.
    let all: BTreeSet<&str> = ENDPOINTS.iter().map(|e| e.path).collect();
    let missed: Vec<_> = all.difference(&t.seen).collect();
    assert!(missed.is_empty(), "not asked: {missed:?}");
}

/// `docs/api.md` against the one list of the API (`hadamard_core::wire::endpoints`): every
/// endpoint, format and status is documented, nothing is documented that does not exist, the
/// status table is the list's word for word, and the contract endpoints are marked so. The
/// router itself refuses a route that is not in the list (`app::listed`), and the test above
/// reaches every listed endpoint on a real server.
mod docs {
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
}
