//! Fitting isotherm models to measured (aw, T, X) points.
//!
//! Start values come from each model's linearised form (for example
//! `ln X = ln A + B ln(aw/(1-aw))` for Oswin, the quadratic `aw/X` form for GAB)
//! solved by ordinary linear least squares, plus a few typical values; the
//! nonlinear fit ([`crate::engine::fit`]) runs from the start with the least
//! sum of squares, and from the next ones only when it fails. Data at one temperature (spread under 0.5 K) fit the
//! model's isothermal parameters only, holding its temperature terms at zero,
//! and the isotherm is marked as known at that temperature only.

use nalgebra::{DMatrix, DVector};

use super::models::{IsothermKind, Sign};
use super::{check_params, Isotherm, SorptionError};
use crate::engine::fit::{self, FitError, FitOptions, FitResult, Model};

/// A fitted isotherm with its statistics.
#[derive(Clone, Debug, PartialEq)]
pub struct IsothermFit {
    pub isotherm: Isotherm,
    /// Indices (into `isotherm.params`) of the parameters that were fitted, in
    /// the order of `result.params`; the others were held fixed.
    pub free: Vec<usize>,
    pub result: FitResult,
}

impl IsothermFit {
    /// Names of the fitted parameters, in the order of `result.params`.
    pub fn free_names(&self) -> Vec<&'static str> {
        let names = self.isotherm.kind.param_names();
        self.free.iter().map(|&i| names[i]).collect()
    }
}

/// Measured points: water activity (0..1), temperature (K), moisture (kg/kg db).
struct Points<'a> {
    aw: &'a [f64],
    t_k: &'a [f64],
    x_db: &'a [f64],
}

/// Fit `kind` to points `(aw[i], t_k[i], x_db[i])` (activity 0..1, kelvin,
/// kg/kg dry basis). `start` optionally gives the full parameter vector to
/// start from; otherwise start values come from the linearised forms.
pub fn fit_isotherm(
    kind: IsothermKind,
    aw: &[f64],
    t_k: &[f64],
    x_db: &[f64],
    start: Option<&[f64]>,
) -> Result<IsothermFit, SorptionError> {
    let data = Points { aw, t_k, x_db };
    check_data(&data)?;
    let t_ref_k = t_k.iter().sum::<f64>() / t_k.len() as f64;
    let spread = t_k.iter().fold(0.0_f64, |m, t| m.max((t - t_ref_k).abs()));
    let isothermal = spread < 0.5 || !kind.has_temperature();
    let free: Vec<usize> = (0..kind.param_names().len())
        .filter(|i| !(isothermal && kind.temperature_params().contains(i)))
        .collect();
    let candidates = match start {
        Some(s) => {
            check_params(kind, s)?;
            vec![s.to_vec()]
        }
        None => start_values(kind, &data, t_ref_k, isothermal),
    };
    let problem = IsothermProblem {
        kind,
        data: &data,
        free: &free,
        fixed: [0.0; 5],
        t_ref_k,
        isothermal,
    };
    let (params, result) = best_fit(&problem, &candidates)?;
    let isotherm = Isotherm {
        kind,
        params,
        t_ref_k,
        isothermal,
    };
    Ok(IsothermFit {
        isotherm,
        free,
        result,
    })
}

fn check_data(data: &Points) -> Result<(), SorptionError> {
    let n = data.aw.len();
    if data.t_k.len() != n || data.x_db.len() != n {
        return Err(SorptionError::BadData(format!(
            "the data columns differ in length: {} aw, {} temperatures, {} moistures",
            n,
            data.t_k.len(),
            data.x_db.len()
        )));
    }
    for i in 0..n {
        let (aw, t, x) = (data.aw[i], data.t_k[i], data.x_db[i]);
        if !(aw > 0.0 && aw < 1.0) {
            return Err(SorptionError::BadData(format!(
                "point {}: water activity {aw} must be between 0 and 1 (exclusive) to fit",
                i + 1
            )));
        }
        if !(t.is_finite() && t > 0.0) {
            return Err(SorptionError::BadData(format!(
                "point {}: temperature {t} K must be above absolute zero",
                i + 1
            )));
        }
        if !(x.is_finite() && x > 0.0) {
            return Err(SorptionError::BadData(format!(
                "point {}: moisture {x} kg/kg must be positive to fit",
                i + 1
            )));
        }
    }
    Ok(())
}

/// Run the fit from each start and keep the converged one with the least SSE.
fn best_fit(
    problem: &IsothermProblem,
    candidates: &[Vec<f64>],
) -> Result<(Vec<f64>, FitResult), SorptionError> {
    let bounds: Vec<(f64, f64)> = problem
        .free
        .iter()
        .map(|&i| bound(problem.kind.param_signs()[i]))
        .collect();
    let mut best: Option<(Vec<f64>, FitResult)> = None;
    let mut first_error: Option<FitError> = None;
    for full in by_starting_sse(problem, candidates) {
        if best.is_some() {
            break;
        }
        let p = IsothermProblem {
            fixed: pad(full),
            ..*problem
        };
        let start: Vec<f64> = problem.free.iter().map(|&i| full[i]).collect();
        match fit::fit(
            &p,
            problem.data.x_db,
            &start,
            &bounds,
            &FitOptions::default(),
        ) {
            Ok(result) if best.as_ref().is_none_or(|(_, b)| result.sse < b.sse) => {
                let mut params = full.clone();
                for (&i, &v) in problem.free.iter().zip(&result.params) {
                    params[i] = v;
                }
                best = Some((params, result));
            }
            Ok(_) => {}
            Err(e @ FitError::TooFewPoints { .. }) => return Err(fit_error(problem, e)),
            Err(e) => {
                first_error.get_or_insert(e);
            }
        }
    }
    best.ok_or_else(|| fit_error(problem, first_error.unwrap_or(FitError::NotIdentifiable)))
}

/// Candidates ordered by their sum of squares before fitting (non-finite last):
/// the fit runs from the most promising start, and from the next ones only
/// when it fails.
fn by_starting_sse<'c>(problem: &IsothermProblem, candidates: &'c [Vec<f64>]) -> Vec<&'c Vec<f64>> {
    let sse = |full: &Vec<f64>| {
        let p = IsothermProblem {
            fixed: pad(full),
            ..*problem
        };
        let start: Vec<f64> = problem.free.iter().map(|&i| full[i]).collect();
        let s: f64 = (0..problem.data.x_db.len())
            .map(|i| (p.value(&start, i) - problem.data.x_db[i]).powi(2))
            .sum();
        if s.is_finite() {
            s
        } else {
            f64::INFINITY
        }
    };
    let mut ranked: Vec<(f64, &Vec<f64>)> = candidates.iter().map(|c| (sse(c), c)).collect();
    ranked.sort_by(|a, b| a.0.total_cmp(&b.0));
    ranked.into_iter().map(|(_, c)| c).collect()
}

/// A fit error, with a hint when the data reach beyond the model's usual range.
fn fit_error(problem: &IsothermProblem, error: FitError) -> SorptionError {
    let kind = problem.kind;
    let (lo, hi) = kind.activity_range();
    let outside = problem
        .data
        .aw
        .iter()
        .filter(|&&a| a < lo || a > hi)
        .count();
    let hint = if outside > 0 && !matches!(error, FitError::TooFewPoints { .. }) {
        format!(
            "; note: {outside} of the points lie outside the usual range of {} (aw {lo}..{hi}): fit only points inside it, or choose GAB",
            kind.name()
        )
    } else {
        String::new()
    };
    SorptionError::Fit {
        model: kind.name(),
        error,
        hint,
    }
}

fn bound(sign: Sign) -> (f64, f64) {
    match sign {
        Sign::Positive => (0.0, f64::INFINITY),
        Sign::AtLeastOne => (1.0, 1000.0),
        Sign::Any => (f64::NEG_INFINITY, f64::INFINITY),
    }
}

fn pad(params: &[f64]) -> [f64; 5] {
    let mut out = [0.0; 5];
    out[..params.len()].copy_from_slice(params);
    out
}

/// The isotherm as a [`Model`] over the data points, with some parameters fixed.
#[derive(Clone, Copy)]
struct IsothermProblem<'a> {
    kind: IsothermKind,
    data: &'a Points<'a>,
    free: &'a [usize],
    fixed: [f64; 5],
    t_ref_k: f64,
    isothermal: bool,
}

impl Model for IsothermProblem<'_> {
    fn value(&self, params: &[f64], point: usize) -> f64 {
        let mut full = self.fixed;
        for (&i, &v) in self.free.iter().zip(params) {
            full[i] = v;
        }
        let n = self.kind.param_names().len();
        let t = if self.isothermal {
            self.t_ref_k
        } else {
            self.data.t_k[point]
        };
        self.kind
            .moisture(&full[..n], self.data.aw[point], t, self.t_ref_k)
    }

    /// GAB has analytic derivatives (see [`gab_with_gradient`]); the other
    /// models use finite differences.
    fn value_and_gradient(&self, params: &[f64], point: usize, out: &mut [f64]) -> Option<f64> {
        if self.kind != IsothermKind::Gab {
            return None;
        }
        let mut full = self.fixed;
        for (&i, &v) in self.free.iter().zip(params) {
            full[i] = v;
        }
        let t = if self.isothermal {
            self.t_ref_k
        } else {
            self.data.t_k[point]
        };
        let mut gradient = [0.0; 5];
        let x = gab_with_gradient(&full, self.data.aw[point], t, self.t_ref_k, &mut gradient);
        for (o, &i) in out.iter_mut().zip(self.free) {
            *o = gradient[i];
        }
        Some(x)
    }
}

/// GAB moisture `X = Xm C u / ((1 - u)(1 - u + C u))`, `u = K aw`, with
/// `C = C0 e^(dHc f)`, `K = K0 e^(dHk f)`, `f = (1/T - 1/T_ref)/R`, and its
/// derivatives in `[Xm, C0, K0, dHc, dHk]`:
/// `dX/dXm = X/Xm`, `dX/dC = Xm u / (1 - u + C u)^2`,
/// `dX/dK = X aw (1/u + 1/(1 - u) - (C - 1)/(1 - u + C u))`, then the chain
/// rule through `C` and `K` (`dC/dC0 = C/C0`, `dC/ddHc = C f`, likewise `K`).
fn gab_with_gradient(
    p: &[f64; 5],
    aw: f64,
    t_k: f64,
    t_ref_k: f64,
    gradient: &mut [f64; 5],
) -> f64 {
    let f = (1.0 / t_k - 1.0 / t_ref_k) / super::GAS_CONSTANT;
    let (e_c, e_k) = ((p[3] * f).exp(), (p[4] * f).exp());
    let (c, k) = (p[1] * e_c, p[2] * e_k);
    let u = k * aw;
    let (d1, d2) = (1.0 - u, 1.0 - u + c * u);
    let per_xm = c * u / (d1 * d2);
    let x = p[0] * per_xm;
    let dx_dc = p[0] * u / (d2 * d2);
    let dx_dk = x * aw * (1.0 / u + 1.0 / d1 - (c - 1.0) / d2);
    *gradient = [
        per_xm,
        dx_dc * e_c,
        dx_dk * e_k,
        dx_dc * c * f,
        dx_dk * k * f,
    ];
    x
}

/// Start vectors (full parameter vectors) for `kind`, valid under its sign rules.
fn start_values(
    kind: IsothermKind,
    data: &Points,
    t_ref_k: f64,
    isothermal: bool,
) -> Vec<Vec<f64>> {
    let t_c = t_ref_k - 273.15;
    let offset = if isothermal { 0.0 } else { 50.0 };
    let mut out = linearised_starts(kind, data, t_ref_k, t_c + offset, offset);
    out.extend(typical_starts(kind, data));
    out.retain(|s| check_params(kind, s).is_ok());
    out
}

/// Starts from each model's linearised form.
fn linearised_starts(
    kind: IsothermKind,
    d: &Points,
    t_ref_k: f64,
    t_plus_b: f64,
    b: f64,
) -> Vec<Vec<f64>> {
    let logit: Vec<f64> = d.aw.iter().map(|a| (a / (1.0 - a)).ln()).collect();
    let ln_x: Vec<f64> = d.x_db.iter().map(|x| x.ln()).collect();
    let lnln_dry: Vec<f64> = d.aw.iter().map(|a| (-(1.0 - a).ln()).ln()).collect();
    let lnln_aw: Vec<f64> = d.aw.iter().map(|a| (-a.ln()).ln()).collect();
    let line = |xs: &[f64], ys: &[f64]| polynomial_fit(xs, ys, 1).map(|c| (c[0], c[1]));
    let found = match kind {
        IsothermKind::Gab => gab_start(d).map(|(xm, c, k)| vec![xm, c, k, 0.0, 0.0]),
        IsothermKind::Bet | IsothermKind::BetLayers => bet_start(d).map(|(xm, c)| vec![xm, c]),
        IsothermKind::Oswin => line(&logit, &ln_x).map(|(i, s)| vec![i.exp(), s]),
        IsothermKind::ModifiedOswin => {
            line(&logit, &ln_x).map(|(i, s)| vec![i.exp(), 0.0, 1.0 / s])
        }
        IsothermKind::Henderson => line(&ln_x, &lnln_dry).map(|(i, s)| vec![i.exp() / t_ref_k, s]),
        IsothermKind::ModifiedHenderson => {
            line(&ln_x, &lnln_dry).map(|(i, s)| vec![i.exp() / t_plus_b, b, s])
        }
        IsothermKind::ModifiedHalsey => line(&ln_x, &lnln_aw).map(|(i, s)| vec![i, 0.0, -s]),
        IsothermKind::ModifiedChungPfost => {
            line(d.x_db, &lnln_aw).map(|(i, s)| vec![i.exp() * t_plus_b, b, -s])
        }
        IsothermKind::Smith => {
            let dry: Vec<f64> = d.aw.iter().map(|a| -(1.0 - a).ln()).collect();
            line(&dry, d.x_db).map(|(i, s)| vec![i, s])
        }
        IsothermKind::Peleg => None,
    };
    let mut out: Vec<Vec<f64>> = found.into_iter().collect();
    if kind == IsothermKind::BetLayers {
        out = out
            .into_iter()
            .flat_map(|s| [3.0, 6.0, 12.0].map(|n| vec![s[0], s[1], n]))
            .collect();
    }
    out
}

/// A few typical values, for when the linearised forms fail.
fn typical_starts(kind: IsothermKind, d: &Points) -> Vec<Vec<f64>> {
    let x_max = d.x_db.iter().fold(0.0_f64, |m, &x| m.max(x));
    let x_mid = x_max * 0.3;
    match kind {
        IsothermKind::Gab => [2.0, 10.0, 50.0]
            .iter()
            .map(|&c| vec![x_mid, c, 0.8, 0.0, 0.0])
            .collect(),
        IsothermKind::Bet => vec![vec![x_mid, 10.0]],
        IsothermKind::BetLayers => vec![vec![x_mid, 10.0, 5.0]],
        IsothermKind::Peleg => [(0.5, 3.0), (0.8, 6.0), (0.3, 10.0)]
            .iter()
            .map(|&(c, e)| vec![x_max * 0.5, x_max * 0.5, c, e])
            .collect(),
        _ => Vec::new(),
    }
}

/// GAB start from the quadratic form `aw/X = g + b aw + a aw^2`, with
/// `Xm = 1/sqrt(b^2 - 4ag)`, `K = (sqrt(b^2 - 4ag) - b) / (2g)`, `C = 1/(g Xm K)`.
fn gab_start(d: &Points) -> Option<(f64, f64, f64)> {
    let ratio: Vec<f64> = d.aw.iter().zip(d.x_db).map(|(a, x)| a / x).collect();
    let c = polynomial_fit(d.aw, &ratio, 2)?;
    let (g, b, a) = (c[0], c[1], c[2]);
    let root = (b * b - 4.0 * a * g).sqrt();
    let xm = 1.0 / root;
    let k = (root - b) / (2.0 * g);
    let cc = 1.0 / (g * xm * k);
    [xm, k, cc]
        .iter()
        .all(|v| v.is_finite() && *v > 0.0)
        .then_some((xm, cc, k))
}

/// BET start from `aw/((1-aw) X) = 1/(Xm C) + (C-1)/(Xm C) aw`, on points with
/// aw <= 0.5 when there are at least three of them.
fn bet_start(d: &Points) -> Option<(f64, f64)> {
    let low: Vec<usize> = (0..d.aw.len()).filter(|&i| d.aw[i] <= 0.5).collect();
    let use_idx: Vec<usize> = if low.len() >= 3 {
        low
    } else {
        (0..d.aw.len()).collect()
    };
    let xs: Vec<f64> = use_idx.iter().map(|&i| d.aw[i]).collect();
    let ys: Vec<f64> = use_idx
        .iter()
        .map(|&i| d.aw[i] / ((1.0 - d.aw[i]) * d.x_db[i]))
        .collect();
    let c = polynomial_fit(&xs, &ys, 1)?;
    let cc = 1.0 + c[1] / c[0];
    let xm = 1.0 / (c[0] * cc);
    (xm.is_finite() && xm > 0.0 && cc > 0.0).then_some((xm, cc))
}

/// Ordinary least-squares polynomial `y = c0 + c1 x + ... + c_deg x^deg`.
fn polynomial_fit(xs: &[f64], ys: &[f64], degree: usize) -> Option<Vec<f64>> {
    if xs.len() <= degree || xs.iter().chain(ys).any(|v| !v.is_finite()) {
        return None;
    }
    let a = DMatrix::from_fn(xs.len(), degree + 1, |i, j| xs[i].powi(j as i32));
    let y = DVector::from_column_slice(ys);
    let solution = a.svd(true, true).solve(&y, 1e-12).ok()?;
    Some(solution.iter().copied().collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Points made from a known GAB isotherm: the fit must recover it exactly.
    #[test]
    fn recovers_gab_parameters_from_exact_points() {
        let truth = [0.075, 14.0, 0.83, 0.0, 0.0];
        let aw: Vec<f64> = (1..=12).map(|i| 0.07 * i as f64).collect();
        let t = vec![313.15; aw.len()];
        let x: Vec<f64> = aw
            .iter()
            .map(|&a| IsothermKind::Gab.moisture(&truth, a, 313.15, 313.15))
            .collect();
        let fit = fit_isotherm(IsothermKind::Gab, &aw, &t, &x, None).unwrap();
        assert_eq!(fit.free_names(), ["Xm", "C", "K"]);
        for (got, want) in fit.isotherm.params.iter().zip(&truth) {
            assert!(
                (got - want).abs() <= 1e-6 * want.abs().max(1e-9),
                "{got} vs {want}"
            );
        }
        assert!(fit.isotherm.isothermal);
    }

    /// Points at three temperatures from a temperature-dependent GAB: all five
    /// parameters come back.
    #[test]
    fn recovers_gab_temperature_terms() {
        let truth = [0.07, 9.0, 0.85, 9_000.0, 1_200.0];
        let t_ref = 313.15;
        let mut aw = Vec::new();
        let mut t = Vec::new();
        let mut x = Vec::new();
        for t_c in [25.0, 40.0, 55.0] {
            for i in 1..=8 {
                let a = 0.1 * i as f64;
                aw.push(a);
                t.push(t_c + 273.15);
                x.push(IsothermKind::Gab.moisture(&truth, a, t_c + 273.15, t_ref));
            }
        }
        let fit = fit_isotherm(IsothermKind::Gab, &aw, &t, &x, None).unwrap();
        assert!(!fit.isotherm.isothermal);
        for (got, want) in fit.isotherm.params.iter().zip(&truth) {
            assert!((got - want).abs() <= 1e-5 * want.abs(), "{got} vs {want}");
        }
    }

    #[test]
    fn every_model_fits_gab_like_data() {
        let truth = [0.08, 10.0, 0.8, 0.0, 0.0];
        let aw: Vec<f64> = (1..=12).map(|i| 0.075 * i as f64).collect();
        let t = vec![303.15; aw.len()];
        let x: Vec<f64> = aw
            .iter()
            .map(|&a| IsothermKind::Gab.moisture(&truth, a, 303.15, 303.15))
            .collect();
        for kind in super::super::ALL_KINDS {
            // BET holds only at low activity: fit it to the points up to 0.45.
            let n = if matches!(kind, IsothermKind::Bet) {
                6
            } else {
                aw.len()
            };
            let fit = fit_isotherm(kind, &aw[..n], &t[..n], &x[..n], None);
            let fit = fit.unwrap_or_else(|e| panic!("{kind:?}: {e}"));
            assert!(
                fit.result.r_squared > 0.9,
                "{kind:?}: R^2 {}",
                fit.result.r_squared
            );
        }
    }

    #[test]
    fn bet_beyond_its_range_fails_with_a_hint() {
        let truth = [0.08, 10.0, 0.8, 0.0, 0.0];
        let aw: Vec<f64> = (1..=12).map(|i| 0.075 * i as f64).collect();
        let x: Vec<f64> = aw
            .iter()
            .map(|&a| IsothermKind::Gab.moisture(&truth, a, 303.15, 303.15))
            .collect();
        let e = fit_isotherm(IsothermKind::Bet, &aw, &[303.15; 12], &x, None).unwrap_err();
        assert!(
            e.to_string().contains("outside the usual range of BET"),
            "{e}"
        );
    }

    /// The analytic GAB derivatives against central differences of the model.
    #[test]
    fn gab_derivatives_match_central_differences() {
        let p = [0.07, 9.0, 0.85, 9_000.0, 1_200.0];
        for (aw, t) in [(0.1, 298.15), (0.5, 313.15), (0.85, 328.15)] {
            let mut g = [0.0; 5];
            let x = gab_with_gradient(&p, aw, t, 313.15, &mut g);
            assert!((x - IsothermKind::Gab.moisture(&p, aw, t, 313.15)).abs() < 1e-15);
            for j in 0..5 {
                let h = 1e-6 * p[j];
                let (mut up, mut down) = (p, p);
                up[j] += h;
                down[j] -= h;
                let numeric = (IsothermKind::Gab.moisture(&up, aw, t, 313.15)
                    - IsothermKind::Gab.moisture(&down, aw, t, 313.15))
                    / (2.0 * h);
                assert!(
                    (g[j] - numeric).abs() <= 1e-6 * numeric.abs().max(1e-12),
                    "aw {aw} T {t} d/dp{j}: {} vs {numeric}",
                    g[j]
                );
            }
        }
    }

    #[test]
    fn too_few_points_is_an_error() {
        let err = fit_isotherm(
            IsothermKind::Gab,
            &[0.2, 0.5, 0.8],
            &[300.0; 3],
            &[0.05, 0.1, 0.3],
            None,
        )
        .unwrap_err();
        assert!(err.to_string().contains("at least 4 points"), "{err}");
    }

    #[test]
    fn activity_of_one_in_data_is_an_error() {
        let err = fit_isotherm(
            IsothermKind::Oswin,
            &[0.2, 0.5, 1.0],
            &[300.0; 3],
            &[0.05, 0.1, 0.3],
            None,
        )
        .unwrap_err();
        assert!(err.to_string().contains("point 3"), "{err}");
    }
}
