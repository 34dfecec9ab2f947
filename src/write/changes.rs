//! The Changes sheet (this period against the previous one) and the Record
//! sheet that lets the next period compare with this one.

use rust_xlsxwriter::{Format, Workbook, XlsxError};

use super::sheets::SheetNames;
use super::{RunInfo, style};
use crate::history::{RECORD_SHEET, Record};

pub fn changes(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    current: &Record,
    run: &RunInfo,
    previous: &Record,
) -> Result<(), XlsxError> {
    let sheet = workbook.add_worksheet().set_name(names.claim("Changes"))?;
    let labels: Vec<String> = [
        "block",
        "group",
        "figure",
        "previous",
        "now",
        "change",
        "relative change",
        "flag",
    ]
    .map(String::from)
    .to_vec();
    sheet.write_string_with_format(0, 0, "Changes", &style::title())?;
    let note = format!(
        "Each figure against period {}. Flagged when the relative change exceeds {}% (the recipe's drift, or sheaf's default of 10%).",
        previous.period.as_deref().unwrap_or("(unknown)"),
        crate::format::shortest(run.drift * 100.0)
    );
    sheet.merge_range(1, 0, 1, 7, &note, &style::note())?;
    style::table_header(sheet, 3, &labels, 3)?;
    let percent = Format::new().set_num_format("0.0%");
    let mut r = 4;
    let previous_period = previous.period.as_deref().unwrap_or_default();
    let now_period = current.period.as_deref().unwrap_or_default();
    for m in crate::history::moves_between(previous_period, previous, now_period, current) {
        sheet.write_string(r, 0, &m.block)?;
        sheet.write_string(r, 1, &m.group)?;
        sheet.write_string(r, 2, &m.name)?;
        sheet.write_number(r, 3, m.before)?;
        sheet.write_number(r, 4, m.after)?;
        sheet.write_number(r, 5, m.after - m.before)?;
        match m.relative() {
            Some(relative) => {
                sheet.write_number_with_format(r, 6, relative, &percent)?;
                if m.moved(run.drift) {
                    sheet.write_string_with_format(r, 7, "moved", &style::status("warn"))?;
                }
            }
            None => {
                sheet.write_string_with_format(r, 6, "previous was 0", &style::reason())?;
            }
        }
        r += 1;
    }
    style::filter(sheet, 3, r - 1, labels.len())
}

pub fn record(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    record: &Record,
) -> Result<(), XlsxError> {
    let sheet = workbook
        .add_worksheet()
        .set_name(names.claim(RECORD_SHEET))?;
    let bold = Format::new().set_bold();
    sheet.write_string_with_format(0, 0, "recipe fingerprint", &bold)?;
    sheet.write_string(0, 1, &record.fingerprint)?;
    sheet.write_string_with_format(1, 0, "period", &bold)?;
    sheet.write_string(1, 1, record.period.as_deref().unwrap_or("(none)"))?;
    for (c, h) in ["block", "group", "figure", "value"].iter().enumerate() {
        sheet.write_string_with_format(2, c as u16, *h, &style::header())?;
        sheet.set_column_width(c as u16, 24)?;
    }
    for (i, e) in record.entries.iter().enumerate() {
        let r = 3 + i as u32;
        sheet.write_string(r, 0, &e.block)?;
        sheet.write_string(r, 1, &e.group)?;
        sheet.write_string(r, 2, &e.name)?;
        sheet.write_number(r, 3, e.value)?;
    }
    Ok(())
}
