//! Pressure drop through a packed bed by the Ergun equation.
//!
//! `dP/L = 150 mu u (1-e)^2 / (e^3 d^2) + 1.75 rho u^2 (1-e) / (e^3 d)`, with u the
//! superficial velocity, e the bed voidage and d the particle diameter (for
//! non-spheres the equivalent-volume diameter times sphericity).
//! Source: S. Ergun (1952), "Fluid flow through packed columns", Chemical
//! Engineering Progress 48(2), 89-94. Validity: packed beds of rigid particles,
//! voidage about 0.3-0.6, any particle Reynolds number.

use uom::si::f64::{DynamicViscosity, Length, MassDensity, Pressure, Velocity};
use uom::si::pressure::pascal;

use super::{positive, DryerError};

/// Ergun pressure drop across a bed of depth `depth`.
pub fn pressure_drop(
    superficial_velocity: Velocity,
    depth: Length,
    particle_diameter: Length,
    voidage: f64,
    density: MassDensity,
    viscosity: DynamicViscosity,
) -> Result<Pressure, DryerError> {
    let u = positive("superficial velocity", superficial_velocity.value)?;
    let l = positive("bed depth", depth.value)?;
    let d = positive("particle diameter", particle_diameter.value)?;
    if !(voidage > 0.0 && voidage < 1.0) {
        return Err(DryerError::Invalid {
            name: "voidage",
            value: voidage,
            expected: "a fraction between 0 and 1",
        });
    }
    let e3 = voidage.powi(3);
    let viscous = 150.0 * viscosity.value * u * (1.0 - voidage).powi(2) / (e3 * d * d);
    let inertial = 1.75 * density.value * u * u * (1.0 - voidage) / (e3 * d);
    Ok(Pressure::new::<pascal>((viscous + inertial) * l))
}

#[cfg(test)]
mod tests {
    use super::*;
    use uom::si::dynamic_viscosity::pascal_second;
    use uom::si::length::meter;
    use uom::si::mass_density::kilogram_per_cubic_meter;
    use uom::si::velocity::meter_per_second;

    /// Limits of the equation: at low velocity the viscous (Blake-Kozeny) term
    /// alone, at high velocity the inertial (Burke-Plummer) term alone.
    #[test]
    fn viscous_and_inertial_limits() {
        let p = |u: f64| {
            pressure_drop(
                Velocity::new::<meter_per_second>(u),
                Length::new::<meter>(1.0),
                Length::new::<meter>(0.005),
                0.4,
                MassDensity::new::<kilogram_per_cubic_meter>(1.0),
                DynamicViscosity::new::<pascal_second>(2e-5),
            )
            .map(|p| p.value)
            .unwrap_or(f64::NAN)
        };
        let blake_kozeny = 150.0 * 2e-5 * 1e-6 * 0.36 / (0.064 * 0.005 * 0.005);
        assert!((p(1e-6) / blake_kozeny - 1.0).abs() < 1e-3);
        let burke_plummer = 1.75 * 1.0 * 1e4 * 0.6 / (0.064 * 0.005);
        assert!((p(100.0) / burke_plummer - 1.0).abs() < 1e-2);
    }

    #[test]
    fn rejects_bad_voidage() {
        let r = pressure_drop(
            Velocity::new::<meter_per_second>(1.0),
            Length::new::<meter>(1.0),
            Length::new::<meter>(0.005),
            1.2,
            MassDensity::new::<kilogram_per_cubic_meter>(1.0),
            DynamicViscosity::new::<pascal_second>(2e-5),
        );
        assert!(matches!(
            r,
            Err(DryerError::Invalid {
                name: "voidage",
                ..
            })
        ));
    }
}
