//! Filling the store from the seed catalogue the binary carries.
//!
//! The orders 1..=[`SEED_MAX_ORDER`] (every one that is 1, 2 or a multiple of 4) are stored
//! with their status and their `routes --json` object, as the route planner gives them; the
//! sequence data of `seed-catalogue/sequences/` (embedded in core) is stored with its
//! provenance. The fingerprint is the SHA-256 of all of it, so a restart of the same binary
//! finds the file current and writes nothing, and a binary with a newer catalogue replaces
//! the tables in one transaction. Matrices are never touched by seeding.

use crate::store::orders::{self, OrderRow, SequenceRow};
use crate::store::{Store, StoreError};
use hadamard_core::{id::sha256_hex, route, seed};
use serde::Serialize;

/// The largest order whose routes are stored (the literature table's range).
pub const SEED_MAX_ORDER: u64 = 2000;

/// What seeding did.
#[derive(Debug, PartialEq, Eq)]
pub enum Seeded {
    AlreadyCurrent,
    Written { orders: usize, sequences: usize },
}

/// Brings the orders and sequences tables up to the binary's seed. Blocking.
pub fn ensure_seeded(store: &Store) -> Result<Seeded, StoreError> {
    let orders = order_rows();
    let sequences = sequence_rows();
    let mut text = String::new();
    for o in &orders {
        text.push_str(&o.info_json);
        text.push('\n');
    }
    for s in &sequences {
        for part in [&s.family, &s.data_json, &s.provenance, &s.source] {
            text.push_str(part);
            text.push('\t');
        }
        text.push('\n');
    }
    let fingerprint = sha256_hex(text.as_bytes());
    if store.read(orders::seed_fingerprint)?.as_deref() == Some(fingerprint.as_str()) {
        return Ok(Seeded::AlreadyCurrent);
    }
    store.write(|c| orders::replace_seed(c, &orders, &sequences, SEED_MAX_ORDER, &fingerprint))?;
    Ok(Seeded::Written {
        orders: orders.len(),
        sequences: sequences.len(),
    })
}

/// The status name of an order as the API spells it.
pub fn status_name(s: route::Status) -> String {
    serde_json::to_value(s)
        .ok()
        .and_then(|v| v.as_str().map(str::to_owned))
        .unwrap_or_default()
}

fn order_rows() -> Vec<OrderRow> {
    let mut planner = route::Planner::new();
    route::coverage(SEED_MAX_ORDER)
        .into_iter()
        .map(|(n, status)| {
            let info = planner.order_info(n);
            OrderRow {
                n,
                status: status_name(status),
                info_json: serde_json::to_string(&info).unwrap_or_default(),
            }
        })
        .collect()
}

fn sequence_rows() -> Vec<SequenceRow> {
    let cat = seed::embedded();
    let mut rows = Vec::new();
    push(&mut rows, "williamson", &cat.williamson, |d| d.m());
    push(&mut rows, "golay", &cat.golay, |d| d.len());
    push(&mut rows, "base", &cat.base, |d| d.a.len());
    push(&mut rows, "turyn_type", &cat.turyn_type, |d| d.n());
    push(&mut rows, "t_sequences", &cat.t_sequences, |d| d.len());
    push(&mut rows, "goethals_seidel", &cat.goethals_seidel, |d| {
        d.v()
    });
    rows
}

fn push<T: Serialize>(
    rows: &mut Vec<SequenceRow>,
    family: &str,
    entries: &[seed::Entry<T>],
    length: impl Fn(&T) -> usize,
) {
    for e in entries {
        rows.push(SequenceRow {
            family: family.to_owned(),
            length: length(&e.data) as u64,
            data_json: serde_json::to_string(&e.data).unwrap_or_default(),
            provenance: e.provenance.clone(),
            source: e.source.clone(),
        });
    }
}
