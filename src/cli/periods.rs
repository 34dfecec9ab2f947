//! The periods of a batch's files: each from its name, in time order,
//! settled before any file is read; or, when the recipe names a period
//! column (`period from COLUMN`), from each file's data once it is read
//! ([`order_read`]). A fixed `period` in the recipe, a date that cannot
//! exist or two files of one period stop the batch with a message naming
//! the files. When a name holds no date the files are ordered by name, and
//! the batch says so.

use std::path::{Path, PathBuf};

use super::Failure;
use crate::history::{self, Period, PeriodSource};
use crate::recipe::Recipe;

/// One file of a batch and the period it covers.
pub struct Planned {
    pub path: PathBuf,
    /// From the name; [`Period::fallback`] (the file's stem) when it holds
    /// no date; None until read when the period comes from the data.
    pub period: Option<Period>,
    pub label: String,
}

/// The files in the order they are compared, and a note when that order is
/// not the order of their periods.
pub struct Plan {
    pub files: Vec<Planned>,
    pub ordering_note: Option<String>,
}

fn stem(path: &Path) -> String {
    path.file_stem()
        .unwrap_or_default()
        .to_string_lossy()
        .into_owned()
}

/// Settles every file's period; `Err` says what to do and that nothing was read.
pub fn plan(recipe: &Recipe, files: &[PathBuf]) -> Result<Plan, Failure> {
    if history::period_column(recipe).is_some() {
        return Ok(awaiting_data(files));
    }
    let planned = periods_from_names(recipe, files)?;
    in_period_order(planned)
}

/// With a period column, each file's period is read from its data; the
/// files wait in name order until [`order_read`] orders them.
fn awaiting_data(files: &[PathBuf]) -> Plan {
    let mut planned: Vec<Planned> = files
        .iter()
        .map(|path| Planned {
            path: path.clone(),
            period: None,
            label: stem(path),
        })
        .collect();
    planned.sort_by(|a, b| a.path.cmp(&b.path));
    Plan {
        files: planned,
        ordering_note: None,
    }
}

/// Each file's period from its name (or the recipe's `period`); refused
/// when a name holds a date that cannot exist, or a fixed period would
/// label several files alike.
fn periods_from_names(recipe: &Recipe, files: &[PathBuf]) -> Result<Vec<Planned>, Failure> {
    let mut planned = Vec::new();
    let mut refused = Vec::new();
    for path in files {
        match history::period_of(recipe, path) {
            Ok(period) => planned.push(Planned {
                path: path.clone(),
                label: period
                    .as_ref()
                    .map_or_else(|| stem(path), |p| p.label.clone()),
                period,
            }),
            Err(e) => refused.push(e),
        }
    }
    if let Some(fixed) = planned.first().and_then(|p| p.period.as_ref())
        && fixed.source == PeriodSource::Recipe
        && files.len() > 1
    {
        return Err(Failure::new(format!(
            "the recipe fixes `period \"{}\"` but --data matches {} files, which would all \
             be labelled {0}; remove the `period` line so each file's period comes from \
             its name\nnothing was read or written",
            fixed.label,
            files.len()
        )));
    }
    if !refused.is_empty() {
        return Err(Failure::new(format!(
            "{}\nnothing was read or written",
            refused.join("\n")
        )));
    }
    Ok(planned)
}

/// The files in period order; when a name holds no date, all in name
/// order with a note saying so (each undated file labelled by its stem).
fn in_period_order(mut planned: Vec<Planned>) -> Result<Plan, Failure> {
    let undated: Vec<String> = planned
        .iter()
        .filter(|p| p.period.is_none())
        .map(|p| p.path.display().to_string())
        .collect();
    if undated.is_empty() {
        planned.sort_by_key(|p| (history::order_key(&p.label), p.path.clone()));
        refuse_shared_periods(&planned)?;
        return Ok(Plan {
            files: planned,
            ordering_note: None,
        });
    }
    planned.sort_by(|a, b| a.path.cmp(&b.path));
    for p in planned.iter_mut().filter(|p| p.period.is_none()) {
        p.period = Some(Period::fallback(p.label.clone()));
    }
    let note = (planned.len() > 1).then(|| {
        format!(
            "warning: no date found in the name of {}; the files were ordered by file name \
             and each compared with the one before: {}",
            undated.join(", "),
            planned
                .iter()
                .map(|p| p.path.display().to_string())
                .collect::<Vec<_>>()
                .join(" -> ")
        )
    });
    Ok(Plan {
        files: planned,
        ordering_note: note,
    })
}

/// Files read for a recipe with a period column, put in period order
/// (`of` gives each one's path and period label); two files of one period
/// are refused, naming both.
pub fn order_read<T>(read: &mut [T], of: impl Fn(&T) -> (&Path, &str)) -> Result<(), Failure> {
    read.sort_by_key(|t| {
        let (path, label) = of(t);
        (history::order_key(label), path.to_path_buf())
    });
    refuse_shared(read.iter().map(of).collect())
}

/// Two files of one period would be compared with each other as if a month apart.
fn refuse_shared_periods(sorted: &[Planned]) -> Result<(), Failure> {
    refuse_shared(
        sorted
            .iter()
            .map(|p| (p.path.as_path(), p.label.as_str()))
            .collect(),
    )
}

/// `sorted` as (path, period label), in period order.
fn refuse_shared(sorted: Vec<(&Path, &str)>) -> Result<(), Failure> {
    let shared: Vec<String> = sorted
        .windows(2)
        .filter(|w| w[0].1 == w[1].1)
        .map(|w| {
            format!(
                "{} and {} are both of period {}",
                w[0].0.display(),
                w[1].0.display(),
                w[0].1
            )
        })
        .collect();
    if shared.is_empty() {
        return Ok(());
    }
    Err(Failure::new(format!(
        "{}; keep one file per period in the pattern (or rename one)\nnothing was read or written",
        shared.join("\n")
    )))
}
