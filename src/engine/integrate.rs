//! Numerics for drying kinetics: adaptive Gauss-Kronrod quadrature.
//!
//! Quadrature: the 7-point Gauss rule embedded in the 15-point Kronrod rule
//! (G7-K15), applied adaptively with global error control: the interval with
//! the largest error estimate is halved until the summed estimate meets the
//! tolerance (the strategy of QUADPACK's QAG; Piessens et al., *QUADPACK*,
//! Springer 1983). Root searches use the shared [`crate::engine::solve::brent`].

use thiserror::Error;

use super::solve::SolveError;

/// Why a quadrature or root search failed.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum IntegrateError {
    /// The integrand returned NaN or an infinity.
    #[error("the integrand is not finite at x = {x:.6e} (value {value})")]
    NotFinite { x: f64, value: f64 },
    /// The error target was not met within the subdivision budget.
    #[error("adaptive quadrature did not reach relative error {rel_tol:.1e} after {intervals} subdivisions (estimate {estimate:.3e})")]
    NoConvergence {
        rel_tol: f64,
        intervals: usize,
        estimate: f64,
    },
    /// A root search inside an integration-based method failed.
    #[error("{0}")]
    Root(#[from] SolveError),
}

/// Result of an adaptive quadrature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quadrature {
    /// The integral estimate.
    pub value: f64,
    /// Estimated absolute error.
    pub error: f64,
    /// Number of integrand evaluations.
    pub evaluations: usize,
}

/// Kronrod 15-point abscissae on [-1, 1] (positive half, descending; last is 0).
/// Odd indices (1, 3, 5, 7) are the 7-point Gauss nodes.
const KRONROD_NODES: [f64; 8] = [
    0.991_455_371_120_812_6,
    0.949_107_912_342_758_5,
    0.864_864_423_359_769_1,
    0.741_531_185_599_394_4,
    0.586_087_235_467_691_1,
    0.405_845_151_377_397_2,
    0.207_784_955_007_898_5,
    0.0,
];
/// Kronrod 15-point weights matching [`KRONROD_NODES`].
const KRONROD_WEIGHTS: [f64; 8] = [
    0.022_935_322_010_529_22,
    0.063_092_092_629_978_55,
    0.104_790_010_322_250_2,
    0.140_653_259_715_525_9,
    0.169_004_726_639_267_9,
    0.190_350_578_064_785_4,
    0.204_432_940_075_298_9,
    0.209_482_141_084_727_8,
];
/// Gauss 7-point weights for nodes KRONROD_NODES[1], [3], [5], [7].
const GAUSS_WEIGHTS: [f64; 4] = [
    0.129_484_966_168_869_7,
    0.279_705_391_489_276_7,
    0.381_830_050_505_118_9,
    0.417_959_183_673_469_4,
];

/// One G7-K15 panel: (Kronrod estimate, |Kronrod - Gauss|).
fn panel<F: FnMut(f64) -> f64>(f: &mut F, a: f64, b: f64) -> Result<(f64, f64), IntegrateError> {
    let centre = 0.5 * (a + b);
    let half = 0.5 * (b - a);
    let mut kronrod = 0.0;
    let mut gauss = 0.0;
    for (i, (&node, &wk)) in KRONROD_NODES.iter().zip(&KRONROD_WEIGHTS).enumerate() {
        let points: &[f64] = if node == 0.0 {
            &[centre]
        } else {
            &[centre - half * node, centre + half * node]
        };
        for &x in points {
            let value = f(x);
            if !value.is_finite() {
                return Err(IntegrateError::NotFinite { x, value });
            }
            kronrod += wk * value;
            if i % 2 == 1 {
                gauss += GAUSS_WEIGHTS[i / 2] * value;
            }
        }
    }
    Ok((kronrod * half, ((kronrod - gauss) * half).abs()))
}

/// Integrate `f` over `[a, b]` by adaptive G7-K15 quadrature.
///
/// Stops when the summed error estimate is below `max(abs_tol, rel_tol * |I|)`.
/// Returns an error (never a silent number) when the integrand is not finite
/// or the target is not met within 2000 subdivisions. `a > b` gives the
/// negated integral. Source: Piessens et al., QUADPACK (1983), routine QAG.
pub fn gauss_kronrod<F: FnMut(f64) -> f64>(
    mut f: F,
    a: f64,
    b: f64,
    rel_tol: f64,
    abs_tol: f64,
) -> Result<Quadrature, IntegrateError> {
    if a == b {
        return Ok(Quadrature {
            value: 0.0,
            error: 0.0,
            evaluations: 0,
        });
    }
    if a > b {
        let q = gauss_kronrod(f, b, a, rel_tol, abs_tol)?;
        return Ok(Quadrature {
            value: -q.value,
            ..q
        });
    }
    const MAX_INTERVALS: usize = 2000;
    let (value, error) = panel(&mut f, a, b)?;
    let mut intervals = vec![(a, b, value, error)];
    let mut evaluations = 15;
    loop {
        let total: f64 = intervals.iter().map(|p| p.2).sum();
        let total_error: f64 = intervals.iter().map(|p| p.3).sum();
        if total_error <= abs_tol.max(rel_tol * total.abs()) {
            return Ok(Quadrature {
                value: total,
                error: total_error,
                evaluations,
            });
        }
        if intervals.len() >= MAX_INTERVALS {
            return Err(IntegrateError::NoConvergence {
                rel_tol,
                intervals: intervals.len(),
                estimate: total,
            });
        }
        let worst = worst_interval(&intervals);
        let (lo, hi, _, _) = intervals.swap_remove(worst);
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            // Interval cannot be split further in floating point.
            return Err(IntegrateError::NoConvergence {
                rel_tol,
                intervals: intervals.len(),
                estimate: total,
            });
        }
        let (v1, e1) = panel(&mut f, lo, mid)?;
        let (v2, e2) = panel(&mut f, mid, hi)?;
        evaluations += 30;
        intervals.push((lo, mid, v1, e1));
        intervals.push((mid, hi, v2, e2));
    }
}

fn worst_interval(intervals: &[(f64, f64, f64, f64)]) -> usize {
    let mut worst = 0;
    for (i, p) in intervals.iter().enumerate() {
        if p.3 > intervals[worst].3 {
            worst = i;
        }
    }
    worst
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Mathematical fact: the K15 rule integrates polynomials up to degree 22
    /// exactly and the G7 rule up to degree 13; a mistyped node or weight
    /// breaks this.
    #[test]
    fn rules_are_exact_for_polynomials() {
        for degree in 0..=22 {
            let mut f = |x: f64| x.powi(degree);
            let (k, _) = panel(&mut f, 0.0, 1.0).unwrap();
            let exact = 1.0 / (degree as f64 + 1.0);
            assert!(
                (k - exact).abs() < 1e-14,
                "K15 degree {degree}: {k} vs {exact}"
            );
        }
        for degree in 0..=13 {
            let mut f = |x: f64| x.powi(degree);
            let (k, diff) = panel(&mut f, 0.0, 1.0).unwrap();
            assert!(
                diff < 1e-14,
                "G7 degree {degree}: gauss differs from kronrod {k} by {diff}"
            );
        }
        let mut f = |x: f64| x.powi(14);
        let (_, diff) = panel(&mut f, -1.0, 1.0).unwrap();
        assert!(diff > 1e-6, "G7 must not be exact at degree 14");
    }

    /// Closed-form integrals (calculus facts), relative 1e-6 or better.
    #[test]
    fn adaptive_meets_relative_tolerance() {
        type Case = (fn(f64) -> f64, f64, f64, f64);
        let cases: [Case; 4] = [
            (|x| x.exp(), 0.0, 3.0, 3f64.exp() - 1.0),
            (|x| 1.0 / x, 1e-3, 1.0, 1e3f64.ln()),
            (|x| x.sqrt(), 0.0, 2.0, 2.0 / 3.0 * 2f64.powf(1.5)),
            (
                |x| 1.0 / (1.0 + 100.0 * x * x),
                -1.0,
                1.0,
                0.2 * 10f64.atan(),
            ),
        ];
        for (f, a, b, exact) in cases {
            let q = gauss_kronrod(f, a, b, 1e-8, 0.0).unwrap();
            assert!(
                ((q.value - exact) / exact).abs() < 1e-6,
                "{} vs {exact}",
                q.value
            );
        }
        let q = gauss_kronrod(|x: f64| x.exp(), 1.0, 0.0, 1e-10, 0.0).unwrap();
        assert!((q.value + (1f64.exp() - 1.0)).abs() < 1e-12);
    }

    #[test]
    fn non_finite_integrand_is_an_error() {
        let r = gauss_kronrod(|x: f64| 1.0 / (x - 0.5), 0.0, 1.0, 1e-8, 0.0);
        assert!(r.is_err());
        let r = gauss_kronrod(|x: f64| 1.0 / x, 0.0, 1.0, 1e-8, 0.0);
        assert!(
            r.is_err(),
            "divergent integral must not return a number: {r:?}"
        );
    }
}
