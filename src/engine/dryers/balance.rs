//! Mass and energy balances of a dryer and the table of energy flows.
//!
//! Energies are totals over a batch (J) or rates for a continuous dryer (W);
//! the same struct serves both, with `per` saying which.

use crate::engine::air::thermo::vapour_enthalpy;
use crate::engine::air::AirState;

/// Where the heater's energy went, in the same unit as `heater` (J or W).
///
/// `heater = exhaust_air_sensible + evaporation + vapour_superheat
///           + product_sensible + losses` up to the closure residual.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct EnergyFlows {
    /// Heat added by the heaters.
    pub heater: f64,
    /// Fan shaft work (reported separately; not added to the air).
    pub fan: f64,
    /// Heating the fresh air (dry air and the vapour it brought) from its
    /// intake temperature to the exhaust temperature.
    pub exhaust_air_sensible: f64,
    /// Latent heat of the water evaporated, at the product temperature.
    pub evaporation: f64,
    /// Heating the evaporated water as vapour from the product temperature to the
    /// exhaust temperature (with the liquid-water enthalpy it left with).
    pub vapour_superheat: f64,
    /// Sensible heat taken up by the product (dry solid and the water it keeps).
    pub product_sensible: f64,
    /// Heat lost through walls.
    pub losses: f64,
    /// Water evaporated (kg, or kg/s).
    pub water: f64,
}

impl EnergyFlows {
    /// Sum of the places the energy went.
    pub fn outflows(&self) -> f64 {
        self.exhaust_air_sensible
            + self.evaporation
            + self.vapour_superheat
            + self.product_sensible
            + self.losses
    }

    /// Specific energy: heater plus fan per kg of water, J/kg.
    pub fn specific_energy_j_per_kg(&self) -> f64 {
        (self.heater + self.fan) / self.water
    }

    /// Thermal efficiency: latent heat of the water evaporated over heater energy.
    pub fn thermal_efficiency(&self) -> f64 {
        self.evaporation / self.heater
    }

    /// Rows for a table: (flow, amount, share of the heater).
    pub fn rows(&self) -> Vec<(&'static str, f64)> {
        vec![
            ("heater (in)", self.heater),
            ("fan work (in)", self.fan),
            ("exhaust air sensible", self.exhaust_air_sensible),
            ("evaporation (latent)", self.evaporation),
            ("vapour superheat", self.vapour_superheat),
            ("product sensible", self.product_sensible),
            ("wall losses", self.losses),
        ]
    }
}

/// Enthalpy per kg dry air of `exhaust` with the fresh air's humidity ratio `w_fresh`:
/// the reference that splits the exhaust into "air sensible" and "vapour". When
/// the exhaust is colder than the fresh air's dew point that state does not
/// exist as humid air, and the water above `w_fresh` is taken out as vapour at
/// the exhaust temperature instead.
pub(crate) fn exhaust_at_fresh_w(exhaust: &AirState, w_fresh: f64) -> f64 {
    AirState::from_w(exhaust.temperature(), w_fresh, exhaust.pressure())
        .map(|s| s.enthalpy().value)
        .unwrap_or_else(|_| {
            exhaust.enthalpy().value
                - (exhaust.humidity_ratio() - w_fresh) * vapour_enthalpy(exhaust.t_kelvin(), 0.0)
        })
}

/// How well a balance closes.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Closure {
    /// Water: (removed from product - carried out by air) / removed from product.
    pub water_relative: f64,
    /// Energy: (heater + enthalpy in - enthalpy out - losses - product change) / heater.
    pub energy_relative: f64,
}

impl Closure {
    /// True when both residuals are within `tol` relative.
    pub fn within(&self, tol: f64) -> bool {
        self.water_relative.abs() <= tol && self.energy_relative.abs() <= tol
    }
}

/// Running sums for an energy-flow table.
#[derive(Clone, Copy, Debug, Default)]
pub(crate) struct Ledger {
    pub flows: EnergyFlows,
    /// Exhaust enthalpy minus fresh-air enthalpy carried out.
    pub air_out_minus_in: f64,
    /// Water carried out by the exhaust above what the fresh air brought.
    pub water_by_air: f64,
}

impl Ledger {
    /// Book the exhaust leaving against the fresh air that came in, each per kg dry air,
    /// for `dry_air` kg (or kg/s) of purged air.
    pub fn book_exhaust(
        &mut self,
        dry_air: f64,
        fresh: (f64, f64),
        exhaust: (f64, f64),
        exhaust_at_fresh_w: f64,
    ) {
        let (h_f, w_f) = fresh;
        let (h_e, w_e) = exhaust;
        self.air_out_minus_in += dry_air * (h_e - h_f);
        self.water_by_air += dry_air * (w_e - w_f);
        self.flows.exhaust_air_sensible += dry_air * (exhaust_at_fresh_w - h_f);
    }

    /// Book water `e` leaving the product (kg or kg/s) with its latent heat and liquid enthalpy.
    pub fn book_evaporation(&mut self, e: f64, latent: f64, liquid: f64) {
        self.flows.evaporation += e * latent;
        self.flows.water += e;
        // Provisional: product_sensible gets + e * liquid (the liquid enthalpy the water left with).
        self.flows.product_sensible += e * liquid;
    }

    /// Close the ledger: `product_change` is the change of product enthalpy,
    /// `water_removed` the change of product water; returns the flows and the closure.
    pub fn close(mut self, product_change: f64, water_removed: f64) -> (EnergyFlows, Closure) {
        let f = &mut self.flows;
        f.product_sensible += product_change;
        // What the evaporated water carries out as vapour beyond its latent heat and liquid enthalpy.
        let vapour_carried = self.air_out_minus_in - f.exhaust_air_sensible;
        f.vapour_superheat = vapour_carried - f.evaporation - (f.product_sensible - product_change);
        let out = self.air_out_minus_in + product_change + f.losses;
        let closure = Closure {
            water_relative: (water_removed - self.water_by_air)
                / water_removed.abs().max(f64::MIN_POSITIVE),
            energy_relative: (f.heater - out) / f.heater.abs().max(f64::MIN_POSITIVE),
        };
        (self.flows, closure)
    }
}
