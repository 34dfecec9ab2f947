//! Why a statistic has no value.

/// The reason a statistic could not be computed. Written into the result
/// cell in words and listed on the checks sheet; never shown as NaN.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
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
    /// A quartile other than 0 to 4.
    #[error("quartile {0} does not exist; use 1, 2 or 3")]
    NoSuchQuartile(u8),
    /// A quantile level outside 0 to 1.
    #[error("quantile level {0} is outside 0 to 1")]
    LevelOutside(f64),
    /// A Hyndman-Fan type other than 1 to 9.
    #[error("there is no Hyndman-Fan type {0}; use 1 to 9")]
    NoSuchQuantileType(u8),
    /// Tukey's hinges asked for a level that is not a quartile.
    #[error(
        "Tukey's hinges give only the quartiles (0, 25, 50, 75, 100); use an hf method for other percentiles"
    )]
    HingesOnlyQuartiles,
    /// A share cut from each end (trimmed and winsorized means) outside [0, 50%).
    #[error("the share cut from each end must be at least 0 and below 50%, not {}%", .0 * 100.0)]
    CutOutside(f64),
    /// A negative (or infinite) fence factor.
    #[error("the fence factor must be 0 or more, not {0}")]
    NegativeFenceFactor(f64),
    /// A histogram or binned mode of 0 bins.
    #[error("a histogram needs at least 1 bin")]
    NoBins,
    /// A share outside 0 to 1 given to its standard error.
    #[error("a share of {0} is not 0 to 1")]
    ShareOutside(f64),
    /// Too few values around a percentile for its Maritz-Jarrett standard error.
    #[error(
        "too few values for a standard error of the {}th percentile ({have} values)",
        crate::format::shortest(.level * 100.0)
    )]
    TooFewAroundPercentile {
        /// The percentile's level, 0 to 1.
        level: f64,
        /// How many values the sample has.
        have: usize,
    },
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
