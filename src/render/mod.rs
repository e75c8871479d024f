//! Rendering values: text, HTML, Markdown, JSON, tables, SVG/PNG plots.

pub mod error;
pub mod file;
pub mod number;
pub mod table;

pub use error::RenderError;
