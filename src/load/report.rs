//! What the loader decided, in words: one list read by the terminal
//! summary and the About sheet, so both always say the same.

use super::table::Table;

/// One decision of the loader, for the terminal and the About sheet.
#[derive(Debug, Clone, PartialEq)]
pub struct ReadingNote {
    /// A short label: `encoding`, `header row`, `summary rows`, ...
    pub topic: &'static str,
    /// The decision in a sentence.
    pub text: String,
    /// Worth the reader's attention (a guess, or data left out or merged).
    pub attention: bool,
}

/// How many rows or cells a note names before it says "and N more".
const NAMED: usize = 8;

fn listed(items: &[String]) -> String {
    if items.len() > NAMED {
        format!(
            "{} and {} more",
            items[..NAMED].join(", "),
            items.len() - NAMED
        )
    } else {
        items.join(", ")
    }
}

/// Everything the loader decided about `table`, near-duplicate keys included
/// (found for the columns a recipe groups by, see [`Table::find_near_duplicates`]).
pub fn reading_notes(table: &Table) -> Vec<ReadingNote> {
    let notes = &table.notes;
    let mut out = Vec::new();
    let mut say = |topic, text: String, attention| {
        out.push(ReadingNote {
            topic,
            text,
            attention,
        })
    };
    if let Some(sheet) = &notes.sheet {
        say("sheet", sheet.clone(), true);
    }
    if let Some(encoding) = &notes.encoding {
        say("encoding", encoding.clone(), false);
    }
    if let Some(delimiter) = &notes.delimiter {
        say("delimiter", delimiter.clone(), false);
    }
    if let Some(style) = &notes.number_style {
        say("numbers", style.clone(), false);
    }
    if let Some(doubt) = &notes.number_doubt {
        say("numbers", doubt.clone(), true);
    }
    if let Some(header) = &notes.header {
        say("header row", header.clone(), true);
    }
    for (name, header) in &notes.renamed_headers {
        say(
            "header name",
            format!("the recipe's column `{name}` is headed \"{header}\" in this file"),
            false,
        );
    }
    for column in &table.columns {
        let converted = column.converted();
        if converted.count > 0 {
            let cells: Vec<String> = converted
                .first_rows
                .iter()
                .map(|&r| table.address(column, r as usize))
                .collect();
            let more = if converted.count > cells.len() {
                ", ..."
            } else {
                ""
            };
            say(
                "text read as numbers",
                format!(
                    "{}: {} text cell{} read as numbers ({}{more})",
                    column.name,
                    converted.count,
                    if converted.count == 1 { "" } else { "s" },
                    cells.join(", ")
                ),
                false,
            );
        }
    }
    if !notes.blank_rows.is_empty() {
        let rows: Vec<String> = notes.blank_rows.iter().map(|r| r.to_string()).collect();
        say(
            "blank rows",
            format!(
                "{} blank row{} left out (sheet row{} {})",
                rows.len(),
                if rows.len() == 1 { "" } else { "s" },
                if rows.len() == 1 { "" } else { "s" },
                listed(&rows)
            ),
            false,
        );
    }
    for summary in &notes.summary_rows {
        let what = if notes.summary_rows_kept {
            "kept as data, as the recipe says"
        } else {
            "left out as a summary row (add `keep summary rows` to the `input` line to keep it)"
        };
        say(
            "summary rows",
            format!("row {} {what}: {}", summary.sheet_row, summary.reason),
            true,
        );
    }
    for column in &table.columns {
        for near in column.near_duplicates() {
            let spellings: Vec<String> = near
                .spellings
                .iter()
                .map(|(text, row)| format!("\"{text}\" ({})", table.address(column, *row as usize)))
                .collect();
            let text = match &near.merged_into {
                Some(kept) => format!(
                    "{}: {} differ only in case or spaces and were merged into \"{kept}\", as the recipe says",
                    column.name,
                    spellings.join(", ")
                ),
                None => format!(
                    "{}: {} differ only in case or spaces and form separate groups; add `merge similar keys` to the `input` line to make them one",
                    column.name,
                    spellings.join(", ")
                ),
            };
            say("similar keys", text, true);
        }
    }
    out
}
