//! Checking shapes (dimensions, kinds, types) where magnitudes are unknown.
//!
//! `siccant check` runs no engine work: a built-in call gives a value of known
//! shape and unknown magnitude (NaN; see `library::shape`), and operators,
//! `as`, `check` and later calls go on checking with it. Operators on an
//! unknown operand run on stand-in magnitudes (300 K for an absolute
//! temperature, 0.5 otherwise) and forget the magnitude of the result, so no
//! magnitude can cause an error. Where even the shape depends on a magnitude
//! (a dimensioned base raised to an unknown power, a recursive function, a
//! result of no fixed shape) the value is skipped and what depends on it stays
//! unchecked.
//!
//! "Blind" evaluation is the same with every operand treated as unknown. It
//! checks both branches of an `if` in `siccant check`, and in `siccant run` the
//! branch not taken when that is cheap (no calls, only values already
//! computed), so `if c then 1 m else 2 s` is an error either way.

use super::ctx::{Ctx, Flow, Mode, Stop};
use crate::diag::{Diagnostic, Span};
use crate::library::{shape as shapes, type_word, Arg, Args, Builtin};
use crate::syntax::{BinaryOp, Expr, ExprKind};
use crate::units::{Kind, Quantity};
use crate::value::{Record, Value};

/// Shape-checking state of one evaluation.
#[derive(Debug, Default)]
pub struct Checking {
    /// Depth of blind evaluation (every operand treated as unknown).
    pub blind: u32,
    /// User functions being called, while checking (catches recursion).
    pub calls: Vec<String>,
    /// Recursive calls skipped so far.
    pub recursions: u32,
}

/// Does `v` hold a quantity of unknown magnitude?
pub fn is_unknown(v: &Value) -> bool {
    match v {
        Value::Quantity(q, _) => q.si.is_nan(),
        Value::List(items) => items.iter().any(is_unknown),
        _ => false,
    }
}

/// `v` with the magnitude of every quantity (in lists and records) forgotten.
pub fn forget(v: &Value) -> Value {
    match v {
        Value::Quantity(q, u) => Value::Quantity(Quantity::new(f64::NAN, q.dim, q.kind), u.clone()),
        Value::List(items) => Value::List(items.iter().map(forget).collect()),
        Value::Record(r) => Value::Record(Record {
            type_name: r.type_name.clone(),
            fields: std::sync::Arc::new(
                r.fields
                    .iter()
                    .map(|(n, f)| (n.clone(), forget(f)))
                    .collect(),
            ),
            payload: None,
        }),
        other => other.clone(),
    }
}

/// `v` with every quantity replaced by a harmless stand-in magnitude.
pub(super) fn stand_in(v: &Value) -> Value {
    match v {
        Value::Quantity(q, u) => {
            let si = if q.kind == Kind::AbsoluteTemperature {
                300.0
            } else {
                0.5
            };
            Value::Quantity(Quantity::new(si, q.dim, q.kind), u.clone())
        }
        Value::List(items) => Value::List(items.iter().map(stand_in).collect()),
        other => other.clone(),
    }
}

/// Stand-ins for the operands of `op`. A known exponent is kept (it decides the
/// dimension); an unknown one is a skip unless the base is a plain number.
fn stand_ins(op: BinaryOp, x: &Value, y: &Value) -> Flow<(Value, Value)> {
    if op != BinaryOp::Pow || !is_unknown(y) {
        let y = if op == BinaryOp::Pow {
            y.clone()
        } else {
            stand_in(y)
        };
        return Ok((stand_in(x), y));
    }
    match x {
        Value::Quantity(q, _) if q.dim.is_dimensionless() => Ok((stand_in(x), stand_in(y))),
        _ => Err(Stop::Skip),
    }
}

impl Ctx<'_> {
    /// Should an operator on these operands check shapes only?
    pub(super) fn shapes_only(&self, operands: &[&Value]) -> bool {
        self.checking.blind > 0
            || (self.mode == Mode::CheckOnly && operands.iter().any(|v| is_unknown(v)))
    }

    /// Apply `f` to stand-ins for `operands` and forget the result's magnitude.
    pub(super) fn on_shapes<E>(
        &self,
        op: Option<BinaryOp>,
        x: &Value,
        y: Option<&Value>,
        f: impl FnOnce(&Value, Option<&Value>) -> Result<Value, E>,
    ) -> Flow<Result<Value, E>> {
        let (sx, sy) = match (op, y) {
            (Some(op), Some(y)) => {
                let (a, b) = stand_ins(op, x, y)?;
                (a, Some(b))
            }
            _ => (stand_in(x), y.map(stand_in)),
        };
        Ok(f(&sx, sy.as_ref()).map(|v| forget(&v)))
    }

    /// Evaluate with every operand treated as unknown.
    pub(super) fn blind_expr(&mut self, e: &Expr) -> Flow<Value> {
        self.checking.blind += 1;
        let result = self.expr(e);
        self.checking.blind -= 1;
        result
    }

    /// `if` while checking: the condition must be a truth value and both
    /// branches must agree; the result's magnitude is unknown.
    ///
    /// A branch that recurses into the function being checked takes the other
    /// branch's shape (the base case decides, as in type inference).
    pub(super) fn both_branches(&mut self, c: &Expr, a: &Expr, b: &Expr) -> Flow<Value> {
        self.truth(c, "if")?;
        let x = self.branch(a)?;
        let y = self.branch(b)?;
        match (x, y) {
            (Some(x), Some(y)) => {
                agree(&x, &y, a.span, b.span)?;
                Ok(forget(&x))
            }
            (Some(v), None) | (None, Some(v)) => Ok(forget(&v)),
            (None, None) => Err(Stop::Skip),
        }
    }

    /// One branch, blind; `None` when it was skipped only for recursion.
    fn branch(&mut self, e: &Expr) -> Flow<Option<Value>> {
        let before = self.checking.recursions;
        match self.blind_expr(e) {
            Ok(v) => Ok(Some(v)),
            Err(Stop::Skip) if self.checking.recursions > before => Ok(None),
            Err(stop) => Err(stop),
        }
    }

    /// `if` in a run, after the taken branch gave `taken`: check the other
    /// branch blind when that costs nothing (no calls, only computed values).
    pub(super) fn branch_not_taken(
        &mut self,
        taken: &Value,
        then_taken: bool,
        a: &Expr,
        b: &Expr,
    ) -> Flow<()> {
        let other = if then_taken { b } else { a };
        if !self.cheap(other) {
            return Ok(());
        }
        let o = match self.blind_expr(other) {
            Ok(o) => o,
            Err(Stop::Error(d)) => return Err(d.into()),
            Err(_) => return Ok(()),
        };
        let (x, y) = if then_taken { (taken, &o) } else { (&o, taken) };
        agree(x, y, a.span, b.span).map_err(Stop::from)
    }

    /// Can `e` be evaluated blind without a call or computing a new value?
    fn cheap(&self, e: &Expr) -> bool {
        match &e.kind {
            ExprKind::Call { .. } => false,
            ExprKind::Name(n) => {
                self.frame.as_ref().is_some_and(|f| f.contains_key(n))
                    || self.sheet.cache.contains_key(n.as_str())
            }
            ExprKind::Quantity { .. } | ExprKind::Bool(_) | ExprKind::Str(_) => true,
            ExprKind::List(items) => items.iter().all(|i| self.cheap(i)),
            ExprKind::Record(fields) => fields.iter().all(|(_, f)| self.cheap(f)),
            ExprKind::Unary(_, a) | ExprKind::Field(a, _) | ExprKind::As(a, _) => self.cheap(a),
            ExprKind::Binary(_, a, b) => self.cheap(a) && self.cheap(b),
            ExprKind::If(c, a, b) => self.cheap(c) && self.cheap(a) && self.cheap(b),
        }
    }

    /// Is a built-in call to be checked rather than run? Everything in
    /// `siccant check` and in blind evaluation, except the plain math
    /// functions on known values, which are cheap and exact.
    pub(super) fn check_call(&self, b: &Builtin, values: &[Arg]) -> bool {
        let checking = self.mode == Mode::CheckOnly || self.checking.blind > 0;
        let exact = self.checking.blind == 0
            && b.family == "math"
            && !values.iter().any(|a| is_unknown(&a.value));
        checking && !exact
    }

    /// A built-in call checked, not run: its arguments against its parameters,
    /// then the shape of its result (a skip when the shape is not fixed).
    pub(super) fn builtin_shape(
        &mut self,
        b: &'static Builtin,
        values: Vec<Arg>,
        span: Span,
    ) -> Flow<Value> {
        Args::bind(b, span, values.clone())?;
        let indexed = param_indices(b, &values);
        for (i, arg) in &indexed {
            shapes::check_arg(b, *i, arg)?;
        }
        shapes::shaped_result(b, &indexed).ok_or(Stop::Skip)
    }

    /// While checking, a user function that is already being called is
    /// skipped: its shape may depend on how deep the recursion goes.
    pub(super) fn enter_user(&mut self, name: &str) -> Flow<bool> {
        if self.mode != Mode::CheckOnly && self.checking.blind == 0 {
            return Ok(false);
        }
        if self.checking.calls.iter().any(|n| n == name) {
            self.checking.recursions += 1;
            return Err(Stop::Skip);
        }
        self.checking.calls.push(name.to_string());
        Ok(true)
    }

    /// Undo [`Ctx::enter_user`].
    pub(super) fn leave_user(&mut self, entered: bool) {
        if entered {
            self.checking.calls.pop();
        }
    }

    /// Should `and`/`or` evaluate both sides (to check both)?
    pub(super) fn both_sides(&self) -> bool {
        self.mode == Mode::CheckOnly || self.checking.blind > 0
    }
}

/// Each argument with the index of the parameter it binds to (positional in
/// order, named by name), as [`Args::bind`] binds them.
fn param_indices<'a>(b: &Builtin, values: &'a [Arg]) -> Vec<(usize, &'a Arg)> {
    let mut next = 0;
    let mut out = Vec::with_capacity(values.len());
    for a in values {
        let index = match &a.name {
            Some(n) => b.param_index(n),
            None => {
                next += 1;
                Some(next - 1)
            }
        };
        if let Some(i) = index {
            out.push((i, a));
        }
    }
    out
}

/// The two branches of an `if` must give the same dimension (and a quantity
/// must not meet a truth value or text).
fn agree(x: &Value, y: &Value, a: Span, b: Span) -> Result<(), Diagnostic> {
    let span = Span {
        file: a.file,
        start: a.start,
        end: b.end.max(a.end),
    };
    let differ = |what: &str, wx: String, wy: String| {
        let mut d = Diagnostic::error(span, format!("the branches of `if` give {what}"));
        d.hints.push((Some(a), format!("`then` gives {wx}")));
        d.hints.push((Some(b), format!("`else` gives {wy}")));
        d
    };
    match (x, y) {
        (Value::Quantity(p, _), Value::Quantity(q, _)) if p.dim != q.dim => Err(differ(
            "different dimensions",
            super::dim_words(p.dim),
            super::dim_words(q.dim),
        )),
        (Value::List(xs), Value::List(ys)) => match (xs.first(), ys.first()) {
            (Some(p), Some(q)) => agree(p, q, a, b),
            _ => Ok(()),
        },
        (Value::Quantity(..), Value::Bool(_) | Value::Str(_))
        | (Value::Bool(_) | Value::Str(_), Value::Quantity(..)) => {
            Err(differ("different types", type_word(x), type_word(y)))
        }
        _ => Ok(()),
    }
}
