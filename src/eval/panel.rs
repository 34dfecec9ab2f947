//! The standard panel and its robustness checks for one (group, column).

use std::sync::Arc;

use crate::stats::{self, Denominator, QuantileMethod, Sample};

use super::aggregate::from_stat;
use super::value::One;

/// The standard panel's figures, in the order the panel sheet shows them.
pub const PANEL_LABELS: &[&str] = &[
    "n",
    "missing",
    "mean",
    "sd",
    "min",
    "Q1",
    "median",
    "Q3",
    "max",
    "range",
    "IQR",
    "modes",
    "mode basis",
    "skewness g1",
    "Bowley skewness",
    "kurtosis b2",
    "low outliers",
    "high outliers",
];

/// Where the values of one panel column come from: `Deliveries!D` for a
/// data column (or a `let` computed from one), or a sheet and a name for a
/// `let` computed from several columns.
#[derive(Debug, PartialEq)]
pub enum CellPlace {
    Column { sheet_and_letters: String },
    Row { sheet: String, column: String },
}

/// A source cell, named only when shown: a long column can flag thousands.
#[derive(Debug, Clone, PartialEq)]
pub struct CellName {
    pub place: Arc<CellPlace>,
    /// 1-based sheet row.
    pub sheet_row: u32,
}

impl std::fmt::Display for CellName {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match &*self.place {
            CellPlace::Column { sheet_and_letters } => {
                write!(f, "{sheet_and_letters}{}", self.sheet_row)
            }
            CellPlace::Row { sheet, column } => {
                write!(f, "{sheet}!row {} ({column})", self.sheet_row)
            }
        }
    }
}

/// A value and the cell it came from.
#[derive(Debug, Clone, PartialEq)]
pub struct Flagged {
    pub address: CellName,
    pub value: f64,
}

/// The largest change that leaving out one value causes.
#[derive(Debug, Clone, PartialEq)]
pub struct Influence {
    pub change: f64,
    pub cell: Flagged,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Status {
    Ok,
    Note,
    Warn,
}

impl Status {
    pub fn word(self) -> &'static str {
        match self {
            Status::Ok => "ok",
            Status::Note => "note",
            Status::Warn => "warn",
        }
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Robustness {
    pub gap_in_sd: One,
    pub gap_in_iqr: One,
    pub outliers_wide: Vec<Flagged>,
    pub outliers_far: Vec<Flagged>,
    pub mean_without: One,
    pub sd_without: One,
    pub skewness_without: One,
    pub mean_change: One,
    pub sd_change: One,
    pub skewness_change: One,
    pub mean_influence: Option<Influence>,
    pub sd_influence: Option<Influence>,
    pub modified_z: Result<Vec<Flagged>, String>,
    pub heavy_tails: bool,
    pub bootstrap: Result<stats::BootstrapIntervals, String>,
    pub status: Status,
    pub reason: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct PanelEntry {
    pub group: Vec<String>,
    pub column: String,
    /// Same order as [`PANEL_LABELS`].
    pub figures: Vec<One>,
    pub robustness: Robustness,
    /// For the box plot: the five numbers and the whisker ends.
    pub sample_summary: Option<BoxSummary>,
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BoxSummary {
    pub whisker_low: f64,
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
    pub whisker_high: f64,
}

fn is_whole(values: &[f64]) -> bool {
    values.iter().all(|&x| stats::is_whole(x))
}

/// A sample's outliers beyond Tukey's 1.5 and 3 IQR fences (type 7
/// quartiles), found in one pass and shared by the panel and its checks.
pub struct Fenced {
    pub wide: stats::Stat<stats::Outliers>,
    pub far: stats::Stat<stats::Outliers>,
}

pub fn fenced(s: &Sample) -> Fenced {
    let (wide, far) = stats::outliers_near_and_far(s, 1.5, 3.0, QuantileMethod::default());
    Fenced { wide, far }
}

/// Figures of the standard panel.
pub fn panel_figures(s: &Sample, fenced: &Fenced) -> Vec<One> {
    let m = QuantileMethod::default();
    let outliers = &fenced.wide;
    let (modes, basis) = if s.is_empty() {
        (
            One::Undefined("no values".into()),
            One::Undefined("no values".into()),
        )
    } else if is_whole(s.values()) {
        (list(stats::modes(s)), One::Text("exact values".into()))
    } else {
        let k = stats::sturges_bins(s.count());
        (
            list(stats::binned_mode(s, k)),
            One::Text(format!("binned, {k} equal bins (Sturges)")),
        )
    };
    vec![
        One::Number(s.count() as f64),
        One::Number(s.missing() as f64),
        from_stat(s.mean()),
        from_stat(s.sd(Denominator::Sample)),
        from_stat(s.min()),
        from_stat(stats::quartile(s, 1, m)),
        from_stat(stats::median(s)),
        from_stat(stats::quartile(s, 3, m)),
        from_stat(s.max()),
        from_stat(s.range()),
        from_stat(stats::iqr(s, m)),
        modes,
        basis,
        from_stat(s.skewness(false)),
        from_stat(stats::bowley(s, m)),
        from_stat(s.kurtosis(false)),
        from_stat(
            outliers
                .as_ref()
                .map(|o| o.low.len() as f64)
                .map_err(Clone::clone),
        ),
        from_stat(
            outliers
                .as_ref()
                .map(|o| o.high.len() as f64)
                .map_err(Clone::clone),
        ),
    ]
}

fn list(v: stats::Stat<Vec<f64>>) -> One {
    v.map_or_else(|e| One::Undefined(e.to_string()), One::List)
}

fn change(after: &One, before: stats::Stat) -> One {
    match (after, before) {
        (One::Number(a), Ok(b)) => One::number(a - b),
        (One::Undefined(why), _) => One::Undefined(why.clone()),
        (_, Err(e)) => One::Undefined(e.to_string()),
        _ => One::Undefined("not a number".into()),
    }
}

/// Leave-one-out: the value whose removal moves the mean, and the sd, most.
/// Leaving out x moves the mean by (mean - x) / (n - 1), most at the
/// smallest or largest value, and the sum of squares by -n/(n-1) (x - mean)^2,
/// most at the value farthest from or nearest to the mean. So only those
/// candidates (first occurrences, in row order) are evaluated, with the
/// update formulas for the mean and the sum of squares.
fn influences(
    s: &Sample,
    address: &dyn Fn(usize) -> CellName,
) -> (Option<Influence>, Option<Influence>) {
    let n = s.count();
    let Ok(moments) = s.moments() else {
        return (None, None);
    };
    if n < 3 {
        return (None, None);
    }
    let (nf, mean) = (n as f64, moments.mean);
    let values = s.values();
    let (mut lowest, mut highest, mut nearest) = (0, 0, 0);
    for (i, &x) in values.iter().enumerate() {
        if x < values[lowest] {
            lowest = i;
        }
        if x > values[highest] {
            highest = i;
        }
        if (x - mean).abs() < (values[nearest] - mean).abs() {
            nearest = i;
        }
    }
    let mut candidates = [lowest, highest, nearest];
    candidates.sort_unstable();
    let m2 = moments.m2 * nf;
    let sd = (m2 / (nf - 1.0)).sqrt();
    let mut best_mean: Option<(f64, usize)> = None;
    let mut best_sd: Option<(f64, usize)> = None;
    for i in candidates {
        let x = values[i];
        let mean_without = (nf * mean - x) / (nf - 1.0);
        let m2_without = (m2 - (x - mean) * (x - mean_without)).max(0.0);
        let sd_without = (m2_without / (nf - 2.0)).sqrt();
        let (dm, ds) = (mean_without - mean, sd_without - sd);
        if best_mean.is_none_or(|(b, _)| dm.abs() > b.abs()) {
            best_mean = Some((dm, i));
        }
        if best_sd.is_none_or(|(b, _)| ds.abs() > b.abs()) {
            best_sd = Some((ds, i));
        }
    }
    let make = |(change, i): (f64, usize)| Influence {
        change,
        cell: Flagged {
            address: address(i),
            value: values[i],
        },
    };
    (best_mean.map(make), best_sd.map(make))
}

/// Robustness of one (group, column). `address(i)` is the source cell of value i.
pub fn robustness(s: &Sample, fenced: &Fenced, address: &dyn Fn(usize) -> CellName) -> Robustness {
    let m = QuantileMethod::default();
    let flag = |indexes: &[usize]| {
        indexes
            .iter()
            .map(|&i| Flagged {
                address: address(i),
                value: s.values()[i],
            })
            .collect::<Vec<_>>()
    };
    let (mean, median, sd, iqr) = (
        s.mean(),
        stats::median(s),
        s.sd(Denominator::Sample),
        stats::iqr(s, m),
    );
    let gap = |scale: &stats::Stat, zero: &str| -> One {
        match (&mean, &median, scale) {
            (Ok(a), Ok(b), Ok(u)) if *u > 0.0 => One::number((a - b) / u),
            (Ok(_), Ok(_), Ok(_)) => One::Undefined(zero.into()),
            (Err(e), _, _) | (_, Err(e), _) | (_, _, Err(e)) => One::Undefined(e.to_string()),
        }
    };
    let (gap_in_sd, gap_in_iqr) = (gap(&sd, "sd is zero"), gap(&iqr, "IQR is zero"));
    let (wide, far) = (fenced.wide.as_ref().ok(), fenced.far.as_ref().ok());
    let outliers_wide = wide
        .as_ref()
        .map(|o| flag(&[o.low.clone(), o.high.clone()].concat()))
        .unwrap_or_default();
    let outliers_far = far
        .as_ref()
        .map(|o| flag(&[o.low.clone(), o.high.clone()].concat()))
        .unwrap_or_default();
    // Without the 1.5 IQR outliers; with none, that is the sample itself.
    let trimmed_values;
    let trimmed = match wide {
        Some(o) if o.count() == 0 => s,
        Some(o) => {
            let mut out = vec![false; s.count()];
            o.low.iter().chain(&o.high).for_each(|&i| out[i] = true);
            let kept = s.values().iter().zip(&out).filter(|(_, gone)| !**gone);
            trimmed_values = Sample::from_finite(kept.map(|(x, _)| *x).collect());
            &trimmed_values
        }
        None => {
            trimmed_values = Sample::from_finite(Vec::new());
            &trimmed_values
        }
    };
    let (mean_without, sd_without, skewness_without) = (
        from_stat(trimmed.mean()),
        from_stat(trimmed.sd(Denominator::Sample)),
        from_stat(trimmed.skewness(false)),
    );
    let (mean_change, sd_change, skewness_change) = (
        change(&mean_without, mean.clone()),
        change(&sd_without, sd.clone()),
        change(&skewness_without, s.skewness(false)),
    );
    let (mean_influence, sd_influence) = influences(s, address);
    let modified_z = stats::modified_z_beyond(s, stats::MODIFIED_Z_CUTOFF)
        .map_err(|e| e.to_string())
        .map(|big| flag(&big));
    let heavy_tails = s.kurtosis(false).is_ok_and(|k| k > 3.0);
    let bootstrap =
        stats::bootstrap_intervals(s, stats::DEFAULT_RESAMPLES, 0.95, stats::DEFAULT_SEED)
            .map_err(|e| e.to_string());

    // Status thresholds are common practice, not from a published source.
    let mut reasons = Vec::new();
    let mut status = Status::Ok;
    let mut raise = |to: Status, why: String| {
        status = status.max(to);
        reasons.push(why);
    };
    if !outliers_far.is_empty() {
        raise(
            Status::Warn,
            format!("{} value(s) beyond the 3 IQR fences", outliers_far.len()),
        );
    }
    if let Ok(big) = &modified_z
        && !big.is_empty()
    {
        raise(
            Status::Warn,
            format!("{} modified z-score(s) above 3.5", big.len()),
        );
    }
    if let One::Number(g) = gap_in_sd
        && g.abs() > 0.5
    {
        raise(
            Status::Warn,
            format!("mean and median differ by {:.2} sd", g.abs()),
        );
    } else if let One::Number(g) = gap_in_sd
        && g.abs() > 0.25
    {
        raise(
            Status::Note,
            format!("mean and median differ by {:.2} sd", g.abs()),
        );
    }
    if outliers_far.is_empty() && !outliers_wide.is_empty() {
        raise(
            Status::Note,
            format!("{} value(s) beyond the 1.5 IQR fences", outliers_wide.len()),
        );
    }
    if heavy_tails {
        raise(
            Status::Note,
            "kurtosis above 3: tails heavier than normal".into(),
        );
    }
    if s.count() < 3 {
        raise(Status::Note, format!("only {} value(s)", s.count()));
    }
    let reason = if reasons.is_empty() {
        "no sign that a few values drive the figures".to_string()
    } else {
        reasons.join("; ")
    };
    Robustness {
        gap_in_sd,
        gap_in_iqr,
        outliers_wide,
        outliers_far,
        mean_without,
        sd_without,
        skewness_without,
        mean_change,
        sd_change,
        skewness_change,
        mean_influence,
        sd_influence,
        modified_z,
        heavy_tails,
        bootstrap,
        status,
        reason,
    }
}

/// Box plot numbers: quartiles (type 7) and whiskers to the most extreme
/// values inside the 1.5 IQR fences (Tukey 1977).
pub fn box_summary(s: &Sample) -> Option<BoxSummary> {
    let m = QuantileMethod::default();
    let fences = stats::fences(s, 1.5, m).ok()?;
    let sorted = s.sorted();
    let whisker_low = sorted.iter().copied().find(|&x| x >= fences.low)?;
    let whisker_high = sorted.iter().rev().copied().find(|&x| x <= fences.high)?;
    Some(BoxSummary {
        whisker_low,
        q1: stats::quartile(s, 1, m).ok()?,
        median: stats::median(s).ok()?,
        q3: stats::quartile(s, 3, m).ok()?,
        whisker_high,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Value i sits in Deliveries!C(i + 2), under a header row.
    fn column_c(i: usize) -> CellName {
        CellName {
            place: Arc::new(CellPlace::Column {
                sheet_and_letters: "Deliveries!C".into(),
            }),
            sheet_row: i as u32 + 2,
        }
    }

    #[test]
    fn leave_one_out_matches_recomputing() {
        let values = [3.0, 4.0, 4.5, 5.0, 30.0, 4.2];
        let s = Sample::from_values(values);
        let (mean, sd) = influences(&s, &column_c);
        let (mean, sd) = (mean.unwrap(), sd.unwrap());
        assert_eq!(mean.cell.address.to_string(), "Deliveries!C6");
        let rest = Sample::from_values(values.iter().copied().filter(|&x| x != 30.0));
        assert!((mean.change - (rest.mean().unwrap() - s.mean().unwrap())).abs() < 1e-12);
        assert!(
            (sd.change
                - (rest.sd(Denominator::Sample).unwrap() - s.sd(Denominator::Sample).unwrap()))
            .abs()
                < 1e-12
        );
    }

    #[test]
    fn a_typed_in_outlier_is_a_warning_with_its_cell() {
        let s = Sample::from_values([10.0, 11.0, 12.0, 11.5, 10.5, 11.2, 250.0]);
        let r = robustness(&s, &fenced(&s), &column_c);
        assert_eq!(r.status, Status::Warn);
        assert_eq!(
            r.outliers_far,
            vec![Flagged {
                address: column_c(6),
                value: 250.0
            }]
        );
        assert_eq!(r.outliers_far[0].address.to_string(), "Deliveries!C8");
        assert!(r.reason.contains("beyond the 3 IQR fences"), "{}", r.reason);
        let calm = Sample::from_values([10.0, 11.0, 12.0, 11.5, 10.5, 11.2, 10.8]);
        assert_eq!(
            robustness(&calm, &fenced(&calm), &column_c).status,
            Status::Ok
        );
    }
}
