//! The result workbook as it is read on screen and on paper: number formats
//! per figure, column widths, header heights, page setup, print titles and
//! the hidden Record sheet, read from the sheet XML inside the written xlsx.

use std::path::{Path, PathBuf};

mod common;

use calamine::{Data, Reader, open_workbook_auto};
use common::{part, root, sheaf, text};

/// The demo month written to `dir`.
fn demo(dir: &Path) -> PathBuf {
    let out = dir.join("result.xlsx");
    let recipe = root().join("workbooks/depot-monthly.sheaf");
    let data = root().join("workbooks/depot-2026-10.xlsx");
    let o = sheaf(
        &[
            "run",
            recipe.to_str().unwrap(),
            "--data",
            data.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ],
        dir,
    );
    assert!(out.exists(), "{}", text(&o));
    out
}

/// The value of `attribute` in an XML tag's text.
fn attribute<'a>(tag: &'a str, attribute: &str) -> Option<&'a str> {
    let start = tag.find(&format!(" {attribute}=\""))? + attribute.len() + 3;
    Some(&tag[start..start + tag[start..].find('"')?])
}

/// The opening tags named `name` in `xml`, in order.
fn tags<'a>(xml: &'a str, name: &str) -> Vec<&'a str> {
    let open = format!("<{name} ");
    xml.match_indices(&open)
        .map(|(i, _)| &xml[i..i + xml[i..].find('>').unwrap()])
        .collect()
}

/// The number format of cell `reference` (like "E5") of a sheet's XML.
fn number_format(xlsx: &Path, sheet_xml: &str, reference: &str) -> String {
    let styles = part(xlsx, "xl/styles.xml");
    let cell = tags(sheet_xml, "c")
        .into_iter()
        .find(|c| attribute(c, "r") == Some(reference))
        .unwrap_or_else(|| panic!("no cell {reference}"));
    let style: usize = attribute(cell, "s").unwrap_or("0").parse().unwrap();
    let xfs = &styles[styles.find("<cellXfs").unwrap()..styles.find("</cellXfs>").unwrap()];
    let id = attribute(tags(xfs, "xf")[style], "numFmtId").unwrap();
    match id {
        "0" => "General".into(),
        "1" => "0".into(),
        "3" => "#,##0".into(),
        _ => tags(&styles, "numFmt")
            .into_iter()
            .find(|f| attribute(f, "numFmtId") == Some(id))
            .and_then(|f| attribute(f, "formatCode"))
            .unwrap()
            .to_string(),
    }
}

/// A sheet's XML by its position (sheets are stored as sheet1.xml, ...).
fn sheet(xlsx: &Path, position: usize) -> String {
    part(xlsx, &format!("xl/worksheets/sheet{position}.xml"))
}

/// A sheet's XML by its name.
fn sheet_named(xlsx: &Path, name: &str) -> String {
    let workbook = part(xlsx, "xl/workbook.xml");
    let position = tags(&workbook, "sheet")
        .iter()
        .position(|s| attribute(s, "name") == Some(name))
        .unwrap();
    sheet(xlsx, position + 1)
}

/// Most decimals written in a column of the input, counted independently
/// of sheaf from the shortest text of each number.
fn input_decimals(column: &str) -> usize {
    let mut wb = open_workbook_auto(root().join("workbooks/depot-2026-10.xlsx")).unwrap();
    let range = wb.worksheet_range("Deliveries").unwrap();
    let rows: Vec<&[Data]> = range.rows().collect();
    let at = rows[0].iter().position(|h| *h == column).unwrap();
    rows[1..]
        .iter()
        .filter_map(|r| match r[at] {
            Data::Float(x) => Some(format!("{x}").split('.').nth(1).map_or(0, str::len)),
            _ => None,
        })
        .max()
        .unwrap()
}

#[test]
fn each_panel_figure_has_the_format_of_its_kind() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let panel = sheet_named(&out, "Lateness");
    // Row 5 is North late_h, row 6 North weight_kg (header on row 4):
    // C n, E mean, P skewness g1.
    assert_eq!(number_format(&out, &panel, "C5"), "#,##0");
    // late_h = minutes / 60 carries float digits; capped at 3, plus two.
    assert_eq!(number_format(&out, &panel, "E5"), "#,##0.00000");
    let weight = input_decimals("weight_kg").min(3) + 2;
    assert_eq!(
        number_format(&out, &panel, "E6"),
        format!("#,##0.{}", "0".repeat(weight))
    );
    assert_eq!(number_format(&out, &panel, "P5"), "#,##0.000");
    // The cell keeps its full value: the format only rounds its look.
    let cells = common::cells(&out, "Lateness");
    let mean = match &cells[4][4] {
        Data::Float(x) => *x,
        other => panic!("{other:?}"),
    };
    assert!(
        format!("{mean}").len() > 8,
        "{mean} was rounded in the cell"
    );
}

#[test]
fn cells_named_in_text_carry_no_float_noise() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    for row in common::cells(&out, "Lateness robustness") {
        for cell in row {
            if let Data::String(t) = cell {
                assert!(
                    !t.contains("0000000") && !t.contains("9999999"),
                    "float noise in {t:?}"
                );
            }
        }
    }
}

#[test]
fn columns_fit_their_content_and_headers_show_every_line() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let robustness = sheet_named(&out, "Lateness robustness");
    let widths: Vec<f64> = tags(&robustness, "col")
        .iter()
        .map(|c| attribute(c, "width").unwrap().parse().unwrap())
        .collect();
    // Reasons (column D) are long: the column is made as wide as allowed
    // and the text wraps, rather than cut at the header's width.
    let widest = widths.iter().cloned().fold(0.0, f64::max);
    assert!(widest <= 44.0, "{widths:?}");
    let reason_width: f64 = tags(&robustness, "col")
        .iter()
        .find(|c| attribute(c, "min") == Some("4"))
        .map(|c| attribute(c, "width").unwrap().parse().unwrap())
        .unwrap();
    assert!(reason_width > 40.0, "reason column {reason_width}");
    // The header row (4) is tall enough for its longest label wrapped.
    let header = tags(&robustness, "row")
        .into_iter()
        .find(|r| attribute(r, "r") == Some("4"))
        .unwrap();
    let height: f64 = attribute(header, "ht").unwrap().parse().unwrap();
    assert!(height >= 45.0, "header row {height} points");
}

#[test]
fn every_sheet_prints_landscape_one_page_wide_with_titles() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let workbook = part(&out, "xl/workbook.xml");
    let names: Vec<&str> = tags(&workbook, "sheet")
        .iter()
        .map(|s| attribute(s, "name").unwrap())
        .collect();
    for (i, name) in names.iter().enumerate() {
        let xml = sheet(&out, i + 1);
        assert!(xml.contains("fitToPage=\"1\""), "{name}: not fit to page");
        let setup = tags(&xml, "pageSetup")[0];
        assert_eq!(attribute(setup, "orientation"), Some("landscape"), "{name}");
        assert_eq!(attribute(setup, "fitToHeight"), Some("0"), "{name}");
        assert!(
            xml.contains("<oddHeader>&amp;LDepot deliveries, monthly review&amp;R2026-10"),
            "{name}: page header"
        );
        assert!(xml.contains("&amp;P of &amp;N"), "{name}: page number");
    }
    // The panel repeats its header row and its depot and column labels.
    assert!(
        workbook.contains("Lateness!$A:$B,Lateness!$4:$4"),
        "{workbook}"
    );
}

#[test]
fn the_record_sheet_is_hidden_and_still_compared() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let workbook = part(&out, "xl/workbook.xml");
    let record = tags(&workbook, "sheet")
        .into_iter()
        .find(|s| attribute(s, "name") == Some("Record"))
        .unwrap();
    assert_eq!(attribute(record, "state"), Some("hidden"));
    // --compare reads it back by name.
    let recipe = root().join("workbooks/depot-monthly.sheaf");
    let data = root().join("workbooks/depot-2026-10.xlsx");
    let again = dir.path().join("again.xlsx");
    let o = sheaf(
        &[
            "run",
            recipe.to_str().unwrap(),
            "--data",
            data.to_str().unwrap(),
            "--out",
            again.to_str().unwrap(),
            "--compare",
            out.to_str().unwrap(),
        ],
        dir.path(),
    );
    assert!(o.status.code() != Some(2), "{}", text(&o));
    let wb = open_workbook_auto(&again).unwrap();
    assert!(
        wb.sheet_names().iter().any(|n| n == "Changes"),
        "{}",
        text(&o)
    );
}

/// The links of a sheet's XML: (cell, target) pairs.
fn links(sheet_xml: &str) -> Vec<(String, String)> {
    tags(sheet_xml, "hyperlink")
        .iter()
        .map(|h| {
            let target = attribute(h, "location").unwrap().replace("&apos;", "'");
            (attribute(h, "ref").unwrap().to_string(), target)
        })
        .collect()
}

/// The row (0-based) and column of an A1 reference like "A5".
fn row_col(reference: &str) -> (usize, usize) {
    let letters: String = reference
        .chars()
        .take_while(char::is_ascii_alphabetic)
        .collect();
    let row: usize = reference[letters.len()..].parse().unwrap();
    let col = letters
        .bytes()
        .fold(0, |n, b| n * 26 + (b - b'A' + 1) as usize)
        - 1;
    (row - 1, col)
}

#[test]
fn the_first_sheet_counts_the_checks_and_links_every_warning_to_its_row() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let wb = open_workbook_auto(&out).unwrap();
    assert_eq!(wb.sheet_names()[0], "At a glance");
    let glance = common::cells(&out, "At a glance");
    let all: Vec<String> = glance.iter().flatten().map(|d| d.to_string()).collect();
    // The demo month: one check passes, five warn (the CLI says the same).
    assert!(
        all.iter().any(|t| t == "1 passed, 5 warned, 0 failed"),
        "{all:?}"
    );
    assert!(all.iter().any(|t| t == "2026-10"), "period: {all:?}");
    let found = links(&sheet_named(&out, "At a glance"));
    // Five checks that did not pass and four robustness warnings.
    assert_eq!(found.len(), 9, "{found:?}");
    for (cell, target) in found {
        let (row, col) = row_col(&cell);
        let shown = glance[row][col].to_string();
        let (sheet_name, address) = target.rsplit_once('!').unwrap();
        let sheet_name = sheet_name.trim_matches('\'');
        let (target_row, _) = row_col(address);
        let rows = common::cells(&out, sheet_name);
        let line: Vec<String> = rows[target_row].iter().map(|d| d.to_string()).collect();
        // The link's words name what stands on the row it points to.
        if sheet_name == "Checks" {
            let (name, group) = shown.split_once(", ").unwrap();
            assert_eq!(
                (line[0].as_str(), line[2].as_str()),
                (name, group),
                "{cell}"
            );
        } else {
            assert_eq!(sheet_name, "Lateness robustness");
            let (column, group) = shown.split_once(", ").unwrap();
            assert_eq!(
                (line[0].as_str(), line[1].as_str()),
                (group, column),
                "{cell}"
            );
            assert_eq!(line[2], "warn", "{cell}");
        }
    }
}

#[test]
fn histogram_titles_are_in_words_and_bin_labels_are_clean() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let chart = part(&out, "xl/charts/chart1.xml");
    assert!(
        chart.contains("late_h, North: 10 bins by the Freedman-Diaconis rule"),
        "{chart}"
    );
    assert!(!chart.contains("freedman_diaconis"));
    let charts = common::cells(&out, "Charts");
    let labels: Vec<String> = charts
        .iter()
        .filter_map(|r| match r.first() {
            Some(Data::String(t)) if t.contains(" to ") => Some(t.clone()),
            _ => None,
        })
        .collect();
    assert!(!labels.is_empty());
    for label in labels {
        for edge in label.split(" to ") {
            assert!(edge.parse::<f64>().is_ok(), "{label}");
            assert!(!edge.contains('e') && edge.len() <= 9, "{label}");
        }
    }
}
