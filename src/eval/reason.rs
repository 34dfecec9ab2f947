//! Why a figure has no value: one variant per reason, its words beside it.
//! Reasons stay typed through the evaluator, the results, the Checks
//! list and the Record; only the writers (sheets, `--json`, the terminal)
//! turn them into words, through `Display`.

use crate::recipe::ast::BinaryOp;
use crate::recipe::functions::Parameter;
use crate::stats::Undefined;

/// The reason a value is missing. The words users see are the `Display`
/// of each variant, written once here.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum Reason {
    /// A reason from the statistics core: no values, a constant column,
    /// too few values, a zero spread, an argument out of range.
    #[error(transparent)]
    Stat(#[from] Undefined),
    /// None of a group's rows pass its block's filters, so every figure of
    /// the group is missing for that reason (more telling than "no values").
    #[error("no rows")]
    NoRows,
    /// Arithmetic gave infinity or NaN, which a sheet cannot show.
    #[error("not a finite number (division by zero?)")]
    NotFinite,
    /// An `if` condition or a check that is neither true nor false.
    #[error("the condition is not true or false")]
    NotTrueOrFalse,
    /// `-` or `not` applied to a value of the wrong kind (text, a list).
    #[error("wrong kind of value")]
    WrongKind,
    /// An operator applied to values it cannot combine (text plus a number).
    #[error("`{}` cannot combine these values", .0.symbol())]
    CannotCombine(BinaryOp),
    /// A function the function table does not know (the checker refuses it
    /// first; kept so the evaluator never panics on an unchecked tree).
    #[error("unknown function `{0}`")]
    UnknownFunction(String),
    /// A numeric parameter (`percentile(x, p)`'s p) that is not one number.
    #[error("an argument of `{0}` is not one number")]
    ArgumentNotOneNumber(&'static str),
    /// A numeric parameter computed in the recipe (`quartile(x, count(y))`)
    /// that lies outside its range; a number written there is refused by
    /// the checker with the same words.
    #[error(
        "the `{}` of `{function}` must be {}, not {}",
        parameter.name,
        parameter.range_words(),
        crate::format::shortest(*value)
    )]
    OutOfRange {
        /// The function's name.
        function: &'static str,
        /// The parameter, with its range.
        parameter: &'static Parameter,
        /// The value computed.
        value: f64,
    },
    /// A date function (`month`, `year`, ...) given something else.
    #[error("`{0}` needs a date")]
    NeedsDate(&'static str),
    /// A row function (`abs`, `ln`, ...) given one value that is not a number.
    #[error("`{0}` needs a number")]
    NeedsNumber(&'static str),
    /// `change(...)` of something that is not one number per group.
    #[error("`change` needs one number per group")]
    ChangeNeedsOneNumber,
    /// `change(...)` with no previous period, or none for this group.
    #[error("no previous period to compare with")]
    NoPrevious,
    /// `change(...)` whose previous value is 0: a relative change is undefined.
    #[error("the previous value is zero")]
    PreviousIsZero,
    /// `share(...)` of one value rather than a condition per row.
    #[error("`share` needs a condition per row")]
    ShareNeedsRows,
    /// A figure or check that gives a value per row where one per group is
    /// needed.
    #[error("a value per row, not per group")]
    PerRow,
}

impl Reason {
    /// The commonest reason: the column (or group) has no numeric value.
    pub const NO_VALUES: Reason = Reason::Stat(Undefined::NoValues);

    /// The reason with what it means where a cell's words are terse: the
    /// Checks sheet's list of figures without a value writes this.
    pub fn explained(&self) -> String {
        match self {
            Reason::NoRows => {
                format!("{self}: none of the group's rows passes the block's `where`")
            }
            other => other.to_string(),
        }
    }
}
