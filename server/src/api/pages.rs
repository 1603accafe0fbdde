//! The web app's pages and assets: one HTML shell for every app path, and the embedded
//! wasm-bindgen glue and module.
//!
//! The shell has no inline script: it loads `/pkg/boot.js`, which imports the glue and starts
//! the module, so the content security policy can say `script-src 'self'` (plus
//! `'wasm-unsafe-eval'`, which compiling our own WebAssembly needs) with no hash or nonce.

use super::helpers::{blocking, parse_positive, ApiError, ApiResult};
use crate::app::AppState;
use crate::web_assets::Asset;
use axum::extract::{Path, State};
use axum::http::{header, HeaderMap, HeaderValue, Method, StatusCode, Uri};
use axum::response::{Html, IntoResponse, Response};
use hadamard_core::wire::IdPrefixAnswer;
use std::sync::Arc;

/// The page every app path serves; the app renders client-side. `{MAX_ORDER}` is replaced by
/// the server's `--max-order`, which the app reads to say honestly what this server builds.
/// Until the WebAssembly arrives, the body shows the site's name and a line saying it is
/// loading (the app removes it when it starts).
pub const INDEX_HTML: &str = r#"<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="hadamard-max-order" content="{MAX_ORDER}">
<title>Hadamard Registry</title>
<link rel="icon" href="data:,">
<script type="module" src="/pkg/boot.js"></script>
<style>#boot-loading{font:16px/1.5 system-ui,sans-serif;max-width:62rem;margin:0 auto;padding:1em;color:#1d3557}#boot-loading h1{font-size:1.6rem}</style>
</head>
<body>
<div id="boot-loading"><h1>Hadamard Registry</h1><p id="boot-status">Loading the page (about 400 KB)…</p></div>
<noscript>The Hadamard Registry's page needs JavaScript and WebAssembly. The JSON API under /api/ works without them.</noscript>
</body>
</html>
"#;

/// Starts the app, and says so on the placeholder if it cannot.
pub const BOOT_JS: &str = "import init from '/pkg/web.js';\n\
init({ module_or_path: '/pkg/web_bg.wasm' }).catch((e) => {\n\
  const s = document.getElementById('boot-status');\n\
  if (s) s.textContent = `The page could not start in this browser (${e}). The JSON API under /api/ still works.`;\n\
});\n";

/// `GET /` and the app's other paths.
pub async fn index(State(state): State<Arc<AppState>>) -> Response {
    page(StatusCode::OK, state.config.max_order)
}

fn page(status: StatusCode, max_order: usize) -> Response {
    (
        status,
        [(header::CACHE_CONTROL, "no-cache")],
        Html(INDEX_HTML.replace("{MAX_ORDER}", &max_order.to_string())),
    )
        .into_response()
}

/// `GET /api/orders/{n}/matrix/download?format=F`: the catalogue's matrix of order n as a
/// file, by a redirect (303) to its permanent download, so that a page can offer "the matrix of
/// order n" before it knows the id. Built and stored on first use, like `/api/orders/{n}/matrix`.
pub async fn order_download(
    State(state): State<Arc<AppState>>,
    Path(n): Path<String>,
    uri: Uri,
) -> ApiResult {
    let n = parse_positive("the order", &n, super::orders::ORDER_QUERY_MAX)?;
    let id = super::orders::catalogue_entry(&state, n).await?.id;
    let query = uri.query().map(|q| format!("?{q}")).unwrap_or_default();
    let to = format!("/api/matrices/{id}/download{query}");
    let to = HeaderValue::from_str(&to)
        .map_err(|_| ApiError::bad_request("the query string cannot be passed on"))?;
    Ok((StatusCode::SEE_OTHER, [(header::LOCATION, to)]).into_response())
}

/// `GET /api/id-prefix/{p}`: the stored ids that start with p (8 to 63 hex digits), at most 10,
/// for the look-up box, which accepts the short ids that order pages show.
pub async fn id_prefix(State(state): State<Arc<AppState>>, Path(p): Path<String>) -> ApiResult {
    let p = p.to_ascii_lowercase();
    if !(8..64).contains(&p.len()) || !p.bytes().all(|b| b.is_ascii_hexdigit()) {
        return Err(
            ApiError::bad_request("an id prefix is 8 to 63 hexadecimal digits").parameter("prefix"),
        );
    }
    let key = p.clone();
    let ids: Vec<String> = blocking(&state, move |c| {
        c.store.read(|conn| {
            let mut st = conn.prepare_cached(
                "SELECT id FROM matrices WHERE id >= ?1 AND id < ?2 ORDER BY id LIMIT 11",
            )?;
            let upper = format!("{key}g");
            let rows = st.query_map([&key, &upper], |r| r.get::<_, String>(0))?;
            Ok(rows.collect::<Result<Vec<String>, _>>()?)
        })
    })
    .await??;
    let more = ids.len() > 10;
    let ids: Vec<String> = ids.into_iter().take(10).collect();
    Ok(axum::Json(IdPrefixAnswer {
        prefix: p,
        ids,
        more,
    })
    .into_response())
}

/// `GET /m/{id}`: a matrix's permanent page. The shell, with 404 when the id is not stored
/// (the app then says so), so that links can be checked without running the app.
pub async fn matrix_page(State(state): State<Arc<AppState>>, Path(id): Path<String>) -> ApiResult {
    let max = state.config.max_order;
    if !hadamard_core::id::is_id(&id) {
        return Ok(page(StatusCode::NOT_FOUND, max));
    }
    let found = blocking(&state, move |c| c.exists(&id)).await??;
    Ok(page(
        if found {
            StatusCode::OK
        } else {
            StatusCode::NOT_FOUND
        },
        max,
    ))
}

/// `GET /pkg/boot.js`.
pub async fn boot_js(headers: HeaderMap) -> Response {
    crate::web_assets::serve(Asset::Boot, &headers).await
}

/// `GET /pkg/web.js`.
pub async fn web_js(headers: HeaderMap) -> Response {
    crate::web_assets::serve(Asset::WebJs, &headers).await
}

/// `GET /pkg/web_bg.wasm`.
pub async fn web_wasm(headers: HeaderMap) -> Response {
    crate::web_assets::serve(Asset::WebWasm, &headers).await
}

/// Any other path: a JSON 404 under `/api/` and `/pkg/`, the app's shell elsewhere (the app
/// has its own routes, such as `/order/92`).
pub async fn fallback(State(state): State<Arc<AppState>>, method: Method, uri: Uri) -> Response {
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
    page(StatusCode::OK, state.config.max_order)
}
