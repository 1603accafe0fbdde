//! `GET /api/coverage?max=M`: the status of every possible order up to M.

use super::helpers::{blocking, heavy, parse_positive, ApiError, ApiResult};
use crate::app::AppState;
use crate::catalogue::seed::{status_name, SEED_MAX_ORDER};
use crate::store::orders;
use axum::extract::{Query, State};
use axum::response::IntoResponse;
use axum::Json;
use hadamard_core::route;
use hadamard_core::wire::{status_from_name, CoverageEntry};
use std::collections::HashMap;
use std::sync::Arc;

/// The largest `max` answered: 25 001 entries, about 1 MB of JSON.
pub const COVERAGE_MAX: u64 = 100_000;

/// The `coverage --json` list: `[{"order": n, "status": S}, ...]`, from the store up to the
/// seeded maximum and from the planner above it.
pub async fn show(
    State(state): State<Arc<AppState>>,
    Query(q): Query<HashMap<String, String>>,
) -> ApiResult {
    let Some(max) = q.get("max") else {
        return Err(ApiError::bad_request("give the largest order as ?max=M"));
    };
    let max = parse_positive("max", max, COVERAGE_MAX)?;
    let list: Vec<(u64, String)> = if max <= SEED_MAX_ORDER {
        blocking(&state, move |c| {
            c.store.read(|db| orders::statuses_up_to(db, max))
        })
        .await??
    } else {
        heavy(&state, move |_| {
            route::coverage(max)
                .into_iter()
                .map(|(n, s)| (n, status_name(s)))
                .collect()
        })
        .await?
    };
    let body = list
        .into_iter()
        .map(|(order, s)| {
            let status = status_from_name(&s).ok_or_else(|| {
                tracing::error!(order, status = %s, "the store holds an unknown status");
                ApiError::internal(
                    "the catalogue's database holds an unknown status; the error is logged",
                )
            })?;
            Ok(CoverageEntry { order, status })
        })
        .collect::<ApiResult<Vec<_>>>()?;
    Ok(Json(body).into_response())
}
