//! The Chilton-Colburn analogy between heat and mass transfer: a mass-transfer
//! coefficient from a heat-transfer coefficient measured or correlated for the
//! same geometry and flow.
//!
//! j_H = St Pr^(2/3) = j_D = St_m Sc^(2/3), hence k_c = h / (rho cp) (Pr/Sc)^(2/3).
//! Source: Chilton and Colburn, "Mass transfer (absorption) coefficients:
//! prediction from data on heat transfer and fluid friction", Ind. Eng. Chem.
//! 26 (1934) 1183-1187; validity 0.6 < Pr < 60 and 0.6 < Sc < 3000 as given by
//! Incropera and DeWitt, *Fundamentals of Heat and Mass Transfer*, section 6.7.

use uom::si::f64::{HeatTransfer, MassDensity, MassFlux, SpecificHeatCapacity, Velocity};
use uom::si::heat_transfer::watt_per_square_meter_kelvin;
use uom::si::mass_density::kilogram_per_cubic_meter;
use uom::si::mass_flux::kilogram_per_square_meter_second;
use uom::si::specific_heat_capacity::joule_per_kilogram_kelvin;
use uom::si::velocity::meter_per_second;

use super::{check_range, positive, Correlated, TransferError};

const NAME: &str = "Chilton-Colburn analogy";

/// The analogy factor (Pr/Sc)^(2/3) with range warnings on Pr and Sc.
pub fn colburn_factor(pr: f64, sc: f64) -> Result<Correlated<f64>, TransferError> {
    let pr = positive("Prandtl number", pr, "")?;
    let sc = positive("Schmidt number", sc, "")?;
    // (Pr/Sc)^(2/3) as the cube root of the square: one root, no power.
    let ratio = pr / sc;
    let mut out = Correlated::new((ratio * ratio).cbrt());
    check_range(&mut out.warnings, NAME, "Pr", pr, (0.6, 60.0), "");
    check_range(&mut out.warnings, NAME, "Sc", sc, (0.6, 3000.0), "");
    Ok(out)
}

/// Mass-transfer coefficient on a concentration basis, k_c [m/s]:
/// k_c = h / (rho cp) (Pr/Sc)^(2/3).
///
/// `density` and `specific_heat` are those of the humid air (per kg of
/// mixture); flux of water = k_c (rho_v,surface - rho_v,air) in kg/(m^2 s).
pub fn colburn_mass_transfer_coefficient(
    h: HeatTransfer,
    density: MassDensity,
    specific_heat: SpecificHeatCapacity,
    pr: f64,
    sc: f64,
) -> Result<Correlated<Velocity>, TransferError> {
    let h = positive(
        "heat-transfer coefficient",
        h.get::<watt_per_square_meter_kelvin>(),
        "W/(m^2 K)",
    )?;
    let rho = positive(
        "density",
        density.get::<kilogram_per_cubic_meter>(),
        "kg/m^3",
    )?;
    let cp = positive(
        "specific heat",
        specific_heat.get::<joule_per_kilogram_kelvin>(),
        "J/(kg K)",
    )?;
    let factor = colburn_factor(pr, sc)?;
    Ok(factor.map(|f| Velocity::new::<meter_per_second>(h / (rho * cp) * f)))
}

/// Mass-transfer coefficient on a humidity-ratio basis, k_Y [kg/(m^2 s)] per
/// unit of humidity-ratio difference (kg water/kg dry air):
/// k_Y = h / c_s (Pr/Sc)^(2/3).
///
/// `humid_heat` c_s is the heat capacity of the humid air per kg of dry air,
/// c_s = cp_air + w cp_vapour. Flux of water = k_Y (w_surface - w_air).
pub fn colburn_humidity_coefficient(
    h: HeatTransfer,
    humid_heat: SpecificHeatCapacity,
    pr: f64,
    sc: f64,
) -> Result<Correlated<MassFlux>, TransferError> {
    let h = positive(
        "heat-transfer coefficient",
        h.get::<watt_per_square_meter_kelvin>(),
        "W/(m^2 K)",
    )?;
    let cs = positive(
        "humid heat",
        humid_heat.get::<joule_per_kilogram_kelvin>(),
        "J/(kg K)",
    )?;
    let factor = colburn_factor(pr, sc)?;
    Ok(factor.map(|f| MassFlux::new::<kilogram_per_square_meter_second>(h / cs * f)))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn h(x: f64) -> HeatTransfer {
        HeatTransfer::new::<watt_per_square_meter_kelvin>(x)
    }

    /// With Pr = Sc (Lewis number 1) the analogy reduces to the Lewis relation
    /// h / (k_Y c_s) = 1 (common practice).
    #[test]
    fn unit_lewis_number_gives_lewis_relation() {
        let cs = SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(1020.0);
        let ky = colburn_humidity_coefficient(h(30.0), cs, 0.7, 0.7).unwrap();
        assert!((ky.value.get::<kilogram_per_square_meter_second>() - 30.0 / 1020.0).abs() < 1e-15);
        assert!(ky.warnings.is_empty());
    }

    /// Air-water: Pr about 0.71, Sc about 0.60, so the factor is about 1.12
    /// (common practice: the psychrometric ratio of air-water is near 0.9).
    #[test]
    fn air_water_factor() {
        let f = colburn_factor(0.71, 0.60).unwrap().value;
        assert!((f - (0.71_f64 / 0.60).powf(2.0 / 3.0)).abs() < 1e-12);
        assert!(f > 1.05 && f < 1.2);
    }

    #[test]
    fn concentration_basis_and_warnings() {
        let rho = MassDensity::new::<kilogram_per_cubic_meter>(1.0);
        let cp = SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(1000.0);
        let kc = colburn_mass_transfer_coefficient(h(20.0), rho, cp, 0.7, 0.7).unwrap();
        assert!((kc.value.get::<meter_per_second>() - 0.02).abs() < 1e-15);
        let w = colburn_factor(0.01, 5000.0).unwrap().warnings;
        assert_eq!(w.len(), 2);
        assert!(colburn_factor(0.7, 0.0).is_err());
    }
}
