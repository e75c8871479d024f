//! Core mathematical built-ins: roots, exponentials, extremes, lists.
//!
//! These work on quantities of any dimension where that makes sense and refuse
//! (with the argument blamed) where it does not, e.g. `ln(3 m)`.

use super::{type_word, Arg, Args, Builtin, Param};
use crate::diag::Diagnostic;
use crate::units::{Kind, Quantity};
use crate::value::Value;

const X: &[Param] = &[Param {
    name: "x",
    unit: "any",
    default: None,
    doc: "the value",
}];
const X_PLAIN: &[Param] = &[Param {
    name: "x",
    unit: "-",
    default: None,
    doc: "a plain number",
}];
const AB: &[Param] = &[
    Param {
        name: "a",
        unit: "any",
        default: None,
        doc: "first value",
    },
    Param {
        name: "b",
        unit: "same as a",
        default: None,
        doc: "second value",
    },
];
const VALUES: &[Param] = &[Param {
    name: "values",
    unit: "list",
    default: None,
    doc: "a list of quantities of one dimension",
}];
const LINSPACE: &[Param] = &[
    Param {
        name: "from",
        unit: "any",
        default: None,
        doc: "first value",
    },
    Param {
        name: "to",
        unit: "same as from",
        default: None,
        doc: "last value",
    },
    Param {
        name: "n",
        unit: "-",
        default: None,
        doc: "number of values, 2 to 10000",
    },
];

const fn math(
    name: &'static str,
    params: &'static [Param],
    returns: &'static str,
    doc: &'static str,
    example: &'static str,
    func: fn(&mut Args) -> Result<Value, Diagnostic>,
) -> Builtin {
    Builtin {
        name,
        family: "math",
        params,
        returns,
        doc,
        method: "exact arithmetic in f64 (IEEE 754)",
        source: "common practice",
        validity: "any finite input; results that are not finite numbers are errors",
        example,
        func,
    }
}

/// The math family.
pub const BUILTINS: &[Builtin] = &[
    math("sqrt", X, "root of the argument's unit", "Square root. A dimensioned argument needs even exponents, e.g. sqrt(4 m^2) is 2 m.", "sqrt(2.25 m^2)", sqrt),
    math("exp", X_PLAIN, "-", "Exponential e^x of a plain number.", "exp(-0.35 h^-1 * 2 h)", exp),
    math("ln", X_PLAIN, "-", "Natural logarithm of a positive plain number.", "ln(0.5)", ln),
    math("log10", X_PLAIN, "-", "Base-10 logarithm of a positive plain number.", "log10(1000)", log10),
    math("abs", X, "unit of x", "Absolute value, keeping the unit and kind.", "abs(-3 K)", abs),
    math("min", AB, "unit of a", "The smaller of two quantities of one dimension.", "min(2 m, 30 cm)", min),
    math("max", AB, "unit of a", "The larger of two quantities of one dimension.", "max(2 m, 30 cm)", max),
    math("sum", VALUES, "unit of the items", "Sum of a list of quantities of one dimension.", "sum([1 kg, 500 g])", sum),
    math("mean", VALUES, "unit of the items", "Arithmetic mean of a non-empty list of quantities of one dimension.", "mean([40 degC, 50 degC])", mean),
    math("len", VALUES, "-", "Number of items in a list.", "len([1, 2, 3])", len),
    math("linspace", LINSPACE, "list", "n evenly spaced values from `from` to `to`, both included: the usual way to build a sweep.", "linspace(40 degC, 80 degC, 5)", linspace),
];

fn quantity(args: &mut Args, name: &str) -> Result<(Quantity, Arg), Diagnostic> {
    let arg = args.required(name)?;
    match &arg.value {
        Value::Quantity(q, _) => Ok((*q, arg)),
        other => Err(Diagnostic::error(
            arg.span,
            format!("`{name}` must be a quantity, found {}", type_word(other)),
        )),
    }
}

fn plain(args: &mut Args) -> Result<(f64, Arg), Diagnostic> {
    let (q, arg) = quantity(args, "x")?;
    if !q.dim.is_dimensionless() {
        let msg = format!(
            "`{}` needs a plain number, found {}",
            args.builtin.name,
            crate::eval::dim_words(q.dim)
        );
        return Err(Diagnostic::error(arg.span, msg)
            .with_hint("divide by a reference value first, e.g. `x / (1 m)`"));
    }
    Ok((q.si, arg))
}

fn number(x: f64, args: &Args) -> Result<Value, Diagnostic> {
    args.finish()?;
    if x.is_finite() {
        Ok(Value::Quantity(Quantity::number(x), None))
    } else {
        Err(Diagnostic::error(
            args.call_span,
            format!("`{}` has no finite result here", args.builtin.name),
        ))
    }
}

fn sqrt(args: &mut Args) -> Result<Value, Diagnostic> {
    let (q, arg) = quantity(args, "x")?;
    if q.si < 0.0 {
        return Err(Diagnostic::error(
            arg.span,
            "square root of a negative value",
        ));
    }
    let r = q
        .powf(0.5)
        .map_err(|e| Diagnostic::error(arg.span, e.message))?;
    args.finish()?;
    Ok(Value::Quantity(r, None))
}

fn exp(args: &mut Args) -> Result<Value, Diagnostic> {
    let (x, _) = plain(args)?;
    number(x.exp(), args)
}

fn ln(args: &mut Args) -> Result<Value, Diagnostic> {
    let (x, arg) = plain(args)?;
    if x <= 0.0 {
        return Err(Diagnostic::error(
            arg.span,
            "logarithm of a value that is not positive",
        ));
    }
    number(x.ln(), args)
}

fn log10(args: &mut Args) -> Result<Value, Diagnostic> {
    let (x, arg) = plain(args)?;
    if x <= 0.0 {
        return Err(Diagnostic::error(
            arg.span,
            "logarithm of a value that is not positive",
        ));
    }
    number(x.log10(), args)
}

fn abs(args: &mut Args) -> Result<Value, Diagnostic> {
    let (q, arg) = quantity(args, "x")?;
    args.finish()?;
    let unit = if let Value::Quantity(_, u) = arg.value {
        u
    } else {
        None
    };
    Ok(Value::Quantity(
        Quantity::new(q.si.abs(), q.dim, q.kind),
        unit,
    ))
}

fn extreme(args: &mut Args, pick_larger: bool) -> Result<Value, Diagnostic> {
    let (a, arg_a) = quantity(args, "a")?;
    let (b, arg_b) = quantity(args, "b")?;
    args.finish()?;
    let ord = a
        .cmp(&b)
        .map_err(|e| Diagnostic::error(arg_b.span, e.message))?;
    let a_wins = (ord == std::cmp::Ordering::Greater) == pick_larger;
    Ok(if a_wins { arg_a.value } else { arg_b.value })
}

fn min(args: &mut Args) -> Result<Value, Diagnostic> {
    extreme(args, false)
}

fn max(args: &mut Args) -> Result<Value, Diagnostic> {
    extreme(args, true)
}

fn list(args: &mut Args) -> Result<(Vec<Quantity>, Arg), Diagnostic> {
    let arg = args.required("values")?;
    let Value::List(items) = &arg.value else {
        return Err(Diagnostic::error(
            arg.span,
            format!("expected a list, found {}", type_word(&arg.value)),
        ));
    };
    let mut out = Vec::with_capacity(items.len());
    for v in items {
        match v {
            Value::Quantity(q, _) => out.push(*q),
            other => {
                return Err(Diagnostic::error(
                    arg.span,
                    format!("the list holds {}, not only quantities", type_word(other)),
                ))
            }
        }
    }
    Ok((out, arg))
}

fn total(items: &[Quantity], arg: &Arg) -> Result<Quantity, Diagnostic> {
    let mut acc = items
        .first()
        .copied()
        .unwrap_or_else(|| Quantity::number(0.0));
    for q in items.iter().skip(1) {
        let q = if acc.kind == Kind::AbsoluteTemperature && q.kind == Kind::AbsoluteTemperature {
            Quantity::new(q.si, q.dim, Kind::Plain)
        } else {
            *q
        };
        acc = acc
            .add(&q)
            .map_err(|e| Diagnostic::error(arg.span, e.message))?;
    }
    Ok(acc)
}

fn sum(args: &mut Args) -> Result<Value, Diagnostic> {
    let (items, arg) = list(args)?;
    args.finish()?;
    if items.iter().any(|q| q.kind == Kind::AbsoluteTemperature) {
        return Err(
            Diagnostic::error(arg.span, "cannot sum absolute temperatures")
                .with_hint("use `mean` for an average temperature"),
        );
    }
    Ok(Value::Quantity(total(&items, &arg)?, None))
}

fn mean(args: &mut Args) -> Result<Value, Diagnostic> {
    let (items, arg) = list(args)?;
    args.finish()?;
    if items.is_empty() {
        return Err(Diagnostic::error(
            arg.span,
            "the mean of an empty list is undefined",
        ));
    }
    let t = total(&items, &arg)?;
    let kind = items[0].kind;
    Ok(Value::Quantity(
        Quantity::new(t.si / items.len() as f64, t.dim, kind),
        None,
    ))
}

fn len(args: &mut Args) -> Result<Value, Diagnostic> {
    let arg = args.required("values")?;
    args.finish()?;
    match &arg.value {
        Value::List(items) => Ok(Value::Quantity(Quantity::number(items.len() as f64), None)),
        other => Err(Diagnostic::error(
            arg.span,
            format!("expected a list, found {}", type_word(other)),
        )),
    }
}

fn linspace(args: &mut Args) -> Result<Value, Diagnostic> {
    let (from, arg_from) = quantity(args, "from")?;
    let (to, arg_to) = quantity(args, "to")?;
    let (n, arg_n) = quantity(args, "n")?;
    args.finish()?;
    if from.dim != to.dim {
        return Err(Diagnostic::error(
            arg_to.span,
            "`to` must have the dimension of `from`",
        ));
    }
    if !n.dim.is_dimensionless() || n.si.fract() != 0.0 || !(2.0..=10000.0).contains(&n.si) {
        return Err(Diagnostic::error(
            arg_n.span,
            "`n` must be a whole number from 2 to 10000",
        ));
    }
    let unit = if let Value::Quantity(_, u) = &arg_from.value {
        u.clone()
    } else {
        None
    };
    let count = n.si as usize;
    let step = (to.si - from.si) / (count - 1) as f64;
    let items = (0..count)
        .map(|i| {
            Value::Quantity(
                Quantity::new(from.si + step * i as f64, from.dim, from.kind),
                unit.clone(),
            )
        })
        .collect();
    Ok(Value::List(items))
}
