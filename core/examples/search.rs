//! Temporary driver for searches while the `hadamard search` CLI cannot be built (the server
//! crate waits for `formats`): `search KIND PARAM [LIMIT]`, printing seed-catalogue lines.
use hadamard_core::search::{
    aperiodic, goethals_seidel, run, williamson, Hooks, RunConfig, Search,
};
use std::sync::atomic::AtomicBool;
use std::time::Instant;

fn run_to_end<S: Search>(s: &S, limit: Option<usize>) -> Vec<String> {
    let batch = std::env::var("BATCH")
        .ok()
        .and_then(|b| b.parse().ok())
        .unwrap_or(64);
    let stop = AtomicBool::new(false);
    let hooks = Hooks {
        progress: &|d, t| eprint!("\r{d}/{t} units  "),
        checkpoint: &mut |_| {},
        stop: &stop,
    };
    run(
        s,
        RunConfig {
            limit,
            batch,
            ..RunConfig::default()
        },
        None,
        hooks,
    )
    .unwrap()
    .results
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let p: usize = args[2].parse().expect("PARAM");
    let limit: Option<usize> = args.get(3).and_then(|x| x.parse().ok()).filter(|&l| l > 0);
    let t = Instant::now();
    let out = match args[1].as_str() {
        "williamson" => run_to_end(
            &williamson::WilliamsonSearch::new(p, williamson::Mode::Solutions, true),
            limit,
        ),
        "williamson-classes" => run_to_end(
            &williamson::WilliamsonSearch::new(p, williamson::Mode::Classes, true),
            limit,
        ),
        "golay" => run_to_end(
            &aperiodic::AperiodicSearch::new(
                aperiodic::Family::Golay(p),
                aperiodic::Mode::Solutions,
            ),
            limit,
        ),
        "base" => run_to_end(
            &aperiodic::AperiodicSearch::new(
                aperiodic::Family::Base(p),
                aperiodic::Mode::Solutions,
            ),
            limit,
        ),
        "turyn" => run_to_end(
            &aperiodic::AperiodicSearch::new(
                aperiodic::Family::Turyn(p),
                aperiodic::Mode::Solutions,
            ),
            limit,
        ),
        "turyn-classes" => run_to_end(
            &aperiodic::AperiodicSearch::new(aperiodic::Family::Turyn(p), aperiodic::Mode::Classes),
            limit,
        ),
        "gs" => run_to_end(&goethals_seidel::GsSearch::new(p), limit),
        // `gs-multiplier V G [LIMIT]`: quadruples fixed by the multipliers ⟨G⟩ mod V.
        "gs-multiplier" => {
            let g: Vec<usize> = args[3].split(',').map(|x| x.parse().expect("G")).collect();
            let limit = args.get(4).and_then(|x| x.parse().ok()).filter(|&l| l > 0);
            let s = goethals_seidel::GsSearch::with_multipliers(p, &g)
                .unwrap_or_else(|e| panic!("{e}"));
            eprintln!("{} orbits", s.degrees_of_freedom());
            run_to_end(&s, limit)
        }
        "gs-multipliers" => goethals_seidel::multiplier_choices(p, 30)
            .into_iter()
            .map(|(g, h, k)| {
                let g: Vec<String> = g.iter().map(|x| x.to_string()).collect();
                format!("multiplier {}: group of {h}, {k} orbits", g.join(","))
            })
            .collect(),
        k => panic!("unknown search {k}"),
    };
    let how = match limit {
        Some(l) => format!("limit {l}"),
        None => "whole search".to_string(),
    };
    for l in &out {
        println!("{l} | found by `cargo run --release -p hadamard-core --example search -- {} {p}{}` ({how}); 2026-12-02", args[1], limit.map(|l| format!(" {l}")).unwrap_or_default());
    }
    eprintln!(
        "{} {p}: {} results in {:.2?}",
        args[1],
        out.len(),
        t.elapsed()
    );
}
