//! Humid-air engine: exact round trips, bad input, near-boundary states,
//! processes and facts of the trade (marked "common practice").

use siccant::engine::air::{
    self, add_steam, add_water, cool_by, cool_to, heat_by, heat_to, mix, saturate,
    saturated_steam_enthalpy, standard_atmosphere_pressure, AirError, AirState, Stream,
};
use uom::si::available_energy::{joule_per_kilogram, kilojoule_per_kilogram};
use uom::si::f64::{
    AvailableEnergy, Length, MassRate, Pressure, ThermodynamicTemperature, VolumeRate,
};
use uom::si::length::meter;
use uom::si::mass_rate::kilogram_per_second;
use uom::si::power::kilowatt;
use uom::si::pressure::kilopascal;
use uom::si::thermodynamic_temperature::{degree_celsius, kelvin};
use uom::si::volume_rate::cubic_meter_per_second;

fn c(t: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<degree_celsius>(t)
}
fn kpa(p: f64) -> Pressure {
    Pressure::new::<kilopascal>(p)
}
fn k(t: ThermodynamicTemperature) -> f64 {
    t.get::<kelvin>()
}
fn rel(a: f64, b: f64) -> f64 {
    if a == b {
        0.0
    } else {
        (a - b).abs() / a.abs().max(b.abs())
    }
}

/// States over the whole range: -40..350 degC, 50..200 kPa, dry to saturated.
fn grid() -> Vec<AirState> {
    let mut out = Vec::new();
    for p in [50.0, 101.325, 200.0] {
        for t in [
            -40.0, -39.9, -25.0, -3.0, 0.0, 0.3, 12.0, 30.0, 55.0, 80.0, 99.0, 120.0, 160.0, 250.0,
            349.0, 350.0,
        ] {
            for rh in [1e-3, 0.02, 0.1, 0.5, 0.9, 0.9999, 1.0] {
                if let Ok(s) = AirState::from_rh(c(t), rh, kpa(p)) {
                    out.push(s);
                }
            }
        }
    }
    assert!(out.len() > 200, "{}", out.len());
    out
}

/// Issue 3: all constructors invert exactly (state -> property -> state agrees to 1e-9).
#[test]
fn constructors_round_trip_from_states() {
    for s in grid() {
        let (t, p, w) = (s.temperature(), s.pressure(), s.humidity_ratio());
        let back = [
            ("rh", AirState::from_rh(t, s.relative_humidity(), p)),
            ("w", AirState::from_w(t, w, p)),
            ("h", AirState::from_enthalpy(t, s.enthalpy(), p)),
            (
                "dewpoint",
                AirState::from_dew_point(t, s.dew_point().unwrap(), p),
            ),
            (
                "wetbulb",
                AirState::from_wet_bulb(t, s.wet_bulb().unwrap(), p),
            ),
        ];
        for (name, r) in back {
            let got = r
                .unwrap_or_else(|e| panic!("{name} at {s:?}: {e}"))
                .humidity_ratio();
            assert!(
                rel(got, w) < 1e-9 || (got - w).abs() < 1e-15,
                "{name} at {s:?}: w {got} vs {w}"
            );
        }
    }
}

/// Property -> state -> property for each constructor (1e-9 relative).
#[test]
fn properties_round_trip_through_states() {
    for s in grid() {
        let (t, p) = (s.temperature(), s.pressure());
        let rh = s.relative_humidity();
        assert!(rel(AirState::from_rh(t, rh, p).unwrap().relative_humidity(), rh) < 1e-9);
        let h = s.enthalpy();
        assert!(
            rel(
                AirState::from_enthalpy(t, h, p).unwrap().enthalpy().value,
                h.value
            ) < 1e-9
        );
        let td = k(s.dew_point().unwrap());
        assert!(
            rel(
                k(AirState::from_dew_point(t, c(td - 273.15), p)
                    .unwrap()
                    .dew_point()
                    .unwrap()),
                td
            ) < 1e-9
        );
        let twb = k(s.wet_bulb().unwrap());
        let again =
            AirState::from_wet_bulb(t, ThermodynamicTemperature::new::<kelvin>(twb), p).unwrap();
        assert!(rel(k(again.wet_bulb().unwrap()), twb) < 1e-9, "{s:?}");
    }
}

/// Issue 3: near-boundary states solve.
#[test]
fn near_boundary_states_solve() {
    for (t, rh, p) in [
        (-39.9, 0.9999, 101.325),
        (349.0, 0.001, 101.325),
        (20.0, 0.9999, 50.0),
        (-40.0, 1.0, 200.0),
        (350.0, 0.0, 200.0),
    ] {
        let s = AirState::from_rh(c(t), rh, kpa(p)).unwrap_or_else(|e| panic!("{t} {rh}: {e}"));
        let twb = s.wet_bulb().unwrap();
        assert!(k(twb) <= s.temperature().get::<kelvin>() + 1e-9);
        if rh > 0.0 {
            assert!(s.dew_point().is_ok());
        }
    }
}

fn message(r: Result<AirState, AirError>) -> String {
    r.expect_err("must be an error").to_string()
}

/// Issue 3: bad input errors name the argument and the limit.
#[test]
fn bad_input_is_an_error_naming_argument_and_limit() {
    let p = kpa(101.325);
    let m = message(AirState::from_rh(c(20.0), 1.01, p));
    assert!(m.contains("`rh`") && m.contains("100 %"), "{m}");
    let m = message(AirState::from_rh(c(20.0), -0.01, p));
    assert!(m.contains("`rh`") && m.contains("0 to 100 %"), "{m}");
    let m = message(AirState::from_dew_point(c(20.0), c(21.0), p));
    assert!(
        m.contains("`dewpoint`") && m.contains("above the dry-bulb"),
        "{m}"
    );
    let m = message(AirState::from_wet_bulb(c(20.0), c(20.5), p));
    assert!(
        m.contains("`wetbulb`") && m.contains("above the dry-bulb"),
        "{m}"
    );
    let m = message(AirState::from_w(c(20.0), 0.02, p));
    assert!(
        m.contains("`w`") && m.contains("above saturation") && m.contains("0.0147"),
        "{m}"
    );
    let m = message(AirState::from_w(c(20.0), -0.001, p));
    assert!(m.contains("`w`"), "{m}");
    for bad in [0.0, -5.0, f64::NAN] {
        let m = message(AirState::from_rh(c(20.0), 0.5, kpa(bad)));
        assert!(m.contains("`p`") && m.contains("positive"), "{m}");
    }
    let m = message(AirState::from_rh(c(-41.0), 0.5, p));
    assert!(
        m.contains("`T`") && m.contains("-40.00") && m.contains("350.00"),
        "{m}"
    );
    let m = message(AirState::from_rh(c(351.0), 0.5, p));
    assert!(m.contains("`T`") && m.contains("350.00"), "{m}");
    let m = message(AirState::from_wet_bulb(c(30.0), c(-5.0), p));
    assert!(m.contains("`wetbulb`") && m.contains("bone-dry"), "{m}");
    let m = message(AirState::from_enthalpy(
        c(20.0),
        AvailableEnergy::new::<kilojoule_per_kilogram>(200.0),
        p,
    ));
    assert!(m.contains("`h`") && m.contains("saturated"), "{m}");
    let m = message(AirState::from_rh(c(150.0), 0.5, p));
    assert!(m.contains("`rh`") && m.contains("boiling"), "{m}");
}

/// Issue 3: dryer air above the boiling point has a wet-bulb well below it
/// (a careless solver returns the dry-bulb). Values against CoolProp in air_coolprop.rs;
/// here the shape: 200 degC air with w = 0.02 kg/kg at 1 atm has a wet-bulb
/// of about 47 degC (common practice: "about 45-50 degC").
#[test]
fn wet_bulb_of_hot_dryer_air_is_far_below_boiling() {
    let s = AirState::from_w(c(200.0), 0.02, kpa(101.325)).unwrap();
    let twb = s.wet_bulb().unwrap().get::<degree_celsius>();
    assert!((40.0..55.0).contains(&twb), "{twb}");
    for t in [110.0, 150.0, 250.0, 349.9] {
        let s = AirState::from_w(c(t), 0.05, kpa(101.325)).unwrap();
        let twb = s.wet_bulb().unwrap().get::<degree_celsius>();
        assert!(twb < 99.0 && twb > 30.0, "T={t}: wet-bulb {twb}");
    }
}

/// Common practice: dew point <= wet-bulb <= dry-bulb, equal only at saturation.
#[test]
fn dew_point_wet_bulb_dry_bulb_order() {
    for s in grid() {
        let (t, twb, td) = (
            k(s.temperature()),
            k(s.wet_bulb().unwrap()),
            k(s.dew_point().unwrap()),
        );
        assert!(td <= twb + 1e-9 && twb <= t + 1e-9, "{s:?}: {td} {twb} {t}");
        if s.relative_humidity() < 0.99 {
            assert!(twb < t - 0.01, "{s:?}");
        }
    }
}

/// Common practice: the same rh at a lower pressure (higher altitude) holds more water per kg dry air.
#[test]
fn lower_pressure_holds_more_water() {
    let sea = AirState::from_rh(c(25.0), 0.5, kpa(101.325)).unwrap();
    let p_1500 = standard_atmosphere_pressure(Length::new::<meter>(1500.0)).unwrap();
    let high = AirState::from_rh(c(25.0), 0.5, p_1500).unwrap();
    assert!(high.humidity_ratio() > sea.humidity_ratio() * 1.15);
}

#[test]
fn heating_and_cooling_balances() {
    let amb = AirState::from_rh(c(24.0), 0.55, kpa(101.325)).unwrap();
    let hot = heat_to(&amb, c(80.0)).unwrap();
    assert_eq!(hot.outlet.humidity_ratio(), amb.humidity_ratio());
    assert!(
        rel(
            hot.heat.value,
            hot.outlet.enthalpy().value - amb.enthalpy().value
        ) < 1e-12
    );
    // Heating by the same duty lands on the same temperature.
    let again = heat_by(&amb, hot.heat).unwrap();
    assert!((k(again.outlet.temperature()) - k(c(80.0))).abs() < 1e-8);
    // Cooling below the dew point condenses and leaves saturated air.
    let cold = cool_to(&amb, c(10.0)).unwrap();
    assert!(
        cold.water_kg_per_kg_da < -0.002 && (cold.outlet.relative_humidity() - 1.0).abs() < 1e-9
    );
    let removed = AvailableEnergy::new::<joule_per_kilogram>(-cold.heat.value);
    let by = cool_by(&amb, removed).unwrap();
    assert!((k(by.outlet.temperature()) - k(c(10.0))).abs() < 1e-7);
    assert!(heat_to(&amb, c(10.0)).is_err() && cool_to(&amb, c(30.0)).is_err());
}

#[test]
fn mixing_conserves_dry_air_water_and_enthalpy() {
    let a = AirState::from_rh(c(60.0), 0.3, kpa(101.325)).unwrap();
    let b = AirState::from_rh(c(15.0), 0.6, kpa(101.325)).unwrap();
    let (ma, mb) = (
        MassRate::new::<kilogram_per_second>(2.0),
        MassRate::new::<kilogram_per_second>(1.0),
    );
    let m = mix(&a, ma, &b, mb).unwrap();
    let w = (2.0 * a.humidity_ratio() + b.humidity_ratio()) / 3.0;
    let h = (2.0 * a.enthalpy().value + b.enthalpy().value) / 3.0;
    assert!(rel(m.outlet.humidity_ratio(), w) < 1e-12 && rel(m.outlet.enthalpy().value, h) < 1e-9);
    assert_eq!(m.water_kg_per_kg_da, 0.0);
}

/// Common practice: dryer exhaust near saturation meeting cold air condenses
/// (fog, wet ducts). The mix reports the suspended liquid and a saturated outlet.
#[test]
fn saturated_exhaust_meeting_cold_air_fogs() {
    let exhaust = AirState::from_rh(c(55.0), 0.95, kpa(101.325)).unwrap();
    let winter = AirState::from_rh(c(-10.0), 0.8, kpa(101.325)).unwrap();
    let one = MassRate::new::<kilogram_per_second>(1.0);
    let m = mix(&exhaust, one, &winter, one).unwrap();
    assert!(m.water_kg_per_kg_da < -0.001, "{:?}", m);
    assert!((m.outlet.relative_humidity() - 1.0).abs() < 1e-9);
    let w_total = 0.5 * (exhaust.humidity_ratio() + winter.humidity_ratio());
    assert!(rel(m.outlet.humidity_ratio() - m.water_kg_per_kg_da, w_total) < 1e-12);
}

#[test]
fn adiabatic_saturation_ends_at_the_wet_bulb() {
    let s = AirState::from_rh(c(35.0), 0.2, kpa(101.325)).unwrap();
    let full = saturate(&s, 1.0).unwrap();
    assert!((k(full.outlet.temperature()) - k(s.wet_bulb().unwrap())).abs() < 1e-9);
    assert!((full.outlet.relative_humidity() - 1.0).abs() < 1e-9);
    let part = saturate(&s, 0.8).unwrap();
    // Common practice: an evaporative cooler follows (nearly) the wet-bulb line.
    assert!((k(part.outlet.wet_bulb().unwrap()) - k(s.wet_bulb().unwrap())).abs() < 0.02);
    assert!(saturate(&s, 1.2).is_err() && saturate(&s, 0.0).is_err());
}

#[test]
fn adding_water_and_steam() {
    let s = AirState::from_rh(c(40.0), 0.1, kpa(101.325)).unwrap();
    let wet = add_water(&s, 0.004, c(20.0)).unwrap();
    assert!(
        k(wet.outlet.temperature()) < k(c(31.0)),
        "evaporation cools"
    );
    assert!(rel(wet.outlet.humidity_ratio(), s.humidity_ratio() + 0.004) < 1e-12);
    let h_steam = saturated_steam_enthalpy(c(100.0)).unwrap();
    assert!(
        (h_steam.get::<kilojoule_per_kilogram>() - 2676.0).abs() < 3.0,
        "steam tables (from memory): 2675.6"
    );
    let steamed = add_steam(&s, 0.004, h_steam).unwrap();
    // Common practice: steam humidification is nearly isothermal (a few K at most).
    let dt = k(steamed.outlet.temperature()) - k(s.temperature());
    assert!(dt > 0.0 && dt < 3.0, "{dt}");
    assert!(
        add_water(&s, 0.5, c(20.0)).is_err(),
        "cannot evaporate 0.5 kg/kg at 40 degC"
    );
}

#[test]
fn streams_scale_per_kg_results() {
    let s = AirState::from_rh(c(20.0), 0.5, kpa(101.325)).unwrap();
    let st = Stream::from_volume_flow(s, VolumeRate::new::<cubic_meter_per_second>(2.0)).unwrap();
    assert!(rel(st.volume_flow().get::<cubic_meter_per_second>(), 2.0) < 1e-12);
    let hot = heat_to(&s, c(70.0)).unwrap();
    let kw = st.duty(&hot).get::<kilowatt>();
    // About 2 m^3/s * 1.2 kg/m^3 * 1.02 kJ/(kg K) * 50 K = 120 kW (common practice estimate).
    assert!((110.0..130.0).contains(&kw), "{kw}");
}

/// ASHRAE Fundamentals (2017) ch. 1 table 2 (from memory): saturation at 20 degC and
/// 101.325 kPa: w_s = 0.014758, h_s = 57.55 kJ/kg; at 60 degC: p_ws = 19.946 kPa.
#[test]
fn ashrae_table_points_from_memory() {
    let s = AirState::from_rh(c(20.0), 1.0, kpa(101.325)).unwrap();
    assert!(
        rel(s.humidity_ratio(), 0.014758) < 2e-3,
        "{}",
        s.humidity_ratio()
    );
    assert!((s.enthalpy().get::<kilojoule_per_kilogram>() - 57.55).abs() < 0.2);
    let p60 = air::saturation_pressure(c(60.0))
        .unwrap()
        .get::<kilopascal>();
    assert!(rel(p60, 19.946) < 1e-3, "{p60}");
}

/// Evaporative cooling of hot dryer air whose outlet is still above the boiling point.
#[test]
fn partial_saturation_of_air_above_boiling() {
    let s = AirState::from_w(c(200.0), 0.02, kpa(101.325)).unwrap();
    let half = saturate(&s, 0.5).unwrap();
    let twb = k(s.wet_bulb().unwrap());
    assert!(
        (k(half.outlet.temperature()) - (k(s.temperature()) - 0.5 * (k(s.temperature()) - twb)))
            .abs()
            < 1e-9
    );
    assert!((k(half.outlet.wet_bulb().unwrap()) - twb).abs() < 0.05);
    assert!(half.water_kg_per_kg_da > 0.0);
}
