//! The typed syntax tree of a recipe. Every node carries the byte span of
//! the source text it came from, for diagnostics.

/// Byte offsets [start, end) into the recipe text.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Span {
    pub start: usize,
    pub end: usize,
}

impl Span {
    pub fn new(start: usize, end: usize) -> Span {
        Span { start, end }
    }

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
    pub value: T,
    pub span: Span,
}

/// A column named bare (`weight_kg`) or in braces (`{Net weight (g)}`).
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnRef {
    pub name: String,
    pub braced: bool,
    pub span: Span,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BinaryOp {
    Add,
    Subtract,
    Multiply,
    Divide,
    Power,
    Less,
    LessEqual,
    Greater,
    GreaterEqual,
    Equal,
    NotEqual,
    And,
    Or,
}

impl BinaryOp {
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

    pub fn is_comparison(self) -> bool {
        self.precedence() == 4
    }

    pub fn is_logical(self) -> bool {
        matches!(self, BinaryOp::And | BinaryOp::Or)
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum UnaryOp {
    Negate,
    Not,
}

#[derive(Debug, Clone, PartialEq)]
pub enum ExprKind {
    Number(f64),
    /// `10%`, stored as written (10); its value is a hundredth of that.
    Percent(f64),
    Text(String),
    /// `date "2026-10-01"`, held as its spreadsheet serial (days since
    /// 1899-12-30), the same number a date cell holds.
    Date(f64),
    Column(ColumnRef),
    Call {
        function: Spanned<String>,
        args: Vec<Expr>,
    },
    Unary {
        op: UnaryOp,
        operand: Box<Expr>,
    },
    Binary {
        op: BinaryOp,
        left: Box<Expr>,
        right: Box<Expr>,
    },
    If {
        condition: Box<Expr>,
        then: Box<Expr>,
        otherwise: Box<Expr>,
    },
}

#[derive(Debug, Clone, PartialEq)]
pub struct Expr {
    pub kind: ExprKind,
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
pub enum CheckLevel {
    Warn,
    Fail,
}

#[derive(Debug, Clone, PartialEq)]
pub enum Bins {
    Rule(String),
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
pub struct Figure {
    pub name: Spanned<String>,
    pub value: Expr,
}

#[derive(Debug, Clone, PartialEq)]
pub enum StatementKind {
    Title(Spanned<String>),
    Input {
        sheet: Option<Spanned<String>>,
        header_row: Option<Spanned<u32>>,
        /// How to read the file's text: number marks, encoding, rows, keys.
        reading: Vec<Spanned<ReadSetting>>,
    },
    /// `header weight_mg or {Weight (mg)} or {Weight [mg]}`: a column the
    /// recipe calls by its first name, whose header may be any of the names.
    Header {
        names: Vec<ColumnRef>,
    },
    Let {
        name: Spanned<String>,
        value: Expr,
    },
    RowsWhere(Expr),
    Panel {
        name: Spanned<String>,
        columns: Vec<ColumnRef>,
        per: Vec<ColumnRef>,
        filter: Option<Expr>,
    },
    Figures {
        name: Spanned<String>,
        per: Vec<ColumnRef>,
        filter: Option<Expr>,
        figures: Vec<Figure>,
    },
    Check {
        name: Spanned<String>,
        level: CheckLevel,
        per: Vec<ColumnRef>,
        condition: Expr,
    },
    Histogram {
        column: ColumnRef,
        per: Vec<ColumnRef>,
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
    Boxplot {
        column: ColumnRef,
        per: Vec<ColumnRef>,
    },
    /// How a column is named in chart titles, on axes and in tables (its
    /// units, say); presentation only, so not part of the fingerprint.
    Label {
        column: ColumnRef,
        text: Spanned<String>,
    },
}

#[derive(Debug, Clone, PartialEq)]
pub struct Statement {
    pub kind: StatementKind,
    pub span: Span,
}

#[derive(Debug, Clone, PartialEq, Default)]
pub struct Recipe {
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
