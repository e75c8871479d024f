//! Operators on values: checked quantity arithmetic, comparison, logic, and
//! element-wise application over lists.

use std::cmp::Ordering;

use crate::library::type_word;
use crate::syntax::{BinaryOp, UnaryOp};
use crate::units::{describe_dim, Dim, Kind, Quantity, UnitError};
use crate::value::Value;

/// Why an operator could not be applied (span-less; the evaluator adds spans).
#[derive(Debug)]
pub struct OpError {
    pub message: String,
    pub hints: Vec<String>,
    /// The two dimensions, when the error is a dimension mismatch.
    pub dims: Option<(Dim, Dim)>,
}

impl OpError {
    fn plain(message: impl Into<String>) -> OpError {
        OpError {
            message: message.into(),
            hints: Vec::new(),
            dims: None,
        }
    }

    #[cold]
    fn unit(e: UnitError, a: &Quantity, b: &Quantity) -> OpError {
        let dims = (a.dim != b.dim).then_some((a.dim, b.dim));
        OpError {
            message: e.message,
            hints: e.hints,
            dims,
        }
    }
}

/// A dimension in words with its SI unit, e.g. "length [m]".
pub fn dim_words(d: Dim) -> String {
    let unit = d.si_unit();
    if unit.is_empty() {
        describe_dim(d)
    } else {
        format!("{} [{unit}]", describe_dim(d))
    }
}

/// Apply a binary operator (not `and`/`or`, which short-circuit in the evaluator).
pub fn binary(op: BinaryOp, a: &Value, b: &Value) -> Result<Value, OpError> {
    match (a, b) {
        (Value::Quantity(x, ux), Value::Quantity(y, _)) => quantity_op(op, x, ux.as_ref(), y),
        (Value::List(xs), Value::List(ys)) => {
            if xs.len() != ys.len() {
                return Err(OpError::plain(format!(
                    "lists of different lengths ({} and {})",
                    xs.len(),
                    ys.len()
                )));
            }
            xs.iter()
                .zip(ys)
                .map(|(x, y)| binary(op, x, y))
                .collect::<Result<_, _>>()
                .map(Value::List)
        }
        (Value::List(xs), y) => xs
            .iter()
            .map(|x| binary(op, x, y))
            .collect::<Result<_, _>>()
            .map(Value::List),
        (x, Value::List(ys)) => ys
            .iter()
            .map(|y| binary(op, x, y))
            .collect::<Result<_, _>>()
            .map(Value::List),
        (Value::Bool(x), Value::Bool(y)) if matches!(op, BinaryOp::Eq | BinaryOp::Ne) => {
            Ok(Value::Bool((x == y) == (op == BinaryOp::Eq)))
        }
        (Value::Str(x), Value::Str(y)) => string_op(op, x, y),
        _ => Err(OpError::plain(format!(
            "`{}` cannot combine {} and {}",
            op.symbol(),
            type_word(a),
            type_word(b)
        ))),
    }
}

fn string_op(op: BinaryOp, x: &str, y: &str) -> Result<Value, OpError> {
    match op {
        BinaryOp::Add => Ok(Value::Str(format!("{x}{y}"))),
        BinaryOp::Eq => Ok(Value::Bool(x == y)),
        BinaryOp::Ne => Ok(Value::Bool(x != y)),
        _ => Err(OpError::plain(format!(
            "`{}` does not apply to text",
            op.symbol()
        ))),
    }
}

fn quantity_op(
    op: BinaryOp,
    x: &Quantity,
    shown: Option<&crate::units::Unit>,
    y: &Quantity,
) -> Result<Value, OpError> {
    let q = match op {
        BinaryOp::Add | BinaryOp::Sub | BinaryOp::Mul | BinaryOp::Div => arithmetic(op, x, y)?,
        BinaryOp::Pow => power(x, y)?,
        _ => return compare(op, x, y),
    };
    finite(&q)?;
    // A sum keeps the left operand's display unit while it means the same kind of thing.
    let keep = matches!(op, BinaryOp::Add | BinaryOp::Sub) && q.kind == x.kind && q.dim == x.dim;
    Ok(Value::Quantity(q, if keep { shown.cloned() } else { None }))
}

/// True for `+ - * /`, which [`arithmetic`] applies.
#[inline]
pub fn is_arithmetic(op: BinaryOp) -> bool {
    matches!(
        op,
        BinaryOp::Add | BinaryOp::Sub | BinaryOp::Mul | BinaryOp::Div
    )
}

/// `x op y` for `+ - * /` on two quantities (a result that is not finite is
/// an error); any other operator is refused.
#[inline(always)]
pub fn arithmetic(op: BinaryOp, x: &Quantity, y: &Quantity) -> Result<Quantity, OpError> {
    let q = match op {
        BinaryOp::Add => x.add(y),
        BinaryOp::Sub => x.sub(y),
        BinaryOp::Mul => x.mul(y),
        BinaryOp::Div => x.div(y),
        _ => return Err(not_arithmetic(op)),
    };
    q.map_err(|e| OpError::unit(e, x, y))
}

#[cold]
fn not_arithmetic(op: BinaryOp) -> OpError {
    OpError::plain(format!("`{}` is not arithmetic", op.symbol()))
}

fn power(x: &Quantity, y: &Quantity) -> Result<Quantity, OpError> {
    if !y.dim.is_dimensionless() {
        return Err(OpError::plain(format!(
            "an exponent must be a plain number, found {}",
            dim_words(y.dim)
        )));
    }
    let n = y.si;
    if n.fract() == 0.0 && n.abs() <= 64.0 {
        x.powi(n as i32).map_err(|e| OpError {
            message: e.message,
            hints: e.hints,
            dims: None,
        })
    } else {
        x.powf(n).map_err(|e| OpError {
            message: e.message,
            hints: e.hints,
            dims: None,
        })
    }
}

fn compare(op: BinaryOp, x: &Quantity, y: &Quantity) -> Result<Value, OpError> {
    let ord = x.cmp(y).map_err(|e| OpError::unit(e, x, y))?;
    let r = match op {
        BinaryOp::Lt => ord == Ordering::Less,
        BinaryOp::Le => ord != Ordering::Greater,
        BinaryOp::Gt => ord == Ordering::Greater,
        BinaryOp::Ge => ord != Ordering::Less,
        BinaryOp::Eq => ord == Ordering::Equal,
        BinaryOp::Ne => ord != Ordering::Equal,
        _ => {
            return Err(OpError::plain(format!(
                "`{}` is not a comparison",
                op.symbol()
            )))
        }
    };
    Ok(Value::Bool(r))
}

/// Refuse NaN and infinities as results.
pub fn finite(q: &Quantity) -> Result<(), OpError> {
    if q.si.is_finite() {
        Ok(())
    } else {
        Err(OpError::plain("the result is not a finite number"))
    }
}

/// Apply a prefix operator.
pub fn unary(op: UnaryOp, v: &Value) -> Result<Value, OpError> {
    match (op, v) {
        (UnaryOp::Neg, Value::Quantity(q, u)) => {
            let n = q.neg().map_err(|e| OpError {
                message: e.message,
                hints: e.hints,
                dims: None,
            })?;
            Ok(Value::Quantity(n, u.clone()))
        }
        (UnaryOp::Not, Value::Bool(b)) => Ok(Value::Bool(!b)),
        (_, Value::List(xs)) => xs
            .iter()
            .map(|x| unary(op, x))
            .collect::<Result<_, _>>()
            .map(Value::List),
        (UnaryOp::Neg, other) => Err(OpError::plain(format!(
            "cannot negate {}",
            type_word(other)
        ))),
        (UnaryOp::Not, other) => Err(OpError::plain(format!(
            "`not` needs a truth value, found {}",
            type_word(other)
        ))),
    }
}

/// Is this quantity an absolute temperature? (for hints)
pub fn is_absolute(v: &Value) -> bool {
    matches!(v, Value::Quantity(q, _) if q.kind == Kind::AbsoluteTemperature)
}
