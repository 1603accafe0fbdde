//! `hadamard routes N`: the status of an order and every route this program knows to it.

use super::error::{CliError, Kind};
use hadamard_core::route::{self, OrderInfo, Status, Step};

#[derive(clap::Args)]
pub struct RoutesArgs {
    /// Print the `{"order", "status", "routes"}` object as JSON.
    #[arg(long)]
    json: bool,
    /// Show every route (default: the best five).
    #[arg(long)]
    all: bool,
    /// The order.
    order: u64,
}

impl RoutesArgs {
    pub fn json(&self) -> bool {
        self.json
    }
}

pub fn run(args: RoutesArgs) -> Result<Kind, CliError> {
    let info = route::order_info(args.order);
    if args.json {
        println!(
            "{}",
            serde_json::to_string_pretty(&info).unwrap_or_default()
        );
    } else {
        print_info(&info, if args.all { usize::MAX } else { 5 });
    }
    Ok(Kind::Done)
}

/// Says the status in plain words.
pub fn status_words(s: Status) -> &'static str {
    match s {
        Status::Constructible => "constructible: this program builds one now (`hadamard build`)",
        Status::Known => "known: the literature has one, this program cannot build it yet",
        Status::Open => "open: no Hadamard matrix of this order is known to anyone",
        Status::Impossible => "impossible: a Hadamard matrix has order 1, 2 or a multiple of 4",
        Status::Uncovered => "not covered by any route this program knows",
    }
}

fn print_info(info: &OrderInfo, limit: usize) {
    println!("order {}: {}", info.order, status_words(info.status));
    if !info.note.is_empty() {
        println!("  {}", info.note);
    }
    if let Some(l) = &info.literature {
        println!("  literature: {l}");
    }
    if info.routes.is_empty() {
        return;
    }
    println!("  routes, best first (buildable, then smallest dense factor, then cheapest):");
    for (k, r) in info.routes.iter().take(limit).enumerate() {
        let mark = if r.buildable {
            "buildable"
        } else {
            "not buildable here"
        };
        let skew = if r.skew { ", skew" } else { "" };
        println!(
            "  {:>2}. {} [{mark}{skew}], largest dense factor {}",
            k + 1,
            method_name(&r.tree),
            r.largest_dense_factor
        );
        print_step(&r.tree, 6);
    }
    if info.routes.len() > limit {
        println!("  … {} more (--all)", info.routes.len() - limit);
    }
}

fn method_name(s: &Step) -> String {
    serde_json::to_value(s.method())
        .ok()
        .and_then(|v| v.as_str().map(str::to_string))
        .unwrap_or_default()
}

fn print_step(s: &Step, indent: usize) {
    let params: Vec<String> = s
        .params()
        .iter()
        .filter(|(k, _)| {
            !matches!(
                k.as_str(),
                "a" | "b" | "c" | "d" | "t1" | "t2" | "t3" | "t4" | "provenance" | "source"
            )
        })
        .map(|(k, v)| {
            format!(
                "{k}={}",
                v.as_str()
                    .map(str::to_string)
                    .unwrap_or_else(|| v.to_string())
            )
        })
        .collect();
    let params = if params.is_empty() {
        String::new()
    } else {
        format!(" ({})", params.join(", "))
    };
    let mark = if s.buildable { "" } else { " ✗" };
    println!(
        "{:indent$}{} → {}{params}{mark}",
        "",
        method_name(s),
        s.order
    );
    if !s.reference.is_empty() {
        println!("{:indent$}  {}", "", s.reference);
    }
    for c in &s.children {
        print_step(c, indent + 4);
    }
}
