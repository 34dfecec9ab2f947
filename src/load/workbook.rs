//! Spreadsheet files through calamine: xlsx, xlsm, xls, xlsb, ods.

use std::path::Path;

use calamine::{Data, Reader, open_workbook_auto};

use super::column::ColumnBuilder;
use super::csv_file::build_columns;
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

fn cell(data: &Data) -> Cell {
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

/// Most bytes the parts of a zipped workbook (xlsx, ods) may unpack to, and
/// the largest unpacking ratio of a big part: beyond either it is refused
/// as a likely zip bomb before calamine inflates anything.
pub const MAX_UNPACKED: u64 = 4 << 30;
const MAX_RATIO: u64 = 200;
const RATIO_CHECKED_ABOVE: u64 = 64 << 20;

fn refuse_zip_bombs(path: &Path) -> Result<(), LoadError> {
    let Ok(file) = std::fs::File::open(path) else {
        return Ok(());
    };
    let mut head = [0u8; 4];
    if std::io::Read::read_exact(&mut &file, &mut head).is_err() || &head != b"PK\x03\x04" {
        return Ok(()); // not a zip (xls is an OLE file): calamine judges it
    }
    let mut archive = zip::ZipArchive::new(file)
        .map_err(|e| unreadable(path, format!("the file is not a complete workbook ({e})")))?;
    let mut total = 0u64;
    for i in 0..archive.len() {
        let Ok(entry) = archive.by_index_raw(i) else {
            continue;
        };
        let (packed, unpacked) = (entry.compressed_size().max(1), entry.size());
        total = total.saturating_add(unpacked);
        if unpacked > RATIO_CHECKED_ABOVE && unpacked / packed > MAX_RATIO {
            return Err(unreadable(
                path,
                format!(
                    "part {} would unpack {} times its size ({unpacked} bytes); refused as a likely zip bomb",
                    entry.name().unwrap_or_default(),
                    unpacked / packed
                ),
            ));
        }
    }
    if total > MAX_UNPACKED {
        return Err(unreadable(
            path,
            format!(
                "the workbook would unpack to {total} bytes, more than the {MAX_UNPACKED} sheaf reads"
            ),
        ));
    }
    Ok(())
}

pub fn load(path: &Path, source: SourceInfo, options: &LoadOptions) -> Result<Table, LoadError> {
    refuse_zip_bombs(path)?;
    // A damaged file must end in an error, never a crash, even if the
    // reading library trips over it.
    std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| read(path, source, options)))
        .unwrap_or_else(|_| Err(unreadable(path, "the workbook is damaged and could not be read; open and save it again, or export it as CSV")))
}

fn read(path: &Path, source: SourceInfo, options: &LoadOptions) -> Result<Table, LoadError> {
    let shown = path.display().to_string();
    let mut workbook = open_workbook_auto(path).map_err(|e| unreadable(path, e))?;
    let names = workbook.sheet_names();
    let sheet = match &options.sheet {
        Some(wanted) => names
            .iter()
            .find(|n| *n == wanted)
            .cloned()
            .ok_or_else(|| LoadError::NoSuchSheet {
                path: shown.clone(),
                sheet: wanted.clone(),
                available: names
                    .iter()
                    .map(|n| format!("\"{n}\""))
                    .collect::<Vec<_>>()
                    .join(", "),
            })?,
        None => names
            .first()
            .cloned()
            .ok_or_else(|| LoadError::EmptySheet {
                path: shown.clone(),
                sheet: "(none)".into(),
            })?,
    };
    let range = workbook
        .worksheet_range(&sheet)
        .map_err(|e| unreadable(path, e))?;
    let Some((top, left)) = range.start() else {
        return Err(LoadError::EmptySheet { path: shown, sheet });
    };
    let header_row = options.header_row.unwrap_or(1);
    // calamine's range starts at the first used cell; sheet rows are 1-based.
    let header_index = header_row as i64 - 1 - i64::from(top);
    if header_index < 0 || header_index as usize >= range.height() {
        return Err(LoadError::NoHeaderRow {
            path: shown,
            sheet,
            row: header_row,
        });
    }
    let header_index = header_index as usize;
    let width = range.width() + left as usize;
    let body_rows = range.height() - header_index - 1;
    let mut names_in_sheet = vec![String::new(); width];
    let mut grid: Vec<ColumnBuilder> = (0..width).map(|_| ColumnBuilder::default()).collect();
    let left = left as usize;
    for (r, row) in range.rows().enumerate().skip(header_index) {
        if r == header_index {
            for (c, data) in row.iter().enumerate() {
                names_in_sheet[c + left] = match data {
                    Data::Empty => String::new(),
                    other => other.to_string().trim().to_string(),
                };
            }
            continue;
        }
        // Columns left of the used range are blank.
        grid[..left].iter_mut().for_each(|b| b.push(Cell::Blank));
        for (builder, data) in grid[left..].iter_mut().zip(row) {
            builder.push(cell(data));
        }
    }
    let columns = build_columns(&shown, names_in_sheet, grid, header_row)?;
    Ok(Table {
        source,
        sheet,
        header_row,
        columns,
        rows: body_rows,
    })
}
