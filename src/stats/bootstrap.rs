//! Seeded bootstrap percentile intervals for the mean and the median, at a
//! cost bounded per column whatever its length and however many groups
//! the rows are split into.
//!
//! Short columns (up to [`EXACT_UP_TO`] values) draw no resamples:
//! - the median: its exact bootstrap distribution, from binomial
//!   probabilities of order statistics (see [`exact_median`]); the interval
//!   is where that distribution's cumulative probability reaches the level.
//! - the mean: the saddlepoint approximation of its bootstrap distribution
//!   (Davison and Hinkley 1988, see [`saddlepoint`]), a few passes over the
//!   values.
//!
//! Long columns:
//! - the median: a resample's middle order statistics are drawn directly.
//!   The k-th smallest of n uniforms is Beta(k, n - k + 1), the next one
//!   above it is u + (1 - u)(1 - W^(1/(n-k))), and a uniform u picks the
//!   sorted value at floor(n u), so this has exactly the distribution of
//!   the resampled median, at two or three draws per resample.
//! - the mean: the Cornish-Fisher expansion of its bootstrap distribution,
//!   whose cumulants are those of the data divided by n, n^2, n^3 (Hall
//!   1992, The Bootstrap and Edgeworth Expansion, ch. 2). Past 10^3 values
//!   its error is below the Monte Carlo error of 2000 resamples (tested on
//!   a very skewed column of 200 values and on columns of 1001 and 1002).
//!
//! Full resampling (2000 x n draws) is kept in the tests as the reference
//! each method is checked against. The generator is written here (see
//! [`super::random`]), so the same seed gives the same interval on every
//! machine and version.

mod exact_median;
mod saddlepoint;

use std::cell::RefCell;

use super::memo::{Memo, remembered};
use super::normal::normal_quantile;
use super::quantile::{QuantileMethod, quantile_sorted};
use super::random::SplitMix64;
use super::sample::Sample;
use super::undefined::{Stat, need};

/// Resamples drawn for a long column's median.
pub const DEFAULT_RESAMPLES: usize = 2000;
/// The longest column given the exact median distribution and the
/// saddlepoint mean; both cost some 20 passes' worth of work per value.
/// Longer columns draw `resamples` medians (a fixed cost per column) and
/// use the Cornish-Fisher mean (no pass at all), whose error there is below
/// 2000 resamples' Monte Carlo error. The robustness sheet says which.
pub const EXACT_UP_TO: usize = 1000;
/// Fewest values an interval is given for. A resample of a few values
/// repeats the same few numbers, so the percentile interval is too narrow:
/// on simulated normal samples the "95%" interval of the mean covers the
/// true mean about 77% of the time at n = 3, 84% at 5, 90% at 10 and 93%
/// at 20 (numpy simulation, 2000 samples each). Below 10 values no
/// interval is given; the cutoff is common practice, not from a source.
pub const BOOTSTRAP_MIN_VALUES: usize = 10;
/// Fixed so that reruns on the same data agree to the last digit.
pub const DEFAULT_SEED: u64 = 0x5EAF_2026;

/// A confidence interval: its lower and upper ends.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Interval {
    /// The lower end.
    pub low: f64,
    /// The upper end.
    pub high: f64,
}

/// How an interval was reached.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BootstrapMethod {
    /// The median's exact bootstrap distribution and the mean's saddlepoint
    /// approximation (short columns).
    Exact,
    /// Medians from directly drawn order statistics, the mean from the
    /// Cornish-Fisher expansion (long columns).
    Direct,
}

impl BootstrapMethod {
    /// The method in words, as the robustness sheet and `--json` show it.
    pub fn words(self) -> &'static str {
        match self {
            BootstrapMethod::Exact => "median: exact distribution; mean: saddlepoint",
            BootstrapMethod::Direct => "median: direct order statistics; mean: Cornish-Fisher",
        }
    }
}

/// Percentile bootstrap intervals of the mean and the median, with how they were made.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BootstrapIntervals {
    /// The interval of the mean.
    pub mean: Interval,
    /// The interval of the median.
    pub median: Interval,
    /// The number of resamples.
    pub resamples: usize,
    /// The confidence level (0.95 for 95%).
    pub level: f64,
    /// The seed of the generator, so a rerun gives the same interval.
    pub seed: u64,
    /// Full resampling or the direct method for long columns.
    pub method: BootstrapMethod,
}

/// Which method a column of n values gets.
pub fn method_for(n: usize) -> BootstrapMethod {
    if n <= EXACT_UP_TO {
        BootstrapMethod::Exact
    } else {
        BootstrapMethod::Direct
    }
}

/// Percentile intervals at `level` (0.95 for 95%) of the bootstrap
/// distributions of the mean and the median: the (1-level)/2 and
/// (1+level)/2 points of the exact or approximated distribution for short
/// columns; for long ones, of the Cornish-Fisher expansion (mean) and the
/// type 7 quantiles of `resamples` drawn medians seeded by `seed`.
pub fn bootstrap_intervals(
    sample: &Sample,
    resamples: usize,
    level: f64,
    seed: u64,
) -> Stat<BootstrapIntervals> {
    need(sample.count(), BOOTSTRAP_MIN_VALUES)?;
    need(resamples, 2)?;
    let sorted = sample.sorted();
    let method = method_for(sorted.len());
    let (mean, median) = match method {
        _ if sample.is_constant() => {
            let only = Interval {
                low: sorted[0],
                high: sorted[0],
            };
            (only, only)
        }
        BootstrapMethod::Exact => (
            saddlepoint::saddlepoint_mean_interval(sorted, level),
            exact_median::exact_median_interval(sorted, level),
        ),
        BootstrapMethod::Direct => {
            // The drawn ranks depend on n and the seed alone: the columns
            // of a group share them.
            let ranks = remembered!(DRAWN_RANKS, (sorted.len(), resamples, seed), || {
                let mut rng = SplitMix64(seed);
                (0..resamples)
                    .map(|_| MiddleRanks::draw(sorted.len(), &mut rng))
                    .collect::<Vec<_>>()
            });
            let medians = ranks.iter().map(|r| r.median(sorted)).collect();
            (
                mean_by_expansion(sample, level)?,
                percentiles(medians, level)?,
            )
        }
    };
    Ok(BootstrapIntervals {
        mean,
        median,
        resamples,
        level,
        seed,
        method,
    })
}

fn percentiles(mut stats: Vec<f64>, level: f64) -> Stat<Interval> {
    stats.sort_unstable_by(f64::total_cmp);
    let method = QuantileMethod::HyndmanFan(7);
    Ok(Interval {
        low: quantile_sorted(&stats, (1.0 - level) / 2.0, method)?,
        high: quantile_sorted(&stats, (1.0 + level) / 2.0, method)?,
    })
}

/// Means and medians of `resamples` full resamples of `sorted`: the
/// reference the other methods are tested against.
#[cfg(test)]
fn full_resamples(sorted: &[f64], resamples: usize, rng: &mut SplitMix64) -> (Vec<f64>, Vec<f64>) {
    let n = sorted.len();
    let mut counts = vec![0u32; n];
    let mut means = Vec::with_capacity(resamples);
    let mut medians = Vec::with_capacity(resamples);
    let threshold = (n as u64).wrapping_neg() % n as u64;
    // Means are summed as deviations from a middle value, so that data far
    // from zero (1e8 plus small amounts) keep the digits of their spread.
    let centre = sorted[(n - 1) / 2];
    let deviations: Vec<f64> = sorted.iter().map(|x| x - centre).collect();
    for _ in 0..resamples {
        counts.fill(0);
        for _ in 0..n {
            counts[rng.below_with(n as u64, threshold) as usize] += 1;
        }
        let (sum, median) = sum_and_median(sorted, &deviations, &counts);
        // A mean lies within the data's range; rounding of c x / n must not push it out.
        means.push((centre + sum / n as f64).clamp(sorted[0], sorted[n - 1]));
        medians.push(median);
    }
    (means, medians)
}

thread_local! {
    /// The last drawn ranks made, by (n, resamples, seed).
    static DRAWN_RANKS: RefCell<Memo<(usize, usize, u64), Vec<MiddleRanks>>> =
        const { RefCell::new(Memo::new(2)) };
}

/// The 0-based indexes into the sorted values of one resample's middle
/// value (odd n) or two middle values (even n).
#[derive(Debug, Clone, Copy)]
struct MiddleRanks {
    lower: usize,
    upper: Option<usize>,
}

impl MiddleRanks {
    /// Draws the middle order statistics of one resample of n values
    /// directly (see the module comment).
    fn draw(n: usize, rng: &mut SplitMix64) -> MiddleRanks {
        let index = |u: f64| ((u * n as f64) as usize).min(n - 1);
        // 1-based rank of the lower middle value of a resample.
        let k = (n - 1) / 2 + 1;
        let u_lower = rng.beta(k as f64, (n - k + 1) as f64);
        let lower = index(u_lower);
        if n % 2 == 1 {
            return MiddleRanks { lower, upper: None };
        }
        // The smallest of the n - k uniforms above u_lower.
        let w = 1.0 - rng.uniform();
        let u_upper = u_lower + (1.0 - u_lower) * -(w.ln() / (n - k) as f64).exp_m1();
        MiddleRanks {
            lower,
            upper: Some(index(u_upper)),
        }
    }

    /// The resample's median.
    fn median(self, sorted: &[f64]) -> f64 {
        match self.upper {
            None => sorted[self.lower],
            Some(upper) => sorted[self.lower] / 2.0 + sorted[upper] / 2.0,
        }
    }
}

/// The median of one resample of `sorted`, from its middle order
/// statistics drawn directly.
#[cfg(test)]
fn direct_median(sorted: &[f64], rng: &mut SplitMix64) -> f64 {
    MiddleRanks::draw(sorted.len(), rng).median(sorted)
}

/// The percentile interval of the bootstrap distribution of the mean from
/// its Cornish-Fisher expansion to order 1/n: with z the normal quantile,
/// g1 and g2 the skewness and excess kurtosis of the resampled mean,
/// w = z + (z^2 - 1) g1/6 + (z^3 - 3z) g2/24 - (2z^3 - 5z) g1^2/36 (the
/// standard Cornish-Fisher terms, typed from memory; a test below checks
/// them against full resampling of a short, skewed column).
fn mean_by_expansion(sample: &Sample, level: f64) -> Stat<Interval> {
    let m = sample.moments()?;
    let (lo, hi) = (sample.min()?, sample.max()?);
    if m.m2 == 0.0 {
        return Ok(Interval {
            low: m.mean,
            high: m.mean,
        });
    }
    let n = m.n as f64;
    let se = m.sd_population() / n.sqrt();
    let g1 = m.g1() / n.sqrt();
    let g2 = m.g2() / n;
    let at = |p: f64| {
        let z = normal_quantile(p);
        let w = z + (z * z - 1.0) * g1 / 6.0 + (z * z * z - 3.0 * z) * g2 / 24.0
            - (2.0 * z * z * z - 5.0 * z) * g1 * g1 / 36.0;
        (m.mean + se * w).clamp(lo, hi)
    };
    Ok(Interval {
        low: at((1.0 - level) / 2.0),
        high: at((1.0 + level) / 2.0),
    })
}

#[cfg(test)]
/// The sum of `deviations` (the sorted values' differences from a centre)
/// and the median of the values of a resample, in one pass over the
/// counts. The sum is plain (a resampled mean needs no more than about 13
/// digits of the spread); the loop has no data-dependent branch until the
/// middle rank is reached.
fn sum_and_median(sorted: &[f64], deviations: &[f64], counts: &[u32]) -> (f64, f64) {
    let n = sorted.len();
    let (lower_rank, upper_rank) = ((n - 1) / 2, n / 2);
    let mut seen = 0usize;
    let mut i = 0;
    let mut sum = 0.0;
    // Up to the lower middle rank: only sum and count.
    while i < n && seen + counts[i] as usize <= lower_rank {
        sum += deviations[i] * f64::from(counts[i]);
        seen += counts[i] as usize;
        i += 1;
    }
    let lower = sorted[i.min(n - 1)];
    let mut j = i;
    while j < n && seen + counts[j] as usize <= upper_rank {
        sum += deviations[j] * f64::from(counts[j]);
        seen += counts[j] as usize;
        j += 1;
    }
    let upper = sorted[j.min(n - 1)];
    for k in j..n {
        sum += deviations[k] * f64::from(counts[k]);
    }
    (sum, lower / 2.0 + upper / 2.0)
}

/// The median of a resample given how often each sorted value was drawn.
#[cfg(test)]
fn median_from_counts(sorted: &[f64], counts: &[u32]) -> f64 {
    let n = sorted.len();
    // 0-based ranks of the middle one or two values of the resample.
    let (lower_rank, upper_rank) = ((n - 1) / 2, n / 2);
    let mut seen = 0usize;
    let mut lower = None;
    for (&x, &c) in sorted.iter().zip(counts) {
        seen += c as usize;
        if lower.is_none() && seen > lower_rank {
            lower = Some(x);
        }
        if seen > upper_rank {
            let lower = lower.unwrap_or(x);
            return lower / 2.0 + x / 2.0;
        }
    }
    unreachable!("counts add up to n")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn median_from_counts_matches_the_resample() {
        let sorted = [1.0, 2.0, 4.0, 8.0];
        // Resample 1, 1, 4, 8 -> median (1 + 4) / 2.
        assert_eq!(median_from_counts(&sorted, &[2, 0, 1, 1]), 2.5);
        // Resample 2, 2, 2, 8 -> median 2.
        assert_eq!(median_from_counts(&sorted, &[0, 3, 0, 1]), 2.0);
        assert_eq!(median_from_counts(&[5.0, 6.0, 7.0], &[0, 0, 3]), 7.0);
    }

    #[test]
    fn one_pass_agrees_with_the_two_steps() {
        let sorted = [1.0, 2.0, 4.0, 8.0, 9.5];
        for counts in [
            [2, 0, 1, 1, 1],
            [0, 0, 0, 0, 5],
            [1, 1, 1, 1, 1],
            [0, 3, 0, 2, 0],
        ] {
            let (sum, median) = sum_and_median(&sorted, &sorted, &counts);
            let direct: f64 = sorted
                .iter()
                .zip(counts)
                .map(|(x, c)| x * f64::from(c))
                .sum();
            assert_eq!(
                (sum, median),
                (direct, median_from_counts(&sorted, &counts))
            );
        }
    }

    /// The method is shown on the robustness sheet and in `--json`: a
    /// short column gets the exact distributions, a long one drawn medians.
    #[test]
    fn the_method_chosen_is_named_in_words() {
        let short = Sample::from_values((1..=50).map(f64::from));
        let long = Sample::from_values((1..=20_000).map(f64::from));
        let method = |s: &Sample| {
            bootstrap_intervals(s, 2000, 0.95, DEFAULT_SEED)
                .unwrap()
                .method
        };
        assert_eq!(
            method(&short).words(),
            "median: exact distribution; mean: saddlepoint"
        );
        assert_eq!(
            method(&long).words(),
            "median: direct order statistics; mean: Cornish-Fisher"
        );
    }

    #[test]
    fn same_seed_same_interval() {
        // Long enough that medians are drawn.
        let s = skewed(EXACT_UP_TO + 1);
        let a = bootstrap_intervals(&s, 500, 0.95, DEFAULT_SEED).unwrap();
        let b = bootstrap_intervals(&s, 500, 0.95, DEFAULT_SEED).unwrap();
        assert_eq!(a, b);
        let c = bootstrap_intervals(&s, 500, 0.95, DEFAULT_SEED + 1).unwrap();
        assert_ne!(a.median, c.median);
    }

    #[test]
    fn too_few_values_get_no_interval() {
        for n in [0, 1, 2, 9] {
            let s = Sample::from_values((0..n).map(|i| i as f64));
            let got = bootstrap_intervals(&s, 100, 0.95, 7);
            assert_eq!(got, Err(super::super::undefined::need(n, 10).unwrap_err()));
        }
        let ten = Sample::from_values((0..10).map(|i| i as f64));
        assert!(bootstrap_intervals(&ten, 100, 0.95, 7).is_ok());
    }

    /// Readings 1e8 + k/1000 for 2000 values of k: their intervals must be
    /// those of k/1000 moved by 1e8, to about the spacing of the doubles
    /// there (1.5e-8; each reading is itself rounded to that). Summing the
    /// values themselves (sums near 2e11, spaced 3e-5) put each resampled
    /// mean off by some 20 times that.
    #[test]
    fn far_from_zero_the_intervals_keep_their_width() {
        let grid: Vec<f64> = (0..2000)
            .map(|i| f64::from((i * 37) % 101) / 1000.0)
            .collect();
        let near = bootstrap_intervals(&Sample::from_values(grid.clone()), 500, 0.95, 3).unwrap();
        let far = Sample::from_values(grid.iter().map(|x| x + 1e8));
        let far = bootstrap_intervals(&far, 500, 0.95, 3).unwrap();
        let ulp = 1e8 * f64::EPSILON;
        for (a, b) in [
            (far.mean.low, near.mean.low),
            (far.mean.high, near.mean.high),
            (far.median.low, near.median.low),
            (far.median.high, near.median.high),
        ] {
            assert!((a - 1e8 - b).abs() <= 1.5 * ulp, "{a} vs 1e8 + {b}");
        }
    }

    #[test]
    fn constant_data_gives_a_point_interval() {
        let s = Sample::from_values([3.0; 20]);
        let b = bootstrap_intervals(&s, 100, 0.95, 7).unwrap();
        assert_eq!(
            (b.mean.low, b.mean.high, b.median.low, b.median.high),
            (3.0, 3.0, 3.0, 3.0)
        );
    }

    /// A skewed column of n values (exponential quantiles), all distinct.
    fn skewed(n: usize) -> Sample {
        Sample::from_values((0..n).map(|i| -(1.0 - (i as f64 + 0.5) / n as f64).ln()))
    }

    /// The exact bootstrap distribution of the median of n = 2m - 1
    /// distinct values: P(median* <= x(l)) = P(Binomial(n, l/n) >= m)
    /// (Efron 1979, "Bootstrap methods: another look at the jackknife",
    /// Annals of Statistics; formula typed from memory). Directly drawn medians must
    /// follow it.
    #[test]
    fn direct_medians_follow_the_exact_bootstrap_distribution() {
        let n: usize = 20_001;
        let m = n.div_ceil(2);
        let s = skewed(n);
        let sorted = s.sorted();
        let mut rng = SplitMix64(11);
        let draws = 40_000;
        let medians: Vec<f64> = (0..draws)
            .map(|_| direct_median(sorted, &mut rng))
            .collect();
        let binomial_at_least = |k: usize, p: f64| -> f64 {
            let ln_pmf = |j: usize| {
                libm::lgamma(n as f64 + 1.0)
                    - libm::lgamma(j as f64 + 1.0)
                    - libm::lgamma((n - j) as f64 + 1.0)
                    + j as f64 * p.ln()
                    + (n - j) as f64 * (1.0 - p).ln()
            };
            (k..=n).map(|j| ln_pmf(j).exp()).sum()
        };
        for l in [9_900, 9_960, 10_001, 10_040, 10_100] {
            let exact = binomial_at_least(m, l as f64 / n as f64);
            let seen =
                medians.iter().filter(|&&x| x <= sorted[l - 1]).count() as f64 / draws as f64;
            let tolerance = 4.0 * (exact * (1.0 - exact) / draws as f64).sqrt() + 1e-3;
            assert!(
                (seen - exact).abs() < tolerance,
                "l = {l}: {seen} vs {exact}"
            );
        }
    }

    /// Past the exact methods' range, the direct intervals agree with full
    /// resampling of the same column to within the Monte Carlo error of
    /// 2000 resamples (about 0.06 standard errors at the 2.5% point).
    #[test]
    fn direct_intervals_agree_with_full_resampling() {
        for n in [EXACT_UP_TO + 1, EXACT_UP_TO + 2] {
            let s = skewed(n);
            let direct = bootstrap_intervals(&s, DEFAULT_RESAMPLES, 0.95, DEFAULT_SEED).unwrap();
            assert_eq!(direct.method, BootstrapMethod::Direct);
            let (means, medians) =
                full_resamples(s.sorted(), DEFAULT_RESAMPLES, &mut SplitMix64(DEFAULT_SEED));
            let (mean, median) = (
                percentiles(means, 0.95).unwrap(),
                percentiles(medians, 0.95).unwrap(),
            );
            let se_mean = s.sd(super::super::Denominator::Population).unwrap() / (n as f64).sqrt();
            // The median of exponential data has standard error 1/(f(median) 2 sqrt(n)), f = 1/2.
            let se_median = 1.0 / (n as f64).sqrt();
            for (a, b, se) in [
                (direct.mean.low, mean.low, se_mean),
                (direct.mean.high, mean.high, se_mean),
                (direct.median.low, median.low, se_median),
                (direct.median.high, median.high, se_median),
            ] {
                assert!((a - b).abs() < 0.25 * se, "n = {n}: {a} vs {b} (se {se})");
            }
        }
    }

    /// The expansion's skewness and kurtosis terms matter on a short,
    /// very skewed column: there they must bring the interval close to
    /// full resampling (10^5 resamples, Monte Carlo error about 0.01
    /// standard errors), much closer than the plain normal interval.
    #[test]
    fn expansion_terms_track_the_resampled_distribution() {
        let n = 200;
        let s = Sample::from_values((0..n).map(|i| {
            let e = -(1.0 - (i as f64 + 0.5) / n as f64).ln();
            e * e
        }));
        let expanded = mean_by_expansion(&s, 0.95).unwrap();
        let (means, _) = full_resamples(s.sorted(), 100_000, &mut SplitMix64(3));
        let resampled = percentiles(means, 0.95).unwrap();
        let m = s.moments().unwrap();
        let se = (m.m2 / n as f64).sqrt();
        let z = normal_quantile(0.975);
        let (plain_low, plain_high) = (m.mean - z * se, m.mean + z * se);
        for (with_terms, plain, target) in [
            (expanded.low, plain_low, resampled.low),
            (expanded.high, plain_high, resampled.high),
        ] {
            let (off, plain_off) = ((with_terms - target) / se, (plain - target) / se);
            // Seen: 0.005 and 0.001 se off with the terms, 0.15 without.
            assert!(off.abs() < 0.03, "{off}");
            assert!(plain_off.abs() > 0.1, "{plain_off}");
        }
    }

    #[test]
    fn short_columns_get_the_exact_methods() {
        let s = skewed(500);
        let b = bootstrap_intervals(&s, DEFAULT_RESAMPLES, 0.95, DEFAULT_SEED).unwrap();
        assert_eq!(b.method, BootstrapMethod::Exact);
        assert_eq!(method_for(EXACT_UP_TO), BootstrapMethod::Exact);
        assert_eq!(method_for(EXACT_UP_TO + 1), BootstrapMethod::Direct);
    }

    /// Columns of several shapes and lengths: normal-like, skewed,
    /// very skewed (squared exponential), with ties (few distinct values)
    /// and with one far outlier.
    fn shapes(n: usize) -> Vec<(&'static str, Sample)> {
        let q = |i: usize| (i as f64 + 0.5) / n as f64;
        let mut rng = SplitMix64(n as u64);
        let mut shuffled: Vec<f64> = (0..n).map(|i| normal_quantile(q(i))).collect();
        shuffled.iter_mut().for_each(|x| *x += 0.01 * rng.uniform());
        vec![
            ("normal", Sample::from_values(shuffled)),
            ("skewed", skewed(n)),
            (
                "very skewed",
                Sample::from_values((0..n).map(|i| (1.0 - q(i)).ln().powi(2))),
            ),
            (
                "ties",
                Sample::from_values((0..n).map(|i| ((i * 7) % 5) as f64)),
            ),
            (
                "outlier",
                Sample::from_values((0..n).map(|i| if i == 0 { 50.0 } else { q(i) })),
            ),
        ]
    }

    /// The exact and saddlepoint intervals against full resampling of the
    /// same column with 20,000 resamples, whose Monte Carlo error at the
    /// 2.5% point is about 0.03 bootstrap standard errors (2000 resamples:
    /// 0.1). Stated tolerances:
    /// - the mean: 0.1 se (seen: at most 0.085, at n = 11 with ties; Davison
    ///   and Hinkley 1988 report saddlepoint errors of this size from
    ///   n = 10 on). With one value far out, the resampled means form
    ///   separate clusters, one per number of times that value is drawn;
    ///   the saddlepoint smooths over them and was seen up to 0.30 se off
    ///   at the upper end (n = 60), so there the tolerance is 0.35 se.
    /// - the median: the distance to the neighbouring possible medians
    ///   either side (its distribution has atoms, and a percentile of
    ///   20,000 draws lands on a neighbour of the exact point about as
    ///   often as on it; seen: equal up to n = 201, within 0.04 se above).
    #[test]
    fn exact_methods_agree_with_full_resampling() {
        let resamples = 20_000;
        for n in [10, 11, 25, 60, 201, 1000] {
            for (shape, s) in shapes(n) {
                let b = bootstrap_intervals(&s, DEFAULT_RESAMPLES, 0.95, DEFAULT_SEED).unwrap();
                let (means, medians) =
                    full_resamples(s.sorted(), resamples, &mut SplitMix64(DEFAULT_SEED));
                let (mean, median) = (
                    percentiles(means, 0.95).unwrap(),
                    percentiles(medians, 0.95).unwrap(),
                );
                let se_mean =
                    s.sd(super::super::Denominator::Population).unwrap() / (n as f64).sqrt();
                let tolerance = if shape == "outlier" { 0.35 } else { 0.1 };
                for (got, want) in [(b.mean.low, mean.low), (b.mean.high, mean.high)] {
                    let off = (got - want) / se_mean;
                    assert!(
                        off.abs() < tolerance,
                        "{shape} n = {n}: mean {got} vs {want}, {off} se"
                    );
                }
                let sorted = s.sorted();
                for (got, want) in [(b.median.low, median.low), (b.median.high, median.high)] {
                    let allowed = neighbour_step(sorted, want) + 1e-12;
                    assert!(
                        (got - want).abs() <= allowed,
                        "{shape} n = {n}: median {got} vs {want} (allowed {allowed})"
                    );
                }
            }
        }
    }

    /// The largest gap from `x` to the nearest possible resampled median
    /// on either side (midpoints of neighbouring sorted values included).
    fn neighbour_step(sorted: &[f64], x: f64) -> f64 {
        let i = sorted.partition_point(|&v| v < x).min(sorted.len() - 1);
        let below = sorted[i.saturating_sub(1)];
        let above = sorted[(i + 1).min(sorted.len() - 1)];
        (x - below).abs().max((above - x).abs())
    }

    /// The saddlepoint's cost must not hide a wrong tail: on a very skewed
    /// short column its interval leans the way resampling's does, far
    /// from the symmetric normal interval.
    #[test]
    fn saddlepoint_mean_leans_with_the_skew() {
        let (_, s) = shapes(25).swap_remove(2);
        let b = bootstrap_intervals(&s, DEFAULT_RESAMPLES, 0.95, DEFAULT_SEED).unwrap();
        let mean = s.mean().unwrap();
        assert!(
            b.mean.high - mean > 1.3 * (mean - b.mean.low),
            "{:?} about {mean}",
            b.mean
        );
    }
}
