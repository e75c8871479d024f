//! The `siccant` command line: `run`, `check`, `repl`, `help`.
//!
//! Exit codes: 0 ok, 1 worksheet error, 2 usage error, 3 a check failed,
//! 130 stopped by Ctrl-C.

mod format;
pub mod interrupt;
mod progress;

use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use clap::{Parser, Subcommand, ValueEnum};

use crate::diag::Diagnostic;
use crate::library;
use crate::session::{OutputItem, Session};
use crate::value::Value;

/// Exit code: everything ran and every check passed.
pub const EXIT_OK: i32 = 0;
/// Exit code: the worksheet has an error.
pub const EXIT_WORKSHEET: i32 = 1;
/// Exit code: the command line was wrong.
pub const EXIT_USAGE: i32 = 2;
/// Exit code: a `check` failed.
pub const EXIT_CHECK: i32 = 3;
/// Exit code: stopped by Ctrl-C (128 + SIGINT, the shell convention).
pub use interrupt::EXIT_INTERRUPTED;

/// Exit codes as shown at the end of `siccant --help`.
const EXIT_CODES_HELP: &str = "Exit codes: 0 ok, 1 worksheet error (file:line:col on stderr), \
2 usage error, 3 a check failed, 130 stopped by Ctrl-C (nothing printed or written; \
a second Ctrl-C stops at once).";

#[derive(Parser, Debug)]
#[command(
    name = "siccant",
    version,
    about = "Unit-checked worksheets for convective dryer design",
    after_help = EXIT_CODES_HELP,
    disable_help_subcommand = true
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Run a worksheet and print its values and checks.
    Run {
        /// The worksheet (.sicc).
        file: PathBuf,
        /// Override an input: NAME=EXPR, e.g. --set L=15mm (repeatable).
        #[arg(long = "set", value_name = "NAME=EXPR")]
        set: Vec<String>,
        /// Output format.
        #[arg(long, value_enum, default_value_t = Format::Text)]
        format: Format,
    },
    /// Run a worksheet and write its audit record (.html, .md or .json).
    Record {
        /// The worksheet (.sicc).
        file: PathBuf,
        /// The record file; its extension picks the format.
        #[arg(short = 'o', long = "output", value_name = "FILE")]
        output: PathBuf,
        /// Override an input: NAME=EXPR (repeatable).
        #[arg(long = "set", value_name = "NAME=EXPR")]
        set: Vec<String>,
        /// Leave out the timestamp so that two runs give byte-identical records.
        #[arg(long)]
        reproducible: bool,
    },
    /// Parse and check names, units and dimensions without running engine work.
    Check {
        /// The worksheet (.sicc).
        file: PathBuf,
    },
    /// Interactive worksheet.
    Repl,
    /// Help on a built-in function or unit; without NAME, list them.
    Help {
        /// A built-in function, a unit, or `units`.
        name: Option<String>,
        /// Print the whole built-in reference as Markdown (docs/builtins.md).
        #[arg(long)]
        markdown: bool,
    },
}

/// Output formats of `run`.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// Plain text, one value per line.
    Text,
    /// One JSON object: values, checks, warnings.
    Json,
    /// A Markdown table.
    Markdown,
    /// A standalone HTML page.
    Html,
}

/// Run the command line; returns the exit code.
pub fn main() -> i32 {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let _ = e.print();
            return if e.use_stderr() { EXIT_USAGE } else { EXIT_OK };
        }
    };
    match cli.command {
        Command::Run { file, set, format } => run(&file, &set, format),
        Command::Record {
            file,
            output,
            set,
            reproducible,
        } => record(&file, &output, &set, reproducible),
        Command::Check { file } => check(&file),
        Command::Repl => crate::repl::run(),
        Command::Help { name, markdown } => help(name.as_deref(), markdown),
    }
}

fn color() -> bool {
    std::io::stderr().is_terminal() && std::env::var_os("NO_COLOR").is_none()
}

fn print_diagnostics(session: &Session, diags: &[Diagnostic]) {
    for d in diags {
        eprint!("{}", session.render_diagnostic(d, color()));
    }
}

fn read(file: &Path) -> Result<String, i32> {
    std::fs::read_to_string(file).map_err(|e| {
        eprintln!("error: cannot read `{}`: {e}", file.display());
        EXIT_USAGE
    })
}

/// `siccant run`.
fn run(file: &Path, set: &[String], format: Format) -> i32 {
    let text = match read(file) {
        Ok(t) => t,
        Err(code) => return code,
    };
    let mut session = Session::with_file(file);
    for assignment in set {
        match parse_set(assignment) {
            Ok((name, value)) => session.set_input(name, value),
            Err(code) => return code,
        }
    }
    let presses = interrupt::install(session.interrupt_handle(), interrupt::Policy::Batch);
    let progress = progress::install();
    let result = session.eval(&text);
    drop(progress);
    if presses.any() {
        return interrupted(&session, result.err().as_deref(), "");
    }
    let output = match result {
        Ok(o) => o,
        Err(diags) => {
            print_diagnostics(&session, &diags);
            let usage = diags.iter().any(|d| {
                d.message.starts_with("`--set")
                    || (!set.is_empty() && d.message.contains("but the value given for it"))
            });
            return if usage { EXIT_USAGE } else { EXIT_WORKSHEET };
        }
    };
    print_diagnostics(&session, &output.warnings);
    let shown = format::shown_texts(&text);
    emit(&format::render(&session, &output, &shown, format));
    let failed = output
        .items
        .iter()
        .any(|i| matches!(i, OutputItem::Check { passed: false, .. }));
    if failed {
        EXIT_CHECK
    } else {
        EXIT_OK
    }
}

/// `siccant record`: run, then write the audit record atomically (also when a check fails).
fn record(file: &Path, output: &Path, set: &[String], reproducible: bool) -> i32 {
    let empty = crate::record::RecordData::default();
    if let Err(e) = crate::record::render_for(&empty, output) {
        eprintln!("error: {e}");
        return EXIT_USAGE;
    }
    let text = match read(file) {
        Ok(t) => t,
        Err(code) => return code,
    };
    let mut session = Session::with_file(file);
    for assignment in set {
        match parse_set(assignment) {
            Ok((name, value)) => session.set_input(name, value),
            Err(code) => return code,
        }
    }
    let presses = interrupt::install(session.interrupt_handle(), interrupt::Policy::Batch);
    let result = session.eval(&text);
    if presses.any() {
        return interrupted(&session, result.err().as_deref(), "; no record written");
    }
    let out = match result {
        Ok(o) => o,
        Err(diags) => {
            print_diagnostics(&session, &diags);
            eprintln!("error: no record written: the worksheet has errors");
            return if diags.iter().any(|d| d.message.starts_with("`--set")) {
                EXIT_USAGE
            } else {
                EXIT_WORKSHEET
            };
        }
    };
    print_diagnostics(&session, &out.warnings);
    let run = crate::record::RunInfo {
        path: file,
        text: &text,
        overrides: set,
        reproducible,
    };
    let data = crate::record::collect(&session, &out, &run);
    if let Err(e) = crate::record::write(&data, output) {
        eprintln!("error: {e}");
        return EXIT_USAGE;
    }
    let failed = data.failed_checks();
    emit(&format!(
        "wrote {} ({} values, {} of {} checks pass)\n",
        output.display(),
        data.entries.len(),
        data.checks.len() - failed,
        data.checks.len()
    ));
    if failed > 0 {
        EXIT_CHECK
    } else {
        EXIT_OK
    }
}

/// After Ctrl-C: show the errors found (the `interrupted` one names the
/// statement that was running) and nothing else; exit 130.
fn interrupted(session: &Session, diags: Option<&[Diagnostic]>, what: &str) -> i32 {
    let diags = diags.unwrap_or_default();
    print_diagnostics(session, diags);
    // Without an `interrupted` diagnostic the evaluation ended before it saw the flag.
    let told = diags.iter().any(|d| d.message.starts_with("interrupted"));
    if !told || !what.is_empty() {
        eprintln!("error: interrupted{what}");
    }
    EXIT_INTERRUPTED
}

/// Parse `NAME=EXPR` and evaluate EXPR on its own.
fn parse_set(assignment: &str) -> Result<(String, Value), i32> {
    let Some((name, expr)) = assignment.split_once('=') else {
        eprintln!("error: `--set {assignment}` must look like NAME=EXPR, e.g. --set L=15mm");
        return Err(EXIT_USAGE);
    };
    let name = name.trim();
    let valid = name
        .chars()
        .next()
        .is_some_and(|c| c.is_alphabetic() || c == '_')
        && name.chars().all(|c| c.is_alphanumeric() || c == '_');
    if !valid {
        eprintln!("error: `--set {assignment}`: `{name}` is not a name");
        return Err(EXIT_USAGE);
    }
    let mut scratch = Session::new();
    match scratch.eval(expr) {
        Ok(out) => match out.items.into_iter().next() {
            Some(OutputItem::Value { name: None, value }) => Ok((name.to_string(), value)),
            _ => {
                eprintln!("error: `--set {assignment}`: expected a value after `=`");
                Err(EXIT_USAGE)
            }
        },
        Err(diags) => {
            eprintln!("error: in `--set {assignment}`:");
            print_diagnostics(&scratch, &diags);
            Err(EXIT_USAGE)
        }
    }
}

/// `siccant check`.
fn check(file: &Path) -> i32 {
    let text = match read(file) {
        Ok(t) => t,
        Err(code) => return code,
    };
    let mut session = Session::with_file(file).check_only();
    let presses = interrupt::install(session.interrupt_handle(), interrupt::Policy::Batch);
    let result = session.eval(&text);
    if presses.any() {
        return interrupted(&session, result.err().as_deref(), "");
    }
    match result {
        Ok(out) => {
            print_diagnostics(&session, &out.warnings);
            let total = format::statement_count(&text);
            emit(&format!(
                "{}: no errors found ({})\n",
                file.display(),
                check_detail(&session, &out.items, total)
            ));
            EXIT_OK
        }
        Err(diags) => {
            print_diagnostics(&session, &diags);
            EXIT_WORKSHEET
        }
    }
}

/// How much `check` could check: every statement, or which values it had to
/// leave unchecked because they follow a result of no fixed shape.
fn check_detail(session: &Session, items: &[OutputItem], total: usize) -> String {
    let done = items.len();
    if done >= total {
        return format!("all {total} statements checked");
    }
    let checked: Vec<&str> = items
        .iter()
        .filter_map(|i| match i {
            OutputItem::Value { name: Some(n), .. } => Some(n.as_str()),
            _ => None,
        })
        .collect();
    let unchecked: Vec<&str> = session
        .names()
        .iter()
        .map(String::as_str)
        .filter(|n| !checked.contains(n))
        .filter(|n| {
            session
                .definition(n)
                .is_some_and(|d| d.kind != crate::eval::DefKind::Function)
        })
        .collect();
    let mut names = unchecked
        .iter()
        .take(6)
        .copied()
        .collect::<Vec<_>>()
        .join(", ");
    if unchecked.len() > 6 {
        names.push_str(", ...");
    }
    let which = if names.is_empty() {
        String::new()
    } else {
        format!(" (not checked: {names})")
    };
    format!(
        "{done} of {total} statements checked{which}; the rest follow results whose shape \
is only known after a run (tables, plots, fits, dryer results, what-if studies, loads)"
    )
}

/// Write `text` to standard output. A reader that has gone away (`siccant run
/// sheet.sicc | head`) is not a fault of the worksheet: the rest of the text is
/// dropped quietly and the exit status stays that of the run. Other write
/// errors (a full disk) are reported on standard error.
fn emit(text: &str) {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    if let Err(e) = out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        if e.kind() != std::io::ErrorKind::BrokenPipe {
            eprintln!("error: cannot write the output: {e}");
        }
    }
}

/// `siccant help [NAME]`.
fn help(name: Option<&str>, markdown: bool) -> i32 {
    if markdown {
        emit(&builtins_markdown());
        return EXIT_OK;
    }
    match name {
        None => {
            emit(&overview());
            EXIT_OK
        }
        Some("units") => {
            emit(&format!(
                "Units (SI prefixes apply where sensible):\n{}\n",
                crate::units::unit_names().join(" ")
            ));
            EXIT_OK
        }
        Some(n) => match Session::new().help(n) {
            Some(text) => {
                emit(&format!("{text}\n"));
                EXIT_OK
            }
            None => {
                let names: Vec<&str> = library::registry().iter().map(|b| b.name).collect();
                let hint = crate::eval::suggest(n, &names)
                    .map_or(String::new(), |b| format!(" (did you mean `{b}`?)"));
                eprintln!("error: no built-in function or unit named `{n}`{hint}");
                EXIT_USAGE
            }
        },
    }
}

/// The list printed by `siccant help`.
pub fn overview() -> String {
    let mut s = String::from("siccant: unit-checked worksheets for convective dryer design\n\n");
    s.push_str("Commands: run FILE [--set NAME=EXPR] [--format text|json|markdown|html], record FILE -o OUT.html|.md|.json [--set NAME=EXPR] [--reproducible], check FILE, repl, help [NAME]\n\n");
    let mut family = "";
    for b in registry_by_family() {
        if b.family != family {
            family = b.family;
            s.push_str(&format!("\n{family}:\n"));
        }
        let summary = b.doc.split(". ").next().unwrap_or("");
        s.push_str(&format!("  {:<22} {summary}\n", b.name));
    }
    s.push_str(
        "\nAlso: load(\"file.sicc\", input: value, ...) loads another worksheet as a record.\n",
    );
    s.push_str("`siccant help NAME` shows one function; `siccant help units` lists units.\n");
    s
}

/// The generated built-in reference (docs/builtins.md).
pub fn builtins_markdown() -> String {
    let mut s = String::from(
        "# Built-in functions\n\n<!-- Generated by `siccant help --markdown` from the library registry; do not edit. -->\n\n",
    );
    s.push_str("`load(\"file.sicc\", NAME: value, ...)` is part of the language; see docs/language.md.\n\n");
    let mut family = "";
    for b in registry_by_family() {
        if b.family != family {
            family = b.family;
            s.push_str(&format!("## {family}\n\n"));
        }
        s.push_str(&crate::render::help_markdown(b));
    }
    s
}

/// Every built-in, grouped by family (families alphabetical), then by name.
fn registry_by_family() -> Vec<&'static library::Builtin> {
    let mut all: Vec<&'static library::Builtin> = library::registry().to_vec();
    all.sort_by_key(|b| (b.family, b.name));
    all
}
