//! Property tests of the statistics core: what must hold for any data.
//! Shifting moves location and leaves spread and shape alone; scaling
//! scales spread and leaves shape alone; row order never matters; no
//! statistic is ever NaN or infinite (it is a value or a reason).

use proptest::prelude::*;
use sheaf::stats::*;

fn data() -> impl Strategy<Value = Vec<f64>> {
    prop::collection::vec(-1e4f64..1e4, 1..120)
}

fn near(a: Stat, b: Stat, scale: f64) -> bool {
    match (a, b) {
        (Ok(a), Ok(b)) => (a - b).abs() <= 1e-9 * scale.max(1.0),
        (Err(a), Err(b)) => a == b,
        _ => false,
    }
}

/// Sizes of values the data live at, for absolute tolerances.
fn magnitude(values: &[f64]) -> f64 {
    values.iter().fold(0.0, |m, x| m.max(x.abs()))
}

fn location(s: &Sample) -> Vec<Stat> {
    let hf7 = QuantileMethod::default();
    vec![
        s.mean(),
        median(s),
        quartile(s, 1, hf7),
        quartile(s, 3, hf7),
        s.min(),
        s.max(),
        trimmed_mean(s, 0.1),
    ]
}

fn spread(s: &Sample) -> Vec<Stat> {
    let hf7 = QuantileMethod::default();
    vec![
        s.sd(Denominator::Sample),
        iqr(s, hf7),
        mad(s, false),
        s.range(),
    ]
}

/// Shape statistics are ratios of nearly equal quantities; near-constant
/// data may only be compared when the spread is not dominated by rounding.
fn shape(s: &Sample) -> Vec<Stat> {
    vec![
        s.skewness(false),
        s.kurtosis(false),
        s.excess_kurtosis(true),
        bowley(s, QuantileMethod::default()),
    ]
}

fn well_spread(values: &[f64]) -> bool {
    let s = Sample::from_values(values.iter().copied());
    s.sd(Denominator::Population)
        .is_ok_and(|sd| sd > 1e-3 * magnitude(values).max(1.0))
        && iqr(&s, QuantileMethod::default()).is_ok_and(|q| q > 1e-3 * magnitude(values).max(1.0))
}

proptest! {
    #[test]
    fn shifting_moves_location_only(values in data(), shift in -1e4f64..1e4) {
        let (a, b) = (Sample::from_values(values.clone()), Sample::from_values(values.iter().map(|x| x + shift)));
        let scale = magnitude(&values) + shift.abs();
        for (x, y) in location(&a).into_iter().zip(location(&b)) {
            prop_assert!(near(x.clone().map(|v| v + shift), y.clone(), scale), "{x:?} + {shift} vs {y:?}");
        }
        for (x, y) in spread(&a).into_iter().zip(spread(&b)) {
            prop_assert!(near(x.clone(), y.clone(), scale), "{x:?} vs {y:?}");
        }
    }

    #[test]
    fn shifting_leaves_shape_alone(values in data(), shift in -100f64..100.0) {
        prop_assume!(well_spread(&values));
        let (a, b) = (Sample::from_values(values.clone()), Sample::from_values(values.iter().map(|x| x + shift)));
        for (x, y) in shape(&a).into_iter().zip(shape(&b)) {
            prop_assert!(near(x.clone(), y.clone(), 1e2), "{x:?} vs {y:?}");
        }
    }

    #[test]
    fn scaling_scales_spread_and_keeps_shape(values in data(), factor in 0.01f64..100.0) {
        let (a, b) = (Sample::from_values(values.clone()), Sample::from_values(values.iter().map(|x| x * factor)));
        let scale = magnitude(&values) * factor.max(1.0);
        for (x, y) in spread(&a).into_iter().zip(spread(&b)) {
            prop_assert!(near(x.clone().map(|v| v * factor), y.clone(), scale), "{x:?} * {factor} vs {y:?}");
        }
        if well_spread(&values) {
            for (x, y) in shape(&a).into_iter().zip(shape(&b)) {
                prop_assert!(near(x.clone(), y.clone(), 1e2), "{x:?} vs {y:?}");
            }
        }
    }

    #[test]
    fn row_order_never_matters(values in data(), seed in any::<u64>()) {
        let mut shuffled = values.clone();
        // Fisher-Yates with a small LCG: a permutation chosen by proptest's seed.
        let mut state = seed | 1;
        for i in (1..shuffled.len()).rev() {
            state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            shuffled.swap(i, (state >> 33) as usize % (i + 1));
        }
        let (a, b) = (Sample::from_values(values.clone()), Sample::from_values(shuffled));
        let scale = magnitude(&values);
        let all = |s: &Sample| [location(s), spread(s), shape(s)].concat();
        for (x, y) in all(&a).into_iter().zip(all(&b)) {
            prop_assert!(near(x.clone(), y.clone(), scale.max(1e2)), "{x:?} vs {y:?}");
        }
        prop_assert_eq!(modes(&a), modes(&b));
        prop_assert_eq!(histogram(&a, BinRule::Sturges).map(|h| h.counts), histogram(&b, BinRule::Sturges).map(|h| h.counts));
    }

    #[test]
    fn every_figure_is_a_number_or_a_reason(values in prop::collection::vec(prop_oneof![-1e6f64..1e6, Just(0.0), Just(1.0)], 0..60)) {
        let s = Sample::from_values(values);
        let all = [location(&s), spread(&s), shape(&s)].concat();
        for v in all.into_iter().chain([s.skewness(true), winsorized_mean(&s, 0.2), s.variance(Denominator::Population)]).flatten() {
            prop_assert!(v.is_finite());
        }
        if let Ok(z) = modified_z_scores(&s) {
            prop_assert!(z.iter().all(|v| v.is_finite()));
        }
        // The one-pass pair of fences finds what each fence finds alone.
        let m = QuantileMethod::default();
        prop_assert_eq!(outliers_near_and_far(&s, 1.5, 3.0, m), (outliers(&s, 1.5, m), outliers(&s, 3.0, m)));
        for rule in [BinRule::Sturges, BinRule::Scott, BinRule::FreedmanDiaconis, BinRule::Fixed(3)] {
            if let Ok(h) = histogram(&s, rule) {
                prop_assert_eq!(h.counts.iter().sum::<usize>(), s.count());
            }
        }
        if let Ok(b) = bootstrap_intervals(&s, 50, 0.95, DEFAULT_SEED) {
            prop_assert!(b.mean.low <= b.mean.high && b.median.low <= b.median.high);
            prop_assert!(b.mean.low >= s.min().unwrap() && b.mean.high <= s.max().unwrap());
        }
    }
}

/// The bootstrap interval for the mean of normal-like data should be close
/// to the textbook 1.96 s / sqrt(n) half-width (Efron and Tibshirani 1993,
/// ch. 13: percentile intervals agree with the normal one for such data).
#[test]
fn bootstrap_mean_interval_has_the_textbook_width() {
    // A deterministic, roughly normal sample: sums of 12 uniforms minus 6.
    let mut state = 42u64;
    let mut uniform = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    let values: Vec<f64> = (0..400)
        .map(|_| (0..12).map(|_| uniform()).sum::<f64>() - 6.0)
        .collect();
    let s = Sample::from_values(values);
    let b = bootstrap_intervals(&s, DEFAULT_RESAMPLES, 0.95, DEFAULT_SEED).unwrap();
    let textbook = 1.96 * s.sd(Denominator::Sample).unwrap() / 20.0;
    let half = (b.mean.high - b.mean.low) / 2.0;
    assert!(
        (half / textbook - 1.0).abs() < 0.1,
        "half-width {half} vs {textbook}"
    );
    let mean = s.mean().unwrap();
    assert!(b.mean.low < mean && mean < b.mean.high);
}
