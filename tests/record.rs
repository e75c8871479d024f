//! The audit record: snapshots of its Markdown and JSON, byte-identical
//! reproducible runs, overrides that change exactly the dependent values, and
//! failures that leave no file. Worksheets under tests/record/ (invented data).

use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;
use std::process::Command;

use siccant::record::{self, RecordData, RunInfo};
use siccant::session::Session;

const SHEET: &str = "tests/record/review.sicc";

/// Run `SHEET` in-process with overrides and collect its record.
fn record_of(overrides: &[&str], reproducible: bool) -> RecordData {
    let text = std::fs::read_to_string(SHEET).unwrap();
    let mut session = Session::with_file(SHEET);
    for o in overrides {
        let (name, expr) = o.split_once('=').unwrap();
        let value = match Session::new().eval(expr).unwrap().items.remove(0) {
            siccant::session::OutputItem::Value { value, .. } => value,
            other => panic!("not a value: {other:?}"),
        };
        session.set_input(name, value);
    }
    let out = session.eval(&text).unwrap();
    let overrides: Vec<String> = overrides.iter().map(|s| s.to_string()).collect();
    let run = RunInfo {
        path: Path::new(SHEET),
        text: &text,
        overrides: &overrides,
        reproducible,
    };
    record::collect(&session, &out, &run)
}

fn siccant(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_siccant"))
        .args(args)
        .output()
        .unwrap()
}

#[test]
fn markdown_snapshot() {
    insta::assert_snapshot!(record::markdown(&record_of(&[], true)));
}

#[test]
fn json_snapshot() {
    let json = serde_json::to_string_pretty(&record::json(&record_of(&["L=15 mm"], true))).unwrap();
    insta::assert_snapshot!(json);
}

#[test]
fn html_is_self_contained_and_complete() {
    let html = record::html(&record_of(&[], true));
    assert!(html.starts_with("<!DOCTYPE html>"));
    for needle in [
        "SHA-256",
        "tray_unit.sicc",
        "<svg",
        "@media print",
        "Cautions",
        "carbon monoxide",
        "FAIL",
        "Depends on:",
    ] {
        assert!(html.contains(needle), "missing {needle}");
    }
    for outside in ["<script", "src=\"http", "href=\"http", "@import", "url("] {
        assert!(!html.contains(outside), "refers outside: {outside}");
    }
    for link in html.split("href=\"#").skip(1) {
        let target = &link[..link.find('"').unwrap()];
        assert!(
            html.contains(&format!("id=\"{target}\"")),
            "dangling link #{target}"
        );
    }
}

#[test]
fn reproducible_records_are_byte_identical() {
    let dir = tempfile::tempdir().unwrap();
    let mut bodies = Vec::new();
    for (i, ext) in ["html", "html", "md", "md", "json", "json"]
        .iter()
        .enumerate()
    {
        let path = dir.path().join(format!("r{i}.{ext}"));
        let out = siccant(&[
            "record",
            SHEET,
            "-o",
            path.to_str().unwrap(),
            "--reproducible",
        ]);
        assert_eq!(
            out.status.code(),
            Some(3),
            "one check of the sheet fails on purpose"
        );
        bodies.push(std::fs::read(&path).unwrap());
    }
    assert_eq!(bodies[0], bodies[1]);
    assert_eq!(bodies[2], bodies[3]);
    assert_eq!(bodies[4], bodies[5]);
}

#[test]
fn timestamp_only_without_reproducible() {
    let stamped = record_of(&[], false);
    let t = stamped.timestamp.expect("a timestamp");
    assert_eq!(t.len(), 20, "{t}");
    assert!(t.ends_with('Z') && t.as_bytes()[10] == b'T', "{t}");
    assert!(record_of(&[], true).timestamp.is_none());
}

/// Shown text of every entry, by name.
fn results(r: &RecordData) -> BTreeMap<String, String> {
    r.entries
        .iter()
        .map(|e| (e.name.clone(), siccant::render::text(&e.value)))
        .collect()
}

/// `start` and every entry that reads it, directly or through others.
fn dependents(r: &RecordData, start: &str) -> BTreeSet<String> {
    let mut out = BTreeSet::from([start.to_string()]);
    loop {
        let more: Vec<String> = r
            .entries
            .iter()
            .filter(|e| !out.contains(&e.name) && e.depends_on.iter().any(|d| out.contains(d)))
            .map(|e| e.name.clone())
            .collect();
        if more.is_empty() {
            return out;
        }
        out.extend(more);
    }
}

#[test]
fn changing_one_input_changes_exactly_its_dependents() {
    let base = record_of(&[], true);
    for (input, set) in [("L", "L=15 mm"), ("X1", "X1=0.2 db"), ("X0", "X0=1.8 db")] {
        let changed = record_of(&[set], true);
        let (a, b) = (results(&base), results(&changed));
        let differs: BTreeSet<String> = a.keys().filter(|k| a[*k] != b[*k]).cloned().collect();
        assert_eq!(differs, dependents(&base, input), "after --set {set}");
        assert!(changed
            .entries
            .iter()
            .any(|e| e.name == input && e.overridden));
    }
}

#[test]
fn dependencies_methods_and_loaded_files_are_recorded() {
    let r = record_of(&[], true);
    let water = r.entries.iter().find(|e| e.name == "water").unwrap();
    assert_eq!(water.depends_on, ["solid", "X0", "X1"]);
    assert_eq!(water.source, "water = solid * (X0 - X1)");
    assert_eq!(water.line, 10);
    assert_eq!(r.loaded.len(), 1);
    assert_eq!(r.loaded[0].path, "tray_unit.sicc");
    let text = std::fs::read("tests/record/tray_unit.sicc").unwrap();
    assert_eq!(r.loaded[0].sha256, record::sha256_hex(&text));
    assert_eq!(
        r.checks.iter().map(|c| c.passed).collect::<Vec<_>>(),
        [false, true]
    );
}

#[test]
fn failures_leave_no_file() {
    let dir = tempfile::tempdir().unwrap();
    let missing_folder = dir.path().join("no/such/review.html");
    let out = siccant(&["record", SHEET, "-o", missing_folder.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("does not exist"));
    let bad_ext = dir.path().join("review.pdf");
    assert_eq!(
        siccant(&["record", SHEET, "-o", bad_ext.to_str().unwrap()])
            .status
            .code(),
        Some(2)
    );
    let broken = dir.path().join("broken.sicc");
    std::fs::write(&broken, "a = 1 m + 1 s\n").unwrap();
    let target = dir.path().join("broken.html");
    let out = siccant(&[
        "record",
        broken.to_str().unwrap(),
        "-o",
        target.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(1));
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(left, vec![std::ffi::OsString::from("broken.sicc")]);
}

#[test]
fn warnings_attach_to_the_value_that_raised_them() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("warn.sicc");
    // Invented: a hot state outside the default chart window raises a warning.
    let text = "hot = air(T: 90 degC, rh: 5 %)\nchart = psychrometric_chart(states: [hot])\n";
    std::fs::write(&path, text).unwrap();
    let mut session = Session::with_file(&path);
    let out = session.eval(text).unwrap();
    let run = RunInfo {
        path: &path,
        text,
        overrides: &[],
        reproducible: true,
    };
    let r = record::collect(&session, &out, &run);
    let chart = r.entries.iter().find(|e| e.name == "chart").unwrap();
    assert_eq!(chart.warnings.len(), 1, "{:?}", chart.warnings);
    assert!(chart.warnings[0].contains("outside the chart window"));
    assert!(r
        .entries
        .iter()
        .find(|e| e.name == "hot")
        .unwrap()
        .warnings
        .is_empty());
    assert_eq!(
        chart.builtins.iter().map(|b| b.name).collect::<Vec<_>>(),
        ["psychrometric_chart"]
    );
    let html = record::html(&r);
    assert!(html.contains("<strong>Warning:</strong> state 1 lies outside the chart window"));
    assert!(html.contains("Methods and sources"));
}
