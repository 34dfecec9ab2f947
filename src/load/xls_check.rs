//! A look at an .xls file before calamine opens it, for the claims that
//! would make calamine 0.38 allocate without bound (it reads every sheet at
//! open): a sector chain that loops (read until a length that may be 2^64),
//! a DIMENSIONS record whose range is huge or ends before it starts, and
//! cells scattered so far apart that the sheet's dense block dwarfs them.
//!
//! The file is read the way calamine reads it: the compound file (MS-CFB)
//! for its `Workbook` (or `Book`) stream, then the BIFF records of each
//! sheet from the offsets its BoundSheet8 records give. Anything this look
//! cannot follow is left to calamine, which reports it as an error; only
//! the claims above are refused here.

use std::path::Path;

use super::LoadError;

const ENDOFCHAIN: u32 = 0xFFFF_FFFE;
const RESERVED_SECTORS: u32 = 0xFFFF_FFFA;
const DIFSECT: u32 = 0xFFFF_FFFC;

/// Refuses an .xls whose reading would allocate far beyond its size;
/// `allowance` gives the most cells a block may have for so many cells held.
pub fn check(path: &Path, allowance: impl Fn(u64) -> u64) -> Result<(), LoadError> {
    let Ok(bytes) = std::fs::read(path) else {
        return Ok(());
    };
    let refuse = |reason: String| LoadError::Malformed {
        path: path.display().to_string(),
        reason: format!(
            "{reason}; the file is damaged: open and save it again, or export it as CSV"
        ),
    };
    let Some(stream) = workbook_stream(&bytes).map_err(refuse)? else {
        return Ok(());
    };
    let (mut total, mut held) = (0u64, 0u64);
    for (name, cells) in sheets(&stream) {
        if let Some(claim) = cells.dimension_claim
            && claim > allowance(0)
        {
            return Err(refuse(format!(
                "sheet {name} claims a range of {claim} cells, more than the file could hold"
            )));
        }
        total = total.saturating_add(cells.dense());
        held += cells.count;
        if total > allowance(held) {
            return Err(refuse(format!(
                "sheet {name} has its {} cells spread over a block of {} cells",
                cells.count,
                cells.dense()
            )));
        }
    }
    Ok(())
}

/// Little-endian numbers at an offset; None past the end.
fn u16_at(b: &[u8], at: usize) -> Option<u16> {
    Some(u16::from_le_bytes(b.get(at..at + 2)?.try_into().ok()?))
}

fn u32_at(b: &[u8], at: usize) -> Option<u32> {
    Some(u32::from_le_bytes(b.get(at..at + 4)?.try_into().ok()?))
}

/// The compound file's sectors, as calamine numbers them.
struct Sectors<'a> {
    bytes: &'a [u8],
    header: usize,
    size: usize,
    fat: Vec<u32>,
}

impl Sectors<'_> {
    fn sector(&self, id: u32) -> &[u8] {
        let start = self.header + id as usize * self.size;
        let end = (start + self.size).min(self.bytes.len());
        self.bytes.get(start..end).unwrap_or(&[])
    }

    /// The chain from `start`, up to `len` bytes; an error if it loops.
    fn chain(&self, start: u32, len: usize, what: &str) -> Result<Vec<u8>, String> {
        let mut seen = std::collections::HashSet::new();
        let (mut id, mut out) = (start, Vec::new());
        while id != ENDOFCHAIN && out.len() < len {
            if !seen.insert(id) {
                return Err(format!("the chain of sectors of its {what} runs in a loop"));
            }
            let sector = self.sector(id);
            if sector.is_empty() {
                break; // beyond the file: calamine reports it
            }
            out.extend_from_slice(&sector[..sector.len().min(len - out.len())]);
            match self.fat.get(id as usize) {
                Some(&next) => id = next,
                None => break,
            }
        }
        Ok(out)
    }
}

/// The `Workbook` stream, or None when this look cannot find it.
fn workbook_stream(bytes: &[u8]) -> Result<Option<Vec<u8>>, String> {
    if bytes.len() < 512 || !bytes.starts_with(b"\xD0\xCF\x11\xE0\xA1\xB1\x1A\xE1") {
        return Ok(None);
    }
    let (size, header) = match u16_at(bytes, 30) {
        Some(9) => (512, 512),
        Some(12) => (4096, 4096),
        _ => return Ok(None),
    };
    let field = |at| u32_at(bytes, at).unwrap_or(ENDOFCHAIN);
    let (dir_start, mini_fat_start, mini_fat_len) = (field(48), field(60), field(64));
    let mut sectors = Sectors {
        bytes,
        header,
        size,
        fat: Vec::new(),
    };
    let mut difat: Vec<u32> = (76..512).step_by(4).map(field).collect();
    let mut id = field(68);
    let mut seen = std::collections::HashSet::new();
    while id < RESERVED_SECTORS {
        if !seen.insert(id) {
            return Err("the chain of its sector tables runs in a loop".into());
        }
        difat.extend(words(sectors.sector(id)));
        id = difat.pop().unwrap_or(ENDOFCHAIN);
    }
    let fat_sectors = difat.iter().filter(|&&id| id < DIFSECT).count() as u64;
    if fat_sectors * size as u64 > 100 * bytes.len() as u64 {
        return Err(format!(
            "it lists {fat_sectors} sector tables, more than the file holds"
        ));
    }
    sectors.fat = difat
        .iter()
        .filter(|&&id| id < DIFSECT)
        .flat_map(|&id| words(sectors.sector(id)))
        .collect();
    let directory = sectors.chain(dir_start, usize::MAX, "directory")?;
    let entries: Vec<&[u8]> = directory.chunks_exact(128).collect();
    let Some(root) = entries.first() else {
        return Ok(None);
    };
    let length = |e: &[u8]| -> usize {
        if size == 512 {
            u32_at(e, 120).unwrap_or(0) as usize
        } else {
            u64::from_le_bytes(e[120..128].try_into().unwrap_or_default()) as usize
        }
    };
    let mini_stream = if mini_fat_len > 0 {
        let stream = sectors.chain(
            u32_at(root, 116).unwrap_or(ENDOFCHAIN),
            length(root),
            "small-stream store",
        )?;
        let table = sectors.chain(
            mini_fat_start,
            mini_fat_len as usize * size,
            "small-stream table",
        )?;
        Some((stream, words(&table).collect::<Vec<u32>>()))
    } else {
        None
    };
    let Some(entry) = entries
        .iter()
        .find(|e| entry_name(e).eq_ignore_ascii_case("Workbook"))
        .or_else(|| {
            entries
                .iter()
                .find(|e| entry_name(e).eq_ignore_ascii_case("Book"))
        })
    else {
        return Ok(None);
    };
    let (start, len) = (u32_at(entry, 116).unwrap_or(ENDOFCHAIN), length(entry));
    if len >= 4096 {
        return sectors.chain(start, len, "Workbook stream").map(Some);
    }
    let Some((stream, table)) = mini_stream else {
        return Ok(None);
    };
    let mini = Sectors {
        bytes: &stream,
        header: 0,
        size: 64,
        fat: table,
    };
    mini.chain(start, len, "Workbook stream").map(Some)
}

fn words(b: &[u8]) -> impl Iterator<Item = u32> + '_ {
    b.chunks_exact(4)
        .map(|w| u32::from_le_bytes([w[0], w[1], w[2], w[3]]))
}

/// A directory entry's name (UTF-16, up to the first NUL), ASCII letters only matter.
fn entry_name(entry: &[u8]) -> String {
    let units: Vec<u16> = entry[..64]
        .chunks_exact(2)
        .map(|c| u16::from_le_bytes([c[0], c[1]]))
        .take_while(|&u| u != 0)
        .collect();
    String::from_utf16_lossy(&units)
}

/// What one sheet's records claim: its cells' span and count, and the
/// cells its DIMENSIONS record makes calamine reserve.
#[derive(Default)]
struct SheetCells {
    low: (u32, u32),
    high: (u32, u32),
    count: u64,
    dimension_claim: Option<u64>,
}

impl SheetCells {
    fn add(&mut self, row: u32, column: u32) {
        if self.count == 0 {
            (self.low, self.high) = ((row, column), (row, column));
        }
        self.low = (self.low.0.min(row), self.low.1.min(column));
        self.high = (self.high.0.max(row), self.high.1.max(column));
        self.count += 1;
    }

    /// Cells of the sheet's dense block.
    fn dense(&self) -> u64 {
        if self.count == 0 {
            return 0;
        }
        let rows = u64::from(self.high.0 - self.low.0) + 1;
        let columns = u64::from(self.high.1 - self.low.1) + 1;
        rows * columns
    }
}

/// One BIFF record with its CONTINUE records appended, as calamine merges them.
struct Records<'a> {
    stream: &'a [u8],
}

impl Iterator for Records<'_> {
    type Item = (u16, Vec<u8>);

    fn next(&mut self) -> Option<(u16, Vec<u8>)> {
        let kind = u16_at(self.stream, 0)?;
        let len = u16_at(self.stream, 2)? as usize;
        let mut data = self.stream.get(4..4 + len)?.to_vec();
        self.stream = &self.stream[4 + len..];
        while u16_at(self.stream, 0) == Some(0x003C) {
            let len = u16_at(self.stream, 2)? as usize;
            data.extend_from_slice(self.stream.get(4..4 + len)?);
            self.stream = &self.stream[4 + len..];
        }
        Some((kind, data))
    }
}

/// Each sheet's name (as far as it matters for messages) and cells.
fn sheets(stream: &[u8]) -> Vec<(String, SheetCells)> {
    let mut sheets = Vec::new();
    let mut index = 0;
    for (kind, data) in (Records { stream }) {
        if kind == 0x0085
            && let Some(at) = u32_at(&data, 0)
        {
            index += 1;
            let cells = stream
                .get(at as usize..)
                .map(sheet_cells)
                .unwrap_or_default();
            sheets.push((format!("number {index}"), cells));
        }
    }
    sheets
}

/// The cells of the sheet whose records start `stream`, skipping nested
/// substreams (embedded charts) as calamine does.
fn sheet_cells(stream: &[u8]) -> SheetCells {
    let mut cells = SheetCells::default();
    let (mut depth, mut seen_bof) = (0usize, false);
    for (kind, data) in (Records { stream }) {
        if depth > 0 {
            match kind {
                0x0809 => depth += 1,
                0x000A => depth -= 1,
                _ => (),
            }
            continue;
        }
        let at = |i| u16_at(&data, i).map(u32::from);
        match kind {
            0x0809 if seen_bof => depth += 1,
            0x0809 => seen_bof = true,
            0x000A => break,
            0x0200 => cells.dimension_claim = dimension_claim(&data),
            0x0203 | 0x0204 | 0x00D6 | 0x0205 | 0x027E | 0x00FD | 0x0006 => {
                if let (Some(row), Some(column)) = (at(0), at(2)) {
                    cells.add(row, column);
                }
            }
            0x00BD if data.len() >= 6 => {
                if let (Some(row), Some(first), Some(last)) = (at(0), at(2), at(data.len() - 2)) {
                    cells.add(row, first);
                    cells.add(row, last);
                }
            }
            _ => (),
        }
    }
    cells
}

/// The cells calamine reserves for a DIMENSIONS record, computed as it does
/// (in u32, wrapping when the range ends before it starts).
fn dimension_claim(r: &[u8]) -> Option<u64> {
    let (rf, rl, mut cf, cl) = match r.len() {
        10 => (
            u32::from(u16_at(r, 0)?),
            u32::from(u16_at(r, 2)?),
            u32::from(u16_at(r, 4)?),
            u32::from(u16_at(r, 6)?),
        ),
        14 | 16 => (
            u32_at(r, 0)?,
            u32_at(r, 4)?,
            u32::from(u16_at(r, 8)?),
            u32::from(u16_at(r, 10)?),
        ),
        _ => return None,
    };
    if 0xFF < cf || cl < cf {
        cf = 0;
    }
    let (start, end) = if 1 <= rl && 1 <= cl {
        ((rf, cf), (rl - 1, cl - 1))
    } else {
        ((rf, cf), (rf, cf))
    };
    let rows = u64::from(end.0.wrapping_sub(start.0).wrapping_add(1));
    let columns = u64::from(end.1.wrapping_sub(start.1).wrapping_add(1));
    Some(rows.saturating_mul(columns))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dimension_claims_are_computed_as_calamine_does() {
        // rows 0..=9, columns 0..=3 (BIFF8: first row, last row + 1, first col, last col + 1).
        let mut r = Vec::new();
        for v in [0u32, 10] {
            r.extend_from_slice(&v.to_le_bytes());
        }
        for v in [0u16, 4, 0] {
            r.extend_from_slice(&v.to_le_bytes());
        }
        assert_eq!(dimension_claim(&r), Some(40));
        // A range ending before it starts wraps to about 2^32 rows.
        r[0..4].copy_from_slice(&20u32.to_le_bytes());
        assert!(dimension_claim(&r).unwrap() > (1u64 << 32));
    }

    #[test]
    fn the_demo_xls_passes_and_its_cells_are_found() {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/depot-2026-10.xls");
        let bytes = std::fs::read(&path).unwrap();
        let stream = workbook_stream(&bytes).unwrap().unwrap();
        let sheets = sheets(&stream);
        assert!(!sheets.is_empty());
        assert!(sheets[0].1.count > 100, "{}", sheets[0].1.count);
        assert!(check(&path, |cells| (8 * cells).max(1 << 16)).is_ok());
    }
}
