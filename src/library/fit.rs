//! Fitted models as values: the record every fitting built-in returns (the
//! isotherm fits here, the drying-curve fits of the kinetics family), and the
//! built-ins that compare fits.
//!
//! A fit record has type `fit`, fields for people (`model`, one field per
//! parameter, `R2`, `RMSE`, `P`, `chi2`, `AIC`, `BIC`, `n`, `parameters`,
//! `residuals`) and a [`FitPayload`] for the functions that consume it.

use std::sync::Arc;

use crate::diag::Diagnostic;
use crate::engine::fit::FitResult;
use crate::library::{Args, Builtin, Param};
use crate::units::{lookup_unit, Dim, Kind, Quantity, Unit};
use crate::value::{Column, Payload, Record, Table, Value};

/// What a number means: name, dimension, kind, and the unit to show it in.
#[derive(Clone, Debug)]
pub struct QuantitySpec {
    pub name: String,
    pub dim: Dim,
    pub kind: Kind,
    /// Display unit; `None` shows the default unit for the dimension and kind.
    pub unit: Option<Unit>,
}

impl QuantitySpec {
    /// A spec with the default display unit.
    pub fn new(name: impl Into<String>, dim: Dim, kind: Kind) -> QuantitySpec {
        QuantitySpec {
            name: name.into(),
            dim,
            kind,
            unit: None,
        }
    }

    /// Show it in unit `symbol` (ignored if the unit table lacks it).
    pub fn shown_in(mut self, symbol: &str) -> QuantitySpec {
        self.unit = lookup_unit(symbol);
        self
    }

    /// A value of this spec from its SI magnitude.
    pub fn value(&self, si: f64) -> Value {
        Value::Quantity(Quantity::new(si, self.dim, self.kind), self.unit.clone())
    }
}

/// The typed data behind a fit record.
#[derive(Debug)]
pub struct FitPayload {
    /// Model name, e.g. `GAB` or `Page`.
    pub model: String,
    /// The fitted parameters, in the order of `result.params`.
    pub params: Vec<QuantitySpec>,
    /// The independent and dependent variables.
    pub x: QuantitySpec,
    pub y: QuantitySpec,
    /// The independent variable at each point (SI).
    pub x_si: Vec<f64>,
    pub result: FitResult,
}

impl Payload for FitPayload {
    fn as_any(&self) -> &dyn std::any::Any {
        self
    }
}

/// Build the `fit` record for a converged fit.
pub fn fit_record(payload: FitPayload) -> Record {
    let r = &payload.result;
    let mut rec = Record::new("fit").with("model", Value::Str(payload.model.clone()));
    for (spec, &v) in payload.params.iter().zip(&r.params) {
        rec = rec.with(spec.name.clone(), spec.value(v));
    }
    let y_spread = QuantitySpec {
        name: "RMSE".into(),
        kind: plain_kind(payload.y.kind),
        ..payload.y.clone()
    };
    rec = rec
        .with("R2", number(r.r_squared))
        .with("RMSE", y_spread.value(r.rmse))
        .with("chi2", number(r.reduced_chi_square))
        .with("AIC", number(r.aic))
        .with("BIC", number(r.bic))
        .with("n", number(r.points as f64));
    if let Some(p) = r.mean_relative_deviation_percent {
        rec = rec.with("P", percent(p));
    }
    rec = rec
        .with("parameters", Value::Table(parameter_table(&payload)))
        .with("residuals", Value::Table(residual_table(&payload)));
    rec.payload = Some(Arc::new(payload));
    rec
}

/// Moisture, activity and the like keep their kind for a spread; a temperature
/// spread is a difference.
fn plain_kind(kind: Kind) -> Kind {
    match kind {
        Kind::AbsoluteTemperature => Kind::TemperatureDifference,
        k => k,
    }
}

fn number(x: f64) -> Value {
    Value::Quantity(Quantity::number(x), None)
}

fn percent(p: f64) -> Value {
    Value::Quantity(
        Quantity::new(p / 100.0, Dim::NONE, Kind::Fraction),
        lookup_unit("%"),
    )
}

fn text_column(name: &str, cells: Vec<String>) -> Column {
    Column {
        name: name.into(),
        unit: None,
        cells: cells.into_iter().map(Value::Str).collect(),
    }
}

fn quantity_column(spec: &QuantitySpec, name: &str, values: impl Iterator<Item = f64>) -> Column {
    Column {
        name: name.into(),
        unit: spec.unit.clone(),
        cells: values.map(|v| spec.value(v)).collect(),
    }
}

/// One row per parameter: value, standard error, 95 % interval.
fn parameter_table(p: &FitPayload) -> Table {
    let r = &p.result;
    let each = |f: &dyn Fn(usize, &QuantitySpec) -> Value| -> Vec<Value> {
        p.params.iter().enumerate().map(|(i, s)| f(i, s)).collect()
    };
    let diff = |s: &QuantitySpec| QuantitySpec {
        kind: plain_kind(s.kind),
        ..s.clone()
    };
    let columns = vec![
        text_column(
            "parameter",
            p.params.iter().map(|s| s.name.clone()).collect(),
        ),
        Column {
            name: "value".into(),
            unit: None,
            cells: each(&|i, s| s.value(r.params[i])),
        },
        Column {
            name: "std error".into(),
            unit: None,
            cells: each(&|i, s| diff(s).value(r.std_errors[i])),
        },
        Column {
            name: "95% low".into(),
            unit: None,
            cells: each(&|i, s| s.value(r.ci95[i].0)),
        },
        Column {
            name: "95% high".into(),
            unit: None,
            cells: each(&|i, s| s.value(r.ci95[i].1)),
        },
        text_column(
            "at bound",
            r.at_bound
                .iter()
                .map(|b| if *b { "yes" } else { "" }.to_string())
                .collect(),
        ),
    ];
    Table {
        title: Some(format!(
            "{} parameters (t = {:.3}, {} dof)",
            p.model, r.t_value, r.dof
        )),
        columns,
    }
}

/// One row per point: x, observed, fitted, residual.
fn residual_table(p: &FitPayload) -> Table {
    let r = &p.result;
    let observed = r.fitted.iter().zip(&r.residuals).map(|(f, e)| f + e);
    let residual = QuantitySpec {
        kind: plain_kind(p.y.kind),
        ..p.y.clone()
    };
    let columns = vec![
        quantity_column(&p.x, &p.x.name, p.x_si.iter().copied()),
        quantity_column(&p.y, &format!("{} observed", p.y.name), observed),
        quantity_column(
            &p.y,
            &format!("{} fitted", p.y.name),
            r.fitted.iter().copied(),
        ),
        quantity_column(&residual, "residual", r.residuals.iter().copied()),
    ];
    Table {
        title: Some(format!("{} residuals", p.model)),
        columns,
    }
}

/// A comparison table of fits of several models to the same data: one row per
/// model with its statistics, `dAIC` against the best and the Akaike weight
/// `exp(-dAIC/2) / sum exp(-dAIC_j/2)` (Burnham & Anderson 2002, sec. 2.9).
pub fn comparison_table(fits: &[&FitPayload]) -> Table {
    let best = fits
        .iter()
        .map(|f| f.result.aic)
        .fold(f64::INFINITY, f64::min);
    let rel: Vec<f64> = fits
        .iter()
        .map(|f| (-(f.result.aic - best) / 2.0).exp())
        .collect();
    let total: f64 = rel.iter().sum();
    let stat = |name: &str, f: &dyn Fn(&FitPayload) -> Value| Column {
        name: name.into(),
        unit: None,
        cells: fits.iter().map(|p| f(p)).collect(),
    };
    let columns = vec![
        text_column("model", fits.iter().map(|f| f.model.clone()).collect()),
        stat("parameters", &|f| number(f.result.params.len() as f64)),
        stat("R2", &|f| number(f.result.r_squared)),
        stat("RMSE", &|f| {
            QuantitySpec {
                kind: plain_kind(f.y.kind),
                ..f.y.clone()
            }
            .value(f.result.rmse)
        }),
        stat("P", &|f| {
            f.result
                .mean_relative_deviation_percent
                .map_or(Value::Str("-".into()), percent)
        }),
        stat("chi2", &|f| number(f.result.reduced_chi_square)),
        stat("AIC", &|f| number(f.result.aic)),
        stat("BIC", &|f| number(f.result.bic)),
        stat("dAIC", &|f| number(f.result.aic - best)),
        Column {
            name: "weight".into(),
            unit: None,
            cells: rel.iter().map(|r| number(r / total)).collect(),
        },
    ];
    Table {
        title: Some("model comparison (lower AIC is better)".into()),
        columns,
    }
}

/// Read a list of fit records from an argument.
fn fit_list(args: &mut Args, name: &str) -> Result<Vec<Record>, Diagnostic> {
    let arg = args.required(name)?;
    let items = match arg.value {
        Value::List(items) => items,
        other => {
            return Err(Diagnostic::error(
                arg.span,
                format!(
                    "`{name}` must be a list of fits, found {}",
                    super::type_word(&other)
                ),
            ))
        }
    };
    let mut out = Vec::new();
    for item in items {
        match item {
            Value::Record(r) if r.payload::<FitPayload>().is_some() => out.push(r),
            other => {
                return Err(Diagnostic::error(
                    arg.span,
                    format!(
                        "`{name}` must hold fits, found {}",
                        super::type_word(&other)
                    ),
                )
                .with_hint("make fits with fit_isotherm or another fitting built-in"))
            }
        }
    }
    if out.is_empty() {
        return Err(Diagnostic::error(arg.span, format!("`{name}` is empty")));
    }
    Ok(out)
}

fn compare_fits(args: &mut Args) -> Result<Value, Diagnostic> {
    let span = args.span_of("fits");
    let records = fit_list(args, "fits")?;
    args.finish()?;
    let payloads: Vec<&FitPayload> = records
        .iter()
        .filter_map(|r| r.payload::<FitPayload>())
        .collect();
    let n = payloads[0].result.points;
    if payloads.iter().any(|p| p.result.points != n) {
        return Err(Diagnostic::error(
            span,
            "the fits use different numbers of points, so their AIC and BIC cannot be compared",
        )
        .with_hint("compare fits made from the same data"));
    }
    Ok(Value::Table(comparison_table(&payloads)))
}

/// The fit family: comparing fitted models.
pub const BUILTINS: &[Builtin] = &[Builtin {
    name: "compare_fits",
    family: "fit",
    params: &[Param { name: "fits", unit: "list of fits", default: None, doc: "fits of different models to the same data" }],
    returns: "table",
    doc: "Compare models fitted to the same data: one row per model with R^2, RMSE, mean relative deviation P, \
          reduced chi-square, AIC, BIC, the AIC difference to the best model and its Akaike weight. \
          Prefer the lowest AIC; a difference under 2 means the data hardly tell the models apart.",
    method: "least-squares AIC = n ln(SSE/n) + 2p, BIC = n ln(SSE/n) + p ln n, Akaike weights",
    source: "Burnham & Anderson (2002), Model Selection and Multimodel Inference, 2nd ed., Springer, sec. 2.2 and 2.9",
    validity: "fits of the same points (same n)",
    example: "compare_fits([fit_gab, fit_oswin])",
    func: compare_fits,
}];
