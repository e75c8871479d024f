//! The audit record as JSON, for tools that archive or compare design runs.
//! Values use the same shape as `siccant run --format json`.

use serde_json::{json, Value as Json};

use crate::library::Builtin;

use super::data::{Entry, EntryKind, RecordData, CAUTIONS};

/// Render the record as a JSON value (print it with `serde_json::to_string_pretty`).
pub fn json(r: &RecordData) -> Json {
    let file = |f: &super::data::FileDigest| json!({ "path": f.path, "sha256": f.sha256 });
    json!({
        "record": "siccant audit record",
        "tool": { "name": "siccant", "version": r.tool_version },
        "worksheet": file(&r.worksheet),
        "loaded": r.loaded.iter().map(file).collect::<Vec<_>>(),
        "overrides": r.overrides,
        "timestamp": r.timestamp,
        "inputs": r.entries_of(EntryKind::Input).map(entry).collect::<Vec<_>>(),
        "values": r.entries.iter().filter(|e| e.kind != EntryKind::Input).map(entry).collect::<Vec<_>>(),
        "checks": r.checks.iter().map(|c| json!({ "text": c.text, "line": c.line, "passed": c.passed })).collect::<Vec<_>>(),
        "methods": r.builtins_used().into_iter().map(method).collect::<Vec<_>>(),
        "other_warnings": r.other_warnings,
        "cautions": CAUTIONS,
    })
}

fn entry(e: &Entry) -> Json {
    let kind = match e.kind {
        EntryKind::Input => "input",
        EntryKind::Value => "value",
        EntryKind::Shown => "shown",
    };
    json!({
        "name": e.name,
        "kind": kind,
        "source": e.source,
        "line": e.line,
        "depends_on": e.depends_on,
        "overridden": e.overridden,
        "result": crate::render::json(&e.value),
        "text": crate::render::text(&e.value),
        "builtins": e.builtins.iter().map(|b| b.name).collect::<Vec<_>>(),
        "warnings": e.warnings,
    })
}

fn method(b: &'static Builtin) -> Json {
    json!({ "name": b.name, "family": b.family, "method": b.method, "source": b.source, "validity": b.validity })
}
