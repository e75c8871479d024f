//! A table of the ideal-gas enthalpy of dry air (Lemmon et al. 2000, relative
//! to 0 degC) over the engine's dry-bulb range, for the enthalpy of a state
//! ([`super::thermo::AirPartTerms::at`]), the enthalpy and its slopes in
//! balances ([`super::thermo::air_part_enthalpy_and_slopes`]) and the humid
//! heat ([`super::thermo::HeatTerms::at`]): nodes 0.125 K apart ([`grid`])
//! from 232 K to 624 K (-41.15 to 350.85 degC), filled once per process
//! from the exact expression, and between them the cubic Hermite
//! interpolant of the enthalpy and its exact slope (the ideal-gas specific
//! heat).
//!
//! The interpolant's error is at most `M4 STEP^4 / 384` with `M4` a bound on
//! the fourth temperature derivative of the enthalpy (`FOURTH_MAX` in the
//! tests, 2e-5 J/(kg K^4), at least twice the largest fourth difference
//! found over the range, 5.0e-6 J/(kg K^4)): about 1.3e-11 J/kg, below the
//! rounding of the exact expression itself (which subtracts the enthalpy at
//! 0 degC from `R T (1 + g)`, some 1000 T J/kg: a few 1e-10 J/kg), so a state's enthalpy, its wet-bulb and the
//! round trips through enthalpy move by rounding only (over the wet-bulb
//! digest grid of tests/air_wet_bulb_bits.rs, 897,120 states: wet-bulbs by
//! at most 5.1e-13 K, enthalpies by a few 1e-10 J/kg or one unit in the
//! last place). Outside the table, and for a temperature that is not a
//! number, the exact expression.
//!
//! The Lemmon expression takes an exponential, a square root and several
//! divisions; by callgrind the table saved about 80 instructions a state's
//! enthalpy (the interpolation itself costs about 70). The specific heat is
//! the interpolant's derivative (see [`enthalpy_and_cp`]).

use std::sync::LazyLock;

use super::thermo::dry_air_enthalpy_and_cp;
use crate::engine::hermite::{self, grid};

/// Nodes: the enthalpy (J/kg) and its slope per node spacing (J/kg).
type Nodes = Vec<(f64, f64)>;

static NODES: LazyLock<Nodes> = LazyLock::new(|| nodes(grid::STEP));

/// The nodes of a table of spacing `step` (K) over [`grid`].
fn nodes(step: f64) -> Nodes {
    grid::nodes(step, |t| {
        let (h, cp) = dry_air_enthalpy_and_cp(t);
        (h, cp * step)
    })
}

/// The ideal-gas enthalpy of dry air at `t` (K) relative to 0 degC, J/kg:
/// interpolated within the table (within 1.3e-11 J/kg of the exact
/// expression, besides rounding), exact outside it.
#[inline]
pub(super) fn dry_air_enthalpy(t: f64) -> f64 {
    enthalpy_and_cp(t).0
}

/// [`dry_air_enthalpy`] with the ideal-gas specific heat, J/(kg K): within
/// the table, the derivative of the same interpolant (within
/// `sqrt(3)/216 M4 STEP^3` = 3.2e-10 J/(kg K) of the exact value, besides
/// the rounding of the node values over the spacing, a few 1e-9 J/(kg K):
/// some 1e-12 of the specific heat), so that the specific heat is the slope
/// of the enthalpy given; exact outside.
#[inline]
pub(super) fn enthalpy_and_cp(t: f64) -> (f64, f64) {
    interpolate(&NODES, grid::STEP, t).unwrap_or_else(|| dry_air_enthalpy_and_cp(t))
}

/// The interpolant of the table `nodes` of spacing `step` at `t`, and its
/// derivative per K; `None` outside the table or for NaN.
#[inline]
fn interpolate(nodes: &[(f64, f64)], step: f64, t: f64) -> Option<(f64, f64)> {
    let (k, s) = grid::locate(t, step, nodes.len())?;
    let (h, per_step) = hermite::value_and_slope(nodes[k], nodes[k + 1], s);
    Some((h, per_step * (1.0 / step)))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::hermite::grid::{ORIGIN, STEP, TOP};

    /// A bound on the magnitude of the fourth temperature derivative of the
    /// ideal-gas enthalpy of dry air from 232 K to 624 K, J/(kg K^4):
    /// at least twice the largest fourth difference of its values found
    /// there, 5.0e-6 ([`fourth_derivative_is_bounded`]). Its Hermite
    /// remainder at the table's spacing is 1.3e-11 J/kg.
    const FOURTH_MAX: f64 = 2e-5;

    #[test]
    fn remainder_at_the_table_spacing() {
        let remainder = FOURTH_MAX * STEP.powi(4) / 384.0;
        assert!(remainder < 1.3e-11 && remainder > 1.2e-11, "{remainder}");
    }

    /// The interpolant against the exact expression at nine points in every
    /// interval of the table and of tables 4, 8 and 16 times coarser (where
    /// the interpolation error, growing as the fourth power of the spacing,
    /// is far above rounding, so the bound is what is tested): within
    /// `FOURTH_MAX step^4 / 384` plus the rounding of the two: the exact
    /// expression subtracts the enthalpy at 0 degC from `R T (1 + g)`, some
    /// 1000 T J/kg, so its rounding is a few units in the last place of that
    /// (allowed: 8 units, with the slope times one unit of T). On the
    /// coarser tables the largest error is also over a fiftieth of the
    /// bound: the bound is not loose by orders of magnitude. The same for
    /// the specific heat, the interpolant's derivative, against the exact
    /// one, with the derivative's remainder `sqrt(3)/216 M4 step^3` and the
    /// node values' rounding over the spacing.
    #[test]
    fn table_values_are_within_their_bound() {
        for factor in [1.0, 4.0, 8.0, 16.0] {
            let step = STEP * factor;
            let table = nodes(step);
            let bound = FOURTH_MAX * step.powi(4) / 384.0;
            let cp_bound = 3f64.sqrt() / 216.0 * FOURTH_MAX * step.powi(3);
            let mut worst: f64 = 0.0;
            let mut worst_cp: f64 = 0.0;
            for k in 0..table.len() - 1 {
                for i in 1..=9 {
                    let t = ORIGIN + (k as f64 + f64::from(i) / 10.0) * step;
                    let (exact, cp) = dry_air_enthalpy_and_cp(t);
                    let (ours, cp_ours) = interpolate(&table, step, t).unwrap();
                    let rounding = 8.0 * f64::EPSILON * 1010.0 * t + cp * f64::EPSILON * t;
                    let error = (ours - exact).abs();
                    assert!(
                        error <= bound + rounding,
                        "step {step} at {t} K: {error} over {bound} + {rounding}"
                    );
                    worst = worst.max((error - rounding).max(0.0) / bound);
                    // The slope: the node values' rounding over the spacing,
                    // and the exact cp's own (a few units of 1000).
                    let cp_rounding =
                        8.0 * f64::EPSILON * 1010.0 * t / step + 8.0 * f64::EPSILON * cp;
                    let cp_error = (cp_ours - cp).abs();
                    assert!(
                        cp_error <= cp_bound + cp_rounding,
                        "step {step} at {t} K: cp {cp_error} over {cp_bound} + {cp_rounding}"
                    );
                    worst_cp = worst_cp.max((cp_error - cp_rounding).max(0.0) / cp_bound);
                }
            }
            if factor > 1.0 {
                assert!(worst > 0.02, "step {step}: worst {worst} of the bound");
                assert!(
                    worst_cp > 0.02,
                    "step {step}: worst cp {worst_cp} of its bound"
                );
            }
        }
    }

    /// [`FOURTH_MAX`] is at least twice the largest fourth difference of
    /// the exact enthalpy (spacings 1, 2 and 4 K) over the table's range.
    #[test]
    fn fourth_derivative_is_bounded() {
        let h = |t: f64| dry_air_enthalpy_and_cp(t).0;
        let range = (ORIGIN, TOP);
        let largest = hermite::largest_fourth_difference(h, range, &[1.0, 2.0, 4.0], 1.0, false);
        assert!(
            FOURTH_MAX >= 2.0 * largest,
            "largest fourth difference {largest}"
        );
        assert!(
            FOURTH_MAX <= 20.0 * largest,
            "largest fourth difference {largest}"
        );
    }

    /// Outside the table, at its ends and for NaN: the exact expression,
    /// or within rounding of it at the first node.
    #[test]
    fn ends_of_the_table() {
        for t in [200.0, ORIGIN - 1e-9, TOP, 700.0] {
            assert_eq!(enthalpy_and_cp(t), dry_air_enthalpy_and_cp(t), "{t}");
        }
        assert_eq!(dry_air_enthalpy(ORIGIN), NODES[0].0);
        assert_eq!(enthalpy_and_cp(ORIGIN).1, NODES[0].1 / STEP);
        assert!(dry_air_enthalpy(f64::NAN).is_nan());
    }
}
