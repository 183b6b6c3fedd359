//! Fuzz target `mzml_spectrum`: see `mzcore_fuzz::read_spectrum_element`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| mzcore_fuzz::read_spectrum_element(data));
