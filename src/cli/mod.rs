//! The command line: `run`, `validate`, `inspect`, `calc`. Exit status 0
//! when all went well, 1 when a `fail` check failed, 2 for a bad recipe,
//! bad data or bad usage (with a message naming the place and what to do).

mod batch;
mod json;
mod summary;

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::{Parser, Subcommand};

use crate::eval::{self, One, Scope, Value};
use crate::load::{self, LoadOptions, Table};
use crate::recipe::{self, ast::StatementKind};
use crate::write::{self, RunInfo};

#[derive(Parser, Debug)]
#[command(
    name = "sheaf",
    version,
    about = "The same descriptive-statistics summary from each month's workbook, from a recipe written once.",
    after_help = "Examples:\n  sheaf run workbooks/depot-monthly.sheaf --data workbooks/depot-2026-10.xlsx --out october.xlsx\n  sheaf validate workbooks/depot-monthly.sheaf --data workbooks/depot-2026-10.xlsx\n  sheaf inspect workbooks/depot-2026-10.xlsx\n  sheaf calc 'percentile({Minutes late}, 90)' --data workbooks/depot-2026-10.xlsx"
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Evaluate a recipe over a data file (or every file a pattern matches) and write the results.
    Run {
        /// The recipe (.sheaf).
        recipe: PathBuf,
        /// The data: .xlsx, .xlsm, .xls, .ods, .csv or .tsv; or a quoted pattern such as 'monthly/*.xlsx'.
        #[arg(long)]
        data: String,
        /// Where to write the result (default: DATA's name with -summary.xlsx, in the current folder).
        #[arg(long)]
        out: Option<PathBuf>,
        /// For a pattern: the folder for one result per file plus trend.xlsx.
        #[arg(long = "out-dir")]
        out_dir: Option<PathBuf>,
        /// A previous sheaf result of the same recipe: adds a Changes sheet and feeds change(...).
        #[arg(long)]
        compare: Option<PathBuf>,
        /// Also print every result as JSON on standard output.
        #[arg(long)]
        json: bool,
        /// Replace the result file if it exists.
        #[arg(long)]
        force: bool,
        /// Print how long loading, evaluating and writing took (on standard error).
        #[arg(long)]
        timings: bool,
    },
    /// Check a recipe; with --data, also that every column it names exists.
    Validate {
        recipe: PathBuf,
        #[arg(long)]
        data: Option<PathBuf>,
    },
    /// List a file's sheets and the columns of one: types, missing and text cells.
    Inspect {
        file: PathBuf,
        #[arg(long)]
        sheet: Option<String>,
        #[arg(long = "header-row")]
        header_row: Option<u32>,
    },
    /// Evaluate one expression over a data file; one value per line.
    Calc {
        expression: String,
        #[arg(long)]
        data: PathBuf,
        #[arg(long)]
        sheet: Option<String>,
        #[arg(long = "header-row")]
        header_row: Option<u32>,
    },
}

/// A failure the user can act on; always exit status 2.
struct Failure(String);

impl<E: std::fmt::Display> From<E> for Failure {
    fn from(e: E) -> Failure {
        Failure(e.to_string())
    }
}

pub fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Run {
            recipe,
            data,
            out,
            out_dir,
            compare,
            json,
            force,
            timings,
        } => {
            if batch::is_pattern(&data) || out_dir.is_some() {
                batch::run(&recipe, &data, out_dir, force)
            } else {
                run(
                    &recipe,
                    Path::new(&data),
                    out,
                    compare.as_deref(),
                    json,
                    force,
                    timings,
                )
            }
        }
        Command::Validate { recipe, data } => validate(&recipe, data.as_deref()),
        Command::Inspect {
            file,
            sheet,
            header_row,
        } => inspect(
            &file,
            LoadOptions {
                sheet,
                header_row,
                ..LoadOptions::default()
            },
        ),
        Command::Calc {
            expression,
            data,
            sheet,
            header_row,
        } => calc(
            &expression,
            &data,
            LoadOptions {
                sheet,
                header_row,
                ..LoadOptions::default()
            },
        ),
    };
    match result {
        Ok(code) => code,
        Err(Failure(message)) => {
            eprintln!("{}", message.trim_end());
            ExitCode::from(2)
        }
    }
}

fn read_recipe(path: &Path) -> Result<String, Failure> {
    std::fs::read_to_string(path)
        .map_err(|e| Failure(format!("{}: cannot read the recipe: {e}", path.display())))
}

/// Parses and checks a recipe in one pass; with the data's columns, checks
/// them too. Warnings are shown on standard error.
fn checked_recipe(
    path: &Path,
    text: &str,
    columns: Option<&[recipe::DataColumn]>,
) -> Result<recipe::Recipe, Failure> {
    let parsed = recipe::parse_and_check_columns(text, columns);
    if !parsed.is_ok() {
        let all: Vec<_> = parsed
            .diagnostics
            .into_iter()
            .chain(parsed.warnings)
            .collect();
        return Err(recipe_failure(path, text, &all));
    }
    if !parsed.warnings.is_empty() {
        let file = path.display().to_string();
        eprintln!("{}", recipe::render_all(&parsed.warnings, &file, text));
    }
    Ok(parsed.recipe)
}

/// The recipe's warnings, one line each, for the Checks sheet.
fn recipe_warnings(path: &Path, text: &str) -> Vec<String> {
    recipe::parse_and_check(text, None)
        .warnings
        .iter()
        .map(|w| format!("{}: {}", path.display(), w.one_line(text)))
        .collect()
}

/// The data's headers with the kind of value each column holds.
fn data_columns(table: &Table) -> Vec<recipe::DataColumn> {
    use crate::load::ColumnKind;
    table
        .columns
        .iter()
        .map(|c| recipe::DataColumn {
            name: c.name.clone(),
            kind: match c.kind {
                ColumnKind::Number | ColumnKind::Date => recipe::DataKind::Numbers,
                ColumnKind::Text => recipe::DataKind::Text,
                ColumnKind::Bool | ColumnKind::Empty => recipe::DataKind::Any,
            },
        })
        .collect()
}

/// The recipe's problems (and warnings), rendered against its text.
fn recipe_failure(path: &Path, text: &str, diagnostics: &[recipe::Diagnostic]) -> Failure {
    let count = diagnostics
        .iter()
        .filter(|d| d.severity == recipe::Severity::Error)
        .count();
    let rendered = recipe::render_all(diagnostics, &path.display().to_string(), text);
    Failure(format!(
        "{rendered}\n{}: {count} problem{} in the recipe; nothing was written",
        path.display(),
        if count == 1 { "" } else { "s" }
    ))
}

/// Checks a checked recipe against the headers of the data it will read.
fn check_headers(
    path: &Path,
    text: &str,
    recipe: &recipe::Recipe,
    table: &Table,
) -> Result<(), Failure> {
    let diagnostics = recipe::check_against(recipe, &data_columns(table));
    if diagnostics.is_empty() {
        Ok(())
    } else {
        Err(recipe_failure(path, text, &diagnostics))
    }
}

/// The data columns a recipe reads, and those it reads as numbers.
pub fn wanted(recipe: &recipe::Recipe, text: &str) -> load::Wanted {
    let uses = recipe::uses::column_uses(recipe, text);
    load::Wanted {
        columns: uses.read.into_iter().map(|u| u.name).collect(),
        numeric: uses
            .as_numbers
            .into_iter()
            .map(|u| (u.name, u.line))
            .collect(),
        keys: uses.as_keys.into_iter().map(|u| u.name).collect(),
    }
}

/// How to read the data: the `input` line's settings and the `header` lines.
pub fn load_options(recipe: &recipe::Recipe) -> LoadOptions {
    use crate::recipe::ast::ReadSetting;
    let mut options = LoadOptions::default();
    for statement in &recipe.statements {
        match &statement.kind {
            StatementKind::Input {
                sheet,
                header_row,
                reading,
            } => {
                options.sheet = sheet.as_ref().map(|s| s.value.clone());
                options.header_row = header_row.as_ref().map(|h| h.value);
                for setting in reading {
                    match &setting.value {
                        ReadSetting::Decimal(mark) => options.number_style.decimal = Some(*mark),
                        ReadSetting::Thousands(mark) => {
                            options.number_style.thousands = Some(*mark)
                        }
                        ReadSetting::Encoding(label) => options.encoding = Some(label.clone()),
                        ReadSetting::KeepSummaryRows => options.keep_summary_rows = true,
                        ReadSetting::MergeSimilarKeys => options.merge_similar_keys = true,
                    }
                }
            }
            StatementKind::Header { names } => options
                .accepted_names
                .push(names.iter().map(|n| n.name.clone()).collect()),
            _ => {}
        }
    }
    options
}

fn load_for(
    recipe_path: &Path,
    text: &str,
    data: &Path,
) -> Result<(recipe::Recipe, Table), Failure> {
    // The `input` and `header` lines say how to read the data; the recipe
    // is then checked with the data's columns, so every problem shows at once.
    let readable = recipe::parse(text);
    if readable.input_unread(text) {
        checked_recipe(recipe_path, text, None)?;
    }
    let options = load_options(&readable.recipe);
    let table = match load::load_for(data, &options, &wanted(&readable.recipe, text)) {
        Ok(table) => table,
        Err(e) => {
            // The recipe's own problems first, if it has any.
            checked_recipe(recipe_path, text, None)?;
            return Err(e.into());
        }
    };
    let recipe = checked_recipe(recipe_path, text, Some(&data_columns(&table)))?;
    Ok((recipe, table))
}

fn now() -> String {
    // SHEAF_RUN_TIME fixes the recorded time, for byte-identical reruns in tests.
    std::env::var("SHEAF_RUN_TIME").unwrap_or_else(|_| {
        let seconds = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_secs());
        crate::format::timestamp(seconds)
    })
}

fn default_out(data: &Path) -> PathBuf {
    let stem = data
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "data".into());
    PathBuf::from(format!("{stem}-summary.xlsx"))
}

/// What the About and Record sheets say about a run.
fn run_info(
    recipe_path: &Path,
    text: &str,
    recipe: &recipe::Recipe,
    data: &Path,
    previous: Option<crate::history::Record>,
) -> RunInfo {
    RunInfo {
        recipe_path: recipe_path.display().to_string(),
        recipe_text: text.to_string(),
        run_time: now(),
        version: env!("CARGO_PKG_VERSION").into(),
        fingerprint: crate::history::fingerprint(recipe),
        period: crate::history::period_of(recipe, data),
        previous,
        drift: crate::history::drift_of(recipe),
    }
}

#[allow(clippy::too_many_arguments)]
fn run(
    recipe_path: &Path,
    data: &Path,
    out: Option<PathBuf>,
    compare: Option<&Path>,
    as_json: bool,
    force: bool,
    timings: bool,
) -> Result<ExitCode, Failure> {
    let started = std::time::Instant::now();
    let text = read_recipe(recipe_path)?;
    let (recipe, table) = load_for(recipe_path, &text, data)?;
    let loaded = std::time::Instant::now();
    let previous = match compare {
        Some(path) => Some(crate::history::Record::read(path, &recipe)?),
        None => None,
    };
    let mut results = eval::evaluate_against(
        &recipe,
        &table,
        previous.as_ref().map(|p| p.previous_terms()),
    )?;
    results.warnings.extend(recipe_warnings(recipe_path, &text));
    let evaluated = std::time::Instant::now();
    let out = out.unwrap_or_else(|| default_out(data));
    let run = run_info(recipe_path, &text, &recipe, data, previous);
    write::save(&results, &table, &run, &out, force)?;
    if timings {
        let written = std::time::Instant::now();
        let ms = |a: std::time::Instant, b: std::time::Instant| (b - a).as_secs_f64() * 1000.0;
        eprintln!(
            "timings: load {:.1} ms, evaluate {:.1} ms, write {:.1} ms",
            ms(started, loaded),
            ms(loaded, evaluated),
            ms(evaluated, written)
        );
    }
    let summary = summary::render(&results, &table, &out);
    if as_json {
        println!(
            "{}",
            serde_json::to_string_pretty(&json::results(&results, &table, &run))
                .unwrap_or_default()
        );
        eprint!("{summary}");
    } else {
        print!("{summary}");
    }
    Ok(if results.failed() {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

fn validate(recipe_path: &Path, data: Option<&Path>) -> Result<ExitCode, Failure> {
    let text = read_recipe(recipe_path)?;
    let recipe = match data {
        Some(data) => load_for(recipe_path, &text, data)?.0,
        None => checked_recipe(recipe_path, &text, None)?,
    };
    let against = data
        .map(|d| format!(", every column found in {}", d.display()))
        .unwrap_or_default();
    println!(
        "{}: ok, {} statements{against}",
        recipe_path.display(),
        recipe.statements.len()
    );
    Ok(ExitCode::SUCCESS)
}

fn inspect(file: &Path, options: LoadOptions) -> Result<ExitCode, Failure> {
    let sheets = load::sheet_names(file)?;
    let table = load::load(file, &options)?;
    println!(
        "{}: {} bytes, SHA-256 {}",
        file.display(),
        table.source.size,
        table.source.sha256
    );
    println!(
        "sheets: {}",
        sheets
            .iter()
            .map(|s| format!("\"{s}\""))
            .collect::<Vec<_>>()
            .join(", ")
    );
    println!(
        "sheet \"{}\", header row {}, {} data rows\n",
        table.sheet, table.header_row, table.rows
    );
    let mut lines = vec![[
        "column".to_string(),
        "cell".into(),
        "type".into(),
        "values".into(),
        "blank".into(),
        "text in numbers".into(),
        "errors".into(),
        "first problem cells".into(),
    ]];
    for c in &table.columns {
        let issues = c.issues();
        let count = |k| issues.iter().filter(|i| i.kind == k).count().to_string();
        let first: Vec<String> = issues
            .iter()
            .filter(|i| i.kind != load::IssueKind::Blank)
            .take(3)
            .map(|i| table.address(c, i.row))
            .collect();
        lines.push([
            c.name.clone(),
            load::column_letters(c.sheet_column),
            c.kind.word().into(),
            (table.rows - issues.len()).to_string(),
            count(load::IssueKind::Blank),
            count(load::IssueKind::TextInNumbers),
            count(load::IssueKind::FormulaError),
            first.join(" "),
        ]);
    }
    print!("{}", summary::columns(&lines));
    Ok(ExitCode::SUCCESS)
}

fn calc(expression: &str, data: &Path, options: LoadOptions) -> Result<ExitCode, Failure> {
    let table = load::load(data, &options)?;
    let expr = recipe::parse_expression(expression, Some(&data_columns(&table)))
        .map_err(|d| Failure(recipe::render_all(&d, "expression", expression)))?;
    let lets = Default::default();
    let rows: Vec<crate::eval::Row> = (0..table.rows as crate::eval::Row).collect();
    let scope = Scope::new(&table, &lets, &rows);
    let mut out = String::new();
    let line = |v: &One| match v {
        One::Number(x) => crate::format::shortest(*x),
        One::Truth(b) => b.to_string(),
        One::Text(t) => t.clone(),
        One::List(v) => v
            .iter()
            .map(|x| crate::format::shortest(*x))
            .collect::<Vec<_>>()
            .join("\n"),
        One::Undefined(why) => format!("no value: {why}"),
    };
    match scope.eval(&expr) {
        Value::One(v) => out.push_str(&line(&v)),
        Value::Rows(rows) => {
            let texts: Vec<String> = match rows {
                eval::Rows::Numbers(v) => v
                    .iter()
                    .map(|x| x.map_or("missing".into(), crate::format::shortest))
                    .collect(),
                eval::Rows::Truths(v) => v
                    .iter()
                    .map(|x| x.map_or("missing".into(), |b| b.to_string()))
                    .collect(),
                eval::Rows::Texts(v) => v
                    .iter()
                    .map(|x| x.clone().unwrap_or_else(|| "missing".into()))
                    .collect(),
            };
            out.push_str(&texts.join("\n"));
        }
    }
    println!("{out}");
    Ok(ExitCode::SUCCESS)
}
