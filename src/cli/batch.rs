//! `sheaf run RECIPE --data 'PATTERN' --out-dir DIR`: every matching file
//! in parallel, one result each, then the trend workbook. A file that
//! cannot be read is reported and skipped; the others still finish.

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use indicatif::{ProgressBar, ProgressStyle};
use rayon::prelude::*;

use super::{
    Failure, check_headers, checked_recipe, default_out, load_options, read_recipe,
    recipe_warnings, run_info,
};
use crate::eval::{self, Results};
use crate::history::{self, Record};
use crate::load::{self, Table};
use crate::recipe::{self, Recipe};

pub fn is_pattern(data: &str) -> bool {
    data.contains(['*', '?', '['])
}

struct Done {
    path: PathBuf,
    period: String,
    table: Table,
    results: Results,
}

fn one_file(
    recipe_path: &Path,
    text: &str,
    syntax: &Recipe,
    path: &Path,
) -> Result<(Recipe, Table), String> {
    let table = load::load_for(path, &load_options(syntax), &super::wanted(syntax, text))
        .map_err(|e| e.to_string())?;
    check_headers(recipe_path, text, syntax, &table).map_err(|Failure(m)| m)?;
    Ok((syntax.clone(), table))
}

fn uses_change(recipe: &Recipe) -> bool {
    recipe::calls(recipe, "change")
}

pub fn run(
    recipe_path: &Path,
    pattern: &str,
    out_dir: Option<PathBuf>,
    force: bool,
) -> Result<ExitCode, Failure> {
    let Some(out_dir) = out_dir else {
        return Err(Failure(format!(
            "--data '{pattern}' names several files; give --out-dir DIR for their results"
        )));
    };
    let text = read_recipe(recipe_path)?;
    let syntax = checked_recipe(recipe_path, &text, None)?;
    let warnings = recipe_warnings(recipe_path, &text);
    let mut paths: Vec<PathBuf> = glob::glob(pattern)
        .map_err(|e| Failure(format!("--data '{pattern}': {e}")))?
        .filter_map(Result::ok)
        .collect();
    paths.sort();
    if paths.is_empty() {
        return Err(Failure(format!("--data '{pattern}' matches no file")));
    }
    std::fs::create_dir_all(&out_dir).map_err(|e| {
        Failure(format!(
            "{}: cannot create the folder: {e}",
            out_dir.display()
        ))
    })?;
    let trend_path = out_dir.join("trend.xlsx");
    if trend_path.exists() && !force {
        return Err(Failure(format!(
            "{} exists already; pass --force to replace it",
            trend_path.display()
        )));
    }

    let bar = ProgressBar::new(paths.len() as u64);
    bar.set_style(
        ProgressStyle::with_template("{bar:30} {pos}/{len} {msg}")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    let outcomes: Vec<Result<(Recipe, Done), (PathBuf, String)>> = paths
        .par_iter()
        .map(|path| {
            let result = one_file(recipe_path, &text, &syntax, path).and_then(|(recipe, table)| {
                let mut results = eval::evaluate(&recipe, &table)
                    .map_err(|e| format!("{}: {e}", path.display()))?;
                results.warnings.extend(warnings.iter().cloned());
                let period = history::period_of(&recipe, path).map_or_else(
                    || {
                        path.file_stem()
                            .unwrap_or_default()
                            .to_string_lossy()
                            .into_owned()
                    },
                    |p| p.label,
                );
                Ok((
                    recipe,
                    Done {
                        path: path.clone(),
                        period,
                        table,
                        results,
                    },
                ))
            });
            bar.inc(1);
            bar.set_message(
                path.file_name()
                    .unwrap_or_default()
                    .to_string_lossy()
                    .into_owned(),
            );
            result.map_err(|e| (path.clone(), e))
        })
        .collect();
    bar.finish_and_clear();

    let mut failed = Vec::new();
    let mut done: Vec<(Recipe, Done)> = Vec::new();
    for outcome in outcomes {
        match outcome {
            Ok(d) => done.push(d),
            Err(e) => failed.push(e),
        }
    }
    done.sort_by(|a, b| (&a.1.period, &a.1.path).cmp(&(&b.1.period, &b.1.path)));

    // change(...) needs the previous period: evaluate again, in period order.
    let mut records: Vec<(String, Record)> = Vec::new();
    let mut previous: Option<Record> = None;
    let mut infos = Vec::new();
    for (recipe, d) in &mut done {
        if uses_change(recipe) && previous.is_some() {
            // The same rows were grouped without error above, so this cannot fail.
            if let Ok(again) = eval::evaluate_against(
                recipe,
                &d.table,
                previous.as_ref().map(Record::previous_terms),
            ) {
                d.results = again;
            }
        }
        let info = run_info(recipe_path, &text, recipe, &d.path, previous.clone());
        let record =
            Record::from_results(&d.results, info.fingerprint.clone(), Some(d.period.clone()));
        records.push((d.period.clone(), record.clone()));
        previous = Some(record);
        infos.push(info);
    }

    let written: Vec<Result<PathBuf, (PathBuf, String)>> = done
        .par_iter()
        .zip(infos.par_iter())
        .map(|((_, d), info)| {
            let out = out_dir.join(default_out(&d.path));
            crate::write::save(&d.results, &d.table, info, &out, force)
                .map(|_| out)
                .map_err(|e| (d.path.clone(), e.to_string()))
        })
        .collect();
    let mut lines = Vec::new();
    let mut fail_checks = false;
    for (w, (_, d)) in written.iter().zip(&done) {
        match w {
            Ok(out) => {
                fail_checks |= d.results.failed();
                let fails = d
                    .results
                    .checks
                    .iter()
                    .filter(|c| c.outcome == eval::Outcome::Fail)
                    .count();
                lines.push(format!(
                    "{}  {}  -> {}{}",
                    d.period,
                    d.path.display(),
                    out.display(),
                    if fails > 0 {
                        format!("  ({fails} failed checks)")
                    } else {
                        String::new()
                    }
                ));
            }
            Err((path, e)) => failed.push((path.clone(), e.clone())),
        }
    }
    let panels: Vec<String> = done
        .first()
        .map(|(_, d)| {
            d.results
                .blocks
                .iter()
                .filter(|b| matches!(b, eval::Block::Panel { .. }))
                .map(|b| b.name().to_string())
                .collect()
        })
        .unwrap_or_default();
    if !records.is_empty() {
        let bytes =
            history::trend_workbook(&records, &panels).map_err(|e| Failure(e.to_string()))?;
        crate::write::atomic::write_file(&trend_path, &bytes, force)
            .map_err(|e| Failure(e.to_string()))?;
        lines.push(format!(
            "trend over {} periods -> {}",
            records.len(),
            trend_path.display()
        ));
    }
    for l in &lines {
        println!("{l}");
    }
    for (path, e) in &failed {
        eprintln!("skipped {}: {}", path.display(), e.trim_end());
    }
    Ok(if !failed.is_empty() {
        eprintln!(
            "{} of {} files could not be summarised; the others were written",
            failed.len(),
            paths.len()
        );
        ExitCode::from(2)
    } else if fail_checks {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}
