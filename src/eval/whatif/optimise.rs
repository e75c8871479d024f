//! `minimise(objective, INPUT: [low, high], ...)` and `maximise(...)`: the
//! best values of one to three inputs within bounds, subject to the
//! worksheet's checks.
//!
//! Method: a grid scan (41 points for one input, 21x21 for two, 11x11x11 for
//! three, in parallel) finds the best point that passes every check; then a
//! golden-section search (one input) or a bounded Nelder-Mead simplex (two or
//! three) polishes it. Why: worksheet objectives have no derivatives and may
//! have kinks where a correlation changes branch, and checks are pass/fail,
//! so a derivative-free search with an extreme barrier (failing points count
//! as +inf) is the robust choice; the grid guards against starting in the
//! wrong valley.

use super::model::{Model, Outcome, Varied};
use super::spec::{self, usage};
use super::sweep::{grid, number};
use crate::diag::{Diagnostic, Span};
use crate::engine::minimise::{golden_section, nelder_mead, Simplex};
use crate::eval::{Ctx, Flow, Mode, Stop};
use crate::syntax::CallArg;
use crate::units::format_quantity;
use crate::value::{Record, Value};

const EXAMPLE: &str = "minimise(energy_per_kg, recirc: [0 %, 90 %])";

/// Grid points per input for one, two and three inputs.
const GRID: [usize; 3] = [41, 21, 11];

/// The search box.
struct Bounds {
    lo: Vec<f64>,
    hi: Vec<f64>,
}

impl Ctx<'_> {
    /// Evaluate `minimise(...)` or, with `maximise`, `maximise(...)`.
    pub(super) fn optimise(&mut self, args: &[CallArg], span: Span, maximise: bool) -> Flow<Value> {
        let word = if maximise { "maximise" } else { "minimise" };
        let parts = spec::split(args, &[]);
        let [objective] = parts.positional[..] else {
            let msg = format!("`{word}` needs one objective (the value to optimise)");
            return Err(usage(span, msg, EXAMPLE).into());
        };
        if parts.inputs.is_empty() || parts.inputs.len() > 3 {
            let msg = format!(
                "`{word}` varies one to three inputs, given {}",
                parts.inputs.len()
            );
            return Err(usage(span, msg, EXAMPLE).into());
        }
        let mut varied = Vec::new();
        let mut bounds = Bounds {
            lo: Vec::new(),
            hi: Vec::new(),
        };
        for (name, arg) in &parts.inputs {
            let v = self.varied(name)?;
            let (lo, hi, unit) = self.bracket_for(arg, &v)?;
            varied.push(Varied { unit, ..v });
            bounds.lo.push(lo);
            bounds.hi.push(hi);
        }
        self.scalar(&objective.value, "objective")?;
        if self.mode == Mode::CheckOnly {
            return Err(Stop::Skip);
        }
        let model = Model::build(self, varied, vec![objective.value.clone()], true, span)?;
        let sign = if maximise { -1.0 } else { 1.0 };
        let (x, evaluations) = self.search(&model, &bounds, sign, span, word)?;
        let best = model.eval_one(&x);
        let name = spec::probe_name(&objective.value, self);
        self.bound_warnings(&model, &bounds, &x, span);
        let mut record = Record::new("optimum");
        for (v, &xi) in model.inputs.iter().zip(&x) {
            record = record.with(v.name.clone(), v.shown(xi));
        }
        if let Ok(values) = best.values {
            record = record.with(name, values[0].clone());
        }
        let method = if x.len() == 1 {
            "grid scan + golden-section search"
        } else {
            "grid scan + Nelder-Mead in the box"
        };
        Ok(Value::Record(
            record
                .with("evaluations", number(evaluations))
                .with("checks_applied", number(model.rules.len()))
                .with("method", Value::Str(method.into())),
        ))
    }

    /// The best point and the evaluations used.
    fn search(
        &mut self,
        model: &Model,
        b: &Bounds,
        sign: f64,
        span: Span,
        word: &'static str,
    ) -> Flow<(Vec<f64>, usize)> {
        let n = b.lo.len();
        let per = GRID[n - 1];
        let axes: Vec<Vec<f64>> = (0..n)
            .map(|i| {
                (0..per)
                    .map(|k| b.lo[i] + (b.hi[i] - b.lo[i]) * k as f64 / (per - 1) as f64)
                    .collect()
            })
            .collect();
        let points = grid(&axes);
        let outcomes = model.eval_many(&points, word, span)?;
        let scores: Vec<f64> = outcomes.iter().map(|o| score(o, sign)).collect();
        let best = (0..scores.len())
            .min_by(|&i, &j| scores[i].total_cmp(&scores[j]))
            .unwrap_or(0);
        if !scores[best].is_finite() {
            return Err(infeasible(model, &outcomes, span, word).into());
        }
        let mut evaluations = points.len();
        let mut count = 0;
        let mut f = |x: &[f64]| {
            count += 1;
            score(&model.eval_one(x), sign)
        };
        let x = if n == 1 {
            let step = (b.hi[0] - b.lo[0]) / (per - 1) as f64;
            let a = (points[best][0] - step).max(b.lo[0]);
            let c = (points[best][0] + step).min(b.hi[0]);
            let m = golden_section(|x| f(&[x]), a, c, 1e-9 * (b.hi[0] - b.lo[0]));
            if m.f <= scores[best] {
                m.x
            } else {
                points[best].clone()
            }
        } else {
            let settings = Simplex {
                step: 1.0 / (per - 1) as f64,
                ..Simplex::default()
            };
            let first = nelder_mead(&mut f, &points[best], &b.lo, &b.hi, settings)
                .map_err(|e| Diagnostic::error(span, format!("`{word}`: {e}")))?;
            let again = Simplex {
                step: 0.02,
                ..settings
            };
            let m = nelder_mead(&mut f, &first.x, &b.lo, &b.hi, again)
                .map_err(|e| Diagnostic::error(span, format!("`{word}`: {e}")))?;
            if m.f <= scores[best] {
                m.x
            } else {
                points[best].clone()
            }
        };
        evaluations += count;
        if model.interrupted() {
            return Err(Diagnostic::error(span, "interrupted").into());
        }
        Ok((x, evaluations))
    }

    fn bound_warnings(&mut self, model: &Model, b: &Bounds, x: &[f64], span: Span) {
        for (i, v) in model.inputs.iter().enumerate() {
            let width = b.hi[i] - b.lo[i];
            let at = if (x[i] - b.lo[i]).abs() <= 1e-6 * width {
                "low"
            } else if (b.hi[i] - x[i]).abs() <= 1e-6 * width {
                "high"
            } else {
                continue;
            };
            let shown = format_quantity(&v.at(x[i]), v.unit.as_ref());
            let msg = format!("the optimum lies on the {at} bound of `{}` ({shown}); a wider range might do better", v.name);
            self.warnings.push(Diagnostic::warning(span, msg));
        }
    }
}

/// The objective times `sign`, or +inf where the point failed or broke a check.
fn score(o: &Outcome, sign: f64) -> f64 {
    if !o.feasible() {
        return f64::INFINITY;
    }
    o.quantity(0).map_or(f64::INFINITY, |q| sign * q.si)
}

/// No grid point passed: name the check that failed most often.
fn infeasible(model: &Model, outcomes: &[Outcome], span: Span, word: &str) -> Diagnostic {
    let mut d = Diagnostic::error(
        span,
        format!("`{word}` found no point within the bounds where every check passes"),
    );
    let mut counts = vec![0usize; model.rules.len()];
    for o in outcomes {
        for &i in &o.broken {
            counts[i] += 1;
        }
    }
    if let Some((i, n)) = counts.iter().enumerate().max_by_key(|(_, n)| **n) {
        if *n > 0 {
            d = d.with_hint(format!(
                "`check {}` fails at {n} of {} grid points",
                model.rules[i].text,
                outcomes.len()
            ));
        }
    }
    let failed: Vec<&String> = outcomes
        .iter()
        .filter_map(|o| o.values.as_ref().err())
        .collect();
    if let Some(first) = failed.first() {
        d = d.with_hint(format!(
            "{} of {} grid points failed (first: {first})",
            failed.len(),
            outcomes.len()
        ));
    }
    d.with_hint("widen the bounds or relax the checks")
}
