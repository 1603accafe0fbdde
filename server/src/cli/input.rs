//! Reading one matrix from a path or standard input, for every command that takes one.

use super::error::CliError;
use hadamard_core::formats::{self, Format, Parsed, ReadOptions};
use std::io::Read;

/// The largest input read, in bytes. An order-32768 `pm` file is about 1 GiB; the default
/// covers order 16384 in any text format.
pub const DEFAULT_MAX_BYTES: u64 = 1 << 30;

/// The largest order read by default: this program's build limit, so every matrix it builds
/// reads back. `serve` has a lower default of its own (see `serve --help`).
pub const DEFAULT_MAX_ORDER: usize = hadamard_core::route::MAX_BUILD_ORDER as usize;

#[derive(clap::Args, Clone)]
pub struct InputArgs {
    /// The matrix file, or `-` for standard input.
    pub path: String,
    /// Force the input format instead of detecting it: pm, int (csv), bits, json, npy.
    /// (`verify` and `convert` also take it as `--format`, as the interface has always said.)
    #[arg(long = "input-format", value_name = "F")]
    pub input_format: Option<String>,
    /// For `bits` input: which digit stands for −1 (the verdict does not depend on it).
    #[arg(long, value_name = "DIGIT", default_value = "1", value_parser = ["0", "1"])]
    pub bits_minus: String,
    /// Refuse matrices with more rows or columns than this (the default is this program's
    /// build limit; `serve` defaults to 8192, since it checks anonymous uploads).
    #[arg(long, value_name = "N", default_value_t = DEFAULT_MAX_ORDER)]
    pub max_order: usize,
}

/// Reads and parses the input the arguments name.
pub fn read_input(args: &InputArgs) -> Result<Parsed, CliError> {
    let bytes = read_bytes(&args.path, DEFAULT_MAX_BYTES)?;
    parse_input(&bytes, args)
}

/// Parses input bytes read from the path the arguments name.
pub fn parse_input(bytes: &[u8], args: &InputArgs) -> Result<Parsed, CliError> {
    let format = match &args.input_format {
        None => None,
        Some(f) => Some(f.parse::<Format>().map_err(|_| {
            CliError::usage(format!(
                "unknown format `{f}`: use pm, int, csv, bits, json or npy"
            ))
        })?),
    };
    let opts = ReadOptions {
        format,
        max_order: args.max_order,
        bits_one_is_negative: args.bits_minus == "1",
        ..ReadOptions::default()
    };
    formats::read(bytes, &opts).map_err(CliError::from)
}

/// Reads a whole file or standard input, refusing more than `limit` bytes.
pub fn read_bytes(path: &str, limit: u64) -> Result<Vec<u8>, CliError> {
    let mut buf = Vec::new();
    let res = if path == "-" {
        std::io::stdin()
            .lock()
            .take(limit + 1)
            .read_to_end(&mut buf)
    } else {
        match std::fs::File::open(path) {
            Ok(f) => {
                // A file says its size: one allocation of it, one read into it (without this
                // an order-4096 file was copied through six doublings of the buffer).
                let size = f.metadata().map_or(0, |m| m.len());
                if size > limit {
                    return Err(too_large(path, limit));
                }
                buf.reserve_exact(size as usize + 1);
                f.take(limit + 1).read_to_end(&mut buf)
            }
            Err(e) => return Err(CliError::unreadable(format!("cannot open {path}: {e}"))),
        }
    };
    res.map_err(|e| CliError::unreadable(format!("cannot read {path}: {e}")))?;
    if buf.len() as u64 > limit {
        return Err(too_large(path, limit));
    }
    Ok(buf)
}

fn too_large(path: &str, limit: u64) -> CliError {
    CliError::unreadable(format!(
        "{path} is larger than the {limit}-byte input limit"
    ))
}

impl InputArgs {
    /// A path read with every default (format detected, `1` is −1, the default order limit).
    pub fn for_path(path: &str) -> InputArgs {
        InputArgs {
            path: path.to_owned(),
            input_format: None,
            bits_minus: "1".into(),
            max_order: DEFAULT_MAX_ORDER,
        }
    }
}
