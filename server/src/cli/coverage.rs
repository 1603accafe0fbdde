//! `hadamard coverage --max M`: the status of every order up to M.

use super::error::{CliError, Kind};
use hadamard_core::route::{self, Status};
use serde_json::json;

#[derive(clap::Args)]
pub struct CoverageArgs {
    /// Print the list of `{"order", "status"}` as JSON.
    #[arg(long)]
    json: bool,
    /// The largest order.
    #[arg(long, value_name = "M")]
    max: u64,
    /// List every order, not only the summary and the ones not constructible.
    #[arg(long)]
    list: bool,
}

impl CoverageArgs {
    pub fn json(&self) -> bool {
        self.json
    }
}

pub fn run(args: CoverageArgs) -> Result<Kind, CliError> {
    let cov = route::coverage(args.max);
    if args.json {
        let v: Vec<_> = cov
            .iter()
            .map(|(n, s)| json!({"order": n, "status": s}))
            .collect();
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
        return Ok(Kind::Done);
    }
    let count = |s: Status| cov.iter().filter(|(_, t)| *t == s).count();
    let known = count(Status::Constructible) + count(Status::Known);
    println!(
        "orders 1, 2 and multiples of 4 up to {}: {}",
        args.max,
        cov.len()
    );
    println!(
        "  constructible  {:>5}  (of {} known to exist)",
        count(Status::Constructible),
        known
    );
    println!("  known          {:>5}", count(Status::Known));
    println!("  open           {:>5}", count(Status::Open));
    if count(Status::Uncovered) > 0 {
        println!(
            "  uncovered      {:>5}  (above 2000, no route this program knows)",
            count(Status::Uncovered)
        );
    }
    for (label, s) in [
        ("known, not yet built here", Status::Known),
        ("open", Status::Open),
        ("uncovered", Status::Uncovered),
    ] {
        let orders: Vec<String> = cov
            .iter()
            .filter(|(_, t)| *t == s)
            .map(|(n, _)| n.to_string())
            .collect();
        if !orders.is_empty() {
            println!("{label}: {}", orders.join(" "));
        }
    }
    if args.list {
        for (n, s) in &cov {
            println!(
                "{n:>6} {}",
                serde_json::to_value(s)
                    .ok()
                    .and_then(|v| v.as_str().map(str::to_string))
                    .unwrap_or_default()
            );
        }
    }
    Ok(Kind::Done)
}
