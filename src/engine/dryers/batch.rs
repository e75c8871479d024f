//! Batch dryers: air crossing stacked trays in a tray or truck dryer, and air
//! through the layers of a through-circulation deep bed.
//!
//! Both are a path of elements that the air crosses in series. In each time
//! step the supply air (fresh air mixed with the recirculated part of the
//! exhaust, then heated to the supply temperature) crosses every element in
//! turn; each element exchanges heat and water with it ([`exchange`]) and its
//! moisture and enthalpy move by explicit steps limited to a fraction of the
//! element's thermal time constant. The recirculation loop is solved within
//! each step, so the balances close to round-off.

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::{AvailableEnergy, ThermodynamicTemperature};
use uom::si::thermodynamic_temperature::kelvin;

use super::balance::{exhaust_at_fresh_w, Closure, EnergyFlows, Ledger};
use super::product::{exchange, surface_humidity_ratio, Product, Surface};
use super::{check_drying_air, non_negative, positive, settle_recirculation, DryerError};
use crate::engine::air::AirState;

/// One element on the air path: a tray, or a layer of a bed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Element {
    /// Product surface exchanging with the air, m^2.
    pub area_m2: f64,
    /// Dry solid on the element, kg.
    pub dry_solid_kg: f64,
    pub surface: Surface,
}

/// Fan: pressure rise and efficiency.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Fan {
    pub pressure_rise_pa: f64,
    /// Overall fan and motor efficiency, 0..1.
    pub efficiency: f64,
}

/// A batch dryer to simulate.
#[derive(Clone, Debug)]
pub struct BatchDryer {
    /// Elements in the order the air meets them.
    pub elements: Vec<Element>,
    pub product: Product,
    pub x_initial_db: f64,
    pub x_target_db: f64,
    pub t_product_initial_k: f64,
    /// Fresh air drawn in.
    pub fresh_air: AirState,
    /// Air temperature after the heater, K.
    pub supply_t_k: f64,
    /// Dry air flowing along the path, kg/s.
    pub dry_air_kg_per_s: f64,
    /// Fraction of the exhaust returned to the heater, 0..0.95.
    pub recirculated: f64,
    /// Wall loss conductance, W/K, against `ambient_t_k`.
    pub loss_w_per_k: f64,
    pub ambient_t_k: f64,
    pub fan: Fan,
    /// Give up after this long, s.
    pub max_time_s: f64,
}

/// The state of the dryer at one time.
#[derive(Clone, Debug)]
pub struct BatchSample {
    pub t_s: f64,
    pub supply: AirState,
    pub exhaust: AirState,
    pub x_db: Vec<f64>,
    pub t_product_k: Vec<f64>,
}

/// What a batch simulation gives.
#[derive(Clone, Debug)]
pub struct BatchResult {
    /// Time for each element to reach the target, s, in path order.
    pub element_times_s: Vec<f64>,
    /// Time for the whole load, s.
    pub batch_time_s: f64,
    /// Samples for plots and tables (about 200).
    pub history: Vec<BatchSample>,
    /// Energy totals over the batch, J.
    pub flows: EnergyFlows,
    pub closure: Closure,
    /// Latent heat of the water at the supply air's wet-bulb, J/kg: the least
    /// energy per kg of water a convective dryer without heat recovery can use.
    pub latent_minimum_j_per_kg: f64,
    /// Water that condensed from the air onto cold elements over the batch, kg
    /// (fog in a cold deep bed), included in the balances.
    pub condensed_kg: f64,
    pub warnings: Vec<String>,
}

impl BatchDryer {
    fn validate(&self) -> Result<(), DryerError> {
        if self.elements.is_empty() {
            return Err(DryerError::Invalid {
                name: "elements",
                value: 0.0,
                expected: "at least one tray or layer",
            });
        }
        for e in &self.elements {
            positive("area", e.area_m2)?;
            positive("dry solid", e.dry_solid_kg)?;
            positive("heat transfer coefficient", e.surface.h_w_per_m2_k)?;
            positive("Lewis number", e.surface.lewis)?;
        }
        self.product.validate()?;
        positive("initial moisture", self.x_initial_db)?;
        non_negative("target moisture", self.x_target_db)?;
        if self.x_target_db >= self.x_initial_db {
            return Err(DryerError::Invalid {
                name: "target moisture",
                value: self.x_target_db,
                expected: "below the initial moisture",
            });
        }
        positive("air flow", self.dry_air_kg_per_s)?;
        if !(0.0..=0.95).contains(&self.recirculated) {
            return Err(DryerError::Invalid {
                name: "recirculated fraction",
                value: self.recirculated,
                expected: "0 to 0.95 of the exhaust",
            });
        }
        non_negative("wall loss conductance", self.loss_w_per_k)?;
        non_negative("fan pressure rise", self.fan.pressure_rise_pa)?;
        if !(self.fan.efficiency > 0.0 && self.fan.efficiency <= 1.0) {
            return Err(DryerError::Invalid {
                name: "fan efficiency",
                value: self.fan.efficiency,
                expected: "a fraction in (0, 1]",
            });
        }
        positive("maximum time", self.max_time_s)?;
        if self.supply_t_k < self.fresh_air.t_kelvin() {
            return Err(DryerError::Invalid {
                name: "supply temperature",
                value: self.supply_t_k,
                expected: "at or above the fresh-air temperature",
            });
        }
        Ok(())
    }

    /// Air after the heater for an intake of humidity `w` (sensible heating only).
    fn heated(&self, w: f64) -> Result<AirState, DryerError> {
        Ok(AirState::from_w(
            ThermodynamicTemperature::new::<kelvin>(self.supply_t_k),
            w,
            self.fresh_air.pressure(),
        )?)
    }

    /// Simulate the batch until every element reaches the target moisture.
    pub fn simulate(&self) -> Result<BatchResult, DryerError> {
        self.validate()?;
        let first_supply = self.heated(self.fresh_air.humidity_ratio())?;
        check_drying_air(&first_supply, self.elements[0].surface.lewis)?;
        let x_eq = self.product.equilibrium_db(&first_supply);
        if self.x_target_db <= x_eq {
            return Err(DryerError::BelowEquilibrium {
                target_db: self.x_target_db,
                equilibrium_db: x_eq,
            });
        }
        Run::new(self, first_supply)?.run()
    }
}

/// Mutable state of one simulation.
struct Run<'a> {
    d: &'a BatchDryer,
    x: Vec<f64>,
    t_p: Vec<f64>,
    h_p: Vec<f64>,
    done_at: Vec<Option<f64>>,
    exhaust: AirState,
    ledger: Ledger,
    history: Vec<BatchSample>,
    warnings: Vec<String>,
    t_max_seen: f64,
    condensed_kg: f64,
}

/// One pass of the air along the path.
struct Pass {
    supply: AirState,
    mixed_h: f64,
    exhaust: AirState,
    loss_w: f64,
    /// Water condensing from the air onto cold elements, kg/s.
    condensed: f64,
    /// Per element: (water kg/s, net enthalpy into product W, latent J/kg, liquid J/kg).
    elements: Vec<(f64, f64, f64, f64)>,
}

impl<'a> Run<'a> {
    fn new(d: &'a BatchDryer, supply: AirState) -> Result<Run<'a>, DryerError> {
        let n = d.elements.len();
        let h0 = d
            .product
            .enthalpy_j_per_kg(d.x_initial_db, d.t_product_initial_k);
        Ok(Run {
            d,
            x: vec![d.x_initial_db; n],
            t_p: vec![d.t_product_initial_k; n],
            h_p: vec![h0; n],
            done_at: vec![None; n],
            exhaust: supply,
            ledger: Ledger::default(),
            history: Vec::new(),
            warnings: Vec::new(),
            t_max_seen: d.t_product_initial_k,
            condensed_kg: 0.0,
        })
    }

    /// Mix fresh air with recirculated exhaust (per kg dry air of supply).
    fn mixed(&self, exhaust: &AirState) -> (f64, f64) {
        let r = self.d.recirculated;
        let f = &self.d.fresh_air;
        let h = (1.0 - r) * f.enthalpy().value + r * exhaust.enthalpy().value;
        let w = (1.0 - r) * f.humidity_ratio() + r * exhaust.humidity_ratio();
        (h, w)
    }

    /// Send the air along the path once, with the recirculation loop closed.
    fn pass(&self) -> Result<Pass, DryerError> {
        settle_recirculation(self.exhaust, self.d.recirculated, |guess| {
            let p = self.pass_with(guess)?;
            let exhaust = p.exhaust;
            Ok((p, exhaust))
        })
    }

    fn pass_with(&self, exhaust_guess: &AirState) -> Result<Pass, DryerError> {
        let d = self.d;
        let (mixed_h, mixed_w) = self.mixed(exhaust_guess);
        let supply = d.heated(mixed_w)?;
        if supply.enthalpy().value < mixed_h - 1e-9 {
            return Err(DryerError::Invalid {
                name: "supply temperature",
                value: d.supply_t_k,
                expected: "above the mixed intake air (the heater cannot cool)",
            });
        }
        let mut air = supply;
        let mut condensed = 0.0;
        let mut elements = Vec::with_capacity(d.elements.len());
        for (i, el) in d.elements.iter().enumerate() {
            let ex = exchange(
                &d.product,
                self.x[i],
                self.t_p[i],
                &air,
                d.dry_air_kg_per_s,
                el.area_m2,
                el.surface,
            )?;
            let net = ex.heat_w - ex.water_kg_per_s * ex.vapour_j_per_kg;
            elements.push((
                ex.water_kg_per_s,
                net,
                ex.latent_j_per_kg,
                ex.vapour_j_per_kg - ex.latent_j_per_kg,
            ));
            air = ex.air_out;
            condensed += ex.condensed_kg_per_s;
        }
        let loss_w = d.loss_w_per_k * (air.t_kelvin() - d.ambient_t_k);
        let h_after = air.enthalpy().value - loss_w / d.dry_air_kg_per_s;
        let exhaust = AirState::from_enthalpy_and_w(
            AvailableEnergy::new::<joule_per_kilogram>(h_after),
            air.humidity_ratio(),
            air.pressure(),
        )?;
        Ok(Pass {
            supply,
            mixed_h,
            exhaust,
            loss_w,
            condensed,
            elements,
        })
    }

    /// Largest stable time step: a fifth of the fastest element time constant,
    /// and no more than 0.5 % of the moisture span on any element.
    fn time_step(&self, pass: &Pass) -> f64 {
        let d = self.d;
        let span = d.x_initial_db - d.x_target_db;
        let mut dt = d.max_time_s / 200.0;
        for (i, el) in d.elements.iter().enumerate() {
            let (water, ..) = pass.elements[i];
            let p = pass.supply.p_pascal();
            let dws = (surface_humidity_ratio(self.t_p[i] + 0.5, p)
                - surface_humidity_ratio(self.t_p[i] - 0.5, p))
            .max(0.0);
            let cs = pass.supply.humid_heat().value;
            // How fast the element's net heat gain changes with its temperature: the
            // air-side effectiveness (1 - exp(-NTU)) caps it at m c_s when the
            // element is deep (through-circulation layers), h A when it is thin.
            let m = d.dry_air_kg_per_s;
            let ha = el.surface.h_w_per_m2_k * el.area_m2;
            let ntu_h = ha / (m * cs);
            let ntu_m = ntu_h / el.surface.lewis.powf(2.0 / 3.0);
            let conductance = m * cs * -(-ntu_h).exp_m1() + 2.5e6 * dws * m * -(-ntu_m).exp_m1();
            let capacity = el.dry_solid_kg * (d.product.cp_solid_j_per_kg_k + 4186.0 * self.x[i]);
            dt = dt.min(0.2 * capacity / conductance);
            if water > 0.0 {
                dt = dt.min(0.005 * span * el.dry_solid_kg / water);
            }
        }
        dt
    }

    fn run(mut self) -> Result<BatchResult, DryerError> {
        let d = self.d;
        let mut t = 0.0;
        let mut next_sample = 0.0;
        let sample_every = d.max_time_s / 2000.0;
        let start_h: f64 = self
            .h_p
            .iter()
            .zip(&d.elements)
            .map(|(h, e)| h * e.dry_solid_kg)
            .sum();
        let start_water: f64 = self
            .x
            .iter()
            .zip(&d.elements)
            .map(|(x, e)| x * e.dry_solid_kg)
            .sum();
        let latent_minimum = latent_minimum(&self.heated_supply()?)?;
        loop {
            let pass = self.pass()?;
            if t >= next_sample || self.all_done() {
                self.sample(t, &pass);
                next_sample = t + sample_every;
            }
            if self.all_done() {
                break;
            }
            if t > d.max_time_s {
                return Err(self.too_slow());
            }
            let dt = self.time_step(&pass);
            self.advance(&pass, t, dt)?;
            t += dt;
        }
        let end_h: f64 = self
            .h_p
            .iter()
            .zip(&d.elements)
            .map(|(h, e)| h * e.dry_solid_kg)
            .sum();
        let end_water: f64 = self
            .x
            .iter()
            .zip(&d.elements)
            .map(|(x, e)| x * e.dry_solid_kg)
            .sum();
        let (mut flows, closure) = self.ledger.close(end_h - start_h, start_water - end_water);
        flows.fan = self.fan_work(t);
        self.check_temperatures();
        let element_times_s: Vec<f64> = self.done_at.iter().map(|o| o.unwrap_or(t)).collect();
        let batch_time_s = element_times_s.iter().cloned().fold(0.0, f64::max);
        Ok(BatchResult {
            element_times_s,
            batch_time_s,
            history: self.history,
            flows,
            closure,
            latent_minimum_j_per_kg: latent_minimum,
            condensed_kg: self.condensed_kg,
            warnings: self.warnings,
        })
    }

    fn heated_supply(&self) -> Result<AirState, DryerError> {
        self.d.heated(self.d.fresh_air.humidity_ratio())
    }

    fn all_done(&self) -> bool {
        self.done_at.iter().all(Option::is_some)
    }

    fn too_slow(&self) -> DryerError {
        let worst = self.x.iter().cloned().fold(f64::MIN, f64::max);
        DryerError::NotConverged {
            what: "batch drying",
            detail: format!(
                "after {:.1} h the wettest element is still at {worst:.4} db (target {:.4} db); raise the air temperature or flow, or allow a longer time",
                self.d.max_time_s / 3600.0,
                self.d.x_target_db
            ),
        }
    }

    /// Move every element and the ledger forward by `dt`.
    fn advance(&mut self, pass: &Pass, t: f64, dt: f64) -> Result<(), DryerError> {
        let d = self.d;
        let m = d.dry_air_kg_per_s;
        let purge = m * (1.0 - d.recirculated) * dt;
        let fresh = (d.fresh_air.enthalpy().value, d.fresh_air.humidity_ratio());
        let ex = (pass.exhaust.enthalpy().value, pass.exhaust.humidity_ratio());
        let ex_at_fresh_w = exhaust_at_fresh_w(&pass.exhaust, fresh.1);
        self.ledger.book_exhaust(purge, fresh, ex, ex_at_fresh_w);
        self.ledger.flows.heater += m * (pass.supply.enthalpy().value - pass.mixed_h) * dt;
        self.ledger.flows.losses += pass.loss_w * dt;
        self.condensed_kg += pass.condensed * dt;
        for (i, el) in d.elements.iter().enumerate() {
            let (water, net, latent, liquid) = pass.elements[i];
            self.ledger.book_evaporation(water * dt, latent, liquid);
            let x_new = self.x[i] - water * dt / el.dry_solid_kg;
            if self.done_at[i].is_none() && x_new <= d.x_target_db {
                let frac = (self.x[i] - d.x_target_db) / (self.x[i] - x_new);
                self.done_at[i] = Some(t + frac * dt);
            }
            self.h_p[i] += net * dt / el.dry_solid_kg;
            self.t_p[i] = d.product.temperature_k(x_new, self.h_p[i], self.t_p[i])?;
            self.x[i] = x_new;
            self.t_max_seen = self.t_max_seen.max(self.t_p[i]);
        }
        Ok(())
    }

    fn sample(&mut self, t: f64, pass: &Pass) {
        self.history.push(BatchSample {
            t_s: t,
            supply: pass.supply,
            exhaust: pass.exhaust,
            x_db: self.x.clone(),
            t_product_k: self.t_p.clone(),
        });
    }

    fn fan_work(&self, t: f64) -> f64 {
        let fan = self.d.fan;
        let v = self.d.dry_air_kg_per_s
            * self
                .heated_supply()
                .map(|s| s.humid_volume().value)
                .unwrap_or(0.0);
        fan.pressure_rise_pa * v / fan.efficiency * t
    }

    fn check_temperatures(&mut self) {
        if let Some(t_max) = self.d.product.t_max_k {
            if self.t_max_seen > t_max {
                self.warnings.push(format!(
                    "the product reaches {:.1} degC, above its maximum of {:.1} degC: lower the air temperature or end the batch earlier",
                    self.t_max_seen - 273.15,
                    t_max - 273.15
                ));
            }
        }
        if self.condensed_kg > 1e-3 * self.ledger.flows.water.abs().max(1e-9) {
            self.warnings.push(format!(
                "{:.3} kg of water condenses from the air onto cold product further along the air path (fog): warm the load first or use more or hotter air",
                self.condensed_kg
            ));
        }
        let near = self
            .history
            .iter()
            .map(|s| s.exhaust.relative_humidity())
            .fold(0.0, f64::max);
        if near > 0.9 {
            self.warnings.push(format!(
                "the exhaust reaches {:.0} % relative humidity: it will condense in cooler ducts (common practice: keep exhaust well above its dew point)",
                near * 100.0
            ));
        }
    }
}

/// Latent heat of water at the wet-bulb of `supply`, J/kg.
pub fn latent_minimum(supply: &AirState) -> Result<f64, DryerError> {
    let twb = supply.wet_bulb()?;
    Ok(crate::engine::air::latent_heat_vaporization(twb).value)
}
