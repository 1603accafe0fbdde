//! Reading and writing the formats people exchange (filled in by its own change).
