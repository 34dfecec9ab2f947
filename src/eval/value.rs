//! Values during evaluation and the row-by-row evaluation of expressions.
//! A number used with a column is broadcast; missing cells stay missing
//! through arithmetic; a result that is not a finite number is missing.

use std::cell::RefCell;
use std::collections::HashMap;
use std::rc::Rc;

use crate::load::{Column, ColumnKind, Table};
use crate::recipe::ast::{BinaryOp, Expr, ExprKind, UnaryOp};
use crate::recipe::pretty;
use crate::stats::Sample;

use super::Reason;
use super::aggregate;

/// A column's values over the rows being evaluated.
#[derive(Debug, Clone, PartialEq)]
pub enum Rows {
    /// Numbers; None where missing.
    Numbers(Vec<Option<f64>>),
    /// True or false; None where unknown.
    Truths(Vec<Option<bool>>),
    /// Text; None where blank.
    Texts(Vec<Option<String>>),
    /// Dates as spreadsheet serials (days since 1899-12-30).
    Dates(Vec<Option<f64>>),
}

impl Rows {
    /// The number of rows.
    pub fn len(&self) -> usize {
        match self {
            Rows::Numbers(v) => v.len(),
            Rows::Truths(v) => v.len(),
            Rows::Texts(v) => v.len(),
            Rows::Dates(v) => v.len(),
        }
    }

    /// True when there are no rows.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The numeric view: true/false count as 1/0, text as missing, dates
    /// as their serials.
    pub fn numbers(&self) -> Vec<Option<f64>> {
        match self {
            Rows::Numbers(v) | Rows::Dates(v) => v.clone(),
            Rows::Truths(v) => v
                .iter()
                .map(|b| b.map(|b| f64::from(u8::from(b))))
                .collect(),
            Rows::Texts(v) => vec![None; v.len()],
        }
    }

    /// Row i as text (numbers in their shortest exact form, dates as ISO
    /// 8601), for group keys and text comparisons.
    pub fn text_at(&self, i: usize) -> Option<String> {
        match self {
            Rows::Numbers(v) => v[i].map(crate::format::shortest),
            Rows::Truths(v) => v[i].map(|b| b.to_string()),
            Rows::Texts(v) => v[i].clone(),
            Rows::Dates(v) => v[i].map(crate::format::date),
        }
    }
}

/// One value per group.
#[derive(Debug, Clone, PartialEq)]
pub enum One {
    /// A finite number.
    Number(f64),
    /// True or false.
    Truth(bool),
    /// Text.
    Text(String),
    /// A date as its spreadsheet serial (days since 1899-12-30).
    Date(f64),
    /// Several numbers: every tied mode.
    List(Vec<f64>),
    /// No value, and why.
    Undefined(Reason),
}

impl One {
    /// A number, or no value for infinity and NaN (which a sheet cannot show).
    pub fn number(x: f64) -> One {
        if x.is_finite() {
            One::Number(x)
        } else {
            One::Undefined(Reason::NotFinite)
        }
    }
}

/// What an expression gives: one value per group or one per row.
#[derive(Debug, Clone, PartialEq)]
pub enum Value {
    /// One value.
    One(One),
    /// A value per row.
    Rows(Rows),
}

/// A `let` column over the whole table (rows outside its filter are missing).
pub type Lets = HashMap<String, Rows>;

/// Values of `change(...)` arguments in the previous period, by
/// (printed expression, group text).
pub type Previous = HashMap<(String, String), f64>;

/// The current value of a `change(...)` argument in one group.
#[derive(Debug, Clone, PartialEq)]
pub struct Term {
    /// The argument in canonical text.
    pub expression: String,
    /// The group's label.
    pub group: String,
    /// Its value this period.
    pub value: f64,
}

/// What a run compares with, and the values it collects for the next run.
#[derive(Debug, Default)]
pub struct Context {
    /// The previous period's terms, when comparing.
    pub previous: Option<Previous>,
    /// This period's terms, collected as `change(...)` is evaluated.
    pub terms: RefCell<Vec<Term>>,
}

/// A table row index. Four bytes keep row lists small: a sheet holds at
/// most 2^20 rows and a CSV file at most `load::MAX_ROWS`.
pub type Row = u32;

/// What an expression is evaluated over: some rows of the table.
pub struct Scope<'a> {
    /// The loaded table.
    pub table: &'a Table,
    /// The `let` columns so far, over every table row.
    pub lets: &'a Lets,
    /// Table rows in this scope, ascending.
    pub rows: &'a [Row],
    /// The group these rows form ("(all rows)" when ungrouped).
    group: String,
    context: Option<&'a Context>,
    /// Samples already built in this scope, by the printed argument, so a
    /// column is sorted at most once however many order statistics use it.
    samples: RefCell<HashMap<String, Rc<Sample>>>,
}

impl<'a> Scope<'a> {
    /// The scope of `rows` (ascending) of `table`.
    pub fn new(table: &'a Table, lets: &'a Lets, rows: &'a [Row]) -> Scope<'a> {
        Scope {
            table,
            lets,
            rows,
            group: super::group_label(&[]),
            context: None,
            samples: RefCell::new(HashMap::new()),
        }
    }

    /// The same scope, as one group of a run with a comparison context.
    pub fn grouped(mut self, group: &[String], context: &'a Context) -> Scope<'a> {
        self.group = super::group_label(group);
        self.context = Some(context);
        self
    }

    /// Records the current value of a `change(...)` argument and returns its
    /// previous value, if the run has one.
    pub fn compare(&self, expression: String, now: f64) -> Result<f64, Reason> {
        let Some(context) = self.context else {
            return Err(Reason::NoPrevious);
        };
        let previous = context
            .previous
            .as_ref()
            .and_then(|p| p.get(&(expression.clone(), self.group.clone())).copied());
        context.terms.borrow_mut().push(Term {
            expression,
            group: self.group.clone(),
            value: now,
        });
        previous.ok_or(Reason::NoPrevious)
    }

    /// The sample of an aggregate's column argument, built once per scope.
    pub fn sample(&self, argument: &Expr) -> Rc<Sample> {
        let key = pretty::expr(argument);
        if let Some(s) = self.samples.borrow().get(&key) {
            return Rc::clone(s);
        }
        let sample = Rc::new(match &argument.kind {
            ExprKind::Column(c) => self.column_sample(&c.name),
            _ => match self.eval(argument) {
                Value::Rows(rows) => Sample::from_column(rows.numbers()),
                Value::One(_) => Sample::from_column(Vec::new()),
            },
        });
        self.samples.borrow_mut().insert(key, Rc::clone(&sample));
        sample
    }

    /// Whether an expression's values are dates (a date column, a `let`
    /// of dates, a date literal or arithmetic giving dates).
    pub fn holds_dates(&self, e: &Expr) -> bool {
        match &e.kind {
            ExprKind::Column(c) => self.column_holds_dates(&c.name),
            _ => matches!(
                self.eval(e),
                Value::Rows(Rows::Dates(_)) | Value::One(One::Date(_))
            ),
        }
    }

    /// Whether a column (a `let`, else a data column) holds dates.
    pub fn column_holds_dates(&self, name: &str) -> bool {
        match self.lets.get(name) {
            Some(rows) => matches!(rows, Rows::Dates(_)),
            None => self
                .table
                .column(name)
                .is_some_and(|column| column.kind == ColumnKind::Date),
        }
    }

    /// A data column, unless a `let` of the same name hides it.
    pub fn data_column(&self, name: &str) -> Option<&'a Column> {
        match self.lets.contains_key(name) {
            true => None,
            false => self.table.column(name),
        }
    }

    /// The sample of a column over this scope's rows: straight from a
    /// numeric data column, or through the row-by-row view for anything else.
    pub fn column_sample(&self, name: &str) -> Sample {
        match self.data_column(name).and_then(|c| c.numbers()) {
            Some(numbers) => Sample::at_rows(numbers, self.rows),
            None => Sample::from_column(self.column(name).numbers()),
        }
    }

    /// A data column or `let` column, over this scope's rows.
    pub fn column(&self, name: &str) -> Rows {
        if let Some(rows) = self.lets.get(name) {
            return pick(rows, self.rows);
        }
        let Some(column) = self.table.column(name) else {
            return Rows::Numbers(vec![None; self.rows.len()]);
        };
        match column.kind {
            ColumnKind::Text => {
                Rows::Texts(self.rows.iter().map(|&r| column.text(r as usize)).collect())
            }
            ColumnKind::Date => Rows::Dates(
                self.rows
                    .iter()
                    .map(|&r| column.number(r as usize))
                    .collect(),
            ),
            ColumnKind::Bool => Rows::Truths(
                self.rows
                    .iter()
                    .map(|&r| column.truth(r as usize))
                    .collect(),
            ),
            _ => Rows::Numbers(
                self.rows
                    .iter()
                    .map(|&r| column.number(r as usize))
                    .collect(),
            ),
        }
    }

    /// Evaluates an expression over this scope's rows; a missing or impossible value becomes no value with why, never an error.
    pub fn eval(&self, e: &Expr) -> Value {
        match &e.kind {
            ExprKind::Number(x) => Value::One(One::Number(*x)),
            ExprKind::Percent(x) => Value::One(One::Number(x / 100.0)),
            ExprKind::Text(t) => Value::One(One::Text(t.clone())),
            ExprKind::Date(serial) => Value::One(One::Date(*serial)),
            ExprKind::Column(c) => Value::Rows(self.column(&c.name)),
            ExprKind::Call { function, args } => aggregate::call(self, &function.value, args),
            ExprKind::Unary { op, operand } => unary(*op, self.eval(operand)),
            ExprKind::Binary { op, left, right } => {
                binary(*op, self.eval(left), self.eval(right), self.rows.len())
            }
            ExprKind::If {
                condition,
                then,
                otherwise,
            } => {
                let n = self.rows.len();
                let (c, t, o) = (self.eval(condition), self.eval(then), self.eval(otherwise));
                if let (Value::One(c), Value::One(t), Value::One(o)) = (&c, &t, &o) {
                    return Value::One(match c {
                        One::Truth(true) => t.clone(),
                        One::Truth(false) => o.clone(),
                        One::Undefined(why) => One::Undefined(why.clone()),
                        _ => One::Undefined(Reason::NotTrueOrFalse),
                    });
                }
                let (c, t, o) = (spread(c, n), spread(t, n), spread(o, n));
                let truths = truths(&c);
                if let (Rows::Texts(_), _) | (_, Rows::Texts(_)) = (&t, &o) {
                    let values = (0..n).map(|i| match truths[i] {
                        Some(true) => t.text_at(i),
                        Some(false) => o.text_at(i),
                        None => None,
                    });
                    return Value::Rows(Rows::Texts(values.collect()));
                }
                let dates = matches!((&t, &o), (Rows::Dates(_), Rows::Dates(_)));
                let (t, o) = (t.numbers(), o.numbers());
                let values = (0..n).map(|i| match truths[i] {
                    Some(true) => t[i],
                    Some(false) => o[i],
                    None => None,
                });
                Value::Rows(if dates {
                    Rows::Dates(values.collect())
                } else {
                    Rows::Numbers(values.collect())
                })
            }
        }
    }
}

fn pick(rows: &Rows, at: &[Row]) -> Rows {
    match rows {
        Rows::Numbers(v) => Rows::Numbers(at.iter().map(|&r| v[r as usize]).collect()),
        Rows::Truths(v) => Rows::Truths(at.iter().map(|&r| v[r as usize]).collect()),
        Rows::Texts(v) => Rows::Texts(at.iter().map(|&r| v[r as usize].clone()).collect()),
        Rows::Dates(v) => Rows::Dates(at.iter().map(|&r| v[r as usize]).collect()),
    }
}

/// A single value repeated over n rows (broadcasting).
pub(super) fn spread(v: Value, n: usize) -> Rows {
    match v {
        Value::Rows(r) => r,
        Value::One(One::Number(x)) => Rows::Numbers(vec![Some(x); n]),
        Value::One(One::Truth(b)) => Rows::Truths(vec![Some(b); n]),
        Value::One(One::Text(t)) => Rows::Texts(vec![Some(t); n]),
        Value::One(One::Date(x)) => Rows::Dates(vec![Some(x); n]),
        Value::One(_) => Rows::Numbers(vec![None; n]),
    }
}

pub fn truths(rows: &Rows) -> Vec<Option<bool>> {
    match rows {
        Rows::Truths(v) => v.clone(),
        Rows::Numbers(v) => v.iter().map(|x| x.map(|x| x != 0.0)).collect(),
        Rows::Texts(v) => vec![None; v.len()],
        Rows::Dates(v) => vec![None; v.len()],
    }
}

fn unary(op: UnaryOp, v: Value) -> Value {
    match (op, v) {
        (UnaryOp::Negate, Value::One(One::Number(x))) => Value::One(One::Number(-x)),
        (UnaryOp::Not, Value::One(One::Truth(b))) => Value::One(One::Truth(!b)),
        (_, Value::One(One::Undefined(why))) => Value::One(One::Undefined(why)),
        (_, Value::One(_)) => Value::One(One::Undefined(Reason::WrongKind)),
        (UnaryOp::Negate, Value::Rows(r)) => Value::Rows(Rows::Numbers(
            r.numbers().into_iter().map(|x| x.map(|x| -x)).collect(),
        )),
        (UnaryOp::Not, Value::Rows(r)) => Value::Rows(Rows::Truths(
            truths(&r).into_iter().map(|b| b.map(|b| !b)).collect(),
        )),
    }
}

fn arithmetic(op: BinaryOp, a: f64, b: f64) -> f64 {
    match op {
        BinaryOp::Add => a + b,
        BinaryOp::Subtract => a - b,
        BinaryOp::Multiply => a * b,
        BinaryOp::Divide => a / b,
        BinaryOp::Power => a.powf(b),
        _ => f64::NAN,
    }
}

fn compare(op: BinaryOp, a: f64, b: f64) -> bool {
    match op {
        BinaryOp::Less => a < b,
        BinaryOp::LessEqual => a <= b,
        BinaryOp::Greater => a > b,
        BinaryOp::GreaterEqual => a >= b,
        BinaryOp::Equal => a == b,
        _ => a != b,
    }
}

/// What an operator gives when a date takes part: days between two dates,
/// a date moved by a number of days, or a comparison of the serials.
/// None when no date takes part.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum DateResult {
    Date,
    Days,
    Truth,
    Meaningless,
}

fn date_result(op: BinaryOp, a_date: bool, b_date: bool) -> Option<DateResult> {
    if !a_date && !b_date {
        return None;
    }
    Some(match op {
        _ if op.is_comparison() && a_date && b_date => DateResult::Truth,
        BinaryOp::Subtract if a_date && b_date => DateResult::Days,
        BinaryOp::Subtract if a_date => DateResult::Date,
        BinaryOp::Add if !(a_date && b_date) => DateResult::Date,
        _ => DateResult::Meaningless,
    })
}

fn one_binary(op: BinaryOp, a: &One, b: &One) -> One {
    let date_of = |v: &One| match v {
        One::Date(x) => Some(*x),
        _ => None,
    };
    let number_of = |v: &One| match v {
        One::Number(x) | One::Date(x) => Some(*x),
        _ => None,
    };
    let (a_date, b_date) = (date_of(a).is_some(), date_of(b).is_some());
    if let Some(kind) = date_result(op, a_date, b_date) {
        if let (One::Undefined(why), _) | (_, One::Undefined(why)) = (a, b) {
            return One::Undefined(why.clone());
        }
        let (Some(x), Some(y)) = (number_of(a), number_of(b)) else {
            return One::Undefined(Reason::CannotCombine(op));
        };
        return match kind {
            DateResult::Truth => One::Truth(compare(op, x, y)),
            DateResult::Days => One::number(x - y),
            DateResult::Date => match One::number(arithmetic(op, x, y)) {
                One::Number(d) => One::Date(d),
                other => other,
            },
            DateResult::Meaningless => One::Undefined(Reason::CannotCombine(op)),
        };
    }
    match (op, a, b) {
        // Kleene logic, as for rows: a missing side decides nothing when
        // the other side already does (false and ?, true or ?).
        (BinaryOp::And, One::Truth(false), _) | (BinaryOp::And, _, One::Truth(false)) => {
            return One::Truth(false);
        }
        (BinaryOp::Or, One::Truth(true), _) | (BinaryOp::Or, _, One::Truth(true)) => {
            return One::Truth(true);
        }
        _ => {}
    }
    match (a, b) {
        (One::Undefined(why), _) | (_, One::Undefined(why)) => One::Undefined(why.clone()),
        (One::Number(x), One::Number(y)) if op.is_comparison() => One::Truth(compare(op, *x, *y)),
        (One::Number(x), One::Number(y)) if !op.is_logical() => One::number(arithmetic(op, *x, *y)),
        (One::Truth(x), One::Truth(y)) if op == BinaryOp::And => One::Truth(*x && *y),
        (One::Truth(x), One::Truth(y)) if op == BinaryOp::Or => One::Truth(*x || *y),
        (One::Truth(x), One::Truth(y)) if op == BinaryOp::Equal => One::Truth(x == y),
        (One::Truth(x), One::Truth(y)) if op == BinaryOp::NotEqual => One::Truth(x != y),
        (One::Text(x), One::Text(y)) if op == BinaryOp::Equal => One::Truth(x == y),
        (One::Text(x), One::Text(y)) if op == BinaryOp::NotEqual => One::Truth(x != y),
        _ => One::Undefined(Reason::CannotCombine(op)),
    }
}

fn binary(op: BinaryOp, a: Value, b: Value, n: usize) -> Value {
    if let (Value::One(x), Value::One(y)) = (&a, &b) {
        return Value::One(one_binary(op, x, y));
    }
    let (a, b) = (spread(a, n), spread(b, n));
    if op.is_logical() {
        let (x, y) = (truths(&a), truths(&b));
        let combined = x.iter().zip(&y).map(|(p, q)| match (op, p, q) {
            // Kleene logic: false and missing is false; true or missing is true.
            (BinaryOp::And, Some(false), _) | (BinaryOp::And, _, Some(false)) => Some(false),
            (BinaryOp::Or, Some(true), _) | (BinaryOp::Or, _, Some(true)) => Some(true),
            (_, Some(p), Some(q)) => Some(if op == BinaryOp::And {
                *p && *q
            } else {
                *p || *q
            }),
            _ => None,
        });
        return Value::Rows(Rows::Truths(combined.collect()));
    }
    if matches!(op, BinaryOp::Equal | BinaryOp::NotEqual)
        && (matches!(a, Rows::Texts(_)) || matches!(b, Rows::Texts(_)))
    {
        let equal = (0..n).map(|i| match (a.text_at(i), b.text_at(i)) {
            (Some(x), Some(y)) => Some((x == y) == (op == BinaryOp::Equal)),
            _ => None,
        });
        return Value::Rows(Rows::Truths(equal.collect()));
    }
    let dates = date_result(op, matches!(a, Rows::Dates(_)), matches!(b, Rows::Dates(_)));
    if dates == Some(DateResult::Meaningless) {
        return Value::Rows(Rows::Numbers(vec![None; n]));
    }
    let (x, y) = (a.numbers(), b.numbers());
    let pairs = x.iter().zip(&y);
    if op.is_comparison() {
        return Value::Rows(Rows::Truths(
            pairs
                .map(|(p, q)| Some(compare(op, (*p)?, (*q)?)))
                .collect(),
        ));
    }
    let values = pairs.map(|(p, q)| Some(arithmetic(op, (*p)?, (*q)?)).filter(|r| r.is_finite()));
    Value::Rows(match dates {
        Some(DateResult::Date) => Rows::Dates(values.collect()),
        _ => Rows::Numbers(values.collect()),
    })
}
