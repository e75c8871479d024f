//! Transport properties of humid air as functions of dry-bulb, humidity ratio
//! and total pressure: viscosity, thermal conductivity, specific heat, density,
//! diffusivity of water vapour in air, and the Prandtl, Schmidt and Lewis numbers.
//!
//! Methods (dilute-gas limits; the density corrections are below 0.5 % at
//! 50-200 kPa):
//! - Dry-air viscosity and conductivity: Lemmon & Jacobsen (2004), "Viscosity and
//!   thermal conductivity equations for nitrogen, oxygen, argon, and air",
//!   Int. J. Thermophys. 25, 21 (dilute-gas terms).
//! - Water-vapour viscosity: IAPWS R12-08 (2008) eq. 11 (dilute gas).
//! - Water-vapour conductivity: IAPWS R15-11 (2011) eq. 16 (dilute gas).
//! - Mixture viscosity: Wilke (1950), J. Chem. Phys. 18, 517.
//! - Mixture conductivity: Wassiljewa equation with the Mason & Saxena (1958)
//!   interaction factors (equal to Wilke's), as in Poling, Prausnitz & O'Connell,
//!   "The Properties of Gases and Liquids", 5th ed. (2001), eq. 10-6.1.
//! - Diffusivity of water vapour in air: Fuller, Schettler & Giddings (1966) with
//!   the diffusion volumes of Fuller et al. (1969) (air 19.7, H2O 13.1), as in
//!   Poling et al. (2001) eq. 11-4.4.
//!
//! Validity: -40..350 degC, 50..200 kPa, any humidity ratio up to saturation.

use std::sync::OnceLock;

use uom::si::diffusion_coefficient::square_meter_per_second;
use uom::si::dynamic_viscosity::pascal_second;
use uom::si::f64::{
    DiffusionCoefficient, DynamicViscosity, MassDensity, Pressure, SpecificHeatCapacity,
    ThermalConductivity, ThermodynamicTemperature,
};
use uom::si::specific_heat_capacity::joule_per_kilogram_kelvin;
use uom::si::thermal_conductivity::watt_per_meter_kelvin;

use crate::engine::air::thermo::{EPSILON, M_DRY_AIR, M_WATER};
use crate::engine::air::{AirError, AirState};

/// ln of the dry-air energy parameter eps/k = 103.3 K (Lemmon & Jacobsen 2004).
const LN_EPS_K: f64 = 4.637_637_376_125_593;
/// Reducing temperature of the dry-air conductivity, K, and its ln.
const T_REDUCING: f64 = 132.6312;
const LN_T_REDUCING: f64 = 4.887_572_344_192_089_5;

/// Dilute-gas viscosity of dry air, Pa s (Lemmon & Jacobsen 2004 eqs. 2-4).
pub fn dry_air_viscosity_pa_s(t: f64) -> f64 {
    dry_air_viscosity_from_logs(t.sqrt(), t.ln())
}

/// Lemmon & Jacobsen (2004) collision integral: `ln Omega = sum b_i (ln T*)^i`.
const OMEGA_COEFFICIENTS: [f64; 5] = [0.431, -0.4623, 0.08406, 0.005341, -0.00331];

/// Lemmon & Jacobsen (2004) eq. 5, dilute part: `k = 1e-3 (N1 eta[uPa s] +
/// N2 tau^-1.1 + N3 tau^-0.3)` W/(m K), the coefficients `[N1, N2, -N3]`.
const CONDUCTIVITY_COEFFICIENTS: [f64; 3] = [1.308, 1.405, 1.036];

/// IAPWS R12-08 eq. 11, the dilute-gas viscosity's sum `H_i / T_r^i`.
const VAPOUR_VISCOSITY_H: [f64; 4] = [1.67752, 2.20462, 0.636_656_4, -0.241_605];

/// IAPWS R15-11 eq. 16, the dilute-gas conductivity's sum `L_i / T_r^i`.
const VAPOUR_CONDUCTIVITY_L: [f64; 5] = [
    2.443_221e-3,
    1.323_095e-2,
    6.770_357e-3,
    -3.454_586e-3,
    4.096_266e-4,
];

/// [`dry_air_viscosity_pa_s`] from `sqrt(T)` and `ln T`, shared with the
/// other properties of one state.
fn dry_air_viscosity_from_logs(root_t: f64, ln_t: f64) -> f64 {
    const B: [f64; 5] = OMEGA_COEFFICIENTS;
    const SIGMA_NM: f64 = 0.360;
    const M_G_PER_MOL: f64 = 28.9586;
    let ln_ts = ln_t - LN_EPS_K;
    let ln_omega = B[0] + ln_ts * (B[1] + ln_ts * (B[2] + ln_ts * (B[3] + ln_ts * B[4])));
    1e-6 * 0.026_695_8 * M_G_PER_MOL.sqrt() * root_t / (SIGMA_NM * SIGMA_NM * ln_omega.exp())
}

/// Dilute-gas thermal conductivity of dry air, W/(m K) (Lemmon & Jacobsen 2004 eq. 5).
pub fn dry_air_conductivity_w_per_m_k(t: f64) -> f64 {
    let ln_t = t.ln();
    dry_air_conductivity_from(t, ln_t, dry_air_viscosity_from_logs(t.sqrt(), ln_t))
}

/// [`dry_air_conductivity_w_per_m_k`] from `T`, `ln T` and the dilute-gas
/// viscosity at T: `tau^-1.1 = (T/T_c) tau^-0.1`, `tau^-0.3 = (tau^-0.1)^3`,
/// one exponential for both powers.
fn dry_air_conductivity_from(t: f64, ln_t: f64, viscosity_pa_s: f64) -> f64 {
    let tau_m01 = (0.1 * (ln_t - LN_T_REDUCING)).exp();
    let tau_m03 = tau_m01 * tau_m01 * tau_m01;
    let tau_m11 = t / T_REDUCING * tau_m01;
    let eta_upa_s = viscosity_pa_s * 1e6;
    let [n1, n2, n3] = CONDUCTIVITY_COEFFICIENTS;
    1e-3 * (n1 * eta_upa_s + n2 * tau_m11 - n3 * tau_m03)
}

/// Dilute-gas viscosity of water vapour, Pa s (IAPWS R12-08 eq. 11).
pub fn vapour_viscosity_pa_s(t: f64) -> f64 {
    vapour_viscosity_from(t / T_CRITICAL_WATER, (t / T_CRITICAL_WATER).sqrt())
}

/// Reducing temperature of the IAPWS water-vapour equations, K.
const T_CRITICAL_WATER: f64 = 647.096;

/// [`vapour_viscosity_pa_s`] from `T_r = T / 647.096 K` and its square root.
fn vapour_viscosity_from(tr: f64, root_tr: f64) -> f64 {
    const H: [f64; 4] = VAPOUR_VISCOSITY_H;
    let sum = H[0] + (H[1] + (H[2] + H[3] / tr) / tr) / tr;
    1e-6 * 100.0 * root_tr / sum
}

/// Dilute-gas thermal conductivity of water vapour, W/(m K) (IAPWS R15-11 eq. 16).
pub fn vapour_conductivity_w_per_m_k(t: f64) -> f64 {
    vapour_conductivity_from(t / T_CRITICAL_WATER, (t / T_CRITICAL_WATER).sqrt())
}

/// [`vapour_conductivity_w_per_m_k`] from `T_r` and its square root.
fn vapour_conductivity_from(tr: f64, root_tr: f64) -> f64 {
    const L: [f64; 5] = VAPOUR_CONDUCTIVITY_L;
    let sum = L[0] + (L[1] + (L[2] + (L[3] + L[4] / tr) / tr) / tr) / tr;
    1e-3 * root_tr / sum
}

/// Wilke's factors (phi_aw, phi_wa) between dry air (a) and water vapour (w):
/// `phi_ij = (1 + (mu_i/mu_j)^(1/2) (M_j/M_i)^(1/4))^2 / (8 (1 + M_i/M_j))^(1/2)`.
/// The two viscosity ratios are reciprocal, so one square root serves both;
/// the molar-mass terms are fixed and computed once.
fn wilke_factors(mu_a: f64, mu_w: f64) -> (f64, f64) {
    let ((num_aw, d_aw), (num_wa, d_wa)) = wilke_parts(mu_a, mu_w);
    (num_aw * num_aw / d_aw, num_wa * num_wa / d_wa)
}

/// Wilke's factors as `(numerator root, denominator)` pairs: `phi = n^2 / d`
/// with `n = 1 + (mu_i/mu_j)^(1/2) (M_j/M_i)^(1/4)` and `d = (8 (1 + M_i/M_j))^(1/2)`.
#[inline]
fn wilke_parts(mu_a: f64, mu_w: f64) -> ((f64, f64), (f64, f64)) {
    // (M_w/M_a)^(1/4), (M_a/M_w)^(1/4), sqrt(8 (1 + M_a/M_w)), sqrt(8 (1 + M_w/M_a)).
    static MASS_TERMS: OnceLock<[f64; 4]> = OnceLock::new();
    let [q_aw, q_wa, d_aw, d_wa] = *MASS_TERMS.get_or_init(|| {
        [
            (M_WATER / M_DRY_AIR).powf(0.25),
            (M_DRY_AIR / M_WATER).powf(0.25),
            (8.0 * (1.0 + M_DRY_AIR / M_WATER)).sqrt(),
            (8.0 * (1.0 + M_WATER / M_DRY_AIR)).sqrt(),
        ]
    });
    let r = (mu_a / mu_w).sqrt();
    ((1.0 + r * q_aw, d_aw), (1.0 + q_wa / r, d_wa))
}

/// The temperature functions of the mixture properties, as the table of
/// [`crate::engine::transport_table`] holds them: dry-air and vapour
/// viscosity and conductivity, and Wilke's two factors.
pub(crate) const PURE_GAS_FUNCTIONS: usize = 6;

/// The pure-gas properties at `t` (K) given `ln T` and `sqrt T`:
/// `[mu_a, k_a, mu_w, k_w, phi_aw, phi_wa]` (Pa s, W/(m K), Pa s, W/(m K),
/// and Wilke's factors), exactly as the properties of a state use them.
#[inline]
pub(crate) fn pure_gas_exact(t: f64, ln_t: f64, root_t: f64) -> [f64; PURE_GAS_FUNCTIONS] {
    let mu_a = dry_air_viscosity_from_logs(root_t, ln_t);
    let k_a = dry_air_conductivity_from(t, ln_t, mu_a);
    let tr = t / T_CRITICAL_WATER;
    let root_tr = root_t * (1.0 / T_CRITICAL_WATER.sqrt());
    let (mu_w, k_w) = (
        vapour_viscosity_from(tr, root_tr),
        vapour_conductivity_from(tr, root_tr),
    );
    let (phi_aw, phi_wa) = wilke_factors(mu_a, mu_w);
    [mu_a, k_a, mu_w, k_w, phi_aw, phi_wa]
}

/// [`pure_gas_exact`] at `t` (K) with the temperature derivative of each
/// function (per K), analytic: the values and slopes of the table's nodes.
pub(crate) fn pure_gas_with_slopes(t: f64) -> [(f64, f64); PURE_GAS_FUNCTIONS] {
    let (ln_t, root_t) = (t.ln(), t.sqrt());
    let [mu_a, k_a, mu_w, k_w, phi_aw, phi_wa] = pure_gas_exact(t, ln_t, root_t);
    let inv_t = 1.0 / t;
    // mu_a = c sqrt(T) / e^Omega(x), x = ln T - ln(eps/k):
    // d ln mu_a / dT = (1/2 - Omega'(x)) / T.
    const B: [f64; 5] = OMEGA_COEFFICIENTS;
    let x = ln_t - LN_EPS_K;
    let d_omega = B[1] + x * (2.0 * B[2] + x * (3.0 * B[3] + x * 4.0 * B[4]));
    let d_mu_a = mu_a * (0.5 - d_omega) * inv_t;
    // k_a = 1e-3 (1.308 mu_a[uPa s] + 1.405 (T/T_r)^1.1 - 1.036 (T/T_r)^0.3).
    let ratio = t / T_REDUCING;
    let [n1, n2, n3] = CONDUCTIVITY_COEFFICIENTS;
    let d_k_a = 1e-3
        * (n1 * d_mu_a * 1e6 + n2 * 1.1 * ratio.powf(1.1) * inv_t
            - n3 * 0.3 * ratio.powf(0.3) * inv_t);
    // Vapour: prop = c sqrt(T_r) / S(1/T_r); d ln prop / dT = 1/(2T) + S'(u) u / (S T), u = 1/T_r.
    let tr = t / T_CRITICAL_WATER;
    let u = 1.0 / tr;
    let log_slope = |s: &[f64]| {
        let (mut sum, mut d_sum) = (0.0, 0.0);
        for (i, c) in s.iter().enumerate().rev() {
            d_sum = d_sum * u + i as f64 * c;
            sum = sum * u + c;
        }
        // d_sum accumulated sum i c u^i: S'(u) u.
        (0.5 + d_sum / sum) * inv_t
    };
    let d_mu_w = mu_w * log_slope(&VAPOUR_VISCOSITY_H);
    let d_k_w = k_w * log_slope(&VAPOUR_CONDUCTIVITY_L);
    // phi_aw = (1 + r q_aw)^2 / d_aw, phi_wa = (1 + q_wa / r)^2 / d_wa with
    // r = sqrt(mu_a / mu_w): d ln r / dT = (d ln mu_a - d ln mu_w) / 2.
    let d_ln_r = 0.5 * (d_mu_a / mu_a - d_mu_w / mu_w);
    // With phi = n^2 / d: d phi / dT = 2 phi (n - 1) / n d ln r for
    // n = 1 + r q, and minus that for n = 1 + q / r.
    let ((n_aw, _), (n_wa, _)) = wilke_parts(mu_a, mu_w);
    let d_phi_aw = 2.0 * phi_aw * (n_aw - 1.0) / n_aw * d_ln_r;
    let d_phi_wa = -2.0 * phi_wa * (n_wa - 1.0) / n_wa * d_ln_r;
    [
        (mu_a, d_mu_a),
        (k_a, d_k_a),
        (mu_w, d_mu_w),
        (k_w, d_k_w),
        (phi_aw, d_phi_aw),
        (phi_wa, d_phi_wa),
    ]
}

/// Mole-fraction mixing of a property of air (a) and water vapour (w) with
/// Wilke's factors.
fn wilke_mix_with(x_w: f64, prop_a: f64, prop_w: f64, phi_aw: f64, phi_wa: f64) -> f64 {
    let x_a = 1.0 - x_w;
    let air = if x_a > 0.0 {
        x_a * prop_a / (x_a + x_w * phi_aw)
    } else {
        0.0
    };
    let water = if x_w > 0.0 {
        x_w * prop_w / (x_w + x_a * phi_wa)
    } else {
        0.0
    };
    air + water
}

/// Mole fraction of water vapour from the humidity ratio.
pub fn water_mole_fraction(w_kg_per_kg_da: f64) -> f64 {
    w_kg_per_kg_da / (EPSILON + w_kg_per_kg_da)
}

/// Transport and thermal properties of one humid-air state, SI magnitudes.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Transport {
    /// Dynamic viscosity, Pa s.
    pub viscosity_pa_s: f64,
    /// Thermal conductivity, W/(m K).
    pub conductivity_w_per_m_k: f64,
    /// Isobaric specific heat per kg of humid air, J/(kg K).
    pub cp_j_per_kg_k: f64,
    /// Density of humid air, kg/m^3.
    pub density_kg_per_m3: f64,
    /// Diffusivity of water vapour in air, m^2/s.
    pub diffusivity_m2_per_s: f64,
}

impl Transport {
    /// All transport properties of `air`. The temperature functions of the
    /// four pure-gas properties and the diffusivity share one `sqrt T` and
    /// one `ln T`.
    pub fn of(air: &AirState) -> Transport {
        Transport::of_with_ln_t(air, air.t_kelvin().ln())
    }

    /// [`Transport::of`] given `ln_t`, the ln of the state's dry-bulb in K.
    /// The humid heat and the humid volume are formed side by side, so that
    /// `1/T` and the terms they share are computed once.
    #[inline]
    fn of_with_ln_t(air: &AirState, ln_t: f64) -> Transport {
        let (t, w, p) = (air.t_kelvin(), air.humidity_ratio(), air.p_pascal());
        let x_w = water_mole_fraction(w);
        let root_t = t.sqrt();
        // The temperature functions from their table (within 6.4e-14 of
        // the exact ones, relative), exact outside it.
        let [mu_a, k_a, mu_w, k_w, phi_aw, phi_wa] = crate::engine::transport_table::pure_gas(t)
            .unwrap_or_else(|| pure_gas_exact(t, ln_t, root_t));
        Transport {
            viscosity_pa_s: wilke_mix_with(x_w, mu_a, mu_w, phi_aw, phi_wa),
            conductivity_w_per_m_k: wilke_mix_with(x_w, k_a, k_w, phi_aw, phi_wa),
            cp_j_per_kg_k: air.humid_heat_j_per_kg_da_k() / (1.0 + w),
            density_kg_per_m3: (1.0 + w) / air.humid_volume_m3_per_kg_da(),
            diffusivity_m2_per_s: fuller_from_root(t, root_t, p),
        }
    }

    /// Prandtl number `cp mu / k`.
    pub fn prandtl(&self) -> f64 {
        self.cp_j_per_kg_k * self.viscosity_pa_s / self.conductivity_w_per_m_k
    }

    /// Schmidt number `mu / (rho D)` for water vapour in humid air.
    pub fn schmidt(&self) -> f64 {
        self.viscosity_pa_s / (self.density_kg_per_m3 * self.diffusivity_m2_per_s)
    }

    /// Lewis number `k / (rho cp D)` = Sc / Pr.
    pub fn lewis(&self) -> f64 {
        self.conductivity_w_per_m_k
            / (self.density_kg_per_m3 * self.cp_j_per_kg_k * self.diffusivity_m2_per_s)
    }
}

/// Fuller-Schettler-Giddings diffusivity of water vapour in air, m^2/s, T in K, p in Pa.
///
/// `D = 0.00143 T^1.75 / (p_bar M_AB^0.5 (V_a^1/3 + V_w^1/3)^2)` cm^2/s with
/// `M_AB = 2 / (1/M_a + 1/M_w)` (g/mol) and diffusion volumes 19.7 (air), 13.1 (H2O).
pub fn fuller_diffusivity_m2_per_s(t: f64, p: f64) -> f64 {
    fuller_from_root(t, t.sqrt(), p)
}

/// [`fuller_diffusivity_m2_per_s`] given `sqrt T`.
fn fuller_from_root(t: f64, root_t: f64, p: f64) -> f64 {
    const V_AIR: f64 = 19.7;
    const V_WATER: f64 = 13.1;
    // M_AB^0.5 (V_a^1/3 + V_w^1/3)^2: fixed, computed once.
    static MASS_AND_VOLUMES: OnceLock<f64> = OnceLock::new();
    let fixed = *MASS_AND_VOLUMES.get_or_init(|| {
        let m_ab = 2.0 / (1.0 / (M_DRY_AIR * 1e3) + 1.0 / (M_WATER * 1e3));
        let volumes = V_AIR.cbrt() + V_WATER.cbrt();
        m_ab.sqrt() * volumes * volumes
    });
    // T^1.75 = T T^(1/2) T^(1/4).
    let t_175 = t * root_t * root_t.sqrt();
    let d_cm2_s = 0.00143 * t_175 / ((p / 1e5) * fixed);
    d_cm2_s * 1e-4
}

/// The humid-air state at dry-bulb `t_k` (K), humidity ratio `w` and total
/// pressure `p_pa` (Pa), and its transport properties, with one `ln T` for
/// both: what [`AirState::from_w`] and [`Transport::of`] give, bit for bit
/// (`tests::state_and_transport_is_from_w_and_of`), with the same errors.
/// One film state of the wet-surface balance.
pub fn state_and_transport(t_k: f64, w: f64, p_pa: f64) -> Result<(AirState, Transport), AirError> {
    let ln_t = t_k.ln();
    let air = AirState::from_w_with_ln_t(t_k, w, p_pa, ln_t)?;
    Ok((air, Transport::of_with_ln_t(&air, ln_t)))
}

fn state(t: ThermodynamicTemperature, w: f64, p: Pressure) -> Result<Transport, AirError> {
    Ok(Transport::of(&AirState::from_w(t, w, p)?))
}

/// Dynamic viscosity of humid air (Wilke mixing of Lemmon-Jacobsen air and IAPWS 2008 vapour).
/// Validity -40..350 degC, 50..200 kPa. Errors as [`AirState::from_w`].
pub fn viscosity(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<DynamicViscosity, AirError> {
    Ok(DynamicViscosity::new::<pascal_second>(
        state(t, w_kg_per_kg_da, p)?.viscosity_pa_s,
    ))
}

/// Thermal conductivity of humid air (Wassiljewa / Mason-Saxena mixing of
/// Lemmon-Jacobsen air and IAPWS 2011 vapour). Validity -40..350 degC, 50..200 kPa.
pub fn thermal_conductivity(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<ThermalConductivity, AirError> {
    Ok(ThermalConductivity::new::<watt_per_meter_kelvin>(
        state(t, w_kg_per_kg_da, p)?.conductivity_w_per_m_k,
    ))
}

/// Isobaric specific heat per kg of humid air, `(dh/dT)_(w,p) / (1 + w)` from the
/// enthalpy of [`AirState::enthalpy`] (Lemmon et al. 2000 ideal-gas air, IAPWS-IF97
/// vapour, second-virial real-gas terms). For the humid heat per kg of dry air use
/// [`AirState::humid_heat`].
pub fn specific_heat(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<SpecificHeatCapacity, AirError> {
    Ok(SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(
        state(t, w_kg_per_kg_da, p)?.cp_j_per_kg_k,
    ))
}

/// Density of humid air, kg of moist air per m^3: `(1 + w) / v`.
pub fn density(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<MassDensity, AirError> {
    Ok(AirState::from_w(t, w_kg_per_kg_da, p)?.density())
}

/// Diffusivity of water vapour in air by Fuller-Schettler-Giddings (see module docs).
/// Independent of w at this level. About 2.5e-5 m^2/s at 25 degC and 101.325 kPa.
pub fn diffusivity_water_air(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<DiffusionCoefficient, AirError> {
    Ok(DiffusionCoefficient::new::<square_meter_per_second>(
        state(t, w_kg_per_kg_da, p)?.diffusivity_m2_per_s,
    ))
}

/// Prandtl number of humid air, `cp mu / k`.
pub fn prandtl(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<f64, AirError> {
    Ok(state(t, w_kg_per_kg_da, p)?.prandtl())
}

/// Schmidt number of water vapour in humid air, `mu / (rho D)`.
pub fn schmidt(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<f64, AirError> {
    Ok(state(t, w_kg_per_kg_da, p)?.schmidt())
}

/// Lewis number of water vapour in humid air, `k / (rho cp D)`.
pub fn lewis(
    t: ThermodynamicTemperature,
    w_kg_per_kg_da: f64,
    p: Pressure,
) -> Result<f64, AirError> {
    Ok(state(t, w_kg_per_kg_da, p)?.lewis())
}

#[cfg(test)]
mod tests {
    use super::*;
    use uom::si::pressure::pascal;
    use uom::si::thermodynamic_temperature::kelvin;

    /// The film state with one shared ln T equals `AirState::from_w` and
    /// `Transport::of` taken apart, bit for bit (the state's every field
    /// through its public readers, every transport property), with the same
    /// errors: -41 to 351 degC in steps of 0.0917 K, 500 Pa to 20 MPa, dry
    /// to just above saturation (or 20 kg/kg above the boiling point).
    #[test]
    fn state_and_transport_is_from_w_and_of() {
        let (mut states, mut errors) = (0, 0);
        for p in [500.0, 50e3, 101_325.0, 200e3, 10e6, 20e6] {
            let mut t = 232.15;
            while t <= 624.15 {
                let pvs = crate::engine::air::saturation::saturated_vapour_pressure(t, p);
                let top = if pvs < p {
                    (EPSILON * pvs / (p - pvs)).min(20.0)
                } else {
                    20.0
                };
                for i in 0..=21 {
                    // 0, then 1e-5 of the top to the top in quarter decades,
                    // then just beyond the constructors' slack.
                    let w = match i {
                        0 => 0.0,
                        21 => top * (1.0 + 1e-9),
                        _ => top * 10f64.powf(-0.25 * f64::from(20 - i)),
                    };
                    let want = AirState::from_w(
                        ThermodynamicTemperature::new::<kelvin>(t),
                        w,
                        Pressure::new::<pascal>(p),
                    )
                    .map(|a| (a, Transport::of(&a)));
                    match (state_and_transport(t, w, p), want) {
                        (Ok((a, x)), Ok((b, y))) => {
                            let state = |s: &AirState| {
                                [
                                    s.t_kelvin(),
                                    s.p_pascal(),
                                    s.humidity_ratio(),
                                    s.relative_humidity(),
                                ]
                                .map(f64::to_bits)
                            };
                            assert_eq!(state(&a), state(&b), "{t} K, w {w}, {p} Pa");
                            let props = |x: &Transport| {
                                [
                                    x.viscosity_pa_s,
                                    x.conductivity_w_per_m_k,
                                    x.cp_j_per_kg_k,
                                    x.density_kg_per_m3,
                                    x.diffusivity_m2_per_s,
                                ]
                                .map(f64::to_bits)
                            };
                            assert_eq!(props(&x), props(&y), "{t} K, w {w}, {p} Pa");
                            states += 1;
                        }
                        (Err(e), Err(f)) => {
                            assert_eq!(e.to_string(), f.to_string());
                            errors += 1;
                        }
                        (got, want) => panic!("{t} K, w {w}, {p} Pa: {got:?} vs {want:?}"),
                    }
                }
                t += 0.0917;
            }
        }
        assert!(states > 50_000 && errors > 10_000, "{states} {errors}");
    }

    /// Wilke's factors against eq. 9-5.14 of Poling, Prausnitz & O'Connell
    /// (2001) written out term by term, over the viscosities of -40..350 degC.
    #[test]
    fn wilke_factors_match_the_textbook_form() {
        let phi = |mu_i: f64, mu_j: f64, m_i: f64, m_j: f64| {
            let num = 1.0 + (mu_i / mu_j).sqrt() * (m_j / m_i).powf(0.25);
            num * num / (8.0 * (1.0 + m_i / m_j)).sqrt()
        };
        for t in (0..40).map(|i| 233.15 + 10.0 * f64::from(i)) {
            let (mu_a, mu_w) = (dry_air_viscosity_pa_s(t), vapour_viscosity_pa_s(t));
            let (aw, wa) = wilke_factors(mu_a, mu_w);
            let want_aw = phi(mu_a, mu_w, M_DRY_AIR, M_WATER);
            let want_wa = phi(mu_w, mu_a, M_WATER, M_DRY_AIR);
            assert!((aw / want_aw - 1.0).abs() < 1e-14, "{t}: {aw} {want_aw}");
            assert!((wa / want_wa - 1.0).abs() < 1e-14, "{t}: {wa} {want_wa}");
        }
    }

    /// The logarithms written as constants are those of the published
    /// reducing temperatures, and the properties computed from a shared
    /// `sqrt T` and `ln T` equal the formulas written with `powf` (Lemmon &
    /// Jacobsen 2004 eqs. 2-5, IAPWS R12-08 eq. 11, R15-11 eq. 16).
    #[test]
    fn shared_roots_and_logs_match_the_formulas() {
        let close = |a: f64, b: f64| (a / b - 1.0).abs() < 1e-14;
        assert!((LN_EPS_K - 103.3_f64.ln()).abs() < 1e-15);
        assert!((LN_T_REDUCING - T_REDUCING.ln()).abs() < 1e-15);
        for t in (0..40).map(|i| 233.15 + 10.0 * f64::from(i)) {
            let mu = {
                const B: [f64; 5] = [0.431, -0.4623, 0.08406, 0.005341, -0.00331];
                let l = (t / 103.3).ln();
                let ln_omega = B[0] + l * (B[1] + l * (B[2] + l * (B[3] + l * B[4])));
                1e-6 * 0.026_695_8 * (28.9586 * t).sqrt() / (0.36 * 0.36 * ln_omega.exp())
            };
            assert!(close(dry_air_viscosity_pa_s(t), mu), "{t}");
            let tau = 132.6312 / t;
            let k = 1e-3 * (1.308 * mu * 1e6 + 1.405 * tau.powf(-1.1) - 1.036 * tau.powf(-0.3));
            assert!(close(dry_air_conductivity_w_per_m_k(t), k), "{t}");
            let tr = t / 647.096;
            let mu_w = 1e-4 * tr.sqrt()
                / (1.67752 + 2.20462 / tr + 0.636_656_4 / (tr * tr) - 0.241_605 / (tr * tr * tr));
            assert!(close(vapour_viscosity_pa_s(t), mu_w), "{t}");
        }
    }

    /// The Fuller diffusivity against its formula written with powf and cbrt
    /// (Poling et al. 2001 eq. 11-4.4), and the handbook order of magnitude
    /// (about 2.5e-5 m^2/s at 25 degC and 1 atm).
    #[test]
    fn fuller_diffusivity_matches_its_formula() {
        let direct = |t: f64, p: f64| {
            let m_ab = 2.0 / (1.0 / (M_DRY_AIR * 1e3) + 1.0 / (M_WATER * 1e3));
            let v = 19.7_f64.cbrt() + 13.1_f64.cbrt();
            0.00143 * t.powf(1.75) / ((p / 1e5) * m_ab.sqrt() * v * v) * 1e-4
        };
        for t in [233.15, 298.15, 373.15, 623.15] {
            for p in [50e3, 101_325.0, 200e3] {
                let (got, want) = (fuller_diffusivity_m2_per_s(t, p), direct(t, p));
                assert!((got / want - 1.0).abs() < 1e-14, "{t} {p}: {got} {want}");
            }
        }
        let d = fuller_diffusivity_m2_per_s(298.15, 101_325.0);
        assert!((2.4e-5..2.7e-5).contains(&d), "{d}");
    }
}
