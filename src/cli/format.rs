//! Printing a run's output as text, JSON, Markdown or HTML.

use serde_json::json;

use super::Format;
use crate::eval::OutputItem;
use crate::render;
use crate::session::{Output, Session};
use crate::syntax::{self, StmtKind};

/// Source texts of the bare expressions in `text`, in order (to label them).
pub fn shown_texts(text: &str) -> Vec<String> {
    let (stmts, _) = syntax::parse(text, 0);
    stmts
        .iter()
        .filter_map(|s| match &s.kind {
            StmtKind::Show(e) => text
                .get(e.span.start as usize..e.span.end as usize)
                .map(str::to_string),
            _ => None,
        })
        .collect()
}

/// Statements that produce output (all but function definitions).
pub fn statement_count(text: &str) -> usize {
    let (stmts, _) = syntax::parse(text, 0);
    stmts
        .iter()
        .filter(|s| !matches!(s.kind, StmtKind::Function { .. }))
        .count()
}

/// Render a run's output.
pub fn render(session: &Session, out: &Output, shown: &[String], format: Format) -> String {
    match format {
        Format::Text => text(out, shown),
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&to_json(session, out)).unwrap_or_default();
            s.push('\n');
            s
        }
        Format::Markdown => markdown(out, shown),
        Format::Html => html(out, shown),
    }
}

fn label<'a>(name: &'a Option<String>, shown: &mut impl Iterator<Item = &'a String>) -> String {
    match name {
        Some(n) => n.clone(),
        None => shown.next().cloned().unwrap_or_default(),
    }
}

fn text(out: &Output, shown: &[String]) -> String {
    let mut s = String::new();
    let mut shown = shown.iter();
    for item in &out.items {
        match item {
            OutputItem::Value { name, value } => {
                let v = render::text(value).replace('\n', "\n  ");
                s.push_str(&format!("{} = {v}\n", label(name, &mut shown)));
            }
            OutputItem::Check { text, passed } => {
                s.push_str(&format!(
                    "check {text} ... {}\n",
                    if *passed { "ok" } else { "FAILED" }
                ));
            }
        }
    }
    s
}

/// The JSON document of DESIGN.md: `values`, `checks`, `warnings`.
pub fn to_json(session: &Session, out: &Output) -> serde_json::Value {
    let values: Vec<_> = out
        .items
        .iter()
        .filter_map(|i| match i {
            OutputItem::Value {
                name: Some(n),
                value,
            } => Some(render::json_named(n, value)),
            _ => None,
        })
        .collect();
    let checks: Vec<_> = out
        .items
        .iter()
        .filter_map(|i| match i {
            OutputItem::Check { text, passed } => Some(json!({ "text": text, "passed": passed })),
            _ => None,
        })
        .collect();
    let warnings: Vec<_> = out
        .warnings
        .iter()
        .map(|w| json!({ "message": w.message, "line": session.sources().line_col(w.span).0 }))
        .collect();
    json!({ "values": values, "checks": checks, "warnings": warnings })
}

fn markdown(out: &Output, shown: &[String]) -> String {
    let mut s = String::from("| name | value |\n|---|---|\n");
    let mut shown = shown.iter();
    let mut checks = String::new();
    for item in &out.items {
        match item {
            OutputItem::Value { name, value } => {
                let v = render::text(value)
                    .replace('\n', "<br>")
                    .replace('|', "\\|");
                s.push_str(&format!("| `{}` | {v} |\n", label(name, &mut shown)));
            }
            OutputItem::Check { text, passed } => {
                checks.push_str(&format!(
                    "- {} `{text}`\n",
                    if *passed { "passed:" } else { "**FAILED:**" }
                ));
            }
        }
    }
    if !checks.is_empty() {
        s.push_str("\n**Checks**\n\n");
        s.push_str(&checks);
    }
    s
}

fn html(out: &Output, shown: &[String]) -> String {
    let mut s = String::from("<!DOCTYPE html>\n<html><head><meta charset=\"utf-8\"><title>siccant</title></head><body>\n<table>\n");
    let mut shown = shown.iter();
    for item in &out.items {
        match item {
            OutputItem::Value { name, value } => s.push_str(&format!(
                "<tr><th><code>{}</code></th><td>{}</td></tr>\n",
                render::escape(&label(name, &mut shown)),
                render::html(value)
            )),
            OutputItem::Check { text, passed } => s.push_str(&format!(
                "<tr><th>check</th><td><code>{}</code> {}</td></tr>\n",
                render::escape(text),
                if *passed {
                    "passed"
                } else {
                    "<strong>FAILED</strong>"
                }
            )),
        }
    }
    s.push_str("</table>\n</body></html>\n");
    s
}
