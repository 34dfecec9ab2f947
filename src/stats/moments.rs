//! Mean, variance and the shape statistics, from one set of central moments.
//!
//! The mean is a compensated sum divided by n, then corrected by the mean of
//! the deviations from it (the corrected two-pass algorithm, Chan, Golub and
//! LeVeque 1983). The correction is itself exact where the doubles allow:
//! each deviation's rounding error is recovered by TwoSum and the deviations
//! and their errors are summed with compensation, so {1e17, -1e17, 5} has
//! the mean 5/3, not what the rounded deviations of 1e17 happen to add to.
//!
//! Every value is first scaled by a power of two (exact) so the power sums
//! cannot overflow: the deviations are then rescaled so the largest lies in
//! [1, 2), and the moments are kept in those units with the exponent beside
//! them. So the sd of {1e154, -1e154} is 1.41e154 (the plain fourth powers
//! would overflow), and shape statistics, being scale-free, never overflow.
//! For ordinary data the scaling changes no bit of any result.
//!
//! The power sums of the deviations are added in blocks of 64 whose sums are
//! then compensated (blocked summation, error bounded by the block length
//! rather than n), so data with a large common offset (NIST NumAcc4) and
//! columns of 10^6 values keep their digits.

use super::sample::Sample;
use super::summation::{ExactSum, Neumaier, two_sum};
use super::undefined::{Stat, Undefined, need};

/// Central moments m_k = (1/n) sum (x - mean)^k.
///
/// `m2`, `m3` and `m4` are the moments in the data's own units; they are
/// infinite when the deviations are too large for a double's range (beyond
/// about 1e154, 1e102, 1e77). The methods below work from the scaled
/// moments, which are always finite.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Moments {
    /// The number of values.
    pub n: usize,
    /// The mean.
    pub mean: f64,
    /// The second central moment (the population variance), unscaled; may be infinite for huge data.
    pub m2: f64,
    /// The third central moment, unscaled.
    pub m3: f64,
    /// The fourth central moment, unscaled.
    pub m4: f64,
    /// m2, m3, m4 of the deviations divided by 2^`scale_exponent`.
    scaled: [f64; 3],
    scale_exponent: i32,
}

/// `x` times 2^`exponent`, exact unless the result leaves the double range.
fn times_power_of_two(x: f64, exponent: i32) -> f64 {
    libm::scalbn(x, exponent)
}

/// The function x -> x times 2^`exponent`, bit for bit `times_power_of_two`.
/// When 2^`exponent` is a normal double, scalbn is one multiplication by
/// it; made here once, the per-value passes multiply inline (a call per
/// value was a fifth of the moments' time) and fall back to scalbn otherwise.
fn power_of_two_scaler(exponent: i32) -> impl Fn(f64) -> f64 {
    let factor = (-1022..=1023)
        .contains(&exponent)
        .then(|| f64::from_bits(((1023 + exponent) as u64) << 52));
    move |x| match factor {
        Some(f) => x * f,
        None => times_power_of_two(x, exponent),
    }
}

/// The exponent e with 2^e <= |x| < 2^(e+1), for a finite non-zero x.
fn binary_exponent(x: f64) -> i32 {
    libm::ilogb(x)
}

impl Moments {
    /// Needs at least one value; the caller checks.
    pub(crate) fn of(values: &[f64]) -> Moments {
        let n = values.len() as f64;
        let largest = values.iter().fold(0.0f64, |m, x| m.max(x.abs()));
        // Values scaled into (-1, 1): sums and deviations cannot overflow.
        let value_exponent = if largest > 0.0 && largest.is_finite() {
            binary_exponent(largest) + 1
        } else {
            0
        };
        let scaled = power_of_two_scaler(-value_exponent);
        let (mut sum, mut size) = (Neumaier::default(), 0.0);
        for &x in values {
            sum.add(scaled(x));
            size += scaled(x).abs();
        }
        let rough_mean = sum.total() / n;
        let (mut correction, largest_deviation) = mean_correction(values, &scaled, rough_mean);
        if ill_conditioned(sum.total(), size, n) {
            correction = exact_residual(values, &scaled, rough_mean) / n;
        }
        // Deviations rescaled so the largest lies in [1, 2) (exact: a power of two).
        let deviation_exponent = if largest_deviation > 0.0 && largest_deviation.is_finite() {
            binary_exponent(largest_deviation)
        } else {
            0
        };
        let unit = power_of_two_scaler(-deviation_exponent);
        let [s2, s3, s4] = power_sums(values, |x| unit(scaled(x) - rough_mean), n);
        // Move the moments from the rough mean to the corrected one (c is tiny).
        let c = unit(correction);
        let m2 = (s2 - c * c).max(0.0);
        let m3 = s3 - 3.0 * c * s2 + 2.0 * c * c * c;
        let m4 = s4 - 4.0 * c * s3 + 6.0 * c * c * s2 - 3.0 * c * c * c * c;
        let e = deviation_exponent + value_exponent;
        Moments {
            n: values.len(),
            mean: times_power_of_two(rough_mean + correction, value_exponent),
            m2: times_power_of_two(m2, 2 * e),
            m3: times_power_of_two(m3, 3 * e),
            m4: times_power_of_two(m4, 4 * e),
            scaled: [m2, m3, m4],
            scale_exponent: e,
        }
    }

    /// The population sd, sqrt(m2), finite whenever the data are.
    pub fn sd_population(&self) -> f64 {
        self.sd_times(1.0)
    }

    /// sqrt(m2 `factor`), from the scaled moments (finite whenever the data are).
    fn sd_times(&self, factor: f64) -> f64 {
        times_power_of_two((self.scaled[0] * factor).sqrt(), self.scale_exponent)
    }

    /// The variance with `m2` times `factor` (n / (n - 1) for the sample
    /// variance); none when it is beyond the largest double.
    fn variance_times(&self, factor: f64) -> Stat {
        let v = times_power_of_two(self.scaled[0] * factor, 2 * self.scale_exponent);
        if v.is_finite() {
            Ok(v)
        } else {
            Err(Undefined::BeyondDoubleRange)
        }
    }

    /// The moment skewness g1 = m3 / m2^1.5 (NaN when m2 is zero).
    pub fn g1(&self) -> f64 {
        self.scaled[1] / self.scaled[0].powf(1.5)
    }

    /// The excess kurtosis g2 = m4 / m2^2 - 3 (NaN when m2 is zero).
    pub fn g2(&self) -> f64 {
        self.scaled[2] / (self.scaled[0] * self.scaled[0]) - 3.0
    }
}

/// The mean of the exact deviations from `rough_mean` (in scaled units),
/// and the largest deviation. Each deviation's rounding error is recovered
/// (TwoSum) and the deviations are summed with compensation, the errors
/// (each below half an ulp of its value) in plain blocks.
fn mean_correction(values: &[f64], scaled: &impl Fn(f64) -> f64, rough_mean: f64) -> (f64, f64) {
    let mut deviations = Neumaier::default();
    let mut errors = Neumaier::default();
    let mut largest = 0.0f64;
    for block in values.chunks(BLOCK) {
        let mut block_errors = 0.0;
        for &x in block {
            let (d, error) = two_sum(scaled(x), -rough_mean);
            deviations.add(d);
            block_errors += error;
            largest = largest.max(d.abs());
        }
        errors.add(block_errors);
    }
    let n = values.len() as f64;
    ((deviations.total() + errors.total()) / n, largest)
}

/// Whether a sum of this size (the sum of absolute values) cancels so far
/// that the compensated correction may miss a quarter ulp of the mean: its
/// error is about n eps^2 size against the ulp's eps |sum| (the bound of
/// compensated summation, Higham 2002, section 4.3). Ordinary columns,
/// even centred on zero, stay far from it; {1e17, -1e17, 5} does not.
fn ill_conditioned(sum: f64, size: f64, n: f64) -> bool {
    n * f64::EPSILON * size > sum.abs() / 64.0
}

/// The exact sum(x - rough_mean) in scaled units, rounded once: the values
/// and -n rough_mean (split exactly by a fused multiply-add) added exactly.
fn exact_residual(values: &[f64], scaled: &impl Fn(f64) -> f64, rough_mean: f64) -> f64 {
    let mut exact = ExactSum::default();
    for &x in values {
        exact.add(scaled(x));
    }
    let n = values.len() as f64;
    let product = n * rough_mean;
    exact.add(-product);
    exact.add(-n.mul_add(rough_mean, -product));
    exact.total()
}

/// Block length of the blocked power sums.
const BLOCK: usize = 64;

/// (1/n) sum d^k for k = 2, 3, 4, with `deviation` giving each d: plain sums
/// over BLOCK values (error at most BLOCK ulps of the block's size), the
/// block sums then compensated, so a long column loses no more than a short one.
fn power_sums(values: &[f64], deviation: impl Fn(f64) -> f64, n: f64) -> [f64; 3] {
    let mut sums = [Neumaier::default(); 3];
    for block in values.chunks(BLOCK) {
        let mut partial = [0.0f64; 3];
        for &x in block {
            let d = deviation(x);
            let d2 = d * d;
            partial[0] += d2;
            partial[1] += d2 * d;
            partial[2] += d2 * d2;
        }
        for (sum, p) in sums.iter_mut().zip(partial) {
            sum.add(p);
        }
    }
    sums.map(|s| s.total() / n)
}

/// Whether variance divides by n - 1 (sample, the default) or by n.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Denominator {
    /// Divide by n - 1 (the default).
    #[default]
    Sample,
    /// Divide by n.
    Population,
}

/// m2 times this is the variance: n / (n - 1) for the sample variance.
fn variance_factor(n: usize, denominator: Denominator) -> f64 {
    let n = n as f64;
    match denominator {
        Denominator::Sample => n / (n - 1.0),
        Denominator::Population => 1.0,
    }
}

impl Sample {
    /// The variance; none when it is beyond the largest double (the sd then still has one).
    pub fn variance(&self, denominator: Denominator) -> Stat {
        let m = self.moments_for(denominator)?;
        m.variance_times(variance_factor(m.n, denominator))
    }

    /// The sd, from the scaled moments: finite even where the variance is not.
    pub fn sd(&self, denominator: Denominator) -> Stat {
        let m = self.moments_for(denominator)?;
        Ok(m.sd_times(variance_factor(m.n, denominator)))
    }

    /// The moments, once there are enough values for a variance.
    fn moments_for(&self, denominator: Denominator) -> Stat<&Moments> {
        let needed = match denominator {
            Denominator::Sample => 2,
            Denominator::Population => 1,
        };
        need(self.count(), needed)?;
        self.moments()
    }

    fn shape_moments(&self, needed: usize) -> Stat<&Moments> {
        need(self.count(), needed)?;
        if self.is_constant() {
            return Err(Undefined::ConstantColumn);
        }
        self.moments()
    }

    /// Moment skewness g1 = m3 / m2^1.5; `adjusted` gives
    /// G1 = g1 sqrt(n (n - 1)) / (n - 2) (Joanes and Gill 1998), which needs n >= 3.
    pub fn skewness(&self, adjusted: bool) -> Stat {
        let m = self.shape_moments(if adjusted { 3 } else { 2 })?;
        let g1 = m.g1();
        if !adjusted {
            return Ok(g1);
        }
        let n = m.n as f64;
        Ok(g1 * (n * (n - 1.0)).sqrt() / (n - 2.0))
    }

    /// Moment kurtosis b2 = m4 / m2^2 (about 3 for normal data); `adjusted`
    /// gives G2 + 3, see [`Sample::excess_kurtosis`].
    pub fn kurtosis(&self, adjusted: bool) -> Stat {
        Ok(self.excess_kurtosis(adjusted)? + 3.0)
    }

    /// Excess kurtosis g2 = b2 - 3; `adjusted` gives
    /// G2 = ((n + 1) g2 + 6) (n - 1) / ((n - 2)(n - 3)) (Joanes and Gill 1998), which needs n >= 4.
    pub fn excess_kurtosis(&self, adjusted: bool) -> Stat {
        let m = self.shape_moments(if adjusted { 4 } else { 2 })?;
        let g2 = m.g2();
        if !adjusted {
            return Ok(g2);
        }
        let n = m.n as f64;
        Ok(((n + 1.0) * g2 + 6.0) * (n - 1.0) / ((n - 2.0) * (n - 3.0)))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-12 * b.abs().max(1.0)
    }

    #[test]
    fn the_inline_scaler_is_scalbn_bit_for_bit() {
        let values = [
            1.0,
            -3.75,
            0.1,
            1e300,
            -1e-300,
            f64::MIN_POSITIVE,
            5e-324,
            f64::MAX,
            0.0,
            -0.0,
        ];
        for exponent in [
            -1100, -1075, -1023, -1022, -60, -7, 0, 7, 60, 1023, 1024, 1100,
        ] {
            let scale = power_of_two_scaler(exponent);
            for x in values {
                let (fast, slow) = (scale(x), times_power_of_two(x, exponent));
                assert_eq!(fast.to_bits(), slow.to_bits(), "{x} * 2^{exponent}");
            }
        }
    }

    // Hand-checkable from the definitions: x = 1, 2, 3, 4, 10 has mean 4,
    // deviations -3 -2 -1 0 6, so m2 = 50/5 = 10, m3 = (-27-8-1+216)/5 = 36,
    // m4 = (81+16+1+1296)/5 = 278.8.
    #[test]
    fn moments_of_a_small_skewed_set() {
        let s = Sample::from_values([1.0, 2.0, 3.0, 4.0, 10.0]);
        let m = s.moments().unwrap();
        assert!(close(m.mean, 4.0) && close(m.m2, 10.0) && close(m.m3, 36.0) && close(m.m4, 278.8));
        assert!(close(s.variance(Denominator::Sample).unwrap(), 12.5));
        assert!(close(s.variance(Denominator::Population).unwrap(), 10.0));
        assert!(close(s.skewness(false).unwrap(), 36.0 / 10f64.powf(1.5)));
        assert!(close(s.kurtosis(false).unwrap(), 2.788));
        // G1 = g1 * sqrt(20) / 3; G2 = ((6 * (2.788 - 3)) + 6) * 4 / (3 * 2).
        assert!(close(
            s.skewness(true).unwrap(),
            36.0 / 10f64.powf(1.5) * 20f64.sqrt() / 3.0
        ));
        assert!(close(
            s.excess_kurtosis(true).unwrap(),
            (6.0 * (2.788 - 3.0) + 6.0) * 4.0 / 6.0
        ));
    }

    #[test]
    fn shape_of_a_constant_column_is_undefined() {
        let s = Sample::from_values([0.1; 50]);
        assert_eq!(s.skewness(false), Err(Undefined::ConstantColumn));
        assert_eq!(s.kurtosis(true), Err(Undefined::ConstantColumn));
        assert_eq!(s.sd(Denominator::Sample), Ok(0.0));
    }

    #[test]
    fn adjusted_forms_need_enough_values() {
        let s = Sample::from_values([1.0, 2.0, 4.0]);
        assert!(s.skewness(true).is_ok());
        assert_eq!(
            s.excess_kurtosis(true),
            Err(Undefined::TooFewValues { needed: 4, have: 3 })
        );
        let one = Sample::from_values([5.0]);
        assert_eq!(
            one.variance(Denominator::Sample),
            Err(Undefined::TooFewValues { needed: 2, have: 1 })
        );
        assert_eq!(one.variance(Denominator::Population), Ok(0.0));
    }

    // Extremes, checked against exact rationals. The data are integers, so the
    // exact mean is a ratio p/q; IEEE 754 division is correctly rounded, so
    // p as f64 / q as f64 (both exact here) is the double nearest the true mean.
    #[test]
    fn means_with_cancelling_large_values_are_correctly_rounded() {
        for (values, p, q) in [
            (vec![1e15, 1.0, -1e15], 1.0, 3.0),
            (vec![1e17, -1e17, 5.0], 5.0, 3.0),
            (vec![1e17, 3.0, -1e17, 5.0, 1e16, -1e16, 1.0], 9.0, 7.0),
            (vec![-1e300, 7.0, 1e300], 7.0, 3.0),
        ] {
            let s = Sample::from_values(values.clone());
            assert_eq!(s.mean().unwrap(), p / q, "{values:?}");
        }
    }

    // sd of {x, -x}: mean 0, sample variance (x^2 + x^2) / 1 = 2 x^2, so the
    // sd is sqrt(2) |x| exactly; the doubles allow it within 1 ulp. Plain
    // fourth powers of 1e154 overflow, which once made this sd 0.
    #[test]
    fn sd_of_huge_values_does_not_overflow() {
        for x in [1e154, 1e200, 1e307, f64::MAX / 2.0] {
            let s = Sample::from_values([x, -x]);
            let sd = s.sd(Denominator::Sample).unwrap();
            let exact = std::f64::consts::SQRT_2 * x;
            assert!(
                (sd - exact).abs() <= 2.0 * f64::EPSILON * exact,
                "{x}: {sd}"
            );
            // sd_pop = |x|; g1 = 0 and b2 = 1 for two points (from the definitions).
            assert_eq!(s.sd(Denominator::Population).unwrap(), x);
            assert_eq!(s.skewness(false).unwrap(), 0.0);
            assert!((s.kurtosis(false).unwrap() - 1.0).abs() < 1e-15);
        }
        // 2 (1e200)^2 is beyond the double range: the variance says so, never NaN or 0.
        let s = Sample::from_values([1e200, -1e200]);
        assert_eq!(
            s.variance(Denominator::Sample),
            Err(Undefined::BeyondDoubleRange)
        );
    }

    // Tiny values scale up exactly: {3e-320, 1e-320} (subnormal) has mean
    // 2e-320 and population sd 1e-320, to the subnormal spacing.
    #[test]
    fn tiny_values_keep_their_moments() {
        let s = Sample::from_values([3e-320, 1e-320]);
        assert_eq!(s.mean().unwrap(), 2e-320);
        assert_eq!(s.sd(Denominator::Population).unwrap(), 1e-320);
        let s = Sample::from_values([1e-200, 2e-200, 4e-200]);
        let skew = s.skewness(false).unwrap();
        let t = Sample::from_values([1.0, 2.0, 4.0]);
        assert!((skew - t.skewness(false).unwrap()).abs() < 1e-14);
    }
}
