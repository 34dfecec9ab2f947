//! The result workbook: one sheet per panel and figures block, a robustness
//! sheet per panel, Checks, Charts and About. Saved through [`atomic`], so a
//! crash never leaves half a workbook and a new target is never replaced.

mod about;
pub mod atomic;
mod changes;
mod charts;
mod glance;
mod plan;
mod robustness_cells;
mod sheets;
pub(crate) mod style;
mod trend_charts;

pub use trend_charts::trend_charts;

use std::path::Path;

use rust_xlsxwriter::DocProperties;

use crate::eval::Results;
use crate::load::Table;

/// What the About sheet records of the run besides the data.
#[derive(Debug, Clone)]
pub struct RunInfo {
    /// The recipe's path as given.
    pub recipe_path: String,
    /// The recipe's text, copied onto the About sheet.
    pub recipe_text: String,
    /// When the run happened, as written on the About sheet (UTC).
    pub run_time: String,
    /// sheaf's version.
    pub version: String,
    /// SHA-256 (first 12 bytes) of the recipe's canonical text.
    pub fingerprint: String,
    /// The period the data covers, if known.
    pub period: Option<crate::history::Period>,
    /// The previous period's record, for the Changes sheet.
    pub previous: Option<crate::history::Record>,
    /// Relative change that flags a figure on the Changes sheet.
    pub drift: f64,
    /// Standard errors of the change a figure that has one must also exceed.
    pub noise: f64,
}

/// Why a result could not be written.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// The output exists and --force was not given.
    #[error("{0} exists already; pass --force to replace it")]
    Exists(String),
    /// The output is the input file.
    #[error("{0} is the input file; choose another --out")]
    WouldOverwriteInput(String),
    /// The file system refused, with the path and the reason.
    #[error("cannot write {path}: {reason}")]
    Io {
        /// The file.
        path: String,
        /// What the system said.
        reason: String,
    },
    /// The result does not fit a workbook's limits.
    #[error("the result is too large for a workbook: {0}")]
    TooLarge(String),
    /// The workbook library failed.
    #[error("cannot build the workbook: {0}")]
    Workbook(#[from] rust_xlsxwriter::XlsxError),
}

/// The workbook as bytes.
pub fn workbook_bytes(
    results: &Results,
    table: &Table,
    run: &RunInfo,
) -> Result<Vec<u8>, WriteError> {
    plan::check(results)?;
    let mut workbook = style::workbook()?;
    let mut properties = DocProperties::new().set_title(
        results
            .title
            .clone()
            .unwrap_or_else(|| "sheaf result".into()),
    );
    // The file's own creation time is the recorded run time, so a rerun with
    // the same SHEAF_RUN_TIME is byte for byte the same workbook.
    let iso = run.run_time.trim_end_matches(" UTC").replacen(' ', "T", 1);
    // Parsed from its parts: a date made from a serial number carries no
    // year, month and day, and would be written as 0-00-00.
    if crate::format::serial_from_iso(&iso).is_some()
        && let Ok(created) = rust_xlsxwriter::ExcelDateTime::parse_from_str(&iso)
    {
        properties = properties.set_creation_datetime(&created);
    }
    workbook.set_properties(&properties);
    let mut names = sheets::SheetNames::default();
    // First, so the workbook opens on it; filled once the rows it links to
    // are known.
    let glance_name = names.claim(glance::GLANCE_SHEET);
    workbook.add_worksheet().set_name(&glance_name)?;
    let sheets::BlockSheets {
        robustness,
        narrow,
        banded,
    } = sheets::blocks(&mut workbook, &mut names, results)?;
    let reading = crate::load::reading_notes(table);
    let checks = sheets::checks(&mut workbook, &mut names, results, &reading)?;
    charts::charts(&mut workbook, &mut names, results)?;
    // This run's figures, for the Changes sheet and for the next run.
    let current = crate::history::Record::from_results(
        results,
        run.fingerprint.clone(),
        run.period.as_ref().map(|p| p.label.clone()),
    );
    let moved = match &run.previous {
        Some(previous) => Some(changes::changes(
            &mut workbook,
            &mut names,
            &current,
            run,
            previous,
        )?),
        None => None,
    };
    let (about_name, about_tall) = about::about(&mut workbook, &mut names, results, table, run)?;
    changes::record(&mut workbook, &mut names, &current)?;
    let title = results.title.as_deref().unwrap_or("sheaf result");
    let period = run.period.as_ref().map(|p| p.label.as_str());
    let places = glance::Places {
        checks,
        robustness,
        moved,
    };
    let input = &table.source.path;
    let sheet = workbook.worksheet_from_name(&glance_name)?;
    glance::glance(sheet, results, input, period, &places, &reading)?;
    for sheet in workbook.worksheets_mut() {
        style::paper(sheet, title, period)?;
        if narrow.contains(&sheet.name()) {
            sheet.set_portrait();
        }
        if sheet.name() == about_name {
            // Two columns of text: portrait, on one page when still readable.
            sheet.set_portrait();
            sheet.set_print_fit_to_pages(1, about_tall);
        }
        if let Some((_, bands)) = banded.iter().find(|(name, _)| *name == sheet.name()) {
            // Some 40 columns on one page's width would print too small to
            // read: bands of them, each with the label columns repeated.
            bands.apply(sheet)?;
        }
    }
    // Deflate at level 3, not the library's 6: on 1,000 groups' workbook
    // (7 MB) about a fifth less writing time for a file 9% larger; level 1
    // saved little more and made it 60% larger (measured on the loaded
    // development machine, 2026-12-03).
    workbook.set_zip_compression_level(3);
    Ok(workbook.save_to_buffer()?)
}

/// Writes the workbook to `out`: refuses to replace a file without `force`
/// or to touch the input; see [`atomic`] for how it is written.
pub fn save(
    results: &Results,
    table: &Table,
    run: &RunInfo,
    out: &Path,
    force: bool,
) -> Result<(), WriteError> {
    let shown = out.display().to_string();
    if same_file(out, Path::new(&table.source.path)) {
        return Err(WriteError::WouldOverwriteInput(shown));
    }
    atomic::check_target(out, force)?;
    let bytes = workbook_bytes(results, table, run)?;
    atomic::write_file(out, &bytes, force)
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (a.canonicalize(), b.canonicalize()) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}
