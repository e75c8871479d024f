//! The typed syntax tree of a worksheet. Every node carries a span.

use std::sync::Arc;

use crate::diag::Span;

/// A name as written, with its span.
#[derive(Clone, Debug, PartialEq)]
pub struct Ident {
    pub name: String,
    pub span: Span,
}

/// One statement of a worksheet (one logical line).
#[derive(Clone, Debug, PartialEq)]
pub struct Stmt {
    pub kind: StmtKind,
    pub span: Span,
}

/// What a statement does.
#[derive(Clone, Debug, PartialEq)]
pub enum StmtKind {
    /// `name = expr`
    Binding { name: Ident, expr: Arc<Expr> },
    /// `input name = expr`: a value a reader may override.
    Input { name: Ident, expr: Arc<Expr> },
    /// `check expr`: a design rule.
    Check(Arc<Expr>),
    /// `f(x, y) = expr`
    Function {
        name: Ident,
        params: Vec<Ident>,
        body: Arc<Expr>,
    },
    /// A bare expression, shown.
    Show(Arc<Expr>),
}

impl Stmt {
    /// The name this statement defines, if any.
    pub fn defined_name(&self) -> Option<&Ident> {
        match &self.kind {
            StmtKind::Binding { name, .. }
            | StmtKind::Input { name, .. }
            | StmtKind::Function { name, .. } => Some(name),
            StmtKind::Check(_) | StmtKind::Show(_) => None,
        }
    }
}

/// An expression with its span.
#[derive(Clone, Debug, PartialEq)]
pub struct Expr {
    pub kind: ExprKind,
    pub span: Span,
}

/// The forms of expression.
#[derive(Clone, Debug, PartialEq)]
pub enum ExprKind {
    /// A number with an optional unit: `12 mm`, `0.5`.
    Quantity {
        value: f64,
        unit: Option<UnitExpr>,
    },
    Bool(bool),
    Str(String),
    Name(String),
    List(Vec<Expr>),
    /// `{ a: 1, b: 2 m }`
    Record(Vec<(Ident, Expr)>),
    Unary(UnaryOp, Box<Expr>),
    Binary(BinaryOp, Box<Expr>, Box<Expr>),
    /// `name(args)`
    Call {
        callee: Ident,
        args: Vec<CallArg>,
    },
    /// `expr.field`
    Field(Box<Expr>, Ident),
    /// `expr as unit`: display only.
    As(Box<Expr>, UnitExpr),
    /// `if c then a else b`
    If(Box<Expr>, Box<Expr>, Box<Expr>),
}

/// One argument at a call site, positional or `name: value`.
#[derive(Clone, Debug, PartialEq)]
pub struct CallArg {
    pub name: Option<Ident>,
    pub value: Expr,
    pub span: Span,
}

/// Prefix operators.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum UnaryOp {
    Neg,
    Not,
}

/// Infix operators.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BinaryOp {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
    Lt,
    Le,
    Gt,
    Ge,
    Eq,
    Ne,
    And,
    Or,
}

impl BinaryOp {
    /// The operator as written.
    pub fn symbol(self) -> &'static str {
        match self {
            BinaryOp::Add => "+",
            BinaryOp::Sub => "-",
            BinaryOp::Mul => "*",
            BinaryOp::Div => "/",
            BinaryOp::Pow => "^",
            BinaryOp::Lt => "<",
            BinaryOp::Le => "<=",
            BinaryOp::Gt => ">",
            BinaryOp::Ge => ">=",
            BinaryOp::Eq => "==",
            BinaryOp::Ne => "!=",
            BinaryOp::And => "and",
            BinaryOp::Or => "or",
        }
    }
}

/// A unit expression as written: `kg/m^2`, `BTU/(h*ft^2*degF)`.
#[derive(Clone, Debug, PartialEq)]
pub struct UnitExpr {
    pub kind: UnitKind,
    pub span: Span,
}

/// The forms of unit expression.
#[derive(Clone, Debug, PartialEq)]
pub enum UnitKind {
    Name(String),
    Mul(Box<UnitExpr>, Box<UnitExpr>),
    Div(Box<UnitExpr>, Box<UnitExpr>),
    Pow(Box<UnitExpr>, i32),
}
