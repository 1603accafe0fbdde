//! The HTTP API and the web app's pages, one module per resource; handlers stay thin and
//! call [`crate::catalogue`], which calls `core` and the store.

pub mod advice;
pub mod coverage;
pub mod derive;
pub mod helpers;
pub mod matrices;
pub mod orders;
pub mod pages;

use crate::app::AppState;
use crate::store::{matrices as stored, orders as seeded};
use axum::extract::State;
use axum::response::IntoResponse;
use axum::Json;
use helpers::{blocking, ApiResult};
use serde_json::json;
use std::sync::Arc;

/// `GET /api`: the endpoints, for people exploring with curl.
pub async fn index() -> impl IntoResponse {
    Json(json!({
        "name": "Hadamard Registry",
        "docs": "docs/api.md",
        "endpoints": [
            "GET  /api/health",
            "GET  /api/orders/{n}",
            "GET  /api/orders/{n}/matrix",
            "GET  /api/orders/{n}/matrices?limit=L&offset=K",
            "GET  /api/coverage?max=M",
            "GET  /api/dimensions/{d}",
            "GET  /api/smallest-known?at-least=k[&constructible=true]",
            "POST /api/matrices[?format=F][&bits-minus=0|1]",
            "GET  /api/matrices/{id}",
            "GET  /api/matrices/{id}/download?format=pm|csv|bits|json|npy|npy-f64|npy-f64-scaled|png",
            "GET  /api/matrices/{id}/rows/{i}",
            "GET  /api/matrices/{id}/derive/{screening|brr|code|symmetric-design|ordering|sequency}?...",
            "GET  /api/brr?strata=k[&format=csv]",
            "GET  /api/equivalence?a=ID&b=ID[&budget=N]",
        ],
    }))
}

/// `GET /api/health`: the server answers and its database can be read.
pub async fn health(State(state): State<Arc<AppState>>) -> ApiResult {
    let (count, seeded_up_to, sequences) = blocking(&state, |c| {
        c.store.read(|db| {
            Ok((
                stored::count(db)?,
                seeded::seed_max_order(db)?,
                seeded::sequence_counts(db)?,
            ))
        })
    })
    .await??;
    let sequences: serde_json::Map<String, serde_json::Value> =
        sequences.into_iter().map(|(f, k)| (f, json!(k))).collect();
    Ok(Json(json!({
        "status": "ok",
        "matrices": count,
        "orders_seeded_up_to": seeded_up_to,
        "seed_sequences": sequences,
        "schema_version": crate::store::SCHEMA_VERSION,
        "version": env!("CARGO_PKG_VERSION"),
    }))
    .into_response())
}
