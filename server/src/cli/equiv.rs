//! `hadamard equiv A B`: are two Hadamard matrices equivalent?
//!
//! Exit 0 equivalent (the certificate has been checked) · 1 inequivalent (a differing invariant,
//! or an exhaustive search) · 3 undecided within the node budget · 2 unreadable input or usage,
//! or an input that is not a Hadamard matrix.

use super::derive::load_verified;
use super::input::InputArgs;
use hadamard_core::derive::equivalence::{equivalence, Verdict, DEFAULT_NODE_BUDGET};
use std::process::ExitCode;

#[derive(clap::Args)]
pub struct EquivArgs {
    /// The first matrix (a file, or `-` for standard input).
    a: String,
    /// The second matrix.
    b: String,
    /// Print one JSON object instead of text for people.
    #[arg(long)]
    json: bool,
    /// The most search nodes to visit before answering "undecided".
    #[arg(long, value_name = "NODES", default_value_t = DEFAULT_NODE_BUDGET)]
    budget: u64,
}

pub fn run(args: EquivArgs) -> ExitCode {
    let input = |p: &str| InputArgs {
        path: p.to_owned(),
        input_format: None,
        bits_minus: "1".into(),
        max_order: 1 << 15,
    };
    let load = |p: &str| load_verified(&input(p), args.json).map_err(|_| ExitCode::from(2));
    let (a, b) = match (load(&args.a), load(&args.b)) {
        (Ok(a), Ok(b)) => (a, b),
        (Err(e), _) | (_, Err(e)) => return e,
    };
    let r = match equivalence(&a, &b, args.budget) {
        Ok(r) => r,
        Err(e) => {
            // Matrices of different orders are inequivalent; a certificate that fails its
            // check is a bug. Either way a program asking for JSON gets an object.
            let different = a.order() != b.order();
            if args.json {
                let v = serde_json::json!({
                    "verdict": if different { "inequivalent" } else { "error" },
                    "note": e.to_string(),
                    "a_order": a.order(),
                    "b_order": b.order(),
                    "a_id": a.id(),
                    "b_id": b.id(),
                });
                println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
            } else {
                eprintln!("hadamard: {e}");
            }
            return ExitCode::from(if different { 1 } else { 2 });
        }
    };
    if args.json {
        println!("{}", serde_json::to_string_pretty(&r).unwrap_or_default());
    } else {
        println!(
            "{} (order {}, {} of {} search nodes)",
            r.note, r.order, r.nodes, r.node_budget
        );
        println!("  A  {}", r.a_id);
        println!("  B  {}", r.b_id);
        if let Some(c) = &r.certificate {
            let list = |v: &[usize]| {
                v.iter()
                    .map(|x| (x + 1).to_string())
                    .collect::<Vec<_>>()
                    .join(" ")
            };
            let signs = |v: &[i8]| {
                v.iter()
                    .map(|&s| if s > 0 { '+' } else { '-' })
                    .collect::<String>()
            };
            println!("  B[σ(i)][τ(j)] = ε_i·δ_j·A[i][j], rows and columns counted from 1:");
            println!("  σ  {}", list(&c.row_map));
            println!("  ε  {}", signs(&c.row_signs));
            println!("  τ  {}", list(&c.col_map));
            println!("  δ  {}", signs(&c.col_signs));
        }
        if let Some(i) = &r.invariant {
            println!("  {} of A  {}", i.name, i.a);
            println!("  {} of B  {}", i.name, i.b);
        }
    }
    match r.verdict {
        Verdict::Equivalent => ExitCode::SUCCESS,
        Verdict::Inequivalent => ExitCode::from(1),
        Verdict::Undecided => ExitCode::from(3),
    }
}
