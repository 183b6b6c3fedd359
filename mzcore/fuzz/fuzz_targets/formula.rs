//! Fuzz target `formula`: see `mzcore_fuzz::parse_formula`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| mzcore_fuzz::parse_formula(data));
