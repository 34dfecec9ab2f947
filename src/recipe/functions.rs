//! The functions a recipe may call: their evaluation, arguments and
//! options. The checker and the evaluator both read this one table; each
//! row names its evaluation through [`Evaluation`], which the evaluator
//! matches exhaustively, so a function cannot be added to the table without
//! its evaluation, nor an evaluation without the compiler asking for it.

/// What a function does with its first argument.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FunctionKind {
    /// Reduces a column to one number (or, for modes, a list).
    Aggregate,
    /// Works row by row; a number in gives a number out.
    Row,
    /// Compares one value with the same value in the previous period.
    Comparison,
}

/// How a function is evaluated: the one link between a row of
/// [`FUNCTIONS`] and the code that computes it (`eval::aggregate`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Evaluation {
    /// Reduces a column to one value per group.
    Aggregate(Aggregate),
    /// The share of rows where a condition holds (`share`): an aggregate of
    /// a condition rather than of numbers.
    Share,
    /// Row by row, a number to a number.
    Row(RowOp),
    /// |now - before| / |before| against the previous period (`change`).
    Change,
    /// Row by row, a date to a part of its calendar day.
    DatePart(DatePart),
}

/// The parts of a date the row functions give.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DatePart {
    /// Text `2026-10`.
    Month,
    /// Text `2026-W44`, by ISO 8601 week numbering.
    Week,
    /// The number 2026.
    Year,
    /// The English day name, `Saturday`.
    Weekday,
}

/// What a function gives when its argument holds dates.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OnDates {
    /// A date: the figure is one of the dates, or lies between them.
    Date,
    /// A number of days (a spread or a difference of dates).
    Days,
    /// A count of cells, as for numbers.
    Count,
    /// Meaningless for dates (a sum of dates); the checker refuses it.
    Refused,
    /// Made for dates (the date parts).
    Made,
}

/// The aggregates, each mapped to the statistics core by the evaluator.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Aggregate {
    /// `count`: the number of numeric values.
    Count,
    /// `missing`: the number of missing or non-numeric cells.
    Missing,
    /// `sum`: the sum of the values.
    Sum,
    /// `min`: the smallest value.
    Min,
    /// `max`: the largest value.
    Max,
    /// `range`: max - min.
    Range,
    /// `mean`: the arithmetic mean.
    Mean,
    /// `median`: the middle value (the mean of the two middle ones for even n).
    Median,
    /// `modes`: every most frequent value.
    Modes,
    /// `binned_mode`: the mean of the values in the fullest of k equal bins.
    BinnedMode,
    /// `variance`: the sample variance, or with `population` divided by n.
    Variance,
    /// `sd`: the sample standard deviation, or with `population` divided by n.
    Sd,
    /// `quartile`: quartile 1, 2 or 3.
    Quartile,
    /// `percentile`: the p-th percentile, p from 0 to 100.
    Percentile,
    /// `iqr`: Q3 - Q1.
    Iqr,
    /// `skewness`: moment skewness g1, or G1 with `adjusted`.
    Skewness,
    /// `kurtosis`: moment kurtosis b2, or G2 + 3 with `adjusted`.
    Kurtosis,
    /// `excess_kurtosis`: b2 - 3, or G2 with `adjusted`.
    ExcessKurtosis,
    /// `bowley`: Bowley's quartile skewness.
    Bowley,
    /// `mad`: the median absolute deviation, times 1.4826 with `scaled`.
    Mad,
    /// `trimmed_mean`: the mean after cutting a share from each end.
    TrimmedMean,
    /// `winsorized_mean`: the mean after clamping a share at each end.
    WinsorizedMean,
    /// `outliers`: the number of values beyond Tukey's fences.
    Outliers,
    /// `fence_low`: Q1 - k IQR.
    FenceLow,
    /// `fence_high`: Q3 + k IQR.
    FenceHigh,
}

/// The row functions.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RowOp {
    /// `abs`: the absolute value.
    Abs,
    /// `ln`: the natural logarithm.
    Ln,
    /// `log10`: the base-10 logarithm.
    Log10,
    /// `exp`: e to the power of the value.
    Exp,
    /// `sqrt`: the square root.
    Sqrt,
    /// `round`: rounded to d decimals.
    Round,
    /// `floor`: the largest whole number not above.
    Floor,
    /// `ceil`: the smallest whole number not below.
    Ceil,
}

/// What an aggregate gives back.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Returns {
    /// One number.
    Number,
    /// Several numbers (all tied modes); may only stand alone as a figure.
    List,
}

/// A numeric argument after the column, with the range it must fall in.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Parameter {
    /// The parameter's name, as the help shows it (`p`, `k`).
    pub name: &'static str,
    /// The smallest value allowed.
    pub min: f64,
    /// The largest value allowed (see `max_exclusive`).
    pub max: f64,
    /// `max` itself is excluded (as for a trimmed share below 50%).
    pub max_exclusive: bool,
    /// Only whole numbers are allowed.
    pub whole: bool,
    /// It must be given (else it has a default).
    pub required: bool,
    /// Given in percent (0 to 100): a `%` is refused, and a value between
    /// 0 and 1 is warned about (a fraction where a percent was meant).
    pub percent: bool,
    /// What to write instead when the value is out of range ("" if nothing).
    pub help: &'static str,
}

impl Parameter {
    /// Whether a value lies in the parameter's range (and is whole when it
    /// must be). The checker asks this of a number written in the recipe,
    /// the evaluator of one computed there (`quartile(x, count(y))`).
    pub fn allows(&self, value: f64) -> bool {
        let too_high = if self.max_exclusive {
            value >= self.max
        } else {
            value > self.max
        };
        value >= self.min && !too_high && (!self.whole || value.fract() == 0.0)
    }

    /// The range in words, after "must be".
    pub fn range_words(&self) -> String {
        match (self.whole, self.max_exclusive) {
            (true, _) => format!("a whole number from {} to {}", self.min, self.max),
            (false, true) => format!(
                "at least {} and below {}% (a share such as 10%)",
                self.min,
                self.max * 100.0
            ),
            (false, false) if self.max.is_infinite() => format!("{} or more", self.min),
            (false, false) => format!("from {} to {}", self.min, self.max),
        }
    }
}

/// One row of the function table.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Function {
    /// The name recipes call it by.
    pub name: &'static str,
    /// How it is computed; its kind, result and first argument follow.
    pub evaluation: Evaluation,
    /// The numeric arguments after the column, in order.
    pub parameters: &'static [Parameter],
    /// Bare words accepted after the column.
    pub options: &'static [&'static str],
    /// What it computes, in a few words, for help and error messages.
    pub summary: &'static str,
}

/// Option words the evaluator reads (the quantile methods are read by
/// `QuantileMethod::from_word`).
pub const POPULATION: &str = "population";
/// The option of the shape functions that gives the adjusted (sample) estimates G1 and G2.
pub const ADJUSTED: &str = "adjusted";
/// The option of `mad` that multiplies by 1.4826, to estimate a normal sd.
pub const SCALED: &str = "scaled";

const METHODS: &[&str] = &[
    "hf1", "hf2", "hf3", "hf4", "hf5", "hf6", "hf7", "hf8", "hf9", "hinges",
];

const fn param(name: &'static str, min: f64, max: f64, whole: bool, required: bool) -> Parameter {
    Parameter {
        name,
        min,
        max,
        max_exclusive: false,
        whole,
        required,
        percent: false,
        help: "",
    }
}

const fn function(name: &'static str, evaluation: Evaluation, summary: &'static str) -> Function {
    Function {
        name,
        evaluation,
        parameters: &[],
        options: &[],
        summary,
    }
}

const fn aggregate(name: &'static str, a: Aggregate, summary: &'static str) -> Function {
    function(name, Evaluation::Aggregate(a), summary)
}

const fn row(name: &'static str, op: RowOp, summary: &'static str) -> Function {
    function(name, Evaluation::Row(op), summary)
}

const SHARE_CUT: Parameter = Parameter {
    name: "a",
    min: 0.0,
    max: 0.5,
    max_exclusive: true,
    whole: false,
    required: true,
    percent: false,
    help: "",
};
const FENCE_K: Parameter = param("k", 0.0, f64::INFINITY, false, false);

/// Every function a recipe may call: the one table the checker, the evaluator, the help and the grammar test read.
pub const FUNCTIONS: &[Function] = &[
    aggregate(
        "count",
        Aggregate::Count,
        "number of non-missing numeric values",
    ),
    aggregate(
        "missing",
        Aggregate::Missing,
        "number of missing or non-numeric cells",
    ),
    aggregate("sum", Aggregate::Sum, "sum of the values"),
    aggregate("min", Aggregate::Min, "smallest value"),
    aggregate("max", Aggregate::Max, "largest value"),
    aggregate("range", Aggregate::Range, "max - min"),
    aggregate("mean", Aggregate::Mean, "arithmetic mean"),
    aggregate(
        "median",
        Aggregate::Median,
        "middle value; mean of the two middle values for even n",
    ),
    aggregate(
        "modes",
        Aggregate::Modes,
        "every most frequent value, ascending",
    ),
    Function {
        parameters: &[param("k", 1.0, 1000.0, true, true)],
        ..aggregate(
            "binned_mode",
            Aggregate::BinnedMode,
            "mean of the values in the fullest of k equal bins",
        )
    },
    Function {
        options: &[POPULATION],
        ..aggregate(
            "variance",
            Aggregate::Variance,
            "sample variance (n - 1); `population` divides by n",
        )
    },
    Function {
        options: &[POPULATION],
        ..aggregate(
            "sd",
            Aggregate::Sd,
            "sample standard deviation; `population` divides by n",
        )
    },
    Function {
        parameters: &[Parameter {
            help: "quartile 0 would be the smallest value and 4 the largest: write min(x) or max(x)",
            ..param("q", 1.0, 3.0, true, true)
        }],
        options: METHODS,
        ..aggregate("quartile", Aggregate::Quartile, "quartile 1, 2 or 3")
    },
    Function {
        parameters: &[Parameter {
            percent: true,
            ..param("p", 0.0, 100.0, false, true)
        }],
        options: METHODS,
        ..aggregate(
            "percentile",
            Aggregate::Percentile,
            "p-th percentile, p from 0 to 100",
        )
    },
    Function {
        options: METHODS,
        ..aggregate("iqr", Aggregate::Iqr, "Q3 - Q1")
    },
    Function {
        options: &[ADJUSTED],
        ..aggregate(
            "skewness",
            Aggregate::Skewness,
            "moment skewness g1; `adjusted` gives G1",
        )
    },
    Function {
        options: &[ADJUSTED],
        ..aggregate(
            "kurtosis",
            Aggregate::Kurtosis,
            "moment kurtosis b2; `adjusted` gives G2 + 3",
        )
    },
    Function {
        options: &[ADJUSTED],
        ..aggregate(
            "excess_kurtosis",
            Aggregate::ExcessKurtosis,
            "b2 - 3; `adjusted` gives G2",
        )
    },
    Function {
        options: METHODS,
        ..aggregate("bowley", Aggregate::Bowley, "Bowley's quartile skewness")
    },
    Function {
        options: &[SCALED],
        ..aggregate(
            "mad",
            Aggregate::Mad,
            "median absolute deviation; `scaled` multiplies by 1.4826",
        )
    },
    Function {
        parameters: &[SHARE_CUT],
        ..aggregate(
            "trimmed_mean",
            Aggregate::TrimmedMean,
            "mean after cutting share a from each end",
        )
    },
    Function {
        parameters: &[SHARE_CUT],
        ..aggregate(
            "winsorized_mean",
            Aggregate::WinsorizedMean,
            "mean after clamping share a at each end",
        )
    },
    function(
        "share",
        Evaluation::Share,
        "fraction of rows where the condition holds",
    ),
    Function {
        parameters: &[FENCE_K],
        options: METHODS,
        ..aggregate(
            "outliers",
            Aggregate::Outliers,
            "number of values beyond Tukey's fences (k = 1.5)",
        )
    },
    Function {
        parameters: &[FENCE_K],
        options: METHODS,
        ..aggregate("fence_low", Aggregate::FenceLow, "Q1 - k IQR")
    },
    Function {
        parameters: &[FENCE_K],
        options: METHODS,
        ..aggregate("fence_high", Aggregate::FenceHigh, "Q3 + k IQR")
    },
    function(
        "change",
        Evaluation::Change,
        "size of the relative change from the previous period: |now - before| / |before|",
    ),
    row("abs", RowOp::Abs, "absolute value"),
    row("ln", RowOp::Ln, "natural logarithm"),
    row("log10", RowOp::Log10, "base-10 logarithm"),
    row("exp", RowOp::Exp, "e to the power"),
    row("sqrt", RowOp::Sqrt, "square root"),
    Function {
        parameters: &[param("d", -15.0, 15.0, true, true)],
        ..row("round", RowOp::Round, "round to d decimals")
    },
    row("floor", RowOp::Floor, "largest whole number not above"),
    row("ceil", RowOp::Ceil, "smallest whole number not below"),
    function(
        "month_of",
        Evaluation::DatePart(DatePart::Month),
        "a date's year and month as text, 2026-10",
    ),
    function(
        "week_of",
        Evaluation::DatePart(DatePart::Week),
        "a date's ISO 8601 week as text, 2026-W44",
    ),
    function(
        "year_of",
        Evaluation::DatePart(DatePart::Year),
        "a date's year, a number",
    ),
    function(
        "weekday_of",
        Evaluation::DatePart(DatePart::Weekday),
        "a date's day of the week in English, Monday to Sunday",
    ),
];

/// The function of this name, if any.
pub fn lookup(name: &str) -> Option<&'static Function> {
    FUNCTIONS.iter().find(|f| f.name == name)
}

impl Function {
    /// What the function does with its first argument.
    pub fn kind(&self) -> FunctionKind {
        match self.evaluation {
            Evaluation::Aggregate(_) | Evaluation::Share => FunctionKind::Aggregate,
            Evaluation::Row(_) | Evaluation::DatePart(_) => FunctionKind::Row,
            Evaluation::Change => FunctionKind::Comparison,
        }
    }

    /// What it gives back: a list for the modes, else one number.
    pub fn returns(&self) -> Returns {
        match self.evaluation {
            Evaluation::Aggregate(Aggregate::Modes | Aggregate::BinnedMode) => Returns::List,
            _ => Returns::Number,
        }
    }

    /// What the function gives for an argument that holds dates: order
    /// statistics and the mean are dates, spreads are days.
    pub fn on_dates(&self) -> OnDates {
        let aggregate = match self.evaluation {
            Evaluation::Aggregate(a) => a,
            Evaluation::DatePart(_) => return OnDates::Made,
            Evaluation::Share | Evaluation::Row(_) | Evaluation::Change => {
                return OnDates::Refused;
            }
        };
        match aggregate {
            Aggregate::Min
            | Aggregate::Max
            | Aggregate::Mean
            | Aggregate::Median
            | Aggregate::Quartile
            | Aggregate::Percentile => OnDates::Date,
            Aggregate::Range | Aggregate::Sd | Aggregate::Iqr => OnDates::Days,
            Aggregate::Count | Aggregate::Missing => OnDates::Count,
            Aggregate::Sum
            | Aggregate::Modes
            | Aggregate::BinnedMode
            | Aggregate::Variance
            | Aggregate::Skewness
            | Aggregate::Kurtosis
            | Aggregate::ExcessKurtosis
            | Aggregate::Bowley
            | Aggregate::Mad
            | Aggregate::TrimmedMean
            | Aggregate::WinsorizedMean
            | Aggregate::Outliers
            | Aggregate::FenceLow
            | Aggregate::FenceHigh => OnDates::Refused,
        }
    }

    /// Whether the first argument is a true/false condition (`share`).
    pub fn takes_condition(&self) -> bool {
        self.evaluation == Evaluation::Share
    }

    /// `percentile(x, p[, method])`, for messages.
    pub fn signature(&self) -> String {
        let mut parts = vec![if self.takes_condition() {
            "condition".to_string()
        } else {
            "x".to_string()
        }];
        for p in self.parameters {
            parts.push(if p.required {
                p.name.to_string()
            } else {
                format!("[{}]", p.name)
            });
        }
        if !self.options.is_empty() {
            let shown = if self.options == METHODS {
                "method".to_string()
            } else {
                self.options.join("|")
            };
            parts.push(format!("[{shown}]"));
        }
        format!("{}({})", self.name, parts.join(", "))
    }

    /// The fewest arguments a call takes (the column and the required parameters).
    pub fn min_args(&self) -> usize {
        1 + self.parameters.iter().filter(|p| p.required).count()
    }

    /// The most arguments a call takes (the column, every parameter and an option word).
    pub fn max_args(&self) -> usize {
        1 + self.parameters.len() + usize::from(!self.options.is_empty())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_row_has_its_own_name_and_its_own_evaluation() {
        for (i, f) in FUNCTIONS.iter().enumerate() {
            for g in &FUNCTIONS[i + 1..] {
                assert_ne!(f.name, g.name);
                assert_ne!(f.evaluation, g.evaluation, "{} and {}", f.name, g.name);
            }
        }
    }

    #[test]
    fn kind_result_and_first_argument_follow_from_the_evaluation() {
        let f = |name| lookup(name).unwrap();
        assert_eq!(f("modes").returns(), Returns::List);
        assert_eq!(f("binned_mode").returns(), Returns::List);
        assert_eq!(f("mean").returns(), Returns::Number);
        assert!(f("share").takes_condition() && !f("sum").takes_condition());
        assert_eq!(f("share").kind(), FunctionKind::Aggregate);
        assert_eq!(f("round").kind(), FunctionKind::Row);
        assert_eq!(f("change").kind(), FunctionKind::Comparison);
    }
}
