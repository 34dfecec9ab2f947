//! Hostile inputs, kept as regression tests: each ends in a clear error or
//! a correct result, never a panic, a hang or a half-written file.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::Command;

use proptest::prelude::*;

mod common;
use common::{root, sheaf, text};
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
fn csv_that_is_not_utf8_is_read_as_windows_1252_and_the_line_named() {
    let dir = tempfile::tempdir().unwrap();
    let path = write(
        dir.path(),
        "mixed.csv",
        b"depot,weight\nNorth,2\nM\xfcnster,3\n",
    );
    let t = load::load(&path, &LoadOptions::default()).unwrap();
    assert_eq!(
        t.column("depot").unwrap().text(1).as_deref(),
        Some("Münster")
    );
    let how = t.notes.encoding.unwrap();
    assert!(
        how.contains("line 3 is not UTF-8") && how.contains("Windows-1252"),
        "{how}"
    );
    // Past the first 64 KiB the file is read again as a whole.
    let mut late = b"depot,weight\n".to_vec();
    for _ in 0..10_000 {
        late.extend_from_slice(b"North,2\n");
    }
    late.extend_from_slice(b"M\xfcnster,3\n");
    let path = write(dir.path(), "late.csv", &late);
    let t = load::load(&path, &LoadOptions::default()).unwrap();
    assert_eq!(t.rows, 10_001);
    assert_eq!(
        t.column("depot").unwrap().text(10_000).as_deref(),
        Some("Münster")
    );
    assert!(
        t.notes
            .encoding
            .unwrap()
            .contains("line 10002 is not UTF-8")
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

/// A minimal workbook written by hand, with its sheet's rows in the order given.
fn handmade_xlsx(path: &Path, rows: &[(u32, &str)]) {
    use zip::write::SimpleFileOptions;
    let stored = SimpleFileOptions::default().compression_method(zip::CompressionMethod::Stored);
    let mut zip = zip::ZipWriter::new(std::fs::File::create(path).unwrap());
    workbook_parts(&mut zip);
    let body: String = rows
        .iter()
        .map(|(r, cells)| format!(r#"<row r="{r}">{cells}</row>"#))
        .collect();
    zip.start_file("xl/worksheets/sheet1.xml", stored).unwrap();
    zip.write_all(format!("{SHEET_HEAD}{body}{SHEET_TAIL}").as_bytes())
        .unwrap();
    zip.finish().unwrap();
}

const SHEET_HEAD: &str = r#"<?xml version="1.0" encoding="UTF-8"?><worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>"#;
const SHEET_TAIL: &str = "</sheetData></worksheet>";

/// The parts of a one-sheet workbook besides the sheet (xl/worksheets/sheet1.xml).
fn workbook_parts(zip: &mut zip::ZipWriter<std::fs::File>) {
    use zip::write::SimpleFileOptions;
    let stored = SimpleFileOptions::default().compression_method(zip::CompressionMethod::Stored);
    let mut part = |name: &str, text: &str| {
        zip.start_file(name, stored).unwrap();
        zip.write_all(text.as_bytes()).unwrap();
    };
    part(
        "[Content_Types].xml",
        r#"<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/></Types>"#,
    );
    part(
        "_rels/.rels",
        r#"<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/></Relationships>"#,
    );
    part(
        "xl/workbook.xml",
        r#"<?xml version="1.0" encoding="UTF-8"?><workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"><sheets><sheet name="Deliveries" sheetId="1" r:id="rId1"/></sheets></workbook>"#,
    );
    part(
        "xl/_rels/workbook.xml.rels",
        r#"<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet1.xml"/></Relationships>"#,
    );
}

/// The streamed reader meets row 4 before row 2 in the second file and falls
/// back to reading the sheet as a whole range; both give the same table.
#[test]
fn workbook_rows_out_of_order_read_as_in_order() {
    let dir = tempfile::tempdir().unwrap();
    let header = (
        1,
        r#"<c r="A1" t="inlineStr"><is><t>depot</t></is></c><c r="B1" t="inlineStr"><is><t>weight_kg</t></is></c>"#,
    );
    let second = (
        2,
        r#"<c r="A2" t="inlineStr"><is><t>North</t></is></c><c r="B2"><v>2.5</v></c>"#,
    );
    let fourth = (
        4,
        r#"<c r="A4" t="inlineStr"><is><t>South</t></is></c><c r="B4"><v>7</v></c>"#,
    );
    let (in_order, shuffled) = (dir.path().join("a.xlsx"), dir.path().join("b.xlsx"));
    handmade_xlsx(&in_order, &[header, second, fourth]);
    handmade_xlsx(&shuffled, &[header, fourth, second]);
    let a = load::load(&in_order, &LoadOptions::default()).unwrap();
    let b = load::load(&shuffled, &LoadOptions::default()).unwrap();
    for t in [&a, &b] {
        // Sheet row 3 is blank: left out and said; the others keep their addresses.
        assert_eq!(t.rows, 2, "rows 2 and 4 of the sheet");
        assert_eq!(t.notes.blank_rows, [3]);
        let w = t.column("weight_kg").unwrap();
        assert_eq!((w.number(0), w.number(1)), (Some(2.5), Some(7.0)));
        assert_eq!(t.address(w, 1), "Deliveries!B4");
        assert_eq!(t.column("depot").unwrap().text(1).as_deref(), Some("South"));
    }
}

#[test]
fn a_file_of_unknown_type_is_named_with_the_types_sheaf_reads() {
    let dir = tempfile::tempdir().unwrap();
    for name in ["data", "data.pdf"] {
        let path = write(dir.path(), name, b"x\n1\n");
        for e in [
            error_of(&path),
            load::sheet_names(&path).unwrap_err().to_string(),
        ] {
            assert!(e.contains(name) && e.contains("sheaf reads .xlsx"), "{e}");
        }
    }
}

/// The demo recipe over the demo month, written to `out` (relative to `dir`).
fn run_demo(dir: &Path, out: &str, extra: &[&str]) -> std::process::Output {
    let recipe = root().join("workbooks/depot-monthly.sheaf");
    let data = root().join("workbooks/depot-2026-10.xlsx");
    let mut args = vec![
        "run",
        recipe.to_str().unwrap(),
        "--data",
        data.to_str().unwrap(),
        "--out",
        out,
    ];
    args.extend_from_slice(extra);
    sheaf(&args, dir)
}

fn partial_files(dir: &Path) -> Vec<String> {
    std::fs::read_dir(dir)
        .unwrap()
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".partial"))
        .collect()
}

/// A run killed with -9 while writing leaves `.NAME.PID.partial`; the next
/// run writing that target removes it and says so.
#[cfg(target_os = "linux")]
#[test]
fn a_partial_file_of_a_killed_run_is_cleaned() {
    let dir = tempfile::tempdir().unwrap();
    // No process has this id (Linux's pid_max is at most 2^22).
    let stale = dir.path().join(".out.xlsx.4000000000.partial");
    std::fs::write(&stale, b"half a workbook").unwrap();
    let o = run_demo(dir.path(), "out.xlsx", &[]);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(!stale.exists());
    assert!(text(&o).contains("left by an earlier run"), "{}", text(&o));
    assert!(partial_files(dir.path()).is_empty());
}

/// Two runs writing one new target at once: exactly one writes it, the
/// other fails and asks for --force; no partial file is left.
#[test]
fn two_runs_writing_one_new_target_do_not_both_succeed() {
    let dir = tempfile::tempdir().unwrap();
    let codes: Vec<Option<i32>> = std::thread::scope(|s| {
        let runs: Vec<_> = (0..2)
            .map(|_| s.spawn(|| run_demo(dir.path(), "same.xlsx", &[])))
            .collect();
        runs.into_iter()
            .map(|r| {
                let o = r.join().unwrap();
                if o.status.code() != Some(0) {
                    assert!(text(&o).contains("--force"), "{}", text(&o));
                }
                o.status.code()
            })
            .collect()
    });
    assert_eq!(
        codes.iter().filter(|&&c| c == Some(0)).count(),
        1,
        "{codes:?}"
    );
    assert!(codes.contains(&Some(2)), "{codes:?}");
    assert!(partial_files(dir.path()).is_empty());
}

/// A folder that cannot be written (here /proc, refused even to root) ends in
/// a clear error naming the target; a folder given as --out is named as one.
#[test]
fn an_unwritable_target_ends_in_a_clear_error() {
    let dir = tempfile::tempdir().unwrap();
    if Path::new("/proc/self").exists() {
        let o = run_demo(dir.path(), "/proc/sheaf-result.xlsx", &[]);
        assert_eq!(o.status.code(), Some(2));
        assert!(
            text(&o).contains("cannot write /proc/sheaf-result.xlsx"),
            "{}",
            text(&o)
        );
    }
    // A folder, even one named like a workbook, is refused with or without --force.
    std::fs::create_dir(dir.path().join("results.xlsx")).unwrap();
    for extra in [&[][..], &["--force"][..]] {
        let o = run_demo(dir.path(), "results.xlsx", extra);
        assert_eq!(o.status.code(), Some(2));
        assert!(text(&o).contains("a folder"), "{}", text(&o));
    }
}

/// Runs `sheaf ARGS` with its address space capped at `megabytes`, so an
/// allocation far beyond the input's size aborts the run instead of passing.
#[cfg(unix)]
fn sheaf_within(megabytes: u64, args: &[&str], dir: &Path) -> std::process::Output {
    let line = format!("ulimit -v {}; exec \"$0\" \"$@\"", megabytes * 1024);
    Command::new("sh")
        .arg("-c")
        .arg(line)
        .arg(env!("CARGO_BIN_EXE_sheaf"))
        .args(args)
        .current_dir(dir)
        .output()
        .unwrap()
}

/// Tiny xlsx files whose cells claim places no sheet has (row 4,000,000,000,
/// column ZZZZZZ) or, with rows out of order, a dense block of 16,384 x
/// 1,048,576 cells: each ends in a clear error naming the file and the
/// place, within a memory cap far below what the claims imply.
#[cfg(unix)]
#[test]
fn cells_beyond_the_sheet_or_scattered_are_refused_early() {
    let dir = tempfile::tempdir().unwrap();
    let header = (1, r#"<c r="A1" t="inlineStr"><is><t>x</t></is></c>"#);
    // (file name, sheet rows as (row number, cells), the place the error names)
    type Case<'a> = (&'a str, Vec<(u32, &'a str)>, &'a str);
    let cases: [Case; 3] = [
        (
            "far-row.xlsx",
            vec![
                header,
                (4_000_000_000, r#"<c r="A4000000000"><v>1</v></c>"#),
            ],
            "Deliveries!A4000000000",
        ),
        (
            "far-column.xlsx",
            vec![header, (2, r#"<c r="ZZZZZZ2"><v>1</v></c>"#)],
            "column 321272406",
        ),
        (
            "scattered.xlsx",
            vec![
                header,
                (1_048_576, r#"<c r="XFD1048576"><v>1</v></c>"#),
                (2, r#"<c r="A2"><v>1</v></c>"#),
            ],
            "Deliveries!A1 to XFD1048576",
        ),
    ];
    for (name, rows, place) in cases {
        let path = dir.path().join(name);
        handmade_xlsx(&path, &rows);
        assert!(std::fs::metadata(&path).unwrap().len() < 4000);
        for command in ["inspect", "calc"] {
            let mut args = vec![command, path.to_str().unwrap()];
            if command == "calc" {
                args = vec!["calc", "count(x)", "--data", path.to_str().unwrap()];
            }
            let o = sheaf_within(1024, &args, dir.path());
            let said = text(&o);
            assert_eq!(o.status.code(), Some(2), "{name} {command}: {said}");
            assert!(
                said.contains(name) && said.contains(place),
                "{name}: {said}"
            );
        }
    }
}

/// An endless input named .csv (a link to /dev/zero) stops at the line
/// limit with the file and the line named; a device named .xlsx is refused
/// before it is read.
#[cfg(target_os = "linux")]
#[test]
fn endless_inputs_stop_at_a_limit() {
    let dir = tempfile::tempdir().unwrap();
    for name in ["zero.csv", "zero.xlsx"] {
        std::os::unix::fs::symlink("/dev/zero", dir.path().join(name)).unwrap();
    }
    let o = Command::new(env!("CARGO_BIN_EXE_sheaf"))
        .args(["inspect", "zero.csv"])
        .env("SHEAF_MAX_LINE_BYTES", "1000000")
        .current_dir(dir.path())
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(
        text(&o).contains("zero.csv: line 1 is longer than 1000000 bytes"),
        "{}",
        text(&o)
    );
    let o = sheaf(&["inspect", "zero.xlsx"], dir.path());
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("not a regular file"), "{}", text(&o));
}

/// A minimal ods whose content.xml is `content` as given.
fn handmade_ods(path: &Path, content: &str) {
    use zip::write::SimpleFileOptions;
    let stored = SimpleFileOptions::default().compression_method(zip::CompressionMethod::Stored);
    let mut zip = zip::ZipWriter::new(std::fs::File::create(path).unwrap());
    zip.start_file("mimetype", stored).unwrap();
    zip.write_all(b"application/vnd.oasis.opendocument.spreadsheet")
        .unwrap();
    zip.start_file("META-INF/manifest.xml", stored).unwrap();
    zip.write_all(br#"<?xml version="1.0" encoding="UTF-8"?><manifest:manifest xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0"><manifest:file-entry manifest:full-path="/" manifest:media-type="application/vnd.oasis.opendocument.spreadsheet"/><manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/></manifest:manifest>"#).unwrap();
    zip.start_file("content.xml", stored).unwrap();
    zip.write_all(content.as_bytes()).unwrap();
    zip.finish().unwrap();
}

const ODS_HEAD: &str = r#"<?xml version="1.0" encoding="UTF-8"?><office:document-content xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0" office:version="1.2"><office:body><office:spreadsheet><table:table table:name="Depots">"#;

/// An ods whose content.xml ends right after a table's opening tag made the
/// reader spin for ever (calamine 0.38): it is refused at once, in `run`
/// and `inspect`; the same file completed reads.
#[test]
fn an_ods_cut_after_a_table_tag_is_refused_not_spun_on() {
    let dir = tempfile::tempdir().unwrap();
    let cut = dir.path().join("cut.ods");
    handmade_ods(&cut, ODS_HEAD);
    let whole = dir.path().join("whole.ods");
    handmade_ods(
        &whole,
        &format!(
            r#"{ODS_HEAD}<table:table-row><table:table-cell office:value-type="string"><text:p>x</text:p></table:table-cell></table:table-row><table:table-row><table:table-cell office:value-type="float" office:value="4"><text:p>4</text:p></table:table-cell></table:table-row></table:table></office:spreadsheet></office:body></office:document-content>"#
        ),
    );
    let started = std::time::Instant::now();
    for args in [
        vec!["inspect", "cut.ods"],
        vec!["calc", "mean(x)", "--data", "cut.ods"],
    ] {
        let o = sheaf(&args, dir.path());
        assert_eq!(o.status.code(), Some(2), "{}", text(&o));
        assert!(
            text(&o).contains("cut.ods: content.xml opens 1 <table:table> elements but closes 0"),
            "{}",
            text(&o)
        );
    }
    assert!(started.elapsed() < std::time::Duration::from_secs(20));
    let o = sheaf(&["calc", "mean(x)", "--data", "whole.ods"], dir.path());
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert_eq!(String::from_utf8_lossy(&o.stdout).trim(), "4");
}

/// Inputs found by fuzzing (fuzz/, see its README), kept in tests/hostile/:
/// each is read by `inspect` and `calc` under a 1 GB memory cap and ends in
/// exit status 0 or a clear error (2), never a crash, an abort or a hang.
/// - xls-cells-scattered.xls: a fuzzed demo .xls whose cells span a block
///   that calamine would allocate as 56 GB at open.
#[cfg(unix)]
#[test]
fn inputs_found_by_fuzzing_end_cleanly() {
    let dir = root().join("tests/hostile");
    let mut seen = 0;
    for entry in std::fs::read_dir(&dir).unwrap().flatten() {
        let path = entry.path();
        let shown = path.to_str().unwrap();
        for args in [
            vec!["inspect", shown],
            vec!["calc", "count(weight_kg)", "--data", shown],
        ] {
            let o = sheaf_within(1024, &args, &dir);
            assert!(
                matches!(o.status.code(), Some(0 | 2)),
                "{shown}: {:?} {}",
                o.status,
                text(&o)
            );
            assert!(!text(&o).contains("panicked"), "{}", text(&o));
        }
        seen += 1;
    }
    assert!(seen >= 1);
}

/// A recipe saved with a UTF-8 byte-order mark reads like the same recipe
/// without one; a CSV file with a quote that is never closed is refused
/// with the line where the quote opened, not read as one long field.
#[test]
fn byte_order_marks_and_unclosed_quotes() {
    let dir = tempfile::tempdir().unwrap();
    let recipe = "figures \"F\":\n    n = count(weight_kg)\n";
    write(dir.path(), "plain.sheaf", recipe.as_bytes());
    write(
        dir.path(),
        "marked.sheaf",
        format!("\u{feff}{recipe}").as_bytes(),
    );
    write(dir.path(), "ok.csv", b"weight_kg\n1\n2\n");
    let mut outputs = Vec::new();
    for name in ["plain.sheaf", "marked.sheaf"] {
        let o = sheaf(&["validate", name, "--data", "ok.csv"], dir.path());
        assert_eq!(o.status.code(), Some(0), "{name}: {}", text(&o));
        outputs.push(String::from_utf8_lossy(&o.stdout).replace("marked", "plain"));
    }
    assert_eq!(outputs[0], outputs[1]);
    write(
        dir.path(),
        "open.csv",
        b"depot,weight_kg\nNorth,2\n\"South,3\nEast,4\n",
    );
    let o = sheaf(&["inspect", "open.csv"], dir.path());
    assert_eq!(o.status.code(), Some(2));
    assert!(
        text(&o).contains("open.csv: the quoted field opened on line 3 is never closed"),
        "{}",
        text(&o)
    );
}

/// Runs `recipe` over `csv` (both written to `dir`) into out.xlsx.
fn run_recipe(dir: &Path, recipe: &str, csv: &str, extra: &[&str]) -> std::process::Output {
    write(dir, "r.sheaf", recipe.as_bytes());
    write(dir, "d.csv", csv.as_bytes());
    let mut args = vec![
        "run", "r.sheaf", "--data", "d.csv", "--out", "out.xlsx", "--force",
    ];
    args.extend_from_slice(extra);
    sheaf(&args, dir)
}

/// A block named `Record` or with apostrophes at its ends gets a sheet name
/// a spreadsheet accepts, and `--compare` still finds the Record sheet.
#[test]
fn block_names_never_break_sheet_names_or_the_record() {
    let dir = tempfile::tempdir().unwrap();
    let recipe = "figures \"Record\" per depot:\n    m = mean(x)\nfigures \"'quoted'\":\n    n = count(x)\nfigures \"History\":\n    s = sum(x)\n";
    let csv = "depot,x\nNorth,1\nNorth,3\nSouth,5\n";
    let o = run_recipe(dir.path(), recipe, csv, &[]);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    std::fs::rename(dir.path().join("out.xlsx"), dir.path().join("before.xlsx")).unwrap();
    let o = run_recipe(dir.path(), recipe, csv, &["--compare", "before.xlsx"]);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let out = dir.path().join("out.xlsx");
    let sheets = calamine::Reader::sheet_names(&calamine::open_workbook_auto(&out).unwrap());
    for wanted in ["Record 2", "quoted", "History 2", "Changes", "Record"] {
        assert!(sheets.iter().any(|s| s == wanted), "{wanted}: {sheets:?}");
    }
    // The Record sheet holds the recipe's fingerprint, not the block's figures.
    let record = common::cells(&out, "Record");
    assert_eq!(record[0][0].to_string(), "recipe fingerprint");
}

/// Texts longer than the 32,767 characters a cell holds (a title, a check's
/// name, a group key, a period) are cut with a visible mark, and About says
/// so; the run does not fail at the end.
#[test]
fn texts_longer_than_a_cell_are_cut_with_a_mark() {
    let dir = tempfile::tempdir().unwrap();
    let long = "w".repeat(40_000);
    let recipe = format!(
        "title \"{long}\"\nperiod \"{long}\"\nfigures \"F\" per depot:\n    m = mean(x)\ncheck \"{long}\" warn: mean(x) > 0\n"
    );
    let csv = format!("depot,x\n{long},1\nNorth,3\n");
    let o = run_recipe(dir.path(), &recipe, &csv, &[]);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let out = dir.path().join("out.xlsx");
    let mark = "... (cut: a cell holds 32,767 characters)";
    let figures = common::cells(&out, "F");
    let cut = figures
        .iter()
        .flatten()
        .map(|c| c.to_string())
        .find(|t| t.starts_with("www"))
        .unwrap();
    assert!(cut.ends_with(mark) && cut.chars().count() == 32_767);
    let checks = common::cells(&out, "Checks");
    assert!(
        checks
            .iter()
            .flatten()
            .any(|c| c.to_string().ends_with(mark))
    );
    let about = common::cells(&out, "About");
    assert!(about[0][0].to_string().ends_with(mark));
    assert!(
        about
            .iter()
            .flatten()
            .any(|c| c.to_string().contains("is cut and ends in"))
    );
}

/// More missing cells than About lists: the first 100,000 are listed, then
/// how many more there are.
#[test]
fn a_long_list_of_missing_cells_is_capped_with_a_count() {
    let dir = tempfile::tempdir().unwrap();
    let mut csv = String::from("x,y\n");
    for i in 0..100_012 {
        csv.push_str(&format!("{i},\n"));
    }
    let o = run_recipe(dir.path(), "figures \"F\":\n    n = count(y)\n", &csv, &[]);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let about = common::cells(&dir.path().join("out.xlsx"), "About");
    assert!(about.iter().flatten().any(|c| {
        c.to_string()
            .starts_with("... and 12 more cells counted as missing")
    }),);
}

/// A panel whose (group, column) rows cannot fit one sheet is refused as
/// soon as its groups are known, before any figure is computed, with the
/// block named.
#[test]
fn a_panel_larger_than_a_sheet_is_refused_before_the_work() {
    let dir = tempfile::tempdir().unwrap();
    let columns: Vec<String> = (0..16).map(|c| format!("c{c}")).collect();
    let mut csv = format!("key,{}\n", columns.join(","));
    for i in 0..70_000 {
        csv.push_str(&format!("k{i}{}\n", ",1".repeat(16)));
    }
    let recipe = format!("panel \"Wide\" of {} per key:\n", columns.join(", "));
    let started = std::time::Instant::now();
    let o = run_recipe(dir.path(), &recipe, &csv, &[]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("panel \"Wide\" would have 1120000 (group, column) rows"),
        "{}",
        text(&o)
    );
    assert!(started.elapsed() < std::time::Duration::from_secs(60));
    assert!(!dir.path().join("out.xlsx").exists());
}

/// Every sheet is sized before any figure is computed: a histogram per key
/// that would overflow the charts stops the run at once, although the
/// panel above it (10,000 groups of 10 values in 3 columns: 4.7 s of a
/// release build before this check moved, minutes in a debug build)
/// comes first in the recipe. Before, the panel ran to the end first.
#[test]
fn a_later_statement_too_large_stops_the_run_before_the_work_above_it() {
    let dir = tempfile::tempdir().unwrap();
    let mut csv = String::from("key,a,b,c\n");
    for i in 0..100_000 {
        let (a, c) = ((i * 7919) % 1013, (i * 31) % 101);
        csv.push_str(&format!("k{},{a}.5,{},{c}.25\n", i % 10_000, i % 97));
    }
    let recipe = "panel \"Slow\" of a, b, c per key:\nhistogram a per key\n";
    let started = std::time::Instant::now();
    let o = run_recipe(dir.path(), recipe, &csv, &[]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("the histogram of a brings the charts to 10000, more than the 500"),
        "{}",
        text(&o)
    );
    assert!(text(&o).contains("draw it per fewer keys"), "{}", text(&o));
    assert!(
        started.elapsed() < std::time::Duration::from_secs(30),
        "{:?}",
        started.elapsed()
    );
    assert!(!dir.path().join("out.xlsx").exists());
}

/// `calc` over one CSV column, each printed value.
fn calc_values(dir: &Path, expression: &str, values: &[&str]) -> Vec<String> {
    write(
        dir,
        "v.csv",
        format!("x\n{}\n", values.join("\n")).as_bytes(),
    );
    let o = sheaf(&["calc", expression, "--data", "v.csv"], dir);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    String::from_utf8_lossy(&o.stdout)
        .lines()
        .map(str::to_string)
        .collect()
}

/// Moments at the doubles' extremes, against exact rationals: the data are
/// integers, so the mean of {1e15, 1, -1e15} is exactly 1/3 and of {1e17,
/// -1e17, 5} exactly 5/3, and 1.0 / 3.0 and 5.0 / 3.0 are the nearest
/// doubles (IEEE 754 division rounds correctly). The sd of {x, -x} is
/// exactly sqrt(2) |x|; for x = 1e154 the fourth powers overflow, which once
/// made it 0.
#[test]
fn extreme_values_give_exact_moments() {
    let dir = tempfile::tempdir().unwrap();
    let mean = |values: &[&str]| {
        calc_values(dir.path(), "mean(x)", values)[0]
            .parse::<f64>()
            .unwrap()
    };
    assert_eq!(mean(&["1e15", "1", "-1e15"]), 1.0 / 3.0);
    assert_eq!(mean(&["1e17", "-1e17", "5"]), 5.0 / 3.0);
    let sd: f64 = calc_values(dir.path(), "sd(x)", &["1e154", "-1e154"])[0]
        .parse()
        .unwrap();
    let exact = std::f64::consts::SQRT_2 * 1e154;
    assert!((sd - exact).abs() <= 2.0 * f64::EPSILON * exact, "{sd}");
    // The variance, 2e308, is beyond the doubles: calc says so (exit 5, no value).
    let o = sheaf(&["calc", "variance(x)", "--data", "v.csv"], dir.path());
    assert_eq!(o.status.code(), Some(5), "{}", text(&o));
    assert!(
        String::from_utf8_lossy(&o.stderr).contains("beyond the largest number"),
        "{}",
        text(&o)
    );
}

/// A recipe of 10^4 nesting levels, or a 120,000-row CSV file given as the
/// recipe: the diagnostics come in time proportional to the recipe's size
/// (once 57 s for 30,000 rows, so about 15 minutes for these 120,000; the
/// 60 s bound leaves room for a loaded machine), and only the first 20 are
/// printed.
#[test]
fn diagnostics_of_huge_bad_recipes_are_quick_and_capped() {
    let dir = tempfile::tempdir().unwrap();
    let nested: String = (0..10_000)
        .map(|i| format!("{}figures \"x{i}\":\n", " ".repeat(i % 64 + i / 64)))
        .collect();
    let mut rows = String::from("depot,status,weight_kg\n");
    for i in 0..120_000 {
        rows.push_str(&format!("North,delivered,{i}.5\n"));
    }
    write(dir.path(), "d.csv", b"weight_kg\n1\n");
    for (name, text_of) in [("nested.sheaf", nested), ("rows.sheaf", rows)] {
        write(dir.path(), name, text_of.as_bytes());
        let started = std::time::Instant::now();
        let o = sheaf(&["validate", name], dir.path());
        let took = started.elapsed();
        assert_eq!(o.status.code(), Some(2));
        let said = text(&o);
        assert!(
            said.len() < 20_000,
            "{name}: {} bytes of diagnostics",
            said.len()
        );
        assert!(said.contains("more problems in"), "{name}: {said}");
        assert!(
            took < std::time::Duration::from_secs(60),
            "{name}: {took:?}"
        );
    }
}

/// A tiny ods whose one row of values repeats across 16,384 columns and
/// thousands of rows: calamine would expand it to about 10^8 cells (3 GB);
/// it is refused from its repeat counts before it is read.
#[cfg(unix)]
#[test]
fn an_ods_repeating_its_cells_into_a_huge_block_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    handmade_ods(
        &dir.path().join("repeats.ods"),
        &format!(
            r#"{ODS_HEAD}<table:table-row><table:table-cell office:value-type="string"><text:p>x</text:p></table:table-cell></table:table-row><table:table-row table:number-rows-repeated="6000"><table:table-cell table:number-columns-repeated="16384" office:value-type="float" office:value="4"><text:p>4</text:p></table:table-cell></table:table-row></table:table></office:spreadsheet></office:body></office:document-content>"#
        ),
    );
    let o = sheaf_within(1024, &["inspect", "repeats.ods"], dir.path());
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("repeats.ods") && text(&o).contains("repeat"),
        "{}",
        text(&o)
    );
}

/// The demo .xls with its DIMENSIONS record claiming rows 1000 to 240 (a
/// range ending before it starts): calamine would reserve about 2^32 x 6
/// cells (about 1 TB) at open. It is refused, naming the file, within a
/// memory cap.
#[cfg(unix)]
#[test]
fn an_xls_range_ending_before_it_starts_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let mut bytes = std::fs::read(root().join("tests/fixtures/depot-2026-10.xls")).unwrap();
    // The record: type 0x0200, 14 bytes: first row, last row + 1 (u32), first and last column + 1 (u16).
    let at = bytes
        .windows(4)
        .position(|w| w == b"\x00\x02\x0e\x00")
        .unwrap();
    bytes[at + 4..at + 8].copy_from_slice(&1000u32.to_le_bytes());
    write(dir.path(), "backwards.xls", &bytes);
    let o = sheaf_within(1024, &["inspect", "backwards.xls"], dir.path());
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("backwards.xls") && text(&o).contains("claims a range of"),
        "{}",
        text(&o)
    );
}

/// Peak resident memory of `sheaf ARGS` in kilobytes, measured by
/// `/usr/bin/time` (the `time` package; `.ci/run` installs it).
#[cfg(target_os = "linux")]
fn peak_kilobytes(args: &[&str], dir: &Path) -> (std::process::Output, u64) {
    let report = dir.join("peak.txt");
    let o = Command::new("/usr/bin/time")
        .args(["-f", "%M", "-o", report.to_str().unwrap()])
        .arg(env!("CARGO_BIN_EXE_sheaf"))
        .args(args)
        .current_dir(dir)
        .output()
        .expect("/usr/bin/time runs (install the `time` package)");
    let peak = std::fs::read_to_string(&report).unwrap();
    let kilobytes = peak.lines().last().unwrap().trim().parse().unwrap();
    (o, kilobytes)
}

/// No input under 1 MB makes sheaf take more than about 100 times its size
/// in memory beyond what it takes for a two-line file (with a floor of
/// 64 MB: a sheet may unpack to 24 MB whatever its ratio, about 60 MB read).
/// Every small hostile input of this file and of tests/hostile/ is read by
/// `inspect` and measured; each must end cleanly (status 0 or 2). A CSV of
/// 100,000 columns of a few rows is read by `calc` (about 60 times its
/// size): `inspect` lists each column, about 1 KB each, which the README
/// states as the one exception.
#[cfg(target_os = "linux")]
#[test]
fn small_inputs_stay_within_a_hundred_times_their_size_in_memory() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let header = (1, r#"<c r="A1" t="inlineStr"><is><t>x</t></is></c>"#);
    handmade_xlsx(
        &d.join("far-row.xlsx"),
        &[
            header,
            (4_000_000_000, r#"<c r="A4000000000"><v>1</v></c>"#),
        ],
    );
    handmade_xlsx(
        &d.join("scattered.xlsx"),
        &[
            header,
            (1_048_576, r#"<c r="XFD1048576"><v>1</v></c>"#),
            (2, r#"<c r="A2"><v>1</v></c>"#),
        ],
    );
    handmade_ods(
        &d.join("repeats.ods"),
        &format!(
            r#"{ODS_HEAD}<table:table-row><table:table-cell office:value-type="string"><text:p>x</text:p></table:table-cell></table:table-row><table:table-row table:number-rows-repeated="6000"><table:table-cell table:number-columns-repeated="16384" office:value-type="float" office:value="4"><text:p>4</text:p></table:table-cell></table:table-row></table:table></office:spreadsheet></office:body></office:document-content>"#
        ),
    );
    handmade_ods(&d.join("cut.ods"), ODS_HEAD);
    // 9,600,000 repeated cells deflated into about 600 KB, with honest sizes.
    let row = format!("<row>{}</row>", "<c><v>1</v></c>".repeat(12));
    let headers: String = (0..12)
        .map(|c| format!(r#"<c t="inlineStr"><is><t>c{c}</t></is></c>"#))
        .collect();
    let headers = format!("<row>{headers}</row>");
    deflated_xlsx(&d.join("repeated.xlsx"), &headers, &row, 800_000);
    write(d, "tiny.csv", b"x\n1\n");
    let mut inputs: Vec<PathBuf> = std::fs::read_dir(root().join("tests/hostile"))
        .unwrap()
        .flatten()
        .map(|e| e.path())
        .collect();
    for name in [
        "far-row.xlsx",
        "scattered.xlsx",
        "repeats.ods",
        "cut.ods",
        "repeated.xlsx",
    ] {
        inputs.push(d.join(name));
    }
    let (_, baseline) = peak_kilobytes(&["inspect", "tiny.csv"], d);
    let wide = (0..100_000)
        .map(|c| format!("c{c}"))
        .collect::<Vec<_>>()
        .join(",");
    let rows = format!("{}\n", ",".repeat(99_999)).repeat(2);
    let wide_csv = write(d, "wide.csv", format!("{wide}\n{rows}").as_bytes());
    let size = std::fs::metadata(&wide_csv).unwrap().len();
    let (o, peak) = peak_kilobytes(&["calc", "count(c5)", "--data", "wide.csv"], d);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(
        size < 1 << 20 && peak.saturating_sub(baseline) <= 100 * size / 1024,
        "wide.csv ({size} bytes) took {peak} KB at its peak"
    );
    for input in &inputs {
        let size = std::fs::metadata(input).unwrap().len();
        assert!(
            size < 1 << 20,
            "{} ({size} bytes) is a small input",
            input.display()
        );
        let (o, peak) = peak_kilobytes(&["inspect", input.to_str().unwrap()], d);
        assert!(
            matches!(o.status.code(), Some(0 | 2)),
            "{}: {}",
            input.display(),
            text(&o)
        );
        let allowed = (100 * size / 1024).max(64 * 1024);
        assert!(
            peak.saturating_sub(baseline) <= allowed,
            "{} ({size} bytes) took {peak} KB at its peak, {baseline} KB for a two-line file",
            input.display()
        );
    }
    let o = sheaf(&["inspect", "repeated.xlsx"], d);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        text(&o).contains("repeated.xlsx: cannot read the file: the workbook would unpack to")
            && text(&o).contains("SHEAF_MAX_UNPACK_RATIO"),
        "{}",
        text(&o)
    );
}

/// A workbook whose one sheet is `first` then `row` `times` over, deflated
/// and streamed into the zip so the test never holds the sheet.
fn deflated_xlsx(path: &Path, first: &str, row: &str, times: usize) {
    use zip::write::SimpleFileOptions;
    let deflated = SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Deflated)
        .compression_level(Some(9));
    let mut zip = zip::ZipWriter::new(std::fs::File::create(path).unwrap());
    workbook_parts(&mut zip);
    zip.start_file("xl/worksheets/sheet1.xml", deflated)
        .unwrap();
    zip.write_all(SHEET_HEAD.as_bytes()).unwrap();
    zip.write_all(first.as_bytes()).unwrap();
    let chunk = row.repeat(1000);
    for _ in 0..times / 1000 {
        zip.write_all(chunk.as_bytes()).unwrap();
    }
    zip.write_all(SHEET_TAIL.as_bytes()).unwrap();
    zip.finish().unwrap();
}

/// Outputs that cannot fit are refused as soon as their groups are known,
/// before their figures are computed, with the statement named: a histogram
/// per key of 100,000 keys (100,000 charts), and checks per key whose
/// results overflow the Checks sheet's rows.
#[test]
fn charts_and_checks_beyond_a_result_are_refused_before_the_work() {
    let dir = tempfile::tempdir().unwrap();
    let mut csv = String::from("key,x\n");
    for i in 0..100_000 {
        csv.push_str(&format!("k{i},{}\n", i % 7));
    }
    let o = run_recipe(dir.path(), "histogram x per key\n", &csv, &[]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("the histogram of x brings the charts to 100000, more than the 500"),
        "{}",
        text(&o)
    );
    let checks: String = (0..11)
        .map(|c| format!("check \"c{c}\" warn per key: max(x) < 10\n"))
        .collect();
    let o = run_recipe(dir.path(), &checks, &csv, &[]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("check \"c10\" brings the checks to 1100011 results"),
        "{}",
        text(&o)
    );
    assert!(!dir.path().join("out.xlsx").exists());
}
