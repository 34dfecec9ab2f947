//! The whole run path: a recipe and a CSV file (split at the first line
//! `%%`; without one, the demo recipe over the bytes as CSV) are parsed,
//! loaded, evaluated and written as a result workbook to a temporary
//! folder, whose Record is then read back as `--compare` does.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|bytes: &[u8]| sheaf_fuzz::run_path(bytes));
