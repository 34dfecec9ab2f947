//! Keeps grammar/sheaf.peg, grammar/README.md and workbooks/ in step with
//! the parser: every example parses, every refused example is refused, and
//! the grammar's word lists are the parser's.

use std::path::Path;

use sheaf::recipe::{self, functions::FUNCTIONS};

fn read(relative: &str) -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join(relative)).unwrap()
}

/// The words after `# LABEL:` in the grammar file.
fn grammar_list(label: &str) -> Vec<String> {
    let grammar = read("grammar/sheaf.peg");
    let line = grammar
        .lines()
        .find_map(|l| l.strip_prefix(&format!("# {label}:")))
        .unwrap_or_else(|| panic!("grammar/sheaf.peg has no `# {label}:` line"));
    line.split_whitespace().map(str::to_string).collect()
}

fn fenced_blocks(markdown: &str, language: &str) -> Vec<String> {
    let mut blocks = Vec::new();
    let mut current: Option<String> = None;
    for line in markdown.lines() {
        match &mut current {
            None if line.trim() == format!("```{language}") => current = Some(String::new()),
            Some(block) if line.trim() == "```" => {
                blocks.push(std::mem::take(block));
                current = None;
            }
            Some(block) => {
                block.push_str(line);
                block.push('\n');
            }
            None => {}
        }
    }
    blocks
}

#[test]
fn guide_examples_parse_and_check() {
    let guide = read("grammar/README.md");
    let examples = fenced_blocks(&guide, "sheaf");
    assert!(examples.len() >= 2);
    for example in examples {
        let parsed = recipe::parse_and_check(&example, None);
        assert!(
            parsed.is_ok(),
            "{}\n{}",
            example,
            recipe::render_all(&parsed.diagnostics, "guide", &example)
        );
    }
}

#[test]
fn guide_counter_examples_are_refused() {
    let guide = read("grammar/README.md");
    let refused = fenced_blocks(&guide, "invalid");
    assert!(refused.len() >= 3);
    for example in refused {
        assert!(
            !recipe::parse_and_check(&example, None).is_ok(),
            "accepted:\n{example}"
        );
    }
}

#[test]
fn workbook_recipes_parse_and_check() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("workbooks");
    let mut seen = 0;
    for entry in std::fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "sheaf") {
            let text = std::fs::read_to_string(&path).unwrap();
            let parsed = recipe::parse_and_check(&text, None);
            assert!(
                parsed.is_ok(),
                "{}",
                recipe::render_all(&parsed.diagnostics, &path.display().to_string(), &text)
            );
            seen += 1;
        }
    }
    assert!(seen >= 1, "no recipes in workbooks/");
}

#[test]
fn grammar_word_lists_match_the_parser() {
    let mut keywords = grammar_list("keywords");
    let mut ours: Vec<String> = recipe::KEYWORDS.iter().map(|s| s.to_string()).collect();
    keywords.sort();
    ours.sort();
    assert_eq!(keywords, ours, "keywords");

    let rules = grammar_list("bin rules");
    assert_eq!(
        rules,
        recipe::BIN_RULES
            .iter()
            .map(|s| s.to_string())
            .collect::<Vec<_>>(),
        "bin rules"
    );

    use sheaf::recipe::functions::FunctionKind;
    let names = |kind| {
        FUNCTIONS
            .iter()
            .filter(|f| f.kind() == kind)
            .map(|f| f.name.to_string())
            .collect::<Vec<_>>()
    };
    assert_eq!(
        grammar_list("aggregates"),
        names(FunctionKind::Aggregate),
        "aggregates"
    );
    assert_eq!(
        grammar_list("row functions"),
        names(FunctionKind::Row),
        "row functions"
    );
    assert_eq!(
        grammar_list("comparisons"),
        names(FunctionKind::Comparison),
        "comparisons"
    );

    // The grammar's statement words are the parser's, and each starts a statement.
    assert_eq!(
        grammar_list("statements"),
        recipe::STATEMENT_WORDS,
        "statements"
    );
    for word in grammar_list("statements") {
        let parsed = recipe::parse(&format!("{word}\n"));
        let message = &parsed.diagnostics[0].message;
        assert!(
            !message.starts_with("unknown statement"),
            "`{word}`: {message}"
        );
    }
    assert!(
        recipe::parse("tally \"x\"\n").diagnostics[0]
            .message
            .starts_with("unknown statement")
    );
}

#[test]
fn grammar_limits_match_the_parser() {
    let grammar = read("grammar/sheaf.peg");
    for (limit, value) in [
        ("nests at most", recipe::MAX_NESTING),
        ("at most", recipe::MAX_CHAIN),
        ("at most", recipe::MAX_DEPTH),
    ] {
        assert!(
            grammar.contains(&format!("{limit} {value}")),
            "grammar/sheaf.peg does not state the limit {value}"
        );
    }
}
