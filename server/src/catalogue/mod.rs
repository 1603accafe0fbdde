//! The catalogue's operations: what the HTTP handlers (and `audit`) call, between `core` and
//! the store.
//!
//! One idea: a matrix enters the store only as a [`Verified`], which only
//! `hadamard_core::verify::certify` can make, and leaves it only after passing `certify`
//! again (on its first load in this process; then it is kept, verified, in a small cache).
//! So nothing unverified is stored, and nothing served is taken on trust from the file.
//!
//! Everything here blocks (SQLite, the exact check, constructions): call it from a blocking
//! thread. The HTTP layer does, through `api::helpers`.

pub mod invariant;
pub mod seed;

use crate::store::matrices::{self, MatrixRecord, Origin};
use crate::store::{Store, StoreError};
use crate::time::now_rfc3339;
use hadamard_core::diagnose::{diagnose, Diagnosis};
use hadamard_core::formats::{self, ParseError, ReadOptions};
use hadamard_core::repair;
use hadamard_core::verify::{self, Report, Verified};
use hadamard_core::{route, Matrix};
use std::collections::{HashMap, VecDeque};
use std::sync::{Arc, Mutex};

/// How a matrix reached the catalogue.
pub enum Provenance {
    /// Built by this program; the recipe is the route it followed, as JSON.
    Constructed { recipe_json: String },
    /// Sent by someone, in this format.
    Uploaded { format: String },
}

/// What the store now holds for an ingested matrix.
pub struct Ingested {
    pub record: MatrixRecord,
    /// False when the id was already stored (the first record is kept, unchanged).
    pub created: bool,
    pub equivalence: Equivalence,
}

/// What the invariant says about a matrix and the others of its order.
pub struct Equivalence {
    /// The invariant compared, or `None` when the order is too large to compute one.
    pub kind: Option<&'static str>,
    /// Stored matrices of the same order with the same invariant (at most [`MATCH_LIST`]).
    pub possibly_equivalent_to: Vec<String>,
    /// How many there are in all.
    pub matches: u64,
    /// How many other stored matrices of this order have an invariant to compare with.
    pub compared_with: u64,
}

/// How many matching ids an answer lists.
pub const MATCH_LIST: u32 = 20;

/// Most erased entries an upload's completion tries (about 5 s and 20 MB at order 256).
pub const UPLOAD_MAX_ERASURES: usize = 6000;

/// The blocking part of the catalogue: the store and a cache of verified matrices.
pub struct Catalogue {
    pub store: Store,
    cache: Mutex<Cache>,
}

impl Catalogue {
    pub fn new(store: Store, cache_bytes: usize) -> Catalogue {
        Catalogue {
            store,
            cache: Mutex::new(Cache::new(cache_bytes)),
        }
    }

    /// Stores a verified matrix unless it is already stored, and compares its invariant with
    /// the other stored matrices of its order.
    pub fn ingest(&self, v: &Verified, provenance: Provenance) -> Result<Ingested, StoreError> {
        if let Some(record) = self.store.read(|c| matrices::get(c, v.id()))? {
            let equivalence = self.equivalence(&record)?;
            return Ok(Ingested {
                record,
                created: false,
                equivalence,
            });
        }
        let m = v.matrix();
        let now = now_rfc3339();
        let properties = verify::properties(m);
        let profile = invariant::profile4(m);
        let (origin, recipe_json, received_format) = match provenance {
            Provenance::Constructed { recipe_json } => {
                (Origin::Constructed, Some(recipe_json), None)
            }
            Provenance::Uploaded { format } => (Origin::Uploaded, None, Some(format)),
        };
        let fresh = MatrixRecord {
            id: v.id().to_owned(),
            order: v.order(),
            properties_json: serde_json::to_string(&properties).unwrap_or_default(),
            invariant_kind: profile.as_ref().map(|_| invariant::PROFILE_KIND.to_owned()),
            invariant: profile,
            origin,
            recipe_json,
            received_format,
            created_at: now.clone(),
            check_name: verify::CHECK_NAME.to_owned(),
            check_version: i64::from(verify::CHECK_VERSION),
            kernel: verify::kernel_name().to_owned(),
            verified_at: now,
        };
        let bits = matrices::encode(m);
        let (created, record) = self.store.write(|c| {
            let tx = c.transaction()?;
            let created = matrices::insert(&tx, &fresh, &bits)?;
            let record = matrices::get(&tx, &fresh.id)?.ok_or_else(|| {
                StoreError::Corrupt(format!("{} vanished after insert", fresh.id))
            })?;
            tx.commit()?;
            Ok((created, record))
        })?;
        let equivalence = self.equivalence(&record)?;
        self.cache_put(Arc::new(v.clone()));
        Ok(Ingested {
            record,
            created,
            equivalence,
        })
    }

    fn equivalence(&self, r: &MatrixRecord) -> Result<Equivalence, StoreError> {
        let (Some(kind), Some(inv)) = (r.invariant_kind.as_deref(), r.invariant.as_deref()) else {
            return Ok(Equivalence {
                kind: None,
                possibly_equivalent_to: Vec::new(),
                matches: 0,
                compared_with: 0,
            });
        };
        self.store.read(|c| {
            let (ids, matches) =
                matrices::same_invariant(c, r.order, kind, inv, &r.id, MATCH_LIST)?;
            let compared_with = matrices::count_with_invariant(c, r.order, kind, &r.id)?;
            Ok(Equivalence {
                kind: Some(invariant::PROFILE_KIND),
                possibly_equivalent_to: ids,
                matches,
                compared_with,
            })
        })
    }

    /// Parses, verifies and (when Hadamard) stores an upload.
    pub fn upload(&self, bytes: &[u8], opts: &ReadOptions) -> Result<UploadOutcome, UploadError> {
        let parsed = formats::read(bytes, opts).map_err(UploadError::Malformed)?;
        let report = if parsed.erasures.is_empty() {
            match verify::certify(parsed.matrix.clone()) {
                Ok(v) => {
                    let ingested = self
                        .ingest(
                            &v,
                            Provenance::Uploaded {
                                format: parsed.format.name().to_owned(),
                            },
                        )
                        .map_err(UploadError::Store)?;
                    return Ok(UploadOutcome::Stored(Box::new(ingested)));
                }
                Err(report) => report,
            }
        } else {
            Box::new(verify::verify(&parsed.matrix))
        };
        // Nothing incomplete or failing is stored, but the answer says what the erased entries
        // can be, or which wrong signs explain the failure: the verdict rule of every front end.
        let limits = repair::CompletionLimits {
            max_erasures: UPLOAD_MAX_ERASURES,
            ..repair::CompletionLimits::default()
        };
        let diagnosis = diagnose(&parsed.matrix, &parsed.erasures, &report, limits);
        Ok(UploadOutcome::Refused {
            report,
            diagnosis: Box::new(diagnosis),
        })
    }

    /// The catalogue's own matrix of order n, built, verified and stored on first request.
    pub fn catalogue_matrix(&self, n: usize) -> Result<CatalogueMatrix, BuildFailure> {
        if let Some((id, recipe_json, _)) = self.store.read(|c| matrices::catalogue_entry(c, n))? {
            return Ok(CatalogueMatrix {
                id,
                recipe_json,
                created: false,
            });
        }
        let info = route::order_info(n as u64);
        let Some(best) = info.routes.iter().find(|r| r.buildable) else {
            return Err(BuildFailure::NoRoute {
                message: info.note.clone(),
                status: seed::status_name(info.status),
            });
        };
        let built = route::build(best).map_err(|e| BuildFailure::NoRoute {
            message: e.to_string(),
            status: seed::status_name(info.status),
        })?;
        // The recipe replays with `route::build_recipe`, which checks it gives this very id.
        let mut recipe = route::recipe_for(best);
        recipe.id = Some(built.id().to_owned());
        let recipe_json = serde_json::to_string(&recipe).unwrap_or_default();
        let ingested = self.ingest(
            &built,
            Provenance::Constructed {
                recipe_json: recipe_json.clone(),
            },
        )?;
        let built_at = now_rfc3339();
        self.store
            .write(|c| matrices::set_catalogue_entry(c, n, built.id(), &recipe_json, &built_at))?;
        // Another request may have recorded a different build first; that one stands.
        let (id, recipe_json, _) = self
            .store
            .read(|c| matrices::catalogue_entry(c, n))?
            .ok_or_else(|| StoreError::Corrupt(format!("catalogue entry {n} vanished")))?;
        Ok(CatalogueMatrix {
            created: ingested.created && id == built.id(),
            id,
            recipe_json,
        })
    }

    /// The stored matrix `id`, re-verified, or `None` when it is not stored.
    pub fn load(&self, id: &str) -> Result<Option<Arc<Verified>>, LoadError> {
        if let Some(v) = self.cache_get(id) {
            return Ok(Some(v));
        }
        let Some((n, blob)) = self.store.read(|c| matrices::get_bits(c, id))? else {
            return Ok(None);
        };
        let v = certify_stored(id, n, &blob).map_err(LoadError::Integrity)?;
        let v = Arc::new(v);
        self.cache_put(v.clone());
        Ok(Some(v))
    }

    /// True when `id` is stored (a cheap lookup, no decoding).
    pub fn exists(&self, id: &str) -> Result<bool, StoreError> {
        if self.cache_get(id).is_some() {
            return Ok(true);
        }
        Ok(self.store.read(|c| matrices::get(c, id))?.is_some())
    }

    fn cache_get(&self, id: &str) -> Option<Arc<Verified>> {
        self.cache.lock().unwrap_or_else(|p| p.into_inner()).get(id)
    }

    fn cache_put(&self, v: Arc<Verified>) {
        self.cache.lock().unwrap_or_else(|p| p.into_inner()).put(v)
    }
}

/// Decodes a stored blob and runs the exact check on it; the id must match too.
pub fn certify_stored(id: &str, n: usize, blob: &[u8]) -> Result<Verified, String> {
    let m: Matrix = matrices::decode(n, blob).ok_or_else(|| {
        format!(
            "the blob of {id} ({} bytes) does not fit order {n}",
            blob.len()
        )
    })?;
    if matrices::encode(&m) != blob {
        return Err(format!("the blob of {id} has padding bits set"));
    }
    let v = verify::certify(m).map_err(|r| {
        format!(
            "{id} fails the exact check: {} failing row pairs",
            r.failing_pairs_total
        )
    })?;
    if v.id() != id {
        return Err(format!(
            "{id} is stored under the wrong id: its content has id {}",
            v.id()
        ));
    }
    Ok(v)
}

/// The answer to an upload that could be read.
pub enum UploadOutcome {
    Stored(Box<Ingested>),
    /// Not stored: erased entries (with what they can be) or not Hadamard (with the wrong
    /// signs that explain it when there are), as [`diagnose`] decided from the report.
    Refused {
        report: Box<Report>,
        diagnosis: Box<Diagnosis>,
    },
}

/// An upload that could not be handled.
pub enum UploadError {
    Malformed(ParseError),
    Store(StoreError),
}

/// The catalogue's matrix of an order.
pub struct CatalogueMatrix {
    pub id: String,
    pub recipe_json: String,
    /// True when this request built it.
    pub created: bool,
}

/// Why there is no catalogue matrix of an order.
pub enum BuildFailure {
    NoRoute { message: String, status: String },
    Store(StoreError),
}

impl From<StoreError> for BuildFailure {
    fn from(e: StoreError) -> BuildFailure {
        BuildFailure::Store(e)
    }
}

/// Why a stored matrix could not be served.
pub enum LoadError {
    Store(StoreError),
    /// The stored bits are not what was verified (a damaged file): never served.
    Integrity(String),
}

impl From<StoreError> for LoadError {
    fn from(e: StoreError) -> LoadError {
        LoadError::Store(e)
    }
}

/// Verified matrices recently served, up to a byte budget, oldest evicted first.
struct Cache {
    budget: usize,
    used: usize,
    map: HashMap<String, Arc<Verified>>,
    order: VecDeque<String>,
}

impl Cache {
    fn new(budget: usize) -> Cache {
        Cache {
            budget,
            used: 0,
            map: HashMap::new(),
            order: VecDeque::new(),
        }
    }

    fn get(&self, id: &str) -> Option<Arc<Verified>> {
        self.map.get(id).cloned()
    }

    fn put(&mut self, v: Arc<Verified>) {
        let size = v.matrix().words().len() * 8;
        if size > self.budget || self.map.contains_key(v.id()) {
            return;
        }
        while self.used + size > self.budget {
            let Some(old) = self.order.pop_front() else {
                break;
            };
            if let Some(o) = self.map.remove(&old) {
                self.used -= o.matrix().words().len() * 8;
            }
        }
        self.used += size;
        self.order.push_back(v.id().to_owned());
        self.map.insert(v.id().to_owned(), v);
    }
}
