//! A what-if study's dependent definitions compiled into a plan.
//!
//! A study evaluates the same few definitions at thousands of points. The
//! general evaluator ([`Ctx::force`], [`Ctx::expr`]) finds each name in maps
//! at every point, binds each built-in's arguments to its parameters by
//! name, and keeps the values in the name-keyed cache of the sheet. Before
//! the first point, [`Plan::compile`] resolves all of that once:
//!
//! - a varied input becomes an input slot, set at each point;
//! - a literal, or a name whose value the inputs do not change (computed by
//!   [`super::model::Model::build`] before the plan is made), becomes a
//!   fixed value;
//! - a dependent definition becomes a numbered slot, computed when first
//!   read at a point, as the evaluator forces a value (so the order of the
//!   work, the warnings and the first error stay the same);
//! - a built-in call knows the parameter each argument binds to (worked out
//!   with [`Args::bind_one`], as the evaluator binds) and the fields its
//!   definition's record is read for ([`crate::eval::Def::wanted`]); each
//!   worker keeps one [`Args`] per call and refills it at every point.
//!
//! At a point, [`Plan::eval`] walks these steps in the evaluator's order,
//! with the evaluator's own operators, field reads, step counting
//! ([`Ctx::tick`], [`Ctx::charge_list`]) and built-in runner
//! ([`Ctx::run_builtin`]), so every value, error (with its span), warning and
//! step count is the one the general path gives; a test
//! (`tests/sweep_plan.rs`) holds the two paths to each other.
//!
//! The plan covers names, literals, field reads, prefix and binary
//! operators (not `and`/`or`, which short-circuit), `as` and built-in
//! calls. Anything else in the dependent definitions, probes or rules (user
//! functions, `if`, `and`/`or`, lists, records, loads, nested studies,
//! inputs that depend on the varied ones, a study inside a user function)
//! leaves the study without a plan, on the general path, as a whole.

use std::collections::HashSet;
use std::sync::Arc;

use crate::diag::Span;
use crate::eval::ctx::{
    binary_failure, binary_values, is_flat_record, negative_reading, read_field, show_in,
    show_quantity, shown_as_failure, unary_value, MAX_NESTING,
};
use crate::eval::ops;
use crate::eval::{Ctx, DefKind, FastMap, Flow, Limits, Mode, Sheet, Sources, Stop};
use crate::library::{self, Arg, Args, Builtin};
use crate::syntax::{BinaryOp, CallArg, Expr, ExprKind, Ident, UnaryOp};
use crate::units::{Quantity, Unit};
use crate::value::Value;

thread_local! {
    /// Plans compiled on this thread (see [`plans_compiled`]).
    static COMPILED: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

/// How many studies started on this thread so far were compiled into a
/// plan: lets tests tell a study that runs through a plan from one that
/// runs on the general path.
#[doc(hidden)]
pub fn plans_compiled() -> usize {
    COMPILED.with(|c| c.get())
}

/// Where the value of a name is at a point.
#[derive(Clone, Copy, Debug)]
enum Source {
    /// A value the inputs do not change: [`Plan::fixed`].
    Fixed(usize),
    /// A varied input, in the study's order.
    Input(usize),
    /// A dependent definition: [`Plan::defs`], computed when first read.
    Def(usize),
}

/// An expression with its names resolved (one per node of the syntax tree,
/// with the node's span).
#[derive(Debug)]
struct Step {
    span: Span,
    node: Node,
}

#[derive(Debug)]
enum Node {
    /// A literal: [`Plan::fixed`].
    Literal(usize),
    Name(Source),
    Field(Box<Step>, Ident),
    Unary(UnaryOp, Box<Step>),
    /// Any binary operator but `and` and `or`.
    Binary(BinaryOp, Box<Step>, Box<Step>),
    Call(Box<Call>),
    /// `a as unit`, with the unit's span.
    As(Box<Step>, Unit, Span),
}

/// A built-in call with its arguments bound.
#[derive(Debug)]
struct Call {
    /// Its place in [`State::calls`].
    index: usize,
    builtin: &'static Builtin,
    /// In the order written (the order they are evaluated).
    args: Vec<Argument>,
}

#[derive(Debug)]
struct Argument {
    /// The parameter it binds to.
    param: usize,
    value: Step,
    span: Span,
}

/// A study's probes and rules, and the dependent definitions they read,
/// resolved for evaluation at many points.
#[derive(Debug)]
pub(super) struct Plan {
    /// Literals and the values the inputs do not change.
    fixed: Vec<Value>,
    /// What reading each fixed value counts against the step budget
    /// ([`Cost`]).
    fixed_costs: Vec<Cost>,
    /// The dependent definitions, by slot.
    defs: Vec<Step>,
    /// The expressions evaluated at a point, in order.
    exprs: Vec<Step>,
    /// For each expression that is the name of a dependent definition read
    /// nowhere else, its slot: the value moves out instead of being copied.
    sole_reads: Vec<Option<usize>>,
    /// The built-in calls, by [`Call::index`].
    calls: Vec<CallSite>,
}

/// What a built-in call's arguments are made for.
#[derive(Debug)]
struct CallSite {
    builtin: &'static Builtin,
    span: Span,
    /// The fields its record is read for, when it defines a value.
    wanted: Option<Arc<[String]>>,
}

/// The items [`Ctx::charge_list`] counts for a list or record value (worked
/// out once per value; reading it again counts the same), `None` for other
/// values, which it does not count.
type Cost = Option<usize>;

/// A dependent definition's value at the current point.
#[derive(Clone, Debug, Default)]
enum Slot {
    /// Not read yet.
    #[default]
    Unset,
    Ready(Value, Cost),
    /// Its evaluation failed (and was reported).
    Failed,
}

/// What one worker keeps from point to point.
pub(super) struct State {
    slots: Vec<Slot>,
    /// The varied inputs' values.
    pub inputs: Vec<Value>,
    /// Each built-in call's arguments, reused (`None` while the call runs).
    calls: Vec<Option<Box<Args>>>,
    /// For each slot defined by a built-in call, the call's place in
    /// `calls`: where its record goes back at the next point
    /// ([`Args::keep_spare`]).
    defined_by: Vec<Option<usize>>,
}

impl State {
    /// Start a point: no definition computed yet. (The caller sets the inputs.)
    /// A record a built-in call defined at the last point goes back to the
    /// call's arguments, for it to build this point's record in.
    pub fn start(&mut self) {
        for (s, by) in self.slots.iter_mut().zip(&self.defined_by) {
            match (&*s, *by) {
                // (A value moved out at its sole read left nothing behind.)
                (Slot::Unset, _) => {}
                (Slot::Ready(Value::Record(_), _), Some(k)) => {
                    if let Slot::Ready(Value::Record(r), _) = std::mem::take(s) {
                        if let Some(Some(args)) = self.calls.get_mut(k) {
                            args.keep_spare(r);
                        }
                    }
                }
                _ => *s = Slot::Unset,
            }
        }
    }
}

impl Plan {
    /// Compile `exprs` (the probes, then the rules) over `sheet`, whose cache
    /// holds every value the inputs do not change, for varying `inputs`;
    /// `dependent` are the definitions that read them. `None` when something
    /// is outside what a plan covers (see the module documentation).
    pub fn compile<'e>(
        sheet: &mut Sheet,
        sources: &mut Sources,
        limits: &Limits,
        inputs: &[String],
        dependent: &HashSet<String>,
        exprs: impl Iterator<Item = &'e Expr>,
    ) -> Option<Plan> {
        let mut c = Compiler {
            ctx: Ctx::new(sheet, sources, limits, Mode::Run),
            inputs,
            dependent,
            fixed: Vec::new(),
            fixed_costs: Vec::new(),
            slots: FastMap::default(),
            defs: Vec::new(),
            reads: Vec::new(),
            calls: Vec::new(),
            nodes: 0,
        };
        let exprs = exprs.map(|e| c.expr(e)).collect::<Option<Vec<Step>>>()?;
        // Each node is evaluated at most once a point, so the evaluator
        // could not nest deeper than there are nodes.
        if c.nodes >= MAX_NESTING {
            return None;
        }
        let sole_reads = exprs
            .iter()
            .map(|e| match e.node {
                Node::Name(Source::Def(k)) if c.reads[k] == 1 => Some(k),
                _ => None,
            })
            .collect();
        let defs = c.defs.into_iter().collect::<Option<_>>()?;
        COMPILED.with(|n| n.set(n.get() + 1));
        Some(Plan {
            fixed: c.fixed,
            fixed_costs: c.fixed_costs,
            defs,
            exprs,
            sole_reads,
            calls: c.calls,
        })
    }

    /// A worker's room for the values of one point.
    pub fn state(&self) -> State {
        let args = |c: &CallSite| {
            let mut args = Args::unbound(c.builtin, c.span);
            args.wanted = c.wanted.clone();
            Some(Box::new(args))
        };
        let defined_by = self.defs.iter().map(|d| match &d.node {
            Node::Call(call) => Some(call.index),
            _ => None,
        });
        State {
            slots: vec![Slot::Unset; self.defs.len()],
            inputs: Vec::new(),
            calls: self.calls.iter().map(args).collect(),
            defined_by: defined_by.collect(),
        }
    }

    /// Evaluate expression `k` (of the probes, then the rules) at the point
    /// `state` was started at, as [`Ctx::expr`] would in `ctx`.
    pub fn eval(&self, ctx: &mut Ctx, state: &mut State, k: usize) -> Flow<Value> {
        let mut run = Run {
            plan: self,
            ctx,
            slots: &mut state.slots,
            inputs: &state.inputs,
            calls: &mut state.calls,
        };
        let e = &self.exprs[k];
        if let Some(slot) = self.sole_reads[k] {
            run.ctx.tick(e.span)?;
            run.read(Source::Def(slot), e.span)?;
            return Ok(match std::mem::take(&mut run.slots[slot]) {
                Slot::Ready(v, _) => v,
                // (Not reached: `read` made it ready.)
                Slot::Unset | Slot::Failed => run.value(Source::Def(slot)).clone(),
            });
        }
        run.step(e)
    }
}

/// Compiles expressions into steps.
struct Compiler<'c> {
    /// A context over the study's sheet (for literals' units).
    ctx: Ctx<'c>,
    inputs: &'c [String],
    dependent: &'c HashSet<String>,
    fixed: Vec<Value>,
    fixed_costs: Vec<Cost>,
    /// Slots of the dependent definitions compiled (or being compiled).
    slots: FastMap<String, usize>,
    /// `None` while a definition is being compiled.
    defs: Vec<Option<Step>>,
    /// How many name nodes read each slot.
    reads: Vec<usize>,
    /// The built-in calls compiled: [`Plan::calls`].
    calls: Vec<CallSite>,
    /// Nodes compiled.
    nodes: usize,
}

impl Compiler<'_> {
    fn expr(&mut self, e: &Expr) -> Option<Step> {
        self.nodes += 1;
        let node = match &e.kind {
            ExprKind::Quantity { value, unit } => {
                let v = self.ctx.quantity(*value, unit.as_ref(), e.span).ok()?;
                self.literal(v)
            }
            ExprKind::Bool(b) => self.literal(Value::Bool(*b)),
            ExprKind::Str(s) => self.literal(Value::Str(s.clone())),
            ExprKind::Name(n) => Node::Name(self.name(n)?),
            ExprKind::Field(a, field) => Node::Field(Box::new(self.expr(a)?), field.clone()),
            ExprKind::Unary(op, a) => self.unary(*op, a, e.span)?,
            ExprKind::Binary(op, a, b) if !matches!(op, BinaryOp::And | BinaryOp::Or) => {
                Node::Binary(*op, Box::new(self.expr(a)?), Box::new(self.expr(b)?))
            }
            ExprKind::Call { callee, args } => {
                Node::Call(Box::new(self.call(callee, args, e.span, None)?))
            }
            ExprKind::As(a, unit) => {
                let a = self.expr(a)?;
                Node::As(Box::new(a), self.ctx.unit(unit).ok()?, unit.span)
            }
            _ => return None,
        };
        Some(Step { span: e.span, node })
    }

    fn literal(&mut self, v: Value) -> Node {
        self.fixed.push(v);
        self.fixed_costs.push(None);
        Node::Literal(self.fixed.len() - 1)
    }

    fn unary(&mut self, op: UnaryOp, a: &Expr, span: Span) -> Option<Node> {
        // `-10 degC` is one literal to the evaluator (see `Ctx::unary`).
        if let Some((value, unit)) = negative_reading(op, a) {
            let v = self.ctx.quantity(value, Some(unit), span).ok()?;
            return Some(self.literal(v));
        }
        Some(Node::Unary(op, Box::new(self.expr(a)?)))
    }

    /// Where the value of name `n` is, as [`Ctx::force`] finds it.
    fn name(&mut self, n: &str) -> Option<Source> {
        if let Some(k) = self.inputs.iter().position(|i| i == n) {
            return Some(Source::Input(k));
        }
        if self.dependent.contains(n) {
            let k = self.def(n)?;
            self.reads[k] += 1;
            return Some(Source::Def(k));
        }
        let v = self.ctx.sheet.cache.get(n)?.clone();
        let cost = match v {
            Value::List(_) | Value::Record(_) => {
                Some(self.ctx.list_cost(&v, Span::default()).ok()?)
            }
            _ => None,
        };
        self.fixed.push(v);
        self.fixed_costs.push(cost);
        Some(Source::Fixed(self.fixed.len() - 1))
    }

    /// The slot of dependent definition `n`, compiling it the first time.
    fn def(&mut self, n: &str) -> Option<usize> {
        if let Some(&k) = self.slots.get(n) {
            // (`None` yet: a cycle, which the evaluator reports.)
            return self.defs[k].is_some().then_some(k);
        }
        let d = self.ctx.sheet.defs.get(n)?;
        if d.kind != DefKind::Value {
            return None;
        }
        let (expr, wanted) = (d.expr.clone(), d.wanted.clone());
        let k = self.defs.len();
        self.defs.push(None);
        self.reads.push(0);
        self.slots.insert(n.to_string(), k);
        let step = match (&expr.kind, wanted) {
            // `Ctx::force` hands the wanted fields to the definition's call.
            (ExprKind::Call { callee, args }, wanted) => {
                self.nodes += 1;
                let call = self.call(callee, args, expr.span, wanted)?;
                Step {
                    span: expr.span,
                    node: Node::Call(Box::new(call)),
                }
            }
            (_, Some(_)) => return None,
            (_, None) => self.expr(&expr)?,
        };
        self.defs[k] = Some(step);
        Some(k)
    }

    /// A call of a built-in, bound as [`Ctx::call`] binds it; `None` for
    /// anything else or a call that cannot be bound (the evaluator reports
    /// that at every point).
    fn call(
        &mut self,
        callee: &Ident,
        args: &[CallArg],
        span: Span,
        wanted: Option<Arc<[String]>>,
    ) -> Option<Call> {
        let name = callee.name.as_str();
        if name == "load" || super::is_form(name) || self.ctx.sheet.defs.contains_key(name) {
            return None;
        }
        let builtin = library::find(name)?;
        let mut binding = Args::unbound(builtin, span);
        let mut out = Vec::with_capacity(args.len());
        for a in args {
            let slot = match &a.name {
                Some(n) => Some(builtin.param_index(&n.name)?),
                None => None,
            };
            let stand_in = Arg {
                name: None,
                value: Value::Bool(false),
                span: a.span,
            };
            let param = binding.bind_one(slot, stand_in).ok()?;
            out.push(Argument {
                param,
                value: self.expr(&a.value)?,
                span: a.span,
            });
        }
        self.calls.push(CallSite {
            builtin,
            span,
            wanted,
        });
        Some(Call {
            index: self.calls.len() - 1,
            builtin,
            args: out,
        })
    }
}

/// One evaluation at a point: the plan, the context and the point's values.
struct Run<'r, 'a> {
    plan: &'r Plan,
    ctx: &'r mut Ctx<'a>,
    slots: &'r mut [Slot],
    inputs: &'r [Value],
    calls: &'r mut [Option<Box<Args>>],
}

/// An evaluated operand: a fresh value, or a name whose value stays where it is.
enum Operand {
    Owned(Value),
    At(Source),
}

impl Run<'_, '_> {
    /// [`Ctx::expr`] on the step's expression.
    fn step(&mut self, s: &Step) -> Flow<Value> {
        self.ctx.tick(s.span)?;
        if let Node::Name(src) = s.node {
            self.read(src, s.span)?;
            return Ok(self.value(src).copied());
        }
        let v = self.node(s)?;
        self.charge(&v, s.span)?;
        Ok(v)
    }

    /// Count the items of `v`, the value of a step at `span` other than a
    /// name, as `Ctx::expr` counts them, giving what reading it again counts.
    #[inline(always)]
    fn charge(&mut self, v: &Value, span: Span) -> Flow<Cost> {
        charge(self.ctx, v, span)
    }

    /// [`Run::step`] on definition `k`, its value (and what reading it
    /// counts) written straight into its slot.
    #[inline(always)]
    fn define(&mut self, k: usize) -> Flow<()> {
        let s = &self.plan.defs[k];
        self.ctx.tick(s.span)?;
        if let Node::Name(src) = s.node {
            self.read(src, s.span)?;
            let (v, cost) = (self.value(src).copied(), self.cost(src));
            fill(&mut self.slots[k], v, cost);
            return Ok(());
        }
        let v = self.node(s)?;
        // Into the slot first, then counted there (the value is not moved
        // again; if counting fails, `force` marks the slot failed).
        let slot = &mut self.slots[k];
        fill(slot, v, None);
        if let Slot::Ready(v, cost) = slot {
            *cost = charge(self.ctx, v, s.span)?;
        }
        Ok(())
    }

    /// Read name `src` at `span` (after the step's tick): compute it if
    /// needed, and count its items as `Ctx::expr` does.
    #[inline(always)]
    fn read(&mut self, src: Source, span: Span) -> Flow<()> {
        self.ready(src)?;
        match self.cost(src) {
            Some(n) => self.ctx.charge_items(n, span),
            None => Ok(()),
        }
    }

    /// What reading `src` counts (once it is ready).
    fn cost(&self, src: Source) -> Cost {
        match src {
            Source::Fixed(i) => self.plan.fixed_costs[i],
            // (The varied inputs are quantities.)
            Source::Input(_) => None,
            Source::Def(k) => match &self.slots[k] {
                Slot::Ready(_, cost) => *cost,
                Slot::Unset | Slot::Failed => None,
            },
        }
    }

    #[inline]
    fn node(&mut self, s: &Step) -> Flow<Value> {
        match &s.node {
            Node::Literal(i) => Ok(self.plan.fixed[*i].clone()),
            Node::Name(src) => Ok(self.value(*src).clone()),
            Node::Field(of, field) => self.field(of, field),
            Node::Unary(op, a) => {
                let v = self.step(a)?;
                unary_value(*op, &v, s.span, a.span)
            }
            Node::Binary(op, a, b) => {
                let x = self.operand(a)?;
                let y = self.operand(b)?;
                let (x, y) = (self.view(&x), self.view(&y));
                binary_values(*op, x, y, (a.span, b.span), s.span)
            }
            Node::Call(call) => self.call(call, s.span),
            Node::As(a, unit, unit_span) => self.shown_as(a, unit, *unit_span),
        }
    }

    /// `a as unit`, as `Ctx::shown_as` shows it (arithmetic on two computed
    /// quantities taken without building a value for it).
    fn shown_as(&mut self, a: &Step, unit: &Unit, unit_span: Span) -> Flow<Value> {
        if let Some(q) = self.computed_arithmetic(a)? {
            return show_quantity(q, unit).map_err(|msg| shown_as_failure(msg, a.span, unit_span));
        }
        let v = self.operand(a)?;
        show_in(self.view(&v), unit).map_err(|msg| shown_as_failure(msg, a.span, unit_span))
    }

    /// `Ctx::computed_arithmetic`: `x op y` for an arithmetic operator on
    /// two names of computed quantities, with the step of `e`; `None`
    /// (nothing done) for any other form.
    fn computed_arithmetic(&mut self, e: &Step) -> Flow<Option<Quantity>> {
        let Node::Binary(op, x, y) = &e.node else {
            return Ok(None);
        };
        let (Node::Name(sx), Node::Name(sy)) = (&x.node, &y.node) else {
            return Ok(None);
        };
        if !ops::is_arithmetic(*op) {
            return Ok(None);
        }
        let (qx, qy) = match (self.computed(*sx), self.computed(*sy)) {
            (Some(Value::Quantity(qx, _)), Some(Value::Quantity(qy, _))) => (*qx, *qy),
            _ => return Ok(None),
        };
        self.ctx.tick(e.span)?;
        ops::arithmetic(*op, &qx, &qy).map(Some).map_err(|err| {
            let (vx, vy) = (self.value(*sx), self.value(*sy));
            binary_failure(*op, err, vx, vy, (x.span, y.span), e.span)
        })
    }

    /// Compute the value of `src` if it is a definition not read yet at this
    /// point ([`Ctx::force`]).
    #[inline(always)]
    fn ready(&mut self, src: Source) -> Flow<()> {
        match src {
            Source::Def(k) => match self.slots[k] {
                Slot::Ready(..) => Ok(()),
                Slot::Failed => Err(Stop::Reported),
                Slot::Unset => self.force(k),
            },
            Source::Fixed(_) | Source::Input(_) => Ok(()),
        }
    }

    fn force(&mut self, k: usize) -> Flow<()> {
        match self.define(k) {
            Ok(()) => Ok(()),
            Err(stop) => {
                self.slots[k] = Slot::Failed;
                let skip = self.ctx.report(stop);
                Err(if skip { Stop::Skip } else { Stop::Reported })
            }
        }
    }

    /// The value of `src`, when it is at hand (not a definition still to
    /// compute): what the evaluator finds in its cache.
    fn computed(&self, src: Source) -> Option<&Value> {
        computed(self.plan, self.slots, self.inputs, src)
    }

    /// The value of `src` once [`Run::ready`] succeeded.
    fn value(&self, src: Source) -> &Value {
        value(self.plan, self.slots, self.inputs, src)
    }

    fn view<'s>(&'s self, o: &'s Operand) -> &'s Value {
        match o {
            Operand::Owned(v) => v,
            Operand::At(src) => self.value(*src),
        }
    }

    /// An operand of a binary operator: a name is computed if needed and
    /// read in place (no step of its own, as in `Ctx::binary`).
    fn operand(&mut self, e: &Step) -> Flow<Operand> {
        if let Node::Name(src) = e.node {
            self.ready(src)?;
            return Ok(Operand::At(src));
        }
        self.step(e).map(Operand::Owned)
    }

    /// [`Run::step`] on argument `a`, its value placed in `args`, with the
    /// two common forms (a name, a literal) taken directly.
    #[inline(always)]
    fn argument(&mut self, a: &Argument, args: &mut Args) -> Flow<()> {
        let s = &a.value;
        let value = match s.node {
            // A varied input (a quantity: `Varied::set`), copied into its
            // place; as a name it counts its step and no items.
            Node::Name(Source::Input(k)) => {
                self.ctx.tick(s.span)?;
                match &self.inputs[k] {
                    Value::Quantity(q, unit) => {
                        args.place_quantity(a.param, *q, unit.clone(), a.span);
                        return Ok(());
                    }
                    other => other.clone(),
                }
            }
            Node::Name(src) => {
                self.ctx.tick(s.span)?;
                self.read(src, s.span)?;
                self.value(src).copied()
            }
            // (A literal is a quantity, a truth value or text: nothing to count.)
            Node::Literal(i) => {
                self.ctx.tick(s.span)?;
                self.plan.fixed[i].copied()
            }
            _ => self.step(s)?,
        };
        args.place_value(a.param, value, a.span);
        Ok(())
    }

    /// `of.field`, as `Ctx::field` reads it: in place from a computed record.
    fn field(&mut self, of: &Step, field: &Ident) -> Flow<Value> {
        let Node::Name(src) = of.node else {
            let v = self.step(of)?;
            return read_field(&v, of.span, field);
        };
        if let Some(Value::Record(r)) = self.computed(src) {
            if let Some(v) = r.get_in_line(&field.name) {
                return Ok(v.copied());
            }
        }
        // `self.step(of)` without copying the value: the same steps.
        self.ctx.tick(of.span)?;
        self.read(src, of.span)?;
        let v = self.value(src);
        // (What `read_field` gives for a field the record has, in line.)
        if let Value::Record(r) = v {
            if let Some(v) = r.get_in_line(&field.name) {
                return Ok(v.copied());
            }
        }
        read_field(v, of.span, field)
    }

    /// A built-in call, as `Ctx::call_builtin` runs it, in the arguments
    /// kept for it from the last point.
    #[inline]
    fn call(&mut self, call: &Call, span: Span) -> Flow<Value> {
        let mut args = match self.calls[call.index].take() {
            Some(mut args) => {
                // (Only the call's own parameters were ever placed.)
                args.clear_placed(call.args.iter().map(|a| a.param));
                args
            }
            None => Box::new(Args::unbound(call.builtin, span)),
        };
        let result = self.run_call(call, &mut args, span);
        self.calls[call.index] = Some(args);
        result
    }

    #[inline]
    fn run_call(&mut self, call: &Call, args: &mut Args, span: Span) -> Flow<Value> {
        for a in &call.args {
            self.argument(a, args)?;
        }
        self.ctx.run_builtin(call.builtin, args, span)
    }
}

/// Count the items of `v`, the value of a step at `span` other than a
/// name, as `Ctx::expr` counts them, giving what reading it again counts.
#[inline(always)]
fn charge(ctx: &mut Ctx, v: &Value, span: Span) -> Flow<Cost> {
    match v {
        // (What `list_cost` counts for it, without the call.)
        Value::Record(r) if is_flat_record(r) => {
            ctx.charge_items(0, span)?;
            Ok(Some(0))
        }
        Value::List(_) | Value::Record(_) => {
            let n = ctx.list_cost(v, span)?;
            ctx.charge_items(n, span)?;
            Ok(Some(n))
        }
        _ => Ok(None),
    }
}

/// Make `slot` ready with `v` and its cost. (A slot is filled when it is
/// forced, so not set yet: nothing to drop.)
#[inline(always)]
fn fill(slot: &mut Slot, v: Value, cost: Cost) {
    match slot {
        Slot::Unset => *slot = Slot::Ready(v, cost),
        other => *other = Slot::Ready(v, cost),
    }
}

/// The value of `src`, when it is at hand (not a definition still to
/// compute): what the evaluator finds in its cache.
fn computed<'v>(
    plan: &'v Plan,
    slots: &'v [Slot],
    inputs: &'v [Value],
    src: Source,
) -> Option<&'v Value> {
    match src {
        Source::Fixed(i) => Some(&plan.fixed[i]),
        Source::Input(k) => Some(&inputs[k]),
        Source::Def(k) => match &slots[k] {
            Slot::Ready(v, _) => Some(v),
            Slot::Unset | Slot::Failed => None,
        },
    }
}

/// The value of `src` once [`Run::ready`] succeeded.
fn value<'v>(plan: &'v Plan, slots: &'v [Slot], inputs: &'v [Value], src: Source) -> &'v Value {
    static MISSING: Value = Value::Bool(false);
    computed(plan, slots, inputs, src).unwrap_or(&MISSING)
}
