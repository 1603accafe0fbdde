//! Benchmark: the exact check against numpy's float64 `H @ H.T == n·I`, in the same run.
//!
//! `cargo bench -p hadamard-core --bench verify` prints, for n = 1024, 2048 and 4096, the
//! median time of our check with each kernel this CPU has, numpy's time on the same matrix,
//! and the ratios. The baseline (numpy) is measured in the same run on the same machine, so
//! the ratio is what to compare across changes; absolute times depend on the machine.
//!
//! numpy is run as `python3` with a small script; if it is missing, the numpy column says so
//! and only our kernels are compared with each other. `bash tests/wasm.sh bench` runs this
//! benchmark in wasm32 with simd128 under Node (one thread, no numpy: WASI cannot start it).

use hadamard_core::verify::{force_kernel, is_hadamard, kernel_name, verify};
use hadamard_core::Matrix;
use std::process::Command;
use std::time::Instant;

fn sylvester(n: usize) -> Matrix {
    Matrix::from_fn(n, n, |i, j| (i & j).count_ones() % 2 == 1)
}

fn median_secs(reps: usize, mut f: impl FnMut()) -> f64 {
    let mut t: Vec<f64> = (0..reps)
        .map(|_| {
            let s = Instant::now();
            f();
            s.elapsed().as_secs_f64()
        })
        .collect();
    t.sort_by(f64::total_cmp);
    t[t.len() / 2]
}

/// numpy's time for the float64 check on Sylvester's matrix of order n (the same matrix).
fn numpy_secs(n: usize, reps: usize) -> Option<f64> {
    let script = format!(
        r#"
import time, numpy as np
n = {n}
i = np.arange(n)
# Sylvester's matrix: entry (i, j) = (-1)^popcount(i & j), the same matrix the Rust side checks.
a = np.bitwise_and.outer(i, i)
par = np.zeros_like(a)
while a.any():
    par ^= a & 1
    a >>= 1
H = np.where(par == 1, -1.0, 1.0)
E = n * np.eye(n)
ts = []
for _ in range({reps}):
    t = time.perf_counter()
    ok = np.array_equal(H @ H.T, E)
    ts.append(time.perf_counter() - t)
    assert ok
ts.sort()
print(ts[len(ts) // 2])
"#
    );
    let out = Command::new("python3")
        .arg("-c")
        .arg(script)
        .output()
        .ok()?;
    if !out.status.success() {
        return None;
    }
    String::from_utf8_lossy(&out.stdout).trim().parse().ok()
}

fn main() {
    let quick = std::env::args().any(|a| a == "--quick");
    let sizes: &[usize] = if quick { &[1024] } else { &[1024, 2048, 4096] };
    println!(
        "exact Hadamard check vs numpy float64 H @ H.T == nI (same run, same matrix: Sylvester)"
    );
    println!(
        "{:>6} {:>24} {:>12} {:>12} {:>10}",
        "n", "kernel", "ours (ms)", "numpy (ms)", "ratio"
    );
    for &n in sizes {
        let h = sylvester(n);
        let reps = if n >= 4096 { 5 } else { 11 };
        let np = numpy_secs(n, if n >= 4096 { 3 } else { 5 });
        for kernel in ["scalar", "popcnt", "avx512", "simd128", "sliced", "auto"] {
            if !force_kernel(kernel) {
                continue;
            }
            assert!(is_hadamard(&h));
            let ours = median_secs(reps, || {
                std::hint::black_box(is_hadamard(std::hint::black_box(&h)));
            });
            let label = if kernel == "auto" {
                format!("auto = {}", kernel_name())
            } else {
                kernel.to_string()
            };
            match np {
                Some(t) => println!(
                    "{n:>6} {label:>24} {:>12.2} {:>12.2} {:>9.1}×",
                    ours * 1e3,
                    t * 1e3,
                    t / ours
                ),
                None => println!(
                    "{n:>6} {label:>24} {:>12.2} {:>12} {:>10}",
                    ours * 1e3,
                    "no numpy",
                    "-"
                ),
            }
        }
        force_kernel("auto");
        // The full report (properties, id) on top of the check.
        let full = median_secs(reps, || {
            std::hint::black_box(verify(std::hint::black_box(&h)));
        });
        println!("{n:>6} {:>24} {:>12.2}", "full report (auto)", full * 1e3);
    }
}
