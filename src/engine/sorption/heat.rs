//! Isosteric heat of sorption by the Clausius-Clapeyron equation.
//!
//! At constant moisture content, `ln aw` is linear in `1/T` with slope
//! `-q_net / R` (the Clausius-Clapeyron relation applied to the vapour in
//! equilibrium with the product; Iglesias & Chirife 1976, *J. Food Technol.*
//! 11, 109). The net isosteric heat `q_net` is the heat of sorption beyond that
//! of condensing pure water; the total isosteric heat adds the latent heat of
//! vaporisation of free water, `q_st = q_net + h_fg(T)`.

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::{AvailableEnergy, ThermodynamicTemperature};
use uom::si::thermodynamic_temperature::kelvin;

use super::models::{GAS_CONSTANT, WATER_MOLAR_MASS};
use super::{Isotherm, SorptionError};

/// Net and total isosteric heat of sorption, per kg of water.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct IsostericHeat {
    /// Net isosteric heat `q_net` (J/kg water).
    pub net: AvailableEnergy,
    /// Total isosteric heat `q_net + h_fg` (J/kg water).
    pub total: AvailableEnergy,
}

/// Isosteric heat at moisture `x_db` (kg/kg dry basis) and temperature `t`
/// from a temperature-dependent isotherm: `q_net = -R d(ln aw)/d(1/T)` at
/// constant X, by a central difference over `T +- 1 K` of the inverted
/// isotherm. `latent` is the latent heat of vaporisation of water at `t`.
pub fn isosteric_heat(
    isotherm: &Isotherm,
    x_db: f64,
    t: ThermodynamicTemperature,
    latent: AvailableEnergy,
) -> Result<IsostericHeat, SorptionError> {
    if isotherm.isothermal {
        return Err(SorptionError::NoTemperatureDependence {
            model: isotherm.kind.name(),
        });
    }
    let t_k = t.get::<kelvin>();
    let at = |t_k: f64| {
        isotherm
            .water_activity(x_db, ThermodynamicTemperature::new::<kelvin>(t_k))
            .map(|r| r.value.ln())
    };
    let (low, high) = (t_k - 1.0, t_k + 1.0);
    let slope = (at(high)? - at(low)?) / (1.0 / high - 1.0 / low);
    Ok(from_slope(slope, latent))
}

/// Isosteric heat at moisture `x_db` from isotherms each known at one
/// temperature (their `t_ref_k`), at two or more temperatures: `ln aw` at
/// `x_db` is regressed on `1/T` by least squares. `latent` is the latent heat
/// of vaporisation at the mean temperature.
pub fn isosteric_heat_from_isotherms(
    isotherms: &[Isotherm],
    x_db: f64,
    latent: AvailableEnergy,
) -> Result<IsostericHeat, SorptionError> {
    let mut points = Vec::with_capacity(isotherms.len());
    for iso in isotherms {
        let t = ThermodynamicTemperature::new::<kelvin>(iso.t_ref_k);
        let aw = iso.water_activity(x_db, t)?.value;
        points.push((1.0 / iso.t_ref_k, aw.ln()));
    }
    let n = points.len() as f64;
    let mean_x = points.iter().map(|p| p.0).sum::<f64>() / n;
    let mean_y = points.iter().map(|p| p.1).sum::<f64>() / n;
    let sxx: f64 = points.iter().map(|p| (p.0 - mean_x).powi(2)).sum();
    if points.len() < 2 || sxx.is_nan() || sxx <= 0.0 {
        return Err(SorptionError::BadData(
            "isosteric heat needs isotherms at two or more different temperatures".into(),
        ));
    }
    let sxy: f64 = points.iter().map(|p| (p.0 - mean_x) * (p.1 - mean_y)).sum();
    Ok(from_slope(sxy / sxx, latent))
}

fn from_slope(slope_ln_aw_per_inverse_k: f64, latent: AvailableEnergy) -> IsostericHeat {
    let net_j_per_kg = -GAS_CONSTANT * slope_ln_aw_per_inverse_k / WATER_MOLAR_MASS;
    let net = AvailableEnergy::new::<joule_per_kilogram>(net_j_per_kg);
    IsostericHeat {
        net,
        total: net + latent,
    }
}

#[cfg(test)]
mod tests {
    use super::super::IsothermKind;
    use super::*;

    fn kelvin_t(t: f64) -> ThermodynamicTemperature {
        ThermodynamicTemperature::new::<kelvin>(t)
    }

    /// Henderson's equation `1 - aw = exp(-k T X^n)` gives, at constant X,
    /// `d ln aw / d(1/T) = T (1 - aw) ln(1 - aw) / aw`, so
    /// `q_net = R T (1 - aw) (-ln(1 - aw)) / aw` (differentiating the model by hand).
    #[test]
    fn henderson_matches_its_analytic_derivative() {
        let iso = Isotherm::new(IsothermKind::Henderson, &[2e-2, 1.8], kelvin_t(313.15)).unwrap();
        let t = 313.15;
        let x = iso.equilibrium_moisture(0.5, kelvin_t(t)).unwrap().value;
        let q = isosteric_heat(
            &iso,
            x,
            kelvin_t(t),
            AvailableEnergy::new::<joule_per_kilogram>(2.4e6),
        )
        .unwrap();
        let aw: f64 = 0.5;
        let exact = GAS_CONSTANT * t * (1.0 - aw) * -(1.0 - aw).ln() / aw / WATER_MOLAR_MASS;
        let got = q.net.get::<joule_per_kilogram>();
        assert!((got - exact).abs() < 1e-4 * exact, "{got} vs {exact}");
        assert!((q.total.get::<joule_per_kilogram>() - got - 2.4e6).abs() < 1e-6);
    }

    /// The two routes agree: isotherms taken from one temperature-dependent
    /// GAB at 30 and 50 degC give the same heat as the model itself at 40 degC
    /// (to the curvature of ln aw in 1/T).
    #[test]
    fn isotherms_at_two_temperatures_agree_with_model() {
        let gab = Isotherm::new(
            IsothermKind::Gab,
            &[0.07, 9.0, 0.85, 9_000.0, 1_200.0],
            kelvin_t(313.15),
        )
        .unwrap();
        let slice = |t: f64| {
            let (c, k) = super::super::gab_constants(&gab.params, t, 313.15);
            Isotherm::new(IsothermKind::Gab, &[0.07, c, k, 0.0, 0.0], kelvin_t(t))
                .unwrap()
                .at_one_temperature()
        };
        let latent = AvailableEnergy::new::<joule_per_kilogram>(0.0);
        let from_model = isosteric_heat(&gab, 0.1, kelvin_t(313.15), latent)
            .unwrap()
            .net;
        let from_slices =
            isosteric_heat_from_isotherms(&[slice(303.15), slice(323.15)], 0.1, latent)
                .unwrap()
                .net;
        let (a, b) = (
            from_model.get::<joule_per_kilogram>(),
            from_slices.get::<joule_per_kilogram>(),
        );
        assert!(a > 0.0 && (a - b).abs() < 0.02 * a, "{a} vs {b}");
        assert!(isosteric_heat_from_isotherms(&[slice(303.15)], 0.1, latent).is_err());
        assert!(isosteric_heat(&slice(303.15), 0.1, kelvin_t(303.15), latent).is_err());
    }
}
