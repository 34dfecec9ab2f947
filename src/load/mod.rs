//! Loading: a data file to named, typed columns that remember where each
//! cell came from. xlsx, xlsm, xls and ods go through calamine; CSV and TSV
//! through the csv crate. Nothing is skipped silently: every blank, text
//! cell in a numeric column and formula error is counted and addressed.

mod assemble;
mod column;
mod csv_chunks;
mod csv_file;
mod fit;
mod header;
mod limits;
pub mod numbers;
mod ods_check;
mod quote_scan;
mod report;
pub mod rows;
mod sheet_cells;
mod source;
mod table;
mod workbook;
mod xls_check;

use std::path::Path;

pub use column::{
    CellIssue, Column, ColumnBuilder, ColumnKind, Converted, IssueKind, MAX_ROWS, NearDuplicate,
};
pub use csv_chunks::compare_csv_readers;
pub use fit::{Wanted, load_for};
pub use limits::{MAX_SHEET_COLUMNS, MAX_SHEET_ROWS};
pub use numbers::{NumberStyle, StyleSetting};
pub use report::{ReadingNote, reading_notes};
pub use source::SourceInfo;
pub use table::{
    Cell, ReadNotes, SummaryRow, Table, cell_address, column_letters,
    quote_sheet as table_sheet_ref,
};

/// Why a file could not be loaded; every message names the file (`path`,
/// as the user wrote it) and says what to do.
#[derive(Debug, thiserror::Error)]
pub enum LoadError {
    /// The file could not be opened or read.
    #[error("{path}: cannot read the file: {reason}")]
    Unreadable {
        /// The file.
        path: String,
        /// The system's or the reader's words.
        reason: String,
    },
    /// The recipe names a sheet the file does not have.
    #[error("{path}: no sheet named \"{sheet}\"; the sheets are: {available}")]
    NoSuchSheet {
        /// The file.
        path: String,
        /// The sheet asked for.
        sheet: String,
        /// The sheets there are, listed.
        available: String,
    },
    /// The sheet has no cells.
    #[error("{path}: sheet \"{sheet}\" is empty")]
    EmptySheet {
        /// The file.
        path: String,
        /// The sheet.
        sheet: String,
    },
    /// The header row the recipe names lies below the sheet's last row.
    #[error(
        "{path}: sheet \"{sheet}\" has fewer than {row} rows, so row {row} cannot be the header row"
    )]
    NoHeaderRow {
        /// The file.
        path: String,
        /// The sheet.
        sheet: String,
        /// The 1-based header row asked for.
        row: u32,
    },
    /// A column with data has no header.
    #[error(
        "{path}: the header {address} is blank but its column holds data; give the column a name"
    )]
    BlankHeader {
        /// The file.
        path: String,
        /// The header cell, such as `B1`.
        address: String,
    },
    /// Two columns have the same header.
    #[error(
        "{path}: the header \"{name}\" appears twice, at {first} and {second}; rename one of them"
    )]
    DuplicateHeader {
        /// The file.
        path: String,
        /// The header text.
        name: String,
        /// The first header cell.
        first: String,
        /// The second header cell.
        second: String,
    },
    /// The file's content breaks a rule or a limit.
    #[error("{path}: {reason}")]
    Malformed {
        /// The file.
        path: String,
        /// What is wrong, where, and what to do.
        reason: String,
    },
}

/// How to read a file (from the recipe's `input` and `header` lines).
#[derive(Debug, Clone, Default)]
pub struct LoadOptions {
    /// The sheet; default: the first.
    pub sheet: Option<String>,
    /// 1-based; default: found (the first row of text headers with data under it).
    pub header_row: Option<u32>,
    /// Decimal and thousands marks fixed by the recipe; the rest is detected.
    pub number_style: StyleSetting,
    /// A text file's encoding, by its label (`windows-1252`); default: detected.
    pub encoding: Option<String>,
    /// Keep rows such as `Total` at the bottom as data.
    pub keep_summary_rows: bool,
    /// Merge group keys that differ only in case or inner spaces.
    pub merge_similar_keys: bool,
    /// For each recipe column with `header NAME or ...`: its names, the
    /// recipe's own first; a file may use any one of them.
    pub accepted_names: Vec<Vec<String>>,
}

/// The two ways in: delimited text, or a spreadsheet through calamine.
enum FileKind {
    Delimited,
    Workbook,
}

/// The kind of a file, from its ending.
fn kind_of(path: &Path) -> Result<FileKind, LoadError> {
    let ending = path
        .extension()
        .and_then(|e| e.to_str())
        .unwrap_or("")
        .to_ascii_lowercase();
    match ending.as_str() {
        "csv" | "tsv" | "txt" => Ok(FileKind::Delimited),
        "xlsx" | "xlsm" | "xls" | "xlsb" | "ods" => Ok(FileKind::Workbook),
        other => Err(LoadError::Unreadable {
            path: path.display().to_string(),
            reason: if other.is_empty() {
                "the file name has no ending, so its type is unknown; sheaf reads .xlsx, .xlsm, .xls, .ods, .csv and .tsv".into()
            } else {
                format!(
                    "unknown file type `.{other}`; sheaf reads .xlsx, .xlsm, .xls, .ods, .csv and .tsv"
                )
            },
        }),
    }
}

/// Reads any supported file; the kind is taken from its ending.
pub fn load(path: &Path, options: &LoadOptions) -> Result<Table, LoadError> {
    match kind_of(path)? {
        FileKind::Delimited => {
            limits::check_file(path, false)?;
            csv_file::load(path, options)
        }
        FileKind::Workbook => {
            limits::check_spreadsheet(path)?;
            let source = SourceInfo::of_file(path).map_err(|e| LoadError::Unreadable {
                path: path.display().to_string(),
                reason: e.to_string(),
            })?;
            workbook::load(path, source, options)
        }
    }
}

/// The first `n` rows of the sheet `options` names (or the first) as the
/// texts of their cells, the sheet's name with them: what `inspect` shows
/// so that a sheet that does not read as a table can still be seen.
pub fn first_rows(
    path: &Path,
    options: &LoadOptions,
    n: usize,
) -> Result<(String, Vec<Vec<String>>), LoadError> {
    match kind_of(path)? {
        FileKind::Delimited => Ok((csv_file::sheet_name(path), csv_file::first_rows(path, n)?)),
        FileKind::Workbook => {
            limits::check_spreadsheet(path)?;
            let (owned, options) = (path.to_path_buf(), options.clone());
            limits::guarded(path, move || workbook::first_rows(&owned, &options, n))
        }
    }
}

/// The sheets of a file and, for CSV, the one pseudo-sheet.
pub fn sheet_names(path: &Path) -> Result<Vec<String>, LoadError> {
    match kind_of(path)? {
        FileKind::Delimited => Ok(vec![csv_file::sheet_name(path)]),
        FileKind::Workbook => {
            limits::check_spreadsheet(path)?;
            let owned = path.to_path_buf();
            limits::guarded(path, move || workbook::sheet_names(&owned))
        }
    }
}
