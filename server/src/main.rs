//! `hadamard`: the command line of the Hadamard Registry, and its server.
//!
//! Every command is a thin shell over `hadamard-core`: it reads its input, calls core, and
//! prints for people (or, with `--json`, for programs). Each returns how it ended, and
//! `cli::error` turns that into the exit status through its one table (`docs/cli.md`); usage
//! errors exit 2, as clap's do.

mod api;
mod app;
mod catalogue;
mod cli;
mod net;
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
    /// Check a matrix exactly: is H·Hᵀ = nI? Exit 0 yes, 1 a ±1 matrix that is not, 2 unreadable
    /// or malformed.
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
    // SAFETY: setting a signal's action to the default at start-up, before any thread exists.
    unsafe {
        libc::signal(libc::SIGPIPE, libc::SIG_DFL);
    }
}

impl Command {
    /// Whether the answer asked for is JSON: then a failure is also one JSON object on stdout.
    fn json(&self) -> bool {
        match self {
            Command::Verify(a) => a.json(),
            Command::Routes(a) => a.json(),
            Command::Coverage(a) => a.json(),
            Command::Advise(a) => a.json(),
            Command::Audit(a) => a.json(),
            Command::Derive(a) => a.json(),
            Command::Equiv(a) => a.json(),
            Command::Search(a) => a.json(),
            Command::Convert(_) | Command::Build(_) | Command::Serve(_) => false,
        }
    }
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            // Before the arguments parse, `--json` among them is the only sign of a program.
            let json = std::env::args_os()
                .take_while(|a| a != "--")
                .any(|a| a == "--json");
            return cli::error::clap_failed(e, json);
        }
    };
    // The server keeps Rust's default (SIGPIPE ignored): a client hanging up must not end it.
    #[cfg(unix)]
    if !matches!(cli.command, Command::Serve(_)) {
        default_sigpipe();
    }
    let json = cli.command.json();
    let result = match cli.command {
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
    };
    cli::error::finish(result, json)
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::CommandFactory;

    #[test]
    fn the_command_line_has_no_clashing_options() {
        // clap's own consistency check (duplicate names, bad defaults, conflicting ids); it is
        // compiled only with debug assertions, so the walk below checks the names in release too.
        Cli::command().debug_assert();
        fn walk(cmd: &clap::Command, path: &str) {
            let path = format!("{path} {}", cmd.get_name());
            let mut seen = std::collections::HashSet::new();
            for a in cmd.get_arguments() {
                assert!(
                    seen.insert(format!("id {}", a.get_id())),
                    "{path}: id {} twice",
                    a.get_id()
                );
                if let Some(l) = a.get_long() {
                    assert!(
                        seen.insert(format!("--{l}")),
                        "{path}: --{l} declared twice"
                    );
                }
                if let Some(c) = a.get_short() {
                    assert!(seen.insert(format!("-{c}")), "{path}: -{c} declared twice");
                }
            }
            for sub in cmd.get_subcommands() {
                walk(sub, &path);
            }
        }
        walk(&Cli::command(), "");
    }

    #[test]
    fn derive_takes_an_output_format_and_an_input_format() {
        // Every derive subcommand that reads a matrix: `--format` is the output, `--input-format`
        // the input, each declared once (the input format used to be shadowed by the output's).
        let cmd = Cli::command();
        let derive = cmd.find_subcommand("derive").expect("derive exists");
        let mut reading = 0;
        for sub in derive.get_subcommands() {
            let longs: Vec<&str> = sub.get_arguments().filter_map(|a| a.get_long()).collect();
            let count = |name: &str| longs.iter().filter(|l| **l == name).count();
            assert!(count("format") <= 1, "{}: --format twice", sub.get_name());
            if count("input-format") == 1 {
                reading += 1;
            }
        }
        assert!(
            reading >= 5,
            "derive subcommands reading a matrix: {reading}"
        );
        let m = Cli::command()
            .try_get_matches_from([
                "hadamard",
                "derive",
                "screening",
                "--factors",
                "7",
                "--format",
                "csv",
                "--input-format",
                "int",
                "h12.csv",
            ])
            .expect("both formats parse");
        let s = m
            .subcommand_matches("derive")
            .and_then(|d| d.subcommand_matches("screening"))
            .expect("derive screening");
        assert_eq!(
            s.get_one::<String>("format").map(String::as_str),
            Some("csv")
        );
        assert_eq!(
            s.get_one::<String>("input_format").map(String::as_str),
            Some("int")
        );
    }

    #[test]
    fn derive_ordering_takes_row_order_and_its_old_spelling() {
        // `order` means the matrix order only; the row order is `--row-order`, and the old
        // `--order` still works (hidden from --help).
        for flag in ["--row-order", "--order"] {
            let m = Cli::command()
                .try_get_matches_from(["hadamard", "derive", "ordering", flag, "sequency", "h.txt"])
                .expect("parses");
            let o = m
                .subcommand_matches("derive")
                .and_then(|d| d.subcommand_matches("ordering"))
                .expect("derive ordering");
            assert_eq!(
                o.get_one::<String>("row_order").map(String::as_str),
                Some("sequency"),
                "{flag}"
            );
        }
        let mut cmd = Cli::command();
        let help = cmd
            .find_subcommand_mut("derive")
            .and_then(|d| d.find_subcommand_mut("ordering"))
            .expect("derive ordering")
            .render_long_help()
            .to_string();
        assert!(
            help.contains("--row-order") && !help.contains("--order <"),
            "{help}"
        );
    }

    #[test]
    fn verify_keeps_format_as_the_input_format() {
        // The interface fixes `hadamard verify [--format F] PATH`.
        for flag in ["--format", "--input-format"] {
            let cli = Cli::try_parse_from(["hadamard", "verify", flag, "npy", "h.npy"])
                .expect("verify parses");
            assert!(matches!(cli.command, Command::Verify(_)));
        }
        assert!(
            Cli::try_parse_from([
                "hadamard",
                "verify",
                "--format",
                "npy",
                "--input-format",
                "pm",
                "h.npy"
            ])
            .is_err(),
            "two input formats at once are refused"
        );
    }
}
