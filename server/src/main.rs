//! `hadamard`: the command line of the Hadamard Registry, and its server.
//!
//! Every command is a thin shell over `hadamard-core`: it reads its input, calls core, and
//! prints for people (or, with `--json`, for programs). Exit statuses follow
//! `docs/cli.md`; usage errors exit 2.

mod api;
mod app;
mod catalogue;
mod cli;
mod repair_json;
mod store;
mod time;
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
    /// How an order can be built: its status in the literature and every route, with references.
    Routes(cli::routes::RoutesArgs),
    /// Build, verify and write a matrix of order N. Exit 3 when no implemented route reaches N.
    Build(cli::build::BuildArgs),
    /// The status of every order up to M.
    Coverage(cli::coverage::CoverageArgs),
    /// For a dimension d: every d = 2^a·m₀ through a known order m₀; or the smallest known
    /// order ≥ k (for balanced repeated replication with k strata).
    Advise(cli::advise::AdviseArgs),
    /// Run the web catalogue and its JSON API (default http://127.0.0.1:8080/).
    Serve(cli::serve::ServeArgs),
    /// Re-verify every matrix stored in a catalogue database; exit 1 if any fails.
    Audit(cli::audit::AuditArgs),
    /// Objects made from a Hadamard matrix: screening designs, balanced repeated replication,
    /// Hadamard codes, the symmetric design, row orders and scaled output, single rows.
    Derive(cli::derive::DeriveArgs),
    /// Are two matrices equivalent? A checked certificate, a differing invariant, or undecided.
    Equiv(cli::equiv::EquivArgs),
    /// Search for sequence data (Williamson, Golay, base, Turyn-type, Goethals–Seidel).
    Search(cli::search::SearchArgs),
}

/// Restores the default SIGPIPE action, so `hadamard coverage --max 2000 | head` ends quietly
/// like any Unix tool instead of panicking in `println!` (Rust ignores SIGPIPE by default).
#[cfg(unix)]
fn default_sigpipe() {
    extern "C" {
        fn signal(signum: i32, handler: usize) -> usize;
    }
    const SIGPIPE: i32 = 13;
    const SIG_DFL: usize = 0;
    // SAFETY: setting a signal's action to the default at start-up, before any thread exists.
    unsafe {
        signal(SIGPIPE, SIG_DFL);
    }
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    // The server keeps Rust's default (SIGPIPE ignored): a client hanging up must not end it.
    #[cfg(unix)]
    if !matches!(cli.command, Command::Serve(_)) {
        default_sigpipe();
    }
    match cli.command {
        Command::Verify(a) => cli::verify::run(a),
        Command::Convert(a) => cli::convert::run(a),
        Command::Routes(a) => cli::routes::run(a),
        Command::Build(a) => cli::build::run(a),
        Command::Coverage(a) => cli::coverage::run(a),
        Command::Advise(a) => cli::advise::run(a),
        Command::Serve(a) => cli::serve::run(a),
        Command::Audit(a) => cli::audit::run(a),
        Command::Search(a) => cli::search::run(a),
        Command::Derive(a) => cli::derive::run(a),
        Command::Equiv(a) => cli::equiv::run(a),
    }
}
