//! The server: configuration, shared state, the router with its limits and headers, and the
//! run loop with graceful shutdown.

use crate::api;
use crate::catalogue::{seed, Catalogue};
use crate::store::{Mode, Store, StoreError};
use axum::extract::{Request, State};
use axum::http::{header, HeaderValue, StatusCode};
use axum::middleware::{self, Next};
use axum::response::{IntoResponse, Response};
use axum::routing::get;
use axum::Router;
use std::collections::HashMap;
use std::net::SocketAddr;
use std::path::PathBuf;
use std::sync::{Arc, Mutex};
use std::time::Duration;
use tokio::sync::Semaphore;
use tower_http::set_header::SetResponseHeaderLayer;
use tower_http::trace::TraceLayer;

/// How the server runs.
#[derive(Clone, Debug)]
pub struct Config {
    pub addr: SocketAddr,
    pub db: PathBuf,
    /// The largest request body, in bytes.
    pub max_body_bytes: usize,
    /// The largest order uploaded or built.
    pub max_order: usize,
    /// How long one request may take, body included.
    pub request_timeout: Duration,
    /// How many CPU-heavy jobs (parse and check, build, picture) run at once.
    pub heavy_jobs: usize,
    /// Reader connections to the database.
    pub readers: usize,
    /// The byte budget of the cache of verified matrices.
    pub cache_bytes: usize,
    /// Connection limits (count, header, idle and write timeouts).
    pub limits: crate::net::Limits,
    /// How long an upload's body may take to arrive.
    pub body_timeout: Duration,
    /// The bytes of upload bodies held in memory at once, over all connections.
    pub upload_buffer_bytes: usize,
    /// The largest order an anonymous GET may build and store; above it the catalogue matrix
    /// is built for the one answer and not stored.
    pub store_max_order: usize,
}

/// The longest request target (path and query) answered; longer ones get a JSON 414.
pub const MAX_URI_BYTES: usize = 8 * 1024;
/// The most bytes of request headers answered; more get a JSON 431.
pub const MAX_HEADER_BYTES: usize = 16 * 1024;

/// What every handler can reach.
pub struct AppState {
    pub catalogue: Catalogue,
    pub config: Config,
    pub heavy: Arc<Semaphore>,
    /// Upload bytes held in memory, in KiB permits (see [`Config::upload_buffer_bytes`]).
    pub upload_buffer: Arc<Semaphore>,
    builds: Mutex<HashMap<usize, Arc<tokio::sync::Mutex<()>>>>,
}

impl AppState {
    /// The lock that serialises builds of order n.
    pub fn build_lock(&self, n: usize) -> Arc<tokio::sync::Mutex<()>> {
        self.builds
            .lock()
            .unwrap_or_else(|p| p.into_inner())
            .entry(n)
            .or_default()
            .clone()
    }

    /// Drops the lock of order n once nobody else holds it.
    pub fn forget_build_lock(&self, n: usize) {
        let mut b = self.builds.lock().unwrap_or_else(|p| p.into_inner());
        if b.get(&n).is_some_and(|l| Arc::strong_count(l) <= 2) {
            b.remove(&n);
        }
    }
}

/// Opens (creating and seeding) the store and makes the state. Blocking.
pub fn open_state(config: Config) -> Result<AppState, StoreError> {
    let store = Store::open(&config.db, Mode::ReadWrite, config.readers)?;
    match seed::ensure_seeded(&store)? {
        seed::Seeded::AlreadyCurrent => tracing::info!("seed catalogue already current"),
        seed::Seeded::Written { orders, sequences } => {
            tracing::info!(orders, sequences, "wrote the seed catalogue")
        }
    }
    Ok(AppState {
        catalogue: Catalogue::new(store, config.cache_bytes),
        heavy: Arc::new(Semaphore::new(config.heavy_jobs.max(1))),
        upload_buffer: Arc::new(Semaphore::new((config.upload_buffer_bytes >> 10).max(1))),
        config,
        builds: Mutex::new(HashMap::new()),
    })
}

/// An `/api` path as the router takes it, checked against the one endpoint list
/// ([`hadamard_core::wire::endpoints::ENDPOINTS`]): a route that is not listed (and so not
/// served by `GET /api` nor checked against `docs/api.md`) stops the server at start. The
/// `{kind}` of the derived objects stands for each of `DERIVE_KINDS`.
fn listed(method: &str, path: &'static str) -> &'static str {
    use hadamard_core::wire::endpoints::{DERIVE_KINDS, ENDPOINTS};
    let is = |p: &str| ENDPOINTS.iter().any(|e| e.method == method && e.path == p);
    let ok = if path.contains("{kind}") {
        DERIVE_KINDS.iter().all(|k| is(&path.replace("{kind}", k)))
    } else {
        is(path)
    };
    assert!(
        ok,
        "{method} {path} is routed but not in core::wire::endpoints::ENDPOINTS"
    );
    path
}

/// The router: the API, the app's pages and assets, with timeouts and security headers.
pub fn router(state: Arc<AppState>) -> Router {
    let g = |p| listed("GET", p);
    Router::new()
        .route(g("/api"), get(api::index))
        .route(g("/api/health"), get(api::health))
        .route(g("/api/orders/{n}"), get(api::orders::show))
        .route(
            g("/api/orders/{n}/matrix"),
            get(api::orders::catalogue_matrix),
        )
        .route(g("/api/orders/{n}/matrices"), get(api::orders::list))
        .route(
            g("/api/orders/{n}/matrix/download"),
            get(api::pages::order_download),
        )
        .route(g("/api/id-prefix/{p}"), get(api::pages::id_prefix))
        .route(g("/api/coverage"), get(api::coverage::show))
        .route(g("/api/dimensions/{d}"), get(api::advice::dimension))
        .route(g("/api/smallest-known"), get(api::advice::smallest_known))
        .route(
            listed("POST", "/api/matrices"),
            axum::routing::post(api::matrices::upload),
        )
        .route(g("/api/matrices/{id}"), get(api::matrices::show))
        .route(
            g("/api/matrices/{id}/download"),
            get(api::matrices::download),
        )
        .route(g("/api/matrices/{id}/rows/{i}"), get(api::matrices::row))
        .route(
            g("/api/matrices/{id}/derive/{kind}"),
            get(api::derive::derive),
        )
        .route(g("/api/brr"), get(api::derive::brr))
        .route(g("/api/equivalence"), get(api::derive::equivalent))
        .route("/", get(api::pages::index))
        .route("/m/{id}", get(api::pages::matrix_page))
        .route("/pkg/boot.js", get(api::pages::boot_js))
        .route("/pkg/web.js", get(api::pages::web_js))
        .route("/pkg/web_bg.wasm", get(api::pages::web_wasm))
        .route("/pkg/{file}", get(crate::web_assets::worker_file))
        .fallback(api::pages::fallback)
        .layer(middleware::from_fn_with_state(state.clone(), timeout))
        .layer(middleware::from_fn(api_errors_as_json))
        .layer(middleware::from_fn(head_limits))
        .layer(SetResponseHeaderLayer::overriding(
            header::CONTENT_SECURITY_POLICY,
            HeaderValue::from_static(CSP),
        ))
        .layer(SetResponseHeaderLayer::overriding(
            header::X_CONTENT_TYPE_OPTIONS,
            HeaderValue::from_static("nosniff"),
        ))
        .layer(SetResponseHeaderLayer::overriding(
            header::REFERRER_POLICY,
            HeaderValue::from_static("no-referrer"),
        ))
        .layer(SetResponseHeaderLayer::overriding(
            header::X_FRAME_OPTIONS,
            HeaderValue::from_static("DENY"),
        ))
        .layer(TraceLayer::new_for_http())
        .with_state(state)
}

/// The content security policy: our own scripts and WebAssembly, inline styles (Leptos sets
/// some), pictures from ourselves and from `data:`/`blob:` URLs, no framing.
pub const CSP: &str = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; connect-src 'self'; object-src 'none'; base-uri 'none'; form-action 'self'; frame-ancestors 'none'";

/// Refuses request targets over [`MAX_URI_BYTES`] (414) and headers over [`MAX_HEADER_BYTES`]
/// (431) with a JSON sentence, before any handler runs.
async fn head_limits(req: Request, next: Next) -> Response {
    let uri_len = req.uri().path_and_query().map_or(0, |p| p.as_str().len());
    if uri_len > MAX_URI_BYTES {
        return api::helpers::ApiError::new(
            StatusCode::URI_TOO_LONG,
            format!("the request target is {uri_len} bytes, over this server's limit of {MAX_URI_BYTES}"),
        )
        .limit(MAX_URI_BYTES)
        .into_response();
    }
    let header_bytes: usize = req
        .headers()
        .iter()
        .map(|(k, v)| k.as_str().len() + v.len() + 4)
        .sum();
    if header_bytes > MAX_HEADER_BYTES {
        return api::helpers::ApiError::new(
            StatusCode::REQUEST_HEADER_FIELDS_TOO_LARGE,
            format!("the request headers are {header_bytes} bytes, over this server's limit of {MAX_HEADER_BYTES}"),
        )
        .limit(MAX_HEADER_BYTES)
        .into_response();
    }
    next.run(req).await
}

/// Every error under `/api` is a JSON object with `"error"`: the few answers made outside the
/// handlers (axum's rejections of a path or query it cannot decode, 405s) are rewritten with
/// their text as the sentence.
async fn api_errors_as_json(req: Request, next: Next) -> Response {
    let is_api = req.uri().path() == "/api" || req.uri().path().starts_with("/api/");
    let resp = next.run(req).await;
    let status = resp.status();
    if !is_api || !(status.is_client_error() || status.is_server_error()) {
        return resp;
    }
    let is_json = resp
        .headers()
        .get(header::CONTENT_TYPE)
        .and_then(|v| v.to_str().ok())
        .is_some_and(|v| v.starts_with("application/json"));
    if is_json {
        return resp;
    }
    let (parts, body) = resp.into_parts();
    let text = match axum::body::to_bytes(body, 4096).await {
        Ok(b) if !b.is_empty() => String::from_utf8_lossy(&b).trim().to_owned(),
        _ => status.canonical_reason().unwrap_or("error").to_owned(),
    };
    let mut out = api::helpers::ApiError::new(status, text).into_response();
    for (k, v) in parts.headers.iter() {
        if k != header::CONTENT_TYPE && k != header::CONTENT_LENGTH {
            out.headers_mut().insert(k.clone(), v.clone());
        }
    }
    out
}

async fn timeout(State(state): State<Arc<AppState>>, req: Request, next: Next) -> Response {
    let limit = state.config.request_timeout;
    match tokio::time::timeout(limit, next.run(req)).await {
        Ok(r) => r,
        Err(_) => {
            tracing::warn!(seconds = limit.as_secs_f64(), "request timed out");
            api::helpers::ApiError::new(
                StatusCode::SERVICE_UNAVAILABLE,
                format!(
                    "the request took longer than this server's limit of {} s",
                    limit.as_secs_f64()
                ),
            )
            .into_response()
        }
    }
}

/// Runs the server until SIGINT or SIGTERM, then finishes the requests in flight.
pub async fn run(config: Config) -> Result<(), String> {
    let addr = config.addr;
    let db = config.db.clone();
    let state = tokio::task::spawn_blocking(move || open_state(config))
        .await
        .map_err(|e| format!("startup failed: {e}"))?
        .map_err(|e| format!("cannot open the catalogue at {}: {e}", db.display()))?;
    let state = Arc::new(state);
    let listener = tokio::net::TcpListener::bind(addr)
        .await
        .map_err(|e| format!("cannot listen on {addr}: {e}"))?;
    let local = listener.local_addr().map_err(|e| e.to_string())?;
    // The one line on stdout: scripts (and the tests) read the address from it.
    println!(
        "hadamard serve: listening on http://{local}/ (database {})",
        state.catalogue.store.path().display()
    );
    use std::io::Write;
    let _ = std::io::stdout().flush();
    tracing::info!(%local, "listening");
    let limits = state.config.limits.clone();
    let drain = state.config.request_timeout;
    crate::net::serve(
        listener,
        router(state.clone()),
        limits,
        shutdown_signal(),
        drain,
    )
    .await;
    let checkpointed =
        tokio::task::spawn_blocking(move || state.catalogue.store.write(crate::store::checkpoint))
            .await;
    if let Ok(Err(e)) = checkpointed {
        tracing::warn!(error = %e, "final checkpoint failed; the WAL file stays beside the database");
    }
    tracing::info!("stopped");
    Ok(())
}

async fn shutdown_signal() {
    let ctrl_c = async {
        let _ = tokio::signal::ctrl_c().await;
    };
    #[cfg(unix)]
    let term = async {
        match tokio::signal::unix::signal(tokio::signal::unix::SignalKind::terminate()) {
            Ok(mut s) => {
                s.recv().await;
            }
            Err(_) => std::future::pending::<()>().await,
        }
    };
    #[cfg(not(unix))]
    let term = std::future::pending::<()>();
    tokio::select! {
        _ = ctrl_c => {},
        _ = term => {},
    }
    tracing::info!("shutting down: finishing requests in flight");
}
