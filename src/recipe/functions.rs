//! The functions a recipe may call: their kind, arguments and options.
//! The checker and the evaluator both read this one table.

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

/// What an aggregate gives back.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Returns {
    Number,
    /// Several numbers (all tied modes); may only stand alone as a figure.
    List,
}

/// A numeric argument after the column, with the range it must fall in.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Parameter {
    pub name: &'static str,
    pub min: f64,
    pub max: f64,
    /// `max` itself is excluded (as for a trimmed share below 50%).
    pub max_exclusive: bool,
    pub whole: bool,
    pub required: bool,
    /// Given in percent (0 to 100): a `%` is refused, and a value between
    /// 0 and 1 is warned about (a fraction where a percent was meant).
    pub percent: bool,
    /// What to write instead when the value is out of range ("" if nothing).
    pub help: &'static str,
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Function {
    pub name: &'static str,
    pub kind: FunctionKind,
    pub returns: Returns,
    /// The first argument is a true/false condition rather than numbers.
    pub takes_condition: bool,
    pub parameters: &'static [Parameter],
    /// Bare words accepted after the column.
    pub options: &'static [&'static str],
    pub summary: &'static str,
}

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

const fn aggregate(name: &'static str, summary: &'static str) -> Function {
    Function {
        name,
        kind: FunctionKind::Aggregate,
        returns: Returns::Number,
        takes_condition: false,
        parameters: &[],
        options: &[],
        summary,
    }
}

const fn row(name: &'static str, summary: &'static str) -> Function {
    Function {
        name,
        kind: FunctionKind::Row,
        returns: Returns::Number,
        takes_condition: false,
        parameters: &[],
        options: &[],
        summary,
    }
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

pub const FUNCTIONS: &[Function] = &[
    aggregate("count", "number of non-missing numeric values"),
    aggregate("missing", "number of missing or non-numeric cells"),
    aggregate("sum", "sum of the values"),
    aggregate("min", "smallest value"),
    aggregate("max", "largest value"),
    aggregate("range", "max - min"),
    aggregate("mean", "arithmetic mean"),
    aggregate(
        "median",
        "middle value; mean of the two middle values for even n",
    ),
    Function {
        returns: Returns::List,
        ..aggregate("modes", "every most frequent value, ascending")
    },
    Function {
        returns: Returns::List,
        parameters: &[param("k", 1.0, 1000.0, true, true)],
        ..aggregate(
            "binned_mode",
            "mean of the values in the fullest of k equal bins",
        )
    },
    Function {
        options: &["population"],
        ..aggregate(
            "variance",
            "sample variance (n - 1); `population` divides by n",
        )
    },
    Function {
        options: &["population"],
        ..aggregate("sd", "sample standard deviation; `population` divides by n")
    },
    Function {
        parameters: &[Parameter {
            help: "quartile 0 would be the smallest value and 4 the largest: write min(x) or max(x)",
            ..param("q", 1.0, 3.0, true, true)
        }],
        options: METHODS,
        ..aggregate("quartile", "quartile 1, 2 or 3")
    },
    Function {
        parameters: &[Parameter {
            percent: true,
            ..param("p", 0.0, 100.0, false, true)
        }],
        options: METHODS,
        ..aggregate("percentile", "p-th percentile, p from 0 to 100")
    },
    Function {
        options: METHODS,
        ..aggregate("iqr", "Q3 - Q1")
    },
    Function {
        options: &["adjusted"],
        ..aggregate("skewness", "moment skewness g1; `adjusted` gives G1")
    },
    Function {
        options: &["adjusted"],
        ..aggregate("kurtosis", "moment kurtosis b2; `adjusted` gives G2 + 3")
    },
    Function {
        options: &["adjusted"],
        ..aggregate("excess_kurtosis", "b2 - 3; `adjusted` gives G2")
    },
    Function {
        options: METHODS,
        ..aggregate("bowley", "Bowley's quartile skewness")
    },
    Function {
        options: &["scaled"],
        ..aggregate(
            "mad",
            "median absolute deviation; `scaled` multiplies by 1.4826",
        )
    },
    Function {
        parameters: &[SHARE_CUT],
        ..aggregate("trimmed_mean", "mean after cutting share a from each end")
    },
    Function {
        parameters: &[SHARE_CUT],
        ..aggregate("winsorized_mean", "mean after clamping share a at each end")
    },
    Function {
        takes_condition: true,
        ..aggregate("share", "fraction of rows where the condition holds")
    },
    Function {
        parameters: &[FENCE_K],
        options: METHODS,
        ..aggregate(
            "outliers",
            "number of values beyond Tukey's fences (k = 1.5)",
        )
    },
    Function {
        parameters: &[FENCE_K],
        options: METHODS,
        ..aggregate("fence_low", "Q1 - k IQR")
    },
    Function {
        parameters: &[FENCE_K],
        options: METHODS,
        ..aggregate("fence_high", "Q3 + k IQR")
    },
    Function {
        kind: FunctionKind::Comparison,
        ..aggregate(
            "change",
            "size of the relative change from the previous period: |now - before| / |before|",
        )
    },
    row("abs", "absolute value"),
    row("ln", "natural logarithm"),
    row("log10", "base-10 logarithm"),
    row("exp", "e to the power"),
    row("sqrt", "square root"),
    Function {
        parameters: &[param("d", -15.0, 15.0, true, true)],
        ..row("round", "round to d decimals")
    },
    row("floor", "largest whole number not above"),
    row("ceil", "smallest whole number not below"),
];

pub fn lookup(name: &str) -> Option<&'static Function> {
    FUNCTIONS.iter().find(|f| f.name == name)
}

impl Function {
    /// `percentile(x, p[, method])`, for messages.
    pub fn signature(&self) -> String {
        let mut parts = vec![if self.takes_condition {
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

    pub fn min_args(&self) -> usize {
        1 + self.parameters.iter().filter(|p| p.required).count()
    }

    pub fn max_args(&self) -> usize {
        1 + self.parameters.len() + usize::from(!self.options.is_empty())
    }
}
