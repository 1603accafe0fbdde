//! The published constructions, one module each (filled in by its own change).

pub mod sequences;
