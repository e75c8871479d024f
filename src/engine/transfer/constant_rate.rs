//! The constant-rate drying period: its duration from the drying rate of a
//! freely wet surface.
//!
//! While the surface stays wet the rate per area R_c is fixed by the air, so
//! the time to go from moisture X1 to X2 (dry basis) is
//! t = (L_s / A) (X1 - X2) / R_c, with L_s / A the dry-solid load per exposed
//! area. Source: Geankoplis, *Transport Processes and Separation Process
//! Principles*, section 9.5 (time of drying, constant-rate period); McCabe,
//! Smith and Harriott, *Unit Operations of Chemical Engineering*, ch. 24.

use uom::si::areal_mass_density::kilogram_per_square_meter;
use uom::si::f64::{ArealMassDensity, MassFlux, Time};
use uom::si::mass_flux::kilogram_per_square_meter_second;
use uom::si::time::second;

use super::{positive, TransferError};

/// Duration of the constant-rate period, t = (L_s/A)(X1 - X2)/R_c [s].
///
/// `load` is the dry-solid mass per exposed drying area (kg dry solid/m^2),
/// `x1_db` and `x2_db` the moisture contents at start and end, dry basis
/// (kg water/kg dry solid), `rate` the constant drying rate R_c. Errors when
/// the load is not positive, the moistures are negative or not decreasing, or
/// the rate is not positive (air that cannot take up water).
pub fn constant_rate_time(
    load: ArealMassDensity,
    x1_db: f64,
    x2_db: f64,
    rate: MassFlux,
) -> Result<Time, TransferError> {
    let ls_a = positive(
        "dry-solid load per area",
        load.get::<kilogram_per_square_meter>(),
        "kg/m^2",
    )?;
    if x2_db.is_nan() || x2_db < 0.0 || !x1_db.is_finite() {
        return Err(TransferError::OutOfBounds {
            name: "moisture content",
            value: x2_db,
            low: 0.0,
            high: f64::INFINITY,
        });
    }
    if x1_db <= x2_db {
        return Err(TransferError::MoistureSpan {
            x1: x1_db,
            x2: x2_db,
        });
    }
    let rc = rate.get::<kilogram_per_square_meter_second>();
    if rc.is_nan() || rc <= 0.0 || rc.is_infinite() {
        return Err(TransferError::NoDrivingForce(format!(
            "the drying rate is {rc} kg/(m^2 s); the surface does not dry under this air"
        )));
    }
    Ok(Time::new::<second>(ls_a * (x1_db - x2_db) / rc))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn load(x: f64) -> ArealMassDensity {
        ArealMassDensity::new::<kilogram_per_square_meter>(x)
    }
    fn rate_per_h(x: f64) -> MassFlux {
        MassFlux::new::<kilogram_per_square_meter_second>(x / 3600.0)
    }

    /// Geankoplis, Example 9.5-1 (from memory): a solid dried from X1 = 0.38
    /// to X2 = 0.25 in the constant-rate period at R_c = 1.51 kg/(m^2 h) with
    /// L_s/A = 21.5 kg/m^2 takes about 1.85 h. The recalled inputs are
    /// rounded, so 2 % tolerance.
    #[test]
    fn textbook_constant_rate_time() {
        let t = constant_rate_time(load(21.5), 0.38, 0.25, rate_per_h(1.51)).unwrap();
        let hours = t.get::<second>() / 3600.0;
        assert!((hours - 1.85).abs() < 0.02 * 1.85, "{hours}");
    }

    #[test]
    fn bad_inputs_are_errors() {
        let e = constant_rate_time(load(20.0), 0.5, 1.6, rate_per_h(1.0)).unwrap_err();
        assert!(e.to_string().contains("must exceed final moisture"), "{e}");
        let e = constant_rate_time(load(20.0), 1.6, 0.5, rate_per_h(0.0)).unwrap_err();
        assert!(e.to_string().starts_with("no driving force"), "{e}");
        let e = constant_rate_time(load(0.0), 1.6, 0.5, rate_per_h(1.0)).unwrap_err();
        assert!(
            e.to_string().contains("load per area must be positive"),
            "{e}"
        );
        assert!(constant_rate_time(load(20.0), 1.6, -0.1, rate_per_h(1.0)).is_err());
        assert!(constant_rate_time(load(20.0), f64::NAN, 0.1, rate_per_h(1.0)).is_err());
    }
}
