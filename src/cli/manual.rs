//! `sheaf manual [COMMAND]`: the manual page, generated from the argument
//! definitions by clap_mangen. The text after the help (examples, exit
//! statuses, environment) becomes sections of its own, laid out line by
//! line as `--help` shows it rather than filled into one paragraph.

use clap::CommandFactory;

use super::{Cli, Exit, Failure, output};

/// Text for roff: backslashes, hyphens and a leading dot or quote escaped.
fn escape(line: &str) -> String {
    let text = line.replace('\\', "\\e").replace('-', "\\-");
    if text.starts_with(['.', '\'']) {
        format!("\\&{text}")
    } else {
        text
    }
}

/// The text after the help as roff: a paragraph whose first line ends in
/// `:` is a section under that name, kept line by line; any other is a
/// paragraph of the NOTES section.
pub fn sections(after_help: &str) -> String {
    let mut roff = String::new();
    let mut notes = String::new();
    for paragraph in after_help.split("\n\n") {
        let mut lines = paragraph.lines();
        let Some(first) = lines.next() else { continue };
        match first.strip_suffix(':') {
            Some(title) => {
                roff.push_str(&format!(".SH \"{}\"\n.nf\n", title.to_uppercase()));
                for line in lines {
                    roff.push_str(&escape(line));
                    roff.push('\n');
                }
                roff.push_str(".fi\n");
            }
            None => {
                notes.push_str(".PP\n");
                for line in paragraph.lines() {
                    notes.push_str(&escape(line));
                    notes.push('\n');
                }
            }
        }
    }
    if !notes.is_empty() {
        roff.push_str(".SH NOTES\n");
        roff.push_str(&notes);
    }
    roff
}

/// Prints sheaf's page, or with a command's name, that command's page.
pub fn manual(command: Option<&str>) -> Result<Exit, Failure> {
    let mut cli = Cli::command();
    cli.build();
    let page = match command {
        None => cli,
        Some(name) => cli
            .find_subcommand(name)
            .cloned()
            .map(|c| {
                c.name(format!("sheaf-{name}"))
                    .version(env!("CARGO_PKG_VERSION"))
            })
            .ok_or_else(|| {
                Failure::new(format!(
                    "error: no command `{name}`; sheaf's commands are run, validate, inspect, calc, completions and manual"
                ))
            })?,
    };
    let after = page
        .get_after_long_help()
        .or_else(|| page.get_after_help())
        .map(|t| t.to_string())
        .unwrap_or_default();
    let has_subcommands = page.has_subcommands();
    // Every page has one (a command's is sheaf's); checked since clap_mangen needs it.
    let has_version = page.get_version().is_some();
    let man = clap_mangen::Man::new(page);
    let mut text = Vec::new();
    man.render_title(&mut text)?;
    man.render_name_section(&mut text)?;
    man.render_synopsis_section(&mut text)?;
    man.render_description_section(&mut text)?;
    man.render_options_section(&mut text)?;
    if has_subcommands {
        man.render_subcommands_section(&mut text)?;
    }
    text.extend(sections(&after).into_bytes());
    if has_version {
        man.render_version_section(&mut text)?;
    }
    output::out(&String::from_utf8_lossy(&text))?;
    Ok(Exit::Ok)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn headed_paragraphs_become_sections_kept_line_by_line() {
        let roff = sections("Exit status:\n  0  ok\n  -1 odd\n\nJSON: one line.\n.dot");
        assert_eq!(
            roff,
            ".SH \"EXIT STATUS\"\n.nf\n  0  ok\n  \\-1 odd\n.fi\n.SH NOTES\n.PP\nJSON: one line.\n\\&.dot\n"
        );
    }
}
