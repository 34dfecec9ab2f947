//! The standard errors of the figures that have one, computed beside their
//! values so each period's Record can keep them: the Changes sheet then
//! judges a change against sqrt(se_before^2 + se_after^2). Which figure
//! gets which standard error is `stats::standard_error`'s table.

use crate::recipe::ast::{Expr, ExprKind};
use crate::recipe::functions::{self, Aggregate, Evaluation};
use crate::stats::{self, Sample};

use super::value::{One, Scope, Value, truths};

/// The panel figures that have a standard error, by their stable key (see
/// `PANEL_FIGURES`).
pub fn panel_standard_errors(s: &Sample) -> Vec<(&'static str, f64)> {
    [
        ("mean", stats::mean_se(s)),
        ("sd", stats::sd_se(s)),
        ("q1", stats::quantile_se(s, 0.25)),
        ("median", stats::quantile_se(s, 0.5)),
        ("q3", stats::quantile_se(s, 0.75)),
    ]
    .into_iter()
    .filter_map(|(label, se)| se.ok().map(|se| (label, se)))
    .collect()
}

/// The standard error of a figure that is one call of `share`, `mean`,
/// `sd` (sample), `median`, `quartile`, `percentile` or `trimmed_mean`;
/// None for any other expression (a ratio of two figures, `sd(x) / iqr(x)`,
/// is judged by the drift alone).
pub fn figure_standard_error(scope: &Scope, figure: &Expr) -> Option<f64> {
    let ExprKind::Call { function, args } = &figure.kind else {
        return None;
    };
    let f = functions::lookup(&function.value)?;
    let number = |i: usize| match args.get(i).map(|a| scope.eval(a)) {
        Some(Value::One(One::Number(x))) => Some(x),
        _ => None,
    };
    let se = match f.evaluation {
        Evaluation::Share => {
            let Value::Rows(rows) = scope.eval(args.first()?) else {
                return None;
            };
            let known: Vec<bool> = truths(&rows).into_iter().flatten().collect();
            let p = known.iter().filter(|b| **b).count() as f64 / known.len().max(1) as f64;
            stats::share_se(p, known.len())
        }
        Evaluation::Aggregate(a) => {
            let s = scope.sample(args.first()?);
            // `sd(x, population)` has an option word as its second argument.
            let only_column = args.len() == 1;
            match a {
                Aggregate::Mean => stats::mean_se(&s),
                Aggregate::Sd if only_column => stats::sd_se(&s),
                Aggregate::Median => stats::quantile_se(&s, 0.5),
                Aggregate::Quartile => stats::quantile_se(&s, number(1)? / 4.0),
                Aggregate::Percentile => stats::quantile_se(&s, number(1)? / 100.0),
                Aggregate::TrimmedMean => stats::trimmed_mean_se(&s, number(1)?),
                _ => return None,
            }
        }
        Evaluation::Row(_) | Evaluation::Change | Evaluation::DatePart(_) => return None,
    };
    se.ok()
}
