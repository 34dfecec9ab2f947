//! The chunked CSV reader: a large UTF-8 file is cut into chunks of about a
//! megabyte that end at record boundaries, and the chunks are parsed on all
//! threads while the next ones are read, each into columns of its own that
//! are then joined in file order. It gives exactly the reference reader's
//! result (`csv_file::Records` fed the whole stream; tested on the test
//! corpus and on generated tricky files): the first records, where the
//! header is found, go through the reference reader itself; a chunk's rows
//! and line numbers are counted from its start and shifted when it is
//! joined; anything unusual (bytes that are not UTF-8, a read error, a
//! quote never closed) makes the caller read the file again the reference
//! way, which reports it exactly as before.
//!
//! Where to cut: a chunk ends just after a line feed that stands outside
//! quotes (`quote_scan`, the csv crate's rules: a quote opens a quoted
//! field only at a field's start, and a quoted field may hold line breaks),
//! so every chunk starts where the csv crate starts a record.

use std::io::Read;
use std::path::Path;

use rayon::prelude::*;

use super::LoadOptions;
use super::column::ColumnBuilder;
use super::csv_file::{Layout, LineRows, Reading, Records, csv_reader, load_with, push_record};
use super::numbers::NumberStyle;
use super::quote_scan::QuoteScan;
use super::table::Cell;

/// How a file is cut.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Chunking {
    /// About how many bytes a chunk holds (more when a record is longer).
    pub(crate) chunk_bytes: usize,
    /// How many chunks are read ahead and parsed at once (0: two per thread).
    pub(crate) chunks_per_batch: usize,
}

impl Chunking {
    /// Chunks of 256 KiB, two per thread at a time: a chunk takes a few
    /// milliseconds to parse, so the threads share the work evenly, and
    /// only two batches of text (the one parsed, the one read) are held.
    pub(crate) const STANDARD: Chunking = Chunking {
        chunk_bytes: 1 << 18,
        chunks_per_batch: 0,
    };

    fn batch_len(self) -> usize {
        match self.chunks_per_batch {
            0 => 2 * rayon::current_num_threads(),
            n => n,
        }
    }
}

/// The chunked reader gave up; the caller reads the file the reference way.
#[derive(Debug)]
pub(crate) struct Fallback;

/// One chunk's records as columns, its rows counted from its first record.
pub(crate) struct ChunkPart {
    /// Each column holds `rows` cells.
    pub(crate) grid: Vec<ColumnBuilder>,
    /// Rows from the first record to after the last (empty lines between
    /// records are blank rows).
    pub(crate) rows: usize,
    /// The line the first record began on, counted from the chunk's start
    /// as `LineRows` counts it; None when the chunk holds no record.
    pub(crate) first_line: Option<u64>,
    /// The line the reader stood on after the last record.
    pub(crate) last_after: u64,
    /// Line feeds in the chunk.
    pub(crate) lines: u64,
}

/// Parses one chunk, which starts at a record's start, into columns taken
/// from `spare` (the emptied columns of an earlier chunk) where it can.
fn parse_chunk(
    chunk: &[u8],
    delimiter: u8,
    style: &NumberStyle,
    mut spare: Vec<ColumnBuilder>,
) -> Result<ChunkPart, Fallback> {
    let mut reader = csv_reader(delimiter, chunk);
    let mut record = csv::StringRecord::new();
    // The first record is row 0 of the chunk, whatever stands before it.
    let mut rows = LineRows {
        row: 0,
        next_line: u64::MAX,
    };
    let (mut grid, mut filled, mut first_line) = (Vec::new(), 0usize, None);
    while reader.read_record(&mut record).map_err(|_| Fallback)? {
        let after = reader.position().line();
        first_line.get_or_insert(LineRows::start_line(after, &record));
        let row = rows.place(after, &record) as usize;
        while filled < row {
            grid.iter_mut()
                .for_each(|c: &mut ColumnBuilder| c.push(Cell::Blank));
            filled += 1;
        }
        push_record(&mut grid, filled, &record, style, &mut spare);
        filled += 1;
        rows.row += 1;
    }
    Ok(ChunkPart {
        grid,
        rows: filled,
        first_line,
        last_after: rows.next_line,
        lines: reader.position().line() - 1,
    })
}

/// Cuts a stream into chunks that end at record boundaries.
struct Cutter<R> {
    input: R,
    quotes: QuoteScan,
    /// Bytes after the last cut, already scanned.
    carry: Vec<u8>,
    ended: bool,
    /// Buffers of chunks already parsed, to read the next ones into
    /// (a fresh megabyte per chunk costs page faults).
    spare: Vec<Vec<u8>>,
}

impl<R: Read> Cutter<R> {
    /// The next chunk: at least `size` bytes where the records allow, up to
    /// a record's end; the rest of the stream at its end; None after that.
    fn next(&mut self, size: usize) -> std::io::Result<Option<Vec<u8>>> {
        loop {
            if self.ended {
                return Ok((!self.carry.is_empty()).then(|| std::mem::take(&mut self.carry)));
            }
            let before = self.carry.len();
            self.carry.reserve(size);
            (&mut self.input)
                .take(size as u64)
                .read_to_end(&mut self.carry)?;
            if self.carry.len() == before {
                self.ended = true;
                continue;
            }
            if let Some(cut) = self.quotes.scan(&self.carry[before..], |_| {}) {
                let mut rest = self.spare.pop().unwrap_or_default();
                rest.clear();
                rest.extend_from_slice(&self.carry[before + cut..]);
                self.carry.truncate(before + cut);
                return Ok(Some(std::mem::replace(&mut self.carry, rest)));
            }
        }
    }

    /// Up to `chunking.chunks_per_batch` chunks; empty at the stream's end.
    fn batch(&mut self, chunking: Chunking) -> Result<Vec<Vec<u8>>, Fallback> {
        let mut chunks = Vec::with_capacity(chunking.batch_len());
        while chunks.len() < chunking.batch_len() {
            match self.next(chunking.chunk_bytes).map_err(|_| Fallback)? {
                Some(chunk) => chunks.push(chunk),
                None => break,
            }
        }
        Ok(chunks)
    }
}

/// Reads every record of `input` (a CSV text from a record's start) into
/// `records`: the first chunks through the reference reader until the
/// header row is behind, then chunks parsed in parallel while the next
/// batch is read. `size` is the file's size, to make room for its rows at
/// once. Returns the input, read to its end.
pub(crate) fn read<R: Read + Send>(
    input: R,
    records: &mut Records,
    layout: &Layout,
    chunking: Chunking,
    size: u64,
) -> Result<R, Fallback> {
    let (delimiter, style) = (layout.delimiter, &layout.style);
    let mut cutter = Cutter {
        input,
        quotes: QuoteScan::new(delimiter, true),
        carry: Vec::new(),
        ended: false,
        spare: Vec::new(),
    };
    let mut read_so_far = 0;
    while !records.past_header() {
        let Some(chunk) = cutter.next(chunking.chunk_bytes).map_err(|_| Fallback)? else {
            return Ok(cutter.input);
        };
        records.feed(&chunk[..]).map_err(|_| Fallback)?;
        read_so_far += chunk.len() as u64;
    }
    // The rows still to come, at the bytes per row seen so far, and a tenth more.
    let rows_so_far = u64::from(records.rows.row).max(1);
    let expected = size.saturating_sub(read_so_far) * rows_so_far / read_so_far.max(1);
    records.reserve((expected + expected / 10) as usize);
    // Emptied columns of parsed chunks, kept for the next ones: fresh
    // memory for every chunk cost as much as the parse saved.
    let mut spare_grids: Vec<Vec<ColumnBuilder>> = Vec::new();
    let mut batch = cutter.batch(chunking)?;
    while !batch.is_empty() {
        let grids: Vec<_> = batch
            .iter()
            .map(|_| spare_grids.pop().unwrap_or_default())
            .collect();
        let (next, parts) = rayon::join(
            || cutter.batch(chunking),
            || {
                batch
                    .par_iter()
                    .zip(grids)
                    .map(|(chunk, grid)| parse_chunk(chunk, delimiter, style, grid))
                    .collect::<Vec<_>>()
            },
        );
        for part in parts {
            let mut part = part?;
            records.absorb(&mut part)?;
            spare_grids.push(part.grid);
        }
        cutter.spare.append(&mut batch);
        batch = next?;
    }
    Ok(cutter.input)
}

/// Reads a CSV file twice, with the reference reader and with the chunked
/// reader cutting chunks of `chunk_bytes` (1 for a chunk per record), and
/// returns both outcomes when they differ in anything: a cell, an issue,
/// a note, a row, an error's message. For the tests and the fuzz target.
pub fn compare_csv_readers(
    path: &Path,
    options: &LoadOptions,
    chunk_bytes: usize,
) -> Result<(), String> {
    let outcome = |reading| match load_with(path, options, reading) {
        Ok(table) => format!("{table:?}"),
        Err(e) => format!("error: {e}"),
    };
    let reference = outcome(Reading::Reference);
    let chunked = outcome(Reading::Chunked(Chunking {
        chunk_bytes: chunk_bytes.max(1),
        chunks_per_batch: 1 + chunk_bytes % 4,
    }));
    if chunked == reference {
        Ok(())
    } else {
        Err(format!(
            "{} read in chunks of {chunk_bytes} bytes differs:\nreference {reference}\nchunked   {chunked}",
            path.display()
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::load::csv_file::FALLBACKS;
    use std::path::PathBuf;

    /// Chunk sizes from one byte (a chunk per record) to larger than the file.
    const CHUNK_BYTES: [usize; 4] = [1, 13, 100, 4096];

    fn assert_same(path: &Path, options: &LoadOptions) {
        for chunk_bytes in CHUNK_BYTES {
            if let Err(e) = compare_csv_readers(path, options, chunk_bytes) {
                panic!("{e}");
            }
        }
    }

    fn text_files(dir: &Path, found: &mut Vec<PathBuf>) {
        for entry in std::fs::read_dir(dir).into_iter().flatten().flatten() {
            let path = entry.path();
            if path.is_dir() {
                text_files(&path, found);
            } else if path
                .extension()
                .and_then(|e| e.to_str())
                .is_some_and(|e| ["csv", "tsv", "txt"].contains(&e.to_ascii_lowercase().as_str()))
            {
                found.push(path);
            }
        }
    }

    #[test]
    fn chunks_read_the_test_corpus_exactly_as_the_reference_reader() {
        let root = Path::new(env!("CARGO_MANIFEST_DIR"));
        let mut files = Vec::new();
        for dir in ["tests", "workbooks", "examples", "fuzz/seeds"] {
            text_files(&root.join(dir), &mut files);
        }
        assert!(files.len() >= 20, "the corpus: {files:?}");
        for file in &files {
            assert_same(file, &LoadOptions::default());
        }
    }

    /// A generated file with what makes cutting hard: quoted fields with
    /// line breaks, delimiters and doubled quotes; CRLF and LF mixed; a
    /// byte-order mark; decimal commas; blank lines; title rows; a total row;
    /// rows of different lengths; a last line with or without its break.
    fn tricky_csv(rng: &mut crate::stats::SplitMix64) -> Vec<u8> {
        let mut pick = |n: usize| (rng.uniform() * n as f64) as usize;
        let semicolons = pick(2) == 0;
        let (d, decimal) = if semicolons { (";", ",") } else { (",", ".") };
        let breaks = ["\n", "\r\n", "\n", "\r\n\r\n", "\n\n"];
        let uniform_break = pick(3) > 0;
        let mut text = String::new();
        if pick(4) == 0 {
            text.push('\u{feff}');
        }
        if pick(3) == 0 {
            text.push_str("Deliveries, invented for a test\n\n");
        }
        text.push_str(&format!("depot{d}weight{d}note\n"));
        let rows = 1 + pick(40);
        for r in 0..rows {
            let depot = [
                "North",
                "\"Har\nbour\"",
                "\"a \"\"b\"\" c\"",
                "Ridge ",
                "\"x,y;z\"",
                "",
            ][pick(6)];
            let weight = match pick(6) {
                0 => String::new(),
                1 => "n/a".into(),
                2 => "2026-10-0".to_string() + &(1 + pick(9)).to_string(),
                _ => format!("{}{decimal}{}", pick(100), pick(100)),
            };
            let note = ["", "ok", "\"line\r\nbreak\"", "\"\"", "\"q\"\"\""][pick(5)];
            let mut row = format!("{depot}{d}{weight}");
            if pick(5) > 0 {
                row.push_str(d);
                row.push_str(note);
            }
            if pick(10) == 0 {
                row.push_str(d);
                row.push_str("extra");
            }
            text.push_str(&row);
            let last = r + 1 == rows;
            if !last || pick(2) == 0 {
                text.push_str(if uniform_break {
                    "\n"
                } else {
                    breaks[pick(breaks.len())]
                });
            }
        }
        if pick(4) == 0 {
            text.push_str(&format!("Total{d}{}\n", pick(1000)));
        }
        text.into_bytes()
    }

    #[test]
    fn chunks_read_generated_tricky_files_exactly_as_the_reference_reader() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("tricky.csv");
        let mut rng = crate::stats::SplitMix64(1717);
        let fallbacks = || FALLBACKS.get();
        let before = fallbacks();
        for _ in 0..300 {
            std::fs::write(&path, tricky_csv(&mut rng)).unwrap();
            assert_same(&path, &LoadOptions::default());
        }
        assert_eq!(
            fallbacks(),
            before,
            "the chunked reader gave up on a well-formed file"
        );
        // A header row named by the recipe, below the first chunks.
        let options = LoadOptions {
            header_row: Some(3),
            ..LoadOptions::default()
        };
        std::fs::write(&path, b"title\n\nline,kg\nA,1\n\nB,2\r\nC,\"3\n\"\n").unwrap();
        assert_same(&path, &options);
    }
}
