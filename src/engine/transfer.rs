//! Wet-surface heat and mass transfer: film coefficients, the dimensionless
//! groups they are written in, the Chilton-Colburn analogy, the wet-surface
//! temperature and the constant-rate drying period.
//!
//! Every correlation returns its value together with the list of validity
//! ranges it was called outside ([`Correlated`]): the value is still returned,
//! the caller decides how loudly to warn. Method notes with equations and
//! sources: `docs/methods/transfer.md`.

pub mod analogy;
pub mod constant_rate;
pub mod film;
pub mod groups;
pub mod jets;
mod surface_side;
pub mod wet_surface;

use std::fmt;

pub use analogy::{colburn_humidity_coefficient, colburn_mass_transfer_coefficient};
pub use constant_rate::constant_rate_time;
pub use film::{
    cylinder_churchill_bernstein, flat_plate, packed_bed_wakao_kaguei, sphere_ranz_marshall,
    tray_parallel_flow, tray_perpendicular_flow, PlateFlow,
};
pub use groups::{
    mass_velocity, nusselt, prandtl, reynolds, schmidt, sherwood, velocity_from_mass_velocity,
};
pub use jets::{round_jet_array, round_jet_single, slot_jet_array, slot_jet_single};
pub use wet_surface::{wet_surface, ExtraHeat, Layer, Radiation, TrayBottom, WetSurface};

/// A correlation's value with the validity ranges the call fell outside.
#[derive(Clone, Debug, PartialEq)]
pub struct Correlated<T> {
    /// The value the formula gives (returned even outside its range).
    pub value: T,
    /// One entry per input outside the range the correlation was fitted on.
    pub warnings: Vec<RangeWarning>,
}

impl<T> Correlated<T> {
    /// A value with no warnings yet.
    pub fn new(value: T) -> Correlated<T> {
        Correlated {
            value,
            warnings: Vec::new(),
        }
    }

    /// Apply `f` to the value, keeping the warnings.
    pub fn map<U>(self, f: impl FnOnce(T) -> U) -> Correlated<U> {
        Correlated {
            value: f(self.value),
            warnings: self.warnings,
        }
    }

    /// Append warnings (e.g. from an inner correlation).
    pub fn with_warnings(mut self, more: Vec<RangeWarning>) -> Correlated<T> {
        self.warnings.extend(more);
        self
    }
}

/// One input outside a correlation's validity range.
#[derive(Clone, Debug, PartialEq)]
pub struct RangeWarning {
    /// The correlation, e.g. `Ranz-Marshall sphere`.
    pub correlation: &'static str,
    /// The input, e.g. `Re` or `G`.
    pub input: &'static str,
    /// The value given, in `unit`.
    pub value: f64,
    /// Lower end of the fitted range, in `unit`.
    pub low: f64,
    /// Upper end of the fitted range, in `unit` (may be infinite).
    pub high: f64,
    /// Unit of `value`, `low`, `high` (`""` for dimensionless groups).
    pub unit: &'static str,
}

impl fmt::Display for RangeWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let unit = if self.unit.is_empty() {
            String::new()
        } else {
            format!(" {}", self.unit)
        };
        let range = if self.high.is_infinite() {
            format!("at least {}{unit}", sig(self.low))
        } else {
            format!("{}-{}{unit}", sig(self.low), sig(self.high))
        };
        write!(
            f,
            "{}: {} = {}{unit} is outside the fitted range {range}; the value is an extrapolation",
            self.correlation,
            self.input,
            sig(self.value)
        )
    }
}

/// Four significant figures, without trailing noise; powers of ten for very
/// large or small magnitudes (Reynolds numbers read as 5e5, not 500000).
fn sig(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let magnitude = x.abs().log10().floor() as i32;
    if !(-3..5).contains(&magnitude) {
        let mantissa = format!("{:.3}", x / 10f64.powi(magnitude));
        let mantissa = mantissa.trim_end_matches('0').trim_end_matches('.');
        return format!("{mantissa}e{magnitude}");
    }
    let digits = (3 - magnitude).max(0) as usize;
    let text = format!("{x:.digits$}");
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    }
}

/// Check `value` against `[low, high]` and record a warning when outside.
///
/// A relative slack of 1e-9 keeps unit round-off at a range end (G given in
/// kg/(m^2 s) and checked in kg/(m^2 h)) from raising a warning.
pub(crate) fn check_range(
    warnings: &mut Vec<RangeWarning>,
    correlation: &'static str,
    input: &'static str,
    value: f64,
    (low, high): (f64, f64),
    unit: &'static str,
) {
    const SLACK: f64 = 1e-9;
    if value < low - SLACK * low.abs() || value > high + SLACK * high.abs() {
        warnings.push(RangeWarning {
            correlation,
            input,
            value,
            low,
            high,
            unit,
        });
    }
}

/// Errors from the transfer engine; each names the argument and the limit.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum TransferError {
    /// A length, velocity, area, flow or property that must be positive was not.
    #[error("{name} must be positive, got {value} {unit}")]
    NotPositive {
        name: &'static str,
        value: f64,
        unit: &'static str,
    },
    /// An input outside the range where the formula means anything (not a fit range).
    #[error("{name} = {value} is outside {low}..{high}")]
    OutOfBounds {
        name: &'static str,
        value: f64,
        low: f64,
        high: f64,
    },
    /// Moisture span of the constant-rate period is empty or reversed.
    #[error("initial moisture {x1} must exceed final moisture {x2} (kg water/kg dry solid)")]
    MoistureSpan { x1: f64, x2: f64 },
    /// The air cannot take up water from the surface.
    #[error("no driving force: {0}")]
    NoDrivingForce(String),
    /// A property of air could not be evaluated.
    #[error("air property: {0}")]
    Air(String),
    /// The surface-temperature iteration failed.
    #[error("wet-surface temperature did not converge: {0}")]
    NoConvergence(String),
}

/// Require `value > 0` (and finite).
pub(crate) fn positive(
    name: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, TransferError> {
    if value > 0.0 && value.is_finite() {
        Ok(value)
    } else {
        Err(TransferError::NotPositive { name, value, unit })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn warning_text_is_readable() {
        let w = RangeWarning {
            correlation: "c",
            input: "Re",
            value: 1.0e5,
            low: 5.0e5,
            high: 1.0e8,
            unit: "",
        };
        assert_eq!(
            w.to_string(),
            "c: Re = 1e5 is outside the fitted range 5e5-1e8; the value is an extrapolation"
        );
        let w = RangeWarning {
            correlation: "c",
            input: "G",
            value: 2400.0,
            low: 2450.0,
            high: 29300.0,
            unit: "kg/(m^2 h)",
        };
        assert!(w
            .to_string()
            .contains("G = 2400 kg/(m^2 h) is outside the fitted range 2450-29300 kg/(m^2 h)"));
        let w = RangeWarning {
            correlation: "c",
            input: "Re Pr",
            value: 0.1234,
            low: 0.2,
            high: f64::INFINITY,
            unit: "",
        };
        assert!(
            w.to_string()
                .contains("Re Pr = 0.1234 is outside the fitted range at least 0.2"),
            "{w}"
        );
        let w = RangeWarning {
            correlation: "c",
            input: "T",
            value: 30.0,
            low: 45.0,
            high: 150.0,
            unit: "degC",
        };
        assert!(
            w.to_string()
                .contains("T = 30 degC is outside the fitted range 45-150 degC"),
            "{w}"
        );
    }
}
