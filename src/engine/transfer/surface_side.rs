//! The saturated side of the wet-surface balance with exact temperature
//! slopes: the humidity ratio of air saturated at the surface, the latent heat
//! of vaporization there, and their derivatives along the saturation line.
//!
//! With exact slopes the surface temperature is found by Newton's method,
//! which converges quadratically: one or two evaluations from a start within
//! a few hundredths of a kelvin (see `wet_surface`).
//!
//! The saturation curve is the air engine's own (`saturated_vapour_pressure_and_slope`,
//! with its enhancement factor), so the limiting case is the air engine's
//! wet-bulb. The latent heat is the air engine's definition,
//! Clausius-Clapeyron on the liquid saturation curve `ln_water` with the
//! saturated densities of Wagner & Pruss (1993), auxiliary equations 2.6 and
//! 2.7 (J. Phys. Chem. Ref. Data 22, 783), written out here with their
//! derivatives: `dp_s/dT = p_s d ln p_s/dT` analytic where the air engine's
//! [`crate::engine::air::latent_heat_vaporization`] takes a central
//! difference of `p_s` (the two agree within 1e-9 relative, tested below).
//! Built here, beside the air engine rather than in it, so that the air
//! engine's files are left as they are.

use crate::engine::air::saturation::{
    ln_water, ln_water_slope, saturated_vapour_pressure_slope_and_water, RHO_CRITICAL, T_CRITICAL,
    T_MIN_SATURATION, WP_LIQUID_B, WP_LIQUID_E, WP_VAPOUR_C, WP_VAPOUR_E,
};
use crate::engine::air::thermo::EPSILON;

/// Highest surface temperature handled with exact slopes, K: below the join
/// of the Hyland-Wexler and IF97 saturation curves at 150 degC (where the air
/// engine's slope becomes a central difference). The surface of air at 50 to
/// 200 kPa stays below 121 degC (the boiling point at 200 kPa).
pub(super) const T_MAX_EXACT_SLOPE: f64 = 420.0;

/// Latent heat of vaporization of water, J/kg, and its temperature
/// derivative, J/(kg K), at T in K (173.15 K to [`T_MAX_EXACT_SLOPE`]).
///
/// `L = T (1/rho'' - 1/rho') dp_s/dT` with `dp_s/dT = p_s g'`, `g = ln p_s`;
/// `dL/dT = dv p_s' + T dv' p_s' + T dv p_s''`, `p_s'' = p_s (g'^2 + g'')`.
/// `g'` is the air engine's analytic slope of `ln_water`; `g''` its central
/// difference over 2e-3 K (truncation and rounding near 1e-10 relative; the
/// term is under 2 % of the balance's slope).
pub(super) fn latent_heat_and_slope(t: f64) -> (f64, f64) {
    latent_heat_and_slope_from(t, ln_water(t).exp(), ln_water_slope(t))
}

/// [`latent_heat_and_slope`] given `p_s = exp(ln_water(t))` and
/// `g' = ln_water_slope(t)` (the saturated side of the balance has them
/// from the vapour pressure already).
fn latent_heat_and_slope_from(t: f64, ps: f64, g1: f64) -> (f64, f64) {
    const DT: f64 = 1e-3;
    let g2 = (ln_water_slope(t + DT) - ln_water_slope(t - DT)) / (2.0 * DT);
    let dps = ps * g1;
    let d2ps = ps * (g1 * g1 + g2);
    let (r, q) = density_roots(t);
    let (rho_l, drho_l) = liquid_density_and_slope(r);
    let (rho_v, drho_v) = vapour_density_and_slope(q);
    let dv = 1.0 / rho_v - 1.0 / rho_l;
    let ddv = -drho_v / (rho_v * rho_v) + drho_l / (rho_l * rho_l);
    let latent = t * dv * dps;
    let slope = dv * dps + t * ddv * dps + t * dv * d2ps;
    (latent, slope)
}

/// The roots `r = tau^(1/3)` and `q = tau^(1/6) = sqrt(r)` of
/// `tau = 1 - T/T_c` that the saturated densities are polynomials in; one
/// logarithm and one exponential for the cube root, a square root for the
/// sixth.
fn density_roots(t: f64) -> (f64, f64) {
    let tau = (1.0 - t / T_CRITICAL).max(0.0);
    let r = if tau > 0.0 {
        (tau.ln() * (1.0 / 3.0)).exp()
    } else {
        0.0
    };
    (r, r.sqrt())
}

/// Saturated liquid density, kg/m^3, and its derivative, kg/(m^3 K), from
/// `r = tau^(1/3)`: Wagner & Pruss (1993) auxiliary eq. 2.6,
/// `rho'/rho_c = 1 + sum b_i tau^(e_i/3)`, `tau = 1 - T/T_c`.
fn liquid_density_and_slope(r: f64) -> (f64, f64) {
    const B: [f64; 6] = WP_LIQUID_B;
    // Exponents 1/3, 2/3, 5/3, 16/3, 43/3, 110/3: powers 1, 2, 5, 16, 43,
    // 110 of r = tau^(1/3), by repeated squaring shared between them.
    let r2 = r * r;
    let r4 = r2 * r2;
    let r8 = r4 * r4;
    let r16 = r8 * r8;
    let r32 = r16 * r16;
    let r43 = r32 * r8 * r2 * r;
    let r110 = r32 * r32 * r32 * r8 * r4 * r2;
    let terms = [
        B[0] * r,
        B[1] * r2,
        B[2] * r4 * r,
        B[3] * r16,
        B[4] * r43,
        B[5] * r110,
    ];
    let e = WP_LIQUID_E.map(f64::from);
    let sum: f64 = terms.iter().sum();
    let dsum_dr: f64 = terms.iter().zip(e).map(|(x, e)| e * x).sum::<f64>() / r;
    // dr/dT = -1 / (3 T_c r^2).
    let dr_dt = -1.0 / (3.0 * T_CRITICAL * r2);
    (RHO_CRITICAL * (1.0 + sum), RHO_CRITICAL * dsum_dr * dr_dt)
}

/// Saturated vapour density, kg/m^3, and its derivative, kg/(m^3 K), from
/// `q = tau^(1/6)`: Wagner & Pruss (1993) auxiliary eq. 2.7,
/// `ln(rho''/rho_c) = sum c_i tau^(e_i/6)`.
fn vapour_density_and_slope(q: f64) -> (f64, f64) {
    const C: [f64; 6] = WP_VAPOUR_C;
    // Exponents 2/6, 4/6, 8/6, 18/6, 37/6, 71/6: powers 2, 4, 8, 18, 37, 71
    // of q = tau^(1/6), by repeated squaring shared between them.
    let q2 = q * q;
    let q4 = q2 * q2;
    let q8 = q4 * q4;
    let q16 = q8 * q8;
    let q18 = q16 * q2;
    let q32 = q16 * q16;
    let q37 = q32 * q4 * q;
    let q71 = q32 * q32 * q4 * q2 * q;
    let terms = [
        C[0] * q2,
        C[1] * q4,
        C[2] * q8,
        C[3] * q18,
        C[4] * q37,
        C[5] * q71,
    ];
    let e = WP_VAPOUR_E.map(f64::from);
    let sum: f64 = terms.iter().sum();
    let dsum_dq: f64 = terms.iter().zip(e).map(|(x, e)| e * x).sum::<f64>() / q;
    // dq/dT = -1 / (6 T_c q^5).
    let dq_dt = -1.0 / (6.0 * T_CRITICAL * q4 * q);
    let rho = RHO_CRITICAL * sum.exp();
    (rho, rho * dsum_dq * dq_dt)
}

/// Air saturated at a surface temperature: humidity ratio and latent heat,
/// with their temperature slopes.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) struct SaturatedSurface {
    /// Humidity ratio of saturated air, kg/kg dry air.
    pub w: f64,
    /// `dw/dT`, kg/(kg dry air K).
    pub dw: f64,
    /// Latent heat of vaporization, J/kg.
    pub latent: f64,
    /// `dL/dT`, J/(kg K).
    pub dlatent: f64,
}

impl SaturatedSurface {
    /// At surface temperature `ts` (K) and total pressure `p` (Pa); `None`
    /// outside 173.15 K .. [`T_MAX_EXACT_SLOPE`] or where saturated air does
    /// not exist (`f p_ws >= p`).
    pub(super) fn at(ts: f64, p: f64) -> Option<SaturatedSurface> {
        if !(T_MIN_SATURATION..=T_MAX_EXACT_SLOPE).contains(&ts) {
            return None;
        }
        let (pvs, dln_pvs, water) = saturated_vapour_pressure_slope_and_water(ts, p);
        if pvs.is_nan() || pvs >= p {
            return None;
        }
        // w = eps pvs / (p - pvs): d ln w / dT = p / (p - pvs) d ln pvs / dT.
        let per_pa = 1.0 / (p - pvs);
        let w = EPSILON * pvs * per_pa;
        // Over liquid water the pure-water pressure is the one the vapour
        // pressure was formed from; below the triple point (ice) it is not.
        let (latent, dlatent) = match water {
            Some((ps, g1)) => latent_heat_and_slope_from(ts, ps, g1),
            None => latent_heat_and_slope(ts),
        };
        Some(SaturatedSurface {
            w,
            dw: w * p * per_pa * dln_pvs,
            latent,
            dlatent,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::air::saturation::{
        latent_heat_j_per_kg, saturated_liquid_density, saturated_vapour_density,
        saturated_vapour_pressure,
    };

    fn grid() -> impl Iterator<Item = f64> {
        (0..=240).map(|i| 180.0 + f64::from(i))
    }

    /// The densities are the air engine's (same equations, term by term, up
    /// to rounding).
    #[test]
    fn densities_are_the_air_engines() {
        for t in grid() {
            let (r, q) = density_roots(t);
            let (l, _) = liquid_density_and_slope(r);
            let (v, _) = vapour_density_and_slope(q);
            let want = saturated_liquid_density(t);
            assert!((l / want - 1.0).abs() < 1e-14, "{t}: {l} {want}");
            let want = saturated_vapour_density(t);
            // The exponent of eq. 2.7 reaches -14 at -90 degC: a rounding
            // of q (from its own root, not the air engine's) is amplified
            // about a hundredfold there.
            assert!((v / want - 1.0).abs() < 1e-12, "{t}: {v} {want}");
        }
    }

    /// The latent heat with an analytic dp_s/dT against the air engine's
    /// central difference of p_s over 2e-3 K: equal within that difference's
    /// truncation error, (1e-3 K)^2 / 6 times p_s'''/p_s' relative, with
    /// p_s'''/p_s' = g'^2 + 3 g'' + g'''/g' (g = ln p_s; the last term is
    /// negligible), doubled, plus its rounding (2e-11): 5e-9 at -93 degC,
    /// 4e-10 at 140 degC.
    #[test]
    fn latent_heat_is_the_air_engines() {
        for t in grid() {
            let (l, _) = latent_heat_and_slope(t);
            let air = latent_heat_j_per_kg(t);
            let g1 = ln_water_slope(t);
            let g2 = (ln_water_slope(t + 1e-3) - ln_water_slope(t - 1e-3)) / 2e-3;
            let truncation = 1e-6 / 6.0 * (g1 * g1 + 3.0 * g2.abs());
            assert!(
                (l / air - 1.0).abs() < 2.0 * truncation + 2e-11,
                "{t}: {l} {air}"
            );
        }
    }

    /// Every slope against a central difference of its own value (step
    /// 1e-3 K, truncation near 1e-8 relative).
    #[test]
    fn slopes_match_central_differences() {
        let d = 1e-3;
        for t in grid() {
            let fd = |f: &dyn Fn(f64) -> f64| (f(t + d) - f(t - d)) / (2.0 * d);
            let (_, dl) = latent_heat_and_slope(t);
            let want = fd(&|x| latent_heat_and_slope(x).0);
            assert!(
                (dl - want).abs() < 1e-6 * want.abs() + 1e-3,
                "{t}: {dl} {want}"
            );
            let (r, q) = density_roots(t);
            let (_, drl) = liquid_density_and_slope(r);
            let want = fd(&|x| liquid_density_and_slope(density_roots(x).0).0);
            assert!((drl - want).abs() < 1e-7 * want.abs(), "{t}: {drl} {want}");
            let (_, drv) = vapour_density_and_slope(q);
            let want = fd(&|x| vapour_density_and_slope(density_roots(x).1).0);
            assert!((drv - want).abs() < 1e-7 * want.abs(), "{t}: {drv} {want}");
        }
    }

    /// The saturated side as it was formed before it took the pure-water
    /// pressure from the vapour pressure's own evaluation: the vapour
    /// pressure and its slope, then the latent heat from `ln_water` again.
    fn at_reference(ts: f64, p: f64) -> Option<SaturatedSurface> {
        if !(T_MIN_SATURATION..=T_MAX_EXACT_SLOPE).contains(&ts) {
            return None;
        }
        let (pvs, dln_pvs) =
            crate::engine::air::saturation::saturated_vapour_pressure_and_slope(ts, p);
        if pvs.is_nan() || pvs >= p {
            return None;
        }
        let per_pa = 1.0 / (p - pvs);
        let w = EPSILON * pvs * per_pa;
        let (latent, dlatent) = latent_heat_and_slope(ts);
        Some(SaturatedSurface {
            w,
            dw: w * p * per_pa * dln_pvs,
            latent,
            dlatent,
        })
    }

    /// Sharing the pure-water pressure changes no bit: every field equal to
    /// the reference's, over ice, the join and liquid water, 50 to 200 kPa
    /// (a fine grid near the triple point, where the branch changes).
    #[test]
    fn shared_water_pressure_gives_the_same_bits() {
        let fine = (0..=400).map(|i| 273.14 + f64::from(i) * 1e-4);
        let wide = (0..=24_000).map(|i| 173.15 + f64::from(i) * 0.01);
        let mut compared = 0;
        for t in fine.chain(wide).chain([T_MAX_EXACT_SLOPE, 420.000_001]) {
            for p in [50e3, 101_325.0, 200e3] {
                let (got, want) = (SaturatedSurface::at(t, p), at_reference(t, p));
                assert_eq!(got.is_some(), want.is_some(), "{t} {p}");
                let (Some(got), Some(want)) = (got, want) else {
                    continue;
                };
                let bits = |s: SaturatedSurface| [s.w, s.dw, s.latent, s.dlatent].map(f64::to_bits);
                assert_eq!(bits(got), bits(want), "{t} {p}");
                compared += 1;
            }
        }
        assert!(compared > 60_000, "{compared}");
    }

    /// The saturated humidity ratio is the air engine's, its slope that of
    /// its own values; the ice branch and the 0..0.01 degC join included.
    #[test]
    fn saturated_air_at_the_surface() {
        for p in [50e3, 101_325.0, 200e3] {
            for t in grid().chain([273.15, 273.155, 273.16]) {
                let Some(s) = SaturatedSurface::at(t, p) else {
                    let pvs = saturated_vapour_pressure(t, p);
                    assert!(pvs >= p || t > T_MAX_EXACT_SLOPE, "{t} {p}");
                    continue;
                };
                let pvs = saturated_vapour_pressure(t, p);
                let want = EPSILON * pvs / (p - pvs);
                assert!((s.w / want - 1.0).abs() < 1e-14, "{t} {p}");
                let d = 1e-4;
                let (Some(hi), Some(lo)) = (
                    SaturatedSurface::at(t + d, p),
                    SaturatedSurface::at(t - d, p),
                ) else {
                    continue;
                };
                if (273.14..273.17).contains(&t) {
                    continue; // the kinks of the ice-liquid join
                }
                let fd = (hi.w - lo.w) / (2.0 * d);
                assert!((s.dw / fd - 1.0).abs() < 1e-6, "{t} {p}: {} {fd}", s.dw);
            }
        }
    }
}
