//! Uncertainty: Monte Carlo propagation (`uncertainty`), first-order
//! linearised propagation (`propagate`) and one-at-a-time sensitivities
//! (`tornado`).
//!
//! Monte Carlo follows JCGM 101:2008 in spirit: draw every uncertain input,
//! evaluate the worksheet, and summarise the sample of each value. Sample `i`
//! draws from random stream `i` of the seed, so the result is the same on
//! one thread or many. The linearised estimate (JCGM 100:2008, sec. 5) uses
//! central differences with steps of one hundredth of each input's standard
//! deviation.

use std::sync::Arc;

use rayon::prelude::*;

use super::model::{Model, Outcome, Varied};
use super::spec::{self, usage};
use super::sweep::{in_unit, number, probe_unit};
use crate::diag::{Diagnostic, Span};
use crate::engine::stats::{histogram, sample_stream, summarise, Shape, Summary};
use crate::eval::{Ctx, Flow, Mode, Stop};
use crate::library::whatif::{spread_kind, spread_unit};
use crate::syntax::{CallArg, Ident};
use crate::units::{format_quantity, Quantity, Unit};
use crate::value::{Column, Mark, Plot, Record, Series, SeriesStyle, Table, Value};

const EXAMPLE: &str =
    "uncertainty([t_dry], T_air: normal(70 degC, 2 K), v_air: uniform(2 m/s, 3 m/s))";
const TORNADO_EXAMPLE: &str = "tornado(t_dry, T_air: [65 degC, 75 degC], v_air: [2 m/s, 4 m/s])";

/// First-order propagation of one value.
struct Linear {
    /// Value at the inputs' means (SI).
    at_means: f64,
    /// Standard deviation (SI).
    std: f64,
    /// Each input's share of the variance (0..1).
    shares: Vec<f64>,
}

/// A study's uncertain inputs and what to report.
struct Study {
    model: Model,
    shapes: Vec<Shape>,
    names: Vec<String>,
}

impl Ctx<'_> {
    /// Evaluate `uncertainty(...)`.
    pub(super) fn uncertainty(&mut self, args: &[CallArg], span: Span) -> Flow<Value> {
        let parts = spec::split(args, &["samples", "seed", "bins"]);
        let (mut samples, mut seed, mut bins) = (10_000u64, 1u64, 30u64);
        for (name, arg) in &parts.options {
            match name.name.as_str() {
                "samples" => samples = self.count_option(arg, "samples", 10, 10_000_000)?,
                "seed" => seed = self.count_option(arg, "seed", 0, 1 << 53)?,
                _ => bins = self.count_option(arg, "bins", 1, 1000)?,
            }
        }
        let Some(study) =
            self.study(&parts.positional, &parts.inputs, span, "uncertainty", true)?
        else {
            return Err(Stop::Skip);
        };
        let points: Vec<Vec<f64>> = (0..samples)
            .into_par_iter()
            .map(|i| {
                let mut rng = sample_stream(seed, i);
                study.shapes.iter().map(|s| s.sample(&mut rng)).collect()
            })
            .collect();
        let outcomes = study.model.eval_many(&points, "uncertainty", span)?;
        self.point_warnings(&outcomes, span);
        let linear = linearise(&study.model, &study.shapes);
        if let Err(e) = &linear {
            let msg = format!("no linearised estimate: {e}");
            self.warnings.push(Diagnostic::warning(span, msg));
        }
        Ok(Value::Record(monte_carlo_record(
            &study,
            &outcomes,
            linear.ok(),
            seed,
            bins as usize,
        )))
    }

    /// Evaluate `propagate(...)`.
    pub(super) fn propagate(&mut self, args: &[CallArg], span: Span) -> Flow<Value> {
        let parts = spec::split(args, &[]);
        let Some(study) = self.study(&parts.positional, &parts.inputs, span, "propagate", false)?
        else {
            return Err(Stop::Skip);
        };
        let linear = linearise(&study.model, &study.shapes)
            .map_err(|e| Diagnostic::error(span, format!("`propagate` failed: {e}")))?;
        Ok(Value::Record(propagation_record(&study, &linear)))
    }

    /// Read the values and the uncertain inputs; `None` in check-only mode.
    fn study(
        &mut self,
        positional: &[&CallArg],
        inputs: &[(&Ident, &CallArg)],
        span: Span,
        word: &str,
        with_rules: bool,
    ) -> Flow<Option<Study>> {
        let [values] = positional[..] else {
            let msg = format!(
                "`{word}` needs one list of values to report, then the uncertain inputs by name"
            );
            return Err(usage(span, msg, EXAMPLE).into());
        };
        if inputs.is_empty() {
            return Err(usage(
                span,
                format!("`{word}` needs at least one uncertain input"),
                EXAMPLE,
            )
            .into());
        }
        let mut varied = Vec::new();
        let mut shapes = Vec::new();
        for (name, arg) in inputs {
            let v = self.varied(name)?;
            shapes.push(self.shape_for(arg, &v)?);
            varied.push(v);
        }
        let probes = spec::probes(values);
        for p in &probes {
            self.scalar(p, "value")?;
        }
        if self.mode == Mode::CheckOnly {
            return Ok(None);
        }
        let names = probes.iter().map(|p| spec::probe_name(p, self)).collect();
        let model = Model::build(self, varied, probes, with_rules, span)?;
        Ok(Some(Study {
            model,
            shapes,
            names,
        }))
    }

    /// Evaluate `tornado(...)`.
    pub(super) fn tornado(&mut self, args: &[CallArg], span: Span) -> Flow<Value> {
        let parts = spec::split(args, &[]);
        let [value] = parts.positional[..] else {
            return Err(usage(
                span,
                "`tornado` needs one value, then the inputs by name",
                TORNADO_EXAMPLE,
            )
            .into());
        };
        if parts.inputs.is_empty() {
            return Err(usage(span, "`tornado` needs at least one input", TORNADO_EXAMPLE).into());
        }
        let mut varied = Vec::new();
        let mut ends = Vec::new();
        for (name, arg) in &parts.inputs {
            let v = self.varied(name)?;
            let (lo, hi, unit) = self.swing_for(arg, &v)?;
            varied.push(Varied { unit, ..v });
            ends.push((lo, hi));
        }
        self.scalar(&value.value, "value")?;
        if self.mode == Mode::CheckOnly {
            return Err(Stop::Skip);
        }
        let name = spec::probe_name(&value.value, self);
        let model = Model::build(self, varied, vec![value.value.clone()], false, span)?;
        let base: Vec<f64> = model.inputs.iter().map(|v| v.base.si).collect();
        let mut points = vec![base.clone()];
        for (i, (lo, hi)) in ends.iter().enumerate() {
            for x in [*lo, *hi] {
                let mut p = base.clone();
                p[i] = x;
                points.push(p);
            }
        }
        let outcomes = model.eval_many(&points, "tornado", span)?;
        self.point_warnings(&outcomes, span);
        Ok(Value::Record(tornado_record(
            &model, &name, &ends, &outcomes,
        )))
    }
}

/// Value and standard deviation by central differences around the means.
fn linearise(model: &Model, shapes: &[Shape]) -> Result<Vec<Linear>, String> {
    let mean: Vec<f64> = shapes.iter().map(Shape::mean).collect();
    let mut points = vec![mean.clone()];
    for (i, s) in shapes.iter().enumerate() {
        for sign in [1.0, -1.0] {
            let mut p = mean.clone();
            p[i] += sign * s.std() / 100.0;
            points.push(p);
        }
    }
    let outcomes: Vec<Outcome> = points.iter().map(|p| model.eval_one(p)).collect();
    let probes = model.probes.len();
    let mut out = Vec::with_capacity(probes);
    for k in 0..probes {
        let value = |o: &Outcome| match &o.values {
            Err(e) => Err(e.clone()),
            Ok(_) => o
                .quantity(k)
                .map(|q| q.si)
                .ok_or_else(|| "the value is not a number".to_string()),
        };
        let at_means = value(&outcomes[0])?;
        let mut terms = Vec::with_capacity(shapes.len());
        for (i, s) in shapes.iter().enumerate() {
            let h = s.std() / 100.0;
            let slope = (value(&outcomes[1 + 2 * i])? - value(&outcomes[2 + 2 * i])?) / (2.0 * h);
            terms.push((slope * s.std()).powi(2));
        }
        let var: f64 = terms.iter().sum();
        let shares = terms
            .iter()
            .map(|t| if var > 0.0 { t / var } else { 0.0 })
            .collect();
        out.push(Linear {
            at_means,
            std: var.sqrt(),
            shares,
        });
    }
    Ok(out)
}

/// A quantity like probe `k` (its dimension and kind) at SI `si`, with `unit`.
fn like(outcomes: &[Outcome], k: usize, si: f64, unit: &Option<Unit>, spread: bool) -> Value {
    let q = outcomes
        .iter()
        .find_map(|o| o.quantity(k))
        .unwrap_or(Quantity::number(0.0));
    if spread {
        return Value::Quantity(
            Quantity::new(si, q.dim, spread_kind(q.kind)),
            spread_unit(unit.as_ref()),
        );
    }
    Value::Quantity(Quantity::new(si, q.dim, q.kind), unit.clone())
}

fn column(name: &str, cells: Vec<Value>) -> Column {
    Column {
        name: name.into(),
        unit: None,
        cells,
    }
}

fn monte_carlo_record(
    study: &Study,
    outcomes: &[Outcome],
    linear: Option<Vec<Linear>>,
    seed: u64,
    bins: usize,
) -> Record {
    let n = study.names.len();
    let samples: Vec<Vec<f64>> = (0..n)
        .map(|k| {
            outcomes
                .iter()
                .filter_map(|o| o.quantity(k))
                .map(|q| q.si)
                .collect()
        })
        .collect();
    let summaries: Vec<Option<Summary>> = samples.iter().map(|s| summarise(s)).collect();
    let units: Vec<Option<Unit>> = (0..n).map(|k| probe_unit(outcomes, k)).collect();
    let stat = |k: usize, pick: fn(&Summary) -> f64, spread: bool| -> Value {
        match &summaries[k] {
            Some(s) => like(outcomes, k, pick(s), &units[k], spread),
            None => Value::Str("-".into()),
        }
    };
    let mut columns = vec![
        column(
            "value",
            study.names.iter().map(|s| Value::Str(s.clone())).collect(),
        ),
        column("mean", (0..n).map(|k| stat(k, |s| s.mean, false)).collect()),
        column("std", (0..n).map(|k| stat(k, |s| s.std, true)).collect()),
        column("p5", (0..n).map(|k| stat(k, |s| s.p5, false)).collect()),
        column("p50", (0..n).map(|k| stat(k, |s| s.p50, false)).collect()),
        column("p95", (0..n).map(|k| stat(k, |s| s.p95, false)).collect()),
    ];
    if let Some(lin) = &linear {
        columns.push(column(
            "linear mean",
            (0..n)
                .map(|k| like(outcomes, k, lin[k].at_means, &units[k], false))
                .collect(),
        ));
        columns.push(column(
            "linear std",
            (0..n)
                .map(|k| like(outcomes, k, lin[k].std, &units[k], true))
                .collect(),
        ));
    }
    let table = Table {
        title: Some(format!(
            "Monte Carlo, {} samples, seed {seed}",
            outcomes.len()
        )),
        columns,
    };
    let mut r = Record::new("uncertainty").with("table", Value::Table(table));
    r = r.with(
        "histogram",
        Value::Plot(Arc::new(histogram_plot(
            study,
            &samples[0],
            outcomes,
            &units[0],
            bins,
        ))),
    );
    for (field, pick, spread) in [
        ("mean", (|s: &Summary| s.mean) as fn(&Summary) -> f64, false),
        ("std", |s: &Summary| s.std, true),
        ("p5", |s: &Summary| s.p5, false),
        ("p95", |s: &Summary| s.p95, false),
    ] {
        if summaries[0].is_some() {
            r = r.with(field, stat(0, pick, spread));
        }
    }
    if !study.model.rules.is_empty() {
        let pass =
            outcomes.iter().filter(|o| o.feasible()).count() as f64 / outcomes.len().max(1) as f64;
        let share = Value::Quantity(
            Quantity::new(pass, crate::units::Dim::NONE, crate::units::Kind::Fraction),
            crate::units::lookup_unit("%"),
        );
        r = r.with("pass_rate", share);
    }
    let failed = outcomes.iter().filter(|o| o.values.is_err()).count();
    r.with("samples", number(outcomes.len()))
        .with("failed", number(failed))
        .with("seed", number(seed as usize))
}

fn histogram_plot(
    study: &Study,
    sample: &[f64],
    outcomes: &[Outcome],
    unit: &Option<Unit>,
    bins: usize,
) -> Plot {
    let to_shown = |si: f64| match like(outcomes, 0, si, unit, false) {
        Value::Quantity(q, u) => in_unit(&q, u.as_ref()),
        _ => si,
    };
    let (edges, counts) = histogram(sample, bins);
    let mut s = Series {
        label: "samples".into(),
        style: SeriesStyle::Line,
        ..Series::default()
    };
    for (i, c) in counts.iter().enumerate() {
        let (a, b) = (to_shown(edges[i]), to_shown(edges[i + 1]));
        s.x.extend([a, a, b, b]);
        s.y.extend([0.0, *c as f64, *c as f64, 0.0]);
    }
    let label = match unit {
        Some(u) if !u.symbol.is_empty() => format!("{} [{}]", study.names[0], u.symbol),
        _ => study.names[0].clone(),
    };
    let mut plot = Plot {
        title: format!("{}: {} Monte Carlo samples", study.names[0], sample.len()),
        x_label: label,
        y_label: "samples per bin".into(),
        series: vec![s],
        ..Plot::default()
    };
    if let Some(sum) = summarise(sample) {
        for (x, l) in [(sum.mean, "mean"), (sum.p5, "p5"), (sum.p95, "p95")] {
            plot.marks.push(Mark::VLine {
                x: to_shown(x),
                label: l.into(),
            });
        }
    }
    plot
}

fn propagation_record(study: &Study, lin: &[Linear]) -> Record {
    let base = study
        .model
        .eval_one(&study.shapes.iter().map(Shape::mean).collect::<Vec<_>>());
    let outcomes = std::slice::from_ref(&base);
    let n = study.names.len();
    let units: Vec<Option<Unit>> = (0..n).map(|k| probe_unit(outcomes, k)).collect();
    let mut columns = vec![
        column(
            "value",
            study.names.iter().map(|s| Value::Str(s.clone())).collect(),
        ),
        column(
            "at means",
            (0..n)
                .map(|k| like(outcomes, k, lin[k].at_means, &units[k], false))
                .collect(),
        ),
        column(
            "std",
            (0..n)
                .map(|k| like(outcomes, k, lin[k].std, &units[k], true))
                .collect(),
        ),
    ];
    let percent = crate::units::lookup_unit("%");
    for (i, v) in study.model.inputs.iter().enumerate() {
        let cells = (0..n)
            .map(|k| {
                Value::Quantity(
                    Quantity::new(
                        lin[k].shares[i],
                        crate::units::Dim::NONE,
                        crate::units::Kind::Fraction,
                    ),
                    percent.clone(),
                )
            })
            .collect();
        columns.push(column(&format!("share from {}", v.name), cells));
    }
    let table = Table {
        title: Some("first-order propagation".into()),
        columns,
    };
    Record::new("propagation")
        .with("table", Value::Table(table))
        .with("mean", like(outcomes, 0, lin[0].at_means, &units[0], false))
        .with("std", like(outcomes, 0, lin[0].std, &units[0], true))
}

fn tornado_record(model: &Model, name: &str, ends: &[(f64, f64)], outcomes: &[Outcome]) -> Record {
    let unit = probe_unit(outcomes, 0);
    let value = |o: &Outcome| o.quantity(0);
    let f0 = value(&outcomes[0]);
    let mut rows: Vec<(usize, Option<Quantity>, Option<Quantity>, f64)> = (0..ends.len())
        .map(|i| {
            let (a, b) = (value(&outcomes[1 + 2 * i]), value(&outcomes[2 + 2 * i]));
            let swing = match (a, b) {
                (Some(a), Some(b)) => (b.si - a.si).abs(),
                _ => 0.0,
            };
            (i, a, b, swing)
        })
        .collect();
    rows.sort_by(|x, y| y.3.total_cmp(&x.3));
    let shown = |q: Option<Quantity>| {
        q.map_or(Value::Str("-".into()), |q| Value::Quantity(q, unit.clone()))
    };
    let inputs = &model.inputs;
    let columns = vec![
        column(
            "input",
            rows.iter()
                .map(|r| Value::Str(inputs[r.0].name.clone()))
                .collect(),
        ),
        column(
            "low",
            rows.iter()
                .map(|r| inputs[r.0].shown(ends[r.0].0))
                .collect(),
        ),
        column(
            "high",
            rows.iter()
                .map(|r| inputs[r.0].shown(ends[r.0].1))
                .collect(),
        ),
        column(
            &format!("{name} at low"),
            rows.iter().map(|r| shown(r.1)).collect(),
        ),
        column(
            &format!("{name} at high"),
            rows.iter().map(|r| shown(r.2)).collect(),
        ),
        column(
            "swing",
            rows.iter()
                .map(|r| like(outcomes, 0, r.3, &unit, true))
                .collect(),
        ),
    ];
    let table = Table {
        title: Some(format!("one-at-a-time sensitivity of {name}")),
        columns,
    };
    let mut plot = Plot {
        title: format!("tornado: {name}"),
        x_label: match &unit {
            Some(u) if !u.symbol.is_empty() => format!("{name} [{}]", u.symbol),
            _ => name.to_string(),
        },
        y_label: "input (largest swing at top)".into(),
        ..Plot::default()
    };
    let to_shown = |q: Quantity| in_unit(&q, unit.as_ref());
    for (rank, r) in rows.iter().enumerate() {
        let y = (rows.len() - rank) as f64;
        let v: &Varied = &inputs[r.0];
        let (lo, hi) = (
            format_quantity(&v.at(ends[r.0].0), v.unit.as_ref()),
            format_quantity(&v.at(ends[r.0].1), v.unit.as_ref()),
        );
        if let (Some(a), Some(b)) = (r.1, r.2) {
            plot.series.push(Series {
                label: format!("{} {lo} .. {hi}", v.name),
                x: vec![to_shown(a), to_shown(b)],
                y: vec![y, y],
                style: SeriesStyle::Line,
            });
            plot.marks.push(Mark::Text {
                x: to_shown(a),
                y,
                label: v.name.clone(),
            });
        }
    }
    if let Some(q) = f0 {
        plot.marks.push(Mark::VLine {
            x: to_shown(q),
            label: "worksheet value".into(),
        });
    }
    let order = rows
        .iter()
        .map(|r| Value::Str(inputs[r.0].name.clone()))
        .collect();
    let mut rec = Record::new("tornado")
        .with("table", Value::Table(table))
        .with("plot", Value::Plot(Arc::new(plot)))
        .with("order", Value::List(order));
    if let Some(q) = f0 {
        rec = rec.with("base", Value::Quantity(q, unit));
    }
    rec
}
