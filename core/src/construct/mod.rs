//! The published constructions (filled in by its own change).
