//! Search timings and the published counts that are too slow for the default `cargo test`.
//!
//! `cargo bench -p hadamard-core --bench search` runs everything (tens of minutes on 2 cores;
//! the Williamson m = 35 exhaustive run is the longest part). `cargo bench ... -- quick` skips
//! m = 35 and TT(18). Each line prints the time; a count that disagrees with its published
//! value panics, so the bench is also the slow test of the searches.

use hadamard_core::search::aperiodic::{self, AperiodicSearch, Family};
use hadamard_core::search::williamson::{self, WilliamsonSearch};
use hadamard_core::search::{run, Hooks, RunConfig, Search};
use std::sync::atomic::AtomicBool;
use std::time::Instant;

fn timed<S: Search>(what: &str, s: &S, limit: Option<usize>, batch: usize) -> Vec<String> {
    let start = Instant::now();
    let stop = AtomicBool::new(false);
    let hooks = Hooks {
        progress: &|_, _| {},
        checkpoint: &mut |_| {},
        stop: &stop,
    };
    let r = run(
        s,
        RunConfig {
            limit,
            batch,
            ..RunConfig::default()
        },
        None,
        hooks,
    )
    .expect("fresh run")
    .results;
    println!(
        "{what:<40} {:>6} result(s) {:>10.2} s",
        r.len(),
        start.elapsed().as_secs_f64()
    );
    r
}

fn main() {
    let quick = std::env::args().any(|a| a == "quick");
    // Published class counts of Williamson quadruples (Holzmann, Kharaghani and Tayfeh-Rezaie,
    // Des. Codes Cryptogr. 46, 2008) [references.md#r7-williamson-orders].
    let published = [
        (15, 4),
        (17, 4),
        (19, 6),
        (21, 7),
        (23, 1),
        (25, 10),
        (27, 6),
        (29, 1),
        (31, 2),
        (33, 5),
    ];
    for (m, count) in published {
        let s = WilliamsonSearch::new(m, williamson::Mode::Classes, true);
        let r = timed(&format!("williamson m={m} classes"), &s, None, 64);
        assert_eq!(r.len(), count, "Williamson classes for m = {m}");
    }
    for m in [23, 29, 33] {
        timed(
            &format!("williamson m={m} first"),
            &WilliamsonSearch::new(m, williamson::Mode::Solutions, true),
            Some(1),
            2,
        );
    }
    if !quick {
        // None exist for m = 35 (Đoković 1993) [references.md#r7-williamson-orders].
        let s = WilliamsonSearch::new(35, williamson::Mode::Classes, true);
        assert!(timed("williamson m=35 exhaustive (none)", &s, None, 64).is_empty());
    }
    // Published TT(n) class counts (Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21,
    // 2013) [references.md#r8-ttn-counts-and-existence].
    for (n, count) in [(2, 1), (4, 1), (6, 4), (8, 6), (10, 43), (12, 127)] {
        let s = AperiodicSearch::new(Family::Turyn(n), aperiodic::Mode::Classes);
        assert_eq!(
            timed(&format!("turyn n={n} classes"), &s, None, 64).len(),
            count,
            "TT({n}) classes"
        );
    }
    let largest = if quick { 16 } else { 18 };
    for n in (14..=largest).step_by(2) {
        timed(
            &format!("turyn n={n} first"),
            &AperiodicSearch::new(Family::Turyn(n), aperiodic::Mode::Solutions),
            Some(1),
            2,
        );
    }
    for g in [10, 26] {
        timed(
            &format!("golay g={g} first"),
            &AperiodicSearch::new(Family::Golay(g), aperiodic::Mode::Solutions),
            Some(1),
            2,
        );
    }
    for n in [10, 12] {
        timed(
            &format!("base n={n} first"),
            &AperiodicSearch::new(Family::Base(n), aperiodic::Mode::Solutions),
            Some(1),
            2,
        );
    }
    for v in [9, 13, 15] {
        timed(
            &format!("gs v={v} first"),
            &hadamard_core::search::goethals_seidel::GsSearch::new(v),
            Some(1),
            2,
        );
    }
    // Multiplier-fixed quadruples: the seeds of Williamson m = 41, 43 and 63, and of orders 292
    // (v = 73) and 1068 (v = 267), all known to exist (references.md#r3-open-orders and references.md#r7-williamson-orders).
    for (v, g) in [(41, 9), (43, 7), (63, 5), (73, 2), (267, 2)] {
        let s = hadamard_core::search::goethals_seidel::GsSearch::with_multiplier(v, g)
            .expect("a unit with few orbits");
        let r = timed(&format!("gs v={v} multiplier={g} first"), &s, Some(1), 8);
        assert!(!r.is_empty(), "v = {v}, multiplier {g}");
    }
}
