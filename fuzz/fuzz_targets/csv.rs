//! The csv loader, from the file on disk as a user gives it; and the
//! chunked reader against the reference reader on the same bytes.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|bytes: &[u8]| {
    sheaf_fuzz::load_as(bytes, "csv");
    sheaf_fuzz::csv_readers_agree(bytes);
});
