//! Kinetics built-ins: batch drying tests, rate curves, drying time and
//! stages, internal diffusion (Crank series and a finite-volume solver),
//! effective diffusivity and its activation energy, thin-layer models.
//!
//! Rate curves are records of type `rate_curve` carrying a
//! [`CurvePayload`]; a processed batch test is a `drying_test` record whose
//! `curve` field is its measured rate curve. Thin-layer fits are ordinary
//! `fit` records (see `library::fit`), so `compare_fits` works on them.

use std::sync::Arc;

use super::data::{find_column, table_arg};
use super::fit::{comparison_table, fit_record, FitPayload, QuantitySpec};
use crate::diag::{Diagnostic, Span};
use crate::engine::diffusion::{
    arrhenius_fit, diffusivity_from_slope, diffusivity_nonlinear, solve_drying, Body, CrankSeries,
    DiffusionProblem, DiffusionRun, Diffusivity, ProductTemperature, Shape, SolverSettings,
    Surface,
};
use crate::engine::fit::least_squares;
use crate::engine::kinetics::{
    drying_curve as engine_drying_curve, drying_time as engine_drying_time, stages, BatchRun,
    ConstantRatePeriod, KineticsError, RateCurve,
};
use crate::engine::thin_layer::{fit_thin_layer, ThinLayerFit, ThinLayerModel};
use crate::library::{type_word, Args, Builtin, Param};
use crate::units::{parse_unit, Dim, Kind, Quantity};
use crate::value::{Column, Mark, Payload, Plot, Record, Series, SeriesStyle, Table, Value};

/// The engine rate curve behind a `rate_curve` record, with the constant
/// rate it refers to (its own `Rc`, or the test's `Rc` for a measured table).
#[derive(Debug, Clone)]
pub struct CurvePayload {
    pub curve: RateCurve,
    /// Reference constant rate, kg/(m^2 s), used by `at_constant_rate`.
    pub rc_reference: f64,
    /// Critical moisture found in a test, for a measured curve.
    pub critical: Option<f64>,
    /// Load Ls/A (kg/m^2) of the test the curve was measured on, if any.
    pub measured_load: Option<f64>,
}

impl Payload for CurvePayload {
    fn as_any(&self) -> &dyn std::any::Any {
        self
    }
}

/// A processed batch test.
#[derive(Debug, Clone)]
pub struct TestPayload {
    pub run: BatchRun,
    pub period: ConstantRatePeriod,
}

impl Payload for TestPayload {
    fn as_any(&self) -> &dyn std::any::Any {
        self
    }
}

// ---------------------------------------------------------------------------
// Values
// ---------------------------------------------------------------------------

fn shown(si: f64, dim: Dim, kind: Kind, unit: &str) -> Value {
    Value::Quantity(Quantity::new(si, dim, kind), parse_unit(unit).ok())
}

fn number(x: f64) -> Value {
    Value::Quantity(Quantity::number(x), None)
}

fn moisture(x: f64) -> Value {
    shown(x, Dim::NONE, Kind::Moisture, "db")
}

fn rate(r: f64) -> Value {
    shown(r, Dim::MASS_FLUX, Kind::Plain, "kg/(m^2*h)")
}

fn hours(t: f64) -> Value {
    shown(t, Dim::TIME, Kind::Plain, "h")
}

fn column(name: &str, unit: &str, cells: Vec<Value>) -> Column {
    Column {
        name: name.into(),
        unit: parse_unit(unit).ok(),
        cells,
    }
}

fn kinetics_error(span: Span, e: KineticsError) -> Diagnostic {
    let hint = match &e {
        KineticsError::TargetAtOrBelowEquilibrium { .. } => {
            Some("choose a final moisture above the equilibrium moisture")
        }
        KineticsError::TooFewPoints { .. } => {
            Some("use a shorter smoothing window or more readings")
        }
        KineticsError::NegativeDiffusivity { .. } => {
            Some("a diffusivity is positive, typically 1e-12 to 1e-8 m^2/s for foods")
        }
        _ => None,
    };
    let d = Diagnostic::error(span, e.to_string());
    match hint {
        Some(h) => d.with_hint(h),
        None => d,
    }
}

// ---------------------------------------------------------------------------
// Argument readers
// ---------------------------------------------------------------------------

fn kind_arg(args: &mut Args, name: &str, dim: Dim, kind: Kind) -> Result<Option<f64>, Diagnostic> {
    let Some(arg) = args.take(name) else {
        return Ok(None);
    };
    match &arg.value {
        Value::Quantity(q, _) => q.expect_kind(dim, kind).map(|q| Some(q.si)).map_err(|e| {
            Diagnostic::error(
                arg.span,
                format!(
                    "argument `{name}` of `{}`: {}",
                    args.builtin.name, e.message
                ),
            )
        }),
        other => Err(Diagnostic::error(
            arg.span,
            format!(
                "argument `{name}` of `{}` expects a quantity, found {}",
                args.builtin.name,
                type_word(other)
            ),
        )),
    }
}

fn required_kind(args: &mut Args, name: &str, dim: Dim, kind: Kind) -> Result<f64, Diagnostic> {
    let span = args.call_span;
    kind_arg(args, name, dim, kind)?.ok_or_else(|| {
        Diagnostic::error(
            span,
            format!("`{}` needs the argument `{name}`", args.builtin.name),
        )
        .with_hint(format!("call it as {}", args.builtin.example))
    })
}

fn opt_moisture(args: &mut Args, name: &str) -> Result<Option<f64>, Diagnostic> {
    kind_arg(args, name, Dim::NONE, Kind::Moisture)
}

fn required_moisture(args: &mut Args, name: &str) -> Result<f64, Diagnostic> {
    required_kind(args, name, Dim::NONE, Kind::Moisture)
}

fn opt_text(args: &mut Args, name: &str) -> Result<Option<(String, Span)>, Diagnostic> {
    match args.take(name) {
        None => Ok(None),
        Some(a) => match a.value {
            Value::Str(s) => Ok(Some((s, a.span))),
            other => Err(Diagnostic::error(
                a.span,
                format!("`{name}` is text in quotes, found {}", type_word(&other)),
            )),
        },
    }
}

fn opt_count(args: &mut Args, name: &str, default: usize) -> Result<usize, Diagnostic> {
    let span = args.span_of(name);
    match kind_arg(args, name, Dim::NONE, Kind::Plain)? {
        None => Ok(default),
        Some(v) if v >= 1.0 && v.fract() == 0.0 && v <= 1e6 => Ok(v as usize),
        Some(v) => Err(Diagnostic::error(
            span,
            format!("`{name}` must be a whole number of at least 1, got {v}"),
        )),
    }
}

/// The SI values of one table column, checked for dimension and kind.
fn column_si(
    table: &Table,
    name: &str,
    span: Span,
    dim: Dim,
    kind: Kind,
) -> Result<Vec<f64>, Diagnostic> {
    let col = find_column(table, name, span)?;
    col.cells
        .iter()
        .enumerate()
        .map(|(row, v)| match v {
            Value::Quantity(q, _) => q.expect_kind(dim, kind).map(|q| q.si).map_err(|e| {
                Diagnostic::error(
                    span,
                    format!("column `{name}`, row {}: {}", row + 1, e.message),
                )
            }),
            other => Err(Diagnostic::error(
                span,
                format!(
                    "column `{name}`, row {}: {} is not a number",
                    row + 1,
                    type_word(other)
                ),
            )),
        })
        .collect()
}

/// A column name argument (default `default`) and its span.
fn column_name(args: &mut Args, name: &str, default: &str) -> Result<(String, Span), Diagnostic> {
    let span = args.span_of(name);
    Ok(opt_text(args, name)?.unwrap_or((default.to_string(), span)))
}

/// A list argument of quantities of one dimension and kind.
fn quantity_list(
    args: &mut Args,
    name: &str,
    dim: Dim,
    kind: Kind,
) -> Result<Vec<f64>, Diagnostic> {
    let arg = args.required(name)?;
    let Value::List(items) = arg.value else {
        return Err(Diagnostic::error(
            arg.span,
            format!("`{name}` must be a list such as [40 degC, 50 degC]"),
        ));
    };
    items
        .iter()
        .enumerate()
        .map(|(i, v)| match v {
            Value::Quantity(q, _) => q.expect_kind(dim, kind).map(|q| q.si).map_err(|e| {
                Diagnostic::error(arg.span, format!("`{name}` item {}: {}", i + 1, e.message))
            }),
            other => Err(Diagnostic::error(
                arg.span,
                format!(
                    "`{name}` item {} is {}, not a quantity",
                    i + 1,
                    type_word(other)
                ),
            )),
        })
        .collect()
}

fn curve_arg(args: &mut Args, name: &str) -> Result<CurvePayload, Diagnostic> {
    let arg = args.required(name)?;
    let record = match &arg.value {
        Value::Record(r) if r.type_name == "rate_curve" => r.clone(),
        Value::Record(r) if r.type_name == "drying_test" => match r.get("curve") {
            Some(Value::Record(c)) => c.clone(),
            _ => {
                return Err(Diagnostic::error(
                    arg.span,
                    "this drying test has no rate curve",
                ))
            }
        },
        other => return Err(Diagnostic::error(
            arg.span,
            format!("`{name}` must be a rate curve, found {}", type_word(other)),
        )
        .with_hint(
            "make one with drying_test(...), measured_rate_curve(...) or falling_rate_curve(...)",
        )),
    };
    record
        .payload::<CurvePayload>()
        .cloned()
        .ok_or_else(|| Diagnostic::error(arg.span, "this rate curve record carries no curve"))
}

/// Shape and diffusion length from `shape`, `thickness` + `faces`, or `radius`.
fn body_arg(args: &mut Args) -> Result<Body, Diagnostic> {
    let (shape_name, span) = opt_text(args, "shape")?.unwrap_or(("slab".into(), args.call_span));
    let shape = match shape_name.to_ascii_lowercase().as_str() {
        "slab" | "plate" | "sheet" => Shape::Slab,
        "cylinder" => Shape::Cylinder,
        "sphere" => Shape::Sphere,
        other => {
            return Err(Diagnostic::error(span, format!("unknown shape `{other}`"))
                .with_hint("shapes: \"slab\", \"cylinder\", \"sphere\""))
        }
    };
    let (faces_span, thickness_span) = (args.span_of("faces"), args.span_of("thickness"));
    let thickness = args.opt_quantity("thickness", Dim::LENGTH)?;
    let radius = args.opt_quantity("radius", Dim::LENGTH)?;
    let faces = opt_count(args, "faces", 2)?;
    let length = match (shape, thickness, radius) {
        (Shape::Slab, Some(t), None) if faces == 1 || faces == 2 => {
            if faces == 2 {
                0.5 * t.si
            } else {
                t.si
            }
        }
        (Shape::Slab, _, None) if faces > 2 => {
            return Err(Diagnostic::error(
                faces_span,
                "a slab dries from 1 or 2 faces",
            ))
        }
        (Shape::Slab, None, _) => {
            return Err(
                Diagnostic::error(args.call_span, "a slab needs `thickness`")
                    .with_hint("thickness: 6 mm, faces: 2 (or 1 with the other face sealed)"),
            )
        }
        (_, None, Some(r)) => r.si,
        (_, Some(_), _) => {
            return Err(Diagnostic::error(
                thickness_span,
                "a cylinder or sphere takes `radius`, not `thickness`",
            ))
        }
        (_, None, None) => {
            return Err(Diagnostic::error(
                args.call_span,
                format!("a {} needs `radius`", shape.name()),
            ))
        }
    };
    if !(length.is_finite() && length > 0.0) {
        return Err(Diagnostic::error(
            span,
            format!("the diffusion length must be positive, got {length} m"),
        ));
    }
    Ok(Body {
        shape,
        length_m: length,
    })
}

fn diffusivity_value(args: &mut Args, name: &str) -> Result<f64, Diagnostic> {
    let span = args.span_of(name);
    let d = args.quantity(name, Dim::DIFFUSIVITY)?;
    if d.si.is_finite() && d.si > 0.0 {
        Ok(d.si)
    } else {
        Err(kinetics_error(
            span,
            KineticsError::NegativeDiffusivity { value: d.si },
        ))
    }
}

fn biot_arg(args: &mut Args) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of("Bi");
    match kind_arg(args, "Bi", Dim::NONE, Kind::Plain)? {
        Some(b) if b.is_finite() && b > 0.0 => Ok(Some(b)),
        Some(b) => Err(Diagnostic::error(
            span,
            format!("the Biot number must be positive, got {b}"),
        )),
        None => Ok(None),
    }
}

// ---------------------------------------------------------------------------
// Batch tests and rate curves
// ---------------------------------------------------------------------------

fn drying_test(args: &mut Args) -> Result<Value, Diagnostic> {
    let table = table_arg(args, "data")?;
    let (t_name, t_span) = column_name(args, "time", "t")?;
    let (m_name, m_span) = column_name(args, "mass", "m")?;
    let solid = args.quantity("solid", Dim::MASS)?;
    let area = args.quantity("area", Dim::AREA)?;
    let window = opt_count(args, "window", 7)?;
    let order = opt_count(args, "order", 2)?;
    args.finish()?;
    let times = column_si(&table, &t_name, t_span, Dim::TIME, Kind::Plain)?;
    let masses = column_si(&table, &m_name, m_span, Dim::MASS, Kind::Plain)?;
    let run = BatchRun::from_masses(&times, &masses, solid.si, area.si, window, order)
        .map_err(|e| kinetics_error(args.call_span, e))?;
    let period = run
        .constant_rate_period()
        .map_err(|e| kinetics_error(args.call_span, e))?;
    let curve = run
        .rate_curve()
        .map_err(|e| kinetics_error(args.call_span, e))?;
    if period.points_constant < 3 {
        args.warn(format!(
            "only {} readings lie in the constant-rate period; Rc and Xc are uncertain",
            period.points_constant
        ));
    }
    Ok(Value::Record(test_record(run, period, curve)))
}

/// The readings of a test with smoothed moisture and rate.
fn test_points(run: &BatchRun) -> Table {
    let each = |f: &dyn Fn(&crate::engine::kinetics::RatePoint) -> Value| {
        run.points.iter().map(f).collect()
    };
    Table {
        title: Some(format!(
            "drying test (Savitzky-Golay window {}, order {})",
            run.window, run.order
        )),
        columns: vec![
            column(
                "t",
                "min",
                each(&|p| shown(p.time_s, Dim::TIME, Kind::Plain, "min")),
            ),
            column("X", "db", each(&|p| moisture(p.moisture))),
            column("X smoothed", "db", each(&|p| moisture(p.smoothed))),
            column("R", "kg/(m^2*h)", each(&|p| rate(p.rate))),
        ],
    }
}

fn test_record(run: BatchRun, period: ConstantRatePeriod, curve: RateCurve) -> Record {
    let points = test_points(&run);
    let curve_record = curve_record(
        CurvePayload {
            curve,
            rc_reference: period.rate,
            critical: Some(period.critical_moisture),
            measured_load: Some(run.load_kg_per_m2),
        },
        "measured (monotone cubic through the test's smoothed rates)",
    );
    let mut r = Record::new("drying_test")
        .with(
            "load",
            shown(
                run.load_kg_per_m2,
                Dim::AREAL_DENSITY,
                Kind::Plain,
                "kg/m^2",
            ),
        )
        .with("Rc", rate(period.rate))
        .with("Rc_se", rate(period.rate_std_error))
        .with("Xc", moisture(period.critical_moisture))
        .with("Xc_low", moisture(period.critical_low))
        .with("Xc_high", moisture(period.critical_high))
        .with("X_zero_rate", moisture(period.zero_rate_moisture))
        .with("points", Value::Table(points))
        .with("plot", Value::Plot(Arc::new(rate_plot(&run, &period))))
        .with("curve", Value::Record(curve_record));
    r.payload = Some(Arc::new(TestPayload { run, period }));
    r
}

/// Drying-rate curve of a test: readings, the two-segment fit and Xc.
fn rate_plot(run: &BatchRun, period: &ConstantRatePeriod) -> Plot {
    let per_hour = 3600.0;
    let readings = Series {
        label: "readings (smoothed X, R)".into(),
        x: run.points.iter().map(|p| p.smoothed).collect(),
        y: run.points.iter().map(|p| p.rate * per_hour).collect(),
        style: SeriesStyle::Points,
    };
    let low = run
        .points
        .iter()
        .map(|p| p.smoothed)
        .fold(f64::INFINITY, f64::min);
    let high = run
        .points
        .iter()
        .map(|p| p.smoothed)
        .fold(f64::NEG_INFINITY, f64::max);
    let fit = |x: f64| {
        (period.rate - period.falling_slope * (period.critical_moisture - x).max(0.0)) * per_hour
    };
    let xs = [low, period.critical_moisture, high];
    let model = Series {
        label: "constant + linear falling fit".into(),
        x: xs.to_vec(),
        y: xs.iter().map(|x| fit(*x)).collect(),
        style: SeriesStyle::Dashed,
    };
    Plot {
        title: "drying-rate curve".into(),
        x_label: "moisture X [db]".into(),
        y_label: "drying rate R [kg/(m^2*h)]".into(),
        series: vec![readings, model],
        marks: vec![
            Mark::VLine {
                x: period.critical_moisture,
                label: "Xc".into(),
            },
            Mark::Span {
                x0: period.critical_low,
                x1: period.critical_high,
                label: "Xc +- 1 s.e.".into(),
            },
        ],
        heat: None,
    }
}

fn curve_record(payload: CurvePayload, model: &str) -> Record {
    let low = if matches!(payload.curve, RateCurve::Table(_)) {
        "X_low"
    } else {
        "Xe"
    };
    let mut r = Record::new("rate_curve")
        .with("model", Value::Str(model.into()))
        .with("Rc", rate(payload.rc_reference))
        .with(low, moisture(payload.curve.equilibrium()));
    if let Some(xc) = payload.critical.or(payload.curve.critical()) {
        r = r.with("Xc", moisture(xc));
    }
    if let RateCurve::ConstantPower { n, .. } = payload.curve {
        r = r.with("n", number(n));
    }
    if let RateCurve::Table(t) = &payload.curve {
        let table = Table {
            title: Some("rate curve".into()),
            columns: vec![
                column("X", "db", t.x.iter().map(|x| moisture(*x)).collect()),
                column("R", "kg/(m^2*h)", t.y.iter().map(|y| rate(*y)).collect()),
            ],
        };
        r = r.with("points", Value::Table(table));
    }
    r.payload = Some(Arc::new(payload));
    r
}

fn measured_rate_curve(args: &mut Args) -> Result<Value, Diagnostic> {
    let table = table_arg(args, "data")?;
    let (x_name, x_span) = column_name(args, "moisture", "X")?;
    let (r_name, r_span) = column_name(args, "rate", "R")?;
    args.finish()?;
    let x = column_si(&table, &x_name, x_span, Dim::NONE, Kind::Moisture)?;
    let r = column_si(&table, &r_name, r_span, Dim::MASS_FLUX, Kind::Plain)?;
    let curve = RateCurve::table(&x, &r).map_err(|e| kinetics_error(args.call_span, e))?;
    let rc = r.iter().copied().fold(0.0, f64::max);
    Ok(Value::Record(curve_record(
        CurvePayload {
            curve,
            rc_reference: rc,
            critical: None,
            measured_load: None,
        },
        "measured (monotone cubic through the table)",
    )))
}

fn falling_rate_curve(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = spans_of(args, &["Rc", "Xc", "Xe", "n"]);
    let rc = args.quantity("Rc", Dim::MASS_FLUX)?.si;
    let xc = required_moisture(args, "Xc")?;
    let xe = opt_moisture(args, "Xe")?.unwrap_or(0.0);
    let n = kind_arg(args, "n", Dim::NONE, Kind::Plain)?.unwrap_or(1.0);
    args.finish()?;
    let (curve, model) = if n == 1.0 {
        (
            RateCurve::constant_linear(rc, xc, xe),
            "constant rate, then falling linearly in free moisture",
        )
    } else {
        (
            RateCurve::constant_power(rc, xc, xe, n),
            "constant rate, then falling as a power of free moisture",
        )
    };
    let curve = curve.map_err(|e| blame(&spans, args.call_span, e))?;
    Ok(Value::Record(curve_record(
        CurvePayload {
            curve,
            rc_reference: rc,
            critical: None,
            measured_load: None,
        },
        model,
    )))
}

fn at_constant_rate(args: &mut Args) -> Result<Value, Diagnostic> {
    let rc_span = args.span_of("Rc");
    let payload = curve_arg(args, "curve")?;
    let rc = args.quantity("Rc", Dim::MASS_FLUX)?.si;
    args.finish()?;
    if !(rc.is_finite() && rc > 0.0) {
        return Err(Diagnostic::error(
            rc_span,
            format!("the constant drying rate must be positive, got {rc} kg/(m^2*s)"),
        ));
    }
    let factor = rc / payload.rc_reference;
    let curve = payload
        .curve
        .scaled(factor)
        .map_err(|e| kinetics_error(args.call_span, e))?;
    Ok(Value::Record(curve_record(
        CurvePayload {
            curve,
            rc_reference: rc,
            critical: payload.critical,
            measured_load: payload.measured_load,
        },
        &format!("rescaled to Rc (rates x {factor:.4})"),
    )))
}

fn span_args(args: &mut Args) -> Result<(CurvePayload, f64, f64, f64), Diagnostic> {
    let payload = curve_arg(args, "curve")?;
    let load = args.quantity("load", Dim::AREAL_DENSITY)?.si;
    let from = required_moisture(args, "from")?;
    let to = required_moisture(args, "to")?;
    Ok((payload, load, from, to))
}

/// The argument an engine error is about, from its kind and name.
fn blame(spans: &[(&'static str, Span)], fallback: Span, e: KineticsError) -> Diagnostic {
    let name = match &e {
        KineticsError::TargetAtOrBelowEquilibrium { .. } => "to",
        KineticsError::OutOfRange { name, .. } => match *name {
            "start moisture" => "from",
            "target moisture" => "to",
            "dry-solid load per area" => "load",
            "critical moisture" => "Xc",
            "equilibrium moisture" => "Xe",
            "constant drying rate" => "Rc",
            "falling-rate exponent" => "n",
            "rate scale factor" => "Rc",
            _ => "",
        },
        _ => "",
    };
    let span = spans
        .iter()
        .find(|(n, _)| *n == name)
        .map_or(fallback, |(_, s)| *s);
    kinetics_error(span, e)
}

fn spans_of(args: &Args, names: &[&'static str]) -> Vec<(&'static str, Span)> {
    names.iter().map(|n| (*n, args.span_of(n))).collect()
}

/// Warn when a curve measured on a test is used at a quite different load:
/// the constant-rate period carries over per area, but a falling period
/// governed by internal diffusion lengthens with the layer depth.
fn warn_load(args: &mut Args, payload: &CurvePayload, load: f64) {
    if let Some(measured) = payload.measured_load {
        let ratio = load / measured;
        if !(0.8..=1.25).contains(&ratio) {
            args.warn(format!(
                "the rate curve was measured at a load of {} kg/m^2 and is used at {} kg/m^2; this assumes the falling rate per area does not depend on the layer depth (true for surface-controlled drying, not for internal diffusion, where time grows with depth)",
                crate::engine::kinetics::show(measured),
                crate::engine::kinetics::show(load)
            ));
        }
    }
}

fn drying_time(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = spans_of(args, &["load", "from", "to"]);
    let (payload, load, from, to) = span_args(args)?;
    args.finish()?;
    warn_load(args, &payload, load);
    let t = engine_drying_time(&payload.curve, load, from, to)
        .map_err(|e| blame(&spans, args.call_span, e))?;
    Ok(hours(t.total_s))
}

fn drying_curve(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = spans_of(args, &["load", "from", "to"]);
    let (payload, load, from, to) = span_args(args)?;
    let points = opt_count(args, "points", 41)?;
    args.finish()?;
    warn_load(args, &payload, load);
    let curve = engine_drying_curve(&payload.curve, load, from, to, points)
        .map_err(|e| blame(&spans, args.call_span, e))?;
    let columns = vec![
        column("t", "h", curve.iter().map(|p| hours(p.0)).collect()),
        column("X", "db", curve.iter().map(|p| moisture(p.1)).collect()),
        column(
            "R",
            "kg/(m^2*h)",
            curve
                .iter()
                .map(|p| rate(payload.curve.rate(p.1)))
                .collect(),
        ),
    ];
    Ok(Value::Table(Table {
        title: Some("batch drying curve".into()),
        columns,
    }))
}

fn moisture_ratios(args: &mut Args) -> Result<Value, Diagnostic> {
    let arg = args.required("test")?;
    let xe_span = args.span_of("Xe");
    let xe = required_moisture(args, "Xe")?;
    args.finish()?;
    let test = match &arg.value {
        Value::Record(r) => r.payload::<TestPayload>(),
        _ => None,
    }
    .ok_or_else(|| {
        Diagnostic::error(
            arg.span,
            format!(
                "`test` must be a drying test, found {}",
                type_word(&arg.value)
            ),
        )
        .with_hint("make one with drying_test(...)")
    })?;
    let x0 = test.run.points[0].moisture;
    if !(xe >= 0.0 && xe < x0) {
        return Err(Diagnostic::error(
            xe_span,
            format!(
                "Xe = {} db must lie between 0 and the first moisture {} db",
                crate::engine::kinetics::show(xe),
                crate::engine::kinetics::show(x0)
            ),
        ));
    }
    let points = &test.run.points;
    let columns = vec![
        column("t", "h", points.iter().map(|p| hours(p.time_s)).collect()),
        Column {
            name: "MR".into(),
            unit: None,
            cells: points
                .iter()
                .map(|p| number((p.moisture - xe) / (x0 - xe)))
                .collect(),
        },
    ];
    Ok(Value::Table(Table {
        title: Some("moisture ratios (X - Xe)/(X0 - Xe)".into()),
        columns,
    }))
}

fn drying_stages(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = spans_of(args, &["load", "from", "to"]);
    let (payload, load, from, to) = span_args(args)?;
    let conditions = opt_text(args, "conditions")?
        .map(|c| c.0)
        .unwrap_or_default();
    args.finish()?;
    warn_load(args, &payload, load);
    let chain = stages(
        &payload.curve,
        load,
        from,
        to,
        payload.critical,
        &conditions,
    )
    .map_err(|e| blame(&spans, args.call_span, e))?;
    if chain.iter().any(|s| !s.duration_s.is_finite()) {
        let msg = "a stage's duration is not a finite number: check the moistures and the load";
        return Err(Diagnostic::error(args.call_span, msg));
    }
    let columns = vec![
        Column {
            name: "stage".into(),
            unit: None,
            cells: chain
                .iter()
                .map(|s| Value::Str(s.kind.name().into()))
                .collect(),
        },
        column(
            "X start",
            "db",
            chain.iter().map(|s| moisture(s.x_start)).collect(),
        ),
        column(
            "X end",
            "db",
            chain.iter().map(|s| moisture(s.x_end)).collect(),
        ),
        column(
            "duration",
            "h",
            chain.iter().map(|s| hours(s.duration_s)).collect(),
        ),
        column(
            "R start",
            "kg/(m^2*h)",
            chain.iter().map(|s| rate(s.rate_start)).collect(),
        ),
        column(
            "R end",
            "kg/(m^2*h)",
            chain.iter().map(|s| rate(s.rate_end)).collect(),
        ),
    ];
    Ok(Value::Table(Table {
        title: Some(format!("drying stages {conditions}").trim().to_string()),
        columns,
    }))
}

// ---------------------------------------------------------------------------
// Diffusion
// ---------------------------------------------------------------------------

fn crank_ratio(args: &mut Args) -> Result<Value, Diagnostic> {
    let t_span = args.span_of("t");
    let d = diffusivity_value(args, "D")?;
    let t = args.quantity("t", Dim::TIME)?.si;
    let body = body_arg(args)?;
    let biot = biot_arg(args)?;
    args.finish()?;
    if !(t.is_finite() && t >= 0.0) {
        return Err(Diagnostic::error(
            t_span,
            format!("time must not be negative, got {t} s"),
        ));
    }
    let fo = body.fourier(d, t);
    let series = CrankSeries::new(body.shape, biot, fo.clamp(1e-7, 1e-4))
        .map_err(|e| kinetics_error(args.call_span, e))?;
    Ok(number(series.moisture_ratio(fo)))
}

fn crank_time(args: &mut Args) -> Result<Value, Diagnostic> {
    let mr_span = args.span_of("MR");
    let d = diffusivity_value(args, "D")?;
    let mr = required_kind(args, "MR", Dim::NONE, Kind::Plain)?;
    let body = body_arg(args)?;
    let biot = biot_arg(args)?;
    args.finish()?;
    let series =
        CrankSeries::new(body.shape, biot, 1e-6).map_err(|e| kinetics_error(args.call_span, e))?;
    let fo = series
        .fourier_for_ratio(mr)
        .map_err(|e| kinetics_error(mr_span, e))?;
    Ok(hours(fo * body.length_m * body.length_m / d))
}

/// Read the arguments of `diffusion_drying` into a problem and settings.
fn diffusion_problem(args: &mut Args) -> Result<(DiffusionProblem, SolverSettings), Diagnostic> {
    let ea_span = args.span_of("Ea");
    let body = body_arg(args)?;
    let x0 = required_moisture(args, "X0")?;
    let xe = required_moisture(args, "Xe")?;
    let d = diffusivity_value(args, "D")?;
    let temperature = kind_arg(args, "T", Dim::TEMPERATURE, Kind::AbsoluteTemperature)?;
    let ea = args
        .opt_quantity("Ea", Dim::MOLAR_ENERGY)?
        .map_or(0.0, |q| q.si);
    let t_ref = kind_arg(args, "T_ref", Dim::TEMPERATURE, Kind::AbsoluteTemperature)?;
    let a = kind_arg(args, "moisture_coefficient", Dim::NONE, Kind::Plain)?.unwrap_or(0.0);
    let alpha = args.opt_quantity("alpha", Dim::VELOCITY)?.map(|q| q.si);
    let shrinkage = kind_arg(args, "shrinkage", Dim::NONE, Kind::Plain)?.unwrap_or(0.0);
    let target = kind_arg(args, "MR", Dim::NONE, Kind::Plain)?.unwrap_or(0.01);
    let cells = opt_count(args, "cells", 100)?;
    args.finish()?;
    if ea != 0.0 && temperature.is_none() {
        return Err(Diagnostic::error(
            ea_span,
            "an activation energy needs the product temperature `T`",
        ));
    }
    let t_k = temperature.unwrap_or(293.15);
    let diffusivity = Diffusivity {
        reference_m2_per_s: d,
        activation_energy_j_per_mol: ea,
        reference_temperature_k: t_ref.unwrap_or(t_k),
        moisture_coefficient: a,
        reference_moisture: xe,
    };
    let surface = alpha.map_or(Surface::Equilibrium, |alpha_m_per_s| Surface::Film {
        alpha_m_per_s,
    });
    let problem = DiffusionProblem {
        body,
        x_initial: x0,
        x_equilibrium: xe,
        diffusivity,
        temperature: ProductTemperature::Constant(t_k),
        surface,
        shrinkage,
    };
    let settings = SolverSettings {
        cells,
        target_ratio: target,
        ..SolverSettings::default()
    };
    Ok((problem, settings))
}

fn diffusion_drying(args: &mut Args) -> Result<Value, Diagnostic> {
    let (problem, settings) = diffusion_problem(args)?;
    if settings.cells < 20 {
        args.warn(format!(
            "{} cells is a coarse mesh; use 50 or more for 0.1 % accuracy",
            settings.cells
        ));
    }
    let run = solve_drying(&problem, &settings).map_err(|e| kinetics_error(args.call_span, e))?;
    Ok(Value::Record(diffusion_record(&problem, &settings, &run)))
}

fn diffusion_record(
    problem: &DiffusionProblem,
    settings: &SolverSettings,
    run: &DiffusionRun,
) -> Record {
    let (x0, xe) = (problem.x_initial, problem.x_equilibrium);
    let curve = Table {
        title: Some(format!(
            "diffusion drying, {} ({} cells, {} steps)",
            problem.body.shape.name(),
            settings.cells,
            run.steps
        )),
        columns: vec![
            column("t", "h", run.times_s.iter().map(|t| hours(*t)).collect()),
            Column {
                name: "MR".into(),
                unit: None,
                cells: run.ratios.iter().map(|r| number(*r)).collect(),
            },
            column(
                "X",
                "db",
                run.ratios
                    .iter()
                    .map(|r| moisture(xe + r * (x0 - xe)))
                    .collect(),
            ),
        ],
    };
    Record::new("diffusion_run")
        .with("t", hours(run.time_to_target_s))
        .with("MR", number(settings.target_ratio))
        .with(
            "L_end",
            shown(run.final_length_m, Dim::LENGTH, Kind::Plain, "mm"),
        )
        .with("steps", number(run.steps as f64))
        .with("curve", Value::Table(curve))
}

fn fit_diffusivity(args: &mut Args) -> Result<Value, Diagnostic> {
    let table = table_arg(args, "data")?;
    let (t_name, t_span) = column_name(args, "time", "t")?;
    let (r_name, r_span) = column_name(args, "ratio", "MR")?;
    let body = body_arg(args)?;
    let method = opt_text(args, "method")?;
    args.finish()?;
    let times = column_si(&table, &t_name, t_span, Dim::TIME, Kind::Plain)?;
    let ratios = column_si(&table, &r_name, r_span, Dim::NONE, Kind::Plain)?;
    let slope = diffusivity_from_slope(&body, &times, &ratios, 0.6);
    let (fit, words) = match method.as_ref().map(|m| (m.0.as_str(), m.1)) {
        Some(("slope", _)) => (
            slope.map_err(|e| kinetics_error(args.call_span, e))?,
            "slope of ln MR against time (MR <= 0.6), first term of Crank's series",
        ),
        None | Some(("series", _)) => {
            let start = slope.map(|s| s.d_m2_per_s).unwrap_or(1e-10);
            (
                diffusivity_nonlinear(&body, &times, &ratios, start)
                    .map_err(|e| kinetics_error(args.call_span, e))?,
                "nonlinear least squares of Crank's full series",
            )
        }
        Some((other, span)) => {
            return Err(Diagnostic::error(span, format!("unknown method `{other}`"))
                .with_hint("methods: \"series\" (default), \"slope\""))
        }
    };
    Ok(Value::Record(
        Record::new("diffusivity_fit")
            .with(
                "D",
                shown(fit.d_m2_per_s, Dim::DIFFUSIVITY, Kind::Plain, "m^2/s"),
            )
            .with(
                "D_se",
                shown(
                    fit.std_error_m2_per_s,
                    Dim::DIFFUSIVITY,
                    Kind::Plain,
                    "m^2/s",
                ),
            )
            .with("R2", number(fit.r_squared))
            .with("n", number(fit.points as f64))
            .with("method", Value::Str(words.into())),
    ))
}

fn arrhenius_diffusivity(args: &mut Args) -> Result<Value, Diagnostic> {
    let temps = quantity_list(args, "T", Dim::TEMPERATURE, Kind::AbsoluteTemperature)?;
    let ds = quantity_list(args, "D", Dim::DIFFUSIVITY, Kind::Plain)?;
    args.finish()?;
    let fit = arrhenius_fit(&temps, &ds).map_err(|e| kinetics_error(args.call_span, e))?;
    let ea = |v: f64| shown(v, Dim::MOLAR_ENERGY, Kind::Plain, "kJ/mol");
    Ok(Value::Record(
        Record::new("arrhenius_fit")
            .with(
                "D0",
                shown(fit.d0_m2_per_s, Dim::DIFFUSIVITY, Kind::Plain, "m^2/s"),
            )
            .with("Ea", ea(fit.activation_energy_j_per_mol))
            .with("Ea_se", ea(fit.activation_energy_std_error))
            .with("R2", number(fit.r_squared)),
    ))
}

// ---------------------------------------------------------------------------
// Thin-layer models
// ---------------------------------------------------------------------------

fn model_arg(args: &mut Args) -> Result<ThinLayerModel, Diagnostic> {
    let (name, span) = opt_text(args, "model")?.ok_or_else(|| {
        Diagnostic::error(args.call_span, "`fit_drying_model` needs `model`")
            .with_hint(model_names())
    })?;
    ThinLayerModel::from_key(&name).ok_or_else(|| {
        Diagnostic::error(span, format!("unknown thin-layer model `{name}`"))
            .with_hint(model_names())
    })
}

fn model_names() -> String {
    let names: Vec<&str> = ThinLayerModel::ALL.iter().map(|m| m.name()).collect();
    format!("models: {}", names.join(", "))
}

fn thin_layer_data(args: &mut Args) -> Result<(Vec<f64>, Vec<f64>, f64), Diagnostic> {
    let table = table_arg(args, "data")?;
    let (t_name, t_span) = column_name(args, "time", "t")?;
    let (r_name, r_span) = column_name(args, "ratio", "MR")?;
    let unit = args
        .opt_quantity("time_unit", Dim::TIME)?
        .map_or(3600.0, |q| q.si);
    let times = column_si(&table, &t_name, t_span, Dim::TIME, Kind::Plain)?;
    let ratios = column_si(&table, &r_name, r_span, Dim::NONE, Kind::Plain)?;
    Ok((times, ratios, unit))
}

fn thin_layer_payload(
    fit: &ThinLayerFit,
    times: &[f64],
    ratios: &[f64],
) -> Result<FitPayload, KineticsError> {
    // Re-run the shared fitter once from the converged point to get its full
    // result (covariance, intervals, residuals) for the fit record.
    let in_unit: Vec<f64> = times.iter().map(|t| t / fit.time_unit_s).collect();
    let model = fit.model;
    let f = |p: &[f64], t: f64| model.ratio(p, t);
    let bounds = vec![(f64::NEG_INFINITY, f64::INFINITY); fit.params.len()];
    let result = least_squares(&f, &in_unit, ratios, &fit.params, &bounds).map_err(|e| {
        KineticsError::NoConvergence {
            what: "thin-layer fit",
            detail: e.to_string(),
        }
    })?;
    let unit_word = time_unit_word(fit.time_unit_s);
    Ok(FitPayload {
        model: format!("{} (t in {unit_word})", model.name()),
        params: model
            .parameter_names()
            .iter()
            .map(|n| QuantitySpec::new(*n, Dim::NONE, Kind::Plain))
            .collect(),
        x: QuantitySpec::new("t", Dim::TIME, Kind::Plain).shown_in("h"),
        y: QuantitySpec::new("MR", Dim::NONE, Kind::Plain),
        x_si: times.to_vec(),
        result,
    })
}

fn time_unit_word(unit_s: f64) -> String {
    match unit_s {
        3600.0 => "h".into(),
        60.0 => "min".into(),
        1.0 => "s".into(),
        86400.0 => "d".into(),
        u => format!("({u} s)"),
    }
}

fn fit_drying_model(args: &mut Args) -> Result<Value, Diagnostic> {
    let model = model_arg(args)?;
    let (times, ratios, unit) = thin_layer_data(args)?;
    args.finish()?;
    let fit = fit_thin_layer(model, &times, &ratios, unit)
        .map_err(|e| kinetics_error(args.call_span, e))?;
    let payload =
        thin_layer_payload(&fit, &times, &ratios).map_err(|e| kinetics_error(args.call_span, e))?;
    Ok(Value::Record(fit_record(payload)))
}

fn compare_drying_models(args: &mut Args) -> Result<Value, Diagnostic> {
    let (times, ratios, unit) = thin_layer_data(args)?;
    args.finish()?;
    let mut payloads = Vec::new();
    for model in ThinLayerModel::ALL {
        match fit_thin_layer(model, &times, &ratios, unit)
            .and_then(|f| thin_layer_payload(&f, &times, &ratios))
        {
            Ok(p) => payloads.push(p),
            Err(e) => args.warn(format!("{} left out of the comparison: {e}", model.name())),
        }
    }
    if payloads.is_empty() {
        return Err(Diagnostic::error(
            args.call_span,
            "no thin-layer model could be fitted to these data",
        ));
    }
    let refs: Vec<&FitPayload> = payloads.iter().collect();
    let table = comparison_table(&refs);
    let best = payloads
        .iter()
        .min_by(|a, b| a.result.aic.total_cmp(&b.result.aic))
        .map(|p| p.model.clone())
        .unwrap_or_default();
    let fits: Vec<Value> = payloads
        .into_iter()
        .map(|p| Value::Record(fit_record(p)))
        .collect();
    Ok(Value::Record(
        Record::new("drying_model_comparison")
            .with("table", Value::Table(table))
            .with("best", Value::Str(best))
            .with("fits", Value::List(fits)),
    ))
}

// ---------------------------------------------------------------------------
// Registry
// ---------------------------------------------------------------------------

const SHAPE_PARAMS: [Param; 4] = [
    Param {
        name: "shape",
        unit: "text",
        default: Some("\"slab\""),
        doc: "\"slab\", \"cylinder\" (infinite) or \"sphere\"",
    },
    Param {
        name: "thickness",
        unit: "mm",
        default: None,
        doc: "slab thickness",
    },
    Param {
        name: "faces",
        unit: "-",
        default: Some("2"),
        doc: "slab faces drying: 2, or 1 with the other sealed",
    },
    Param {
        name: "radius",
        unit: "mm",
        default: None,
        doc: "cylinder or sphere radius",
    },
];

const DRYING_TEST_PARAMS: &[Param] = &[
    Param {
        name: "data",
        unit: "table",
        default: None,
        doc: "readings: a time column and a sample-mass column",
    },
    Param {
        name: "time",
        unit: "text",
        default: Some("\"t\""),
        doc: "name of the time column",
    },
    Param {
        name: "mass",
        unit: "text",
        default: Some("\"m\""),
        doc: "name of the sample-mass column",
    },
    Param {
        name: "solid",
        unit: "kg",
        default: None,
        doc: "dry-solid mass of the sample",
    },
    Param {
        name: "area",
        unit: "m^2",
        default: None,
        doc: "exposed drying area of the sample",
    },
    Param {
        name: "window",
        unit: "-",
        default: Some("7"),
        doc: "Savitzky-Golay window, odd number of readings",
    },
    Param {
        name: "order",
        unit: "-",
        default: Some("2"),
        doc: "Savitzky-Golay polynomial order",
    },
];

const SPAN_PARAMS: &[Param] = &[
    Param {
        name: "curve",
        unit: "rate_curve",
        default: None,
        doc: "rate curve (or a drying test)",
    },
    Param {
        name: "load",
        unit: "kg/m^2",
        default: None,
        doc: "dry solid per exposed area, Ls/A",
    },
    Param {
        name: "from",
        unit: "db",
        default: None,
        doc: "start moisture",
    },
    Param {
        name: "to",
        unit: "db",
        default: None,
        doc: "final moisture (above equilibrium)",
    },
];

const CURVE_PARAMS: &[Param] = &[
    SPAN_PARAMS[0],
    SPAN_PARAMS[1],
    SPAN_PARAMS[2],
    SPAN_PARAMS[3],
    Param {
        name: "points",
        unit: "-",
        default: Some("41"),
        doc: "number of moistures on the curve",
    },
];

const STAGE_PARAMS: &[Param] = &[
    SPAN_PARAMS[0],
    SPAN_PARAMS[1],
    SPAN_PARAMS[2],
    SPAN_PARAMS[3],
    Param {
        name: "conditions",
        unit: "text",
        default: Some("\"\""),
        doc: "words describing the air and product, kept with the stages",
    },
];

const CRANK_RATIO_PARAMS: &[Param] = &[
    Param {
        name: "D",
        unit: "m^2/s",
        default: None,
        doc: "effective moisture diffusivity",
    },
    Param {
        name: "t",
        unit: "h",
        default: None,
        doc: "drying time",
    },
    SHAPE_PARAMS[0],
    SHAPE_PARAMS[1],
    SHAPE_PARAMS[2],
    SHAPE_PARAMS[3],
    Param {
        name: "Bi",
        unit: "-",
        default: Some("none (surface at equilibrium)"),
        doc: "mass-transfer Biot number alpha L / D",
    },
];

const CRANK_TIME_PARAMS: &[Param] = &[
    Param {
        name: "D",
        unit: "m^2/s",
        default: None,
        doc: "effective moisture diffusivity",
    },
    Param {
        name: "MR",
        unit: "-",
        default: None,
        doc: "target moisture ratio (X - Xe)/(X0 - Xe), 0..1",
    },
    SHAPE_PARAMS[0],
    SHAPE_PARAMS[1],
    SHAPE_PARAMS[2],
    SHAPE_PARAMS[3],
    Param {
        name: "Bi",
        unit: "-",
        default: Some("none (surface at equilibrium)"),
        doc: "mass-transfer Biot number alpha L / D",
    },
];

const DIFFUSION_PARAMS: &[Param] = &[
    SHAPE_PARAMS[0],
    SHAPE_PARAMS[1],
    SHAPE_PARAMS[2],
    SHAPE_PARAMS[3],
    Param {
        name: "X0",
        unit: "db",
        default: None,
        doc: "initial uniform moisture",
    },
    Param {
        name: "Xe",
        unit: "db",
        default: None,
        doc: "equilibrium moisture with the air",
    },
    Param {
        name: "D",
        unit: "m^2/s",
        default: None,
        doc: "diffusivity at T_ref and X = Xe",
    },
    Param {
        name: "T",
        unit: "degC",
        default: Some("20 degC"),
        doc: "product temperature",
    },
    Param {
        name: "Ea",
        unit: "kJ/mol",
        default: Some("0 kJ/mol"),
        doc: "activation energy of D",
    },
    Param {
        name: "T_ref",
        unit: "degC",
        default: Some("T"),
        doc: "temperature at which D is given",
    },
    Param {
        name: "moisture_coefficient",
        unit: "-",
        default: Some("0"),
        doc: "a in D = D exp(a (X - Xe))",
    },
    Param {
        name: "alpha",
        unit: "m/s",
        default: Some("none (surface at equilibrium)"),
        doc: "surface mass-transfer coefficient on the solid side",
    },
    Param {
        name: "shrinkage",
        unit: "-",
        default: Some("0"),
        doc: "b in V/V0 = (1 + b X)/(1 + b X0)",
    },
    Param {
        name: "MR",
        unit: "-",
        default: Some("0.01"),
        doc: "stop at this moisture ratio",
    },
    Param {
        name: "cells",
        unit: "-",
        default: Some("100"),
        doc: "finite-volume cells",
    },
];

const FIT_D_PARAMS: &[Param] = &[
    Param {
        name: "data",
        unit: "table",
        default: None,
        doc: "readings: time and moisture ratio columns",
    },
    Param {
        name: "time",
        unit: "text",
        default: Some("\"t\""),
        doc: "name of the time column",
    },
    Param {
        name: "ratio",
        unit: "text",
        default: Some("\"MR\""),
        doc: "name of the moisture-ratio column",
    },
    SHAPE_PARAMS[0],
    SHAPE_PARAMS[1],
    SHAPE_PARAMS[2],
    SHAPE_PARAMS[3],
    Param {
        name: "method",
        unit: "text",
        default: Some("\"series\""),
        doc: "\"series\" (full nonlinear) or \"slope\" (ln MR slope)",
    },
];

const THIN_LAYER_PARAMS: &[Param] = &[
    Param { name: "data", unit: "table", default: None, doc: "readings: time and moisture ratio columns" },
    Param { name: "model", unit: "text", default: None, doc: "Lewis, Page, modified Page, Henderson-Pabis, logarithmic, two-term, two-term exponential, Wang-Singh, Midilli" },
    Param { name: "time", unit: "text", default: Some("\"t\""), doc: "name of the time column" },
    Param { name: "ratio", unit: "text", default: Some("\"MR\""), doc: "name of the moisture-ratio column" },
    Param { name: "time_unit", unit: "h", default: Some("1 h"), doc: "time unit of the rate constants" },
];

const COMPARE_PARAMS: &[Param] = &[
    THIN_LAYER_PARAMS[0],
    THIN_LAYER_PARAMS[2],
    THIN_LAYER_PARAMS[3],
    THIN_LAYER_PARAMS[4],
];

const CURVE_SOURCE: &str = "McCabe, Smith & Harriott, Unit Operations of Chemical Engineering, 7th ed., ch. 24; Treybal, Mass-Transfer Operations, 3rd ed., ch. 12";
const CRANK_SOURCE: &str = "J. Crank, The Mathematics of Diffusion, 2nd ed., Oxford 1975, ch. 4-6";

/// The kinetics family.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "drying_test",
        family: "kinetics",
        params: DRYING_TEST_PARAMS,
        returns: "drying_test record: load, Rc, Rc_se, Xc, Xc_low, Xc_high, X_zero_rate, points (t, X, X smoothed, R), curve",
        doc: "Process a batch drying test: sample masses over time become dry-basis moisture X = (m - Ls)/Ls and drying rate R = -(Ls/A) dX/dt, differentiated by a Savitzky-Golay window. The constant-rate period and the critical moisture Xc are found by a two-segment least-squares fit of R against X, with standard error of Rc and an approximate one-standard-error interval of Xc. Readings before the rate first reaches 90 % of its peak are treated as the warm-up (settling) period.",
        method: "Savitzky-Golay local least-squares derivative; two-segment (hinge) regression with profile interval",
        source: "Savitzky & Golay, Anal. Chem. 36 (1964) 1627; Bates & Watts, Nonlinear Regression Analysis (1988) ch. 6; McCabe, Smith & Harriott ch. 24",
        validity: "strictly increasing times; masses at or above the dry-solid mass; at least `window` readings and 6 after the warm-up",
        example: "drying_test(lab, solid: 0.120 kg, area: 0.0225 m^2)",
        func: drying_test,
    },
    Builtin {
        name: "measured_rate_curve",
        family: "kinetics",
        params: &[
            Param { name: "data", unit: "table", default: None, doc: "a moisture column and a drying-rate column" },
            Param { name: "moisture", unit: "text", default: Some("\"X\""), doc: "name of the moisture column (db)" },
            Param { name: "rate", unit: "text", default: Some("\"R\""), doc: "name of the rate column (mass per area per time)" },
        ],
        returns: "rate_curve record",
        doc: "A rate curve from a table of drying rate against moisture, interpolated by a monotone piecewise cubic (it never overshoots the data, so rates stay non-negative). The lowest moisture is taken as the equilibrium.",
        method: "monotone piecewise cubic Hermite interpolation (PCHIP)",
        source: "Fritsch & Carlson, SIAM J. Numer. Anal. 17 (1980) 238; Fritsch & Butland, SIAM J. Sci. Stat. Comput. 5 (1984) 300",
        validity: "distinct moistures, rates >= 0; no extrapolation above the highest moisture",
        example: "measured_rate_curve(rates, moisture: \"X\", rate: \"R\")",
        func: measured_rate_curve,
    },
    Builtin {
        name: "falling_rate_curve",
        family: "kinetics",
        params: &[
            Param { name: "Rc", unit: "kg/(m^2*h)", default: None, doc: "constant drying rate" },
            Param { name: "Xc", unit: "db", default: None, doc: "critical moisture" },
            Param { name: "Xe", unit: "db", default: Some("0 db"), doc: "equilibrium moisture" },
            Param { name: "n", unit: "-", default: Some("1"), doc: "falling-rate exponent: R = Rc ((X - Xe)/(Xc - Xe))^n" },
        ],
        returns: "rate_curve record",
        doc: "A constant drying rate Rc down to the critical moisture Xc, then a falling rate proportional to the free moisture (n = 1) or to a power of it.",
        method: "constant + falling rate; closed-form drying time",
        source: CURVE_SOURCE,
        validity: "Rc > 0, Xc > Xe >= 0, n > 0",
        example: "falling_rate_curve(Rc: 1.6 kg/(m^2*h), Xc: 0.55 db, Xe: 0.06 db)",
        func: falling_rate_curve,
    },
    Builtin {
        name: "at_constant_rate",
        family: "kinetics",
        params: &[
            Param { name: "curve", unit: "rate_curve", default: None, doc: "rate curve (or a drying test)" },
            Param { name: "Rc", unit: "kg/(m^2*h)", default: None, doc: "the constant rate under the new air (for example wet_surface(...).Rc)" },
        ],
        returns: "rate_curve record",
        doc: "Carry a rate curve to other air: every rate is multiplied by Rc_new / Rc_curve, keeping Xc and the shape of the falling period. This is the usual assumption when the falling rate is set by the surface; it does not hold when internal diffusion controls the falling period.",
        method: "rates proportional to the constant rate",
        source: CURVE_SOURCE,
        validity: "falling period controlled by the surface (common practice); Xc itself moves somewhat with the drying rate",
        example: "at_constant_rate(test, Rc: wet_surface(plant_air, h: 30 W/(m^2*K)).Rc)",
        func: at_constant_rate,
    },
    Builtin {
        name: "drying_time",
        family: "kinetics",
        params: SPAN_PARAMS,
        returns: "time, h",
        doc: "Time to dry from `from` to `to` on a rate curve: t = (Ls/A) * integral from X2 to X1 of dX / R(X). Closed form for the constant + falling models, adaptive Gauss-Kronrod quadrature for a measured curve. A target at or below the equilibrium moisture is an error (the time would be infinite).",
        method: "closed form or adaptive G7-K15 quadrature (relative 1e-10)",
        source: "McCabe, Smith & Harriott ch. 24; Piessens et al., QUADPACK (1983)",
        validity: "equilibrium < to < from, and from within a measured curve's range",
        example: "drying_time(test, load: 18 kg/m^2, from: 1.3 db, to: 0.12 db)",
        func: drying_time,
    },
    Builtin {
        name: "drying_curve",
        family: "kinetics",
        params: CURVE_PARAMS,
        returns: "table: t, X, R",
        doc: "The batch drying curve X(t) implied by a rate curve and load, at evenly spaced moistures from `from` to `to`, with the rate at each.",
        method: "drying_time between consecutive moistures",
        source: CURVE_SOURCE,
        validity: "as drying_time",
        example: "drying_curve(test, load: 18 kg/m^2, from: 1.3 db, to: 0.12 db)",
        func: drying_curve,
    },
    Builtin {
        name: "moisture_ratios",
        family: "kinetics",
        params: &[
            Param { name: "test", unit: "drying_test", default: None, doc: "a processed drying test" },
            Param { name: "Xe", unit: "db", default: None, doc: "equilibrium moisture with the test air" },
        ],
        returns: "table: t, MR",
        doc: "Moisture ratios MR = (X - Xe)/(X0 - Xe) of a drying test's readings, for thin-layer models and diffusivity fits.",
        method: "definition of the moisture ratio",
        source: "Crank (1975) ch. 4; Mujumdar (ed.), Handbook of Industrial Drying, 4th ed., ch. 1",
        validity: "0 <= Xe < X0",
        example: "moisture_ratios(test, Xe: 0.06 db)",
        func: moisture_ratios,
    },
    Builtin {
        name: "drying_stages",
        family: "kinetics",
        params: STAGE_PARAMS,
        returns: "table: stage, X start, X end, duration, R start, R end",
        doc: "The drying run split into its constant-rate and falling-rate periods, each with its moisture span, duration and rates, for chaining into dryer models.",
        method: "as drying_time, split at the critical moisture",
        source: CURVE_SOURCE,
        validity: "as drying_time",
        example: "drying_stages(curve, load: 18 kg/m^2, from: 1.3 db, to: 0.12 db, conditions: \"plant air 85 degC\")",
        func: drying_stages,
    },
    Builtin {
        name: "crank_ratio",
        family: "kinetics",
        params: CRANK_RATIO_PARAMS,
        returns: "moisture ratio (X - Xe)/(X0 - Xe)",
        doc: "Mean moisture ratio of a slab, infinite cylinder or sphere drying by diffusion with constant D from uniform moisture: Crank's series, with the surface at equilibrium or through a surface film (Biot number). Bessel roots are computed.",
        method: "Crank's series solutions; short-time expansions below Fo = 1e-8",
        source: CRANK_SOURCE,
        validity: "constant D, no shrinkage, uniform initial moisture",
        example: "crank_ratio(D: 3e-10 m^2/s, t: 4 h, thickness: 8 mm)",
        func: crank_ratio,
    },
    Builtin {
        name: "crank_time",
        family: "kinetics",
        params: CRANK_TIME_PARAMS,
        returns: "time, h",
        doc: "Time for the mean moisture ratio to fall to MR by Crank's series (inverse of crank_ratio), found by Brent's method between the one-term bounds.",
        method: "Crank's series; Brent root finding",
        source: CRANK_SOURCE,
        validity: "0 < MR < 1; constant D",
        example: "crank_time(D: 3e-10 m^2/s, MR: 0.05, thickness: 8 mm)",
        func: crank_time,
    },
    Builtin {
        name: "diffusion_drying",
        family: "kinetics",
        params: DIFFUSION_PARAMS,
        returns: "diffusion_run record: t (to MR), MR, L_end, steps, curve (t, MR, X)",
        doc: "Drying by internal diffusion with D depending on moisture and temperature, shrinkage and a surface film, solved by finite volumes (cells graded toward the surface) and variable-step BDF2 with error control; stops at the target moisture ratio. D(X, T) = D exp(-Ea/R (1/T - 1/T_ref)) exp(a (X - Xe)).",
        method: "finite volumes on a dry-solid mesh; BDF2 with Milne error estimate; Newton with a tridiagonal solve",
        source: "Crank (1975) ch. 4-6 for the equations; Hairer & Wanner, Solving ODEs II (1996) for BDF2",
        validity: "checked against Crank's series within 0.1 % over MR 1 to 0.01; isothermal product",
        example: "diffusion_drying(thickness: 8 mm, X0: 3.0 db, Xe: 0.08 db, D: 4e-10 m^2/s)",
        func: diffusion_drying,
    },
    Builtin {
        name: "fit_diffusivity",
        family: "kinetics",
        params: FIT_D_PARAMS,
        returns: "diffusivity_fit record: D, D_se, R2, n, method",
        doc: "Effective moisture diffusivity from moisture-ratio readings: by default a nonlinear least-squares fit of Crank's full series; with method \"slope\" the classic slope of ln MR against time over MR <= 0.6.",
        method: "Gauss-Newton on ln D with Crank's series; or linear regression of ln MR",
        source: CRANK_SOURCE,
        validity: "isothermal readings, uniform initial moisture, falling-rate period",
        example: "fit_diffusivity(readings, thickness: 6 mm)",
        func: fit_diffusivity,
    },
    Builtin {
        name: "arrhenius_diffusivity",
        family: "kinetics",
        params: &[
            Param { name: "T", unit: "list of degC", default: None, doc: "product temperatures" },
            Param { name: "D", unit: "list of m^2/s", default: None, doc: "effective diffusivities at those temperatures" },
        ],
        returns: "arrhenius_fit record: D0, Ea, Ea_se, R2",
        doc: "Activation energy of the effective diffusivity: D = D0 exp(-Ea/(R T)), a straight line of ln D against 1/T.",
        method: "linear regression of ln D on 1/T",
        source: "Mujumdar (ed.), Handbook of Industrial Drying, 4th ed., ch. 1",
        validity: "at least two temperatures (three for a standard error)",
        example: "arrhenius_diffusivity(T: [50 degC, 60 degC, 70 degC], D: [2.1e-10 m^2/s, 3.3e-10 m^2/s, 4.9e-10 m^2/s])",
        func: arrhenius_diffusivity,
    },
    Builtin {
        name: "fit_drying_model",
        family: "kinetics",
        params: THIN_LAYER_PARAMS,
        returns: "fit record (parameters, R2, RMSE, chi2, AIC, BIC, residuals)",
        doc: "Fit a thin-layer drying model to moisture-ratio readings. Rate constants are plain numbers for time in `time_unit` (the model name says which, e.g. `Page (t in h)`: k in 1/h^n).",
        method: "Levenberg-Marquardt (shared fitter) from linearised starts",
        source: "Lewis 1921; Page 1949; Overhults et al. 1973; Henderson & Pabis 1961; Yagcioglu et al. 1999; Henderson 1974; Sharaf-Eldeen et al. 1980; Wang & Singh 1978; Midilli et al. 2002",
        validity: "thin layers at constant air conditions; empirical, not for extrapolation",
        example: "fit_drying_model(readings, model: \"Page\")",
        func: fit_drying_model,
    },
    Builtin {
        name: "compare_drying_models",
        family: "kinetics",
        params: COMPARE_PARAMS,
        returns: "record: table (R2, RMSE, chi2, AIC, BIC, Akaike weight), best, fits",
        doc: "Fit all nine thin-layer models and compare them (lower AIC is better).",
        method: "as fit_drying_model; least-squares AIC",
        source: "Burnham & Anderson (2002) sec. 2.2 for AIC; model sources as fit_drying_model",
        validity: "as fit_drying_model",
        example: "compare_drying_models(readings)",
        func: compare_drying_models,
    },
];
