//! Assembles a sheet's non-empty cells, given in row order, into columns
//! under a header row. Both workbook paths (streamed xlsx cells and
//! calamine's ranges for xls and ods) go through it, so they agree on where
//! the data starts and ends: from the header row to the last row with a
//! non-empty cell.

use super::column::ColumnBuilder;
use super::csv_file::build_columns;
use super::source::SourceInfo;
use super::table::{Cell, Table};
use super::{LoadError, LoadOptions};

pub struct SheetCells {
    /// 0-based sheet row of the headers.
    header: u32,
    names: Vec<String>,
    columns: Vec<ColumnBuilder>,
    first_row: Option<u32>,
    last_row: u32,
}

/// A cell came before one already taken: the rows are not in order.
#[derive(Debug)]
pub struct OutOfOrder;

impl SheetCells {
    pub fn new(options: &LoadOptions) -> SheetCells {
        SheetCells {
            header: options.header_row.unwrap_or(1).saturating_sub(1),
            names: Vec::new(),
            columns: Vec::new(),
            first_row: None,
            last_row: 0,
        }
    }

    /// Takes the non-empty cell at 0-based (row, column): `header` gives its
    /// text when it is a header, `push` adds it to its column otherwise.
    pub fn add(
        &mut self,
        row: u32,
        column: u32,
        header: impl FnOnce() -> String,
        push: impl FnOnce(&mut ColumnBuilder),
    ) -> Result<(), OutOfOrder> {
        if self.first_row.is_some_and(|first| row < first) || row < self.last_row {
            return Err(OutOfOrder);
        }
        self.first_row.get_or_insert(row);
        self.last_row = row;
        let column = column as usize;
        if row == self.header {
            if self.names.len() <= column {
                self.names.resize(column + 1, String::new());
            }
            self.names[column] = header().trim().to_string();
        } else if row > self.header {
            let body_row = (row - self.header - 1) as usize;
            if self.columns.len() <= column {
                self.columns.resize_with(column + 1, ColumnBuilder::default);
            }
            let builder = &mut self.columns[column];
            if builder.rows() > body_row {
                return Err(OutOfOrder);
            }
            while builder.rows() < body_row {
                builder.push(Cell::Blank);
            }
            push(builder);
        }
        Ok(())
    }

    pub fn finish(
        mut self,
        shown: &str,
        sheet: String,
        source: SourceInfo,
    ) -> Result<Table, LoadError> {
        let header_row = self.header + 1;
        let Some(first) = self.first_row else {
            return Err(LoadError::EmptySheet {
                path: shown.to_string(),
                sheet,
            });
        };
        if first > self.header || self.last_row < self.header {
            return Err(LoadError::NoHeaderRow {
                path: shown.to_string(),
                sheet,
                row: header_row,
            });
        }
        let body_rows = (self.last_row - self.header) as usize;
        let width = self.names.len().max(self.columns.len());
        self.names.resize(width, String::new());
        self.columns.resize_with(width, ColumnBuilder::default);
        for builder in &mut self.columns {
            while builder.rows() < body_rows {
                builder.push(Cell::Blank);
            }
        }
        let columns = build_columns(shown, self.names, self.columns, header_row)?;
        Ok(Table {
            source,
            sheet,
            header_row,
            columns,
            rows: body_rows,
        })
    }
}
