//! Every catalogued unit against its composition from SI base units and the
//! factor given in NIST Special Publication 811 (2008 edition), Appendix B
//! (B.8 "Factors for units listed alphabetically", B.9 "by kind of quantity").
//!
//! Provenance is named beside each row (see tests/reference/nist_sp811/README.md):
//! - "SP 811 B.8" / "SP 811 B.9": the value as printed there, cross-read
//!   against machine-readable copies of Appendix B (see the README);
//! - "SI definition": exact by the definition of the SI unit or prefix;
//! - "from memory": recalled from SP 811, not re-read for this test.
//!
//! Style after uom's unit tests: table-driven, approximate equality.

use siccant::units::{lookup_unit, parse_unit, unit_names, Dim, Kind};

/// Relative tolerance: SP 811 prints 7 significant figures for inexact factors.
const REL_TOL: f64 = 5e-7;

/// (symbol, SI base-unit composition, SI value of one unit, provenance).
const TABLE: &[(&str, &str, f64, &str)] = &[
    // length
    ("m", "m", 1.0, "SI definition"),
    ("ft", "m", 3.048e-1, "SP 811 B.8: foot, exact"),
    ("in", "m", 2.54e-2, "SP 811 B.8: inch, exact"),
    ("yd", "m", 9.144e-1, "SP 811 B.8: yard, exact"),
    (
        "mi",
        "m",
        1.609344e3,
        "SP 811 B.8: mile (international), exact",
    ),
    // mass
    ("kg", "kg", 1.0, "SI definition"),
    ("g", "kg", 1.0e-3, "SI definition"),
    (
        "t",
        "kg",
        1.0e3,
        "SP 811 B.8: ton, metric (t), exact (from memory)",
    ),
    ("lb", "kg", 4.535924e-1, "SP 811 B.8: pound (avoirdupois)"),
    ("oz", "kg", 2.834952e-2, "SP 811 B.8: ounce (avoirdupois)"),
    ("gr", "kg", 6.479891e-5, "SP 811 B.8: grain, exact"),
    ("kg_da", "kg", 1.0, "SI definition (a kilogram of dry air)"),
    (
        "kg_ds",
        "kg",
        1.0,
        "SI definition (a kilogram of dry solid)",
    ),
    (
        "lb_da",
        "kg",
        4.535924e-1,
        "SP 811 B.8: pound (avoirdupois)",
    ),
    (
        "lb_ds",
        "kg",
        4.535924e-1,
        "SP 811 B.8: pound (avoirdupois)",
    ),
    // time
    ("s", "s", 1.0, "SI definition"),
    ("min", "s", 6.0e1, "SP 811 B.8: minute, exact (from memory)"),
    ("h", "s", 3.6e3, "SP 811 B.8: hour, exact (from memory)"),
    ("d", "s", 8.64e4, "SP 811 B.8: day, exact (from memory)"),
    // amount, current, angle
    ("mol", "mol", 1.0, "SI definition"),
    ("A", "A", 1.0, "SI definition"),
    ("rad", "1", 1.0, "SI definition (radian = m/m)"),
    // force
    ("N", "kg*m/s^2", 1.0, "SI definition"),
    ("lbf", "kg*m/s^2", 4.448222, "SP 811 B.8: pound-force"),
    // pressure
    ("Pa", "kg/(m*s^2)", 1.0, "SI definition"),
    ("bar", "kg/(m*s^2)", 1.0e5, "SP 811 B.9: bar, exact"),
    (
        "atm",
        "kg/(m*s^2)",
        1.01325e5,
        "SP 811 B.9: atmosphere, standard, exact",
    ),
    (
        "psi",
        "kg/(m*s^2)",
        6.894757e3,
        "SP 811 B.9: pound-force per square inch",
    ),
    (
        "inHg",
        "kg/(m*s^2)",
        3.386389e3,
        "SP 811 B.8: inch of mercury, conventional",
    ),
    (
        "mmHg",
        "kg/(m*s^2)",
        1.333224e2,
        "SP 811 B.9: millimeter of mercury, conventional",
    ),
    (
        "inH2O",
        "kg/(m*s^2)",
        2.490889e2,
        "SP 811 B.8: inch of water, conventional",
    ),
    (
        "mmH2O",
        "kg/(m*s^2)",
        9.80665,
        "SP 811 B.9: millimeter of water, conventional, exact",
    ),
    // energy
    ("J", "kg*m^2/s^2", 1.0, "SI definition"),
    (
        "Wh",
        "kg*m^2/s^2",
        3.6e3,
        "SP 811 B.8: watt hour, exact (from memory)",
    ),
    (
        "BTU",
        "kg*m^2/s^2",
        1.055056e3,
        "SP 811 B.8: British thermal unit (IT)",
    ),
    (
        "Btu",
        "kg*m^2/s^2",
        1.055056e3,
        "SP 811 B.8: British thermal unit (IT)",
    ),
    (
        "cal",
        "kg*m^2/s^2",
        4.1868,
        "SP 811 B.8: calorie (IT), exact (from memory)",
    ),
    (
        "kcal",
        "kg*m^2/s^2",
        4.1868e3,
        "SP 811 B.8: kilocalorie (IT), exact (from memory)",
    ),
    (
        "cal_th",
        "kg*m^2/s^2",
        4.184,
        "SP 811 B.8: calorie (thermochemical), exact (from memory)",
    ),
    (
        "kcal_th",
        "kg*m^2/s^2",
        4.184e3,
        "SP 811 B.8: kilocalorie (thermochemical), exact (from memory)",
    ),
    // power
    ("W", "kg*m^2/s^3", 1.0, "SI definition"),
    (
        "hp",
        "kg*m^2/s^3",
        7.456999e2,
        "SP 811 B.8: horsepower (550 ft lbf/s)",
    ),
    // volume
    ("L", "m^3", 1.0e-3, "SP 811 B.8: liter, exact (from memory)"),
    ("gal", "m^3", 3.785412e-3, "SP 811 B.8: gallon (US)"),
    // temperature (degree sizes; offsets are checked below)
    ("K", "K", 1.0, "SI definition"),
    (
        "degC",
        "K",
        1.0,
        "SI definition: degree Celsius equals the kelvin in size",
    ),
    (
        "degF",
        "K",
        5.0 / 9.0,
        "SP 811 B.8: degree Fahrenheit = 5/9 K in size, exact (from memory)",
    ),
    (
        "degR",
        "K",
        5.0 / 9.0,
        "SP 811 B.8: degree Rankine = 5/9 K, exact",
    ),
    ("delta_degC", "K", 1.0, "SI definition"),
    (
        "delta_degF",
        "K",
        5.0 / 9.0,
        "SP 811 B.8: degree Fahrenheit (difference), exact",
    ),
    // dimensionless kinds
    (
        "%",
        "1",
        1.0e-2,
        "SI Brochure: percent = 0.01 (from memory)",
    ),
    ("%rh", "1", 1.0e-2, "percent (common practice)"),
    ("%db", "1", 1.0e-2, "percent (common practice)"),
    ("aw", "1", 1.0, "ratio (common practice)"),
    ("db", "1", 1.0, "ratio (common practice)"),
];

/// Compound units of the trade: (expression, composition, SI value, provenance).
const COMPOUNDS: &[(&str, &str, f64, &str)] = &[
    (
        "kWh",
        "kg*m^2/s^2",
        3.6e6,
        "SP 811 B.8: kilowatt hour, exact (from memory)",
    ),
    ("kPa", "kg/(m*s^2)", 1.0e3, "SI definition (prefix kilo)"),
    (
        "mbar",
        "kg/(m*s^2)",
        1.0e2,
        "SP 811 B.9: millibar, exact (from memory)",
    ),
    (
        "ft^3",
        "m^3",
        2.831685e-2,
        "SP 811 B.8: cubic foot (from memory)",
    ),
    (
        "ft^2",
        "m^2",
        9.290304e-2,
        "SP 811 B.8: square foot, exact (from memory)",
    ),
    (
        "ft^3/min",
        "m^3/s",
        4.719474e-4,
        "SP 811 B.8: cubic foot per minute (from memory)",
    ),
    (
        "gal/min",
        "m^3/s",
        6.309020e-5,
        "SP 811 B.8: gallon (US) per minute (from memory)",
    ),
    (
        "lb/ft^3",
        "kg/m^3",
        1.601846e1,
        "SP 811 B.8: pound per cubic foot (from memory)",
    ),
    (
        "lb/h",
        "kg/s",
        1.259979e-4,
        "SP 811 B.8: pound per hour (from memory)",
    ),
    (
        "BTU/h",
        "kg*m^2/s^3",
        2.930711e-1,
        "SP 811 B.8: Btu (IT) per hour (from memory)",
    ),
    (
        "BTU/lb",
        "m^2/s^2",
        2.326e3,
        "SP 811 B.8: Btu (IT) per pound, exact (from memory)",
    ),
    (
        "BTU/(lb*degF)",
        "m^2/(s^2*K)",
        4.1868e3,
        "SP 811 B.8: Btu (IT) per pound degree Fahrenheit, exact (from memory)",
    ),
    (
        "BTU/(h*ft^2*degF)",
        "kg/(s^3*K)",
        5.678263,
        "SP 811 B.8: Btu (IT) per hour square foot degree Fahrenheit (from memory)",
    ),
    (
        "BTU/(h*ft*degF)",
        "kg*m/(s^3*K)",
        1.730735,
        "SP 811 B.8: Btu (IT) foot per hour square foot degree Fahrenheit (from memory)",
    ),
    (
        "lb/(ft*h)",
        "kg/(m*s)",
        4.133789e-4,
        "SP 811 B.8: pound per foot hour (from memory)",
    ),
    (
        "ft^2/h",
        "m^2/s",
        2.58064e-5,
        "SP 811 B.8: square foot per hour, exact (from memory)",
    ),
    (
        "kcal/(h*m^2*degC)",
        "kg/(s^3*K)",
        1.163,
        "kcal (IT) = 4186.8 J over 3600 s, exact (from memory)",
    ),
];

fn relative_error(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

fn check_row(expr: &str, composition: &str, expected: f64, source: &str) -> Option<String> {
    let unit = match parse_unit(expr) {
        Ok(u) => u,
        Err(e) => return Some(format!("{expr}: {e}")),
    };
    let base = parse_unit(composition).expect("composition parses");
    if unit.dim != base.dim {
        return Some(format!(
            "{expr}: dimension {:?} is not that of {composition} ({source})",
            unit.dim
        ));
    }
    let value = unit.factor / base.factor;
    let rel = relative_error(value, expected);
    (rel > REL_TOL).then(|| {
        format!("{expr}: {value} {composition}, expected {expected} ({source}); rel {rel:.1e}")
    })
}

#[test]
fn every_named_unit_matches_nist_sp811() {
    let failures: Vec<String> = TABLE
        .iter()
        .filter_map(|&(s, c, v, src)| check_row(s, c, v, src))
        .collect();
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn compound_units_match_nist_sp811() {
    let failures: Vec<String> = COMPOUNDS
        .iter()
        .filter_map(|&(s, c, v, src)| check_row(s, c, v, src))
        .collect();
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn every_catalogued_unit_has_a_row() {
    let missing: Vec<&str> = unit_names()
        .into_iter()
        .filter(|n| !matches!(*n, "wb" | "%wb"))
        .filter(|n| !TABLE.iter().any(|row| row.0 == *n))
        .collect();
    assert!(
        missing.is_empty(),
        "units without a NIST check: {missing:?}"
    );
}

#[test]
fn temperature_offsets() {
    // SI definition: t/degC = T/K - 273.15. SP 811 B.8 (from memory):
    // T/K = (t/degF + 459.67)/1.8.
    let c = lookup_unit("degC").unwrap();
    let f = lookup_unit("degF").unwrap();
    assert!((c.to_si(0.0).si - 273.15).abs() < 1e-12);
    assert!((c.to_si(100.0).si - 373.15).abs() < 1e-12);
    assert!((f.to_si(32.0).si - 273.15).abs() < 1e-9);
    assert!((f.to_si(212.0).si - 373.15).abs() < 1e-9);
    assert!((f.to_si(-459.67).si).abs() < 1e-9);
    assert_eq!(c.to_si(20.0).kind, Kind::AbsoluteTemperature);
    // K and degR literals are plain (usable as absolute or difference).
    assert_eq!(lookup_unit("K").unwrap().to_si(300.0).kind, Kind::Plain);
    assert!((lookup_unit("degR").unwrap().to_si(491.67).si - 273.15).abs() < 1e-9);
}

/// SI prefixes on SI-named units: (symbol, base, factor). SI Brochure, 9th ed., Table 7.
const PREFIXED: &[(&str, &str, f64)] = &[
    ("km", "m", 1e3),
    ("cm", "m", 1e-2),
    ("mm", "m", 1e-3),
    ("um", "m", 1e-6),
    ("µm", "m", 1e-6),
    ("nm", "m", 1e-9),
    ("mg", "g", 1e-3),
    ("ms", "s", 1e-3),
    ("kmol", "mol", 1e3),
    ("kN", "N", 1e3),
    ("hPa", "Pa", 1e2),
    ("kPa", "Pa", 1e3),
    ("MPa", "Pa", 1e6),
    ("GPa", "Pa", 1e9),
    ("mbar", "bar", 1e-3),
    ("kJ", "J", 1e3),
    ("MJ", "J", 1e6),
    ("GJ", "J", 1e9),
    ("kWh", "Wh", 1e3),
    ("MWh", "Wh", 1e6),
    ("kW", "W", 1e3),
    ("MW", "W", 1e6),
    ("mL", "L", 1e-3),
    ("dam", "m", 1e1),
    ("dL", "L", 1e-1),
    ("mK", "K", 1e-3),
];

#[test]
fn si_prefixes() {
    for &(sym, base, factor) in PREFIXED {
        let u = lookup_unit(sym).unwrap_or_else(|| panic!("{sym} should be known"));
        let b = lookup_unit(base).unwrap();
        assert_eq!(u.dim, b.dim, "{sym}");
        assert!(relative_error(u.factor, b.factor * factor) < 1e-15, "{sym}");
        assert_eq!(&*u.symbol, sym);
    }
}

#[test]
fn exact_symbols_win_over_prefixed_readings_and_prefixes_stay_on_si_units() {
    assert_eq!(lookup_unit("min").unwrap().dim, Dim::TIME); // not milli-inch
    assert_eq!(lookup_unit("mi").unwrap().dim, Dim::LENGTH); // mile
    assert_eq!(lookup_unit("d").unwrap().factor, 86400.0); // day, not deci-
    assert!(lookup_unit("cd").is_none()); // no centi-day
    assert!(lookup_unit("kft").is_none());
    assert!(lookup_unit("kdegC").is_none());
    assert!(lookup_unit("klb").is_none());
    assert!(lookup_unit("mpsi").is_none());
    assert!(lookup_unit("kt").is_none());
    assert!(lookup_unit("xyz").is_none());
}
