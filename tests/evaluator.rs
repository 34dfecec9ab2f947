//! The evaluator, table-driven: (expression or recipe, an inline table,
//! expected output). Every expected value below was worked out by hand from
//! the definitions named beside it (Hyndman and Fan 1996 for quantile types,
//! Tukey 1977 for hinges and fences, Joanes and Gill 1998 for the adjusted
//! moments); none was copied from sheaf's output.
//!
//! Missing values follow three-valued (Kleene) logic, as the README states:
//! `false and missing` is false, `true or missing` is true, `not missing`
//! is missing; arithmetic and comparisons with a missing value are missing.
//!
//! Output is written as text: a value per row as its values separated by
//! spaces with `_` for missing; one value as itself; a list as `[a b]`; no
//! value as `none(reason)`. Recipe output is one entry per figures row
//! (`group: v1, v2`), per check (`check name group: outcome`), per
//! warning (`warning: text`) and per count of rows a `rows where` left out
//! (`skipped n: reason`), joined with `; `. A number written with four
//! or more decimals matches when the result rounds to it; any other number
//! must match exactly (up to floating-point rounding, 1e-12 relative).

use std::collections::HashMap;

use sheaf::eval::{self, Block, One, Rows, Scope, Value};
use sheaf::load::{self, LoadOptions, Table};
use sheaf::recipe;

/// Invented deliveries. Rows, 1-based:
/// 1 w=10 late=5  done      North x=1  k=7 m=1   y=2
/// 2 w=20 late=_  done      South x=2  k=7 m=n/a y=4
/// 3 w=_  late=15 cancelled North x=3  k=7 m=3   y=4
/// 4 w=40 late=-5 done      (blank) x=4 k=7 m=4  y=5
/// 5 w=30 late=25 late      South x=10 k=7 m=5   y=20
const DELIVERIES: &str = "w,late,status,depot,x,k,m,y
10,5,done,North,1,7,1,2
20,,done,South,2,7,n/a,4
,15,cancelled,North,3,7,3,4
40,-5,done,,4,7,4,5
30,25,late,South,10,7,5,20
";

/// (expression over every row of DELIVERIES, expected).
const EXPRESSIONS: &[(&str, &str)] = &[
    // Literals and arithmetic on single values.
    ("1 + 2 * 3", "7"),
    ("(1 + 2) * 3", "9"),
    ("10 - 4 - 3", "3"),
    ("12 / 4 / 3", "1"),
    ("2 ^ 3 ^ 2", "512"),
    ("-2 ^ 2", "-4"),
    ("50%", "0.5"),
    ("\"depot\"", "depot"),
    ("1 / 0", "none(not a finite number (division by zero?))"),
    // A parameter computed in the recipe is held to its range like a
    // written one (written, the checker refuses it): quartile 4 would
    // otherwise be the maximum and 1.6 would be cut to quartile 1.
    // count(w) is 4; w sorted is 10 20 30 40, Q3 (type 7) = 30 + 0.25 * 10.
    ("quartile(w, count(w) - 1)", "32.5"),
    (
        "quartile(w, count(w))",
        "none(the `q` of `quartile` must be a whole number from 1 to 3, not 4)",
    ),
    (
        "quartile(w, count(w) / 2.5)",
        "none(the `q` of `quartile` must be a whole number from 1 to 3, not 1.6)",
    ),
    // A computed parameter with no value passes its own reason on.
    (
        "quartile(w, 1 / (count(w) - 4))",
        "none(not a finite number (division by zero?))",
    ),
    ("0 / 0", "none(not a finite number (division by zero?))"),
    (
        "(0 - 8) ^ 0.5",
        "none(not a finite number (division by zero?))",
    ),
    ("3 > 2", "true"),
    ("3 <= 2", "false"),
    ("2 == 2", "true"),
    ("2 != 2", "false"),
    ("\"a\" == \"a\"", "true"),
    ("\"a\" != \"b\"", "true"),
    // Truths compared with truths (single values).
    ("(3 > 2) == (1 > 0)", "true"),
    ("(3 > 2) == (1 > 5)", "false"),
    ("(3 > 2) != (1 > 0)", "false"),
    ("(3 > 2) != (1 > 5)", "true"),
    // Per row: missing stays missing through arithmetic; non-finite is missing.
    ("w", "10 20 _ 40 30"),
    ("w + 1", "11 21 _ 41 31"),
    ("w - late", "5 _ _ 45 5"),
    ("w * late", "50 _ _ -200 750"),
    ("-late", "-5 _ -15 5 -25"),
    ("w * 10%", "1 2 _ 4 3"),
    ("x ^ 2", "1 4 9 16 100"),
    ("2 ^ x", "2 4 8 16 1024"),
    ("x / (x - 3)", "-0.5 -2 _ 4 1.428571"),
    ("w / (late - 5)", "_ _ _ -4 1.5"),
    ("m * 2", "2 _ 6 8 10"),
    // Comparisons per row: missing in, missing out.
    ("w > 15", "false true _ true true"),
    ("w >= 20", "false true _ true true"),
    ("w < 20", "true false _ false false"),
    ("w <= 20", "true true _ false false"),
    ("w == 40", "false false _ true false"),
    ("w != 40", "true true _ false true"),
    ("late > 0", "true _ true false true"),
    ("status == \"done\"", "true true false true false"),
    ("status != \"done\"", "false false true false true"),
    ("depot == \"North\"", "true false true _ false"),
    ("\"South\" == depot", "false true false _ true"),
    // Three-valued and/or/not (Kleene).
    ("w > 15 and late > 0", "false _ _ false true"),
    ("w > 15 or late > 0", "true true true true true"),
    ("w > 25 or late > 20", "false _ _ true true"),
    ("w > 25 and late > 20", "false false false false true"),
    ("not (w > 15)", "true false _ false false"),
    ("not not (w > 15)", "false true _ true true"),
    ("depot == \"North\" or w > 35", "true false true true false"),
    ("depot == \"North\" and w > 35", "false false _ _ false"),
    ("w > 15 and 1 < 2", "false true _ true true"),
    ("w > 15 or 1 > 2", "false true _ true true"),
    ("w > 15 and 1 > 2", "false false false false false"),
    ("w > 15 or 1 < 2", "true true true true true"),
    ("w > 15 and mean(w) / 0 > 1", "false _ _ _ _"),
    ("w > 15 or mean(w) / 0 > 1", "_ true _ true true"),
    // Kleene on single values: a missing side decides nothing unless it must.
    ("mean(w) / 0 > 1 or count(w) > 0", "true"),
    ("count(w) > 0 or mean(w) / 0 > 1", "true"),
    ("mean(w) / 0 > 1 and count(w) > 10", "false"),
    ("count(w) > 10 and mean(w) / 0 > 1", "false"),
    (
        "mean(w) / 0 > 1 and count(w) > 0",
        "none(not a finite number (division by zero?))",
    ),
    (
        "mean(w) / 0 > 1 or count(w) > 10",
        "none(not a finite number (division by zero?))",
    ),
    (
        "not (mean(w) / 0 > 1)",
        "none(not a finite number (division by zero?))",
    ),
    ("not (count(w) > 10)", "true"),
    ("1 < 2 and 2 < 3", "true"),
    ("1 < 2 and 3 < 2", "false"),
    ("1 > 2 or 2 < 3", "true"),
    ("1 > 2 or 3 < 2", "false"),
    // if, with numbers and with text, per row and per value.
    (
        "if w > 15 then \"big\" else \"small\"",
        "small big _ big big",
    ),
    ("if late > 0 then w else 0", "10 _ _ 0 30"),
    (
        "if x > 3 then status else \"small\"",
        "small small small done late",
    ),
    ("if depot == \"North\" then 1 else 0", "1 0 1 _ 0"),
    ("if mean(w) > 20 then \"high\" else \"low\"", "high"),
    ("if count(w) > 10 then 1 else 2", "2"),
    (
        "if mean(w) / 0 > 1 then 1 else 2",
        "none(not a finite number (division by zero?))",
    ),
    ("if x > 3 then 1 else w", "10 20 _ 1 1"),
    // Broadcasting a single value over rows.
    ("w - mean(w)", "-15 -5 _ 15 5"),
    ("w / sum(w)", "0.1 0.2 _ 0.4 0.3"),
    ("mean(w - mean(w))", "0"),
    ("x - median(x)", "-2 -1 0 1 7"),
    ("max(w) - w", "30 20 _ 0 10"),
    // Row functions.
    ("abs(late)", "5 _ 15 5 25"),
    ("sqrt(w)", "3.162278 4.472136 _ 6.324555 5.477226"),
    ("sqrt(late)", "2.236068 _ 3.872983 _ 5"),
    ("ln(x)", "0 0.693147 1.098612 1.386294 2.302585"),
    ("ln(late)", "1.609438 _ 2.708050 _ 3.218876"),
    ("log10(w)", "1 1.301030 _ 1.602060 1.477121"),
    ("exp(x - x)", "1 1 1 1 1"),
    ("exp(1)", "2.718282"),
    ("round(x / 3, 2)", "0.33 0.67 1 1.33 3.33"),
    ("round(1234.56, -2)", "1200"),
    ("round(1234.56, 1)", "1234.6"),
    ("round(7.4, 0)", "7"),
    ("floor(0 - 2.4)", "-3"),
    ("ceil(0 - 2.4)", "-2"),
    ("floor(late / 10)", "0 _ 1 -1 2"),
    ("ceil(late / 10)", "1 _ 2 0 3"),
    ("abs(mean(late) - 20)", "10"),
    // Counting aggregates.
    ("count(w)", "4"),
    ("missing(w)", "1"),
    ("count(m)", "4"),
    ("missing(m)", "1"),
    ("count(status)", "0"),
    ("missing(status)", "5"),
    // Location and spread.
    ("sum(w)", "100"),
    ("sum(late)", "40"),
    ("min(late)", "-5"),
    ("max(w)", "40"),
    ("range(w)", "30"),
    ("mean(w)", "25"),
    ("mean(m)", "3.25"),
    ("median(w)", "25"),
    ("median(x)", "3"),
    ("variance(w)", "166.666667"),
    ("variance(w, population)", "125"),
    ("sd(w)", "12.909944"),
    ("sd(w, population)", "11.180340"),
    ("variance(x)", "12.5"),
    ("variance(x, population)", "10"),
    // Shape: x has m2 = 10, m3 = 36, m4 = 278.8 (by hand).
    ("skewness(x)", "1.138420"),
    ("skewness(x, adjusted)", "1.697056"),
    ("skewness(w)", "0"),
    ("kurtosis(x)", "2.788"),
    ("kurtosis(x, adjusted)", "6.152"),
    ("excess_kurtosis(x)", "-0.212"),
    ("excess_kurtosis(x, adjusted)", "3.152"),
    ("kurtosis(w)", "1.64"),
    ("kurtosis(w, adjusted)", "1.8"),
    ("excess_kurtosis(w, adjusted)", "-1.2"),
    // Quartiles of w (10 20 30 40), every method (Hyndman and Fan 1996).
    ("quartile(w, 1)", "17.5"),
    ("quartile(w, 1, hf1)", "10"),
    ("quartile(w, 1, hf2)", "15"),
    ("quartile(w, 1, hf3)", "10"),
    ("quartile(w, 1, hf4)", "10"),
    ("quartile(w, 1, hf5)", "15"),
    ("quartile(w, 1, hf6)", "12.5"),
    ("quartile(w, 1, hf7)", "17.5"),
    ("quartile(w, 1, hf8)", "14.166667"),
    ("quartile(w, 1, hf9)", "14.375"),
    ("quartile(w, 1, hinges)", "15"),
    ("quartile(w, 2)", "25"),
    ("quartile(w, 2, hf1)", "20"),
    ("quartile(w, 2, hf3)", "20"),
    ("quartile(w, 2, hinges)", "25"),
    ("quartile(w, 3)", "32.5"),
    ("quartile(w, 3, hf1)", "30"),
    ("quartile(w, 3, hf2)", "35"),
    ("quartile(w, 3, hf6)", "37.5"),
    ("quartile(w, 3, hf8)", "35.833333"),
    ("quartile(w, 3, hinges)", "35"),
    ("quartile(x, 1, hinges)", "2"),
    ("quartile(x, 3, hinges)", "4"),
    // Percentiles of w, p = 60 and 10, every type.
    ("percentile(w, 60)", "28"),
    ("percentile(w, 60, hf1)", "30"),
    ("percentile(w, 60, hf2)", "30"),
    ("percentile(w, 60, hf3)", "20"),
    ("percentile(w, 60, hf4)", "24"),
    ("percentile(w, 60, hf5)", "29"),
    ("percentile(w, 60, hf6)", "30"),
    ("percentile(w, 60, hf7)", "28"),
    ("percentile(w, 60, hf8)", "29.333333"),
    ("percentile(w, 60, hf9)", "29.25"),
    ("percentile(w, 10)", "13"),
    ("percentile(w, 10, hf6)", "10"),
    ("percentile(w, 90)", "37"),
    ("percentile(w, 90, hf6)", "40"),
    ("percentile(w, 0)", "10"),
    ("percentile(w, 100)", "40"),
    ("percentile(w, 75, hinges)", "35"),
    ("percentile(w, 50, hf2)", "25"),
    // IQR, Bowley.
    ("iqr(w)", "15"),
    ("iqr(w, hf6)", "25"),
    ("iqr(w, hinges)", "20"),
    ("iqr(w, hf9)", "21.25"),
    ("iqr(x)", "2"),
    ("bowley(x)", "0"),
    ("bowley(x, hf6)", "0.454545"),
    ("bowley(k)", "none(quartiles coincide (IQR is zero))"),
    // Every method on x (1 2 3 4 10), quartiles by hand from Hyndman and
    // Fan (1996): Q1 Q2 Q3 = hf1, hf2, hf7, hinges: 2 3 4; hf3: 1 2 4;
    // hf4: 1.25 2.5 3.75; hf5: 1.75 3 5.5; hf6: 1.5 3 7;
    // hf8: 5/3 3 6; hf9: 1.6875 3 5.875.
    ("iqr(x, hf1)", "2"),
    ("iqr(x, hf2)", "2"),
    ("iqr(x, hf3)", "3"),
    ("iqr(x, hf4)", "2.5"),
    ("iqr(x, hf5)", "3.75"),
    ("iqr(x, hf6)", "5.5"),
    ("iqr(x, hf7)", "2"),
    ("iqr(x, hf8)", "4.333333"),
    ("iqr(x, hf9)", "4.1875"),
    ("iqr(x, hinges)", "2"),
    ("bowley(x, hf1)", "0"),
    ("bowley(x, hf2)", "0"),
    ("bowley(x, hf3)", "0.333333"),
    ("bowley(x, hf4)", "0"),
    ("bowley(x, hf5)", "0.333333"),
    ("bowley(x, hf7)", "0"),
    ("bowley(x, hf8)", "0.384615"),
    ("bowley(x, hf9)", "0.373134"),
    ("bowley(x, hinges)", "0"),
    ("fence_high(x, 1.5, hf1)", "7"),
    ("fence_high(x, 1.5, hf2)", "7"),
    ("fence_low(x, 1.5, hf3)", "-3.5"),
    ("fence_high(x, 1.5, hf3)", "8.5"),
    ("fence_low(x, 1.5, hf4)", "-2.5"),
    ("fence_high(x, 1.5, hf4)", "7.5"),
    ("fence_high(x, 1.5, hf5)", "11.125"),
    ("fence_low(x, 1.5, hf6)", "-6.75"),
    ("fence_high(x, 1.5, hf6)", "15.25"),
    ("fence_high(x, 1.5, hf7)", "7"),
    ("fence_low(x, 1.5, hf8)", "-4.833333"),
    ("fence_high(x, 1.5, hf8)", "12.5"),
    ("fence_high(x, 1.5, hf9)", "12.15625"),
    ("fence_low(x, 1.5, hinges)", "-1"),
    ("outliers(x, 1.5, hf1)", "1"),
    ("outliers(x, 1.5, hf3)", "1"),
    ("outliers(x, 1.5, hf4)", "1"),
    ("outliers(x, 1.5, hf5)", "0"),
    ("outliers(x, 1.5, hf6)", "0"),
    ("outliers(x, 1.5, hf8)", "0"),
    ("outliers(x, 1.5, hf9)", "0"),
    ("outliers(x, 1.5, hinges)", "1"),
    // MAD, trimmed and winsorized means (y = 2 4 4 5 20).
    ("mad(x)", "1"),
    ("mad(x, scaled)", "1.4826"),
    ("mad(w)", "10"),
    ("mad(w, scaled)", "14.826"),
    ("mad(k)", "0"),
    ("trimmed_mean(y, 20%)", "4.333333"),
    ("trimmed_mean(y, 0)", "7"),
    ("trimmed_mean(y, 10%)", "7"),
    ("winsorized_mean(y, 20%)", "4.4"),
    ("winsorized_mean(y, 0)", "7"),
    ("winsorized_mean(y, 40%)", "4"),
    // Modes.
    ("modes(y)", "[4]"),
    ("modes(late)", "[-5 5 15 25]"),
    ("binned_mode(x, 3)", "[2]"),
    ("binned_mode(y, 2)", "[3.75]"),
    // Share: of the rows where the condition is known.
    ("share(w > 15)", "0.75"),
    ("share(late > 100)", "0"),
    ("share(status == \"done\")", "0.6"),
    ("share(depot == \"North\")", "0.5"),
    ("share(w > 25 and late > 20)", "0.2"),
    ("share(w > 15 and late > 0)", "0.333333"),
    ("share(w > 15 or late > 0)", "1"),
    // Tukey's fences (k = 1.5 unless given) and outliers strictly beyond.
    ("fence_low(x)", "-1"),
    ("fence_high(x)", "7"),
    ("fence_low(x, 1)", "0"),
    ("fence_high(x, 3)", "10"),
    ("fence_high(x, 0, hf6)", "7"),
    ("fence_low(x, 1, hf6)", "-4"),
    ("outliers(x)", "1"),
    ("outliers(x, 3)", "0"),
    ("outliers(y)", "2"),
    ("outliers(y, 1.5, hinges)", "2"),
    ("outliers(y, 20)", "0"),
    // Reasons a value is missing.
    ("mean(status)", "none(no values)"),
    ("sum(status)", "none(no values)"),
    ("min(status)", "none(no values)"),
    ("sd(k)", "0"),
    ("skewness(k)", "none(constant column)"),
    ("kurtosis(k)", "none(constant column)"),
    ("share(status == \"none\" and w > 100)", "0"),
    (
        "percentile(w, count(w) * 30)",
        "none(the `p` of `percentile` must be from 0 to 100, not 120)",
    ),
    (
        "trimmed_mean(y, count(y) / 10)",
        "none(the `a` of `trimmed_mean` must be at least 0 and below 50% (a share such as 10%), not 0.5)",
    ),
    (
        "outliers(x, min(late))",
        "none(the `k` of `outliers` must be 0 or more, not -5)",
    ),
    (
        "change(mean(w))",
        "none(no previous period to compare with)",
    ),
    ("mean(w) + mean(status)", "none(no values)"),
    ("if mean(status) > 1 then 1 else 2", "none(no values)"),
    ("w + mean(status)", "_ _ _ _ _"),
];

/// (recipe over DELIVERIES, expected).
const RECIPES: &[(&str, &str)] = &[
    // Groups in order of first appearance; a blank key is its own group.
    (
        "figures \"F\" per depot:\n    m = mean(w)\n    n = count(w)\n",
        "North: 10, 1; South: 25, 2; (blank): 40, 1",
    ),
    (
        "figures \"F\" per depot, status:\n    n = count(x)\n",
        "North / done: 1; South / done: 1; North / cancelled: 1; (blank) / done: 1; South / late: 1",
    ),
    (
        "figures \"F\" per status:\n    s = sum(x)\n",
        "done: 7; cancelled: 3; late: 10",
    ),
    (
        "figures \"F\":\n    m = mean(w)\n    top = modes(y)\n",
        "(all rows): 25, [4]",
    ),
    // Reasons within groups.
    (
        "figures \"F\" per depot:\n    s = sd(w)\n",
        "North: none(needs at least 2 values, has 1); South: 7.071068; (blank): none(needs at least 2 values, has 1)",
    ),
    (
        "figures \"F\" per depot:\n    g = skewness(x, adjusted)\n",
        "North: none(needs at least 3 values, has 2); South: none(needs at least 3 values, has 2); (blank): none(needs at least 3 values, has 1)",
    ),
    (
        "figures \"F\":\n    g = excess_kurtosis(late, adjusted)\n",
        "(all rows): -1.2",
    ),
    (
        "figures \"F\" where w > 100:\n    s = sum(w)\n    n = count(w)\n    q = share(w > 1)\n",
        "(all rows): none(no values), 0, none(no values)",
    ),
    // rows where: narrows everything below it; an unknown condition drops the row.
    (
        "rows where status != \"cancelled\"\nfigures \"F\":\n    n = count(late)\n",
        "(all rows): 3; skipped 1: rows where status != \"cancelled\": condition false",
    ),
    (
        "rows where w > 15\nfigures \"F\":\n    n = count(x)\n    s = sum(x)\n",
        "(all rows): 3, 16; skipped 1: rows where w > 15: condition false; skipped 1: rows where w > 15: condition could not be evaluated (missing value)",
    ),
    (
        "figures \"Before\":\n    n = count(x)\nrows where x > 3\nfigures \"After\":\n    n = count(x)\n",
        "(all rows): 5; (all rows): 2; skipped 3: rows where x > 3: condition false",
    ),
    (
        "rows where depot == \"North\" or w > 35\nfigures \"F\":\n    s = sum(x)\n",
        "(all rows): 8; skipped 2: rows where depot == \"North\" or w > 35: condition false",
    ),
    // A condition with one value keeps every row or none.
    (
        "rows where count(w) > 3\nfigures \"F\":\n    n = count(x)\n",
        "(all rows): 5",
    ),
    (
        "rows where count(w) > 4\nfigures \"F\":\n    n = count(x)\n",
        "(all rows): 0; skipped 5: rows where count(w) > 4: condition false",
    ),
    (
        "rows where mean(w) / 0 > 1\nfigures \"F\":\n    n = count(x)\n",
        "(all rows): 0; skipped 5: rows where mean(w) / 0 > 1: condition could not be evaluated (missing value)",
    ),
    // Groups keyed by a condition and by numbers.
    (
        "let big = w > 15\nfigures \"F\" per big:\n    n = count(x)\n",
        "false: 1; true: 3; (blank): 1",
    ),
    (
        "figures \"F\" per k, m:\n    s = sum(x)\n",
        "7 / 1: 1; 7 / (blank): 2; 7 / 3: 3; 7 / 4: 4; 7 / 5: 10",
    ),
    // Two keys whose pair repeats: rows 1, 2 and 4 are one group.
    (
        "figures \"F\" per k, status:\n    n = count(x)\n    s = sum(x)\n",
        "7 / done: 3, 7; 7 / cancelled: 1, 3; 7 / late: 1, 10",
    ),
    // A block's own where: every group of the rows kept is listed, one
    // none of whose rows pass with no rows (0 values, no mean).
    (
        "figures \"F\" per depot where w >= 20:\n    m = mean(w)\n",
        "North: none(no values); South: 25; (blank): 40",
    ),
    (
        "figures \"F\" per depot where not (status == \"done\"):\n    n = count(x)\n",
        "North: 1; South: 1; (blank): 0",
    ),
    // A let over the rows kept at its line.
    (
        "let d = w - mean(w)\nrows where depot == \"North\"\nfigures \"F\":\n    top = max(d)\n",
        "(all rows): -15; skipped 2: rows where depot == \"North\": condition false; skipped 1: rows where depot == \"North\": condition could not be evaluated (missing value)",
    ),
    (
        "rows where depot == \"North\"\nlet d = w - mean(w)\nfigures \"F\":\n    top = max(d)\n",
        "(all rows): 0; skipped 2: rows where depot == \"North\": condition false; skipped 1: rows where depot == \"North\": condition could not be evaluated (missing value)",
    ),
    (
        "let band = if w >= 25 then \"heavy\" else \"light\"\nfigures \"F\" per band:\n    n = count(x)\n",
        "light: 2; (blank): 1; heavy: 2",
    ),
    (
        "let late_h = late / 60\nfigures \"F\":\n    s = sum(late_h)\n",
        "(all rows): 0.666667",
    ),
    // A chart that cannot be drawn is said, not dropped.
    (
        "rows where status != \"late\"\nhistogram w per status\n",
        "warning: histogram of w, cancelled: not drawn (no values); skipped 1: rows where status != \"late\": condition false",
    ),
    (
        "boxplot w per status\n",
        "warning: box plot of w, cancelled: no box drawn (no values)",
    ),
    // The standard panel's figures, in the order of PANEL_LABELS: n,
    // missing, mean, sd, min, Q1, median, Q3, max, range, IQR, modes, mode
    // basis, skewness g1, Bowley, kurtosis b2, low and high outliers.
    // Moments checked with exact fractions.
    (
        "panel \"P\" of x:\n",
        "(all rows) x: 5, 0, 4, 3.535534, 1, 2, 3, 4, 10, 9, 2, [1 2 3 4 10], exact values, 1.138420, 0, 2.788, 0, 1",
    ),
    (
        "let h = y / 2\npanel \"P\" of h:\n",
        "(all rows) h: 5, 0, 3.5, 3.674235, 1, 2, 2, 2.5, 10, 9, 0.5, [1.875], binned, 4 equal bins (Sturges), 1.415795, 1, 3.146862, 1, 1",
    ),
    (
        "panel \"P\" of w per status where status != \"late\":\n",
        "done w: 3, 0, 23.333333, 15.275252, 10, 15, 20, 30, 40, 30, 15, [10 20 40], exact values, 0.381802, 0.333333, 1.5, 0, 0; \
         cancelled w: 0, 1, none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values); \
         late w: 0, 0, none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values), none(no values)",
    ),
    // Checks: overall and per group; a check that cannot be evaluated fails to pass.
    (
        "check \"heavy enough\" warn per depot: mean(w) >= 20\n",
        "check heavy enough (all rows): pass; check heavy enough North: warn; check heavy enough South: pass; check heavy enough (blank): pass",
    ),
    (
        "check \"spread\" fail per depot: sd(w) < 100\n",
        "check spread (all rows): pass; check spread North: fail (could not be evaluated: needs at least 2 values, has 1); check spread South: pass; check spread (blank): fail (could not be evaluated: needs at least 2 values, has 1)",
    ),
    (
        "check \"spread or few\" fail per depot: sd(w) < 100 or count(w) < 2\n",
        "check spread or few (all rows): pass; check spread or few North: pass; check spread or few South: pass; check spread or few (blank): pass",
    ),
    (
        "check \"share\" warn: share(late > 0) >= 80%\n",
        "check share (all rows): warn",
    ),
    (
        "check \"not all late\" fail: not (share(late > 0) == 1)\n",
        "check not all late (all rows): pass",
    ),
];

/// A previous period's value: (printed expression, group, value).
type Before = (&'static str, &'static str, f64);

/// (recipe, previous values, expected): `change`.
const CHANGES: &[(&str, &[Before], &str)] = &[
    (
        "figures \"F\":\n    c = change(mean(w))\n",
        &[("mean(w)", "(all rows)", 20.0)],
        "(all rows): 0.25",
    ),
    (
        "figures \"F\":\n    c = change(mean(w))\n",
        &[("mean(w)", "(all rows)", 50.0)],
        "(all rows): 0.5",
    ),
    (
        "figures \"F\":\n    c = change(mean(w))\n",
        &[("mean(w)", "(all rows)", -25.0)],
        "(all rows): 2",
    ),
    (
        "figures \"F\":\n    c = change(mean(w))\n",
        &[("mean(w)", "(all rows)", 0.0)],
        "(all rows): none(the previous value is zero)",
    ),
    (
        "figures \"F\":\n    c = change(sum(x))\n",
        &[("mean(w)", "(all rows)", 20.0)],
        "(all rows): none(no previous period to compare with)",
    ),
    (
        "figures \"F\" per depot:\n    c = change(mean(w))\n",
        &[
            ("mean(w)", "North", 8.0),
            ("mean(w)", "South", 25.0),
            ("mean(w)", "(blank)", 50.0),
        ],
        "North: 0.25; South: 0; (blank): 0.2",
    ),
    (
        "figures \"F\" per depot:\n    c = change(mean(w))\n",
        &[("mean(w)", "North", 8.0)],
        "North: 0.25; South: none(no previous period to compare with); (blank): none(no previous period to compare with)",
    ),
    (
        "figures \"F\":\n    c = change(mean(w) / 0)\n",
        &[("mean(w) / 0", "(all rows)", 1.0)],
        "(all rows): none(not a finite number (division by zero?))",
    ),
    (
        "check \"steady\" warn per depot: change(mean(w)) <= 10%\n",
        &[
            ("mean(w)", "(all rows)", 25.0),
            ("mean(w)", "North", 8.0),
            ("mean(w)", "South", 24.0),
        ],
        "check steady (all rows): pass; check steady North: warn; check steady South: pass; check steady (blank): warn (could not be evaluated: no previous period to compare with)",
    ),
];

/// Invented shipments with date cells, written as a workbook (a CSV file
/// holds no date cells). Serials (days since 1899-12-30), ISO weeks and
/// weekdays were worked out with Python's datetime (`(d - date(1899, 12,
/// 30)).days`, `d.isocalendar()`, `d.strftime("%A")`), run by hand:
/// 1 North shipped 2026-09-28 = 46293 Monday   2026-W40  due 2026-10-02  qty 3
/// 2 South shipped 2026-10-01 = 46296 Thursday 2026-W40  due 2026-10-01  qty 5
/// 3 North shipped 2026-10-31 = 46326 Saturday 2026-W44  due 2026-10-30  qty 2
/// 4 South shipped (blank)                               due 2026-11-05  qty 4
/// 5 North shipped 2026-11-02 = 46328 Monday   2026-W45  due 2026-11-09  qty 1
/// Over the four shipped dates: median (46296 + 46326) / 2 = 46311 =
/// 2026-10-16; mean 185243 / 4 = 46310.75 = 2026-10-15 18:00; quartiles by
/// Hyndman and Fan type 7: Q1 = 46293 + 0.75 * 3 = 46295.25 = 2026-09-30
/// 06:00, Q3 = 46326 + 0.25 * 2 = 46326.5 = 2026-10-31 12:00; range 35 days;
/// sd 18.8215 days (numpy std with ddof=1).
const SHIPMENTS: &[(&str, Option<&str>, &str, f64)] = &[
    ("North", Some("2026-09-28"), "2026-10-02", 3.0),
    ("South", Some("2026-10-01"), "2026-10-01", 5.0),
    ("North", Some("2026-10-31"), "2026-10-30", 2.0),
    ("South", None, "2026-11-05", 4.0),
    ("North", Some("2026-11-02"), "2026-11-09", 1.0),
];

/// (expression over every row of SHIPMENTS, expected). A date prints as
/// `date(ISO)`.
const DATE_EXPRESSIONS: &[(&str, &str)] = &[
    ("date \"2026-10-01\"", "date(2026-10-01)"),
    ("date \"2026-10-31\" - date \"2026-10-01\"", "30"),
    ("date \"2026-12-31\" + 1", "date(2027-01-01)"),
    ("1 + date \"2028-02-28\"", "date(2028-02-29)"),
    ("date \"2026-03-01\" - 1", "date(2026-02-28)"),
    ("date \"2026-10-01\" < date \"2026-10-02\"", "true"),
    ("date \"2026-10-01\" == date \"2026-10-01\"", "true"),
    (
        "shipped",
        "date(2026-09-28) date(2026-10-01) date(2026-10-31) _ date(2026-11-02)",
    ),
    ("shipped >= date \"2026-10-01\"", "false true true _ true"),
    ("shipped < date \"2026-10-01\"", "true false false _ false"),
    ("shipped == date \"2026-10-31\"", "false false true _ false"),
    ("shipped != date \"2026-10-31\"", "true true false _ true"),
    ("due - shipped", "4 0 -1 _ 7"),
    ("due > shipped", "true false false _ true"),
    (
        "shipped + 7",
        "date(2026-10-05) date(2026-10-08) date(2026-11-07) _ date(2026-11-09)",
    ),
    (
        "if due > shipped then due else shipped",
        "date(2026-10-02) date(2026-10-01) date(2026-10-31) _ date(2026-11-09)",
    ),
    ("month_of(shipped)", "2026-09 2026-10 2026-10 _ 2026-11"),
    ("week_of(shipped)", "2026-W40 2026-W40 2026-W44 _ 2026-W45"),
    ("year_of(shipped)", "2026 2026 2026 _ 2026"),
    ("weekday_of(shipped)", "Monday Thursday Saturday _ Monday"),
    // Calendar facts: 2026-01-01 is a Thursday in ISO week 2026-W01;
    // 2021-01-01, a Friday, is in 2020-W53; 2024-12-30 is in 2025-W01.
    ("week_of(date \"2026-01-01\")", "2026-W01"),
    ("weekday_of(date \"2026-01-01\")", "Thursday"),
    ("week_of(date \"2021-01-01\")", "2020-W53"),
    ("week_of(date \"2024-12-30\")", "2025-W01"),
    ("year_of(date \"2024-12-30\")", "2024"),
    ("month_of(date \"2024-12-30\")", "2024-12"),
    ("min(shipped)", "date(2026-09-28)"),
    ("max(shipped)", "date(2026-11-02)"),
    ("median(shipped)", "date(2026-10-16)"),
    ("mean(shipped)", "date(2026-10-15T18:00:00)"),
    ("quartile(shipped, 1)", "date(2026-09-30T06:00:00)"),
    ("percentile(shipped, 75)", "date(2026-10-31T12:00:00)"),
    ("quartile(shipped, 2)", "date(2026-10-16)"),
    ("range(shipped)", "35"),
    ("iqr(shipped)", "31.25"),
    ("sd(shipped)", "18.8215"),
    ("count(shipped)", "4"),
    ("missing(shipped)", "1"),
    ("max(shipped) - min(shipped)", "35"),
    ("max(due) > max(shipped)", "true"),
    ("min(shipped + 7)", "date(2026-10-05)"),
    ("max(due - shipped)", "7"),
    ("min(qty)", "1"),
];

/// Recipes over SHIPMENTS; groups appear in the order of their first row.
const DATE_RECIPES: &[(&str, &str)] = &[
    (
        "let month = month_of(shipped)\nfigures \"F\" per month:\n    n = count(qty)\n    first = min(shipped)\n    last = max(shipped)\n",
        "2026-09: 1, date(2026-09-28), date(2026-09-28); 2026-10: 2, date(2026-10-01), date(2026-10-31); (blank): 1, none(no values), none(no values); 2026-11: 1, date(2026-11-02), date(2026-11-02)",
    ),
    (
        "let week = week_of(shipped)\nrows where shipped >= date \"2026-10-01\"\nfigures \"F\" per week:\n    n = count(qty)\n    days = sum(due - shipped)\n",
        "2026-W40: 1, 0; 2026-W44: 1, -1; 2026-W45: 1, 7; skipped 1: rows where shipped >= date \"2026-10-01\": condition false; skipped 1: rows where shipped >= date \"2026-10-01\": condition could not be evaluated (missing value)",
    ),
    (
        "figures \"F\" per region:\n    middle = median(shipped)\n    spread = range(shipped)\n",
        "North: date(2026-10-31), 35; South: date(2026-10-01), 0",
    ),
    (
        "check \"shipped in time\" fail per region: max(shipped) <= date \"2026-10-31\"\n",
        "check shipped in time (all rows): fail; check shipped in time North: fail; check shipped in time South: pass",
    ),
];

/// The panel of a date column: skewness g1 -0.007036, Bowley -0.008 (from
/// the quartiles above) and kurtosis b2 1.024321 from scipy.stats (skew,
/// kurtosis with fisher=False), run by hand; no value lies beyond the fences.
const DATE_PANEL: (&str, &str) = (
    "panel \"P\" of shipped:\n",
    "(all rows) shipped: 4, 1, date(2026-10-15T18:00:00), 18.8215, date(2026-09-28), date(2026-09-30T06:00:00), date(2026-10-16), date(2026-10-31T12:00:00), date(2026-11-02), 35, 31.25, 2026-09-28; 2026-10-01; 2026-10-31; 2026-11-02, exact values, -0.007036, -0.008, 1.024321, 0, 0",
);

/// SHIPMENTS as a workbook with date cells.
fn date_table() -> (tempfile::TempDir, Table) {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("shipments.xlsx");
    let mut book = rust_xlsxwriter::Workbook::new();
    let sheet = book.add_worksheet();
    let day = rust_xlsxwriter::Format::new().set_num_format("yyyy-mm-dd");
    let serial = |iso: &str| sheaf::format::serial_from_calendar(iso).unwrap();
    for (col, header) in ["region", "shipped", "due", "qty"].iter().enumerate() {
        sheet.write_string(0, col as u16, *header).unwrap();
    }
    for (i, (region, shipped, due, qty)) in SHIPMENTS.iter().enumerate() {
        let row = i as u32 + 1;
        sheet.write_string(row, 0, *region).unwrap();
        if let Some(shipped) = shipped {
            sheet
                .write_number_with_format(row, 1, serial(shipped), &day)
                .unwrap();
        }
        sheet
            .write_number_with_format(row, 2, serial(due), &day)
            .unwrap();
        sheet.write_number(row, 3, *qty).unwrap();
    }
    book.save(&path).unwrap();
    let table = load::load(&path, &LoadOptions::default()).unwrap();
    (dir, table)
}

/// A table of `n` rows, each its own `id` (0, 1, ...), with `x` = id mod 7.
fn ids(n: usize) -> String {
    let mut csv = String::from("id,x\n");
    for i in 0..n {
        csv.push_str(&format!("{i},{}\n", i % 7));
    }
    csv
}

fn table(csv: &str) -> (tempfile::TempDir, Table) {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("deliveries.csv");
    std::fs::write(&path, csv).unwrap();
    let table = load::load(&path, &LoadOptions::default()).unwrap();
    (dir, table)
}

fn number(x: f64) -> String {
    format!("{x}")
}

/// A date as `date(2026-10-15T18:00:00)`: one token, told apart from text.
fn date(serial: f64) -> String {
    format!("date({})", sheaf::format::date(serial).replace(' ', "T"))
}

fn one(v: &One) -> String {
    match v {
        One::Number(x) => number(*x),
        One::Truth(b) => b.to_string(),
        One::Text(t) => t.clone(),
        One::Date(x) => date(*x),
        One::List(v) => format!(
            "[{}]",
            v.iter().map(|x| number(*x)).collect::<Vec<_>>().join(" ")
        ),
        One::Undefined(why) => format!("none({why})"),
    }
}

fn rows(r: &Rows) -> String {
    let texts: Vec<String> = match r {
        Rows::Numbers(v) => v.iter().map(|x| x.map_or("_".into(), number)).collect(),
        Rows::Truths(v) => v
            .iter()
            .map(|x| x.map_or("_".into(), |b| b.to_string()))
            .collect(),
        Rows::Texts(v) => v.iter().map(|x| x.clone().unwrap_or("_".into())).collect(),
        Rows::Dates(v) => v.iter().map(|x| x.map_or("_".into(), date)).collect(),
    };
    texts.join(" ")
}

fn expression(source: &str, table: &Table) -> Result<String, String> {
    // Kinds left unknown, so that what the evaluator does with text given
    // to an aggregate is tested too (with kinds, the checker refuses it).
    let columns: Vec<recipe::DataColumn> = table
        .headers()
        .into_iter()
        .map(|name| recipe::DataColumn {
            name,
            kind: recipe::DataKind::Any,
        })
        .collect();
    let e = recipe::parse_expression(source, Some(&columns))
        .map_err(|d| format!("refused: {:?}", d))?;
    let lets = Default::default();
    let all: Vec<eval::Row> = (0..table.rows as eval::Row).collect();
    Ok(match Scope::new(table, &lets, &all).eval(&e) {
        Value::One(v) => one(&v),
        Value::Rows(r) => rows(&r),
    })
}

fn run_recipe(
    source: &str,
    table: &Table,
    previous: Option<eval::Previous>,
) -> Result<String, String> {
    let parsed = recipe::parse_and_check(source, Some(&table.headers()));
    if !parsed.is_ok() {
        return Err(format!("refused: {:?}", parsed.diagnostics));
    }
    let results =
        eval::evaluate_against(&parsed.recipe, table, previous).map_err(|e| e.to_string())?;
    let mut out = Vec::new();
    for block in &results.blocks {
        match block {
            Block::Figures { rows, .. } => {
                for row in rows {
                    let values: Vec<String> = row.values.iter().map(one).collect();
                    out.push(format!(
                        "{}: {}",
                        eval::group_label(&row.group),
                        values.join(", ")
                    ));
                }
            }
            Block::Panel { entries, .. } => {
                for e in entries {
                    let values: Vec<String> = e.figures.iter().map(one).collect();
                    out.push(format!(
                        "{} {}: {}",
                        eval::group_label(&e.group),
                        e.column,
                        values.join(", ")
                    ));
                }
            }
        }
    }
    for c in &results.checks {
        out.push(format!(
            "check {} {}: {}{}",
            c.name,
            eval::group_label(c.group.as_deref().unwrap_or_default()),
            c.outcome.word(),
            c.note_words()
                .map(|n| format!(" ({n})"))
                .unwrap_or_default()
        ));
    }
    out.extend(results.warnings.iter().map(|w| format!("warning: {w}")));
    out.extend(
        results
            .rows_skipped
            .iter()
            .map(|(why, n)| format!("skipped {n}: {why}")),
    );
    Ok(out.join("; "))
}

/// Splits text into numbers and the text between them.
fn tokens(text: &str) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    let chars: Vec<char> = text.chars().collect();
    let mut i = 0;
    while i < chars.len() {
        let starts_number = chars[i].is_ascii_digit()
            || (chars[i] == '-'
                && chars.get(i + 1).is_some_and(|c| c.is_ascii_digit())
                && (i == 0 || !chars[i - 1].is_alphanumeric()));
        let start = i;
        if starts_number {
            i += 1;
            while i < chars.len()
                && (chars[i].is_ascii_digit()
                    || (chars[i] == '.' && chars.get(i + 1).is_some_and(|c| c.is_ascii_digit()))
                    || ((chars[i] == 'e')
                        && chars
                            .get(i + 1)
                            .is_some_and(|c| c.is_ascii_digit() || *c == '-')))
            {
                i += if chars[i] == 'e' && chars[i + 1] == '-' {
                    2
                } else {
                    1
                };
            }
        } else {
            while i < chars.len() && !chars[i].is_ascii_digit() && chars[i] != '-' {
                i += 1;
            }
            if i == start {
                i += 1;
            }
        }
        out.push(chars[start..i].iter().collect());
    }
    out
}

/// Whether the actual output matches the expected text (see the module note).
fn matches(actual: &str, expected: &str) -> bool {
    let (a, e) = (tokens(actual), tokens(expected));
    a.len() == e.len()
        && a.iter().zip(&e).all(|(a, e)| {
            match (a.parse::<f64>(), e.parse::<f64>()) {
                (Ok(x), Ok(y)) => {
                    let decimals = e.split_once('.').map_or(0, |(_, d)| d.len());
                    if decimals >= 4 {
                        let scale = 10f64.powi(decimals as i32);
                        (x * scale).round() == (y * scale).round()
                    } else {
                        // Exact up to floating-point rounding (a few ulps).
                        (x - y).abs() <= 1e-12 * y.abs().max(1.0)
                    }
                }
                _ => a == e,
            }
        })
}

fn report(wrong: &[String], total: usize) {
    assert!(
        wrong.is_empty(),
        "{} of {total} cases differ:\n{}",
        wrong.len(),
        wrong.join("\n")
    );
}

/// Each case whose output differs from the expected, described.
fn differences(
    cases: &[(&str, &str)],
    run: impl Fn(&str) -> Result<String, String>,
) -> Vec<String> {
    let mut wrong = Vec::new();
    for (source, expected) in cases {
        match run(source) {
            Ok(actual) if matches(&actual, expected) => {}
            other => wrong.push(format!(
                "{source}\n    wanted {expected}\n    got    {other:?}"
            )),
        }
    }
    wrong
}

#[test]
fn expressions_give_the_values_worked_by_hand() {
    let (_dir, t) = table(DELIVERIES);
    let wrong = differences(EXPRESSIONS, |source| expression(source, &t));
    report(&wrong, EXPRESSIONS.len());
}

#[test]
fn recipes_give_the_values_worked_by_hand() {
    let (_dir, t) = table(DELIVERIES);
    let wrong = differences(RECIPES, |source| run_recipe(source, &t, None));
    report(&wrong, RECIPES.len());
}

#[test]
fn change_compares_with_the_previous_period_per_group() {
    let (_dir, t) = table(DELIVERIES);
    let mut wrong = Vec::new();
    for (source, previous, expected) in CHANGES {
        let previous: eval::Previous = previous
            .iter()
            .map(|(e, g, v)| ((e.to_string(), g.to_string()), *v))
            .collect::<HashMap<_, _>>();
        match run_recipe(source, &t, Some(previous)) {
            Ok(actual) if matches(&actual, expected) => {}
            other => wrong.push(format!(
                "{source}\n    wanted {expected}\n    got    {other:?}"
            )),
        }
    }
    report(&wrong, CHANGES.len());
}

#[test]
fn dates_give_the_values_worked_by_hand() {
    let (_dir, t) = date_table();
    let mut wrong = differences(DATE_EXPRESSIONS, |source| expression(source, &t));
    let recipes: Vec<(&str, &str)> = DATE_RECIPES.iter().chain([&DATE_PANEL]).copied().collect();
    wrong.extend(differences(&recipes, |source| run_recipe(source, &t, None)));
    report(&wrong, DATE_EXPRESSIONS.len() + recipes.len());
}

#[test]
fn csv_days_written_yyyy_mm_dd_are_dates() {
    // A day that does not exist stays text, counted as missing (and listed).
    let (_dir, t) = table("shipped,qty\n2026-10-01,1\n2026-02-30,2\n2026-11-05,3\n");
    for (source, expected) in [
        ("shipped", "date(2026-10-01) _ date(2026-11-05)"),
        ("missing(shipped)", "1"),
        ("max(shipped) - min(shipped)", "35"),
        ("week_of(shipped)", "2026-W40 _ 2026-W45"),
    ] {
        assert_eq!(expression(source, &t).unwrap(), expected, "{source}");
    }
}

#[test]
fn the_table_is_large_enough_and_its_matcher_can_fail() {
    assert!(EXPRESSIONS.len() + RECIPES.len() + CHANGES.len() >= 150);
    assert!(matches("0.3333333333333333", "0.333333"));
    assert!(!matches("0.3334", "0.333333"));
    assert!(!matches("3.4", "3"));
    assert!(!matches("10 20", "10 20 _"));
    assert!(matches(
        "none(needs at least 2 values, has 1)",
        "none(needs at least 2 values, has 1)"
    ));
    assert!(!matches(
        "none(needs at least 2 values, has 1)",
        "none(needs at least 3 values, has 1)"
    ));
    assert!(matches("-5 _ 1e-7", "-5 _ 0.0000001"));
}

/// A panel with more (group, column) rows than a sheet holds is refused
/// before any figure is computed: 100,000 groups of 11 columns.
#[test]
fn a_panel_larger_than_a_sheet_is_refused_before_the_work() {
    let (_dir, t) = table(&ids(100_000));
    let lets: String = (0..10).map(|i| format!("let x{i} = x + {i}\n")).collect();
    let columns: Vec<String> = (0..10).map(|i| format!("x{i}")).collect();
    let source = format!("{lets}panel \"P\" of x, {} per id:\n", columns.join(", "));
    let started = std::time::Instant::now();
    let said = run_recipe(&source, &t, None).unwrap_err();
    assert!(
        said.contains("would have 1100000 (group, column) rows"),
        "{said}"
    );
    assert!(started.elapsed() < std::time::Duration::from_secs(60));
}

/// A check's value and limit, shown on the Checks sheet and in `--json`:
/// for a comparison its two sides (max(w) = 40 against 35), else the
/// condition's own value and no limit.
#[test]
fn a_check_shows_both_sides_of_its_comparison() {
    let (_dir, t) = table(DELIVERIES);
    let source =
        "check \"light\" warn: max(w) <= 35\ncheck \"both\" fail: count(w) > 3 and min(w) > 5\n";
    let parsed = recipe::parse_and_check(source, Some(&t.headers()));
    assert!(parsed.is_ok(), "{:?}", parsed.diagnostics);
    let results = eval::evaluate(&parsed.recipe, &t).unwrap();
    let shown: Vec<String> = results
        .checks
        .iter()
        .map(|c| {
            let limit = c.limit.as_ref().map_or("-".to_string(), one);
            format!(
                "{} {} {} {}",
                c.name,
                one(&c.value),
                limit,
                c.outcome.word()
            )
        })
        .collect();
    assert_eq!(shown, ["light 40 35 warn", "both true - pass"]);
}

/// The names the writers title sheets and charts with: each block's own
/// name, and a column's `label` where the recipe gives one (its name
/// where it does not).
#[test]
fn blocks_keep_their_names_and_columns_their_labels() {
    let (_dir, t) = table(DELIVERIES);
    let source = "label w \"Weight (kg)\"\npanel \"Weights\" of w:\nfigures \"Lateness\" per depot:\n  mean_late = mean(late)\n";
    let parsed = recipe::parse_and_check(source, Some(&t.headers()));
    assert!(parsed.is_ok(), "{:?}", parsed.diagnostics);
    let results = eval::evaluate(&parsed.recipe, &t).unwrap();
    let names: Vec<&str> = results.blocks.iter().map(Block::name).collect();
    assert_eq!(names, ["Weights", "Lateness"]);
    assert_eq!(results.column_label("w"), "Weight (kg)");
    assert_eq!(results.column_label("late"), "late");
}

/// The cells the Checks and About sheets list as holding no number: those
/// of the columns the recipe uses (behind its `let`s too), with the cell,
/// the column and what the cell held; the unused columns' cells are not
/// listed.
#[test]
fn cells_without_a_number_are_listed_for_the_columns_used() {
    let (_dir, t) = table(DELIVERIES);
    let source = "let m2 = m * 2\npanel \"P\" of w, m2:\n";
    let parsed = recipe::parse_and_check(source, Some(&t.headers()));
    assert!(parsed.is_ok(), "{:?}", parsed.diagnostics);
    let results = eval::evaluate(&parsed.recipe, &t).unwrap();
    let listed: Vec<String> = results
        .missing_cells
        .iter()
        .map(|c| format!("{} {} {:?} '{}'", c.address, c.column, c.kind, c.content))
        .collect();
    // In the order the recipe names the columns: m (behind m2) first.
    assert_eq!(
        listed,
        [
            "deliveries!G3 m TextInNumbers 'n/a'",
            "deliveries!A4 w Blank ''"
        ]
    );
}

/// An outlier of a `let` names the input cell behind it and the number
/// as the input has it (a `let` built from one data column, used twice,
/// is still that column's); 100 is beyond Tukey's (1977) fences of
/// 1, 2, 3, 4, 100 (hinges 2 and 4).
#[test]
fn outliers_of_a_let_name_the_input_cell_behind_it() {
    let (_dir, t) = table("id,x\na,1\nb,2\nc,3\nd,4\ne,100\n");
    let source = "let x2 = x * 2\nlet x3 = x2 + x\npanel \"P\" of x2, x3:\n";
    let parsed = recipe::parse_and_check(source, Some(&t.headers()));
    assert!(parsed.is_ok(), "{:?}", parsed.diagnostics);
    let results = eval::evaluate(&parsed.recipe, &t).unwrap();
    let Block::Panel { entries, .. } = &results.blocks[0] else {
        panic!("a panel")
    };
    let flagged: Vec<String> = entries
        .iter()
        .flat_map(|e| &e.robustness.outliers_wide)
        .map(|f| format!("{} {:?} {}", f.address, f.address.source_value, f.value))
        .collect();
    assert_eq!(
        flagged,
        [
            "deliveries!B6 Some(100.0) 200",
            "deliveries!B6 Some(100.0) 300"
        ]
    );
}

/// How a reason is reached.
enum Reach {
    /// By a recipe the checker accepts.
    Recipe,
    /// Only past the checker, which refuses the recipe first (the evaluator
    /// still gives the reason rather than a wrong value or a panic).
    PastTheChecker,
}

/// Every reason a value can be missing, each with a recipe over DELIVERIES
/// that gives it (`change` compares with a previous `mean(w)` of 0).
/// `Reason::NoRows` is written by the sheets, not the evaluator: see
/// `tests/workbook_print.rs` (a group with no rows says "no rows").
const REASONS: &[(&str, &str, Reach)] = &[
    (
        "no values",
        "figures \"R\":\n    v = mean(status)\n",
        Reach::Recipe,
    ),
    (
        "constant column",
        "figures \"R\":\n    v = skewness(k)\n",
        Reach::Recipe,
    ),
    (
        "too few values",
        "figures \"R\":\n    v = sd(if x > 4 then w else w / 0)\n",
        Reach::Recipe,
    ),
    (
        "zero iqr",
        "figures \"R\":\n    v = bowley(k)\n",
        Reach::Recipe,
    ),
    ("zero sd", "panel \"P\" of k:\n", Reach::Recipe),
    ("zero mad", "panel \"P\" of k:\n", Reach::Recipe),
    (
        "beyond double range",
        "figures \"R\":\n    v = variance(x * 1e300)\n",
        Reach::Recipe,
    ),
    (
        "hinges only quartiles",
        "figures \"R\":\n    v = percentile(w, count(w) * 22.5, hinges)\n",
        Reach::Recipe,
    ),
    (
        "out of range",
        "figures \"R\":\n    v = quartile(w, count(w))\n",
        Reach::Recipe,
    ),
    (
        "not finite",
        "figures \"R\":\n    v = mean(w) / 0\n",
        Reach::Recipe,
    ),
    (
        "not true or false",
        "check \"c\" warn: if mean(w) > 0 then 1 else 2\n",
        Reach::PastTheChecker,
    ),
    (
        "wrong kind",
        "figures \"R\":\n    v = -modes(w)\n",
        Reach::PastTheChecker,
    ),
    (
        "cannot combine",
        "figures \"R\":\n    v = modes(w) + 1\n",
        Reach::PastTheChecker,
    ),
    (
        "unknown function",
        "figures \"R\":\n    v = nonesuch(w)\n",
        Reach::PastTheChecker,
    ),
    (
        "argument not one number",
        "figures \"R\":\n    v = percentile(w, modes(w))\n",
        Reach::PastTheChecker,
    ),
    (
        "needs date",
        "figures \"R\":\n    v = year_of(1)\n",
        Reach::PastTheChecker,
    ),
    (
        "needs number",
        "figures \"R\":\n    v = abs(modes(w))\n",
        Reach::PastTheChecker,
    ),
    (
        "change needs one number",
        "figures \"R\":\n    v = change(modes(w))\n",
        Reach::PastTheChecker,
    ),
    (
        "no previous",
        "figures \"R\" per depot:\n    v = change(mean(w))\n",
        Reach::Recipe,
    ),
    (
        "previous is zero",
        "figures \"R\":\n    v = change(mean(w))\n",
        Reach::Recipe,
    ),
    (
        "share needs rows",
        "figures \"R\":\n    v = share(1 > 0)\n",
        Reach::PastTheChecker,
    ),
    (
        "per row",
        "check \"c\" warn: w > 1 and 1 > 0\n",
        Reach::PastTheChecker,
    ),
];

/// The name of a reason's variant. The match is exhaustive, so a new
/// reason does not compile until it is named here, and the test below
/// then asks for a case in REASONS. The statistics core's guards on an
/// argument's range share one name outside REASON_NAMES: a recipe never
/// reaches them, since the evaluator holds each parameter to its range
/// first (`out of range`); the core's unit tests reach each of them.
fn reason_name(reason: &eval::Reason) -> &'static str {
    use eval::Reason as R;
    use sheaf::stats::Undefined as U;
    match reason {
        R::Stat(U::NoValues) => "no values",
        R::Stat(U::ConstantColumn) => "constant column",
        R::Stat(U::TooFewValues { .. }) => "too few values",
        R::Stat(U::ZeroSd) => "zero sd",
        R::Stat(U::ZeroIqr) => "zero iqr",
        R::Stat(U::ZeroMad) => "zero mad",
        R::Stat(U::BeyondDoubleRange) => "beyond double range",
        R::Stat(
            U::NoSuchQuartile(_)
            | U::LevelOutside(_)
            | U::NoSuchQuantileType(_)
            | U::CutOutside(_)
            | U::NegativeFenceFactor(_)
            | U::NoBins
            | U::ShareOutside(_)
            | U::TooFewAroundPercentile { .. },
        ) => "argument out of its range, caught first as out of range",
        R::Stat(U::HingesOnlyQuartiles) => "hinges only quartiles",
        R::NoRows => "no rows",
        R::NotFinite => "not finite",
        R::NotTrueOrFalse => "not true or false",
        R::WrongKind => "wrong kind",
        R::CannotCombine(_) => "cannot combine",
        R::UnknownFunction(_) => "unknown function",
        R::ArgumentNotOneNumber(_) => "argument not one number",
        R::OutOfRange { .. } => "out of range",
        R::NeedsDate(_) => "needs date",
        R::NeedsNumber(_) => "needs number",
        R::ChangeNeedsOneNumber => "change needs one number",
        R::NoPrevious => "no previous",
        R::PreviousIsZero => "previous is zero",
        R::ShareNeedsRows => "share needs rows",
        R::PerRow => "per row",
    }
}

/// Every variant's name: what `reason_name` gives, listed once more so the
/// test can ask that each has a case.
const REASON_NAMES: &[&str] = &[
    "no values",
    "constant column",
    "too few values",
    "zero sd",
    "zero iqr",
    "zero mad",
    "beyond double range",
    "hinges only quartiles",
    "no rows",
    "not finite",
    "not true or false",
    "wrong kind",
    "cannot combine",
    "unknown function",
    "argument not one number",
    "out of range",
    "needs date",
    "needs number",
    "change needs one number",
    "no previous",
    "previous is zero",
    "share needs rows",
    "per row",
];

/// Every reason anywhere in a run's results.
fn reasons_in(results: &eval::Results) -> Vec<eval::Reason> {
    let undefined = |v: &One| match v {
        One::Undefined(why) => Some(why.clone()),
        _ => None,
    };
    let mut found = Vec::new();
    for block in &results.blocks {
        match block {
            Block::Figures { rows, .. } => {
                found.extend(rows.iter().flat_map(|r| &r.values).filter_map(undefined));
            }
            Block::Panel { entries, .. } => {
                for e in entries {
                    found.extend(e.figures.iter().filter_map(undefined));
                    let r = &e.robustness;
                    let ones = [&r.gap_in_sd, &r.gap_in_iqr, &r.mean_without, &r.sd_change];
                    found.extend(ones.into_iter().filter_map(undefined));
                    found.extend(r.fences_undefined.clone());
                    found.extend(r.modified_z.clone().err());
                    found.extend(r.mean_influence.clone().err());
                    found.extend(r.skewness.clone().err());
                    found.extend(r.bootstrap.clone().err());
                }
            }
        }
    }
    found.extend(results.checks.iter().filter_map(|c| c.note.clone()));
    found
}

#[test]
fn every_reason_for_a_missing_value_is_reached() {
    let (_dir, t) = table(DELIVERIES);
    let previous: eval::Previous = [(("mean(w)".to_string(), "(all rows)".to_string()), 0.0)]
        .into_iter()
        .collect();
    let mut wrong = Vec::new();
    for (name, source, reach) in REASONS {
        let checked = recipe::parse_and_check(source, Some(&t.headers()));
        let parsed = match reach {
            Reach::Recipe if !checked.is_ok() => {
                wrong.push(format!("{name}: refused: {:?}", checked.diagnostics));
                continue;
            }
            Reach::Recipe => checked,
            Reach::PastTheChecker if checked.is_ok() => {
                wrong.push(format!(
                    "{name}: the checker accepts {source:?}; say Recipe"
                ));
                continue;
            }
            Reach::PastTheChecker => recipe::parse(source),
        };
        assert!(
            parsed.diagnostics.is_empty(),
            "{name}: {:?}",
            parsed.diagnostics
        );
        let results = eval::evaluate_against(&parsed.recipe, &t, Some(previous.clone())).unwrap();
        let found = reasons_in(&results);
        if !found.iter().any(|r| reason_name(r) == *name) {
            wrong.push(format!("{name}: {source:?} gave {found:?}"));
        }
    }
    let cased: Vec<&str> = REASONS.iter().map(|(name, _, _)| *name).collect();
    for name in REASON_NAMES {
        if !cased.contains(name) && *name != "no rows" {
            wrong.push(format!("no case reaches `{name}`"));
        }
    }
    assert!(wrong.is_empty(), "{}", wrong.join("\n"));
}

/// The largest panel a sheet holds is accepted, one (group, column) more
/// is not: 87,380 groups of 12 columns are exactly the sheet's entries
/// (MAX_SHEET_ENTRIES). A histogram per group after the panel makes the
/// accepted recipe stop in the sizing walk too, before any figure.
#[test]
fn a_panel_of_exactly_a_sheet_is_accepted_and_one_more_column_is_not() {
    let groups = 87_380;
    assert_eq!(groups * 12, eval::MAX_SHEET_ENTRIES);
    let (_dir, t) = table(&ids(groups));
    let lets: String = (0..12).map(|i| format!("let x{i} = x + {i}\n")).collect();
    let panel = |n: usize| {
        let columns: Vec<String> = (0..n).map(|i| format!("x{i}")).collect();
        format!(
            "{lets}panel \"P\" of {} per id:\nhistogram x per id\n",
            columns.join(", ")
        )
    };
    let fits = run_recipe(&panel(12), &t, None).unwrap_err();
    assert!(fits.contains("the charts to 87380"), "{fits}");
    let source = panel(12).replace("of x0,", "of x, x0,");
    let too_many = run_recipe(&source, &t, None).unwrap_err();
    assert!(
        too_many.contains("would have 1135940 (group, column) rows"),
        "{too_many}"
    );
}

/// The Checks sheet's rows are counted as the recipe goes (each check's
/// overall result, then one per group), and the count is held to the
/// sheet: 240 checks per 4,368 groups fill it exactly (240 x 4,369 =
/// MAX_SHEET_ENTRIES) and are accepted; one more check (one more row) is
/// refused. A histogram per group after the checks stops the accepted
/// recipe in the sizing walk, before any figure.
#[test]
fn checks_fill_a_sheet_exactly_and_one_more_row_is_refused() {
    let groups = 4_368;
    assert_eq!(240 * (groups + 1), eval::MAX_SHEET_ENTRIES);
    let (_dir, t) = table(&ids(groups));
    let checks: String = (0..240)
        .map(|i| format!("check \"c{i}\" warn per id: min(x) >= 0\n"))
        .collect();
    let fits = run_recipe(&format!("{checks}histogram x per id\n"), &t, None).unwrap_err();
    assert!(fits.contains("the charts to 4368"), "{fits}");
    let one_more = format!("{checks}check \"overall\" warn: min(x) >= 0\nhistogram x per id\n");
    let refused = run_recipe(&one_more, &t, None).unwrap_err();
    assert!(
        refused.contains("check \"overall\" brings the checks to 1048561 results"),
        "{refused}"
    );
}

/// At most MAX_CHARTS charts: a box plot and a histogram per group of 499
/// make 500 and are drawn; one histogram more is refused, naming it.
#[test]
fn charts_fill_their_limit_exactly_and_one_more_is_refused() {
    assert_eq!(eval::MAX_CHARTS, 500);
    let (_dir, t) = table(&ids(499));
    let charts = "boxplot x per id\nhistogram x per id\n";
    assert!(run_recipe(charts, &t, None).is_ok());
    let refused = run_recipe(&format!("{charts}histogram x\n"), &t, None).unwrap_err();
    assert!(
        refused.contains("the histogram of x brings the charts to 501"),
        "{refused}"
    );
}
