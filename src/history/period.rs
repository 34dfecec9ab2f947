//! Which period a data file covers: the recipe's `period`, or a date in the
//! file's name in any common form: `depot-2026-10`, `sales_202610`,
//! `2026-10-31 ops`, `depot-10-2026`, `ops 31.10.2026`, `deliveries_Oct2026`,
//! `qc-january` (a month without a year sorts by its place in the year).
//! A date that cannot exist (`depot-2026-13`, `31.02.2026`) is refused.
//! A period column or date column the recipe names (`period from COLUMN`)
//! wins over both: see `period_data`.

use std::path::Path;

use crate::recipe::{Recipe, ast::StatementKind};

/// Where a file's period came from, in the order they are tried.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PeriodSource {
    /// `period from COLUMN`: the month of the column's dates or periods.
    DataColumn,
    /// `period "2026-10"` (a single file only).
    Recipe,
    /// A date in the file's name.
    FileName,
    /// No date anywhere: the file's name itself, so a batch can still
    /// order and label it (it says so).
    NameFallback,
}

/// The period a data file covers.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Period {
    /// `2026-10` or `2026-10-31`, sortable as text.
    pub label: String,
    /// Where it was found.
    pub source: PeriodSource,
    /// The text of the file name the date was read from (`Oct2026`).
    pub read_from: Option<String>,
}

impl Period {
    /// A file with no date in its data or name: labelled by its name.
    pub fn fallback(stem: String) -> Period {
        Period {
            label: stem,
            source: PeriodSource::NameFallback,
            read_from: None,
        }
    }

    /// The period and where it came from, for the About sheet and `-v`.
    pub fn explain(&self) -> String {
        match self.source {
            PeriodSource::DataColumn => format!(
                "{} (from {})",
                self.label,
                self.read_from.as_deref().unwrap_or("a column of the data")
            ),
            PeriodSource::NameFallback => format!(
                "{} (the data file's name: no date was found in it, and the recipe names no period column)",
                self.label
            ),
            PeriodSource::Recipe => format!("{} (from the recipe's `period`)", self.label),
            PeriodSource::FileName => format!(
                "{} (from \"{}\" in the data file's name)",
                self.label,
                self.read_from.as_deref().unwrap_or_default()
            ),
        }
    }
}

/// One run of letters or of digits in a file name, with the text before it
/// back to the previous run (the separator).
#[derive(Debug, Clone, Copy)]
struct Token<'a> {
    text: &'a str,
    sep: &'a str,
    digits: bool,
}

fn tokens(name: &str) -> Vec<Token<'_>> {
    let mut out = Vec::new();
    let mut last_end = 0;
    let mut chars = name.char_indices().peekable();
    while let Some((start, c)) = chars.next() {
        let digits = c.is_ascii_digit();
        if !digits && !c.is_alphabetic() {
            continue;
        }
        let mut end = start + c.len_utf8();
        while let Some(&(at, next)) = chars.peek() {
            let same = if digits {
                next.is_ascii_digit()
            } else {
                next.is_alphabetic()
            };
            if !same {
                break;
            }
            end = at + next.len_utf8();
            chars.next();
        }
        out.push(Token {
            text: &name[start..end],
            sep: &name[last_end..start],
            digits,
        });
        last_end = end;
    }
    out
}

/// English month names and their usual abbreviations, January = 1.
fn month_named(word: &str) -> Option<u32> {
    let word = word.to_lowercase();
    if word == "sept" {
        return Some(9);
    }
    crate::format::MONTH_NAMES
        .iter()
        .map(|n| n.to_lowercase())
        .position(|n| word == n || (word.len() == 3 && n.starts_with(word.as_str())))
        .map(|i| i as u32 + 1)
}

fn days_in(year: u32, month: u32) -> u32 {
    crate::format::days_in_month(i64::from(year), month)
}

fn year_of(token: &Token) -> Option<u32> {
    let y: u32 = token.text.parse().ok()?;
    (token.digits && token.text.len() == 4 && (1900..2200).contains(&y)).then_some(y)
}

fn small(token: &Token) -> Option<u32> {
    (token.digits && (1..=2).contains(&token.text.len()))
        .then(|| token.text.parse().ok())
        .flatten()
}

/// A separator allowed between the numbers of one date.
fn joins(token: &Token) -> bool {
    matches!(token.sep, "-" | "_" | "." | " ")
}

/// A date read from a file name: year (absent for `january`), month, day.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct NameDate {
    year: Option<u32>,
    month: u32,
    day: Option<u32>,
}

impl NameDate {
    /// Refuses month 13 or 31 February, with what to do about it.
    fn checked(self, found: &str) -> Result<Self, String> {
        if !(1..=12).contains(&self.month) {
            return Err(format!(
                "\"{found}\" reads as month {} in a date, which does not exist",
                self.month
            ));
        }
        if let (Some(year), Some(day)) = (self.year, self.day)
            && (day == 0 || day > days_in(year, self.month))
        {
            return Err(format!(
                "\"{found}\" reads as day {day} of {year}-{:02}, which does not exist",
                self.month
            ));
        }
        Ok(self)
    }

    fn label(self) -> String {
        match (self.year, self.day) {
            (Some(y), Some(d)) => format!("{y}-{:02}-{d:02}", self.month),
            (Some(y), None) => format!("{y}-{:02}", self.month),
            (None, _) => MONTH_LABELS[self.month as usize - 1].to_string(),
        }
    }
}

/// How a month without a year is labelled (and sorted, by its position here).
const MONTH_LABELS: [&str; 12] = crate::format::MONTH_NAMES;

/// The text of tokens `from..=to` as it stands in the name.
fn span(t: &[Token], from: usize, to: usize) -> String {
    let mut s = t[from].text.to_string();
    for tok in &t[from + 1..=to] {
        s.push_str(tok.sep);
        s.push_str(tok.text);
    }
    s
}

/// A date starting at token `i`: the date, how many tokens it used.
/// `Err` when the tokens plainly form a date that cannot exist.
fn date_at(t: &[Token], i: usize) -> Result<Option<(NameDate, usize)>, String> {
    let at = |k: usize| t.get(i + k);
    let joined = |k: usize| at(k).is_some_and(joins);
    let d = |year, month, day| NameDate { year, month, day };
    let found = |n: usize| span(t, i, i + n - 1);
    let tok = &t[i];
    // 202610, 20261031
    if tok.digits && matches!(tok.text.len(), 6 | 8) {
        let year = year_of(&Token {
            text: &tok.text[..4],
            ..*tok
        });
        let month: u32 = tok.text[4..6].parse().unwrap_or(0);
        let day = (tok.text.len() == 8).then(|| tok.text[6..].parse().unwrap_or(0));
        let date = d(year, month, day);
        // Eight or six digits are only a date when they read as one.
        return Ok(year
            .and_then(|_| date.checked(tok.text).ok())
            .map(|date| (date, 1)));
    }
    // 2026-10, 2026_10_31, 2026 Oct
    if let Some(year) = year_of(tok) {
        if let Some(m) = at(1).filter(|_| joined(1)).and_then(small) {
            let day = at(2).filter(|_| joined(2)).and_then(small);
            let n = if day.is_some() { 3 } else { 2 };
            return d(Some(year), m, day)
                .checked(&found(n))
                .map(|x| Some((x, n)));
        }
        if let Some(m) = at(1)
            .filter(|tk| !tk.digits)
            .and_then(|tk| month_named(tk.text))
        {
            return Ok(Some((d(Some(year), m, None), 2)));
        }
        return Ok(None);
    }
    // 31.10.2026, 10-2026, 31 October 2026
    if let Some(first) = small(tok) {
        if let Some(year) = at(1).filter(|_| joined(1)).and_then(year_of) {
            return d(Some(year), first, None)
                .checked(&found(2))
                .map(|x| Some((x, 2)));
        }
        let second = at(1).filter(|_| joined(1));
        let month = second
            .and_then(|s| small(s).or_else(|| (!s.digits).then(|| month_named(s.text)).flatten()));
        if let (Some(m), Some(year)) = (month, at(2).filter(|_| joined(2)).and_then(year_of)) {
            return d(Some(year), m, Some(first))
                .checked(&found(3))
                .map(|x| Some((x, 3)));
        }
        return Ok(None);
    }
    // Oct2026, October-2026, january
    if let Some(m) = month_named(tok.text).filter(|_| !tok.digits) {
        let year = at(1).and_then(year_of);
        return Ok(Some((d(year, m, None), if year.is_some() { 2 } else { 1 })));
    }
    Ok(None)
}

/// The first date in a file name (without its extension) and the text it
/// was read from; `Err` names a date that cannot exist (`depot-2026-13`).
pub(super) fn from_name(stem: &str) -> Result<Option<(String, String)>, String> {
    let t = tokens(stem);
    for i in 0..t.len() {
        if let Some((date, n)) = date_at(&t, i)? {
            return Ok(Some((date.label(), span(&t, i, i + n - 1))));
        }
    }
    Ok(None)
}

/// Sorts periods in time: a month without a year by its place in the year.
pub fn order_key(label: &str) -> String {
    match MONTH_LABELS.iter().position(|m| *m == label) {
        Some(i) => format!("0000-{:02}", i + 1),
        None => label.to_string(),
    }
}

/// The recipe's `period` wins; else a date in the file name; else none.
/// `Err` when the name holds a date that cannot exist: the message names
/// the file and says what to do.
pub fn period_of(recipe: &Recipe, data: &Path) -> Result<Option<Period>, String> {
    let stated = recipe.statements.iter().find_map(|s| match &s.kind {
        StatementKind::Period(p) => Some(p.value.clone()),
        _ => None,
    });
    if let Some(label) = stated {
        return Ok(Some(Period {
            label,
            source: PeriodSource::Recipe,
            read_from: None,
        }));
    }
    let Some(stem) = data.file_stem() else {
        return Ok(None);
    };
    let found = from_name(&stem.to_string_lossy()).map_err(|e| {
        format!(
            "{}: the file name holds no usable period: {e}; rename the file",
            data.display()
        )
    })?;
    Ok(found.map(|(label, read_from)| Period {
        label,
        source: PeriodSource::FileName,
        read_from: Some(read_from),
    }))
}

/// A warning when the workbook given to `--compare` is of the same period
/// as this file or a later one, so "the change since last period" would
/// not be that. None when either period is unknown or the order is right.
pub fn compare_order_warning(
    compared: &Path,
    previous: Option<&str>,
    current: Option<&str>,
) -> Option<String> {
    let (previous, current) = (previous?, current?);
    let (before, now) = (order_key(previous), order_key(current));
    let relation = match before.cmp(&now) {
        std::cmp::Ordering::Less => return None,
        std::cmp::Ordering::Equal => "the same period as",
        std::cmp::Ordering::Greater => "a later period than",
    };
    Some(format!(
        "warning: --compare {} is of period {previous}, {relation} this file ({current}); \
         the changes shown are not since an earlier period; compare with an earlier result",
        compared.display()
    ))
}

#[cfg(test)]
mod tests {
    use super::{compare_order_warning, from_name, order_key};
    use std::path::Path;

    #[test]
    fn comparing_with_the_same_or_a_later_period_warns() {
        let p = Path::new("prev.xlsx");
        let warn = |before, now| compare_order_warning(p, Some(before), Some(now));
        assert!(warn("2026-09", "2026-10").is_none());
        assert!(
            warn("2026-10", "2026-10")
                .unwrap()
                .contains("the same period as")
        );
        assert!(
            warn("2026-11", "2026-10")
                .unwrap()
                .contains("a later period than")
        );
        assert!(warn("March", "January").unwrap().contains("a later period"));
        assert!(compare_order_warning(p, None, Some("2026-10")).is_none());
    }

    fn label(stem: &str) -> Option<String> {
        from_name(stem).unwrap().map(|(label, _)| label)
    }

    #[test]
    fn dates_in_file_names_in_every_common_form() {
        for (stem, want) in [
            ("depot-2026-10", "2026-10"),
            ("sales_202610", "2026-10"),
            ("sales_20261031", "2026-10-31"),
            ("2026-10-31 ops", "2026-10-31"),
            ("depot_2026_09_export", "2026-09"),
            ("depot 2026.09", "2026-09"),
            ("depot-10-2026", "2026-10"),
            ("depot_3_2026", "2026-03"),
            ("ops 31.10.2026", "2026-10-31"),
            ("ops 1-2-2024", "2024-02-01"),
            ("deliveries_Oct2026", "2026-10"),
            ("deliveries October 2026", "2026-10"),
            ("deliveries-sept-2026", "2026-09"),
            ("2026 Nov depot", "2026-11"),
            ("ops 31 December 2026", "2026-12-31"),
            ("qc-january", "January"),
            ("QC_FEB", "February"),
        ] {
            assert_eq!(label(stem).as_deref(), Some(want), "{stem}");
        }
    }

    #[test]
    fn names_without_a_date() {
        for stem in [
            "run 12345678",
            "report",
            "depot",
            "sales_999999",
            "qc-final",
        ] {
            assert_eq!(label(stem), None, "{stem}");
        }
    }

    #[test]
    fn impossible_dates_are_refused() {
        for stem in [
            "depot-2026-13",
            "depot-00-2026",
            "ops 31.02.2026",
            "ops 29.02.2026",
        ] {
            let e = from_name(stem).unwrap_err();
            assert!(e.contains("does not exist"), "{stem}: {e}");
        }
        // 2024 is a leap year (Gregorian rule: divisible by 4, not by 100 unless by 400).
        assert_eq!(label("ops 29.02.2024").as_deref(), Some("2024-02-29"));
    }

    #[test]
    fn the_text_read_is_kept() {
        assert_eq!(
            from_name("deliveries_Oct2026").unwrap().unwrap().1,
            "Oct2026"
        );
        assert_eq!(
            from_name("ops 31.10.2026").unwrap().unwrap().1,
            "31.10.2026"
        );
    }

    #[test]
    fn months_without_a_year_sort_in_year_order() {
        let mut months = vec!["March", "January", "February"];
        months.sort_by_key(|m| order_key(m));
        assert_eq!(months, ["January", "February", "March"]);
    }
}
