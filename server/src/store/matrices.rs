//! The `matrices` and `catalogue_entries` tables.
//!
//! A row is written once, after the exact check, and never changed. The blob is the matrix's
//! packed words ([`hadamard_core::Matrix::words`]) as little-endian u64s; [`decode`] turns it
//! back into a `Matrix` and refuses a blob of the wrong length.

use super::StoreError;
use hadamard_core::Matrix;
use rusqlite::{params, Connection, OptionalExtension, Row};

/// Everything stored about one matrix except its bits.
#[derive(Clone, Debug, PartialEq)]
pub struct MatrixRecord {
    pub id: String,
    pub order: usize,
    pub properties_json: String,
    pub invariant_kind: Option<String>,
    pub invariant: Option<String>,
    pub origin: Origin,
    pub recipe_json: Option<String>,
    pub received_format: Option<String>,
    pub created_at: String,
    pub check_name: String,
    pub check_version: i64,
    pub kernel: String,
    pub verified_at: String,
}

/// How a matrix first reached the catalogue.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Origin {
    Constructed,
    Uploaded,
}

impl Origin {
    pub fn as_str(self) -> &'static str {
        match self {
            Origin::Constructed => "constructed",
            Origin::Uploaded => "uploaded",
        }
    }
}

/// The record columns, in the order [`record`] reads them. A macro so that every statement
/// stays a compile-time constant (`concat!`), never a string built at run time.
macro_rules! columns {
    () => {
        "id, n, properties_json, invariant_kind, invariant, origin, recipe_json, received_format, created_at, check_name, check_version, kernel, verified_at"
    };
}

fn record(r: &Row<'_>) -> rusqlite::Result<MatrixRecord> {
    let origin: String = r.get(5)?;
    let n: i64 = r.get(1)?;
    Ok(MatrixRecord {
        id: r.get(0)?,
        order: usize::try_from(n).unwrap_or(0),
        properties_json: r.get(2)?,
        invariant_kind: r.get(3)?,
        invariant: r.get(4)?,
        origin: if origin == "constructed" {
            Origin::Constructed
        } else {
            Origin::Uploaded
        },
        recipe_json: r.get(6)?,
        received_format: r.get(7)?,
        created_at: r.get(8)?,
        check_name: r.get(9)?,
        check_version: r.get(10)?,
        kernel: r.get(11)?,
        verified_at: r.get(12)?,
    })
}

/// The blob of a matrix.
pub fn encode(m: &Matrix) -> Vec<u8> {
    let mut out = Vec::with_capacity(m.words().len() * 8);
    for w in m.words() {
        out.extend_from_slice(&w.to_le_bytes());
    }
    out
}

/// The matrix of a blob, or `None` when its length does not fit order `n`.
pub fn decode(n: usize, blob: &[u8]) -> Option<Matrix> {
    if !blob.len().is_multiple_of(8) {
        return None;
    }
    let words = blob
        .chunks_exact(8)
        .map(|c| u64::from_le_bytes(c.try_into().unwrap_or([0; 8])))
        .collect();
    Matrix::from_words(n, n, words)
}

/// Inserts a record with its bits unless the id is already stored. True when inserted.
pub fn insert(c: &Connection, rec: &MatrixRecord, bits: &[u8]) -> Result<bool, StoreError> {
    let n = c.execute(
        "INSERT INTO matrices (id, n, bits, properties_json, invariant_kind, invariant, origin, recipe_json, received_format, created_at, check_name, check_version, kernel, verified_at)
         VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10, ?11, ?12, ?13, ?14)
         ON CONFLICT (id) DO NOTHING",
        params![
            rec.id,
            rec.order as i64,
            bits,
            rec.properties_json,
            rec.invariant_kind,
            rec.invariant,
            rec.origin.as_str(),
            rec.recipe_json,
            rec.received_format,
            rec.created_at,
            rec.check_name,
            rec.check_version,
            rec.kernel,
            rec.verified_at
        ],
    )?;
    Ok(n == 1)
}

/// The record of `id`, if stored.
pub fn get(c: &Connection, id: &str) -> Result<Option<MatrixRecord>, StoreError> {
    let mut st = c.prepare_cached(concat!(
        "SELECT ",
        columns!(),
        " FROM matrices WHERE id = ?1"
    ))?;
    Ok(st.query_row([id], record).optional()?)
}

/// The order and bits of `id`, if stored.
pub fn get_bits(c: &Connection, id: &str) -> Result<Option<(usize, Vec<u8>)>, StoreError> {
    let mut st = c.prepare_cached("SELECT n, bits FROM matrices WHERE id = ?1")?;
    let row: Option<(i64, Vec<u8>)> = st
        .query_row([id], |r| Ok((r.get(0)?, r.get(1)?)))
        .optional()?;
    Ok(row.map(|(n, b)| (usize::try_from(n).unwrap_or(0), b)))
}

/// How many matrices of order `n` are stored.
pub fn count_of_order(c: &Connection, n: usize) -> Result<u64, StoreError> {
    let k: i64 = c.query_row(
        "SELECT count(*) FROM matrices WHERE n = ?1",
        [n as i64],
        |r| r.get(0),
    )?;
    Ok(k as u64)
}

/// How many matrices are stored.
pub fn count(c: &Connection) -> Result<u64, StoreError> {
    let k: i64 = c.query_row("SELECT count(*) FROM matrices", [], |r| r.get(0))?;
    Ok(k as u64)
}

/// The stored matrices of order `n`, oldest first, a page at a time.
pub fn list_of_order(
    c: &Connection,
    n: usize,
    limit: u32,
    offset: u64,
) -> Result<Vec<MatrixRecord>, StoreError> {
    let mut st = c.prepare_cached(concat!(
        "SELECT ",
        columns!(),
        " FROM matrices WHERE n = ?1 ORDER BY created_at, id LIMIT ?2 OFFSET ?3"
    ))?;
    let rows = st.query_map(params![n as i64, limit, offset as i64], record)?;
    Ok(rows.collect::<Result<Vec<_>, _>>()?)
}

/// The ids of stored matrices of order `n` with the same invariant, other than `except`, at
/// most `limit` of them, and how many there are in all.
pub fn same_invariant(
    c: &Connection,
    n: usize,
    kind: &str,
    invariant: &str,
    except: &str,
    limit: u32,
) -> Result<(Vec<String>, u64), StoreError> {
    let mut st = c.prepare_cached("SELECT id FROM matrices WHERE n = ?1 AND invariant_kind = ?2 AND invariant = ?3 AND id <> ?4 ORDER BY created_at, id LIMIT ?5")?;
    let ids = st
        .query_map(params![n as i64, kind, invariant, except, limit], |r| {
            r.get(0)
        })?
        .collect::<Result<Vec<String>, _>>()?;
    let total: i64 = c.query_row(
        "SELECT count(*) FROM matrices WHERE n = ?1 AND invariant_kind = ?2 AND invariant = ?3 AND id <> ?4",
        params![n as i64, kind, invariant, except],
        |r| r.get(0),
    )?;
    Ok((ids, total as u64))
}

/// How many other stored matrices of order `n` carry an invariant of this kind.
pub fn count_with_invariant(
    c: &Connection,
    n: usize,
    kind: &str,
    except: &str,
) -> Result<u64, StoreError> {
    let k: i64 = c.query_row(
        "SELECT count(*) FROM matrices WHERE n = ?1 AND invariant_kind = ?2 AND id <> ?3",
        params![n as i64, kind, except],
        |r| r.get(0),
    )?;
    Ok(k as u64)
}

/// The catalogue's own matrix of order `n`: its id and recipe.
pub fn catalogue_entry(
    c: &Connection,
    n: usize,
) -> Result<Option<(String, String, String)>, StoreError> {
    let mut st = c.prepare_cached(
        "SELECT matrix_id, recipe_json, built_at FROM catalogue_entries WHERE n = ?1",
    )?;
    Ok(st
        .query_row([n as i64], |r| Ok((r.get(0)?, r.get(1)?, r.get(2)?)))
        .optional()?)
}

/// The recipe and build time when `id` is the catalogue's own matrix of its order.
pub fn catalogue_entry_of(
    c: &Connection,
    id: &str,
) -> Result<Option<(String, String)>, StoreError> {
    let mut st = c.prepare_cached(
        "SELECT recipe_json, built_at FROM catalogue_entries WHERE matrix_id = ?1",
    )?;
    Ok(st
        .query_row([id], |r| Ok((r.get(0)?, r.get(1)?)))
        .optional()?)
}

/// Records `id` as the catalogue's matrix of order `n` (first one wins).
pub fn set_catalogue_entry(
    c: &Connection,
    n: usize,
    id: &str,
    recipe_json: &str,
    built_at: &str,
) -> Result<(), StoreError> {
    c.execute(
        "INSERT INTO catalogue_entries (n, matrix_id, recipe_json, built_at) VALUES (?1, ?2, ?3, ?4) ON CONFLICT (n) DO NOTHING",
        params![n as i64, id, recipe_json, built_at],
    )?;
    Ok(())
}
