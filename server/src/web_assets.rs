//! The browser app, compiled to wasm32 by `build.rs` and embedded in the binary.

/// The wasm-bindgen JavaScript glue.
pub const WEB_JS: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/web.js"));
/// The app itself.
pub const WEB_WASM: &[u8] = include_bytes!(concat!(env!("OUT_DIR"), "/web_bg.wasm"));
