//! Fits of the committed invented data sets against scipy.optimize.curve_fit.
//!
//! Source: tests/reference/scipy_fit/fixture.json, made by make_fixture.py in
//! the same folder (scipy and numpy versions recorded in the fixture and the
//! README). Tolerances: parameters within 0.5 % relative, standard errors
//! within 1 % relative, R^2 within 1e-6.

use std::path::{Path, PathBuf};

use serde_json::Value as Json;
use siccant::engine::fit::{least_squares, unbounded};
use siccant::engine::sorption::{fit_isotherm, IsothermKind};
use siccant::library::data::read_table;
use siccant::value::{Table, Value};

const PARAM_TOL: f64 = 5e-3;
const SE_TOL: f64 = 1e-2;

fn folder() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/reference/scipy_fit")
}

fn fixture() -> Json {
    let text =
        std::fs::read_to_string(folder().join("fixture.json")).expect("fixture.json is committed");
    serde_json::from_str(&text).expect("fixture.json is valid JSON")
}

fn column_si(table: &Table, name: &str) -> Vec<f64> {
    let col = table
        .columns
        .iter()
        .find(|c| c.name == name)
        .unwrap_or_else(|| panic!("column {name}"));
    col.cells
        .iter()
        .map(|v| match v {
            Value::Quantity(q, _) => q.si,
            other => panic!("not a number: {other:?}"),
        })
        .collect()
}

fn numbers(v: &Json) -> Vec<f64> {
    v.as_array()
        .expect("array")
        .iter()
        .map(|x| x.as_f64().expect("number"))
        .collect()
}

fn assert_close(what: &str, got: &[f64], want: &[f64], tol: f64) {
    assert_eq!(got.len(), want.len(), "{what}: length");
    for (i, (g, w)) in got.iter().zip(want).enumerate() {
        let rel = (g - w).abs() / w.abs();
        assert!(
            rel <= tol,
            "{what}[{i}]: siccant {g} vs scipy {w} (relative {rel:.2e} > {tol:e})"
        );
    }
}

fn kind_of(name: &str) -> IsothermKind {
    match name {
        "GAB" => IsothermKind::Gab,
        "Oswin" => IsothermKind::Oswin,
        "modified Halsey" => IsothermKind::ModifiedHalsey,
        "modified Henderson" => IsothermKind::ModifiedHenderson,
        "Smith" => IsothermKind::Smith,
        "Peleg" => IsothermKind::Peleg,
        other => panic!("fixture names an unknown model {other}"),
    }
}

#[test]
fn isotherm_fits_match_scipy_curve_fit() {
    let fx = fixture();
    let mut checked = 0;
    for case in fx["cases"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|c| c["y_column"] == "X")
    {
        let table =
            read_table(&folder().join("data").join(case["file"].as_str().unwrap())).unwrap();
        let (aw, x, t) = (
            column_si(&table, "aw"),
            column_si(&table, "X"),
            column_si(&table, "T"),
        );
        for f in case["fits"].as_array().unwrap() {
            let name = f["model"].as_str().unwrap();
            let fit = fit_isotherm(kind_of(name), &aw, &t, &x, None)
                .unwrap_or_else(|e| panic!("{name}: {e}"));
            let what = format!("{} {name}", case["file"]);
            assert_close(
                &format!("{what} params"),
                &fit.result.params,
                &numbers(&f["params"]),
                PARAM_TOL,
            );
            assert_close(
                &format!("{what} std errors"),
                &fit.result.std_errors,
                &numbers(&f["std_errors"]),
                SE_TOL,
            );
            assert!(
                (fit.result.r_squared - f["r_squared"].as_f64().unwrap()).abs() < 1e-6,
                "{what} R^2"
            );
            checked += 1;
        }
    }
    assert_eq!(checked, 13);
}

/// Student's t quantiles against scipy.stats.t.ppf, to 1e-9 relative.
#[test]
fn t_quantiles_match_scipy() {
    let fx = fixture();
    let rows = fx["t_quantiles"].as_array().unwrap();
    for row in rows {
        let (p, dof, want) = (
            row["probability"].as_f64().unwrap(),
            row["dof"].as_f64().unwrap(),
            row["t"].as_f64().unwrap(),
        );
        let got = siccant::engine::fit::student_t_quantile(p, dof);
        assert!(
            (got - want).abs() <= 1e-9 * want,
            "t({p}, {dof}): {got} vs scipy {want}"
        );
    }
    assert_eq!(rows.len(), 30);
}

#[test]
fn page_fit_matches_scipy_curve_fit() {
    let fx = fixture();
    let case = fx["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["file"] == "page_run_300.csv")
        .unwrap();
    let table = read_table(&folder().join("data/page_run_300.csv")).unwrap();
    let t_min: Vec<f64> = column_si(&table, "t").iter().map(|s| s / 60.0).collect();
    let mr = column_si(&table, "MR");
    let page = |p: &[f64], t: f64| (-p[0] * t.powf(p[1])).exp();
    let fit = least_squares(&page, &t_min, &mr, &[0.01, 1.0], &unbounded(2)).unwrap();
    let want = &case["fits"][0];
    assert_close(
        "Page params",
        &fit.params,
        &numbers(&want["params"]),
        PARAM_TOL,
    );
    assert_close(
        "Page std errors",
        &fit.std_errors,
        &numbers(&want["std_errors"]),
        SE_TOL,
    );
}
