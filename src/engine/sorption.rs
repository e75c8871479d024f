//! Product equilibrium: sorption isotherms, equilibrium moisture content and
//! its inverse, free moisture, isosteric heat, materials, and isotherm fitting.
//!
//! Moisture contents are dry-basis fractions (kg water / kg dry solid) in plain
//! `f64` named `x_db`; water activity `aw` is a fraction 0..1; temperatures
//! cross the boundary as uom `ThermodynamicTemperature`. Equations and sources
//! are in `docs/methods/sorption.md`.

mod fitting;
mod heat;
mod material;
mod models;

use std::fmt;

use uom::si::f64::ThermodynamicTemperature;
use uom::si::thermodynamic_temperature::kelvin;

pub use fitting::{fit_isotherm, IsothermFit};
pub use heat::{isosteric_heat, isosteric_heat_from_isotherms, IsostericHeat};
pub use material::{demo_materials, Geometry, Material};
pub use models::{gab_constants, IsothermKind, Sign, ALL_KINDS, GAS_CONSTANT, WATER_MOLAR_MASS};

use crate::engine::fit::FitError;

/// Why a sorption calculation failed; each message names the argument and the limit.
#[derive(Clone, Debug, PartialEq)]
pub enum SorptionError {
    /// Water activity outside 0..1.
    ActivityOutOfRange { aw: f64 },
    /// A moisture content that is negative or not finite.
    BadMoisture { x_db: f64 },
    /// A temperature at or below absolute zero, or not finite.
    BadTemperature { t_k: f64 },
    /// A model parameter violates its sign rule.
    BadParameter {
        model: &'static str,
        name: &'static str,
        value: f64,
        need: &'static str,
    },
    /// Wrong number of parameters for the model.
    ParameterCount {
        model: &'static str,
        expected: usize,
        found: usize,
    },
    /// The model gives no finite moisture here.
    Undefined {
        model: &'static str,
        aw: f64,
        t_k: f64,
    },
    /// The moisture is outside what the isotherm can give.
    MoistureOutOfRange {
        model: &'static str,
        x_db: f64,
        low: f64,
        high: f64,
    },
    /// The isotherm has no temperature dependence, so no isosteric heat.
    NoTemperatureDependence { model: &'static str },
    /// Data given to a fit are inconsistent.
    BadData(String),
    /// The least-squares fit failed; `hint` may add model-specific advice.
    Fit {
        model: &'static str,
        error: FitError,
        hint: String,
    },
}

impl fmt::Display for SorptionError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SorptionError::ActivityOutOfRange { aw } => {
                write!(f, "water activity {aw} is outside 0..1 (write 45 % or 0.45, not 45)")
            }
            SorptionError::BadMoisture { x_db } => write!(f, "moisture content {x_db} kg/kg must be zero or positive"),
            SorptionError::BadTemperature { t_k } => write!(f, "temperature {t_k} K must be above absolute zero"),
            SorptionError::BadParameter { model, name, value, need } => {
                write!(f, "{model} parameter {name} = {value} must be {need}")
            }
            SorptionError::ParameterCount { model, expected, found } => {
                write!(f, "{model} takes {expected} parameters, {found} given")
            }
            SorptionError::Undefined { model, aw, t_k } => write!(
                f,
                "the {model} isotherm gives no finite moisture at aw = {aw} and {:.2} degC (outside its range)",
                t_k - 273.15
            ),
            SorptionError::MoistureOutOfRange { model, x_db, low, high } => write!(
                f,
                "moisture {x_db} kg/kg is outside what the {model} isotherm gives at this temperature ({low:.4} to {high:.4} kg/kg); \
                 above it the product holds free water (aw = 1)"
            ),
            SorptionError::NoTemperatureDependence { model } => write!(
                f,
                "this {model} isotherm has no temperature dependence, so its isosteric heat cannot be found; \
                 fit isotherms measured at two or more temperatures"
            ),
            SorptionError::BadData(text) => f.write_str(text),
            SorptionError::Fit { model, error, hint } => write!(f, "fitting {model}: {error}{hint}"),
        }
    }
}

impl std::error::Error for SorptionError {}

/// A number with the validity warnings that came with it.
#[derive(Clone, Debug, PartialEq)]
pub struct Reading {
    pub value: f64,
    pub warnings: Vec<String>,
}

/// A sorption isotherm: a model, its parameters and its temperature frame.
#[derive(Clone, Debug, PartialEq)]
pub struct Isotherm {
    pub kind: IsothermKind,
    /// Parameters in the order of `kind.param_names()`.
    pub params: Vec<f64>,
    /// Reference temperature, kelvin: the GAB `C`, `K` reference, and for an
    /// isothermal isotherm the temperature it was measured at.
    pub t_ref_k: f64,
    /// True when the parameters are known at `t_ref_k` only (fitted to data at
    /// one temperature): the model is then used at `t_ref_k` whatever the
    /// temperature asked for, with a warning.
    pub isothermal: bool,
}

impl Isotherm {
    /// An isotherm with checked parameters.
    ///
    /// `t_ref` is the GAB reference temperature or, for models without a
    /// temperature term, the temperature of the data (used in warnings).
    pub fn new(
        kind: IsothermKind,
        params: &[f64],
        t_ref: ThermodynamicTemperature,
    ) -> Result<Isotherm, SorptionError> {
        check_params(kind, params)?;
        let t_ref_k = checked_kelvin(t_ref)?;
        Ok(Isotherm {
            kind,
            params: params.to_vec(),
            t_ref_k,
            isothermal: !kind.has_temperature(),
        })
    }

    /// Mark the isotherm as known only at its reference temperature.
    pub fn at_one_temperature(mut self) -> Isotherm {
        self.isothermal = true;
        self
    }

    /// Equilibrium moisture content (kg/kg dry basis) at water activity `aw`
    /// (0..1) and temperature `t`, with warnings outside the model's range.
    pub fn equilibrium_moisture(
        &self,
        aw: f64,
        t: ThermodynamicTemperature,
    ) -> Result<Reading, SorptionError> {
        check_activity(aw)?;
        let t_k = checked_kelvin(t)?;
        let x_db = self.moisture_raw(aw, t_k);
        if !x_db.is_finite() {
            return Err(SorptionError::Undefined {
                model: self.kind.name(),
                aw,
                t_k,
            });
        }
        if x_db < 0.0 {
            // A negative equilibrium moisture is never physical: refuse it rather than show it.
            return Err(SorptionError::Undefined {
                model: self.kind.name(),
                aw,
                t_k,
            });
        }
        let warnings = self.range_warnings(aw, t_k);
        Ok(Reading {
            value: x_db,
            warnings,
        })
    }

    /// Water activity (equilibrium relative humidity, 0..1) of a product at
    /// moisture `x_db` (kg/kg dry basis) and temperature `t`: the inverse of
    /// the isotherm, by bisection on a bracket of `aw` (the isotherm rises
    /// monotonically with `aw`; bisection cannot fail to converge on it).
    pub fn water_activity(
        &self,
        x_db: f64,
        t: ThermodynamicTemperature,
    ) -> Result<Reading, SorptionError> {
        if !x_db.is_finite() || x_db < 0.0 {
            return Err(SorptionError::BadMoisture { x_db });
        }
        let t_k = checked_kelvin(t)?;
        let (lo, hi) = (0.0, self.activity_ceiling(t_k));
        let (x_lo, x_hi) = (self.moisture_raw(lo, t_k), self.moisture_raw(hi, t_k));
        if x_db > x_hi || x_db < x_lo || x_hi.is_nan() {
            return Err(SorptionError::MoistureOutOfRange {
                model: self.kind.name(),
                x_db,
                low: x_lo.max(0.0),
                high: x_hi,
            });
        }
        let aw = bisect(|aw| self.moisture_raw(aw, t_k) - x_db, lo, hi);
        let warnings = self.range_warnings(aw, t_k);
        Ok(Reading {
            value: aw,
            warnings,
        })
    }

    /// Free moisture `X - X_eq` (kg/kg dry basis) of a product at `x_db` in air
    /// of activity `aw` at `t`; negative when the product would take up water.
    pub fn free_moisture(
        &self,
        x_db: f64,
        aw: f64,
        t: ThermodynamicTemperature,
    ) -> Result<Reading, SorptionError> {
        if !x_db.is_finite() || x_db < 0.0 {
            return Err(SorptionError::BadMoisture { x_db });
        }
        let eq = self.equilibrium_moisture(aw, t)?;
        Ok(Reading {
            value: x_db - eq.value,
            warnings: eq.warnings,
        })
    }

    /// Model value with the isothermal rule applied; no checks.
    pub fn moisture_raw(&self, aw: f64, t_k: f64) -> f64 {
        let t_eval = if self.isothermal { self.t_ref_k } else { t_k };
        self.kind.moisture(&self.params, aw, t_eval, self.t_ref_k)
    }

    /// Highest activity at which the model is finite: just below 1, or below
    /// the GAB pole at `1/K` when `K > 1`.
    fn activity_ceiling(&self, t_k: f64) -> f64 {
        let top = 1.0 - 1e-12;
        if self.kind != IsothermKind::Gab {
            return top;
        }
        let t_eval = if self.isothermal { self.t_ref_k } else { t_k };
        let (_, k) = gab_constants(&self.params, t_eval, self.t_ref_k);
        if k > 1.0 {
            (1.0 / k) * (1.0 - 1e-12)
        } else {
            top
        }
    }

    fn range_warnings(&self, aw: f64, t_k: f64) -> Vec<String> {
        let mut out = Vec::new();
        let (lo, hi) = self.kind.activity_range();
        if aw < lo || aw > hi {
            out.push(format!(
                "aw = {aw:.3} is outside the usual range of the {} isotherm ({lo}..{hi})",
                self.kind.name()
            ));
        }
        if self.isothermal && (t_k - self.t_ref_k).abs() > 0.5 {
            out.push(format!(
                "this {} isotherm is known at {:.1} degC only and is used at {:.1} degC without temperature correction",
                self.kind.name(),
                self.t_ref_k - 273.15,
                t_k - 273.15
            ));
        }
        out
    }
}

/// Check a parameter vector against the model's count and sign rules.
pub fn check_params(kind: IsothermKind, params: &[f64]) -> Result<(), SorptionError> {
    let names = kind.param_names();
    if params.len() != names.len() {
        return Err(SorptionError::ParameterCount {
            model: kind.name(),
            expected: names.len(),
            found: params.len(),
        });
    }
    for ((&value, &name), &sign) in params.iter().zip(names).zip(kind.param_signs()) {
        let need = match sign {
            Sign::Positive if value.is_nan() || value <= 0.0 => "positive",
            Sign::AtLeastOne if value.is_nan() || value < 1.0 => "at least 1",
            _ if !value.is_finite() => "a finite number",
            _ => continue,
        };
        return Err(SorptionError::BadParameter {
            model: kind.name(),
            name,
            value,
            need,
        });
    }
    Ok(())
}

/// Water activity must be a fraction in 0..1.
pub fn check_activity(aw: f64) -> Result<(), SorptionError> {
    if (0.0..=1.0).contains(&aw) {
        Ok(())
    } else {
        Err(SorptionError::ActivityOutOfRange { aw })
    }
}

fn checked_kelvin(t: ThermodynamicTemperature) -> Result<f64, SorptionError> {
    let t_k = t.get::<kelvin>();
    if t_k.is_finite() && t_k > 0.0 {
        Ok(t_k)
    } else {
        Err(SorptionError::BadTemperature { t_k })
    }
}

/// Root of an increasing function on `[lo, hi]` with `f(lo) <= 0 <= f(hi)`,
/// by bisection to 1e-14 in the argument.
fn bisect(f: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> f64 {
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-14 {
            break;
        }
    }
    0.5 * (lo + hi)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn celsius(t: f64) -> ThermodynamicTemperature {
        ThermodynamicTemperature::new::<kelvin>(t + 273.15)
    }

    /// A GAB isotherm with invented, typical-food parameters and Arrhenius terms.
    fn gab_food() -> Isotherm {
        Isotherm::new(
            IsothermKind::Gab,
            &[0.08, 10.0, 0.85, 8_000.0, 1_500.0],
            celsius(40.0),
        )
        .unwrap()
    }

    /// Temperature-dependent examples (invented parameters of typical size).
    fn temperature_models() -> Vec<Isotherm> {
        let t = celsius(25.0);
        vec![
            gab_food(),
            Isotherm::new(IsothermKind::ModifiedOswin, &[0.15, -0.001, 2.5], t).unwrap(),
            Isotherm::new(IsothermKind::Henderson, &[2e-2, 1.8], t).unwrap(),
            Isotherm::new(IsothermKind::ModifiedHenderson, &[0.1, 50.0, 1.8], t).unwrap(),
            Isotherm::new(IsothermKind::ModifiedHalsey, &[-3.0, -0.01, 1.6], t).unwrap(),
            Isotherm::new(IsothermKind::ModifiedChungPfost, &[600.0, 50.0, 15.0], t).unwrap(),
        ]
    }

    /// Common practice: a product in perfectly dry air holds no water.
    #[test]
    fn dry_air_gives_zero_moisture() {
        let t = celsius(40.0);
        for iso in temperature_models()
            .iter()
            .filter(|i| i.kind != IsothermKind::ModifiedChungPfost)
        {
            assert_eq!(
                iso.equilibrium_moisture(0.0, t).unwrap().value,
                0.0,
                "{:?}",
                iso.kind
            );
        }
    }

    /// Common practice: equilibrium moisture rises monotonically with aw.
    #[test]
    fn moisture_rises_with_activity() {
        let t = celsius(40.0);
        for iso in temperature_models() {
            let xs: Vec<f64> = (1..95)
                .map(|i| iso.moisture_raw(i as f64 / 100.0, 313.15))
                .collect();
            assert!(xs.windows(2).all(|w| w[1] > w[0]), "{:?}", iso.kind);
            assert!(iso.equilibrium_moisture(0.5, t).is_ok());
        }
    }

    /// Common practice: hygroscopic products hold more water at lower
    /// temperature for the same relative humidity.
    #[test]
    fn cooler_product_holds_more_water() {
        for iso in temperature_models() {
            for aw in [0.2, 0.5, 0.8] {
                let cool = iso.equilibrium_moisture(aw, celsius(20.0)).unwrap().value;
                let warm = iso.equilibrium_moisture(aw, celsius(60.0)).unwrap().value;
                assert!(cool > warm, "{:?} at aw {aw}: {cool} <= {warm}", iso.kind);
            }
        }
    }

    #[test]
    fn activity_inverts_moisture() {
        for iso in temperature_models() {
            for aw in [0.25, 0.5, 0.75] {
                let x = iso.equilibrium_moisture(aw, celsius(35.0)).unwrap().value;
                let back = iso.water_activity(x, celsius(35.0)).unwrap().value;
                assert!((back - aw).abs() < 1e-10, "{:?}: {back} vs {aw}", iso.kind);
            }
        }
    }

    #[test]
    fn bad_inputs_are_errors() {
        let iso = gab_food();
        assert_eq!(
            iso.equilibrium_moisture(45.0, celsius(40.0)).unwrap_err(),
            SorptionError::ActivityOutOfRange { aw: 45.0 }
        );
        assert!(iso.equilibrium_moisture(-0.1, celsius(40.0)).is_err());
        assert!(matches!(
            iso.water_activity(5.0, celsius(40.0)),
            Err(SorptionError::MoistureOutOfRange { .. })
        ));
        assert!(matches!(
            iso.water_activity(-0.1, celsius(40.0)),
            Err(SorptionError::BadMoisture { .. })
        ));
        let bad = Isotherm::new(IsothermKind::Oswin, &[-0.1, 0.4], celsius(40.0)).unwrap_err();
        assert!(bad.to_string().contains("must be positive"), "{bad}");
        assert!(Isotherm::new(IsothermKind::Bet, &[0.1], celsius(40.0)).is_err());
        // BET diverges at aw = 1: an error, not infinity.
        let bet = Isotherm::new(IsothermKind::Bet, &[0.06, 10.0], celsius(40.0)).unwrap();
        assert!(matches!(
            bet.equilibrium_moisture(1.0, celsius(40.0)),
            Err(SorptionError::Undefined { .. })
        ));
    }

    #[test]
    fn out_of_range_activity_warns() {
        let bet = Isotherm::new(IsothermKind::Bet, &[0.06, 10.0], celsius(40.0)).unwrap();
        assert!(bet
            .equilibrium_moisture(0.3, celsius(40.0))
            .unwrap()
            .warnings
            .is_empty());
        assert_eq!(
            bet.equilibrium_moisture(0.8, celsius(40.0))
                .unwrap()
                .warnings
                .len(),
            1
        );
    }

    #[test]
    fn isothermal_isotherm_warns_away_from_its_temperature() {
        let iso = Isotherm::new(
            IsothermKind::Gab,
            &[0.08, 10.0, 0.85, 0.0, 0.0],
            celsius(40.0),
        )
        .unwrap()
        .at_one_temperature();
        let same = iso.equilibrium_moisture(0.5, celsius(40.0)).unwrap();
        let other = iso.equilibrium_moisture(0.5, celsius(60.0)).unwrap();
        assert_eq!(same.value, other.value);
        assert!(same.warnings.is_empty());
        assert!(other.warnings[0].contains("known at 40.0 degC only"));
    }

    #[test]
    fn free_moisture_is_the_gap_to_equilibrium() {
        let iso = gab_food();
        let eq = iso.equilibrium_moisture(0.3, celsius(50.0)).unwrap().value;
        let free = iso.free_moisture(0.5, 0.3, celsius(50.0)).unwrap().value;
        assert!((free - (0.5 - eq)).abs() < 1e-15);
    }
}
