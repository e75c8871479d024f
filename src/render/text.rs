//! Plain-text rendering of values and of built-in help.

use crate::library::Builtin;
use crate::units::{format_quantity, push_quantity_sig, DISPLAY_SIG_FIGS};
use crate::value::Value;

/// A value as plain text; records and tables span several lines.
pub fn text(value: &Value) -> String {
    match value {
        Value::Quantity(q, unit) => format_quantity(q, unit.as_ref()),
        Value::Bool(b) => b.to_string(),
        Value::Str(s) => s.clone(),
        Value::List(items) => list_text(items),
        Value::Record(r) => {
            let fields = r.fields.iter().map(|(name, v)| (name, text(v)));
            record_text(&r.type_name, fields)
        }
        Value::Table(t) => super::table::text(t)
            .map(|s| s.trim_end().to_string())
            .unwrap_or_else(|e| format!("[table: {e}]")),
        Value::Plot(p) => format!("[plot: {}]", p.title),
        Value::Function(f) => format!("<function {}>", f.name()),
    }
}

/// `[a, b, c]`, quantities written straight into the one string.
fn list_text(items: &[Value]) -> String {
    let mut s = String::with_capacity(2 + items.len() * 12);
    s.push('[');
    for (i, item) in items.iter().enumerate() {
        if i > 0 {
            s.push_str(", ");
        }
        match item {
            Value::Quantity(q, unit) => {
                push_quantity_sig(&mut s, q, unit.as_ref(), DISPLAY_SIG_FIGS)
            }
            other => s.push_str(&text(other)),
        }
    }
    s.push(']');
    s
}

/// A record's text from its type name and its fields' texts: one field a
/// line, `  name = text`, the field's own lines indented further.
pub(crate) fn record_text<N: AsRef<str>, T: AsRef<str>>(
    type_name: &str,
    fields: impl Iterator<Item = (N, T)>,
) -> String {
    let mut s = type_name.to_string();
    for (name, inner) in fields {
        s.push_str("\n  ");
        s.push_str(name.as_ref());
        s.push_str(" = ");
        push_indented(&mut s, inner.as_ref(), "\n    ");
    }
    s
}

/// `text` appended with every newline replaced by `newline`.
fn push_indented(s: &mut String, text: &str, newline: &str) {
    let mut lines = text.split('\n');
    if let Some(first) = lines.next() {
        s.push_str(first);
    }
    for line in lines {
        s.push_str(newline);
        s.push_str(line);
    }
}

fn signature(b: &Builtin) -> String {
    let params: Vec<String> = b
        .params
        .iter()
        .map(|p| match p.default {
            Some(d) => format!("{}: {d}", p.name),
            None => p.name.to_string(),
        })
        .collect();
    format!("{}({}) -> {}", b.name, params.join(", "), b.returns)
}

/// The help text of a built-in, as `help NAME` shows it.
pub fn help_text(b: &Builtin) -> String {
    let mut s = format!("{}\n\n{}\n", signature(b), b.doc);
    if !b.params.is_empty() {
        s.push_str("\nArguments:\n");
        for p in b.params {
            let default = p
                .default
                .map_or(String::new(), |d| format!(" (default {d})"));
            s.push_str(&format!(
                "  {:<12} [{}] {}{default}\n",
                p.name, p.unit, p.doc
            ));
        }
    }
    for (label, v) in [
        ("Method", b.method),
        ("Source", b.source),
        ("Valid", b.validity),
        ("Example", b.example),
    ] {
        if !v.is_empty() {
            s.push_str(&format!("{label}: {v}\n"));
        }
    }
    s
}

/// The reference entry of a built-in, as docs/builtins.md shows it.
pub fn help_markdown(b: &Builtin) -> String {
    let mut s = format!("### `{}`\n\n`{}`\n\n{}\n\n", b.name, signature(b), b.doc);
    if !b.params.is_empty() {
        s.push_str("| argument | unit | default | meaning |\n|---|---|---|---|\n");
        for p in b.params {
            s.push_str(&format!(
                "| `{}` | {} | {} | {} |\n",
                p.name,
                p.unit,
                p.default.unwrap_or("required"),
                p.doc
            ));
        }
        s.push('\n');
    }
    for (label, v) in [
        ("Method", b.method),
        ("Source", b.source),
        ("Validity", b.validity),
    ] {
        if !v.is_empty() {
            s.push_str(&format!("- **{label}:** {v}\n"));
        }
    }
    if !b.example.is_empty() {
        s.push_str(&format!("- **Example:** `{}`\n", b.example));
    }
    s.push('\n');
    s
}
