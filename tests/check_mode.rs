//! `siccant check` (check-only mode): built-in results have a known shape and
//! an unknown magnitude, and what follows them is checked.
//!
//! The shapes are declared in `library/shape.rs`; these tests hold them to
//! what the built-ins really return (each built-in's own example call), and
//! hold check mode to reporting no error that a run would not report.

use std::path::{Path, PathBuf};

use siccant::diag::{Diagnostic, Severity};
use siccant::library::shape::{accepts, result_shape, says_not_fixed, Shape};

use siccant::library::registry;
use siccant::session::{OutputItem, Session};
use siccant::value::Value;

#[test]
fn every_result_is_shaped_or_declared_not_fixed() {
    let unclassified: Vec<String> = registry()
        .iter()
        .filter(|b| matches!(result_shape(b), Shape::Unknown) && !says_not_fixed(b.returns))
        .map(|b| format!("{}: `{}`", b.name, b.returns))
        .collect();
    assert!(
        unclassified.is_empty(),
        "give these a shape in library/shape.rs (or a `returns` unit): {unclassified:#?}"
    );
}

#[test]
fn every_parameter_text_is_understood() {
    let mut bad = Vec::new();
    for b in registry() {
        for p in b.params {
            if accepts(p.unit).is_none() {
                bad.push(format!("{}({}): `{}`", b.name, p.name, p.unit));
            }
        }
    }
    assert!(
        bad.is_empty(),
        "parameter texts check mode cannot read: {bad:#?}"
    );
}

/// The value of `r` after evaluating `r = EXAMPLE`, and the errors.
fn example_value(session: &mut Session, example: &str) -> (Option<Value>, Vec<Diagnostic>) {
    match session.eval(&format!("r = {example}")) {
        Ok(out) => {
            let v = out.items.into_iter().find_map(|i| match i {
                OutputItem::Value { value, .. } => Some(value),
                _ => None,
            });
            (v, Vec::new())
        }
        Err(e) => (None, e),
    }
}

/// Does the checked shape `c` describe the run value `v`? (`None` if so.)
fn mismatch(path: &str, v: &Value, c: &Value) -> Option<String> {
    match (v, c) {
        (Value::Quantity(q, _), Value::Quantity(s, _)) => (q.dim != s.dim || q.kind != s.kind)
            .then(|| {
                format!(
                    "{path}: runs as {:?} {:?}, checked as {:?} {:?}",
                    q.dim, q.kind, s.dim, s.kind
                )
            }),
        (Value::Record(r), Value::Record(s)) => {
            if r.type_name != s.type_name {
                return Some(format!("{path}: type {} vs {}", r.type_name, s.type_name));
            }
            r.fields.iter().find_map(|(name, f)| match s.get(name) {
                Some(g) => mismatch(&format!("{path}.{name}"), f, g),
                None => Some(format!("{path}.{name}: not declared")),
            })
        }
        (Value::Str(_), Value::Str(_)) => None,
        (Value::List(xs), Value::List(ys)) => match (xs.first(), ys.first()) {
            (Some(x), Some(y)) => mismatch(&format!("{path}[0]"), x, y),
            _ => None,
        },
        _ => Some(format!("{path}: runs as {v:?}, checked as {c:?}")),
    }
}

#[test]
fn declared_shapes_match_what_each_example_returns() {
    let mut compared = 0;
    let mut problems = Vec::new();
    for b in registry() {
        let (run, run_errors) = example_value(&mut Session::new(), b.example);
        let (checked, check_errors) = example_value(&mut Session::new().check_only(), b.example);
        if run_errors.is_empty() && !check_errors.is_empty() {
            problems.push(format!("{}: check reports {:?}", b.name, check_errors));
        }
        if let (Some(v), Some(c)) = (&run, &checked) {
            compared += 1;
            problems.extend(mismatch(b.name, v, c));
        }
    }
    assert!(problems.is_empty(), "{problems:#?}");
    // Most examples are self-contained; the rest read data or earlier names.
    assert!(compared >= 60, "only {compared} examples compared");
}

fn worksheets(dir: &Path, out: &mut Vec<PathBuf>) {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    for e in entries.flatten() {
        let p = e.path();
        if p.is_dir() {
            worksheets(&p, out);
        } else if p.extension().is_some_and(|x| x == "sicc")
            && !p
                .file_name()
                .is_some_and(|n| n.to_string_lossy().starts_with('_'))
        {
            out.push(p);
        }
    }
}

/// Error places (byte offset, message) of evaluating a worksheet file.
fn errors(path: &Path, check: bool) -> Vec<(u32, String)> {
    let text = std::fs::read_to_string(path).unwrap_or_default();
    let mut session = Session::with_file(path);
    if check {
        session = session.check_only();
    }
    match session.eval(&text) {
        Ok(_) => Vec::new(),
        Err(diags) => diags
            .into_iter()
            .filter(|d| d.severity == Severity::Error)
            .map(|d| (d.span.start, d.message))
            .collect(),
    }
}

#[test]
fn check_reports_no_error_a_run_does_not() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    for dir in ["examples", "tests/suite", "tests/bad"] {
        worksheets(&root.join(dir), &mut files);
    }
    files.sort();
    assert!(files.len() > 100, "only {} worksheets found", files.len());
    let mut problems = Vec::new();
    for f in &files {
        let run = errors(f, false);
        for (at, message) in errors(f, true) {
            if !run.iter().any(|(a, _)| *a == at) {
                problems.push(format!("{}@{at}: {message}", f.display()));
            }
        }
    }
    assert!(problems.is_empty(), "check-only errors: {problems:#?}");
}

/// Calls that add the optional fields of air states (flows, fog).
const WITH_OPTIONAL_FIELDS: &[&str] = &[
    "heat(air(T: 20 degC, rh: 50 %), to: 60 degC, flow: 2 kg/s)",
    "cool(air(T: 30 degC, rh: 60 %), to: 10 degC, flow: 2 kg/s)",
    "add_water(air(T: 60 degC, rh: 10 %), to_rh: 40 %, flow: 2 kg/s)",
    "add_steam(air(T: 20 degC, rh: 20 %), to_rh: 50 %, flow: 2 kg/s)",
    "saturate(air(T: 60 degC, rh: 10 %), flow: 2 kg/s)",
    "mix(air(T: 60 degC, rh: 95 %), 1 kg/s, air(T: 2 degC, rh: 95 %), 1 kg/s)",
];

#[test]
fn optional_air_fields_are_declared_too() {
    for call in WITH_OPTIONAL_FIELDS {
        let (run, errors) = example_value(&mut Session::new(), call);
        assert!(errors.is_empty(), "{call}: {errors:?}");
        let (checked, errors) = example_value(&mut Session::new().check_only(), call);
        assert!(errors.is_empty(), "{call}: {errors:?}");
        let (Some(v), Some(c)) = (run, checked) else {
            panic!("{call}: no value");
        };
        assert_eq!(mismatch(call, &v, &c), None);
    }
}
