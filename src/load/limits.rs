//! Resource limits of the loaders, checked while reading so that a small
//! hostile file fails early and clearly instead of making sheaf allocate
//! without bound: cells beyond a sheet's real limits, ranges whose dense
//! size is far beyond the cells they hold, endless lines and files, and a
//! spreadsheet reader that panics or never finishes.
//!
//! Every refusal names the file and the place, and says how to go on. The
//! byte limits can be raised with environment variables (named in the
//! messages) for the rare honest file beyond them.

use std::io::Read;
use std::path::Path;
use std::sync::mpsc;
use std::time::Duration;

use calamine::{DataRef, Xlsx};

use super::LoadError;
use super::quote_scan::{Quote, QuoteScan};
use super::table::cell_address;

/// The rows and columns a spreadsheet sheet holds (xlsx and ods: 1,048,576
/// rows by 16,384 columns, XFD): cells beyond them cannot be real, and a
/// result sheet cannot be longer.
pub const MAX_SHEET_ROWS: u32 = 1 << 20;
/// The most columns a sheet may have, as in xlsx (16,384).
pub const MAX_SHEET_COLUMNS: u32 = 1 << 14;

/// Longest line of a CSV file, in bytes, unless `SHEAF_MAX_LINE_BYTES` says otherwise.
pub const MAX_LINE_BYTES: u64 = 64 << 20;
/// Largest file sheaf reads, in bytes, unless `SHEAF_MAX_FILE_BYTES` says otherwise.
pub const MAX_FILE_BYTES: u64 = 64 << 30;

/// A limit, from its environment variable when that holds a number.
pub(crate) fn limit(variable: &str, default: u64) -> u64 {
    std::env::var(variable)
        .ok()
        .and_then(|v| v.trim().replace('_', "").parse().ok())
        .unwrap_or(default)
}

fn refused(path: &str, reason: String) -> LoadError {
    LoadError::Malformed {
        path: path.to_string(),
        reason,
    }
}

/// Refuses a cell beyond the sheet's real limits (0-based row and column).
pub fn check_cell(path: &str, sheet: &str, row: u32, column: u32) -> Result<(), LoadError> {
    if row < MAX_SHEET_ROWS && column < MAX_SHEET_COLUMNS {
        return Ok(());
    }
    let place = if column < MAX_SHEET_COLUMNS {
        format!("{sheet}!{}", cell_address(column, row as usize + 1))
    } else {
        format!(
            "sheet \"{sheet}\", row {}, column {}",
            u64::from(row) + 1,
            u64::from(column) + 1
        )
    };
    Err(refused(
        path,
        format!(
            "a cell at {place} lies beyond the {MAX_SHEET_ROWS} rows and {MAX_SHEET_COLUMNS} columns a sheet can hold; the file is damaged: open and save it again, or export it as CSV"
        ),
    ))
}

/// Refuses a file too large to read, a folder, and, for a spreadsheet
/// (`regular_only`), anything but a regular file (a device such as
/// /dev/zero would be read for ever), before any reading.
pub fn check_file(path: &Path, regular_only: bool) -> Result<(), LoadError> {
    let shown = path.display().to_string();
    let Ok(meta) = std::fs::metadata(path) else {
        return Ok(()); // the loader's own open names the problem
    };
    if meta.is_dir() {
        return Err(refused(&shown, "this is a folder, not a data file".into()));
    }
    if regular_only && !meta.is_file() {
        return Err(refused(
            &shown,
            "this is not a regular file (a device or a pipe); a spreadsheet must be a file".into(),
        ));
    }
    let most = limit("SHEAF_MAX_FILE_BYTES", MAX_FILE_BYTES);
    if meta.is_file() && meta.len() > most {
        return Err(refused(
            &shown,
            format!(
                "the file has {} bytes, more than the {most} sheaf reads; split it, or set SHEAF_MAX_FILE_BYTES to a larger number of bytes",
                meta.len()
            ),
        ));
    }
    Ok(())
}

/// The checks before a spreadsheet is opened: a regular file of a readable
/// size and, for ods and xls, no claim that makes calamine allocate without
/// bound or read for ever.
pub fn check_spreadsheet(path: &Path) -> Result<(), LoadError> {
    check_file(path, true)?;
    let ending = path.extension().and_then(|e| e.to_str()).unwrap_or("");
    let size = std::fs::metadata(path).map(|m| m.len()).unwrap_or(0);
    let allowance = |cells| dense_allowance(cells, size);
    if ending.eq_ignore_ascii_case("ods") {
        super::ods_check::check(path, allowance)?;
    }
    if ending.eq_ignore_ascii_case("xls") {
        super::xls_check::check(path, allowance)?;
    }
    Ok(())
}

/// A reader that stops with a clear error at a line longer than the line
/// limit, a stream longer than the file limit (a device such as /dev/zero
/// named .csv, or a file of one endless line), or an end of file inside a
/// quoted field (the csv reader would take the rest of the file as that
/// field without a word).
pub struct Bounded<R> {
    inner: R,
    path: String,
    /// The 1-based line the next byte is on.
    line: u64,
    line_bytes: u64,
    total: u64,
    max_line: u64,
    max_total: u64,
    quotes: QuoteScan,
    /// The line of the quote that opened the quoted field the text is in.
    opened_line: u64,
}

impl<R: Read> Bounded<R> {
    /// Wraps `inner`, a CSV text with fields split by `delimiter`, read as `path`.
    pub fn new(inner: R, path: &str, delimiter: u8) -> Self {
        Bounded {
            inner,
            path: path.to_string(),
            line: 1,
            line_bytes: 0,
            total: 0,
            max_line: limit("SHEAF_MAX_LINE_BYTES", MAX_LINE_BYTES),
            max_total: limit("SHEAF_MAX_FILE_BYTES", MAX_FILE_BYTES),
            quotes: QuoteScan::new(delimiter, false),
            opened_line: 0,
        }
    }

    /// The reader wrapped.
    pub fn into_inner(self) -> R {
        self.inner
    }

    fn error(&self, reason: String) -> std::io::Error {
        std::io::Error::other(format!("{}: {reason}", self.path))
    }

    /// Follows lines and quotes through `bytes`, the next bytes read;
    /// an error at a line over the limit.
    fn follow(&mut self, bytes: &[u8]) -> std::io::Result<()> {
        // The line of each quote that opens a field, counted from the last one.
        let (mut counted_to, mut counted_line) = (0, self.line);
        let mut opened_line = None;
        self.quotes.scan(bytes, |at| {
            counted_line += memchr::memchr_iter(b'\n', &bytes[counted_to..at]).count() as u64;
            counted_to = at;
            opened_line = Some(counted_line);
        });
        if let Some(line) = opened_line {
            self.opened_line = line;
        }
        let mut line_start = 0;
        for end in memchr::memchr_iter(b'\n', bytes).chain([bytes.len()]) {
            self.line_bytes += (end - line_start) as u64;
            if self.line_bytes > self.max_line {
                return Err(self.error(format!(
                    "line {} is longer than {} bytes; the file is not line-based text (or set SHEAF_MAX_LINE_BYTES to a larger number of bytes)",
                    self.line, self.max_line
                )));
            }
            if end < bytes.len() {
                self.line += 1;
                self.line_bytes = 0;
            }
            line_start = end + 1;
        }
        Ok(())
    }
}

impl<R: Read> Read for Bounded<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        if n == 0 && !buf.is_empty() && self.quotes.state() == Quote::Quoted {
            return Err(self.error(format!(
                "the quoted field opened on line {} is never closed (a \" is missing); the rest of the file would be read as that one field",
                self.opened_line
            )));
        }
        self.follow(&buf[..n])?;
        self.total += n as u64;
        if self.total > self.max_total {
            return Err(self.error(format!(
                "the input goes on beyond {} bytes; split it, or set SHEAF_MAX_FILE_BYTES to a larger number of bytes",
                self.max_total
            )));
        }
        Ok(n)
    }
}

/// Checks, before calamine reads an xlsx sheet as one dense range, that the
/// range is not far larger than the cells it holds (cells scattered to
/// opposite corners would make it allocate rows x columns cells) and that
/// every cell lies inside the sheet.
pub fn check_xlsx_range(path: &Path, sheet: &str) -> Result<(), LoadError> {
    let shown = path.display().to_string();
    let unreadable = |e: String| LoadError::Unreadable {
        path: shown.clone(),
        reason: e,
    };
    let mut workbook: Xlsx<_> =
        calamine::open_workbook(path).map_err(|e| unreadable(format!("{e}")))?;
    let mut reader = workbook
        .worksheet_cells_reader(sheet)
        .map_err(|e| unreadable(format!("{e}")))?;
    let (mut low, mut high) = ((u32::MAX, u32::MAX), (0u32, 0u32));
    let mut cells = 0u64;
    while let Some(cell) = reader.next_cell().map_err(|e| unreadable(format!("{e}")))? {
        if *cell.get_value() == DataRef::Empty {
            continue;
        }
        let (row, column) = cell.get_position();
        check_cell(&shown, sheet, row, column)?;
        (low, high) = (
            (low.0.min(row), low.1.min(column)),
            (high.0.max(row), high.1.max(column)),
        );
        cells += 1;
    }
    if cells == 0 {
        return Ok(());
    }
    let dense = u64::from(high.0 - low.0 + 1) * u64::from(high.1 - low.1 + 1);
    let size = std::fs::metadata(path).map(|m| m.len()).unwrap_or(0);
    if dense > dense_allowance(cells, size) {
        return Err(refused(
            &shown,
            format!(
                "sheet \"{sheet}\" has its {cells} cells spread over {sheet}!{} to {} ({dense} cells as a block) and its rows out of order; sheaf reads such a sheet as one block, which would need far more memory than its data. Open and save the file again (which puts the rows in order), or export it as CSV",
                cell_address(low.1, low.0 as usize + 1),
                cell_address(high.1, high.0 as usize + 1)
            ),
        ));
    }
    Ok(())
}

/// How many cells a dense block may have: a few times the cells it holds
/// or the file's bytes (a block cell takes about 32 bytes, so this keeps
/// memory within about 100 times the file), and never less than 2^20.
fn dense_allowance(cells: u64, file_bytes: u64) -> u64 {
    (8 * cells).max(3 * file_bytes).max(1 << 20)
}

/// Longest a spreadsheet reader may take, unless `SHEAF_READ_SECONDS` says
/// otherwise: 2 minutes and 1 second more per 100 KB of file.
fn time_limit(path: &Path) -> Duration {
    let size = std::fs::metadata(path).map(|m| m.len()).unwrap_or(0);
    Duration::from_secs(limit("SHEAF_READ_SECONDS", 120 + size / 100_000))
}

/// The name of the threads that run a spreadsheet reader; a panic on them
/// is reported as a damaged file, not printed.
const READER_THREAD: &str = "sheaf-reader";

/// Runs a spreadsheet reader on a thread of its own, so that a panic in it
/// becomes a clear error (without the panic's own message) and a reader
/// that never finishes is abandoned after the time limit with an error.
pub fn guarded<T: Send + 'static>(
    path: &Path,
    read: impl FnOnce() -> Result<T, LoadError> + Send + 'static,
) -> Result<T, LoadError> {
    guarded_for(path, time_limit(path), read)
}

fn guarded_for<T: Send + 'static>(
    path: &Path,
    limit: Duration,
    read: impl FnOnce() -> Result<T, LoadError> + Send + 'static,
) -> Result<T, LoadError> {
    quiet_reader_panics();
    let shown = path.display().to_string();
    let damaged = |reason: &str| LoadError::Unreadable {
        path: shown.clone(),
        reason: reason.to_string(),
    };
    let (sender, receiver) = mpsc::channel();
    let spawned = std::thread::Builder::new()
        .name(READER_THREAD.into())
        .spawn(move || {
            let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(read));
            let _ = sender.send(outcome);
        });
    if spawned.is_err() {
        return Err(damaged("could not start a thread to read the file"));
    }
    match receiver.recv_timeout(limit) {
        Ok(Ok(result)) => result,
        Ok(Err(_)) => Err(damaged(
            "the workbook is damaged and could not be read; open and save it again, or export it as CSV",
        )),
        Err(mpsc::RecvTimeoutError::Timeout) => Err(damaged(&format!(
            "reading the workbook did not finish in {} s, so it was stopped; the file is likely damaged: open and save it again, or export it as CSV (SHEAF_READ_SECONDS sets a longer limit)",
            limit.as_secs()
        ))),
        Err(mpsc::RecvTimeoutError::Disconnected) => {
            Err(damaged("the reader stopped without a result"))
        }
    }
}

/// Installs, once, a panic hook that stays silent on reader threads and
/// leaves every other panic to the hook that was there before.
fn quiet_reader_panics() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            if std::thread::current().name() != Some(READER_THREAD) {
                previous(info);
            }
        }));
    });
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cells_beyond_the_sheet_are_named() {
        assert!(check_cell("f.xlsx", "S", MAX_SHEET_ROWS - 1, MAX_SHEET_COLUMNS - 1).is_ok());
        let e = check_cell("f.xlsx", "S", 3_999_999_999, 0)
            .unwrap_err()
            .to_string();
        assert!(e.contains("f.xlsx") && e.contains("S!A4000000000"), "{e}");
        let e = check_cell("f.xlsx", "S", 0, 321_272_405)
            .unwrap_err()
            .to_string();
        assert!(e.contains("column 321272406"), "{e}");
    }

    #[test]
    fn endless_lines_stop_at_the_limit() {
        let endless = std::io::repeat(0).take(1 << 30);
        let mut bounded = Bounded::new(endless, "zero.csv", b',');
        bounded.max_line = 1000;
        let e = std::io::copy(&mut bounded, &mut std::io::sink())
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("zero.csv: line 1 is longer than 1000 bytes"),
            "{e}"
        );
        let mut lines = Bounded::new(&b"a\nbb\nccc\n"[..], "ok.csv", b',');
        lines.max_line = 3;
        assert!(std::io::copy(&mut lines, &mut std::io::sink()).is_ok());
    }

    fn read_all(text: &[u8]) -> Result<u64, String> {
        let mut r = Bounded::new(text, "q.csv", b',');
        std::io::copy(&mut r, &mut std::io::sink()).map_err(|e| e.to_string())
    }

    #[test]
    fn an_unclosed_quote_is_named_with_its_line() {
        assert!(read_all(b"a,b\n\"x, \"\"y\"\"\",2\n\"multi\nline\",3\n").is_ok());
        assert!(
            read_all(b"a,b\n5\" pipe,2\n").is_ok(),
            "a quote inside a field is text"
        );
        let e = read_all(b"a,b\n1,2\n\"open,3\n4,5\n").unwrap_err();
        assert!(
            e.contains("q.csv: the quoted field opened on line 3 is never closed"),
            "{e}"
        );
    }

    #[test]
    fn a_panicking_or_endless_reader_ends_in_an_error() {
        let e = guarded(Path::new("p.xls"), || -> Result<(), LoadError> {
            panic!("inside")
        })
        .unwrap_err()
        .to_string();
        assert!(e.contains("p.xls") && e.contains("damaged"), "{e}");
        let e = guarded_for(Path::new("spin.ods"), Duration::from_millis(50), || {
            std::thread::sleep(Duration::from_secs(2));
            Ok(())
        })
        .unwrap_err()
        .to_string();
        assert!(
            e.contains("spin.ods") && e.contains("did not finish"),
            "{e}"
        );
    }
}
