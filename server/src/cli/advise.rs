//! `hadamard advise`: answers for people who need a size rather than an order.
//!
//! `--dimension D` lists every exact factorisation D = 2^a·m₀ through an order m₀ that is
//! constructible or known, smallest dense factor first (H_{2^a} ⊗ H_{m₀} then has size D and
//! only an m₀×m₀ dense part). `--at-least K` gives the smallest order ≥ K that is known, and the
//! smallest this program can build.

use super::error::{CliError, Kind};
use hadamard_core::route;

#[derive(clap::Args)]
pub struct AdviseArgs {
    /// Print JSON.
    #[arg(long)]
    json: bool,
    /// The dimension to factor.
    #[arg(
        long,
        value_name = "D",
        required_unless_present = "at_least",
        conflicts_with = "at_least"
    )]
    dimension: Option<u64>,
    /// The smallest known order at least this.
    #[arg(long, value_name = "K")]
    at_least: Option<u64>,
}

impl AdviseArgs {
    pub fn json(&self) -> bool {
        self.json
    }
}

pub fn run(args: AdviseArgs) -> Result<Kind, CliError> {
    if let Some(d) = args.dimension {
        let a = route::dimension_advice(d);
        if args.json {
            println!("{}", serde_json::to_string_pretty(&a).unwrap_or_default());
        } else {
            println!("dimension {d}: {}", a.note);
            for f in &a.options {
                println!(
                    "  {:<16} order {} is {}",
                    f.factored,
                    f.dense,
                    status_name(&f.status)
                );
            }
            for f in &a.blocked {
                println!(
                    "  {:<16} (only through order {}, which is {})",
                    f.factored,
                    f.dense,
                    status_name(&f.status)
                );
            }
        }
        return Ok(Kind::Done);
    }
    let k = args.at_least.unwrap_or(1);
    let (known, built, v) = hadamard_core::json::smallest_at_least(k);
    if args.json {
        println!("{}", serde_json::to_string_pretty(&v).unwrap_or_default());
    } else {
        match &known {
            Some(i) => println!(
                "smallest known order ≥ {k}: {} ({})",
                i.order,
                status_name(&i.status)
            ),
            None => println!(
                "no known order from {k} up to the search limit {}",
                route::smallest_search_limit(k)
            ),
        }
        match &built {
            Some(b) if known.as_ref().map(|i| i.order) != Some(b.order) => {
                println!("smallest this program builds: {}", b.order)
            }
            Some(_) => {}
            None if k > route::MAX_BUILD_ORDER => println!(
                "this program builds nothing at least {k}: its build limit is {}",
                route::MAX_BUILD_ORDER
            ),
            None => println!(
                "this program builds no order from {k} up to {}",
                route::smallest_search_limit(k).min(route::MAX_BUILD_ORDER)
            ),
        }
    }
    Ok(Kind::Done)
}

fn status_name<T: serde::Serialize>(s: &T) -> String {
    serde_json::to_value(s)
        .ok()
        .and_then(|v| v.as_str().map(str::to_string))
        .unwrap_or_default()
}
