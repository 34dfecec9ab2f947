//! Compensated summation, so long columns of similar values keep their digits.

/// Neumaier's improved Kahan summation (Neumaier 1974): the running error
/// term also catches the case where the new term is larger than the sum.
/// Each step's rounding error is found by Knuth's branch-free TwoSum, which
/// gives the same exact error as Neumaier's two-case formula without a
/// data-dependent branch in the hot loop.
#[derive(Debug, Clone, Copy, Default)]
pub struct Neumaier {
    sum: f64,
    compensation: f64,
}

impl Neumaier {
    pub fn add(&mut self, x: f64) {
        let t = self.sum + x;
        let x_part = t - self.sum;
        let sum_part = t - x_part;
        self.compensation += (self.sum - sum_part) + (x - x_part);
        self.sum = t;
    }

    pub fn total(&self) -> f64 {
        self.sum + self.compensation
    }

    pub fn of(values: impl IntoIterator<Item = f64>) -> f64 {
        let mut acc = Neumaier::default();
        for x in values {
            acc.add(x);
        }
        acc.total()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keeps_small_terms_next_to_large_ones() {
        // Plain summation gives 0 here; the exact sum is 2.
        let values = [1.0, 1e100, 1.0, -1e100];
        assert_eq!(Neumaier::of(values), 2.0);
        assert_eq!(values.iter().sum::<f64>(), 0.0);
    }
}
