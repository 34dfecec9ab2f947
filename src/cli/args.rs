//! The command line's words: every command, option and its help. The
//! completions and the manual page are generated from these definitions.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

#[derive(Parser, Debug)]
#[command(
    name = "sheaf",
    version,
    about = "The same descriptive-statistics summary from each month's workbook, from a recipe written once.",
    after_help = super::exit::after_help()
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
    #[command(flatten)]
    pub shared: Shared,
}

/// Options every command takes.
#[derive(Args, Debug, Clone)]
pub struct Shared {
    /// Colour sheaf's messages: auto (on a terminal, unless NO_COLOR is set), always or never. e.g. --color never
    #[arg(long, value_enum, default_value_t = ColorWhen::Auto, global = true)]
    pub color: ColorWhen,
    /// No summary, progress bar or "ok" line: only errors and the results asked for (--json, calc's values, inspect's listing). e.g. -q
    #[arg(short, long, global = true, conflicts_with = "verbose")]
    pub quiet: bool,
    /// Also say what was read (file, sheet, header row, rows, SHA-256) and, for run, the period, fingerprint and output (on standard error). e.g. -v
    #[arg(short, long, global = true)]
    pub verbose: bool,
}

#[derive(ValueEnum, Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColorWhen {
    Auto,
    Always,
    Never,
}

#[derive(Subcommand, Debug)]
pub enum Command {
    /// Evaluate a recipe over a data file (or every file a pattern matches) and write the results.
    #[command(
        after_help = "Examples:\n  sheaf run workbooks/depot-monthly.sheaf -d workbooks/depot-2026-10.xlsx -o october.xlsx\n  sheaf run workbooks/depot-monthly.sheaf -d 'workbooks/depot-*.xlsx' --out-dir results/ --json > results.jsonl\n\nExit statuses, environment and the JSON: see sheaf --help."
    )]
    Run(RunArgs),
    /// Check a recipe without writing anything; with --data, also that every column it names exists.
    #[command(
        after_help = "Example:\n  sheaf validate workbooks/depot-monthly.sheaf -d workbooks/depot-2026-10.xlsx"
    )]
    Validate {
        /// The recipe (.sheaf). e.g. workbooks/depot-monthly.sheaf
        recipe: PathBuf,
        /// A data file whose headers the recipe's columns must match. e.g. -d workbooks/depot-2026-10.xlsx
        #[arg(short, long, value_name = "FILE")]
        data: Option<PathBuf>,
    },
    /// List a file's sheets and the columns of one: types, missing and text cells.
    #[command(after_help = "Example:\n  sheaf inspect workbooks/depot-2026-10.xlsx -s Deliveries")]
    Inspect {
        /// The data file (.xlsx, .xlsm, .xls, .ods, .csv, .tsv). e.g. workbooks/depot-2026-10.xlsx
        file: PathBuf,
        #[command(flatten)]
        read: ReadArgs,
    },
    /// Evaluate one expression over a data file and print one value per line.
    #[command(
        after_help = "Example:\n  sheaf calc 'percentile({Minutes late}, 90)' -d workbooks/depot-2026-10.xlsx\n\nA value that cannot be computed prints its reason on standard error and exits with status 5."
    )]
    Calc {
        /// The expression, in recipe syntax; quote it for the shell. e.g. 'median({Minutes late})'
        expression: String,
        /// The data file. e.g. -d workbooks/depot-2026-10.xlsx
        #[arg(short, long, value_name = "FILE")]
        data: PathBuf,
        #[command(flatten)]
        read: ReadArgs,
    },
    /// Print shell completions to standard output.
    #[command(
        after_help = "Example:\n  sheaf completions bash > ~/.local/share/bash-completion/completions/sheaf"
    )]
    Completions {
        /// The shell. e.g. bash
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff) to standard output.
    #[command(after_help = "Example:\n  sheaf manual > sheaf.1 && man ./sheaf.1")]
    Manual {
        /// A command's own page instead of sheaf's. e.g. run
        command: Option<String>,
    },
}

/// Where in a workbook the table is, for `inspect` and `calc`.
#[derive(Args, Debug, Clone, Default)]
pub struct ReadArgs {
    /// The sheet to read (default: the first). e.g. -s Deliveries
    #[arg(short, long, value_name = "NAME")]
    pub sheet: Option<String>,
    /// The row that holds the headers, counted from 1 (default: 1). e.g. --header-row 3
    #[arg(long = "header-row", value_name = "N")]
    pub header_row: Option<u32>,
}

#[derive(Args, Debug, Clone)]
pub struct RunArgs {
    /// The recipe (.sheaf). e.g. workbooks/depot-monthly.sheaf
    pub recipe: PathBuf,
    /// The data (.xlsx, .xlsm, .xls, .ods, .csv, .tsv), or a quoted pattern for a batch. e.g. -d 'monthly/*.xlsx'
    #[arg(short, long, value_name = "FILE|PATTERN")]
    pub data: String,
    /// The result workbook, a new or regular .xlsx file (default: DATA's name with -summary.xlsx, here). e.g. -o october.xlsx
    #[arg(short, long, value_name = "RESULT.xlsx", conflicts_with = "out_dir")]
    pub out: Option<PathBuf>,
    /// For a batch: the folder for one result per file plus trend.xlsx. e.g. --out-dir results/
    #[arg(long = "out-dir", value_name = "DIR")]
    pub out_dir: Option<PathBuf>,
    /// A previous result of the same recipe: adds a Changes sheet and feeds change(...); in a batch, the first period is compared with it. e.g. --compare september.xlsx
    #[arg(short, long, value_name = "PREVIOUS.xlsx")]
    pub compare: Option<PathBuf>,
    /// Print the results as JSON Lines on standard output: one document per file, then one for a batch's trend (the summary goes to standard error). e.g. --json | jq .checks
    #[arg(long)]
    pub json: bool,
    /// Replace result files that exist. e.g. -f
    #[arg(short, long)]
    pub force: bool,
    /// Warn checks fail the run too (exit status 1): for scheduled jobs that must stop on a warning. e.g. --fail-on-warn
    #[arg(long = "fail-on-warn")]
    pub fail_on_warn: bool,
    /// Print how long loading, evaluating and writing took, per file (on standard error). e.g. --timings
    #[arg(long)]
    pub timings: bool,
}
