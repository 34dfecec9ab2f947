//! Where sheaf's text goes: results to standard output, messages to
//! standard error, coloured only on a terminal (NO_COLOR and `--color`
//! honoured), quiet and verbose modes, and a closed pipe ending the run
//! quietly instead of a panic.

use std::io::Write;
use std::sync::OnceLock;

use anstyle::{AnsiColor, Style};

use super::Failure;
use super::args::{ColorWhen, Shared};

#[derive(Debug, Clone, Copy, Default)]
struct Mode {
    quiet: bool,
    verbose: bool,
}

static MODE: OnceLock<Mode> = OnceLock::new();

fn mode() -> Mode {
    MODE.get().copied().unwrap_or_default()
}

/// Colour as `--color` says; where it says auto, anstream decides.
pub fn set_color(when: ColorWhen) {
    let choice = match when {
        // anstream decides: a terminal, and neither NO_COLOR nor CLICOLOR=0.
        ColorWhen::Auto => anstream::ColorChoice::Auto,
        ColorWhen::Always => anstream::ColorChoice::Always,
        ColorWhen::Never => anstream::ColorChoice::Never,
    };
    choice.write_global();
}

/// Takes the shared options; called once, before anything is printed.
pub fn init(shared: &Shared) {
    set_color(shared.color);
    let _ = MODE.set(Mode {
        quiet: shared.quiet,
        verbose: shared.verbose,
    });
}

pub fn quiet() -> bool {
    mode().quiet
}

/// Results on standard output. A closed pipe (`| head -1`) becomes the
/// quiet broken-pipe status; any other write error is reported.
pub fn out(text: &str) -> Result<(), Failure> {
    let mut stdout = anstream::stdout().lock();
    stdout
        .write_all(text.as_bytes())
        .and_then(|_| stdout.flush())
        .map_err(|e| {
            if e.kind() == std::io::ErrorKind::BrokenPipe {
                Failure::broken_pipe()
            } else {
                Failure::new(format!("cannot write to standard output: {e}"))
            }
        })
}

/// A line of results on standard output.
pub fn out_line(line: &str) -> Result<(), Failure> {
    out(&format!("{line}\n"))
}

/// Anything on standard error; a closed standard error is ignored (there
/// is nowhere left to say so).
fn err(text: &str) {
    let mut stderr = anstream::stderr().lock();
    let _ = stderr
        .write_all(text.as_bytes())
        .and_then(|_| stderr.flush());
}

/// Text for the person watching (summary beside --json, batch lines),
/// left out by `-q`.
pub fn note(text: &str) {
    if !quiet() {
        err(text);
    }
}

/// Text asked for by an option (`--timings`), printed even with `-q`.
pub fn always(text: &str) {
    err(text);
}

/// Detail printed only with `-v`.
pub fn detail(text: &str) {
    if mode().verbose {
        err(&paint(text));
    }
}

/// An error or warning, always printed, coloured where colour is on.
pub fn problem(text: &str) {
    let mut text = paint(text.trim_end());
    text.push('\n');
    err(&text);
}

pub fn red() -> Style {
    Style::new().bold().fg_color(Some(AnsiColor::Red.into()))
}

pub fn yellow() -> Style {
    Style::new().bold().fg_color(Some(AnsiColor::Yellow.into()))
}

pub fn green() -> Style {
    Style::new().fg_color(Some(AnsiColor::Green.into()))
}

fn cyan() -> Style {
    Style::new().bold().fg_color(Some(AnsiColor::Cyan.into()))
}

/// `word` in `style` (the codes are dropped again where colour is off).
pub fn styled(style: Style, word: &str) -> String {
    format!("{style}{word}{style:#}")
}

/// Colours the leading word of each line of a message: `error` red,
/// `warning` and `skipped` yellow, `help` and `hint` cyan.
pub fn paint(text: &str) -> String {
    let lines: Vec<String> = text
        .split('\n')
        .map(|line| {
            let body = line.trim_start_matches([' ', '=']);
            let indent = &line[..line.len() - body.len()];
            let word_end = body.find([':', '[', ' ']).unwrap_or(body.len());
            let (word, rest) = body.split_at(word_end);
            let style = match word {
                "error" => red(),
                "warning" | "skipped" => yellow(),
                "help" | "hint" => cyan(),
                _ => return line.to_string(),
            };
            format!("{indent}{}{rest}", styled(style, word))
        })
        .collect();
    lines.join("\n")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_the_leading_word_of_a_line_is_coloured() {
        let painted = paint("error: bad\n  = help: quote it\nplain error: no");
        assert!(painted.starts_with(&styled(red(), "error")));
        assert!(painted.contains(&format!("  = {}: quote it", styled(cyan(), "help"))));
        assert!(painted.ends_with("\nplain error: no"));
    }
}
