//! Recipe errors: where, what was expected, what to do; rendered with the
//! faulty line and a caret under the fault.

use codespan_reporting::diagnostic::{Diagnostic as Report, Label};
use codespan_reporting::files::SimpleFile;
use codespan_reporting::term::{self, Config};

use super::ast::Span;

/// Whether a finding stops the run.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Severity {
    /// The recipe is refused.
    Error,
    /// The recipe runs, but probably not as meant; shown on the terminal
    /// and on the Checks sheet.
    Warning,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Diagnostic {
    pub span: Span,
    pub message: String,
    /// What to do about it.
    pub help: Option<String>,
    pub severity: Severity,
}

impl Diagnostic {
    /// An error: the recipe is refused.
    pub fn new(span: Span, message: impl Into<String>) -> Diagnostic {
        Diagnostic {
            span,
            message: message.into(),
            help: None,
            severity: Severity::Error,
        }
    }

    /// A warning: the recipe runs, and the warning is shown.
    pub fn warning(span: Span, message: impl Into<String>) -> Diagnostic {
        Diagnostic {
            severity: Severity::Warning,
            ..Diagnostic::new(span, message)
        }
    }

    pub fn with_help(mut self, help: impl Into<String>) -> Diagnostic {
        self.help = Some(help.into());
        self
    }

    /// 1-based line and column (in characters) of the start of the span.
    pub fn line_column(&self, source: &str) -> (usize, usize) {
        line_column(source, self.span.start)
    }

    /// One line for a sheet or a log: `line 3: message (help)`.
    pub fn one_line(&self, source: &str) -> String {
        let (line, column) = self.line_column(source);
        match &self.help {
            Some(help) => format!("line {line}, column {column}: {}; {help}", self.message),
            None => format!("line {line}, column {column}: {}", self.message),
        }
    }

    /// The full report: `error: ...`, `--> file:line:column`, the line, a caret, help.
    pub fn render(&self, file_name: &str, source: &str) -> String {
        let file = SimpleFile::new(file_name, source);
        // A fault at the end of a line is shown as a caret there, not over the line break.
        let at_line_end = source[self.span.start.min(source.len())..].starts_with(['\n', '\r'])
            || self.span.start >= source.len();
        let end = if at_line_end {
            self.span.start
        } else {
            self.span.end.max(self.span.start + 1).min(source.len())
        };
        let report = match self.severity {
            Severity::Error => Report::error(),
            Severity::Warning => Report::warning(),
        };
        let mut report = report
            .with_message(&self.message)
            .with_labels(vec![Label::primary((), self.span.start..end)]);
        if let Some(help) = &self.help {
            report = report.with_notes(vec![format!("help: {help}")]);
        }
        term::emit_into_string(&Config::default(), &file, &report).unwrap_or_else(|_| {
            let (line, column) = self.line_column(source);
            let word = match self.severity {
                Severity::Error => "error",
                Severity::Warning => "warning",
            };
            format!(
                "{word}: {}\n --> {file_name}:{line}:{column}\n",
                self.message
            )
        })
    }
}

pub fn line_column(source: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(source.len());
    let before = &source[..floor_char_boundary(source, offset)];
    let line = before.matches('\n').count() + 1;
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    (line, before[line_start..].chars().count() + 1)
}

fn floor_char_boundary(s: &str, mut i: usize) -> usize {
    while !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

/// All diagnostics of one recipe, sorted by position, rendered one after another.
pub fn render_all(diagnostics: &[Diagnostic], file_name: &str, source: &str) -> String {
    let mut sorted: Vec<&Diagnostic> = diagnostics.iter().collect();
    sorted.sort_by_key(|d| d.span.start);
    sorted
        .iter()
        .map(|d| d.render(file_name, source))
        .collect::<Vec<_>>()
        .join("\n")
}
