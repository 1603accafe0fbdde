//! What the HTTP tests (and the load bench) share: the real `hadamard serve` binary started on
//! loopback with a temporary database, and a small HTTP/1.1 client over `std::net`.
//!
//! The client is deliberately tiny (one request per connection, `Connection: close`), so the
//! tests depend on no HTTP library and exercise the server exactly as curl would.

#![allow(dead_code)] // Each test file uses its own part of this module.

use std::io::{BufRead, BufReader, Read, Write};
use std::net::{SocketAddr, TcpStream};
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::sync::mpsc;
use std::time::{Duration, Instant};

/// A running `hadamard serve`.
pub struct Server {
    child: Option<Child>,
    pub addr: SocketAddr,
    pub db: PathBuf,
}

impl Server {
    /// Starts the server on an ephemeral loopback port with the database at `db`.
    pub fn start(db: &Path, extra: &[&str]) -> Server {
        // The log goes beside the database, or in the nearest directory that exists (the
        // server creates the database's own directory itself).
        let mut dir = db.parent().unwrap_or(Path::new(".")).to_path_buf();
        while !dir.exists() {
            dir = dir
                .parent()
                .map(Path::to_path_buf)
                .unwrap_or_else(|| PathBuf::from("."));
        }
        let log = dir.join(format!(
            "{}.log",
            db.file_name().and_then(|f| f.to_str()).unwrap_or("server")
        ));
        let stderr = std::fs::OpenOptions::new()
            .create(true)
            .append(true)
            .open(&log)
            .expect("open the server log");
        let mut child = Command::new(env!("CARGO_BIN_EXE_hadamard"))
            .args(["serve", "--addr", "127.0.0.1:0", "--db"])
            .arg(db)
            .args(extra)
            .env("RUST_LOG", "warn")
            .stdout(Stdio::piped())
            .stderr(Stdio::from(stderr))
            .spawn()
            .expect("spawn hadamard serve");
        let stdout = child.stdout.take().expect("piped stdout");
        let (tx, rx) = mpsc::channel();
        std::thread::spawn(move || {
            let mut line = String::new();
            let mut r = BufReader::new(stdout);
            let _ = r.read_line(&mut line);
            let _ = tx.send(line);
            // Keep draining so the server never blocks on a full pipe.
            let mut sink = Vec::new();
            let _ = r.read_to_end(&mut sink);
        });
        let line = match rx.recv_timeout(Duration::from_secs(60)) {
            Ok(l) => l,
            Err(_) => {
                let _ = child.kill();
                panic!(
                    "the server did not say where it listens within 60 s; log: {}",
                    std::fs::read_to_string(&log).unwrap_or_default()
                );
            }
        };
        let addr = line
            .split("http://")
            .nth(1)
            .and_then(|s| s.split('/').next())
            .and_then(|s| s.parse().ok())
            .unwrap_or_else(|| {
                panic!(
                    "unexpected first line {line:?}; log: {}",
                    std::fs::read_to_string(&log).unwrap_or_default()
                )
            });
        Server {
            child: Some(child),
            addr,
            db: db.to_path_buf(),
        }
    }

    /// The server's process id.
    pub fn pid(&self) -> u32 {
        self.child.as_ref().map(|c| c.id()).unwrap_or(0)
    }

    /// Sends SIGTERM to this server's PID and waits for it to exit; returns its exit code.
    pub fn stop(mut self) -> Option<i32> {
        let mut child = self.child.take()?;
        let _ = Command::new("kill")
            .args(["-TERM", &child.id().to_string()])
            .status();
        let deadline = Instant::now() + Duration::from_secs(30);
        loop {
            if let Ok(Some(s)) = child.try_wait() {
                return s.code();
            }
            if Instant::now() > deadline {
                let _ = child.kill();
                let _ = child.wait();
                panic!("the server did not stop within 30 s of SIGTERM");
            }
            std::thread::sleep(Duration::from_millis(20));
        }
    }

    /// SIGKILL: the process dies at once, mid-request if need be.
    pub fn kill(mut self) {
        if let Some(mut c) = self.child.take() {
            let _ = c.kill();
            let _ = c.wait();
        }
    }

    pub fn get(&self, path: &str) -> Resp {
        request(self.addr, "GET", path, &[], &[])
    }

    pub fn get_with(&self, path: &str, headers: &[(&str, &str)]) -> Resp {
        request(self.addr, "GET", path, headers, &[])
    }

    pub fn post(&self, path: &str, body: &[u8]) -> Resp {
        request(self.addr, "POST", path, &[], body)
    }
}

impl Drop for Server {
    fn drop(&mut self) {
        if let Some(mut c) = self.child.take() {
            let _ = c.kill();
            let _ = c.wait();
        }
    }
}

/// An HTTP response.
#[derive(Debug)]
pub struct Resp {
    pub status: u16,
    pub headers: Vec<(String, String)>,
    pub body: Vec<u8>,
}

impl Resp {
    pub fn header(&self, name: &str) -> Option<&str> {
        self.headers
            .iter()
            .find(|(k, _)| k.eq_ignore_ascii_case(name))
            .map(|(_, v)| v.as_str())
    }

    pub fn json(&self) -> serde_json::Value {
        serde_json::from_slice(&self.body)
            .unwrap_or_else(|e| panic!("not JSON ({e}): {}", String::from_utf8_lossy(&self.body)))
    }

    pub fn text(&self) -> String {
        String::from_utf8_lossy(&self.body).into_owned()
    }
}

/// One request on a fresh connection. Panics on transport errors; see [`try_request`].
pub fn request(
    addr: SocketAddr,
    method: &str,
    path: &str,
    headers: &[(&str, &str)],
    body: &[u8],
) -> Resp {
    try_request(addr, method, path, headers, body)
        .unwrap_or_else(|e| panic!("{method} {path}: {e}"))
}

/// One request on a fresh connection, with a 120 s I/O timeout.
pub fn try_request(
    addr: SocketAddr,
    method: &str,
    path: &str,
    headers: &[(&str, &str)],
    body: &[u8],
) -> std::io::Result<Resp> {
    let mut s = TcpStream::connect_timeout(&addr, Duration::from_secs(10))?;
    s.set_read_timeout(Some(Duration::from_secs(120)))?;
    s.set_write_timeout(Some(Duration::from_secs(120)))?;
    let mut head = format!("{method} {path} HTTP/1.1\r\nHost: {addr}\r\nConnection: close\r\n");
    let has_length = headers
        .iter()
        .any(|(k, _)| k.eq_ignore_ascii_case("content-length"));
    for (k, v) in headers {
        head.push_str(&format!("{k}: {v}\r\n"));
    }
    if !has_length && (method == "POST" || !body.is_empty()) {
        head.push_str(&format!("Content-Length: {}\r\n", body.len()));
    }
    head.push_str("\r\n");
    s.write_all(head.as_bytes())?;
    // The server may answer (413) before reading the body and close; that is not an error.
    let _ = s.write_all(body);
    let mut raw = Vec::new();
    if let Err(e) = s.read_to_end(&mut raw) {
        if raw.is_empty() {
            return Err(e);
        }
    }
    parse_response(&raw).ok_or_else(|| {
        std::io::Error::new(
            std::io::ErrorKind::InvalidData,
            format!(
                "unparseable response: {:?}",
                String::from_utf8_lossy(&raw[..raw.len().min(200)])
            ),
        )
    })
}

fn parse_response(raw: &[u8]) -> Option<Resp> {
    let end = raw.windows(4).position(|w| w == b"\r\n\r\n")?;
    let head = std::str::from_utf8(&raw[..end]).ok()?;
    let mut lines = head.split("\r\n");
    let status: u16 = lines.next()?.split(' ').nth(1)?.parse().ok()?;
    let headers: Vec<(String, String)> = lines
        .filter_map(|l| l.split_once(':'))
        .map(|(k, v)| (k.trim().to_owned(), v.trim().to_owned()))
        .collect();
    let rest = &raw[end + 4..];
    let chunked = headers
        .iter()
        .any(|(k, v)| k.eq_ignore_ascii_case("transfer-encoding") && v.contains("chunked"));
    let body = if chunked {
        dechunk(rest)?
    } else {
        rest.to_vec()
    };
    Some(Resp {
        status,
        headers,
        body,
    })
}

fn dechunk(mut b: &[u8]) -> Option<Vec<u8>> {
    let mut out = Vec::new();
    loop {
        let nl = b.windows(2).position(|w| w == b"\r\n")?;
        let size = usize::from_str_radix(
            std::str::from_utf8(&b[..nl])
                .ok()?
                .split(';')
                .next()?
                .trim(),
            16,
        )
        .ok()?;
        b = &b[nl + 2..];
        if size == 0 {
            return Some(out);
        }
        out.extend_from_slice(b.get(..size)?);
        b = b.get(size + 2..)?;
    }
}

/// Sylvester's matrix of order 2^k with the rows in `negated` (a bit mask over the first 64
/// rows) negated, as `pm` text. Different masks give different matrices (different ids), all
/// Hadamard and all equivalent.
pub fn sylvester_variant(k: u32, negated: u64) -> String {
    let n = 1usize << k;
    let mut s = String::with_capacity(n * (n + 1));
    for i in 0..n {
        let flip = i < 64 && negated >> i & 1 == 1;
        for j in 0..n {
            let minus = ((i & j).count_ones() % 2 == 1) != flip;
            s.push(if minus { '-' } else { '+' });
        }
        s.push('\n');
    }
    s
}

/// The id of a matrix given as canonical `pm` text, computed as `sha256sum` would.
pub fn sha256_of(text: &str) -> String {
    hadamard_core::id::sha256_hex(text.as_bytes())
}

/// The `hadamard` binary, for the CLI commands the tests run against the same database.
pub fn hadamard() -> Command {
    Command::new(env!("CARGO_BIN_EXE_hadamard"))
}
