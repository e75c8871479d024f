//! A worksheet prepared for re-evaluation at many points.
//!
//! [`Model::build`] finds the values that depend on the varied inputs (the
//! reverse closure of the dependency graph), computes everything else once in
//! the calling context, and keeps a copy of the sheet with that cache. Each
//! point then clears only the dependent values, sets the inputs and forces the
//! probes: values that do not depend on the inputs are never recomputed.
//! Where it can, the model compiles the dependent definitions, probes and
//! rules into a [`Plan`] before the first point, and each point runs that
//! instead of looking names up (same results; see `plan.rs`).
//! Points run in parallel on rayon's pool; each worker borrows a private copy
//! of the sheet from a small pool, so no state is shared between points.

use std::collections::HashSet;
use std::sync::{Arc, Mutex};

use rayon::prelude::*;
use smallvec::SmallVec;

use super::plan::{Plan, State};
use super::progress::{self, Progress};
use crate::diag::{Diagnostic, Span};
use crate::eval::ctx::truth_value;
use crate::eval::{graph, Ctx, DefKind, FastMap, Flow, Limits, Mode, Sheet, Sources};
use crate::library::PAYLOAD;
use crate::syntax::{Expr, ExprKind, StmtKind};
use crate::units::{Quantity, Unit};
use crate::value::Value;

/// One input a study varies.
#[derive(Clone, Debug)]
pub(super) struct Varied {
    pub name: String,
    /// Its value in the worksheet.
    pub base: Quantity,
    /// The unit it is shown in.
    pub unit: Option<Unit>,
}

impl Varied {
    /// The input's quantity at SI magnitude `si` (its dimension and kind).
    pub fn at(&self, si: f64) -> Quantity {
        Quantity::new(si, self.base.dim, self.base.kind)
    }

    /// The input's value at `si`, with its display unit.
    pub fn shown(&self, si: f64) -> Value {
        Value::Quantity(self.at(si), self.unit.clone())
    }

    /// Set `value`, which holds [`Varied::shown`] at an earlier point (or
    /// anything else), to [`Varied::shown`] at `si`, keeping its unit.
    pub fn set(&self, value: &mut Value, si: f64) {
        match value {
            Value::Quantity(q, _) => *q = self.at(si),
            other => *other = self.shown(si),
        }
    }
}

/// A design rule (`check`) of the worksheet that the varied inputs can change.
#[derive(Clone, Debug)]
pub(super) struct Rule {
    pub text: String,
    pub expr: Expr,
}

/// The probes' values at one point: held inline for a single probe (the
/// usual study), so a point's values take no allocation of their own.
pub(super) type Values = SmallVec<[Value; 1]>;

/// What one point gave.
#[derive(Clone, Debug)]
pub(super) struct Outcome {
    /// The probes' values, or the first error (`line:col: message`).
    pub values: Result<Values, String>,
    /// Indices of the rules that failed (or could not be evaluated).
    pub broken: Vec<usize>,
    /// Warning messages raised at this point.
    pub warnings: Vec<String>,
}

impl Outcome {
    /// Probe `k` as a quantity, if the point succeeded and it is one.
    pub fn quantity(&self, k: usize) -> Option<Quantity> {
        match self.values.as_ref().ok()?.get(k)? {
            Value::Quantity(q, _) if q.si.is_finite() => Some(*q),
            _ => None,
        }
    }

    /// True when the point evaluated and passed every rule.
    pub fn feasible(&self) -> bool {
        self.values.is_ok() && self.broken.is_empty()
    }
}

/// A private copy of the sheet for one worker.
struct Work {
    sheet: Sheet,
    sources: Sources,
    /// Room for the evaluator's stack of names, reused from point to point.
    active: Vec<Arc<str>>,
    /// The plan's values at a point, when the model has a plan.
    state: Option<State>,
}

/// A worksheet ready to be evaluated at points of its varied inputs.
pub(super) struct Model {
    sheet: Sheet,
    sources: Sources,
    limits: Limits,
    depth: usize,
    frame: Option<FastMap<String, Value>>,
    pub inputs: Vec<Varied>,
    pub probes: Vec<Expr>,
    pub rules: Vec<Rule>,
    /// Cached values to clear at every point (they depend on the inputs).
    dependent: Vec<Arc<str>>,
    /// The cache keys of the inputs, in order (set at every point).
    input_keys: Vec<Arc<str>>,
    /// The probes and rules compiled, when they can be (see `plan.rs`).
    plan: Option<Plan>,
    pool: Mutex<Vec<Work>>,
}

/// Most points of a study evaluated in one run ([`Model::eval_run`]).
const RUN: usize = 64;

/// Words of the what-if forms; checks that call them are not re-run per point.
const FORMS: &[&str] = super::FORMS;

impl Model {
    /// Prepare `ctx`'s sheet for varying `inputs` and reading `probes`. With
    /// `with_rules`, the checks of the worksheet file that contains `span`
    /// that depend on the inputs are evaluated at every point too.
    pub fn build(
        ctx: &mut Ctx,
        inputs: Vec<Varied>,
        probes: Vec<Expr>,
        with_rules: bool,
        span: Span,
    ) -> Flow<Model> {
        let names: Vec<String> = inputs.iter().map(|v| v.name.clone()).collect();
        let dependent = dependents(&ctx.sheet.defs, &names);
        let rules = if with_rules {
            worksheet_rules(ctx, span.file, &dependent)
        } else {
            Vec::new()
        };
        let params: Vec<String> = ctx
            .frame
            .as_ref()
            .map(|f| f.keys().cloned().collect())
            .unwrap_or_default();
        let roots: Vec<String> = probes
            .iter()
            .chain(rules.iter().map(|r| &r.expr))
            .flat_map(|e| graph::dependencies(e, &params))
            .collect();
        force_independent(ctx, &roots, &dependent, span)?;
        let mut sheet = ctx.sheet.clone();
        for n in &dependent {
            sheet.cache.remove(n.as_str());
        }
        let key = |n: &str| {
            sheet
                .defs
                .get(n)
                .map_or_else(|| Arc::from(n), |d| d.key.clone())
        };
        let input_keys: Vec<Arc<str>> = names.iter().map(|n| key(n)).collect();
        let recomputed: Vec<Arc<str>> = dependent
            .iter()
            .filter(|n| !names.contains(n))
            .map(|n| key(n))
            .collect();
        // (A study inside a study's point starts from its own findings.)
        for d in sheet.defs.values_mut() {
            if dependent.contains(d.name.name.as_str()) {
                d.wanted = None;
            }
        }
        let exprs = probes.iter().chain(rules.iter().map(|r| &r.expr));
        for (name, fields) in wanted_fields(&sheet.defs, &dependent, exprs) {
            if let Some(d) = sheet.defs.get_mut(&name) {
                d.wanted = Some(fields);
            }
        }
        let mut sources = ctx.sources.clone();
        let plan = if ctx.limits.study_plans && ctx.frame.is_none() {
            let exprs = probes.iter().chain(rules.iter().map(|r| &r.expr));
            Plan::compile(
                &mut sheet,
                &mut sources,
                ctx.limits,
                &names,
                &dependent,
                exprs,
            )
        } else {
            None
        };
        Ok(Model {
            sheet,
            sources,
            limits: ctx.limits.clone(),
            depth: ctx.depth,
            frame: ctx.frame.clone(),
            inputs,
            probes,
            rules,
            dependent: recomputed,
            input_keys,
            plan,
            pool: Mutex::new(Vec::new()),
        })
    }

    /// Evaluate one point (SI magnitudes of the inputs, in order).
    pub fn eval_one(&self, point: &[f64]) -> Outcome {
        let mut work = self.take_work();
        let out = self.eval(&mut work, point);
        self.give_back(work);
        out
    }

    /// Evaluate many points in parallel, in order, reporting progress under
    /// `label` and stopping (with an error at `span`) when interrupted.
    pub fn eval_many(
        &self,
        points: &[Vec<f64>],
        label: &'static str,
        span: Span,
    ) -> Flow<Vec<Outcome>> {
        self.eval_points(points.len(), |i| &points[i], label, span)
    }

    /// [`Model::eval_many`] over `total` points held in one flat slice, the
    /// inputs' values of each point in turn (as many as the inputs).
    pub fn eval_flat(
        &self,
        points: &[f64],
        total: usize,
        label: &'static str,
        span: Span,
    ) -> Flow<Vec<Outcome>> {
        let stride = self.inputs.len();
        debug_assert_eq!(points.len(), stride * total);
        self.eval_points(
            total,
            |i| &points[i * stride..(i + 1) * stride],
            label,
            span,
        )
    }

    /// Evaluate points `0..total`, where `point(i)` gives point `i`.
    fn eval_points<'p>(
        &self,
        total: usize,
        point: impl Fn(usize) -> &'p [f64] + Sync,
        label: &'static str,
        span: Span,
    ) -> Flow<Vec<Outcome>> {
        let block = (total / 100).clamp(32, 8192);
        let mut out = Vec::with_capacity(total);
        let mut start = 0;
        while start < total {
            if self.limits.interrupted() {
                break;
            }
            let end = total.min(start + block);
            // Each worker's own sheet, sources and plan state.
            let lease = || Lease {
                model: self,
                work: Some(self.take_work()),
            };
            if self.plan.is_some() {
                // Runs of points, each evaluated in one context (see
                // `Model::eval_run`), then moved into `out` in order.
                let run = (block / 8).clamp(1, RUN);
                let runs: Vec<Vec<Outcome>> = (start..end)
                    .into_par_iter()
                    .step_by(run)
                    .map_init(lease, |lease, first| {
                        lease.eval_run(first..end.min(first + run), &point)
                    })
                    .collect();
                for r in runs {
                    out.extend(r);
                }
            } else {
                // Straight into `out` (its room is reserved): no block of its own.
                out.par_extend(
                    (start..end)
                        .into_par_iter()
                        .map_init(lease, |lease, i| lease.eval(point(i))),
                );
            }
            start = end;
            let done = out.len();
            progress::report(&Progress {
                label,
                done,
                total,
                finished: false,
            });
        }
        let done = out.len();
        progress::report(&Progress {
            label,
            done,
            total,
            finished: true,
        });
        if self.limits.interrupted() {
            let msg = format!("interrupted after {done} of {total} points");
            return Err(Diagnostic::error(span, msg).into());
        }
        Ok(out)
    }

    /// True when someone asked the evaluation to stop.
    pub fn interrupted(&self) -> bool {
        self.limits.interrupted()
    }

    fn take_work(&self) -> Work {
        let spare = self.pool.lock().unwrap_or_else(|e| e.into_inner()).pop();
        spare.unwrap_or_else(|| Work {
            sheet: self.sheet.clone(),
            sources: self.sources.clone(),
            active: Vec::new(),
            state: self.plan.as_ref().map(Plan::state),
        })
    }

    fn give_back(&self, work: Work) {
        self.pool
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .push(work);
    }

    /// Evaluate the points `points` (indices for `point`) in turn, through
    /// the plan in one context restarted at each point (as new: only the
    /// plan evaluates in it, so [`Ctx::restart_after_plan`] suffices), or
    /// else one by one as [`Model::eval`] does.
    fn eval_run<'p>(
        &self,
        work: &mut Work,
        points: std::ops::Range<usize>,
        point: &impl Fn(usize) -> &'p [f64],
    ) -> Vec<Outcome> {
        let (Some(plan), Some(state)) = (&self.plan, &mut work.state) else {
            return points.map(|i| self.eval(work, point(i))).collect();
        };
        let mut ctx = Ctx::new(&mut work.sheet, &mut work.sources, &self.limits, Mode::Run);
        points
            .map(|i| {
                ctx.restart_after_plan();
                self.plan_point(plan, state, &mut ctx, point(i))
            })
            .collect()
    }

    /// One point through the plan, in `ctx`, a context as new.
    fn plan_point(&self, plan: &Plan, state: &mut State, ctx: &mut Ctx, point: &[f64]) -> Outcome {
        state.start();
        if state.inputs.len() != self.inputs.len() {
            state.inputs.resize(self.inputs.len(), Value::Bool(false));
        }
        for ((v, slot), &si) in self.inputs.iter().zip(&mut state.inputs).zip(point) {
            v.set(slot, si);
        }
        self.outcome(ctx, |ctx, k| plan.eval(ctx, state, k))
    }

    fn eval(&self, work: &mut Work, point: &[f64]) -> Outcome {
        if let (Some(plan), Some(state)) = (&self.plan, &mut work.state) {
            let mut ctx = Ctx::new(&mut work.sheet, &mut work.sources, &self.limits, Mode::Run);
            return self.plan_point(plan, state, &mut ctx, point);
        }
        let cache = &mut work.sheet.cache;
        for n in &self.dependent {
            cache.remove(&**n);
        }
        // The inputs' entries are kept from point to point and overwritten.
        for ((v, key), &si) in self.inputs.iter().zip(&self.input_keys).zip(point) {
            match cache.get_mut(&**key) {
                Some(slot) => *slot = v.shown(si),
                None => {
                    cache.insert(key.clone(), v.shown(si));
                }
            }
        }
        let active = std::mem::take(&mut work.active);
        let mut ctx = Ctx::new(&mut work.sheet, &mut work.sources, &self.limits, Mode::Run);
        ctx.reuse_active(active);
        ctx.depth = self.depth + 1;
        ctx.frame = self.frame.clone();
        let outcome = self.outcome(&mut ctx, |ctx, k| ctx.expr(self.expression(k)));
        work.active = ctx.take_active();
        outcome
    }

    /// Expression `k` of the probes, then the rules.
    fn expression(&self, k: usize) -> &Expr {
        match self.probes.get(k) {
            Some(e) => e,
            None => &self.rules[k - self.probes.len()].expr,
        }
    }

    /// Force the probes and rules in `ctx`, set up at a point, where
    /// `eval(ctx, k)` evaluates [`Model::expression`] `k`.
    fn outcome(
        &self,
        ctx: &mut Ctx,
        mut eval: impl FnMut(&mut Ctx, usize) -> Flow<Value>,
    ) -> Outcome {
        let n = self.probes.len();
        let mut values = Values::with_capacity(n);
        for k in 0..n {
            match eval(ctx, k) {
                Ok(v) => values.push(v),
                Err(stop) => {
                    ctx.report(stop);
                    let message = first_error(ctx);
                    return Outcome {
                        values: Err(message),
                        broken: Vec::new(),
                        warnings: Vec::new(),
                    };
                }
            }
        }
        // As `Ctx::truth` does for a `check`.
        let broken = if self.rules.is_empty() {
            Vec::new()
        } else {
            (0..self.rules.len())
                .filter(|&i| {
                    let span = self.rules[i].expr.span;
                    let passed = eval(ctx, n + i).and_then(|v| truth_value(v, "check", span));
                    !matches!(passed, Ok(true))
                })
                .collect()
        };
        let warnings = if ctx.warnings.is_empty() {
            Vec::new()
        } else {
            ctx.warnings.iter().map(|w| w.message.clone()).collect()
        };
        Outcome {
            values: Ok(values),
            broken,
            warnings,
        }
    }
}

/// A worker's copy of the sheet, returned to the pool when the worker is done.
struct Lease<'m> {
    model: &'m Model,
    work: Option<Work>,
}

impl Lease<'_> {
    fn eval(&mut self, point: &[f64]) -> Outcome {
        let model = self.model;
        let work = self.work.get_or_insert_with(|| model.take_work());
        model.eval(work, point)
    }

    fn eval_run<'p>(
        &mut self,
        points: std::ops::Range<usize>,
        point: &impl Fn(usize) -> &'p [f64],
    ) -> Vec<Outcome> {
        let model = self.model;
        let work = self.work.get_or_insert_with(|| model.take_work());
        model.eval_run(work, points, point)
    }
}

impl Drop for Lease<'_> {
    fn drop(&mut self) {
        if let Some(w) = self.work.take() {
            self.model.give_back(w);
        }
    }
}

/// `line:col: message` of the first error a point raised.
fn first_error(ctx: &Ctx) -> String {
    match ctx.errors.first() {
        Some(d) => {
            let (line, col) = ctx.sources.line_col(d.span);
            format!("{line}:{col}: {}", d.message)
        }
        None => "failed".to_string(),
    }
}

/// Every definition that reads one of `names`, directly or through others
/// (including the names themselves).
fn dependents(defs: &FastMap<String, crate::eval::Def>, names: &[String]) -> HashSet<String> {
    let mut readers: FastMap<&str, Vec<&str>> = FastMap::default();
    for d in defs.values() {
        for dep in &d.deps {
            readers
                .entry(dep.as_str())
                .or_default()
                .push(d.name.name.as_str());
        }
    }
    let mut out: HashSet<String> = HashSet::new();
    let mut queue: Vec<&str> = names.iter().map(String::as_str).collect();
    while let Some(n) = queue.pop() {
        if out.insert(n.to_string()) {
            queue.extend(readers.get(n).into_iter().flatten().copied());
        }
    }
    out
}

/// The values recomputed at each point that are built-in calls whose records
/// are only ever read field by field (`a.wetbulb`), in the worksheet's
/// definitions, `probes` and rules, with the fields read: the built-in need
/// compute no other field. A value passed by name to a built-in parameter
/// that reads only the payload ([`crate::library::Builtin::reads_only_payload`])
/// reads no field there but needs the payload ([`PAYLOAD`] among its fields).
/// A value read whole anywhere else (shown, passed to a function or to
/// another parameter, listed) is left out.
fn wanted_fields<'e>(
    defs: &'e FastMap<String, crate::eval::Def>,
    dependent: &HashSet<String>,
    probes: impl Iterator<Item = &'e Expr>,
) -> Vec<(String, Arc<[String]>)> {
    let candidates: Vec<&str> = dependent
        .iter()
        .filter(|n| defs.get(*n).is_some_and(|d| is_builtin_call(defs, d)))
        .map(String::as_str)
        .collect();
    if candidates.is_empty() {
        return Vec::new();
    }
    // Per name: the fields read, or None once it is read whole.
    let mut reads: FastMap<&str, Option<Vec<&str>>> =
        candidates.iter().map(|n| (*n, Some(Vec::new()))).collect();
    let mut stack: Vec<&Expr> = defs.values().map(|d| &*d.expr).chain(probes).collect();
    while let Some(e) = stack.pop() {
        match &e.kind {
            ExprKind::Field(a, field) => match &a.kind {
                ExprKind::Name(n) => {
                    if let Some(Some(fields)) = reads.get_mut(n.as_str()) {
                        if !fields.contains(&field.name.as_str()) {
                            fields.push(&field.name);
                        }
                    }
                }
                _ => stack.push(a),
            },
            ExprKind::Name(n) => {
                if let Some(r) = reads.get_mut(n.as_str()) {
                    *r = None;
                }
            }
            ExprKind::Call { callee, args } => {
                if let Some(r) = reads.get_mut(callee.name.as_str()) {
                    *r = None;
                }
                let builtin = builtin_called(defs, &callee.name);
                let mut positional = 0;
                for a in args {
                    // The parameter the argument binds to, as `Args` binds.
                    let slot = match &a.name {
                        Some(n) => builtin.and_then(|b| b.param_index(&n.name)),
                        None => {
                            positional += 1;
                            Some(positional - 1)
                        }
                    };
                    let payload_only = builtin
                        .zip(slot)
                        .is_some_and(|(b, i)| b.reads_only_payload(i));
                    // A record passed to a parameter that reads only its
                    // payload: no field read, but the payload needed.
                    match &a.value.kind {
                        ExprKind::Name(n) if payload_only => {
                            if let Some(Some(fields)) = reads.get_mut(n.as_str()) {
                                if !fields.contains(&PAYLOAD) {
                                    fields.push(PAYLOAD);
                                }
                            }
                        }
                        _ => stack.push(&a.value),
                    }
                }
            }
            ExprKind::Quantity { .. } | ExprKind::Bool(_) | ExprKind::Str(_) => {}
            ExprKind::List(items) => stack.extend(items),
            ExprKind::Record(fields) => stack.extend(fields.iter().map(|(_, e)| e)),
            ExprKind::Unary(_, a) | ExprKind::As(a, _) => stack.push(a),
            ExprKind::Binary(_, a, b) => stack.extend([&**a, &**b]),
            ExprKind::If(c, a, b) => stack.extend([&**c, &**a, &**b]),
        }
    }
    reads
        .into_iter()
        .filter_map(|(n, r)| {
            let fields: Vec<String> = r?.into_iter().map(String::from).collect();
            Some((n.to_string(), Arc::from(fields)))
        })
        .collect()
}

/// The built-in a call of `name` runs, if it runs one (not a user function,
/// a load or a what-if form), as the evaluator resolves calls.
fn builtin_called(
    defs: &FastMap<String, crate::eval::Def>,
    name: &str,
) -> Option<&'static crate::library::Builtin> {
    if name == "load"
        || FORMS.contains(&name)
        || defs.get(name).is_some_and(|f| f.kind == DefKind::Function)
    {
        return None;
    }
    crate::library::find(name)
}

/// Is `d` a value defined by a call of a built-in (not a user function, a
/// load or a what-if form)?
fn is_builtin_call(defs: &FastMap<String, crate::eval::Def>, d: &crate::eval::Def) -> bool {
    match &d.expr.kind {
        ExprKind::Call { callee, .. } => {
            d.kind == DefKind::Value && builtin_called(defs, &callee.name).is_some()
        }
        _ => false,
    }
}

/// Compute, once, every value the probes need that the inputs do not change.
fn force_independent(
    ctx: &mut Ctx,
    roots: &[String],
    dependent: &HashSet<String>,
    span: Span,
) -> Flow<()> {
    let order: Vec<String> = {
        let defs = &ctx.sheet.defs;
        let get = |n: &str| defs.get(n).map(|d| d.deps.as_slice());
        graph::postorder(roots.iter().map(String::as_str), &get)
            .into_iter()
            .filter(|n| {
                defs.get(*n)
                    .is_some_and(|d| d.kind != DefKind::Function && !dependent.contains(*n))
            })
            .map(String::from)
            .collect()
    };
    for name in order {
        ctx.force(&name, span)?;
    }
    Ok(())
}

/// The checks of source file `file` that read a value in `dependent` (and do
/// not themselves run a study).
fn worksheet_rules(ctx: &Ctx, file: u32, dependent: &HashSet<String>) -> Vec<Rule> {
    let Some(source) = ctx.sources.get(file) else {
        return Vec::new();
    };
    let (stmts, _) = crate::syntax::parse(&source.text, file);
    stmts
        .into_iter()
        .filter_map(|s| match s.kind {
            StmtKind::Check(e) => Some(Expr::clone(&e)),
            _ => None,
        })
        .filter(|e| {
            let deps = graph::dependencies(e, &[]);
            deps.iter().any(|d| dependent.contains(d))
                && !deps.iter().any(|d| FORMS.contains(&d.as_str()))
        })
        .map(|expr| Rule {
            text: ctx.sources.slice(expr.span).to_string(),
            expr,
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dependents_follow_values_and_user_functions() {
        let text = "input a = 1 m\ninput b = 2 m\nf(x) = x * a\nc = f(b)\nd = b * 2\ne = c + d\n";
        let (stmts, errors) = crate::syntax::parse(text, 0);
        assert!(errors.is_empty(), "{errors:?}");
        let mut sheet = Sheet::default();
        assert!(sheet.define(&stmts, true).is_ok());
        let mut got: Vec<String> = dependents(&sheet.defs, &["a".to_string()])
            .into_iter()
            .collect();
        got.sort();
        // `c` reads `a` through the function `f`; `b` and `d` do not depend on `a`.
        assert_eq!(got, ["a", "c", "e", "f"]);
    }

    #[test]
    fn a_built_in_record_read_only_by_fields_wants_those_fields() {
        let text = "input T = 60 degC\ninput w = 0.02 kg/kg_da\na = air(T: T, w: w)\n\
                    twb = a.wetbulb\nb = air(T: T, rh: 50 %)\nc = heat(b, to: 90 degC)\n\
                    d = air(T: T, w: w)\nf(x) = d.h * x\ng = f(2)\n";
        let (stmts, errors) = crate::syntax::parse(text, 0);
        assert!(errors.is_empty(), "{errors:?}");
        let mut sheet = Sheet::default();
        assert!(sheet.define(&stmts, true).is_ok());
        let names = ["T".to_string(), "w".to_string()];
        let dependent = dependents(&sheet.defs, &names);
        let (probe, _) = crate::syntax::parse("x = [a.rho, c.h]", 0);
        let probe = match &probe[0].kind {
            StmtKind::Binding { expr, .. } => Expr::clone(expr),
            other => panic!("{other:?}"),
        };
        let mut got: Vec<(String, Vec<String>)> =
            wanted_fields(&sheet.defs, &dependent, std::iter::once(&probe))
                .into_iter()
                .map(|(n, f)| {
                    let mut f = f.to_vec();
                    f.sort();
                    (n, f)
                })
                .collect();
        got.sort();
        // `b` is passed whole to `heat`, so it is left out; `c` (a call of
        // `heat`) is read by field in the probe and `d` in a function's body;
        // `g` calls a user function.
        let want = [
            ("a", vec!["rho", "wetbulb"]),
            ("c", vec!["h"]),
            ("d", vec!["h"]),
        ];
        let want: Vec<(String, Vec<String>)> = want
            .iter()
            .map(|(n, f)| (n.to_string(), f.iter().map(|s| s.to_string()).collect()))
            .collect();
        assert_eq!(got, want);
    }

    #[test]
    fn a_record_passed_to_a_parameter_reading_only_its_payload_wants_the_payload() {
        // `hot` goes to the `air` parameters of h_tray_parallel and
        // wet_surface (by name and by position), which read only its engine
        // state, and is read by field; `cold` is also given to the `G`
        // parameter of h_tray_impinging (its first, by position), `warm` to
        // `heat`, neither of which is marked, so both are read whole.
        let text = "input T = 60 degC\nhot = air(T: T, rh: 10 %)\n\
                    h = h_tray_parallel(air: hot, velocity: 3 m/s)\n\
                    s = wet_surface(hot, h: h)\nt = hot.wetbulb\n\
                    cold = air(T: T, rh: 20 %)\nc = h_tray_parallel(air: cold, velocity: 2 m/s)\n\
                    d = h_tray_impinging(cold)\nwarm = air(T: T, rh: 30 %)\n\
                    e = heat(warm, to: 90 degC)\nf = h_tray_parallel(air: warm, velocity: 2 m/s)\n";
        let (stmts, errors) = crate::syntax::parse(text, 0);
        assert!(errors.is_empty(), "{errors:?}");
        let mut sheet = Sheet::default();
        assert!(sheet.define(&stmts, true).is_ok());
        let dependent = dependents(&sheet.defs, &["T".to_string()]);
        let mut got: Vec<(String, Vec<String>)> =
            wanted_fields(&sheet.defs, &dependent, std::iter::empty())
                .into_iter()
                .filter(|(n, _)| ["hot", "cold", "warm"].contains(&n.as_str()))
                .map(|(n, f)| {
                    let mut f = f.to_vec();
                    f.sort();
                    (n, f)
                })
                .collect();
        got.sort();
        let want = vec![(
            "hot".to_string(),
            vec![PAYLOAD.to_string(), "wetbulb".to_string()],
        )];
        assert_eq!(got, want);
    }
}
