//! The robustness sheet read back from a written workbook: figures far
//! from zero keep their digits, groups without values say so instead of
//! showing counts, and the Checks sheet lists every figure without a value.
//!
//! The data are invented: readings of one gauge in five batches. "Near",
//! "Far" and "Farther" hold the same values, k/1024 for k = 0 1 2 3 20,
//! shifted by 0, 1e8 and 1e12 (every value an exact double); "Empty" has
//! only blank or text cells; "Pair" has two values.

mod common;

use calamine::Data;
use common::{cells, sheaf, text};

const RECIPE: &str = "# Gauge readings by batch (invented data).
title \"Gauge readings\"
panel \"Readings\" of reading per batch:
    # the standard panel and its robustness
";

fn data() -> String {
    let mut csv = String::from("batch,reading\n");
    for (batch, offset) in [("Near", 0.0), ("Far", 1e8), ("Farther", 1e12)] {
        for k in [0.0, 1.0, 2.0, 3.0, 20.0] {
            let x: f64 = offset + k / 1024.0;
            csv.push_str(&format!("{batch},{x:?}\n"));
        }
    }
    csv.push_str("Empty,\nEmpty,n/a\nEmpty,\nPair,0.1\nPair,0.7\n");
    csv
}

type Grid = Vec<Vec<Data>>;

fn word(d: &Data) -> String {
    match d {
        Data::Empty => String::new(),
        other => other.to_string(),
    }
}

/// The cell under `label` in the row of `batch`.
fn cell<'a>(grid: &'a Grid, batch: &str, label: &str) -> &'a Data {
    let header = grid.iter().find(|r| word(&r[0]) == "batch").unwrap();
    let col = header
        .iter()
        .position(|h| word(h) == label)
        .unwrap_or_else(|| panic!("no column {label}"));
    let row = grid.iter().find(|r| word(&r[0]) == batch).unwrap();
    &row[col]
}

fn number(d: &Data) -> f64 {
    match d {
        Data::Float(x) => *x,
        other => panic!("not a number: {other:?}"),
    }
}

fn run() -> (tempfile::TempDir, std::path::PathBuf) {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("gauge.sheaf"), RECIPE).unwrap();
    std::fs::write(dir.path().join("gauge.csv"), data()).unwrap();
    let out = dir.path().join("out.xlsx");
    let o = sheaf(
        &[
            "run",
            "gauge.sheaf",
            "--data",
            "gauge.csv",
            "--out",
            out.to_str().unwrap(),
        ],
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));
    (dir, out)
}

const LEAVE_ONE_OUT_MEAN: &str = "leave-one-out mean change (after - before, largest in size)";
const LEAVE_ONE_OUT_SD: &str = "leave-one-out sd change (after - before, largest in size)";

/// Exact values, worked in units of 1/1024 from the definitions: mean
/// 5.2, median 2, Q1 1, Q3 3 (type 7), so (mean - median) / IQR = 1.6;
/// leaving out 20 moves the mean by (5.2 - 20) / 4 = -3.7 units, that is
/// -37/10240, and the sd from sqrt(69.7) to sqrt(5/3) units. The same to
/// the bit at offsets 0, 1e8 and 1e12 (the doubles allow it: every
/// deviation is exact); before the fix the 1e8 batch gave
/// -0.0036132782697677612 for the mean change.
#[test]
fn far_from_zero_the_robustness_figures_keep_every_digit() {
    let (_dir, out) = run();
    let robust = cells(&out, "Readings robustness");
    let unit = 1.0 / 1024.0;
    for batch in ["Near", "Far", "Farther"] {
        let at = |label| number(cell(&robust, batch, label));
        assert_eq!(at(LEAVE_ONE_OUT_MEAN), -37.0 / 10240.0, "{batch}");
        assert_eq!(at("(mean - median) / IQR"), 1.6, "{batch}");
        let sd_change = (f64::sqrt(5.0 / 3.0) - f64::sqrt(69.7)) * unit;
        assert!(
            (at(LEAVE_ONE_OUT_SD) - sd_change).abs() <= 1e-14 * sd_change.abs(),
            "{batch}: {}",
            at(LEAVE_ONE_OUT_SD)
        );
        // Without the outlier 20: mean 1.5 units, before 5.2.
        assert!((at("mean change") + 3.7 * unit).abs() <= 1e-15 * 3.7 * unit);
        // Computed here from deviations: the same to the bit.
        assert_eq!(
            at(LEAVE_ONE_OUT_SD),
            number(cell(&robust, "Near", LEAVE_ONE_OUT_SD))
        );
        // Built on the shared moments (their own module keeps them to
        // about 1e-15 far from zero): the same to 1e-12 relative.
        for label in [
            "(mean - median) / sd",
            "sd without",
            "sd change",
            "skewness without",
            "skewness change",
            "G1 / SE",
            "G2 / SE",
        ] {
            let near = number(cell(&robust, "Near", label));
            assert!(
                (at(label) - near).abs() <= 1e-12 * near.abs(),
                "{batch} {label}: {} vs {near}",
                at(label)
            );
        }
        assert_eq!(
            word(cell(&robust, batch, "its cell (first row if tied)"))
                .split(' ')
                .count(),
            2
        );
    }
    let panel = cells(&out, "Readings");
    for label in ["IQR", "Bowley skewness"] {
        let near = number(cell(&panel, "Near", label));
        assert_eq!(number(cell(&panel, "Far", label)), near, "{label}");
        assert_eq!(number(cell(&panel, "Farther", label)), near, "{label}");
    }
    assert_eq!(number(cell(&panel, "Near", "IQR")), 2.0 * unit);
}

#[test]
fn a_group_without_values_says_so_and_checks_lists_every_gap() {
    let (_dir, out) = run();
    let robust = cells(&out, "Readings robustness");
    for label in [
        "outliers 1.5 IQR",
        "1.5 IQR cells",
        "outliers 3 IQR",
        "|modified z| above 3.5",
        "skewed",
        "heavy tails",
        LEAVE_ONE_OUT_MEAN,
        "mean 95% low",
    ] {
        assert_eq!(word(cell(&robust, "Empty", label)), "no values", "{label}");
    }
    assert_eq!(word(cell(&robust, "Empty", "status")), "note");
    // Two values: skewness is 0 by symmetry, not float noise; too few for the rest.
    assert_eq!(
        number(cell(&cells(&out, "Readings"), "Pair", "skewness g1")),
        0.0
    );
    assert_eq!(number(cell(&robust, "Pair", "skewness without")), 0.0);
    assert_eq!(
        word(cell(&robust, "Pair", "skewed")),
        "needs at least 3 values, has 2"
    );
    assert_eq!(
        word(cell(&robust, "Far", "mean 95% high")),
        "needs at least 10 values, has 5"
    );

    // Checks: every robustness figure without a value, with its reason.
    let checks = cells(&out, "Checks");
    let listed: Vec<(String, String)> = checks
        .iter()
        .map(|r| (word(&r[0]), r.get(3).map(word).unwrap_or_default()))
        .collect();
    let has = |place: &str, why: &str| listed.iter().any(|(p, w)| p == place && w == why);
    for (place, why) in [
        (
            "Readings robustness / Empty / reading / outliers 1.5 IQR",
            "no values",
        ),
        (
            "Readings robustness / Empty / reading / heavy tails",
            "no values",
        ),
        (
            "Readings robustness / Pair / reading / skewed",
            "needs at least 3 values, has 2",
        ),
        (
            "Readings robustness / Far / reading / median 95% low",
            "needs at least 10 values, has 5",
        ),
        ("Readings / Empty / reading / mean", "no values"),
    ] {
        assert!(has(place, why), "Checks lacks {place}: {why}");
    }
    // And nothing else: every undefined cell of the robustness sheet is listed.
    let header = robust.iter().find(|r| word(&r[0]) == "batch").unwrap();
    let mut undefined = 0;
    for row in robust.iter().skip_while(|r| word(&r[0]) != "batch").skip(1) {
        for (h, c) in header.iter().zip(row) {
            let place = format!(
                "Readings robustness / {} / reading / {}",
                word(&row[0]),
                word(h)
            );
            if listed.iter().any(|(p, w)| *p == place && *w == word(c)) {
                undefined += 1;
            }
        }
    }
    let robustness_listed = listed
        .iter()
        .filter(|(p, _)| p.starts_with("Readings robustness /"))
        .count();
    assert_eq!(undefined, robustness_listed);
    assert!(robustness_listed > 20, "{robustness_listed}");
}
