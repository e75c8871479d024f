//! Binding tests: argument checking, SI conversion and warnings of the
//! transfer built-ins, called the way the evaluator calls them.

use crate::diag::{Diagnostic, Span};
use crate::library::{find, Arg, Args};
use crate::units::{Dim, Kind, Quantity};
use crate::value::{Record, Value};

fn q(si: f64, dim: Dim) -> Value {
    Value::Quantity(Quantity::new(si, dim, Kind::Plain), None)
}

/// An `air` record with the fields the binding reads (T in K, w, p in Pa).
fn air_record(t_c: f64, w: f64) -> Value {
    Value::Record(
        Record::new("air")
            .with(
                "T",
                Value::Quantity(
                    Quantity::new(t_c + 273.15, Dim::TEMPERATURE, Kind::AbsoluteTemperature),
                    None,
                ),
            )
            .with(
                "w",
                Value::Quantity(Quantity::new(w, Dim::NONE, Kind::HumidityRatio), None),
            )
            .with("p", q(101_325.0, Dim::PRESSURE)),
    )
}

fn air_state(t_c: f64, w: f64) -> crate::engine::air::AirState {
    use uom::si::f64::{Pressure, ThermodynamicTemperature};
    crate::engine::air::AirState::from_w(
        ThermodynamicTemperature::new::<uom::si::thermodynamic_temperature::degree_celsius>(t_c),
        w,
        Pressure::new::<uom::si::pressure::pascal>(101_325.0),
    )
    .unwrap()
}

fn call(name: &str, args: Vec<(&str, Value)>) -> Result<(Value, Vec<Diagnostic>), Diagnostic> {
    let builtin = find(name).expect("registered");
    let args = args
        .into_iter()
        .map(|(n, v)| Arg {
            name: Some(n.to_string()),
            value: v,
            span: Span::default(),
        })
        .collect();
    let mut bound = Args::bind(builtin, Span::default(), args)?;
    let v = (builtin.func)(&mut bound)?;
    Ok((v, bound.warnings))
}

fn si(v: &Value) -> f64 {
    match v {
        Value::Quantity(q, _) => q.si,
        other => panic!("not a quantity: {other:?}"),
    }
}

#[test]
fn every_builtin_documents_its_paper_trail() {
    for b in super::BUILTINS {
        assert!(
            !b.doc.is_empty() && !b.source.is_empty() && !b.validity.is_empty(),
            "{}",
            b.name
        );
        assert!(
            b.example.starts_with(b.name),
            "{} example {}",
            b.name,
            b.example
        );
    }
}

#[test]
fn tray_parallel_from_g_in_si() {
    // 10000 kg/(m^2 h) given in SI as kg/(m^2 s).
    let (h, w) = call(
        "h_tray_parallel",
        vec![("G", q(10000.0 / 3600.0, Dim::MASS_FLUX))],
    )
    .unwrap();
    assert!((si(&h) - 0.0204 * 10000f64.powf(0.8)).abs() < 1e-9);
    assert!(w.is_empty());
}

#[test]
fn tray_parallel_from_air_warns_outside_temperature_range() {
    let (h, w) = call(
        "h_tray_parallel",
        vec![
            ("air", air_record(30.0, 0.01)),
            ("velocity", q(3.0, Dim::VELOCITY)),
        ],
    )
    .unwrap();
    let rho = air_state(30.0, 0.01).density().value;
    let g_kg_per_m2_h = rho * 3.0 * 3600.0;
    assert!(
        (si(&h) - 0.0204 * g_kg_per_m2_h.powf(0.8)).abs() < 1e-9,
        "{}",
        si(&h)
    );
    assert_eq!(w.len(), 1);
    assert!(w[0].message.contains("air temperature"), "{}", w[0].message);
}

#[test]
fn tray_needs_g_or_air_and_velocity() {
    let e = call("h_tray_parallel", vec![("velocity", q(3.0, Dim::VELOCITY))]).unwrap_err();
    assert!(
        e.message.contains("needs `G`, or `air` and `velocity`"),
        "{}",
        e.message
    );
}

#[test]
fn zero_velocity_is_blamed() {
    let e = call(
        "h_sphere",
        vec![
            ("air", air_record(60.0, 0.01)),
            ("velocity", q(0.0, Dim::VELOCITY)),
            ("diameter", q(0.003, Dim::LENGTH)),
        ],
    )
    .unwrap_err();
    assert!(
        e.message.contains("`velocity` must be positive"),
        "{}",
        e.message
    );
}

#[test]
fn wrong_dimension_is_reported() {
    let e = call(
        "h_sphere",
        vec![
            ("air", air_record(60.0, 0.01)),
            ("velocity", q(3.0, Dim::LENGTH)),
            ("diameter", q(0.003, Dim::LENGTH)),
        ],
    )
    .unwrap_err();
    assert!(e.message.contains("expects"), "{}", e.message);
}

#[test]
fn flat_plate_regime_words() {
    let base = || {
        vec![
            ("air", air_record(70.0, 0.01)),
            ("velocity", q(3.0, Dim::VELOCITY)),
            ("length", q(0.8, Dim::LENGTH)),
        ]
    };
    let (lam, w_lam) = call(
        "h_flat_plate",
        [base(), vec![("regime", Value::Str("laminar".into()))]].concat(),
    )
    .unwrap();
    let (turb, w_turb) = call(
        "h_flat_plate",
        [base(), vec![("regime", Value::Str("turbulent".into()))]].concat(),
    )
    .unwrap();
    assert!(si(&turb) > si(&lam));
    assert!(w_lam.is_empty());
    assert_eq!(w_turb.len(), 1, "turbulent below Re 5e5 is warned");
    let e = call(
        "h_flat_plate",
        [base(), vec![("regime", Value::Str("wavy".into()))]].concat(),
    )
    .unwrap_err();
    assert!(e.message.contains("\"laminar\", \"turbulent\", \"mixed\""));
}

#[test]
fn wet_surface_record_and_constant_rate_time() {
    let (s, _) = call(
        "wet_surface",
        vec![
            ("air", air_record(70.0, 0.008)),
            ("h", q(25.0, Dim::HEAT_TRANSFER_COEFFICIENT)),
        ],
    )
    .unwrap();
    let Value::Record(r) = s else {
        panic!("record")
    };
    assert_eq!(r.type_name, "wet_surface");
    let ts = si(r.get("Ts").unwrap());
    assert!(ts > 290.0 && ts < 310.0, "{ts}");
    let rc = r.get("Rc").unwrap().clone();
    let (t, _) = call(
        "constant_rate_time",
        vec![
            ("load", q(20.0, Dim::AREAL_DENSITY)),
            (
                "X1",
                Value::Quantity(Quantity::new(1.6, Dim::NONE, Kind::Moisture), None),
            ),
            (
                "X2",
                Value::Quantity(Quantity::new(0.5, Dim::NONE, Kind::Moisture), None),
            ),
            ("Rc", rc.clone()),
        ],
    )
    .unwrap();
    assert!((si(&t) - 20.0 * 1.1 / si(&rc)).abs() < 1e-6 * si(&t));
}

#[test]
fn humidity_ratio_is_not_a_moisture_content() {
    let e = call(
        "constant_rate_time",
        vec![
            ("load", q(20.0, Dim::AREAL_DENSITY)),
            (
                "X1",
                Value::Quantity(Quantity::new(1.6, Dim::NONE, Kind::HumidityRatio), None),
            ),
            ("X2", q(0.5, Dim::NONE)),
            ("Rc", q(0.001, Dim::MASS_FLUX)),
        ],
    )
    .unwrap_err();
    assert!(
        e.message.contains("solid moisture content"),
        "{}",
        e.message
    );
}

#[test]
fn emissivity_outside_zero_to_one() {
    let e = call(
        "wet_surface",
        vec![
            ("air", air_record(70.0, 0.008)),
            ("h", q(25.0, Dim::HEAT_TRANSFER_COEFFICIENT)),
            ("emissivity", q(1.3, Dim::NONE)),
            ("wall", q(400.0, Dim::TEMPERATURE)),
        ],
    )
    .unwrap_err();
    assert!(e.message.contains("between 0 and 1"), "{}", e.message);
}

#[test]
fn saturated_air_error_names_the_driving_force() {
    // Saturated at 40 degC: w_s about 0.0491 kg/kg; take the air engine's own value.
    use crate::engine::air::AirState;
    use uom::si::f64::{Pressure, ThermodynamicTemperature};
    let sat = AirState::from_rh(
        ThermodynamicTemperature::new::<uom::si::thermodynamic_temperature::degree_celsius>(40.0),
        1.0,
        Pressure::new::<uom::si::pressure::pascal>(101_325.0),
    )
    .unwrap();
    let e = call(
        "wet_surface",
        vec![
            ("air", air_record(40.0, sat.humidity_ratio())),
            ("h", q(25.0, Dim::HEAT_TRANSFER_COEFFICIENT)),
        ],
    )
    .unwrap_err();
    assert!(e.message.contains("no driving force"), "{}", e.message);
}

/// The positions the tray built-ins, `wet_surface` and `constant_rate_time`
/// read their arguments at are those of the names in each built-in's own
/// list (the list registered with it, which `param_index` searches).
#[test]
fn parameter_positions_are_those_of_the_names() {
    use super::*;
    let cases = [
        ("h_tray_parallel", "G", TRAY_G),
        ("h_tray_parallel", "air", TRAY_AIR),
        ("h_tray_parallel", "velocity", TRAY_VELOCITY),
        ("h_tray_impinging", "G", TRAY_G),
        ("h_tray_impinging", "air", TRAY_AIR),
        ("h_tray_impinging", "velocity", TRAY_VELOCITY),
        ("wet_surface", "air", WET_SURFACE_AIR),
        ("wet_surface", "h", WET_SURFACE_H),
        ("constant_rate_time", "load", CRT_LOAD),
        ("constant_rate_time", "X1", CRT_X1),
        ("constant_rate_time", "X2", CRT_X2),
        ("constant_rate_time", "Rc", CRT_RC),
    ];
    for (b, name, at) in cases {
        let builtin = find(b).expect("registered");
        assert_eq!(builtin.param_index(name), Some(at), "{b}({name})");
    }
}

/// Each argument these built-ins read by position is blamed by its own
/// name and span when wrong or missing: the whole message and the span.
#[test]
fn arguments_read_by_position_are_blamed_by_name_and_span() {
    // A distinct span for each argument, numbered in the order given.
    let call_at = |name: &str, given: Vec<(&str, Value)>| {
        let builtin = find(name).expect("registered");
        let args = given
            .into_iter()
            .zip(1u32..)
            .map(|((n, v), k)| Arg {
                name: Some(n.to_string()),
                value: v,
                span: Span {
                    file: 0,
                    start: 10 * k,
                    end: 10 * k + 5,
                },
            })
            .collect();
        let call_span = Span {
            file: 0,
            start: 1,
            end: 200,
        };
        let mut bound = Args::bind(builtin, call_span, args).expect("bound");
        let e = (builtin.func)(&mut bound).expect_err("an error");
        (e.message, e.span.start)
    };
    let crt = |load: Value, x1: Value, rc: Option<Value>| {
        let mut given = vec![("load", load), ("X1", x1), ("X2", q(0.5, Dim::NONE))];
        given.extend(rc.map(|rc| ("Rc", rc)));
        call_at("constant_rate_time", given)
    };
    let hr = |x: f64| Value::Quantity(Quantity::new(x, Dim::NONE, Kind::HumidityRatio), None);
    let rc = || Some(q(0.001, Dim::MASS_FLUX));
    let cases = [
        (
            call_at(
                "h_tray_parallel",
                vec![
                    ("velocity", q(3.0, Dim::VELOCITY)),
                    ("G", q(2.0, Dim::LENGTH)),
                ],
            ),
            "argument `G` of `h_tray_parallel` expects mass flux [kg/(m^2*s)], found length [m]",
            20,
        ),
        (
            call_at(
                "h_tray_impinging",
                vec![
                    ("air", q(1.0, Dim::NONE)),
                    ("velocity", q(3.0, Dim::VELOCITY)),
                ],
            ),
            "argument `air` of `h_tray_impinging` must be air, found a quantity",
            10,
        ),
        (
            call_at(
                "h_tray_parallel",
                vec![
                    ("air", air_record(70.0, 0.01)),
                    ("velocity", q(-3.0, Dim::VELOCITY)),
                ],
            ),
            "`velocity` must be positive, got -3 m/s",
            20,
        ),
        (
            call_at("wet_surface", vec![("air", air_record(70.0, 0.01))]),
            "`wet_surface` needs the argument `h`",
            1,
        ),
        (
            call_at(
                "wet_surface",
                vec![
                    ("h", q(25.0, Dim::HEAT_TRANSFER_COEFFICIENT)),
                    ("air", Value::Record(Record::new("air"))),
                ],
            ),
            "this air record has no T, w and p to read",
            20,
        ),
        (
            crt(q(0.0, Dim::AREAL_DENSITY), q(1.6, Dim::NONE), rc()),
            "`load` must be positive, got 0 kg/m^2",
            10,
        ),
        (
            crt(q(20.0, Dim::AREAL_DENSITY), hr(1.6), rc()),
            "`X1` must be a solid moisture content (dry basis), not an air humidity ratio",
            20,
        ),
        (
            crt(q(20.0, Dim::AREAL_DENSITY), q(-1.0, Dim::NONE), rc()),
            "`X1` must be a moisture content of at least 0, got -1",
            20,
        ),
        (
            crt(q(20.0, Dim::AREAL_DENSITY), q(1.6, Dim::NONE), None),
            "`constant_rate_time` needs the argument `Rc`",
            1,
        ),
        (
            crt(
                q(20.0, Dim::AREAL_DENSITY),
                q(1.6, Dim::NONE),
                Some(Value::Bool(true)),
            ),
            "argument `Rc` of `constant_rate_time` expects a quantity, found a truth value",
            40,
        ),
    ];
    for ((message, start), want, want_start) in cases {
        assert_eq!(message, want);
        assert_eq!(start, want_start, "{want}");
    }
}

/// The readers with a shortcut (`positive_at`, `opt_positive_at`,
/// `moisture`) give what their general paths give, value (bit for bit) or
/// error, for quantities of every kind of case, and leave the argument
/// taken exactly as the general path does.
#[test]
fn shortcut_readers_agree_with_their_general_paths() {
    use super::*;
    let b = find("constant_rate_time").expect("registered");
    let span = Span {
        file: 0,
        start: 7,
        end: 12,
    };
    let kinds = [
        Kind::Plain,
        Kind::Moisture,
        Kind::HumidityRatio,
        Kind::Fraction,
        Kind::Activity,
    ];
    let magnitudes = [
        1.6,
        0.0,
        -0.0,
        -1.0,
        f64::MIN_POSITIVE,
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::NAN,
    ];
    let mut values = vec![Value::Bool(true), Value::Str("x".into())];
    for dim in [Dim::NONE, Dim::AREAL_DENSITY, Dim::MASS_FLUX] {
        for &kind in &kinds {
            for &si in &magnitudes {
                values.push(Value::Quantity(Quantity::new(si, dim, kind), None));
            }
        }
    }
    let args_with = |value: Option<&Value>, at: usize| {
        let mut args = Args::unbound(b, Span::default());
        if let Some(v) = value {
            args.place(
                at,
                Arg {
                    name: None,
                    value: v.clone(),
                    span,
                },
            );
        }
        args
    };
    type Reader = fn(&mut Args, usize) -> Result<Option<f64>, Diagnostic>;
    let readers: [(Reader, Reader); 3] = [
        (
            |a, i| positive_at(a, i, Dim::AREAL_DENSITY).map(Some),
            |a, i| positive_general(a, i, Dim::AREAL_DENSITY).map(Some),
        ),
        (
            |a, i| opt_positive_at(a, i, Dim::AREAL_DENSITY),
            |a, i| opt_positive_general(a, i, Dim::AREAL_DENSITY),
        ),
        (
            |a, i| moisture(a, i).map(Some),
            |a, i| moisture_general(a, i).map(Some),
        ),
    ];
    let shown = |r: Result<Option<f64>, Diagnostic>| match r {
        Ok(x) => format!("{:?}", x.map(f64::to_bits)),
        Err(d) => format!("{d:?}"),
    };
    for (fast, general) in readers {
        for at in [CRT_LOAD, CRT_X1] {
            for value in values.iter().map(Some).chain([None]) {
                let (mut a, mut g) = (args_with(value, at), args_with(value, at));
                let (x, y) = (shown(fast(&mut a, at)), shown(general(&mut g, at)));
                assert_eq!(x, y, "{value:?}");
                assert_eq!(a.has_at(at), g.has_at(at), "{value:?}");
            }
        }
    }
}
