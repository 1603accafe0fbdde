//! The one list of the API's endpoints (method, path, query, summary, the statuses each
//! answers), the status table and the format names. The server's `GET /api` serves it, the
//! server's tests check that every endpoint is routed and that `docs/api.md` documents each
//! endpoint, format and status (and nothing else), and the snapshot tests check that every
//! answer's status is one its endpoint declares.

/// One endpoint of the API.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Endpoint {
    /// `GET` or `POST`.
    pub method: &'static str,
    /// The path as `docs/api.md` and the router write it, with `{placeholders}`.
    pub path: &'static str,
    /// The query it takes, as documented (`?max=M`), or empty.
    pub query: &'static str,
    /// What it answers, in a few words.
    pub summary: &'static str,
    /// Every status it answers besides the ones any request may get (see
    /// [`ANY_REQUEST_STATUSES`]).
    pub statuses: &'static [u16],
    /// Fixed by the interface contract (`docs/api.md` marks these **contract**).
    pub contract: bool,
}

impl Endpoint {
    /// `"GET  /api/coverage?max=M"`: the line `GET /api` lists.
    pub fn line(&self) -> String {
        format!("{:<4} {}{}", self.method, self.path, self.query)
    }

    /// True when `path` (without its query) is this endpoint's, its placeholders matching any
    /// one non-empty segment.
    pub fn matches(&self, method: &str, path: &str) -> bool {
        if method != self.method {
            return false;
        }
        let mine: Vec<&str> = self.path.split('/').collect();
        let theirs: Vec<&str> = path.split('/').collect();
        mine.len() == theirs.len()
            && mine
                .iter()
                .zip(&theirs)
                .all(|(m, t)| (m.starts_with('{') && m.ends_with('}') && !t.is_empty()) || m == t)
    }
}

/// The derived objects of `/api/matrices/{id}/derive/{kind}`.
pub const DERIVE_KINDS: &[&str] = &[
    "screening",
    "brr",
    "code",
    "symmetric-design",
    "ordering",
    "sequency",
];

const fn ep(
    method: &'static str,
    path: &'static str,
    query: &'static str,
    summary: &'static str,
    statuses: &'static [u16],
    contract: bool,
) -> Endpoint {
    Endpoint {
        method,
        path,
        query,
        summary,
        statuses,
        contract,
    }
}

/// Every endpoint under `/api`, in the order `docs/api.md` presents them.
pub const ENDPOINTS: &[Endpoint] = &[
    ep(
        "GET",
        "/api",
        "",
        "this list: the endpoints, the formats and the status table",
        &[200],
        false,
    ),
    ep(
        "GET",
        "/api/health",
        "",
        "the server answers and its store takes a real write",
        &[200, 503],
        false,
    ),
    ep(
        "GET",
        "/api/orders/{n}",
        "",
        "the routes --json object of order n",
        &[200, 400],
        true,
    ),
    ep(
        "GET",
        "/api/coverage",
        "?max=M",
        "the coverage --json list up to M",
        &[200, 400],
        true,
    ),
    ep(
        "GET",
        "/api/orders/{n}/matrix",
        "",
        "the catalogue's own matrix of order n, built and stored on first use",
        &[200, 400, 404, 422, 507],
        false,
    ),
    ep(
        "GET",
        "/api/orders/{n}/matrix/download",
        "?format=F",
        "a redirect to the download of the catalogue's matrix of order n",
        &[303, 400, 404, 422, 507],
        false,
    ),
    ep(
        "GET",
        "/api/id-prefix/{p}",
        "",
        "the stored ids that begin with p",
        &[200, 400],
        false,
    ),
    ep(
        "GET",
        "/api/orders/{n}/matrices",
        "?limit=L&offset=K",
        "the stored matrices of order n, oldest first",
        &[200, 400],
        false,
    ),
    ep(
        "GET",
        "/api/dimensions/{d}",
        "",
        "every way to write d = 2^a·m₀ through a known order m₀",
        &[200, 400],
        false,
    ),
    ep(
        "GET",
        "/api/smallest-known",
        "?at-least=k[&constructible=true]",
        "the routes object of the smallest known (or constructible) order ≥ k",
        &[200, 400, 404],
        false,
    ),
    ep(
        "POST",
        "/api/matrices",
        "[?format=F][&bits-minus=0|1]",
        "upload a matrix file: verified by the server, stored when Hadamard",
        &[200, 201, 400, 408, 413, 422, 507],
        true,
    ),
    ep(
        "GET",
        "/api/matrices/{id}",
        "",
        "a stored matrix's metadata",
        &[200, 400, 404],
        true,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/download",
        "?format=F",
        "the matrix as a file",
        &[200, 304, 400, 404],
        true,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/rows/{i}",
        "",
        "one row of a stored matrix",
        &[200, 304, 400, 404],
        false,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/derive/screening",
        "?factors=K…",
        "a two-level screening design",
        &[200, 400, 404, 422],
        false,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/derive/brr",
        "?strata=k",
        "balanced repeated replication weights",
        &[200, 400, 404, 422],
        false,
    ),
    ep(
        "GET",
        "/api/brr",
        "?strata=k[&format=csv]",
        "replication weights from the smallest buildable order above k",
        &[200, 400, 404, 422, 507],
        false,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/derive/code",
        "?variant=full|punctured|shortened",
        "a Hadamard code",
        &[200, 400, 404, 422],
        false,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/derive/symmetric-design",
        "",
        "the symmetric 2-design",
        &[200, 400, 404, 422],
        false,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/derive/ordering",
        "?order=natural|sequency|dyadic[&scaled=true]&format=F",
        "the rows reordered, or scaled, as a file",
        &[200, 400, 404, 422],
        false,
    ),
    ep(
        "GET",
        "/api/matrices/{id}/derive/sequency",
        "",
        "every row's number of sign changes",
        &[200, 400, 404, 422],
        false,
    ),
    ep(
        "GET",
        "/api/equivalence",
        "?a=ID&b=ID[&budget=N]",
        "are two stored matrices equivalent?",
        &[200, 400, 404, 422],
        false,
    ),
];

/// Statuses any request may get, whatever its endpoint: the server's limits and failures.
pub const ANY_REQUEST_STATUSES: &[u16] = &[405, 414, 431, 500, 503];

/// The statuses that are not errors, and when they are answered.
pub const SUCCESS_STATUSES: &[(u16, &str)] = &[
    (200, "the answer"),
    (201, "an upload stored now"),
    (
        303,
        "the catalogue's matrix of an order, by its permanent download",
    ),
    (
        304,
        "a download or row the client already has (`If-None-Match`)",
    ),
];

/// The error statuses and when each is answered: `docs/api.md`'s table, row for row.
pub const ERROR_STATUSES: &[(u16, &str)] = &[
    (400, "a malformed request: an order or id that is not one, an unknown format, a parameter out of range, a malformed matrix file (with `location`)"),
    (404, "an id that is not stored; an order with no catalogue matrix; a row outside the matrix; an unknown derived kind; an unknown `/api/` path"),
    (405, "a method other than GET/HEAD on a page path, or other than the one an endpoint takes"),
    (408, "an upload's body did not arrive within `--body-timeout`"),
    (413, "a request body over `--max-body` (a declared `Content-Length` over the limit is refused before the body is read), or a matrix over `--max-order` (`kind: \"over_max_order\"`, with `limit` and the `location` where the reader stopped)"),
    (414, "a request target over 8 KiB (`limit`)"),
    (422, "an upload that is a well-formed ±1 matrix but not Hadamard (or has erased `?` entries); building an order above `--max-order`, or one above `--store-max-order` not yet stored (`kind: \"not_built\"`); a derived object above its order limit or not defined for the matrix; an ordering answer over 512 MiB"),
    (431, "request headers over 16 KiB (`limit`)"),
    (500, "the database failed, or a stored matrix failed re-verification (logged; run `hadamard audit`)"),
    (503, "the request took longer than `--request-timeout`; the database is read-only (`kind: \"read_only\"`); the server holds `--upload-buffer-mib` of uploads already; it has `--max-connections` open; `/api/health` when the store cannot be written"),
    (507, "the disk is full (`kind: \"disk_full\"`): nothing was stored"),
];

/// The `?format=` names of `POST /api/matrices` (`int` and `csv` are the same reader).
pub const UPLOAD_FORMATS: &[&str] = &["pm", "int", "csv", "bits", "json", "npy"];

/// The `?format=` names of downloads, `pm` first (the default).
pub const DOWNLOAD_FORMATS: &[&str] = &[
    "pm",
    "csv",
    "bits",
    "json",
    "npy",
    "npy-f64",
    "npy-f64-scaled",
    "png",
];

/// The endpoint a request goes to, if any.
pub fn endpoint_of(method: &str, path: &str) -> Option<&'static Endpoint> {
    let path = path.split('?').next().unwrap_or(path);
    let method = if method == "HEAD" { "GET" } else { method };
    ENDPOINTS.iter().find(|e| e.matches(method, path))
}

/// True when an endpoint may answer `status`.
pub fn declares(e: &Endpoint, status: u16) -> bool {
    e.statuses.contains(&status) || ANY_REQUEST_STATUSES.contains(&status)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::formats::{Format, WriteFormat};

    /// Every format name is one core's readers and writers take, with the media type the
    /// download table gives it.
    #[test]
    fn formats_are_cores() {
        for f in UPLOAD_FORMATS {
            assert!(f.parse::<Format>().is_ok(), "{f}");
        }
        for f in DOWNLOAD_FORMATS {
            let w: WriteFormat = f.parse().unwrap();
            assert_eq!(w.name(), *f);
        }
    }

    /// The list is coherent: no endpoint twice, every status in a table, every error status
    /// answered by some endpoint or by any request, the derived kinds each an endpoint.
    #[test]
    fn the_list_is_coherent() {
        let known: Vec<u16> = SUCCESS_STATUSES
            .iter()
            .chain(ERROR_STATUSES)
            .map(|(c, _)| *c)
            .collect();
        for (i, e) in ENDPOINTS.iter().enumerate() {
            assert!(e.path.starts_with("/api"), "{e:?}");
            for s in e.statuses {
                assert!(known.contains(s), "{} {}: status {s}", e.method, e.path);
            }
            for other in &ENDPOINTS[..i] {
                assert!(
                    !(other.method == e.method && other.path == e.path),
                    "{} twice",
                    e.path
                );
            }
        }
        for (c, _) in ERROR_STATUSES {
            assert!(
                ANY_REQUEST_STATUSES.contains(c)
                    || ENDPOINTS.iter().any(|e| e.statuses.contains(c)),
                "status {c} is answered by nothing"
            );
        }
        for k in DERIVE_KINDS {
            let path = format!("/api/matrices/{{id}}/derive/{k}");
            assert!(ENDPOINTS.iter().any(|e| e.path == path), "{path}");
        }
        assert_eq!(
            endpoint_of("GET", "/api/matrices/abc/rows/3?x=1").map(|e| e.path),
            Some("/api/matrices/{id}/rows/{i}")
        );
        assert_eq!(endpoint_of("GET", "/api/matrices/abc/rows/"), None);
        assert_eq!(endpoint_of("HEAD", "/api").map(|e| e.path), Some("/api"));
    }
}
