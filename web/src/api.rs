//! The server's JSON API, through `fetch`.
//!
//! Answers are kept as `serde_json::Value` and read with the small accessors below, so a field
//! the server adds or renames degrades to "not shown" instead of failing the whole screen.

use crate::app::window;
use js_sys::Uint8Array;
use serde_json::Value;
use wasm_bindgen::JsCast;
use wasm_bindgen_futures::JsFuture;
use web_sys::{Request, RequestInit, Response};

/// An HTTP answer: its status and its body read as JSON (`Value::Null` if it was not JSON).
#[derive(Clone)]
pub struct Reply {
    pub status: u16,
    pub body: Value,
}

impl Reply {
    pub fn ok(&self) -> bool {
        (200..300).contains(&self.status)
    }

    /// The server's `error` message, or a generic one naming the status.
    pub fn error(&self) -> String {
        self.body
            .get("error")
            .and_then(Value::as_str)
            .map(str::to_string)
            .unwrap_or_else(|| format!("the server answered {}", self.status))
    }
}

async fn send(req: Request) -> Result<Response, String> {
    let resp = JsFuture::from(window().fetch_with_request(&req))
        .await
        .map_err(|_| "the server could not be reached".to_string())?;
    resp.dyn_into::<Response>()
        .map_err(|_| "the server's answer was not a response".to_string())
}

async fn json_of(resp: Response) -> Reply {
    let status = resp.status();
    let text = match resp.text() {
        Ok(p) => JsFuture::from(p)
            .await
            .ok()
            .and_then(|t| t.as_string())
            .unwrap_or_default(),
        Err(_) => String::new(),
    };
    Reply {
        status,
        body: serde_json::from_str(&text).unwrap_or(Value::Null),
    }
}

/// GET a JSON resource.
pub async fn get(url: &str) -> Result<Reply, String> {
    let init = RequestInit::new();
    init.set_method("GET");
    let req =
        Request::new_with_str_and_init(url, &init).map_err(|_| format!("bad request URL {url}"))?;
    let _ = req.headers().set("Accept", "application/json");
    Ok(json_of(send(req).await?).await)
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

/// POST raw bytes, reading a JSON answer.
pub async fn post_bytes(url: &str, bytes: &[u8]) -> Result<Reply, String> {
    let init = RequestInit::new();
    init.set_method("POST");
    let body = Uint8Array::from(bytes);
    init.set_body(&body);
    let req =
        Request::new_with_str_and_init(url, &init).map_err(|_| format!("bad request URL {url}"))?;
    let _ = req
        .headers()
        .set("Content-Type", "application/octet-stream");
    let _ = req.headers().set("Accept", "application/json");
    Ok(json_of(send(req).await?).await)
}

/// `v[key]` as a string, if it is one.
pub fn s<'a>(v: &'a Value, key: &str) -> Option<&'a str> {
    v.get(key).and_then(Value::as_str)
}

/// `v[key]` as an unsigned integer, if it is one.
pub fn u(v: &Value, key: &str) -> Option<u64> {
    v.get(key).and_then(Value::as_u64)
}

/// `v[key]` as a boolean, if it is one.
pub fn b(v: &Value, key: &str) -> Option<bool> {
    v.get(key).and_then(Value::as_bool)
}

/// `v[key]` as an array (empty if absent).
pub fn arr<'a>(v: &'a Value, key: &str) -> &'a [Value] {
    v.get(key)
        .and_then(Value::as_array)
        .map(Vec::as_slice)
        .unwrap_or(&[])
}

/// A JSON value in words: strings bare, everything else as compact JSON.
pub fn plain(v: &Value) -> String {
    match v {
        Value::String(s) => s.clone(),
        Value::Null => "—".into(),
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
