//! Tukey's fences and the modified z-scores of Iglewicz and Hoaglin.

use super::order::{mad, median_about, middle_value, quartile_about};
use super::quantile::QuantileMethod;
use super::sample::Sample;
use super::undefined::{Stat, Undefined};

/// 0.6745 = Phi^-1(3/4), as in Iglewicz and Hoaglin (1993): makes the
/// modified z-score comparable to an ordinary z-score for normal data.
pub const MODIFIED_Z_CONSTANT: f64 = 0.6745;
/// Iglewicz and Hoaglin (1993) recommend flagging |M| > 3.5.
pub const MODIFIED_Z_CUTOFF: f64 = 3.5;

/// Tukey's (1977) fences Q1 - k IQR and Q3 + k IQR.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fences {
    /// Q1 - k IQR.
    pub low: f64,
    /// Q3 + k IQR.
    pub high: f64,
}

/// Tukey's fences at k IQR beyond the quartiles (quartiles by `method`).
pub fn fences(sample: &Sample, k: f64, method: QuantileMethod) -> Stat<Fences> {
    let (centre, about) = fences_about(sample, k, method)?;
    Ok(Fences {
        low: centre + about.low,
        high: centre + about.high,
    })
}

/// The fences minus a middle value c (which is returned too): Q1 - c - k IQR
/// and Q3 - c + k IQR, every term a difference of nearby values, so the
/// fences and the comparisons with them keep their digits on data far
/// from zero.
fn fences_about(sample: &Sample, k: f64, method: QuantileMethod) -> Stat<(f64, Fences)> {
    if !(k.is_finite() && k >= 0.0) {
        return Err(Undefined::NegativeFenceFactor(k));
    }
    let centre = middle_value(sample.sorted())?;
    let q1 = quartile_about(sample, 1, method, centre)?;
    let q3 = quartile_about(sample, 3, method, centre)?;
    let spread = q3 - q1;
    Ok((
        centre,
        Fences {
            low: q1 - k * spread,
            high: q3 + k * spread,
        },
    ))
}

/// Values strictly beyond the fences, as indexes into `sample.values()`.
#[derive(Debug, Clone, PartialEq)]
pub struct Outliers {
    /// The fences the values were judged against.
    pub fences: Fences,
    /// Values below the low fence.
    pub low: Vec<usize>,
    /// Values above the high fence.
    pub high: Vec<usize>,
}

impl Outliers {
    /// Values beyond either fence.
    pub fn count(&self) -> usize {
        self.low.len() + self.high.len()
    }
}

/// The values strictly beyond Tukey's fences at k IQR.
pub fn outliers(sample: &Sample, k: f64, method: QuantileMethod) -> Stat<Outliers> {
    let (centre, about) = fences_about(sample, k, method)?;
    let mut low = Vec::new();
    let mut high = Vec::new();
    for (i, &x) in sample.values().iter().enumerate() {
        let d = x - centre;
        if d < about.low {
            low.push(i);
        } else if d > about.high {
            high.push(i);
        }
    }
    let fences = Fences {
        low: centre + about.low,
        high: centre + about.high,
    };
    Ok(Outliers { fences, low, high })
}

/// The outliers beyond two pairs of fences, `near` <= `far` IQRs out, with
/// one pass over the values: every value beyond the far fences is beyond
/// the near ones, so the far outliers are picked from the near ones.
pub fn outliers_near_and_far(
    sample: &Sample,
    near: f64,
    far: f64,
    method: QuantileMethod,
) -> (Stat<Outliers>, Stat<Outliers>) {
    debug_assert!(near <= far);
    let near_found = outliers(sample, near, method);
    let far_found = match (&near_found, fences_about(sample, far, method)) {
        (Ok(wide), Ok((centre, about))) => {
            let values = sample.values();
            let pick = |indexes: &[usize], beyond: &dyn Fn(f64) -> bool| {
                indexes
                    .iter()
                    .copied()
                    .filter(|&i| beyond(values[i] - centre))
                    .collect()
            };
            Ok(Outliers {
                fences: Fences {
                    low: centre + about.low,
                    high: centre + about.high,
                },
                low: pick(&wide.low, &|d| d < about.low),
                high: pick(&wide.high, &|d| d > about.high),
            })
        }
        _ => outliers(sample, far, method),
    };
    (near_found, far_found)
}

/// The modified z-score M(x) = 0.6745 (x - median) / MAD of this sample,
/// with x - median taken as (x - c) - (median - c) about a middle value c
/// so that it keeps its digits on data far from zero.
fn modified_z(sample: &Sample) -> Stat<impl Fn(f64) -> f64> {
    let centre = middle_value(sample.sorted())?;
    let median = median_about(sample.sorted(), centre)?;
    let spread = mad(sample, false)?;
    if spread == 0.0 {
        return Err(Undefined::ZeroMad);
    }
    Ok(move |x: f64| MODIFIED_Z_CONSTANT * ((x - centre) - median) / spread)
}

/// M_i = 0.6745 (x_i - median) / MAD for every value, in the sample's order.
pub fn modified_z_scores(sample: &Sample) -> Stat<Vec<f64>> {
    let z = modified_z(sample)?;
    Ok(sample.values().iter().map(|&x| z(x)).collect())
}

/// Indexes of the values whose modified z-score exceeds `cutoff` in size,
/// without keeping every score.
pub fn modified_z_beyond(sample: &Sample, cutoff: f64) -> Stat<Vec<usize>> {
    let z = modified_z(sample)?;
    Ok((0..sample.count())
        .filter(|&i| z(sample.values()[i]).abs() > cutoff)
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    // Hand-checked: 1..10 and 100. hf7: Q1 = 3.5, Q3 = 8.5, IQR = 5,
    // fences -4 and 16 at k = 1.5, -11.5 and 23.5 at k = 3.
    #[test]
    fn fences_and_outliers_from_the_definition() {
        let s = Sample::from_values((1..=10).map(f64::from).chain([100.0]));
        let o = outliers(&s, 1.5, QuantileMethod::default()).unwrap();
        assert_eq!(
            o.fences,
            Fences {
                low: -4.0,
                high: 16.0
            }
        );
        assert_eq!((o.low.clone(), o.high.clone()), (vec![], vec![10]));
        assert_eq!(
            fences(&s, 3.0, QuantileMethod::default()),
            Ok(Fences {
                low: -11.5,
                high: 23.5
            })
        );
        // Tukey's own fences use hinges: depth 3.5 -> 3.5 and 8.5 here too.
        assert_eq!(
            fences(&s, 1.5, QuantileMethod::Hinges),
            Ok(Fences {
                low: -4.0,
                high: 16.0
            })
        );
    }

    // The data of order.rs's far-from-zero test (units of 1/4096): 0 1 2 4
    // 6 20, median 3, MAD 2.5, Q1 1.25, Q3 5.5, IQR 4.25. M(20) = 0.6745 *
    // 17 / 2.5 and M(0) = -0.6745 * 3 / 2.5 whatever the offset; the 1.5
    // IQR fences are -5.125 and 11.875 units from the offset (to the
    // nearest double there).
    #[test]
    fn scores_and_fences_keep_their_digits_far_from_zero() {
        let unit = 1.0 / 4096.0;
        for offset in [0.0, 1e8, 1e12] {
            let s = Sample::from_values([0.0, 1.0, 2.0, 4.0, 6.0, 20.0].map(|k| offset + k * unit));
            let z = modified_z_scores(&s).unwrap();
            assert_eq!(z[5], 0.6745 * 17.0 / 2.5, "offset {offset}");
            assert_eq!(z[0], -0.6745 * 3.0 / 2.5, "offset {offset}");
            let o = outliers(&s, 1.5, QuantileMethod::default()).unwrap();
            assert_eq!((o.low.len(), o.high.clone()), (0, vec![5]));
            let ulp = offset * f64::EPSILON;
            assert!((o.fences.low - offset + 5.125 * unit).abs() <= ulp);
            assert!((o.fences.high - offset - 11.875 * unit).abs() <= ulp);
        }
    }

    // Hand-checked: median 6, |x - 6| = 5 4 3 2 1 0 1 2 3 4 94 -> MAD 3,
    // so M(100) = 0.6745 * 94 / 3 = 21.134... and M(1) = -1.124...
    #[test]
    fn modified_z_scores_from_the_definition() {
        let s = Sample::from_values((1..=10).map(f64::from).chain([100.0]));
        let z = modified_z_scores(&s).unwrap();
        assert!((z[10] - 0.6745 * 94.0 / 3.0).abs() < 1e-12);
        assert!((z[0] + 0.6745 * 5.0 / 3.0).abs() < 1e-12);
        assert_eq!(z.iter().filter(|m| m.abs() > MODIFIED_Z_CUTOFF).count(), 1);
        let flat = Sample::from_values([1.0, 1.0, 1.0, 9.0]);
        assert_eq!(modified_z_scores(&flat), Err(Undefined::ZeroMad));
        let big: Vec<usize> = (0..z.len()).filter(|&i| z[i].abs() > 3.5).collect();
        assert_eq!(modified_z_beyond(&s, 3.5), Ok(big));
        let m = QuantileMethod::default();
        let (near, far) = outliers_near_and_far(&s, 1.5, 3.0, m);
        assert_eq!((near, far), (outliers(&s, 1.5, m), outliers(&s, 3.0, m)));
    }
}
