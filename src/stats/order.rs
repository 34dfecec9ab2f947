//! Statistics read off the sorted values: median, IQR, Bowley, MAD,
//! trimmed and winsorized means, modes. All share the sample's one sort.

use super::quantile::{QuantileMethod, quantile_about, quantile_sorted};
use super::sample::Sample;
use super::summation::Neumaier;
use super::undefined::{Stat, Undefined};

/// 1 / Phi^-1(3/4) rounded as usually quoted, so that the scaled MAD of
/// normal data estimates sigma. (The spec fixes this rounding; scipy's
/// `scale='normal'` uses the unrounded 1.482602...)
pub const MAD_NORMAL_SCALE: f64 = 1.4826;

/// Middle value; mean of the two middle values for even n.
pub fn median(sample: &Sample) -> Stat {
    median_of_sorted(sample.sorted())
}

pub(crate) fn median_of_sorted(sorted: &[f64]) -> Stat {
    let n = sorted.len();
    if n == 0 {
        return Err(Undefined::NoValues);
    }
    Ok(if n % 2 == 1 {
        sorted[n / 2]
    } else {
        midpoint(sorted[n / 2 - 1], sorted[n / 2])
    })
}

/// Mean of two numbers without overflow for huge values.
fn midpoint(a: f64, b: f64) -> f64 {
    a / 2.0 + b / 2.0
}

/// The k-th quartile (k = 0..4) by the given method.
pub fn quartile(sample: &Sample, k: u8, method: QuantileMethod) -> Stat {
    if k > 4 {
        return Err(Undefined::NoSuchQuartile(k));
    }
    quantile_sorted(sample.sorted(), f64::from(k) / 4.0, method)
}

/// A data value in the middle of the sorted values (the lower middle one):
/// the centre that order statistics are measured from. Values near it
/// differ from it exactly (Sterbenz), so differences of quantiles taken
/// about it keep their digits however far the data sit from zero.
pub(crate) fn middle_value(sorted: &[f64]) -> Stat {
    match sorted.len() {
        0 => Err(Undefined::NoValues),
        n => Ok(sorted[(n - 1) / 2]),
    }
}

/// The k-th quartile minus `centre` (see [`quantile_about`]).
pub(crate) fn quartile_about(sample: &Sample, k: u8, method: QuantileMethod, centre: f64) -> Stat {
    quantile_about(sample.sorted(), f64::from(k) / 4.0, method, centre)
}

/// The median minus `centre`, as the midpoint of the two middle values'
/// differences from it.
pub(crate) fn median_about(sorted: &[f64], centre: f64) -> Stat {
    let n = sorted.len();
    if n == 0 {
        return Err(Undefined::NoValues);
    }
    Ok(midpoint(
        sorted[(n - 1) / 2] - centre,
        sorted[n / 2] - centre,
    ))
}

/// Q3 - Q1, from the quartiles' differences from a middle value.
pub fn iqr(sample: &Sample, method: QuantileMethod) -> Stat {
    let centre = middle_value(sample.sorted())?;
    Ok(quartile_about(sample, 3, method, centre)? - quartile_about(sample, 1, method, centre)?)
}

/// Bowley's quartile skewness (Q3 + Q1 - 2 Q2) / (Q3 - Q1), from the
/// quartiles' differences from a middle value.
pub fn bowley(sample: &Sample, method: QuantileMethod) -> Stat {
    let centre = middle_value(sample.sorted())?;
    let (q1, q2, q3) = (
        quartile_about(sample, 1, method, centre)?,
        quartile_about(sample, 2, method, centre)?,
        quartile_about(sample, 3, method, centre)?,
    );
    if q3 == q1 {
        return Err(Undefined::ZeroIqr);
    }
    Ok((q3 + q1 - 2.0 * q2) / (q3 - q1))
}

/// Median absolute deviation from the median; `scaled` multiplies by 1.4826.
/// Each |x - median| is taken as |(x - c) - (median - c)| about a middle
/// value c, so it keeps its digits on data far from zero.
pub fn mad(sample: &Sample, scaled: bool) -> Stat {
    let centre = middle_value(sample.sorted())?;
    let median = median_about(sample.sorted(), centre)?;
    let mut deviations: Vec<f64> = sample
        .values()
        .iter()
        .map(|x| ((x - centre) - median).abs())
        .collect();
    let raw = median_by_selection(&mut deviations)?;
    Ok(if scaled { raw * MAD_NORMAL_SCALE } else { raw })
}

/// Median by selection (O(n)), for values not already sorted. Reorders `values`.
pub(crate) fn median_by_selection(values: &mut [f64]) -> Stat {
    let n = values.len();
    if n == 0 {
        return Err(Undefined::NoValues);
    }
    let (below, &mut upper, _) = values.select_nth_unstable_by(n / 2, f64::total_cmp);
    if n % 2 == 1 {
        return Ok(upper);
    }
    let lower = below.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    Ok(midpoint(lower, upper))
}

/// How many values a share `a` cuts from each end: floor(a n), with a hair
/// of tolerance so that 10% of 30 values is 3 although 0.1 * 30 is not
/// exactly 3 in floating point.
pub(crate) fn cut_count(share: f64, n: usize) -> Stat<usize> {
    if !(0.0..0.5).contains(&share) {
        return Err(Undefined::CutOutside(share));
    }
    Ok((share * n as f64 + 1e-9).floor() as usize)
}

/// Mean of the values left after cutting floor(a n) from each end.
pub fn trimmed_mean(sample: &Sample, share: f64) -> Stat {
    let sorted = sample.sorted();
    if sorted.is_empty() {
        return Err(Undefined::NoValues);
    }
    let g = cut_count(share, sorted.len())?;
    let kept = &sorted[g..sorted.len() - g];
    Ok(Neumaier::of(kept.iter().copied()) / kept.len() as f64)
}

/// Mean after replacing the floor(a n) lowest values by the next lowest and
/// the floor(a n) highest by the next highest.
pub fn winsorized_mean(sample: &Sample, share: f64) -> Stat {
    let sorted = sample.sorted();
    let n = sorted.len();
    if n == 0 {
        return Err(Undefined::NoValues);
    }
    let g = cut_count(share, n)?;
    let mut acc = Neumaier::default();
    for &x in &sorted[g..n - g] {
        acc.add(x);
    }
    let (low, high) = (sorted[g], sorted[n - 1 - g]);
    for _ in 0..g {
        acc.add(low);
        acc.add(high);
    }
    Ok(acc.total() / n as f64)
}

/// Every most frequent value, ascending.
pub fn modes(sample: &Sample) -> Stat<Vec<f64>> {
    let sorted = sample.sorted();
    if sorted.is_empty() {
        return Err(Undefined::NoValues);
    }
    let mut best = 0;
    let mut found = Vec::new();
    for run in sorted.chunk_by(|a, b| a == b) {
        if run.len() > best {
            best = run.len();
            found.clear();
        }
        if run.len() == best {
            found.push(run[0]);
        }
    }
    Ok(found)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample(values: &[f64]) -> Sample {
        Sample::from_values(values.iter().copied())
    }

    #[test]
    fn median_odd_and_even() {
        assert_eq!(median(&sample(&[5.0, 1.0, 3.0])), Ok(3.0));
        assert_eq!(median(&sample(&[4.0, 1.0, 3.0, 2.0])), Ok(2.5));
        assert_eq!(median(&sample(&[])), Err(Undefined::NoValues));
        let mut v = vec![4.0, 1.0, 3.0, 2.0];
        assert_eq!(median_by_selection(&mut v), Ok(2.5));
    }

    #[test]
    fn modes_lists_every_tie_ascending() {
        assert_eq!(
            modes(&sample(&[3.0, 1.0, 3.0, 2.0, 1.0, 5.0])),
            Ok(vec![1.0, 3.0])
        );
        assert_eq!(modes(&sample(&[7.0])), Ok(vec![7.0]));
    }

    // Hand-checked: 1..10 with 100 replacing 10. Median 5.5; |x - 5.5| =
    // 4.5 3.5 2.5 1.5 .5 .5 1.5 2.5 3.5 94.5, whose median is 2.5.
    #[test]
    fn mad_resists_one_wild_value() {
        let s = sample(&[1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0, 100.0]);
        assert_eq!(mad(&s, false), Ok(2.5));
        assert!((mad(&s, true).unwrap() - 2.5 * 1.4826).abs() < 1e-12);
    }

    // Hand-checked: 10% of 10 values cuts one from each end.
    #[test]
    fn trimmed_and_winsorized_means() {
        let s = sample(&[1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0, 100.0]);
        assert_eq!(trimmed_mean(&s, 0.1), Ok(44.0 / 8.0));
        assert_eq!(winsorized_mean(&s, 0.1), Ok((2.0 + 44.0 + 9.0) / 10.0));
        assert_eq!(trimmed_mean(&s, 0.0), Ok(14.5));
        assert!(matches!(
            trimmed_mean(&s, 0.5),
            Err(Undefined::CutOutside(_))
        ));
        // 10% of 30 is 3 even though 0.1 * 30 = 3.0000000000000004.
        let thirty = Sample::from_values((1..=30).map(f64::from));
        assert_eq!(trimmed_mean(&thirty, 0.1), Ok(15.5));
        let with_outlier = Sample::from_values((1..=29).map(f64::from).chain([1000.0]));
        assert_eq!(
            trimmed_mean(&with_outlier, 0.1),
            Ok(Neumaier::of((4..=27).map(f64::from)) / 24.0)
        );
    }

    // Hand-checked, in units of 1/4096 (every value an exact double even
    // beside 1e12): x = 0 1 2 4 6 20. Type 7 puts Q1 at rank 2.25 -> 1.25,
    // Q2 at 3.5 -> 3, Q3 at 4.75 -> 5.5, so IQR = 4.25 and Bowley =
    // (5.5 + 1.25 - 6) / 4.25 = 3/17; |x - 3| = 3 2 1 1 3 17 has median 2.5.
    // Beside 1e12 the doubles are 1/8192 apart, so Q1 = 1e12 + 1.25 units
    // is not a double and Q3 - Q1 computed after the quartiles is off;
    // about a middle value nothing is lost, so the figures must be the
    // same to the bit at every offset.
    #[test]
    fn spread_and_shape_keep_their_digits_far_from_zero() {
        let unit = 1.0 / 4096.0;
        for offset in [0.0, 1e8, 1e12] {
            let s = Sample::from_values([0.0, 1.0, 2.0, 4.0, 6.0, 20.0].map(|k| offset + k * unit));
            let m = QuantileMethod::default();
            assert_eq!(iqr(&s, m), Ok(4.25 * unit), "offset {offset}");
            assert_eq!(bowley(&s, m), Ok(3.0 / 17.0), "offset {offset}");
            assert_eq!(mad(&s, false), Ok(2.5 * unit), "offset {offset}");
            assert_eq!(
                quartile_about(&s, 1, m, offset),
                Ok(1.25 * unit),
                "offset {offset}"
            );
        }
    }

    #[test]
    fn bowley_of_symmetric_and_skewed_data() {
        assert_eq!(
            bowley(
                &sample(&[1.0, 2.0, 3.0, 4.0, 5.0]),
                QuantileMethod::default()
            ),
            Ok(0.0)
        );
        // hf7 on 1,2,3,4,20: Q1 = 2, Q2 = 3, Q3 = 4 -> 0; on 1,2,3,10,20: Q3 = 10 -> (10+2-6)/8.
        assert_eq!(
            bowley(
                &sample(&[1.0, 2.0, 3.0, 10.0, 20.0]),
                QuantileMethod::default()
            ),
            Ok(0.75)
        );
        assert_eq!(
            bowley(&sample(&[2.0; 6]), QuantileMethod::default()),
            Err(Undefined::ZeroIqr)
        );
    }
}
