//! Assembles a sheet's non-empty cells, given in row order, into columns
//! under a header row. Both workbook paths (streamed xlsx cells and
//! calamine's ranges for xls and ods) go through it, so they agree on where
//! the data starts and ends: from the header row to the last row with a
//! non-empty cell. When the recipe does not fix the header row, the first
//! rows wait until it is found.

use super::assemble::{self, Parts, TextCells};
use super::column::ColumnBuilder;
use super::header::{self, TopRow};
use super::source::SourceInfo;
use super::table::{Cell, ReadNotes, Table};
use super::{LoadError, LoadOptions};

/// A cell as a reader hands it over: text borrowed (shared strings are not
/// copied per cell), anything else as a [`Cell`].
pub enum CellIn<'a> {
    Text(&'a str),
    Other(Cell),
}

impl CellIn<'_> {
    fn owned(self) -> Cell {
        match self {
            CellIn::Text(t) => Cell::from_text(t),
            CellIn::Other(c) => c,
        }
    }

    fn header_text(&self) -> String {
        match self {
            CellIn::Text(t) => t.trim().to_string(),
            CellIn::Other(Cell::Number(x)) => crate::format::shortest(*x),
            CellIn::Other(Cell::Date(x)) => crate::format::date(*x),
            CellIn::Other(Cell::Bool(b)) => b.to_string(),
            CellIn::Other(Cell::Text(t) | Cell::Error(t)) => t.trim().to_string(),
            CellIn::Other(Cell::Blank) => String::new(),
        }
    }

    fn push_to(self, builder: &mut ColumnBuilder) {
        match self {
            CellIn::Text(t) => builder.push_text(t),
            CellIn::Other(c) => builder.push(c),
        }
    }
}

pub struct SheetCells {
    /// 0-based sheet row of the headers, once known.
    header: Option<u32>,
    names: Vec<String>,
    columns: Vec<ColumnBuilder>,
    first_row: Option<u32>,
    last_row: u32,
    /// The top rows, while the header row is still to be found.
    waiting: Vec<TopRow>,
    notes: ReadNotes,
}

/// A cell came before one already taken: the rows are not in order.
#[derive(Debug)]
pub struct OutOfOrder;

impl SheetCells {
    pub fn new(options: &LoadOptions) -> SheetCells {
        SheetCells {
            header: options.header_row.map(|h| h.saturating_sub(1)),
            names: Vec::new(),
            columns: Vec::new(),
            first_row: None,
            last_row: 0,
            waiting: Vec::new(),
            notes: ReadNotes::default(),
        }
    }

    /// Takes the non-empty cell at 0-based (row, column).
    pub fn add(&mut self, row: u32, column: u32, cell: CellIn<'_>) -> Result<(), OutOfOrder> {
        if self.first_row.is_some_and(|first| row < first) || row < self.last_row {
            return Err(OutOfOrder);
        }
        self.first_row.get_or_insert(row);
        self.last_row = row;
        let Some(header) = self.header else {
            return self.wait(row, column, cell.owned());
        };
        let column = column as usize;
        if row == header {
            if self.names.len() <= column {
                self.names.resize(column + 1, String::new());
            }
            self.names[column] = cell.header_text();
        } else if row > header {
            let body_row = (row - header - 1) as usize;
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
            cell.push_to(builder);
        }
        Ok(())
    }

    /// Keeps a top cell until enough rows are in to find the header.
    fn wait(&mut self, row: u32, column: u32, cell: Cell) -> Result<(), OutOfOrder> {
        if let Some((r, cells)) = self.waiting.last_mut()
            && *r == row
        {
            cells.push((column, cell));
        } else if self.waiting.len() == header::ROWS_LOOKED_AT {
            self.settle_header()?;
            return self.add(row, column, CellIn::Other(cell));
        } else {
            self.waiting.push((row, vec![(column, cell)]));
        }
        Ok(())
    }

    /// Finds the header among the waiting rows and takes them in.
    fn settle_header(&mut self) -> Result<(), OutOfOrder> {
        let found = header::find(&self.waiting);
        self.notes.header = found.as_ref().and_then(|f| f.note.clone());
        self.header = Some(found.map_or(0, |f| f.row));
        // The waiting rows are taken again, in order, from the top.
        let last_row = self.last_row;
        (self.first_row, self.last_row) = (None, 0);
        for (row, cells) in std::mem::take(&mut self.waiting) {
            for (column, cell) in cells {
                self.add(row, column, CellIn::Other(cell))?;
            }
        }
        self.last_row = self.last_row.max(last_row);
        Ok(())
    }

    pub fn finish(
        mut self,
        shown: &str,
        sheet: String,
        source: SourceInfo,
        options: &LoadOptions,
    ) -> Result<Table, LoadError> {
        if self.header.is_none() {
            self.settle_header().expect("waiting rows are in order");
        }
        let header = self.header.unwrap_or(0);
        let header_row = header + 1;
        let Some(first) = self.first_row else {
            return Err(LoadError::EmptySheet {
                path: shown.to_string(),
                sheet,
            });
        };
        if first > header || self.last_row < header {
            return Err(LoadError::NoHeaderRow {
                path: shown.to_string(),
                sheet,
                row: header_row,
            });
        }
        let body_rows = (self.last_row - header) as usize;
        let width = self.names.len().max(self.columns.len());
        self.names.resize(width, String::new());
        self.columns.resize_with(width, ColumnBuilder::default);
        for builder in &mut self.columns {
            while builder.rows() < body_rows {
                builder.push(Cell::Blank);
            }
        }
        let parts = Parts {
            sheet,
            header_row,
            names: self.names,
            builders: self.columns,
            rows: body_rows,
            notes: self.notes,
        };
        assemble::table(shown, parts, TextCells::MayHoldNumbers, options, source)
    }
}
