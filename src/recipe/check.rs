//! The checker: resolves names and shapes before any data is read, so a
//! recipe mistake is reported at its line and column, not halfway through
//! a run. With the data's headers it also finds unknown columns.

use std::collections::{HashMap, HashSet};

use super::ast::*;
use super::diagnostic::Diagnostic;
use super::functions::{self, Function, FunctionKind, Parameter, Returns};
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
pub const BIN_RULES: &[&str] = &["sturges", "scott", "freedman_diaconis"];

struct Checker<'a> {
    headers: Option<&'a [String]>,
    lets: HashMap<String, Typed>,
    /// The `let` being checked, so that it cannot use itself.
    defining: Option<String>,
    problems: Vec<Diagnostic>,
}

/// Checks a parsed recipe; `headers` are the data's column names when known.
pub fn check(recipe: &Recipe, headers: Option<&[String]>) -> Vec<Diagnostic> {
    let mut checker = Checker {
        headers,
        lets: HashMap::new(),
        defining: None,
        problems: Vec::new(),
    };
    checker.statements(recipe);
    checker.problems
}

/// Checks one expression on its own (for `sheaf calc`): any shape and a
/// list are fine there, since every value is printed on its own line.
pub fn check_expression(e: &Expr, headers: Option<&[String]>) -> Vec<Diagnostic> {
    let mut checker = Checker {
        headers,
        lets: HashMap::new(),
        defining: None,
        problems: Vec::new(),
    };
    checker.expr(e);
    checker.problems
}

impl Checker<'_> {
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
                StatementKind::Drift(d) => {
                    self.at_most_once(
                        &mut once,
                        statement.span,
                        "a second `drift`",
                        "a recipe has one drift threshold; remove this line",
                    );
                    let share = if d.value.1 {
                        d.value.0 / 100.0
                    } else {
                        d.value.0
                    };
                    if share <= 0.0 {
                        self.report(
                            d.span,
                            "the drift threshold must be above 0",
                            Some("write a share of change, such as `drift 10%`".into()),
                        );
                    }
                }
                // Accepted header names are checked against the data by the loader.
                StatementKind::Header { .. } => {}
                StatementKind::Let { name, value } => self.let_statement(name, value),
                StatementKind::RowsWhere(condition) => self.condition(condition, "`rows where`"),
                StatementKind::Panel {
                    name,
                    columns,
                    per,
                    filter,
                } => {
                    self.block_name(name, &mut blocks);
                    for c in columns.iter().chain(per) {
                        self.column(c);
                    }
                    if let Some(f) = filter {
                        self.condition(f, "`where`");
                    }
                }
                StatementKind::Figures {
                    name,
                    per,
                    filter,
                    figures,
                } => {
                    self.block_name(name, &mut blocks);
                    self.columns(per);
                    if let Some(f) = filter {
                        self.condition(f, "`where`");
                    }
                    self.figures(figures);
                }
                StatementKind::Check {
                    name,
                    per,
                    condition,
                    ..
                } => {
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
                StatementKind::Histogram { column, per, bins } => {
                    self.column(column);
                    self.columns(per);
                    if let Some(Spanned {
                        value: Bins::Rule(rule),
                        span,
                    }) = bins
                        && !BIN_RULES.contains(&rule.as_str())
                    {
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
                        self.report(*span, format!("unknown bin rule `{rule}`"), Some(help));
                    }
                }
                StatementKind::Boxplot { column, per } => {
                    self.column(column);
                    self.columns(per);
                }
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
        } else if self
            .headers
            .is_some_and(|h| h.iter().any(|c| c == &name.value))
        {
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
            self.lets.insert(name.value.clone(), t);
        } else {
            // Known to exist, so later uses are not reported again.
            self.lets.insert(
                name.value.clone(),
                Typed {
                    shape: Shape::Rows,
                    value: Value::Unknown,
                },
            );
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
        let Some(headers) = self.headers else {
            return Some(Typed {
                shape: Shape::Rows,
                value: Value::Unknown,
            });
        };
        if headers.iter().any(|h| h == &c.name) {
            return Some(Typed {
                shape: Shape::Rows,
                value: Value::Unknown,
            });
        }
        let candidates = headers
            .iter()
            .map(String::as_str)
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
            } => {
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
            ExprKind::Call { function, args } => self.call(function, args, e.span),
        }
    }

    /// Checks that an operand has the kind of value an operator needs.
    fn operand(&mut self, e: &Expr, t: Typed, wanted: Value, operator: &str) -> Option<()> {
        if t.value == wanted || t.value == Value::Unknown {
            return Some(());
        }
        if t.value == Value::List {
            self.list_misused(e);
            return None;
        }
        let help = match wanted {
            Value::Truth => "combine conditions such as `x > 0`",
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
            let help = match closest(&name.value, functions::FUNCTIONS.iter().map(|f| f.name)) {
                Some(s) => format!("did you mean `{s}`?"),
                None => "see the README for the list of functions".to_string(),
            };
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
        if !ok {
            return None;
        }
        // Each kind refuses one shape of first argument.
        let refused = match function.kind {
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
        let wanted = if function.takes_condition {
            Value::Truth
        } else {
            Value::Number
        };
        self.operand(&args[0], first, wanted, &format!("`{}`", function.name))?;
        // A row function keeps its argument's shape; the others give one value per group.
        let shape = match function.kind {
            FunctionKind::Row => first.shape,
            FunctionKind::Aggregate | FunctionKind::Comparison => Shape::One,
        };
        let value = if function.returns == Returns::List {
            Value::List
        } else {
            Value::Number
        };
        Some(Typed { shape, value })
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
                let is_column = self.lets.contains_key(&c.name)
                    || self.headers.is_some_and(|h| h.contains(&c.name));
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
        if t.shape == Shape::Rows || !matches!(t.value, Value::Number | Value::Unknown) {
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
        if percent && parameter.name == "p" {
            self.report(
                arg.span,
                "a percentile is written as a number from 0 to 100, without `%`",
                Some(format!("write percentile(x, {})", value * 100.0)),
            );
            return false;
        }
        let too_high = if parameter.max_exclusive {
            value >= parameter.max
        } else {
            value > parameter.max
        };
        if value < parameter.min || too_high || (parameter.whole && value.fract() != 0.0) {
            let range = match (parameter.whole, parameter.max_exclusive) {
                (true, _) => format!("a whole number from {} to {}", parameter.min, parameter.max),
                (false, true) => format!(
                    "at least {} and below {}% (a share such as 10%)",
                    parameter.min,
                    parameter.max * 100.0
                ),
                (false, false) if parameter.max.is_infinite() => {
                    format!("{} or more", parameter.min)
                }
                (false, false) => format!("from {} to {}", parameter.min, parameter.max),
            };
            self.report(
                arg.span,
                format!(
                    "the `{}` of `{}` must be {range}",
                    parameter.name, function.name
                ),
                None,
            );
            return false;
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

fn noun(value: Value) -> &'static str {
    match value {
        Value::Number => "number",
        Value::Truth => "condition",
        Value::Text => "text",
        Value::List => "list",
        Value::Unknown => "value",
    }
}
