//! Dimensionless groups (Reynolds, Prandtl, Schmidt, Nusselt, Sherwood) and
//! the mass velocity G of an air stream.
//!
//! Definitions as in any heat-transfer text, e.g. Incropera and DeWitt,
//! *Fundamentals of Heat and Mass Transfer*, ch. 6. Lengths are the
//! characteristic length the correlation that uses the group names.

use uom::si::area::square_meter;
use uom::si::diffusion_coefficient::square_meter_per_second;
use uom::si::dynamic_viscosity::pascal_second;
use uom::si::f64::{
    Area, DiffusionCoefficient, DynamicViscosity, HeatTransfer, Length, MassDensity, MassFlux,
    MassRate, SpecificHeatCapacity, ThermalConductivity, Velocity, VolumeRate,
};
use uom::si::heat_transfer::watt_per_square_meter_kelvin;
use uom::si::length::meter;
use uom::si::mass_density::kilogram_per_cubic_meter;
use uom::si::mass_flux::kilogram_per_square_meter_second;
use uom::si::mass_rate::kilogram_per_second;
use uom::si::specific_heat_capacity::joule_per_kilogram_kelvin;
use uom::si::thermal_conductivity::watt_per_meter_kelvin;
use uom::si::velocity::meter_per_second;
use uom::si::volume_rate::cubic_meter_per_second;

use super::{positive, TransferError};

fn m(l: Length) -> f64 {
    l.get::<meter>()
}
fn kg_m3(rho: MassDensity) -> f64 {
    rho.get::<kilogram_per_cubic_meter>()
}
fn pa_s(mu: DynamicViscosity) -> f64 {
    mu.get::<pascal_second>()
}
fn w_mk(k: ThermalConductivity) -> f64 {
    k.get::<watt_per_meter_kelvin>()
}
fn m2_s(d: DiffusionCoefficient) -> f64 {
    d.get::<square_meter_per_second>()
}

/// Reynolds number Re = rho v L / mu (inertial over viscous forces).
///
/// `length` is the characteristic length of the correlation (plate length,
/// sphere or cylinder diameter, particle diameter, nozzle diameter).
/// Errors when any input is not positive.
pub fn reynolds(
    density: MassDensity,
    velocity: Velocity,
    length: Length,
    viscosity: DynamicViscosity,
) -> Result<f64, TransferError> {
    let rho = positive("density", kg_m3(density), "kg/m^3")?;
    let v = positive("velocity", velocity.get::<meter_per_second>(), "m/s")?;
    let l = positive("length", m(length), "m")?;
    let mu = positive("viscosity", pa_s(viscosity), "Pa s")?;
    Ok(rho * v * l / mu)
}

/// Prandtl number Pr = cp mu / k (momentum over thermal diffusivity).
pub fn prandtl(
    specific_heat: SpecificHeatCapacity,
    viscosity: DynamicViscosity,
    conductivity: ThermalConductivity,
) -> Result<f64, TransferError> {
    let cp = positive(
        "specific heat",
        specific_heat.get::<joule_per_kilogram_kelvin>(),
        "J/(kg K)",
    )?;
    let mu = positive("viscosity", pa_s(viscosity), "Pa s")?;
    let k = positive("thermal conductivity", w_mk(conductivity), "W/(m K)")?;
    Ok(cp * mu / k)
}

/// Schmidt number Sc = mu / (rho D) (momentum over mass diffusivity).
pub fn schmidt(
    viscosity: DynamicViscosity,
    density: MassDensity,
    diffusivity: DiffusionCoefficient,
) -> Result<f64, TransferError> {
    let mu = positive("viscosity", pa_s(viscosity), "Pa s")?;
    let rho = positive("density", kg_m3(density), "kg/m^3")?;
    let d = positive("diffusivity", m2_s(diffusivity), "m^2/s")?;
    Ok(mu / (rho * d))
}

/// Nusselt number Nu = h L / k (dimensionless heat-transfer coefficient).
pub fn nusselt(
    h: HeatTransfer,
    length: Length,
    conductivity: ThermalConductivity,
) -> Result<f64, TransferError> {
    let h = positive(
        "heat-transfer coefficient",
        h.get::<watt_per_square_meter_kelvin>(),
        "W/(m^2 K)",
    )?;
    let l = positive("length", m(length), "m")?;
    let k = positive("thermal conductivity", w_mk(conductivity), "W/(m K)")?;
    Ok(h * l / k)
}

/// Sherwood number Sh = k_c L / D (dimensionless mass-transfer coefficient),
/// with k_c the mass-transfer coefficient on a concentration basis [m/s].
pub fn sherwood(
    k_c: Velocity,
    length: Length,
    diffusivity: DiffusionCoefficient,
) -> Result<f64, TransferError> {
    let kc = positive(
        "mass-transfer coefficient",
        k_c.get::<meter_per_second>(),
        "m/s",
    )?;
    let l = positive("length", m(length), "m")?;
    let d = positive("diffusivity", m2_s(diffusivity), "m^2/s")?;
    Ok(kc * l / d)
}

/// Heat-transfer coefficient from a Nusselt number: h = Nu k / L [W/(m^2 K)].
pub fn h_from_nusselt(
    nu: f64,
    length: Length,
    conductivity: ThermalConductivity,
) -> Result<HeatTransfer, TransferError> {
    let nu = positive("Nusselt number", nu, "")?;
    let l = positive("length", m(length), "m")?;
    let k = positive("thermal conductivity", w_mk(conductivity), "W/(m K)")?;
    Ok(HeatTransfer::new::<watt_per_square_meter_kelvin>(
        nu * k / l,
    ))
}

/// Mass velocity G = rho v [kg/(m^2 s)] of humid air of density `density`
/// (mass of dry air plus vapour per volume) moving at `velocity`.
pub fn mass_velocity(density: MassDensity, velocity: Velocity) -> Result<MassFlux, TransferError> {
    let rho = positive("density", kg_m3(density), "kg/m^3")?;
    let v = positive("velocity", velocity.get::<meter_per_second>(), "m/s")?;
    Ok(MassFlux::new::<kilogram_per_square_meter_second>(rho * v))
}

/// Mass velocity G = m_dot / A [kg/(m^2 s)] from a mass flow through a
/// free-flow (duct or channel) area.
pub fn mass_velocity_from_flow(flow: MassRate, area: Area) -> Result<MassFlux, TransferError> {
    let w = positive("mass flow", flow.get::<kilogram_per_second>(), "kg/s")?;
    let a = positive("area", area.get::<square_meter>(), "m^2")?;
    Ok(MassFlux::new::<kilogram_per_square_meter_second>(w / a))
}

/// Mean velocity v = Q / A [m/s] from a volume flow through a free-flow area.
pub fn velocity_from_volume_flow(flow: VolumeRate, area: Area) -> Result<Velocity, TransferError> {
    let q = positive("volume flow", flow.get::<cubic_meter_per_second>(), "m^3/s")?;
    let a = positive("area", area.get::<square_meter>(), "m^2")?;
    Ok(Velocity::new::<meter_per_second>(q / a))
}

/// Velocity v = G / rho [m/s] from a mass velocity and the humid-air density.
pub fn velocity_from_mass_velocity(
    g: MassFlux,
    density: MassDensity,
) -> Result<Velocity, TransferError> {
    let g = positive(
        "mass velocity",
        g.get::<kilogram_per_square_meter_second>(),
        "kg/(m^2 s)",
    )?;
    let rho = positive("density", kg_m3(density), "kg/m^3")?;
    Ok(Velocity::new::<meter_per_second>(g / rho))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn air_like() -> (
        MassDensity,
        DynamicViscosity,
        ThermalConductivity,
        SpecificHeatCapacity,
    ) {
        (
            MassDensity::new::<kilogram_per_cubic_meter>(1.2),
            DynamicViscosity::new::<pascal_second>(1.8e-5),
            ThermalConductivity::new::<watt_per_meter_kelvin>(0.026),
            SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(1006.0),
        )
    }

    #[test]
    fn groups_follow_their_definitions() {
        let (rho, mu, k, cp) = air_like();
        let re = reynolds(
            rho,
            Velocity::new::<meter_per_second>(3.0),
            Length::new::<meter>(0.5),
            mu,
        )
        .unwrap();
        assert!((re - 1.2 * 3.0 * 0.5 / 1.8e-5).abs() < 1e-6);
        let pr = prandtl(cp, mu, k).unwrap();
        assert!((pr - 1006.0 * 1.8e-5 / 0.026).abs() < 1e-12);
        let d = DiffusionCoefficient::new::<square_meter_per_second>(2.5e-5);
        assert!((schmidt(mu, rho, d).unwrap() - 0.6).abs() < 1e-12);
        let h = HeatTransfer::new::<watt_per_square_meter_kelvin>(20.0);
        let nu = nusselt(h, Length::new::<meter>(0.1), k).unwrap();
        let back = h_from_nusselt(nu, Length::new::<meter>(0.1), k).unwrap();
        assert!((back.get::<watt_per_square_meter_kelvin>() - 20.0).abs() < 1e-12);
        let sh = sherwood(
            Velocity::new::<meter_per_second>(0.02),
            Length::new::<meter>(0.1),
            d,
        )
        .unwrap();
        assert!((sh - 80.0).abs() < 1e-9);
    }

    #[test]
    fn mass_velocity_round_trips() {
        let rho = MassDensity::new::<kilogram_per_cubic_meter>(1.0);
        let g = mass_velocity(rho, Velocity::new::<meter_per_second>(3.0)).unwrap();
        assert!((g.get::<kilogram_per_square_meter_second>() - 3.0).abs() < 1e-12);
        let v = velocity_from_mass_velocity(g, rho).unwrap();
        assert!((v.get::<meter_per_second>() - 3.0).abs() < 1e-12);
        let g2 = mass_velocity_from_flow(
            MassRate::new::<kilogram_per_second>(2.0),
            Area::new::<square_meter>(0.5),
        )
        .unwrap();
        assert!((g2.get::<kilogram_per_square_meter_second>() - 4.0).abs() < 1e-12);
        let v2 = velocity_from_volume_flow(
            VolumeRate::new::<cubic_meter_per_second>(1.5),
            Area::new::<square_meter>(0.5),
        )
        .unwrap();
        assert!((v2.get::<meter_per_second>() - 3.0).abs() < 1e-12);
    }

    #[test]
    fn non_positive_inputs_are_errors() {
        let (rho, mu, _, _) = air_like();
        let zero_v = Velocity::new::<meter_per_second>(0.0);
        let e = reynolds(rho, zero_v, Length::new::<meter>(1.0), mu).unwrap_err();
        assert!(e.to_string().contains("velocity must be positive"), "{e}");
        let e = mass_velocity_from_flow(
            MassRate::new::<kilogram_per_second>(1.0),
            Area::new::<square_meter>(-1.0),
        )
        .unwrap_err();
        assert!(e.to_string().contains("area must be positive"), "{e}");
        assert!(mass_velocity(rho, Velocity::new::<meter_per_second>(f64::NAN)).is_err());
    }
}
