//! `sweep(values, INPUT: list, [INPUT2: list])`: the worksheet over a grid of
//! one or two inputs, as a table and a plot.

use std::collections::BTreeMap;
use std::sync::Arc;

use super::model::{Model, Outcome, Values, Varied};
use super::spec::{self, usage};
use crate::diag::{Diagnostic, Span};
use crate::eval::{Ctx, Flow, Mode, Stop};
use crate::syntax::CallArg;
use crate::units::{default_unit, Dim, Kind, Quantity, Scale, Unit};
use crate::value::{Column, HeatMap, Plot, Record, Series, SeriesStyle, Table, Value};

const EXAMPLE: &str = "sweep([t_dry, Rc], T_air: steps(60 degC, 90 degC, 5 K))";

/// Most points one sweep evaluates.
pub const MAX_POINTS: usize = 10_000_000;

impl Ctx<'_> {
    /// Evaluate `sweep(...)`.
    pub(super) fn sweep(&mut self, args: &[CallArg], span: Span) -> Flow<Value> {
        let parts = spec::split(args, &[]);
        let probes = match parts.positional.as_slice() {
            [one] => spec::probes(one),
            [] => return Err(usage(span, "`sweep` needs the values to report", EXAMPLE).into()),
            [_, extra, ..] => {
                let msg = "`sweep` takes one list of values to report; name the inputs to vary";
                return Err(usage(extra.span, msg, EXAMPLE).into());
            }
        };
        if parts.inputs.is_empty() || parts.inputs.len() > 2 {
            let msg = format!(
                "`sweep` varies one or two inputs, given {}",
                parts.inputs.len()
            );
            return Err(usage(span, msg, EXAMPLE).into());
        }
        let (varied, axes) = self.sweep_axes(&parts.inputs)?;
        if self.mode == Mode::CheckOnly {
            return Err(Stop::Skip);
        }
        let total: usize = axes.iter().map(Vec::len).product();
        if total > MAX_POINTS {
            let msg = format!("{total} points is more than the {MAX_POINTS} one sweep evaluates");
            return Err(Diagnostic::error(span, msg).into());
        }
        let names: Vec<String> = probes.iter().map(|p| spec::probe_name(p, self)).collect();
        let model = Model::build(self, varied, probes, true, span)?;
        let points = flat_grid(&axes);
        let outcomes = model.eval_flat(&points, total, "sweep", span)?;
        drop(points);
        let failed = self.point_warnings(&outcomes, span);
        let plot = sweep_plot(&model, &names, &axes, &outcomes);
        let (table, lists) = sweep_table(&model, &names, &axes, outcomes);
        let mut record = Record::new("sweep")
            .with("table", Value::Table(table))
            .with("plot", Value::Plot(Arc::new(plot)))
            .with("points", number(total))
            .with("failed", number(failed));
        for (name, list) in lists {
            record = record.with(name, list);
        }
        Ok(Value::Record(record))
    }

    fn sweep_axes(
        &mut self,
        inputs: &[(&crate::syntax::Ident, &CallArg)],
    ) -> Flow<(Vec<Varied>, Vec<Vec<f64>>)> {
        let mut varied: Vec<Varied> = Vec::new();
        let mut axes = Vec::new();
        for (name, arg) in inputs {
            if varied.iter().any(|v| v.name == name.name) {
                let msg = format!("`{}` is given twice", name.name);
                return Err(Diagnostic::error(name.span, msg).into());
            }
            let v = self.varied(name)?;
            let (values, unit) = self.values_for(arg, &v)?;
            varied.push(Varied { unit, ..v });
            axes.push(values);
        }
        Ok((varied, axes))
    }

    /// Summarise the warnings raised at points (each distinct message once)
    /// and say how many points failed; returns that number.
    pub(super) fn point_warnings(&mut self, outcomes: &[Outcome], span: Span) -> usize {
        let total = outcomes.len();
        let mut counts: BTreeMap<&str, usize> = BTreeMap::new();
        // The failed points, and the first one's message, in the same pass.
        let mut failed = 0;
        let mut first: Option<&String> = None;
        for o in outcomes {
            if let Err(message) = &o.values {
                failed += 1;
                first.get_or_insert(message);
            }
            let mut seen: Vec<&str> = Vec::new();
            for w in &o.warnings {
                if !seen.contains(&w.as_str()) {
                    seen.push(w);
                    *counts.entry(w).or_default() += 1;
                }
            }
        }
        for (msg, n) in counts {
            let text = format!("at {n} of {total} points: {msg}");
            self.warnings.push(Diagnostic::warning(span, text));
        }
        if let Some(first) = first {
            let text = format!("{failed} of {total} points failed (first: {first})");
            self.warnings.push(Diagnostic::warning(span, text));
        }
        failed
    }
}

/// Every combination of the axes' values, the first axis varying slowest.
pub(super) fn grid(axes: &[Vec<f64>]) -> Vec<Vec<f64>> {
    let total: usize = axes.iter().map(Vec::len).product();
    let mut points = Vec::with_capacity(total);
    // The index on each axis, counted up like an odometer, the last axis
    // turning fastest.
    let mut at = vec![0; axes.len()];
    for _ in 0..total {
        points.push(at.iter().zip(axes).map(|(&i, axis)| axis[i]).collect());
        for (i, axis) in at.iter_mut().zip(axes).rev() {
            *i += 1;
            if *i < axis.len() {
                break;
            }
            *i = 0;
        }
    }
    points
}

/// [`grid`] as one flat list: the values of each point in turn, one per
/// axis (one allocation, however many points). Filled an axis at a time:
/// each value of axis `i` holds for a block of the points of the axes after
/// it, and the blocks take the axis's values in turn.
pub(super) fn flat_grid(axes: &[Vec<f64>]) -> Vec<f64> {
    // Two axes (the usual study): each pair in turn.
    if let [xs, ys] = axes {
        let mut points = Vec::with_capacity(2 * xs.len() * ys.len());
        for &x in xs {
            for &y in ys {
                points.extend_from_slice(&[x, y]);
            }
        }
        return points;
    }
    let total: usize = axes.iter().map(Vec::len).product();
    let stride = axes.len();
    let mut points = vec![0.0; total * stride];
    if points.is_empty() {
        return points;
    }
    for (i, axis) in axes.iter().enumerate() {
        let after: usize = axes[i + 1..].iter().map(Vec::len).product();
        let blocks = points.chunks_exact_mut(stride * after);
        for (block, &value) in blocks.zip(axis.iter().cycle()) {
            for point in block.chunks_exact_mut(stride) {
                point[i] = value;
            }
        }
    }
    points
}

/// A plain number value.
pub(super) fn number(n: usize) -> Value {
    Value::Quantity(Quantity::number(n as f64), None)
}

/// The unit probe `k` is shown in: its own display unit at the first point
/// that gave a quantity, else the default for its kind.
pub(super) fn probe_unit(outcomes: &[Outcome], k: usize) -> Option<Unit> {
    outcomes
        .iter()
        .find_map(|o| match o.values.as_ref().ok()?.get(k)? {
            Value::Quantity(q, u) => Some(u.clone().unwrap_or_else(|| default_unit(q))),
            _ => None,
        })
}

/// A quantity's magnitude in `unit` (SI when the unit cannot show it), by
/// [`Unit::from_si_or_si`]: the same bits as going through [`Unit::from_si`].
#[inline(always)]
pub(super) fn in_unit(q: &Quantity, unit: Option<&Unit>) -> f64 {
    unit.map_or(q.si, |u| u.from_si_or_si(q))
}

/// A column's display unit, with what its usual case needs read once for
/// the column: [`in_unit`] for every quantity, in the same bits.
#[derive(Clone, Copy)]
struct Shown<'a> {
    unit: Option<&'a Unit>,
    /// A linear unit's dimension, its kind (`None` when plain: any kind),
    /// offset and factor.
    linear: Option<(Dim, Option<Kind>, f64, f64)>,
}

impl<'a> Shown<'a> {
    fn new(unit: Option<&'a Unit>) -> Shown<'a> {
        let linear = unit.filter(|u| u.scale == Scale::Linear).map(|u| {
            let kind = (u.kind != Kind::Plain).then_some(u.kind);
            (u.dim, kind, u.offset, u.factor)
        });
        Shown { unit, linear }
    }

    /// `q`'s magnitude in the unit: for a linear unit of its dimension,
    /// plain or of its kind, [`Unit::from_si_or_si`]'s own arithmetic;
    /// anything else goes to [`in_unit`].
    #[inline(always)]
    fn value(&self, q: &Quantity) -> f64 {
        if let Some((dim, kind, offset, factor)) = self.linear {
            if q.dim == dim && kind.is_none_or(|k| k == q.kind) {
                let x = (q.si - offset) / factor;
                return if x.is_finite() { x } else { q.si };
            }
        }
        in_unit(q, self.unit)
    }
}

fn axis_label(name: &str, unit: Option<&Unit>) -> String {
    match unit {
        Some(u) if !u.symbol.is_empty() => format!("{name} [{}]", u.symbol),
        _ => name.to_string(),
    }
}

/// The values of input `i` at every point of the grid, in its order: each
/// value of its axis repeated for the points of the axes after it, the whole
/// run repeated for the points of the axes before it.
fn input_cells(v: &Varied, axes: &[Vec<f64>], i: usize) -> Vec<Value> {
    let before: usize = axes[..i].iter().map(Vec::len).product();
    let after: usize = axes[i + 1..].iter().map(Vec::len).product();
    let mut cells = Vec::with_capacity(before * axes[i].len() * after);
    for _ in 0..before {
        if after == 1 {
            // The last axis: one value per point, written in one pass.
            let values = axes[i]
                .iter()
                .map(|&si| Value::Quantity(v.at(si), v.unit.clone()));
            cells.extend(values);
            continue;
        }
        for &si in &axes[i] {
            let q = v.at(si);
            cells.resize_with(cells.len() + after, || Value::Quantity(q, v.unit.clone()));
        }
    }
    cells
}

/// Which of the columns named `names` (in the table's order) also become a
/// list field of the sweep record: each name once, at its first column, and
/// none named like the record's own fields or the checks and errors.
fn list_columns<'a>(names: impl IntoIterator<Item = &'a str>) -> Vec<bool> {
    const FIXED: [&str; 6] = ["table", "plot", "points", "failed", "checks", "error"];
    let mut listed: Vec<&str> = Vec::new();
    names
        .into_iter()
        .map(|name| {
            let wanted = !FIXED.contains(&name) && !listed.contains(&name);
            if wanted {
                listed.push(name);
            }
            wanted
        })
        .collect()
}

/// A probe's column being filled, with the list field beside it when it
/// has one: each value goes into both, a quantity written into each
/// directly (no copy of a whole value).
struct ProbeCells {
    cells: Vec<Value>,
    list: Option<Vec<Value>>,
}

impl ProbeCells {
    fn new(n: usize, listed: bool) -> ProbeCells {
        ProbeCells {
            cells: Vec::with_capacity(n),
            list: listed.then(|| Vec::with_capacity(n)),
        }
    }

    /// Push a value: a quantity in line, anything else through [`ProbeCells::push_other`].
    #[inline(always)]
    fn push(&mut self, value: Value) {
        match value {
            Value::Quantity(q, unit) => {
                if let Some(list) = &mut self.list {
                    list.push(Value::Quantity(q, unit.clone()));
                }
                self.cells.push(Value::Quantity(q, unit));
            }
            other => self.push_other(other),
        }
    }

    /// Push a value that is not a quantity (text, a record, ...), cloned for the list.
    #[inline(never)]
    fn push_other(&mut self, value: Value) {
        if let Some(list) = &mut self.list {
            list.push(value.clone());
        }
        self.cells.push(value);
    }
}

/// The table of a sweep (a column per input and per probe, then the checks
/// and the errors where there are any) and the record's list fields (each
/// input's and probe's column as a list, where [`list_columns`] gives it
/// one), in the table's order. Takes the outcomes, whose values become the
/// cells.
fn sweep_table(
    model: &Model,
    names: &[String],
    axes: &[Vec<f64>],
    outcomes: Vec<Outcome>,
) -> (Table, Vec<(String, Value)>) {
    let n = outcomes.len();
    let column_names = model.inputs.iter().map(|v| v.name.as_str());
    let listed = list_columns(column_names.chain(names.iter().map(String::as_str)));
    let (listed_inputs, listed_probes) = listed.split_at(model.inputs.len());
    let mut lists: Vec<(String, Value)> = Vec::new();
    let mut columns: Vec<Column> = Vec::with_capacity(model.inputs.len() + names.len() + 2);
    for (i, v) in model.inputs.iter().enumerate() {
        if listed_inputs[i] {
            lists.push((v.name.clone(), Value::List(input_cells(v, axes, i))));
        }
        columns.push(Column {
            name: v.name.clone(),
            unit: v.unit.clone().or_else(|| Some(default_unit(&v.base))),
            cells: input_cells(v, axes, i),
        });
    }
    let units: Vec<Option<Unit>> = (0..names.len()).map(|k| probe_unit(&outcomes, k)).collect();
    let mut probes: Vec<ProbeCells> = listed_probes
        .iter()
        .map(|&listed| ProbeCells::new(n, listed))
        .collect();
    let mut checks = (!model.rules.is_empty()).then(|| Vec::with_capacity(n));
    let mut errors = outcomes
        .iter()
        .any(|o| o.values.is_err())
        .then(|| Vec::with_capacity(n));
    for o in outcomes {
        if let Some(checks) = &mut checks {
            checks.push(Value::Str(rules_text(model, &o)));
        }
        match o.values {
            Ok(values) => {
                push_values(&mut probes, values);
                if let Some(errors) = &mut errors {
                    errors.push(Value::Str(String::new()));
                }
            }
            Err(message) => {
                for probe in probes.iter_mut() {
                    probe.push(Value::Str("-".into()));
                }
                if let Some(errors) = &mut errors {
                    errors.push(Value::Str(message));
                }
            }
        }
    }
    for ((name, unit), probe) in names.iter().zip(units).zip(probes) {
        if let Some(list) = probe.list {
            lists.push((name.clone(), Value::List(list)));
        }
        columns.push(Column {
            name: name.clone(),
            unit,
            cells: probe.cells,
        });
    }
    for (name, cells) in [("checks", checks), ("error", errors)] {
        if let Some(cells) = cells {
            columns.push(Column {
                name: name.into(),
                unit: None,
                cells,
            });
        }
    }
    let over: Vec<&str> = model.inputs.iter().map(|v| v.name.as_str()).collect();
    let table = Table {
        title: Some(format!("sweep over {}", over.join(" and "))),
        columns,
    };
    (table, lists)
}

/// Push a point's probe values onto the probes' columns, in order.
fn push_values(probes: &mut [ProbeCells], values: Values) {
    match values.into_inner() {
        // One probe (the usual study): its value, out of the small vector
        // without its iterator.
        Ok([value]) => {
            if let Some(probe) = probes.first_mut() {
                probe.push(value);
            }
        }
        Err(values) => {
            for (probe, value) in probes.iter_mut().zip(values) {
                probe.push(value);
            }
        }
    }
}

/// `pass`, or the checks that fail at this point.
fn rules_text(model: &Model, o: &Outcome) -> String {
    if o.values.is_err() {
        return "-".into();
    }
    if o.broken.is_empty() {
        return "pass".into();
    }
    let texts: Vec<&str> = o
        .broken
        .iter()
        .map(|&i| model.rules[i].text.as_str())
        .collect();
    format!("fails: {}", texts.join("; "))
}

fn sweep_plot(model: &Model, names: &[String], axes: &[Vec<f64>], outcomes: &[Outcome]) -> Plot {
    let x_var = &model.inputs[0];
    let x_unit = x_var
        .unit
        .clone()
        .or_else(|| Some(default_unit(&x_var.base)));
    let xs: Vec<f64> = axes[0]
        .iter()
        .map(|&si| in_unit(&x_var.at(si), x_unit.as_ref()))
        .collect();
    let unit0 = probe_unit(outcomes, 0);
    let mut plot = Plot {
        title: format!("{} over {}", names[0], x_var.name),
        x_label: axis_label(&x_var.name, x_unit.as_ref()),
        ..Plot::default()
    };
    if axes.len() == 2 {
        let y_var = &model.inputs[1];
        let y_unit = y_var
            .unit
            .clone()
            .or_else(|| Some(default_unit(&y_var.base)));
        plot.y_label = axis_label(&y_var.name, y_unit.as_ref());
        plot.title = format!("{} over {} and {}", names[0], x_var.name, y_var.name);
        plot.heat = Some(heat_map(
            &xs,
            &axes[1],
            y_var,
            y_unit.as_ref(),
            outcomes,
            unit0.as_ref(),
            &names[0],
        ));
        return plot;
    }
    plot.y_label = match (&unit0, names.len()) {
        (Some(u), 1) => axis_label(&names[0], Some(u)),
        (Some(u), _) => format!("[{}]", u.symbol),
        (None, _) => names[0].clone(),
    };
    let dim0 = outcomes.iter().find_map(|o| o.quantity(0)).map(|q| q.dim);
    for (k, name) in names.iter().enumerate() {
        let series = line(&xs, outcomes, k, unit0.as_ref(), dim0, name);
        if let Some(s) = series {
            plot.series.push(s);
        }
    }
    plot
}

/// Probe `k` against x, for points where it is a quantity of dimension `dim`.
fn line(
    xs: &[f64],
    outcomes: &[Outcome],
    k: usize,
    unit: Option<&Unit>,
    dim: Option<crate::units::Dim>,
    name: &str,
) -> Option<Series> {
    let mut s = Series {
        label: name.to_string(),
        style: SeriesStyle::Line,
        ..Series::default()
    };
    let shown = Shown::new(unit);
    for (x, o) in xs.iter().zip(outcomes) {
        if let Some(q) = o.quantity(k).filter(|q| Some(q.dim) == dim) {
            s.x.push(*x);
            s.y.push(shown.value(&q));
        }
    }
    (!s.x.is_empty()).then_some(s)
}

fn heat_map(
    xs: &[f64],
    y_axis: &[f64],
    y_var: &Varied,
    y_unit: Option<&Unit>,
    outcomes: &[Outcome],
    z_unit: Option<&Unit>,
    name: &str,
) -> HeatMap {
    let ny = y_axis.len();
    let ys: Vec<f64> = y_axis
        .iter()
        .map(|&si| in_unit(&y_var.at(si), y_unit))
        .collect();
    let nx = xs.len();
    let mut z = vec![f64::NAN; nx * ny];
    // Point `i * ny + j` is at x `i`, y `j`: a run of `ny` points per x.
    let shown = Shown::new(z_unit);
    if ny > 0 {
        for (i, run) in outcomes.chunks(ny).enumerate() {
            for (j, o) in run.iter().enumerate() {
                if let Some(q) = o.quantity(0) {
                    z[j * nx + i] = shown.value(&q);
                }
            }
        }
    }
    HeatMap {
        x: xs.to_vec(),
        y: ys,
        z,
        z_label: axis_label(name, z_unit),
    }
}

#[cfg(test)]
mod tests {
    use super::{flat_grid, grid, in_unit, list_columns, Shown};
    use crate::session::Session;
    use crate::units::{parse_unit, Dim, Kind, Quantity, Unit};
    use crate::value::Value;

    /// A quantity's magnitude in `unit` through [`Unit::from_si`] (SI when
    /// the unit cannot show it): the general conversion `in_unit` must match.
    fn in_unit_general(q: &Quantity, unit: Option<&Unit>) -> f64 {
        unit.and_then(|u| u.from_si(q).ok()).unwrap_or(q.si)
    }

    /// The in-line conversion, and the one with the unit's numbers read
    /// once for a column ([`Shown`]), give the bits of [`Unit::from_si`]'s, for
    /// units it works out (linear, plain or of the quantity's kind) and
    /// units it hands on (affine shown for a difference, wet basis, another
    /// dimension), at ordinary, extreme and non-finite magnitudes.
    #[test]
    fn in_unit_is_the_general_conversion_bit_for_bit() {
        let symbols = [
            "K",
            "degC",
            "degF",
            "kPa",
            "bar",
            "kg/kg_da",
            "g/kg_da",
            "%",
            "m",
            "mm",
            "kW",
            "db",
            "wb",
            "h",
            "W/(m^2*K)",
        ];
        let mut units: Vec<_> = symbols
            .iter()
            .map(|s| Some(parse_unit(s).unwrap_or_else(|e| panic!("{s}: {e:?}"))))
            .collect();
        units.push(None);
        let mut quantities = Vec::new();
        for u in units.iter().flatten() {
            for kind in [
                u.kind,
                Kind::Plain,
                Kind::AbsoluteTemperature,
                Kind::HumidityRatio,
            ] {
                for dim in [u.dim, Dim::NONE, Dim::TEMPERATURE] {
                    for si in [
                        0.0,
                        -0.0,
                        1.0,
                        0.3,
                        273.15,
                        353.15,
                        -40.0,
                        1e300,
                        -1e300,
                        5e-324,
                        f64::MAX,
                        f64::INFINITY,
                        f64::NAN,
                    ] {
                        quantities.push(Quantity::new(si, dim, kind));
                    }
                }
            }
        }
        let mut shown_in_line = 0;
        for unit in &units {
            for q in &quantities {
                let fast = in_unit(q, unit.as_ref());
                let general = in_unit_general(q, unit.as_ref());
                assert_eq!(fast.to_bits(), general.to_bits(), "{q:?} in {unit:?}");
                let hoisted = Shown::new(unit.as_ref()).value(q);
                assert_eq!(hoisted.to_bits(), general.to_bits(), "{q:?} in {unit:?}");
                if unit.as_ref().is_some_and(|u| u.from_si(q).is_ok()) {
                    shown_in_line += 1;
                }
            }
        }
        // Most pairs convert (not only the fall-back to SI).
        assert!(shown_in_line > quantities.len(), "{shown_in_line}");
    }

    #[test]
    fn grid_is_every_combination_first_axis_slowest() {
        let axes = vec![vec![1.0, 2.0], vec![10.0, 20.0, 30.0], vec![100.0, 200.0]];
        let mut expected = Vec::new();
        for &a in &axes[0] {
            for &b in &axes[1] {
                for &c in &axes[2] {
                    expected.push(vec![a, b, c]);
                }
            }
        }
        assert_eq!(grid(&axes), expected);
        assert_eq!(grid(&[]), vec![Vec::<f64>::new()]);
        assert!(grid(&[vec![1.0], vec![]]).is_empty());
    }

    #[test]
    fn flat_grid_is_the_grid_flattened() {
        let cases = vec![
            vec![vec![1.0, 2.0], vec![10.0, 20.0, 30.0], vec![100.0, 200.0]],
            vec![vec![1.0, 2.0, 3.0], vec![10.0, 20.0]],
            vec![vec![4.0], vec![-0.0, 5.0, f64::MAX]],
            vec![vec![0.5, -1.0, 7.0]],
            vec![vec![1.0], vec![]],
            vec![vec![], vec![1.0]],
            vec![vec![1.0], vec![2.0], vec![]],
            vec![],
        ];
        for axes in cases {
            let flat: Vec<f64> = grid(&axes).into_iter().flatten().collect();
            assert_eq!(flat_grid(&axes), flat, "{axes:?}");
        }
    }

    /// The list fields as the sweep built them before they were built beside
    /// the table: every column in the table's order that is not named like
    /// a field of the record, the checks or the errors, nor like an earlier
    /// listed column.
    fn listed_by_name(names: &[&str]) -> Vec<bool> {
        let fixed = ["table", "plot", "points", "failed"];
        let mut lists: Vec<&str> = Vec::new();
        let mut out = Vec::new();
        for name in names {
            let taken = fixed.contains(name) || lists.contains(name);
            let listed = !taken && *name != "checks" && *name != "error";
            if listed {
                lists.push(name);
            }
            out.push(listed);
        }
        out
    }

    #[test]
    fn list_columns_are_the_columns_not_named_like_fields_each_once() {
        let cases: [&[&str]; 5] = [
            &["x", "y"],
            &["x", "k", "y", "y", "x"],
            &["points", "failed", "table", "plot", "checks", "error", "z"],
            &["T", "checks", "T", "error", "w"],
            &[],
        ];
        for names in cases {
            assert_eq!(
                list_columns(names.iter().copied()),
                listed_by_name(names),
                "{names:?}"
            );
        }
        assert_eq!(
            list_columns(["x", "x", "table", "y"]),
            vec![true, false, false, true]
        );
    }

    /// Each list field of a sweep holds, value for value, the cells of the
    /// first table column of its name (inputs, probes of several kinds,
    /// failed points shown as `-`, a repeated probe, a probe named like a
    /// field of the record), and the plot has the points it had.
    #[test]
    fn list_fields_read_the_table_columns() {
        let sheet = "input x = 2 m
input k = 3
r = sqrt((x - 1.5 m) / (1 m)) * k
y = k * x
points = 2 * y
big = y > 5 m
a = air(T: 20 degC + 10 K * k, rh: 20 %)
check y < 20 m
s = sweep([r, y as cm, y, points, big, a, a.h], x: steps(0.5 m, 4 m, 0.5 m), k: [1, 2, 4.5])
s1 = sweep([r, y], x: steps(0.5 m, 4 m, 0.5 m))
";
        let mut session = Session::new();
        session.eval(sheet).expect("the worksheet runs");
        for (name, inputs) in [("s", 2), ("s1", 1)] {
            let Some(Value::Record(record)) = session.value(name) else {
                panic!("{name} is not a record");
            };
            let Some(Value::Table(table)) = record.get("table") else {
                panic!("{name}.table is not a table");
            };
            let fields: Vec<&str> = record.fields.iter().map(|(n, _)| n.as_ref()).collect();
            let columns: Vec<&str> = table.columns.iter().map(|c| c.name.as_str()).collect();
            let listed = list_columns(columns.iter().copied());
            let mut lists = 0;
            for (column, listed) in table.columns.iter().zip(listed) {
                if !listed {
                    continue;
                }
                lists += 1;
                let Some(Value::List(list)) = record.get(&column.name) else {
                    panic!("{name}.{} is not a list", column.name);
                };
                assert_eq!(list.len(), column.cells.len());
                for (a, b) in list.iter().zip(&column.cells) {
                    assert_eq!(format!("{a:?}"), format!("{b:?}"), "{name}.{}", column.name);
                }
            }
            assert_eq!(fields.len(), 4 + lists, "{fields:?}");
            assert!(lists > inputs, "{columns:?}");
            let cells = table.columns[inputs].cells.iter();
            let failed = cells
                .filter(|c| matches!(c, Value::Str(s) if s == "-"))
                .count();
            assert!(failed > 0, "some points fail");
            let Some(Value::Plot(plot)) = record.get("plot") else {
                panic!("{name}.plot is not a plot");
            };
            let drawn = match &plot.heat {
                Some(heat) => heat.z.iter().filter(|z| !z.is_nan()).count(),
                None => plot.series[0].x.len(),
            };
            assert_eq!(drawn + failed, table.columns[0].cells.len(), "{name}");
        }
    }
}
