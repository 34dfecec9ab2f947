//! Statistics core: pure functions over one column of numbers.
//!
//! Everything above this module (evaluation, the panel, robustness, charts)
//! asks these functions for its figures; nothing here knows about recipes,
//! files or workbooks. A [`Sample`] holds the non-missing values of a column
//! and caches the one sort and the one pass of moments that every statistic
//! shares. A result that cannot be a number is an [`Undefined`] reason,
//! never NaN.

mod bootstrap;
mod histogram;
mod moments;
mod order;
mod outliers;
mod quantile;
mod sample;
mod summation;
mod undefined;

pub use bootstrap::{SplitMix64, BootstrapIntervals, Interval, bootstrap_intervals, resamples_for, DEFAULT_RESAMPLES, DEFAULT_SEED, DRAW_BUDGET, MIN_RESAMPLES};
pub use histogram::{BinRule, Histogram, binned_mode, histogram, MAX_BINS};
pub use moments::{Denominator, Moments};
pub use order::{bowley, iqr, mad, median, modes, quartile, trimmed_mean, winsorized_mean, MAD_NORMAL_SCALE};
pub use outliers::{Fences, fences, modified_z_scores, outliers, Outliers, MODIFIED_Z_CONSTANT, MODIFIED_Z_CUTOFF};
pub use quantile::{QuantileMethod, quantile_sorted};
pub use sample::Sample;
pub use summation::Neumaier;
pub use undefined::{Stat, Undefined};
