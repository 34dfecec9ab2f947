//! CSV and TSV. From the file itself sheaf detects the encoding (UTF-8,
//! UTF-16 by its byte-order mark, otherwise Windows-1252), the delimiter
//! (a `sep=;` first line, or the most common of `,` `;` tab `|`), the
//! number style (decimal comma, thousands marks) and the header row; the
//! recipe's `input` line can fix each. Every decision goes into the notes.

use std::io::Read;
use std::path::Path;

use encoding_rs::{Encoding, UTF_8, WINDOWS_1252};

use super::assemble::{self, Parts, TextCells};
use super::column::{ColumnBuilder, MAX_ROWS};
use super::csv_chunks::{self, ChunkPart, Chunking, Fallback};
use super::header::{self, TopRow};
use super::limits::Bounded;
use super::numbers::{NumberStyle, StyleEvidence};
use super::source::{Hashing, SourceInfo};
use super::table::{Cell, ReadNotes, Table};
use super::{LoadError, LoadOptions};

/// The pseudo-sheet name of a CSV file: its name without the ending.
pub fn sheet_name(path: &Path) -> String {
    path.file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "data".into())
}

/// How many lines of the head the delimiter is looked for in.
const DELIMITER_LINES: usize = 20;

/// The delimiter of the table in `head`, under any title lines: of `,` `;`
/// tab `|`, the one that splits the most of the first non-blank lines into
/// the same number of fields (a table's rows agree; a title line, or a
/// decimal comma in some cells, does not), then the one that splits them
/// into more; a comma when none appears.
fn detect_delimiter(head: &str) -> u8 {
    let lines: Vec<&str> = head
        .lines()
        .filter(|l| !l.trim().is_empty())
        .take(DELIMITER_LINES)
        .collect();
    // (lines that agree, the count they agree on) for one delimiter.
    let agreement = |d: u8| {
        let counts: Vec<usize> = lines.iter().map(|l| count_outside_quotes(l, d)).collect();
        counts
            .iter()
            .filter(|&&c| c > 0)
            .map(|&c| (counts.iter().filter(|&&x| x == c).count(), c))
            .max()
            .unwrap_or((0, 0))
    };
    [b',', b';', b'\t', b'|']
        .into_iter()
        .map(|d| (agreement(d), d))
        .filter(|((agreeing, _), _)| *agreeing > 0)
        .max_by_key(|(score, _)| *score)
        .map_or(b',', |(_, d)| d)
}

/// How often `delimiter` stands in `line` outside double quotes.
fn count_outside_quotes(line: &str, delimiter: u8) -> usize {
    let mut quoted = false;
    let mut count = 0;
    for byte in line.bytes() {
        if byte == b'"' {
            quoted = !quoted;
        } else if !quoted && byte == delimiter {
            count += 1;
        }
    }
    count
}

/// A `sep=;` first line, as some spreadsheet programs write: its delimiter.
fn separator_line(first_line: &str) -> Option<u8> {
    let rest = first_line
        .trim_end_matches(['\r', '\n'])
        .strip_prefix("sep=")?;
    match rest.as_bytes() {
        [d] if !d.is_ascii_alphanumeric() && *d != b'"' => Some(*d),
        _ => None,
    }
}

fn delimiter_name(d: u8) -> String {
    match d {
        b'\t' => "tab".into(),
        b',' => "comma".into(),
        b';' => "semicolon".into(),
        other => format!("`{}`", other as char),
    }
}

/// How the text of a file is laid out: what sheaf detected (or was told).
#[derive(Debug, Clone)]
pub(crate) struct Layout {
    pub(crate) delimiter: u8,
    /// The file opens with a `sep=` line, which is not a row.
    separator_line: bool,
    pub(crate) style: NumberStyle,
    notes: ReadNotes,
}

/// Detects the layout from the first part of the decoded text.
fn layout(head: &str, options: &LoadOptions, mut notes: ReadNotes) -> Layout {
    let first_line = head.lines().next().unwrap_or("");
    let (delimiter, separator_line) = match separator_line(first_line) {
        Some(d) => {
            notes.delimiter = Some(format!(
                "{} (from the file's `sep=` line)",
                delimiter_name(d)
            ));
            (d, true)
        }
        None => {
            let d = detect_delimiter(head);
            if d != b',' {
                notes.delimiter = Some(format!("{} (detected)", delimiter_name(d)));
            }
            (d, false)
        }
    };
    let mut evidence = StyleEvidence::default();
    let body = if separator_line {
        head.split_once('\n').map_or("", |(_, rest)| rest)
    } else {
        head
    };
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .has_headers(false)
        .flexible(true)
        .from_reader(body.as_bytes());
    for record in reader.records().map_while(Result::ok) {
        record.iter().for_each(|field| evidence.see(field));
    }
    let detected = evidence.decide(&options.number_style);
    if detected.style != NumberStyle::POINT || options.number_style.is_set() {
        let how = if options.number_style.is_set() {
            "set by the recipe"
        } else {
            "detected"
        };
        notes.number_style = Some(format!("{} ({how})", detected.style.describe()));
    }
    notes.number_doubt = detected.doubt;
    Layout {
        delimiter,
        separator_line,
        style: detected.style,
        notes,
    }
}

/// Adds a field to its column: a number if it reads as one in the file's
/// style (infinities and NaN do not count), a date if it is a day written
/// YYYY-MM-DD (ISO 8601, the one date form that cannot be misread),
/// otherwise text, blank or a spreadsheet error code.
pub(crate) fn push_field(column: &mut ColumnBuilder, field: &str, style: &NumberStyle) {
    let trimmed = trim_spaces(field);
    let number = if *style == NumberStyle::POINT {
        parse_point(trimmed)
    } else {
        style.parse(field)
    };
    match number {
        Some(x) => column.push(Cell::Number(x)),
        None if could_be_a_day(trimmed) => match crate::format::serial_from_calendar(trimmed) {
            Ok(serial) => column.push(Cell::Date(serial)),
            Err(_) => column.push_text(field),
        },
        None => column.push_text(field),
    }
}

/// `field.trim()`, without looking for Unicode spaces when the first and
/// last bytes are plain ASCII characters (the usual case).
fn trim_spaces(field: &str) -> &str {
    let plain = |b: &u8| b.is_ascii() && !char::from(*b).is_whitespace();
    let bytes = field.as_bytes();
    match (bytes.first(), bytes.last()) {
        (Some(first), Some(last)) if plain(first) && plain(last) => field,
        _ => field.trim(),
    }
}

/// A number written with a decimal point, finite only. fast-float2 reads
/// the same texts as the standard library's `str::parse` and gives the same
/// double (both round correctly; tested on 400,000 random texts), in less
/// time.
fn parse_point(text: &str) -> Option<f64> {
    match fast_float2::parse::<f64, _>(text) {
        Ok(x) if x.is_finite() => Some(x),
        _ => None,
    }
}

/// Whether `text` has the shape of YYYY-MM-DD (ten bytes, dashes at 4 and 7):
/// the only texts `format::serial_from_calendar` can accept.
fn could_be_a_day(text: &str) -> bool {
    let b = text.as_bytes();
    b.len() == 10 && b[4] == b'-' && b[7] == b'-'
}

/// The first bytes of the file: enough to see its encoding, delimiter and style.
const HEAD_BYTES: u64 = 1 << 16;

/// The encoding the recipe names, or the one its byte-order mark shows.
fn named_encoding(
    head: &[u8],
    options: &LoadOptions,
    shown: &str,
) -> Result<Option<(&'static Encoding, String)>, LoadError> {
    if let Some(label) = &options.encoding {
        let encoding = Encoding::for_label(label.trim().as_bytes()).ok_or_else(|| {
            LoadError::Malformed {
                path: shown.to_string(),
                reason: format!(
                    "the recipe names the encoding \"{label}\", which sheaf does not know; write for example \"utf-8\", \"utf-16le\", \"windows-1252\" or \"iso-8859-15\""
                ),
            }
        })?;
        return Ok(Some((
            encoding,
            format!("{} (set by the recipe)", encoding.name()),
        )));
    }
    Ok(Encoding::for_bom(head)
        .filter(|(e, _)| *e != UTF_8)
        .map(|(e, _)| (e, format!("{} (byte-order mark)", e.name()))))
}

/// The 1-based line of the first bytes that are not UTF-8 (a character cut
/// at the very end of the head does not count).
fn first_non_utf8_line(head: &[u8]) -> Option<usize> {
    match std::str::from_utf8(head) {
        Ok(_) => None,
        Err(e) if e.error_len().is_none() => None,
        Err(e) => Some(
            head[..e.valid_up_to()]
                .iter()
                .filter(|&&b| b == b'\n')
                .count()
                + 1,
        ),
    }
}

/// Why a streamed UTF-8 read stopped: bad data, or bytes that are not UTF-8.
pub(crate) enum Stop {
    Failed(LoadError),
    NotUtf8 { line: u64 },
}

impl From<LoadError> for Stop {
    fn from(e: LoadError) -> Self {
        Stop::Failed(e)
    }
}

fn unreadable(shown: &str, e: impl std::fmt::Display) -> LoadError {
    LoadError::Unreadable {
        path: shown.to_string(),
        reason: e.to_string(),
    }
}

/// Reads a CSV or TSV file. UTF-8 streams from the file (only the columns
/// are kept), in chunks parsed on all threads when it is large; other
/// encodings are decoded whole first.
pub fn load(path: &Path, options: &LoadOptions) -> Result<Table, LoadError> {
    load_with(path, options, Reading::Auto)
}

/// Files from this size on are read in chunks (`csv_chunks`); smaller
/// ones, where threads would gain little, by the reference reader.
const CHUNKED_FROM: u64 = 4 << 20;

// How often the chunked reader gave up on this thread, for the tests that
// compare it with the reference reader (a comparison after giving up proves
// nothing).
#[cfg(test)]
thread_local! {
    pub(crate) static FALLBACKS: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

/// Which reader reads a UTF-8 file.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Reading {
    /// Chunks for a file of [`CHUNKED_FROM`] bytes or more, else the reference.
    Auto,
    /// The records one after another, on one thread.
    Reference,
    /// Chunks cut as given, whatever the file's size.
    Chunked(Chunking),
}

/// [`load`] with the reader chosen.
pub(crate) fn load_with(
    path: &Path,
    options: &LoadOptions,
    reading: Reading,
) -> Result<Table, LoadError> {
    let shown = path.display().to_string();
    let file = std::fs::File::open(path).map_err(|e| unreadable(&shown, e))?;
    let mut hashing = Hashing::new(std::io::BufReader::with_capacity(1 << 20, file));
    let mut head = Vec::new();
    (&mut hashing)
        .take(HEAD_BYTES)
        .read_to_end(&mut head)
        .map_err(|e| unreadable(&shown, e))?;
    if let Some((encoding, how)) = named_encoding(&head, options, &shown)? {
        return load_decoded(path, head, hashing, encoding, how, options);
    }
    if let Some(line) = first_non_utf8_line(&head) {
        let how = format!(
            "Windows-1252 (line {line} is not UTF-8, so the whole file was read as Windows-1252; detected)"
        );
        return load_decoded(path, head, hashing, WINDOWS_1252, how, options);
    }
    if head.starts_with(b"\xEF\xBB\xBF") {
        head.drain(..3);
    }
    let layout = layout(
        &String::from_utf8_lossy(&head),
        options,
        ReadNotes::default(),
    );
    let mut input = Bounded::new(
        std::io::Cursor::new(head).chain(hashing),
        &shown,
        layout.delimiter,
    );
    let size = std::fs::metadata(path).map_or(0, |m| m.len());
    let chunking = match reading {
        Reading::Auto => (size >= CHUNKED_FROM).then_some(Chunking::STANDARD),
        Reading::Reference => None,
        Reading::Chunked(chunking) => Some(chunking),
    };
    if let Some(chunking) = chunking {
        let Ok((parts, input)) = read_chunked(input, &layout, &shown, options, chunking, size)
        else {
            // Something unusual: the reference reader says what, and where.
            #[cfg(test)]
            FALLBACKS.set(FALLBACKS.get() + 1);
            return load_with(path, options, Reading::Reference);
        };
        let (_, hashing) = input.into_inner().into_inner();
        return assemble::table(
            &shown,
            parts,
            TextCells::AlreadyRead,
            options,
            hashing.finish(path),
        );
    }
    match read_records(&mut input, &layout, &shown, options) {
        Ok(parts) => {
            let (_, hashing) = input.into_inner().into_inner();
            assemble::table(
                &shown,
                parts,
                TextCells::AlreadyRead,
                options,
                hashing.finish(path),
            )
        }
        Err(Stop::Failed(e)) => Err(e),
        Err(Stop::NotUtf8 { line }) => {
            // Valid UTF-8 at the top, not further down: read it all again.
            let file = std::fs::File::open(path).map_err(|e| unreadable(&shown, e))?;
            let how = format!(
                "Windows-1252 (line {line} is not UTF-8, so the whole file was read as Windows-1252; detected)"
            );
            load_decoded(
                path,
                Vec::new(),
                Hashing::new(file),
                WINDOWS_1252,
                how,
                options,
            )
        }
    }
}

/// The first `n` rows of a text file as its cells' texts (for `inspect`),
/// decoded and split as [`load`] would.
pub fn first_rows(path: &Path, n: usize) -> Result<Vec<Vec<String>>, LoadError> {
    let shown = path.display().to_string();
    let file = std::fs::File::open(path).map_err(|e| unreadable(&shown, e))?;
    let mut head = Vec::new();
    file.take(HEAD_BYTES)
        .read_to_end(&mut head)
        .map_err(|e| unreadable(&shown, e))?;
    let encoding = match Encoding::for_bom(&head) {
        Some((e, _)) => e,
        None if first_non_utf8_line(&head).is_some() => WINDOWS_1252,
        None => UTF_8,
    };
    let text = encoding.decode_with_bom_removal(&head).0.into_owned();
    let layout = layout(&text, &LoadOptions::default(), ReadNotes::default());
    let body = if layout.separator_line {
        text.split_once('\n').map_or("", |(_, rest)| rest)
    } else {
        &text
    };
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(layout.delimiter)
        .has_headers(false)
        .flexible(true)
        .from_reader(body.as_bytes());
    Ok(reader
        .records()
        .map_while(Result::ok)
        .take(n)
        .map(|r| r.iter().map(str::to_string).collect())
        .collect())
}

/// Reads the rest of the file, decodes it whole and reads its records.
fn load_decoded(
    path: &Path,
    mut bytes: Vec<u8>,
    mut rest: Hashing<impl Read>,
    encoding: &'static Encoding,
    how: String,
    options: &LoadOptions,
) -> Result<Table, LoadError> {
    let shown = path.display().to_string();
    rest.read_to_end(&mut bytes)
        .map_err(|e| unreadable(&shown, e))?;
    let source: SourceInfo = rest.finish(path);
    let text = encoding.decode_with_bom_removal(&bytes).0.into_owned();
    drop(bytes);
    let notes = ReadNotes {
        encoding: Some(how),
        ..ReadNotes::default()
    };
    let head_end = text.floor_char_boundary(HEAD_BYTES as usize);
    let layout = layout(&text[..head_end], options, notes);
    let input = Bounded::new(text.as_bytes(), &shown, layout.delimiter);
    match read_records(input, &layout, &shown, options) {
        Ok(parts) => assemble::table(&shown, parts, TextCells::AlreadyRead, options, source),
        Err(Stop::Failed(e)) => Err(e),
        Err(Stop::NotUtf8 { .. }) => unreachable!("decoded text is UTF-8"),
    }
}

/// Columns filled from records, with the header row found or given.
struct Filling {
    header_row: Option<u32>,
    names: Vec<String>,
    grid: Vec<ColumnBuilder>,
    body_rows: usize,
}

impl Filling {
    /// Adds the record on 0-based sheet row `row`, under the header.
    fn add(
        &mut self,
        row: u32,
        record: &csv::StringRecord,
        style: &NumberStyle,
        path: &str,
    ) -> Result<(), LoadError> {
        let header = self.header_row.expect("the header row is known") - 1;
        if row < header {
            return Ok(());
        }
        if row == header {
            self.names = record.iter().map(|f| f.trim().to_string()).collect();
            self.grid = (0..record.len())
                .map(|_| ColumnBuilder::default())
                .collect();
            return Ok(());
        }
        let body_row = (row - header - 1) as usize;
        if body_row >= MAX_ROWS {
            return Err(LoadError::Malformed {
                path: path.to_string(),
                reason: format!(
                    "more than {MAX_ROWS} data rows; split the file or filter it before reading"
                ),
            });
        }
        // Rows skipped as empty lines by the CSV reader are blank rows.
        while self.body_rows < body_row {
            self.grid.iter_mut().for_each(|c| c.push(Cell::Blank));
            self.body_rows += 1;
        }
        push_record(
            &mut self.grid,
            self.body_rows,
            record,
            style,
            &mut Vec::new(),
        );
        self.body_rows += 1;
        Ok(())
    }
}

/// Adds a record as the next row of `grid`, whose columns hold `rows`
/// cells each: blank cells where the record is short, new columns (blank
/// above) where it is long, taken from `spare` (empty builders with room)
/// while it has any.
pub(crate) fn push_record(
    grid: &mut Vec<ColumnBuilder>,
    rows: usize,
    record: &csv::StringRecord,
    style: &NumberStyle,
    spare: &mut Vec<ColumnBuilder>,
) {
    while record.len() > grid.len() {
        let mut column = spare.pop().unwrap_or_default();
        (0..rows).for_each(|_| column.push(Cell::Blank));
        grid.push(column);
    }
    for (c, column) in grid.iter_mut().enumerate() {
        push_field(column, record.get(c).unwrap_or(""), style);
    }
}

/// The cells of a record as the header finder sees them.
fn top_row(row: u32, record: &csv::StringRecord, style: &NumberStyle) -> TopRow {
    let cells = record
        .iter()
        .enumerate()
        .filter(|(_, f)| !f.trim().is_empty())
        .map(|(c, f)| {
            let cell = match style.parse(f) {
                Some(x) => Cell::Number(x),
                None => Cell::from_text(f),
            };
            (c as u32, cell)
        })
        .collect();
    (row, cells)
}

/// Where records fall in the sheet's rows. The csv reader skips empty lines
/// without a record; they are rows too. After a record the reader stands on
/// the line after it, so the record began that many lines back, less the
/// line breaks inside its fields.
#[derive(Debug, Clone, Copy)]
pub(crate) struct LineRows {
    /// The 0-based sheet row of the next record, before the empty lines
    /// in front of it are counted.
    pub(crate) row: u32,
    /// The line the reader stood on after the last record.
    pub(crate) next_line: u64,
}

impl LineRows {
    /// The line a record began on, as far as the reader's count tells,
    /// when the reader stands on line `after` after it.
    pub(crate) fn start_line(after: u64, record: &csv::StringRecord) -> u64 {
        // A plain count: memchr's setup costs more on a record's few bytes.
        let inner_breaks = record.as_slice().bytes().filter(|&b| b == b'\n').count();
        after.saturating_sub(1 + inner_breaks as u64)
    }

    /// The row of a record after which the reader stands on line `after`.
    pub(crate) fn place(&mut self, after: u64, record: &csv::StringRecord) -> u32 {
        let line = LineRows::start_line(after, record);
        self.row += line.saturating_sub(self.next_line) as u32;
        self.next_line = after;
        self.row
    }
}

/// The reference reader: records taken one after another, in file order,
/// from one stream or from consecutive chunks of it cut at record
/// boundaries. The chunked reader (`csv_chunks`) hands it the first records
/// (where the header is found) and then adds whole chunks parsed apart.
pub(crate) struct Records<'a> {
    layout: &'a Layout,
    path: &'a str,
    filling: Filling,
    notes: ReadNotes,
    /// Until the header row is found, records wait here with their rows.
    waiting: Vec<(u32, csv::StringRecord)>,
    pub(crate) rows: LineRows,
    /// Line feeds before the part read next (0 for the file's start).
    pub(crate) line_base: u64,
    skip_separator: bool,
    any: bool,
}

impl<'a> Records<'a> {
    pub(crate) fn new(layout: &'a Layout, path: &'a str, options: &LoadOptions) -> Records<'a> {
        Records {
            layout,
            path,
            filling: Filling {
                header_row: options.header_row,
                names: Vec::new(),
                grid: Vec::new(),
                body_rows: 0,
            },
            notes: layout.notes.clone(),
            waiting: Vec::new(),
            rows: LineRows {
                row: 0,
                next_line: 1,
            },
            line_base: 0,
            skip_separator: layout.separator_line,
            any: false,
        }
    }

    /// Reads every record of `input`, the part of the file after
    /// `self.line_base` line feeds, starting at a record's start.
    pub(crate) fn feed(&mut self, input: impl Read) -> Result<(), Stop> {
        let mut reader = csv_reader(self.layout.delimiter, input);
        let mut record = csv::StringRecord::new();
        loop {
            match reader.read_record(&mut record) {
                Ok(false) => break,
                Ok(true) => {}
                Err(e) => {
                    return Err(match e.kind() {
                        csv::ErrorKind::Utf8 { pos, .. } => Stop::NotUtf8 {
                            line: self.line_base
                                + pos
                                    .as_ref()
                                    .map_or(self.rows.next_line - self.line_base, |p| p.line()),
                        },
                        _ => LoadError::Malformed {
                            path: self.path.to_string(),
                            reason: e.to_string(),
                        }
                        .into(),
                    });
                }
            }
            let row = self
                .rows
                .place(self.line_base + reader.position().line(), &record);
            if std::mem::take(&mut self.skip_separator) {
                continue;
            }
            self.any = true;
            if self.filling.header_row.is_some() {
                self.filling
                    .add(row, &record, &self.layout.style, self.path)?;
            } else {
                self.waiting.push((row, record.clone()));
                if self.waiting.len() == header::ROWS_LOOKED_AT {
                    self.settle_header()?;
                }
            }
            self.rows.row += 1;
        }
        self.line_base = self.line_base + reader.position().line() - 1;
        Ok(())
    }

    fn settle_header(&mut self) -> Result<(), LoadError> {
        settle_header(
            &mut self.filling,
            &mut self.waiting,
            self.layout,
            self.path,
            &mut self.notes,
        )
    }

    /// Whether the records still to come all lie below the header row, so
    /// that they can be parsed apart and added whole.
    pub(crate) fn past_header(&self) -> bool {
        self.filling
            .header_row
            .is_some_and(|header| self.rows.row >= header)
    }

    /// Makes room in every column for `rows` more rows.
    pub(crate) fn reserve(&mut self, rows: usize) {
        self.filling.grid.iter_mut().for_each(|c| c.reserve(rows));
    }

    /// Adds a chunk parsed apart, the part of the file after
    /// `self.line_base` line feeds; only once [`Records::past_header`].
    /// The part's columns are left empty, to be used again.
    pub(crate) fn absorb(&mut self, part: &mut ChunkPart) -> Result<(), Fallback> {
        let base = self.line_base;
        self.line_base += part.lines;
        let Some(first_line) = part.first_line else {
            return Ok(());
        };
        self.any = true;
        self.rows.row += (base + first_line).saturating_sub(self.rows.next_line) as u32;
        let header_row = self.filling.header_row.ok_or(Fallback)?;
        let start = self.rows.row.checked_sub(header_row).ok_or(Fallback)? as usize;
        if start + part.rows > MAX_ROWS {
            return Err(Fallback);
        }
        let filling = &mut self.filling;
        while filling.body_rows < start {
            filling.grid.iter_mut().for_each(|c| c.push(Cell::Blank));
            filling.body_rows += 1;
        }
        while filling.grid.len() < part.grid.len() {
            filling.grid.push(ColumnBuilder::blanks(filling.body_rows));
        }
        let mut theirs = part.grid.iter_mut();
        for column in &mut filling.grid {
            match theirs.next() {
                Some(later) => column.append(later),
                None => column.append(&mut ColumnBuilder::blanks(part.rows)),
            }
        }
        filling.body_rows += part.rows;
        self.rows.row += part.rows as u32;
        self.rows.next_line = base + part.last_after;
        Ok(())
    }

    /// The columns, once every record is in.
    fn finish(mut self, sheet: String) -> Result<Parts, Stop> {
        if self.filling.header_row.is_none() {
            self.settle_header()?;
        }
        let filling = &mut self.filling;
        let header_row = filling.header_row.unwrap_or(1);
        if !self.any {
            return Err(LoadError::EmptySheet {
                path: self.path.to_string(),
                sheet,
            }
            .into());
        }
        if filling.names.is_empty() && filling.grid.is_empty() {
            return Err(LoadError::NoHeaderRow {
                path: self.path.to_string(),
                sheet,
                row: header_row,
            }
            .into());
        }
        let width = filling.grid.len().max(filling.names.len());
        filling.names.resize(width, String::new());
        let rows = filling.body_rows;
        filling
            .grid
            .resize_with(width, || ColumnBuilder::blanks(rows));
        Ok(Parts {
            sheet,
            header_row,
            names: std::mem::take(&mut filling.names),
            builders: std::mem::take(&mut filling.grid),
            rows,
            notes: self.notes,
        })
    }
}

/// The csv crate's reader as sheaf uses it: no header handling (sheaf finds
/// the header itself), rows of any length.
pub(crate) fn csv_reader<R: Read>(delimiter: u8, input: R) -> csv::Reader<R> {
    csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .has_headers(false)
        .flexible(true)
        .from_reader(input)
}

/// The sheet name of a CSV file, or the error when the recipe names another.
fn check_sheet(path: &str, options: &LoadOptions) -> Result<String, LoadError> {
    let sheet = sheet_name(Path::new(path));
    if let Some(asked) = options.sheet.as_ref().filter(|s| **s != sheet) {
        return Err(LoadError::NoSuchSheet {
            path: path.to_string(),
            sheet: asked.clone(),
            available: format!("\"{sheet}\" (a CSV file has one sheet, named after the file)"),
        });
    }
    Ok(sheet)
}

/// The records of a CSV file as columns, read in chunks (`csv_chunks`);
/// Err when the file should be read the reference way.
fn read_chunked<R: Read + Send>(
    input: R,
    layout: &Layout,
    path: &str,
    options: &LoadOptions,
    chunking: Chunking,
    size: u64,
) -> Result<(Parts, R), Fallback> {
    let sheet = check_sheet(path, options).map_err(|_| Fallback)?;
    let mut records = Records::new(layout, path, options);
    let input = csv_chunks::read(input, &mut records, layout, chunking, size)?;
    let parts = records.finish(sheet).map_err(|_| Fallback)?;
    Ok((parts, input))
}

/// The records of a CSV file as columns, read one after another (the
/// reference reader). Rows are counted as a spreadsheet shows them: an
/// empty line is a (blank) row, a quoted field with line breaks stays in
/// one row.
fn read_records(
    input: impl Read,
    layout: &Layout,
    path: &str,
    options: &LoadOptions,
) -> Result<Parts, Stop> {
    let sheet = check_sheet(path, options)?;
    let mut records = Records::new(layout, path, options);
    records.feed(input)?;
    records.finish(sheet)
}

/// Finds the header among the waiting records, then fills them in.
fn settle_header(
    filling: &mut Filling,
    waiting: &mut Vec<(u32, csv::StringRecord)>,
    layout: &Layout,
    path: &str,
    notes: &mut ReadNotes,
) -> Result<(), LoadError> {
    let top: Vec<TopRow> = waiting
        .iter()
        .map(|(row, record)| top_row(*row, record, &layout.style))
        .filter(|(_, cells)| !cells.is_empty())
        .collect();
    let found = header::find(&top);
    notes.header = found.as_ref().and_then(|f| f.note.clone());
    filling.header_row = Some(found.map_or(1, |f| f.row + 1));
    for (row, record) in waiting.drain(..) {
        filling.add(row, &record, &layout.style, path)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table_with(text: &[u8], options: &LoadOptions) -> Result<Table, LoadError> {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("deliveries.csv");
        std::fs::write(&path, text).unwrap();
        load(&path, options)
    }

    fn table(text: &str) -> Result<Table, LoadError> {
        table_with(text.as_bytes(), &LoadOptions::default())
    }

    /// What `push_field` read before fast-float2: the standard library.
    fn std_point(text: &str) -> Option<f64> {
        text.parse::<f64>().ok().filter(|x| x.is_finite())
    }

    #[test]
    fn the_fast_float_parser_reads_every_text_as_the_standard_library_does() {
        let mut rng = crate::stats::SplitMix64(2026);
        let mut pick = |n: usize| (rng.uniform() * n as f64) as usize;
        // Decimal numbers of every length, and texts near the number syntax.
        let alphabet = [
            "0", "1", "5", "9", ".", "e", "E", "-", "+", "_", " ", "i", "n", "f", "a", ",",
        ];
        let mut checked = 0;
        for case in 0..400_000 {
            let text = if case % 2 == 0 {
                let digits: String = (0..1 + pick(20))
                    .map(|_| char::from(b'0' + pick(10) as u8))
                    .collect();
                let at = pick(digits.len() + 1);
                let mut t = format!(
                    "{}{}.{}",
                    ["", "-", "+"][pick(3)],
                    &digits[..at],
                    &digits[at..]
                );
                if pick(4) == 0 {
                    t.push_str(&format!("e{}{}", ["", "-", "+"][pick(3)], pick(400)));
                }
                t
            } else {
                (0..pick(8))
                    .map(|_| alphabet[pick(alphabet.len())])
                    .collect()
            };
            let (ours, reference) = (parse_point(&text), std_point(&text));
            assert_eq!(
                ours.map(f64::to_bits),
                reference.map(f64::to_bits),
                "{text:?}"
            );
            checked += usize::from(reference.is_some());
        }
        assert!(checked > 200_000, "mostly numbers: {checked}");
        for text in [
            "1.e5",
            ".5",
            "5.",
            "+.5",
            "-0",
            "inf",
            "NaN",
            "1e",
            "e5",
            ".",
            "",
            "0x10",
            "1_0",
            "4.9e-324",
            "1.7976931348623157e308",
            "2.2250738585072011e-308",
            "9007199254740993",
            "0.1e-400",
        ] {
            assert_eq!(
                parse_point(text).map(f64::to_bits),
                std_point(text).map(f64::to_bits),
                "{text:?}"
            );
        }
    }

    #[test]
    fn delimiters_and_byte_order_mark() {
        assert_eq!(detect_delimiter("a;b;c"), b';');
        assert_eq!(detect_delimiter("a\tb"), b'\t');
        assert_eq!(detect_delimiter("\"x;y\",b"), b',');
        // Under a title line, with decimal commas in some cells: the table's
        // semicolons (the first line alone once gave a comma, and the file
        // read as columns split at each decimal comma).
        let titled =
            "Lab QC export (invented)\n\nline;shipped;weight\nA;2026-10-02;12,5\nB;2026-10-04;13\n";
        assert_eq!(detect_delimiter(titled), b';');
        let comma_title = "Lab QC, October (invented)\nline;weight\nA;12,5\nB;13,1\nC;9\n";
        assert_eq!(detect_delimiter(comma_title), b';');
        assert_eq!(detect_delimiter("x,y\n1,2\n3,4\n"), b',');
        let t = table("\u{feff}depot;weight\nNorth;2,5\nSouth;3\n").unwrap();
        assert_eq!(t.headers(), ["depot", "weight"]);
        let weight = &t.columns[1];
        assert_eq!((weight.number(0), weight.number(1)), (Some(2.5), Some(3.0)));
        assert_eq!(
            t.notes.number_style.as_deref(),
            Some("decimal comma (detected)")
        );
    }

    #[test]
    fn a_separator_line_sets_the_delimiter_and_is_not_a_row() {
        let t = table("sep=;\ndepot;weight\nNorth;1.5\n").unwrap();
        assert_eq!(t.headers(), ["depot", "weight"]);
        assert_eq!(t.header_row, 1);
        assert_eq!(t.columns[1].number(0), Some(1.5));
        assert!(t.notes.delimiter.as_deref().unwrap().contains("sep="));
    }

    #[test]
    fn empty_lines_are_blank_rows_and_addresses_stay_true() {
        let t = table("depot,weight\nNorth,1\n\nSouth,x\n").unwrap();
        let weight = t.column("weight").unwrap();
        assert_eq!(t.rows, 2);
        assert_eq!(t.notes.blank_rows, [3]);
        assert_eq!(t.address(weight, weight.issues()[0].row), "deliveries!B4");
    }

    #[test]
    fn other_encodings_are_decoded_and_said() {
        // "Qualität;Gewicht" and a Latin-1 umlaut in a key.
        let latin1 = b"Linie;Gewicht\nM\xfcnchen;1,5\nKoeln;2\n";
        let t = table_with(latin1, &LoadOptions::default()).unwrap();
        assert_eq!(t.columns[0].text(0).as_deref(), Some("München"));
        assert_eq!(t.columns[1].number(0), Some(1.5));
        assert!(
            t.notes
                .encoding
                .as_deref()
                .unwrap()
                .contains("Windows-1252"),
            "{:?}",
            t.notes
        );
        let text = "line,weight\nNord,1.5\n";
        let mut utf16: Vec<u8> = vec![0xFF, 0xFE];
        text.encode_utf16()
            .for_each(|u| utf16.extend(u.to_le_bytes()));
        let t = table_with(&utf16, &LoadOptions::default()).unwrap();
        assert_eq!(t.columns[1].number(0), Some(1.5));
        assert!(t.notes.encoding.as_deref().unwrap().contains("UTF-16LE"));
    }

    #[test]
    fn ragged_rows_are_padded_with_blanks_and_addressed() {
        let t = table("depot,weight,note\nNorth,2\nSouth,n/a,x\n").unwrap();
        let weight = t.column("weight").unwrap();
        assert_eq!(weight.kind, super::super::ColumnKind::Number);
        let issues = weight.issues();
        assert_eq!(issues.len(), 1);
        assert_eq!(t.address(weight, issues[0].row), "deliveries!B3");
        assert_eq!(
            t.column("note").unwrap().issues()[0].kind,
            super::super::IssueKind::Blank
        );
    }

    #[test]
    fn bad_headers_are_refused_with_their_cells() {
        let e = table("a,a\n1,2\n").unwrap_err().to_string();
        assert!(e.contains("\"a\" appears twice, at A1 and B1"), "{e}");
        let e = table("a,,c\n1,2,3\n").unwrap_err().to_string();
        assert!(e.contains("header B1 is blank"), "{e}");
        assert!(table("a,,c\n1,,3\n").is_ok());
        assert!(table("").unwrap_err().to_string().contains("is empty"));
    }
}
