//! Probability distributions of uncertain inputs, seeded sampling and the
//! summary statistics of Monte Carlo results.
//!
//! Everything here works on SI magnitudes (`f64`). Sampling is reproducible
//! independently of threading: sample `i` of a study draws from its own
//! ChaCha8 stream `i` of the study's seed ([`sample_stream`]), so the same seed
//! gives the same samples on one thread or many.

use std::fmt;

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution, StandardNormal};

/// A distribution of one uncertain input, in SI magnitudes.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Shape {
    /// Normal (Gaussian) with mean and standard deviation.
    Normal { mean: f64, std: f64 },
    /// Uniform between `lo` and `hi`.
    Uniform { lo: f64, hi: f64 },
    /// Triangular between `lo` and `hi` with its peak at `mode`.
    Triangular { lo: f64, mode: f64, hi: f64 },
    /// Log-normal given by the mean and standard deviation of the value itself
    /// (not of its logarithm); the value is always positive.
    LogNormal { mean: f64, std: f64 },
}

/// Why distribution parameters are refused.
#[derive(Clone, Debug, PartialEq)]
pub enum ShapeError {
    /// A parameter is NaN or infinite.
    NotFinite(&'static str),
    /// A spread (std) that is zero or negative.
    SpreadNotPositive(&'static str),
    /// `lo` is not below `hi`.
    EmptyInterval,
    /// The mode of a triangular distribution lies outside `lo..hi`.
    ModeOutside,
    /// A log-normal needs a positive mean.
    MeanNotPositive,
}

impl fmt::Display for ShapeError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ShapeError::NotFinite(p) => write!(f, "`{p}` is not a finite number"),
            ShapeError::SpreadNotPositive(p) => write!(f, "`{p}` must be positive"),
            ShapeError::EmptyInterval => write!(f, "the low end must be below the high end"),
            ShapeError::ModeOutside => write!(f, "the mode must lie between the low and high ends"),
            ShapeError::MeanNotPositive => {
                write!(
                    f,
                    "a log-normal value is always positive, so its mean must be positive"
                )
            }
        }
    }
}

impl std::error::Error for ShapeError {}

fn finite(name: &'static str, x: f64) -> Result<(), ShapeError> {
    if x.is_finite() {
        Ok(())
    } else {
        Err(ShapeError::NotFinite(name))
    }
}

impl Shape {
    /// A normal distribution; `std` must be positive.
    pub fn normal(mean: f64, std: f64) -> Result<Shape, ShapeError> {
        finite("mean", mean)?;
        finite("std", std)?;
        if std <= 0.0 {
            return Err(ShapeError::SpreadNotPositive("std"));
        }
        Ok(Shape::Normal { mean, std })
    }

    /// A uniform distribution on `lo..hi`, `lo < hi`.
    pub fn uniform(lo: f64, hi: f64) -> Result<Shape, ShapeError> {
        finite("lo", lo)?;
        finite("hi", hi)?;
        if lo >= hi {
            return Err(ShapeError::EmptyInterval);
        }
        Ok(Shape::Uniform { lo, hi })
    }

    /// A triangular distribution, `lo <= mode <= hi`, `lo < hi`.
    pub fn triangular(lo: f64, mode: f64, hi: f64) -> Result<Shape, ShapeError> {
        finite("lo", lo)?;
        finite("mode", mode)?;
        finite("hi", hi)?;
        if lo >= hi {
            return Err(ShapeError::EmptyInterval);
        }
        if mode < lo || mode > hi {
            return Err(ShapeError::ModeOutside);
        }
        Ok(Shape::Triangular { lo, mode, hi })
    }

    /// A log-normal distribution from the mean and std of the value.
    pub fn lognormal(mean: f64, std: f64) -> Result<Shape, ShapeError> {
        finite("mean", mean)?;
        finite("std", std)?;
        if mean <= 0.0 {
            return Err(ShapeError::MeanNotPositive);
        }
        if std <= 0.0 {
            return Err(ShapeError::SpreadNotPositive("std"));
        }
        Ok(Shape::LogNormal { mean, std })
    }

    /// The mean (expected value).
    pub fn mean(&self) -> f64 {
        match *self {
            Shape::Normal { mean, .. } | Shape::LogNormal { mean, .. } => mean,
            Shape::Uniform { lo, hi } => 0.5 * (lo + hi),
            Shape::Triangular { lo, mode, hi } => (lo + mode + hi) / 3.0,
        }
    }

    /// The standard deviation.
    pub fn std(&self) -> f64 {
        match *self {
            Shape::Normal { std, .. } | Shape::LogNormal { std, .. } => std,
            Shape::Uniform { lo, hi } => (hi - lo) / 12f64.sqrt(),
            Shape::Triangular { lo, mode, hi } => {
                ((lo * lo + mode * mode + hi * hi - lo * mode - lo * hi - mode * hi) / 18.0).sqrt()
            }
        }
    }

    /// The name of the shape, for tables and messages.
    pub fn name(&self) -> &'static str {
        match self {
            Shape::Normal { .. } => "normal",
            Shape::Uniform { .. } => "uniform",
            Shape::Triangular { .. } => "triangular",
            Shape::LogNormal { .. } => "lognormal",
        }
    }

    /// Draw one value. Normal and log-normal use rand_distr's standard normal
    /// (ziggurat); uniform and triangular invert their distribution functions.
    pub fn sample<R: Rng + ?Sized>(&self, rng: &mut R) -> f64 {
        match *self {
            Shape::Normal { mean, std } => {
                let z: f64 = StandardNormal.sample(rng);
                mean + std * z
            }
            Shape::Uniform { lo, hi } => lo + (hi - lo) * rng.random::<f64>(),
            Shape::Triangular { lo, mode, hi } => triangular_inverse(lo, mode, hi, rng.random()),
            Shape::LogNormal { mean, std } => {
                let sigma2 = (1.0 + (std / mean).powi(2)).ln();
                let mu = mean.ln() - 0.5 * sigma2;
                let z: f64 = StandardNormal.sample(rng);
                (mu + sigma2.sqrt() * z).exp()
            }
        }
    }
}

/// Inverse distribution function of the triangular distribution at `u` in 0..1.
fn triangular_inverse(lo: f64, mode: f64, hi: f64, u: f64) -> f64 {
    let split = (mode - lo) / (hi - lo);
    if u < split {
        lo + (u * (hi - lo) * (mode - lo)).sqrt()
    } else {
        hi - ((1.0 - u) * (hi - lo) * (hi - mode)).sqrt()
    }
}

/// The random stream of sample `index` of a study with `seed`: ChaCha8 keyed
/// by the seed, on stream number `index`. Independent of thread scheduling.
pub fn sample_stream(seed: u64, index: u64) -> ChaCha8Rng {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    rng.set_stream(index);
    rng
}

/// Summary statistics of a sample.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Summary {
    pub count: usize,
    pub mean: f64,
    /// Sample standard deviation (divisor n - 1).
    pub std: f64,
    pub min: f64,
    pub p5: f64,
    pub p50: f64,
    pub p95: f64,
    pub max: f64,
}

/// Mean, standard deviation and percentiles of `values` (two-pass, summed in
/// index order, so the result does not depend on threading). `None` when empty.
pub fn summarise(values: &[f64]) -> Option<Summary> {
    let n = values.len();
    if n == 0 {
        return None;
    }
    let mean = values.iter().sum::<f64>() / n as f64;
    let var = if n > 1 {
        values.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1) as f64
    } else {
        0.0
    };
    let mut sorted = values.to_vec();
    sorted.sort_by(f64::total_cmp);
    Some(Summary {
        count: n,
        mean,
        std: var.sqrt(),
        min: sorted[0],
        p5: percentile(&sorted, 5.0),
        p50: percentile(&sorted, 50.0),
        p95: percentile(&sorted, 95.0),
        max: sorted[n - 1],
    })
}

/// The `p`-th percentile (0..100) of sorted values, by linear interpolation
/// between closest ranks (the "type 7" definition, common practice).
pub fn percentile(sorted: &[f64], p: f64) -> f64 {
    if sorted.is_empty() {
        return f64::NAN;
    }
    let h = (sorted.len() - 1) as f64 * (p / 100.0).clamp(0.0, 1.0);
    let i = h.floor() as usize;
    let j = (i + 1).min(sorted.len() - 1);
    sorted[i] + (h - i as f64) * (sorted[j] - sorted[i])
}

/// Histogram of `values` with `bins` equal bins from min to max: the bin edges
/// (`bins + 1`) and the counts (`bins`).
pub fn histogram(values: &[f64], bins: usize) -> (Vec<f64>, Vec<usize>) {
    let bins = bins.max(1);
    let lo = values.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if values.is_empty() || !lo.is_finite() || !hi.is_finite() {
        return (Vec::new(), Vec::new());
    }
    let width = if hi > lo {
        (hi - lo) / bins as f64
    } else {
        1.0
    };
    let edges = (0..=bins).map(|i| lo + width * i as f64).collect();
    let mut counts = vec![0usize; bins];
    for x in values {
        let k = (((x - lo) / width) as usize).min(bins - 1);
        counts[k] += 1;
    }
    (edges, counts)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_parameters_are_refused() {
        assert_eq!(
            Shape::normal(1.0, 0.0),
            Err(ShapeError::SpreadNotPositive("std"))
        );
        assert_eq!(Shape::uniform(2.0, 1.0), Err(ShapeError::EmptyInterval));
        assert_eq!(
            Shape::triangular(0.0, 3.0, 2.0),
            Err(ShapeError::ModeOutside)
        );
        assert_eq!(
            Shape::lognormal(-1.0, 1.0),
            Err(ShapeError::MeanNotPositive)
        );
        assert_eq!(
            Shape::normal(f64::NAN, 1.0),
            Err(ShapeError::NotFinite("mean"))
        );
    }

    #[test]
    fn percentiles_interpolate_between_ranks() {
        let v = [1.0, 2.0, 3.0, 4.0, 5.0];
        assert_eq!(percentile(&v, 50.0), 3.0);
        assert_eq!(percentile(&v, 25.0), 2.0);
        assert!((percentile(&v, 5.0) - 1.2).abs() < 1e-12);
    }

    #[test]
    fn sample_moments_match_each_shape() {
        // Sampling error of the mean is std/sqrt(n); allow 5 of them.
        let shapes = [
            Shape::normal(3.0, 0.5).unwrap(),
            Shape::uniform(-1.0, 2.0).unwrap(),
            Shape::triangular(0.0, 1.0, 4.0).unwrap(),
            Shape::lognormal(2.0, 0.8).unwrap(),
        ];
        let n = 40_000;
        for s in shapes {
            let x: Vec<f64> = (0..n).map(|i| s.sample(&mut sample_stream(7, i))).collect();
            let sum = summarise(&x).unwrap();
            let se = s.std() / (n as f64).sqrt();
            assert!((sum.mean - s.mean()).abs() < 5.0 * se, "{s:?}: {sum:?}");
            assert!((sum.std / s.std() - 1.0).abs() < 0.03, "{s:?}: {sum:?}");
        }
    }

    #[test]
    fn histogram_counts_every_value() {
        let v: Vec<f64> = (0..100).map(f64::from).collect();
        let (edges, counts) = histogram(&v, 10);
        assert_eq!(edges.len(), 11);
        assert_eq!(counts.iter().sum::<usize>(), 100);
        assert!(counts.iter().all(|&c| c == 10));
    }
}
