//! Round trip (print a tree, parse it again, get the same tree) and the
//! parser's robustness: it never panics, whatever it is given.

use proptest::prelude::*;
use sheaf::recipe::ast::*;
use sheaf::recipe::{self, KEYWORDS, functions::FUNCTIONS, pretty};

fn no_span() -> Span {
    Span::default()
}

fn leaf() -> impl Strategy<Value = Expr> {
    let number = prop_oneof![
        Just(0.0),
        Just(1.0),
        Just(12.0),
        Just(3.5),
        Just(1e-3),
        Just(2.5e10),
        0.0f64..1e6
    ];
    let bare =
        "[a-z_][a-z0-9_]{0,8}".prop_filter("not a keyword", |s| !KEYWORDS.contains(&s.as_str()));
    let braced = "[A-Za-z0-9 ()#\"%.,:-]{1,12}";
    let text = "[ -~]{0,10}|[é\\\\\"\\n\\t#]{0,4}";
    prop_oneof![
        number.clone().prop_map(ExprKind::Number),
        number.prop_map(ExprKind::Percent),
        text.prop_map(ExprKind::Text),
        // Whole days from 1899-12-31 to the year 2447, as `date "..."`.
        (1u32..200_000).prop_map(|d| ExprKind::Date(f64::from(d))),
        bare.prop_map(|name| ExprKind::Column(ColumnRef {
            name,
            braced: false,
            span: no_span()
        })),
        braced.prop_map(|name| ExprKind::Column(ColumnRef {
            name,
            braced: true,
            span: no_span()
        })),
    ]
    .prop_map(|kind| Expr {
        kind,
        span: no_span(),
    })
}

fn expression() -> impl Strategy<Value = Expr> {
    let ops = [
        BinaryOp::Add,
        BinaryOp::Subtract,
        BinaryOp::Multiply,
        BinaryOp::Divide,
        BinaryOp::Power,
        BinaryOp::Less,
        BinaryOp::LessEqual,
        BinaryOp::Greater,
        BinaryOp::GreaterEqual,
        BinaryOp::Equal,
        BinaryOp::NotEqual,
        BinaryOp::And,
        BinaryOp::Or,
    ];
    leaf().prop_recursive(5, 48, 3, move |inner| {
        let boxed = |e: Expr| Box::new(e);
        prop_oneof![
            (
                prop::sample::select(ops.to_vec()),
                inner.clone(),
                inner.clone()
            )
                .prop_map(move |(op, l, r)| ExprKind::Binary {
                    op,
                    left: boxed(l),
                    right: boxed(r)
                }),
            (prop::bool::ANY, inner.clone()).prop_map(move |(not, e)| ExprKind::Unary {
                op: if not { UnaryOp::Not } else { UnaryOp::Negate },
                operand: boxed(e)
            }),
            (inner.clone(), inner.clone(), inner.clone()).prop_map(move |(c, t, o)| ExprKind::If {
                condition: boxed(c),
                then: boxed(t),
                otherwise: boxed(o)
            }),
            (
                prop::sample::select(FUNCTIONS.iter().map(|f| f.name).collect::<Vec<_>>()),
                prop::collection::vec(inner, 0..3)
            )
                .prop_map(|(name, args)| ExprKind::Call {
                    function: Spanned {
                        value: name.to_string(),
                        span: Span::default()
                    },
                    args
                }),
        ]
        .prop_map(|kind| Expr {
            kind,
            span: Span::default(),
        })
    })
}

fn column() -> impl Strategy<Value = ColumnRef> + Clone {
    prop_oneof![
        "[a-z][a-z0-9_]{0,6}"
            .prop_filter("not a keyword", |s| !KEYWORDS.contains(&s.as_str()))
            .prop_map(|name| ColumnRef {
                name,
                braced: false,
                span: Span::default()
            }),
        "[A-Za-z (%)]{1,10}".prop_map(|name| ColumnRef {
            name,
            braced: true,
            span: Span::default()
        }),
    ]
}

fn name() -> impl Strategy<Value = Spanned<String>> {
    "[A-Za-z ]{1,12}".prop_map(|value| Spanned {
        value,
        span: Span::default(),
    })
}

fn read_setting() -> impl Strategy<Value = Spanned<ReadSetting>> {
    prop_oneof![
        prop::sample::select(vec![',', '.']).prop_map(ReadSetting::Decimal),
        prop::option::of(prop::sample::select(vec![',', '.', ' ', '\'']))
            .prop_map(ReadSetting::Thousands),
        "[a-z0-9-]{1,12}".prop_map(ReadSetting::Encoding),
        Just(ReadSetting::KeepSummaryRows),
        Just(ReadSetting::MergeSimilarKeys),
    ]
    .prop_map(|value| Spanned {
        value,
        span: Span::default(),
    })
}

fn statement() -> impl Strategy<Value = StatementKind> {
    let ident =
        "[a-z][a-z0-9_]{0,6}".prop_filter("not a keyword", |s| !KEYWORDS.contains(&s.as_str()));
    let keys = prop::collection::vec(column(), 0..3);
    prop_oneof![
        name().prop_map(StatementKind::Title),
        (
            prop::option::of(name()),
            prop::option::of(1u32..50),
            prop::collection::vec(read_setting(), 0..3)
        )
            .prop_filter("input needs a setting", |(s, r, reading)| s.is_some()
                || r.is_some()
                || !reading.is_empty())
            .prop_map(|(sheet, row, reading)| StatementKind::Input {
                sheet,
                header_row: row.map(|value| Spanned {
                    value,
                    span: Span::default()
                }),
                reading,
            }),
        prop::collection::vec(column(), 2..4).prop_map(|names| StatementKind::Header { names }),
        (ident.clone(), expression()).prop_map(|(n, value)| StatementKind::Let {
            name: Spanned {
                value: n,
                span: Span::default()
            },
            value
        }),
        expression().prop_map(StatementKind::RowsWhere),
        (
            name(),
            prop::collection::vec(column(), 1..3),
            keys.clone(),
            prop::option::of(expression())
        )
            .prop_map(|(name, columns, per, filter)| StatementKind::Panel {
                name,
                columns,
                per,
                filter
            }),
        (
            name(),
            keys.clone(),
            prop::option::of(expression()),
            prop::collection::vec((ident, expression()), 1..4)
        )
            .prop_map(|(name, per, filter, figures)| StatementKind::Figures {
                name,
                per,
                filter,
                figures: figures
                    .into_iter()
                    .map(|(n, value)| Figure {
                        name: Spanned {
                            value: n,
                            span: Span::default()
                        },
                        value
                    })
                    .collect()
            }),
        (name(), prop::bool::ANY, keys.clone(), expression()).prop_map(
            |(name, warn, per, condition)| StatementKind::Check {
                name,
                level: if warn {
                    CheckLevel::Warn
                } else {
                    CheckLevel::Fail
                },
                per,
                condition
            }
        ),
        (
            column(),
            keys.clone(),
            prop::option::of(prop_oneof![
                Just(Bins::Rule("sturges".into())),
                (1u32..99).prop_map(Bins::Count)
            ])
        )
            .prop_map(|(column, per, bins)| StatementKind::Histogram {
                column,
                per,
                bins: bins.map(|value| Spanned {
                    value,
                    span: Span::default()
                })
            }),
        (column(), keys).prop_map(|(column, per)| StatementKind::Boxplot { column, per }),
        name().prop_map(StatementKind::Period),
        column().prop_map(StatementKind::PeriodFrom),
        prop_oneof![Just(2.0), Just(3.0), 1.0f64..10.0].prop_map(|value| StatementKind::Noise(
            Spanned {
                value,
                span: Span::default()
            }
        )),
        (
            prop_oneof![Just(10.0), Just(2.5), 0.01f64..100.0],
            prop::bool::ANY
        )
            .prop_map(|v| StatementKind::Drift(Spanned {
                value: v,
                span: Span::default()
            })),
    ]
}

fn a_recipe() -> impl Strategy<Value = Recipe> {
    prop::collection::vec(statement(), 1..6).prop_map(|kinds| Recipe {
        statements: kinds
            .into_iter()
            .map(|kind| Statement {
                kind,
                span: Span::default(),
            })
            .collect(),
    })
}

const DEMO: &str = include_str!("../workbooks/depot-monthly.sheaf");

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, ..ProptestConfig::default() })]

    #[test]
    fn printing_then_parsing_gives_the_same_tree(tree in a_recipe()) {
        let text = pretty::recipe(&tree);
        let parsed = recipe::parse(&text);
        prop_assert!(parsed.is_ok(), "{text}\n{:?}", parsed.diagnostics);
        prop_assert_eq!(parsed.recipe.without_spans(), tree.without_spans(), "{}", text);
    }

    #[test]
    fn the_parser_never_panics_on_any_text(text in "\\PC{0,200}|[a-z \"{}()#:=<>!+*/^%,.\\n\\t-]{0,200}") {
        let parsed = recipe::parse_and_check(&text, Some(&["a".to_string(), "weight_kg".to_string()]));
        let _ = recipe::render_all(&parsed.diagnostics, "x.sheaf", &text);
    }

    #[test]
    fn the_parser_never_panics_on_mutated_recipes(
        edits in prop::collection::vec((0usize..2000, 0usize..40, "[a-z \"{}()#:=<>!+*/^%,.\\n\\t-]{0,6}|\\PC{0,3}"), 1..8)
    ) {
        let mut text = DEMO.to_string();
        for (at, cut, insert) in edits {
            let mut start = at % (text.len() + 1);
            while !text.is_char_boundary(start) { start -= 1; }
            let mut end = (start + cut).min(text.len());
            while !text.is_char_boundary(end) { end -= 1; }
            text.replace_range(start..end.max(start), &insert);
        }
        let parsed = recipe::parse_and_check(&text, None);
        let _ = recipe::render_all(&parsed.diagnostics, "x.sheaf", &text);
    }
}

#[test]
fn the_demo_recipe_round_trips() {
    let parsed = recipe::parse(DEMO);
    assert!(parsed.is_ok());
    let again = recipe::parse(&pretty::recipe(&parsed.recipe));
    assert_eq!(again.recipe.without_spans(), parsed.recipe.without_spans());
}

#[test]
fn spans_point_at_the_source() {
    let source = "let late_h = {Minutes late} / 60\n";
    let parsed = recipe::parse(source);
    let StatementKind::Let { name, value } = &parsed.recipe.statements[0].kind else {
        panic!()
    };
    assert_eq!(&source[name.span.start..name.span.end], "late_h");
    assert_eq!(
        &source[value.span.start..value.span.end],
        "{Minutes late} / 60"
    );
    let ExprKind::Binary { left, .. } = &value.kind else {
        panic!()
    };
    assert_eq!(&source[left.span.start..left.span.end], "{Minutes late}");
}
