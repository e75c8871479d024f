//! Saturation of water: vapour pressure over ice and liquid, the enhancement
//! factor in air, saturated densities and the latent heat of vaporization.
//!
//! Formulations (all SI, kelvin and pascal inside):
//! - Hyland & Wexler (1983), as printed in ASHRAE Handbook - Fundamentals
//!   (2017, ch. 1, eqs. 5 and 6): over ice 173.15-273.15 K, over liquid water
//!   273.15-473.15 K.
//! - IAPWS-IF97 region 4 saturation-pressure equation (IAPWS R7-97(2012), eq. 30)
//!   and its backward equation (eq. 31): 273.15-647.096 K.
//! - The two liquid branches are joined smoothly in ln p between 150 and 200 degC;
//!   ice and liquid are joined linearly in ln p between 0 degC and the triple point
//!   (0.01 degC) so that dew and frost points invert exactly.
//! - Enhancement factor: Greenspan's functional form with the coefficients of
//!   Hardy (1998), "ITS-90 formulations for vapor pressure, frostpoint temperature,
//!   dewpoint temperature, and enhancement factors in the range -100 to +100 C".
//! - Saturated liquid and vapour densities: Wagner & Pruss (1993) auxiliary
//!   equations (J. Phys. Chem. Ref. Data 22, 783), used for the latent heat by
//!   Clausius-Clapeyron.

/// 0 degC in kelvin.
pub const T_ZERO_C: f64 = 273.15;
/// Triple point of water, K.
pub const T_TRIPLE: f64 = 273.16;
/// Critical temperature of water, K (IAPWS).
pub const T_CRITICAL: f64 = 647.096;
/// Critical pressure of water, Pa (IAPWS-IF97).
pub const P_CRITICAL: f64 = 22.064e6;
/// Critical density of water, kg/m^3 (IAPWS).
pub const RHO_CRITICAL: f64 = 322.0;
/// Lowest temperature of the Hyland-Wexler ice equation, K (-100 degC).
pub const T_MIN_SATURATION: f64 = 173.15;
/// Start and end of the Hyland-Wexler to IF97 join, K.
pub(super) const JOIN_START: f64 = 423.15;
const JOIN_END: f64 = 473.15;

/// Hyland-Wexler coefficients over ice (ASHRAE Fundamentals 2017 ch. 1 eq. 5):
/// `ln p = C0/T + C1 + C2 T + C3 T^2 + C4 T^3 + C5 T^4 + C6 ln T`.
const HW_ICE: [f64; 7] = [
    -5.674_535_9e3,
    6.392_524_7,
    -9.677_843_0e-3,
    6.221_570_1e-7,
    2.074_782_5e-9,
    -9.484_024_0e-13,
    4.163_501_9,
];

/// Hyland-Wexler coefficients over liquid water (ASHRAE Fundamentals 2017 ch. 1 eq. 6):
/// `ln p = C0/T + C1 + C2 T + C3 T^2 + C4 T^3 + C5 ln T`.
const HW_WATER: [f64; 6] = [
    -5.800_220_6e3,
    1.391_499_3,
    -4.864_023_9e-2,
    4.176_476_8e-5,
    -1.445_209_3e-8,
    6.545_967_3,
];

/// ln p_ws over ice, Hyland-Wexler (ASHRAE Fundamentals 2017 ch. 1 eq. 5), T in K, p in Pa.
#[inline]
pub fn ln_ice_hyland_wexler(t: f64) -> f64 {
    let c = &HW_ICE;
    c[0] * (1.0 / t) + c[1] + t * (c[2] + t * (c[3] + t * (c[4] + t * c[5]))) + c[6] * t.ln()
}

/// `d ln p_ws / dT` over ice (Hyland-Wexler, differentiated term by term), 1/K.
#[inline]
fn ln_ice_slope(t: f64) -> f64 {
    let (c, inv) = (&HW_ICE, 1.0 / t);
    (c[6] - c[0] * inv) * inv + c[2] + t * (2.0 * c[3] + t * (3.0 * c[4] + t * 4.0 * c[5]))
}

/// ln p_ws over liquid water, Hyland-Wexler (ASHRAE Fundamentals 2017 ch. 1 eq. 6), T in K, p in Pa.
#[inline]
pub fn ln_water_hyland_wexler(t: f64) -> f64 {
    ln_water_hyland_wexler_from_ln(t, t.ln())
}

/// [`ln_water_hyland_wexler`] given `ln_t = ln T` (the same arithmetic, so
/// the same bits when `ln_t` is `t.ln()`).
#[inline]
pub(crate) fn ln_water_hyland_wexler_from_ln(t: f64, ln_t: f64) -> f64 {
    let c = &HW_WATER;
    c[0] * (1.0 / t) + c[1] + t * (c[2] + t * (c[3] + t * c[4])) + c[5] * ln_t
}

/// `d ln p_ws / dT` over liquid water (Hyland-Wexler, differentiated term by term), 1/K.
#[inline]
fn ln_water_hyland_wexler_slope(t: f64) -> f64 {
    let (c, inv) = (&HW_WATER, 1.0 / t);
    (c[5] - c[0] * inv) * inv + c[2] + t * (2.0 * c[3] + t * 3.0 * c[4])
}

/// IAPWS-IF97 region 4 coefficients n1..n10 (R7-97(2012) table 34).
const IF97_N: [f64; 10] = [
    0.116_705_214_527_67e4,
    -0.724_213_167_032_06e6,
    -0.170_738_469_400_92e2,
    0.120_208_247_024_70e5,
    -0.323_255_503_223_33e7,
    0.149_151_086_135_30e2,
    -0.482_326_573_615_91e4,
    0.405_113_405_420_57e6,
    -0.238_555_575_678_49,
    0.650_175_348_447_98e3,
];

/// Saturation pressure of water by IAPWS-IF97 eq. 30, T in K (273.15-647.096), p in Pa.
pub fn if97_saturation_pressure(t: f64) -> f64 {
    let n = &IF97_N;
    let theta = t + n[8] / (t - n[9]);
    let a = theta * theta + n[0] * theta + n[1];
    let b = n[2] * theta * theta + n[3] * theta + n[4];
    let c = n[5] * theta * theta + n[6] * theta + n[7];
    let x = 2.0 * c / (-b + (b * b - 4.0 * a * c).sqrt());
    1e6 * x.powi(4)
}

/// Saturation temperature of water by IAPWS-IF97 eq. 31, p in Pa (611.213 Pa-22.064 MPa), T in K.
pub fn if97_saturation_temperature(p: f64) -> f64 {
    let n = &IF97_N;
    let beta = (p / 1e6).powf(0.25);
    let e = beta * beta + n[2] * beta + n[5];
    let f = n[0] * beta * beta + n[3] * beta + n[6];
    let g = n[1] * beta * beta + n[4] * beta + n[7];
    let d = 2.0 * g / (-f - (f * f - 4.0 * e * g).sqrt());
    let s = n[9] + d;
    0.5 * (s - (s * s - 4.0 * (n[8] + n[9] * d)).sqrt())
}

/// ln of the vapour pressure over liquid water (supercooled below 0 degC), T in K.
///
/// Hyland-Wexler up to 150 degC, IF97 above 200 degC, a smoothstep join in ln p
/// between them.
#[inline]
pub fn ln_water(t: f64) -> f64 {
    if t <= JOIN_START {
        return ln_water_hyland_wexler(t);
    }
    ln_water_above_join_start(t)
}

/// [`ln_water`] above 150 degC (the join and IF97), out of line so that the
/// Hyland-Wexler branch inlines into its callers.
#[inline(never)]
fn ln_water_above_join_start(t: f64) -> f64 {
    let if97 = if97_saturation_pressure(t).ln();
    if t >= JOIN_END {
        return if97;
    }
    let s = (t - JOIN_START) / (JOIN_END - JOIN_START);
    let weight = s * s * (3.0 - 2.0 * s);
    (1.0 - weight) * ln_water_hyland_wexler(t) + weight * if97
}

/// `d ln p_ws / dT` over liquid water, 1/K: analytic on the Hyland-Wexler branch,
/// a central difference of [`ln_water`] (step 1e-4 K, relative error near 1e-9)
/// in the join and on IF97 above 150 degC.
#[inline]
pub fn ln_water_slope(t: f64) -> f64 {
    if t <= JOIN_START {
        return ln_water_hyland_wexler_slope(t);
    }
    ln_water_slope_by_difference(t)
}

/// [`ln_water_slope`] above 150 degC, out of line.
#[inline(never)]
fn ln_water_slope_by_difference(t: f64) -> f64 {
    let dt = 1e-4;
    (ln_water(t + dt) - ln_water(t - dt)) / (2.0 * dt)
}

/// ln of the saturation pressure over the stable condensed phase (ice below 0 degC), T in K.
pub fn ln_saturation(t: f64) -> f64 {
    if t >= T_TRIPLE {
        return ln_water(t);
    }
    if t <= T_ZERO_C {
        return ln_ice_hyland_wexler(t);
    }
    join_phases(t, ln_ice_hyland_wexler(t), ln_water(t))
}

/// Linear join of an ice value and a water value across 0 degC .. 0.01 degC.
fn join_phases(t: f64, ice: f64, water: f64) -> f64 {
    if t <= T_ZERO_C {
        ice
    } else if t >= T_TRIPLE {
        water
    } else {
        let s = (t - T_ZERO_C) / (T_TRIPLE - T_ZERO_C);
        (1.0 - s) * ice + s * water
    }
}

/// Enhancement factor f(T, p) of water vapour in air at saturation, T in K, p in Pa.
///
/// Greenspan's form `ln f = alpha (1 - e_s/p) + beta (p/e_s - 1)` with Hardy's
/// (1998) coefficients for water (0-100 degC) and ice (-100-0 degC). It tends to 1
/// as e_s approaches p; where e_s >= p (above the boiling point) it is 1.
pub fn enhancement_factor(t: f64, p: f64) -> f64 {
    (ln_saturated_vapour_pressure(t, p) - ln_saturation(t)).exp()
}

/// ln of `f p_ws` over one phase, given ln p_ws of that phase.
fn ln_phase(t: f64, p: f64, ln_es: f64, coefficients: &[f64; 8]) -> f64 {
    ln_es + ln_enhancement(t, p, ln_es, coefficients)
}

/// ln of the vapour partial pressure of saturated moist air, `ln(f p_ws)`, T in K, p in Pa.
pub fn ln_saturated_vapour_pressure(t: f64, p: f64) -> f64 {
    if t >= T_TRIPLE {
        return ln_phase(t, p, ln_water(t), &HARDY_WATER);
    }
    let ice = ln_phase(t, p, ln_ice_hyland_wexler(t), &HARDY_ICE);
    if t <= T_ZERO_C {
        return ice;
    }
    join_phases(t, ice, ln_phase(t, p, ln_water(t), &HARDY_WATER))
}

/// Hardy (1998) enhancement-factor coefficients: (A1..A4, B1..B4), t in degC.
const HARDY_WATER: [f64; 8] = [
    3.536_24e-4,
    2.932_28e-5,
    2.614_74e-7,
    8.575_38e-9,
    -1.075_88e1,
    6.325_29e-2,
    -2.535_91e-4,
    6.337_84e-7,
];
const HARDY_ICE: [f64; 8] = [
    3.644_49e-4,
    2.936_31e-5,
    4.886_35e-7,
    4.365_43e-9,
    -1.072_71e1,
    7.619_89e-2,
    -1.747_71e-4,
    2.467_21e-6,
];

fn ln_enhancement(t: f64, p: f64, ln_es: f64, c: &[f64; 8]) -> f64 {
    enhancement_exponent(t, p, ln_es.exp(), c)
}

/// `ln f` from Greenspan's form, given e_s in Pa; zero where e_s >= p.
#[inline]
fn enhancement_exponent(t: f64, p: f64, es: f64, c: &[f64; 8]) -> f64 {
    enhancement_exponent_and_slope(t, p, es, 0.0, c).0
}

/// `ln f` and `d ln f / dT` (1/K) from Greenspan's form, given e_s (Pa) and
/// `d ln e_s / dT`. Both zero where e_s >= p; the temperature polynomials are
/// held constant (slope zero) outside -100..200 degC, where they are clamped.
#[inline(always)]
fn enhancement_exponent_and_slope(
    t: f64,
    p: f64,
    es: f64,
    dln_es: f64,
    c: &[f64; 8],
) -> (f64, f64) {
    if es >= p {
        return (0.0, 0.0);
    }
    let raw = t - T_ZERO_C;
    let tc = raw.clamp(-100.0, 200.0);
    let inside = if raw == tc { 1.0 } else { 0.0 };
    let alpha = c[0] + tc * (c[1] + tc * (c[2] + tc * c[3]));
    let beta = (c[4] + tc * (c[5] + tc * (c[6] + tc * c[7]))).exp();
    let dry = es * (1.0 / p);
    let wet = 1.0 / dry;
    let value = alpha * (1.0 - dry) + beta * (wet - 1.0);
    let dalpha = c[1] + tc * (2.0 * c[2] + tc * 3.0 * c[3]);
    let dbeta = beta * (c[5] + tc * (2.0 * c[6] + tc * 3.0 * c[7]));
    let slope =
        inside * (dalpha * (1.0 - dry) + dbeta * (wet - 1.0)) - (alpha * dry + beta * wet) * dln_es;
    (value, slope)
}

/// `exp(x)`, by its Taylor series to x^5 when |x| < 0.01 (truncation below
/// 1.4e-15 relative, the rounding of `exp` itself), else by `exp`. Saves a
/// transcendental call for the enhancement factor, which is within 1 % of 1.
#[inline]
pub(crate) fn exp_small(x: f64) -> f64 {
    if x.abs() < 0.01 {
        1.0 + x * (1.0 + x * 0.5 * (1.0 + x * (1.0 / 3.0) * (1.0 + x * 0.25 * (1.0 + x * 0.2))))
    } else {
        x.exp()
    }
}

/// `p_ws`, `ln f` and `d ln(f p_ws) / dT` over one phase, given ln p_ws of
/// that phase and its slope.
#[inline(always)]
fn phase_terms(t: f64, p: f64, ln_es: f64, dln_es: f64, c: &[f64; 8]) -> (f64, f64, f64) {
    let es = ln_es.exp();
    let (ln_f, dln_f) = enhancement_exponent_and_slope(t, p, es, dln_es, c);
    (es, ln_f, dln_es + dln_f)
}

/// `f p_ws` over one phase and `d ln(f p_ws) / dT`, given ln p_ws of that
/// phase and its slope.
#[inline(always)]
fn phase_pressure_and_slope(t: f64, p: f64, ln_es: f64, dln_es: f64, c: &[f64; 8]) -> (f64, f64) {
    let (es, ln_f, slope) = phase_terms(t, p, ln_es, dln_es, c);
    (es * exp_small(ln_f), slope)
}

/// [`ln_saturated_vapour_pressure`] and its temperature derivative (1/K),
/// analytic as in [`saturated_vapour_pressure_and_slope`] (a central
/// difference across 0..0.01 degC), without taking the logarithm of the
/// pressure: the dew-point residual.
#[inline]
pub fn ln_saturated_vapour_pressure_and_slope(t: f64, p: f64) -> (f64, f64) {
    let (ln_es, dln_es, c) = if t >= T_TRIPLE {
        (ln_water(t), ln_water_slope(t), &HARDY_WATER)
    } else if t <= T_ZERO_C {
        (ln_ice_hyland_wexler(t), ln_ice_slope(t), &HARDY_ICE)
    } else {
        let dt = 1e-6;
        let slope = (ln_saturated_vapour_pressure(t + dt, p)
            - ln_saturated_vapour_pressure(t - dt, p))
            / (2.0 * dt);
        return (ln_saturated_vapour_pressure(t, p), slope);
    };
    let (_, ln_f, slope) = phase_terms(t, p, ln_es, dln_es, c);
    (ln_es + ln_f, slope)
}

/// Vapour partial pressure of saturated moist air at T (K) and total pressure p (Pa):
/// `f(T, p) p_ws(T)`, over ice below 0 degC (equal to the exponential of
/// [`ln_saturated_vapour_pressure`] up to rounding).
#[inline]
pub fn saturated_vapour_pressure(t: f64, p: f64) -> f64 {
    saturated_vapour_pressure_and_slope(t, p).0
}

/// [`saturated_vapour_pressure`] (Pa) and its logarithmic temperature
/// derivative `d ln(f p_ws) / dT` (1/K), analytic (Hyland-Wexler and Hardy
/// differentiated term by term) except in the IF97 join above 150 degC and
/// across 0..0.01 degC, where it is a central difference.
#[inline]
pub fn saturated_vapour_pressure_and_slope(t: f64, p: f64) -> (f64, f64) {
    saturated_vapour_pressure_and_slope_inline(t, p)
}

/// [`saturated_vapour_pressure_and_slope`] inlined into the caller (the
/// saturated side of the wet-bulb balance, which shares `1/T` with the
/// enthalpies): the same arithmetic, so the same bits. Only the phase join
/// across 0..0.01 degC stays out of line.
#[inline(always)]
pub(super) fn saturated_vapour_pressure_and_slope_inline(t: f64, p: f64) -> (f64, f64) {
    if t >= T_TRIPLE {
        phase_pressure_and_slope(t, p, ln_water(t), ln_water_slope(t), &HARDY_WATER)
    } else if t <= T_ZERO_C {
        phase_pressure_and_slope(t, p, ln_ice_hyland_wexler(t), ln_ice_slope(t), &HARDY_ICE)
    } else {
        saturated_vapour_pressure_and_slope_in_join(t, p)
    }
}

/// [`saturated_vapour_pressure_and_slope`] across 0..0.01 degC: a central
/// difference of the joined logarithm.
#[inline(never)]
fn saturated_vapour_pressure_and_slope_in_join(t: f64, p: f64) -> (f64, f64) {
    let dt = 1e-6;
    let slope = (ln_saturated_vapour_pressure(t + dt, p) - ln_saturated_vapour_pressure(t - dt, p))
        / (2.0 * dt);
    (ln_saturated_vapour_pressure(t, p).exp(), slope)
}

/// [`saturated_vapour_pressure`] (Pa) at T (K) and p (Pa) given `ln_t`,
/// `t.ln()` (a caller that needs ln T for other properties of the same
/// state takes it once), and without the temperature slope: from the triple
/// point to 150 degC (the Hyland-Wexler branch over liquid water) the value
/// part of the same arithmetic, so the same bits
/// (`tests::vapour_pressure_from_ln_t_has_the_same_bits`); elsewhere
/// [`saturated_vapour_pressure`] itself.
#[inline]
pub fn saturated_vapour_pressure_from_ln_t(t: f64, p: f64, ln_t: f64) -> f64 {
    if (T_TRIPLE..=JOIN_START).contains(&t) {
        // `ln_water(t)` is the Hyland-Wexler branch here; `phase_terms` and
        // `phase_pressure_and_slope` without their slope.
        let es = ln_water_hyland_wexler_from_ln(t, ln_t).exp();
        return es * exp_small(enhancement_exponent(t, p, es, &HARDY_WATER));
    }
    saturated_vapour_pressure(t, p)
}

/// [`saturated_vapour_pressure_and_slope`] and, from the triple point up,
/// the pure-water pressure `p_ws` (Pa) and `d ln p_ws / dT` (1/K) it was
/// formed from: the same bits as `ln_water(t).exp()` and
/// `ln_water_slope(t)`, for a caller that needs them too (the latent heat at
/// a wet surface); `None` below the triple point.
#[inline]
pub fn saturated_vapour_pressure_slope_and_water(t: f64, p: f64) -> (f64, f64, Option<(f64, f64)>) {
    if t >= T_TRIPLE {
        let (ln_es, dln_es) = (ln_water(t), ln_water_slope(t));
        let (es, ln_f, slope) = phase_terms(t, p, ln_es, dln_es, &HARDY_WATER);
        (es * exp_small(ln_f), slope, Some((es, dln_es)))
    } else {
        let (pvs, slope) = saturated_vapour_pressure_and_slope(t, p);
        (pvs, slope, None)
    }
}

/// Wagner & Pruss (1993) auxiliary eq. 2.6, saturated liquid density:
/// `rho'/rho_c = 1 + sum b_i tau^(e_i/3)`, `tau = 1 - T/T_c`; the
/// coefficients b_i and the integer exponents e_i of `tau^(1/3)`.
pub(crate) const WP_LIQUID_B: [f64; 6] = [
    1.992_740_64,
    1.099_653_42,
    -0.510_839_303,
    -1.754_934_79,
    -45.517_035_2,
    -6.746_944_50e5,
];
pub(crate) const WP_LIQUID_E: [i32; 6] = [1, 2, 5, 16, 43, 110];

/// Wagner & Pruss (1993) auxiliary eq. 2.7, saturated vapour density:
/// `ln(rho''/rho_c) = sum c_i tau^(e_i/6)`; the coefficients c_i and the
/// integer exponents e_i of `tau^(1/6)`.
pub(crate) const WP_VAPOUR_C: [f64; 6] = [
    -2.031_502_40,
    -2.683_029_40,
    -5.386_264_92,
    -17.299_160_5,
    -44.758_658_1,
    -63.920_106_3,
];
pub(crate) const WP_VAPOUR_E: [i32; 6] = [2, 4, 8, 18, 37, 71];

/// Saturated liquid density, kg/m^3, Wagner & Pruss (1993) auxiliary eq. 2.6, T in K.
pub fn saturated_liquid_density(t: f64) -> f64 {
    let root = (1.0 - t / T_CRITICAL).max(0.0).cbrt();
    let sum: f64 = WP_LIQUID_B
        .iter()
        .zip(WP_LIQUID_E)
        .map(|(b, e)| b * root.powi(e))
        .sum();
    RHO_CRITICAL * (1.0 + sum)
}

/// Saturated vapour density, kg/m^3, Wagner & Pruss (1993) auxiliary eq. 2.7, T in K.
pub fn saturated_vapour_density(t: f64) -> f64 {
    let root = (1.0 - t / T_CRITICAL).max(0.0).sqrt().cbrt();
    let sum: f64 = WP_VAPOUR_C
        .iter()
        .zip(WP_VAPOUR_E)
        .map(|(c, e)| c * root.powi(e))
        .sum();
    RHO_CRITICAL * sum.exp()
}

/// Latent heat of vaporization of water, J/kg, at T in K (up to the critical point).
///
/// Clausius-Clapeyron, `h_fg = T (1/rho'' - 1/rho') dp_s/dT`, on the liquid
/// saturation line of [`ln_water`] with Wagner-Pruss saturated densities.
/// Zero at and above the critical temperature.
pub fn latent_heat_j_per_kg(t: f64) -> f64 {
    if t >= T_CRITICAL {
        return 0.0;
    }
    let dt = 1e-3_f64.min(0.5 * (T_CRITICAL - t));
    let dp_dt = (ln_water(t + dt).exp() - ln_water(t - dt).exp()) / (2.0 * dt);
    let dv = 1.0 / saturated_vapour_density(t) - 1.0 / saturated_liquid_density(t);
    t * dv * dp_dt
}

/// Boiling point of water at total pressure p (Pa): where `p_ws(T) = p`, K.
///
/// Starts from the IF97 backward equation and polishes it on [`ln_water`], so it
/// is consistent with the saturation curve used everywhere else.
pub fn boiling_point(p: f64) -> Result<f64, crate::engine::solve::SolveError> {
    use crate::engine::solve::{brent, Tolerance};
    let guess = if97_saturation_temperature(p.clamp(611.3, P_CRITICAL));
    let ln_p = p.ln();
    let lo = (guess - 2.0).max(T_TRIPLE);
    let hi = (guess + 2.0).min(T_CRITICAL);
    brent(|t| ln_water(t) - ln_p, lo, hi, Tolerance::new(1e-12, 1e-15))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The vapour pressure from a given ln T equals the one that takes its
    /// own, bit for bit: -100 to 350 degC in steps of 0.0173 K (ice, the
    /// 0..0.01 degC join, liquid, the IF97 join and branch), a fine grid
    /// around the triple point and the join's start, 1 kPa to 10 MPa.
    #[test]
    fn vapour_pressure_from_ln_t_has_the_same_bits() {
        let wide = (0..=26_012).map(|i| 173.15 + 0.0173 * f64::from(i));
        let fine = (-500..=500).flat_map(|i| {
            let d = 1e-5 * f64::from(i);
            [T_TRIPLE + d, JOIN_START + d, T_ZERO_C + d]
        });
        let mut compared = 0;
        for t in wide.chain(fine) {
            for p in [1e3, 50e3, 101_325.0, 200e3, 10e6] {
                let want = saturated_vapour_pressure(t, p);
                let got = saturated_vapour_pressure_from_ln_t(t, p, t.ln());
                assert_eq!(got.to_bits(), want.to_bits(), "{t} K, {p} Pa");
                compared += 1;
            }
        }
        assert_eq!(compared, (26_013 + 3 * 1001) * 5);
    }

    /// IAPWS-IF97 verification values (R7-97(2012) tables 35 and 36).
    #[test]
    fn if97_region4_verification_values() {
        for (t, p_mpa) in [
            (300.0, 0.353_658_941e-2),
            (500.0, 0.263_889_776e1),
            (600.0, 0.123_443_146e2),
        ] {
            let p = if97_saturation_pressure(t) / 1e6;
            assert!((p / p_mpa - 1.0).abs() < 1e-8, "T={t}: {p} vs {p_mpa}");
        }
        for (p_mpa, t) in [
            (0.1, 0.372_755_919e3),
            (1.0, 0.453_035_632e3),
            (10.0, 0.584_149_488e3),
        ] {
            let got = if97_saturation_temperature(p_mpa * 1e6);
            assert!((got / t - 1.0).abs() < 1e-8, "p={p_mpa}: {got} vs {t}");
        }
    }

    #[test]
    fn log_pressure_and_slope_match_the_pressure() {
        for t in [
            173.15, 200.0, 273.15, 273.155, 273.16, 300.0, 373.0, 450.0, 600.0,
        ] {
            for p in [50e3, 101_325.0, 200e3] {
                let (ln_pvs, dln) = ln_saturated_vapour_pressure_and_slope(t, p);
                let (pvs, slope) = saturated_vapour_pressure_and_slope(t, p);
                assert!(
                    (ln_pvs - pvs.ln()).abs() < 1e-14 * pvs.ln().abs().max(1.0),
                    "{t} {p}"
                );
                assert!((dln - slope).abs() <= 1e-12 * slope.abs(), "{t} {p}");
            }
        }
    }

    #[test]
    fn short_exponential_matches_exp() {
        for i in -200..=200 {
            let x = i as f64 * 0.0000499;
            assert!((exp_small(x) / x.exp() - 1.0).abs() < 2e-15, "{x}");
        }
        assert_eq!(exp_small(0.5), 0.5f64.exp());
    }

    #[test]
    fn pressure_and_its_log_agree() {
        for t in [
            173.15, 233.15, 273.15, 273.155, 273.16, 300.0, 373.0, 450.0, 600.0,
        ] {
            for p in [50e3, 101_325.0, 200e3] {
                let a = saturated_vapour_pressure(t, p);
                let b = ln_saturated_vapour_pressure(t, p).exp();
                assert!((a / b - 1.0).abs() < 1e-14, "T={t} p={p}: {a} vs {b}");
            }
        }
    }

    /// The analytic slope of ln(f p_ws) against a central difference of the value.
    #[test]
    fn vapour_pressure_slope_matches_a_difference() {
        let mut t = T_MIN_SATURATION + 0.5;
        while t < 640.0 {
            for p in [50e3, 101_325.0, 200e3, 5e6] {
                let (pvs, slope) = saturated_vapour_pressure_and_slope(t, p);
                assert_eq!(pvs, saturated_vapour_pressure(t, p));
                let dt = 1e-4;
                let diff = (saturated_vapour_pressure(t + dt, p).ln()
                    - saturated_vapour_pressure(t - dt, p).ln())
                    / (2.0 * dt);
                assert!(
                    (slope / diff - 1.0).abs() < 1e-7,
                    "T={t} p={p}: {slope} vs {diff}"
                );
            }
            t += 0.731;
        }
    }

    #[test]
    fn saturation_curve_is_continuous_and_increasing() {
        let mut last = ln_saturation(T_MIN_SATURATION);
        let mut t = T_MIN_SATURATION;
        while t < 640.0 {
            t += 0.005;
            let now = ln_saturation(t);
            assert!(now > last, "not increasing at {t}");
            assert!(now - last < 0.01, "jump at {t}");
            last = now;
        }
    }
}
