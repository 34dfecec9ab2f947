//! The Changes sheet (this period against the previous one) and the Record
//! sheet that lets the next period compare with this one.

use rust_xlsxwriter::{Format, Workbook, XlsxError};

use super::sheets::SheetNames;
use super::{RunInfo, style};
use crate::history::{RECORD_BAND_WIDTH, RECORD_SHEET, Record};

/// The figures flagged "moved" on the Changes sheet: its name, and each
/// flagged figure's 0-based row with the figure in words.
pub type Moved = (String, Vec<(u32, String)>);

/// Writes the Changes sheet. Returns the figures it flags as moved, for
/// the first sheet.
pub fn changes(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    current: &Record,
    run: &RunInfo,
    previous: &Record,
) -> Result<Moved, XlsxError> {
    let sheet_name = names.claim("Changes");
    let sheet = workbook.add_worksheet().set_name(&sheet_name)?;
    let mut moved = Vec::new();
    let labels: Vec<String> = [
        "block",
        "group",
        "figure",
        "previous",
        "now",
        "change",
        "relative change",
        "flag",
        "SE of change",
        "change / SE",
    ]
    .map(String::from)
    .to_vec();
    sheet.write_string_with_format(0, 0, "Changes", &style::title())?;
    let note = format!(
        "Each figure against period {}. Flagged when the relative change exceeds {}% (the recipe's drift, or sheaf's default of 10%) and, for a figure with a standard error (a panel column's mean: Welch's, from each period's sd and n), also {} standard errors of the change. Shape figures, minimums, maximums and outlier counts are never flagged; their change is listed.",
        previous.period.as_deref().unwrap_or("(unknown)"),
        crate::format::shortest(run.drift * 100.0),
        crate::history::NOISE_SES
    );
    sheet.merge_range(1, 0, 1, 9, &note, &style::note_format())?;
    let groups = crate::history::group_changes(previous, current).map_or_else(
        || "No group appeared or disappeared.".to_string(),
        |g| {
            let mut g = g;
            g[..1].make_ascii_uppercase();
            format!("{g}.")
        },
    );
    sheet.merge_range(2, 0, 2, 9, &groups, &style::note_format())?;
    style::table_header(sheet, 3, &labels, 3)?;
    let percent = Format::new().set_num_format("0.0%");
    let mut r = 4;
    let previous_period = previous.period.as_deref().unwrap_or_default();
    let now_period = current.period.as_deref().unwrap_or_default();
    let mut widths = style::Widths::default();
    for m in crate::history::moves_between(previous_period, previous, now_period, current) {
        for (c, text) in [(0, &m.block), (1, &m.group), (2, &m.name)] {
            widths.seen(r, c, style::write_text(sheet, r, c, text)?);
        }
        for (c, x) in [(3, m.before), (4, m.after), (5, m.after - m.before)] {
            let value = crate::eval::One::Number(x);
            let shown = style::Shown::unknown_kind(&value);
            widths.seen(r, c, style::write_one(sheet, r, c, &value, shown)?);
        }
        match m.relative() {
            Some(relative) => {
                sheet.write_number_with_format(r, 6, relative, &percent)?;
                if m.moved(run.drift) {
                    sheet.write_string_with_format(r, 7, "moved", &style::status("warn"))?;
                    let shown =
                        |x: f64| style::Shown::unknown_kind(&crate::eval::One::Number(x)).text(x);
                    let words = format!(
                        "{} / {} / {}: {} to {} ({:+.1}%)",
                        m.block,
                        m.group,
                        m.name,
                        shown(m.before),
                        shown(m.after),
                        relative * 100.0
                    );
                    moved.push((r, words));
                }
            }
            None => {
                sheet.write_string_with_format(r, 6, "previous was 0", &style::reason())?;
            }
        }
        crate::history::write_noise(sheet, r, 8, &m)?;
        r += 1;
    }
    widths.seen(3, 6, "previous was 0".len());
    style::print_titles(sheet, 3, 3)?;
    style::fit_columns(sheet, 3, &labels, &widths)?;
    style::filter(sheet, 3, r - 1, labels.len())?;
    Ok((sheet_name, moved))
}

pub fn record(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    record: &Record,
) -> Result<(), XlsxError> {
    let sheet = workbook
        .add_worksheet()
        .set_name(names.claim_reserved(RECORD_SHEET))?;
    // For `--compare`, not for reading: hidden, still read by name.
    sheet.set_hidden(true);
    let bold = Format::new().set_bold();
    sheet.write_string_with_format(0, 0, "recipe fingerprint", &bold)?;
    sheet.write_string(0, 1, &record.fingerprint)?;
    sheet.write_string_with_format(1, 0, "period", &bold)?;
    sheet.write_string(
        1,
        1,
        style::fit(record.period.as_deref().unwrap_or("(none)")),
    )?;
    record_entries(sheet, &record.entries, RECORD_BAND_ROWS)
}

/// Rows of entries in one band of the Record sheet: a sheet's 1,048,576 rows
/// less the three above the entries.
pub const RECORD_BAND_ROWS: u32 = crate::load::MAX_SHEET_ROWS - 3;

/// The entries in bands of four columns (block, group, figure, value) side
/// by side, a blank column between them, `band_rows` entries each: so the
/// Record holds every figure the evaluator allows (100,000 groups of a
/// panel of many columns overflow one sheet's rows).
fn record_entries(
    sheet: &mut rust_xlsxwriter::Worksheet,
    entries: &[crate::history::Entry],
    band_rows: u32,
) -> Result<(), XlsxError> {
    let bands = entries.len().div_ceil(band_rows as usize).max(1);
    if bands * RECORD_BAND_WIDTH as usize > crate::load::MAX_SHEET_COLUMNS as usize {
        return Err(XlsxError::ParameterError(format!(
            "{} figures are more than the Record sheet holds",
            entries.len()
        )));
    }
    for band in 0..bands as u16 {
        let left = band * RECORD_BAND_WIDTH;
        for (c, h) in ["block", "group", "figure", "value"].iter().enumerate() {
            sheet.write_string_with_format(2, left + c as u16, *h, &style::header())?;
            sheet.set_column_width(left + c as u16, 24)?;
        }
    }
    for (i, e) in entries.iter().enumerate() {
        let (band, r) = (i / band_rows as usize, 3 + (i % band_rows as usize) as u32);
        let left = band as u16 * RECORD_BAND_WIDTH;
        sheet.write_string(r, left, style::fit(&e.block))?;
        sheet.write_string(r, left + 1, style::fit(&e.group))?;
        sheet.write_string(r, left + 2, style::fit(&e.name))?;
        sheet.write_number(r, left + 3, e.value)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::history::{Entry, Record};

    /// Entries spread over bands read back whole and in order (bands of 4
    /// rows here; a real band is 1,048,573 rows).
    #[test]
    fn record_bands_read_back_in_order() {
        let entries: Vec<Entry> = (0..10)
            .map(|i| Entry {
                block: "Record".into(),
                group: format!("g{i}"),
                name: "m".into(),
                value: i as f64 / 4.0,
            })
            .collect();
        let mut workbook = Workbook::new();
        let sheet = workbook.add_worksheet().set_name(RECORD_SHEET).unwrap();
        sheet.write_string(0, 1, "abc").unwrap();
        sheet.write_string(1, 1, "(none)").unwrap();
        record_entries(sheet, &entries, 4).unwrap();
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("r.xlsx");
        workbook.save(&path).unwrap();
        let read = Record::read_accepting(&path, &["abc".to_string()]).unwrap();
        assert_eq!(read.entries, entries);
    }
}
