//! Rendering values for people and programs: text, HTML, Markdown and JSON.
//!
//! No renderer computes physics. The entry points [`text`], [`html`],
//! [`markdown`] and [`json`] are stable; richer renderers (plots, tables, the
//! audit record) live beside this file.

mod json;
mod text;

pub use json::{json, named as json_named};
pub use text::{help_markdown, help_text, text};

use crate::value::Value;

/// A value as an HTML fragment.
pub fn html(value: &Value) -> String {
    match value {
        Value::Record(r) => {
            let mut s = format!(
                "<table class=\"siccant-record\"><caption>{}</caption>",
                escape(&r.type_name)
            );
            for (name, v) in &r.fields {
                s.push_str(&format!(
                    "<tr><th>{}</th><td>{}</td></tr>",
                    escape(name),
                    html(v)
                ));
            }
            s.push_str("</table>");
            s
        }
        Value::Table(t) => {
            let mut s = String::from("<table class=\"siccant-table\"><tr>");
            for c in &t.columns {
                s.push_str(&format!("<th>{}</th>", escape(&text::column_header(c))));
            }
            s.push_str("</tr>");
            for row in 0..t.columns.first().map_or(0, |c| c.cells.len()) {
                s.push_str("<tr>");
                for c in &t.columns {
                    s.push_str(&format!("<td>{}</td>", escape(&text::cell(c, row))));
                }
                s.push_str("</tr>");
            }
            s.push_str("</table>");
            s
        }
        other => format!(
            "<span class=\"siccant-value\">{}</span>",
            escape(&text(other))
        ),
    }
}

/// A value as Markdown.
pub fn markdown(value: &Value) -> String {
    match value {
        Value::Record(r) => {
            let mut s = format!("*{}*\n\n| field | value |\n|---|---|\n", r.type_name);
            for (name, v) in &r.fields {
                s.push_str(&format!(
                    "| {} | {} |\n",
                    name,
                    text(v).replace('\n', " ").replace('|', "\\|")
                ));
            }
            s
        }
        Value::Table(t) => {
            let heads: Vec<String> = t.columns.iter().map(text::column_header).collect();
            let mut s = format!(
                "| {} |\n|{}\n",
                heads.join(" | "),
                "---|".repeat(heads.len())
            );
            for row in 0..t.columns.first().map_or(0, |c| c.cells.len()) {
                let cells: Vec<String> = t.columns.iter().map(|c| text::cell(c, row)).collect();
                s.push_str(&format!("| {} |\n", cells.join(" | ")));
            }
            s
        }
        other => format!("`{}`", text(other)),
    }
}

/// Escape text for HTML.
pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}
