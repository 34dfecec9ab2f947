//! End to end: the `sheaf` binary on the demo data, the result read back
//! with calamine, exit statuses, and a golden record of the layout.

use std::path::{Path, PathBuf};

mod common;

use calamine::{Data, Reader, open_workbook_auto};
use common::{cells, root, sheaf, text};
use sheaf::load::{self, LoadOptions};
use sheaf::stats::{self, Sample};

fn demo_recipe() -> PathBuf {
    root().join("workbooks/depot-monthly.sheaf")
}

fn october() -> PathBuf {
    root().join("workbooks/depot-2026-10.xlsx")
}

type Grid = Vec<Vec<Data>>;

fn s(d: &Data) -> String {
    match d {
        Data::Empty => String::new(),
        other => other.to_string(),
    }
}

fn f(d: &Data) -> f64 {
    match d {
        Data::Float(x) => *x,
        Data::Int(i) => *i as f64,
        other => panic!("not a number: {other:?}"),
    }
}

/// The row of a table whose first cells are `keys`, with the header row.
fn find<'a>(grid: &'a Grid, keys: &[&str]) -> (&'a Vec<Data>, &'a Vec<Data>) {
    let header = grid
        .iter()
        .find(|r| s(&r[0]) == "depot" || s(&r[0]) == "check")
        .unwrap();
    let row = grid
        .iter()
        .find(|r| keys.iter().enumerate().all(|(i, k)| s(&r[i]) == *k))
        .unwrap_or_else(|| panic!("no row {keys:?}"));
    (header, row)
}

fn column(header: &[Data], label: &str) -> usize {
    header
        .iter()
        .position(|h| s(h) == label)
        .unwrap_or_else(|| panic!("no column {label}"))
}

/// `sheaf run RECIPE --data <the demo October> EXTRA...` in `dir`.
fn run_on_october(dir: &Path, recipe: &Path, extra: &[&str]) -> std::process::Output {
    let (recipe, data) = (recipe.to_str().unwrap(), october());
    let args = [
        &["run", recipe, "--data", data.to_str().unwrap()][..],
        extra,
    ]
    .concat();
    sheaf(&args, dir)
}

fn run_demo(dir: &Path) -> PathBuf {
    let out = dir.join("october.xlsx");
    let o = run_on_october(dir, &demo_recipe(), &["--out", out.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    out
}

#[test]
fn the_demo_run_writes_every_sheet_and_its_figures_agree_with_the_core() {
    let dir = tempfile::tempdir().unwrap();
    let out = run_demo(dir.path());
    let wb = open_workbook_auto(&out).unwrap();
    assert_eq!(
        wb.sheet_names(),
        [
            "At a glance",
            "Lateness",
            "Lateness robustness",
            "Service levels",
            "Heavy parcels",
            "Checks",
            "Charts",
            "About",
            "Record"
        ]
    );

    // Recompute Harbour's lateness in hours by another path: the loader and the core directly.
    let table = load::load(
        &october(),
        &LoadOptions {
            sheet: Some("Deliveries".into()),
            ..LoadOptions::default()
        },
    )
    .unwrap();
    let (depot, status, late) = (
        table.column("depot").unwrap(),
        table.column("status").unwrap(),
        table.column("Minutes late").unwrap(),
    );
    let harbour: Vec<Option<f64>> = (0..table.rows)
        .filter(|&r| {
            depot.text(r).as_deref() == Some("Harbour")
                && status.text(r).as_deref() != Some("cancelled")
        })
        .map(|r| late.number(r).map(|m| m / 60.0))
        .collect();
    let sample = Sample::from_column(harbour);
    let panel = cells(&out, "Lateness");
    let (header, row) = find(&panel, &["Harbour", "late_h"]);
    assert_eq!(f(&row[column(header, "n")]), sample.count() as f64);
    assert_eq!(f(&row[column(header, "missing")]), sample.missing() as f64);
    assert!((f(&row[column(header, "mean")]) - sample.mean().unwrap()).abs() < 1e-12);
    assert!((f(&row[column(header, "median")]) - stats::median(&sample).unwrap()).abs() < 1e-12);
    assert!(
        (f(&row[column(header, "IQR")]) - stats::iqr(&sample, Default::default()).unwrap()).abs()
            < 1e-12
    );

    // The typed-in 900 minutes (row 18 of the sheet) is named by its cell,
    // with the number the cell holds and the hours late_h made of it.
    let robust = cells(&out, "Lateness robustness");
    let (header, row) = find(&robust, &["Harbour", "late_h"]);
    assert_eq!(s(&row[column(header, "status")]), "warn");
    assert!(
        s(&row[column(header, "3 IQR cells")]).contains("Deliveries!D18 holds 900, used as 15"),
        "{:?}",
        row
    );
    let (header, row) = find(&robust, &["North", "weight_kg"]);
    assert!(s(&row[column(header, "3 IQR cells")]).contains("Deliveries!E41 (250)"));
    assert!(s(&row[column(header, "its cell (first row if tied)")]).starts_with("Deliveries!E41"));

    // Checks: the overall mean-median check and its value.
    let checks = cells(&out, "Checks");
    let (header, row) = find(&checks, &["no negative weight"]);
    assert_eq!(s(&row[column(header, "result")]), "pass");

    // About: provenance, the missing cells with their addresses, the recipe.
    let about: Vec<String> = cells(&out, "About")
        .iter()
        .flat_map(|r| r.iter().map(s))
        .collect();
    for wanted in [
        "depot-2026-10.xlsx",
        "Deliveries",
        "2026-11-01 09:00:00 UTC",
        "Deliveries!E64",
        "text in a numeric column",
        "n/a",
        "Deliveries!D89",
        "blank cell",
    ] {
        assert!(about.iter().any(|c| c == wanted), "About lacks {wanted}");
    }
    assert!(
        about
            .iter()
            .any(|c| c.contains("does not replace the rules"))
    );
    assert!(
        about
            .iter()
            .any(|c| c.starts_with("rows skipped") || c.contains("condition false"))
    );
    let sha = about
        .iter()
        .find(|c| c.len() == 64 && c.chars().all(|ch| ch.is_ascii_hexdigit()))
        .unwrap();
    assert_eq!(sha, &table.source.sha256);
}

#[test]
fn exit_status_one_when_a_fail_check_fails() {
    let dir = tempfile::tempdir().unwrap();
    let recipe = dir.path().join("strict.sheaf");
    std::fs::write(
        &recipe,
        "check \"weights are plausible\" fail per depot: max(weight_kg) <= 100\n",
    )
    .unwrap();
    let o = run_on_october(dir.path(), &recipe, &["--out", "r.xlsx"]);
    assert_eq!(o.status.code(), Some(1), "{}", text(&o));
    assert!(
        text(&o).contains("fail: \"weights are plausible\" North"),
        "{}",
        text(&o)
    );
    let checks = cells(&dir.path().join("r.xlsx"), "Checks");
    let (header, row) = find(&checks, &["weights are plausible", "fail", "North"]);
    assert_eq!(f(&row[column(header, "value")]), 250.0);
    assert_eq!(s(&row[column(header, "result")]), "fail");
}

#[test]
fn bad_recipes_and_data_exit_with_status_two_and_say_where() {
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad.sheaf");
    std::fs::write(&bad, "title \"x\"\nlet late_h = {Minutes lat} / 60\n").unwrap();
    let o = run_on_october(dir.path(), &bad, &[]);
    assert_eq!(o.status.code(), Some(2));
    let t = text(&o);
    assert!(
        t.contains("no column named `Minutes lat`")
            && t.contains("bad.sheaf:2:14")
            && t.contains("did you mean `{Minutes late}`?"),
        "{t}"
    );
    assert!(
        std::fs::read_dir(dir.path()).unwrap().all(|e| !e
            .unwrap()
            .path()
            .to_string_lossy()
            .ends_with(".xlsx")),
        "nothing may be written"
    );

    let syntax = dir.path().join("syntax.sheaf");
    std::fs::write(&syntax, "figures \"F\":\n    m = mean(weight_kg\n").unwrap();
    let t = text(&sheaf(&["validate", syntax.to_str().unwrap()], dir.path()));
    assert!(
        t.contains("syntax.sheaf:2:23") && t.contains("expected `,` or `)`"),
        "{t}"
    );

    let wrong_sheet = dir.path().join("sheet.sheaf");
    std::fs::write(
        &wrong_sheet,
        "input sheet \"Deliverys\"\nboxplot weight_kg\n",
    )
    .unwrap();
    let o = run_on_october(dir.path(), &wrong_sheet, &[]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        text(&o).contains("no sheet named \"Deliverys\"; the sheets are: \"Deliveries\""),
        "{}",
        text(&o)
    );

    let o = sheaf(
        &[
            "run",
            demo_recipe().to_str().unwrap(),
            "--data",
            "missing.xlsx",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("missing.xlsx: cannot read the file"));

    let o = sheaf(&["run", demo_recipe().to_str().unwrap()], dir.path());
    assert_eq!(o.status.code(), Some(2), "usage errors exit 2 too");
}

#[test]
fn results_are_not_replaced_without_force_and_the_input_is_never_written() {
    let dir = tempfile::tempdir().unwrap();
    let before = std::fs::read(october()).unwrap();
    let out = run_demo(dir.path());
    let first = std::fs::read(&out).unwrap();
    let to_out = ["--out", out.to_str().unwrap()];
    let o = run_on_october(dir.path(), &demo_recipe(), &to_out);
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("exists already; pass --force"));
    assert_eq!(std::fs::read(&out).unwrap(), first);
    let o = run_on_october(
        dir.path(),
        &demo_recipe(),
        &[&to_out[..], &["--force"]].concat(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let o = run_on_october(
        dir.path(),
        &demo_recipe(),
        &["--out", october().to_str().unwrap(), "--force"],
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(text(&o).contains("is the input file"));
    assert_eq!(
        std::fs::read(october()).unwrap(),
        before,
        "the input file changed"
    );
    let leftovers: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .filter(|n| n.to_string_lossy().ends_with(".partial"))
        .collect();
    assert!(leftovers.is_empty());
}

#[test]
fn csv_input_calc_inspect_and_json() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("depot.csv");
    std::fs::write(&csv, "\u{feff}depot;status;Minutes late;weight_kg\nNorth;delivered;5;2.5\nNorth;delivered;7;x\nSouth;cancelled;;3\nSouth;delivered;12;4\nSouth;delivered;30;4\n").unwrap();
    let calc = |e: &str| {
        text(&sheaf(
            &["calc", e, "--data", csv.to_str().unwrap()],
            dir.path(),
        ))
    };
    assert_eq!(calc("median({Minutes late})"), "9.5\n");
    assert_eq!(calc("modes(weight_kg)"), "4\n");
    assert_eq!(calc("{Minutes late} / 2"), "2.5\n3.5\nmissing\n6\n15\n");
    assert_eq!(calc("missing(weight_kg)"), "1\n");
    assert!(calc("meen(weight_kg)").contains("did you mean `mean`?"));
    let inspect = text(&sheaf(&["inspect", csv.to_str().unwrap()], dir.path()));
    assert!(
        inspect.contains("weight_kg") && inspect.contains("depot!D3"),
        "{inspect}"
    );

    let recipe = dir.path().join("r.sheaf");
    std::fs::write(&recipe, "rows where status != \"cancelled\"\nfigures \"Late\" per depot:\n    m = mean({Minutes late})\n    n = count(weight_kg)\n").unwrap();
    let o = sheaf(
        &[
            "run",
            recipe.to_str().unwrap(),
            "--data",
            csv.to_str().unwrap(),
            "--json",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let json: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let rows = &json["blocks"][0]["rows"];
    assert_eq!(rows[0]["group"][0], "North");
    assert_eq!(rows[0]["figures"]["m"], 6.0);
    assert_eq!(rows[1]["figures"]["m"], 21.0);
    assert_eq!(rows[0]["figures"]["n"], 1.0);
    assert_eq!(json["rows_skipped"][0]["rows"], 1);
    assert_eq!(json["missing_cells"][0]["cell"], "depot!C4");
    assert!(dir.path().join("depot-summary.xlsx").exists());
}

#[test]
fn validate_checks_columns_against_the_data() {
    let dir = tempfile::tempdir().unwrap();
    let o = sheaf(
        &[
            "validate",
            demo_recipe().to_str().unwrap(),
            "--data",
            october().to_str().unwrap(),
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(text(&o).contains("ok, 14 statements, every column found"));
}

/// The layout of the result: sheet names, each sheet's table header and
/// the labels down the About sheet. Regenerate with SHEAF_BLESS=1 after a
/// deliberate change, and review the diff.
#[test]
fn the_workbook_layout_matches_the_golden_record() {
    let dir = tempfile::tempdir().unwrap();
    let out = run_demo(dir.path());
    let mut wb = open_workbook_auto(&out).unwrap();
    let mut layout = String::new();
    for name in wb.sheet_names() {
        let range = wb.worksheet_range(&name).unwrap();
        layout.push_str(&format!(
            "== {name} ({} x {})\n",
            range.height(),
            range.width()
        ));
        let rows: Vec<Vec<String>> = range.rows().map(|r| r.iter().map(s).collect()).collect();
        let header = rows
            .iter()
            .find(|r| r.len() > 1 && r.iter().filter(|c| !c.is_empty()).count() > 2);
        if let Some(h) = header {
            layout.push_str(&format!(
                "header: {}\n",
                h.iter()
                    .filter(|c| !c.is_empty())
                    .cloned()
                    .collect::<Vec<_>>()
                    .join(" | ")
            ));
        }
        if name == "About" {
            for r in &rows {
                if !r[0].is_empty() && r[0] != "time of run" {
                    layout.push_str(&format!("label: {}\n", r[0]));
                }
            }
        }
    }
    let golden = root().join("tests/golden/demo-layout.txt");
    if std::env::var("SHEAF_BLESS").is_ok() {
        std::fs::write(&golden, &layout).unwrap();
    }
    let expected = std::fs::read_to_string(&golden)
        .expect("run once with SHEAF_BLESS=1 to create the golden record");
    assert_eq!(
        layout, expected,
        "the workbook layout changed; if deliberate, rerun with SHEAF_BLESS=1 and review the diff"
    );
}

#[test]
fn text_that_looks_like_a_formula_is_written_as_text() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("keys.csv");
    std::fs::write(&csv, "depot,weight_kg\n=1+1,2\n+SUM(A1),3\n@cmd,4\n-x,5\n").unwrap();
    let recipe = dir.path().join("r.sheaf");
    std::fs::write(
        &recipe,
        "figures \"W\" per depot:\n    w = mean(weight_kg)\n",
    )
    .unwrap();
    let o = sheaf(
        &[
            "run",
            recipe.to_str().unwrap(),
            "--data",
            csv.to_str().unwrap(),
            "--out",
            "k.xlsx",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let grid = cells(&dir.path().join("k.xlsx"), "W");
    let keys: Vec<String> = grid.iter().skip(4).map(|r| s(&r[0])).collect();
    assert_eq!(keys, ["=1+1", "+SUM(A1)", "@cmd", "-x"]);
    for row in grid.iter().skip(4) {
        assert!(matches!(row[0], Data::String(_)), "{:?}", row[0]);
    }
}

/// The workbook's own properties carry the recorded run time as a proper
/// W3C date (some readers refuse a workbook whose dates read 0-00-00).
#[test]
fn the_workbook_properties_carry_the_run_time() {
    use std::io::Read;
    let dir = tempfile::tempdir().unwrap();
    let out = run_demo(dir.path());
    let mut archive = zip::ZipArchive::new(std::fs::File::open(&out).unwrap()).unwrap();
    let mut core = String::new();
    archive
        .by_name("docProps/core.xml")
        .unwrap()
        .read_to_string(&mut core)
        .unwrap();
    assert!(
        core.contains(r#"<dcterms:created xsi:type="dcterms:W3CDTF">2026-11-01T09:00:00Z<"#),
        "{core}"
    );
    assert!(!core.contains(">0-00-00"), "{core}");
}
