//! The `orders` and `sequences` tables: the seed catalogue as stored.
//!
//! They are written as a whole by [`replace_seed`] in one transaction, only when the seed the
//! binary carries differs from the one in the file (compared by fingerprint), so a restart
//! with the same binary writes nothing and a newer binary brings its newer table.

use super::{meta_get, meta_set, StoreError};
use rusqlite::{params, Connection, OptionalExtension};

/// One order as seeded: n, its status name, and its `routes --json` object.
pub struct OrderRow {
    pub n: u64,
    pub status: String,
    pub info_json: String,
}

/// One sequence entry as seeded.
pub struct SequenceRow {
    pub family: String,
    pub length: u64,
    pub data_json: String,
    pub provenance: String,
    pub source: String,
}

const FINGERPRINT_KEY: &str = "seed_fingerprint";
const SEED_MAX_KEY: &str = "seed_max_order";

/// The fingerprint of the seed in the file, if any.
pub fn seed_fingerprint(c: &Connection) -> Result<Option<String>, StoreError> {
    meta_get(c, FINGERPRINT_KEY)
}

/// The largest order seeded, if any.
pub fn seed_max_order(c: &Connection) -> Result<Option<u64>, StoreError> {
    Ok(meta_get(c, SEED_MAX_KEY)?.and_then(|s| s.parse().ok()))
}

/// Replaces the orders and sequences with these, in one transaction.
pub fn replace_seed(
    c: &mut Connection,
    orders: &[OrderRow],
    sequences: &[SequenceRow],
    max_order: u64,
    fingerprint: &str,
) -> Result<(), StoreError> {
    let tx = c.transaction()?;
    tx.execute("DELETE FROM orders", [])?;
    tx.execute("DELETE FROM sequences", [])?;
    {
        let mut ins =
            tx.prepare("INSERT INTO orders (n, status, info_json) VALUES (?1, ?2, ?3)")?;
        for o in orders {
            ins.execute(params![o.n as i64, o.status, o.info_json])?;
        }
        let mut ins = tx.prepare("INSERT INTO sequences (family, length, data_json, provenance, source) VALUES (?1, ?2, ?3, ?4, ?5)")?;
        for s in sequences {
            ins.execute(params![
                s.family,
                s.length as i64,
                s.data_json,
                s.provenance,
                s.source
            ])?;
        }
    }
    meta_set(&tx, SEED_MAX_KEY, &max_order.to_string())?;
    meta_set(&tx, FINGERPRINT_KEY, fingerprint)?;
    tx.commit()?;
    Ok(())
}

/// The stored `routes --json` object of order n.
pub fn order_info_json(c: &Connection, n: u64) -> Result<Option<String>, StoreError> {
    let mut st = c.prepare_cached("SELECT info_json FROM orders WHERE n = ?1")?;
    Ok(st.query_row([n as i64], |r| r.get(0)).optional()?)
}

/// The stored (n, status) of every order up to `max`, ascending.
pub fn statuses_up_to(c: &Connection, max: u64) -> Result<Vec<(u64, String)>, StoreError> {
    let mut st = c.prepare_cached("SELECT n, status FROM orders WHERE n <= ?1 ORDER BY n")?;
    let rows = st.query_map([max as i64], |r| {
        Ok((r.get::<_, i64>(0)? as u64, r.get(1)?))
    })?;
    Ok(rows.collect::<Result<Vec<_>, _>>()?)
}

/// How many sequence entries are stored, per family.
pub fn sequence_counts(c: &Connection) -> Result<Vec<(String, u64)>, StoreError> {
    let mut st =
        c.prepare_cached("SELECT family, count(*) FROM sequences GROUP BY family ORDER BY family")?;
    let rows = st.query_map([], |r| Ok((r.get(0)?, r.get::<_, i64>(1)? as u64)))?;
    Ok(rows.collect::<Result<Vec<_>, _>>()?)
}
