//! Computer searches for the sequence data that the array constructions consume.
//!
//! One idea runs through every search here: **a search is a fixed, ordered list of independent
//! work units.** Each search turns its parameters into the same list of units every time (the
//! top levels of a backtracking tree, or chunks of a candidate list), and each unit yields a
//! sorted list of results. Everything the issue asks of a search follows from that one shape:
//!
//! - *parallel*: the units of a batch run on the rayon pool;
//! - *shardable*: shard `i/k` takes the units whose position is ≡ i (mod k), so the shards are
//!   disjoint and their union is the whole search ([`Shard`]);
//! - *resumable*: units are done in order, a batch at a time, so the state is "the first
//!   `next` units of this shard are done, and these are their results" ([`Checkpoint`]);
//! - *deterministic*: the result is the sorted, de-duplicated union of the units' results, which
//!   does not depend on the number of threads, on batch timing or on where a run was resumed.
//!   (A search asked to stop after its first results stops at the end of a batch; batches
//!   have a fixed size, so that too is deterministic.)
//!
//! Results are seed-catalogue lines without their provenance (`williamson m=5 a=... | ...`
//! minus the `| ...`, see [`crate::seed`]): they are plain text, they sort, they merge, and they
//! are checked by the same parser and identities that check the catalogue.
//!
//! The caller owns files, terminals and signals: progress goes out through a callback, the
//! checkpoint goes out through a callback, and a stop request comes in through an
//! [`AtomicBool`]. This module does no I/O.
//!
//! The searches: [`williamson`] (symmetric circulant quadruples), [`aperiodic`] (Golay pairs,
//! base sequences BS(n+1, n), Turyn-type TT(n), by backtracking from both ends) and
//! [`goethals_seidel`] (four circulants with vanishing periodic autocorrelation sum).

pub mod aperiodic;
pub mod goethals_seidel;
pub mod williamson;

use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use std::collections::BTreeSet;
use std::fmt;
use std::str::FromStr;
use std::sync::atomic::{AtomicBool, Ordering};

/// One of `count` disjoint parts of a search: the units whose position is ≡ `index` (mod `count`).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Shard {
    pub index: u64,
    pub count: u64,
}

impl Shard {
    /// The whole search as one shard.
    pub const WHOLE: Shard = Shard { index: 0, count: 1 };

    /// True when this shard owns the unit at `position` in the search's unit list.
    pub fn owns(&self, position: u64) -> bool {
        position % self.count == self.index
    }
}

impl fmt::Display for Shard {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}/{}", self.index, self.count)
    }
}

impl FromStr for Shard {
    type Err = String;
    /// Reads `i/k` with 0 ≤ i < k.
    fn from_str(s: &str) -> Result<Self, String> {
        let (i, k) = s
            .split_once('/')
            .ok_or_else(|| format!("expected i/k, found `{s}`"))?;
        let index: u64 = i
            .trim()
            .parse()
            .map_err(|_| format!("bad shard index `{i}`"))?;
        let count: u64 = k
            .trim()
            .parse()
            .map_err(|_| format!("bad shard count `{k}`"))?;
        if count == 0 || index >= count {
            return Err(format!("shard {index}/{count}: need 0 ≤ i < k"));
        }
        Ok(Shard { index, count })
    }
}

/// The resumable state of one shard of one search. Serialisable so the CLI can keep it in a
/// file; [`run`] refuses a checkpoint made for a different search or shard.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Checkpoint {
    /// The search and its parameters, as [`Search::describe`] says them.
    pub search: String,
    pub shard: Shard,
    /// Units in this shard.
    pub total: u64,
    /// The first `next` units of this shard are done.
    pub next: u64,
    /// Their results so far, sorted and de-duplicated.
    pub results: Vec<String>,
    /// True when the shard is finished (all units, or enough results for `limit`).
    pub finished: bool,
}

/// Units per batch unless a run says otherwise: the command line's default too, so that a
/// limited run started from either gives the same results.
pub const DEFAULT_BATCH: usize = 8;

/// How a run is carried out: its shard, how many results are enough, and the batch size.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct RunConfig {
    pub shard: Shard,
    /// Stop at the end of the first batch after which at least this many results are known.
    pub limit: Option<usize>,
    /// Units per batch: the granularity of checkpoints, progress and `limit`. Part of what
    /// makes a limited run deterministic, so it is a parameter, not a function of the threads.
    pub batch: usize,
}

impl Default for RunConfig {
    fn default() -> Self {
        RunConfig {
            shard: Shard::WHOLE,
            limit: None,
            batch: DEFAULT_BATCH,
        }
    }
}

/// What a search must provide: its name with parameters, its units, and how to do one unit.
pub trait Search: Sync {
    /// A work unit. Units are listed in a fixed order by [`Search::units`].
    type Unit: Send + Sync;
    /// The search and its parameters, e.g. `williamson m=23 mode=first`. Checkpoints carry it.
    fn describe(&self) -> String;
    /// All units of the whole search, in a fixed order.
    fn units(&self) -> Vec<Self::Unit>;
    /// The results of one unit, as seed-catalogue lines without provenance.
    fn run_unit(&self, unit: &Self::Unit) -> Vec<String>;
}

/// Hooks the caller gives to [`run`]. All three may be no-ops.
pub struct Hooks<'a> {
    /// Called after every batch with (units done in this shard, units in this shard).
    pub progress: &'a (dyn Fn(u64, u64) + Sync),
    /// Called after every batch with the state to save.
    pub checkpoint: &'a mut dyn FnMut(&Checkpoint),
    /// When set, the run stops at the end of the current batch and returns an unfinished state.
    pub stop: &'a AtomicBool,
}

/// Why [`run`] refused to start.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum RunError {
    /// The checkpoint was written by another search or shard.
    CheckpointMismatch { expected: String, found: String },
}

impl fmt::Display for RunError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            RunError::CheckpointMismatch { expected, found } => {
                write!(f, "the checkpoint is for `{found}`, not `{expected}`")
            }
        }
    }
}

impl std::error::Error for RunError {}

/// Runs (or resumes, from `resume`) one shard of `search`, and returns its state: finished
/// unless `hooks.stop` was raised first.
pub fn run<S: Search>(
    search: &S,
    config: RunConfig,
    resume: Option<Checkpoint>,
    hooks: Hooks<'_>,
) -> Result<Checkpoint, RunError> {
    let units: Vec<S::Unit> = search.units();
    let mine: Vec<&S::Unit> = units
        .iter()
        .enumerate()
        .filter(|(i, _)| config.shard.owns(*i as u64))
        .map(|(_, u)| u)
        .collect();
    let describe = search.describe();
    let mut state = match resume {
        Some(c) => {
            if c.search != describe || c.shard != config.shard || c.total != mine.len() as u64 {
                return Err(RunError::CheckpointMismatch {
                    expected: format!("{describe} shard {}", config.shard),
                    found: format!("{} shard {}", c.search, c.shard),
                });
            }
            c
        }
        None => Checkpoint {
            search: describe,
            shard: config.shard,
            total: mine.len() as u64,
            next: 0,
            results: Vec::new(),
            finished: false,
        },
    };
    let enough = |st: &Checkpoint| config.limit.is_some_and(|l| st.results.len() >= l);
    state.finished = state.finished || state.next >= state.total || enough(&state);
    (hooks.progress)(state.next, state.total);
    let batch = config.batch.max(1);
    while !state.finished {
        if hooks.stop.load(Ordering::Relaxed) {
            break;
        }
        let start = state.next as usize;
        let end = (start + batch).min(mine.len());
        let found: Vec<String> = mine[start..end]
            .par_iter()
            .flat_map_iter(|u| search.run_unit(u))
            .collect();
        let mut all: BTreeSet<String> = std::mem::take(&mut state.results).into_iter().collect();
        all.extend(found);
        state.results = all.into_iter().collect();
        state.next = end as u64;
        state.finished = state.next >= state.total || enough(&state);
        (hooks.progress)(state.next, state.total);
        (hooks.checkpoint)(&state);
    }
    Ok(state)
}

/// Runs the whole search on this thread pool with no hooks, and returns its sorted results.
pub fn run_to_end<S: Search>(search: &S, limit: Option<usize>) -> Vec<String> {
    let stop = AtomicBool::new(false);
    let hooks = Hooks {
        progress: &|_, _| {},
        checkpoint: &mut |_| {},
        stop: &stop,
    };
    let config = RunConfig {
        limit,
        ..RunConfig::default()
    };
    run(search, config, None, hooks)
        .expect("a fresh run has no checkpoint to mismatch")
        .results
}

/// Merges the results of several shards (or several runs): the sorted, de-duplicated union.
/// For searches that report classes, each result is already a canonical representative, so
/// the union is the list of classes.
/// A unit of work for the searches that split by decomposition: one decomposition (of 4m
/// or 4v into four squares) and a range of its outer rows.
pub struct SliceUnit {
    pub(crate) decomposition: usize,
    pub(crate) from: usize,
    pub(crate) to: usize,
}

/// Splits each decomposition's `len` outer rows into at most 256 ranges, in order. A length
/// of `None` skips the decomposition (it has an empty row list, so no solution).
pub(crate) fn slice_units(lens: impl IntoIterator<Item = Option<usize>>) -> Vec<SliceUnit> {
    let mut out = Vec::new();
    for (decomposition, n) in lens.into_iter().enumerate() {
        let Some(n) = n else { continue };
        let step = n.div_ceil(256).max(1);
        let mut from = 0;
        while from < n {
            out.push(SliceUnit {
                decomposition,
                from,
                to: (from + step).min(n),
            });
            from += step;
        }
    }
    out
}

pub fn merge<I: IntoIterator<Item = String>>(parts: I) -> Vec<String> {
    parts
        .into_iter()
        .collect::<BTreeSet<_>>()
        .into_iter()
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A toy search: unit i yields `x i` when i is a multiple of 3.
    struct Toy(u64);
    impl Search for Toy {
        type Unit = u64;
        fn describe(&self) -> String {
            format!("toy {}", self.0)
        }
        fn units(&self) -> Vec<u64> {
            (0..self.0).collect()
        }
        fn run_unit(&self, u: &u64) -> Vec<String> {
            if u.is_multiple_of(3) {
                vec![format!("x {u:04}")]
            } else {
                vec![]
            }
        }
    }

    #[test]
    fn shards_are_disjoint_and_cover_the_search() {
        let whole = run_to_end(&Toy(100), None);
        let stop = AtomicBool::new(false);
        let mut parts = Vec::new();
        for index in 0..7 {
            let hooks = Hooks {
                progress: &|_, _| {},
                checkpoint: &mut |_| {},
                stop: &stop,
            };
            let config = RunConfig {
                shard: Shard { index, count: 7 },
                limit: None,
                batch: 5,
            };
            let r = run(&Toy(100), config, None, hooks).unwrap();
            parts.push(r.results);
        }
        let total: usize = parts.iter().map(|p| p.len()).sum();
        assert_eq!(total, whole.len());
        assert_eq!(merge(parts.into_iter().flatten()), whole);
    }

    #[test]
    fn a_stopped_run_resumes_to_the_same_result() {
        let whole = run_to_end(&Toy(100), None);
        let stop = AtomicBool::new(false);
        let mut saved = None;
        let mut batches = 0;
        let mut save = |c: &Checkpoint| {
            batches += 1;
            if batches == 3 {
                stop.store(true, Ordering::Relaxed);
            }
            saved = Some(serde_json::to_string(c).unwrap());
        };
        let config = RunConfig {
            batch: 4,
            ..RunConfig::default()
        };
        let first = run(
            &Toy(100),
            config,
            None,
            Hooks {
                progress: &|_, _| {},
                checkpoint: &mut save,
                stop: &stop,
            },
        )
        .unwrap();
        assert!(!first.finished);
        assert_eq!(first.next, 12);
        let resume: Checkpoint = serde_json::from_str(&saved.unwrap()).unwrap();
        let go = AtomicBool::new(false);
        let rest = run(
            &Toy(100),
            config,
            Some(resume),
            Hooks {
                progress: &|_, _| {},
                checkpoint: &mut |_| {},
                stop: &go,
            },
        )
        .unwrap();
        assert!(rest.finished);
        assert_eq!(rest.results, whole);
        let wrong = run(
            &Toy(99),
            config,
            Some(rest),
            Hooks {
                progress: &|_, _| {},
                checkpoint: &mut |_| {},
                stop: &go,
            },
        );
        assert!(matches!(wrong, Err(RunError::CheckpointMismatch { .. })));
    }

    #[test]
    fn a_limited_run_stops_at_a_batch_boundary() {
        let config = RunConfig {
            limit: Some(1),
            batch: 10,
            ..RunConfig::default()
        };
        let stop = AtomicBool::new(false);
        let r = run(
            &Toy(100),
            config,
            None,
            Hooks {
                progress: &|_, _| {},
                checkpoint: &mut |_| {},
                stop: &stop,
            },
        )
        .unwrap();
        assert!(r.finished);
        assert_eq!(r.next, 10);
        assert_eq!(r.results, vec!["x 0000", "x 0003", "x 0006", "x 0009"]);
        assert_eq!("2/5".parse::<Shard>(), Ok(Shard { index: 2, count: 5 }));
        assert!("5/5".parse::<Shard>().is_err());
    }
}
