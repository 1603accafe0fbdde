//! How fast the readers and writers are: a 4096×4096 Sylvester matrix in each format.
//!
//! Run with `cargo bench -p hadamard-core --bench formats`. Prints, for each format, the input
//! size and the best of five reads (and writes) in MB/s of file bytes.

use hadamard_core::formats::{read, write, ReadOptions, WriteFormat};
use hadamard_core::Matrix;
use std::hint::black_box;
use std::time::Instant;

fn sylvester(k: u32) -> Matrix {
    let h2 = Matrix::from_rows(&[[1i8, 1], [1, -1]]).unwrap_or_else(|| Matrix::ones(1, 1));
    (0..k).fold(Matrix::ones(1, 1), |m, _| Matrix::kronecker(&m, &h2))
}

fn best_of<T>(runs: usize, mut f: impl FnMut() -> T) -> f64 {
    (0..runs)
        .map(|_| {
            let t = Instant::now();
            black_box(f());
            t.elapsed().as_secs_f64()
        })
        .fold(f64::INFINITY, f64::min)
}

fn main() {
    let m = sylvester(12);
    println!("{}×{} matrix", m.rows(), m.cols());
    let formats = [
        WriteFormat::Pm,
        WriteFormat::Npy,
        WriteFormat::Bits {
            one_is_negative: true,
        },
        WriteFormat::Csv,
        WriteFormat::Json,
        WriteFormat::NpyF64 { scaled: false },
    ];
    for f in formats {
        let mut bytes = Vec::new();
        write(&m, &f, &mut bytes);
        let mb = bytes.len() as f64 / 1e6;
        let opts = ReadOptions::default();
        match read(&bytes, &opts) {
            Ok(p) if p.matrix == m => {}
            _ => {
                println!("{:>15}: does not read back", f.name());
                continue;
            }
        }
        let r = best_of(5, || read(&bytes, &opts));
        let w = best_of(5, || {
            let mut out = Vec::with_capacity(bytes.len());
            write(&m, &f, &mut out);
            out
        });
        println!(
            "{:>15}: {mb:7.1} MB   read {:7.0} MB/s   write {:7.0} MB/s",
            f.name(),
            mb / r,
            mb / w
        );
    }
    let png = WriteFormat::Png {
        scale: 1,
        marked_rows: vec![0],
    };
    let t = best_of(3, || {
        let mut out = Vec::new();
        write(&m, &png, &mut out);
        out
    });
    println!(
        "{:>15}: 4096×4096 pixels written in {:.0} ms",
        "png",
        t * 1e3
    );
}
