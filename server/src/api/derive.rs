//! `/api/matrices/{id}/derive/{kind}`, `/api/brr` and `/api/equivalence`: the objects of
//! `hadamard_core::derive`, made from stored (and so verified) matrices. Each handler parses
//! its query into core's configuration, runs core on a heavy thread, and writes JSON or the
//! object's own file format. A parameter that is wrong is a 400 naming it.

use super::helpers::{heavy, parse_id, stream_body, stream_json, truncate, ApiError, ApiResult};
use super::orders::catalogue_entry;
use crate::app::AppState;
use axum::body::Body;
use axum::extract::{Path, Query, State};
use axum::http::{header, HeaderValue, StatusCode};
use axum::response::{IntoResponse, Response};
use axum::Json;
use hadamard_core::derive::block_design::symmetric_design;
use hadamard_core::derive::brr::replication;
use hadamard_core::derive::codes::hadamard_code;
use hadamard_core::derive::equivalence::{equivalence, DEFAULT_NODE_BUDGET};
use hadamard_core::derive::ordering::{
    reorder, sequency_report, write_scaled, RowOrder, ScaledFormat,
};
use hadamard_core::derive::screening::{screening_design, ScreeningConfig};
use hadamard_core::derive::DeriveError;
use hadamard_core::formats::{self, WriteFormat};
use hadamard_core::route;
use hadamard_core::verify::Verified;
use hadamard_core::wire::BrrAnswer;
use std::collections::HashMap;
use std::sync::Arc;

/// The kinds of `/derive/{kind}`.
pub use hadamard_core::wire::endpoints::DERIVE_KINDS as KINDS;

/// The largest order whose designs, codes and replicates are served (their JSON grows as n²).
pub const DERIVE_MAX_ORDER: usize = 2048;

/// The largest order `/api/equivalence` searches; and the work it may do, in node·n² units.
pub const EQUIVALENCE_MAX_ORDER: usize = 256;
const EQUIVALENCE_WORK: u64 = 4_000_000_000;

type Q = HashMap<String, String>;

fn bad(e: DeriveError) -> ApiError {
    ApiError::bad_request(e.to_string()).parameter(e.parameter)
}

fn number<T: std::str::FromStr>(q: &Q, name: &str) -> ApiResult<Option<T>> {
    q.get(name)
        .map(|s| {
            s.trim().parse::<T>().map_err(|_| {
                ApiError::bad_request(format!(
                    "{name} must be a non-negative integer, not `{}`",
                    truncate(s, 40)
                ))
                .parameter(name)
            })
        })
        .transpose()
}

fn flag(q: &Q, name: &str) -> ApiResult<bool> {
    match q.get(name).map(String::as_str) {
        None | Some("false") | Some("0") => Ok(false),
        Some("true") | Some("1") | Some("") => Ok(true),
        Some(s) => Err(ApiError::bad_request(format!(
            "{name} must be true or false, not `{}`",
            truncate(s, 40)
        ))
        .parameter(name)),
    }
}

fn list(q: &Q, name: &str) -> Option<Vec<String>> {
    q.get(name)
        .map(|s| s.split(',').map(|x| x.trim().to_owned()).collect())
}

/// The most bytes one ordering answer may have (it streams, so this bounds the work and the
/// bandwidth, not memory): order 8192 as scaled CSV or JSON (about 1.4 GB) is refused, its
/// npy-f64 (512 MiB) is not.
pub const ORDERING_MAX_BYTES: u64 = 512 << 20;

/// A streamed text or binary answer, as an attachment named after the matrix and the object.
fn file(body: Body, media: &'static str, v: &Verified, what: &str, ext: &str) -> Response {
    let name = format!("hadamard-{}-{}-{what}.{ext}", v.order(), &v.id()[..12]);
    let mut resp = (StatusCode::OK, body).into_response();
    let h = resp.headers_mut();
    h.insert(header::CONTENT_TYPE, HeaderValue::from_static(media));
    if let Ok(d) = HeaderValue::from_str(&format!("attachment; filename=\"{name}\"")) {
        h.insert(header::CONTENT_DISPOSITION, d);
    }
    resp
}

/// The object as streamed JSON (serde writes it straight out, no tree of values) or as its
/// CSV, streamed too.
fn csv_or_json<T: serde::Serialize + Send + 'static>(
    q: &Q,
    v: &Verified,
    what: &str,
    obj: T,
    csv: fn(&T, &mut dyn std::io::Write) -> std::io::Result<()>,
) -> ApiResult {
    match q.get("format").map(String::as_str).unwrap_or("json") {
        "json" => Ok(stream_json(obj)),
        "csv" => Ok(file(
            stream_body(move |w| csv(&obj, w)),
            "text/csv; charset=utf-8",
            v,
            what,
            "csv",
        )),
        other => Err(ApiError::bad_request(format!(
            "format must be json or csv here, not `{}`",
            truncate(other, 40)
        ))
        .parameter("format")),
    }
}

async fn load(state: &Arc<AppState>, id: &str) -> ApiResult<Arc<Verified>> {
    let key = id.to_owned();
    heavy(state, move |c| c.load(&key))
        .await??
        .ok_or_else(|| ApiError::not_found(format!("no stored matrix has id {id}")))
}

/// `GET /api/matrices/{id}/derive/{kind}?…`: one derived object of a stored matrix.
pub async fn derive(
    State(state): State<Arc<AppState>>,
    Path((id, kind)): Path<(String, String)>,
    Query(q): Query<Q>,
) -> ApiResult {
    let id = parse_id(&id)?.to_owned();
    if !KINDS.contains(&kind.as_str()) {
        return Err(ApiError::not_found(format!(
            "`{}` is not a derived object: use one of {}",
            truncate(&kind, 40),
            KINDS.join(", ")
        )));
    }
    let v = load(&state, &id).await?;
    if kind != "ordering" && v.order() > DERIVE_MAX_ORDER {
        return Err(ApiError::new(StatusCode::UNPROCESSABLE_ENTITY, format!("derived objects are served up to order {DERIVE_MAX_ORDER}; this matrix has order {} (the command line has no such limit)", v.order())).limit(DERIVE_MAX_ORDER));
    }
    heavy(&state, move |_| derive_now(&v, &kind, &q)).await?
}

fn derive_now(v: &Verified, kind: &str, q: &Q) -> ApiResult {
    match kind {
        "screening" => {
            let levels = match list(q, "levels") {
                None => None,
                Some(items) => Some(
                    items
                        .iter()
                        .enumerate()
                        .map(|(k, p)| {
                            p.split_once(':')
                                .map(|(l, h)| (l.to_owned(), h.to_owned()))
                                .ok_or_else(|| {
                                    ApiError::bad_request(format!(
                                        "levels: item {}: `{}` is not LOW:HIGH",
                                        k + 1,
                                        truncate(p, 40)
                                    ))
                                    .parameter("levels")
                                })
                        })
                        .collect::<ApiResult<Vec<_>>>()?,
                ),
            };
            let columns = match list(q, "columns") {
                None => None,
                Some(items) => Some(
                    items
                        .iter()
                        .enumerate()
                        .map(|(k, c)| {
                            c.parse::<usize>().map_err(|_| {
                                ApiError::bad_request(format!(
                                    "columns: item {}: `{}` is not a column number",
                                    k + 1,
                                    truncate(c, 40)
                                ))
                                .parameter("columns")
                            })
                        })
                        .collect::<ApiResult<Vec<_>>>()?,
                ),
            };
            let cfg = ScreeningConfig {
                factors: number(q, "factors")?,
                columns,
                names: list(q, "names"),
                levels,
                fold_over: flag(q, "fold-over")?,
                centre_points: number(q, "centre-points")?.unwrap_or(0),
                seed: number(q, "seed")?,
            };
            // Distinct names for the two files a user is likely to keep side by side.
            let what = match (cfg.fold_over, cfg.factors) {
                (true, Some(k)) => format!("screening-{k}-factors-foldover"),
                (true, None) => "screening-foldover".to_string(),
                (false, Some(k)) => format!("screening-{k}-factors"),
                (false, None) => "screening".to_string(),
            };
            let d = screening_design(v, &cfg).map_err(bad)?;
            csv_or_json(q, v, &what, d, |d, b| d.write_csv(b))
        }
        "brr" => {
            let k = number(q, "strata")?.ok_or_else(|| {
                ApiError::bad_request("give the number of strata as ?strata=k").parameter("strata")
            })?;
            let r = replication(v, k).map_err(bad)?;
            csv_or_json(q, v, "brr", r, |r, b| r.write_csv(b))
        }
        "code" => {
            let variant = q
                .get("variant")
                .map(String::as_str)
                .unwrap_or("full")
                .parse()
                .map_err(bad)?;
            let c = hadamard_code(v, variant).map_err(bad)?;
            csv_or_json(q, v, "code", c, |c, b| c.write_csv(b))
        }
        "symmetric-design" => {
            let d = symmetric_design(v).map_err(bad)?;
            csv_or_json(q, v, "symmetric-design", d, |d, b| d.write_csv(b))
        }
        "sequency" => Ok(Json(sequency_report(v.matrix())).into_response()),
        _ => ordering(v, q),
    }
}

/// `ordering`: the rows in `order=natural|sequency|dyadic`; `scaled=true` for ±1/√n floats.
fn ordering(v: &Verified, q: &Q) -> ApiResult {
    let order: RowOrder = q
        .get("order")
        .map(String::as_str)
        .unwrap_or("natural")
        .parse()
        .map_err(bad)?;
    let scaled = flag(q, "scaled")?;
    let name = q
        .get("format")
        .map(String::as_str)
        .unwrap_or(if scaled { "csv" } else { "pm" });
    let r = match reorder(v, order) {
        Ok(r) => r,
        Err(e) => {
            return Err(
                ApiError::new(StatusCode::UNPROCESSABLE_ENTITY, e.to_string())
                    .parameter(e.parameter)
                    .and(|b| b.sequency = Some(sequency_report(v.matrix()))),
            )
        }
    };
    let what = format!(
        "{}{}",
        q.get("order").map(String::as_str).unwrap_or("natural"),
        if scaled { "-scaled" } else { "" }
    );
    let n = r.matrix.order() as u64;
    let id = r.matrix.id().to_owned();
    let source = r.matrix;
    let (body, media, ext, bytes) = if scaled {
        let (f, media, ext) = match name {
            "csv" => (ScaledFormat::Csv, "text/csv; charset=utf-8", "csv"),
            "json" => (ScaledFormat::Json, "application/json", "json"),
            "npy" | "npy-f64" | "npy-f64-scaled" => {
                (ScaledFormat::Npy, "application/octet-stream", "npy")
            }
            other => {
                return Err(ApiError::bad_request(format!(
                    "scaled output is floats: format must be csv, json or npy-f64, not `{}`",
                    truncate(other, 40)
                ))
                .parameter("format"))
            }
        };
        // ±1/√n written by Rust's shortest round-trip float printing, with a separator.
        let s = 1.0 / (n.max(1) as f64).sqrt();
        let cell = format!("{}", -s).len() as u64 + 1;
        let bytes = match f {
            ScaledFormat::Npy => 8 * n * n + 128,
            _ => n * n * cell + 8 * n + 512,
        };
        let body = stream_body(move |w| write_scaled(source.matrix(), f, w));
        (body, media, ext, bytes)
    } else {
        let f: WriteFormat = name.parse().map_err(|_| {
            ApiError::bad_request(format!(
                "unknown format `{}`: use pm, csv, bits, json, npy, npy-f64 or png",
                truncate(name, 40)
            ))
            .parameter("format")
        })?;
        if let WriteFormat::NpyF64 { scaled: true } = f {
            return Err(
                ApiError::bad_request("ask for scaled output with scaled=true").parameter("format"),
            );
        }
        // The largest cell is a JSON `-1,` (3 bytes) or an npy float64 (8).
        let per = match f {
            WriteFormat::NpyF64 { .. } => 8,
            WriteFormat::Png { .. } => 1,
            _ => 3,
        };
        let bytes = per * n * n + 8 * n + 512;
        let (media, ext) = (f.media_type(), f.extension());
        let body = stream_body(move |w| formats::write_to(source.matrix(), &f, w));
        (body, media, ext, bytes)
    };
    if bytes > ORDERING_MAX_BYTES {
        return Err(ApiError::new(
            StatusCode::UNPROCESSABLE_ENTITY,
            format!("this answer would be about {} MiB, over this server's limit of {} MiB for an ordering; ask for a smaller format (npy-f64 for floats, bits or npy for ±1)", bytes >> 20, ORDERING_MAX_BYTES >> 20),
        )
        .parameter("format")
        .and(|b| b.limit_bytes = Some(ORDERING_MAX_BYTES)));
    }
    let mut resp = file(body, media, v, &what, ext);
    if let Ok(h) = HeaderValue::from_str(&id) {
        resp.headers_mut().insert("x-matrix-id", h);
    }
    resp.headers_mut().insert(
        "x-scaled",
        HeaderValue::from_static(if scaled {
            "1/sqrt(n); not normalised"
        } else {
            "no"
        }),
    );
    Ok(resp)
}

/// `GET /api/brr?strata=k`: the replicates from the catalogue's matrix of the smallest order
/// greater than k that this program builds, with the smallest known order beside it.
pub async fn brr(State(state): State<Arc<AppState>>, Query(q): Query<Q>) -> ApiResult {
    let k: usize = number(&q, "strata")?.ok_or_else(|| {
        ApiError::bad_request("give the number of strata as ?strata=k").parameter("strata")
    })?;
    if k == 0 || k >= DERIVE_MAX_ORDER {
        return Err(
            ApiError::bad_request(format!("strata must be 1 to {}", DERIVE_MAX_ORDER - 1))
                .parameter("strata"),
        );
    }
    let (known, built) = heavy(&state, move |_| {
        (
            route::smallest_known_at_least(k as u64 + 1).map(|i| i.order),
            route::smallest_constructible_at_least(k as u64 + 1).map(|i| i.order),
        )
    })
    .await?;
    let Some(n) = built else {
        return Err(ApiError::not_found(format!(
            "no order greater than {k} is within this program's reach"
        )));
    };
    let id = catalogue_entry(&state, n).await?.id;
    let v = load(&state, &id).await?;
    let source = v.clone();
    let r = heavy(&state, move |_| replication(&source, k))
        .await?
        .map_err(bad)?;
    if q.get("format").map(String::as_str) == Some("csv") {
        return Ok(file(
            stream_body(move |w| r.write_csv(w)),
            "text/csv; charset=utf-8",
            &v,
            "brr",
            "csv",
        ));
    }
    Ok(stream_json(BrrAnswer {
        replication: r,
        smallest_known_order: known,
        smallest_constructible_order: n,
        url: format!("/m/{id}"),
    }))
}

/// `GET /api/equivalence?a=ID&b=ID[&budget=N]`: are two stored matrices equivalent?
pub async fn equivalent(State(state): State<Arc<AppState>>, Query(q): Query<Q>) -> ApiResult {
    let get = |name: &str| {
        q.get(name).ok_or_else(|| {
            ApiError::bad_request(format!(
                "give both matrix ids as ?a=ID&b=ID ({name} is missing)"
            ))
            .parameter(name)
        })
    };
    let a = parse_id(get("a")?)?.to_owned();
    let b = parse_id(get("b")?)?.to_owned();
    let (va, vb) = (load(&state, &a).await?, load(&state, &b).await?);
    let n = va.order();
    if n > EQUIVALENCE_MAX_ORDER {
        return Err(ApiError::new(StatusCode::UNPROCESSABLE_ENTITY, format!("equivalence is searched here up to order {EQUIVALENCE_MAX_ORDER}; `hadamard equiv` has no such limit")).limit(EQUIVALENCE_MAX_ORDER));
    }
    let cap = (EQUIVALENCE_WORK / (n as u64 * n as u64).max(1)).max(1);
    let budget = number::<u64>(&q, "budget")?.unwrap_or(DEFAULT_NODE_BUDGET.min(cap));
    if budget > cap {
        return Err(ApiError::bad_request(format!(
            "budget is at most {cap} nodes at order {n} on this server"
        ))
        .parameter("budget")
        .limit(cap));
    }
    let r = heavy(&state, move |_| equivalence(&va, &vb, budget))
        .await?
        .map_err(bad)?;
    Ok(Json(r).into_response())
}
