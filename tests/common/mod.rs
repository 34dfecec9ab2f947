//! Helpers shared by the tests that run the `sheaf` binary.
#![allow(dead_code)] // each test file uses its own subset

pub mod exports;

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use calamine::{Data, Reader, open_workbook_auto};

pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// The invented demo months, oldest first.
pub const DEMO_MONTHS: [&str; 3] = ["depot-2026-08", "depot-2026-09", "depot-2026-10"];

/// The demo months copied into `dir/months` as `names` (plus `.xlsx`), so a
/// batch can add files beside them or read them under other names.
pub fn demo_months_as(dir: &Path, names: [&str; 3]) -> PathBuf {
    let months = dir.join("months");
    std::fs::create_dir_all(&months).unwrap();
    for (m, name) in DEMO_MONTHS.iter().zip(names) {
        std::fs::copy(
            root().join(format!("workbooks/{m}.xlsx")),
            months.join(format!("{name}.xlsx")),
        )
        .unwrap();
    }
    months
}

/// The demo recipe's path, as an argument.
pub fn demo_recipe() -> String {
    root()
        .join("workbooks/depot-monthly.sheaf")
        .display()
        .to_string()
}

/// Runs the built binary in `dir` with a fixed recorded run time.
pub fn sheaf(args: &[&str], dir: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_sheaf"))
        .args(args)
        .current_dir(dir)
        .env("SHEAF_RUN_TIME", "2026-11-01 09:00:00 UTC")
        .output()
        .unwrap()
}

/// Standard output then standard error, for messages and assertions.
pub fn text(o: &Output) -> String {
    format!(
        "{}{}",
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    )
}

/// Every cell of one sheet of a workbook, read back with calamine.
pub fn cells(path: &Path, sheet: &str) -> Vec<Vec<Data>> {
    let mut wb = open_workbook_auto(path).unwrap();
    wb.worksheet_range(sheet)
        .unwrap()
        .rows()
        .map(|r| r.to_vec())
        .collect()
}

/// One part of an xlsx (a zip of XML files), as text.
pub fn part(xlsx: &Path, name: &str) -> String {
    use std::io::Read;
    let file = std::fs::File::open(xlsx).unwrap();
    let mut zip = zip::ZipArchive::new(file).unwrap();
    let mut text = String::new();
    zip.by_name(name)
        .unwrap()
        .read_to_string(&mut text)
        .unwrap();
    text
}
