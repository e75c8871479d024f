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
pub use rate_curve::{drying_time, numerical_time, DryingTime, MonotoneCubic, RateCurve};
pub use stage::{chain_duration, stages, DryingStage, StageKind};

use thiserror::Error;

use super::integrate::IntegrateError;

/// Why a kinetics calculation failed. Every message names the offending value.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum KineticsError {
    /// A sample mass below the dry-solid mass (negative moisture).
    #[error("mass {mass_kg} kg at point {index} is below the dry-solid mass {dry_solid_kg} kg")]
    BelowDrySolid { index: usize, mass_kg: f64, dry_solid_kg: f64 },
    /// Times must increase strictly.
    #[error("time {time_s} s at point {index} does not follow the previous time {previous_s} s (times must increase)")]
    TimeNotIncreasing { index: usize, previous_s: f64, time_s: f64 },
    /// Too few points for a method.
    #[error("{what} needs at least {needed} points, found {found}")]
    TooFewPoints { what: &'static str, needed: usize, found: usize },
    /// Target moisture at or below equilibrium: the time would be infinite.
    #[error("target moisture {target} db is at or below the equilibrium moisture {equilibrium} db; the drying time would be infinite")]
    TargetAtOrBelowEquilibrium { target: f64, equilibrium: f64 },
    /// A diffusivity that is zero, negative or not finite.
    #[error("diffusivity {value} m^2/s is not positive")]
    NegativeDiffusivity { value: f64 },
    /// Any other argument out of its domain.
    #[error("{name} = {value} is out of range: {reason}")]
    OutOfRange { name: &'static str, value: f64, reason: &'static str },
    /// A solver or fit that did not converge.
    #[error("{what} did not converge: {detail}")]
    NoConvergence { what: &'static str, detail: String },
    /// Numerical integration or root finding failed.
    #[error(transparent)]
    Numerics(#[from] IntegrateError),
}

/// Check that a named value is finite and strictly positive.
pub(crate) fn positive(name: &'static str, value: f64) -> Result<f64, KineticsError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(KineticsError::OutOfRange { name, value, reason: "must be positive and finite" })
    }
}

/// Check that a named value is finite and not negative.
pub(crate) fn non_negative(name: &'static str, value: f64) -> Result<f64, KineticsError> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(KineticsError::OutOfRange { name, value, reason: "must be zero or positive and finite" })
    }
}
