//! Cell formats and the shared way of writing a figure into a cell.

use rust_xlsxwriter::{Color, Format, FormatAlign, Worksheet, XlsxError};

use crate::eval::One;

/// sheaf's colours: slate headers, a pale sand band for notes.
pub const HEADER_COLOUR: u32 = 0x34495E;
pub const NOTE_COLOUR: u32 = 0xF4ECD8;

pub fn title() -> Format {
    Format::new().set_bold().set_font_size(14)
}

pub fn note() -> Format {
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

pub fn count() -> Format {
    Format::new().set_num_format("0")
}

pub fn number() -> Format {
    Format::new().set_num_format("General")
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

pub fn status(word: &str) -> Format {
    let colour = match word {
        "ok" | "pass" => 0xDCEFD9,
        "note" => 0xFFF3C4,
        _ => 0xF6D0C8,
    };
    Format::new().set_background_color(Color::RGB(colour))
}

/// Writes one figure: a number as a number, text always as text (never a
/// formula), a reason in words where there is no value.
pub fn write_one(
    sheet: &mut Worksheet,
    row: u32,
    col: u16,
    value: &One,
    whole: bool,
) -> Result<(), XlsxError> {
    match value {
        One::Number(x) => sheet
            .write_number_with_format(row, col, *x, &if whole { count() } else { number() })
            .map(|_| ()),
        One::Date(x) => sheet
            .write_number_with_format(row, col, *x, &date(*x))
            .map(|_| ()),
        One::Truth(b) => sheet.write_boolean(row, col, *b).map(|_| ()),
        One::Text(t) => sheet.write_string(row, col, fit(t)).map(|_| ()),
        One::List(v) if v.len() == 1 => sheet
            .write_number_with_format(row, col, v[0], &number())
            .map(|_| ()),
        One::List(v) => {
            let text = v
                .iter()
                .map(|x| crate::format::shortest(*x))
                .collect::<Vec<_>>()
                .join("; ");
            sheet.write_string(row, col, text).map(|_| ())
        }
        One::Undefined(why) => sheet
            .write_string_with_format(row, col, why, &reason())
            .map(|_| ()),
    }
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

/// A table header row with filter buttons, frozen above the data.
pub fn table_header(
    sheet: &mut Worksheet,
    row: u32,
    labels: &[String],
    frozen_columns: u16,
) -> Result<(), XlsxError> {
    for (c, label) in labels.iter().enumerate() {
        sheet.write_string_with_format(row, c as u16, label, &header())?;
        let width = (label.chars().count() as f64 + 2.0).clamp(9.0, 28.0);
        sheet.set_column_width(c as u16, width)?;
    }
    sheet.set_freeze_panes(row + 1, frozen_columns)?;
    Ok(())
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
