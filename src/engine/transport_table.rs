//! A table of the temperature functions of the humid-air transport
//! properties ([`crate::engine::transport`]): the dilute-gas viscosity and
//! conductivity of dry air (Lemmon & Jacobsen 2004) and of water vapour
//! (IAPWS R12-08, R15-11) and Wilke's two interaction factors, which depend
//! on the temperature alone. Nodes 0.125 K apart ([`grid`]) from 232 K to
//! 624 K (-41.15 to 350.85 degC), filled once per process from the exact
//! expressions with their analytic slopes; between them the cubic Hermite
//! interpolant of each.
//!
//! The interpolant's error is at most `M4 STEP^4 / 384` with `M4` a bound on
//! the magnitude of the function's fourth temperature derivative; over the
//! range, each function's fourth derivative relative to its value is at
//! most `FOURTH_MAX_RELATIVE` (in the tests: from 2e-10 per K^4 for the
//! dry air's to 1e-7 for the vapour viscosity's, each at least twice the
//! largest relative fourth difference found), so every value is within
//! 6.4e-14 of itself (4e-15 found on the table, at the cold end): far below
//! anything a design reads, and below the wet-surface solve's tolerance by
//! orders of magnitude (a relative change of 1e-13 in the Colburn factor
//! moves the surface temperature by some 1e-12 K). Outside the table, and for a temperature that is not a number,
//! the exact expressions.
//!
//! The exact functions take two exponentials, two square roots and several
//! divisions; by callgrind the table saved about 50 instructions a state
//! (the interpolation of the six costs about 120), about 100 a tray point,
//! whose wet-surface solve takes about two film states.

use std::sync::LazyLock;

use crate::engine::hermite::{self, grid};
use crate::engine::transport::{pure_gas_with_slopes, PURE_GAS_FUNCTIONS};

/// A node: each function's value and slope per node spacing.
type Node = [(f64, f64); PURE_GAS_FUNCTIONS];

static NODES: LazyLock<Vec<Node>> = LazyLock::new(|| nodes(grid::STEP));

/// The nodes of a table of spacing `step` (K) over [`grid`].
fn nodes(step: f64) -> Vec<Node> {
    grid::nodes(step, |t| {
        pure_gas_with_slopes(t).map(|(v, d)| (v, d * step))
    })
}

/// `[mu_a, k_a, mu_w, k_w, phi_aw, phi_wa]` at `t` (K) from the table (as
/// [`crate::engine::transport::pure_gas_exact`] gives them, within
/// rounding); `None` outside the table or for NaN.
#[inline]
pub(crate) fn pure_gas(t: f64) -> Option<[f64; PURE_GAS_FUNCTIONS]> {
    interpolate(&NODES, grid::STEP, t)
}

/// The interpolants of the table `nodes` of spacing `step` at `t`.
#[inline]
fn interpolate(nodes: &[Node], step: f64, t: f64) -> Option<[f64; PURE_GAS_FUNCTIONS]> {
    let (k, s) = grid::locate(t, step, nodes.len())?;
    let (a, b) = (&nodes[k], &nodes[k + 1]);
    Some(std::array::from_fn(|i| {
        hermite::value_and_slope(a[i], b[i], s).0
    }))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::hermite::grid::{ORIGIN, STEP, TOP};
    use crate::engine::transport::pure_gas_exact;

    /// A bound on the magnitude of each function's fourth temperature
    /// derivative relative to its value over the table's range, per K^4: at
    /// least twice the largest fourth difference found there
    /// ([`fourth_derivatives_are_bounded`]: 1.1e-10, 8.1e-11, 4.1e-8, 7.0e-9,
    /// 2.2e-8 and 2.8e-8, the vapour's and Wilke's largest at the cold end).
    const FOURTH_MAX_RELATIVE: [f64; PURE_GAS_FUNCTIONS] = [3e-10, 2e-10, 1e-7, 2e-8, 5e-8, 7e-8];

    fn exact(t: f64) -> [f64; PURE_GAS_FUNCTIONS] {
        pure_gas_exact(t, t.ln(), t.sqrt())
    }

    /// The analytic slopes against central differences of the exact values
    /// (step 1e-3 K: truncation near 1e-13 relative, rounding near 1e-13),
    /// within 1e-8 relative, and the values equal to the exact ones.
    #[test]
    fn slopes_are_the_derivatives() {
        let mut t = ORIGIN;
        while t <= TOP {
            let with = pure_gas_with_slopes(t);
            let (lo, hi) = (exact(t - 1e-3), exact(t + 1e-3));
            for i in 0..PURE_GAS_FUNCTIONS {
                assert_eq!(with[i].0, exact(t)[i], "{i} at {t}");
                let central = (hi[i] - lo[i]) / 2e-3;
                let scale = with[i].0.abs() / t;
                assert!(
                    (with[i].1 - central).abs() <= 1e-8 * scale,
                    "{i} at {t}: {} vs {central}",
                    with[i].1
                );
            }
            t += 0.77;
        }
    }

    /// The interpolants against the exact functions at nine points in every
    /// interval of the table and of tables 8, 32 and 64 times coarser
    /// (where the interpolation error, growing as the fourth power of the
    /// spacing, is far above rounding, so the bound is what is tested):
    /// within `FOURTH_MAX_RELATIVE step^4 / 384` of the value plus 1e-15 of
    /// it (the rounding of the two). On the two coarsest tables the largest
    /// error of each function is also over a fiftieth of its bound: the
    /// bound is not loose by orders of magnitude.
    #[test]
    fn table_values_are_within_their_bound() {
        for factor in [1.0, 8.0, 32.0, 64.0] {
            let step = STEP * factor;
            let table = nodes(step);
            let bound = FOURTH_MAX_RELATIVE.map(|m| m * step.powi(4) / 384.0);
            let mut worst = [0.0_f64; PURE_GAS_FUNCTIONS];
            for k in 0..table.len() - 1 {
                for j in 1..=9 {
                    let t = ORIGIN + (k as f64 + f64::from(j) / 10.0) * step;
                    let ours = interpolate(&table, step, t).unwrap();
                    for (i, exact) in exact(t).into_iter().enumerate() {
                        let error = (ours[i] - exact).abs() / exact.abs();
                        assert!(
                            error <= bound[i] + 1e-15,
                            "{i}, step {step} at {t} K: {error} over {}",
                            bound[i]
                        );
                        worst[i] = worst[i].max((error - 1e-15).max(0.0) / bound[i]);
                    }
                }
            }
            if factor >= 32.0 {
                for (i, w) in worst.iter().enumerate() {
                    assert!(*w > 0.02, "{i}, step {step}: worst {w} of the bound");
                }
            }
        }
    }

    /// Each of [`FOURTH_MAX_RELATIVE`] is at least twice the largest fourth
    /// difference of its exact function relative to its value (spacings 2,
    /// 4 and 8 K) over the table's range, and not more than ten times it.
    #[test]
    fn fourth_derivatives_are_bounded() {
        for (i, bound) in FOURTH_MAX_RELATIVE.into_iter().enumerate() {
            let function = |t: f64| exact(t)[i];
            let range = (ORIGIN, TOP);
            let spacings = [2.0, 4.0, 8.0];
            let found = hermite::largest_fourth_difference(function, range, &spacings, 1.0, true);
            assert!(
                bound >= 2.0 * found && bound <= 10.0 * found,
                "{i}: {found}"
            );
        }
    }

    /// Outside the table and for NaN, nothing (the caller evaluates exactly);
    /// at the first node, the node's values.
    #[test]
    fn ends_of_the_table() {
        for t in [200.0, ORIGIN - 1e-9, TOP, 700.0, f64::NAN] {
            assert!(pure_gas(t).is_none(), "{t}");
        }
        let first = pure_gas(ORIGIN).unwrap();
        assert_eq!(first, NODES[0].map(|(v, _)| v));
    }
}
