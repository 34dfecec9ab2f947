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

/// Knuth's TwoSum: the rounded sum a + b and its exact rounding error, so
/// that a + b = sum + error exactly (for finite a, b without overflow).
pub fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let sum = a + b;
    let b_part = sum - a;
    let a_part = sum - b_part;
    (sum, (a - a_part) + (b - b_part))
}

impl Neumaier {
    /// Adds one term, carrying its rounding error.
    pub fn add(&mut self, x: f64) {
        let (t, error) = two_sum(self.sum, x);
        self.compensation += error;
        self.sum = t;
    }

    /// The sum so far with the carried error added back.
    pub fn total(&self) -> f64 {
        self.sum + self.compensation
    }

    /// The compensated sum of `values`.
    pub fn of(values: impl IntoIterator<Item = f64>) -> f64 {
        let mut acc = Neumaier::default();
        for x in values {
            acc.add(x);
        }
        acc.total()
    }
}

/// An exact sum: Shewchuk's non-overlapping partials (Shewchuk 1997, the
/// method of Python's `math.fsum`). Every addition is error-free, so the
/// total is the exact sum rounded once. It costs a few times a plain sum and
/// more when the partials grow, so it is kept for ill-conditioned sums.
/// Terms must be finite and far from overflow (callers scale them first).
#[derive(Debug, Clone, Default)]
pub struct ExactSum {
    partials: Vec<f64>,
}

impl ExactSum {
    pub fn add(&mut self, mut x: f64) {
        let mut kept = 0;
        for j in 0..self.partials.len() {
            let mut y = self.partials[j];
            if x.abs() < y.abs() {
                std::mem::swap(&mut x, &mut y);
            }
            let high = x + y;
            let low = y - (high - x);
            if low != 0.0 {
                self.partials[kept] = low;
                kept += 1;
            }
            x = high;
        }
        self.partials.truncate(kept);
        self.partials.push(x);
    }

    /// The exact sum, rounded to nearest (ties to even) once.
    pub fn total(&self) -> f64 {
        let p = &self.partials;
        let Some(&last) = p.last() else {
            return 0.0;
        };
        let (mut high, mut low, mut n) = (last, 0.0, p.len() - 1);
        while n > 0 {
            let x = high;
            n -= 1;
            high = x + p[n];
            low = p[n] - (high - x);
            if low != 0.0 {
                break;
            }
        }
        // Half-way case: the partials below decide which way to round.
        if n > 0 && ((low < 0.0 && p[n - 1] < 0.0) || (low > 0.0 && p[n - 1] > 0.0)) {
            let y = low * 2.0;
            let x = high + y;
            if y == x - high {
                high = x;
            }
        }
        high
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

    // Exact sums worked by hand: 1e100 + 1 - 1e100 + 1e-100 is exactly
    // 1 + 1e-100, which rounds to 1; 0.1 ten times is the double nearest
    // 10 x 0.1000000000000000055511151231257827 = 1.000000000000000055511...,
    // which is 1.0 (Python's math.fsum agrees, typed from memory).
    #[test]
    fn exact_sums_round_once() {
        let mut s = ExactSum::default();
        for x in [1e100, 1.0, -1e100, 1e-100] {
            s.add(x);
        }
        assert_eq!(s.total(), 1.0);
        let mut tenth = ExactSum::default();
        (0..10).for_each(|_| tenth.add(0.1));
        assert_eq!(tenth.total(), 1.0);
        let mut big = ExactSum::default();
        for x in [1e17, 3.0, -1e17, 5.0, 1e16, -1e16, 1.0] {
            big.add(x);
        }
        assert_eq!(big.total(), 9.0);
        // 1 + 2^-53 lies halfway between 1 and the next double up; the tie
        // goes to the even one, 1.0. The partials are then [2^-53, 1], and
        // the total must add the lower one to the top, not subtract it
        // (1 - 2^-53 is a double, so a subtraction would show).
        let mut tie = ExactSum::default();
        tie.add(1.0);
        tie.add(f64::EPSILON / 2.0);
        assert_eq!(tie.total(), 1.0);
    }
}
