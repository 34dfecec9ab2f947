//! `--json`: every result on standard output.

use serde_json::{Value as Json, json};

use crate::eval::{Block, Chart, One, PANEL_LABELS, Results};
use crate::load::Table;
use crate::write::RunInfo;

fn one(v: &One) -> Json {
    match v {
        One::Number(x) => json!(x),
        One::Truth(b) => json!(b),
        One::Text(t) => json!(t),
        One::List(v) => json!(v),
        One::Undefined(why) => json!({ "no_value": why }),
    }
}

pub fn results(results: &Results, table: &Table, run: &RunInfo) -> Json {
    let blocks: Vec<Json> = results
        .blocks
        .iter()
        .map(|b| match b {
            Block::Panel { name, keys, entries, .. } => json!({
                "kind": "panel", "name": name, "keys": keys,
                "entries": entries.iter().map(|e| {
                    let figures: serde_json::Map<String, Json> = PANEL_LABELS.iter().zip(&e.figures).map(|(l, v)| (l.to_string(), one(v))).collect();
                    let r = &e.robustness;
                    json!({
                        "group": e.group, "column": e.column, "figures": figures,
                        "robustness": {
                            "status": r.status.word(), "reason": r.reason,
                            "outliers_1_5_iqr": r.outliers_wide.iter().map(|f| json!({"cell": f.address.to_string(), "value": f.value})).collect::<Vec<_>>(),
                            "outliers_3_iqr": r.outliers_far.iter().map(|f| json!({"cell": f.address.to_string(), "value": f.value})).collect::<Vec<_>>(),
                            "mean_without_outliers": one(&r.mean_without), "sd_without_outliers": one(&r.sd_without),
                            "bootstrap": r.bootstrap.as_ref().ok().map(|b| json!({
                                "mean": [b.mean.low, b.mean.high], "median": [b.median.low, b.median.high],
                                "resamples": b.resamples, "seed": b.seed, "method": b.method.words() })),
                        }
                    })
                }).collect::<Vec<_>>()
            }),
            Block::Figures { name, keys, names, rows } => json!({
                "kind": "figures", "name": name, "keys": keys,
                "rows": rows.iter().map(|r| {
                    let values: serde_json::Map<String, Json> = names.iter().zip(&r.values).map(|(n, v)| (n.clone(), one(v))).collect();
                    json!({ "group": r.group, "rows": r.rows, "figures": values })
                }).collect::<Vec<_>>()
            }),
        })
        .collect();
    let checks: Vec<Json> = results
        .checks
        .iter()
        .map(|c| json!({ "name": c.name, "group": c.group, "condition": c.condition, "value": one(&c.value),
            "limit": c.limit.as_ref().map(one), "result": c.outcome.word(), "note": c.note }))
        .collect();
    let charts: Vec<Json> = results
        .charts
        .iter()
        .map(|c| match c {
            Chart::Histogram { column, group, histogram, rule } => json!({ "kind": "histogram", "column": column, "group": group, "rule": rule, "edges": histogram.edges, "counts": histogram.counts }),
            Chart::Boxplot { column, boxes } => json!({ "kind": "boxplot", "column": column,
                "boxes": boxes.iter().map(|(g, b)| json!({ "group": g, "whisker_low": b.whisker_low, "q1": b.q1, "median": b.median, "q3": b.q3, "whisker_high": b.whisker_high })).collect::<Vec<_>>() }),
        })
        .collect();
    json!({
        "title": results.title,
        "input": { "file": table.source.file_name, "size": table.source.size, "sha256": table.source.sha256, "sheet": table.sheet, "header_row": table.header_row },
        "run": { "recipe": run.recipe_path, "time": run.run_time, "version": run.version },
        "rows_read": results.rows_read,
        "rows_skipped": results.rows_skipped.iter().map(|(why, n)| json!({"reason": why, "rows": n})).collect::<Vec<_>>(),
        "missing_cells": results.missing_cells.iter().map(|m| json!({"cell": m.address, "column": m.column, "why": m.kind.words(), "content": m.content})).collect::<Vec<_>>(),
        "blocks": blocks, "checks": checks, "charts": charts,
    })
}
