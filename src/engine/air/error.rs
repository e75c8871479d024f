//! Errors of the humid-air engine; each message names the argument and the limit.

use std::fmt;

use crate::engine::solve::SolveError;

/// Kelvin to degC for messages.
fn c(t_k: f64) -> f64 {
    t_k - 273.15
}

/// Bad input or an unsolvable state in the humid-air engine.
///
/// `name` fields are the argument names used by the language (`T`, `rh`, `w`,
/// `wetbulb`, `dewpoint`, `h`, `p`, ...), so a built-in can blame the right one.
#[derive(Clone, Debug, PartialEq)]
pub enum AirError {
    /// A temperature outside the supported range.
    TemperatureOutOfRange {
        name: &'static str,
        value_k: f64,
        min_k: f64,
        max_k: f64,
    },
    /// Pressure not positive or not finite.
    PressureNotPositive { name: &'static str, value_pa: f64 },
    /// Pressure outside a function's range.
    PressureOutOfRange {
        name: &'static str,
        value_pa: f64,
        min_pa: f64,
        max_pa: f64,
    },
    /// Relative humidity below 0 or above 1 (100 %).
    RelativeHumidityOutOfRange { value: f64 },
    /// Relative humidity that would need a vapour pressure at or above the total
    /// pressure (dry-bulb above the boiling point at p).
    RelativeHumidityAboveBoiling {
        value: f64,
        max: f64,
        t_k: f64,
        p_pa: f64,
    },
    /// Humidity ratio negative or not finite.
    HumidityRatioNegative { name: &'static str, value: f64 },
    /// Humidity ratio above saturation at the dry-bulb.
    HumidityRatioAboveSaturation {
        name: &'static str,
        value: f64,
        saturation: f64,
        t_k: f64,
    },
    /// A wet-bulb or dew point above the dry-bulb.
    AboveDryBulb {
        name: &'static str,
        value_k: f64,
        dry_bulb_k: f64,
    },
    /// A wet-bulb so low that even bone-dry air at this dry-bulb is wetter.
    WetBulbTooLow { value_k: f64, min_k: f64 },
    /// Vapour partial pressure negative or not below the total pressure.
    VapourPressureOutOfRange { value_pa: f64, p_pa: f64 },
    /// An enthalpy below that of dry air at the dry-bulb, or above saturation.
    EnthalpyOutOfRange {
        name: &'static str,
        value_j_per_kg: f64,
        min: f64,
        max: f64,
    },
    /// A quantity that must be positive (a flow, an efficiency, a mass) is not.
    NotPositive { name: &'static str, value: f64 },
    /// A fraction outside 0..1.
    FractionOutOfRange { name: &'static str, value: f64 },
    /// Streams at different total pressures cannot be mixed here.
    PressureMismatch { p1_pa: f64, p2_pa: f64 },
    /// A process result outside the supported temperature range, or
    /// supersaturated where fog is not allowed.
    ProcessOutOfRange { what: String },
    /// The dew point of bone-dry air, or below -100 degC.
    NoDewPoint { w: f64 },
    /// An inner solve that did not converge.
    NotConverged {
        what: &'static str,
        reason: SolveError,
    },
}

impl fmt::Display for AirError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        use AirError::*;
        match self {
            TemperatureOutOfRange { name, value_k, min_k, max_k } => write!(
                f,
                "`{name}` = {:.2} degC is outside the range {:.2} to {:.2} degC",
                c(*value_k),
                c(*min_k),
                c(*max_k)
            ),
            PressureNotPositive { name, value_pa } => {
                write!(f, "`{name}` = {:.4} kPa: a pressure must be positive", value_pa / 1e3)
            }
            PressureOutOfRange { name, value_pa, min_pa, max_pa } => write!(
                f,
                "`{name}` = {:.4} kPa is outside the range {:.4} to {:.4} kPa",
                value_pa / 1e3,
                min_pa / 1e3,
                max_pa / 1e3
            ),
            RelativeHumidityOutOfRange { value } => {
                write!(f, "`rh` = {:.4} % is outside 0 to 100 %", value * 100.0)
            }
            RelativeHumidityAboveBoiling { value, max, t_k, p_pa } => write!(
                f,
                "`rh` = {:.4} % is impossible at {:.2} degC and {:.3} kPa: the dry-bulb is above the boiling point, \
                 so rh cannot exceed {:.4} % (pure steam)",
                value * 100.0,
                c(*t_k),
                p_pa / 1e3,
                max * 100.0
            ),
            HumidityRatioNegative { name, value } => {
                write!(f, "`{name}` = {value} kg/kg dry air: a humidity ratio must be zero or positive")
            }
            HumidityRatioAboveSaturation { name, value, saturation, t_k } => write!(
                f,
                "`{name}` = {:.6} kg/kg dry air is above saturation ({:.6} kg/kg) at {:.2} degC",
                value,
                saturation,
                c(*t_k)
            ),
            AboveDryBulb { name, value_k, dry_bulb_k } => write!(
                f,
                "`{name}` = {:.3} degC is above the dry-bulb temperature {:.3} degC",
                c(*value_k),
                c(*dry_bulb_k)
            ),
            WetBulbTooLow { value_k, min_k } => write!(
                f,
                "`wetbulb` = {:.3} degC is below {:.3} degC, the wet-bulb of bone-dry air at this dry-bulb",
                c(*value_k),
                c(*min_k)
            ),
            VapourPressureOutOfRange { value_pa, p_pa } => write!(
                f,
                "vapour pressure {:.4} kPa must be zero or more and below the total pressure {:.4} kPa",
                value_pa / 1e3,
                p_pa / 1e3
            ),
            EnthalpyOutOfRange { name, value_j_per_kg, min, max } => write!(
                f,
                "`{name}` = {:.3} kJ/kg dry air is outside {:.3} (dry air) to {:.3} kJ/kg (saturated) at this dry-bulb",
                value_j_per_kg / 1e3,
                min / 1e3,
                max / 1e3
            ),
            NotPositive { name, value } => write!(f, "`{name}` = {value} must be positive"),
            FractionOutOfRange { name, value } => write!(f, "`{name}` = {value} must be between 0 and 1 (100 %)"),
            PressureMismatch { p1_pa, p2_pa } => write!(
                f,
                "cannot mix streams at different total pressures ({:.3} and {:.3} kPa)",
                p1_pa / 1e3,
                p2_pa / 1e3
            ),
            ProcessOutOfRange { what } => f.write_str(what),
            NoDewPoint { w } => write!(f, "no dew point: humidity ratio {w:.3e} kg/kg is dry below -100 degC"),
            NotConverged { what, reason } => write!(f, "the {what} did not converge: {reason}"),
        }
    }
}

impl std::error::Error for AirError {}
