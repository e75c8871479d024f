//! Batch drying tests: from (time, sample mass) to moisture, drying rate,
//! the constant-rate period and the critical moisture content.
//!
//! Moisture `X = (m - Ls)/Ls` (dry basis). Rate `R = -(Ls/A) dX/dt`, with
//! `dX/dt` from a Savitzky-Golay differentiator: a least-squares polynomial
//! of degree `order` over a moving window of `window` points, differentiated
//! at the centre point (A. Savitzky, M. J. E. Golay, Anal. Chem. 36 (1964)
//! 1627-1639). The local fit is done on the actual times, so unevenly spaced
//! readings are handled (for even spacing it is the classic filter); windows
//! are shifted inward at the ends of the record.
//!
//! Constant-rate period: a two-segment ("hinge") least-squares fit of rate
//! against moisture, `R = Rc` for `X >= Xc`, `R = Rc - s (Xc - X)` below,
//! scanned over `Xc` and refined by golden-section search. Uncertainty: `Rc`
//! from the linear regression at the best `Xc`; `Xc` from the profile of the
//! residual sum of squares, the set where `SSE(Xc) <= SSE_min (1 + 1/(n-3))`,
//! about one standard error (D. M. Bates, D. G. Watts, *Nonlinear Regression
//! Analysis and Its Applications*, Wiley 1988, ch. 6).

use nalgebra::{DMatrix, DVector};

use super::rate_curve::RateCurve;
use super::{increasing_times, positive, KineticsError};

/// One processed reading.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatePoint {
    pub time_s: f64,
    /// Measured moisture, dry basis.
    pub moisture: f64,
    /// Smoothed moisture (window polynomial at the point), dry basis.
    pub smoothed: f64,
    /// Drying rate, kg/(m^2 s).
    pub rate: f64,
}

/// A processed batch drying test.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchRun {
    pub points: Vec<RatePoint>,
    /// Dry-solid mass per exposed area Ls/A, kg/m^2.
    pub load_kg_per_m2: f64,
    pub window: usize,
    pub order: usize,
}

/// The constant-rate period found in a batch test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConstantRatePeriod {
    /// Constant drying rate Rc, kg/(m^2 s), and its standard error.
    pub rate: f64,
    pub rate_std_error: f64,
    /// Critical moisture Xc (dry basis) with its approximate one-standard-error interval.
    pub critical_moisture: f64,
    pub critical_low: f64,
    pub critical_high: f64,
    /// Falling-rate slope s, kg/(m^2 s) per unit moisture.
    pub falling_slope: f64,
    /// Moisture where the falling-rate line reaches zero rate (an estimate of
    /// the equilibrium moisture), dry basis.
    pub zero_rate_moisture: f64,
    /// Points used (after the settling period) and points in the constant period.
    pub points_used: usize,
    pub points_constant: usize,
    /// Residual standard deviation of the hinge fit, kg/(m^2 s).
    pub residual_std: f64,
}

impl BatchRun {
    /// Process readings of sample mass (kg) at times (s) for a sample with
    /// `dry_solid_kg` of dry solid exposing `area_m2`, differentiated by a
    /// Savitzky-Golay window of `window` points (odd) and degree `order`.
    pub fn from_masses(
        times_s: &[f64],
        masses_kg: &[f64],
        dry_solid_kg: f64,
        area_m2: f64,
        window: usize,
        order: usize,
    ) -> Result<BatchRun, KineticsError> {
        check_readings(times_s, masses_kg, dry_solid_kg, area_m2)?;
        check_window(times_s.len(), window, order)?;
        let moistures: Vec<f64> = masses_kg
            .iter()
            .map(|m| (m - dry_solid_kg) / dry_solid_kg)
            .collect();
        let load = dry_solid_kg / area_m2;
        let mut points = Vec::with_capacity(times_s.len());
        for i in 0..times_s.len() {
            let (value, slope) = local_polynomial(times_s, &moistures, i, window, order)?;
            points.push(RatePoint {
                time_s: times_s[i],
                moisture: moistures[i],
                smoothed: value,
                rate: -load * slope,
            });
        }
        Ok(BatchRun {
            points,
            load_kg_per_m2: load,
            window,
            order,
        })
    }

    /// Find the constant-rate period and the critical moisture.
    pub fn constant_rate_period(&self) -> Result<ConstantRatePeriod, KineticsError> {
        let used = self.after_settling();
        if used.len() < 6 {
            return Err(KineticsError::TooFewPoints {
                what: "finding the critical moisture (after the settling period)",
                needed: 6,
                found: used.len(),
            });
        }
        let x: Vec<f64> = used.iter().map(|p| p.smoothed).collect();
        let r: Vec<f64> = used.iter().map(|p| p.rate).collect();
        hinge_fit(&x, &r)
    }

    /// Readings from the first one whose rate reaches 90 % of the largest
    /// rate: earlier ones belong to the settling (warm-up) period.
    fn after_settling(&self) -> &[RatePoint] {
        let max = self
            .points
            .iter()
            .map(|p| p.rate)
            .fold(f64::NEG_INFINITY, f64::max);
        let start = self
            .points
            .iter()
            .position(|p| p.rate >= 0.9 * max)
            .unwrap_or(0);
        &self.points[start..]
    }

    /// The measured rate curve as a table of (smoothed X, R) after the
    /// settling period, with rates below zero set to zero.
    pub fn rate_curve(&self) -> Result<RateCurve, KineticsError> {
        let used = self.after_settling();
        let x: Vec<f64> = used.iter().map(|p| p.smoothed).collect();
        let r: Vec<f64> = used.iter().map(|p| p.rate.max(0.0)).collect();
        RateCurve::table(&x, &r)
    }
}

fn check_readings(
    times_s: &[f64],
    masses_kg: &[f64],
    dry_solid_kg: f64,
    area_m2: f64,
) -> Result<(), KineticsError> {
    positive("dry-solid mass", dry_solid_kg)?;
    positive("exposed area", area_m2)?;
    if times_s.len() != masses_kg.len() {
        return Err(KineticsError::OutOfRange {
            name: "number of masses",
            value: masses_kg.len() as f64,
            reason: "must equal the number of times",
        });
    }
    increasing_times(times_s)?;
    for (index, &m) in masses_kg.iter().enumerate() {
        if !m.is_finite() || m < dry_solid_kg {
            return Err(KineticsError::BelowDrySolid {
                index,
                mass_kg: m,
                dry_solid_kg,
            });
        }
    }
    Ok(())
}

fn check_window(points: usize, window: usize, order: usize) -> Result<(), KineticsError> {
    if window % 2 == 0 || window < 3 {
        return Err(KineticsError::OutOfRange {
            name: "smoothing window",
            value: window as f64,
            reason: "must be an odd number of points, at least 3",
        });
    }
    if order < 1 || order >= window {
        return Err(KineticsError::OutOfRange {
            name: "smoothing polynomial order",
            value: order as f64,
            reason: "must be at least 1 and below the window length",
        });
    }
    if points < window {
        return Err(KineticsError::TooFewPoints {
            what: "the smoothing window",
            needed: window,
            found: points,
        });
    }
    Ok(())
}

/// Least-squares polynomial over the window around point `i`: (value, slope) at t_i.
fn local_polynomial(
    t: &[f64],
    y: &[f64],
    i: usize,
    window: usize,
    order: usize,
) -> Result<(f64, f64), KineticsError> {
    let half = window / 2;
    let start = i.saturating_sub(half).min(t.len() - window);
    let span = t[start + window - 1] - t[start];
    let design = DMatrix::from_fn(window, order + 1, |row, col| {
        ((t[start + row] - t[i]) / span).powi(col as i32)
    });
    let values = DVector::from_fn(window, |row, _| y[start + row]);
    let coefficients =
        design
            .svd(true, true)
            .solve(&values, 1e-13)
            .map_err(|e| KineticsError::NoConvergence {
                what: "Savitzky-Golay fit",
                detail: e.to_string(),
            })?;
    Ok((coefficients[0], coefficients[1] / span))
}

/// Least-squares (Rc, s) and SSE for a fixed critical moisture `xc`.
fn hinge_at(x: &[f64], r: &[f64], xc: f64) -> Option<(f64, f64, f64, f64)> {
    let n = x.len() as f64;
    let u: Vec<f64> = x.iter().map(|v| (xc - v).max(0.0)).collect();
    let (su, suu) = (u.iter().sum::<f64>(), u.iter().map(|v| v * v).sum::<f64>());
    let (sr, sur) = (
        r.iter().sum::<f64>(),
        u.iter().zip(r).map(|(a, b)| a * b).sum::<f64>(),
    );
    let det = n * suu - su * su;
    if det.abs() <= 1e-300 {
        return None;
    }
    let rc = (sr * suu - su * sur) / det;
    let slope = (su * sr - n * sur) / det;
    let sse: f64 = u
        .iter()
        .zip(r)
        .map(|(ui, ri)| (ri - rc + slope * ui).powi(2))
        .sum();
    Some((rc, slope, sse, suu / det))
}

fn hinge_fit(x: &[f64], r: &[f64]) -> Result<ConstantRatePeriod, KineticsError> {
    let mut sorted = x.to_vec();
    sorted.sort_by(f64::total_cmp);
    let n = sorted.len();
    // At least 3 points on each side of the break.
    let (lo, hi) = (sorted[2], sorted[n - 3]);
    let sse = |xc: f64| hinge_at(x, r, xc).map_or(f64::INFINITY, |h| h.2);
    let grid: Vec<f64> = (0..=400)
        .map(|k| lo + (hi - lo) * k as f64 / 400.0)
        .collect();
    let profile: Vec<f64> = grid.iter().map(|&xc| sse(xc)).collect();
    let best = (0..grid.len())
        .min_by(|&a, &b| profile[a].total_cmp(&profile[b]))
        .unwrap_or(0);
    let a = grid[best.saturating_sub(1)];
    let b = grid[(best + 1).min(grid.len() - 1)];
    let xc = golden_min(&sse, a, b);
    let (rc, slope, sse_min, var_factor) =
        hinge_at(x, r, xc).ok_or_else(|| KineticsError::NoConvergence {
            what: "critical moisture fit",
            detail: "singular regression".into(),
        })?;
    let dof = (n as f64 - 3.0).max(1.0);
    let limit = sse_min * (1.0 + 1.0 / dof);
    let inside: Vec<f64> = grid
        .iter()
        .zip(&profile)
        .filter(|(_, s)| **s <= limit)
        .map(|(g, _)| *g)
        .collect();
    let step = (hi - lo) / 400.0;
    let low = inside.iter().copied().fold(xc, f64::min) - step;
    let high = inside.iter().copied().fold(xc, f64::max) + step;
    let sigma2 = sse_min / dof;
    Ok(ConstantRatePeriod {
        rate: rc,
        rate_std_error: (sigma2 * var_factor).sqrt(),
        critical_moisture: xc,
        critical_low: low.max(sorted[0]),
        critical_high: high.min(sorted[n - 1]),
        falling_slope: slope,
        zero_rate_moisture: if slope > 0.0 {
            xc - rc / slope
        } else {
            f64::NAN
        },
        points_used: n,
        points_constant: x.iter().filter(|v| **v >= xc).count(),
        residual_std: sigma2.sqrt(),
    })
}

/// Golden-section minimum of `f` on [a, b].
fn golden_min(f: &dyn Fn(f64) -> f64, mut a: f64, mut b: f64) -> f64 {
    let g = 0.5 * (5f64.sqrt() - 1.0);
    let mut c = b - g * (b - a);
    let mut d = a + g * (b - a);
    for _ in 0..80 {
        if f(c) < f(d) {
            b = d;
        } else {
            a = c;
        }
        c = b - g * (b - a);
        d = a + g * (b - a);
    }
    0.5 * (a + b)
}

impl ConstantRatePeriod {
    /// The constant + linear falling model this period implies, with the
    /// given equilibrium moisture (or the zero-rate moisture when `None`).
    pub fn rate_curve(&self, equilibrium: Option<f64>) -> Result<RateCurve, KineticsError> {
        let xe = equilibrium.unwrap_or(self.zero_rate_moisture);
        if !xe.is_finite() {
            return Err(KineticsError::OutOfRange {
                name: "falling-rate slope",
                value: self.falling_slope,
                reason: "must be positive to extrapolate an equilibrium moisture; give one",
            });
        }
        RateCurve::constant_linear(self.rate, self.critical_moisture, xe.max(0.0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Invented test: masses from an exact constant + linear falling curve.
    fn synthetic(noise: f64) -> (Vec<f64>, Vec<f64>) {
        let (ls, area, rc, xc, xe, x0) = (0.1, 0.02, 5e-4, 0.8, 0.08, 1.6);
        let load = ls / area;
        let curve = RateCurve::constant_linear(rc, xc, xe).unwrap();
        let mut times = Vec::new();
        let mut masses = Vec::new();
        let mut x: f64 = x0;
        let dt = 300.0;
        for i in 0..40 {
            times.push(i as f64 * dt);
            let wiggle = noise * if i % 2 == 0 { 1.0 } else { -1.0 };
            masses.push(ls * (1.0 + x) + wiggle);
            // exact step: integrate dX/dt = -R/load with small sub-steps
            for _ in 0..1000 {
                x -= curve.rate(x) / load * dt / 1000.0;
            }
        }
        (times, masses)
    }

    #[test]
    fn finds_rate_and_critical_moisture() {
        let (t, m) = synthetic(0.0);
        let run = BatchRun::from_masses(&t, &m, 0.1, 0.02, 5, 2).unwrap();
        let period = run.constant_rate_period().unwrap();
        assert!((period.rate / 5e-4 - 1.0).abs() < 0.01, "{period:?}");
        assert!((period.critical_moisture - 0.8).abs() < 0.03, "{period:?}");
        assert!(
            period.critical_low <= period.critical_moisture
                && period.critical_high >= period.critical_moisture
        );
        assert!(
            (period.zero_rate_moisture - 0.08).abs() < 0.03,
            "{period:?}"
        );
    }

    #[test]
    fn bad_readings_are_named() {
        let (t, mut m) = synthetic(0.0);
        m[7] = 0.09;
        let e = BatchRun::from_masses(&t, &m, 0.1, 0.02, 5, 2).unwrap_err();
        assert!(e.to_string().contains("0.09 kg at reading 8"), "{e}");
        let (mut t, m) = synthetic(0.0);
        t[4] = t[3];
        let e = BatchRun::from_masses(&t, &m, 0.1, 0.02, 5, 2).unwrap_err();
        assert!(
            matches!(e, KineticsError::TimeNotIncreasing { index: 4, .. }),
            "{e}"
        );
        let e = BatchRun::from_masses(&t[..3], &m[..3], 0.1, 0.02, 5, 2).unwrap_err();
        assert!(
            matches!(
                e,
                KineticsError::TooFewPoints {
                    needed: 5,
                    found: 3,
                    ..
                }
            ),
            "{e}"
        );
        assert!(BatchRun::from_masses(&t, &m, 0.1, 0.02, 4, 2).is_err());
    }

    /// For evenly spaced data the local fit reproduces the classic
    /// Savitzky-Golay 5-point quadratic first-derivative weights
    /// (-2, -1, 0, 1, 2)/10 (Savitzky & Golay 1964, table of convolutes).
    #[test]
    fn matches_classic_savitzky_golay_weights() {
        let t: Vec<f64> = (0..9).map(|i| i as f64).collect();
        let y: Vec<f64> = t
            .iter()
            .map(|v| (0.3 * v).sin() + 0.01 * v * v * v)
            .collect();
        let (_, slope) = local_polynomial(&t, &y, 4, 5, 2).unwrap();
        let classic = (-2.0 * y[2] - y[3] + y[5] + 2.0 * y[6]) / 10.0;
        assert!((slope - classic).abs() < 1e-12, "{slope} vs {classic}");
    }
}
