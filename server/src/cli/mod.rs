//! One module per command. Each parses its arguments (clap), calls `hadamard-core`, and prints.

pub mod advise;
pub mod audit;
pub mod build;
pub mod convert;
pub mod coverage;
pub mod derive;
pub mod equiv;
pub mod error;
pub mod input;
pub mod output;
pub mod progress;
pub mod routes;
pub mod search;
pub mod serve;
pub mod verify;
