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

/// A problem in a recipe: where, what, and what to do about it.
#[derive(Debug, Clone, PartialEq)]
pub struct Diagnostic {
    /// The text it is about.
    pub span: Span,
    /// What is wrong.
    pub message: String,
    /// What to do about it.
    pub help: Option<String>,
    /// An error refuses the recipe; a warning does not.
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

    /// The same, with what to do about it.
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
        self.render_in(&SimpleFile::new(file_name, source))
    }

    /// [`Diagnostic::render`] with the file's line index built once by the caller.
    fn render_in(&self, file: &SimpleFile<&str, &str>) -> String {
        let source = *file.source();
        let start = self.span.start.min(source.len());
        // A fault at the end of a line is shown as a caret there, not over the
        // line break; a span over several lines is shown on its first line, so
        // one report stays one line of the recipe however large its span.
        let line_end = source[start..]
            .find(['\n', '\r'])
            .map_or(source.len(), |i| start + i);
        let end = if start == line_end {
            start
        } else {
            self.span.end.max(start + 1).min(line_end)
        };
        let report = match self.severity {
            Severity::Error => Report::error(),
            Severity::Warning => Report::warning(),
        };
        let mut report = report
            .with_message(&self.message)
            .with_labels(vec![Label::primary((), start..end)]);
        if let Some(help) = &self.help {
            report = report.with_notes(vec![format!("help: {help}")]);
        }
        term::emit_into_string(&Config::default(), file, &report).unwrap_or_else(|_| {
            let (line, column) = self.line_column(source);
            let word = match self.severity {
                Severity::Error => "error",
                Severity::Warning => "warning",
            };
            format!(
                "{word}: {}\n --> {}:{line}:{column}\n",
                self.message,
                file.name()
            )
        })
    }
}

/// The 1-based line and column (in characters) of a byte offset.
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

/// Most diagnostics printed for one recipe: the first ones are what to fix;
/// a file that is not a recipe at all would otherwise print one per line.
pub const MAX_SHOWN: usize = 20;

/// The diagnostics of one recipe, sorted by position, rendered one after
/// another: the first [`MAX_SHOWN`], then how many more there are. Time and
/// output grow with the recipe's size, not with errors times size.
pub fn render_all(diagnostics: &[Diagnostic], file_name: &str, source: &str) -> String {
    let mut sorted: Vec<&Diagnostic> = diagnostics.iter().collect();
    sorted.sort_by_key(|d| d.span.start);
    let file = SimpleFile::new(file_name, source);
    let mut out = sorted
        .iter()
        .take(MAX_SHOWN)
        .map(|d| d.render_in(&file))
        .collect::<Vec<_>>()
        .join("\n");
    if sorted.len() > MAX_SHOWN {
        out.push_str(&format!(
            "\n... and {} more problems in {file_name} ({} in all); fix the ones above and run again\n",
            sorted.len() - MAX_SHOWN,
            sorted.len()
        ));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn many_problems_print_the_first_ones_and_a_count() {
        let source = "x\n".repeat(30_000);
        let diagnostics: Vec<Diagnostic> = (0..30_000)
            .map(|i| Diagnostic::new(Span::new(2 * i, 2 * i + 1), "not a statement"))
            .collect();
        let started = std::time::Instant::now();
        let out = render_all(&diagnostics, "r.sheaf", &source);
        assert!(started.elapsed().as_secs() < 5);
        assert_eq!(out.matches("not a statement").count(), MAX_SHOWN);
        assert!(
            out.contains("... and 29980 more problems in r.sheaf (30000 in all)"),
            "{out}"
        );
    }

    #[test]
    fn a_span_over_many_lines_is_shown_on_its_first() {
        let source = "figures \"F\":\n    a = 1\n    b = 2\n";
        let d = Diagnostic::new(Span::new(0, source.len()), "block problem");
        let out = d.render("r.sheaf", source);
        assert!(
            out.contains("r.sheaf:1:1") && !out.contains("b = 2"),
            "{out}"
        );
    }
}
