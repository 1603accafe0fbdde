//! `hadamard verify`: read one matrix, check H·Hᵀ = nI exactly, report.
//!
//! Exit 0: a Hadamard matrix. Exit 1: a well-formed ±1 matrix that is not (including a
//! rectangular one, and one with erased entries, which is not a matrix of ±1 values yet).
//! Exit 2: unreadable, malformed, or a usage error; the message names the place.

use super::input::{read_input, InputArgs};
use hadamard_core::json;
use hadamard_core::repair::{Completion, Repair};
use hadamard_core::verify::{self, Report};
use std::process::ExitCode;
use std::time::Instant;

#[derive(clap::Args)]
pub struct VerifyArgs {
    /// Print one JSON object on stdout instead of text for people.
    #[arg(long)]
    json: bool,
    /// How many failing row pairs to list (the total is always counted).
    #[arg(long, default_value_t = verify::DEFAULT_PAIR_CAP)]
    max_pairs: usize,
    #[command(flatten)]
    input: InputArgs,
    /// The same as --input-format: force the input format (pm, int (csv), bits, json, npy).
    #[arg(long, value_name = "F", conflicts_with = "input_format")]
    format: Option<String>,
}

pub fn run(mut args: VerifyArgs) -> ExitCode {
    if let Some(f) = args.format.take() {
        args.input.input_format = Some(f);
    }
    let parsed = match read_input(&args.input) {
        Ok(p) => p,
        Err(e) => return e.report(args.json),
    };
    let start = Instant::now();
    let report = verify::verify_with_cap(&parsed.matrix, args.max_pairs);
    let elapsed = start.elapsed();
    // Erased entries are stored as +1; the matrix as read is not Hadamard until they are known.
    let follow = json::follow_up(&parsed.matrix, &parsed.erasures, &report);
    let hadamard = follow.hadamard;

    if args.json {
        let v = json::verification(
            &report,
            &follow,
            parsed.format.name(),
            elapsed.as_secs_f64() * 1e3,
        );
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        print_human(
            &report,
            hadamard,
            parsed.format.name(),
            elapsed.as_secs_f64(),
            follow.repair.as_ref(),
            follow.completion.as_ref(),
        );
    }
    if hadamard {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    }
}

fn print_human(
    r: &Report,
    hadamard: bool,
    format: &str,
    secs: f64,
    fix: Option<&Repair>,
    completion: Option<&Completion>,
) {
    let shape = if r.order == r.cols {
        format!("order {}", r.order)
    } else {
        format!("{}×{}", r.order, r.cols)
    };
    if hadamard {
        println!(
            "Hadamard: {shape}, every pair of rows is orthogonal (H·Hᵀ = {}·I).",
            r.order
        );
    } else {
        println!("not Hadamard: {shape}.");
        for f in &r.failures {
            match f {
                verify::Failure::NotSquare => println!("  it is not square: {} rows, {} columns", r.order, r.cols),
                verify::Failure::ImpossibleOrder => println!(
                    "  {} is not 1, 2 or a multiple of 4, so no Hadamard matrix of this order exists",
                    r.order
                ),
                verify::Failure::RowsNotOrthogonal => {
                    let pairs = r.order as u64 * (r.order as u64).saturating_sub(1) / 2;
                    println!("  {} of {} row pairs are not orthogonal (rows counted from 1):", r.failing_pairs_total, pairs);
                    for p in r.failing_pairs.iter().take(10) {
                        println!("    rows {} and {}: inner product {}", p.i + 1, p.j + 1, p.dot);
                    }
                    if r.failing_pairs_total > 10 {
                        println!("    … and {} more (--json lists up to --max-pairs)", r.failing_pairs_total - 10);
                    }
                }
            }
        }
        if let Some(f) = fix {
            println!(
                "  one wrong sign explains it: row {}, column {}. Flipped, it is Hadamard with id {}.",
                f.row + 1,
                f.col + 1,
                f.corrected_id
            );
        }
    }
    if let Some(c) = completion {
        match c {
            Completion::Unique { id, .. } => println!(
                "  the erased entries (?) are fixed by orthogonality: one completion, id {id}"
            ),
            Completion::None => {
                println!("  no way of filling the erased entries (?) gives a Hadamard matrix")
            }
            Completion::Several {
                count,
                complete: true,
            } => println!("  the erased entries (?) admit {count} completions"),
            Completion::Several {
                count,
                complete: false,
            } => println!("  the erased entries (?) admit at least {count} completions"),
            Completion::GaveUp { .. } => {
                println!("  the erased entries (?) could not be settled within the search limit")
            }
        }
    }
    let p = &r.properties;
    let mut props: Vec<&str> = Vec::new();
    for (on, name) in [
        (p.normalized, "normalized"),
        (p.symmetric, "symmetric"),
        (p.skew, "skew"),
        (p.regular, "regular"),
    ] {
        if on {
            props.push(name);
        }
    }
    println!("  id          {}", r.sha256);
    println!(
        "  properties  {} (excess {})",
        if props.is_empty() {
            "none of normalized, symmetric, skew, regular".into()
        } else {
            props.join(", ")
        },
        p.excess
    );
    println!("  read as     {format}");
    println!(
        "  check       {} on {}, {:.3} ms",
        r.check,
        r.kernel,
        secs * 1e3
    );
}
