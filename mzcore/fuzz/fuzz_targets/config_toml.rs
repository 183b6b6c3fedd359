//! Fuzz target `config_toml`: see `mzcore_fuzz::load_config`.
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| mzcore_fuzz::load_config(data));
