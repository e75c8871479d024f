//! Built-in functions: one file per family, one registry feeding `help`,
//! completion, Jupyter inspect and the generated reference in docs/.
//!
//! A built-in receives spanned arguments, checks their dimensions here at the
//! boundary, converts them to uom quantities and calls typed engine code.

pub mod air;
pub mod chart;
pub mod data;
pub mod dryers;
pub mod fit;
pub mod kinetics;
pub mod math;
pub mod plot;
pub mod shape;
pub mod sorption;
pub mod transfer;
pub mod whatif;

use crate::diag::{Diagnostic, Span};
use crate::units::{describe_dim, Dim, Kind, Quantity, Unit};
use crate::value::{Record, Value};

/// What a parameter accepts, for docs, completion and checking.
#[derive(Clone, Copy, Debug)]
pub struct Param {
    pub name: &'static str,
    /// Unit text for docs, e.g. `degC`, `kg/(m^2*h)`, `-`, `air`.
    pub unit: &'static str,
    /// Default written as the user would write it, or `None` when required.
    pub default: Option<&'static str>,
    pub doc: &'static str,
}

/// The entry of [`Args::wanted`] that asks for a record's payload: not a
/// field name (it cannot be written as one), so a built-in looking fields up
/// by name never finds it.
pub const PAYLOAD: &str = "#payload";

/// A parameter with an optional default (for the `params` lists of family files).
pub const fn p(
    name: &'static str,
    unit: &'static str,
    default: Option<&'static str>,
    doc: &'static str,
) -> Param {
    Param {
        name,
        unit,
        default,
        doc,
    }
}

/// A required parameter (for the `params` lists of family files).
pub const fn req(name: &'static str, unit: &'static str, doc: &'static str) -> Param {
    p(name, unit, None, doc)
}

/// An optional parameter with its default as the user would write it.
pub const fn opt(
    name: &'static str,
    unit: &'static str,
    default: &'static str,
    doc: &'static str,
) -> Param {
    p(name, unit, Some(default), doc)
}

/// A built-in function with its paper trail.
#[derive(Clone, Copy, Debug)]
pub struct Builtin {
    pub name: &'static str,
    /// Family, e.g. `air`, `transfer`, `sorption`; one file in `library/` each.
    pub family: &'static str,
    pub params: &'static [Param],
    /// Result description with unit, e.g. `W/(m^2*K)` or `air state`.
    pub returns: &'static str,
    /// One-paragraph doc shown by `help`, the REPL and Jupyter inspect.
    pub doc: &'static str,
    /// The published method it implements.
    pub method: &'static str,
    /// The published source (book, paper, standard).
    pub source: &'static str,
    /// Validity range in words.
    pub validity: &'static str,
    /// A short example call.
    pub example: &'static str,
    pub func: fn(&mut Args) -> Result<Value, Diagnostic>,
}

impl Builtin {
    /// The index of parameter `name`, if the built-in has one: how every
    /// caller binds a named argument.
    #[inline]
    pub fn param_index(&self, name: &str) -> Option<usize> {
        self.params.iter().position(|p| same_name(p.name, name))
    }

    /// Does parameter `index` read nothing of a record given to it but its
    /// engine state (the payload, e.g. the `AirState` of an `air` record): no
    /// field, and the record neither kept nor returned? Declared per
    /// parameter by the family files ([`transfer::PAYLOAD_ONLY`],
    /// [`dryers::PAYLOAD_ONLY`]) after
    /// checking every use of the argument. A what-if study's field analysis
    /// then counts passing a record there as reading no field but needing
    /// the payload ([`PAYLOAD`]).
    pub fn reads_only_payload(&self, index: usize) -> bool {
        const FAMILIES: &[&[(&str, &str)]] = &[transfer::PAYLOAD_ONLY, dryers::PAYLOAD_ONLY];
        self.params.get(index).is_some_and(|p| {
            FAMILIES
                .iter()
                .flat_map(|f| f.iter())
                .any(|&(b, n)| b == self.name && n == p.name)
        })
    }
}

/// One argument as written at the call site.
#[derive(Clone, Debug)]
pub struct Arg {
    pub name: Option<String>,
    pub value: Value,
    pub span: Span,
}

/// An argument bound to a parameter: its value and its span, with no room
/// for a name (what a study's point writes for every argument).
#[derive(Clone, Debug)]
struct Bound {
    value: Value,
    span: Span,
}

impl Bound {
    /// The argument as [`Args::take`] gives it (without a name: it is bound).
    #[inline]
    fn into_arg(self) -> Arg {
        Arg {
            name: None,
            value: self.value,
            span: self.span,
        }
    }
}

/// The arguments of one call, bound to the built-in's parameters.
///
/// Positional arguments bind to parameters in declaration order; named ones by
/// name. Each accessor consumes the argument, blames its span on error, and
/// `finish` reports anything left over.
pub struct Args {
    pub builtin: &'static Builtin,
    pub call_span: Span,
    /// The arguments by parameter, without their names (bound, they need none).
    bound: Vec<Option<Bound>>,
    /// The parameter the next positional argument binds to.
    next_positional: usize,
    /// Warnings attached to the call (validity ranges and the like).
    pub warnings: Vec<Diagnostic>,
    /// Folder of the calling worksheet, for relative file paths (None: current folder).
    pub dir: Option<std::sync::Arc<std::path::Path>>,
    /// The fields of the resulting record that the caller will read, when it
    /// knows them all (a what-if study's points); `None`: every field. A
    /// built-in may leave out the fields not named here (see [`Args::wants`]),
    /// and its payload unless [`PAYLOAD`] is among them (the record goes to a
    /// parameter that reads only the payload: [`Builtin::reads_only_payload`]).
    pub wanted: Option<std::sync::Arc<[String]>>,
    /// [`Args::wanted_mask`]'s answer, with the list it was worked out for.
    mask_memo: Option<(Option<std::sync::Arc<[String]>>, u64)>,
    /// A record this call returned before, no longer needed, whose storage
    /// the built-in may reuse ([`Args::take_spare`]).
    spare: Option<Record>,
}

impl Args {
    /// Bind call-site arguments to `builtin`'s parameters.
    pub fn bind(
        builtin: &'static Builtin,
        call_span: Span,
        args: Vec<Arg>,
    ) -> Result<Args, Diagnostic> {
        let mut slots = Vec::with_capacity(args.len());
        for arg in args {
            let slot = match &arg.name {
                Some(name) => Some(
                    builtin
                        .param_index(name)
                        .ok_or_else(|| unknown_argument(builtin, name, arg.span))?,
                ),
                None => None,
            };
            slots.push((slot, arg));
        }
        Args::bind_slots(builtin, call_span, slots)
    }

    /// Bind arguments whose parameter index is already known (`None`:
    /// positional, in declaration order). The evaluator binds this way, so
    /// names are neither compared again nor copied (its `Arg`s carry no name).
    pub fn bind_slots(
        builtin: &'static Builtin,
        call_span: Span,
        args: Vec<(Option<usize>, Arg)>,
    ) -> Result<Args, Diagnostic> {
        let mut bound = Args::unbound(builtin, call_span);
        for (slot, arg) in args {
            bound.bind_one(slot, arg)?;
        }
        Ok(bound)
    }

    /// No arguments bound yet: bind them one at a time with [`Args::bind_one`]
    /// (as [`Args::bind_slots`] does, without a list of them first).
    pub fn unbound(builtin: &'static Builtin, call_span: Span) -> Args {
        Args {
            builtin,
            call_span,
            bound: vec![None; builtin.params.len()],
            next_positional: 0,
            warnings: Vec::new(),
            dir: None,
            wanted: None,
            mask_memo: None,
            spare: None,
        }
    }

    /// Put `arg` at parameter `index`, a place worked out before by
    /// [`Args::bind_one`]. A what-if study's plan binds each call once and
    /// then, at every point, clears ([`Args::clear`]) and fills the same
    /// `Args`.
    pub fn place(&mut self, index: usize, arg: Arg) {
        self.place_value(index, arg.value, arg.span);
    }

    /// [`Args::place`] for the value and span of an argument (its name is
    /// not kept: it is bound), built in its place.
    #[inline]
    pub fn place_value(&mut self, index: usize, value: Value, span: Span) {
        match self.bound.get_mut(index) {
            // (After `clear`, as a study's plan fills them: nothing to drop.)
            Some(place @ None) => *place = Some(Bound { value, span }),
            Some(Some(bound)) => *bound = Bound { value, span },
            None => {}
        }
    }

    /// [`Args::place_value`] for a quantity, written straight into its
    /// place (a study's plan passes a varied input this way at every point).
    #[inline(always)]
    pub fn place_quantity(
        &mut self,
        index: usize,
        q: crate::units::Quantity,
        unit: Option<crate::units::Unit>,
        span: Span,
    ) {
        if let Some(place) = self.bound.get_mut(index) {
            *place = Some(Bound {
                value: Value::Quantity(q, unit),
                span,
            });
        }
    }

    /// Keep `record`, a value this call returned before and nobody reads
    /// any more, for the next call to build its record in
    /// ([`Args::take_spare`]); replaces (drops) a spare not taken. A
    /// what-if study's plan hands each point's record back at the next
    /// point.
    pub fn keep_spare(&mut self, record: Record) {
        self.spare = Some(record);
    }

    /// The record kept by [`Args::keep_spare`], if any: storage for
    /// [`Record::reusing`], which reuses only what nothing else holds, so
    /// the record built is the same either way.
    pub fn take_spare(&mut self) -> Option<Record> {
        self.spare.take()
    }

    /// Drop the arguments and warnings a call left, keeping the room (and
    /// `wanted`, `dir`, a spare record) for the next call of the same
    /// built-in at the same place.
    pub fn clear(&mut self) {
        // (A built-in usually takes every argument: most are empty already.)
        for a in &mut self.bound {
            if a.is_some() {
                *a = None;
            }
        }
        self.warnings.clear();
    }

    /// [`Args::clear`] for arguments that were only ever placed at
    /// parameters `params` ([`Args::place_value`]; a study's plan places
    /// the same ones at every point): the others are empty already (a
    /// built-in only takes arguments out), so only these are looked at.
    #[inline]
    pub fn clear_placed(&mut self, params: impl Iterator<Item = usize>) {
        for i in params {
            if let Some(a) = self.bound.get_mut(i) {
                if a.is_some() {
                    *a = None;
                }
            }
        }
        debug_assert!(self.bound.iter().all(Option::is_none));
        self.warnings.clear();
    }

    /// Bind one argument to parameter `slot` (`None`: the next positional),
    /// giving the index of the parameter it bound to.
    pub fn bind_one(&mut self, slot: Option<usize>, arg: Arg) -> Result<usize, Diagnostic> {
        let builtin = self.builtin;
        let index = match slot {
            Some(i) if i < builtin.params.len() => i,
            Some(_) => return Err(too_many(builtin, arg.span)),
            None => {
                let i = self.next_positional;
                self.next_positional += 1;
                if i >= builtin.params.len() {
                    return Err(too_many(builtin, arg.span));
                }
                i
            }
        };
        if self.bound[index].is_some() {
            return Err(Diagnostic::error(
                arg.span,
                format!(
                    "argument `{}` of `{}` is given twice",
                    builtin.params[index].name, builtin.name
                ),
            ));
        }
        self.bound[index] = Some(Bound {
            value: arg.value,
            span: arg.span,
        });
        Ok(index)
    }

    /// Will the caller read field `name` of the record this call returns?
    /// True unless the caller named the fields it reads and `name` is not one.
    #[inline]
    pub fn wants(&self, name: &str) -> bool {
        self.wanted
            .as_ref()
            .is_none_or(|w| w.iter().any(|f| f == name))
    }

    /// `mask(wanted)` for this call's [`Args::wanted`], worked out once per
    /// list: a what-if study's plan reuses one `Args` per call from point to
    /// point, and a built-in that turns the wanted names into bits (one per
    /// field) need not compare the names again at every point. A built-in
    /// passes the same `mask` at every call (an `Args` serves one built-in).
    pub fn wanted_mask(&mut self, mask: fn(Option<&[String]>) -> u64) -> u64 {
        if let Some((list, bits)) = &self.mask_memo {
            let same = match (list, &self.wanted) {
                (None, None) => true,
                (Some(a), Some(b)) => std::sync::Arc::ptr_eq(a, b),
                _ => false,
            };
            if same {
                return *bits;
            }
        }
        // (The memo holds the list, so its address names it while kept.)
        let bits = mask(self.wanted.as_deref());
        self.mask_memo = Some((self.wanted.clone(), bits));
        bits
    }

    /// Will the caller read the payload of the record this call returns
    /// (through a parameter that reads only that:
    /// [`Builtin::reads_only_payload`])? True unless the caller
    /// named what it reads and [`PAYLOAD`] is not among it.
    #[inline]
    pub fn wants_payload(&self) -> bool {
        self.wants(PAYLOAD)
    }

    /// The position of parameter `name` (a built-in's own parameter: an
    /// undeclared name is a bug, reported as one). The accessors named
    /// `..._at` take this position; a built-in read often finds it at
    /// compile time instead ([`param_at`]), and the accessors by name look
    /// it up and call them.
    pub fn position(&self, name: &str) -> usize {
        self.builtin.param_index(name).unwrap_or_else(|| {
            panic!(
                "built-in `{}` reads undeclared parameter `{name}`",
                self.builtin.name
            )
        })
    }

    /// The name of the parameter at `index`, for messages.
    #[inline]
    pub fn name_at(&self, index: usize) -> &'static str {
        self.builtin.params[index].name
    }

    /// Take an argument if it was given.
    pub fn take(&mut self, name: &str) -> Option<Arg> {
        self.take_at(self.position(name))
    }

    /// [`Args::take`] for the parameter at `index`.
    #[inline]
    pub fn take_at(&mut self, index: usize) -> Option<Arg> {
        self.bound[index].take().map(Bound::into_arg)
    }

    /// The SI magnitude of the argument at parameter `index` when it is a
    /// quantity of dimension `dim` that `kind` accepts
    /// ([`Quantity::expect_kind`]), taken (dropped in its place, not moved
    /// out). `None`, with nothing taken, for anything else: the caller's
    /// general path then takes it by name and reports what is wrong, so
    /// this is a shortcut for the common case with the same outcome.
    #[inline]
    pub fn take_si_at(&mut self, index: usize, dim: Dim, kind: Kind) -> Option<f64> {
        self.take_si_if(index, dim, |q| q.fits_kind(dim, kind))
    }

    /// The SI magnitude of the argument at parameter `index` when it is a
    /// quantity of dimension `dim` that `accept` accepts, taken (dropped in
    /// its place, not moved out). `None`, with nothing taken, for anything
    /// else. For a built-in's common case: `accept` passes exactly what its
    /// general path (taking the argument, [`Args::opt_spanned_at`], and its
    /// own checks) would let through unchanged, so that path, run when this
    /// gives `None`, gives the same value or reports what is wrong.
    #[inline]
    pub fn take_si_if(
        &mut self,
        index: usize,
        dim: Dim,
        accept: impl FnOnce(&Quantity) -> bool,
    ) -> Option<f64> {
        let slot = self.bound.get_mut(index)?;
        let si = match slot {
            Some(Bound {
                value: Value::Quantity(q, _),
                ..
            }) if q.dim == dim && accept(q) => q.si,
            _ => return None,
        };
        drop_quantity(slot.take());
        Some(si)
    }

    /// Was this argument given?
    pub fn has(&self, name: &str) -> bool {
        self.has_at(self.position(name))
    }

    /// [`Args::has`] for the parameter at `index`.
    #[inline]
    pub fn has_at(&self, index: usize) -> bool {
        self.bound[index].is_some()
    }

    /// The parameters given at the call, in declaration order, with the
    /// spans of their arguments.
    pub fn given(&self) -> impl Iterator<Item = (&'static str, Span)> + '_ {
        self.builtin
            .params
            .iter()
            .zip(&self.bound)
            .filter_map(|(p, a)| a.as_ref().map(|a| (p.name, a.span)))
    }

    /// The span of the argument at parameter `index`, if one was given there
    /// (and not yet taken).
    #[inline]
    pub fn span_at(&self, index: usize) -> Option<Span> {
        self.bound.get(index)?.as_ref().map(|a| a.span)
    }

    /// The span of an argument if given, else the call's span.
    pub fn span_of(&self, name: &str) -> Span {
        self.span_of_at(self.position(name))
    }

    /// [`Args::span_of`] for the parameter at `index`.
    #[inline]
    pub fn span_of_at(&self, index: usize) -> Span {
        self.bound[index]
            .as_ref()
            .map_or(self.call_span, |a| a.span)
    }

    /// Take a required argument.
    pub fn required(&mut self, name: &str) -> Result<Arg, Diagnostic> {
        self.required_at(self.position(name))
    }

    /// [`Args::required`] for the parameter at `index`.
    pub fn required_at(&mut self, index: usize) -> Result<Arg, Diagnostic> {
        self.take_at(index)
            .ok_or_else(|| self.missing(self.name_at(index)))
    }

    /// The error for a required argument `name` not given.
    #[cold]
    fn missing(&self, name: &str) -> Diagnostic {
        Diagnostic::error(
            self.call_span,
            format!("`{}` needs the argument `{name}`", self.builtin.name),
        )
        .with_hint(format!("call it as {}", self.builtin.example))
    }

    /// A required quantity of dimension `dim`.
    pub fn quantity(&mut self, name: &str, dim: Dim) -> Result<Quantity, Diagnostic> {
        self.required_spanned(name, dim).map(|(q, _)| q)
    }

    /// An optional quantity of dimension `dim`.
    pub fn opt_quantity(&mut self, name: &str, dim: Dim) -> Result<Option<Quantity>, Diagnostic> {
        Ok(self.opt_spanned(name, dim)?.map(|(q, _)| q))
    }

    /// A required quantity of dimension `dim`, with the span of its argument
    /// (for the caller's own checks of its value).
    pub fn required_spanned(
        &mut self,
        name: &str,
        dim: Dim,
    ) -> Result<(Quantity, Span), Diagnostic> {
        self.required_spanned_at(self.position(name), dim)
    }

    /// [`Args::required_spanned`] for the parameter at `index`.
    #[inline]
    pub fn required_spanned_at(
        &mut self,
        index: usize,
        dim: Dim,
    ) -> Result<(Quantity, Span), Diagnostic> {
        match self.opt_spanned_at(index, dim)? {
            Some(q) => Ok(q),
            None => Err(self.missing(self.name_at(index))),
        }
    }

    /// An optional quantity of dimension `dim`, with the span of its
    /// argument. A quantity of that dimension is taken in place (dropped
    /// where it is, not moved out); anything else is taken and reported.
    pub fn opt_spanned(
        &mut self,
        name: &str,
        dim: Dim,
    ) -> Result<Option<(Quantity, Span)>, Diagnostic> {
        self.opt_spanned_at(self.position(name), dim)
    }

    /// [`Args::opt_spanned`] for the parameter at `index`.
    #[inline]
    pub fn opt_spanned_at(
        &mut self,
        index: usize,
        dim: Dim,
    ) -> Result<Option<(Quantity, Span)>, Diagnostic> {
        if let Some(Bound {
            value: Value::Quantity(q, _),
            span,
        }) = &self.bound[index]
        {
            if q.dim == dim {
                let found = (*q, *span);
                self.bound[index] = None;
                return Ok(Some(found));
            }
        }
        match self.take_at(index) {
            Some(arg) => expect_quantity(self.builtin, self.name_at(index), &arg, dim)
                .map(|q| Some((q, arg.span))),
            None => Ok(None),
        }
    }

    /// What `read` gives of the payload of type `T` of the record of type
    /// `type_name` given for `name`, with the argument taken (dropped in its
    /// place, not moved out). `None`,
    /// with nothing taken, for anything else: the caller's general path
    /// then takes the argument and reads it or reports what is wrong.
    #[inline]
    pub fn take_payload<T: 'static, U>(
        &mut self,
        name: &str,
        type_name: &str,
        read: impl FnOnce(&T) -> U,
    ) -> Option<U> {
        self.take_payload_at(self.position(name), type_name, read)
    }

    /// [`Args::take_payload`] for the parameter at `index`.
    #[inline]
    pub fn take_payload_at<T: 'static, U>(
        &mut self,
        index: usize,
        type_name: &str,
        read: impl FnOnce(&T) -> U,
    ) -> Option<U> {
        let found = match &self.bound[index] {
            Some(Bound {
                value: Value::Record(r),
                ..
            }) if r.type_name == type_name => read(r.payload::<T>()?),
            _ => return None,
        };
        self.bound[index] = None;
        Some(found)
    }

    /// A required record of the given type (e.g. `air`).
    pub fn record(&mut self, name: &str, type_name: &str) -> Result<Record, Diagnostic> {
        self.record_at(self.position(name), type_name)
    }

    /// [`Args::record`] for the parameter at `index`.
    pub fn record_at(&mut self, index: usize, type_name: &str) -> Result<Record, Diagnostic> {
        let name = self.name_at(index);
        let arg = self.required_at(index)?;
        match arg.value {
            Value::Record(r) if r.type_name == type_name => Ok(r),
            other => Err(Diagnostic::error(
                arg.span,
                format!(
                    "argument `{name}` of `{}` must be {type_name}, found {}",
                    self.builtin.name,
                    type_word(&other)
                ),
            )),
        }
    }

    /// Add a warning about this call (for example outside a validity range).
    pub fn warn(&mut self, message: impl Into<String>) {
        self.warnings
            .push(Diagnostic::warning(self.call_span, message));
    }

    /// An error blaming one argument.
    pub fn error_at(&self, name: &str, message: impl Into<String>) -> Diagnostic {
        Diagnostic::error(self.span_of(name), message)
    }

    /// Report arguments that were given but never read.
    pub fn finish(&self) -> Result<(), Diagnostic> {
        match self.bound.iter().flatten().next() {
            Some(arg) => Err(Diagnostic::error(
                arg.span,
                format!("`{}` does not use this argument here", self.builtin.name),
            )),
            None => Ok(()),
        }
    }
}

/// Drop `arg`, a quantity taken from its slot, without calling the general
/// drop of a [`Value`] (a call a study's point would make for each argument
/// read): a quantity owns nothing to free (its display unit is a reference
/// to data kept for the whole run), so it is forgotten. Anything else is
/// dropped as usual.
#[inline(always)]
fn drop_quantity(arg: Option<Bound>) {
    // What makes forgetting it free nothing: a quantity and its display unit
    // need no drop (checked when this is compiled).
    const _: () = assert!(!std::mem::needs_drop::<(Quantity, Option<Unit>)>());
    if let Some(Bound { value, .. }) = arg {
        match value {
            Value::Quantity(..) => std::mem::forget(value),
            other => drop(other),
        }
    }
}

/// The position of parameter `name` in `params`, for a built-in to find its
/// arguments by position ([`Args::opt_spanned_at`] and the like): meant for
/// a `const`, worked out at compile time, where a name not in the list is
/// an error.
pub const fn param_at(params: &[Param], name: &str) -> usize {
    let mut i = 0;
    while i < params.len() {
        if const_eq(params[i].name, name) {
            return i;
        }
        i += 1;
    }
    panic!("not a parameter in the list")
}

/// `a == b`, at compile time.
pub const fn const_eq(a: &str, b: &str) -> bool {
    let (a, b) = (a.as_bytes(), b.as_bytes());
    if a.len() != b.len() {
        return false;
    }
    let mut i = 0;
    while i < a.len() {
        if a[i] != b[i] {
            return false;
        }
        i += 1;
    }
    true
}

/// `a == b` for the short names of parameters, compared in place (a call to
/// `memcmp` costs more than the comparison; built-ins look names up often).
#[inline]
fn same_name(a: &str, b: &str) -> bool {
    a.len() == b.len() && a.bytes().zip(b.bytes()).all(|(x, y)| x == y)
}

fn unknown_argument(builtin: &Builtin, name: &str, span: Span) -> Diagnostic {
    let names: Vec<&str> = builtin.params.iter().map(|p| p.name).collect();
    let mut d = Diagnostic::error(
        span,
        format!("`{}` has no argument named `{name}`", builtin.name),
    );
    if let Some(best) = closest(name, &names) {
        d = d.with_hint(format!("did you mean `{best}`?"));
    }
    d.with_hint(format!("arguments: {}", names.join(", ")))
}

fn too_many(builtin: &Builtin, span: Span) -> Diagnostic {
    Diagnostic::error(
        span,
        format!(
            "`{}` takes at most {} arguments",
            builtin.name,
            builtin.params.len()
        ),
    )
}

fn expect_quantity(b: &Builtin, name: &str, arg: &Arg, dim: Dim) -> Result<Quantity, Diagnostic> {
    match &arg.value {
        Value::Quantity(q, _) if q.dim == dim => Ok(*q),
        Value::Quantity(q, _) => Err(Diagnostic::error(
            arg.span,
            format!(
                "argument `{name}` of `{}` expects {} [{}], found {} [{}]",
                b.name,
                describe_dim(dim),
                dim.si_unit(),
                describe_dim(q.dim),
                q.dim.si_unit()
            ),
        )),
        other => Err(Diagnostic::error(
            arg.span,
            format!(
                "argument `{name}` of `{}` expects a quantity, found {}",
                b.name,
                type_word(other)
            ),
        )),
    }
}

/// A word for a value's type in messages.
pub fn type_word(v: &Value) -> String {
    match v {
        Value::Quantity(..) => "a quantity".into(),
        Value::Bool(_) => "a truth value".into(),
        Value::Str(_) => "text".into(),
        Value::List(_) => "a list".into(),
        Value::Record(r) => format!("a record of type {}", r.type_name),
        Value::Table(_) => "a table".into(),
        Value::Plot(_) => "a plot".into(),
        Value::Function(_) => "a function".into(),
    }
}

/// The closest name by edit distance, when close enough to suggest.
pub fn closest<'a>(name: &str, candidates: &[&'a str]) -> Option<&'a str> {
    candidates
        .iter()
        .map(|c| (strsim::damerau_levenshtein(name, c), *c))
        .filter(|(d, c)| *d <= 2.max(c.len() / 3))
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c)
}

/// Every built-in, from every family file, sorted by name.
///
/// Each family file (`library/air.rs`, ...) exports `pub const BUILTINS: &[Builtin]`;
/// add one line to `FAMILIES` when a family lands.
pub fn registry() -> &'static [&'static Builtin] {
    static REGISTRY: std::sync::OnceLock<Vec<&'static Builtin>> = std::sync::OnceLock::new();
    REGISTRY.get_or_init(|| {
        const FAMILIES: &[&[Builtin]] = &[
            // one line per family, e.g. air::BUILTINS,
            air::BUILTINS,
            chart::BUILTINS,
            data::BUILTINS,
            dryers::BUILTINS,
            fit::BUILTINS,
            kinetics::BUILTINS,
            math::BUILTINS,
            plot::BUILTINS,
            sorption::BUILTINS,
            transfer::BUILTINS,
            whatif::BUILTINS,
        ];
        let mut all: Vec<&'static Builtin> = FAMILIES.iter().flat_map(|f| f.iter()).collect();
        all.sort_by_key(|b| b.name);
        all
    })
}

/// Look up a built-in by name (a hash lookup: this runs on every call).
pub fn find(name: &str) -> Option<&'static Builtin> {
    static BY_NAME: std::sync::OnceLock<crate::eval::FastMap<&'static str, &'static Builtin>> =
        std::sync::OnceLock::new();
    BY_NAME
        .get_or_init(|| registry().iter().map(|b| (b.name, *b)).collect())
        .get(name)
        .copied()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_are_unique_and_each_is_found() {
        let all = registry();
        for pair in all.windows(2) {
            assert!(
                pair[0].name < pair[1].name,
                "built-in `{}` is registered twice",
                pair[1].name
            );
        }
        for b in all {
            assert!(find(b.name).is_some_and(|f| std::ptr::eq(f, *b)));
        }
        assert!(find("no_such_builtin").is_none());
    }

    #[test]
    fn parameters_reading_only_the_payload_exist_and_take_air_records() {
        // A misspelt entry would silently mark nothing.
        for &(b, n) in transfer::PAYLOAD_ONLY.iter().chain(dryers::PAYLOAD_ONLY) {
            let builtin = find(b).unwrap_or_else(|| panic!("no built-in `{b}`"));
            let i = builtin
                .param_index(n)
                .unwrap_or_else(|| panic!("`{b}` has no parameter `{n}`"));
            assert_eq!(builtin.params[i].unit, "air", "{b}({n})");
            assert!(builtin.reads_only_payload(i));
        }
        // Every transfer or dryer built-in taking an air record is in a list.
        let families = ["transfer", "dryers"];
        for b in registry().iter().filter(|b| families.contains(&b.family)) {
            for (i, p) in b.params.iter().enumerate() {
                assert_eq!(
                    p.unit == "air",
                    b.reads_only_payload(i),
                    "{}({})",
                    b.name,
                    p.name
                );
            }
        }
        let heat = find("heat").expect("heat");
        assert!((0..heat.params.len()).all(|i| !heat.reads_only_payload(i)));
    }

    /// A bound argument keeps its value and span, not its name: taken, it
    /// comes back without one, whether bound by name or placed; placing over
    /// an argument still there replaces it, as binding afresh would.
    #[test]
    fn bound_arguments_keep_value_and_span_and_placing_replaces() {
        let air = find("air").expect("air");
        let span = |start| Span {
            file: 0,
            start,
            end: start + 2,
        };
        let q = |si: f64| Value::Quantity(Quantity::new(si, Dim::PRESSURE, Kind::Plain), None);
        let named = Arg {
            name: Some("p".to_string()),
            value: q(1.0),
            span: span(3),
        };
        let mut args = Args::bind(air, Span::default(), vec![named]).expect("binds");
        let taken = args.take("p").expect("given");
        assert_eq!((taken.name, taken.span), (None, span(3)));
        let p = air.param_index("p").expect("p");
        let mut args = Args::unbound(air, Span::default());
        args.place_value(p, Value::Str("first".into()), span(5));
        args.place_value(p, q(2.0), span(7));
        let taken = args.take_at(p).expect("given");
        assert_eq!(format!("{:?}", taken.value), format!("{:?}", q(2.0)));
        assert_eq!(taken.span, span(7));
        assert!(args.finish().is_ok());
        // A position past the parameters places nothing.
        args.place_value(99, q(3.0), span(9));
        assert!(args.finish().is_ok());
    }

    /// `take_si_at` takes only what the general path would accept, giving
    /// the magnitude `expect_kind` gives; anything else stays for the
    /// general path to report.
    #[test]
    fn take_si_at_takes_only_what_expect_kind_accepts() {
        let air = find("air").expect("air");
        let t = air.param_index("T").expect("T");
        let arg = |value: Value| Arg {
            name: None,
            value,
            span: Span::default(),
        };
        let q = |si: f64, dim: Dim, kind: Kind| Value::Quantity(Quantity::new(si, dim, kind), None);
        let cases = [
            (q(333.15, Dim::TEMPERATURE, Kind::AbsoluteTemperature), true),
            (q(333.15, Dim::TEMPERATURE, Kind::Plain), true),
            (
                q(20.0, Dim::TEMPERATURE, Kind::TemperatureDifference),
                false,
            ),
            (q(0.5, Dim::NONE, Kind::Activity), false),
            (Value::Bool(true), false),
        ];
        for (value, accepted) in cases {
            let general = match &value {
                Value::Quantity(q, _) => q
                    .expect_kind(Dim::TEMPERATURE, Kind::AbsoluteTemperature)
                    .ok()
                    .map(|q| q.si),
                _ => None,
            };
            let mut args = Args::unbound(air, Span::default());
            args.place(t, arg(value));
            let got = args.take_si_at(t, Dim::TEMPERATURE, Kind::AbsoluteTemperature);
            assert_eq!(got.is_some(), accepted);
            assert_eq!(got.map(f64::to_bits), general.map(f64::to_bits));
            // Taken exactly when accepted: otherwise still there to report.
            assert_eq!(args.has("T"), !accepted);
            assert_eq!(args.finish().is_ok(), accepted);
        }
        // Nothing given, or a position past the parameters: nothing taken.
        let mut args = Args::unbound(air, Span::default());
        assert_eq!(args.take_si_at(t, Dim::TEMPERATURE, Kind::Plain), None);
        assert_eq!(args.take_si_at(99, Dim::TEMPERATURE, Kind::Plain), None);
    }

    /// `take_payload` reads and takes an `air` record's state, and leaves
    /// anything else (another record type, a record without a payload, a
    /// quantity) for the general path to report.
    #[test]
    fn take_payload_takes_only_a_record_of_the_type_with_the_payload() {
        use crate::library::air::AirPayload;
        let b = find("wet_surface").expect("wet_surface");
        let i = b.param_index("air").expect("air");
        let state =
            crate::engine::air::AirState::from_w(
                uom::si::f64::ThermodynamicTemperature::new::<
                    uom::si::thermodynamic_temperature::kelvin,
                >(333.15),
                0.01,
                uom::si::f64::Pressure::new::<uom::si::pressure::pascal>(101_325.0),
            )
            .expect("a state");
        let with = |type_name: &'static str, payload: bool| {
            let mut r = Record::new(type_name);
            if payload {
                r.payload = Some(std::sync::Arc::new(AirPayload(state)));
            }
            Value::Record(r)
        };
        let cases = [
            (with("air", true), true),
            (with("air", false), false),
            (with("material", true), false),
            (
                Value::Quantity(Quantity::new(1.0, Dim::NONE, Kind::Plain), None),
                false,
            ),
        ];
        for (value, taken) in cases {
            let mut args = Args::unbound(b, Span::default());
            args.place(
                i,
                Arg {
                    name: None,
                    value,
                    span: Span::default(),
                },
            );
            let got = args.take_payload("air", "air", |p: &AirPayload| p.0);
            assert_eq!(got.is_some(), taken);
            if let Some(s) = got {
                assert_eq!(
                    s.humidity_ratio().to_bits(),
                    state.humidity_ratio().to_bits()
                );
                assert_eq!(s.t_kelvin().to_bits(), state.t_kelvin().to_bits());
            }
            assert_eq!(args.has("air"), !taken);
        }
    }

    /// `opt_spanned` (and `quantity`, `required_spanned` through it) gives
    /// what taking the argument and `expect_quantity` give: the quantity and
    /// its span, or the same error, or nothing when not given.
    #[test]
    fn opt_spanned_agrees_with_take_and_expect_quantity() {
        let air = find("air").expect("air");
        let span = Span {
            file: 0,
            start: 3,
            end: 9,
        };
        let arg = |value: Value| Arg {
            name: None,
            value,
            span,
        };
        let q = |si: f64, dim: Dim| Value::Quantity(Quantity::new(si, dim, Kind::Plain), None);
        let values = [
            q(101_325.0, Dim::PRESSURE),
            q(2.0, Dim::LENGTH),
            Value::Str("high".into()),
        ];
        let p = air.param_index("p").expect("p");
        for value in values {
            let mut general = Args::unbound(air, Span::default());
            general.place(p, arg(value.clone()));
            let taken = general.take("p").expect("given");
            let want = expect_quantity(air, "p", &taken, Dim::PRESSURE).map(|q| (q, taken.span));
            let mut args = Args::unbound(air, Span::default());
            args.place(p, arg(value));
            let got = args.opt_spanned("p", Dim::PRESSURE);
            match (got, want) {
                (Ok(Some((a, sa))), Ok((b, sb))) => {
                    assert_eq!(
                        (a.si.to_bits(), a.dim, a.kind, sa),
                        (b.si.to_bits(), b.dim, b.kind, sb)
                    );
                }
                (Err(a), Err(b)) => assert_eq!(format!("{a:?}"), format!("{b:?}")),
                (got, want) => panic!("{got:?} against {want:?}"),
            }
            // Taken either way.
            assert!(!args.has("p"));
        }
        let mut args = Args::unbound(air, Span::default());
        assert!(matches!(args.opt_spanned("p", Dim::PRESSURE), Ok(None)));
        assert!(args.required_spanned("p", Dim::PRESSURE).is_err());
        assert!(args.quantity("p", Dim::PRESSURE).is_err());
    }
}
