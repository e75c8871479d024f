//! Dryer models: batch tray and truck dryers, through-circulation deep beds,
//! continuous belt and tunnel dryers (cocurrent and countercurrent, several
//! zones) and direct rotary dryers, each with closed mass and energy balances.
//!
//! All models share one piece of physics, [`product::exchange`]: a wet or
//! drying product surface of area A at temperature Ts exchanging heat and water
//! with a stream of air that passes it once. Heat follows
//! `q = m_da c_s (T_in - Ts) (1 - exp(-NTU_h))` with `NTU_h = h A / (m_da c_s)`,
//! water follows `e = m_da (w_s(Ts) - w_in) (1 - exp(-NTU_m))` with
//! `NTU_m = f(X) k_y A / m_da` and `k_y = h / (c_s Le^(2/3))` (Chilton-Colburn,
//! see docs/methods/transfer.md). `f(X)` is 1 above the critical moisture content
//! and falls to 0 at equilibrium. The product keeps its own temperature, so a
//! preheat period, a constant-rate period near the wet-bulb temperature and a
//! falling-rate period with the product warming towards the air all come out of
//! the same equations. Enthalpies are those of the air engine (ASHRAE reference:
//! dry air and liquid water at 0 degC), so the balances close to round-off.
//!
//! Methods, assumptions and sources: docs/methods/dryers.md.
//!
//! Caution: dryers can hurt people (combustible dust and solvent vapour
//! explosions, fires in overheated product, burns, carbon monoxide from
//! direct-fired heaters, unsafe food). These models size equipment; they do not
//! make it safe. Follow local codes and licensed practice.

pub mod balance;
pub mod batch;
pub mod continuous;
pub mod ergun;
pub mod product;
pub mod rotary;

use std::fmt;

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::AvailableEnergy;

use crate::engine::air::{AirError, AirState};

pub use balance::{Closure, EnergyFlows};

/// The usual cautions, shown with every dryer result.
pub const CAUTIONS: &[&str] = &[
    "Combustible dust and solvent vapour can explode: assess the product and the exhaust, provide explosion venting or suppression where needed.",
    "Overheated product can smoulder and catch fire: respect the product's maximum temperature and keep dryers clean of deposits.",
    "Hot surfaces, air and steam burn: guard them and isolate before entry.",
    "Direct-fired heaters put carbon monoxide and combustion products in the air and the product: monitor them and check food-contact rules.",
    "These figures size equipment; they do not make it safe. Follow local codes and licensed engineering practice.",
];

/// Why a dryer calculation failed, naming the quantity that makes it infeasible.
#[derive(Clone, Debug, PartialEq)]
pub enum DryerError {
    /// An input is outside its physical range.
    Invalid {
        name: &'static str,
        value: f64,
        expected: &'static str,
    },
    /// The target moisture is at or below what the air can reach.
    BelowEquilibrium { target_db: f64, equilibrium_db: f64 },
    /// The air cannot carry the water: it saturates before the product is dry.
    AirSaturates { what: String },
    /// No solution within the iteration or time budget.
    NotConverged { what: &'static str, detail: String },
    /// The humid-air engine refused a state.
    Air(AirError),
}

impl From<AirError> for DryerError {
    fn from(e: AirError) -> Self {
        DryerError::Air(e)
    }
}

impl fmt::Display for DryerError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            DryerError::Invalid {
                name,
                value,
                expected,
            } if name.ends_with("temperature") && value.is_finite() => write!(
                f,
                "`{name}` = {:.2} degC is not valid: expected {expected}",
                value - product::T_REF_K
            ),
            DryerError::Invalid {
                name,
                value,
                expected,
            } => write!(f, "`{name}` = {value} is not valid: expected {expected}"),
            DryerError::BelowEquilibrium { target_db, equilibrium_db } => write!(
                f,
                "target moisture {target_db:.4} db is at or below the equilibrium moisture {equilibrium_db:.4} db of the product in the supply air: this air cannot dry it that far (use drier or hotter air, or a higher target)"
            ),
            DryerError::AirSaturates { what } => write!(f, "the air cannot carry the water: {what}"),
            DryerError::NotConverged { what, detail } => write!(f, "{what} did not converge: {detail}"),
            DryerError::Air(e) => write!(f, "{e}"),
        }
    }
}

impl std::error::Error for DryerError {}

/// Close a recirculation loop: find the exhaust state that, recirculated, gives
/// itself back. `run` maps an assumed exhaust to (result, actual exhaust). Fixed-point
/// iteration with Aitken's delta-squared acceleration on humidity ratio and enthalpy.
pub(crate) fn settle_recirculation<T>(
    start: AirState,
    recirculated: f64,
    mut run: impl FnMut(&AirState) -> Result<(T, AirState), DryerError>,
) -> Result<T, DryerError> {
    let settled = |a: &AirState, b: &AirState| {
        (a.humidity_ratio() - b.humidity_ratio()).abs() <= 1e-13
            && (a.enthalpy().value - b.enthalpy().value).abs() <= 1e-6
    };
    let mut x0 = start;
    for _ in 0..200 {
        let (r1, x1) = run(&x0)?;
        if recirculated == 0.0 || settled(&x0, &x1) {
            return Ok(r1);
        }
        let (r2, x2) = run(&x1)?;
        if settled(&x1, &x2) {
            return Ok(r2);
        }
        let aitken = |a: f64, b: f64, c: f64| {
            let d = c - 2.0 * b + a;
            if d.abs() > 1e-300 {
                a - (b - a).powi(2) / d
            } else {
                c
            }
        };
        let w = aitken(
            x0.humidity_ratio(),
            x1.humidity_ratio(),
            x2.humidity_ratio(),
        );
        let h = aitken(
            x0.enthalpy().value,
            x1.enthalpy().value,
            x2.enthalpy().value,
        );
        x0 = AirState::from_enthalpy_and_w(
            AvailableEnergy::new::<joule_per_kilogram>(h),
            w,
            x2.pressure(),
        )
        .unwrap_or(x2);
    }
    Err(DryerError::NotConverged {
        what: "recirculation loop",
        detail: "the exhaust state did not settle in 400 passes".into(),
    })
}

/// Refuse supply air that cannot take up water: saturated at the temperature a
/// wet surface would take in it.
pub(crate) fn check_drying_air(supply: &AirState, lewis: f64) -> Result<(), DryerError> {
    let tw = product::wet_surface_k(supply, lewis)?;
    let capacity = product::surface_humidity_ratio(tw, supply.p_pascal()) - supply.humidity_ratio();
    if capacity <= 1e-7 {
        return Err(DryerError::AirSaturates {
            what: format!(
                "the supply air at {:.1} degC and {:.0} % relative humidity is saturated and takes up no water: heat it or use drier air",
                supply.t_kelvin() - product::T_REF_K,
                supply.relative_humidity() * 100.0
            ),
        });
    }
    Ok(())
}

/// Check that `value` is finite and positive.
pub(crate) fn positive(name: &'static str, value: f64) -> Result<f64, DryerError> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(DryerError::Invalid {
            name,
            value,
            expected: "a positive value",
        })
    }
}

/// Check that `value` is finite and not negative.
pub(crate) fn non_negative(name: &'static str, value: f64) -> Result<f64, DryerError> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(DryerError::Invalid {
            name,
            value,
            expected: "zero or a positive value",
        })
    }
}
#[cfg(test)]
mod tests;
