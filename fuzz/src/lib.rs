//! What the fuzz targets share: each writes the fuzzed bytes to a file of
//! its kind in a temporary folder of its own process and hands it to sheaf
//! as a user would, so the whole loader (file opening included) is fuzzed.
//! Any result is fine; a panic, an abort, a leak past the memory limit or a
//! hang is what libFuzzer reports.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

use sheaf::load::{self, LoadOptions};

/// This process's scratch folder (removed by the operating system's
/// temporary-file cleaning; one per fuzzing process).
pub fn scratch() -> &'static Path {
    static DIR: OnceLock<PathBuf> = OnceLock::new();
    DIR.get_or_init(|| {
        let dir = std::env::temp_dir().join(format!("sheaf-fuzz-{}", std::process::id()));
        std::fs::create_dir_all(&dir).expect("a scratch folder");
        dir
    })
}

/// Writes `bytes` to `scratch/input.ENDING` and returns the path.
pub fn input_file(bytes: &[u8], ending: &str) -> PathBuf {
    let path = scratch().join(format!("input.{ending}"));
    std::fs::write(&path, bytes).expect("scratch file written");
    path
}

/// Loads the bytes as a file with this ending, and lists its sheets, as
/// `run` and `inspect` do.
pub fn load_as(bytes: &[u8], ending: &str) {
    let path = input_file(bytes, ending);
    let _ = load::sheet_names(&path);
    if let Ok(table) = load::load(&path, &LoadOptions::default()) {
        for column in &table.columns {
            let _ = column.issues();
        }
    }
}

/// Reads the bytes as a CSV file with the reference reader and with the
/// chunked one (chunks of 1 to 64 bytes, chosen by the input's length so
/// the fuzzer explores cuts everywhere); a difference is a crash.
pub fn csv_readers_agree(bytes: &[u8]) {
    let path = input_file(bytes, "csv");
    let chunk_bytes = 1 + bytes.len() % 64;
    if let Err(difference) = load::compare_csv_readers(&path, &LoadOptions::default(), chunk_bytes)
    {
        panic!("{difference}");
    }
}

/// The demo recipe, used when an input holds no recipe of its own.
const DEMO_RECIPE: &str = include_str!("../../workbooks/depot-monthly.sheaf");

/// The run path over `recipe %% csv` bytes; see the `run` target.
pub fn run_path(bytes: &[u8]) {
    let text = String::from_utf8_lossy(bytes);
    let (recipe_text, data) = match text.split_once("\n%%\n") {
        Some((recipe, data)) => (recipe.to_string(), data.as_bytes()),
        None => (DEMO_RECIPE.to_string(), bytes),
    };
    let parsed = sheaf::recipe::parse_and_check(&recipe_text, None);
    if !parsed.is_ok() {
        return;
    }
    let recipe = parsed.recipe;
    let path = input_file(data, "csv");
    // Read as `run` reads: the recipe's input settings and the columns it uses.
    let options = sheaf::cli::load_options(&recipe);
    let wanted = sheaf::cli::wanted(&recipe, &recipe_text);
    let Ok(table) = load::load_for(&path, &options, &wanted) else {
        return;
    };
    if !sheaf::recipe::check_against(&recipe, &sheaf::cli::data_columns(&table)).is_empty() {
        return;
    }
    let Ok(results) = sheaf::eval::evaluate(&recipe, &table) else {
        return;
    };
    let fingerprint = sheaf::history::fingerprint(&recipe);
    let run = sheaf::write::RunInfo {
        recipe_path: "fuzz.sheaf".into(),
        recipe_text,
        run_time: "2026-11-01 09:00:00 UTC".into(),
        version: "fuzz".into(),
        fingerprint,
        // As `run` settles it: a period column first, then the name.
        period: sheaf::history::period_of_file(&recipe, &path, &table)
            .ok()
            .and_then(|(period, _)| period),
        previous: None,
        drift: sheaf::history::drift_of(&recipe),
        noise: sheaf::history::noise_of(&recipe),
    };
    let out = scratch().join("result.xlsx");
    if sheaf::write::save(&results, &table, &run, &out, true).is_ok() {
        let _ = sheaf::history::Record::read(&out, &recipe);
    }
}
