-- Schema version 1 of the Hadamard Registry catalogue.
--
-- Matrices are immutable: rows are only ever inserted (never updated or deleted) once the
-- exact check has passed. Orders and sequences are the seed catalogue, rewritten as a whole
-- when the binary's catalogue changes (see store::seed).

CREATE TABLE meta (
    key   TEXT PRIMARY KEY,
    value TEXT NOT NULL
) STRICT;

-- The status and routes of every possible order up to the seeded maximum, as `routes --json`.
CREATE TABLE orders (
    n         INTEGER PRIMARY KEY,
    status    TEXT NOT NULL,
    info_json TEXT NOT NULL
) STRICT;

-- The sequence data of seed-catalogue/sequences/, with its provenance.
CREATE TABLE sequences (
    family     TEXT NOT NULL,
    length     INTEGER NOT NULL,
    data_json  TEXT NOT NULL,
    provenance TEXT NOT NULL,
    source     TEXT NOT NULL PRIMARY KEY
) STRICT;

CREATE TABLE matrices (
    id              TEXT PRIMARY KEY CHECK (length(id) = 64),
    n               INTEGER NOT NULL CHECK (n >= 1),
    -- n rows of ceil(n/64) little-endian u64 words; bit set = -1; padding bits zero.
    bits            BLOB NOT NULL,
    properties_json TEXT NOT NULL,
    -- 'profile4' (the 4-profile, for n <= invariant::PROFILE_MAX_ORDER) or NULL.
    invariant_kind  TEXT,
    invariant       TEXT,
    -- How the matrix first reached the catalogue.
    origin          TEXT NOT NULL CHECK (origin IN ('constructed', 'uploaded')),
    recipe_json     TEXT,
    received_format TEXT,
    created_at      TEXT NOT NULL,
    -- The verification record.
    check_name      TEXT NOT NULL,
    check_version   INTEGER NOT NULL,
    kernel          TEXT NOT NULL,
    verified_at     TEXT NOT NULL
) STRICT;

CREATE INDEX matrices_by_order ON matrices (n, created_at);
CREATE INDEX matrices_by_invariant ON matrices (n, invariant_kind, invariant);

-- The catalogue's own matrix of an order: the one `GET /api/orders/{n}/matrix` serves.
CREATE TABLE catalogue_entries (
    n           INTEGER PRIMARY KEY,
    matrix_id   TEXT NOT NULL REFERENCES matrices (id),
    recipe_json TEXT NOT NULL,
    built_at    TEXT NOT NULL
) STRICT;
