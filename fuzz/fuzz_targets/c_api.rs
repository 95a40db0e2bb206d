#![no_main]
//! See stillsky_tests::fuzz_targets::c_api for what is checked.
libfuzzer_sys::fuzz_target!(|data: &[u8]| stillsky_tests::fuzz_targets::c_api(data));
