//! `hadamard derive KIND`: objects made from a Hadamard matrix — screening designs, balanced
//! repeated replication, Hadamard codes, the symmetric design, row orders and scaled output,
//! and single rows. Each is built by `hadamard_core::derive` from a matrix that has passed the
//! exact check; this module reads the input, calls core, and prints.
//!
//! Exit 0 written · 1 the input is not a Hadamard matrix, or the object is not defined for it
//! (sequency order of a matrix without distinct sequencies, say) · 2 unreadable input or usage.

use super::error::{CliError, Kind as Outcome};
use super::input::{read_input, InputArgs};
use super::output::{open_output, parse_write_format};
use hadamard_core::derive::block_design::symmetric_design;
use hadamard_core::derive::brr::replication;
use hadamard_core::derive::codes::{hadamard_code, CodeKind};
use hadamard_core::derive::ordering::{
    reorder, sequency_report, write_scaled, RowOrder, ScaledFormat,
};
use hadamard_core::derive::screening::{screening_design, RunKind, ScreeningConfig};
use hadamard_core::derive::DeriveError;
use hadamard_core::route;
use hadamard_core::verify::{certify, Verified};
use serde::Serialize;
use std::io::Write;

#[derive(clap::Args)]
pub struct DeriveArgs {
    #[command(subcommand)]
    kind: Kind,
}

#[derive(clap::Subcommand)]
enum Kind {
    /// A two-level screening design (Plackett–Burman): n runs for up to n−1 factors.
    Screening(ScreeningArgs),
    /// Balanced repeated replication: replicate signs for K strata from the smallest
    /// constructible order > K (or from the matrix given).
    Brr(BrrArgs),
    /// A Hadamard code: full (length n, 2n words), punctured (n−1, 2n) or shortened (n−1, n).
    Code(CodeArgs),
    /// The symmetric 2-(n−1, n/2−1, n/4−1) design.
    SymmetricDesign(DesignArgs),
    /// The matrix with its rows in natural, sequency (Walsh) or dyadic (Paley) order,
    /// optionally scaled by 1/√n.
    Ordering(OrderingArgs),
    /// One row of the matrix.
    Row(RowArgs),
}

/// Where and how to print a derived object.
#[derive(clap::Args)]
struct OutArgs {
    /// text (for people), csv or json.
    #[arg(long, value_name = "F", default_value = "text", value_parser = ["text", "csv", "json"])]
    format: String,
    /// The same as --format json.
    #[arg(long)]
    json: bool,
    /// Where to write; standard output by default.
    #[arg(short, long, value_name = "PATH")]
    output: Option<String>,
}

impl OutArgs {
    fn format(&self) -> &str {
        if self.json {
            "json"
        } else {
            &self.format
        }
    }
}

#[derive(clap::Args)]
struct ScreeningArgs {
    /// The number of factors (default n − 1).
    #[arg(long, value_name = "K")]
    factors: Option<usize>,
    /// The columns of the normalised matrix to use, e.g. 1,2,5 (each 1..n−1; column 0 is constant).
    #[arg(
        long,
        value_name = "LIST",
        value_delimiter = ',',
        conflicts_with = "factors"
    )]
    columns: Option<Vec<usize>>,
    /// Factor names, comma-separated (default A, B, C, …).
    #[arg(long, value_name = "LIST", value_delimiter = ',')]
    names: Option<Vec<String>>,
    /// Named levels LOW:HIGH, one pair for every factor or one per factor, comma-separated.
    #[arg(long, value_name = "LIST", value_delimiter = ',')]
    levels: Option<Vec<String>>,
    /// Append the fold-over (every sign reversed): 2n runs.
    #[arg(long)]
    fold_over: bool,
    /// Centre-point runs to add.
    #[arg(long, value_name = "C", default_value_t = 0)]
    centre_points: usize,
    /// Randomise the run order from this seed (default: a seed taken from the clock, printed).
    #[arg(long, value_name = "S", conflicts_with = "standard_order")]
    seed: Option<u64>,
    /// Keep the standard order (no randomisation).
    #[arg(long)]
    standard_order: bool,
    #[command(flatten)]
    out: OutArgs,
    #[command(flatten)]
    input: InputArgs,
}

#[derive(clap::Args)]
struct BrrArgs {
    /// The number of strata.
    #[arg(long, value_name = "K")]
    strata: usize,
    /// A matrix of order > K to use instead of the smallest this program builds.
    path: Option<String>,
    #[command(flatten)]
    out: OutArgs,
}

#[derive(clap::Args)]
struct CodeArgs {
    /// full, punctured or shortened.
    #[arg(long, value_name = "V", default_value = "full", value_parser = ["full", "punctured", "shortened"])]
    variant: String,
    #[command(flatten)]
    out: OutArgs,
    #[command(flatten)]
    input: InputArgs,
}

#[derive(clap::Args)]
struct DesignArgs {
    #[command(flatten)]
    out: OutArgs,
    #[command(flatten)]
    input: InputArgs,
}

#[derive(clap::Args)]
struct OrderingArgs {
    /// The order of the rows: natural, sequency (Walsh) or dyadic (Paley). Also spelt
    /// `--order`, its name before `order` came to mean the matrix order only.
    #[arg(long = "row-order", alias = "order", value_name = "O", default_value = "natural", value_parser = ["natural", "sequency", "dyadic"])]
    row_order: String,
    /// Divide every entry by √n (float output: csv, json or npy-f64). Scaled is not normalised.
    #[arg(long)]
    scaled: bool,
    /// Output format: pm, csv, json, npy, npy-f64 (with --scaled: csv, json, npy-f64); or
    /// `report` for each row's sequency and whether sequency order is defined.
    #[arg(long, value_name = "F", default_value = "pm")]
    format: String,
    /// Where to write; standard output by default.
    #[arg(short, long, value_name = "PATH")]
    output: Option<String>,
    #[command(flatten)]
    input: InputArgs,
}

#[derive(clap::Args)]
struct RowArgs {
    /// The row, counted from 0.
    #[arg(long, value_name = "I")]
    row: usize,
    /// pm (+/-), csv (±1) or json.
    #[arg(long, value_name = "F", default_value = "pm", value_parser = ["pm", "csv", "json"])]
    format: String,
    #[command(flatten)]
    input: InputArgs,
}

impl DeriveArgs {
    /// Whether the answer asked for is JSON (then a failure is a JSON object on stdout too).
    pub fn json(&self) -> bool {
        match &self.kind {
            Kind::Screening(a) => a.out.format() == "json",
            Kind::Brr(a) => a.out.format() == "json",
            Kind::Code(a) => a.out.format() == "json",
            Kind::SymmetricDesign(a) => a.out.format() == "json",
            Kind::Ordering(a) => a.format == "report" || a.format == "json",
            Kind::Row(a) => a.format == "json",
        }
    }
}

pub fn run(args: DeriveArgs) -> Result<Outcome, CliError> {
    match args.kind {
        Kind::Screening(a) => screening(a),
        Kind::Brr(a) => brr(a),
        Kind::Code(a) => code(a),
        Kind::SymmetricDesign(a) => design(a),
        Kind::Ordering(a) => ordering(a),
        Kind::Row(a) => row(a),
    }
}

/// Reads the input and runs the exact check; a matrix that fails it is an error of kind
/// `not_hadamard` (or `incomplete`, with erased entries).
pub fn load_verified(input: &InputArgs) -> Result<Verified, CliError> {
    // A place in which file: `equiv` reads two.
    let parsed = read_input(input).map_err(|e| match e.kind {
        Outcome::Malformed | Outcome::OverMaxOrder if input.path != "-" => e.in_file(&input.path),
        _ => e,
    })?;
    if !parsed.erasures.is_empty() {
        return Err(CliError::new(Outcome::Incomplete, format!("{}: the matrix has {} erased entries (?); `hadamard verify` says whether they can be completed", input.path, parsed.erasures.len())));
    }
    certify(parsed.matrix).map_err(|r| {
        CliError::new(Outcome::NotHadamard, format!("{}: not a Hadamard matrix ({} of its row pairs are not orthogonal, or it is not square); `hadamard verify` says where", input.path, r.failing_pairs_total))
            .with("failing_pairs_total", r.failing_pairs_total)
    })
}

fn derive_failed(e: DeriveError) -> CliError {
    CliError::new(Outcome::NotDefined, e.to_string()).with("parameter", &e.parameter)
}

/// Writes through the writer `-o` names.
fn emit(
    path: Option<&str>,
    f: impl FnOnce(&mut dyn Write) -> std::io::Result<()>,
) -> Result<Outcome, CliError> {
    let mut out =
        open_output(path).map_err(|e| CliError::io(format!("cannot open the output: {e}")))?;
    f(&mut out)
        .and_then(|_| out.flush())
        .map_err(|e| CliError::io(format!("cannot write: {e}")))?;
    Ok(Outcome::Done)
}

fn json_to(out: &mut dyn Write, v: &impl Serialize) -> std::io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, v).map_err(std::io::Error::other)?;
    out.write_all(b"\n")
}

fn clock_seed() -> u64 {
    let t = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map(|d| d.as_nanos() as u64)
        .unwrap_or(0);
    t ^ (std::process::id() as u64).rotate_left(32)
}

fn screening(a: ScreeningArgs) -> Result<Outcome, CliError> {
    let h = load_verified(&a.input)?;
    let levels = match &a.levels {
        None => None,
        Some(v) => Some(
            v.iter()
                .enumerate()
                .map(|(k, p)| {
                    p.split_once(':')
                        .map(|(l, h)| (l.to_owned(), h.to_owned()))
                        .ok_or_else(|| {
                            CliError::usage(format!(
                                "--levels item {}: `{p}` is not LOW:HIGH",
                                k + 1
                            ))
                        })
                })
                .collect::<Result<Vec<_>, _>>()?,
        ),
    };
    let seed = if a.standard_order {
        None
    } else {
        Some(a.seed.unwrap_or_else(clock_seed))
    };
    let cfg = ScreeningConfig {
        factors: a.factors,
        columns: a.columns,
        names: a.names,
        levels,
        fold_over: a.fold_over,
        centre_points: a.centre_points,
        seed,
    };
    let d = screening_design(&h, &cfg).map_err(derive_failed)?;
    emit(a.out.output.as_deref(), |out| match a.out.format() {
        "json" => json_to(out, &d),
        "csv" => d.write_csv(out),
        _ => {
            writeln!(
                out,
                "Screening design from a Hadamard matrix of order {} (id {})",
                d.order, d.source_id
            )?;
            writeln!(
                out,
                "  {} runs, {} factors{}{}",
                d.runs.len(),
                d.factors.len(),
                if d.fold_over { ", folded over" } else { "" },
                if d.centre_points > 0 {
                    format!(", {} centre points", d.centre_points)
                } else {
                    String::new()
                }
            )?;
            writeln!(
                out,
                "  columns     {} ({})",
                d.factors
                    .iter()
                    .map(|f| f.column.to_string())
                    .collect::<Vec<_>>()
                    .join(","),
                d.columns_reason
            )?;
            writeln!(
                out,
                "  run order   {}",
                match d.randomisation.seed {
                    Some(s) => format!("randomised, seed {s} (replay with --seed {s})"),
                    None => "standard order".into(),
                }
            )?;
            writeln!(
                out,
                "  properties  every pair of columns orthogonal: {}; every column balanced: {}",
                yes(d.properties.columns_orthogonal),
                yes(d.properties.columns_balanced)
            )?;
            writeln!(out, "  source      {}", d.reference)?;
            let w = d
                .factors
                .iter()
                .map(|f| {
                    f.name
                        .len()
                        .max(f.low.len())
                        .max(f.high.len())
                        .max(f.centre.len())
                })
                .max()
                .unwrap_or(2)
                .max(2);
            write!(out, "\n  run  std  kind      ")?;
            for f in &d.factors {
                write!(out, " {:>w$}", f.name)?;
            }
            writeln!(out)?;
            for r in &d.runs {
                let kind = match r.kind {
                    RunKind::Design => "design",
                    RunKind::FoldOver => "fold-over",
                    RunKind::Centre => "centre",
                };
                write!(out, "  {:>3}  {:>3}  {kind:<9} ", r.run, r.standard_order)?;
                for (f, &c) in r.coded.iter().enumerate() {
                    write!(out, " {:>w$}", d.level(f, c))?;
                }
                writeln!(out)?;
            }
            Ok(())
        }
    })
}

fn yes(b: bool) -> &'static str {
    if b {
        "yes"
    } else {
        "NO"
    }
}

fn brr(a: BrrArgs) -> Result<Outcome, CliError> {
    let mut chosen = None;
    let h = match &a.path {
        Some(p) => load_verified(&InputArgs::for_path(p))?,
        None => {
            let k = a.strata as u64;
            let known = route::smallest_known_at_least(k + 1).map(|i| i.order);
            let Some(built) = route::smallest_constructible_at_least(k + 1) else {
                return Err(CliError::new(
                    Outcome::NoRoute,
                    format!("no order greater than {k} is within this program's reach"),
                ));
            };
            let h = route::build_order(built.order).map_err(|e| {
                CliError::new(
                    Outcome::NoRoute,
                    format!("order {} could not be built: {e}", built.order),
                )
            })?;
            chosen = Some((known, built.order));
            h
        }
    };
    let r = replication(&h, a.strata).map_err(derive_failed)?;
    emit(a.out.output.as_deref(), |out| match a.out.format() {
        "json" => {
            let mut v = serde_json::to_value(&r).map_err(std::io::Error::other)?;
            if let (Some((known, built)), Some(o)) = (chosen, v.as_object_mut()) {
                o.insert("smallest_known_order".into(), serde_json::json!(known));
                o.insert(
                    "smallest_constructible_order".into(),
                    serde_json::json!(built),
                );
            }
            json_to(out, &v)
        }
        "csv" => r.write_csv(out),
        _ => {
            writeln!(out, "Balanced repeated replication for {} strata: {} replicates from a Hadamard matrix of order {} (id {})", r.strata, r.replicates, r.replicates, r.source_id)?;
            if let Some((known, built)) = chosen {
                writeln!(out, "  order       {built}: the smallest this program builds that is greater than {}{}", r.strata, match known {
                    Some(k) if k != built => format!(" (the smallest known is {k})"),
                    _ => " (also the smallest known)".into(),
                })?;
            }
            writeln!(
                out,
                "  properties  balanced: {}; orthogonal: {}",
                yes(r.balanced),
                yes(r.orthogonal)
            )?;
            writeln!(out, "  {}", r.note)?;
            writeln!(out, "  source      {}\n", r.reference)?;
            for (i, row) in r.signs.iter().enumerate() {
                writeln!(
                    out,
                    "  replicate {i:>4}  {}",
                    row.iter()
                        .map(|&s| if s > 0 { '+' } else { '-' })
                        .collect::<String>()
                )?;
            }
            Ok(())
        }
    })
}

fn code(a: CodeArgs) -> Result<Outcome, CliError> {
    let h = load_verified(&a.input)?;
    let variant: CodeKind = a.variant.parse().map_err(derive_failed)?;
    let c = hadamard_code(&h, variant).map_err(derive_failed)?;
    emit(a.out.output.as_deref(), |out| match a.out.format() {
        "json" => json_to(out, &c),
        "csv" => c.write_csv(out),
        _ => {
            writeln!(
                out,
                "The {} Hadamard code of a matrix of order {} (id {})",
                a.variant, c.order, c.source_id
            )?;
            writeln!(
                out,
                "  length {}, {} words, minimum distance {} ({})",
                c.length,
                c.size,
                c.min_distance,
                if c.distance_computed {
                    "computed over every pair of words"
                } else {
                    "from the theorem; not computed at this order"
                }
            )?;
            writeln!(out, "  mapping     {}", c.mapping)?;
            writeln!(out, "  source      {}\n", c.reference)?;
            c.write_text(out)
        }
    })
}

fn design(a: DesignArgs) -> Result<Outcome, CliError> {
    let h = load_verified(&a.input)?;
    let d = symmetric_design(&h).map_err(derive_failed)?;
    emit(a.out.output.as_deref(), |out| match a.out.format() {
        "json" => json_to(out, &d),
        "csv" => d.write_csv(out),
        _ => {
            writeln!(
                out,
                "The symmetric 2-({}, {}, {}) design of a matrix of order {} (id {})",
                d.v, d.k, d.lambda, d.order, d.source_id
            )?;
            writeln!(out, "  {} points and {} blocks of {} points; every pair of points in exactly {} blocks: {}", d.v, d.b, d.k, d.lambda, yes(d.verified_pairs))?;
            writeln!(out, "  points and blocks counted from 0 (point p is column p+1 of the normalised matrix)")?;
            writeln!(out, "  source      {}\n", d.reference)?;
            for (i, b) in d.blocks.iter().enumerate() {
                writeln!(
                    out,
                    "  block {i:>4}  {}",
                    b.iter()
                        .map(|p| p.to_string())
                        .collect::<Vec<_>>()
                        .join(" ")
                )?;
            }
            Ok(())
        }
    })
}

fn ordering(a: OrderingArgs) -> Result<Outcome, CliError> {
    let h = load_verified(&a.input)?;
    if a.format == "report" {
        let rep = sequency_report(h.matrix());

        return emit(a.output.as_deref(), |out| json_to(out, &rep));
    }
    let order: RowOrder = a.row_order.parse().map_err(derive_failed)?;
    // Core names the parameter `order`; on the command line it is `--row-order`.
    let derive_failed = |mut e: DeriveError| {
        if e.parameter == "order" {
            e.parameter = "row-order".into();
        }
        derive_failed(e)
    };
    let scaled = if a.scaled {
        Some(match a.format.as_str() {
            "csv" => ScaledFormat::Csv,
            "json" => ScaledFormat::Json,
            "npy-f64" | "npy-f64-scaled" => ScaledFormat::Npy,
            f => {
                return Err(CliError::usage(format!(
                    "--scaled writes floats: use --format csv, json or npy-f64, not `{f}`"
                )))
            }
        })
    } else {
        None
    };
    let plain = match scaled {
        Some(_) => None,
        None => Some(parse_write_format(&a.format, true).map_err(CliError::usage)?),
    };
    let r = reorder(&h, order).map_err(derive_failed)?;
    let code = emit(a.output.as_deref(), |out| match (scaled, &plain) {
        (Some(f), _) => write_scaled(r.matrix.matrix(), f, out),
        (None, Some(f)) => hadamard_core::formats::write_to(r.matrix.matrix(), f, out),
        (None, None) => Ok(()),
    })?;
    eprintln!(
        "wrote the rows in {}{}, id {}",
        r.note,
        if a.scaled {
            ", SCALED by 1/√n (not normalised)"
        } else {
            ""
        },
        r.matrix.id()
    );
    Ok(code)
}

fn row(a: RowArgs) -> Result<Outcome, CliError> {
    let h = load_verified(&a.input)?;
    let n = h.order();
    if a.row >= n {
        return Err(CliError::usage(format!(
            "--row {}: the matrix has order {n}, so its rows are 0 to {}",
            a.row,
            n.saturating_sub(1)
        )));
    }
    let m = h.matrix();
    match a.format.as_str() {
        "pm" => println!(
            "{}",
            (0..n)
                .map(|j| if m.is_negative(a.row, j) { '-' } else { '+' })
                .collect::<String>()
        ),
        "csv" => println!(
            "{}",
            (0..n)
                .map(|j| m.get(a.row, j).to_string())
                .collect::<Vec<_>>()
                .join(",")
        ),
        _ => println!(
            "{}",
            serde_json::json!({"id": h.id(), "order": n, "row": a.row, "index_base": 0, "values": (0..n).map(|j| m.get(a.row, j)).collect::<Vec<_>>()})
        ),
    }
    Ok(Outcome::Done)
}
