//! Finding the header row when the recipe does not fix it. Exports often
//! put a title, an export date or blank rows above the headers; the header
//! row is the first row whose cells are all text and that names the columns
//! the data below it fills. The choice is always reported, with the
//! `input` line that fixes it.

use super::table::Cell;

/// How many rows from the top are looked at.
pub const ROWS_LOOKED_AT: usize = 30;

/// One non-empty row near the top of a sheet: its 0-based sheet row and
/// its non-empty cells with their 0-based columns.
pub type TopRow = (u32, Vec<(u32, Cell)>);

/// The header row that was found, 0-based, and what to tell the user
/// when it is not the sheet's first row.
#[derive(Debug, Clone, PartialEq)]
pub struct FoundHeader {
    pub row: u32,
    pub note: Option<String>,
}

fn all_text(cells: &[(u32, Cell)]) -> bool {
    !cells.is_empty() && cells.iter().all(|(_, c)| matches!(c, Cell::Text(_)))
}

/// Whether `header` names every column that `below` fills, but at most one
/// (a note column without a header is common in exports).
fn covers(header: &[(u32, Cell)], below: &[(u32, Cell)]) -> bool {
    // Cells come in column order, so a search finds each column.
    let uncovered = below
        .iter()
        .filter(|(column, _)| header.binary_search_by_key(column, |(c, _)| *c).is_err())
        .count();
    uncovered <= 1 && uncovered < below.len()
}

/// The header row among the top rows of a sheet (non-empty rows in order).
/// The first row that is all text and covers the row below wins, preferring
/// one under which a number, date or true/false cell follows (so a title
/// above a one-column sheet is not taken for its header). None when the
/// sheet has no rows.
pub fn find(rows: &[TopRow]) -> Option<FoundHeader> {
    let (first_row, _) = rows.first()?;
    let candidates: Vec<usize> = (0..rows.len().saturating_sub(1))
        .filter(|&i| all_text(&rows[i].1) && covers(&rows[i].1, &rows[i + 1].1))
        .collect();
    let data_follows = |i: usize| {
        rows[i + 1]
            .1
            .iter()
            .any(|(_, c)| matches!(c, Cell::Number(_) | Cell::Date(_) | Cell::Bool(_)))
    };
    // A row of several text cells that names the columns below it is the
    // header, even when the numbers under it do not read as numbers (yet).
    // A lone text cell could be a title over a one-column sheet: then the
    // first such row with a number, date or true/false under it wins.
    let chosen = match candidates.first() {
        Some(&first) if rows[first].1.len() >= 2 => first,
        _ => candidates
            .iter()
            .copied()
            .find(|&i| data_follows(i))
            .or_else(|| candidates.first().copied())
            .unwrap_or(0),
    };
    let row = rows[chosen].0;
    let note = (row != 0).then(|| {
        let above: Vec<String> = rows[..chosen]
            .iter()
            .flat_map(|(_, cells)| cells.iter())
            .filter_map(|(_, c)| match c {
                Cell::Text(t) => Some(format!("\"{}\"", t.trim())),
                _ => None,
            })
            .take(2)
            .collect();
        let what = if *first_row > 0 && chosen == 0 {
            "the rows above it are blank".to_string()
        } else if above.is_empty() {
            "the rows above it are not headers".to_string()
        } else {
            format!("the rows above it hold a title ({})", above.join(", "))
        };
        format!(
            "the headers are on row {}: {what}; to fix the choice, write `input header row {}`",
            row + 1,
            row + 1
        )
    });
    Some(FoundHeader { row, note })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn text(s: &str) -> Cell {
        Cell::Text(s.into())
    }

    fn row(at: u32, cells: Vec<Cell>) -> TopRow {
        (
            at,
            cells
                .into_iter()
                .enumerate()
                .map(|(c, x)| (c as u32, x))
                .collect(),
        )
    }

    #[test]
    fn a_plain_sheet_has_its_headers_on_row_one() {
        let rows = vec![
            row(0, vec![text("depot"), text("weight")]),
            row(1, vec![text("North"), Cell::Number(2.5)]),
        ];
        assert_eq!(find(&rows), Some(FoundHeader { row: 0, note: None }));
    }

    #[test]
    fn a_title_and_an_export_line_above_the_headers_are_passed_over() {
        let rows = vec![
            row(0, vec![text("Scale readings, October (invented)")]),
            row(1, vec![text("exported 2026-11-01")]),
            row(3, vec![text("line"), text("weight"), text("operator")]),
            row(4, vec![text("A"), Cell::Number(250.1), text("kim")]),
        ];
        let found = find(&rows).unwrap();
        assert_eq!(found.row, 3);
        let note = found.note.unwrap();
        assert!(
            note.contains("row 4") && note.contains("`input header row 4`"),
            "{note}"
        );
        assert!(note.contains("Scale readings"), "{note}");
    }

    #[test]
    fn a_title_above_a_single_column_is_not_its_header() {
        let rows = vec![
            row(0, vec![text("Weights")]),
            row(1, vec![text("weight_g")]),
            row(2, vec![Cell::Number(1.0)]),
        ];
        assert_eq!(find(&rows).unwrap().row, 1);
    }

    #[test]
    fn blank_rows_on_top_are_said() {
        let rows = vec![
            row(2, vec![text("a"), text("b")]),
            row(3, vec![Cell::Number(1.0), Cell::Number(2.0)]),
        ];
        let found = find(&rows).unwrap();
        assert_eq!(found.row, 2);
        assert!(found.note.unwrap().contains("blank"));
    }

    #[test]
    fn headers_over_numbers_that_do_not_read_yet_stay_the_headers() {
        let rows = vec![
            row(0, vec![text("line"), text("weight")]),
            row(1, vec![text("A"), text("1,5")]),
            row(2, vec![text("B"), Cell::Number(2.0)]),
        ];
        assert_eq!(find(&rows).unwrap().row, 0);
    }

    #[test]
    fn an_all_text_table_keeps_row_one() {
        let rows = vec![
            row(0, vec![text("name"), text("team")]),
            row(1, vec![text("kim"), text("A")]),
        ];
        assert_eq!(find(&rows).unwrap().row, 0);
        assert_eq!(find(&[]), None);
    }
}
