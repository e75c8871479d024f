//! The audit record as one self-contained HTML page: inline CSS (screen and
//! print), inline SVG plots, no scripts and no external resources, so it opens
//! offline and prints as a review document. The output depends only on the
//! [`RecordData`], so two reproducible runs give identical bytes.

use crate::library::Builtin;
use crate::render::table::escape_html as esc;

use super::data::{CheckEntry, Entry, EntryKind, RecordData, CAUTIONS};

const STYLE: &str = include_str!("record.css");

const NAV: &str = "<nav class=\"toc\"><a href=\"#inputs\">Inputs</a> <a href=\"#values\">Values</a> <a href=\"#checks\">Checks</a> <a href=\"#methods\">Methods</a> <a href=\"#cautions\">Cautions</a></nav>\n";

/// Render the record as a complete HTML document.
pub fn html(r: &RecordData) -> String {
    let mut s = String::with_capacity(64 * 1024);
    s.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    s.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
    s.push_str(&format!(
        "<title>Audit record: {}</title>\n",
        esc(&r.worksheet.path)
    ));
    s.push_str(&format!(
        "<style>\n{STYLE}</style>\n</head>\n<body>\n<main>\n"
    ));
    header(&mut s, r);
    s.push_str(NAV);
    summary(&mut s, r);
    inputs(&mut s, r);
    values(&mut s, r);
    checks(&mut s, &r.checks);
    methods(&mut s, &r.builtins_used());
    other_warnings(&mut s, &r.other_warnings);
    cautions(&mut s);
    s.push_str("</main>\n</body>\n</html>\n");
    s
}

fn header(s: &mut String, r: &RecordData) {
    s.push_str(&format!(
        "<header>\n<p class=\"kicker\">siccant audit record</p>\n<h1>{}</h1>\n",
        esc(&r.worksheet.path)
    ));
    s.push_str("<table class=\"facts\">\n");
    fact(
        s,
        "Worksheet",
        &format!(
            "{} <span class=\"hash\">SHA-256 {}</span>",
            esc(&r.worksheet.path),
            esc(&r.worksheet.sha256)
        ),
    );
    for f in &r.loaded {
        fact(
            s,
            "Loaded",
            &format!(
                "{} <span class=\"hash\">SHA-256 {}</span>",
                esc(&f.path),
                esc(&f.sha256)
            ),
        );
    }
    fact(s, "Tool", &format!("siccant {}", esc(&r.tool_version)));
    let overrides = if r.overrides.is_empty() {
        "none".to_string()
    } else {
        r.overrides
            .iter()
            .map(|o| format!("<code>--set {}</code>", esc(o)))
            .collect::<Vec<_>>()
            .join(" ")
    };
    fact(s, "Overrides", &overrides);
    let when = match &r.timestamp {
        Some(t) => format!("<time datetime=\"{0}\">{0}</time>", esc(t)),
        None => "omitted (reproducible record)".to_string(),
    };
    fact(s, "Run at", &when);
    s.push_str("</table>\n</header>\n");
}

fn fact(s: &mut String, label: &str, html: &str) {
    s.push_str(&format!(
        "<tr><th scope=\"row\">{label}</th><td>{html}</td></tr>\n"
    ));
}

fn summary(s: &mut String, r: &RecordData) {
    let inputs = r.entries_of(EntryKind::Input).count();
    let values = r.entries.len() - inputs;
    let failed = r.failed_checks();
    let verdict = match (r.checks.len(), failed) {
        (0, _) => "<span class=\"badge none\">no checks</span>".to_string(),
        (n, 0) => format!("<span class=\"badge pass\">all {n} checks pass</span>"),
        (n, f) => format!("<span class=\"badge fail\">{f} of {n} checks fail</span>"),
    };
    s.push_str(&format!(
        "<section class=\"summary\">\n<p>{verdict} {inputs} inputs, {values} computed values, {} built-in methods, {} warnings.</p>\n</section>\n",
        r.builtins_used().len(),
        r.warning_count()
    ));
}

fn inputs(s: &mut String, r: &RecordData) {
    s.push_str("<section id=\"inputs\">\n<h2>Inputs</h2>\n");
    let list: Vec<&Entry> = r.entries_of(EntryKind::Input).collect();
    if list.is_empty() {
        s.push_str("<p class=\"empty\">This worksheet declares no inputs.</p>\n");
    } else {
        s.push_str("<table class=\"inputs\">\n<thead><tr><th>Name</th><th>Value</th><th>As written</th><th>Line</th></tr></thead>\n<tbody>\n");
        for e in list {
            let note = if e.overridden {
                " <span class=\"badge set\">set by --set</span>"
            } else {
                ""
            };
            s.push_str(&format!(
                "<tr id=\"{}\"><th scope=\"row\"><code>{}</code></th><td>{}{note}</td><td><code>{}</code></td><td>{}</td></tr>\n",
                anchor(&e.name),
                esc(&e.name),
                crate::render::html(&e.value),
                esc(&e.source),
                e.line
            ));
        }
        s.push_str("</tbody>\n</table>\n");
    }
    s.push_str("</section>\n");
}

fn values(s: &mut String, r: &RecordData) {
    s.push_str("<section id=\"values\">\n<h2>Values</h2>\n");
    let mut any = false;
    for e in r.entries.iter().filter(|e| e.kind != EntryKind::Input) {
        value_entry(s, e, r);
        any = true;
    }
    if !any {
        s.push_str("<p class=\"empty\">No computed values.</p>\n");
    }
    s.push_str("</section>\n");
}

fn value_entry(s: &mut String, e: &Entry, r: &RecordData) {
    let id = if e.kind == EntryKind::Shown {
        String::new()
    } else {
        format!(" id=\"{}\"", anchor(&e.name))
    };
    s.push_str(&format!("<article class=\"entry\"{id}>\n"));
    let title = if e.kind == EntryKind::Shown {
        "shown".to_string()
    } else {
        format!("<code>{}</code>", esc(&e.name))
    };
    s.push_str(&format!(
        "<h3>{title} <span class=\"line\">line {}</span></h3>\n",
        e.line
    ));
    s.push_str(&format!(
        "<pre class=\"source\"><code>{}</code></pre>\n",
        esc(&e.source)
    ));
    s.push_str(&format!(
        "<div class=\"result\">{}</div>\n",
        crate::render::html(&e.value)
    ));
    if !e.depends_on.is_empty() {
        let links: Vec<String> = e.depends_on.iter().map(|d| dependency_link(d, r)).collect();
        s.push_str(&format!(
            "<p class=\"deps\">Depends on: {}</p>\n",
            links.join(", ")
        ));
    }
    for b in &e.builtins {
        s.push_str(&format!(
            "<p class=\"method\"><code>{}</code>: {} <span class=\"source\">Source: {}</span></p>\n",
            esc(b.name),
            esc(b.method),
            esc(b.source)
        ));
    }
    for w in &e.warnings {
        s.push_str(&format!(
            "<p class=\"warning\"><strong>Warning:</strong> {}</p>\n",
            esc(w)
        ));
    }
    s.push_str("</article>\n");
}

/// A link to a named value's entry (user functions have none).
fn dependency_link(name: &str, r: &RecordData) -> String {
    let named = r
        .entries
        .iter()
        .any(|e| e.kind != EntryKind::Shown && e.name == name);
    match named {
        true => format!(
            "<a href=\"#{}\"><code>{}</code></a>",
            anchor(name),
            esc(name)
        ),
        false => format!("<code>{}</code>", esc(name)),
    }
}

/// A fragment id for a name (names are letters, digits and `_`; anything else is escaped).
fn anchor(name: &str) -> String {
    let safe: String = name
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '_' {
                c
            } else {
                '-'
            }
        })
        .collect();
    format!("v-{safe}")
}

fn checks(s: &mut String, list: &[CheckEntry]) {
    s.push_str("<section id=\"checks\">\n<h2>Checks</h2>\n");
    if list.is_empty() {
        s.push_str("<p class=\"empty\">This worksheet has no checks.</p>\n");
    } else {
        s.push_str("<table class=\"checks\">\n<thead><tr><th>Check</th><th>Line</th><th>Outcome</th></tr></thead>\n<tbody>\n");
        for c in list {
            let badge = if c.passed {
                "<span class=\"badge pass\">pass</span>"
            } else {
                "<span class=\"badge fail\">FAIL</span>"
            };
            s.push_str(&format!(
                "<tr><td><code>{}</code></td><td>{}</td><td>{badge}</td></tr>\n",
                esc(&c.text),
                c.line
            ));
        }
        s.push_str("</tbody>\n</table>\n");
    }
    s.push_str("</section>\n");
}

fn methods(s: &mut String, list: &[&'static Builtin]) {
    s.push_str("<section id=\"methods\">\n<h2>Methods and sources</h2>\n");
    if list.is_empty() {
        s.push_str("<p class=\"empty\">No built-in methods were used.</p>\n</section>\n");
        return;
    }
    s.push_str("<dl class=\"methods\">\n");
    for b in list {
        s.push_str(&format!(
            "<dt><code>{}</code> ({})</dt>\n",
            esc(b.name),
            esc(b.family)
        ));
        s.push_str(&format!(
            "<dd><p>{}</p><p><strong>Method:</strong> {}</p><p><strong>Source:</strong> {}</p><p><strong>Valid for:</strong> {}</p></dd>\n",
            esc(b.doc),
            esc(b.method),
            esc(b.source),
            esc(b.validity)
        ));
    }
    s.push_str("</dl>\n</section>\n");
}

fn other_warnings(s: &mut String, list: &[String]) {
    if list.is_empty() {
        return;
    }
    s.push_str("<section>\n<h2>Other warnings</h2>\n");
    for w in list {
        s.push_str(&format!("<p class=\"warning\">{}</p>\n", esc(w)));
    }
    s.push_str("</section>\n");
}

fn cautions(s: &mut String) {
    s.push_str("<section class=\"cautions\" id=\"cautions\">\n<h2>Cautions</h2>\n<ul>\n");
    for c in CAUTIONS {
        s.push_str(&format!("<li>{}</li>\n", esc(c)));
    }
    s.push_str("</ul>\n</section>\n");
}
