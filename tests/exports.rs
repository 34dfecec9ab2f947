//! Real monthly exports, read right or refused loudly: each habit of the
//! invented files in tests/common/exports.rs, run through the binary. The
//! expected figures are computed here from the weights the generator
//! writes, never taken from sheaf's output.

mod common;

use std::path::Path;

use calamine::DataType;

use common::exports::{self, LINE_A, LINE_B, all_weights};
use common::{cells, sheaf, text};

fn mean(values: &[f64]) -> f64 {
    values.iter().sum::<f64>() / values.len() as f64
}

/// `sheaf calc EXPR --data FILE`, its one printed value as a number.
fn calc(dir: &Path, expression: &str, file: &str) -> f64 {
    let o = sheaf(&["calc", expression, "--data", file], dir);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let out = String::from_utf8_lossy(&o.stdout);
    out.trim()
        .parse()
        .unwrap_or_else(|_| panic!("not a number: {out}"))
}

fn run(dir: &Path, recipe: &str, data: &str) -> std::process::Output {
    std::fs::write(dir.join("r.sheaf"), recipe).unwrap();
    sheaf(
        &[
            "run", "r.sheaf", "--data", data, "--out", "o.xlsx", "--force",
        ],
        dir,
    )
}

/// Runs a recipe that must succeed; its terminal text.
fn run_ok(dir: &Path, recipe: &str, data: &str) -> String {
    let o = run(dir, recipe, data);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    text(&o)
}

/// Every one of `parts` is in the terminal text `shown`.
fn says(shown: &str, parts: &[&str]) {
    for part in parts {
        assert!(shown.contains(part), "{part}: {shown}");
    }
}

/// The About sheet's (label, text) pairs.
fn about(dir: &Path) -> Vec<(String, String)> {
    cells(&dir.join("o.xlsx"), "About")
        .into_iter()
        .filter(|r| r.len() >= 2)
        .map(|r| (r[0].to_string(), r[1].to_string()))
        .collect()
}

#[test]
fn a_decimal_comma_export_in_windows_1252_reads_every_number() {
    let dir = tempfile::tempdir().unwrap();
    exports::semicolon_csv(&dir.path().join("w.csv"));
    let mut expected = all_weights();
    expected.push(12.5); // the canteen row
    assert_eq!(calc(dir.path(), "count(weight_g)", "w.csv"), 8.0);
    assert_eq!(calc(dir.path(), "max(weight_g)", "w.csv"), 1499.25);
    let got = calc(dir.path(), "mean(weight_g)", "w.csv");
    assert!((got - mean(&expected)).abs() < 1e-12, "{got}");
    let shown = run_ok(
        dir.path(),
        "panel \"Weights\" of weight_g per line:\n",
        "w.csv",
    );
    says(
        &shown,
        &[
            "encoding: Windows-1252",
            "delimiter: semicolon (from the file's `sep=` line)",
            "numbers: decimal comma, thousands grouped by points (detected)",
        ],
    );
    let about = about(dir.path());
    assert!(
        about
            .iter()
            .any(|(k, v)| k == "encoding" && v.contains("Windows-1252"))
    );
    // The umlaut key came through.
    let panel = cells(&dir.path().join("o.xlsx"), "Weights");
    assert!(panel.iter().flatten().any(|c| *c == "Küche"));
}

#[test]
fn the_recipe_can_fix_the_number_style() {
    let dir = tempfile::tempdir().unwrap();
    exports::semicolon_csv(&dir.path().join("w.csv"));
    // Said the other way round, `1.499,25` is no number: text in a number column.
    let o = run(
        dir.path(),
        "input decimal point, thousands none\nfigures \"F\":\n    n = count(weight_g)\n",
        "w.csv",
    );
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("decimal commas (`1,5`): add `decimal comma`"),
        "{}",
        text(&o)
    );
    let o = run(
        dir.path(),
        "input decimal comma, thousands \".\"\nfigures \"F\":\n    n = count(weight_g)\n",
        "w.csv",
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(text(&o).contains("(set by the recipe)"), "{}", text(&o));
}

#[test]
fn utf16_with_spaces_grouping_thousands() {
    let dir = tempfile::tempdir().unwrap();
    exports::utf16_tsv(&dir.path().join("w.tsv"));
    assert_eq!(calc(dir.path(), "max(weight_g)", "w.tsv"), 1499.25);
    let got = calc(dir.path(), "mean(weight_g)", "w.tsv");
    assert!((got - mean(&all_weights())).abs() < 1e-12);
}

#[test]
fn titles_blank_rows_totals_and_similar_keys() {
    let dir = tempfile::tempdir().unwrap();
    exports::titled_xlsx(&dir.path().join("w.xlsx")).unwrap();
    // Title rows passed over, the blank row and the Total and Average rows left out.
    assert_eq!(calc(dir.path(), "count(weight_g)", "w.xlsx"), 7.0);
    let got = calc(dir.path(), "mean(weight_g)", "w.xlsx");
    assert!((got - mean(&all_weights())).abs() < 1e-12, "{got}");
    let shown = run_ok(
        dir.path(),
        "figures \"Per line\" per line:\n    n = count(weight_g)\n",
        "w.xlsx",
    );
    says(
        &shown,
        &[
            "header row: the headers are on row 4",
            "`input header row 4`",
            "1 blank row left out (sheet row 9)",
            "row 13 left out as a summary row",
            "\"Total\"",
            "row 14 left out as a summary row",
            "similar keys: line: \"Line A\" (Weights!A5), \"line A\" (Weights!A7)",
            "`merge similar keys`",
        ],
    );
    // The first sheet says it too, beside the checks.
    let glance = cells(&dir.path().join("o.xlsx"), "At a glance");
    let said: Vec<String> = glance.iter().flatten().map(|c| c.to_string()).collect();
    assert!(said.iter().any(|t| t == "reading the file"), "{said:?}");
    assert!(
        said.iter()
            .any(|t| t.starts_with("row 13 left out as a summary row"))
    );
    assert!(
        said.iter()
            .any(|t| t.contains("differ only in case or spaces"))
    );
    let checks = cells(&dir.path().join("o.xlsx"), "Checks");
    assert!(
        checks
            .iter()
            .flatten()
            .any(|c| c.to_string().contains("differ only in case or spaces")),
        "the Checks sheet lists the similar keys"
    );
    // Trailing spaces are trimmed (`Line A ` is `Line A`); `line A` is its own group.
    let rows = cells(&dir.path().join("o.xlsx"), "Per line");
    let count_of = |key: &str| {
        rows.iter()
            .find(|r| r.first().is_some_and(|c| *c == key))
            .map(|r| r[2].to_string())
    };
    assert_eq!(count_of("Line A").as_deref(), Some("3"));
    assert_eq!(count_of("line A").as_deref(), Some("1"));
    let merged = run_ok(
        dir.path(),
        "input merge similar keys\nfigures \"Per line\" per line:\n    n = count(weight_g)\n",
        "w.xlsx",
    );
    says(&merged, &["were merged into \"Line A\""]);
    let rows = cells(&dir.path().join("o.xlsx"), "Per line");
    assert!(
        rows.iter()
            .any(|r| r.first().is_some_and(|c| *c == "Line A") && r[2].get_float() == Some(4.0))
    );
    let kept = run_ok(
        dir.path(),
        "input keep summary rows\nfigures \"All\":\n    n = count(weight_g)\n",
        "w.xlsx",
    );
    says(&kept, &["row 13 kept as data"]);
    let rows = cells(&dir.path().join("o.xlsx"), "All");
    assert!(rows.iter().flatten().any(|c| c.get_float() == Some(9.0)));
}

#[test]
fn the_json_report_carries_the_reading_decisions() {
    let dir = tempfile::tempdir().unwrap();
    exports::titled_xlsx(&dir.path().join("w.xlsx")).unwrap();
    std::fs::write(
        dir.path().join("r.sheaf"),
        "figures \"F\":\n    n = count(weight_g)\n",
    )
    .unwrap();
    let o = sheaf(
        &[
            "run", "r.sheaf", "--data", "w.xlsx", "--out", "o.xlsx", "--json",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let doc: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let reading = doc["reading"].as_array().unwrap();
    assert!(reading.iter().any(|n| n["topic"] == "summary rows"
        && n["attention"] == true
        && n["text"].as_str().unwrap().contains("\"Total\"")));
    assert!(reading.iter().any(|n| n["topic"] == "blank rows"));
}

#[test]
fn numbers_stored_as_text_are_read_and_counted() {
    let dir = tempfile::tempdir().unwrap();
    exports::text_numbers_xlsx(&dir.path().join("w.xlsx")).unwrap();
    let got = calc(dir.path(), "mean(weight_g)", "w.xlsx");
    assert!((got - mean(&all_weights())).abs() < 1e-12, "{got}");
    let o = run(dir.path(), "panel \"P\" of weight_g:\n", "w.xlsx");
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(
        text(&o).contains(
            "text read as numbers: weight_g: 7 text cells read as numbers (Weights!B2, Weights!B3"
        ),
        "{}",
        text(&o)
    );
}

#[test]
fn the_sheet_holding_the_recipes_columns_is_found_and_said() {
    let dir = tempfile::tempdir().unwrap();
    exports::two_sheets_xlsx(&dir.path().join("w.xlsx"), "Weight (g)").unwrap();
    let o = run(
        dir.path(),
        "figures \"F\" per line:\n    m = median({Weight (g)})\n",
        "w.xlsx",
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(
        text(&o).contains("the first sheet \"Cover\" lacks \"line\", \"Weight (g)\"")
            && text(&o).contains("add `input sheet \"Weights\"`"),
        "{}",
        text(&o)
    );
    let rows = cells(&dir.path().join("o.xlsx"), "F");
    // Median of line B's three weights, by hand: 500.0.
    assert!(
        rows.iter()
            .any(|r| r.first().is_some_and(|c| *c == "Line B") && r[2].get_float() == Some(500.0))
    );
    assert_eq!(LINE_B[2], 500.0);
}

#[test]
fn a_renamed_header_is_accepted_and_the_fingerprint_kept() {
    let dir = tempfile::tempdir().unwrap();
    exports::two_sheets_xlsx(&dir.path().join("sep.xlsx"), "Weight (g)").unwrap();
    exports::two_sheets_xlsx(&dir.path().join("oct.xlsx"), "Weight [g]").unwrap();
    let body = "input sheet \"Weights\"\nfigures \"F\" per line:\n    m = mean({Weight (g)})\n";
    std::fs::write(dir.path().join("r.sheaf"), body).unwrap();
    let sep = sheaf(
        &[
            "run",
            "r.sheaf",
            "--data",
            "sep.xlsx",
            "--out",
            "sep-out.xlsx",
        ],
        dir.path(),
    );
    assert_eq!(sep.status.code(), Some(0), "{}", text(&sep));
    // Without the header line, October's renamed header is an unknown column.
    let oct = sheaf(
        &[
            "run",
            "r.sheaf",
            "--data",
            "oct.xlsx",
            "--out",
            "oct-out.xlsx",
        ],
        dir.path(),
    );
    assert_eq!(oct.status.code(), Some(2), "{}", text(&oct));
    // One added line accepts the new name; last month stays comparable.
    std::fs::write(
        dir.path().join("r.sheaf"),
        format!("header {{Weight (g)}} or {{Weight [g]}}\n{body}"),
    )
    .unwrap();
    let oct = sheaf(
        &[
            "run",
            "r.sheaf",
            "--data",
            "oct.xlsx",
            "--out",
            "oct-out.xlsx",
            "--compare",
            "sep-out.xlsx",
        ],
        dir.path(),
    );
    assert_eq!(oct.status.code(), Some(0), "{}", text(&oct));
    assert!(
        text(&oct).contains("the recipe's column `Weight (g)` is headed \"Weight [g]\""),
        "{}",
        text(&oct)
    );
    let rows = cells(&dir.path().join("oct-out.xlsx"), "F");
    // `line A` is spelled apart in this file; Line B's mean, by hand.
    let b = mean(&LINE_B);
    assert!(
        rows.iter()
            .any(|r| r.first().is_some_and(|c| *c == "Line B")
                && r[2].get_float().is_some_and(|m| (m - b).abs() < 1e-12))
    );
    assert_eq!(LINE_A.len(), 4);
}

#[test]
fn units_in_the_cells_stop_the_run_with_the_cause() {
    let dir = tempfile::tempdir().unwrap();
    exports::units_csv(&dir.path().join("w.csv"));
    let o = run(dir.path(), "panel \"P\" of weight_g per line:\n", "w.csv");
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let shown = text(&o);
    assert!(
        shown.contains("w.csv")
            && shown.contains("column \"weight_g\" as numbers (line 1)")
            && shown.contains("w!B2 \"500.25 g\"")
            && shown.contains("units written in the cells"),
        "{shown}"
    );
    assert!(!dir.path().join("o.xlsx").exists());
}

#[test]
fn the_committed_fixtures_are_the_generators() {
    // tests/fixtures/exports/ holds what `cargo run --example make_exports`
    // writes; the text files must match it byte for byte.
    let dir = tempfile::tempdir().unwrap();
    exports::write_all(dir.path()).unwrap();
    let committed = common::root().join("tests/fixtures/exports");
    for name in [
        "weights-semicolon.csv",
        "weights-utf16.tsv",
        "weights-units.csv",
    ] {
        assert_eq!(
            std::fs::read(dir.path().join(name)).unwrap(),
            std::fs::read(committed.join(name)).unwrap(),
            "{name}: run `cargo run --example make_exports`"
        );
    }
}

#[test]
fn inspect_shows_the_top_rows_and_the_header_it_chose() {
    let dir = tempfile::tempdir().unwrap();
    exports::titled_xlsx(&dir.path().join("w.xlsx")).unwrap();
    let o = sheaf(&["inspect", "w.xlsx"], dir.path());
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let shown = text(&o);
    assert!(
        shown.contains(">   4  line | box | weight_g | operator"),
        "{shown}"
    );
    assert!(shown.contains("    1  Box weights"), "{shown}");
    assert!(shown.contains("similar keys: line:"), "{shown}");
    // A sheet that does not read as a table still shows its top rows.
    let o = sheaf(&["inspect", "w.xlsx", "--header-row", "2"], dir.path());
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(
        text(&o).contains("    4  line | box | weight_g | operator"),
        "{}",
        text(&o)
    );
}

/// A semicolon export under a title line with no separator, and decimal
/// commas in its cells: the delimiter comes from the table's rows, not the
/// title (which once made sheaf split each row at its decimal commas).
#[test]
fn a_title_line_does_not_decide_the_delimiter() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("titled.csv"),
        "Lab QC export (invented)\n\nline;shipped;weight\nA;2026-10-02;12,5\nA;2026-10-03;13,1\nB;2026-10-04;11,9\nB;2026-10-05;1.012,4\nTotal;;1.049,9\n",
    )
    .unwrap();
    let expected = mean(&[12.5, 13.1, 11.9, 1012.4]);
    assert!((calc(dir.path(), "mean(weight)", "titled.csv") - expected).abs() < 1e-9);
}
