//! Plain-text rendering of values and of built-in help.

use crate::library::Builtin;
use crate::units::format_quantity;
use crate::value::Value;

/// A value as plain text; records and tables span several lines.
pub fn text(value: &Value) -> String {
    match value {
        Value::Quantity(q, unit) => format_quantity(q, unit.as_ref()),
        Value::Bool(b) => b.to_string(),
        Value::Str(s) => s.clone(),
        Value::List(items) => {
            let parts: Vec<String> = items.iter().map(text).collect();
            format!("[{}]", parts.join(", "))
        }
        Value::Record(r) => {
            let mut s = r.type_name.to_string();
            for (name, v) in r.fields.iter() {
                let inner = text(v).replace('\n', "\n    ");
                s.push_str(&format!("\n  {name} = {inner}"));
            }
            s
        }
        Value::Table(t) => super::table::text(t)
            .map(|s| s.trim_end().to_string())
            .unwrap_or_else(|e| format!("[table: {e}]")),
        Value::Plot(p) => format!("[plot: {}]", p.title),
        Value::Function(f) => format!("<function {}>", f.name()),
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
