//! The trend workbook of a batch: every figure per period, the largest
//! month-over-month moves, and line charts of the main figures.

use std::collections::BTreeMap;

use rust_xlsxwriter::{Chart, ChartType, Format, Workbook, XlsxError};

use super::record::{Record, TERM_BLOCK};
use crate::write::style::fit;

/// The sheets that mark a trend workbook, so a later batch leaves it out.
pub const TREND_SHEET: &str = "Trend";
pub const MOVES_SHEET: &str = "Largest moves";

/// A figure's change between two consecutive periods.
#[derive(Debug, Clone, PartialEq)]
pub struct Move {
    pub block: String,
    pub group: String,
    pub name: String,
    pub from: String,
    pub to: String,
    pub before: f64,
    pub after: f64,
}

impl Move {
    /// The change relative to the size of the value before; None when that was 0.
    pub fn relative(&self) -> Option<f64> {
        (self.before != 0.0).then(|| (self.after - self.before) / self.before.abs())
    }

    /// Whether the relative change exceeds `drift` (a change from 0 never does).
    pub fn moved(&self, drift: f64) -> bool {
        self.relative().is_some_and(|r| r.abs() > drift)
    }
}

/// Every figure of `after` that `before` also holds, in `after`'s order:
/// the one comparison behind the Changes sheet, `--json` and the trend.
pub fn moves_between(from: &str, before: &Record, to: &str, after: &Record) -> Vec<Move> {
    after
        .entries
        .iter()
        .filter(|e| e.block != TERM_BLOCK)
        .filter_map(|e| {
            before.find(&e.block, &e.group, &e.name).map(|b| Move {
                block: e.block.clone(),
                group: e.group.clone(),
                name: e.name.clone(),
                from: from.to_string(),
                to: to.to_string(),
                before: b,
                after: e.value,
            })
        })
        .collect()
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

/// Moves between consecutive periods, largest relative change first.
pub fn largest_moves(records: &[(String, Record)]) -> Vec<Move> {
    let mut moves: Vec<Move> = records
        .windows(2)
        .flat_map(|pair| moves_between(&pair[0].0, &pair[0].1, &pair[1].0, &pair[1].1))
        .collect();
    moves.sort_by(|a, b| {
        let size = |m: &Move| m.relative().map_or(-1.0, f64::abs);
        size(b).total_cmp(&size(a))
    });
    moves
}

/// Figures drawn over time: each panel column's mean and median, and every
/// figure of a figures block.
fn charted(name: &str, is_panel: bool) -> bool {
    !is_panel || name.ends_with(" mean") || name.ends_with(" median")
}

pub fn trend_workbook(
    records: &[(String, Record)],
    panel_blocks: &[String],
) -> Result<Vec<u8>, XlsxError> {
    let mut workbook = Workbook::new();
    let bold = Format::new().set_bold();
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
    header(sheet, &["period", "block", "group", "figure", "value"])?;
    let mut r = 1u32;
    for (period, record) in records {
        for e in record.entries.iter().filter(|e| e.block != TERM_BLOCK) {
            sheet.write_string(r, 0, fit(period))?;
            sheet.write_string(r, 1, fit(&e.block))?;
            sheet.write_string(r, 2, fit(&e.group))?;
            sheet.write_string(r, 3, fit(&e.name))?;
            sheet.write_number(r, 4, e.value)?;
            r += 1;
        }
    }
    sheet.autofilter(0, 0, r.max(1) - 1, 4)?;

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
        ],
    )?;
    let moves = largest_moves(records);
    for (i, m) in moves.iter().take(200).enumerate() {
        let r = 1 + i as u32;
        for (c, t) in [&m.block, &m.group, &m.name, &m.from, &m.to]
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
                sheet.write_number_with_format(r, 8, x, &Format::new().set_num_format("0.0%"))?
            }
            None => sheet.write_string(r, 8, "before was 0")?,
        };
    }
    sheet.autofilter(0, 0, moves.len().clamp(1, 200) as u32, 8)?;

    // One chart per (block, figure): periods down, groups across.
    let sheet_name = "Trend charts";
    let sheet = workbook.add_worksheet().set_name(sheet_name)?;
    let mut series: BTreeMap<(String, String), BTreeMap<String, BTreeMap<String, f64>>> =
        BTreeMap::new();
    for (period, record) in records {
        for e in record
            .entries
            .iter()
            .filter(|e| e.block != TERM_BLOCK && charted(&e.name, panel_blocks.contains(&e.block)))
        {
            series
                .entry((e.block.clone(), e.name.clone()))
                .or_default()
                .entry(e.group.clone())
                .or_default()
                .insert(period.clone(), e.value);
        }
    }
    let periods: Vec<&String> = records.iter().map(|(p, _)| p).collect();
    let mut top = 0u32;
    for ((block, name), groups) in &series {
        sheet.write_string_with_format(top, 0, fit(&format!("{block}: {name}")), &bold)?;
        sheet.write_string_with_format(top + 1, 0, "period", &bold)?;
        for (i, p) in periods.iter().enumerate() {
            sheet.write_string(top + 2 + i as u32, 0, fit(p))?;
        }
        let mut chart = Chart::new(ChartType::Line);
        chart.title().set_name(&format!("{block}: {name}"));
        let last = top + 1 + periods.len() as u32;
        for (j, (group, values)) in groups.iter().enumerate() {
            let c = 1 + j as u16;
            sheet.write_string_with_format(top + 1, c, fit(group), &bold)?;
            for (i, p) in periods.iter().enumerate() {
                if let Some(v) = values.get(*p) {
                    sheet.write_number(top + 2 + i as u32, c, *v)?;
                }
            }
            chart
                .add_series()
                .set_name((sheet_name, top + 1, c))
                .set_categories((sheet_name, top + 2, 0, last, 0))
                .set_values((sheet_name, top + 2, c, last, c));
        }
        sheet.insert_chart(top, (groups.len() + 2) as u16, &chart)?;
        top = (last + 2).max(top + 16);
    }
    workbook.save_to_buffer()
}

#[cfg(test)]
mod tests {
    use super::group_changes;
    use crate::history::{Entry, Record};

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
