//! Drying kinetics: rate curves, drying time, batch test processing and
//! drying stages.
//!
//! The drying rate per exposed area is `R = -(Ls/A) dX/dt` (kg water per m^2
//! per s), with `Ls` the dry-solid mass, `A` the exposed area and `X` the
//! dry-basis moisture. The time to dry from `X1` to `X2` is
//! `t = (Ls/A) * integral_{X2}^{X1} dX / R(X)` (W. L. McCabe, J. C. Smith,
//! P. Harriott, *Unit Operations of Chemical Engineering*, 7th ed., ch. 24;
//! R. E. Treybal, *Mass-Transfer Operations*, 3rd ed., ch. 12).
//!
//! Internal diffusion lives in [`super::diffusion`], thin-layer models in
//! [`super::thin_layer`].

pub mod batch;
pub mod rate_curve;
pub mod stage;

pub use batch::{BatchRun, ConstantRatePeriod, RatePoint};
pub use rate_curve::{
    drying_curve, drying_time, numerical_time, DryingTime, MonotoneCubic, RateCurve,
};
pub use stage::{chain_duration, stages, DryingStage, StageKind};

use thiserror::Error;

use super::integrate::IntegrateError;

/// Why a kinetics calculation failed. Every message names the offending value.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum KineticsError {
    /// A sample mass below the dry-solid mass (negative moisture).
    #[error("mass {} kg at reading {} is below the dry-solid mass {} kg", show(*.mass_kg), .index + 1, show(*.dry_solid_kg))]
    BelowDrySolid {
        index: usize,
        mass_kg: f64,
        dry_solid_kg: f64,
    },
    /// Times must increase strictly.
    #[error("time {} s at reading {} does not follow the previous time {} s (times must increase)", show(*.time_s), .index + 1, show(*.previous_s))]
    TimeNotIncreasing {
        index: usize,
        previous_s: f64,
        time_s: f64,
    },
    /// Too few points for a method.
    #[error("{what} needs at least {needed} points, found {found}")]
    TooFewPoints {
        what: &'static str,
        needed: usize,
        found: usize,
    },
    /// Target moisture at or below equilibrium: the time would be infinite.
    #[error("target moisture {} db is at or below the equilibrium moisture {} db; the drying time would be infinite", show(*.target), show(*.equilibrium))]
    TargetAtOrBelowEquilibrium { target: f64, equilibrium: f64 },
    /// A diffusivity that is zero, negative or not finite.
    #[error("diffusivity {value:e} m^2/s is not positive")]
    NegativeDiffusivity { value: f64 },
    /// Any other argument out of its domain.
    #[error("{name} = {} is out of range: {reason}", show(*.value))]
    OutOfRange {
        name: &'static str,
        value: f64,
        reason: &'static str,
    },
    /// A solver or fit that did not converge.
    #[error("{what} did not converge: {detail}")]
    NoConvergence { what: &'static str, detail: String },
    /// Numerical integration or root finding failed.
    #[error(transparent)]
    Numerics(#[from] IntegrateError),
}

/// A number for a message: up to 6 significant digits, no float noise.
pub fn show(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let magnitude = x.abs().log10().floor() as i32;
    if (-3..7).contains(&magnitude) {
        let decimals = (5 - magnitude).max(0) as usize;
        let text = format!("{x:.decimals$}");
        if text.contains('.') {
            text.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            text
        }
    } else {
        let text = format!("{x:.5e}");
        let (mantissa, exponent) = text.split_once('e').unwrap_or((&text, "0"));
        let mantissa = if mantissa.contains('.') {
            mantissa.trim_end_matches('0').trim_end_matches('.')
        } else {
            mantissa
        };
        format!("{mantissa}e{exponent}")
    }
}

/// `a > b`, false when either is NaN (so `!above(a, b)` catches NaN too).
pub(crate) fn above(a: f64, b: f64) -> bool {
    a > b
}

/// Check that times rise strictly from one reading to the next (a NaN is not
/// a rise); the first that does not is an error naming its index.
pub(crate) fn increasing_times(times_s: &[f64]) -> Result<(), KineticsError> {
    for (i, pair) in times_s.windows(2).enumerate() {
        if !above(pair[1], pair[0]) {
            return Err(KineticsError::TimeNotIncreasing {
                index: i + 1,
                previous_s: pair[0],
                time_s: pair[1],
            });
        }
    }
    Ok(())
}

/// Check that a named value is finite and strictly positive.
pub(crate) fn positive(name: &'static str, value: f64) -> Result<f64, KineticsError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(KineticsError::OutOfRange {
            name,
            value,
            reason: "must be positive and finite",
        })
    }
}

/// Check that a named value is finite and not negative.
pub(crate) fn non_negative(name: &'static str, value: f64) -> Result<f64, KineticsError> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(KineticsError::OutOfRange {
            name,
            value,
            reason: "must be zero or positive and finite",
        })
    }
}
