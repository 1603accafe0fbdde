//! Queries for people who need a size rather than an order: the dimension advisor and the
//! smallest known order at least k.

use super::helpers::{heavy, parse_positive, ApiError, ApiResult};
use super::orders::ORDER_QUERY_MAX;
use crate::app::AppState;
use axum::extract::{Path, Query, State};
use axum::response::IntoResponse;
use axum::Json;
use hadamard_core::route;
use std::collections::HashMap;
use std::sync::Arc;

/// `GET /api/dimensions/{d}`: the ways to write d = 2^a·m₀ through a constructible or known
/// order m₀, smallest dense factor first.
pub async fn dimension(State(state): State<Arc<AppState>>, Path(d): Path<String>) -> ApiResult {
    let d = parse_positive("the dimension", &d, ORDER_QUERY_MAX)?;
    let advice = heavy(&state, move |_| route::dimension_advice(d)).await?;
    Ok(Json(advice).into_response())
}

/// `GET /api/smallest-known?at-least=k[&constructible=true]`: the smallest order n ≥ k that
/// is known (or, with `constructible=true`, that this program builds now), as the
/// `routes --json` object of n. 404 when there is none from k to k + 4096 (constructible:
/// none up to the build limit 32768; a k above it is answered at once).
pub async fn smallest_known(
    State(state): State<Arc<AppState>>,
    Query(q): Query<HashMap<String, String>>,
) -> ApiResult {
    let Some(k) = q.get("at-least") else {
        return Err(ApiError::bad_request(
            "give the least acceptable order as ?at-least=k",
        ));
    };
    let k = parse_positive("at-least", k, ORDER_QUERY_MAX)?;
    let constructible = match q.get("constructible").map(String::as_str) {
        None | Some("false") | Some("0") => false,
        Some("true") | Some("1") => true,
        Some(_) => return Err(ApiError::bad_request("constructible must be true or false")),
    };
    let found = heavy(&state, move |_| {
        if constructible {
            route::smallest_constructible_at_least(k)
        } else {
            route::smallest_known_at_least(k)
        }
    })
    .await?;
    match found {
        Some(info) => Ok(Json(info).into_response()),
        None => {
            let limit = if constructible {
                route::smallest_search_limit(k).min(route::MAX_BUILD_ORDER)
            } else {
                route::smallest_search_limit(k)
            };
            let what = if constructible {
                "constructible"
            } else {
                "known"
            };
            let why = if constructible && k > route::MAX_BUILD_ORDER {
                format!(
                    "no order above the build limit {} is constructible here",
                    route::MAX_BUILD_ORDER
                )
            } else {
                format!("none from {k} up to the search limit {limit}")
            };
            let mut e =
                ApiError::not_found(format!("no {what} order at least {k} was found: {why}"))
                    .and(|b| b.at_least = Some(k));
            if limit >= k {
                e = e.and(|b| b.searched_up_to = Some(limit));
            }
            Err(e)
        }
    }
}
