//! The short table printed on the terminal after a run.

use std::path::Path;

use crate::eval::{Block, Outcome, Results, Status, group_label};
use crate::load::Table;

/// Left-aligned columns separated by two spaces.
pub fn columns<const N: usize>(lines: &[[String; N]]) -> String {
    let mut widths = [0usize; N];
    for line in lines {
        for (w, cell) in widths.iter_mut().zip(line) {
            *w = (*w).max(cell.chars().count());
        }
    }
    let mut out = String::new();
    for line in lines {
        let cells: Vec<String> = line
            .iter()
            .zip(widths)
            .map(|(c, w)| format!("{c:<w$}"))
            .collect();
        out.push_str(cells.join("  ").trim_end());
        out.push('\n');
    }
    out
}

pub fn render(results: &Results, table: &Table, out: &Path) -> String {
    let mut text = format!(
        "{}\n{} rows read from {} (sheet \"{}\"){}\n\n",
        results.title.as_deref().unwrap_or("sheaf result"),
        results.rows_read,
        table.source.file_name,
        table.sheet,
        if results.missing_cells.is_empty() {
            String::new()
        } else {
            format!(
                ", {} cells counted as missing (listed on About)",
                results.missing_cells.len()
            )
        }
    );
    for note in crate::load::reading_notes(table) {
        text.push_str(&format!("{}: {}\n", note.topic, note.text));
    }
    if !text.ends_with("\n\n") {
        text.push('\n');
    }
    let mut lines = vec![[
        "block".to_string(),
        "groups".into(),
        "ok / note / warn".into(),
    ]];
    for block in &results.blocks {
        match block {
            Block::Panel { name, entries, .. } => {
                let n = |s: Status| entries.iter().filter(|e| e.robustness.status == s).count();
                let groups: std::collections::HashSet<_> =
                    entries.iter().map(|e| e.group.clone()).collect();
                lines.push([
                    name.clone(),
                    groups.len().to_string(),
                    format!(
                        "{} / {} / {}",
                        n(Status::Ok),
                        n(Status::Note),
                        n(Status::Warn)
                    ),
                ]);
            }
            Block::Figures { name, rows, .. } => {
                lines.push([name.clone(), rows.len().to_string(), String::new()])
            }
        }
    }
    text.push_str(&columns(&lines));
    let count = |o: Outcome| results.checks.iter().filter(|c| c.outcome == o).count();
    text.push_str(&format!(
        "\nchecks: {} pass, {} warn, {} fail\n",
        count(Outcome::Pass),
        count(Outcome::Warn),
        count(Outcome::Fail)
    ));
    for c in results.checks.iter().filter(|c| c.outcome != Outcome::Pass) {
        let group = group_label(c.group.as_deref().unwrap_or_default());
        text.push_str(&format!(
            "  {}: \"{}\" {group}{}\n",
            c.outcome.word(),
            c.name,
            c.note
                .as_ref()
                .map(|n| format!(" ({n})"))
                .unwrap_or_default()
        ));
    }
    for warning in &results.warnings {
        text.push_str(&format!("  warning: {warning}\n"));
    }
    text.push_str(&format!("\nwritten: {}\n", out.display()));
    text
}
