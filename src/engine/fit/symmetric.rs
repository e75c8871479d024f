//! Eigenvalues and inverse of a small symmetric matrix on the stack, for the
//! covariance of fits with few parameters (no allocation, no general SVD).
//!
//! Method: the cyclic Jacobi eigenvalue method (Golub & Van Loan,
//! *Matrix Computations*, 4th ed., sec. 8.5): plane rotations that zero one
//! off-diagonal entry each, swept over all pairs until the off-diagonal part
//! is below rounding; the rotations' product holds the eigenvectors. For a
//! symmetric matrix the absolute eigenvalues are its singular values, so
//! the conditioning test is the one an SVD gives.

// Index loops over the small arrays read like the formulas they code.
#![allow(clippy::needless_range_loop)]

/// Largest order handled here.
pub(super) const MAX_ORDER: usize = 8;

type Square = [[f64; MAX_ORDER]; MAX_ORDER];

/// Sweeps allowed; Jacobi converges quadratically, in well under ten sweeps
/// for these orders.
const MAX_SWEEPS: usize = 50;

/// Eigenvalues and eigenvectors (the columns of the second array) of the
/// symmetric `p x p` leading block of `a`; `None` when it has non-finite
/// entries or the sweeps do not converge.
fn eigen(mut a: Square, p: usize) -> Option<([f64; MAX_ORDER], Square)> {
    let mut v = [[0.0; MAX_ORDER]; MAX_ORDER];
    for i in 0..p {
        v[i][i] = 1.0;
    }
    let total: f64 = (0..p)
        .flat_map(|i| (0..p).map(move |j| (i, j)))
        .map(|(i, j)| a[i][j] * a[i][j])
        .sum();
    if !total.is_finite() {
        return None;
    }
    for _ in 0..MAX_SWEEPS {
        let off: f64 = (0..p)
            .flat_map(|i| (i + 1..p).map(move |j| (i, j)))
            .map(|(i, j)| a[i][j] * a[i][j])
            .sum();
        // Off-diagonal part below 1e-18 of the matrix (in norm): the
        // eigenvalues are then exact to rounding.
        if off <= 1e-36 * total {
            let mut values = [0.0; MAX_ORDER];
            for i in 0..p {
                values[i] = a[i][i];
            }
            return Some((values, v));
        }
        for r in 0..p {
            for s in r + 1..p {
                rotate(&mut a, &mut v, r, s, p);
            }
        }
    }
    None
}

/// The Jacobi rotation in the plane `(r, s)` that zeroes `a[r][s]`:
/// `a = J^T a J`, `v = v J`.
fn rotate(a: &mut Square, v: &mut Square, r: usize, s: usize, p: usize) {
    if a[r][s] == 0.0 {
        return;
    }
    let tau = (a[s][s] - a[r][r]) / (2.0 * a[r][s]);
    // The smaller root of t^2 + 2 tau t - 1 = 0 (rotation angle <= pi/4).
    let t = if tau >= 0.0 {
        1.0 / (tau + (1.0 + tau * tau).sqrt())
    } else {
        -1.0 / (-tau + (1.0 + tau * tau).sqrt())
    };
    let c = 1.0 / (1.0 + t * t).sqrt();
    let sn = t * c;
    for k in 0..p {
        let (akr, aks) = (a[k][r], a[k][s]);
        a[k][r] = c * akr - sn * aks;
        a[k][s] = sn * akr + c * aks;
    }
    for k in 0..p {
        let (ark, ask) = (a[r][k], a[s][k]);
        a[r][k] = c * ark - sn * ask;
        a[s][k] = sn * ark + c * ask;
    }
    a[r][s] = 0.0;
    a[s][r] = 0.0;
    for k in 0..p {
        let (vkr, vks) = (v[k][r], v[k][s]);
        v[k][r] = c * vkr - sn * vks;
        v[k][s] = sn * vkr + c * vks;
    }
}

/// Inverse (row-major) of the symmetric `p x p` matrix `m` (row-major,
/// `p <= MAX_ORDER`), refused (`None`) when the ratio of its smallest to its
/// largest absolute eigenvalue is at most `least_ratio` or it has entries
/// that are not finite.
pub(super) fn invert(m: &[f64], p: usize, least_ratio: f64) -> Option<Vec<f64>> {
    let mut a = [[0.0; MAX_ORDER]; MAX_ORDER];
    for i in 0..p {
        for j in 0..p {
            a[i][j] = m[i * p + j];
        }
    }
    let (values, v) = eigen(a, p)?;
    let magnitudes = values[..p].iter().map(|l| l.abs());
    let largest = magnitudes.clone().fold(0.0, f64::max);
    let smallest = magnitudes.fold(f64::INFINITY, f64::min);
    if largest.is_nan() || largest <= 0.0 || smallest <= largest * least_ratio {
        return None;
    }
    let mut inverse = vec![0.0; p * p];
    for i in 0..p {
        for j in 0..=i {
            let sum: f64 = (0..p).map(|k| v[i][k] * v[j][k] / values[k]).sum();
            inverse[i * p + j] = sum;
            inverse[j * p + i] = sum;
        }
    }
    Some(inverse)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Pseudo-random numbers in [-1, 1) (xorshift), for invented matrices.
    fn noise(state: &mut u64) -> f64 {
        *state ^= *state << 13;
        *state ^= *state >> 7;
        *state ^= *state << 17;
        (*state >> 11) as f64 / (1u64 << 52) as f64 - 1.0
    }

    /// `B B^T + shift I` for a random `B`: symmetric positive definite.
    fn random_spd(p: usize, shift: f64, state: &mut u64) -> Vec<f64> {
        let b: Vec<f64> = (0..p * p).map(|_| noise(state)).collect();
        let mut m = vec![0.0; p * p];
        for i in 0..p {
            for j in 0..p {
                m[i * p + j] = (0..p).map(|k| b[i * p + k] * b[j * p + k]).sum::<f64>()
                    + if i == j { shift } else { 0.0 };
            }
        }
        m
    }

    /// `M M^-1 = I` to rounding, for orders 1 to 8.
    #[test]
    fn inverse_times_matrix_is_identity() {
        let mut state = 0x1234_5678_9abc_def1;
        for p in 1..=MAX_ORDER {
            for _ in 0..20 {
                let m = random_spd(p, 0.1, &mut state);
                let inv = invert(&m, p, 1e-12).expect("well conditioned");
                for i in 0..p {
                    for j in 0..p {
                        let e: f64 = (0..p).map(|k| m[i * p + k] * inv[k * p + j]).sum();
                        let want = if i == j { 1.0 } else { 0.0 };
                        assert!((e - want).abs() < 1e-11, "p={p} ({i},{j}): {e}");
                    }
                }
            }
        }
    }

    /// Eigenvalues of a 2 x 2 matrix in closed form: `[[2, 1], [1, 2]]` has 1 and 3.
    #[test]
    fn two_by_two_eigenvalues() {
        let mut a = [[0.0; MAX_ORDER]; MAX_ORDER];
        a[0] = [2.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0];
        a[1] = [1.0, 2.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0];
        let (values, _) = eigen(a, 2).unwrap();
        let (lo, hi) = (values[0].min(values[1]), values[0].max(values[1]));
        assert!((lo - 1.0).abs() < 1e-15 && (hi - 3.0).abs() < 1e-15);
    }

    /// Unit diagonal and correlation `rho`: eigenvalues `1 - rho`, `1 + rho`,
    /// refused exactly when `(1 - rho) / (1 + rho)` is at most the ratio.
    #[test]
    fn refuses_nearly_singular_matrices() {
        for (rho, accepted) in [
            (1.0 - 1e-9, true),
            (1.0 - 1e-11, true),
            (1.0 - 1e-13, false),
            (1.0, false),
        ] {
            let m = [1.0, rho, rho, 1.0];
            assert_eq!(
                invert(&m, 2, 1e-12).is_some(),
                accepted,
                "rho = 1 - {}",
                1.0 - rho
            );
        }
        assert!(invert(&[1.0, f64::NAN, f64::NAN, 1.0], 2, 1e-12).is_none());
        assert!(invert(&[0.0; 9], 3, 1e-12).is_none());
    }
}
