//! The first sheet, "At a glance": what a reader needs before the tables:
//! the title, the period and input, how many checks passed, warned and
//! failed and which did not pass, and the robustness warnings, each with a
//! link to its sheet and cell.

use rust_xlsxwriter::{Color, FormatUnderline, Url, Worksheet, XlsxError};

use super::style;
use crate::eval::{Block, Outcome, Results, Status, group_label};

/// The glance sheet's name.
pub const GLANCE_SHEET: &str = "At a glance";

/// Where the other sheets put their rows, for the links.
pub struct Places {
    /// The Checks sheet's name and the 0-based row of its first check.
    pub checks: (String, u32),
    /// Each panel's robustness sheet name and 0-based row of its first entry,
    /// in the order of the panel blocks.
    pub robustness: Vec<(String, u32)>,
    /// With a previous period: the Changes sheet and the figures it flags.
    pub moved: Option<super::changes::Moved>,
}

/// Writes the glance sheet (already added as the first sheet).
pub fn glance(
    sheet: &mut Worksheet,
    results: &Results,
    input: &str,
    period: Option<&str>,
    places: &Places,
    reading: &[crate::load::ReadingNote],
) -> Result<(), XlsxError> {
    sheet.set_column_width(0, 16)?;
    sheet.set_column_width(1, 50)?;
    sheet.set_column_width(2, EXPLANATION_WIDTH as f64)?;
    let title = results.title.as_deref().unwrap_or("sheaf result");
    sheet.write_string_with_format(0, 0, style::fit(title), &style::title())?;
    let bold = style::cell().set_bold();
    let mut r = 2;
    for (label, value) in [
        ("period", period.unwrap_or("(none given)")),
        ("input", input),
    ] {
        sheet.write_string_with_format(r, 0, label, &bold)?;
        style::write_text(sheet, r, 1, value)?;
        r += 1;
    }
    r = reading_file(sheet, r, reading)?;
    r = warnings(sheet, r, &results.warnings)?;
    r = checks(sheet, r + 1, results, &places.checks)?;
    let r = robustness(sheet, r + 1, results, &places.robustness)?;
    if let Some(moved) = &places.moved {
        figures_moved(sheet, r + 1, moved)?;
    }
    Ok(())
}

/// Each figure the Changes sheet flags as moved, with a link to its row.
fn figures_moved(
    sheet: &mut Worksheet,
    mut r: u32,
    moved: &super::changes::Moved,
) -> Result<u32, XlsxError> {
    let (target, rows) = moved;
    sheet.write_string_with_format(r, 0, "moved", &style::header())?;
    for (row, words) in rows {
        r += 1;
        sheet.write_string_with_format(r, 0, "moved", &style::status("warn"))?;
        link(sheet, (r, 1), target, (*row, 0), words)?;
    }
    if rows.is_empty() {
        sheet.write_string(r, 1, "no figure moved beyond the drift")?;
    }
    Ok(r + 1)
}

/// What the loader decided that changes what was read (rows left out, a
/// header row or sheet it chose, keys spelled apart or merged, a number
/// style it could read two ways); the About sheet lists every decision.
/// Written after a blank row below `r`; returns the last row written (`r`
/// itself when there is nothing to say).
fn reading_file(
    sheet: &mut Worksheet,
    r: u32,
    reading: &[crate::load::ReadingNote],
) -> Result<u32, XlsxError> {
    let notable: Vec<&crate::load::ReadingNote> = reading.iter().filter(|n| n.attention).collect();
    if notable.is_empty() {
        return Ok(r);
    }
    let mut r = r + 1;
    sheet.write_string_with_format(r, 0, "reading the file", &style::header())?;
    for note in notable {
        r += 1;
        sheet.write_string_with_format(r, 0, "note", &style::status("note"))?;
        sheet.write_string_with_format(r, 1, note.topic, &style::cell())?;
        explanation(sheet, r, &note.text)?;
    }
    Ok(r + 1)
}

/// Most warnings the first sheet lists; the Checks sheet has them all.
const GLANCE_WARNINGS: usize = 20;

/// The run's warnings, which the Checks sheet also lists: a comparison
/// with a result of the same or a later period, groups that appeared or
/// disappeared since it, likely mistakes in the recipe. Written after a
/// blank row below `r`; returns the last row written (`r` itself when
/// there is none).
fn warnings(sheet: &mut Worksheet, r: u32, warnings: &[String]) -> Result<u32, XlsxError> {
    if warnings.is_empty() {
        return Ok(r);
    }
    let mut r = r + 1;
    sheet.write_string_with_format(r, 0, "warnings", &style::header())?;
    for warning in warnings.iter().take(GLANCE_WARNINGS) {
        r += 1;
        sheet.write_string_with_format(r, 0, "warn", &style::status("warn"))?;
        let text = warning.strip_prefix("warning: ").unwrap_or(warning);
        explanation(sheet, r, text)?;
    }
    if warnings.len() > GLANCE_WARNINGS {
        r += 1;
        let more = warnings.len() - GLANCE_WARNINGS;
        explanation(
            sheet,
            r,
            &format!("... and {more} more on the Checks sheet"),
        )?;
    }
    Ok(r + 1)
}

/// Links: a deep teal of sheaf's own, readable on white.
const LINK_COLOUR: u32 = 0x1F5F7A;

/// Width of the column of reasons and notes, in characters.
const EXPLANATION_WIDTH: usize = 70;

/// Writes a reason or note in the third column, wrapped, its row tall
/// enough for it.
fn explanation(sheet: &mut Worksheet, row: u32, text: &str) -> Result<(), XlsxError> {
    style::text_block(sheet, row, 2, text, EXPLANATION_WIDTH)?;
    Ok(())
}

/// Writes a link to the cell at (`row`, `col`) of sheet `target`.
fn link(
    sheet: &mut Worksheet,
    at: (u32, u16),
    target: &str,
    cell: (u32, u16),
    text: &str,
) -> Result<(), XlsxError> {
    let address = rust_xlsxwriter::utility::row_col_to_cell(cell.0, cell.1);
    let url = Url::new(format!(
        "internal:'{}'!{address}",
        target.replace('\'', "''")
    ))
    .set_text(style::fit(text));
    let format = style::cell()
        .set_underline(FormatUnderline::Single)
        .set_font_color(Color::RGB(LINK_COLOUR));
    sheet.write_url_with_format(at.0, at.1, url, &format)?;
    Ok(())
}

/// The count of checks by outcome, then each check that did not pass with
/// a link to its row. Returns the next free row.
fn checks(
    sheet: &mut Worksheet,
    mut r: u32,
    results: &Results,
    (checks_sheet, first_row): &(String, u32),
) -> Result<u32, XlsxError> {
    let count = |o: Outcome| results.checks.iter().filter(|c| c.outcome == o).count();
    let (pass, warn, fail) = (
        count(Outcome::Pass),
        count(Outcome::Warn),
        count(Outcome::Fail),
    );
    sheet.write_string_with_format(r, 0, "checks", &style::header())?;
    let summary = format!("{pass} passed, {warn} warned, {fail} failed");
    let word = if fail > 0 {
        "fail"
    } else if warn > 0 {
        "warn"
    } else {
        "pass"
    };
    sheet.write_string_with_format(r, 1, &summary, &style::status(word))?;
    r += 1;
    for (i, c) in results.checks.iter().enumerate() {
        if c.outcome == Outcome::Pass {
            continue;
        }
        let group = group_label(c.group.as_deref().unwrap_or_default());
        let word = c.outcome.word();
        sheet.write_string_with_format(r, 0, word, &style::status(word))?;
        let text = format!("{}, {group}", c.name);
        link(
            sheet,
            (r, 1),
            checks_sheet,
            (first_row + i as u32, 0),
            &text,
        )?;
        if let Some(note) = c.note_words() {
            explanation(sheet, r, &note)?;
        }
        r += 1;
    }
    Ok(r)
}

/// Each robustness warning with a link to its row.
fn robustness(
    sheet: &mut Worksheet,
    mut r: u32,
    results: &Results,
    places: &[(String, u32)],
) -> Result<u32, XlsxError> {
    sheet.write_string_with_format(r, 0, "robustness", &style::header())?;
    let panels = results.blocks.iter().filter_map(|b| match b {
        Block::Panel { entries, .. } => Some(entries),
        Block::Figures { .. } => None,
    });
    let mut warnings = 0;
    for ((target, first_row), entries) in places.iter().zip(panels) {
        for (i, e) in entries.iter().enumerate() {
            if e.robustness.status != Status::Warn {
                continue;
            }
            warnings += 1;
            r += 1;
            sheet.write_string_with_format(r, 0, "warn", &style::status("warn"))?;
            let text = format!("{}, {}", e.column, group_label(&e.group));
            link(sheet, (r, 1), target, (first_row + i as u32, 0), &text)?;
            explanation(sheet, r, &e.robustness.reason)?;
        }
    }
    if warnings == 0 {
        sheet.write_string(r, 1, "no warnings")?;
    }
    Ok(r + 1)
}
