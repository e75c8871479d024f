//! Effective diffusivity from drying data, and its Arrhenius temperature law.
//!
//! Slope method: for `MR < 0.6` the first term of Crank's series dominates,
//! `ln MR = ln A1 - beta1^2 D t / l^2`, so a straight line through
//! `(t, ln MR)` gives `D = -slope l^2 / beta1^2`. Nonlinear method: least
//! squares of the full series against `MR` over `ln D` (Gauss-Newton with
//! step halving). Arrhenius: `ln D = ln D0 - Ea/(R T)`, a straight line in
//! `1/T`. These are the standard reductions of thin-layer drying data to an
//! effective diffusivity (e.g. Mujumdar, *Handbook of Industrial Drying*,
//! 4th ed., ch. 1; Crank ch. 4 for the series).

use super::super::kinetics::KineticsError;
use super::{Body, CrankSeries, GAS_CONSTANT_J_PER_MOL_K};

/// An effective diffusivity with its standard error.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DiffusivityFit {
    /// Effective diffusivity, m^2/s.
    pub d_m2_per_s: f64,
    /// Standard error of the diffusivity, m^2/s.
    pub std_error_m2_per_s: f64,
    /// Points used.
    pub points: usize,
    /// Coefficient of determination of the fit (in ln MR for the slope
    /// method, in MR for the nonlinear one).
    pub r_squared: f64,
    /// Intercept of ln MR at t = 0 (slope method), to compare with ln A1.
    pub intercept: f64,
}

/// Arrhenius law fitted to diffusivities at several temperatures.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ArrheniusFit {
    /// Pre-exponential factor D0, m^2/s.
    pub d0_m2_per_s: f64,
    /// Activation energy, J/mol.
    pub activation_energy_j_per_mol: f64,
    /// Standard error of the activation energy, J/mol (NaN with 2 points).
    pub activation_energy_std_error: f64,
    pub r_squared: f64,
}

/// Ordinary least squares line: (slope, intercept, slope std error, r^2).
fn line_fit(x: &[f64], y: &[f64]) -> (f64, f64, f64, f64) {
    let n = x.len() as f64;
    let mx = x.iter().sum::<f64>() / n;
    let my = y.iter().sum::<f64>() / n;
    let sxx: f64 = x.iter().map(|v| (v - mx).powi(2)).sum();
    let sxy: f64 = x.iter().zip(y).map(|(a, b)| (a - mx) * (b - my)).sum();
    let syy: f64 = y.iter().map(|v| (v - my).powi(2)).sum();
    let slope = sxy / sxx;
    let intercept = my - slope * mx;
    let sse: f64 = x
        .iter()
        .zip(y)
        .map(|(a, b)| (b - intercept - slope * a).powi(2))
        .sum();
    let se = if x.len() > 2 {
        (sse / (n - 2.0) / sxx).sqrt()
    } else {
        f64::NAN
    };
    let r2 = if syy > 0.0 { 1.0 - sse / syy } else { 1.0 };
    (slope, intercept, se, r2)
}

fn check_data(times_s: &[f64], ratios: &[f64]) -> Result<(), KineticsError> {
    if times_s.len() != ratios.len() {
        return Err(KineticsError::OutOfRange {
            name: "number of moisture ratios",
            value: ratios.len() as f64,
            reason: "must equal the number of times",
        });
    }
    for (i, pair) in times_s.windows(2).enumerate() {
        if pair[1] <= pair[0] || !pair[1].is_finite() {
            return Err(KineticsError::TimeNotIncreasing {
                index: i + 1,
                previous_s: pair[0],
                time_s: pair[1],
            });
        }
    }
    for &r in ratios {
        if !r.is_finite() || r < 0.0 {
            return Err(KineticsError::OutOfRange {
                name: "moisture ratio",
                value: r,
                reason: "must be finite and not negative",
            });
        }
    }
    Ok(())
}

/// Effective diffusivity from the slope of `ln MR` against time, using the
/// points with `0 < MR <= max_ratio` (0.6 is customary). Needs 3 such points.
pub fn diffusivity_from_slope(
    body: &Body,
    times_s: &[f64],
    ratios: &[f64],
    max_ratio: f64,
) -> Result<DiffusivityFit, KineticsError> {
    check_data(times_s, ratios)?;
    let (t, y): (Vec<f64>, Vec<f64>) = times_s
        .iter()
        .zip(ratios)
        .filter(|(_, r)| **r > 0.0 && **r <= max_ratio)
        .map(|(t, r)| (*t, r.ln()))
        .unzip();
    if t.len() < 3 {
        return Err(KineticsError::TooFewPoints {
            what: "the ln MR slope method (points with MR <= the limit)",
            needed: 3,
            found: t.len(),
        });
    }
    let (slope, intercept, se, r_squared) = line_fit(&t, &y);
    if slope >= 0.0 {
        return Err(KineticsError::NegativeDiffusivity { value: -slope });
    }
    let series = CrankSeries::new(body.shape, None, 1e-3)?;
    let b1 = series.roots[0];
    let scale = body.length_m * body.length_m / (b1 * b1);
    Ok(DiffusivityFit {
        d_m2_per_s: -slope * scale,
        std_error_m2_per_s: se * scale,
        points: t.len(),
        r_squared,
        intercept,
    })
}

/// Effective diffusivity by nonlinear least squares of Crank's series
/// (surface at equilibrium) to all points. Starts from `initial_m2_per_s`.
pub fn diffusivity_nonlinear(
    body: &Body,
    times_s: &[f64],
    ratios: &[f64],
    initial_m2_per_s: f64,
) -> Result<DiffusivityFit, KineticsError> {
    check_data(times_s, ratios)?;
    if times_s.len() < 2 {
        return Err(KineticsError::TooFewPoints {
            what: "the nonlinear diffusivity fit",
            needed: 2,
            found: times_s.len(),
        });
    }
    if !(initial_m2_per_s.is_finite() && initial_m2_per_s > 0.0) {
        return Err(KineticsError::NegativeDiffusivity {
            value: initial_m2_per_s,
        });
    }
    let l2 = body.length_m * body.length_m;
    let t_min = times_s
        .iter()
        .copied()
        .filter(|t| *t > 0.0)
        .fold(f64::INFINITY, f64::min);
    let series = CrankSeries::new(body.shape, None, (1e-12 * t_min / l2).max(1e-8))?;
    let sse = |ln_d: f64| -> f64 {
        times_s
            .iter()
            .zip(ratios)
            .map(|(t, r)| (series.moisture_ratio(ln_d.exp() * t / l2) - r).powi(2))
            .sum()
    };
    let mut ln_d = initial_m2_per_s.ln();
    let mut current = sse(ln_d);
    for iteration in 0..200 {
        let (num, den) = gauss_newton_terms(&series, times_s, ratios, ln_d, l2);
        if den <= 0.0 {
            break;
        }
        let mut step = (num / den).clamp(-3.0, 3.0);
        let mut improved = false;
        for _ in 0..40 {
            let trial = sse(ln_d + step);
            if trial <= current {
                ln_d += step;
                current = trial;
                improved = true;
                break;
            }
            step *= 0.5;
        }
        if !improved || step.abs() < 1e-12 {
            break;
        }
        if iteration == 199 {
            return Err(KineticsError::NoConvergence {
                what: "nonlinear diffusivity fit",
                detail: "200 Gauss-Newton iterations".into(),
            });
        }
    }
    let (_, den) = gauss_newton_terms(&series, times_s, ratios, ln_d, l2);
    let n = times_s.len() as f64;
    let mean = ratios.iter().sum::<f64>() / n;
    let sst: f64 = ratios.iter().map(|r| (r - mean).powi(2)).sum();
    let d = ln_d.exp();
    let se = if n > 1.0 && den > 0.0 {
        d * (current / (n - 1.0) / den).sqrt()
    } else {
        f64::NAN
    };
    Ok(DiffusivityFit {
        d_m2_per_s: d,
        std_error_m2_per_s: se,
        points: times_s.len(),
        r_squared: 1.0 - current / sst,
        intercept: f64::NAN,
    })
}

/// Gauss-Newton numerator and denominator `sum J r`, `sum J^2` in ln D.
fn gauss_newton_terms(
    series: &CrankSeries,
    times_s: &[f64],
    ratios: &[f64],
    ln_d: f64,
    l2: f64,
) -> (f64, f64) {
    let d = ln_d.exp();
    let mut num = 0.0;
    let mut den = 0.0;
    for (t, r) in times_s.iter().zip(ratios) {
        let fo = d * t / l2;
        let j = if fo > 0.0 { series.slope(fo) * fo } else { 0.0 };
        num -= j * (series.moisture_ratio(fo) - r);
        den += j * j;
    }
    (num, den)
}

/// Fit `D = D0 exp(-Ea/(R T))` to diffusivities (m^2/s) at temperatures (K).
pub fn arrhenius_fit(
    temperatures_k: &[f64],
    diffusivities_m2_per_s: &[f64],
) -> Result<ArrheniusFit, KineticsError> {
    if temperatures_k.len() != diffusivities_m2_per_s.len() {
        return Err(KineticsError::OutOfRange {
            name: "number of diffusivities",
            value: diffusivities_m2_per_s.len() as f64,
            reason: "must equal the number of temperatures",
        });
    }
    if temperatures_k.len() < 2 {
        return Err(KineticsError::TooFewPoints {
            what: "an Arrhenius fit",
            needed: 2,
            found: temperatures_k.len(),
        });
    }
    for &d in diffusivities_m2_per_s {
        if !(d.is_finite() && d > 0.0) {
            return Err(KineticsError::NegativeDiffusivity { value: d });
        }
    }
    for &t in temperatures_k {
        super::super::kinetics::positive("temperature (K)", t)?;
    }
    let x: Vec<f64> = temperatures_k.iter().map(|t| 1.0 / t).collect();
    if x.iter().all(|v| *v == x[0]) {
        return Err(KineticsError::OutOfRange {
            name: "temperature",
            value: temperatures_k[0],
            reason: "an Arrhenius fit needs at least two different temperatures",
        });
    }
    let y: Vec<f64> = diffusivities_m2_per_s.iter().map(|d| d.ln()).collect();
    let (slope, intercept, se, r_squared) = line_fit(&x, &y);
    Ok(ArrheniusFit {
        d0_m2_per_s: intercept.exp(),
        activation_energy_j_per_mol: -slope * GAS_CONSTANT_J_PER_MOL_K,
        activation_energy_std_error: se * GAS_CONSTANT_J_PER_MOL_K,
        r_squared,
    })
}

#[cfg(test)]
mod tests {
    use super::super::Shape;
    use super::*;

    fn slab() -> Body {
        Body {
            shape: Shape::Slab,
            length_m: 0.005,
        }
    }

    /// Data generated from the series itself must return the same D.
    #[test]
    fn recovers_diffusivity_from_series_data() {
        let d = 2.5e-10;
        let body = slab();
        let series = CrankSeries::new(Shape::Slab, None, 1e-6).unwrap();
        let times: Vec<f64> = (1..=40).map(|i| i as f64 * 3600.0).collect();
        let ratios: Vec<f64> = times
            .iter()
            .map(|t| series.moisture_ratio(body.fourier(d, *t)))
            .collect();
        let fit = diffusivity_nonlinear(&body, &times, &ratios, 1e-9).unwrap();
        assert!((fit.d_m2_per_s / d - 1.0).abs() < 1e-6, "{fit:?}");
        let slope = diffusivity_from_slope(&body, &times, &ratios, 0.6).unwrap();
        // First-term method: exact slope in the tail, intercept ln(8/pi^2).
        assert!((slope.d_m2_per_s / d - 1.0).abs() < 0.01, "{slope:?}");
        assert!((slope.intercept - (8.0 / std::f64::consts::PI.powi(2)).ln()).abs() < 0.02);
    }

    #[test]
    fn arrhenius_recovers_activation_energy() {
        let ea = 30_000.0;
        let temps = [313.15, 323.15, 333.15, 343.15];
        let ds: Vec<f64> = temps
            .iter()
            .map(|t| 1e-5 * (-ea / (GAS_CONSTANT_J_PER_MOL_K * t)).exp())
            .collect();
        let fit = arrhenius_fit(&temps, &ds).unwrap();
        assert!((fit.activation_energy_j_per_mol / ea - 1.0).abs() < 1e-9);
        assert!((fit.d0_m2_per_s / 1e-5 - 1.0).abs() < 1e-9);
        assert!(arrhenius_fit(&[300.0, 310.0], &[1e-9, -1e-9]).is_err());
    }

    #[test]
    fn bad_data_errors_name_the_value() {
        let body = slab();
        let e =
            diffusivity_from_slope(&body, &[0.0, 10.0, 5.0], &[1.0, 0.5, 0.4], 0.6).unwrap_err();
        assert!(e.to_string().contains("5 s"), "{e}");
        let e = diffusivity_from_slope(&body, &[0.0, 10.0], &[1.0, 0.5], 0.6).unwrap_err();
        assert!(matches!(e, KineticsError::TooFewPoints { .. }));
    }
}
