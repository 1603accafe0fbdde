//! The Hadamard Registry in the browser.
//!
//! Natively this binary is empty: the workspace build compiles it without Leptos, and only the
//! wasm32 build (driven by `server/build.rs`) produces the app.
//!
//! The app is a handful of screens over the server's JSON API (`docs/api.md`) and `core`:
//! lookup of an order, dimension or strata count ([`lookup`]), the coverage map
//! ([`coverage`]), a catalogue entry ([`entry`]), and verification in the browser with
//! publishing ([`verify`]). It asks the server for everything about orders, so that the
//! planner and the literature table stay out of the bundle; it uses `core` only to read,
//! verify and repair matrices, which is what must work without sending the file anywhere.

#[cfg(target_arch = "wasm32")]
mod api;
#[cfg(target_arch = "wasm32")]
mod app;
#[cfg(target_arch = "wasm32")]
mod coverage;
#[cfg(target_arch = "wasm32")]
mod entry;
#[cfg(target_arch = "wasm32")]
mod lookup;
#[cfg(target_arch = "wasm32")]
mod picture;
#[cfg(target_arch = "wasm32")]
mod pool;
#[cfg(target_arch = "wasm32")]
mod verify;
#[cfg(target_arch = "wasm32")]
mod words;

fn main() {
    #[cfg(target_arch = "wasm32")]
    app::start();
}
