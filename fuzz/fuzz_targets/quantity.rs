//! The quantity parsers on any text (properties in `pvhazard::fuzz::quantity`).
#![no_main]

libfuzzer_sys::fuzz_target!(|data: &[u8]| pvhazard::fuzz::quantity(data));
