//! The exact bootstrap distribution of the sample median, from binomial
//! probabilities of order statistics instead of resamples.
//!
//! A resample draws n of the sorted values x(1) <= ... <= x(n) with
//! replacement. Let S(i) be how many draws fall at index i or below:
//! S(i) ~ Binomial(n, i/n). The resample's m-th smallest draw X*(m) is at
//! index i or below exactly when S(i) >= m, which gives the distribution of
//! every order statistic of a resample (Efron 1979, "Bootstrap methods:
//! another look at the jackknife", Annals of Statistics 7, section 3;
//! Maritz and Jarrett 1978, "A note on estimating the variance of the
//! sample median", JASA 73). For an even n the median is the midpoint of
//! X*(m) and X*(m+1), m = n/2, and their joint distribution is needed:
//! - i < j: exactly m draws at index i or below, the largest at i, and the
//!   other n - m at index j or above, the smallest at j:
//!   P = C(n, m) ((i/n)^m - ((i-1)/n)^m) ((1-(j-1)/n)^(n-m) - (1-j/n)^(n-m)).
//! - i = j: given a = S(i-1) draws below i (a < m), the n - a others fall at
//!   i with chance 1/(n-i+1) each, and both middle draws are at i when at
//!   least m + 1 - a of them do.
//!
//! Indexes are positions, so tied values need no special care: their
//! probabilities add up on the same value. Only indexes within nine
//! standard deviations of the middle carry probability above about 1e-18;
//! the rest is left out (tests check that the kept mass is 1 to 1e-10).
//! The cost is about 9 sqrt(n) indexes, with some 70 partners each for an
//! even n, whatever the number of resamples.

use std::cell::RefCell;

use super::Interval;
use crate::stats::memo::{Memo, remembered};

/// Atoms of probability below this are not kept.
const NEGLIGIBLE: f64 = 1e-18;

/// One possible value of the resampled median and its probability.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Atom {
    pub value: f64,
    pub probability: f64,
}

/// The percentile interval at `level` of the exact bootstrap distribution
/// of the median of `sorted` (at least one value): the smallest values whose
/// cumulative probability reaches (1 - level)/2 and (1 + level)/2.
pub(super) fn exact_median_interval(sorted: &[f64], level: f64) -> Interval {
    let mut atoms = median_distribution(sorted);
    atoms.sort_by(|a, b| a.value.total_cmp(&b.value));
    Interval {
        low: point_reaching(&atoms, (1.0 - level) / 2.0),
        high: point_reaching(&atoms, (1.0 + level) / 2.0),
    }
}

/// The first value at which the cumulative probability reaches `p`.
fn point_reaching(atoms: &[Atom], p: f64) -> f64 {
    let mut cumulative = 0.0;
    for atom in atoms {
        cumulative += atom.probability;
        if cumulative >= p {
            return atom.value;
        }
    }
    atoms.last().map_or(f64::NAN, |a| a.value)
}

/// The atoms of the bootstrap distribution of the median of `sorted`, in
/// no particular order; values may repeat.
pub(super) fn median_distribution(sorted: &[f64]) -> Vec<Atom> {
    let value = |i: usize| sorted[i - 1];
    // The probabilities depend on n alone: the columns of a group share them.
    let places = remembered!(PLACES, sorted.len(), || median_places(sorted.len()));
    places
        .iter()
        .map(|p| Atom {
            value: match p.i == p.j {
                true => value(p.i),
                false => value(p.i) / 2.0 + value(p.j) / 2.0,
            },
            probability: p.probability,
        })
        .collect()
}

thread_local! {
    /// The last places made, by n.
    static PLACES: RefCell<Memo<usize, Vec<Place>>> = const { RefCell::new(Memo::new(2)) };
}

/// One possible place of the resampled median: the midpoint of the
/// 1-based indexes i and j of the sorted values (the value at i when they
/// are the same), and its probability.
struct Place {
    i: usize,
    j: usize,
    probability: f64,
}

/// Every place of the resampled median of n values with probability that
/// is not negligible.
fn median_places(n: usize) -> Vec<Place> {
    let (first, last) = middle_window(n);
    if n % 2 == 1 {
        let m = n.div_ceil(2);
        return (first..=last)
            .map(|i| Place {
                i,
                j: i,
                probability: middle_at(n, i, m, 0),
            })
            .collect();
    }
    let m = n / 2;
    let ln_choose = ln_choose(n, m);
    // ln P(the n - m upper draws start at j), for every j a pair can reach.
    let reach = (last + 200).min(n);
    let ln_above: Vec<f64> = (first..=reach)
        .map(|j| ln_smallest_of_above_at(n, n - m, j))
        .collect();
    let mut places = Vec::new();
    for i in first..=last {
        places.push(Place {
            i,
            j: i,
            probability: middle_at(n, i, m, 1),
        });
        let ln_lower = ln_choose + ln_largest_of_below_at(n, m, i);
        for j in i + 1..=n {
            let ln_upper = match ln_above.get(j - first) {
                Some(&known) => known,
                None => ln_smallest_of_above_at(n, n - m, j),
            };
            let probability = (ln_lower + ln_upper).exp();
            places.push(Place { i, j, probability });
            // The chance falls by about e^(-1/2) with each step of j.
            if probability < NEGLIGIBLE && j > i + 2 {
                break;
            }
        }
    }
    places
}

/// 1-based indexes within which the middle order statistics of a resample
/// fall but with negligible probability: nine standard deviations
/// (sqrt(n)/2 indexes each) either side of the middle, and a margin for
/// short columns.
fn middle_window(n: usize) -> (usize, usize) {
    let half = (4.5 * (n as f64).sqrt()).ceil() as usize + 12;
    let middle = n / 2;
    (
        middle.saturating_sub(half).max(1),
        (middle + 1 + half).min(n),
    )
}

/// P(S(i-1) < m and at least m + extra draws at index i or below): for
/// extra = 0 the chance that X*(m) is at index i; for extra = 1 that both
/// X*(m) and X*(m+1) are.
fn middle_at(n: usize, i: usize, m: usize, extra: usize) -> f64 {
    let below = (i - 1) as f64 / n as f64;
    // Each draw above index i - 1 is at i with this chance.
    let at_i = 1.0 / (n - i + 1) as f64;
    if i == 1 {
        // No draw can fall below the first index.
        return binomial_upper_tail(n, m + extra, at_i);
    }
    // For a from m - 1 down: P(S(i-1) = a) and, of the n - a draws above,
    // the chance t that at least k = m + extra - a fall at i. Both step
    // down by ratios: t(a - 1) = t(a) - (1 - q) P(Bin(n - a, q) = k) and
    // P(Bin(N + 1, q) = k + 1) = P(Bin(N, q) = k) (N + 1)/(k + 1) q.
    let mut pmf_below = binomial_pmf(n, m - 1, below);
    let (mut draws, mut needed) = (n - m + 1, extra + 1);
    let mut tail = binomial_upper_tail(draws, needed, at_i);
    let mut pmf_at = binomial_pmf(draws, needed, at_i);
    let mut total = 0.0;
    for a in (0..m).rev() {
        total += pmf_below * tail;
        // Below 1e-15 the subtractions' rounding (about 1e-16) would take
        // over, while the true tail falls faster than geometrically (about
        // 1/k! for k draws at one index): what is left is negligible.
        if tail < 1e-15 || needed >= draws {
            break;
        }
        pmf_below *= a as f64 / (n - a + 1) as f64 * (1.0 - below) / below;
        tail -= (1.0 - at_i) * pmf_at;
        pmf_at *= (draws + 1) as f64 / (needed + 1) as f64 * at_i;
        draws += 1;
        needed += 1;
    }
    total
}

/// ln((i/n)^m - ((i-1)/n)^m): m draws at index i or below, the largest at i.
fn ln_largest_of_below_at(n: usize, m: usize, i: usize) -> f64 {
    let m = m as f64;
    m * (i as f64 / n as f64).ln() + (-(m * (-1.0 / i as f64).ln_1p()).exp_m1()).ln()
}

/// ln((1-(j-1)/n)^k - (1-j/n)^k): k draws at index j or above, the smallest at j.
fn ln_smallest_of_above_at(n: usize, k: usize, j: usize) -> f64 {
    let k = k as f64;
    let above = (n - j + 1) as f64;
    k * (above / n as f64).ln() + (-(k * (-1.0 / above).ln_1p()).exp_m1()).ln()
}

fn ln_choose(n: usize, k: usize) -> f64 {
    libm::lgamma(n as f64 + 1.0) - libm::lgamma(k as f64 + 1.0) - libm::lgamma((n - k) as f64 + 1.0)
}

/// P(Binomial(n, p) = k).
fn binomial_pmf(n: usize, k: usize, p: f64) -> f64 {
    if p == 0.0 {
        return if k == 0 { 1.0 } else { 0.0 };
    }
    if p == 1.0 {
        return if k == n { 1.0 } else { 0.0 };
    }
    (ln_choose(n, k) + k as f64 * p.ln() + (n - k) as f64 * (-p).ln_1p()).exp()
}

/// P(Binomial(n, p) >= k), summed upwards from k; the terms fall fast here
/// because n p is about 1 wherever it is used.
fn binomial_upper_tail(n: usize, k: usize, p: f64) -> f64 {
    if k == 0 {
        return 1.0;
    }
    if k > n {
        return 0.0;
    }
    if p == 1.0 {
        return 1.0;
    }
    let ratio = p / (1.0 - p);
    let mut term = binomial_pmf(n, k, p);
    let mut sum = 0.0;
    for c in k..=n {
        sum += term;
        if term <= sum * 1e-17 {
            break;
        }
        term *= (n - c) as f64 / (c + 1) as f64 * ratio;
    }
    sum
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::BTreeMap;

    /// The distribution of the median over all n^n equally likely
    /// resamples, enumerated; values keyed by their bits.
    fn enumerated(sorted: &[f64]) -> BTreeMap<u64, f64> {
        let n = sorted.len();
        let total = n.pow(n as u32);
        let mut law = BTreeMap::new();
        let mut resample = vec![0.0; n];
        for code in 0..total {
            let mut c = code;
            for slot in resample.iter_mut() {
                *slot = sorted[c % n];
                c /= n;
            }
            resample.sort_by(f64::total_cmp);
            let median = if n % 2 == 1 {
                resample[n / 2]
            } else {
                resample[n / 2 - 1] / 2.0 + resample[n / 2] / 2.0
            };
            *law.entry(median.to_bits()).or_insert(0usize) += 1;
        }
        law.into_iter()
            .map(|(bits, count)| (bits, count as f64 / total as f64))
            .collect()
    }

    fn gathered(atoms: &[Atom]) -> BTreeMap<u64, f64> {
        let mut law = BTreeMap::new();
        for a in atoms {
            *law.entry(a.value.to_bits()).or_insert(0.0) += a.probability;
        }
        law
    }

    /// Against every resample of short columns, counted one by one (exact
    /// up to rounding), with ties and uneven gaps so that midpoints differ.
    #[test]
    fn matches_the_enumerated_resamples() {
        for sorted in [
            vec![1.0, 2.0, 4.0],
            vec![1.0, 2.0, 4.0, 8.0],
            vec![0.5, 2.0, 2.0, 3.0, 10.0],
            vec![-3.0, 1.0, 1.5, 4.0, 7.0, 20.0],
            vec![1.0, 1.0, 1.0, 2.0, 5.0, 5.0, 9.0],
        ] {
            let exact = gathered(&median_distribution(&sorted));
            let counted = enumerated(&sorted);
            assert_eq!(
                exact.keys().collect::<Vec<_>>(),
                counted.keys().collect::<Vec<_>>(),
                "{sorted:?}"
            );
            for (bits, p) in &counted {
                assert!(
                    (exact[bits] - p).abs() < 1e-13,
                    "{sorted:?}: {}",
                    exact[bits] - p
                );
            }
        }
    }

    /// The kept atoms carry all of the probability, short and long columns,
    /// to 1e-10: each probability goes through lgamma of numbers near
    /// n ln n, whose rounding is some 1e-12 of the result at n = 10^4.
    #[test]
    fn the_window_keeps_all_the_mass() {
        for n in [10, 11, 57, 200, 1001, 4000, 9999, 10_000] {
            let sorted: Vec<f64> = (0..n).map(|i| i as f64).collect();
            let mass: f64 = median_distribution(&sorted)
                .iter()
                .map(|a| a.probability)
                .sum();
            assert!((mass - 1.0).abs() < 1e-10, "n = {n}: {mass}");
        }
    }

    /// For an odd n, P(median* <= x(l)) = P(Binomial(n, l/n) >= m) (Efron
    /// 1979, section 3), the tail summed here term by term from lgamma.
    #[test]
    fn odd_columns_follow_the_binomial_formula() {
        let n: usize = 2001;
        let m = n.div_ceil(2);
        let sorted: Vec<f64> = (0..n).map(|i| i as f64).collect();
        let atoms = median_distribution(&sorted);
        for l in [950, 980, 1001, 1020, 1050] {
            let p = l as f64 / n as f64;
            let formula: f64 = (m..=n).map(|k| binomial_pmf(n, k, p)).sum();
            let exact: f64 = atoms
                .iter()
                .filter(|a| a.value <= sorted[l - 1])
                .map(|a| a.probability)
                .sum();
            assert!(
                (formula - exact).abs() < 1e-12,
                "l = {l}: {exact} vs {formula}"
            );
        }
    }

    #[test]
    fn interval_is_read_where_the_cumulative_probability_reaches_the_level() {
        let atoms = [
            Atom {
                value: 1.0,
                probability: 0.02,
            },
            Atom {
                value: 2.0,
                probability: 0.01,
            },
            Atom {
                value: 3.0,
                probability: 0.95,
            },
            Atom {
                value: 4.0,
                probability: 0.02,
            },
        ];
        assert_eq!(point_reaching(&atoms, 0.025), 2.0);
        assert_eq!(point_reaching(&atoms, 0.975), 3.0);
        assert_eq!(point_reaching(&atoms, 0.99), 4.0);
    }
}
