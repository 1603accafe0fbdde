//! The server's JSON API, through `fetch`.
//!
//! Every answer is read into its type from `hadamard_core::wire`, the types the server's
//! handlers write, so a field renamed on one side is renamed on the other; an answer that does
//! not fit its type is shown as an error saying so, never as a page with parts quietly missing.

use crate::app::window;
use hadamard_core::wire::ErrorBody;
use js_sys::Uint8Array;
use serde::de::DeserializeOwned;
use wasm_bindgen::JsCast;
use wasm_bindgen_futures::JsFuture;
use web_sys::{Request, RequestInit, Response};

/// Why a request gave no answer of the type asked for: the server's status (0 when it was not
/// reached) and a sentence, the server's own `error` when it gave one.
#[derive(Clone, Debug, PartialEq)]
pub struct Failure {
    pub status: u16,
    pub message: String,
}

impl Failure {
    fn unreached(message: impl Into<String>) -> Failure {
        Failure {
            status: 0,
            message: message.into(),
        }
    }
}

/// An answer read into its type, or why not.
pub type Answer<T> = Result<T, Failure>;

async fn send(req: Request) -> Result<Response, String> {
    let resp = JsFuture::from(window().fetch_with_request(&req))
        .await
        .map_err(|_| "the server could not be reached".to_string())?;
    resp.dyn_into::<Response>()
        .map_err(|_| "the server's answer was not a response".to_string())
}

/// The body of a 2xx answer read as `T` (with the status), or the server's error.
async fn json_of<T: DeserializeOwned>(resp: Response) -> Answer<(u16, T)> {
    let status = resp.status();
    let text = match resp.text() {
        Ok(p) => JsFuture::from(p)
            .await
            .ok()
            .and_then(|t| t.as_string())
            .unwrap_or_default(),
        Err(_) => String::new(),
    };
    if (200..300).contains(&status) {
        serde_json::from_str(&text)
            .map(|v| (status, v))
            .map_err(|e| Failure {
                status,
                message: format!("the server's answer could not be read ({e})"),
            })
    } else {
        Err(Failure {
            status,
            message: serde_json::from_str::<ErrorBody>(&text)
                .map(|b| b.error)
                .unwrap_or_else(|_| format!("the server answered {status}")),
        })
    }
}

/// GET a JSON resource as `T`.
pub async fn get<T: DeserializeOwned>(url: &str) -> Answer<T> {
    let init = RequestInit::new();
    init.set_method("GET");
    let req = Request::new_with_str_and_init(url, &init)
        .map_err(|_| Failure::unreached(format!("bad request URL {url}")))?;
    let _ = req.headers().set("Accept", "application/json");
    let resp = send(req).await.map_err(Failure::unreached)?;
    json_of(resp).await.map(|(_, v)| v)
}

/// GET raw bytes (a download), with the status.
pub async fn get_bytes(url: &str) -> Result<(u16, Vec<u8>), String> {
    let req = Request::new_with_str(url).map_err(|_| format!("bad request URL {url}"))?;
    let resp = send(req).await?;
    let status = resp.status();
    let buf = match resp.array_buffer() {
        Ok(p) => JsFuture::from(p)
            .await
            .map_err(|_| "the download was cut short".to_string())?,
        Err(_) => return Err("the download could not be read".into()),
    };
    Ok((status, Uint8Array::new(&buf).to_vec()))
}

/// POST raw bytes, reading a JSON answer as `T` with its status.
pub async fn post_bytes<T: DeserializeOwned>(url: &str, bytes: &[u8]) -> Answer<(u16, T)> {
    let init = RequestInit::new();
    init.set_method("POST");
    let body = Uint8Array::from(bytes);
    init.set_body(&body);
    let req = Request::new_with_str_and_init(url, &init)
        .map_err(|_| Failure::unreached(format!("bad request URL {url}")))?;
    let _ = req
        .headers()
        .set("Content-Type", "application/octet-stream");
    let _ = req.headers().set("Accept", "application/json");
    let resp = send(req).await.map_err(Failure::unreached)?;
    json_of(resp).await
}

/// A JSON value in words: strings bare, `null` as a dash, everything else as compact JSON.
pub fn plain(v: &serde_json::Value) -> String {
    match v {
        serde_json::Value::String(s) => s.clone(),
        serde_json::Value::Null => "—".into(),
        other => other.to_string(),
    }
}

/// Waits for the next turn of the event loop, so the page can paint and take input.
pub async fn next_tick() {
    let p = js_sys::Promise::new(&mut |resolve, _| {
        let _ = window().set_timeout_with_callback_and_timeout_and_arguments_0(&resolve, 0);
    });
    let _ = JsFuture::from(p).await;
}

/// Milliseconds from a monotonic clock.
pub fn now_ms() -> f64 {
    window().performance().map(|p| p.now()).unwrap_or(0.0)
}
