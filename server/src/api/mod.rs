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
use hadamard_core::wire::{ApiIndex, ErrorKind, Health};
use helpers::{blocking, ApiResult};
use std::sync::Arc;

/// `GET /api`: the endpoints, the formats and the status table
/// ([`hadamard_core::wire::endpoints`]), for people exploring with curl.
pub async fn index() -> impl IntoResponse {
    Json(ApiIndex::new())
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
    let mut body = Health {
        status: "ok".into(),
        store_writable: probe.is_ok(),
        matrices: count,
        orders_seeded_up_to: seeded_up_to,
        seed_sequences: sequences.into_iter().collect(),
        schema_version: crate::store::SCHEMA_VERSION,
        version: env!("CARGO_PKG_VERSION").into(),
        kind: None,
        error: None,
    };
    if let Err((kind, sentence)) = probe {
        body.status = "degraded".into();
        body.kind = Some(kind);
        body.error = Some(sentence);
        return Ok((StatusCode::SERVICE_UNAVAILABLE, Json(body)).into_response());
    }
    Ok(Json(body).into_response())
}

/// One real write to the store and one to its directory; the kind and a sentence on failure.
fn write_probe(c: &crate::catalogue::Catalogue) -> Result<(), (ErrorKind, String)> {
    use helpers::{io_trouble, storage_trouble, Trouble};
    let kind = |t: Option<Trouble>| match t {
        Some(Trouble::Full) => ErrorKind::DiskFull,
        Some(Trouble::ReadOnly) => ErrorKind::ReadOnly,
        None => ErrorKind::WriteFailed,
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
