//! Derivative-free minimisation inside bounds, for worksheet optimisation.
//!
//! Worksheet objectives are cheap to evaluate but carry no derivatives, and
//! design rules (`check`) are pass/fail. So infeasible or failed points are
//! given the value `+inf` (an extreme barrier) and the searches below only
//! compare values:
//!
//! - [`golden_section`]: golden-section search on an interval (Kiefer 1953;
//!   Press et al., Numerical Recipes, 3rd ed., sec. 10.2). Used in one
//!   dimension after a grid scan has bracketed the best point.
//! - [`nelder_mead`]: the Nelder-Mead simplex (Nelder & Mead 1965, Computer
//!   Journal 7, 308) with the standard coefficients (reflection 1, expansion 2,
//!   contraction 1/2, shrink 1/2; Lagarias et al. 1998, SIAM J. Optim. 9, 112),
//!   working in the unit box with every trial point projected onto the bounds.
//!   Used for two and three inputs.
//!
//! Neither is global on its own; callers start them from the best point of a
//! coarse grid.

use std::fmt;

/// The best point found.
#[derive(Clone, Debug, PartialEq)]
pub struct Minimum {
    /// Coordinates of the best point.
    pub x: Vec<f64>,
    /// Objective value there.
    pub f: f64,
    /// Objective evaluations used.
    pub evaluations: usize,
}

/// Why a minimisation failed.
#[derive(Clone, Debug, PartialEq)]
pub enum MinimiseError {
    /// The simplex did not shrink below the tolerance within the budget.
    NotConverged { evaluations: usize, size: f64 },
    /// Every point tried had the value `+inf` (infeasible or failed).
    NoFiniteValue,
}

impl fmt::Display for MinimiseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            MinimiseError::NotConverged { evaluations, size } => write!(
                f,
                "the search did not settle after {evaluations} evaluations (simplex size {size:.2e} of the bounds)"
            ),
            MinimiseError::NoFiniteValue => write!(f, "no point tried gave a finite value"),
        }
    }
}

impl std::error::Error for MinimiseError {}

/// Minimise `f` on `[a, b]` by golden-section search until the interval is
/// narrower than `x_tol`. Assumes one minimum in the interval (otherwise it
/// finds a local one). `+inf` values are allowed and treated as worst.
pub fn golden_section<F: FnMut(f64) -> f64>(mut f: F, a: f64, b: f64, x_tol: f64) -> Minimum {
    let ratio = (5f64.sqrt() - 1.0) / 2.0;
    let (mut a, mut b) = (a.min(b), a.max(b));
    let mut c = b - ratio * (b - a);
    let mut d = a + ratio * (b - a);
    let (mut fc, mut fd) = (f(c), f(d));
    let mut evaluations = 2;
    while (b - a).abs() > x_tol && evaluations < 500 {
        if fc <= fd {
            b = d;
            d = c;
            fd = fc;
            c = b - ratio * (b - a);
            fc = f(c);
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + ratio * (b - a);
            fd = f(d);
        }
        evaluations += 1;
    }
    let (x, fx) = if fc <= fd { (c, fc) } else { (d, fd) };
    Minimum {
        x: vec![x],
        f: fx,
        evaluations,
    }
}

/// Settings of [`nelder_mead`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Simplex {
    /// Initial step along each axis, as a fraction of the bounds' width.
    pub step: f64,
    /// Stop when every vertex is within this fraction of the bounds' width of the best.
    pub x_tol: f64,
    /// Evaluation budget.
    pub max_evaluations: usize,
}

impl Default for Simplex {
    fn default() -> Simplex {
        Simplex {
            step: 0.1,
            x_tol: 1e-7,
            max_evaluations: 4000,
        }
    }
}

/// Minimise `f` over the box `lo..hi` (per coordinate) from `start`, by the
/// Nelder-Mead simplex with projection onto the box.
pub fn nelder_mead<F: FnMut(&[f64]) -> f64>(
    mut f: F,
    start: &[f64],
    lo: &[f64],
    hi: &[f64],
    settings: Simplex,
) -> Result<Minimum, MinimiseError> {
    let n = start.len();
    let to_box = |u: &[f64]| -> Vec<f64> {
        (0..n)
            .map(|i| lo[i] + (hi[i] - lo[i]) * u[i].clamp(0.0, 1.0))
            .collect()
    };
    let evaluations = std::cell::Cell::new(0usize);
    let mut g = |u: &[f64]| {
        evaluations.set(evaluations.get() + 1);
        f(&to_box(u))
    };
    let u0: Vec<f64> = (0..n)
        .map(|i| ((start[i] - lo[i]) / (hi[i] - lo[i])).clamp(0.0, 1.0))
        .collect();
    let mut simplex = initial_simplex(&u0, settings.step);
    let mut values: Vec<f64> = simplex.iter().map(|u| g(u)).collect();
    loop {
        order(&mut simplex, &mut values);
        let size = simplex_size(&simplex);
        if size <= settings.x_tol {
            break;
        }
        if evaluations.get() >= settings.max_evaluations {
            let evaluations = evaluations.get();
            return Err(MinimiseError::NotConverged { evaluations, size });
        }
        simplex_step(&mut simplex, &mut values, &mut g);
    }
    if !values[0].is_finite() {
        return Err(MinimiseError::NoFiniteValue);
    }
    Ok(Minimum {
        x: to_box(&simplex[0]),
        f: values[0],
        evaluations: evaluations.get(),
    })
}

/// `start` and one vertex per axis, stepped inwards when at the upper bound.
fn initial_simplex(u0: &[f64], step: f64) -> Vec<Vec<f64>> {
    let mut simplex = vec![u0.to_vec()];
    for i in 0..u0.len() {
        let mut v = u0.to_vec();
        v[i] = if v[i] + step <= 1.0 {
            v[i] + step
        } else {
            v[i] - step
        };
        simplex.push(v);
    }
    simplex
}

/// Sort vertices from best to worst (stable, so ties keep their order).
fn order(simplex: &mut Vec<Vec<f64>>, values: &mut Vec<f64>) {
    let mut idx: Vec<usize> = (0..values.len()).collect();
    idx.sort_by(|&a, &b| values[a].total_cmp(&values[b]));
    *simplex = idx.iter().map(|&i| simplex[i].clone()).collect();
    *values = idx.iter().map(|&i| values[i]).collect();
}

/// Largest distance (max norm) of a vertex from the best one.
fn simplex_size(simplex: &[Vec<f64>]) -> f64 {
    simplex[1..]
        .iter()
        .flat_map(|v| v.iter().zip(&simplex[0]).map(|(a, b)| (a - b).abs()))
        .fold(0.0, f64::max)
}

/// `c + t (w - c)`, projected onto the unit box.
fn along(c: &[f64], w: &[f64], t: f64) -> Vec<f64> {
    c.iter()
        .zip(w)
        .map(|(ci, wi)| (ci + t * (wi - ci)).clamp(0.0, 1.0))
        .collect()
}

/// One Nelder-Mead iteration on an ordered simplex.
fn simplex_step<G: FnMut(&[f64]) -> f64>(simplex: &mut [Vec<f64>], values: &mut [f64], g: &mut G) {
    let n = simplex.len() - 1;
    let centroid: Vec<f64> = (0..n)
        .map(|i| simplex[..n].iter().map(|v| v[i]).sum::<f64>() / n as f64)
        .collect();
    let worst = simplex[n].clone();
    let reflected = along(&centroid, &worst, -1.0);
    let fr = g(&reflected);
    if fr < values[0] {
        let expanded = along(&centroid, &worst, -2.0);
        let fe = g(&expanded);
        (simplex[n], values[n]) = if fe < fr {
            (expanded, fe)
        } else {
            (reflected, fr)
        };
        return;
    }
    if fr < values[n - 1] {
        (simplex[n], values[n]) = (reflected, fr);
        return;
    }
    let (t, bar) = if fr < values[n] {
        (-0.5, fr)
    } else {
        (0.5, values[n])
    };
    let contracted = along(&centroid, &worst, t);
    let fc = g(&contracted);
    if fc < bar || (fc <= bar && fc.is_finite()) {
        (simplex[n], values[n]) = (contracted, fc);
        return;
    }
    let best = simplex[0].clone();
    for k in 1..=n {
        simplex[k] = along(&best, &simplex[k], 0.5);
        values[k] = g(&simplex[k]);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn golden_section_finds_a_parabola_minimum() {
        let m = golden_section(|x| (x - 1.3).powi(2) + 2.0, 0.0, 4.0, 1e-9);
        // Near a smooth minimum f changes by dx^2, so x is found only to about
        // sqrt(machine epsilon) * |x| (Numerical Recipes, sec. 10.1).
        assert!((m.x[0] - 1.3).abs() < 1e-7, "{m:?}");
        assert!((m.f - 2.0).abs() < 1e-12);
    }

    #[test]
    fn golden_section_stops_at_a_barrier() {
        // Decreasing towards x = 2, infeasible beyond: the optimum sits on the edge.
        let m = golden_section(|x| if x > 2.0 { f64::INFINITY } else { -x }, 0.0, 3.0, 1e-9);
        assert!((m.x[0] - 2.0).abs() < 1e-8, "{m:?}");
    }

    #[test]
    fn nelder_mead_finds_the_rosenbrock_valley_floor() {
        let rosen = |x: &[f64]| (1.0 - x[0]).powi(2) + 100.0 * (x[1] - x[0] * x[0]).powi(2);
        let m = nelder_mead(
            rosen,
            &[-1.0, 2.0],
            &[-2.0, -1.0],
            &[2.0, 3.0],
            Simplex::default(),
        )
        .unwrap();
        assert!(
            (m.x[0] - 1.0).abs() < 1e-4 && (m.x[1] - 1.0).abs() < 1e-4,
            "{m:?}"
        );
    }

    #[test]
    fn nelder_mead_respects_the_bounds() {
        // Unconstrained minimum at (3, -3) lies outside; the box optimum is (1, 0).
        let f = |x: &[f64]| (x[0] - 3.0).powi(2) + (x[1] + 3.0).powi(2);
        let m = nelder_mead(f, &[0.5, 0.5], &[0.0, 0.0], &[1.0, 1.0], Simplex::default()).unwrap();
        assert!((m.x[0] - 1.0).abs() < 1e-6 && m.x[1].abs() < 1e-6, "{m:?}");
    }

    #[test]
    fn nelder_mead_reports_no_finite_value() {
        let r = nelder_mead(
            |_| f64::INFINITY,
            &[0.5],
            &[0.0],
            &[1.0],
            Simplex::default(),
        );
        assert!(r.is_err());
    }
}
