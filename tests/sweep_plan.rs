//! What-if studies through a compiled plan against the general evaluator
//! (the plan is a fast path of it, `src/eval/whatif/plan.rs`): every
//! worksheet here runs twice, with plans and with them switched off, and
//! must give the same output (every value bit for bit, tables, warnings)
//! or the same diagnostics, with the same spans. Each case also says
//! whether its study runs through a plan, so neither path goes untested.

use siccant::eval::whatif::plans_compiled;
use siccant::session::Session;

/// The tray-dryer sheet of `benches/whatif.rs`: air, the parallel-flow
/// coefficient, the wet-surface balance and the constant-rate time.
const TRAY: &str = "
input T_air = 70 degC
input rh_air = 4 %
hot = air(T: T_air, rh: rh_air)
h = h_tray_parallel(air: hot, velocity: 3 m/s)
surface = wet_surface(hot, h: h)
t_constant = constant_rate_time(load: 20 kg/m^2, X1: 1.6 db, X2: 0.5 db, Rc: surface.Rc)
";

/// The air sheet of `benches/air.rs`.
const AIR: &str = "
input T = 60 degC
input w = 0.02 kg/kg_da
a = air(T: T, w: w)
twb = a.wetbulb
";

/// Output (or diagnostics, rendered with file:line:col) of `text` in a new
/// session, with plans on or off, and the number of plans compiled.
fn outcome(text: &str, plans: bool, max_operations: Option<u64>) -> (String, usize) {
    let mut s = Session::new();
    s.limits_mut().study_plans = plans;
    if let Some(n) = max_operations {
        s.limits_mut().max_operations = n;
    }
    let before = plans_compiled();
    let shown = match s.eval(text) {
        Ok(out) => format!("{out:#?}"),
        Err(ds) => ds
            .iter()
            .map(|d| format!("{d:?}\n{}", s.render_diagnostic(d, false)))
            .collect(),
    };
    (shown, plans_compiled() - before)
}

/// Run `text` both ways; they must agree. Returns the output, and whether
/// the planned run compiled at least one plan.
fn same_both_ways_limited(text: &str, max_operations: Option<u64>) -> (String, bool) {
    let (planned, compiled) = outcome(text, true, max_operations);
    let (general, none) = outcome(text, false, max_operations);
    assert_eq!(none, 0, "plans compiled while switched off");
    assert_eq!(planned, general, "plan and general path differ on:\n{text}");
    (planned, compiled > 0)
}

fn same_both_ways(text: &str) -> (String, bool) {
    same_both_ways_limited(text, None)
}

/// `text` runs through a plan and gives the general path's output.
fn planned(text: &str) -> String {
    let (out, compiled) = same_both_ways(text);
    assert!(compiled, "no plan for:\n{text}");
    out
}

#[test]
fn air_sweeps_agree() {
    let out = planned(&format!(
        "{AIR}\ns = sweep([twb, a.rho, a.h], T: steps(50.25 degC, 150 degC, 7 K), \
         w: steps(0.0003 kg/kg_da, 0.075 kg/kg_da, 0.009 kg/kg_da))"
    ));
    assert!(out.contains("twb"), "{out}");
    planned(&format!(
        "{AIR}\ns = sweep([twb], T: steps(50 degC, 90 degC, 5 K))"
    ));
    // A value read by one probe only (moved out of its slot), one read
    // twice, and a whole record.
    planned(&format!(
        "{AIR}\ns = sweep([twb, a, twb], T: steps(50 degC, 90 degC, 5 K))"
    ));
    planned(&format!(
        "{AIR}\ns = sweep([a], T: steps(50 degC, 90 degC, 5 K))"
    ));
}

#[test]
fn tray_sweeps_agree_with_warnings() {
    let out = planned(&format!(
        "{TRAY}\ns = sweep([t_constant, surface.Rc, h, surface.Ts], \
         T_air: steps(40.2 degC, 120 degC, 4.2 K), rh_air: steps(1 %, 25.9 %, 3 %))"
    ));
    // Below 45 degC the tray correlation warns: the warning is counted the same.
    assert!(out.contains("is outside the fitted range"), "{out}");
}

#[test]
fn failing_points_report_the_same_first_error() {
    // Humidity ratios above saturation at the lower temperatures.
    let out = planned(&format!(
        "{AIR}\ns = sweep([twb], T: steps(20 degC, 80 degC, 10 K), w: steps(0.01 kg/kg_da, 0.3 kg/kg_da, 0.05 kg/kg_da))"
    ));
    assert!(out.contains("points failed"), "{out}");
    // A division by zero at one point, in arithmetic after a built-in.
    let out = planned(&format!(
        "{AIR}\nr = 1 K / (T - 80 degC)\ny = r * 2\ns = sweep([twb, y], T: [50 degC, 80 degC, 90 degC])"
    ));
    assert!(out.contains("1 of 3 points failed"), "{out}");
    // A dimension error in a probe at every point: the same message and span.
    let out = planned(&format!(
        "{AIR}\ns = sweep([twb + 1 m], T: steps(50 degC, 60 degC, 5 K))"
    ));
    assert!(
        out.contains("3 of 3 points failed (first: 7:12: `+` needs equal dimensions"),
        "{out}"
    );
    // A field that is not there, and a field of a quantity.
    planned(&format!(
        "{AIR}\ns = sweep([a.nope], T: steps(50 degC, 60 degC, 5 K))"
    ));
    planned(&format!(
        "{AIR}\ns = sweep([twb.x], T: steps(50 degC, 60 degC, 5 K))"
    ));
}

#[test]
fn points_in_one_run_carry_nothing_over() {
    // A worker evaluates its points one after another in one context:
    // failing, warning and passing points alternate, so a message, warning
    // or step count left by one point would show at the next.
    let ts = ["20 degC", "80 degC"].repeat(12).join(", ");
    let out = planned(&format!(
        "{AIR}\ns = sweep([twb], T: [{ts}], w: [0.05 kg/kg_da, 0.01 kg/kg_da])"
    ));
    assert!(out.contains("12 of 48 points failed"), "{out}");
    let ts = ["41 degC", "70 degC", "43 degC"].repeat(8).join(", ");
    let out = planned(&format!(
        "{TRAY}\ncheck t_constant > 2 h\ns = sweep([t_constant], T_air: [{ts}])"
    ));
    for t in [41, 43] {
        let warning = format!(
            "at 8 of 24 points: parallel-flow tray correlation: air temperature = {t} degC"
        );
        assert!(out.contains(&warning), "{out}");
    }
}

#[test]
fn rules_break_the_same_way() {
    let out = planned(&format!(
        "{TRAY}\ncheck surface.Rc < 1.5 kg/(m^2*h)\ncheck t_constant > 1 h\n\
         s = sweep([t_constant], T_air: steps(50 degC, 110 degC, 10 K), rh_air: [2 %, 8 %])"
    ));
    assert!(out.contains("checks"), "{out}");
}

#[test]
fn seek_optimise_and_uncertainty_agree() {
    planned(&format!(
        "{TRAY}\nT_needed = seek(t_constant, 2 h, T_air: [50 degC, 120 degC])"
    ));
    planned(&format!(
        "{TRAY}\ncheck surface.T < 40 degC\nbest = maximise(surface.Rc, T_air: [50 degC, 120 degC], rh_air: [1 %, 10 %])"
    ));
    planned(&format!(
        "{TRAY}\nbest = minimise(t_constant, T_air: [50 degC, 120 degC])"
    ));
    planned(&format!(
        "{TRAY}\nu = uncertainty([t_constant, surface.Rc], T_air: normal(70 degC, 3 K), rh_air: uniform(3 %, 5 %), samples: 300, seed: 5)"
    ));
    planned(&format!(
        "{TRAY}\np = propagate([t_constant], T_air: normal(70 degC, 3 K))"
    ));
    planned(&format!(
        "{TRAY}\nt = tornado(t_constant, T_air: [60 degC, 80 degC], rh_air: [2 %, 6 %])"
    ));
}

#[test]
fn arithmetic_literals_and_operators_agree() {
    planned(
        "input x = 2 m\ninput k = 3\ny = -k * x + 1 m\nz = -(y / 2) - -3 m\nq = (z > 0 m) == true\n\
         s = sweep([y, z, q, x, 2 m ^ 2], x: steps(-3 m, 3 m, 0.5 m), k: [1, 2.5])",
    );
    planned(
        "input T = 60 degC\ndT = T - 20 degC\nT2 = T + dT\nbad = T + T\n\
         s = sweep([dT, T2, bad], T: steps(40 degC, 60 degC, 10 K))",
    );
}

#[test]
fn values_shown_as_a_unit_agree() {
    planned(&format!(
        "{AIR}\nrise = T - twb\ns = sweep([twb as degF, rise as K, a.w * 1000 as g/kg_da, (T - twb) as K, \
         T - twb as K], T: steps(50 degC, 90 degC, 10 K))"
    ));
    planned(
        "input x = 2 m\ninput k = 3\ny = k * x\ns = sweep([y as cm, x * k as mm, x / k as km], \
         x: [1 m, 2 m], k: [2, 4])",
    );
    // A unit that cannot show the value: the same error at every point.
    let out = planned("input x = 2 m\ny = x * 2\ns = sweep([y as kg, x * x as s], x: [1 m, 2 m])");
    assert!(out.contains("points failed"), "{out}");
}

#[test]
fn the_step_budget_stops_a_point_at_the_same_step() {
    // A long probe: the sheet itself takes fewer steps than the budget, each
    // point more, so every point stops at the same node either way.
    let probe = vec!["a.w"; 40].join(" + ");
    let text = format!("{AIR}\ns = sweep([{probe}], T: [50 degC, 60 degC])");
    let (out, compiled) = same_both_ways_limited(&text, Some(60));
    assert!(compiled, "no plan");
    assert!(out.contains("evaluation stopped after 60 steps"), "{out}");
    // The same with `as` over computed arithmetic, which takes one step fewer.
    let probes = vec!["T - T as K"; 40].join(", ");
    let text = format!("{AIR}\ns = sweep([{probes}], T: [50 degC, 60 degC])");
    let (out, compiled) = same_both_ways_limited(&text, Some(60));
    assert!(compiled, "no plan");
    assert!(out.contains("evaluation stopped after 60 steps"), "{out}");
}

#[test]
fn studies_the_plan_does_not_cover_run_on_the_general_path() {
    let refused = [
        // a user function
        "input x = 2 m\nf(v) = v * 2\ny = f(x)\ns = sweep([y], x: [1 m, 2 m])",
        // a conditional
        "input x = 2 m\ny = if x > 1 m then x else 0 m\ns = sweep([y], x: [1 m, 2 m])",
        // a list
        "input x = 2 m\ny = [x, x]\ns = sweep([y], x: [1 m, 2 m])",
        // `and` in a rule
        "input x = 2 m\ny = x * 2\ncheck y > 1 m and y < 5 m\ns = sweep([y], x: [1 m, 2 m, 3 m])",
        // an input that depends on the varied one
        "input x = 2 m\ninput y = x * 2\ns = sweep([y], x: [1 m, 2 m])",
    ];
    for text in refused {
        let (_, compiled) = same_both_ways(text);
        assert!(!compiled, "a plan was compiled for:\n{text}");
    }
    // A study inside a study: the inner `seek` has a plan when the sheet
    // computes `t`; the sweep of `t` does not.
    let nested = "input x = 2 m\ninput k = 1\ny = k * x\nt = seek(y, 3 m, x: [0 m, 10 m])\ns = sweep([t], k: [1, 2])";
    let (planned, compiled) = outcome(nested, true, None);
    assert_eq!(planned, outcome(nested, false, None).0);
    assert_eq!(compiled, 1);
}

#[test]
fn the_whatif_suite_agrees_section_by_section() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/suite/whatif");
    let mut files: Vec<_> = std::fs::read_dir(dir)
        .expect("suite folder")
        .map(|e| e.expect("entry").path())
        .collect();
    files.sort();
    let mut sections = 0;
    for path in files {
        let text = std::fs::read_to_string(&path).expect("suite file");
        for section in text.split("\n# --- ") {
            same_both_ways(section);
            sections += 1;
        }
    }
    assert!(sections > 20, "only {sections} sections");
}
