//! Where commands write matrices, and the names of the output formats.

use hadamard_core::formats::WriteFormat;
use std::io::{BufWriter, Write};

/// A buffered writer to a file or standard output.
pub fn open_output(path: Option<&str>) -> std::io::Result<Box<dyn Write>> {
    Ok(match path {
        None | Some("-") => Box::new(BufWriter::with_capacity(1 << 16, std::io::stdout().lock())),
        Some(p) => Box::new(BufWriter::with_capacity(1 << 16, std::fs::File::create(p)?)),
    })
}

/// Parses an output format name. `bits_one_is_negative` says which digit `bits` uses for −1.
pub fn parse_write_format(name: &str, bits_one_is_negative: bool) -> Result<WriteFormat, String> {
    Ok(match name {
        "pm" => WriteFormat::Pm,
        "csv" | "int" => WriteFormat::Csv,
        "bits" => WriteFormat::Bits { one_is_negative: bits_one_is_negative },
        "json" => WriteFormat::Json,
        "npy" => WriteFormat::Npy,
        "npy-f64" => WriteFormat::NpyF64 { scaled: false },
        "npy-f64-scaled" => WriteFormat::NpyF64 { scaled: true },
        "png" => WriteFormat::Png { scale: 1, marked_rows: Vec::new() },
        other => return Err(format!("unknown output format `{other}`: use pm, csv, bits, json, npy, npy-f64, npy-f64-scaled or png")),
    })
}
