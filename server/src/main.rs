//! `hadamard`: the command line of the Hadamard Registry, and its server.
//!
//! Every command is a thin shell over `hadamard-core`: it reads its input, calls core, and
//! prints for people (or, with `--json`, for programs). Exit statuses follow
//! `docs/cli.md`; usage errors exit 2.

mod cli;
mod web_assets;

use clap::{Parser, Subcommand};
use std::process::ExitCode;

/// The Hadamard Registry: verify, look up, build and serve Hadamard matrices.
#[derive(Parser)]
#[command(name = "hadamard", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Check a matrix exactly: is H·Hᵀ = nI? Exit 0 yes, 1 a ±1 matrix that is not, 2 unreadable.
    Verify(cli::verify::VerifyArgs),
    /// Convert a matrix between formats, optionally normalising it.
    Convert(cli::convert::ConvertArgs),
    /// Search for sequence data (Williamson, Golay, base, Turyn-type, Goethals–Seidel).
    Search(cli::search::SearchArgs),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match cli.command {
        Command::Verify(a) => cli::verify::run(a),
        Command::Convert(a) => cli::convert::run(a),
        Command::Search(a) => cli::search::run(a),
    }
}
