//! Diagnostics: errors and warnings as values, each with a span and hints.

/// A byte range in one source file. `file` indexes the session's source map.
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug, Default)]
pub struct Span {
    pub file: u32,
    pub start: u32,
    pub end: u32,
}

/// How bad a diagnostic is.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
pub enum Severity {
    Error,
    Warning,
}

/// A message about the worksheet, pointing at a span, with hints that teach.
#[derive(Clone, PartialEq, Debug)]
pub struct Diagnostic {
    pub severity: Severity,
    pub span: Span,
    pub message: String,
    /// Hints; each may point at its own span.
    pub hints: Vec<(Option<Span>, String)>,
}

impl Diagnostic {
    /// An error at `span`.
    pub fn error(span: Span, message: impl Into<String>) -> Diagnostic {
        Diagnostic {
            severity: Severity::Error,
            span,
            message: message.into(),
            hints: Vec::new(),
        }
    }

    /// A warning at `span`.
    pub fn warning(span: Span, message: impl Into<String>) -> Diagnostic {
        Diagnostic {
            severity: Severity::Warning,
            ..Diagnostic::error(span, message)
        }
    }

    /// Add a hint without its own span.
    pub fn with_hint(mut self, hint: impl Into<String>) -> Diagnostic {
        self.hints.push((None, hint.into()));
        self
    }
}
