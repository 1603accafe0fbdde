//! `hadamard build N`: build a matrix of order N by a published route, verify it, write it.
//!
//! Exit 0: written (the matrix passed the exact check). Exit 3: no implemented route for N;
//! the message says why and what is known. Exit 2: usage or I/O errors.

use super::error::{json_location, CliError, Kind};
use super::output::{open_output, parse_write_format};
use super::progress::Spinner;
use super::routes::status_words;
use hadamard_core::route::{self, BuildError, Recipe, Route};
use hadamard_core::verify::Verified;
use std::io::Write;

#[derive(clap::Args)]
pub struct BuildArgs {
    /// The order (omit it with --recipe).
    #[arg(required_unless_present = "recipe")]
    order: Option<u64>,
    /// Output format: pm, csv, bits, json, npy, npy-f64, npy-f64-scaled, png.
    #[arg(long, value_name = "F", default_value = "pm")]
    format: String,
    /// Where to write; standard output by default.
    #[arg(short, long, value_name = "PATH")]
    output: Option<String>,
    /// Which route: its number in `hadamard routes N` (1 = best), or a method name such as
    /// `paley_one`, `paley_two`, `sylvester`, `kronecker`.
    #[arg(long, value_name = "ROUTE")]
    route: Option<String>,
    /// Replay a recipe (a JSON construction certificate) instead of planning.
    #[arg(long, value_name = "FILE", conflicts_with = "route")]
    recipe: Option<String>,
    /// Also write the recipe of what was built, with the matrix id pinned, to this file.
    #[arg(long, value_name = "FILE")]
    emit_recipe: Option<String>,
    /// For `bits` output: which digit stands for −1.
    #[arg(long, value_name = "DIGIT", default_value = "1", value_parser = ["0", "1"])]
    bits_minus: String,
}

pub fn run(args: BuildArgs) -> Result<Kind, CliError> {
    let format =
        parse_write_format(&args.format, args.bits_minus == "1").map_err(CliError::usage)?;
    let (recipe, built) = match &args.recipe {
        Some(path) => {
            let (recipe, built) = replay(path)?;
            (recipe, built.map_err(|e| build_failed(e, true))?)
        }
        None => {
            let n = args.order.unwrap_or(0);
            let route = choose_route(n, args.route.as_deref())?;
            let spinner =
                Spinner::start(&format!("building order {n} by {}", method_label(&route)));
            let built = route::build(&route);
            spinner.finish();
            (
                route::recipe_for(&route),
                built.map_err(|e| build_failed(e, false))?,
            )
        }
    };
    let v = built;
    if let Some(path) = &args.emit_recipe {
        let mut pinned = recipe;
        pinned.id = Some(v.id().to_string());
        let text = serde_json::to_string_pretty(&pinned).unwrap_or_default();
        std::fs::write(path, text + "\n")
            .map_err(|e| CliError::io(format!("cannot write {path}: {e}")))?;
    }
    write(&v, &format, args.output.as_deref())
}

fn method_label(r: &Route) -> String {
    serde_json::to_value(r.method)
        .ok()
        .and_then(|v| v.as_str().map(str::to_string))
        .unwrap_or_default()
}

fn choose_route(n: u64, choice: Option<&str>) -> Result<Route, CliError> {
    let info = route::order_info(n);
    let buildable: Vec<&Route> = info.routes.iter().filter(|r| r.buildable).collect();
    if buildable.is_empty() {
        let mut msg = format!(
            "no implemented route for order {n}: {}",
            status_words(info.status)
        );
        if !info.note.is_empty() {
            msg += &format!("\n  {}", info.note);
        }
        if let Some(l) = &info.literature {
            msg += &format!("\n  literature: {l}");
        }
        for r in info.routes.iter().take(3) {
            msg += &format!(
                "\n  known route: {} — {}",
                method_label(r),
                r.tree.reference
            );
        }
        return Err(CliError::new(Kind::NoRoute, msg)
            .with("order", n)
            .with("status", info.status));
    }
    match choice {
        None => Ok(buildable[0].clone()),
        Some(c) => {
            if let Ok(k) = c.parse::<usize>() {
                return info.routes.get(k.wrapping_sub(1)).filter(|r| r.buildable).cloned().ok_or_else(|| {
                    CliError::usage(format!("route {c} of order {n} is not a buildable route; see `hadamard routes {n}`"))
                });
            }
            buildable
                .iter()
                .find(|r| method_label(r) == c)
                .map(|r| (*r).clone())
                .ok_or_else(|| {
                    CliError::usage(format!(
                        "no buildable `{c}` route for order {n}; see `hadamard routes {n}`"
                    ))
                })
        }
    }
}

fn replay(path: &str) -> Result<(Recipe, Result<Verified, BuildError>), CliError> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| CliError::unreadable(format!("cannot read {path}: {e}")))?;
    let recipe: Recipe = serde_json::from_str(&text).map_err(|e| {
        // serde_json says `… at line L column C`; the place goes first, as for matrices.
        let what = e.to_string();
        let what = what.split(" at line ").next().unwrap_or(&what);
        CliError::at(
            Kind::BadRecipe,
            json_location(&e),
            &format!("not a recipe: {what}"),
        )
        .in_file(path)
    })?;
    let spinner = Spinner::start(&format!("replaying the recipe for order {}", recipe.order));
    let built = route::build_recipe(&recipe);
    spinner.finish();
    Ok((recipe, built))
}

/// A build that failed: no route (exit 3), or a recipe that does not replay; a planned route
/// whose construction fails is a bug.
fn build_failed(e: BuildError, from_recipe: bool) -> CliError {
    let kind = match e {
        BuildError::NoRoute { .. }
        | BuildError::NotBuildable { .. }
        | BuildError::TooLarge { .. } => Kind::NoRoute,
        BuildError::BadRecipe(_) | BuildError::IdMismatch { .. } => Kind::BadRecipe,
        BuildError::Construct { .. } if from_recipe => Kind::BadRecipe,
        BuildError::Construct { .. } => Kind::Internal,
    };
    CliError::new(kind, e.to_string())
}

fn write(
    v: &Verified,
    format: &hadamard_core::formats::WriteFormat,
    path: Option<&str>,
) -> Result<Kind, CliError> {
    let mut out =
        open_output(path).map_err(|e| CliError::io(format!("cannot open the output: {e}")))?;
    if let Err(e) =
        hadamard_core::formats::write_to(v.matrix(), format, &mut out).and_then(|_| out.flush())
    {
        if e.kind() != std::io::ErrorKind::BrokenPipe {
            return Err(CliError::io(format!("cannot write: {e}")));
        }
    }
    if path.is_some() {
        eprintln!(
            "wrote a Hadamard matrix of order {} (verified), id {}",
            v.order(),
            v.id()
        );
    }
    Ok(Kind::Done)
}
