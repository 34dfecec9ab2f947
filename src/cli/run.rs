//! `sheaf run` on one data file; a pattern or `--out-dir` goes to the batch.

use std::path::Path;
use std::time::{Duration, Instant};

use super::args::RunArgs;
use super::{
    Exit, Failure, batch, default_out, load_for, output, paths, read_recipe, recipe_warnings,
    run_info, summary,
};
use crate::eval::{self, Outcome, Results};
use crate::load::Table;
use crate::report;
use crate::write::{self, RunInfo};

/// Runs one file, or a batch when the data is a pattern or `--out-dir` is given.
pub fn run_or_batch(args: RunArgs) -> Result<Exit, Failure> {
    if batch::is_pattern(&args.data) || args.out_dir.is_some() {
        if args.out.is_some() {
            return Err(Failure::new(format!(
                "error: --out names one result, but --data '{}' is a batch that writes one result per file; give --out-dir DIR instead",
                args.data
            )));
        }
        return batch::run(&args);
    }
    run(&args)
}

/// Whether the checks make the run fail: any `fail` check, and with
/// `--fail-on-warn` any `warn` check too.
pub fn checks_failed(results: &Results, fail_on_warn: bool) -> bool {
    results
        .checks
        .iter()
        .any(|c| c.outcome == Outcome::Fail || (fail_on_warn && c.outcome == Outcome::Warn))
}

/// Load, evaluate and write times of one file, for `--timings`.
#[derive(Debug, Clone, Copy, Default)]
pub struct Timings {
    pub load: Duration,
    pub evaluate: Duration,
    pub write: Duration,
}

impl Timings {
    pub fn line(&self, file: Option<&Path>) -> String {
        let ms = |d: Duration| d.as_secs_f64() * 1000.0;
        let label = file
            .map(|f| format!(" {}:", f.display()))
            .unwrap_or_default();
        format!(
            "timings:{label} load {:.1} ms, evaluate {:.1} ms, write {:.1} ms\n",
            ms(self.load),
            ms(self.evaluate),
            ms(self.write)
        )
    }
}

/// What `-v` says of the data read.
pub fn describe_table(table: &Table) -> String {
    format!(
        "read {}: sheet \"{}\", header row {}, {} data rows, SHA-256 {}\n",
        table.source.path, table.sheet, table.header_row, table.rows, table.source.sha256,
    )
}

/// What `-v` adds after a run: the data read, the period, the fingerprint, the output.
pub fn describe(table: &Table, run: &RunInfo, out: &Path) -> String {
    format!(
        "{}period: {}\nrecipe fingerprint: {}\nwrote {}\n",
        describe_table(table),
        run.period
            .as_ref()
            .map_or_else(|| "none found".to_string(), |p| p.explain()),
        run.fingerprint,
        out.display()
    )
}

fn run(args: &RunArgs) -> Result<Exit, Failure> {
    let data = Path::new(&args.data);
    paths::check_data_file(data)?;
    let out = args.out.clone().unwrap_or_else(|| default_out(data));
    paths::check_out(&out, args.force)?;
    paths::check_not_input(&out, data)?;
    let started = Instant::now();
    let text = read_recipe(&args.recipe)?;
    let (recipe, table) = load_for(&args.recipe, &text, data)?;
    let loaded = Instant::now();
    let (period, name_disagrees) =
        crate::history::period_of_file(&recipe, data, &table).map_err(Failure::new)?;
    let previous = match &args.compare {
        Some(path) => Some(crate::history::Record::read(path, &recipe)?),
        None => None,
    };
    let mut results = eval::evaluate_against(
        &recipe,
        &table,
        previous.as_ref().map(|p| p.previous_terms()),
    )?;
    results
        .warnings
        .extend(recipe_warnings(&args.recipe, &text));
    if let Some(w) = name_disagrees {
        output::problem(&w);
        results.warnings.push(w);
    }
    if let Some(w) = previous.as_ref().and_then(|p| {
        crate::history::compare_order_warning(
            args.compare.as_deref()?,
            p.period.as_deref(),
            period.as_ref().map(|q| q.label.as_str()),
        )
    }) {
        output::problem(&w);
        results.warnings.push(w);
    }
    if let Some(groups) = previous.as_ref().and_then(|p| {
        let now = crate::history::Record::from_results(&results, String::new(), None);
        crate::history::group_changes(p, &now)
    }) {
        output::problem(&format!("note: {groups}"));
        results.warnings.push(groups);
    }
    let evaluated = Instant::now();
    let info = run_info(&args.recipe, &text, &recipe, period, previous);
    write::save(&results, &table, &info, &out, args.force)?;
    if args.timings {
        let timings = Timings {
            load: loaded - started,
            evaluate: evaluated - loaded,
            write: evaluated.elapsed(),
        };
        output::always(&timings.line(None));
    }
    output::detail(&describe(&table, &info, &out));
    let moved = summary::moved(&results, &info);
    let text = summary::render(&results, &table, &out, moved);
    if args.json {
        let document = report::result_document(&results, &table, &info, &out);
        output::out_line(&report::to_line(&document))?;
        output::note(&text);
    } else if !output::quiet() {
        output::out(&text)?;
    }
    Ok(if checks_failed(&results, args.fail_on_warn) {
        Exit::CheckFailed
    } else {
        Exit::Ok
    })
}
