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
    let mut out = Correlated::new(cube_root(ratio * ratio));
    check_range(&mut out.warnings, NAME, "Pr", pr, (0.6, 60.0), "");
    check_range(&mut out.warnings, NAME, "Sc", sc, (0.6, 3000.0), "");
    Ok(out)
}

/// `x^(1/3)` for the analogy factor: within one unit in the last place of
/// the correctly rounded root (test `cube_root_within_an_ulp`), at a
/// fraction of the cost of `f64::cbrt` (which is correctly rounded and
/// takes about 150 instructions). A first guess from the exponent bits
/// (the bit pattern divided by 3 plus two thirds of the exponent bias:
/// within 6 % for every normal positive x), two Halley steps (cubic: to
/// about 1e-13) and a Newton step (quadratic: to rounding). Zero,
/// subnormal, non-finite and negative inputs go to `f64::cbrt`.
#[inline]
fn cube_root(x: f64) -> f64 {
    if !(f64::MIN_POSITIVE..f64::MAX).contains(&x) {
        return x.cbrt();
    }
    let mut y = first_guess(x);
    for _ in 0..2 {
        let y3 = y * y * y;
        y *= (y3 + 2.0 * x) / (2.0 * y3 + x);
    }
    y - (y * y * y - x) / (3.0 * y * y)
}

/// [`cube_root`]'s start: the bit pattern of a normal positive `x` over 3,
/// plus two thirds of the exponent bias (exact at powers of 8).
#[inline]
fn first_guess(x: f64) -> f64 {
    const TWO_THIRDS_BIAS: u64 = 682 << 52;
    f64::from_bits(x.to_bits() / 3 + TWO_THIRDS_BIAS)
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

    /// The fast cube root against the standard library's correctly rounded
    /// `f64::cbrt`: within one unit in the last place over the whole normal
    /// range (log-spaced), densely over the analogy's working range (squares
    /// of Pr/Sc from 0.1 to 10), and exact on perfect cubes; the inputs it
    /// hands over (zero, subnormal, infinite, NaN) give `f64::cbrt`'s value.
    #[test]
    fn cube_root_within_an_ulp() {
        let ulps = |a: f64, b: f64| (a.to_bits() as i64 - b.to_bits() as i64).abs();
        let mut worst = 0;
        for i in 0..=200_000 {
            let x = 10f64.powf(-307.0 + 614.0 * i as f64 / 200_000.0);
            worst = worst.max(ulps(cube_root(x), x.cbrt()));
            let guess = first_guess(x) / x.cbrt() - 1.0;
            assert!(guess.abs() < 0.06, "guess at {x}: {guess}");
        }
        for i in 0..=200_000 {
            let r = 0.1 + 9.9 * i as f64 / 200_000.0;
            let x = r * r;
            worst = worst.max(ulps(cube_root(x), x.cbrt()));
        }
        assert!(worst <= 1, "worst {worst} ulps");
        for k in 1..=1000 {
            let y = f64::from(k) / 16.0;
            assert_eq!(cube_root(y * y * y), y, "{y}");
        }
        for x in [0.0, -0.0, 1e-310, f64::MAX, f64::INFINITY, -8.0] {
            assert_eq!(cube_root(x).to_bits(), x.cbrt().to_bits(), "{x}");
        }
        assert!(cube_root(f64::NAN).is_nan());
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
