//! Fuzz target `qc_rules`: see `mzcore_fuzz::load_rules`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| mzcore_fuzz::load_rules(data));
