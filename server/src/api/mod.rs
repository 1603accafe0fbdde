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
use axum::http::StatusCode;
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

/// `GET /api/health`: the server answers, its database can be read, and it can be written:
/// each call commits a real write to the database (the `meta` row `health_probe`) and writes,
/// syncs and removes a 4 KiB file beside it, so a full or read-only disk shows here. 200 with
/// `"status": "ok"`, or 503 with `"status": "degraded"` and a sentence saying what is wrong.
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
    let probe = blocking(&state, write_probe).await?;
    let sequences: serde_json::Map<String, serde_json::Value> =
        sequences.into_iter().map(|(f, k)| (f, json!(k))).collect();
    let mut body = json!({
        "status": "ok",
        "store_writable": probe.is_ok(),
        "matrices": count,
        "orders_seeded_up_to": seeded_up_to,
        "seed_sequences": sequences,
        "schema_version": crate::store::SCHEMA_VERSION,
        "version": env!("CARGO_PKG_VERSION"),
    });
    if let Err((kind, sentence)) = probe {
        body["status"] = json!("degraded");
        body["kind"] = json!(kind);
        body["error"] = json!(sentence);
        return Ok((StatusCode::SERVICE_UNAVAILABLE, Json(body)).into_response());
    }
    Ok(Json(body).into_response())
}

/// One real write to the store and one to its directory; the kind and a sentence on failure.
fn write_probe(c: &crate::catalogue::Catalogue) -> Result<(), (&'static str, String)> {
    use helpers::{io_trouble, storage_trouble, Trouble};
    let kind = |t: Option<Trouble>| match t {
        Some(Trouble::Full) => "disk_full",
        Some(Trouble::ReadOnly) => "read_only",
        None => "write_failed",
    };
    let dir = c
        .store
        .path()
        .parent()
        .map(std::path::Path::to_path_buf)
        .unwrap_or_default();
    let file = dir.join(format!(".hadamard-health-probe-{}", std::process::id()));
    let on_disk = (|| {
        use std::io::Write;
        let mut f = std::fs::File::create(&file)?;
        f.write_all(&[0u8; 4096])?;
        f.sync_all()
    })();
    let _ = std::fs::remove_file(&file);
    if let Err(e) = on_disk {
        return Err((
            kind(io_trouble(&e)),
            format!("the catalogue's directory cannot be written ({e}): uploads and new builds fail until it can"),
        ));
    }
    let now = crate::time::now_rfc3339();
    c.store
        .write(|db| crate::store::meta_set(db, "health_probe", &now))
        .map_err(|e| {
            (
                kind(storage_trouble(&e)),
                format!("the catalogue's database cannot be written ({e}): uploads and new builds fail until it can"),
            )
        })
}
