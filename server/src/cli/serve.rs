//! `hadamard serve`: the web catalogue and its JSON API (see `docs/api.md`,
//! `docs/deployment.md`).
//!
//! Logs go to stderr through `tracing` (`RUST_LOG` filters them, `--log-json` makes them one
//! JSON object a line); stdout gets one line, the address it listens on.

use crate::app::{self, Config};
use std::net::SocketAddr;
use std::path::PathBuf;
use std::process::ExitCode;
use std::time::Duration;

/// The default database file.
pub const DEFAULT_DB: &str = "./data/registry.sqlite3";

#[derive(clap::Args)]
pub struct ServeArgs {
    /// The address to listen on (port 0 picks a free one; the line on stdout says which).
    #[arg(long, value_name = "HOST:PORT", default_value = "127.0.0.1:8080")]
    addr: SocketAddr,
    /// The SQLite file; created (with its directory) and seeded on first start.
    #[arg(long, value_name = "PATH", default_value = DEFAULT_DB)]
    db: PathBuf,
    /// The largest request body accepted, in bytes (larger ones get 413).
    #[arg(long, value_name = "BYTES", default_value_t = 64 << 20)]
    max_body: usize,
    /// The largest order uploaded or built.
    #[arg(long, value_name = "N", default_value_t = 8192)]
    max_order: usize,
    /// How long one request may take, in seconds, body included (then 503).
    #[arg(long, value_name = "SECONDS", default_value_t = 120)]
    request_timeout: u64,
    /// How many CPU-heavy jobs (parse and check, build, picture) run at once; default the
    /// number of cores.
    #[arg(long, value_name = "N")]
    heavy_jobs: Option<usize>,
    /// Reader connections to the database.
    #[arg(long, value_name = "N", default_value_t = 4)]
    readers: usize,
    /// The memory kept for verified matrices served recently, in MiB.
    #[arg(long, value_name = "MIB", default_value_t = 256)]
    cache_mib: usize,
    /// Log one JSON object a line instead of text.
    #[arg(long)]
    log_json: bool,
}

pub fn run(args: ServeArgs) -> ExitCode {
    init_logging(args.log_json);
    let cores = std::thread::available_parallelism()
        .map(|n| n.get())
        .unwrap_or(2);
    let config = Config {
        addr: args.addr,
        db: args.db,
        max_body_bytes: args.max_body,
        max_order: args.max_order,
        request_timeout: Duration::from_secs(args.request_timeout.max(1)),
        heavy_jobs: args.heavy_jobs.unwrap_or(cores).max(1),
        readers: args.readers.max(1),
        cache_bytes: args.cache_mib << 20,
    };
    let rt = match tokio::runtime::Builder::new_multi_thread()
        .enable_all()
        .build()
    {
        Ok(rt) => rt,
        Err(e) => {
            eprintln!("hadamard: cannot start the runtime: {e}");
            return ExitCode::from(2);
        }
    };
    match rt.block_on(app::run(config)) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("hadamard: {e}");
            ExitCode::from(2)
        }
    }
}

fn init_logging(json: bool) {
    use tracing_subscriber::EnvFilter;
    let filter = EnvFilter::try_from_default_env().unwrap_or_else(|_| EnvFilter::new("info"));
    // Colours only for a person at a terminal; a log file or a collector gets plain text.
    let colour = std::io::IsTerminal::is_terminal(&std::io::stderr());
    let builder = tracing_subscriber::fmt()
        .with_env_filter(filter)
        .with_writer(std::io::stderr)
        .with_ansi(colour);
    if json {
        builder.json().init();
    } else {
        builder.init();
    }
}
