//! The Hadamard Registry in the browser.
//!
//! Natively this binary is empty: the workspace build compiles it without Leptos, and only the
//! wasm32 build (driven by `server/build.rs`) produces the app.

#[cfg(target_arch = "wasm32")]
mod app;

fn main() {
    #[cfg(target_arch = "wasm32")]
    app::start();
}
