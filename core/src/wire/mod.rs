//! The JSON of the HTTP API (`hadamard serve`, `docs/api.md`): one Rust type per answer, shared
//! by the server's handlers, which build and serialise them, and the web page, which
//! deserialises into them. A field renamed here is renamed on both sides at once, and a page
//! that meets an answer it cannot read says so instead of quietly showing less.
//!
//! Answers that are plain serialisations of another core type are not repeated here: the
//! `routes` object is [`crate::route::OrderInfo`], the dimension advice
//! [`crate::route::Advice`], the derived objects those of [`crate::derive`]. Their
//! aliases below ([`OrderAnswer`], …) name them as answers.
//!
//! [`endpoints`] is the one list of the endpoints, their statuses, the status table and the
//! format names; `GET /api` serves it and a test checks `docs/api.md` against it.
//!
//! Pure data: no I/O, and it compiles for wasm32 like the rest of core.

pub mod endpoints;

use crate::formats::Location;
use crate::route::{Method, Status};
use crate::verify::{Properties, Report};
use serde::{Deserialize, Serialize};
use serde_json::Value;
use std::collections::BTreeMap;

/// `GET /api/orders/{n}` and `GET /api/smallest-known`: the `routes --json` object (the server
/// writes [`crate::route::OrderInfo`]; readers take it as [`OrderView`]).
pub type OrderAnswer = OrderView;
/// `GET /api/dimensions/{d}`.
pub type DimensionAnswer = crate::route::Advice;
/// `GET /api/equivalence`: the `equiv --json` object.
pub type EquivalenceAnswer = crate::derive::equivalence::EquivalenceReport;
/// `GET /api/matrices/{id}/derive/sequency`.
pub type SequencyAnswer = crate::derive::ordering::SequencyReport;

/// A route step as the recipe format (`hadamard-recipe/1`) writes it, read as plain data: the
/// construction's name, and its parameters as the recipe's JSON object. For readers that show
/// a route rather than build it (the page), so that they carry no copy of the typed step's
/// checks: [`crate::route::Step`] is the step, and a test checks that every route the planner
/// writes reads into this form and writes back unchanged.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct StepView {
    pub method: Method,
    pub order: u64,
    pub params: serde_json::Map<String, Value>,
    pub reference: String,
    pub children: Vec<StepView>,
    pub buildable: bool,
}

/// A recipe ([`crate::route::Recipe`]) read as plain data.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RecipeView {
    pub format: String,
    pub order: u64,
    pub id: Option<String>,
    pub tree: StepView,
}

/// A route ([`crate::route::Route`]) read with its tree as plain data.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RouteView {
    pub method: Method,
    pub tree: StepView,
    pub buildable: bool,
    pub cost: f64,
    pub largest_dense_factor: u64,
    pub ingredients: Vec<String>,
    pub skew: bool,
}

/// The `routes --json` object ([`crate::route::OrderInfo`]) read with its trees as plain data.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct OrderView {
    pub order: u64,
    pub status: Status,
    pub routes: Vec<RouteView>,
    pub note: String,
    pub literature: Option<String>,
}

/// What kind of failure an error answer reports, when a program may want to tell them apart.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ErrorKind {
    /// A matrix file that cannot be read (400, with `location`).
    Malformed,
    /// A matrix larger than the server's `--max-order` (413, with `limit` and `location`).
    OverMaxOrder,
    /// An order above `--store-max-order` that is not stored yet (422).
    NotBuilt,
    /// The disk is full (507; the health probe's `kind` too).
    DiskFull,
    /// The database or its directory cannot be written (503; the health probe's `kind` too).
    ReadOnly,
    /// The health probe's write failed for another reason.
    WriteFailed,
}

/// Every error answer under `/api/`: `{"error": "<a sentence>", ...}` with the fields that help
/// (each absent when it does not apply).
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct ErrorBody {
    /// A sentence for people.
    pub error: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kind: Option<ErrorKind>,
    /// The query or path parameter that is wrong.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub parameter: Option<String>,
    /// The limit that was exceeded (bytes, an order, a node budget, …).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub limit: Option<u64>,
    /// The limit of an ordering answer, in bytes.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub limit_bytes: Option<u64>,
    /// Where in a matrix file the reader stopped (`null` for the file as a whole).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub location: Option<Location>,
    /// The order the request was about.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub order: Option<u64>,
    /// The order's status, when no implemented route builds it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub status: Option<Status>,
    /// `smallest-known`: the `at-least` asked, and how far the search went.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub at_least: Option<u64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub searched_up_to: Option<u64>,
    /// An upload with erased entries: how many, and what completing them gives (the
    /// `verify --json` completion object).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub erased_entries: Option<u64>,
    /// An upload that is not stored: the verdict of [`crate::diagnose`] (`incomplete` here).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub verdict: Option<crate::diagnose::Verdict>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub completion: Option<Value>,
    /// An ordering that is not defined for the matrix: every row's sequency.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sequency: Option<SequencyAnswer>,
}

impl ErrorBody {
    pub fn new(error: impl Into<String>) -> ErrorBody {
        ErrorBody {
            error: error.into(),
            ..ErrorBody::default()
        }
    }
}

/// `POST /api/matrices`, 422: a well-formed matrix that is not Hadamard. The `verify --json`
/// report with a sentence, the index base of the failing pairs, and the wrong signs that
/// explain the failures (the `verify --json` repair object) or `null`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct NotHadamardBody {
    #[serde(flatten)]
    pub report: Report,
    pub error: String,
    /// The verdict of [`crate::diagnose`]: `not_hadamard`.
    pub verdict: crate::diagnose::Verdict,
    pub failing_pairs_index_base: u8,
    pub repair: Value,
}

/// How a stored matrix first reached the catalogue.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Provenance {
    /// Built by this program: when, and the recipe that replays it (`null` if unreadable).
    Constructed {
        constructed_at: String,
        recipe: Option<RecipeView>,
    },
    /// Uploaded: when, and the format it was read as.
    Uploaded {
        uploaded_at: String,
        received_format: Option<String>,
    },
}

impl Provenance {
    /// The recipe of a constructed matrix.
    pub fn recipe(&self) -> Option<&RecipeView> {
        match self {
            Provenance::Constructed { recipe, .. } => recipe.as_ref(),
            Provenance::Uploaded { .. } => None,
        }
    }

    /// When it reached the catalogue (RFC 3339).
    pub fn at(&self) -> &str {
        match self {
            Provenance::Constructed { constructed_at, .. } => constructed_at,
            Provenance::Uploaded { uploaded_at, .. } => uploaded_at,
        }
    }
}

/// The record of the exact check a stored matrix passed.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Verification {
    /// [`crate::verify::CHECK_NAME`].
    pub check: String,
    pub check_version: i64,
    /// The counting kernel that ran.
    pub kernel: String,
    pub verified_at: String,
}

/// `GET /api/orders/{n}/matrix`: the catalogue's own matrix of order n.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct CatalogueMatrix {
    pub order: u64,
    pub id: String,
    /// The permanent page, `/m/<id>`.
    pub url: String,
    /// `/api/matrices/<id>`.
    pub api_url: String,
    /// True when this request built and stored it.
    pub built_now: bool,
    /// The recipe that replays it (`route::build_recipe`), `null` if unreadable.
    pub recipe: Option<RecipeView>,
}

/// How a stored matrix first reached the catalogue, in listings.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Origin {
    Constructed,
    Uploaded,
}

/// A stored matrix in a listing.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct MatrixSummary {
    pub id: String,
    pub url: String,
    pub order: u64,
    pub origin: Origin,
    pub created_at: String,
    pub properties: Option<Properties>,
}

/// `GET /api/orders/{n}/matrices`: a page of the stored matrices of order n, oldest first.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct MatrixList {
    pub order: u64,
    pub total: u64,
    pub offset: u64,
    pub limit: u32,
    /// The id of the catalogue's own matrix of this order, if it is stored.
    pub catalogue_entry: Option<String>,
    /// True when this request built the catalogue's matrix (none was stored).
    pub built_now: bool,
    pub matrices: Vec<MatrixSummary>,
}

/// `GET /api/id-prefix/{p}`: the stored ids that begin with p.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct IdPrefixAnswer {
    pub prefix: String,
    /// At most 10.
    pub ids: Vec<String>,
    /// True when more ids begin with p.
    pub more: bool,
}

/// `GET /api/coverage`: one entry of the list.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct CoverageEntry {
    pub order: u64,
    pub status: Status,
}

/// What comparing an upload's invariant with the stored matrices of its order showed.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct UploadEquivalence {
    /// The invariant compared (`profile4`), or `null` when the order is too large for one.
    pub invariant: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub compared_with: Option<u64>,
    /// Stored matrices with the same invariant (at most 20).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub possibly_equivalent_to: Option<Vec<String>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub possibly_equivalent_count: Option<u64>,
    /// True when the invariant differs from every other stored matrix's.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub proven_new: Option<bool>,
    pub note: String,
}

/// `POST /api/matrices`, 200 or 201: the matrix is stored.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct UploadAnswer {
    /// The verdict of [`crate::diagnose`]: always `hadamard` (nothing else is stored).
    pub verdict: crate::diagnose::Verdict,
    pub id: String,
    pub url: String,
    pub api_url: String,
    pub order: u64,
    /// False when it was already stored (the first record is kept).
    pub stored_now: bool,
    pub properties: Option<Properties>,
    pub provenance: Provenance,
    pub verification: Verification,
    pub equivalence: UploadEquivalence,
}

/// A stored matrix's equivalence invariant.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct InvariantInfo {
    pub kind: String,
    pub value: Option<Value>,
}

/// A stored matrix that is the catalogue's own matrix of its order.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct CatalogueRef {
    pub order: u64,
    pub built_at: String,
    pub recipe: Option<RecipeView>,
}

/// Links to every derived object of a stored matrix (`{k}` and `{other id}` are to be filled).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct DerivedLinks {
    pub screening: String,
    pub screening_csv: String,
    pub brr: String,
    pub code_full: String,
    pub code_punctured: String,
    pub code_shortened: String,
    pub symmetric_design: String,
    pub symmetric_design_csv: String,
    pub sequency: String,
    pub ordering_sequency: String,
    pub ordering_dyadic: String,
    pub scaled_csv: String,
    pub scaled_json: String,
    pub scaled_npy: String,
    pub equivalence: String,
}

impl DerivedLinks {
    /// The links of matrix `id` of order n.
    pub fn of(id: &str, order: usize) -> DerivedLinks {
        let base = format!("/api/matrices/{id}/derive");
        let factors = order.saturating_sub(1).max(1);
        DerivedLinks {
            screening: format!("{base}/screening?factors={factors}&seed=1"),
            screening_csv: format!("{base}/screening?factors={factors}&seed=1&format=csv"),
            brr: format!("{base}/brr?strata={{k}}"),
            code_full: format!("{base}/code?variant=full"),
            code_punctured: format!("{base}/code?variant=punctured"),
            code_shortened: format!("{base}/code?variant=shortened"),
            symmetric_design: format!("{base}/symmetric-design"),
            symmetric_design_csv: format!("{base}/symmetric-design?format=csv"),
            sequency: format!("{base}/sequency"),
            ordering_sequency: format!("{base}/ordering?order=sequency&format=pm"),
            ordering_dyadic: format!("{base}/ordering?order=dyadic&format=pm"),
            scaled_csv: format!("{base}/ordering?scaled=true&format=csv"),
            scaled_json: format!("{base}/ordering?scaled=true&format=json"),
            scaled_npy: format!("{base}/ordering?scaled=true&format=npy-f64"),
            equivalence: format!("/api/equivalence?a={id}&b={{other id}}"),
        }
    }
}

/// `GET /api/matrices/{id}`: a stored matrix's metadata.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct MatrixInfo {
    pub id: String,
    pub url: String,
    pub order: u64,
    pub properties: Option<Properties>,
    pub invariant: Option<InvariantInfo>,
    pub provenance: Provenance,
    /// Set when this is the catalogue's own matrix of its order.
    pub catalogue_entry: Option<CatalogueRef>,
    pub verification: Verification,
    /// Each download format ([`endpoints::DOWNLOAD_FORMATS`]) and its URL.
    pub downloads: BTreeMap<String, String>,
    /// `/api/matrices/<id>/rows/{i}`.
    pub rows_url: String,
    pub derived: DerivedLinks,
}

/// `GET /api/matrices/{id}/rows/{i}`: one row.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct RowAnswer {
    pub id: String,
    pub order: u64,
    pub row: u64,
    /// Always 0.
    pub index_base: u8,
    /// The row as `+`/`-` text.
    pub pm: String,
    pub values: Vec<i8>,
}

/// `GET /api/brr`: the replicates with the orders beside them (`R` is
/// [`crate::derive::brr::Replication`] on the server; the fields are flattened into one object).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct BrrAnswer<R> {
    #[serde(flatten)]
    pub replication: R,
    pub smallest_known_order: Option<u64>,
    pub smallest_constructible_order: u64,
    pub url: String,
}

/// `GET /api/health`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Health {
    /// `ok`, or `degraded` (503) when the store cannot be written.
    pub status: String,
    pub store_writable: bool,
    pub matrices: u64,
    pub orders_seeded_up_to: Option<u64>,
    /// Seed sequences stored, per family.
    pub seed_sequences: BTreeMap<String, u64>,
    pub schema_version: i64,
    /// The server's version.
    pub version: String,
    /// When degraded: which trouble, and a sentence.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kind: Option<ErrorKind>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub error: Option<String>,
}

/// `GET /api`: the endpoints, the formats and the status table, for people exploring with curl.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct ApiIndex {
    pub name: String,
    pub docs: String,
    /// `"GET  /api/orders/{n}"`, …: method, path and query.
    pub endpoints: Vec<String>,
    pub upload_formats: Vec<String>,
    pub download_formats: Vec<String>,
    /// Each error status and when it is answered.
    pub statuses: BTreeMap<u16, String>,
    /// Each endpoint in full: what it answers and with which statuses.
    pub endpoint_details: Vec<EndpointInfo>,
}

/// One endpoint of [`endpoints::ENDPOINTS`], as `GET /api` serves it.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct EndpointInfo {
    pub method: String,
    pub path: String,
    pub query: String,
    pub summary: String,
    /// The statuses it answers besides those any request may get.
    pub statuses: Vec<u16>,
    /// Fixed by the interface contract.
    pub contract: bool,
}

impl ApiIndex {
    /// The index, from [`endpoints`].
    pub fn new() -> ApiIndex {
        ApiIndex {
            name: "Hadamard Registry".into(),
            docs: "docs/api.md".into(),
            endpoints: endpoints::ENDPOINTS.iter().map(|e| e.line()).collect(),
            upload_formats: endpoints::UPLOAD_FORMATS
                .iter()
                .map(|s| s.to_string())
                .collect(),
            download_formats: endpoints::DOWNLOAD_FORMATS
                .iter()
                .map(|s| s.to_string())
                .collect(),
            statuses: endpoints::ERROR_STATUSES
                .iter()
                .map(|(c, w)| (*c, w.to_string()))
                .collect(),
            endpoint_details: endpoints::ENDPOINTS
                .iter()
                .map(|e| EndpointInfo {
                    method: e.method.into(),
                    path: e.path.into(),
                    query: e.query.into(),
                    summary: e.summary.into(),
                    statuses: e.statuses.to_vec(),
                    contract: e.contract,
                })
                .collect(),
        }
    }
}

impl Default for ApiIndex {
    fn default() -> ApiIndex {
        ApiIndex::new()
    }
}

/// The wire name of a unit variant (`constructible`, `paley_one`, `equivalent`, …): what the
/// page shows and the words for it are keyed by.
pub fn name_of<T: Serialize>(v: &T) -> String {
    match serde_json::to_value(v) {
        Ok(Value::String(s)) => s,
        _ => String::new(),
    }
}

/// A status name as the store keeps it (`constructible`, …), read back.
pub fn status_from_name(s: &str) -> Option<Status> {
    serde_json::from_value(Value::String(s.to_owned())).ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every order's `routes` object up to 300 (and a few larger ones) reads into
    /// [`OrderView`] and writes back as the same JSON: the plain form is the typed one's.
    #[test]
    fn views_are_the_typed_routes() {
        for n in (1..=300).chain([668, 1852, 4096, 13696]) {
            let info = crate::route::order_info(n);
            let typed = serde_json::to_value(&info).unwrap();
            let view: OrderView = serde_json::from_value(typed.clone()).unwrap();
            assert_eq!(serde_json::to_value(&view).unwrap(), typed, "order {n}");
            for r in &info.routes {
                let recipe = serde_json::to_value(crate::route::recipe_for(r)).unwrap();
                let view: RecipeView = serde_json::from_value(recipe.clone()).unwrap();
                assert_eq!(serde_json::to_value(&view).unwrap(), recipe, "order {n}");
            }
        }
    }

    /// The wire names are the ones `docs/api.md` documents (this program's own contract): an
    /// error with a location, the provenance tagged by `kind`, a listing's origin.
    #[test]
    fn names_on_the_wire() {
        let mut e = ErrorBody::new("line 3, column 7: bad");
        e.kind = Some(ErrorKind::Malformed);
        e.location = Some(Location::LineCol { line: 3, col: 7 });
        assert_eq!(
            serde_json::to_string(&e).unwrap(),
            r#"{"error":"line 3, column 7: bad","kind":"malformed","location":{"line":3,"column":7}}"#
        );
        let back: ErrorBody = serde_json::from_str(&serde_json::to_string(&e).unwrap()).unwrap();
        assert_eq!(back, e);
        e.location = Some(Location::Nowhere);
        assert!(serde_json::to_string(&e)
            .unwrap()
            .ends_with(r#""location":null}"#));
        let p = Provenance::Uploaded {
            uploaded_at: "2026-01-01T00:00:00Z".into(),
            received_format: Some("pm".into()),
        };
        assert_eq!(
            serde_json::to_string(&p).unwrap(),
            r#"{"kind":"uploaded","uploaded_at":"2026-01-01T00:00:00Z","received_format":"pm"}"#
        );
        assert_eq!(status_from_name("known"), Some(Status::Known));
        assert_eq!(name_of(&Status::Constructible), "constructible");
        assert_eq!(name_of(&crate::route::Method::PaleyOne), "paley_one");
        assert_eq!(status_from_name("nonsense"), None);
        assert_eq!(
            serde_json::to_string(&Origin::Constructed).unwrap(),
            "\"constructed\""
        );
    }
}
