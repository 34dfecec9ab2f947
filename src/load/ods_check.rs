//! A look at an .ods's content.xml before calamine opens it (calamine 0.38
//! reads every sheet at open) for two claims it does not survive:
//! - a table or row that is opened and never closed (the file cut short):
//!   calamine waits for the closing tag past the end of the file and reads
//!   for ever;
//! - cells repeated (`number-columns-repeated`, `number-rows-repeated`)
//!   into a block far larger than the data the file holds: calamine
//!   expands every repeat, up to 10^8 cells (3 GB) from a few hundred bytes.
//!
//! The look counts tags as bytes stream past (no XML tree is built); it
//! refuses only these claims and leaves everything else to calamine.

use std::io::Read;
use std::path::Path;

use super::LoadError;
use super::limits::{MAX_SHEET_COLUMNS, MAX_SHEET_ROWS};

/// Refuses an .ods whose content.xml leaves a table or row open, or whose
/// repeats make a block beyond `allowance(cells with a value)` cells.
pub fn check(path: &Path, allowance: impl Fn(u64) -> u64) -> Result<(), LoadError> {
    let refuse = |reason: String| LoadError::Malformed {
        path: path.display().to_string(),
        reason: format!("{reason}; open and save it again, or export it as CSV"),
    };
    let Ok(file) = std::fs::File::open(path) else {
        return Ok(());
    };
    let Ok(mut archive) = zip::ZipArchive::new(file) else {
        return Ok(()); // not a zip: calamine says so
    };
    let Ok(content) = archive.by_name("content.xml") else {
        return Ok(());
    };
    let mut tags = Tags::default();
    let mut reader = std::io::BufReader::new(content);
    let mut chunk = vec![0u8; 1 << 16];
    let mut carry: Vec<u8> = Vec::new();
    loop {
        let n = match reader.read(&mut chunk) {
            Ok(0) | Err(_) => break, // a damaged stream: calamine reports it
            Ok(n) => n,
        };
        carry.extend_from_slice(&chunk[..n]);
        let done = tags.scan(&carry);
        carry.drain(..done);
    }
    for (name, (open, close)) in [("table:table", tags.tables), ("table:table-row", tags.rows)] {
        if open != close {
            return Err(refuse(format!(
                "content.xml opens {open} <{name}> elements but closes {close}: the file is cut short or damaged"
            )));
        }
    }
    let most = allowance(tags.values);
    if tags.block_cells > most {
        return Err(refuse(format!(
            "content.xml repeats its {} cells with a value into blocks of {} cells (number-rows-repeated and number-columns-repeated), more than the {most} sheaf reads from a file of this size",
            tags.values, tags.block_cells
        )));
    }
    Ok(())
}

/// What the tags of content.xml claim, counted as they stream past.
#[derive(Default)]
struct Tags {
    /// Opening and closing tags (self-closing ones count as both).
    tables: (u64, u64),
    rows: (u64, u64),
    /// Cell elements with a value.
    values: u64,
    /// Cells of the dense blocks of the tables finished so far.
    block_cells: u64,
    table: Area,
    row: Row,
}

/// The dense block of the table being read: from its first row with a
/// value to its last, as wide as its widest such row (what calamine keeps).
#[derive(Default)]
struct Area {
    rows: u64,
    empty_rows_pending: u64,
    width: u64,
}

/// The row being read.
#[derive(Default)]
struct Row {
    repeats: u64,
    column: u64,
    filled_to: u64,
}

impl Tags {
    /// Counts the complete tags in `text`; returns how many bytes were
    /// consumed (an unfinished tag at the end waits for the next chunk).
    fn scan(&mut self, text: &[u8]) -> usize {
        let mut at = 0;
        while let Some(start) = text[at..].iter().position(|&b| b == b'<') {
            let start = at + start;
            let Some(end) = text[start..].iter().position(|&b| b == b'>') else {
                return start;
            };
            self.tag(&text[start + 1..start + end]);
            at = start + end + 1;
        }
        text.len()
    }

    fn tag(&mut self, tag: &[u8]) {
        let (closing, body) = match tag.strip_prefix(b"/") {
            Some(rest) => (true, rest),
            None => (false, tag),
        };
        let self_closing = !closing && tag.ends_with(b"/");
        let name_end = body
            .iter()
            .position(|b| b.is_ascii_whitespace() || *b == b'/')
            .unwrap_or(body.len());
        match &body[..name_end] {
            b"table:table" => {
                if !closing {
                    self.tables.0 += 1;
                    self.table = Area::default();
                }
                if closing || self_closing {
                    self.tables.1 += 1;
                    self.block_cells = self
                        .block_cells
                        .saturating_add(self.table.rows * self.table.width);
                }
            }
            b"table:table-row" => {
                if !closing {
                    self.rows.0 += 1;
                    let repeats = number(body, b"table:number-rows-repeated").unwrap_or(1);
                    self.row = Row {
                        repeats: repeats.clamp(1, u64::from(MAX_SHEET_ROWS)),
                        ..Row::default()
                    };
                }
                if closing || self_closing {
                    self.rows.1 += 1;
                    self.end_row();
                }
            }
            b"table:table-cell" | b"table:covered-table-cell" if !closing => {
                let repeats = number(body, b"table:number-columns-repeated").unwrap_or(1);
                self.row.column =
                    (self.row.column + repeats.max(1)).min(u64::from(MAX_SHEET_COLUMNS));
                if !self_closing || contains(body, b"office:value-type") {
                    self.row.filled_to = self.row.column;
                    self.values += 1;
                }
            }
            _ => {}
        }
    }

    /// A row ends: with a value it extends the block (with the empty rows
    /// before it); without, it counts only if a later row has a value.
    fn end_row(&mut self) {
        let (row, area) = (&self.row, &mut self.table);
        if row.filled_to > 0 {
            area.rows =
                (area.rows + area.empty_rows_pending + row.repeats).min(u64::from(MAX_SHEET_ROWS));
            area.empty_rows_pending = 0;
            area.width = area.width.max(row.filled_to);
        } else if area.rows > 0 {
            area.empty_rows_pending += row.repeats;
        }
    }
}

fn contains(haystack: &[u8], needle: &[u8]) -> bool {
    haystack.windows(needle.len()).any(|w| w == needle)
}

/// The number in `name="N"` within a tag, if there is one.
fn number(tag: &[u8], name: &[u8]) -> Option<u64> {
    let at = tag.windows(name.len()).position(|w| w == name)? + name.len();
    let rest = tag.get(at..)?.strip_prefix(b"=")?;
    let rest = rest
        .strip_prefix(b"\"")
        .or_else(|| rest.strip_prefix(b"'"))?;
    let digits = rest.iter().take_while(|b| b.is_ascii_digit()).count();
    std::str::from_utf8(&rest[..digits]).ok()?.parse().ok()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn tags_of(chunks: &[&[u8]]) -> Tags {
        let mut tags = Tags::default();
        let mut carry = Vec::new();
        for chunk in chunks {
            carry.extend_from_slice(chunk);
            let done = tags.scan(&carry);
            carry.drain(..done);
        }
        tags
    }

    #[test]
    fn tags_are_counted_across_chunks() {
        let text =
            b"<table:table a=\"1\"><table:table-row/><table:table-row><x/></table:table-row>";
        let (first, second) = text.split_at(25);
        let tags = tags_of(&[first, second]);
        assert_eq!((tags.tables, tags.rows), ((1, 0), (2, 2)));
    }

    /// Rows 1 and 3 hold values in columns up to 2 and 3; row 2 is empty and
    /// repeated 4 times, the trailing empty rows (repeated 10^6 times, as
    /// spreadsheet programs write them) are outside the block: 1 + 4 + 1
    /// rows by 3 columns.
    #[test]
    fn the_block_spans_the_rows_with_values() {
        let text = br#"<table:table><table:table-row><table:table-cell office:value-type="float"/><table:table-cell office:value-type="float"/></table:table-row><table:table-row table:number-rows-repeated="4"><table:table-cell table:number-columns-repeated="1024"/></table:table-row><table:table-row><table:table-cell table:number-columns-repeated="2"/><table:table-cell><text:p>x</text:p></table:table-cell><table:table-cell table:number-columns-repeated="1000"/></table:table-row><table:table-row table:number-rows-repeated="1048000"><table:table-cell table:number-columns-repeated="1024"/></table:table-row></table:table>"#;
        let tags = tags_of(&[text]);
        assert_eq!(tags.block_cells, 6 * 3);
        assert_eq!(tags.values, 3);
    }
}
