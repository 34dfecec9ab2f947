//! Seeded bootstrap percentile intervals for the mean and the median.
//!
//! Each resample draws n indexes into the sorted values with replacement.
//! Counting how often each index was drawn gives the resample's sum and,
//! by walking the counts in order, its median, with no sort per resample.
//! The generator is written here (SplitMix64, Steele, Lea and Flood 2014)
//! so the same seed gives the same interval on every machine and version.

use super::quantile::{QuantileMethod, quantile_sorted};
use super::sample::Sample;
use super::undefined::{Stat, need};

pub const DEFAULT_RESAMPLES: usize = 2000;
/// Draws one interval may cost: above this, fewer resamples are taken
/// (never fewer than [`MIN_RESAMPLES`]), so a column of 10^6 values does
/// not take minutes. The robustness sheet states the count used.
pub const DRAW_BUDGET: usize = 20_000_000;
pub const MIN_RESAMPLES: usize = 100;

/// Resamples for a column of n values under the draw budget.
pub fn resamples_for(n: usize) -> usize {
    (DRAW_BUDGET / n.max(1)).clamp(MIN_RESAMPLES, DEFAULT_RESAMPLES)
}
/// Fixed so that reruns on the same data agree to the last digit.
pub const DEFAULT_SEED: u64 = 0x5EAF_2026;

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Interval {
    pub low: f64,
    pub high: f64,
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BootstrapIntervals {
    pub mean: Interval,
    pub median: Interval,
    pub resamples: usize,
    pub level: f64,
    pub seed: u64,
}

/// A small, fixed pseudo-random generator (SplitMix64), so seeded results
/// are the same on every machine; also used by the demo and benchmark data.
pub struct SplitMix64(pub u64);

impl SplitMix64 {
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform in [0, 1).
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }

    /// Uniform in 0..n without modulo bias (Lemire 2019, multiply and reject).
    #[cfg(test)]
    fn below(&mut self, n: u64) -> u64 {
        self.below_with(n, n.wrapping_neg() % n)
    }

    /// As `below`, with the rejection threshold (2^64 mod n) computed once by the caller.
    #[inline]
    fn below_with(&mut self, n: u64, threshold: u64) -> u64 {
        loop {
            let wide = u128::from(self.next_u64()) * u128::from(n);
            if (wide as u64) >= threshold {
                return (wide >> 64) as u64;
            }
        }
    }
}

/// Percentile intervals at `level` (0.95 for 95%): the (1-level)/2 and
/// (1+level)/2 quantiles (type 7) of the resampled means and medians.
pub fn bootstrap_intervals(
    sample: &Sample,
    resamples: usize,
    level: f64,
    seed: u64,
) -> Stat<BootstrapIntervals> {
    need(sample.count(), 1)?;
    need(resamples, 2)?;
    let sorted = sample.sorted();
    let n = sorted.len();
    let mut rng = SplitMix64(seed);
    let mut counts = vec![0u32; n];
    let mut means = Vec::with_capacity(resamples);
    let mut medians = Vec::with_capacity(resamples);
    let threshold = (n as u64).wrapping_neg() % n as u64;
    for _ in 0..resamples {
        counts.fill(0);
        for _ in 0..n {
            counts[rng.below_with(n as u64, threshold) as usize] += 1;
        }
        let (sum, median) = sum_and_median(sorted, &counts);
        // A mean lies within the data's range; rounding of c x / n must not push it out.
        means.push((sum / n as f64).clamp(sorted[0], sorted[n - 1]));
        medians.push(median);
    }
    let interval = |mut stats: Vec<f64>| -> Stat<Interval> {
        stats.sort_unstable_by(f64::total_cmp);
        let method = QuantileMethod::HyndmanFan(7);
        Ok(Interval {
            low: quantile_sorted(&stats, (1.0 - level) / 2.0, method)?,
            high: quantile_sorted(&stats, (1.0 + level) / 2.0, method)?,
        })
    };
    Ok(BootstrapIntervals {
        mean: interval(means)?,
        median: interval(medians)?,
        resamples,
        level,
        seed,
    })
}

/// The sum and the median of a resample, in one pass over the counts. The
/// sum is plain (a resampled mean needs no more than about 13 digits); the
/// loop has no data-dependent branch until the middle rank is reached.
fn sum_and_median(sorted: &[f64], counts: &[u32]) -> (f64, f64) {
    let n = sorted.len();
    let (lower_rank, upper_rank) = ((n - 1) / 2, n / 2);
    let mut seen = 0usize;
    let mut i = 0;
    let mut sum = 0.0;
    // Up to the lower middle rank: only sum and count.
    while i < n && seen + counts[i] as usize <= lower_rank {
        sum += sorted[i] * f64::from(counts[i]);
        seen += counts[i] as usize;
        i += 1;
    }
    let lower = sorted[i.min(n - 1)];
    let mut j = i;
    while j < n && seen + counts[j] as usize <= upper_rank {
        sum += sorted[j] * f64::from(counts[j]);
        seen += counts[j] as usize;
        j += 1;
    }
    let upper = sorted[j.min(n - 1)];
    for k in j..n {
        sum += sorted[k] * f64::from(counts[k]);
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
    fn generator_is_uniform_enough_and_in_range() {
        let mut rng = SplitMix64(1);
        let mut hits = [0usize; 7];
        for _ in 0..70_000 {
            hits[rng.below(7) as usize] += 1;
        }
        // Each cell expects 10,000; 4 sd of a binomial is about 370.
        assert!(
            hits.iter().all(|&h| (9_600..10_400).contains(&h)),
            "{hits:?}"
        );
    }

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
            let (sum, median) = sum_and_median(&sorted, &counts);
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

    #[test]
    fn same_seed_same_interval() {
        let s = Sample::from_values((1..=50).map(|i| f64::from(i * i % 17)));
        let a = bootstrap_intervals(&s, 500, 0.95, DEFAULT_SEED).unwrap();
        let b = bootstrap_intervals(&s, 500, 0.95, DEFAULT_SEED).unwrap();
        assert_eq!(a, b);
        let c = bootstrap_intervals(&s, 500, 0.95, DEFAULT_SEED + 1).unwrap();
        assert_ne!(a.mean, c.mean);
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
}
