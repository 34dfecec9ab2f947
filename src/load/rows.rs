//! Rows under the header that are not data: fully blank rows (separators)
//! and the summary rows an export puts at the bottom (`Total`, `Average`,
//! or a row whose numbers are the sum or mean of the rows above). Both are
//! left out of every figure and listed with their reasons; summary rows can
//! be kept by the recipe (`input keep summary rows`).

use super::column::{Column, ColumnKind};

/// Words that open a summary row's key cell (compared in lower case).
pub const SUMMARY_WORDS: &[&str] = &[
    "grand total",
    "sub-total",
    "sub total",
    "subtotal",
    "totals",
    "total",
    "sum",
    "average",
    "avg",
    "mean",
    "overall",
];

/// How many rows at the bottom may be summary rows.
const MOST_SUMMARY_ROWS: usize = 5;

/// Which data rows were found not to be data.
#[derive(Debug, Default, PartialEq)]
pub struct NotData {
    /// 0-based data rows with no cell at all.
    pub blank: Vec<usize>,
    /// 0-based data rows that summarise the rows above, with the reason.
    pub summary: Vec<(usize, String)>,
}

/// The summary word a cell opens with (`Total:`, `AVERAGE (all lines)`).
fn summary_word(text: &str) -> Option<&'static str> {
    let lower = text.trim().to_lowercase();
    SUMMARY_WORDS.iter().copied().find(|word| {
        lower
            .strip_prefix(word)
            .is_some_and(|rest| !rest.starts_with(|c: char| c.is_alphanumeric()))
    })
}

/// Decimal places of a number as written shortest (None in exponent form).
fn decimals(x: f64) -> Option<i32> {
    let text = crate::format::shortest(x);
    if text.contains('e') {
        return None;
    }
    Some(text.split_once('.').map_or(0, |(_, f)| f.len() as i32))
}

/// Whether `x` is `reference`, exactly or as rounded to x's own decimals
/// (an export's Average row is often rounded to the shown places).
fn same_figure(x: f64, reference: f64) -> bool {
    let tolerance = 1e-9 * reference.abs().max(1.0);
    if (x - reference).abs() <= tolerance {
        return true;
    }
    match decimals(x) {
        Some(d) if (1..=6).contains(&d) => {
            let scale = 10f64.powi(d);
            ((reference * scale).round() / scale - x).abs() <= tolerance
        }
        _ => false,
    }
}

/// Finds the blank rows and the summary rows at the bottom.
pub fn find_not_data(columns: &[Column], rows: usize) -> NotData {
    let mut blank_cells = vec![0u32; rows];
    for column in columns {
        column.blank_rows().for_each(|r| blank_cells[r] += 1);
    }
    let width = columns.len() as u32;
    let is_blank = |r: usize| width > 0 && blank_cells[r] == width;
    let blank: Vec<usize> = (0..rows).filter(|&r| is_blank(r)).collect();
    let tail: Vec<usize> = (0..rows)
        .rev()
        .filter(|&r| !is_blank(r))
        .take(MOST_SUMMARY_ROWS)
        .collect::<Vec<_>>()
        .into_iter()
        .rev()
        .collect();
    // The largest block of bottom rows that all summarise the rows above it.
    let summary = tail
        .iter()
        .enumerate()
        .find_map(|(i, &start)| {
            let reasons: Option<Vec<(usize, String)>> = tail[i..]
                .iter()
                .map(|&r| summary_reason(columns, r, start).map(|why| (r, why)))
                .collect();
            reasons.filter(|_| start >= 2)
        })
        .unwrap_or_default();
    NotData { blank, summary }
}

/// A number column's values in rows `0..end`.
fn values_above(column: &Column, end: usize) -> impl Iterator<Item = f64> + '_ {
    column.numbers().expect("a number column")[..end]
        .iter()
        .copied()
        .filter(|v| !v.is_nan())
}

/// Why row `row` summarises data rows `0..data_end`, if it does.
fn summary_reason(columns: &[Column], row: usize, data_end: usize) -> Option<String> {
    for column in columns {
        if let Some(word) = column.text(row).as_deref().and_then(summary_word)
            && column.kind != ColumnKind::Number
        {
            return Some(format!(
                "its {} cell reads \"{}\" ({word})",
                column.name,
                column.text(row).unwrap_or_default().trim()
            ));
        }
    }
    // Without a summary word, a summary row has no key: a row with a text
    // cell (a depot, a batch code) is data whatever its numbers.
    if columns
        .iter()
        .any(|c| c.kind == ColumnKind::Text && c.text(row).is_some())
    {
        return None;
    }
    let numeric: Vec<&Column> = columns
        .iter()
        .filter(|c| c.kind == ColumnKind::Number)
        .collect();
    let mut matched: Vec<&'static str> = Vec::new();
    for column in &numeric {
        let Some(x) = column.number(row) else {
            continue;
        };
        let values = values_above(column, data_end);
        let (count, sum) = values.fold((0usize, 0.0f64), |(n, s), v| (n + 1, s + v));
        if count < 2 {
            return None;
        }
        let mean = sum / count as f64;
        let varies = values_above(column, data_end).any(|v| v != mean);
        if same_figure(x, sum) {
            matched.push("sum");
        } else if varies && same_figure(x, mean) {
            matched.push("mean");
        } else {
            return None;
        }
    }
    // One matching number could be chance (the last of 1, 1, 2 is the sum
    // of the others): without a summary word, two columns must agree.
    (matched.len() >= 2).then(|| {
        let what = if matched.iter().all(|m| *m == "sum") {
            "the sum"
        } else if matched.iter().all(|m| *m == "mean") {
            "the mean"
        } else {
            "the sum or mean"
        };
        format!("its numbers are {what} of the rows above")
    })
}

#[cfg(test)]
mod tests {
    use super::super::column::ColumnBuilder;
    use super::super::table::Cell;
    use super::*;

    fn column(name: &str, cells: Vec<Cell>) -> Column {
        let mut b = ColumnBuilder::default();
        cells.into_iter().for_each(|c| b.push(c));
        b.finish(name.into(), 0, None)
    }

    fn t(s: &str) -> Cell {
        Cell::Text(s.into())
    }

    #[test]
    fn total_and_average_rows_by_their_words() {
        let columns = vec![
            column(
                "line",
                vec![
                    t("A"),
                    t("B"),
                    Cell::Blank,
                    t("A"),
                    t("Total"),
                    t("Average:"),
                ],
            ),
            column(
                "weight",
                vec![
                    Cell::Number(1.0),
                    Cell::Number(2.0),
                    Cell::Blank,
                    Cell::Number(3.0),
                    Cell::Number(6.0),
                    Cell::Number(2.0),
                ],
            ),
        ];
        let found = find_not_data(&columns, 6);
        assert_eq!(found.blank, [2]);
        let rows: Vec<usize> = found.summary.iter().map(|(r, _)| *r).collect();
        assert_eq!(rows, [4, 5]);
        assert!(
            found.summary[0].1.contains("\"Total\""),
            "{:?}",
            found.summary
        );
    }

    #[test]
    fn a_row_of_sums_without_a_word_is_found_and_data_is_not() {
        let n = |x: f64| Cell::Number(x);
        let columns = vec![
            column("a", vec![n(1.0), n(2.0), n(4.0), n(7.0), n(2.33)]),
            column("b", vec![n(10.0), n(20.0), n(40.0), n(70.0), n(23.33)]),
        ];
        let found = find_not_data(&columns, 5);
        // Row 3 is the sum of rows 0-2, row 4 their mean rounded to 2 places.
        let rows: Vec<usize> = found.summary.iter().map(|(r, _)| *r).collect();
        assert_eq!(rows, [3, 4], "{:?}", found.summary);
        assert!(found.summary[0].1.contains("the sum"));
        assert!(found.summary[1].1.contains("the mean"));
        // One column alone is not enough without a word: 1, 1, 2 is data.
        let plain = vec![column("a", vec![n(1.0), n(1.0), n(2.0)])];
        assert_eq!(find_not_data(&plain, 3).summary, []);
        // Constant columns: every row is their mean; a keyed row is data.
        let constant = vec![column("a", vec![n(1.0); 6]), column("b", vec![n(2.0); 6])];
        assert_eq!(find_not_data(&constant, 6).summary, []);
        let keyed = vec![
            column("k", vec![t("x"), t("y"), t("z"), t("w")]),
            column("a", vec![n(1.0), n(2.0), n(4.0), n(7.0)]),
            column("b", vec![n(1.0), n(2.0), n(4.0), n(7.0)]),
        ];
        assert_eq!(find_not_data(&keyed, 4).summary, []);
        let data = vec![
            column("a", vec![n(1.0), n(2.0), n(4.0), n(5.0)]),
            column("b", vec![n(1.0), n(2.0), n(4.0), n(7.0)]),
        ];
        assert_eq!(find_not_data(&data, 4).summary, []);
    }

    #[test]
    fn summary_words_need_a_word_boundary() {
        assert_eq!(summary_word("Total"), Some("total"));
        assert_eq!(summary_word("  TOTAL (all lines)"), Some("total"));
        assert_eq!(summary_word("Grand total:"), Some("grand total"));
        assert_eq!(summary_word("Totalbrand"), None);
        assert_eq!(summary_word("Summit"), None);
        assert!(same_figure(2.33, 7.0 / 3.0));
        assert!(!same_figure(2.0, 7.0 / 3.0));
    }
}
