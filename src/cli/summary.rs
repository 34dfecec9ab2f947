//! The short table printed on the terminal after a run.

use std::path::Path;

use super::output::{green, red, styled, yellow};
use crate::eval::{Block, Outcome, Results, Status, group_label};
use crate::load::Table;
use crate::write::RunInfo;

/// How many figures the Changes sheet flags since the previous period
/// (moved beyond the drift and their noise, shape changed, new extreme);
/// None when the run had none to compare with.
pub fn moved(results: &Results, run: &RunInfo) -> Option<usize> {
    let previous = run.previous.as_ref()?;
    let current = crate::history::Record::from_results(results, run.fingerprint.clone(), None);
    Some(
        crate::history::moves_between("", previous, "", &current)
            .iter()
            .filter(|m| m.moved(run.drift, run.noise))
            .count(),
    )
}

/// An outcome's word, coloured where colour is on.
fn outcome_word(outcome: Outcome) -> String {
    let style = match outcome {
        Outcome::Pass => green(),
        Outcome::Warn => yellow(),
        Outcome::Fail => red(),
    };
    styled(style, outcome.word())
}

/// `5 pass, 1 warn, 0 fail`.
fn check_counts(results: &Results) -> String {
    let count = |o: Outcome| results.checks.iter().filter(|c| c.outcome == o).count();
    [Outcome::Pass, Outcome::Warn, Outcome::Fail]
        .map(|o| match count(o) {
            0 => format!("0 {}", o.word()),
            n => format!("{n} {}", outcome_word(o)),
        })
        .join(", ")
}

/// One file of a batch: its period, where it went, its checks and moves.
pub fn batch_line(
    period: &str,
    data: &Path,
    out: &Path,
    results: &Results,
    moved: Option<usize>,
) -> String {
    let moved = moved
        .map(|n| format!("; {n} figures flagged in Changes"))
        .unwrap_or_default();
    format!(
        "{period}  {}  -> {}  checks: {}{moved}\n",
        data.display(),
        out.display(),
        check_counts(results)
    )
}

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

/// The summary of one run: blocks with their robustness statuses, the
/// checks that did not pass, the moved figures and the result's path.
pub fn render(results: &Results, table: &Table, out: &Path, moved: Option<usize>) -> String {
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
    // What the loader decided (header row found, rows left out, number
    // style, ...): said before the figures, as the About sheet says it.
    let notes = crate::load::reading_notes(table);
    for note in &notes {
        text.push_str(&format!("{}: {}\n", note.topic, note.text));
    }
    if !notes.is_empty() {
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
    text.push_str(&format!("\nchecks: {}\n", check_counts(results)));
    for c in results.checks.iter().filter(|c| c.outcome != Outcome::Pass) {
        let group = group_label(c.group.as_deref().unwrap_or_default());
        text.push_str(&format!(
            "  {}: \"{}\" {group}{}\n",
            outcome_word(c.outcome),
            c.name,
            c.note_words()
                .map(|n| format!(" ({n})"))
                .unwrap_or_default()
        ));
    }
    if let Some(n) = moved {
        text.push_str(&format!(
            "changes: {n} figure{} flagged since the previous period: moved beyond the drift and the noise, shape changed or new extreme (see Changes)\n",
            if n == 1 { "" } else { "s" }
        ));
    }
    text.push_str(&format!("\nwritten: {}\n", out.display()));
    text
}
