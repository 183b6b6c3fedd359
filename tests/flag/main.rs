//! Tests of `mzcore::flag` and `mzcore::feature` on generated centroid lists.

mod compounds;
mod eval;
mod scenarios;
mod synth;
