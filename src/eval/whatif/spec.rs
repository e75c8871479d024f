//! Reading the arguments of the what-if forms: which inputs vary and over
//! what, which values to report, and the options.
//!
//! Every form names the inputs it varies as named arguments, the way `load`
//! overrides inputs: `sweep([t_dry], T_air: steps(60 degC, 90 degC, 5 K))`.
//! Positional arguments are the values to report (evaluated at every point,
//! not once). A few option names (`samples`, `seed`, `bins`) are reserved.

use super::model::Varied;
use crate::diag::{Diagnostic, Span};
use crate::engine::stats::Shape;
use crate::eval::{Ctx, DefKind, Flow};
use crate::library::type_word;
use crate::library::whatif::Distribution;
use crate::syntax::{CallArg, Expr, ExprKind, Ident};
use crate::units::{Kind, Quantity, Unit};
use crate::value::Value;

/// A form's arguments, sorted.
pub(super) struct Parts<'a> {
    pub positional: Vec<&'a CallArg>,
    /// Named arguments that are not options: the inputs to vary.
    pub inputs: Vec<(&'a Ident, &'a CallArg)>,
    pub options: Vec<(&'a Ident, &'a CallArg)>,
}

/// Sort `args` into positional arguments, inputs and the given `options`.
pub(super) fn split<'a>(args: &'a [CallArg], options: &[&str]) -> Parts<'a> {
    let mut parts = Parts {
        positional: Vec::new(),
        inputs: Vec::new(),
        options: Vec::new(),
    };
    for a in args {
        match &a.name {
            None => parts.positional.push(a),
            Some(n) if options.contains(&n.name.as_str()) => parts.options.push((n, a)),
            Some(n) => parts.inputs.push((n, a)),
        }
    }
    parts
}

/// The expressions to report: the items of a list literal, or one expression.
pub(super) fn probes(arg: &CallArg) -> Vec<Expr> {
    match &arg.value.kind {
        ExprKind::List(items) => items.clone(),
        _ => vec![arg.value.clone()],
    }
}

/// A column name for a probe: the name it reads (through `as` and fields), or its text.
pub(super) fn probe_name(e: &Expr, ctx: &Ctx) -> String {
    match &e.kind {
        ExprKind::Name(n) => n.clone(),
        ExprKind::As(inner, _) => probe_name(inner, ctx),
        _ => ctx.sources.slice(e.span).to_string(),
    }
}

/// An error at `span` with a usage hint for `form`.
pub(super) fn usage(span: Span, message: impl Into<String>, example: &str) -> Diagnostic {
    Diagnostic::error(span, message).with_hint(format!("e.g. {example}"))
}

/// Do values of kind `item` fit an input of kind `input`?
fn kinds_fit(input: Kind, item: Kind) -> bool {
    use Kind::*;
    input == item
        || item == Plain
        || (input == Plain && item != TemperatureDifference)
        || matches!((input, item), (Fraction, Activity) | (Activity, Fraction))
}

impl Ctx<'_> {
    /// The input named at the call site, with its worksheet value.
    pub(super) fn varied(&mut self, name: &Ident) -> Flow<Varied> {
        let kind = self.sheet.defs.get(&name.name).map(|d| d.kind);
        if kind != Some(DefKind::Input) {
            return Err(self.not_an_input(name, kind).into());
        }
        match self.force(&name.name, name.span)? {
            Value::Quantity(q, unit) => Ok(Varied {
                name: name.name.clone(),
                base: q,
                unit,
            }),
            other => {
                let msg = format!(
                    "only a quantity can be varied; the input `{}` is {}",
                    name.name,
                    type_word(&other)
                );
                Err(Diagnostic::error(name.span, msg).into())
            }
        }
    }

    fn not_an_input(&self, name: &Ident, kind: Option<DefKind>) -> Diagnostic {
        let inputs = self.sheet.inputs();
        let msg = match kind {
            Some(DefKind::Value) => format!(
                "`{}` is computed from other values, not an input; declare it with `input` to vary it",
                name.name
            ),
            Some(DefKind::Function) => format!("`{}` is a function, not an input", name.name),
            _ => format!("`{}` is not an input of this worksheet", name.name),
        };
        let mut d = Diagnostic::error(name.span, msg);
        if let Some(best) = crate::eval::suggest(&name.name, &inputs) {
            d = d.with_hint(format!("did you mean `{best}`?"));
        }
        let list = if inputs.is_empty() {
            "none (declare one with `input NAME = value`)".to_string()
        } else {
            inputs.join(", ")
        };
        d.with_hint(format!("inputs: {list}"))
    }

    /// A quantity that fits input `v` (dimension and kind), blaming `span`.
    fn fitting(
        &self,
        value: &Value,
        v: &Varied,
        span: Span,
    ) -> Result<(Quantity, Option<Unit>), Diagnostic> {
        let (q, unit) = match value {
            Value::Quantity(q, u) => (*q, u.clone()),
            other => {
                let msg = format!(
                    "expected a value for `{}`, found {}",
                    v.name,
                    type_word(other)
                );
                return Err(Diagnostic::error(span, msg));
            }
        };
        if q.dim != v.base.dim {
            let msg = format!(
                "`{}` is {}, but this is {}",
                v.name,
                crate::eval::dim_words(v.base.dim),
                crate::eval::dim_words(q.dim)
            );
            return Err(Diagnostic::error(span, msg));
        }
        if !kinds_fit(v.base.kind, q.kind) {
            let msg = format!(
                "`{}` is {}, but this is {}",
                v.name,
                v.base.kind.describe(),
                q.kind.describe()
            );
            return Err(Diagnostic::error(span, msg));
        }
        Ok((q, unit))
    }

    /// The list of values input `v` takes in a sweep (SI magnitudes) and the unit to show.
    pub(super) fn values_for(
        &mut self,
        arg: &CallArg,
        v: &Varied,
    ) -> Flow<(Vec<f64>, Option<Unit>)> {
        let items = match self.expr(&arg.value)? {
            Value::List(items) => items,
            q @ Value::Quantity(..) => vec![q],
            other => {
                let msg = format!(
                    "`{}` needs a list of values, found {}",
                    v.name,
                    type_word(&other)
                );
                return Err(usage(
                    arg.value.span,
                    msg,
                    "steps(60 degC, 90 degC, 5 K) or [2 m/s, 3 m/s]",
                )
                .into());
            }
        };
        if items.is_empty() {
            let msg = format!("the values for `{}` are empty", v.name);
            return Err(usage(arg.value.span, msg, "steps(60 degC, 90 degC, 5 K)").into());
        }
        let mut out = Vec::with_capacity(items.len());
        let mut unit = None;
        for (i, item) in items.iter().enumerate() {
            let (q, u) = self.fitting(item, v, arg.value.span).map_err(|mut d| {
                d.message = format!("item {} of the list: {}", i + 1, d.message);
                d
            })?;
            unit = unit.or(u);
            out.push(q.si);
        }
        Ok((out, unit.or_else(|| v.unit.clone())))
    }

    /// `[lo, hi]` for input `v`, as SI magnitudes with `lo < hi`, and the unit to show.
    pub(super) fn bracket_for(
        &mut self,
        arg: &CallArg,
        v: &Varied,
    ) -> Flow<(f64, f64, Option<Unit>)> {
        let value = self.expr(&arg.value)?;
        self.bracket_of(&value, arg.value.span, v)
    }

    fn bracket_of(&self, value: &Value, span: Span, v: &Varied) -> Flow<(f64, f64, Option<Unit>)> {
        let example = format!("{}: [low, high]", v.name);
        let items = match value {
            Value::List(items) if items.len() == 2 => items,
            other => {
                let msg = format!(
                    "`{}` needs its bounds as a list of two values [low, high], found {}",
                    v.name,
                    describe_list(other)
                );
                return Err(usage(span, msg, &example).into());
            }
        };
        let (lo, u) = self.fitting(&items[0], v, span)?;
        let (hi, _) = self.fitting(&items[1], v, span)?;
        if lo.si >= hi.si {
            let msg = format!(
                "the bounds of `{}` are empty: the low end must be below the high end",
                v.name
            );
            return Err(usage(span, msg, &example).into());
        }
        Ok((lo.si, hi.si, u.or_else(|| v.unit.clone())))
    }

    /// The distribution given for input `v`.
    pub(super) fn shape_for(&mut self, arg: &CallArg, v: &Varied) -> Flow<Shape> {
        let value = self.expr(&arg.value)?;
        self.shape_of(&value, arg.value.span, v)
    }

    fn shape_of(&self, value: &Value, span: Span, v: &Varied) -> Flow<Shape> {
        let dist = match value {
            Value::Record(r) => r.payload::<Distribution>(),
            _ => None,
        };
        let Some(dist) = dist else {
            let msg = format!(
                "`{}` needs a distribution, found {}",
                v.name,
                type_word(value)
            );
            let example = "normal(70 degC, 2 K), uniform(2 m/s, 3 m/s)";
            return Err(usage(span, msg, example).into());
        };
        let probe = Value::Quantity(Quantity::new(dist.shape.mean(), dist.dim, dist.kind), None);
        self.fitting(&probe, v, span)?;
        Ok(dist.shape)
    }

    /// `[lo, hi]` or a distribution (mean - std, mean + std) for a tornado bar.
    pub(super) fn swing_for(
        &mut self,
        arg: &CallArg,
        v: &Varied,
    ) -> Flow<(f64, f64, Option<Unit>)> {
        let value = self.expr(&arg.value)?;
        if let Value::List(_) = value {
            return self.bracket_of(&value, arg.value.span, v);
        }
        let shape = self.shape_of(&value, arg.value.span, v)?;
        let (mean, std) = (shape.mean(), shape.std());
        Ok((mean - std, mean + std, v.unit.clone()))
    }

    /// Evaluate `e` at the worksheet's own values and insist on one quantity.
    pub(super) fn scalar(&mut self, e: &Expr, role: &str) -> Flow<Quantity> {
        match self.expr(e)? {
            Value::Quantity(q, _) => Ok(q),
            other => {
                let mut d = Diagnostic::error(
                    e.span,
                    format!(
                        "the {role} must be a single quantity, but this is {}",
                        type_word(&other)
                    ),
                );
                if let Value::Record(r) = &other {
                    if let Some((f, _)) = r
                        .fields
                        .iter()
                        .find(|(_, v)| matches!(v, Value::Quantity(..)))
                    {
                        d = d.with_hint(format!("pick one field, e.g. `.{f}`"));
                    }
                }
                Err(d.into())
            }
        }
    }

    /// A whole-number option between `min` and `max`.
    pub(super) fn count_option(
        &mut self,
        arg: &CallArg,
        name: &str,
        min: u64,
        max: u64,
    ) -> Flow<u64> {
        let value = self.expr(&arg.value)?;
        match value {
            Value::Quantity(q, _)
                if q.dim.is_dimensionless()
                    && q.kind == Kind::Plain
                    && q.si.fract() == 0.0
                    && (min as f64..=max as f64).contains(&q.si) =>
            {
                Ok(q.si as u64)
            }
            _ => {
                let msg = format!("`{name}` must be a whole number from {min} to {max}");
                Err(Diagnostic::error(arg.value.span, msg).into())
            }
        }
    }
}

fn describe_list(v: &Value) -> String {
    match v {
        Value::List(items) => format!("a list of {} values", items.len()),
        other => type_word(other),
    }
}
