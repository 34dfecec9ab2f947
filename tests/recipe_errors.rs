//! Malformed recipes: each must be refused with the expected message at the
//! expected line and column (1-based, in characters).

use sheaf::recipe;

const HEADERS: &[&str] = &["Minutes late", "weight_kg", "status", "depot", "region"];

/// (recipe, check with the headers?, part of the message, line, column)
const CASES: &[(&str, bool, &str, usize, usize)] = &[
    // Statements and layout.
    (
        "chek \"c\" warn: 1 < 2\n",
        false,
        "unknown statement `chek`",
        1,
        1,
    ),
    ("= mean(weight_kg)\n", false, "expected a statement", 1, 1),
    // Labels: a known column, once, with some text in double quotes.
    ("label weight \"Weight (kg)\"\n", true, "weight", 1, 7),
    (
        "label weight_kg \"kg\"\nlabel weight_kg \"Weight\"\n",
        false,
        "a second label for `weight_kg`",
        2,
        7,
    ),
    (
        "label weight_kg \" \"\n",
        false,
        "a label cannot be empty",
        1,
        17,
    ),
    (
        "label weight_kg kg\n",
        false,
        "expected the label in double quotes",
        1,
        17,
    ),
    (
        "title Depot\n",
        false,
        "expected the title in double quotes",
        1,
        7,
    ),
    (
        "title \"Depot\" \"again\"\n",
        false,
        "unexpected `\"`",
        1,
        15,
    ),
    ("title \"Depot\n", false, "this string is not closed", 1, 7),
    (
        "title \"a\"\ntitle \"b\"\n",
        false,
        "a second `title`",
        2,
        1,
    ),
    (
        "  let x = 1\n",
        false,
        "indented but no block is open",
        1,
        3,
    ),
    (
        "let x = 1\n    y = 2\n",
        false,
        "indented but no block is open",
        2,
        5,
    ),
    ("figures \"F\" per depot:\n", false, "has no figures", 1, 1),
    (
        "panel \"P\" of weight_kg:\n    n = count(weight_kg)\n",
        false,
        "a panel takes no lines",
        2,
        5,
    ),
    (
        "let x = 1\n\tlet y = 2\n",
        false,
        "a tab in the indentation",
        2,
        1,
    ),
    // input
    (
        "input sheet Deliveries\n",
        false,
        "expected the sheet name in double quotes",
        1,
        13,
    ),
    ("input header row 0\n", false, "counted from 1", 1, 18),
    (
        "input header 1\n",
        false,
        "expected `row` after `header`",
        1,
        14,
    ),
    (
        "input page \"x\"\n",
        false,
        "unknown input setting `page`",
        1,
        7,
    ),
    // let
    (
        "let = 3\n",
        false,
        "expected the name of the new column",
        1,
        5,
    ),
    ("let x 3\n", false, "expected `=` after the name", 1, 7),
    ("let x == 3\n", false, "expected `=` after the name", 1, 7),
    ("let per = 3\n", false, "`per` is a keyword", 1, 5),
    ("let x = x + 1\n", false, "`let x` refers to itself", 1, 9),
    (
        "let x = 1\nlet x = 2\n",
        false,
        "`x` is defined twice",
        2,
        5,
    ),
    (
        "let weight_kg = 2\n",
        true,
        "already a column of the data",
        1,
        5,
    ),
    // Expressions.
    (
        "let x = weight_kg * 2 +\n",
        false,
        "expected a value after `+`",
        1,
        24,
    ),
    (
        "let x = (weight_kg * 2\n",
        false,
        "expected `)` to close the `(`",
        1,
        23,
    ),
    (
        "let x = weight_kg weight_kg\n",
        false,
        "unexpected `weight_kg`",
        1,
        19,
    ),
    (
        "let x = weight_kg = 3\n",
        false,
        "a single `=` does not compare",
        1,
        19,
    ),
    (
        "let x = weight_kg <> 3\n",
        false,
        "`<>` is not an operator",
        1,
        19,
    ),
    (
        "let x = 1 < weight_kg < 3\n",
        false,
        "comparisons do not chain",
        1,
        23,
    ),
    (
        "let x = if weight_kg > 3 then 1\n",
        false,
        "every `if` needs an `else`",
        1,
        32,
    ),
    (
        "let x = if weight_kg > 3 1 else 2\n",
        false,
        "expected `then`",
        1,
        26,
    ),
    (
        "let x = 12abc\n",
        false,
        "a number runs into other characters",
        1,
        11,
    ),
    (
        "let x = {Minutes late\n",
        false,
        "column name in braces is not closed",
        1,
        9,
    ),
    ("let x = {} * 2\n", false, "empty column name", 1, 9),
    (
        "let x = weight_kg and 3\n",
        false,
        "`and` needs a condition here, not a number",
        1,
        23,
    ),
    (
        "let x = status * 2\nlet y = \"a\" * 2\n",
        false,
        "`*` needs a number here, not a text",
        2,
        9,
    ),
    (
        "let x = if weight_kg > 1 then 1 else \"a\"\n",
        false,
        "different kinds of value",
        1,
        9,
    ),
    ("let x = = 3\n", false, "does not start with `=`", 1, 9),
    ("let x = \"a\\q\"\n", false, "unknown escape", 1, 11),
    (
        "let x = mean(weight_kg A1:B3)\n",
        false,
        "expected `,` or `)`",
        1,
        24,
    ),
    ("let x = mean(A1:B3)\n", false, "not cell ranges", 1, 16),
    ("let x = then + 1\n", false, "`then` is a keyword", 1, 9),
    // Functions.
    (
        "let x = meen(weight_kg)\n",
        false,
        "unknown function `meen`",
        1,
        9,
    ),
    (
        "let x = percentile(weight_kg)\n",
        false,
        "`percentile` takes 2 to 3 arguments, got 1",
        1,
        9,
    ),
    (
        "let x = mean(weight_kg, 2)\n",
        false,
        "`mean` takes 1 argument, got 2",
        1,
        9,
    ),
    (
        "let x = variance(weight_kg, populaton)\n",
        false,
        "unknown option `populaton` for `variance`",
        1,
        29,
    ),
    (
        "let x = percentile(weight_kg, 150)\n",
        false,
        "the `p` of `percentile` must be from 0 to 100",
        1,
        31,
    ),
    (
        "let x = percentile(weight_kg, 90%)\n",
        false,
        "without `%`",
        1,
        31,
    ),
    (
        "let x = trimmed_mean(weight_kg, 60%)\n",
        false,
        "below 50%",
        1,
        33,
    ),
    (
        "let x = quartile(weight_kg, 1.5)\n",
        false,
        "a whole number from 1 to 3",
        1,
        29,
    ),
    (
        "let x = quartile(weight_kg, 4)\n",
        false,
        "write min(x) or max(x)",
        1,
        29,
    ),
    (
        "let x = percentile(weight_kg, 30, hinges)\n",
        false,
        "Tukey's hinges give only the quartiles, not the 30th percentile",
        1,
        31,
    ),
    (
        "rows where status != 'cancelled'\n",
        false,
        "strings are written in double quotes",
        1,
        22,
    ),
    (
        "rows where status != 'cancelled'\n",
        false,
        "write \"cancelled\"",
        1,
        22,
    ),
    (
        "let w = Weight (mg)\n",
        false,
        "if `Weight (mg)` is a column, write it in braces, {Weight (mg)}",
        1,
        9,
    ),
    (
        "drift 5\n",
        false,
        "`drift 5` would flag only changes of 500% or more",
        1,
        7,
    ),
    ("drift 5\n", false, "write `drift 5%`", 1, 7),
    ("drift 0\n", false, "must be above 0", 1, 7),
    (
        "noise 0.5 se\n",
        false,
        "outside 1..10 standard errors",
        1,
        7,
    ),
    (
        "noise 12 se\n",
        false,
        "outside 1..10 standard errors",
        1,
        7,
    ),
    ("noise 5%\n", false, "not a percentage", 1, 7),
    ("noise 2\n", false, "expected `se` (standard errors)", 1, 8),
    ("noise 2 se\nnoise 3 se\n", false, "a second `noise`", 2, 1),
    (
        "period from\n",
        false,
        "expected the column that holds",
        1,
        12,
    ),
    (
        "period \"2026-10\"\nperiod from shipped\n",
        false,
        "a second `period`",
        2,
        1,
    ),
    (
        "let d = shipped\nperiod from d\n",
        false,
        "but `d` is a `let`",
        2,
        13,
    ),
    (
        "let x = binned_mode(weight_kg, 0)\n",
        false,
        "a whole number from 1 to 1000",
        1,
        32,
    ),
    (
        "let x = percentile(weight_kg, weight_kg)\n",
        false,
        "must be one number",
        1,
        31,
    ),
    // A `let` is a column even when its expression is one value: the
    // evaluator spreads it over the rows, so it is no parameter.
    (
        "let q = 3\nlet x = quartile(weight_kg, q)\n",
        false,
        "must be one number",
        2,
        29,
    ),
    (
        "let x = mean(mean(weight_kg))\n",
        false,
        "its argument is already one value",
        1,
        14,
    ),
    (
        "let x = mean(3)\n",
        false,
        "its argument is already one value",
        1,
        14,
    ),
    (
        "let x = share(3 * weight_kg)\n",
        false,
        "`share` needs a condition here, not a number",
        1,
        15,
    ),
    (
        "let x = modes(weight_kg) + 1\n",
        false,
        "a list of values",
        1,
        9,
    ),
    (
        "let x = sd(weight_kg, hinges)\n",
        false,
        "unknown option `hinges` for `sd`",
        1,
        23,
    ),
    (
        "let x = quartile(weight_kg, hinges, 1)\n",
        false,
        "the option word comes last",
        1,
        37,
    ),
    (
        "let x = abs(weight_kg, scaled)\n",
        false,
        "`abs` takes 1 argument, got 2",
        1,
        9,
    ),
    // Blocks, checks, charts.
    (
        "figures \"F\":\n    m = weight_kg * 2\n",
        false,
        "a figure must be one value per group",
        2,
        9,
    ),
    (
        "figures \"F\":\n    m = mean(weight_kg)\n    m = sd(weight_kg)\n",
        false,
        "a second figure named `m`",
        3,
        5,
    ),
    (
        "figures \"F\":\n    m = mean(weight_kg)\nfigures \"F\":\n    s = sd(weight_kg)\n",
        false,
        "a second block named \"F\"",
        3,
        9,
    ),
    (
        "figures \"A/B\":\n    m = mean(weight_kg)\n",
        false,
        "cannot contain `/`",
        1,
        9,
    ),
    (
        "figures \"This block name is far too long for a sheet\":\n    m = mean(weight_kg)\n",
        false,
        "at most 31 characters",
        1,
        9,
    ),
    (
        "figures \"F\" per depot\n    m = mean(weight_kg)\n",
        false,
        "expected `per`, `where` or `:`",
        1,
        22,
    ),
    (
        "figures \"F\" where:\n    m = mean(weight_kg)\n",
        false,
        "expected a condition after `where`",
        1,
        18,
    ),
    (
        "figures \"F\":\n    mean(weight_kg)\n",
        false,
        "expected `=` after the figure's name",
        2,
        9,
    ),
    ("panel \"P\" weight_kg:\n", false, "expected `of`", 1, 11),
    (
        "panel \"P\" of weight_kg, :\n",
        false,
        "expected a column name after `,`",
        1,
        25,
    ),
    (
        "check \"c\" maybe: 1 < 2\n",
        false,
        "expected `warn` or `fail`",
        1,
        11,
    ),
    (
        "check \"c\" warn 1 < 2\n",
        false,
        "expected `per` or `:`",
        1,
        16,
    ),
    (
        "check \"c\" warn: weight_kg > 0\n",
        false,
        "one true/false value per group",
        1,
        17,
    ),
    (
        "check \"c\" warn: mean(weight_kg)\n",
        false,
        "a check needs a condition, not a number",
        1,
        17,
    ),
    (
        "check \"c\" warn: 1 < 2\ncheck \"c\" fail: 2 < 3\n",
        false,
        "a second check named \"c\"",
        2,
        7,
    ),
    (
        "histogram weight_kg, bins scot\n",
        false,
        "unknown bin rule `scot`",
        1,
        27,
    ),
    (
        "histogram weight_kg, bins 0\n",
        false,
        "a whole number from 1",
        1,
        27,
    ),
    (
        "histogram weight_kg, colour red\n",
        false,
        "expected `bins` after `,`",
        1,
        22,
    ),
    ("boxplot\n", false, "expected the column to draw", 1, 8),
    (
        "rows weight_kg > 3\n",
        false,
        "expected `where` after `rows`",
        1,
        6,
    ),
    (
        "rows where weight_kg * 2\n",
        false,
        "`rows where` needs a condition",
        1,
        12,
    ),
    // Columns, once the headers are known.
    (
        "let x = wieght_kg * 2\n",
        true,
        "no column named `wieght_kg`",
        1,
        9,
    ),
    (
        "let x = {Minutes lat} * 2\n",
        true,
        "no column named `Minutes lat`",
        1,
        9,
    ),
    (
        "panel \"P\" of weight_kg per depto:\n",
        true,
        "no column named `depto`",
        1,
        28,
    ),
    (
        "boxplot parcel_count\n",
        true,
        "no column named `parcel_count`",
        1,
        9,
    ),
];

/// None when `found` has a diagnostic whose message or help contains
/// `message` at `at` (line, column); else what was found instead.
fn missing_from(
    found: &[recipe::Diagnostic],
    source: &str,
    message: &str,
    at: (usize, usize),
) -> Option<String> {
    let hit = found.iter().find(|d| {
        d.message.contains(message) || d.help.as_deref().is_some_and(|h| h.contains(message))
    });
    match hit {
        Some(d) if d.line_column(source) == at => None,
        _ => Some(format!(
            "{source:?}: wanted {message:?} at {}:{}, got {:?}",
            at.0,
            at.1,
            found
                .iter()
                .map(|d| (d.message.clone(), d.line_column(source)))
                .collect::<Vec<_>>()
        )),
    }
}

#[test]
fn every_malformed_recipe_is_refused_where_and_how_expected() {
    assert!(CASES.len() >= 40);
    let headers: Vec<String> = HEADERS.iter().map(|s| s.to_string()).collect();
    let mut wrong = Vec::new();
    for (source, with_headers, message, line, column) in CASES {
        let parsed = recipe::parse_and_check(source, with_headers.then_some(&headers[..]));
        if let Some(problem) = missing_from(&parsed.diagnostics, source, message, (*line, *column))
        {
            wrong.push(problem);
        }
    }
    assert!(
        wrong.is_empty(),
        "{} of {} cases differ:\n{}",
        wrong.len(),
        CASES.len(),
        wrong.join("\n")
    );
}

/// Columns with their kinds, as a loaded table gives them.
fn typed_columns() -> Vec<recipe::DataColumn> {
    use recipe::DataKind::*;
    [
        ("Minutes late", Numbers),
        ("weight_kg", Numbers),
        ("status", Text),
        ("depot", Text),
        ("Weight (mg)", Numbers),
        ("flag", Any),
        ("shipped", Dates),
    ]
    .into_iter()
    .map(|(name, kind)| recipe::DataColumn {
        name: name.into(),
        kind,
    })
    .collect()
}

/// Mistakes seen only with the data's columns: text where numbers are
/// needed, a number where a condition is. (recipe, part of the message or
/// help, line, column)
const TYPED_CASES: &[(&str, &str, usize, usize)] = &[
    // Dates: compared with dates, summarised by order, never summed.
    (
        "rows where shipped > 45000\n",
        "`>` cannot combine a date with a number here",
        1,
        22,
    ),
    (
        "rows where shipped > 45000\n",
        "compare a date with a date, as in shipped >= date",
        1,
        22,
    ),
    (
        "let x = sum(shipped)\n",
        "`sum` has no meaning for dates",
        1,
        13,
    ),
    (
        "let x = skewness(shipped)\n",
        "range, sd and iqr are numbers of days",
        1,
        18,
    ),
    (
        "let m = month_of(weight_kg)\n",
        "`month_of` needs a date here, not a number",
        1,
        18,
    ),
    (
        "let d = shipped * 2\n",
        "`*` cannot combine a date with a number here",
        1,
        19,
    ),
    (
        "check \"c\" warn: max(shipped) <= 5\n",
        "`<=` cannot combine a date with a number here",
        1,
        33,
    ),
    (
        "rows where shipped >= date \"2026-02-30\"\n",
        "`2026-02-30`: February 2026 has days 1 to 28",
        1,
        28,
    ),
    (
        "rows where shipped >= date \"2026-02-30\"\n",
        "write a day that exists as date \"YYYY-MM-DD\"",
        1,
        28,
    ),
    (
        "let d = date \"1 Oct 2026\"\n",
        "`1 Oct 2026` is not a date written YYYY-MM-DD",
        1,
        14,
    ),
    (
        "let x = share(weight_kg)\n",
        "`share` needs a condition here, not a number",
        1,
        15,
    ),
    (
        "let x = share(weight_kg)\n",
        "write share(weight_kg > 0)",
        1,
        15,
    ),
    (
        "let x = mean(status)\n",
        "`mean` needs a number here, not a text",
        1,
        14,
    ),
    ("let x = count(depot)\n", "share(depot == \"...\")", 1, 15),
    (
        "panel \"P\" of weight_kg, status:\n",
        "a panel summarises numbers, but `status` holds text",
        1,
        25,
    ),
    ("panel \"P\" of status:\n", "write `per status`", 1, 14),
    (
        "histogram status per depot\n",
        "a histogram summarises numbers, but `status` holds text",
        1,
        11,
    ),
    (
        "boxplot depot\n",
        "a box plot summarises numbers, but `depot` holds text",
        1,
        9,
    ),
    (
        "rows where status > 3\n",
        "`>` needs a number here, not a text",
        1,
        12,
    ),
    (
        "let x = status * 2\n",
        "`*` needs a number here, not a text",
        1,
        9,
    ),
    (
        "let w = Weight (mg)\n",
        "`Weight (mg)` is a column: write it in braces, {Weight (mg)}",
        1,
        9,
    ),
];

#[test]
fn mistakes_seen_with_the_columns_kinds_are_refused() {
    let columns = typed_columns();
    let mut wrong = Vec::new();
    for (source, message, line, column) in TYPED_CASES {
        let parsed = recipe::parse_and_check_columns(source, Some(&columns));
        if let Some(problem) = missing_from(&parsed.diagnostics, source, message, (*line, *column))
        {
            wrong.push(problem);
        }
    }
    assert!(wrong.is_empty(), "{}", wrong.join("\n"));
    // Columns of unknown kind (true/false, empty) and text used as text are fine.
    for fine in [
        "let x = share(flag)\n",
        "let x = mean(flag)\n",
        "rows where status != \"cancelled\"\nfigures \"F\" per depot:\n    s = share(status == \"done\")\n",
        "panel \"P\" of weight_kg, {Weight (mg)} per status, depot:\n",
        "let wait = shipped - date \"2026-10-01\"\nlet later = shipped + 7\nlet month = month_of(shipped)\nrows where later > shipped and year_of(shipped) == 2026\nfigures \"F\" per month:\n    first = min(shipped)\n    w = mean(wait)\n    spread = range(shipped)\ncheck \"recent\" warn: max(shipped) >= date \"2026-01-01\"\n",
        "let date = 1\nlet y = date + 1\n",
    ] {
        let parsed = recipe::parse_and_check_columns(fine, Some(&columns));
        assert!(parsed.is_ok(), "{fine:?}: {:?}", parsed.diagnostics);
    }
}

/// Likely mistakes that run but are warned about: (recipe, part of the
/// message or help, line, column).
const WARNINGS: &[(&str, &str, usize, usize)] = &[
    (
        "let x = percentile(weight_kg, 0.95)\n",
        "`percentile` takes a percent: 0.95 means the 0.95th percentile",
        1,
        31,
    ),
    (
        "let x = percentile(weight_kg, 0.95)\n",
        "write percentile(x, 95)",
        1,
        31,
    ),
    (
        "figures \"F\":\n    m = mean(weight_kg)\nrows where weight_kg > 0\n",
        "this `rows where` comes after every block, check and chart, so it narrows nothing",
        3,
        1,
    ),
    (
        "rows where weight_kg > 0\nfigures \"F\":\n    m = mean(weight_kg)\nlet y = 2\nrows where depot == \"x\"\n",
        "move it above the blocks it is for",
        5,
        1,
    ),
];

#[test]
fn likely_mistakes_are_warned_about_with_the_fix() {
    let mut wrong = Vec::new();
    for (source, message, line, column) in WARNINGS {
        let parsed = recipe::parse_and_check(source, None);
        assert!(parsed.is_ok(), "{source:?}: {:?}", parsed.diagnostics);
        if let Some(problem) = missing_from(&parsed.warnings, source, message, (*line, *column)) {
            wrong.push(problem);
        }
    }
    assert!(wrong.is_empty(), "{}", wrong.join("\n"));
    // Fine as written: no warning.
    for fine in [
        "let x = percentile(weight_kg, 1)\nlet y = percentile(weight_kg, 0)\n",
        "rows where weight_kg > 0\nfigures \"F\":\n    m = mean(weight_kg)\n",
        "let x = percentile(weight_kg, 95)\n",
        "drift 0.15\ndrift 15%\n",
    ] {
        assert!(
            recipe::parse_and_check(fine, None).warnings.is_empty(),
            "{fine:?}"
        );
    }
}

#[test]
fn syntax_name_and_column_errors_come_in_one_pass() {
    let source = "let a = (weight_kg\nlet b = meen(weight_kg)\nlet c = wieght_kg + a\nlet d = mean(status)\n";
    let parsed = recipe::parse_and_check_columns(source, Some(&typed_columns()));
    let found: Vec<(usize, &str)> = parsed
        .diagnostics
        .iter()
        .map(|d| (d.line_column(source).0, d.message.as_str()))
        .collect();
    assert_eq!(
        found,
        [
            (
                1,
                "expected `)` to close the `(`, found the end of the line"
            ),
            (2, "unknown function `meen`"),
            (3, "no column named `wieght_kg`"),
            (4, "`mean` needs a number here, not a text"),
        ],
        "the unread `let a` is not reported again where it is used"
    );
}

#[test]
fn unknown_columns_get_the_closest_header_suggested() {
    let headers: Vec<String> = HEADERS.iter().map(|s| s.to_string()).collect();
    let cases = [
        ("let x = wieght_kg\n", "did you mean `weight_kg`?"),
        ("let x = {minutes late}\n", "did you mean `{Minutes late}`?"),
        ("let x = Depot\n", "did you mean `depot`?"),
    ];
    for (source, help) in cases {
        let parsed = recipe::parse_and_check(source, Some(&headers));
        assert_eq!(
            parsed.diagnostics[0].help.as_deref(),
            Some(help),
            "{source}"
        );
    }
}

#[test]
fn several_bad_lines_are_reported_in_one_pass() {
    let source = "title \"ok\"\nlet a = 1 +\nlet b = (2\nfigures \"F\":\n    m = \nboxplot\n";
    let parsed = recipe::parse(source);
    let lines: Vec<usize> = parsed
        .diagnostics
        .iter()
        .map(|d| d.line_column(source).0)
        .collect();
    assert_eq!(lines, [2, 3, 5, 6]);
}

#[test]
fn a_report_shows_file_line_column_and_a_caret() {
    let source = "title \"x\"\nlet x = meen(weight_kg)\n";
    let parsed = recipe::parse_and_check(source, None);
    let text = recipe::render_all(&parsed.diagnostics, "depot.sheaf", source);
    assert!(text.contains("error: unknown function `meen`"), "{text}");
    assert!(text.contains("depot.sheaf:2:9"), "{text}");
    assert!(text.contains("let x = meen(weight_kg)"), "{text}");
    assert!(text.contains("        ^^^^"), "{text}");
    assert!(text.contains("help: did you mean `mean`?"), "{text}");
}

#[test]
fn deep_nesting_is_refused_not_overflowed() {
    for depth in [65, 1_000, 10_000] {
        let source = format!("let x = {}1{}\n", "(".repeat(depth), ")".repeat(depth));
        let parsed = recipe::parse(&source);
        assert!(
            parsed
                .diagnostics
                .iter()
                .any(|d| d.message.contains("nests more than 64 levels")),
            "depth {depth}"
        );
    }
    for source in [
        format!("let x = {}1\n", "-".repeat(10_000)),
        format!("let x = {}1 > 0\n", "not ".repeat(10_000)),
    ] {
        assert!(!recipe::parse(&source).is_ok());
    }
    let long_chain = format!("let x = 1{}\n", " + 1".repeat(10_000));
    assert!(
        recipe::parse(&long_chain).diagnostics[0]
            .message
            .contains("more than 100 terms")
    );
    let fine = format!("let x = {}1{}\n", "(".repeat(60), ")".repeat(60));
    assert!(recipe::parse(&fine).is_ok());
}
