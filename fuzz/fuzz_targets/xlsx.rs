//! The xlsx loader, from the file on disk as a user gives it.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|bytes: &[u8]| sheaf_fuzz::load_as(bytes, "xlsx"));
