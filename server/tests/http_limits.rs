//! Issue 13, case by case, against the real `hadamard serve` on loopback: each cheap hostile
//! request is answered at once, with the server's peak memory (VmHWM from /proc) under a
//! stated figure, idle and stalled sockets closed within a stated time, and health answering
//! in under 2 s throughout. The figures are correctness bounds with wide margins, not speed
//! targets (the speed figures are in `benches/load.rs` and docs/performance.md).

mod common;

use common::{request, try_request, Server};
use std::io::{Read, Write};
use std::net::{SocketAddr, TcpStream};
use std::time::{Duration, Instant};

/// The server's peak resident memory, in MiB (VmHWM of /proc/<pid>/status).
fn peak_rss_mib(pid: u32) -> u64 {
    let status = std::fs::read_to_string(format!("/proc/{pid}/status")).expect("proc status");
    let kib: u64 = status
        .lines()
        .find_map(|l| l.strip_prefix("VmHWM:"))
        .and_then(|v| v.split_whitespace().next())
        .and_then(|v| v.parse().ok())
        .expect("VmHWM");
    kib / 1024
}

/// Health answers 200 within 2 s.
fn assert_healthy(addr: SocketAddr) {
    let t = Instant::now();
    let r = request(addr, "GET", "/api/health", &[], &[]);
    assert_eq!(r.status, 200, "{}", r.text());
    assert_eq!(r.json()["store_writable"], true);
    assert!(
        t.elapsed() < Duration::from_secs(2),
        "health took {:?}",
        t.elapsed()
    );
}

/// Sends a GET and returns the socket without reading the answer.
fn open_get(addr: SocketAddr, path: &str) -> TcpStream {
    let mut s = TcpStream::connect(addr).expect("connect");
    write!(
        s,
        "GET {path} HTTP/1.1\r\nHost: x\r\nConnection: close\r\n\r\n"
    )
    .expect("send");
    s
}

/// Reads until the server closes; the bytes read and whether it closed within `limit`.
fn read_until_closed(s: &mut TcpStream, limit: Duration) -> (usize, bool) {
    let deadline = Instant::now() + limit;
    let mut total = 0;
    let mut buf = vec![0u8; 1 << 16];
    loop {
        let left = deadline.saturating_duration_since(Instant::now());
        if left.is_zero() {
            return (total, false);
        }
        s.set_read_timeout(Some(left)).expect("timeout");
        match s.read(&mut buf) {
            Ok(0) => return (total, true),
            Ok(k) => total += k,
            Err(e)
                if matches!(
                    e.kind(),
                    std::io::ErrorKind::WouldBlock | std::io::ErrorKind::TimedOut
                ) =>
            {
                return (total, false)
            }
            Err(_) => return (total, true), // reset by the server: closed
        }
    }
}

#[test]
fn look_ups_beyond_the_build_limit_answer_at_once() {
    let dir = tempfile::tempdir().expect("tempdir");
    let s = Server::start(&dir.path().join("r.sqlite3"), &[]);
    for (k, constructible) in [(40000, true), (32769, true), (32000, true), (40000, false)] {
        let t = Instant::now();
        let r = s.get(&format!(
            "/api/smallest-known?at-least={k}&constructible={constructible}"
        ));
        assert!(
            t.elapsed() < Duration::from_secs(5),
            "at-least={k}: {:?}",
            t.elapsed()
        );
        let j = r.json();
        if r.status == 200 {
            // Paley's necessary condition: an order above 2 is a multiple of 4 (Paley 1933).
            let n = j["order"].as_u64().expect("order");
            assert!(n >= k && n.is_multiple_of(4), "{j}");
        } else {
            assert_eq!(r.status, 404, "{j}");
            assert!(j["error"].as_str().unwrap().contains("at least"), "{j}");
        }
        if constructible && k > 32768 {
            assert_eq!(
                r.status, 404,
                "nothing above the build limit is constructible: {j}"
            );
        }
    }
    assert_healthy(s.addr);
    assert!(peak_rss_mib(s.pid()) < 200, "{} MiB", peak_rss_mib(s.pid()));
    // The command line answers at once too.
    let t = Instant::now();
    let out = common::hadamard()
        .args(["advise", "--at-least", "32769", "--json"])
        .output()
        .expect("advise");
    assert!(out.status.success());
    assert!(t.elapsed() < Duration::from_secs(5), "{:?}", t.elapsed());
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    assert_eq!(j["smallest_constructible"], serde_json::Value::Null, "{j}");
    assert_eq!(j["smallest_known"]["order"].as_u64().unwrap() % 4, 0, "{j}");
}

#[test]
fn idle_and_slow_clients_are_cut_off_and_connections_capped() {
    let dir = tempfile::tempdir().expect("tempdir");
    let s = Server::start(
        &dir.path().join("r.sqlite3"),
        &[
            "--idle-timeout",
            "2",
            "--header-timeout",
            "2",
            "--max-connections",
            "12",
        ],
    );
    let addr = s.addr;
    // Ten silent sockets, one that trickles a header forever.
    let mut idle: Vec<TcpStream> = (0..10)
        .map(|_| TcpStream::connect(addr).expect("connect"))
        .collect();
    let mut trickle = TcpStream::connect(addr).expect("connect");
    trickle.write_all(b"GET /api/health HTTP/1.1\r\n").unwrap();
    // One keep-alive connection after an answered request.
    let mut kept = TcpStream::connect(addr).expect("connect");
    kept.write_all(b"GET /api/health HTTP/1.1\r\nHost: x\r\n\r\n")
        .unwrap();
    std::thread::sleep(Duration::from_millis(300));
    // Now at the cap of 12: one more is refused at once with a JSON 503 and the headers.
    let t = Instant::now();
    let r = try_request(addr, "GET", "/api/health", &[], &[]).expect("an answer");
    assert_eq!(r.status, 503, "{}", r.text());
    assert!(r.json()["error"].as_str().unwrap().contains("connections"));
    assert!(r.header("content-security-policy").is_some());
    assert!(t.elapsed() < Duration::from_secs(2));
    // Trickling bytes does not keep a socket: the head must be complete within 2 s.
    for _ in 0..4 {
        std::thread::sleep(Duration::from_millis(500));
        let _ = trickle.write_all(b"X-Slow: 1\r\n");
    }
    // Every one of them is closed within idle/header timeout (2 s) + 3 s of margin.
    let started = Instant::now();
    for sock in idle.iter_mut().chain([&mut trickle]) {
        let (_, closed) = read_until_closed(sock, Duration::from_secs(5));
        assert!(
            closed,
            "a silent socket was still open after {:?}",
            started.elapsed()
        );
    }
    let (got, closed) = read_until_closed(&mut kept, Duration::from_secs(5));
    assert!(
        got > 0 && closed,
        "the keep-alive socket got {got} bytes, closed {closed}"
    );
    // With the sockets gone, health answers again.
    assert_healthy(addr);
}

#[test]
fn downloads_stream_and_stalled_readers_are_dropped() {
    let dir = tempfile::tempdir().expect("tempdir");
    let s = Server::start(
        &dir.path().join("r.sqlite3"),
        &["--write-timeout", "2", "--store-max-order", "4096"],
    );
    let addr = s.addr;
    // Sylvester's matrix of order 4096 (Sylvester 1867), built and stored on request.
    let entry = s.get("/api/orders/4096/matrix");
    assert_eq!(entry.status, 200, "{}", entry.text());
    let id = entry.json()["id"].as_str().unwrap().to_owned();
    let base = peak_rss_mib(s.pid());
    // Eight clients ask for 128 MiB of float64 each and never read.
    let path = format!("/api/matrices/{id}/download?format=npy-f64");
    let mut stalled: Vec<TcpStream> = (0..8).map(|_| open_get(addr, &path)).collect();
    let stalled_at = Instant::now();
    std::thread::sleep(Duration::from_millis(500));
    assert_healthy(addr);
    // One client reads its whole download: exactly 4096² float64 and a 128-byte npy header
    // (the .npy v1 layout of NumPy's format description), streamed.
    let mut reader = open_get(addr, &path);
    let (got, closed) = read_until_closed(&mut reader, Duration::from_secs(60));
    assert!(closed);
    assert!(
        got > 4096 * 4096 * 8,
        "a full download is more than the data: {got}"
    );
    // The stalled ones are dropped after the write timeout (2 s): read them only once they
    // have stalled for 4 s; each has been cut short and closed.
    std::thread::sleep(Duration::from_secs(4).saturating_sub(stalled_at.elapsed()));
    for sock in &mut stalled {
        let (got, closed) = read_until_closed(sock, Duration::from_secs(10));
        assert!(closed, "a stalled download still held its socket");
        assert!(
            got < 4096 * 4096 * 8,
            "a stalled client got the whole answer: {got} bytes"
        );
    }
    let peak = peak_rss_mib(s.pid());
    // Built whole, nine answers would be 9 × 128 MiB; streamed, the peak stays near the base.
    assert!(
        peak < base + 150,
        "peak RSS {peak} MiB (base {base} MiB) with nine 128 MiB downloads"
    );
    assert_healthy(addr);
}

#[test]
fn derived_objects_are_bounded_in_bytes_and_streamed() {
    let dir = tempfile::tempdir().expect("tempdir");
    let s = Server::start(&dir.path().join("r.sqlite3"), &[]);
    let entry = s.get("/api/orders/2048/matrix");
    assert_eq!(entry.status, 200, "{}", entry.text());
    let id = entry.json()["id"].as_str().unwrap().to_owned();
    // The request: 2047 factors, fold-over, many centre points, JSON: refused at once
    // for its size in bytes, naming the parameter.
    let t = Instant::now();
    let r = s.get(&format!(
        "/api/matrices/{id}/derive/screening?factors=2047&fold-over=true&centre-points=20000"
    ));
    assert_eq!(r.status, 400, "{}", r.text());
    assert_eq!(r.json()["parameter"], "centre-points");
    assert!(r.json()["error"].as_str().unwrap().contains("MiB"));
    assert!(t.elapsed() < Duration::from_secs(5));
    // The largest design that is allowed streams out as valid JSON; its columns are
    // orthogonal and balanced, as Plackett and Burman (Biometrika 33, 1946) say columns of a
    // normalised Hadamard matrix give.
    let r = s.get(&format!(
        "/api/matrices/{id}/derive/screening?factors=2047&fold-over=true"
    ));
    assert_eq!(r.status, 200);
    let j = r.json();
    assert_eq!(j["runs"].as_array().unwrap().len(), 4096);
    assert_eq!(j["properties"]["columns_orthogonal"], true);
    assert_eq!(j["properties"]["columns_balanced"], true);
    // A name that a spreadsheet would run as a formula is neutralised in CSV, not in JSON.
    let r = s.get(&format!(
        "/api/matrices/{id}/derive/screening?factors=2&names=%3DHYPERLINK(%22x%22),%40SUM(A1)&format=csv"
    ));
    assert_eq!(r.status, 200);
    let header = r.text().lines().next().unwrap().to_owned();
    assert_eq!(
        header,
        "run,standard_order,kind,\"'=HYPERLINK(\"\"x\"\")\",'@SUM(A1)"
    );
    // Levels that are numbers stay numbers.
    assert!(r.text().lines().nth(1).unwrap().ends_with("+1,+1"));
    let peak = peak_rss_mib(s.pid());
    assert!(peak < 400, "peak RSS {peak} MiB");
    assert_healthy(s.addr);
}

#[test]
fn uploads_are_bounded_in_time_and_memory_and_exact() {
    let dir = tempfile::tempdir().expect("tempdir");
    let s = Server::start(
        &dir.path().join("r.sqlite3"),
        &["--body-timeout", "2", "--upload-buffer-mib", "1"],
    );
    let addr = s.addr;
    // An upload whose body never arrives in full: 408 within the body timeout + margin.
    let t = Instant::now();
    let mut sock = TcpStream::connect(addr).unwrap();
    sock.write_all(
        b"POST /api/matrices HTTP/1.1\r\nHost: x\r\nContent-Length: 100000\r\n\r\n++++\n",
    )
    .unwrap();
    let mut raw = Vec::new();
    sock.set_read_timeout(Some(Duration::from_secs(10)))
        .unwrap();
    let _ = sock.read_to_end(&mut raw);
    let text = String::from_utf8_lossy(&raw);
    assert!(text.starts_with("HTTP/1.1 408"), "{text}");
    assert!(text.contains("--body-timeout"), "{text}");
    assert!(t.elapsed() < Duration::from_secs(6), "{:?}", t.elapsed());
    // More body than the server-wide upload buffer (1 MiB here): 503, nothing stored.
    let big = common::sylvester_variant(11, 0); // 2048 × 2049 bytes ≈ 4 MiB
    let r = s.post("/api/matrices", big.as_bytes());
    assert_eq!(r.status, 503, "{}", r.text());
    assert!(r.json()["error"].as_str().unwrap().contains("upload"));
    // JSON entries must be exactly ±1: the nearest binary64 of these two is ±1 (IEEE 754
    // round to nearest; Python's float() agrees), but their decimal value is not.
    for (body, col) in [
        ("[[1, 1],\n [1, -0.99999999999999999999]]", 6),
        ("[[1, 1],\n [1, 1.00000000000000011]]", 6),
    ] {
        let r = s.post("/api/matrices?format=json", body.as_bytes());
        assert_eq!(r.status, 400, "{}", r.text());
        let j = r.json();
        assert_eq!(j["location"]["line"], 2, "{j}");
        assert_eq!(j["location"]["column"], col, "{j}");
        assert!(j["error"].as_str().unwrap().contains("not exactly"), "{j}");
    }
    // The exact forms are accepted: H₂ = [[1,1],[1,−1]] (Sylvester 1867).
    let r = s.post("/api/matrices?format=json", b"[[1, 1.0],\n [1e0, -1.00]]");
    assert!(r.status == 201 || r.status == 200, "{}", r.text());
    assert_healthy(addr);
}

#[test]
fn every_api_error_is_json_with_the_security_headers() {
    let dir = tempfile::tempdir().expect("tempdir");
    let s = Server::start(&dir.path().join("r.sqlite3"), &["--store-max-order", "64"]);
    let long = format!("/api/health?x={}", "a".repeat(9000));
    let big = "b".repeat(20000);
    let cases: Vec<(u16, common::Resp)> = vec![
        (414, s.get(&long)),
        (431, s.get_with("/api/health", &[("X-Big", &big)])),
        // A path segment that is not UTF-8: axum's own rejection, made JSON.
        (400, s.get("/api/orders/%FF%FE")),
        (405, request(s.addr, "DELETE", "/api/health", &[], &[])),
        // Build-on-GET stops at --store-max-order, with a sentence.
        (422, s.get("/api/orders/128/matrix")),
    ];
    for (want, r) in cases {
        assert_eq!(r.status, want, "{}", r.text());
        let j = r.json();
        assert!(j["error"].as_str().is_some_and(|e| !e.is_empty()), "{j}");
        assert!(
            r.header("content-security-policy").is_some(),
            "{want} lacks the CSP"
        );
        assert_eq!(r.header("x-content-type-options"), Some("nosniff"));
    }
    // Orders within the limit are still built and stored; downloads are immutable.
    let e = s.get("/api/orders/64/matrix");
    assert_eq!(e.status, 200);
    let id = e.json()["id"].as_str().unwrap().to_owned();
    let d = s.get(&format!("/api/matrices/{id}/download?format=pm"));
    assert!(d.header("cache-control").unwrap().contains("immutable"));
    assert_eq!(d.body.len(), 64 * 65);
}

#[test]
fn audit_checks_what_is_served_names_each_failure_and_goes_on() {
    let dir = tempfile::tempdir().expect("tempdir");
    let db = dir.path().join("r.sqlite3");
    let s = Server::start(&db, &[]);
    let twelve = s.get("/api/orders/12/matrix").json()["id"]
        .as_str()
        .unwrap()
        .to_owned();
    let sixteen = s.get("/api/orders/16/matrix").json()["id"]
        .as_str()
        .unwrap()
        .to_owned();
    assert_eq!(s.stop(), Some(0));
    // A clean catalogue passes.
    let out = common::hadamard()
        .args(["audit", "--json", "--db"])
        .arg(&db)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
    // Three faults: the entry of order 32 points at the order-12 matrix, a text field that
    // is not UTF-8, and properties that are not the matrix's.
    let c = rusqlite::Connection::open(&db).unwrap();
    c.execute(
        "INSERT INTO catalogue_entries (n, matrix_id, recipe_json, built_at) VALUES (32, ?1, '{\"order\": 32}', 'x')",
        [&twelve],
    )
    .unwrap();
    c.execute(
        "UPDATE matrices SET kernel = CAST(x'ff' AS TEXT) WHERE id = ?1",
        [&twelve],
    )
    .unwrap();
    c.execute(
        "UPDATE matrices SET properties_json = '{\"skew\": true}' WHERE id = ?1",
        [&sixteen],
    )
    .unwrap();
    drop(c);
    let out = common::hadamard()
        .args(["audit", "--json", "--db"])
        .arg(&db)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).expect("audit --json");
    let failures = j["failures"].as_array().unwrap();
    let find = |table: &str, id: &str, words: &str| {
        failures.iter().any(|f| {
            f["table"] == table
                && f["id"] == id
                && f["rowid"].as_i64().is_some()
                && f["problem"].as_str().unwrap().contains(words)
        })
    };
    assert!(
        find(
            "catalogue_entries",
            &twelve,
            "order 32 points at a matrix of order 12"
        ),
        "{j}"
    );
    assert!(find("matrices", &twelve, "UTF-8"), "{j}");
    assert!(find("matrices", &sixteen, "properties"), "{j}");
    assert_eq!(
        j["checked"], 2,
        "the audit went on after the first failure: {j}"
    );
}
