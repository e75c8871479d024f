//! The front-end API the kernel adapts, with the shape of `siccant::session`
//! and `siccant::render` (see API.md).
//!
//! This is a small stand-in used until the language core lands: it knows
//! numbers, `name = number` bindings, names, and `spin(seconds)` (a busy loop
//! that honours the interrupt flag, for exercising interrupts). The kernel
//! only uses the items below, so swapping in the real session is one `use`.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::{Duration, Instant};

use siccant::diag::{Diagnostic, Span};
use siccant::units::{Dim, Kind, Quantity};
use siccant::value::Value;

/// Persistent worksheet state (stand-in).
pub struct Session {
    names: Vec<(String, Value)>,
    interrupt: Arc<AtomicBool>,
    source: String,
}

/// What evaluating a cell produced.
pub struct Output {
    pub items: Vec<OutputItem>,
    pub warnings: Vec<Diagnostic>,
}

/// One shown result.
pub enum OutputItem {
    Value { name: Option<String>, value: Value },
    Check { text: String, passed: bool },
}

/// Completion candidates replacing `text[start..end]` (byte offsets).
pub struct Completion {
    pub start: usize,
    pub end: usize,
    pub matches: Vec<String>,
}

/// Whether a cell can run as written.
pub enum Completeness {
    Complete,
    Incomplete { indent: String },
    Invalid,
}

impl Default for Session {
    fn default() -> Self {
        Session::new()
    }
}

impl Session {
    /// An empty worksheet.
    pub fn new() -> Session {
        Session {
            names: Vec::new(),
            interrupt: Arc::new(AtomicBool::new(false)),
            source: String::new(),
        }
    }

    /// Evaluate a cell; state persists.
    pub fn eval(&mut self, text: &str) -> Result<Output, Vec<Diagnostic>> {
        self.source = text.to_string();
        let mut items = Vec::new();
        let mut offset = 0u32;
        for line in text.split_inclusive('\n') {
            let span = Span { file: 0, start: offset, end: offset + line.trim_end().len() as u32 };
            offset += line.len() as u32;
            let line = line.split('#').next().unwrap_or("").trim();
            if line.is_empty() {
                continue;
            }
            if let Some(item) = self.eval_line(line, span)? {
                items.push(item);
            }
        }
        Ok(Output { items, warnings: Vec::new() })
    }

    fn eval_line(&mut self, line: &str, span: Span) -> Result<Option<OutputItem>, Vec<Diagnostic>> {
        if let Some((name, expr)) = line.split_once('=') {
            let value = self.eval_expr(expr.trim(), span)?;
            let name = name.trim().to_string();
            self.names.retain(|(n, _)| *n != name);
            self.names.push((name, value));
            return Ok(None);
        }
        let value = self.eval_expr(line, span)?;
        Ok(Some(OutputItem::Value { name: None, value }))
    }

    fn eval_expr(&self, expr: &str, span: Span) -> Result<Value, Vec<Diagnostic>> {
        if let Ok(x) = expr.parse::<f64>() {
            return Ok(Value::Quantity(Quantity { si: x, dim: Dim::NONE, kind: Kind::Plain }, None));
        }
        if let Some(arg) = expr.strip_prefix("spin(").and_then(|s| s.strip_suffix(')')) {
            return self.spin(arg, span);
        }
        match self.names.iter().find(|(n, _)| n == expr) {
            Some((_, v)) => Ok(v.clone()),
            None => Err(vec![Diagnostic::error(span, format!("unknown name `{expr}`"))]),
        }
    }

    fn spin(&self, arg: &str, span: Span) -> Result<Value, Vec<Diagnostic>> {
        let seconds: f64 = arg.trim().parse().map_err(|_| vec![Diagnostic::error(span, "spin takes seconds")])?;
        let end = Instant::now() + Duration::from_secs_f64(seconds.clamp(0.0, 3600.0));
        while Instant::now() < end {
            if self.interrupt.load(Ordering::Relaxed) {
                return Err(vec![Diagnostic::error(span, "interrupted")]);
            }
            std::thread::sleep(Duration::from_millis(5));
        }
        Ok(Value::Bool(true))
    }

    /// Names starting with the word before `cursor`.
    pub fn complete(&self, text: &str, cursor: usize) -> Completion {
        let cursor = cursor.min(text.len());
        let start = text[..cursor]
            .rfind(|c: char| !(c.is_alphanumeric() || c == '_'))
            .map_or(0, |i| i + 1);
        let word = &text[start..cursor];
        let mut matches: Vec<String> =
            self.names.iter().map(|(n, _)| n.clone()).chain(["spin".to_string()]).filter(|n| n.starts_with(word)).collect();
        matches.sort();
        Completion { start, end: cursor, matches }
    }

    /// Open parentheses make a cell incomplete; a stray `)` makes it invalid.
    pub fn is_complete(&self, text: &str) -> Completeness {
        let depth = text.chars().fold(0i32, |d, c| match c {
            '(' => d + 1,
            ')' => d - 1,
            _ => d,
        });
        match depth {
            0 => Completeness::Complete,
            d if d > 0 => Completeness::Incomplete { indent: "    ".into() },
            _ => Completeness::Invalid,
        }
    }

    /// Doc text for the name under the cursor.
    pub fn inspect(&self, text: &str, cursor: usize) -> Option<String> {
        let c = self.complete(text, cursor);
        let word = &text[c.start..c.end];
        (word == "spin").then(|| "spin(seconds): busy loop that honours interrupts".to_string())
    }

    /// The flag that stops a running evaluation.
    pub fn interrupt_handle(&self) -> Arc<AtomicBool> {
        self.interrupt.clone()
    }

    /// `line:col: message` with the source line and a caret underline.
    pub fn render_diagnostic(&self, d: &Diagnostic, _color: bool) -> String {
        let start = d.span.start as usize;
        let line_start = self.source[..start.min(self.source.len())].rfind('\n').map_or(0, |i| i + 1);
        let line_no = self.source[..line_start].matches('\n').count() + 1;
        let line = self.source[line_start..].lines().next().unwrap_or("");
        let width = (d.span.end.saturating_sub(d.span.start) as usize).max(1);
        let col = start - line_start;
        format!("{line_no}:{}: error: {}\n  | {line}\n  | {}{}", col + 1, d.message, " ".repeat(col), "^".repeat(width))
    }
}

/// Renderers with the shape of `siccant::render`.
pub mod render {
    use siccant::value::{Plot, Value};

    /// Plain text of a value.
    pub fn text(value: &Value) -> String {
        match value {
            Value::Quantity(q, _) => format!("{}", q.si),
            Value::Bool(b) => b.to_string(),
            Value::Str(s) => s.clone(),
            other => format!("{other:?}"),
        }
    }

    /// HTML of a value.
    pub fn html(value: &Value) -> String {
        format!("<code>{}</code>", text(value))
    }

    /// JSON of a value.
    pub fn json(value: &Value) -> serde_json::Value {
        match value {
            Value::Quantity(q, _) => serde_json::json!({ "si": q.si }),
            other => serde_json::json!({ "text": text(other) }),
        }
    }

    /// SVG of a plot.
    pub fn svg(plot: &Plot) -> Result<String, String> {
        Err(format!("no plot renderer yet for `{}`", plot.title))
    }

    /// PNG of a plot.
    pub fn png(plot: &Plot) -> Result<Vec<u8>, String> {
        Err(format!("no plot renderer yet for `{}`", plot.title))
    }
}
