//! A what-if study's points compute only the fields of a built-in's record
//! that the worksheet reads (`a.wetbulb`): checked against evaluating each
//! point on its own, where the whole record is built, and for the errors and
//! warnings of the fields that are read.

use siccant::session::Session;
use siccant::value::{Record, Value};

mod common;
use common::{record, run, si};

fn list(v: Option<&Value>) -> Vec<Value> {
    match v {
        Some(Value::List(items)) => items.clone(),
        other => panic!("not a list: {other:?}"),
    }
}

/// The text of each cell of column `name` of a sweep's table.
fn column(sweep: &Record, name: &str) -> Vec<String> {
    let Some(Value::Table(table)) = sweep.get("table") else {
        panic!("no table")
    };
    let column = table
        .columns
        .iter()
        .find(|c| c.name == name)
        .unwrap_or_else(|| panic!("no column {name}"));
    column.cells.iter().map(siccant::render::text).collect()
}

const SHEET: &str = "
input T = 60 degC
input w = 0.02 kg/kg_da
a = air(T: T, w: w)
twb = a.wetbulb
rho = a.rho
";

#[test]
fn fields_read_in_a_sweep_equal_those_of_the_whole_record() {
    let s = run(&format!(
        "{SHEET}\ns = sweep([twb, rho, a.dewpoint, a.degree_of_saturation], T: [40 degC, 75 degC, 95 degC], w: [0.001 kg/kg_da, 0.04 kg/kg_da])"
    ));
    let sweep = record(&s, "s");
    let probes = ["twb", "rho", "a.dewpoint", "a.degree_of_saturation"];
    let fields = ["wetbulb", "rho", "dewpoint", "degree_of_saturation"];
    let got: Vec<Vec<Value>> = probes.iter().map(|p| list(sweep.get(p))).collect();
    let mut row = 0;
    for t in ["40 degC", "75 degC", "95 degC"] {
        for w in ["0.001 kg/kg_da", "0.04 kg/kg_da"] {
            let text = SHEET
                .replace("input T = 60 degC", &format!("input T = {t}"))
                .replace("input w = 0.02 kg/kg_da", &format!("input w = {w}"));
            let single = run(&text);
            let whole = record(&single, "a");
            for (k, field) in fields.iter().enumerate() {
                // The same engine calls: identical to the last bit.
                assert_eq!(
                    si(Some(&got[k][row])).to_bits(),
                    si(whole.get(field)).to_bits(),
                    "{field} at {t}, {w}"
                );
            }
            row += 1;
        }
    }
    assert_eq!(row, got[0].len());
}

#[test]
fn a_record_read_whole_in_a_sweep_has_every_field() {
    let s = run(&format!(
        "{SHEET}\ns = sweep([a], w: [0.01 kg/kg_da, 0.03 kg/kg_da])"
    ));
    let sweep = record(&s, "s");
    for v in list(sweep.get("a")) {
        let Value::Record(r) = v else {
            panic!("not a record: {v:?}")
        };
        assert_eq!(r.fields.len(), 13);
        assert!(r.payload.is_some(), "an air state carries its engine state");
    }
}

#[test]
fn a_record_passed_to_a_built_in_in_a_sweep_is_whole() {
    // `heat` reads the air state itself, so nothing may be left out of `a`.
    let text = format!(
        "{SHEET}\nb = heat(a, to: 90 degC)\ns = sweep([b.h, b.q], w: [0.01 kg/kg_da, 0.03 kg/kg_da])"
    );
    let s = run(&text);
    let sweep = record(&s, "s");
    let h = list(sweep.get("b.h"));
    for (row, w) in ["0.01 kg/kg_da", "0.03 kg/kg_da"].iter().enumerate() {
        let single = run(&format!(
            "{}\nb = heat(a, to: 90 degC)",
            SHEET.replace("input w = 0.02 kg/kg_da", &format!("input w = {w}"))
        ));
        let b = record(&single, "b");
        assert_eq!(si(Some(&h[row])).to_bits(), si(b.get("h")).to_bits());
    }
}

#[test]
fn a_wet_bulb_that_cannot_be_solved_fails_its_point_at_the_call() {
    // Nearly pure steam: the wet-bulb lies within 0.02 K of the boiling point.
    // Read or not, it fails the point as when the whole record is built.
    for read in ["a.wetbulb", "a.h"] {
        let text = format!("input T = 300 degC\ninput w = 0.02 kg/kg_da\na = air(T: T, w: w)\nx = {read}\ns = sweep([x], w: [0.02 kg/kg_da, 1e5 kg/kg_da])");
        let s = run(&text);
        let sweep = record(&s, "s");
        let errors = column(&sweep, "error");
        assert!(errors[0].is_empty(), "{errors:?}");
        assert!(
            errors[1].starts_with("3:5: the wet-bulb of nearly pure steam"),
            "{read}: {errors:?}"
        );
        assert_eq!(si(sweep.get("failed")), 1.0);
    }
}

#[test]
fn a_missing_dew_point_warns_whether_read_or_not() {
    // Bone-dry air has no dew point: the record has no such field, with a
    // warning, as when the whole record is built.
    let text = "input T = 30 degC\ninput w = 0.01 kg/kg_da\na = air(T: T, w: w)\nx = a.h\ns = sweep([x], w: [0 kg/kg_da, 0.01 kg/kg_da])";
    let mut s = Session::new();
    let out = s.eval(text).expect("the worksheet runs");
    let warned = out.warnings.iter().any(|w| {
        w.message
            .starts_with("at 1 of 2 points: no dew point field: no dew point")
    });
    assert!(warned, "{:?}", out.warnings);
    // Read, it fails its point (the point's warnings go with it).
    let text = text.replace("x = a.h", "x = a.dewpoint");
    let s = run(&text);
    let sweep = record(&s, "s");
    let errors = column(&sweep, "error");
    assert!(
        errors[0].starts_with("4:7: a record of type air has no field `dewpoint`"),
        "{errors:?}"
    );
    assert!(errors[1].is_empty(), "{errors:?}");
}

/// The tray dryer of benches/whatif.rs: the air state `hot` goes whole to
/// `h_tray_parallel` and `wet_surface`, which read only its engine state.
const TRAY: &str = "
input T_air = 70 degC
input rh_air = 4 %
hot = air(T: T_air, rh: rh_air)
h = h_tray_parallel(air: hot, velocity: 3 m/s)
surface = wet_surface(hot, h: h)
t_constant = constant_rate_time(load: 20 kg/m^2, X1: 1.6 db, X2: 0.5 db, Rc: surface.Rc)
";

/// Points inside and outside the tray correlation's range, bone-dry air (no
/// dew point: a warning) and states that cannot exist (failed points).
const TRAY_POINTS: &str = "T_air: [20 degC, 70 degC, 150 degC, 300 degC], rh_air: [0 %, 4 %, 60 %]";

/// The bits of each quantity in each list of values (None for anything else).
fn bits(v: &[Vec<Value>]) -> Vec<Vec<Option<u64>>> {
    v.iter()
        .map(|l| {
            l.iter()
                .map(|x| match x {
                    Value::Quantity(q, _) => Some(q.si.to_bits()),
                    _ => None,
                })
                .collect()
        })
        .collect()
}

/// Each probe's values, the table's text (but for `skip`), the warnings.
fn study_of(
    text: &str,
    probes: &[&str],
    skip: &str,
) -> (Vec<Vec<Value>>, Vec<String>, Vec<String>) {
    let mut s = Session::new();
    let out = s.eval(text).expect("the worksheet runs");
    let warnings = out.warnings.iter().map(|w| w.message.clone()).collect();
    let sweep = record(&s, "s");
    let values = probes.iter().map(|p| list(sweep.get(p))).collect();
    let Some(Value::Table(table)) = sweep.get("table") else {
        panic!("no table")
    };
    let cells = table
        .columns
        .iter()
        .filter(|c| c.name != skip)
        .flat_map(|c| {
            std::iter::once(c.name.to_string()).chain(c.cells.iter().map(siccant::render::text))
        })
        .collect();
    (values, cells, warnings)
}

#[test]
fn a_record_passed_to_transfer_built_ins_gives_the_results_of_the_whole_record() {
    // `hot` reaches h_tray_parallel and wet_surface as its engine state alone,
    // so its air() call builds no field; listing `hot` among the probes reads
    // it whole, the slow path: every value identical to the last bit, and the
    // same table, failures and warnings.
    let probes = ["h", "surface.Ts", "surface.Rc", "t_constant"];
    let fast = study_of(
        &format!("{TRAY}\ns = sweep([{}], {TRAY_POINTS})", probes.join(", ")),
        &probes,
        "hot",
    );
    let whole = study_of(
        &format!(
            "{TRAY}\ns = sweep([{}, hot], {TRAY_POINTS})",
            probes.join(", ")
        ),
        &probes,
        "hot",
    );
    assert_eq!(fast.0.len(), 4);
    assert_eq!(fast.0[0].len(), 12);
    // Some points fail, the others give numbers.
    assert!(bits(&fast.0)[0].iter().any(Option::is_some));
    assert!(bits(&fast.0)[0].iter().any(Option::is_none));
    assert_eq!(bits(&fast.0), bits(&whole.0));
    assert_eq!(fast.1, whole.1);
    assert_eq!(fast.2, whole.2);
    // The edges stay visible: bone-dry air has no dew point, with its warning.
    assert!(
        fast.2
            .iter()
            .any(|w| w.starts_with("at 4 of 12 points: no dew point field")),
        "{:?}",
        fast.2
    );
    // And each point equals the worksheet evaluated there on its own.
    for (row, (t, rh)) in [("70 degC", "4 %"), ("150 degC", "0 %")].iter().enumerate() {
        let single = run(&TRAY
            .replace("input T_air = 70 degC", &format!("input T_air = {t}"))
            .replace("input rh_air = 4 %", &format!("input rh_air = {rh}")));
        let k = if row == 0 { 4 } else { 6 };
        assert_eq!(
            si(Some(&fast.0[3][k])).to_bits(),
            si(single.value("t_constant")).to_bits(),
            "{t}, {rh}"
        );
    }
}

#[test]
fn a_record_passed_to_a_parameter_reading_its_fields_stays_whole() {
    // equilibrium_moisture reads the T and rh fields of its `air` argument:
    // that parameter is not marked, so `hot` keeps every field even though
    // h_tray_parallel, which is, reads it too.
    let sheet = format!(
        "{TRAY}\niso = gab(Xm: 0.08 db, C: 12, K: 0.85, T: 40 degC)\nX = equilibrium_moisture(iso, air: hot)\n"
    );
    let s = run(&format!(
        "{sheet}s = sweep([X, h], T_air: [40 degC, 70 degC], rh_air: [4 %, 30 %])"
    ));
    let sweep = record(&s, "s");
    let x = list(sweep.get("X"));
    let h = list(sweep.get("h"));
    let mut row = 0;
    for t in ["40 degC", "70 degC"] {
        for rh in ["4 %", "30 %"] {
            let single = run(&sheet
                .replace("input T_air = 70 degC", &format!("input T_air = {t}"))
                .replace("input rh_air = 4 %", &format!("input rh_air = {rh}")));
            assert_eq!(
                si(Some(&x[row])).to_bits(),
                si(single.value("X")).to_bits(),
                "{t}, {rh}"
            );
            assert_eq!(si(Some(&h[row])).to_bits(), si(single.value("h")).to_bits());
            row += 1;
        }
    }
}

#[test]
fn a_wet_surface_read_by_fields_gives_the_fields_of_the_whole_record() {
    // `surface` read only as `surface.Rc` (and the other fields one at a
    // time) builds only those fields and no payload; read whole (listed as a
    // probe) it is built whole. Every field of every point identical to the
    // last bit, and the same table, failures and warnings.
    let fields = [
        "Ts", "w_s", "Rc", "q", "q_conv", "q_rad", "q_cond", "latent", "ky", "h",
    ];
    let probes: Vec<String> = fields.iter().map(|f| format!("surface.{f}")).collect();
    let probes: Vec<&str> = probes.iter().map(String::as_str).collect();
    let one = study_of(
        &format!("{TRAY}\ns = sweep([t_constant], {TRAY_POINTS})"),
        &["t_constant"],
        "",
    );
    let fast = study_of(
        &format!("{TRAY}\ns = sweep([{}], {TRAY_POINTS})", probes.join(", ")),
        &probes,
        "",
    );
    let whole = study_of(
        &format!(
            "{TRAY}\ns = sweep([{}, surface], {TRAY_POINTS})",
            probes.join(", ")
        ),
        &probes,
        "surface",
    );
    let bits = |v: &[Value]| -> Vec<Option<u64>> {
        v.iter()
            .map(|x| match x {
                Value::Quantity(q, _) => Some(q.si.to_bits()),
                _ => None,
            })
            .collect()
    };
    assert_eq!(fast.0.len(), fields.len());
    for (k, field) in fields.iter().enumerate() {
        assert_eq!(bits(&fast.0[k]), bits(&whole.0[k]), "{field}");
    }
    assert!(bits(&fast.0[2]).iter().any(Option::is_some));
    assert_eq!(fast.1, whole.1);
    assert_eq!(fast.2, whole.2);
    assert_eq!(one.2, fast.2);
    // The whole records, read from the table's `surface` column, carry every
    // field and the payload; each field equals its own probe.
    let mut s = Session::new();
    s.eval(&format!("{TRAY}\ns = sweep([surface], {TRAY_POINTS})"))
        .expect("the worksheet runs");
    let sweep = record(&s, "s");
    let records = list(sweep.get("surface"));
    let mut built = 0;
    for (row, v) in records.iter().enumerate() {
        let Value::Record(r) = v else { continue };
        assert_eq!(r.fields.len(), fields.len());
        assert!(
            r.payload.is_some(),
            "a whole wet_surface carries its solution"
        );
        for (k, field) in fields.iter().enumerate() {
            assert_eq!(
                Some(si(r.get(field)).to_bits()),
                bits(&fast.0[k])[row],
                "{field} at row {row}"
            );
        }
        built += 1;
    }
    assert!(built > 0);
    // And each value shown with its unit as before: Rc in kg/(m^2*h).
    let rc = list(sweep.get("surface"))
        .into_iter()
        .find_map(|v| match v {
            Value::Record(r) => r.get("Rc").cloned(),
            _ => None,
        })
        .expect("some point dries");
    assert!(siccant::render::text(&rc).ends_with("kg/(m^2*h)"), "{rc:?}");
}

#[test]
fn the_time_of_a_sweep_reading_one_wet_surface_field_equals_each_point_alone() {
    // t_constant reads only surface.Rc: its value at each point is that of
    // the worksheet evaluated there on its own (every record built whole).
    let s = run(&format!(
        "{TRAY}\ns = sweep([t_constant], T_air: [50 degC, 95 degC], rh_air: [2 %, 20 %])"
    ));
    let sweep = record(&s, "s");
    let got = list(sweep.get("t_constant"));
    let mut row = 0;
    for t in ["50 degC", "95 degC"] {
        for rh in ["2 %", "20 %"] {
            let single = run(&TRAY
                .replace("input T_air = 70 degC", &format!("input T_air = {t}"))
                .replace("input rh_air = 4 %", &format!("input rh_air = {rh}")));
            assert_eq!(
                si(Some(&got[row])).to_bits(),
                si(single.value("t_constant")).to_bits(),
                "{t}, {rh}"
            );
            assert_eq!(
                siccant::render::text(&got[row]),
                siccant::render::text(single.value("t_constant").unwrap())
            );
            row += 1;
        }
    }
}

/// Dryer built-ins fed one air state (`fresh`) and a hot gas (`fresh2`),
/// which they read only as engine states.
const DRYERS: &str = "
input T_in = 70 degC
input rh_fresh = 50 %
p = wet_product(cp_solid: 1.5 kJ/(kg*K), X_critical: 0.6 db, X_eq: 0.05 db, T_max: 75 degC)
fresh = air(T: 20 degC, rh: rh_fresh)
fresh2 = air(T: T_in + 230 K, rh: rh_fresh / 50)
d = tray_dryer(product: p, trays: 10, tray_area: 0.8 m^2, load: 15 kg/m^2, X_initial: 1.5 db, X_final: 0.1 db, air: fresh, T_supply: T_in, air_flow: 1 kg/s, h: 30 W/(m^2*K))
z = belt_zone(air: fresh, T_supply: T_in, air_flow: 3 kg/s, h: 30 W/(m^2*K), length: 10 m, recirculated: 50 %)
r = rotary_dryer(product: p, throughput: 3.6 t/h, X_in: 0.25 db, X_out: 0.02 db, T_solid_in: 20 degC, T_solid_out: 80 degC, gas: fresh2, T_gas_out: 120 degC, diameter: 1.8 m, slope: 0.04, speed: 4 min^-1, particle_diameter: 500 um)
";

#[test]
fn air_records_passed_to_dryer_built_ins_give_the_results_of_the_whole_record() {
    // `fresh` and `fresh2` reach the dryers as their engine states alone
    // (their air() calls build no field in the fast study); listing them
    // among the probes reads them whole: every value identical to the last
    // bit, the same table (but for those columns), failures and warnings.
    let probes = [
        "d.batch_time",
        "d.specific_energy",
        "z.lewis",
        "r.gas_flow",
        "r.length",
    ];
    // (deep_bed, also marked, is left out: its solve is slow in a debug build.)
    let points = "T_in: [60 degC, 80 degC], rh_fresh: [30 %, 50 %]";
    let fast = study_of(
        &format!("{DRYERS}\ns = sweep([{}], {points})", probes.join(", ")),
        &probes,
        "fresh",
    );
    let whole = study_of(
        &format!(
            "{DRYERS}\ns = sweep([{}, fresh], {points})",
            probes.join(", ")
        ),
        &probes,
        "fresh",
    );
    assert_eq!(fast.0[0].len(), 4);
    assert!(
        bits(&fast.0)
            .iter()
            .flatten()
            .filter(|b| b.is_some())
            .count()
            > 12
    );
    assert_eq!(bits(&fast.0), bits(&whole.0));
    assert_eq!(fast.1, whole.1);
    assert_eq!(fast.2, whole.2);
    // And a point equals the worksheet evaluated there on its own.
    let single = run(&DRYERS
        .replace("input T_in = 70 degC", "input T_in = 80 degC")
        .replace("input rh_fresh = 50 %", "input rh_fresh = 30 %"));
    for (k, probe) in probes.iter().enumerate() {
        let (name, field) = probe.split_once('.').unwrap();
        assert_eq!(
            si(Some(&fast.0[k][2])).to_bits(),
            si(record(&single, name).get(field)).to_bits(),
            "{probe}"
        );
    }
}

/// The SI magnitudes of column `name` of a sweep's table.
fn column_si(sweep: &Record, name: &str) -> Vec<f64> {
    let Some(Value::Table(table)) = sweep.get("table") else {
        panic!("no table")
    };
    let column = table
        .columns
        .iter()
        .find(|c| c.name == name)
        .unwrap_or_else(|| panic!("no column {name}"));
    column.cells.iter().map(|c| si(Some(c))).collect()
}

/// The sweep benchmark's worksheet (benches/air.rs) over a coarser grid, with
/// the dry-bulb as the outer axis (each dry-bulb repeated along the humidity
/// axis, as the engine keeps its dry-bulb terms) and as the inner one: every
/// row of the table is the input grid, in order, and the wet-bulb the engine
/// gives for that row's inputs, to the last bit; so is the record of a
/// worksheet evaluated at that point alone (every fifth row); the list fields
/// are the table's columns.
#[test]
fn a_sweep_table_is_the_grid_and_the_state_at_each_point() {
    use siccant::engine::air::AirState;
    use uom::si::f64::{Pressure, ThermodynamicTemperature};
    use uom::si::pressure::pascal;
    use uom::si::thermodynamic_temperature::kelvin;

    let sheet = "input T = 60 degC\ninput w = 0.02 kg/kg_da\na = air(T: T, w: w)\ntwb = a.wetbulb\n\
                 Ts = steps(50.25 degC, 150 degC, 9.5 K)\nws = steps(0.0003 kg/kg_da, 0.075 kg/kg_da, 0.0091 kg/kg_da)\n";
    for sweep in [
        "s = sweep([twb], T: Ts, w: ws)",
        "s = sweep([twb], w: ws, T: Ts)",
    ] {
        let s = run(&format!("{sheet}{sweep}"));
        let sweep_record = record(&s, "s");
        let axis =
            |name: &str| -> Vec<f64> { list(s.value(name)).iter().map(|v| si(Some(v))).collect() };
        let (ts, ws) = (axis("Ts"), axis("ws"));
        let (t_col, w_col, twb_col) = (
            column_si(&sweep_record, "T"),
            column_si(&sweep_record, "w"),
            column_si(&sweep_record, "twb"),
        );
        assert_eq!(t_col.len(), ts.len() * ws.len());
        let t_outer = sweep.contains("T: Ts, w");
        for (row, ((&t, &w), &twb)) in t_col.iter().zip(&w_col).zip(&twb_col).enumerate() {
            let (i, j) = if t_outer {
                (row / ws.len(), row % ws.len())
            } else {
                (row % ts.len(), row / ts.len())
            };
            assert_eq!(
                (t.to_bits(), w.to_bits()),
                (ts[i].to_bits(), ws[j].to_bits()),
                "{sweep} row {row}"
            );
            let state = AirState::from_w(
                ThermodynamicTemperature::new::<kelvin>(t),
                w,
                Pressure::new::<pascal>(101_325.0),
            )
            .expect("a state below saturation");
            let want = state.wet_bulb().expect("wet-bulb").get::<kelvin>();
            assert_eq!(twb.to_bits(), want.to_bits(), "{sweep} row {row}");
            if row % 5 == 0 {
                let single = run(&format!("a = air(T: {t:?} K, w: {w:?} kg/kg_da)"));
                let whole = record(&single, "a");
                assert_eq!(
                    si(whole.get("wetbulb")).to_bits(),
                    twb.to_bits(),
                    "{sweep} row {row}"
                );
            }
        }
        for (name, column) in [("T", &t_col), ("w", &w_col), ("twb", &twb_col)] {
            let listed: Vec<u64> = list(sweep_record.get(name))
                .iter()
                .map(|v| si(Some(v)).to_bits())
                .collect();
            let cells: Vec<u64> = column.iter().map(|x| x.to_bits()).collect();
            assert_eq!(listed, cells, "{sweep}: list {name}");
        }
    }
}

/// A sweep with failing points and a check: the failed rows show `-` and
/// their error, the others an empty error and the check's outcome at that
/// point, as evaluating the point alone gives it.
#[test]
fn failed_rows_and_checks_are_those_of_each_point_alone() {
    let sheet =
        "input T = 60 degC\ninput w = 0.02 kg/kg_da\na = air(T: T, w: w)\ntwb = a.wetbulb\n\
                 check twb < 40 degC\n";
    let s = run(&format!(
        "{sheet}s = sweep([twb], T: [30 degC, 60 degC, 90 degC], w: [0.005 kg/kg_da, 0.03 kg/kg_da, 0.5 kg/kg_da])"
    ));
    let sweep = record(&s, "s");
    let (twb, checks, errors) = (
        column(&sweep, "twb"),
        column(&sweep, "checks"),
        column(&sweep, "error"),
    );
    let mut row = 0;
    for t in ["30 degC", "60 degC", "90 degC"] {
        for w in ["0.005 kg/kg_da", "0.03 kg/kg_da", "0.5 kg/kg_da"] {
            let text = sheet
                .replace("input T = 60 degC", &format!("input T = {t}"))
                .replace("input w = 0.02 kg/kg_da", &format!("input w = {w}"));
            let mut single = Session::new();
            match single.eval(&text) {
                Err(_) => {
                    assert_eq!(twb[row], "-", "{t}, {w}");
                    assert_eq!(checks[row], "-", "{t}, {w}");
                    assert!(!errors[row].is_empty(), "{t}, {w}");
                }
                Ok(_) => {
                    let shown = siccant::render::text(single.value("twb").expect("twb"));
                    assert_eq!(twb[row], shown, "{t}, {w}");
                    let below = si(single.value("twb")) < 313.15;
                    let want = if below {
                        "pass"
                    } else {
                        "fails: twb < 40 degC"
                    };
                    assert_eq!(checks[row], want, "{t}, {w}");
                    assert!(errors[row].is_empty(), "{t}, {w}");
                }
            }
            row += 1;
        }
    }
    assert_eq!(row, twb.len());
    // Each kind of row is there: failed, passing and failing the check.
    for kind in ["-", "pass", "fails: twb < 40 degC"] {
        assert!(checks.iter().any(|c| c == kind), "{checks:?}");
    }
}

#[test]
fn each_column_of_a_sweep_is_also_a_list_field_with_the_same_cells() {
    // Inputs shown in their units, a probe shown `as` a unit, a plain one,
    // a record, a repeated probe, a failed point (text cells) and a check.
    let text = format!(
        "{SHEET}\ncheck twb < 45 degC\n\
         s = sweep([twb as degF, rho, a, twb as degF], T: [40 degC, 95 degC], \
         w: [0.001 kg/kg_da, 0.04 kg/kg_da, 0.9 kg/kg_da])"
    );
    let s = run(&text);
    let sweep = record(&s, "s");
    let Some(Value::Table(table)) = sweep.get("table") else {
        panic!("no table")
    };
    let mut listed: Vec<&str> = Vec::new();
    for c in &table.columns {
        if c.name == "checks" || c.name == "error" {
            assert!(sweep.get(&c.name).is_none(), "{} listed", c.name);
            continue;
        }
        // A repeated probe is listed once, from its first column.
        if listed.contains(&c.name.as_str()) {
            continue;
        }
        let cells = list(sweep.get(&c.name));
        assert_eq!(cells.len(), c.cells.len(), "{}", c.name);
        for (l, t) in cells.iter().zip(&c.cells) {
            // Debug text shows every bit of a number, its unit and kind,
            // and a record's fields.
            assert_eq!(format!("{l:?}"), format!("{t:?}"), "{}", c.name);
        }
        listed.push(&c.name);
    }
    // (A probe `x as unit` is named `x`.)
    assert_eq!(listed, ["T", "w", "twb", "rho", "a"]);
    assert!(si(sweep.get("failed")) >= 1.0);
    let rho = list(sweep.get("rho"));
    assert!(rho.iter().any(|v| matches!(v, Value::Str(t) if t == "-")));
    let shown = list(sweep.get("twb"));
    assert!(matches!(&shown[0], Value::Quantity(_, Some(u)) if &*u.symbol == "degF"));
    let temps = list(sweep.get("T"));
    assert!(matches!(&temps[0], Value::Quantity(_, Some(u)) if &*u.symbol == "degC"));
}
