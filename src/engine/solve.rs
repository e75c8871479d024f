//! Shared numerics: one-dimensional root finding.
//!
//! [`brent`] is Brent's method (inverse quadratic interpolation, secant and
//! bisection steps, with the guards of Brent 1973, "Algorithms for Minimization
//! without Derivatives", ch. 4). It needs a bracket whose ends have opposite
//! signs and it never returns an unconverged number: it returns a
//! [`SolveError`] instead. Engine families share it; add functions here rather
//! than writing a private solver.

use std::fmt;

/// Why a root search failed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum SolveError {
    /// `f(a)` and `f(b)` have the same sign (or one is not finite): no bracket.
    NotBracketed { a: f64, b: f64, fa: f64, fb: f64 },
    /// The function returned NaN or infinity inside the bracket.
    NotFinite { x: f64 },
    /// The iteration budget ran out before the tolerance was met.
    NotConverged { iterations: u32, width: f64 },
}

impl fmt::Display for SolveError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SolveError::NotBracketed { a, b, fa, fb } => write!(
                f,
                "no sign change between {a:.6} (residual {fa:.3e}) and {b:.6} (residual {fb:.3e})"
            ),
            SolveError::NotFinite { x } => write!(f, "the residual is not finite at {x:.6}"),
            SolveError::NotConverged { iterations, width } => {
                write!(
                    f,
                    "not converged after {iterations} iterations (bracket width {width:.3e})"
                )
            }
        }
    }
}

impl std::error::Error for SolveError {}

/// Stopping rule for a root search: stop when the bracket is narrower than
/// `abs + rel * |x|`, or when the residual is exactly zero.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Tolerance {
    pub abs: f64,
    pub rel: f64,
    pub max_iterations: u32,
}

impl Tolerance {
    /// Absolute and relative tolerance on x, with a budget of 200 iterations.
    pub const fn new(abs: f64, rel: f64) -> Tolerance {
        Tolerance {
            abs,
            rel,
            max_iterations: 200,
        }
    }
}

impl Default for Tolerance {
    /// Near machine precision: `abs = 1e-14`, `rel = 4 * f64::EPSILON`.
    fn default() -> Tolerance {
        Tolerance::new(1e-14, 4.0 * f64::EPSILON)
    }
}

/// Find `x` in `[a, b]` with `f(x) = 0` by Brent's method.
///
/// Requires `f(a)` and `f(b)` of opposite sign (either may be zero). Returns
/// [`SolveError::NotBracketed`] otherwise, [`SolveError::NotFinite`] when `f`
/// returns NaN/inf inside the bracket and [`SolveError::NotConverged`] when the
/// iteration budget runs out.
pub fn brent<F: FnMut(f64) -> f64>(
    mut f: F,
    a: f64,
    b: f64,
    tol: Tolerance,
) -> Result<f64, SolveError> {
    let fa = f(a);
    let fb = f(b);
    if fa == 0.0 {
        return Ok(a);
    }
    if fb == 0.0 {
        return Ok(b);
    }
    if !fa.is_finite() || !fb.is_finite() || fa.signum() == fb.signum() {
        return Err(SolveError::NotBracketed { a, b, fa, fb });
    }
    brent_bracketed(&mut f, Bracket { a, b, fa, fb }, tol)
}

/// A sign-changing interval with its residuals.
#[derive(Clone, Copy)]
struct Bracket {
    a: f64,
    b: f64,
    fa: f64,
    fb: f64,
}

fn brent_bracketed<F: FnMut(f64) -> f64>(
    f: &mut F,
    br: Bracket,
    tol: Tolerance,
) -> Result<f64, SolveError> {
    // b: best estimate; a: previous b; c: the other end of the bracket.
    let (mut a, mut b, mut fa, mut fb) = (br.a, br.b, br.fa, br.fb);
    let (mut c, mut fc) = (a, fa);
    let (mut d, mut e) = (b - a, b - a);
    for _ in 0..tol.max_iterations {
        if fb.signum() == fc.signum() {
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if fc.abs() < fb.abs() {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let limit = 0.5 * (tol.abs + tol.rel * b.abs()) + f64::EPSILON * b.abs();
        let half = 0.5 * (c - b);
        if half.abs() <= limit || fb == 0.0 {
            return Ok(b);
        }
        (d, e) = next_step(Step {
            a,
            b,
            c,
            fa,
            fb,
            fc,
            d,
            e,
            half,
            limit,
        });
        a = b;
        fa = fb;
        b += if d.abs() > limit {
            d
        } else {
            limit.copysign(half)
        };
        fb = f(b);
        if !fb.is_finite() {
            return Err(SolveError::NotFinite { x: b });
        }
    }
    Err(SolveError::NotConverged {
        iterations: tol.max_iterations,
        width: (c - b).abs(),
    })
}

/// The state needed to choose Brent's next step.
struct Step {
    a: f64,
    b: f64,
    c: f64,
    fa: f64,
    fb: f64,
    fc: f64,
    d: f64,
    e: f64,
    half: f64,
    limit: f64,
}

/// Interpolate when it is safe, else bisect; returns the new (step, previous step).
fn next_step(s: Step) -> (f64, f64) {
    if s.e.abs() < s.limit || s.fa.abs() <= s.fb.abs() {
        return (s.half, s.half);
    }
    let sr = s.fb / s.fa;
    let (mut p, mut q) = if s.a == s.c {
        (2.0 * s.half * sr, 1.0 - sr)
    } else {
        let qa = s.fa / s.fc;
        let r = s.fb / s.fc;
        (
            sr * (2.0 * s.half * qa * (qa - r) - (s.b - s.a) * (r - 1.0)),
            (qa - 1.0) * (r - 1.0) * (sr - 1.0),
        )
    };
    if p > 0.0 {
        q = -q;
    } else {
        p = -p;
    }
    let accept = 2.0 * p < (3.0 * s.half * q - (s.limit * q).abs()).min((s.e * q).abs());
    if accept {
        (p / q, s.d)
    } else {
        (s.half, s.half)
    }
}

/// Find the root of an increasing `f` in `[lo, hi]` by Newton steps with
/// bisection as a safeguard ("rtsafe", Press et al., Numerical Recipes, 3rd ed.,
/// section 9.4), starting at `x0`.
///
/// `f(x)` returns the residual and an estimate of its slope. The caller vouches
/// that `f(lo) <= 0 <= f(hi)` (it is not evaluated at the ends). After the first
/// step the slope is taken from the last two iterates (secant) when that is
/// positive, so a rough slope estimate costs little. Converges when a step is
/// below `tol`; returns [`SolveError::NotConverged`] after `tol.max_iterations`
/// and [`SolveError::NotFinite`] for a NaN residual.
pub fn newton_bracketed<F: FnMut(f64) -> (f64, f64)>(
    mut f: F,
    lo: f64,
    hi: f64,
    x0: f64,
    tol: Tolerance,
) -> Result<f64, SolveError> {
    let (mut a, mut b) = (lo, hi);
    let mut x = x0.clamp(lo, hi);
    let mut previous: Option<(f64, f64)> = None;
    for _ in 0..tol.max_iterations {
        let (fx, slope_estimate) = f(x);
        if fx.is_nan() {
            return Err(SolveError::NotFinite { x });
        }
        if fx == 0.0 {
            return Ok(x);
        }
        if fx < 0.0 {
            a = x;
        } else {
            b = x;
        }
        let slope = match previous {
            Some((xp, fp)) if xp != x && (fx - fp) / (x - xp) > 0.0 => (fx - fp) / (x - xp),
            _ => slope_estimate,
        };
        previous = Some((x, fx));
        let limit = tol.abs + tol.rel * x.abs() + f64::EPSILON * x.abs();
        let newton = -fx / slope;
        if newton.abs() <= limit {
            return Ok((x + newton).clamp(a, b));
        }
        let mut next = x + newton;
        if !(next > a && next < b) {
            next = 0.5 * (a + b);
        }
        x = next;
        if (b - a) <= limit {
            return Ok(x);
        }
    }
    Err(SolveError::NotConverged {
        iterations: tol.max_iterations,
        width: b - a,
    })
}

/// Find the root of an increasing `f` in `[lo, hi]` by Newton's method with
/// an exact slope, bisection as a safeguard, starting at `x0`.
///
/// `f(x)` returns the residual and its derivative, which must be exact up to a
/// relative error near 1e-8 (analytic, or a careful central difference): the
/// iteration relies on quadratic convergence. The caller vouches that
/// `f(lo) <= 0 <= f(hi)` (the ends are not evaluated). Stops when a Newton step
/// is below `tol`, or when two successive Newton steps `s1`, `s2` show
/// quadratic convergence (`|s2| <= |s1| / 4`) with a predicted next correction
/// `|s2|^3 / s1^2` below `tol`: the error after the last step is then below
/// `tol` without one more evaluation. Returns [`SolveError::NotConverged`]
/// after `tol.max_iterations` and [`SolveError::NotFinite`] for a NaN residual.
pub fn newton_exact<F: FnMut(f64) -> (f64, f64)>(
    mut f: F,
    lo: f64,
    hi: f64,
    x0: f64,
    tol: Tolerance,
) -> Result<f64, SolveError> {
    let (mut a, mut b) = (lo, hi);
    let mut x = x0.clamp(lo, hi);
    let mut last_newton: Option<f64> = None;
    for _ in 0..tol.max_iterations {
        let (fx, slope) = f(x);
        if fx.is_nan() || slope.is_nan() {
            return Err(SolveError::NotFinite { x });
        }
        if fx == 0.0 {
            return Ok(x);
        }
        if fx < 0.0 {
            a = x;
        } else {
            b = x;
        }
        let limit = tol.abs + tol.rel * x.abs() + f64::EPSILON * x.abs();
        let step = -fx / slope;
        let next = x + step;
        if step.abs() <= limit {
            return Ok(next.clamp(a, b));
        }
        let inside = next > a && next < b;
        if let (true, Some(previous)) = (inside, last_newton) {
            let quadratic = step.abs() <= 0.25 * previous.abs();
            if quadratic && step.abs().powi(3) <= limit * previous * previous {
                return Ok(next);
            }
        }
        if inside {
            x = next;
            last_newton = Some(step);
        } else {
            x = 0.5 * (a + b);
            last_newton = None;
        }
        if b - a <= limit {
            return Ok(x);
        }
    }
    Err(SolveError::NotConverged {
        iterations: tol.max_iterations,
        width: b - a,
    })
}

/// Widen `[a, b]` geometrically toward `limit` (beyond `b`) until `f` changes sign.
///
/// Returns the new bracket `(lo, hi)` or [`SolveError::NotBracketed`] when `limit`
/// is reached without a sign change. Useful when only one end is known.
pub fn expand_bracket<F: FnMut(f64) -> f64>(
    mut f: F,
    a: f64,
    b: f64,
    limit: f64,
) -> Result<(f64, f64), SolveError> {
    let fa = f(a);
    let mut step = b - a;
    let mut hi = b;
    for _ in 0..200 {
        let fh = f(hi);
        if fh.is_finite() && fa.is_finite() && fh.signum() != fa.signum() {
            return Ok((a.min(hi), a.max(hi)));
        }
        if hi == limit {
            return Err(SolveError::NotBracketed {
                a,
                b: hi,
                fa,
                fb: fh,
            });
        }
        step *= 2.0;
        hi = if limit > a {
            (hi + step).min(limit)
        } else {
            (hi + step).max(limit)
        };
    }
    Err(SolveError::NotBracketed {
        a,
        b: hi,
        fa,
        fb: f(hi),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_cube_root_of_two() {
        let x = brent(|x| x * x * x - 2.0, 0.0, 2.0, Tolerance::default()).unwrap();
        assert!((x - 2f64.cbrt()).abs() < 1e-14, "{x}");
    }

    #[test]
    fn refuses_a_non_bracket() {
        let r = brent(|x| x * x + 1.0, -1.0, 1.0, Tolerance::default());
        assert!(matches!(r, Err(SolveError::NotBracketed { .. })));
    }

    #[test]
    fn reports_non_convergence() {
        let tol = Tolerance {
            abs: 0.0,
            rel: 0.0,
            max_iterations: 3,
        };
        let r = brent(|x| x.exp() - 10.0, 0.0, 10.0, tol);
        assert!(matches!(r, Err(SolveError::NotConverged { .. })));
    }

    #[test]
    fn reports_nan_inside_bracket() {
        let r = brent(
            |x| {
                if x > 0.3 && x < 0.7 {
                    f64::NAN
                } else {
                    x - 0.5
                }
            },
            0.0,
            1.0,
            Tolerance::default(),
        );
        assert!(matches!(r, Err(SolveError::NotFinite { .. })));
    }

    #[test]
    fn handles_steep_function() {
        // Kepler-like equation with a steep, curved residual.
        let x = brent(|x| x - 0.9 * x.sin() - 0.1, 0.0, 3.0, Tolerance::default()).unwrap();
        assert!((x - 0.9 * x.sin() - 0.1).abs() < 1e-14);
    }

    #[test]
    fn newton_with_rough_slope_converges() {
        let f = |x: f64| (x.exp() - 5.0, 0.5 * x.exp());
        let x = newton_bracketed(f, 0.0, 3.0, 2.9, Tolerance::new(1e-14, 1e-15)).unwrap();
        assert!((x - 5f64.ln()).abs() < 1e-13, "{x}");
        let budget = Tolerance {
            abs: 0.0,
            rel: 0.0,
            max_iterations: 2,
        };
        assert!(newton_bracketed(f, 0.0, 3.0, 2.9, budget).is_err());
    }

    #[test]
    fn exact_newton_converges_quadratically() {
        let mut calls = 0;
        let f = |x: f64| {
            calls += 1;
            (x.exp() - 5.0, x.exp())
        };
        let x = newton_exact(f, 0.0, 3.0, 1.0, Tolerance::new(1e-14, 1e-15)).unwrap();
        assert!((x - 5f64.ln()).abs() < 1e-14, "{x}");
        assert!(calls <= 6, "{calls} evaluations");
        // A start outside the basin of a far-off Newton step falls back to bisection.
        let g = |x: f64| (x.atan(), 1.0 / (1.0 + x * x));
        let x = newton_exact(g, -2.0, 30.0, 25.0, Tolerance::new(1e-14, 1e-15)).unwrap();
        assert!(x.abs() < 1e-14, "{x}");
        let budget = Tolerance {
            abs: 0.0,
            rel: 0.0,
            max_iterations: 2,
        };
        let h = |x: f64| (x.exp() - 5.0, x.exp());
        assert!(newton_exact(h, 0.0, 3.0, 2.9, budget).is_err());
        let nan = |_: f64| (f64::NAN, 1.0);
        assert!(matches!(
            newton_exact(nan, 0.0, 1.0, 0.5, Tolerance::default()),
            Err(SolveError::NotFinite { .. })
        ));
    }

    #[test]
    fn expands_to_a_bracket() {
        let (lo, hi) = expand_bracket(|x| x - 37.0, 0.0, 1.0, 1e3).unwrap();
        assert!(lo <= 37.0 && hi >= 37.0);
        assert!(expand_bracket(|x| x + 1.0, 0.0, 1.0, 10.0).is_err());
    }
}
