//! Rendering values: text, HTML, Markdown, JSON, tables, SVG/PNG plots.

pub mod error;
pub mod file;
pub mod number;
pub mod plot;
pub mod png;
pub mod style;
pub mod svg;
pub mod table;

pub use error::RenderError;
pub use png::png;
pub use svg::svg;
