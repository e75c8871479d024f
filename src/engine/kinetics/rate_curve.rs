//! Drying-rate curves R(X) and the drying time they imply.
//!
//! `t = (Ls/A) * integral_{X2}^{X1} dX / R(X)` (McCabe, Smith & Harriott,
//! *Unit Operations of Chemical Engineering*, 7th ed., ch. 24). Closed forms
//! for a constant rate joined to a falling rate that is linear in free
//! moisture, or a power of it; adaptive Gauss-Kronrod quadrature for a
//! measured rate table interpolated by a monotone piecewise cubic (PCHIP).

use super::super::integrate::gauss_kronrod;
use super::{non_negative, positive, KineticsError};

/// Monotone piecewise cubic Hermite interpolant (PCHIP).
///
/// Slopes: weighted harmonic mean of the neighbouring secants, zero at local
/// extrema (F. N. Fritsch, J. Butland, SIAM J. Sci. Stat. Comput. 5 (1984)
/// 300-304), one-sided three-point slopes at the ends limited to keep shape
/// (F. N. Fritsch, R. E. Carlson, SIAM J. Numer. Anal. 17 (1980) 238-246).
/// The interpolant never overshoots the data, so a rate table with
/// non-negative rates never interpolates to a negative rate.
#[derive(Debug, Clone, PartialEq)]
pub struct MonotoneCubic {
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    slopes: Vec<f64>,
}

impl MonotoneCubic {
    /// Build from points with strictly increasing `x` (at least 2).
    pub fn new(x: Vec<f64>, y: Vec<f64>) -> Result<MonotoneCubic, KineticsError> {
        if x.len() != y.len() {
            return Err(KineticsError::OutOfRange {
                name: "number of rates",
                value: y.len() as f64,
                reason: "must equal the number of moistures",
            });
        }
        if x.len() < 2 {
            return Err(KineticsError::TooFewPoints {
                what: "a rate table",
                needed: 2,
                found: x.len(),
            });
        }
        for pair in x.windows(2) {
            if !super::above(pair[1], pair[0]) {
                return Err(KineticsError::OutOfRange {
                    name: "moisture in rate table",
                    value: pair[1],
                    reason: "appears twice; moistures must be distinct",
                });
            }
        }
        if let Some(bad) = x.iter().chain(&y).find(|v| !v.is_finite()) {
            return Err(KineticsError::OutOfRange {
                name: "rate table entry",
                value: *bad,
                reason: "must be finite",
            });
        }
        let slopes = pchip_slopes(&x, &y);
        Ok(MonotoneCubic { x, y, slopes })
    }

    /// Interpolated value at `t`; clamped to the end values outside the range.
    pub fn value(&self, t: f64) -> f64 {
        let n = self.x.len();
        if t <= self.x[0] {
            return self.y[0];
        }
        if t >= self.x[n - 1] {
            return self.y[n - 1];
        }
        let k = self.x.partition_point(|v| *v <= t) - 1;
        let h = self.x[k + 1] - self.x[k];
        let s = (t - self.x[k]) / h;
        let h00 = (1.0 + 2.0 * s) * (1.0 - s) * (1.0 - s);
        let h10 = s * (1.0 - s) * (1.0 - s);
        let h01 = s * s * (3.0 - 2.0 * s);
        let h11 = s * s * (s - 1.0);
        h00 * self.y[k]
            + h10 * h * self.slopes[k]
            + h01 * self.y[k + 1]
            + h11 * h * self.slopes[k + 1]
    }
}

fn pchip_slopes(x: &[f64], y: &[f64]) -> Vec<f64> {
    let n = x.len();
    let h: Vec<f64> = x.windows(2).map(|w| w[1] - w[0]).collect();
    let d: Vec<f64> = (0..n - 1).map(|k| (y[k + 1] - y[k]) / h[k]).collect();
    if n == 2 {
        return vec![d[0], d[0]];
    }
    let mut m = vec![0.0; n];
    for k in 1..n - 1 {
        if d[k - 1] * d[k] > 0.0 {
            let w1 = 2.0 * h[k] + h[k - 1];
            let w2 = h[k] + 2.0 * h[k - 1];
            m[k] = (w1 + w2) / (w1 / d[k - 1] + w2 / d[k]);
        }
    }
    m[0] = end_slope(h[0], h[1], d[0], d[1]);
    m[n - 1] = end_slope(h[n - 2], h[n - 3], d[n - 2], d[n - 3]);
    m
}

/// One-sided three-point end slope, limited to preserve shape.
fn end_slope(h0: f64, h1: f64, d0: f64, d1: f64) -> f64 {
    let m = ((2.0 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
    if m.signum() != d0.signum() || d0 == 0.0 {
        0.0
    } else if d0.signum() != d1.signum() && m.abs() > 3.0 * d0.abs() {
        3.0 * d0
    } else {
        m
    }
}

/// A drying-rate curve: rate per exposed area (kg/(m^2 s)) against dry-basis moisture.
#[derive(Debug, Clone, PartialEq)]
pub enum RateCurve {
    /// A measured table of (X, R), interpolated by [`MonotoneCubic`]. The
    /// equilibrium is the lowest moisture, where the rate should be zero.
    Table(MonotoneCubic),
    /// Constant rate `rc` above the critical moisture `xc`; below it the rate
    /// falls linearly in free moisture to zero at the equilibrium `xe`.
    ConstantLinear { rc: f64, xc: f64, xe: f64 },
    /// Constant rate `rc` above `xc`; below it `R = rc ((X - xe)/(xc - xe))^n`.
    ConstantPower { rc: f64, xc: f64, xe: f64, n: f64 },
}

impl RateCurve {
    /// Constant rate joined to a linear falling rate; checks `rc > 0`, `xc > xe >= 0`.
    pub fn constant_linear(rc: f64, xc: f64, xe: f64) -> Result<RateCurve, KineticsError> {
        check_constant_falling(rc, xc, xe)?;
        Ok(RateCurve::ConstantLinear { rc, xc, xe })
    }

    /// Constant rate joined to a power-law falling rate; `n > 0`.
    pub fn constant_power(rc: f64, xc: f64, xe: f64, n: f64) -> Result<RateCurve, KineticsError> {
        check_constant_falling(rc, xc, xe)?;
        positive("falling-rate exponent", n)?;
        Ok(RateCurve::ConstantPower { rc, xc, xe, n })
    }

    /// A measured table: moistures (any order) and rates (kg/(m^2 s), >= 0).
    pub fn table(moistures: &[f64], rates: &[f64]) -> Result<RateCurve, KineticsError> {
        let mut pairs: Vec<(f64, f64)> = moistures
            .iter()
            .copied()
            .zip(rates.iter().copied())
            .collect();
        if moistures.len() != rates.len() {
            return Err(KineticsError::OutOfRange {
                name: "number of rates",
                value: rates.len() as f64,
                reason: "must equal the number of moistures",
            });
        }
        for &(x, r) in &pairs {
            non_negative("moisture in rate table", x)?;
            non_negative("rate in rate table", r)?;
        }
        pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
        let (x, y) = pairs.into_iter().unzip();
        Ok(RateCurve::Table(MonotoneCubic::new(x, y)?))
    }

    /// Drying rate at moisture `x`, kg/(m^2 s).
    pub fn rate(&self, x: f64) -> f64 {
        match *self {
            RateCurve::Table(ref t) => t.value(x),
            RateCurve::ConstantLinear { rc, xc, xe } => falling(rc, xc, xe, 1.0, x),
            RateCurve::ConstantPower { rc, xc, xe, n } => falling(rc, xc, xe, n, x),
        }
    }

    /// The lowest moisture the curve reaches (equilibrium), dry basis.
    pub fn equilibrium(&self) -> f64 {
        match self {
            RateCurve::Table(t) => t.x[0],
            RateCurve::ConstantLinear { xe, .. } | RateCurve::ConstantPower { xe, .. } => *xe,
        }
    }

    /// The critical moisture where the constant rate ends, if the model has one.
    pub fn critical(&self) -> Option<f64> {
        match self {
            RateCurve::Table(_) => None,
            RateCurve::ConstantLinear { xc, .. } | RateCurve::ConstantPower { xc, .. } => Some(*xc),
        }
    }

    /// The same curve with every rate multiplied by `factor` (> 0).
    ///
    /// Used to carry a lab curve to other air conditions: when the falling
    /// rate is governed by the surface, rates scale with the constant rate
    /// (McCabe et al., ch. 24; common practice, not valid for a falling rate
    /// controlled by internal diffusion).
    pub fn scaled(&self, factor: f64) -> Result<RateCurve, KineticsError> {
        positive("rate scale factor", factor)?;
        Ok(match self.clone() {
            RateCurve::Table(t) => RateCurve::Table(MonotoneCubic::new(
                t.x,
                t.y.iter().map(|r| r * factor).collect(),
            )?),
            RateCurve::ConstantLinear { rc, xc, xe } => RateCurve::ConstantLinear {
                rc: rc * factor,
                xc,
                xe,
            },
            RateCurve::ConstantPower { rc, xc, xe, n } => RateCurve::ConstantPower {
                rc: rc * factor,
                xc,
                xe,
                n,
            },
        })
    }
}

fn check_constant_falling(rc: f64, xc: f64, xe: f64) -> Result<(), KineticsError> {
    positive("constant drying rate", rc)?;
    non_negative("equilibrium moisture", xe)?;
    if !(xc.is_finite() && xc > xe) {
        return Err(KineticsError::OutOfRange {
            name: "critical moisture",
            value: xc,
            reason: "must exceed the equilibrium moisture",
        });
    }
    Ok(())
}

fn falling(rc: f64, xc: f64, xe: f64, n: f64, x: f64) -> f64 {
    if x >= xc {
        rc
    } else if x <= xe {
        0.0
    } else {
        rc * ((x - xe) / (xc - xe)).powf(n)
    }
}

/// The time to dry between two moistures, split into periods.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DryingTime {
    /// Total time, s.
    pub total_s: f64,
    /// Time above the critical moisture (constant-rate period), s; for a
    /// table, 0 (the table has no declared critical moisture).
    pub constant_s: f64,
    /// Time below the critical moisture (falling-rate period), s.
    pub falling_s: f64,
    /// Estimated absolute error of the quadrature, s (0 for closed forms).
    pub error_s: f64,
}

/// Time to dry from `x_start` down to `x_end` (dry basis) at solid load
/// `Ls/A` = `load_kg_per_m2` (kg dry solid per m^2 of exposed area).
///
/// Closed forms for the constant + falling models, adaptive quadrature
/// (relative 1e-9) for a table. Errors: target at or below equilibrium,
/// start below target, or moistures outside a table.
pub fn drying_time(
    curve: &RateCurve,
    load_kg_per_m2: f64,
    x_start: f64,
    x_end: f64,
) -> Result<DryingTime, KineticsError> {
    check_span(curve, load_kg_per_m2, x_start, x_end)?;
    match *curve {
        RateCurve::Table(_) => numerical_time(curve, load_kg_per_m2, x_start, x_end),
        RateCurve::ConstantLinear { rc, xc, xe } => {
            Ok(closed_time(rc, xc, xe, 1.0, load_kg_per_m2, x_start, x_end))
        }
        RateCurve::ConstantPower { rc, xc, xe, n } => {
            Ok(closed_time(rc, xc, xe, n, load_kg_per_m2, x_start, x_end))
        }
    }
}

fn check_span(curve: &RateCurve, load: f64, x_start: f64, x_end: f64) -> Result<(), KineticsError> {
    positive("dry-solid load per area", load)?;
    positive("start moisture", x_start)?;
    let xe = curve.equilibrium();
    if let RateCurve::Table(t) = curve {
        if x_end < t.x[0] && t.y[0] > 0.0 {
            return Err(KineticsError::OutOfRange { name: "target moisture", value: x_end, reason: "is below the lowest moisture of the measured rate curve; extend the test or use a falling-rate model" });
        }
    }
    if !super::above(x_end, xe) || curve.rate(x_end) <= 0.0 {
        return Err(KineticsError::TargetAtOrBelowEquilibrium {
            target: x_end,
            equilibrium: xe,
        });
    }
    if !super::above(x_start, x_end) {
        return Err(KineticsError::OutOfRange {
            name: "start moisture",
            value: x_start,
            reason: "must exceed the target moisture",
        });
    }
    if let RateCurve::Table(t) = curve {
        let top = t.x[t.x.len() - 1];
        if x_start > top {
            return Err(KineticsError::OutOfRange {
                name: "start moisture",
                value: x_start,
                reason: "is above the highest moisture in the rate table",
            });
        }
    }
    Ok(())
}

/// Closed form of the constant + falling integral.
fn closed_time(rc: f64, xc: f64, xe: f64, n: f64, load: f64, x1: f64, x2: f64) -> DryingTime {
    let constant = if x1 > xc { (x1 - xc.max(x2)) / rc } else { 0.0 };
    let falling = if x2 < xc {
        let f1 = (x1.min(xc) - xe) / (xc - xe);
        let f2 = (x2 - xe) / (xc - xe);
        let integral = if (n - 1.0).abs() < 1e-12 {
            (f1 / f2).ln()
        } else {
            (f1.powf(1.0 - n) - f2.powf(1.0 - n)) / (1.0 - n)
        };
        (xc - xe) / rc * integral
    } else {
        0.0
    };
    DryingTime {
        total_s: load * (constant + falling),
        constant_s: load * constant,
        falling_s: load * falling,
        error_s: 0.0,
    }
}

/// The batch drying curve: (time s, moisture) at `points` moistures evenly
/// spaced from `x_start` down to `x_end` (at least 2), time from the start.
pub fn drying_curve(
    curve: &RateCurve,
    load_kg_per_m2: f64,
    x_start: f64,
    x_end: f64,
    points: usize,
) -> Result<Vec<(f64, f64)>, KineticsError> {
    check_span(curve, load_kg_per_m2, x_start, x_end)?;
    if points < 2 {
        return Err(KineticsError::TooFewPoints {
            what: "a drying curve",
            needed: 2,
            found: points,
        });
    }
    let mut out = vec![(0.0, x_start)];
    let mut elapsed = 0.0;
    for k in 1..points {
        let (from, to) = (
            out[k - 1].1,
            x_start + (x_end - x_start) * k as f64 / (points - 1) as f64,
        );
        elapsed += drying_time(curve, load_kg_per_m2, from, to)?.total_s;
        out.push((elapsed, to));
    }
    Ok(out)
}

/// Drying time by adaptive quadrature of `1/R(X)`, for any curve.
pub fn numerical_time(
    curve: &RateCurve,
    load_kg_per_m2: f64,
    x_start: f64,
    x_end: f64,
) -> Result<DryingTime, KineticsError> {
    check_span(curve, load_kg_per_m2, x_start, x_end)?;
    let inverse = |x: f64| 1.0 / curve.rate(x);
    let split = curve.critical().filter(|xc| *xc > x_end && *xc < x_start);
    let (constant, falling, error) = match split {
        Some(xc) => {
            let c = gauss_kronrod(inverse, xc, x_start, 1e-10, 0.0)?;
            let f = gauss_kronrod(inverse, x_end, xc, 1e-10, 0.0)?;
            (c.value, f.value, c.error + f.error)
        }
        None => {
            let q = gauss_kronrod(inverse, x_end, x_start, 1e-10, 0.0)?;
            match curve.critical() {
                Some(xc) if x_end >= xc => (q.value, 0.0, q.error),
                _ => (0.0, q.value, q.error),
            }
        }
    };
    let load = load_kg_per_m2;
    Ok(DryingTime {
        total_s: load * (constant + falling),
        constant_s: load * constant,
        falling_s: load * falling,
        error_s: load * error,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn closed_forms_match_quadrature() {
        let linear = RateCurve::constant_linear(1.2e-3, 0.6, 0.05).unwrap();
        let power = RateCurve::constant_power(1.2e-3, 0.6, 0.05, 1.7).unwrap();
        for curve in [linear, power] {
            for (x1, x2) in [(1.3, 0.12), (0.5, 0.1), (1.3, 0.8), (2.0, 0.051)] {
                let a = drying_time(&curve, 18.0, x1, x2).unwrap();
                let b = numerical_time(&curve, 18.0, x1, x2).unwrap();
                assert!(
                    (a.total_s / b.total_s - 1.0).abs() < 1e-8,
                    "{curve:?} {x1}->{x2}: {a:?} {b:?}"
                );
                assert!((a.constant_s - b.constant_s).abs() <= 1e-8 * a.total_s);
            }
        }
    }

    #[test]
    fn drying_curve_ends_at_the_total_time() {
        let c = RateCurve::constant_linear(1e-3, 0.6, 0.05).unwrap();
        let points = drying_curve(&c, 18.0, 1.3, 0.12, 25).unwrap();
        let total = drying_time(&c, 18.0, 1.3, 0.12).unwrap().total_s;
        assert_eq!(points.len(), 25);
        assert!((points[24].0 / total - 1.0).abs() < 1e-10 && (points[24].1 - 0.12).abs() < 1e-12);
        assert!(points.windows(2).all(|w| w[1].0 > w[0].0));
    }

    #[test]
    fn target_at_equilibrium_is_an_error_not_infinity() {
        let c = RateCurve::constant_linear(1e-3, 0.6, 0.05).unwrap();
        let e = drying_time(&c, 10.0, 1.0, 0.05).unwrap_err();
        assert!(e.to_string().contains("0.05"), "{e}");
        assert!(drying_time(&c, 10.0, 1.0, 0.01).is_err());
        let t = RateCurve::table(&[0.05, 0.3, 0.6, 1.0], &[0.0, 5e-4, 1e-3, 1e-3]).unwrap();
        assert!(matches!(
            drying_time(&t, 10.0, 0.9, 0.05),
            Err(KineticsError::TargetAtOrBelowEquilibrium { .. })
        ));
        assert!(
            drying_time(&t, 10.0, 1.5, 0.1).is_err(),
            "start above the table"
        );
    }

    /// Common practice: the last part of the moisture takes the longest to
    /// remove. Equal moisture decrements take ever longer, and the falling
    /// period (0.48 kg/kg removed) outlasts the constant one (0.70 kg/kg).
    #[test]
    fn last_part_takes_longest() {
        let c = RateCurve::constant_linear(1e-3, 0.6, 0.05).unwrap();
        let edges: Vec<f64> = (0..=10).map(|i| 1.3 - 0.118 * i as f64).collect();
        let times: Vec<f64> = edges
            .windows(2)
            .map(|w| drying_time(&c, 18.0, w[0], w[1]).unwrap().total_s)
            .collect();
        assert!(
            times.windows(2).all(|w| w[1] >= w[0] * (1.0 - 1e-12)),
            "{times:?}"
        );
        assert!(times[9] > 2.0 * times[0], "{times:?}");
        let split = drying_time(&c, 18.0, 1.3, 0.12).unwrap();
        assert!(split.falling_s > split.constant_s, "{split:?}");
    }

    #[test]
    fn pchip_is_monotone_and_interpolates() {
        let x = vec![0.0, 1.0, 2.0, 3.0, 4.0];
        let y = vec![0.0, 0.1, 0.9, 1.0, 1.0];
        let p = MonotoneCubic::new(x.clone(), y.clone()).unwrap();
        for (a, b) in x.iter().zip(&y) {
            assert!((p.value(*a) - b).abs() < 1e-15);
        }
        let mut last = -1.0;
        for i in 0..=400 {
            let v = p.value(i as f64 * 0.01);
            assert!(v >= last - 1e-15 && v <= 1.0 + 1e-15, "not monotone at {i}");
            last = v;
        }
    }
}

#[cfg(test)]
mod properties {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        /// Drying times add over consecutive spans, for any constant + power curve.
        #[test]
        fn times_add_over_spans(rc in 1e-4f64..1e-2, xe in 0.0f64..0.1, span in 0.1f64..1.0, n in 0.3f64..3.0,
                                a in 0.0f64..1.0, b in 0.0f64..1.0) {
            let xc = xe + span;
            let curve = RateCurve::constant_power(rc, xc, xe, n).unwrap();
            let x1 = xc + 1.0;
            let (hi, lo) = (xe + 1e-3 + (x1 - xe - 1e-3) * a.max(b), xe + 1e-3 + (x1 - xe - 1e-3) * a.min(b));
            prop_assume!(hi - lo > 1e-6 && x1 - hi > 1e-6);
            let whole = drying_time(&curve, 10.0, x1, lo).unwrap().total_s;
            let parts = drying_time(&curve, 10.0, x1, hi).unwrap().total_s + drying_time(&curve, 10.0, hi, lo).unwrap().total_s;
            prop_assert!((whole / parts - 1.0).abs() < 1e-9);
        }

        /// The monotone cubic never leaves the range of its neighbouring data
        /// and keeps monotone data monotone.
        #[test]
        fn pchip_keeps_monotone_data_monotone(steps in proptest::collection::vec((0.01f64..1.0, 0.0f64..1.0), 3..12)) {
            let mut x = vec![0.0];
            let mut y = vec![0.0];
            for (dx, dy) in &steps {
                x.push(x[x.len() - 1] + dx);
                y.push(y[y.len() - 1] + dy);
            }
            let p = MonotoneCubic::new(x.clone(), y.clone()).unwrap();
            let mut last = f64::NEG_INFINITY;
            for k in 0..=500 {
                let t = x[x.len() - 1] * k as f64 / 500.0;
                let v = p.value(t);
                prop_assert!(v >= last - 1e-12);
                last = v;
            }
        }
    }
}
