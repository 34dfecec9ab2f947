//! One loaded column, stored by type: a numeric column is its numbers (8
//! bytes a row), a text column is an index into its distinct words (4 bytes
//! a row). Cells that count as missing are kept apart, with their rows, for
//! the About sheet. Loaders feed cells one at a time to a [`ColumnBuilder`],
//! which decides the column's kind once every cell is in.

use std::collections::HashMap;

use super::table::{Cell, ERROR_CODES};

/// Rows are held as u32: a sheet has at most 1,048,576 rows, and a CSV
/// file with more than this many is refused when it is read.
pub const MAX_ROWS: usize = u32::MAX as usize - 1;

/// A text column's code for a blank or error cell.
const NO_TEXT: u32 = u32::MAX;

/// What a column holds, decided from all its cells.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnKind {
    /// Numbers (dates and true/false cells may be among them).
    Number,
    /// Dates, as spreadsheet serial days.
    Date,
    /// Text: group keys and labels.
    Text,
    /// True/false cells.
    Bool,
    /// No cell holds anything.
    Empty,
}

impl ColumnKind {
    /// The kind in a word, for messages and `inspect`.
    pub fn word(self) -> &'static str {
        match self {
            ColumnKind::Number => "number",
            ColumnKind::Date => "date",
            ColumnKind::Text => "text",
            ColumnKind::Bool => "true/false",
            ColumnKind::Empty => "empty",
        }
    }

    /// Whether the column has a numeric view (numbers, dates, true/false).
    pub fn is_numeric(self) -> bool {
        matches!(
            self,
            ColumnKind::Number | ColumnKind::Date | ColumnKind::Bool
        )
    }

    /// The kind from how many cells of each type a column has: numeric when
    /// numbers are at least as common as text, so a typed-in "n/a" does not
    /// turn a numeric column into text (it is listed as missing instead).
    fn from_counts(numbers: usize, dates: usize, texts: usize, bools: usize) -> ColumnKind {
        if numbers + dates + texts + bools == 0 {
            ColumnKind::Empty
        } else if numbers + dates == 0 && bools > texts {
            ColumnKind::Bool
        } else if numbers + dates < texts || numbers + dates == 0 {
            ColumnKind::Text
        } else if dates > numbers {
            ColumnKind::Date
        } else {
            ColumnKind::Number
        }
    }
}

/// Why a cell counts as missing.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum IssueKind {
    /// The cell is empty or only spaces.
    Blank,
    /// Text (or true/false) in a column read as numbers.
    TextInNumbers,
    /// A spreadsheet error code such as `#N/A`.
    FormulaError,
}

impl IssueKind {
    /// The reason in words, for the About sheet and the terminal.
    pub fn words(self) -> &'static str {
        match self {
            IssueKind::Blank => "blank cell",
            IssueKind::TextInNumbers => "text in a numeric column",
            IssueKind::FormulaError => "formula error",
        }
    }
}

/// A cell that counts as missing, and why.
#[derive(Debug, Clone, PartialEq)]
pub struct CellIssue {
    /// The 0-based data row.
    pub row: usize,
    /// Why the cell counts as missing.
    pub kind: IssueKind,
    /// What the cell held (text or error), for the About sheet.
    pub content: String,
}

#[derive(Debug, Clone)]
enum Values {
    /// Number, date, true/false and empty columns: the numeric view, NaN
    /// where missing. `other_type` lists the rows holding a date in a
    /// number column (or a plain number in a date column), for the text view.
    Numbers {
        numbers: Vec<f64>,
        other_type: Vec<u32>,
    },
    /// Text columns: each row's text as an index into `words`.
    Texts { codes: Vec<u32>, words: Vec<String> },
}

/// One loaded column: its header, place and kind, its cells stored by type,
/// and the cells that count as missing.
#[derive(Debug, Clone)]
pub struct Column {
    /// The header text (or the recipe's name, when it accepts several).
    pub name: String,
    /// 0-based position in the sheet, for addresses.
    pub sheet_column: u32,
    /// What the column holds.
    pub kind: ColumnKind,
    values: Values,
    /// Cells that count as missing in this column's numeric view, in row order.
    issues: Vec<CellIssue>,
    /// Text cells read as numbers (a workbook's numbers stored as text).
    converted: Converted,
    /// Text keys that differ only in case or inner spaces.
    near_duplicates: Vec<NearDuplicate>,
}

/// Text cells of a workbook that were read as numbers: how many, and the
/// first few rows, for the terminal and the About sheet.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Converted {
    /// How many text cells were read as numbers.
    pub count: usize,
    /// The first rows (0-based data rows), at most [`Converted::SHOWN`].
    pub first_rows: Vec<u32>,
}

impl Converted {
    /// How many converted cells are named by their address.
    pub const SHOWN: usize = 5;

    fn add(&mut self, row: u32) {
        self.count += 1;
        if self.first_rows.len() < Converted::SHOWN {
            self.first_rows.push(row);
        }
    }
}

/// Spellings of one key that differ only in case or inner spaces
/// (`Line A`, `line  A`), each with the row of its first cell. When the
/// recipe merges them, `merged_into` is the spelling kept.
#[derive(Debug, Clone, PartialEq)]
pub struct NearDuplicate {
    /// Each spelling with the 0-based data row of its first cell.
    pub spellings: Vec<(String, u32)>,
    /// The spelling kept when the recipe merges them.
    pub merged_into: Option<String>,
}

/// A key's form for comparing spellings: lower case, inner spaces folded.
fn key_form(text: &str) -> String {
    text.split_whitespace()
        .map(str::to_lowercase)
        .collect::<Vec<_>>()
        .join(" ")
}

impl Column {
    /// The numeric view: numbers and dates are values (true/false as 1/0
    /// in a true/false column); everything else is missing.
    pub fn number(&self, row: usize) -> Option<f64> {
        match &self.values {
            Values::Numbers { numbers, .. } => Some(numbers[row]).filter(|x| !x.is_nan()),
            Values::Texts { .. } => None,
        }
    }

    /// The whole numeric view (NaN where missing), for a numeric column.
    pub fn numbers(&self) -> Option<&[f64]> {
        match &self.values {
            Values::Numbers { numbers, .. } => Some(numbers),
            Values::Texts { .. } => None,
        }
    }

    /// A true/false column's cell.
    pub fn truth(&self, row: usize) -> Option<bool> {
        match self.kind {
            ColumnKind::Bool => self.number(row).map(|x| x == 1.0),
            _ => None,
        }
    }

    /// A text column's rows as codes into its distinct words (None where blank).
    pub fn text_codes(&self) -> Option<(&[u32], &[String])> {
        match &self.values {
            Values::Texts { codes, words } => Some((codes, words)),
            Values::Numbers { .. } => None,
        }
    }

    /// Index into a text column's words for a code from [`Column::text_codes`].
    pub fn word_of(code: u32) -> Option<usize> {
        (code != NO_TEXT).then_some(code as usize)
    }

    /// The text view, used for group keys and text comparisons.
    pub fn text(&self, row: usize) -> Option<String> {
        match &self.values {
            Values::Texts { codes, words } => Column::word_of(codes[row]).map(|w| words[w].clone()),
            Values::Numbers {
                numbers,
                other_type,
            } => {
                let x = numbers[row];
                if x.is_nan() {
                    // A text cell in a numeric column still reads as its text.
                    return self
                        .issue_at(row)
                        .filter(|i| i.kind == IssueKind::TextInNumbers)
                        .map(|i| i.content.clone());
                }
                let other = other_type.binary_search(&(row as u32)).is_ok();
                Some(match self.kind {
                    ColumnKind::Bool => (x == 1.0).to_string(),
                    ColumnKind::Date if !other => crate::format::date(x),
                    ColumnKind::Number if other => crate::format::date(x),
                    _ => crate::format::shortest(x),
                })
            }
        }
    }

    /// Cells that count as missing in this column's numeric view, in row order.
    pub fn issues(&self) -> &[CellIssue] {
        &self.issues
    }

    /// Text cells that were read as numbers.
    pub fn converted(&self) -> &Converted {
        &self.converted
    }

    /// Keys of this text column that differ only in case or inner spaces.
    pub fn near_duplicates(&self) -> &[NearDuplicate] {
        &self.near_duplicates
    }

    /// Rows whose cell is blank.
    pub fn blank_rows(&self) -> impl Iterator<Item = usize> + '_ {
        self.issues
            .iter()
            .filter(|i| i.kind == IssueKind::Blank)
            .map(|i| i.row)
    }

    /// Keeps only the rows whose `new_row` is Some, renumbered to it.
    pub fn keep_rows(&mut self, new_row: &[Option<u32>]) {
        let renumber = |row: u32| new_row[row as usize];
        match &mut self.values {
            Values::Numbers {
                numbers,
                other_type,
            } => {
                let mut at = 0;
                numbers.retain(|_| {
                    at += 1;
                    new_row[at - 1].is_some()
                });
                *other_type = other_type.iter().filter_map(|&r| renumber(r)).collect();
            }
            Values::Texts { codes, .. } => {
                let mut at = 0;
                codes.retain(|_| {
                    at += 1;
                    new_row[at - 1].is_some()
                });
            }
        }
        self.issues
            .retain_mut(|issue| match renumber(issue.row as u32) {
                Some(row) => {
                    issue.row = row as usize;
                    true
                }
                None => false,
            });
        let converted = std::mem::take(&mut self.converted.first_rows);
        self.converted.first_rows = converted.into_iter().filter_map(renumber).collect();
    }

    /// Finds the keys of a text column that differ only in case or inner
    /// spaces; with `merge`, every spelling becomes its group's most
    /// common one (the first seen on a tie).
    pub fn find_near_duplicates(&mut self, merge: bool) {
        let Values::Texts { codes, words } = &mut self.values else {
            return;
        };
        let mut first_row = vec![u32::MAX; words.len()];
        let mut uses = vec![0usize; words.len()];
        for (row, &code) in codes.iter().enumerate() {
            if let Some(w) = Column::word_of(code) {
                uses[w] += 1;
                if first_row[w] == u32::MAX {
                    first_row[w] = row as u32;
                }
            }
        }
        let mut by_form: HashMap<String, Vec<usize>> = HashMap::new();
        let mut forms: Vec<String> = Vec::new();
        for (w, word) in words.iter().enumerate() {
            if uses[w] == 0 {
                continue;
            }
            let form = key_form(word);
            let entry = by_form.entry(form.clone()).or_default();
            if entry.is_empty() {
                forms.push(form);
            }
            entry.push(w);
        }
        let mut remap: Vec<u32> = (0..words.len() as u32).collect();
        for form in forms {
            let mut group = by_form.remove(&form).unwrap_or_default();
            if group.len() < 2 {
                continue;
            }
            group.sort_by_key(|&w| first_row[w]);
            let kept = *group
                .iter()
                .max_by_key(|&&w| (uses[w], std::cmp::Reverse(first_row[w])))
                .expect("a group has members");
            if merge {
                group.iter().for_each(|&w| remap[w] = kept as u32);
            }
            self.near_duplicates.push(NearDuplicate {
                spellings: group
                    .iter()
                    .map(|&w| (words[w].clone(), first_row[w]))
                    .collect(),
                merged_into: merge.then(|| words[kept].clone()),
            });
        }
        if merge && !self.near_duplicates.is_empty() {
            for code in codes.iter_mut() {
                if let Some(w) = Column::word_of(*code) {
                    *code = remap[w];
                }
            }
        }
    }

    fn issue_at(&self, row: usize) -> Option<&CellIssue> {
        self.issues
            .binary_search_by_key(&row, |i| i.row)
            .ok()
            .map(|i| &self.issues[i])
    }
}

/// Cells that are neither numbers nor dates; rare in a numeric column.
#[derive(Debug, Default)]
struct OtherCells {
    texts: Vec<(u32, u32)>,
    words: Vec<String>,
    /// foldhash rather than the standard SipHash: a key column looks up one
    /// word per row, and foldhash is several times faster on short keys
    /// (still seeded at random per process).
    word_index: HashMap<String, u32, foldhash::fast::RandomState>,
    bools: Vec<(u32, bool)>,
    blanks: Vec<u32>,
    errors: Vec<(u32, String)>,
}

impl OtherCells {
    /// The code of a word, new words copied in once.
    /// Spaces around a text are dropped: `"Line A "` is the key `Line A`.
    fn word(&mut self, text: &str) -> u32 {
        let text = text.trim();
        if let Some(&code) = self.word_index.get(text) {
            return code;
        }
        let code = self.words.len() as u32;
        self.words.push(text.to_string());
        self.word_index.insert(text.to_string(), code);
        code
    }
}

/// Each row's number (NaN where none) and whether its cell was a date.
fn rows_with_dates<'a>(
    numbers: &'a [f64],
    dates: &'a [u32],
) -> impl Iterator<Item = (usize, f64, bool)> + 'a {
    let mut date_rows = dates.iter().peekable();
    numbers.iter().enumerate().map(move |(row, &x)| {
        let is_date = date_rows.next_if(|&&d| d as usize == row).is_some();
        (row, x, is_date)
    })
}

/// Takes a column's cells in row order and stores them by type.
#[derive(Debug, Default)]
pub struct ColumnBuilder {
    /// Every row: the number or date, NaN for any other cell.
    numbers: Vec<f64>,
    /// Rows holding dates.
    dates: Vec<u32>,
    /// Boxed so that a sheet of a million columns stays small.
    other: Option<Box<OtherCells>>,
}

impl ColumnBuilder {
    /// A column whose first `rows` cells are blank (a ragged CSV row made it appear late).
    pub fn blanks(rows: usize) -> ColumnBuilder {
        let mut builder = ColumnBuilder::default();
        for _ in 0..rows {
            builder.push(Cell::Blank);
        }
        builder
    }

    /// How many cells the column holds so far.
    pub fn rows(&self) -> usize {
        self.numbers.len()
    }

    /// Adds the next row's cell.
    pub fn push(&mut self, cell: Cell) {
        let row = self.numbers.len() as u32;
        let value = match cell {
            Cell::Number(x) => x,
            Cell::Date(x) => {
                self.dates.push(row);
                x
            }
            other => {
                let rest = self.other.get_or_insert_with(Box::default);
                match other {
                    Cell::Text(t) => {
                        let code = rest.word(&t);
                        rest.texts.push((row, code));
                    }
                    Cell::Bool(b) => rest.bools.push((row, b)),
                    Cell::Blank => rest.blanks.push(row),
                    Cell::Error(e) => rest.errors.push((row, e)),
                    Cell::Number(_) | Cell::Date(_) => unreachable!("handled above"),
                }
                f64::NAN
            }
        };
        self.numbers.push(value);
    }

    /// Makes room for `rows` more cells at once: growing a large column
    /// step by step may copy it (and room never filled is never touched).
    pub(crate) fn reserve(&mut self, rows: usize) {
        self.numbers.reserve(rows);
    }

    /// Adds the cells of `later` after this column's, as if they had been
    /// pushed here one by one (words new to this column get the next codes,
    /// in the order `later` first saw them). The chunked CSV reader builds
    /// each chunk's columns apart and joins them with this.
    /// `later` is left empty, its room kept for the next chunk.
    pub(crate) fn append(&mut self, later: &mut ColumnBuilder) {
        let offset = self.numbers.len() as u32;
        self.numbers.extend_from_slice(&later.numbers);
        self.dates.extend(later.dates.iter().map(|r| r + offset));
        later.numbers.clear();
        later.dates.clear();
        let Some(theirs) = later.other.take() else {
            return;
        };
        let ours = self.other.get_or_insert_with(Box::default);
        let codes: Vec<u32> = theirs.words.iter().map(|w| ours.word(w)).collect();
        let moved = |&(row, code): &(u32, u32)| (row + offset, codes[code as usize]);
        ours.texts.extend(theirs.texts.iter().map(moved));
        ours.bools
            .extend(theirs.bools.iter().map(|&(row, b)| (row + offset, b)));
        ours.blanks
            .extend(theirs.blanks.iter().map(|row| row + offset));
        ours.errors
            .extend(theirs.errors.into_iter().map(|(row, e)| (row + offset, e)));
    }

    /// Adds a text cell (blank, a spreadsheet error code, or text) without
    /// copying text the column has seen before.
    pub fn push_text(&mut self, text: &str) {
        let trimmed = text.trim();
        if trimmed.is_empty() || ERROR_CODES.contains(&trimmed) {
            return self.push(Cell::from_text(text));
        }
        let row = self.numbers.len() as u32;
        let rest = self.other.get_or_insert_with(Box::default);
        let code = rest.word(text);
        rest.texts.push((row, code));
        self.numbers.push(f64::NAN);
    }

    /// The column, its kind decided from all its cells.
    /// Shows the builder's distinct texts to `see` (to detect a number style).
    pub fn for_each_text(&self, mut see: impl FnMut(&str)) {
        if let Some(other) = &self.other {
            other.words.iter().for_each(|w| see(w));
        }
    }

    /// The column, its kind decided from all its cells. With `text_numbers`,
    /// text cells that read as numbers in that style count as numbers, and
    /// become numbers if the column is numeric.
    pub fn finish(
        self,
        name: String,
        sheet_column: u32,
        text_numbers: Option<&super::numbers::NumberStyle>,
    ) -> Column {
        let ColumnBuilder {
            mut numbers,
            dates,
            other,
        } = self;
        let mut other = other.map(|o| *o).unwrap_or_default();
        let as_number: Vec<Option<f64>> = match text_numbers {
            Some(style) if !other.texts.is_empty() => {
                other.words.iter().map(|w| style.parse(w)).collect()
            }
            _ => Vec::new(),
        };
        let convertible = if as_number.is_empty() {
            0
        } else {
            other
                .texts
                .iter()
                .filter(|(_, code)| as_number[*code as usize].is_some())
                .count()
        };
        let values_count = numbers.iter().filter(|x| !x.is_nan()).count();
        let kind = ColumnKind::from_counts(
            values_count - dates.len() + convertible,
            dates.len(),
            other.texts.len() - convertible,
            other.bools.len(),
        );
        let mut converted = Converted::default();
        if convertible > 0 && kind.is_numeric() {
            other
                .texts
                .retain(|&(row, code)| match as_number[code as usize] {
                    Some(x) => {
                        numbers[row as usize] = x;
                        converted.add(row);
                        false
                    }
                    None => true,
                });
        }
        let mut issues: Vec<CellIssue> = Vec::new();
        let issue = |row: u32, kind, content: String| CellIssue {
            row: row as usize,
            kind,
            content,
        };
        issues.extend(
            other
                .blanks
                .iter()
                .map(|&r| issue(r, IssueKind::Blank, String::new())),
        );
        issues.extend(
            other
                .errors
                .iter()
                .map(|(r, e)| issue(*r, IssueKind::FormulaError, e.clone())),
        );
        let values = if kind == ColumnKind::Text {
            // Numbers and true/false cells join the words, as their text.
            let mut codes = vec![NO_TEXT; numbers.len()];
            for &(row, code) in &other.texts {
                codes[row as usize] = code;
            }
            for (row, x, is_date) in rows_with_dates(&numbers, &dates) {
                if !x.is_nan() {
                    let text = if is_date {
                        crate::format::date(x)
                    } else {
                        crate::format::shortest(x)
                    };
                    codes[row] = other.word(&text);
                }
            }
            for (row, b) in std::mem::take(&mut other.bools) {
                codes[row as usize] = other.word(&b.to_string());
            }
            Values::Texts {
                codes,
                words: other.words,
            }
        } else {
            if kind.is_numeric() {
                issues.extend(other.texts.iter().map(|&(r, code)| {
                    issue(
                        r,
                        IssueKind::TextInNumbers,
                        other.words[code as usize].clone(),
                    )
                }));
            }
            if kind == ColumnKind::Bool {
                for &(row, b) in &other.bools {
                    numbers[row as usize] = f64::from(u8::from(b));
                }
            } else {
                // A true/false cell in a number column is no number: say so.
                issues.extend(
                    other
                        .bools
                        .iter()
                        .map(|&(r, b)| issue(r, IssueKind::TextInNumbers, b.to_string())),
                );
            }
            let other_type = if kind == ColumnKind::Date {
                rows_with_dates(&numbers, &dates)
                    .filter(|&(_, x, is_date)| !x.is_nan() && !is_date)
                    .map(|(row, _, _)| row as u32)
                    .collect()
            } else {
                dates
            };
            numbers.shrink_to_fit();
            Values::Numbers {
                numbers,
                other_type,
            }
        };
        issues.sort_by_key(|i| i.row);
        Column {
            name,
            sheet_column,
            kind,
            values,
            issues,
            converted,
            near_duplicates: Vec::new(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn column(cells: Vec<Cell>) -> Column {
        let mut builder = ColumnBuilder::default();
        cells.into_iter().for_each(|c| builder.push(c));
        builder.finish("x".into(), 0, None)
    }

    #[test]
    fn a_stray_text_cell_does_not_make_a_numeric_column_text() {
        let c = column(vec![
            Cell::Number(1.0),
            Cell::Text("n/a".into()),
            Cell::Number(3.0),
            Cell::Blank,
        ]);
        assert_eq!(c.kind, ColumnKind::Number);
        assert_eq!(
            (c.number(0), c.number(1), c.number(3)),
            (Some(1.0), None, None)
        );
        assert_eq!(c.text(1).as_deref(), Some("n/a"));
        let kinds: Vec<_> = c.issues().iter().map(|i| (i.row, i.kind)).collect();
        assert_eq!(
            kinds,
            [(1, IssueKind::TextInNumbers), (3, IssueKind::Blank)]
        );
        let keys = column(vec![
            Cell::Text("North".into()),
            Cell::Text("South".into()),
            Cell::Number(3.0),
        ]);
        assert_eq!(keys.kind, ColumnKind::Text);
        assert_eq!(keys.text(2).as_deref(), Some("3"));
        assert_eq!(keys.number(2), None);
        assert_eq!(column(vec![Cell::Blank]).kind, ColumnKind::Empty);
    }

    #[test]
    fn each_kind_keeps_its_views() {
        let dates = column(vec![
            Cell::Date(46_300.0),
            Cell::Number(2.5),
            Cell::Date(46_301.0),
        ]);
        assert_eq!(dates.kind, ColumnKind::Date);
        assert_eq!(dates.number(1), Some(2.5));
        assert_eq!(dates.text(1).as_deref(), Some("2.5"));
        assert_eq!(dates.text(0), Some(crate::format::date(46_300.0)));
        let truths = column(vec![Cell::Bool(true), Cell::Blank, Cell::Bool(false)]);
        assert_eq!(truths.kind, ColumnKind::Bool);
        assert_eq!(
            (truths.truth(0), truths.truth(1), truths.number(2)),
            (Some(true), None, Some(0.0))
        );
        assert_eq!(truths.text(0).as_deref(), Some("true"));
        let mixed = column(vec![
            Cell::Number(1.0),
            Cell::Bool(true),
            Cell::Error("#N/A".into()),
        ]);
        let kinds: Vec<_> = mixed.issues().iter().map(|i| i.kind).collect();
        assert_eq!(
            kinds,
            [IssueKind::TextInNumbers, IssueKind::FormulaError],
            "a true/false cell among numbers is listed, not dropped"
        );
        let words = column(vec![
            Cell::Text("a".into()),
            Cell::Text("b".into()),
            Cell::Text("a".into()),
        ]);
        let (codes, distinct) = words.text_codes().unwrap();
        assert_eq!((codes[0], codes[2], distinct.len()), (0, 0, 2));
    }
}
