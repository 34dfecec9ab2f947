//! Spreadsheet files through calamine: xlsx, xlsm, xls, xlsb, ods.

use std::path::Path;

use calamine::{Data, DataRef, Reader, Xlsx, open_workbook_auto};

use super::limits;
use super::sheet_cells::{CellIn, SheetCells};
use super::source::SourceInfo;
use super::table::{Cell, Table};
use super::{LoadError, LoadOptions};

fn unreadable(path: &Path, e: impl std::fmt::Display) -> LoadError {
    LoadError::Unreadable {
        path: path.display().to_string(),
        reason: e.to_string(),
    }
}

pub fn sheet_names(path: &Path) -> Result<Vec<String>, LoadError> {
    Ok(open_workbook_auto(path)
        .map_err(|e| unreadable(path, e))?
        .sheet_names())
}

/// The first `n` rows of a sheet (the options' or the first) as texts, for
/// `inspect`. xlsx and xlsm stream their cells and stop after row `n`; xls
/// and ods are read as a range, as their loader reads them.
pub fn first_rows(
    path: &Path,
    options: &LoadOptions,
    n: usize,
) -> Result<(String, Vec<Vec<String>>), LoadError> {
    let shown = path.display().to_string();
    let mut rows: Vec<Vec<String>> = Vec::new();
    let mut put = |row: usize, column: usize, text: String| {
        if rows.len() <= row {
            rows.resize(row + 1, Vec::new());
        }
        let cells = &mut rows[row];
        if cells.len() <= column {
            cells.resize(column + 1, String::new());
        }
        cells[column] = text;
    };
    if is_streamable(path) {
        let mut workbook: Xlsx<_> =
            calamine::open_workbook(path).map_err(|e| unreadable(path, e))?;
        let sheet = choose_sheet(&workbook.sheet_names(), options, &shown)?;
        let mut reader = workbook
            .worksheet_cells_reader(&sheet)
            .map_err(|e| unreadable(path, e))?;
        while let Some(cell) = reader.next_cell().map_err(|e| unreadable(path, e))? {
            let (row, column) = cell.get_position();
            limits::check_cell(&shown, &sheet, row, column)?;
            if row as usize >= n {
                break;
            }
            put(
                row as usize,
                column as usize,
                Data::from(cell.get_value().clone()).to_string(),
            );
        }
        return Ok((sheet, rows));
    }
    let mut workbook = open_workbook_auto(path).map_err(|e| unreadable(path, e))?;
    let sheet = choose_sheet(&workbook.sheet_names(), options, &shown)?;
    let range = workbook
        .worksheet_range(&sheet)
        .map_err(|e| unreadable(path, e))?;
    let (top, left) = range.start().unwrap_or((0, 0));
    for (row, column, data) in range.used_cells() {
        let row = top as usize + row;
        if row < n {
            put(row, left as usize + column, data.to_string());
        }
    }
    Ok((sheet, rows))
}

/// xlsx and xlsm: cells can be streamed in row order.
fn is_streamable(path: &Path) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("xlsx") || e.eq_ignore_ascii_case("xlsm"))
}

fn cell_of(data: &Data) -> Cell {
    match data {
        Data::Int(i) => Cell::Number(*i as f64),
        Data::Float(x) if x.is_finite() => Cell::Number(*x),
        Data::Float(_) => Cell::Error("#NUM!".into()),
        Data::String(s) => Cell::from_text(s),
        Data::Bool(b) => Cell::Bool(*b),
        Data::DateTime(d) if d.is_datetime() => Cell::Date(d.as_f64()),
        Data::DateTime(d) => Cell::Number(d.as_f64()),
        Data::DateTimeIso(s) => {
            crate::format::serial_from_iso(s).map_or_else(|| Cell::Text(s.clone()), Cell::Date)
        }
        Data::DurationIso(s) => Cell::Text(s.clone()),
        Data::Error(e) => Cell::Error(e.to_string()),
        Data::Empty => Cell::Blank,
    }
}

/// Most bytes the parts of a zipped workbook (xlsx, ods) may unpack to;
/// beyond it the file is refused before calamine inflates anything.
pub const MAX_UNPACKED: u64 = 4 << 30;
/// Most bytes a zipped workbook may unpack to per byte of the file, unless
/// `SHEAF_MAX_UNPACK_RATIO` says otherwise. Reading takes up to about 2.5
/// bytes of memory per unpacked byte (a cell of `<c><v>1</v></c>` is 15
/// bytes and up to 32 in memory), so this keeps a small file within about
/// 100 times its size. Real exports unpack 2 to 10 times; only highly
/// repetitive sheets come near 40.
pub const MAX_UNPACK_RATIO: u64 = 40;
/// Unpacked bytes allowed whatever the ratio: small workbooks are never
/// refused for compressing well.
const RATIO_FREE_BYTES: u64 = 24 << 20;

/// Refuses a zipped workbook whose parts would unpack to more than
/// [`MAX_UNPACKED`] bytes or, beyond [`RATIO_FREE_BYTES`], to more than
/// [`MAX_UNPACK_RATIO`] times the file's size: a zip bomb, or a sheet of
/// millions of repeated cells that would take far more memory than its
/// file suggests. The sizes come from the zip directory, so nothing is
/// inflated to judge.
fn refuse_zip_bombs(path: &Path) -> Result<(), LoadError> {
    let Ok(file) = std::fs::File::open(path) else {
        return Ok(());
    };
    let mut head = [0u8; 4];
    if std::io::Read::read_exact(&mut &file, &mut head).is_err() || &head != b"PK\x03\x04" {
        return Ok(()); // not a zip (xls is an OLE file): calamine judges it
    }
    let size = file.metadata().map(|m| m.len()).unwrap_or(0).max(1);
    let mut archive = zip::ZipArchive::new(file)
        .map_err(|e| unreadable(path, format!("the file is not a complete workbook ({e})")))?;
    let mut total = 0u64;
    for i in 0..archive.len() {
        if let Ok(entry) = archive.by_index_raw(i) {
            total = total.saturating_add(entry.size());
        }
    }
    if total > MAX_UNPACKED {
        return Err(unreadable(
            path,
            format!(
                "the workbook would unpack to {total} bytes, more than the {MAX_UNPACKED} sheaf reads; refused as a likely zip bomb"
            ),
        ));
    }
    let most_ratio = super::limits::limit("SHEAF_MAX_UNPACK_RATIO", MAX_UNPACK_RATIO);
    if total > RATIO_FREE_BYTES && total / size > most_ratio {
        return Err(unreadable(
            path,
            format!(
                "the workbook would unpack to {total} bytes, {} times its {size} bytes (sheaf reads up to {most_ratio} times, beyond {} MB): a zip bomb, or a sheet of millions of repeated cells that would take far more memory than the file suggests. If the file is honest, export it as CSV, or set SHEAF_MAX_UNPACK_RATIO to a larger number",
                total / size,
                RATIO_FREE_BYTES >> 20
            ),
        ));
    }
    Ok(())
}

pub fn load(path: &Path, source: SourceInfo, options: &LoadOptions) -> Result<Table, LoadError> {
    refuse_zip_bombs(path)?;
    // A damaged file must end in an error, never a crash or a hang, even if
    // the reading library trips over it.
    let (owned, options) = (path.to_path_buf(), options.clone());
    limits::guarded(path, move || read(&owned, source, &options))
}

fn read(path: &Path, source: SourceInfo, options: &LoadOptions) -> Result<Table, LoadError> {
    let shown = path.display().to_string();
    if is_streamable(path)
        && let Some((sheet, cells)) = stream_cells(path, options, &shown)?
    {
        return cells.finish(&shown, sheet, source, options);
    }
    let (sheet, cells) = range_cells(path, options, &shown)?;
    cells.finish(&shown, sheet, source, options)
}

/// An xlsx sheet's cells as they stream from the file; None when its rows
/// are out of order (allowed, if rare), for the whole range to be read instead.
fn stream_cells(
    path: &Path,
    options: &LoadOptions,
    shown: &str,
) -> Result<Option<(String, SheetCells)>, LoadError> {
    let mut workbook: Xlsx<_> = calamine::open_workbook(path).map_err(|e| unreadable(path, e))?;
    let sheet = choose_sheet(&workbook.sheet_names(), options, shown)?;
    let mut cells = SheetCells::new(options);
    let mut reader = workbook
        .worksheet_cells_reader(&sheet)
        .map_err(|e| unreadable(path, e))?;
    while let Some(cell) = reader.next_cell().map_err(|e| unreadable(path, e))? {
        let (row, column) = cell.get_position();
        limits::check_cell(shown, &sheet, row, column)?;
        let value = cell.get_value();
        if *value == DataRef::Empty {
            continue;
        }
        let cell = match value {
            // Shared strings are pushed as borrowed text, not copied per cell.
            DataRef::SharedString(s) => CellIn::Text(s),
            DataRef::String(s) => CellIn::Text(s),
            other => CellIn::Other(cell_of(&Data::from(other.clone()))),
        };
        if cells.add(row, column, cell).is_err() {
            limits::check_xlsx_range(path, &sheet)?;
            return Ok(None);
        }
    }
    Ok(Some((sheet, cells)))
}

/// A sheet's cells from calamine's whole range (xls, ods, and xlsx out of order).
fn range_cells(
    path: &Path,
    options: &LoadOptions,
    shown: &str,
) -> Result<(String, SheetCells), LoadError> {
    let mut workbook = open_workbook_auto(path).map_err(|e| unreadable(path, e))?;
    let sheet = choose_sheet(&workbook.sheet_names(), options, shown)?;
    let range = workbook
        .worksheet_range(&sheet)
        .map_err(|e| unreadable(path, e))?;
    let (top, left) = range.start().unwrap_or((0, 0));
    let mut cells = SheetCells::new(options);
    for (row, column, data) in range.used_cells() {
        let (row, column) = (top + row as u32, left + column as u32);
        limits::check_cell(shown, &sheet, row, column)?;
        let cell = match data {
            Data::String(s) => CellIn::Text(s),
            other => CellIn::Other(cell_of(other)),
        };
        cells
            .add(row, column, cell)
            .expect("a range's used cells come in row order");
    }
    Ok((sheet, cells))
}

/// The sheet the options name, or the first.
fn choose_sheet(names: &[String], options: &LoadOptions, shown: &str) -> Result<String, LoadError> {
    match &options.sheet {
        Some(wanted) => {
            names
                .iter()
                .find(|n| *n == wanted)
                .cloned()
                .ok_or_else(|| LoadError::NoSuchSheet {
                    path: shown.to_string(),
                    sheet: wanted.clone(),
                    available: names
                        .iter()
                        .map(|n| format!("\"{n}\""))
                        .collect::<Vec<_>>()
                        .join(", "),
                })
        }
        None => names.first().cloned().ok_or_else(|| LoadError::EmptySheet {
            path: shown.to_string(),
            sheet: "(none)".into(),
        }),
    }
}
