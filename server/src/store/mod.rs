//! The catalogue's persistence: one SQLite file, owned by the server and nothing else.
//!
//! One idea: SQLite in WAL mode with one writer connection and a few reader connections,
//! each behind its own mutex and used only from blocking threads (`spawn_blocking`), never on
//! the async executor. WAL lets readers run while the writer commits. `synchronous = FULL`
//! makes every acknowledged write durable: a transaction has reached the disk before the
//! HTTP answer that reports it is sent, so a crash (even of the machine) loses no upload that
//! was answered 201.
//!
//! The schema is versioned: `migrations/NNNN_*.sql` are applied in order, each in its own
//! transaction, and recorded in `schema_migrations`. A file written by a newer binary (a
//! version this one does not know) is refused rather than guessed at.
//!
//! Every statement is a constant string with `?` parameters; no SQL is built from strings.

pub mod matrices;
pub mod orders;

use rusqlite::{Connection, OpenFlags, OptionalExtension};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;
use std::time::Duration;

/// The migrations, in order: (version, SQL).
const MIGRATIONS: &[(i64, &str)] = &[(1, include_str!("migrations/0001_initial.sql"))];

/// The schema version this binary writes.
pub const SCHEMA_VERSION: i64 = 1;

/// Why the store could not be opened or used.
#[derive(Debug)]
pub enum StoreError {
    Sqlite(rusqlite::Error),
    Io(String),
    /// The file's schema is newer than this binary knows.
    TooNew {
        found: i64,
    },
    /// A stored value that cannot be what the schema says (a corrupt or hand-edited file).
    Corrupt(String),
}

impl std::fmt::Display for StoreError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            StoreError::Sqlite(e) => write!(f, "database error: {e}"),
            StoreError::Io(e) => write!(f, "{e}"),
            StoreError::TooNew { found } => write!(
                f,
                "the database has schema version {found}, newer than this binary's {SCHEMA_VERSION}; use a newer hadamard"
            ),
            StoreError::Corrupt(e) => write!(f, "corrupt record: {e}"),
        }
    }
}

impl std::error::Error for StoreError {}

impl From<rusqlite::Error> for StoreError {
    fn from(e: rusqlite::Error) -> StoreError {
        StoreError::Sqlite(e)
    }
}

/// The open database: one writer and a few readers.
pub struct Store {
    writer: Mutex<Connection>,
    readers: Vec<Mutex<Connection>>,
    next_reader: AtomicUsize,
    path: PathBuf,
}

/// How a store is opened.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Mode {
    /// Create the file and its directory if missing, and bring the schema up to date.
    ReadWrite,
    /// Open an existing file as it is (for `audit`); no schema change, no writes.
    ReadOnly,
}

impl Store {
    /// Opens (and for [`Mode::ReadWrite`] creates and migrates) the database at `path`.
    pub fn open(path: &Path, mode: Mode, readers: usize) -> Result<Store, StoreError> {
        let flags = match mode {
            Mode::ReadWrite => {
                if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
                    std::fs::create_dir_all(dir).map_err(|e| {
                        StoreError::Io(format!("cannot create {}: {e}", dir.display()))
                    })?;
                }
                OpenFlags::SQLITE_OPEN_READ_WRITE | OpenFlags::SQLITE_OPEN_CREATE
            }
            Mode::ReadOnly => {
                if !path.exists() {
                    return Err(StoreError::Io(format!("no database at {}", path.display())));
                }
                OpenFlags::SQLITE_OPEN_READ_ONLY
            }
        };
        let flags = flags | OpenFlags::SQLITE_OPEN_NO_MUTEX | OpenFlags::SQLITE_OPEN_URI;
        let mut writer = Connection::open_with_flags(path, flags)?;
        configure(&writer)?;
        if mode == Mode::ReadWrite {
            writer.pragma_update(None, "journal_mode", "WAL")?;
            migrate(&mut writer)?;
        } else {
            let v = schema_version(&writer)?;
            if v > SCHEMA_VERSION {
                return Err(StoreError::TooNew { found: v });
            }
        }
        let reader_flags =
            (flags - OpenFlags::SQLITE_OPEN_CREATE - OpenFlags::SQLITE_OPEN_READ_WRITE)
                | OpenFlags::SQLITE_OPEN_READ_ONLY;
        let mut rs = Vec::new();
        for _ in 0..readers.max(1) {
            let c = Connection::open_with_flags(path, reader_flags)?;
            configure(&c)?;
            rs.push(Mutex::new(c));
        }
        Ok(Store {
            writer: Mutex::new(writer),
            readers: rs,
            next_reader: AtomicUsize::new(0),
            path: path.to_path_buf(),
        })
    }

    /// The database file.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Runs `f` on a reader connection. Blocking: call from a blocking thread.
    pub fn read<T>(
        &self,
        f: impl FnOnce(&Connection) -> Result<T, StoreError>,
    ) -> Result<T, StoreError> {
        let k = self.next_reader.fetch_add(1, Ordering::Relaxed) % self.readers.len();
        // A thread that panicked while holding a connection cannot have left a transaction
        // open (rusqlite rolls back on drop), so the connection is still good.
        let conn = self.readers[k].lock().unwrap_or_else(|p| p.into_inner());
        f(&conn)
    }

    /// Runs `f` on the writer connection. Blocking: call from a blocking thread.
    pub fn write<T>(
        &self,
        f: impl FnOnce(&mut Connection) -> Result<T, StoreError>,
    ) -> Result<T, StoreError> {
        let mut conn = self.writer.lock().unwrap_or_else(|p| p.into_inner());
        f(&mut conn)
    }
}

fn configure(c: &Connection) -> rusqlite::Result<()> {
    c.busy_timeout(Duration::from_secs(10))?;
    c.pragma_update(None, "foreign_keys", true)?;
    c.pragma_update(None, "synchronous", "FULL")?;
    Ok(())
}

/// The highest migration applied, 0 for an empty file.
pub fn schema_version(c: &Connection) -> Result<i64, StoreError> {
    let has_table: Option<i64> = c
        .query_row(
            "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'schema_migrations'",
            [],
            |r| r.get(0),
        )
        .optional()?;
    if has_table.is_none() {
        return Ok(0);
    }
    Ok(c.query_row(
        "SELECT coalesce(max(version), 0) FROM schema_migrations",
        [],
        |r| r.get(0),
    )?)
}

fn migrate(c: &mut Connection) -> Result<(), StoreError> {
    c.execute_batch("CREATE TABLE IF NOT EXISTS schema_migrations (version INTEGER PRIMARY KEY, applied_at TEXT NOT NULL) STRICT")?;
    let current = schema_version(c)?;
    if current > SCHEMA_VERSION {
        return Err(StoreError::TooNew { found: current });
    }
    for (version, sql) in MIGRATIONS.iter().filter(|(v, _)| *v > current) {
        let tx = c.transaction()?;
        tx.execute_batch(sql)?;
        tx.execute(
            "INSERT INTO schema_migrations (version, applied_at) VALUES (?1, ?2)",
            rusqlite::params![version, crate::time::now_rfc3339()],
        )?;
        tx.commit()?;
        tracing::info!(version, "applied schema migration");
    }
    Ok(())
}

/// Moves the write-ahead log into the main file and empties it (on shutdown, so the file
/// alone is a complete copy).
pub fn checkpoint(c: &mut Connection) -> Result<(), StoreError> {
    c.query_row("PRAGMA wal_checkpoint(TRUNCATE)", [], |_| Ok(()))?;
    Ok(())
}

/// Reads a `meta` value.
pub fn meta_get(c: &Connection, key: &str) -> Result<Option<String>, StoreError> {
    Ok(
        c.query_row("SELECT value FROM meta WHERE key = ?1", [key], |r| r.get(0))
            .optional()?,
    )
}

/// Writes a `meta` value.
pub fn meta_set(c: &Connection, key: &str, value: &str) -> Result<(), StoreError> {
    c.execute("INSERT INTO meta (key, value) VALUES (?1, ?2) ON CONFLICT (key) DO UPDATE SET value = excluded.value", [key, value])?;
    Ok(())
}

/// `PRAGMA integrity_check`: `["ok"]` for a sound file.
pub fn integrity_check(c: &Connection) -> Result<Vec<String>, StoreError> {
    let mut st = c.prepare("PRAGMA integrity_check")?;
    let rows = st.query_map([], |r| r.get::<_, String>(0))?;
    Ok(rows.collect::<Result<Vec<_>, _>>()?)
}
