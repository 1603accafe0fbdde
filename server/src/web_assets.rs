//! The browser app, compiled to wasm32 by `build.rs` and embedded in the binary, and the
//! handler that serves it under `/pkg/`.
//!
//! Every asset carries a strong `ETag` (a SHA-256 prefix of its bytes) with
//! `Cache-Control: no-cache`, so a reload asks, and gets `304 Not Modified` with no body unless
//! the binary changed; the Web Workers' second fetch of the same file is a 304 too. Browsers that
//! accept gzip get the asset compressed once per process (the wasm shrinks to about a third).

use crate::api::helpers::{if_none_match, ApiError};
use axum::extract::Path;
use axum::http::{header, HeaderMap, HeaderValue, StatusCode};
use axum::response::{IntoResponse, Response};
use std::io::Write;
use std::sync::OnceLock;

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

/// The files under `/pkg/`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Asset {
    Boot,
    WebJs,
    WebWasm,
    CheckWorkerJs,
    CheckJs,
    CheckWasm,
}

const ALL: [Asset; 6] = [
    Asset::Boot,
    Asset::WebJs,
    Asset::WebWasm,
    Asset::CheckWorkerJs,
    Asset::CheckJs,
    Asset::CheckWasm,
];

const JS: &str = "application/javascript; charset=utf-8";

impl Asset {
    fn bytes(self) -> &'static [u8] {
        match self {
            Asset::Boot => crate::api::pages::BOOT_JS.as_bytes(),
            Asset::WebJs => WEB_JS,
            Asset::WebWasm => WEB_WASM,
            Asset::CheckWorkerJs => CHECK_WORKER_JS,
            Asset::CheckJs => CHECK_JS,
            Asset::CheckWasm => CHECK_WASM,
        }
    }

    fn mime(self) -> &'static str {
        match self {
            Asset::WebWasm | Asset::CheckWasm => "application/wasm",
            _ => JS,
        }
    }

    fn index(self) -> usize {
        ALL.iter().position(|&a| a == self).unwrap_or(0)
    }
}

/// An asset's tag and its gzip form, computed once per process.
struct Prepared {
    etag: String,
    gzip: Vec<u8>,
}

static PREPARED: [OnceLock<Prepared>; 6] = [
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
];

fn prepare(a: Asset) -> &'static Prepared {
    PREPARED[a.index()].get_or_init(|| {
        let bytes = a.bytes();
        let hash = hadamard_core::id::sha256_hex(bytes);
        let mut enc = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::best());
        // An empty result (a failed compression) means "serve it uncompressed".
        let gzip = enc
            .write_all(bytes)
            .and_then(|()| enc.finish())
            .unwrap_or_default();
        Prepared {
            etag: format!("\"{}\"", &hash[..20]),
            gzip,
        }
    })
}

fn accepts_gzip(headers: &HeaderMap) -> bool {
    headers
        .get_all(header::ACCEPT_ENCODING)
        .iter()
        .filter_map(|v| v.to_str().ok())
        .flat_map(|v| v.split(','))
        .any(|e| {
            let mut parts = e.split(';');
            let name = parts.next().unwrap_or("").trim();
            let refused = parts.any(|p| {
                p.trim()
                    .strip_prefix("q=")
                    .and_then(|q| q.trim().parse::<f32>().ok())
                    == Some(0.0)
            });
            name.eq_ignore_ascii_case("gzip") && !refused
        })
}

/// Serves an asset: 304 when the browser holds this version, gzip when it accepts it.
pub async fn serve(a: Asset, headers: &HeaderMap) -> Response {
    // The first request of a process compresses the file (tens of milliseconds for the app),
    // off the async threads; later ones find it ready.
    let p = match PREPARED[a.index()].get() {
        Some(p) => p,
        None => match tokio::task::spawn_blocking(move || prepare(a)).await {
            Ok(p) => p,
            Err(_) => return ApiError::internal("internal error; it is logged").into_response(),
        },
    };
    let gzip = accepts_gzip(headers) && !p.gzip.is_empty() && p.gzip.len() < a.bytes().len();
    // A different representation has a different tag (RFC 9110 §8.8.3).
    let etag = if gzip {
        format!("{}-gz\"", p.etag.trim_end_matches('"'))
    } else {
        p.etag.clone()
    };
    let tag = HeaderValue::from_str(&etag).unwrap_or_else(|_| HeaderValue::from_static("\"x\""));
    let common = [
        (header::CACHE_CONTROL, HeaderValue::from_static("no-cache")),
        (header::VARY, HeaderValue::from_static("Accept-Encoding")),
        (header::ETAG, tag),
    ];
    if if_none_match(headers, &etag) {
        return (StatusCode::NOT_MODIFIED, common).into_response();
    }
    let mut resp = if gzip {
        (common, p.gzip.clone()).into_response()
    } else {
        (common, a.bytes()).into_response()
    };
    let h = resp.headers_mut();
    h.insert(header::CONTENT_TYPE, HeaderValue::from_static(a.mime()));
    if gzip {
        h.insert(header::CONTENT_ENCODING, HeaderValue::from_static("gzip"));
    }
    resp
}

/// `GET /pkg/{file}` for the workers' files (the app's own have routes of their own).
pub async fn worker_file(Path(file): Path<String>, headers: HeaderMap) -> Response {
    let a = match file.as_str() {
        "check-worker.js" => Asset::CheckWorkerJs,
        "check.js" => Asset::CheckJs,
        "check_bg.wasm" => Asset::CheckWasm,
        _ => return ApiError::not_found("no such endpoint; see /api for the list").into_response(),
    };
    serve(a, &headers).await
}
