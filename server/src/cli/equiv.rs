//! `hadamard equiv A B`: are two Hadamard matrices equivalent?
//!
//! Exit 0 equivalent (the certificate has been checked) · 1 inequivalent (a differing invariant,
//! or an exhaustive search), or an input that is not a Hadamard matrix (`kind` says which) ·
//! 3 undecided within the node budget · 2 unreadable input or usage.

use super::derive::load_verified;
use super::error::{CliError, Kind};
use super::input::InputArgs;
use hadamard_core::derive::equivalence::{equivalence, Verdict, DEFAULT_NODE_BUDGET};

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

impl EquivArgs {
    pub fn json(&self) -> bool {
        self.json
    }
}

pub fn run(args: EquivArgs) -> Result<Kind, CliError> {
    let a = load_verified(&InputArgs::for_path(&args.a))?;
    let b = load_verified(&InputArgs::for_path(&args.b))?;
    let r = match equivalence(&a, &b, args.budget) {
        Ok(r) => r,
        Err(e) if a.order() != b.order() => {
            // Matrices of different orders are inequivalent: an answer, not an error.
            if args.json {
                let v = serde_json::json!({
                    "verdict": "inequivalent",
                    "note": e.to_string(),
                    "a_order": a.order(),
                    "b_order": b.order(),
                    "a_id": a.id(),
                    "b_id": b.id(),
                });
                println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
            } else {
                println!("inequivalent: {}", e.message);
                println!("  A  {} (order {})", a.id(), a.order());
                println!("  B  {} (order {})", b.id(), b.order());
            }
            return Ok(Kind::Inequivalent);
        }
        // A certificate that fails its check is a bug.
        Err(e) => {
            return Err(CliError::internal(e.to_string())
                .with("a_id", a.id())
                .with("b_id", b.id()))
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
    Ok(match r.verdict {
        Verdict::Equivalent => Kind::Done,
        Verdict::Inequivalent => Kind::Inequivalent,
        Verdict::Undecided => Kind::Undecided,
    })
}
