//! Kinetics engine against scipy reference values (committed fixture made by
//! tests/reference/scipy_kinetics/make_fixture.py; tolerances in its README).

use serde_json::Value;
use siccant::engine::diffusion::series::{bessel_j0_zero, bessel_j1_zero};
use siccant::engine::diffusion::{diffusivity_nonlinear, Body, CrankSeries, Shape};
use siccant::engine::kinetics::{drying_time, numerical_time, MonotoneCubic, RateCurve};
use siccant::engine::thin_layer::{fit_thin_layer, ThinLayerModel};

fn fixture() -> Value {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/scipy_kinetics/fixture.json"
    ))
    .expect("fixture present");
    serde_json::from_str(&text).expect("fixture is JSON")
}

fn floats(v: &Value) -> Vec<f64> {
    v.as_array()
        .expect("array")
        .iter()
        .map(|x| x.as_f64().expect("number"))
        .collect()
}

fn shape(name: &str) -> Shape {
    match name {
        "slab" => Shape::Slab,
        "cylinder" => Shape::Cylinder,
        _ => Shape::Sphere,
    }
}

fn rel(a: f64, b: f64) -> f64 {
    (a / b - 1.0).abs()
}

/// Source: scipy.special.jn_zeros. Tolerance 1e-12 relative.
#[test]
fn bessel_zeros_match_scipy() {
    let f = fixture();
    for (n, z) in floats(&f["bessel_j0_zeros"]).iter().enumerate() {
        assert!(rel(bessel_j0_zero(n + 1), *z) < 1e-12, "J0 zero {}", n + 1);
    }
    for (n, z) in floats(&f["bessel_j1_zeros"]).iter().enumerate() {
        assert!(rel(bessel_j1_zero(n + 1), *z) < 1e-12, "J1 zero {}", n + 1);
    }
}

/// Source: Crank's series summed independently in scipy (3000 terms, roots by
/// jn_zeros / brentq). Tolerance 1e-9 relative on MR and eigenvalues.
#[test]
fn crank_series_match_scipy() {
    let f = fixture();
    for case in f["crank"].as_array().unwrap() {
        let s = shape(case["shape"].as_str().unwrap());
        let biot = case["biot"].as_f64();
        let series = CrankSeries::new(s, biot, 1e-6).unwrap();
        for (i, root) in floats(&case["roots"]).iter().enumerate() {
            assert!(
                rel(series.roots[i], *root) < 1e-12,
                "{s:?} {biot:?} root {i}"
            );
        }
        for (fo, mr) in floats(&case["fourier"]).iter().zip(floats(&case["ratio"])) {
            assert!(
                rel(series.moisture_ratio(*fo), mr) < 1e-9,
                "{s:?} {biot:?} Fo {fo}: {} vs {mr}",
                series.moisture_ratio(*fo)
            );
        }
        let fo = series.fourier_for_ratio(0.01).unwrap();
        assert!(rel(fo, case["fourier_at_ratio_0_01"].as_f64().unwrap()) < 1e-9);
    }
}

/// Source: closed form (McCabe et al.) and scipy.integrate.quad. 1e-9 relative.
#[test]
fn constant_linear_drying_time_matches_closed_form_and_quad() {
    let f = fixture();
    for c in f["drying_time"]["constant_linear"].as_array().unwrap() {
        let g = |k: &str| c[k].as_f64().unwrap();
        let curve = RateCurve::constant_linear(g("rc"), g("xc"), g("xe")).unwrap();
        let ours = drying_time(&curve, g("load"), g("x1"), g("x2"))
            .unwrap()
            .total_s;
        let quad = numerical_time(&curve, g("load"), g("x1"), g("x2"))
            .unwrap()
            .total_s;
        assert!(rel(ours, g("closed_form_s")) < 1e-12);
        assert!(rel(ours, g("quad_s")) < 1e-9);
        assert!(rel(quad, g("quad_s")) < 1e-9);
    }
    for c in f["drying_time"]["constant_power"].as_array().unwrap() {
        let g = |k: &str| c[k].as_f64().unwrap();
        let curve = RateCurve::constant_power(g("rc"), g("xc"), g("xe"), g("n")).unwrap();
        let ours = drying_time(&curve, g("load"), g("x1"), g("x2"))
            .unwrap()
            .total_s;
        assert!(rel(ours, g("quad_s")) < 1e-9, "{ours} vs {}", g("quad_s"));
    }
}

/// Source: scipy.interpolate.PchipInterpolator and scipy.integrate.quad on the
/// same invented rate tables. Interpolant 1e-12, integral 1e-6 relative.
#[test]
fn tabulated_drying_time_matches_quad() {
    let f = fixture();
    for t in f["drying_time"]["tables"].as_array().unwrap() {
        let x = floats(&t["moisture"]);
        let r = floats(&t["rate"]);
        let pchip = MonotoneCubic::new(x.clone(), r.clone()).unwrap();
        for (px, py) in floats(&t["probe_x"]).iter().zip(floats(&t["probe_pchip"])) {
            assert!(
                (pchip.value(*px) - py).abs() <= 1e-12 * py.abs().max(1e-6),
                "PCHIP at {px}: {} vs {py}",
                pchip.value(*px)
            );
        }
        let curve = RateCurve::table(&x, &r).unwrap();
        let load = t["load"].as_f64().unwrap();
        for span in t["spans"].as_array().unwrap() {
            let g = |k: &str| span[k].as_f64().unwrap();
            let ours = drying_time(&curve, load, g("x1"), g("x2")).unwrap().total_s;
            assert!(
                rel(ours, g("quad_s")) < 1e-6,
                "{} -> {}: {ours} vs {}",
                g("x1"),
                g("x2"),
                g("quad_s")
            );
        }
    }
}

/// Source: scipy.optimize.curve_fit on the same invented data. The sum of
/// squares must match to 1e-6 relative (or be lower: a better minimum);
/// parameters to 1e-3 relative where the model is well determined.
#[test]
fn thin_layer_fits_match_curve_fit() {
    let f = fixture();
    let data = &f["thin_layer"];
    let times = floats(&data["time_s"]);
    let ratios = floats(&data["ratio"]);
    for reference in data["fits"].as_array().unwrap() {
        let key = reference["model"].as_str().unwrap();
        let model = ThinLayerModel::from_key(key).unwrap();
        let fit =
            fit_thin_layer(model, &times, &ratios, 3600.0).unwrap_or_else(|e| panic!("{key}: {e}"));
        let sse = reference["sse"].as_f64().unwrap();
        assert!(
            fit.sse <= sse * (1.0 + 1e-6),
            "{key}: SSE {} vs scipy {sse}",
            fit.sse
        );
        if (fit.sse / sse - 1.0).abs() < 1e-6 {
            for (ours, theirs) in fit
                .params
                .iter()
                .zip(floats(&reference["params_hour_units"]))
            {
                assert!(
                    (ours - theirs).abs() <= 1e-3 * theirs.abs().max(1e-3),
                    "{key}: {:?} vs {theirs}",
                    fit.params
                );
            }
            for name in ["r_squared", "rmse", "reduced_chi_square"] {
                let theirs = reference[name].as_f64().unwrap();
                let ours = match name {
                    "r_squared" => fit.r_squared,
                    "rmse" => fit.rmse,
                    _ => fit.reduced_chi_square,
                };
                assert!(rel(ours, theirs) < 1e-5, "{key} {name}: {ours} vs {theirs}");
            }
            assert!(
                (fit.aic - reference["aic"].as_f64().unwrap()).abs() < 1e-4,
                "{key} AIC"
            );
        }
    }
}

/// Source: scipy.optimize.curve_fit of Crank's slab series to invented noisy
/// data. D to 1e-5 relative, its standard error to 2 %.
#[test]
fn diffusivity_fit_matches_curve_fit() {
    let f = fixture();
    let d = &f["diffusivity"];
    let body = Body {
        shape: Shape::Slab,
        length_m: d["half_thickness_m"].as_f64().unwrap(),
    };
    let fit =
        diffusivity_nonlinear(&body, &floats(&d["time_s"]), &floats(&d["ratio"]), 1e-9).unwrap();
    assert!(
        rel(fit.d_m2_per_s, d["d_m2_per_s"].as_f64().unwrap()) < 1e-5,
        "{fit:?}"
    );
    assert!(
        rel(fit.std_error_m2_per_s, d["d_std_error"].as_f64().unwrap()) < 0.02,
        "{fit:?}"
    );
}

/// Source: scipy.integrate.solve_ivp (BDF, rtol 1e-10) on our finite-volume
/// equations with D(X) = D exp(a (X - Xe)) (fixture "method_of_lines"): an
/// outside check of the BDF2 time stepping on a nonlinear problem. Time to
/// MR = 0.01 within 0.05 %.
#[test]
fn finite_volume_time_stepping_matches_solve_ivp() {
    use siccant::engine::diffusion::{
        solve_drying, DiffusionProblem, Diffusivity, ProductTemperature, SolverSettings, Surface,
    };
    let f = fixture();
    for case in f["method_of_lines"].as_array().unwrap() {
        let g = |k: &str| case[k].as_f64().unwrap();
        let problem = DiffusionProblem {
            body: Body {
                shape: shape(case["shape"].as_str().unwrap()),
                length_m: g("length_m"),
            },
            x_initial: g("x0"),
            x_equilibrium: g("xe"),
            diffusivity: Diffusivity {
                reference_m2_per_s: g("d_ref"),
                activation_energy_j_per_mol: 0.0,
                reference_temperature_k: 300.0,
                moisture_coefficient: g("a"),
                reference_moisture: g("xe"),
            },
            temperature: ProductTemperature::Constant(300.0),
            surface: Surface::Equilibrium,
            shrinkage: 0.0,
        };
        let settings = SolverSettings {
            cells: g("cells") as usize,
            grading: g("grading"),
            ..SolverSettings::default()
        };
        let run = solve_drying(&problem, &settings).unwrap();
        let reference = g("time_to_0_01_s");
        assert!(
            rel(run.time_to_target_s, reference) < 5e-4,
            "{}: {} vs {reference}",
            case["shape"],
            run.time_to_target_s
        );
    }
}
