//! The evaluator: forces named values through the dependency graph and
//! evaluates expressions, attaching spans to span-less unit errors.

use std::path::PathBuf;

use super::ops::{self, dim_words, OpError};
use super::{DefKind, Limits, Sheet, Sources};
use crate::diag::{Diagnostic, Span};
use crate::library::type_word;
use crate::syntax::{BinaryOp, Expr, ExprKind, UnaryOp, UnitExpr, UnitKind};
use crate::units::{lookup_unit, suggest_unit, Quantity, Unit};
use crate::value::{Record, Value};

/// Why evaluation of an expression stopped.
#[derive(Debug)]
pub enum Stop {
    /// A new error to report.
    Error(Diagnostic),
    /// An error already reported (a value this one depends on failed).
    Reported,
    /// `siccant check`: the value needs engine work, which is not run.
    Skip,
}

impl From<Diagnostic> for Stop {
    fn from(d: Diagnostic) -> Stop {
        Stop::Error(d)
    }
}

/// The result of evaluating something.
pub type Flow<T> = Result<T, Stop>;

/// Run the engine, or only check names, units and dimensions.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Mode {
    /// Evaluate everything, engine work included.
    Run,
    /// Check names, units and dimensions; skip built-in calls.
    CheckOnly,
}

/// Evaluation state for one `eval` of one sheet.
pub struct Ctx<'a> {
    /// The definitions being evaluated.
    pub sheet: &'a mut Sheet,
    /// The source map (loads add files to it).
    pub sources: &'a mut Sources,
    /// Depth, step budget and interrupt flag.
    pub limits: &'a Limits,
    /// Run, or check only.
    pub mode: Mode,
    /// Expression steps taken so far (shared with nested loads).
    pub ops: u64,
    /// Warnings collected so far (validity ranges, failed checks in loads).
    pub warnings: Vec<Diagnostic>,
    /// Errors collected so far.
    pub errors: Vec<Diagnostic>,
    /// Parameters of the user function being evaluated.
    pub(super) frame: Option<super::FastMap<String, Value>>,
    /// Names being computed right now (catches cycles the static check could not see).
    active: Vec<std::sync::Arc<str>>,
    /// Names whose evaluation failed in this run.
    failed: super::fastmap::FastSet<String>,
    /// Canonical paths of the worksheets being loaded, outermost first.
    pub load_stack: Vec<PathBuf>,
    /// Depth of user-function calls and loads.
    pub depth: usize,
    /// Expressions being evaluated, nested (guards the native stack).
    nesting: usize,
    /// Shape checking: blind evaluation and user calls (see `shape.rs`).
    pub(super) checking: super::shape::Checking,
    /// The fields wanted of the built-in call being forced (its definition's
    /// [`super::Def::wanted`]); taken by that call.
    pub(super) wanted: Option<std::sync::Arc<[String]>>,
}

/// Most expression evaluations nested inside one another (across calls).
pub const MAX_NESTING: usize = 1500;

impl<'a> Ctx<'a> {
    /// A context evaluating `sheet`.
    pub fn new(
        sheet: &'a mut Sheet,
        sources: &'a mut Sources,
        limits: &'a Limits,
        mode: Mode,
    ) -> Ctx<'a> {
        Ctx {
            sheet,
            sources,
            limits,
            mode,
            ops: 0,
            warnings: Vec::new(),
            errors: Vec::new(),
            frame: None,
            active: Vec::new(),
            failed: Default::default(),
            load_stack: Vec::new(),
            depth: 0,
            nesting: 0,
            checking: super::shape::Checking::default(),
            wanted: None,
        }
    }

    /// Start over as [`Ctx::new`] would over the same sheet, sources, limits
    /// and mode, keeping only the room of its lists, in a context that only
    /// a what-if study's plan has evaluated in since it was new or
    /// restarted: a worker evaluates its points one after another in one
    /// context. A plan's run (`whatif/plan.rs`) counts steps and collects
    /// warnings and errors, and touches nothing else of the context (no
    /// names, frames, loads, nesting, shape checking or wanted fields), so
    /// only those three are reset; the rest is asserted (in debug builds)
    /// to be as new.
    #[inline(always)]
    pub(super) fn restart_after_plan(&mut self) {
        // Every field named, so that a new one is not forgotten here.
        let Ctx {
            sheet: _,
            sources: _,
            limits: _,
            mode: _,
            ops,
            warnings,
            errors,
            frame,
            active,
            failed,
            load_stack,
            depth,
            nesting,
            checking,
            wanted,
        } = self;
        debug_assert!(
            frame.is_none()
                && active.is_empty()
                && failed.is_empty()
                && load_stack.is_empty()
                && (*depth, *nesting) == (0, 0)
                && checking.blind == 0
                && checking.recursions == 0
                && checking.calls.is_empty()
                && wanted.is_none(),
            "a plan's context holds only steps, warnings and errors"
        );
        *ops = 0;
        // (Cleared only when they hold something: most points leave them
        // empty.)
        if !warnings.is_empty() {
            warnings.clear();
        }
        if !errors.is_empty() {
            errors.clear();
        }
    }

    /// The stack of names being computed, empty, to hand to the next context
    /// (a what-if study's points reuse its room).
    pub(super) fn take_active(&mut self) -> Vec<std::sync::Arc<str>> {
        let mut active = std::mem::take(&mut self.active);
        active.clear();
        active
    }

    /// Reuse `active`'s room for the stack of names being computed.
    pub(super) fn reuse_active(&mut self, mut active: Vec<std::sync::Arc<str>>) {
        active.clear();
        self.active = active;
    }

    /// Treat these names as already failed and reported (e.g. caught in a
    /// cycle, or on a line that did not parse), so uses of them stay silent.
    pub fn mark_failed<'n>(&mut self, names: impl IntoIterator<Item = &'n String>) {
        self.failed.extend(names.into_iter().cloned());
    }

    /// Count one step against the budget; check the interrupt flag now and then.
    #[inline(always)]
    pub(super) fn tick(&mut self, span: Span) -> Flow<()> {
        self.ops += 1;
        if self.ops <= self.limits.max_operations && self.ops % 1024 != 0 {
            return Ok(());
        }
        self.tick_checks(span)
    }

    /// The checks of [`Ctx::tick`] when the budget may be spent or the
    /// interrupt flag is due to be read (one step in 1024).
    #[cold]
    fn tick_checks(&mut self, span: Span) -> Flow<()> {
        if self.ops > self.limits.max_operations {
            let msg = format!(
                "evaluation stopped after {} steps",
                self.limits.max_operations
            );
            return Err(Diagnostic::error(span, msg)
                .with_hint("is a function calling itself without end?")
                .into());
        }
        if self.ops % 1024 == 0 && self.limits.interrupted() {
            return Err(Diagnostic::error(span, "interrupted").into());
        }
        Ok(())
    }

    /// Record a stop as an error of this run (once), returning whether it was a skip.
    pub fn report(&mut self, stop: Stop) -> bool {
        match stop {
            Stop::Error(d) => {
                self.errors.push(d);
                false
            }
            Stop::Reported => false,
            Stop::Skip => true,
        }
    }

    /// The value of a named definition, computing it (and what it needs) if needed.
    pub fn force(&mut self, name: &str, use_span: Span) -> Flow<Value> {
        if let Some(v) = self.sheet.cache.get(name) {
            return Ok(v.clone());
        }
        if self.failed.contains(name) {
            return Err(Stop::Reported);
        }
        let (kind, expr, wanted, key) = match self.sheet.defs.get(name) {
            Some(d) => (d.kind, d.expr.clone(), d.wanted.clone(), d.key.clone()),
            None => return Err(self.undefined(name, use_span)),
        };
        if kind == DefKind::Function {
            let msg = format!("`{name}` is a function; call it with arguments, e.g. `{name}(...)`");
            return Err(Diagnostic::error(use_span, msg).into());
        }
        if self.active.iter().any(|n| **n == *name) {
            let chain = format!("{} -> {name}", self.active.join(" -> "));
            return Err(Diagnostic::error(use_span, format!("cycle: {chain}")).into());
        }
        let overridden = (kind == DefKind::Input)
            .then(|| self.sheet.overrides.get(name).cloned())
            .flatten();
        self.active.push(key.clone());
        let saved = self.frame.take();
        let blind = std::mem::take(&mut self.checking.blind);
        let result = match overridden {
            Some(v) => self.checked_override(name, &expr, v),
            None => {
                // The definition is a call; the call takes this first.
                self.wanted = wanted;
                let v = self.expr(&expr);
                self.wanted = None;
                v
            }
        };
        self.checking.blind = blind;
        self.frame = saved;
        self.active.pop();
        match result {
            Ok(v) => {
                self.sheet.cache.insert(key, v.clone());
                Ok(v)
            }
            Err(stop) => {
                self.failed.insert(name.to_string());
                let skip = self.report(stop);
                Err(if skip { Stop::Skip } else { Stop::Reported })
            }
        }
    }

    /// An input's overriding value must have the dimension of its default.
    fn checked_override(&mut self, name: &str, default: &Expr, v: Value) -> Flow<Value> {
        let expected = match self.expr(default) {
            Ok(Value::Quantity(d, _)) => d.dim,
            _ => return Ok(v),
        };
        match &v {
            Value::Quantity(q, _) if q.dim != expected => {
                let span = self
                    .sheet
                    .defs
                    .get(name)
                    .map_or(default.span, |d| d.name.span);
                let msg = format!(
                    "input `{name}` is {}, but the value given for it is {}",
                    dim_words(expected),
                    dim_words(q.dim)
                );
                let hint = format!("the default is `{}`", self.sources.slice(default.span));
                Err(Diagnostic::error(span, msg).with_hint(hint).into())
            }
            _ => Ok(v),
        }
    }

    fn undefined(&self, name: &str, span: Span) -> Stop {
        let mut d = Diagnostic::error(span, format!("`{name}` is not defined"));
        let mut names: Vec<&str> = self.sheet.order.iter().map(String::as_str).collect();
        if let Some(frame) = &self.frame {
            names.extend(frame.keys().map(String::as_str));
        }
        if lookup_unit(name).is_some() {
            d = d.with_hint(format!(
                "`{name}` is a unit; write a number before it (`1 {name}`), and compound units without spaces (`14 kg/m^2`)"
            ));
        } else if let Some(best) = super::suggest(name, &names) {
            d = d.with_hint(format!("did you mean `{best}`?"));
        }
        Stop::Error(d)
    }

    /// Evaluate an expression.
    pub fn expr(&mut self, e: &Expr) -> Flow<Value> {
        self.tick(e.span)?;
        if self.nesting >= MAX_NESTING {
            return Err(nested_too_deeply(e.span));
        }
        self.nesting += 1;
        let result = self.expr_kind(e);
        self.nesting -= 1;
        if let Ok(v @ (Value::List(_) | Value::Record(_))) = &result {
            self.charge_list(v, e.span)?;
        }
        result
    }

    /// Count a list's items against the step budget and refuse a list larger
    /// than the limit, so that a worksheet cannot exhaust memory.
    pub(super) fn charge_list(&mut self, list: &Value, span: Span) -> Flow<()> {
        let items = self.list_cost(list, span)?;
        self.charge_items(items, span)
    }

    /// The items [`Ctx::charge_list`] counts for `list`, or its error for a
    /// value nested too deeply or too large.
    pub(super) fn list_cost(&self, list: &Value, span: Span) -> Flow<usize> {
        let (items, depth) = list_items(list);
        if depth > MAX_VALUE_DEPTH {
            let msg = format!("lists and records nested deeper than {MAX_VALUE_DEPTH} levels");
            return Err(Diagnostic::error(span, msg)
                .with_hint("does a value contain itself through a chain of names?")
                .into());
        }
        if items > self.limits.max_list_items {
            let msg = format!(
                "a list of {items} items is larger than the limit of {}",
                self.limits.max_list_items
            );
            return Err(Diagnostic::error(span, msg)
                .with_hint("sweep fewer points, or split the work into smaller lists")
                .into());
        }
        Ok(items)
    }

    /// Count `items` items of a list ([`Ctx::list_cost`]) and one step.
    #[inline(always)]
    pub(super) fn charge_items(&mut self, items: usize, span: Span) -> Flow<()> {
        self.ops += items as u64;
        self.tick(span)
    }

    fn expr_kind(&mut self, e: &Expr) -> Flow<Value> {
        match &e.kind {
            ExprKind::Quantity { value, unit } => self.quantity(*value, unit.as_ref(), e.span),
            ExprKind::Bool(b) => Ok(Value::Bool(*b)),
            ExprKind::Str(s) => Ok(Value::Str(s.clone())),
            ExprKind::Name(n) => self.name(n, e.span),
            ExprKind::List(items) => items
                .iter()
                .map(|i| self.expr(i))
                .collect::<Flow<_>>()
                .map(Value::List),
            ExprKind::Record(fields) => self.record(fields),
            ExprKind::Unary(op, a) => self.unary(*op, a, e.span),
            ExprKind::Binary(op, a, b) => self.binary(*op, a, b, e.span),
            ExprKind::Call { callee, args } => self.call(callee, args, e.span),
            ExprKind::Field(a, field) => self.field(a, field),
            ExprKind::As(a, unit) => self.shown_as(a, unit),
            ExprKind::If(c, a, b) => self.conditional(c, a, b),
        }
    }

    /// Evaluate an operand, leaving a named value in place instead of copying it.
    fn operand<'e>(&mut self, e: &'e Expr) -> Flow<Operand<'e>> {
        if let ExprKind::Name(n) = &e.kind {
            if self.frame.as_ref().is_some_and(|f| f.contains_key(n)) {
                return Ok(Operand::Param(n));
            }
            if !self.sheet.cache.contains_key(n.as_str()) {
                self.force(n, e.span)?;
            }
            return Ok(Operand::Global(n));
        }
        self.expr(e).map(Operand::Owned)
    }

    /// The value an operand stands for.
    fn view<'s>(&'s self, o: &'s Operand) -> &'s Value {
        view(&self.frame, &self.sheet.cache, o)
    }

    fn name(&mut self, n: &str, span: Span) -> Flow<Value> {
        if let Some(v) = self.frame.as_ref().and_then(|f| f.get(n)) {
            return Ok(v.clone());
        }
        self.force(n, span)
    }

    pub(super) fn quantity(
        &mut self,
        value: f64,
        unit: Option<&UnitExpr>,
        span: Span,
    ) -> Flow<Value> {
        match unit {
            None => Ok(Value::Quantity(Quantity::number(value), None)),
            Some(u) => {
                let unit = self.unit(u)?;
                match unit.try_to_si(value) {
                    Ok(q) => Ok(Value::Quantity(q, Some(unit))),
                    Err(e) => {
                        let mut d = Diagnostic::error(span, e.message);
                        for h in e.hints {
                            d = d.with_hint(h);
                        }
                        Err(d.into())
                    }
                }
            }
        }
    }

    /// Resolve a unit expression (once; the unit is kept in the expression).
    pub fn unit(&mut self, u: &UnitExpr) -> Flow<Unit> {
        Ok(unit_at(&mut self.sheet.unit_texts, self.sources, u)?.clone())
    }

    fn record(&mut self, fields: &[(crate::syntax::Ident, Expr)]) -> Flow<Value> {
        let mut r = Record::new("record");
        for (name, e) in fields {
            let v = self.expr(e)?;
            r.push(name.name.clone(), v);
        }
        Ok(Value::Record(r))
    }

    fn unary(&mut self, op: UnaryOp, a: &Expr, span: Span) -> Flow<Value> {
        if let Some((value, unit)) = negative_reading(op, a) {
            return self.quantity(value, Some(unit), span);
        }
        let v = self.expr(a)?;
        if !self.shapes_only(&[&v]) {
            return unary_value(op, &v, span, a.span);
        }
        let result = self.on_shapes(None, &v, None, |x, _| ops::unary(op, x))?;
        result.map_err(|e| op_error(e, span, a.span, a.span).into())
    }

    fn binary(&mut self, op: BinaryOp, a: &Expr, b: &Expr, span: Span) -> Flow<Value> {
        if matches!(op, BinaryOp::And | BinaryOp::Or) {
            return self.logic(op, a, b);
        }
        // Both operands already computed names (the common case in a worksheet):
        // one lookup each, nothing forced, nothing copied.
        if let (Some(x), Some(y)) = (self.computed(a), self.computed(b)) {
            if !self.shapes_only(&[x, y]) {
                return binary_values(op, x, y, (a.span, b.span), span);
            }
        }
        let x = self.operand(a)?;
        let y = self.operand(b)?;
        let (x, y) = (self.view(&x), self.view(&y));
        if self.shapes_only(&[x, y]) {
            let result = self.on_shapes(Some(op), x, Some(y), |x, y| {
                ops::binary(op, x, y.unwrap_or(x))
            })?;
            return result.map_err(|e| binary_failure(op, e, x, y, (a.span, b.span), span));
        }
        binary_values(op, x, y, (a.span, b.span), span)
    }

    /// The value of `e` when it is a name whose value is already at hand (a
    /// parameter or a computed value); `None` otherwise (nothing is forced).
    #[inline(always)]
    fn computed(&self, e: &Expr) -> Option<&Value> {
        let ExprKind::Name(n) = &e.kind else {
            return None;
        };
        if let Some(v) = self.frame.as_ref().and_then(|f| f.get(n)) {
            return Some(v);
        }
        self.sheet.cache.get(n.as_str())
    }

    fn logic(&mut self, op: BinaryOp, a: &Expr, b: &Expr) -> Flow<Value> {
        let x = self.truth(a, op.symbol())?;
        let decided = (op == BinaryOp::And && !x) || (op == BinaryOp::Or && x);
        if decided && !self.both_sides() {
            return Ok(Value::Bool(x));
        }
        Ok(Value::Bool(self.truth(b, op.symbol())?))
    }

    /// Evaluate to a truth value, or blame the expression.
    pub fn truth(&mut self, e: &Expr, what: &str) -> Flow<bool> {
        let v = self.expr(e)?;
        truth_value(v, what, e.span)
    }

    fn conditional(&mut self, c: &Expr, a: &Expr, b: &Expr) -> Flow<Value> {
        if self.both_sides() {
            return self.both_branches(c, a, b);
        }
        let then_taken = self.truth(c, "if")?;
        let v = self.expr(if then_taken { a } else { b })?;
        self.branch_not_taken(&v, then_taken, a, b)?;
        Ok(v)
    }

    fn field(&mut self, a: &Expr, field: &crate::syntax::Ident) -> Flow<Value> {
        // A field of a computed record: read in place.
        if let Some(Value::Record(r)) = self.computed(a) {
            if let Some(v) = r.get(&field.name) {
                return Ok(v.clone());
            }
        }
        let v = self.expr(a)?;
        read_field(&v, a.span, field)
    }

    #[inline]
    fn shown_as(&mut self, a: &Expr, u: &UnitExpr) -> Flow<Value> {
        // `x * y as UNIT` over computed quantities: no value is built for the product.
        if let Some(q) = self.computed_arithmetic(a)? {
            let unit = unit_at(&mut self.sheet.unit_texts, self.sources, u)?;
            return show_quantity(q, unit).map_err(|msg| shown_as_failure(msg, a.span, u.span));
        }
        self.shown_as_value(a, u)
    }

    /// `a as u` in general: lists, shapes, any operand.
    #[inline(never)]
    fn shown_as_value(&mut self, a: &Expr, u: &UnitExpr) -> Flow<Value> {
        let v = self.operand(a)?;
        let unit = unit_at(&mut self.sheet.unit_texts, self.sources, u)?;
        let shown = view(&self.frame, &self.sheet.cache, &v);
        let result = if self.mode == Mode::CheckOnly || self.checking.blind > 0 {
            show_shape(shown, unit)
        } else {
            show_in(shown, unit)
        };
        result.map_err(|msg| shown_as_failure(msg, a.span, u.span))
    }

    /// `x op y` for an arithmetic operator whose operands are names of
    /// computed quantities, in a run (not checking shapes): the quantity alone,
    /// with the same step, nesting check and errors as [`Ctx::expr`] on `e`.
    /// `None` (nothing evaluated, no step counted) when `e` has another form.
    #[inline]
    fn computed_arithmetic(&mut self, e: &Expr) -> Flow<Option<Quantity>> {
        let ExprKind::Binary(op, a, b) = &e.kind else {
            return Ok(None);
        };
        let op = *op;
        if !ops::is_arithmetic(op) || self.mode != Mode::Run || self.checking.blind > 0 {
            return Ok(None);
        }
        let (x, y) = match (self.computed(a), self.computed(b)) {
            (Some(Value::Quantity(x, _)), Some(Value::Quantity(y, _))) => (*x, *y),
            _ => return Ok(None),
        };
        self.tick(e.span)?;
        if self.nesting >= MAX_NESTING {
            return Err(nested_too_deeply(e.span));
        }
        match ops::arithmetic(op, &x, &y) {
            Ok(q) => Ok(Some(q)),
            Err(err) => Err(self.computed_failure(op, err, a, b, e.span)),
        }
    }

    /// The error of [`Ctx::computed_arithmetic`], as [`Ctx::binary`] reports it.
    #[cold]
    fn computed_failure(&self, op: BinaryOp, err: OpError, a: &Expr, b: &Expr, span: Span) -> Stop {
        static MISSING: Value = Value::Bool(false);
        let x = self.computed(a).unwrap_or(&MISSING);
        let y = self.computed(b).unwrap_or(&MISSING);
        binary_failure(op, err, x, y, (a.span, b.span), span)
    }
}

/// The unit of a literal or an `as`: kept in the expression once resolved.
#[inline]
fn unit_at<'u>(
    texts: &mut super::FastMap<String, Unit>,
    sources: &Sources,
    u: &'u UnitExpr,
) -> Result<&'u Unit, Diagnostic> {
    match u.resolved.get() {
        Some(unit) => Ok(unit),
        None => resolve_and_keep(texts, sources, u),
    }
}

/// Resolve a unit expression for the first time and keep the unit in it.
#[inline(never)]
fn resolve_and_keep<'u>(
    texts: &mut super::FastMap<String, Unit>,
    sources: &Sources,
    u: &'u UnitExpr,
) -> Result<&'u Unit, Diagnostic> {
    let unit = resolve_by_text(texts, sources, u)?;
    Ok(u.resolved.keep(unit))
}

/// The error of a failed `a as u`.
#[cold]
pub(super) fn shown_as_failure(msg: String, a: Span, u: Span) -> Stop {
    let mut d = Diagnostic::error(u, msg);
    d.hints.push((Some(a), "this value".into()));
    d.into()
}

/// The error for expressions nested deeper than [`MAX_NESTING`].
#[cold]
fn nested_too_deeply(span: Span) -> Stop {
    Diagnostic::error(span, "evaluation nested too deeply")
        .with_hint("does a function call itself without end?")
        .into()
}

/// `-10 degC` (`op` applied to `a`) is a negative reading on the scale, not
/// the negation of an absolute temperature: the literal's value, negated,
/// and its unit, when `op a` is a minus before a literal with a unit.
pub(super) fn negative_reading(op: UnaryOp, a: &Expr) -> Option<(f64, &UnitExpr)> {
    match (op, &a.kind) {
        (
            UnaryOp::Neg,
            ExprKind::Quantity {
                value,
                unit: Some(unit),
            },
        ) => Some((-*value, unit)),
        _ => None,
    }
}

/// A value as the truth value `what` (`check`, `if`, `and`) needs, or an
/// error blaming the expression at `span`.
pub(super) fn truth_value(v: Value, what: &str, span: Span) -> Flow<bool> {
    match v {
        Value::Bool(b) => Ok(b),
        other => {
            let msg = format!(
                "`{what}` needs a truth value (a comparison), found {}",
                type_word(&other)
            );
            Err(Diagnostic::error(span, msg).into())
        }
    }
}

/// Field `field` of `v`, the value of the expression at `span` (a record).
pub(super) fn read_field(v: &Value, span: Span, field: &crate::syntax::Ident) -> Flow<Value> {
    match v {
        Value::Record(r) => r
            .get(&field.name)
            .map(Value::copied)
            .ok_or_else(|| no_field(r, field).into()),
        other => {
            let msg = format!(
                "`.{}` reads a field of a record, but this is {}",
                field.name,
                type_word(other)
            );
            Err(Diagnostic::error(span, msg).into())
        }
    }
}

/// Apply a prefix operator to `v`, the value of the operand at `a`.
pub(super) fn unary_value(op: UnaryOp, v: &Value, span: Span, a: Span) -> Flow<Value> {
    ops::unary(op, v).map_err(|e| op_error(e, span, a, a).into())
}

/// Apply a binary operator to two values, blaming the operands' spans.
pub(super) fn binary_values(
    op: BinaryOp,
    x: &Value,
    y: &Value,
    (a, b): (Span, Span),
    span: Span,
) -> Flow<Value> {
    ops::binary(op, x, y).map_err(|e| binary_failure(op, e, x, y, (a, b), span))
}

/// The diagnostic for a failed `x op y`, with a hint for two absolute temperatures.
pub(super) fn binary_failure(
    op: BinaryOp,
    e: ops::OpError,
    x: &Value,
    y: &Value,
    (a, b): (Span, Span),
    span: Span,
) -> Stop {
    let mut d = op_error(e, span, a, b);
    if op == BinaryOp::Add && ops::is_absolute(x) && ops::is_absolute(y) {
        d.hints.push((
            Some(b),
            "this is an absolute temperature too; use a difference such as `10 K`".into(),
        ));
    }
    d.into()
}

/// The value an operand stands for (a free function so that callers can
/// borrow other parts of the context at the same time).
fn view<'s>(
    frame: &'s Option<super::FastMap<String, Value>>,
    cache: &'s super::FastMap<std::sync::Arc<str>, Value>,
    o: &'s Operand,
) -> &'s Value {
    static MISSING: Value = Value::Bool(false);
    match o {
        Operand::Owned(v) => v,
        Operand::Param(n) => frame.as_ref().and_then(|f| f.get(*n)).unwrap_or(&MISSING),
        Operand::Global(n) => cache.get(*n).unwrap_or(&MISSING),
    }
}

/// An evaluated operand: a fresh value, or a name whose value stays where it is.
enum Operand<'e> {
    Owned(Value),
    Param(&'e str),
    Global(&'e str),
}

/// `show_in` on a stand-in when the magnitude is unknown (or ignored).
fn show_shape(v: &Value, unit: &Unit) -> Result<Value, String> {
    if !super::shape::is_unknown(v) {
        return show_in(v, unit);
    }
    show_in(&super::shape::stand_in(v), unit).map(|s| super::shape::forget(&s))
}

/// Attach a display unit to a quantity (or every quantity in a list).
pub(super) fn show_in(v: &Value, unit: &Unit) -> Result<Value, String> {
    match v {
        Value::Quantity(q, _) => show_quantity(*q, unit),
        Value::List(items) => items
            .iter()
            .map(|i| show_in(i, unit))
            .collect::<Result<_, _>>()
            .map(Value::List),
        other => Err(format!(
            "`as` shows a quantity in a unit, but this is {}",
            type_word(other)
        )),
    }
}

/// A quantity with `unit` as its display unit, when it can be shown in it.
#[inline(always)]
pub(super) fn show_quantity(q: Quantity, unit: &Unit) -> Result<Value, String> {
    if q.dim != unit.dim {
        return Err(cannot_show(&q, unit));
    }
    unit.from_si(&q).map_err(|e| e.message)?;
    Ok(Value::Quantity(q, Some(unit.clone())))
}

#[cold]
fn cannot_show(q: &Quantity, unit: &Unit) -> String {
    format!(
        "cannot show {} in `{}`, which is {}",
        dim_words(q.dim),
        unit.symbol,
        dim_words(unit.dim)
    )
}

fn no_field(r: &Record, field: &crate::syntax::Ident) -> Diagnostic {
    let names: Vec<&str> = r.fields.iter().map(|(n, _)| &**n).collect();
    let mut d = Diagnostic::error(
        field.span,
        format!("{} has no field `{}`", record_word(r), field.name),
    );
    if let Some(best) = super::suggest(&field.name, &names) {
        d = d.with_hint(format!("did you mean `{best}`?"));
    }
    d.with_hint(format!("fields: {}", names.join(", ")))
}

fn record_word(r: &Record) -> String {
    if r.type_name == "record" {
        "this record".into()
    } else {
        format!("a record of type {}", r.type_name)
    }
}

/// Build a diagnostic from an operator error, labelling the operands'
/// dimensions when they do not match.
fn op_error(e: OpError, span: Span, a: Span, b: Span) -> Diagnostic {
    let mut d = Diagnostic::error(span, e.message);
    if let Some((da, db)) = e.dims {
        d.hints
            .push((Some(a), format!("this is {}", dim_words(da))));
        d.hints
            .push((Some(b), format!("this is {}", dim_words(db))));
    }
    for h in e.hints {
        d.hints.push((None, h));
    }
    d
}

/// Resolve a unit, reusing an earlier resolution of the same text.
fn resolve_by_text(
    texts: &mut super::FastMap<String, Unit>,
    sources: &Sources,
    u: &UnitExpr,
) -> Result<Unit, Diagnostic> {
    let text = sources.slice(u.span);
    if text.is_empty() {
        return resolve_unit(u);
    }
    if let Some(unit) = texts.get(text) {
        return Ok(unit.clone());
    }
    let unit = resolve_unit(u)?;
    texts.insert(text.to_string(), unit.clone());
    Ok(unit)
}

/// Build a unit from a unit expression.
pub fn resolve_unit(u: &UnitExpr) -> Result<Unit, Diagnostic> {
    match &u.kind {
        UnitKind::Name(s) => lookup_unit(s).ok_or_else(|| unknown_unit(s, u.span)),
        UnitKind::Mul(a, b) => Ok(resolve_unit(a)?.mul(&resolve_unit(b)?)),
        UnitKind::Div(a, b) => Ok(resolve_unit(a)?.div(&resolve_unit(b)?)),
        UnitKind::Pow(a, n) => Ok(resolve_unit(a)?.powi(*n)),
    }
}

fn unknown_unit(s: &str, span: Span) -> Diagnostic {
    let d = Diagnostic::error(span, format!("unknown unit `{s}`"));
    match suggest_unit(s) {
        Some(best) => d.with_hint(format!("did you mean `{best}`?")),
        None => d.with_hint("see `siccant help units` for the units siccant knows"),
    }
}

/// Deepest nesting of lists and records in one value; deeper values would
/// overflow the stack when they are copied, shown or dropped.
const MAX_VALUE_DEPTH: usize = 32;

/// True for a record none of whose fields is a list or a record (an air
/// state, a surface balance): [`Ctx::list_cost`] counts no items for it and
/// never refuses it (it is one level deep), so a caller that meets one may
/// count 0 items without the call.
#[inline]
pub(super) fn is_flat_record(r: &crate::value::Record) -> bool {
    !r.fields.iter().any(|(_, f)| is_container(f))
}

/// Whether [`list_items`] walks into `value`: a list or a record.
#[inline]
fn is_container(value: &Value) -> bool {
    matches!(value, Value::List(_) | Value::Record(_))
}

/// Items in a value's lists (nested lists counted item by item) and its
/// nesting depth through lists and records, without recursion, so that a
/// deeply nested value cannot overflow the stack here.
fn list_items(value: &Value) -> (usize, usize) {
    // A record of plain fields (an air state, a surface balance): one level,
    // no items, nothing to walk.
    if let Value::Record(r) = value {
        if is_flat_record(r) {
            return (0, usize::from(!r.fields.is_empty()));
        }
    }
    let (mut count, mut deepest) = (0usize, 0usize);
    let mut stack = vec![(value, 0usize)];
    while let Some((v, depth)) = stack.pop() {
        deepest = deepest.max(depth);
        if depth > MAX_VALUE_DEPTH {
            break;
        }
        match v {
            // A list of plain values (a sweep's column): its items count,
            // one level below, with nothing in them to walk.
            Value::List(items) if !items.iter().any(is_container) => {
                count = count.saturating_add(items.len());
                if !items.is_empty() {
                    deepest = deepest.max(depth + 1);
                }
            }
            Value::List(items) => {
                count = count.saturating_add(items.len());
                stack.extend(items.iter().map(|i| (i, depth + 1)));
            }
            Value::Record(r) => stack.extend(r.fields.iter().map(|(_, f)| (f, depth + 1))),
            _ => {}
        }
    }
    (count, deepest)
}

#[cfg(test)]
mod tests {
    use super::{is_flat_record, Ctx, Mode};
    use crate::diag::{Diagnostic, Span};
    use crate::eval::{Limits, Sheet, Sources};
    use crate::units::Quantity;
    use crate::value::{Record, Value};

    fn number(x: f64) -> Value {
        Value::Quantity(Quantity::number(x), None)
    }

    /// Items and depth by recursion, item by item (an independent count of
    /// what `list_items` counts without recursion): the items of every list
    /// and the depth of the deepest value, the outer one at 0.
    fn counted(value: &Value, depth: usize) -> (usize, usize) {
        let inner: Vec<&Value> = match value {
            Value::List(items) => items.iter().collect(),
            Value::Record(r) => r.fields.iter().map(|(_, f)| f).collect(),
            _ => Vec::new(),
        };
        let own = if let Value::List(items) = value {
            items.len()
        } else {
            0
        };
        inner
            .into_iter()
            .map(|v| counted(v, depth + 1))
            .fold((own, depth), |(n, d), (m, e)| (n + m, d.max(e)))
    }

    /// Items and depth as counted item by item, with lists of plain values
    /// counted without their walk: alone, empty, mixed with nested lists and
    /// records, inside records, and nested past the depth limit (where only
    /// the refusal matters: both deeper than the limit).
    #[test]
    fn plain_lists_count_as_the_walk_does() {
        let plain = |n: usize| Value::List((0..n).map(|i| number(i as f64)).collect());
        let record = |fields: Vec<(&'static str, Value)>| {
            let mut r = Record::new("r");
            for (name, v) in fields {
                r = r.with(name, v);
            }
            Value::Record(r)
        };
        let mut deep = plain(3);
        for _ in 0..40 {
            deep = Value::List(vec![deep, number(1.0)]);
        }
        let cases = [
            plain(0),
            plain(5),
            Value::List(vec![
                plain(3),
                number(1.0),
                plain(0),
                Value::Str("x".into()),
            ]),
            record(vec![("a", plain(4)), ("b", number(2.0)), ("c", plain(0))]),
            record(vec![
                ("t", record(vec![("l", plain(2))])),
                ("m", Value::List(vec![plain(2), plain(3)])),
            ]),
            number(3.0),
        ];
        for value in &cases {
            assert_eq!(super::list_items(value), counted(value, 0), "{value:?}");
        }
        let (ours, theirs) = (super::list_items(&deep).1, counted(&deep, 0).1);
        assert!(ours > super::MAX_VALUE_DEPTH && theirs > super::MAX_VALUE_DEPTH);
    }

    /// Where a plan counts a flat record's items without the walk, the walk
    /// counts the same: none, and no refusal.
    #[test]
    fn a_flat_record_costs_what_list_cost_counts() {
        let (mut sheet, mut sources, limits) =
            (Sheet::default(), Sources::default(), Limits::default());
        let ctx = Ctx::new(&mut sheet, &mut sources, &limits, Mode::Run);
        let flat = Record::new("air")
            .with("T", number(1.0))
            .with("s", Value::Str("x".into()));
        let empty = Record::new("nothing");
        let list = Record::new("r").with("xs", Value::List(vec![number(1.0), number(2.0)]));
        let nested = Record::new("r").with("inner", Value::Record(flat.clone()));
        for (r, flat_expected) in [(flat, true), (empty, true), (list, false), (nested, false)] {
            assert_eq!(is_flat_record(&r), flat_expected);
            let cost = ctx.list_cost(&Value::Record(r), Span::default()).ok();
            if flat_expected {
                assert_eq!(cost, Some(0));
            }
        }
    }

    /// A context restarted after a plan's point is a new one: nothing the
    /// point left (steps, warnings, errors) reaches the next, and the rest
    /// is as new.
    #[test]
    fn a_restarted_context_is_as_new() {
        let (mut sheet, mut sources, limits) =
            (Sheet::default(), Sources::default(), Limits::default());
        let mut ctx = Ctx::new(&mut sheet, &mut sources, &limits, Mode::Run);
        ctx.ops = 17;
        ctx.warnings.push(Diagnostic::warning(Span::default(), "w"));
        ctx.errors.push(Diagnostic::error(Span::default(), "e"));
        ctx.restart_after_plan();
        assert_eq!(ctx.ops, 0);
        assert!(ctx.warnings.is_empty() && ctx.errors.is_empty());
        assert!(ctx.frame.is_none() && ctx.active.is_empty() && ctx.failed.is_empty());
        assert!(ctx.load_stack.is_empty());
        assert_eq!((ctx.depth, ctx.nesting), (0, 0));
        assert_eq!(ctx.checking.blind, 0);
        assert_eq!(ctx.checking.recursions, 0);
        assert!(ctx.checking.calls.is_empty());
        assert!(ctx.wanted.is_none());
        assert_eq!(ctx.mode, Mode::Run);
    }
}
