//! `hadamard convert`: rewrite a matrix in another format, optionally normalised.
//!
//! Normalising negates columns, then rows, so that the first row and column are all +1; the
//! result is equivalent to the input (and Hadamard exactly when the input is). The verdict of
//! the exact check on the output is printed on stderr, so a conversion never hides a bad matrix.

use super::error::{CliError, Kind};
use super::input::{read_input, InputArgs};
use super::output::{open_output, parse_write_format};
use hadamard_core::verify;

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

pub fn run(mut args: ConvertArgs) -> Result<Kind, CliError> {
    if let Some(f) = args.format.take() {
        args.input.input_format = Some(f);
    }
    let parsed = read_input(&args.input)?;
    if !parsed.erasures.is_empty() {
        return Err(CliError::new(Kind::Incomplete, format!("the input has {} erased entries (?); `hadamard verify` says whether they can be completed", parsed.erasures.len())));
    }
    let format =
        parse_write_format(&args.to, args.out_bits_minus == "1").map_err(CliError::usage)?;
    let m = if args.normalize {
        parsed.matrix.normalized()
    } else {
        parsed.matrix
    };
    let report = verify::verify(&m);
    let mut out = open_output(args.output.as_deref())
        .map_err(|e| CliError::io(format!("cannot open the output: {e}")))?;
    hadamard_core::formats::write_to(&m, &format, &mut out)
        .and_then(|_| out.flush())
        .map_err(|e| CliError::io(format!("cannot write: {e}")))?;
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
    Ok(Kind::Done)
}
