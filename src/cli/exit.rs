//! The exit statuses: one table, shown by `--help`, the manual page and the
//! README (a test keeps the README's copy in step).

use std::process::ExitCode;

/// How a run ended, as its exit status says.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Exit {
    /// 0: all went well.
    Ok,
    /// 1: a `fail` check failed (or a `warn` one with --fail-on-warn).
    CheckFailed,
    /// 2: bad recipe, data or usage; nothing was written.
    Refused,
    /// 3: a batch skipped files it could not read and wrote the others.
    SomeSkipped,
    /// 4: a batch skipped files and a check failed in one it wrote.
    SkippedAndFailed,
    /// 5: `calc` found no value.
    NoValue,
    /// 141: standard output was closed early.
    BrokenPipe,
}

impl Exit {
    /// Every status, in the order of the table.
    pub const ALL: [Exit; 7] = [
        Exit::Ok,
        Exit::CheckFailed,
        Exit::Refused,
        Exit::SomeSkipped,
        Exit::SkippedAndFailed,
        Exit::NoValue,
        Exit::BrokenPipe,
    ];

    /// The exit status number.
    pub fn code(self) -> u8 {
        match self {
            Exit::Ok => 0,
            Exit::CheckFailed => 1,
            Exit::Refused => 2,
            Exit::SomeSkipped => 3,
            Exit::SkippedAndFailed => 4,
            Exit::NoValue => 5,
            // 128 + SIGPIPE (13): what a shell reports for a program ended
            // by a closed pipe, so `set -o pipefail` scripts see the usual.
            Exit::BrokenPipe => 141,
        }
    }

    /// What the status means, as `--help`, the manual and the README say it.
    pub fn meaning(self) -> &'static str {
        match self {
            Exit::Ok => "all went well",
            Exit::CheckFailed => {
                "a `fail` check failed (in any file of a batch); with --fail-on-warn, a `warn` check too"
            }
            Exit::Refused => {
                "bad recipe, bad data or bad usage: nothing was written (in a batch: no file could be summarised)"
            }
            Exit::SomeSkipped => "a batch skipped files it could not read, and wrote the others",
            Exit::SkippedAndFailed => {
                "a batch skipped files, and a check failed in a file it wrote"
            }
            Exit::NoValue => "calc: the value has none (the reason is on standard error)",
            Exit::BrokenPipe => {
                "standard output was closed early (its reader, such as `head -1`, stopped); sheaf stopped quietly"
            }
        }
    }

    /// A batch's status from what it met.
    pub fn of_batch(skipped: bool, check_failed: bool) -> Exit {
        match (skipped, check_failed) {
            (false, false) => Exit::Ok,
            (false, true) => Exit::CheckFailed,
            (true, false) => Exit::SomeSkipped,
            (true, true) => Exit::SkippedAndFailed,
        }
    }
}

impl From<Exit> for ExitCode {
    fn from(e: Exit) -> ExitCode {
        ExitCode::from(e.code())
    }
}

/// The table as plain text: `  0  all went well`.
pub fn table() -> String {
    Exit::ALL
        .iter()
        .map(|e| format!("  {:<3}  {}\n", e.code(), e.meaning()))
        .collect()
}

/// The table as Markdown, as the README holds it.
pub fn markdown_table() -> String {
    let mut text = String::from("| status | meaning |\n|---|---|\n");
    for e in Exit::ALL {
        text.push_str(&format!("| {} | {} |\n", e.code(), e.meaning()));
    }
    text
}

/// The text after the main help: examples, exit statuses, environment, JSON.
pub fn after_help() -> String {
    format!(
        "Examples:
  sheaf run workbooks/depot-monthly.sheaf -d workbooks/depot-2026-10.xlsx -o october.xlsx
  sheaf run workbooks/depot-monthly.sheaf -d 'workbooks/depot-*.xlsx' --out-dir results/
  sheaf validate workbooks/depot-monthly.sheaf -d workbooks/depot-2026-10.xlsx
  sheaf inspect workbooks/depot-2026-10.xlsx
  sheaf calc 'percentile({{Minutes late}}, 90)' -d workbooks/depot-2026-10.xlsx

Exit status:
{}
Environment:
  SHEAF_RUN_TIME  the run time to record (e.g. '2026-11-01 09:00:00 UTC'), for byte-identical reruns
  NO_COLOR        when set, no colour (unless --color always)

JSON: `run --json` prints JSON Lines, one document per data file (\"kind\": \"result\") and,
after a batch, one \"trend\"; each carries \"version\". Its JSON Schema is
schema/sheaf-report.schema.json in sheaf's repository.",
        table()
    )
}
