//! The command line: `run`, `validate`, `inspect`, `calc`, `completions`
//! and `manual`. The exit statuses are in `exit.rs`; a message the user can
//! act on names the place and what to do.

mod args;
mod batch;
mod exit;
mod look;
mod manual;
mod output;
mod paths;
mod periods;
mod run;
mod summary;

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::CommandFactory;

pub(crate) use args::Cli;
use args::Command;
pub use exit::{Exit, markdown_table as exit_status_table};

use crate::load::{self, LoadOptions, Table};
use crate::recipe::{self, ast::StatementKind};
use crate::write::RunInfo;

/// A run that stopped: the message for standard error and the exit status.
pub struct Failure {
    message: String,
    exit: Exit,
}

impl Failure {
    /// Bad recipe, data or usage: exit status 2.
    pub fn new(message: impl Into<String>) -> Failure {
        Failure {
            message: message.into(),
            exit: Exit::Refused,
        }
    }

    /// Standard output was closed: stop without a word.
    pub fn broken_pipe() -> Failure {
        Failure {
            message: String::new(),
            exit: Exit::BrokenPipe,
        }
    }
}

impl<E: std::fmt::Display> From<E> for Failure {
    fn from(e: E) -> Failure {
        Failure::new(e.to_string())
    }
}

/// Parses the arguments, runs the command, and turns the outcome into the exit status.
pub fn main() -> ExitCode {
    // Lossy only for the hint's look at the words; the parser gets them as given.
    let raw: Vec<std::ffi::OsString> = std::env::args_os().collect();
    let cli = match parse(&raw) {
        Ok(cli) => cli,
        Err(e) => return usage_error(e, &raw),
    };
    output::init(&cli.shared);
    let result = match cli.command {
        Command::Run(a) => run::run_or_batch(a),
        Command::Validate { recipe, data } => validate(&recipe, data.as_deref()),
        Command::Inspect { file, read } => look::inspect(&file, read.into()),
        Command::Calc {
            expression,
            data,
            read,
        } => look::calc(&expression, &data, read.into()),
        Command::Completions { shell } => completions(shell),
        Command::Manual { command } => manual::manual(command.as_deref()),
    };
    match result {
        Ok(exit) => exit.into(),
        Err(failure) => {
            if !failure.message.is_empty() {
                let message = failure.message.trim_end();
                if message.starts_with("error") {
                    output::problem(message);
                } else {
                    output::problem(&format!("error: {message}"));
                }
            }
            failure.exit.into()
        }
    }
}

/// The arguments, with the parser's own help and errors coloured as
/// `--color` says (it is read before the rest, which may be what failed).
fn parse(raw: &[std::ffi::OsString]) -> Result<Cli, clap::Error> {
    use clap::FromArgMatches;
    let words = lossy(raw);
    let asked = words.iter().enumerate().find_map(|(i, a)| {
        a.strip_prefix("--color=").or_else(|| {
            (a == "--color")
                .then(|| words.get(i + 1).map(String::as_str))
                .flatten()
        })
    });
    let (when, color) = match asked {
        Some("always") => (args::ColorWhen::Always, clap::ColorChoice::Always),
        Some("never") => (args::ColorWhen::Never, clap::ColorChoice::Never),
        _ => (args::ColorWhen::Auto, clap::ColorChoice::Auto),
    };
    output::set_color(when);
    let matches = Cli::command().color(color).try_get_matches_from(raw)?;
    Cli::from_arg_matches(&matches)
}

/// The argument parser's own messages (help and version exit 0), with a
/// hint to quote a pattern the shell has expanded.
fn lossy(raw: &[std::ffi::OsString]) -> Vec<String> {
    raw.iter()
        .map(|a| a.to_string_lossy().into_owned())
        .collect()
}

fn usage_error(e: clap::Error, raw: &[std::ffi::OsString]) -> ExitCode {
    use clap::error::ErrorKind;
    if matches!(
        e.kind(),
        ErrorKind::UnknownArgument | ErrorKind::TooManyValues
    ) && let Some(hint) = paths::unquoted_pattern_hint(&lossy(raw))
    {
        output::problem(&hint);
        return Exit::Refused.into();
    }
    // A closed pipe under `--help | head` is no error to report.
    let _ = e.print();
    match e.exit_code() {
        0 => Exit::Ok.into(),
        _ => Exit::Refused.into(),
    }
}

impl From<args::ReadArgs> for LoadOptions {
    fn from(a: args::ReadArgs) -> LoadOptions {
        LoadOptions {
            sheet: a.sheet,
            header_row: a.header_row,
            ..LoadOptions::default()
        }
    }
}

fn completions(shell: clap_complete::Shell) -> Result<Exit, Failure> {
    let mut text = Vec::new();
    clap_complete::generate(shell, &mut Cli::command(), "sheaf", &mut text);
    output::out(&String::from_utf8_lossy(&text))?;
    Ok(Exit::Ok)
}

fn read_recipe(path: &Path) -> Result<String, Failure> {
    std::fs::read_to_string(path)
        .map_err(|e| Failure::new(format!("{}: cannot read the recipe: {e}", path.display())))
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
        output::note(&recipe::render_all(&parsed.warnings, &file, text));
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
pub fn data_columns(table: &Table) -> Vec<recipe::DataColumn> {
    use crate::load::ColumnKind;
    table
        .columns
        .iter()
        .map(|c| recipe::DataColumn {
            name: c.name.clone(),
            kind: match c.kind {
                ColumnKind::Number => recipe::DataKind::Numbers,
                ColumnKind::Date => recipe::DataKind::Dates,
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
    Failure::new(format!(
        "{rendered}\n{}: {count} problem{} in the recipe; nothing was written",
        path.display(),
        if count == 1 { "" } else { "s" }
    ))
}

/// Checks a checked recipe against the columns of the data it will read.
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

/// The data columns a recipe reads, those it reads as numbers and those it groups by.
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
    period: Option<crate::history::Period>,
    previous: Option<crate::history::Record>,
) -> RunInfo {
    RunInfo {
        recipe_path: recipe_path.display().to_string(),
        recipe_text: text.to_string(),
        run_time: now(),
        version: env!("CARGO_PKG_VERSION").into(),
        fingerprint: crate::history::fingerprint(recipe),
        period,
        previous,
        drift: crate::history::drift_of(recipe),
        noise: crate::history::noise_of(recipe),
    }
}

fn validate(recipe_path: &Path, data: Option<&Path>) -> Result<Exit, Failure> {
    let text = read_recipe(recipe_path)?;
    if let Some(data) = data {
        paths::check_data_file(data)?;
    }
    let recipe = match data {
        Some(data) => {
            let (recipe, table) = load_for(recipe_path, &text, data)?;
            output::detail(&run::describe_table(&table));
            recipe
        }
        None => checked_recipe(recipe_path, &text, None)?,
    };
    let against = data
        .map(|d| format!(", every column found in {}", d.display()))
        .unwrap_or_default();
    if !output::quiet() {
        output::out_line(&format!(
            "{}: ok, {} statements{against}",
            recipe_path.display(),
            recipe.statements.len()
        ))?;
    }
    Ok(Exit::Ok)
}
