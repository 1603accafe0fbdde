//! Connection hygiene: the accept loop that replaces `axum::serve`, so that a stranger cannot
//! hold the server's sockets, memory or threads.
//!
//! - at most `--max-connections` open connections; one more is answered at once with a 503
//!   JSON error (security headers included) and closed, so the descriptor limit is never met;
//! - the request head must arrive within `--header-timeout` (hyper's header-read timer);
//! - a connection on which no byte moves either way for `--idle-timeout` is closed (keep-alive
//!   sockets and half-open ones alike);
//! - a write that makes no progress for `--write-timeout` closes the connection: a client that
//!   stops reading its download is dropped, and the producer of the streamed body, which
//!   writes into a small bounded channel, sees the closed channel and stops;
//! - hyper's read buffer per connection is capped at [`MAX_CONN_BUFFER`] bytes.
//!
//! HTTP/1.1 only: the catalogue is served as plain HTTP behind whatever proxy terminates TLS.

use pin_project_lite::pin_project;
use std::future::Future;
use std::io;
use std::pin::Pin;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Arc;
use std::task::{Context, Poll};
use std::time::Duration;
use tokio::io::{AsyncRead, AsyncWrite, AsyncWriteExt, ReadBuf};
use tokio::sync::Semaphore;
use tokio::time::{Instant, Sleep};

/// The largest read buffer hyper keeps for one connection (request head included); a head
/// larger than this gets hyper's own 431. The router refuses heads over
/// [`crate::app::MAX_HEADER_BYTES`] first, with a JSON 431.
pub const MAX_CONN_BUFFER: usize = 64 * 1024;

/// The connection limits of `hadamard serve`.
#[derive(Clone, Debug)]
pub struct Limits {
    pub max_connections: usize,
    pub header_timeout: Duration,
    pub idle_timeout: Duration,
    pub write_timeout: Duration,
}

pin_project! {
    /// A socket that fails with `TimedOut` when a read has waited `idle` with no byte moving
    /// either way, or a write has waited `write` without progress.
    pub struct Guarded<T> {
        #[pin]
        inner: T,
        idle: Duration,
        write: Duration,
        last_progress: Instant,
        write_since: Option<Instant>,
        busy: Arc<AtomicUsize>,
        #[pin]
        read_timer: Sleep,
        #[pin]
        write_timer: Sleep,
    }
}

impl<T> Guarded<T> {
    /// `busy` counts the connection's requests whose response head is not yet made: while it
    /// is above zero, the handler is working and the idle timer does not run.
    pub fn new(inner: T, idle: Duration, write: Duration, busy: Arc<AtomicUsize>) -> Guarded<T> {
        let now = Instant::now();
        Guarded {
            inner,
            idle,
            write,
            last_progress: now,
            write_since: None,
            busy,
            read_timer: tokio::time::sleep_until(now + idle),
            write_timer: tokio::time::sleep_until(now + write),
        }
    }
}

/// Polls `timer` towards `deadline`; true when the deadline has passed.
fn expired(mut timer: Pin<&mut Sleep>, deadline: Instant, cx: &mut Context<'_>) -> bool {
    if timer.deadline() != deadline {
        timer.as_mut().reset(deadline);
    }
    timer.poll(cx).is_ready()
}

impl<T: AsyncRead> AsyncRead for Guarded<T> {
    fn poll_read(
        self: Pin<&mut Self>,
        cx: &mut Context<'_>,
        buf: &mut ReadBuf<'_>,
    ) -> Poll<io::Result<()>> {
        let this = self.project();
        let before = buf.filled().len();
        match this.inner.poll_read(cx, buf) {
            Poll::Ready(r) => {
                if buf.filled().len() > before {
                    *this.last_progress = Instant::now();
                }
                Poll::Ready(r)
            }
            Poll::Pending => {
                if this.busy.load(Ordering::Relaxed) > 0 {
                    *this.last_progress = Instant::now();
                    return Poll::Pending;
                }
                if expired(this.read_timer, *this.last_progress + *this.idle, cx) {
                    Poll::Ready(Err(io::Error::new(
                        io::ErrorKind::TimedOut,
                        "the connection was idle too long",
                    )))
                } else {
                    Poll::Pending
                }
            }
        }
    }
}

impl<T: AsyncWrite> Guarded<T> {
    /// One write-side call on the socket: a `Ready` ends the blocked-write clock, and one that
    /// `moved` bytes resets the idle clock; a call still pending `write` after it first blocked
    /// fails with `TimedOut`, so a client that stops reading cannot pin a connection.
    fn guard_write<R>(
        self: Pin<&mut Self>,
        cx: &mut Context<'_>,
        call: impl FnOnce(Pin<&mut T>, &mut Context<'_>) -> Poll<io::Result<R>>,
        moved: impl FnOnce(&io::Result<R>) -> bool,
    ) -> Poll<io::Result<R>> {
        let this = self.project();
        match call(this.inner, cx) {
            Poll::Ready(r) => {
                // The call is no longer blocked; only bytes moved count against idleness.
                *this.write_since = None;
                if moved(&r) {
                    *this.last_progress = Instant::now();
                }
                Poll::Ready(r)
            }
            Poll::Pending => {
                let since = *this.write_since.get_or_insert_with(Instant::now);
                if expired(this.write_timer, since + *this.write, cx) {
                    Poll::Ready(Err(io::Error::new(
                        io::ErrorKind::TimedOut,
                        "the client stopped reading",
                    )))
                } else {
                    Poll::Pending
                }
            }
        }
    }
}

impl<T: AsyncWrite> AsyncWrite for Guarded<T> {
    fn poll_write(
        self: Pin<&mut Self>,
        cx: &mut Context<'_>,
        data: &[u8],
    ) -> Poll<io::Result<usize>> {
        self.guard_write(
            cx,
            |w, cx| w.poll_write(cx, data),
            |r| matches!(r, Ok(k) if *k > 0),
        )
    }

    fn poll_write_vectored(
        self: Pin<&mut Self>,
        cx: &mut Context<'_>,
        bufs: &[io::IoSlice<'_>],
    ) -> Poll<io::Result<usize>> {
        self.guard_write(
            cx,
            |w, cx| w.poll_write_vectored(cx, bufs),
            |r| matches!(r, Ok(k) if *k > 0),
        )
    }

    fn is_write_vectored(&self) -> bool {
        self.inner.is_write_vectored()
    }

    fn poll_flush(self: Pin<&mut Self>, cx: &mut Context<'_>) -> Poll<io::Result<()>> {
        self.guard_write(cx, |w, cx| w.poll_flush(cx), |_| false)
    }

    fn poll_shutdown(self: Pin<&mut Self>, cx: &mut Context<'_>) -> Poll<io::Result<()>> {
        self.project().inner.poll_shutdown(cx)
    }
}

/// Serves `router` on `listener` until `shutdown` resolves, then lets the requests in flight
/// finish (at most `drain` long).
pub async fn serve(
    listener: tokio::net::TcpListener,
    router: axum::Router,
    limits: Limits,
    shutdown: impl Future<Output = ()>,
    drain: Duration,
) {
    use hyper_util::rt::{TokioIo, TokioTimer};
    let slots = Arc::new(Semaphore::new(limits.max_connections.max(1)));
    let graceful = hyper_util::server::graceful::GracefulShutdown::new();
    let mut builder = hyper::server::conn::http1::Builder::new();
    builder
        .timer(TokioTimer::new())
        .header_read_timeout(limits.header_timeout)
        .max_buf_size(MAX_CONN_BUFFER)
        .keep_alive(true);
    tokio::pin!(shutdown);
    loop {
        let (stream, peer) = tokio::select! {
            r = listener.accept() => match r {
                Ok(s) => s,
                Err(e) => {
                    // Out of descriptors or a transient error: wait a little rather than spin.
                    tracing::warn!(error = %e, "accept failed");
                    tokio::time::sleep(Duration::from_millis(50)).await;
                    continue;
                }
            },
            _ = &mut shutdown => break,
        };
        let _ = stream.set_nodelay(true);
        let Ok(slot) = slots.clone().try_acquire_owned() else {
            tracing::warn!(%peer, limit = limits.max_connections, "connection refused: at the connection limit");
            tokio::spawn(refuse(stream, limits.max_connections));
            continue;
        };
        let busy = Arc::new(AtomicUsize::new(0));
        let io = TokioIo::new(Box::pin(Guarded::new(
            stream,
            limits.idle_timeout,
            limits.write_timeout,
            busy.clone(),
        )));
        let router = router.clone();
        let svc = hyper::service::service_fn(move |req: hyper::Request<hyper::body::Incoming>| {
            let mut router = router.clone();
            let busy = Busy::enter(busy.clone());
            async move {
                let _busy = busy;
                tower::Service::call(&mut router, req.map(axum::body::Body::new)).await
            }
        });
        let conn = graceful.watch(builder.serve_connection(io, svc));
        tokio::spawn(async move {
            let _slot = slot;
            if let Err(e) = conn.await {
                tracing::debug!(%peer, error = %e, "connection closed with an error");
            }
        });
    }
    drop(listener);
    tokio::select! {
        _ = graceful.shutdown() => {},
        _ = tokio::time::sleep(drain) => {
            tracing::warn!(seconds = drain.as_secs_f64(), "requests still in flight after the drain time; stopping anyway");
        }
    }
}

/// Marks a connection busy while its handler makes a response head.
struct Busy(Arc<AtomicUsize>);

impl Busy {
    fn enter(c: Arc<AtomicUsize>) -> Busy {
        c.fetch_add(1, Ordering::Relaxed);
        Busy(c)
    }
}

impl Drop for Busy {
    fn drop(&mut self) {
        self.0.fetch_sub(1, Ordering::Relaxed);
    }
}

/// Answers a connection over the limit with a 503 and closes it.
async fn refuse(mut stream: tokio::net::TcpStream, limit: usize) {
    let body = format!(
        "{{\"error\":\"the server has its maximum of {limit} open connections (--max-connections); retry in a moment\",\"limit\":{limit}}}"
    );
    let head = format!(
        "HTTP/1.1 503 Service Unavailable\r\ncontent-type: application/json\r\ncontent-length: {}\r\nretry-after: 1\r\nconnection: close\r\ncontent-security-policy: {}\r\nx-content-type-options: nosniff\r\nreferrer-policy: no-referrer\r\nx-frame-options: DENY\r\n\r\n",
        body.len(),
        crate::app::CSP
    );
    // Read what the client sent first (briefly), so that closing does not reset the
    // connection under the answer.
    let mut scratch = [0u8; 8192];
    let _ = tokio::time::timeout(
        Duration::from_millis(200),
        tokio::io::AsyncReadExt::read(&mut stream, &mut scratch),
    )
    .await;
    let _ = tokio::time::timeout(Duration::from_secs(2), async {
        stream.write_all(head.as_bytes()).await?;
        stream.write_all(body.as_bytes()).await?;
        stream.shutdown().await
    })
    .await;
}
