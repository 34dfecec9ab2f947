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
mod influence;
mod memo;
mod moments;
mod normal;
mod order;
mod outliers;
mod quantile;
mod random;
mod sample;
mod shape_noise;
mod standard_error;
mod summation;
mod undefined;

pub use bootstrap::{
    BOOTSTRAP_MIN_VALUES, BootstrapIntervals, BootstrapMethod, DEFAULT_RESAMPLES, DEFAULT_SEED,
    EXACT_UP_TO, Interval, bootstrap_intervals, method_for,
};
pub use histogram::{
    BinRule, CHART_FENCE_IQR, CHART_MAX_BINS, Histogram, MAX_BINS, binned_mode, fenced_histogram,
    histogram, sturges_bins,
};
pub use influence::{
    LeaveOneOut, OneLeftOut, leave_one_out, mean_change_without, mean_minus_median,
};
pub use moments::{Denominator, Moments};
pub use normal::{normal_cdf, normal_quantile};
pub use order::{
    MAD_NORMAL_SCALE, bowley, iqr, mad, median, modes, quartile, trimmed_mean, winsorized_mean,
};
pub use outliers::{
    Fences, MODIFIED_Z_CONSTANT, MODIFIED_Z_CUTOFF, Outliers, fences, modified_z_beyond,
    modified_z_scores, outliers, outliers_near_and_far,
};
pub use quantile::{QuantileMethod, quantile_sorted};
pub use random::SplitMix64;
pub use sample::{Sample, is_whole};
pub use shape_noise::{
    AgainstNoise, SHAPE_NOTE_CUTOFF, kurtosis_against_noise, kurtosis_se, skewness_against_noise,
    skewness_se,
};
pub use standard_error::{
    mean_se, quantile_se, sd_se, share_se, trimmed_mean_se, variance_of_variance,
};
pub use summation::Neumaier;
pub use undefined::{Stat, Undefined};
