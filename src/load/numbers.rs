//! Numbers written as text: `1,5` and `1.234,5` from a decimal-comma
//! export, `1,234.5` and `1 234,5` with thousands separators, `"250.0"` typed
//! into a text cell. The style (which mark is the decimal, which groups
//! thousands) is detected once per file from the text itself, can be fixed
//! by the recipe's `input` line, and is then applied to every cell, so a
//! cell never reads one way in one row and another way in the next.

/// How numbers are written in a file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct NumberStyle {
    /// The decimal mark: `.` or `,`.
    pub decimal: char,
    /// The mark that groups thousands, if any: `,` `.` a space or `'`.
    pub thousands: Option<char>,
}

impl Default for NumberStyle {
    fn default() -> Self {
        NumberStyle::POINT
    }
}

/// Spaces that exports use to group thousands: plain, no-break, narrow no-break.
const GROUPING_SPACES: [char; 3] = [' ', '\u{a0}', '\u{202f}'];

impl NumberStyle {
    /// `1234.5`, no grouping.
    pub const POINT: NumberStyle = NumberStyle {
        decimal: '.',
        thousands: None,
    };
    /// `1234,5`, no grouping.
    pub const COMMA: NumberStyle = NumberStyle {
        decimal: ',',
        thousands: None,
    };

    /// The style in words, for the terminal and the About sheet.
    pub fn describe(&self) -> String {
        let decimal = if self.decimal == ',' {
            "decimal comma"
        } else {
            "decimal point"
        };
        match self.thousands {
            None => decimal.to_string(),
            Some(c) => format!("{decimal}, thousands grouped by {}", mark_name(c)),
        }
    }

    /// Reads `text` as a number in this style: an optional sign, digits
    /// with the decimal mark and thousands marks (only between groups of
    /// three digits), an optional exponent. Spaces around are ignored.
    /// None when the text is anything else (units, words, two numbers).
    pub fn parse(&self, text: &str) -> Option<f64> {
        let text = text.trim_matches(|c: char| c.is_whitespace());
        if text.is_empty() {
            return None;
        }
        let mut plain = String::with_capacity(text.len());
        let (mantissa, exponent) = split_exponent(text);
        let (sign, digits) = match mantissa.as_bytes().first() {
            Some(b'-') => ("-", &mantissa[1..]),
            Some(b'+') => ("", &mantissa[1..]),
            _ => ("", mantissa),
        };
        plain.push_str(sign);
        let (whole, fraction) = match digits.find(self.decimal) {
            Some(at) => (&digits[..at], Some(&digits[at + self.decimal.len_utf8()..])),
            None => (digits, None),
        };
        if !self.whole_part(whole, &mut plain) {
            return None;
        }
        if let Some(fraction) = fraction {
            if !fraction.bytes().all(|b| b.is_ascii_digit())
                || (whole.is_empty() && fraction.is_empty())
            {
                return None;
            }
            plain.push('.');
            plain.push_str(fraction);
        }
        if let Some(exponent) = exponent {
            plain.push('e');
            plain.push_str(exponent);
        }
        plain.parse::<f64>().ok().filter(|x| x.is_finite())
    }

    /// The digits before the decimal mark, thousands marks removed where
    /// they group threes; false when the text is not such a part.
    fn whole_part(&self, whole: &str, out: &mut String) -> bool {
        let is_mark = |c: char| match self.thousands {
            Some(t) if GROUPING_SPACES.contains(&t) => GROUPING_SPACES.contains(&c),
            Some(t) => c == t,
            None => false,
        };
        let groups: Vec<&str> = whole.split(is_mark).collect();
        if groups
            .iter()
            .any(|g| !g.bytes().all(|b| b.is_ascii_digit()))
        {
            return false;
        }
        if groups.len() > 1
            && (groups[0].is_empty()
                || groups[0].len() > 3
                || groups[1..].iter().any(|g| g.len() != 3))
        {
            return false;
        }
        groups.iter().for_each(|g| out.push_str(g));
        true
    }
}

fn mark_name(c: char) -> &'static str {
    match c {
        ',' => "commas",
        '.' => "points",
        '\'' => "apostrophes",
        _ => "spaces",
    }
}

/// `1.5e-3` as (`1.5`, `-3`); the exponent only when it is one.
fn split_exponent(text: &str) -> (&str, Option<&str>) {
    if let Some(at) = text.find(['e', 'E']) {
        let exponent = &text[at + 1..];
        let digits = exponent.strip_prefix(['-', '+']).unwrap_or(exponent);
        if !digits.is_empty() && digits.bytes().all(|b| b.is_ascii_digit()) {
            return (&text[..at], Some(exponent));
        }
    }
    (text, None)
}

/// What one text says about the style of its file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Clue {
    /// Not a number in any style (a word, a date, units).
    None,
    /// A number that reads the same in every style (`12`, `-3`).
    Neutral,
    /// Only reads with this decimal mark (and thousands mark, if any).
    Style(NumberStyle),
    /// `1,234` or `1.234`: a decimal or a thousands mark, the text cannot tell.
    Ambiguous(char),
}

/// The clue one text gives: `1.234,5` says decimal comma and thousands points.
fn clue(text: &str) -> Clue {
    let t = text.trim();
    if !t.starts_with(|c: char| c.is_ascii_digit() || c == '-' || c == '+' || c == '.' || c == ',')
        || !t.ends_with(|c: char| c.is_ascii_digit())
    {
        return Clue::None;
    }
    if NumberStyle::POINT.parse(t).is_some() && !t.contains(['.', ',']) {
        return Clue::Neutral;
    }
    let marks: Vec<char> = t
        .chars()
        .filter(|c| matches!(c, '.' | ',' | '\'') || GROUPING_SPACES.contains(c))
        .collect();
    let Some(&last) = marks.last() else {
        return Clue::None;
    };
    let spaced = marks.iter().any(|c| GROUPING_SPACES.contains(c));
    let distinct: Vec<char> = {
        let mut d = marks.clone();
        d.sort_unstable();
        d.dedup();
        d
    };
    // Two kinds of mark: the last one is the decimal, the other groups.
    if distinct.len() == 2 || (spaced && matches!(last, '.' | ',')) {
        let thousands = marks.iter().copied().find(|&c| c != last);
        let style = NumberStyle {
            decimal: last,
            thousands,
        };
        return match (matches!(last, '.' | ','), style.parse(t)) {
            (true, Some(_)) => Clue::Style(style),
            _ => Clue::None,
        };
    }
    if distinct.len() != 1 {
        return Clue::None;
    }
    if !matches!(last, '.' | ',') {
        // Only spaces or apostrophes: a grouped whole number.
        let style = NumberStyle {
            decimal: '.',
            thousands: Some(last),
        };
        return if style.parse(t).is_some() {
            Clue::Neutral
        } else {
            Clue::None
        };
    }
    let as_decimal = NumberStyle {
        decimal: last,
        thousands: None,
    };
    let as_grouping = NumberStyle {
        decimal: if last == '.' { ',' } else { '.' },
        thousands: Some(last),
    };
    let unsigned = t.trim_start_matches(['-', '+']);
    match (as_decimal.parse(t), as_grouping.parse(t)) {
        // `0,125` or `0.125`: a leading zero is never grouped.
        (Some(_), Some(_)) if unsigned.starts_with('0') => Clue::Style(as_decimal),
        (Some(_), Some(_)) => Clue::Ambiguous(last),
        (Some(_), None) => Clue::Style(as_decimal),
        (None, Some(_)) => Clue::Style(as_grouping),
        (None, None) => Clue::None,
    }
}

/// What the recipe's `input` line fixes of the style; the rest is detected.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct StyleSetting {
    /// `decimal comma` or `decimal point`.
    pub decimal: Option<char>,
    /// `thousands "."`, or `thousands none` (Some(None)).
    pub thousands: Option<Option<char>>,
}

impl StyleSetting {
    /// Whether the recipe fixes either mark.
    pub fn is_set(&self) -> bool {
        self.decimal.is_some() || self.thousands.is_some()
    }
}

/// What was seen of a file's numbers, to decide its style.
#[derive(Debug, Default, Clone)]
pub struct StyleEvidence {
    point: usize,
    comma: usize,
    thousands: Vec<(char, char, usize)>,
    ambiguous_point: usize,
    ambiguous_comma: usize,
}

/// The decided style and how sure the reading is.
#[derive(Debug, Clone, PartialEq)]
pub struct DetectedStyle {
    /// The style the file's numbers are read in.
    pub style: NumberStyle,
    /// Set when the file's texts could be read two ways, with what to write
    /// in the recipe if sheaf's choice is wrong.
    pub doubt: Option<String>,
}

impl StyleEvidence {
    /// Takes one text of the file into account.
    pub fn see(&mut self, text: &str) {
        match clue(text) {
            Clue::None | Clue::Neutral => {}
            Clue::Style(style) => {
                if style.decimal == ',' {
                    self.comma += 1;
                } else {
                    self.point += 1;
                }
                if let Some(t) = style.thousands {
                    match self
                        .thousands
                        .iter_mut()
                        .find(|(d, m, _)| *d == style.decimal && *m == t)
                    {
                        Some(entry) => entry.2 += 1,
                        None => self.thousands.push((style.decimal, t, 1)),
                    }
                }
            }
            Clue::Ambiguous('.') => self.ambiguous_point += 1,
            Clue::Ambiguous(_) => self.ambiguous_comma += 1,
        }
    }

    /// Whether anything but plain whole numbers was seen.
    pub fn is_empty(&self) -> bool {
        self.point + self.comma + self.ambiguous_point + self.ambiguous_comma == 0
    }

    /// The style the file's texts point to. Clear evidence wins by majority;
    /// `1,234`-like texts alone are read with the mark as thousands grouping
    /// (and that doubt is reported), since groups of exactly three digits
    /// after every mark are what grouping produces.
    pub fn decide(&self, setting: &StyleSetting) -> DetectedStyle {
        let decimal = if let Some(d) = setting.decimal {
            d
        } else if self.comma > self.point {
            ','
        } else if self.point > self.comma {
            '.'
        } else if self.ambiguous_comma > 0 && self.ambiguous_point == 0 {
            // Only `1,234`: grouping commas, decimal point.
            '.'
        } else if self.ambiguous_point > 0 && self.ambiguous_comma == 0 {
            ','
        } else {
            '.'
        };
        let detected_thousands = self
            .thousands
            .iter()
            .filter(|(d, _, _)| *d == decimal)
            .max_by_key(|(_, _, n)| *n)
            .map(|(_, t, _)| *t)
            .or_else(|| {
                let other = if decimal == '.' { ',' } else { '.' };
                let ambiguous = if other == ',' {
                    self.ambiguous_comma
                } else {
                    self.ambiguous_point
                };
                (ambiguous > 0).then_some(other)
            });
        let thousands = setting.thousands.unwrap_or(detected_thousands);
        let style = NumberStyle { decimal, thousands };
        let clear = self.comma.max(self.point);
        let ambiguous = self.ambiguous_comma + self.ambiguous_point;
        let doubt = (clear == 0 && ambiguous > 0 && setting.decimal.is_none()).then(|| {
            let other = if decimal == '.' { "comma" } else { "point" };
            format!(
                "every number with a separator looks like `1{}234`, which could be a decimal or a thousands mark; sheaf read it as {} (if the mark is a decimal, add `decimal {other}` to the recipe's `input` line)",
                thousands.unwrap_or(','),
                style.describe()
            )
        });
        DetectedStyle { style, doubt }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn detect(texts: &[&str]) -> DetectedStyle {
        let mut evidence = StyleEvidence::default();
        texts.iter().for_each(|t| evidence.see(t));
        evidence.decide(&StyleSetting::default())
    }

    #[test]
    fn each_common_style_is_detected_and_read() {
        let german = detect(&["1.234,5", "12,25", "3"]);
        assert_eq!(
            german.style,
            NumberStyle {
                decimal: ',',
                thousands: Some('.')
            }
        );
        assert_eq!(german.style.parse("1.234,5"), Some(1234.5));
        assert_eq!(german.style.parse("-0,75"), Some(-0.75));
        let english = detect(&["1,234.5", "7.25"]);
        assert_eq!(
            english.style,
            NumberStyle {
                decimal: '.',
                thousands: Some(',')
            }
        );
        assert_eq!(english.style.parse("1,234,567.5"), Some(1_234_567.5));
        let french = detect(&["1 234,5", "2,5"]);
        assert_eq!(
            french.style,
            NumberStyle {
                decimal: ',',
                thousands: Some(' ')
            }
        );
        assert_eq!(french.style.parse("1\u{a0}234,5"), Some(1234.5));
        let swiss = detect(&["1'234.5"]);
        assert_eq!(swiss.style.parse("1'234.5"), Some(1234.5));
        let comma_only = detect(&["1,5", "2,75", "10"]);
        assert_eq!(comma_only.style, NumberStyle::COMMA);
        assert_eq!(comma_only.doubt, None);
    }

    #[test]
    fn grouping_marks_only_between_threes() {
        let style = NumberStyle {
            decimal: ',',
            thousands: Some('.'),
        };
        assert_eq!(style.parse("1.23,5"), None);
        assert_eq!(style.parse(".234,5"), None);
        assert_eq!(style.parse("1234,5"), Some(1234.5));
        assert_eq!(NumberStyle::POINT.parse("1,5"), None);
        assert_eq!(NumberStyle::POINT.parse("12 kg"), None);
        assert_eq!(NumberStyle::POINT.parse("1.5e-3"), Some(0.0015));
        assert_eq!(NumberStyle::POINT.parse(" 250.0 "), Some(250.0));
        assert_eq!(NumberStyle::POINT.parse("inf"), None);
        assert_eq!(NumberStyle::POINT.parse("-"), None);
        assert_eq!(NumberStyle::POINT.parse("."), None);
        assert_eq!(NumberStyle::COMMA.parse(",5"), Some(0.5));
    }

    #[test]
    fn ambiguous_grouping_is_read_as_thousands_and_said() {
        let d = detect(&["1,234", "12,500", "7"]);
        assert_eq!(
            d.style,
            NumberStyle {
                decimal: '.',
                thousands: Some(',')
            }
        );
        assert!(
            d.doubt.as_deref().unwrap().contains("decimal comma"),
            "{d:?}"
        );
        // A clear decimal elsewhere settles it.
        let d = detect(&["1,234", "0,5"]);
        assert_eq!(d.style.decimal, ',');
        assert_eq!(d.doubt, None);
        // A leading zero is never grouping.
        assert_eq!(detect(&["0,125"]).style, NumberStyle::COMMA);
    }

    #[test]
    fn the_recipe_setting_wins() {
        let mut evidence = StyleEvidence::default();
        ["1,234", "2,5"].iter().for_each(|t| evidence.see(t));
        let fixed = StyleSetting {
            decimal: Some('.'),
            thousands: Some(Some(',')),
        };
        let d = evidence.decide(&fixed);
        assert_eq!(
            d.style,
            NumberStyle {
                decimal: '.',
                thousands: Some(',')
            }
        );
        assert_eq!(d.style.parse("2,5"), None);
    }

    #[test]
    fn words_and_dates_give_no_clue() {
        let d = detect(&["North", "2026-10-01", "12 kg", "v1.2.3"]);
        assert_eq!(d.style, NumberStyle::POINT);
        assert_eq!(d.doubt, None);
    }
}
