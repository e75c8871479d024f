//! The audit record as Markdown (for merge requests and wikis); plots travel
//! inside the file as base64 SVG images.

use crate::render::table::escape_markdown as esc;

use super::data::{Entry, EntryKind, RecordData, CAUTIONS};

/// Render the record as a Markdown document.
pub fn markdown(r: &RecordData) -> String {
    let mut s = format!("# Audit record: {}\n\n", esc(&r.worksheet.path));
    header(&mut s, r);
    inputs(&mut s, r);
    s.push_str("## Values\n\n");
    for e in r.entries.iter().filter(|e| e.kind != EntryKind::Input) {
        value_entry(&mut s, e);
    }
    checks(&mut s, r);
    methods(&mut s, r);
    if !r.other_warnings.is_empty() {
        s.push_str("## Other warnings\n\n");
        for w in &r.other_warnings {
            s.push_str(&format!("- {}\n", esc(w)));
        }
        s.push('\n');
    }
    s.push_str("## Cautions\n\n");
    for c in CAUTIONS {
        s.push_str(&format!("- {c}\n"));
    }
    s
}

fn header(s: &mut String, r: &RecordData) {
    s.push_str("| | |\n| --- | --- |\n");
    s.push_str(&format!(
        "| Worksheet | `{}` (SHA-256 `{}`) |\n",
        r.worksheet.path, r.worksheet.sha256
    ));
    for f in &r.loaded {
        s.push_str(&format!(
            "| Loaded | `{}` (SHA-256 `{}`) |\n",
            f.path, f.sha256
        ));
    }
    s.push_str(&format!("| Tool | siccant {} |\n", r.tool_version));
    let overrides: Vec<String> = r.overrides.iter().map(|o| format!("`--set {o}`")).collect();
    s.push_str(&format!(
        "| Overrides | {} |\n",
        if overrides.is_empty() {
            "none".to_string()
        } else {
            overrides.join(" ")
        }
    ));
    let when = r
        .timestamp
        .clone()
        .unwrap_or_else(|| "omitted (reproducible record)".into());
    s.push_str(&format!("| Run at | {when} |\n\n"));
    let failed = r.failed_checks();
    s.push_str(&format!(
        "Checks: {} of {} pass. Warnings: {}.\n\n",
        r.checks.len() - failed,
        r.checks.len(),
        r.warning_count()
    ));
}

fn inputs(s: &mut String, r: &RecordData) {
    s.push_str("## Inputs\n\n");
    let list: Vec<&Entry> = r.entries_of(EntryKind::Input).collect();
    if list.is_empty() {
        s.push_str("*This worksheet declares no inputs.*\n\n");
        return;
    }
    s.push_str("| Name | Value | As written | Line |\n| --- | --- | --- | ---: |\n");
    for e in list {
        let note = if e.overridden { " (set by --set)" } else { "" };
        s.push_str(&format!(
            "| `{}` | {}{note} | `{}` | {} |\n",
            e.name,
            inline(e),
            e.source.replace('|', "\\|"),
            e.line
        ));
    }
    s.push('\n');
}

/// A value short enough for a table cell.
fn inline(e: &Entry) -> String {
    crate::render::markdown(&e.value)
        .replace('\n', " ")
        .replace('|', "\\|")
}

fn value_entry(s: &mut String, e: &Entry) {
    let title = match e.kind {
        EntryKind::Shown => "shown".to_string(),
        _ => format!("`{}`", e.name),
    };
    s.push_str(&format!(
        "### {title} (line {})\n\n```\n{}\n```\n\n",
        e.line, e.source
    ));
    s.push_str(&format!(
        "{}\n\n",
        crate::render::markdown(&e.value).trim_end()
    ));
    if !e.depends_on.is_empty() {
        let deps: Vec<String> = e.depends_on.iter().map(|d| format!("`{d}`")).collect();
        s.push_str(&format!("Depends on: {}\n\n", deps.join(", ")));
    }
    for b in &e.builtins {
        s.push_str(&format!(
            "- `{}`: {} Source: {}\n",
            b.name,
            esc(b.method),
            esc(b.source)
        ));
    }
    for w in &e.warnings {
        s.push_str(&format!("- **Warning:** {}\n", esc(w)));
    }
    if !e.builtins.is_empty() || !e.warnings.is_empty() {
        s.push('\n');
    }
}

fn checks(s: &mut String, r: &RecordData) {
    s.push_str("## Checks\n\n");
    if r.checks.is_empty() {
        s.push_str("*This worksheet has no checks.*\n\n");
        return;
    }
    s.push_str("| Check | Line | Outcome |\n| --- | ---: | --- |\n");
    for c in &r.checks {
        let outcome = if c.passed { "pass" } else { "**FAIL**" };
        s.push_str(&format!(
            "| `{}` | {} | {outcome} |\n",
            c.text.replace('|', "\\|"),
            c.line
        ));
    }
    s.push('\n');
}

fn methods(s: &mut String, r: &RecordData) {
    let used = r.builtins_used();
    if used.is_empty() {
        return;
    }
    s.push_str("## Methods and sources\n\n");
    for b in used {
        s.push_str(&format!(
            "- `{}` ({}): {} Method: {} Source: {} Valid for: {}\n",
            b.name,
            b.family,
            esc(b.doc),
            esc(b.method),
            esc(b.source),
            esc(b.validity)
        ));
    }
    s.push('\n');
}
