//! The report built from the evaluator's results and the run's facts.

use std::path::Path;

use super::*;
use crate::eval::{self, Block, Chart, One, Results};
use crate::history::{self, Move, PeriodSource, Record};
use crate::load::Table;
use crate::recipe::ast::CheckLevel;
use crate::write::RunInfo;

/// One figure's value in its JSON shape.
pub(super) fn value(v: &One) -> Value {
    match v {
        One::Number(x) => Value::Number(*x),
        One::Truth(b) => Value::Truth(*b),
        One::Text(t) => Value::Text(t.clone()),
        One::Date(x) => Value::Date(IsoDate::from_serial(*x)),
        One::List(v) => Value::Numbers(v.clone()),
        One::Undefined(why) => Value::Missing(reason(why)),
    }
}

/// A reason in its JSON shape, `{"reason": "..."}`: the words are written here.
fn reason(why: &impl std::fmt::Display) -> Reason {
    Reason {
        reason: why.to_string(),
    }
}

fn or_reason<T, U>(r: &Result<T, eval::Reason>, f: impl FnOnce(&T) -> U) -> OrReason<U> {
    match r {
        Ok(t) => OrReason::Value(f(t)),
        Err(why) => OrReason::NoValue(reason(why)),
    }
}

/// The recorded run time (`2026-11-01 09:00:00 UTC`) as ISO 8601; a time
/// given in another form through `SHEAF_RUN_TIME` is kept as given.
fn iso_time(run_time: &str) -> String {
    let iso = run_time.trim_end_matches(" UTC").replacen(' ', "T", 1);
    if crate::format::serial_from_iso(&iso).is_some() {
        format!("{}Z", iso.trim_end_matches('Z'))
    } else {
        run_time.to_string()
    }
}

/// The `result` document of one data file, whose workbook went to `output`.
pub(crate) fn result_document(
    results: &Results,
    table: &Table,
    run: &RunInfo,
    output: &Path,
) -> Document {
    Document::Result(Box::new(ResultReport {
        version: REPORT_VERSION,
        sheaf_version: run.version.clone(),
        run_time: iso_time(&run.run_time),
        title: results.title.clone(),
        output: output.display().to_string(),
        recipe: RecipeReport {
            path: run.recipe_path.clone(),
            text: run.recipe_text.clone(),
            fingerprint: run.fingerprint.clone(),
            drift: run.drift,
        },
        input: InputReport {
            file: table.source.file_name.clone(),
            size: table.source.size,
            sha256: table.source.sha256.clone(),
            sheet: table.sheet.clone(),
            header_row: table.header_row,
        },
        period: run.period.as_ref().map(|p| PeriodReport {
            label: p.label.clone(),
            source: match p.source {
                PeriodSource::DataColumn => PeriodSourceReport::DataColumn,
                PeriodSource::Recipe => PeriodSourceReport::Recipe,
                PeriodSource::FileName => PeriodSourceReport::FileName,
                PeriodSource::NameFallback => PeriodSourceReport::NameFallback,
            },
        }),
        rows_read: results.rows_read,
        rows_skipped: results
            .rows_skipped
            .iter()
            .map(|(why, rows)| SkippedRows {
                reason: why.clone(),
                rows: *rows,
            })
            .collect(),
        missing_cells: results
            .missing_cells
            .iter()
            .map(|m| MissingCell {
                cell: m.address.clone(),
                column: m.column.clone(),
                why: m.kind.words().to_string(),
                content: m.content.clone(),
            })
            .collect(),
        reading: crate::load::reading_notes(table)
            .into_iter()
            .map(|n| ReadingReport {
                topic: n.topic.to_string(),
                text: n.text,
                attention: n.attention,
            })
            .collect(),
        warnings: results.warnings.clone(),
        blocks: results.blocks.iter().map(block).collect(),
        checks: results.checks.iter().map(check).collect(),
        charts: results.charts.iter().map(chart).collect(),
        changes: changes(results, run),
    }))
}

fn block(b: &Block) -> BlockReport {
    match b {
        Block::Panel {
            name,
            keys,
            entries,
            rows_used,
        } => BlockReport::Panel(PanelReport {
            name: name.clone(),
            keys: keys.clone(),
            rows_used: *rows_used,
            entries: entries
                .iter()
                .map(|e| PanelEntryReport {
                    group: e.group.clone(),
                    column: e.column.clone(),
                    figures: PanelFigures::new(&e.figures),
                    robustness: robustness(&e.robustness),
                })
                .collect(),
        }),
        Block::Figures {
            name,
            keys,
            names,
            rows,
        } => BlockReport::Figures(FiguresReport {
            name: name.clone(),
            keys: keys.clone(),
            rows: rows
                .iter()
                .map(|r| FigureRowReport {
                    group: r.group.clone(),
                    rows: r.rows,
                    figures: NamedValues(
                        names
                            .iter()
                            .zip(&r.values)
                            .map(|(n, v)| (n.clone(), value(v)))
                            .collect(),
                    ),
                })
                .collect(),
        }),
    }
}

fn cells(flagged: &[eval::Flagged]) -> Vec<CellValue> {
    flagged
        .iter()
        .map(|f| CellValue {
            cell: f.address.to_string(),
            input_value: f.address.source_value,
            value: f.value,
        })
        .collect()
}

fn influence(i: &Result<eval::Influence, eval::Reason>) -> OrReason<InfluenceReport> {
    or_reason(i, |i| InfluenceReport {
        change: i.change,
        cell: i.cell.address.to_string(),
        input_value: i.cell.address.source_value,
        value: i.cell.value,
    })
}

fn against_noise(n: &Result<crate::stats::AgainstNoise, eval::Reason>) -> OrReason<NoiseReport> {
    or_reason(n, |n| NoiseReport {
        estimate: n.estimate,
        standard_error: n.standard_error,
        ratio: n.ratio,
        noted: n.beyond,
    })
}

fn interval(i: &crate::stats::Interval) -> IntervalReport {
    IntervalReport {
        low: i.low,
        high: i.high,
    }
}

fn bootstrap(b: &crate::stats::BootstrapIntervals) -> BootstrapReport {
    BootstrapReport {
        level: b.level,
        resamples: b.resamples,
        seed: b.seed,
        method: b.method.words().to_string(),
        mean: interval(&b.mean),
        median: interval(&b.median),
    }
}

/// One robustness figure in its shape's JSON form.
fn robustness_figure(
    shape: &eval::RobustnessShape,
    r: &eval::Robustness,
) -> RobustnessFigureReport {
    use eval::RobustnessShape as S;
    match *shape {
        S::One(_, one) => RobustnessFigureReport::Value(value(one(r))),
        S::Cells(list) => RobustnessFigureReport::Cells(match list(r) {
            Ok(list) => OrReason::Value(cells(list)),
            Err(why) => OrReason::NoValue(reason(why)),
        }),
        S::Influence(found) => RobustnessFigureReport::Influence(influence(found(r))),
        S::Noise { of, .. } => RobustnessFigureReport::Noise(against_noise(of(r))),
        S::Bootstrap(found) => RobustnessFigureReport::Bootstrap(or_reason(found(r), bootstrap)),
    }
}

fn robustness(r: &eval::Robustness) -> RobustnessReport {
    RobustnessReport {
        status: match r.status {
            eval::Status::Ok => StatusReport::Ok,
            eval::Status::Note => StatusReport::Note,
            eval::Status::Warn => StatusReport::Warn,
        },
        reason: r.reason.clone(),
        figures: eval::ROBUSTNESS_FIGURES
            .iter()
            .map(|f| (f.key, robustness_figure(&f.shape, r)))
            .collect(),
    }
}

fn check(c: &eval::CheckResult) -> CheckReport {
    CheckReport {
        name: c.name.clone(),
        level: match c.level {
            CheckLevel::Warn => CheckLevelReport::Warn,
            CheckLevel::Fail => CheckLevelReport::Fail,
        },
        condition: c.condition.clone(),
        group: c.group.clone(),
        value: value(&c.value),
        limit: c.limit.as_ref().map(value),
        result: match c.outcome {
            eval::Outcome::Pass => OutcomeReport::Pass,
            eval::Outcome::Warn => OutcomeReport::Warn,
            eval::Outcome::Fail => OutcomeReport::Fail,
        },
        note: c.note_words(),
    }
}

fn chart(c: &Chart) -> ChartReport {
    match c {
        Chart::Histogram {
            column,
            group,
            histogram,
            rule,
        } => ChartReport::Histogram {
            column: column.clone(),
            group: group.clone(),
            rule: rule.clone(),
            edges: histogram.edges.clone(),
            counts: histogram.counts.clone(),
            capped_from: histogram.capped_from,
            below: histogram.below,
            above: histogram.above,
        },
        Chart::Boxplot { column, boxes } => ChartReport::Boxplot {
            column: column.clone(),
            boxes: boxes
                .iter()
                .map(|(g, b)| BoxReport {
                    group: g.clone(),
                    whisker_low: b.whisker_low,
                    q1: b.q1,
                    median: b.median,
                    q3: b.q3,
                    whisker_high: b.whisker_high,
                    outliers: b.outliers.clone(),
                })
                .collect(),
        },
    }
}

fn relative(m: &Move) -> OrReason<f64> {
    match m.relative() {
        Some(r) => OrReason::Value(r),
        None => OrReason::NoValue(reason(&eval::Reason::PreviousIsZero)),
    }
}

/// The Changes sheet's rows: the same comparison of records.
fn changes(results: &Results, run: &RunInfo) -> Option<ChangesReport> {
    let previous = run.previous.as_ref()?;
    let period = run.period.as_ref().map(|p| p.label.clone());
    let current = Record::from_results(results, run.fingerprint.clone(), period);
    let (from, to) = (
        previous.period.as_deref().unwrap_or_default(),
        current.period.as_deref().unwrap_or_default(),
    );
    Some(ChangesReport {
        previous_period: previous.period.clone(),
        figures: history::moves_between(from, previous, to, &current)
            .iter()
            .map(|m| ChangeReport {
                block: m.block.clone(),
                group: m.group.clone(),
                figure: m.name.clone(),
                previous: m.before,
                now: m.after,
                change: m.after - m.before,
                relative_change: relative(m),
                standard_error: m.se,
                change_in_standard_errors: m.noise_scaled(),
                moved: m.moved(run.drift, run.noise),
                flag: m.flag(run.drift, run.noise).map(|f| f.word().to_string()),
            })
            .collect(),
    })
}

/// The `trend` document of a batch: `records` by period, in order.
pub(crate) fn trend_document(
    records: &[(String, Record)],
    output: Option<&Path>,
    (drift, noise): (f64, f64),
    skipped: &[(std::path::PathBuf, String)],
) -> Document {
    Document::Trend(TrendReport {
        version: REPORT_VERSION,
        output: output.map(|p| p.display().to_string()),
        periods: records.iter().map(|(p, _)| p.clone()).collect(),
        figures: records
            .iter()
            .flat_map(|(period, record)| {
                record
                    .entries
                    .iter()
                    .filter(|e| e.block != history::TERM_BLOCK)
                    .map(move |e| TrendFigure {
                        period: period.clone(),
                        block: e.block.clone(),
                        group: e.group.clone(),
                        figure: e.name.clone(),
                        value: e.value,
                    })
            })
            .collect(),
        moves: history::largest_moves(records)
            .iter()
            .map(|m| MoveReport {
                block: m.block.clone(),
                group: m.group.clone(),
                figure: m.name.clone(),
                from: m.from.clone(),
                to: m.to.clone(),
                before: m.before,
                after: m.after,
                relative_change: relative(m),
                standard_error: m.se,
                change_in_standard_errors: m.noise_scaled(),
                moved: m.moved(drift, noise),
                flag: m.flag(drift, noise).map(|f| f.word().to_string()),
            })
            .collect(),
        skipped: skipped
            .iter()
            .map(|(path, why)| SkippedFile {
                file: path.display().to_string(),
                reason: why.trim_end().to_string(),
            })
            .collect(),
    })
}
