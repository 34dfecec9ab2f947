//! Writes the invented messy exports of tests/common/exports.rs to
//! tests/fixtures/exports/, for people to open and try sheaf on.
//! Run: cargo run --example make_exports
#[path = "../tests/common/exports.rs"]
mod exports;

fn main() -> Result<(), rust_xlsxwriter::XlsxError> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/exports");
    std::fs::create_dir_all(&dir).expect("the fixtures folder can be made");
    exports::write_all(&dir)?;
    println!("wrote the invented exports to {}", dir.display());
    Ok(())
}
