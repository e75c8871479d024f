//! The audit record of a run: the worksheet and every loaded file with their
//! SHA-256, the tool version, overrides and time, every input and named value
//! with its expression, dependencies, result, methods, sources and warnings,
//! the checks, the plots, and the cautions, as HTML, Markdown or JSON.
//!
//! [`collect`] turns a finished [`Session`](crate::session::Session) run into
//! [`RecordData`]; [`html`], [`markdown`] and [`json`] render it; [`write`]
//! picks the format from the file extension and writes atomically.

mod collect;
mod data;
mod html;
mod json;
mod markdown;

use std::path::Path;

pub use collect::{collect, sha256_hex, utc_text, RunInfo};
pub use data::{CheckEntry, Entry, EntryKind, FileDigest, RecordData, CAUTIONS};
pub use html::html;
pub use json::json;
pub use markdown::markdown;

use crate::render::file::write_atomic;
use crate::render::RenderError;

/// The record in the format named by `path`'s extension (`.html`/`.htm`, `.md`, `.json`).
pub fn render_for(r: &RecordData, path: &Path) -> Result<String, RenderError> {
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .map(|e| e.to_ascii_lowercase());
    match ext.as_deref() {
        Some("html" | "htm") => Ok(html(r)),
        Some("md") => Ok(markdown(r)),
        Some("json") => {
            let mut s = serde_json::to_string_pretty(&json(r))
                .map_err(|e| RenderError::Draw(e.to_string()))?;
            s.push('\n');
            Ok(s)
        }
        _ => Err(RenderError::Format {
            path: path.to_path_buf(),
            expected: ".html, .md or .json",
        }),
    }
}

/// Write the record to `path` atomically; on error nothing is left at `path`.
pub fn write(r: &RecordData, path: &Path) -> Result<(), RenderError> {
    let body = render_for(r, path)?;
    write_atomic(path, body.as_bytes())
}
