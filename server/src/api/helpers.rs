//! What every handler shares: JSON errors, running blocking work off the executor, parsing
//! path and query values into JSON errors, and conditional requests.

use crate::app::AppState;
use crate::catalogue::{Catalogue, LoadError};
use crate::store::StoreError;
use axum::http::{header, HeaderMap, HeaderValue, StatusCode};
use axum::response::{IntoResponse, Response};
use axum::Json;
use hadamard_core::wire::{ErrorBody, ErrorKind, NotHadamardBody};
use std::sync::Arc;

/// An error answer: a status and its body, one of the API's error types
/// ([`ErrorBody`] with the fields that help, or the not-Hadamard report of an upload).
#[derive(Debug)]
pub struct ApiError {
    pub status: StatusCode,
    pub body: Box<ErrorBody>,
    /// Set for an upload that is well-formed but not Hadamard: this is the answer then.
    pub not_hadamard: Option<Box<NotHadamardBody>>,
}

impl ApiError {
    pub fn new(status: StatusCode, message: impl Into<String>) -> ApiError {
        ApiError {
            status,
            body: Box::new(ErrorBody::new(message)),
            not_hadamard: None,
        }
    }

    /// The 422 of an upload that is well-formed but not Hadamard.
    pub fn not_hadamard(body: NotHadamardBody) -> ApiError {
        ApiError {
            status: StatusCode::UNPROCESSABLE_ENTITY,
            body: Box::new(ErrorBody::new(body.error.clone())),
            not_hadamard: Some(Box::new(body)),
        }
    }

    pub fn kind(mut self, kind: ErrorKind) -> ApiError {
        self.body.kind = Some(kind);
        self
    }

    /// The query or path parameter that is wrong.
    pub fn parameter(mut self, name: impl Into<String>) -> ApiError {
        self.body.parameter = Some(name.into());
        self
    }

    /// The limit that was exceeded.
    pub fn limit(mut self, limit: impl TryInto<u64>) -> ApiError {
        self.body.limit = limit.try_into().ok();
        self
    }

    /// The order the request was about.
    pub fn order(mut self, order: impl TryInto<u64>) -> ApiError {
        self.body.order = order.try_into().ok();
        self
    }

    /// Changes the body's other fields.
    pub fn and(mut self, f: impl FnOnce(&mut ErrorBody)) -> ApiError {
        f(&mut self.body);
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
        match self.not_hadamard {
            Some(b) => (self.status, Json(b)).into_response(),
            None => (self.status, Json(self.body)).into_response(),
        }
    }
}

impl From<StoreError> for ApiError {
    fn from(e: StoreError) -> ApiError {
        tracing::error!(error = %e, "store error");
        match storage_trouble(&e) {
            Some(Trouble::Full) => ApiError::new(
                StatusCode::INSUFFICIENT_STORAGE,
                "the catalogue's disk is full: nothing was stored; what was stored before is intact",
            )
            .kind(ErrorKind::DiskFull),
            Some(Trouble::ReadOnly) => ApiError::new(
                StatusCode::SERVICE_UNAVAILABLE,
                "the catalogue's database is read-only just now: nothing was stored; reading still works",
            )
            .kind(ErrorKind::ReadOnly),
            None => ApiError::internal("the catalogue's database failed; the error is logged"),
        }
    }
}

/// What a failed write says about the disk.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Trouble {
    /// No space left (SQLITE_FULL, ENOSPC).
    Full,
    /// The file or its file system cannot be written (SQLITE_READONLY, EROFS, EACCES).
    ReadOnly,
}

/// Tells disk-full and read-only failures apart from others.
pub fn storage_trouble(e: &StoreError) -> Option<Trouble> {
    use rusqlite::ErrorCode;
    match e {
        StoreError::Sqlite(rusqlite::Error::SqliteFailure(f, _)) => match f.code {
            ErrorCode::DiskFull => Some(Trouble::Full),
            ErrorCode::ReadOnly | ErrorCode::CannotOpen | ErrorCode::PermissionDenied => {
                Some(Trouble::ReadOnly)
            }
            _ => None,
        },
        _ => None,
    }
}

/// The matching trouble of an I/O error, for the health probe.
pub fn io_trouble(e: &std::io::Error) -> Option<Trouble> {
    match e.raw_os_error() {
        Some(28) | Some(122) => Some(Trouble::Full), // ENOSPC, EDQUOT
        Some(30) | Some(13) | Some(1) => Some(Trouble::ReadOnly), // EROFS, EACCES, EPERM
        _ => None,
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
        .limit(max)),
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

/// The size of the pieces a streamed answer is sent in.
pub const STREAM_CHUNK: usize = 64 * 1024;
/// How many pieces may wait between the writer and the connection: with the piece being
/// filled, a streamed answer holds at most (this + 1) × [`STREAM_CHUNK`] bytes in the server.
pub const STREAM_QUEUE: usize = 4;

/// A body that streams what `write` writes, from a blocking thread, in [`STREAM_CHUNK`]
/// pieces through a queue of [`STREAM_QUEUE`]: memory stays bounded whatever the answer's
/// size. When the client goes away (or stops reading and the connection's write timeout
/// drops it) the queue closes, the next write fails, and the writer stops. A writer error
/// aborts the body, so a client never takes a cut-short answer for a whole one.
pub fn stream_body(
    write: impl FnOnce(&mut dyn std::io::Write) -> std::io::Result<()> + Send + 'static,
) -> axum::body::Body {
    let (tx, rx) = tokio::sync::mpsc::channel::<std::io::Result<bytes::Bytes>>(STREAM_QUEUE);
    tokio::task::spawn_blocking(move || {
        let mut w = ChannelWriter {
            tx: tx.clone(),
            buf: Vec::with_capacity(STREAM_CHUNK),
        };
        let r = write(&mut w).and_then(|()| std::io::Write::flush(&mut w));
        if let Err(e) = r {
            if !tx.is_closed() {
                tracing::warn!(error = %e, "a streamed answer failed part way");
                let _ = tx.blocking_send(Err(e));
            }
        }
    });
    axum::body::Body::new(ChannelBody(rx))
}

struct ChannelWriter {
    tx: tokio::sync::mpsc::Sender<std::io::Result<bytes::Bytes>>,
    buf: Vec<u8>,
}

impl ChannelWriter {
    fn send(&mut self) -> std::io::Result<()> {
        if self.buf.is_empty() {
            return Ok(());
        }
        let piece = std::mem::replace(&mut self.buf, Vec::with_capacity(STREAM_CHUNK));
        self.tx
            .blocking_send(Ok(bytes::Bytes::from(piece)))
            .map_err(|_| std::io::Error::new(std::io::ErrorKind::BrokenPipe, "the client left"))
    }
}

impl std::io::Write for ChannelWriter {
    fn write(&mut self, data: &[u8]) -> std::io::Result<usize> {
        if self.buf.len() >= STREAM_CHUNK {
            self.send()?;
        }
        let room = STREAM_CHUNK - self.buf.len();
        let k = data.len().min(room);
        self.buf.extend_from_slice(&data[..k]);
        Ok(k)
    }

    fn flush(&mut self) -> std::io::Result<()> {
        self.send()
    }
}

struct ChannelBody(tokio::sync::mpsc::Receiver<std::io::Result<bytes::Bytes>>);

impl http_body::Body for ChannelBody {
    type Data = bytes::Bytes;
    type Error = std::io::Error;

    fn poll_frame(
        mut self: std::pin::Pin<&mut Self>,
        cx: &mut std::task::Context<'_>,
    ) -> std::task::Poll<Option<Result<http_body::Frame<bytes::Bytes>, std::io::Error>>> {
        self.0
            .poll_recv(cx)
            .map(|o| o.map(|r| r.map(http_body::Frame::data)))
    }
}

/// A streamed JSON answer, written by serde straight into the stream (no tree of values).
pub fn stream_json<T: serde::Serialize + Send + 'static>(value: T) -> Response {
    let body =
        stream_body(move |w| serde_json::to_writer(&mut *w, &value).map_err(std::io::Error::other));
    (
        [(
            header::CONTENT_TYPE,
            HeaderValue::from_static("application/json"),
        )],
        body,
    )
        .into_response()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A real SQLite file that cannot grow (`max_page_count`, SQLite's documented limit that
    /// makes writes fail with SQLITE_FULL) and one opened read-only (SQLITE_READONLY): the
    /// answers are 507 and 503 with a sentence, not a bare 500.
    #[test]
    fn full_and_read_only_disks_get_their_own_answers() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("t.sqlite3");
        let c = rusqlite::Connection::open(&path).unwrap();
        c.execute_batch("CREATE TABLE t (x BLOB); PRAGMA max_page_count = 3;")
            .unwrap();
        let full = c
            .execute("INSERT INTO t VALUES (zeroblob(100000))", [])
            .unwrap_err();
        let e = ApiError::from(StoreError::Sqlite(full));
        assert_eq!(e.status, StatusCode::INSUFFICIENT_STORAGE, "{:?}", e.body);
        assert_eq!(e.body.kind, Some(ErrorKind::DiskFull));
        drop(c);
        let ro = rusqlite::Connection::open_with_flags(
            &path,
            rusqlite::OpenFlags::SQLITE_OPEN_READ_ONLY,
        )
        .unwrap();
        let denied = ro.execute("INSERT INTO t VALUES (1)", []).unwrap_err();
        let e = ApiError::from(StoreError::Sqlite(denied));
        assert_eq!(e.status, StatusCode::SERVICE_UNAVAILABLE, "{:?}", e.body);
        assert_eq!(e.body.kind, Some(ErrorKind::ReadOnly));
        assert!(e.body.error.contains("read-only"));
        // Other failures stay 500.
        let e = ApiError::from(StoreError::Corrupt("x".into()));
        assert_eq!(e.status, StatusCode::INTERNAL_SERVER_ERROR);
        // The health probe's own file write: ENOSPC and EROFS (Linux errno values).
        assert_eq!(
            io_trouble(&std::io::Error::from_raw_os_error(28)),
            Some(Trouble::Full)
        );
        assert_eq!(
            io_trouble(&std::io::Error::from_raw_os_error(30)),
            Some(Trouble::ReadOnly)
        );
    }
}
