//! Subcommands.

pub mod mass;
pub mod pattern;
