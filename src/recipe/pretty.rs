//! Prints a syntax tree back as recipe text, in the canonical layout, with
//! only the parentheses the precedence rules need. Parsing the printed text
//! gives the same tree again (tested).

use super::ast::*;

/// A recipe in canonical text: one statement a line, as the parser reads it
/// back (the fingerprint is its hash).
pub fn recipe(r: &Recipe) -> String {
    let mut out = String::new();
    for s in &r.statements {
        statement(&mut out, s);
    }
    out
}

fn columns(cols: &[ColumnRef]) -> String {
    cols.iter().map(column).collect::<Vec<_>>().join(", ")
}

pub(crate) fn column(c: &ColumnRef) -> String {
    if c.braced {
        format!("{{{}}}", c.name)
    } else {
        c.name.clone()
    }
}

fn per(cols: &[ColumnRef]) -> String {
    if cols.is_empty() {
        String::new()
    } else {
        format!(" per {}", columns(cols))
    }
}

fn filter(f: &Option<Expr>) -> String {
    f.as_ref()
        .map(|e| format!(" where {}", expr(e)))
        .unwrap_or_default()
}

/// Text as a double-quoted string, with quotes, backslashes, newlines and tabs escaped.
pub fn quoted(text: &str) -> String {
    let mut out = String::from("\"");
    for c in text.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\t' => out.push_str("\\t"),
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// An `input` reading setting as written.
fn read_setting(setting: &ReadSetting) -> String {
    match setting {
        ReadSetting::Decimal(',') => "decimal comma".into(),
        ReadSetting::Decimal(_) => "decimal point".into(),
        ReadSetting::Thousands(None) => "thousands none".into(),
        ReadSetting::Thousands(Some(mark)) => format!("thousands {}", quoted(&mark.to_string())),
        ReadSetting::Encoding(label) => format!("encoding {}", quoted(label)),
        ReadSetting::KeepSummaryRows => "keep summary rows".into(),
        ReadSetting::MergeSimilarKeys => "merge similar keys".into(),
    }
}

fn statement(out: &mut String, s: &Statement) {
    let line = match &s.kind {
        StatementKind::Title(t) => format!("title {}", quoted(&t.value)),
        StatementKind::Input {
            sheet,
            header_row,
            reading,
        } => {
            let mut parts = Vec::new();
            if let Some(sheet) = sheet {
                parts.push(format!("sheet {}", quoted(&sheet.value)));
            }
            if let Some(row) = header_row {
                parts.push(format!("header row {}", row.value));
            }
            parts.extend(reading.iter().map(|r| read_setting(&r.value)));
            format!("input {}", parts.join(", "))
        }
        StatementKind::Header { names } => format!(
            "header {}",
            names.iter().map(column).collect::<Vec<_>>().join(" or ")
        ),
        StatementKind::Let { name, value } => format!("let {} = {}", name.value, expr(value)),
        StatementKind::RowsWhere(e) => format!("rows where {}", expr(e)),
        StatementKind::Panel {
            name,
            columns: cols,
            per: keys,
            filter: f,
        } => {
            format!(
                "panel {} of {}{}{}:",
                quoted(&name.value),
                columns(cols),
                per(keys),
                filter(f)
            )
        }
        StatementKind::Figures {
            name,
            per: keys,
            filter: f,
            figures,
        } => {
            let mut text = format!("figures {}{}{}:", quoted(&name.value), per(keys), filter(f));
            for figure in figures {
                text.push_str(&format!(
                    "\n    {} = {}",
                    figure.name.value,
                    expr(&figure.value)
                ));
            }
            text
        }
        StatementKind::Check {
            name,
            level,
            per: keys,
            condition,
        } => {
            let level = if *level == CheckLevel::Warn {
                "warn"
            } else {
                "fail"
            };
            format!(
                "check {} {level}{}: {}",
                quoted(&name.value),
                per(keys),
                expr(condition)
            )
        }
        StatementKind::Histogram {
            column: c,
            per: keys,
            bins,
        } => {
            let bins = match bins {
                Some(Spanned {
                    value: Bins::Rule(rule),
                    ..
                }) => format!(", bins {rule}"),
                Some(Spanned {
                    value: Bins::Count(n),
                    ..
                }) => format!(", bins {n}"),
                None => String::new(),
            };
            format!("histogram {}{}{bins}", column(c), per(keys))
        }
        StatementKind::Boxplot {
            column: c,
            per: keys,
        } => format!("boxplot {}{}", column(c), per(keys)),
        StatementKind::Period(p) => format!("period {}", quoted(&p.value)),
        StatementKind::PeriodFrom(c) => format!("period from {}", column(c)),
        StatementKind::Noise(n) => format!("noise {} se", number(n.value)),
        StatementKind::Label { column: c, text } => {
            format!("label {} {}", column(c), quoted(&text.value))
        }
        StatementKind::Drift(d) => format!(
            "drift {}{}",
            number(d.value.0),
            if d.value.1 { "%" } else { "" }
        ),
    };
    out.push_str(&line);
    out.push('\n');
}

fn number(v: f64) -> String {
    format!("{v}")
}

/// Precedence of an expression as an operand; atoms bind tightest.
fn precedence(e: &Expr) -> u8 {
    match &e.kind {
        ExprKind::If { .. } => 0,
        ExprKind::Binary { op, .. } => op.precedence(),
        ExprKind::Unary {
            op: UnaryOp::Not, ..
        } => 3,
        ExprKind::Unary {
            op: UnaryOp::Negate,
            ..
        } => 7,
        _ => 10,
    }
}

fn wrapped(e: &Expr, parens: bool) -> String {
    if parens {
        format!("({})", expr(e))
    } else {
        expr(e)
    }
}

/// An expression in canonical text, with only the parentheses it needs.
pub fn expr(e: &Expr) -> String {
    match &e.kind {
        ExprKind::Number(v) => number(*v),
        ExprKind::Percent(v) => format!("{}%", number(*v)),
        ExprKind::Text(t) => quoted(t),
        ExprKind::Date(serial) => format!("date {}", quoted(&crate::format::date(*serial))),
        ExprKind::Column(c) => column(c),
        ExprKind::Call { function, args } => {
            format!(
                "{}({})",
                function.value,
                args.iter().map(expr).collect::<Vec<_>>().join(", ")
            )
        }
        ExprKind::Unary {
            op: UnaryOp::Negate,
            operand,
        } => format!("-{}", wrapped(operand, precedence(operand) < 8)),
        ExprKind::Unary {
            op: UnaryOp::Not,
            operand,
        } => format!("not {}", wrapped(operand, precedence(operand) < 3)),
        ExprKind::If {
            condition,
            then,
            otherwise,
        } => {
            format!(
                "if {} then {} else {}",
                expr(condition),
                expr(then),
                expr(otherwise)
            )
        }
        ExprKind::Binary { op, left, right } => {
            let p = op.precedence();
            let (left_parens, right_parens) = if *op == BinaryOp::Power {
                (precedence(left) <= p, precedence(right) < 7)
            } else if op.is_comparison() {
                (precedence(left) <= p, precedence(right) <= p)
            } else {
                (precedence(left) < p, precedence(right) <= p)
            };
            format!(
                "{} {} {}",
                wrapped(left, left_parens),
                op.symbol(),
                wrapped(right, right_parens)
            )
        }
    }
}
