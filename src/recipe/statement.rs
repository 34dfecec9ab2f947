//! Statement parsers (nom), one line each, and the grouping of indented
//! body lines under `panel` and `figures` headers.

use nom::Parser;
use nom::character::complete::{char, digit1, space0};

use super::ast::*;
use super::diagnostic::Diagnostic;
use super::expr::expression;
use super::lines::Line;
use super::syntax::*;

/// Turns a plain no-match of `parser` into "expected WHAT, found ...".
fn need<'a, T>(
    input: &'a str,
    what: &str,
    parser: impl FnOnce(&'a str) -> PResult<'a, T>,
) -> PResult<'a, T> {
    parser(input).map_err(|e| match e {
        nom::Err::Error(_) => {
            let at = input.trim_start();
            nom::Err::Failure(SyntaxError {
                offset: offset_of(at),
                message: format!("expected {what}, found {}", describe(next_token(at))),
                help: None,
            })
        }
        other => other,
    })
}

/// The rest of the line must be empty.
fn end_of_line<'a>(input: &'a str, what_else: &str) -> PResult<'a, ()> {
    let (rest, _) = space0(input)?;
    if rest.is_empty() {
        return Ok((rest, ()));
    }
    failure(
        rest,
        format!(
            "unexpected {} here; expected {what_else}",
            describe(next_token(rest))
        ),
        None,
    )
}

fn spanned_string(input: &str) -> PResult<'_, Spanned<String>> {
    let start = input.trim_start();
    let (rest, value) = string_literal(input)?;
    Ok((
        rest,
        Spanned {
            value,
            span: span_between(start, rest),
        },
    ))
}

/// A column: bare identifier (not a keyword) or braced header text.
pub fn column(input: &str) -> PResult<'_, ColumnRef> {
    let (input, _) = space0(input)?;
    if input.starts_with('{') {
        let (rest, name) = braced_name(input)?;
        return Ok((
            rest,
            ColumnRef {
                name: name.to_string(),
                braced: true,
                span: span_between(input, rest),
            },
        ));
    }
    let (rest, name) = identifier(input)?;
    if KEYWORDS.contains(&name) {
        return no_match(input);
    }
    Ok((
        rest,
        ColumnRef {
            name: name.to_string(),
            braced: false,
            span: span_between(input, rest),
        },
    ))
}

/// `a, b, c`; stops before a `,` that is followed by `stop_before` (a keyword).
fn column_list<'a>(
    input: &'a str,
    stop_before: Option<&'static str>,
) -> PResult<'a, Vec<ColumnRef>> {
    let (mut rest, first) = need(input, "a column name", column)?;
    let mut columns = vec![first];
    while let Ok((after_comma, _)) = ws(char::<&str, SyntaxError>(',')).parse(rest) {
        if stop_before.is_some_and(|word| keyword(word)(after_comma).is_ok()) {
            break;
        }
        let (after, next) = need(after_comma, "a column name after `,`", column)?;
        columns.push(next);
        rest = after;
    }
    Ok((rest, columns))
}

fn optional_per<'a>(
    input: &'a str,
    stop_before: Option<&'static str>,
) -> PResult<'a, Vec<ColumnRef>> {
    match keyword("per")(input) {
        Ok((rest, _)) => column_list(rest, stop_before),
        Err(_) => Ok((input, Vec::new())),
    }
}

fn optional_where(input: &str) -> PResult<'_, Option<Expr>> {
    match keyword("where")(input) {
        Ok((rest, _)) => {
            need(rest, "a condition after `where`", expression).map(|(r, e)| (r, Some(e)))
        }
        Err(_) => Ok((input, None)),
    }
}

fn block_colon(input: &str) -> PResult<'_, ()> {
    let (rest, _) = space0(input)?;
    match rest.strip_prefix(':') {
        Some(rest) => end_of_line(rest, "the end of the line after `:`"),
        None => failure(
            rest,
            format!(
                "expected `per`, `where` or `:` to end the block header, found {}",
                describe(next_token(rest))
            ),
            None,
        ),
    }
}

fn title(input: &str) -> PResult<'_, StatementKind> {
    let (rest, text) = need(input, "the title in double quotes", spanned_string)?;
    let (rest, _) = end_of_line(rest, "the end of the line after the title")?;
    Ok((rest, StatementKind::Title(text)))
}

/// The words of the `input` line's settings, for messages.
const INPUT_SETTINGS: &str = "`sheet \"NAME\"`, `header row N`, `decimal comma`, `decimal point`, `thousands \".\"`, `thousands none`, `encoding \"NAME\"`, `keep summary rows` or `merge similar keys`";

fn input_statement(input: &str) -> PResult<'_, StatementKind> {
    let (mut sheet, mut header_row) = (None, None);
    let mut reading = Vec::new();
    let mut rest = input;
    loop {
        let start = rest.trim_start();
        let (after, word) = need(rest, INPUT_SETTINGS, |i| ws(identifier).parse(i))?;
        rest = match word {
            "sheet" => {
                let (after, name) = need(after, "the sheet name in double quotes", spanned_string)?;
                sheet = Some(name);
                after
            }
            "header" => {
                let (after, _) = need(after, "`row` after `header`", keyword("row"))?;
                let (after, _) = space0(after)?;
                let (after_digits, digits) = need(after, "the header row number", digit1)?;
                match digits.parse::<u32>() {
                    Ok(n) if n >= 1 => {
                        header_row = Some(Spanned {
                            value: n,
                            span: span_between(after, after_digits),
                        })
                    }
                    _ => {
                        return failure(
                            after,
                            "the header row is counted from 1",
                            Some("write `header row 1` for the first row"),
                        );
                    }
                }
                after_digits
            }
            "decimal" | "thousands" | "encoding" | "keep" | "merge" => {
                let (after, setting) = read_setting(word, after)?;
                reading.push(Spanned {
                    value: setting,
                    span: span_between(start, after),
                });
                after
            }
            other => {
                return failure(
                    start,
                    format!("unknown input setting `{other}`"),
                    Some(&format!(
                        "input settings are {INPUT_SETTINGS}, separated by commas"
                    )),
                );
            }
        };
        match ws(char::<&str, SyntaxError>(',')).parse(rest) {
            Ok((after, _)) => rest = after,
            Err(_) => break,
        }
    }
    let (rest, _) = end_of_line(
        rest,
        "`,` and another input setting, or the end of the line",
    )?;
    Ok((
        rest,
        StatementKind::Input {
            sheet,
            header_row,
            reading,
        },
    ))
}

/// The rest of a reading setting that opens with `word`.
fn read_setting<'a>(word: &str, input: &'a str) -> PResult<'a, ReadSetting> {
    match word {
        "decimal" => {
            let (rest, mark) = need(input, "`comma` or `point` after `decimal`", |i| {
                ws(identifier).parse(i)
            })?;
            match mark {
                "comma" => Ok((rest, ReadSetting::Decimal(','))),
                "point" => Ok((rest, ReadSetting::Decimal('.'))),
                other => failure(
                    input.trim_start(),
                    format!("expected `comma` or `point` after `decimal`, found `{other}`"),
                    Some("write `decimal comma` for numbers such as 1,5"),
                ),
            }
        }
        "thousands" => {
            if let Ok((rest, _)) = keyword("none")(input) {
                return Ok((rest, ReadSetting::Thousands(None)));
            }
            let at = input.trim_start();
            let (rest, mark) = need(
                input,
                "the thousands mark in double quotes, or `none`",
                spanned_string,
            )?;
            let mut chars = mark.value.chars();
            match (chars.next(), chars.next()) {
                (Some(c), None) if matches!(c, ',' | '.' | ' ' | '\'' | '\u{a0}' | '\u{202f}') => {
                    Ok((rest, ReadSetting::Thousands(Some(c))))
                }
                _ => failure(
                    at,
                    format!("`{}` cannot group thousands", mark.value),
                    Some(
                        "write one of `thousands \",\"`, `thousands \".\"`, `thousands \" \"`, `thousands \"'\"` or `thousands none`",
                    ),
                ),
            }
        }
        "encoding" => {
            let (rest, label) = need(
                input,
                "the encoding in double quotes, such as \"windows-1252\"",
                spanned_string,
            )?;
            Ok((rest, ReadSetting::Encoding(label.value)))
        }
        "keep" => {
            let (rest, _) = need(input, "`summary rows` after `keep`", keyword("summary"))?;
            let (rest, _) = need(rest, "`rows` after `keep summary`", keyword("rows"))?;
            Ok((rest, ReadSetting::KeepSummaryRows))
        }
        _ => {
            let (rest, _) = need(input, "`similar keys` after `merge`", keyword("similar"))?;
            let (rest, _) = need(rest, "`keys` after `merge similar`", keyword("keys"))?;
            Ok((rest, ReadSetting::MergeSimilarKeys))
        }
    }
}

/// `header NAME or NAME ...`: the names a column's header may have.
fn header_statement(input: &str) -> PResult<'_, StatementKind> {
    let (mut rest, first) = need(input, "the column's name in the recipe", column)?;
    let mut names = vec![first];
    while let Ok((after, _)) = keyword("or")(rest) {
        let (after, next) = need(after, "another header name after `or`", column)?;
        names.push(next);
        rest = after;
    }
    if names.len() < 2 {
        return failure(
            rest.trim_start(),
            "a `header` line names the column and at least one other header it may have",
            Some("write `header weight_mg or {Weight (mg)} or {Weight [mg]}`"),
        );
    }
    let (rest, _) = end_of_line(rest, "`or` and another header name, or the end of the line")?;
    Ok((rest, StatementKind::Header { names }))
}

/// How a `name = expression` line is worded in its messages.
struct Binding {
    /// What is expected where the name should be.
    name: &'static str,
    /// What the `=` follows, as in "expected `=` after the name".
    after: &'static str,
    help: &'static str,
    /// Whether a keyword may be the name (a `let` column may not).
    refuse_keywords: bool,
}

/// `name = expression` through the end of the line: a `let` or a figure.
fn binding<'a>(input: &'a str, wording: &Binding) -> PResult<'a, (Spanned<String>, Expr)> {
    let (rest, _) = space0(input)?;
    let start = rest;
    let (rest, name) = need(rest, wording.name, identifier)?;
    if wording.refuse_keywords && KEYWORDS.contains(&name) {
        return failure(
            start,
            format!("`{name}` is a keyword and cannot name a column"),
            Some("choose another name"),
        );
    }
    let name = Spanned {
        value: name.to_string(),
        span: span_between(start, rest),
    };
    let (rest, _) = space0(rest)?;
    let Some(rest) = rest.strip_prefix('=').filter(|r| !r.starts_with('=')) else {
        return failure(
            rest,
            format!(
                "expected `=` after {}, found {}",
                wording.after,
                describe(next_token(rest))
            ),
            Some(wording.help),
        );
    };
    let (rest, value) = need(rest, "an expression after `=`", expression)?;
    let (rest, _) = end_of_line(rest, "an operator or the end of the line")?;
    Ok((rest, (name, value)))
}

fn let_statement(input: &str) -> PResult<'_, StatementKind> {
    let wording = Binding {
        name: "the name of the new column",
        after: "the name",
        help: "write `let name = expression`",
        refuse_keywords: true,
    };
    let (rest, (name, value)) = binding(input, &wording)?;
    Ok((rest, StatementKind::Let { name, value }))
}

fn rows_statement(input: &str) -> PResult<'_, StatementKind> {
    let (rest, _) = need(input, "`where` after `rows`", keyword("where"))?;
    let (rest, condition) = need(rest, "a condition after `rows where`", expression)?;
    let (rest, _) = end_of_line(rest, "an operator or the end of the line")?;
    Ok((rest, StatementKind::RowsWhere(condition)))
}

fn panel_header(input: &str) -> PResult<'_, StatementKind> {
    let (rest, name) = need(input, "the panel's name in double quotes", spanned_string)?;
    let (rest, _) = need(rest, "`of` and the columns to summarise", keyword("of"))?;
    let (rest, columns) = column_list(rest, None)?;
    let (rest, per) = optional_per(rest, None)?;
    let (rest, filter) = optional_where(rest)?;
    let (rest, _) = block_colon(rest)?;
    Ok((
        rest,
        StatementKind::Panel {
            name,
            columns,
            per,
            filter,
        },
    ))
}

fn figures_header(input: &str) -> PResult<'_, StatementKind> {
    let (rest, name) = need(
        input,
        "the name of the figures block in double quotes",
        spanned_string,
    )?;
    let (rest, per) = optional_per(rest, None)?;
    let (rest, filter) = optional_where(rest)?;
    let (rest, _) = block_colon(rest)?;
    Ok((
        rest,
        StatementKind::Figures {
            name,
            per,
            filter,
            figures: Vec::new(),
        },
    ))
}

fn figure_line(input: &str) -> PResult<'_, Figure> {
    let wording = Binding {
        name: "a figure as `name = expression`",
        after: "the figure's name",
        help: "write `name = expression`",
        refuse_keywords: false,
    };
    let (rest, (name, value)) = binding(input, &wording)?;
    Ok((rest, Figure { name, value }))
}

fn check_statement(input: &str) -> PResult<'_, StatementKind> {
    let (rest, name) = need(input, "the check's name in double quotes", spanned_string)?;
    let (after, level) = need(rest, "`warn` or `fail`", |i| ws(identifier).parse(i))?;
    let level = match level {
        "warn" => CheckLevel::Warn,
        "fail" => CheckLevel::Fail,
        other => {
            return failure(
                rest.trim_start(),
                format!("expected `warn` or `fail`, found `{other}`"),
                Some("`warn` marks the run, `fail` also makes it exit with status 1"),
            );
        }
    };
    let (rest, per) = optional_per(after, None)?;
    let (rest, _) = space0(rest)?;
    let Some(rest) = rest.strip_prefix(':') else {
        return failure(
            rest,
            format!(
                "expected `per` or `:` before the condition, found {}",
                describe(next_token(rest))
            ),
            None,
        );
    };
    let (rest, condition) = need(rest, "the condition to check after `:`", expression)?;
    let (rest, _) = end_of_line(rest, "an operator or the end of the line")?;
    Ok((
        rest,
        StatementKind::Check {
            name,
            level,
            per,
            condition,
        },
    ))
}

fn histogram_statement(input: &str) -> PResult<'_, StatementKind> {
    let (rest, column) = need(input, "the column to draw", column)?;
    let (rest, per) = optional_per(rest, Some("bins"))?;
    let mut bins = None;
    let mut rest = rest;
    if let Ok((after_comma, _)) = ws(char::<&str, SyntaxError>(',')).parse(rest) {
        let (after, _) = need(after_comma, "`bins` after `,`", keyword("bins"))?;
        let (after, _) = space0(after)?;
        let start = after;
        let (after, value) = if after.starts_with(|c: char| c.is_ascii_digit()) {
            let (after, digits) = digit1(after)?;
            match digits.parse::<u32>() {
                Ok(n) if n >= 1 => (after, Bins::Count(n)),
                _ => {
                    return failure(
                        start,
                        "the number of bins must be a whole number from 1",
                        None,
                    );
                }
            }
        } else {
            let (after, word) = need(
                after,
                "a bin rule (sturges, scott, freedman_diaconis) or a number",
                identifier,
            )?;
            (after, Bins::Rule(word.to_string()))
        };
        bins = Some(Spanned {
            value,
            span: span_between(start, after),
        });
        rest = after;
    }
    let (rest, _) = end_of_line(rest, "`per`, `, bins ...` or the end of the line")?;
    Ok((rest, StatementKind::Histogram { column, per, bins }))
}

fn boxplot_statement(input: &str) -> PResult<'_, StatementKind> {
    let (rest, column) = need(input, "the column to draw", column)?;
    let (rest, per) = optional_per(rest, None)?;
    let (rest, _) = end_of_line(rest, "`per` or the end of the line")?;
    Ok((rest, StatementKind::Boxplot { column, per }))
}

/// The words that begin a statement (`grammar/sheaf.peg` lists the same).
pub const STATEMENT_WORDS: &[&str] = &[
    "title",
    "input",
    "header",
    "let",
    "rows",
    "panel",
    "figures",
    "check",
    "histogram",
    "boxplot",
    "period",
    "drift",
    "noise",
    "label",
];

/// `label COLUMN "TEXT"`: how a column is named in titles, axes and tables.
fn label_statement(input: &str) -> PResult<'_, StatementKind> {
    let (rest, column) = need(input, "the column to label", column)?;
    let (rest, text) = need(
        rest,
        "the label in double quotes, such as \"Parcel weight (kg)\"",
        spanned_string,
    )?;
    let (rest, _) = end_of_line(rest, "the end of the line after the label")?;
    Ok((rest, StatementKind::Label { column, text }))
}

fn period_statement(input: &str) -> PResult<'_, StatementKind> {
    if let Ok((after, _)) = keyword("from")(input) {
        let (rest, c) = need(
            after,
            "the column that holds each row's date or period, such as `period from shipped`",
            column,
        )?;
        let (rest, _) = end_of_line(rest, "the end of the line after the period column")?;
        return Ok((rest, StatementKind::PeriodFrom(c)));
    }
    let (rest, text) = need(
        input,
        "the period in double quotes, such as \"2026-10\", or `from COLUMN`",
        spanned_string,
    )?;
    let (rest, _) = end_of_line(rest, "the end of the line after the period")?;
    Ok((rest, StatementKind::Period(text)))
}

fn drift_statement(input: &str) -> PResult<'_, StatementKind> {
    let start = input.trim_start();
    let (rest, (value, percent)) = need(
        input,
        "the share of change to flag, such as 10%",
        number_literal,
    )?;
    let span = span_between(start, rest);
    let (rest, _) = end_of_line(rest, "the end of the line after the drift threshold")?;
    Ok((
        rest,
        StatementKind::Drift(Spanned {
            value: (value, percent),
            span,
        }),
    ))
}

/// `noise 3 se`: the number of standard errors, then the word `se`.
fn noise_statement(input: &str) -> PResult<'_, StatementKind> {
    let start = input.trim_start();
    let (rest, (value, percent)) = need(
        input,
        "how many standard errors of the change count as noise, such as `noise 2 se`",
        number_literal,
    )?;
    let span = span_between(start, rest);
    if percent {
        return failure(
            start,
            "the noise rule is a number of standard errors, not a percentage",
            Some("write `noise 2 se` (the relative threshold is `drift 10%`)"),
        );
    }
    let (rest, _) = need(
        rest,
        "`se` (standard errors) after the number",
        keyword("se"),
    )?;
    let (rest, _) = end_of_line(rest, "the end of the line after `se`")?;
    Ok((rest, StatementKind::Noise(Spanned { value, span })))
}

fn statement_line(input: &str) -> PResult<'_, StatementKind> {
    let (rest, word) = match identifier(input) {
        Ok(found) => found,
        Err(_) => {
            let help = if input.starts_with('=') {
                Some("a recipe line starts with a statement word, such as `let` or `figures`")
            } else {
                None
            };
            return failure(
                input,
                format!(
                    "expected a statement, found {}",
                    describe(next_token(input))
                ),
                help,
            );
        }
    };
    match word {
        "title" => title(rest),
        "input" => input_statement(rest),
        "header" => header_statement(rest),
        "let" => let_statement(rest),
        "rows" => rows_statement(rest),
        "panel" => panel_header(rest),
        "figures" => figures_header(rest),
        "check" => check_statement(rest),
        "histogram" => histogram_statement(rest),
        "boxplot" => boxplot_statement(rest),
        "period" => period_statement(rest),
        "drift" => drift_statement(rest),
        "noise" => noise_statement(rest),
        "label" => label_statement(rest),
        other => {
            let suggestion = super::suggest::closest(other, STATEMENT_WORDS.iter().copied());
            let help = match suggestion {
                Some(s) => format!(
                    "did you mean `{s}`? statements are: {}",
                    STATEMENT_WORDS.join(", ")
                ),
                None => format!("statements are: {}", STATEMENT_WORDS.join(", ")),
            };
            failure(input, format!("unknown statement `{other}`"), Some(&help))
        }
    }
}

fn to_diagnostic(error: nom::Err<SyntaxError>, line: &Line) -> Diagnostic {
    let e = match error {
        nom::Err::Error(e) | nom::Err::Failure(e) => e,
        nom::Err::Incomplete(_) => SyntaxError {
            offset: line.offset,
            message: String::new(),
            help: None,
        },
    };
    let token_len = {
        let local = e.offset.saturating_sub(line.offset).min(line.text.len());
        next_token(&line.text[local..]).len()
    };
    let message = if e.message.is_empty() {
        "this line could not be read".to_string()
    } else {
        e.message
    };
    let mut d = Diagnostic::new(Span::new(e.offset, e.offset + token_len), message);
    if let Some(help) = e.help {
        d = d.with_help(help);
    }
    d
}

fn parse_with<T>(
    line: &Line,
    parser: impl FnOnce(&str) -> PResult<'_, T>,
) -> Result<T, Diagnostic> {
    parser(line.text)
        .map(|(_, v)| v)
        .map_err(|e| to_diagnostic(e, line))
}

/// Parses the lines; a bad line is reported and parsing goes on at the next.
pub fn parse_lines(lines: &[Line], diagnostics: &mut Vec<Diagnostic>) -> Recipe {
    let mut recipe = Recipe::default();
    let mut i = 0;
    while i < lines.len() {
        let line = &lines[i];
        i += 1;
        if line.indent > 0 {
            diagnostics.push(
                Diagnostic::new(line.span(), "this line is indented but no block is open")
                    .with_help("only the lines under a `figures` or `panel` header are indented; start statements at the margin"),
            );
            continue;
        }
        let mut statement = match parse_with(line, statement_line) {
            Ok(kind) => Statement {
                kind,
                span: line.span(),
            },
            Err(d) => {
                diagnostics.push(d);
                // Skip the body of a header that failed, so it is not reported line by line.
                while i < lines.len() && lines[i].indent > 0 {
                    i += 1;
                }
                continue;
            }
        };
        let body_start = i;
        while i < lines.len() && lines[i].indent > 0 {
            i += 1;
        }
        let body = &lines[body_start..i];
        match &mut statement.kind {
            StatementKind::Figures { figures, .. } => {
                for body_line in body {
                    match parse_with(body_line, figure_line) {
                        Ok(figure) => figures.push(figure),
                        Err(d) => diagnostics.push(d),
                    }
                }
                if body.is_empty() {
                    diagnostics.push(
                        Diagnostic::new(line.span(), "this figures block has no figures")
                            .with_help("indent lines of the form `name = expression` under it"),
                    );
                }
            }
            StatementKind::Panel { .. } => {
                if let Some(first) = body.first() {
                    diagnostics.push(
                        Diagnostic::new(first.span(), "a panel takes no lines under it")
                            .with_help("the panel's columns and groups go on its header line; use a `figures` block for figures of your own"),
                    );
                }
            }
            _ => {
                if let Some(first) = body.first() {
                    let help =
                        "only `figures` and `panel` headers (ending in `:`) take indented lines";
                    diagnostics.push(
                        Diagnostic::new(first.span(), "this line is indented but no block is open")
                            .with_help(help),
                    );
                }
            }
        }
        if let Some(last) = body.last() {
            statement.span = statement.span.to(last.span());
        }
        recipe.statements.push(statement);
    }
    recipe
}
