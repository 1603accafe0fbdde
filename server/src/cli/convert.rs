//! `hadamard convert`: rewrite a matrix in another format, optionally normalised.
//!
//! Normalising negates columns, then rows, so that the first row and column are all +1; the
//! result is equivalent to the input (and Hadamard exactly when the input is). The verdict of
//! the exact check on the output is printed on stderr, so a conversion never hides a bad matrix.

use super::input::{read_input, InputArgs};
use super::output::{open_output, parse_write_format};
use hadamard_core::verify;
use std::process::ExitCode;

#[derive(clap::Args)]
pub struct ConvertArgs {
    #[command(flatten)]
    input: InputArgs,
    /// The same as --input-format: force the input format (pm, int (csv), bits, json, npy).
    #[arg(long, value_name = "F", conflicts_with = "input_format")]
    format: Option<String>,
    /// The output format: pm, csv, bits, json, npy (int8), npy-f64, npy-f64-scaled, png.
    #[arg(long, value_name = "F")]
    to: String,
    /// Where to write; standard output by default.
    #[arg(short, long, value_name = "PATH")]
    output: Option<String>,
    /// Negate columns and rows so that the first row and column are all +1.
    #[arg(long)]
    normalize: bool,
    /// For `bits` output: which digit stands for −1.
    #[arg(long, value_name = "DIGIT", default_value = "1", value_parser = ["0", "1"])]
    out_bits_minus: String,
}

pub fn run(mut args: ConvertArgs) -> ExitCode {
    if let Some(f) = args.format.take() {
        args.input.input_format = Some(f);
    }
    let parsed = match read_input(&args.input) {
        Ok(p) => p,
        Err(e) => return e.report(false),
    };
    if !parsed.erasures.is_empty() {
        eprintln!("hadamard: the input has {} erased entries (?); `hadamard verify` says whether they can be completed", parsed.erasures.len());
        return ExitCode::from(2);
    }
    let format = match parse_write_format(&args.to, args.out_bits_minus == "1") {
        Ok(f) => f,
        Err(m) => {
            eprintln!("hadamard: {m}");
            return ExitCode::from(2);
        }
    };
    let m = if args.normalize {
        parsed.matrix.normalized()
    } else {
        parsed.matrix
    };
    let report = verify::verify(&m);
    let mut out = match open_output(args.output.as_deref()) {
        Ok(o) => o,
        Err(e) => {
            eprintln!("hadamard: {e}");
            return ExitCode::from(2);
        }
    };
    if let Err(e) =
        hadamard_core::formats::write_to(&m, &format, &mut out).and_then(|_| out.flush())
    {
        eprintln!("hadamard: cannot write: {e}");
        return ExitCode::from(2);
    }
    if report.hadamard {
        eprintln!(
            "wrote a Hadamard matrix of order {} (verified), id {}",
            report.order, report.sha256
        );
    } else {
        eprintln!(
            "wrote a ±1 matrix that is NOT Hadamard ({} failing row pairs), id {}",
            report.failing_pairs_total, report.sha256
        );
    }
    ExitCode::SUCCESS
}
