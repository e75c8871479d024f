//! The sums behind a converged fit's statistics, in vector lanes: one pass
//! over the residuals for the sums of squares (plain and weighted), the sum
//! of the data and the sum of relative deviations, and one pass for the
//! squares about the data's mean.
//!
//! The points are summed in [`LANES`] interleaved partial sums, added at the
//! end in a fixed order, so the result does not depend on the instruction
//! set (and differs from a sum in point order only by rounding). The sums
//! stay in one array, read and written a whole row at a time, so the
//! compiler keeps each row in a vector register.

// Index loops over the lanes read like the sums they make.
#![allow(clippy::needless_range_loop)]

use super::batch::widest_vectors;

/// Points summed side by side.
const LANES: usize = 8;

/// Sums over the residuals `r = y - f`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) struct ResidualSums {
    /// `sum r^2`.
    pub sse: f64,
    /// `sum (w r)^2`.
    pub chi2: f64,
    /// `sum y`.
    pub y_total: f64,
    /// `sum |r / y|`.
    pub relative: f64,
}

/// The sums of the residuals `r = y - f`.
pub(super) fn residual_sums(y: &[f64], weights: &[f64], residuals: &[f64]) -> ResidualSums {
    let n = y.len();
    let whole = n - n % LANES;
    let mut rows = residual_rows(&y[..whole], &weights[..whole], &residuals[..whole]);
    // The last points (fewer than LANES) go to the first lane.
    for i in whole..n {
        let (r, w, v) = (residuals[i], weights[i], y[i]);
        rows[0][0] += r * r;
        rows[1][0] += (r * w) * (r * w);
        rows[2][0] += v;
        rows[3][0] += (r / v).abs();
    }
    let [sse, chi2, y_total, relative] = rows.map(|l| total(&l));
    ResidualSums {
        sse,
        chi2,
        y_total,
        relative,
    }
}

/// `sum (y - mean)^2`.
pub(super) fn squares_about(y: &[f64], mean: f64) -> f64 {
    let n = y.len();
    let whole = n - n % LANES;
    let mut lanes = centred_lanes(&y[..whole], mean);
    for &v in &y[whole..] {
        lanes[0] += (v - mean) * (v - mean);
    }
    total(&lanes)
}

/// The lanes added in a fixed order.
fn total(l: &[f64; LANES]) -> f64 {
    ((l[0] + l[1]) + (l[2] + l[3])) + ((l[4] + l[5]) + (l[6] + l[7]))
}

widest_vectors! {
    /// [`residual_loop`], compiled for AVX2 and AVX-512 as well (see
    /// [`widest_vectors`]).
    fn residual_rows(y: &[f64], weights: &[f64], residuals: &[f64]) -> [[f64; LANES]; 4]
        => residual_loop;
}

/// The lanes of the four sums, for a whole number of blocks.
#[inline(always)]
fn residual_loop(y: &[f64], weights: &[f64], residuals: &[f64]) -> [[f64; LANES]; 4] {
    let mut rows = [[0.0; LANES]; 4];
    let blocks = y
        .chunks_exact(LANES)
        .zip(weights.chunks_exact(LANES))
        .zip(residuals.chunks_exact(LANES));
    for ((y, w), r) in blocks {
        for lane in 0..LANES {
            rows[0][lane] += r[lane] * r[lane];
        }
        for lane in 0..LANES {
            rows[1][lane] += (r[lane] * w[lane]) * (r[lane] * w[lane]);
        }
        for lane in 0..LANES {
            rows[2][lane] += y[lane];
        }
        for lane in 0..LANES {
            rows[3][lane] += (r[lane] / y[lane]).abs();
        }
    }
    rows
}

widest_vectors! {
    /// [`centred_loop`], compiled for AVX2 and AVX-512 as well.
    fn centred_lanes(y: &[f64], mean: f64) -> [f64; LANES] => centred_loop;
}

/// The lanes of `sum (y - mean)^2`, for a whole number of blocks.
#[inline(always)]
fn centred_loop(y: &[f64], mean: f64) -> [f64; LANES] {
    let mut lanes = [0.0; LANES];
    for block in y.chunks_exact(LANES) {
        for lane in 0..LANES {
            lanes[lane] += (block[lane] - mean) * (block[lane] - mean);
        }
    }
    lanes
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Invented data: `n` points with residuals of mixed sizes and signs.
    fn sample(n: usize) -> (Vec<f64>, Vec<f64>, Vec<f64>) {
        let y: Vec<f64> = (0..n).map(|i| 0.5 + (0.37 * i as f64).sin()).collect();
        let w: Vec<f64> = (0..n).map(|i| 1.0 + 0.01 * i as f64).collect();
        let f: Vec<f64> = (0..n)
            .map(|i| y[i] + 1e-3 * (1.3 * i as f64).cos())
            .collect();
        (y, w, f)
    }

    /// The lane sums against the sums in point order (to rounding) and the
    /// residuals exactly; the processor's widest variant against the
    /// portable loop bit for bit.
    #[test]
    fn lane_sums_match_sums_in_point_order() {
        for n in [203, 200, 5] {
            let (y, w, f) = sample(n);
            let residuals: Vec<f64> = y.iter().zip(&f).map(|(o, f)| o - f).collect();
            let sums = residual_sums(&y, &w, &residuals);
            let (mut sse, mut chi2, mut y_total, mut relative) = (0.0, 0.0, 0.0, 0.0);
            for i in 0..n {
                let r = y[i] - f[i];
                sse += r * r;
                chi2 += (r * w[i]) * (r * w[i]);
                y_total += y[i];
                relative += (r / y[i]).abs();
            }
            let close = |a: f64, b: f64| (a - b).abs() <= 1e-13 * b.abs();
            assert!(close(sums.sse, sse) && close(sums.chi2, chi2), "{n}");
            assert!(close(sums.y_total, y_total) && close(sums.relative, relative));
            let mean = y_total / n as f64;
            let sst: f64 = y.iter().map(|v| (v - mean) * (v - mean)).sum();
            assert!(close(squares_about(&y, mean), sst));

            let whole = n - n % LANES;
            let widest = residual_rows(&y[..whole], &w[..whole], &residuals[..whole]);
            let portable = residual_loop(&y[..whole], &w[..whole], &residuals[..whole]);
            for (a, b) in widest.iter().flatten().zip(portable.iter().flatten()) {
                assert_eq!(a.to_bits(), b.to_bits());
            }
            let widest = centred_lanes(&y[..whole], mean);
            let portable = centred_loop(&y[..whole], mean);
            for (a, b) in widest.iter().zip(&portable) {
                assert_eq!(a.to_bits(), b.to_bits());
            }
        }
    }
}
