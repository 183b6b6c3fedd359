//! Tests of `mzcore::centroid` on synthetic and reference spectra.
mod profiles;
