//! `sheaf run RECIPE --data 'PATTERN' --out-dir DIR`: every matching file
//! in parallel, one result each, then the trend workbook. A file that
//! cannot be read is reported and skipped; the others still finish. Every
//! option of a single run works here too: `--json` prints one document per
//! file and one for the trend, `--timings` one line per file, `--compare`
//! is the previous period of the first file.

use std::path::{Path, PathBuf};
use std::time::Instant;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use rayon::prelude::*;

use super::args::RunArgs;
use super::run::{Timings, checks_failed, describe};
use super::{
    Exit, Failure, check_headers, checked_recipe, default_out, load_options, output, paths,
    periods, read_recipe, recipe_warnings, run_info, summary,
};
use crate::eval::{self, Results};
use crate::history::{self, Record};
use crate::load::{self, Table};
use crate::recipe::{self, Recipe};
use crate::report;
use crate::write::RunInfo;

pub fn is_pattern(data: &str) -> bool {
    data.contains(['*', '?', '['])
}

/// A file read and evaluated, on its way to its result.
struct Done {
    path: PathBuf,
    period: String,
    period_found: Option<history::Period>,
    /// The file's name and its data name different periods (the data's is used).
    period_note: Option<String>,
    table: Table,
    results: Results,
    timings: Timings,
}

/// A file that could not be summarised, and why.
type Skipped = (PathBuf, String);

/// Why a file a pattern matched is not data: a spreadsheet program's lock
/// file, a hidden file, or something sheaf wrote (recognised by its sheets).
fn not_data(path: &Path) -> Option<String> {
    let name = path.file_name()?.to_string_lossy();
    if name.starts_with("~$") || name.starts_with(".~lock.") {
        return Some("a spreadsheet program's lock file".into());
    }
    if name.starts_with('.') {
        return Some("a hidden file".into());
    }
    history::made_by_sheaf(path).map(str::to_string)
}

/// The data files a pattern matches, by name; the ones left out are said,
/// with why, on the terminal.
fn matching_files(pattern: &str) -> Result<Vec<PathBuf>, Failure> {
    if !is_pattern(pattern) {
        let path = Path::new(pattern);
        paths::check_data_file(path)?;
        return Ok(vec![path.to_path_buf()]);
    }
    let mut found: Vec<PathBuf> = glob::glob(pattern)
        .map_err(|e| Failure::new(format!("--data '{pattern}': {e}")))?
        .filter_map(Result::ok)
        .filter(|p| !p.is_dir())
        .collect();
    found.sort();
    let mut left_out = Vec::new();
    found.retain(|p| match not_data(p) {
        Some(why) => {
            left_out.push(format!("left out {}: {why}", p.display()));
            false
        }
        None => true,
    });
    for line in &left_out {
        output::problem(line);
    }
    if found.is_empty() {
        return Err(Failure::new(format!(
            "--data '{pattern}' matches no data file{}",
            if left_out.is_empty() {
                ""
            } else {
                " (every match was left out, see above)"
            }
        )));
    }
    Ok(found)
}

/// Every result path may be written, checked before any file is read.
fn check_outputs(out_dir: &Path, files: &[PathBuf], force: bool) -> Result<(), Failure> {
    let refused: Vec<String> = files
        .iter()
        .map(|f| out_dir.join(default_out(f)))
        .chain([out_dir.join("trend.xlsx")])
        .filter_map(|out| paths::check_out(&out, force).err())
        .map(|f| f.message)
        .collect();
    if refused.is_empty() {
        Ok(())
    } else {
        Err(Failure::new(format!(
            "{}\nnothing was read or written",
            refused.join("\n")
        )))
    }
}

fn load_and_evaluate(
    recipe_path: &Path,
    text: &str,
    recipe: &Recipe,
    planned: &periods::Planned,
) -> Result<Done, String> {
    let path = planned.path.as_path();
    let started = Instant::now();
    let table = load::load_for(path, &load_options(recipe), &super::wanted(recipe, text))
        .map_err(|e| e.to_string())?;
    check_headers(recipe_path, text, recipe, &table).map_err(|f| f.message)?;
    let loaded = Instant::now();
    let (mut period, mut label) = (planned.period.clone(), planned.label.clone());
    let mut name_disagrees = None;
    if history::period_column(recipe).is_some() {
        let (found, warning) = history::period_of_file(recipe, path, &table)?;
        if let Some(p) = &found {
            label = p.label.clone();
        }
        (period, name_disagrees) = (found, warning);
    }
    let mut results =
        eval::evaluate(recipe, &table).map_err(|e| format!("{}: {e}", path.display()))?;
    results.warnings.extend(recipe_warnings(recipe_path, text));
    results.warnings.extend(name_disagrees.clone());
    Ok(Done {
        period_note: name_disagrees,
        path: path.to_path_buf(),
        period: label,
        period_found: period,
        table,
        results,
        timings: Timings {
            load: loaded - started,
            evaluate: loaded.elapsed(),
            ..Timings::default()
        },
    })
}

fn progress_bar(len: usize) -> ProgressBar {
    if output::quiet() {
        return ProgressBar::with_draw_target(Some(len as u64), ProgressDrawTarget::hidden());
    }
    let bar = ProgressBar::new(len as u64);
    bar.set_style(
        ProgressStyle::with_template("{bar:30} {pos}/{len} {msg}")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    bar
}

/// Reads and evaluates every file in parallel; the read ones in the plan's order.
fn evaluate_all(
    recipe_path: &Path,
    text: &str,
    recipe: &Recipe,
    files: &[periods::Planned],
) -> (Vec<Done>, Vec<Skipped>) {
    let bar = progress_bar(files.len());
    let outcomes: Vec<Result<Done, Skipped>> = files
        .par_iter()
        .map(|planned| {
            let result = load_and_evaluate(recipe_path, text, recipe, planned);
            bar.inc(1);
            bar.set_message(planned.path.display().to_string());
            result.map_err(|e| (planned.path.clone(), e))
        })
        .collect();
    bar.finish_and_clear();
    let (mut done, mut skipped) = (Vec::new(), Vec::new());
    for outcome in outcomes {
        match outcome {
            Ok(d) => done.push(d),
            Err(e) => skipped.push(e),
        }
    }
    (done, skipped)
}

/// Each file against the period before it (the first against `--compare`):
/// `change(...)` is evaluated again with it, and the run facts record it.
fn chain_periods(
    recipe_path: &Path,
    text: &str,
    recipe: &Recipe,
    done: &mut [Done],
    mut previous: Option<Record>,
) -> (Vec<RunInfo>, Vec<(String, Record)>) {
    let mut infos = Vec::new();
    let mut records = Vec::new();
    for d in done.iter_mut() {
        if recipe::calls(recipe, "change") && previous.is_some() {
            let started = Instant::now();
            // The same rows were grouped without error above, so this cannot fail.
            if let Ok(again) = eval::evaluate_against(
                recipe,
                &d.table,
                previous.as_ref().map(Record::previous_terms),
            ) {
                d.results = again;
            }
            d.timings.evaluate += started.elapsed();
        }
        let info = run_info(
            recipe_path,
            text,
            recipe,
            d.period_found.clone(),
            previous.clone(),
        );
        let record =
            Record::from_results(&d.results, info.fingerprint.clone(), Some(d.period.clone()));
        if let Some(groups) = previous
            .as_ref()
            .and_then(|p| history::group_changes(p, &record))
        {
            d.results.warnings.push(groups);
        }
        records.push((d.period.clone(), record.clone()));
        previous = Some(record);
        infos.push(info);
    }
    (infos, records)
}

pub fn run(args: &RunArgs) -> Result<Exit, Failure> {
    let pattern = args.data.as_str();
    let Some(out_dir) = args.out_dir.clone() else {
        return Err(Failure::new(format!(
            "error: --data '{pattern}' names several files; give --out-dir DIR for their results"
        )));
    };
    paths::check_out_dir(&out_dir)?;
    let text = read_recipe(&args.recipe)?;
    let recipe = checked_recipe(&args.recipe, &text, None)?;
    let files = matching_files(pattern)?;
    let plan = periods::plan(&recipe, &files)?;
    std::fs::create_dir_all(&out_dir).map_err(|e| {
        Failure::new(format!(
            "{}: cannot create the folder: {e}",
            out_dir.display()
        ))
    })?;
    check_outputs(&out_dir, &files, args.force)?;
    if let Some(note) = &plan.ordering_note {
        output::problem(note);
    }
    let compare = match &args.compare {
        Some(path) => Some(Record::read(path, &recipe)?),
        None => None,
    };

    let (mut done, mut skipped) = evaluate_all(&args.recipe, &text, &recipe, &plan.files);
    if history::period_column(&recipe).is_some() {
        periods::order_read(&mut done, |d| (d.path.as_path(), d.period.as_str()))?;
        for note in done.iter().filter_map(|d| d.period_note.as_deref()) {
            output::problem(note);
        }
    }
    let order_warning = compare.as_ref().and_then(|previous| {
        history::compare_order_warning(
            args.compare.as_deref()?,
            previous.period.as_deref(),
            Some(done.first()?.period.as_str()),
        )
    });
    let (infos, records) = chain_periods(&args.recipe, &text, &recipe, &mut done, compare);
    if let (Some(w), Some(first)) = (order_warning, done.first_mut()) {
        output::problem(&w);
        first.results.warnings.push(w);
    }
    let written = write_all(&mut done, &infos, &out_dir, args.force);
    // Every file is written before anything is printed, so a reader that
    // stops early (`| head -1`) never stops the work.
    let trend_path = write_trend(&out_dir, &done, &records, args.force)?;
    let mut files_done = Vec::new();
    for ((d, info), w) in done.iter().zip(&infos).zip(written) {
        match w {
            Ok(out) => files_done.push((d, info, out)),
            Err(e) => skipped.push((d.path.clone(), e)),
        }
    }
    let printed = print_all(args, &files_done, &records, trend_path.as_deref(), &skipped);
    // Said last, where a person at the terminal sees it, even when the pipe closed.
    report_skipped(&skipped, files.len());
    printed?;
    if files_done.is_empty() {
        return Ok(Exit::Refused);
    }
    let check_failed = files_done
        .iter()
        .any(|(d, _, _)| checks_failed(&d.results, args.fail_on_warn));
    Ok(Exit::of_batch(!skipped.is_empty(), check_failed))
}

/// Each result workbook, in parallel; the path written or why not.
fn write_all(
    done: &mut [Done],
    infos: &[RunInfo],
    out_dir: &Path,
    force: bool,
) -> Vec<Result<PathBuf, String>> {
    done.par_iter_mut()
        .zip(infos.par_iter())
        .map(|(d, info)| {
            let started = Instant::now();
            let out = out_dir.join(default_out(&d.path));
            let saved = crate::write::save(&d.results, &d.table, info, &out, force);
            d.timings.write = started.elapsed();
            saved.map(|_| out).map_err(|e| e.to_string())
        })
        .collect()
}

/// Everything on standard output: each file's document or summary line,
/// then the trend's.
fn print_all(
    args: &RunArgs,
    files: &[(&Done, &RunInfo, PathBuf)],
    records: &[(String, Record)],
    trend_path: Option<&Path>,
    skipped: &[Skipped],
) -> Result<(), Failure> {
    print_files(args, files)?;
    let mut lines: String = files
        .iter()
        .map(|(d, info, out)| {
            let moved = summary::moved(&d.results, info);
            summary::batch_line(&d.period, &d.path, out, &d.results, moved)
        })
        .collect();
    if let Some(path) = trend_path {
        lines.push_str(&format!(
            "trend over {} periods -> {}\n",
            records.len(),
            path.display()
        ));
    }
    if args.json {
        let (drift, noise) = files.first().map_or(
            (history::DEFAULT_DRIFT, history::DEFAULT_NOISE_SES),
            |(_, i, _)| (i.drift, i.noise),
        );
        let document = report::trend_document(records, trend_path, (drift, noise), skipped);
        output::out_line(&report::to_line(&document))?;
        output::note(&lines);
    } else if !output::quiet() {
        output::out(&lines)?;
    }
    Ok(())
}

/// Per written file, in period order: its timings, its `-v` detail and its JSON document.
fn print_files(args: &RunArgs, files: &[(&Done, &RunInfo, PathBuf)]) -> Result<(), Failure> {
    for (d, info, out) in files {
        if args.timings {
            output::always(&d.timings.line(Some(&d.path)));
        }
        output::detail(&describe(&d.table, info, out));
        if args.json {
            let document = report::result_document(&d.results, &d.table, info, out);
            output::out_line(&report::to_line(&document))?;
        }
    }
    Ok(())
}

/// Writes trend.xlsx (beside a temporary file, then renamed); None when no file was summarised.
fn write_trend(
    out_dir: &Path,
    done: &[Done],
    records: &[(String, Record)],
    force: bool,
) -> Result<Option<PathBuf>, Failure> {
    if records.is_empty() {
        return Ok(None);
    }
    let panels: Vec<String> = done
        .first()
        .map(|d| {
            d.results
                .blocks
                .iter()
                .filter(|b| matches!(b, eval::Block::Panel { .. }))
                .map(|b| b.name().to_string())
                .collect()
        })
        .unwrap_or_default();
    let shares = done
        .first()
        .map(|d| d.results.shares.clone())
        .unwrap_or_default();
    let trend_path = out_dir.join("trend.xlsx");
    let bytes = history::trend_workbook(records, &panels, &shares)?;
    crate::write::atomic::write_file(&trend_path, &bytes, force)
        .map_err(|e| Failure::new(e.to_string()))?;
    Ok(Some(trend_path))
}

fn report_skipped(skipped: &[Skipped], total: usize) {
    for (path, e) in skipped {
        output::problem(&format!("skipped {}: {}", path.display(), e.trim_end()));
    }
    if !skipped.is_empty() {
        output::problem(&format!(
            "warning: {} of {total} files could not be summarised{}",
            skipped.len(),
            if skipped.len() < total {
                "; the others were written"
            } else {
                ""
            }
        ));
    }
}
