//! The kinetics example worksheet runs end to end (`siccant run --format json`).

use std::process::Command;

fn value(doc: &serde_json::Value, name: &str) -> f64 {
    doc["values"]
        .as_array()
        .expect("values")
        .iter()
        .find(|v| v["name"] == name)
        .and_then(|v| v["si"].as_f64())
        .unwrap_or_else(|| panic!("no value `{name}`"))
}

#[test]
fn tray_from_lab_run_example() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/examples/tray_from_lab_run.sicc"
    );
    let out = Command::new(env!("CARGO_BIN_EXE_siccant"))
        .args(["run", path, "--format", "json"])
        .env("NO_COLOR", "1")
        .output()
        .expect("binary runs");
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).expect("json");
    // The invented readings were generated with Rc = 1.5 kg/(m^2 h), Xc = 0.55,
    // Xe = 0.06 (tests/suite/kinetics/data/make_invented_lab_run.py); the
    // closed form for that model gives 21.348 h for the plant tray.
    let t_lab = value(&doc, "t_lab_air") / 3600.0;
    assert!((t_lab / 21.348 - 1.0).abs() < 0.02, "{t_lab} h");
    let t_plant = value(&doc, "t_plant_air") / 3600.0;
    let ratio = value(&doc, "Rc_plant") / value(&doc, "Rc_lab");
    // Scaling every rate by Rc_plant/Rc_lab divides the time by the same factor.
    assert!(
        (t_lab / t_plant / ratio - 1.0).abs() < 1e-6,
        "{t_lab} {t_plant} {ratio}"
    );
    assert!(doc["checks"]
        .as_array()
        .expect("checks")
        .iter()
        .all(|c| c["passed"] == true));
}
