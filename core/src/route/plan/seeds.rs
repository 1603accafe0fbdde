//! Leaves from the seed catalogue: the embedded sequence data indexed by the parameter each
//! entry yields, and the leaf a route tree holds for an entry (with the sequences themselves,
//! so a recipe replays without the catalogue).

use super::super::step::{Construction, SeedData, SeedLeaf};
use crate::construct::sequences::{
    BaseSequences, GolayPair, GsQuadruple, TSequences, TurynType, Williamson,
};
use crate::seed::{self, Entry};
use std::collections::BTreeMap;

/// The seed catalogue indexed by the parameter each entry yields.
#[derive(Debug, Default)]
pub struct SeedIndex {
    pub(super) williamson: BTreeMap<u64, &'static Entry<Williamson>>,
    pub(super) gs: BTreeMap<u64, &'static Entry<GsQuadruple>>,
    pub(super) tseq: BTreeMap<u64, &'static Entry<TSequences>>,
    /// Keyed by the T-length 2n+p they give.
    pub(super) base: BTreeMap<u64, &'static Entry<BaseSequences>>,
    /// Keyed by n.
    pub(super) turyn: BTreeMap<u64, &'static Entry<TurynType>>,
    pub(super) golay: BTreeMap<u64, &'static Entry<GolayPair>>,
}

impl SeedIndex {
    /// Indexes [`seed::embedded`], keeping the first entry for each parameter.
    pub fn embedded() -> SeedIndex {
        let cat = seed::embedded();
        let mut ix = SeedIndex::default();
        for e in &cat.williamson {
            ix.williamson.entry(e.data.m() as u64).or_insert(e);
        }
        for e in &cat.goethals_seidel {
            ix.gs.entry(e.data.v() as u64).or_insert(e);
        }
        for e in &cat.t_sequences {
            ix.tseq.entry(e.data.len() as u64).or_insert(e);
        }
        for e in &cat.base {
            ix.base
                .entry((e.data.a.len() + e.data.c.len()) as u64)
                .or_insert(e);
        }
        for e in &cat.turyn_type {
            ix.turyn.entry(e.data.n() as u64).or_insert(e);
        }
        for e in &cat.golay {
            ix.golay.entry(e.data.len() as u64).or_insert(e);
        }
        ix
    }
}

/// A seed leaf for a catalogue entry.
pub(super) fn seed_leaf(e: &Entry<impl Sized>, data: SeedData) -> Construction {
    Construction::Seed(SeedLeaf {
        source: e.source.clone(),
        provenance: e.provenance.clone(),
        data,
    })
}

/// A seed leaf's reference: where our data came from, and, when a paper first found data of
/// this kind, that paper too (our search found its own, but the order's history is the paper's).
pub(super) fn seed_reference(provenance: &str, paper: Option<&str>) -> String {
    match paper {
        Some(p) => format!("{provenance}; first published: {p}"),
        None => provenance.to_string(),
    }
}
