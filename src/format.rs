//! Numbers and dates as text, for the terminal, JSON keys and group labels.

/// The shortest text that reads back as exactly the same number:
/// `3`, `0.1`, `1e-7`, `-2.5`.
pub fn shortest(x: f64) -> String {
    if x == 0.0 {
        return "0".to_string();
    }
    let plain = format!("{x}");
    let scientific = format!("{x:e}");
    if scientific.len() < plain.len() {
        scientific
    } else {
        plain
    }
}

/// A number rounded to `digits` significant digits, for labels.
pub fn rounded(x: f64, digits: i32) -> String {
    if x == 0.0 || !x.is_finite() {
        return shortest(x);
    }
    let magnitude = x.abs().log10().floor() as i32;
    let scale = 10f64.powi(digits - 1 - magnitude);
    shortest((x * scale).round() / scale)
}

/// A spreadsheet date serial (days since 1899-12-30) as `YYYY-MM-DD`,
/// with `hh:mm:ss` when it has a time of day.
pub fn date(serial: f64) -> String {
    // Rounded to the second first, so that 0.9999999 of a day is the next
    // midnight rather than 24:00:00 (a mean of dates can land there).
    let total = (serial * 86400.0).round() as i64;
    let (days, seconds) = (day_number(serial), total.rem_euclid(86400));
    let (y, m, d) = civil_from_days(days - 25569); // 25569 = 1970-01-01
    if seconds == 0 {
        format!("{y:04}-{m:02}-{d:02}")
    } else {
        format!(
            "{y:04}-{m:02}-{d:02} {:02}:{:02}:{:02}",
            seconds / 3600,
            seconds / 60 % 60,
            seconds % 60
        )
    }
}

/// The serial's day (a whole serial), its time rounded to the second first,
/// so that the date shown and its month, week and weekday agree.
fn day_number(serial: f64) -> i64 {
    ((serial * 86400.0).round() as i64).div_euclid(86400)
}

/// Whether a serial has a time of day, to the second.
pub fn has_time(serial: f64) -> bool {
    (serial * 86400.0).round().rem_euclid(86400.0) != 0.0
}

/// An ISO 8601 date or date-time (`2026-10-01`, `2026-10-01T08:30:00`) as a
/// spreadsheet serial; None when it is not one.
pub fn serial_from_iso(text: &str) -> Option<f64> {
    let (date, time) = text.split_once('T').unwrap_or((text, ""));
    let mut parts = date.splitn(3, '-');
    let (y, m, d): (i64, u32, u32) = (
        parts.next()?.parse().ok()?,
        parts.next()?.parse().ok()?,
        parts.next()?.parse().ok()?,
    );
    if !(1..=12).contains(&m) || !(1..=31).contains(&d) {
        return None;
    }
    let mut seconds = 0.0;
    if !time.is_empty() {
        let mut t = time.trim_end_matches('Z').splitn(3, ':');
        let (h, mi): (f64, f64) = (t.next()?.parse().ok()?, t.next()?.parse().ok()?);
        let sec: f64 = t.next().map_or(Some(0.0), |s| s.parse().ok())?;
        seconds = h * 3600.0 + mi * 60.0 + sec;
    }
    Some((days_from_civil(y, m, d) + 25569) as f64 + seconds / 86400.0)
}

/// A calendar date `YYYY-MM-DD` as a spreadsheet serial, refusing dates
/// that do not exist (`2026-02-30`, month 13) with the reason.
pub fn serial_from_calendar(text: &str) -> Result<f64, String> {
    let wrong = || format!("`{text}` is not a date written YYYY-MM-DD");
    let parts: Vec<&str> = text.split('-').collect();
    let [y, m, d] = parts.as_slice() else {
        return Err(wrong());
    };
    if y.len() != 4 || m.len() != 2 || d.len() != 2 {
        return Err(wrong());
    }
    let number = |s: &str| {
        s.parse::<u32>()
            .ok()
            .filter(|_| s.bytes().all(|b| b.is_ascii_digit()))
    };
    let (Some(y), Some(m), Some(d)) = (number(y), number(m), number(d)) else {
        return Err(wrong());
    };
    if !(1..=12).contains(&m) {
        return Err(format!("`{text}`: there is no month {m}"));
    }
    let last = days_in_month(i64::from(y), m);
    if d == 0 || d > last {
        return Err(format!(
            "`{text}`: {} {y} has days 1 to {last}",
            MONTH_NAMES[m as usize - 1]
        ));
    }
    Ok((days_from_civil(i64::from(y), m, d) + 25569) as f64)
}

/// English month names, January first.
pub const MONTH_NAMES: [&str; 12] = [
    "January",
    "February",
    "March",
    "April",
    "May",
    "June",
    "July",
    "August",
    "September",
    "October",
    "November",
    "December",
];

/// Weekday names, Monday first (ISO 8601 numbers them 1 to 7 from Monday).
const WEEKDAY_NAMES: [&str; 7] = [
    "Monday",
    "Tuesday",
    "Wednesday",
    "Thursday",
    "Friday",
    "Saturday",
    "Sunday",
];

fn is_leap(y: i64) -> bool {
    (y % 4 == 0 && y % 100 != 0) || y % 400 == 0
}

/// Days in month `m` (1 to 12) of year `y`, Gregorian.
pub fn days_in_month(y: i64, m: u32) -> u32 {
    match m {
        2 if is_leap(y) => 29,
        2 => 28,
        4 | 6 | 9 | 11 => 30,
        _ => 31,
    }
}

/// The calendar date (year, month, day) of a serial's day.
pub fn calendar(serial: f64) -> (i64, u32, u32) {
    civil_from_days(day_number(serial) - 25569)
}

/// The ISO 8601 weekday of a serial's day: 0 for Monday to 6 for Sunday.
fn weekday_index(serial: f64) -> usize {
    // 1970-01-01 (day 0) was a Thursday, index 3.
    (day_number(serial) - 25569 + 3).rem_euclid(7) as usize
}

/// The English name of a serial's weekday.
pub fn weekday_name(serial: f64) -> &'static str {
    WEEKDAY_NAMES[weekday_index(serial)]
}

/// `2026-10`: the year and month of a serial's day.
pub fn month_label(serial: f64) -> String {
    let (y, m, _) = calendar(serial);
    format!("{y:04}-{m:02}")
}

/// `2026-W44`: the ISO 8601 week of a serial's day. A week belongs to the
/// year that holds its Thursday, so early January may be in the previous
/// year's last week and late December in the next year's week 1.
pub fn week_label(serial: f64) -> String {
    let day = day_number(serial) as f64;
    let thursday = day - weekday_index(day) as f64 + 3.0;
    let (year, _, _) = calendar(thursday);
    let january_first = (days_from_civil(year, 1, 1) + 25569) as f64;
    let week = ((thursday - january_first) / 7.0).floor() as i64 + 1;
    format!("{year:04}-W{week:02}")
}

/// A proleptic Gregorian date to days since 1970-01-01 (Hinnant's algorithm).
fn days_from_civil(y: i64, m: u32, d: u32) -> i64 {
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y.rem_euclid(400);
    let mp = i64::from((m + 9) % 12);
    let doy = (153 * mp + 2) / 5 + i64::from(d) - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    era * 146_097 + doe - 719_468
}

/// Days since 1970-01-01 to a proleptic Gregorian date (Hinnant's algorithm).
fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let y = yoe + era * 400;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    (if m <= 2 { y + 1 } else { y }, m, d)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shortest_round_trips() {
        for x in [
            3.0,
            0.1,
            1e-7,
            -2.5,
            123456789.125,
            1e300,
            f64::MIN_POSITIVE,
            0.30000000000000004,
        ] {
            assert_eq!(shortest(x).parse::<f64>().unwrap(), x);
        }
        assert_eq!(shortest(3.0), "3");
        assert_eq!(shortest(1e-7), "1e-7");
        assert_eq!(shortest(0.25), "0.25");
    }

    #[test]
    fn dates_from_serials() {
        // Serial 45931 is 2025-10-01 (day counts checked by hand from 1970-01-01 = 25569).
        assert_eq!(date(25569.0), "1970-01-01");
        assert_eq!(date(45931.0), "2025-10-01");
        assert_eq!(date(45931.5), "2025-10-01 12:00:00");
        assert_eq!(date(60.0), "1900-02-28");
        assert_eq!(date(45931.0 - 1e-9), "2025-10-01");
        assert_eq!(date(45931.0 + 1.0 / 3.0), "2025-10-01 08:00:00");
        assert!(has_time(45931.25) && !has_time(45931.0 - 1e-9));
        assert_eq!(month_label(45931.0 - 1e-9), "2025-10");
        assert_eq!(serial_from_iso("2025-10-01"), Some(45931.0));
        assert_eq!(serial_from_iso("2025-10-01T12:00:00"), Some(45931.5));
        assert_eq!(serial_from_iso("1970-01-01"), Some(25569.0));
        assert_eq!(serial_from_iso("not a date"), None);
    }

    #[test]
    fn calendar_dates_are_checked() {
        // Serials from Python's datetime (date - 1899-12-30).days, run by hand.
        assert_eq!(serial_from_calendar("2026-01-01"), Ok(46023.0));
        assert_eq!(serial_from_calendar("2000-02-29"), Ok(36585.0));
        let refused = |t: &str| serial_from_calendar(t).unwrap_err();
        assert!(refused("2026-02-30").contains("February 2026 has days 1 to 28"));
        assert!(refused("2026-02-29").contains("days 1 to 28"));
        assert!(
            refused("1900-02-29").contains("days 1 to 28"),
            "1900 is no leap year"
        );
        assert!(refused("2026-13-01").contains("no month 13"));
        assert!(refused("2026-4-01").contains("YYYY-MM-DD"));
        assert!(refused("26-10-01").contains("YYYY-MM-DD"));
        assert!(refused("2026-10-01T08:00").contains("YYYY-MM-DD"));
    }

    #[test]
    fn iso_weeks_months_and_weekdays() {
        // Calendar facts: 2026-01-01 is a Thursday, so ISO week 2026-W01
        // (ISO 8601: week 1 holds the year's first Thursday); 2021-01-01, a
        // Friday, is in 2020-W53; 2024-12-30, a Monday, is in 2025-W01;
        // 2026-12-31 (Thursday) is in 2026-W53 and 2027-01-03 (Sunday) too.
        // Cross-checked with Python's date.isocalendar().
        let on = |t: &str| serial_from_calendar(t).unwrap();
        assert_eq!(week_label(on("2026-01-01")), "2026-W01");
        assert_eq!(weekday_name(on("2026-01-01")), "Thursday");
        assert_eq!(week_label(on("2021-01-01")), "2020-W53");
        assert_eq!(weekday_name(on("2021-01-01")), "Friday");
        assert_eq!(week_label(on("2024-12-30")), "2025-W01");
        assert_eq!(weekday_name(on("2024-12-30")), "Monday");
        assert_eq!(week_label(on("2026-10-31")), "2026-W44");
        assert_eq!(weekday_name(on("2026-10-31")), "Saturday");
        assert_eq!(week_label(on("2026-12-31")), "2026-W53");
        assert_eq!(week_label(on("2027-01-03")), "2026-W53");
        assert_eq!(weekday_name(on("2027-01-03")), "Sunday");
        // A time of day does not move the day.
        assert_eq!(week_label(on("2024-12-30") + 0.99), "2025-W01");
        assert_eq!(month_label(on("2026-10-31") + 0.5), "2026-10");
        assert_eq!(calendar(on("2000-02-29")), (2000, 2, 29));
    }
}

/// Seconds since 1970 as `YYYY-MM-DD hh:mm:ss UTC`.
pub fn timestamp(seconds: u64) -> String {
    let days = (seconds / 86_400) as i64;
    let (y, m, d) = civil_from_days(days);
    let s = seconds % 86_400;
    format!(
        "{y:04}-{m:02}-{d:02} {:02}:{:02}:{:02} UTC",
        s / 3600,
        s / 60 % 60,
        s % 60
    )
}

#[cfg(test)]
mod timestamp_tests {
    #[test]
    fn epoch_and_a_known_day() {
        assert_eq!(super::timestamp(0), "1970-01-01 00:00:00 UTC");
        assert_eq!(
            super::timestamp(86_400 * 365 + 3_661),
            "1971-01-01 01:01:01 UTC"
        );
    }
}
