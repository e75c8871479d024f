//! The typed syntax tree of a worksheet. Every node carries a span.

use std::fmt;
use std::sync::{Arc, OnceLock};

use crate::diag::Span;
use crate::units::Unit;

/// A name as written, with its span.
#[derive(Clone, Debug, PartialEq)]
pub struct Ident {
    /// The name as written.
    pub name: String,
    /// Where it is in the source.
    pub span: Span,
}

/// One statement of a worksheet (one logical line).
#[derive(Clone, Debug, PartialEq)]
pub struct Stmt {
    /// What the statement does.
    pub kind: StmtKind,
    /// Where it is in the source.
    pub span: Span,
}

/// What a statement does.
#[derive(Clone, Debug, PartialEq)]
pub enum StmtKind {
    /// `name = expr`
    Binding {
        /// The defined name.
        name: Ident,
        /// Its expression.
        expr: Arc<Expr>,
    },
    /// `input name = expr`: a value a reader may override.
    Input {
        /// The input's name.
        name: Ident,
        /// Its default.
        expr: Arc<Expr>,
    },
    /// `check expr`: a design rule.
    Check(Arc<Expr>),
    /// `f(x, y) = expr`
    Function {
        /// The function's name.
        name: Ident,
        /// Parameter names.
        params: Vec<Ident>,
        /// The body.
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
    /// The form of the expression.
    pub kind: ExprKind,
    /// Where it is in the source.
    pub span: Span,
}

/// The forms of expression.
#[derive(Clone, Debug, PartialEq)]
pub enum ExprKind {
    /// A number with an optional unit: `12 mm`, `0.5`.
    Quantity {
        /// The number as written.
        value: f64,
        /// The unit after it, if any.
        unit: Option<UnitExpr>,
    },
    /// `true` or `false`.
    Bool(bool),
    /// Text in double quotes (escapes resolved).
    Str(String),
    /// A name: a value, an input or a function parameter.
    Name(String),
    /// `[a, b, c]`
    List(Vec<Expr>),
    /// `{ a: 1, b: 2 m }`
    Record(Vec<(Ident, Expr)>),
    /// `-x`, `not x`
    Unary(UnaryOp, Box<Expr>),
    /// `a op b`
    Binary(BinaryOp, Box<Expr>, Box<Expr>),
    /// `name(args)`
    Call {
        /// The function called.
        callee: Ident,
        /// Its arguments, in order.
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
    /// `Some` for `name: value`.
    pub name: Option<Ident>,
    /// The argument's value.
    pub value: Expr,
    /// Where it is in the source.
    pub span: Span,
}

/// Prefix operators.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum UnaryOp {
    /// `-`
    Neg,
    /// `not`
    Not,
}

/// Infix operators.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BinaryOp {
    /// `+`
    Add,
    /// `-`
    Sub,
    /// `*`
    Mul,
    /// `/`
    Div,
    /// `^`
    Pow,
    /// `<`
    Lt,
    /// `<=`
    Le,
    /// `>`
    Gt,
    /// `>=`
    Ge,
    /// `==`
    Eq,
    /// `!=`
    Ne,
    /// `and`
    And,
    /// `or`
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
#[derive(Clone, PartialEq)]
pub struct UnitExpr {
    /// The form of the unit expression.
    pub kind: UnitKind,
    /// Where it is in the source.
    pub span: Span,
    /// The unit it stands for, kept by the evaluator once resolved (not
    /// syntax: `==` and `{:?}` ignore it).
    pub resolved: ResolvedUnit,
}

impl UnitExpr {
    /// A unit expression, not yet resolved.
    pub fn new(kind: UnitKind, span: Span) -> UnitExpr {
        UnitExpr {
            kind,
            span,
            resolved: ResolvedUnit::default(),
        }
    }
}

impl fmt::Debug for UnitExpr {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("UnitExpr")
            .field("kind", &self.kind)
            .field("span", &self.span)
            .finish()
    }
}

/// The unit a unit expression resolves to, filled once on first use.
///
/// A unit expression always means the same unit (resolution depends on its
/// text alone), so the evaluator keeps the unit here and reads it back without
/// a lookup each time the expression is evaluated again.
///
/// Boxed, so that the slot adds two words to a syntax node, not a whole unit.
#[derive(Clone, Default)]
pub struct ResolvedUnit(OnceLock<Box<Unit>>);

impl ResolvedUnit {
    /// The unit, if resolved.
    #[inline]
    pub fn get(&self) -> Option<&Unit> {
        self.0.get().map(|u| &**u)
    }

    /// Keep `unit` (unless a unit is already kept) and return the kept unit.
    pub fn keep(&self, unit: Unit) -> &Unit {
        self.0.get_or_init(|| Box::new(unit))
    }
}

impl PartialEq for ResolvedUnit {
    /// Always equal: the resolved unit is a cache, not part of the syntax.
    fn eq(&self, _: &ResolvedUnit) -> bool {
        true
    }
}

/// The forms of unit expression.
#[derive(Clone, Debug, PartialEq)]
pub enum UnitKind {
    /// A unit symbol, e.g. `kg` or `degC`.
    Name(String),
    /// `a*b`
    Mul(Box<UnitExpr>, Box<UnitExpr>),
    /// `a/b`
    Div(Box<UnitExpr>, Box<UnitExpr>),
    /// `a^n`
    Pow(Box<UnitExpr>, i32),
}
