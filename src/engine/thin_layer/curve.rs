//! Thin-layer models with their analytic derivatives, as a [`Model`] for the
//! fitter: the derivatives share the exponentials of the value, and `ln t` is
//! computed once per time axis, so a fit evaluates each model once per point
//! and iteration instead of once per parameter as finite differences would.

use super::ThinLayerModel;
use crate::engine::fit::batch::{self, widest_vectors};
use crate::engine::fit::{point_by_point, Model};

impl ThinLayerModel {
    /// Moisture ratio at time `t` (in the parameters' time unit) and its
    /// derivatives `d MR / d p[j]` written into `gradient`; `ln_t` is `ln t`
    /// (any value when `t` is 0, where the terms with `ln t` vanish).
    pub fn ratio_and_gradient(self, p: &[f64], t: f64, ln_t: f64, gradient: &mut [f64]) -> f64 {
        match self {
            ThinLayerModel::Lewis => {
                let e = (-p[0] * t).exp();
                gradient[0] = -t * e;
                e
            }
            ThinLayerModel::Page => power_decay(p[0], p[1], t, ln_t, gradient),
            ThinLayerModel::ModifiedPage => modified_page(p, t, gradient),
            ThinLayerModel::HendersonPabis => {
                let e = (-p[1] * t).exp();
                gradient[0] = e;
                gradient[1] = -p[0] * t * e;
                p[0] * e
            }
            ThinLayerModel::Logarithmic => {
                let e = (-p[1] * t).exp();
                gradient[0] = e;
                gradient[1] = -p[0] * t * e;
                gradient[2] = 1.0;
                p[0] * e + p[2]
            }
            ThinLayerModel::TwoTerm => two_term(p, t, gradient),
            ThinLayerModel::TwoTermExponential => two_term_exponential(p, t, gradient),
            ThinLayerModel::WangSingh => {
                gradient[0] = t;
                gradient[1] = t * t;
                1.0 + p[0] * t + p[1] * t * t
            }
            ThinLayerModel::Midilli => {
                let mut inner = [0.0; 2];
                let decay = power_decay(p[1], p[2], t, ln_t, &mut inner);
                gradient[0] = decay;
                gradient[1] = p[0] * inner[0];
                gradient[2] = p[0] * inner[1];
                gradient[3] = t;
                p[0] * decay + p[3] * t
            }
        }
    }
}

/// `exp(-k t^n)` and its derivatives in `k` and `n` (into `gradient[0..2]`),
/// with `t^n = exp(n ln t)`.
fn power_decay(k: f64, n: f64, t: f64, ln_t: f64, gradient: &mut [f64]) -> f64 {
    if t <= 0.0 {
        // t^n = 0 for n > 0 (both derivatives vanish); powf keeps n <= 0 honest.
        gradient[0] = -t.powf(n);
        gradient[1] = 0.0;
        return (-k * t.powf(n)).exp();
    }
    let tn = (n * ln_t).exp();
    let value = (-k * tn).exp();
    gradient[0] = -tn * value;
    gradient[1] = -k * tn * ln_t * value;
    value
}

/// `exp(-(k t)^n)` and its derivatives.
fn modified_page(p: &[f64], t: f64, gradient: &mut [f64]) -> f64 {
    let (k, n) = (p[0], p[1]);
    let z = k * t;
    let zn = z.powf(n);
    let value = (-zn).exp();
    gradient[0] = -n * z.powf(n - 1.0) * t * value;
    gradient[1] = if z > 0.0 { -zn * z.ln() * value } else { 0.0 };
    value
}

/// `a exp(-k0 t) + b exp(-k1 t)` and its derivatives.
fn two_term(p: &[f64], t: f64, gradient: &mut [f64]) -> f64 {
    let e0 = (-p[1] * t).exp();
    let e1 = (-p[3] * t).exp();
    gradient[0] = e0;
    gradient[1] = -p[0] * t * e0;
    gradient[2] = e1;
    gradient[3] = -p[2] * t * e1;
    p[0] * e0 + p[2] * e1
}

/// `a exp(-k t) + (1 - a) exp(-k a t)` and its derivatives.
fn two_term_exponential(p: &[f64], t: f64, gradient: &mut [f64]) -> f64 {
    let (a, k) = (p[0], p[1]);
    let e1 = (-k * t).exp();
    let e2 = (-k * a * t).exp();
    gradient[0] = e1 - e2 - (1.0 - a) * k * t * e2;
    gradient[1] = -a * t * e1 - (1.0 - a) * a * t * e2;
    a * e1 + (1.0 - a) * e2
}

/// One thin-layer model on fixed times, for the fitter.
pub(super) struct Curve<'a> {
    pub model: ThinLayerModel,
    pub t: &'a [f64],
    pub ln_t: &'a [f64],
    /// One past the last time `t <= 0` (0 when there is none): the points
    /// the vectorised Page loop leaves to the point-by-point formula.
    pub non_positive_end: usize,
}

impl<'a> Curve<'a> {
    /// `model` on times `t` with their logarithms `ln_t`.
    pub fn new(model: ThinLayerModel, t: &'a [f64], ln_t: &'a [f64]) -> Curve<'a> {
        // The times never fall (the caller checks that they rise strictly),
        // so the non-positive ones are a leading run: a binary search finds
        // its end, the same index a scan from the end would.
        debug_assert!(t.windows(2).all(|w| w[1] >= w[0]));
        let non_positive_end = t.partition_point(|&t| t <= 0.0);
        Curve {
            model,
            t,
            ln_t,
            non_positive_end,
        }
    }
}

impl Model for Curve<'_> {
    fn value(&self, params: &[f64], point: usize) -> f64 {
        self.model.ratio(params, self.t[point])
    }

    fn value_and_gradient(&self, params: &[f64], point: usize, out: &mut [f64]) -> Option<f64> {
        Some(
            self.model
                .ratio_and_gradient(params, self.t[point], self.ln_t[point], out),
        )
    }

    fn values_and_gradients(
        &self,
        params: &[f64],
        values: &mut [f64],
        gradients: &mut [f64],
    ) -> bool {
        match self.model {
            // The common case gets its own loop: two exponentials per point.
            ThinLayerModel::Page => {
                page_all(params[0], params[1], self, values, gradients);
                true
            }
            _ => point_by_point(self, params, values, gradients),
        }
    }
}

/// The Page model `exp(-k t^n)` and its derivatives at every time of `curve`
/// (by parameter: `d/dk` at every point, then `d/dn`): one branch-free loop
/// with the vectorisable exponential of [`crate::engine::fit::batch`],
/// compiled for AVX2 and AVX-512 as well for processors that have them
/// (detected at run time; all give the same bits), then the times `t <= 0`
/// (where `ln t` is no number) redone one by one.
fn page_all(k: f64, n: f64, curve: &Curve, values: &mut [f64], gradients: &mut [f64]) {
    let (by_k, by_n) = gradients.split_at_mut(values.len());
    page_loop_fastest(k, n, curve.ln_t, values, by_k, by_n);
    for (i, &t) in curve.t[..curve.non_positive_end].iter().enumerate() {
        if t <= 0.0 {
            let mut g = [0.0; 2];
            values[i] = power_decay(k, n, t, curve.ln_t[i], &mut g);
            by_k[i] = g[0];
            by_n[i] = g[1];
        }
    }
}

widest_vectors! {
    /// [`page_loop`] with the widest vector instructions the processor has
    /// (see [`widest_vectors`]).
    fn page_loop_fastest(
        k: f64,
        n: f64,
        ln_t: &[f64],
        values: &mut [f64],
        by_k: &mut [f64],
        by_n: &mut [f64],
    ) => page_loop;
}

/// `exp(-k t^n)` with `t^n = exp(n ln t)`, and its derivatives in `k` and
/// `n`, at every `ln t` (valid for `t > 0`).
#[inline(always)]
fn page_loop(k: f64, n: f64, ln_t: &[f64], values: &mut [f64], by_k: &mut [f64], by_n: &mut [f64]) {
    let points = values
        .iter_mut()
        .zip(by_k.iter_mut())
        .zip(by_n.iter_mut())
        .zip(ln_t);
    for (((v, gk), gn), &ln_t) in points {
        let tn = batch::exp(n * ln_t);
        let value = batch::exp(-k * tn);
        *gk = -tn * value;
        *gn = -k * tn * ln_t * value;
        *v = value;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Parameters for each model in its usual range (invented).
    fn sample(model: ThinLayerModel) -> Vec<f64> {
        match model {
            ThinLayerModel::Lewis => vec![0.7],
            ThinLayerModel::Page | ThinLayerModel::ModifiedPage => vec![0.5, 1.3],
            ThinLayerModel::HendersonPabis => vec![1.02, 0.6],
            ThinLayerModel::Logarithmic => vec![0.95, 0.5, 0.04],
            ThinLayerModel::TwoTerm => vec![0.7, 0.4, 0.3, 2.5],
            ThinLayerModel::TwoTermExponential => vec![1.6, 0.8],
            ThinLayerModel::WangSingh => vec![-0.4, 0.05],
            ThinLayerModel::Midilli => vec![0.98, 0.5, 1.2, -0.002],
        }
    }

    /// Analytic derivatives against central differences of `ratio`, and the
    /// value against `ratio`, for every model at several times.
    #[test]
    fn derivatives_match_central_differences() {
        for model in ThinLayerModel::ALL {
            let p = sample(model);
            for t in [0.0, 0.05, 0.7, 2.0, 5.5] {
                let mut g = vec![0.0; p.len()];
                let value = model.ratio_and_gradient(&p, t, f64::ln(t), &mut g);
                let plain = model.ratio(&p, t);
                assert!(
                    (value - plain).abs() <= 1e-14 * plain.abs().max(1.0),
                    "{model:?} t={t}"
                );
                for j in 0..p.len() {
                    let h = 1e-6 * p[j].abs().max(1e-3);
                    let (mut up, mut down) = (p.clone(), p.clone());
                    up[j] += h;
                    down[j] -= h;
                    let numeric = (model.ratio(&up, t) - model.ratio(&down, t)) / (2.0 * h);
                    assert!(
                        (g[j] - numeric).abs() <= 1e-6 * numeric.abs().max(1e-3),
                        "{model:?} t={t} d/dp{j}: analytic {} numeric {numeric}",
                        g[j]
                    );
                }
            }
        }
    }

    /// The vectorised Page loop (widest instructions of this processor)
    /// against the point-by-point formula with the library `exp`, and against
    /// the portable loop bit for bit, over times from 0 (done by `powf`) to
    /// far beyond the drying (where the value underflows to 0).
    #[test]
    fn page_loop_matches_point_by_point() {
        let t: Vec<f64> = [0.0, 0.0]
            .into_iter()
            .chain((1..400).map(|i| 1e-4 * 1.05f64.powi(i)))
            .collect();
        let ln_t: Vec<f64> = t.iter().map(|t| t.ln()).collect();
        let curve = Curve::new(ThinLayerModel::Page, &t, &ln_t);
        assert_eq!(curve.non_positive_end, 2);
        for p in [
            [0.5, 1.3],
            [2e-3, 0.7],
            [40.0, 2.5],
            [1e-6, 0.001],
            [3.0, 50.0],
        ] {
            let mut values = vec![0.0; t.len()];
            let mut gradients = vec![0.0; 2 * t.len()];
            assert!(curve.values_and_gradients(&p, &mut values, &mut gradients));
            let (mut portable_v, mut portable_g) = (values.clone(), gradients.clone());
            let (by_k, by_n) = portable_g.split_at_mut(t.len());
            page_loop(p[0], p[1], &ln_t, &mut portable_v, by_k, by_n);
            let m = t.len();
            for i in 0..t.len() {
                let mut g = [0.0; 2];
                let v = power_decay(p[0], p[1], t[i], ln_t[i], &mut g);
                // Rounding of t^n is amplified by k t^n in exp(-k t^n).
                let amplified = 8.0 + 4.0 * p[0] * t[i].powf(p[1]);
                let close =
                    |a: f64, b: f64| (a - b).abs() <= amplified * f64::EPSILON * b.abs() + 1e-300;
                assert!(
                    close(values[i], v),
                    "p={p:?} t={}: {} vs {v}",
                    t[i],
                    values[i]
                );
                for j in 0..2 {
                    assert!(
                        close(gradients[j * m + i], g[j]),
                        "p={p:?} t={} d/dp{j}",
                        t[i]
                    );
                }
                if t[i] > 0.0 {
                    assert_eq!(values[i].to_bits(), portable_v[i].to_bits());
                    assert_eq!(gradients[i].to_bits(), portable_g[i].to_bits());
                    assert_eq!(gradients[m + i].to_bits(), portable_g[m + i].to_bits());
                }
            }
        }
    }
}
