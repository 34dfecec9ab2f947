//! The trend workbook of a batch: every figure per period, the largest
//! month-over-month moves, and line charts of the main figures.

use std::collections::HashMap;

use rust_xlsxwriter::XlsxError;

use super::judge::{self, Basis, Flag};
use super::record::{Record, TERM_BLOCK};
use crate::write::style::{self, fit};

/// The sheets that mark a trend workbook, so a later batch leaves it out.
pub const TREND_SHEET: &str = "Trend";
pub const MOVES_SHEET: &str = "Largest moves";

/// A figure's change between two consecutive periods.
#[derive(Debug, Clone, PartialEq)]
pub struct Move {
    /// The block (sheet) the figure belongs to.
    pub block: String,
    /// The group's label.
    pub group: String,
    /// The figure's Record name (a panel figure by its stable key).
    pub name: String,
    /// The earlier period.
    pub from: String,
    /// The later period.
    pub to: String,
    /// The figure in the earlier period.
    pub before: f64,
    /// The figure in the later period.
    pub after: f64,
    /// The standard error of `after - before`, for figures that have one.
    pub se: Option<f64>,
    /// What the change is judged by (see `history::judge`).
    pub basis: Basis,
}

impl Move {
    /// The change relative to the size of the value before; None when that was 0.
    pub fn relative(&self) -> Option<f64> {
        (self.before != 0.0).then(|| (self.after - self.before) / self.before.abs())
    }

    /// The change in units of its standard error; None without one.
    pub fn noise_scaled(&self) -> Option<f64> {
        self.se
            .filter(|se| *se > 0.0)
            .map(|se| (self.after - self.before) / se)
    }

    /// The flag the change earns under the recipe's `drift` (relative; a
    /// change from 0 never exceeds it) and noise rule (`noise` standard
    /// errors of the change), by the figure's [`Basis`].
    pub fn flag(&self, drift: f64, noise: f64) -> Option<Flag> {
        let flagged = match self.basis {
            Basis::Level => {
                let beyond_drift = self.relative().is_some_and(|r| r.abs() > drift);
                match self.se {
                    Some(_) => beyond_drift && self.noise_scaled().is_some_and(|z| z.abs() > noise),
                    None => beyond_drift,
                }
            }
            Basis::Shape {
                was_beyond: Some(was),
                now_beyond: Some(now),
            } => was != now,
            Basis::Extreme {
                beyond_previous_fences: Some(beyond),
            } => beyond,
            Basis::Shape { .. } | Basis::Extreme { .. } | Basis::Listed => false,
        };
        flagged.then_some(match self.basis {
            Basis::Shape { .. } => Flag::ShapeChanged,
            Basis::Extreme { .. } => Flag::NewExtreme,
            Basis::Level | Basis::Listed => Flag::Moved,
        })
    }

    /// Whether the change is flagged at all.
    pub fn moved(&self, drift: f64, noise: f64) -> bool {
        self.flag(drift, noise).is_some()
    }
}

/// The standard error of the difference of two independent means, from
/// each period's sd and n: sqrt(s1^2/n1 + s2^2/n2) (Welch 1947, "The
/// generalization of Student's problem when several different population
/// variances are involved", Biometrika 34; the denominator of Welch's t).
pub fn welch_se(sd_before: f64, n_before: f64, sd_after: f64, n_after: f64) -> Option<f64> {
    (n_before >= 2.0 && n_after >= 2.0 && sd_before.is_finite() && sd_after.is_finite())
        .then(|| (sd_before.powi(2) / n_before + sd_after.powi(2) / n_after).sqrt())
}

/// Every figure of `after` that `before` also holds, in `after`'s order:
/// the one comparison behind the Changes sheet, `--json` and the trend.
pub fn moves_between(from: &str, before: &Record, to: &str, after: &Record) -> Vec<Move> {
    // Keyed once, so a long record is not searched once per figure.
    let (earlier, later) = (before.lookup(), after.lookup());
    after
        .entries
        .iter()
        .filter(|e| e.block != TERM_BLOCK)
        .filter_map(|e| {
            let b = earlier.find(&e.block, &e.group, &e.name)?;
            Some(Move {
                block: e.block.clone(),
                group: e.group.clone(),
                name: e.name.clone(),
                from: from.to_string(),
                to: to.to_string(),
                before: b,
                after: e.value,
                se: judge::change_se(&earlier, &later, &e.block, &e.group, &e.name),
                basis: judge::basis(&earlier, &later, &e.block, &e.group, &e.name),
            })
        })
        .collect()
}

/// Moves between consecutive periods: those with a standard error first,
/// by the size of the noise-scaled change; then the others by the size of
/// the relative change.
pub fn largest_moves(records: &[(String, Record)]) -> Vec<Move> {
    let mut moves: Vec<Move> = records
        .windows(2)
        .flat_map(|pair| moves_between(&pair[0].0, &pair[0].1, &pair[1].0, &pair[1].1))
        .collect();
    let key = |m: &Move| match m.noise_scaled() {
        Some(z) => (1, z.abs()),
        None => (0, m.relative().map_or(-1.0, f64::abs)),
    };
    moves.sort_by(|a, b| {
        let (ka, kb) = (key(a), key(b));
        kb.0.cmp(&ka.0).then(kb.1.total_cmp(&ka.1))
    });
    moves
}

/// A move's standard error and noise-scaled change in columns `col` and
/// `col + 1`, or why there is none.
pub fn write_noise(
    sheet: &mut rust_xlsxwriter::Worksheet,
    r: u32,
    col: u16,
    m: &Move,
) -> Result<(), XlsxError> {
    match (m.se, m.noise_scaled()) {
        (Some(se), Some(z)) => {
            sheet.write_number(r, col, se)?;
            sheet.write_number_with_format(r, col + 1, z, &style::cell().set_num_format("0.00"))?;
        }
        _ => {
            sheet.write_string(r, col, "no standard error")?;
        }
    }
    Ok(())
}

/// One row per (period, block, group, figure): its value and, from the
/// second period on, its change since the period before and that change in
/// standard errors where the figure has one. Returns the last row written.
fn trend_rows(
    sheet: &mut rust_xlsxwriter::Worksheet,
    records: &[(String, Record)],
    bands: &Bands,
) -> Result<u32, XlsxError> {
    let mut r = 0u32;
    for (i, (period, record)) in records.iter().enumerate() {
        // Keyed by figure, so each row finds its change without a search.
        let moves: HashMap<(String, String, String), Move> = match i {
            0 => Default::default(),
            _ => {
                let (from, before) = &records[i - 1];
                moves_between(from, before, period, record)
                    .into_iter()
                    .map(|m| ((m.block.clone(), m.group.clone(), m.name.clone()), m))
                    .collect()
            }
        };
        for e in record.entries.iter().filter(|e| e.block != TERM_BLOCK) {
            r += 1;
            sheet.write_string(r, 0, fit(period))?;
            sheet.write_string(r, 1, fit(&e.block))?;
            sheet.write_string(r, 2, fit(&e.group))?;
            sheet.write_string(r, 3, fit(&super::shown_name(&e.block, &e.name)))?;
            sheet.write_number(r, 4, e.value)?;
            if let Some(m) = moves.get(&(e.block.clone(), e.group.clone(), e.name.clone())) {
                sheet.write_number(r, 5, m.after - m.before)?;
                write_noise(sheet, r, 6, m)?;
            }
            if let Some(verdict) = bands.get(&band_key(e, period)) {
                sheet.write_string(r, 8, *verdict)?;
            }
        }
    }
    Ok(r)
}

/// Each (block, group, figure, period)'s control-band verdict, from the
/// fourth period on (see `outside_band`).
pub type Bands = HashMap<(String, String, String, String), &'static str>;

fn band_key(e: &super::record::Entry, period: &str) -> (String, String, String, String) {
    (
        e.block.clone(),
        e.group.clone(),
        e.name.clone(),
        period.to_string(),
    )
}

/// The control-band verdict of every figure in every period: one
/// definition for the Trend sheet's column and the charts' markers.
fn band_verdicts(records: &[(String, Record)]) -> Bands {
    let mut earlier: HashMap<(String, String, String), Vec<f64>> = HashMap::new();
    let mut bands = Bands::new();
    for (period, record) in records {
        for e in record.entries.iter().filter(|e| e.block != TERM_BLOCK) {
            let seen = earlier
                .entry((e.block.clone(), e.group.clone(), e.name.clone()))
                .or_default();
            if let Some(verdict) = outside_band(seen, e.value) {
                bands.insert(band_key(e, period), verdict);
            }
            seen.push(e.value);
        }
    }
    bands
}

/// Periods before a value needed for its control band.
pub const BAND_MIN_PERIODS: usize = 3;

/// Whether `value` lies outside the mean of the `earlier` periods' values
/// +/- 3 of their sample sds (a Shewhart-style band, common practice; no
/// source for using it on summary figures): "above" or "below" the band,
/// "inside", or None with fewer than [`BAND_MIN_PERIODS`] earlier periods.
pub fn outside_band(earlier: &[f64], value: f64) -> Option<&'static str> {
    if earlier.len() < BAND_MIN_PERIODS {
        return None;
    }
    let n = earlier.len() as f64;
    let mean = earlier.iter().sum::<f64>() / n;
    let sd = (earlier.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0)).sqrt();
    Some(if value > mean + 3.0 * sd {
        "above"
    } else if value < mean - 3.0 * sd {
        "below"
    } else {
        "inside"
    })
}

/// The groups of each block in a record, as (block, group).
fn groups_of(record: &Record) -> std::collections::BTreeSet<(&str, &str)> {
    record
        .entries
        .iter()
        .filter(|e| e.block != TERM_BLOCK)
        .map(|e| (e.block.as_str(), e.group.as_str()))
        .collect()
}

/// Groups present in one period and not the other: one sentence, or None
/// when every block has the same groups in both.
pub fn group_changes(before: &Record, after: &Record) -> Option<String> {
    let (was, now) = (groups_of(before), groups_of(after));
    let blocks_now: std::collections::BTreeSet<&str> = now.iter().map(|g| g.0).collect();
    let blocks_was: std::collections::BTreeSet<&str> = was.iter().map(|g| g.0).collect();
    let list = |only: &std::collections::BTreeSet<(&str, &str)>,
                other: &std::collections::BTreeSet<(&str, &str)>,
                blocks: &std::collections::BTreeSet<&str>| {
        only.iter()
            // A block the other period lacks altogether is a recipe change, not a group's.
            .filter(|g| !other.contains(*g) && blocks.contains(g.0))
            .map(|(block, group)| format!("{block}: {group}"))
            .collect::<Vec<_>>()
    };
    let appeared = list(&now, &was, &blocks_was);
    let gone = list(&was, &now, &blocks_now);
    let said = |label: &str, groups: &[String]| {
        (!groups.is_empty()).then(|| format!("{label} {}", groups.join(", ")))
    };
    let parts: Vec<String> = [
        said("groups that appeared since the previous period:", &appeared),
        said("groups that disappeared since the previous period:", &gone),
    ]
    .into_iter()
    .flatten()
    .collect();
    (!parts.is_empty()).then(|| parts.join("; "))
}

/// The trend workbook of a batch, as xlsx bytes: every figure per period,
/// the largest moves, and line charts of each panel column's mean and
/// median and every figure of the other blocks; `shares` are the (block,
/// figure) pairs whose values are shares, charted on a percentage axis.
pub fn trend_workbook(
    records: &[(String, Record)],
    panel_blocks: &[String],
    shares: &std::collections::BTreeSet<(String, String)>,
) -> Result<Vec<u8>, XlsxError> {
    let mut workbook = style::workbook()?;
    let bold = style::cell().set_bold();
    let header =
        |sheet: &mut rust_xlsxwriter::Worksheet, labels: &[&str]| -> Result<(), XlsxError> {
            for (c, l) in labels.iter().enumerate() {
                sheet.write_string_with_format(0, c as u16, *l, &bold)?;
                sheet.set_column_width(c as u16, 18)?;
            }
            sheet.set_freeze_panes(1, 0)?;
            Ok(())
        };

    let sheet = workbook.add_worksheet().set_name(TREND_SHEET)?;
    header(
        sheet,
        &[
            "period",
            "block",
            "group",
            "figure",
            "value",
            "change",
            "SE of change",
            "change / SE",
            "control band",
        ],
    )?;
    let bands = band_verdicts(records);
    let rows = trend_rows(sheet, records, &bands)?;
    sheet.autofilter(0, 0, rows.max(1), 8)?;

    let sheet = workbook.add_worksheet().set_name(MOVES_SHEET)?;
    header(
        sheet,
        &[
            "block",
            "group",
            "figure",
            "from",
            "to",
            "before",
            "after",
            "change",
            "relative change",
            "SE of change",
            "change / SE",
        ],
    )?;
    let moves = largest_moves(records);
    for (i, m) in moves.iter().take(200).enumerate() {
        let r = 1 + i as u32;
        let name = super::shown_name(&m.block, &m.name);
        for (c, t) in [&m.block, &m.group, &name, &m.from, &m.to]
            .into_iter()
            .enumerate()
        {
            sheet.write_string(r, c as u16, fit(t))?;
        }
        sheet.write_number(r, 5, m.before)?;
        sheet.write_number(r, 6, m.after)?;
        sheet.write_number(r, 7, m.after - m.before)?;
        match m.relative() {
            Some(x) => {
                sheet.write_number_with_format(r, 8, x, &style::cell().set_num_format("0.0%"))?
            }
            None => sheet.write_string(r, 8, "before was 0")?,
        };
        write_noise(sheet, r, 9, m)?;
    }
    sheet.autofilter(0, 0, moves.len().clamp(1, 200) as u32, 10)?;

    crate::write::trend_charts(&mut workbook, records, panel_blocks, shares, &bands)?;
    workbook.save_to_buffer()
}

#[cfg(test)]
mod tests {
    use super::{Move, group_changes, largest_moves, outside_band, welch_se};

    /// Earlier values 1, 2, 3: mean 2, sample sd 1, band 2 +/- 3 = [-1, 5].
    #[test]
    fn control_band_is_three_sds_of_the_earlier_periods() {
        assert_eq!(outside_band(&[1.0, 2.0], 100.0), None);
        assert_eq!(outside_band(&[1.0, 2.0, 3.0], 5.0), Some("inside"));
        assert_eq!(outside_band(&[1.0, 2.0, 3.0], 5.001), Some("above"));
        assert_eq!(outside_band(&[1.0, 2.0, 3.0], -1.001), Some("below"));
    }
    use crate::history::{Entry, Record};

    /// Welch's standard error against scipy: `scipy.stats.ttest_ind_from_stats(
    /// 2.5, 1.2, 40, 2.9, 1.5, 35, equal_var=False).statistic` is
    /// -1.263107911241789 (scipy 1.17.1, numpy 2.4.6, the versions pinned in
    /// tests/reference/requirements.txt; run by hand, typed here).
    #[test]
    fn welch_standard_error_matches_scipy() {
        let se = welch_se(1.2, 40.0, 1.5, 35.0).unwrap();
        let t = (2.5 - 2.9) / se;
        assert!((t - -1.263107911241789).abs() < 1e-14, "{t}");
        assert_eq!(welch_se(1.2, 1.0, 1.5, 35.0), None, "n of 1 has no sd");
    }

    fn period(label: &str, entries: &[(&str, f64)]) -> (String, Record) {
        let record = Record {
            fingerprint: "f".into(),
            period: Some(label.into()),
            entries: entries
                .iter()
                .map(|(name, value)| Entry {
                    block: "Lateness".into(),
                    group: "North".into(),
                    name: name.to_string(),
                    value: *value,
                })
                .collect(),
            standard_errors: Vec::new(),
        };
        (label.into(), record)
    }

    /// A mean that drifts by one sd over 200 rows each month is far beyond
    /// two standard errors; a skewness near zero changing sign is a huge
    /// relative change but not a level; a mean over 5 rows moving 20% is
    /// within its noise.
    #[test]
    fn real_drift_is_flagged_and_noise_is_not() {
        let months = [
            period(
                "2026-09",
                &[
                    ("late_h mean", 1.0),
                    ("late_h sd", 0.3),
                    ("late_h n", 200.0),
                    ("late_h skewness_g1", 0.02),
                    ("few mean", 1.0),
                    ("few sd", 1.0),
                    ("few n", 5.0),
                ],
            ),
            period(
                "2026-10",
                &[
                    ("late_h mean", 1.3),
                    ("late_h sd", 0.3),
                    ("late_h n", 200.0),
                    ("late_h skewness_g1", -0.3),
                    ("few mean", 1.2),
                    ("few sd", 1.0),
                    ("few n", 5.0),
                ],
            ),
        ];
        let moves = largest_moves(&months);
        let find = |name: &str| moves.iter().find(|m| m.name == name).unwrap();
        let drift = 0.15;
        let mean = find("late_h mean");
        // 0.3 / sqrt(0.09/200 * 2) = 0.3 / 0.03 = 10 standard errors.
        assert!((mean.noise_scaled().unwrap() - 10.0).abs() < 1e-9);
        assert!(mean.moved(drift, 2.0));
        assert!(!find("late_h skewness_g1").moved(drift, 2.0));
        let few: &Move = find("few mean");
        assert!(few.relative().unwrap() > drift && !few.moved(drift, 2.0));
        // Ranked by the noise-scaled change, the real drift comes first.
        assert_eq!(moves[0].name, "late_h mean");
    }

    fn record(groups: &[(&str, &str)]) -> Record {
        Record {
            fingerprint: "f".into(),
            period: None,
            entries: groups
                .iter()
                .map(|(block, group)| Entry {
                    block: block.to_string(),
                    group: group.to_string(),
                    name: "m".into(),
                    value: 1.0,
                })
                .collect(),
            standard_errors: Vec::new(),
        }
    }

    #[test]
    fn appearing_and_disappearing_groups_are_named() {
        let before = record(&[("Levels", "North"), ("Levels", "Ridge"), ("Old", "A")]);
        let after = record(&[("Levels", "North"), ("Levels", "Harbour"), ("New", "B")]);
        assert_eq!(
            group_changes(&before, &after).as_deref(),
            Some(
                "groups that appeared since the previous period: Levels: Harbour; \
                 groups that disappeared since the previous period: Levels: Ridge"
            )
        );
        assert_eq!(group_changes(&before, &before), None);
    }
}
