//! Reading a file for a recipe: the sheet that holds the recipe's columns
//! when the recipe names none, and a clear stop when a column the recipe
//! uses as numbers arrived as text.

use std::path::Path;

use super::column::ColumnKind;
use super::numbers::NumberStyle;
use super::table::Table;
use super::{LoadError, LoadOptions};

/// What a recipe reads from the data.
#[derive(Debug, Clone, Default)]
pub struct Wanted {
    /// Every data column it reads.
    pub columns: Vec<String>,
    /// Those it uses as numbers, each with the recipe line that first does.
    pub numeric: Vec<(String, usize)>,
    /// Those it groups by.
    pub keys: Vec<String>,
}

/// Loads the file for a recipe. With no sheet named, a first sheet that
/// lacks the recipe's columns gives way to the one other sheet that has
/// them all (said in the notes).
pub fn load_for(path: &Path, options: &LoadOptions, wanted: &Wanted) -> Result<Table, LoadError> {
    let first = super::load(path, options)?;
    let lacks = |t: &Table| {
        wanted
            .columns
            .iter()
            .filter(|c| t.column(c).is_none())
            .cloned()
            .collect::<Vec<_>>()
    };
    let missing = lacks(&first);
    let mut table = if options.sheet.is_some() || missing.is_empty() {
        first
    } else {
        other_sheet_with_columns(path, options, first, &missing, &lacks)?
    };
    refuse_text_numbers(path, &table, wanted)?;
    table.find_near_duplicates(&wanted.keys, options.merge_similar_keys);
    Ok(table)
}

fn other_sheet_with_columns(
    path: &Path,
    options: &LoadOptions,
    first: Table,
    missing: &[String],
    lacks: &dyn Fn(&Table) -> Vec<String>,
) -> Result<Table, LoadError> {
    let mut holding: Vec<Table> = Vec::new();
    for name in super::sheet_names(path)? {
        if name == first.sheet {
            continue;
        }
        let named = LoadOptions {
            sheet: Some(name),
            ..options.clone()
        };
        if let Ok(table) = super::load(path, &named)
            && lacks(&table).is_empty()
        {
            holding.push(table);
        }
    }
    match holding.len() {
        0 => Ok(first),
        1 => {
            let mut table = holding.pop().expect("one sheet");
            table.notes.sheet = Some(format!(
                "the recipe names no sheet and the first sheet \"{}\" lacks {}; sheet \"{}\" has every column the recipe reads, so it was read (to say so in the recipe, add `input sheet \"{}\"`)",
                first.sheet,
                quoted_list(missing),
                table.sheet,
                table.sheet
            ));
            Ok(table)
        }
        _ => Err(LoadError::Malformed {
            path: path.display().to_string(),
            reason: format!(
                "the first sheet \"{}\" lacks {}, and several sheets have every column the recipe reads: {}; name one in the recipe, e.g. `input sheet \"{}\"`",
                first.sheet,
                quoted_list(missing),
                holding
                    .iter()
                    .map(|t| format!("\"{}\"", t.sheet))
                    .collect::<Vec<_>>()
                    .join(", "),
                holding[0].sheet
            ),
        }),
    }
}

fn quoted_list(names: &[String]) -> String {
    let shown: Vec<String> = names.iter().take(4).map(|n| format!("\"{n}\"")).collect();
    if names.len() > 4 {
        format!("{} and {} more", shown.join(", "), names.len() - 4)
    } else {
        shown.join(", ")
    }
}

/// Why numbers arrived as text, judged from the cells; None when the
/// cells are words (then the recipe names the wrong column, and the recipe
/// checker says so at its line).
fn likely_cause(texts: &[String]) -> Option<&'static str> {
    let comma = texts
        .iter()
        .filter(|t| NumberStyle::COMMA.parse(t).is_some())
        .count();
    let with_unit = texts.iter().filter(|t| has_unit(t)).count();
    if comma * 2 >= texts.len() {
        Some("decimal commas (`1,5`): add `decimal comma` to the recipe's `input` line")
    } else if with_unit * 2 >= texts.len() {
        Some(
            "units written in the cells (`12 kg`): export the numbers without their units, or fix the column in the file",
        )
    } else {
        None
    }
}

/// `12 kg`, `5min`, `3.5 %`: a number followed by a unit.
fn has_unit(text: &str) -> bool {
    let t = text.trim();
    let split = t
        .char_indices()
        .find(|(_, c)| !(c.is_ascii_digit() || matches!(c, '.' | ',' | '-' | '+')))
        .map(|(i, _)| i);
    match split {
        Some(at) if at > 0 => {
            let (number, unit) = t.split_at(at);
            let unit = unit.trim();
            (NumberStyle::POINT.parse(number).is_some()
                || NumberStyle::COMMA.parse(number).is_some())
                && !unit.is_empty()
                && unit.chars().count() <= 6
                && unit
                    .chars()
                    .all(|c| c.is_alphabetic() || matches!(c, '%' | '°' | '/' | 'µ'))
        }
        _ => false,
    }
}

/// A column the recipe uses as numbers that holds mostly text stops the run.
fn refuse_text_numbers(path: &Path, table: &Table, wanted: &Wanted) -> Result<(), LoadError> {
    for (name, line) in &wanted.numeric {
        let Some(column) = table.column(name) else {
            continue;
        };
        if column.kind != ColumnKind::Text {
            continue;
        }
        let filled = (0..table.rows)
            .filter(|&r| column.text(r).is_some())
            .count();
        // The column's numbers became words too; text is what reads as no number.
        let text_rows: Vec<usize> = (0..table.rows)
            .filter(|&r| {
                column
                    .text(r)
                    .is_some_and(|t| NumberStyle::POINT.parse(&t).is_none())
            })
            .collect();
        let texts: Vec<String> = text_rows
            .iter()
            .filter_map(|&r| column.text(r))
            .take(50)
            .collect();
        let Some(cause) = likely_cause(&texts) else {
            continue;
        };
        let shown: Vec<String> = text_rows
            .iter()
            .take(3)
            .map(|&r| {
                format!(
                    "{} \"{}\"",
                    table.address(column, r),
                    column.text(r).unwrap_or_default()
                )
            })
            .collect();
        return Err(LoadError::Malformed {
            path: path.display().to_string(),
            reason: format!(
                "the recipe uses column \"{name}\" as numbers (line {line}), but {} of its {} filled cells are text, such as {}. Likely cause: {}",
                text_rows.len(),
                filled,
                shown.join(", "),
                cause
            ),
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn units_and_decimal_commas_are_told_apart() {
        assert!(has_unit("12 kg") && has_unit("5min") && has_unit("3,5 %"));
        assert!(!has_unit("North") && !has_unit("12") && !has_unit("A12"));
        let commas: Vec<String> = ["1,5", "2,25", "n/a"].map(String::from).to_vec();
        assert!(likely_cause(&commas).unwrap().contains("decimal comma"));
        let units: Vec<String> = ["12 kg", "9 kg"].map(String::from).to_vec();
        assert!(likely_cause(&units).unwrap().contains("units"));
        let words: Vec<String> = ["done", "late"].map(String::from).to_vec();
        assert_eq!(likely_cause(&words), None);
    }
}
