//! The percentile interval of the bootstrap distribution of the mean by
//! the saddlepoint approximation, at a cost of a few passes over the values
//! instead of resamples x n draws.
//!
//! A resampled mean is the mean of n draws from the values, each with
//! chance 1/n; with d the values' deviations from a centre, one draw has
//! the moment generating function M(s) = mean of exp(s d). At s the tilted
//! mean mu(s) = M'(s)/M(s) and variance v(s) give the point a = mu(s) and
//! w = sign(s) sqrt(2n (s a - ln M(s))), u = s sqrt(n v(s)),
//! P(mean* <= a) ~ Phi(w) + phi(w) (1/w - 1/u)
//! (Lugannani and Rice 1980; applied to the bootstrap by Davison and
//! Hinkley 1988, "Saddlepoint approximations in resampling methods",
//! Biometrika 75, who found it within the Monte Carlo error of 50,000
//! resamples from n = 10 on). The level's point is found by solving for s.

use super::Interval;
use crate::stats::normal::{normal_cdf, normal_quantile};

/// The distribution of one draw tilted by exp(s d).
struct Tilted {
    /// ln M(s).
    ln_mgf: f64,
    mean: f64,
    variance: f64,
}

fn tilted(deviations: &[f64], s: f64) -> Tilted {
    let top = deviations
        .iter()
        .map(|d| s * d)
        .fold(f64::NEG_INFINITY, f64::max);
    let (mut weight, mut first, mut second) = (0.0, 0.0, 0.0);
    for &d in deviations {
        let w = (s * d - top).exp();
        weight += w;
        first += w * d;
        second += w * d * d;
    }
    let mean = first / weight;
    Tilted {
        ln_mgf: top + (weight / deviations.len() as f64).ln(),
        mean,
        variance: (second / weight - mean * mean).max(0.0),
    }
}

/// The approximate P(mean* <= mu(s)) (as deviations) and mu(s).
fn cdf_at(deviations: &[f64], s: f64) -> (f64, f64, f64) {
    let n = deviations.len() as f64;
    let t = tilted(deviations, s);
    let w = s.signum() * (2.0 * n * (s * t.mean - t.ln_mgf)).max(0.0).sqrt();
    let u = s * (n * t.variance).sqrt();
    let density = (-w * w / 2.0).exp() / (2.0 * std::f64::consts::PI).sqrt();
    let cdf = if w.abs() < 1e-6 || u.abs() < 1e-12 {
        normal_cdf(w)
    } else {
        normal_cdf(w) + density * (1.0 / w - 1.0 / u)
    };
    // d cdf / ds, to first order: the density of the mean times dmu/ds = v(s).
    let slope = density * (n * t.variance).sqrt();
    (cdf.clamp(0.0, 1.0), t.mean, slope)
}

/// The deviation a with P(mean* <= a) = p, by Newton steps in s kept
/// inside a bracket (bisection when a step leaves it).
fn point_at(deviations: &[f64], p: f64, sd: f64) -> f64 {
    let n = deviations.len() as f64;
    let scale = 1.0 / (sd * n.sqrt());
    // The normal approximation's s: mu(s) ~ s sd^2 = z sd / sqrt(n).
    let mut s = normal_quantile(p) * scale;
    let (mut below, mut above) = (f64::NEG_INFINITY, f64::INFINITY);
    let mut best = 0.0;
    for _ in 0..100 {
        let (cdf, mean, slope) = cdf_at(deviations, s);
        best = mean;
        if (cdf - p).abs() < 1e-12 {
            break;
        }
        if cdf < p {
            below = s;
        } else {
            above = s;
        }
        let newton = s - (cdf - p) / slope;
        s = if newton > below && newton < above && slope > 0.0 {
            newton
        } else if below.is_finite() && above.is_finite() {
            (below + above) / 2.0
        } else if below.is_finite() {
            below + 4.0 * scale.max((below).abs())
        } else {
            above - 4.0 * scale.max((above).abs())
        };
        if below.is_finite()
            && above.is_finite()
            && above - below <= 1e-15 * above.abs().max(below.abs())
        {
            break;
        }
    }
    best
}

/// The saddlepoint percentile interval at `level` of the resampled mean of
/// `sorted` (at least two distinct values), clamped to the data's range.
pub(super) fn saddlepoint_mean_interval(sorted: &[f64], level: f64) -> Interval {
    let n = sorted.len();
    let centre = sorted[(n - 1) / 2];
    let deviations: Vec<f64> = sorted.iter().map(|x| x - centre).collect();
    let mean = deviations.iter().sum::<f64>() / n as f64;
    let sd = (deviations
        .iter()
        .map(|d| (d - mean) * (d - mean))
        .sum::<f64>()
        / n as f64)
        .sqrt();
    let at = |p: f64| (centre + point_at(&deviations, p, sd)).clamp(sorted[0], sorted[n - 1]);
    Interval {
        low: at((1.0 - level) / 2.0),
        high: at((1.0 + level) / 2.0),
    }
}
