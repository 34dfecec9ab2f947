//! The robustness sheet's cells, read off [`ROBUSTNESS_FIGURES`]: each
//! figure's value split into its columns, shown as the sheet shows them.

use super::style::Shown;
use crate::eval::{
    FigureKind, Flagged, One, ROBUSTNESS_FIGURES, Reason, Robustness, RobustnessShape, Topic,
};
use crate::stats::{AgainstNoise, BootstrapIntervals, SHAPE_NOTE_CUTOFF};

/// One cell of an entry's row on the robustness sheet.
pub(super) struct RobustnessCell {
    /// The column's header.
    pub label: &'static str,
    /// How it is shown.
    pub kind: FigureKind,
    /// Its value, or why there is none.
    pub value: One,
}

/// The robustness sheet's column headers after group, column, status and reason.
pub(super) fn robustness_labels() -> impl Iterator<Item = &'static str> {
    ROBUSTNESS_FIGURES
        .iter()
        .flat_map(|f| f.labels.iter().copied())
}

/// What each of those columns is about and how it is shown, in the same
/// order: the print bands keep a topic's columns together.
pub(super) fn robustness_topics() -> impl Iterator<Item = (Topic, FigureKind)> {
    ROBUSTNESS_FIGURES
        .iter()
        .flat_map(|f| f.shape.kinds().iter().map(move |kind| (f.topic, *kind)))
}

/// An entry's robustness cells, in [`robustness_labels`]' order. `measure`
/// shows values written inside text (a flagged cell's value).
pub(super) fn robustness_cells(r: &Robustness, measure: Shown) -> Vec<RobustnessCell> {
    let mut row = Vec::new();
    for figure in ROBUSTNESS_FIGURES {
        let values = parts(&figure.shape, r, measure);
        debug_assert_eq!(values.len(), figure.labels.len(), "{}", figure.key);
        let columns = figure.labels.iter().zip(figure.shape.kinds());
        row.extend(
            columns
                .zip(values)
                .map(|((label, kind), value)| RobustnessCell {
                    label,
                    kind: *kind,
                    value,
                }),
        );
    }
    row
}

/// A figure's value split into its shape's columns.
fn parts(shape: &RobustnessShape, r: &Robustness, measure: Shown) -> Vec<One> {
    match *shape {
        RobustnessShape::One(_, value) => vec![value(r).clone()],
        RobustnessShape::Cells(list) => match list(r) {
            Ok(list) => vec![
                One::Number(list.len() as f64),
                One::Text(cells(list, measure)),
            ],
            Err(why) => vec![One::Undefined(why.clone()); 2],
        },
        RobustnessShape::Influence(found) => match found(r) {
            Ok(i) => vec![
                One::Number(i.change),
                One::Text(cells(std::slice::from_ref(&i.cell), measure)),
            ],
            Err(why) => vec![One::Undefined(why.clone()); 2],
        },
        RobustnessShape::Noise { of, ratio } => noise(of(r), ratio),
        RobustnessShape::Bootstrap(found) => bootstrap(found(r)),
    }
}

/// Estimate, standard error, ratio and verdict of a shape statistic.
fn noise(found: &Result<AgainstNoise, Reason>, ratio: &str) -> Vec<One> {
    match found {
        Ok(k) => vec![
            One::number(k.estimate),
            One::number(k.standard_error),
            One::number(k.ratio),
            One::Text(match k.beyond {
                true => format!("yes: {ratio} above {SHAPE_NOTE_CUTOFF}"),
                false => "no".into(),
            }),
        ],
        Err(why) => vec![One::Undefined(why.clone()); 4],
    }
}

/// The mean's and the median's interval, the resamples and the method.
fn bootstrap(found: &Result<BootstrapIntervals, Reason>) -> Vec<One> {
    match found {
        Ok(b) => vec![
            One::Number(b.mean.low),
            One::Number(b.mean.high),
            One::Number(b.median.low),
            One::Number(b.median.high),
            One::Number(b.resamples as f64),
            One::Text(b.method.words().into()),
        ],
        Err(why) => vec![One::Undefined(why.clone()); 6],
    }
}

/// A flagged cell with its value: the number as the input cell holds it,
/// then the value used when that differs (derived by a `let`), so
/// "Deliveries!D105 holds 55.8, used as 0.93" rather than a value the
/// reader cannot find in the cell.
fn cell_and_value(f: &Flagged, measure: Shown) -> String {
    match f.address.source_value {
        Some(source) if source != f.value => format!(
            "{} holds {}, used as {}",
            f.address,
            crate::format::shortest(source),
            measure.text(f.value)
        ),
        _ => format!("{} ({})", f.address, measure.text(f.value)),
    }
}

/// Cells listed in one spreadsheet cell; the rest are counted, not listed.
const LISTED_CELLS: usize = 100;

fn cells(list: &[Flagged], measure: Shown) -> String {
    if list.is_empty() {
        return "none".into();
    }
    let mut text = list
        .iter()
        .take(LISTED_CELLS)
        .map(|f| cell_and_value(f, measure))
        .collect::<Vec<_>>()
        .join("; ");
    if list.len() > LISTED_CELLS {
        text.push_str(&format!(
            " and {} more (see the About sheet's missing cells and the JSON output for all)",
            list.len() - LISTED_CELLS
        ));
    }
    text
}
