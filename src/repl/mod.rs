//! The interactive REPL: rustyline over [`Session`].
//!
//! Multi-line input needs no continuation characters: a validator asks
//! [`Session::is_complete`] whether brackets are still open. Tab completes
//! names, built-ins and units; `help NAME` shows documentation; errors are
//! coloured when the terminal allows. Ctrl-C during an evaluation stops that
//! cell and keeps the session (see `cli::interrupt`).

use std::cell::RefCell;
use std::io::IsTerminal;
use std::path::PathBuf;
use std::rc::Rc;

use rustyline::completion::Completer;
use rustyline::error::ReadlineError;
use rustyline::highlight::Highlighter;
use rustyline::hint::Hinter;
use rustyline::validate::{ValidationContext, ValidationResult, Validator};
use rustyline::{Context, Editor, Helper};

use crate::session::{Completeness, OutputItem, Session};

/// rustyline hooks backed by the session.
struct ReplHelper {
    session: Rc<RefCell<Session>>,
}

impl Completer for ReplHelper {
    type Candidate = String;

    fn complete(
        &self,
        line: &str,
        pos: usize,
        _ctx: &Context<'_>,
    ) -> rustyline::Result<(usize, Vec<String>)> {
        let c = self.session.borrow().complete(line, pos);
        Ok((c.start, c.matches))
    }
}

impl Hinter for ReplHelper {
    type Hint = String;
}

impl Highlighter for ReplHelper {}

impl Validator for ReplHelper {
    fn validate(&self, ctx: &mut ValidationContext) -> rustyline::Result<ValidationResult> {
        Ok(match self.session.borrow().is_complete(ctx.input()) {
            Completeness::Incomplete { .. } => ValidationResult::Incomplete,
            Completeness::Complete | Completeness::Invalid => ValidationResult::Valid(None),
        })
    }
}

impl Helper for ReplHelper {}

fn history_path() -> Option<PathBuf> {
    std::env::var_os("HOME").map(|h| PathBuf::from(h).join(".siccant_history"))
}

/// Run the REPL until end of input; returns the exit code.
pub fn run() -> i32 {
    let session = Rc::new(RefCell::new(Session::new()));
    // Ctrl-C during an evaluation stops that cell; the session stays as it was.
    let flag = session.borrow().interrupt_handle();
    crate::cli::interrupt::install(flag, crate::cli::interrupt::Policy::Interactive);
    let mut editor: Editor<ReplHelper, rustyline::history::DefaultHistory> = match Editor::new() {
        Ok(e) => e,
        Err(e) => {
            eprintln!("error: cannot start the line editor: {e}");
            return 2;
        }
    };
    editor.set_helper(Some(ReplHelper {
        session: session.clone(),
    }));
    let history = history_path();
    if let Some(h) = &history {
        let _ = editor.load_history(h);
    }
    println!(
        "siccant {} -- `help` lists built-ins, `help NAME` explains one, Ctrl-C stops a long evaluation, Ctrl-D quits.",
        env!("CARGO_PKG_VERSION")
    );
    loop {
        match editor.readline("sicc> ") {
            Ok(line) => {
                if line.trim().is_empty() {
                    continue;
                }
                let _ = editor.add_history_entry(line.as_str());
                handle(&mut session.borrow_mut(), &line);
            }
            Err(ReadlineError::Interrupted) => continue,
            Err(_) => break,
        }
    }
    if let Some(h) = &history {
        let _ = editor.save_history(h);
    }
    0
}

/// Evaluate one entry (or answer `help`) and print the result.
pub fn handle(session: &mut Session, line: &str) {
    let color = std::io::stdout().is_terminal() && std::env::var_os("NO_COLOR").is_none();
    let trimmed = line.trim();
    if trimmed == "help" {
        print!("{}", crate::cli::overview());
        return;
    }
    if let Some(name) = trimmed.strip_prefix("help ") {
        match session.help(name.trim()) {
            Some(text) => println!("{text}"),
            None => println!("no built-in, unit or name called `{}`", name.trim()),
        }
        return;
    }
    session.clear_interrupt();
    match session.eval(line) {
        Ok(out) => {
            for w in &out.warnings {
                print!("{}", session.render_diagnostic(w, color));
            }
            for item in &out.items {
                println!("{}", describe(item));
            }
        }
        Err(diags) => {
            for d in &diags {
                print!("{}", session.render_diagnostic(d, color));
            }
        }
    }
}

fn describe(item: &OutputItem) -> String {
    match item {
        OutputItem::Value {
            name: Some(n),
            value,
        } => format!("{n} = {}", crate::render::text(value)),
        OutputItem::Value { name: None, value } => crate::render::text(value),
        OutputItem::Check { text, passed } => {
            format!("check {text} ... {}", if *passed { "ok" } else { "FAILED" })
        }
    }
}
