//! `hadamard-core`: everything the registry knows about Hadamard matrices, with no I/O.
//!
//! A Hadamard matrix of order n is an n×n matrix of ±1 entries with H·Hᵀ = nI. This crate holds
//! such matrices bit-packed ([`matrix`]), decides the defining identity exactly ([`verify`]),
//! reads and writes the formats people exchange ([`formats`]), and knows the published ways of
//! building them ([`construct`], [`route`]), over the finite fields and integer arithmetic they
//! need ([`field`], [`arith`]).
//!
//! **API Boundary.** The server, the CLI and the browser app all call this crate and nothing
//! else for mathematics. It compiles natively and for `wasm32-unknown-unknown` with no feature
//! flags; only [`search`] is native-only, because it uses threads.
//!
//! **Invariant.** Nothing in this crate calls a matrix Hadamard unless [`verify::verify`] has
//! passed on it; every constructor in [`construct`] returns its matrix through that check.

pub mod arith;
pub mod construct;
pub mod derive;
pub mod diagnose;
pub mod field;
pub mod formats;
pub mod id;
pub mod json;
pub mod matrix;
pub mod query;
pub mod repair;
pub mod route;
#[cfg(not(target_arch = "wasm32"))]
pub mod search;
pub mod seed;
pub mod verify;
pub mod wire;

pub use matrix::Matrix;
