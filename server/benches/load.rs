//! The load bench: a real `hadamard serve` (release build) on loopback with a temporary
//! database, driven by concurrent clients for a few seconds per scenario; prints throughput
//! and p50/p99 latency as a Markdown table (the figures in docs/performance.md).
//!
//! `cargo bench -p hadamard-server --bench load` (knobs: `LOAD_SECONDS`, default 5;
//! `LOAD_CLIENTS`, default 8). Every request goes to 127.0.0.1 on a fresh connection
//! (`Connection: close`), so the figures include TCP setup, as for clients without keep-alive.

#[path = "../tests/common/mod.rs"]
mod common;

use common::{request, sylvester_variant, try_request, Server};
use std::net::SocketAddr;
use std::sync::atomic::{AtomicU64, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

fn env_or(name: &str, default: u64) -> u64 {
    std::env::var(name)
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default)
}

/// One scenario's request maker: (client, k) → (method, path, body, expected status).
type Op = Arc<dyn Fn(u64, u64) -> (String, String, Vec<u8>, u16) + Send + Sync>;

struct Outcome {
    requests: usize,
    errors: usize,
    secs: f64,
    p50_ms: f64,
    p99_ms: f64,
}

/// Runs `op` from `clients` threads for `secs`; `op(client, k)` returns the expected status.
fn run(addr: SocketAddr, clients: u64, secs: u64, op: Op) -> Outcome {
    let start = Instant::now();
    let deadline = start + Duration::from_secs(secs);
    let errors = Arc::new(AtomicU64::new(0));
    let handles: Vec<_> = (0..clients)
        .map(|c| {
            let op = op.clone();
            let errors = errors.clone();
            std::thread::spawn(move || {
                let mut lat = Vec::new();
                let mut k = 0;
                while Instant::now() < deadline {
                    let (method, path, body, want) = op(c, k);
                    k += 1;
                    let t = Instant::now();
                    let ok = matches!(try_request(addr, &method, &path, &[], &body), Ok(r) if r.status == want);
                    lat.push(t.elapsed().as_secs_f64() * 1e3);
                    if !ok {
                        errors.fetch_add(1, Ordering::Relaxed);
                    }
                }
                lat
            })
        })
        .collect();
    let mut all: Vec<f64> = handles
        .into_iter()
        .flat_map(|h| h.join().unwrap_or_default())
        .collect();
    let secs = start.elapsed().as_secs_f64();
    all.sort_by(|a, b| a.total_cmp(b));
    let pct = |p: f64| {
        all.get(((all.len() as f64 - 1.0) * p).round() as usize)
            .copied()
            .unwrap_or(f64::NAN)
    };
    Outcome {
        requests: all.len(),
        errors: errors.load(Ordering::Relaxed) as usize,
        secs,
        p50_ms: pct(0.5),
        p99_ms: pct(0.99),
    }
}

fn main() {
    let secs = env_or("LOAD_SECONDS", 5);
    let clients = env_or("LOAD_CLIENTS", 8);
    let dir = tempfile::tempdir().expect("a temporary directory");
    let s = Server::start(&dir.path().join("registry.sqlite3"), &[]);
    let addr = s.addr;
    let id16 = request(addr, "GET", "/api/orders/16/matrix", &[], &[]).json()["id"]
        .as_str()
        .unwrap_or_default()
        .to_owned();
    let id256 = request(addr, "GET", "/api/orders/256/matrix", &[], &[]).json()["id"]
        .as_str()
        .unwrap_or_default()
        .to_owned();
    let dup = sylvester_variant(5, 12345);
    request(addr, "POST", "/api/matrices", &[], dup.as_bytes());

    if std::env::var("LOAD_MIX").is_ok_and(|v| v == "1") {
        mix(addr, s.pid(), clients, secs, &id16, &id256);
        return;
    }
    let get = |path: String, want: u16| -> Op {
        Arc::new(move |_, _| ("GET".into(), path.clone(), Vec::new(), want))
    };
    let scenarios: Vec<(&str, Op)> = vec![
        ("GET /api/health", get("/api/health".into(), 200)),
        (
            "GET /api/matrices/{id} (metadata)",
            get(format!("/api/matrices/{id16}"), 200),
        ),
        (
            "GET /api/orders/{n} (n ≤ 2000, from the store)",
            Arc::new(|c, k| {
                (
                    "GET".into(),
                    format!("/api/orders/{}", 4 * (1 + (c * 31 + k * 17) % 500)),
                    Vec::new(),
                    200,
                )
            }),
        ),
        (
            "GET download pm, order 16",
            get(format!("/api/matrices/{id16}/download?format=pm"), 200),
        ),
        (
            "GET download npy, order 256 (cached, verified)",
            get(format!("/api/matrices/{id256}/download?format=npy"), 200),
        ),
        (
            "GET download png, order 256",
            get(format!("/api/matrices/{id256}/download?format=png"), 200),
        ),
        ("GET rows/{i}, order 256", {
            let id = id256.clone();
            Arc::new(move |_, k| {
                (
                    "GET".into(),
                    format!("/api/matrices/{id}/rows/{}", k % 256),
                    Vec::new(),
                    200,
                )
            })
        }),
        (
            "POST a stored matrix again (200), order 32",
            Arc::new(move |_, _| {
                (
                    "POST".into(),
                    "/api/matrices".into(),
                    dup.clone().into_bytes(),
                    200,
                )
            }),
        ),
        (
            "POST new matrices (201, fsync), order 32",
            Arc::new(|c, k| {
                (
                    "POST".into(),
                    "/api/matrices".into(),
                    sylvester_variant(5, (c << 24) | (k + 1)).into_bytes(),
                    201,
                )
            }),
        ),
    ];
    println!(
        "load: {clients} clients, {secs} s per scenario, fresh connection per request, 127.0.0.1\n"
    );
    println!("| scenario | requests | errors | req/s | p50 ms | p99 ms |");
    println!("|---|---:|---:|---:|---:|---:|");
    for (name, op) in scenarios {
        let o = run(addr, clients, secs, op);
        println!(
            "| {name} | {} | {} | {:.0} | {:.2} | {:.2} |",
            o.requests,
            o.errors,
            o.requests as f64 / o.secs,
            o.p50_ms,
            o.p99_ms
        );
    }
    // The 304 path, separately: it needs a header.
    let etag = format!("\"{id256}.npy\"");
    let start = Instant::now();
    let mut lat = Vec::new();
    let mut errors = 0;
    while start.elapsed() < Duration::from_secs(secs.min(3)) {
        let t = Instant::now();
        let r = try_request(
            addr,
            "GET",
            &format!("/api/matrices/{id256}/download?format=npy"),
            &[("If-None-Match", &etag)],
            &[],
        );
        lat.push(t.elapsed().as_secs_f64() * 1e3);
        if !matches!(r, Ok(r) if r.status == 304) {
            errors += 1;
        }
    }
    lat.sort_by(|a, b| a.total_cmp(b));
    let p = |q: f64| lat[((lat.len() as f64 - 1.0) * q).round() as usize];
    println!("| GET download with If-None-Match (304), 1 client | {} | {errors} | {:.0} | {:.2} | {:.2} |", lat.len(), lat.len() as f64 / start.elapsed().as_secs_f64(), p(0.5), p(0.99));
    s.stop();
}

/// `LOAD_MIX=1`: one scenario mixing look-ups, downloads and uploads from every client at once
/// (issue 13's load run: `LOAD_MIX=1 LOAD_CLIENTS=64 LOAD_SECONDS=60`), with the server's peak
/// memory (VmHWM) and health's latency measured from a separate client during the run.
fn mix(addr: SocketAddr, pid: u32, clients: u64, secs: u64, id16: &str, id256: &str) {
    let id1024 = request(addr, "GET", "/api/orders/1024/matrix", &[], &[]).json()["id"]
        .as_str()
        .unwrap_or_default()
        .to_owned();
    let dup = sylvester_variant(5, 12345);
    let (id16, id256) = (id16.to_owned(), id256.to_owned());
    let op: Op = Arc::new(move |c, k| {
        let get = |p: String| ("GET".to_owned(), p, Vec::new(), 200);
        match (c + k) % 10 {
            0 => get(format!("/api/orders/{}", 4 * (1 + (c * 31 + k * 17) % 500))),
            1 => get(format!(
                "/api/smallest-known?at-least={}&constructible=true",
                1 + (c * 7919 + k * 104729) % 30000
            )),
            2 => get(format!("/api/matrices/{id16}")),
            3 => get(format!("/api/matrices/{id256}/rows/{}", k % 256)),
            4 => get(format!("/api/matrices/{id16}/download?format=pm")),
            5 => get(format!("/api/matrices/{id256}/download?format=npy")),
            6 => get(format!("/api/matrices/{id1024}/download?format=npy-f64")),
            7 => get("/api/health".to_owned()),
            8 => (
                "POST".into(),
                "/api/matrices".into(),
                dup.clone().into_bytes(),
                200,
            ),
            _ => (
                "POST".into(),
                "/api/matrices".into(),
                sylvester_variant(5, (c << 24) | (k + 1)).into_bytes(),
                201,
            ),
        }
    });
    let stop = Arc::new(std::sync::atomic::AtomicBool::new(false));
    let watcher = {
        let stop = stop.clone();
        std::thread::spawn(move || {
            let mut worst: f64 = 0.0;
            let mut failed = 0;
            while !stop.load(Ordering::Relaxed) {
                let t = Instant::now();
                if !matches!(try_request(addr, "GET", "/api/health", &[], &[]), Ok(r) if r.status == 200)
                {
                    failed += 1;
                }
                worst = worst.max(t.elapsed().as_secs_f64() * 1e3);
                std::thread::sleep(Duration::from_millis(500));
            }
            (worst, failed)
        })
    };
    let o = run(addr, clients, secs, op);
    stop.store(true, Ordering::Relaxed);
    let (worst_health, health_failed) = watcher.join().unwrap_or((f64::NAN, -1));
    let hwm = std::fs::read_to_string(format!("/proc/{pid}/status"))
        .ok()
        .and_then(|s| {
            s.lines()
                .find_map(|l| l.strip_prefix("VmHWM:"))
                .map(|v| v.trim().to_owned())
        })
        .unwrap_or_default();
    println!("load mix: {clients} clients, {secs} s, fresh connection per request, 127.0.0.1");
    println!("mix per 10 requests: orders/{{n}}, smallest-known, metadata, a row, pm 16, npy 256, npy-f64 1024 (8 MiB), health, re-upload (200), new upload (201)\n");
    println!("| requests | errors | req/s | p50 ms | p99 ms | server peak RSS | health worst ms (failed) |");
    println!("|---:|---:|---:|---:|---:|---:|---:|");
    println!(
        "| {} | {} | {:.0} | {:.2} | {:.2} | {hwm} | {worst_health:.1} ({health_failed}) |",
        o.requests,
        o.errors,
        o.requests as f64 / o.secs,
        o.p50_ms,
        o.p99_ms
    );
}
