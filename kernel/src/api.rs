//! The front-end API the kernel adapts: `siccant::session` and `siccant::render`.
//!
//! Everything the kernel needs from the language passes through here, so the
//! adapter's dependency on the core is one screen long.

pub use siccant::session::{Completeness, Output, OutputItem, Session};

/// Renderers: text, HTML and JSON of any value; SVG and PNG of a plot.
pub mod render {
    pub use siccant::render::{html, json, text};
    use siccant::value::Plot;

    /// A plot as SVG text.
    pub fn svg(plot: &Plot) -> Result<String, String> {
        siccant::render::svg(plot).map_err(|e| e.to_string())
    }

    /// A plot as PNG bytes.
    pub fn png(plot: &Plot) -> Result<Vec<u8>, String> {
        siccant::render::png(plot).map_err(|e| e.to_string())
    }
}
