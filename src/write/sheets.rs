//! Panel, robustness, figures and checks sheets.

use std::collections::HashSet;

use rust_xlsxwriter::{Workbook, Worksheet, XlsxError};

use super::style::{self, write_one};
use crate::eval::{Block, Flagged, One, PANEL_LABELS, PanelEntry, Results, group_label};
use crate::stats::{DEFAULT_RESAMPLES, DEFAULT_SEED, DRAW_BUDGET};

/// Sheet names in use, so every new one is unique and at most 31 characters.
#[derive(Default)]
pub struct SheetNames(HashSet<String>);

impl SheetNames {
    pub fn claim(&mut self, wanted: &str) -> String {
        let base: String = wanted
            .chars()
            .filter(|c| !"[]:*?/\\".contains(*c))
            .take(31)
            .collect();
        let mut name = base.clone();
        let mut n = 2;
        while !self.0.insert(name.to_lowercase()) {
            let suffix = format!(" {n}");
            name = format!(
                "{}{suffix}",
                base.chars().take(31 - suffix.len()).collect::<String>()
            );
            n += 1;
        }
        name
    }
}

pub const PANEL_NOTE: &str = "Conventions: n counts numeric cells; missing counts blank, text and error cells. sd is the sample sd (n - 1). \
Quartiles, median and IQR by Hyndman-Fan type 7 (linear interpolation). Skewness g1 = m3 / m2^1.5 and kurtosis b2 = m4 / m2^2 \
(about 3 for normal data) are the moment forms. Bowley skewness = (Q3 + Q1 - 2 Q2) / (Q3 - Q1). Outliers lie strictly beyond \
Tukey's fences Q1 - 1.5 IQR and Q3 + 1.5 IQR. Modes: every most frequent value for whole-number data; otherwise the mean of the \
values in the fullest of Sturges' equal bins. A cell without a number says why.";

fn robustness_note() -> String {
    format!(
        "Each row asks whether a few values drive the figures. Gap = (mean - median) / sd and / IQR. Outliers by Tukey's 1.5 and 3 IQR \
fences (type 7 quartiles), each with its source cell. 'Without' recomputes mean, sd and skewness leaving out the 1.5 IQR outliers. \
Leave-one-out: the largest change in the mean and in the sd that removing one value causes, and its cell. Modified z-scores \
0.6745 (x - median) / MAD above 3.5 (Iglewicz and Hoaglin 1993). Bootstrap: 95% percentile intervals from {DEFAULT_RESAMPLES} \
resamples, seed {DEFAULT_SEED}, so reruns agree. Columns over {} values are not resampled in full: the median's resamples draw \
their middle order statistics directly (the same distribution) and the mean's interval is the Cornish-Fisher expansion of its \
bootstrap distribution (Hall 1992); the 'bootstrap method' column says which. Status: warn for values beyond the 3 IQR fences, modified z above 3.5 or a \
mean-median gap above 0.5 sd; note for 1.5 IQR outliers, kurtosis above 3, a gap above 0.25 sd or fewer than 3 values \
(thresholds are common practice, not from a published source).",
        DRAW_BUDGET / DEFAULT_RESAMPLES
    )
}

fn heading(sheet: &mut Worksheet, title: &str, note: &str, width: usize) -> Result<u32, XlsxError> {
    sheet.write_string_with_format(0, 0, title, &style::title())?;
    let last = (width.max(8) - 1) as u16;
    sheet.merge_range(1, 0, 1, last, note, &style::note())?;
    sheet.set_row_height(1, 92)?;
    Ok(3)
}

pub fn blocks(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    results: &Results,
) -> Result<(), XlsxError> {
    for block in &results.blocks {
        match block {
            Block::Panel {
                name,
                keys,
                entries,
                ..
            } => {
                panel_sheet(
                    workbook.add_worksheet().set_name(names.claim(name))?,
                    name,
                    keys,
                    entries,
                )?;
                robustness_sheet(
                    workbook
                        .add_worksheet()
                        .set_name(names.claim(&format!("{name} robustness")))?,
                    name,
                    keys,
                    entries,
                )?;
            }
            Block::Figures {
                name,
                keys,
                names: figure_names,
                rows,
            } => {
                let sheet = workbook.add_worksheet().set_name(names.claim(name))?;
                let mut labels: Vec<String> = keys.clone();
                labels.push("rows".into());
                labels.extend(figure_names.iter().cloned());
                let note = "Each figure is computed over the rows of its group that pass the recipe's filters. A cell without a number says why.";
                let top = heading(sheet, name, note, labels.len())?;
                style::table_header(sheet, top, &labels, keys.len() as u16)?;
                for (i, row) in rows.iter().enumerate() {
                    let r = top + 1 + i as u32;
                    write_group(sheet, r, &row.group)?;
                    sheet.write_number_with_format(
                        r,
                        keys.len() as u16,
                        row.rows as f64,
                        &style::count(),
                    )?;
                    for (j, value) in row.values.iter().enumerate() {
                        write_one(sheet, r, (keys.len() + 1 + j) as u16, value, false)?;
                    }
                }
                style::filter(sheet, top, top + rows.len() as u32, labels.len())?;
            }
        }
    }
    Ok(())
}

fn write_group(sheet: &mut Worksheet, row: u32, group: &[String]) -> Result<(), XlsxError> {
    for (c, key) in group.iter().enumerate() {
        sheet.write_string(row, c as u16, style::fit(key))?;
    }
    Ok(())
}

/// Header labels of a per-(group, column) table: the group keys, then
/// `column`, then the figures.
fn entry_labels(keys: &[String], figures: &[&str]) -> Vec<String> {
    let mut labels = keys.to_vec();
    labels.push("column".into());
    labels.extend(figures.iter().map(|s| s.to_string()));
    labels
}

fn panel_sheet(
    sheet: &mut Worksheet,
    name: &str,
    keys: &[String],
    entries: &[PanelEntry],
) -> Result<(), XlsxError> {
    let labels = entry_labels(keys, PANEL_LABELS);
    let top = heading(sheet, name, PANEL_NOTE, labels.len())?;
    style::table_header(sheet, top, &labels, keys.len() as u16 + 1)?;
    let whole = ["n", "missing", "low outliers", "high outliers"];
    for (i, e) in entries.iter().enumerate() {
        let r = top + 1 + i as u32;
        write_group(sheet, r, &e.group)?;
        sheet.write_string(r, keys.len() as u16, &e.column)?;
        for (j, value) in e.figures.iter().enumerate() {
            write_one(
                sheet,
                r,
                (keys.len() + 1 + j) as u16,
                value,
                whole.contains(&PANEL_LABELS[j]),
            )?;
        }
    }
    style::filter(sheet, top, top + entries.len() as u32, labels.len())
}

pub const ROBUSTNESS_LABELS: &[&str] = &[
    "status",
    "reason",
    "gap in sd",
    "gap in IQR",
    "outliers 1.5 IQR",
    "1.5 IQR cells",
    "outliers 3 IQR",
    "3 IQR cells",
    "mean without",
    "mean change",
    "sd without",
    "sd change",
    "skewness without",
    "skewness change",
    "largest mean change (one value)",
    "its cell",
    "largest sd change (one value)",
    "its cell (sd)",
    "modified z above 3.5",
    "modified z cells",
    "kurtosis above 3",
    "mean 95% low",
    "mean 95% high",
    "median 95% low",
    "median 95% high",
    "resamples",
    "bootstrap method",
];

/// Cells listed in one spreadsheet cell; the rest are counted, not listed.
const LISTED_CELLS: usize = 100;

fn cells(list: &[Flagged]) -> String {
    let mut text = list
        .iter()
        .take(LISTED_CELLS)
        .map(|f| format!("{} ({})", f.address, crate::format::shortest(f.value)))
        .collect::<Vec<_>>()
        .join(", ");
    if list.len() > LISTED_CELLS {
        text.push_str(&format!(
            " and {} more (see the About sheet's missing cells and the JSON output for all)",
            list.len() - LISTED_CELLS
        ));
    }
    text
}

fn robustness_sheet(
    sheet: &mut Worksheet,
    name: &str,
    keys: &[String],
    entries: &[PanelEntry],
) -> Result<(), XlsxError> {
    let labels = entry_labels(keys, ROBUSTNESS_LABELS);
    let top = heading(
        sheet,
        &format!("{name}: robustness"),
        &robustness_note(),
        labels.len(),
    )?;
    style::table_header(sheet, top, &labels, keys.len() as u16 + 1)?;
    for (i, e) in entries.iter().enumerate() {
        let r = top + 1 + i as u32;
        let b = &e.robustness;
        write_group(sheet, r, &e.group)?;
        let mut c = keys.len() as u16;
        sheet.write_string(r, c, &e.column)?;
        c += 1;
        sheet.write_string_with_format(r, c, b.status.word(), &style::status(b.status.word()))?;
        sheet.write_string(r, c + 1, &b.reason)?;
        let mut values: Vec<(One, bool)> =
            vec![(b.gap_in_sd.clone(), false), (b.gap_in_iqr.clone(), false)];
        values.push((One::Number(b.outliers_wide.len() as f64), true));
        values.push((One::Text(cells(&b.outliers_wide)), false));
        values.push((One::Number(b.outliers_far.len() as f64), true));
        values.push((One::Text(cells(&b.outliers_far)), false));
        for v in [
            &b.mean_without,
            &b.mean_change,
            &b.sd_without,
            &b.sd_change,
            &b.skewness_without,
            &b.skewness_change,
        ] {
            values.push((v.clone(), false));
        }
        for influence in [&b.mean_influence, &b.sd_influence] {
            match influence {
                Some(inf) => {
                    values.push((One::Number(inf.change), false));
                    values.push((One::Text(cells(std::slice::from_ref(&inf.cell))), false));
                }
                None => {
                    values.push((One::Undefined("needs at least 3 values".into()), false));
                    values.push((One::Text(String::new()), false));
                }
            }
        }
        match &b.modified_z {
            Ok(list) => {
                values.push((One::Number(list.len() as f64), true));
                values.push((One::Text(cells(list)), false));
            }
            Err(why) => {
                values.push((One::Undefined(why.clone()), false));
                values.push((One::Text(String::new()), false));
            }
        }
        values.push((
            One::Text(if b.heavy_tails {
                "yes: tails heavier than normal".into()
            } else {
                "no".into()
            }),
            false,
        ));
        match &b.bootstrap {
            Ok(bi) => {
                for x in [bi.mean.low, bi.mean.high, bi.median.low, bi.median.high] {
                    values.push((One::Number(x), false));
                }
                values.push((One::Number(bi.resamples as f64), true));
                values.push((One::Text(bi.method.words().into()), false));
            }
            Err(why) => (0..6).for_each(|_| values.push((One::Undefined(why.clone()), false))),
        }
        for (j, (value, whole)) in values.iter().enumerate() {
            write_one(sheet, r, c + 2 + j as u16, value, *whole)?;
        }
    }
    style::filter(sheet, top, top + entries.len() as u32, labels.len())
}

pub fn checks(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    results: &Results,
) -> Result<(), XlsxError> {
    let sheet = workbook.add_worksheet().set_name(names.claim("Checks"))?;
    let labels: Vec<String> = [
        "check",
        "level",
        "group",
        "condition",
        "value",
        "limit",
        "result",
        "note",
    ]
    .map(String::from)
    .to_vec();
    let note = "Every check of the recipe, overall and for each group when it names groups. value is the left side of the \
condition, limit the right side. A check that cannot be evaluated counts as not passed. Figures that had no value are listed below the checks.";
    let top = heading(sheet, "Checks", note, labels.len())?;
    style::table_header(sheet, top, &labels, 1)?;
    let mut r = top + 1;
    for c in &results.checks {
        sheet.write_string(r, 0, &c.name)?;
        sheet.write_string(
            r,
            1,
            if c.level == crate::recipe::ast::CheckLevel::Warn {
                "warn"
            } else {
                "fail"
            },
        )?;
        sheet.write_string(r, 2, group_label(c.group.as_deref().unwrap_or_default()))?;
        sheet.write_string(r, 3, &c.condition)?;
        write_one(sheet, r, 4, &c.value, false)?;
        if let Some(limit) = &c.limit {
            write_one(sheet, r, 5, limit, false)?;
        }
        sheet.write_string_with_format(r, 6, c.outcome.word(), &style::status(c.outcome.word()))?;
        if let Some(n) = &c.note {
            sheet.write_string(r, 7, n)?;
        }
        r += 1;
    }
    style::filter(sheet, top, r - 1, labels.len())?;
    // Warnings about the recipe, each with its fix.
    if !results.warnings.is_empty() {
        r += 1;
        sheet.write_string_with_format(r, 0, "warnings", &style::title())?;
        for warning in &results.warnings {
            r += 1;
            sheet.write_string_with_format(r, 0, warning, &style::reason())?;
        }
        r += 1;
    }
    // Figures without a value, so none goes unnoticed.
    let undefined = undefined_figures(results);
    if !undefined.is_empty() {
        r += 1;
        sheet.write_string_with_format(r, 0, "figures without a value", &style::title())?;
        r += 1;
        for (place, reason) in undefined {
            sheet.write_string(r, 0, &place)?;
            sheet.write_string_with_format(r, 3, &reason, &style::reason())?;
            r += 1;
        }
    }
    Ok(())
}

/// (where, why) for every figure that has no value.
pub fn undefined_figures(results: &Results) -> Vec<(String, String)> {
    let mut found = Vec::new();
    for block in &results.blocks {
        match block {
            Block::Panel { name, entries, .. } => {
                for e in entries {
                    for (label, value) in PANEL_LABELS.iter().zip(&e.figures) {
                        if let One::Undefined(why) = value {
                            found.push((
                                format!(
                                    "{name} / {} / {} / {label}",
                                    group_label(&e.group),
                                    e.column
                                ),
                                why.clone(),
                            ));
                        }
                    }
                }
            }
            Block::Figures {
                name, names, rows, ..
            } => {
                for row in rows {
                    for (label, value) in names.iter().zip(&row.values) {
                        if let One::Undefined(why) = value {
                            found.push((
                                format!("{name} / {} / {label}", group_label(&row.group)),
                                why.clone(),
                            ));
                        }
                    }
                }
            }
        }
    }
    found
}
