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

use super::fit::{self, batch, FitOptions, FitResult};
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
        let factors = self.rescale(&vec![1.0; q], r);
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

/// Only the lines `model` starts from are drawn. `ln t` is given with `t`
/// (computed once per time axis). The lines are
/// weighted to undo the stretching of the scatter by the transforms (the
/// first-order variance of `ln MR` is `var(MR) / MR^2`, of `ln(-ln MR)` it is
/// `var(MR) / (MR ln MR)^2`), so they weigh the points as the nonlinear fit
/// will and the start lies close to its optimum.
fn linearised(model: ThinLayerModel, t: &[f64], ln_t: &[f64], mr: &[f64]) -> Linearised {
    use ThinLayerModel::*;
    // ln MR and ln(-ln MR) at every point with the vectorised ln (points
    // outside 0 < MR < 1 give no number and are left out below).
    let mut ln_mr = mr.to_vec();
    batch::ln_in_place(&mut ln_mr);
    let mut ln_minus_ln_mr: Vec<f64> = ln_mr.iter().map(|l| -l).collect();
    batch::ln_in_place(&mut ln_minus_ln_mr);
    let wanted = |m: &[ThinLayerModel]| m.contains(&model);
    let capacity = |wanted: bool| if wanted { t.len() } else { 0 };
    let exponential_wanted = wanted(&[
        Lewis,
        HendersonPabis,
        Logarithmic,
        TwoTerm,
        TwoTermExponential,
        Midilli,
    ]);
    let power_wanted = wanted(&[Page, ModifiedPage, Midilli]);
    let mut exponential = Line::with_capacity(capacity(exponential_wanted));
    let mut power = Line::with_capacity(capacity(power_wanted));
    for (i, (&ti, &m)) in t.iter().zip(mr).enumerate() {
        if ti > 0.0 && m > 0.0 && m < 1.0 {
            let ln_m = ln_mr[i];
            if exponential_wanted {
                exponential.push((ti, ln_m, m * m));
            }
            if power_wanted {
                power.push((ln_t[i], ln_minus_ln_mr[i], (m * ln_m) * (m * ln_m)));
            }
        }
    }
    let (slope, intercept) = exponential.fit().unwrap_or((-1.0, 0.0));
    let (n, ln_k) = power.fit().unwrap_or((1.0, 0.0));
    let k = (-slope).max(1e-3);
    let n = n.clamp(0.1, 10.0);
    let quadratic = if model == WangSingh {
        quadratic(t, mr)
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

/// Weighted least-squares line through `(x, y, weight)` points, gathered
/// one by one: the weight and the weighted sums of `x` and `y` are added as
/// each point comes (in point order, as a first pass over the gathered
/// points would add them), so [`Line::fit`] makes one pass more only.
struct Line {
    points: Vec<(f64, f64, f64)>,
    total: f64,
    wx: f64,
    wy: f64,
}

impl Line {
    fn with_capacity(capacity: usize) -> Line {
        Line {
            points: Vec::with_capacity(capacity),
            total: 0.0,
            wx: 0.0,
            wy: 0.0,
        }
    }

    #[inline(always)]
    fn push(&mut self, p: (f64, f64, f64)) {
        self.total += p.2;
        self.wx += p.2 * p.0;
        self.wy += p.2 * p.1;
        self.points.push(p);
    }

    /// `(slope, intercept)`; `None` for fewer than two points or no line.
    fn fit(&self) -> Option<(f64, f64)> {
        if self.points.len() < 2 {
            return None;
        }
        let (mx, my) = (self.wx / self.total, self.wy / self.total);
        // The two sums share a pass, so their chains of additions overlap
        // (each still adds in point order).
        let (mut sxx, mut sxy) = (0.0, 0.0);
        for p in &self.points {
            sxx += p.2 * (p.0 - mx).powi(2);
            sxy += p.2 * (p.0 - mx) * (p.1 - my);
        }
        let slope = sxy / sxx;
        (slope.is_finite() && my.is_finite()).then_some((slope, my - slope * mx))
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
    let scaled: Vec<f64> = times_s.iter().map(|t| t / scale).collect();
    // ln(t / scale) as ln t - ln scale, with the vectorised ln.
    let mut ln_scaled = times_s.to_vec();
    batch::ln_in_place(&mut ln_scaled);
    let ln_scale = scale.ln();
    for l in &mut ln_scaled {
        *l -= ln_scale;
    }
    let guess = linearised(model, &scaled, &ln_scaled, ratios);
    let on_scaled = Curve::new(model, &scaled, &ln_scaled);
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
