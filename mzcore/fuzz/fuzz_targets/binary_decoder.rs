//! Fuzz target `binary_decoder`: see `mzcore_fuzz::decode_array`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| mzcore_fuzz::decode_array(data));
