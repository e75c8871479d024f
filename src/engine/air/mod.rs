//! Humid air: psychrometrics at any total pressure, air processes and the
//! standard atmosphere.
//!
//! Temperatures -40..350 degC (saturation functions down to -100 degC), total
//! pressure 50..200 kPa by design (usable well beyond). Saturation over ice
//! below 0 degC. Enthalpy per kg of dry air on the ASHRAE reference: dry air and
//! liquid water at 0 degC. Methods and sources: `docs/methods/air.md` and each
//! submodule.
//!
//! Public functions take and return uom quantities; humidity ratios are plain
//! `f64` in kg water per kg dry air (`w_kg_per_kg_da`), relative humidity a
//! plain fraction 0..1.

mod altitude;
mod dry_air_table;
mod dry_bulb;
mod error;
mod per_pressure;
mod process;
pub mod saturation;
mod state;
pub mod thermo;

pub use altitude::{standard_atmosphere_pressure, ALTITUDE_MAX_M, ALTITUDE_MIN_M};
pub use error::AirError;
pub use process::{
    add_steam, add_water, change_temperature, cool_by, cool_to, heat_by, heat_to, mix, saturate,
    saturated_steam_enthalpy, ProcessOutcome, Stream,
};
pub use state::{AirState, P_MAX_PA, P_MIN_PA, T_MAX_K, T_MIN_K};

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::{AvailableEnergy, Pressure, ThermodynamicTemperature};
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::kelvin;

/// Saturation vapour pressure of pure water, over ice below 0 degC and over liquid
/// water above (no enhancement factor).
///
/// Method: Hyland-Wexler (ASHRAE Handbook - Fundamentals 2017 ch. 1 eqs. 5-6)
/// from -100 to 150 degC, IAPWS-IF97 region 4 (eq. 30) above 200 degC, joined
/// smoothly between; ice and liquid joined between 0 and 0.01 degC.
/// Validity: -100 degC to the critical point 373.946 degC; outside, an error.
pub fn saturation_pressure(t: ThermodynamicTemperature) -> Result<Pressure, AirError> {
    let t_k = t.get::<kelvin>();
    check_saturation_range("T", t_k)?;
    Ok(Pressure::new::<pascal>(
        saturation::ln_saturation(t_k).exp(),
    ))
}

/// Saturation vapour pressure over liquid water (supercooled below 0 degC).
///
/// Same method and validity as [`saturation_pressure`], liquid branch only.
pub fn saturation_pressure_over_water(t: ThermodynamicTemperature) -> Result<Pressure, AirError> {
    let t_k = t.get::<kelvin>();
    check_saturation_range("T", t_k)?;
    Ok(Pressure::new::<pascal>(saturation::ln_water(t_k).exp()))
}

/// Saturation temperature (boiling point) of water at pressure `p`.
///
/// Inverse of [`saturation_pressure_over_water`]; IAPWS-IF97 eq. 31 start, polished on the same curve.
/// Validity: 611.2 Pa (0.01 degC) to 22.064 MPa.
pub fn boiling_point(p: Pressure) -> Result<ThermodynamicTemperature, AirError> {
    let p_pa = p.get::<pascal>();
    if !(p_pa.is_finite() && p_pa > 611.2 && p_pa <= saturation::P_CRITICAL) {
        return Err(AirError::PressureOutOfRange {
            name: "p",
            value_pa: p_pa,
            min_pa: 611.2,
            max_pa: saturation::P_CRITICAL,
        });
    }
    let t = saturation::boiling_point(p_pa).map_err(|e| AirError::NotConverged {
        what: "boiling point",
        reason: e,
    })?;
    Ok(ThermodynamicTemperature::new::<kelvin>(t))
}

/// Latent heat of vaporization of water at temperature `t`, per kg of water.
///
/// Method: Clausius-Clapeyron `h_fg = T (v'' - v') dp_s/dT` on the liquid
/// saturation curve of [`saturation_pressure_over_water`], with the saturated
/// densities of Wagner & Pruss (1993). About 2501 kJ/kg at 0 degC, 2257 kJ/kg at
/// 100 degC; zero at and above the critical temperature (647.096 K). Agrees
/// with IAPWS-95 within 0.3 % from 0 to 300 degC (see tests/reference/iapws).
/// Below 0 degC it is the heat of vaporization of supercooled liquid.
/// Not-finite or non-positive input temperatures give NaN; callers check ranges.
pub fn latent_heat_vaporization(t: ThermodynamicTemperature) -> AvailableEnergy {
    let t_k = t.get::<kelvin>();
    let h = if t_k.is_finite() && t_k > 0.0 {
        saturation::latent_heat_j_per_kg(t_k)
    } else {
        f64::NAN
    };
    AvailableEnergy::new::<joule_per_kilogram>(h)
}

/// Humidity ratio (kg water / kg dry air) from vapour partial pressure and total pressure:
/// `w = 0.621945 pv / (p - pv)` (ASHRAE Fundamentals 2017 ch. 1 eq. 20).
///
/// Errors when `p` is not positive, `pv` negative or `pv >= p`.
pub fn humidity_ratio(pv: Pressure, p: Pressure) -> Result<f64, AirError> {
    let (pv, p) = (pv.get::<pascal>(), p.get::<pascal>());
    state::check_pressure(p)?;
    if !(pv.is_finite() && pv >= 0.0 && pv < p) {
        return Err(AirError::VapourPressureOutOfRange {
            value_pa: pv,
            p_pa: p,
        });
    }
    Ok(thermo::EPSILON * pv / (p - pv))
}

/// Vapour partial pressure from humidity ratio and total pressure: `pv = p w / (0.621945 + w)`.
pub fn vapour_pressure(w_kg_per_kg_da: f64, p: Pressure) -> Pressure {
    let p = p.get::<pascal>();
    Pressure::new::<pascal>(p * w_kg_per_kg_da / (thermo::EPSILON + w_kg_per_kg_da))
}

fn check_saturation_range(name: &'static str, t_k: f64) -> Result<(), AirError> {
    if t_k.is_finite() && (saturation::T_MIN_SATURATION..=saturation::T_CRITICAL).contains(&t_k) {
        Ok(())
    } else {
        Err(AirError::TemperatureOutOfRange {
            name,
            value_k: t_k,
            min_k: saturation::T_MIN_SATURATION,
            max_k: saturation::T_CRITICAL,
        })
    }
}
