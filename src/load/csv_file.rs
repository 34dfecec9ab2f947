//! CSV and TSV: delimiter and UTF-8 byte-order mark detected; each field
//! typed as a number, or kept as text.

use std::io::Read;
use std::path::Path;

use super::column::{Column, ColumnBuilder, ColumnKind, MAX_ROWS};
use super::limits::Bounded;
use super::source::Hashing;
use super::table::{Cell, Table, cell_address};
use super::{LoadError, LoadOptions};

/// The pseudo-sheet name of a CSV file: its name without the ending.
pub fn sheet_name(path: &Path) -> String {
    path.file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "data".into())
}

/// The most frequent of `,` `;` tab `|` in the first line, outside quotes.
fn detect_delimiter(text: &str) -> u8 {
    let first = text.lines().next().unwrap_or("");
    let mut counts = [(b',', 0), (b';', 0), (b'\t', 0), (b'|', 0)];
    let mut quoted = false;
    for byte in first.bytes() {
        if byte == b'"' {
            quoted = !quoted;
        } else if !quoted && let Some(entry) = counts.iter_mut().find(|(d, _)| *d == byte) {
            entry.1 += 1;
        }
    }
    counts
        .iter()
        .max_by_key(|(_, n)| *n)
        .filter(|(_, n)| *n > 0)
        .map_or(b',', |(d, _)| *d)
}

/// Adds a field to its column: a number if it reads as one (infinities and
/// NaN do not count), otherwise as text, blank or a spreadsheet error code.
fn push_field(column: &mut ColumnBuilder, field: &str) {
    match field.trim().parse::<f64>() {
        Ok(x) if x.is_finite() => column.push(Cell::Number(x)),
        _ => column.push_text(field),
    }
}

/// The first bytes of the file, enough to see its first line.
const HEAD_BYTES: u64 = 1 << 16;

/// Reads a CSV or TSV file as it streams past: only the columns are kept.
pub fn load(path: &Path, options: &LoadOptions) -> Result<Table, LoadError> {
    let shown = path.display().to_string();
    let file = std::fs::File::open(path).map_err(|e| LoadError::Unreadable {
        path: shown.clone(),
        reason: e.to_string(),
    })?;
    let mut hashing = Hashing::new(std::io::BufReader::with_capacity(1 << 20, file));
    let mut head = Vec::new();
    (&mut hashing)
        .take(HEAD_BYTES)
        .read_to_end(&mut head)
        .map_err(|e| LoadError::Unreadable {
            path: shown.clone(),
            reason: e.to_string(),
        })?;
    if head.starts_with(b"\xEF\xBB\xBF") {
        head.drain(..3);
    }
    let delimiter = detect_delimiter(&String::from_utf8_lossy(&head));
    let mut input = Bounded::new(std::io::Cursor::new(head).chain(hashing), &shown, delimiter);
    let (sheet, header_row, columns, rows) = read_records(&mut input, delimiter, &shown, options)?;
    let (_, hashing) = input.into_inner().into_inner();
    Ok(Table {
        source: hashing.finish(path),
        sheet,
        header_row,
        columns,
        rows,
    })
}

/// A sheet's name, header row, columns and count of data rows.
type Parts = (String, u32, Vec<Column>, usize);

/// The records of a CSV file as columns.
fn read_records(
    input: impl Read,
    delimiter: u8,
    path: &str,
    options: &LoadOptions,
) -> Result<Parts, LoadError> {
    let path = path.to_string();
    let sheet = sheet_name(Path::new(&path));
    if options.sheet.as_ref().is_some_and(|s| s != &sheet) {
        return Err(LoadError::NoSuchSheet {
            path,
            sheet: options.sheet.clone().unwrap(),
            available: format!("\"{sheet}\" (a CSV file has one sheet, named after the file)"),
        });
    }
    let header_row = options.header_row.unwrap_or(1);
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .has_headers(false)
        .flexible(true)
        .from_reader(input);
    // Stream the records into columns: only the header rows are kept whole.
    let mut header: Option<csv::StringRecord> = None;
    let mut grid: Vec<ColumnBuilder> = Vec::new();
    let (mut seen, mut body_rows) = (0usize, 0usize);
    let mut record = csv::StringRecord::new();
    loop {
        match reader.read_record(&mut record) {
            Ok(false) => break,
            Ok(true) => {}
            Err(e) => {
                let reason = match e.kind() {
                    csv::ErrorKind::Utf8 { pos, .. } => format!(
                        "line {} is not UTF-8 text; save the file as UTF-8 and run again",
                        pos.as_ref().map_or(seen + 1, |p| p.line() as usize)
                    ),
                    _ => e.to_string(),
                };
                return Err(LoadError::Malformed {
                    path: path.clone(),
                    reason,
                });
            }
        }
        seen += 1;
        if seen < header_row as usize {
            continue;
        }
        if seen == header_row as usize {
            grid = (0..record.len())
                .map(|_| ColumnBuilder::default())
                .collect();
            header = Some(record.clone());
            continue;
        }
        if body_rows == MAX_ROWS {
            return Err(LoadError::Malformed {
                path: path.clone(),
                reason: format!(
                    "more than {MAX_ROWS} data rows; split the file or filter it before reading"
                ),
            });
        }
        while record.len() > grid.len() {
            grid.push(ColumnBuilder::blanks(body_rows));
        }
        for (c, column) in grid.iter_mut().enumerate() {
            push_field(column, record.get(c).unwrap_or(""));
        }
        body_rows += 1;
    }
    if seen == 0 {
        return Err(LoadError::EmptySheet { path, sheet });
    }
    let Some(header) = header else {
        return Err(LoadError::NoHeaderRow {
            path,
            sheet,
            row: header_row,
        });
    };
    let width = grid.len();
    let names: Vec<String> = (0..width)
        .map(|c| header.get(c).unwrap_or("").trim().to_string())
        .collect();
    let columns = build_columns(&path, names, grid, header_row)?;
    Ok((sheet, header_row, columns, body_rows))
}

/// Named columns from header names and cells, refusing blank and duplicate headers.
pub fn build_columns(
    path: &str,
    names: Vec<String>,
    grid: Vec<ColumnBuilder>,
    header_row: u32,
) -> Result<Vec<Column>, LoadError> {
    let mut columns: Vec<Column> = Vec::new();
    let mut seen: std::collections::HashMap<String, u32> = std::collections::HashMap::new();
    for (index, (name, cells)) in names.into_iter().zip(grid).enumerate() {
        let column = cells.finish(name.clone(), index as u32);
        if name.is_empty() {
            if column.kind == ColumnKind::Empty {
                continue;
            }
            return Err(LoadError::BlankHeader {
                path: path.to_string(),
                address: cell_address(index as u32, header_row as usize),
            });
        }
        if let Some(&first) = seen.get(&name) {
            return Err(LoadError::DuplicateHeader {
                path: path.to_string(),
                name,
                first: cell_address(first, header_row as usize),
                second: cell_address(index as u32, header_row as usize),
            });
        }
        seen.insert(name, index as u32);
        columns.push(column);
    }
    Ok(columns)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table(text: &str) -> Result<Table, LoadError> {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("deliveries.csv");
        std::fs::write(&path, text).unwrap();
        load(&path, &LoadOptions::default())
    }

    #[test]
    fn delimiters_and_byte_order_mark() {
        assert_eq!(detect_delimiter("a;b;c\n1;2;3"), b';');
        assert_eq!(detect_delimiter("a\tb\n"), b'\t');
        assert_eq!(detect_delimiter("\"x;y\",b\n"), b',');
        let t = table("\u{feff}depot;weight\nNorth;2,5\nSouth;3\n").unwrap();
        assert_eq!(t.headers(), ["depot", "weight"]);
        let weight = &t.columns[1];
        assert_eq!(
            (weight.text(0).as_deref(), weight.number(1)),
            (Some("2,5"), Some(3.0))
        );
    }

    #[test]
    fn ragged_rows_are_padded_with_blanks_and_addressed() {
        let t = table("depot,weight,note\nNorth,2\nSouth,n/a,x\n").unwrap();
        let weight = t.column("weight").unwrap();
        assert_eq!(weight.kind, super::super::ColumnKind::Number);
        let issues = weight.issues();
        assert_eq!(issues.len(), 1);
        assert_eq!(t.address(weight, issues[0].row), "deliveries!B3");
        assert_eq!(
            t.column("note").unwrap().issues()[0].kind,
            super::super::IssueKind::Blank
        );
    }

    #[test]
    fn bad_headers_are_refused_with_their_cells() {
        let e = table("a,a\n1,2\n").unwrap_err().to_string();
        assert!(e.contains("\"a\" appears twice, at A1 and B1"), "{e}");
        let e = table("a,,c\n1,2,3\n").unwrap_err().to_string();
        assert!(e.contains("header B1 is blank"), "{e}");
        assert!(table("a,,c\n1,,3\n").is_ok());
        assert!(table("").unwrap_err().to_string().contains("is empty"));
    }
}
