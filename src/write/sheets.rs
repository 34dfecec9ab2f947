//! Panel, robustness, figures and checks sheets.

use std::collections::HashSet;

use rust_xlsxwriter::{Workbook, Worksheet, XlsxError};

use super::robustness_cells::{robustness_cells, robustness_labels, robustness_topics};
use super::style::{self, Shown, Widths, write_one};
use crate::eval::{
    Block, FigureKind, GAP_NOTE_IQR, GAP_WARN_IQR, One, PANEL_FIGURES, PANEL_LABELS, PanelEntry,
    Reason, Results, Topic, group_label,
};
use crate::stats::{
    BOOTSTRAP_MIN_VALUES, DEFAULT_RESAMPLES, DEFAULT_SEED, EXACT_UP_TO, SHAPE_NOTE_CUTOFF,
};

/// Sheet names in use, so every new one is unique and at most 31 characters.
#[derive(Default)]
pub struct SheetNames(HashSet<String>);

/// Sheet names a block may not take: the Record sheet, which `--compare`
/// finds by its name, and "History", which spreadsheet programs keep for
/// themselves.
const RESERVED: &[&str] = &[crate::history::RECORD_SHEET, "History"];

/// Most UTF-16 units in a sheet name.
const NAME_LIMIT: usize = 31;

impl SheetNames {
    /// A free sheet name close to `wanted`: characters a sheet name cannot
    /// hold dropped, apostrophes at either end removed, cut to 31 UTF-16
    /// units, and numbered when taken (or reserved).
    pub fn claim(&mut self, wanted: &str) -> String {
        let cleaned: String = wanted
            .chars()
            .filter(|c| !"[]:*?/\\".contains(*c) && !c.is_control())
            .collect();
        let trimmed = cleaned.trim_matches(|c: char| c == '\'' || c.is_whitespace());
        let base = if trimmed.is_empty() { "Sheet" } else { trimmed };
        let mut name = cut_to_units(base, NAME_LIMIT);
        let mut n = 2;
        while self.is_reserved(&name) || !self.0.insert(name.to_lowercase()) {
            let suffix = format!(" {n}");
            name = cut_to_units(base, NAME_LIMIT - suffix.len()) + &suffix;
            n += 1;
        }
        name
    }

    /// One of the reserved names, for the sheet it is kept for.
    pub fn claim_reserved(&mut self, name: &str) -> String {
        self.0.insert(name.to_lowercase());
        name.to_string()
    }

    fn is_reserved(&self, name: &str) -> bool {
        RESERVED.iter().any(|r| r.eq_ignore_ascii_case(name))
    }
}

/// The longest start of `text` within `units` UTF-16 units, without an
/// apostrophe or space at its end (a sheet name may not end in one).
fn cut_to_units(text: &str, units: usize) -> String {
    let mut used = 0;
    let cut: String = text
        .chars()
        .take_while(|c| {
            used += c.len_utf16();
            used <= units
        })
        .collect();
    cut.trim_end_matches(|c: char| c == '\'' || c.is_whitespace())
        .to_string()
}

pub const PANEL_NOTE: &str = "Conventions: n counts numeric cells; missing counts blank, text and error cells. sd is the sample sd (n - 1). \
Quartiles, median and IQR by Hyndman-Fan type 7 (linear interpolation). Skewness g1 = m3 / m2^1.5 and kurtosis b2 = m4 / m2^2 \
(about 3 for normal data) are the moment forms; two values lie symmetrically about their mean, so their skewness is exactly 0. Bowley skewness = (Q3 + Q1 - 2 Q2) / (Q3 - Q1). Outliers lie strictly beyond \
Tukey's fences Q1 - 1.5 IQR and Q3 + 1.5 IQR. Modes: every most frequent value for whole-number data; otherwise the mean of the \
values in the fullest of Sturges' equal bins. A cell without a number says why; 'no rows' where none of a group's rows pass the \
block's `where`.";

fn robustness_note() -> String {
    format!(
        "Each row asks whether a few values drive the figures. Gap = (mean - median) / sd and / IQR, computed from deviations \
about a middle value so data far from zero keep their digits. Outliers lie strictly beyond Tukey's 1.5 and 3 IQR fences (type 7 \
quartiles), each listed with its source cell and the number it holds, then the value used where a `let` derived it. 'Without' recomputes mean, sd and skewness leaving out the 1.5 IQR outliers; \
'change' is without minus with. Leave-one-out: of all values, the one whose removal changes the mean (or the sd) most in size; \
the change is signed (after minus before), and of equal changes the first row's is shown. |modified z| = |0.6745 (x - median) \
/ MAD| above 3.5 (Iglewicz and Hoaglin 1993), in either direction. Skewness G1 and excess kurtosis G2 (adjusted, Joanes and Gill \
1998) are set against their standard errors for normal samples of the same size, SES = sqrt(6n(n-1)/((n-2)(n+1)(n+3))) and \
SEK = 2 SES sqrt((n^2-1)/((n-3)(n+5))); 'skewed' when |G1 / SES| is above {cutoff}, 'heavy tails' when G2 / SEK is above \
{cutoff}. Bootstrap: 95% percentile intervals of the mean and the median; none below {BOOTSTRAP_MIN_VALUES} values, where \
resamples repeat a few values and the interval is too narrow to be 95%. Up to {EXACT_UP_TO} values no resamples are drawn: the \
median's interval is read from its exact bootstrap distribution (binomial probabilities of order statistics, Efron 1979) and the \
mean's from the saddlepoint approximation of its bootstrap distribution (Davison and Hinkley 1988). Over that, \
{DEFAULT_RESAMPLES} resampled medians are drawn from their middle order statistics directly (seed {DEFAULT_SEED}, so reruns \
agree) and the mean's interval is the Cornish-Fisher expansion of its bootstrap distribution (Hall 1992); the 'bootstrap \
method' column says which. Status: warn for values beyond the 3 IQR fences or a mean-median gap above {GAP_WARN_IQR} IQR; note \
for a gap above {GAP_NOTE_IQR} IQR, skewed, heavy tails, or fewer than 3 values. 1.5 IQR outliers and |modified z| above 3.5 are \
listed but raise no status: normal data show them often. Thresholds are common practice, not from a published source.",
        cutoff = SHAPE_NOTE_CUTOFF,
    )
}

/// Row of a table sheet's header: under the title (row 0) and its note
/// (row 1), after a blank row.
const TABLE_TOP: u32 = 3;

/// Writes a sheet's title; its note follows once the columns are sized.
fn heading(sheet: &mut Worksheet, title: &str) -> Result<u32, XlsxError> {
    sheet.write_string_with_format(0, 0, style::fit(title), &style::title())?;
    Ok(TABLE_TOP)
}

/// Finishes a table written under [`heading`]: columns sized to their
/// content, the note as a block above it, filter buttons over it. Returns
/// each column's printed width in characters.
fn finish_table(
    sheet: &mut Worksheet,
    labels: &[String],
    label_columns: u16,
    widths: &Widths,
    note: &str,
    last_row: u32,
) -> Result<Vec<usize>, XlsxError> {
    style::print_titles(sheet, TABLE_TOP, label_columns)?;
    let chosen = style::fit_columns(sheet, TABLE_TOP, labels, widths)?;
    style::note_block(sheet, 1, note, &chosen)?;
    style::filter(sheet, TABLE_TOP, last_row, labels.len())?;
    // Each column is set 1.5 characters wider than its content.
    Ok(chosen.iter().map(|w| w + 2).collect())
}

/// The sheets written by [`blocks`] that links and page setup need.
pub struct BlockSheets {
    /// Each panel's robustness sheet name and the 0-based row of its first
    /// entry, for links to it.
    pub robustness: Vec<(String, u32)>,
    /// Sheets narrow enough to print portrait.
    pub narrow: Vec<String>,
    /// Sheets too wide for one page, and the bands they print in.
    pub banded: Vec<(String, style::Bands)>,
}

/// Writes every block's sheets.
pub fn blocks(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    results: &Results,
) -> Result<BlockSheets, XlsxError> {
    let mut robustness = Vec::new();
    let mut narrow = Vec::new();
    let mut banded = Vec::new();
    for block in &results.blocks {
        match block {
            Block::Panel {
                name,
                keys,
                entries,
                ..
            } => {
                panel_sheet(
                    workbook.add_worksheet().set_name(names.claim(name))?,
                    name,
                    keys,
                    entries,
                    &results.labels,
                )?;
                let sheet_name = names.claim(&format!("{name} robustness"));
                let bands = robustness_sheet(
                    workbook.add_worksheet().set_name(&sheet_name)?,
                    name,
                    keys,
                    entries,
                    &results.labels,
                )?;
                banded.push((sheet_name.clone(), bands));
                robustness.push((sheet_name, TABLE_TOP + 1));
            }
            Block::Figures {
                name,
                keys,
                names: figure_names,
                rows,
            } => {
                let sheet_name = names.claim(name);
                let sheet = workbook.add_worksheet().set_name(&sheet_name)?;
                let mut labels: Vec<String> = keys.clone();
                labels.push("rows".into());
                labels.extend(figure_names.iter().cloned());
                let note = "Each figure is computed over the rows of its group that pass the recipe's filters. A cell without a number says why; \
a group none of whose rows pass the block's `where` is listed with 0 rows and 'no rows'.";
                let top = heading(sheet, name)?;
                style::table_header(sheet, top, &labels, keys.len() as u16)?;
                let mut widths = Widths::default();
                for (i, row) in rows.iter().enumerate() {
                    let r = top + 1 + i as u32;
                    write_group(sheet, r, &row.group, &mut widths)?;
                    let c = keys.len() as u16;
                    let n = One::Number(row.rows as f64);
                    widths.seen(r, c, write_one(sheet, r, c, &n, Shown::Count)?);
                    for (j, (figure, value)) in figure_names.iter().zip(&row.values).enumerate() {
                        let value = &no_rows_said(row.rows, value);
                        let c = c + 1 + j as u16;
                        let share = results.shares.contains(&(name.clone(), figure.clone()));
                        let shown = match share {
                            true => Shown::Percent,
                            false => Shown::unknown_kind(value),
                        };
                        widths.seen(r, c, write_one(sheet, r, c, value, shown)?);
                    }
                }
                let widths = finish_table(
                    sheet,
                    &labels,
                    keys.len() as u16,
                    &widths,
                    note,
                    top + rows.len() as u32,
                )?;
                if widths.iter().sum::<usize>() <= style::PORTRAIT_CHARS {
                    narrow.push(sheet_name);
                }
            }
        }
    }
    Ok(BlockSheets {
        robustness,
        narrow,
        banded,
    })
}

/// `value`, or [`Reason::NoRows`] in place of its reason when its group
/// has no rows: that says more than "no values" (the notes say why).
fn no_rows_said(rows: usize, value: &One) -> One {
    match value {
        One::Undefined(_) if rows == 0 => One::Undefined(Reason::NoRows),
        other => other.clone(),
    }
}

fn write_group(
    sheet: &mut Worksheet,
    row: u32,
    group: &[String],
    widths: &mut Widths,
) -> Result<(), XlsxError> {
    for (c, key) in group.iter().enumerate() {
        widths.seen(row, c as u16, style::write_text(sheet, row, c as u16, key)?);
    }
    Ok(())
}

/// Header labels of a per-(group, column) table: the group keys, then
/// `column`, then the figures.
fn entry_labels(keys: &[String], figures: &[&str]) -> Vec<String> {
    let mut labels = keys.to_vec();
    labels.push("column".into());
    labels.extend(figures.iter().map(|s| s.to_string()));
    labels
}

/// Decimals of an entry's data, read off its min and max (which are data
/// values), so its measures show those decimals plus two.
fn entry_decimals(e: &PanelEntry) -> u8 {
    let data: Vec<f64> = ["min", "max"]
        .iter()
        .filter_map(|key| match crate::eval::figure_value(&e.figures, key) {
            Some(One::Number(x)) => Some(*x),
            _ => None,
        })
        .collect();
    style::data_decimals(&data)
}

/// Labels the recipe gives columns (`label` lines), by column name.
type Labels = std::collections::BTreeMap<String, String>;

/// The rows of an entry's group: every row's cell is a number (n) or
/// missing.
fn entry_rows(e: &PanelEntry) -> usize {
    PANEL_FIGURES
        .iter()
        .zip(&e.figures)
        .filter(|(f, _)| f.label == "n" || f.label == "missing")
        .map(|(_, v)| match v {
            One::Number(x) => *x as usize,
            _ => 0,
        })
        .sum()
}

/// Writes the group keys and the column of an entry's row: its label with
/// its name in brackets when the recipe labels it, else its name.
fn write_entry_labels(
    sheet: &mut Worksheet,
    row: u32,
    e: &PanelEntry,
    labels: &Labels,
    widths: &mut Widths,
) -> Result<u16, XlsxError> {
    write_group(sheet, row, &e.group, widths)?;
    let c = e.group.len() as u16;
    let column = match labels.get(&e.column) {
        Some(label) => format!("{label} ({})", e.column),
        None => e.column.clone(),
    };
    widths.seen(row, c, style::write_text(sheet, row, c, &column)?);
    Ok(c + 1)
}

fn panel_sheet(
    sheet: &mut Worksheet,
    name: &str,
    keys: &[String],
    entries: &[PanelEntry],
    column_labels: &Labels,
) -> Result<(), XlsxError> {
    let labels = entry_labels(keys, PANEL_LABELS);
    let has_dates = entries
        .iter()
        .any(|e| e.figures.iter().any(|f| matches!(f, One::Date(_))));
    let note = match has_dates {
        true => format!("{PANEL_NOTE} {}", crate::eval::dates_note()),
        false => PANEL_NOTE.to_string(),
    };
    let top = heading(sheet, name)?;
    style::table_header(sheet, top, &labels, keys.len() as u16 + 1)?;
    let mut widths = Widths::default();
    for (i, e) in entries.iter().enumerate() {
        let r = top + 1 + i as u32;
        let first = write_entry_labels(sheet, r, e, column_labels, &mut widths)?;
        let decimals = entry_decimals(e);
        for (j, (figure, value)) in PANEL_FIGURES.iter().zip(&e.figures).enumerate() {
            let c = first + j as u16;
            let shown = Shown::of(figure.kind, decimals);
            let value = &no_rows_said(entry_rows(e), value);
            let chars = write_one(sheet, r, c, value, shown)?;
            widths.seen_figure(r, c, chars, figure.kind);
        }
    }
    finish_table(
        sheet,
        &labels,
        keys.len() as u16 + 1,
        &widths,
        &note,
        top + entries.len() as u32,
    )?;
    Ok(())
}

fn robustness_sheet(
    sheet: &mut Worksheet,
    name: &str,
    keys: &[String],
    entries: &[PanelEntry],
    column_labels: &Labels,
) -> Result<style::Bands, XlsxError> {
    let mut figures = vec!["status", "reason"];
    figures.extend(robustness_labels());
    let labels = entry_labels(keys, &figures);
    let top = heading(sheet, &format!("{name}: robustness"))?;
    // The group, the column and the status label every printed band.
    let label_columns = keys.len() as u16 + 2;
    style::table_header(sheet, top, &labels, label_columns - 1)?;
    let mut widths = Widths::default();
    for (i, e) in entries.iter().enumerate() {
        let r = top + 1 + i as u32;
        let b = &e.robustness;
        let c = write_entry_labels(sheet, r, e, column_labels, &mut widths)?;
        let word = b.status.word();
        sheet.write_string_with_format(r, c, word, &style::status(word))?;
        widths.seen(r, c, word.len());
        widths.seen(r, c + 1, style::write_text(sheet, r, c + 1, &b.reason)?);
        let decimals = entry_decimals(e);
        let measure = Shown::of(FigureKind::Measure, decimals);
        for (j, cell) in robustness_cells(b, measure).into_iter().enumerate() {
            let col = c + 2 + j as u16;
            let value = no_rows_said(entry_rows(e), &cell.value);
            let shown = Shown::of(cell.kind, decimals);
            let chars = write_one(sheet, r, col, &value, shown)?;
            widths.seen_figure(r, col, chars, cell.kind);
        }
    }
    let last = top + entries.len() as u32;
    style::print_titles(sheet, top, label_columns)?;
    let chosen = style::fit_columns(sheet, top, &labels, &widths)?;
    let printed: Vec<usize> = chosen.iter().map(|w| w + 2).collect();
    // The title, the note (about as tall as it will be) and the table.
    // The note is about as wide as the first band's page allows.
    let note_lines = style::wrapped_lines(&robustness_note(), ROBUSTNESS_NOTE_WIDTH * 9 / 10);
    let height = style::LINE_HEIGHT * (3 + note_lines) as f64
        + widths.height(&chosen, top + 1, last)
        + style::LINE_HEIGHT * style::header_lines(&labels, &chosen) as f64;
    let bands = print_bands(&printed, label_columns, height);
    // The note beside the labels, over the first band only, so the other
    // bands' pages do not show a strip of it.
    let end = bands.starts.first().map_or(labels.len() as u16, |&c| c) - 1;
    let wide = printed[label_columns as usize..=end as usize].iter().sum();
    let over = (label_columns, end);
    style::note_block_over(sheet, 1, &robustness_note(), over, wide)?;
    style::filter(sheet, top, last, labels.len())?;
    Ok(bands)
}

/// Width of the robustness sheet's note, in characters, for its height:
/// about its first band's width, so the long note takes fewer lines.
const ROBUSTNESS_NOTE_WIDTH: usize = 150;

/// The bands a robustness sheet prints in: pieces of columns kept
/// together (a count with the cells it counts, a figure with its cell or
/// note, a topic without such words whole), beside the repeated labels.
fn print_bands(printed: &[usize], label_columns: u16, height: f64) -> style::Bands {
    let labels: usize = printed[..label_columns as usize].iter().sum();
    // The reason (words), then each robustness column.
    let first = label_columns as usize;
    let mut pieces: Vec<(u16, usize)> = vec![(first as u16, printed[first])];
    let mut previous: Option<(Topic, FigureKind)> = None;
    for (j, (topic, kind)) in robustness_topics().enumerate() {
        let at = first + 1 + j;
        let joins = previous.is_some_and(|(t, k)| t == topic && k != FigureKind::Words);
        match pieces.last_mut() {
            Some(piece) if joins => piece.1 += printed[at],
            _ => pieces.push((at as u16, printed[at])),
        }
        previous = Some((topic, kind));
    }
    style::Bands::pack(labels, &pieces, height)
}

/// Writes the Checks sheet. Returns its name and the 0-based row of its
/// first check, for links to it.
pub fn checks(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    results: &Results,
    reading: &[crate::load::ReadingNote],
) -> Result<(String, u32), XlsxError> {
    let sheet_name = names.claim("Checks");
    let sheet = workbook.add_worksheet().set_name(&sheet_name)?;
    let labels: Vec<String> = [
        "check",
        "level",
        "group",
        "condition",
        "value",
        "limit",
        "result",
        "note",
    ]
    .map(String::from)
    .to_vec();
    let note = "Every check of the recipe, overall and for each group when it names groups. value is the left side of the \
condition, limit the right side. A check that cannot be evaluated counts as not passed. Figures that had no value are listed below the checks.";
    let top = heading(sheet, "Checks")?;
    style::table_header(sheet, top, &labels, 1)?;
    let mut widths = Widths::default();
    let mut r = top + 1;
    for c in &results.checks {
        write_check(sheet, r, c, &mut widths)?;
        r += 1;
    }
    finish_table(sheet, &labels, 1, &widths, note, r - 1)?;
    below_checks(sheet, r, results, reading)?;
    Ok((sheet_name, TABLE_TOP + 1))
}

/// One check's row of the Checks sheet.
fn write_check(
    sheet: &mut Worksheet,
    r: u32,
    c: &crate::eval::CheckResult,
    widths: &mut Widths,
) -> Result<(), XlsxError> {
    let level = if c.level == crate::recipe::ast::CheckLevel::Warn {
        "warn"
    } else {
        "fail"
    };
    let group = group_label(c.group.as_deref().unwrap_or_default());
    for (col, text) in [
        (0, c.name.as_str()),
        (1, level),
        (2, &group),
        (3, &c.condition),
    ] {
        widths.seen(r, col, style::write_text(sheet, r, col, text)?);
    }
    let shown = Shown::unknown_kind;
    widths.seen(r, 4, write_one(sheet, r, 4, &c.value, shown(&c.value))?);
    if let Some(limit) = &c.limit {
        widths.seen(r, 5, write_one(sheet, r, 5, limit, shown(limit))?);
    }
    let word = c.outcome.word();
    sheet.write_string_with_format(r, 6, word, &style::status(word))?;
    widths.seen(r, 6, word.len());
    if let Some(n) = c.note_words() {
        widths.seen(r, 7, style::write_text(sheet, r, 7, &n)?);
    }
    Ok(())
}

/// The lists under the checks table, from row `r` on: the recipe's
/// warnings, the reading decisions that need attention and the figures
/// without a value. Returns the row after the last one written.
fn below_checks(
    sheet: &mut Worksheet,
    mut r: u32,
    results: &Results,
    reading: &[crate::load::ReadingNote],
) -> Result<u32, XlsxError> {
    // Warnings about the recipe, each with its fix.
    if !results.warnings.is_empty() {
        r += 1;
        sheet.write_string_with_format(r, 0, "warnings", &style::title())?;
        for warning in &results.warnings {
            r += 1;
            sheet.write_string_with_format(r, 0, warning, &style::reason())?;
        }
        r += 1;
    }
    // What reading the file changed (rows left out, keys spelled apart or
    // merged, a chosen header row or sheet): a check of the data in itself.
    let notable: Vec<_> = reading.iter().filter(|n| n.attention).collect();
    if !notable.is_empty() {
        r += 1;
        sheet.write_string_with_format(r, 0, "reading the file", &style::title())?;
        for note in notable {
            r += 1;
            sheet.write_string(r, 0, note.topic)?;
            sheet.write_string_with_format(r, 3, style::fit(&note.text), &style::reason())?;
        }
        r += 1;
    }
    // Figures without a value, so none goes unnoticed.
    let undefined = undefined_figures(results);
    if !undefined.is_empty() {
        r += 1;
        sheet.write_string_with_format(r, 0, "figures without a value", &style::title())?;
        r += 1;
        for (place, reason) in undefined {
            sheet.write_string(r, 0, style::fit(&place))?;
            sheet.write_string_with_format(r, 3, reason.explained(), &style::reason())?;
            r += 1;
        }
    }
    Ok(r)
}

/// (where, why) for every figure that has no value.
pub fn undefined_figures(results: &Results) -> Vec<(String, Reason)> {
    let mut found = Vec::new();
    for block in &results.blocks {
        match block {
            Block::Panel { name, entries, .. } => {
                for e in entries {
                    let place = |sheet: &str, label: &str| {
                        format!(
                            "{sheet} / {} / {} / {label}",
                            group_label(&e.group),
                            e.column
                        )
                    };
                    for (figure, value) in PANEL_FIGURES.iter().zip(&e.figures) {
                        if let One::Undefined(why) = value {
                            found.push((place(name, figure.label), why.clone()));
                        }
                    }
                    let measure = Shown::of(FigureKind::Measure, entry_decimals(e));
                    for cell in robustness_cells(&e.robustness, measure) {
                        if let One::Undefined(why) = cell.value {
                            found.push((place(&format!("{name} robustness"), cell.label), why));
                        }
                    }
                }
            }
            Block::Figures {
                name, names, rows, ..
            } => {
                for row in rows {
                    for (label, value) in names.iter().zip(&row.values) {
                        if let One::Undefined(why) = value {
                            // A group listed only because other blocks have it.
                            let why = match row.rows {
                                0 => Reason::NoRows,
                                _ => why.clone(),
                            };
                            found.push((
                                format!("{name} / {} / {label}", group_label(&row.group)),
                                why,
                            ));
                        }
                    }
                }
            }
        }
    }
    found
}

#[cfg(test)]
mod name_tests {
    use super::*;

    /// Every name claimed is one a spreadsheet accepts (checked by
    /// rust_xlsxwriter itself when the sheet is named) and none repeats.
    #[test]
    fn any_block_name_gives_a_valid_unique_sheet_name() {
        let mut names = SheetNames::default();
        let wanted = [
            "'quoted'",
            "'",
            "",
            "Record",
            "history",
            "a/b:c*d?[e]\\f",
            "😀😀😀😀😀😀😀😀😀😀😀😀😀😀😀😀",
            "x'",
            "Record",
            &"long name ".repeat(10),
            &"long name ".repeat(10),
        ];
        let mut workbook = rust_xlsxwriter::Workbook::new();
        let mut seen = HashSet::new();
        for w in wanted {
            let name = names.claim(w);
            workbook.add_worksheet().set_name(&name).unwrap();
            assert!(seen.insert(name.to_lowercase()), "{name} twice");
            assert!(!name.eq_ignore_ascii_case("record") && !name.eq_ignore_ascii_case("history"));
        }
        assert_eq!(names.claim("'quoted'"), "quoted 2");
        assert_eq!(names.claim_reserved(crate::history::RECORD_SHEET), "Record");
    }
}
