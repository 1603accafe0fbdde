//! Every endpoint of `hadamard serve` over real HTTP on loopback, against a real SQLite file:
//! status codes, bodies, headers, error bodies, and a restart that keeps everything.

mod common;

use common::{hadamard, sha256_of, sylvester_variant, Server};
use serde_json::Value;

fn tempdir() -> tempfile::TempDir {
    tempfile::tempdir().expect("a temporary directory")
}

#[test]
fn orders_coverage_and_advice() {
    let dir = tempdir();
    let s = Server::start(&dir.path().join("registry.sqlite3"), &[]);

    let r = s.get("/api/orders/12");
    assert_eq!(r.status, 200);
    assert_eq!(r.header("content-type"), Some("application/json"));
    let o = r.json();
    assert_eq!(o["order"], 12);
    assert_eq!(o["status"], "constructible");
    assert!(o["routes"].as_array().is_some_and(|a| !a.is_empty()));
    // The same object as the planner gives above the seeded range.
    let big = s.get("/api/orders/4096").json();
    assert_eq!(big["order"], 4096);
    assert_eq!(big["status"], "constructible");
    assert_eq!(s.get("/api/orders/6").json()["status"], "impossible");

    for bad in [
        "/api/orders/0",
        "/api/orders/abc",
        "/api/orders/-4",
        "/api/orders/99999999999999999999",
    ] {
        let r = s.get(bad);
        assert_eq!(r.status, 400, "{bad}");
        assert!(r.json()["error"].is_string(), "{bad}");
    }

    let c = s.get("/api/coverage?max=20").json();
    let orders: Vec<u64> = c
        .as_array()
        .expect("a list")
        .iter()
        .map(|e| e["order"].as_u64().expect("order"))
        .collect();
    assert_eq!(orders, vec![1, 2, 4, 8, 12, 16, 20]);
    assert!(c
        .as_array()
        .expect("a list")
        .iter()
        .all(|e| e["status"].is_string()));
    let c2 = s.get("/api/coverage?max=2010").json();
    assert_eq!(c2.as_array().map(Vec::len), Some(2 + 2008 / 4));
    assert_eq!(s.get("/api/coverage").status, 400);
    assert_eq!(s.get("/api/coverage?max=x").status, 400);
    assert_eq!(s.get("/api/coverage?max=100000000").status, 400);

    let d = s.get("/api/dimensions/768");
    assert_eq!(d.status, 200);
    assert_eq!(d.json()["dimension"], 768);
    assert_eq!(s.get("/api/dimensions/zero").status, 400);

    let k = s.get("/api/smallest-known?at-least=13").json();
    assert_eq!(k["order"], 16);
    let k = s
        .get("/api/smallest-known?at-least=13&constructible=true")
        .json();
    assert_eq!(k["order"], 16);
    assert_eq!(s.get("/api/smallest-known").status, 400);
    assert_eq!(
        s.get("/api/smallest-known?at-least=5&constructible=maybe")
            .status,
        400
    );

    let h = s.get("/api/health").json();
    assert_eq!(h["status"], "ok");
    assert_eq!(h["orders_seeded_up_to"], 2000);
    let api = s.get("/api").json();
    assert!(api["endpoints"].as_array().is_some_and(|e| e.len() > 5));

    let r = s.get("/api/no-such-thing");
    assert_eq!(r.status, 404);
    assert!(r.json()["error"]
        .as_str()
        .is_some_and(|e| e.contains("no such endpoint")));
    assert_eq!(s.stop(), Some(0), "SIGTERM stops the server cleanly");
}

#[test]
fn upload_lookup_download_and_restart() {
    let dir = tempdir();
    let db = dir.path().join("data").join("registry.sqlite3");
    let s = Server::start(&db, &[]);

    // A new valid matrix: 201, the id is the SHA-256 of its canonical text, Location is /m/id.
    let text = sylvester_variant(3, 0b1010_0110);
    let id = sha256_of(&text);
    let r = s.post("/api/matrices", text.as_bytes());
    assert_eq!(r.status, 201, "{}", r.text());
    let b = r.json();
    assert_eq!(b["id"], id.as_str());
    assert_eq!(b["url"], format!("/m/{id}"));
    assert_eq!(r.header("location"), Some(format!("/m/{id}").as_str()));
    assert_eq!(b["order"], 8);
    assert_eq!(b["stored_now"], true);
    assert_eq!(b["provenance"]["kind"], "uploaded");
    assert_eq!(b["provenance"]["received_format"], "pm");
    assert_eq!(b["verification"]["check"], "exact-gram-popcount");
    assert_eq!(b["equivalence"]["invariant"], "profile4");

    // The same matrix again, in another format (CSV with CRLF and a BOM): 200, same id.
    let csv: String = "\u{feff}".to_owned()
        + &text
            .lines()
            .map(|l| {
                l.chars()
                    .map(|c| if c == '+' { "1" } else { "-1" })
                    .collect::<Vec<_>>()
                    .join(",")
            })
            .collect::<Vec<_>>()
            .join("\r\n")
        + "\r\n";
    let r = s.post("/api/matrices", csv.as_bytes());
    assert_eq!(r.status, 200, "{}", r.text());
    assert_eq!(r.json()["id"], id.as_str());
    assert_eq!(r.json()["stored_now"], false);

    // An equivalent but different matrix: new id, and flagged as possibly equivalent.
    let other = sylvester_variant(3, 0b1);
    let r = s.post("/api/matrices", other.as_bytes());
    assert_eq!(r.status, 201);
    let e = &r.json()["equivalence"];
    assert_eq!(e["possibly_equivalent_to"][0], id.as_str());
    assert_eq!(e["proven_new"], false);

    // Metadata.
    let m = s.get(&format!("/api/matrices/{id}"));
    assert_eq!(m.status, 200);
    let m = m.json();
    assert_eq!(m["order"], 8);
    assert_eq!(m["properties"]["skew"], false);
    assert!(m["properties"]["normalized"].is_boolean());
    assert!(m["provenance"]["uploaded_at"]
        .as_str()
        .is_some_and(|t| t.ends_with('Z')));
    assert!(m["verification"]["verified_at"].is_string());
    assert_eq!(m["invariant"]["kind"], "profile4");

    // Downloads: pm is the canonical text; the other formats carry their own tags.
    let pm = s.get(&format!("/api/matrices/{id}/download?format=pm"));
    assert_eq!(pm.status, 200);
    assert_eq!(pm.text(), text);
    let etag = pm.header("etag").expect("an ETag").to_owned();
    assert_eq!(etag, format!("\"{id}.pm\""));
    assert_eq!(
        pm.header("cache-control"),
        Some("public, max-age=31536000, immutable")
    );
    let r = s.get_with(
        &format!("/api/matrices/{id}/download?format=pm"),
        &[("If-None-Match", &etag)],
    );
    assert_eq!(r.status, 304);
    assert!(r.body.is_empty());
    assert_eq!(r.header("etag"), Some(etag.as_str()));
    let r = s.get_with(
        &format!("/api/matrices/{id}/download?format=csv"),
        &[("If-None-Match", &etag)],
    );
    assert_eq!(
        r.status, 200,
        "a pm tag does not match the csv representation"
    );
    assert!(r.text().starts_with("1,"));
    for (f, ctype) in [
        ("json", "application/json"),
        ("npy", "application/octet-stream"),
        ("png", "image/png"),
        ("npy-f64", "application/octet-stream"),
    ] {
        let r = s.get(&format!("/api/matrices/{id}/download?format={f}"));
        assert_eq!(r.status, 200, "{f}");
        assert_eq!(r.header("content-type"), Some(ctype), "{f}");
        assert!(
            r.header("content-disposition")
                .is_some_and(|d| d.contains("hadamard-8-")),
            "{f}"
        );
    }
    // Each format downloads under its own name, so the three .npy files never collide.
    let names: std::collections::BTreeSet<String> =
        ["pm", "csv", "npy", "npy-f64", "npy-f64-scaled"]
            .iter()
            .map(|f| {
                s.get(&format!("/api/matrices/{id}/download?format={f}"))
                    .header("content-disposition")
                    .unwrap_or_default()
                    .to_string()
            })
            .collect();
    assert_eq!(names.len(), 5, "{names:?}");
    // The id-prefix look-up finds it from its first ten digits.
    let found = s.get(&format!("/api/id-prefix/{}", &id[..10])).json();
    assert!(found["ids"]
        .as_array()
        .is_some_and(|a| a.iter().any(|x| x == id.as_str())));
    assert_eq!(s.get("/api/id-prefix/12345").status, 400);
    assert_eq!(s.get("/api/id-prefix/zzzzzzzzzz").status, 400);
    let bits = s.get(&format!("/api/matrices/{id}/download?format=bits&minus=0"));
    assert_eq!(bits.header("x-bits-minus"), Some("0"));
    assert_eq!(
        bits.header("etag"),
        Some(format!("\"{id}.bits-minus0\"").as_str())
    );
    // A downloaded .npy uploads back to the same id.
    let npy = s.get(&format!("/api/matrices/{id}/download?format=npy"));
    let r = s.post("/api/matrices", &npy.body);
    assert_eq!(r.status, 200);
    assert_eq!(r.json()["id"], id.as_str());
    assert_eq!(
        s.get(&format!("/api/matrices/{id}/download?format=xls"))
            .status,
        400
    );
    assert_eq!(
        s.get(&format!("/api/matrices/{id}/download?format=bits&minus=2"))
            .status,
        400
    );

    // One row.
    let row = s.get(&format!("/api/matrices/{id}/rows/2"));
    assert_eq!(row.status, 200);
    assert_eq!(row.json()["pm"], text.lines().nth(2).expect("row 2"));
    assert_eq!(row.json()["values"].as_array().map(Vec::len), Some(8));
    assert_eq!(s.get(&format!("/api/matrices/{id}/rows/8")).status, 404);
    assert_eq!(s.get(&format!("/api/matrices/{id}/rows/x")).status, 400);

    // Unknown and malformed ids.
    let unknown = "0".repeat(64);
    let r = s.get(&format!("/api/matrices/{unknown}"));
    assert_eq!(r.status, 404);
    assert!(r.json()["error"].is_string());
    assert_eq!(
        s.get(&format!("/api/matrices/{unknown}/download?format=pm"))
            .status,
        404
    );
    assert_eq!(
        s.get_with(
            &format!("/api/matrices/{unknown}/download?format=pm"),
            &[("If-None-Match", &format!("\"{unknown}.pm\""))]
        )
        .status,
        404
    );
    assert_eq!(s.get("/api/matrices/not-an-id").status, 400);
    assert_eq!(
        s.get(&format!("/api/matrices/{}", id.to_uppercase()))
            .status,
        400
    );

    // The pages.
    let p = s.get(&format!("/m/{id}"));
    assert_eq!(p.status, 200);
    assert!(p.text().starts_with("<!doctype html>"));
    assert!(p
        .header("content-security-policy")
        .is_some_and(|c| c.contains("'wasm-unsafe-eval'") && c.contains("frame-ancestors 'none'")));
    assert_eq!(p.header("x-content-type-options"), Some("nosniff"));
    assert_eq!(s.get(&format!("/m/{unknown}")).status, 404);
    assert_eq!(s.get("/").status, 200);
    assert_eq!(
        s.get("/order/92").status,
        200,
        "the app's own routes get the shell"
    );
    assert_eq!(
        s.get("/pkg/web_bg.wasm").header("content-type"),
        Some("application/wasm")
    );
    assert!(s
        .get("/pkg/web.js")
        .header("content-type")
        .is_some_and(|c| c.starts_with("application/javascript")));
    assert!(s.get("/pkg/boot.js").text().contains("/pkg/web_bg.wasm"));
    // The app's files carry a content-hash tag; naming it gives a 304 with no body.
    for f in [
        "/pkg/boot.js",
        "/pkg/web.js",
        "/pkg/web_bg.wasm",
        "/pkg/check_bg.wasm",
    ] {
        let plain = s.get(f);
        let tag = plain.header("etag").expect("an etag").to_string();
        let again = s.get_with(f, &[("If-None-Match", &tag)]);
        assert_eq!((again.status, again.body.len()), (304, 0), "{f}");
        // Compressed when gzip is accepted and it helps; it decodes to the same bytes.
        let gz = s.get_with(f, &[("Accept-Encoding", "gzip, br")]);
        if gz.header("content-encoding") == Some("gzip") {
            use std::io::Read;
            let mut out = Vec::new();
            flate2::read::GzDecoder::new(&gz.body[..])
                .read_to_end(&mut out)
                .expect("gzip");
            assert_eq!(out, plain.body, "{f}");
            assert_ne!(gz.header("etag"), Some(tag.as_str()), "{f}: its own tag");
        } else {
            assert_eq!(gz.body, plain.body, "{f}");
        }
    }
    assert!(s
        .get("/")
        .text()
        .contains("<meta name=\"hadamard-max-order\" content=\"8192\">"));

    // Restart: everything is still there, byte for byte.
    assert_eq!(s.stop(), Some(0));
    let s = Server::start(&db, &[]);
    let m2 = s.get(&format!("/api/matrices/{id}")).json();
    assert_eq!(m2, m);
    assert_eq!(
        s.get(&format!("/api/matrices/{id}/download?format=pm"))
            .text(),
        text
    );
    assert_eq!(s.post("/api/matrices", text.as_bytes()).status, 200);
    assert_eq!(s.get("/api/orders/8/matrices").json()["total"], 2);
    // "The matrix of order 8" redirects to its download (building it first).
    let r = s.get("/api/orders/8/matrix/download?format=csv");
    assert_eq!(r.status, 303);
    assert!(r
        .header("location")
        .is_some_and(|l| l.starts_with("/api/matrices/") && l.ends_with("/download?format=csv")));
    assert_eq!(s.get("/api/orders/9/matrix/download").status, 404);
    drop(s);

    // `hadamard audit` re-verifies every stored matrix.
    let out = hadamard()
        .args(["audit", "--json", "--db"])
        .arg(&db)
        .output()
        .expect("run audit");
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
    let a: Value = serde_json::from_slice(&out.stdout).expect("audit --json");
    // The two uploads and the catalogue matrix of order 8 that the redirect built.
    assert_eq!(a["checked"], 3);
    assert_eq!(a["failed"], 0);
    assert_eq!(a["integrity_check"][0], "ok");

    // A damaged blob (one sign flipped behind the server's back) is found by audit and never
    // served: the download fails re-verification.
    {
        let c = rusqlite::Connection::open(&db).expect("open the database");
        let mut bits: Vec<u8> = c
            .query_row("SELECT bits FROM matrices WHERE id = ?1", [&id], |r| {
                r.get(0)
            })
            .expect("the blob");
        bits[8] ^= 1;
        c.execute(
            "UPDATE matrices SET bits = ?1 WHERE id = ?2",
            rusqlite::params![bits, id],
        )
        .expect("damage it");
    }
    let out = hadamard()
        .args(["audit", "--db"])
        .arg(&db)
        .output()
        .expect("run audit");
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stdout).contains(&format!("FAILED {id}")));
    let s = Server::start(&db, &[]);
    let r = s.get(&format!("/api/matrices/{id}/download?format=pm"));
    assert_eq!(r.status, 500);
    assert!(r.json()["error"]
        .as_str()
        .is_some_and(|e| e.contains("re-verification")));
}

#[test]
fn refusals_400_413_422() {
    let dir = tempdir();
    let s = Server::start(
        &dir.path().join("r.sqlite3"),
        &["--max-body", "100000", "--max-order", "64"],
    );

    // Malformed: 400 with the place.
    let r = s.post("/api/matrices", b"++\n+x\n");
    assert_eq!(r.status, 400);
    let b = r.json();
    assert_eq!(b["location"]["line"], 2);
    assert_eq!(b["location"]["column"], 2);
    assert!(b["error"]
        .as_str()
        .is_some_and(|e| e.contains("line 2, column 2")));
    let r = s.post("/api/matrices", b"");
    assert_eq!(r.status, 400);
    assert_eq!(
        s.post("/api/matrices", &[0u8, 159, 146, 150, 255, 0, 1])
            .status,
        400,
        "binary garbage"
    );
    assert_eq!(
        s.post("/api/matrices?format=klingon", b"++\n+-\n").status,
        400
    );
    // A .npy header that declares more data than it has: 400. One that declares an order
    // above --max-order: 413, before any data is read.
    let npy_of = |shape: &str| {
        let mut npy = b"\x93NUMPY\x01\x00".to_vec();
        let mut h = format!("{{'descr': '|i1', 'fortran_order': False, 'shape': {shape}, }}");
        while !(10 + h.len() + 1).is_multiple_of(64) {
            h.push(' ');
        }
        h.push('\n');
        npy.extend_from_slice(&(h.len() as u16).to_le_bytes());
        npy.extend_from_slice(h.as_bytes());
        npy.extend_from_slice(&[1u8; 16]);
        npy
    };
    let r = s.post("/api/matrices", &npy_of("(60, 60)"));
    assert_eq!(r.status, 400, "{}", r.text());
    let r = s.post("/api/matrices", &npy_of("(40000, 40000)"));
    assert_eq!(r.status, 413, "{}", r.text());
    assert_eq!(r.json()["kind"], "over_max_order");

    // Well-formed, not Hadamard: 422 with the failing pairs.
    let r = s.post(
        "/api/matrices",
        b"++++\n++--\n+-+-\n+--+\n++++\n".as_slice(),
    );
    assert_eq!(r.status, 422);
    let r = s.post("/api/matrices", b"++++\n++--\n+-+-\n++++\n");
    assert_eq!(r.status, 422);
    let b = r.json();
    assert_eq!(b["hadamard"], false);
    assert_eq!(b["failing_pairs_total"], 1);
    assert_eq!(b["failing_pairs"][0]["i"], 0);
    assert_eq!(b["failing_pairs"][0]["j"], 3);
    assert_eq!(b["failing_pairs"][0]["dot"], 4);
    assert!(b["error"].is_string());
    assert_eq!(
        s.post("/api/matrices", b"+++\n+-+\n++-\n").status,
        422,
        "order 3 cannot be Hadamard"
    );
    assert_eq!(
        s.post("/api/matrices", b"++\n+?\n").status,
        422,
        "erased entries are not stored"
    );

    // Erased entries: 422, with the completion (Sylvester's matrix of order 16, 30 entries
    // erased along a diagonal stripe; rows orthogonal to the others are fixed up to sign).
    let h = sylvester_variant(4, 0);
    let mut erased: Vec<u8> = h.clone().into_bytes();
    for i in 0..16 {
        for j in [i, (i + 5) % 16] {
            if (i, j) != (0, 0) && (i, j) != (0, 5) {
                erased[i * 17 + j] = b'?';
            }
        }
    }
    let r = s.post("/api/matrices", &erased);
    assert_eq!(r.status, 422);
    let b = r.json();
    assert_eq!(b["erased_entries"], 30);
    assert_eq!(b["completion"]["kind"], "unique", "{b}");
    assert_eq!(b["completion"]["completed_sha256"], sha256_of(&h));
    assert!(b["error"]
        .as_str()
        .is_some_and(|e| e.starts_with("incomplete")));
    assert_eq!(
        s.get(&format!("/api/matrices/{}", sha256_of(&h))).status,
        404,
        "not stored"
    );

    // Three wrong signs: 422, with the repair listing them.
    let h = sylvester_variant(5, 0);
    let mut bad = h.clone().into_bytes();
    for (i, j) in [(2, 9), (17, 30), (25, 4)] {
        let at = i * 33 + j;
        bad[at] = if bad[at] == b'+' { b'-' } else { b'+' };
    }
    let b = s.post("/api/matrices", &bad).json();
    assert_eq!(b["repair"]["kind"], "wrong_signs");
    assert_eq!(b["repair"]["corrected_sha256"], sha256_of(&h));
    assert_eq!(b["repair"]["count"], 3);
    assert_eq!(b["repair"]["unique_within_distance"], true);

    // Too large: a declared length over the limit is refused before the body is read.
    let r = common::request(
        s.addr,
        "POST",
        "/api/matrices",
        &[("Content-Length", "1000000000")],
        b"",
    );
    assert_eq!(r.status, 413);
    assert_eq!(r.json()["limit"], 100000);
    // And a chunked body that grows past it.
    let mut chunked = Vec::new();
    for _ in 0..30 {
        chunked.extend_from_slice(format!("{:x}\r\n", 8192).as_bytes());
        chunked.extend_from_slice(&[b'+'; 8192]);
        chunked.extend_from_slice(b"\r\n");
    }
    chunked.extend_from_slice(b"0\r\n\r\n");
    let r = common::request(
        s.addr,
        "POST",
        "/api/matrices",
        &[("Transfer-Encoding", "chunked")],
        &chunked,
    );
    assert_eq!(r.status, 413);

    // Orders above --max-order are neither uploaded nor built: 413, the place and the limit.
    let big = sylvester_variant(7, 0);
    let r = s.post("/api/matrices", big.as_bytes());
    assert_eq!(r.status, 413, "{}", r.text());
    assert_eq!(r.json()["limit"], 64);
    assert_eq!(r.json()["kind"], "over_max_order");
    assert!(r.json()["location"].is_object(), "{}", r.text());
    assert_eq!(s.get("/api/orders/128/matrix").status, 422);

    // Nothing refused was stored.
    assert_eq!(s.get("/api/health").json()["matrices"], 0);
    assert_eq!(
        common::request(s.addr, "DELETE", "/api/matrices", &[], b"").status,
        405
    );
}

#[test]
fn catalogue_matrices_are_built_on_demand_and_stored() {
    let dir = tempdir();
    let s = Server::start(&dir.path().join("r.sqlite3"), &[]);

    let r = s.get("/api/orders/12/matrix");
    assert_eq!(r.status, 200, "{}", r.text());
    let e = r.json();
    assert_eq!(e["built_now"], true);
    let id = e["id"].as_str().expect("an id").to_owned();
    assert_eq!(e["url"], format!("/m/{id}"));
    assert!(e["recipe"]["tree"]["method"].is_string());
    assert_eq!(
        e["recipe"]["id"],
        id.as_str(),
        "the recipe pins the id it replays to"
    );
    // The id is the SHA-256 of the pm download.
    let pm = s
        .get(&format!("/api/matrices/{id}/download?format=pm"))
        .text();
    assert_eq!(sha256_of(&pm), id);
    // Asked again: the stored one, not built again.
    let again = s.get("/api/orders/12/matrix").json();
    assert_eq!(again["id"], id.as_str());
    assert_eq!(again["built_now"], false);
    let meta = s.get(&format!("/api/matrices/{id}")).json();
    assert_eq!(meta["provenance"]["kind"], "constructed");
    assert!(meta["provenance"]["recipe"]["tree"].is_object());
    assert_eq!(meta["catalogue_entry"]["order"], 12);

    // The listing of a constructible order with nothing stored builds one first.
    let l = s.get("/api/orders/32/matrices").json();
    assert_eq!(l["total"], 1);
    assert_eq!(l["built_now"], true);
    assert_eq!(l["matrices"][0]["origin"], "constructed");
    assert_eq!(l["catalogue_entry"], l["matrices"][0]["id"]);
    assert_eq!(s.get("/api/orders/32/matrices?limit=0").status, 400);
    assert_eq!(
        s.get("/api/orders/32/matrices?limit=10&offset=1").json()["matrices"]
            .as_array()
            .map(Vec::len),
        Some(0)
    );

    // Orders with no implemented route: 404 that says the order's status.
    let r = s.get("/api/orders/6/matrix");
    assert_eq!(r.status, 404);
    assert_eq!(r.json()["status"], "impossible");
    let l = s.get("/api/orders/6/matrices").json();
    assert_eq!(l["total"], 0);
}

#[test]
fn derived_objects_and_equivalence() {
    let dir = tempdir();
    let s = Server::start(&dir.path().join("d.sqlite3"), &[]);
    let id12 = s.get("/api/orders/12/matrix").json()["id"]
        .as_str()
        .expect("an id")
        .to_owned();
    let meta = s.get(&format!("/api/matrices/{id12}")).json();
    let link = |k: &str| {
        meta["derived"][k]
            .as_str()
            .expect("a derived link")
            .to_owned()
    };

    let d = s
        .get(&format!(
            "/api/matrices/{id12}/derive/screening?factors=5&fold-over=true&centre-points=2&seed=3"
        ))
        .json();
    assert_eq!(d["runs"].as_array().map(Vec::len), Some(26));
    assert_eq!(d["properties"]["columns_orthogonal"], true);
    assert_eq!(d["randomisation"]["seed"], 3);
    let csv = s.get(&link("screening_csv"));
    assert_eq!(csv.status, 200);
    assert_eq!(csv.header("content-type"), Some("text/csv; charset=utf-8"));
    assert!(csv.text().starts_with("run,standard_order,kind,A,"));
    let bad = s.get(&format!(
        "/api/matrices/{id12}/derive/screening?columns=1,12"
    ));
    assert_eq!(
        (bad.status, bad.json()["parameter"].as_str()),
        (400, Some("columns"))
    );
    assert_eq!(
        s.get(&format!("/api/matrices/{id12}/derive/screening?seed=x"))
            .status,
        400
    );
    assert_eq!(
        s.get(&format!("/api/matrices/{id12}/derive/nonsense"))
            .status,
        404
    );

    let c = s.get(&link("code_punctured")).json();
    assert_eq!(
        (
            c["length"].as_u64(),
            c["size"].as_u64(),
            c["min_distance"].as_u64()
        ),
        (Some(11), Some(24), Some(5))
    );
    let b = s.get(&link("symmetric_design")).json();
    assert_eq!(
        (
            b["v"].as_u64(),
            b["k"].as_u64(),
            b["lambda"].as_u64(),
            b["verified_pairs"].as_bool()
        ),
        (Some(11), Some(5), Some(2), Some(true))
    );
    assert_eq!(
        s.get(&format!("/api/matrices/{id12}/derive/brr?strata=12"))
            .status,
        400
    );

    // Order 12 has no sequency order: a 422 that says so, with the sequencies.
    let q = s.get(&link("ordering_sequency"));
    assert_eq!(q.status, 422);
    assert!(q.json()["error"]
        .as_str()
        .unwrap_or("")
        .contains("Webb and Kennedy"));
    let scaled = s.get(&link("scaled_csv"));
    assert!(scaled.text().starts_with("# SCALED"));
    assert_eq!(scaled.header("x-scaled"), Some("1/sqrt(n); not normalised"));

    let csv = s.get("/api/brr?strata=13&format=csv").text();
    assert!(csv.starts_with("replicate,stratum_1,"), "{csv}");
    assert_eq!(csv.lines().count(), 17);
    let r = s.get("/api/brr?strata=13").json();
    assert_eq!(
        (
            r["replicates"].as_u64(),
            r["smallest_known_order"].as_u64(),
            r["balanced"].as_bool(),
            r["orthogonal"].as_bool()
        ),
        (Some(16), Some(16), Some(true), Some(true))
    );

    // Equivalence of two stored matrices: Sylvester 16 and a negated variant are equivalent.
    let up = s
        .post("/api/matrices", sylvester_variant(4, 0b1011).as_bytes())
        .json();
    let id16 = up["id"].as_str().expect("an id").to_owned();
    let s16 = s.get("/api/orders/16/matrix").json()["id"]
        .as_str()
        .expect("an id")
        .to_owned();
    let e = s.get(&format!("/api/equivalence?a={s16}&b={id16}")).json();
    assert_eq!(e["verdict"], "equivalent", "{e}");
    assert!(e["certificate"]["row_map"].is_array());
    let e = s.get(&format!("/api/equivalence?a={s16}&b={id12}"));
    assert_eq!((e.status, e.json()["parameter"].as_str()), (400, Some("b")));
    assert_eq!(s.get(&format!("/api/equivalence?a={s16}")).status, 400);
}
