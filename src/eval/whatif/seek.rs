//! `seek(value, target, INPUT: [low, high])`: the input value that makes a
//! named value reach a target, by a scan for a sign change and Brent's method.

use super::model::{Model, Outcome, Varied};
use super::spec::{self, usage};
use crate::diag::{Diagnostic, Span};
use crate::engine::solve::{brent, SolveError, Tolerance};
use crate::eval::{Ctx, Flow, Mode, Stop};
use crate::syntax::CallArg;
use crate::units::{compare_kinds, format_quantity, Quantity, Unit};
use crate::value::Value;

const EXAMPLE: &str = "seek(t_dry, 4 h, T_air: [50 degC, 110 degC])";

/// Intervals of the scan that looks for a sign change before Brent's method.
const SCAN_INTERVALS: usize = 16;

/// What the search is after, for messages.
struct Goal<'a> {
    name: String,
    target: Quantity,
    target_unit: Option<Unit>,
    input: &'a Varied,
    lo: f64,
    hi: f64,
}

impl Ctx<'_> {
    /// Evaluate `seek(...)`.
    pub(super) fn seek(&mut self, args: &[CallArg], span: Span) -> Flow<Value> {
        let parts = spec::split(args, &[]);
        let [value_arg, target_arg] = parts.positional[..] else {
            return Err(usage(
                span,
                "`seek` needs the value and the target it must reach",
                EXAMPLE,
            )
            .into());
        };
        let [(name, range_arg)] = parts.inputs[..] else {
            let msg = format!(
                "`seek` adjusts exactly one input, given {}",
                parts.inputs.len()
            );
            return Err(usage(span, msg, EXAMPLE).into());
        };
        let v = self.varied(name)?;
        let (lo, hi, unit) = self.bracket_for(range_arg, &v)?;
        let (target, target_unit) = match self.expr(&target_arg.value)? {
            Value::Quantity(q, u) => (q, u),
            _ => {
                return Err(
                    Diagnostic::error(target_arg.span, "the target must be a quantity").into(),
                )
            }
        };
        let base = self.scalar(&value_arg.value, "value to reach")?;
        check_target(&base, &target, target_arg.span)?;
        if self.mode == Mode::CheckOnly {
            return Err(Stop::Skip);
        }
        let v = Varied { unit, ..v };
        let model = Model::build(self, vec![v], vec![value_arg.value.clone()], false, span)?;
        let goal = Goal {
            name: spec::probe_name(&value_arg.value, self),
            target,
            target_unit,
            input: &model.inputs[0],
            lo,
            hi,
        };
        let x = self.find_root(&model, &goal, span)?;
        Ok(goal.input.shown(x))
    }

    fn find_root(&mut self, model: &Model, goal: &Goal, span: Span) -> Flow<f64> {
        let xs: Vec<f64> = (0..=SCAN_INTERVALS)
            .map(|i| goal.lo + (goal.hi - goal.lo) * i as f64 / SCAN_INTERVALS as f64)
            .collect();
        let points: Vec<Vec<f64>> = xs.iter().map(|&x| vec![x]).collect();
        let outcomes = model.eval_many(&points, "seek", span)?;
        let r: Vec<Option<f64>> = outcomes.iter().map(|o| residual(o, goal)).collect();
        let windows: Vec<usize> = (0..SCAN_INTERVALS)
            .filter(|&i| matches!((r[i], r[i + 1]), (Some(a), Some(b)) if a * b <= 0.0))
            .collect();
        let Some(&first) = windows.first() else {
            return Err(no_bracket(goal, &outcomes, span).into());
        };
        if windows.len() > 1 {
            let msg = format!(
                "`{}` reaches the target more than once in the range of `{}`; this is the solution nearest the low end",
                goal.name, goal.input.name
            );
            self.warnings.push(Diagnostic::warning(span, msg));
        }
        let mut last_error = String::new();
        let f = |x: f64| {
            let o = model.eval_one(&[x]);
            if let Err(e) = &o.values {
                last_error = e.clone();
            }
            residual(&o, goal).unwrap_or(f64::NAN)
        };
        let tol = Tolerance::new(1e-12 * (goal.hi - goal.lo), 1e-12);
        match brent(f, xs[first], xs[first + 1], tol) {
            Ok(x) => Ok(x),
            Err(SolveError::NotFinite { x }) => {
                let at = format_quantity(&goal.input.at(x), goal.input.unit.as_ref());
                let msg = format!(
                    "`{}` could not be evaluated at `{}` = {at}: {last_error}",
                    goal.name, goal.input.name
                );
                Err(Diagnostic::error(span, msg).into())
            }
            Err(e) => Err(Diagnostic::error(span, format!("goal seeking failed: {e}")).into()),
        }
    }
}

fn residual(o: &Outcome, goal: &Goal) -> Option<f64> {
    o.quantity(0).map(|q| q.si - goal.target.si)
}

/// The target must be comparable with the value.
fn check_target(value: &Quantity, target: &Quantity, span: Span) -> Result<(), Diagnostic> {
    if value.dim != target.dim {
        let msg = format!(
            "the target is {}, but the value is {}",
            crate::eval::dim_words(target.dim),
            crate::eval::dim_words(value.dim)
        );
        return Err(Diagnostic::error(span, msg));
    }
    compare_kinds(value.kind, target.kind).map_err(|_| {
        let msg = format!(
            "the target is {}, but the value is {}",
            target.kind.describe(),
            value.kind.describe()
        );
        Diagnostic::error(span, msg)
    })
}

/// "`t_dry` does not reach 4 h for `T_air` from 50 degC to 110 degC: ..."
fn no_bracket(goal: &Goal, outcomes: &[Outcome], span: Span) -> Diagnostic {
    let show = |q: Quantity| format_quantity(&q, goal.target_unit.as_ref());
    let input_at = |x: f64| format_quantity(&goal.input.at(x), goal.input.unit.as_ref());
    let values: Vec<Quantity> = outcomes.iter().filter_map(|o| o.quantity(0)).collect();
    let mut msg = format!(
        "no bracket: `{}` does not reach {} for `{}` from {} to {}",
        goal.name,
        show(goal.target),
        goal.input.name,
        input_at(goal.lo),
        input_at(goal.hi)
    );
    let lowest = values.iter().copied().min_by(|a, b| a.si.total_cmp(&b.si));
    let highest = values.iter().copied().max_by(|a, b| a.si.total_cmp(&b.si));
    if let (Some(a), Some(b)) = (lowest, highest) {
        msg.push_str(&format!(
            "; over that range it stays between {} and {}",
            show(a),
            show(b)
        ));
    }
    let mut d = Diagnostic::error(span, msg);
    let failed: Vec<&String> = outcomes
        .iter()
        .filter_map(|o| o.values.as_ref().err())
        .collect();
    if let Some(first) = failed.first() {
        d = d.with_hint(format!(
            "{} of {} trial points failed (first: {first})",
            failed.len(),
            outcomes.len()
        ));
    }
    d.with_hint(format!(
        "widen the range of `{}`, or check that the target can be reached",
        goal.input.name
    ))
}
