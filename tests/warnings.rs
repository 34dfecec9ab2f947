//! Recipe warnings reach the user: on the terminal and on the Checks sheet;
//! mistakes seen only with the data's columns refuse the run, all at once.

mod common;

use calamine::Data;
use common::{cells, sheaf, text};

const DATA: &str = "depot,weight_kg,status\nNorth,10,done\nSouth,20,late\nNorth,30,done\n";

#[test]
fn warnings_show_on_the_terminal_and_on_the_checks_sheet() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("d.csv"), DATA).unwrap();
    let recipe =
        "figures \"F\" per depot:\n    p = percentile(weight_kg, 0.9)\nrows where weight_kg > 0\n";
    std::fs::write(dir.path().join("r.sheaf"), recipe).unwrap();
    let out = sheaf(
        &["run", "r.sheaf", "--data", "d.csv", "--out", "o.xlsx"],
        dir.path(),
    );
    let shown = text(&out);
    assert!(out.status.success(), "{shown}");
    assert!(
        shown.contains("warning: `percentile` takes a percent"),
        "{shown}"
    );
    assert!(shown.contains("r.sheaf:2:31"), "{shown}");
    assert!(shown.contains("narrows nothing"), "{shown}");
    let sheet = cells(&dir.path().join("o.xlsx"), "Checks");
    let texts: Vec<String> = sheet
        .iter()
        .flatten()
        .filter_map(|c| match c {
            Data::String(s) => Some(s.clone()),
            _ => None,
        })
        .collect();
    assert!(texts.iter().any(|t| t == "warnings"), "{texts:?}");
    assert!(
        texts.iter().any(|t| t.contains("line 2, column 31")
            && t.contains("for the 90th percentile write percentile(x, 90)")),
        "{texts:?}"
    );
    assert!(
        texts.iter().any(|t| t.contains("line 3, column 1")),
        "{texts:?}"
    );
}

#[test]
fn text_columns_used_as_numbers_refuse_the_run_with_every_problem() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("d.csv"), DATA).unwrap();
    let recipe = "rows where status != 'x'\npanel \"P\" of status:\nfigures \"F\":\n    s = share(weight_kg)\n    m = meen(weight_kg)\n    n = mean(wieght_kg)\n";
    std::fs::write(dir.path().join("r.sheaf"), recipe).unwrap();
    let out = sheaf(
        &["run", "r.sheaf", "--data", "d.csv", "--out", "o.xlsx"],
        dir.path(),
    );
    let shown = text(&out);
    assert_eq!(out.status.code(), Some(2), "{shown}");
    for part in [
        "a panel summarises numbers, but `status` holds text",
        "`share` needs a condition here, not a number",
        "unknown function `meen`",
        "strings are written in double quotes",
        "no column named `wieght_kg`",
        "5 problems in the recipe",
    ] {
        assert!(shown.contains(part), "{part}: {shown}");
    }
    assert!(!dir.path().join("o.xlsx").exists());
}

#[test]
fn an_unreadable_input_line_is_reported_without_guessing_the_columns() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("d.csv"), DATA).unwrap();
    std::fs::write(
        dir.path().join("r.sheaf"),
        "input sheet Deliveries\nlet x = zz * 2\n",
    )
    .unwrap();
    let out = sheaf(&["validate", "r.sheaf", "--data", "d.csv"], dir.path());
    let shown = text(&out);
    assert_eq!(out.status.code(), Some(2), "{shown}");
    assert!(
        shown.contains("expected the sheet name in double quotes"),
        "{shown}"
    );
    assert!(!shown.contains("no column named"), "{shown}");
}
