//! The result workbook as it is read on screen and on paper: number formats
//! per figure, column widths, header heights, page setup, print titles and
//! the hidden Record sheet, read from the sheet XML inside the written xlsx.

use std::path::{Path, PathBuf};

mod common;

use calamine::{Data, DataType, Reader, open_workbook_auto};
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
    // A figure written `share(...)` is a percentage (Service levels: C is
    // on_time, D p90), other figures 4 significant digits.
    let service = sheet_named(&out, "Service levels");
    assert_eq!(number_format(&out, &service, "C5"), "0.0%");
    assert_ne!(number_format(&out, &service, "D5"), "0.0%");
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
    assert!(widest <= 36.0, "{widths:?}");
    let reason_width: f64 = tags(&robustness, "col")
        .iter()
        .find(|c| attribute(c, "min") == Some("4"))
        .map(|c| attribute(c, "width").unwrap().parse().unwrap())
        .unwrap();
    assert!(reason_width > 32.0, "reason column {reason_width}");
    // The header row (4) is tall enough for its longest label wrapped.
    let header = tags(&robustness, "row")
        .into_iter()
        .find(|r| attribute(r, "r") == Some("4"))
        .unwrap();
    let height: f64 = attribute(header, "ht").unwrap().parse().unwrap();
    // Three lines of the 12.75-point default row of sheaf's font.
    assert!(height >= 38.0, "header row {height} points");
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
        let banded = name.ends_with("robustness");
        // Every sheet but the robustness sheet fits one page wide.
        assert_eq!(
            xml.contains("fitToPage=\"1\""),
            !banded,
            "{name}: fit to page"
        );
        let setup = tags(&xml, "pageSetup")[0];
        // Landscape where wide; the two narrow figures blocks and About's
        // two columns of text portrait.
        let orientation = match *name {
            "Service levels" | "Heavy parcels" | "About" => "portrait",
            _ => "landscape",
        };
        assert_eq!(attribute(setup, "orientation"), Some(orientation), "{name}");
        // About fits one page tall while that is readable (the demo's is;
        // 1 is the default, written as no attribute); the others run on as
        // long as they are (no limit: 0).
        let tall = match *name {
            "About" => None,
            _ => Some("0"),
        };
        if !banded {
            assert_eq!(attribute(setup, "fitToHeight"), tall, "{name}");
            // One page wide (the default, written as no attribute).
            let wide = attribute(setup, "fitToWidth");
            assert!(wide.is_none_or(|w| w == "1"), "{name}: {wide:?}");
        }
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
    assert_robustness_prints_in_bands(&out, &workbook);
}

/// The robustness sheet's 36 columns would print at a third of their size
/// on one page's width. They print in bands of whole topics instead, each
/// on its own page at one readable scale, with the depot, column and status
/// repeated on every page: the first band holds the reason with the gaps
/// and outliers and ends before "mean without"; the scale is between 60%
/// and 100%, and four bands fit the demo month (12 pages in all when
/// rendered with LibreOffice).
fn assert_robustness_prints_in_bands(out: &Path, workbook: &str) {
    let xml = sheet_named(out, "Lateness robustness");
    let setup = tags(&xml, "pageSetup")[0];
    assert_eq!(attribute(setup, "orientation"), Some("landscape"));
    let scale: u32 = attribute(setup, "scale").unwrap().parse().unwrap();
    assert!((60..=100).contains(&scale), "scale {scale}");
    let breaks: Vec<usize> = tags(&xml, "brk")
        .iter()
        .map(|b| attribute(b, "id").unwrap().parse().unwrap())
        .collect();
    assert_eq!(breaks.len(), 3, "{breaks:?}");
    let header = &common::cells(out, "Lateness robustness")[3];
    let label = |c: usize| header[c].to_string();
    assert_eq!(label(breaks[0]), "mean without");
    // Each band starts a topic: no count is parted from its cells.
    for &b in &breaks {
        assert!(
            !label(b).contains("cells") && !label(b).starts_with("its cell"),
            "{}",
            label(b)
        );
    }
    assert!(
        workbook.contains("'Lateness robustness'!$A:$C,'Lateness robustness'!$4:$4"),
        "{workbook}"
    );
    // The note lies over the first band only, beside the labels.
    let merged = tags(&xml, "mergeCell")[0];
    let last_column = (b'A' + breaks[0] as u8 - 1) as char;
    assert_eq!(
        attribute(merged, "ref"),
        Some(format!("D2:{last_column}2").as_str())
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
        chart.contains("late_h, North: 7 bins by the Freedman-Diaconis rule"),
        "{chart}"
    );
    assert!(!chart.contains("freedman_diaconis"));
    let charts = common::cells(&out, "Charts");
    let labels: Vec<String> = charts
        .iter()
        .filter_map(|r| match r.first() {
            // Bin labels: "a to b", "below a", "above b" (not the note).
            Some(Data::String(t))
                if t.split(' ').count() <= 3 && (t.contains(" to ") || t.starts_with("above ")) =>
            {
                Some(t.clone())
            }
            _ => None,
        })
        .collect();
    assert!(!labels.is_empty());
    for label in labels {
        let label = label
            .trim_start_matches("below ")
            .trim_start_matches("above ");
        for edge in label.split(" to ") {
            assert!(edge.parse::<f64>().is_ok(), "{label}");
            assert!(!edge.contains('e') && edge.len() <= 9, "{label}");
        }
    }
}

/// The charts' parts (xl/charts/chartN.xml), in order.
fn chart_parts(xlsx: &Path) -> Vec<String> {
    use std::io::Read;
    (1..)
        .map_while(|i| {
            let file = std::fs::File::open(xlsx).unwrap();
            let mut zip = zip::ZipArchive::new(file).unwrap();
            let mut text = String::new();
            let mut part = zip.by_name(&format!("xl/charts/chart{i}.xml")).ok()?;
            part.read_to_string(&mut text).unwrap();
            Some(text)
        })
        .collect()
}

/// A number of a table row, by the column under `label` in `header`.
fn under(header: &[Data], row: &[Data], label: &str) -> f64 {
    let at = header.iter().position(|h| *h == label).unwrap();
    match &row[at] {
        Data::Float(x) => *x,
        other => panic!("{label}: {other:?}"),
    }
}

/// Harbour's 900-minute typo (15 hours) would stretch a Freedman-Diaconis
/// histogram over all values to 106 bins; inside the 3 IQR fences (Tukey
/// 1977) the rule gives a handful, the typo is counted in a labelled
/// overflow bin, and every value of the group is counted once.
#[test]
fn a_typo_lands_in_an_overflow_bin_and_leaves_the_bins_readable() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let charts = chart_parts(&out);
    let harbour = charts
        .iter()
        .find(|c| c.contains("late_h, Harbour:"))
        .unwrap();
    assert!(
        harbour.contains("1 value beyond the 3 IQR fences in the end bins"),
        "{harbour}"
    );
    // The table beside it: from its header to the first blank row.
    let cells = common::cells(&out, "Charts");
    let tables: Vec<&[Vec<Data>]> = cells
        .split(|r| r.iter().all(|c| *c == Data::Empty))
        .filter(|t| t.first().is_some_and(|h| h[0] == "bin"))
        .collect();
    let table = tables[1];
    let bins: Vec<(&str, f64)> = table[1..]
        .iter()
        .map(|r| {
            (
                r[0].get_string().unwrap(),
                under(&table[0], r, "values in bin"),
            )
        })
        .collect();
    let (last, overflow) = bins.last().unwrap();
    assert!(last.starts_with("above "), "{bins:?}");
    assert_eq!(*overflow, 1.0);
    let top: f64 = last.trim_start_matches("above ").parse().unwrap();
    assert!(top < 15.0, "the typo is above the last bin: {top}");
    assert!(
        (2..=20).contains(&(bins.len() - 1)),
        "{} bins",
        bins.len() - 1
    );
    // Every Harbour value counted once: n from the Lateness sheet.
    let panel = common::cells(&out, "Lateness");
    let header = panel.iter().position(|r| r[0] == "depot").unwrap();
    let n = panel[header + 1..]
        .iter()
        .find(|r| r[0] == "Harbour" && r[1] == "late_h")
        .map(|r| under(&panel[header], r, "n"))
        .unwrap();
    assert_eq!(bins.iter().map(|b| b.1).sum::<f64>(), n);
}

/// The box plot draws every 1.5 IQR outlier as a marker-only point at its
/// value: its table counts as many per group as the robustness sheet lists,
/// holds Harbour's 15-hour typo, and the chart has one marker series per
/// outlier rank.
#[test]
fn box_plots_draw_each_outlier_as_a_point() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let cells = common::cells(&out, "Charts");
    let head = cells.iter().position(|r| r[0] == "group").unwrap();
    let rows = &cells[head + 1..head + 4];
    let robust = common::cells(&out, "Lateness robustness");
    let rh = robust.iter().position(|r| r[0] == "depot").unwrap();
    let mut most = 0;
    for row in rows {
        let listed = robust[rh + 1..]
            .iter()
            .find(|r| r[0] == row[0] && r[1] == "late_h")
            .map(|r| under(&robust[rh], r, "outliers 1.5 IQR"))
            .unwrap();
        let counted = under(&cells[head], row, "outliers beyond 1.5 IQR");
        assert_eq!(counted, listed, "{:?}", row[0]);
        most = most.max(listed as usize);
        let points: Vec<f64> = row[7..].iter().filter_map(|c| c.get_float()).collect();
        assert_eq!(points.len(), listed as usize, "{row:?}");
    }
    let harbour = rows.iter().find(|r| r[0] == "Harbour").unwrap();
    assert!(harbour[7..].contains(&Data::Float(15.0)), "{harbour:?}");
    let chart = chart_parts(&out)
        .into_iter()
        .find(|c| c.contains("<c:stockChart>"))
        .unwrap();
    let line = &chart[chart.find("<c:lineChart>").unwrap()..];
    let outlier_series = line.matches("<c:v>outlier ").count();
    assert_eq!(outlier_series, most, "{line}");
    // Points only: no line joins a series's points.
    assert!(line.contains("<c:symbol val=\"circle\"/>"));
    assert_eq!(
        line.matches("<c:ser>").count(),
        line.matches("<a:ln><a:noFill/></a:ln>").count(),
        "{line}"
    );
    assert!(chart.contains("<c:dispBlanksAs val=\"gap\"/>"), "{chart}");
}

/// A `label` line names the column in chart titles, on axes and in the
/// panel's column cell, and leaves the recipe's fingerprint as it was, so
/// last month's result stays comparable.
#[test]
fn a_label_names_the_column_in_charts_and_tables_but_not_the_fingerprint() {
    let dir = tempfile::tempdir().unwrap();
    let plain = demo(dir.path());
    let labelled_dir = tempfile::tempdir().unwrap();
    let recipe = std::fs::read_to_string(root().join("workbooks/depot-monthly.sheaf")).unwrap();
    let with_label = recipe.replace("rows where", "label late_h \"Hours late\"\nrows where");
    assert_ne!(with_label, recipe);
    let path = labelled_dir.path().join("labelled.sheaf");
    std::fs::write(&path, with_label).unwrap();
    let out = labelled_dir.path().join("labelled.xlsx");
    let data = root().join("workbooks/depot-2026-10.xlsx");
    let o = sheaf(
        &[
            "run",
            path.to_str().unwrap(),
            "--data",
            data.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ],
        labelled_dir.path(),
    );
    assert!(out.exists(), "{}", text(&o));
    let charts = chart_parts(&out);
    assert!(
        charts[0].contains("<a:t>Hours late, North: "),
        "{}",
        charts[0]
    );
    assert!(charts[0].contains("<a:t>Hours late</a:t>"), "axis title");
    let boxes = charts
        .iter()
        .find(|c| c.contains("<c:stockChart>"))
        .unwrap();
    assert!(boxes.contains("<a:t>Hours late: boxes"));
    let panel = common::cells(&out, "Lateness");
    assert!(
        panel
            .iter()
            .any(|r| r.get(1) == Some(&Data::String("Hours late (late_h)".into())))
    );
    let fingerprint = |xlsx: &Path| {
        common::cells(xlsx, "About")
            .into_iter()
            .find(|r| r[0] == "recipe fingerprint")
            .map(|r| r[1].clone())
            .unwrap()
    };
    assert_eq!(fingerprint(&out), fingerprint(&plain));
}

/// A row whose text wraps is tall enough for every line (LibreOffice does
/// not grow it, and draws what does not fit over the row above): the
/// Checks rows whose note, "could not be evaluated: no previous period to
/// compare with" (58 characters), wraps in a column of at most 32, are two
/// lines of the 12.75-point row tall; and every cell of a table is set at
/// the top of its row, so a tall row reads as one record.
#[test]
fn rows_with_wrapped_text_are_tall_enough() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let checks = common::cells(&out, "Checks");
    let xml = sheet_named(&out, "Checks");
    let mut seen = 0;
    for (i, row) in checks.iter().enumerate() {
        let note = row.get(7).map(|c| c.to_string()).unwrap_or_default();
        if note.starts_with("could not be evaluated") {
            let tag = tags(&xml, "row")
                .into_iter()
                .find(|r| attribute(r, "r") == Some(&(i + 1).to_string()))
                .unwrap();
            let height: f64 = attribute(tag, "ht").unwrap().parse().unwrap();
            assert!(height >= 2.0 * 12.75, "row {}: {height} points", i + 1);
            seen += 1;
        }
    }
    assert_eq!(seen, 4);
    let styles = part(&out, "xl/styles.xml");
    let xfs = &styles[styles.find("<cellXfs").unwrap()..styles.find("</cellXfs>").unwrap()];
    let alignments = tags(xfs, "alignment");
    // Every format but the header's (labels sit on their column) is top-aligned.
    let bottom = alignments
        .iter()
        .filter(|a| attribute(a, "vertical").is_none())
        .count();
    assert_eq!(alignments.len(), tags(xfs, "xf").len(), "{xfs}");
    assert!(alignments.len() > 5 && bottom <= 1, "{alignments:?}");
}

/// sheaf's own font, typed here rather than read from the code, so a
/// change of font is a change of this test too.
const SHEAF_FONT: &str = "DejaVu Sans Condensed";

/// Every font of a workbook's cell formats is sheaf's (no format falls back
/// to the library's default font or to the theme's), and every run of text
/// in its charts (titles, axis titles, axis numbers, legends) names it.
fn assert_sheaf_font(xlsx: &Path) {
    let styles = part(xlsx, "xl/styles.xml");
    let fonts = &styles[styles.find("<fonts").unwrap()..styles.find("</fonts>").unwrap()];
    let count: usize = attribute(tags(fonts, "fonts")[0], "count")
        .unwrap()
        .parse()
        .unwrap();
    let names: Vec<&str> = tags(fonts, "name")
        .iter()
        .map(|n| attribute(n, "val").unwrap())
        .collect();
    assert_eq!(names.len(), count, "a font without a name: {fonts}");
    assert!(names.iter().all(|n| *n == SHEAF_FONT), "{names:?}");
    // A theme font (scheme minor/major) would follow the theme, not sheaf.
    assert!(!fonts.contains("<scheme"), "{fonts}");
    // Every cell format uses one of those fonts.
    let xfs = &styles[styles.find("<cellXfs").unwrap()..styles.find("</cellXfs>").unwrap()];
    for xf in tags(xfs, "xf") {
        let id: usize = attribute(xf, "fontId").unwrap().parse().unwrap();
        assert!(id < count, "{xf}");
    }
    for chart in chart_parts(xlsx) {
        let runs = chart.matches("<a:defRPr").count() + chart.matches("<a:rPr").count();
        let named = chart
            .matches(&format!("<a:latin typeface=\"{SHEAF_FONT}\"/>"))
            .count();
        assert!(runs > 0);
        assert_eq!(runs, named, "chart text without sheaf's font: {chart}");
        assert_eq!(
            chart.matches("typeface=").count(),
            named,
            "another font: {chart}"
        );
        // The axis numbers carry a text style of their own (c:txPr).
        assert!(
            chart.matches("<c:txPr>").count() >= 2,
            "axis numbers: {chart}"
        );
    }
}

#[test]
fn every_cell_format_and_chart_uses_sheafs_font() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    assert_sheaf_font(&out);
    // The default format (cells written without one, and links) too.
    let styles = part(&out, "xl/styles.xml");
    let first_font = tags(&styles, "name")[0];
    assert_eq!(attribute(first_font, "val"), Some(SHEAF_FONT));
    assert!(styles.contains("<cellStyle name=\"Normal\" xfId=\"0\" builtinId=\"0\"/>"));
}

/// The trend charts of a batch with October missing: October has its place
/// on the axis with no values (a gap, not a bridge), every point is marked,
/// both axes are titled, the on-time share is on a percentage axis ending
/// at 100%, and the groups keep the result sheets' order (North, Harbour,
/// Ridge: the order the demo data lists them, not alphabetical).
#[test]
fn trend_charts_mark_points_leave_gaps_and_show_shares_as_percentages() {
    let dir = tempfile::tempdir().unwrap();
    let months = common::demo_months_as(
        dir.path(),
        ["depot-2026-08", "depot-2026-09", "depot-2026-11"],
    );
    let pattern = months.join("*.xlsx");
    let o = sheaf(
        &[
            "run",
            &common::demo_recipe(),
            "--data",
            pattern.to_str().unwrap(),
            "--out-dir",
            "out",
        ],
        dir.path(),
    );
    let trend = dir.path().join("out/trend.xlsx");
    assert!(trend.exists(), "{}", text(&o));
    let cells = common::cells(&trend, "Trend charts");
    let at = cells
        .iter()
        .position(|r| r[0] == "Service levels: on_time")
        .unwrap();
    assert_eq!(
        cells[at + 1][..4],
        ["period", "North", "Harbour", "Ridge"].map(|s| Data::String(s.into()))
    );
    let periods: Vec<&Data> = cells[at + 2..at + 6].iter().map(|r| &r[0]).collect();
    assert_eq!(periods, ["2026-08", "2026-09", "2026-10", "2026-11"]);
    assert!(cells[at + 4][1..4].iter().all(|c| *c == Data::Empty));
    let charts = chart_parts(&trend);
    let share = charts
        .iter()
        .find(|c| c.contains("<a:t>Service levels: on_time</a:t>"))
        .unwrap();
    assert!(share.contains("<c:dispBlanksAs val=\"gap\"/>"), "{share}");
    assert!(share.contains("formatCode=\"0.0%\""), "{share}");
    assert!(share.contains("<c:max val=\"1\"/>"), "{share}");
    assert!(share.contains("<a:t>period</a:t>") && share.contains("<a:t>on_time</a:t>"));
    assert_eq!(
        share.matches("<c:ser>").count(),
        share.matches("<c:symbol val=").count(),
        "every series marked"
    );
    assert!(!share.contains("<c:symbol val=\"none\"/>"));
    assert_sheaf_font(&trend);
}

/// Every group of a block is listed: Ridge has no parcel of 20 kg or more
/// this month, so "Heavy parcels" (`where heavy`) shows it with 0 rows, a
/// count of 0 and "no rows" where a figure has no value, in the order of
/// the other blocks; the Checks sheet says "no rows" for it too.
#[test]
fn a_group_without_rows_is_listed_with_zero_rows() {
    let dir = tempfile::tempdir().unwrap();
    let out = demo(dir.path());
    let heavy = common::cells(&out, "Heavy parcels");
    let at = heavy.iter().position(|r| r[0] == "depot").unwrap();
    let groups: Vec<&Data> = heavy[at + 1..].iter().map(|r| &r[0]).collect();
    assert_eq!(groups, ["North", "Harbour", "Ridge"]);
    let ridge = &heavy[at + 3];
    assert_eq!(under(&heavy[at], ridge, "rows"), 0.0);
    assert_eq!(under(&heavy[at], ridge, "n"), 0.0);
    assert_eq!(ridge[3], Data::String("no rows".into()));
    // The Checks sheet's list of figures without a value says the same.
    let checks = common::cells(&out, "Checks");
    let listed = checks
        .iter()
        .find(|r| r[0] == "Heavy parcels / Ridge / centre")
        .unwrap();
    assert!(listed[3].to_string().starts_with("no rows"), "{listed:?}");
}

/// With `--compare`, the first sheet lists each figure the Changes sheet
/// flags as moved, linked to its row there: October against September; and
/// a comparison with a later period is warned about there.
#[test]
fn the_first_sheet_links_every_moved_figure_to_its_changes_row() {
    let dir = tempfile::tempdir().unwrap();
    let months = common::demo_months_as(
        dir.path(),
        ["depot-2026-08", "depot-2026-09", "depot-2026-10"],
    );
    let run = |data: &str, out: &str, compare: Option<&str>| {
        let data = months.join(data);
        let mut args = vec![
            "run".to_string(),
            common::demo_recipe(),
            "--data".into(),
            data.display().to_string(),
            "--out".into(),
            out.into(),
        ];
        if let Some(c) = compare {
            args.extend(["--compare".to_string(), c.to_string()]);
        }
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let o = sheaf(&args, dir.path());
        assert!(dir.path().join(out).exists(), "{}", text(&o));
    };
    run("depot-2026-09.xlsx", "sep.xlsx", None);
    run("depot-2026-10.xlsx", "oct.xlsx", Some("sep.xlsx"));
    let out = dir.path().join("oct.xlsx");
    let changes = common::cells(&out, "Changes");
    let flagged = changes
        .iter()
        .skip(4)
        .filter(|r| {
            ["moved", "shape changed", "new extreme"]
                .iter()
                .any(|flag| r.get(7) == Some(&Data::String(flag.to_string())))
        })
        .count();
    assert!(flagged > 0);
    let glance = common::cells(&out, "At a glance");
    let to_changes: Vec<(String, String)> = links(&sheet_named(&out, "At a glance"))
        .into_iter()
        .filter(|(_, target)| target.trim_start_matches('\'').starts_with("Changes"))
        .collect();
    assert_eq!(to_changes.len(), flagged);
    for (cell, target) in to_changes {
        let (row, col) = row_col(&cell);
        let words = glance[row][col].to_string();
        let (target_row, _) = row_col(target.rsplit_once('!').unwrap().1);
        let line: Vec<String> = changes[target_row].iter().map(|d| d.to_string()).collect();
        assert!(
            ["moved", "shape changed", "new extreme"].contains(&line[7].as_str()),
            "{cell}"
        );
        let named = format!("{} / {} / {}: ", line[0], line[1], line[2]);
        assert!(words.starts_with(&named), "{words} vs {named}");
        assert_eq!(glance[row][0].to_string(), "moved");
    }
    // Compared the wrong way round: the first sheet says so too.
    run("depot-2026-09.xlsx", "sep-again.xlsx", Some("oct.xlsx"));
    let glance = common::cells(&dir.path().join("sep-again.xlsx"), "At a glance");
    let said = "--compare oct.xlsx is of period 2026-10, a later period than this file (2026-09)";
    assert!(
        glance
            .iter()
            .any(|row| row[0] == "warn" && row[2].to_string().starts_with(said)),
        "{glance:?}"
    );
}
