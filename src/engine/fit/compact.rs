//! Levenberg-Marquardt for models with few parameters, on the normal equations.
//!
//! With a handful of parameters the work of a fit is in the model evaluations,
//! not in linear algebra, so this minimiser keeps everything small: one pass
//! over the points accumulates the normal matrix `J^T W^2 J` and the gradient
//! `J^T W^2 r` in stack arrays (the `n x p` Jacobian is never stored, nothing
//! is allocated per iteration), and each step solves the damped `p x p` system
//! `(A + lambda D) du = -b` by Cholesky factorisation.
//!
//! Method (Marquardt 1963; Moré 1978 for the scaling and tests; Nielsen 1999,
//! *Damping parameter in Marquardt's method*, IMM-REP-1999-05, for the damping
//! update; all from memory):
//!
//! * `D` is the largest diagonal of `A` seen so far (Marquardt's scaling, so
//!   the steps do not depend on the parameters' units);
//! * a step is accepted when the gain ratio `rho` (actual over predicted
//!   reduction of the sum of squares) exceeds 1e-4; then
//!   `lambda *= max(1/10, 1 - (2 rho - 1)^3)` (Nielsen has 1/3; a smaller
//!   floor lets a run of good steps reach Gauss-Newton sooner), otherwise
//!   `lambda = max(lambda nu, 0.01)`, `nu *= 2` (the floor is ours: the first
//!   damping is tiny, so a failed Gauss-Newton step needs a real cut);
//! * convergence as in MINPACK: relative reductions (actual and predicted)
//!   both below the tolerance, or a scaled step below the tolerance times the
//!   scaled parameters.
//!
//! Safeguards: a trial point where the model is not finite is rejected like a
//! step that increases the sum of squares; a damped system whose Cholesky
//! pivots fall below [`PIVOT_FLOOR`] of their diagonal (normal equations too
//! ill-conditioned to trust) and a run that does not converge are handed back
//! to the caller, which then runs the general QR-based minimiser from the start.

// Index loops over the small p x p arrays read like the formulas they code.
#![allow(clippy::needless_range_loop)]

use super::batch::widest_vectors;
use super::transform::Transform;
use super::{forward_gradient, least_sizes, FitOptions, Model};

/// Largest parameter count handled here.
pub(super) const MAX_PARAMS: usize = 6;

/// Smallest Cholesky pivot accepted, relative to its diagonal entry: below it
/// the scaled system has a condition number beyond about 1e12 and the normal
/// equations lose too many digits.
const PIVOT_FLOOR: f64 = 1e-12;

/// Acceptance threshold of the gain ratio (MINPACK's value).
const ACCEPT_RATIO: f64 = 1e-4;

/// Relative change of the sum of squares that is rounding noise: at the
/// minimum a step that changes the sum by no more than this is accepted when
/// the reduction tests are met, since the solved step locates the minimum
/// more precisely (to about eps) than comparing sums can (about sqrt(eps)).
const ROUNDING: f64 = 8.0 * f64::EPSILON;

/// Damping at the start, relative to the scaling `D`: small, so the first
/// step is nearly a Gauss-Newton step (good starts are the common case).
const INITIAL_DAMPING: f64 = 1e-6;

/// Least damping after a rejected step: a nearly Gauss-Newton step that
/// failed is retried much shorter at once, not after many doublings.
const REJECTED_DAMPING: f64 = 1e-2;

/// Smallest factor by which an accepted step cuts the damping.
const LEAST_DAMPING_CUT: f64 = 0.1;

/// Damping beyond which no step can make progress any more.
const MAX_DAMPING: f64 = 1e20;

type Vector = [f64; MAX_PARAMS];
type Matrix = [[f64; MAX_PARAMS]; MAX_PARAMS];

/// The minimiser's result at its converged point.
pub(super) struct Converged {
    /// Parameters (external, within their bounds).
    pub params: Vec<f64>,
    /// Model values at `params`.
    pub fitted: Vec<f64>,
    /// `J^T W^2 J` with respect to the external parameters, row-major `p x p`,
    /// from the analytic derivatives or, for other models, from the
    /// forward differences of the last iteration (MINPACK's Jacobian, which
    /// scipy's `curve_fit` uses for its covariance too).
    pub normal: Vec<f64>,
    /// Passes over the data that computed model values.
    pub evaluations: usize,
}

/// Why the minimiser stopped without a result.
#[derive(Debug, Clone, PartialEq)]
pub(super) enum Stop {
    /// The model has no finite value at the start, at this point.
    UndefinedAtStart(usize),
    /// Not converged, or the normal equations too ill-conditioned: let the
    /// general minimiser try.
    HandOver,
}

/// Sums over the data at one parameter point.
#[derive(Clone, Copy)]
struct Sums {
    /// `sum w^2 (f - y)^2`.
    chi2: f64,
    /// `sum w^2 g g^T`, external parameters (`g` the model's derivatives).
    matrix: Matrix,
    /// `sum w^2 g (f - y)`.
    gradient: Vector,
}

impl Sums {
    fn empty() -> Sums {
        Sums {
            chi2: 0.0,
            matrix: [[0.0; MAX_PARAMS]; MAX_PARAMS],
            gradient: [0.0; MAX_PARAMS],
        }
    }
}

/// Run `$f::<P>($args)` for the parameter count `$p` (1 to [`MAX_PARAMS`]), so
/// the loops over parameters have a length known at compile time.
macro_rules! for_count {
    ($p:expr, $f:ident($($arg:expr),*)) => {
        match $p {
            1 => $f::<1>($($arg),*),
            2 => $f::<2>($($arg),*),
            3 => $f::<3>($($arg),*),
            4 => $f::<4>($($arg),*),
            5 => $f::<5>($($arg),*),
            _ => $f::<6>($($arg),*),
        }
    };
}

/// The sums from model values `fitted` and weighted-in-place derivatives:
/// `rows(i)` gives point `i`'s derivatives (a derivative that is not finite
/// counts as zero); `Err(point)` at the first point whose residual is not
/// finite. Lower triangle accumulated, then mirrored.
fn accumulate<const P: usize>(
    y: &[f64],
    weights: &[f64],
    fitted: &[f64],
    mut rows: impl FnMut(usize, &mut [f64; P]),
) -> Result<Sums, usize> {
    let mut chi2 = 0.0;
    let mut matrix = [[0.0; P]; P];
    let mut gradient = [0.0; P];
    let mut g = [0.0; P];
    for (i, ((&f, &yi), &w)) in fitted.iter().zip(y).zip(weights).enumerate() {
        let wr = w * (f - yi);
        if !wr.is_finite() {
            return Err(i);
        }
        rows(i, &mut g);
        for gj in g.iter_mut() {
            let v = w * *gj;
            *gj = if v.is_finite() { v } else { 0.0 };
        }
        chi2 += wr * wr;
        for a in 0..P {
            gradient[a] += g[a] * wr;
            for b in 0..=a {
                matrix[a][b] += g[a] * g[b];
            }
        }
    }
    let mut sums = Sums::empty();
    sums.chi2 = chi2;
    for a in 0..P {
        sums.gradient[a] = gradient[a];
        for b in 0..=a {
            sums.matrix[a][b] = matrix[a][b];
            sums.matrix[b][a] = matrix[a][b];
        }
    }
    Ok(sums)
}

/// Points summed side by side in [`analytic_sums`]: independent partial
/// sums, one per lane, which the compiler keeps in vector registers.
const LANES: usize = 8;

/// Fewer points than this are summed one by one ([`accumulate`]): the lane
/// sums' fixed work (clearing, adding up and returning their rows) would
/// outweigh what the lanes save.
const SHORT: usize = 3 * LANES;

/// Partial sums kept per lane for `p` parameters: the sum of squares, the
/// gradient and the lower triangle of the normal matrix.
const fn rows_for(p: usize) -> usize {
    1 + p + p * (p + 1) / 2
}

/// One partial sum per row and lane (`R` rows: [`rows_for`]), in the order
/// of [`add_block`].
type LaneRows<const R: usize> = [[f64; LANES]; R];

/// The sums of an analytic model from its stored derivatives (by
/// parameter, `P x n`: see [`Model::values_and_gradients`]), as
/// [`accumulate`] gives them (to rounding: the points are summed in
/// [`LANES`] interleaved partial sums, added at the end in a fixed order, so
/// the result does not depend on the instruction set); fewer than [`SHORT`]
/// points by [`accumulate`] itself.
///
/// The first pass does not test each derivative for a finite value: one that
/// is not finite makes its diagonal sum of squares not finite (a square is
/// never negative, and no sum with an infinity or NaN is finite), and only
/// then are the sums made again with such derivatives counted as zero; with
/// every derivative finite both passes give the same bits. `Err(point)` at
/// the first point whose residual is not finite (looked for only when the
/// sum of squares is not finite).
fn analytic_sums<const P: usize, const R: usize>(
    y: &[f64],
    weights: &[f64],
    fitted: &[f64],
    gradients: &[f64],
) -> Result<Sums, usize> {
    if y.len() < SHORT {
        let n = y.len();
        return accumulate::<P>(y, weights, fitted, |i, g| {
            for (j, gj) in g.iter_mut().enumerate() {
                *gj = gradients[j * n + i];
            }
        });
    }
    let sums = lane_totals::<P, R>(&unchecked_rows::<P, R>(y, weights, fitted, gradients));
    if !sums.chi2.is_finite() {
        let bad = (0..y.len()).find(|&i| !(weights[i] * (fitted[i] - y[i])).is_finite());
        if let Some(i) = bad {
            return Err(i);
        }
    }
    if (0..P).all(|j| sums.matrix[j][j].is_finite()) {
        return Ok(sums);
    }
    Ok(lane_totals::<P, R>(&checked_rows::<P, R>(
        y, weights, fitted, gradients,
    )))
}

widest_vectors! {
    /// The lane sums of [`analytic_sums`], every derivative taken as it is;
    /// compiled for AVX2 and AVX-512 as well (see [`widest_vectors`]).
    fn unchecked_rows[const P: usize, const R: usize](
        y: &[f64],
        weights: &[f64],
        fitted: &[f64],
        gradients: &[f64],
    ) -> LaneRows<R> => lane_rows_unchecked::<P, R>;
}

widest_vectors! {
    /// The lane sums of [`analytic_sums`], a derivative that is not finite
    /// counted as zero; compiled for AVX2 and AVX-512 as well.
    fn checked_rows[const P: usize, const R: usize](
        y: &[f64],
        weights: &[f64],
        fitted: &[f64],
        gradients: &[f64],
    ) -> LaneRows<R> => lane_rows_checked::<P, R>;
}

#[inline(always)]
fn lane_rows_unchecked<const P: usize, const R: usize>(
    y: &[f64],
    weights: &[f64],
    fitted: &[f64],
    gradients: &[f64],
) -> LaneRows<R> {
    lane_rows::<P, R, false>(y, weights, fitted, gradients)
}

#[inline(always)]
fn lane_rows_checked<const P: usize, const R: usize>(
    y: &[f64],
    weights: &[f64],
    fitted: &[f64],
    gradients: &[f64],
) -> LaneRows<R> {
    lane_rows::<P, R, true>(y, weights, fitted, gradients)
}

/// The partial sums of every lane; with `ZERO_BAD`, a weighted derivative
/// that is not finite counts as zero. The last points (fewer than
/// [`LANES`]) make one more block, padded with points of weight, value and
/// derivatives zero, which add nothing. (The lane sums stay in one array
/// that is only ever read or written a whole row at a time, and are added
/// up by the caller: so the compiler keeps each row in a vector register.)
#[inline(always)]
fn lane_rows<const P: usize, const R: usize, const ZERO_BAD: bool>(
    y: &[f64],
    weights: &[f64],
    fitted: &[f64],
    gradients: &[f64],
) -> LaneRows<R> {
    const { assert!(R == rows_for(P)) };
    let n = y.len();
    let columns: [&[f64]; P] = std::array::from_fn(|j| &gradients[j * n..(j + 1) * n]);
    let mut rows = [[0.0; LANES]; R];
    let whole = n - n % LANES;
    let blocks = y[..whole]
        .chunks_exact(LANES)
        .zip(weights[..whole].chunks_exact(LANES))
        .zip(fitted[..whole].chunks_exact(LANES))
        .enumerate();
    for (block, ((y, w), f)) in blocks {
        let start = block * LANES;
        let d: [&[f64]; P] = std::array::from_fn(|j| &columns[j][start..start + LANES]);
        add_block::<P, R, ZERO_BAD>(&mut rows, y, w, f, d);
    }
    if whole < n {
        let pad = |v: &[f64]| {
            let mut b = [0.0; LANES];
            b[..n - whole].copy_from_slice(&v[whole..]);
            b
        };
        let (y, w, f) = (pad(y), pad(weights), pad(fitted));
        let d: [[f64; LANES]; P] = std::array::from_fn(|j| pad(columns[j]));
        let d: [&[f64]; P] = std::array::from_fn(|j| &d[j][..]);
        add_block::<P, R, ZERO_BAD>(&mut rows, &y, &w, &f, d);
    }
    rows
}

/// Add one block of [`LANES`] points to the partial sums: row 0 the sum of
/// squares, then for each parameter `a` its gradient and the normal matrix
/// entries `(a, b)`, `b <= a`.
#[inline(always)]
fn add_block<const P: usize, const R: usize, const ZERO_BAD: bool>(
    rows: &mut LaneRows<R>,
    y: &[f64],
    w: &[f64],
    f: &[f64],
    d: [&[f64]; P],
) {
    let keep = |v: f64| if ZERO_BAD && !v.is_finite() { 0.0 } else { v };
    let (y, w, f) = (&y[..LANES], &w[..LANES], &f[..LANES]);
    let mut wr = [0.0; LANES];
    for lane in 0..LANES {
        wr[lane] = w[lane] * (f[lane] - y[lane]);
    }
    let mut g = [[0.0; LANES]; P];
    for j in 0..P {
        let dj = &d[j][..LANES];
        for lane in 0..LANES {
            g[j][lane] = keep(w[lane] * dj[lane]);
        }
    }
    for lane in 0..LANES {
        rows[0][lane] += wr[lane] * wr[lane];
    }
    let mut k = 1;
    for a in 0..P {
        for lane in 0..LANES {
            rows[k][lane] += g[a][lane] * wr[lane];
        }
        k += 1;
        for b in 0..=a {
            for lane in 0..LANES {
                rows[k][lane] += g[a][lane] * g[b][lane];
            }
            k += 1;
        }
    }
}

/// The sums from the partial sums of the lanes, added in a fixed order.
fn lane_totals<const P: usize, const R: usize>(rows: &LaneRows<R>) -> Sums {
    let total =
        |l: &[f64; LANES]| ((l[0] + l[1]) + (l[2] + l[3])) + ((l[4] + l[5]) + (l[6] + l[7]));
    let mut sums = Sums::empty();
    sums.chi2 = total(&rows[0]);
    let mut k = 1;
    for a in 0..P {
        sums.gradient[a] = total(&rows[k]);
        k += 1;
        for b in 0..=a {
            sums.matrix[a][b] = total(&rows[k]);
            sums.matrix[b][a] = sums.matrix[a][b];
            k += 1;
        }
    }
    sums
}

/// The sums of a finite-difference model at `x`, whose values are `fitted`.
fn difference_sums<const P: usize>(
    model: &dyn Model,
    y: &[f64],
    weights: &[f64],
    fitted: &[f64],
    x: &[f64],
    least: &[f64],
) -> Result<Sums, usize> {
    let mut probe = [0.0; P];
    probe.copy_from_slice(x);
    accumulate::<P>(y, weights, fitted, |i, g| {
        forward_gradient(model, &mut probe, least, i, fitted[i], g);
    })
}

/// The data and model of one fit.
struct Data<'a> {
    model: &'a dyn Model,
    y: &'a [f64],
    weights: &'a [f64],
    analytic: bool,
    p: usize,
    /// Least size of each parameter for difference steps.
    least: Vec<f64>,
}

impl Data<'_> {
    /// Values (into `fitted`) and, for analytic models, the full sums at `x`
    /// (derivatives stored in `gradients`, `p x n`); `Err(point)` at the first
    /// point where the model is not finite.
    fn evaluate(
        &self,
        x: &[f64],
        fitted: &mut [f64],
        gradients: &mut [f64],
    ) -> Result<Sums, usize> {
        if self.analytic {
            if !self.model.values_and_gradients(x, fitted, gradients) {
                return Err(0);
            }
            let (y, w) = (self.y, self.weights);
            return match self.p {
                1 => analytic_sums::<1, { rows_for(1) }>(y, w, fitted, gradients),
                2 => analytic_sums::<2, { rows_for(2) }>(y, w, fitted, gradients),
                3 => analytic_sums::<3, { rows_for(3) }>(y, w, fitted, gradients),
                4 => analytic_sums::<4, { rows_for(4) }>(y, w, fitted, gradients),
                5 => analytic_sums::<5, { rows_for(5) }>(y, w, fitted, gradients),
                _ => analytic_sums::<6, { rows_for(6) }>(y, w, fitted, gradients),
            };
        }
        let mut chi2 = 0.0;
        for (i, f) in fitted.iter_mut().enumerate() {
            *f = self.model.value(x, i);
            let wr = self.weights[i] * (*f - self.y[i]);
            if !wr.is_finite() {
                return Err(i);
            }
            chi2 += wr * wr;
        }
        let mut sums = Sums::empty();
        sums.chi2 = chi2;
        Ok(sums)
    }

    /// For finite-difference models: the sums with forward-difference
    /// derivatives at `x`, whose model values are `fitted`.
    fn differences(&self, x: &[f64], fitted: &[f64], chi2: f64) -> Sums {
        let sums = for_count!(
            self.p,
            difference_sums(self.model, self.y, self.weights, fitted, x, &self.least)
        );
        // The values were finite when `chi2` was summed, so every residual is.
        let mut sums = sums.unwrap_or_else(|_| Sums::empty());
        sums.chi2 = chi2;
        sums
    }

    /// Evaluate at `x`, with the derivatives for either kind of model.
    fn full(&self, x: &[f64], fitted: &mut [f64], gradients: &mut [f64]) -> Result<Sums, usize> {
        let sums = self.evaluate(x, fitted, gradients)?;
        Ok(if self.analytic {
            sums
        } else {
            self.differences(x, fitted, sums.chi2)
        })
    }
}

/// The iterate: internal variables, parameters and the sums there.
struct Point {
    u: Vector,
    x: Vector,
    sums: Sums,
}

/// Minimise the weighted sum of squares from `start` (at most
/// [`MAX_PARAMS`] parameters, already checked by the caller).
pub(super) fn minimise(
    model: &dyn Model,
    y: &[f64],
    weights: &[f64],
    maps: &[Transform],
    start: &[f64],
    options: &FitOptions,
) -> Result<Converged, Stop> {
    let p = start.len();
    let mut probe = [0.0; MAX_PARAMS];
    let data = Data {
        model,
        y,
        weights,
        analytic: model
            .value_and_gradient(start, 0, &mut probe[..p])
            .is_some(),
        p,
        least: least_sizes(start),
    };
    let mut fitted = vec![0.0; y.len()];
    let mut trial_fitted = vec![0.0; y.len()];
    let mut gradients = vec![0.0; if data.analytic { y.len() * p } else { 0 }];
    let mut point = start_point(&data, maps, start, &mut fitted, &mut gradients)?;
    let max_evaluations = options.patience.max(1) * (p + 1);
    let tolerance = options.tolerance;
    let mut evaluations = 1;
    let mut scale = [0.0; MAX_PARAMS];
    let (mut damping, mut growth) = (INITIAL_DAMPING, 2.0);
    loop {
        let (a, b) = internal_system(&point, maps, p);
        update_scale(&mut scale, &a, p);
        if point.sums.chi2 == 0.0 || b[..p].iter().all(|v| *v == 0.0) {
            break;
        }
        if at_minimum(&a, &b, &scale, &point.u, tolerance, point.sums.chi2, p) {
            break;
        }
        if evaluations >= max_evaluations || damping > MAX_DAMPING {
            return Err(Stop::HandOver);
        }
        let step = damped_step(&a, &b, &scale, damping, p).ok_or(Stop::HandOver)?;
        let predicted = predicted_reduction(&a, &scale, &step, damping, p);
        let trial = trial_point(&point, &step, maps, p);
        evaluations += 1;
        let sums = data.evaluate(&trial.x[..p], &mut trial_fitted, &mut gradients);
        let actual = sums.map_or(f64::NEG_INFINITY, |s| point.sums.chi2 - s.chi2);
        let rho = actual / predicted;
        let step_small =
            scaled_norm(&step, &scale, p) <= tolerance * scaled_norm(&point.u, &scale, p);
        let reduction_small = actual.abs() <= tolerance * point.sums.chi2
            && predicted <= tolerance * point.sums.chi2
            && rho <= 2.0;
        let within_noise = reduction_small && actual >= -ROUNDING * point.sums.chi2;
        if rho > ACCEPT_RATIO || within_noise {
            if let Ok(s) = sums {
                point = Point {
                    sums: if data.analytic {
                        s
                    } else {
                        data.differences(&trial.x[..p], &trial_fitted, s.chi2)
                    },
                    ..trial
                };
                std::mem::swap(&mut fitted, &mut trial_fitted);
            }
            damping *= (1.0 - (2.0 * rho - 1.0).powi(3)).max(LEAST_DAMPING_CUT);
            growth = 2.0;
        } else {
            damping = (damping * growth).max(REJECTED_DAMPING);
            growth *= 2.0;
        }
        if step_small || reduction_small {
            break;
        }
    }
    Ok(Converged {
        params: point.x[..p].to_vec(),
        fitted,
        normal: row_major(&point.sums.matrix, p),
        evaluations,
    })
}

/// Whether the point is the minimum to within the tolerance, judged by the
/// undamped (Gauss-Newton) step from it: that step is shorter than the
/// tolerance times the parameters (scaled norm) and would reduce the sum of
/// squares `chi2` by no more than the tolerance times itself. Then the step
/// need not be tried, which saves a pass over the data (and for
/// finite-difference models a Jacobian). The Gauss-Newton reduction
/// `-b^T A^-1 b` bounds what any damped step predicts; a system too
/// ill-conditioned to solve says nothing.
fn at_minimum(
    a: &Matrix,
    b: &Vector,
    scale: &Vector,
    u: &Vector,
    tolerance: f64,
    chi2: f64,
    p: usize,
) -> bool {
    damped_step(a, b, scale, 0.0, p).is_some_and(|step| {
        predicted_reduction(a, scale, &step, 0.0, p) <= tolerance * chi2
            && scaled_norm(&step, scale, p) <= tolerance * scaled_norm(u, scale, p)
    })
}

/// The first iterate, at the start values.
fn start_point(
    data: &Data,
    maps: &[Transform],
    start: &[f64],
    fitted: &mut [f64],
    gradients: &mut [f64],
) -> Result<Point, Stop> {
    let mut u = [0.0; MAX_PARAMS];
    let mut x = [0.0; MAX_PARAMS];
    for (j, (m, &x0)) in maps.iter().zip(start).enumerate() {
        u[j] = m.internal(x0);
        x[j] = m.external(u[j]);
    }
    let sums = data
        .full(&x[..data.p], fitted, gradients)
        .map_err(Stop::UndefinedAtStart)?;
    Ok(Point { u, x, sums })
}

/// Normal matrix and gradient in the internal variables: the external ones
/// scaled by the slopes `dx/du`.
fn internal_system(point: &Point, maps: &[Transform], p: usize) -> (Matrix, Vector) {
    let mut slopes = [0.0; MAX_PARAMS];
    for (j, m) in maps.iter().enumerate() {
        slopes[j] = m.slope(point.u[j]);
    }
    let mut a = [[0.0; MAX_PARAMS]; MAX_PARAMS];
    let mut b = [0.0; MAX_PARAMS];
    for i in 0..p {
        b[i] = slopes[i] * point.sums.gradient[i];
        for j in 0..p {
            a[i][j] = slopes[i] * slopes[j] * point.sums.matrix[i][j];
        }
    }
    (a, b)
}

/// Marquardt's scaling: the largest diagonal seen so far (one where it is zero).
fn update_scale(scale: &mut Vector, a: &Matrix, p: usize) {
    for j in 0..p {
        scale[j] = scale[j].max(a[j][j]);
        if !(scale[j] > 0.0 && scale[j].is_finite()) {
            scale[j] = 1.0;
        }
    }
}

/// Solve `(A + damping D) step = -b` on the system scaled to unit `D`;
/// `None` when it is too ill-conditioned for the normal equations.
fn damped_step(a: &Matrix, b: &Vector, scale: &Vector, damping: f64, p: usize) -> Option<Vector> {
    let mut d = [0.0; MAX_PARAMS];
    for j in 0..p {
        d[j] = scale[j].sqrt();
    }
    let mut m = [[0.0; MAX_PARAMS]; MAX_PARAMS];
    let mut rhs = [0.0; MAX_PARAMS];
    for i in 0..p {
        rhs[i] = -b[i] / d[i];
        for j in 0..p {
            m[i][j] = a[i][j] / (d[i] * d[j]);
        }
        m[i][i] += damping;
    }
    let z = cholesky_solve(&m, &rhs, p)?;
    let mut step = [0.0; MAX_PARAMS];
    for j in 0..p {
        step[j] = z[j] / d[j];
    }
    step[..p].iter().all(|s| s.is_finite()).then_some(step)
}

/// Reduction of the sum of squares the linear model predicts for `step`:
/// `step^T A step + 2 damping step^T D step` (positive).
fn predicted_reduction(a: &Matrix, scale: &Vector, step: &Vector, damping: f64, p: usize) -> f64 {
    let mut total = 0.0;
    for i in 0..p {
        let row: f64 = (0..p).map(|j| a[i][j] * step[j]).sum();
        total += step[i] * row + 2.0 * damping * scale[i] * step[i] * step[i];
    }
    total
}

/// The point one step away (its sums are filled in when it is accepted).
fn trial_point(point: &Point, step: &Vector, maps: &[Transform], p: usize) -> Point {
    let mut u = point.u;
    let mut x = point.x;
    for j in 0..p {
        u[j] += step[j];
        x[j] = maps[j].external(u[j]);
    }
    Point {
        u,
        x,
        sums: point.sums,
    }
}

/// `|| D^(1/2) v ||`.
fn scaled_norm(v: &Vector, scale: &Vector, p: usize) -> f64 {
    (0..p).map(|j| scale[j] * v[j] * v[j]).sum::<f64>().sqrt()
}

/// Solve `M z = r` for symmetric positive definite `M` by Cholesky
/// factorisation; `None` when a pivot falls below [`PIVOT_FLOOR`] of its
/// diagonal entry.
fn cholesky_solve(m: &Matrix, r: &Vector, p: usize) -> Option<Vector> {
    let mut l = [[0.0; MAX_PARAMS]; MAX_PARAMS];
    for j in 0..p {
        let pivot = m[j][j] - (0..j).map(|k| l[j][k] * l[j][k]).sum::<f64>();
        if pivot.is_nan() || pivot <= PIVOT_FLOOR * m[j][j] {
            return None;
        }
        l[j][j] = pivot.sqrt();
        for i in j + 1..p {
            let s = m[i][j] - (0..j).map(|k| l[i][k] * l[j][k]).sum::<f64>();
            l[i][j] = s / l[j][j];
        }
    }
    let mut z = [0.0; MAX_PARAMS];
    for i in 0..p {
        z[i] = (r[i] - (0..i).map(|k| l[i][k] * z[k]).sum::<f64>()) / l[i][i];
    }
    for i in (0..p).rev() {
        z[i] = (z[i] - (i + 1..p).map(|k| l[k][i] * z[k]).sum::<f64>()) / l[i][i];
    }
    Some(z)
}

fn row_major(m: &Matrix, p: usize) -> Vec<f64> {
    (0..p * p).map(|k| m[k / p][k % p]).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cholesky_solves_a_small_system() {
        let mut m = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        m[0][0] = 4.0;
        m[0][1] = 2.0;
        m[1][0] = 2.0;
        m[1][1] = 3.0;
        let mut r = [0.0; MAX_PARAMS];
        r[0] = 2.0;
        r[1] = 1.0;
        // 4 z0 + 2 z1 = 2, 2 z0 + 3 z1 = 1  =>  z = (0.5, 0).
        let z = cholesky_solve(&m, &r, 2).unwrap();
        assert!((z[0] - 0.5).abs() < 1e-15 && z[1].abs() < 1e-15);
    }

    #[test]
    fn cholesky_refuses_a_singular_system() {
        let mut m = [[0.0; MAX_PARAMS]; MAX_PARAMS];
        for row in m.iter_mut().take(2) {
            row[0] = 1.0;
            row[1] = 1.0;
        }
        assert!(cholesky_solve(&m, &[1.0; MAX_PARAMS], 2).is_none());
    }

    /// Invented data: `n` points, weights and derivatives (by parameter,
    /// `3 x n`) of mixed sizes, one derivative (at point `n / 3`) not finite
    /// (counts as 0).
    fn sample_data(n: usize) -> (Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
        let y: Vec<f64> = (0..n).map(|i| (0.37 * i as f64).sin()).collect();
        let w: Vec<f64> = (0..n).map(|i| 1.0 + 0.01 * i as f64).collect();
        let f: Vec<f64> = (0..n)
            .map(|i| (0.37 * i as f64).sin() + 1e-3 * (i as f64).cos())
            .collect();
        let mut d: Vec<f64> = (0..3 * n)
            .map(|k| (0.11 * k as f64).cos() * 10f64.powi((k % 5) as i32 - 2))
            .collect();
        d[n + n / 3] = f64::INFINITY;
        (y, w, f, d)
    }

    /// 203 points: not a multiple of the lanes.
    fn sample_sums_data() -> (Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
        sample_data(203)
    }

    /// The point-by-point sums of the sample, derivative `j` of point `i`
    /// at `d[j * n + i]`.
    fn plain_sums(y: &[f64], w: &[f64], f: &[f64], d: &[f64]) -> Result<Sums, usize> {
        let n = y.len();
        accumulate::<3>(y, w, f, |i, g| {
            for (j, gj) in g.iter_mut().enumerate() {
                *gj = d[j * n + i];
            }
        })
    }

    /// The lane sums against the point-by-point sums (to rounding), and the
    /// processor's widest variant against the portable one bit for bit; with
    /// a derivative that is not finite (the sums made again with it counted
    /// as zero) and without (the first sums kept). Fewer than [`SHORT`]
    /// points are summed point by point.
    #[test]
    fn lane_sums_match_point_by_point_sums() {
        // Whole blocks and a short one, whole blocks only, a short one only.
        for (n, bad) in [203, 200, 5]
            .into_iter()
            .flat_map(|n| [(n, true), (n, false)])
        {
            let (y, w, f, mut d) = sample_data(n);
            if !bad {
                d[n + n / 3] = 0.25;
            }
            let plain = plain_sums(&y, &w, &f, &d).unwrap();
            let (widest, portable) = if bad {
                (
                    checked_rows::<3, 10>(&y, &w, &f, &d),
                    lane_rows::<3, 10, true>(&y, &w, &f, &d),
                )
            } else {
                (
                    unchecked_rows::<3, 10>(&y, &w, &f, &d),
                    lane_rows::<3, 10, false>(&y, &w, &f, &d),
                )
            };
            let lanes = lane_totals::<3, 10>(&widest);
            let portable = lane_totals::<3, 10>(&portable);
            let chosen = analytic_sums::<3, 10>(&y, &w, &f, &d).unwrap();
            let expected = if n < SHORT { &plain } else { &lanes };
            let close = |a: f64, b: f64| (a - b).abs() <= 1e-13 * b.abs().max(1e-300);
            let same = |a: f64, b: f64| a.to_bits() == b.to_bits();
            assert!(close(lanes.chi2, plain.chi2), "{n}");
            assert!(same(lanes.chi2, portable.chi2) && same(chosen.chi2, expected.chi2));
            for a in 0..3 {
                assert!(
                    close(lanes.gradient[a], plain.gradient[a]),
                    "{n}: gradient {a}"
                );
                assert!(same(lanes.gradient[a], portable.gradient[a]));
                assert!(same(chosen.gradient[a], expected.gradient[a]));
                for b in 0..3 {
                    let (l, p) = (lanes.matrix[a][b], plain.matrix[a][b]);
                    assert!(close(l, p), "{n}: matrix {a} {b}");
                    assert!(same(l, portable.matrix[a][b]));
                    assert!(same(chosen.matrix[a][b], expected.matrix[a][b]));
                }
            }
        }
    }

    /// With every derivative finite, the sums that test each derivative
    /// give the same bits as the first sums, which do not (both the
    /// processor's widest variant and the portable one).
    #[test]
    fn unchecked_sums_equal_checked_sums_when_all_finite() {
        let (y, w, f, mut d) = sample_sums_data();
        d[y.len() + y.len() / 3] = -3.5;
        let pairs = [
            (
                unchecked_rows::<3, 10>(&y, &w, &f, &d),
                checked_rows::<3, 10>(&y, &w, &f, &d),
            ),
            (
                lane_rows::<3, 10, false>(&y, &w, &f, &d),
                lane_rows::<3, 10, true>(&y, &w, &f, &d),
            ),
        ];
        for (fast, checked) in pairs {
            for (a, b) in fast.iter().flatten().zip(checked.iter().flatten()) {
                assert_eq!(a.to_bits(), b.to_bits());
            }
        }
    }

    /// A residual that is not finite is reported at its point, as the
    /// point-by-point sums do.
    #[test]
    fn lane_sums_name_the_first_bad_point() {
        let (y, w, mut f, d) = sample_sums_data();
        f[150] = f64::NAN;
        f[201] = f64::INFINITY;
        assert_eq!(analytic_sums::<3, 10>(&y, &w, &f, &d).err(), Some(150));
        assert_eq!(plain_sums(&y, &w, &f, &d).err(), Some(150));
    }
}
