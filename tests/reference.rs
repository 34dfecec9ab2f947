//! sheaf's statistics against numpy and scipy.
//!
//! Source: tests/reference/generate.py computes every statistic with numpy
//! and scipy (versions pinned in tests/reference/requirements.txt, recorded
//! in the first line of expected.tsv) on the committed datasets; this test
//! recomputes each one with sheaf and compares to 1e-12 relative. .ci/run
//! reruns the script and fails when expected.tsv is stale.
//!
//! Hyndman-Fan types 1-9 are checked against numpy's nine named methods,
//! the Joanes-Gill variants against scipy's `bias` options, MAD against
//! scipy's median_abs_deviation, trimmed and winsorized means against
//! scipy's trim_mean and mstats.winsorize, histograms against numpy's
//! histogram (fixed counts and its sturges, scott and fd rules), the
//! standard errors of the noise rule against scipy's `stats.sem`,
//! `mstats.mjci` (Maritz-Jarrett, quantiles), `mstats.trimmed_stde`
//! (Tukey-McLaughlin, trimmed means) and `stats.binom` (shares). Rows
//! named exact_* are exact rational arithmetic (Python's fractions): the
//! moments, and the order statistics and robustness figures (IQR, Bowley,
//! MAD, modified z, fences, mean-median gaps, leave-one-out changes, the
//! standard errors of G1 and G2 under normality and the ratios to them, the
//! variance of the sample variance over all 6^6 resamples of a tiny set),
//! also on two datasets 1e8 and 1e12 from zero where only they are given.

use std::collections::BTreeMap;
use std::path::Path;

use sheaf::stats::*;

fn dataset(name: &str) -> Sample {
    let path =
        Path::new(env!("CARGO_MANIFEST_DIR")).join(format!("tests/reference/datasets/{name}.csv"));
    let text = std::fs::read_to_string(&path).unwrap();
    let values = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .skip(1);
    Sample::from_values(values.map(|v| v.trim().parse::<f64>().unwrap()))
}

/// What sheaf says for one statistic name of expected.tsv.
fn sheaf_value(s: &Sample, name: &str) -> Vec<f64> {
    let one = |v: Stat| vec![v.unwrap_or_else(|e| panic!("{name}: {e}"))];
    let many = |v: Stat<Vec<f64>>| v.unwrap_or_else(|e| panic!("{name}: {e}"));
    let hf7 = QuantileMethod::default();
    let (head, tail) = name.rsplit_once('_').unwrap_or((name, ""));
    let number = |t: &str| t.parse::<f64>().unwrap();
    match name {
        "count" => return vec![s.count() as f64],
        "sum" => return vec![s.sum()],
        "min" => return one(s.min()),
        "max" => return one(s.max()),
        "range" => return one(s.range()),
        "mean" => return one(s.mean()),
        "median" => return one(median(s)),
        "variance_sample" => return one(s.variance(Denominator::Sample)),
        "variance_population" => return one(s.variance(Denominator::Population)),
        "sd_sample" => return one(s.sd(Denominator::Sample)),
        "sd_population" => return one(s.sd(Denominator::Population)),
        "skewness" => return one(s.skewness(false)),
        "skewness_adjusted" => return one(s.skewness(true)),
        "kurtosis" => return one(s.kurtosis(false)),
        "excess_kurtosis" => return one(s.excess_kurtosis(false)),
        "excess_kurtosis_adjusted" => return one(s.excess_kurtosis(true)),
        "bowley" => return one(bowley(s, hf7)),
        "mad" => return one(mad(s, false)),
        "mad_scaled" => return one(mad(s, true)),
        "modes" => return many(modes(s)),
        "modified_z" => return many(modified_z_scores(s)),
        "skewness_se" => return one(skewness_se(s.count())),
        "kurtosis_se" => return one(kurtosis_se(s.count())),
        "skewness_ratio" => return one(skewness_against_noise(s).map(|k| k.ratio)),
        "kurtosis_ratio" => return one(kurtosis_against_noise(s).map(|k| k.ratio)),
        "gap_sd" => {
            return one(Ok(
                mean_minus_median(s).unwrap() / s.sd(Denominator::Sample).unwrap()
            ));
        }
        "gap_iqr" => return one(Ok(mean_minus_median(s).unwrap() / iqr(s, hf7).unwrap())),
        "mean_change_without_outliers" => {
            let o = outliers(s, 1.5, hf7).unwrap();
            return one(mean_change_without(s, &[o.low, o.high].concat()));
        }
        "leave_one_out_mean_change" => return vec![leave_one_out(s).unwrap().mean.change],
        "leave_one_out_mean_index" => return vec![leave_one_out(s).unwrap().mean.index as f64],
        "leave_one_out_sd_change" => return vec![leave_one_out(s).unwrap().sd.change],
        "leave_one_out_sd_index" => return vec![leave_one_out(s).unwrap().sd.index as f64],
        // Standard errors for the noise rule of Changes: scipy's `stats.sem`,
        // and a share's against `stats.binom(n, p).std() / n`.
        "mean_se" => return one(mean_se(s)),
        "share_at_or_below_mean" | "share_se_at_or_below_mean" => {
            let mean = s.mean().unwrap();
            let p = s.values().iter().filter(|&&x| x <= mean).count() as f64 / s.count() as f64;
            return match name {
                "share_at_or_below_mean" => vec![p],
                _ => one(share_se(p, s.count())),
            };
        }
        // Against every resample enumerated in exact arithmetic.
        "variance_of_variance" => {
            let m = s.moments().unwrap();
            return vec![variance_of_variance(m.n, m.m2, m.m4)];
        }
        _ => {}
    }
    if let Some(moment) = name.strip_prefix("exact_") {
        return sheaf_value(s, moment);
    }
    if let Some(rest) = name.strip_prefix("percentile_") {
        let (method, p) = rest.split_once('_').unwrap();
        let method = QuantileMethod::from_word(method).unwrap();
        return one(quantile_sorted(s.sorted(), number(p) / 100.0, method));
    }
    if let Some(method) = name.strip_prefix("iqr_") {
        return one(iqr(s, QuantileMethod::from_word(method).unwrap()));
    }
    let counts = |h: Stat<Histogram>| h.unwrap().counts.iter().map(|&c| c as f64).collect();
    match head {
        "trimmed_mean" => one(trimmed_mean(s, number(tail))),
        // Tukey-McLaughlin, against scipy's `mstats.trimmed_stde`.
        "trimmed_mean_se" => one(trimmed_mean_se(s, number(tail))),
        // Maritz-Jarrett, against scipy's `mstats.mjci`.
        "quantile_se" => one(quantile_se(s, number(tail))),
        "winsorized_mean" => one(winsorized_mean(s, number(tail))),
        "fence_low" => vec![fences(s, number(tail), hf7).unwrap().low],
        "fence_high" => vec![fences(s, number(tail), hf7).unwrap().high],
        "outliers_low" => vec![outliers(s, number(tail), hf7).unwrap().low.len() as f64],
        "outliers_high" => vec![outliers(s, number(tail), hf7).unwrap().high.len() as f64],
        "binned_mode" => many(binned_mode(s, number(tail) as usize)),
        "histogram" => match BinRule::from_word(tail) {
            Some(rule) => counts(histogram(s, rule)),
            None => counts(histogram(s, BinRule::Fixed(number(tail) as usize))),
        },
        "histogram_freedman" => counts(histogram(s, BinRule::FreedmanDiaconis)),
        _ => panic!("expected.tsv names a statistic this test does not know: {name}"),
    }
}

fn within(ours: f64, theirs: f64, relative: f64) -> bool {
    ours == theirs || (ours - theirs).abs() <= relative * theirs.abs().max(ours.abs()) + 1e-13
}

type Table = BTreeMap<(String, String), Vec<f64>>;

fn expected() -> Table {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/expected.tsv");
    let text = std::fs::read_to_string(path).unwrap();
    text.lines()
        .filter(|l| !l.starts_with('#'))
        .map(|line| {
            let mut fields = line.split('\t');
            let (data, name, values) = (
                fields.next().unwrap(),
                fields.next().unwrap(),
                fields.next().unwrap(),
            );
            (
                (data.to_string(), name.to_string()),
                values.split(',').map(|v| v.parse().unwrap()).collect(),
            )
        })
        .collect()
}

#[test]
fn every_statistic_matches_numpy_and_scipy() {
    let table = expected();
    let mut samples = BTreeMap::new();
    let mut failures = Vec::new();
    for ((data, name), theirs) in &table {
        let sample = samples.entry(data.clone()).or_insert_with(|| dataset(data));
        let ours = sheaf_value(sample, name);
        let agrees = |reference: &[f64], relative| {
            ours.len() == reference.len()
                && ours
                    .iter()
                    .zip(reference)
                    .all(|(a, b)| within(*a, *b, relative))
        };
        if agrees(theirs, 1e-12) {
            continue;
        }
        // scipy's moments are a plain two-pass sum and lose digits on data
        // with a large offset. Where sheaf then agrees with the exact value
        // to 1e-13, a gap to scipy of up to 1e-9 is scipy's, not ours.
        let exact = table.get(&(data.clone(), format!("exact_{name}")));
        if exact.is_some_and(|exact| agrees(exact, 1e-13)) && agrees(theirs, 1e-9) {
            eprintln!(
                "note: {data} {name}: sheaf matches the exact value; scipy is off by {:e}",
                (ours[0] - theirs[0]).abs()
            );
            continue;
        }
        failures.push(format!(
            "{data} {name}: sheaf {ours:?}, reference {theirs:?}"
        ));
    }
    assert!(
        failures.is_empty(),
        "{} of {} differ:\n{}",
        failures.len(),
        table.len(),
        failures.join("\n")
    );
    // 4 datasets x (11 basic + 9 x 14 quantile + the rest) figures.
    assert!(
        table.len() > 600,
        "only {} reference figures were read",
        table.len()
    );
}

#[test]
fn exact_moments_hold_to_thirteen_digits() {
    let table = expected();
    for ((data, name), exact) in table.iter().filter(|((_, n), _)| n.starts_with("exact_")) {
        let ours = sheaf_value(&dataset(data), name);
        assert!(
            within(ours[0], exact[0], 1e-13),
            "{data} {name}: sheaf {}, exact {}",
            ours[0],
            exact[0]
        );
    }
}
