//! JSON rendering: SI magnitudes with their SI unit, plus display text.
//! Temperatures are in kelvin; NaN and infinities become `null`.

use serde_json::{json as j, Map, Value as Json};

use super::text::{record_text, text};
use crate::value::Value;

/// A value as a JSON object: `si`, `unit` (SI), `text` (display); records add
/// `fields` of the same shape; tables add `columns` and `rows`.
pub fn json(value: &Value) -> Json {
    let mut obj = Map::new();
    match value {
        // The text is built from the fields' own texts, not written twice.
        Value::Record(_) => {}
        Value::List(items) if !is_quantity_list(items) => {}
        _ => {
            obj.insert("text".into(), Json::String(text(value)));
        }
    }
    match value {
        Value::Quantity(q, _) => {
            obj.insert("si".into(), number(q.si));
            obj.insert("unit".into(), Json::String(q.dim.si_unit()));
        }
        Value::Bool(b) => {
            obj.insert("value".into(), Json::Bool(*b));
        }
        Value::List(items) => list(items, &mut obj),
        Value::Record(r) => {
            let fields: Vec<Json> = r.fields.iter().map(|(n, v)| named(n, v)).collect();
            let texts = r
                .fields
                .iter()
                .zip(&fields)
                .map(|((n, _), f)| (n, text_of(f)));
            let shown = record_text(&r.type_name, texts);
            obj.insert("text".into(), Json::String(shown));
            obj.insert("type".into(), Json::String(r.type_name.to_string()));
            obj.insert("fields".into(), Json::Array(fields));
        }
        Value::Table(t) => {
            let cols = t
                .columns
                .iter()
                .map(|c| j!({ "name": c.name, "unit": column_unit(c) }))
                .collect();
            obj.insert("columns".into(), Json::Array(cols));
            let n = t.columns.first().map_or(0, |c| c.cells.len());
            let mixed: Vec<bool> = t.columns.iter().map(|c| column_dim(c).is_none()).collect();
            let rows = (0..n)
                .map(|r| {
                    let cells = t.columns.iter().zip(&mixed);
                    Json::Array(cells.map(|(c, &m)| cell(c.cells.get(r), m)).collect())
                })
                .collect();
            obj.insert("rows".into(), Json::Array(rows));
        }
        Value::Str(_) | Value::Plot(_) | Value::Function(_) => {}
    }
    Json::Object(obj)
}

/// `json(value)` with a leading `name` field.
pub fn named(name: &str, value: &Value) -> Json {
    let mut obj = Map::new();
    obj.insert("name".into(), Json::String(name.to_string()));
    if let Json::Object(rest) = json(value) {
        obj.extend(rest);
    }
    Json::Object(obj)
}

/// The `text` of an object [`json`] made.
fn text_of(obj: &Json) -> &str {
    obj.get("text").and_then(Json::as_str).unwrap_or_default()
}

/// A non-empty list of quantities of one dimension (shown as `si` numbers).
fn is_quantity_list(items: &[Value]) -> bool {
    let mut dims = items.iter().map(|v| match v {
        Value::Quantity(q, _) => Some(q.dim),
        _ => None,
    });
    match dims.next() {
        Some(Some(first)) => dims.all(|d| d == Some(first)),
        _ => false,
    }
}

fn list(items: &[Value], obj: &mut Map<String, Json>) {
    if is_quantity_list(items) {
        let si = items.iter().filter_map(|v| match v {
            Value::Quantity(q, _) => Some(number(q.si)),
            _ => None,
        });
        obj.insert("si".into(), Json::Array(si.collect()));
        if let Some(Value::Quantity(q, _)) = items.first() {
            obj.insert("unit".into(), Json::String(q.dim.si_unit()));
        }
    } else {
        let items: Vec<Json> = items.iter().map(json).collect();
        let texts: Vec<&str> = items.iter().map(text_of).collect();
        obj.insert(
            "text".into(),
            Json::String(format!("[{}]", texts.join(", "))),
        );
        obj.insert("items".into(), Json::Array(items));
    }
}

/// The SI unit of a column's quantities; null for a column without
/// quantities or whose quantities differ in dimension (a fit's parameters).
fn column_unit(c: &crate::value::Column) -> Json {
    match column_dim(c) {
        Some(Some(d)) => Json::String(d.si_unit()),
        _ => Json::Null,
    }
}

/// `Some(dim)` when every quantity in the column has that dimension
/// (`Some(None)` when it holds none), `None` when they differ.
fn column_dim(c: &crate::value::Column) -> Option<Option<crate::units::Dim>> {
    let mut dims = c.cells.iter().filter_map(|v| match v {
        Value::Quantity(q, _) => Some(q.dim),
        _ => None,
    });
    let first = dims.next();
    match first {
        Some(d) if dims.any(|e| e != d) => None,
        _ => Some(first),
    }
}

/// One cell: a quantity as its SI number, or, in a column of mixed
/// dimensions, as `{ "si": ..., "unit": ... }`.
fn cell(v: Option<&Value>, mixed: bool) -> Json {
    match v {
        Some(Value::Quantity(q, _)) if mixed => {
            j!({ "si": number(q.si), "unit": q.dim.si_unit() })
        }
        Some(Value::Quantity(q, _)) => number(q.si),
        Some(Value::Bool(b)) => Json::Bool(*b),
        Some(other) => Json::String(text(other)),
        None => Json::Null,
    }
}

fn number(x: f64) -> Json {
    serde_json::Number::from_f64(x).map_or(Json::Null, Json::Number)
}
