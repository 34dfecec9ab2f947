//! The recipe split into lines: indentation measured, comments removed.

use super::ast::Span;
use super::diagnostic::Diagnostic;

/// One non-blank line of the recipe, comment and trailing space removed.
#[derive(Debug, Clone, Copy)]
pub struct Line<'a> {
    /// The text after the indentation, up to a comment or the line end.
    pub text: &'a str,
    /// Byte offset of `text` in the recipe.
    pub offset: usize,
    /// Number of leading spaces.
    pub indent: usize,
}

impl Line<'_> {
    pub fn span(&self) -> Span {
        Span::new(self.offset, self.offset + self.text.len())
    }
}

/// The line's text up to a `#` that is outside strings and braces.
fn without_comment(text: &str) -> &str {
    let (mut in_string, mut in_braces, mut escaped) = (false, false, false);
    for (i, c) in text.char_indices() {
        match c {
            _ if escaped => escaped = false,
            '\\' if in_string => escaped = true,
            '"' if !in_braces => in_string = !in_string,
            '{' if !in_string => in_braces = true,
            '}' if !in_string => in_braces = false,
            '#' if !in_string && !in_braces => return &text[..i],
            _ => {}
        }
    }
    text
}

pub fn split_lines(source: &str) -> (Vec<Line<'_>>, Vec<Diagnostic>) {
    let mut lines = Vec::new();
    let mut problems = Vec::new();
    let mut offset = 0;
    for raw in source.split_inclusive('\n') {
        // A byte-order mark (some editors save one) is not part of the text.
        let mark = if offset == 0 && raw.starts_with('\u{feff}') {
            '\u{feff}'.len_utf8()
        } else {
            0
        };
        let start = offset + mark;
        offset += raw.len();
        let content = raw[mark..].trim_end_matches(['\n', '\r']);
        let indent_text = &content[..content.len() - content.trim_start().len()];
        let text = without_comment(&content[indent_text.len()..]).trim_end();
        if text.is_empty() {
            continue;
        }
        if indent_text.contains('\t') {
            let at = start + indent_text.find('\t').unwrap_or(0);
            problems.push(
                Diagnostic::new(Span::new(at, at + 1), "a tab in the indentation")
                    .with_help("indent block lines with spaces only"),
            );
        }
        lines.push(Line {
            text,
            offset: start + indent_text.len(),
            indent: indent_text.chars().count(),
        });
    }
    (lines, problems)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn comments_end_lines_but_not_inside_strings_or_braces() {
        let source =
            "title \"Depot #4\"  # note\n\n   let x = {Item #} * 2 # twice\n# only a comment\n";
        let (lines, problems) = split_lines(source);
        assert!(problems.is_empty());
        let texts: Vec<&str> = lines.iter().map(|l| l.text).collect();
        assert_eq!(texts, ["title \"Depot #4\"", "let x = {Item #} * 2"]);
        assert_eq!(
            (lines[1].indent, lines[1].offset),
            (3, source.find("let").unwrap())
        );
    }

    #[test]
    fn a_byte_order_mark_is_not_text() {
        let source = "\u{feff}title \"Depots\"\n  let x = 1\n";
        let (lines, problems) = split_lines(source);
        assert!(problems.is_empty());
        assert_eq!((lines[0].text, lines[0].offset), ("title \"Depots\"", 3));
        assert_eq!(lines[1].indent, 2);
    }
}
