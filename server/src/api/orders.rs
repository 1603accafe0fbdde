//! `/api/orders/{n}`: an order's status and routes; its catalogue matrix; its stored matrices.

use super::helpers::{blocking, heavy, parse_positive, ApiError, ApiResult};
use super::matrices::summary;
use crate::app::AppState;
use crate::catalogue::seed::SEED_MAX_ORDER;
use crate::catalogue::BuildFailure;
use crate::store::{matrices, orders};
use axum::extract::{Path, Query, State};
use axum::http::{header, StatusCode};
use axum::response::IntoResponse;
use axum::Json;
use hadamard_core::route;
use hadamard_core::wire::{status_from_name, CatalogueMatrix, ErrorKind, MatrixList};
use std::collections::HashMap;
use std::sync::Arc;

/// The largest order the route planner is asked about.
pub const ORDER_QUERY_MAX: u64 = 1_000_000_000_000_000;

/// The most matrices one listing page holds.
pub const PAGE_MAX: u32 = 500;

/// `GET /api/orders/{n}`: the `routes --json` object (from the store up to the seeded
/// maximum, from the planner above it).
pub async fn show(State(state): State<Arc<AppState>>, Path(n): Path<String>) -> ApiResult {
    let n = parse_positive("the order", &n, ORDER_QUERY_MAX)?;
    let stored = if n <= SEED_MAX_ORDER {
        blocking(&state, move |c| {
            c.store.read(|db| orders::order_info_json(db, n))
        })
        .await??
    } else {
        None
    };
    let text = match stored {
        Some(t) => t,
        None => {
            heavy(&state, move |_| {
                serde_json::to_string(&route::order_info(n)).unwrap_or_default()
            })
            .await?
        }
    };
    Ok(([(header::CONTENT_TYPE, "application/json")], text).into_response())
}

/// `GET /api/orders/{n}/matrix`: the catalogue's own matrix of order n, built, verified and
/// stored on the first request. 200 with its id and url; 404 when no implemented route
/// builds n (the body says the order's status); 422 when n is above `--max-order`.
pub async fn catalogue_matrix(
    State(state): State<Arc<AppState>>,
    Path(n): Path<String>,
) -> ApiResult {
    let n = parse_positive("the order", &n, ORDER_QUERY_MAX)?;
    let body = catalogue_entry(&state, n).await?;
    Ok(Json(body).into_response())
}

/// The catalogue entry of order n (built and stored on first use).
pub async fn catalogue_entry(state: &Arc<AppState>, n: u64) -> ApiResult<CatalogueMatrix> {
    let max = state.config.max_order as u64;
    if n > max {
        return Err(ApiError::new(
            StatusCode::UNPROCESSABLE_ENTITY,
            format!("order {n} is above this server's limit of {max} (--max-order)"),
        )
        .limit(max));
    }
    let n = n as usize;
    // Build-on-GET policy: an anonymous request builds and stores orders up to
    // --store-max-order; above it only an entry the operator built is served.
    if n > state.config.store_max_order {
        let found = blocking(state, move |c| {
            c.store.read(|db| matrices::catalogue_entry(db, n))
        })
        .await??;
        let Some((id, recipe_json, _)) = found else {
            let limit = state.config.store_max_order;
            return Err(ApiError::new(
                StatusCode::UNPROCESSABLE_ENTITY,
                format!("order {n} is not in this catalogue yet, and this server builds and stores on request only up to order {limit} (--store-max-order); `hadamard build {n}` makes it on your machine"),
            )
            .order(n)
            .kind(ErrorKind::NotBuilt)
            .limit(limit));
        };
        return Ok(CatalogueMatrix {
            order: n as u64,
            url: format!("/m/{id}"),
            api_url: format!("/api/matrices/{id}"),
            id,
            built_now: false,
            recipe: serde_json::from_str(&recipe_json).ok(),
        });
    }
    // One build per order at a time: later requests wait and then find it stored.
    let lock = state.build_lock(n);
    let _guard = lock.lock().await;
    let entry = heavy(state, move |c| c.catalogue_matrix(n)).await?;
    state.forget_build_lock(n);
    match entry {
        Ok(e) => Ok(CatalogueMatrix {
            order: n as u64,
            url: format!("/m/{}", e.id),
            api_url: format!("/api/matrices/{}", e.id),
            id: e.id,
            built_now: e.created,
            recipe: serde_json::from_str(&e.recipe_json).ok(),
        }),
        Err(BuildFailure::NoRoute { message, status }) => Err(ApiError::not_found(format!(
            "the catalogue has no matrix of order {n}: {message}"
        ))
        .order(n)
        .and(|b| b.status = status_from_name(&status))),
        Err(BuildFailure::Store(e)) => Err(e.into()),
    }
}

/// `GET /api/orders/{n}/matrices?limit=L&offset=K`: the stored matrices of order n, oldest
/// first. When none is stored and n is constructible (within `--max-order`), the catalogue's
/// matrix is built first, so the list is never empty for a constructible order.
pub async fn list(
    State(state): State<Arc<AppState>>,
    Path(n): Path<String>,
    Query(q): Query<HashMap<String, String>>,
) -> ApiResult {
    let n = parse_positive("the order", &n, ORDER_QUERY_MAX)?;
    let limit = match q.get("limit") {
        None => 100,
        Some(s) => parse_positive("limit", s, u64::from(PAGE_MAX))? as u32,
    };
    let offset = match q.get("offset").map(|s| s.parse::<u64>()) {
        None => 0,
        Some(Ok(k)) if k <= i64::MAX as u64 => k,
        Some(_) => {
            return Err(ApiError::bad_request(
                "offset must be a non-negative integer",
            ))
        }
    };
    let order = usize::try_from(n).unwrap_or(usize::MAX);
    let stored = blocking(&state, move |c| {
        c.store.read(|db| matrices::count_of_order(db, order))
    })
    .await??;
    let mut built = false;
    if stored == 0 && n <= state.config.max_order.min(state.config.store_max_order) as u64 {
        let status = heavy(&state, move |_| route::order_info(n).status).await?;
        if status == route::Status::Constructible {
            built = catalogue_entry(&state, n).await.is_ok_and(|v| v.built_now);
        }
    }
    let (total, page, entry) = blocking(&state, move |c| {
        c.store.read(|db| {
            Ok((
                matrices::count_of_order(db, order)?,
                matrices::list_of_order(db, order, limit, offset)?,
                matrices::catalogue_entry(db, order)?,
            ))
        })
    })
    .await??;
    Ok(Json(MatrixList {
        order: n,
        total,
        offset,
        limit,
        catalogue_entry: entry.map(|(id, _, _)| id),
        built_now: built,
        matrices: page.iter().map(summary).collect(),
    })
    .into_response())
}
