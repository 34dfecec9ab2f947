//! The recipe language: parse and check any text, with and without headers,
//! and print the canonical form of what parses.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|bytes: &[u8]| {
    let text = String::from_utf8_lossy(bytes);
    let parsed = sheaf::recipe::parse_and_check(&text, None);
    let _ = sheaf::recipe::render_all(&parsed.diagnostics, "fuzz.sheaf", &text);
    if parsed.is_ok() {
        let canonical = sheaf::recipe::pretty::recipe(&parsed.recipe);
        let _ = sheaf::recipe::parse_and_check(&canonical, None);
    }
    let headers = vec!["depot".to_string(), "weight_kg".to_string()];
    let _ = sheaf::recipe::parse_and_check(&text, Some(&headers));
});
