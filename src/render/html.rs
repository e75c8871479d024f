//! Values as HTML fragments for notebooks and the audit record: quantities
//! as text, records as two-column tables, tables via [`table::html`](super::table::html),
//! plots as inline SVG. A value that cannot be drawn shows its error instead.

use crate::value::{Record, Value};

use super::table::{self, escape_html};

/// A value as an HTML fragment (no scripts, no external resources).
pub fn html(value: &Value) -> String {
    match value {
        Value::Record(r) => record(r),
        Value::Table(t) => table::html(t).unwrap_or_else(|e| problem(&e.to_string())),
        Value::Plot(p) => match super::svg::svg(p) {
            Ok(svg) => format!("<figure class=\"siccant-plot\">{svg}</figure>\n"),
            Err(e) => problem(&e.to_string()),
        },
        Value::List(items) if items.iter().any(is_block) => {
            let parts: Vec<String> = items
                .iter()
                .map(|v| format!("<li>{}</li>", html(v)))
                .collect();
            format!("<ol class=\"siccant-list\">{}</ol>\n", parts.join(""))
        }
        other => format!(
            "<span class=\"siccant-value\">{}</span>",
            escape_html(&super::text(other))
        ),
    }
}

/// Values drawn as blocks rather than inline text.
fn is_block(v: &Value) -> bool {
    matches!(v, Value::Record(_) | Value::Table(_) | Value::Plot(_))
}

fn record(r: &Record) -> String {
    let mut s = format!(
        "<table class=\"siccant-record\">\n<caption>{}</caption>\n",
        escape_html(&r.type_name)
    );
    for (name, v) in r.fields.iter() {
        s.push_str(&format!(
            "<tr><th scope=\"row\">{}</th><td>{}</td></tr>\n",
            escape_html(name),
            html(v)
        ));
    }
    s.push_str("</table>\n");
    s
}

fn problem(message: &str) -> String {
    format!(
        "<p class=\"siccant-problem\">cannot show this value: {}</p>\n",
        escape_html(message)
    )
}
