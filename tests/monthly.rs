//! Monthly reruns: a batch over the demo months reproduces the per-file
//! results exactly, the trend rows equal the single-file figures, a corrupt
//! file is named and the rest complete, and --compare refuses another recipe.

use std::path::{Path, PathBuf};

mod common;

use calamine::{Data, Reader, open_workbook_auto};
use common::{cells, root, sheaf, text};

const MONTHS: [&str; 3] = common::DEMO_MONTHS;

/// The demo months copied into `dir/months`, so a batch can add files beside them.
fn months_in(dir: &Path) -> PathBuf {
    common::demo_months_as(dir, MONTHS)
}

fn recipe() -> String {
    common::demo_recipe()
}

#[test]
fn a_batch_reproduces_single_runs_chained_by_compare() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_in(dir.path());
    let pattern = format!("{}/depot-*.xlsx", months.display());
    let o = sheaf(
        &["run", &recipe(), "--data", &pattern, "--out-dir", "batch"],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));

    // The same months one by one, each compared with the one before.
    let mut previous: Option<PathBuf> = None;
    for m in MONTHS {
        let data = months.join(format!("{m}.xlsx"));
        let out = dir.path().join(format!("single-{m}.xlsx"));
        let mut args = vec![
            "run".to_string(),
            recipe(),
            "--data".into(),
            data.display().to_string(),
            "--out".into(),
            out.display().to_string(),
        ];
        if let Some(p) = &previous {
            args.extend(["--compare".into(), p.display().to_string()]);
        }
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let o = sheaf(&args, dir.path());
        assert_eq!(o.status.code(), Some(0), "{}", text(&o));
        let batch = dir.path().join(format!("batch/{m}-summary.xlsx"));
        let names = open_workbook_auto(&out).unwrap().sheet_names();
        assert_eq!(
            names,
            open_workbook_auto(&batch).unwrap().sheet_names(),
            "{m}"
        );
        for sheet in names.iter().filter(|n| *n != "About") {
            assert_eq!(
                cells(&out, sheet),
                cells(&batch, sheet),
                "{m}: sheet {sheet} differs between batch and single run"
            );
        }
        previous = Some(out);
    }
}

#[test]
fn trend_rows_equal_the_single_file_figures() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_in(dir.path());
    let pattern = format!("{}/depot-*.xlsx", months.display());
    assert_eq!(
        sheaf(
            &["run", &recipe(), "--data", &pattern, "--out-dir", "out"],
            dir.path()
        )
        .status
        .code(),
        Some(0)
    );
    let trend = cells(&dir.path().join("out/trend.xlsx"), "Trend");
    let mut checked = 0;
    for m in MONTHS {
        let period = &m["depot-".len()..];
        let single = dir.path().join(format!("{m}.xlsx"));
        let o = sheaf(
            &[
                "run",
                &recipe(),
                "--data",
                &months.join(format!("{m}.xlsx")).display().to_string(),
                "--out",
                &single.display().to_string(),
            ],
            dir.path(),
        );
        assert_eq!(o.status.code(), Some(0), "{}", text(&o));
        // The panel sheet of the single run against the trend rows of its period.
        let panel = cells(&single, "Lateness");
        let header = panel.iter().find(|r| r[0] == "depot").unwrap().clone();
        for row in panel.iter().skip_while(|r| r[0] != "depot").skip(1) {
            for label in ["mean", "median", "sd", "IQR"] {
                let c = header.iter().position(|h| *h == label).unwrap();
                let name = format!("{} {label}", row[1]);
                let found = trend.iter().find(|t| {
                    t[0] == period
                        && t[1] == "Lateness"
                        && t[2].to_string() == row[0].to_string()
                        && t[3].to_string() == name
                });
                let found =
                    found.unwrap_or_else(|| panic!("no trend row for {period} {name} {}", row[0]));
                assert_eq!(found[4], row[c], "{period} {name}");
                checked += 1;
            }
        }
    }
    assert_eq!(checked, 3 * 6 * 4);
    let moves = cells(&dir.path().join("out/trend.xlsx"), "Largest moves");
    assert!(moves.len() > 10);
}

#[test]
fn a_corrupt_file_is_named_and_the_rest_complete() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_in(dir.path());
    std::fs::write(
        months.join("depot-2026-11.xlsx"),
        b"PK\x03\x04 this is not a workbook",
    )
    .unwrap();
    let pattern = format!("{}/depot-*.xlsx", months.display());
    let o = sheaf(
        &["run", &recipe(), "--data", &pattern, "--out-dir", "out"],
        dir.path(),
    );
    // 3: some files skipped, the others written (see the exit status table).
    assert_eq!(o.status.code(), Some(3), "{}", text(&o));
    let t = text(&o);
    assert!(
        t.contains("skipped") && t.contains("depot-2026-11.xlsx"),
        "{t}"
    );
    assert!(t.contains("1 of 4 files could not be summarised"), "{t}");
    for m in MONTHS {
        assert!(
            dir.path().join(format!("out/{m}-summary.xlsx")).exists(),
            "{m}"
        );
    }
    let trend = cells(&dir.path().join("out/trend.xlsx"), "Trend");
    let periods: std::collections::BTreeSet<String> =
        trend.iter().skip(1).map(|r| r[0].to_string()).collect();
    assert_eq!(
        periods.into_iter().collect::<Vec<_>>(),
        ["2026-08", "2026-09", "2026-10"]
    );
}

#[test]
fn compare_feeds_change_and_refuses_another_recipe() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_in(dir.path());
    let sept = dir.path().join("sept.xlsx");
    let recipe_path = recipe();
    let run = |data: &str, out: &Path, extra: &[&str]| {
        let mut args = vec![
            "run",
            recipe_path.as_str(),
            "--data",
            data,
            "--out",
            out.to_str().unwrap(),
        ];
        args.extend_from_slice(extra);
        sheaf(&args, dir.path())
    };
    let sept_data = months.join("depot-2026-09.xlsx").display().to_string();
    let oct_data = months.join("depot-2026-10.xlsx").display().to_string();
    assert_eq!(run(&sept_data, &sept, &[]).status.code(), Some(0));
    let oct = dir.path().join("oct.xlsx");
    let o = run(&oct_data, &oct, &["--compare", sept.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));

    // change(share(...)) per depot = |now - before| / |before| from the two Record sheets.
    let record = |p: &Path| cells(p, "Record");
    let term = |rows: &[Vec<Data>], group: &str| -> f64 {
        let r = rows
            .iter()
            .find(|r| r[0] == "(compared values)" && r[1] == group)
            .unwrap();
        match r[3] {
            Data::Float(x) => x,
            _ => panic!(),
        }
    };
    let checks = cells(&oct, "Checks");
    for depot in ["North", "Harbour", "Ridge"] {
        let (before, now) = (term(&record(&sept), depot), term(&record(&oct), depot));
        let row = checks
            .iter()
            .find(|r| r[0] == "steady on-time share" && r[2] == depot)
            .unwrap();
        let value = match row[4] {
            Data::Float(x) => x,
            ref other => panic!("{other:?}"),
        };
        assert!(
            (value - (now - before).abs() / before.abs()).abs() < 1e-12,
            "{depot}"
        );
    }
    let changes = cells(&oct, "Changes");
    assert!(
        changes.iter().any(|r| r.len() > 7 && r[7] == "moved"),
        "some figure moves more than the 15% drift"
    );

    // A result of another recipe is refused with a clear message.
    let other = dir.path().join("other.sheaf");
    std::fs::write(&other, "figures \"F\":\n    m = mean(weight_kg)\n").unwrap();
    let o = sheaf(
        &[
            "run",
            other.to_str().unwrap(),
            "--data",
            &oct_data,
            "--out",
            "x.xlsx",
            "--compare",
            sept.to_str().unwrap(),
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(
        text(&o).contains("was made by a different recipe"),
        "{}",
        text(&o)
    );
    let o = sheaf(
        &[
            "run",
            &recipe(),
            "--data",
            &oct_data,
            "--out",
            "y.xlsx",
            "--compare",
            &oct_data,
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(2));
    assert!(
        text(&o).contains("not a sheaf result workbook"),
        "{}",
        text(&o)
    );
}

#[test]
fn lock_files_hidden_files_and_earlier_results_are_left_out_and_named() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_in(dir.path());
    let pattern = format!("{}/*.xlsx", months.display());
    let dir_arg = months.display().to_string();
    let first = sheaf(
        &["run", &recipe(), "--data", &pattern, "--out-dir", &dir_arg],
        dir.path(),
    );
    assert_eq!(first.status.code(), Some(0), "{}", text(&first));
    // A result under a name that says nothing: recognised by its Record sheet.
    std::fs::rename(
        months.join("depot-2026-09-summary.xlsx"),
        months.join("shared copy.xlsx"),
    )
    .unwrap();
    // What a spreadsheet program leaves beside a file it has open (not a workbook).
    std::fs::write(months.join("~$depot-2026-10.xlsx"), b"\x05analyst").unwrap();
    std::fs::copy(
        months.join("depot-2026-08.xlsx"),
        months.join(".depot-2026-07.xlsx"),
    )
    .unwrap();
    let o = sheaf(
        &[
            "run",
            &recipe(),
            "--data",
            &pattern,
            "--out-dir",
            &dir_arg,
            "--force",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let t = text(&o);
    for (file, why) in [
        ("~$depot-2026-10.xlsx", "lock file"),
        (".depot-2026-07.xlsx", "a hidden file"),
        (
            "shared copy.xlsx",
            "a sheaf result workbook (it has a Record sheet)",
        ),
        ("depot-2026-08-summary.xlsx", "a sheaf result workbook"),
        ("trend.xlsx", "a sheaf trend workbook"),
    ] {
        assert!(
            t.lines()
                .any(|l| l.starts_with("left out") && l.contains(file) && l.contains(why)),
            "{file}: {t}"
        );
    }
    let trend = cells(&months.join("trend.xlsx"), "Trend");
    let periods: std::collections::BTreeSet<String> =
        trend.iter().skip(1).map(|r| r[0].to_string()).collect();
    assert_eq!(
        periods.into_iter().collect::<Vec<_>>(),
        ["2026-08", "2026-09", "2026-10"]
    );
}

#[test]
fn trend_rows_carry_the_change_and_its_noise_scaled_size() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_in(dir.path());
    let pattern = format!("{}/depot-*.xlsx", months.display());
    let o = sheaf(
        &["run", &recipe(), "--data", &pattern, "--out-dir", "out"],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let trend = cells(&dir.path().join("out/trend.xlsx"), "Trend");
    assert_eq!(trend[0][5].to_string(), "change");
    assert_eq!(trend[0][7].to_string(), "change / SE");
    let row = |period: &str, figure: &str| {
        trend
            .iter()
            .find(|r| r[0] == period && r[1] == "Lateness" && r[2] == "North" && r[3] == figure)
            .unwrap_or_else(|| panic!("{period} {figure}"))
            .clone()
    };
    let num = |d: &Data| match d {
        Data::Float(x) => *x,
        other => panic!("{other:?}"),
    };
    let value = |p: &str, f: &str| num(&row(p, f)[4]);
    // The first period has nothing to change from.
    assert!(matches!(row("2026-08", "late_h mean")[5], Data::Empty));
    let (sep, oct) = ("2026-09", "2026-10");
    let change = value(oct, "late_h mean") - value(sep, "late_h mean");
    let r = row(oct, "late_h mean");
    assert!((num(&r[5]) - change).abs() < 1e-12);
    // Welch (1947): sqrt(sd1^2/n1 + sd2^2/n2) from the same rows' sd and n.
    let se = (value(sep, "late_h sd").powi(2) / value(sep, "late_h n")
        + value(oct, "late_h sd").powi(2) / value(oct, "late_h n"))
    .sqrt();
    assert!((num(&r[6]) - se).abs() < 1e-12);
    assert!((num(&r[7]) - change / se).abs() < 1e-9);
    // A median has no standard error yet, and says so.
    assert_eq!(
        row(oct, "late_h median")[6].to_string(),
        "no standard error"
    );
}

/// A result written before the Record stored stable keys (its Record names
/// panel figures by their labels, `late_h skewness g1`) compares exactly as
/// a result written today: the same Changes sheet, row for row. Today's
/// Record stores keys (`late_h skewness_g1`); the Changes sheet shows labels.
#[test]
fn an_older_record_with_display_labels_still_compares() {
    let dir = tempfile::tempdir().unwrap();
    let months = months_in(dir.path());
    let old = root().join("tests/fixtures/record-labels-2026-09.xlsx");
    let old_record = cells(&old, "Record");
    assert_eq!(old_record[2][2], "figure", "the fixture is of the old form");
    assert!(old_record.iter().any(|r| r[2] == "late_h skewness g1"));
    let new = dir.path().join("sept.xlsx");
    let recipe_path = recipe();
    let run = |data: &Path, out: &Path, extra: &[&str]| {
        let mut args = vec!["run", &recipe_path, "--data"];
        let (data, out) = (data.display().to_string(), out.display().to_string());
        args.extend([data.as_str(), "--out", out.as_str()]);
        args.extend_from_slice(extra);
        let o = sheaf(&args, dir.path());
        assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    };
    run(&months.join("depot-2026-09.xlsx"), &new, &[]);
    let new_record = cells(&new, "Record");
    assert_eq!(new_record[2][2], "figure key");
    assert!(new_record.iter().any(|r| r[2] == "late_h skewness_g1"));
    assert!(!new_record.iter().any(|r| r[2] == "late_h skewness g1"));

    let oct = months.join("depot-2026-10.xlsx");
    let (against_old, against_new) = (dir.path().join("a.xlsx"), dir.path().join("b.xlsx"));
    run(&oct, &against_old, &["--compare", old.to_str().unwrap()]);
    run(&oct, &against_new, &["--compare", new.to_str().unwrap()]);
    let changes = cells(&against_old, "Changes");
    assert_eq!(changes, cells(&against_new, "Changes"));
    for shown in [
        "late_h skewness g1",
        "late_h Q1",
        "weight_kg Bowley skewness",
    ] {
        assert!(
            changes.iter().any(|r| r[2] == shown),
            "{shown}: {changes:?}"
        );
    }
    // Every panel figure of both months is compared: 18 figures, less the
    // modes (a list) and the mode basis (words), for 2 columns in 3 depots.
    let panel_rows = changes.iter().filter(|r| r[0] == "Lateness").count();
    assert_eq!(panel_rows, 16 * 2 * 3);
}
