//! `hadamard serve`: the web catalogue and its JSON API (see `docs/api.md`,
//! `docs/deployment.md`).
//!
//! Logs go to stderr through `tracing` (`RUST_LOG` filters them, `--log-json` makes them one
//! JSON object a line); stdout gets one line, the address it listens on.

use super::error::{CliError, Kind};
use crate::app::{self, Config};
use std::net::SocketAddr;
use std::path::PathBuf;
use std::time::Duration;

/// The default `--max-order` of the server (the command line's is
/// [`super::input::DEFAULT_MAX_ORDER`], higher: see the option's help).
pub const DEFAULT_MAX_ORDER: usize = 8192;

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
    /// The largest order uploaded or built. Lower than the 32768 of the other commands
    /// (`verify --max-order`, this program's build limit) on purpose: a server checks and
    /// builds for anonymous requests, and the work of one grows as n³ (order 32768 is 64
    /// times the work of 8192).
    #[arg(long, value_name = "N", default_value_t = DEFAULT_MAX_ORDER)]
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
    /// The most connections open at once; one more gets a 503 at once and is closed.
    #[arg(long, value_name = "N", default_value_t = 512)]
    max_connections: usize,
    /// Seconds a client has to send a request's head (request line and headers).
    #[arg(long, value_name = "SECONDS", default_value_t = 10)]
    header_timeout: u64,
    /// Seconds a connection may stay open with no byte moving either way (keep-alive idle).
    #[arg(long, value_name = "SECONDS", default_value_t = 30)]
    idle_timeout: u64,
    /// Seconds a write to a client may wait without progress (a client that stops reading
    /// its download is dropped).
    #[arg(long, value_name = "SECONDS", default_value_t = 30)]
    write_timeout: u64,
    /// Seconds an upload's body may take to arrive in full (then 408).
    #[arg(long, value_name = "SECONDS", default_value_t = 30)]
    body_timeout: u64,
    /// MiB of upload bodies held in memory at once over all connections (more get 503).
    #[arg(long, value_name = "MIB", default_value_t = 256)]
    upload_buffer_mib: usize,
    /// The largest catalogue order an anonymous GET builds and stores; larger buildable
    /// orders are built for the one answer and not stored (`hadamard build` stores any).
    #[arg(long, value_name = "N", default_value_t = 2048)]
    store_max_order: usize,
    /// Log one JSON object a line instead of text.
    #[arg(long)]
    log_json: bool,
}

pub fn run(args: ServeArgs) -> Result<Kind, CliError> {
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
        limits: crate::net::Limits {
            max_connections: args.max_connections.max(1),
            header_timeout: Duration::from_secs(args.header_timeout.max(1)),
            idle_timeout: Duration::from_secs(args.idle_timeout.max(1)),
            write_timeout: Duration::from_secs(args.write_timeout.max(1)),
        },
        body_timeout: Duration::from_secs(args.body_timeout.max(1)),
        upload_buffer_bytes: args.upload_buffer_mib.max(1) << 20,
        store_max_order: args.store_max_order,
    };
    let rt = tokio::runtime::Builder::new_multi_thread()
        .enable_all()
        .build()
        .map_err(|e| CliError::io(format!("cannot start the runtime: {e}")))?;
    rt.block_on(app::run(config))
        .map_err(|e| CliError::io(e.to_string()))?;
    Ok(Kind::Done)
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
