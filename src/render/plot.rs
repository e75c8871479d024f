//! Plot values from quantities: a checked builder that fixes one unit per
//! axis, and data-only builders for the plots a drying engineer looks at
//! (drying curve, rate curve, isotherms, profiles, sweeps, heat maps).
//!
//! No physics here: callers hand in the numbers (data, model curves, the
//! critical moisture content); this module only arranges them. Drawing lives
//! in [`svg`](super::svg) and [`png`](super::png).

use crate::units::{Quantity, Unit};
use crate::value::{HeatMap, Mark, Plot, Series, SeriesStyle};

use super::error::RenderError;
use super::number::{default_unit, dim_words, in_unit};

/// A named curve of quantities: data points or a model line.
#[derive(Clone, Debug, Default)]
pub struct Curve {
    pub label: String,
    pub x: Vec<Quantity>,
    pub y: Vec<Quantity>,
    /// Units the values were shown in (`as`), used when the axis has none yet.
    pub x_unit: Option<Unit>,
    pub y_unit: Option<Unit>,
}

impl Curve {
    /// A curve from a label and paired x and y values.
    pub fn new(label: impl Into<String>, x: Vec<Quantity>, y: Vec<Quantity>) -> Curve {
        Curve {
            label: label.into(),
            x,
            y,
            x_unit: None,
            y_unit: None,
        }
    }
}

/// Display units for the two axes; `None` takes the first series' own unit.
#[derive(Clone, Debug, Default)]
pub struct AxisUnits {
    pub x: Option<Unit>,
    pub y: Option<Unit>,
}

/// One axis: its name and, once known, its unit.
#[derive(Clone, Debug)]
struct Axis {
    which: &'static str,
    name: String,
    unit: Option<Unit>,
}

impl Axis {
    /// Numbers of `values` in this axis' unit; the first quantity fixes the unit.
    fn numbers(
        &mut self,
        series: &str,
        values: &[Quantity],
        shown: Option<&Unit>,
    ) -> Result<Vec<f64>, RenderError> {
        values
            .iter()
            .map(|q| self.number(series, q, shown))
            .collect()
    }

    fn number(
        &mut self,
        series: &str,
        q: &Quantity,
        shown: Option<&Unit>,
    ) -> Result<f64, RenderError> {
        if !q.si.is_finite() {
            return Err(RenderError::NotFinite {
                what: format!("a {} value of `{series}`", self.which),
            });
        }
        let unit = self.unit.get_or_insert_with(|| default_unit(q, shown));
        if unit.dim != q.dim {
            return Err(RenderError::AxisUnits {
                axis: self.which,
                expected: format!("{} in {}", dim_words(unit.dim), unit.symbol),
                series: series.to_string(),
                found: dim_words(q.dim),
            });
        }
        in_unit(q, unit).map_err(RenderError::Invalid)
    }

    fn label(&self) -> String {
        match &self.unit {
            Some(u) if !u.symbol.is_empty() => format!("{} [{}]", self.name, u.symbol),
            _ => self.name.clone(),
        }
    }
}

/// Builds a [`Plot`] from quantities, one unit per axis.
///
/// The first series (or the unit given up front) fixes each axis' unit; a
/// later series in another dimension is an error naming both, as is a series
/// whose x and y lists differ in length.
#[derive(Clone, Debug)]
pub struct PlotBuilder {
    plot: Plot,
    x: Axis,
    y: Axis,
}

impl PlotBuilder {
    /// A plot titled `title` with axes named `x_name` and `y_name` (units are added to the labels).
    pub fn new(
        title: impl Into<String>,
        x_name: impl Into<String>,
        y_name: impl Into<String>,
    ) -> PlotBuilder {
        PlotBuilder {
            plot: Plot {
                title: title.into(),
                ..Plot::default()
            },
            x: Axis {
                which: "x",
                name: x_name.into(),
                unit: None,
            },
            y: Axis {
                which: "y",
                name: y_name.into(),
                unit: None,
            },
        }
    }

    /// Fix the display units of the axes.
    pub fn units(mut self, units: AxisUnits) -> PlotBuilder {
        self.x.unit = units.x.or(self.x.unit);
        self.y.unit = units.y.or(self.y.unit);
        self
    }

    /// Add a series; errors for unequal lengths or units that do not fit the axes.
    pub fn series(
        &mut self,
        curve: &Curve,
        style: SeriesStyle,
    ) -> Result<&mut PlotBuilder, RenderError> {
        if curve.x.len() != curve.y.len() {
            return Err(RenderError::SeriesLength {
                series: curve.label.clone(),
                x_len: curve.x.len(),
                y_len: curve.y.len(),
            });
        }
        let x = self
            .x
            .numbers(&curve.label, &curve.x, curve.x_unit.as_ref())?;
        let y = self
            .y
            .numbers(&curve.label, &curve.y, curve.y_unit.as_ref())?;
        self.plot.series.push(Series {
            label: curve.label.clone(),
            x,
            y,
            style,
        });
        Ok(self)
    }

    /// A vertical line at `x`, labelled.
    pub fn vline(
        &mut self,
        x: &Quantity,
        label: impl Into<String>,
    ) -> Result<&mut PlotBuilder, RenderError> {
        let label = label.into();
        let x = self.x.number(&label, x, None)?;
        self.plot.marks.push(Mark::VLine { x, label });
        Ok(self)
    }

    /// A horizontal line at `y`, labelled.
    pub fn hline(
        &mut self,
        y: &Quantity,
        label: impl Into<String>,
    ) -> Result<&mut PlotBuilder, RenderError> {
        let label = label.into();
        let y = self.y.number(&label, y, None)?;
        self.plot.marks.push(Mark::HLine { y, label });
        Ok(self)
    }

    /// A shaded band between `x0` and `x1`, labelled at the top.
    pub fn span(
        &mut self,
        x0: &Quantity,
        x1: &Quantity,
        label: impl Into<String>,
    ) -> Result<&mut PlotBuilder, RenderError> {
        let label = label.into();
        let (x0, x1) = (
            self.x.number(&label, x0, None)?,
            self.x.number(&label, x1, None)?,
        );
        self.plot.marks.push(Mark::Span {
            x0: x0.min(x1),
            x1: x0.max(x1),
            label,
        });
        Ok(self)
    }

    /// A labelled dot at (`x`, `y`).
    pub fn point(
        &mut self,
        x: &Quantity,
        y: &Quantity,
        label: impl Into<String>,
    ) -> Result<&mut PlotBuilder, RenderError> {
        let label = label.into();
        let (x, y) = (
            self.x.number(&label, x, None)?,
            self.y.number(&label, y, None)?,
        );
        self.plot.marks.push(Mark::Point { x, y, label });
        Ok(self)
    }

    /// A small text label at (`x`, `y`).
    pub fn text(
        &mut self,
        x: &Quantity,
        y: &Quantity,
        label: impl Into<String>,
    ) -> Result<&mut PlotBuilder, RenderError> {
        let label = label.into();
        let (x, y) = (
            self.x.number(&label, x, None)?,
            self.y.number(&label, y, None)?,
        );
        self.plot.marks.push(Mark::Text { x, y, label });
        Ok(self)
    }

    /// A heat map of `z` over the grid `x` by `y` (z row-major over (y, x)), coloured
    /// on a scale labelled `z_name [z_unit]`.
    pub fn heat(
        &mut self,
        x: &[Quantity],
        y: &[Quantity],
        z: &[Quantity],
        z_name: &str,
        z_unit: Option<Unit>,
    ) -> Result<&mut PlotBuilder, RenderError> {
        let mut z_axis = Axis {
            which: "colour",
            name: z_name.to_string(),
            unit: z_unit,
        };
        let heat = HeatMap {
            x: self.x.numbers(z_name, x, None)?,
            y: self.y.numbers(z_name, y, None)?,
            z: z_axis.numbers(z_name, z, None)?,
            z_label: String::new(),
        };
        self.plot.heat = Some(HeatMap {
            z_label: z_axis.label(),
            ..heat
        });
        Ok(self)
    }

    /// The finished plot, checked (see [`validate`]).
    pub fn build(mut self) -> Result<Plot, RenderError> {
        self.plot.x_label = self.x.label();
        self.plot.y_label = self.y.label();
        validate(&self.plot)?;
        Ok(self.plot)
    }
}

/// Check a plot before drawing: equal x/y lengths, finite numbers, something to draw,
/// a heat-map grid that matches its values.
pub fn validate(plot: &Plot) -> Result<(), RenderError> {
    for s in &plot.series {
        if s.x.len() != s.y.len() {
            return Err(RenderError::SeriesLength {
                series: s.label.clone(),
                x_len: s.x.len(),
                y_len: s.y.len(),
            });
        }
        finite_all(&s.x, || format!("an x value of series `{}`", s.label))?;
        finite_all(&s.y, || format!("a y value of series `{}`", s.label))?;
    }
    for mark in &plot.marks {
        finite_all(&mark_numbers(mark), || "a mark position".to_string())?;
    }
    if let Some(heat) = &plot.heat {
        validate_heat(heat)?;
    }
    let has_points = plot.series.iter().any(|s| !s.x.is_empty());
    if !has_points && plot.heat.is_none() {
        return Err(RenderError::EmptyPlot {
            title: plot.title.clone(),
        });
    }
    Ok(())
}

fn validate_heat(heat: &HeatMap) -> Result<(), RenderError> {
    let (nx, ny, nz) = (heat.x.len(), heat.y.len(), heat.z.len());
    if nx == 0 || ny == 0 || nx * ny != nz {
        return Err(RenderError::HeatGrid { nx, ny, nz });
    }
    finite_all(&heat.x, || "a heat-map x value".into())?;
    finite_all(&heat.y, || "a heat-map y value".into())?;
    finite_all(&heat.z, || format!("a value of `{}`", heat.z_label))
}

fn mark_numbers(mark: &Mark) -> Vec<f64> {
    match mark {
        Mark::VLine { x, .. } => vec![*x],
        Mark::HLine { y, .. } => vec![*y],
        Mark::Point { x, y, .. } | Mark::Text { x, y, .. } => vec![*x, *y],
        Mark::Span { x0, x1, .. } => vec![*x0, *x1],
    }
}

/// Largest magnitude an axis can show (beyond it the axis arithmetic overflows).
pub const PLOT_LIMIT: f64 = 1e150;

fn finite_all(values: &[f64], what: impl Fn() -> String) -> Result<(), RenderError> {
    if !values.iter().all(|v| v.is_finite()) {
        return Err(RenderError::NotFinite { what: what() });
    }
    match values.iter().find(|v| v.abs() > PLOT_LIMIT) {
        Some(v) => Err(RenderError::Invalid(format!(
            "{} is too large to plot ({v:e})",
            what()
        ))),
        None => Ok(()),
    }
}

/// Cell edges around grid points: midpoints between neighbours, half a step beyond the ends.
pub fn heat_edges(points: &[f64]) -> Vec<f64> {
    match points.len() {
        0 => Vec::new(),
        1 => vec![points[0] - 0.5, points[0] + 0.5],
        n => {
            let mut edges = Vec::with_capacity(n + 1);
            edges.push(points[0] - (points[1] - points[0]) / 2.0);
            edges.extend(points.windows(2).map(|w| (w[0] + w[1]) / 2.0));
            edges.push(points[n - 1] + (points[n - 1] - points[n - 2]) / 2.0);
            edges
        }
    }
}

/// Drying curve: moisture content against time, measured points and model lines.
pub fn drying_curve(
    title: &str,
    data: &[Curve],
    models: &[Curve],
    units: AxisUnits,
) -> Result<Plot, RenderError> {
    let mut b = PlotBuilder::new(title, "time", "moisture content X").units(units);
    add_all(&mut b, data, SeriesStyle::Points)?;
    add_all(&mut b, models, SeriesStyle::Line)?;
    b.build()
}

/// The moisture contents that split a rate curve into periods.
#[derive(Clone, Debug, Default)]
pub struct RatePeriods {
    /// Critical moisture content: end of the constant-rate period.
    pub critical: Option<Quantity>,
    /// Equilibrium moisture content: where the rate falls to zero.
    pub equilibrium: Option<Quantity>,
}

/// Rate curve R(X): drying rate against moisture content, with the constant-rate
/// period (above the critical moisture) and the falling-rate period shaded.
pub fn rate_curve(
    title: &str,
    rate: &[Curve],
    periods: &RatePeriods,
    units: AxisUnits,
) -> Result<Plot, RenderError> {
    let mut b = PlotBuilder::new(title, "moisture content X", "drying rate").units(units);
    add_all(&mut b, rate, SeriesStyle::Line)?;
    let (lowest, highest) = extremes(rate.iter().flat_map(|c| c.x.iter()));
    if let (Some(xc), Some(lo), Some(hi)) = (&periods.critical, lowest, highest) {
        let start = periods.equilibrium.unwrap_or(lo);
        b.span(&start, xc, "falling rate")?;
        b.span(xc, &hi, "constant rate")?;
        b.vline(xc, "X_c")?;
    }
    if let Some(xe) = &periods.equilibrium {
        b.vline(xe, "X_e")?;
    }
    b.build()
}

/// Smallest and largest quantity by SI magnitude.
fn extremes<'a>(
    values: impl Iterator<Item = &'a Quantity>,
) -> (Option<Quantity>, Option<Quantity>) {
    let mut lo: Option<Quantity> = None;
    let mut hi: Option<Quantity> = None;
    for q in values {
        if lo.is_none_or(|l| q.si < l.si) {
            lo = Some(*q);
        }
        if hi.is_none_or(|h| q.si > h.si) {
            hi = Some(*q);
        }
    }
    (lo, hi)
}

/// Sorption isotherms: equilibrium moisture against water activity, data and fitted models.
pub fn isotherms(
    title: &str,
    data: &[Curve],
    models: &[Curve],
    units: AxisUnits,
) -> Result<Plot, RenderError> {
    // Water activity reads as a fraction 0..1 unless the caller chose %rh.
    let units = AxisUnits {
        x: units.x.or_else(|| crate::units::lookup_unit("aw")),
        ..units
    };
    let mut b =
        PlotBuilder::new(title, "water activity a_w", "equilibrium moisture X_e").units(units);
    add_all(&mut b, data, SeriesStyle::Points)?;
    add_all(&mut b, models, SeriesStyle::Line)?;
    b.build()
}

/// Profiles along a continuous dryer: each curve is one quantity against position.
pub fn profile(
    title: &str,
    y_name: &str,
    curves: &[Curve],
    units: AxisUnits,
) -> Result<Plot, RenderError> {
    let mut b = PlotBuilder::new(title, "position along the dryer", y_name).units(units);
    add_all(&mut b, curves, SeriesStyle::Line)?;
    b.build()
}

/// Sweep result as lines: one output against the swept input, one curve per case.
pub fn sweep_lines(
    title: &str,
    x_name: &str,
    y_name: &str,
    curves: &[Curve],
    units: AxisUnits,
) -> Result<Plot, RenderError> {
    let mut b = PlotBuilder::new(title, x_name, y_name).units(units);
    add_all(&mut b, curves, SeriesStyle::Line)?;
    b.build()
}

/// The grid and values of a two-input sweep.
#[derive(Clone, Debug, Default)]
pub struct Grid {
    pub x_name: String,
    pub y_name: String,
    pub z_name: String,
    pub x: Vec<Quantity>,
    pub y: Vec<Quantity>,
    /// Values row-major over (y, x): `z[j * x.len() + i]` belongs to `(x[i], y[j])`.
    pub z: Vec<Quantity>,
    pub z_unit: Option<Unit>,
}

/// Two-input sweep as a heat map.
pub fn sweep_heat(title: &str, grid: &Grid, units: AxisUnits) -> Result<Plot, RenderError> {
    let mut b = PlotBuilder::new(title, grid.x_name.clone(), grid.y_name.clone()).units(units);
    b.heat(&grid.x, &grid.y, &grid.z, &grid.z_name, grid.z_unit.clone())?;
    b.build()
}

fn add_all(b: &mut PlotBuilder, curves: &[Curve], style: SeriesStyle) -> Result<(), RenderError> {
    for curve in curves {
        b.series(curve, style)?;
    }
    Ok(())
}
