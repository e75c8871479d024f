//! From a finished run (the [`Session`] and its [`Output`]) to [`RecordData`]:
//! statement texts, lines and dependencies from the worksheet's syntax tree,
//! values from the output, built-ins from the registry, warnings by span.

use std::path::Path;

use sha2::{Digest, Sha256};

use crate::diag::{Diagnostic, Span};
use crate::eval::{self, DefKind, OutputItem};
use crate::library;
use crate::session::{Output, Session};
use crate::syntax::{self, Stmt, StmtKind};

use super::data::{CheckEntry, Entry, EntryKind, FileDigest, RecordData};

/// What the front end knows about the run besides the session.
#[derive(Clone, Copy, Debug)]
pub struct RunInfo<'a> {
    /// The worksheet path as given on the command line.
    pub path: &'a Path,
    /// The worksheet text that was evaluated.
    pub text: &'a str,
    /// `--set NAME=EXPR` arguments as given.
    pub overrides: &'a [String],
    /// Leave out the timestamp so that two runs give identical bytes.
    pub reproducible: bool,
}

/// Build the record of a successful run.
///
/// `output` must come from `session.eval(run.text)` on a session made with
/// `Session::with_file(run.path)`; the worksheet is file 0 of its source map.
pub fn collect(session: &Session, output: &Output, run: &RunInfo) -> RecordData {
    let (stmts, _) = syntax::parse(run.text, 0);
    let mut record = RecordData {
        worksheet: FileDigest {
            path: run.path.display().to_string(),
            sha256: sha256_hex(run.text.as_bytes()),
        },
        loaded: loaded_files(session),
        tool_version: env!("CARGO_PKG_VERSION").to_string(),
        overrides: run.overrides.to_vec(),
        timestamp: (!run.reproducible).then(utc_now),
        ..RecordData::default()
    };
    let statements = stmts
        .iter()
        .filter(|s| !matches!(s.kind, StmtKind::Function { .. }));
    let mut spans = Vec::new();
    for (stmt, item) in statements.zip(&output.items) {
        let line = session.sources().line_col(stmt.span).0;
        match item {
            OutputItem::Value { name, value } => {
                let entry = entry(session, run, stmt, name.as_deref(), value.clone(), line);
                record.entries.push(entry);
                spans.push((stmt.span, Some(record.entries.len() - 1)));
            }
            OutputItem::Check { text, passed } => {
                record.checks.push(CheckEntry {
                    text: text.clone(),
                    line,
                    passed: *passed,
                });
                spans.push((stmt.span, None));
            }
        }
    }
    attach_warnings(&mut record, session, &output.warnings, &spans);
    record
}

fn entry(
    session: &Session,
    run: &RunInfo,
    stmt: &Stmt,
    name: Option<&str>,
    value: crate::value::Value,
    line: usize,
) -> Entry {
    let source = session.sources().slice(stmt.span).trim().to_string();
    let (kind, reads) = match (&stmt.kind, name.and_then(|n| session.definition(n))) {
        (_, Some(def)) if def.kind == DefKind::Input => (EntryKind::Input, def.deps.clone()),
        (_, Some(def)) => (EntryKind::Value, def.deps.clone()),
        (StmtKind::Show(e), None) => (EntryKind::Shown, eval::dependencies(e, &[])),
        _ => (EntryKind::Shown, Vec::new()),
    };
    let name = name.map_or_else(|| source.clone(), str::to_string);
    let overridden =
        kind == EntryKind::Input && run.overrides.iter().any(|o| override_name(o) == name);
    let depends_on = reads
        .iter()
        .filter(|d| session.definition(d).is_some())
        .cloned()
        .collect();
    // Display built-ins (the `plot` family) compute nothing and carry no method.
    let builtins = reads
        .iter()
        .filter(|d| session.definition(d).is_none())
        .filter_map(|d| library::find(d))
        .filter(|b| b.family != "plot")
        .collect();
    Entry {
        name,
        kind,
        source,
        line,
        depends_on,
        value,
        overridden,
        builtins,
        warnings: Vec::new(),
    }
}

/// The name part of `NAME=EXPR`.
fn override_name(assignment: &str) -> &str {
    assignment
        .split_once('=')
        .map_or(assignment, |(n, _)| n)
        .trim()
}

/// Put each warning on the entry whose statement contains it; the rest go to
/// `other_warnings` with their place.
fn attach_warnings(
    record: &mut RecordData,
    session: &Session,
    warnings: &[Diagnostic],
    spans: &[(Span, Option<usize>)],
) {
    for w in warnings {
        let owner = spans
            .iter()
            .find(|(s, _)| contains(*s, w.span))
            .and_then(|(_, e)| *e);
        match owner {
            Some(i) => record.entries[i].warnings.push(w.message.clone()),
            None => record.other_warnings.push(placed(session, w)),
        }
    }
    for entry in &mut record.entries {
        entry.warnings.dedup();
    }
}

fn contains(outer: Span, inner: Span) -> bool {
    outer.file == inner.file && outer.start <= inner.start && inner.end <= outer.end
}

fn placed(session: &Session, w: &Diagnostic) -> String {
    let sources = session.sources();
    match sources.get(w.span.file) {
        Some(file) => {
            let (line, col) = sources.line_col(w.span);
            format!("{}:{line}:{col}: {}", file.name, w.message)
        }
        None => w.message.clone(),
    }
}

/// Worksheets loaded during the run (files after the first in the source map), each once.
fn loaded_files(session: &Session) -> Vec<FileDigest> {
    let mut out: Vec<FileDigest> = Vec::new();
    for file in session.sources().files().skip(1) {
        let digest = FileDigest {
            path: file.name.clone(),
            sha256: sha256_hex(file.text.as_bytes()),
        };
        if !out.contains(&digest) {
            out.push(digest);
        }
    }
    out
}

/// Lower-case hex SHA-256 of `bytes`.
pub fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// The current UTC time as `YYYY-MM-DDTHH:MM:SSZ`.
pub fn utc_now() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| d.as_secs());
    utc_text(secs)
}

/// Seconds since 1970-01-01 as ISO 8601 UTC (proleptic Gregorian calendar).
pub fn utc_text(secs: u64) -> String {
    let (days, rest) = ((secs / 86_400) as i64, secs % 86_400);
    let (y, m, d) = civil_from_days(days);
    format!(
        "{y:04}-{m:02}-{d:02}T{:02}:{:02}:{:02}Z",
        rest / 3600,
        rest % 3600 / 60,
        rest % 60
    )
}

/// Year, month, day of a day count since 1970-01-01 (H. Hinnant's civil-from-days algorithm).
fn civil_from_days(z: i64) -> (i64, u32, u32) {
    let z = z + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let d = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let m = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    let y = yoe + era * 400 + i64::from(m <= 2);
    (y, m, d)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn known_dates() {
        assert_eq!(utc_text(0), "1970-01-01T00:00:00Z");
        assert_eq!(utc_text(951_782_400), "2000-02-29T00:00:00Z");
        assert_eq!(utc_text(1_798_761_599), "2026-12-31T23:59:59Z");
    }

    #[test]
    fn sha256_of_abc() {
        // FIPS 180-2, appendix B.1.
        assert_eq!(
            sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
    }
}
