//! Many clients at once uploading, looking up and downloading: no errors, and no lost or
//! duplicated rows. Bounded: 16 clients, 30 requests each.

mod common;

use common::{sha256_of, sylvester_variant, Server};
use std::collections::HashSet;
use std::time::{Duration, Instant};

const CLIENTS: u64 = 16;
const ROUNDS: u64 = 30;
/// Uploads draw from this many distinct matrices, so clients collide on the same ones.
const DISTINCT: u64 = 40;

#[test]
fn many_clients_at_once() {
    let dir = tempfile::tempdir().expect("a temporary directory");
    let s = Server::start(&dir.path().join("registry.sqlite3"), &[]);
    let addr = s.addr;
    let catalogue = s.get("/api/orders/16/matrix").json()["id"]
        .as_str()
        .expect("id")
        .to_owned();
    let started = Instant::now();

    let workers: Vec<_> = (0..CLIENTS)
        .map(|c| {
            let catalogue = catalogue.clone();
            std::thread::spawn(move || {
                let mut uploaded = HashSet::new();
                for k in 0..ROUNDS {
                    let mask = 1 + (c * 7 + k * 13) % DISTINCT;
                    match k % 3 {
                        0 => {
                            let text = sylvester_variant(4, mask);
                            let r = common::request(
                                addr,
                                "POST",
                                "/api/matrices",
                                &[],
                                text.as_bytes(),
                            );
                            assert!(
                                r.status == 201 || r.status == 200,
                                "upload: {} {}",
                                r.status,
                                r.text()
                            );
                            assert_eq!(r.json()["id"], sha256_of(&text).as_str());
                            uploaded.insert(mask);
                        }
                        1 => {
                            let r = common::request(
                                addr,
                                "GET",
                                &format!("/api/matrices/{catalogue}"),
                                &[],
                                &[],
                            );
                            assert_eq!(r.status, 200);
                            let r = common::request(addr, "GET", "/api/orders/16", &[], &[]);
                            assert_eq!(r.status, 200);
                        }
                        _ => {
                            let f = ["pm", "csv", "npy", "png", "json"][(k as usize / 3) % 5];
                            let r = common::request(
                                addr,
                                "GET",
                                &format!("/api/matrices/{catalogue}/download?format={f}"),
                                &[],
                                &[],
                            );
                            assert_eq!(r.status, 200, "download {f}");
                            assert!(!r.body.is_empty());
                        }
                    }
                }
                uploaded
            })
        })
        .collect();
    let mut all = HashSet::new();
    for w in workers {
        all.extend(w.join().expect("a client"));
    }
    let elapsed = started.elapsed();
    assert!(elapsed < Duration::from_secs(60), "took {elapsed:?}");

    // Every distinct upload is stored exactly once, and nothing else.
    let l = s.get("/api/orders/16/matrices?limit=500").json();
    let ids: Vec<&str> = l["matrices"]
        .as_array()
        .expect("a list")
        .iter()
        .map(|m| m["id"].as_str().expect("id"))
        .collect();
    let unique: HashSet<&str> = ids.iter().copied().collect();
    assert_eq!(ids.len(), unique.len(), "duplicated rows");
    let mut expected: HashSet<String> = all
        .iter()
        .map(|&m| sha256_of(&sylvester_variant(4, m)))
        .collect();
    expected.insert(catalogue.clone());
    assert_eq!(
        unique,
        expected.iter().map(String::as_str).collect::<HashSet<_>>(),
        "lost or extra rows"
    );
    assert_eq!(l["total"], expected.len());
}
