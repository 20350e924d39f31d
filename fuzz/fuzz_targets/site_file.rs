//! The site-file reader on any text (properties in `pvhazard::fuzz::site_file`).
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| pvhazard::fuzz::site_file(data));
