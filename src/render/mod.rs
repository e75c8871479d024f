//! Rendering values for people and programs: text, HTML, Markdown and JSON.
//!
//! No renderer computes physics. The entry points [`text`], [`html`],
//! [`markdown`] and [`json`] are stable; richer renderers (plots, tables, the
//! audit record) live beside this file.

pub mod error;
pub mod file;
mod html;
mod json;
mod markdown;
pub mod number;
pub mod plot;
pub mod png;
pub mod style;
pub mod svg;
pub mod table;
mod text;

pub use error::RenderError;
pub use html::html;
pub use markdown::{base64, markdown};
pub use png::png;
pub use svg::svg;

pub use json::{json, named as json_named};
pub use text::{help_markdown, help_text, text};

/// Escape text for HTML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}
