//! Fuzz target `mzml_document`: see `mzcore_fuzz::read_document`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| mzcore_fuzz::read_document(data));
