//! PNG plots: our SVG rasterised by resvg, with text set in the embedded
//! DejaVu Sans (assets/fonts, Bitstream Vera licence) from a private font
//! database, so no system font is looked up and every machine draws the same pixels.

use std::sync::{Arc, OnceLock};

use resvg::tiny_skia;
use resvg::usvg;

use crate::value::Plot;

use super::error::RenderError;

/// DejaVu Sans 2.37, embedded (see assets/fonts/LICENSE-DejaVu.txt).
static FONT: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");

/// Pixels per SVG pixel in the PNG (2 gives crisp text on high-density screens).
pub const SCALE: f32 = 2.0;

/// A font database holding only the embedded font, which also answers every
/// generic family (sans-serif, serif, monospace).
fn font_database() -> Arc<usvg::fontdb::Database> {
    static DB: OnceLock<Arc<usvg::fontdb::Database>> = OnceLock::new();
    DB.get_or_init(|| {
        let mut db = usvg::fontdb::Database::new();
        db.load_font_data(FONT.to_vec());
        db.set_sans_serif_family("DejaVu Sans");
        db.set_serif_family("DejaVu Sans");
        db.set_monospace_family("DejaVu Sans");
        Arc::new(db)
    })
    .clone()
}

/// Render a plot as PNG bytes (the SVG drawing at [`SCALE`] times its size).
pub fn png(plot: &Plot) -> Result<Vec<u8>, RenderError> {
    let svg = super::svg::svg(plot)?;
    svg_to_png(&svg)
}

/// Rasterise an SVG document with the embedded font.
pub fn svg_to_png(svg: &str) -> Result<Vec<u8>, RenderError> {
    let options = usvg::Options {
        fontdb: font_database(),
        font_family: "DejaVu Sans".into(),
        ..usvg::Options::default()
    };
    let tree = usvg::Tree::from_str(svg, &options)
        .map_err(|e| RenderError::Draw(format!("reading the SVG: {e}")))?;
    let size = tree
        .size()
        .to_int_size()
        .scale_by(SCALE)
        .ok_or_else(|| RenderError::Draw("image size overflow".into()))?;
    let mut pixmap = tiny_skia::Pixmap::new(size.width(), size.height()).ok_or_else(|| {
        RenderError::Draw(format!(
            "cannot allocate a {}x{} image",
            size.width(),
            size.height()
        ))
    })?;
    resvg::render(
        &tree,
        tiny_skia::Transform::from_scale(SCALE, SCALE),
        &mut pixmap.as_mut(),
    );
    pixmap
        .encode_png()
        .map_err(|e| RenderError::Draw(format!("encoding PNG: {e}")))
}
