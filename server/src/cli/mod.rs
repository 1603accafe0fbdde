//! One module per command. Each parses its arguments (clap), calls `hadamard-core`, and prints.

pub mod convert;
pub mod input;
pub mod output;
pub mod search;
pub mod verify;
