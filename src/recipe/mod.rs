//! The recipe language: lines, the nom parser, the checker, the printer.
//!
//! `parse` turns recipe text into a [`Recipe`] tree plus every syntax error
//! it found (a bad line is reported and parsing goes on at the next);
//! `check` resolves names and shapes, with the data's headers when known.
//! The normative grammar is `grammar/sheaf.peg`.

pub mod ast;
mod check;
pub mod diagnostic;
mod expr;
pub mod functions;
mod lines;
pub mod pretty;
mod statement;
mod suggest;
mod syntax;
pub mod uses;

pub use ast::Recipe;
pub use check::{BIN_RULES, DataColumn, DataKind};
pub use diagnostic::{Diagnostic, Severity, render_all};
pub use statement::STATEMENT_WORDS;
pub use suggest::closest;
pub use syntax::{KEYWORDS, MAX_CHAIN, MAX_NESTING};

/// Deepest expression tree accepted; deeper ones are refused with an error
/// rather than risking the stack in later passes.
pub const MAX_DEPTH: usize = 256;

/// A parsed recipe with what was found wrong in it.
#[derive(Debug)]
pub struct Parsed {
    /// The statements that could be read (a bad line is left out).
    pub recipe: Recipe,
    /// Errors: syntax, names and, with the data's columns, columns; sorted
    /// by position. Any error refuses the recipe.
    pub diagnostics: Vec<Diagnostic>,
    /// Likely mistakes that do not stop the run, sorted by position.
    pub warnings: Vec<Diagnostic>,
}

impl Parsed {
    /// True when nothing refuses the recipe (warnings may remain).
    pub fn is_ok(&self) -> bool {
        self.diagnostics.is_empty()
    }

    /// Whether an `input` line could not be read: the data's sheet and
    /// header row are then unknown, and reading the data would check the
    /// recipe against the wrong columns.
    pub fn input_unread(&self, source: &str) -> bool {
        unread_lines(source, &self.diagnostics).any(|line| {
            line.strip_prefix("input")
                .is_some_and(|rest| rest.is_empty() || rest.starts_with([' ', '\t']))
        })
    }
}

/// Parses recipe text; reports every line that could not be read.
pub fn parse(source: &str) -> Parsed {
    syntax::with_source(source, || {
        let (lines, mut diagnostics) = lines::split_lines(source);
        let recipe = statement::parse_lines(&lines, &mut diagnostics);
        for e in expressions(&recipe) {
            if e.depth() > MAX_DEPTH {
                diagnostics.push(
                    Diagnostic::new(
                        e.span,
                        format!("this expression nests more than {MAX_DEPTH} levels deep"),
                    )
                    .with_help("split it into steps with `let`"),
                );
            }
        }
        diagnostics.sort_by_key(|d| d.span.start);
        Parsed {
            recipe,
            diagnostics,
            warnings: Vec::new(),
        }
    })
}

/// Columns of unknown kind, from header names alone.
fn untyped(headers: &[String]) -> Vec<DataColumn> {
    headers
        .iter()
        .map(|name| DataColumn {
            name: name.clone(),
            kind: DataKind::Any,
        })
        .collect()
}

/// Parses and checks names and shapes. `headers` are the data's column
/// names, when the data is at hand.
pub fn parse_and_check(source: &str, headers: Option<&[String]>) -> Parsed {
    parse_and_check_columns(source, headers.map(untyped).as_deref())
}

/// Parses and checks in one pass: syntax errors, then names, shapes and,
/// with the data's columns, unknown columns and text where numbers are
/// needed. The lines that could be read are checked even when others
/// could not, so every problem is reported at once.
pub fn parse_and_check_columns(source: &str, columns: Option<&[DataColumn]>) -> Parsed {
    let mut parsed = parse(source);
    let assumed = unread_lets(source, &parsed.diagnostics);
    let found = check::check(&parsed.recipe, columns, &assumed);
    parsed.diagnostics.extend(found.errors);
    parsed.diagnostics.sort_by_key(|d| d.span.start);
    parsed.warnings = found.warnings;
    parsed.warnings.sort_by_key(|d| d.span.start);
    parsed
}

/// The lines that errors point into.
fn unread_lines<'s>(
    source: &'s str,
    diagnostics: &'s [Diagnostic],
) -> impl Iterator<Item = &'s str> {
    diagnostics.iter().filter_map(|d| {
        let at = d.span.start.min(source.len());
        let start = source[..at].rfind('\n').map_or(0, |i| i + 1);
        source[start..].lines().next()
    })
}

/// Names of `let`s on lines that could not be read: their later uses are
/// not reported as unknown columns too.
fn unread_lets(source: &str, diagnostics: &[Diagnostic]) -> Vec<String> {
    unread_lines(source, diagnostics)
        .filter_map(|line| {
            let name = line.strip_prefix("let ")?.trim_start();
            let end = name
                .find(|c: char| !(c.is_ascii_alphanumeric() || c == '_'))
                .unwrap_or(name.len());
            (end > 0).then(|| name[..end].to_string())
        })
        .collect()
}

/// Checks an already parsed and checked recipe against the data's columns:
/// the columns it names must exist (the closest header is suggested) and
/// hold numbers where numbers are needed.
pub fn check_against(recipe: &Recipe, columns: &[DataColumn]) -> Vec<Diagnostic> {
    let mut diagnostics = check::check(recipe, Some(columns), &[]).errors;
    diagnostics.sort_by_key(|d| d.span.start);
    diagnostics
}

/// Parses one expression on its own (for `sheaf calc`) and checks its
/// names and kinds against the data's columns.
pub fn parse_expression(
    source: &str,
    columns: Option<&[DataColumn]>,
) -> Result<ast::Expr, Vec<Diagnostic>> {
    let parsed = syntax::with_source(source, || {
        let text = source.trim_end();
        let result = expr::expression(text).and_then(|(rest, e)| {
            let rest_trimmed = rest.trim_start();
            if rest_trimmed.is_empty() {
                Ok(e)
            } else {
                syntax::failure(
                    rest_trimmed,
                    format!(
                        "unexpected {} here; expected an operator or the end",
                        syntax::describe(syntax::next_token(rest_trimmed))
                    ),
                    None,
                )
                .map(|(_, ())| e)
            }
        });
        result.map_err(|err| match err {
            nom::Err::Error(e) | nom::Err::Failure(e) => {
                let message = if e.message.is_empty() {
                    "expected an expression".to_string()
                } else {
                    e.message
                };
                let mut d = Diagnostic::new(ast::Span::new(e.offset, e.offset + 1), message);
                if let Some(h) = e.help {
                    d = d.with_help(h);
                }
                vec![d]
            }
            nom::Err::Incomplete(_) => vec![Diagnostic::new(
                ast::Span::default(),
                "incomplete expression",
            )],
        })
    })?;
    if parsed.depth() > MAX_DEPTH {
        return Err(vec![Diagnostic::new(
            parsed.span,
            format!("this expression nests more than {MAX_DEPTH} levels deep"),
        )]);
    }
    let problems = check::check_expression(&parsed, columns);
    if problems.is_empty() {
        Ok(parsed)
    } else {
        Err(problems)
    }
}

/// Whether any expression of the recipe calls `function` (at any depth).
pub fn calls(recipe: &Recipe, function: &str) -> bool {
    let mut stack = expressions(recipe);
    while let Some(e) = stack.pop() {
        if let ast::ExprKind::Call { function: f, .. } = &e.kind
            && f.value == function
        {
            return true;
        }
        stack.extend(e.children());
    }
    false
}

/// Every top-level expression of the recipe.
fn expressions(recipe: &Recipe) -> Vec<&ast::Expr> {
    use ast::StatementKind::*;
    let mut found = Vec::new();
    for s in &recipe.statements {
        match &s.kind {
            Let { value, .. } => found.push(value),
            RowsWhere(e) => found.push(e),
            Panel { filter, .. } => found.extend(filter),
            Figures {
                filter, figures, ..
            } => {
                found.extend(filter);
                found.extend(figures.iter().map(|f| &f.value));
            }
            Check { condition, .. } => found.push(condition),
            Title(_)
            | Input { .. }
            | Header { .. }
            | Histogram { .. }
            | Boxplot { .. }
            | Period(_)
            | PeriodFrom(_)
            | Noise(_)
            | Drift(_)
            | Label { .. } => {}
        }
    }
    found
}
