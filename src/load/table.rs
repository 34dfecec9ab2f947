//! The loaded data: typed columns with cell addresses and the cells that
//! could not be used as numbers.

use std::path::Path;

use sha2::{Digest, Sha256};

/// What the About sheet says about the input file.
#[derive(Debug, Clone)]
pub struct SourceInfo {
    pub path: String,
    pub file_name: String,
    pub size: u64,
    pub sha256: String,
}

impl SourceInfo {
    pub fn describe(path: &Path, bytes: &[u8]) -> SourceInfo {
        let digest = Sha256::digest(bytes);
        SourceInfo {
            path: path.display().to_string(),
            file_name: path
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default(),
            size: bytes.len() as u64,
            sha256: digest.iter().map(|b| format!("{b:02x}")).collect(),
        }
    }
}

/// One cell's content after loading.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    Number(f64),
    /// A date or time, as a spreadsheet serial number (days since 1899-12-30).
    Date(f64),
    Bool(bool),
    Text(String),
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

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnKind {
    Number,
    Date,
    Text,
    Bool,
    /// No cell holds anything.
    Empty,
}

impl ColumnKind {
    pub fn word(self) -> &'static str {
        match self {
            ColumnKind::Number => "number",
            ColumnKind::Date => "date",
            ColumnKind::Text => "text",
            ColumnKind::Bool => "true/false",
            ColumnKind::Empty => "empty",
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum IssueKind {
    Blank,
    TextInNumbers,
    FormulaError,
}

impl IssueKind {
    pub fn words(self) -> &'static str {
        match self {
            IssueKind::Blank => "blank cell",
            IssueKind::TextInNumbers => "text in a numeric column",
            IssueKind::FormulaError => "formula error",
        }
    }
}

/// A cell that counts as missing, and why.
#[derive(Debug, Clone, PartialEq)]
pub struct CellIssue {
    pub row: usize,
    pub kind: IssueKind,
    /// What the cell held (text or error), for the About sheet.
    pub content: String,
}

#[derive(Debug, Clone)]
pub struct Column {
    pub name: String,
    /// 0-based position in the sheet, for addresses.
    pub sheet_column: u32,
    pub kind: ColumnKind,
    pub cells: Vec<Cell>,
}

impl Column {
    /// The numeric view: numbers and dates are values; everything else is missing.
    pub fn number(&self, row: usize) -> Option<f64> {
        match self.cells[row] {
            Cell::Number(x) | Cell::Date(x) => Some(x),
            Cell::Bool(b) if self.kind == ColumnKind::Bool => Some(f64::from(u8::from(b))),
            _ => None,
        }
    }

    /// The text view, used for group keys and text comparisons.
    pub fn text(&self, row: usize) -> Option<String> {
        match &self.cells[row] {
            Cell::Text(t) => Some(t.clone()),
            Cell::Number(x) => Some(crate::format::shortest(*x)),
            Cell::Date(x) => Some(crate::format::date(*x)),
            Cell::Bool(b) => Some(b.to_string()),
            Cell::Blank | Cell::Error(_) => None,
        }
    }

    /// Cells that count as missing in this column's numeric view, in row order.
    pub fn issues(&self) -> Vec<CellIssue> {
        let numeric = matches!(
            self.kind,
            ColumnKind::Number | ColumnKind::Date | ColumnKind::Bool
        );
        let mut found = Vec::new();
        for (row, cell) in self.cells.iter().enumerate() {
            let issue = match cell {
                Cell::Blank => Some((IssueKind::Blank, String::new())),
                Cell::Error(e) => Some((IssueKind::FormulaError, e.clone())),
                Cell::Text(t) if numeric => Some((IssueKind::TextInNumbers, t.clone())),
                _ => None,
            };
            if let Some((kind, content)) = issue {
                found.push(CellIssue { row, kind, content });
            }
        }
        found
    }

    /// Decides the column's kind from its cells: numeric when numbers are
    /// at least as common as text, so a typed-in "n/a" does not turn a
    /// numeric column into text (it is listed as missing instead).
    pub fn infer_kind(cells: &[Cell]) -> ColumnKind {
        let (mut numbers, mut dates, mut texts, mut bools) = (0usize, 0usize, 0usize, 0usize);
        for cell in cells {
            match cell {
                Cell::Number(_) => numbers += 1,
                Cell::Date(_) => dates += 1,
                Cell::Text(_) => texts += 1,
                Cell::Bool(_) => bools += 1,
                Cell::Blank | Cell::Error(_) => {}
            }
        }
        if numbers + dates + texts + bools == 0 {
            ColumnKind::Empty
        } else if numbers + dates == 0 && bools > texts {
            ColumnKind::Bool
        } else if numbers + dates < texts || numbers + dates == 0 {
            ColumnKind::Text
        } else if dates > numbers {
            ColumnKind::Date
        } else {
            ColumnKind::Number
        }
    }
}

#[derive(Debug, Clone)]
pub struct Table {
    pub source: SourceInfo,
    /// The sheet read (for CSV, the file name without its ending).
    pub sheet: String,
    /// 1-based row of the headers.
    pub header_row: u32,
    pub columns: Vec<Column>,
    pub rows: usize,
}

impl Table {
    pub fn column(&self, name: &str) -> Option<&Column> {
        self.columns.iter().find(|c| c.name == name)
    }

    pub fn headers(&self) -> Vec<String> {
        self.columns.iter().map(|c| c.name.clone()).collect()
    }

    /// `Deliveries!C17` for data row `row` (0-based) of `column`.
    pub fn address(&self, column: &Column, row: usize) -> String {
        format!(
            "{}!{}",
            quote_sheet(&self.sheet),
            cell_address(column.sheet_column, self.header_row as usize + 1 + row)
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

    #[test]
    fn a_stray_text_cell_does_not_make_a_numeric_column_text() {
        let cells = [
            Cell::Number(1.0),
            Cell::Text("n/a".into()),
            Cell::Number(3.0),
            Cell::Blank,
        ];
        assert_eq!(Column::infer_kind(&cells), ColumnKind::Number);
        let keys = [
            Cell::Text("North".into()),
            Cell::Text("South".into()),
            Cell::Number(3.0),
        ];
        assert_eq!(Column::infer_kind(&keys), ColumnKind::Text);
        assert_eq!(Column::infer_kind(&[Cell::Blank]), ColumnKind::Empty);
    }
}
