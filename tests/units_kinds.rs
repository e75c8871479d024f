//! Kind rules and error messages of quantity arithmetic (docs/units.md).
//! Numbers are invented; the rules are the ones documented, and the
//! temperature rules follow common practice (ISO 80000-5 keeps temperature
//! and temperature difference apart; uom does the same with two types).

use std::cmp::Ordering;

use siccant::units::{
    describe_dim, format_quantity, parse_unit, Dim, Kind, Quantity, Unit, UnitError,
};

fn q(x: f64, unit: &str) -> Quantity {
    parse_unit(unit)
        .unwrap_or_else(|e| panic!("{unit}: {e}"))
        .try_to_si(x)
        .unwrap_or_else(|e| panic!("{x} {unit}: {e}"))
}

fn u(unit: &str) -> Unit {
    parse_unit(unit).unwrap()
}

fn show(x: &Quantity, unit: &str) -> String {
    format_quantity(x, Some(&u(unit)))
}

fn err_text(r: Result<Quantity, UnitError>) -> String {
    r.expect_err("should be an error").to_string()
}

// ---- temperatures -------------------------------------------------------

#[test]
fn absolute_minus_absolute_is_a_difference() {
    let dt = q(80.0, "degC").sub(&q(35.0, "degC")).unwrap();
    assert_eq!(dt.kind, Kind::TemperatureDifference);
    assert!((dt.si - 45.0).abs() < 1e-12);
    assert_eq!(format_quantity(&dt, None), "45 K");
    assert_eq!(show(&dt, "delta_degF"), "81 delta_degF");
}

#[test]
fn absolute_plus_difference_is_absolute() {
    let t = q(20.0, "degC").add(&q(5.0, "K")).unwrap();
    assert_eq!(t.kind, Kind::AbsoluteTemperature);
    assert_eq!(format_quantity(&t, None), "25 degC");
    let dt = q(80.0, "degC").sub(&q(35.0, "degC")).unwrap();
    let t2 = q(20.0, "degC").add(&dt).unwrap();
    assert_eq!(format_quantity(&t2, None), "65 degC");
    let t3 = dt.add(&q(20.0, "degC")).unwrap();
    assert_eq!(t3.kind, Kind::AbsoluteTemperature);
    let t4 = q(70.0, "degF").sub(&q(10.0, "delta_degF")).unwrap();
    assert_eq!(show(&t4, "degF"), "60 degF");
}

#[test]
fn absolute_plus_absolute_is_an_error_with_a_hint() {
    let e = q(20.0, "degC").add(&q(10.0, "degC")).unwrap_err();
    assert!(e.message.contains("two absolute temperatures"), "{e}");
    assert!(
        e.hints
            .iter()
            .any(|h| h.contains("add a difference like 5 K")),
        "{e}"
    );
    assert!(
        e.hints.iter().any(|h| h.contains("T1 + (T2 - T1)/2")),
        "{e}"
    );
}

#[test]
fn mean_temperature_through_a_difference() {
    let t1 = q(20.0, "degC");
    let t2 = q(80.0, "degC");
    let half = t2.sub(&t1).unwrap().div(&Quantity::number(2.0)).unwrap();
    assert_eq!(half.kind, Kind::TemperatureDifference);
    let mean = t1.add(&half).unwrap();
    assert_eq!(format_quantity(&mean, None), "50 degC");
}

#[test]
fn difference_minus_absolute_is_an_error() {
    let dt = q(80.0, "degC").sub(&q(35.0, "degC")).unwrap();
    let e = err_text(dt.sub(&q(20.0, "degC")));
    assert!(e.contains("temperature difference"), "{e}");
}

#[test]
fn kelvin_literal_minus_absolute_is_a_difference() {
    // A kelvin literal is read as absolute kelvin when an absolute temperature is subtracted.
    let d = q(300.0, "K").sub(&q(20.0, "degC")).unwrap();
    assert_eq!(d.kind, Kind::TemperatureDifference);
    assert!((d.si - 6.85).abs() < 1e-9);
}

#[test]
fn comparisons_of_temperatures() {
    // Equal within round-off of the unit conversions (1e-12 relative).
    assert_eq!(
        q(80.0, "degC").cmp(&q(176.0, "degF")).unwrap(),
        Ordering::Equal
    );
    assert_eq!(q(1.0, "ft").cmp(&q(12.0, "in")).unwrap(), Ordering::Equal);
    assert_eq!(q(1.0, "m").cmp(&q(1.000001, "m")).unwrap(), Ordering::Less);
    assert_eq!(
        q(80.0, "degC").cmp(&q(300.0, "K")).unwrap(),
        Ordering::Greater
    );
    let dt = q(50.0, "degC").sub(&q(20.0, "degC")).unwrap();
    assert_eq!(dt.cmp(&q(10.0, "K")).unwrap(), Ordering::Greater);
    let e = dt.cmp(&q(20.0, "degC")).unwrap_err().to_string();
    assert!(e.contains("temperature difference"), "{e}");
}

#[test]
fn heat_flux_from_coefficient_times_difference() {
    let h = q(25.0, "W/(m^2*K)");
    let dt = q(80.0, "degC").sub(&q(35.0, "degC")).unwrap();
    let flux = h.mul(&dt).unwrap();
    assert_eq!(flux.dim, Dim::HEAT_FLUX);
    assert_eq!(flux.kind, Kind::Plain);
    assert_eq!(format_quantity(&flux, None), "1.125 kW/m^2");
    // degC inside a compound unit is a difference of 1 K.
    assert!((q(25.0, "W/(m^2*degC)").si - 25.0).abs() < 1e-12);
}

#[test]
fn absolute_temperature_in_products_is_kelvin() {
    // p V = n R T needs kelvin: the product uses the thermodynamic value.
    let t = q(20.0, "degC");
    let doubled = Quantity::number(2.0).mul(&t).unwrap();
    assert_eq!(doubled.kind, Kind::Plain);
    assert!((doubled.si - 586.3).abs() < 1e-9);
    let ratio = q(40.0, "degC").div(&q(20.0, "degC")).unwrap();
    assert!((ratio.si - 313.15 / 293.15).abs() < 1e-12);
    let t4 = t.powi(4).unwrap();
    assert_eq!(t4.kind, Kind::Plain);
    assert!((t4.si - 293.15f64.powi(4)).abs() / t4.si < 1e-12);
}

#[test]
fn negating_an_absolute_temperature_is_an_error() {
    assert!(q(20.0, "degC").neg().is_err());
    let dt = q(20.0, "degC").sub(&q(30.0, "degC")).unwrap();
    assert_eq!(dt.neg().unwrap().kind, Kind::TemperatureDifference);
}

#[test]
fn showing_temperatures() {
    let t = q(300.0, "K");
    assert_eq!(show(&t, "degC"), "26.85 degC");
    let dt = q(80.0, "degC").sub(&q(35.0, "degC")).unwrap();
    let e = u("degC").from_si(&dt).unwrap_err();
    assert!(e.to_string().contains("delta_degC"), "{e}");
    let e = u("delta_degC").from_si(&q(20.0, "degC")).unwrap_err();
    assert!(e.to_string().contains("absolute temperature"), "{e}");
    assert_eq!(show(&q(20.0, "degC"), "degF"), "68 degF");
    assert_eq!(show(&q(20.0, "degC"), "K"), "293.1 K");
}

// ---- dimensions -----------------------------------------------------------

#[test]
fn dimension_mismatch_names_both_dimensions_with_hint() {
    let heat_flux = q(1.0, "W/m^2");
    let specific_energy = q(1.0, "J/kg");
    let e = heat_flux.add(&specific_energy).unwrap_err();
    assert!(
        e.message
            .contains("expected power per area [W/m^2], found energy per mass [J/kg]"),
        "{e}"
    );
    assert_eq!(
        e.hints,
        vec!["multiply by a mass flux [kg/(m^2*s)]".to_string()]
    );
    let e = specific_energy.sub(&heat_flux).unwrap_err();
    assert_eq!(
        e.hints,
        vec!["divide by a mass flux [kg/(m^2*s)]".to_string()]
    );
    let e = q(1.0, "m").cmp(&q(1.0, "kg")).unwrap_err();
    assert!(
        e.message.contains("expected length [m], found mass [kg]"),
        "{e}"
    );
}

#[test]
fn describe_dim_in_words() {
    let cases = [
        ("W/m^2", "power per area"),
        ("J/kg", "energy per mass"),
        ("W/(m^2*K)", "heat transfer coefficient"),
        ("W/(m*K)", "thermal conductivity"),
        ("Pa*s", "viscosity"),
        ("m^2/s", "diffusivity"),
        ("kg/(m^2*s)", "mass flux"),
        ("kg/s", "mass flow"),
        ("kg/m^3", "density"),
        ("J/(kg*K)", "specific heat"),
        ("kPa", "pressure"),
        ("kWh", "energy"),
        ("hp", "power"),
        ("m^3/h", "volume flow"),
        ("ft/min", "velocity"),
    ];
    for (unit, words) in cases {
        assert_eq!(describe_dim(u(unit).dim), words, "{unit}");
    }
    assert_eq!(
        describe_dim(Dim([1, 1, 1, 0, 0, 0, 0])),
        "quantity in kg*m*s"
    );
}

#[test]
fn division_by_zero_and_non_finite_results_are_errors() {
    let e = err_text(q(1.0, "kg").div(&q(0.0, "s")));
    assert!(e.contains("division by zero"), "{e}");
    let e = err_text(Quantity::number(1e300).mul(&Quantity::number(1e300)));
    assert!(e.contains("not a finite number"), "{e}");
    assert!(Quantity::number(0.0).powi(-1).is_err());
    assert!(Quantity::number(-8.0).powf(0.5).is_err());
}

#[test]
fn powers_and_roots() {
    let a = q(4.0, "m^2").powf(0.5).unwrap();
    assert_eq!(a.dim, Dim::LENGTH);
    assert!((a.si - 2.0).abs() < 1e-12);
    let v = q(8.0, "m^3").powf(1.0 / 3.0).unwrap();
    assert_eq!(v.dim, Dim::LENGTH);
    let e = err_text(q(4.0, "m").powf(0.5));
    assert!(e.contains("do not divide evenly"), "{e}");
    let e = err_text(q(4.0, "m").pow(&q(2.0, "s")));
    assert!(e.contains("dimensionless"), "{e}");
    let r = Quantity::number(2.0).powf(0.37).unwrap();
    assert!((r.si - 2f64.powf(0.37)).abs() < 1e-12);
    assert_eq!(q(3.0, "m").powi(2).unwrap().dim, Dim::AREA);
    assert_eq!(q(3.0, "m").powf(2.0).unwrap().dim, Dim::AREA);
}

// ---- dimensionless kinds --------------------------------------------------

#[test]
fn wet_and_dry_basis() {
    let x = q(1.40, "db");
    assert_eq!(x.kind, Kind::Moisture);
    assert_eq!(show(&x, "wb"), "0.5833 wb");
    assert_eq!(show(&x, "%wb"), "58.33 %wb");
    let w = q(0.5, "wb");
    assert!(
        (w.si - 1.0).abs() < 1e-12,
        "50 % wet basis is 1 kg/kg dry basis"
    );
    assert_eq!(format_quantity(&w, None), "1 db");
    assert!((q(20.0, "%wb").si - 0.25).abs() < 1e-12);
    let e = u("wb").try_to_si(1.0).unwrap_err();
    assert!(e.message.contains("below 1"), "{e}");
    assert!(u("wb").try_to_si(1.2).is_err());
    assert!(u("%wb").try_to_si(100.0).is_err());
    // Dry basis above 1 is ordinary (very wet products).
    assert_eq!(show(&q(4.0, "db"), "wb"), "0.8 wb");
    let e = u("wb")
        .from_si(&Quantity::new(-0.1, Dim::NONE, Kind::Moisture))
        .unwrap_err();
    assert!(e.message.contains("negative"), "{e}");
}

#[test]
fn moisture_and_humidity_ratio_do_not_mix() {
    let x = q(0.2, "db");
    let w = q(12.0, "g/kg_da");
    assert_eq!(w.kind, Kind::HumidityRatio);
    assert!((w.si - 0.012).abs() < 1e-15);
    let e = x.add(&w).unwrap_err();
    assert!(
        e.message.contains("moisture content") && e.message.contains("humidity ratio"),
        "{e}"
    );
    assert!(
        e.hints[0].contains("dry solid") && e.hints[0].contains("dry air"),
        "{e}"
    );
    assert!(x.cmp(&w).is_err());
    assert!(q(0.5, "aw").add(&x).is_err());
    assert!(q(50.0, "%rh").sub(&w).is_err());
}

#[test]
fn same_kinds_add_and_numbers_join_them() {
    let dx = q(1.4, "db").sub(&q(0.1, "db")).unwrap();
    assert_eq!(dx.kind, Kind::Moisture);
    assert_eq!(
        q(0.012, "kg/kg_da").add(&q(2.0, "g/kg_da")).unwrap().kind,
        Kind::HumidityRatio
    );
    assert_eq!(
        q(0.2, "db").sub(&Quantity::number(0.05)).unwrap().kind,
        Kind::Moisture
    );
    assert_eq!(
        q(50.0, "%rh").add(&q(5.0, "%")).unwrap().kind,
        Kind::Activity
    );
    assert_eq!(
        q(50.0, "%").add(&Quantity::number(0.1)).unwrap().kind,
        Kind::Fraction
    );
}

#[test]
fn a_percentage_does_not_say_its_moisture_basis() {
    let e = q(0.2, "db").cmp(&q(20.0, "%")).unwrap_err();
    assert!(e.message.contains("percentage"), "{e}");
    assert!(e.hints[0].contains("%db or %wb"), "{e}");
    assert!(q(5.0, "%").add(&q(0.2, "db")).is_err());
    assert!(q(0.012, "kg/kg_da").sub(&q(1.0, "%")).is_err());
    // With the basis written, the comparison works.
    assert_eq!(q(0.2, "db").cmp(&q(20.0, "%db")).unwrap(), Ordering::Equal);
    assert_eq!(q(0.25, "db").cmp(&q(20.0, "%wb")).unwrap(), Ordering::Equal);
}

#[test]
fn scaling_keeps_kind_other_products_drop_it() {
    let x = q(0.4, "db");
    assert_eq!(Quantity::number(0.5).mul(&x).unwrap().kind, Kind::Moisture);
    assert_eq!(x.div(&Quantity::number(2.0)).unwrap().kind, Kind::Moisture);
    assert_eq!(q(50.0, "%").mul(&x).unwrap().kind, Kind::Moisture);
    assert_eq!(
        q(50.0, "%").mul(&q(20.0, "%")).unwrap().kind,
        Kind::Fraction
    );
    let water = q(60.0, "kg").mul(&x).unwrap();
    assert_eq!((water.kind, water.dim), (Kind::Plain, Dim::MASS));
    assert_eq!(x.div(&q(0.2, "db")).unwrap().kind, Kind::Plain);
    assert_eq!(Quantity::number(1.0).div(&x).unwrap().kind, Kind::Plain);
    assert_eq!(x.mul(&q(0.01, "kg/kg_da")).unwrap().kind, Kind::Plain);
    let rate = x.div(&q(1.0, "h")).unwrap();
    assert_eq!(
        (rate.kind, rate.dim),
        (Kind::Plain, Dim([0, 0, -1, 0, 0, 0, 0]))
    );
}

#[test]
fn percent_and_relative_humidity() {
    let rh = q(55.0, "%");
    assert_eq!(rh.kind, Kind::Fraction);
    assert!((rh.si - 0.55).abs() < 1e-15);
    // 55 % is accepted where a relative humidity is expected.
    let as_rh = rh.expect_kind(Dim::NONE, Kind::Activity).unwrap();
    assert_eq!(as_rh.kind, Kind::Activity);
    assert_eq!(format_quantity(&as_rh, None), "55 %rh");
    assert_eq!(show(&as_rh, "aw"), "0.55 aw");
    assert_eq!(show(&as_rh, "%"), "55 %");
    // A bare number is accepted too; a humidity ratio is not.
    assert!(Quantity::number(0.55)
        .expect_kind(Dim::NONE, Kind::Activity)
        .is_ok());
    assert!(q(10.0, "g/kg_da")
        .expect_kind(Dim::NONE, Kind::Activity)
        .is_err());
    // A percentage does not say its moisture basis.
    let e = q(20.0, "%")
        .expect_kind(Dim::NONE, Kind::Moisture)
        .unwrap_err();
    assert!(e.hints[0].contains("%wb"), "{e}");
    // Moisture cannot be shown in %, only in its own units.
    assert!(u("%").from_si(&q(0.2, "db")).is_err());
}

#[test]
fn expected_absolute_temperature() {
    assert!((q(20.0, "degC").absolute_kelvin().unwrap() - 293.15).abs() < 1e-12);
    assert!((q(300.0, "K").absolute_kelvin().unwrap() - 300.0).abs() < 1e-12);
    let dt = q(30.0, "degC").sub(&q(20.0, "degC")).unwrap();
    assert!(dt.absolute_kelvin().is_err());
    assert!(q(1.0, "kg").absolute_kelvin().is_err());
}

// ---- formatting -----------------------------------------------------------

#[test]
fn default_display_units() {
    assert_eq!(format_quantity(&q(101.325, "kPa"), None), "101.3 kPa");
    assert_eq!(format_quantity(&q(2257.0, "kJ/kg"), None), "2.257 MJ/kg");
    assert_eq!(format_quantity(&q(3.2, "h"), None), "11520 s");
    assert_eq!(
        format_quantity(&q(0.012, "kg/kg_da"), None),
        "0.012 kg/kg_da"
    );
    assert_eq!(format_quantity(&q(2.6e-5, "m^2/s"), None), "2.6e-5 m^2/s");
    assert_eq!(format_quantity(&Quantity::number(3.0), None), "3");
    assert_eq!(format_quantity(&q(1.0, "kg*m*s"), None), "1 kg*m*s");
    assert_eq!(format_quantity(&q(12.0, "mm"), None), "0.012 m");
    assert_eq!(format_quantity(&q(12.0, "mm"), Some(&u("mm"))), "12 mm");
    // An incompatible display unit falls back to the default.
    assert_eq!(format_quantity(&q(12.0, "mm"), Some(&u("kg"))), "0.012 m");
}

#[test]
fn issue_worked_example() {
    let area = q(2.4, "m").mul(&q(1.8, "m")).unwrap();
    let dry_solid = q(14.0, "kg/m^2").mul(&area).unwrap();
    assert_eq!(format_quantity(&dry_solid, None), "60.48 kg");
    let big_u = q(5.0, "BTU/(h*ft^2*degF)");
    assert_eq!(show(&big_u, "W/(m^2*K)"), "28.39 W/(m^2*K)");
    let dt = q(80.0, "degC").sub(&q(35.0, "degC")).unwrap();
    let flux = big_u.mul(&dt).unwrap();
    assert_eq!(flux.cmp(&q(1.0, "kW/m^2")).unwrap(), Ordering::Greater);
}

// ---- lookup and suggestions -------------------------------------------------

#[test]
fn suggestions_for_misspelt_units() {
    use siccant::units::suggest_unit;
    let cases = [
        ("C", "degC"),
        ("hr", "h"),
        ("kpa", "kPa"),
        ("m3", "m^3"),
        ("ft2", "ft^2"),
        ("cfm", "ft^3/min"),
        ("rh", "%rh"),
        ("degc", "degC"),
        ("psii", "psi"),
        ("BTu", "BTU"),
        ("kgda", "kg_da"),
    ];
    for (wrong, right) in cases {
        assert_eq!(suggest_unit(wrong).as_deref(), Some(right), "{wrong}");
    }
    assert_eq!(suggest_unit("zzzzzz"), None);
    let e = parse_unit("W/(m^2*kelvinn)").unwrap_err();
    assert!(e.message.contains("unknown unit `kelvinn`"), "{e}");
    assert_eq!(e.hints, vec!["did you mean `K`?".to_string()]);
    assert_eq!(suggest_unit("pascals").as_deref(), Some("Pa"));
    assert_eq!(suggest_unit("hourr").as_deref(), Some("h"));
}

#[test]
fn parse_errors_are_clear() {
    for (text, fragment) in [
        ("W/(m^2*K", "expected `)`"),
        ("m^x", "integer exponent"),
        ("m^99", "integer exponent"),
        ("*m", "expected a unit symbol"),
        ("m m", "expected `*`, `/` or the end"),
        ("2 m", "expected a unit symbol"),
    ] {
        let e = parse_unit(text).unwrap_err();
        assert!(e.message.contains(fragment), "{text}: {e}");
    }
    assert_eq!(&*parse_unit("s^-1").unwrap().symbol, "1/s");
    assert_eq!(&*parse_unit("m^(-2)").unwrap().symbol, "1/m^2");
    assert_eq!(&*parse_unit("kg/m^2*h").unwrap().symbol, "kg*h/m^2");
    assert_eq!(
        &*parse_unit(" BTU / ( h * ft^2 * degF ) ").unwrap().symbol,
        "BTU/(h*ft^2*degF)"
    );
    assert_eq!(&*parse_unit("°C").unwrap().symbol, "degC");
}

#[test]
fn documented_examples() {
    // docs/units.md, "Dry and wet basis" (invented numbers).
    assert_eq!(format_quantity(&q(35.0, "%wb"), None), "0.5385 db");
    // docs/units.md, "Dimensionless kinds".
    let w = q(0.0123, "kg/kg_da");
    assert_eq!(show(&w, "g/kg_da"), "12.3 g/kg_da");
    assert_eq!(show(&q(70.0, "gr/lb_da"), "g/kg_da"), "10 g/kg_da");
    assert_eq!(u("kJ/kg_da").kind, Kind::Plain);
    assert_eq!(u("m^3/kg_da").kind, Kind::Plain);
    assert_eq!(u("kg/kg_ds").kind, Kind::Moisture);
    assert_eq!(u("lb/lb_da").kind, Kind::HumidityRatio);
    // docs/units.md, "Temperatures".
    assert_eq!(show(&q(9.0, "delta_degF"), "K"), "5 K");
    assert_eq!(show(&q(540.0, "degR"), "degF"), "80.33 degF");
}
