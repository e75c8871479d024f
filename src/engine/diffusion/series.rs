//! Crank's series solutions for the mean moisture ratio of a slab, an
//! infinite cylinder and a sphere with uniform initial moisture.
//!
//! `MR(Fo) = sum_n A_n exp(-beta_n^2 Fo)`, `Fo = D t / l^2`.
//!
//! Surface at equilibrium (infinite Biot number), J. Crank, *The Mathematics
//! of Diffusion*, 2nd ed. (1975), ch. 4, 5 and 6:
//! slab `beta_n = (n - 1/2) pi`, `A_n = 2/beta_n^2`; cylinder `beta_n` = n-th
//! zero of `J0`, `A_n = 4/beta_n^2`; sphere `beta_n = n pi`, `A_n = 6/beta_n^2`.
//!
//! Surface film, Biot number `L = alpha l / D` (same chapters, 'surface evaporation'):
//! slab `beta tan beta = L`, `A_n = 2L^2 / (beta^2 (beta^2 + L^2 + L))`;
//! cylinder `beta J1(beta) = L J0(beta)`, `A_n = 4L^2 / (beta^2 (beta^2 + L^2))`;
//! sphere `1 - beta cot beta = L`, `A_n = 6L^2 / (beta^2 (beta^2 + L(L - 1)))`.
//!
//! Bessel roots are computed (McMahon's asymptotic start, Newton polish on
//! libm's `j0`/`j1`), not typed from a table. Below the smallest Fourier
//! number the stored terms resolve, the short-time expansions are used
//! (Crank, same chapters; checked against the full series in the tests): slab `1 - 2 sqrt(Fo/pi)`, cylinder
//! `1 - 4 sqrt(Fo/pi) + Fo + sqrt(Fo)^3 / (3 sqrt(pi))`, sphere
//! `1 - 6 sqrt(Fo/pi) + 3 Fo`.

use std::f64::consts::PI;

use super::super::integrate::IntegrateError;
use super::super::kinetics::KineticsError;
use super::super::solve::{brent, Tolerance};
use super::Shape;

/// Terms are kept until `beta_n^2 Fo` exceeds this (exp(-45) ~ 3e-20).
const EXPONENT_CUTOFF: f64 = 45.0;

/// A truncated Crank series for one shape and Biot number.
#[derive(Debug, Clone)]
pub struct CrankSeries {
    pub shape: Shape,
    /// Biot number for mass transfer; `None` for a surface at equilibrium.
    pub biot: Option<f64>,
    /// Eigenvalues `beta_n`, ascending.
    pub roots: Vec<f64>,
    /// Coefficients `A_n` (they sum to 1).
    pub coefficients: Vec<f64>,
    /// Smallest Fourier number the stored terms resolve.
    pub min_fourier: f64,
}

impl CrankSeries {
    /// Build the series with enough terms for Fourier numbers down to
    /// `min_fourier` (clamped to 1e-8, at most about 21 000 terms).
    pub fn new(
        shape: Shape,
        biot: Option<f64>,
        min_fourier: f64,
    ) -> Result<CrankSeries, KineticsError> {
        if let Some(b) = biot {
            super::super::kinetics::positive("Biot number", b)?;
        }
        let min_fourier =
            super::super::kinetics::positive("minimum Fourier number", min_fourier)?.max(1e-8);
        let terms = ((EXPONENT_CUTOFF / min_fourier).sqrt() / PI).ceil() as usize + 2;
        let roots = match biot {
            None => equilibrium_roots(shape, terms),
            Some(b) => film_roots(shape, b, terms)?,
        };
        let coefficients = roots
            .iter()
            .map(|&beta| coefficient(shape, biot, beta))
            .collect();
        Ok(CrankSeries {
            shape,
            biot,
            roots,
            coefficients,
            min_fourier,
        })
    }

    /// Mean moisture ratio at Fourier number `fo` (>= 0).
    pub fn moisture_ratio(&self, fo: f64) -> f64 {
        if fo <= 0.0 {
            return 1.0;
        }
        if fo < self.min_fourier {
            return self.short_time(fo);
        }
        self.terms(fo).map(|(a, e)| a * e).sum()
    }

    /// `dMR/dFo` at `fo` (> 0).
    pub fn slope(&self, fo: f64) -> f64 {
        let fo = fo.max(self.min_fourier);
        self.terms(fo)
            .zip(&self.roots)
            .map(|((a, e), b)| -a * b * b * e)
            .sum()
    }

    fn terms(&self, fo: f64) -> impl Iterator<Item = (f64, f64)> + '_ {
        self.roots
            .iter()
            .zip(&self.coefficients)
            .take_while(move |(b, _)| *b * *b * fo < EXPONENT_CUTOFF)
            .map(move |(b, a)| (*a, (-b * b * fo).exp()))
    }

    /// Short-time form: equilibrium-surface expansion, bounded below by the
    /// film-limited start `1 - (s+1) L Fo` when a Biot number is given.
    fn short_time(&self, fo: f64) -> f64 {
        let root = fo.sqrt();
        let equilibrium = match self.shape {
            Shape::Slab => 1.0 - 2.0 * root / PI.sqrt(),
            Shape::Cylinder => 1.0 - 4.0 * root / PI.sqrt() + fo + root * fo / (3.0 * PI.sqrt()),
            Shape::Sphere => 1.0 - 6.0 * root / PI.sqrt() + 3.0 * fo,
        };
        match self.biot {
            None => equilibrium,
            Some(b) => equilibrium.max(1.0 - (self.shape.exponent() as f64 + 1.0) * b * fo),
        }
    }

    /// Fourier number at which the moisture ratio falls to `ratio` (0 < ratio < 1).
    ///
    /// Bracketed between the one-term estimates `ln(A1/MR)/beta1^2` (lower,
    /// since every term is positive) and `ln(1/MR)/beta1^2` (upper, since the
    /// coefficients sum to 1), then Brent's method on `ln MR`.
    pub fn fourier_for_ratio(&self, ratio: f64) -> Result<f64, KineticsError> {
        if !(ratio > 0.0 && ratio < 1.0) {
            return Err(KineticsError::OutOfRange {
                name: "target moisture ratio",
                value: ratio,
                reason: "must lie strictly between 0 and 1",
            });
        }
        // Below this the series underflows (ln MR = -inf) and no drying
        // specification needs it.
        if ratio < MIN_RATIO {
            return Err(KineticsError::OutOfRange {
                name: "target moisture ratio",
                value: ratio,
                reason: "is below 1e-12, where the series cannot be inverted",
            });
        }
        let b1 = self.roots[0];
        let upper = (1.0 / ratio).ln() / (b1 * b1);
        let lower = ((self.coefficients[0] / ratio).ln() / (b1 * b1)).max(0.0) * (1.0 - 1e-6);
        let target = ratio.ln();
        let f = |fo: f64| self.moisture_ratio(fo).ln() - target;
        root(f, lower, upper * (1.0 + 1e-12), 1e-15 * upper)
    }
}

/// Root of `f` in `[lo, hi]` to `x_tol` absolute (plus a few ulps) by the shared
/// Brent solver; a missing bracket or non-convergence is an error, never a number.
fn root<F: FnMut(f64) -> f64>(f: F, lo: f64, hi: f64, x_tol: f64) -> Result<f64, KineticsError> {
    brent(f, lo, hi, Tolerance::new(x_tol, 2.0 * f64::EPSILON))
        .map_err(|e| KineticsError::from(IntegrateError::from(e)))
}

/// Smallest moisture ratio [`CrankSeries::fourier_for_ratio`] inverts.
const MIN_RATIO: f64 = 1e-12;

fn coefficient(shape: Shape, biot: Option<f64>, beta: f64) -> f64 {
    let b2 = beta * beta;
    match (shape, biot) {
        (Shape::Slab, None) => 2.0 / b2,
        (Shape::Cylinder, None) => 4.0 / b2,
        (Shape::Sphere, None) => 6.0 / b2,
        (Shape::Slab, Some(l)) => 2.0 * l * l / (b2 * (b2 + l * l + l)),
        (Shape::Cylinder, Some(l)) => 4.0 * l * l / (b2 * (b2 + l * l)),
        (Shape::Sphere, Some(l)) => 6.0 * l * l / (b2 * (b2 + l * (l - 1.0))),
    }
}

fn equilibrium_roots(shape: Shape, terms: usize) -> Vec<f64> {
    match shape {
        Shape::Slab => (1..=terms).map(|n| (n as f64 - 0.5) * PI).collect(),
        Shape::Cylinder => (1..=terms).map(bessel_j0_zero).collect(),
        Shape::Sphere => (1..=terms).map(|n| n as f64 * PI).collect(),
    }
}

/// Roots of the film (Biot) eigenvalue equations, each in its own bracket.
fn film_roots(shape: Shape, biot: f64, terms: usize) -> Result<Vec<f64>, KineticsError> {
    let mut roots = Vec::with_capacity(terms);
    for n in 1..=terms {
        let k = n as f64;
        let root = match shape {
            // beta sin(beta) - L cos(beta) on ((n-1) pi, (n-1/2) pi)
            Shape::Slab => root(
                |b: f64| b * b.sin() - biot * b.cos(),
                (k - 1.0) * PI,
                (k - 0.5) * PI,
                1e-15 * k,
            )?,
            // beta J1 - L J0 between the (n-1)-th zero of J1 and the n-th zero of J0
            Shape::Cylinder => {
                let lo = if n == 1 { 0.0 } else { bessel_j1_zero(n - 1) };
                root(
                    |b: f64| b * libm::j1(b) - biot * libm::j0(b),
                    lo,
                    bessel_j0_zero(n),
                    1e-15 * k,
                )?
            }
            // cos(beta) + (L - 1) sin(beta)/beta on ((n-1) pi, n pi)
            Shape::Sphere => root(
                |b: f64| b.cos() + (biot - 1.0) * sinc(b),
                (k - 1.0) * PI,
                k * PI,
                1e-15 * k,
            )?,
        };
        roots.push(root);
    }
    Ok(roots)
}

fn sinc(x: f64) -> f64 {
    if x.abs() < 1e-8 {
        1.0 - x * x / 6.0
    } else {
        x.sin() / x
    }
}

/// The n-th positive zero of the Bessel function J0 (n >= 1).
///
/// McMahon's asymptotic expansion (Abramowitz & Stegun 9.5.12) as the start,
/// then Newton on `J0` with `J0' = -J1`.
pub fn bessel_j0_zero(n: usize) -> f64 {
    let beta = (n as f64 - 0.25) * PI;
    let mut x = beta + 1.0 / (8.0 * beta) - 124.0 / (3.0 * (8.0 * beta).powi(3));
    for _ in 0..8 {
        let step = libm::j0(x) / libm::j1(x);
        x += step;
        if step.abs() < 1e-15 * x {
            break;
        }
    }
    x
}

/// The n-th positive zero of the Bessel function J1 (n >= 1).
///
/// McMahon's expansion (A&S 9.5.12, mu = 4), then Newton with
/// `J1' = J0 - J1/x`.
pub fn bessel_j1_zero(n: usize) -> f64 {
    let beta = (n as f64 + 0.25) * PI;
    let mut x = beta - 3.0 / (8.0 * beta) + 36.0 / (8.0 * beta).powi(3);
    for _ in 0..8 {
        let j1 = libm::j1(x);
        let step = j1 / (libm::j0(x) - j1 / x);
        x -= step;
        if step.abs() < 1e-15 * x {
            break;
        }
    }
    x
}

#[cfg(test)]
mod tests {
    use super::*;

    /// At Fo = 0 the moisture ratio is 1, so the coefficients sum to 1
    /// (a property of every series in Crank ch. 4-6).
    #[test]
    fn coefficients_sum_to_one() {
        for shape in [Shape::Slab, Shape::Cylinder, Shape::Sphere] {
            for biot in [None, Some(0.1), Some(2.0), Some(50.0)] {
                let s = CrankSeries::new(shape, biot, 1e-6).unwrap();
                let sum: f64 = s.coefficients.iter().sum();
                // The tail of sum 1/beta^2 beyond N terms is about 1/(pi^2 N).
                let tail = 6.0 / (PI * PI * s.roots.len() as f64);
                assert!((sum - 1.0).abs() < tail, "{shape:?} {biot:?}: {sum}");
            }
        }
    }

    /// Short-time expansion and series agree where both hold.
    #[test]
    fn short_time_joins_series() {
        for shape in [Shape::Slab, Shape::Cylinder, Shape::Sphere] {
            let s = CrankSeries::new(shape, None, 1e-7).unwrap();
            let fo = 2e-5;
            let series = s.moisture_ratio(fo);
            let short = s.short_time(fo);
            assert!(
                (series - short).abs() < 1e-7,
                "{shape:?}: {series} vs {short}"
            );
        }
    }

    #[test]
    fn a_vanishing_ratio_is_refused_not_underflowed() {
        let s = CrankSeries::new(Shape::Slab, None, 1e-6).unwrap();
        assert!(s.fourier_for_ratio(1e-300).is_err());
        assert!(s.fourier_for_ratio(1e-11).is_ok());
    }

    #[test]
    fn fourier_for_ratio_inverts() {
        for shape in [Shape::Slab, Shape::Cylinder, Shape::Sphere] {
            for biot in [None, Some(1.0)] {
                let s = CrankSeries::new(shape, biot, 1e-6).unwrap();
                for target in [0.9, 0.5, 0.1, 0.01] {
                    let fo = s.fourier_for_ratio(target).unwrap();
                    assert!((s.moisture_ratio(fo) / target - 1.0).abs() < 1e-10);
                }
            }
        }
        let s = CrankSeries::new(Shape::Slab, None, 1e-6).unwrap();
        assert!(s.fourier_for_ratio(0.0).is_err());
        assert!(s.fourier_for_ratio(1.2).is_err());
    }

    /// Common practice: the last part of the moisture takes longest to
    /// remove. Removing the last 9 % (MR 0.1 -> 0.01) takes longer than the
    /// first 90 % (MR 1 -> 0.1) for a slab with a wet surface.
    #[test]
    fn last_moisture_takes_longest() {
        let s = CrankSeries::new(Shape::Slab, None, 1e-6).unwrap();
        let first = s.fourier_for_ratio(0.1).unwrap();
        let last = s.fourier_for_ratio(0.01).unwrap() - first;
        assert!(last > first, "first 90 %: {first}, last 9 %: {last}");
    }
}
