//! Shared pieces of the nom parsers: the error type, spans, whitespace,
//! words, literals and the nesting guard.

use std::cell::Cell;

use nom::bytes::complete::{tag, take_while, take_while1};
use nom::character::complete::{char, digit1, one_of, space0};
use nom::combinator::{opt, recognize};
use nom::error::{ErrorKind, ParseError};
use nom::{IResult, Parser};

use super::ast::Span;

/// A parse failure at a byte offset. An empty message means "this
/// alternative did not match"; the statement layer then names what it found.
#[derive(Debug, Clone, PartialEq)]
pub struct SyntaxError {
    pub offset: usize,
    pub message: String,
    pub help: Option<String>,
}

impl<'a> ParseError<&'a str> for SyntaxError {
    fn from_error_kind(input: &'a str, _kind: ErrorKind) -> Self {
        SyntaxError {
            offset: offset_of(input),
            message: String::new(),
            help: None,
        }
    }

    fn append(_input: &'a str, _kind: ErrorKind, other: Self) -> Self {
        other
    }

    /// Of two failed alternatives, report the one that got further.
    fn or(self, other: Self) -> Self {
        if other.offset > self.offset || (other.offset == self.offset && self.message.is_empty()) {
            other
        } else {
            self
        }
    }
}

pub type PResult<'a, T> = IResult<&'a str, T, SyntaxError>;

/// A committed failure with a message: no other alternative is tried.
pub fn failure<T>(at: &str, message: impl Into<String>, help: Option<&str>) -> PResult<'static, T> {
    Err(nom::Err::Failure(SyntaxError {
        offset: offset_of(at),
        message: message.into(),
        help: help.map(str::to_string),
    }))
}

/// A plain "did not match" at `at`.
pub fn no_match<T>(at: &str) -> PResult<'static, T> {
    Err(nom::Err::Error(SyntaxError {
        offset: offset_of(at),
        message: String::new(),
        help: None,
    }))
}

thread_local! {
    /// Address of the recipe text being parsed, so any slice of it knows its offset.
    static BASE: Cell<usize> = const { Cell::new(0) };
    /// How deeply the expression parser has recursed.
    static NESTING: Cell<usize> = const { Cell::new(0) };
}

/// Most nesting (parentheses, unary operators, calls, if) one expression may have.
pub const MAX_NESTING: usize = 64;
/// Most operands one chain of a single operator level may have.
pub const MAX_CHAIN: usize = 100;

/// Runs `f` with offsets measured from the start of `source`.
pub fn with_source<T>(source: &str, f: impl FnOnce() -> T) -> T {
    let saved = BASE.with(|b| b.replace(source.as_ptr() as usize));
    NESTING.with(|n| n.set(0));
    let result = f();
    BASE.with(|b| b.set(saved));
    result
}

pub fn offset_of(slice: &str) -> usize {
    (slice.as_ptr() as usize).saturating_sub(BASE.with(Cell::get))
}

pub fn span_between(start: &str, rest: &str) -> Span {
    Span::new(offset_of(start), offset_of(rest))
}

/// Enters one level of nesting; fails cleanly past [`MAX_NESTING`].
pub fn nested<'a, T>(
    input: &'a str,
    inner: impl FnOnce(&'a str) -> PResult<'a, T>,
) -> PResult<'a, T> {
    let depth = NESTING.with(|n| {
        n.set(n.get() + 1);
        n.get()
    });
    let result = if depth > MAX_NESTING {
        failure(
            input,
            format!("this expression nests more than {MAX_NESTING} levels deep"),
            Some("split it into steps with `let`"),
        )
    } else {
        inner(input)
    };
    NESTING.with(|n| n.set(n.get() - 1));
    result
}

/// Spaces and tabs (never a line break: lines are split beforehand).
pub fn ws<'a, O>(
    inner: impl Parser<&'a str, Output = O, Error = SyntaxError>,
) -> impl Parser<&'a str, Output = O, Error = SyntaxError> {
    (space0, inner).map(|(_, o)| o)
}

fn is_word_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '_'
}

/// An identifier: a letter or `_`, then letters, digits and `_`.
pub fn identifier(input: &str) -> PResult<'_, &str> {
    recognize((
        take_while1(|c: char| c.is_ascii_alphabetic() || c == '_'),
        take_while(is_word_char),
    ))
    .parse(input)
}

/// Words with a meaning of their own; a column with such a name goes in braces.
pub const KEYWORDS: &[&str] = &[
    "and", "or", "not", "if", "then", "else", "where", "per", "of", "bins",
];

/// The keyword `word`, not followed by more word characters.
pub fn keyword<'a>(word: &'static str) -> impl Fn(&'a str) -> PResult<'a, &'a str> {
    move |input: &'a str| {
        let (rest, found) = ws(identifier).parse(input)?;
        if found == word {
            Ok((rest, found))
        } else {
            no_match(input)
        }
    }
}

/// A quoted string with `\"`, `\\`, `\n` and `\t` escapes.
pub fn string_literal(input: &str) -> PResult<'_, String> {
    let (input, _) = space0(input)?;
    let (mut rest, _) = char('"').parse(input)?;
    let mut text = String::new();
    loop {
        let mut chars = rest.chars();
        match chars.next() {
            None => {
                return failure(
                    input,
                    "this string is not closed",
                    Some("add the closing `\"` on the same line"),
                );
            }
            Some('"') => return Ok((chars.as_str(), text)),
            Some('\\') => match chars.next() {
                Some('"') => text.push('"'),
                Some('\\') => text.push('\\'),
                Some('n') => text.push('\n'),
                Some('t') => text.push('\t'),
                _ => {
                    return failure(
                        rest,
                        "unknown escape in a string",
                        Some("use \\\" for a quote or \\\\ for a backslash"),
                    );
                }
            },
            Some(c) => text.push(c),
        }
        rest = chars.as_str();
    }
}

/// A header written in braces: `{Net weight (g)}`.
pub fn braced_name(input: &str) -> PResult<'_, &str> {
    let (input, _) = space0(input)?;
    let (after_open, _) = char('{').parse(input)?;
    match after_open.find('}') {
        None => failure(
            input,
            "this column name in braces is not closed",
            Some("add the closing `}`"),
        ),
        Some(0) => failure(
            input,
            "empty column name `{}`",
            Some("write the header text between the braces"),
        ),
        Some(end) => Ok((&after_open[end + 1..], &after_open[..end])),
    }
}

/// A number as written: `12`, `-` is not part of it, `3.5`, `1e-3`; and
/// whether a `%` follows.
pub fn number_literal(input: &str) -> PResult<'_, (f64, bool)> {
    let (input, _) = space0(input)?;
    let (rest, text) = recognize((
        digit1,
        opt((char('.'), digit1)),
        opt((one_of("eE"), opt(one_of("+-")), digit1)),
    ))
    .parse(input)?;
    let value: f64 = text.parse().map_err(|_| {
        nom::Err::Failure(SyntaxError {
            offset: offset_of(input),
            message: "not a number".into(),
            help: None,
        })
    })?;
    if !value.is_finite() {
        return failure(input, "this number is too large", None);
    }
    let (rest, percent) = opt(tag("%")).parse(rest)?;
    if rest.starts_with(|c: char| is_word_char(c) || c == '.') {
        return failure(
            rest,
            "a number runs into other characters here",
            Some("separate them with an operator or a space"),
        );
    }
    Ok((rest, (value, percent.is_some())))
}

/// The next token's text, for "unexpected ..." messages.
pub fn next_token(input: &str) -> &str {
    let input = input.trim_start();
    if input.is_empty() {
        return "";
    }
    let first = input.chars().next().unwrap();
    let end = if is_word_char(first) {
        input
            .find(|c: char| !is_word_char(c))
            .unwrap_or(input.len())
    } else {
        first.len_utf8()
    };
    &input[..end]
}

/// What a token is called in a message.
pub fn describe(token: &str) -> String {
    if token.is_empty() {
        "the end of the line".to_string()
    } else {
        format!("`{token}`")
    }
}
