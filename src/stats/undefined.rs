//! Why a statistic has no value.

/// The reason a statistic could not be computed. Written into the result
/// cell in words and listed on the checks sheet; never shown as NaN.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum Undefined {
    /// The column (or group) has no numeric value.
    #[error("no values")]
    NoValues,
    /// Every value is the same, so a shape figure has no meaning.
    #[error("constant column")]
    ConstantColumn,
    /// The statistic needs `needed` values and the sample has `have`.
    #[error("needs at least {needed} values, has {have}")]
    TooFewValues {
        /// How many values the statistic needs.
        needed: usize,
        /// How many the sample has.
        have: usize,
    },
    /// The standard deviation is zero, so a figure scaled by it is undefined.
    #[error("sd is zero")]
    ZeroSd,
    /// The quartiles coincide, so a figure scaled by the IQR is undefined.
    #[error("quartiles coincide (IQR is zero)")]
    ZeroIqr,
    /// The median absolute deviation is zero, so modified z-scores are undefined.
    #[error("MAD is zero")]
    ZeroMad,
    /// The result overflows a double.
    #[error("beyond the largest number a double holds (about 1.8e308)")]
    BeyondDoubleRange,
    /// An argument outside its range, with the message saying which.
    #[error("{0}")]
    BadArgument(String),
}

/// A statistic's value or the reason it has none.
pub type Stat<T = f64> = Result<T, Undefined>;

pub(crate) fn need(have: usize, needed: usize) -> Result<(), Undefined> {
    if have == 0 {
        Err(Undefined::NoValues)
    } else if have < needed {
        Err(Undefined::TooFewValues { needed, have })
    } else {
        Ok(())
    }
}
