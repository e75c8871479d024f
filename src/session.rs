//! The one API every front end uses: a worksheet's persistent state.
//!
//! The CLI, the REPL and the Jupyter kernel are thin adapters over [`Session`]:
//! `eval` text, `complete` and `inspect` names, ask `is_complete` for
//! multi-line input, and `render_diagnostic` errors against the source map.

use std::path::{Path, PathBuf};
use std::sync::atomic::AtomicBool;
use std::sync::Arc;

use codespan_reporting::diagnostic::{Diagnostic as Report, Label};
use codespan_reporting::files::SimpleFiles;
use codespan_reporting::term::{self, termcolor::Ansi};

use crate::diag::{Diagnostic, Severity, Span};
use crate::eval::{self, Ctx, DefKind, Limits, Mode, Sheet, Sources};
use crate::library;
use crate::syntax::{self, split};
use crate::units;
use crate::value::Value;

pub use crate::eval::OutputItem;

/// What one `eval` produced.
#[derive(Clone, Debug, Default)]
pub struct Output {
    /// One item per statement that shows something, in order.
    pub items: Vec<OutputItem>,
    /// Warnings (validity ranges and the like).
    pub warnings: Vec<Diagnostic>,
}

/// Sizes of what a [`Session`] keeps between `eval`s (see [`Session::retained`]).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Retained {
    /// Source texts kept (entries, cells, loaded files).
    pub sources: usize,
    /// Resolved units cached by their text.
    pub unit_texts: usize,
    /// Definitions.
    pub definitions: usize,
    /// Computed values.
    pub values: usize,
}

/// Candidates for completing the word that ends at the cursor.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Completion {
    /// Byte range of the word being completed.
    pub start: usize,
    /// End of the word (the cursor).
    pub end: usize,
    /// Candidates, names first, then built-ins, keywords and units.
    pub matches: Vec<String>,
}

/// Whether a piece of input can be evaluated yet.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Completeness {
    /// Ready to evaluate.
    Complete,
    /// Brackets are still open; continue on the next line with this indent.
    Incomplete {
        /// Suggested indent for the next line.
        indent: String,
    },
    /// It can never become valid by adding text (e.g. an unmatched `)`).
    Invalid,
}

/// A worksheet's persistent state: definitions, computed values, sources.
pub struct Session {
    sources: Sources,
    sheet: Sheet,
    limits: Limits,
    /// A worksheet file: redefining a name is an error.
    strict: bool,
    mode: Mode,
    /// The file being run, for diagnostics and load cycles.
    path: Option<PathBuf>,
    entries: usize,
    /// Input overrides waiting for the worksheet that declares them.
    pending: Vec<(String, Value)>,
}

impl Default for Session {
    fn default() -> Session {
        Session::new()
    }
}

impl Session {
    /// An interactive session (REPL, notebook): redefining a name replaces it.
    pub fn new() -> Session {
        let dir = std::env::current_dir().unwrap_or_default();
        Session {
            sources: Sources::default(),
            sheet: Sheet::new(dir),
            limits: Limits::default(),
            strict: false,
            mode: Mode::Run,
            path: None,
            entries: 0,
            pending: Vec::new(),
        }
    }

    /// A session for running the worksheet file at `path`: loads are relative
    /// to its folder, diagnostics name it, and duplicate names are errors.
    pub fn with_file(path: impl AsRef<Path>) -> Session {
        let path = path.as_ref();
        let dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
        let mut s = Session::new();
        s.sheet.dir = if dir.as_os_str().is_empty() {
            PathBuf::from(".")
        } else {
            dir
        };
        s.strict = true;
        s.path = Some(path.to_path_buf());
        s
    }

    /// Only check names, units and dimensions; do not run engine work
    /// (`siccant check`). A built-in call gives a value of known shape and
    /// unknown magnitude (NaN), so what follows it is checked too; such values
    /// are for checking only and never to be shown. Values that follow a
    /// result of no fixed shape (tables, fits, studies, loads) are skipped.
    pub fn check_only(mut self) -> Session {
        self.mode = Mode::CheckOnly;
        self
    }

    /// Override an input before the worksheet is evaluated (`--set`). The next
    /// `eval` reports an error if its text does not declare `name` as an input.
    pub fn set_input(&mut self, name: impl Into<String>, value: Value) {
        self.pending.push((name.into(), value));
    }

    /// Evaluate text: add its definitions, then compute and return its statements'
    /// results in order. All errors found are returned.
    ///
    /// The interrupt flag is left as it is: the front end clears it
    /// ([`Session::clear_interrupt`]) when a new request begins, so an interrupt
    /// that arrives between announcing a cell and starting it is never lost.
    pub fn eval(&mut self, text: &str) -> Result<Output, Vec<Diagnostic>> {
        if !self.strict {
            self.forget_unused_sources();
        }
        let file = self.add_source(text);
        let parsed = syntax::parse_recovering(text, file);
        let mut early = parsed.errors;
        let mut skip = parsed.broken;
        if self.strict {
            // A worksheet file: report every error of the run at once.
            let defined = self.sheet.define_all(&parsed.stmts);
            early.extend(defined.errors);
            skip.extend(defined.cyclic);
        } else {
            if !early.is_empty() {
                return Err(early);
            }
            self.sheet.define(&parsed.stmts, false)?;
        }
        if let Err(e) = self.apply_pending(file) {
            early.extend(e);
        }
        let stmts = parsed.stmts;
        let mut ctx = Ctx::new(&mut self.sheet, &mut self.sources, &self.limits, self.mode);
        ctx.mark_failed(&skip);
        ctx.errors = early;
        if let Some(p) = self.path.as_ref().and_then(|p| p.canonicalize().ok()) {
            ctx.load_stack.push(p);
        }
        let items = eval::run_statements(&mut ctx, &stmts);
        let (mut errors, warnings) = (
            std::mem::take(&mut ctx.errors),
            std::mem::take(&mut ctx.warnings),
        );
        errors.sort_by_key(|d| (d.span.file, d.span.start));
        if errors.is_empty() {
            Ok(Output { items, warnings })
        } else {
            Err(errors)
        }
    }

    fn add_source(&mut self, text: &str) -> u32 {
        self.entries += 1;
        let name = match &self.path {
            Some(p) if self.entries == 1 => p.display().to_string(),
            _ => format!("<input {}>", self.entries),
        };
        self.sources.add(name, text, &self.sheet.dir.clone())
    }

    /// Drop the texts of earlier entries that no live definition points into
    /// (and an overgrown cache of units by text), so a long-lived session (REPL, notebook
    /// kernel) keeps a bounded amount. The last entry's text is dropped only
    /// here, at the start of the next `eval`, so its diagnostics can still be
    /// rendered after it ran.
    fn forget_unused_sources(&mut self) {
        let live = self.sheet.live_files();
        self.sources.retain(|id| live.contains(&id));
        self.sheet.trim_unit_texts();
    }

    /// How many source texts and resolved units this session keeps (for
    /// checking that a long-lived session stays bounded).
    pub fn retained(&self) -> Retained {
        Retained {
            sources: self.sources.len(),
            unit_texts: self.sheet.unit_texts.len(),
            definitions: self.sheet.defs.len(),
            values: self.sheet.cache.len(),
        }
    }

    fn apply_pending(&mut self, file: u32) -> Result<(), Vec<Diagnostic>> {
        let mut errors = Vec::new();
        let inputs: Vec<String> = self.sheet.inputs().into_iter().map(String::from).collect();
        for (name, value) in std::mem::take(&mut self.pending) {
            if inputs.contains(&name) {
                self.sheet.overrides.insert(name.clone(), value);
                self.sheet.invalidate(&[name]);
                continue;
            }
            let span = Span {
                file,
                start: 0,
                end: 0,
            };
            let mut d = Diagnostic::error(
                span,
                format!("`--set {name}`: `{name}` is not an input of this worksheet"),
            );
            let names: Vec<&str> = inputs.iter().map(String::as_str).collect();
            if let Some(best) = eval::suggest(&name, &names) {
                d = d.with_hint(format!("did you mean `{best}`?"));
            }
            let list = if inputs.is_empty() {
                "none".to_string()
            } else {
                inputs.join(", ")
            };
            errors.push(d.with_hint(format!("inputs declared with `input`: {list}")));
        }
        if errors.is_empty() {
            Ok(())
        } else {
            Err(errors)
        }
    }

    /// Names of this session's inputs, in definition order.
    pub fn inputs(&self) -> Vec<String> {
        self.sheet.inputs().into_iter().map(String::from).collect()
    }

    /// The source text of a definition, e.g. `area = 2.4 m * 1.8 m`, for records.
    pub fn definition_text(&self, name: &str) -> Option<&str> {
        self.sheet
            .defs
            .get(name)
            .map(|d| self.sources.slice(d.span))
    }

    /// The names a definition reads.
    pub fn dependencies(&self, name: &str) -> Option<&[String]> {
        self.sheet.defs.get(name).map(|d| d.deps.as_slice())
    }

    /// A definition with its kind, statement span and dependencies (for the audit record).
    pub fn definition(&self, name: &str) -> Option<&eval::Def> {
        self.sheet.defs.get(name)
    }

    /// Every defined name (values, inputs, functions) in definition order.
    pub fn names(&self) -> &[String] {
        &self.sheet.order
    }

    /// The computed value of a name, if it has been computed.
    pub fn value(&self, name: &str) -> Option<&Value> {
        self.sheet.cache.get(name)
    }

    /// Is this name an input (overridable with `--set` or by `load`)?
    pub fn is_input(&self, name: &str) -> bool {
        self.sheet
            .defs
            .get(name)
            .is_some_and(|d| d.kind == DefKind::Input)
    }

    /// The source map (for front ends that render spans themselves).
    pub fn sources(&self) -> &Sources {
        &self.sources
    }

    /// Complete the word ending at byte `cursor`: defined names, built-ins,
    /// units and keywords starting with it.
    pub fn complete(&self, text: &str, cursor: usize) -> Completion {
        let cursor = floor_char_boundary(text, cursor.min(text.len()));
        let start = word_start(text, cursor);
        let prefix = &text[start..cursor];
        let mut matches: Vec<String> = Vec::new();
        if !prefix.is_empty() {
            let names = self.sheet.order.iter().map(String::as_str);
            let builtins = library::registry().iter().map(|b| b.name);
            let units = units::unit_names().into_iter();
            let keywords = [
                "input", "check", "as", "and", "or", "not", "true", "false", "if", "then", "else",
                "load",
            ];
            for m in names.chain(builtins).chain(keywords).chain(units) {
                if m.starts_with(prefix) && !matches.iter().any(|x| x == m) {
                    matches.push(m.to_string());
                }
            }
        }
        Completion {
            start,
            end: cursor,
            matches,
        }
    }

    /// Can `text` be evaluated now, or are brackets still open?
    pub fn is_complete(&self, text: &str) -> Completeness {
        let scan = split::scan(text, 0);
        let only_unclosed = scan
            .errors
            .iter()
            .all(|d| d.message.starts_with("unclosed"));
        if scan.open_at_end > 0 && only_unclosed {
            return Completeness::Incomplete {
                indent: "    ".repeat(scan.open_at_end.min(8)),
            };
        }
        if scan
            .errors
            .iter()
            .any(|d| d.message.starts_with("unexpected") || d.message.contains("does not match"))
        {
            return Completeness::Invalid;
        }
        Completeness::Complete
    }

    /// Documentation of the name under the cursor: a built-in's help, or a
    /// definition with its current value.
    pub fn inspect(&self, text: &str, cursor: usize) -> Option<String> {
        let cursor = floor_char_boundary(text, cursor.min(text.len()));
        let start = word_start(text, cursor);
        let end = cursor
            + text[cursor..]
                .find(|c: char| !is_word_char(c))
                .unwrap_or(text.len() - cursor);
        let word = &text[start..end];
        if word.is_empty() {
            return None;
        }
        self.help(word)
    }

    /// Help for a name: a built-in, a unit, or a definition of this session.
    pub fn help(&self, name: &str) -> Option<String> {
        if let Some(def) = self.sheet.defs.get(name) {
            let mut s = self.sources.slice(def.span).to_string();
            if let Some(v) = self.sheet.cache.get(name) {
                s.push_str(&format!("\n  = {}", crate::render::text(v)));
            }
            if def.kind == DefKind::Input {
                s.push_str("\n  (an input: override it with `--set` or in `load`)");
            }
            return Some(s);
        }
        if let Some(b) = library::find(name) {
            return Some(crate::render::help_text(b));
        }
        units::lookup_unit(name).map(|u| format!("unit `{}`: {}", u.symbol, eval::dim_words(u.dim)))
    }

    /// The evaluation limits (call depth, step budget), for front ends that
    /// need other bounds.
    pub fn limits_mut(&mut self) -> &mut Limits {
        &mut self.limits
    }

    /// A flag that stops a running evaluation when set (from another thread).
    /// It stays raised until [`Session::clear_interrupt`].
    pub fn interrupt_handle(&self) -> Arc<AtomicBool> {
        self.limits.interrupt.clone()
    }

    /// Lower the interrupt flag: call it when a new request begins (the REPL
    /// before each entry, the kernel before it announces a cell).
    pub fn clear_interrupt(&self) {
        self.limits.reset();
    }

    /// Render a diagnostic as `file:line:col` with the source line underlined.
    pub fn render_diagnostic(&self, d: &Diagnostic, color: bool) -> String {
        render_diagnostic(&self.sources, d, color)
    }
}

/// Render a diagnostic against a source map (codespan-reporting).
pub fn render_diagnostic(sources: &Sources, d: &Diagnostic, color: bool) -> String {
    let mut files = SimpleFiles::new();
    let mut ids: Vec<(u32, usize)> = Vec::new();
    for file in referenced_files(d) {
        if let Some(f) = sources.get(file) {
            ids.push((file, files.add(f.name.clone(), f.text.clone())));
        }
    }
    let report = to_report(d, &ids);
    let config = term::Config::default();
    let mut buffer = Ansi::new(Vec::new());
    let result = if color {
        term::emit_to_write_style(&mut buffer, &config, &files, &report)
    } else {
        let mut plain = String::new();
        return match term::emit_to_string(&mut plain, &config, &files, &report) {
            Ok(()) => plain,
            Err(_) => format!("{}: {}\n", severity_word(d.severity), d.message),
        };
    };
    match result {
        Ok(()) => String::from_utf8_lossy(&buffer.into_inner()).into_owned(),
        Err(_) => format!("{}: {}\n", severity_word(d.severity), d.message),
    }
}

/// The source files a diagnostic's spans point into, each once.
fn referenced_files(d: &Diagnostic) -> Vec<u32> {
    let mut out = vec![d.span.file];
    for s in d.hints.iter().filter_map(|(s, _)| *s) {
        if !out.contains(&s.file) {
            out.push(s.file);
        }
    }
    out
}

/// `ids` maps source file ids to the ids of the files given to the renderer.
fn to_report(d: &Diagnostic, ids: &[(u32, usize)]) -> Report<usize> {
    let base = match d.severity {
        Severity::Error => Report::error(),
        Severity::Warning => Report::warning(),
    };
    let shown = |file: u32| ids.iter().find(|(f, _)| *f == file).map(|(_, i)| *i);
    let mut labels = Vec::new();
    let mut notes = Vec::new();
    if let Some(i) = shown(d.span.file) {
        labels.push(Label::primary(
            i,
            d.span.start as usize..d.span.end as usize,
        ));
    }
    for (span, hint) in &d.hints {
        match span.and_then(|s| shown(s.file).map(|i| (s, i))) {
            Some((s, i)) => labels
                .push(Label::secondary(i, s.start as usize..s.end as usize).with_message(hint)),
            _ => notes.push(format!("hint: {hint}")),
        }
    }
    base.with_message(&d.message)
        .with_labels(labels)
        .with_notes(notes)
}

fn severity_word(s: Severity) -> &'static str {
    match s {
        Severity::Error => "error",
        Severity::Warning => "warning",
    }
}

fn is_word_char(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

fn word_start(text: &str, cursor: usize) -> usize {
    text[..cursor]
        .rfind(|c: char| !is_word_char(c))
        .map_or(0, |i| {
            i + text[i..].chars().next().map_or(1, char::len_utf8)
        })
}

fn floor_char_boundary(text: &str, mut i: usize) -> usize {
    while i > 0 && !text.is_char_boundary(i) {
        i -= 1;
    }
    i
}
