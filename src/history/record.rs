//! The Record sheet: every figure of a result as (block, group, name,
//! value), with the recipe's fingerprint and the period. `--compare` and
//! the trend workbook read it back.

use std::collections::HashMap;
use std::path::Path;

use calamine::{Data, Reader, open_workbook_auto};
use rust_xlsxwriter::{Worksheet, XlsxError};
use sha2::{Digest, Sha256};

use crate::eval::{Block, One, PANEL_FIGURES, PanelFigure, Results, group_label};
use crate::recipe::ast::StatementKind;
use crate::recipe::{Recipe, pretty};
use crate::write::style;

/// The name of the hidden sheet that holds the Record.
pub const RECORD_SHEET: &str = "Record";
// The Record sheet's layout, written by `Record::write_sheet` and read by
// `Record::read_accepting` (nothing else touches it): the fingerprint in
// B1, the period in B2, band headers in row 3, entries from row 4 in bands
// of four columns (block, group, figure key, value) and a blank column.
const FINGERPRINT_ROW: u32 = 0;
const PERIOD_ROW: u32 = 1;
const HEADER_ROW: u32 = 2;
const FIRST_ENTRY_ROW: u32 = 3;
/// The period cell of a Record without a period.
const NO_PERIOD: &str = "(none)";

/// Rows of entries in one band of the Record sheet: a sheet's 1,048,576
/// rows less those above the entries.
pub const RECORD_BAND_ROWS: u32 = crate::load::MAX_SHEET_ROWS - FIRST_ENTRY_ROW;

/// Columns from one band of entries on the Record sheet to the next (four
/// and a blank); a long record continues in the next band.
pub const RECORD_BAND_WIDTH: u16 = 5;
/// The header of each band of entries on the Record sheet. Records written
/// before stable keys head the third column `figure` and name panel
/// figures by their labels; they are read with the names translated.
pub const RECORD_HEADERS: [&str; 4] = ["block", "group", "figure key", "value"];
/// The third header of a Record that names panel figures by their labels.
const LABELS_HEADER: &str = "figure";
/// The block name under which `change(...)` arguments are recorded.
pub const TERM_BLOCK: &str = "(compared values)";

/// One recorded figure.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// The block (its sheet's name), or [`TERM_BLOCK`].
    pub block: String,
    /// The group's label (`North`, `(all rows)`).
    pub group: String,
    /// The figure: a figures block's name, `column key` for a panel figure, or a compared expression.
    pub name: String,
    /// Its value (a date as its serial).
    pub value: f64,
}

/// A record's values and standard errors by (block, group, name); see
/// [`Record::lookup`].
pub struct Lookup<'a> {
    values: HashMap<(&'a str, &'a str, &'a str), f64>,
    standard_errors: HashMap<(&'a str, &'a str, &'a str), f64>,
}

impl Lookup<'_> {
    /// The value of one figure, if the record holds it.
    pub fn find(&self, block: &str, group: &str, name: &str) -> Option<f64> {
        self.values.get(&(block, group, name)).copied()
    }

    /// The standard error kept for a figure, if it has one.
    pub fn standard_error(&self, block: &str, group: &str, name: &str) -> Option<f64> {
        self.standard_errors.get(&(block, group, name)).copied()
    }
}

/// Entries keyed by (block, group, name), the first of a repeated key kept.
fn keyed(entries: &[Entry]) -> HashMap<(&str, &str, &str), f64> {
    let mut values = HashMap::with_capacity(entries.len());
    for e in entries {
        values
            .entry((e.block.as_str(), e.group.as_str(), e.name.as_str()))
            .or_insert(e.value);
    }
    values
}

/// Every figure of one result, with what made it.
#[derive(Debug, Clone, PartialEq)]
pub struct Record {
    /// The fingerprint of the recipe that made it.
    pub fingerprint: String,
    /// The period the data covered, if known.
    pub period: Option<String>,
    /// The figures, in the order the result holds them.
    pub entries: Vec<Entry>,
    /// The standard error of each figure that has one, keyed like its
    /// figure (block, group, name); the value is the standard error.
    pub standard_errors: Vec<Entry>,
}

/// How a standard error's row is named on the Record sheet: its figure's
/// name and this. No figure's name ends so: a figures block's names are
/// identifiers and a panel's end in a panel label.
pub const SE_SUFFIX: &str = " (standard error)";

/// Why a previous result cannot be compared with.
#[derive(Debug, thiserror::Error)]
pub enum RecordError {
    /// The file (first) could not be read as a workbook, for the reason (second).
    #[error("{0}: cannot read the previous result: {1}")]
    Unreadable(String, String),
    #[error(
        "{0} has no {RECORD_SHEET} sheet, so it is not a sheaf result workbook; compare with a workbook that sheaf wrote"
    )]
    /// The workbook has no Record sheet.
    NotSheaf(String),
    #[error(
        "{path} was made by a different recipe (fingerprint {theirs}, this recipe {ours}); compare results of the same recipe"
    )]
    /// The Record was made by a different recipe.
    OtherRecipe {
        /// The file.
        path: String,
        /// Its recipe's fingerprint.
        theirs: String,
        /// This recipe's fingerprint.
        ours: String,
    },
}

/// The Record's name for a panel figure of a column: the column's name and
/// the figure's stable key (`late_h q1`). Keys have no spaces, so the key is
/// whatever follows the last space.
pub fn panel_entry_name(column: &str, figure: &PanelFigure) -> String {
    format!("{column} {}", figure.key)
}

/// The column and panel figure a Record name stands for, or None for a
/// figures block's figure (a recipe name, which has no space).
pub fn panel_figure_of(name: &str) -> Option<(&str, &'static PanelFigure)> {
    let (column, key) = name.rsplit_once(' ')?;
    Some((column, crate::eval::panel_figure(key)?))
}

/// A Record name as the workbook shows it: a panel figure by its label
/// (`late_h Q1`), anything else as recorded.
pub fn shown_name(block: &str, name: &str) -> String {
    match panel_figure_of(name) {
        Some((column, figure)) if block != TERM_BLOCK => format!("{column} {}", figure.label),
        _ => name.to_string(),
    }
}

/// A name from a Record written before stable keys, which named a panel
/// figure by its display label (`late_h skewness g1`), in today's form
/// (`late_h skewness_g1`); other names are returned as they are.
fn name_from_label(name: String) -> String {
    PANEL_FIGURES
        .iter()
        .find_map(|f| {
            name.strip_suffix(f.label)
                .and_then(|column| column.strip_suffix(' '))
                .map(|column| panel_entry_name(column, f))
        })
        .unwrap_or(name)
}

/// SHA-256 of the canonical text of what the recipe computes: layout and
/// comments do not count, nor do the lines that say how to read a file
/// (`input`, `header`: a header renamed this month, a decimal comma), where
/// its period comes from (`period`), how changes are judged (`drift`,
/// `noise`) or how a column is shown (`label`); adding or editing one keeps
/// last month comparable.
pub fn fingerprint(recipe: &Recipe) -> String {
    digest(&keeping(recipe, |kind| {
        !matches!(
            kind,
            StatementKind::Input { .. }
                | StatementKind::Header { .. }
                | StatementKind::Period(_)
                | StatementKind::PeriodFrom(_)
                | StatementKind::Noise(_)
                | StatementKind::Drift(_)
                | StatementKind::Label { .. }
        )
    }))
}

/// The recipe with only the statements `keep` accepts.
fn keeping(recipe: &Recipe, keep: impl Fn(&StatementKind) -> bool) -> Recipe {
    Recipe {
        statements: recipe
            .statements
            .iter()
            .filter(|s| keep(&s.kind))
            .cloned()
            .collect(),
    }
}

/// The fingerprints earlier versions gave the same recipe, whose results
/// can still be compared with: the whole canonical text (before `input`
/// lines were left out), and the text without `input` and `header` lines
/// (before `period` and `noise` lines were).
fn earlier_fingerprints(recipe: &Recipe) -> [String; 2] {
    [
        digest(recipe),
        digest(&keeping(recipe, |kind| {
            !matches!(
                kind,
                StatementKind::Input { .. } | StatementKind::Header { .. }
            )
        })),
    ]
}

fn digest(recipe: &Recipe) -> String {
    Sha256::digest(pretty::recipe(recipe).as_bytes())
        .iter()
        .take(12)
        .map(|b| format!("{b:02x}"))
        .collect()
}

impl Record {
    /// The Record of a result: every numeric (or date) figure of every block, and each compared expression's value.
    pub fn from_results(results: &Results, fingerprint: String, period: Option<String>) -> Record {
        let mut entries = Vec::new();
        let mut standard_errors = Vec::new();
        // Each figure of each group, with its standard error where it has one.
        let mut keep =
            |block: &str, group: &[String], name: String, value: &One, se: Option<f64>| {
                let entry = |value: f64| Entry {
                    block: block.to_string(),
                    group: group_label(group),
                    name: name.clone(),
                    value,
                };
                // A date figure is kept as its serial, as before dates were typed.
                if let One::Number(x) | One::Date(x) = value {
                    entries.push(entry(*x));
                }
                standard_errors.extend(se.map(entry));
            };
        for block in &results.blocks {
            match block {
                Block::Panel {
                    name,
                    entries: rows,
                    ..
                } => {
                    for e in rows {
                        for (figure, value) in PANEL_FIGURES.iter().zip(&e.figures) {
                            let se = e.standard_errors.iter().find(|(k, _)| *k == figure.key);
                            let entry_name = panel_entry_name(&e.column, figure);
                            keep(name, &e.group, entry_name, value, se.map(|(_, se)| *se));
                        }
                    }
                }
                Block::Figures {
                    name, names, rows, ..
                } => {
                    for r in rows {
                        for ((figure, value), se) in
                            names.iter().zip(&r.values).zip(&r.standard_errors)
                        {
                            keep(name, &r.group, figure.clone(), value, *se);
                        }
                    }
                }
            }
        }
        for t in &results.terms {
            entries.push(Entry {
                block: TERM_BLOCK.into(),
                group: t.group.clone(),
                name: t.expression.clone(),
                value: t.value,
            });
        }
        Record {
            fingerprint,
            period,
            entries,
            standard_errors,
        }
    }

    /// The rows of the Record sheet: every figure, then every standard
    /// error named with [`SE_SUFFIX`] (results of earlier versions have none).
    pub fn sheet_entries(&self) -> Vec<Entry> {
        let named = self.standard_errors.iter().map(|e| Entry {
            name: format!("{}{SE_SUFFIX}", e.name),
            ..e.clone()
        });
        self.entries.iter().cloned().chain(named).collect()
    }

    /// The standard error kept for a figure, if it has one.
    pub fn standard_error(&self, block: &str, group: &str, name: &str) -> Option<f64> {
        self.standard_errors
            .iter()
            .find(|e| e.block == block && e.group == group && e.name == name)
            .map(|e| e.value)
    }

    /// The values `change(...)` compares with.
    pub fn previous_terms(&self) -> crate::eval::Previous {
        self.entries
            .iter()
            .filter(|e| e.block == TERM_BLOCK)
            .map(|e| ((e.name.clone(), e.group.clone()), e.value))
            .collect()
    }

    /// The value recorded for (block, group, name), if any.
    pub fn find(&self, block: &str, group: &str, name: &str) -> Option<f64> {
        self.entries
            .iter()
            .find(|e| e.block == block && e.group == group && e.name == name)
            .map(|e| e.value)
    }

    /// Every figure's value and standard error by (block, group, name), for
    /// finding many: a comparison of two records of a million figures each
    /// would take hours through [`Record::find`]. The first entry wins, as
    /// with `find`.
    pub fn lookup(&self) -> Lookup<'_> {
        Lookup {
            values: keyed(&self.entries),
            standard_errors: keyed(&self.standard_errors),
        }
    }

    /// Reads the Record sheet of a sheaf result; refuses another recipe's.
    pub fn read(path: &Path, recipe: &Recipe) -> Result<Record, RecordError> {
        let [whole, without_input] = earlier_fingerprints(recipe);
        Record::read_accepting(path, &[fingerprint(recipe), whole, without_input])
    }

    /// Reads the Record sheet of a sheaf result made by a recipe with one of
    /// the `accepted` fingerprints (the current form first).
    pub fn read_accepting(path: &Path, accepted: &[String]) -> Result<Record, RecordError> {
        let shown = path.display().to_string();
        let mut workbook = open_workbook_auto(path)
            .map_err(|e| RecordError::Unreadable(shown.clone(), e.to_string()))?;
        if !workbook.sheet_names().iter().any(|n| n == RECORD_SHEET) {
            return Err(RecordError::NotSheaf(shown));
        }
        let range = workbook
            .worksheet_range(RECORD_SHEET)
            .map_err(|e| RecordError::Unreadable(shown.clone(), e.to_string()))?;
        let text = |d: Option<&Data>| d.map(|d| d.to_string()).unwrap_or_default();
        let rows: Vec<&[Data]> = range.rows().collect();
        let cell = |r: usize, c: usize| text(rows.get(r).and_then(|row| row.get(c)));
        let fingerprint = cell(FINGERPRINT_ROW as usize, 1);
        if !accepted.contains(&fingerprint) {
            return Err(RecordError::OtherRecipe {
                path: shown,
                theirs: fingerprint,
                ours: accepted.first().cloned().unwrap_or_default(),
            });
        }
        let period = Some(cell(PERIOD_ROW as usize, 1)).filter(|p| !p.is_empty() && p != NO_PERIOD);
        let by_label = cell(HEADER_ROW as usize, 2) == LABELS_HEADER;
        let width = rows.iter().map(|r| r.len()).max().unwrap_or(0);
        let bands = width.div_ceil(RECORD_BAND_WIDTH as usize);
        let rows_read: Vec<Entry> = (0..bands)
            .flat_map(|band| {
                let left = band * RECORD_BAND_WIDTH as usize;
                rows.iter()
                    .skip(FIRST_ENTRY_ROW as usize)
                    .filter_map(move |row| {
                        let value = match row.get(left + 3)? {
                            Data::Float(x) => *x,
                            Data::Int(i) => *i as f64,
                            _ => return None,
                        };
                        let block = text(row.get(left));
                        let name = match by_label && block != TERM_BLOCK {
                            true => name_from_label(text(row.get(left + 2))),
                            false => text(row.get(left + 2)),
                        };
                        Some(Entry {
                            block,
                            group: text(row.get(left + 1)),
                            name,
                            value,
                        })
                    })
            })
            .collect();
        let (mut standard_errors, entries): (Vec<Entry>, Vec<Entry>) = rows_read
            .into_iter()
            .partition(|e| e.name.ends_with(SE_SUFFIX));
        for e in &mut standard_errors {
            e.name.truncate(e.name.len() - SE_SUFFIX.len());
        }
        Ok(Record {
            fingerprint,
            period,
            entries,
            standard_errors,
        })
    }
}

impl Record {
    /// Writes this Record on `sheet` (hidden: it is for `--compare`, not
    /// for reading) in the layout [`Record::read_accepting`] reads.
    pub fn write_sheet(&self, sheet: &mut Worksheet) -> Result<(), XlsxError> {
        sheet.set_hidden(true);
        let bold = style::cell().set_bold();
        sheet.write_string_with_format(FINGERPRINT_ROW, 0, "recipe fingerprint", &bold)?;
        sheet.write_string(FINGERPRINT_ROW, 1, &self.fingerprint)?;
        sheet.write_string_with_format(PERIOD_ROW, 0, "period", &bold)?;
        let period = self.period.as_deref().unwrap_or(NO_PERIOD);
        sheet.write_string(PERIOD_ROW, 1, style::fit(period))?;
        write_entries(sheet, &self.sheet_entries(), RECORD_BAND_ROWS)
    }
}

/// The entries in bands of four columns (block, group, figure key, value)
/// side by side, a blank column between them, `band_rows` entries each: so
/// the Record holds every figure the evaluator allows (100,000 groups of a
/// panel of many columns overflow one sheet's rows).
fn write_entries(
    sheet: &mut Worksheet,
    entries: &[Entry],
    band_rows: u32,
) -> Result<(), XlsxError> {
    let bands = entries.len().div_ceil(band_rows as usize).max(1);
    if bands * RECORD_BAND_WIDTH as usize > crate::load::MAX_SHEET_COLUMNS as usize {
        return Err(XlsxError::ParameterError(format!(
            "{} figures are more than the Record sheet holds",
            entries.len()
        )));
    }
    for band in 0..bands as u16 {
        let left = band * RECORD_BAND_WIDTH;
        for (c, h) in RECORD_HEADERS.iter().enumerate() {
            sheet.write_string_with_format(HEADER_ROW, left + c as u16, *h, &style::header())?;
            sheet.set_column_width(left + c as u16, 24)?;
        }
    }
    // Row by row (entry i is in band i / band_rows, row i % band_rows), so
    // a sheet in low-memory mode, which keeps only its last row, takes it.
    let band_rows = band_rows as usize;
    for row in 0..entries.len().min(band_rows) {
        let r = FIRST_ENTRY_ROW + row as u32;
        for (band, e) in entries[row..].iter().step_by(band_rows).enumerate() {
            let left = band as u16 * RECORD_BAND_WIDTH;
            sheet.write_string(r, left, style::fit(&e.block))?;
            sheet.write_string(r, left + 1, style::fit(&e.group))?;
            sheet.write_string(r, left + 2, style::fit(&e.name))?;
            sheet.write_number(r, left + 3, e.value)?;
        }
    }
    Ok(())
}

/// What sheaf wrote, recognised by its sheets rather than its name: a
/// result (it has a Record sheet) or a trend workbook (its Trend and
/// Largest moves sheets). None for anything else, or a file that cannot be
/// opened as a workbook (the loader then says why).
pub fn made_by_sheaf(path: &Path) -> Option<&'static str> {
    let workbook = open_workbook_auto(path).ok()?;
    let names = workbook.sheet_names();
    let has = |sheet: &str| names.iter().any(|n| n == sheet);
    if has(RECORD_SHEET) {
        Some("a sheaf result workbook (it has a Record sheet)")
    } else if has(super::trend::TREND_SHEET) && has(super::trend::MOVES_SHEET) {
        Some("a sheaf trend workbook (it has Trend and Largest moves sheets)")
    } else {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Lines that say how to read, label or judge leave the fingerprint as
    /// it is; a line that computes something else changes it.
    #[test]
    fn only_what_is_computed_makes_the_fingerprint() {
        let of = |text: &str| fingerprint(&crate::recipe::parse(text).recipe);
        let base = "figures \"F\":\n    m = mean(x)\n";
        for extra in [
            "input decimal comma\n",
            "period \"2026-10\"\n",
            "period from shipped\n",
            "noise 3 se\n",
            "drift 5%\n",
            "label x \"Weight (kg)\"\n",
        ] {
            assert_eq!(of(&format!("{extra}{base}")), of(base), "{extra}");
        }
        assert_ne!(of("figures \"F\":\n    m = median(x)\n"), of(base));
    }

    /// Entries spread over bands read back whole and in order (bands of 4
    /// rows here; a real band is 1,048,573 rows), from a sheet in the
    /// low-memory mode the result uses, which drops (with only a line on
    /// standard error) any cell written to a row above the last.
    #[test]
    fn record_bands_read_back_in_order() {
        let entries: Vec<Entry> = (0..10)
            .map(|i| Entry {
                block: "Record".into(),
                group: format!("g{i}"),
                name: "m".into(),
                value: i as f64 / 4.0,
            })
            .collect();
        let mut workbook = rust_xlsxwriter::Workbook::new();
        let sheet = workbook.add_worksheet_with_low_memory().unwrap();
        sheet.set_name(RECORD_SHEET).unwrap();
        sheet.write_string(FINGERPRINT_ROW, 1, "abc").unwrap();
        sheet.write_string(PERIOD_ROW, 1, NO_PERIOD).unwrap();
        write_entries(sheet, &entries, 4).unwrap();
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("r.xlsx");
        workbook.save(&path).unwrap();
        let read = Record::read_accepting(&path, &["abc".to_string()]).unwrap();
        assert_eq!(read.entries, entries);
        assert_eq!(read.period, None);
    }

    /// A Record written with its period and standard errors and read back is
    /// the same Record.
    #[test]
    fn a_written_record_reads_back_the_same() {
        let record = Record {
            fingerprint: "f00d".into(),
            period: Some("2026-10".into()),
            entries: vec![Entry {
                block: "Lateness".into(),
                group: "North".into(),
                name: "late_h q1".into(),
                value: 0.25,
            }],
            standard_errors: vec![Entry {
                block: "Lateness".into(),
                group: "North".into(),
                name: "late_h q1".into(),
                value: 0.0125,
            }],
        };
        let mut workbook = rust_xlsxwriter::Workbook::new();
        let sheet = workbook.add_worksheet().set_name(RECORD_SHEET).unwrap();
        record.write_sheet(sheet).unwrap();
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("r.xlsx");
        workbook.save(&path).unwrap();
        assert_eq!(
            Record::read_accepting(&path, &["f00d".into()]).unwrap(),
            record
        );
    }
}
