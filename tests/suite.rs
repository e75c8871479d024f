//! The language test suite: every `tests/suite/<area>/*.sicc` file is run as a
//! worksheet and its annotations are checked. See tests/suite/README.md.
//!
//! Run one area or file with `SUITE_FILTER=core/units cargo test --test suite`.

use std::path::{Path, PathBuf};

use siccant::diag::{Diagnostic, Severity};
use siccant::session::{OutputItem, Session};
use siccant::value::Value;

/// One annotation in a suite file.
#[derive(Debug)]
enum Annotation {
    /// `# expect: EXPR ~ VALUE [tol REL]`
    Expect {
        line: usize,
        expr: String,
        want: String,
        tol: f64,
    },
    /// `# shows: EXPR => TEXT`
    Shows {
        line: usize,
        expr: String,
        text: String,
    },
    /// `# error: L:C fragment` (also `# warning: L:C fragment`)
    Diag {
        line: usize,
        severity: Severity,
        at: (usize, usize),
        fragment: String,
    },
}

/// A section of a file: its line range and annotations.
struct Section {
    name: String,
    first: usize,
    last: usize,
    notes: Vec<Annotation>,
}

const DEFAULT_TOL: f64 = 1e-9;

fn parse_annotation(line: usize, text: &str) -> Result<Option<Annotation>, String> {
    let t = text.trim_start();
    if let Some(rest) = t.strip_prefix("# expect:") {
        let (expr, rhs) = rest
            .split_once('~')
            .ok_or(format!("line {line}: `# expect:` needs `EXPR ~ VALUE`"))?;
        let (want, tol) = match rhs.rsplit_once(" tol ") {
            Some((w, tol)) => (
                w,
                tol.trim()
                    .parse::<f64>()
                    .map_err(|_| format!("line {line}: bad tol `{tol}`"))?,
            ),
            None => (rhs, DEFAULT_TOL),
        };
        return Ok(Some(Annotation::Expect {
            line,
            expr: expr.trim().into(),
            want: want.trim().into(),
            tol,
        }));
    }
    if let Some(rest) = t.strip_prefix("# shows:") {
        let (expr, text) = rest
            .split_once("=>")
            .ok_or(format!("line {line}: `# shows:` needs `EXPR => TEXT`"))?;
        return Ok(Some(Annotation::Shows {
            line,
            expr: expr.trim().into(),
            text: text.trim().into(),
        }));
    }
    for (prefix, severity) in [
        ("# error:", Severity::Error),
        ("# warning:", Severity::Warning),
    ] {
        if let Some(rest) = t.strip_prefix(prefix) {
            let rest = rest.trim();
            let (pos, fragment) = rest.split_once(' ').unwrap_or((rest, ""));
            let (l, c) = pos
                .split_once(':')
                .ok_or(format!("line {line}: `{prefix}` needs `L:C fragment`"))?;
            let at = (
                l.parse()
                    .map_err(|_| format!("line {line}: bad line `{l}`"))?,
                c.parse()
                    .map_err(|_| format!("line {line}: bad column `{c}`"))?,
            );
            return Ok(Some(Annotation::Diag {
                line,
                severity,
                at,
                fragment: fragment.trim().into(),
            }));
        }
    }
    Ok(None)
}

fn sections(text: &str) -> Result<Vec<Section>, String> {
    let lines: Vec<&str> = text.lines().collect();
    let mut out = vec![Section {
        name: "(start)".into(),
        first: 1,
        last: lines.len(),
        notes: Vec::new(),
    }];
    for (i, l) in lines.iter().enumerate() {
        let n = i + 1;
        if let Some(name) = l.trim().strip_prefix("# ---") {
            if let Some(cur) = out.last_mut() {
                cur.last = n - 1;
            }
            let name = name.trim().trim_end_matches('-').trim().to_string();
            out.push(Section {
                name,
                first: n + 1,
                last: lines.len(),
                notes: Vec::new(),
            });
            continue;
        }
        if let Some(a) = parse_annotation(n, l)? {
            if let Some(cur) = out.last_mut() {
                cur.notes.push(a);
            }
        }
    }
    Ok(out)
}

/// The file's text with every line outside the section blanked, so that line
/// and column numbers stay those of the file.
fn section_text(text: &str, s: &Section) -> String {
    text.lines()
        .enumerate()
        .map(|(i, l)| {
            if (s.first..=s.last).contains(&(i + 1)) {
                l
            } else {
                ""
            }
        })
        .collect::<Vec<_>>()
        .join("\n")
}

fn single_value(session: &mut Session, expr: &str) -> Result<Value, String> {
    match session.eval(expr) {
        Ok(out) => match out.items.into_iter().next() {
            Some(OutputItem::Value { value, .. }) => Ok(value),
            _ => Err(format!("`{expr}` gave no value")),
        },
        Err(d) => Err(d
            .iter()
            .map(|d| session.render_diagnostic(d, false))
            .collect()),
    }
}

fn check_expect(session: &mut Session, expr: &str, want: &str, tol: f64) -> Result<(), String> {
    let got = single_value(session, expr)?;
    let wanted = single_value(session, want)?;
    let (Value::Quantity(g, _), Value::Quantity(w, _)) = (&got, &wanted) else {
        return Err(format!("`{expr}` and `{want}` must both be quantities"));
    };
    if g.dim != w.dim {
        return Err(format!("`{expr}` is {}, expected {}", g.dim, w.dim));
    }
    let scale = w.si.abs().max(f64::MIN_POSITIVE);
    let rel = (g.si - w.si).abs() / scale;
    if rel <= tol || (w.si == 0.0 && g.si.abs() <= tol) {
        Ok(())
    } else {
        Err(format!("`{expr}` = {} (si {}), expected {want} (si {}); relative error {rel:.3e} > tol {tol:e}", siccant::render::text(&got), g.si, w.si))
    }
}

fn diag_matches(
    session: &Session,
    d: &Diagnostic,
    severity: Severity,
    at: (usize, usize),
    fragment: &str,
) -> bool {
    d.severity == severity
        && session.sources().line_col(d.span) == at
        && d.message.contains(fragment)
}

fn run_section(path: &Path, text: &str, s: &Section) -> Vec<String> {
    let mut failures = Vec::new();
    let mut session = Session::with_file(path);
    let result = session.eval(&section_text(text, s));
    let expected: Vec<(usize, Severity, (usize, usize), &str)> = s
        .notes
        .iter()
        .filter_map(|a| match a {
            Annotation::Diag {
                line,
                severity,
                at,
                fragment,
            } => Some((*line, *severity, *at, fragment.as_str())),
            _ => None,
        })
        .collect();
    let (items, diags) = match result {
        Ok(out) => (out.items, out.warnings),
        Err(errors) => (Vec::new(), errors),
    };
    for d in &diags {
        if !expected
            .iter()
            .any(|(_, sev, at, frag)| diag_matches(&session, d, *sev, *at, frag))
        {
            failures.push(format!(
                "unexpected diagnostic:\n{}",
                session.render_diagnostic(d, false)
            ));
        }
    }
    for (line, sev, at, frag) in &expected {
        if !diags
            .iter()
            .any(|d| diag_matches(&session, d, *sev, *at, frag))
        {
            let got: Vec<String> = diags
                .iter()
                .map(|d| {
                    format!(
                        "{}:{} {}",
                        session.sources().line_col(d.span).0,
                        session.sources().line_col(d.span).1,
                        d.message
                    )
                })
                .collect();
            failures.push(format!(
                "line {line}: expected {sev:?} at {}:{} containing `{frag}`; got {got:?}",
                at.0, at.1
            ));
        }
    }
    for item in &items {
        if let OutputItem::Check {
            text,
            passed: false,
        } = item
        {
            failures.push(format!("check failed: {text}"));
        }
    }
    if !expected.iter().any(|e| e.1 == Severity::Error) {
        for a in &s.notes {
            let r = match a {
                Annotation::Expect {
                    line,
                    expr,
                    want,
                    tol,
                } => check_expect(&mut session, expr, want, *tol)
                    .map_err(|e| format!("line {line}: {e}")),
                Annotation::Shows { line, expr, text } => match single_value(&mut session, expr) {
                    Ok(v) if siccant::render::text(&v) == *text => Ok(()),
                    Ok(v) => Err(format!(
                        "line {line}: `{expr}` shows `{}`, expected `{text}`",
                        siccant::render::text(&v)
                    )),
                    Err(e) => Err(format!("line {line}: {e}")),
                },
                Annotation::Diag { .. } => Ok(()),
            };
            if let Err(e) = r {
                failures.push(e);
            }
        }
    }
    failures
        .into_iter()
        .map(|f| format!("{} [{}]: {f}", path.display(), s.name))
        .collect()
}

fn suite_files(dir: &Path, out: &mut Vec<PathBuf>) {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    let mut entries: Vec<PathBuf> = entries.flatten().map(|e| e.path()).collect();
    entries.sort();
    for p in entries {
        if p.is_dir() {
            suite_files(&p, out);
        } else if p.extension().is_some_and(|e| e == "sicc")
            && !p
                .file_name()
                .is_some_and(|n| n.to_string_lossy().starts_with('_'))
        {
            out.push(p);
        }
    }
}

#[test]
fn language_suite() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/suite");
    let mut files = Vec::new();
    suite_files(&root, &mut files);
    let filter = std::env::var("SUITE_FILTER").unwrap_or_default();
    let mut failures = Vec::new();
    let mut count = 0;
    for path in files
        .iter()
        .filter(|p| p.to_string_lossy().contains(&filter))
    {
        let text = std::fs::read_to_string(path).expect("suite file is readable");
        match sections(&text) {
            Ok(secs) => {
                for s in secs.iter().filter(|s| s.first <= s.last) {
                    count += 1;
                    failures.extend(run_section(path, &text, s));
                }
            }
            Err(e) => failures.push(format!("{}: {e}", path.display())),
        }
    }
    assert!(
        count > 0 || !filter.is_empty(),
        "no suite files found under {}",
        root.display()
    );
    assert!(
        failures.is_empty(),
        "{} suite failure(s) in {count} sections:\n\n{}",
        failures.len(),
        failures.join("\n\n")
    );
}
