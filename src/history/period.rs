//! Which period a data file covers: the recipe's `period`, or a date in the
//! file's name (`depot-2026-10.xlsx`, `sales_202610.csv`, `2026-10-31 ops.ods`).

use std::path::Path;

use crate::recipe::{Recipe, ast::StatementKind};

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PeriodSource {
    Recipe,
    FileName,
}

#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Period {
    /// `2026-10` or `2026-10-31`, sortable as text.
    pub label: String,
    pub source: PeriodSource,
}

impl Period {
    pub fn explain(&self) -> String {
        match self.source {
            PeriodSource::Recipe => format!("{} (from the recipe's `period`)", self.label),
            PeriodSource::FileName => format!("{} (from the data file's name)", self.label),
        }
    }
}

/// The first year-month (and day, if given) in a file name: YYYY-MM,
/// YYYY_MM, YYYYMM, optionally followed by a day.
fn from_name(name: &str) -> Option<String> {
    let bytes = name.as_bytes();
    let digits = |at: usize, n: usize| {
        bytes
            .get(at..at + n)
            .filter(|d| d.iter().all(u8::is_ascii_digit))
            .map(|d| std::str::from_utf8(d).unwrap())
    };
    for start in 0..bytes.len() {
        if start > 0 && bytes[start - 1].is_ascii_digit() {
            continue;
        }
        let Some(year) = digits(start, 4).filter(|y| ("1900".."2200").contains(y)) else {
            continue;
        };
        let mut at = start + 4;
        if matches!(bytes.get(at), Some(b'-' | b'_' | b'.')) {
            at += 1;
        }
        let Some(month) = digits(at, 2).filter(|m| ("01"..="12").contains(m)) else {
            continue;
        };
        at += 2;
        let separated = matches!(bytes.get(at), Some(b'-' | b'_' | b'.'));
        let day = digits(at + usize::from(separated), 2)
            .filter(|d| ("01"..="31").contains(d))
            .filter(|_| {
                !bytes
                    .get(at + usize::from(separated) + 2)
                    .is_some_and(u8::is_ascii_digit)
            });
        if bytes.get(at).is_some_and(u8::is_ascii_digit) && day.is_none() {
            continue;
        }
        return Some(match day {
            Some(d) => format!("{year}-{month}-{d}"),
            None => format!("{year}-{month}"),
        });
    }
    None
}

/// The recipe's `period` wins; else a date in the file name; else none.
pub fn period_of(recipe: &Recipe, data: &Path) -> Option<Period> {
    let stated = recipe.statements.iter().find_map(|s| match &s.kind {
        StatementKind::Period(p) => Some(p.value.clone()),
        _ => None,
    });
    if let Some(label) = stated {
        return Some(Period {
            label,
            source: PeriodSource::Recipe,
        });
    }
    let name = data.file_name()?.to_string_lossy();
    from_name(&name).map(|label| Period {
        label,
        source: PeriodSource::FileName,
    })
}

#[cfg(test)]
mod tests {
    use super::from_name;

    #[test]
    fn dates_in_file_names() {
        assert_eq!(from_name("depot-2026-10.xlsx").as_deref(), Some("2026-10"));
        assert_eq!(from_name("sales_202610.csv").as_deref(), Some("2026-10"));
        assert_eq!(
            from_name("2026-10-31 ops.ods").as_deref(),
            Some("2026-10-31")
        );
        assert_eq!(
            from_name("depot_2026_09_export.xlsx").as_deref(),
            Some("2026-09")
        );
        assert_eq!(from_name("run 12345678.xlsx"), None);
        assert_eq!(from_name("depot-2026-13.xlsx"), None);
        assert_eq!(from_name("report.xlsx"), None);
    }
}
