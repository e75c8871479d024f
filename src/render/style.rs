//! siccant's own plot style: a warm paper background, ink-coloured axes,
//! a seven-colour series palette, muted reference lines and a sand-to-plum
//! ramp for heat maps. Chosen for this project; not modelled on any chart product.

use plotters::style::RGBColor;

use crate::value::SeriesStyle;

/// Page background.
pub const PAPER: RGBColor = RGBColor(0xfc, 0xfb, 0xf7);
/// Text and axes.
pub const INK: RGBColor = RGBColor(0x2e, 0x33, 0x38);
/// Secondary text (tick labels, mark labels).
pub const MUTED_INK: RGBColor = RGBColor(0x5f, 0x66, 0x6d);
/// Grid lines.
pub const GRID: RGBColor = RGBColor(0xe4, 0xe0, 0xd5);

/// Series colours, in the order series take them.
pub const PALETTE: [RGBColor; 7] = [
    RGBColor(0x1f, 0x6f, 0x8b), // deep teal
    RGBColor(0xc8, 0x5a, 0x32), // terracotta
    RGBColor(0x55, 0x8b, 0x2f), // moss
    RGBColor(0x84, 0x4f, 0xa0), // violet
    RGBColor(0xb8, 0x93, 0x1c), // mustard
    RGBColor(0x3b, 0x47, 0x5e), // slate
    RGBColor(0xb0, 0x36, 0x5a), // raspberry
];

/// Colour of a reference line style (thin, dashed, dotted), which takes no palette slot.
pub fn reference_colour(style: SeriesStyle) -> Option<RGBColor> {
    match style {
        SeriesStyle::Thin => Some(RGBColor(0x7d, 0x93, 0xa3)),
        SeriesStyle::Dashed => Some(RGBColor(0xa9, 0x86, 0x5b)),
        SeriesStyle::Dotted => Some(RGBColor(0x6f, 0x9a, 0x84)),
        SeriesStyle::Line | SeriesStyle::Points => None,
    }
}

/// Fills of shaded spans, alternating.
pub const SPAN_FILLS: [RGBColor; 2] = [RGBColor(0xe3, 0xee, 0xf1), RGBColor(0xf5, 0xe6, 0xda)];

/// Colour of vertical/horizontal marks and labelled points.
pub const MARK: RGBColor = RGBColor(0x4a, 0x4f, 0x55);

/// Heat-map ramp stops, low to high: sand, amber, brick, plum.
const RAMP: [(f64, (u8, u8, u8)); 4] = [
    (0.0, (0xf6, 0xf0, 0xd8)),
    (0.35, (0xe8, 0xb0, 0x4a)),
    (0.7, (0xc0, 0x4f, 0x2c)),
    (1.0, (0x5a, 0x22, 0x4e)),
];

/// Colour of a heat-map cell at fraction `t` (0..1) of the z range.
pub fn ramp(t: f64) -> RGBColor {
    let t = if t.is_finite() {
        t.clamp(0.0, 1.0)
    } else {
        0.0
    };
    for pair in RAMP.windows(2) {
        let ((t0, c0), (t1, c1)) = (pair[0], pair[1]);
        if t <= t1 {
            let f = (t - t0) / (t1 - t0);
            let mix = |a: u8, b: u8| libm::round(a as f64 + (b as f64 - a as f64) * f) as u8;
            return RGBColor(mix(c0.0, c1.0), mix(c0.1, c1.1), mix(c0.2, c1.2));
        }
    }
    let last = RAMP[RAMP.len() - 1].1;
    RGBColor(last.0, last.1, last.2)
}

/// Font sizes in pixels.
pub const TITLE_PX: f64 = 19.0;
pub const LABEL_PX: f64 = 15.0;
pub const TICK_PX: f64 = 13.0;
pub const NOTE_PX: f64 = 12.5;

/// Default image size in pixels.
pub const WIDTH: u32 = 760;
pub const HEIGHT: u32 = 480;
