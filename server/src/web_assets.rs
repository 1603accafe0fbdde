//! The browser app, compiled to wasm32 by `build.rs` and embedded in the binary, and the
//! handler that serves it under `/pkg/`.

use crate::api::helpers::ApiError;
use axum::extract::Path;
use axum::http::header;
use axum::response::{IntoResponse, Response};

/// The wasm-bindgen JavaScript glue.
pub const WEB_JS: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/web.js"));
/// The app itself.
pub const WEB_WASM: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/web_bg.wasm"));
/// The script of the verify page's Web Workers.
pub const CHECK_WORKER_JS: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/check-worker.js"));
/// The glue of the workers' check module.
pub const CHECK_JS: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/check.js"));
/// The workers' check module: core's exact check alone.
pub const CHECK_WASM: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/check_bg.wasm"));

/// `GET /pkg/{file}` for the workers' files (the app's own have routes of their own).
pub async fn worker_file(Path(file): Path<String>) -> Response {
    let (body, mime) = match file.as_str() {
        "check-worker.js" => (CHECK_WORKER_JS, "application/javascript; charset=utf-8"),
        "check.js" => (CHECK_JS, "application/javascript; charset=utf-8"),
        "check_bg.wasm" => (CHECK_WASM, "application/wasm"),
        _ => return ApiError::not_found("no such endpoint; see /api for the list").into_response(),
    };
    (
        [
            (header::CONTENT_TYPE, mime),
            (header::CACHE_CONTROL, "no-cache"),
        ],
        body,
    )
        .into_response()
}
