//! Direct-heat rotary dryer: air flow from the energy balance, drum length from a
//! volumetric heat transfer coefficient, retention time from a flight-and-slope
//! correlation.
//!
//! - Volumetric coefficient: `Ua = 0.5 G^0.67 / D` in Btu/(h ft^3 degF) with G the
//!   gas mass velocity in lb/(h ft^2) and D the drum diameter in ft (McCormick,
//!   as given in Perry's Chemical Engineers' Handbook, section on solids drying;
//!   from memory). The US-customary form is kept and converted with the unit
//!   table, so no SI coefficient is typed by hand. Typical G 0.5-5 kg/(m^2 s).
//! - Retention time: `theta = 0.23 L / (S N^0.9 D) +/- 0.6 B L G / F` in minutes,
//!   with L and D in ft, S the slope (ft/ft), N the speed in rpm, G the gas and F
//!   the solids mass velocity in lb/(h ft^2), `B = 5 dp^-0.5` with dp in micrometres;
//!   plus for countercurrent, minus for cocurrent gas (Friedman and Marshall (1949),
//!   Chem. Eng. Prog. 45, 482-493 and 573-588, as given in Perry's; from memory).
//! - Heat transfer with one log-mean temperature difference between gas and
//!   solids over the whole drum (a simplification; zone-by-zone is more exact).

use uom::si::f64::{Area, Length, MassFlux, Time};
use uom::si::length::{foot, meter, micrometer};
use uom::si::mass_flux::kilogram_per_square_meter_second;
use uom::si::time::{minute, second};

use super::balance::{Closure, EnergyFlows};
use super::batch::{latent_minimum, Fan};
use super::continuous::Flow;
use super::product::Product;
use super::{non_negative, positive, DryerError};
use crate::engine::air::thermo::{dry_air_enthalpy, liquid_enthalpy, vapour_enthalpy};
use crate::engine::air::AirState;
use crate::engine::solve::{brent, Tolerance};

/// A rotary dryer design case.
#[derive(Clone, Debug)]
pub struct Rotary {
    pub product: Product,
    pub dry_solid_kg_per_s: f64,
    pub x_in_db: f64,
    pub x_out_db: f64,
    pub t_solid_in_k: f64,
    pub t_solid_out_k: f64,
    /// Hot gas entering (after the burner or heater).
    pub gas_in: AirState,
    /// Gas temperature leaving, K (the usual design choice).
    pub t_gas_out_k: f64,
    pub diameter_m: f64,
    pub slope: f64,
    pub speed_rpm: f64,
    pub particle_diameter_m: f64,
    pub flow: Flow,
    /// Fraction of the heat given up by the gas that is lost through the shell.
    pub loss_fraction: f64,
    /// Temperature of the air drawn into the heater, K (same humidity ratio as
    /// the hot gas: the heater is taken as sensible only).
    pub ambient_t_k: f64,
    /// Exhaust fan: pressure rise and efficiency, acting on the gas leaving.
    pub fan: Fan,
}

/// A rotary dryer design.
#[derive(Clone, Debug)]
pub struct RotaryResult {
    pub dry_gas_kg_per_s: f64,
    pub gas_out: AirState,
    /// Heat to the product (sensible and evaporation), W.
    pub heat_to_product_w: f64,
    pub loss_w: f64,
    pub gas_mass_velocity: MassFlux,
    /// Volumetric coefficient, W/(m^3 K).
    pub ua_w_per_m3_k: f64,
    pub log_mean_difference_k: f64,
    pub length_m: f64,
    pub retention_time_s: f64,
    /// Fraction of the drum volume held up by solids.
    pub holdup_fraction: f64,
    pub water_kg_per_s: f64,
    /// Heater plus fan per kg of water, J/kg.
    pub specific_energy_j_per_kg: f64,
    /// Energy flows as rates, W (heater = gas heated from the ambient intake).
    pub flows: EnergyFlows,
    pub closure: Closure,
    /// Latent heat at the gas inlet wet-bulb, J/kg.
    pub latent_minimum_j_per_kg: f64,
    pub warnings: Vec<String>,
}

fn ft(x: Length) -> f64 {
    x.get::<foot>()
}

/// Mass flux in lb/(h ft^2).
fn lb_per_h_ft2(g: MassFlux) -> f64 {
    let lb = uom::si::f64::Mass::new::<uom::si::mass::pound>(1.0).value;
    let hour = Time::new::<uom::si::time::hour>(1.0).value;
    let ft2 = Area::new::<uom::si::area::square_foot>(1.0).value;
    g.value / (lb / (hour * ft2))
}

/// McCormick's volumetric coefficient, W/(m^3 K), from G and D.
pub fn volumetric_coefficient(g: MassFlux, d: Length) -> f64 {
    let btu_per_h_ft3_f = {
        let btu = uom::si::f64::Energy::new::<uom::si::energy::btu_it>(1.0).value;
        let hour = Time::new::<uom::si::time::hour>(1.0).value;
        let ft3 = uom::si::f64::Volume::new::<uom::si::volume::cubic_foot>(1.0).value;
        let degf = uom::si::f64::TemperatureInterval::new::<
            uom::si::temperature_interval::degree_fahrenheit,
        >(1.0)
        .value;
        btu / (hour * ft3 * degf)
    };
    0.5 * lb_per_h_ft2(g).powf(0.67) / ft(d) * btu_per_h_ft3_f
}

/// What the retention-time correlation needs.
#[derive(Clone, Copy, Debug)]
pub struct Drum {
    pub length: Length,
    pub diameter: Length,
    /// Slope, length per length.
    pub slope: f64,
    pub speed_rpm: f64,
    pub particle_diameter: Length,
    /// Gas and solids mass velocities over the drum cross-section.
    pub gas: MassFlux,
    pub solids: MassFlux,
    pub flow: Flow,
}

/// Friedman-Marshall retention time.
pub fn retention_time(drum: &Drum) -> Time {
    let b = 5.0 * drum.particle_diameter.get::<micrometer>().powf(-0.5);
    let gas_term = 0.6 * b * ft(drum.length) * lb_per_h_ft2(drum.gas) / lb_per_h_ft2(drum.solids);
    let sign = if drum.flow == Flow::Countercurrent {
        1.0
    } else {
        -1.0
    };
    let minutes = 0.23 * ft(drum.length)
        / (drum.slope * drum.speed_rpm.powf(0.9) * ft(drum.diameter))
        + sign * gas_term;
    Time::new::<minute>(minutes)
}

impl Rotary {
    fn validate(&self) -> Result<(), DryerError> {
        self.product.validate()?;
        positive("solids flow", self.dry_solid_kg_per_s)?;
        positive("diameter", self.diameter_m)?;
        positive("slope", self.slope)?;
        positive("speed", self.speed_rpm)?;
        positive("particle diameter", self.particle_diameter_m)?;
        non_negative("outlet moisture", self.x_out_db)?;
        if self.x_out_db >= self.x_in_db {
            return Err(DryerError::Invalid {
                name: "outlet moisture",
                value: self.x_out_db,
                expected: "below the inlet moisture",
            });
        }
        if !(0.0..0.5).contains(&self.loss_fraction) {
            return Err(DryerError::Invalid {
                name: "loss fraction",
                value: self.loss_fraction,
                expected: "0 to 0.5",
            });
        }
        if !(self.fan.efficiency > 0.0 && self.fan.efficiency <= 1.0) {
            return Err(DryerError::Invalid {
                name: "fan efficiency",
                value: self.fan.efficiency,
                expected: "a fraction in (0, 1]",
            });
        }
        non_negative("fan pressure rise", self.fan.pressure_rise_pa)?;
        if self.ambient_t_k > self.gas_in.t_kelvin() {
            return Err(DryerError::Invalid {
                name: "ambient temperature",
                value: self.ambient_t_k,
                expected: "at or below the gas inlet temperature (the heater warms the intake air)",
            });
        }
        if self.t_gas_out_k >= self.gas_in.t_kelvin() {
            return Err(DryerError::Invalid {
                name: "gas outlet temperature",
                value: self.t_gas_out_k,
                expected: "below the gas inlet temperature",
            });
        }
        Ok(())
    }

    /// Size the drum.
    pub fn design(&self) -> Result<RotaryResult, DryerError> {
        self.validate()?;
        let water = self.dry_solid_kg_per_s * (self.x_in_db - self.x_out_db);
        let hv_out = crate::engine::air::thermo::vapour_enthalpy(self.t_gas_out_k, 0.0);
        let p = &self.product;
        let h_in = p.enthalpy_j_per_kg(self.x_in_db, self.t_solid_in_k);
        let h_out = p.enthalpy_j_per_kg(self.x_out_db, self.t_solid_out_k);
        // Heat the product takes: its enthalpy rise plus the water leaving as vapour at the gas outlet temperature.
        let to_product = self.dry_solid_kg_per_s * (h_out - h_in) + water * hv_out;
        let gas_out_for = |m: f64| -> Result<AirState, DryerError> {
            let w = self.gas_in.humidity_ratio() + water / m;
            Ok(AirState::from_w(
                uom::si::f64::ThermodynamicTemperature::new::<
                    uom::si::thermodynamic_temperature::kelvin,
                >(self.t_gas_out_k),
                w,
                self.gas_in.pressure(),
            )?)
        };
        // Gas flow: m (h_in - h_out(m)) (1 - loss) = to_product, with h_out counting the vapour at gas temperature.
        let gas_release = |m: f64| -> f64 {
            match gas_out_for(m) {
                Ok(out) => {
                    m * (self.gas_in.enthalpy().value
                        - (out.enthalpy().value
                            - (out.humidity_ratio() - self.gas_in.humidity_ratio()) * hv_out))
                }
                Err(_) => f64::NAN,
            }
        };
        let target = to_product / (1.0 - self.loss_fraction);
        let m = self.solve_gas_flow(&gas_release, target, water)?;
        let gas_out = gas_out_for(m)?;
        let loss_w = target * self.loss_fraction;
        self.geometry(m, gas_out, to_product, loss_w, water)
    }

    fn solve_gas_flow(
        &self,
        release: &dyn Fn(f64) -> f64,
        target: f64,
        water: f64,
    ) -> Result<f64, DryerError> {
        let mut lo = water / 0.5;
        while !(release(lo) - target).is_finite() {
            lo *= 1.5;
            if lo > 1e6 {
                return Err(DryerError::AirSaturates {
                    what: "no gas flow carries the water at that outlet temperature".into(),
                });
            }
        }
        let mut hi = lo * 2.0;
        while release(hi) - target < 0.0 {
            hi *= 2.0;
            if hi > 1e7 {
                return Err(DryerError::AirSaturates { what: "the gas cannot supply the heat: raise its inlet temperature or lower its outlet temperature".into() });
            }
        }
        if release(lo) - target > 0.0 {
            return Err(DryerError::AirSaturates {
                what: "the gas leaving would be above saturation at the outlet temperature: raise the outlet temperature".into(),
            });
        }
        brent(
            |m| release(m) - target,
            lo,
            hi,
            Tolerance::new(1e-12, 1e-12),
        )
        .map_err(|e| DryerError::NotConverged {
            what: "rotary gas flow",
            detail: e.to_string(),
        })
    }

    fn geometry(
        &self,
        m: f64,
        gas_out: AirState,
        to_product: f64,
        loss_w: f64,
        water: f64,
    ) -> Result<RotaryResult, DryerError> {
        let d = Length::new::<meter>(self.diameter_m);
        let section = std::f64::consts::PI * self.diameter_m.powi(2) / 4.0;
        let g = MassFlux::new::<kilogram_per_square_meter_second>(
            m * (1.0 + self.gas_in.humidity_ratio()) / section,
        );
        let f_solids = MassFlux::new::<kilogram_per_square_meter_second>(
            self.dry_solid_kg_per_s * (1.0 + self.x_in_db) / section,
        );
        let ua = volumetric_coefficient(g, d);
        let (a, b) = match self.flow {
            Flow::Countercurrent => (
                self.gas_in.t_kelvin() - self.t_solid_out_k,
                self.t_gas_out_k - self.t_solid_in_k,
            ),
            Flow::Cocurrent => (
                self.gas_in.t_kelvin() - self.t_solid_in_k,
                self.t_gas_out_k - self.t_solid_out_k,
            ),
        };
        if a <= 0.0 || b <= 0.0 {
            return Err(DryerError::Invalid {
                name: "temperatures",
                value: a.min(b),
                expected: "gas hotter than the solids at both ends",
            });
        }
        let lmtd = if (a - b).abs() < 1e-9 {
            a
        } else {
            (a - b) / (a / b).ln()
        };
        let volume = to_product / (ua * lmtd);
        let length = volume / section;
        let theta = retention_time(&Drum {
            length: Length::new::<meter>(length),
            diameter: d,
            slope: self.slope,
            speed_rpm: self.speed_rpm,
            particle_diameter: Length::new::<meter>(self.particle_diameter_m),
            gas: g,
            solids: f_solids,
            flow: self.flow,
        });
        let mut warnings = Vec::new();
        let gv = g.get::<kilogram_per_square_meter_second>();
        if !(0.5..=5.0).contains(&gv) {
            warnings.push(format!("gas mass velocity {gv:.2} kg/(m^2 s) is outside the usual 0.5-5 kg/(m^2 s) of the Ua correlation (common practice): check dust carry-over and the drum diameter"));
        }
        let theta_s = theta.get::<second>();
        if theta_s <= 0.0 {
            return Err(DryerError::Invalid { name: "retention time", value: theta_s, expected: "positive: the gas velocity carries the solids through; use a larger drum or less gas" });
        }
        let holdup_volume = self.dry_solid_kg_per_s * (1.0 + self.x_in_db) * theta_s / 1000.0;
        let holdup_fraction = holdup_volume / volume;
        if !(0.03..=0.15).contains(&holdup_fraction) {
            warnings.push(format!("solids holdup {:.1} % of the drum volume (assuming a bulk density of 1000 kg/m^3) is outside the usual 3-15 % (common practice)", holdup_fraction * 100.0));
        }
        let (flows, closure) = self.balance(m, &gas_out, water, loss_w)?;
        self.check_temperatures(&gas_out, &mut warnings);
        Ok(RotaryResult {
            dry_gas_kg_per_s: m,
            gas_out,
            heat_to_product_w: to_product,
            loss_w,
            gas_mass_velocity: g,
            ua_w_per_m3_k: ua,
            log_mean_difference_k: lmtd,
            length_m: length,
            retention_time_s: theta_s,
            holdup_fraction,
            water_kg_per_s: water,
            specific_energy_j_per_kg: flows.specific_energy_j_per_kg(),
            flows,
            closure,
            latent_minimum_j_per_kg: latent_minimum(&self.gas_in)?,
            warnings,
        })
    }

    /// Energy flows and closure. The heater warms intake air at the ambient
    /// temperature (same humidity ratio) to the gas inlet state; the water
    /// evaporates at the gas inlet wet-bulb (the constant-rate surface) and
    /// leaves as vapour at the gas outlet temperature.
    fn balance(
        &self,
        m: f64,
        gas_out: &AirState,
        water: f64,
        loss_w: f64,
    ) -> Result<(EnergyFlows, Closure), DryerError> {
        let w_in = self.gas_in.humidity_ratio();
        let h_at_out =
            AirState::from_w(
                uom::si::f64::ThermodynamicTemperature::new::<
                    uom::si::thermodynamic_temperature::kelvin,
                >(self.t_gas_out_k),
                w_in,
                self.gas_in.pressure(),
            )?
            .enthalpy()
            .value;
        // Intake: the inlet gas's dry air and vapour cooled to ambient as ideal gases (direct-fired
        // gas may hold more water than ambient air could, so no humid-air state is formed).
        let sensible = |t: f64| dry_air_enthalpy(t) + w_in * vapour_enthalpy(t, 0.0);
        let h_intake = h_at_out - (sensible(self.t_gas_out_k) - sensible(self.ambient_t_k));
        let t_ev = self.gas_in.wet_bulb()?.value;
        let hv_ev = vapour_enthalpy(t_ev, 0.0);
        let ms = self.dry_solid_kg_per_s;
        let pr = &self.product;
        let d_product = ms
            * (pr.enthalpy_j_per_kg(self.x_out_db, self.t_solid_out_k)
                - pr.enthalpy_j_per_kg(self.x_in_db, self.t_solid_in_k));
        let fan_volume = m * gas_out.humid_volume().value;
        let flows = EnergyFlows {
            heater: m * (self.gas_in.enthalpy().value - h_intake),
            fan: self.fan.pressure_rise_pa * fan_volume / self.fan.efficiency,
            exhaust_air_sensible: m * (h_at_out - h_intake),
            evaporation: water * (hv_ev - liquid_enthalpy(t_ev)),
            vapour_superheat: m * (gas_out.enthalpy().value - h_at_out) - water * hv_ev,
            product_sensible: d_product + water * liquid_enthalpy(t_ev),
            losses: loss_w,
            water,
        };
        let out = m * (gas_out.enthalpy().value - h_intake) + d_product + loss_w;
        let closure = Closure {
            water_relative: (water - m * (gas_out.humidity_ratio() - w_in)) / water,
            energy_relative: (flows.heater - out) / flows.heater,
        };
        Ok((flows, closure))
    }

    fn check_temperatures(&self, gas_out: &AirState, warnings: &mut Vec<String>) {
        if let Some(t_max) = self.product.t_max_k {
            if self.t_solid_out_k > t_max {
                warnings.push(format!(
                    "the solids leave at {:.1} degC, above the product's maximum of {:.1} degC: lower the gas temperatures",
                    self.t_solid_out_k - 273.15,
                    t_max - 273.15
                ));
            }
        }
        let rh = gas_out.relative_humidity();
        if rh > 0.9 {
            warnings.push(format!(
                "the exhaust gas leaves at {:.0} % relative humidity: it will condense in cooler ducts and the dust collector (common practice: keep exhaust well above its dew point)",
                rh * 100.0
            ));
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// McCormick's coefficient in SI: the literature quotes the SI form as
    /// Ua = 237 G^0.67 / D with G in kg/(m^2 s), D in m, Ua in W/(m^3 K)
    /// (Geankoplis, Transport Processes and Separation Process Principles, 4th ed.,
    /// section 9.10; from memory). Our conversion from the US form must agree.
    #[test]
    fn ua_matches_si_form_from_memory() {
        for (g, d) in [(1.0, 1.0), (2.5, 1.5), (4.0, 2.0)] {
            let ua = volumetric_coefficient(
                MassFlux::new::<kilogram_per_square_meter_second>(g),
                Length::new::<meter>(d),
            );
            let si = 237.0 * g.powf(0.67) / d;
            assert!((ua / si - 1.0).abs() < 0.01, "g {g} d {d}: {ua} vs {si}");
        }
    }
}
