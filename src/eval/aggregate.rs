//! Function calls: the table in `recipe::functions` names them; this maps
//! each to the statistics core (aggregates) or to a row-by-row operation.

use crate::recipe::ast::{Expr, ExprKind};
use crate::recipe::functions::{self, FunctionKind};
use crate::stats::{self, Denominator, QuantileMethod, Stat};

use super::value::{One, Rows, Scope, Value, truths};

pub fn from_stat(stat: Stat) -> One {
    match stat {
        Ok(x) => One::number(x),
        Err(why) => One::Undefined(why.to_string()),
    }
}

/// The option word among the arguments, if any.
fn option<'e>(name: &str, args: &'e [Expr]) -> Option<&'e str> {
    let allowed = functions::lookup(name)?.options;
    args.iter().skip(1).find_map(|a| match &a.kind {
        ExprKind::Column(c) if !c.braced && allowed.contains(&c.name.as_str()) => {
            Some(c.name.as_str())
        }
        _ => None,
    })
}

/// The numeric parameters (arguments after the first that are not option words).
fn parameters(scope: &Scope, name: &str, args: &[Expr]) -> Result<Vec<f64>, String> {
    let allowed = functions::lookup(name).map_or(&[][..], |f| f.options);
    let mut found = Vec::new();
    for a in args.iter().skip(1) {
        if matches!(&a.kind, ExprKind::Column(c) if !c.braced && allowed.contains(&c.name.as_str()))
        {
            continue;
        }
        match scope.eval(a) {
            Value::One(One::Number(x)) => found.push(x),
            Value::One(One::Undefined(why)) => return Err(why),
            _ => return Err(format!("an argument of `{name}` is not one number")),
        }
    }
    Ok(found)
}

fn method(word: Option<&str>) -> QuantileMethod {
    word.and_then(QuantileMethod::from_word).unwrap_or_default()
}

pub fn call(scope: &Scope, name: &str, args: &[Expr]) -> Value {
    let Some(function) = functions::lookup(name) else {
        return Value::One(One::Undefined(format!("unknown function `{name}`")));
    };
    let params = match parameters(scope, name, args) {
        Ok(p) => p,
        Err(why) => return Value::One(One::Undefined(why)),
    };
    match function.kind {
        FunctionKind::Row => row_function(scope, name, &args[0], &params),
        FunctionKind::Comparison => Value::One(change(scope, &args[0])),
        FunctionKind::Aggregate => Value::One(aggregate(scope, name, args, &params)),
    }
}

/// |now - before| / |before| for one value per group.
fn change(scope: &Scope, arg: &Expr) -> One {
    let now = match scope.eval(arg) {
        Value::One(One::Number(x)) => x,
        Value::One(One::Undefined(why)) => return One::Undefined(why),
        _ => return One::Undefined("`change` needs one number per group".into()),
    };
    match scope.compare(crate::recipe::pretty::expr(arg), now) {
        Ok(0.0) => One::Undefined("the previous value is zero".into()),
        Ok(before) => One::number((now - before).abs() / before.abs()),
        Err(why) => One::Undefined(why),
    }
}

fn row_function(scope: &Scope, name: &str, arg: &Expr, params: &[f64]) -> Value {
    let digits = params.first().copied().unwrap_or(0.0);
    let f = |x: f64| -> f64 {
        match name {
            "abs" => x.abs(),
            "ln" => x.ln(),
            "log10" => x.log10(),
            "exp" => x.exp(),
            "sqrt" => x.sqrt(),
            "floor" => x.floor(),
            "ceil" => x.ceil(),
            "round" => {
                let scale = 10f64.powi(digits as i32);
                (x * scale).round() / scale
            }
            _ => f64::NAN,
        }
    };
    match scope.eval(arg) {
        Value::One(One::Number(x)) => Value::One(One::number(f(x))),
        Value::One(One::Undefined(why)) => Value::One(One::Undefined(why)),
        Value::One(_) => Value::One(One::Undefined(format!("`{name}` needs a number"))),
        Value::Rows(rows) => {
            let values = rows
                .numbers()
                .into_iter()
                .map(|x| x.map(f).filter(|y| y.is_finite()));
            Value::Rows(Rows::Numbers(values.collect()))
        }
    }
}

fn aggregate(scope: &Scope, name: &str, args: &[Expr], params: &[f64]) -> One {
    if name == "share" {
        let Value::Rows(rows) = scope.eval(&args[0]) else {
            return One::Undefined("`share` needs a condition per row".into());
        };
        let defined: Vec<bool> = truths(&rows).into_iter().flatten().collect();
        if defined.is_empty() {
            return One::Undefined("no values".into());
        }
        return One::number(defined.iter().filter(|b| **b).count() as f64 / defined.len() as f64);
    }
    let s = scope.sample(&args[0]);
    let word = option(name, args);
    let m = method(word);
    let k = params.first().copied();
    let list = |v: Stat<Vec<f64>>| v.map_or_else(|e| One::Undefined(e.to_string()), One::List);
    let denominator = if word == Some("population") {
        Denominator::Population
    } else {
        Denominator::Sample
    };
    let adjusted = word == Some("adjusted");
    match name {
        "count" => One::Number(s.count() as f64),
        "missing" => One::Number(s.missing() as f64),
        "sum" if s.is_empty() => One::Undefined("no values".into()),
        "sum" => One::number(s.sum()),
        "min" => from_stat(s.min()),
        "max" => from_stat(s.max()),
        "range" => from_stat(s.range()),
        "mean" => from_stat(s.mean()),
        "median" => from_stat(stats::median(&s)),
        "modes" => list(stats::modes(&s)),
        "binned_mode" => list(stats::binned_mode(&s, k.unwrap_or(10.0) as usize)),
        "variance" => from_stat(s.variance(denominator)),
        "sd" => from_stat(s.sd(denominator)),
        "quartile" => from_stat(stats::quartile(&s, k.unwrap_or(2.0) as u8, m)),
        "percentile" => from_stat(stats::quantile_sorted(
            s.sorted(),
            k.unwrap_or(50.0) / 100.0,
            m,
        )),
        "iqr" => from_stat(stats::iqr(&s, m)),
        "skewness" => from_stat(s.skewness(adjusted)),
        "kurtosis" => from_stat(s.kurtosis(adjusted)),
        "excess_kurtosis" => from_stat(s.excess_kurtosis(adjusted)),
        "bowley" => from_stat(stats::bowley(&s, m)),
        "mad" => from_stat(stats::mad(&s, word == Some("scaled"))),
        "trimmed_mean" => from_stat(stats::trimmed_mean(&s, k.unwrap_or(0.0))),
        "winsorized_mean" => from_stat(stats::winsorized_mean(&s, k.unwrap_or(0.0))),
        "outliers" => from_stat(stats::outliers(&s, k.unwrap_or(1.5), m).map(|o| o.count() as f64)),
        "fence_low" => from_stat(stats::fences(&s, k.unwrap_or(1.5), m).map(|f| f.low)),
        "fence_high" => from_stat(stats::fences(&s, k.unwrap_or(1.5), m).map(|f| f.high)),
        other => One::Undefined(format!("`{other}` is not an aggregate")),
    }
}
