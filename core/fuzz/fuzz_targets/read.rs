//! Any bytes, read as any format (or detected), must give a matrix or an error — never a panic,
//! and never a matrix above the order limit. A matrix that is read must survive a round trip
//! through its own format's writer.
#![no_main]

use hadamard_core::formats::{read, write, Format, ReadOptions, WriteFormat};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let formats = [
        None,
        Some(Format::Pm),
        Some(Format::Int),
        Some(Format::Bits),
        Some(Format::Json),
        Some(Format::Npy),
    ];
    for format in formats {
        let opts = ReadOptions {
            format,
            max_order: 256,
            ..ReadOptions::default()
        };
        if let Ok(p) = read(data, &opts) {
            assert!(p.matrix.rows() <= 256 && p.matrix.cols() <= 256);
            let mut out = Vec::new();
            write(&p.matrix, &WriteFormat::Pm, &mut out);
            let again = read(
                &out,
                &ReadOptions {
                    format: Some(Format::Pm),
                    ..ReadOptions::default()
                },
            );
            assert_eq!(again.map(|q| q.matrix).ok(), Some(p.matrix));
        }
    }
});
