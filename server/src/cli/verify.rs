//! `hadamard verify`: read one matrix, check H·Hᵀ = nI exactly, report.
//!
//! Exit 0: a Hadamard matrix. Exit 1: a well-formed ±1 matrix that is not (including a
//! rectangular one, and one with erased entries, which is not a matrix of ±1 values yet).
//! Exit 2: unreadable, malformed, or a usage error; the message names the place.

use super::error::{CliError, Kind};
use super::input::{parse_input, read_bytes, InputArgs, DEFAULT_MAX_BYTES};
use super::progress::Spinner;
use hadamard_core::diagnose::{diagnose, Diagnosis, Verdict};
use hadamard_core::formats::Format;
use hadamard_core::id::{canonical_text_id, matrix_id};
use hadamard_core::json;
use hadamard_core::repair::{Axis, Completion, CompletionLimits, Proof};
use hadamard_core::verify::{self, Report};
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Instant;

#[derive(clap::Args)]
pub struct VerifyArgs {
    /// Print one JSON object on stdout instead of text for people.
    #[arg(long)]
    json: bool,
    /// How many failing row pairs to list (the total is always counted).
    #[arg(long, default_value_t = verify::DEFAULT_PAIR_CAP)]
    max_pairs: usize,
    /// The kernel of the check (for measuring them; the verdict never depends on it): best,
    /// scalar-tiled, popcnt-tiled, avx512-vpopcntdq-tiled, avx2-sliced, avx512-sliced.
    #[arg(long, value_name = "NAME", default_value = "best")]
    kernel: String,
    #[command(flatten)]
    input: InputArgs,
    /// The same as --input-format: force the input format (pm, int (csv), bits, json, npy).
    #[arg(long, value_name = "F", conflicts_with = "input_format")]
    format: Option<String>,
}

impl VerifyArgs {
    pub fn json(&self) -> bool {
        self.json
    }
}

pub fn run(mut args: VerifyArgs) -> Result<Kind, CliError> {
    if let Some(f) = args.format.take() {
        args.input.input_format = Some(f);
    }
    let kernel = match verify::Kernel::from_name(&args.kernel) {
        Some(k) if k.is_available() => k,
        Some(k) => {
            return Err(CliError::usage(format!(
                "the {k} kernel is not available on this CPU"
            )))
        }
        None => {
            let names: Vec<&str> = verify::Kernel::ALL.iter().map(|k| k.name()).collect();
            return Err(CliError::usage(format!(
                "unknown kernel `{}`: use best or one of {}",
                args.kernel,
                names.join(", ")
            )));
        }
    };
    let bytes = read_bytes(&args.input.path, DEFAULT_MAX_BYTES)?;
    // While this thread parses and checks (on every core), another hashes the id straight
    // from the file when the file is the canonical text, as a `pm` file written by this
    // project is; otherwise the id is hashed from the parsed matrix afterwards.
    let stop = AtomicBool::new(false);
    let (parsed, report, elapsed) = std::thread::scope(|s| {
        let hasher = s.spawn(|| canonical_text_id(&bytes, &stop));
        let parsed = match parse_input(&bytes, &args.input) {
            Ok(p) => p,
            Err(e) => {
                stop.store(true, Ordering::Relaxed);
                return Err(e);
            }
        };
        let start = Instant::now();
        let m = &parsed.matrix;
        if parsed.format != Format::Pm {
            // Not the canonical text: the id is hashed from the matrix, beside the check.
            stop.store(true, Ordering::Relaxed);
            let report = verify::verify_with(m, args.max_pairs, kernel);
            return Ok((parsed, report, start.elapsed()));
        }
        let checked = verify::check_with(m, args.max_pairs, kernel);
        let id = match hasher.join() {
            Ok(Some((id, rows, cols))) if (rows, cols) == (m.rows(), m.cols()) => id,
            _ => matrix_id(m),
        };
        let report = checked.report(id);
        Ok::<_, CliError>((parsed, report, start.elapsed()))
    })?;
    drop(bytes);
    // Erased entries are stored as +1; the matrix as read is not Hadamard until they are known.
    let spin = (!parsed.erasures.is_empty()).then(|| {
        Spinner::start(&format!(
            "completing {} erased entries",
            parsed.erasures.len()
        ))
    });
    let follow = diagnose(
        &parsed.matrix,
        &parsed.erasures,
        &report,
        CompletionLimits::default(),
    );
    if let Some(s) = spin {
        s.finish();
    }

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
            &follow,
            parsed.format.name(),
            elapsed.as_secs_f64(),
        );
    }
    Ok(match follow.verdict {
        Verdict::Hadamard => Kind::Done,
        Verdict::Incomplete => Kind::Incomplete,
        Verdict::NotHadamard => Kind::NotHadamard,
    })
}

fn print_human(r: &Report, d: &Diagnosis, format: &str, secs: f64) {
    let shape = if r.order == r.cols {
        format!("order {}", r.order)
    } else {
        format!("{}×{}", r.order, r.cols)
    };
    let (fix, completion) = (d.repair.as_ref(), d.completion.as_ref());
    match d.verdict {
        Verdict::Incomplete => println!(
            "incomplete: {} entries erased (?), {shape}.",
            d.erasures.len()
        ),
        Verdict::Hadamard => println!(
            "Hadamard: {shape}, every pair of rows is orthogonal (H·Hᵀ = {}·I).",
            r.order
        ),
        Verdict::NotHadamard => println!("not Hadamard: {shape}."),
    }
    if d.verdict == Verdict::NotHadamard {
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
            let d = f.entries.len();
            if d == 1 {
                let (i, j) = f.entries[0];
                println!(
                    "  one wrong sign explains it: row {}, column {}. Flipped, it is Hadamard with id {}.",
                    i + 1,
                    j + 1,
                    f.corrected_id
                );
            } else {
                println!(
                    "  {d} wrong signs explain it (found along the {}). Corrected, it is Hadamard with id {}:",
                    if f.axis == Axis::Rows { "rows" } else { "columns" },
                    f.corrected_id
                );
                for &(i, j) in f.entries.iter().take(20) {
                    println!("    row {}, column {}", i + 1, j + 1);
                }
                if d > 20 {
                    println!("    … and {} more (--json lists them all)", d - 20);
                }
            }
            if f.unique_within_distance {
                println!("  no other Hadamard matrix is within {d} changes (distinct ones differ in at least n entries)");
            } else {
                println!("  whether another Hadamard matrix is within {d} changes is not decided");
            }
        }
    }
    if let Some(c) = completion {
        let fixed = format!(
            "{} of the {} were fixed by the linear equations of orthogonality",
            c.determined, c.erased
        );
        match &c.outcome {
            Completion::Unique { id, proof, .. } => {
                println!("  one completion, id {id}: {fixed}");
                if *proof == Proof::Search {
                    println!("  and an exhaustive search found exactly one way to fill the rest");
                }
            }
            Completion::None => {
                println!("  no way of filling the erased entries (?) gives a Hadamard matrix")
            }
            Completion::Several {
                count,
                complete,
                examples,
            } => {
                println!(
                    "  the erased entries (?) admit {}{count} completions; two of them:",
                    if *complete { "" } else { "at least " }
                );
                for v in examples {
                    println!("    {}", v.id());
                }
            }
            Completion::Undecided {
                remaining,
                candidate,
                ..
            } => {
                println!(
                    "  undecided within the search limit: {fixed}; {} are still unknown",
                    remaining.len()
                );
                if let Some(v) = candidate {
                    println!(
                        "  one completion found (not proven the only one): {}",
                        v.id()
                    );
                }
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
