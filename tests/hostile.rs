//! Hostile inputs, kept as regression tests: each ends in a clear error or
//! a correct result, never a panic, a hang or a half-written file.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::Command;

use proptest::prelude::*;
use sheaf::load::{self, LoadOptions};

fn demo() -> Vec<u8> {
    std::fs::read(PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("workbooks/depot-2026-10.xlsx"))
        .unwrap()
}

fn write(dir: &Path, name: &str, bytes: &[u8]) -> PathBuf {
    let path = dir.join(name);
    std::fs::write(&path, bytes).unwrap();
    path
}

fn error_of(path: &Path) -> String {
    load::load(path, &LoadOptions::default())
        .map(|_| ())
        .unwrap_err()
        .to_string()
}

#[test]
fn truncated_and_random_workbooks_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let bytes = demo();
    for cut in [10, 100, 3000, bytes.len() / 2, bytes.len() - 10] {
        let path = write(dir.path(), "cut.xlsx", &bytes[..cut]);
        let e = error_of(&path);
        assert!(e.contains("cut.xlsx"), "{cut}: {e}");
    }
    let path = write(dir.path(), "noise.xlsx", &[0x5a; 5000]);
    assert!(error_of(&path).contains("noise.xlsx"));
    let path = write(dir.path(), "noise.ods", b"PK\x03\x04 not a zip at all");
    assert!(error_of(&path).contains("noise.ods"));
}

/// A workbook whose sheet claims to unpack to 4 GB from a few bytes (the
/// sizes in the zip directory are what a zip bomb inflates to).
#[test]
fn a_zip_bomb_is_refused_before_it_is_inflated() {
    let dir = tempfile::tempdir().unwrap();
    let mut zip = zip::ZipWriter::new(std::io::Cursor::new(Vec::new()));
    let stored =
        zip::write::SimpleFileOptions::default().compression_method(zip::CompressionMethod::Stored);
    zip.start_file("[Content_Types].xml", stored).unwrap();
    zip.write_all(b"<Types/>").unwrap();
    zip.start_file("xl/worksheets/sheet1.xml", stored).unwrap();
    zip.write_all(b"<worksheet/>").unwrap();
    let mut bytes = zip.finish().unwrap().into_inner();
    // Claim 0xFFFF0000 unpacked bytes for every entry in the central directory.
    let mut at = 0;
    while let Some(found) = bytes[at..].windows(4).position(|w| w == b"PK\x01\x02") {
        let header = at + found;
        bytes[header + 24..header + 28].copy_from_slice(&0xFFFF_0000u32.to_le_bytes());
        at = header + 4;
    }
    let path = write(dir.path(), "bomb.xlsx", &bytes);
    let e = error_of(&path);
    assert!(e.contains("zip bomb") || e.contains("would unpack"), "{e}");
}

#[test]
fn csv_with_mixed_encodings_names_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let path = write(
        dir.path(),
        "mixed.csv",
        b"depot,weight\nNorth,2\nM\xfcnster,3\n",
    );
    let e = error_of(&path);
    assert!(
        e.contains("mixed.csv") && e.contains("line 3 is not UTF-8"),
        "{e}"
    );
}

#[test]
fn a_million_columns_load() {
    let dir = tempfile::tempdir().unwrap();
    let header: Vec<String> = (0..1_000_000).map(|i| format!("c{i}")).collect();
    let values: Vec<&str> = (0..1_000_000).map(|_| "1").collect();
    let text = format!("{}\n{}\n", header.join(","), values.join(","));
    let path = write(dir.path(), "wide.csv", text.as_bytes());
    let t = load::load(&path, &LoadOptions::default()).unwrap();
    assert_eq!(t.columns.len(), 1_000_000);
    assert_eq!(t.columns[999_999].number(0), Some(1.0));
}

#[test]
fn error_values_count_as_formula_errors_with_their_cells() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("errors.xlsx");
    let mut workbook = rust_xlsxwriter::Workbook::new();
    let sheet = workbook.add_worksheet();
    sheet.write_string(0, 0, "weight_kg").unwrap();
    sheet.write_number(1, 0, 2.0).unwrap();
    sheet
        .write_formula(
            2,
            0,
            rust_xlsxwriter::Formula::new("=1/0").set_result("#DIV/0!"),
        )
        .unwrap();
    sheet.write_number(3, 0, 4.0).unwrap();
    workbook.save(&path).unwrap();
    let t = load::load(&path, &LoadOptions::default()).unwrap();
    let c = t.column("weight_kg").unwrap();
    let issues = c.issues();
    assert_eq!(issues.len(), 1);
    assert_eq!(issues[0].kind, load::IssueKind::FormulaError);
    assert_eq!(t.address(c, issues[0].row), "Sheet1!A3");
    let csv = write(dir.path(), "e.csv", b"x\n1\n#N/A\n");
    let t = load::load(&csv, &LoadOptions::default()).unwrap();
    assert_eq!(t.columns[0].issues()[0].kind, load::IssueKind::FormulaError);
}

#[test]
fn a_million_group_keys_end_in_a_clear_error() {
    let dir = tempfile::tempdir().unwrap();
    let mut text = String::from("key,x\n");
    for i in 0..1_000_000 {
        text.push_str(&format!("k{i},{}\n", i % 7));
    }
    let data = write(dir.path(), "keys.csv", text.as_bytes());
    let recipe = write(
        dir.path(),
        "r.sheaf",
        b"figures \"F\" per key:\n    m = mean(x)\n",
    );
    let o = Command::new(env!("CARGO_BIN_EXE_sheaf"))
        .args([
            "run",
            recipe.to_str().unwrap(),
            "--data",
            data.to_str().unwrap(),
            "--out",
            "o.xlsx",
        ])
        .current_dir(dir.path())
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(
        String::from_utf8_lossy(&o.stderr).contains("more than 100000 groups"),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    assert!(!dir.path().join("o.xlsx").exists());
}

#[test]
fn reruns_are_byte_for_byte_identical() {
    let dir = tempfile::tempdir().unwrap();
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let mut outputs = Vec::new();
    for name in ["a.xlsx", "b.xlsx"] {
        let o = Command::new(env!("CARGO_BIN_EXE_sheaf"))
            .args([
                "run",
                root.join("workbooks/depot-monthly.sheaf").to_str().unwrap(),
                "--data",
                root.join("workbooks/depot-2026-10.xlsx").to_str().unwrap(),
                "--out",
                name,
            ])
            .env("SHEAF_RUN_TIME", "2026-11-01 09:00:00 UTC")
            .current_dir(dir.path())
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(0));
        outputs.push(std::fs::read(dir.path().join(name)).unwrap());
        std::thread::sleep(std::time::Duration::from_millis(1100));
    }
    assert!(
        outputs[0] == outputs[1],
        "two runs with the same recorded time differ"
    );
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    /// Bounded fuzzing of the CSV loader: any bytes give tables or errors.
    #[test]
    fn the_csv_loader_never_panics(bytes in prop::collection::vec(prop_oneof![any::<u8>(), Just(b','), Just(b'\n'), Just(b'"'), Just(b';')], 0..400)) {
        let dir = tempfile::tempdir().unwrap();
        let path = write(dir.path(), "f.csv", &bytes);
        let _ = load::load(&path, &LoadOptions::default());
    }

    /// Bounded fuzzing of the workbook loader: the demo month with bytes changed.
    #[test]
    fn the_workbook_loader_never_panics(edits in prop::collection::vec((any::<prop::sample::Index>(), any::<u8>()), 1..12)) {
        let mut bytes = demo();
        for (at, byte) in edits {
            let i = at.index(bytes.len());
            bytes[i] = byte;
        }
        let dir = tempfile::tempdir().unwrap();
        let path = write(dir.path(), "f.xlsx", &bytes);
        let _ = load::load(&path, &LoadOptions::default());
    }
}
