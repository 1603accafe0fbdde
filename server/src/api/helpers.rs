//! What every handler shares: JSON errors, running blocking work off the executor, parsing
//! path and query values into JSON errors, and conditional requests.

use crate::app::AppState;
use crate::catalogue::{Catalogue, LoadError};
use crate::store::StoreError;
use axum::http::{header, HeaderMap, HeaderValue, StatusCode};
use axum::response::{IntoResponse, Response};
use axum::Json;
use serde_json::{json, Value};
use std::sync::Arc;

/// An error answer: a status and a JSON object with at least `"error"`.
#[derive(Debug)]
pub struct ApiError {
    pub status: StatusCode,
    pub body: Value,
}

impl ApiError {
    pub fn new(status: StatusCode, message: impl Into<String>) -> ApiError {
        ApiError {
            status,
            body: json!({ "error": message.into() }),
        }
    }

    /// Adds a field to the body.
    pub fn with(mut self, key: &str, value: impl Into<Value>) -> ApiError {
        if let Value::Object(o) = &mut self.body {
            o.insert(key.to_owned(), value.into());
        }
        self
    }

    pub fn bad_request(message: impl Into<String>) -> ApiError {
        ApiError::new(StatusCode::BAD_REQUEST, message)
    }

    pub fn not_found(message: impl Into<String>) -> ApiError {
        ApiError::new(StatusCode::NOT_FOUND, message)
    }

    pub fn internal(message: impl Into<String>) -> ApiError {
        ApiError::new(StatusCode::INTERNAL_SERVER_ERROR, message)
    }
}

impl IntoResponse for ApiError {
    fn into_response(self) -> Response {
        (self.status, Json(self.body)).into_response()
    }
}

impl From<StoreError> for ApiError {
    fn from(e: StoreError) -> ApiError {
        tracing::error!(error = %e, "store error");
        ApiError::internal("the catalogue's database failed; the error is logged")
    }
}

impl From<LoadError> for ApiError {
    fn from(e: LoadError) -> ApiError {
        match e {
            LoadError::Store(e) => e.into(),
            LoadError::Integrity(why) => {
                tracing::error!(%why, "stored matrix failed re-verification; not served");
                ApiError::internal("the stored matrix failed re-verification and is not served; run `hadamard audit`")
            }
        }
    }
}

/// The result type of handlers.
pub type ApiResult<T = Response> = Result<T, ApiError>;

/// Runs quick blocking work (a store query) on a blocking thread.
pub async fn blocking<T: Send + 'static>(
    state: &Arc<AppState>,
    f: impl FnOnce(&Catalogue) -> T + Send + 'static,
) -> ApiResult<T> {
    let st = state.clone();
    tokio::task::spawn_blocking(move || f(&st.catalogue))
        .await
        .map_err(|e| {
            tracing::error!(error = %e, "blocking task failed");
            ApiError::internal("internal error; it is logged")
        })
}

/// Runs CPU-heavy work (parsing, the exact check, a construction, a picture) on a blocking
/// thread, at most `--heavy-jobs` at once. The permit moves into the thread, so a request
/// that times out does not free it before the work is done.
pub async fn heavy<T: Send + 'static>(
    state: &Arc<AppState>,
    f: impl FnOnce(&Catalogue) -> T + Send + 'static,
) -> ApiResult<T> {
    let permit = state
        .heavy
        .clone()
        .acquire_owned()
        .await
        .map_err(|_| ApiError::internal("the server is shutting down"))?;
    let st = state.clone();
    tokio::task::spawn_blocking(move || {
        let _permit = permit;
        f(&st.catalogue)
    })
    .await
    .map_err(|e| {
        tracing::error!(error = %e, "heavy task failed");
        ApiError::internal("internal error; it is logged")
    })
}

/// Parses an order or another positive integer from a path segment.
pub fn parse_positive(what: &str, s: &str, max: u64) -> ApiResult<u64> {
    match s.parse::<u64>() {
        Ok(0) => Err(ApiError::bad_request(format!("{what} must be at least 1"))),
        Ok(v) if v > max => Err(ApiError::bad_request(format!(
            "{what} {v} is above the largest this server answers for, {max}"
        ))
        .with("limit", max)),
        Ok(v) => Ok(v),
        Err(_) => Err(ApiError::bad_request(format!(
            "{what} must be a positive integer, not `{}`",
            truncate(s, 40)
        ))),
    }
}

/// Checks a matrix id: 64 lowercase hex digits.
pub fn parse_id(s: &str) -> ApiResult<&str> {
    if hadamard_core::id::is_id(s) {
        Ok(s)
    } else {
        Err(ApiError::bad_request(format!("`{}` is not a matrix id: an id is 64 lowercase hex digits (the SHA-256 of the matrix's +/- text)", truncate(s, 80))))
    }
}

/// The first `max` characters of `s`, for quoting user input in messages.
pub fn truncate(s: &str, max: usize) -> String {
    if s.chars().count() <= max {
        s.to_owned()
    } else {
        s.chars().take(max).chain("…".chars()).collect()
    }
}

/// True when the request's `If-None-Match` names `etag` (weak comparison, RFC 9110 §13.1.2).
pub fn if_none_match(headers: &HeaderMap, etag: &str) -> bool {
    headers
        .get_all(header::IF_NONE_MATCH)
        .iter()
        .filter_map(|v| v.to_str().ok())
        .any(|v| {
            v.split(',')
                .map(str::trim)
                .any(|t| t == "*" || t.strip_prefix("W/").unwrap_or(t) == etag)
        })
}

/// The headers of an immutable representation.
pub fn immutable_headers(etag: &str) -> [(header::HeaderName, HeaderValue); 2] {
    [
        (
            header::ETAG,
            HeaderValue::from_str(etag).unwrap_or_else(|_| HeaderValue::from_static("\"invalid\"")),
        ),
        (
            header::CACHE_CONTROL,
            HeaderValue::from_static("public, max-age=31536000, immutable"),
        ),
    ]
}

/// A 304 for `etag`.
pub fn not_modified(etag: &str) -> Response {
    (StatusCode::NOT_MODIFIED, immutable_headers(etag)).into_response()
}
