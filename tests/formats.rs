//! The same month as xlsx, ods and xls (converted by LibreOffice, see
//! tests/fixtures/README.md) loads to the same columns and cells.

use std::path::PathBuf;

use sheaf::load::{self, LoadOptions};

fn path(relative: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join(relative)
}

#[test]
fn xlsx_ods_and_xls_load_alike() {
    let options = LoadOptions::default();
    let xlsx = load::load(&path("workbooks/depot-2026-10.xlsx"), &options).unwrap();
    for other in [
        "tests/fixtures/depot-2026-10.ods",
        "tests/fixtures/depot-2026-10.xls",
    ] {
        let t = load::load(&path(other), &options).unwrap();
        assert_eq!(t.sheet, "Deliveries", "{other}");
        assert_eq!(t.headers(), xlsx.headers(), "{other}");
        assert_eq!(t.rows, xlsx.rows, "{other}");
        for (a, b) in xlsx.columns.iter().zip(&t.columns) {
            assert_eq!(a.kind, b.kind, "{other} {}", a.name);
            for row in 0..t.rows {
                let (x, y) = (a.number(row), b.number(row));
                let same = match (x, y) {
                    (Some(p), Some(q)) => (p - q).abs() < 1e-9,
                    _ => x == y,
                };
                assert!(same, "{other} {} row {row}: {x:?} vs {y:?}", a.name);
                if a.number(row).is_none() {
                    assert_eq!(a.text(row), b.text(row), "{other} {} row {row}", a.name);
                }
            }
            assert_eq!(a.issues(), b.issues(), "{other} {}", a.name);
        }
    }
}

#[test]
fn a_missing_sheet_names_the_ones_there() {
    let e = load::load(
        &path("tests/fixtures/depot-2026-10.ods"),
        &LoadOptions {
            sheet: Some("Sheet9".into()),
            ..LoadOptions::default()
        },
    )
    .unwrap_err();
    assert!(
        e.to_string()
            .contains("no sheet named \"Sheet9\"; the sheets are: \"Deliveries\""),
        "{e}"
    );
    let e = load::load(
        &path("workbooks/depot-2026-10.xlsx"),
        &LoadOptions {
            sheet: None,
            header_row: Some(500),
            ..LoadOptions::default()
        },
    )
    .unwrap_err();
    assert!(
        e.to_string().contains("row 500 cannot be the header row"),
        "{e}"
    );
}

/// The file is hashed as it streams past; the hash must be that of the
/// whole file (checked with sha2 over the bytes read at once), for a CSV
/// longer than the loader's first chunk and its read buffer, with a
/// byte-order mark, and for a workbook.
#[test]
fn streamed_files_are_hashed_whole() {
    use sha2::{Digest, Sha256};
    let dir = tempfile::tempdir().unwrap();
    let mut text = String::from("\u{feff}depot;weight\n");
    for i in 0..200_000 {
        text.push_str(&format!("D{};{}.5\n", i % 7, i % 100));
    }
    let csv = dir.path().join("long.csv");
    std::fs::write(&csv, &text).unwrap();
    for file in [csv, path("workbooks/depot-2026-10.xlsx")] {
        let bytes = std::fs::read(&file).unwrap();
        let t = load::load(&file, &LoadOptions::default()).unwrap();
        let hex: String = Sha256::digest(&bytes)
            .iter()
            .map(|b| format!("{b:02x}"))
            .collect();
        assert_eq!(t.source.sha256, hex, "{}", file.display());
        assert_eq!(t.source.size, bytes.len() as u64);
    }
    let t = load::load(&dir.path().join("long.csv"), &LoadOptions::default()).unwrap();
    assert_eq!(
        (t.rows, t.headers()),
        (200_000, vec!["depot".into(), "weight".into()])
    );
    assert_eq!(t.column("weight").unwrap().number(199_999), Some(99.5));
}
