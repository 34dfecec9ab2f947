//! The machine-readable report of a run: what `sheaf run --json` prints.
//! Typed structures with stable snake_case keys, one JSON shape per kind of
//! value, and a version. `schema/sheaf-report.schema.json` is generated from
//! these types (`tests/json_schema.rs` fails when it is stale).
//!
//! A run prints one `Document` per line (JSON Lines): one `result` per
//! data file, and after a batch one `trend`.

mod build;
mod named;
mod robustness;

use schemars::JsonSchema;
use serde::Serialize;

pub(crate) use build::{result_document, trend_document};
pub(crate) use named::{NamedValues, PanelFigures};
pub(crate) use robustness::{RobustnessFigureReport, RobustnessReport};

/// Raised when a key is renamed or removed, or a value changes shape;
/// adding a key keeps the version.
pub const REPORT_VERSION: u32 = 1;

/// One line of `--json` output.
#[derive(Debug, Clone, Serialize, JsonSchema)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub(crate) enum Document {
    /// The result of one data file: everything its workbook holds.
    Result(Box<ResultReport>),
    /// After a batch: every figure per period and the largest moves.
    Trend(TrendReport),
}

/// A figure's value. Numbers are numbers, a list of tied modes is an array
/// of numbers, and a figure that has no value is `{"reason": "..."}`.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
#[serde(untagged)]
pub(crate) enum Value {
    Number(f64),
    Truth(bool),
    Text(String),
    /// A date figure (min, max, median... of a date column).
    Date(IsoDate),
    Numbers(Vec<f64>),
    Missing(Reason),
}

/// A date as ISO 8601 text: `2026-10-31`, or `2026-10-31T08:30:00` when
/// it has a time of day.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
pub(crate) struct IsoDate(
    #[schemars(regex(pattern = r"^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}:\d{2})?$"))] pub String,
);

impl IsoDate {
    /// The ISO text of a spreadsheet serial.
    pub(crate) fn from_serial(serial: f64) -> IsoDate {
        IsoDate(crate::format::date(serial).replacen(' ', "T", 1))
    }
}

/// Why something has no value.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
pub(crate) struct Reason {
    pub(crate) reason: String,
}

/// A result, or `{"reason": "..."}` when there is none.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
#[serde(untagged)]
pub(crate) enum OrReason<T> {
    Value(T),
    NoValue(Reason),
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct ResultReport {
    /// [`REPORT_VERSION`].
    pub(crate) version: u32,
    /// The version of sheaf that made it.
    pub(crate) sheaf_version: String,
    /// When the run happened, ISO 8601 in UTC (`2026-11-01T09:00:00Z`);
    /// `SHEAF_RUN_TIME` fixes it.
    pub(crate) run_time: String,
    pub(crate) title: Option<String>,
    /// The workbook written.
    pub(crate) output: String,
    pub(crate) recipe: RecipeReport,
    pub(crate) input: InputReport,
    /// The period the data covers; null when neither the recipe nor the
    /// file's name gives one.
    pub(crate) period: Option<PeriodReport>,
    pub(crate) rows_read: usize,
    pub(crate) rows_skipped: Vec<SkippedRows>,
    pub(crate) missing_cells: Vec<MissingCell>,
    /// What the loader decided while reading the file (header row found,
    /// blank and summary rows left out, number style, encoding, similar
    /// keys): the About sheet's list.
    pub(crate) reading: Vec<ReadingReport>,
    /// The recipe's warnings, each with its fix (the Checks sheet's list).
    pub(crate) warnings: Vec<String>,
    pub(crate) blocks: Vec<BlockReport>,
    pub(crate) checks: Vec<CheckReport>,
    pub(crate) charts: Vec<ChartReport>,
    /// Against the previous period (`--compare`, or the period before in a
    /// batch); null when there was none.
    pub(crate) changes: Option<ChangesReport>,
}

/// One decision of the loader.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct ReadingReport {
    /// `header row`, `summary rows`, `similar keys`, `numbers`, ...
    pub(crate) topic: String,
    pub(crate) text: String,
    /// Listed on the first sheet and the Checks sheet too: it changed what was read.
    pub(crate) attention: bool,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct RecipeReport {
    pub(crate) path: String,
    /// The recipe as it was read (the About sheet shows it too).
    pub(crate) text: String,
    /// SHA-256 (first 12 bytes, hex) of the recipe's canonical text.
    pub(crate) fingerprint: String,
    /// The relative change beyond which a figure counts as moved.
    pub(crate) drift: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct InputReport {
    pub(crate) file: String,
    pub(crate) size: u64,
    pub(crate) sha256: String,
    pub(crate) sheet: String,
    pub(crate) header_row: u32,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct PeriodReport {
    /// `2026-10` or `2026-10-31`.
    pub(crate) label: String,
    pub(crate) source: PeriodSourceReport,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub(crate) enum PeriodSourceReport {
    /// The dates or periods in the column the recipe's `period from` names.
    DataColumn,
    /// The recipe's `period` statement.
    Recipe,
    /// A date in the data file's name.
    FileName,
    /// No date in the data or the name: the file's name itself (a batch).
    NameFallback,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct SkippedRows {
    pub(crate) reason: String,
    pub(crate) rows: usize,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct MissingCell {
    /// `Deliveries!C17`.
    pub(crate) cell: String,
    pub(crate) column: String,
    pub(crate) why: String,
    pub(crate) content: String,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub(crate) enum BlockReport {
    Panel(PanelReport),
    Figures(FiguresReport),
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct PanelReport {
    pub(crate) name: String,
    /// The `per` columns; empty when ungrouped.
    pub(crate) keys: Vec<String>,
    pub(crate) rows_used: usize,
    pub(crate) entries: Vec<PanelEntryReport>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct PanelEntryReport {
    /// One key per `per` column; empty when ungrouped.
    pub(crate) group: Vec<String>,
    pub(crate) column: String,
    pub(crate) figures: PanelFigures,
    pub(crate) robustness: RobustnessReport,
}

/// A value and the source cell it came from.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct CellValue {
    /// `Deliveries!E41`.
    pub(crate) cell: String,
    /// The number as it stands in that input cell (900 minutes), null when
    /// the value is made from several columns and `cell` names a row.
    pub(crate) input_value: Option<f64>,
    /// The value used (15 hours, from a `let`; the input value otherwise).
    pub(crate) value: f64,
}

/// The largest change that leaving out one value causes, and that value.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct InfluenceReport {
    pub(crate) change: f64,
    pub(crate) cell: String,
    /// The number as it stands in the input cell (see [`CellValue`]).
    pub(crate) input_value: Option<f64>,
    pub(crate) value: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct IntervalReport {
    pub(crate) low: f64,
    pub(crate) high: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct BootstrapReport {
    /// 0.95 for a 95% interval.
    pub(crate) level: f64,
    pub(crate) resamples: usize,
    pub(crate) seed: u64,
    pub(crate) method: String,
    pub(crate) mean: IntervalReport,
    pub(crate) median: IntervalReport,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub(crate) enum StatusReport {
    Ok,
    Note,
    Warn,
}

/// A shape figure judged against its sampling noise under normality.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct NoiseReport {
    pub(crate) estimate: f64,
    pub(crate) standard_error: f64,
    /// estimate / standard_error.
    pub(crate) ratio: f64,
    /// Whether the ratio is beyond the note's cut-off.
    pub(crate) noted: bool,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct FiguresReport {
    pub(crate) name: String,
    pub(crate) keys: Vec<String>,
    pub(crate) rows: Vec<FigureRowReport>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct FigureRowReport {
    pub(crate) group: Vec<String>,
    /// Rows of the data in this group.
    pub(crate) rows: usize,
    /// Each figure by the name the recipe gives it.
    pub(crate) figures: NamedValues,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub(crate) enum CheckLevelReport {
    Warn,
    Fail,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub(crate) enum OutcomeReport {
    Pass,
    Warn,
    Fail,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct CheckReport {
    pub(crate) name: String,
    pub(crate) level: CheckLevelReport,
    pub(crate) condition: String,
    /// The group's keys; null for the result over all rows.
    pub(crate) group: Option<Vec<String>>,
    /// The left side of the condition when it is a comparison, else the condition's value.
    pub(crate) value: Value,
    /// The right side of a comparison; null otherwise.
    pub(crate) limit: Option<Value>,
    pub(crate) result: OutcomeReport,
    /// Why the check could not be evaluated.
    pub(crate) note: Option<String>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub(crate) enum ChartReport {
    Histogram {
        column: String,
        group: Vec<String>,
        rule: String,
        /// k + 1 edges for k bins: the rule is applied to the values inside
        /// the 3 IQR fences.
        edges: Vec<f64>,
        counts: Vec<usize>,
        /// The bin count the rule asked for, when it was more than sheaf draws.
        capped_from: Option<usize>,
        /// Values below the first edge (beyond the low 3 IQR fence).
        below: usize,
        /// Values above the last edge (beyond the high 3 IQR fence).
        above: usize,
    },
    Boxplot {
        column: String,
        boxes: Vec<BoxReport>,
    },
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct BoxReport {
    pub(crate) group: Vec<String>,
    pub(crate) whisker_low: f64,
    pub(crate) q1: f64,
    pub(crate) median: f64,
    pub(crate) q3: f64,
    pub(crate) whisker_high: f64,
    /// Values beyond the 1.5 IQR fences, ascending.
    pub(crate) outliers: Vec<f64>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct ChangesReport {
    /// The period compared with.
    pub(crate) previous_period: Option<String>,
    pub(crate) figures: Vec<ChangeReport>,
}

/// One figure against the previous period.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct ChangeReport {
    pub(crate) block: String,
    /// The group as one label, `North / 2026`, `(all rows)` when ungrouped.
    pub(crate) group: String,
    pub(crate) figure: String,
    pub(crate) previous: f64,
    pub(crate) now: f64,
    pub(crate) change: f64,
    /// (now - previous) / |previous|; a reason when previous was 0.
    pub(crate) relative_change: OrReason<f64>,
    /// The standard error of the change, sqrt(se1^2 + se2^2) from each
    /// period's own (mean, sd, quartiles, median, percentiles, shares,
    /// trimmed means); null for a figure without one.
    pub(crate) standard_error: Option<f64>,
    /// change / standard_error; null without a standard error.
    pub(crate) change_in_standard_errors: Option<f64>,
    /// Flagged on the Changes sheet (any flag).
    pub(crate) moved: bool,
    /// The Changes sheet's flag: `moved` (a level beyond the drift and the
    /// noise rule), `shape changed` or `new extreme`; null when not flagged.
    pub(crate) flag: Option<String>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct TrendReport {
    /// [`REPORT_VERSION`].
    pub(crate) version: u32,
    /// The trend workbook written; null when no file was summarised.
    pub(crate) output: Option<String>,
    /// In order.
    pub(crate) periods: Vec<String>,
    /// Every figure of every period.
    pub(crate) figures: Vec<TrendFigure>,
    /// Period-over-period changes: those with a standard error first, by the
    /// size of the change in standard errors; then the others by relative change.
    pub(crate) moves: Vec<MoveReport>,
    /// Files that could not be summarised, and why.
    pub(crate) skipped: Vec<SkippedFile>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct TrendFigure {
    pub(crate) period: String,
    pub(crate) block: String,
    pub(crate) group: String,
    pub(crate) figure: String,
    pub(crate) value: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct MoveReport {
    pub(crate) block: String,
    pub(crate) group: String,
    pub(crate) figure: String,
    pub(crate) from: String,
    pub(crate) to: String,
    pub(crate) before: f64,
    pub(crate) after: f64,
    pub(crate) relative_change: OrReason<f64>,
    /// The standard error of the change; null for a figure without one.
    pub(crate) standard_error: Option<f64>,
    /// change / standard_error; null without a standard error.
    pub(crate) change_in_standard_errors: Option<f64>,
    /// Flagged on the trend's terms (see `flag`).
    pub(crate) moved: bool,
    /// `moved`, `shape changed` or `new extreme`; null when not flagged.
    pub(crate) flag: Option<String>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub(crate) struct SkippedFile {
    pub(crate) file: String,
    pub(crate) reason: String,
}

/// The JSON Schema of a `Document`, as committed in `schema/`.
pub fn schema() -> String {
    let schema = schemars::schema_for!(Document);
    let mut text = serde_json::to_string_pretty(&schema).unwrap_or_default();
    text.push('\n');
    text
}

/// A document as one line of JSON.
pub(crate) fn to_line(document: &Document) -> String {
    // Only maps with string keys and finite numbers: serialisation cannot fail.
    serde_json::to_string(document).unwrap_or_default()
}
