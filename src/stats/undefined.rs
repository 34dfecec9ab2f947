//! Why a statistic has no value.

/// The reason a statistic could not be computed. Written into the result
/// cell in words and listed on the checks sheet; never shown as NaN.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum Undefined {
    #[error("no values")]
    NoValues,
    #[error("constant column")]
    ConstantColumn,
    #[error("needs at least {needed} values, has {have}")]
    TooFewValues { needed: usize, have: usize },
    #[error("quartiles coincide (IQR is zero)")]
    ZeroIqr,
    #[error("MAD is zero")]
    ZeroMad,
    #[error("beyond the largest number a double holds (about 1.8e308)")]
    BeyondDoubleRange,
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
