//! The Record sheet: every figure of a result as (block, group, name,
//! value), with the recipe's fingerprint and the period. `--compare` and
//! the trend workbook read it back.

use std::path::Path;

use calamine::{Data, Reader, open_workbook_auto};
use sha2::{Digest, Sha256};

use crate::eval::{Block, One, PANEL_LABELS, Results, group_label};
use crate::recipe::ast::StatementKind;
use crate::recipe::{Recipe, pretty};

pub const RECORD_SHEET: &str = "Record";
/// Columns from one band of entries on the Record sheet to the next (four
/// and a blank); a long record continues in the next band.
pub const RECORD_BAND_WIDTH: u16 = 5;
/// The block name under which `change(...)` arguments are recorded.
pub const TERM_BLOCK: &str = "(compared values)";

#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    pub block: String,
    pub group: String,
    pub name: String,
    pub value: f64,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Record {
    pub fingerprint: String,
    pub period: Option<String>,
    pub entries: Vec<Entry>,
    /// The standard error of each figure that has one, keyed like its
    /// figure (block, group, name); the value is the standard error.
    pub standard_errors: Vec<Entry>,
}

/// How a standard error's row is named on the Record sheet: its figure's
/// name and this. No figure's name ends so: a figures block's names are
/// identifiers and a panel's end in a panel label.
pub const SE_SUFFIX: &str = " (standard error)";

#[derive(Debug, thiserror::Error)]
pub enum RecordError {
    #[error("{0}: cannot read the previous result: {1}")]
    Unreadable(String, String),
    #[error(
        "{0} has no {RECORD_SHEET} sheet, so it is not a sheaf result workbook; compare with a workbook that sheaf wrote"
    )]
    NotSheaf(String),
    #[error(
        "{path} was made by a different recipe (fingerprint {theirs}, this recipe {ours}); compare results of the same recipe"
    )]
    OtherRecipe {
        path: String,
        theirs: String,
        ours: String,
    },
}

/// SHA-256 of the canonical text of what the recipe computes: layout and
/// comments do not count, nor do the lines that say how to read a file
/// (`input`, `header`: a header renamed this month, a decimal comma), where
/// its period comes from (`period`) or how changes are judged (`noise`);
/// adding or editing one keeps last month comparable.
pub fn fingerprint(recipe: &Recipe) -> String {
    digest(&keeping(recipe, |kind| {
        !matches!(
            kind,
            StatementKind::Input { .. }
                | StatementKind::Header { .. }
                | StatementKind::Period(_)
                | StatementKind::PeriodFrom(_)
                | StatementKind::Noise(_)
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
                        for (label, value) in PANEL_LABELS.iter().zip(&e.figures) {
                            let se = e.standard_errors.iter().find(|(l, _)| l == label);
                            let figure = format!("{} {label}", e.column);
                            keep(name, &e.group, figure, value, se.map(|(_, se)| *se));
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

    pub fn find(&self, block: &str, group: &str, name: &str) -> Option<f64> {
        self.entries
            .iter()
            .find(|e| e.block == block && e.group == group && e.name == name)
            .map(|e| e.value)
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
        let fingerprint = cell(0, 1);
        if !accepted.contains(&fingerprint) {
            return Err(RecordError::OtherRecipe {
                path: shown,
                theirs: fingerprint,
                ours: accepted.first().cloned().unwrap_or_default(),
            });
        }
        let period = Some(cell(1, 1)).filter(|p| !p.is_empty() && p != "(none)");
        let width = rows.iter().map(|r| r.len()).max().unwrap_or(0);
        let bands = width.div_ceil(RECORD_BAND_WIDTH as usize);
        let rows_read: Vec<Entry> = (0..bands)
            .flat_map(|band| {
                let left = band * RECORD_BAND_WIDTH as usize;
                rows.iter().skip(3).filter_map(move |row| {
                    let value = match row.get(left + 3)? {
                        Data::Float(x) => *x,
                        Data::Int(i) => *i as f64,
                        _ => return None,
                    };
                    Some(Entry {
                        block: text(row.get(left)),
                        group: text(row.get(left + 1)),
                        name: text(row.get(left + 2)),
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
