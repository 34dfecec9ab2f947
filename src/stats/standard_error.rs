//! Standard errors of single figures, for judging a change between two
//! periods against sampling noise: the standard error of a difference of
//! two independent figures is sqrt(se1^2 + se2^2). Each is computed from
//! one period's values alone, so it can be kept in that period's Record.
//!
//! | figure | standard error | source |
//! |---|---|---|
//! | mean | s / sqrt(n) | the usual; the difference is Welch's (1947) denominator |
//! | share p of n rows | sqrt(p (1 - p) / n) | the binomial's sd over n |
//! | sd | sqrt(Var(s^2)) / (2 s), Var(s^2) = m4/n - m2^2 (n-3)/(n(n-1)) | the variance of the sample variance with the data's moments, then the delta method |
//! | median, quartile, percentile | Maritz and Jarrett (1978) | distribution-free, from beta-weighted order statistics |
//! | trimmed mean | s_w / ((1 - 2a) sqrt(n)), s_w the winsorized sd | Tukey and McLaughlin (1963) |
//!
//! None needs resampling: each costs at most a pass over part of the
//! sorted values the sample already holds.

use std::cell::RefCell;

use super::memo::{Memo, remembered};
use super::order::cut_count;
use super::sample::Sample;
use super::undefined::{Stat, Undefined, need};

/// s / sqrt(n), the standard error of a mean (n >= 2).
pub fn mean_se(s: &Sample) -> Stat {
    need(s.count(), 2)?;
    Ok(s.sd(super::Denominator::Sample)? / (s.count() as f64).sqrt())
}

/// sqrt(p (1 - p) / n): the sd of a binomial count over n, the standard
/// error of a share p of n rows.
pub fn share_se(p: f64, n: usize) -> Stat {
    need(n, 1)?;
    if !(0.0..=1.0).contains(&p) {
        return Err(Undefined::ShareOutside(p));
    }
    Ok((p * (1.0 - p) / n as f64).sqrt())
}

/// The standard error of the sample sd s. The variance of the sample
/// variance is mu4/n - sigma^4 (n-3)/(n(n-1)) for any distribution with a
/// fourth moment (Cramer 1946, Mathematical Methods of Statistics, 27.4;
/// the formula typed from memory and checked in tests/reference: with the
/// data's own m2 and m4 it is exactly the variance of s^2 over every
/// resample of the data, computed there by enumeration); the delta method
/// gives the sd's: sqrt(Var(s^2)) / (2 s). n >= 4.
pub fn sd_se(s: &Sample) -> Stat {
    need(s.count(), 4)?;
    let m = s.moments()?;
    let sd = s.sd(super::Denominator::Sample)?;
    if sd == 0.0 {
        return Err(Undefined::ConstantColumn);
    }
    Ok(variance_of_variance(m.n, m.m2, m.m4).sqrt() / (2.0 * sd))
}

/// mu4/n - mu2^2 (n-3)/(n(n-1)), from the population moments m2 and m4;
/// never below 0 (rounding on near-constant data).
pub fn variance_of_variance(n: usize, m2: f64, m4: f64) -> f64 {
    let n = n as f64;
    (m4 / n - m2 * m2 * (n - 3.0) / (n * (n - 1.0))).max(0.0)
}

/// The Tukey-McLaughlin standard error of the trimmed mean cutting
/// floor(a n) values from each end: the sample sd of the winsorized values
/// (the cut ones replaced by the nearest kept one) over (1 - 2a) sqrt(n)
/// (Tukey and McLaughlin 1963, Sankhya A 25; as in scipy's
/// `mstats.trimmed_stde`, the reference of the check). n >= 2.
pub fn trimmed_mean_se(s: &Sample, share: f64) -> Stat {
    let sorted = s.sorted();
    need(sorted.len(), 2)?;
    let n = sorted.len();
    let g = cut_count(share, n)?;
    let (low, high) = (sorted[g], sorted[n - 1 - g]);
    let winsorized = |i: usize| sorted[i].clamp(low, high);
    // About a middle value, so data far from zero keep their digits.
    let centre = sorted[n / 2];
    let mean = (0..n).map(|i| winsorized(i) - centre).sum::<f64>() / n as f64;
    let ss: f64 = (0..n)
        .map(|i| (winsorized(i) - centre - mean).powi(2))
        .sum();
    let winsorized_sd = (ss / (n as f64 - 1.0)).sqrt();
    Ok(winsorized_sd / ((1.0 - 2.0 * share) * (n as f64).sqrt()))
}

/// The Maritz-Jarrett standard error of the p-quantile (Maritz and
/// Jarrett 1978, "A note on estimating the variance of the sample median",
/// JASA 73): with m = floor(p n + 0.5) and W_i the probability that a
/// Beta(m - 1, n - m) variable falls in ((i - 1)/n, i/n], C_k = sum W_i
/// x(i)^k and the standard error is sqrt(C2 - C1^2). The same as scipy's
/// `mstats.mjci` (the reference of the check). Needs 2 <= m <= n - 1.
pub fn quantile_se(s: &Sample, p: f64) -> Stat {
    let sorted = s.sorted();
    let n = sorted.len();
    need(n, 3)?;
    let m = (p * n as f64 + 0.5).floor() as usize;
    if m < 2 || m + 1 > n {
        return Err(Undefined::TooFewAroundPercentile { level: p, have: n });
    }
    // The weights depend on n and m alone: the columns of a group share them.
    let weights = remembered!(WEIGHTS, (n, m), || {
        BetaCells::new((m - 1) as f64, (n - m) as f64, n)
            .cells()
            .collect::<Vec<_>>()
    });
    Ok(maritz_jarrett(sorted, m, weights.iter().copied()))
}

/// Each cell's (index of the sorted value, weight).
type Cells = Vec<(usize, f64)>;

thread_local! {
    /// The last cells' weights made, by (n, m): Q1, the median and Q3 of a
    /// group's columns.
    static WEIGHTS: RefCell<Memo<(usize, usize), Cells>> = const { RefCell::new(Memo::new(6)) };
}

/// sqrt(C2 - C1^2) over the cells' (index, weight).
fn maritz_jarrett(sorted: &[f64], m: usize, cells: impl Iterator<Item = (usize, f64)>) -> f64 {
    // Moments about the m-th value, so data far from zero keep their digits.
    let centre = sorted[m - 1];
    let (mut total, mut c1, mut c2) = (0.0, 0.0, 0.0);
    for (i, w) in cells {
        let d = sorted[i] - centre;
        total += w;
        c1 += w * d;
        c2 += w * d * d;
    }
    // The weights add up to 1 but for the rounding of the log of the beta
    // function (about 1e-11 of it at n = 10^4); dividing by their sum
    // removes that.
    let (c1, c2) = (c1 / total, c2 / total);
    (c2 - c1 * c1).max(0.0).sqrt()
}

/// The probability a Beta(a, b) variable falls in each cell ((i-1)/n, i/n],
/// integrated by Gauss-Legendre quadrature. The density is a polynomial of
/// degree n - 3 here, so 8 points per cell are exact up to n = 18; beyond,
/// a cell is small against the density's spread (width over sd at most
/// 2/sqrt(m)), and fewer points reach the double's precision.
struct BetaCells {
    a: f64,
    b: f64,
    n: usize,
    log_norm: f64,
    nodes: Vec<(f64, f64)>,
    first: usize,
    last: usize,
}

impl BetaCells {
    fn new(a: f64, b: f64, n: usize) -> BetaCells {
        let log_norm = libm::lgamma(a + b) - libm::lgamma(a) - libm::lgamma(b);
        let mean = a / (a + b);
        let sd = (a * b / ((a + b).powi(2) * (a + b + 1.0))).sqrt();
        let cell_over_sd = 1.0 / (n as f64 * sd);
        // The midpoint rule biases the standard error by about
        // (cell/sd)^2 / 24 of it (as Sheppard's correction would say), under
        // 2e-7 below 0.002 (over 10^6 values near the median); the 2-point
        // rule's error is of order (cell/sd)^4, under 1e-8 below 0.05.
        let points = if cell_over_sd < 0.002 {
            1
        } else if cell_over_sd < 0.05 {
            2
        } else if cell_over_sd < 0.2 {
            4
        } else {
            8
        };
        // The cells that hold the mass: where the density is near normal
        // (both shapes 30 or more) 10 sds either side of the mean, 8 once
        // both are 1000 or more (beyond, under about 1e-14 of it); else
        // every cell.
        let shape = a.min(b);
        let (first, last) = if shape >= 30.0 {
            let z = if shape >= 1000.0 { 8.0 } else { 10.0 };
            let at = |t: f64| ((t * n as f64).floor().max(0.0) as usize).min(n - 1);
            (at(mean - z * sd), at(mean + z * sd))
        } else {
            (0, n - 1)
        };
        BetaCells {
            a,
            b,
            n,
            log_norm,
            nodes: gauss_legendre(points),
            first,
            last,
        }
    }

    /// Every cell, 8 points each: the slow form the window and the
    /// fewer points must agree with.
    #[cfg(test)]
    fn exhaustive(a: f64, b: f64, n: usize) -> BetaCells {
        BetaCells {
            nodes: gauss_legendre(8),
            first: 0,
            last: n - 1,
            ..BetaCells::new(a, b, n)
        }
    }

    fn density(&self, t: f64) -> f64 {
        ((self.a - 1.0) * t.ln() + (self.b - 1.0) * (-t).ln_1p() + self.log_norm).exp()
    }

    /// (0-based index of the sorted value, weight) for each cell in the window.
    fn cells(&self) -> impl Iterator<Item = (usize, f64)> + '_ {
        let h = 1.0 / self.n as f64;
        (self.first..=self.last).map(move |i| {
            let (left, half) = (i as f64 * h, h / 2.0);
            let w = self
                .nodes
                .iter()
                .map(|(x, weight)| weight * self.density(left + half * (1.0 + x)))
                .sum::<f64>()
                * half;
            (i, w)
        })
    }
}

/// Nodes and weights of the k-point Gauss-Legendre rule on [-1, 1], by
/// Newton's method on the Legendre polynomial from Chebyshev starting
/// points (the textbook construction, e.g. Press et al., Numerical Recipes,
/// 3rd ed., 4.6).
fn gauss_legendre(k: usize) -> Vec<(f64, f64)> {
    (0..k)
        .map(|i| {
            let mut x = (std::f64::consts::PI * (i as f64 + 0.75) / (k as f64 + 0.5)).cos();
            let mut derivative = 1.0;
            for _ in 0..100 {
                let (mut p0, mut p1) = (1.0, 0.0);
                for j in 0..k {
                    let p2 = p1;
                    p1 = p0;
                    p0 = ((2 * j + 1) as f64 * x * p1 - j as f64 * p2) / (j + 1) as f64;
                }
                derivative = k as f64 * (x * p0 - p1) / (x * x - 1.0);
                let step = p0 / derivative;
                x -= step;
                if step.abs() < 1e-16 {
                    break;
                }
            }
            (x, 2.0 / ((1.0 - x * x) * derivative * derivative))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The 2-point rule: nodes +/- 1/sqrt(3), weights 1 (exact for cubics).
    #[test]
    fn gauss_legendre_rules_integrate_polynomials_exactly() {
        let two = gauss_legendre(2);
        assert!((two[0].0.abs() - 1.0 / 3f64.sqrt()).abs() < 1e-15);
        assert!((two[0].1 - 1.0).abs() < 1e-15);
        // x^14 over [-1, 1] is 2/15; 8 points are exact to degree 15.
        let eight: f64 = gauss_legendre(8).iter().map(|(x, w)| w * x.powi(14)).sum();
        assert!((eight - 2.0 / 15.0).abs() < 1e-15, "{eight}");
    }

    /// The beta cells hold all the mass: their weights add up to 1.
    #[test]
    fn beta_cell_weights_add_up_to_one() {
        for (a, b, n) in [
            (1.0, 3.0, 5),
            (49.0, 50.0, 100),
            (2499.0, 7500.0, 10_000),
            (249_999.0, 750_000.0, 1_000_000),
        ] {
            let total: f64 = BetaCells::new(a, b, n).cells().map(|(_, w)| w).sum();
            // Up to the rounding of ln B(a, b), about 1e-9 of it at 10^6
            // values (quantile_se divides the sum out).
            assert!((total - 1.0).abs() < 1e-8, "{a} {b} {n}: {total}");
        }
    }

    /// For normal data, mu4 = 3 sigma^4 and Var(s^2) = 2 sigma^4 / (n - 1),
    /// the classical normal-theory result (e.g. Cramer 1946, 29.3).
    #[test]
    fn variance_of_variance_reduces_to_the_normal_case() {
        let (n, sigma2) = (25, 4.0);
        let v = variance_of_variance(n, sigma2, 3.0 * sigma2 * sigma2);
        assert!((v - 2.0 * sigma2 * sigma2 / 24.0).abs() < 1e-12, "{v}");
    }

    /// For evenly spread values (a uniform sample), the p-quantile's
    /// standard error is close to sqrt(p (1 - p) / n) (its asymptotic sd,
    /// 1/f(q) sqrt(p (1 - p) / n) with density f = 1); at 10^6 values the
    /// one-point rule is used.
    #[test]
    fn long_columns_match_the_asymptotic_standard_error() {
        for n in [2_000usize, 1_000_000] {
            let s = Sample::from_values((0..n).map(|i| (i as f64 + 0.5) / n as f64));
            for p in [0.1, 0.5, 0.75] {
                let want = (p * (1.0 - p) / n as f64).sqrt();
                let got = quantile_se(&s, p).unwrap();
                assert!(
                    (got / want - 1.0).abs() < 0.01,
                    "n {n} p {p}: {got} vs {want}"
                );
            }
        }
    }

    /// The window and the fewer points of long columns change the
    /// standard error by less than 1e-6 of it.
    #[test]
    fn the_shortcuts_for_long_columns_agree_with_every_cell() {
        // The window, and 2 points per cell, in every case; 1 point at 1.2
        // million values (4 and 8 points serve shorter columns, which the
        // reference check against scipy covers).
        for (n, ps) in [
            (5_000usize, &[0.1, 0.25, 0.5][..]),
            (50_000, &[0.1, 0.25, 0.5]),
            (400_000, &[0.1, 0.5]),
            (1_200_000, &[0.5]),
        ] {
            let s = Sample::from_values((0..n).map(|i| ((i * 7919) % n) as f64 / 1000.0));
            let sorted = s.sorted();
            for &p in ps {
                let m = (p * n as f64 + 0.5).floor() as usize;
                let (a, b) = ((m - 1) as f64, (n - m) as f64);
                let fast = maritz_jarrett(sorted, m, BetaCells::new(a, b, n).cells());
                let slow = maritz_jarrett(sorted, m, BetaCells::exhaustive(a, b, n).cells());
                assert!(
                    (fast / slow - 1.0).abs() < 1e-6,
                    "n {n} p {p}: {fast} vs {slow}"
                );
            }
        }
    }

    #[test]
    fn a_share_of_one_half_over_100_rows_has_se_one_twentieth() {
        assert_eq!(share_se(0.5, 100), Ok(0.05));
        assert!(share_se(0.5, 0).is_err());
    }

    #[test]
    fn trimming_nothing_gives_the_mean_se() {
        let s = Sample::from_values([1.0, 4.0, 2.0, 8.0, 5.0, 7.0]);
        let a = trimmed_mean_se(&s, 0.0).unwrap();
        assert!((a - mean_se(&s).unwrap()).abs() < 1e-15);
    }
}
