//! Mean, variance and the shape statistics, from one set of central moments.
//!
//! The mean is a compensated sum divided by n, then corrected by the mean of
//! the deviations from it (the corrected two-pass algorithm, Chan, Golub and
//! LeVeque 1983). The power sums of the deviations are added in blocks of 64
//! whose sums are then compensated (blocked summation, error bounded by the
//! block length rather than n), so data with a large common offset (NIST
//! NumAcc4) and columns of 10^6 values keep their digits.

use super::sample::Sample;
use super::summation::Neumaier;
use super::undefined::{Stat, Undefined, need};

/// Central moments m_k = (1/n) sum (x - mean)^k.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Moments {
    pub n: usize,
    pub mean: f64,
    pub m2: f64,
    pub m3: f64,
    pub m4: f64,
}

impl Moments {
    /// Needs at least one value; the caller checks.
    pub(crate) fn of(values: &[f64]) -> Moments {
        let n = values.len() as f64;
        let rough_mean = Neumaier::of(values.iter().copied()) / n;
        // Power sums in blocks: plain sums over BLOCK values (error at most
        // BLOCK ulps of the block's size), the block sums then compensated,
        // so a long column loses no more than a short one.
        const BLOCK: usize = 64;
        let mut sums = [Neumaier::default(); 4];
        for block in values.chunks(BLOCK) {
            let mut partial = [0.0f64; 4];
            for &x in block {
                let d = x - rough_mean;
                let d2 = d * d;
                partial[0] += d;
                partial[1] += d2;
                partial[2] += d2 * d;
                partial[3] += d2 * d2;
            }
            for (sum, p) in sums.iter_mut().zip(partial) {
                sum.add(p);
            }
        }
        let [s1, s2, s3, s4] = sums.map(|s| s.total() / n);
        // Move the moments from the rough mean to the corrected one (c is tiny).
        let c = s1;
        Moments {
            n: values.len(),
            mean: rough_mean + c,
            m2: (s2 - c * c).max(0.0),
            m3: s3 - 3.0 * c * s2 + 2.0 * c * c * c,
            m4: s4 - 4.0 * c * s3 + 6.0 * c * c * s2 - 3.0 * c * c * c * c,
        }
    }
}

/// Whether variance divides by n - 1 (sample, the default) or by n.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Denominator {
    #[default]
    Sample,
    Population,
}

impl Sample {
    pub fn variance(&self, denominator: Denominator) -> Stat {
        let needed = match denominator {
            Denominator::Sample => 2,
            Denominator::Population => 1,
        };
        need(self.count(), needed)?;
        let m = self.moments()?;
        let n = m.n as f64;
        Ok(match denominator {
            Denominator::Sample => m.m2 * n / (n - 1.0),
            Denominator::Population => m.m2,
        })
    }

    pub fn sd(&self, denominator: Denominator) -> Stat {
        Ok(self.variance(denominator)?.sqrt())
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
        let g1 = m.m3 / m.m2.powf(1.5);
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
        let g2 = m.m4 / (m.m2 * m.m2) - 3.0;
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
}
