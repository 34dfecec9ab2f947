//! Cell formats and the shared way of writing a figure into a cell.

use rust_xlsxwriter::{Color, Format, FormatAlign, Worksheet, XlsxError};

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

pub fn title() -> Format {
    Format::new().set_bold().set_font_size(14)
}

pub fn note_format() -> Format {
    Format::new()
        .set_italic()
        .set_background_color(Color::RGB(NOTE_COLOUR))
        .set_text_wrap()
        .set_align(FormatAlign::Top)
}

pub fn header() -> Format {
    Format::new()
        .set_bold()
        .set_font_color(Color::White)
        .set_background_color(Color::RGB(HEADER_COLOUR))
        .set_text_wrap()
}

pub fn reason() -> Format {
    Format::new()
        .set_italic()
        .set_font_color(Color::RGB(0x7F6A4D))
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
        Format::new().set_num_format(self.code())
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
    Format::new().set_text_wrap().set_align(FormatAlign::Top)
}

/// A date cell: the value stays the serial, shown as a date (with the time
/// when it has one).
pub fn date(serial: f64) -> Format {
    let code = if crate::format::has_time(serial) {
        "yyyy-mm-dd hh:mm:ss"
    } else {
        "yyyy-mm-dd"
    };
    Format::new().set_num_format(code)
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
    let format = Format::new().set_background_color(Color::RGB(colour));
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
            let why = why.to_string();
            let mut format = reason();
            if why.chars().count() > WIDEST {
                format = format.set_text_wrap().set_align(FormatAlign::Top);
            }
            sheet.write_string_with_format(row, col, &why, &format)?;
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
pub const WIDEST: usize = 40;

/// Narrowest a table column is made, in characters.
const NARROWEST: usize = 6;

/// Header labels wrap rather than widen a column of short figures beyond
/// this many characters.
const HEADER_WRAP: usize = 18;

/// Points per line of text in a row (the default font's line height).
const LINE_HEIGHT: f64 = 15.0;

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
        let c = col as usize;
        if self.columns.len() <= c {
            self.columns.resize(c + 1, 0);
        }
        self.columns[c] = self.columns[c].max(chars);
        if chars > WIDEST {
            self.wrapping.push((row, col, chars));
        }
    }

    fn content(&self, col: usize) -> usize {
        self.columns.get(col).copied().unwrap_or(0)
    }

    /// Sets each row holding wrapped text tall enough for its lines
    /// (spreadsheet programs do not all grow such rows when opening a file).
    fn set_row_heights(&self, sheet: &mut Worksheet, widths: &[usize]) -> Result<(), XlsxError> {
        let mut lines: std::collections::BTreeMap<u32, usize> = Default::default();
        for &(row, col, chars) in &self.wrapping {
            let width = widths.get(col as usize).copied().unwrap_or(WIDEST).max(1);
            // Words do not fill a line to its last character.
            let needed = (chars * 6 / 5).div_ceil(width);
            let entry = lines.entry(row).or_insert(1);
            *entry = (*entry).max(needed);
        }
        for (row, n) in lines {
            sheet.set_row_height(row, (LINE_HEIGHT * n as f64).min(409.0))?;
        }
        Ok(())
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
    let mut lines = 1;
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
        lines = lines.max(wrapped_lines(label, width));
        chosen.push(width);
    }
    sheet.set_row_height(header_row, LINE_HEIGHT * lines as f64)?;
    widths.set_row_heights(sheet, &chosen)?;
    Ok(chosen)
}

/// Width of a note block, in characters: a readable line.
const NOTE_WIDTH: usize = 110;

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
    if last == 0 {
        sheet.write_string_with_format(row, 0, note, &note_format())?;
    } else {
        sheet.merge_range(row, 0, row, last as u16, note, &note_format())?;
    }
    // Italic text runs a little wider than the column's character count.
    let lines = wrapped_lines(note, width.max(1) * 9 / 10);
    sheet.set_row_height(row, (LINE_HEIGHT * lines as f64).min(409.0))?;
    Ok(lines)
}

/// Lines `text` takes when wrapped at word boundaries to `width` characters.
pub fn wrapped_lines(text: &str, width: usize) -> usize {
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

/// Widest table, in characters, that prints portrait: A4 portrait less its
/// margins is about 7 inches, some 90 characters of the default font.
pub const PORTRAIT_CHARS: usize = 90;

/// Pages wide a robustness sheet prints on.
pub const WIDE_TABLE_PAGES: u16 = 2;

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
