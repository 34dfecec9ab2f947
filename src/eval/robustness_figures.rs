//! The robustness checks' figures as one table: each figure's stable key
//! (the `--json` key), its columns on the robustness sheet and where its
//! value lies in a [`Robustness`]. The robustness sheet, the `--json`
//! report and the Checks sheet's list of figures without a value all read
//! [`ROBUSTNESS_FIGURES`], so a figure is added, renamed or reordered in
//! one place.

use crate::stats::{AgainstNoise, BootstrapIntervals};

use super::panel::{FigureKind, Flagged, Influence, Robustness};
use super::{One, Reason};

/// What a robustness figure is, and how to read it off a [`Robustness`].
/// Each shape has a fixed set of sheet columns ([`RobustnessShape::kinds`]);
/// `--json` writes it as one value of the shape's own form.
#[derive(Debug, Clone, Copy)]
pub enum RobustnessShape {
    /// One number (or why there is none), shown as the given kind.
    One(FigureKind, fn(&Robustness) -> &One),
    /// Flagged values with their cells, or why there are none: a count and
    /// the list of cells.
    Cells(fn(&Robustness) -> Result<&[Flagged], &Reason>),
    /// The largest leave-one-out change and its cell.
    Influence(fn(&Robustness) -> &Result<Influence, Reason>),
    /// A shape statistic against its noise under normality: estimate,
    /// standard error, their ratio and the verdict. `ratio` names the ratio
    /// as the verdict's words give it (`|G1 / SE|` is two-sided).
    Noise {
        /// The statistic against its noise.
        of: fn(&Robustness) -> &Result<AgainstNoise, Reason>,
        /// The ratio in words.
        ratio: &'static str,
    },
    /// The bootstrap intervals of the mean and the median, the number of
    /// resamples and the method.
    Bootstrap(fn(&Robustness) -> &Result<BootstrapIntervals, Reason>),
}

impl RobustnessShape {
    /// How each of the shape's sheet columns is shown, in the order a
    /// figure's `labels` name them.
    pub fn kinds(&self) -> &'static [FigureKind] {
        use FigureKind::{Count, Measure, Shape, Words};
        match self {
            RobustnessShape::One(FigureKind::Count, _) => &[Count],
            RobustnessShape::One(FigureKind::Measure, _) => &[Measure],
            RobustnessShape::One(FigureKind::Shape, _) => &[Shape],
            RobustnessShape::One(FigureKind::Share, _) => &[FigureKind::Share],
            RobustnessShape::One(FigureKind::Words, _) => &[Words],
            RobustnessShape::Cells(_) => &[Count, Words],
            RobustnessShape::Influence(_) => &[Measure, Words],
            RobustnessShape::Noise { .. } => &[Shape, Shape, Shape, Words],
            RobustnessShape::Bootstrap(_) => &[Measure, Measure, Measure, Measure, Count, Words],
        }
    }
}

/// What a robustness figure is about. The robustness sheet prints in
/// bands of whole topics, so a printed page never splits one.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Topic {
    /// The mean-median gap and the outliers by the fences.
    Centre,
    /// Mean, sd and skewness without the outliers.
    Without,
    /// Single values: leave-one-out and modified z-scores.
    SingleValues,
    /// Skewness and kurtosis against their standard errors.
    Shape,
    /// Bootstrap intervals.
    Intervals,
}

/// One figure of the robustness checks.
#[derive(Debug, Clone, Copy)]
pub struct RobustnessFigure {
    /// Stable key: the `--json` key. Never renamed, since readers hold it.
    pub key: &'static str,
    /// What it is about, for printing in bands.
    pub topic: Topic,
    /// What it is, for the JSON schema.
    pub about: &'static str,
    /// The robustness sheet's column headers, one per [`RobustnessShape::kinds`].
    pub labels: &'static [&'static str],
    /// Its shape and where its value lies.
    pub shape: RobustnessShape,
}

const fn figure(
    key: &'static str,
    topic: Topic,
    about: &'static str,
    labels: &'static [&'static str],
    shape: RobustnessShape,
) -> RobustnessFigure {
    RobustnessFigure {
        key,
        topic,
        about,
        labels,
        shape,
    }
}

use FigureKind::{Measure, Shape};
use RobustnessShape as S;

/// The robustness figures, in the sheet's order (after group, column,
/// status and reason) and the `--json` report's.
pub const ROBUSTNESS_FIGURES: &[RobustnessFigure] = &[
    figure(
        "gap_in_sd",
        Topic::Centre,
        "(mean - median) / sd.",
        &["(mean - median) / sd"],
        S::One(Shape, |r| &r.gap_in_sd),
    ),
    figure(
        "gap_in_iqr",
        Topic::Centre,
        "(mean - median) / IQR.",
        &["(mean - median) / IQR"],
        S::One(Shape, |r| &r.gap_in_iqr),
    ),
    figure(
        "outliers_1_5_iqr",
        Topic::Centre,
        "Values beyond the 1.5 IQR fences, with their cells.",
        &["outliers 1.5 IQR", "1.5 IQR cells"],
        S::Cells(|r| fenced(r, &r.outliers_wide)),
    ),
    figure(
        "outliers_3_iqr",
        Topic::Centre,
        "Values beyond the 3 IQR fences, with their cells.",
        &["outliers 3 IQR", "3 IQR cells"],
        S::Cells(|r| fenced(r, &r.outliers_far)),
    ),
    figure(
        "mean_without_outliers",
        Topic::Without,
        "The mean without the 1.5 IQR outliers.",
        &["mean without"],
        S::One(Measure, |r| &r.mean_without),
    ),
    figure(
        "mean_change_without_outliers",
        Topic::Without,
        "The mean without the outliers minus the mean.",
        &["mean change"],
        S::One(Measure, |r| &r.mean_change),
    ),
    figure(
        "sd_without_outliers",
        Topic::Without,
        "The sample sd without the 1.5 IQR outliers.",
        &["sd without"],
        S::One(Measure, |r| &r.sd_without),
    ),
    figure(
        "sd_change_without_outliers",
        Topic::Without,
        "The sd without the outliers minus the sd.",
        &["sd change"],
        S::One(Measure, |r| &r.sd_change),
    ),
    figure(
        "skewness_without_outliers",
        Topic::Without,
        "Skewness g1 without the 1.5 IQR outliers.",
        &["skewness without"],
        S::One(Shape, |r| &r.skewness_without),
    ),
    figure(
        "skewness_change_without_outliers",
        Topic::Without,
        "Skewness g1 without the outliers minus g1.",
        &["skewness change"],
        S::One(Shape, |r| &r.skewness_change),
    ),
    figure(
        "largest_mean_influence",
        Topic::SingleValues,
        "The value whose leaving out changes the mean most in size (after minus before).",
        &[
            "leave-one-out mean change (after - before, largest in size)",
            "its cell (first row if tied)",
        ],
        S::Influence(|r| &r.mean_influence),
    ),
    figure(
        "largest_sd_influence",
        Topic::SingleValues,
        "The value whose leaving out changes the sd most in size (after minus before).",
        &[
            "leave-one-out sd change (after - before, largest in size)",
            "its cell, sd (first row if tied)",
        ],
        S::Influence(|r| &r.sd_influence),
    ),
    figure(
        "modified_z_above_3_5",
        Topic::SingleValues,
        "Values whose modified z-score exceeds 3.5 in absolute value (Iglewicz and Hoaglin 1993).",
        &["|modified z| above 3.5", "|modified z| cells"],
        S::Cells(|r| r.modified_z.as_deref()),
    ),
    figure(
        "skewness_against_noise",
        Topic::Shape,
        "Adjusted skewness G1 against its standard error under normality.",
        &["skewness G1", "SE of G1 if normal", "G1 / SE", "skewed"],
        S::Noise {
            of: |r| &r.skewness,
            ratio: "|G1 / SE|",
        },
    ),
    figure(
        "tails_against_noise",
        Topic::Shape,
        "Adjusted excess kurtosis G2 against its standard error under normality.",
        &[
            "excess kurtosis G2",
            "SE of G2 if normal",
            "G2 / SE",
            "heavy tails",
        ],
        S::Noise {
            of: |r| &r.tails,
            ratio: "G2 / SE",
        },
    ),
    figure(
        "bootstrap",
        Topic::Intervals,
        "95% intervals of the mean and the median (fixed seed, so reruns agree).",
        &[
            "mean 95% low",
            "mean 95% high",
            "median 95% low",
            "median 95% high",
            "resamples",
            "bootstrap method",
        ],
        S::Bootstrap(|r| &r.bootstrap),
    ),
];

/// Flagged values beyond a pair of fences, or why there are no fences.
fn fenced<'a>(r: &'a Robustness, list: &'a [Flagged]) -> Result<&'a [Flagged], &'a Reason> {
    match &r.fences_undefined {
        Some(why) => Err(why),
        None => Ok(list),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_figure_names_every_column_of_its_shape_and_has_its_own_key() {
        let mut keys = std::collections::HashSet::new();
        for f in ROBUSTNESS_FIGURES {
            assert_eq!(f.labels.len(), f.shape.kinds().len(), "{}", f.key);
            assert!(keys.insert(f.key), "two figures share the key {}", f.key);
            assert!(
                f.key
                    .chars()
                    .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_'),
                "{}",
                f.key
            );
        }
    }
}
