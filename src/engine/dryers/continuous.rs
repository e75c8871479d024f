//! Continuous belt and tunnel dryers: product moving along the length, air
//! flowing with it (cocurrent) or against it (countercurrent), in one or more
//! zones each with its own air, heater, recirculation and fan.
//!
//! Each zone is cut into segments. In a cocurrent zone the product and the air
//! march together from the zone inlet. In a countercurrent zone the air profile
//! is found by successive sweeps (product forward with the last air profile,
//! air backward with the new product profile) until it stops changing; the
//! two-point boundary problem is thereby solved without guessing the exhaust.
//! When the last zone has no length, its length is found by Brent's method so
//! that the product leaves at the target moisture.

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::{AvailableEnergy, ThermodynamicTemperature};
use uom::si::thermodynamic_temperature::kelvin;

use super::balance::{exhaust_at_fresh_w, Closure, EnergyFlows, Ledger};
use super::batch::{latent_minimum, Fan};
use super::product::{exchange, Exchange, Product, Surface};
use super::{check_drying_air, non_negative, positive, settle_recirculation, DryerError};
use crate::engine::air::AirState;
use crate::engine::solve::{brent, Tolerance};

/// Direction of the air relative to the product.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Flow {
    Cocurrent,
    Countercurrent,
}

/// One zone of a belt or tunnel.
#[derive(Clone, Debug)]
pub struct Zone {
    /// Length, m; `None` on the last zone to solve for the target moisture.
    pub length_m: Option<f64>,
    pub fresh_air: AirState,
    /// Air temperature after the zone heater, K.
    pub supply_t_k: f64,
    pub dry_air_kg_per_s: f64,
    /// Fraction of the zone exhaust returned to its heater, 0..0.95.
    pub recirculated: f64,
    pub flow: Flow,
    pub surface: Surface,
    /// Wall loss conductance per metre of zone, W/(m K).
    pub loss_w_per_m_k: f64,
    pub fan: Fan,
}

impl Zone {
    /// Check the zone's own inputs (lengths, flows, fractions, fan, supply air).
    pub fn validate(&self) -> Result<(), DryerError> {
        if let Some(l) = self.length_m {
            positive("zone length", l)?;
        }
        positive("zone air flow", self.dry_air_kg_per_s)?;
        if !(0.0..=0.95).contains(&self.recirculated) {
            return Err(DryerError::Invalid {
                name: "recirculated fraction",
                value: self.recirculated,
                expected: "0 to 0.95 of the zone exhaust",
            });
        }
        positive("heat transfer coefficient", self.surface.h_w_per_m2_k)?;
        positive("Lewis number", self.surface.lewis)?;
        non_negative("wall loss", self.loss_w_per_m_k)?;
        non_negative("fan pressure rise", self.fan.pressure_rise_pa)?;
        if !(self.fan.efficiency > 0.0 && self.fan.efficiency <= 1.0) {
            return Err(DryerError::Invalid {
                name: "fan efficiency",
                value: self.fan.efficiency,
                expected: "a fraction in (0, 1]",
            });
        }
        if self.supply_t_k < self.fresh_air.t_kelvin() {
            return Err(DryerError::Invalid {
                name: "supply temperature",
                value: self.supply_t_k,
                expected: "at or above the zone's fresh air",
            });
        }
        check_drying_air(
            &heated(self, self.fresh_air.humidity_ratio())?,
            self.surface.lewis,
        )
    }
}

/// A continuous dryer.
#[derive(Clone, Debug)]
pub struct Belt {
    pub zones: Vec<Zone>,
    pub product: Product,
    /// Dry solid throughput, kg/s.
    pub dry_solid_kg_per_s: f64,
    pub width_m: f64,
    /// Dry solid per m^2 of belt, kg/m^2.
    pub load_kg_per_m2: f64,
    /// Exchange area per m^2 of belt (1 for air over a flat layer).
    pub area_per_belt_area: f64,
    pub x_in_db: f64,
    pub t_in_k: f64,
    pub x_target_db: f64,
    pub ambient_t_k: f64,
}

/// A point of the profile along the dryer.
#[derive(Clone, Copy, Debug)]
pub struct ProfilePoint {
    pub z_m: f64,
    pub zone: usize,
    pub x_db: f64,
    pub t_product_k: f64,
    pub air: AirState,
}

/// What one zone did.
#[derive(Clone, Debug)]
pub struct ZoneResult {
    pub length_m: f64,
    pub residence_s: f64,
    pub supply: AirState,
    pub exhaust: AirState,
    pub heater_w: f64,
    pub fan_w: f64,
}

/// The result of a continuous-dryer calculation. Energies are rates, W.
#[derive(Clone, Debug)]
pub struct BeltResult {
    pub zones: Vec<ZoneResult>,
    pub length_m: f64,
    pub belt_speed_m_per_s: f64,
    pub residence_s: f64,
    pub x_out_db: f64,
    pub t_out_k: f64,
    pub profile: Vec<ProfilePoint>,
    /// Lengths of the preheat, constant-rate and falling-rate periods, m.
    pub periods_m: [f64; 3],
    pub flows: EnergyFlows,
    pub closure: Closure,
    pub latent_minimum_j_per_kg: f64,
    pub warnings: Vec<String>,
}

/// Segments per zone, at least.
const MIN_SEGMENTS: usize = 200;

/// One converged zone run.
struct ZoneRun {
    supply: AirState,
    mixed_h: f64,
    exhaust: AirState,
    /// Product state at segment boundaries (x, t, h per kg dry solid), n + 1 entries.
    product: Vec<(f64, f64, f64)>,
    /// Air at segment boundaries in z order, n + 1 entries.
    air: Vec<AirState>,
    /// Exchange in each segment.
    exchanges: Vec<Exchange>,
    loss_w: f64,
}

impl Belt {
    fn validate(&self) -> Result<(), DryerError> {
        if self.zones.is_empty() {
            return Err(DryerError::Invalid {
                name: "zones",
                value: 0.0,
                expected: "at least one zone",
            });
        }
        self.product.validate()?;
        positive("throughput", self.dry_solid_kg_per_s)?;
        positive("belt width", self.width_m)?;
        positive("belt load", self.load_kg_per_m2)?;
        positive("exchange area per belt area", self.area_per_belt_area)?;
        positive("inlet moisture", self.x_in_db)?;
        non_negative("target moisture", self.x_target_db)?;
        if self.x_target_db >= self.x_in_db {
            return Err(DryerError::Invalid {
                name: "target moisture",
                value: self.x_target_db,
                expected: "below the inlet moisture",
            });
        }
        for (i, z) in self.zones.iter().enumerate() {
            if z.length_m.is_none() && i + 1 != self.zones.len() {
                return Err(DryerError::Invalid {
                    name: "zone length",
                    value: f64::NAN,
                    expected: "a length on every zone but the last",
                });
            }
            z.validate()?;
        }
        Ok(())
    }

    /// Belt speed, m/s.
    pub fn belt_speed(&self) -> f64 {
        self.dry_solid_kg_per_s / (self.width_m * self.load_kg_per_m2)
    }

    /// Solve the dryer: profiles, lengths, balances.
    pub fn solve(&self) -> Result<BeltResult, DryerError> {
        self.validate()?;
        let last = self.zones.len() - 1;
        let mut inlet = (self.x_in_db, self.t_in_k);
        let mut runs = Vec::new();
        let mut lengths = Vec::new();
        for (i, zone) in self.zones.iter().enumerate() {
            let length = match zone.length_m {
                Some(l) => l,
                None => self.length_for_target(zone, inlet)?,
            };
            let run = self.run_zone(zone, inlet, length)?;
            let (x, t, _) = *run.product.last().unwrap_or(&(inlet.0, inlet.1, 0.0));
            inlet = (x, t);
            runs.push(run);
            lengths.push(length);
            if i == last && x > self.x_target_db * (1.0 + 1e-6) + 1e-9 {
                return Err(DryerError::AirSaturates {
                    what: format!("with the zone lengths given the product leaves at {x:.4} db, above the target {:.4} db; leave the last zone's length free or lengthen it", self.x_target_db),
                });
            }
        }
        self.summarise(runs, lengths)
    }

    /// Length of `zone` that brings the product from `inlet` to the target.
    fn length_for_target(&self, zone: &Zone, inlet: (f64, f64)) -> Result<f64, DryerError> {
        let supply = heated(zone, zone.fresh_air.humidity_ratio())?;
        let x_eq = self.product.equilibrium_db(&supply);
        if self.x_target_db <= x_eq {
            return Err(DryerError::BelowEquilibrium {
                target_db: self.x_target_db,
                equilibrium_db: x_eq,
            });
        }
        let miss = |l: f64| -> Result<f64, DryerError> {
            let run = self.run_zone(zone, inlet, l)?;
            Ok(run.product.last().map_or(inlet.0, |p| p.0) - self.x_target_db)
        };
        let mut hi = 1.0;
        while miss(hi)? > 0.0 {
            hi *= 2.0;
            if hi > 20_000.0 {
                return Err(DryerError::AirSaturates {
                    what: "the product does not reach the target within 20 km of belt: the zone air is too humid, too cool or too little".into(),
                });
            }
        }
        let mut err = None;
        let root = brent(
            |l| match miss(l) {
                Ok(v) => v,
                Err(e) => {
                    err.get_or_insert(e);
                    0.0
                }
            },
            if hi > 1.0 { hi / 2.0 } else { 1e-6 },
            hi,
            Tolerance::new(1e-9, 1e-9),
        );
        if let Some(e) = err {
            return Err(e);
        }
        root.map_err(|e| DryerError::NotConverged {
            what: "belt length for the target moisture",
            detail: e.to_string(),
        })
    }

    fn segments(&self, zone: &Zone, length: f64) -> usize {
        let speed = self.belt_speed();
        let capacity =
            self.load_kg_per_m2 * (self.product.cp_solid_j_per_kg_k + 4186.0 * self.x_in_db);
        let tau_s = capacity / (zone.surface.h_w_per_m2_k * self.area_per_belt_area * 4.0);
        let dz_max = 0.2 * tau_s * speed;
        ((length / dz_max).ceil() as usize).clamp(MIN_SEGMENTS, 20_000)
    }

    /// Run one zone of length `length` from product state `inlet`, with its recirculation loop closed.
    fn run_zone(&self, zone: &Zone, inlet: (f64, f64), length: f64) -> Result<ZoneRun, DryerError> {
        let n = self.segments(zone, length);
        let start = heated(zone, zone.fresh_air.humidity_ratio())?;
        let mut air_guess: Option<Vec<AirState>> = None;
        settle_recirculation(start, zone.recirculated, |exhaust| {
            let (mixed_h, mixed_w) = mix(zone, exhaust);
            let supply = heated(zone, mixed_w)?;
            if supply.enthalpy().value < mixed_h - 1e-9 {
                return Err(DryerError::Invalid {
                    name: "supply temperature",
                    value: zone.supply_t_k,
                    expected: "above the mixed intake air",
                });
            }
            let mut run = match zone.flow {
                Flow::Cocurrent => self.march_cocurrent(zone, inlet, length, n, supply)?,
                Flow::Countercurrent => {
                    self.sweep_countercurrent(zone, inlet, length, n, supply, air_guess.take())?
                }
            };
            run.mixed_h = mixed_h;
            air_guess = Some(run.air.clone());
            let exhaust = run.exhaust;
            Ok((run, exhaust))
        })
    }

    fn area_per_segment(&self, length: f64, n: usize) -> f64 {
        self.width_m * self.area_per_belt_area * length / n as f64
    }

    /// Product state after a segment with exchange `ex`.
    fn step_product(
        &self,
        p: (f64, f64, f64),
        ex: &Exchange,
    ) -> Result<(f64, f64, f64), DryerError> {
        let ms = self.dry_solid_kg_per_s;
        let x = p.0 - ex.water_kg_per_s / ms;
        let h = p.2 + (ex.heat_w - ex.water_kg_per_s * ex.vapour_j_per_kg) / ms;
        let t = self.product.temperature_k(x, h, p.1)?;
        Ok((x, t, h))
    }

    fn march_cocurrent(
        &self,
        zone: &Zone,
        inlet: (f64, f64),
        length: f64,
        n: usize,
        supply: AirState,
    ) -> Result<ZoneRun, DryerError> {
        let area = self.area_per_segment(length, n);
        let h0 = self.product.enthalpy_j_per_kg(inlet.0, inlet.1);
        let mut product = vec![(inlet.0, inlet.1, h0)];
        let mut air = vec![supply];
        let mut exchanges = Vec::with_capacity(n);
        for j in 0..n {
            let p = product[j];
            let ex = exchange(
                &self.product,
                p.0,
                p.1,
                &air[j],
                zone.dry_air_kg_per_s,
                area,
                zone.surface,
            )?;
            product.push(self.step_product(p, &ex)?);
            air.push(ex.air_out);
            exchanges.push(ex);
        }
        let end = air[n];
        let (exhaust, loss_w) = self.after_loss(zone, &end, length)?;
        Ok(ZoneRun {
            supply,
            mixed_h: 0.0,
            exhaust,
            product,
            air,
            exchanges,
            loss_w,
        })
    }

    fn sweep_countercurrent(
        &self,
        zone: &Zone,
        inlet: (f64, f64),
        length: f64,
        n: usize,
        supply: AirState,
        guess: Option<Vec<AirState>>,
    ) -> Result<ZoneRun, DryerError> {
        let area = self.area_per_segment(length, n);
        let h0 = self.product.enthalpy_j_per_kg(inlet.0, inlet.1);
        let mut air = match guess {
            Some(g) if g.len() == n + 1 => g,
            _ => vec![supply; n + 1],
        };
        air[n] = supply;
        for _ in 0..5000 {
            // Product forward with the air entering each segment from its far end.
            let mut product = vec![(inlet.0, inlet.1, h0)];
            for j in 0..n {
                let ex = exchange(
                    &self.product,
                    product[j].0,
                    product[j].1,
                    &air[j + 1],
                    zone.dry_air_kg_per_s,
                    area,
                    zone.surface,
                )?;
                product.push(self.step_product(product[j], &ex)?);
            }
            // Air backward with that product profile.
            let mut new_air = air.clone();
            let mut exchanges = vec![None; n];
            for j in (0..n).rev() {
                let ex = exchange(
                    &self.product,
                    product[j].0,
                    product[j].1,
                    &new_air[j + 1],
                    zone.dry_air_kg_per_s,
                    area,
                    zone.surface,
                )?;
                new_air[j] = ex.air_out;
                exchanges[j] = Some(ex);
            }
            let change = air
                .iter()
                .zip(&new_air)
                .map(|(a, b)| {
                    (a.humidity_ratio() - b.humidity_ratio()).abs() * 1e5
                        + (a.enthalpy().value - b.enthalpy().value).abs()
                })
                .fold(0.0, f64::max);
            air = new_air;
            if change <= 1e-6 {
                let exchanges: Vec<Exchange> = exchanges.into_iter().flatten().collect();
                // Rebuild the product with the final exchanges so both sides agree exactly.
                let mut product = vec![(inlet.0, inlet.1, h0)];
                for ex in &exchanges {
                    let last = product[product.len() - 1];
                    product.push(self.step_product(last, ex)?);
                }
                let (exhaust, loss_w) = self.after_loss(zone, &air[0], length)?;
                return Ok(ZoneRun {
                    supply,
                    mixed_h: 0.0,
                    exhaust,
                    product,
                    air,
                    exchanges,
                    loss_w,
                });
            }
        }
        Err(DryerError::NotConverged {
            what: "countercurrent zone",
            detail: "air profile did not settle in 5000 sweeps".into(),
        })
    }

    /// Air leaving a zone after its wall loss, and the loss, W.
    fn after_loss(
        &self,
        zone: &Zone,
        air: &AirState,
        length: f64,
    ) -> Result<(AirState, f64), DryerError> {
        let loss = zone.loss_w_per_m_k * length * (air.t_kelvin() - self.ambient_t_k);
        let h = air.enthalpy().value - loss / zone.dry_air_kg_per_s;
        let out = AirState::from_enthalpy_and_w(AvailableEnergy::new::<joule_per_kilogram>(h), air.humidity_ratio(), air.pressure())
            .map_err(|_| DryerError::AirSaturates {
                what: format!(
                    "the exhaust of a {length:.1} m zone would cool below its dew point ({:.1} degC air losing {:.1} kW through the walls): use more or hotter air, less recirculation or better insulation",
                    air.t_kelvin() - 273.15,
                    loss / 1000.0
                ),
            })?;
        Ok((out, loss))
    }

    fn summarise(&self, runs: Vec<ZoneRun>, lengths: Vec<f64>) -> Result<BeltResult, DryerError> {
        let speed = self.belt_speed();
        let mut ledger = Ledger::default();
        let mut zones = Vec::new();
        let mut profile = Vec::new();
        let mut z0 = 0.0;
        let mut warnings = Vec::new();
        let mut t_max: f64 = self.t_in_k;
        for (i, (run, &len)) in runs.iter().zip(&lengths).enumerate() {
            let zone = &self.zones[i];
            let m = zone.dry_air_kg_per_s;
            let heater_w = m * (run.supply.enthalpy().value - run.mixed_h);
            let fan_w = zone.fan.pressure_rise_pa * m * run.supply.humid_volume().value
                / zone.fan.efficiency;
            ledger.flows.heater += heater_w;
            ledger.flows.fan += fan_w;
            ledger.flows.losses += run.loss_w;
            let purge = m * (1.0 - zone.recirculated);
            let fresh = (
                zone.fresh_air.enthalpy().value,
                zone.fresh_air.humidity_ratio(),
            );
            let ex = (run.exhaust.enthalpy().value, run.exhaust.humidity_ratio());
            let at_fresh_w = exhaust_at_fresh_w(&run.exhaust, fresh.1);
            ledger.book_exhaust(purge, fresh, ex, at_fresh_w);
            for e in &run.exchanges {
                ledger.book_evaporation(
                    e.water_kg_per_s,
                    e.latent_j_per_kg,
                    e.vapour_j_per_kg - e.latent_j_per_kg,
                );
            }
            let condensed: f64 = run.exchanges.iter().map(|e| e.condensed_kg_per_s).sum();
            let evaporated: f64 = run.exchanges.iter().map(|e| e.water_kg_per_s).sum();
            if condensed > 1e-3 * evaporated.abs() {
                warnings.push(format!(
                    "in zone {} {:.3} kg/h of water condenses from the air onto cold product (fog): preheat the feed or use more or hotter air",
                    i + 1,
                    condensed * 3600.0
                ));
            }
            let n = run.exchanges.len();
            for (j, p) in run.product.iter().enumerate() {
                t_max = t_max.max(p.1);
                if j % (n / 50).max(1) == 0 || j == n {
                    profile.push(ProfilePoint {
                        z_m: z0 + len * j as f64 / n as f64,
                        zone: i,
                        x_db: p.0,
                        t_product_k: p.1,
                        air: run.air[j],
                    });
                }
            }
            if run.exhaust.relative_humidity() > 0.9 {
                warnings.push(format!(
                    "zone {} exhaust reaches {:.0} % relative humidity: it will condense in cooler ducts (common practice: keep exhaust well above its dew point)",
                    i + 1,
                    run.exhaust.relative_humidity() * 100.0
                ));
            }
            zones.push(ZoneResult {
                length_m: len,
                residence_s: len / speed,
                supply: run.supply,
                exhaust: run.exhaust,
                heater_w,
                fan_w,
            });
            z0 += len;
        }
        let (x_out, t_out, h_out) = runs
            .last()
            .and_then(|r| r.product.last().copied())
            .unwrap_or((self.x_in_db, self.t_in_k, 0.0));
        let ms = self.dry_solid_kg_per_s;
        let h_in = self.product.enthalpy_j_per_kg(self.x_in_db, self.t_in_k);
        let (flows, closure) = ledger.close(ms * (h_out - h_in), ms * (self.x_in_db - x_out));
        if let Some(max) = self.product.t_max_k {
            if t_max > max {
                warnings.push(format!(
                    "the product reaches {:.1} degC, above its maximum of {:.1} degC: lower the air temperature in the last zones",
                    t_max - 273.15,
                    max - 273.15
                ));
            }
        }
        let latent = match runs.first() {
            Some(r) => latent_minimum(&r.supply)?,
            None => {
                return Err(DryerError::Invalid {
                    name: "zones",
                    value: 0.0,
                    expected: "at least one zone",
                })
            }
        };
        Ok(BeltResult {
            periods_m: self.periods(&profile),
            zones,
            length_m: z0,
            belt_speed_m_per_s: speed,
            residence_s: z0 / speed,
            x_out_db: x_out,
            t_out_k: t_out,
            profile,
            flows,
            closure,
            latent_minimum_j_per_kg: latent,
            warnings,
        })
    }

    /// Preheat (product warming before it settles near the wet-bulb), constant-rate
    /// (above the critical moisture) and falling-rate lengths.
    fn periods(&self, profile: &[ProfilePoint]) -> [f64; 3] {
        let xc = self.product.x_critical_db;
        let end = profile.last().map_or(0.0, |p| p.z_m);
        let falling_start = profile.iter().find(|p| p.x_db < xc).map_or(end, |p| p.z_m);
        let preheat_end = profile
            .windows(2)
            .find(|w| {
                (w[1].t_product_k - w[0].t_product_k).abs()
                    < 0.05 * (w[1].z_m - w[0].z_m).max(1e-12) * 10.0
            })
            .map_or(0.0, |w| w[0].z_m)
            .min(falling_start);
        [
            preheat_end,
            falling_start - preheat_end,
            end - falling_start,
        ]
    }
}

fn heated(zone: &Zone, w: f64) -> Result<AirState, DryerError> {
    Ok(AirState::from_w(
        ThermodynamicTemperature::new::<kelvin>(zone.supply_t_k),
        w,
        zone.fresh_air.pressure(),
    )?)
}

fn mix(zone: &Zone, exhaust: &AirState) -> (f64, f64) {
    let r = zone.recirculated;
    let f = &zone.fresh_air;
    (
        (1.0 - r) * f.enthalpy().value + r * exhaust.enthalpy().value,
        (1.0 - r) * f.humidity_ratio() + r * exhaust.humidity_ratio(),
    )
}
