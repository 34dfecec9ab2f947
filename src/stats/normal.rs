//! The standard normal distribution function and its inverse.

/// P(Z <= z) for a standard normal Z, from the complementary error function.
pub fn normal_cdf(z: f64) -> f64 {
    0.5 * libm::erfc(-z / std::f64::consts::SQRT_2)
}

/// The z with P(Z <= z) = p, for 0 < p < 1: bisection to a bracket, then
/// Newton steps on the distribution function (its derivative is the density).
pub fn normal_quantile(p: f64) -> f64 {
    debug_assert!(p > 0.0 && p < 1.0);
    let (mut low, mut high) = (-40.0_f64, 40.0_f64);
    for _ in 0..60 {
        let mid = 0.5 * (low + high);
        if normal_cdf(mid) < p {
            low = mid;
        } else {
            high = mid;
        }
    }
    let mut z = 0.5 * (low + high);
    for _ in 0..3 {
        let density = (-0.5 * z * z).exp() / (std::f64::consts::TAU).sqrt();
        if density > 0.0 {
            z -= (normal_cdf(z) - p) / density;
        }
    }
    z
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Values typed from standard normal tables (they agree with
    /// scipy.stats.norm.ppf to the digits given).
    #[test]
    fn quantiles_match_the_tables() {
        for (p, z) in [
            (0.975, 1.959_963_984_540_054),
            (0.5, 0.0),
            (0.841_344_746_068_542_9, 1.0),
            (0.05, -1.644_853_626_951_472_2),
            (0.995, 2.575_829_303_548_900_4),
        ] {
            assert!((normal_quantile(p) - z).abs() < 1e-12, "p = {p}");
        }
    }
}
