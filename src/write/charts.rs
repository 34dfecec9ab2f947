//! The Charts sheet: native histogram (column) charts, one per group, and
//! box-and-whisker charts drawn as a stock chart whose up-down bars are the
//! boxes (Q1 to Q3) and whose high-low lines are the whiskers, with the
//! medians as marks from a combined line chart. (Checked by rendering the
//! workbook with LibreOffice; Excel draws stock charts the same way.)

use rust_xlsxwriter::{
    Chart, ChartFormat, ChartMarker, ChartMarkerType, ChartType, Workbook, XlsxError,
};

use super::sheets::SheetNames;
use super::style::{self, Shown};
use crate::eval::{Chart as ChartData, One, Results, group_label};

const ROWS_PER_CHART: u32 = 18;

pub fn charts(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    results: &Results,
) -> Result<(), XlsxError> {
    let sheet_name = names.claim("Charts");
    let sheet = workbook.add_worksheet().set_name(&sheet_name)?;
    sheet.write_string_with_format(0, 0, "Charts", &style::title())?;
    sheet.write_string(
        1,
        0,
        "Each chart's numbers stand beside it, so the chart can be checked and redrawn.",
    )?;
    sheet.set_column_width(0, 22)?;
    sheet.set_column_width(1, 14)?;
    let mut top: u32 = 3;
    for chart in &results.charts {
        match chart {
            ChartData::Histogram {
                column,
                group,
                histogram,
                rule,
            } => {
                let rule_words = crate::stats::BinRule::from_word(rule)
                    .map_or_else(|| rule.clone(), |r| r.words());
                let title = format!(
                    "{column}, {}: {} bins by {rule_words}",
                    group_label(group),
                    histogram.counts.len()
                );
                sheet.write_string_with_format(top, 0, "bin", &style::header())?;
                sheet.write_string_with_format(top, 1, "values in bin", &style::header())?;
                // Edges to 4 significant digits of the bin width: clean
                // labels that still tell neighbouring bins apart.
                let width = histogram.edges.get(1).zip(histogram.edges.first());
                let shown = Shown::unknown_kind(&One::Number(width.map_or(0.0, |(b, a)| b - a)));
                for (i, count) in histogram.counts.iter().enumerate() {
                    let label = format!(
                        "{} to {}",
                        shown.text(histogram.edges[i]),
                        shown.text(histogram.edges[i + 1])
                    );
                    sheet.write_string(top + 1 + i as u32, 0, style::fit(&label))?;
                    sheet.write_number(top + 1 + i as u32, 1, *count as f64)?;
                }
                let last = top + histogram.counts.len() as u32;
                let mut c = Chart::new(ChartType::Column);
                c.title().set_name(&title);
                c.legend().set_hidden();
                c.add_series()
                    .set_categories((sheet_name.as_str(), top + 1, 0, last, 0))
                    .set_values((sheet_name.as_str(), top + 1, 1, last, 1))
                    .set_gap(0)
                    .set_format(ChartFormat::new().set_solid_fill(
                        rust_xlsxwriter::ChartSolidFill::new().set_color(style::HEADER_COLOUR),
                    ));
                c.x_axis().set_name(column);
                c.y_axis().set_name("values in bin");
                sheet.insert_chart(top, 3, &c)?;
                top = (last + 2).max(top + ROWS_PER_CHART);
            }
            ChartData::Boxplot { column, boxes } => {
                let labels = [
                    "group",
                    "Q1",
                    "upper whisker",
                    "lower whisker",
                    "median",
                    "Q3",
                ]; // the stock chart reads columns 1, 2, 3, 5
                for (j, l) in labels.iter().enumerate() {
                    sheet.write_string_with_format(top, j as u16, *l, &style::header())?;
                }
                for (i, (group, b)) in boxes.iter().enumerate() {
                    let r = top + 1 + i as u32;
                    sheet.write_string(r, 0, style::fit(&group_label(group)))?;
                    for (j, x) in [b.q1, b.whisker_high, b.whisker_low, b.median, b.q3]
                        .into_iter()
                        .enumerate()
                    {
                        sheet.write_number(r, 1 + j as u16, x)?;
                    }
                }
                if boxes.is_empty() {
                    top += 3;
                    continue;
                }
                let last = top + boxes.len() as u32;
                // A stock chart (open = Q1, high, low, close = Q3): its up-down bars are the
                // boxes and its high-low lines the whiskers; a line chart adds the medians.
                let mut c = Chart::new(ChartType::Stock);
                c.title().set_name(&format!(
                    "{column}: quartile box, whiskers to the furthest values inside 1.5 IQR"
                ));
                c.legend().set_hidden();
                for j in 1..=5u16 {
                    if j == 4 {
                        continue;
                    }
                    c.add_series()
                        .set_categories((sheet_name.as_str(), top + 1, 0, last, 0))
                        .set_values((sheet_name.as_str(), top + 1, j, last, j))
                        .set_format(ChartFormat::new().set_no_line());
                }
                let mut medians = Chart::new(ChartType::Line);
                medians
                    .add_series()
                    .set_categories((sheet_name.as_str(), top + 1, 0, last, 0))
                    .set_values((sheet_name.as_str(), top + 1, 4, last, 4))
                    .set_name("median")
                    .set_format(ChartFormat::new().set_no_line())
                    .set_marker(
                        ChartMarker::new()
                            .set_type(ChartMarkerType::LongDash)
                            .set_size(14),
                    );
                c.combine(&medians);
                c.set_up_down_bars(true);
                c.set_high_low_lines(true);
                c.x_axis().set_name("group");
                c.y_axis().set_name(column);
                sheet.insert_chart(top, 7, &c)?;
                top = (last + 2).max(top + ROWS_PER_CHART);
            }
        }
    }
    Ok(())
}
