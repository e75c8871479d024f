//! The wet-surface balance against an independent implementation built on
//! CoolProp properties (tests/reference/coolprop_transfer: script, fixture and
//! README with the source version and tolerances).

use siccant::engine::air::AirState;
use siccant::engine::transfer::{wet_surface, ExtraHeat, Radiation, TrayBottom};
use siccant::engine::transport;
use uom::si::f64::{HeatTransfer, Pressure, ThermodynamicTemperature};
use uom::si::heat_transfer::watt_per_square_meter_kelvin;
use uom::si::mass_flux::kilogram_per_square_meter_second;
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::degree_celsius;

const FIXTURE: &str = include_str!("reference/coolprop_transfer/wet_surface.csv");

struct Row {
    case: String,
    t_c: f64,
    w: f64,
    p: f64,
    h: f64,
    emissivity: f64,
    wall_c: Option<f64>,
    u: f64,
    pr_film: f64,
    sc_film: f64,
    ts_c: f64,
    rc: f64,
    wetbulb_c: f64,
}

fn rows() -> Vec<Row> {
    let mut reader = csv::Reader::from_reader(FIXTURE.as_bytes());
    reader
        .records()
        .map(|r| {
            let r = r.expect("fixture row");
            let f = |i: usize| r[i].parse::<f64>().expect("number");
            Row {
                case: r[0].to_string(),
                t_c: f(1),
                w: f(2),
                p: f(3),
                h: f(4),
                emissivity: f(5),
                wall_c: if r[6].is_empty() { None } else { Some(f(6)) },
                u: f(7),
                pr_film: f(8),
                sc_film: f(9),
                ts_c: f(10),
                rc: f(11),
                wetbulb_c: f(12),
            }
        })
        .collect()
}

fn air(row: &Row) -> AirState {
    let t = ThermodynamicTemperature::new::<degree_celsius>(row.t_c);
    AirState::from_w(t, row.w, Pressure::new::<pascal>(row.p)).unwrap()
}

fn h(x: f64) -> HeatTransfer {
    HeatTransfer::new::<watt_per_square_meter_kelvin>(x)
}

fn extra(row: &Row) -> ExtraHeat {
    ExtraHeat {
        radiation: row.wall_c.map(|tw| Radiation {
            emissivity: row.emissivity,
            wall: ThermodynamicTemperature::new::<degree_celsius>(tw),
        }),
        bottom: (row.u > 0.0).then(|| TrayBottom {
            h_underside: h(row.u),
            layers: vec![],
        }),
    }
}

/// Surface temperature within 0.1 K and rate within 1 % of the CoolProp-based
/// solution (the property sets differ by well under 1 %).
#[test]
fn wet_surface_matches_coolprop_implementation() {
    let rows = rows();
    assert!(rows.len() >= 9);
    for row in &rows {
        let s = wet_surface(&air(row), h(row.h), &extra(row)).unwrap();
        let ts = s.temperature.get::<degree_celsius>();
        let rc = s.rate.get::<kilogram_per_square_meter_second>();
        assert!(
            (ts - row.ts_c).abs() < 0.1,
            "{}: Ts {ts} vs {}",
            row.case,
            row.ts_c
        );
        assert!(
            (rc / row.rc - 1.0).abs() < 0.01,
            "{}: Rc {rc} vs {}",
            row.case,
            row.rc
        );
    }
}

/// Film Prandtl and Schmidt numbers the Chilton-Colburn factor uses, from the
/// air engine, within 1 % (Pr) and 1.5 % (Sc, same Fuller diffusivity) of
/// CoolProp's; the humid-air viscosity mixing rules differ by about 1 % at
/// w = 0.08 kg/kg.
#[test]
fn film_groups_match_coolprop() {
    for row in &rows() {
        let t_film = ThermodynamicTemperature::new::<degree_celsius>(0.5 * (row.t_c + row.ts_c));
        let p = Pressure::new::<pascal>(row.p);
        let pr = transport::prandtl(t_film, row.w, p).unwrap();
        let sc = transport::schmidt(t_film, row.w, p).unwrap();
        assert!(
            (pr / row.pr_film - 1.0).abs() < 0.01,
            "{}: Pr {pr} vs {}",
            row.case,
            row.pr_film
        );
        assert!(
            (sc / row.sc_film - 1.0).abs() < 0.015,
            "{}: Sc {sc} vs {}",
            row.case,
            row.sc_film
        );
    }
}

/// Common practice (Lewis number near 1 for air-water): with convection only
/// and moderate air temperature the surface is within 0.5 K of the
/// psychrometric (thermodynamic) wet-bulb, here CoolProp's.
#[test]
fn convection_only_near_coolprop_wet_bulb_at_moderate_temperature() {
    for row in rows()
        .iter()
        .filter(|r| r.t_c <= 45.0 && r.wall_c.is_none() && r.u == 0.0)
    {
        let s = wet_surface(&air(row), h(row.h), &ExtraHeat::default()).unwrap();
        let ts = s.temperature.get::<degree_celsius>();
        assert!(
            (ts - row.wetbulb_c).abs() < 0.5,
            "{}: Ts {ts} vs wet-bulb {}",
            row.case,
            row.wetbulb_c
        );
    }
}

/// Radiation and conduction lift the surface above the wet-bulb (the three
/// fixture cases with extra heat).
#[test]
fn extra_heat_lifts_above_wet_bulb() {
    for row in rows().iter().filter(|r| r.wall_c.is_some() || r.u > 0.0) {
        let s = wet_surface(&air(row), h(row.h), &extra(row)).unwrap();
        assert!(
            s.temperature.get::<degree_celsius>() > row.wetbulb_c + 2.0,
            "{}",
            row.case
        );
    }
}
