//! Computer searches for sequence data (filled in by its own change).
