//! What-if studies against analytic answers: Monte Carlo of linear functions,
//! seeded reproducibility across thread counts, goal seeking against inverse
//! functions, optimisation against known optima, and sweeps against
//! evaluating each point on its own.

use std::sync::atomic::Ordering;
use std::time::Duration;

use siccant::session::Session;
use siccant::value::Value;

mod common;
use common::{record, run, si};

fn list_si(v: Option<&Value>) -> Vec<f64> {
    match v {
        Some(Value::List(items)) => items.iter().map(|i| si(Some(i))).collect(),
        other => panic!("not a list: {other:?}"),
    }
}

/// y = 3 x1 - 2 x2 + 5 with x1 ~ normal(10, 2), x2 ~ uniform(0, 6):
/// mean 3*10 - 2*3 + 5 = 29, variance 9*4 + 4*(36/12) = 48.
const LINEAR: &str = "
input x1 = 10 m
input x2 = 3 m
y = 3 * x1 - 2 * x2 + 5 m
u = uncertainty([y], x1: normal(10 m, 2 m), x2: uniform(0 m, 6 m), samples: 20000, seed: 11)
";

#[test]
fn monte_carlo_of_a_linear_function_matches_the_analytic_mean_and_variance() {
    let s = run(LINEAR);
    let u = record(&s, "u");
    let (n, mean, var) = (20000.0_f64, 29.0, 48.0_f64);
    let got_mean = si(u.get("mean"));
    let got_var = si(u.get("std")).powi(2);
    // Sampling error of the mean: sqrt(var/n); of the variance, at most
    // var*sqrt(2/(n-1)) for these light-tailed inputs. Allow 4 of each.
    assert!(
        (got_mean - mean).abs() < 4.0 * (var / n).sqrt(),
        "mean {got_mean}"
    );
    assert!(
        (got_var - var).abs() < 4.0 * var * (2.0 / (n - 1.0)).sqrt(),
        "variance {got_var}"
    );
}

#[test]
fn linearised_propagation_is_exact_for_a_linear_function() {
    let s = run(&LINEAR.replace(
        "u = uncertainty([y], x1: normal(10 m, 2 m), x2: uniform(0 m, 6 m), samples: 20000, seed: 11)",
        "p = propagate([y], x1: normal(10 m, 2 m), x2: uniform(0 m, 6 m))",
    ));
    let p = record(&s, "p");
    assert!((si(p.get("mean")) - 29.0).abs() < 1e-9);
    assert!((si(p.get("std")) - 48f64.sqrt()).abs() < 1e-7);
}

fn monte_carlo_on(threads: usize) -> (f64, f64, f64) {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .expect("thread pool");
    pool.install(|| {
        let s = run("
input T = 70 degC
input v = 3 m/s
hot = air(T: T, rh: 5 %)
q = (T - hot.wetbulb) * v * 1 kg/m^3
u = uncertainty([q], T: normal(70 degC, 3 K), v: triangular(2 m/s, 3 m/s, 4.5 m/s), samples: 3000, seed: 42)
");
        let u = record(&s, "u");
        (si(u.get("mean")), si(u.get("std")), si(u.get("p95")))
    })
}

#[test]
fn the_same_seed_gives_identical_results_on_one_or_many_threads() {
    let one = monte_carlo_on(1);
    let many = monte_carlo_on(4);
    assert_eq!(one.0.to_bits(), many.0.to_bits());
    assert_eq!(one.1.to_bits(), many.1.to_bits());
    assert_eq!(one.2.to_bits(), many.2.to_bits());
}

#[test]
fn a_different_seed_gives_a_different_sample() {
    let a = record(&run(LINEAR), "u");
    let b = record(&run(&LINEAR.replace("seed: 11", "seed: 12")), "u");
    assert_ne!(si(a.get("mean")).to_bits(), si(b.get("mean")).to_bits());
}

#[test]
fn goal_seeking_inverts_an_exponential() {
    // y = exp(x / 1 m): the input for target y is ln(y) m.
    for target in [0.5, 1.0, 2.0, 7.5, 20.0] {
        let s = run(&format!(
            "input x = 0 m\ny = exp(x / (1 m))\nx_goal = seek(y, {target}, x: [-3 m, 3.2 m])"
        ));
        let got = si(s.value("x_goal"));
        let want = f64::ln(target);
        assert!(
            (got - want).abs() < 1e-9,
            "target {target}: {got} vs {want}"
        );
    }
}

#[test]
fn goal_seeking_inverts_a_cubic() {
    // y = x^3 + x is monotonic; for y = 10 the root is x = 2.
    let s =
        run("input x = 0 m\ny = x^3 / (1 m^3) + x / (1 m)\nx_goal = seek(y, 10, x: [-5 m, 5 m])");
    assert!((si(s.value("x_goal")) - 2.0).abs() < 1e-10);
}

#[test]
fn optimisation_finds_the_rosenbrock_minimum() {
    // Rosenbrock's valley: minimum 0 at (1, 1).
    let s = run("
input a = 0 m
input b = 0 m
f = (1 - a / (1 m))^2 + 100 * (b / (1 m) - (a / (1 m))^2)^2
best = minimise(f, a: [-2 m, 2 m], b: [-1 m, 3 m])
");
    let best = record(&s, "best");
    assert!((si(best.get("a")) - 1.0).abs() < 1e-3, "{best:?}");
    assert!((si(best.get("b")) - 1.0).abs() < 2e-3, "{best:?}");
    assert!(si(best.get("f")) < 1e-6);
}

#[test]
fn optimisation_of_three_inputs_finds_a_shifted_bowl() {
    let s = run("
input x = 0 m
input y = 0 m
input z = 0 m
f = ((x - 0.3 m)^2 + 2 * (y + 0.7 m)^2 + 0.5 * (z - 1.9 m)^2) / (1 m^2)
best = minimise(f, x: [-1 m, 1 m], y: [-1 m, 1 m], z: [0 m, 3 m])
");
    let best = record(&s, "best");
    for (name, want) in [("x", 0.3), ("y", -0.7), ("z", 1.9)] {
        assert!((si(best.get(name)) - want).abs() < 1e-4, "{name}: {best:?}");
    }
}

const TRAY: &str = "
input T_air = 70 degC
input v_air = 3 m/s
hot = air(T: T_air, rh: 4 %)
h = h_tray_parallel(air: hot, velocity: v_air)
surface = wet_surface(hot, h: h)
t_constant = constant_rate_time(load: 20 kg/m^2, X1: 1.6 db, X2: 0.5 db, Rc: surface.Rc)
";

#[test]
fn a_sweep_gives_the_same_values_as_evaluating_each_point() {
    let s = run(&format!(
        "{TRAY}\ns = sweep([t_constant, surface.Ts], T_air: steps(50 degC, 110 degC, 15 K), v_air: [2 m/s, 4.5 m/s])"
    ));
    let sweep = record(&s, "s");
    let t = list_si(sweep.get("t_constant"));
    let ts = list_si(sweep.get("surface.Ts"));
    let mut row = 0;
    for t_air in [50, 65, 80, 95, 110] {
        for v in ["2 m/s", "4.5 m/s"] {
            let text = TRAY
                .replace(
                    "input T_air = 70 degC",
                    &format!("input T_air = {t_air} degC"),
                )
                .replace("input v_air = 3 m/s", &format!("input v_air = {v}"));
            let single = run(&text);
            let want = si(single.value("t_constant"));
            assert!(
                (t[row] - want).abs() <= 1e-12 * want,
                "row {row}: {} vs {want}",
                t[row]
            );
            let want_ts = match single.value("surface") {
                Some(Value::Record(r)) => si(r.get("Ts")),
                _ => panic!("no surface"),
            };
            assert!((ts[row] - want_ts).abs() <= 1e-12 * want_ts);
            row += 1;
        }
    }
    assert_eq!(row, t.len());
}

#[test]
fn a_failing_point_is_reported_in_its_row() {
    let s = run("input x = 2 m\nr = sqrt((x - 1.5 m) / (1 m))\ns = sweep([r], x: [1 m, 2 m, 3 m])");
    let sweep = record(&s, "s");
    let Some(Value::Table(table)) = sweep.get("table") else {
        panic!("no table")
    };
    let error = table
        .columns
        .iter()
        .find(|c| c.name == "error")
        .expect("error column");
    let texts: Vec<String> = error.cells.iter().map(siccant::render::text).collect();
    assert!(texts[0].starts_with("2:"), "{texts:?}");
    assert!(texts[1].is_empty() && texts[2].is_empty(), "{texts:?}");
}

#[test]
fn the_interrupt_flag_stops_a_long_sweep() {
    let mut s = Session::new();
    let flag = s.interrupt_handle();
    let setter = std::thread::spawn(move || {
        std::thread::sleep(Duration::from_millis(300));
        flag.store(true, Ordering::Relaxed);
    });
    let result = s.eval(
        "input x = 1 m\ninput k = 1\ny = x * k\ns = sweep([y], x: steps(0 m, 1 m, 0.0002 m), k: steps(1, 200, 1))",
    );
    setter.join().expect("setter thread");
    let errors = result.expect_err("the sweep should have been interrupted");
    assert!(
        errors.iter().any(|d| d.message.contains("interrupted")),
        "{errors:?}"
    );
}

#[test]
fn the_example_worksheet_runs_with_its_checks_passing() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/examples/whatif_tray.sicc");
    let text = std::fs::read_to_string(path).expect("example worksheet");
    let mut s = Session::with_file(path);
    let out = match s.eval(&text) {
        Ok(out) => out,
        Err(d) => panic!("{d:?}"),
    };
    for item in &out.items {
        if let siccant::session::OutputItem::Check { text, passed } = item {
            assert!(passed, "check failed: {text}");
        }
    }
    // The optimum uses no more heat than the worksheet's own velocity.
    let best = record(&s, "least_heat");
    assert!(si(best.get("heat_per_kg")) <= si(s.value("heat_per_kg")));
}
