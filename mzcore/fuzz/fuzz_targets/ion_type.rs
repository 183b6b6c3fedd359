//! Fuzz target `ion_type`: see `mzcore_fuzz::parse_ion_type`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| mzcore_fuzz::parse_ion_type(data));
