//! `/api/matrices`: upload, metadata, downloads and single rows of stored matrices.

use super::helpers::{
    blocking, heavy, if_none_match, immutable_headers, not_modified, parse_id, stream_body,
    truncate, ApiError, ApiResult,
};
use crate::app::AppState;
use crate::catalogue::{Equivalence, Ingested, UploadError, UploadOutcome};
use crate::store::matrices::{self, MatrixRecord, Origin};
use axum::body::Body;
use axum::extract::{Path, Query, State};
use axum::http::{header, HeaderMap, HeaderValue, StatusCode};
use axum::response::IntoResponse;
use axum::Json;
use hadamard_core::diagnose::{Diagnosis, Verdict};
use hadamard_core::formats::{self, Format, ReadOptions, WriteFormat};
use hadamard_core::json::{completion_json, repair_json};
use hadamard_core::repair::Completion;
use hadamard_core::verify::{Properties, Report};
use hadamard_core::wire::{
    self, CatalogueRef, DerivedLinks, ErrorKind, InvariantInfo, MatrixInfo, MatrixSummary,
    NotHadamardBody, Provenance, RowAnswer, UploadAnswer, UploadEquivalence, Verification,
};
use http_body_util::{BodyExt, LengthLimitError, Limited};
use serde_json::Value;
use std::collections::HashMap;
use std::sync::Arc;

/// The download formats, as `?format=` names.
pub use hadamard_core::wire::endpoints::DOWNLOAD_FORMATS;

/// `POST /api/matrices`: the raw body is a matrix file in any input format (or the one
/// `?format=` forces; `?bits-minus=0` says `0` stands for −1 in `bits`). The server parses and
/// runs the exact check itself. 201 stored now, 200 already stored, 422 not Hadamard (with
/// the failing pairs) or with erased entries, 400 malformed (with the place), 413 too large.
pub async fn upload(
    State(state): State<Arc<AppState>>,
    Query(q): Query<HashMap<String, String>>,
    headers: HeaderMap,
    body: Body,
) -> ApiResult {
    let limit = state.config.max_body_bytes;
    let too_large = || {
        ApiError::new(
            StatusCode::PAYLOAD_TOO_LARGE,
            format!("the body is larger than this server's limit of {limit} bytes (--max-body)"),
        )
        .limit(limit)
    };
    // A declared length over the limit is refused before a byte of the body is read.
    let declared = headers
        .get(header::CONTENT_LENGTH)
        .and_then(|v| v.to_str().ok())
        .and_then(|v| v.trim().parse::<u64>().ok());
    if declared.is_some_and(|d| d > limit as u64) {
        return Err(too_large());
    }
    let mut opts = ReadOptions {
        max_order: state.config.max_order,
        ..ReadOptions::default()
    };
    if let Some(f) = q.get("format") {
        opts.format = Some(f.parse::<Format>().map_err(|_| {
            ApiError::bad_request(format!(
                "unknown format `{}`: use pm, int (csv), bits, json or npy",
                truncate(f, 40)
            ))
        })?);
    }
    match q.get("bits-minus").map(String::as_str) {
        None | Some("1") => {}
        Some("0") => opts.bits_one_is_negative = false,
        Some(_) => {
            return Err(ApiError::bad_request(
                "bits-minus must be 0 or 1: the digit that stands for −1",
            ))
        }
    }
    let (bytes, held) = read_upload(&state, body, limit, too_large).await?;
    if bytes.is_empty() {
        return Err(ApiError::bad_request(
            "the body is empty: send the matrix file as the raw request body",
        ));
    }
    let outcome = heavy(&state, move |c| {
        let _held = held;
        c.upload(&bytes, &opts)
    })
    .await?;
    match outcome {
        Ok(UploadOutcome::Stored(ing)) => {
            let status = if ing.created {
                StatusCode::CREATED
            } else {
                StatusCode::OK
            };
            let location = HeaderValue::from_str(&format!("/m/{}", ing.record.id))
                .unwrap_or_else(|_| HeaderValue::from_static("/"));
            if ing.created {
                tracing::info!(id = %ing.record.id, order = ing.record.order, "stored an uploaded matrix");
            }
            Ok((
                status,
                [(header::LOCATION, location)],
                Json(upload_answer(&ing)),
            )
                .into_response())
        }
        Ok(UploadOutcome::Refused { report, diagnosis }) => Err(refusal(&report, &diagnosis)),
        Err(UploadError::Malformed(p)) if p.over_max_order => Err(ApiError::new(
            StatusCode::PAYLOAD_TOO_LARGE,
            format!(
                "{p} (this server's --max-order is {})",
                state.config.max_order
            ),
        )
        .kind(ErrorKind::OverMaxOrder)
        .limit(state.config.max_order)
        .and(|b| b.location = Some(p.location))),
        Err(UploadError::Malformed(p)) => Err(ApiError::bad_request(p.to_string())
            .kind(ErrorKind::Malformed)
            .and(|b| b.location = Some(p.location))),
        Err(UploadError::Store(e)) => Err(e.into()),
    }
}

/// Reads an upload's body within `--body-timeout`, counting every byte held against the
/// server-wide `--upload-buffer-mib`; the permits travel with the bytes until the upload is
/// parsed and checked.
async fn read_upload(
    state: &Arc<AppState>,
    body: Body,
    limit: usize,
    too_large: impl Fn() -> ApiError,
) -> ApiResult<(bytes::Bytes, tokio::sync::OwnedSemaphorePermit)> {
    let deadline = state.config.body_timeout;
    let budget = state.config.upload_buffer_bytes;
    let busy = || {
        ApiError::new(
            StatusCode::SERVICE_UNAVAILABLE,
            format!("the server is receiving as many uploads as it holds at once ({} MiB, --upload-buffer-mib); retry in a moment", budget >> 20),
        )
    };
    // One KiB permit up front, so that the permit handle exists; more as bytes arrive.
    let mut held = state
        .upload_buffer
        .clone()
        .try_acquire_owned()
        .map_err(|_| busy())?;
    let mut held_kib = 1usize;
    let mut buf = bytes::BytesMut::new();
    let mut body = Limited::new(body, limit);
    let read = async {
        while let Some(frame) = body.frame().await {
            let frame = match frame {
                Ok(f) => f,
                Err(e) if e.downcast_ref::<LengthLimitError>().is_some() => return Err(too_large()),
                Err(e) => {
                    return Err(ApiError::bad_request(format!(
                        "could not read the request body: {e}"
                    )))
                }
            };
            if let Ok(data) = frame.into_data() {
                let need = (buf.len() + data.len()).div_ceil(1024);
                if need > held_kib {
                    let more = state
                        .upload_buffer
                        .clone()
                        .try_acquire_many_owned((need - held_kib) as u32)
                        .map_err(|_| busy())?;
                    held.merge(more);
                    held_kib = need;
                }
                buf.extend_from_slice(&data);
            }
        }
        Ok(())
    };
    match tokio::time::timeout(deadline, read).await {
        Ok(Ok(())) => Ok((buf.freeze(), held)),
        Ok(Err(e)) => Err(e),
        Err(_) => Err(ApiError::new(
            StatusCode::REQUEST_TIMEOUT,
            format!(
                "the body did not arrive within this server's limit of {} s (--body-timeout)",
                deadline.as_secs()
            ),
        )),
    }
}

/// The 422 answer to an upload that is not stored, from core's verdict: `incomplete` with what
/// the erased entries can be, or `not_hadamard` with the report and the wrong signs found.
fn refusal(report: &Report, d: &Diagnosis) -> ApiError {
    match (d.verdict, &d.completion) {
        (Verdict::Incomplete, Some(completion)) => {
            let erased = d.erasures.len();
            let what = match &completion.outcome {
                Completion::Unique { id, .. } => format!("orthogonality fixes them: the one completion has id {id}; upload the completed matrix to store it"),
                Completion::None => "no way of filling them gives a Hadamard matrix".into(),
                Completion::Several { .. } => "they admit several completions".into(),
                Completion::Undecided { .. } => "whether they can be completed was not settled".into(),
            };
            ApiError::new(
                StatusCode::UNPROCESSABLE_ENTITY,
                format!("incomplete: the matrix has {erased} erased entries (?), and only complete ±1 matrices are stored; {what}"),
            )
            .order(report.order)
            .and(|b| {
                b.verdict = Some(d.verdict);
                b.erased_entries = Some(erased as u64);
                b.completion = Some(completion_json(completion, &d.erasures));
            })
        }
        _ => ApiError::not_hadamard(NotHadamardBody {
            error: not_hadamard_message(report),
            verdict: d.verdict,
            failing_pairs_index_base: 0,
            repair: d.repair.as_ref().map_or(Value::Null, repair_json),
            report: report.clone(),
        }),
    }
}

fn not_hadamard_message(r: &Report) -> String {
    if r.order != r.cols {
        format!(
            "not a Hadamard matrix: it is {}×{}, not square",
            r.order, r.cols
        )
    } else if r.failing_pairs_total > 0 {
        let k = r.failing_pairs_total;
        format!(
            "not a Hadamard matrix: {k} row pair{} not orthogonal",
            if k == 1 { " is" } else { "s are" }
        )
    } else {
        format!("not a Hadamard matrix: no Hadamard matrix of order {} exists (it is not 1, 2 or a multiple of 4)", r.order)
    }
}

fn upload_answer(ing: &Ingested) -> UploadAnswer {
    let r = &ing.record;
    UploadAnswer {
        verdict: Verdict::Hadamard,
        id: r.id.clone(),
        url: format!("/m/{}", r.id),
        api_url: format!("/api/matrices/{}", r.id),
        order: r.order as u64,
        stored_now: ing.created,
        properties: properties(r),
        provenance: provenance(r),
        verification: verification(r),
        equivalence: equivalence(&ing.equivalence),
    }
}

fn equivalence(e: &Equivalence) -> UploadEquivalence {
    let Some(kind) = e.kind else {
        return UploadEquivalence {
            invariant: None,
            compared_with: None,
            possibly_equivalent_to: None,
            possibly_equivalent_count: None,
            proven_new: None,
            note: format!(
                "equivalence was not examined: the 4-profile is computed only up to order {}",
                crate::catalogue::invariant::PROFILE_MAX_ORDER
            ),
        };
    };
    let note = if e.compared_with == 0 {
        "no other stored matrix of this order to compare with".to_owned()
    } else if e.matches == 0 {
        format!("its {kind} differs from that of all {} other stored matrices of this order, which proves it inequivalent to each of them", e.compared_with)
    } else {
        format!(
            "possibly equivalent to {} stored matrices of this order: they share its {kind}, which does not prove equivalence; it is inequivalent to the other {}",
            e.matches,
            e.compared_with - e.matches
        )
    };
    UploadEquivalence {
        invariant: Some(kind.to_owned()),
        compared_with: Some(e.compared_with),
        possibly_equivalent_to: Some(e.possibly_equivalent_to.clone()),
        possibly_equivalent_count: Some(e.matches),
        proven_new: Some(e.matches == 0),
        note,
    }
}

/// A stored JSON column, read back (`None` if it does not parse, which the audit reports).
fn stored<T: serde::de::DeserializeOwned>(text: &str) -> Option<T> {
    serde_json::from_str(text).ok()
}

fn properties(r: &MatrixRecord) -> Option<Properties> {
    stored(&r.properties_json)
}

fn provenance(r: &MatrixRecord) -> Provenance {
    match r.origin {
        Origin::Constructed => Provenance::Constructed {
            constructed_at: r.created_at.clone(),
            recipe: r.recipe_json.as_deref().and_then(stored),
        },
        Origin::Uploaded => Provenance::Uploaded {
            uploaded_at: r.created_at.clone(),
            received_format: r.received_format.clone(),
        },
    }
}

fn verification(r: &MatrixRecord) -> Verification {
    Verification {
        check: r.check_name.clone(),
        check_version: r.check_version,
        kernel: r.kernel.clone(),
        verified_at: r.verified_at.clone(),
    }
}

/// The short form of a stored matrix, for listings.
pub fn summary(r: &MatrixRecord) -> MatrixSummary {
    MatrixSummary {
        id: r.id.clone(),
        url: format!("/m/{}", r.id),
        order: r.order as u64,
        origin: match r.origin {
            Origin::Constructed => wire::Origin::Constructed,
            Origin::Uploaded => wire::Origin::Uploaded,
        },
        created_at: r.created_at.clone(),
        properties: properties(r),
    }
}

/// `GET /api/matrices/{id}`: order, properties, invariant, provenance, verification record,
/// and the download links. 400 for a malformed id, 404 for one not stored.
pub async fn show(State(state): State<Arc<AppState>>, Path(id): Path<String>) -> ApiResult {
    let id = parse_id(&id)?.to_owned();
    let key = id.clone();
    let (rec, entry) = blocking(&state, move |c| {
        c.store.read(|db| {
            Ok((
                matrices::get(db, &key)?,
                matrices::catalogue_entry_of(db, &key)?,
            ))
        })
    })
    .await??;
    let Some(r) = rec else {
        return Err(ApiError::not_found(format!("no stored matrix has id {id}")));
    };
    let downloads = DOWNLOAD_FORMATS
        .iter()
        .map(|f| {
            (
                (*f).to_owned(),
                format!("/api/matrices/{id}/download?format={f}"),
            )
        })
        .collect();
    Ok(Json(MatrixInfo {
        id: r.id.clone(),
        url: format!("/m/{}", r.id),
        order: r.order as u64,
        properties: properties(&r),
        invariant: r.invariant_kind.as_ref().map(|k| InvariantInfo {
            kind: k.clone(),
            value: r.invariant.as_deref().and_then(stored),
        }),
        provenance: provenance(&r),
        catalogue_entry: entry.map(|(recipe, at)| CatalogueRef {
            order: r.order as u64,
            built_at: at,
            recipe: stored(&recipe),
        }),
        verification: verification(&r),
        downloads,
        rows_url: format!("/api/matrices/{id}/rows/{{i}}"),
        derived: DerivedLinks::of(&id, r.order),
    })
    .into_response())
}

/// A download format with its options, and the tag that tells its representation apart.
fn download_format(q: &HashMap<String, String>) -> ApiResult<(WriteFormat, String)> {
    let name = q.get("format").map(String::as_str).unwrap_or("pm");
    let mut f: WriteFormat = name.parse().map_err(|_| {
        ApiError::bad_request(format!(
            "unknown download format `{}`: use one of {}",
            truncate(name, 40),
            DOWNLOAD_FORMATS.join(", ")
        ))
    })?;
    let tag = match &mut f {
        WriteFormat::Bits { one_is_negative } => {
            match q.get("minus").map(String::as_str) {
                None | Some("1") => *one_is_negative = true,
                Some("0") => *one_is_negative = false,
                Some(_) => {
                    return Err(ApiError::bad_request(
                        "minus must be 0 or 1: the digit that stands for −1 in `bits`",
                    ))
                }
            }
            format!("bits-minus{}", if *one_is_negative { 1 } else { 0 })
        }
        WriteFormat::Png { scale, .. } => {
            if let Some(s) = q.get("scale") {
                *scale = s.parse::<u32>().ok().filter(|s| *s <= 32).ok_or_else(|| {
                    ApiError::bad_request("scale must be an integer from 0 (automatic) to 32")
                })?;
            }
            format!("png-s{scale}")
        }
        other => other.name().to_owned(),
    };
    Ok((f, tag))
}

/// `GET /api/matrices/{id}/download?format=F`: the matrix in format F (`pm` by default;
/// `bits` takes `minus=1|0`, `png` takes `scale=0..32`). Strong ETag `"<id>.<format>"`,
/// immutable caching, 304 on `If-None-Match`.
pub async fn download(
    State(state): State<Arc<AppState>>,
    Path(id): Path<String>,
    Query(q): Query<HashMap<String, String>>,
    headers: HeaderMap,
) -> ApiResult {
    let id = parse_id(&id)?.to_owned();
    let (format, tag) = download_format(&q)?;
    let etag = format!("\"{id}.{tag}\"");
    if if_none_match(&headers, &etag) {
        let key = id.clone();
        if blocking(&state, move |c| c.exists(&key)).await?? {
            return Ok(not_modified(&etag));
        }
        return Err(ApiError::not_found(format!("no stored matrix has id {id}")));
    }
    let key = id.clone();
    // Loading (and re-checking) takes a heavy permit; writing the answer does not: it streams
    // from its own thread through a bounded queue, at the client's pace.
    let v = heavy(&state, move |c| c.load(&key)).await??;
    let Some(v) = v else {
        return Err(ApiError::not_found(format!("no stored matrix has id {id}")));
    };
    let n = v.order();
    let f = format.clone();
    let body = stream_body(move |w| formats::write_to(v.matrix(), &f, w));
    // Each format has its own name, so the three `.npy` variants never overwrite each other.
    let filename = match format {
        WriteFormat::Pm => format!("hadamard-{n}-{}.txt", &id[..12]),
        WriteFormat::Npy => format!("hadamard-{n}-{}-int8.npy", &id[..12]),
        WriteFormat::Bits { .. } => format!("hadamard-{n}-{}-bits.txt", &id[..12]),
        _ => format!(
            "hadamard-{n}-{}-{}.{}",
            &id[..12],
            format.name(),
            format.extension()
        ),
    };
    let mut resp = (StatusCode::OK, immutable_headers(&etag), body).into_response();
    let h = resp.headers_mut();
    h.insert(
        header::CONTENT_TYPE,
        HeaderValue::from_static(format.media_type()),
    );
    if let Ok(v) = HeaderValue::from_str(&format!("attachment; filename=\"{filename}\"")) {
        h.insert(header::CONTENT_DISPOSITION, v);
    }
    if let WriteFormat::Bits { one_is_negative } = format {
        h.insert(
            "x-bits-minus",
            HeaderValue::from_static(if one_is_negative { "1" } else { "0" }),
        );
    }
    Ok(resp)
}

/// `GET /api/matrices/{id}/rows/{i}`: row i (from 0) as `+`/`-` text and as ±1 values. For
/// spreading codes and replicate weights, where one row is all that is needed.
pub async fn row(
    State(state): State<Arc<AppState>>,
    Path((id, i)): Path<(String, String)>,
    headers: HeaderMap,
) -> ApiResult {
    let id = parse_id(&id)?.to_owned();
    let i: usize = i.parse().map_err(|_| {
        ApiError::bad_request(format!(
            "the row must be a non-negative integer (rows count from 0), not `{}`",
            truncate(&i, 40)
        ))
    })?;
    let etag = format!("\"{id}.row{i}\"");
    let key = id.clone();
    let v = heavy(&state, move |c| c.load(&key)).await??;
    let Some(v) = v else {
        return Err(ApiError::not_found(format!("no stored matrix has id {id}")));
    };
    let n = v.order();
    if i >= n {
        return Err(ApiError::not_found(format!(
            "matrix {id} has order {n}: its rows are 0 to {}",
            n - 1
        ))
        .order(n));
    }
    if if_none_match(&headers, &etag) {
        return Ok(not_modified(&etag));
    }
    let m = v.matrix();
    let pm: String = (0..n)
        .map(|j| if m.is_negative(i, j) { '-' } else { '+' })
        .collect();
    let values: Vec<i8> = (0..n).map(|j| m.get(i, j)).collect();
    let body = RowAnswer {
        id,
        order: n as u64,
        row: i as u64,
        index_base: 0,
        pm,
        values,
    };
    Ok((immutable_headers(&etag), Json(body)).into_response())
}
