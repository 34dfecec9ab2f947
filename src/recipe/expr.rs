//! The expression parser (nom): precedence climbing from `if` and `or`
//! down to literals, columns and calls.
//!
//! Precedence, loosest first: `if A then B else C`; `or`; `and`; `not`;
//! comparisons (which do not chain); `+ -`; `* /`; unary `-`; `^` (right
//! associative, so `-2^2` is `-(2^2)`).

use nom::Parser;
use nom::branch::alt;
use nom::bytes::complete::tag;
use nom::character::complete::{char, space0};

use super::ast::{BinaryOp, ColumnRef, Expr, ExprKind, Spanned, UnaryOp};
use super::syntax::*;

pub fn expression(input: &str) -> PResult<'_, Expr> {
    let (after_space, _) = space0(input)?;
    if after_space.starts_with('=') && !after_space.starts_with("==") {
        return failure(
            after_space,
            "an expression does not start with `=`",
            Some("write the expression itself, without a leading `=`"),
        );
    }
    if keyword("if")(input).is_ok() {
        return nested(input, if_expression);
    }
    or_level(input)
}

fn if_expression(input: &str) -> PResult<'_, Expr> {
    let start = input.trim_start();
    let (rest, _) = keyword("if")(input)?;
    let (rest, condition) = expression(rest)?;
    let rest = expect_keyword(rest, "then", "after the condition of `if`")?;
    let (rest, then) = expression(rest)?;
    let rest = expect_keyword(
        rest,
        "else",
        "after the `then` branch; every `if` needs an `else`",
    )?;
    let (rest, otherwise) = expression(rest)?;
    let kind = ExprKind::If {
        condition: Box::new(condition),
        then: Box::new(then),
        otherwise: Box::new(otherwise),
    };
    Ok((
        rest,
        Expr {
            kind,
            span: span_between(start, rest),
        },
    ))
}

fn expect_keyword<'a>(
    input: &'a str,
    word: &'static str,
    context: &str,
) -> Result<&'a str, nom::Err<SyntaxError>> {
    match keyword(word)(input) {
        Ok((rest, _)) => Ok(rest),
        Err(_) => {
            let found = next_token(input);
            let at = input.trim_start();
            failure::<()>(
                at,
                format!("expected `{word}` {context}, found {}", describe(found)),
                None,
            )
            .map(|_| at)
        }
    }
}

/// One left-associative level: `operand (op operand)*`.
fn chain<'a>(
    input: &'a str,
    operand: fn(&'a str) -> PResult<'a, Expr>,
    operator: impl Fn(&'a str) -> PResult<'a, BinaryOp>,
) -> PResult<'a, Expr> {
    let (mut rest, mut left) = operand(input)?;
    let mut operands = 1;
    while let Ok((after_op, op)) = operator(rest) {
        operands += 1;
        if operands > MAX_CHAIN {
            return failure(
                rest.trim_start(),
                format!(
                    "more than {MAX_CHAIN} terms joined by `{}` in one expression",
                    op.symbol()
                ),
                Some("split it into steps with `let`"),
            );
        }
        let (after, right) = operand(after_op).map_err(|e| missing_operand(e, after_op, op))?;
        let span = left.span.to(right.span);
        left = Expr {
            kind: ExprKind::Binary {
                op,
                left: Box::new(left),
                right: Box::new(right),
            },
            span,
        };
        rest = after;
    }
    Ok((rest, left))
}

/// After an operator, a plain no-match becomes "expected a value after `op`".
fn missing_operand(error: nom::Err<SyntaxError>, at: &str, op: BinaryOp) -> nom::Err<SyntaxError> {
    match error {
        nom::Err::Error(e) if e.message.is_empty() => {
            let at = at.trim_start();
            nom::Err::Failure(SyntaxError {
                offset: offset_of(at),
                message: format!(
                    "expected a value after `{}`, found {}",
                    op.symbol(),
                    describe(next_token(at))
                ),
                help: None,
            })
        }
        other => other,
    }
}

fn or_level(input: &str) -> PResult<'_, Expr> {
    chain(input, and_level, |i| {
        keyword("or")(i).map(|(r, _)| (r, BinaryOp::Or))
    })
}

fn and_level(input: &str) -> PResult<'_, Expr> {
    chain(input, not_level, |i| {
        keyword("and")(i).map(|(r, _)| (r, BinaryOp::And))
    })
}

fn not_level(input: &str) -> PResult<'_, Expr> {
    if let Ok((rest, _)) = keyword("not")(input) {
        return prefixed(input.trim_start(), rest, UnaryOp::Not, not_level);
    }
    comparison(input)
}

/// A prefix operator, read at `start`, applied to what `operand` parses
/// from `rest` (one nesting level deeper).
fn prefixed<'a>(
    start: &'a str,
    rest: &'a str,
    op: UnaryOp,
    operand: impl FnOnce(&'a str) -> PResult<'a, Expr>,
) -> PResult<'a, Expr> {
    nested(rest, |rest| {
        let (rest, operand) = operand(rest)?;
        let kind = ExprKind::Unary {
            op,
            operand: Box::new(operand),
        };
        Ok((
            rest,
            Expr {
                kind,
                span: span_between(start, rest),
            },
        ))
    })
}

fn comparison_operator(input: &str) -> PResult<'_, BinaryOp> {
    let (rest, symbol) = ws(alt((
        tag("<="),
        tag(">="),
        tag("=="),
        tag("!="),
        tag("<>"),
        tag("<"),
        tag(">"),
        tag("="),
    )))
    .parse(input)?;
    let op = match symbol {
        "<=" => BinaryOp::LessEqual,
        ">=" => BinaryOp::GreaterEqual,
        "==" => BinaryOp::Equal,
        "!=" => BinaryOp::NotEqual,
        "<" => BinaryOp::Less,
        ">" => BinaryOp::Greater,
        "<>" => {
            return failure(
                input.trim_start(),
                "`<>` is not an operator here",
                Some("write `!=` for 'not equal'"),
            );
        }
        _ => {
            return failure(
                input.trim_start(),
                "a single `=` does not compare",
                Some("write `==` to compare two values"),
            );
        }
    };
    Ok((rest, op))
}

fn comparison(input: &str) -> PResult<'_, Expr> {
    let (rest, left) = additive(input)?;
    let (after_op, op) = match comparison_operator(rest) {
        Ok(found) => found,
        Err(nom::Err::Error(_)) => return Ok((rest, left)),
        Err(fatal) => return Err(fatal),
    };
    let (rest, right) = additive(after_op).map_err(|e| missing_operand(e, after_op, op))?;
    if comparison_operator(rest).is_ok() {
        return failure(
            rest.trim_start(),
            "comparisons do not chain",
            Some("write `a < b and b < c`"),
        );
    }
    let span = left.span.to(right.span);
    Ok((
        rest,
        Expr {
            kind: ExprKind::Binary {
                op,
                left: Box::new(left),
                right: Box::new(right),
            },
            span,
        },
    ))
}

/// One of two single-character operators, such as `+` and `-`.
fn either<'a>(
    (first, first_op): (char, BinaryOp),
    (second, second_op): (char, BinaryOp),
) -> impl Fn(&'a str) -> PResult<'a, BinaryOp> {
    move |i| {
        ws(alt((char(first), char(second))))
            .parse(i)
            .map(|(rest, c)| (rest, if c == first { first_op } else { second_op }))
    }
}

fn additive(input: &str) -> PResult<'_, Expr> {
    let operator = either(('+', BinaryOp::Add), ('-', BinaryOp::Subtract));
    chain(input, multiplicative, operator)
}

fn multiplicative(input: &str) -> PResult<'_, Expr> {
    let operator = either(('*', BinaryOp::Multiply), ('/', BinaryOp::Divide));
    chain(input, unary, operator)
}

fn unary(input: &str) -> PResult<'_, Expr> {
    if let Ok((rest, _)) = ws(char::<&str, SyntaxError>('-')).parse(input) {
        return prefixed(input.trim_start(), rest, UnaryOp::Negate, |rest| {
            unary(rest).map_err(|e| missing_operand(e, rest, BinaryOp::Subtract))
        });
    }
    power(input)
}

fn power(input: &str) -> PResult<'_, Expr> {
    let (rest, base) = primary(input)?;
    let Ok((after_op, _)) = ws(char::<&str, SyntaxError>('^')).parse(rest) else {
        return Ok((rest, base));
    };
    let (rest, exponent) =
        nested(after_op, unary).map_err(|e| missing_operand(e, after_op, BinaryOp::Power))?;
    let span = base.span.to(exponent.span);
    Ok((
        rest,
        Expr {
            kind: ExprKind::Binary {
                op: BinaryOp::Power,
                left: Box::new(base),
                right: Box::new(exponent),
            },
            span,
        },
    ))
}

fn primary(input: &str) -> PResult<'_, Expr> {
    let (input, _) = space0(input)?;
    let start = input;
    let spanned = |rest, kind| {
        Ok((
            rest,
            Expr {
                kind,
                span: span_between(start, rest),
            },
        ))
    };
    if let Some(after) = input.strip_prefix('(') {
        return nested(after, |inner| {
            let (rest, mut e) = expression(inner)?;
            let (rest, _) = space0(rest)?;
            match rest.strip_prefix(')') {
                Some(rest) => {
                    e.span = span_between(start, rest);
                    Ok((rest, e))
                }
                None => failure(
                    rest,
                    format!(
                        "expected `)` to close the `(`, found {}",
                        describe(next_token(rest))
                    ),
                    None,
                ),
            }
        });
    }
    if input.starts_with('"') {
        let (rest, text) = string_literal(input)?;
        return spanned(rest, ExprKind::Text(text));
    }
    if let Some(after) = input.strip_prefix('\'') {
        let text = after.split('\'').next().unwrap_or(after);
        return failure(
            input,
            "strings are written in double quotes, not single quotes",
            Some(&format!("write \"{text}\"")),
        );
    }
    if input.starts_with('{') {
        let (rest, name) = braced_name(input)?;
        let column = ColumnRef {
            name: name.to_string(),
            braced: true,
            span: span_between(start, rest),
        };
        return spanned(rest, ExprKind::Column(column));
    }
    if input.starts_with(|c: char| c.is_ascii_digit()) {
        let (rest, (value, percent)) = number_literal(input)?;
        return spanned(
            rest,
            if percent {
                ExprKind::Percent(value)
            } else {
                ExprKind::Number(value)
            },
        );
    }
    let Ok((rest, word)) = identifier(input) else {
        return no_match(input);
    };
    if KEYWORDS.contains(&word) {
        return failure(
            input,
            format!("`{word}` is a keyword, not a value"),
            Some(&format!(
                "a column with this name is written in braces: {{{word}}}"
            )),
        );
    }
    if word == DATE_WORD && rest.trim_start().starts_with('"') {
        return date_literal(start, rest);
    }
    let name_span = span_between(start, rest);
    if let Ok((after_open, _)) = ws(char::<&str, SyntaxError>('(')).parse(rest) {
        return nested(after_open, |inside| {
            let (rest, args) = arguments(inside)?;
            let function = Spanned {
                value: word.to_string(),
                span: name_span,
            };
            spanned(rest, ExprKind::Call { function, args })
        });
    }
    spanned(
        rest,
        ExprKind::Column(ColumnRef {
            name: word.to_string(),
            braced: false,
            span: name_span,
        }),
    )
}

/// The word before a date literal. It is not a keyword: a column may still
/// be called `date`, since a column is never followed by a string.
pub const DATE_WORD: &str = "date";

/// `date "2026-10-01"` after the word `date`: a day that exists, written
/// YYYY-MM-DD; anything else is refused at the string.
fn date_literal<'a>(start: &'a str, after_word: &'a str) -> PResult<'a, Expr> {
    let (at, _) = space0(after_word)?;
    let (rest, text) = string_literal(after_word)?;
    match crate::format::serial_from_calendar(&text) {
        Ok(serial) => Ok((
            rest,
            Expr {
                kind: ExprKind::Date(serial),
                span: span_between(start, rest),
            },
        )),
        Err(why) => failure(
            at,
            why,
            Some("write a day that exists as date \"YYYY-MM-DD\", such as date \"2026-10-01\""),
        ),
    }
}

/// Call arguments after the `(`, through the closing `)`.
fn arguments(input: &str) -> PResult<'_, Vec<Expr>> {
    let (rest, _) = space0(input)?;
    if let Some(rest) = rest.strip_prefix(')') {
        return Ok((rest, Vec::new()));
    }
    let mut args = Vec::new();
    let mut rest = rest;
    loop {
        let (after, arg) = expression(rest).map_err(|e| match e {
            nom::Err::Error(e) if e.message.is_empty() => nom::Err::Failure(SyntaxError {
                offset: e.offset,
                message: format!("expected an argument, found {}", describe(next_token(rest))),
                help: None,
            }),
            other => other,
        })?;
        args.push(arg);
        let (after, _) = space0(after)?;
        if let Some(after) = after.strip_prefix(',') {
            rest = after;
        } else if let Some(after) = after.strip_prefix(')') {
            return Ok((after, args));
        } else {
            let help = if after.starts_with(':') {
                Some("sheaf takes column names, not cell ranges: write mean(weight_kg)")
            } else {
                None
            };
            return failure(
                after,
                format!(
                    "expected `,` or `)` in the arguments, found {}",
                    describe(next_token(after))
                ),
                help,
            );
        }
    }
}
