//! The trend workbook's "Trend charts" sheet: one line chart per (block,
//! figure), periods across, one line per group in the order of the result
//! sheets, each point marked, a missing month left as a gap rather than
//! bridged, shares on a percentage axis. Each chart's numbers stand beside
//! it.

use std::collections::{BTreeSet, HashMap};

use rust_xlsxwriter::{
    Chart, ChartEmptyCells, ChartFormat, ChartLine, ChartMarker, ChartMarkerType, ChartSolidFill,
    ChartType, Workbook, XlsxError,
};

use super::style::{self, Shown, fit, palette};
use crate::eval::One;
use crate::history::{Bands, Record, TERM_BLOCK};

/// The sheet's name.
pub const TREND_CHARTS_SHEET: &str = "Trend charts";

use super::charts::{CHART_HEIGHT, Layout, ROWS_PER_CHART};

/// Most months a gap-filled period axis spans; a longer span keeps only the
/// periods that have data (a chart of decades of months is unreadable).
const MOST_MONTHS: usize = 240;

/// Marker shapes, so lines stay apart where colours repeat (more groups
/// than colours) or cannot be told apart (printed in grey).
const MARKERS: [ChartMarkerType; 5] = [
    ChartMarkerType::Circle,
    ChartMarkerType::Square,
    ChartMarkerType::Diamond,
    ChartMarkerType::Triangle,
    ChartMarkerType::X,
];

/// One charted figure: its values by group (groups in order of first
/// appearance) and by period.
struct Series {
    block: String,
    name: String,
    groups: Vec<(String, HashMap<String, f64>)>,
}

/// Figures drawn over time: each panel column's mean and median, and every
/// figure of a figures block.
fn charted(name: &str, is_panel: bool) -> bool {
    !is_panel || name.ends_with(" mean") || name.ends_with(" median")
}

/// The charted figures, in the order the records list them (the result
/// sheets' order), each group in the order it first appears.
fn series(records: &[(String, Record)], panel_blocks: &[String]) -> Vec<Series> {
    let mut found: Vec<Series> = Vec::new();
    let mut at: HashMap<(String, String), usize> = HashMap::new();
    for (period, record) in records {
        let wanted = record
            .entries
            .iter()
            .filter(|e| e.block != TERM_BLOCK && charted(&e.name, panel_blocks.contains(&e.block)));
        for e in wanted {
            let key = (e.block.clone(), e.name.clone());
            let i = *at.entry(key).or_insert_with(|| {
                found.push(Series {
                    block: e.block.clone(),
                    name: e.name.clone(),
                    groups: Vec::new(),
                });
                found.len() - 1
            });
            let groups = &mut found[i].groups;
            let g = match groups.iter().position(|(g, _)| *g == e.group) {
                Some(g) => g,
                None => {
                    groups.push((e.group.clone(), HashMap::new()));
                    groups.len() - 1
                }
            };
            groups[g].1.insert(period.clone(), e.value);
        }
    }
    found
}

/// A month label `YYYY-MM` as (year, month).
fn month(label: &str) -> Option<(i32, u32)> {
    let (y, m) = label.split_once('-')?;
    let (year, month) = (y.parse().ok()?, m.parse().ok()?);
    (y.len() == 4 && m.len() == 2 && (1..=12).contains(&month)).then_some((year, month))
}

/// The periods on the charts' axis: for monthly periods every month from
/// the first to the last, so a month without a file shows as a gap; other
/// periods as they are.
pub fn axis_periods(periods: &[String]) -> Vec<String> {
    let months: Option<Vec<(i32, u32)>> = periods.iter().map(|p| month(p)).collect();
    let Some(months) = months.filter(|m| !m.is_empty()) else {
        return periods.to_vec();
    };
    let index = |(y, m): (i32, u32)| y as i64 * 12 + m as i64 - 1;
    let first = months.iter().copied().map(index).min().unwrap_or(0);
    let last = months.iter().copied().map(index).max().unwrap_or(0);
    if (last - first) as usize >= MOST_MONTHS {
        return periods.to_vec();
    }
    (first..=last)
        .map(|i| format!("{:04}-{:02}", i.div_euclid(12), i.rem_euclid(12) + 1))
        .collect()
}

/// Writes the Trend charts sheet; a value outside its control band (see
/// `bands`) is also drawn as a diamond of a marker series of its own
/// ("GROUP outside band", markers only, no line).
pub fn trend_charts(
    workbook: &mut Workbook,
    records: &[(String, Record)],
    panel_blocks: &[String],
    shares: &BTreeSet<(String, String)>,
    bands: &Bands,
) -> Result<(), XlsxError> {
    let sheet_name = TREND_CHARTS_SHEET;
    let sheet = workbook.add_worksheet().set_name(sheet_name)?;
    let bold = style::cell().set_bold();
    let read: Vec<String> = records.iter().map(|(p, _)| p.clone()).collect();
    let periods = axis_periods(&read);
    sheet.set_column_width(0, 12)?;
    let mut layout = Layout::new(sheet_name, 0, 0);
    for s in series(records, panel_blocks) {
        let table_rows = periods.len() as u32 + 2;
        let top = layout.place(
            table_rows.max(ROWS_PER_CHART),
            table_rows.min(ROWS_PER_CHART),
        );
        let title = format!("{}: {}", s.block, s.name);
        let share = shares.contains(&(s.block.clone(), s.name.clone()));
        let shown = shown_for(&s, share);
        sheet.write_string_with_format(top, 0, fit(&title), &bold)?;
        sheet.write_string_with_format(top + 1, 0, "period", &style::header())?;
        for (i, p) in periods.iter().enumerate() {
            sheet.write_string(top + 2 + i as u32, 0, fit(p))?;
        }
        let at = Placed {
            top,
            last: top + 1 + periods.len() as u32,
            periods: &periods,
            shown: &shown,
        };
        let mut chart = Chart::new(ChartType::Line);
        group_lines(sheet, &mut chart, &s, &at)?;
        let c = outside_band_markers(sheet, &mut chart, &s, &at, bands)?;
        style_trend_chart(&mut chart, &title, &s.name, &shown, share);
        chart.set_height(CHART_HEIGHT);
        sheet.insert_chart(top, c + 2, &chart)?;
    }
    sheet.set_page_breaks(&layout.breaks)?;
    let span = match (periods.first(), periods.last()) {
        (Some(a), Some(b)) => format!("{a} to {b}"),
        _ => String::new(),
    };
    style::paper(sheet, "Trend charts", Some(&span))
}

/// How a figure's values are shown: shares as percentages, whole numbers
/// as counts, else to the digits the values need.
fn shown_for(s: &Series, share: bool) -> Shown {
    let values: Vec<f64> = s
        .groups
        .iter()
        .flat_map(|g| g.1.values().copied())
        .collect();
    match share {
        true => Shown::Percent,
        false if values.iter().all(|x| x.fract() == 0.0) => Shown::Count,
        false => Shown::unknown_kind(&One::List(values)),
    }
}

/// Where one figure's table sits on the sheet: its header row, its last
/// row, the periods down its first column and how its values are shown.
struct Placed<'a> {
    top: u32,
    last: u32,
    periods: &'a [String],
    shown: &'a Shown,
}

/// A column and a line per group, each in its colour and marker.
fn group_lines(
    sheet: &mut rust_xlsxwriter::Worksheet,
    chart: &mut Chart,
    s: &Series,
    at: &Placed,
) -> Result<(), XlsxError> {
    let (sheet_name, top, last) = (TREND_CHARTS_SHEET, at.top, at.last);
    for (j, (group, by_period)) in s.groups.iter().enumerate() {
        let c = 1 + j as u16;
        sheet.write_string_with_format(top + 1, c, fit(group), &style::header())?;
        sheet.set_column_width(c, 12)?;
        for (i, p) in at.periods.iter().enumerate() {
            if let Some(v) = by_period.get(p) {
                sheet.write_number_with_format(top + 2 + i as u32, c, *v, &at.shown.format())?;
            }
        }
        let colour = palette::SERIES[j % palette::SERIES.len()];
        let marker = MARKERS[j % MARKERS.len()];
        chart
            .add_series()
            .set_name((sheet_name, top + 1, c))
            .set_categories((sheet_name, top + 2, 0, last, 0))
            .set_values((sheet_name, top + 2, c, last, c))
            .set_format(ChartLine::new().set_color(colour).set_width(2))
            .set_marker(ChartMarker::new().set_type(marker).set_size(7).set_format(
                ChartFormat::new().set_solid_fill(ChartSolidFill::new().set_color(colour)),
            ));
    }
    Ok(())
}

/// For each group with a value outside its control band, a column of
/// those values and a series of diamonds, markers only. Returns the last
/// column used.
fn outside_band_markers(
    sheet: &mut rust_xlsxwriter::Worksheet,
    chart: &mut Chart,
    s: &Series,
    at: &Placed,
    bands: &Bands,
) -> Result<u16, XlsxError> {
    let (sheet_name, top, last) = (TREND_CHARTS_SHEET, at.top, at.last);
    let mut c = s.groups.len() as u16;
    for (group, by_period) in &s.groups {
        let outside = |p: &String| {
            let key = (s.block.clone(), group.clone(), s.name.clone(), p.clone());
            matches!(bands.get(&key), Some(&"above" | &"below"))
        };
        if !at
            .periods
            .iter()
            .any(|p| by_period.contains_key(p) && outside(p))
        {
            continue;
        }
        c += 1;
        let label = format!("{group} outside band");
        sheet.write_string_with_format(top + 1, c, fit(&label), &style::header())?;
        sheet.set_column_width(c, 12)?;
        for (i, p) in at.periods.iter().enumerate() {
            if let Some(v) = by_period.get(p).filter(|_| outside(p)) {
                sheet.write_number_with_format(top + 2 + i as u32, c, *v, &at.shown.format())?;
            }
        }
        chart
            .add_series()
            .set_name((sheet_name, top + 1, c))
            .set_categories((sheet_name, top + 2, 0, last, 0))
            .set_values((sheet_name, top + 2, c, last, c))
            .set_format(ChartFormat::new().set_no_line())
            .set_marker(
                ChartMarker::new()
                    .set_type(ChartMarkerType::Diamond)
                    .set_size(10)
                    .set_format(
                        ChartFormat::new()
                            .set_solid_fill(ChartSolidFill::new().set_color(palette::INK)),
                    ),
            );
    }
    Ok(c)
}

/// Title, axis titles and number format, gaps for missing periods, the
/// legend below.
fn style_trend_chart(chart: &mut Chart, title: &str, figure: &str, shown: &Shown, share: bool) {
    style::chart_text(chart, title, "period", figure);
    let y = chart.y_axis();
    y.set_num_format(shown.code());
    if share {
        // A share lies between 0% and 100%: the axis ends there.
        y.set_max(1.0);
    }
    chart.show_empty_cells_as(ChartEmptyCells::Gaps);
    chart
        .legend()
        .set_position(rust_xlsxwriter::ChartLegendPosition::Bottom);
}

#[cfg(test)]
mod tests {
    use super::axis_periods;

    #[test]
    fn a_missing_month_gets_its_place_on_the_axis() {
        let read = ["2026-08", "2026-10", "2027-01"].map(String::from);
        assert_eq!(
            axis_periods(&read),
            [
                "2026-08", "2026-09", "2026-10", "2026-11", "2026-12", "2027-01"
            ]
            .map(String::from)
        );
        // Days and months without a year stay as read.
        let days = ["2026-10-01", "2026-10-15"].map(String::from);
        assert_eq!(axis_periods(&days), days.to_vec());
        let names = ["January", "March"].map(String::from);
        assert_eq!(axis_periods(&names), names.to_vec());
    }
}
