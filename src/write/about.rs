//! The About sheet: where every figure came from and how it was computed.

use rust_xlsxwriter::{Workbook, Worksheet, XlsxError};

use super::sheets::SheetNames;
use super::style;
use crate::eval::{Block, Results};
use crate::load::Table;
use crate::stats::{BOOTSTRAP_MIN_VALUES, DEFAULT_RESAMPLES, DEFAULT_SEED, EXACT_UP_TO};

pub const DISCLAIMER: &str = "sheaf summarises data. Where a figure feeds a decision that can hurt someone (a safety limit, a product \
release), it does not replace the rules and the qualified review that apply there.";

pub const CONVENTIONS: &[&str] = &[
    "Missing cells (blank, text in a numeric column, formula errors) are left out of every aggregate and counted; each is listed below with its cell.",
    "Arithmetic with a missing cell gives a missing cell; a result that is not a finite number (division by zero) is missing.",
    "variance and sd divide by n - 1 unless the recipe says population.",
    "Quartiles, percentiles and IQR: Hyndman and Fan (1996) type 7 unless the recipe names another type or Tukey's hinges.",
    "skewness = g1 = m3 / m2^1.5; adjusted gives G1 (Joanes and Gill 1998). kurtosis = b2 = m4 / m2^2; excess = b2 - 3; adjusted gives G2.",
    "mad is the median absolute deviation; scaled multiplies it by 1.4826.",
    "trimmed and winsorized means cut floor(a n) values at each end.",
    "Tukey's fences: Q1 - k IQR and Q3 + k IQR, k = 1.5 unless given; outliers lie strictly beyond them.",
    "Modified z-score: 0.6745 (x - median) / MAD, flagged when above 3.5 in absolute value (Iglewicz and Hoaglin 1993).",
    "Groups appear in the order of their first row in the data; a blank key forms the group (blank).",
    "A text longer than the 32,767 characters a cell holds (a group key, a name, a title) is cut and ends in \"... (cut: a cell holds 32,767 characters)\".",
    "A let column is computed over the rows kept at its line; its aggregates reduce over those rows, not per group.",
];

/// Most missing cells listed one by one (a sheet holds 1,048,576 rows, and
/// a list longer than this is read by its count, which About gives).
pub const MISSING_LISTED: usize = 100_000;

/// The About sheet: what was run on what (the provenance facts), the cells
/// counted as missing, and the recipe's text. Returns its name and how many
/// pages tall it prints portrait (see [`style::portrait_pages_tall`]).
pub fn about(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    results: &Results,
    table: &Table,
    run: &super::RunInfo,
) -> Result<(String, u16), XlsxError> {
    let name = names.claim("About");
    let sheet = workbook.add_worksheet().set_name(&name)?;
    sheet.set_column_width(0, LABEL_WIDTH as f64)?;
    sheet.set_column_width(1, VALUE_WIDTH as f64)?;
    sheet.write_string_with_format(
        0,
        0,
        style::fit(results.title.as_deref().unwrap_or("sheaf result")),
        &style::title(),
    )?;
    sheet.merge_range(1, 0, 1, 3, DISCLAIMER, &style::note_format())?;
    sheet.set_row_height(1, 3.0 * style::LINE_HEIGHT)?;
    let mut r = 3;
    // Lines of text down the sheet besides one per row, for its height.
    let mut extra_lines = 2;
    let bold = style::cell().set_bold();
    for (label, value) in facts(results, table, run) {
        sheet.write_string_with_format(r, 0, label, &bold)?;
        // A long value wraps in its column rather than run off the page
        // (which would shrink the printed sheet to fit it).
        extra_lines += style::text_block(sheet, r, 1, &value, VALUE_WIDTH)? - 1;
        r += 1;
    }
    r = missing_cells(sheet, r + 1, results)?;
    sheet.write_string_with_format(r + 1, 0, "recipe text", &style::title())?;
    for (i, line) in run.recipe_text.lines().enumerate() {
        let row = r + 2 + i as u32;
        match line.chars().count() > VALUE_WIDTH {
            true => extra_lines += style::text_block(sheet, row, 1, line, VALUE_WIDTH)? - 1,
            false => {
                sheet.write_string(row, 1, style::fit(line))?;
            }
        }
    }
    let rows = r + 2 + run.recipe_text.lines().count() as u32;
    let height = style::LINE_HEIGHT * (rows as usize + extra_lines) as f64;
    // The columns of the missing cells' table beyond the value column.
    let wide = LABEL_WIDTH + VALUE_WIDTH + 2 * 9;
    Ok((name, style::portrait_pages_tall(wide, height)))
}

/// Widths of the About sheet's columns of labels and of values, in
/// characters.
const LABEL_WIDTH: usize = 24;
const VALUE_WIDTH: usize = 90;

/// The run's provenance as (label, value) rows, in the order shown.
fn facts(results: &Results, table: &Table, run: &super::RunInfo) -> Vec<(&'static str, String)> {
    let mut facts = vec![
        ("made by", format!("sheaf {}", run.version)),
        ("time of run", run.run_time.clone()),
        ("recipe", run.recipe_path.clone()),
        ("input file", table.source.file_name.clone()),
        ("input size (bytes)", table.source.size.to_string()),
        ("input SHA-256", table.source.sha256.clone()),
        ("sheet", table.sheet.clone()),
        ("header row", table.header_row.to_string()),
    ];
    facts.extend(
        crate::load::reading_notes(table)
            .into_iter()
            .map(|n| (n.topic, n.text)),
    );
    facts.push((
        "period",
        run.period.as_ref().map_or(
            "none: no date in the file name and no `period` in the recipe".to_string(),
            |p| p.explain(),
        ),
    ));
    facts.push((
        "recipe fingerprint",
        format!(
            "{} (SHA-256 of the recipe's canonical text; --compare needs the same)",
            run.fingerprint
        ),
    ));
    if let Some(previous) = &run.previous {
        let period = previous.period.as_deref().unwrap_or("(unknown)");
        facts.push(("compared with", format!("period {period}")));
    }
    facts.push((
        "changes judged by",
        crate::history::rules_in_words(run.drift, run.noise),
    ));
    facts.push(("rows read", results.rows_read.to_string()));
    for (reason, count) in &results.rows_skipped {
        facts.push(("rows skipped", format!("{count}: {reason}")));
    }
    for block in &results.blocks {
        if let Block::Panel {
            name, rows_used, ..
        } = block
        {
            facts.push(("rows in panel", format!("{name}: {rows_used}")));
        }
    }
    facts.push((
        "bootstrap",
        format!(
            "95% percentile intervals, none below {BOOTSTRAP_MIN_VALUES} values; up to {EXACT_UP_TO} values, the median's exact bootstrap distribution and the mean's by saddlepoint approximation; over that, {DEFAULT_RESAMPLES} medians from directly drawn order statistics (seed {DEFAULT_SEED}) and the mean by Cornish-Fisher expansion",
        ),
    ));
    for (i, c) in CONVENTIONS.iter().enumerate() {
        facts.push((if i == 0 { "conventions" } else { "" }, c.to_string()));
    }
    facts
}

/// The list of cells counted as missing, from row `r`; returns the row
/// after it.
fn missing_cells(sheet: &mut Worksheet, mut r: u32, results: &Results) -> Result<u32, XlsxError> {
    sheet.write_string_with_format(r, 0, "cells counted as missing", &style::title())?;
    r += 1;
    let header = ["cell", "column", "why", "content"];
    for (c, h) in header.iter().enumerate() {
        sheet.write_string_with_format(r, c as u16, *h, &style::header())?;
    }
    r += 1;
    if results.missing_cells.is_empty() {
        sheet.write_string(r, 0, "none")?;
        r += 1;
    }
    for m in results.missing_cells.iter().take(MISSING_LISTED) {
        sheet.write_string(r, 0, &m.address)?;
        sheet.write_string(r, 1, style::fit(&m.column))?;
        sheet.write_string(r, 2, m.kind.words())?;
        sheet.write_string(r, 3, style::fit(&m.content))?;
        r += 1;
    }
    if results.missing_cells.len() > MISSING_LISTED {
        sheet.write_string(
            r,
            0,
            format!(
                "... and {} more cells counted as missing (the first {MISSING_LISTED} are listed)",
                results.missing_cells.len() - MISSING_LISTED
            ),
        )?;
        r += 1;
    }
    Ok(r)
}
