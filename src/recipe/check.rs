//! The checker: resolves names and shapes before any data is read, so a
//! recipe mistake is reported at its line and column, not halfway through
//! a run. With the data's headers it also finds unknown columns.

use std::collections::{HashMap, HashSet};

use super::ast::*;
use super::diagnostic::Diagnostic;
use super::functions::{
    self, DatePart, Evaluation, Function, FunctionKind, OnDates, Parameter, Returns,
};
use super::suggest::closest;

/// One value per group, or one value per row.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Shape {
    One,
    Rows,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Value {
    Number,
    Truth,
    Text,
    /// A date (a spreadsheet serial underneath).
    Date,
    /// An order statistic (`max(x)`) of a column of unknown kind: a
    /// number, or a date if the column holds dates.
    NumberOrDate,
    List,
    /// A data column whose type is known only once the data is read.
    Unknown,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Typed {
    shape: Shape,
    value: Value,
}

impl Typed {
    fn merge_shape(self, other: Typed) -> Shape {
        if self.shape == Shape::Rows || other.shape == Shape::Rows {
            Shape::Rows
        } else {
            Shape::One
        }
    }
}

/// Sheet names in xlsx: at most 31 characters, none of these.
const SHEET_FORBIDDEN: &[char] = &['[', ']', ':', '*', '?', '/', '\\'];
const SHEET_MAX: usize = 31;
/// The standard errors `noise N se` accepts, both ends included.
pub const NOISE_RANGE: (f64, f64) = (1.0, 10.0);
/// The histogram bin rules a recipe may name.
pub const BIN_RULES: &[&str] = &["sturges", "scott", "freedman_diaconis"];

/// What a data column holds, as far as the checker needs to know.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DataKind {
    /// Numbers: usable in arithmetic and aggregates.
    Numbers,
    /// Dates: compared with dates, subtracted, summarised by order.
    Dates,
    /// Text: usable in `==`, `!=` and as a group key only.
    Text,
    /// Not known, or true/false, or empty: every use is allowed.
    Any,
}

/// A data column's header and kind.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DataColumn {
    /// The header (after the recipe's `header` names are applied).
    pub name: String,
    /// What it holds.
    pub kind: DataKind,
}

/// What the checker found: errors refuse the recipe; warnings do not.
#[derive(Debug, Default)]
pub struct Findings {
    pub errors: Vec<Diagnostic>,
    pub warnings: Vec<Diagnostic>,
}

struct Checker<'a> {
    headers: Option<Vec<&'a str>>,
    kinds: HashMap<&'a str, DataKind>,
    /// `let`s on lines that could not be read: their uses are not checked.
    unread: HashSet<String>,
    lets: HashMap<String, Typed>,
    /// The `let` being checked, so that it cannot use itself.
    defining: Option<String>,
    problems: Vec<Diagnostic>,
    warnings: Vec<Diagnostic>,
}

/// Checks a parsed recipe; `columns` are the data's columns when known.
/// `assumed` are names of `let`s on lines that could not be read, so their
/// uses are not reported as unknown columns as well.
pub fn check(recipe: &Recipe, columns: Option<&[DataColumn]>, assumed: &[String]) -> Findings {
    let mut checker = Checker::new(columns);
    checker.unread.extend(assumed.iter().cloned());
    checker.statements(recipe);
    checker.rows_where_after_everything(recipe);
    Findings {
        errors: checker.problems,
        warnings: checker.warnings,
    }
}

/// Checks one expression on its own (for `sheaf calc`): any shape and a
/// list are fine there, since every value is printed on its own line.
pub fn check_expression(e: &Expr, columns: Option<&[DataColumn]>) -> Vec<Diagnostic> {
    let mut checker = Checker::new(columns);
    checker.expr(e);
    checker.problems
}

/// A column whose values are known only once the data is read.
const UNKNOWN_ROWS: Typed = Typed {
    shape: Shape::Rows,
    value: Value::Unknown,
};

impl<'a> Checker<'a> {
    fn new(columns: Option<&'a [DataColumn]>) -> Checker<'a> {
        Checker {
            headers: columns.map(|c| c.iter().map(|c| c.name.as_str()).collect()),
            kinds: columns
                .unwrap_or_default()
                .iter()
                .map(|c| (c.name.as_str(), c.kind))
                .collect(),
            unread: HashSet::new(),
            lets: HashMap::new(),
            defining: None,
            problems: Vec::new(),
            warnings: Vec::new(),
        }
    }

    fn is_header(&self, name: &str) -> bool {
        self.headers.as_ref().is_some_and(|h| h.contains(&name))
    }

    fn report(&mut self, span: Span, message: impl Into<String>, help: Option<String>) {
        let mut d = Diagnostic::new(span, message);
        if let Some(help) = help {
            d = d.with_help(help);
        }
        self.problems.push(d);
    }

    fn statements(&mut self, recipe: &Recipe) {
        let mut blocks: HashSet<String> = HashSet::new();
        let mut checks: HashSet<String> = HashSet::new();
        let mut labels: HashSet<String> = HashSet::new();
        // Statements a recipe has at most once, by the message for a second one.
        let mut once: HashMap<&'static str, usize> = HashMap::new();
        for statement in &recipe.statements {
            match &statement.kind {
                StatementKind::Title(_) => self.at_most_once(
                    &mut once,
                    statement.span,
                    "a second `title`",
                    "a recipe has one title; remove this line",
                ),
                StatementKind::Input { .. } => self.at_most_once(
                    &mut once,
                    statement.span,
                    "a second `input` statement",
                    "put every input setting on one `input` line",
                ),
                StatementKind::Period(_) => self.at_most_once(
                    &mut once,
                    statement.span,
                    "a second `period`",
                    "a recipe names one period; remove this line",
                ),
                StatementKind::PeriodFrom(c) => {
                    self.at_most_once(
                        &mut once,
                        statement.span,
                        "a second `period`",
                        "a recipe names one period; remove this line",
                    );
                    self.period_column(c);
                }
                StatementKind::Noise(n) => {
                    self.at_most_once(
                        &mut once,
                        statement.span,
                        "a second `noise`",
                        "a recipe has one noise rule; remove this line",
                    );
                    self.noise(n);
                }
                StatementKind::Drift(d) => {
                    self.at_most_once(
                        &mut once,
                        statement.span,
                        "a second `drift`",
                        "a recipe has one drift threshold; remove this line",
                    );
                    self.drift(d);
                }
                // Accepted header names are checked against the data by the loader.
                StatementKind::Header { .. } => {}
                StatementKind::Label { column, text } => self.label(column, text, &mut labels),
                StatementKind::Let { name, value } => self.let_statement(name, value),
                StatementKind::RowsWhere(condition) => self.condition(condition, "`rows where`"),
                StatementKind::Panel {
                    name,
                    columns,
                    per,
                    filter,
                } => {
                    self.block_header(name, &mut blocks, per, filter);
                    for c in columns {
                        self.number_column(c, "a panel");
                    }
                }
                StatementKind::Figures {
                    name,
                    per,
                    filter,
                    figures,
                } => {
                    self.block_header(name, &mut blocks, per, filter);
                    self.figures(figures);
                }
                StatementKind::Check {
                    name,
                    per,
                    condition,
                    ..
                } => self.check_statement(name, &mut checks, per, condition),
                StatementKind::Histogram { column, per, bins } => {
                    self.number_column(column, "a histogram");
                    self.columns(per);
                    if let Some(bins) = bins {
                        self.bin_rule(bins);
                    }
                }
                StatementKind::Boxplot { column, per } => {
                    self.number_column(column, "a box plot");
                    self.columns(per);
                }
            }
        }
    }

    /// A check's name (one per recipe), groups and condition.
    fn check_statement(
        &mut self,
        name: &Spanned<String>,
        checks: &mut HashSet<String>,
        per: &[ColumnRef],
        condition: &Expr,
    ) {
        if !checks.insert(name.value.clone()) {
            self.report(
                name.span,
                format!("a second check named \"{}\"", name.value),
                Some("give each check its own name".into()),
            );
        }
        self.columns(per);
        self.check_condition(condition);
    }

    /// A panel's or figures block's name, groups and filter.
    fn block_header(
        &mut self,
        name: &Spanned<String>,
        blocks: &mut HashSet<String>,
        per: &[ColumnRef],
        filter: &Option<Expr>,
    ) {
        self.block_name(name, blocks);
        self.columns(per);
        if let Some(f) = filter {
            self.condition(f, "`where`");
        }
    }

    fn bin_rule(&mut self, bins: &Spanned<Bins>) {
        let Bins::Rule(rule) = &bins.value else {
            return;
        };
        if BIN_RULES.contains(&rule.as_str()) {
            return;
        }
        let help = match closest(rule, BIN_RULES.iter().copied()) {
            Some(s) => format!(
                "did you mean `{s}`? rules are {}, or give a number of bins",
                BIN_RULES.join(", ")
            ),
            None => format!(
                "rules are {}, or give a number of bins",
                BIN_RULES.join(", ")
            ),
        };
        self.report(bins.span, format!("unknown bin rule `{rule}`"), Some(help));
    }

    /// `drift 5` is a change of 500%: a bare number of 1 or more is
    /// almost always a percent without its `%`.
    fn drift(&mut self, d: &Spanned<(f64, bool)>) {
        let (value, percent) = d.value;
        let share = if percent { value / 100.0 } else { value };
        if share <= 0.0 {
            self.report(
                d.span,
                "the drift threshold must be above 0",
                Some("write a share of change, such as `drift 10%`".into()),
            );
        } else if !percent && value >= 1.0 {
            let shown = crate::format::shortest(value);
            self.report(
                d.span,
                format!(
                    "`drift {shown}` would flag only changes of {}% or more",
                    crate::format::shortest(value * 100.0)
                ),
                Some(format!(
                    "write `drift {shown}%` for {shown} percent (or `drift {}%` if that is meant)",
                    crate::format::shortest(value * 100.0)
                )),
            );
        }
    }

    /// `period from COLUMN`: a column of the data as read (a `let` is
    /// computed after the period is settled, under the recipe's filters).
    fn period_column(&mut self, c: &ColumnRef) {
        if self.lets.contains_key(&c.name) {
            self.report(
                c.span,
                format!(
                    "`period from` reads a column of the data, but `{}` is a `let`",
                    c.name
                ),
                Some("name the data column that holds each row's date or period".into()),
            );
            return;
        }
        self.column(c);
    }

    /// `noise N se`: from 1 to 10 standard errors. Below 1, about a third of
    /// unchanged figures would be flagged under normality; above 10 almost
    /// nothing would (sheaf's bounds, common practice rather than a source).
    fn noise(&mut self, n: &Spanned<f64>) {
        if !(NOISE_RANGE.0..=NOISE_RANGE.1).contains(&n.value) {
            let shown = crate::format::shortest(n.value);
            self.report(
                n.span,
                format!(
                    "`noise {shown} se` is outside {}..{} standard errors",
                    NOISE_RANGE.0, NOISE_RANGE.1
                ),
                Some(
                    "2 standard errors (the default) is about a 5% two-sided level for one figure; \
                     3 is stricter (about 0.3%); write a number from 1 to 10"
                        .into(),
                ),
            );
        }
    }

    /// A column a panel or chart summarises: it must hold numbers.
    fn number_column(&mut self, c: &ColumnRef, what: &str) {
        if let Some(t) = self.column(c)
            && t.value == Value::Text
        {
            self.report(
                c.span,
                format!("{what} summarises numbers, but `{}` holds text", c.name),
                Some(format!(
                    "name a number column here; to split by `{}`, write `per {}`",
                    c.name,
                    super::pretty::column(c)
                )),
            );
        }
    }

    /// A `rows where` below every block, check and chart narrows nothing
    /// that is written.
    fn rows_where_after_everything(&mut self, recipe: &Recipe) {
        let last_output = recipe.statements.iter().rposition(|s| {
            matches!(
                s.kind,
                StatementKind::Panel { .. }
                    | StatementKind::Figures { .. }
                    | StatementKind::Check { .. }
                    | StatementKind::Histogram { .. }
                    | StatementKind::Boxplot { .. }
            )
        });
        let first_unused = last_output.map_or(0, |i| i + 1);
        for s in &recipe.statements[first_unused..] {
            if let StatementKind::RowsWhere(_) = s.kind {
                self.warnings.push(
                    Diagnostic::warning(
                        s.span,
                        "this `rows where` comes after every block, check and chart, so it narrows nothing",
                    )
                    .with_help("a `rows where` narrows the statements below it: move it above the blocks it is for, or remove it"),
                );
            }
        }
    }

    /// Reports the second (not the third, ...) statement of a kind that a
    /// recipe has at most once.
    fn at_most_once(
        &mut self,
        seen: &mut HashMap<&'static str, usize>,
        span: Span,
        second: &'static str,
        help: &str,
    ) {
        let count = seen.entry(second).or_insert(0);
        *count += 1;
        if *count == 2 {
            self.report(span, second, Some(help.into()));
        }
    }

    /// Resolves each column of a list (group keys, chart columns).
    /// A label names a column of the data or a `let` above it, once, with
    /// some text.
    fn label(&mut self, c: &ColumnRef, text: &Spanned<String>, seen: &mut HashSet<String>) {
        self.column(c);
        if !seen.insert(c.name.clone()) {
            self.report(
                c.span,
                format!("a second label for `{}`", c.name),
                Some("a column has one label; remove this line".into()),
            );
        }
        if text.value.trim().is_empty() {
            self.report(
                text.span,
                "a label cannot be empty",
                Some("write the name with its units, such as \"Hours late\"".into()),
            );
        }
    }

    fn columns(&mut self, columns: &[ColumnRef]) {
        for c in columns {
            self.column(c);
        }
    }

    fn block_name(&mut self, name: &Spanned<String>, seen: &mut HashSet<String>) {
        let lower = name.value.to_lowercase();
        if !seen.insert(lower) {
            self.report(
                name.span,
                format!("a second block named \"{}\"", name.value),
                Some("each panel and figures block becomes a sheet and needs its own name".into()),
            );
        }
        if name.value.trim().is_empty() {
            self.report(
                name.span,
                "a block name cannot be empty",
                Some("name it, for example \"Lateness\"".into()),
            );
        } else if let Some(c) = name.value.chars().find(|c| SHEET_FORBIDDEN.contains(c)) {
            self.report(
                name.span,
                format!("a block name cannot contain `{c}`"),
                Some("sheet names exclude [ ] : * ? / \\".into()),
            );
        } else if name.value.chars().count() > SHEET_MAX {
            self.report(
                name.span,
                format!("a block name is at most {SHEET_MAX} characters (it names a sheet)"),
                Some("shorten it".into()),
            );
        }
    }

    fn let_statement(&mut self, name: &Spanned<String>, value: &Expr) {
        if self.lets.contains_key(&name.value) {
            self.report(
                name.span,
                format!("`{}` is defined twice", name.value),
                Some("give the new column another name".into()),
            );
        } else if self.is_header(&name.value) {
            self.report(
                name.span,
                format!("`{}` is already a column of the data", name.value),
                Some("give the new column another name".into()),
            );
        }
        self.defining = Some(name.value.clone());
        let typed = self.expr(value);
        self.defining = None;
        if let Some(t) = typed {
            if t.value == Value::List {
                self.list_misused(value);
            }
            // A `let` is a column: one value per row even when its
            // expression is one value (the evaluator spreads it), so a
            // later `quartile(w, q)` is refused here, not "no value" later.
            let column = Typed {
                shape: Shape::Rows,
                ..t
            };
            self.lets.insert(name.value.clone(), column);
        } else {
            // Known to exist, so later uses are not reported again.
            self.lets.insert(name.value.clone(), UNKNOWN_ROWS);
        }
    }

    fn figures(&mut self, figures: &[Figure]) {
        let mut names = HashSet::new();
        for figure in figures {
            if !names.insert(figure.name.value.clone()) {
                self.report(
                    figure.name.span,
                    format!(
                        "a second figure named `{}` in this block",
                        figure.name.value
                    ),
                    Some("give each figure its own name".into()),
                );
            }
            if let Some(t) = self.expr(&figure.value)
                && t.shape == Shape::Rows
            {
                self.report(
                    figure.value.span,
                    "a figure must be one value per group, but this is a value per row",
                    Some("reduce it with an aggregate, such as mean(...) or share(...)".into()),
                );
            }
        }
    }

    fn condition(&mut self, e: &Expr, context: &str) {
        if let Some(t) = self.expr(e) {
            match t.value {
                Value::Truth | Value::Unknown => {}
                Value::List => self.list_misused(e),
                _ => self.report(
                    e.span,
                    format!(
                        "{context} needs a condition (true or false), not a {}",
                        noun(t.value)
                    ),
                    Some("compare something, such as `status != \"cancelled\"`".into()),
                ),
            }
        }
    }

    fn check_condition(&mut self, e: &Expr) {
        let Some(t) = self.expr(e) else { return };
        if t.value == Value::List {
            return self.list_misused(e);
        }
        if !matches!(t.value, Value::Truth | Value::Unknown) {
            self.report(
                e.span,
                format!("a check needs a condition, not a {}", noun(t.value)),
                Some("compare a figure with a limit, such as `mean(x) <= 5`".into()),
            );
        } else if t.shape == Shape::Rows {
            self.report(
                e.span,
                "a check needs one true/false value per group, but this is one per row",
                Some("use an aggregate, such as `share(x > 0) >= 95%` or `min(x) >= 0`".into()),
            );
        }
    }

    fn list_misused(&mut self, e: &Expr) {
        self.report(
            e.span,
            "this gives a list of values (every tied mode)",
            Some("a list can stand only alone as a figure: `top = modes(x)`".into()),
        );
    }

    /// Resolves a column name: an earlier `let`, or a data column.
    fn column(&mut self, c: &ColumnRef) -> Option<Typed> {
        if self.defining.as_deref() == Some(c.name.as_str()) {
            let msg = format!("`let {}` refers to itself", c.name);
            self.report(c.span, msg, Some("a `let` may use data columns and earlier lets; give the new column another name".into()));
            return None;
        }
        if let Some(t) = self.lets.get(&c.name) {
            return Some(*t);
        }
        if self.unread.contains(&c.name) {
            return None;
        }
        let Some(headers) = &self.headers else {
            return Some(UNKNOWN_ROWS);
        };
        if headers.contains(&c.name.as_str()) {
            let value = match self.kinds.get(c.name.as_str()) {
                Some(DataKind::Numbers) => Value::Number,
                Some(DataKind::Dates) => Value::Date,
                Some(DataKind::Text) => Value::Text,
                Some(DataKind::Any) | None => Value::Unknown,
            };
            return Some(Typed {
                shape: Shape::Rows,
                value,
            });
        }
        let candidates = headers
            .iter()
            .copied()
            .chain(self.lets.keys().map(String::as_str));
        let help = match closest(&c.name, candidates) {
            Some(near)
                if near
                    .chars()
                    .all(|ch| ch.is_ascii_alphanumeric() || ch == '_')
                    && !near.starts_with(|ch: char| ch.is_ascii_digit()) =>
            {
                format!("did you mean `{near}`?")
            }
            Some(near) => format!("did you mean `{{{near}}}`?"),
            None => format!("the data's columns are: {}", headers.join(", ")),
        };
        self.report(c.span, format!("no column named `{}`", c.name), Some(help));
        None
    }

    fn expr(&mut self, e: &Expr) -> Option<Typed> {
        let one = |value| {
            Some(Typed {
                shape: Shape::One,
                value,
            })
        };
        match &e.kind {
            ExprKind::Number(_) | ExprKind::Percent(_) => one(Value::Number),
            ExprKind::Text(_) => one(Value::Text),
            ExprKind::Date(_) => one(Value::Date),
            ExprKind::Column(c) => self.column(c),
            ExprKind::Unary { op, operand } => {
                let t = self.expr(operand)?;
                let wanted = if *op == UnaryOp::Not {
                    Value::Truth
                } else {
                    Value::Number
                };
                self.operand(
                    operand,
                    t,
                    wanted,
                    if *op == UnaryOp::Not { "`not`" } else { "`-`" },
                )?;
                Some(Typed {
                    shape: t.shape,
                    value: wanted,
                })
            }
            ExprKind::Binary { op, left, right } => {
                let (l, r) = (self.expr(left), self.expr(right));
                let (l, r) = (l?, r?);
                let shape = l.merge_shape(r);
                let symbol = format!("`{}`", op.symbol());
                if op.is_logical() {
                    self.operand(left, l, Value::Truth, &symbol)?;
                    self.operand(right, r, Value::Truth, &symbol)?;
                    return Some(Typed {
                        shape,
                        value: Value::Truth,
                    });
                }
                if matches!(op, BinaryOp::Equal | BinaryOp::NotEqual) {
                    for (side, t) in [(left, l), (right, r)] {
                        if t.value == Value::List {
                            self.list_misused(side);
                            return None;
                        }
                    }
                    return Some(Typed {
                        shape,
                        value: Value::Truth,
                    });
                }
                if l.value == Value::Date || r.value == Value::Date {
                    let value = self.date_operation(*op, (left, l), (right, r))?;
                    return Some(Typed { shape, value });
                }
                self.operand(left, l, Value::Number, &symbol)?;
                self.operand(right, r, Value::Number, &symbol)?;
                Some(Typed {
                    shape,
                    value: if op.is_comparison() {
                        Value::Truth
                    } else {
                        Value::Number
                    },
                })
            }
            ExprKind::If {
                condition,
                then,
                otherwise,
            } => self.if_expr(e, condition, then, otherwise),
            ExprKind::Call { function, args } => self.call(function, args, e.span),
        }
    }

    /// An operator with a date on one side: dates compare with dates, a
    /// date minus a date is a number of days, and a date plus or minus a
    /// number of days is a date. Anything else is reported.
    fn date_operation(
        &mut self,
        op: BinaryOp,
        (left, l): (&Expr, Typed),
        (right, r): (&Expr, Typed),
    ) -> Option<Value> {
        use Value::{Date, Number, Unknown};
        let symbol = op.symbol();
        // A value that may be a date is taken as unknown here.
        let loose = |v: Value| if v == Value::NumberOrDate { Unknown } else { v };
        let result = match (op, loose(l.value), loose(r.value)) {
            (_, Date | Unknown, Date | Unknown) if op.is_comparison() => Some(Value::Truth),
            (BinaryOp::Subtract, Date, Date) => Some(Number),
            (BinaryOp::Subtract, Date, Unknown) | (BinaryOp::Subtract, Unknown, Date) => {
                Some(Unknown)
            }
            (BinaryOp::Add | BinaryOp::Subtract, Date, Number)
            | (BinaryOp::Add, Number | Unknown, Date)
            | (BinaryOp::Add, Date, Unknown) => Some(Date),
            _ => None,
        };
        if result.is_some() {
            return result;
        }
        let (at, other) = if l.value == Date {
            (right, r)
        } else {
            (left, l)
        };
        let help = if op.is_comparison() {
            "compare a date with a date, as in shipped >= date \"2026-10-01\"".to_string()
        } else {
            "a date minus a date gives days; a date plus or minus a number of days gives a date"
                .to_string()
        };
        self.report(
            if other.value == Date {
                left.span
            } else {
                at.span
            },
            format!(
                "`{symbol}` cannot combine a date with a {} here",
                noun(if other.value == Date {
                    Date
                } else {
                    other.value
                })
            ),
            Some(help),
        );
        None
    }

    /// `if C then A else B`: a condition, and branches of one kind.
    fn if_expr(
        &mut self,
        e: &Expr,
        condition: &Expr,
        then: &Expr,
        otherwise: &Expr,
    ) -> Option<Typed> {
        let c = self.expr(condition);
        let (t, o) = (self.expr(then), self.expr(otherwise));
        let (c, t, o) = (c?, t?, o?);
        self.operand(condition, c, Value::Truth, "`if`")?;
        for (branch, typed) in [(then, t), (otherwise, o)] {
            if typed.value == Value::List {
                self.list_misused(branch);
                return None;
            }
        }
        let value = if t.value == o.value {
            t.value
        } else if t.value == Value::NumberOrDate && matches!(o.value, Value::Number | Value::Date) {
            o.value
        } else if o.value == Value::NumberOrDate && matches!(t.value, Value::Number | Value::Date) {
            t.value
        } else if t.value == Value::Unknown {
            o.value
        } else if o.value == Value::Unknown {
            t.value
        } else {
            self.report(
                e.span,
                format!(
                    "the two branches of `if` give different kinds of value ({} and {})",
                    noun(t.value),
                    noun(o.value)
                ),
                Some("make both branches numbers, or both text".into()),
            );
            return None;
        };
        Some(Typed {
            shape: if c.merge_shape(t) == Shape::Rows || o.shape == Shape::Rows {
                Shape::Rows
            } else {
                Shape::One
            },
            value,
        })
    }

    /// Checks that an operand has the kind of value an operator needs.
    fn operand(&mut self, e: &Expr, t: Typed, wanted: Value, operator: &str) -> Option<()> {
        let either =
            t.value == Value::NumberOrDate && matches!(wanted, Value::Number | Value::Date);
        if t.value == wanted || t.value == Value::Unknown || either {
            return Some(());
        }
        if t.value == Value::List {
            self.list_misused(e);
            return None;
        }
        let help = match wanted {
            Value::Truth => "combine conditions such as `x > 0`",
            Value::Date => "give it a date column, or a date written date \"2026-10-01\"",
            _ => "text and conditions do not take part in arithmetic",
        };
        self.report(
            e.span,
            format!(
                "{operator} needs a {} here, not a {}",
                noun(wanted),
                noun(t.value)
            ),
            Some(help.into()),
        );
        None
    }

    fn call(&mut self, name: &Spanned<String>, args: &[Expr], span: Span) -> Option<Typed> {
        let Some(function) = functions::lookup(&name.value) else {
            let help = self.unknown_function_help(&name.value, args);
            self.report(
                name.span,
                format!("unknown function `{}`", name.value),
                Some(help),
            );
            return None;
        };
        if args.len() < function.min_args() || args.len() > function.max_args() {
            let wanted = if function.min_args() == function.max_args() {
                format!("{}", function.min_args())
            } else {
                format!("{} to {}", function.min_args(), function.max_args())
            };
            self.report(
                span,
                format!(
                    "`{}` takes {wanted} argument{}, got {}",
                    function.name,
                    if function.max_args() == 1 { "" } else { "s" },
                    args.len()
                ),
                Some(format!("write {}", function.signature())),
            );
            return None;
        }
        let first = self.expr(&args[0]);
        let mut ok = first.is_some();
        if !self.rest_of_arguments(function, &args[1..]) {
            ok = false;
        }
        let first = first?;
        if !ok || !self.method_fits(function, args) {
            return None;
        }
        // Each kind refuses one shape of first argument.
        let refused = match function.kind() {
            FunctionKind::Comparison if first.shape == Shape::Rows => Some((
                format!(
                    "`{}` compares one value per group, but this is a value per row",
                    function.name
                ),
                "give it an aggregate, as in change(mean(x))".to_string(),
            )),
            FunctionKind::Aggregate if first.shape == Shape::One => Some((
                format!(
                    "`{}` reduces a column, but its argument is already one value",
                    function.name
                ),
                format!("give it a column, as in {}", function.signature()),
            )),
            _ => None,
        };
        if let Some((message, help)) = refused {
            self.report(args[0].span, message, Some(help));
            return None;
        }
        self.first_argument(function, &args[0], first)?;
        // A row function keeps its argument's shape; the others give one value per group.
        let shape = match function.kind() {
            FunctionKind::Row => first.shape,
            FunctionKind::Aggregate | FunctionKind::Comparison => Shape::One,
        };
        Some(Typed {
            shape,
            value: result_value(function, first.value),
        })
    }

    /// Tukey's hinges give the quartiles only: a percentile with `hinges`
    /// must be one of 0, 25, 50, 75, 100.
    fn method_fits(&mut self, function: &Function, args: &[Expr]) -> bool {
        let hinges = args[1..]
            .iter()
            .any(|a| matches!(&a.kind, ExprKind::Column(c) if !c.braced && c.name == "hinges"));
        let percent = function.parameters.iter().position(|p| p.percent);
        let (true, Some(at)) = (hinges, percent) else {
            return true;
        };
        let Some(arg) = args.get(1 + at) else {
            return true;
        };
        match literal_value(arg) {
            Some((p, _)) if ![0.0, 25.0, 50.0, 75.0, 100.0].contains(&p) => {
                self.report(
                    arg.span,
                    format!("Tukey's hinges give only the quartiles, not the {}th percentile", crate::format::shortest(p)),
                    Some("use 25, 50 or 75 with `hinges`, or another method such as hf7 (the default)".into()),
                );
                false
            }
            _ => true,
        }
    }

    /// `Weight (mg)` reads as a call of a function `Weight`: when that
    /// text is a header, or no function is close, suggest braces.
    fn unknown_function_help(&self, name: &str, args: &[Expr]) -> String {
        let inside: Vec<String> = args.iter().map(super::pretty::expr).collect();
        let as_header = [
            format!("{name} ({})", inside.join(", ")),
            format!("{name}({})", inside.join(", ")),
        ];
        if let Some(header) = as_header.iter().find(|h| self.is_header(h)) {
            return format!("`{header}` is a column: write it in braces, {{{header}}}");
        }
        match closest(name, functions::FUNCTIONS.iter().map(|f| f.name)) {
            Some(s) => format!("did you mean `{s}`?"),
            None if self.headers.is_none() => format!(
                "see the README for the list of functions; if `{}` is a column, write it in braces, {{{}}}",
                as_header[0], as_header[0]
            ),
            None => "see the README for the list of functions".to_string(),
        }
    }

    /// The first argument must be numbers, or a condition for `share`;
    /// the help names the fix for the common slips.
    fn first_argument(&mut self, function: &Function, arg: &Expr, t: Typed) -> Option<()> {
        match (function.on_dates(), t.value) {
            (OnDates::Made, _) => {
                return self.operand(arg, t, Value::Date, &format!("`{}`", function.name));
            }
            (OnDates::Refused, Value::Date) => {
                self.report(
                    arg.span,
                    format!("`{}` has no meaning for dates", function.name),
                    Some(DATE_AGGREGATES_HELP.into()),
                );
                return None;
            }
            (_, Value::Date) => return Some(()),
            _ => {}
        }
        let wanted = if function.takes_condition() {
            Value::Truth
        } else {
            Value::Number
        };
        if t.value == wanted
            || matches!(t.value, Value::Unknown | Value::List | Value::NumberOrDate)
        {
            return self.operand(arg, t, wanted, &format!("`{}`", function.name));
        }
        let shown = super::pretty::expr(arg);
        let help = match (wanted, t.value) {
            (Value::Truth, Value::Number) => format!(
                "`{}` takes a condition and gives the share of rows where it holds: write {}({shown} > 0), say",
                function.name, function.name
            ),
            (Value::Number, Value::Text) => format!(
                "`{shown}` holds text; `{}` needs numbers. Count text with a condition, as in share({shown} == \"...\")",
                function.name
            ),
            _ => format!("write {}", function.signature()),
        };
        self.report(
            arg.span,
            format!(
                "`{}` needs a {} here, not a {}",
                function.name,
                noun(wanted),
                noun(t.value)
            ),
            Some(help),
        );
        None
    }

    /// Arguments after the first: option words and numeric parameters.
    fn rest_of_arguments(&mut self, function: &Function, args: &[Expr]) -> bool {
        let mut ok = true;
        let mut parameters = function.parameters.iter();
        let mut option_seen = false;
        for arg in args {
            if let ExprKind::Column(c) = &arg.kind
                && !c.braced
            {
                if function.options.contains(&c.name.as_str()) {
                    if option_seen {
                        self.report(
                            arg.span,
                            format!("`{}` takes one option word", function.name),
                            Some(format!("write {}", function.signature())),
                        );
                        ok = false;
                    }
                    option_seen = true;
                    continue;
                }
                let is_column = self.lets.contains_key(&c.name) || self.is_header(&c.name);
                if !is_column
                    && (function.parameters.is_empty()
                        || closest(&c.name, function.options.iter().copied()).is_some())
                {
                    let help = if function.options.is_empty() {
                        format!(
                            "`{}` takes no option words; write {}",
                            function.name,
                            function.signature()
                        )
                    } else {
                        match closest(&c.name, function.options.iter().copied()) {
                            Some(s) => format!(
                                "did you mean `{s}`? options: {}",
                                function.options.join(", ")
                            ),
                            None => format!("options: {}", function.options.join(", ")),
                        }
                    };
                    self.report(
                        arg.span,
                        format!("unknown option `{}` for `{}`", c.name, function.name),
                        Some(help),
                    );
                    ok = false;
                    continue;
                }
            }
            if option_seen {
                self.report(
                    arg.span,
                    "the option word comes last",
                    Some(format!("write {}", function.signature())),
                );
                ok = false;
                continue;
            }
            let Some(parameter) = parameters.next() else {
                self.report(
                    arg.span,
                    format!("`{}` takes no more numbers here", function.name),
                    Some(format!("write {}", function.signature())),
                );
                ok = false;
                continue;
            };
            ok &= self.parameter(function, parameter, arg);
        }
        ok
    }

    fn parameter(&mut self, function: &Function, parameter: &Parameter, arg: &Expr) -> bool {
        let Some(t) = self.expr(arg) else {
            return false;
        };
        if t.shape == Shape::Rows
            || !matches!(
                t.value,
                Value::Number | Value::Unknown | Value::NumberOrDate
            )
        {
            self.report(
                arg.span,
                format!(
                    "the `{}` of `{}` must be one number",
                    parameter.name, function.name
                ),
                Some(format!("write {}", function.signature())),
            );
            return false;
        }
        let Some((value, percent)) = literal_value(arg) else {
            return true;
        };
        if !self.percent_slips(function, parameter, arg, value, percent) {
            return false;
        }
        if !parameter.allows(value) {
            self.report(
                arg.span,
                format!(
                    "the `{}` of `{}` must be {}",
                    parameter.name,
                    function.name,
                    parameter.range_words()
                ),
                (!parameter.help.is_empty()).then(|| parameter.help.to_string()),
            );
            return false;
        }
        true
    }
    /// A percent parameter written with `%` is refused; one between 0 and
    /// 1 is warned about (a fraction where a percent was meant). False
    /// when refused.
    fn percent_slips(
        &mut self,
        function: &Function,
        parameter: &Parameter,
        arg: &Expr,
        value: f64,
        percent: bool,
    ) -> bool {
        if !parameter.percent {
            return true;
        }
        if percent {
            self.report(
                arg.span,
                format!(
                    "the `{}` of `{}` is written as a number from 0 to 100, without `%`",
                    parameter.name, function.name
                ),
                Some(format!(
                    "write {}(x, {})",
                    function.name,
                    crate::format::shortest(value * 100.0)
                )),
            );
            return false;
        }
        if value > 0.0 && value < 1.0 {
            let shown = crate::format::shortest(value);
            self.warnings.push(
                Diagnostic::warning(
                    arg.span,
                    format!("`{}` takes a percent: {shown} means the {shown}th percentile, below the 1st", function.name),
                )
                .with_help(format!(
                    "for the {}th percentile write {}(x, {})",
                    crate::format::shortest(value * 100.0),
                    function.name,
                    crate::format::shortest(value * 100.0)
                )),
            );
        }
        true
    }
}

/// The value of a literal number argument, including `-3` and `10%`.
fn literal_value(e: &Expr) -> Option<(f64, bool)> {
    match &e.kind {
        ExprKind::Number(v) => Some((*v, false)),
        ExprKind::Percent(v) => Some((v / 100.0, true)),
        ExprKind::Unary {
            op: UnaryOp::Negate,
            operand,
        } => literal_value(operand).map(|(v, p)| (-v, p)),
        _ => None,
    }
}

/// What the aggregates make of dates, for messages.
const DATE_AGGREGATES_HELP: &str = "min, max, mean, median, quartile and percentile of dates are dates; range, sd and iqr are numbers of days; count and missing count cells";

/// The kind of value a call gives, from the function and its first argument.
fn result_value(function: &Function, first: Value) -> Value {
    if function.returns() == Returns::List {
        return Value::List;
    }
    match function.evaluation {
        Evaluation::DatePart(DatePart::Year) => Value::Number,
        Evaluation::DatePart(_) => Value::Text,
        // An order statistic of a column of unknown kind may be a date.
        _ if function.on_dates() == OnDates::Date => match first {
            Value::Date => Value::Date,
            Value::Unknown | Value::NumberOrDate => Value::NumberOrDate,
            _ => Value::Number,
        },
        _ => Value::Number,
    }
}

fn noun(value: Value) -> &'static str {
    match value {
        Value::Number => "number",
        Value::Truth => "condition",
        Value::Text => "text",
        Value::Date => "date",
        Value::NumberOrDate => "number",
        Value::List => "list",
        Value::Unknown => "value",
    }
}
