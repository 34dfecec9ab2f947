//! How a figure's change between two periods is judged, by what kind of
//! figure it is:
//!
//! - a level (mean, sd, quartiles, shares, figures of a figures block):
//!   flagged "moved" beyond the recipe's `drift` and, when both periods
//!   keep its standard error, beyond the noise rule too (more than `noise`
//!   standard errors of the change, default 2: common practice, about a 5%
//!   two-sided level for one figure under normality);
//! - skewness g1 and kurtosis b2: flagged "shape changed" when the
//!   Robustness sheet's verdict changes: |G1| (or G2) beyond 2.58 of its
//!   standard error under normality (Joanes and Gill 1998) in one period
//!   and not in the other. Their size moves a lot from sampling alone
//!   (a skewness near 0 changing sign is an infinite relative change), so
//!   a relative or standard-error rule on the figure itself would cry wolf;
//! - min and max: flagged "new extreme" when beyond both the previous
//!   period's extreme and its far fences, Q1 - 3 IQR or Q3 + 3 IQR (Tukey
//!   1977's "far out"): one row moves an extreme, so the question is whether
//!   a row lies further out than any last period and would have been far
//!   out then (an outlier that stays from month to month is not new);
//! - Bowley skewness, range, outlier counts, missing, modes: listed, never
//!   flagged (no standard error kept, or a count of single rows).

use super::record::Lookup;
use crate::eval::Judged;
use crate::stats;

/// How many standard errors of the change a figure must exceed by default.
pub const DEFAULT_NOISE_SES: f64 = 2.0;

/// What the change of one figure is judged by (see the module comment).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Basis {
    /// A level: drift and, with standard errors, the noise rule.
    Level,
    /// Whether the shape was beyond its noise before and now (None when a
    /// period's n is not kept or too small).
    Shape {
        /// The previous period's verdict.
        was_beyond: Option<bool>,
        /// This period's verdict.
        now_beyond: Option<bool>,
    },
    /// Whether the new extreme lies beyond the previous far fences.
    Extreme {
        /// None when the previous quartiles are not kept.
        beyond_previous_fences: Option<bool>,
    },
    /// Listed, never flagged.
    Listed,
}

/// A flag on the Changes sheet.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Flag {
    /// A level moved beyond the drift and the noise rule.
    Moved,
    /// Skewness or kurtosis crossed its noise verdict.
    ShapeChanged,
    /// A min or max beyond the previous extreme and far fences.
    NewExtreme,
}

impl Flag {
    /// The flag as the Changes sheet writes it.
    pub fn word(self) -> &'static str {
        match self {
            Flag::Moved => "moved",
            Flag::ShapeChanged => "shape changed",
            Flag::NewExtreme => "new extreme",
        }
    }
}

/// How the figure `name` of (block, group) is judged between two records:
/// a panel figure by its row of `PANEL_FIGURES` (`Judged`); a figures
/// block's figure as a level.
pub fn basis(before: &Lookup, after: &Lookup, block: &str, group: &str, name: &str) -> Basis {
    let Some((column, figure)) = super::panel_figure_of(name) else {
        return Basis::Level;
    };
    let of = |r: &Lookup, key: &str| r.find(block, group, &format!("{column} {key}"));
    let shape = |test: fn(f64, f64) -> Option<bool>| {
        let verdict = |r: &Lookup| test(r.find(block, group, name)?, of(r, "n")?);
        Basis::Shape {
            was_beyond: verdict(before),
            now_beyond: verdict(after),
        }
    };
    let extreme = |low: bool| {
        let beyond = (|| {
            let (q1, q3) = (of(before, "q1")?, of(before, "q3")?);
            let was = before.find(block, group, name)?;
            let value = after.find(block, group, name)?;
            let far = 3.0 * (q3 - q1);
            // Beyond last period's extreme too: an outlier that stays is not new.
            Some(if low {
                value < q1 - far && value < was
            } else {
                value > q3 + far && value > was
            })
        })();
        Basis::Extreme {
            beyond_previous_fences: beyond,
        }
    };
    match figure.judged {
        Judged::Level => Basis::Level,
        Judged::Skewness => shape(skew_beyond),
        Judged::Kurtosis => shape(tails_beyond),
        Judged::Minimum => extreme(true),
        Judged::Maximum => extreme(false),
        Judged::Listed => Basis::Listed,
    }
}

/// |G1| beyond [`stats::SHAPE_NOTE_CUTOFF`] standard errors, from g1 and n:
/// G1 = g1 sqrt(n(n-1)) / (n-2) (Joanes and Gill 1998), as on the
/// Robustness sheet.
fn skew_beyond(g1: f64, n: f64) -> Option<bool> {
    let se = stats::skewness_se(n as usize).ok()?;
    let adjusted = g1 * (n * (n - 1.0)).sqrt() / (n - 2.0);
    Some(adjusted.abs() > stats::SHAPE_NOTE_CUTOFF * se)
}

/// G2 beyond [`stats::SHAPE_NOTE_CUTOFF`] standard errors (heavy tails),
/// from b2 and n: G2 = ((n+1) g2 + 6)(n-1) / ((n-2)(n-3)), g2 = b2 - 3.
fn tails_beyond(b2: f64, n: f64) -> Option<bool> {
    let se = stats::kurtosis_se(n as usize).ok()?;
    let adjusted = ((n + 1.0) * (b2 - 3.0) + 6.0) * (n - 1.0) / ((n - 2.0) * (n - 3.0));
    Some(adjusted > stats::SHAPE_NOTE_CUTOFF * se)
}

/// The standard error of a change between two periods: sqrt(se1^2 +
/// se2^2) from each period's own (independent samples); for results of
/// earlier versions, which keep none, a panel mean's from the sd and n each
/// Record holds (Welch 1947, the same value).
pub fn change_se(
    before: &Lookup,
    after: &Lookup,
    block: &str,
    group: &str,
    name: &str,
) -> Option<f64> {
    if let (Some(a), Some(b)) = (
        before.standard_error(block, group, name),
        after.standard_error(block, group, name),
    ) {
        return Some(a.hypot(b));
    }
    let column = name.strip_suffix(" mean")?;
    let of = |r: &Lookup, key: &str| r.find(block, group, &format!("{column} {key}"));
    super::trend::welch_se(
        of(before, "sd")?,
        of(before, "n")?,
        of(after, "sd")?,
        of(after, "n")?,
    )
}

/// The rules of the Changes sheet in words, for its note.
pub fn rules_in_words(drift: f64, noise: f64) -> String {
    format!(
        "\"moved\": a level beyond {}% relative change (the recipe's drift, or sheaf's default \
         of 10%) and, where it has a standard error, beyond {} standard errors of the change \
         (the recipe's noise rule; default 2): the standard error of a change is sqrt(se1^2 + \
         se2^2), a mean's s/sqrt(n), a share's sqrt(p(1-p)/n), an sd's from the variance of \
         s^2, a median's, quartile's or percentile's by Maritz and Jarrett (1978), a trimmed \
         mean's by Tukey and McLaughlin (1963). \"shape changed\": skewness or kurtosis beyond \
         2.58 standard errors under normality in one period and not the other. \"new \
         extreme\": a min or max beyond both the previous period's extreme and its 3 IQR \
         fences. Bowley skewness, ranges and outlier counts are listed, never flagged.",
        crate::format::shortest(drift * 100.0),
        crate::format::shortest(noise)
    )
}

/// The recipe's noise rule (`noise 3 se`), or [`DEFAULT_NOISE_SES`].
pub fn noise_of(recipe: &crate::recipe::Recipe) -> f64 {
    recipe
        .statements
        .iter()
        .find_map(|s| match &s.kind {
            crate::recipe::ast::StatementKind::Noise(n) => Some(n.value),
            _ => None,
        })
        .unwrap_or(DEFAULT_NOISE_SES)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::history::{Entry, Record};

    fn record(figures: &[(&str, f64)]) -> Record {
        Record {
            fingerprint: "f".into(),
            period: None,
            entries: figures
                .iter()
                .map(|(name, value)| Entry {
                    block: "B".into(),
                    group: "G".into(),
                    name: name.to_string(),
                    value: *value,
                })
                .collect(),
            standard_errors: Vec::new(),
        }
    }

    /// Previous quartiles 10 and 12: far fences 4 and 18 (3 IQR, Tukey 1977).
    #[test]
    fn a_new_extreme_lies_beyond_the_old_one_and_the_far_fence() {
        let judged = |(was_max, was_min): (f64, f64), max: f64, min: f64| {
            let was = record(&[
                ("x q1", 10.0),
                ("x q3", 12.0),
                ("x max", was_max),
                ("x min", was_min),
            ]);
            let now = record(&[
                ("x q1", 10.0),
                ("x q3", 12.0),
                ("x max", max),
                ("x min", min),
            ]);
            ["x max", "x min"].map(|name| {
                match basis(&was.lookup(), &now.lookup(), "B", "G", name) {
                    Basis::Extreme {
                        beyond_previous_fences: Some(b),
                    } => b,
                    other => panic!("{other:?}"),
                }
            })
        };
        // Inside the far fences: not new.
        assert_eq!(judged((15.0, 9.0), 17.0, 5.0), [false, false]);
        // The same outliers of 25 and -1 as last month are not new either.
        assert_eq!(judged((25.0, -1.0), 25.0, -1.0), [false, false]);
        // Beyond both: new.
        assert_eq!(judged((15.0, 9.0), 20.0, 3.0), [true, true]);
        assert_eq!(judged((25.0, -1.0), 30.0, -2.0), [true, true]);
    }

    /// n = 200: SES = sqrt(6*200*199/(198*201*203)) = 0.17193 (worked by
    /// hand); 2.58 SES is 0.4436 in G1, and G1 = g1 * 1.00757 here.
    #[test]
    fn the_shape_verdict_is_the_robustness_sheets() {
        assert_eq!(skew_beyond(0.43, 200.0), Some(false));
        assert_eq!(skew_beyond(-0.45, 200.0), Some(true));
        assert_eq!(skew_beyond(0.5, 2.0), None);
        // Normal tails (b2 = 3) are not heavy; b2 = 5 over 200 values is.
        assert_eq!(tails_beyond(3.0, 200.0), Some(false));
        assert_eq!(tails_beyond(5.0, 200.0), Some(true));
    }
}
