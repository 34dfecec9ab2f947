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
    assert_eq!(
        trend_periods(&dir.path().join("out/trend.xlsx")),
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
    assert_eq!(
        trend_periods(&months.join("trend.xlsx")),
        ["2026-08", "2026-09", "2026-10"]
    );
}

/// The periods a trend workbook's Trend sheet holds, in order.
fn trend_periods(trend: &Path) -> Vec<String> {
    let rows = cells(trend, "Trend");
    let periods: std::collections::BTreeSet<String> =
        rows.iter().skip(1).map(|r| r[0].to_string()).collect();
    periods.into_iter().collect()
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
    // A median's: sqrt(se1^2 + se2^2) from the standard errors each
    // period's Record keeps (Maritz-Jarrett, checked against scipy in
    // tests/reference.rs).
    let kept = |file: &str| {
        let record = cells(
            &dir.path().join(format!("out/{file}-summary.xlsx")),
            "Record",
        );
        record
            .iter()
            .find(|r| {
                r[0] == "Lateness" && r[1] == "North" && r[2] == "late_h median (standard error)"
            })
            .map(|r| num(&r[3]))
            .unwrap()
    };
    let median_se = kept("depot-2026-09").hypot(kept("depot-2026-10"));
    assert!((num(&row(oct, "late_h median")[6]) - median_se).abs() < 1e-15);
    // An IQR has none, and says so.
    assert_eq!(row(oct, "late_h IQR")[6].to_string(), "no standard error");
    // Standard errors are not figures of their own on the trend sheet.
    assert!(
        !trend
            .iter()
            .any(|r| r[3].to_string().contains("standard error"))
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
    // The same figures compared, with the same values and changes (the
    // first seven columns). The newer Record also keeps standard errors and
    // groups with no rows, so its comparison can say more; it never says less.
    let compared = |table: &[Vec<calamine::Data>]| -> Vec<Vec<String>> {
        table
            .iter()
            .skip(3)
            .map(|r| r.iter().take(7).map(|c| c.to_string()).collect())
            .collect()
    };
    let against_new_rows = compared(&cells(&against_new, "Changes"));
    for row in compared(&changes) {
        assert!(against_new_rows.contains(&row), "{row:?}");
    }
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

/// A seeded generator for invented test data (xorshift64*; the numbers
/// need only be fixed, not good).
struct Draws(u64);

impl Draws {
    fn uniform(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        ((self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }

    /// Standard normal by Box-Muller.
    fn normal(&mut self) -> f64 {
        let (u, v) = (self.uniform(), self.uniform());
        (-2.0 * u.ln()).sqrt() * (2.0 * std::f64::consts::PI * v).cos()
    }

    fn exponential(&mut self) -> f64 {
        -self.uniform().ln()
    }
}

/// `xs` rescaled to mean exactly `mean` and sample sd exactly `sd`.
fn standardised(xs: &[f64], mean: f64, sd: f64) -> Vec<f64> {
    let n = xs.len() as f64;
    let m = xs.iter().sum::<f64>() / n;
    let s = (xs.iter().map(|x| (x - m).powi(2)).sum::<f64>() / (n - 1.0)).sqrt();
    xs.iter().map(|x| mean + sd * (x - m) / s).collect()
}

/// Invented: minutes to pack a parcel at four depots, September and
/// October. South drifts by one sd (and one parcel takes very long); East
/// moves its mean by 2.5 standard errors of the change; West's times are
/// skewed and two independent months of the same process.
fn packing_months(dir: &Path) {
    let mut draws = Draws(0x5EAF_0012);
    let south: Vec<f64> = (0..200).map(|_| draws.normal()).collect();
    let south = standardised(&south, 5.0, 1.0);
    let east: Vec<f64> = (0..50).map(|_| draws.normal()).collect();
    let east = standardised(&east, 5.0, 1.0);
    // 2.5 standard errors of a change of the mean: sd sqrt(2/n) each.
    let east_shift = 2.5 * (2.0f64 / 50.0).sqrt();
    let west = |draws: &mut Draws| -> Vec<f64> {
        (0..150).map(|_| 2.0 + 3.0 * draws.exponential()).collect()
    };
    let (west_sep, west_oct) = (west(&mut draws), west(&mut draws));
    let write = |name: &str, rows: Vec<(&str, f64)>| {
        let mut t = String::from("depot,minutes\n");
        for (depot, x) in rows {
            t.push_str(&format!("{depot},{x}\n"));
        }
        std::fs::write(dir.join(name), t).unwrap();
    };
    let mut sep: Vec<(&str, f64)> = south.iter().map(|&x| ("South", x)).collect();
    sep.extend(east.iter().map(|&x| ("East", x)));
    sep.extend(west_sep.iter().map(|&x| ("West", x)));
    let mut oct: Vec<(&str, f64)> = south.iter().map(|&x| ("South", x + 1.0)).collect();
    oct.push(("South", 30.0));
    oct.extend(east.iter().map(|&x| ("East", x + east_shift)));
    oct.extend(west_oct.iter().map(|&x| ("West", x)));
    write("pack-2026-09.csv", sep);
    write("pack-2026-10.csv", oct);
}

/// The Changes sheet of October against September under `rules`.
fn packing_changes(dir: &Path, rules: &str) -> Vec<Vec<Data>> {
    std::fs::write(
        dir.join("r.sheaf"),
        format!("panel \"Packing\" of minutes per depot:\n{rules}"),
    )
    .unwrap();
    for (data, out, compare) in [
        ("pack-2026-09.csv", "sep.xlsx", None),
        ("pack-2026-10.csv", "oct.xlsx", Some("sep.xlsx")),
    ] {
        let mut args = vec!["run", "r.sheaf", "--data", data, "--out", out, "--force"];
        args.extend(compare.iter().flat_map(|c| ["--compare", *c]));
        let o = sheaf(&args, dir);
        assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    }
    cells(&dir.join("oct.xlsx"), "Changes")
}

fn change_row<'a>(changes: &'a [Vec<Data>], depot: &str, figure: &str) -> &'a [Data] {
    changes
        .iter()
        .find(|r| r.len() > 9 && r[1] == depot && r[2] == figure)
        .unwrap_or_else(|| panic!("{depot} {figure}"))
}

fn number(d: &Data) -> f64 {
    match d {
        Data::Float(x) => *x,
        other => panic!("not a number: {other:?}"),
    }
}

#[test]
fn a_real_drift_is_flagged_a_noisy_skewness_is_not_and_the_noise_rule_is_the_recipes() {
    let dir = tempfile::tempdir().unwrap();
    packing_months(dir.path());
    let changes = packing_changes(dir.path(), "drift 5%\n");
    let flag = |depot: &str, figure: &str| change_row(&changes, depot, figure)[7].to_string();
    let scaled = |depot: &str, figure: &str| number(&change_row(&changes, depot, figure)[9]);

    // South's median drifts by one sd: many standard errors, flagged.
    assert_eq!(flag("South", "minutes median"), "moved");
    assert!(scaled("South", "minutes median") > 5.0);
    assert_eq!(flag("South", "minutes Q1"), "moved");
    // Its one very long parcel lies beyond September's 3 IQR fence.
    assert_eq!(flag("South", "minutes max"), "new extreme");
    assert_eq!(flag("South", "minutes min"), "");

    // West: two months of one skewed process. Its skewness changes by more
    // than the drift but is skewed beyond its noise both months: not flagged.
    let west_skew = change_row(&changes, "West", "minutes skewness g1");
    assert!(number(&west_skew[6]).abs() > 0.05, "{west_skew:?}");
    assert_eq!(west_skew[7].to_string(), "");
    // A month's sampling noise in its median is not a move either.
    assert!(scaled("West", "minutes median").abs() < 2.0);
    assert_eq!(flag("West", "minutes median"), "");

    // East's mean moves 2.5 standard errors of the change (Welch): flagged
    // by the default rule of 2, not by `noise 3 se`.
    assert!((scaled("East", "minutes mean") - 2.5).abs() < 1e-9);
    assert_eq!(flag("East", "minutes mean"), "moved");
    let strict = packing_changes(dir.path(), "drift 5%\nnoise 3 se\n");
    assert_eq!(
        change_row(&strict, "East", "minutes mean")[7].to_string(),
        ""
    );
    assert_eq!(
        change_row(&strict, "South", "minutes median")[7].to_string(),
        "moved"
    );
    assert!(
        strict[1][0]
            .to_string()
            .contains("beyond 3 standard errors")
    );
}

#[test]
fn largest_moves_rank_by_the_noise_scaled_change() {
    let dir = tempfile::tempdir().unwrap();
    packing_months(dir.path());
    std::fs::create_dir_all(dir.path().join("m")).unwrap();
    for m in ["pack-2026-09.csv", "pack-2026-10.csv"] {
        std::fs::rename(dir.path().join(m), dir.path().join("m").join(m)).unwrap();
    }
    std::fs::write(
        dir.path().join("r.sheaf"),
        "panel \"Packing\" of minutes per depot:\n",
    )
    .unwrap();
    let o = sheaf(
        &[
            "run",
            "r.sheaf",
            "--data",
            "m/*.csv",
            "--out-dir",
            "out",
            "--json",
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let moves = cells(&dir.path().join("out/trend.xlsx"), "Largest moves");
    // South's one-sd drift of its centre leads; sizes in standard errors fall.
    assert_eq!(moves[1][1].to_string(), "South");
    let sizes: Vec<f64> = moves
        .iter()
        .skip(1)
        .take_while(|r| matches!(r[10], Data::Float(_)))
        .map(|r| number(&r[10]).abs())
        .collect();
    assert!(
        sizes.len() > 10 && sizes.windows(2).all(|w| w[0] >= w[1]),
        "{sizes:?}"
    );
    // JSON: each move of the trend carries its standard error.
    let stdout = String::from_utf8_lossy(&o.stdout);
    let trend: serde_json::Value = serde_json::from_str(stdout.lines().last().unwrap()).unwrap();
    let first = &trend["moves"][0];
    assert!(first["standard_error"].as_f64().unwrap() > 0.0, "{first}");
    assert!(first["change_in_standard_errors"].as_f64().unwrap().abs() > 5.0);
}

#[test]
fn a_value_outside_its_control_band_is_marked_on_the_trend_sheet_and_chart() {
    let dir = tempfile::tempdir().unwrap();
    let months = dir.path().join("m");
    std::fs::create_dir_all(&months).unwrap();
    // Invented: four months of one line's fill weights; the fourth jumps.
    // Earlier means 10, 10.1, 9.9: band 10 +/- 3 * 0.1 = [9.7, 10.3].
    for (month, centre) in [("07", 10.0), ("08", 10.1), ("09", 9.9), ("10", 12.0)] {
        let rows: String = [-1.0, 0.0, 1.0]
            .iter()
            .map(|d| format!("North,{}\n", centre + d))
            .collect();
        std::fs::write(
            months.join(format!("fill-2026-{month}.csv")),
            format!("line,w\n{rows}"),
        )
        .unwrap();
    }
    std::fs::write(
        dir.path().join("r.sheaf"),
        "panel \"Fill\" of w per line:\n",
    )
    .unwrap();
    let o = sheaf(
        &["run", "r.sheaf", "--data", "m/*.csv", "--out-dir", "out"],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    let trend_path = dir.path().join("out/trend.xlsx");
    let trend = cells(&trend_path, "Trend");
    let band = |period: &str| {
        trend
            .iter()
            .find(|r| r[0] == period && r[3] == "w mean")
            .unwrap()[8]
            .to_string()
    };
    assert_eq!(band("2026-09"), "");
    assert_eq!(band("2026-10"), "above");
    // The chart's table has a marker column holding only October's mean.
    let charts = cells(&trend_path, "Trend charts");
    let header = charts.iter().position(|r| r[0] == "Fill: w mean").unwrap() + 1;
    let marker = charts[header]
        .iter()
        .position(|c| *c == "North outside band")
        .expect("a marker column");
    let marked: Vec<String> = charts[header + 1..header + 5]
        .iter()
        .map(|r| r.get(marker).map(|c| c.to_string()).unwrap_or_default())
        .collect();
    assert_eq!(marked, ["", "", "", "12"]);
    // Drawn as markers without a line.
    let xml = common::part(&trend_path, "xl/charts/chart1.xml");
    assert!(xml.contains("<c:symbol val=\"diamond\"/>"), "{xml}");
    assert!(xml.contains("<a:ln><a:noFill/></a:ln>"), "{xml}");
}

/// A figure that was 0 last period has no relative change, and the
/// Changes sheet says why in the words every missing value's reason uses.
#[test]
fn a_change_from_zero_says_why_it_has_no_relative_size() {
    let dir = tempfile::tempdir().unwrap();
    packing_months(dir.path());
    let changes = packing_changes(dir.path(), "");
    let row = change_row(&changes, "South", "minutes missing");
    assert_eq!(number(&row[3]), 0.0);
    assert_eq!(row[6], Data::String("the previous value is zero".into()));
}
