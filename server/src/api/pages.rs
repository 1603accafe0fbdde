//! The web app's pages and assets: one HTML shell for every app path, and the embedded
//! wasm-bindgen glue and module.
//!
//! The shell has no inline script: it loads `/pkg/boot.js`, which imports the glue and starts
//! the module, so the content security policy can say `script-src 'self'` (plus
//! `'wasm-unsafe-eval'`, which compiling our own WebAssembly needs) with no hash or nonce.

use super::helpers::{blocking, ApiError, ApiResult};
use crate::app::AppState;
use crate::web_assets::{WEB_JS, WEB_WASM};
use axum::extract::{Path, State};
use axum::http::{header, Method, StatusCode, Uri};
use axum::response::{Html, IntoResponse, Response};
use std::sync::Arc;

/// The page every app path serves; the app renders client-side.
pub const INDEX_HTML: &str = r#"<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Hadamard Registry</title>
<link rel="icon" href="data:,">
<script type="module" src="/pkg/boot.js"></script>
</head>
<body>
<noscript>The Hadamard Registry's page needs JavaScript and WebAssembly. The JSON API under /api/ works without them.</noscript>
</body>
</html>
"#;

/// Starts the app.
pub const BOOT_JS: &str =
    "import init from '/pkg/web.js';\ninit({ module_or_path: '/pkg/web_bg.wasm' });\n";

/// `GET /` and the app's other paths.
pub async fn index() -> Response {
    page(StatusCode::OK)
}

fn page(status: StatusCode) -> Response {
    (
        status,
        [(header::CACHE_CONTROL, "no-cache")],
        Html(INDEX_HTML),
    )
        .into_response()
}

/// `GET /m/{id}`: a matrix's permanent page. The shell, with 404 when the id is not stored
/// (the app then says so), so that links can be checked without running the app.
pub async fn matrix_page(State(state): State<Arc<AppState>>, Path(id): Path<String>) -> ApiResult {
    if !hadamard_core::id::is_id(&id) {
        return Ok(page(StatusCode::NOT_FOUND));
    }
    let found = blocking(&state, move |c| c.exists(&id)).await??;
    Ok(page(if found {
        StatusCode::OK
    } else {
        StatusCode::NOT_FOUND
    }))
}

/// `GET /pkg/boot.js`.
pub async fn boot_js() -> Response {
    (
        [
            (
                header::CONTENT_TYPE,
                "application/javascript; charset=utf-8",
            ),
            (header::CACHE_CONTROL, "no-cache"),
        ],
        BOOT_JS,
    )
        .into_response()
}

/// `GET /pkg/web.js`.
pub async fn web_js() -> Response {
    (
        [
            (
                header::CONTENT_TYPE,
                "application/javascript; charset=utf-8",
            ),
            (header::CACHE_CONTROL, "no-cache"),
        ],
        WEB_JS,
    )
        .into_response()
}

/// `GET /pkg/web_bg.wasm`.
pub async fn web_wasm() -> Response {
    (
        [
            (header::CONTENT_TYPE, "application/wasm"),
            (header::CACHE_CONTROL, "no-cache"),
        ],
        WEB_WASM,
    )
        .into_response()
}

/// Any other path: a JSON 404 under `/api/` and `/pkg/`, the app's shell elsewhere (the app
/// has its own routes, such as `/order/92`).
pub async fn fallback(method: Method, uri: Uri) -> Response {
    let path = uri.path();
    if method != Method::GET && method != Method::HEAD {
        return ApiError::new(
            StatusCode::METHOD_NOT_ALLOWED,
            format!(
                "{method} is not accepted on {}",
                super::helpers::truncate(path, 100)
            ),
        )
        .into_response();
    }
    if path == "/api" || path.starts_with("/api/") || path.starts_with("/pkg/") {
        return ApiError::not_found(format!(
            "no such endpoint: {}; see /api for the list",
            super::helpers::truncate(path, 100)
        ))
        .into_response();
    }
    page(StatusCode::OK)
}
