//! Tests of `mzcore::centroid` on synthetic spectra, on scipy reference maxima, and properties.

mod accuracy;
mod edge_cases;
mod profiles;
mod props;
mod reference;
