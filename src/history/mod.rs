//! Month over month: the record of every figure a result workbook keeps,
//! the period a file covers, the comparison with the previous period and
//! the trend workbook of a batch.

mod judge;
mod period;
mod period_data;
mod record;
mod trend;

pub use judge::{Basis, DEFAULT_NOISE_SES, Flag, noise_of, rules_in_words};
pub use period::{Period, PeriodSource, compare_order_warning, order_key, period_of};
pub use period_data::{period_column, period_from_data, period_of_file};
pub use record::{
    Entry, RECORD_BAND_WIDTH, RECORD_SHEET, Record, RecordError, SE_SUFFIX, TERM_BLOCK,
    fingerprint, made_by_sheaf, panel_entry_name, panel_figure_of, shown_name,
};
pub use trend::{
    Bands, Move, group_changes, largest_moves, moves_between, trend_workbook, welch_se, write_noise,
};

/// Relative change beyond which a figure is flagged when the recipe sets no
/// `drift` (sheaf's default; common practice, not from a published source).
pub const DEFAULT_DRIFT: f64 = 0.10;

/// The recipe's `drift` as a share, or the default.
pub fn drift_of(recipe: &crate::recipe::Recipe) -> f64 {
    recipe
        .statements
        .iter()
        .find_map(|s| match &s.kind {
            crate::recipe::ast::StatementKind::Drift(d) => Some(if d.value.1 {
                d.value.0 / 100.0
            } else {
                d.value.0
            }),
            _ => None,
        })
        .unwrap_or(DEFAULT_DRIFT)
}
