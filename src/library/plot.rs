//! Built-ins that arrange results for people: `curve`, `plot` and `table`.
//! They compute nothing; they check units and shapes and hand the data to
//! the renderers (src/render), which draw SVG/PNG and format tables.

use std::sync::Arc;

use crate::diag::Diagnostic;
use crate::library::{type_word, Args, Builtin, Param};
use crate::render::plot::{Curve, PlotBuilder};
use crate::render::table;
use crate::units::{Quantity, Unit};
use crate::value::{Payload, Record, SeriesStyle, Value};

const NO_METHOD: &str = "none: arranges values for display and computes nothing";

/// The built-ins of the `plot` family.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "curve",
        family: "plot",
        params: &[
            Param { name: "x", unit: "list", default: None, doc: "x values, quantities of one dimension" },
            Param { name: "y", unit: "list", default: None, doc: "y values, as many as x" },
            Param { name: "label", unit: "text", default: Some("\"\""), doc: "legend text (empty: not in the legend)" },
            Param { name: "style", unit: "text", default: Some("\"line\""), doc: "line, points, dashed, thin or dotted" },
        ],
        returns: "curve (for `plot`)",
        doc: "A curve for a plot: paired x and y values with a legend label and a line style. Write `t as h` to choose the unit an axis shows.",
        method: NO_METHOD,
        source: "siccant",
        validity: "any values; x and y of equal length",
        example: "curve(t as h, X, label: \"run 3 (invented)\", style: \"points\")",
        func: curve,
    },
    Builtin {
        name: "plot",
        family: "plot",
        params: &[
            Param { name: "series", unit: "curve or list", default: None, doc: "one curve or a list of curves" },
            Param { name: "title", unit: "text", default: Some("\"\""), doc: "title above the plot" },
            Param { name: "x", unit: "text", default: Some("\"x\""), doc: "x-axis name; the unit is added" },
            Param { name: "y", unit: "text", default: Some("\"y\""), doc: "y-axis name; the unit is added" },
        ],
        returns: "plot",
        doc: "A plot of one or more curves, shown as SVG in notebooks and the audit record. Every curve on an axis must have the same dimension; the first curve's unit is used.",
        method: NO_METHOD,
        source: "siccant",
        validity: "curves with finite values",
        example: "plot([data, model], title: \"Drying curve\", x: \"time\", y: \"X\")",
        func: plot,
    },
    Builtin {
        name: "table",
        family: "plot",
        params: &[
            Param { name: "rows", unit: "list", default: None, doc: "a list of records, one per row; the first record's fields name the columns" },
            Param { name: "title", unit: "text", default: Some("\"\""), doc: "caption" },
        ],
        returns: "table",
        doc: "A table from a list of records, with units in the column headers and one number format per column.",
        method: NO_METHOD,
        source: "siccant",
        validity: "records with the same fields",
        example: "table([air(T: 20 degC, rh: 50 %), air(T: 60 degC, rh: 10 %)], title: \"states\")",
        func: table_of,
    },
    Builtin {
        name: "heat_map",
        family: "plot",
        params: &[
            Param { name: "x", unit: "list", default: None, doc: "grid values of the first input" },
            Param { name: "y", unit: "list", default: None, doc: "grid values of the second input" },
            Param { name: "z", unit: "list of lists", default: None, doc: "results, one list per y value, each as long as x" },
            Param { name: "title", unit: "text", default: Some("\"\""), doc: "title above the plot" },
            Param { name: "x_name", unit: "text", default: Some("\"x\""), doc: "x-axis name; the unit is added" },
            Param { name: "y_name", unit: "text", default: Some("\"y\""), doc: "y-axis name; the unit is added" },
            Param { name: "z_name", unit: "text", default: Some("\"z\""), doc: "colour-scale name; the unit is added" },
        ],
        returns: "plot",
        doc: "A heat map of a two-input sweep: z[j][i] is the result at x[i] and y[j], coloured on a scale with its unit.",
        method: NO_METHOD,
        source: "siccant",
        validity: "a full grid of finite values",
        example: "heat_map(T, v, [t_at(T, v1), t_at(T, v2)], title: \"batch time\", x_name: \"air temperature\", y_name: \"air velocity\", z_name: \"batch time\")",
        func: heat_map,
    },
];

/// The typed data of a `curve` record.
#[derive(Clone, Debug)]
pub struct CurveData {
    pub curve: Curve,
    pub style: SeriesStyle,
}

impl Payload for CurveData {
    fn as_any(&self) -> &dyn std::any::Any {
        self
    }
}

fn curve(args: &mut Args) -> Result<Value, Diagnostic> {
    let (y_span, style_span) = (args.span_of("y"), args.span_of("style"));
    let (x, x_unit) = quantities(args, "x")?;
    let (y, y_unit) = quantities(args, "y")?;
    let label = opt_text(args, "label")?.unwrap_or_default();
    let style = match opt_text(args, "style")?.as_deref() {
        None | Some("line") => SeriesStyle::Line,
        Some("points") => SeriesStyle::Points,
        Some("dashed") => SeriesStyle::Dashed,
        Some("thin") => SeriesStyle::Thin,
        Some("dotted") => SeriesStyle::Dotted,
        Some(other) => {
            return Err(Diagnostic::error(
                style_span,
                format!("unknown style `{other}`; use line, points, dashed, thin or dotted"),
            ))
        }
    };
    if x.len() != y.len() {
        return Err(Diagnostic::error(
            y_span,
            format!("`y` has {} values but `x` has {}", y.len(), x.len()),
        ));
    }
    args.finish()?;
    let count = Value::Quantity(Quantity::number(x.len() as f64), None);
    let data = CurveData {
        curve: Curve {
            label: label.clone(),
            x,
            y,
            x_unit,
            y_unit,
        },
        style,
    };
    let mut record = Record::new("curve")
        .with("label", Value::Str(label))
        .with("points", count);
    record.payload = Some(Arc::new(data));
    Ok(Value::Record(record))
}

/// A list of quantities and the unit the first one is shown in.
fn quantities(args: &mut Args, name: &str) -> Result<(Vec<Quantity>, Option<Unit>), Diagnostic> {
    let arg = args.required(name)?;
    let items = match arg.value {
        Value::List(items) => items,
        other => {
            return Err(Diagnostic::error(
                arg.span,
                format!(
                    "`{name}` must be a list of quantities, found {}",
                    type_word(&other)
                ),
            ))
        }
    };
    let mut unit = None;
    let mut out = Vec::with_capacity(items.len());
    for (i, item) in items.into_iter().enumerate() {
        match item {
            Value::Quantity(q, shown) => {
                if i == 0 {
                    unit = shown;
                }
                out.push(q);
            }
            other => {
                let msg = format!(
                    "item {} of `{name}` is {}, not a quantity",
                    i + 1,
                    type_word(&other)
                );
                return Err(Diagnostic::error(arg.span, msg));
            }
        }
    }
    Ok((out, unit))
}

fn opt_text(args: &mut Args, name: &str) -> Result<Option<String>, Diagnostic> {
    match args.take(name) {
        None => Ok(None),
        Some(arg) => match arg.value {
            Value::Str(s) => Ok(Some(s)),
            other => Err(Diagnostic::error(
                arg.span,
                format!(
                    "`{name}` must be text in quotes, found {}",
                    type_word(&other)
                ),
            )),
        },
    }
}

fn plot(args: &mut Args) -> Result<Value, Diagnostic> {
    let series_span = args.span_of("series");
    let series = args.required("series")?;
    let curves = curves_of(series.value, series_span)?;
    let title = opt_text(args, "title")?.unwrap_or_default();
    let x_name = opt_text(args, "x")?.unwrap_or_else(|| "x".into());
    let y_name = opt_text(args, "y")?.unwrap_or_else(|| "y".into());
    args.finish()?;
    let mut builder = PlotBuilder::new(title, x_name, y_name);
    for data in &curves {
        builder
            .series(&data.curve, data.style)
            .map_err(|e| Diagnostic::error(series_span, e.to_string()))?;
    }
    let plot = builder
        .build()
        .map_err(|e| Diagnostic::error(series_span, e.to_string()))?;
    Ok(Value::Plot(Arc::new(plot)))
}

fn curves_of(value: Value, span: crate::diag::Span) -> Result<Vec<CurveData>, Diagnostic> {
    let items = match value {
        Value::List(items) => items,
        single => vec![single],
    };
    items
        .iter()
        .map(|v| match v {
            Value::Record(r) => r.payload::<CurveData>().cloned(),
            _ => None,
        })
        .enumerate()
        .map(|(i, c)| {
            c.ok_or_else(|| {
                Diagnostic::error(span, format!("item {} of `series` is not a curve", i + 1))
                    .with_hint("make one with curve(x, y)")
            })
        })
        .collect()
}

fn table_of(args: &mut Args) -> Result<Value, Diagnostic> {
    let rows_span = args.span_of("rows");
    let rows = args.required("rows")?;
    let title = opt_text(args, "title")?.filter(|t| !t.is_empty());
    args.finish()?;
    let rows = match rows.value {
        Value::List(items) => items,
        other => {
            return Err(Diagnostic::error(
                rows_span,
                format!(
                    "`rows` must be a list of records, found {}",
                    type_word(&other)
                ),
            ))
        }
    };
    let t = table::from_records(title, &rows)
        .map_err(|e| Diagnostic::error(rows_span, e.to_string()))?;
    table::Layout::new(&t).map_err(|e| Diagnostic::error(rows_span, e.to_string()))?;
    Ok(Value::Table(t))
}

fn heat_map(args: &mut Args) -> Result<Value, Diagnostic> {
    let z_span = args.span_of("z");
    let (x, x_unit) = quantities(args, "x")?;
    let (y, y_unit) = quantities(args, "y")?;
    let (z, z_unit) = grid_rows(args, x.len(), y.len())?;
    let title = opt_text(args, "title")?.unwrap_or_default();
    let x_name = opt_text(args, "x_name")?.unwrap_or_else(|| "x".into());
    let y_name = opt_text(args, "y_name")?.unwrap_or_else(|| "y".into());
    let z_name = opt_text(args, "z_name")?.unwrap_or_else(|| "z".into());
    args.finish()?;
    let units = crate::render::plot::AxisUnits {
        x: x_unit,
        y: y_unit,
    };
    let mut builder = PlotBuilder::new(title, x_name, y_name).units(units);
    let fail = |e: crate::render::RenderError| Diagnostic::error(z_span, e.to_string());
    builder.heat(&x, &y, &z, &z_name, z_unit).map_err(fail)?;
    Ok(Value::Plot(Arc::new(builder.build().map_err(fail)?)))
}

/// The z rows of a heat map, flattened row-major, with the first value's unit.
fn grid_rows(
    args: &mut Args,
    nx: usize,
    ny: usize,
) -> Result<(Vec<Quantity>, Option<Unit>), Diagnostic> {
    let arg = args.required("z")?;
    let rows = match arg.value {
        Value::List(rows) if rows.len() == ny => rows,
        Value::List(rows) => {
            let msg = format!("`z` has {} rows but `y` has {ny} values", rows.len());
            return Err(Diagnostic::error(arg.span, msg));
        }
        other => {
            let msg = format!("`z` must be a list of lists, found {}", type_word(&other));
            return Err(Diagnostic::error(arg.span, msg));
        }
    };
    let mut out = Vec::with_capacity(nx * ny);
    let mut unit = None;
    for (j, row) in rows.into_iter().enumerate() {
        let cells = match row {
            Value::List(cells) if cells.len() == nx => cells,
            _ => {
                let msg = format!(
                    "row {} of `z` must be a list of {nx} values, one per x",
                    j + 1
                );
                return Err(Diagnostic::error(arg.span, msg));
            }
        };
        for cell in cells {
            match cell {
                Value::Quantity(q, shown) => {
                    unit = unit.or(shown);
                    out.push(q);
                }
                other => {
                    let msg = format!(
                        "row {} of `z` holds {}, not a quantity",
                        j + 1,
                        type_word(&other)
                    );
                    return Err(Diagnostic::error(arg.span, msg));
                }
            }
        }
    }
    Ok((out, unit))
}
