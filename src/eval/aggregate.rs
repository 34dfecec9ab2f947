//! Function calls: the table in `recipe::functions` names each function's
//! [`Evaluation`]; this maps every one (the matches list them all) to the
//! statistics core or to a row-by-row operation.

use crate::recipe::ast::{Expr, ExprKind};
use crate::recipe::functions::{self, Aggregate, DatePart, Evaluation, Function, OnDates, RowOp};
use crate::stats::{self, Denominator, QuantileMethod, Stat};

use super::Reason;
use super::value::{One, Rows, Scope, Value, truths};

pub fn from_stat(stat: Stat) -> One {
    match stat {
        Ok(x) => One::number(x),
        Err(why) => One::Undefined(why.into()),
    }
}

/// An argument that is one of the function's option words.
fn option_word<'e>(function: &Function, arg: &'e Expr) -> Option<&'e str> {
    match &arg.kind {
        ExprKind::Column(c) if !c.braced && function.options.contains(&c.name.as_str()) => {
            Some(c.name.as_str())
        }
        _ => None,
    }
}

/// The option word among the arguments, if any.
fn option<'e>(function: &Function, args: &'e [Expr]) -> Option<&'e str> {
    args.iter().skip(1).find_map(|a| option_word(function, a))
}

/// The numeric parameters (arguments after the first that are not option
/// words), each within its range: one computed in the recipe is checked
/// here, as the checker checks one written there, so `quartile(x, n)`
/// with n = 4 says why instead of giving the maximum.
fn parameters(scope: &Scope, function: &Function, args: &[Expr]) -> Result<Vec<f64>, Reason> {
    let mut found = Vec::new();
    let values = args
        .iter()
        .skip(1)
        .filter(|a| option_word(function, a).is_none());
    for (a, parameter) in values.zip(function.parameters) {
        match scope.eval(a) {
            Value::One(One::Number(x)) if !parameter.allows(x) => {
                return Err(Reason::OutOfRange {
                    function: function.name,
                    parameter,
                    value: x,
                });
            }
            Value::One(One::Number(x)) => found.push(x),
            Value::One(One::Undefined(why)) => return Err(why),
            _ => return Err(Reason::ArgumentNotOneNumber(function.name)),
        }
    }
    Ok(found)
}

fn method(word: Option<&str>) -> QuantileMethod {
    word.and_then(QuantileMethod::from_word).unwrap_or_default()
}

pub fn call(scope: &Scope, name: &str, args: &[Expr]) -> Value {
    let Some(function) = functions::lookup(name) else {
        return Value::One(One::Undefined(Reason::UnknownFunction(name.to_string())));
    };
    let params = match parameters(scope, function, args) {
        Ok(p) => p,
        Err(why) => return Value::One(One::Undefined(why)),
    };
    match function.evaluation {
        Evaluation::Row(op) => row_function(scope, function, op, &args[0], &params),
        Evaluation::Change => Value::One(change(scope, &args[0])),
        Evaluation::Share => Value::One(share(scope, &args[0])),
        Evaluation::DatePart(part) => date_part(scope, function, part, &args[0]),
        Evaluation::Aggregate(a) => {
            let value = aggregate(scope, function, a, args, &params);
            Value::One(match value {
                One::Number(x)
                    if function.on_dates() == OnDates::Date && scope.holds_dates(&args[0]) =>
                {
                    One::Date(x)
                }
                other => other,
            })
        }
    }
}

/// The month, ISO week, year or weekday of each date.
fn date_part(scope: &Scope, function: &Function, part: DatePart, arg: &Expr) -> Value {
    let of = |serial: f64| -> One {
        match part {
            DatePart::Month => One::Text(crate::format::month_label(serial)),
            DatePart::Week => One::Text(crate::format::week_label(serial)),
            DatePart::Year => One::Number(crate::format::calendar(serial).0 as f64),
            DatePart::Weekday => One::Text(crate::format::weekday_name(serial).to_string()),
        }
    };
    match scope.eval(arg) {
        Value::One(One::Date(x)) => Value::One(of(x)),
        Value::One(One::Undefined(why)) => Value::One(One::Undefined(why)),
        Value::One(_) => Value::One(One::Undefined(Reason::NeedsDate(function.name))),
        Value::Rows(Rows::Dates(dates)) => {
            let parts = dates.into_iter().map(|d| d.map(of));
            Value::Rows(match part {
                DatePart::Year => Rows::Numbers(
                    parts
                        .map(|p| match p {
                            Some(One::Number(y)) => Some(y),
                            _ => None,
                        })
                        .collect(),
                ),
                _ => Rows::Texts(
                    parts
                        .map(|p| match p {
                            Some(One::Text(t)) => Some(t),
                            _ => None,
                        })
                        .collect(),
                ),
            })
        }
        // Not dates: every row is missing, as for text given to `ln`.
        Value::Rows(rows) => Value::Rows(Rows::Numbers(vec![None; rows.len()])),
    }
}

/// |now - before| / |before| for one value per group.
fn change(scope: &Scope, arg: &Expr) -> One {
    let now = match scope.eval(arg) {
        Value::One(One::Number(x)) => x,
        Value::One(One::Undefined(why)) => return One::Undefined(why),
        _ => return One::Undefined(Reason::ChangeNeedsOneNumber),
    };
    match scope.compare(crate::recipe::pretty::expr(arg), now) {
        Ok(0.0) => One::Undefined(Reason::PreviousIsZero),
        Ok(before) => One::number((now - before).abs() / before.abs()),
        Err(why) => One::Undefined(why),
    }
}

fn row_function(
    scope: &Scope,
    function: &Function,
    op: RowOp,
    arg: &Expr,
    params: &[f64],
) -> Value {
    let digits = params.first().copied().unwrap_or(0.0);
    let f = |x: f64| -> f64 {
        match op {
            RowOp::Abs => x.abs(),
            RowOp::Ln => x.ln(),
            RowOp::Log10 => x.log10(),
            RowOp::Exp => x.exp(),
            RowOp::Sqrt => x.sqrt(),
            RowOp::Floor => x.floor(),
            RowOp::Ceil => x.ceil(),
            RowOp::Round => {
                let scale = 10f64.powi(digits as i32);
                (x * scale).round() / scale
            }
        }
    };
    match scope.eval(arg) {
        Value::One(One::Number(x)) => Value::One(One::number(f(x))),
        Value::One(One::Undefined(why)) => Value::One(One::Undefined(why)),
        Value::One(_) => Value::One(One::Undefined(Reason::NeedsNumber(function.name))),
        Value::Rows(rows) => {
            let values = rows
                .numbers()
                .into_iter()
                .map(|x| x.map(f).filter(|y| y.is_finite()));
            Value::Rows(Rows::Numbers(values.collect()))
        }
    }
}

/// The share of rows where the condition holds, among those where it is known.
fn share(scope: &Scope, condition: &Expr) -> One {
    let Value::Rows(rows) = scope.eval(condition) else {
        return One::Undefined(Reason::ShareNeedsRows);
    };
    let defined: Vec<bool> = truths(&rows).into_iter().flatten().collect();
    if defined.is_empty() {
        return One::Undefined(Reason::NO_VALUES);
    }
    One::number(defined.iter().filter(|b| **b).count() as f64 / defined.len() as f64)
}

fn aggregate(
    scope: &Scope,
    function: &Function,
    a: Aggregate,
    args: &[Expr],
    params: &[f64],
) -> One {
    let s = scope.sample(&args[0]);
    let word = option(function, args);
    let m = method(word);
    let k = params.first().copied();
    let list = |v: Stat<Vec<f64>>| v.map_or_else(|e| One::Undefined(e.into()), One::List);
    let denominator = if word == Some(functions::POPULATION) {
        Denominator::Population
    } else {
        Denominator::Sample
    };
    let adjusted = word == Some(functions::ADJUSTED);
    match a {
        Aggregate::Count => One::Number(s.count() as f64),
        Aggregate::Missing => One::Number(s.missing() as f64),
        Aggregate::Sum if s.is_empty() => One::Undefined(Reason::NO_VALUES),
        Aggregate::Sum => One::number(s.sum()),
        Aggregate::Min => from_stat(s.min()),
        Aggregate::Max => from_stat(s.max()),
        Aggregate::Range => from_stat(s.range()),
        Aggregate::Mean => from_stat(s.mean()),
        Aggregate::Median => from_stat(stats::median(&s)),
        Aggregate::Modes => list(stats::modes(&s)),
        Aggregate::BinnedMode => list(stats::binned_mode(&s, k.unwrap_or(10.0) as usize)),
        Aggregate::Variance => from_stat(s.variance(denominator)),
        Aggregate::Sd => from_stat(s.sd(denominator)),
        Aggregate::Quartile => from_stat(stats::quartile(&s, k.unwrap_or(2.0) as u8, m)),
        Aggregate::Percentile => from_stat(stats::quantile_sorted(
            s.sorted(),
            k.unwrap_or(50.0) / 100.0,
            m,
        )),
        Aggregate::Iqr => from_stat(stats::iqr(&s, m)),
        Aggregate::Skewness => from_stat(s.skewness(adjusted)),
        Aggregate::Kurtosis => from_stat(s.kurtosis(adjusted)),
        Aggregate::ExcessKurtosis => from_stat(s.excess_kurtosis(adjusted)),
        Aggregate::Bowley => from_stat(stats::bowley(&s, m)),
        Aggregate::Mad => from_stat(stats::mad(&s, word == Some(functions::SCALED))),
        Aggregate::TrimmedMean => from_stat(stats::trimmed_mean(&s, k.unwrap_or(0.0))),
        Aggregate::WinsorizedMean => from_stat(stats::winsorized_mean(&s, k.unwrap_or(0.0))),
        Aggregate::Outliers => {
            from_stat(stats::outliers(&s, k.unwrap_or(1.5), m).map(|o| o.count() as f64))
        }
        Aggregate::FenceLow => from_stat(stats::fences(&s, k.unwrap_or(1.5), m).map(|f| f.low)),
        Aggregate::FenceHigh => from_stat(stats::fences(&s, k.unwrap_or(1.5), m).map(|f| f.high)),
    }
}
