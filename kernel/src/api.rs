//! The front-end API the kernel adapts: `siccant::session` and `siccant::render`.
//!
//! Everything the kernel needs from the language passes through here, so the
//! adapter's dependency on the core is one screen long.

pub use siccant::session::{Completeness, Output, OutputItem, Session};

/// Renderers: text, HTML and JSON from the core; SVG and PNG for plots.
pub mod render {
    pub use siccant::render::{html, json, text};
    use siccant::value::Plot;

    /// A plot as SVG text.
    pub fn svg(plot: &Plot) -> Result<String, String> {
        Err(format!(
            "this build has no plot renderer (plot `{}`)",
            plot.title
        ))
    }

    /// A plot as PNG bytes.
    pub fn png(plot: &Plot) -> Result<Vec<u8>, String> {
        Err(format!(
            "this build has no plot renderer (plot `{}`)",
            plot.title
        ))
    }
}
