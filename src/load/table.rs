//! The loaded data: its source, its typed columns and their cell addresses.

use super::column::Column;
use super::source::SourceInfo;

/// One cell as a loader reads it, before its column is stored by type.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    /// A number.
    Number(f64),
    /// A date or time, as a spreadsheet serial number (days since 1899-12-30).
    Date(f64),
    /// A true/false cell.
    Bool(bool),
    /// Text, as written.
    Text(String),
    /// Nothing, or only spaces.
    Blank,
    /// A formula error such as #DIV/0!, as written.
    Error(String),
}

/// Spreadsheet error values; a cell holding one as text (a CSV export, a
/// cached formula result) counts as a formula error, not as text.
pub const ERROR_CODES: &[&str] = &[
    "#DIV/0!",
    "#N/A",
    "#VALUE!",
    "#REF!",
    "#NAME?",
    "#NUM!",
    "#NULL!",
    "#SPILL!",
    "#CALC!",
    "#GETTING_DATA",
];

impl Cell {
    /// Text as a cell: blank, a spreadsheet error code, or text.
    pub fn from_text(text: &str) -> Cell {
        let trimmed = text.trim();
        if trimmed.is_empty() {
            Cell::Blank
        } else if ERROR_CODES.contains(&trimmed) {
            Cell::Error(trimmed.to_string())
        } else {
            Cell::Text(text.to_string())
        }
    }
}

/// A loaded sheet: its columns, which rows of the sheet they hold, and
/// what the loader decided.
#[derive(Debug, Clone)]
pub struct Table {
    /// The input file, as the About sheet names it.
    pub source: SourceInfo,
    /// The sheet read (for CSV, the file name without its ending).
    pub sheet: String,
    /// 1-based row of the headers.
    pub header_row: u32,
    /// The columns, in sheet order.
    pub columns: Vec<Column>,
    /// Data rows kept (blank and summary rows below the header are left out).
    pub rows: usize,
    /// For each kept row, its 0-based row under the header in the sheet;
    /// empty when no row was left out (then the two are the same).
    pub row_map: Vec<u32>,
    /// What the loader decided while reading, for the terminal and About.
    pub notes: ReadNotes,
}

/// A row below the data that summarises it, left out of every figure.
#[derive(Debug, Clone, PartialEq)]
pub struct SummaryRow {
    /// 1-based sheet row.
    pub sheet_row: usize,
    /// Why it counts as a summary (the word that marks it).
    pub reason: String,
}

/// Everything the loader decided about a file that changes what is read:
/// how text was decoded and numbers read, which row holds the headers,
/// which rows were left out. Nothing here is silent: the terminal and the
/// About sheet show all of it.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ReadNotes {
    /// How a text file was decoded, e.g. "UTF-16LE (byte-order mark)".
    pub encoding: Option<String>,
    /// How numbers written as text were read (CSV, or text cells of a workbook).
    pub number_style: Option<String>,
    /// Set when the number style could be read two ways, with the fix.
    pub number_doubt: Option<String>,
    /// The delimiter, and where it came from.
    pub delimiter: Option<String>,
    /// How the header row was found, when sheaf chose it.
    pub header: Option<String>,
    /// Why this sheet was read, when the recipe did not name it.
    pub sheet: Option<String>,
    /// 1-based sheet rows with no cell at all, left out.
    pub blank_rows: Vec<usize>,
    /// Rows at the bottom that summarise the data (Total, Average, ...).
    pub summary_rows: Vec<SummaryRow>,
    /// The recipe asked to keep summary rows as data.
    pub summary_rows_kept: bool,
    /// Recipe column name and the header the file used for it, when they differ.
    pub renamed_headers: Vec<(String, String)>,
}

impl Table {
    /// The column with this header.
    pub fn column(&self, name: &str) -> Option<&Column> {
        self.columns.iter().find(|c| c.name == name)
    }

    /// The headers, in sheet order.
    pub fn headers(&self) -> Vec<String> {
        self.columns.iter().map(|c| c.name.clone()).collect()
    }

    /// Finds, in the named text columns, keys that differ only in case or
    /// inner spaces; with `merge`, each such set becomes one key.
    pub fn find_near_duplicates(&mut self, names: &[String], merge: bool) {
        for column in self.columns.iter_mut().filter(|c| names.contains(&c.name)) {
            column.find_near_duplicates(merge);
        }
    }

    /// The 1-based sheet row of data row `row` (0-based).
    pub fn sheet_row(&self, row: usize) -> usize {
        let below_header = if self.row_map.is_empty() {
            row
        } else {
            self.row_map[row] as usize
        };
        self.header_row as usize + 1 + below_header
    }

    /// `Deliveries!C17` for data row `row` (0-based) of `column`.
    pub fn address(&self, column: &Column, row: usize) -> String {
        format!(
            "{}!{}",
            quote_sheet(&self.sheet),
            cell_address(column.sheet_column, self.sheet_row(row))
        )
    }
}

/// A sheet name as it is written in a reference: quoted when it has spaces or punctuation.
pub fn quote_sheet(sheet: &str) -> String {
    if sheet.chars().all(|c| c.is_ascii_alphanumeric() || c == '_') {
        sheet.to_string()
    } else {
        format!("'{}'", sheet.replace('\'', "''"))
    }
}

/// `C17` for 0-based column 2 and 1-based row 17.
pub fn cell_address(column: u32, row: usize) -> String {
    format!("{}{row}", column_letters(column))
}

/// A, B, ..., Z, AA, AB, ... for 0-based column numbers.
pub fn column_letters(mut column: u32) -> String {
    let mut letters = Vec::new();
    loop {
        letters.push(b'A' + (column % 26) as u8);
        if column < 26 {
            break;
        }
        column = column / 26 - 1;
    }
    letters.reverse();
    String::from_utf8(letters).unwrap()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn column_letters_follow_spreadsheet_order() {
        assert_eq!(column_letters(0), "A");
        assert_eq!(column_letters(25), "Z");
        assert_eq!(column_letters(26), "AA");
        assert_eq!(column_letters(701), "ZZ");
        assert_eq!(column_letters(702), "AAA");
        assert_eq!(cell_address(2, 17), "C17");
        assert_eq!(quote_sheet("Deliveries"), "Deliveries");
        assert_eq!(quote_sheet("Sep 2026"), "'Sep 2026'");
    }
}
