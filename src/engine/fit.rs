//! Nonlinear least squares: fit a model's parameters to measured data.
//!
//! Up to 6 parameters the minimiser is a compact
//! Levenberg-Marquardt on the normal equations (module `compact`: one pass over the
//! points per evaluation, stack arrays, Cholesky); it hands over to the general
//! minimiser when the normal equations are too ill-conditioned or it does not
//! converge. The general minimiser is the Levenberg-Marquardt trust-region
//! method of the `levenberg-marquardt` crate (a Rust port of MINPACK's LMDER,
//! Moré 1978), on the QR factors of the stored Jacobian.
//! Neither has parameter bounds, so bounds are handled by a smooth change
//! of variables (the transformation used by MINUIT, James & Roos 1975): the
//! minimiser works on unbounded internal variables `u` and every model call sees
//! `x(u)`, which can never leave its bounds.
//!
//! * `[lo, hi]`: `x = lo + (hi - lo) (1 + sin u) / 2`
//! * `[lo, inf)`: `x = lo + s (sqrt(u^2 + 1) - 1)`, with `s` the start's distance
//!   from the bound so that `u` is of order one
//! * `(-inf, hi]`: the mirror image
//! * `(-inf, inf)`: `x = u`
//!
//! Why a transformation and not projection (clipping): clipping makes the
//! residuals flat outside the box and misleads the trust-region model; the
//! transformation keeps the problem smooth and unconstrained. Standard errors
//! are computed afterwards from the Jacobian with respect to the real
//! parameters `x` (not `u`), so they do not depend on the transformation.
//! A parameter that ends on its bound is flagged; its standard error then means
//! little.
//!
//! Statistics follow common practice for unweighted (or sigma-weighted) least
//! squares (Bates & Watts 1988, *Nonlinear Regression Analysis*, ch. 2):
//! covariance `s^2 (J^T J)^-1` with `s^2 = SSE / (n - p)` (the same scaling as
//! scipy's `curve_fit` with `absolute_sigma=False`), 95 % confidence intervals
//! from Student's t with `n - p` degrees of freedom, `R^2 = 1 - SSE/SST`,
//! `RMSE = sqrt(SSE/n)`, mean relative deviation `P = 100/n sum |y - f| / |y|`,
//! and the least-squares forms of the information criteria
//! `AIC = n ln(SSE/n) + 2p`, `BIC = n ln(SSE/n) + p ln n` (Burnham & Anderson
//! 2002, *Model Selection and Multimodel Inference*, sec. 2.2).

use std::fmt;

pub(crate) mod batch;
mod compact;
mod residual_sums;
mod symmetric;
mod transform;

use transform::Transform;

use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt, TerminationReason};
use nalgebra::storage::Owned;
use nalgebra::{DMatrix, DVector, Dyn};

/// A model evaluated at the data points, for the general entry point [`fit`].
///
/// Implement this when a model has several inputs per point or analytic
/// derivatives; the closures taken by [`least_squares`] and
/// [`least_squares_rows`] are wrapped in it.
pub trait Model {
    /// Model value at data point `point` for parameters `params`.
    fn value(&self, params: &[f64], point: usize) -> f64;

    /// Analytic derivatives of the value with respect to each parameter, written
    /// into `out`; return `false` (the default) to let the fitter use finite
    /// differences.
    fn gradient(&self, _params: &[f64], _point: usize, _out: &mut [f64]) -> bool {
        false
    }

    /// Value and analytic derivatives in one call, for models whose
    /// derivatives share work with the value (exponentials, powers); `None`
    /// (the default: built from [`Model::gradient`]) when there are none.
    /// With derivatives, the fitter computes residuals and Jacobian in one pass.
    fn value_and_gradient(&self, params: &[f64], point: usize, out: &mut [f64]) -> Option<f64> {
        self.gradient(params, point, out)
            .then(|| self.value(params, point))
    }

    /// Values at every point (into `values`) and analytic derivatives
    /// (into `gradients`, by parameter: the derivative in parameter `j` at
    /// point `i` is `gradients[j * n + i]`, so each derivative's values lie
    /// side by side as the vectorised sums read them) in one call; `false`
    /// when the model has no derivatives. The default calls
    /// [`Model::value_and_gradient`] point by point; a model can do better by
    /// choosing its formula once and running one tight loop over the points.
    fn values_and_gradients(
        &self,
        params: &[f64],
        values: &mut [f64],
        gradients: &mut [f64],
    ) -> bool {
        point_by_point(self, params, values, gradients)
    }
}

/// [`Model::values_and_gradients`] by one [`Model::value_and_gradient`] call
/// per point: the default, and the fallback of models that loop faster only
/// for some of their forms. `false` also when `gradients` is too short.
pub fn point_by_point<M: Model + ?Sized>(
    model: &M,
    params: &[f64],
    values: &mut [f64],
    gradients: &mut [f64],
) -> bool {
    let (n, p) = (values.len(), params.len());
    if gradients.len() < n * p {
        return false;
    }
    match p {
        1 => by_points::<M, 1>(model, params, values, gradients),
        2 => by_points::<M, 2>(model, params, values, gradients),
        3 => by_points::<M, 3>(model, params, values, gradients),
        4 => by_points::<M, 4>(model, params, values, gradients),
        5 => by_points::<M, 5>(model, params, values, gradients),
        6 => by_points::<M, 6>(model, params, values, gradients),
        _ => {
            let mut g = vec![0.0; p];
            for (i, v) in values.iter_mut().enumerate() {
                match model.value_and_gradient(params, i, &mut g) {
                    Some(f) => *v = f,
                    None => return false,
                }
                for (j, &gj) in g.iter().enumerate() {
                    gradients[j * n + i] = gj;
                }
            }
            true
        }
    }
}

/// [`point_by_point`] for `P` parameters: each point's derivatives on the
/// stack, then into their columns.
fn by_points<M: Model + ?Sized, const P: usize>(
    model: &M,
    params: &[f64],
    values: &mut [f64],
    gradients: &mut [f64],
) -> bool {
    let n = values.len();
    let mut columns = gradients.chunks_exact_mut(n.max(1));
    let mut columns: [&mut [f64]; P] = std::array::from_fn(|_| columns.next().unwrap_or_default());
    let mut g = [0.0; P];
    for (i, v) in values.iter_mut().enumerate() {
        match model.value_and_gradient(params, i, &mut g) {
            Some(f) => *v = f,
            None => return false,
        }
        for (column, &gj) in columns.iter_mut().zip(&g) {
            column[i] = gj;
        }
    }
    true
}

/// Options for [`fit`].
#[derive(Clone, Debug)]
pub struct FitOptions {
    /// Standard deviation of each measurement (same units as `y`); `None`
    /// weights all points equally.
    pub sigma: Option<Vec<f64>>,
    /// Relative tolerance on the sum of squares and on the parameters.
    pub tolerance: f64,
    /// Model evaluations allowed, per parameter plus one, before giving up.
    pub patience: usize,
}

impl Default for FitOptions {
    fn default() -> FitOptions {
        FitOptions {
            sigma: None,
            tolerance: 1e-10,
            patience: 200,
        }
    }
}

/// The outcome of a converged fit, with its statistics.
#[derive(Clone, Debug, PartialEq)]
pub struct FitResult {
    /// Best-fit parameters, in the order of `start`.
    pub params: Vec<f64>,
    /// Standard error of each parameter (square root of the covariance diagonal).
    pub std_errors: Vec<f64>,
    /// 95 % confidence interval of each parameter, `(low, high)`, Student's t.
    pub ci95: Vec<(f64, f64)>,
    /// Parameter covariance matrix, row-major `p x p`.
    pub covariance: Vec<f64>,
    /// Two-sided 97.5 % quantile of Student's t used for the intervals.
    pub t_value: f64,
    /// Number of data points `n`.
    pub points: usize,
    /// Degrees of freedom `n - p`.
    pub dof: usize,
    /// Sum of squared residuals (unweighted).
    pub sse: f64,
    /// Coefficient of determination `1 - SSE/SST`.
    pub r_squared: f64,
    /// Root-mean-square error `sqrt(SSE/n)`, in units of `y`.
    pub rmse: f64,
    /// Mean relative deviation `P` in percent; `None` when some `y` is zero.
    pub mean_relative_deviation_percent: Option<f64>,
    /// Weighted sum of squares divided by the degrees of freedom.
    pub reduced_chi_square: f64,
    /// Akaike information criterion, least-squares form `n ln(SSE/n) + 2p`.
    pub aic: f64,
    /// Bayesian information criterion `n ln(SSE/n) + p ln n`.
    pub bic: f64,
    /// Model value at each point.
    pub fitted: Vec<f64>,
    /// Residual at each point, observed minus fitted.
    pub residuals: Vec<f64>,
    /// For each parameter, whether it ended on one of its bounds.
    pub at_bound: Vec<bool>,
    /// Model evaluations used by the minimiser (residual vectors).
    pub evaluations: usize,
}

/// Why a fit failed. Each message names the problem and gives advice.
#[derive(Clone, Debug, PartialEq)]
pub enum FitError {
    /// `x` and `y` (or `sigma`) differ in length.
    LengthMismatch {
        what: &'static str,
        expected: usize,
        found: usize,
    },
    /// Too few points: at least one more than the parameters is needed.
    TooFewPoints { points: usize, params: usize },
    /// `start` and `bounds` differ in length, or there are no parameters.
    BadParameterCount { start: usize, bounds: usize },
    /// A bound pair is not `lo < hi`, or is NaN.
    BadBounds { index: usize, lo: f64, hi: f64 },
    /// A start value is outside its bounds or not finite.
    BadStart {
        index: usize,
        value: f64,
        lo: f64,
        hi: f64,
    },
    /// A data value is not finite (or a sigma is not positive).
    BadData {
        what: &'static str,
        point: usize,
        value: f64,
    },
    /// The model is not finite at the start values.
    ModelUndefined { point: usize },
    /// The minimiser stopped without meeting its convergence tests.
    NotConverged { reason: String, evaluations: usize },
    /// The parameters cannot be told apart from these data.
    NotIdentifiable,
    /// A parameter ran off to a value the data do not determine: its standard
    /// error exceeds [`UNDETERMINED_RATIO`] times its size.
    Undetermined {
        index: usize,
        value: f64,
        std_error: f64,
    },
}

/// Relative standard error above which a parameter counts as not determined
/// by the data (it has drifted to where the sum of squares is flat).
pub const UNDETERMINED_RATIO: f64 = 1e4;

impl fmt::Display for FitError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FitError::LengthMismatch { what, expected, found } => {
                write!(f, "{what} has {found} values but the data have {expected} points")
            }
            FitError::TooFewPoints { points, params } => write!(
                f,
                "{points} data points cannot fit {params} parameters: at least {} points are needed \
                 (one more than the parameters, to estimate the scatter); measure more points or use a model with fewer parameters",
                params + 1
            ),
            FitError::BadParameterCount { start, bounds } => write!(
                f,
                "{start} start values and {bounds} bound pairs were given; give one start value and one (lo, hi) pair per parameter"
            ),
            FitError::BadBounds { index, lo, hi } => {
                write!(f, "bounds of parameter {} are ({lo}, {hi}); the lower bound must be below the upper one", index + 1)
            }
            FitError::BadStart { index, value, lo, hi } => write!(
                f,
                "start value {value} of parameter {} is outside its bounds ({lo}, {hi}); choose a start inside the bounds",
                index + 1
            ),
            FitError::BadData { what, point, value } => {
                write!(f, "{what} at point {} is {value}; every value must be a finite number", point + 1)
            }
            FitError::ModelUndefined { point } => write!(
                f,
                "the model has no finite value at point {} with the start values; choose other start values or bounds",
                point + 1
            ),
            FitError::NotConverged { reason, evaluations } => write!(
                f,
                "the fit did not converge ({reason}, after {evaluations} evaluations); try other start values \
                 (for example from a linearised fit), tighter bounds, or another model"
            ),
            FitError::Undetermined { index, value, std_error } => write!(
                f,
                "parameter {} = {value:.4e} +- {std_error:.1e} is not determined by these data (the fit drifted to where \
                 the sum of squares is flat); bound or fix that parameter, try other start values, or use a simpler model",
                index + 1
            ),
            FitError::NotIdentifiable => write!(
                f,
                "the parameters cannot be told apart from these data (the Jacobian is singular); \
                 fix or drop a parameter, try other start values, add points over a wider range, or use a simpler model"
            ),
        }
    }
}

impl std::error::Error for FitError {}

/// A one-input model with derivatives: `(params, x, gradient) -> value`,
/// writing `d value / d params[j]` into `gradient[j]`.
pub type GradientModelFn = dyn Fn(&[f64], f64, &mut [f64]) -> f64;

/// No bounds on any of `n` parameters.
pub fn unbounded(n: usize) -> Vec<(f64, f64)> {
    vec![(f64::NEG_INFINITY, f64::INFINITY); n]
}

/// Fit `y ~ model(params, x)` for a one-input model.
///
/// `start` holds the start values and `bounds` one `(lo, hi)` pair per
/// parameter (use infinities for none). Method, statistics and sources: see the
/// module documentation.
pub fn least_squares(
    model: &dyn Fn(&[f64], f64) -> f64,
    x: &[f64],
    y: &[f64],
    start: &[f64],
    bounds: &[(f64, f64)],
) -> Result<FitResult, FitError> {
    check_len("x", y.len(), x.len())?;
    let wrapped = OneInput { model, x };
    fit(&wrapped, y, start, bounds, &FitOptions::default())
}

/// Fit `y ~ model(params, x)` for a one-input model that also gives its
/// derivatives: `model(params, x, gradient)` returns the value and writes
/// `d value / d params[j]` into `gradient[j]`. Faster than finite differences
/// when derivatives share work with the value; same statistics.
pub fn least_squares_with_gradient(
    model: &GradientModelFn,
    x: &[f64],
    y: &[f64],
    start: &[f64],
    bounds: &[(f64, f64)],
) -> Result<FitResult, FitError> {
    check_len("x", y.len(), x.len())?;
    let wrapped = OneInputWithGradient { model, x };
    fit(&wrapped, y, start, bounds, &FitOptions::default())
}

/// Fit `y ~ model(params, row)` for a model with several inputs per point
/// (for example water activity and temperature); `rows[i]` holds point `i`'s inputs.
pub fn least_squares_rows(
    model: &dyn Fn(&[f64], &[f64]) -> f64,
    rows: &[Vec<f64>],
    y: &[f64],
    start: &[f64],
    bounds: &[(f64, f64)],
) -> Result<FitResult, FitError> {
    check_len("rows", y.len(), rows.len())?;
    let wrapped = RowInput { model, rows };
    fit(&wrapped, y, start, bounds, &FitOptions::default())
}

/// The general entry point: fit `model` to `y` from `start` within `bounds`.
///
/// Up to 6 parameters the compact minimiser on the normal
/// equations runs first; when it hands over (ill-conditioned normal equations,
/// or no convergence) the general QR-based trust-region minimiser starts again
/// from `start`.
pub fn fit(
    model: &dyn Model,
    y: &[f64],
    start: &[f64],
    bounds: &[(f64, f64)],
    options: &FitOptions,
) -> Result<FitResult, FitError> {
    let weights = check_inputs(y, start, bounds, options)?;
    let maps: Vec<Transform> = start
        .iter()
        .zip(bounds)
        .map(|(&x0, &b)| Transform::new(x0, b))
        .collect();
    if start.len() <= compact::MAX_PARAMS {
        match compact::minimise(model, y, &weights, &maps, start, options) {
            Ok(done) => {
                return finish(y, &weights, start, bounds, done);
            }
            Err(compact::Stop::UndefinedAtStart(point)) => {
                return Err(FitError::ModelUndefined { point })
            }
            Err(compact::Stop::HandOver) => {}
        }
    }
    fit_general(model, y, &weights, maps, start, bounds, options)
}

/// The general path: MINPACK's trust-region method from the
/// `levenberg-marquardt` crate, with the Jacobian stored.
fn fit_general(
    model: &dyn Model,
    y: &[f64],
    weights: &[f64],
    maps: Vec<Transform>,
    start: &[f64],
    bounds: &[(f64, f64)],
    options: &FitOptions,
) -> Result<FitResult, FitError> {
    let problem = Problem::new(model, y, weights, maps, start);
    if let Some(point) = problem.first_penalised() {
        return Err(FitError::ModelUndefined { point });
    }
    let solver = LevenbergMarquardt::new()
        .with_ftol(options.tolerance)
        .with_xtol(options.tolerance)
        .with_gtol(0.0)
        .with_patience(options.patience.max(1));
    let (problem, report) = solver.minimize(problem);
    let converged = report.termination.was_successful() && problem.penalised == 0;
    if !converged {
        return Err(FitError::NotConverged {
            reason: termination_words(&report.termination),
            evaluations: report.number_of_evaluations,
        });
    }
    let params = problem.external();
    let fitted = problem.fitted();
    let p = params.len();
    let normal = match &problem.analytic {
        Some(g) => normal_matrix(weights, g, p),
        None => central_normal(model, weights, &params, &least_sizes(start)),
    };
    let done = compact::Converged {
        params,
        fitted,
        normal,
        evaluations: report.number_of_evaluations,
    };
    finish(y, weights, start, bounds, done)
}

/// Statistics of a converged fit, refused when a parameter is not determined.
/// (`done` comes from either minimiser.)
fn finish(
    y: &[f64],
    weights: &[f64],
    start: &[f64],
    bounds: &[(f64, f64)],
    done: compact::Converged,
) -> Result<FitResult, FitError> {
    let mut result = statistics(y, weights, &done.params, done.fitted, &done.normal, bounds)?;
    result.evaluations = done.evaluations;
    check_determined(&result, start)?;
    Ok(result)
}

/// Refuse a fit where a parameter's standard error dwarfs its size.
///
/// The size is the parameter's value; for a parameter started at exactly 0
/// it is at least 1 (the scale the difference steps assume for it too).
/// A parameter started at 0 carries no size of its own, and its best value
/// may well be 0 (a temperature coefficient of data that show no
/// temperature effect), where it ends within rounding of 0 (say -2.2e-16):
/// any standard error dwarfs that, yet the parameter is determined.
fn check_determined(result: &FitResult, start: &[f64]) -> Result<(), FitError> {
    let size = |v: f64, s: f64| if s == 0.0 { v.abs().max(1.0) } else { v.abs() };
    let bad = result
        .params
        .iter()
        .zip(start)
        .zip(&result.std_errors)
        .position(|((v, s), se)| *se > UNDETERMINED_RATIO * size(*v, *s).max(f64::MIN_POSITIVE));
    match bad {
        Some(index) => Err(FitError::Undetermined {
            index,
            value: result.params[index],
            std_error: result.std_errors[index],
        }),
        None => Ok(()),
    }
}

fn check_len(what: &'static str, expected: usize, found: usize) -> Result<(), FitError> {
    if expected == found {
        Ok(())
    } else {
        Err(FitError::LengthMismatch {
            what,
            expected,
            found,
        })
    }
}

/// Validate everything the caller passed; return the weights `1/sigma`.
fn check_inputs(
    y: &[f64],
    start: &[f64],
    bounds: &[(f64, f64)],
    options: &FitOptions,
) -> Result<Vec<f64>, FitError> {
    if start.is_empty() || start.len() != bounds.len() {
        return Err(FitError::BadParameterCount {
            start: start.len(),
            bounds: bounds.len(),
        });
    }
    if y.len() <= start.len() {
        return Err(FitError::TooFewPoints {
            points: y.len(),
            params: start.len(),
        });
    }
    // All finite is checked without stopping early (a loop the compiler
    // can widen); the first bad point is looked for only when one is bad.
    if !all_finite(y) {
        if let Some((point, &value)) = y.iter().enumerate().find(|(_, v)| !v.is_finite()) {
            return Err(FitError::BadData {
                what: "y",
                point,
                value,
            });
        }
    }
    for (index, (&value, &(lo, hi))) in start.iter().zip(bounds).enumerate() {
        if lo.is_nan() || hi.is_nan() || lo >= hi {
            return Err(FitError::BadBounds { index, lo, hi });
        }
        if !value.is_finite() || value < lo || value > hi {
            return Err(FitError::BadStart {
                index,
                value,
                lo,
                hi,
            });
        }
    }
    weights(y.len(), options)
}

/// Whether every value is finite, in one pass without an early exit.
pub(crate) fn all_finite(values: &[f64]) -> bool {
    values.iter().fold(true, |ok, v| ok & v.is_finite())
}

fn weights(n: usize, options: &FitOptions) -> Result<Vec<f64>, FitError> {
    let Some(sigma) = &options.sigma else {
        return Ok(vec![1.0; n]);
    };
    check_len("sigma", n, sigma.len())?;
    sigma
        .iter()
        .enumerate()
        .map(|(point, &s)| {
            if s.is_finite() && s > 0.0 {
                Ok(1.0 / s)
            } else {
                Err(FitError::BadData {
                    what: "sigma",
                    point,
                    value: s,
                })
            }
        })
        .collect()
}

fn termination_words(reason: &TerminationReason) -> String {
    match reason {
        TerminationReason::LostPatience => "evaluation limit reached".into(),
        TerminationReason::Numerical(what) => format!("non-finite numbers in the {what}"),
        TerminationReason::NoImprovementPossible(what) => {
            format!("no further improvement possible ({what})")
        }
        TerminationReason::User(what) => format!("the model failed to give {what}"),
        other => format!("{other:?}"),
    }
}

/// A one-input closure as a [`Model`].
struct OneInput<'a> {
    model: &'a dyn Fn(&[f64], f64) -> f64,
    x: &'a [f64],
}

impl Model for OneInput<'_> {
    fn value(&self, params: &[f64], point: usize) -> f64 {
        (self.model)(params, self.x[point])
    }
}

/// A one-input closure with derivatives as a [`Model`].
struct OneInputWithGradient<'a> {
    model: &'a GradientModelFn,
    x: &'a [f64],
}

impl Model for OneInputWithGradient<'_> {
    fn value(&self, params: &[f64], point: usize) -> f64 {
        let mut scratch = [0.0; 16];
        let mut heap;
        let out = if params.len() <= scratch.len() {
            &mut scratch[..params.len()]
        } else {
            heap = vec![0.0; params.len()];
            &mut heap[..]
        };
        (self.model)(params, self.x[point], out)
    }

    fn gradient(&self, params: &[f64], point: usize, out: &mut [f64]) -> bool {
        (self.model)(params, self.x[point], out);
        true
    }

    fn value_and_gradient(&self, params: &[f64], point: usize, out: &mut [f64]) -> Option<f64> {
        Some((self.model)(params, self.x[point], out))
    }
}

/// A several-input closure as a [`Model`].
struct RowInput<'a> {
    model: &'a dyn Fn(&[f64], &[f64]) -> f64,
    rows: &'a [Vec<f64>],
}

impl Model for RowInput<'_> {
    fn value(&self, params: &[f64], point: usize) -> f64 {
        (self.model)(params, &self.rows[point])
    }
}

/// Parameter count up to which the Jacobian's scratch space lives on the stack.
const STACK_PARAMS: usize = 8;

/// Residual value that replaces a non-finite one during a trial step, so the
/// minimiser rejects the step and shrinks its trust region instead of stopping.
const PENALTY: f64 = 1e50;

/// The least-squares problem handed to the minimiser, in internal variables.
struct Problem<'a> {
    model: &'a dyn Model,
    y: &'a [f64],
    weights: &'a [f64],
    maps: Vec<Transform>,
    u: DVector<f64>,
    x: Vec<f64>,
    /// Weighted residuals `w (f - y)` at `x`.
    r: DVector<f64>,
    /// How many residuals at `x` were replaced by the penalty.
    penalised: usize,
    /// Model derivatives at `x` (row-major n x p), when the model gives them;
    /// then residuals and Jacobian come from one pass over the data.
    analytic: Option<Vec<f64>>,
    /// Least size of each parameter for difference steps ([`least_sizes`]).
    least: Vec<f64>,
}

impl<'a> Problem<'a> {
    fn new(
        model: &'a dyn Model,
        y: &'a [f64],
        weights: &'a [f64],
        maps: Vec<Transform>,
        start: &[f64],
    ) -> Problem<'a> {
        let u = DVector::from_iterator(
            start.len(),
            maps.iter().zip(start).map(|(m, &x)| m.internal(x)),
        );
        let mut problem = Problem {
            model,
            y,
            weights,
            maps,
            u: u.clone(),
            x: start.to_vec(),
            r: DVector::zeros(y.len()),
            penalised: 0,
            analytic: None,
            least: least_sizes(start),
        };
        let mut probe = vec![0.0; start.len()];
        if !y.is_empty() && model.value_and_gradient(start, 0, &mut probe).is_some() {
            problem.analytic = Some(vec![0.0; y.len() * start.len()]);
        }
        problem.set_params(&u);
        problem
    }

    fn external(&self) -> Vec<f64> {
        self.x.clone()
    }

    /// The first point whose residual was not finite at the current parameters.
    fn first_penalised(&self) -> Option<usize> {
        if self.penalised == 0 {
            return None;
        }
        self.r.iter().position(|&r| r == PENALTY)
    }

    /// Model values at the current parameters, from the stored residuals.
    fn fitted(&self) -> Vec<f64> {
        self.r
            .iter()
            .zip(self.weights)
            .zip(self.y)
            .map(|((r, w), y)| r / w + y)
            .collect()
    }
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, u: &DVector<f64>) {
        self.u.copy_from(u);
        for (x, (m, &ui)) in self.x.iter_mut().zip(self.maps.iter().zip(u.iter())) {
            *x = m.external(ui);
        }
        self.penalised = 0;
        let p = self.x.len();
        for i in 0..self.y.len() {
            let f = match self.analytic.as_mut() {
                Some(g) => self
                    .model
                    .value_and_gradient(&self.x, i, &mut g[i * p..(i + 1) * p])
                    .unwrap_or(f64::NAN),
                None => self.model.value(&self.x, i),
            };
            let r = self.weights[i] * (f - self.y[i]);
            self.r[i] = if r.is_finite() {
                r
            } else {
                self.penalised += 1;
                PENALTY
            };
        }
    }

    fn params(&self) -> DVector<f64> {
        self.u.clone()
    }

    fn residuals(&self) -> Option<DVector<f64>> {
        Some(self.r.clone())
    }

    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let n = self.y.len();
        let p = self.x.len();
        let mut jac = DMatrix::zeros(n, p);
        let cells = jac.as_mut_slice(); // column-major: (i, j) at j * n + i
                                        // Scratch for gradient, probe parameters and slopes: on the stack for
                                        // the usual few parameters (this runs once per iteration).
        let mut stack = [0.0; 3 * STACK_PARAMS];
        let mut heap;
        let scratch: &mut [f64] = if p <= STACK_PARAMS {
            &mut stack[..3 * p]
        } else {
            heap = vec![0.0; 3 * p];
            &mut heap
        };
        let (grad, rest) = scratch.split_at_mut(p);
        let (probe, slopes) = rest.split_at_mut(p);
        probe.copy_from_slice(&self.x);
        for (s, (m, &u)) in slopes.iter_mut().zip(self.maps.iter().zip(self.u.iter())) {
            *s = m.slope(u);
        }
        for i in 0..n {
            match &self.analytic {
                Some(g) => grad.copy_from_slice(&g[i * p..(i + 1) * p]),
                None => {
                    let fi = self.r[i] / self.weights[i] + self.y[i];
                    forward_gradient(self.model, probe, &self.least, i, fi, grad);
                }
            }
            for j in 0..p {
                let d = self.weights[i] * grad[j] * slopes[j];
                cells[j * n + i] = if d.is_finite() { d } else { 0.0 };
            }
        }
        Some(jac)
    }
}

/// Gradient of the model at point `i` by forward differences with MINPACK's
/// step `sqrt(eps) |x|` (models with derivatives never come here), `|x|` at
/// least `least[j]` (see [`least_sizes`]). `probe` holds the parameters and
/// is restored on return; `fi` is the value at `probe`.
fn forward_gradient(
    model: &dyn Model,
    probe: &mut [f64],
    least: &[f64],
    i: usize,
    fi: f64,
    grad: &mut [f64],
) {
    for j in 0..probe.len() {
        let xj = probe[j];
        let h = step(xj.abs().max(least[j]));
        probe[j] = xj + h;
        grad[j] = (model.value(probe, i) - fi) / h;
        probe[j] = xj;
    }
}

/// Central-difference gradient (for the covariance, where accuracy matters
/// more than speed; models with derivatives never come here).
fn central_gradient(
    model: &dyn Model,
    probe: &mut [f64],
    least: &[f64],
    i: usize,
    grad: &mut [f64],
) {
    for j in 0..probe.len() {
        let xj = probe[j];
        let h = central_step(xj.abs().max(least[j]));
        probe[j] = xj + h;
        let up = model.value(probe, i);
        probe[j] = xj - h;
        let down = model.value(probe, i);
        probe[j] = xj;
        grad[j] = (up - down) / (2.0 * h);
    }
}

/// `sqrt(eps)` for f64.
const ROOT_EPS: f64 = 1.490_116_119_384_765_6e-8;
/// `eps^(1/3)` for f64.
const CUBE_ROOT_EPS: f64 = 6.055_454_452_393_343e-6;

/// The least size of each parameter for its difference steps: 1 for a
/// parameter started at exactly 0, none (0) for the others. A parameter
/// started at 0 has no size of its own, and when its best value is 0 it
/// ends within rounding of it (say -2.2e-16), where a step relative to its
/// value would be lost in rounding and the derivative come out 0 (and the
/// fit be called not identifiable). 1 is the size MINPACK's rule already
/// gives a parameter at exactly 0.
fn least_sizes(start: &[f64]) -> Vec<f64> {
    start
        .iter()
        .map(|&s| if s == 0.0 { 1.0 } else { 0.0 })
        .collect()
}

/// Forward-difference step, `sqrt(eps) |x|` (MINPACK's choice).
fn step(x: f64) -> f64 {
    ROOT_EPS * if x == 0.0 { 1.0 } else { x.abs() }
}

/// Central-difference step, `eps^(1/3) |x|`, balancing truncation and rounding.
fn central_step(x: f64) -> f64 {
    CUBE_ROOT_EPS * if x == 0.0 { 1.0 } else { x.abs() }
}

/// Statistics of a converged fit at `params`, from the model values `fitted`
/// and the normal matrix `J^T W^2 J` (row-major `p x p`) there.
fn statistics(
    y: &[f64],
    weights: &[f64],
    params: &[f64],
    fitted: Vec<f64>,
    normal: &[f64],
    bounds: &[(f64, f64)],
) -> Result<FitResult, FitError> {
    let n = y.len();
    let p = params.len();
    let residuals: Vec<f64> = y.iter().zip(&fitted).map(|(o, f)| o - f).collect();
    let residual_sums::ResidualSums {
        sse,
        chi2,
        y_total,
        relative,
    } = residual_sums::residual_sums(y, weights, &residuals);
    // The data are finite (checked on entry), so a value that is not makes
    // the sum of squares not finite: only then is the point looked for.
    if !sse.is_finite() {
        if let Some(point) = fitted.iter().position(|f| !f.is_finite()) {
            return Err(FitError::ModelUndefined { point });
        }
    }
    let dof = n - p;
    let reduced_chi_square = chi2 / dof as f64;
    let covariance = covariance(normal, p, reduced_chi_square)?;
    let std_errors: Vec<f64> = (0..p)
        .map(|j| covariance[j * p + j].max(0.0).sqrt())
        .collect();
    let t_value = t_975(dof);
    let ci95 = params
        .iter()
        .zip(&std_errors)
        .map(|(x, se)| (x - t_value * se, x + t_value * se))
        .collect();
    let mean = y_total / n as f64;
    let sst = residual_sums::squares_about(y, mean);
    let log_term = n as f64 * (sse / n as f64).max(f64::MIN_POSITIVE).ln();
    Ok(FitResult {
        params: params.to_vec(),
        std_errors,
        ci95,
        covariance,
        t_value,
        points: n,
        dof,
        sse,
        r_squared: if sst > 0.0 { 1.0 - sse / sst } else { 1.0 },
        rmse: (sse / n as f64).sqrt(),
        mean_relative_deviation_percent: mean_relative_deviation(y, relative),
        reduced_chi_square,
        aic: log_term + 2.0 * p as f64,
        bic: log_term + p as f64 * (n as f64).ln(),
        fitted,
        residuals,
        at_bound: params
            .iter()
            .zip(bounds)
            .map(|(&x, &b)| on_bound(x, b))
            .collect(),
        evaluations: 0,
    })
}

/// `J^T W^2 J`, row-major `p x p`, from row-major model derivatives (`n x p`).
fn normal_matrix(weights: &[f64], gradients: &[f64], p: usize) -> Vec<f64> {
    let mut normal = vec![0.0; p * p];
    for (row, w) in gradients.chunks(p).zip(weights) {
        accumulate_normal(&mut normal, row, w * w);
    }
    normal
}

/// Add `w2 g g^T` to the row-major `normal`.
fn accumulate_normal(normal: &mut [f64], g: &[f64], w2: f64) {
    let p = g.len();
    for a in 0..p {
        for b in 0..p {
            normal[a * p + b] += w2 * g[a] * g[b];
        }
    }
}

/// `J^T W^2 J` at `params` with model derivatives by central differences
/// (for the covariance, where accuracy matters more than speed; models with
/// derivatives never come here). Each point's gradient is used at once, so the
/// `n x p` Jacobian is not stored.
fn central_normal(model: &dyn Model, weights: &[f64], params: &[f64], least: &[f64]) -> Vec<f64> {
    let p = params.len();
    let mut normal = vec![0.0; p * p];
    let mut probe = params.to_vec();
    let mut grad = vec![0.0; p];
    for (i, w) in weights.iter().enumerate() {
        central_gradient(model, &mut probe, least, i, &mut grad);
        accumulate_normal(&mut normal, &grad, w * w);
    }
    normal
}

/// `s^2 (J^T W^2 J)^-1`, row-major, from the row-major normal matrix.
fn covariance(normal: &[f64], p: usize, s2: f64) -> Result<Vec<f64>, FitError> {
    let mut covariance = invert_symmetric(normal, p).ok_or(FitError::NotIdentifiable)?;
    for v in &mut covariance {
        *v *= s2;
    }
    if covariance.iter().all(|v| v.is_finite()) {
        Ok(covariance)
    } else {
        Err(FitError::NotIdentifiable)
    }
}

/// Largest condition number of the scaled normal matrix accepted.
const MAX_CONDITION: f64 = 1e12;

/// Inverse of a symmetric positive-semidefinite matrix (row-major `p x p`),
/// refusing a numerically singular one. The matrix is first scaled to unit
/// diagonal (`S^-1 M S^-1`, `S = sqrt(diag M)`), so parameters of very
/// different sizes (a monolayer moisture of 0.07 and a heat of 9000 J/mol)
/// do not look singular; the scaled matrix is refused when its condition
/// number exceeds [`MAX_CONDITION`] (parameters correlated beyond
/// 1 - 1e-12). Up to [`symmetric::MAX_ORDER`] parameters it is inverted
/// through its eigenvalues on the stack (module `symmetric`), beyond by SVD;
/// both judge the condition by the same singular values.
fn invert_symmetric(m: &[f64], p: usize) -> Option<Vec<f64>> {
    // Scratch on the stack for the orders inverted on the stack.
    const ORDER: usize = symmetric::MAX_ORDER;
    let (mut scale_stack, mut scaled_stack) = ([0.0; ORDER], [0.0; ORDER * ORDER]);
    let (mut scale_heap, mut scaled_heap);
    let (scale, scaled) = if p <= ORDER {
        (&mut scale_stack[..p], &mut scaled_stack[..p * p])
    } else {
        scale_heap = vec![0.0; p];
        scaled_heap = vec![0.0; p * p];
        (&mut scale_heap[..], &mut scaled_heap[..])
    };
    for (i, s) in scale.iter_mut().enumerate() {
        *s = m[i * p + i].sqrt();
    }
    if scale
        .iter()
        .any(|s| s.is_nan() || *s <= 0.0 || s.is_infinite())
    {
        return None;
    }
    for (k, v) in scaled.iter_mut().enumerate() {
        *v = m[k] / (scale[k / p] * scale[k % p]);
    }
    let mut inverse = if p <= ORDER {
        symmetric::invert(scaled, p, 1.0 / MAX_CONDITION)?
    } else {
        invert_by_svd(scaled, p)?
    };
    for (k, v) in inverse.iter_mut().enumerate() {
        *v /= scale[k / p] * scale[k % p];
    }
    Some(inverse)
}

/// Inverse (row-major) of a scaled symmetric matrix by SVD, refused beyond
/// [`MAX_CONDITION`].
fn invert_by_svd(scaled: &[f64], p: usize) -> Option<Vec<f64>> {
    let svd = DMatrix::from_row_slice(p, p, scaled).svd(true, true);
    let largest = svd.singular_values.max();
    let smallest = svd.singular_values.min();
    if largest.is_nan() || largest <= 0.0 || smallest <= largest * (1.0 / MAX_CONDITION) {
        return None;
    }
    let inverse = svd.pseudo_inverse(0.0).ok()?;
    // Row-major copy (nalgebra stores columns).
    Some((0..p * p).map(|k| inverse[(k / p, k % p)]).collect())
}

/// `P = 100/n sum |r/y|` from the sum `relative` of `|r/y|`; `None` when
/// some `y` is zero.
fn mean_relative_deviation(y: &[f64], relative: f64) -> Option<f64> {
    if y.contains(&0.0) {
        return None;
    }
    Some(100.0 * relative / y.len() as f64)
}

fn on_bound(x: f64, (lo, hi): (f64, f64)) -> bool {
    let width = if lo.is_finite() && hi.is_finite() {
        hi - lo
    } else {
        x.abs().max(1.0)
    };
    let tol = 1e-6 * width;
    (lo.is_finite() && x - lo <= tol) || (hi.is_finite() && hi - x <= tol)
}

/// Quantile of Student's t distribution with `dof` degrees of freedom
/// (`probability` in (0, 1)), by safeguarded Newton iteration on the
/// distribution function from the Cornish-Fisher estimate.
///
/// The distribution function uses the regularised incomplete beta function
/// `F(t) = 1 - I_{dof/(dof+t^2)}(dof/2, 1/2) / 2` for `t >= 0` (Abramowitz &
/// Stegun 26.7.1 and 26.5.27), evaluated by its continued fraction; the start
/// is A&S 26.7.5 from the normal quantile.
pub fn student_t_quantile(probability: f64, dof: f64) -> f64 {
    if probability == 0.5 {
        return 0.0;
    }
    if probability < 0.5 {
        return -student_t_quantile(1.0 - probability, dof);
    }
    let upper_tail = 1.0 - probability;
    let tail = |t: f64| 0.5 * incomplete_beta(dof / (dof + t * t), 0.5 * dof, 0.5);
    let log_norm = libm::lgamma(0.5 * (dof + 1.0))
        - libm::lgamma(0.5 * dof)
        - 0.5 * (dof * std::f64::consts::PI).ln();
    let density = |t: f64| (log_norm - 0.5 * (dof + 1.0) * (1.0 + t * t / dof).ln()).exp();
    let (mut lo, mut hi) = (0.0, f64::INFINITY);
    let mut t = cornish_fisher(normal_quantile(probability), dof).max(1e-3);
    for _ in 0..100 {
        let excess = tail(t) - upper_tail; // > 0 means t is too small
        if excess > 0.0 {
            lo = t;
        } else {
            hi = t;
        }
        let next = t + excess / density(t);
        let next = if next > lo && next < hi {
            next
        } else if hi.is_finite() {
            0.5 * (lo + hi)
        } else {
            2.0 * t
        };
        if (next - t).abs() <= 1e-14 * t {
            return next;
        }
        t = next;
    }
    t
}

/// The 97.5 % t quantile for `dof` degrees of freedom, remembered per thread
/// (fits repeat with the same few `dof`; the quantile costs a few microseconds).
fn t_975(dof: usize) -> f64 {
    thread_local! {
        static CACHE: std::cell::RefCell<Vec<(usize, f64)>> = const { std::cell::RefCell::new(Vec::new()) };
    }
    CACHE.with(|cache| {
        if let Some(&(_, t)) = cache.borrow().iter().find(|(d, _)| *d == dof) {
            return t;
        }
        let t = student_t_quantile(0.975, dof as f64);
        let mut c = cache.borrow_mut();
        if c.len() >= 64 {
            c.remove(0);
        }
        c.push((dof, t));
        t
    })
}

/// A&S 26.7.5: t quantile from the normal quantile `z`, to order 1/dof^2.
fn cornish_fisher(z: f64, dof: f64) -> f64 {
    let z3 = z * z * z;
    let z5 = z3 * z * z;
    z + (z3 + z) / (4.0 * dof) + (5.0 * z5 + 16.0 * z3 + 3.0 * z) / (96.0 * dof * dof)
}

/// Standard normal quantile, by Newton iteration on `erfc` (enough for a start value).
fn normal_quantile(probability: f64) -> f64 {
    let upper = 1.0 - probability;
    let mut z = (-2.0 * upper.ln()).sqrt().min(8.0);
    for _ in 0..20 {
        let tail = 0.5 * libm::erfc(z / std::f64::consts::SQRT_2);
        let pdf = (-0.5 * z * z).exp() / (2.0 * std::f64::consts::PI).sqrt();
        let step = (tail - upper) / pdf;
        z += step;
        if step.abs() < 1e-12 {
            break;
        }
    }
    z
}

/// Regularised incomplete beta function `I_x(a, b)` (Abramowitz & Stegun 26.5.8
/// continued fraction, evaluated by the modified Lentz method).
pub fn incomplete_beta(x: f64, a: f64, b: f64) -> f64 {
    if x <= 0.0 {
        return 0.0;
    }
    if x >= 1.0 {
        return 1.0;
    }
    let ln_front =
        libm::lgamma(a + b) - libm::lgamma(a) - libm::lgamma(b) + a * x.ln() + b * (1.0 - x).ln();
    let front = ln_front.exp();
    if x < (a + 1.0) / (a + b + 2.0) {
        front * beta_fraction(x, a, b) / a
    } else {
        1.0 - front * beta_fraction(1.0 - x, b, a) / b
    }
}

/// The continued fraction of A&S 26.5.8.
fn beta_fraction(x: f64, a: f64, b: f64) -> f64 {
    const TINY: f64 = 1e-300;
    let guard = |v: f64| if v.abs() < TINY { TINY } else { v };
    let mut c = 1.0;
    let mut d = 1.0 / guard(1.0 - (a + b) * x / (a + 1.0));
    let mut h = d;
    for m in 1..300 {
        let m = m as f64;
        let even = m * (b - m) * x / ((a + 2.0 * m - 1.0) * (a + 2.0 * m));
        d = 1.0 / guard(1.0 + even * d);
        c = guard(1.0 + even / c);
        h *= d * c;
        let odd = -(a + m) * (a + b + m) * x / ((a + 2.0 * m) * (a + 2.0 * m + 1.0));
        d = 1.0 / guard(1.0 + odd * d);
        c = guard(1.0 + odd / c);
        let delta = d * c;
        h *= delta;
        if (delta - 1.0).abs() < 1e-15 {
            break;
        }
    }
    h
}

#[cfg(test)]
mod tests {
    use super::*;

    /// An exactly linear model: least squares has the closed form, so the
    /// fitter must reproduce the normal-equation solution.
    #[test]
    fn straight_line_matches_normal_equations() {
        let x = [0.0, 1.0, 2.0, 3.0, 4.0, 5.0];
        let y = [1.1, 2.9, 5.2, 7.1, 8.8, 11.2];
        let fit =
            least_squares(&|p, x| p[0] + p[1] * x, &x, &y, &[0.0, 1.0], &unbounded(2)).unwrap();
        let n = x.len() as f64;
        let (sx, sy) = (x.iter().sum::<f64>(), y.iter().sum::<f64>());
        let sxx: f64 = x.iter().map(|v| v * v).sum();
        let sxy: f64 = x.iter().zip(&y).map(|(a, b)| a * b).sum();
        let slope = (n * sxy - sx * sy) / (n * sxx - sx * sx);
        let intercept = (sy - slope * sx) / n;
        assert!((fit.params[1] - slope).abs() < 1e-9);
        assert!((fit.params[0] - intercept).abs() < 1e-9);
        // Standard error of the slope, closed form: s / sqrt(Sxx_centred).
        let s2 = fit.sse / (n - 2.0);
        let se_slope = (s2 / (sxx - sx * sx / n)).sqrt();
        assert!((fit.std_errors[1] - se_slope).abs() < 1e-7 * se_slope);
    }

    /// The one-pass finiteness test finds a bad reading wherever it is, and
    /// the error names the first one (as the scan it replaces did).
    #[test]
    fn first_non_finite_reading_is_named() {
        assert!(all_finite(&[1.0, -2.0, 0.0]) && all_finite(&[]));
        for (y, point) in [
            (vec![1.0, 2.0, 3.0, f64::NAN], 3),
            (vec![f64::INFINITY, 2.0, f64::NAN, 4.0], 0),
            (vec![1.0, f64::NEG_INFINITY, 3.0, f64::NAN], 1),
        ] {
            let err = least_squares(
                &|p, x| p[0] + p[1] * x,
                &[1.0, 2.0, 3.0, 4.0],
                &y,
                &[0.0, 1.0],
                &unbounded(2),
            )
            .unwrap_err();
            assert!(
                matches!(err, FitError::BadData { what: "y", point: p, .. } if p == point),
                "{err:?}"
            );
        }
    }

    #[test]
    fn bounds_are_respected() {
        // Unbounded optimum of the slope is about 2; cap it at 1.5.
        let x = [0.0, 1.0, 2.0, 3.0];
        let y = [0.0, 2.0, 4.1, 5.9];
        let fit = least_squares(&|p, x| p[0] * x, &x, &y, &[1.0], &[(0.0, 1.5)]).unwrap();
        assert!(fit.params[0] <= 1.5 && fit.params[0] > 1.49);
        assert!(fit.at_bound[0]);
    }

    #[test]
    fn too_few_points_is_an_error() {
        let err = least_squares(
            &|p, x| p[0] + p[1] * x,
            &[1.0, 2.0],
            &[1.0, 2.0],
            &[0.0, 1.0],
            &unbounded(2),
        )
        .unwrap_err();
        assert_eq!(
            err,
            FitError::TooFewPoints {
                points: 2,
                params: 2
            }
        );
        assert!(err.to_string().contains("at least 3 points"));
    }

    #[test]
    fn start_outside_bounds_is_an_error() {
        let err = least_squares(
            &|p, x| p[0] * x,
            &[1.0, 2.0],
            &[1.0, 2.0],
            &[5.0],
            &[(0.0, 1.0)],
        )
        .unwrap_err();
        assert!(matches!(err, FitError::BadStart { index: 0, .. }));
    }

    #[test]
    fn model_undefined_at_start_is_an_error() {
        let err = least_squares(
            &|p, x| (p[0] * x).ln(),
            &[1.0, 2.0, 3.0],
            &[0.0, 0.7, 1.1],
            &[-1.0],
            &unbounded(1),
        )
        .unwrap_err();
        assert_eq!(err, FitError::ModelUndefined { point: 0 });
    }

    /// The covariance's inverse through eigenvalues on the stack (up to 8
    /// parameters) against the SVD it replaced: the same inverse to rounding
    /// on invented matrices with parameters of very different sizes, and the
    /// same verdict on nearly singular ones.
    #[test]
    fn small_inverse_matches_svd() {
        let mut state = 0x0bad_cafe_f00d_1234_u64;
        let mut noise = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state >> 11) as f64 / (1u64 << 52) as f64 - 1.0
        };
        let sizes = [0.07, 9000.0, 1.0, 1e-4, 30.0, 0.5, 2e3, 1e-2];
        for p in 1..=symmetric::MAX_ORDER {
            for trial in 0..30 {
                // J^T J of a random 3p x p Jacobian with columns of the sizes
                // above; every third trial two columns nearly equal.
                let rows = 3 * p;
                let mut jac: Vec<f64> = (0..rows * p).map(|_| noise()).collect();
                if trial % 3 == 2 && p >= 2 {
                    let tiny = [1e-3, 1e-7, 1e-9][trial / 3 % 3];
                    for r in 0..rows {
                        jac[r * p + 1] = jac[r * p] + tiny * noise();
                    }
                }
                let mut m = vec![0.0; p * p];
                for i in 0..p {
                    for j in 0..p {
                        m[i * p + j] = (0..rows)
                            .map(|r| jac[r * p + i] * sizes[i] * jac[r * p + j] * sizes[j])
                            .sum();
                    }
                }
                let scale: Vec<f64> = (0..p).map(|i| m[i * p + i].sqrt()).collect();
                let scaled: Vec<f64> = (0..p * p)
                    .map(|k| m[k] / (scale[k / p] * scale[k % p]))
                    .collect();
                let small = invert_symmetric(&m, p);
                let svd = invert_by_svd(&scaled, p).map(|inv| {
                    (0..p * p)
                        .map(|k| inv[k] / (scale[k / p] * scale[k % p]))
                        .collect::<Vec<f64>>()
                });
                match (small, svd) {
                    (Some(a), Some(b)) => {
                        for i in 0..p {
                            for j in 0..p {
                                let k = i * p + j;
                                // Relative to the diagonal's size (off-diagonal
                                // entries may cancel to near zero).
                                let size = (b[i * p + i] * b[j * p + j]).sqrt();
                                assert!(
                                    (a[k] - b[k]).abs() <= 1e-6 * size,
                                    "p={p} trial {trial} ({i},{j}): {} vs {}",
                                    a[k],
                                    b[k]
                                );
                            }
                        }
                    }
                    (None, None) => {}
                    (a, b) => panic!(
                        "p={p} trial {trial}: verdicts differ ({:?} vs {:?})",
                        a.is_some(),
                        b.is_some()
                    ),
                }
            }
        }
    }

    #[test]
    fn unidentifiable_parameters_are_an_error() {
        // p0 and p1 only appear as a sum.
        let x = [0.0, 1.0, 2.0, 3.0];
        let y = [1.0, 3.0, 5.0, 7.0];
        let err = least_squares(
            &|p, x| (p[0] + p[1]) * x + 1.0,
            &x,
            &y,
            &[1.0, 0.5],
            &unbounded(2),
        )
        .unwrap_err();
        assert_eq!(err, FitError::NotIdentifiable);
    }

    /// Data symmetric about x = 0 have a least-squares slope of exactly 0;
    /// started at 0 it ends within rounding of 0, and is still determined
    /// (closed form of the straight line: slope 0, intercept the mean).
    #[test]
    fn parameter_started_and_ending_at_zero_is_determined() {
        let x = [-2.0, -1.0, 0.0, 1.0, 2.0];
        let y = [1.0, 2.0, 1.5, 2.0, 1.0];
        let fit =
            least_squares(&|p, x| p[0] + p[1] * x, &x, &y, &[1.0, 0.0], &unbounded(2)).unwrap();
        assert!(fit.params[1].abs() < 1e-12, "{:?}", fit.params);
        assert!((fit.params[0] - 1.5).abs() < 1e-9);
        // s^2 / Sxx with s^2 = SSE / 3 = 1 / 3 and Sxx = 10.
        assert!((fit.std_errors[1] - (1.0f64 / 30.0).sqrt()).abs() < 1e-6);
    }

    #[test]
    fn patience_exhausted_is_not_converged() {
        let x: Vec<f64> = (0..20).map(|i| i as f64 * 0.5).collect();
        let y: Vec<f64> = x.iter().map(|t| (-0.3 * t).exp()).collect();
        let model = OneInput {
            model: &|p: &[f64], t: f64| p[0] * (-p[1] * t).exp(),
            x: &x,
        };
        let options = FitOptions {
            patience: 1,
            ..FitOptions::default()
        };
        let err = fit(&model, &y, &[5.0, 3.0], &unbounded(2), &options).unwrap_err();
        assert!(matches!(err, FitError::NotConverged { .. }), "{err:?}");
        assert!(err.to_string().contains("start values"));
    }

    /// The analytic-derivative path gives the same fit as finite differences.
    #[test]
    fn analytic_gradient_matches_finite_differences() {
        let t: Vec<f64> = (1..=40).map(|i| i as f64 * 5.0).collect();
        let y: Vec<f64> = t
            .iter()
            .enumerate()
            .map(|(i, t)| (-0.01 * t.powf(1.2)).exp() + 0.003 * ((i * 7 % 5) as f64 - 2.0))
            .collect();
        let plain = least_squares(
            &|p, t| (-p[0] * t.powf(p[1])).exp(),
            &t,
            &y,
            &[0.02, 1.0],
            &unbounded(2),
        )
        .unwrap();
        let page = |p: &[f64], t: f64, g: &mut [f64]| {
            let tn = t.powf(p[1]);
            let f = (-p[0] * tn).exp();
            g[0] = -tn * f;
            g[1] = -p[0] * tn * t.ln() * f;
            f
        };
        let analytic =
            least_squares_with_gradient(&page, &t, &y, &[0.02, 1.0], &unbounded(2)).unwrap();
        for j in 0..2 {
            assert!((plain.params[j] - analytic.params[j]).abs() < 1e-7 * plain.params[j].abs());
            assert!(
                (plain.std_errors[j] - analytic.std_errors[j]).abs() < 1e-5 * plain.std_errors[j]
            );
        }
        assert!(analytic.evaluations <= plain.evaluations + 2);
    }

    /// The compact minimiser (which must not hand over here) and the general
    /// one reach the same fit and the same statistics, with bounds active in
    /// the change of variables.
    #[test]
    fn compact_and_general_minimisers_agree() {
        let t: Vec<f64> = (1..=30).map(|i| i as f64 * 0.3).collect();
        let y: Vec<f64> = t
            .iter()
            .enumerate()
            .map(|(i, t)| 0.9 * (-0.4 * t).exp() + 0.08 + 0.004 * ((i * 5 % 7) as f64 - 3.0))
            .collect();
        let model = OneInput {
            model: &|p: &[f64], t: f64| p[0] * (-p[1] * t).exp() + p[2],
            x: &t,
        };
        let start = [1.0, 0.2, 0.02];
        let bounds = [(0.0, 5.0), (0.0, f64::INFINITY), (-1.0, f64::INFINITY)];
        let options = FitOptions::default();
        let weights = vec![1.0; y.len()];
        let maps: Vec<Transform> = start
            .iter()
            .zip(&bounds)
            .map(|(&x0, &b)| Transform::new(x0, b))
            .collect();
        assert!(compact::minimise(&model, &y, &weights, &maps, &start, &options).is_ok());
        let quick = fit(&model, &y, &start, &bounds, &options).unwrap();
        let general = fit_general(&model, &y, &weights, maps, &start, &bounds, &options).unwrap();
        for j in 0..3 {
            let (a, b) = (quick.params[j], general.params[j]);
            assert!((a - b).abs() <= 1e-7 * b.abs(), "param {j}: {a} vs {b}");
            let (a, b) = (quick.std_errors[j], general.std_errors[j]);
            assert!((a - b).abs() <= 1e-5 * b, "std error {j}: {a} vs {b}");
        }
        assert!((quick.sse - general.sse).abs() <= 1e-12 * general.sse);
    }

    #[test]
    fn difference_steps_are_the_epsilon_roots() {
        assert_eq!(ROOT_EPS, f64::EPSILON.sqrt());
        assert!((CUBE_ROOT_EPS - f64::EPSILON.cbrt()).abs() < 1e-20);
    }

    #[test]
    fn t_quantile_symmetry_and_normal_limit() {
        // Common practice: t quantiles approach the normal 1.959964 as dof grows.
        assert!((student_t_quantile(0.975, 1e7) - 1.959_964).abs() < 1e-5);
        assert!((student_t_quantile(0.025, 5.0) + student_t_quantile(0.975, 5.0)).abs() < 1e-12);
        // dof = 1 is the Cauchy distribution: quantile tan(pi (p - 1/2)), exact.
        let cauchy = (std::f64::consts::PI * 0.475).tan();
        assert!((student_t_quantile(0.975, 1.0) - cauchy).abs() < 1e-9 * cauchy);
        // dof = 2 has the closed form t = (2p - 1) sqrt(2 / (4p(1-p))).
        let p: f64 = 0.975;
        let exact = (2.0 * p - 1.0) * (2.0 / (4.0 * p * (1.0 - p))).sqrt();
        assert!((student_t_quantile(p, 2.0) - exact).abs() < 1e-9 * exact);
    }
}
