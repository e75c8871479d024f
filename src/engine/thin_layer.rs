//! Thin-layer drying models: empirical and semi-theoretical moisture-ratio
//! curves `MR(t)`, fitted with the shared least-squares fitter
//! ([`super::fit`]) and compared by R^2, RMSE, reduced chi-square and AIC.
//!
//! Models and their usual sources (citations from memory):
//! Lewis/Newton `exp(-k t)` (W. K. Lewis, Ind. Eng. Chem. 13 (1921) 427);
//! Page `exp(-k t^n)` (G. E. Page, M.S. thesis, Purdue University, 1949);
//! modified Page `exp(-(k t)^n)` (Overhults et al., Trans. ASAE 16 (1973));
//! Henderson-Pabis `a exp(-k t)` (Henderson & Pabis, J. Agric. Eng. Res. 6 (1961));
//! logarithmic `a exp(-k t) + c` (Yagcioglu et al., 1999);
//! two-term `a exp(-k0 t) + b exp(-k1 t)` (Henderson, Trans. ASAE 17 (1974));
//! two-term exponential `a exp(-k t) + (1 - a) exp(-k a t)` (Sharaf-Eldeen et
//! al., Trans. ASAE 23 (1980)); Wang-Singh `1 + a t + b t^2` (Wang & Singh,
//! ASAE paper 78-6505, 1978); Midilli `a exp(-k t^n) + b t` (Midilli, Kucuk &
//! Yapar, Drying Technology 20 (2002) 1503).
//!
//! Fitting: time is first scaled by the last reading (so rate constants are
//! of order one), starts come from the linearised forms (ln MR against t;
//! ln(-ln MR) against ln t), several starts are tried for the multi-term
//! models, and the best fit is converted to the caller's time unit, its
//! covariance by the chain rule (the optimum does not depend on the unit, so
//! no second fit is needed).

mod curve;

use super::fit::batch::{self, widest_vectors};
use super::fit::{self, FitOptions, FitResult};
use super::kinetics::{increasing_times, positive, KineticsError};
use curve::Curve;

/// A thin-layer model.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ThinLayerModel {
    Lewis,
    Page,
    ModifiedPage,
    HendersonPabis,
    Logarithmic,
    TwoTerm,
    TwoTermExponential,
    WangSingh,
    Midilli,
}

impl ThinLayerModel {
    /// Every model, in the order of the comparison table.
    pub const ALL: [ThinLayerModel; 9] = [
        ThinLayerModel::Lewis,
        ThinLayerModel::Page,
        ThinLayerModel::ModifiedPage,
        ThinLayerModel::HendersonPabis,
        ThinLayerModel::Logarithmic,
        ThinLayerModel::TwoTerm,
        ThinLayerModel::TwoTermExponential,
        ThinLayerModel::WangSingh,
        ThinLayerModel::Midilli,
    ];

    /// Published name.
    pub fn name(self) -> &'static str {
        match self {
            ThinLayerModel::Lewis => "Lewis (Newton)",
            ThinLayerModel::Page => "Page",
            ThinLayerModel::ModifiedPage => "modified Page",
            ThinLayerModel::HendersonPabis => "Henderson-Pabis",
            ThinLayerModel::Logarithmic => "logarithmic",
            ThinLayerModel::TwoTerm => "two-term",
            ThinLayerModel::TwoTermExponential => "two-term exponential",
            ThinLayerModel::WangSingh => "Wang-Singh",
            ThinLayerModel::Midilli => "Midilli",
        }
    }

    /// Key used in worksheets.
    pub fn key(self) -> &'static str {
        match self {
            ThinLayerModel::Lewis => "lewis",
            ThinLayerModel::Page => "page",
            ThinLayerModel::ModifiedPage => "modified_page",
            ThinLayerModel::HendersonPabis => "henderson_pabis",
            ThinLayerModel::Logarithmic => "logarithmic",
            ThinLayerModel::TwoTerm => "two_term",
            ThinLayerModel::TwoTermExponential => "two_term_exponential",
            ThinLayerModel::WangSingh => "wang_singh",
            ThinLayerModel::Midilli => "midilli",
        }
    }

    /// The model for a worksheet key (also accepts "newton" for Lewis).
    pub fn from_key(key: &str) -> Option<ThinLayerModel> {
        let key = key.trim().to_ascii_lowercase().replace(['-', ' '], "_");
        if key == "newton" {
            return Some(ThinLayerModel::Lewis);
        }
        ThinLayerModel::ALL.into_iter().find(|m| m.key() == key)
    }

    /// The formula in words, with t in the fit's time unit.
    pub fn formula(self) -> &'static str {
        match self {
            ThinLayerModel::Lewis => "MR = exp(-k t)",
            ThinLayerModel::Page => "MR = exp(-k t^n)",
            ThinLayerModel::ModifiedPage => "MR = exp(-(k t)^n)",
            ThinLayerModel::HendersonPabis => "MR = a exp(-k t)",
            ThinLayerModel::Logarithmic => "MR = a exp(-k t) + c",
            ThinLayerModel::TwoTerm => "MR = a exp(-k0 t) + b exp(-k1 t)",
            ThinLayerModel::TwoTermExponential => "MR = a exp(-k t) + (1 - a) exp(-k a t)",
            ThinLayerModel::WangSingh => "MR = 1 + a t + b t^2",
            ThinLayerModel::Midilli => "MR = a exp(-k t^n) + b t",
        }
    }

    /// Parameter names in order.
    pub fn parameter_names(self) -> &'static [&'static str] {
        match self {
            ThinLayerModel::Lewis => &["k"],
            ThinLayerModel::Page | ThinLayerModel::ModifiedPage => &["k", "n"],
            ThinLayerModel::HendersonPabis => &["a", "k"],
            ThinLayerModel::Logarithmic => &["a", "k", "c"],
            ThinLayerModel::TwoTerm => &["a", "k0", "b", "k1"],
            ThinLayerModel::TwoTermExponential => &["a", "k"],
            ThinLayerModel::WangSingh => &["a", "b"],
            ThinLayerModel::Midilli => &["a", "k", "n", "b"],
        }
    }

    /// Moisture ratio at time `t` (in the parameters' time unit).
    pub fn ratio(self, p: &[f64], t: f64) -> f64 {
        match self {
            ThinLayerModel::Lewis => (-p[0] * t).exp(),
            ThinLayerModel::Page => (-p[0] * t.powf(p[1])).exp(),
            ThinLayerModel::ModifiedPage => (-(p[0] * t).powf(p[1])).exp(),
            ThinLayerModel::HendersonPabis => p[0] * (-p[1] * t).exp(),
            ThinLayerModel::Logarithmic => p[0] * (-p[1] * t).exp() + p[2],
            ThinLayerModel::TwoTerm => p[0] * (-p[1] * t).exp() + p[2] * (-p[3] * t).exp(),
            ThinLayerModel::TwoTermExponential => {
                p[0] * (-p[1] * t).exp() + (1.0 - p[0]) * (-p[1] * p[0] * t).exp()
            }
            ThinLayerModel::WangSingh => 1.0 + p[0] * t + p[1] * t * t,
            ThinLayerModel::Midilli => p[0] * (-p[1] * t.powf(p[2])).exp() + p[3] * t,
        }
    }

    /// Parameters for time unit `u1` converted to time unit `u2` (ratio r = u2/u1).
    fn rescale(self, p: &[f64], r: f64) -> Vec<f64> {
        match self {
            ThinLayerModel::Lewis => vec![p[0] * r],
            ThinLayerModel::Page => vec![p[0] * r.powf(p[1]), p[1]],
            ThinLayerModel::ModifiedPage => vec![p[0] * r, p[1]],
            ThinLayerModel::HendersonPabis => vec![p[0], p[1] * r],
            ThinLayerModel::Logarithmic => vec![p[0], p[1] * r, p[2]],
            ThinLayerModel::TwoTerm => vec![p[0], p[1] * r, p[2], p[3] * r],
            ThinLayerModel::TwoTermExponential => vec![p[0], p[1] * r],
            ThinLayerModel::WangSingh => vec![p[0] * r, p[1] * r * r],
            ThinLayerModel::Midilli => vec![p[0], p[1] * r.powf(p[2]), p[2], p[3] * r],
        }
    }

    /// Derivatives of [`ThinLayerModel::rescale`]'s parameters in the old ones,
    /// row-major `p x p`.
    fn rescale_derivatives(self, p: &[f64], r: f64) -> Vec<f64> {
        let q = p.len();
        // (At most four parameters.)
        let factors = self.rescale(&[1.0; 4][..q], r);
        let mut m = vec![0.0; q * q];
        for (j, f) in factors.iter().enumerate() {
            m[j * q + j] = *f;
        }
        // Page and Midilli rescale k by r^n: d(k r^n)/dk = r^n, d(k r^n)/dn = k r^n ln r.
        let (k, n) = match self {
            ThinLayerModel::Page => (0, 1),
            ThinLayerModel::Midilli => (1, 2),
            _ => return m,
        };
        m[k * q + k] = r.powf(p[n]);
        m[k * q + n] = p[k] * r.powf(p[n]) * r.ln();
        m
    }

    /// Bounds keeping rate constants and exponents positive.
    fn bounds(self) -> Vec<(f64, f64)> {
        let free = (f64::NEG_INFINITY, f64::INFINITY);
        let rate = (0.0, f64::INFINITY);
        let exponent = (1e-3, 50.0);
        match self {
            ThinLayerModel::Lewis => vec![rate],
            ThinLayerModel::Page | ThinLayerModel::ModifiedPage => vec![rate, exponent],
            ThinLayerModel::HendersonPabis => vec![free, rate],
            ThinLayerModel::Logarithmic => vec![free, rate, free],
            ThinLayerModel::TwoTerm => vec![free, rate, free, rate],
            ThinLayerModel::TwoTermExponential => vec![(1e-6, f64::INFINITY), rate],
            ThinLayerModel::WangSingh => vec![free, free],
            ThinLayerModel::Midilli => vec![free, rate, exponent, free],
        }
    }

    /// Start values on the scaled time axis, from the linearised forms.
    fn starts(self, guess: &Linearised) -> Vec<Vec<f64>> {
        let (a, k, kp, n) = (guess.a, guess.k, guess.k_page, guess.n);
        match self {
            ThinLayerModel::Lewis => vec![vec![k]],
            ThinLayerModel::Page => vec![vec![kp, n]],
            ThinLayerModel::ModifiedPage => vec![vec![kp.powf(1.0 / n), n]],
            ThinLayerModel::HendersonPabis => vec![vec![a, k]],
            ThinLayerModel::Logarithmic => vec![vec![a, k, 0.0], vec![a, 0.5 * k, 0.05]],
            ThinLayerModel::TwoTerm => vec![
                vec![0.8 * a, 0.8 * k, 0.2 * a, 4.0 * k],
                vec![0.5 * a, 0.5 * k, 0.5 * a, 2.0 * k],
                vec![1.2 * a, k, -0.2 * a, 6.0 * k],
            ],
            ThinLayerModel::TwoTermExponential => {
                vec![vec![0.5, k], vec![1.5, k], vec![0.1, k], vec![3.0, k]]
            }
            ThinLayerModel::WangSingh => vec![guess.quadratic.to_vec()],
            ThinLayerModel::Midilli => vec![vec![a, kp, n, 0.0], vec![1.0, kp, n, -0.001]],
        }
    }
}

/// Starting values from linearised forms on the scaled time axis.
struct Linearised {
    a: f64,
    k: f64,
    k_page: f64,
    n: f64,
    quadratic: [f64; 2],
}

/// The per-point arrays of a fit: the scaled time axis, and the points of
/// the two linearised forms, each point with its weight (zero for a point
/// left out: `t <= 0`, or `MR` outside `0 < MR < 1`, where a form has no
/// number; its coordinates are then zero too, so that it adds nothing).
/// All in one allocation, filled by one vectorised pass ([`transform_points`]).
struct Points {
    /// `n` values for each [`Column`], in order.
    columns: Vec<f64>,
    n: usize,
}

/// The columns of [`Points`], in order.
#[derive(Clone, Copy)]
enum Column {
    /// `t / scale`.
    Scaled,
    /// `ln(t / scale)`, as `ln t - ln scale`.
    LnScaled,
    /// Exponential form `ln MR = ln a - k t`: `ln MR` and the weight `MR^2`
    /// (its abscissa is [`Column::Scaled`]).
    LnRatio,
    RatioWeight,
    /// Power form `ln(-ln MR) = ln k + n ln t`: `ln t` (zero where left out),
    /// `ln(-ln MR)` and the weight `(MR ln MR)^2`.
    PowerX,
    PowerY,
    PowerWeight,
}

/// Number of [`Column`]s.
const COLUMNS: usize = 7;

impl Points {
    /// The arrays for times `times_s` (s) scaled by `scale`, and ratios.
    fn new(times_s: &[f64], ratios: &[f64], scale: f64) -> Points {
        let n = times_s.len();
        let mut columns = vec![0.0; COLUMNS * n];
        transform_points(times_s, ratios, scale, scale.ln(), &mut columns);
        Points { columns, n }
    }

    fn column(&self, c: Column) -> &[f64] {
        let k = c as usize;
        &self.columns[k * self.n..(k + 1) * self.n]
    }
}

widest_vectors! {
    /// [`transform_loop`], compiled for AVX2 and AVX-512 as well (see
    /// [`widest_vectors`]).
    fn transform_points(
        times_s: &[f64],
        ratios: &[f64],
        scale: f64,
        ln_scale: f64,
        columns: &mut [f64],
    ) => transform_loop;
}

/// Fill the [`Column`]s (each `times_s.len()` long, in order in `columns`)
/// in one branch-free loop with the vectorisable `ln` of [`batch`].
#[inline(always)]
fn transform_loop(times_s: &[f64], ratios: &[f64], scale: f64, ln_scale: f64, columns: &mut [f64]) {
    let n = times_s.len();
    let (scaled, rest) = columns.split_at_mut(n);
    let (ln_scaled, rest) = rest.split_at_mut(n);
    let (ln_ratio, rest) = rest.split_at_mut(n);
    let (ratio_weight, rest) = rest.split_at_mut(n);
    let (power_x, rest) = rest.split_at_mut(n);
    let (power_y, power_weight) = rest.split_at_mut(n);
    let ratios = &ratios[..n];
    let power_weight = &mut power_weight[..n];
    for i in 0..n {
        let (t, m) = (times_s[i], ratios[i]);
        let ln_t = batch::ln(t) - ln_scale;
        // The linearised forms give start values only: their logarithms
        // need not be correctly rounded (those of the points left out are
        // masked below).
        let ln_m = batch::ln_for_start(m);
        let ln_minus_ln_m = batch::ln_for_start(-ln_m);
        let used = t > 0.0 && m > 0.0 && m < 1.0;
        let pick = |v: f64| if used { v } else { 0.0 };
        scaled[i] = t / scale;
        ln_scaled[i] = ln_t;
        ln_ratio[i] = pick(ln_m);
        ratio_weight[i] = pick(m * m);
        power_x[i] = pick(ln_t);
        power_y[i] = pick(ln_minus_ln_m);
        power_weight[i] = pick((m * ln_m) * (m * ln_m));
    }
}

/// Start values from the linearised forms, for `model` on the scaled time
/// axis: only the lines `model` starts from are drawn. The lines are
/// weighted to undo the stretching of the scatter by the transforms (the
/// first-order variance of `ln MR` is `var(MR) / MR^2`, of `ln(-ln MR)` it is
/// `var(MR) / (MR ln MR)^2`), so they weigh the points as the nonlinear fit
/// will and the start lies close to its optimum.
fn linearised(model: ThinLayerModel, points: &Points, mr: &[f64]) -> Linearised {
    use ThinLayerModel::*;
    let wanted = |m: &[ThinLayerModel]| m.contains(&model);
    let exponential = if wanted(&[
        Lewis,
        HendersonPabis,
        Logarithmic,
        TwoTerm,
        TwoTermExponential,
        Midilli,
    ]) {
        weighted_line(
            points.column(Column::Scaled),
            points.column(Column::LnRatio),
            points.column(Column::RatioWeight),
        )
    } else {
        None
    };
    let power = if wanted(&[Page, ModifiedPage, Midilli]) {
        weighted_line(
            points.column(Column::PowerX),
            points.column(Column::PowerY),
            points.column(Column::PowerWeight),
        )
    } else {
        None
    };
    let (slope, intercept) = exponential.unwrap_or((-1.0, 0.0));
    let (n, ln_k) = power.unwrap_or((1.0, 0.0));
    let k = (-slope).max(1e-3);
    let n = n.clamp(0.1, 10.0);
    let quadratic = if model == WangSingh {
        quadratic(points.column(Column::Scaled), mr)
    } else {
        [-1.0, 0.0]
    };
    Linearised {
        a: intercept.exp(),
        k,
        k_page: ln_k.exp().max(1e-3),
        n,
        quadratic,
    }
}

/// Points summed side by side in the line sums ([`line_rows`]).
const LANES: usize = 8;

/// Partial sums of [`line_rows`], one row per sum and one column per lane.
type LineRows = [[f64; LANES]; 6];

widest_vectors! {
    /// [`line_rows_loop`], compiled for AVX2 and AVX-512 as well (see
    /// [`widest_vectors`]).
    fn line_rows(x: &[f64], y: &[f64], w: &[f64], centre: [f64; 2]) -> LineRows
        => line_rows_loop;
}

/// In [`LANES`] partial sums, with `x' = x - centre[0]` and
/// `y' = y - centre[1]`: the number of points of positive weight, `sum w`,
/// `sum w x'`, `sum w y'`, `sum w x'^2` and `sum w x' y'`. The last points
/// (fewer than [`LANES`]) make one more block padded with points of weight
/// zero. (The sums stay in one array, read and written a whole row at a
/// time, and are added up by the caller, so each row stays in a vector
/// register.)
#[inline(always)]
fn line_rows_loop(x: &[f64], y: &[f64], w: &[f64], centre: [f64; 2]) -> LineRows {
    let mut rows = [[0.0; LANES]; 6];
    let n = w.len();
    let whole = n - n % LANES;
    let blocks = x[..whole]
        .chunks_exact(LANES)
        .zip(y[..whole].chunks_exact(LANES))
        .zip(w[..whole].chunks_exact(LANES));
    for ((x, y), w) in blocks {
        add_line_block(&mut rows, x, y, w, centre);
    }
    if whole < n {
        let pad = |v: &[f64]| {
            let mut b = [0.0; LANES];
            b[..n - whole].copy_from_slice(&v[whole..n]);
            b
        };
        add_line_block(&mut rows, &pad(x), &pad(y), &pad(w), centre);
    }
    rows
}

/// Add one block of [`LANES`] points to the sums of [`line_rows_loop`].
#[inline(always)]
fn add_line_block(rows: &mut LineRows, x: &[f64], y: &[f64], w: &[f64], centre: [f64; 2]) {
    let (x, y, w) = (&x[..LANES], &y[..LANES], &w[..LANES]);
    let mut dx = [0.0; LANES];
    let mut dy = [0.0; LANES];
    for lane in 0..LANES {
        dx[lane] = x[lane] - centre[0];
        dy[lane] = y[lane] - centre[1];
    }
    for lane in 0..LANES {
        rows[0][lane] += if w[lane] > 0.0 { 1.0 } else { 0.0 };
    }
    for lane in 0..LANES {
        rows[1][lane] += w[lane];
    }
    for lane in 0..LANES {
        rows[2][lane] += w[lane] * dx[lane];
    }
    for lane in 0..LANES {
        rows[3][lane] += w[lane] * dy[lane];
    }
    for lane in 0..LANES {
        rows[4][lane] += w[lane] * dx[lane] * dx[lane];
    }
    for lane in 0..LANES {
        rows[5][lane] += w[lane] * dx[lane] * dy[lane];
    }
}

/// The six sums of [`line_rows`], the lanes added in a fixed order.
fn line_totals(rows: &LineRows) -> [f64; 6] {
    rows.map(|l| ((l[0] + l[1]) + (l[2] + l[3])) + ((l[4] + l[5]) + (l[6] + l[7])))
}

/// Weighted least-squares line `(slope, intercept)` through the points
/// `(x, y)` of positive weight `w` (the others must have finite
/// coordinates, and add nothing): the weighted means from one pass, the
/// sums of squares about them from a second; `None` for fewer than two
/// points or no line.
fn weighted_line(x: &[f64], y: &[f64], w: &[f64]) -> Option<(f64, f64)> {
    let [count, total, wx, wy, _, _] = line_totals(&line_rows(x, y, w, [0.0, 0.0]));
    if count < 2.0 {
        return None;
    }
    let (mx, my) = (wx / total, wy / total);
    let [_, _, _, _, sxx, sxy] = line_totals(&line_rows(x, y, w, [mx, my]));
    let slope = sxy / sxx;
    (slope.is_finite() && my.is_finite()).then_some((slope, my - slope * mx))
}

/// Wang-Singh is linear in (a, b): least squares of (MR - 1) on (t, t^2).
fn quadratic(t: &[f64], mr: &[f64]) -> [f64; 2] {
    let (s11, s12, s22, r1, r2) = t
        .iter()
        .zip(mr)
        .fold((0.0, 0.0, 0.0, 0.0, 0.0), |s, (ti, m)| {
            (
                s.0 + ti * ti,
                s.1 + ti.powi(3),
                s.2 + ti.powi(4),
                s.3 + ti * (m - 1.0),
                s.4 + ti * ti * (m - 1.0),
            )
        });
    let det = s11 * s22 - s12 * s12;
    if det.abs() > 1e-300 {
        [(r1 * s22 - r2 * s12) / det, (s11 * r2 - s12 * r1) / det]
    } else {
        [-1.0, 0.0]
    }
}

/// A fitted thin-layer model.
#[derive(Debug, Clone, PartialEq)]
pub struct ThinLayerFit {
    pub model: ThinLayerModel,
    /// Time unit of the parameters, s (e.g. 3600 for per hour).
    pub time_unit_s: f64,
    /// Parameters in the order of [`ThinLayerModel::parameter_names`].
    pub params: Vec<f64>,
    pub std_errors: Vec<f64>,
    pub points: usize,
    pub sse: f64,
    pub r_squared: f64,
    pub rmse: f64,
    pub reduced_chi_square: f64,
    pub aic: f64,
}

impl ThinLayerFit {
    /// Moisture ratio at time `t_s` seconds.
    pub fn ratio_at(&self, t_s: f64) -> f64 {
        self.model.ratio(&self.params, t_s / self.time_unit_s)
    }
}

/// Fit `model` to moisture ratios at times (s), reporting parameters with
/// time in units of `time_unit_s` seconds.
pub fn fit_thin_layer(
    model: ThinLayerModel,
    times_s: &[f64],
    ratios: &[f64],
    time_unit_s: f64,
) -> Result<ThinLayerFit, KineticsError> {
    check_data(times_s, ratios)?;
    positive("time unit", time_unit_s)?;
    // The last reading is the latest (times checked increasing above).
    let scale = times_s[times_s.len() - 1];
    positive("last reading time", scale)?;
    let points = Points::new(times_s, ratios, scale);
    let guess = linearised(model, &points, ratios);
    let on_scaled = Curve::new(
        model,
        points.column(Column::Scaled),
        points.column(Column::LnScaled),
    );
    let bounds = model.bounds();
    let options = FitOptions::default();
    let mut best: Option<FitResult> = None;
    let mut last_error = None;
    for start in model.starts(&guess) {
        let start = clamp_start(&start, &bounds);
        match fit::fit(&on_scaled, ratios, &start, &bounds, &options) {
            Ok(r) if best.as_ref().is_none_or(|b| r.sse < b.sse) => best = Some(r),
            Ok(_) => {}
            Err(e) => last_error = Some(e),
        }
    }
    let Some(scaled_fit) = best else {
        let detail = last_error.map_or_else(|| "no start converged".to_string(), |e| e.to_string());
        return Err(KineticsError::NoConvergence {
            what: "thin-layer fit",
            detail: format!("{}: {detail}", model.name()),
        });
    };
    let result = rescaled_result(model, scaled_fit, time_unit_s / scale);
    Ok(summary(model, time_unit_s, result))
}

/// The scaled fit in the caller's time unit (ratio `r` of the units): the
/// parameters by [`ThinLayerModel::rescale`], the covariance by the chain
/// rule `M C M^T` with `M` the derivatives of the new parameters in the old
/// ones (exact for the least-squares covariance: the residuals are the same
/// functions of either set), the statistics of the residuals unchanged. The
/// optimum in one time unit is the optimum in any other, so no second fit
/// is needed.
fn rescaled_result(model: ThinLayerModel, fit: FitResult, r: f64) -> FitResult {
    let p = fit.params.len();
    let m = model.rescale_derivatives(&fit.params, r);
    let mut covariance = vec![0.0; p * p];
    for i in 0..p {
        for j in 0..p {
            let mut sum = 0.0;
            for a in 0..p {
                for b in 0..p {
                    sum += m[i * p + a] * fit.covariance[a * p + b] * m[j * p + b];
                }
            }
            covariance[i * p + j] = sum;
        }
    }
    let params = model.rescale(&fit.params, r);
    let std_errors: Vec<f64> = (0..p)
        .map(|j| covariance[j * p + j].max(0.0).sqrt())
        .collect();
    let ci95 = params
        .iter()
        .zip(&std_errors)
        .map(|(x, se)| (x - fit.t_value * se, x + fit.t_value * se))
        .collect();
    FitResult {
        params,
        std_errors,
        ci95,
        covariance,
        ..fit
    }
}

fn clamp_start(start: &[f64], bounds: &[(f64, f64)]) -> Vec<f64> {
    start
        .iter()
        .zip(bounds)
        .map(|(v, (lo, hi))| {
            let v = if v.is_finite() { *v } else { 1.0 };
            let lo_in = if lo.is_finite() {
                lo + 1e-9 * (1.0 + lo.abs())
            } else {
                f64::NEG_INFINITY
            };
            let hi_in = if hi.is_finite() {
                hi - 1e-9 * (1.0 + hi.abs())
            } else {
                f64::INFINITY
            };
            v.clamp(lo_in, hi_in)
        })
        .collect()
}

fn summary(model: ThinLayerModel, time_unit_s: f64, r: FitResult) -> ThinLayerFit {
    ThinLayerFit {
        model,
        time_unit_s,
        params: r.params,
        std_errors: r.std_errors,
        points: r.points,
        sse: r.sse,
        r_squared: r.r_squared,
        rmse: r.rmse,
        reduced_chi_square: r.reduced_chi_square,
        aic: r.aic,
    }
}

fn check_data(times_s: &[f64], ratios: &[f64]) -> Result<(), KineticsError> {
    if times_s.len() != ratios.len() {
        return Err(KineticsError::OutOfRange {
            name: "number of moisture ratios",
            value: ratios.len() as f64,
            reason: "must equal the number of times",
        });
    }
    if times_s.len() < 3 {
        return Err(KineticsError::TooFewPoints {
            what: "a thin-layer fit",
            needed: 3,
            found: times_s.len(),
        });
    }
    increasing_times(times_s)?;
    // The times rise strictly (no NaN), so every time lies strictly between
    // the first and the last: only those two can be infinite, and the first
    // is the earliest negative one if any is. Checking the ends reports the
    // same reading as a scan of every time would.
    let (first, last) = (times_s[0], times_s[times_s.len() - 1]);
    let bad_time = [first, last].into_iter().find(|v| !v.is_finite());
    let bad_ratio = || {
        (!fit::all_finite(ratios))
            .then(|| ratios.iter().copied().find(|v| !v.is_finite()))
            .flatten()
    };
    if let Some(bad) = bad_time.or_else(bad_ratio) {
        return Err(KineticsError::OutOfRange {
            name: "reading",
            value: bad,
            reason: "must be finite",
        });
    }
    if first < 0.0 {
        return Err(KineticsError::OutOfRange {
            name: "time",
            value: first,
            reason: "must not be negative",
        });
    }
    Ok(())
}

/// Fit every model; results ordered by AIC (best first), failures last.
pub fn compare_thin_layer(
    times_s: &[f64],
    ratios: &[f64],
    time_unit_s: f64,
) -> Result<Vec<Result<ThinLayerFit, KineticsError>>, KineticsError> {
    check_data(times_s, ratios)?;
    let mut fits: Vec<Result<ThinLayerFit, KineticsError>> = ThinLayerModel::ALL
        .iter()
        .map(|m| fit_thin_layer(*m, times_s, ratios, time_unit_s))
        .collect();
    fits.sort_by(|a, b| match (a, b) {
        (Ok(x), Ok(y)) => x.aic.total_cmp(&y.aic),
        (Ok(_), Err(_)) => std::cmp::Ordering::Less,
        (Err(_), Ok(_)) => std::cmp::Ordering::Greater,
        (Err(_), Err(_)) => std::cmp::Ordering::Equal,
    });
    Ok(fits)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_exact_page_parameters() {
        let times: Vec<f64> = (0..25).map(|i| i as f64 * 1800.0).collect();
        let ratios: Vec<f64> = times
            .iter()
            .map(|t| (-0.4 * (t / 3600.0).powf(1.2)).exp())
            .collect();
        let fit = fit_thin_layer(ThinLayerModel::Page, &times, &ratios, 3600.0).unwrap();
        assert!(
            (fit.params[0] - 0.4).abs() < 1e-6 && (fit.params[1] - 1.2).abs() < 1e-6,
            "{fit:?}"
        );
        // Same curve in minutes: k_min = 0.4 / 60^1.2.
        let fit = fit_thin_layer(ThinLayerModel::Page, &times, &ratios, 60.0).unwrap();
        assert!(
            (fit.params[0] / (0.4 / 60f64.powf(1.2)) - 1.0).abs() < 1e-5,
            "{fit:?}"
        );
    }

    /// The old full scans of the data checks (every time and every ratio
    /// for finiteness, every time for sign), kept here as the reference for
    /// the checks of the ends and the one-pass finiteness test.
    fn check_data_by_scans(times_s: &[f64], ratios: &[f64]) -> Result<(), KineticsError> {
        if times_s.len() != ratios.len() || times_s.len() < 3 {
            return check_data(times_s, ratios);
        }
        increasing_times(times_s)?;
        if let Some(bad) = times_s.iter().chain(ratios).find(|v| !v.is_finite()) {
            return Err(KineticsError::OutOfRange {
                name: "reading",
                value: *bad,
                reason: "must be finite",
            });
        }
        if let Some(t) = times_s.iter().find(|t| **t < 0.0) {
            return Err(KineticsError::OutOfRange {
                name: "time",
                value: *t,
                reason: "must not be negative",
            });
        }
        Ok(())
    }

    #[test]
    fn data_checks_match_full_scans() {
        let (inf, nan) = (f64::INFINITY, f64::NAN);
        let cases: Vec<(Vec<f64>, Vec<f64>)> = vec![
            (vec![0.0, 1.0, 2.0], vec![1.0, 0.5, 0.2]),
            (vec![-inf, 1.0, 2.0], vec![1.0, 0.5, 0.2]),
            (vec![0.0, 1.0, inf], vec![1.0, 0.5, 0.2]),
            (vec![-inf, 1.0, inf], vec![1.0, nan, 0.2]),
            (vec![0.0, 1.0, 2.0], vec![1.0, nan, inf]),
            (vec![0.0, 1.0, 2.0], vec![1.0, 0.5, -inf]),
            (vec![-2.0, -1.0, 2.0], vec![1.0, 0.5, 0.2]),
            (vec![-2.0, -1.0, 2.0], vec![1.0, 0.5, nan]),
            (vec![-2.0, 1.0, inf], vec![1.0, 0.5, 0.2]),
            (vec![0.0, nan, 2.0], vec![1.0, 0.5, 0.2]),
            (vec![0.0, 2.0, 1.0], vec![inf, 0.5, 0.2]),
            (vec![0.0, 1.0], vec![1.0, 0.5]),
            (vec![0.0, 1.0, 2.0], vec![1.0, 0.5]),
        ];
        for (t, mr) in cases {
            let fast = format!("{:?}", check_data(&t, &mr));
            let scans = format!("{:?}", check_data_by_scans(&t, &mr));
            assert_eq!(fast, scans, "times {t:?}, ratios {mr:?}");
        }
    }

    /// The binary search for the end of the non-positive times against the
    /// scan from the end it replaces.
    #[test]
    fn non_positive_end_matches_scan() {
        for t in [
            vec![0.0, 0.5, 1.0],
            vec![0.5, 1.0],
            vec![-1.0, 0.0, 1.0],
            vec![-2.0, -1.0],
            vec![0.0, 0.0, 1.0],
            vec![],
        ] {
            let scan = t.iter().rposition(|&t| t <= 0.0).map_or(0, |i| i + 1);
            assert_eq!(
                Curve::new(ThinLayerModel::Page, &t, &t).non_positive_end,
                scan
            );
        }
    }

    /// The line through gathered points that the vectorised line sums
    /// replace (kept as their reference): every point with `t > 0` and
    /// `0 < MR < 1` pushed with its weight, the sums added in point order.
    fn line_by_points(points: &[(f64, f64, f64)]) -> Option<(f64, f64)> {
        if points.len() < 2 {
            return None;
        }
        let total: f64 = points.iter().map(|p| p.2).sum();
        let wx: f64 = points.iter().map(|p| p.2 * p.0).sum();
        let wy: f64 = points.iter().map(|p| p.2 * p.1).sum();
        let (mx, my) = (wx / total, wy / total);
        let (mut sxx, mut sxy) = (0.0, 0.0);
        for p in points {
            sxx += p.2 * (p.0 - mx).powi(2);
            sxy += p.2 * (p.0 - mx) * (p.1 - my);
        }
        let slope = sxy / sxx;
        (slope.is_finite() && my.is_finite()).then_some((slope, my - slope * mx))
    }

    /// The exponential and power lines through the points kept, gathered
    /// one by one with the library `ln` (the way the start lines were drawn
    /// before the vectorised pass).
    fn lines_by_points(times: &[f64], mr: &[f64]) -> [Option<(f64, f64)>; 2] {
        let scale = times[times.len() - 1];
        let (mut exponential, mut power) = (Vec::new(), Vec::new());
        for (&t, &m) in times.iter().zip(mr) {
            if t > 0.0 && m > 0.0 && m < 1.0 {
                let ln_m = m.ln();
                exponential.push((t / scale, ln_m, m * m));
                power.push((t.ln() - scale.ln(), (-ln_m).ln(), (m * ln_m) * (m * ln_m)));
            }
        }
        [line_by_points(&exponential), line_by_points(&power)]
    }

    /// Invented drying curves with points the lines leave out (t = 0,
    /// MR = 1, above 1, 0 and below 0), 203 points (not a multiple of the
    /// lanes) and 6 (one short block only).
    fn sample_curves() -> Vec<(Vec<f64>, Vec<f64>)> {
        let curve = |n: usize| {
            let times: Vec<f64> = (0..n).map(|i| 45.0 * i as f64).collect();
            let mut mr: Vec<f64> = times
                .iter()
                .enumerate()
                .map(|(i, t)| (-3e-3 * t.powf(1.1)).exp() + 0.01 * (1.7 * i as f64).sin())
                .collect();
            mr[1] = 1.0;
            mr[2] = 1.02;
            if n > 100 {
                mr[50] = 0.0;
                mr[90] = -0.003;
            }
            (times, mr)
        };
        vec![curve(203), curve(6)]
    }

    /// The vectorised lines against the gathered ones: the same points kept,
    /// slopes and intercepts to rounding; fewer than two points kept gives
    /// no line either way.
    #[test]
    fn vectorised_lines_match_gathered_lines() {
        let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * b.abs().max(1.0);
        let mut curves = sample_curves();
        curves.push((vec![0.0, 10.0, 20.0], vec![1.0, 0.5, 1.0]));
        for (times, mr) in curves {
            let points = Points::new(&times, &mr, times[times.len() - 1]);
            let fast = [
                weighted_line(
                    points.column(Column::Scaled),
                    points.column(Column::LnRatio),
                    points.column(Column::RatioWeight),
                ),
                weighted_line(
                    points.column(Column::PowerX),
                    points.column(Column::PowerY),
                    points.column(Column::PowerWeight),
                ),
            ];
            for (fast, slow) in fast.into_iter().zip(lines_by_points(&times, &mr)) {
                match (fast, slow) {
                    (Some(f), Some(s)) => {
                        assert!(close(f.0, s.0) && close(f.1, s.1), "{f:?} vs {s:?}")
                    }
                    (None, None) => {}
                    other => panic!("{} points: {other:?}", times.len()),
                }
            }
        }
    }

    /// The pass that fills the columns, with the processor's widest
    /// instructions, against the portable loop bit for bit and against the
    /// library `ln`: `ln t` within rounding, the linearised forms (start
    /// values only, from [`batch::ln_for_start`]) within 4e-12 relative, for
    /// the points kept; the others are zero.
    #[test]
    fn transformed_points_match_library_values() {
        let close = |a: f64, b: f64| (a - b).abs() <= 4e-12 * b.abs();
        for (times, mr) in sample_curves() {
            let n = times.len();
            let scale = times[n - 1];
            let points = Points::new(&times, &mr, scale);
            let mut portable = vec![0.0; COLUMNS * n];
            transform_loop(&times, &mr, scale, scale.ln(), &mut portable);
            for (a, b) in points.columns.iter().zip(&portable) {
                assert!(a.to_bits() == b.to_bits() || (a.is_nan() && b.is_nan()));
            }
            for i in 0..n {
                let (t, m) = (times[i], mr[i]);
                let kept = t > 0.0 && m > 0.0 && m < 1.0;
                let get = |c: Column| points.column(c)[i];
                assert_eq!(get(Column::Scaled), t / scale);
                if t > 0.0 {
                    let ln_t = t.ln() - scale.ln();
                    assert!(
                        (get(Column::LnScaled) - ln_t).abs() <= 4.0 * f64::EPSILON * scale.ln()
                    );
                }
                if kept {
                    let ln_m = m.ln();
                    assert!(close(get(Column::LnRatio), ln_m), "{i}");
                    // ln(-ln MR) near 0 carries the error of -ln MR (near 1).
                    let power_y = (-ln_m).ln();
                    let error = (get(Column::PowerY) - power_y).abs();
                    assert!(error <= 4e-12 * power_y.abs().max(1.0), "{i}");
                    assert_eq!(get(Column::PowerX), get(Column::LnScaled));
                    assert_eq!(get(Column::RatioWeight), m * m);
                    assert!(close(get(Column::PowerWeight).sqrt(), (m * ln_m).abs()));
                } else {
                    for c in [
                        Column::LnRatio,
                        Column::RatioWeight,
                        Column::PowerX,
                        Column::PowerY,
                        Column::PowerWeight,
                    ] {
                        assert_eq!(get(c), 0.0, "point {i} left out");
                    }
                }
            }
        }
    }

    #[test]
    fn keys_round_trip() {
        for m in ThinLayerModel::ALL {
            assert_eq!(ThinLayerModel::from_key(m.key()), Some(m));
            assert_eq!(m.parameter_names().len(), m.bounds().len());
        }
        assert_eq!(
            ThinLayerModel::from_key("Newton"),
            Some(ThinLayerModel::Lewis)
        );
        assert_eq!(
            ThinLayerModel::from_key("Modified Page"),
            Some(ThinLayerModel::ModifiedPage)
        );
    }

    #[test]
    fn bad_data_is_an_error() {
        assert!(fit_thin_layer(ThinLayerModel::Lewis, &[0.0, 1.0], &[1.0, 0.5], 1.0).is_err());
        let e = fit_thin_layer(
            ThinLayerModel::Lewis,
            &[0.0, 2.0, 1.0],
            &[1.0, 0.5, 0.4],
            1.0,
        )
        .unwrap_err();
        assert!(matches!(
            e,
            KineticsError::TimeNotIncreasing { index: 2, .. }
        ));
    }
}
