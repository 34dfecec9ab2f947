//! The Charts sheet: native histogram (column) charts, one per group, and
//! box-and-whisker charts drawn as a stock chart whose up-down bars are the
//! boxes (Q1 to Q3) and whose high-low lines are the whiskers, with the
//! medians and the outliers as marks from a combined line chart. (Checked by
//! rendering the workbook with LibreOffice; Excel draws stock charts the
//! same way.) Each chart's numbers stand in a table beside it.

use rust_xlsxwriter::{
    Chart, ChartEmptyCells, ChartFormat, ChartLine, ChartMarker, ChartMarkerType, ChartPoint,
    ChartSolidFill, ChartType, Workbook, Worksheet, XlsxError,
};

use super::sheets::SheetNames;
use super::style::{self, Shown};
use crate::eval::{BoxSummary, Chart as ChartData, One, Results, group_label};
use crate::stats::{BinRule, CHART_FENCE_IQR, CHART_MAX_BINS, Histogram};

/// A chart's height in pixels, and the rows it covers on the sheet: two
/// charts with their gaps and the sheet's note fit on a printed page.
pub(super) const CHART_HEIGHT: u32 = 240;
pub(super) const ROWS_PER_CHART: u32 = CHART_HEIGHT.div_ceil(style::ROW_PIXELS);

/// Rows of the default height on one printed page of the Charts sheet at
/// full size. The sheet prints one page wide, so at most this size; a page
/// break goes before a chart that would not fit, so no chart is cut.
const ROWS_PER_PAGE: u32 = (style::LANDSCAPE_POINTS / style::LINE_HEIGHT) as u32;

/// Most outliers of one group drawn as points; the rest are listed in the
/// table and counted in the title.
const DRAWN_OUTLIERS: usize = 12;

/// Where the next chart goes and where the pages break (the Charts sheet
/// and the trend workbook's charts).
pub(super) struct Layout<'a> {
    pub sheet_name: &'a str,
    /// The next free row.
    top: u32,
    /// Rows of the default height used on the current page.
    used: u32,
    pub breaks: Vec<u32>,
}

impl Layout<'_> {
    /// Charts from row `top` of `sheet_name` on, with `used` rows of the
    /// first page taken above them.
    pub fn new(sheet_name: &str, top: u32, used: u32) -> Layout<'_> {
        Layout {
            sheet_name,
            top,
            used,
            breaks: Vec::new(),
        }
    }

    /// The top row of a block `rows` tall whose first `together` rows (its
    /// chart) must stay on one page: moved to a new page when they would
    /// cross the page's end.
    pub fn place(&mut self, rows: u32, together: u32) -> u32 {
        if self.used > 0 && self.used + together > ROWS_PER_PAGE {
            self.breaks.push(self.top);
            self.used = 0;
        }
        let top = self.top;
        self.top += rows + 1;
        self.used += rows + 1;
        if self.used > ROWS_PER_PAGE {
            // A table longer than a page: the next chart starts a page.
            self.breaks.push(self.top);
            self.used = 0;
        }
        top
    }
}

/// The Charts sheet's conventions, a note above the charts.
fn charts_note() -> String {
    format!(
        "Each chart's numbers stand beside it, so the chart can be checked and redrawn. Histograms: the bin rule applied \
to the values inside the {CHART_FENCE_IQR} IQR fences (Tukey 1977, type 7 quartiles), so one typo cannot stretch every bin; \
values beyond them are counted in the end bins marked 'below' and 'above'; at most {CHART_MAX_BINS} bins. Box plots: a box \
from Q1 to Q3, a mark at the median, whiskers to the last values inside the 1.5 IQR fences, each outlier a point at its value."
    )
}

/// Widths of the Charts sheet's columns, in characters.
const CHART_COLUMNS: [usize; 8] = [22, 15, 11, 11, 11, 11, 11, 11];

pub fn charts(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    results: &Results,
) -> Result<(), XlsxError> {
    let sheet_name = names.claim("Charts");
    let sheet = workbook.add_worksheet().set_name(&sheet_name)?;
    sheet.write_string_with_format(0, 0, "Charts", &style::title())?;
    for (c, width) in CHART_COLUMNS.iter().enumerate() {
        sheet.set_column_width(c as u16, *width as f64)?;
    }
    let note_lines = style::note_block(sheet, 1, &charts_note(), &CHART_COLUMNS)?;
    let mut layout = Layout::new(&sheet_name, 3, 3 + note_lines as u32);
    for chart in &results.charts {
        match chart {
            ChartData::Histogram {
                column,
                group,
                histogram,
                rule,
            } => {
                let label = results.column_label(column);
                let heading = format!("{label}, {}", group_label(group));
                histogram_chart(sheet, &mut layout, &heading, label, histogram, rule)?;
            }
            ChartData::Boxplot { column, boxes } => {
                box_chart(sheet, &mut layout, results.column_label(column), boxes)?;
            }
        }
    }
    sheet.set_page_breaks(&layout.breaks)?;
    Ok(())
}

/// A solid fill in one of sheaf's colours.
fn filled(colour: u32) -> ChartFormat {
    ChartFormat::new()
        .set_solid_fill(ChartSolidFill::new().set_color(colour))
        .clone()
}

/// The histogram title: the rule in words, the bins, and what went to the
/// overflow bins or was capped.
fn histogram_title(heading: &str, h: &Histogram, rule: &str) -> String {
    let rule_words = BinRule::from_word(rule).map_or_else(|| rule.to_string(), |r| r.words());
    let mut title = format!("{heading}: {} bins by {rule_words}", h.counts.len());
    if let Some(asked) = h.capped_from {
        title.push_str(&format!(" (it asked for {asked})"));
    }
    let beyond = h.below + h.above;
    if beyond > 0 {
        let values = if beyond == 1 { "value" } else { "values" };
        title.push_str(&format!(
            "; {beyond} {values} beyond the {CHART_FENCE_IQR} IQR fences in the end bins"
        ));
    }
    title
}

/// The histogram's bins as (label, count, overflow): the overflow bins
/// first and last, labelled with the edge they lie beyond.
fn bins(h: &Histogram) -> Vec<(String, usize, bool)> {
    // Edges to 4 significant digits of the bin width: clean labels that
    // still tell neighbouring bins apart.
    let width = h.edges.get(1).zip(h.edges.first());
    let shown = Shown::unknown_kind(&One::Number(width.map_or(0.0, |(b, a)| b - a)));
    let (first, last) = (h.edges[0], h.edges[h.edges.len() - 1]);
    let mut rows = Vec::with_capacity(h.counts.len() + 2);
    if h.below > 0 {
        rows.push((format!("below {}", shown.text(first)), h.below, true));
    }
    for (i, count) in h.counts.iter().enumerate() {
        let label = format!(
            "{} to {}",
            shown.text(h.edges[i]),
            shown.text(h.edges[i + 1])
        );
        rows.push((label, *count, false));
    }
    if h.above > 0 {
        rows.push((format!("above {}", shown.text(last)), h.above, true));
    }
    rows
}

fn histogram_chart(
    sheet: &mut Worksheet,
    layout: &mut Layout,
    heading: &str,
    axis: &str,
    h: &Histogram,
    rule: &str,
) -> Result<(), XlsxError> {
    let rows = bins(h);
    let table_rows = rows.len() as u32 + 1;
    let top = layout.place(
        table_rows.max(ROWS_PER_CHART),
        table_rows.min(ROWS_PER_CHART),
    );
    sheet.write_string_with_format(top, 0, "bin", &style::header())?;
    sheet.write_string_with_format(top, 1, "values in bin", &style::header())?;
    let mut points = Vec::with_capacity(rows.len());
    for (i, (label, count, overflow)) in rows.iter().enumerate() {
        let r = top + 1 + i as u32;
        sheet.write_string(r, 0, style::fit(label))?;
        sheet.write_number(r, 1, *count as f64)?;
        let colour = match overflow {
            true => style::palette::OVERFLOW,
            false => style::palette::BARS,
        };
        points.push(ChartPoint::new().set_format(&mut filled(colour)));
    }
    let last = top + rows.len() as u32;
    let name = layout.sheet_name;
    let mut c = Chart::new(ChartType::Column);
    style::chart_text(
        &mut c,
        &histogram_title(heading, h, rule),
        axis,
        "number of values",
    );
    c.legend().set_hidden();
    c.add_series()
        .set_categories((name, top + 1, 0, last, 0))
        .set_values((name, top + 1, 1, last, 1))
        .set_gap(0)
        .set_format(&mut filled(style::palette::BARS))
        .set_points(&points);
    c.set_height(CHART_HEIGHT);
    sheet.insert_chart(top, 3, &c)?;
    Ok(())
}

/// Labels of the box plot table, before its outlier columns.
const BOX_LABELS: [&str; 7] = [
    "group",
    "lower whisker",
    "Q1",
    "median",
    "Q3",
    "upper whisker",
    "outliers beyond 1.5 IQR",
];

/// The column of the box table holding each part the chart reads.
const LOWER: u16 = 1;
const Q1: u16 = 2;
const MEDIAN: u16 = 3;
const Q3: u16 = 4;
const UPPER: u16 = 5;
/// First of the columns holding each group's outliers, one per column.
const FIRST_OUTLIER: u16 = 7;

/// The outliers of a box drawn as points: the furthest from the median
/// first when there are more than [`DRAWN_OUTLIERS`], shown ascending.
fn drawn(b: &BoxSummary) -> Vec<f64> {
    let mut far: Vec<f64> = b.outliers.clone();
    far.sort_by(|x, y| (y - b.median).abs().total_cmp(&(x - b.median).abs()));
    far.truncate(DRAWN_OUTLIERS);
    far.sort_by(f64::total_cmp);
    far
}

fn box_chart(
    sheet: &mut Worksheet,
    layout: &mut Layout,
    label: &str,
    boxes: &[(Vec<String>, BoxSummary)],
) -> Result<(), XlsxError> {
    if boxes.is_empty() {
        return Ok(());
    }
    let drawn: Vec<Vec<f64>> = boxes.iter().map(|(_, b)| drawn(b)).collect();
    let most = drawn.iter().map(Vec::len).max().unwrap_or(0) as u16;
    // The chart goes under its table (the outlier columns make the table
    // wide), whose header is three lines tall.
    let table_rows = boxes.len() as u32 + 2;
    let top = layout.place(table_rows + ROWS_PER_CHART, table_rows + 2 + ROWS_PER_CHART);
    sheet.set_row_height(top, 3.0 * style::LINE_HEIGHT)?;
    for (j, l) in BOX_LABELS.iter().enumerate() {
        sheet.write_string_with_format(top, j as u16, *l, &style::header())?;
    }
    for k in 0..most {
        let head = format!("outlier {}", k + 1);
        sheet.write_string_with_format(top, FIRST_OUTLIER + k, head, &style::header())?;
    }
    let data: Vec<f64> = boxes
        .iter()
        .flat_map(|(_, b)| [b.whisker_low, b.whisker_high])
        .collect();
    let shown = Shown::of(
        crate::eval::FigureKind::Measure,
        style::data_decimals(&data),
    );
    let format = shown.format();
    for (i, ((group, b), points)) in boxes.iter().zip(&drawn).enumerate() {
        let r = top + 1 + i as u32;
        sheet.write_string(r, 0, style::fit(&group_label(group)))?;
        for (c, x) in [
            (LOWER, b.whisker_low),
            (Q1, b.q1),
            (MEDIAN, b.median),
            (Q3, b.q3),
            (UPPER, b.whisker_high),
        ] {
            sheet.write_number_with_format(r, c, x, &format)?;
        }
        sheet.write_number(r, 6, b.outliers.len() as f64)?;
        for (k, x) in points.iter().enumerate() {
            sheet.write_number_with_format(r, FIRST_OUTLIER + k as u16, *x, &format)?;
        }
    }
    let last = top + boxes.len() as u32;
    let not_drawn: usize = boxes.iter().map(|(_, b)| b.outliers.len()).sum::<usize>()
        - drawn.iter().map(Vec::len).sum::<usize>();
    let mut title = format!(
        "{label}: boxes from Q1 to Q3 with the median, whiskers to the last values inside the 1.5 IQR fences, outliers as points"
    );
    if not_drawn > 0 {
        title.push_str(&format!(
            " ({not_drawn} outliers nearest the box not drawn; all are counted in the table)"
        ));
    }
    let mut chart = box_plot(layout.sheet_name, top + 1, last, most, &title, label);
    chart.set_width(720).set_height(CHART_HEIGHT);
    sheet.insert_chart(top + table_rows, 0, &chart)?;
    Ok(())
}

/// The stock chart of a box table in rows `first..=last`, with `outliers`
/// outlier columns.
fn box_plot(name: &str, first: u32, last: u32, outliers: u16, title: &str, axis: &str) -> Chart {
    // A stock chart's series are read as open, high, low, close: Q1, the
    // upper whisker, the lower whisker and Q3. Its up-down bars are the
    // boxes and its high-low lines the whiskers.
    let mut c = Chart::new(ChartType::Stock);
    style::chart_text(&mut c, title, "group", axis);
    c.legend().set_hidden();
    for col in [Q1, UPPER, LOWER, Q3] {
        c.add_series()
            .set_categories((name, first, 0, last, 0))
            .set_values((name, first, col, last, col))
            .set_format(ChartFormat::new().set_no_line());
    }
    c.set_up_down_bars(true)
        .set_up_bar_format(&mut filled(style::palette::BOX))
        .set_down_bar_format(&mut filled(style::palette::BOX))
        .set_high_low_lines(true)
        .set_high_low_lines_format(
            ChartFormat::new().set_line(ChartLine::new().set_color(style::palette::INK)),
        );
    let mut marks = Chart::new(ChartType::Line);
    marks
        .add_series()
        .set_categories((name, first, 0, last, 0))
        .set_values((name, first, MEDIAN, last, MEDIAN))
        .set_name("median")
        .set_format(ChartFormat::new().set_no_line())
        .set_marker(
            ChartMarker::new()
                .set_type(ChartMarkerType::LongDash)
                .set_size(14)
                .set_format(&mut filled(style::palette::INK)),
        );
    // One series per outlier rank: each group's k-th outlier, blank where
    // a group has fewer, drawn as points only.
    for k in 0..outliers {
        let col = FIRST_OUTLIER + k;
        marks
            .add_series()
            .set_categories((name, first, 0, last, 0))
            .set_values((name, first, col, last, col))
            .set_name(&format!("outlier {}", k + 1))
            .set_format(ChartFormat::new().set_no_line())
            .set_marker(
                ChartMarker::new()
                    .set_type(ChartMarkerType::Circle)
                    .set_size(6)
                    .set_format(&mut filled(style::palette::OVERFLOW)),
            );
    }
    c.show_empty_cells_as(ChartEmptyCells::Gaps);
    c.combine(&marks);
    c
}
