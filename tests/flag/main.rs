//! Tests of `mzcore::flag` and `mzcore::feature` on generated centroid lists, and of the
//! whole screening on a synthetic acceptance scenario.

mod acceptance;
mod compounds;
mod eval;
mod scenarios;
mod synth;
