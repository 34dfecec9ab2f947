//! How far the mean sits from the median, and how much leaving out one
//! value, or a chosen few, moves the mean and the sd.
//!
//! Every figure here is a small difference between large quantities when
//! the data sit far from zero (1e8 plus a few units), so all of them are
//! computed from deviations d = x - c about a middle data value c: those
//! differences are exact for values near c (Sterbenz), and the mean, the
//! sums of squares and the changes are then built from small numbers that
//! keep their digits. The form (n mean - x) / (n - 1) - mean, by contrast,
//! loses as many digits as the offset has.

use super::order::{median_about, middle_value};
use super::sample::Sample;
use super::summation::Neumaier;
use super::undefined::{Stat, need};

/// The sample seen from a middle data value: `centre`, and the mean of
/// the deviations from it (mean - centre).
struct Centred {
    centre: f64,
    mean_deviation: f64,
}

impl Centred {
    fn of(sample: &Sample) -> Stat<Centred> {
        let centre = middle_value(sample.sorted())?;
        let mean_deviation = mean_of(sample.values().iter().map(|x| x - centre));
        Ok(Centred {
            centre,
            mean_deviation,
        })
    }

    /// x - mean, as (x - c) - (mean - c).
    fn off_mean(&self, x: f64) -> f64 {
        (x - self.centre) - self.mean_deviation
    }
}

fn mean_of(values: impl ExactSizeIterator<Item = f64>) -> f64 {
    let n = values.len() as f64;
    Neumaier::of(values) / n
}

/// mean - median, as (mean - c) - (median - c) about a middle value c.
pub fn mean_minus_median(sample: &Sample) -> Stat {
    let centred = Centred::of(sample)?;
    Ok(centred.mean_deviation - median_about(sample.sorted(), centred.centre)?)
}

/// The mean of the values left after leaving out those at `left_out`
/// (indexes into `sample.values()`), minus the mean of all of them.
/// Needs at least one value left.
pub fn mean_change_without(sample: &Sample, left_out: &[usize]) -> Stat {
    let centred = Centred::of(sample)?;
    let mut gone = vec![false; sample.count()];
    left_out.iter().for_each(|&i| gone[i] = true);
    let mut kept = Neumaier::default();
    let mut count = 0usize;
    for (x, _) in sample
        .values()
        .iter()
        .zip(&gone)
        .filter(|(_, gone)| !**gone)
    {
        kept.add(x - centred.centre);
        count += 1;
    }
    need(count, 1)?;
    Ok(kept.total() / count as f64 - centred.mean_deviation)
}

/// One value's effect: the change (after leaving it out minus before) and
/// the index of the value in `sample.values()`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct OneLeftOut {
    /// After leaving the value out, minus before.
    pub change: f64,
    /// The value's index in `sample.values()`.
    pub index: usize,
}

/// The largest changes in size, among all values, that leaving out one
/// value causes in the mean and in the sample sd. Ties go to the value
/// that comes first.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LeaveOneOut {
    /// The largest change of the mean.
    pub mean: OneLeftOut,
    /// The largest change of the sample sd.
    pub sd: OneLeftOut,
}

/// Leave-one-out changes of the mean and the sample sd; needs 3 values
/// (the sd of what is left needs 2).
///
/// With e = x - mean and M2 the sum of squared deviations, leaving out x
/// moves the mean by -e / (n - 1) and M2 to M2 - n e^2 / (n - 1), so the
/// variance by (M2 - n e^2) / ((n - 1)(n - 2)) and the sd by that over
/// (sd without + sd). The mean moves most at the smallest or largest value,
/// the sd at the value farthest from the mean (again the smallest or
/// largest) or nearest to it: only those three, each the first of its
/// kind, are evaluated.
pub fn leave_one_out(sample: &Sample) -> Stat<LeaveOneOut> {
    need(sample.count(), 3)?;
    let centred = Centred::of(sample)?;
    let values = sample.values();
    let n = values.len() as f64;
    let m2 = Neumaier::of(values.iter().map(|&x| {
        let e = centred.off_mean(x);
        e * e
    }));
    let (mut lowest, mut highest, mut nearest) = (0, 0, 0);
    for (i, &x) in values.iter().enumerate() {
        if x < values[lowest] {
            lowest = i;
        }
        if x > values[highest] {
            highest = i;
        }
        if centred.off_mean(x).abs() < centred.off_mean(values[nearest]).abs() {
            nearest = i;
        }
    }
    let mut candidates = [lowest, highest, nearest];
    candidates.sort_unstable();
    let sd = (m2 / (n - 1.0)).sqrt();
    let effect = |index: usize| {
        let e = centred.off_mean(values[index]);
        let sd_without = ((m2 - n / (n - 1.0) * e * e).max(0.0) / (n - 2.0)).sqrt();
        let variance_change = (m2 - n * e * e) / ((n - 1.0) * (n - 2.0));
        let sd_change = if sd_without + sd > 0.0 {
            variance_change / (sd_without + sd)
        } else {
            0.0
        };
        (-e / (n - 1.0), sd_change)
    };
    let mut best = LeaveOneOut {
        mean: OneLeftOut {
            change: 0.0,
            index: candidates[0],
        },
        sd: OneLeftOut {
            change: 0.0,
            index: candidates[0],
        },
    };
    for index in candidates {
        let (mean_change, sd_change) = effect(index);
        // Strictly larger only: a tie stays with the earlier value.
        if mean_change.abs() > best.mean.change.abs() {
            best.mean = OneLeftOut {
                change: mean_change,
                index,
            };
        }
        if sd_change.abs() > best.sd.change.abs() {
            best.sd = OneLeftOut {
                change: sd_change,
                index,
            };
        }
    }
    Ok(best)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::stats::{Denominator, Undefined};

    /// Every value left out in turn, by recomputing: the definition.
    fn brute_force(values: &[f64]) -> LeaveOneOut {
        let full = Sample::from_values(values.iter().copied());
        let (mean, sd) = (full.mean().unwrap(), full.sd(Denominator::Sample).unwrap());
        let mut best: Option<LeaveOneOut> = None;
        for i in 0..values.len() {
            let rest = Sample::from_values(
                values
                    .iter()
                    .enumerate()
                    .filter(|&(j, _)| j != i)
                    .map(|(_, x)| *x),
            );
            let dm = rest.mean().unwrap() - mean;
            let ds = rest.sd(Denominator::Sample).unwrap() - sd;
            let b = best.get_or_insert(LeaveOneOut {
                mean: OneLeftOut {
                    change: dm,
                    index: i,
                },
                sd: OneLeftOut {
                    change: ds,
                    index: i,
                },
            });
            if dm.abs() > b.mean.change.abs() {
                b.mean = OneLeftOut {
                    change: dm,
                    index: i,
                };
            }
            if ds.abs() > b.sd.change.abs() {
                b.sd = OneLeftOut {
                    change: ds,
                    index: i,
                };
            }
        }
        best.unwrap()
    }

    #[test]
    fn the_three_candidates_find_what_trying_every_value_finds() {
        for values in [
            vec![3.0, 4.0, 4.5, 5.0, 30.0, 4.2],
            vec![-8.0, 1.0, 1.5, 2.0, 2.5],
            vec![1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 100.0, -100.0],
            vec![5.0, 5.1, 5.2, 5.3, 5.4, 5.5, 5.6],
        ] {
            let ours = leave_one_out(&Sample::from_values(values.clone())).unwrap();
            let theirs = brute_force(&values);
            assert_eq!(ours.mean.index, theirs.mean.index, "{values:?}");
            assert_eq!(ours.sd.index, theirs.sd.index, "{values:?}");
            assert!((ours.mean.change - theirs.mean.change).abs() < 1e-12);
            assert!((ours.sd.change - theirs.sd.change).abs() < 1e-12);
        }
    }

    // The case, exact in rational arithmetic: x = 1e8 + {0, 1, 2,
    // 3, 20}/1024. Mean 1e8 + 26/5120; leaving out the last moves the mean
    // by (26/5120 - 20/1024) / 4 = -37/10240. Shifting by 1e8 or 1e12 must
    // not change a bit, since every deviation is exact.
    #[test]
    fn far_from_zero_the_changes_keep_every_digit() {
        let grid = [0.0, 1.0, 2.0, 3.0, 20.0].map(|k| k / 1024.0);
        let at = |offset: f64| {
            let s = Sample::from_values(grid.iter().map(|x| x + offset));
            (leave_one_out(&s).unwrap(), mean_minus_median(&s).unwrap())
        };
        let (near, gap) = at(0.0);
        assert_eq!(near.mean.change, -37.0 / 10240.0);
        assert_eq!(near.mean.index, 4);
        // mean - median = 26/5120 - 2/1024 = 16/5120.
        assert!((gap - 16.0 / 5120.0).abs() <= 1e-18);
        for offset in [1e8, 1e12] {
            assert_eq!(at(offset), (near, gap), "offset {offset}");
        }
    }

    #[test]
    fn ties_go_to_the_first_value_and_too_few_values_say_so() {
        // 1 and 3 move the mean by the same amount in size: the first wins.
        let s = Sample::from_values([3.0, 2.0, 1.0]);
        let l = leave_one_out(&s).unwrap();
        assert_eq!((l.mean.index, l.mean.change), (0, -0.5));
        let flat = leave_one_out(&Sample::from_values([4.0; 5])).unwrap();
        assert_eq!(
            (flat.mean.change, flat.sd.change, flat.sd.index),
            (0.0, 0.0, 0)
        );
        assert_eq!(
            leave_one_out(&Sample::from_values([1.0, 2.0])),
            Err(Undefined::TooFewValues { needed: 3, have: 2 })
        );
        assert_eq!(
            mean_minus_median(&Sample::from_values([])),
            Err(Undefined::NoValues)
        );
    }

    #[test]
    fn mean_change_without_some_values() {
        let s = Sample::from_values([1.0, 2.0, 3.0, 10.0]);
        // Without 10: mean 2, before 4.
        assert_eq!(mean_change_without(&s, &[3]), Ok(-2.0));
        assert_eq!(mean_change_without(&s, &[]), Ok(0.0));
        assert_eq!(
            mean_change_without(&s, &[0, 1, 2, 3]),
            Err(Undefined::NoValues)
        );
    }
}
