//! The period of a file from its data: `period from COLUMN` names a column
//! whose dates (the month of each) or period texts (`2026-10`, `Oct 2026`)
//! must all fall in one month. Several months in one file are an error
//! naming the file, the column and the months found, with how many rows of
//! each and the first cell of each: a file is one period's summary, and
//! splitting it silently would hide rows filed in the wrong month.

use std::collections::BTreeMap;

use super::period::{Period, PeriodSource, from_name, order_key};
use crate::load::{Column, ColumnKind, Table};
use crate::recipe::{Recipe, ast::StatementKind};

/// The column `period from COLUMN` names, if the recipe has that line.
pub fn period_column(recipe: &Recipe) -> Option<&str> {
    recipe.statements.iter().find_map(|s| match &s.kind {
        StatementKind::PeriodFrom(c) => Some(c.name.as_str()),
        _ => None,
    })
}

/// The period of one file read for `recipe`, in order of precedence: the
/// column `period from` names, the recipe's `period`, a date in the file's
/// name. With the second value, a warning when the data's period and a date
/// in the name disagree (the data's is used). `Err` names the file and says
/// what to do.
pub fn period_of_file(
    recipe: &Recipe,
    path: &std::path::Path,
    table: &Table,
) -> Result<(Option<Period>, Option<String>), String> {
    let Some(from_data) = period_from_data(recipe, table)? else {
        return Ok((super::period_of(recipe, path)?, None));
    };
    // A name that holds no date, or one that cannot exist, is not used.
    let named = super::period_of(recipe, path).ok().flatten();
    let warning = named
        .filter(|n| n.source == PeriodSource::FileName && month_part(&n.label) != from_data.label)
        .map(|n| {
            format!(
                "warning: {}: the file's name says {} but its data say {}; the period is {1}                  (from the data); rename the file if the name is wrong",
                path.display(),
                n.label,
                from_data.label
            )
        });
    Ok((Some(from_data), warning))
}

/// One month seen in the column: how many rows, and the first one's cell.
struct Seen {
    rows: usize,
    first: String,
}

/// The period of `table` from the column the recipe's `period from` names;
/// None when the recipe has no such line. `Err` says, naming the file and
/// the column, why the column gives no single period.
pub fn period_from_data(recipe: &Recipe, table: &Table) -> Result<Option<Period>, String> {
    let Some(name) = period_column(recipe) else {
        return Ok(None);
    };
    let file = &table.source.path;
    let column = table
        .column(name)
        .ok_or_else(|| format!("{file}: `period from {name}`: the data has no column `{name}`"))?;
    let mut months: BTreeMap<String, Seen> = BTreeMap::new();
    for row in 0..table.rows {
        let Some(label) = month_of_cell(column, row).map_err(|e| {
            format!(
                "{file}: `period from {name}`: cell {} {e}",
                table.address(column, row)
            )
        })?
        else {
            continue;
        };
        months
            .entry(label)
            .or_insert_with(|| Seen {
                rows: 0,
                first: table.address(column, row),
            })
            .rows += 1;
    }
    one_month(months, file, name, column.kind)
}

/// The single month found, or the error listing every month found.
fn one_month(
    months: BTreeMap<String, Seen>,
    file: &str,
    name: &str,
    kind: ColumnKind,
) -> Result<Option<Period>, String> {
    let what = if kind == ColumnKind::Date {
        "dates"
    } else {
        "periods"
    };
    match months.len() {
        0 => Err(format!(
            "{file}: `period from {name}`: the column holds no {what}; \
             name a column with a date or a period in every row, or remove the line \
             to take the period from the file's name"
        )),
        1 => {
            let (label, seen) = months.into_iter().next().expect("one month");
            Ok(Some(Period {
                label,
                source: PeriodSource::DataColumn,
                read_from: Some(format!(
                    "the {what} in column `{name}`, {}",
                    rows(seen.rows)
                )),
            }))
        }
        _ => {
            let mut found: Vec<(String, Seen)> = months.into_iter().collect();
            found.sort_by_key(|(label, _)| order_key(label));
            let listed: Vec<String> = found
                .iter()
                .map(|(label, s)| format!("{label} ({}, first {})", rows(s.rows), s.first))
                .collect();
            Err(format!(
                "{file}: `period from {name}`: the column holds {what} of {} months: {}; \
                 a result covers one period: split the file by month (or correct the rows \
                 filed in the wrong month)",
                found.len(),
                listed.join(", ")
            ))
        }
    }
}

fn rows(n: usize) -> String {
    format!("{n} row{}", if n == 1 { "" } else { "s" })
}

/// The month of one cell (`2026-10`, or `January` for a month without a
/// year); None for a blank cell; `Err` for a cell that names no period.
fn month_of_cell(column: &Column, row: usize) -> Result<Option<String>, String> {
    match column.kind {
        ColumnKind::Date => Ok(column.number(row).map(crate::format::month_label)),
        ColumnKind::Text | ColumnKind::Number => {
            let Some(text) = column.text(row) else {
                return Ok(None);
            };
            match from_name(&text)? {
                Some((label, _)) => Ok(Some(month_part(&label))),
                None => Err(format!(
                    "holds \"{text}\", which names no period; write a date or a period such \
                     as 2026-10 or Oct 2026"
                )),
            }
        }
        ColumnKind::Empty => Ok(None),
        ColumnKind::Bool => Err("is in a column of true/false cells, which name no period".into()),
    }
}

/// `2026-10` from `2026-10-31`; other labels as they are.
fn month_part(label: &str) -> String {
    match label.as_bytes() {
        [_, _, _, _, b'-', _, _, b'-', _, _] => label[..7].to_string(),
        _ => label.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::month_part;

    #[test]
    fn a_day_is_reduced_to_its_month() {
        assert_eq!(month_part("2026-10-31"), "2026-10");
        assert_eq!(month_part("2026-10"), "2026-10");
        assert_eq!(month_part("January"), "January");
    }
}
