//! The rows each sheet will need, checked from the results before the first
//! cell is written, so a result too large for a sheet fails at once with the
//! block named and what to do, not at the end with a bare spreadsheet error.

use super::WriteError;
use crate::eval::{Block, MAX_SHEET_ENTRIES, Results};

/// Refuses results one of whose sheets would need more rows than a sheet has.
pub fn check(results: &Results) -> Result<(), WriteError> {
    let most = MAX_SHEET_ENTRIES;
    for block in &results.blocks {
        let (rows, what, fix) = match block {
            Block::Panel { entries, .. } => (
                entries.len(),
                "(group, column) pairs",
                "group by fewer keys, list fewer columns, or split the panel",
            ),
            Block::Figures { rows, .. } => (rows.len(), "groups", "group by fewer keys"),
        };
        if rows > most {
            return Err(WriteError::TooLarge(format!(
                "block \"{}\" has {rows} {what}, one row each, more than the {most} a sheet holds; {fix}, or filter the rows with `rows where`",
                block.name()
            )));
        }
    }
    if results.checks.len() > most {
        return Err(WriteError::TooLarge(format!(
            "the checks give {} results, one row each, more than the {most} a sheet holds; check fewer groups",
            results.checks.len()
        )));
    }
    Ok(())
}
