//! Benchmark: the exact check, kernel by kernel, and the whole `hadamard verify` process,
//! against numpy's float64 `H @ H.T == n·I` on the same file, in the same run.
//!
//! `cargo bench -p hadamard-core --bench verify [-- --sizes 1024,4096 --reps 5 --quick]`
//! prints, for n = 1024, 2048, 4096 and 8192 (Sylvester's matrix, written to a temporary `pm`
//! file):
//! - each kernel this CPU has: the median time of the check alone (`is_hadamard_with`), and
//!   the fraction of its bound it reaches (see `bound_secs`);
//! - the parts of the whole process in this process: reading and parsing the file, the check,
//!   the id (SHA-256 of the canonical text, hashed from the file as `hadamard verify` does and
//!   from the matrix as for other formats), the properties;
//! - the whole process: wall time of `hadamard verify --json FILE` with the best kernel and
//!   with `--kernel avx2-sliced` (the release binary, from
//!   `HADAMARD_BIN` or `target/release/hadamard`; build it first), start to exit, alternated
//!   with runs of numpy's check of the same file, medians of `--reps` (5) each (at most 3 at
//!   8192), and the ratio.
//!
//! numpy runs as `python3` with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE removed from its
//! environment (set on some machines for old OpenBLAS builds; they slow a current one) and
//! reports which BLAS kernel it ran (threadpoolctl, when installed). Its time is the product and
//! the comparison only, not reading the file. If python3 or numpy is missing the numpy column
//! says so. In wasm32 (`bash tests/wasm.sh bench`) only the kernels run: WASI starts no
//! processes.

use hadamard_core::formats::{self, ReadOptions};
use hadamard_core::id::{canonical_text_id, matrix_id};
use hadamard_core::verify::{is_hadamard_with, properties, Kernel};
use hadamard_core::Matrix;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::atomic::AtomicBool;
use std::time::Instant;

fn sylvester(n: usize) -> Matrix {
    Matrix::from_fn(n, n, |i, j| (i & j).count_ones() % 2 == 1)
}

fn median(mut t: Vec<f64>) -> f64 {
    t.sort_by(f64::total_cmp);
    t[t.len() / 2]
}

fn median_secs(reps: usize, mut f: impl FnMut()) -> f64 {
    median(
        (0..reps)
            .map(|_| {
                let s = Instant::now();
                f();
                s.elapsed().as_secs_f64()
            })
            .collect(),
    )
}

/// The CPU clock the kernel bounds assume: /proc/cpuinfo's "cpu MHz" (the nominal clock in a
/// virtual machine; turbo would make every fraction below smaller).
fn cpu_hz() -> Option<f64> {
    let s = std::fs::read_to_string("/proc/cpuinfo").ok()?;
    let line = s.lines().find(|l| l.starts_with("cpu MHz"))?;
    let mhz: f64 = line.split(':').nth(1)?.trim().parse().ok()?;
    Some(mhz * 1e6)
}

/// The shortest time the kernel's main instructions can take on `threads` cores at `hz`, from
/// how many of them issue per cycle (Intel Golden Cove, from its optimization manual as
/// remembered: three vector ALU ports for 256-bit logic, two for 512-bit; POPCNT and
/// VPOPCNTQ one per cycle):
/// - bit-sliced: a column of S costs (15/16 + 15/256) carry-save adders per vector of lanes
///   (the two trees), five logic instructions each with AVX2 (1.66 cycles on three ports),
///   two `vpternlogq` with AVX-512 (1.0 cycle on two ports); summed over every row i and every
///   block of lanes of a panel that holds a row j > i;
/// - POPCNT tile: one `popcnt` per pair and word;
/// - AVX-512 tile: one `vpopcntq` per pair and eight words.
///
/// The loads, the list of S and the comparison are left out, so 100% is out of reach.
fn bound_secs(kernel: Kernel, m: &Matrix, hz: f64, threads: f64) -> Option<f64> {
    let n = m.rows() as f64;
    let pairs = n * (n - 1.0) / 2.0;
    let words = m.words_per_row() as f64;
    let csa = 15.0 / 16.0 + 15.0 / 256.0;
    let cycles = match kernel {
        Kernel::Popcnt => pairs * words,
        Kernel::Avx512Tile => pairs * (words / 8.0).ceil(),
        Kernel::Avx2Sliced | Kernel::Avx512Sliced => {
            // Lanes per vector and rows per panel, as in core/src/verify/sliced.rs.
            let (lanes, cycles_per_col) = if kernel == Kernel::Avx2Sliced {
                (256, csa * 5.0 / 3.0)
            } else {
                (512, csa * 2.0 / 2.0)
            };
            // Four blocks of lanes per panel (sliced.rs: AVX2_BLOCKS, AVX512_BLOCKS).
            let panel = 4 * lanes;
            let (rows, cols) = (m.rows(), m.cols());
            let mut vectors = 0.0;
            for i in 0..rows {
                let neg = m.row_negatives(i);
                let s = neg.min(cols - neg) as f64;
                // Blocks of lanes with a row j > i, in every panel that has one.
                let mut blocks = 0;
                for p0 in (0..rows).step_by(panel) {
                    let p1 = (p0 + panel).min(rows);
                    if p1 > i + 1 {
                        blocks += (p1 - p0).div_ceil(lanes) - ((i + 1).max(p0) - p0) / lanes;
                    }
                }
                vectors += s * blocks as f64;
            }
            vectors * cycles_per_col
        }
        _ => return None,
    };
    Some(cycles / hz / threads)
}

/// numpy's float64 check of the file at `path`: (median seconds of `reps` checks, BLAS).
fn numpy(path: &Path, reps: usize) -> Option<(f64, String)> {
    let script = r#"
import sys, time, json, numpy as np
raw = np.frombuffer(open(sys.argv[1], 'rb').read(), dtype=np.uint8)
n = int(np.argmax(raw == 10))
H = np.where(raw.reshape(-1, n + 1)[:, :n] == ord('-'), -1.0, 1.0)
w = np.ones((256, 256)); w @ w.T  # start the BLAS threads before timing
ts = []
for _ in range(int(sys.argv[2])):
    t = time.perf_counter()
    ok = np.array_equal(H @ H.T, n * np.eye(n))
    ts.append(time.perf_counter() - t)
    assert ok
try:
    from threadpoolctl import threadpool_info
    blas = ", ".join(f"{i['internal_api']} {i['version']} {i.get('architecture')} x{i['num_threads']}" for i in threadpool_info() if i['user_api'] == 'blas')
except ImportError:
    blas = "unknown (no threadpoolctl)"
print(json.dumps({"secs": sorted(ts)[len(ts) // 2], "blas": blas}))
"#;
    let out = Command::new("python3")
        .arg("-c")
        .arg(script)
        .arg(path)
        .arg(reps.to_string())
        .env_remove("OPENBLAS_CORETYPE")
        .env_remove("OPENBLAS_L2_SIZE")
        .output()
        .ok()?;
    if !out.status.success() {
        return None;
    }
    let text = String::from_utf8_lossy(&out.stdout);
    let secs = text
        .split("\"secs\": ")
        .nth(1)?
        .split(',')
        .next()?
        .parse()
        .ok()?;
    let blas = text
        .split("\"blas\": \"")
        .nth(1)?
        .trim_end()
        .trim_end_matches("\"}");
    Some((secs, blas.to_string()))
}

/// Wall time of one `hadamard verify --json path`, start to exit; None if it did not say
/// Hadamard.
fn whole_process(bin: &Path, path: &Path, kernel: &str) -> Option<f64> {
    let t = Instant::now();
    let out = Command::new(bin)
        .args(["verify", "--json", "--kernel", kernel])
        .arg(path)
        .output()
        .ok()?;
    let secs = t.elapsed().as_secs_f64();
    (out.status.success() && String::from_utf8_lossy(&out.stdout).contains("\"hadamard\": true"))
        .then_some(secs)
}

fn hadamard_bin() -> PathBuf {
    std::env::var_os("HADAMARD_BIN")
        .map(PathBuf::from)
        .unwrap_or_else(|| Path::new(env!("CARGO_MANIFEST_DIR")).join("../target/release/hadamard"))
}

fn load_average() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .map(|s| s.split_whitespace().take(3).collect::<Vec<_>>().join(" "))
        .unwrap_or_else(|_| "unknown".into())
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let value = |name: &str| {
        args.iter()
            .position(|a| a == name)
            .and_then(|k| args.get(k + 1).cloned())
    };
    let quick = args.iter().any(|a| a == "--quick");
    let sizes: Vec<usize> = match value("--sizes") {
        Some(s) => s.split(',').filter_map(|x| x.parse().ok()).collect(),
        None if quick => vec![1024],
        None => vec![1024, 2048, 4096, 8192],
    };
    let reps: usize = value("--reps").and_then(|r| r.parse().ok()).unwrap_or(5);
    let native = cfg!(not(target_arch = "wasm32"));
    let threads = std::thread::available_parallelism().map_or(1, |t| t.get()) as f64;
    let hz = cpu_hz();
    let dir = std::env::temp_dir().join(format!("hadamard-bench-verify-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("a temporary directory");
    let bin = hadamard_bin();
    println!("exact Hadamard check, kernel by kernel and the whole `hadamard verify` process,");
    println!("against numpy float64 H @ H.T == nI on the same file (Sylvester), same run");
    println!(
        "threads {threads}, clock {} MHz (for the bounds), kernels here: {}; absent: {}",
        hz.map_or("unknown".into(), |h| format!("{:.0}", h / 1e6)),
        Kernel::available()
            .iter()
            .map(|k| k.name())
            .collect::<Vec<_>>()
            .join(", "),
        Kernel::ALL
            .iter()
            .filter(|k| !k.is_available())
            .map(|k| k.name())
            .collect::<Vec<_>>()
            .join(", ")
    );
    println!("load average at the start: {}", load_average());
    for &n in &sizes {
        let h = sylvester(n);
        let path = dir.join(format!("h{n}.pm"));
        let mut text = Vec::with_capacity(n * (n + 1));
        for i in 0..n {
            h.write_canonical_row(i, &mut text);
        }
        std::fs::write(&path, &text).expect("write the matrix file");
        drop(text);
        let kreps = if n >= 8192 { reps.min(3) } else { reps.max(5) };
        println!("\nn = {n}");
        println!(
            "{:>26} {:>11} {:>11} {:>9}",
            "kernel (check alone)", "time (ms)", "bound (ms)", "of bound"
        );
        for kernel in Kernel::available() {
            assert!(is_hadamard_with(&h, kernel));
            let ours = median_secs(kreps, || {
                std::hint::black_box(is_hadamard_with(std::hint::black_box(&h), kernel));
            });
            let bound = hz.and_then(|hz| bound_secs(kernel, &h, hz, threads));
            match bound {
                Some(b) => println!(
                    "{:>26} {:>11.2} {:>11.2} {:>8.0}%",
                    kernel.name(),
                    ours * 1e3,
                    b * 1e3,
                    100.0 * b / ours
                ),
                None => println!(
                    "{:>26} {:>11.2} {:>11} {:>9}",
                    kernel.name(),
                    ours * 1e3,
                    "-",
                    "-"
                ),
            }
        }
        // The parts of the whole process, in this process, one after another (the process
        // hashes the id from the file on its own thread while it parses and checks).
        let bytes = std::fs::read(&path).expect("read the file");
        let read = median_secs(kreps, || {
            std::hint::black_box(std::fs::read(&path).expect("read the file"));
        });
        let mut parsed = None;
        let parse = median_secs(kreps, || {
            parsed = Some(formats::read(&bytes, &ReadOptions::default()).expect("parse"));
        });
        let m = parsed.expect("parsed").matrix;
        assert_eq!(m, h);
        let best = Kernel::best();
        let check = median_secs(kreps, || {
            std::hint::black_box(is_hadamard_with(&m, best));
        });
        let go = AtomicBool::new(false);
        assert_eq!(
            canonical_text_id(&bytes, &go).map(|c| c.0),
            Some(matrix_id(&m))
        );
        let id_file = median_secs(kreps, || {
            std::hint::black_box(canonical_text_id(&bytes, &go));
        });
        let id_matrix = median_secs(kreps, || {
            std::hint::black_box(matrix_id(&m));
        });
        drop(bytes);
        let props = median_secs(kreps, || {
            std::hint::black_box(properties(&m));
        });
        println!(
            "parts (ms): read {:.2}, parse {:.2}, check ({}) {:.2}, id from the file {:.2} \
             (from the matrix {:.2}), properties {:.2}",
            read * 1e3,
            parse * 1e3,
            best.name(),
            check * 1e3,
            id_file * 1e3,
            id_matrix * 1e3,
            props * 1e3,
        );
        if !native {
            continue;
        }
        // The whole process (with the best kernel, and with AVX2's where that is not the best)
        // and numpy, alternated.
        let mut kernels = vec!["best"];
        if Kernel::Avx2Sliced.is_available() && best != Kernel::Avx2Sliced {
            kernels.push("avx2-sliced");
        }
        let mut ours = vec![Vec::new(); kernels.len()];
        let (mut theirs, mut blas) = (Vec::new(), None);
        // numpy takes about ten seconds a check at 8192.
        let wreps = if n >= 8192 { reps.min(3) } else { reps };
        for _ in 0..wreps {
            for (k, kernel) in kernels.iter().enumerate() {
                if let Some(t) = whole_process(&bin, &path, kernel) {
                    ours[k].push(t);
                }
            }
            if let Some((t, b)) = numpy(&path, 1) {
                theirs.push(t);
                blas = Some(b);
            }
        }
        let theirs = (!theirs.is_empty()).then(|| median(theirs));
        match &theirs {
            Some(t) => println!(
                "numpy float64 H @ H.T == nI: {:.1} ms ({})",
                t * 1e3,
                blas.unwrap_or_default()
            ),
            None => println!("numpy: not run (no python3 or numpy)"),
        }
        for (kernel, times) in kernels.iter().zip(ours) {
            let label = if *kernel == "best" {
                format!("best = {}", best.name())
            } else {
                kernel.to_string()
            };
            match (times.is_empty(), &theirs) {
                (true, _) => println!(
                    "whole process ({label}): not run ({} missing? build it first)",
                    bin.display()
                ),
                (false, Some(t)) => {
                    let o = median(times);
                    println!(
                        "whole process `hadamard verify --kernel {kernel}` {:.1} ms: numpy / ours = {:.1}×",
                        o * 1e3,
                        t / o
                    )
                }
                (false, None) => println!(
                    "whole process `hadamard verify --kernel {kernel}` {:.1} ms",
                    median(times) * 1e3
                ),
            }
        }
        println!("load average: {}", load_average());
        let _ = std::fs::remove_file(&path);
    }
    let _ = std::fs::remove_dir(&dir);
}
