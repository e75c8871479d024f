//! Enthalpies and specific heats of the components of humid air, in J/kg and
//! J/(kg K), on the ASHRAE reference state: dry air and liquid water at 0 degC
//! have zero enthalpy.
//!
//! - Dry air: ideal-gas part of Lemmon, Jacobsen, Penoncello & Friend (2000),
//!   "Thermodynamic properties of air and mixtures of nitrogen, argon and oxygen
//!   from 60 to 2000 K at pressures to 2000 MPa", J. Phys. Chem. Ref. Data 29, 331.
//! - Water vapour: IAPWS-IF97 region 2, ideal-gas part plus the five residual
//!   terms linear in pressure (the second-virial level), evaluated at the vapour
//!   partial pressure (water-water interactions; cross terms with air neglected).
//! - Air-air and air-water second virial coefficients: Hyland & Wexler (1983),
//!   "Formulations for the thermodynamic properties of dry air from 173.15 K to
//!   473.15 K, and of saturated moist air from 173.15 K to 372.15 K, at pressures
//!   to 5 MPa", ASHRAE Trans. 89(2A), 520-535 (coefficients from memory, checked
//!   against CoolProp's humid-air volume and enthalpy in tests/air_coolprop.rs).
//! - Liquid water and ice: ASHRAE Handbook - Fundamentals (2017) ch. 1 eqs. 35-36.

/// Molar mass of dry air, kg/mol (ASHRAE Fundamentals 2017 ch. 1).
pub const M_DRY_AIR: f64 = 0.028_966;
/// Molar mass of water, kg/mol (ASHRAE Fundamentals 2017 ch. 1).
pub const M_WATER: f64 = 0.018_015_268;
/// Ratio of molar masses water / dry air (0.621945).
pub const EPSILON: f64 = M_WATER / M_DRY_AIR;
/// Molar gas constant, J/(mol K) (CODATA 2018, exact).
pub const R_MOLAR: f64 = 8.314_462_618;
/// Specific gas constant of dry air, J/(kg K).
pub const R_DRY_AIR: f64 = R_MOLAR / M_DRY_AIR;
/// Specific gas constant of water in IAPWS-IF97, J/(kg K).
pub const R_WATER_IF97: f64 = 461.526;
/// Enthalpy of liquid water at 0 degC on the IF97 reference (liquid at the triple
/// point with u = s = 0), J/kg; about cp * (-0.01 K). Subtracted to move IF97
/// vapour enthalpies to the ASHRAE reference.
const H_LIQUID_0C_IF97: f64 = -41.6;

/// Standard pressure of the enthalpy reference state, Pa.
pub const P_REFERENCE: f64 = 101_325.0;

/// A second virial coefficient `B(T)` and `T dB/dT`, both m^3/mol, from
/// `B = c0 + c1/T + c2/T^2 + c3/T^3 + c4/T^4`.
fn virial(t: f64, c: &[f64; 5]) -> (f64, f64) {
    let x = 1.0 / t;
    let b = c[0] + x * (c[1] + x * (c[2] + x * (c[3] + x * c[4])));
    let t_db = -x * (c[1] + x * (2.0 * c[2] + x * (3.0 * c[3] + x * 4.0 * c[4])));
    (b, t_db)
}

/// `d(B - T dB/dT)/dT` of a virial coefficient from [`virial`]'s series, m^3/(mol K).
#[inline]
fn virial_enthalpy_slope(t: f64, c: &[f64; 5]) -> f64 {
    // B - T B' = sum (1 + k) c_k x^k with x = 1/T; its T-derivative is
    // -x sum k (1 + k) c_k x^k.
    let x = 1.0 / t;
    -x * x * (2.0 * c[1] + x * (6.0 * c[2] + x * (12.0 * c[3] + x * 20.0 * c[4])))
}

/// Hyland-Wexler (1983) B_aa of dry air.
const B_AIR_AIR: [f64; 5] = [0.349_568e-4, -0.668_772e-2, -0.210_141e1, 0.924_746e2, 0.0];
/// Hyland-Wexler (1983) B_aw, air-water cross coefficient.
const B_AIR_WATER: [f64; 5] = [
    0.323_660_97e-4,
    -0.141_138e-1,
    -0.124_453_5e1,
    0.0,
    -0.234_878_9e4,
];

/// Residual enthalpy per kg dry air of the air-air and air-water interactions at
/// air partial pressure `pa` and vapour partial pressure `pv`, J/kg dry air
/// (second-virial level: `H_res = p sum x_i x_j (B_ij - T B_ij')`).
#[inline]
pub fn air_residual_enthalpy(t: f64, pa: f64, pv: f64) -> f64 {
    air_residual_enthalpy_and_slopes(t, pa, pv).value
}

/// A function value with its partial derivatives in temperature, air partial
/// pressure and vapour partial pressure (SI: per K, per Pa).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WithSlopes {
    /// The value.
    pub value: f64,
    /// Partial derivative in temperature at constant partial pressures, per K.
    pub d_t: f64,
    /// Partial derivative in the dry-air partial pressure, per Pa.
    pub d_pa: f64,
    /// Partial derivative in the vapour partial pressure, per Pa.
    pub d_pv: f64,
}

/// [`air_residual_enthalpy`] with its partial derivatives.
#[inline]
fn air_residual_enthalpy_and_slopes(t: f64, pa: f64, pv: f64) -> WithSlopes {
    let (d_pa, d_pv) = air_residual_per_pa(t);
    let per_kg = 1.0 / M_DRY_AIR;
    let d_t = (pa * virial_enthalpy_slope(t, &B_AIR_AIR)
        + 2.0 * pv * virial_enthalpy_slope(t, &B_AIR_WATER))
        * per_kg;
    WithSlopes {
        value: pa * d_pa + pv * d_pv,
        d_t,
        d_pa,
        d_pv,
    }
}

/// The residual enthalpy per kg dry air per Pa of dry-air and of vapour
/// partial pressure at T (J/(kg Pa)): `(B_aa - T B_aa') / M_a` and
/// `2 (B_aw - T B_aw') / M_a`.
#[inline]
fn air_residual_per_pa(t: f64) -> (f64, f64) {
    let (baa, t_dbaa) = virial(t, &B_AIR_AIR);
    let (baw, t_dbaw) = virial(t, &B_AIR_WATER);
    let per_kg = 1.0 / M_DRY_AIR;
    ((baa - t_dbaa) * per_kg, 2.0 * (baw - t_dbaw) * per_kg)
}

/// Residual enthalpy of dry air at the reference state (0 degC, 101.325 kPa), J/kg.
fn air_residual_reference() -> f64 {
    static VALUE: std::sync::LazyLock<f64> = std::sync::LazyLock::new(|| {
        air_residual_enthalpy(super::saturation::T_ZERO_C, P_REFERENCE, 0.0)
    });
    *VALUE
}

/// Compressibility excess `Z - 1` of humid air at (T, p) with water mole fraction x_w:
/// `(p / RT)(x_a^2 B_aa + 2 x_a x_w B_aw) + x_w (Z_w(pv) - 1)`.
#[inline]
pub fn mixture_compressibility_excess(t: f64, p: f64, x_w: f64) -> f64 {
    let x_a = 1.0 - x_w;
    let (baa, _) = virial(t, &B_AIR_AIR);
    let (baw, _) = virial(t, &B_AIR_WATER);
    p / (R_MOLAR * t) * (x_a * x_a * baa + 2.0 * x_a * x_w * baw)
        + x_w * vapour_compressibility_excess(t, x_w * p)
}

/// Enthalpy of the dry air and the air-water interaction per kg dry air, relative
/// to dry air at 0 degC and 101.325 kPa, J/kg (all of h except `w h_v`).
#[inline]
pub fn air_part_enthalpy(t: f64, pa: f64, pv: f64) -> f64 {
    AirPartTerms::at(t).enthalpy(pa, pv)
}

/// What [`air_part_enthalpy`] needs of the temperature alone, to be reused
/// for many partial pressures at one temperature (a sweep over humidity at
/// one dry-bulb); [`AirPartTerms::enthalpy`] is the same arithmetic, so the
/// same bits.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct AirPartTerms {
    /// Ideal-gas dry-air enthalpy relative to 0 degC, J/kg.
    dry: f64,
    /// Residual enthalpy per Pa of dry-air and of vapour partial pressure, J/(kg Pa).
    per_pa_air: f64,
    per_pa_vapour: f64,
}

impl AirPartTerms {
    /// The terms at T (K).
    #[inline]
    pub fn at(t: f64) -> AirPartTerms {
        let (per_pa_air, per_pa_vapour) = air_residual_per_pa(t);
        AirPartTerms {
            // From the table of the dry-air enthalpy: within rounding.
            dry: super::dry_air_table::dry_air_enthalpy(t),
            per_pa_air,
            per_pa_vapour,
        }
    }

    /// [`air_part_enthalpy`] at the partial pressures `pa` and `pv` (Pa), J/kg.
    #[inline]
    pub fn enthalpy(&self, pa: f64, pv: f64) -> f64 {
        // The residual is `air_residual_enthalpy`'s value, term by term.
        self.dry + (pa * self.per_pa_air + pv * self.per_pa_vapour) - air_residual_reference()
    }
}

/// [`air_part_enthalpy`] (J/kg dry air) with its partial derivatives in T
/// (J/(kg K)), `pa` and `pv` (J/(kg Pa)), analytic.
#[inline(always)]
pub fn air_part_enthalpy_and_slopes(t: f64, pa: f64, pv: f64) -> WithSlopes {
    // From the table of the dry-air enthalpy, as in `AirPartTerms::at`.
    let (h_dry, cp_dry) = super::dry_air_table::enthalpy_and_cp(t);
    let residual = air_residual_enthalpy_and_slopes(t, pa, pv);
    WithSlopes {
        value: h_dry + residual.value - air_residual_reference(),
        d_t: cp_dry + residual.d_t,
        ..residual
    }
}

/// What the humid heat `(dh/dT)` at constant w and p needs of the temperature
/// alone: the specific heats of dry air and of water vapour and the terms
/// of the real-gas slopes, to be reused for many humidities at one
/// dry-bulb. [`HeatTerms::humid_heat`] is the arithmetic of the temperature
/// slopes `d_t` of [`air_part_enthalpy_and_slopes`] and
/// [`vapour_enthalpy_and_slopes`] without their other parts, so the same
/// bits.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct HeatTerms {
    /// Ideal-gas cp of dry air and of water vapour, J/(kg K).
    cp_dry: f64,
    cp_vapour: f64,
    /// `d(B - T B')/dT` of B_aa and B_aw, m^3/(mol K).
    slope_air_air: f64,
    slope_air_water: f64,
    /// The IF97 virial sum g_tau_tau, tau = 540 K / T and 1/T (kept apart:
    /// the residual slope multiplies them in turn into the vapour pressure).
    g_tau_tau: f64,
    tau: f64,
    inv_t: f64,
}

impl HeatTerms {
    /// The terms at T (K).
    #[inline]
    pub fn at(t: f64) -> HeatTerms {
        let (inv_t, tau, _, g_tau_tau) = vapour_virial_sums(t);
        HeatTerms {
            cp_dry: super::dry_air_table::enthalpy_and_cp(t).1,
            cp_vapour: vapour_ideal_enthalpy_and_cp(t).1,
            slope_air_air: virial_enthalpy_slope(t, &B_AIR_AIR),
            slope_air_water: virial_enthalpy_slope(t, &B_AIR_WATER),
            g_tau_tau,
            tau,
            inv_t,
        }
    }

    /// The humid heat per kg dry air, J/(kg K), at humidity ratio `w` with
    /// vapour partial pressure `pv` and total pressure `p` (Pa):
    /// `air_part_enthalpy_and_slopes(t, p - pv, pv).d_t + w vapour_enthalpy_and_slopes(t, pv).d_t`.
    #[inline]
    pub fn humid_heat(&self, w: f64, pv: f64, p: f64) -> f64 {
        let per_kg = 1.0 / M_DRY_AIR;
        let residual = ((p - pv) * self.slope_air_air + 2.0 * pv * self.slope_air_water) * per_kg;
        let air = self.cp_dry + residual;
        let d_t = -VAPOUR_RESIDUAL_SCALE * pv * self.g_tau_tau * self.tau * self.inv_t;
        air + w * (self.cp_vapour + d_t)
    }
}

/// Lemmon et al. (2000) ideal-gas coefficients for air, N1..N13, and reducing temperature.
const LEMMON_N: [f64; 13] = [
    0.605_719_400e-7,
    -0.210_274_769e-4,
    -0.158_860_716e-3,
    -13.841_928_076,
    17.275_266_575,
    -0.195_363_420e-3,
    2.490_888_032,
    0.791_309_509,
    0.212_236_768,
    -0.197_938_904,
    25.363_65,
    16.907_41,
    87.312_79,
];
const LEMMON_T_RED: f64 = 132.6312;
const LEMMON_R: f64 = 8.314_51 / 0.028_958_6;

/// tau * d(alpha0)/d(tau) for air, without the constant N5 term (it cancels in
/// differences), and tau times its tau-derivative; `inv` is 1/tau.
#[inline(always)]
fn air_tau_alpha_tau(tau: f64, inv: f64) -> (f64, f64) {
    let n = &LEMMON_N;
    let (inv2, inv3) = (inv * inv, inv * inv * inv);
    let poly = -3.0 * n[0] * inv3 - 2.0 * n[1] * inv2 - n[2] * inv;
    let tau_dpoly = 9.0 * n[0] * inv3 + 4.0 * n[1] * inv2 + n[2] * inv;
    // a b tau / (e^(b tau) - 1) and tau times its derivative.
    // Given e = e^(b tau).
    let planck = |a: f64, b: f64, e: f64| {
        let r = 1.0 / (e - 1.0);
        let value = a * b * tau * r;
        (value, value * (1.0 - b * tau * e * r))
    };
    let root = tau.sqrt();
    // N11 = 1.5 N12 + 0.002535: e^(N11 tau) is e^(N12 tau)^1.5 times a factor
    // within 0.2 % of 1 (a short series), one exponential instead of two
    // (a few units in the last place on terms below 3 % of the sum).
    let e12 = (n[11] * tau).exp();
    let (last, tau_dlast) = air_last_term(tau, e12);
    let e11 = e12 * e12.sqrt() * super::saturation::exp_small((n[10] - 1.5 * n[11]) * tau);
    let (p1, tau_dp1) = planck(n[7], n[10], e11);
    let (p2, tau_dp2) = planck(n[8], n[11], e12);
    let value = poly + 1.5 * n[5] * tau * root + n[6] + p1 + p2 + last;
    let tau_dvalue = tau_dpoly + 2.25 * n[5] * tau * root + tau_dp1 + tau_dp2 + tau_dlast;
    (value, tau_dvalue)
}

/// Lemmon's last term `N10 N13 tau / (2/3 e^(-N13 tau) + 1)` and tau times its
/// derivative, given `e12 = e^(N12 tau)`. Below about 31 degC (N13 tau > 37)
/// the exponential is under 2^-54 and drops out of the sum exactly, so it is
/// not evaluated. Between 31 and 190 degC (25 < N13 tau <= 37) it is under
/// 1.4e-11 and needs only a few digits: `e^(-N13 tau) = e12^-5 e^(-c tau)` with
/// `c = N13 - 5 N12`, `c tau` within 0.21 of 1, by a series to the sixth power
/// (relative error under 4e-9, so under 1e-19 of the term). Above, `exp`.
#[inline(always)]
fn air_last_term(tau: f64, e12: f64) -> (f64, f64) {
    let n = &LEMMON_N;
    let x = n[12] * tau;
    if x > 37.0 {
        let last = n[9] * x;
        return (last, last);
    }
    let small = if x > 25.0 {
        let u = 1.0 - (n[12] - 5.0 * n[11]) * tau;
        let series = 1.0
            + u * (1.0
                + u * 0.5
                    * (1.0
                        + u * (1.0 / 3.0)
                            * (1.0 + u * 0.25 * (1.0 + u * 0.2 * (1.0 + u * (1.0 / 6.0))))));
        let e2 = e12 * e12;
        std::f64::consts::E.recip() * series / (e2 * e2 * e12)
    } else {
        (-x).exp()
    };
    let q = 2.0 / 3.0 * small;
    let r = 1.0 / (q + 1.0);
    let last = n[9] * x * r;
    (last, last * (1.0 + x * q * r))
}

/// Ideal-gas enthalpy of dry air from an arbitrary origin (J/kg) and its cp (J/(kg K)).
#[inline(always)]
fn air_ideal_enthalpy_and_cp(t: f64) -> (f64, f64) {
    let inv_tau = t * (1.0 / LEMMON_T_RED);
    let (g, tau_dg) = air_tau_alpha_tau(1.0 / inv_tau, inv_tau);
    (LEMMON_R * t * (1.0 + g), LEMMON_R * (1.0 + g - tau_dg))
}

/// Enthalpy of dry air at T (K) relative to 0 degC, J/kg (ideal gas).
#[inline]
pub fn dry_air_enthalpy(t: f64) -> f64 {
    dry_air_enthalpy_and_cp(t).0
}

/// Enthalpy of dry air relative to 0 degC (J/kg) and its ideal-gas specific
/// heat (J/(kg K)), both from Lemmon et al. (2000), the specific heat
/// analytically.
#[inline(always)]
pub fn dry_air_enthalpy_and_cp(t: f64) -> (f64, f64) {
    static REFERENCE: std::sync::LazyLock<f64> =
        std::sync::LazyLock::new(|| air_ideal_enthalpy_and_cp(super::saturation::T_ZERO_C).0);
    let (h, cp) = air_ideal_enthalpy_and_cp(t);
    (h - *REFERENCE, cp)
}

/// Ideal-gas specific heat of dry air, J/(kg K) (Lemmon et al. 2000, analytic).
pub fn dry_air_cp(t: f64) -> f64 {
    air_ideal_enthalpy_and_cp(t).1
}

/// IF97 region 2 ideal-gas coefficients (J, n), R7-97(2012) table 10.
const IF97_IDEAL: [(i32, f64); 9] = [
    (0, -0.969_276_865_002_17e1),
    (1, 0.100_866_559_680_18e2),
    (-5, -0.560_879_112_830_20e-2),
    (-4, 0.714_527_380_814_55e-1),
    (-3, -0.407_104_982_239_28),
    (-2, 0.142_408_191_714_44e1),
    (-1, -0.438_395_113_194_50e1),
    (2, -0.284_086_324_607_72),
    (3, 0.212_684_637_533_07e-1),
];
/// IF97 region 2 residual terms with I = 1 (J, n), R7-97(2012) table 11.
const IF97_VIRIAL: [(i32, f64); 5] = [
    (0, -0.177_317_424_732_13e-2),
    (1, -0.178_348_622_923_58e-1),
    (2, -0.459_960_136_963_65e-1),
    (3, -0.575_812_590_834_32e-1),
    (6, -0.503_252_787_279_30e-1),
];

/// Ideal-gas enthalpy of water vapour on the IF97 reference, J/kg.
#[inline]
fn vapour_ideal_enthalpy_if97(t: f64) -> f64 {
    vapour_ideal_enthalpy_and_cp(t).0
}

/// Ideal-gas enthalpy of water vapour on the IF97 reference (J/kg) and its
/// specific heat (J/(kg K)), analytic.
#[inline]
fn vapour_ideal_enthalpy_and_cp(t: f64) -> (f64, f64) {
    // sum n J tau^(J-1) over the table, written out: tau t = 540 K, inv = 1/tau.
    let n = |i: usize| IF97_IDEAL[i].1;
    let inv_t = 1.0 / t;
    let tau = 540.0 * inv_t;
    let inv = t * (1.0 / 540.0);
    let negative = inv
        * inv
        * (-n(6)
            + inv
                * (-2.0 * n(5) + inv * (-3.0 * n(4) + inv * (-4.0 * n(3) + inv * (-5.0 * n(2))))));
    let g_tau = n(1) + tau * (2.0 * n(7) + tau * 3.0 * n(8)) + negative;
    // Its tau-derivative, sum n J (J - 1) tau^(J-2); dtau/dT = -tau/T.
    let negative_slope = inv
        * inv
        * inv
        * (2.0 * n(6)
            + inv * (6.0 * n(5) + inv * (12.0 * n(4) + inv * (20.0 * n(3) + inv * 30.0 * n(2)))));
    let g_tau_tau = 2.0 * n(7) + 6.0 * n(8) * tau + negative_slope;
    (
        R_WATER_IF97 * 540.0 * g_tau,
        -R_WATER_IF97 * 540.0 * g_tau_tau * tau * inv_t,
    )
}

/// Residual (second-virial) enthalpy of water vapour at partial pressure pv (Pa), J/kg.
#[cfg(test)]
fn vapour_residual_enthalpy(t: f64, pv: f64) -> f64 {
    vapour_residual_enthalpy_and_slopes(t, pv).0
}

/// [`vapour_residual_enthalpy`] (J/kg) with its partial derivatives in T
/// (J/(kg K)) and pv (J/(kg Pa)).
#[inline]
fn vapour_residual_enthalpy_and_slopes(t: f64, pv: f64) -> (f64, f64, f64) {
    let (inv_t, tau, g_tau, g_tau_tau) = vapour_virial_sums(t);
    (
        VAPOUR_RESIDUAL_SCALE * pv * g_tau,
        -VAPOUR_RESIDUAL_SCALE * pv * g_tau_tau * tau * inv_t,
        VAPOUR_RESIDUAL_SCALE * g_tau,
    )
}

/// `R 540 K / 1 MPa`: the residual enthalpy of water vapour is this times
/// pv times the virial sum g_tau, J/(kg Pa).
const VAPOUR_RESIDUAL_SCALE: f64 = R_WATER_IF97 * 540.0 * 1e-6;

/// `1/T`, `tau = 540 K / T` and the IF97 virial sums `sum n J x^(J-1)` and
/// `sum n J (J-1) x^(J-2)` over the table (J = 0, 1, 2, 3, 6), written out,
/// with `x = tau - 0.5`.
#[inline]
fn vapour_virial_sums(t: f64) -> (f64, f64, f64, f64) {
    let inv_t = 1.0 / t;
    let tau = 540.0 * inv_t;
    let x = tau - 0.5;
    let n = |i: usize| IF97_VIRIAL[i].1;
    let (x2, x4) = (x * x, x * x * x * x);
    let g_tau = n(1) + 2.0 * n(2) * x + 3.0 * n(3) * x2 + 6.0 * n(4) * (x4 * x);
    let g_tau_tau = 2.0 * n(2) + 6.0 * n(3) * x + 30.0 * n(4) * x4;
    (inv_t, tau, g_tau, g_tau_tau)
}

/// Compressibility excess `Z - 1` of water vapour at partial pressure pv (Pa), second-virial level.
#[inline]
pub fn vapour_compressibility_excess(t: f64, pv: f64) -> f64 {
    let x = 540.0 / t - 0.5;
    let n = |i: usize| IF97_VIRIAL[i].1;
    let (x2, x3) = (x * x, x * x * x);
    let sum = n(0) + n(1) * x + n(2) * x2 + n(3) * x3 + n(4) * (x3 * x3);
    (pv / 1e6) * sum
}

/// Enthalpy of water vapour at T (K) and partial pressure pv (Pa), relative to
/// liquid water at 0 degC, J/kg.
#[inline]
pub fn vapour_enthalpy(t: f64, pv: f64) -> f64 {
    VapourTerms::at(t).enthalpy(pv)
}

/// What [`vapour_enthalpy`] needs of the temperature alone, to be reused for
/// many vapour pressures at one temperature; [`VapourTerms::enthalpy`] is the
/// same arithmetic, so the same bits.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct VapourTerms {
    /// Ideal-gas enthalpy on the IF97 reference, J/kg.
    ideal: f64,
    /// The IF97 virial sum g_tau of the residual enthalpy.
    g_tau: f64,
}

impl VapourTerms {
    /// The terms at T (K).
    #[inline]
    pub fn at(t: f64) -> VapourTerms {
        VapourTerms {
            ideal: vapour_ideal_enthalpy_if97(t),
            g_tau: vapour_virial_sums(t).2,
        }
    }

    /// [`vapour_enthalpy`] at the vapour partial pressure `pv` (Pa), J/kg.
    #[inline]
    pub fn enthalpy(&self, pv: f64) -> f64 {
        // The residual is `vapour_residual_enthalpy`'s value.
        self.ideal + VAPOUR_RESIDUAL_SCALE * pv * self.g_tau - H_LIQUID_0C_IF97
    }
}

/// [`vapour_enthalpy`] (J/kg) with its partial derivatives in T (J/(kg K)) and
/// pv (J/(kg Pa)), analytic; `d_pa` is zero.
#[inline(always)]
pub fn vapour_enthalpy_and_slopes(t: f64, pv: f64) -> WithSlopes {
    let (ideal, cp) = vapour_ideal_enthalpy_and_cp(t);
    let (residual, d_t, d_pv) = vapour_residual_enthalpy_and_slopes(t, pv);
    WithSlopes {
        value: ideal + residual - H_LIQUID_0C_IF97,
        d_t: cp + d_t,
        d_pa: 0.0,
        d_pv,
    }
}

/// Ideal-gas specific heat of water vapour, J/(kg K) (IF97 region 2, analytic).
pub fn vapour_cp(t: f64) -> f64 {
    vapour_ideal_enthalpy_and_cp(t).1
}

/// Specific heat of liquid water, J/(kg K) (ASHRAE Fundamentals 2017 ch. 1 eq. 35).
pub const LIQUID_CP: f64 = 4186.0;
/// Specific heat of ice, J/(kg K) (ASHRAE Fundamentals 2017 ch. 1 eq. 36).
pub const ICE_CP: f64 = 2100.0;

/// Enthalpy of liquid water at T (K) relative to 0 degC, J/kg: `4186 t` (ASHRAE eq. 35).
pub fn liquid_enthalpy(t: f64) -> f64 {
    LIQUID_CP * (t - super::saturation::T_ZERO_C)
}

/// Enthalpy of ice at T (K) relative to liquid water at 0 degC, J/kg:
/// `-333.4e3 + 2100 t` (ASHRAE eq. 36).
pub fn ice_enthalpy(t: f64) -> f64 {
    -333.4e3 + ICE_CP * (t - super::saturation::T_ZERO_C)
}

/// Enthalpy of the condensed phase in equilibrium at T: ice below 0 degC, else liquid.
pub fn condensed_enthalpy(t: f64) -> f64 {
    if t < super::saturation::T_ZERO_C {
        ice_enthalpy(t)
    } else {
        liquid_enthalpy(t)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// IF97 region 2 verification (R7-97(2012) table 15): h at p = 0.0035 MPa.
    /// At 700 K the terms beyond the second virial are 0.001 kJ/kg; at 300 K (next to
    /// saturation) they are 0.15 kJ/kg, the truncation error of this model.
    #[test]
    fn vapour_enthalpy_matches_if97_verification() {
        for (t, h_kj, tol) in [
            (300.0, 0.254_991_145e4, 0.2),
            (700.0, 0.333_568_375e4, 0.005),
        ] {
            let h = (vapour_ideal_enthalpy_if97(t) + vapour_residual_enthalpy(t, 3500.0)) / 1e3;
            assert!((h - h_kj).abs() < tol, "T={t}: {h} vs {h_kj}");
        }
    }

    /// The written-out virial sums against the table of (J, n) they come from.
    #[test]
    fn virial_sums_match_the_table() {
        for i in 0..50 {
            let t = 233.15 + 8.0 * i as f64;
            let x = 540.0 / t - 0.5;
            let sum = |f: &dyn Fn(i32, f64) -> f64| -> f64 {
                IF97_VIRIAL.iter().map(|&(j, n)| f(j, n)).sum()
            };
            let g_tau = sum(&|j, n| n * j as f64 * x.powi(j - 1));
            let g_tau_tau = sum(&|j, n| n * (j * (j - 1)) as f64 * x.powi(j - 2));
            let z = sum(&|j, n| n * x.powi(j));
            let scale = R_WATER_IF97 * 540.0 * 1e-6;
            let (h, dh_dt, dh_dpv) = vapour_residual_enthalpy_and_slopes(t, 1e4);
            let close = |a: f64, b: f64| (a - b).abs() <= 1e-14 * b.abs();
            assert!(close(dh_dpv, scale * g_tau), "T={t}");
            assert!(close(h, scale * 1e4 * g_tau), "T={t}");
            let tau = 540.0 / t;
            assert!(close(dh_dt, -scale * 1e4 * g_tau_tau * tau / t), "T={t}");
            assert!(close(vapour_compressibility_excess(t, 1e6), z), "T={t}");
        }
    }

    /// Central difference of `f` at t, step 1e-3 K.
    fn difference(f: impl Fn(f64) -> f64, t: f64) -> f64 {
        (f(t + 1e-3) - f(t - 1e-3)) / 2e-3
    }

    /// Analytic temperature and pressure derivatives against central differences.
    #[test]
    fn analytic_slopes_match_differences() {
        let close = |a: f64, b: f64, what: &str| {
            assert!(
                (a - b).abs() <= 1e-7 * b.abs().max(1e-3),
                "{what}: {a} vs {b}"
            );
        };
        for i in 0..60 {
            let t = 175.0 + 8.0 * i as f64;
            let (pa, pv) = (90e3, 8e3);
            let (h, cp) = dry_air_enthalpy_and_cp(t);
            assert_eq!(h, dry_air_enthalpy(t));
            close(cp, difference(dry_air_enthalpy, t), "dry-air cp");
            let v = vapour_enthalpy_and_slopes(t, pv);
            assert_eq!(v.value, vapour_enthalpy(t, pv));
            close(
                v.d_t,
                difference(|t| vapour_enthalpy(t, pv), t),
                "vapour d/dT",
            );
            let dp = (vapour_enthalpy(t, pv + 1.0) - vapour_enthalpy(t, pv - 1.0)) / 2.0;
            close(v.d_pv, dp, "vapour d/dpv");
            let a = air_part_enthalpy_and_slopes(t, pa, pv);
            assert_eq!(a.value, air_part_enthalpy(t, pa, pv));
            close(
                a.d_t,
                difference(|t| air_part_enthalpy(t, pa, pv), t),
                "air d/dT",
            );
            let dpa =
                (air_part_enthalpy(t, pa + 1.0, pv) - air_part_enthalpy(t, pa - 1.0, pv)) / 2.0;
            close(a.d_pa, dpa, "air d/dpa");
            let dpv =
                (air_part_enthalpy(t, pa, pv + 1.0) - air_part_enthalpy(t, pa, pv - 1.0)) / 2.0;
            close(a.d_pv, dpv, "air d/dpv");
        }
    }

    /// Lemmon's ideal-gas term written directly (two exponentials, no shortcut
    /// for the last term) against the production form, 173..650 K.
    #[test]
    fn dry_air_terms_match_the_direct_formula() {
        let n = &LEMMON_N;
        let direct = |tau: f64| {
            let planck = |a: f64, b: f64| a * b * tau / ((b * tau).exp() - 1.0);
            let last = n[9] * n[12] * tau / (2.0 / 3.0 * (-n[12] * tau).exp() + 1.0);
            -3.0 * n[0] * tau.powi(-3) - 2.0 * n[1] * tau.powi(-2) - n[2] / tau
                + 1.5 * n[5] * tau * tau.sqrt()
                + n[6]
                + planck(n[7], n[10])
                + planck(n[8], n[11])
                + last
        };
        let mut t = 173.15;
        while t < 650.0 {
            let tau = LEMMON_T_RED / t;
            let (ours, _) = air_tau_alpha_tau(tau, 1.0 / tau);
            let want = direct(tau);
            assert!(
                (ours - want).abs() <= 1e-14 * want.abs(),
                "T={t}: {ours} vs {want}"
            );
            t += 0.37;
        }
    }

    /// The enthalpies from the terms of T alone against the sums they stand
    /// for (the ideal part, the residual from its slopes' function, the
    /// reference), bit for bit, -100..350 degC, dry to nearly pure vapour.
    /// The dry air's ideal part is the table's (exact outside it; the
    /// table against the exact expression: `dry_air_table::tests`).
    #[test]
    fn temperature_terms_give_the_same_enthalpies() {
        let mut t = 173.15;
        while t < 623.2 {
            for (pa, pv) in [(101_325.0, 0.0), (95e3, 6e3), (50e3, 50e3), (1e3, 199e3)] {
                let air = super::super::dry_air_table::dry_air_enthalpy(t)
                    + air_residual_enthalpy(t, pa, pv)
                    - air_residual_reference();
                assert_eq!(
                    AirPartTerms::at(t).enthalpy(pa, pv).to_bits(),
                    air.to_bits()
                );
                let vapour = vapour_ideal_enthalpy_if97(t) + vapour_residual_enthalpy(t, pv)
                    - H_LIQUID_0C_IF97;
                assert_eq!(VapourTerms::at(t).enthalpy(pv).to_bits(), vapour.to_bits());
            }
            t += 0.173;
        }
    }

    /// The last term's short exponential (25 < N13 tau <= 37) against `exp`.
    #[test]
    fn last_term_matches_exp() {
        let n = &LEMMON_N;
        let mut x = 24.0;
        while x <= 37.0 {
            let tau = x / n[12];
            let (ours, tau_d) = air_last_term(tau, (n[11] * tau).exp());
            let q = 2.0 / 3.0 * (-x).exp();
            let want = n[9] * x / (q + 1.0);
            let want_d = want * (1.0 + x * q / (q + 1.0));
            assert!(
                (ours - want).abs() <= 2.5e-16 * want.abs(),
                "x={x}: {ours} vs {want}"
            );
            assert!((tau_d - want_d).abs() <= 2.5e-16 * want_d.abs(), "x={x}");
            x += 0.013;
        }
    }

    /// Dry-air cp near 1.006 kJ/(kg K) at 0-25 degC (ASHRAE Fundamentals, from memory).
    #[test]
    fn dry_air_cp_is_plausible() {
        let cp = dry_air_cp(293.15);
        assert!((cp - 1005.0).abs() < 5.0, "{cp}");
    }
}
