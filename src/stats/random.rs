//! Seeded random numbers written here, so the same seed gives the same
//! bootstrap interval on every machine and version: the SplitMix64
//! generator (Steele, Lea and Flood 2014) and, from it, normal, gamma and
//! beta variates.

/// A small, fixed pseudo-random generator (SplitMix64), so seeded results
/// are the same on every machine; also used by the demo and benchmark data.
pub struct SplitMix64(pub u64);

impl SplitMix64 {
    /// The next 64 random bits.
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

    /// Uniform in (0, 1], safe to take the logarithm of.
    fn uniform_open(&mut self) -> f64 {
        1.0 - self.uniform()
    }

    /// Uniform in 0..n without modulo bias (Lemire 2019, multiply and reject).
    #[cfg(test)]
    pub(crate) fn below(&mut self, n: u64) -> u64 {
        self.below_with(n, n.wrapping_neg() % n)
    }

    /// As `below`, with the rejection threshold (2^64 mod n) computed once by the caller.
    #[cfg(test)]
    #[inline]
    pub(crate) fn below_with(&mut self, n: u64, threshold: u64) -> u64 {
        loop {
            let wide = u128::from(self.next_u64()) * u128::from(n);
            if (wide as u64) >= threshold {
                return (wide >> 64) as u64;
            }
        }
    }

    /// Standard normal (Box and Muller 1958).
    pub(crate) fn normal(&mut self) -> f64 {
        let radius = (-2.0 * self.uniform_open().ln()).sqrt();
        radius * (std::f64::consts::TAU * self.uniform()).cos()
    }

    /// Gamma with the given shape (at least 1) and scale 1, by Marsaglia
    /// and Tsang (2000), "A simple method for generating gamma variables".
    pub(crate) fn gamma(&mut self, shape: f64) -> f64 {
        debug_assert!(shape >= 1.0);
        let d = shape - 1.0 / 3.0;
        let c = 1.0 / (9.0 * d).sqrt();
        loop {
            let x = self.normal();
            let v = 1.0 + c * x;
            if v <= 0.0 {
                continue;
            }
            let v = v * v * v;
            let u = self.uniform_open();
            let x2 = x * x;
            if u < 1.0 - 0.0331 * x2 * x2 || u.ln() < 0.5 * x2 + d * (1.0 - v + v.ln()) {
                return d * v;
            }
        }
    }

    /// Beta(a, b) for a, b at least 1, as a ratio of gammas.
    pub(crate) fn beta(&mut self, a: f64, b: f64) -> f64 {
        let x = self.gamma(a);
        let y = self.gamma(b);
        x / (x + y)
    }
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

    /// Mean and variance of many draws against the distribution's own:
    /// Beta(a, b) has mean a/(a+b) and variance ab/((a+b)^2 (a+b+1)).
    #[test]
    fn beta_draws_have_the_right_mean_and_variance() {
        let mut rng = SplitMix64(9);
        for (a, b) in [(1.0, 1.0), (2.5, 7.0), (500.0, 501.0), (1e5, 1e5 + 1.0)] {
            let draws: Vec<f64> = (0..40_000).map(|_| rng.beta(a, b)).collect();
            let n = draws.len() as f64;
            let mean = draws.iter().sum::<f64>() / n;
            let var = draws.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
            let (want_mean, want_var) = (a / (a + b), a * b / ((a + b).powi(2) * (a + b + 1.0)));
            // The mean of 40,000 draws is within 5 standard errors.
            assert!(
                (mean - want_mean).abs() < 5.0 * (want_var / n).sqrt(),
                "Beta({a}, {b}) mean {mean}"
            );
            assert!(
                (var / want_var - 1.0).abs() < 0.05,
                "Beta({a}, {b}) variance {var}"
            );
        }
    }
}
