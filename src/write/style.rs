//! Cell formats and the shared way of writing a figure into a cell.

use rust_xlsxwriter::{
    Chart, ChartFont, Color, Format, FormatAlign, Workbook, Worksheet, XlsxError,
};

use crate::eval::{FigureKind, One};

/// sheaf's colours: slate headers, a pale sand band for notes.
pub const HEADER_COLOUR: u32 = 0x34495E;
pub const NOTE_COLOUR: u32 = 0xF4ECD8;

/// Chart colours, from the colour-blind-safe palette of Okabe and Ito
/// (2008, "Color Universal Design"), as hexadecimal RGB: told apart by
/// readers with any common colour vision deficiency.
pub mod palette {
    /// Histogram bars and trend series: Okabe-Ito blue.
    pub const BARS: u32 = 0x0072B2;
    /// Values beyond the fences (overflow bins, outlier points): vermillion.
    pub const OVERFLOW: u32 = 0xD55E00;
    /// Box fill: a pale tint of Okabe-Ito sky blue.
    pub const BOX: u32 = 0xCCE8F7;
    /// Lines and medians: Okabe-Ito black.
    pub const INK: u32 = 0x000000;
    /// Series of several groups, in this order: blue, orange, bluish green,
    /// vermillion, reddish purple, sky blue, yellow, black.
    pub const SERIES: [u32; 8] = [
        0x0072B2, 0xE69F00, 0x009E73, 0xD55E00, 0xCC79A7, 0x56B4E9, 0xF0E442, 0x000000,
    ];
}

/// sheaf's typeface, for every cell and every chart: DejaVu Sans
/// Condensed, a free sans-serif (Bitstream Vera licence) that LibreOffice
/// and most Linux systems carry; narrow enough for tables of figures, with
/// digits easy to tell apart. A program without it substitutes a sans-serif
/// (the font is marked as one).
pub const FONT: &str = "DejaVu Sans Condensed";

/// Size of table text, in points.
pub const FONT_SIZE: f64 = 10.0;

/// Default row height and column width, in pixels, of a sheet in [`FONT`]
/// at [`FONT_SIZE`] (the library places charts by them): a digit of the
/// font is 8 pixels wide at 96 dpi, as LibreOffice lays it out.
pub const ROW_PIXELS: u32 = 17;
const COLUMN_PIXELS: u32 = 72;

/// The font family code of a sans-serif ("swiss") font, which a program
/// without [`FONT`] substitutes by.
const SANS_SERIF_FAMILY: u8 = 2;

/// The base of every cell format: sheaf's font and size, text at the top
/// of its cell (a row taller than one line reads as one record, not as
/// text hanging from the row above). Every format starts here.
pub fn cell() -> Format {
    Format::new()
        .set_font_name(FONT)
        .set_font_size(FONT_SIZE)
        .set_font_family(SANS_SERIF_FAMILY)
        .set_align(FormatAlign::Top)
}

/// A new workbook whose default format, and so every cell written without
/// one and every link, is [`cell`].
pub fn workbook() -> Result<Workbook, XlsxError> {
    let mut workbook = Workbook::new();
    workbook.set_default_format(&cell(), ROW_PIXELS, COLUMN_PIXELS)?;
    Ok(workbook)
}

/// Chart text in sheaf's font at `size` points.
pub fn chart_font(size: f64) -> ChartFont {
    ChartFont::new().set_name(FONT).set_size(size).clone()
}

/// A chart's title and axis titles in bold, its axis numbers and legend in
/// plain sheaf's font, so no chart text falls back to the library's font.
pub fn chart_text(chart: &mut Chart, title: &str, x: &str, y: &str) {
    let bold = chart_font(9.0).set_bold().clone();
    let plain = chart_font(8.0);
    chart
        .title()
        .set_name(title)
        .set_font(chart_font(11.0).set_bold());
    chart
        .x_axis()
        .set_name(x)
        .set_name_font(&bold)
        .set_font(&plain);
    chart
        .y_axis()
        .set_name(y)
        .set_name_font(&bold)
        .set_font(&plain);
    chart.legend().set_font(&plain);
}

pub fn title() -> Format {
    cell().set_bold().set_font_size(14)
}

pub fn note_format() -> Format {
    cell()
        .set_italic()
        .set_background_color(Color::RGB(NOTE_COLOUR))
        .set_text_wrap()
}

pub fn header() -> Format {
    cell()
        .set_bold()
        .set_font_color(Color::White)
        .set_background_color(Color::RGB(HEADER_COLOUR))
        .set_text_wrap()
        // Labels sit on the figures under them.
        .set_align(FormatAlign::Bottom)
}

pub fn reason() -> Format {
    cell().set_italic().set_font_color(Color::RGB(0x7F6A4D))
}

/// How one number is shown: a cell format, and the same rule for numbers
/// written inside text (lists of modes, cells with their values). The cell
/// keeps the full value; only its look is rounded.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shown {
    /// A whole number.
    Count,
    /// A fixed number of decimals.
    Decimals(u8),
    /// A fraction as a percentage with one decimal.
    Percent,
}

/// Most decimals of the data a measure's format follows; derived columns
/// (a division) would otherwise carry sixteen.
const DATA_DECIMALS_CAP: u8 = 3;

/// Decimals a shape figure (skewness, kurtosis, ratios of spreads) shows:
/// enough to tell 0.1 from 0.12, not float noise like 2.39e-17.
const SHAPE_DECIMALS: u8 = 3;

impl Shown {
    /// How a figure of `kind` is shown, for data with `data_decimals`.
    pub fn of(kind: FigureKind, data_decimals: u8) -> Shown {
        match kind {
            FigureKind::Count => Shown::Count,
            FigureKind::Measure => Shown::Decimals(data_decimals.min(DATA_DECIMALS_CAP) + 2),
            FigureKind::Shape | FigureKind::Words => Shown::Decimals(SHAPE_DECIMALS),
            FigureKind::Share => Shown::Percent,
        }
    }

    /// Four significant digits, for a figure of unknown kind: decimals
    /// picked from the value itself (the largest of a list), at most six.
    pub fn unknown_kind(value: &One) -> Shown {
        let largest = match value {
            One::Number(x) => x.abs(),
            One::List(v) => v.iter().fold(0.0, |m: f64, x| m.max(x.abs())),
            _ => 0.0,
        };
        if largest == 0.0 || !largest.is_finite() {
            return Shown::Decimals(0);
        }
        let digits = 3 - largest.log10().floor() as i32;
        Shown::Decimals(digits.clamp(0, 6) as u8)
    }

    /// The cell format.
    pub fn format(self) -> Format {
        cell().set_num_format(self.code())
    }

    /// The number format code, for cells and chart axes.
    pub fn code(self) -> String {
        match self {
            Shown::Count | Shown::Decimals(0) => "#,##0".to_string(),
            Shown::Decimals(d) => format!("#,##0.{}", "0".repeat(d as usize)),
            Shown::Percent => "0.0%".to_string(),
        }
    }

    /// `x` as text, rounded as the format rounds it, without trailing
    /// zeros or thousands marks (15 rather than 15.00000).
    pub fn text(self, x: f64) -> String {
        let trimmed = |t: String| {
            if t.contains('.') {
                t.trim_end_matches('0').trim_end_matches('.').to_string()
            } else {
                t
            }
        };
        match self {
            Shown::Count => format!("{x:.0}"),
            Shown::Decimals(d) => trimmed(format!("{x:.*}", d as usize)),
            Shown::Percent => trimmed(format!("{:.1}", x * 100.0)) + "%",
        }
    }
}

/// Decimals written in the data: the most any value of `values` needs in
/// its shortest form (so 247.54 has 2).
pub fn data_decimals(values: &[f64]) -> u8 {
    values
        .iter()
        .filter(|x| x.is_finite())
        .map(|x| {
            let text = crate::format::shortest(*x);
            let mantissa = text.split(['e', 'E']).next().unwrap_or("");
            mantissa.split('.').nth(1).map_or(0, |d| d.len()).min(255) as u8
        })
        .max()
        .unwrap_or(0)
}

/// Text that wraps inside its cell, for cells longer than a column holds.
pub fn wrapped() -> Format {
    cell().set_text_wrap()
}

/// A date cell: the value stays the serial, shown as a date (with the time
/// when it has one).
pub fn date(serial: f64) -> Format {
    let code = if crate::format::has_time(serial) {
        "yyyy-mm-dd hh:mm:ss"
    } else {
        "yyyy-mm-dd"
    };
    cell().set_num_format(code)
}

/// A status cell: the word always written (so it reads without colour,
/// in grey print and for colour-blind readers), a pale tint of an
/// Okabe-Ito colour behind it, and a heavier mark for what needs action:
/// bold for warn, bold on a darker tint with a left rule for fail.
pub fn status(word: &str) -> Format {
    let (colour, weight) = match word {
        // Tint of bluish green 009E73.
        "ok" | "pass" => (0xD9EFE8, Weight::Plain),
        // Tint of sky blue 56B4E9: worth a look, nothing wrong.
        "note" => (0xDDEEF9, Weight::Plain),
        // Tint of orange E69F00.
        "warn" => (0xFAE6BF, Weight::Bold),
        // Tint of vermillion D55E00.
        _ => (0xF2C9AE, Weight::Ruled),
    };
    let format = cell().set_background_color(Color::RGB(colour));
    match weight {
        Weight::Plain => format,
        Weight::Bold => format.set_bold(),
        Weight::Ruled => format
            .set_bold()
            .set_border_left(rust_xlsxwriter::FormatBorder::Thick)
            .set_border_left_color(Color::RGB(palette::OVERFLOW)),
    }
}

/// How strongly a status cell is marked besides its word.
enum Weight {
    Plain,
    Bold,
    Ruled,
}

/// Writes one figure: a number as a number in the format `shown` picks,
/// text always as text (never a formula), a reason in words where there is
/// no value. Returns how many characters the cell shows, for its column's
/// width.
pub fn write_one(
    sheet: &mut Worksheet,
    row: u32,
    col: u16,
    value: &One,
    shown: Shown,
) -> Result<usize, XlsxError> {
    match value {
        One::Number(x) => {
            sheet.write_number_with_format(row, col, *x, &shown.format())?;
            Ok(shown_width(shown, *x))
        }
        One::Date(x) => {
            sheet.write_number_with_format(row, col, *x, &date(*x))?;
            Ok(crate::format::date(*x).len())
        }
        One::Truth(b) => {
            sheet.write_boolean(row, col, *b)?;
            Ok(5)
        }
        One::Text(t) => write_text(sheet, row, col, t),
        One::List(v) if v.len() == 1 => {
            sheet.write_number_with_format(row, col, v[0], &shown.format())?;
            Ok(shown_width(shown, v[0]))
        }
        One::List(v) => {
            let text = v
                .iter()
                .map(|x| shown.text(*x))
                .collect::<Vec<_>>()
                .join("; ");
            write_text(sheet, row, col, &text)
        }
        One::Undefined(why) => {
            // Wrapped wherever the column ends: in a column of numbers
            // the reason is kept narrow (see [`Widths::seen_figure`]).
            let why = why.to_string();
            sheet.write_string_with_format(row, col, &why, &reason().set_text_wrap())?;
            Ok(why.chars().count())
        }
    }
}

/// Characters `x` takes in the format `shown` picks, thousands marks included.
fn shown_width(shown: Shown, x: f64) -> usize {
    let text = match shown {
        Shown::Decimals(d) => format!("{x:.*}", d as usize),
        other => other.text(x),
    };
    text.len() + text.split('.').next().map_or(0, |whole| whole.len() / 3)
}

/// Writes text, wrapped when it is longer than a column is made wide.
pub fn write_text(
    sheet: &mut Worksheet,
    row: u32,
    col: u16,
    text: &str,
) -> Result<usize, XlsxError> {
    let text = fit(text);
    let chars = text.chars().count();
    if chars > WIDEST {
        sheet.write_string_with_format(row, col, &text, &wrapped())?;
    } else {
        sheet.write_string(row, col, &text)?;
    }
    Ok(chars)
}

/// Most characters a spreadsheet cell holds.
pub const CELL_LIMIT: usize = 32_767;

/// Text cut to what one cell holds, saying so when it was cut.
pub fn fit(text: &str) -> String {
    if text.chars().count() <= CELL_LIMIT {
        return text.to_string();
    }
    let mark = " ... (cut: a cell holds 32,767 characters)";
    text.chars()
        .take(CELL_LIMIT - mark.len())
        .collect::<String>()
        + mark
}

/// Widest a column is made, in characters; longer text wraps.
pub const WIDEST: usize = 32;

/// Widest a reason makes a column of numbers, in characters.
const REASON_WIDTH: usize = 16;

/// Narrowest a table column is made, in characters.
const NARROWEST: usize = 6;

/// Header labels wrap rather than widen a column of short figures beyond
/// this many characters.
const HEADER_WRAP: usize = 12;

/// Points per line of text in a row: the default row's height (a pixel
/// is 3/4 of a point).
pub const LINE_HEIGHT: f64 = ROW_PIXELS as f64 * 0.75;

/// The widest cell seen in each column of a table, in characters, and the
/// long cells that wrap, for their rows' heights.
#[derive(Debug, Default)]
pub struct Widths {
    columns: Vec<usize>,
    /// (row, column, characters) of each cell longer than [`WIDEST`].
    wrapping: Vec<(u32, u16, usize)>,
}

impl Widths {
    /// Records a cell of `chars` characters at (`row`, `col`).
    pub fn seen(&mut self, row: u32, col: u16, chars: usize) {
        self.seen_within(row, col, chars, WIDEST);
    }

    /// Records a figure's cell: in a column of numbers, a reason in words
    /// ("needs at least 4 values, has 2") wraps beyond [`REASON_WIDTH`]
    /// rather than widen the column for every row.
    pub fn seen_figure(&mut self, row: u32, col: u16, chars: usize, kind: FigureKind) {
        match kind {
            FigureKind::Words => self.seen(row, col, chars),
            _ => self.seen_within(row, col, chars, REASON_WIDTH),
        }
    }

    /// Records a cell that wraps beyond `widest` characters.
    fn seen_within(&mut self, row: u32, col: u16, chars: usize, widest: usize) {
        let c = col as usize;
        if self.columns.len() <= c {
            self.columns.resize(c + 1, 0);
        }
        self.columns[c] = self.columns[c].max(chars.min(widest));
        if chars > widest {
            self.wrapping.push((row, col, chars));
        }
    }

    fn content(&self, col: usize) -> usize {
        self.columns.get(col).copied().unwrap_or(0)
    }

    /// Sets each row holding wrapped text tall enough for its lines
    /// (spreadsheet programs do not all grow such rows when opening a file).
    fn set_row_heights(&self, sheet: &mut Worksheet, widths: &[usize]) -> Result<(), XlsxError> {
        for (row, n) in self.lines(widths) {
            sheet.set_row_height(row, (LINE_HEIGHT * n as f64).min(409.0))?;
        }
        Ok(())
    }

    /// Lines of each row holding wrapped text, given the columns' widths.
    fn lines(&self, widths: &[usize]) -> std::collections::BTreeMap<u32, usize> {
        let mut lines: std::collections::BTreeMap<u32, usize> = Default::default();
        for &(row, col, chars) in &self.wrapping {
            let width = widths.get(col as usize).copied().unwrap_or(WIDEST).max(1);
            // Words do not fill a line to its last character.
            let needed = (chars * 6 / 5).div_ceil(width);
            let entry = lines.entry(row).or_insert(1);
            *entry = (*entry).max(needed);
        }
        lines
    }

    /// Height in points of rows `first..=last` once sized for `widths`.
    pub fn height(&self, widths: &[usize], first: u32, last: u32) -> f64 {
        let lines = self.lines(widths);
        (first..=last)
            .map(|r| LINE_HEIGHT * lines.get(&r).copied().unwrap_or(1) as f64)
            .map(|h| h.min(409.0))
            .sum()
    }
}

/// A table header row, frozen above the data, with its label columns
/// frozen beside it.
pub fn table_header(
    sheet: &mut Worksheet,
    row: u32,
    labels: &[String],
    frozen_columns: u16,
) -> Result<(), XlsxError> {
    for (c, label) in labels.iter().enumerate() {
        sheet.write_string_with_format(row, c as u16, label, &header())?;
    }
    sheet.set_freeze_panes(row + 1, frozen_columns)?;
    Ok(())
}

/// Sizes a finished table: each column as wide as its widest cell (capped,
/// long text wraps), the header row tall enough for its wrapped labels.
/// Returns the column widths in characters.
pub fn fit_columns(
    sheet: &mut Worksheet,
    header_row: u32,
    labels: &[String],
    widths: &Widths,
) -> Result<Vec<usize>, XlsxError> {
    let mut chosen = Vec::with_capacity(labels.len());
    for (c, label) in labels.iter().enumerate() {
        let label_chars = label.chars().count();
        let longest_word = label
            .split(' ')
            .map(|w| w.chars().count())
            .max()
            .unwrap_or(0);
        let width = widths
            .content(c)
            .max(label_chars.min(HEADER_WRAP))
            .max(longest_word)
            .clamp(NARROWEST, WIDEST);
        sheet.set_column_width(c as u16, width as f64 + 1.5)?;
        chosen.push(width);
    }
    let lines = header_lines(labels, &chosen);
    sheet.set_row_height(header_row, LINE_HEIGHT * lines as f64)?;
    widths.set_row_heights(sheet, &chosen)?;
    Ok(chosen)
}

/// Writes `text` wrapped in a column `width` characters wide, its row made
/// tall enough for every line (a row too short for wrapped text shows only
/// part of it, and LibreOffice draws the rest over the row above).
pub fn text_block(
    sheet: &mut Worksheet,
    row: u32,
    col: u16,
    text: &str,
    width: usize,
) -> Result<usize, XlsxError> {
    let text = fit(text);
    sheet.write_string_with_format(row, col, &text, &wrapped())?;
    // Text runs a little wider than the column's count of digits.
    let lines = wrapped_lines(&text, width * 9 / 10);
    sheet.set_row_height(row, (LINE_HEIGHT * lines as f64).min(409.0))?;
    Ok(lines)
}

/// Lines the tallest of a header row's `labels` takes in columns `widths`
/// characters wide.
pub fn header_lines(labels: &[String], widths: &[usize]) -> usize {
    labels
        .iter()
        .zip(widths)
        .map(|(label, &width)| wrapped_lines(label, width))
        .max()
        .unwrap_or(1)
}

/// Width of a note block, in characters: a readable line.
pub const NOTE_WIDTH: usize = 110;

/// Writes a note as a block about [`NOTE_WIDTH`] characters wide (merged
/// over the first columns that reach it) and tall enough for its lines.
/// Returns how many lines it takes.
pub fn note_block(
    sheet: &mut Worksheet,
    row: u32,
    note: &str,
    column_widths: &[usize],
) -> Result<usize, XlsxError> {
    let mut last = 0;
    let mut width = 0;
    for (c, w) in column_widths.iter().enumerate() {
        last = c;
        width += w + 1;
        if width >= NOTE_WIDTH {
            break;
        }
    }
    note_block_over(sheet, row, note, (0, last as u16), width)
}

/// Writes a note as a block over columns `first..=last`, which are
/// `wide` characters together (see [`note_block`]).
pub fn note_block_over(
    sheet: &mut Worksheet,
    row: u32,
    note: &str,
    (first, last): (u16, u16),
    wide: usize,
) -> Result<usize, XlsxError> {
    let width = wide;
    if last == first {
        sheet.write_string_with_format(row, first, note, &note_format())?;
    } else {
        sheet.merge_range(row, first, row, last, note, &note_format())?;
    }
    // Italic text runs a little wider than the column's character count.
    let lines = wrapped_lines(note, width.max(1) * 9 / 10);
    sheet.set_row_height(row, (LINE_HEIGHT * lines as f64).min(409.0))?;
    Ok(lines)
}

/// Lines `text` takes when wrapped at word boundaries to `width` characters.
pub fn wrapped_lines(text: &str, width: usize) -> usize {
    text.split('\n').map(|line| line_wraps(line, width)).sum()
}

/// Lines one line of text (no line break in it) takes when wrapped.
fn line_wraps(text: &str, width: usize) -> usize {
    let mut lines = 1;
    let mut used = 0;
    for word in text.split(' ') {
        let n = word.chars().count();
        if used > 0 && used + 1 + n > width {
            lines += 1;
            used = n;
        } else {
            used += if used > 0 { n + 1 } else { n };
        }
    }
    lines
}

/// Turns on the filter buttons over a finished table.
pub fn filter(
    sheet: &mut Worksheet,
    header_row: u32,
    last_row: u32,
    columns: usize,
) -> Result<(), XlsxError> {
    if columns > 0 {
        sheet.autofilter(header_row, 0, last_row.max(header_row), columns as u16 - 1)?;
    }
    Ok(())
}

/// Page setup for every sheet: landscape, one page wide, and a page header
/// with the recipe's title and the period, a footer with the page number.
pub fn paper(sheet: &mut Worksheet, title: &str, period: Option<&str>) -> Result<(), XlsxError> {
    sheet.set_landscape();
    sheet.set_print_fit_to_pages(1, 0);
    sheet.set_paper_size(PAPER_A4);
    sheet.set_margins(0.5, 0.5, 0.6, 0.6, 0.3, 0.3);
    // `&` starts a code in page headers; a literal one is doubled.
    let mut header = format!("&L{}", title.replace('&', "&&"));
    if let Some(period) = period {
        header.push_str(&format!("&R{}", period.replace('&', "&&")));
    }
    sheet.set_header(&header);
    sheet.set_footer("&Lsheaf&Rpage &P of &N");
    Ok(())
}

/// Points down a portrait A4 page between its margins (11.69 inches less
/// 0.6 at top and at bottom).
const PORTRAIT_POINTS: f64 = 756.0;

/// Pages tall to fit a portrait sheet `chars` wide and `points` tall to:
/// one page when that still prints at [`READABLE_SCALE`] or more, else as
/// many as it takes (0: no limit).
pub fn portrait_pages_tall(chars: usize, points: f64) -> u16 {
    let across = PORTRAIT_CHARS as f64 * 100.0 / chars.max(1) as f64;
    let down = PORTRAIT_POINTS * 100.0 / points.max(1.0);
    match across.min(down).min(100.0) >= READABLE_SCALE as f64 {
        true => 1,
        false => 0,
    }
}

/// Widest table, in characters, that prints portrait: A4 portrait less its
/// margins is about 7 inches, some 90 characters of sheaf's font.
pub const PORTRAIT_CHARS: usize = 90;

/// Characters of sheaf's font across landscape A4 at full size: 10.7
/// inches between the margins, 96 pixels an inch, 8 pixels a character.
const LANDSCAPE_CHARS: usize = 128;

/// Points down a landscape A4 page between its margins (8.27 inches less
/// 0.6 at top and at bottom, 72 points an inch).
pub const LANDSCAPE_POINTS: f64 = 509.0;

/// Smallest print scale, in percent, a sheet is printed at to save pages:
/// 10-point text comes out at 6 points, which in this font's tall lower
/// case is still read without effort (judged on rendered pages; not from a
/// published source).
const READABLE_SCALE: usize = 60;

/// How a table too wide for one readable page prints: in bands of columns,
/// each on its own pages with the label columns repeated, all at one scale.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Bands {
    /// The first column of each band after the first.
    pub starts: Vec<u16>,
    /// The print scale in percent: the widest band fills a page's width
    /// (or the sheet a page's height).
    pub scale: u16,
}

impl Bands {
    /// Packs pieces of columns that belong together, `(first column, width
    /// in characters)` in order, into as few bands as fit a page at
    /// [`READABLE_SCALE`] beside the repeated labels (`label_chars` wide),
    /// then evens the bands out so the widest, which sets the scale, is as
    /// narrow as that many bands allow. A piece wider than a page gets a
    /// band of its own, printed smaller.
    /// The scale is also small enough for the sheet's `height` (points) to
    /// print on one page's height, so each band is one page, unless that
    /// would take it below [`READABLE_SCALE`]: then each band runs on to
    /// further pages.
    pub fn pack(label_chars: usize, pieces: &[(u16, usize)], height: f64) -> Bands {
        let room = (LANDSCAPE_CHARS * 100 / READABLE_SCALE).saturating_sub(label_chars);
        let fewest = Self::greedy(pieces, room).len();
        let widest_piece = pieces.iter().map(|p| p.1).max().unwrap_or(0);
        // The narrowest width that still packs into that many bands.
        let mut width = widest_piece.max(1);
        while Self::greedy(pieces, width).len() > fewest {
            width += 1;
        }
        let bands = Self::greedy(pieces, width);
        let widest = label_chars + bands.iter().map(|b| b.1).max().unwrap_or(0);
        let across = LANDSCAPE_CHARS * 100 / widest.max(1);
        let down = (LANDSCAPE_POINTS * 100.0 / height.max(1.0)) as usize;
        // A sheet too tall to fit one page readably runs on, page by page.
        let scale = match down >= READABLE_SCALE {
            true => across.min(down),
            false => across,
        };
        Bands {
            starts: bands.iter().skip(1).map(|b| b.0).collect(),
            scale: scale.clamp(10, 100) as u16,
        }
    }

    /// Bands `(first column, width)` of `pieces` filled in order up to
    /// `room` characters each.
    fn greedy(pieces: &[(u16, usize)], room: usize) -> Vec<(u16, usize)> {
        let mut bands: Vec<(u16, usize)> = Vec::new();
        for &(first, width) in pieces {
            match bands.last_mut() {
                Some(band) if band.1 + width <= room => band.1 += width,
                _ => bands.push((first, width)),
            }
        }
        bands
    }

    /// Sets the sheet to print in these bands (after [`paper`], whose fit
    /// to one page wide it replaces).
    pub fn apply(&self, sheet: &mut Worksheet) -> Result<(), XlsxError> {
        sheet.set_print_scale(self.scale);
        sheet.set_vertical_page_breaks(
            &self
                .starts
                .iter()
                .map(|&c| u32::from(c))
                .collect::<Vec<_>>(),
        )?;
        Ok(())
    }
}

/// The paper size code for A4.
const PAPER_A4: u8 = 9;

/// Repeats a table's header row and its label columns on every printed page.
pub fn print_titles(
    sheet: &mut Worksheet,
    header_row: u32,
    label_columns: u16,
) -> Result<(), XlsxError> {
    sheet.set_repeat_rows(header_row, header_row)?;
    if label_columns > 0 {
        sheet.set_repeat_columns(0, label_columns - 1)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::Bands;

    /// Worked by hand: a page at 60% holds 128 * 100 / 60 = 213
    /// characters, 193 beside 20 of labels. Filled in order, the pieces
    /// 100, 50, 50 and 80 need two bands ([100 50] and [50 80]); evened
    /// out, the narrowest width that still packs them in two is 150 (at
    /// 149 they take three), so the widest page is 20 + 150 = 170
    /// characters, printed at 128 * 100 / 170 = 75%.
    #[test]
    fn bands_are_few_and_even_and_set_the_scale() {
        let pieces = [(3, 100), (4, 50), (5, 50), (6, 80)];
        let bands = Bands::pack(20, &pieces, 100.0);
        assert_eq!(bands.starts, [5]);
        assert_eq!(bands.scale, 75);
        // A sheet 1.6 times a page's height (509 points) prints at
        // 100 / 1.6 = 62.5%, so each band stays one page tall; one twice a
        // page's height would print at 50%, too small: it keeps the width's
        // scale and runs on to a second page.
        assert_eq!(Bands::pack(20, &pieces, 509.0 * 1.6).scale, 62);
        assert_eq!(Bands::pack(20, &pieces, 1018.0).scale, 75);
        // A piece wider than a page gets a band of its own, printed smaller.
        let wide = Bands::pack(20, &[(3, 300), (4, 30)], 100.0);
        assert_eq!(wide.starts, [4]);
        assert_eq!(wide.scale, 128 * 100 / 320);
        // Narrow enough for one page: no break, full size.
        let narrow = Bands::pack(20, &[(3, 40), (4, 40)], 100.0);
        assert!(narrow.starts.is_empty());
        assert_eq!(narrow.scale, 100);
    }
}
