//! Processes on humid air, per kg of dry air, and streams of air.
//!
//! Steady-flow energy and water balances per kg of dry air (ASHRAE Handbook -
//! Fundamentals 2017 ch. 1, "Typical air-conditioning processes"):
//! heating and cooling (with condensate leaving at the outlet temperature),
//! adiabatic mixing by dry-air mass flow, adiabatic saturation (evaporative
//! humidification with water recirculated at the wet-bulb), adding liquid
//! water or steam. Kinetic and potential energy and fan work are neglected.

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::{AvailableEnergy, MassRate, Power, ThermodynamicTemperature, VolumeRate};
use uom::si::mass_rate::kilogram_per_second;
use uom::si::power::watt;
use uom::si::thermodynamic_temperature::kelvin;
use uom::si::volume_rate::cubic_meter_per_second;

use super::state::{h_of, ws_of, T_MIN_K};
use super::{thermo, AirError, AirState};
use crate::engine::solve::{brent, Tolerance};

/// What a process does to 1 kg of dry air.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ProcessOutcome {
    /// The outlet state.
    pub outlet: AirState,
    /// Heat added per kg dry air (negative when removed).
    pub heat: AvailableEnergy,
    /// Water added to the air as vapour per kg dry air (negative: condensate
    /// removed, or fog left suspended after mixing).
    pub water_kg_per_kg_da: f64,
}

fn outcome(outlet: AirState, heat_j_per_kg: f64, water: f64) -> ProcessOutcome {
    ProcessOutcome {
        outlet,
        heat: AvailableEnergy::new::<joule_per_kilogram>(heat_j_per_kg),
        water_kg_per_kg_da: water,
    }
}

/// Heat or cool to dry-bulb `to`, removing any condensate at `to`.
///
/// Above the inlet dew point only sensible heat changes; below it the outlet is
/// saturated at `to` and the condensate (liquid, or frost below 0 degC) leaves
/// with enthalpy `h_c(to)`: `q = h2 + (w1 - w2) h_c(to) - h1`.
pub fn change_temperature(
    air: &AirState,
    to: ThermodynamicTemperature,
) -> Result<ProcessOutcome, AirError> {
    let t2 = to.get::<kelvin>();
    super::state::check_dry_bulb("to", t2)?;
    let (w1, p) = (air.humidity_ratio(), air.p_pascal());
    let w2 = ws_of(t2, p).map_or(w1, |ws| ws.min(w1));
    let outlet = AirState::from_w(to, w2, air.pressure())?;
    let h1 = h_of(air.t_kelvin(), w1, p);
    let q = h_of(t2, w2, p) + (w1 - w2) * thermo::condensed_enthalpy(t2) - h1;
    Ok(outcome(outlet, q, w2 - w1))
}

/// Heat to dry-bulb `to` (no water change). Errors when `to` is below the inlet dry-bulb.
pub fn heat_to(air: &AirState, to: ThermodynamicTemperature) -> Result<ProcessOutcome, AirError> {
    if to.get::<kelvin>() < air.t_kelvin() {
        return Err(AirError::ProcessOutOfRange {
            what: format!(
                "`to` = {:.2} degC is below the inlet {:.2} degC: heating cannot cool; use a cooling process",
                to.get::<kelvin>() - 273.15,
                air.t_kelvin() - 273.15
            ),
        });
    }
    change_temperature(air, to)
}

/// Cool to dry-bulb `to`, condensing below the dew point. Errors when `to` is above the inlet.
pub fn cool_to(air: &AirState, to: ThermodynamicTemperature) -> Result<ProcessOutcome, AirError> {
    if to.get::<kelvin>() > air.t_kelvin() {
        return Err(AirError::ProcessOutOfRange {
            what: format!(
                "`to` = {:.2} degC is above the inlet {:.2} degC: cooling cannot heat; use a heating process",
                to.get::<kelvin>() - 273.15,
                air.t_kelvin() - 273.15
            ),
        });
    }
    change_temperature(air, to)
}

/// Heat by `q` per kg dry air (q >= 0): `h2 = h1 + q`, w unchanged.
pub fn heat_by(air: &AirState, q: AvailableEnergy) -> Result<ProcessOutcome, AirError> {
    let q = q.get::<joule_per_kilogram>();
    if !(q.is_finite() && q >= 0.0) {
        return Err(AirError::NotPositive {
            name: "duty",
            value: q,
        });
    }
    let h2 = AvailableEnergy::new::<joule_per_kilogram>(
        h_of(air.t_kelvin(), air.humidity_ratio(), air.p_pascal()) + q,
    );
    let outlet = AirState::from_enthalpy_and_w(h2, air.humidity_ratio(), air.pressure())?;
    Ok(outcome(outlet, q, 0.0))
}

/// Cool by `q` per kg dry air removed (q >= 0), condensing below the dew point.
///
/// Solves the outlet dry-bulb so that [`change_temperature`] removes exactly q.
pub fn cool_by(air: &AirState, q: AvailableEnergy) -> Result<ProcessOutcome, AirError> {
    let q = q.get::<joule_per_kilogram>();
    if !(q.is_finite() && q >= 0.0) {
        return Err(AirError::NotPositive {
            name: "duty",
            value: q,
        });
    }
    let removed = |t: f64| -> f64 {
        let to = ThermodynamicTemperature::new::<kelvin>(t);
        change_temperature(air, to).map_or(f64::NAN, |o| -o.heat.get::<joule_per_kilogram>())
    };
    let max = removed(T_MIN_K);
    if q > max {
        return Err(AirError::ProcessOutOfRange {
            what: format!(
                "removing {:.3} kJ/kg dry air would cool below -40 degC (at most {:.3} kJ/kg)",
                q / 1e3,
                max / 1e3
            ),
        });
    }
    let t2 = brent(
        |t| removed(t) - q,
        T_MIN_K,
        air.t_kelvin(),
        Tolerance::new(1e-10, 1e-15),
    )
    .map_err(|e| AirError::NotConverged {
        what: "outlet of cooling by a duty",
        reason: e,
    })?;
    change_temperature(air, ThermodynamicTemperature::new::<kelvin>(t2))
}

/// Adiabatic mixing of two streams by dry-air mass flow (same total pressure).
///
/// `w` and `h` are dry-air-flow weighted. When the mixture would be
/// supersaturated (fog), the outlet is saturated and the liquid that stays in
/// suspension is reported as negative water added (`h = h_s(T) + fog h_w(T)`).
pub fn mix(
    a: &AirState,
    flow_a: MassRate,
    b: &AirState,
    flow_b: MassRate,
) -> Result<ProcessOutcome, AirError> {
    let (ma, mb) = (
        flow_a.get::<kilogram_per_second>(),
        flow_b.get::<kilogram_per_second>(),
    );
    for (name, m) in [
        ("flow of the first stream", ma),
        ("flow of the second stream", mb),
    ] {
        if !(m.is_finite() && m >= 0.0) || ma + mb <= 0.0 {
            return Err(AirError::NotPositive { name, value: m });
        }
    }
    let p = a.p_pascal();
    if (b.p_pascal() - p).abs() > 1e-9 * p {
        return Err(AirError::PressureMismatch {
            p1_pa: p,
            p2_pa: b.p_pascal(),
        });
    }
    let x = ma / (ma + mb);
    let w = x * a.humidity_ratio() + (1.0 - x) * b.humidity_ratio();
    let h = x * h_of(a.t_kelvin(), a.humidity_ratio(), p)
        + (1.0 - x) * h_of(b.t_kelvin(), b.humidity_ratio(), p);
    let clear = AirState::from_enthalpy_and_w(
        AvailableEnergy::new::<joule_per_kilogram>(h),
        w,
        a.pressure(),
    );
    match clear {
        Ok(outlet) => Ok(outcome(outlet, 0.0, 0.0)),
        Err(AirError::HumidityRatioAboveSaturation { .. }) => foggy_mix(h, w, p),
        Err(e) => Err(e),
    }
}

/// Saturated outlet of a supersaturated mix, with the fog (liquid) it carries.
fn foggy_mix(h: f64, w: f64, p: f64) -> Result<ProcessOutcome, AirError> {
    let residual = |t: f64| {
        let ws = ws_of(t, p).unwrap_or(w).min(w);
        h_of(t, ws, p) + (w - ws) * thermo::condensed_enthalpy(t) - h
    };
    // The clear-air dry-bulb is below the dew point of w, where the residual is positive.
    let probe = AirState::from_w(
        ThermodynamicTemperature::new::<kelvin>(super::state::T_MAX_K),
        w,
        uom_pressure(p),
    )?;
    let hi = probe.dew_point_k()?;
    let t = brent(residual, T_MIN_K, hi, Tolerance::new(1e-10, 1e-15)).map_err(|e| {
        AirError::NotConverged {
            what: "temperature of a foggy mixture",
            reason: e,
        }
    })?;
    let ws = ws_of(t, p).unwrap_or(w);
    let outlet = AirState::from_w(
        ThermodynamicTemperature::new::<kelvin>(t),
        ws,
        uom_pressure(p),
    )?;
    Ok(outcome(outlet, 0.0, ws - w))
}

fn uom_pressure(p: f64) -> uom::si::f64::Pressure {
    uom::si::f64::Pressure::new::<uom::si::pressure::pascal>(p)
}

/// Adiabatic saturation (evaporative humidifier / cooler) with saturation
/// effectiveness `effectiveness` (0 < e <= 1): the outlet dry-bulb is
/// `T1 - e (T1 - T*)`, on the adiabatic-saturation line through the inlet, water
/// supplied at the wet-bulb T*: `h2 - w2 h_c(T*) = h1 - w1 h_c(T*)`.
pub fn saturate(air: &AirState, effectiveness: f64) -> Result<ProcessOutcome, AirError> {
    if !(effectiveness.is_finite() && effectiveness > 0.0 && effectiveness <= 1.0) {
        return Err(AirError::FractionOutOfRange {
            name: "effectiveness",
            value: effectiveness,
        });
    }
    let (t1, w1, p) = (air.t_kelvin(), air.humidity_ratio(), air.p_pascal());
    let twb = air.wet_bulb_k()?;
    let t2 = (t1 - effectiveness * (t1 - twb)).max(twb);
    let hc = thermo::condensed_enthalpy(twb);
    let rhs = h_of(t1, w1, p) - w1 * hc;
    let residual = |w: f64| h_of(t2, w, p) - w * hc - rhs;
    // Above the boiling point at p any w is possible; 1000 kg/kg bounds the search.
    let w_hi = ws_of(t2, p).unwrap_or(1e3).max(w1);
    let w2 = if effectiveness == 1.0 {
        w_hi
    } else {
        brent(residual, w1, w_hi, Tolerance::new(1e-16, 1e-14)).map_err(|e| {
            AirError::NotConverged {
                what: "outlet of adiabatic saturation",
                reason: e,
            }
        })?
    };
    let outlet = AirState::from_w(
        ThermodynamicTemperature::new::<kelvin>(t2),
        w2,
        air.pressure(),
    )?;
    Ok(outcome(outlet, 0.0, w2 - w1))
}

/// Add `water` kg of liquid water per kg dry air at temperature `water_t`, all
/// evaporated: `h2 = h1 + dw h_l(T_water)`, `w2 = w1 + dw`.
///
/// Errors when the water cannot all evaporate (outlet supersaturated).
pub fn add_water(
    air: &AirState,
    water_kg_per_kg_da: f64,
    water_t: ThermodynamicTemperature,
) -> Result<ProcessOutcome, AirError> {
    let h_water = thermo::liquid_enthalpy(water_t.get::<kelvin>());
    add_enthalpy_and_water(air, water_kg_per_kg_da, h_water, "water")
}

/// Add `steam` kg of water vapour per kg dry air with specific enthalpy `steam_h`
/// (ASHRAE reference, e.g. about 2676 kJ/kg for saturated steam at 100 degC).
pub fn add_steam(
    air: &AirState,
    steam_kg_per_kg_da: f64,
    steam_h: AvailableEnergy,
) -> Result<ProcessOutcome, AirError> {
    add_enthalpy_and_water(
        air,
        steam_kg_per_kg_da,
        steam_h.get::<joule_per_kilogram>(),
        "steam",
    )
}

/// Enthalpy of saturated steam at temperature `t` on the ASHRAE reference, per kg water.
pub fn saturated_steam_enthalpy(t: ThermodynamicTemperature) -> Result<AvailableEnergy, AirError> {
    let t_k = t.get::<kelvin>();
    let p = super::saturation_pressure_over_water(t)?.get::<uom::si::pressure::pascal>();
    Ok(AvailableEnergy::new::<joule_per_kilogram>(
        thermo::vapour_enthalpy(t_k, p),
    ))
}

fn add_enthalpy_and_water(
    air: &AirState,
    dw: f64,
    h_water: f64,
    name: &'static str,
) -> Result<ProcessOutcome, AirError> {
    if !(dw.is_finite() && dw >= 0.0) {
        return Err(AirError::NotPositive { name, value: dw });
    }
    let (t1, w1, p) = (air.t_kelvin(), air.humidity_ratio(), air.p_pascal());
    let (h2, w2) = (h_of(t1, w1, p) + dw * h_water, w1 + dw);
    // Supersaturated when the clear-air enthalpy at the dew point of w2 exceeds h2.
    let probe = AirState::from_w(
        ThermodynamicTemperature::new::<kelvin>(super::state::T_MAX_K),
        w2,
        air.pressure(),
    )?;
    let t_dew = probe.dew_point_k()?;
    if h2 < h_of(t_dew, w2, p) {
        return Err(AirError::ProcessOutOfRange {
            what: format!(
                "adding {dw:.6} kg {name}/kg dry air would supersaturate the air (w {w2:.6} kg/kg needs a dry-bulb \
                 above its dew point {:.2} degC); not all of it can evaporate",
                t_dew - 273.15
            ),
        });
    }
    let outlet = AirState::from_enthalpy_and_w(
        AvailableEnergy::new::<joule_per_kilogram>(h2),
        w2,
        air.pressure(),
    )?;
    Ok(outcome(outlet, 0.0, dw))
}

/// A stream of humid air: its state and its dry-air mass flow.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Stream {
    pub state: AirState,
    pub dry_air: MassRate,
}

impl Stream {
    /// A stream from its dry-air mass flow.
    pub fn from_dry_air_flow(state: AirState, dry_air: MassRate) -> Result<Stream, AirError> {
        let m = dry_air.get::<kilogram_per_second>();
        if !(m.is_finite() && m > 0.0) {
            return Err(AirError::NotPositive {
                name: "flow",
                value: m,
            });
        }
        Ok(Stream { state, dry_air })
    }

    /// A stream from its volumetric flow at its own state: `m_da = V / v`.
    pub fn from_volume_flow(state: AirState, flow: VolumeRate) -> Result<Stream, AirError> {
        let v = flow.get::<cubic_meter_per_second>() / state.humid_volume_m3_per_kg_da();
        Stream::from_dry_air_flow(state, MassRate::new::<kilogram_per_second>(v))
    }

    /// A stream from its total (moist) mass flow: `m_da = m / (1 + w)`.
    pub fn from_moist_air_flow(state: AirState, flow: MassRate) -> Result<Stream, AirError> {
        let m = flow.get::<kilogram_per_second>() / (1.0 + state.humidity_ratio());
        Stream::from_dry_air_flow(state, MassRate::new::<kilogram_per_second>(m))
    }

    /// Volumetric flow at the stream's state.
    pub fn volume_flow(&self) -> VolumeRate {
        let m = self.dry_air.get::<kilogram_per_second>();
        VolumeRate::new::<cubic_meter_per_second>(m * self.state.humid_volume_m3_per_kg_da())
    }

    /// Heat flow of a process outcome applied to this stream.
    pub fn duty(&self, o: &ProcessOutcome) -> Power {
        Power::new::<watt>(
            self.dry_air.get::<kilogram_per_second>() * o.heat.get::<joule_per_kilogram>(),
        )
    }

    /// Water flow (added positive, removed negative) of a process outcome applied to this stream.
    pub fn water_flow(&self, o: &ProcessOutcome) -> MassRate {
        MassRate::new::<kilogram_per_second>(
            self.dry_air.get::<kilogram_per_second>() * o.water_kg_per_kg_da,
        )
    }
}
