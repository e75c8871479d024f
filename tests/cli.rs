//! The command line contract of DESIGN.md: exit codes, `--set`, `--format json`.

use std::path::PathBuf;
use std::process::{Command, Output};

fn example(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("examples")
        .join(name)
}

fn siccant(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_siccant"))
        .args(args)
        .env("NO_COLOR", "1")
        .output()
        .expect("binary runs")
}

fn sheet(text: &str) -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("sheet.sicc");
    std::fs::write(&path, text).expect("write sheet");
    (dir, path)
}

fn json_of(out: &Output) -> serde_json::Value {
    serde_json::from_slice(&out.stdout).expect("stdout is JSON")
}

fn value<'a>(doc: &'a serde_json::Value, name: &str) -> &'a serde_json::Value {
    doc["values"]
        .as_array()
        .and_then(|v| v.iter().find(|x| x["name"] == name))
        .expect("named value present")
}

#[test]
fn must_work_example_runs_and_prints_expected_numbers() {
    let out = siccant(&[
        "run",
        example("tray_basics.sicc").to_str().unwrap_or_default(),
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8_lossy(&out.stdout);
    for want in [
        "dry_solid = 60.48 kg",
        "X1 as wb = 0.5833 wb",
        "28.39 W/(m^2*K)",
        "dT = 45 K",
        "... ok",
    ] {
        assert!(text.contains(want), "missing `{want}` in:\n{text}");
    }
}

#[test]
fn json_lists_every_named_value_in_si() {
    let out = siccant(&[
        "run",
        "--format",
        "json",
        example("tray_basics.sicc").to_str().unwrap_or_default(),
    ]);
    let doc = json_of(&out);
    let names: Vec<&str> = doc["values"].as_array().map_or(vec![], |v| {
        v.iter().filter_map(|x| x["name"].as_str()).collect()
    });
    assert_eq!(
        names,
        ["L", "area", "load", "dry_solid", "X1", "U", "dT", "q"]
    );
    assert!((value(&doc, "L")["si"].as_f64().unwrap_or(0.0) - 0.012).abs() < 1e-15);
    assert!((value(&doc, "dry_solid")["si"].as_f64().unwrap_or(0.0) - 60.48).abs() < 1e-9);
    assert_eq!(value(&doc, "dT")["unit"], "K");
    assert_eq!(doc["checks"][0]["passed"], true);
    assert!(doc["warnings"].as_array().is_some());
}

#[test]
fn set_overrides_an_input() {
    let out = siccant(&[
        "run",
        "--set",
        "L=15mm",
        "--format",
        "json",
        example("tray_basics.sicc").to_str().unwrap_or_default(),
    ]);
    assert_eq!(out.status.code(), Some(0));
    assert!((value(&json_of(&out), "L")["si"].as_f64().unwrap_or(0.0) - 0.015).abs() < 1e-15);
}

#[test]
fn set_of_a_name_that_is_not_an_input_is_a_usage_error() {
    let out = siccant(&[
        "run",
        "--set",
        "area=3 m^2",
        example("tray_basics.sicc").to_str().unwrap_or_default(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("`area` is not an input"));
}

#[test]
fn worksheet_error_exits_1_with_file_line_col() {
    let (_dir, path) = sheet("a = 1 m\nb = a + 2 s\n");
    let out = siccant(&["run", path.to_str().unwrap_or_default()]);
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("sheet.sicc:2:5"), "{err}");
    assert!(err.contains("length") && err.contains("time"), "{err}");
}

#[test]
fn failed_check_exits_3() {
    let (_dir, path) = sheet("t = 9 h\ncheck t < 8 h\n");
    let out = siccant(&["run", path.to_str().unwrap_or_default()]);
    assert_eq!(out.status.code(), Some(3));
    assert!(String::from_utf8_lossy(&out.stdout).contains("FAILED"));
}

#[test]
fn usage_errors_exit_2() {
    assert_eq!(siccant(&["run"]).status.code(), Some(2));
    assert_eq!(siccant(&["frobnicate"]).status.code(), Some(2));
    assert_eq!(
        siccant(&["run", "/no/such/file.sicc"]).status.code(),
        Some(2)
    );
    assert_eq!(
        siccant(&["run", "--format", "pdf", "x.sicc"]).status.code(),
        Some(2)
    );
}

#[test]
fn check_reports_unit_errors_without_running() {
    let (_dir, path) = sheet("a = 1 m\nb = a + 2 s\n");
    assert_eq!(
        siccant(&["check", path.to_str().unwrap_or_default()])
            .status
            .code(),
        Some(1)
    );
    let out = siccant(&[
        "check",
        example("tray_basics.sicc").to_str().unwrap_or_default(),
    ]);
    assert_eq!(out.status.code(), Some(0));
}

#[test]
fn other_formats_render() {
    let path = example("tray_basics.sicc");
    let md = siccant(&[
        "run",
        "--format",
        "markdown",
        path.to_str().unwrap_or_default(),
    ]);
    assert!(String::from_utf8_lossy(&md.stdout).contains("| `dry_solid` | 60.48 kg |"));
    let html = siccant(&["run", "--format", "html", path.to_str().unwrap_or_default()]);
    assert!(String::from_utf8_lossy(&html.stdout).contains("<table>"));
}

#[test]
fn set_with_the_wrong_dimension_is_a_usage_error() {
    let out = siccant(&[
        "run",
        "--set",
        "L=15",
        example("tray_basics.sicc").to_str().unwrap_or_default(),
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("input `L` is length [m]"));
}

#[test]
fn check_follows_a_builtin_result_to_a_later_check() {
    // invented: a tray film coefficient times a mass is not a heat flux
    let (_dir, path) = sheet(
        "amb = air(T: 24 degC, rh: 55 %)\n\
         hot = heat(amb, to: 80 degC)\n\
         q = h_tray_parallel(air: hot, velocity: 3 m/s) * 3 kg\n\
         check q > 1 kW/m^2\n",
    );
    let out = siccant(&["check", path.to_str().expect("utf-8")]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{stderr}");
    assert!(stderr.contains("sheet.sicc:4:7"), "{stderr}");
    assert!(
        stderr.contains("comparison needs equal dimensions"),
        "{stderr}"
    );
    assert!(!stderr.contains("NaN"), "{stderr}");
}

#[test]
fn check_passes_a_sound_sheet_and_names_what_it_could_not_check() {
    // invented: a heat flux from a film coefficient, then a table of no fixed shape
    let (_dir, path) = sheet(
        "amb = air(T: 24 degC, rh: 55 %)\n\
         hot = heat(amb, to: 80 degC)\n\
         q = h_tray_parallel(air: hot, velocity: 3 m/s) * (hot.T - amb.wetbulb)\n\
         check q > 1 kW/m^2\n\
         rows = steps(20 degC, 30 degC, 5 K)\n\
         twice = rows\n",
    );
    let out = siccant(&["check", path.to_str().expect("utf-8")]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{stdout}");
    assert!(stdout.contains("4 of 6 statements checked"), "{stdout}");
    assert!(stdout.contains("not checked: rows, twice"), "{stdout}");
}

#[test]
fn check_survives_a_recursive_function_and_checks_both_branches() {
    // invented: a recursive sum of layer depths
    let (_dir, path) = sheet(
        "depth(n) = if n <= 0 then 0 m else 2 mm + depth(n - 1)\n\
         total = depth(5)\n\
         odd = if total > 1 m then 1 m else 4 s\n",
    );
    let out = siccant(&["check", path.to_str().expect("utf-8")]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{stderr}");
    assert!(stderr.contains("sheet.sicc:3:"), "{stderr}");
    assert!(stderr.contains("different dimensions"), "{stderr}");
    assert!(!stderr.contains("nested deeper"), "{stderr}");
    let run = siccant(&["run", path.to_str().expect("utf-8")]);
    let run_err = String::from_utf8_lossy(&run.stderr);
    assert!(run_err.contains("different dimensions"), "{run_err}");
}

#[test]
fn help_names_the_interrupt_exit_code() {
    let out = siccant(&["--help"]);
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("130 stopped by Ctrl-C"), "{stdout}");
}

#[test]
fn a_reader_that_stops_early_does_not_crash_the_run() {
    // `siccant run sheet | head`: the reader closes the pipe after a few
    // lines. The run must not panic on the broken pipe, and its exit status
    // stays that of the worksheet. The table is far larger than a pipe's
    // buffer (64 KiB on Linux), so the run is still writing when the reader
    // has gone.
    let (_dir, path) = sheet(
        "input T = 60 degC\na = air(T: T, rh: 20 %)\nt = a.wetbulb\n\
         s = sweep([t], T: steps(20 degC, 120 degC, 0.02 K))\n",
    );
    let mut child = Command::new(env!("CARGO_BIN_EXE_siccant"))
        .args(["run", path.to_str().unwrap()])
        .env("NO_COLOR", "1")
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .expect("binary runs");
    drop(child.stdout.take());
    let out = child.wait_with_output().expect("run ends");
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert_eq!(out.status.code(), Some(0), "{stderr}");
}
