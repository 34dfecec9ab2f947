//! The periods of a batch (issue 12, items 1 and 2): dates in file names in
//! their common forms order the files in time; a fixed `period`, a date that
//! cannot exist and two files of one period stop the batch before anything
//! is read; names without a date are ordered by name, and the batch says so.
//! The data are the invented demo months, copied under other names.

use std::path::{Path, PathBuf};

mod common;

use common::{cells, sheaf, text};

/// The demo months (August, September, October 2026) copied as `names`.
fn months_as(dir: &Path, names: [&str; 3]) -> PathBuf {
    common::demo_months_as(dir, names)
}

fn recipe() -> String {
    common::demo_recipe()
}

fn batch(dir: &Path, recipe: &str) -> std::process::Output {
    let pattern = format!("{}/*.xlsx", dir.join("months").display());
    sheaf(
        &["run", recipe, "--data", &pattern, "--out-dir", "out"],
        dir,
    )
}

/// The periods of the trend sheet in the order its rows give them.
fn trend_periods(dir: &Path) -> Vec<String> {
    let mut seen: Vec<String> = Vec::new();
    for row in cells(&dir.join("out/trend.xlsx"), "Trend").iter().skip(1) {
        let p = row[0].to_string();
        if seen.last() != Some(&p) {
            seen.push(p);
        }
    }
    seen
}

#[test]
fn month_names_without_a_year_order_the_files_in_the_year() {
    let dir = tempfile::tempdir().unwrap();
    months_as(dir.path(), ["qc-january", "qc-february", "qc-march"]);
    let o = batch(dir.path(), &recipe());
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert_eq!(trend_periods(dir.path()), ["January", "February", "March"]);
    let about = cells(&dir.path().join("out/qc-march-summary.xlsx"), "About");
    let period = about.iter().find(|r| r[0] == "period").unwrap();
    assert_eq!(
        period[1].to_string(),
        "March (from \"march\" in the data file's name)"
    );
}

#[test]
fn mixed_date_forms_in_names_order_the_files_in_time() {
    let dir = tempfile::tempdir().unwrap();
    // By name the order would be October, September, August.
    months_as(
        dir.path(),
        ["ops_Aug2026", "depot-09-2026", "deliveries 31.10.2026"],
    );
    let o = batch(dir.path(), &recipe());
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert_eq!(
        trend_periods(dir.path()),
        ["2026-08", "2026-09", "2026-10-31"]
    );
    assert!(!text(&o).contains("ordered by file name"), "{}", text(&o));
}

#[test]
fn names_without_a_date_are_ordered_by_name_and_the_batch_says_so() {
    let dir = tempfile::tempdir().unwrap();
    months_as(dir.path(), ["alpha", "beta", "gamma"]);
    let o = batch(dir.path(), &recipe());
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let t = text(&o);
    assert!(t.contains("no date found in the name of"), "{t}");
    assert!(t.contains("ordered by file name"), "{t}");
    assert!(
        t.contains("alpha.xlsx -> ") && t.contains("beta.xlsx -> "),
        "{t}"
    );
    assert_eq!(trend_periods(dir.path()), ["alpha", "beta", "gamma"]);
}

#[test]
fn a_fixed_period_in_a_batch_of_several_files_is_an_error() {
    let dir = tempfile::tempdir().unwrap();
    months_as(
        dir.path(),
        ["depot-2026-08", "depot-2026-09", "depot-2026-10"],
    );
    let fixed = dir.path().join("fixed.sheaf");
    let text_of = std::fs::read_to_string(recipe()).unwrap();
    std::fs::write(&fixed, format!("{text_of}\nperiod \"2026-01\"\n")).unwrap();
    let o = batch(dir.path(), fixed.to_str().unwrap());
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let t = text(&o);
    assert!(
        t.contains("period \"2026-01\"") && t.contains("3 files"),
        "{t}"
    );
    assert!(t.contains("nothing was read or written"), "{t}");
    assert!(!dir.path().join("out").exists());
}

#[test]
fn an_impossible_date_in_a_name_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    months_as(
        dir.path(),
        ["depot-2026-11", "depot-2026-12", "depot-2026-13"],
    );
    let o = batch(dir.path(), &recipe());
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let t = text(&o);
    assert!(
        t.contains("depot-2026-13.xlsx") && t.contains("month 13") && t.contains("rename"),
        "{t}"
    );
    assert!(!dir.path().join("out").exists());
}

#[test]
fn two_files_of_one_period_are_an_error_naming_both() {
    let dir = tempfile::tempdir().unwrap();
    months_as(
        dir.path(),
        ["depot-2026-09", "depot-2026-10", "deliveries_Oct2026"],
    );
    let o = batch(dir.path(), &recipe());
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let t = text(&o);
    assert!(
        t.contains("deliveries_Oct2026.xlsx and")
            && t.contains("depot-2026-10.xlsx are both of period 2026-10"),
        "{t}"
    );
}

/// The Checks sheet's rows that carry `needle` in any cell.
fn sheet_mentions(path: &Path, sheet: &str, needle: &str) -> bool {
    cells(path, sheet)
        .iter()
        .any(|r| r.iter().any(|c| c.to_string().contains(needle)))
}

#[test]
fn compare_with_the_same_or_a_later_period_warns_on_the_terminal_and_the_checks_sheet() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_as(
        dir.path(),
        ["depot-2026-08", "depot-2026-09", "depot-2026-10"],
    );
    let data = |m: &str| months.join(format!("{m}.xlsx")).display().to_string();
    let single = |m: &str, out: &str, compare: Option<&str>| {
        let mut args = vec!["run".to_string(), recipe(), "--data".into(), data(m)];
        args.extend(["--out".into(), out.into()]);
        if let Some(c) = compare {
            args.extend(["--compare".into(), c.into()]);
        }
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        sheaf(&args, dir.path())
    };
    assert_eq!(
        single("depot-2026-10", "oct.xlsx", None).status.code(),
        Some(0)
    );
    assert_eq!(
        single("depot-2026-09", "sep.xlsx", None).status.code(),
        Some(0)
    );

    // An earlier period: no warning.
    let o = single("depot-2026-10", "oct-vs-sep.xlsx", Some("sep.xlsx"));
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(
        !text(&o).contains("--compare sep.xlsx is of period"),
        "{}",
        text(&o)
    );

    // The same period.
    let o = single("depot-2026-10", "oct-again.xlsx", Some("oct.xlsx"));
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let said = "--compare oct.xlsx is of period 2026-10, the same period as this file (2026-10)";
    assert!(text(&o).contains(said), "{}", text(&o));
    assert!(sheet_mentions(
        &dir.path().join("oct-again.xlsx"),
        "Checks",
        said
    ));

    // A batch whose first period (August) comes before the one compared with.
    let pattern = format!("{}/*.xlsx", months.display());
    let o = sheaf(
        &[
            "run",
            &recipe(),
            "--data",
            &pattern,
            "--out-dir",
            "out",
            "--compare",
            "oct.xlsx",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let said = "is of period 2026-10, a later period than this file (2026-08)";
    assert!(text(&o).contains(said), "{}", text(&o));
    assert!(sheet_mentions(
        &dir.path().join("out/depot-2026-08-summary.xlsx"),
        "Checks",
        said
    ));
}

#[test]
fn a_group_that_appears_or_disappears_is_listed_in_changes_and_checks() {
    let dir = tempfile::tempdir().unwrap();
    // Invented: parcel weights at depots; Ridge closes and Harbour opens in October.
    let months = dir.path().join("months");
    std::fs::create_dir_all(&months).unwrap();
    std::fs::write(
        months.join("site-2026-09.csv"),
        "depot,x\nNorth,1\nNorth,2\nNorth,3\nRidge,4\nRidge,5\nRidge,7\n",
    )
    .unwrap();
    std::fs::write(
        months.join("site-2026-10.csv"),
        "depot,x\nNorth,1\nNorth,2\nNorth,4\nHarbour,4\nHarbour,6\nHarbour,7\n",
    )
    .unwrap();
    let recipe = dir.path().join("r.sheaf");
    std::fs::write(&recipe, "figures \"Levels\" per depot:\n    m = mean(x)\n").unwrap();
    let pattern = format!("{}/*.csv", months.display());
    let o = sheaf(
        &[
            "run",
            recipe.to_str().unwrap(),
            "--data",
            &pattern,
            "--out-dir",
            "out",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let oct = dir.path().join("out/site-2026-10-summary.xlsx");
    let said = "appeared since the previous period: Levels: Harbour; groups that disappeared \
                since the previous period: Levels: Ridge";
    assert!(sheet_mentions(&oct, "Changes", said));
    assert!(sheet_mentions(&oct, "Checks", said));
    let sep = dir.path().join("out/site-2026-09-summary.xlsx");
    assert!(!sheet_mentions(&sep, "Checks", "appeared since"));
}

#[test]
fn a_real_drift_is_flagged_and_a_noisy_skewness_is_not() {
    let dir = tempfile::tempdir().unwrap();
    // Invented: 200 packing times a month at one depot; October runs 3 minutes
    // slower (about one sd), and five slow outliers change the skewness.
    let sep: Vec<f64> = (0..200)
        .map(|i| 10.0 + ((i * 37) % 100) as f64 / 10.0)
        .collect();
    let oct: Vec<f64> = sep
        .iter()
        .enumerate()
        .map(|(i, x)| if i < 5 { x + 12.0 } else { x + 3.0 })
        .collect();
    let csv = |xs: &[f64]| {
        let mut t = String::from("depot,x\n");
        for x in xs {
            t.push_str(&format!("North,{x}\n"));
        }
        t
    };
    std::fs::write(dir.path().join("pack-2026-09.csv"), csv(&sep)).unwrap();
    std::fs::write(dir.path().join("pack-2026-10.csv"), csv(&oct)).unwrap();
    std::fs::write(
        dir.path().join("r.sheaf"),
        "panel \"Packing\" of x per depot:\ndrift 15%\n",
    )
    .unwrap();
    let run = |data: &str, out: &str, extra: &[&str]| {
        let mut args = vec!["run", "r.sheaf", "--data", data, "--out", out];
        args.extend_from_slice(extra);
        let o = sheaf(&args, dir.path());
        assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    };
    run("pack-2026-09.csv", "sep.xlsx", &[]);
    run("pack-2026-10.csv", "oct.xlsx", &["--compare", "sep.xlsx"]);
    let changes = cells(&dir.path().join("oct.xlsx"), "Changes");
    let row = |figure: &str| {
        changes
            .iter()
            .find(|r| r.len() > 7 && r[2] == figure)
            .unwrap_or_else(|| panic!("{figure}: {changes:?}"))
            .clone()
    };
    let num = |d: &calamine::Data| match d {
        calamine::Data::Float(x) => *x,
        other => panic!("{other:?}"),
    };
    let mean = row("x mean");
    assert_eq!(mean[7].to_string(), "moved");
    assert!(num(&mean[9]) > 2.0, "{mean:?}");
    let skew = row("x skewness g1");
    assert!(
        num(&skew[6]).abs() > 0.15,
        "a large relative change: {skew:?}"
    );
    assert_eq!(skew[7].to_string(), "", "{skew:?}");
}

/// The demo recipe with `period from {Delivered on}` added, in `dir`.
fn recipe_with_period_column(dir: &Path) -> String {
    let path = dir.join("dated.sheaf");
    let text_of = std::fs::read_to_string(recipe()).unwrap();
    std::fs::write(&path, format!("{text_of}\nperiod from {{Delivered on}}\n")).unwrap();
    path.display().to_string()
}

#[test]
fn names_without_a_date_take_the_period_from_the_data() {
    let dir = tempfile::tempdir().unwrap();
    // By name: October (alpha), August (beta), September (gamma).
    let months = dir.path().join("months");
    std::fs::create_dir_all(&months).unwrap();
    for (m, name) in [
        ("depot-2026-10", "alpha"),
        ("depot-2026-08", "beta"),
        ("depot-2026-09", "gamma"),
    ] {
        let from = common::root().join(format!("workbooks/{m}.xlsx"));
        std::fs::copy(from, months.join(format!("{name}.xlsx"))).unwrap();
    }
    let o = batch(dir.path(), &recipe_with_period_column(dir.path()));
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(!text(&o).contains("ordered by file name"), "{}", text(&o));
    assert_eq!(trend_periods(dir.path()), ["2026-08", "2026-09", "2026-10"]);
    let about = cells(&dir.path().join("out/alpha-summary.xlsx"), "About");
    let period = about.iter().find(|r| r[0] == "period").unwrap();
    assert_eq!(
        period[1].to_string(),
        "2026-10 (from the dates in column `Delivered on`, 240 rows)"
    );
    // Compared in time order: October's Changes are against September.
    let changes = cells(&dir.path().join("out/alpha-summary.xlsx"), "Changes");
    assert!(changes[1][0].to_string().contains("period 2026-09"));
}

/// Runs `period from COLUMN` and a panel of `x` on one CSV file `name`
/// holding `csv`, writing `r.xlsx` (with `-v`, so the period is said).
fn run_dated_csv(dir: &Path, name: &str, csv: &str, column: &str) -> std::process::Output {
    std::fs::write(dir.join(name), csv).unwrap();
    std::fs::write(
        dir.join("r.sheaf"),
        format!("period from {column}\npanel \"P\" of x:\n"),
    )
    .unwrap();
    sheaf(
        &["run", "r.sheaf", "--data", name, "--out", "r.xlsx", "-v"],
        dir,
    )
}

#[test]
fn a_file_of_several_months_is_an_error_naming_file_column_and_months() {
    let dir = tempfile::tempdir().unwrap();
    // Invented: three deliveries, one of them filed in the month before.
    let csv = "depot,x,shipped\nNorth,1,2026-10-02\nNorth,2,2026-09-30\nNorth,3,2026-10-05\n";
    let o = run_dated_csv(dir.path(), "depot-2026-10.csv", csv, "shipped");
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    let t = text(&o);
    assert!(
        t.contains("depot-2026-10.csv: `period from shipped`: the column holds dates of 2 months: 2026-09 (1 row, first 'depot-2026-10'!C3), 2026-10 (2 rows, first 'depot-2026-10'!C2)"),
        "{t}"
    );
    assert!(!dir.path().join("r.xlsx").exists());
}

#[test]
fn the_data_wins_over_a_name_that_disagrees_and_the_run_says_so() {
    let dir = tempfile::tempdir().unwrap();
    let csv = "depot,x,shipped\nNorth,1,2026-10-02\nNorth,3,2026-10-05\n";
    let o = run_dated_csv(dir.path(), "depot-2026-11.csv", csv, "shipped");
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let said = "the file's name says 2026-11 but its data say 2026-10";
    assert!(text(&o).contains(said), "{}", text(&o));
    assert!(sheet_mentions(&dir.path().join("r.xlsx"), "Checks", said));
    let record = cells(&dir.path().join("r.xlsx"), "Record");
    assert_eq!(record[1][1].to_string(), "2026-10");
}

#[test]
fn a_text_period_column_names_the_period() {
    let dir = tempfile::tempdir().unwrap();
    let csv = "depot,x,month\nNorth,1,Oct 2026\nNorth,3,Oct 2026\nRidge,2,\n";
    let o = run_dated_csv(dir.path(), "export.csv", csv, "month");
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    assert!(
        text(&o).contains("period: 2026-10 (from the periods in column `month`, 2 rows)"),
        "{}",
        text(&o)
    );
}
