//! Drawing a [`Plot`] as SVG with plotters (no system fonts: text is left to
//! the viewer, or to the embedded font when [`png`](super::png) rasterises it).
//!
//! Layout, top to bottom: a left-aligned title, a legend strip of the labelled
//! series, then the chart (with a colour bar on the right for heat maps).
//! Shaded spans and heat-map cells go under the series; marks go on top.

use std::ops::Range;

use plotters::backend::SVGBackend;
use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use crate::value::{HeatMap, Mark, Plot, Series, SeriesStyle};

use super::error::RenderError;
use super::number::format_sig;
use super::plot::{heat_edges, validate};
use super::style::*;

type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;
type Chart<'a, 'b> = ChartContext<
    'b,
    SVGBackend<'a>,
    Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
>;

/// Render a plot as an SVG document (760 x 480 px).
///
/// Errors: series of different x/y lengths, non-finite values, an empty plot,
/// a heat map whose grid does not match its values.
pub fn svg(plot: &Plot) -> Result<String, RenderError> {
    validate(plot)?;
    let mut out = String::new();
    {
        let canvas = (px_u(WIDTH), px_u(HEIGHT));
        let root = SVGBackend::with_string(&mut out, canvas).into_drawing_area();
        draw_plot(&root, plot)?;
        root.present().map_err(draw_err)?;
    }
    Ok(display_size(out))
}

/// Drawing resolution: plotters places everything on whole pixels, so we draw
/// at `RES` times the display size (smooth curves) and let the viewBox scale it.
const RES: i32 = 2;

/// A length in display pixels, in drawing pixels.
fn px(v: i32) -> i32 {
    v * RES
}

fn px_u(v: u32) -> u32 {
    v * RES as u32
}

/// Give the document its display size; the viewBox keeps the drawing's.
fn display_size(svg: String) -> String {
    let drawn = format!("width=\"{}\" height=\"{}\"", px_u(WIDTH), px_u(HEIGHT));
    let shown = format!("width=\"{WIDTH}\" height=\"{HEIGHT}\"");
    svg.replacen(&drawn, &shown, 1)
}

fn draw_err(e: impl std::fmt::Display) -> RenderError {
    RenderError::Draw(e.to_string())
}

/// A font of `px` pixels (plotters writes size/1.24 into the SVG).
fn font(px: f64, colour: RGBColor) -> TextStyle<'static> {
    (FontFamily::SansSerif, px * 1.24 * f64::from(RES))
        .into_font()
        .color(&colour)
}

fn title_font() -> TextStyle<'static> {
    (
        FontFamily::SansSerif,
        TITLE_PX * 1.24 * f64::from(RES),
        FontStyle::Bold,
    )
        .into_font()
        .color(&INK)
}

fn draw_plot(root: &Area, plot: &Plot) -> Result<(), RenderError> {
    root.fill(&PAPER).map_err(draw_err)?;
    let legend = legend_layout(plot);
    let head_px = px_u(40 + 22 * legend.rows);
    let (head, body) = root.split_vertically(head_px);
    head.draw(&Text::new(
        plot.title.clone(),
        (px(18), px(12)),
        title_font(),
    ))
    .map_err(draw_err)?;
    draw_legend(&head, &legend)?;
    match &plot.heat {
        Some(heat) => {
            let (chart_area, bar_area) = body.split_horizontally(px_u(WIDTH - 104));
            draw_chart(&chart_area, plot)?;
            draw_colour_bar(&bar_area, heat)
        }
        None => draw_chart(&body, plot),
    }
}

fn draw_chart(area: &Area, plot: &Plot) -> Result<(), RenderError> {
    let (xr, yr) = ranges(plot);
    let mut chart = ChartBuilder::on(area)
        .margin_top(px(6))
        .margin_right(px(22))
        .margin_left(px(8))
        .margin_bottom(px(8))
        .x_label_area_size(px(50))
        .y_label_area_size(px(74))
        .build_cartesian_2d(xr.clone(), yr.clone())
        .map_err(draw_err)?;
    if let Some(heat) = &plot.heat {
        draw_heat(&mut chart, heat)?;
    }
    draw_spans(&mut chart, &plot.marks, &yr)?;
    draw_mesh(&mut chart, plot)?;
    let mut palette_index = 0;
    for series in &plot.series {
        draw_series(
            &mut chart,
            series,
            series_colour(series.style, &mut palette_index),
        )?;
    }
    draw_marks(&mut chart, &plot.marks, &xr, &yr)
}

fn draw_mesh(chart: &mut Chart, plot: &Plot) -> Result<(), RenderError> {
    let tick = |v: &f64| format_sig(*v, 4);
    chart
        .configure_mesh()
        .bold_line_style(GRID.stroke_width(px_u(1)))
        .set_all_tick_mark_size(px(5))
        .light_line_style(TRANSPARENT)
        .axis_style(INK.stroke_width(px_u(1)))
        .label_style(font(TICK_PX, MUTED_INK))
        .axis_desc_style(font(LABEL_PX, INK))
        .x_desc(plot.x_label.clone())
        .y_desc(plot.y_label.clone())
        .x_labels(9)
        .y_labels(8)
        .x_label_formatter(&tick)
        .y_label_formatter(&tick)
        .draw()
        .map_err(draw_err)
}

/// The colour of a series: reference styles have their own, others take the next palette slot.
fn series_colour(style: SeriesStyle, palette_index: &mut usize) -> RGBColor {
    reference_colour(style).unwrap_or_else(|| {
        let c = PALETTE[*palette_index % PALETTE.len()];
        *palette_index += 1;
        c
    })
}

fn draw_series(chart: &mut Chart, series: &Series, colour: RGBColor) -> Result<(), RenderError> {
    let points = series.x.iter().copied().zip(series.y.iter().copied());
    let result = match series.style {
        SeriesStyle::Line => chart
            .draw_series(LineSeries::new(points, colour.stroke_width(px_u(2))))
            .map(|_| ()),
        SeriesStyle::Thin => chart
            .draw_series(LineSeries::new(points, colour.stroke_width(px_u(1))))
            .map(|_| ()),
        SeriesStyle::Points => chart
            .draw_series(points.map(|p| Circle::new(p, px(4), colour.stroke_width(px_u(2)))))
            .map(|_| ()),
        SeriesStyle::Dashed => chart
            .draw_series(DashedLineSeries::new(
                points,
                px(7),
                px(4),
                colour.stroke_width(px_u(1)),
            ))
            .map(|_| ()),
        SeriesStyle::Dotted => chart
            .draw_series(DashedLineSeries::new(
                points,
                px(2),
                px(3),
                colour.stroke_width(px_u(1)),
            ))
            .map(|_| ()),
    };
    result.map_err(draw_err)
}

fn draw_spans(chart: &mut Chart, marks: &[Mark], yr: &Range<f64>) -> Result<(), RenderError> {
    let spans = marks.iter().filter_map(|m| match m {
        Mark::Span { x0, x1, label } => Some((*x0, *x1, label)),
        _ => None,
    });
    for (i, (x0, x1, label)) in spans.enumerate() {
        let fill = SPAN_FILLS[i % SPAN_FILLS.len()].mix(0.85).filled();
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(x0, yr.start), (x1, yr.end)],
                fill,
            )))
            .map_err(draw_err)?;
        let anchor = font(NOTE_PX, MUTED_INK).pos(Pos::new(HPos::Center, VPos::Top));
        let text = EmptyElement::at(((x0 + x1) / 2.0, yr.end))
            + Text::new(label.clone(), (0, px(6)), anchor);
        chart.draw_series(std::iter::once(text)).map_err(draw_err)?;
    }
    Ok(())
}

fn draw_marks(
    chart: &mut Chart,
    marks: &[Mark],
    xr: &Range<f64>,
    yr: &Range<f64>,
) -> Result<(), RenderError> {
    for mark in marks {
        match mark {
            Mark::VLine { x, label } => draw_vline(chart, *x, label, yr)?,
            Mark::HLine { y, label } => draw_hline(chart, *y, label, xr)?,
            Mark::Point { x, y, label } => {
                let dot = EmptyElement::at((*x, *y))
                    + Circle::new((0, 0), px(4), MARK.filled())
                    + Text::new(label.clone(), (px(7), px(-16)), font(NOTE_PX, MARK));
                chart.draw_series(std::iter::once(dot)).map_err(draw_err)?;
            }
            Mark::Text { x, y, label } => {
                let text = EmptyElement::at((*x, *y))
                    + Text::new(
                        label.clone(),
                        (px(2), px(-14)),
                        font(NOTE_PX - 1.5, MUTED_INK),
                    );
                chart.draw_series(std::iter::once(text)).map_err(draw_err)?;
            }
            Mark::Span { .. } => {}
        }
    }
    Ok(())
}

fn draw_vline(chart: &mut Chart, x: f64, label: &str, yr: &Range<f64>) -> Result<(), RenderError> {
    let path = DashedPathElement::new(
        vec![(x, yr.start), (x, yr.end)],
        px(5),
        px(3),
        MARK.stroke_width(px_u(1)),
    );
    chart.draw_series(std::iter::once(path)).map_err(draw_err)?;
    let text = EmptyElement::at((x, yr.end))
        + Text::new(label.to_string(), (px(5), px(24)), font(NOTE_PX, MARK));
    chart
        .draw_series(std::iter::once(text))
        .map(|_| ())
        .map_err(draw_err)
}

fn draw_hline(chart: &mut Chart, y: f64, label: &str, xr: &Range<f64>) -> Result<(), RenderError> {
    let path = DashedPathElement::new(
        vec![(xr.start, y), (xr.end, y)],
        px(5),
        px(3),
        MARK.stroke_width(px_u(1)),
    );
    chart.draw_series(std::iter::once(path)).map_err(draw_err)?;
    let anchor = font(NOTE_PX, MARK).pos(Pos::new(HPos::Right, VPos::Bottom));
    let text =
        EmptyElement::at((xr.end, y)) + Text::new(label.to_string(), (px(-4), px(-3)), anchor);
    chart
        .draw_series(std::iter::once(text))
        .map(|_| ())
        .map_err(draw_err)
}

fn draw_heat(chart: &mut Chart, heat: &HeatMap) -> Result<(), RenderError> {
    let (xe, ye) = (heat_edges(&heat.x), heat_edges(&heat.y));
    let (lo, hi) = z_range(heat);
    let nx = heat.x.len();
    let cells = heat.z.iter().enumerate().map(|(k, z)| {
        let (i, j) = (k % nx, k / nx);
        let colour = ramp((z - lo) / (hi - lo));
        Rectangle::new([(xe[i], ye[j]), (xe[i + 1], ye[j + 1])], colour.filled())
    });
    chart.draw_series(cells).map(|_| ()).map_err(draw_err)
}

/// Smallest and largest z, widened when all are equal.
fn z_range(heat: &HeatMap) -> (f64, f64) {
    let lo = heat.z.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = heat.z.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if hi > lo {
        (lo, hi)
    } else {
        (lo - 0.5, hi + 0.5)
    }
}

fn draw_colour_bar(area: &Area, heat: &HeatMap) -> Result<(), RenderError> {
    let (lo, hi) = z_range(heat);
    let (top, bottom, x0, x1) = (px(10), px(HEIGHT as i32 - 130), px(6), px(24));
    let steps = 48;
    for s in 0..steps {
        let (y0, y1) = (
            bottom - (bottom - top) * s / steps,
            bottom - (bottom - top) * (s + 1) / steps,
        );
        let colour = ramp((s as f64 + 0.5) / steps as f64);
        area.draw(&Rectangle::new([(x0, y1), (x1, y0)], colour.filled()))
            .map_err(draw_err)?;
    }
    area.draw(&Rectangle::new(
        [(x0, top), (x1, bottom)],
        INK.stroke_width(px_u(1)),
    ))
    .map_err(draw_err)?;
    let anchor = font(TICK_PX - 1.0, MUTED_INK).pos(Pos::new(HPos::Left, VPos::Center));
    for k in 0..=4 {
        let y = bottom - (bottom - top) * k / 4;
        let z = lo + (hi - lo) * k as f64 / 4.0;
        area.draw(&Text::new(
            format_sig(z, 3),
            (x1 + px(5), y),
            anchor.clone(),
        ))
        .map_err(draw_err)?;
    }
    let label = font(LABEL_PX - 1.0, INK)
        .transform(FontTransform::Rotate270)
        .pos(Pos::new(HPos::Center, VPos::Top));
    area.draw(&Text::new(
        heat.z_label.clone(),
        (px(78), (top + bottom) / 2),
        label,
    ))
    .map_err(draw_err)
}

/// Legend entries placed in rows across the header.
struct LegendLayout {
    rows: u32,
    items: Vec<(i32, i32, String, SeriesStyle, RGBColor)>,
}

fn legend_layout(plot: &Plot) -> LegendLayout {
    let mut items = Vec::new();
    let (mut x, mut row, mut palette_index) = (18i32, 0u32, 0usize);
    for series in &plot.series {
        let colour = series_colour(series.style, &mut palette_index);
        if series.label.is_empty() {
            continue;
        }
        let width = 30 + (series.label.chars().count() as f64 * NOTE_PX * 0.58) as i32 + 22;
        if x + width > WIDTH as i32 - 10 && x > 18 {
            row += 1;
            x = 18;
        }
        items.push((
            x,
            44 + 22 * row as i32,
            series.label.clone(),
            series.style,
            colour,
        ));
        x += width;
    }
    let rows = if items.is_empty() { 0 } else { row + 1 };
    LegendLayout { rows, items }
}

fn draw_legend(area: &Area, legend: &LegendLayout) -> Result<(), RenderError> {
    let anchor = font(NOTE_PX, INK).pos(Pos::new(HPos::Left, VPos::Center));
    for (x, y, label, style, colour) in &legend.items {
        draw_swatch(area, px(*x), px(*y), *style, *colour)?;
        area.draw(&Text::new(
            label.clone(),
            (px(x + 30), px(*y)),
            anchor.clone(),
        ))
        .map_err(draw_err)?;
    }
    Ok(())
}

fn draw_swatch(
    area: &Area,
    x: i32,
    y: i32,
    style: SeriesStyle,
    colour: RGBColor,
) -> Result<(), RenderError> {
    let ends = vec![(x, y), (x + px(24), y)];
    let result = match style {
        SeriesStyle::Line => area.draw(&PathElement::new(ends, colour.stroke_width(px_u(2)))),
        SeriesStyle::Thin => area.draw(&PathElement::new(ends, colour.stroke_width(px_u(1)))),
        SeriesStyle::Points => area.draw(&Circle::new(
            (x + px(12), y),
            px(4),
            colour.stroke_width(px_u(2)),
        )),
        SeriesStyle::Dashed => area.draw(&DashedPathElement::new(
            ends,
            px(7),
            px(4),
            colour.stroke_width(px_u(1)),
        )),
        SeriesStyle::Dotted => area.draw(&DashedPathElement::new(
            ends,
            px(2),
            px(3),
            colour.stroke_width(px_u(1)),
        )),
    };
    result.map_err(draw_err)
}

/// Axis ranges covering every series, mark and heat cell; padded by 3 %
/// except for heat maps, which fill the chart exactly.
fn ranges(plot: &Plot) -> (Range<f64>, Range<f64>) {
    let (mut xs, mut ys): (Vec<f64>, Vec<f64>) = (Vec::new(), Vec::new());
    for s in &plot.series {
        xs.extend(&s.x);
        ys.extend(&s.y);
    }
    for mark in &plot.marks {
        match mark {
            Mark::VLine { x, .. } => xs.push(*x),
            Mark::HLine { y, .. } => ys.push(*y),
            Mark::Point { x, y, .. } | Mark::Text { x, y, .. } => {
                xs.push(*x);
                ys.push(*y);
            }
            Mark::Span { x0, x1, .. } => xs.extend([*x0, *x1]),
        }
    }
    match &plot.heat {
        Some(heat) => {
            xs.extend(heat_edges(&heat.x));
            ys.extend(heat_edges(&heat.y));
            (span_of(&xs, 0.0), span_of(&ys, 0.0))
        }
        None => (
            span_of(&xs, 0.03),
            headroom(span_of(&ys, 0.03), &plot.marks),
        ),
    }
}

/// Extra room at the top for the labels of shaded spans.
fn headroom(range: Range<f64>, marks: &[Mark]) -> Range<f64> {
    match marks.iter().any(|m| matches!(m, Mark::Span { .. })) {
        true => range.start..range.end + (range.end - range.start) * 0.1,
        false => range,
    }
}

fn span_of(values: &[f64], pad: f64) -> Range<f64> {
    let lo = values.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if !lo.is_finite() || !hi.is_finite() {
        return 0.0..1.0;
    }
    if hi - lo <= 4.0 * f64::EPSILON * hi.abs().max(lo.abs()) {
        let half = if lo == 0.0 { 1.0 } else { lo.abs() * 0.1 };
        return (lo - half)..(hi + half);
    }
    let margin = (hi - lo) * pad;
    (lo - margin)..(hi + margin)
}
