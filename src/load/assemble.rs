//! The last step of every loader: header names and column builders to a
//! [`Table`]. Every format goes through here, so they agree on blank and
//! duplicate headers, accepted header names, numbers stored as text, rows
//! that are not data.

use super::column::{Column, ColumnBuilder, ColumnKind};
use super::numbers::StyleEvidence;
use super::rows::find_not_data;
use super::source::SourceInfo;
use super::table::{ReadNotes, SummaryRow, Table, cell_address};
use super::{LoadError, LoadOptions};

/// A sheet read so far: its name, header row, header texts and one builder
/// per column, every builder holding `rows` cells.
pub struct Parts {
    pub sheet: String,
    /// 1-based.
    pub header_row: u32,
    pub names: Vec<String>,
    pub builders: Vec<ColumnBuilder>,
    pub rows: usize,
    pub notes: ReadNotes,
}

/// Whether text cells may hold numbers to be read (workbooks), or every
/// field was already read in the file's number style (CSV).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TextCells {
    MayHoldNumbers,
    AlreadyRead,
}

/// Builds the table: columns typed, headers checked, rows that are not data
/// left out, and everything decided written into the notes.
pub fn table(
    path: &str,
    mut parts: Parts,
    text_cells: TextCells,
    options: &LoadOptions,
    source: SourceInfo,
) -> Result<Table, LoadError> {
    let style = (text_cells == TextCells::MayHoldNumbers).then(|| {
        let mut evidence = StyleEvidence::default();
        for builder in &parts.builders {
            builder.for_each_text(|t| evidence.see(t));
        }
        evidence.decide(&options.number_style)
    });
    let mut columns = build_columns(
        path,
        parts.names,
        parts.builders,
        parts.header_row,
        style.as_ref().map(|s| &s.style),
    )?;
    if let Some(detected) = &style
        && columns.iter().any(|c| c.converted().count > 0)
    {
        parts.notes.number_style = Some(detected.style.describe());
        parts.notes.number_doubt = detected.doubt.clone();
    }
    parts.notes.renamed_headers =
        apply_accepted_names(path, &mut columns, options, parts.header_row)?;
    let mut rows = parts.rows;
    let not_data = find_not_data(&columns, rows);
    let first_data_row = parts.header_row as usize + 1;
    parts.notes.blank_rows = not_data.blank.iter().map(|r| first_data_row + r).collect();
    parts.notes.summary_rows = not_data
        .summary
        .iter()
        .map(|(r, reason)| SummaryRow {
            sheet_row: first_data_row + r,
            reason: reason.clone(),
        })
        .collect();
    parts.notes.summary_rows_kept = options.keep_summary_rows && !not_data.summary.is_empty();
    let mut left_out = not_data.blank.clone();
    if !options.keep_summary_rows {
        left_out.extend(not_data.summary.iter().map(|(r, _)| *r));
    }
    let mut row_map = Vec::new();
    if !left_out.is_empty() {
        let mut keep = vec![true; rows];
        left_out.iter().for_each(|&r| keep[r] = false);
        let mut new_row = Vec::with_capacity(rows);
        for (row, &kept) in keep.iter().enumerate() {
            if kept {
                new_row.push(Some(row_map.len() as u32));
                row_map.push(row as u32);
            } else {
                new_row.push(None);
            }
        }
        columns.iter_mut().for_each(|c| c.keep_rows(&new_row));
        rows = row_map.len();
    }
    Ok(Table {
        source,
        sheet: parts.sheet,
        header_row: parts.header_row,
        columns,
        rows,
        row_map,
        notes: parts.notes,
    })
}

/// Named columns from header names and cells, refusing blank and duplicate headers.
fn build_columns(
    path: &str,
    names: Vec<String>,
    grid: Vec<ColumnBuilder>,
    header_row: u32,
    text_numbers: Option<&super::numbers::NumberStyle>,
) -> Result<Vec<Column>, LoadError> {
    let mut columns: Vec<Column> = Vec::new();
    let mut seen: std::collections::HashMap<String, u32> = std::collections::HashMap::new();
    for (index, (name, cells)) in names.into_iter().zip(grid).enumerate() {
        let column = cells.finish(name.clone(), index as u32, text_numbers);
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

/// Renames columns whose header is one of a recipe column's accepted names
/// (`header weight_mg or {Weight (mg)} or {Weight [mg]}`) to the recipe's
/// name. Two accepted names of one column both in the file is an error:
/// sheaf cannot know which one the recipe means.
fn apply_accepted_names(
    path: &str,
    columns: &mut [Column],
    options: &LoadOptions,
    header_row: u32,
) -> Result<Vec<(String, String)>, LoadError> {
    let mut renamed = Vec::new();
    for names in &options.accepted_names {
        let Some(wanted) = names.first() else {
            continue;
        };
        let present: Vec<usize> = columns
            .iter()
            .enumerate()
            .filter(|(_, c)| names.contains(&c.name))
            .map(|(i, _)| i)
            .collect();
        match present.as_slice() {
            [] => {}
            [only] => {
                let column = &mut columns[*only];
                if column.name != *wanted {
                    renamed.push((wanted.clone(), column.name.clone()));
                    column.name = wanted.clone();
                }
            }
            [first, second, ..] => {
                let address = |i: usize| {
                    format!(
                        "{} (\"{}\")",
                        cell_address(columns[i].sheet_column, header_row as usize),
                        columns[i].name
                    )
                };
                return Err(LoadError::Malformed {
                    path: path.to_string(),
                    reason: format!(
                        "two headers are accepted names of the recipe's column `{wanted}`: {} and {}; keep one of them in the file, or drop one name from the recipe's `header` line",
                        address(*first),
                        address(*second)
                    ),
                });
            }
        }
    }
    Ok(renamed)
}
