//! The typed syntax tree of a recipe. Every node carries the byte span of
//! the source text it came from, for diagnostics.

/// Byte offsets [start, end) into the recipe text.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Span {
    /// The first byte.
    pub start: usize,
    /// One past the last byte.
    pub end: usize,
}

impl Span {
    /// The span from `start` to `end`.
    pub fn new(start: usize, end: usize) -> Span {
        Span { start, end }
    }

    /// The smallest span covering both.
    pub fn to(self, other: Span) -> Span {
        Span {
            start: self.start.min(other.start),
            end: self.end.max(other.end),
        }
    }
}

/// A value with the span it was written at.
#[derive(Debug, Clone, PartialEq)]
pub struct Spanned<T> {
    /// The value.
    pub value: T,
    /// Where it was written.
    pub span: Span,
}

/// A column named bare (`weight_kg`) or in braces (`{Net weight (g)}`).
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnRef {
    /// The header as written, without braces.
    pub name: String,
    /// Written in braces (so it may hold any text).
    pub braced: bool,
    /// Where it was written.
    pub span: Span,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
/// A binary operator: arithmetic, comparison or logic.
pub enum BinaryOp {
    /// `+`
    Add,
    /// `-`
    Subtract,
    /// `*`
    Multiply,
    /// `/`
    Divide,
    /// `^`
    Power,
    /// `<`
    Less,
    /// `<=`
    LessEqual,
    /// `>`
    Greater,
    /// `>=`
    GreaterEqual,
    /// `==`
    Equal,
    /// `!=`
    NotEqual,
    /// `and` (three-valued: false and missing is false).
    And,
    /// `or` (three-valued: true or missing is true).
    Or,
}

impl BinaryOp {
    /// The operator as a recipe writes it.
    pub fn symbol(self) -> &'static str {
        match self {
            BinaryOp::Add => "+",
            BinaryOp::Subtract => "-",
            BinaryOp::Multiply => "*",
            BinaryOp::Divide => "/",
            BinaryOp::Power => "^",
            BinaryOp::Less => "<",
            BinaryOp::LessEqual => "<=",
            BinaryOp::Greater => ">",
            BinaryOp::GreaterEqual => ">=",
            BinaryOp::Equal => "==",
            BinaryOp::NotEqual => "!=",
            BinaryOp::And => "and",
            BinaryOp::Or => "or",
        }
    }

    /// Binding strength; higher binds tighter.
    pub fn precedence(self) -> u8 {
        match self {
            BinaryOp::Or => 1,
            BinaryOp::And => 2,
            BinaryOp::Less
            | BinaryOp::LessEqual
            | BinaryOp::Greater
            | BinaryOp::GreaterEqual
            | BinaryOp::Equal
            | BinaryOp::NotEqual => 4,
            BinaryOp::Add | BinaryOp::Subtract => 5,
            BinaryOp::Multiply | BinaryOp::Divide => 6,
            BinaryOp::Power => 8,
        }
    }

    /// `<`, `<=`, `>`, `>=`, `==` or `!=`: gives true or false.
    pub fn is_comparison(self) -> bool {
        self.precedence() == 4
    }

    /// `and` or `or`: combines conditions.
    pub fn is_logical(self) -> bool {
        matches!(self, BinaryOp::And | BinaryOp::Or)
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
/// A prefix operator.
pub enum UnaryOp {
    /// `-x`
    Negate,
    /// `not c`
    Not,
}

#[derive(Debug, Clone, PartialEq)]
/// What an expression is.
pub enum ExprKind {
    /// A number as written (`12`, `-3.5`, `1e-3`).
    Number(f64),
    /// `10%`, stored as written (10); its value is a hundredth of that.
    Percent(f64),
    /// A string in double quotes.
    Text(String),
    /// `date "2026-10-01"`, held as its spreadsheet serial (days since
    /// 1899-12-30), the same number a date cell holds.
    Date(f64),
    /// A column or `let`.
    Column(ColumnRef),
    /// A function call (`mean(x)`, `percentile(x, 90, hf6)`).
    Call {
        /// The function's name.
        function: Spanned<String>,
        /// The arguments: the column first, then numbers and option words.
        args: Vec<Expr>,
    },
    /// `-x` or `not c`.
    Unary {
        /// The operator.
        op: UnaryOp,
        /// What it applies to.
        operand: Box<Expr>,
    },
    /// Two operands joined by an operator.
    Binary {
        /// The operator.
        op: BinaryOp,
        /// The left operand.
        left: Box<Expr>,
        /// The right operand.
        right: Box<Expr>,
    },
    /// `if C then A else B`.
    If {
        /// The condition.
        condition: Box<Expr>,
        /// The value where it holds.
        then: Box<Expr>,
        /// The value where it does not.
        otherwise: Box<Expr>,
    },
}

#[derive(Debug, Clone, PartialEq)]
/// An expression with its place in the recipe.
pub struct Expr {
    /// What it is.
    pub kind: ExprKind,
    /// Where it was written.
    pub span: Span,
}

impl Expr {
    /// The direct sub-expressions.
    pub fn children(&self) -> Vec<&Expr> {
        match &self.kind {
            ExprKind::Number(_)
            | ExprKind::Percent(_)
            | ExprKind::Text(_)
            | ExprKind::Date(_)
            | ExprKind::Column(_) => vec![],
            ExprKind::Call { args, .. } => args.iter().collect(),
            ExprKind::Unary { operand, .. } => vec![operand],
            ExprKind::Binary { left, right, .. } => vec![left, right],
            ExprKind::If {
                condition,
                then,
                otherwise,
            } => vec![condition, then, otherwise],
        }
    }

    fn children_mut(&mut self) -> Vec<&mut Expr> {
        match &mut self.kind {
            ExprKind::Number(_)
            | ExprKind::Percent(_)
            | ExprKind::Text(_)
            | ExprKind::Date(_)
            | ExprKind::Column(_) => vec![],
            ExprKind::Call { args, .. } => args.iter_mut().collect(),
            ExprKind::Unary { operand, .. } => vec![operand],
            ExprKind::Binary { left, right, .. } => vec![left, right],
            ExprKind::If {
                condition,
                then,
                otherwise,
            } => vec![condition, then, otherwise],
        }
    }

    /// Depth of the tree, counted without recursion (so a hostile recipe
    /// cannot overflow the stack here).
    pub fn depth(&self) -> usize {
        let mut deepest = 0;
        let mut stack = vec![(self, 1)];
        while let Some((e, d)) = stack.pop() {
            deepest = deepest.max(d);
            stack.extend(e.children().into_iter().map(|c| (c, d + 1)));
        }
        deepest
    }

    fn clear_spans(&mut self) {
        self.span = Span::default();
        match &mut self.kind {
            ExprKind::Column(c) => c.span = Span::default(),
            ExprKind::Call { function, .. } => function.span = Span::default(),
            _ => {}
        }
        for child in self.children_mut() {
            child.clear_spans();
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
/// What a check's failure does.
pub enum CheckLevel {
    /// `warn`: listed, exit status 0.
    Warn,
    /// `fail`: listed, exit status 1.
    Fail,
}

#[derive(Debug, Clone, PartialEq)]
/// How a histogram's bins are chosen.
pub enum Bins {
    /// A rule by name (`freedman_diaconis`, `sturges`, ...).
    Rule(String),
    /// A fixed number of bins.
    Count(u32),
}

/// A setting of the `input` line about how to read the file.
#[derive(Debug, Clone, PartialEq)]
pub enum ReadSetting {
    /// `decimal comma` or `decimal point`.
    Decimal(char),
    /// `thousands "."`, or `thousands none`.
    Thousands(Option<char>),
    /// `encoding "windows-1252"`.
    Encoding(String),
    /// `keep summary rows`: rows such as Total at the bottom stay data.
    KeepSummaryRows,
    /// `merge similar keys`: keys differing only in case or inner spaces are one.
    MergeSimilarKeys,
}

#[derive(Debug, Clone, PartialEq)]
/// One `name = expr` line of a `figures` block.
pub struct Figure {
    /// The figure's name.
    pub name: Spanned<String>,
    /// Its expression, one value per group.
    pub value: Expr,
}

#[derive(Debug, Clone, PartialEq)]
/// What a statement says.
pub enum StatementKind {
    /// `title "..."`: the result's title.
    Title(Spanned<String>),
    /// `input sheet "S", header row N, ...`: where and how to read the data.
    Input {
        /// The sheet to read; the first sheet when absent.
        sheet: Option<Spanned<String>>,
        /// The header row (1-based); found when absent.
        header_row: Option<Spanned<u32>>,
        /// How to read the file's text: number marks, encoding, rows, keys.
        reading: Vec<Spanned<ReadSetting>>,
    },
    /// `header weight_mg or {Weight (mg)} or {Weight [mg]}`: a column the
    /// recipe calls by its first name, whose header may be any of the names.
    Header {
        /// The names, the first being what the recipe calls it.
        names: Vec<ColumnRef>,
    },
    /// `let name = expr`: a derived column, row by row.
    Let {
        /// The new column's name.
        name: Spanned<String>,
        /// Its expression.
        value: Expr,
    },
    /// `rows where COND`: a filter for every block below it.
    RowsWhere(Expr),
    /// `panel "NAME" of COLS [per KEYS] [where COND]:` the standard panel.
    Panel {
        /// The panel's name.
        name: Spanned<String>,
        /// The columns summarised.
        columns: Vec<ColumnRef>,
        /// The group keys.
        per: Vec<ColumnRef>,
        /// The block's own row filter.
        filter: Option<Expr>,
    },
    /// `figures "NAME" [per KEYS] [where COND]:` named figures.
    Figures {
        /// The block's name.
        name: Spanned<String>,
        /// The group keys.
        per: Vec<ColumnRef>,
        /// The block's own row filter.
        filter: Option<Expr>,
        /// Its `name = expr` lines.
        figures: Vec<Figure>,
    },
    /// `check "NAME" warn|fail [per KEYS]: COND`.
    Check {
        /// The check's name.
        name: Spanned<String>,
        /// `warn` or `fail`.
        level: CheckLevel,
        /// The group keys (checked overall too).
        per: Vec<ColumnRef>,
        /// The condition.
        condition: Expr,
    },
    /// `histogram COL [per KEYS] [, bins RULE|N]`.
    Histogram {
        /// The column drawn.
        column: ColumnRef,
        /// One chart per group.
        per: Vec<ColumnRef>,
        /// The bin rule or count; Sturges when absent.
        bins: Option<Spanned<Bins>>,
    },
    /// The period this data covers, when the file name does not say.
    Period(Spanned<String>),
    /// `period from COLUMN`: the period is the month of the dates (or the
    /// period written as text) in a column of the data; it wins over the
    /// file name.
    PeriodFrom(ColumnRef),
    /// `noise 3 se`: how many standard errors of the change a figure that
    /// has one must move, beside the drift, to be flagged.
    Noise(Spanned<f64>),
    /// How large a relative change to the previous period is flagged: the
    /// number as written and whether it was a percentage.
    Drift(Spanned<(f64, bool)>),
    /// `boxplot COL [per KEYS]`: one box per group.
    Boxplot {
        /// The column drawn.
        column: ColumnRef,
        /// A box per group.
        per: Vec<ColumnRef>,
    },
    /// How a column is named in chart titles, on axes and in tables (its
    /// units, say); presentation only, so not part of the fingerprint.
    Label {
        /// The column labelled.
        column: ColumnRef,
        /// The label.
        text: Spanned<String>,
    },
}

#[derive(Debug, Clone, PartialEq)]
/// A statement with its place in the recipe.
pub struct Statement {
    /// What it says.
    pub kind: StatementKind,
    /// Its lines in the recipe.
    pub span: Span,
}

#[derive(Debug, Clone, PartialEq, Default)]
/// A parsed recipe: its statements in order.
pub struct Recipe {
    /// The statements, in the recipe's order.
    pub statements: Vec<Statement>,
}

impl Recipe {
    /// The same tree with every span zeroed: two recipes that differ only
    /// in layout compare equal this way.
    pub fn without_spans(&self) -> Recipe {
        let mut copy = self.clone();
        let zero = Span::default();
        for statement in &mut copy.statements {
            statement.span = zero;
            let clear_columns =
                |cols: &mut Vec<ColumnRef>| cols.iter_mut().for_each(|c| c.span = zero);
            match &mut statement.kind {
                StatementKind::Title(t) => t.span = zero,
                StatementKind::Input {
                    sheet,
                    header_row,
                    reading,
                } => {
                    if let Some(s) = sheet {
                        s.span = zero;
                    }
                    if let Some(h) = header_row {
                        h.span = zero;
                    }
                    reading.iter_mut().for_each(|r| r.span = zero);
                }
                StatementKind::Header { names } => clear_columns(names),
                StatementKind::Let { name, value } => {
                    name.span = zero;
                    value.clear_spans();
                }
                StatementKind::RowsWhere(e) => e.clear_spans(),
                StatementKind::Panel {
                    name,
                    columns,
                    per,
                    filter,
                } => {
                    name.span = zero;
                    clear_columns(columns);
                    clear_columns(per);
                    if let Some(f) = filter {
                        f.clear_spans();
                    }
                }
                StatementKind::Figures {
                    name,
                    per,
                    filter,
                    figures,
                } => {
                    name.span = zero;
                    clear_columns(per);
                    if let Some(f) = filter {
                        f.clear_spans();
                    }
                    for figure in figures {
                        figure.name.span = zero;
                        figure.value.clear_spans();
                    }
                }
                StatementKind::Check {
                    name,
                    per,
                    condition,
                    ..
                } => {
                    name.span = zero;
                    clear_columns(per);
                    condition.clear_spans();
                }
                StatementKind::Histogram { column, per, bins } => {
                    column.span = zero;
                    clear_columns(per);
                    if let Some(b) = bins {
                        b.span = zero;
                    }
                }
                StatementKind::Boxplot { column, per } => {
                    column.span = zero;
                    clear_columns(per);
                }
                StatementKind::Period(p) => p.span = zero,
                StatementKind::PeriodFrom(c) => c.span = zero,
                StatementKind::Noise(n) => n.span = zero,
                StatementKind::Drift(d) => d.span = zero,
                StatementKind::Label { column, text } => {
                    column.span = zero;
                    text.span = zero;
                }
            }
        }
        copy
    }
}
