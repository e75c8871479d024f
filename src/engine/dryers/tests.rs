//! Checks of the dryer models: balance closure, limiting cases and bad input.
//!
//! Closure and limiting cases are self-consistency checks the issue requires;
//! the closed form for constant plus linear falling rate under constant air is
//! the textbook result t = (Ls/A)/Rc [(X1 - Xc) + (Xc - X*) ln((Xc - X*)/(X2 - X*))]
//! (for example McCabe, Smith and Harriott, Unit Operations of Chemical
//! Engineering, chapter on drying; the formula is common practice).

use uom::si::f64::{Pressure, ThermodynamicTemperature};
use uom::si::pressure::kilopascal;
use uom::si::thermodynamic_temperature::degree_celsius;

use super::batch::{BatchDryer, Element, Fan};
use super::continuous::{Belt, Flow, Zone};
use super::product::{wet_surface_k, Equilibrium, FallingRate, Product, Surface};
use super::rotary::Rotary;
use super::DryerError;
use crate::engine::air::AirState;

fn air(t_c: f64, w: f64) -> AirState {
    AirState::from_w(
        ThermodynamicTemperature::new::<degree_celsius>(t_c),
        w,
        Pressure::new::<kilopascal>(101.325),
    )
    .expect("valid test air")
}

fn product() -> Product {
    Product {
        cp_solid_j_per_kg_k: 1500.0,
        x_critical_db: 0.6,
        equilibrium: Equilibrium::Constant(0.05),
        falling: FallingRate::Linear,
        t_max_k: None,
    }
}

const SURFACE: Surface = Surface {
    h_w_per_m2_k: 30.0,
    lewis: 0.85,
};

fn tray_dryer(trays: usize, air_kg_s: f64, recirculated: f64, t_product_c: f64) -> BatchDryer {
    BatchDryer {
        elements: vec![
            Element {
                area_m2: 1.0,
                dry_solid_kg: 15.0,
                surface: SURFACE
            };
            trays
        ],
        product: product(),
        x_initial_db: 1.5,
        x_target_db: 0.1,
        t_product_initial_k: t_product_c + 273.15,
        fresh_air: air(20.0, 0.008),
        supply_t_k: 343.15,
        dry_air_kg_per_s: air_kg_s,
        recirculated,
        loss_w_per_k: 5.0,
        ambient_t_k: 293.15,
        fan: Fan {
            pressure_rise_pa: 400.0,
            efficiency: 0.6,
        },
        max_time_s: 200.0 * 3600.0,
    }
}

/// Limiting case: with a very large air flow the air does not change along the
/// path, and one tray dries as the closed form for constant air says.
#[test]
fn batch_with_huge_air_flow_matches_closed_form() {
    let supply = air(70.0, 0.008);
    let tw = wet_surface_k(&supply, SURFACE.lewis).expect("wet surface");
    let mut d = tray_dryer(1, 2000.0, 0.0, tw - 273.15);
    d.loss_w_per_k = 0.0;
    let r = d.simulate().expect("simulates");
    let cs = supply.humid_heat().value;
    let k_y = SURFACE.h_w_per_m2_k / (cs * SURFACE.lewis.powf(2.0 / 3.0));
    let ws = super::product::surface_humidity_ratio(tw, supply.p_pascal());
    let rc = k_y * (ws - supply.humidity_ratio());
    let (x1, x2, xc, xe): (f64, f64, f64, f64) = (1.5, 0.1, 0.6, 0.05);
    let closed = 15.0 / rc * ((x1 - xc) + (xc - xe) * ((xc - xe) / (x2 - xe)).ln());
    assert!(
        (r.batch_time_s / closed - 1.0).abs() < 5e-3,
        "{} s vs closed form {} s",
        r.batch_time_s,
        closed
    );
}

/// Balances close to 1e-6 relative with recirculation, losses and several trays.
#[test]
fn batch_balances_close() {
    let r = tray_dryer(6, 0.8, 0.6, 20.0).simulate().expect("simulates");
    assert!(r.closure.within(1e-6), "{:?}", r.closure);
    let f = r.flows;
    assert!(((f.outflows() - f.heater) / f.heater).abs() < 1e-6);
    assert!((f.water - 6.0 * 15.0 * 1.4).abs() / f.water < 0.01);
    // Specific energy can never beat the latent heat (physical limit).
    assert!(f.specific_energy_j_per_kg() > r.latent_minimum_j_per_kg);
}

/// Common practice: trays further along the air path meet cooler, wetter air and finish later.
#[test]
fn downstream_trays_dry_slower() {
    let r = tray_dryer(5, 0.5, 0.0, 20.0).simulate().expect("simulates");
    for w in r.element_times_s.windows(2) {
        assert!(w[1] > w[0], "{:?}", r.element_times_s);
    }
}

/// Recirculation saves heater energy per kg water at the cost of a longer batch (common practice).
#[test]
fn recirculation_trades_time_for_energy() {
    let open = tray_dryer(4, 1.0, 0.0, 20.0).simulate().expect("simulates");
    let closed = tray_dryer(4, 1.0, 0.8, 20.0).simulate().expect("simulates");
    assert!(closed.flows.specific_energy_j_per_kg() < open.flows.specific_energy_j_per_kg());
    assert!(closed.batch_time_s > open.batch_time_s);
}

#[test]
fn target_below_equilibrium_is_an_error() {
    let mut d = tray_dryer(1, 1.0, 0.0, 20.0);
    d.x_target_db = 0.01;
    assert!(matches!(
        d.simulate(),
        Err(DryerError::BelowEquilibrium { .. })
    ));
}

#[test]
fn infeasible_recirculation_is_an_error() {
    let d = tray_dryer(1, 1.0, 0.99, 20.0);
    assert!(matches!(
        d.simulate(),
        Err(DryerError::Invalid {
            name: "recirculated fraction",
            ..
        })
    ));
}

fn zone(length: Option<f64>, t_c: f64, flow: Flow, air_kg_s: f64, recirculated: f64) -> Zone {
    Zone {
        length_m: length,
        fresh_air: air(20.0, 0.008),
        supply_t_k: t_c + 273.15,
        dry_air_kg_per_s: air_kg_s,
        recirculated,
        flow,
        surface: SURFACE,
        loss_w_per_m_k: 2.0,
        fan: Fan {
            pressure_rise_pa: 500.0,
            efficiency: 0.6,
        },
    }
}

fn belt(zones: Vec<Zone>) -> Belt {
    Belt {
        zones,
        product: product(),
        dry_solid_kg_per_s: 0.05,
        width_m: 2.0,
        load_kg_per_m2: 15.0,
        area_per_belt_area: 1.0,
        x_in_db: 1.5,
        t_in_k: 293.15,
        x_target_db: 0.1,
        ambient_t_k: 293.15,
    }
}

/// Limiting case: one cocurrent zone with a very large air flow gives the batch time as residence time.
#[test]
fn belt_with_huge_air_flow_matches_batch() {
    let mut b = belt(vec![zone(None, 70.0, Flow::Cocurrent, 2000.0, 0.0)]);
    b.zones[0].loss_w_per_m_k = 0.0;
    let r = b.solve().expect("solves");
    let mut d = tray_dryer(1, 2000.0, 0.0, 20.0);
    d.loss_w_per_k = 0.0;
    let batch = d.simulate().expect("simulates");
    assert!(
        (r.residence_s / batch.batch_time_s - 1.0).abs() < 0.01,
        "{} vs {}",
        r.residence_s,
        batch.batch_time_s
    );
}

/// Two zones, the second countercurrent, with recirculation: balances close and the product leaves at the target.
#[test]
fn two_zone_belt_balances_close() {
    let mut b = belt(vec![
        zone(Some(10.0), 90.0, Flow::Cocurrent, 3.0, 0.5),
        zone(None, 65.0, Flow::Countercurrent, 4.0, 0.3),
    ]);
    b.dry_solid_kg_per_s = 0.03;
    b.area_per_belt_area = 5.0;
    b.load_kg_per_m2 = 10.0;
    let r = b.solve().expect("solves");
    assert!((r.x_out_db - 0.1).abs() < 1e-6, "{}", r.x_out_db);
    assert!(r.closure.within(1e-6), "{:?}", r.closure);
    assert!(r.length_m > 10.0);
    let sum: f64 = r.periods_m.iter().sum();
    assert!((sum - r.length_m).abs() < 1e-6 * r.length_m + 1e-9);
}

#[test]
fn belt_cannot_dry_with_saturated_air() {
    let mut b = belt(vec![zone(None, 30.0, Flow::Cocurrent, 0.05, 0.0)]);
    b.zones[0].fresh_air = air(30.0, 0.027);
    assert!(b.solve().is_err());
}

fn rotary() -> Rotary {
    Rotary {
        product: product(),
        dry_solid_kg_per_s: 1.0,
        x_in_db: 0.25,
        x_out_db: 0.02,
        t_solid_in_k: 293.15,
        t_solid_out_k: 353.15,
        gas_in: air(300.0, 0.02),
        t_gas_out_k: 393.15,
        diameter_m: 1.8,
        slope: 0.04,
        speed_rpm: 4.0,
        particle_diameter_m: 500e-6,
        flow: Flow::Countercurrent,
        loss_fraction: 0.05,
        ambient_t_k: 293.15,
        fan: Fan {
            pressure_rise_pa: 1500.0,
            efficiency: 0.65,
        },
    }
}

/// The rotary design balances: the gas gives up what the product takes plus the losses.
#[test]
fn rotary_energy_balance() {
    let r = rotary().design().expect("designs");
    let g = &rotary().gas_in;
    let hv = crate::engine::air::thermo::vapour_enthalpy(393.15, 0.0);
    let released = r.dry_gas_kg_per_s
        * (g.enthalpy().value - r.gas_out.enthalpy().value
            + (r.gas_out.humidity_ratio() - g.humidity_ratio()) * hv);
    assert!(((released - r.heat_to_product_w - r.loss_w) / released).abs() < 1e-6);
    assert!((r.water_kg_per_s - 0.23).abs() < 1e-12);
    assert!(r.length_m > 0.0 && r.retention_time_s > 0.0);
    assert!(r.closure.within(1e-6), "{:?}", r.closure);
    let f = r.flows;
    assert!(((f.outflows() - f.heater) / f.heater).abs() < 1e-6, "{f:?}");
    assert!(f.specific_energy_j_per_kg() > r.latent_minimum_j_per_kg);
}

/// Saturated supply air is refused up front with a message naming it, for both dryer kinds.
#[test]
fn saturated_supply_air_is_named() {
    let mut d = tray_dryer(2, 1.0, 0.0, 20.0);
    d.fresh_air = AirState::from_rh(
        ThermodynamicTemperature::new::<degree_celsius>(35.0),
        1.0,
        Pressure::new::<kilopascal>(101.325),
    )
    .expect("saturated air");
    d.supply_t_k = d.fresh_air.t_kelvin();
    match d.simulate() {
        Err(DryerError::AirSaturates { what }) => assert!(what.contains("saturated"), "{what}"),
        other => panic!("expected a saturation error, got {other:?}"),
    }
    let mut b = belt(vec![zone(None, 35.0, Flow::Cocurrent, 1.0, 0.0)]);
    b.zones[0].fresh_air = d.fresh_air;
    assert!(matches!(b.solve(), Err(DryerError::AirSaturates { .. })));
}

#[test]
fn zero_fan_efficiency_is_refused() {
    let mut b = belt(vec![zone(None, 70.0, Flow::Cocurrent, 1.0, 0.0)]);
    b.zones[0].fan.efficiency = 0.0;
    assert!(matches!(
        b.solve(),
        Err(DryerError::Invalid {
            name: "fan efficiency",
            ..
        })
    ));
}

/// A deep bed of cold wet particles under hot air: the air saturates in the first
/// layers and would leave the next ones above saturation; the fog condenses on
/// the product and the balances still close.
#[test]
fn cold_deep_bed_condenses_and_closes() {
    let layer = Element {
        area_m2: 48.0,
        dry_solid_kg: 44.0,
        surface: Surface {
            h_w_per_m2_k: 107.0,
            lewis: 0.85,
        },
    };
    let mut d = tray_dryer(10, 1.05, 0.0, 20.0);
    d.elements = vec![layer; 10];
    d.x_initial_db = 0.6;
    d.x_target_db = 0.12;
    d.supply_t_k = 333.15;
    d.loss_w_per_k = 0.0;
    let r = d.simulate().expect("simulates");
    assert!(r.closure.within(1e-6), "{:?}", r.closure);
    assert!(r.condensed_kg > 0.0, "{}", r.condensed_kg);
}

/// The rotary gas flow against the textbook hand method for a dryer heat balance
/// (Geankoplis, Transport Processes and Separation Process Principles, 4th ed.,
/// section 9.10: humid heat c_s = 1.005 + 1.88 H kJ/(kg K), latent heat 2501 kJ/kg
/// at the 0 degC reference, product enthalpy c_ps T + X c_pw T with c_pw = 4.187).
/// Case (invented numbers in the style of a textbook problem): 453.6 kg dry solid/h
/// from 0.040 to 0.002 db, solid 26.7 -> 62.8 degC, c_ps 1.465 kJ/(kg K), air in
/// at 93.3 degC and H = 0.010, out at 37.8 degC, no losses. The hand method's
/// linear properties differ from the humid-air engine by well under 1 %.
#[test]
fn rotary_gas_flow_matches_hand_heat_balance() {
    let (ls, x1, x2, ts1, ts2, cps) = (453.6, 0.040, 0.002, 26.7, 62.8, 1.465);
    let (tg_in, h_in, tg_out) = (93.3, 0.010, 37.8);
    let water = ls * (x1 - x2);
    let solid = |x: f64, t: f64| cps * t + x * 4.187 * t;
    let gas = |h: f64, t: f64| (1.005 + 1.88 * h) * t + 2501.0 * h;
    // G (H'_G,in - H'_G,out(H_out)) = Ls (H'_S,out - H'_S,in), H_out = H_in + water / G:
    // linear in G once the H_out terms are gathered.
    let per_g = gas(h_in, tg_in) - gas(h_in, tg_out);
    let fixed = (1.88 * tg_out + 2501.0) * water;
    let hand_g = (ls * (solid(x2, ts2) - solid(x1, ts1)) + fixed) / per_g;
    let mut p = product();
    p.cp_solid_j_per_kg_k = cps * 1000.0;
    p.x_critical_db = 0.0;
    p.equilibrium = Equilibrium::Constant(0.0);
    let mut r = rotary();
    r.product = p;
    r.dry_solid_kg_per_s = ls / 3600.0;
    r.x_in_db = x1;
    r.x_out_db = x2;
    r.t_solid_in_k = ts1 + 273.15;
    r.t_solid_out_k = ts2 + 273.15;
    r.gas_in = air(tg_in, h_in);
    r.t_gas_out_k = tg_out + 273.15;
    r.loss_fraction = 0.0;
    let d = r.design().expect("designs");
    let air_kg_h = d.dry_gas_kg_per_s * 3600.0;
    assert!(
        (air_kg_h / hand_g - 1.0).abs() < 0.01,
        "{air_kg_h} vs {hand_g} kg/h"
    );
    let w_hand = h_in + water / hand_g;
    assert!((d.gas_out.humidity_ratio() / w_hand - 1.0).abs() < 0.01);
    assert!(d.closure.within(1e-6), "{:?}", d.closure);
}
