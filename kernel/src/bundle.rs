//! Turning session output into Jupyter MIME bundles and error reports.
//!
//! A value becomes `text/plain` + `text/html` + `application/json`; a plot adds
//! `image/svg+xml` and `image/png`; a check becomes a one-line pass/fail note.

use base64::Engine as _;
use jupyter_protocol::messaging::ErrorOutput;
use jupyter_protocol::{Media, MediaType};
use siccant::diag::Diagnostic;
use siccant::value::Value;

use crate::api::{render, OutputItem, Session};

/// The MIME bundle of one output item, plus any rendering problems (shown as stderr).
pub fn item_bundle(item: &OutputItem) -> (Media, Vec<String>) {
    match item {
        OutputItem::Value { name, value } => value_bundle(name.as_deref(), value),
        OutputItem::Check { text, passed } => (check_bundle(text, *passed), Vec::new()),
    }
}

/// Text, HTML and JSON for a value; SVG and PNG as well for a plot.
pub fn value_bundle(name: Option<&str>, value: &Value) -> (Media, Vec<String>) {
    let text = render::text(value);
    let html = render::html(value);
    let mut media = vec![
        MediaType::Plain(match name {
            Some(n) => format!("{n} = {text}"),
            None => text,
        }),
        MediaType::Html(match name {
            Some(n) => format!(
                "<div class=\"siccant-value\"><code>{}</code> = {html}</div>",
                escape(n)
            ),
            None => html,
        }),
        MediaType::Json(render::json(value)),
    ];
    let mut problems = Vec::new();
    if let Value::Plot(plot) = value {
        match render::svg(plot) {
            Ok(svg) => media.push(MediaType::Svg(svg)),
            Err(e) => problems.push(format!("could not draw the plot as SVG: {e}")),
        }
        match render::png(plot) {
            Ok(png) => media.push(MediaType::Png(
                base64::engine::general_purpose::STANDARD.encode(png),
            )),
            Err(e) => problems.push(format!("could not draw the plot as PNG: {e}")),
        }
    }
    (Media::new(media), problems)
}

/// A check's outcome as a pass/fail line.
fn check_bundle(text: &str, passed: bool) -> Media {
    let (word, color) = if passed {
        ("passed", "#1a7f37")
    } else {
        ("FAILED", "#cf222e")
    };
    Media::new(vec![
        MediaType::Plain(format!("check {word}: {text}")),
        MediaType::Html(format!(
            "<div class=\"siccant-check\"><b style=\"color:{color}\">check {word}</b>: <code>{}</code></div>",
            escape(text)
        )),
        MediaType::Json(serde_json::json!({ "check": text, "passed": passed })),
    ])
}

/// The `error` content for a failed evaluation: ename, evalue and a traceback
/// holding each diagnostic with its source line and span underlined.
pub fn error_output(
    session: &Session,
    diagnostics: &[Diagnostic],
    interrupted: bool,
) -> ErrorOutput {
    let ename = if interrupted {
        "Interrupted"
    } else {
        "WorksheetError"
    };
    let evalue = diagnostics
        .first()
        .map_or_else(|| "evaluation failed".to_string(), |d| d.message.clone());
    let traceback = diagnostics
        .iter()
        .flat_map(|d| lines(&session.render_diagnostic(d, true)))
        .collect();
    ErrorOutput {
        ename: ename.to_string(),
        evalue,
        traceback,
    }
}

/// Warnings as stderr text, one rendered diagnostic after another.
pub fn warning_text(session: &Session, warnings: &[Diagnostic]) -> String {
    let mut text = String::new();
    for w in warnings {
        text.push_str(&session.render_diagnostic(w, false));
        if !text.ends_with('\n') {
            text.push('\n');
        }
    }
    text
}

/// The lines of `text`, without trailing blank lines.
fn lines(text: &str) -> Vec<String> {
    let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
    while lines.last().is_some_and(|l| l.trim().is_empty()) {
        lines.pop();
    }
    lines
}

/// Escape text for HTML.
pub fn escape(text: &str) -> String {
    text.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

/// The error shown when the evaluation thread itself failed on a cell.
pub fn internal_error() -> ErrorOutput {
    ErrorOutput {
        ename: "InternalError".to_string(),
        evalue: "the evaluation failed inside the kernel; the worksheet state may be incomplete"
            .to_string(),
        traceback: Vec::new(),
    }
}
