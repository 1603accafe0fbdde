//! The crash test: SIGKILL the server in the middle of a stream of uploads, restart it, and
//! check that every acknowledged upload is there and the SQLite file is sound.

mod common;

use common::{sha256_of, sylvester_variant, try_request, Server};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

#[test]
fn acknowledged_uploads_survive_sigkill() {
    let dir = tempfile::tempdir().expect("a temporary directory");
    let db = dir.path().join("registry.sqlite3");
    let s = Server::start(&db, &[]);
    let addr = s.addr;

    let acked: Arc<Mutex<Vec<String>>> = Arc::new(Mutex::new(Vec::new()));
    let stop = Arc::new(AtomicBool::new(false));
    let mut workers = Vec::new();
    for w in 0..4u64 {
        let acked = acked.clone();
        let stop = stop.clone();
        workers.push(std::thread::spawn(move || {
            let mut k = 0u64;
            while !stop.load(Ordering::Relaxed) && k < 5000 {
                // Distinct matrices of order 32: each worker negates rows by its own masks.
                let mask = (w << 28) | (k + 1);
                k += 1;
                let text = sylvester_variant(5, mask);
                match try_request(addr, "POST", "/api/matrices", &[], text.as_bytes()) {
                    Ok(r) if r.status == 201 => acked.lock().expect("lock").push(sha256_of(&text)),
                    Ok(r) => panic!(
                        "unexpected status {} before the kill: {}",
                        r.status,
                        r.text()
                    ),
                    // The kill: connections are refused or cut from here on.
                    Err(_) => break,
                }
            }
        }));
    }
    // Let a stream of uploads get going, then kill mid-stream.
    let start = Instant::now();
    while acked.lock().expect("lock").len() < 40 && start.elapsed() < Duration::from_secs(30) {
        std::thread::sleep(Duration::from_millis(5));
    }
    s.kill();
    stop.store(true, Ordering::Relaxed);
    for w in workers {
        w.join().expect("a worker");
    }
    let acked = acked.lock().expect("lock").clone();
    assert!(
        acked.len() >= 40,
        "only {} uploads were acknowledged before the kill",
        acked.len()
    );

    // The file is sound, and holds every acknowledged upload (and possibly a few that were
    // committed but not yet answered).
    {
        let c = rusqlite::Connection::open(&db).expect("open the database");
        let ok: String = c
            .query_row("PRAGMA integrity_check", [], |r| r.get(0))
            .expect("integrity_check");
        assert_eq!(ok, "ok");
        let n: i64 = c
            .query_row("SELECT count(*) FROM matrices", [], |r| r.get(0))
            .expect("count");
        assert!(
            n as usize >= acked.len(),
            "{n} rows for {} acknowledged uploads",
            acked.len()
        );
        assert!(
            (n as usize) <= acked.len() + 4,
            "{n} rows: at most one unanswered upload per client can have been committed"
        );
    }
    let s = Server::start(&db, &[]);
    for id in &acked {
        let r = s.get(&format!("/api/matrices/{id}"));
        assert_eq!(
            r.status, 200,
            "acknowledged upload {id} is missing after the restart"
        );
    }
    // And it keeps working.
    let r = s.post("/api/matrices", sylvester_variant(5, 1 << 50).as_bytes());
    assert_eq!(r.status, 201);
    drop(s);
    let out = common::hadamard()
        .args(["audit", "--db"])
        .arg(&db)
        .output()
        .expect("run audit");
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
}
