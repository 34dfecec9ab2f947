//! Evaluation: the recipe over the loaded table. Statements are taken in
//! order: `rows where` narrows the rows for everything below it, a `let`
//! adds a column (its aggregates reduce over the rows kept at that point),
//! and each block and check is evaluated per group. Groups appear in the
//! order their first row appears in the data.

mod aggregate;
mod noise;
mod panel;
mod reason;
mod robustness_figures;
mod value;

use std::collections::HashMap;

use rayon::prelude::*;

use crate::load::{IssueKind, Table};
use crate::recipe::ast::{
    Bins, CheckLevel, ColumnRef, Expr, ExprKind, Figure, Recipe, StatementKind,
};
use crate::stats::{self, BinRule, Histogram};

pub use panel::{
    BoxSummary, CellName, CellPlace, FigureKind, Finding, Flagged, GAP_NOTE_IQR, GAP_WARN_IQR,
    Influence, Judged, OnDates, PANEL_FIGURES, PANEL_LABELS, PanelEntry, PanelFigure, Robustness,
    Rule, Signals, Status, dates_note, figure_value, findings, panel_figure,
};
pub use reason::Reason;
pub use robustness_figures::{ROBUSTNESS_FIGURES, RobustnessFigure, RobustnessShape, Topic};
pub use value::{Context, One, Previous, Row, Rows, Scope, Term, Value};

/// The label of a group whose key cell is blank.
pub const BLANK_KEY: &str = "(blank)";

/// A group's keys as one label, `North / 2026`; "(all rows)" when ungrouped.
/// Sheets, the terminal and the Record sheet all name groups this way.
pub fn group_label(group: &[String]) -> String {
    if group.is_empty() {
        "(all rows)".to_string()
    } else {
        group.join(" / ")
    }
}

/// One group's row of a figures block.
#[derive(Debug, Clone, PartialEq)]
pub struct FigureRow {
    /// The group's key values (empty without `per`).
    pub group: Vec<String>,
    /// Rows of the data in the group.
    pub rows: usize,
    /// Each figure, in the block's order.
    pub values: Vec<One>,
    /// Each figure's standard error where it has one (see `noise`), in
    /// the order of `values`.
    pub standard_errors: Vec<Option<f64>>,
}

/// One block of results, written as one sheet.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// A `panel` statement: the standard panel and robustness per (group, column).
    Panel {
        /// The block's name (its sheet's name).
        name: String,
        /// The columns it groups by.
        keys: Vec<String>,
        /// One entry per (group, column), groups in order of appearance.
        entries: Vec<PanelEntry>,
        /// Rows left after the filters.
        rows_used: usize,
    },
    /// A `figures` statement: named figures per group.
    Figures {
        /// The block's name (its sheet's name).
        name: String,
        /// The columns it groups by.
        keys: Vec<String>,
        /// The figures' names, in the recipe's order.
        names: Vec<String>,
        /// One row per group.
        rows: Vec<FigureRow>,
    },
}

impl Block {
    /// The block's name.
    pub fn name(&self) -> &str {
        match self {
            Block::Panel { name, .. } | Block::Figures { name, .. } => name,
        }
    }
}

/// The result of one check.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Outcome {
    /// The condition held.
    Pass,
    /// A `warn` check did not pass.
    Warn,
    /// A `fail` check did not pass.
    Fail,
}

impl Outcome {
    /// The outcome as the sheets and `--json` write it.
    pub fn word(self) -> &'static str {
        match self {
            Outcome::Pass => "pass",
            Outcome::Warn => "warn",
            Outcome::Fail => "fail",
        }
    }
}

/// One check, overall or for one group.
#[derive(Debug, Clone, PartialEq)]
pub struct CheckResult {
    /// The check's name.
    pub name: String,
    /// `warn` or `fail`.
    pub level: CheckLevel,
    /// The condition in canonical text.
    pub condition: String,
    /// None for the overall result.
    pub group: Option<Vec<String>>,
    /// The left side of the condition when it is a comparison, else the condition's value.
    pub value: One,
    /// The right side of the condition when it is a comparison.
    pub limit: Option<One>,
    /// Whether it passed.
    pub outcome: Outcome,
    /// Why a check could not be evaluated (it then counts as not passed).
    pub note: Option<Reason>,
}

impl CheckResult {
    /// The note as the sheets, `--json` and the terminal write it.
    pub fn note_words(&self) -> Option<String> {
        self.note
            .as_ref()
            .map(|why| format!("could not be evaluated: {why}"))
    }
}

/// The data of one chart.
#[derive(Debug, Clone, PartialEq)]
pub enum Chart {
    /// A histogram of one column in one group.
    Histogram {
        /// The column.
        column: String,
        /// The group's key values.
        group: Vec<String>,
        /// The bins and counts.
        histogram: Histogram,
        /// The bin rule as the recipe writes it.
        rule: String,
    },
    /// Box plots of one column, a box per group.
    Boxplot {
        /// The column.
        column: String,
        /// Each group's key values and box.
        boxes: Vec<(Vec<String>, BoxSummary)>,
    },
}

/// A cell of the input that counted as missing, for the About sheet.
#[derive(Debug, Clone, PartialEq)]
pub struct MissingCell {
    /// The cell (`Deliveries!D7`).
    pub address: String,
    /// The column's name.
    pub column: String,
    /// Blank, text or an error value.
    pub kind: IssueKind,
    /// What the cell held, as text.
    pub content: String,
}

/// Everything a recipe computed over one table.
#[derive(Debug, Clone, PartialEq)]
pub struct Results {
    /// The recipe's `title`.
    pub title: Option<String>,
    /// The panel and figures blocks, in the recipe's order.
    pub blocks: Vec<Block>,
    /// Every check, overall then per group.
    pub checks: Vec<CheckResult>,
    /// The histograms and box plots.
    pub charts: Vec<Chart>,
    /// Data rows read from the file.
    pub rows_read: usize,
    /// Rows left out by `rows where`, with the reason.
    pub rows_skipped: Vec<(String, usize)>,
    /// Cells of the used columns that counted as missing.
    pub missing_cells: Vec<MissingCell>,
    /// Current values of every `change(...)` argument, for the next period.
    pub terms: Vec<Term>,
    /// Likely mistakes that did not stop the run, each with its fix
    /// (listed on the Checks sheet and the terminal).
    pub warnings: Vec<String>,
    /// Labels given to columns by `label` lines (presentation only): column
    /// name to label.
    pub labels: std::collections::BTreeMap<String, String>,
    /// (block, figure) of each figure that is a share (`share(...)`), shown
    /// as a percentage.
    pub shares: std::collections::BTreeSet<(String, String)>,
}

impl Results {
    /// How a column is named in titles and on axes: its label when the
    /// recipe gives one, else its name.
    pub fn column_label<'a>(&'a self, column: &'a str) -> &'a str {
        self.labels.get(column).map_or(column, String::as_str)
    }
}

/// Most groups one block may form; more would make sheets no one can read
/// (and a panel with robustness per group would run for hours).
pub const MAX_GROUPS: usize = 100_000;

/// Most rows of one block's table: a sheet's 1,048,576 rows less the title,
/// note and header above it. A panel has one row per (group, column).
pub const MAX_SHEET_ENTRIES: usize = crate::load::MAX_SHEET_ROWS as usize - 16;

/// Most charts of one result: a histogram per group of 100,000 groups would
/// make a Charts sheet no one can read and a workbook too large to open.
pub const MAX_CHARTS: usize = 500;

/// Why a recipe could not be evaluated over a table.
#[derive(Debug, thiserror::Error)]
pub enum EvalError {
    #[error(
        "`per {keys}` makes more than {MAX_GROUPS} groups; group by a column with fewer distinct values"
    )]
    /// A `per` makes more than [`MAX_GROUPS`] groups.
    TooManyGroups {
        /// The `per` keys, joined by commas.
        keys: String,
    },
    #[error(
        "panel \"{block}\" would have {pairs} (group, column) rows, more than the {MAX_SHEET_ENTRIES} a sheet holds; group by fewer keys, list fewer columns, or split the panel"
    )]
    /// A panel has more (group, column) rows than a sheet holds.
    PanelTooLarge {
        /// The panel's name.
        block: String,
        /// Its (group, column) rows.
        pairs: usize,
    },
    #[error(
        "check \"{check}\" brings the checks to {rows} results, one row each, more than the {MAX_SHEET_ENTRIES} a sheet holds; check per fewer keys, or filter the rows with `rows where`"
    )]
    /// Checks whose results would overflow the Checks sheet.
    TooManyChecks {
        /// The check that would overflow it.
        check: String,
        /// The results it would bring.
        rows: usize,
    },
    #[error(
        "the histogram of {column} brings the charts to {charts}, more than the {MAX_CHARTS} a result holds; draw it per fewer keys, or filter the rows with `rows where`"
    )]
    /// Histograms beyond [`MAX_CHARTS`].
    TooManyCharts {
        /// The column drawn.
        column: String,
        /// The charts it would bring.
        charts: usize,
    },
}

/// Each row's value of one group key as a small id, and each id's label.
/// A text data column already holds its rows as codes; anything else is
/// keyed by its text.
fn key_ids(scope: &Scope, key: &ColumnRef) -> (Vec<u32>, Vec<String>) {
    let mut labels: Vec<String> = Vec::new();
    if let Some((codes, words)) = scope.data_column(&key.name).and_then(|c| c.text_codes()) {
        // Codes renumbered in order of first appearance; u32::MAX = not seen yet.
        let mut id_of_word = vec![u32::MAX; words.len()];
        let mut blank_id = u32::MAX;
        let ids = scope
            .rows
            .iter()
            .map(|&r| {
                let word = crate::load::Column::word_of(codes[r as usize]);
                let slot = match word {
                    Some(w) => &mut id_of_word[w],
                    None => &mut blank_id,
                };
                if *slot == u32::MAX {
                    *slot = labels.len() as u32;
                    labels.push(word.map_or_else(|| BLANK_KEY.to_string(), |w| words[w].clone()));
                }
                *slot
            })
            .collect();
        return (ids, labels);
    }
    let rows = scope.column(&key.name);
    let mut index: HashMap<String, u32> = HashMap::new();
    let ids = (0..rows.len())
        .map(|i| {
            let label = rows.text_at(i).unwrap_or_else(|| BLANK_KEY.to_string());
            *index.entry(label).or_insert_with_key(|label| {
                labels.push(label.clone());
                (labels.len() - 1) as u32
            })
        })
        .collect();
    (ids, labels)
}

/// Each group's key labels and its rows.
type Groups = Vec<(Vec<String>, Vec<Row>)>;

/// The groups of a block: every group of the rows the `rows where` lines
/// keep (`kept`), in their order, each with its rows among the block's
/// (`scope`, narrowed by the block's own `where`), so a group none of whose
/// rows pass is listed with 0 rows rather than left out.
fn block_groups(
    table: &Table,
    lets: &value::Lets,
    kept: &[Row],
    scope: &Scope,
    keys: &[ColumnRef],
) -> Result<Groups, EvalError> {
    let found = groups(scope, keys)?;
    if scope.rows.len() == kept.len() || keys.is_empty() {
        return Ok(found);
    }
    let mut rows_of: HashMap<Vec<String>, Vec<Row>> = found.into_iter().collect();
    Ok(groups(&Scope::new(table, lets, kept), keys)?
        .into_iter()
        .map(|(group, _)| {
            let rows = rows_of.remove(&group).unwrap_or_default();
            (group, rows)
        })
        .collect())
}

/// The groups the keys make of the scope's rows, in order of first appearance.
fn groups(scope: &Scope, keys: &[ColumnRef]) -> Result<Groups, EvalError> {
    if keys.is_empty() {
        return Ok(vec![(Vec::new(), scope.rows.to_vec())]);
    }
    let per_key: Vec<(Vec<u32>, Vec<String>)> = keys.iter().map(|k| key_ids(scope, k)).collect();
    let too_many = || EvalError::TooManyGroups {
        keys: keys
            .iter()
            .map(|k| k.name.clone())
            .collect::<Vec<_>>()
            .join(", "),
    };
    if per_key.iter().any(|(_, labels)| labels.len() > MAX_GROUPS) {
        return Err(too_many());
    }
    if let [(ids, labels)] = per_key.as_slice() {
        // One key: its ids already number the groups in order of first
        // appearance. Counting first sizes each group's row list exactly.
        let mut sizes = vec![0usize; labels.len()];
        ids.iter().for_each(|&id| sizes[id as usize] += 1);
        let mut order: Groups = labels
            .iter()
            .zip(sizes)
            .map(|(label, size)| (vec![label.clone()], Vec::with_capacity(size)))
            .collect();
        for (&id, &row) in ids.iter().zip(scope.rows) {
            order[id as usize].1.push(row);
        }
        return Ok(order);
    }
    let mut order: Groups = Vec::new();
    let mut index: HashMap<Vec<u32>, usize> = HashMap::new();
    let mut key = Vec::with_capacity(keys.len());
    for (i, &row) in scope.rows.iter().enumerate() {
        key.clear();
        key.extend(per_key.iter().map(|(ids, _)| ids[i]));
        let slot = match index.get(&key) {
            Some(&slot) => slot,
            None => {
                if order.len() == MAX_GROUPS {
                    return Err(too_many());
                }
                let labels = key
                    .iter()
                    .zip(&per_key)
                    .map(|(&id, (_, labels))| labels[id as usize].clone())
                    .collect();
                order.push((labels, Vec::new()));
                index.insert(key.clone(), order.len() - 1);
                order.len() - 1
            }
        };
        order[slot].1.push(row);
    }
    order.iter_mut().for_each(|(_, rows)| rows.shrink_to_fit());
    Ok(order)
}

/// Rows of `scope` where `condition` holds; the others counted by reason.
fn filter(scope: &Scope, condition: &Expr) -> (Vec<Row>, usize, usize) {
    let truths = match scope.eval(condition) {
        Value::Rows(rows) => value::truths(&rows),
        Value::One(One::Truth(b)) => vec![Some(b); scope.rows.len()],
        Value::One(_) => vec![None; scope.rows.len()],
    };
    let (mut kept, mut failed, mut unknown) = (Vec::new(), 0, 0);
    for (i, t) in truths.into_iter().enumerate() {
        match t {
            Some(true) => kept.push(scope.rows[i]),
            Some(false) => failed += 1,
            None => unknown += 1,
        }
    }
    (kept, failed, unknown)
}

/// Column names an expression refers to, in order of appearance.
fn collect_columns(e: &Expr, out: &mut Vec<String>) {
    if let ExprKind::Column(c) = &e.kind {
        out.push(c.name.clone());
    }
    for child in e.children() {
        collect_columns(child, out);
    }
}

fn columns_used(recipe: &Recipe) -> Vec<String> {
    let mut out = Vec::new();
    for s in &recipe.statements {
        let mut refs: Vec<&ColumnRef> = Vec::new();
        let mut exprs: Vec<&Expr> = Vec::new();
        match &s.kind {
            StatementKind::Let { value, .. } => exprs.push(value),
            StatementKind::RowsWhere(e) => exprs.push(e),
            StatementKind::Panel {
                columns,
                per,
                filter,
                ..
            } => {
                refs.extend(columns.iter().chain(per));
                exprs.extend(filter);
            }
            StatementKind::Figures {
                per,
                filter,
                figures,
                ..
            } => {
                refs.extend(per);
                exprs.extend(filter);
                exprs.extend(figures.iter().map(|f| &f.value));
            }
            StatementKind::Check { per, condition, .. } => {
                refs.extend(per);
                exprs.push(condition);
            }
            StatementKind::Histogram { column, per, .. }
            | StatementKind::Boxplot { column, per } => {
                refs.push(column);
                refs.extend(per);
            }
            StatementKind::Title(_)
            | StatementKind::Input { .. }
            | StatementKind::Header { .. }
            | StatementKind::Period(_)
            | StatementKind::PeriodFrom(_)
            | StatementKind::Noise(_)
            | StatementKind::Drift(_)
            | StatementKind::Label { .. } => {}
        }
        out.extend(refs.into_iter().map(|c| c.name.clone()));
        for e in exprs {
            collect_columns(e, &mut out);
        }
    }
    let mut seen = std::collections::HashSet::new();
    out.retain(|n| seen.insert(n.clone()));
    out
}

/// Evaluates a checked recipe over a table, with no previous period.
pub fn evaluate(recipe: &Recipe, table: &Table) -> Result<Results, EvalError> {
    evaluate_against(recipe, table, None)
}

/// Evaluates a checked recipe over a table; `change(...)` compares with `previous`.
pub fn evaluate_against(
    recipe: &Recipe,
    table: &Table,
    previous: Option<Previous>,
) -> Result<Results, EvalError> {
    let mut run = Run {
        table,
        context: Context {
            previous,
            terms: Default::default(),
        },
        lets: value::Lets::new(),
        sources: HashMap::new(),
        kept: (0..table.rows as Row).collect(),
        results: Results {
            title: None,
            blocks: Vec::new(),
            checks: Vec::new(),
            charts: Vec::new(),
            rows_read: table.rows,
            rows_skipped: Vec::new(),
            missing_cells: missing_cells(recipe, table),
            terms: Vec::new(),
            warnings: Vec::new(),
            labels: Default::default(),
            shares: Default::default(),
        },
        check_rows: 0,
        charts: 0,
    };
    // First walk: `let` and `rows where`, and the groups of every block,
    // check and chart, so a result too large for its sheet stops here, in
    // seconds, before any figure is computed.
    let mut planned = Vec::new();
    for statement in &recipe.statements {
        planned.extend(run.plan(&statement.kind)?);
    }
    // Second walk: the figures, over the rows and groups found above.
    for (kind, planned) in recipe
        .statements
        .iter()
        .map(|s| &s.kind)
        .filter(|kind| makes_output(kind))
        .zip(planned)
    {
        run.output(kind, planned)?;
    }
    let mut terms = run.context.terms.into_inner();
    let mut seen = std::collections::HashSet::new();
    terms.retain(|t| seen.insert((t.expression.clone(), t.group.clone())));
    run.results.terms = terms;
    Ok(run.results)
}

/// The cells of the columns a recipe uses that hold no number where one was
/// expected, or text that could not be read.
fn missing_cells(recipe: &Recipe, table: &Table) -> Vec<MissingCell> {
    let mut cells = Vec::new();
    for name in columns_used(recipe) {
        if let Some(column) = table.column(&name) {
            for issue in column.issues() {
                cells.push(MissingCell {
                    address: table.address(column, issue.row),
                    column: name.clone(),
                    kind: issue.kind,
                    content: issue.content.clone(),
                });
            }
        }
    }
    cells
}

/// The state of one evaluation as it goes down the recipe: the `let`
/// columns so far, the rows `rows where` has kept, and the results.
struct Run<'a> {
    table: &'a Table,
    context: Context,
    lets: value::Lets,
    /// For each let, the data columns it is computed from (for source cells).
    sources: HashMap<String, Vec<String>>,
    kept: Vec<Row>,
    results: Results,
    /// Rows the Checks sheet will hold, counted by the first walk.
    check_rows: usize,
    /// Charts the result will hold, counted by the first walk.
    charts: usize,
}

/// Whether a statement makes output (a block, a check or a chart): the
/// statements the second walk evaluates.
fn makes_output(kind: &StatementKind) -> bool {
    matches!(
        kind,
        StatementKind::Panel { .. }
            | StatementKind::Figures { .. }
            | StatementKind::Check { .. }
            | StatementKind::Histogram { .. }
            | StatementKind::Boxplot { .. }
    )
}

/// What the first walk finds for an output statement: the rows `rows
/// where` had kept above it, the rows of its block, and its groups.
struct Planned {
    kept: Vec<Row>,
    rows_used: usize,
    groups: Groups,
}

impl Run<'_> {
    /// The first walk: evaluates a `let` or `rows where`; for an output
    /// statement, finds its groups and refuses it when its sheet (or the
    /// Checks sheet, or the charts) would overflow.
    fn plan(&mut self, kind: &StatementKind) -> Result<Option<Planned>, EvalError> {
        let (block_filter, per) = match kind {
            StatementKind::Panel { per, filter, .. }
            | StatementKind::Figures { per, filter, .. } => (filter.as_ref(), per),
            StatementKind::Check { per, .. }
            | StatementKind::Histogram { per, .. }
            | StatementKind::Boxplot { per, .. } => (None, per),
            other => {
                self.statement(other);
                return Ok(None);
            }
        };
        let rows = block_rows(self.table, &self.lets, &self.kept, block_filter);
        let scope = Scope::new(self.table, &self.lets, &rows);
        let groups = match kind {
            StatementKind::Panel { .. } | StatementKind::Figures { .. } => {
                block_groups(self.table, &self.lets, &self.kept, &scope, per)?
            }
            _ => groups(&scope, per)?,
        };
        let rows_used = rows.len();
        drop(rows);
        self.size(kind, groups.len())?;
        Ok(Some(Planned {
            kept: self.kept.clone(),
            rows_used,
            groups,
        }))
    }

    /// Refuses an output statement of `groups` groups whose rows or charts
    /// would not fit; counts its Checks rows and charts.
    fn size(&mut self, kind: &StatementKind, groups: usize) -> Result<(), EvalError> {
        match kind {
            StatementKind::Panel { name, columns, .. } => {
                // The panel and robustness sheets hold a row per pair.
                let pairs = groups * columns.len();
                if pairs > MAX_SHEET_ENTRIES {
                    return Err(EvalError::PanelTooLarge {
                        block: name.value.clone(),
                        pairs,
                    });
                }
            }
            StatementKind::Check { name, per, .. } => {
                // The overall result, then one per group.
                self.check_rows += 1 + if per.is_empty() { 0 } else { groups };
                if self.check_rows > MAX_SHEET_ENTRIES {
                    return Err(EvalError::TooManyChecks {
                        check: name.value.clone(),
                        rows: self.check_rows,
                    });
                }
            }
            StatementKind::Histogram { column, .. } => {
                self.charts += groups;
                if self.charts > MAX_CHARTS {
                    return Err(EvalError::TooManyCharts {
                        column: column.name.clone(),
                        charts: self.charts,
                    });
                }
            }
            // One chart of a box per group.
            StatementKind::Boxplot { .. } => self.charts += 1,
            // A figures block's groups (at most MAX_GROUPS) always fit.
            _ => {}
        }
        Ok(())
    }

    /// The second walk: an output statement's figures over the rows and
    /// groups the first walk found.
    fn output(&mut self, kind: &StatementKind, planned: Planned) -> Result<(), EvalError> {
        let Planned {
            kept,
            rows_used,
            groups,
        } = planned;
        self.kept = kept;
        match kind {
            StatementKind::Panel {
                name, columns, per, ..
            } => self.panel(&name.value, columns, per, groups, rows_used),
            StatementKind::Figures {
                name, per, figures, ..
            } => self.figures(&name.value, per, figures, groups),
            StatementKind::Check {
                name,
                level,
                per,
                condition,
            } => self.check(&name.value, *level, per, condition, groups),
            StatementKind::Histogram { column, bins, .. } => {
                self.histogram(column, bins.as_ref().map(|b| &b.value), groups)
            }
            StatementKind::Boxplot { column, .. } => self.boxplot(column, groups),
            _ => {}
        }
        Ok(())
    }

    /// Evaluates a statement that makes no output.
    fn statement(&mut self, kind: &StatementKind) {
        match kind {
            StatementKind::Title(t) => self.results.title = Some(t.value.clone()),
            StatementKind::Input { .. }
            | StatementKind::Header { .. }
            | StatementKind::Period(_)
            | StatementKind::PeriodFrom(_)
            | StatementKind::Noise(_)
            | StatementKind::Drift(_) => {}
            StatementKind::Label { column, text } => {
                self.results
                    .labels
                    .insert(column.name.clone(), text.value.clone());
            }
            StatementKind::Let { name, value } => self.let_column(&name.value, value),
            StatementKind::RowsWhere(condition) => self.rows_where(condition),
            StatementKind::Panel { .. }
            | StatementKind::Figures { .. }
            | StatementKind::Check { .. }
            | StatementKind::Histogram { .. }
            | StatementKind::Boxplot { .. } => {
                unreachable!("output statements are planned, then evaluated by `output`")
            }
        }
    }

    /// The scope of the rows kept so far.
    fn scope(&self) -> Scope<'_> {
        Scope::new(self.table, &self.lets, &self.kept)
    }

    /// The scope of one group's rows, with its key for `change(...)`.
    fn group_scope<'s>(&'s self, group: &'s [String], rows: &'s [Row]) -> Scope<'s> {
        Scope::new(self.table, &self.lets, rows).grouped(group, &self.context)
    }

    fn let_column(&mut self, name: &str, e: &Expr) {
        let full = widen(self.scope().eval(e), &self.kept, self.table.rows);
        self.lets.insert(name.to_string(), full);
        let mut used = Vec::new();
        collect_columns(e, &mut used);
        let mut data_columns: Vec<String> = Vec::new();
        for u in used {
            let behind = self.sources.get(&u).cloned().unwrap_or_else(|| vec![u]);
            for b in behind {
                if !data_columns.contains(&b) {
                    data_columns.push(b);
                }
            }
        }
        self.sources.insert(name.to_string(), data_columns);
    }

    fn rows_where(&mut self, condition: &Expr) {
        let (now, failed, unknown) = filter(&self.scope(), condition);
        let text = crate::recipe::pretty::expr(condition);
        if failed > 0 {
            self.results
                .rows_skipped
                .push((format!("rows where {text}: condition false"), failed));
        }
        if unknown > 0 {
            self.results.rows_skipped.push((
                format!("rows where {text}: condition could not be evaluated (missing value)"),
                unknown,
            ));
        }
        self.kept = now;
    }

    fn panel(
        &mut self,
        name: &str,
        columns: &[ColumnRef],
        per: &[ColumnRef],
        all_groups: Groups,
        rows_used: usize,
    ) {
        let scope = self.scope();
        let jobs: Vec<(usize, &ColumnRef)> = (0..all_groups.len())
            .flat_map(|g| columns.iter().map(move |c| (g, c)))
            .collect();
        let date_columns: Vec<&str> = columns
            .iter()
            .map(|c| c.name.as_str())
            .filter(|name| scope.column_holds_dates(name))
            .collect();
        // Each (group, column) is independent and the robustness checks
        // dominate, so they run in parallel; a sample is built inside its
        // job, so only as many exist at once as there are threads.
        let (table, lets, sources) = (self.table, &self.lets, &self.sources);
        let entries: Vec<PanelEntry> = jobs
            .par_iter()
            .map(|&(g, column)| {
                let (group, group_rows) = &all_groups[g];
                let is_date = date_columns.contains(&column.name.as_str());
                let scope = Scope::new(table, lets, group_rows);
                let cells = CellNamer::new(table, sources, &column.name);
                panel_entry(&scope, &cells, group, column, is_date)
            })
            .collect();
        self.results.blocks.push(Block::Panel {
            name: name.to_string(),
            keys: per.iter().map(|k| k.name.clone()).collect(),
            entries,
            rows_used,
        });
    }

    fn figures(&mut self, name: &str, per: &[ColumnRef], figures: &[Figure], groups: Groups) {
        let mut out = Vec::new();
        for (group, group_rows) in groups {
            let group_scope = self.group_scope(&group, &group_rows);
            let values = figures
                .iter()
                .map(|f| one(group_scope.eval(&f.value)))
                .collect();
            let standard_errors = figures
                .iter()
                .map(|f| noise::figure_standard_error(&group_scope, &f.value))
                .collect();
            out.push(FigureRow {
                group,
                rows: group_rows.len(),
                values,
                standard_errors,
            });
        }
        for f in figures.iter().filter(|f| is_share(&f.value)) {
            self.results
                .shares
                .insert((name.to_string(), f.name.value.clone()));
        }
        self.results.blocks.push(Block::Figures {
            name: name.to_string(),
            keys: per.iter().map(|k| k.name.clone()).collect(),
            names: figures.iter().map(|f| f.name.value.clone()).collect(),
            rows: out,
        });
    }

    /// A check over all kept rows, then, with `per`, over each group.
    fn check(
        &mut self,
        name: &str,
        level: CheckLevel,
        per: &[ColumnRef],
        condition: &Expr,
        check_groups: Groups,
    ) {
        let scope = self.group_scope(&[], &self.kept);
        let overall = check(&scope, name, level, condition, None);
        let mut found = vec![overall];
        if !per.is_empty() {
            for (group, group_rows) in check_groups {
                let group_scope = self.group_scope(&group, &group_rows);
                found.push(check(
                    &group_scope,
                    name,
                    level,
                    condition,
                    Some(group.clone()),
                ));
            }
        }
        self.results.checks.extend(found);
    }

    fn histogram(&mut self, column: &ColumnRef, bins: Option<&Bins>, chart_groups: Groups) {
        let rule = match bins {
            Some(Bins::Count(k)) => BinRule::Fixed(*k as usize),
            Some(Bins::Rule(word)) => BinRule::from_word(word).unwrap_or(BinRule::Sturges),
            None => BinRule::Sturges,
        };
        for (group, group_rows) in chart_groups {
            let sample = self
                .group_scope(&group, &group_rows)
                .sample(&column_expr(column));
            match stats::fenced_histogram(&sample, rule) {
                Ok(histogram) => self.results.charts.push(Chart::Histogram {
                    column: column.name.clone(),
                    group,
                    histogram,
                    rule: rule.word(),
                }),
                // Not drawn, but said: a chart never goes missing in silence.
                Err(why) => self.results.warnings.push(format!(
                    "histogram of {}, {}: not drawn ({why})",
                    column.name,
                    group_label(&group)
                )),
            }
        }
    }

    fn boxplot(&mut self, column: &ColumnRef, box_groups: Groups) {
        let mut boxes = Vec::new();
        for (group, group_rows) in box_groups {
            let sample = self
                .group_scope(&group, &group_rows)
                .sample(&column_expr(column));
            match panel::box_summary(&sample) {
                Some(summary) => boxes.push((group, summary)),
                None => self.results.warnings.push(format!(
                    "box plot of {}, {}: no box drawn ({})",
                    column.name,
                    group_label(&group),
                    if sample.is_empty() {
                        Reason::NO_VALUES.to_string()
                    } else {
                        "its quartiles could not be computed".to_string()
                    }
                )),
            }
        }
        self.results.charts.push(Chart::Boxplot {
            column: column.name.clone(),
            boxes,
        });
    }
}

/// The panel and robustness of one column in one group (`scope` holds the
/// group's rows).
fn panel_entry(
    scope: &Scope,
    cells: &CellNamer,
    group: &[String],
    column: &ColumnRef,
    is_date: bool,
) -> PanelEntry {
    let sample = scope.column_sample(&column.name);
    let address = |i: usize| cells.name(scope.rows[sample.position(i)] as usize);
    let fenced = panel::fenced(&sample);
    let mut figures = panel::panel_figures(&sample, &fenced);
    if is_date {
        figures = panel::figures_of_dates(figures);
    }
    PanelEntry {
        group: group.to_vec(),
        column: column.name.clone(),
        figures,
        standard_errors: noise::panel_standard_errors(&sample),
        robustness: panel::robustness(&sample, &fenced, &address),
        sample_summary: panel::box_summary(&sample),
    }
}

/// Whether a figure's value is a share: a `share(...)` call, not within
/// arithmetic.
fn is_share(e: &Expr) -> bool {
    matches!(&e.kind, ExprKind::Call { function, .. }
        if crate::recipe::functions::lookup(&function.value)
            .is_some_and(|f| f.evaluation == crate::recipe::functions::Evaluation::Share))
}

fn column_expr(column: &ColumnRef) -> Expr {
    Expr {
        kind: ExprKind::Column(column.clone()),
        span: column.span,
    }
}

/// Names the input cell of a table row in one column. A `let` computed
/// from one data column points at that column's cell; from several, at the
/// row. The place is made once per column and shared by every name.
struct CellNamer<'a> {
    table: &'a Table,
    place: std::sync::Arc<CellPlace>,
    /// The data column whose cell is named (the column itself, or the one
    /// behind a `let` of one data column), whose cell holds the number as
    /// the input has it; none for a `let` of several columns.
    input: Option<&'a crate::load::Column>,
}

impl<'a> CellNamer<'a> {
    fn new(table: &'a Table, sources: &HashMap<String, Vec<String>>, column: &str) -> Self {
        let behind = match sources.get(column).map(Vec::as_slice) {
            Some([only]) => only.as_str(),
            _ => column,
        };
        let sheet = crate::load::table_sheet_ref(&table.sheet);
        let place = match table.column(behind) {
            Some(c) => CellPlace::Column {
                sheet_and_letters: format!(
                    "{sheet}!{}",
                    crate::load::column_letters(c.sheet_column)
                ),
            },
            None => CellPlace::Row {
                sheet,
                column: column.to_string(),
            },
        };
        CellNamer {
            table,
            place: std::sync::Arc::new(place),
            input: table.column(behind),
        }
    }

    fn name(&self, row: usize) -> CellName {
        CellName {
            place: std::sync::Arc::clone(&self.place),
            sheet_row: self.table.sheet_row(row) as u32,
            source_value: self.input.and_then(|c| c.number(row)),
        }
    }
}

/// The rows a block works on: those kept so far, narrowed by its own filter.
fn block_rows<'a>(
    table: &Table,
    lets: &value::Lets,
    kept: &'a [Row],
    condition: Option<&Expr>,
) -> std::borrow::Cow<'a, [Row]> {
    match condition {
        None => std::borrow::Cow::Borrowed(kept),
        Some(c) => std::borrow::Cow::Owned(filter(&Scope::new(table, lets, kept), c).0),
    }
}

/// A value over `kept` rows spread to the whole table (missing elsewhere).
fn widen(v: Value, kept: &[Row], total: usize) -> Rows {
    fn scatter<T: Clone>(values: Vec<Option<T>>, kept: &[Row], total: usize) -> Vec<Option<T>> {
        let mut full = vec![None; total];
        kept.iter()
            .zip(values)
            .for_each(|(&r, x)| full[r as usize] = x);
        full
    }
    match value::spread(v, kept.len()) {
        Rows::Numbers(v) => Rows::Numbers(scatter(v, kept, total)),
        Rows::Truths(v) => Rows::Truths(scatter(v, kept, total)),
        Rows::Texts(v) => Rows::Texts(scatter(v, kept, total)),
        Rows::Dates(v) => Rows::Dates(scatter(v, kept, total)),
    }
}

fn one(v: Value) -> One {
    match v {
        Value::One(o) => o,
        Value::Rows(_) => One::Undefined(Reason::PerRow),
    }
}

fn check(
    scope: &Scope,
    name: &str,
    level: CheckLevel,
    condition: &Expr,
    group: Option<Vec<String>>,
) -> CheckResult {
    let verdict = one(scope.eval(condition));
    let (value, limit) = match &condition.kind {
        ExprKind::Binary { op, left, right } if op.is_comparison() => {
            (one(scope.eval(left)), Some(one(scope.eval(right))))
        }
        _ => (verdict.clone(), None),
    };
    let failing = if level == CheckLevel::Fail {
        Outcome::Fail
    } else {
        Outcome::Warn
    };
    let (outcome, note) = match verdict {
        One::Truth(true) => (Outcome::Pass, None),
        One::Truth(false) => (failing, None),
        One::Undefined(why) => (failing, Some(why)),
        _ => (failing, Some(Reason::NotTrueOrFalse)),
    };
    CheckResult {
        name: name.to_string(),
        level,
        condition: crate::recipe::pretty::expr(condition),
        group,
        value,
        limit,
        outcome,
        note,
    }
}
