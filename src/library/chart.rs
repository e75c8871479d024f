//! The `psychrometric_chart` built-in: the chart's lines from the air engine
//! ([`crate::engine::psychrometric_chart`]) with the worksheet's air states and
//! process path drawn on it, returned as a plot value (the renderer only draws).

use std::sync::Arc;

use uom::si::f64::Pressure;
use uom::si::pressure::pascal;

use crate::diag::Diagnostic;
use crate::engine::psychrometric_chart::{chart_lines, ChartLines, ChartWindow, Line};
use crate::library::{type_word, Args, Builtin, Param};
use crate::render::plot::{AxisUnits, Curve, PlotBuilder};
use crate::render::RenderError;
use crate::units::{lookup_unit, Dim, Kind, Quantity, Unit};
use crate::value::{SeriesStyle, Value};

/// The built-ins of the `chart` family.
pub const BUILTINS: &[Builtin] = &[Builtin {
    name: "psychrometric_chart",
    family: "chart",
    params: &[
        Param { name: "p", unit: "kPa", default: Some("101.325 kPa"), doc: "total pressure of the chart" },
        Param { name: "T_min", unit: "degC", default: Some("0 degC"), doc: "lowest dry-bulb shown" },
        Param { name: "T_max", unit: "degC", default: Some("50 degC"), doc: "highest dry-bulb shown" },
        Param { name: "w_max", unit: "g/kg_da", default: Some("30 g/kg_da"), doc: "highest humidity ratio shown" },
        Param { name: "states", unit: "list of air", default: Some("[]"), doc: "air states to mark" },
        Param { name: "labels", unit: "list of text", default: Some("[\"1\", \"2\", ...]"), doc: "names of the marked states" },
        Param { name: "path", unit: "list of air", default: Some("[]"), doc: "states joined in order as a process line" },
    ],
    returns: "plot",
    doc: "A psychrometric chart: dry-bulb against humidity ratio at one total pressure, with the saturation curve, relative-humidity lines every 10 %, thermodynamic wet-bulb lines every 5 degC and humid-volume lines every 0.05 m^3/kg dry air, and the given air states and process path drawn on it.",
    method: "Each line is a locus of the humid-air engine's own states (Hyland-Wexler saturation with enhancement factor, real-gas humid-air properties, thermodynamic wet-bulb from the adiabatic-saturation balance); humid-volume points are solved with Brent's method.",
    source: "ASHRAE Handbook - Fundamentals (2017), ch. 1, as implemented by the air built-ins (docs/methods/air.md)",
    validity: "dry-bulb -40..350 degC; total pressure 1 kPa..10 MPa",
    example: "psychrometric_chart(states: [amb, hot, out], labels: [\"ambient\", \"heated\", \"exhaust\"], path: [amb, hot, out])",
    func: psychrometric_chart,
}];

fn unit(symbol: &str) -> Unit {
    // Symbols from the unit catalogue; present in every build.
    lookup_unit(symbol).unwrap_or_else(Unit::one)
}

fn psychrometric_chart(args: &mut Args) -> Result<Value, Diagnostic> {
    let p = args
        .opt_quantity("p", Dim::PRESSURE)?
        .map_or(101_325.0, |q| q.si);
    let t_min = args
        .opt_quantity("T_min", Dim::TEMPERATURE)?
        .map_or(273.15, |q| q.si);
    let t_max = args
        .opt_quantity("T_max", Dim::TEMPERATURE)?
        .map_or(323.15, |q| q.si);
    let w_max = args
        .opt_quantity("w_max", Dim::NONE)?
        .map_or(0.030, |q| q.si);
    let states = air_list(args, "states")?;
    let labels = text_list(args, "labels")?;
    let path = air_list(args, "path")?;
    args.finish()?;
    let window = ChartWindow {
        t_min_k: t_min,
        t_max_k: t_max,
        w_max_kg_per_kg_da: w_max,
        pressure: Pressure::new::<pascal>(p),
    };
    let lines = chart_lines(&window)
        .map_err(|e| Diagnostic::error(args.call_span, format!("cannot draw the chart: {e}")))?;
    warn_outside(args, &states, &window);
    let plot = build(&lines, p, &states, &labels, &path)
        .map_err(|e| Diagnostic::error(args.call_span, e.to_string()))?;
    Ok(Value::Plot(Arc::new(plot)))
}

/// (T, w) quantities of each air record in a list argument.
fn air_list(args: &mut Args, name: &str) -> Result<Vec<(Quantity, Quantity)>, Diagnostic> {
    let Some(arg) = args.take(name) else {
        return Ok(Vec::new());
    };
    let items = match arg.value {
        Value::List(items) => items,
        single @ Value::Record(_) => vec![single],
        other => {
            return Err(Diagnostic::error(
                arg.span,
                format!(
                    "`{name}` must be a list of air states, found {}",
                    type_word(&other)
                ),
            ))
        }
    };
    items
        .iter()
        .enumerate()
        .map(|(i, v)| state_point(v).ok_or_else(|| not_air(arg.span, name, i, v)))
        .collect()
}

fn state_point(v: &Value) -> Option<(Quantity, Quantity)> {
    let Value::Record(r) = v else { return None };
    match (&*r.type_name, r.get("T"), r.get("w")) {
        ("air", Some(Value::Quantity(t, _)), Some(Value::Quantity(w, _))) => Some((*t, *w)),
        _ => None,
    }
}

fn not_air(span: crate::diag::Span, name: &str, i: usize, v: &Value) -> Diagnostic {
    Diagnostic::error(
        span,
        format!(
            "item {} of `{name}` is {}, not an air state",
            i + 1,
            type_word(v)
        ),
    )
    .with_hint("make one with air(T: ..., rh: ...)")
}

fn text_list(args: &mut Args, name: &str) -> Result<Vec<String>, Diagnostic> {
    let Some(arg) = args.take(name) else {
        return Ok(Vec::new());
    };
    let items = match arg.value {
        Value::List(items) => items,
        other => vec![other],
    };
    items
        .into_iter()
        .map(|v| match v {
            Value::Str(s) => Ok(s),
            other => Err(Diagnostic::error(
                arg.span,
                format!(
                    "`{name}` must be a list of texts, found {}",
                    type_word(&other)
                ),
            )),
        })
        .collect()
}

fn warn_outside(args: &mut Args, states: &[(Quantity, Quantity)], window: &ChartWindow) {
    for (i, (t, w)) in states.iter().enumerate() {
        let inside = (window.t_min_k..=window.t_max_k).contains(&t.si)
            && (0.0..=window.w_max_kg_per_kg_da).contains(&w.si);
        if !inside {
            args.warn(format!(
                "state {} lies outside the chart window; widen T_min, T_max or w_max to see it",
                i + 1
            ));
        }
    }
}

fn temperature(t_k: f64) -> Quantity {
    Quantity::new(t_k, Dim::TEMPERATURE, Kind::AbsoluteTemperature)
}

fn ratio(w: f64) -> Quantity {
    Quantity::new(w, Dim::NONE, Kind::HumidityRatio)
}

fn curve(label: &str, line: &Line) -> Curve {
    Curve::new(
        label,
        line.iter().map(|p| temperature(p.0)).collect(),
        line.iter().map(|p| ratio(p.1)).collect(),
    )
}

/// Arrange the chart: lines first (reference styles), then the process and the states.
fn build(
    lines: &ChartLines,
    p_pa: f64,
    states: &[(Quantity, Quantity)],
    labels: &[String],
    path: &[(Quantity, Quantity)],
) -> Result<crate::value::Plot, RenderError> {
    let title = format!(
        "Psychrometric chart at {} kPa",
        crate::render::number::format_sig(p_pa / 1000.0, 6)
    );
    let units = AxisUnits {
        x: Some(unit("degC")),
        y: Some(unit("g").div(&unit("kg_da"))),
    };
    let mut b = PlotBuilder::new(title, "dry-bulb temperature", "humidity ratio").units(units);
    b.series(&curve("saturation", &lines.saturation), SeriesStyle::Line)?;
    add_rh_lines(&mut b, lines)?;
    add_wet_bulb_lines(&mut b, lines)?;
    add_volume_lines(&mut b, lines)?;
    add_states(&mut b, states, labels, path)?;
    b.build()
}

/// The legend names a family of lines once, on its first member.
fn family_label(i: usize, label: &'static str) -> &'static str {
    if i == 0 {
        label
    } else {
        ""
    }
}

fn add_rh_lines(b: &mut PlotBuilder, lines: &ChartLines) -> Result<(), RenderError> {
    for (i, (rh, line)) in lines.relative_humidity.iter().enumerate() {
        let label = family_label(i, "relative humidity, 10 % steps");
        b.series(&curve(label, line), SeriesStyle::Thin)?;
        // Every other line is labelled, so labels do not crowd near saturation.
        if i % 2 == 1 || i == 0 {
            end_label(b, line.last(), &format!("{:.0} %", rh * 100.0))?;
        }
    }
    Ok(())
}

fn add_wet_bulb_lines(b: &mut PlotBuilder, lines: &ChartLines) -> Result<(), RenderError> {
    for (i, (twb, line)) in lines.wet_bulb.iter().enumerate() {
        let label = family_label(i, "wet-bulb, 5 degC steps");
        b.series(&curve(label, line), SeriesStyle::Dashed)?;
        end_label(b, line.first(), &format!("{:.0}", twb - 273.15))?;
    }
    Ok(())
}

fn add_volume_lines(b: &mut PlotBuilder, lines: &ChartLines) -> Result<(), RenderError> {
    let w_top = lines.saturation.iter().map(|q| q.1).fold(0.0, f64::max);
    for (i, (v, line)) in lines.humid_volume.iter().enumerate() {
        let label = family_label(i, "humid volume [m^3/kg_da]");
        b.series(&curve(label, line), SeriesStyle::Dotted)?;
        // Labelled where the line reaches dry air at the bottom of the chart.
        let bottom = line.last().filter(|p| p.1 < 0.05 * w_top);
        end_label(b, bottom, &format!("{v:.2}"))?;
    }
    Ok(())
}

fn add_states(
    b: &mut PlotBuilder,
    states: &[(Quantity, Quantity)],
    labels: &[String],
    path: &[(Quantity, Quantity)],
) -> Result<(), RenderError> {
    if path.len() >= 2 {
        let x = path.iter().map(|s| s.0).collect();
        let y = path.iter().map(|s| s.1).collect();
        b.series(&Curve::new("process", x, y), SeriesStyle::Line)?;
    }
    for (i, (t, w)) in states.iter().enumerate() {
        let label = labels
            .get(i)
            .cloned()
            .unwrap_or_else(|| (i + 1).to_string());
        b.point(t, w, label)?;
    }
    Ok(())
}

fn end_label(b: &mut PlotBuilder, at: Option<&(f64, f64)>, text: &str) -> Result<(), RenderError> {
    match at {
        Some(&(t, w)) => b.text(&temperature(t), &ratio(w), text).map(|_| ()),
        None => Ok(()),
    }
}
