//! A table of the saturated side of the wet-surface balance, per total
//! pressure, on each thread: the humidity ratio of air saturated at the
//! surface and the latent heat there, with their exact slopes, at nodes
//! [`STEP`] apart from -40 degC up to [`T_MAX_EXACT_SLOPE`], filled node by
//! node (in pages of 128 nodes) as solves reach them.
//!
//! Between two nodes each quantity is the cubic Hermite interpolant of its
//! values and slopes ([`crate::engine::hermite`]), with a bound on its error:
//! for the humidity ratio, which grows like the vapour pressure (and faster
//! near the boiling point), the remainder `M4 step^4 / 384` with `M4`
//! estimated from the interval's own data ([`hermite::fourth_estimate`]);
//! for the latent heat, nearly linear in temperature, the remainder with a
//! fixed bound on its fourth derivative ([`LATENT_FOURTH_MAX`]). The
//! wet-surface solve uses the interpolated values where these bounds move
//! the root of its balance by at most a thousandth of its tolerance, and
//! evaluates the saturated side exactly elsewhere (see `wet_surface::newton`).
//!
//! No table across the ice-liquid join (0 to 0.01 degC), where the slope of
//! the saturation curve jumps, nor where saturated air does not exist (at and
//! above the boiling point): there the caller evaluates exactly.

use std::cell::RefCell;

use super::surface_side::{SaturatedSurface, T_MAX_EXACT_SLOPE};
use crate::engine::air::saturation::{T_TRIPLE, T_ZERO_C};
use crate::engine::hermite;

/// Spacing of the table, K.
pub(super) const STEP: f64 = 0.01;

/// The first node, K: -40 degC, the coldest air the engine takes (a surface
/// colder than that is evaluated exactly).
const ORIGIN: f64 = T_ZERO_C - 40.0;

/// Nodes per page: a page is allocated when a solve first reaches one of its
/// nodes.
const PAGE: usize = 128;

/// A bound on the magnitude of the fourth temperature derivative of the
/// latent heat of vaporization from -40 degC to [`T_MAX_EXACT_SLOPE`],
/// J/(kg K^4): twice the largest fourth difference of its values found there
/// (`tests::latent_fourth_derivative_is_bounded`). Its Hermite remainder at
/// [`STEP`] is about 8e-12 J/kg, below the rounding of the latent heat.
pub(super) const LATENT_FOURTH_MAX: f64 = 0.3;

/// The saturated side at a surface temperature from the table, with bounds
/// on the errors of its humidity ratio (kg/kg dry air) and latent heat
/// (J/kg). The slopes are the interpolants' own (the derivatives of the
/// values given, not the exact slopes).
#[derive(Clone, Copy, Debug)]
pub(super) struct Interpolated {
    pub side: SaturatedSurface,
    pub w_error: f64,
    pub latent_error: f64,
}

/// The nodes at one pressure.
pub(super) struct Table {
    /// Total pressure, Pa (compared by its bits).
    p: f64,
    step: f64,
    /// `1 / step`, 1/K.
    per_step: f64,
    /// Number of nodes.
    len: usize,
    /// Node k in page `k / PAGE`: `w` NaN until filled, infinite where
    /// saturated air does not exist.
    pages: Vec<Option<Box<[Node; PAGE]>>>,
}

/// The saturated side at a node, its slopes per node spacing (as the
/// interpolant takes them).
#[derive(Clone, Copy, Debug)]
struct Node {
    w: f64,
    w_slope: f64,
    latent: f64,
    latent_slope: f64,
}

thread_local! {
    /// The table of the last pressure used on this thread.
    static TABLE: RefCell<Option<Table>> = const { RefCell::new(None) };
}

/// Run `f` on this thread's table of total pressure `p` (Pa), replaced when
/// `p` differs from the last pressure used. `f` must not use the table
/// through this function itself.
pub(super) fn with_table<R>(p: f64, f: impl FnOnce(&mut Table) -> R) -> R {
    TABLE.with(|cell| {
        let mut cell = cell.borrow_mut();
        let table = match cell.as_mut() {
            Some(table) if table.p.to_bits() == p.to_bits() => table,
            _ => cell.insert(Table::new(p, STEP)),
        };
        f(table)
    })
}

impl Table {
    fn new(p: f64, step: f64) -> Table {
        let len = ((T_MAX_EXACT_SLOPE - ORIGIN) / step + 1e-9).floor() as usize + 1;
        Table {
            p,
            step,
            per_step: 1.0 / step,
            len,
            pages: (0..len.div_ceil(PAGE)).map(|_| None).collect(),
        }
    }

    /// Node k, filled on first use; `None` where saturated air does not
    /// exist there.
    #[inline(always)]
    fn node(&mut self, k: usize) -> Option<Node> {
        let stored = match &self.pages[k / PAGE] {
            Some(page) if !page[k % PAGE].w.is_nan() => page[k % PAGE],
            _ => self.fill_node(k),
        };
        stored.w.is_finite().then_some(stored)
    }

    /// Fill node k on first use, allocating its page if need be.
    #[cold]
    #[inline(never)]
    fn fill_node(&mut self, k: usize) -> Node {
        let step = self.step;
        let t = ORIGIN + k as f64 * step;
        let node = match SaturatedSurface::at(t, self.p) {
            Some(x) => Node {
                w: x.w,
                w_slope: x.dw * step,
                latent: x.latent,
                latent_slope: x.dlatent * step,
            },
            None => Node {
                w: f64::INFINITY,
                w_slope: f64::INFINITY,
                latent: f64::INFINITY,
                latent_slope: f64::INFINITY,
            },
        };
        let page = self.pages[k / PAGE].get_or_insert_with(|| {
            let unset = Node {
                w: f64::NAN,
                w_slope: f64::NAN,
                latent: f64::NAN,
                latent_slope: f64::NAN,
            };
            Box::new([unset; PAGE])
        });
        page[k % PAGE] = node;
        node
    }

    /// The saturated side at surface temperature `ts` (K) from the table,
    /// with its error bounds; `None` where the table does not apply (outside
    /// it, across the ice-liquid join, where saturated air does not exist at
    /// a node, or where the growth of the humidity ratio is not smooth
    /// enough for its bound): the caller then evaluates exactly.
    #[inline]
    pub(super) fn at(&mut self, ts: f64) -> Option<Interpolated> {
        let x = (ts - ORIGIN) * self.per_step;
        if x.is_nan() || x < 0.0 {
            return None;
        }
        let k = x as usize;
        if k + 1 >= self.len {
            return None;
        }
        let step = self.step;
        let lower = ORIGIN + k as f64 * step;
        if lower < T_TRIPLE && lower + step > T_ZERO_C {
            return None;
        }
        let (a, b) = (self.node(k)?, self.node(k + 1)?);
        // In [0, 1): the position within the interval.
        let s = x - k as f64;
        let w_ends = ((a.w, a.w_slope), (b.w, b.w_slope));
        let fourth = hermite::fourth_estimate(hermite::end_curvatures(w_ends.0, w_ends.1))?;
        let (w, dw) = hermite::value_and_slope(w_ends.0, w_ends.1, s);
        let (latent, dlatent) =
            hermite::value_and_slope((a.latent, a.latent_slope), (b.latent, b.latent_slope), s);
        let step2 = step * step;
        Some(Interpolated {
            side: SaturatedSurface {
                w,
                dw: dw * self.per_step,
                latent,
                dlatent: dlatent * self.per_step,
            },
            w_error: fourth * (1.0 / 384.0),
            latent_error: LATENT_FOURTH_MAX * step2 * step2 * (1.0 / 384.0),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::surface_side::latent_heat_and_slope;
    use super::*;
    use crate::engine::air::thermo::EPSILON;

    /// Every node of a table of spacing `step` (up to the last) sampled at
    /// nine points inside each interval: every interval within 2 K of the
    /// ice-liquid join, and about 600 spread evenly over the rest.
    fn samples(len: usize, step: f64) -> impl Iterator<Item = f64> {
        let intervals = len - 1;
        let join = ((T_ZERO_C - ORIGIN) / step) as usize;
        let near = (2.0 / step) as usize;
        let stride = (intervals / 600).max(1);
        (0..intervals)
            .filter(move |&k| k % stride == 0 || k.abs_diff(join) < near)
            .flat_map(move |k| {
                (1..10).map(move |i| ORIGIN + (k as f64 + f64::from(i) / 10.0) * step)
            })
    }

    /// The interpolated humidity ratio and latent heat lie within their
    /// bounds of the exact saturated side, plus the rounding of the two
    /// evaluations, found between neighbouring temperatures: 2e-14 relative
    /// for the humidity ratio (the vapour pressure is the exponential of a
    /// sum of terms up to about 30 in magnitude, each rounded; up to 1.1e-14
    /// found), times `p / (p - p_vs) = 1 + w / 0.622` (the rounding of
    /// `p - p_vs` in `w`), 1e-13 for the latent heat (its vapour density is the
    /// exponential of a sum near -10 at -40 degC; up to 4e-14 found), at pressures from 20 kPa to 1 MPa, on the engine's
    /// table and on tables 5, 10 and 25 times coarser, where the
    /// interpolation error is far above rounding and the bound itself is
    /// tested. On the engine's table at 50 to 200 kPa, the humidity ratio's
    /// bound over its slope (what it would move a root by) is within 5e-13 K
    /// (the wet-surface solve's criterion, half its 1e-12 K allowance) on
    /// nearly every interval from -40 degC to 15 K below the boiling point:
    /// the table applies there. (Closer to the boiling point the humidity
    /// ratio grows ever faster and the solve evaluates exactly.)
    #[test]
    fn table_values_are_within_their_bounds() {
        let mut worst_w: f64 = 0.0;
        let mut worst_latent: f64 = 0.0;
        for p in [20e3, 50e3, 101_325.0, 150e3, 200e3, 1e6] {
            let boiling = crate::engine::air::saturation::boiling_point(p).unwrap();
            for factor in [1.0, 5.0, 10.0, 25.0] {
                let mut table = Table::new(p, STEP * factor);
                let (mut tight, mut below_boiling) = (0, 0);
                for t in samples(table.len, table.step) {
                    let exact = SaturatedSurface::at(t, p);
                    let Some(got) = table.at(t) else {
                        if t < boiling - 15.0 && !(T_ZERO_C - 0.1..=T_TRIPLE + 0.1).contains(&t) {
                            below_boiling += 1;
                        }
                        continue;
                    };
                    let exact = exact.expect("the table applies only where the side exists");
                    let w_rounding = 2e-14 * (1.0 + exact.w / EPSILON);
                    let latent_rounding = 1e-13;
                    for (name, value, want, bound, rounding, worst) in [
                        (
                            "w",
                            got.side.w,
                            exact.w,
                            got.w_error,
                            w_rounding,
                            &mut worst_w,
                        ),
                        (
                            "L",
                            got.side.latent,
                            exact.latent,
                            got.latent_error,
                            latent_rounding,
                            &mut worst_latent,
                        ),
                    ] {
                        let off = (value - want).abs();
                        assert!(
                            off <= bound + rounding * want,
                            "{name} at {t} K, {p} Pa, step {}: {value} vs {want} (bound {bound})",
                            table.step,
                        );
                        if bound > 0.0 && off > rounding * want {
                            *worst = worst.max(off / bound);
                        }
                    }
                    if t < boiling - 15.0 {
                        below_boiling += 1;
                        if got.w_error <= 5e-13 * exact.dw {
                            tight += 1;
                        }
                    }
                }
                if factor == 1.0 && (50e3..=200e3).contains(&p) {
                    assert!(
                        tight * 100 >= below_boiling * 99,
                        "{p} Pa: {tight} of {below_boiling}"
                    );
                }
            }
        }
        eprintln!("worst error over bound: w {worst_w}, latent heat {worst_latent}");
        // The bounds are not loose by orders of magnitude.
        assert!(worst_w > 0.02 && worst_w <= 1.0, "{worst_w}");
        assert!(worst_latent > 0.02 && worst_latent <= 1.0, "{worst_latent}");
    }

    /// [`LATENT_FOURTH_MAX`] is at least twice the largest fourth difference
    /// (spacings 0.5, 1 and 2 K, where rounding stays far below it) of the
    /// latent heat over the table's range.
    #[test]
    fn latent_fourth_derivative_is_bounded() {
        let latent = |t: f64| latent_heat_and_slope(t).0;
        let range = (ORIGIN, T_MAX_EXACT_SLOPE);
        let worst =
            hermite::largest_fourth_difference(latent, range, &[0.5, 1.0, 2.0], 0.25, false);
        assert!(2.0 * worst <= LATENT_FOURTH_MAX, "{worst}");
        assert!(worst > 0.02, "{worst}");
    }

    /// No value across the ice-liquid join, outside the table, or for NaN;
    /// a new pressure replaces the table.
    #[test]
    fn where_the_table_does_not_apply() {
        let p = 101_325.0;
        let interpolated = |ts: f64, p: f64| with_table(p, |table| table.at(ts));
        assert!(interpolated(T_ZERO_C + 0.005, p).is_none());
        assert!(interpolated(ORIGIN - 0.5, p).is_none());
        assert!(interpolated(T_MAX_EXACT_SLOPE + 0.5, p).is_none());
        assert!(interpolated(f64::NAN, p).is_none());
        // Above the boiling point saturated air does not exist.
        assert!(interpolated(T_ZERO_C + 101.0, p).is_none());
        let near = interpolated(T_ZERO_C + 50.003, p).unwrap();
        let other = interpolated(T_ZERO_C + 50.003, 2.0 * p).unwrap();
        assert!(other.side.w < 0.6 * near.side.w);
        let again = interpolated(T_ZERO_C + 50.003, p).unwrap();
        assert_eq!(again.side.w.to_bits(), near.side.w.to_bits());
    }
}
