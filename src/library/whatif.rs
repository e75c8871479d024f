//! What-if built-ins: value ranges for sweeps, distributions for uncertain
//! inputs, and the help entries of the what-if forms.
//!
//! `steps`, `normal`, `uniform`, `triangular` and `lognormal` are ordinary
//! functions of their arguments. `sweep`, `seek`, `minimise`, `maximise`,
//! `uncertainty`, `propagate` and `tornado` re-evaluate the worksheet, so the
//! evaluator runs them (src/eval/whatif); their entries here give them help,
//! completion and a place in docs/builtins.md.

use super::{p, type_word, Arg, Args, Builtin, Param};
use crate::diag::Diagnostic;
use crate::engine::stats::{Shape, ShapeError};
use crate::units::{lookup_unit, Dim, Kind, Quantity, Unit};
use crate::value::{Payload, Record, Value};

/// Most values `steps` makes.
pub const MAX_STEPS: usize = 1_000_000;

/// The typed distribution carried by a `distribution` record.
#[derive(Clone, Debug)]
pub struct Distribution {
    /// Shape and parameters in SI magnitudes.
    pub shape: Shape,
    /// Dimension and kind of the values drawn.
    pub dim: Dim,
    pub kind: Kind,
    /// Unit the values are shown in.
    pub unit: Option<Unit>,
}

impl Payload for Distribution {
    fn as_any(&self) -> &dyn std::any::Any {
        self
    }
}

const STEPS: &[Param] = &[
    p("from", "any", None, "first value"),
    p(
        "to",
        "same as from",
        None,
        "last value (included when the steps land on it)",
    ),
    p(
        "by",
        "difference of from",
        None,
        "the step; its sign must lead from `from` towards `to`",
    ),
];
const NORMAL: &[Param] = &[
    p("mean", "any", None, "the mean"),
    p(
        "std",
        "difference of mean",
        None,
        "standard deviation, positive",
    ),
];
const UNIFORM: &[Param] = &[
    p("lo", "any", None, "low end"),
    p("hi", "same as lo", None, "high end, above lo"),
];
const TRIANGULAR: &[Param] = &[
    p("lo", "any", None, "low end"),
    p(
        "mode",
        "same as lo",
        None,
        "most likely value, between lo and hi",
    ),
    p("hi", "same as lo", None, "high end, above lo"),
];
const SWEEP: &[Param] = &[
    p(
        "values",
        "list",
        None,
        "what to report at each point: a name, an expression or a list of them",
    ),
    p(
        "INPUT",
        "list",
        None,
        "one or two inputs by name, each with its values, e.g. T_air: steps(60 degC, 90 degC, 5 K)",
    ),
];
const SEEK: &[Param] = &[
    p("value", "any", None, "the value that must reach the target"),
    p("target", "same as value", None, "the target"),
    p(
        "INPUT",
        "[low, high]",
        None,
        "the input to adjust, with the range to search",
    ),
];
const OPTIMISE: &[Param] = &[
    p(
        "objective",
        "any",
        None,
        "the value to make as small (or large) as possible",
    ),
    p(
        "INPUT",
        "[low, high]",
        None,
        "one to three inputs by name, each with its bounds",
    ),
];
const UNCERTAINTY: &[Param] = &[
    p("values", "list", None, "the values whose spread is wanted"),
    p(
        "INPUT",
        "distribution",
        None,
        "uncertain inputs by name, e.g. T_air: normal(70 degC, 2 K)",
    ),
    p(
        "samples",
        "-",
        Some("10000"),
        "number of Monte Carlo samples, 10 to 10000000",
    ),
    p(
        "seed",
        "-",
        Some("1"),
        "seed of the random generator; the same seed gives the same result",
    ),
    p("bins", "-", Some("30"), "bins of the histogram"),
];
const PROPAGATE: &[Param] = &[
    p("values", "list", None, "the values whose spread is wanted"),
    p(
        "INPUT",
        "distribution",
        None,
        "uncertain inputs by name, e.g. T_air: normal(70 degC, 2 K)",
    ),
];
const TORNADO: &[Param] = &[
    p(
        "value",
        "any",
        None,
        "the value whose sensitivity is wanted",
    ),
    p(
        "INPUT",
        "[low, high] or distribution",
        None,
        "inputs by name with a low and high value (a distribution gives mean - std and mean + std)",
    ),
];

const SOURCE_STATS: &str = "Kroese, Taimre & Botev (2011) Handbook of Monte Carlo Methods, Wiley; JCGM 100:2008 (GUM) sec. 5 for first-order propagation; JCGM 101:2008 for Monte Carlo propagation";

const fn entry(
    name: &'static str,
    params: &'static [Param],
    returns: &'static str,
    doc: &'static str,
    (method, source): (&'static str, &'static str),
    example: &'static str,
    func: fn(&mut Args) -> Result<Value, Diagnostic>,
) -> Builtin {
    Builtin {
        name,
        family: "what-if",
        params,
        returns,
        doc,
        method,
        source,
        validity: "any finite arguments of matching dimensions",
        example,
        func,
    }
}

/// The what-if family.
pub const BUILTINS: &[Builtin] = &[
    entry("steps", STEPS, "list", "Values from `from` to `to` in steps of `by`, for sweeps. The step of a temperature is a difference (`5 K`). `to` is included when the steps land on it.", ("from + i * by while it does not pass `to`", "common practice"), "steps(60 degC, 90 degC, 5 K)", steps),
    entry("normal", NORMAL, "distribution", "A normally distributed uncertain value with mean `mean` and standard deviation `std` (a difference for temperatures: `normal(70 degC, 2 K)`).", ("rand_distr standard normal (ziggurat), scaled", SOURCE_STATS), "normal(70 degC, 2 K)", normal),
    entry("uniform", UNIFORM, "distribution", "An uncertain value equally likely anywhere between `lo` and `hi`.", ("inverse distribution function", SOURCE_STATS), "uniform(2 m/s, 3 m/s)", uniform),
    entry("triangular", TRIANGULAR, "distribution", "An uncertain value between `lo` and `hi`, most likely near `mode` (a triangular distribution: the usual pick when only a range and a best guess are known).", ("inverse distribution function", SOURCE_STATS), "triangular(1.4 db, 1.6 db, 1.9 db)", triangular),
    entry("lognormal", NORMAL, "distribution", "A positive uncertain value whose logarithm is normal, given by the mean and standard deviation of the value itself (not of its logarithm).", ("sigma^2 = ln(1 + (std/mean)^2), mu = ln(mean) - sigma^2/2", SOURCE_STATS), "lognormal(3 mm, 0.5 mm)", lognormal),
    entry("sweep", SWEEP, "sweep record: table, plot, points, failed", "Re-evaluate the worksheet over the values of one or two inputs and report `values` at each point: a table (one row per point, with the checks that fail and any error) and a plot (lines for one input, a heat map of the first value for two). Only the values that depend on the swept inputs are recomputed, in parallel. A point that fails is reported in its row; the rest still run.", ("dependency-graph re-evaluation, parallel over points (rayon)", "common practice"), "sweep([t_dry, Rc], T_air: steps(60 degC, 90 degC, 5 K))", evaluated_form),
    entry("seek", SEEK, "the input's value", "The value of one input, within [low, high], that makes `value` equal `target`, e.g. the air temperature that gives a 4 h batch. Errors when the value does not cross the target in the range.", ("scan of 16 intervals for a sign change, then Brent's method", "Brent (1973) Algorithms for Minimization without Derivatives, ch. 4"), "seek(t_dry, 4 h, T_air: [50 degC, 110 degC])", evaluated_form),
    entry("minimise", OPTIMISE, "optimum record", "The values of one to three inputs within their bounds that make `objective` smallest while every check of the worksheet passes. Checks are hard limits: points that fail one are not accepted.", ("grid scan (41, 21x21 or 11x11x11 points), then golden-section search (one input) or Nelder-Mead in the box (two or three); failing checks are an extreme barrier", "Kiefer (1953) Proc. AMS 4, 502; Nelder & Mead (1965) Computer J. 7, 308; Lagarias et al. (1998) SIAM J. Optim. 9, 112"), "minimise(energy_per_kg, recirc: [0 %, 90 %])", evaluated_form),
    entry("maximise", OPTIMISE, "optimum record", "Like `minimise`, making `objective` as large as possible.", ("as minimise, on -objective", "as minimise"), "maximise(capacity, v_air: [1 m/s, 5 m/s])", evaluated_form),
    entry("uncertainty", UNCERTAINTY, "uncertainty record: table, histogram, mean, std, p5, p95, pass_rate", "Monte Carlo: draw the uncertain inputs from their distributions, re-evaluate the worksheet per sample and report the mean, standard deviation and 5/50/95th percentiles of each value, a histogram of the first, the share of samples that pass every check, and the first-order (linearised) estimate beside it for comparison. Sample i uses random stream i of the seed, so results do not depend on the number of threads.", ("Monte Carlo with ChaCha8 streams per sample; linearised propagation by central differences", SOURCE_STATS), "uncertainty([t_dry], T_air: normal(70 degC, 2 K), X1: triangular(1.4 db, 1.6 db, 1.9 db))", evaluated_form),
    entry("propagate", PROPAGATE, "propagation record: table, mean, std", "First-order (linearised) propagation of uncertainty: each value at the inputs' means, its standard deviation from the sensitivities (central differences) and each input's share of the variance. Fast; exact for linear worksheets; compare with `uncertainty` when the spread is wide.", ("u(y)^2 = sum (dy/dx_i)^2 u(x_i)^2, derivatives by central differences with steps of std/100", SOURCE_STATS), "propagate([t_dry], T_air: normal(70 degC, 2 K))", evaluated_form),
    entry("tornado", TORNADO, "tornado record: table, plot", "One-at-a-time sensitivity: `value` with each input at its low and at its high value (the others at their worksheet values), sorted by the swing, with a tornado chart.", ("one-at-a-time evaluation", "common practice"), "tornado(t_dry, T_air: [65 degC, 75 degC], v_air: [2 m/s, 4 m/s])", evaluated_form),
];

/// The what-if forms are run by the evaluator; this is reached only by misuse.
fn evaluated_form(args: &mut Args) -> Result<Value, Diagnostic> {
    Err(Diagnostic::error(
        args.call_span,
        format!(
            "`{}` must be called directly in a worksheet",
            args.builtin.name
        ),
    ))
}

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

fn unit_of(arg: &Arg) -> Option<Unit> {
    match &arg.value {
        Value::Quantity(_, u) => u.clone(),
        _ => None,
    }
}

/// `b` must have `a`'s dimension; a spread or step of an absolute temperature
/// must be a difference.
fn same_dim(
    a: &Quantity,
    b: &Quantity,
    b_arg: &Arg,
    b_name: &str,
    spread: bool,
) -> Result<(), Diagnostic> {
    if a.dim != b.dim {
        let msg = format!(
            "`{b_name}` must be {} like the first argument, found {}",
            crate::eval::dim_words(a.dim),
            crate::eval::dim_words(b.dim)
        );
        return Err(Diagnostic::error(b_arg.span, msg));
    }
    if spread && b.kind == Kind::AbsoluteTemperature {
        let msg =
            format!("`{b_name}` is a temperature difference, but this is an absolute temperature");
        return Err(Diagnostic::error(b_arg.span, msg)
            .with_hint("write a difference in K or delta_degC, e.g. `5 K`"));
    }
    Ok(())
}

fn steps(args: &mut Args) -> Result<Value, Diagnostic> {
    let (from, from_arg) = quantity(args, "from")?;
    let (to, to_arg) = quantity(args, "to")?;
    let (by, by_arg) = quantity(args, "by")?;
    args.finish()?;
    same_dim(&from, &to, &to_arg, "to", false)?;
    same_dim(&from, &by, &by_arg, "by", true)?;
    let span = to.si - from.si;
    if by.si == 0.0 {
        return Err(Diagnostic::error(
            by_arg.span,
            "the step `by` must not be zero",
        ));
    }
    if span != 0.0 && span.signum() != by.si.signum() {
        let dir = if span > 0.0 { "positive" } else { "negative" };
        let msg = format!("the step goes the wrong way: from `from` to `to` needs a {dir} step");
        return Err(Diagnostic::error(by_arg.span, msg));
    }
    let count = (span / by.si * (1.0 + 1e-12) + 1e-9).floor() + 1.0;
    if count > MAX_STEPS as f64 {
        let msg = format!(
            "{count:.0} values is more than the {MAX_STEPS} `steps` makes; use a larger step"
        );
        return Err(Diagnostic::error(by_arg.span, msg));
    }
    let unit = unit_of(&from_arg);
    let items = (0..count as usize)
        .map(|i| {
            Value::Quantity(
                Quantity::new(from.si + by.si * i as f64, from.dim, from.kind),
                unit.clone(),
            )
        })
        .collect();
    Ok(Value::List(items))
}

/// The unit a spread of values shown in `unit` is shown in (K for degC).
pub fn spread_unit(unit: Option<&Unit>) -> Option<Unit> {
    match unit {
        Some(u) if u.is_affine() && u.symbol.contains("degF") => lookup_unit("delta_degF"),
        Some(u) if u.is_affine() => lookup_unit("K"),
        other => other.cloned(),
    }
}

/// The kind of a spread of values of kind `kind`.
pub fn spread_kind(kind: Kind) -> Kind {
    if kind == Kind::AbsoluteTemperature {
        Kind::TemperatureDifference
    } else {
        kind
    }
}

/// The `distribution` record of `shape` for values like `q`.
fn distribution(
    shape: Shape,
    q: Quantity,
    unit: Option<Unit>,
    fields: Vec<(&'static str, Value)>,
) -> Value {
    let mean = Quantity::new(shape.mean(), q.dim, q.kind);
    let std = Quantity::new(shape.std(), q.dim, spread_kind(q.kind));
    let mut r = Record::new("distribution")
        .with("shape", Value::Str(shape.name().into()))
        .with("mean", Value::Quantity(mean, unit.clone()))
        .with("std", Value::Quantity(std, spread_unit(unit.as_ref())));
    for (name, v) in fields {
        r = r.with(name, v);
    }
    r.payload = Some(std::sync::Arc::new(Distribution {
        shape,
        dim: q.dim,
        kind: q.kind,
        unit,
    }));
    Value::Record(r)
}

/// Read all arguments first (so `span_of` still works), then finish.
fn spans_kept(args: &mut Args, names: &[&str]) -> Result<Vec<(Quantity, Arg)>, Diagnostic> {
    let mut out = Vec::new();
    for n in names {
        out.push(quantity(args, n)?);
    }
    args.finish()?;
    Ok(out)
}

fn normal(args: &mut Args) -> Result<Value, Diagnostic> {
    let v = spans_kept(args, &["mean", "std"])?;
    same_dim(&v[0].0, &v[1].0, &v[1].1, "std", true)?;
    let made = Shape::normal(v[0].0.si, v[1].0.si);
    distribution_at(args, made, &v, vec![])
}

fn lognormal(args: &mut Args) -> Result<Value, Diagnostic> {
    let v = spans_kept(args, &["mean", "std"])?;
    same_dim(&v[0].0, &v[1].0, &v[1].1, "std", true)?;
    let made = Shape::lognormal(v[0].0.si, v[1].0.si);
    distribution_at(args, made, &v, vec![])
}

fn uniform(args: &mut Args) -> Result<Value, Diagnostic> {
    let v = spans_kept(args, &["lo", "hi"])?;
    same_dim(&v[0].0, &v[1].0, &v[1].1, "hi", false)?;
    let made = Shape::uniform(v[0].0.si, v[1].0.si);
    let fields = vec![("lo", v[0].1.value.clone()), ("hi", v[1].1.value.clone())];
    distribution_at(args, made, &v, fields)
}

fn triangular(args: &mut Args) -> Result<Value, Diagnostic> {
    let v = spans_kept(args, &["lo", "mode", "hi"])?;
    same_dim(&v[0].0, &v[1].0, &v[1].1, "mode", false)?;
    same_dim(&v[0].0, &v[2].0, &v[2].1, "hi", false)?;
    let made = Shape::triangular(v[0].0.si, v[1].0.si, v[2].0.si);
    let fields = vec![
        ("lo", v[0].1.value.clone()),
        ("mode", v[1].1.value.clone()),
        ("hi", v[2].1.value.clone()),
    ];
    distribution_at(args, made, &v, fields)
}

/// Blame spans come from the arguments already taken, so map names to them.
fn distribution_at(
    args: &Args,
    made: Result<Shape, ShapeError>,
    v: &[(Quantity, Arg)],
    fields: Vec<(&'static str, Value)>,
) -> Result<Value, Diagnostic> {
    let made = made.map_err(|e| {
        let blame = match &e {
            ShapeError::NotFinite(p) | ShapeError::SpreadNotPositive(p) => *p,
            ShapeError::EmptyInterval => "hi",
            ShapeError::ModeOutside => "mode",
            ShapeError::MeanNotPositive => "mean",
        };
        let at = args.builtin.param_index(blame);
        let span = at
            .and_then(|i| v.get(i))
            .map_or(args.call_span, |(_, a)| a.span);
        Diagnostic::error(
            span,
            format!("invalid {} distribution: {e}", args.builtin.name),
        )
    });
    Ok(distribution(made?, v[0].0, unit_of(&v[0].1), fields))
}
