//! Equal-width histograms and the binned mode of continuous data.

use super::moments::Denominator;
use super::order::iqr;
use super::quantile::QuantileMethod;
use super::sample::Sample;
use super::summation::Neumaier;
use super::undefined::{Stat, Undefined};

/// A rule-derived bin count is capped here so heavy ties (IQR near zero)
/// cannot ask for millions of bins; the histogram says when it was capped.
pub const MAX_BINS: usize = 1000;

/// How many equal-width bins to use.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BinRule {
    /// ceil(log2 n) + 1 bins (Sturges 1926).
    Sturges,
    /// Width 3.49 sigma n^(-1/3) (Scott 1979), with the exact constant
    /// (24 sqrt(pi))^(1/3) and the population sd.
    Scott,
    /// Width 2 IQR n^(-1/3) (Freedman and Diaconis 1981), IQR by type 7.
    FreedmanDiaconis,
    /// A bin count given in the recipe.
    Fixed(usize),
}

impl BinRule {
    /// The rule as the recipe writes it (`sturges`, `scott`, `freedman_diaconis`, or the count).
    pub fn word(self) -> String {
        match self {
            BinRule::Sturges => "sturges".into(),
            BinRule::Scott => "scott".into(),
            BinRule::FreedmanDiaconis => "freedman_diaconis".into(),
            BinRule::Fixed(k) => k.to_string(),
        }
    }

    /// The rule in words, for chart titles.
    pub fn words(self) -> String {
        match self {
            BinRule::Sturges => "Sturges' rule".into(),
            BinRule::Scott => "Scott's rule".into(),
            BinRule::FreedmanDiaconis => "the Freedman-Diaconis rule".into(),
            BinRule::Fixed(k) => format!("a fixed count of {k}"),
        }
    }

    /// The rule a recipe word names; None for an unknown word.
    pub fn from_word(word: &str) -> Option<BinRule> {
        match word {
            "sturges" => Some(BinRule::Sturges),
            "scott" => Some(BinRule::Scott),
            "freedman_diaconis" => Some(BinRule::FreedmanDiaconis),
            _ => None,
        }
    }
}

/// Equal-width bins over a sample and the values in each.
#[derive(Debug, Clone, PartialEq)]
pub struct Histogram {
    /// k + 1 edges; bin i is `[edges[i], edges[i+1])`, the last bin closed.
    pub edges: Vec<f64>,
    /// The number of values in each bin.
    pub counts: Vec<usize>,
    /// The bin count the rule asked for, when it was more than the most
    /// bins allowed ([`MAX_BINS`], or [`CHART_MAX_BINS`] for a chart).
    pub capped_from: Option<usize>,
    /// Values below the first edge, counted in one overflow bin (only a
    /// [`fenced_histogram`] has any): they lie beyond the low far fence.
    pub below: usize,
    /// Values above the last edge, counted in one overflow bin.
    pub above: usize,
}

/// Sturges' rule: ceil(log2 n) + 1 bins for n values.
pub fn sturges_bins(n: usize) -> usize {
    (n as f64).log2().ceil() as usize + 1
}

fn bin_count(sample: &Sample, rule: BinRule, range: f64) -> Stat<usize> {
    let n = sample.count() as f64;
    let width = match rule {
        BinRule::Fixed(0) => {
            return Err(Undefined::NoBins);
        }
        BinRule::Fixed(k) => return Ok(k),
        BinRule::Sturges => return Ok(sturges_bins(sample.count())),
        BinRule::Scott => {
            (24.0 * std::f64::consts::PI.sqrt() / n).cbrt() * sample.sd(Denominator::Population)?
        }
        BinRule::FreedmanDiaconis => 2.0 * iqr(sample, QuantileMethod::HyndmanFan(7))? / n.cbrt(),
    };
    if width <= 0.0 || range == 0.0 {
        return Ok(1);
    }
    let k = (range / width).ceil();
    Ok(if k > 1e9 {
        usize::MAX
    } else {
        (k as usize).max(1)
    })
}

/// Counts in k equal bins over [min, max]. A constant column gets one bin.
pub fn histogram(sample: &Sample, rule: BinRule) -> Stat<Histogram> {
    let (lo, hi) = (sample.min()?, sample.max()?);
    let asked = bin_count(sample, rule, hi - lo)?;
    let k = asked.min(MAX_BINS);
    let capped_from = (asked > MAX_BINS).then_some(asked);
    let edges = equal_edges(lo, hi, k);
    let mut counts = vec![0; k];
    for &x in sample.values() {
        counts[bin_of(x, &edges)] += 1;
    }
    Ok(Histogram {
        edges,
        counts,
        capped_from,
        below: 0,
        above: 0,
    })
}

/// Most bins a charted histogram draws: more cannot be told apart on a
/// page. Common practice, no source.
pub const CHART_MAX_BINS: usize = 50;

/// The fence factor of a charted histogram: Tukey's (1977) "far out"
/// fences, Q1 - 3 IQR and Q3 + 3 IQR (type 7 quartiles).
pub const CHART_FENCE_IQR: f64 = 3.0;

/// The histogram a chart draws: the bin rule applied to the values inside
/// the 3 IQR fences (so one typo cannot stretch every bin), the values
/// beyond them counted in the `below` and `above` overflow bins, at most
/// [`CHART_MAX_BINS`] bins. When the IQR is 0 the fences would call every
/// value off the middle an outlier, so the bins cover every value instead.
pub fn fenced_histogram(sample: &Sample, rule: BinRule) -> Stat<Histogram> {
    let fences = super::outliers::fences(sample, CHART_FENCE_IQR, QuantileMethod::HyndmanFan(7));
    let (low, high) = match fences {
        Ok(f) if f.high > f.low => (f.low, f.high),
        _ => return capped(histogram(sample, rule)?, sample),
    };
    let inside = Sample::from_values(
        sample
            .values()
            .iter()
            .copied()
            .filter(|x| (low..=high).contains(x)),
    );
    let mut h = capped(histogram(&inside, rule)?, &inside)?;
    h.below = sample.values().iter().filter(|&&x| x < low).count();
    h.above = sample.values().iter().filter(|&&x| x > high).count();
    Ok(h)
}

/// `h` redrawn with at most [`CHART_MAX_BINS`] bins, saying how many the
/// rule asked for when that was more.
fn capped(h: Histogram, sample: &Sample) -> Stat<Histogram> {
    let asked = h.capped_from.unwrap_or(h.counts.len());
    if asked <= CHART_MAX_BINS {
        return Ok(h);
    }
    let mut redrawn = histogram(sample, BinRule::Fixed(CHART_MAX_BINS))?;
    redrawn.capped_from = Some(asked);
    Ok(redrawn)
}

/// lo + i (hi - lo) / k, with the last edge exactly hi.
fn equal_edges(lo: f64, hi: f64, k: usize) -> Vec<f64> {
    let step = (hi - lo) / k as f64;
    let mut edges: Vec<f64> = (0..=k).map(|i| lo + i as f64 * step).collect();
    edges[k] = hi;
    edges
}

/// The bin of x (lo <= x <= hi): estimated by division, then corrected
/// against the edges themselves so rounding never puts x on the wrong side.
fn bin_of(x: f64, edges: &[f64]) -> usize {
    let k = edges.len() - 1;
    let (lo, hi) = (edges[0], edges[k]);
    if hi == lo {
        return 0;
    }
    let mut i = (((x - lo) * (k as f64 / (hi - lo))) as usize).min(k - 1);
    if x < edges[i] {
        i -= 1;
    } else if i + 1 < k && x >= edges[i + 1] {
        i += 1;
    }
    i
}

/// The mean of the values in the fullest of k equal bins over [min, max];
/// every tied bin's mean, ascending.
pub fn binned_mode(sample: &Sample, k: usize) -> Stat<Vec<f64>> {
    if k == 0 {
        return Err(Undefined::NoBins);
    }
    let edges = equal_edges(sample.min()?, sample.max()?, k.min(MAX_BINS));
    // Counts and sums in one pass: each value's bin is found once.
    let mut counts = vec![0usize; edges.len() - 1];
    let mut sums = vec![Neumaier::default(); counts.len()];
    for &x in sample.values() {
        let bin = bin_of(x, &edges);
        counts[bin] += 1;
        sums[bin].add(x);
    }
    let fullest = *counts.iter().max().unwrap_or(&0);
    Ok(counts
        .iter()
        .zip(&sums)
        .filter(|(count, _)| **count == fullest)
        .map(|(count, sum)| sum.total() / *count as f64)
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fixed_bins_count_every_value_once_with_the_last_bin_closed() {
        let s = Sample::from_values([0.0, 1.0, 2.0, 3.0, 4.0, 4.0]);
        let h = histogram(&s, BinRule::Fixed(4)).unwrap();
        assert_eq!(h.edges, vec![0.0, 1.0, 2.0, 3.0, 4.0]);
        assert_eq!(h.counts, vec![1, 1, 1, 3]);
    }

    #[test]
    fn sturges_bin_count() {
        // ceil(log2 100) + 1 = 8.
        let s = Sample::from_values((0..100).map(f64::from));
        assert_eq!(histogram(&s, BinRule::Sturges).unwrap().counts.len(), 8);
    }

    #[test]
    fn constant_column_has_one_bin() {
        let s = Sample::from_values([2.5; 10]);
        for rule in [
            BinRule::Sturges,
            BinRule::Scott,
            BinRule::FreedmanDiaconis,
            BinRule::Fixed(5),
        ] {
            let h = histogram(&s, rule).unwrap();
            assert_eq!(h.counts.iter().sum::<usize>(), 10, "{rule:?}");
        }
        assert_eq!(binned_mode(&s, 5), Ok(vec![2.5]));
    }

    #[test]
    fn heavy_ties_cap_the_bin_count() {
        let s = Sample::from_values(std::iter::repeat_n(1.0, 1000).chain([1.0 + 1e-9, 1e6]));
        let h = histogram(&s, BinRule::FreedmanDiaconis).unwrap();
        assert_eq!(h.counts.len(), 1);
        let spread = Sample::from_values((0..100).map(|i| f64::from(i) * 1e-6).chain([1e6]));
        let h = histogram(&spread, BinRule::FreedmanDiaconis).unwrap();
        assert_eq!(h.counts.len(), MAX_BINS);
        assert!(h.capped_from.unwrap() > MAX_BINS);
    }

    /// One typo far out: the Freedman-Diaconis rule over all 21 values
    /// would give (900 - 1) / (2 * 10 / 21^(1/3)) = 124.0 -> 125 bins; inside
    /// the 3 IQR fences (Q1 = 6, Q3 = 16, fences -24 and 46, type 7 by hand)
    /// the 20 values 1..20 get ceil(19 / (2 * 9.5 / 20^(1/3))) = 3 bins, and
    /// the typo is counted above them.
    #[test]
    fn a_typo_goes_to_the_overflow_bin_not_into_every_bin() {
        let s = Sample::from_values((1..=20).map(f64::from).chain([900.0]));
        assert_eq!(
            histogram(&s, BinRule::FreedmanDiaconis)
                .unwrap()
                .counts
                .len(),
            125
        );
        let h = fenced_histogram(&s, BinRule::FreedmanDiaconis).unwrap();
        assert_eq!((h.counts.len(), h.below, h.above), (3, 0, 1));
        assert_eq!((h.edges[0], h.edges[3]), (1.0, 20.0));
        assert_eq!(h.counts.iter().sum::<usize>(), 20);
    }

    #[test]
    fn a_charted_histogram_draws_at_most_the_chart_cap() {
        let s = Sample::from_values((0..1000).map(f64::from));
        let h = fenced_histogram(&s, BinRule::Fixed(400)).unwrap();
        assert_eq!((h.counts.len(), h.capped_from), (CHART_MAX_BINS, Some(400)));
        assert_eq!(h.counts.iter().sum::<usize>(), 1000);
        // A zero IQR: no fences, every value in the bins.
        let tied = Sample::from_values([5.0; 10].into_iter().chain([6.0, 100.0]));
        let h = fenced_histogram(&tied, BinRule::Sturges).unwrap();
        assert_eq!(
            (h.below, h.above, h.counts.iter().sum::<usize>()),
            (0, 0, 12)
        );
    }

    // Hand-checked: bins of width 2 over [0, 10]: the fullest is [2, 4)
    // holding 2, 3, 3.5, whose mean is 17/6.
    #[test]
    fn binned_mode_is_the_mean_of_the_fullest_bin() {
        let s = Sample::from_values([0.0, 2.0, 3.0, 3.5, 5.0, 9.0, 10.0]);
        assert_eq!(binned_mode(&s, 5), Ok(vec![8.5 / 3.0]));
        let tied = Sample::from_values([0.0, 1.0, 9.0, 10.0]);
        assert_eq!(binned_mode(&tied, 2), Ok(vec![0.5, 9.5]));
    }
}
