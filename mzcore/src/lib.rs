//! `mzcore`: the library behind `mzsift`.

pub mod centroid;
pub mod error;
pub mod mzml;
pub mod spectrum;

pub use error::{Error, ErrorKind, Position, Result};
