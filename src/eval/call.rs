//! Calls: user functions, built-ins from the library registry, and `load`.

use std::panic::{catch_unwind, AssertUnwindSafe};

use super::ctx::{Ctx, Flow};
use super::{DefKind, Mode};
use crate::diag::{Diagnostic, Span};
use crate::library::{self, Arg, Args, Builtin};
use crate::syntax::{CallArg, Ident};
use crate::value::Value;

impl Ctx<'_> {
    /// Evaluate `callee(args)`.
    pub fn call(&mut self, callee: &Ident, args: &[CallArg], span: Span) -> Flow<Value> {
        // Meant for this call alone, not for calls in its arguments.
        let wanted = self.wanted.take();
        let name = callee.name.as_str();
        match self.sheet.defs.get(name).map(|d| d.kind) {
            Some(DefKind::Function) => return self.call_user(callee, args, span),
            Some(_) if name != "load" && library::find(name).is_none() => {
                let msg = format!("`{name}` is a value, not a function");
                return Err(Diagnostic::error(callee.span, msg).into());
            }
            _ => {}
        }
        if name == "load" {
            return self.load(args, span);
        }
        if super::whatif::is_form(name) {
            return self.whatif(callee, args, span);
        }
        match library::find(name) {
            Some(b) => self.call_builtin(b, args, span, wanted),
            None => Err(self.unknown_function(callee).into()),
        }
    }

    fn unknown_function(&self, callee: &Ident) -> Diagnostic {
        let mut names: Vec<&str> = library::registry().iter().map(|b| b.name).collect();
        names.extend(
            self.sheet
                .order
                .iter()
                .filter(|n| self.sheet.defs[*n].kind == DefKind::Function)
                .map(String::as_str),
        );
        names.push("load");
        let mut d = Diagnostic::error(callee.span, format!("unknown function `{}`", callee.name));
        if let Some(best) = super::suggest(&callee.name, &names) {
            d = d.with_hint(format!("did you mean `{best}`?"));
        }
        d.with_hint("`siccant help` lists the built-in functions")
    }

    /// Evaluate call-site arguments in order.
    pub fn arguments(&mut self, args: &[CallArg]) -> Flow<Vec<Arg>> {
        let mut out = Vec::with_capacity(args.len());
        for a in args {
            let value = self.expr(&a.value)?;
            out.push(Arg {
                name: a.name.as_ref().map(|n| n.name.clone()),
                value,
                span: a.span,
            });
        }
        Ok(out)
    }

    fn call_builtin(
        &mut self,
        b: &'static Builtin,
        args: &[CallArg],
        span: Span,
        wanted: Option<std::sync::Arc<[String]>>,
    ) -> Flow<Value> {
        check_arg_names(b, args)?;
        if self.mode == Mode::CheckOnly || self.checking.blind > 0 {
            // Checking keeps the argument names: shapes are matched by name.
            let values = self.arguments(args)?;
            if self.check_call(b, &values) {
                return self.builtin_shape(b, values, span);
            }
            let mut bound = Args::bind(b, span, values)?;
            return self.run_builtin(b, &mut bound, span);
        }
        // Every argument is evaluated before a binding error is reported
        // (an error in a later argument comes first).
        let mut bound = Args::unbound(b, span);
        let mut unbindable = None;
        for a in args {
            let slot = a.name.as_ref().and_then(|n| b.param_index(&n.name));
            let value = self.expr(&a.value)?;
            let arg = Arg {
                name: None,
                value,
                span: a.span,
            };
            if unbindable.is_none() {
                unbindable = bound.bind_one(slot, arg).err();
            }
        }
        if let Some(d) = unbindable {
            return Err(d.into());
        }
        bound.wanted = wanted;
        self.run_builtin(b, &mut bound, span)
    }

    /// Run a built-in on bound arguments, catching panics as internal errors.
    /// The arguments' folder is the sheet's, unless they have one already
    /// (arguments reused from call to call within one study).
    #[inline]
    pub(super) fn run_builtin(
        &mut self,
        b: &'static Builtin,
        bound: &mut Args,
        span: Span,
    ) -> Flow<Value> {
        if bound.dir.is_none() {
            bound.dir = Some(self.sheet.shared_dir());
        }
        let result = catch_unwind(AssertUnwindSafe(|| (b.func)(bound)));
        if !bound.warnings.is_empty() {
            self.warnings.append(&mut bound.warnings);
        }
        outcome(result, b, span)
    }

    fn call_user(&mut self, callee: &Ident, args: &[CallArg], span: Span) -> Flow<Value> {
        let (params, body) = match self.sheet.defs.get(&callee.name) {
            Some(d) => (d.params.clone(), d.expr.clone()),
            None => return Err(self.unknown_function(callee).into()),
        };
        if self.depth >= self.limits.max_call_depth {
            let msg = format!(
                "calls nested deeper than {} levels",
                self.limits.max_call_depth
            );
            return Err(Diagnostic::error(span, msg)
                .with_hint("does the function call itself without end?")
                .into());
        }
        let values = self.arguments(args)?;
        let frame = bind_params(&callee.name, &params, values, span)?;
        let entered = self.enter_user(&callee.name)?;
        self.depth += 1;
        let saved = self.frame.replace(frame);
        let result = self.expr(&body);
        self.frame = saved;
        self.depth -= 1;
        self.leave_user(entered);
        result
    }
}

/// Report a misspelt argument name before evaluating anything.
fn check_arg_names(b: &Builtin, args: &[CallArg]) -> Result<(), Diagnostic> {
    for a in args {
        if let Some(n) = &a.name {
            if b.param_index(&n.name).is_none() {
                return Err(misspelt_arg(b, n));
            }
        }
    }
    Ok(())
}

fn misspelt_arg(b: &Builtin, n: &Ident) -> Diagnostic {
    let names: Vec<&str> = b.params.iter().map(|p| p.name).collect();
    let mut d = Diagnostic::error(
        n.span,
        format!("`{}` has no argument named `{}`", b.name, n.name),
    );
    if let Some(best) = super::suggest(&n.name, &names) {
        d = d.with_hint(format!("did you mean `{best}`?"));
    }
    d.with_hint(format!("arguments: {}", names.join(", ")))
}

/// What a built-in's run gave, as the evaluator's result: its value, unless
/// it is a quantity that is not finite (an error at the call, naming the
/// built-in); its error; or, if it panicked, an internal error. (The value
/// is matched where it lies, not moved into a check first.)
#[inline(always)]
fn outcome(
    result: std::thread::Result<Result<Value, Diagnostic>>,
    b: &Builtin,
    span: Span,
) -> Flow<Value> {
    match result {
        Ok(Ok(Value::Quantity(q, _))) if !q.si.is_finite() => Err(not_finite(b, span)),
        Ok(Ok(v)) => Ok(v),
        Ok(Err(d)) => Err(d.into()),
        Err(_) => Err(
            Diagnostic::error(span, format!("internal error in built-in `{}`", b.name))
                .with_hint("this is a bug in siccant; please report it with the worksheet")
                .into(),
        ),
    }
}

#[cold]
fn not_finite(b: &Builtin, span: Span) -> super::Stop {
    let msg = format!("`{}` gave a result that is not a finite number", b.name);
    Diagnostic::error(span, msg).into()
}

/// Bind arguments to a user function's parameters: positional, then by name.
fn bind_params(
    name: &str,
    params: &[String],
    args: Vec<Arg>,
    span: Span,
) -> Result<super::FastMap<String, Value>, Diagnostic> {
    let mut frame = super::FastMap::default();
    let mut next = 0;
    for a in args {
        let p = match &a.name {
            Some(n) if params.contains(n) => n.clone(),
            Some(n) => {
                let names: Vec<&str> = params.iter().map(String::as_str).collect();
                let mut d =
                    Diagnostic::error(a.span, format!("`{name}` has no parameter named `{n}`"));
                if let Some(best) = super::suggest(n, &names) {
                    d = d.with_hint(format!("did you mean `{best}`?"));
                }
                return Err(d.with_hint(format!("parameters: {}", names.join(", "))));
            }
            None => {
                let p = params.get(next).cloned().ok_or_else(|| {
                    Diagnostic::error(
                        a.span,
                        format!(
                            "`{name}` takes {} argument{}",
                            params.len(),
                            if params.len() == 1 { "" } else { "s" }
                        ),
                    )
                })?;
                next += 1;
                p
            }
        };
        if frame.insert(p.clone(), a.value).is_some() {
            return Err(Diagnostic::error(
                a.span,
                format!("parameter `{p}` of `{name}` is given twice"),
            ));
        }
    }
    if let Some(missing) = params.iter().find(|p| !frame.contains_key(*p)) {
        let msg = format!("`{name}` needs the argument `{missing}`");
        return Err(Diagnostic::error(span, msg)
            .with_hint(format!("call it as {name}({})", params.join(", "))));
    }
    Ok(frame)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::{Dim, Kind, Quantity};

    /// A built-in's quantity result that is not finite is an error at the
    /// call naming the built-in; any other value passes through unchanged,
    /// as does its error; a panic is an internal error.
    #[test]
    fn a_result_that_is_not_finite_is_an_error_at_the_call() {
        let b = library::find("air").expect("air");
        let span = Span {
            file: 0,
            start: 4,
            end: 9,
        };
        let q = |x: f64| Value::Quantity(Quantity::new(x, Dim::NONE, Kind::Plain), None);
        for x in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            match outcome(Ok(Ok(q(x))), b, span) {
                Err(super::super::Stop::Error(d)) => {
                    assert_eq!(d.message, "`air` gave a result that is not a finite number");
                    assert_eq!(d.span, span);
                }
                other => panic!("{x}: {other:?}"),
            }
        }
        for v in [q(-0.0), q(1e308), Value::Bool(true), Value::Str("x".into())] {
            let shown = format!("{v:?}");
            match outcome(Ok(Ok(v)), b, span) {
                Ok(back) => assert_eq!(format!("{back:?}"), shown),
                Err(_) => panic!("{shown} refused"),
            }
        }
        // The built-in's own error passes through; a panic is an internal
        // error at the call.
        let d = Diagnostic::error(span, "bad");
        match outcome(Ok(Err(d)), b, span) {
            Err(super::super::Stop::Error(d)) => assert_eq!(d.message, "bad"),
            other => panic!("{other:?}"),
        }
        match outcome(Err(Box::new("boom")), b, span) {
            Err(super::super::Stop::Error(d)) => {
                assert_eq!(d.message, "internal error in built-in `air`");
                assert_eq!(d.span, span);
            }
            other => panic!("{other:?}"),
        }
    }
}
