//! `inspect` (a file's sheets and columns) and `calc` (one expression).

use std::path::Path;

use super::run::describe_table;
use super::{Exit, Failure, output, paths, summary};
use crate::eval::{self, One, Scope, Value};
use crate::load::{self, LoadOptions};
use crate::recipe;

/// Prints the file's sheets and, per column, its type and problem cells.
pub fn inspect(file: &Path, options: LoadOptions) -> Result<Exit, Failure> {
    paths::check_data_file(file)?;
    let sheets = load::sheet_names(file)?;
    let mut table = match load::load(file, &options) {
        Ok(table) => table,
        Err(e) => {
            // A sheet that is not a table as read: show its top, so the
            // problem can be seen (a damaged file is not read again).
            let shape = matches!(
                e,
                load::LoadError::BlankHeader { .. }
                    | load::LoadError::DuplicateHeader { .. }
                    | load::LoadError::NoHeaderRow { .. }
                    | load::LoadError::EmptySheet { .. }
            );
            if shape && let Ok((sheet, rows)) = load::first_rows(file, &options, PREVIEW_ROWS) {
                output::out(&preview(&sheet, &rows, None))?;
            }
            return Err(e.into());
        }
    };
    // Any text column could be a group key: show its near-duplicate spellings.
    let texts: Vec<String> = table
        .columns
        .iter()
        .filter(|c| c.kind == load::ColumnKind::Text)
        .map(|c| c.name.clone())
        .collect();
    table.find_near_duplicates(&texts, false);
    let sheets: Vec<String> = sheets.iter().map(|s| format!("\"{s}\"")).collect();
    let mut text = format!(
        "{}: {} bytes, SHA-256 {}\nsheets: {}\nsheet \"{}\", header row {}, {} data rows\n\n",
        file.display(),
        table.source.size,
        table.source.sha256,
        sheets.join(", "),
        table.sheet,
        table.header_row,
        table.rows
    );
    text.push_str(&column_listing(&table));
    for note in load::reading_notes(&table) {
        text.push_str(&format!("{}: {}\n", note.topic, note.text));
    }
    if let Ok((sheet, rows)) = load::first_rows(file, &options, PREVIEW_ROWS) {
        text.push('\n');
        text.push_str(&preview(&sheet, &rows, Some(table.header_row as usize)));
    }
    output::out(&text)?;
    Ok(Exit::Ok)
}

/// Per column: its cell, type, count of values, of blank, text and error
/// cells, and the first problem cells; one aligned line each.
fn column_listing(table: &load::Table) -> String {
    let mut lines = vec![[
        "column".to_string(),
        "cell".into(),
        "type".into(),
        "values".into(),
        "blank".into(),
        "text in numbers".into(),
        "errors".into(),
        "first problem cells".into(),
    ]];
    for c in &table.columns {
        let issues = c.issues();
        let count = |k| issues.iter().filter(|i| i.kind == k).count().to_string();
        let first: Vec<String> = issues
            .iter()
            .filter(|i| i.kind != load::IssueKind::Blank)
            .take(3)
            .map(|i| table.address(c, i.row))
            .collect();
        lines.push([
            c.name.clone(),
            load::column_letters(c.sheet_column),
            c.kind.word().into(),
            (table.rows - issues.len()).to_string(),
            count(load::IssueKind::Blank),
            count(load::IssueKind::TextInNumbers),
            count(load::IssueKind::FormulaError),
            first.join(" "),
        ]);
    }
    summary::columns(&lines)
}

/// How many rows from the top `inspect` shows.
const PREVIEW_ROWS: usize = 12;

/// The top rows of a sheet, numbered as a spreadsheet numbers them, with
/// the header row sheaf uses marked.
fn preview(sheet: &str, rows: &[Vec<String>], header_row: Option<usize>) -> String {
    let mut text = format!("first rows of sheet \"{sheet}\"");
    text.push_str(match header_row {
        Some(_) => " (> marks the header row)\n",
        None => "\n",
    });
    for (i, cells) in rows.iter().enumerate() {
        let mark = if header_row == Some(i + 1) { ">" } else { " " };
        let shown: Vec<String> = cells
            .iter()
            .map(|c| {
                let c = c.trim();
                if c.chars().count() > 16 {
                    format!("{}...", c.chars().take(15).collect::<String>())
                } else {
                    c.to_string()
                }
            })
            .collect();
        text.push_str(&format!("{mark}{:>4}  {}\n", i + 1, shown.join(" | ")));
    }
    text
}

/// Prints the expression's value, one line per value; a value that has
/// none prints its reason on standard error and exits [`Exit::NoValue`].
pub fn calc(expression: &str, data: &Path, options: LoadOptions) -> Result<Exit, Failure> {
    paths::check_data_file(data)?;
    let table = load::load(data, &options)?;
    output::detail(&describe_table(&table));
    let expr = recipe::parse_expression(expression, Some(&super::data_columns(&table)))
        .map_err(|d| Failure::new(recipe::render_all(&d, "expression", expression)))?;
    let lets = Default::default();
    let rows: Vec<crate::eval::Row> = (0..table.rows as crate::eval::Row).collect();
    let scope = Scope::new(&table, &lets, &rows);
    let text = match scope.eval(&expr) {
        Value::One(One::Undefined(why)) => return no_value(&why.to_string()),
        Value::One(v) => one_lines(&v),
        Value::Rows(rows) if rows.is_empty() => return no_value("the data has no rows"),
        Value::Rows(rows) => row_lines(&rows),
    };
    output::out_line(&text)?;
    Ok(Exit::Ok)
}

/// A value that has none: the reason on standard error, nothing on standard output.
fn no_value(why: &str) -> Result<Exit, Failure> {
    output::problem(&format!("error: no value: {why}"));
    Ok(Exit::NoValue)
}

/// One value's lines: a number in its shortest exact form, each mode on its own line.
fn one_lines(v: &One) -> String {
    match v {
        One::Number(x) => crate::format::shortest(*x),
        One::Truth(b) => b.to_string(),
        One::Text(t) => t.clone(),
        One::Date(x) => crate::format::date(*x),
        One::List(v) => v
            .iter()
            .map(|x| crate::format::shortest(*x))
            .collect::<Vec<_>>()
            .join("\n"),
        One::Undefined(why) => format!("no value: {why}"),
    }
}

/// A column's lines, one per row, `missing` where a row has no value.
fn row_lines(rows: &eval::Rows) -> String {
    let texts: Vec<String> = match rows {
        eval::Rows::Numbers(v) => v
            .iter()
            .map(|x| x.map_or("missing".into(), crate::format::shortest))
            .collect(),
        eval::Rows::Truths(v) => v
            .iter()
            .map(|x| x.map_or("missing".into(), |b| b.to_string()))
            .collect(),
        eval::Rows::Texts(v) => v
            .iter()
            .map(|x| x.clone().unwrap_or_else(|| "missing".into()))
            .collect(),
        eval::Rows::Dates(v) => v
            .iter()
            .map(|x| x.map_or("missing".into(), crate::format::date))
            .collect(),
    };
    texts.join("\n")
}
