//! The Changes sheet (this period against the previous one) and the Record
//! sheet that lets the next period compare with this one.

use rust_xlsxwriter::{Format, Workbook, XlsxError};

use super::sheets::SheetNames;
use super::{RunInfo, style};
use crate::eval::Reason;
use crate::history::{RECORD_SHEET, Record};

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
    changes_heading(sheet, &labels, run, previous, current)?;
    let percent = style::cell().set_num_format("0.0%");
    let mut r = 4;
    let previous_period = previous.period.as_deref().unwrap_or_default();
    let now_period = current.period.as_deref().unwrap_or_default();
    let mut widths = style::Widths::default();
    let moves = crate::history::moves_between(previous_period, previous, now_period, current);
    let (moves, unlisted) = listed(
        moves,
        |m| m.flag(run.drift, run.noise).is_some(),
        crate::eval::MAX_SHEET_ENTRIES,
    );
    for m in moves {
        if let Some(flagged) = change_row(sheet, r, &m, run, &mut widths, &percent)? {
            moved.push(flagged);
        }
        r += 1;
    }
    if unlisted > 0 {
        let said = format!(
            "... and {unlisted} more changes, none flagged, not listed: a sheet holds {} rows (every figure is on the Record sheet and in --json)",
            crate::load::MAX_SHEET_ROWS
        );
        sheet.write_string_with_format(r, 0, &said, &style::reason())?;
    }
    widths.seen(3, 6, Reason::PreviousIsZero.to_string().len());
    style::print_titles(sheet, 3, 3)?;
    style::fit_columns(sheet, 3, &labels, &widths)?;
    style::filter(sheet, 3, r - 1, labels.len())?;
    Ok((sheet_name, moved))
}

/// The Changes sheet's title, its notes (the period compared with and
/// the rules; groups that appeared or disappeared) and the table header.
fn changes_heading(
    sheet: &mut rust_xlsxwriter::Worksheet,
    labels: &[String],
    run: &RunInfo,
    previous: &Record,
    current: &Record,
) -> Result<(), XlsxError> {
    sheet.write_string_with_format(0, 0, "Changes", &style::title())?;
    let note = format!(
        "Each figure against period {}. {}",
        previous.period.as_deref().unwrap_or("(unknown)"),
        crate::history::rules_in_words(run.drift, run.noise)
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
    style::table_header(sheet, 3, labels, 3)
}

/// One figure's change on row `r`; returns the row and the change in
/// words when it is flagged.
fn change_row(
    sheet: &mut rust_xlsxwriter::Worksheet,
    r: u32,
    m: &crate::history::Move,
    run: &RunInfo,
    widths: &mut style::Widths,
    percent: &Format,
) -> Result<Option<(u32, String)>, XlsxError> {
    let name = crate::history::shown_name(&m.block, &m.name);
    for (c, text) in [(0, &m.block), (1, &m.group), (2, &name)] {
        widths.seen(r, c, style::write_text(sheet, r, c, text)?);
    }
    for (c, x) in [(3, m.before), (4, m.after), (5, m.after - m.before)] {
        let value = crate::eval::One::Number(x);
        let shown = style::Shown::unknown_kind(&value);
        widths.seen(r, c, style::write_one(sheet, r, c, &value, shown)?);
    }
    match m.relative() {
        Some(relative) => {
            sheet.write_number_with_format(r, 6, relative, percent)?;
        }
        None => {
            let why = Reason::PreviousIsZero.to_string();
            sheet.write_string_with_format(r, 6, &why, &style::reason())?;
        }
    }
    crate::history::write_noise(sheet, r, 8, m)?;
    let Some(flag) = m.flag(run.drift, run.noise) else {
        return Ok(None);
    };
    widths.seen(r, 7, flag.word().len());
    sheet.write_string_with_format(r, 7, flag.word(), &style::status("warn"))?;
    Ok(Some((r, moved_in_words(m, &name, flag.word()))))
}

/// A flagged change as the first sheet lists it: where, what, from and to.
fn moved_in_words(m: &crate::history::Move, name: &str, flag: &str) -> String {
    let shown = |x: f64| style::Shown::unknown_kind(&crate::eval::One::Number(x)).text(x);
    let relative = m
        .relative()
        .map_or_else(String::new, |r| format!(", {:+.1}%", r * 100.0));
    format!(
        "{} / {} / {name}: {} to {} ({flag}{relative})",
        m.block,
        m.group,
        shown(m.before),
        shown(m.after)
    )
}

/// The moves the Changes sheet lists when they fit in `room` rows; else
/// every `flagged` move and as many others as fit, in their order, with how
/// many were left out (a comparison of 100,000 groups can have millions).
fn listed(
    moves: Vec<crate::history::Move>,
    flagged: impl Fn(&crate::history::Move) -> bool,
    room: usize,
) -> (Vec<crate::history::Move>, usize) {
    if moves.len() <= room {
        return (moves, 0);
    }
    let flagged_count = moves.iter().filter(|m| flagged(m)).count();
    let mut others_room = room.saturating_sub(flagged_count);
    let total = moves.len();
    let kept: Vec<_> = moves
        .into_iter()
        .filter(|m| {
            flagged(m)
                || others_room.checked_sub(1).is_some_and(|left| {
                    others_room = left;
                    true
                })
        })
        .collect();
    let unlisted = total - kept.len();
    (kept, unlisted)
}

/// Adds the hidden Record sheet; its layout is `history::record`'s.
pub fn record(
    workbook: &mut Workbook,
    names: &mut SheetNames,
    record: &Record,
) -> Result<(), XlsxError> {
    // The largest sheet (every figure of every group), written row by row:
    // each row goes to a temporary file once the next one starts, so the
    // memory it takes is one row and the distinct words, whatever its length.
    let sheet = workbook
        .add_worksheet_with_low_memory()?
        .set_name(names.claim_reserved(RECORD_SHEET))?;
    record.write_sheet(sheet)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A comparison longer than the sheet keeps every flagged move and fills
    /// the rest with the others in order, counting those left out.
    #[test]
    fn changes_beyond_the_sheet_keep_the_flagged_ones() {
        let mv = |after: f64| crate::history::Move {
            block: "B".into(),
            group: format!("g{after}"),
            name: "m".into(),
            from: "1".into(),
            to: "2".into(),
            before: 1.0,
            after,
            se: None,
            basis: crate::history::Basis::Level,
        };
        let moves = vec![mv(1.0), mv(1.01), mv(5.0), mv(1.02), mv(9.0)];
        let flagged = |m: &crate::history::Move| m.moved(0.1, 2.0);
        let (kept, unlisted) = listed(moves.clone(), flagged, 3);
        let groups: Vec<&str> = kept.iter().map(|m| m.group.as_str()).collect();
        assert_eq!(groups, ["g1", "g5", "g9"]);
        assert_eq!(unlisted, 2);
        assert_eq!(listed(moves, flagged, 5).1, 0);
    }
}
