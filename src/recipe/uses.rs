//! How a recipe uses the data's columns: which it reads at all, and which
//! it reads as numbers. The loader uses the first to pick the sheet that
//! holds them; the second turns a number column that arrived as text (a
//! decimal comma, units in the cells) into a clear error instead of a
//! panel of "no values".

use super::ast::{BinaryOp, ColumnRef, Expr, ExprKind, Recipe, StatementKind, UnaryOp};
use super::functions::{self, FunctionKind};

/// A data column the recipe reads, with the first place it does.
#[derive(Debug, Clone, PartialEq)]
pub struct Use {
    /// The column's name.
    pub name: String,
    /// The first line of the recipe (1-based) that reads it this way.
    pub line: usize,
}

/// What the recipe asks of its data columns.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ColumnUses {
    /// Every data column read, in order of first use.
    pub read: Vec<Use>,
    /// Those read as numbers: summarised, in arithmetic, ordered against a number.
    pub as_numbers: Vec<Use>,
    /// Those that form groups (`per`).
    pub as_keys: Vec<Use>,
}

impl ColumnUses {
    fn add(list: &mut Vec<Use>, name: &str, line: usize) {
        if !list.iter().any(|u| u.name == name) {
            list.push(Use {
                name: name.to_string(),
                line,
            });
        }
    }
}

/// The data columns a recipe reads (not its `let` columns).
pub fn column_uses(recipe: &Recipe, source: &str) -> ColumnUses {
    let mut walker = Walker {
        uses: ColumnUses::default(),
        lets: Vec::new(),
        line: 1,
    };
    for statement in &recipe.statements {
        walker.line = line_of(source, statement.span.start);
        match &statement.kind {
            StatementKind::Let { name, value } => {
                walker.expr(value, false);
                walker.lets.push(name.value.clone());
            }
            StatementKind::RowsWhere(e) => walker.expr(e, false),
            StatementKind::Panel {
                columns,
                per,
                filter,
                ..
            } => {
                columns.iter().for_each(|c| walker.column(c, true));
                per.iter().for_each(|c| walker.key(c));
                filter.iter().for_each(|e| walker.expr(e, false));
            }
            StatementKind::Figures {
                per,
                filter,
                figures,
                ..
            } => {
                per.iter().for_each(|c| walker.key(c));
                filter.iter().for_each(|e| walker.expr(e, false));
                figures.iter().for_each(|f| walker.expr(&f.value, false));
            }
            StatementKind::Check { per, condition, .. } => {
                per.iter().for_each(|c| walker.key(c));
                walker.expr(condition, false);
            }
            StatementKind::Histogram { column, per, .. }
            | StatementKind::Boxplot { column, per } => {
                walker.column(column, true);
                per.iter().for_each(|c| walker.key(c));
            }
            // The period column is read before the recipe's filters, as it stands.
            StatementKind::PeriodFrom(c) => walker.column(c, false),
            StatementKind::Title(_)
            | StatementKind::Input { .. }
            | StatementKind::Header { .. }
            | StatementKind::Period(_)
            | StatementKind::Noise(_)
            | StatementKind::Drift(_)
            // A label names a column without reading it.
            | StatementKind::Label { .. } => {}
        }
    }
    walker.uses
}

/// The 1-based line of a byte offset.
fn line_of(source: &str, offset: usize) -> usize {
    source
        .get(..offset)
        .map_or(1, |s| s.matches('\n').count() + 1)
}

struct Walker {
    uses: ColumnUses,
    lets: Vec<String>,
    line: usize,
}

impl Walker {
    fn key(&mut self, column: &ColumnRef) {
        self.column(column, false);
        if !self.lets.contains(&column.name) {
            ColumnUses::add(&mut self.uses.as_keys, &column.name, self.line);
        }
    }

    fn column(&mut self, column: &ColumnRef, as_number: bool) {
        if self.lets.contains(&column.name) {
            return;
        }
        ColumnUses::add(&mut self.uses.read, &column.name, self.line);
        if as_number {
            ColumnUses::add(&mut self.uses.as_numbers, &column.name, self.line);
        }
    }

    /// Walks an expression; `numeric` says its value is used as a number.
    fn expr(&mut self, e: &Expr, numeric: bool) {
        match &e.kind {
            ExprKind::Column(c) => self.column(c, numeric),
            ExprKind::Number(_) | ExprKind::Percent(_) | ExprKind::Text(_) | ExprKind::Date(_) => {}
            ExprKind::Call { function, args } => {
                let takes_numbers = functions::lookup(&function.value)
                    .is_some_and(|f| !f.takes_condition() && f.kind() != FunctionKind::Comparison);
                for (i, arg) in args.iter().enumerate() {
                    self.expr(arg, i == 0 && takes_numbers);
                }
            }
            ExprKind::Unary { op, operand } => self.expr(operand, *op == UnaryOp::Negate),
            ExprKind::Binary { op, left, right } => {
                let numbers = match op {
                    BinaryOp::Add
                    | BinaryOp::Subtract
                    | BinaryOp::Multiply
                    | BinaryOp::Divide
                    | BinaryOp::Power => true,
                    // Ordered against anything but text: a number comparison.
                    BinaryOp::Less
                    | BinaryOp::LessEqual
                    | BinaryOp::Greater
                    | BinaryOp::GreaterEqual => {
                        !matches!(left.kind, ExprKind::Text(_))
                            && !matches!(right.kind, ExprKind::Text(_))
                    }
                    BinaryOp::Equal | BinaryOp::NotEqual => {
                        matches!(left.kind, ExprKind::Number(_) | ExprKind::Percent(_))
                            || matches!(right.kind, ExprKind::Number(_) | ExprKind::Percent(_))
                    }
                    BinaryOp::And | BinaryOp::Or => false,
                };
                self.expr(left, numbers);
                self.expr(right, numbers);
            }
            ExprKind::If {
                condition,
                then,
                otherwise,
            } => {
                self.expr(condition, false);
                self.expr(then, numeric);
                self.expr(otherwise, numeric);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn uses(text: &str) -> ColumnUses {
        let parsed = super::super::parse(text);
        assert!(parsed.is_ok(), "{:?}", parsed.diagnostics);
        column_uses(&parsed.recipe, text)
    }

    fn names(list: &[Use]) -> Vec<&str> {
        list.iter().map(|u| u.name.as_str()).collect()
    }

    #[test]
    fn numbers_are_what_is_summarised_or_computed_with() {
        let u = uses(
            "let late_h = {Minutes late} / 60\nrows where status != \"cancelled\"\npanel \"P\" of late_h, weight per depot:\nfigures \"F\" per depot:\n    s = share(kind == \"box\")\n    m = median(score)\ncheck \"c\" warn: max(code) < 5\n",
        );
        assert_eq!(
            names(&u.read),
            [
                "Minutes late",
                "status",
                "weight",
                "depot",
                "kind",
                "score",
                "code"
            ]
        );
        assert_eq!(
            names(&u.as_numbers),
            ["Minutes late", "weight", "score", "code"]
        );
        assert_eq!(u.as_numbers[1].line, 3);
        assert_eq!(names(&u.as_keys), ["depot"]);
    }
}
