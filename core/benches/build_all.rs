//! Builds every constructible order up to 1208 by its best route, and compares the time with
//! the exact check alone on the same matrices.
//!
//! Run with `cargo bench -p hadamard-core --bench build_all`. Building includes the exact check
//! at every node of the route (each constructor verifies what it returns), so the ratio says what
//! construction costs on top of verification; the goal is under 3×.

use hadamard_core::route::{build, Planner, Status};
use hadamard_core::verify::is_hadamard;
use std::time::{Duration, Instant};

fn main() {
    let max = std::env::args()
        .filter_map(|a| a.parse::<u64>().ok())
        .next()
        .unwrap_or(1208);
    let mut planner = Planner::new();
    let (mut built, mut verify_only) = (Duration::ZERO, Duration::ZERO);
    let mut count = 0;
    let mut worst = (0.0f64, 0u64);
    for n in [1u64, 2].into_iter().chain((4..=max).step_by(4)) {
        if planner.status(n) != Status::Constructible {
            continue;
        }
        let info = planner.order_info(n);
        let t = Instant::now();
        let v = build(&info.routes[0]).unwrap_or_else(|e| panic!("order {n}: {e}"));
        let b = t.elapsed();
        let t = Instant::now();
        assert!(is_hadamard(v.matrix()), "order {n}");
        let c = t.elapsed();
        built += b;
        verify_only += c;
        count += 1;
        let r = b.as_secs_f64() / c.as_secs_f64().max(1e-9);
        if n >= 100 && r > worst.0 {
            worst = (r, n);
        }
    }
    println!(
        "{count} constructible orders ≤ {max}: build+verify {:.3}s, verify alone {:.3}s, ratio {:.2}× (worst order ≥ 100: {} at {:.2}×)",
        built.as_secs_f64(),
        verify_only.as_secs_f64(),
        built.as_secs_f64() / verify_only.as_secs_f64(),
        worst.1,
        worst.0
    );
}
