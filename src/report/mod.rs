//! The machine-readable report of a run: what `sheaf run --json` prints.
//! Typed structures with stable snake_case keys, one JSON shape per kind of
//! value, and a version. `schema/sheaf-report.schema.json` is generated from
//! these types (`tests/json_schema.rs` fails when it is stale).
//!
//! A run prints one [`Document`] per line (JSON Lines): one `result` per
//! data file, and after a batch one `trend`.

mod build;
mod named;

use schemars::JsonSchema;
use serde::Serialize;

pub use build::{result_document, trend_document};
pub use named::{NamedValues, PanelFigures};

/// Raised when a key is renamed or removed, or a value changes shape;
/// adding a key keeps the version.
pub const REPORT_VERSION: u32 = 1;

/// One line of `--json` output.
#[derive(Debug, Clone, Serialize, JsonSchema)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum Document {
    /// The result of one data file: everything its workbook holds.
    Result(Box<ResultReport>),
    /// After a batch: every figure per period and the largest moves.
    Trend(TrendReport),
}

/// A figure's value. Numbers are numbers, a list of tied modes is an array
/// of numbers, and a figure that has no value is `{"reason": "..."}`.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
#[serde(untagged)]
pub enum Value {
    Number(f64),
    Truth(bool),
    Text(String),
    /// A date figure (min, max, median... of a date column).
    Date(IsoDate),
    Numbers(Vec<f64>),
    NoValue(Reason),
}

/// A date as ISO 8601 text: `2026-10-31`, or `2026-10-31T08:30:00` when
/// it has a time of day.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
pub struct IsoDate(
    #[schemars(regex(pattern = r"^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}:\d{2})?$"))] pub String,
);

impl IsoDate {
    /// The ISO text of a spreadsheet serial.
    pub fn from_serial(serial: f64) -> IsoDate {
        IsoDate(crate::format::date(serial).replacen(' ', "T", 1))
    }
}

/// Why something has no value.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
pub struct Reason {
    pub reason: String,
}

/// A result, or `{"reason": "..."}` when there is none.
#[derive(Debug, Clone, PartialEq, Serialize, JsonSchema)]
#[serde(untagged)]
pub enum OrReason<T> {
    Value(T),
    NoValue(Reason),
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct ResultReport {
    /// [`REPORT_VERSION`].
    pub version: u32,
    /// The version of sheaf that made it.
    pub sheaf_version: String,
    /// When the run happened, ISO 8601 in UTC (`2026-11-01T09:00:00Z`);
    /// `SHEAF_RUN_TIME` fixes it.
    pub run_time: String,
    pub title: Option<String>,
    /// The workbook written.
    pub output: String,
    pub recipe: RecipeReport,
    pub input: InputReport,
    /// The period the data covers; null when neither the recipe nor the
    /// file's name gives one.
    pub period: Option<PeriodReport>,
    pub rows_read: usize,
    pub rows_skipped: Vec<SkippedRows>,
    pub missing_cells: Vec<MissingCell>,
    /// What the loader decided while reading the file (header row found,
    /// blank and summary rows left out, number style, encoding, similar
    /// keys): the About sheet's list.
    pub reading: Vec<ReadingReport>,
    /// The recipe's warnings, each with its fix (the Checks sheet's list).
    pub warnings: Vec<String>,
    pub blocks: Vec<BlockReport>,
    pub checks: Vec<CheckReport>,
    pub charts: Vec<ChartReport>,
    /// Against the previous period (`--compare`, or the period before in a
    /// batch); null when there was none.
    pub changes: Option<ChangesReport>,
}

/// One decision of the loader.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct ReadingReport {
    /// `header row`, `summary rows`, `similar keys`, `numbers`, ...
    pub topic: String,
    pub text: String,
    /// Listed on the first sheet and the Checks sheet too: it changed what was read.
    pub attention: bool,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct RecipeReport {
    pub path: String,
    /// The recipe as it was read (the About sheet shows it too).
    pub text: String,
    /// SHA-256 (first 12 bytes, hex) of the recipe's canonical text.
    pub fingerprint: String,
    /// The relative change beyond which a figure counts as moved.
    pub drift: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct InputReport {
    pub file: String,
    pub size: u64,
    pub sha256: String,
    pub sheet: String,
    pub header_row: u32,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct PeriodReport {
    /// `2026-10` or `2026-10-31`.
    pub label: String,
    pub source: PeriodSourceReport,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum PeriodSourceReport {
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
pub struct SkippedRows {
    pub reason: String,
    pub rows: usize,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct MissingCell {
    /// `Deliveries!C17`.
    pub cell: String,
    pub column: String,
    pub why: String,
    pub content: String,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum BlockReport {
    Panel(PanelReport),
    Figures(FiguresReport),
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct PanelReport {
    pub name: String,
    /// The `per` columns; empty when ungrouped.
    pub keys: Vec<String>,
    pub rows_used: usize,
    pub entries: Vec<PanelEntryReport>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct PanelEntryReport {
    /// One key per `per` column; empty when ungrouped.
    pub group: Vec<String>,
    pub column: String,
    pub figures: PanelFigures,
    pub robustness: RobustnessReport,
}

/// A value and the source cell it came from.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct CellValue {
    /// `Deliveries!E41`.
    pub cell: String,
    /// The number as it stands in that input cell (900 minutes), null when
    /// the value is made from several columns and `cell` names a row.
    pub input_value: Option<f64>,
    /// The value used (15 hours, from a `let`; the input value otherwise).
    pub value: f64,
}

/// The largest change that leaving out one value causes, and that value.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct InfluenceReport {
    pub change: f64,
    pub cell: String,
    /// The number as it stands in the input cell (see [`CellValue`]).
    pub input_value: Option<f64>,
    pub value: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct IntervalReport {
    pub low: f64,
    pub high: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct BootstrapReport {
    /// 0.95 for a 95% interval.
    pub level: f64,
    pub resamples: usize,
    pub seed: u64,
    pub method: String,
    pub mean: IntervalReport,
    pub median: IntervalReport,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum StatusReport {
    Ok,
    Note,
    Warn,
}

/// Every figure of the robustness sheet for one (group, column).
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct RobustnessReport {
    pub status: StatusReport,
    pub reason: String,
    /// (mean - median) / sd.
    pub gap_in_sd: Value,
    /// (mean - median) / IQR.
    pub gap_in_iqr: Value,
    /// Values beyond the 1.5 IQR fences, with their cells.
    pub outliers_1_5_iqr: OrReason<Vec<CellValue>>,
    /// Values beyond the 3 IQR fences, with their cells.
    pub outliers_3_iqr: OrReason<Vec<CellValue>>,
    pub mean_without_outliers: Value,
    pub mean_change_without_outliers: Value,
    pub sd_without_outliers: Value,
    pub sd_change_without_outliers: Value,
    pub skewness_without_outliers: Value,
    pub skewness_change_without_outliers: Value,
    pub largest_mean_influence: OrReason<InfluenceReport>,
    pub largest_sd_influence: OrReason<InfluenceReport>,
    /// Values whose modified z-score exceeds 3.5 in absolute value (Iglewicz and Hoaglin 1993).
    pub modified_z_above_3_5: OrReason<Vec<CellValue>>,
    /// Adjusted skewness G1 against its standard error under normality.
    pub skewness_against_noise: OrReason<NoiseReport>,
    /// Adjusted excess kurtosis G2 against its standard error under normality.
    pub tails_against_noise: OrReason<NoiseReport>,
    pub bootstrap: OrReason<BootstrapReport>,
}

/// A shape figure judged against its sampling noise under normality.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct NoiseReport {
    pub estimate: f64,
    pub standard_error: f64,
    /// estimate / standard_error.
    pub ratio: f64,
    /// Whether the ratio is beyond the note's cut-off.
    pub noted: bool,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct FiguresReport {
    pub name: String,
    pub keys: Vec<String>,
    pub rows: Vec<FigureRowReport>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct FigureRowReport {
    pub group: Vec<String>,
    /// Rows of the data in this group.
    pub rows: usize,
    /// Each figure by the name the recipe gives it.
    pub figures: NamedValues,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum CheckLevelReport {
    Warn,
    Fail,
}

#[derive(Debug, Clone, Copy, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum OutcomeReport {
    Pass,
    Warn,
    Fail,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct CheckReport {
    pub name: String,
    pub level: CheckLevelReport,
    pub condition: String,
    /// The group's keys; null for the result over all rows.
    pub group: Option<Vec<String>>,
    /// The left side of the condition when it is a comparison, else the condition's value.
    pub value: Value,
    /// The right side of a comparison; null otherwise.
    pub limit: Option<Value>,
    pub result: OutcomeReport,
    /// Why the check could not be evaluated.
    pub note: Option<String>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum ChartReport {
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
pub struct BoxReport {
    pub group: Vec<String>,
    pub whisker_low: f64,
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
    pub whisker_high: f64,
    /// Values beyond the 1.5 IQR fences, ascending.
    pub outliers: Vec<f64>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct ChangesReport {
    /// The period compared with.
    pub previous_period: Option<String>,
    pub figures: Vec<ChangeReport>,
}

/// One figure against the previous period.
#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct ChangeReport {
    pub block: String,
    /// The group as one label, `North / 2026`, `(all rows)` when ungrouped.
    pub group: String,
    pub figure: String,
    pub previous: f64,
    pub now: f64,
    pub change: f64,
    /// (now - previous) / |previous|; a reason when previous was 0.
    pub relative_change: OrReason<f64>,
    /// The standard error of the change, sqrt(se1^2 + se2^2) from each
    /// period's own (mean, sd, quartiles, median, percentiles, shares,
    /// trimmed means); null for a figure without one.
    pub standard_error: Option<f64>,
    /// change / standard_error; null without a standard error.
    pub change_in_standard_errors: Option<f64>,
    /// Flagged on the Changes sheet (any flag).
    pub moved: bool,
    /// The Changes sheet's flag: `moved` (a level beyond the drift and the
    /// noise rule), `shape changed` or `new extreme`; null when not flagged.
    pub flag: Option<String>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct TrendReport {
    /// [`REPORT_VERSION`].
    pub version: u32,
    /// The trend workbook written; null when no file was summarised.
    pub output: Option<String>,
    /// In order.
    pub periods: Vec<String>,
    /// Every figure of every period.
    pub figures: Vec<TrendFigure>,
    /// Period-over-period changes: those with a standard error first, by the
    /// size of the change in standard errors; then the others by relative change.
    pub moves: Vec<MoveReport>,
    /// Files that could not be summarised, and why.
    pub skipped: Vec<SkippedFile>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct TrendFigure {
    pub period: String,
    pub block: String,
    pub group: String,
    pub figure: String,
    pub value: f64,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct MoveReport {
    pub block: String,
    pub group: String,
    pub figure: String,
    pub from: String,
    pub to: String,
    pub before: f64,
    pub after: f64,
    pub relative_change: OrReason<f64>,
    /// The standard error of the change; null for a figure without one.
    pub standard_error: Option<f64>,
    /// change / standard_error; null without a standard error.
    pub change_in_standard_errors: Option<f64>,
    /// Flagged on the trend's terms (see `flag`).
    pub moved: bool,
    /// `moved`, `shape changed` or `new extreme`; null when not flagged.
    pub flag: Option<String>,
}

#[derive(Debug, Clone, Serialize, JsonSchema)]
pub struct SkippedFile {
    pub file: String,
    pub reason: String,
}

/// The JSON Schema of a [`Document`], as committed in `schema/`.
pub fn schema() -> String {
    let schema = schemars::schema_for!(Document);
    let mut text = serde_json::to_string_pretty(&schema).unwrap_or_default();
    text.push('\n');
    text
}

/// A document as one line of JSON.
pub fn to_line(document: &Document) -> String {
    // Only maps with string keys and finite numbers: serialisation cannot fail.
    serde_json::to_string(document).unwrap_or_default()
}
