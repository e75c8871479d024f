//! What the humid-air engine keeps per total pressure, on each thread: the
//! boiling limits, and tables of the wet-bulb balance on a 0.005 K grid of
//! trial wet-bulbs, filled node by node (in pages of 128 nodes) as states ask
//! for them. A sweep at one pressure solves for the boiling point once and
//! evaluates each node of the tables once; a state at a new pressure replaces
//! them.
//!
//! The table holds, at T_k = 0 degC + k 0.005 K (liquid water, up to the top
//! of the wet-bulb bracket; over ice from -100 degC), the enthalpy
//! `G = h(T*, w_s*) - w_s* h_c(T*)` of the balance `G(T*) + w h_c(T*) = h1` and
//! its exact slope. Cubic Hermite interpolation between two nodes, inverted,
//! gives a root with a bound on its distance from the balance's own root
//! (`interval_bounds`, from the interpolant's second and third
//! derivatives); where that bound is within the solver's tolerance, 1e-13 K
//! (most of the range below a few kelvin under the boiling point), the
//! wet-bulb is that root with no exact evaluation at all
//! (`state::TABLE_MAX_ERROR`). Elsewhere the interpolant's second derivative at
//! the two ends bounds the balance's over the interval: with it, one exact
//! Newton step from the table's root is proven to land within 1e-14 K of the
//! root (`state::wet_bulb_one_step`), else the solve goes on.
//! A coarser 0.25 K table of the saturation pressure starts the dew-point
//! solve.
//!
//! Each wet-bulb table keeps the last root it gave on this thread; the next
//! search begins there, moved by one Newton step for the new state, when that
//! is within 2 K (a sweep steps through neighbouring states: over the
//! 100,000 states of the air benchmark's sweep the search took 1.07 passes a
//! state, each reading one or two nodes, instead of 3.11). The search finds
//! the same interval from any start, so results do not depend on the order
//! of states.

use std::cell::RefCell;

use super::saturation::{self as sat, T_ZERO_C};
use super::state::{ws_of, SaturatedSide};
use super::thermo;
use super::AirError;
use crate::engine::hermite;

/// Where humid air at one total pressure stops being saturable.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) struct BoilingLimits {
    /// Total pressure, Pa.
    pub p_pa: f64,
    /// Boiling point of water at p (where `f p_ws = p`), K.
    pub boiling_k: f64,
    /// Highest temperature below it, on a 0.02 K grid down from the IF97
    /// backward equation, where saturated air exists: the top of the wet-bulb
    /// bracket for dry-bulbs above the boiling point, K.
    pub wet_bulb_cap_k: f64,
}

/// Spacing of the wet-bulb tables, K.
pub(super) const STEP: f64 = 0.005;

/// Spacing of the saturation table (where dew-point solves start), K.
const SATURATION_STEP: f64 = 0.25;

/// Nodes per page of a table: a page is allocated when a state first reaches
/// one of its nodes, so a state at a new pressure allocates a few pages, not
/// the whole fine table.
const PAGE: usize = 128;

/// Where a table puts the root, with what the wet-bulb solve needs to know
/// whether one exact Newton step from there is enough.
#[derive(Clone, Copy, Debug)]
pub(super) struct TableStart {
    /// The root of the interpolant, K.
    pub t: f64,
    /// The interval it lies in (between nodes `interval` and `interval + 1`).
    pub interval: usize,
    /// The larger magnitude of the interpolant's second derivative at the two
    /// ends of the interval (it is linear in between, so this is its maximum
    /// there), units of the table per K^2; infinite when the two ends differ by
    /// more than a factor 1.5 (the curvature changes fast, as next to the
    /// boiling point, and the ends do not bound it).
    pub curvature: f64,
    /// A bound on the distance from `t` to the root of the tabulated function
    /// itself, K (see [`interval_bounds`]); infinite where none holds.
    pub error_k: f64,
    /// The slope of the table at the lower node of the interval, units of the
    /// table per K.
    pub slope: f64,
}

/// The last wet-bulb root a table gave on this thread, for the next search to
/// begin from when the next state is close to it (a sweep steps through
/// neighbouring states).
#[derive(Clone, Copy, Debug)]
struct LastRoot {
    /// The state's humidity ratio, kg/kg dry air, and enthalpy, J/kg dry air.
    w: f64,
    h1: f64,
    /// The root, K, and the table's slope at the lower node of its
    /// interval ([`TableStart::slope`]), J/(kg K).
    t: f64,
    slope: f64,
}

/// How far (K) a start predicted from the last root may lie from it and still
/// be used. A prediction that moves 2 K is off by about half the balance's
/// second derivative over its slope (roughly 0.1 per K or less below 90 degC,
/// an estimate) times the move squared, a few tenths of a kelvin, and one
/// Newton step on the nodes from there lands in or next to the root's
/// interval; a start from the rough estimate is often farther off.
const WARM_REACH_K: f64 = 2.0;

/// `PAGE` consecutive nodes, `(value, slope)`.
type Page = [(f64, f64); PAGE];

/// Nodes of an increasing function of temperature at `origin + k step`.
struct Grid {
    origin: f64,
    step: f64,
    /// Number of nodes.
    len: usize,
    /// `(value, slope)` at node k in page `k / PAGE`; NaN until first used.
    pages: Vec<Option<Box<Page>>>,
}

/// The limits and the tables at one pressure: the wet-bulb balance over liquid
/// water from 0 degC up to the top of the bracket and over ice from -100 to
/// 0 degC; `ln(f p_ws)` from -100 degC up to the top of the bracket.
pub(super) struct PressureCache {
    limits: BoilingLimits,
    liquid: Grid,
    ice: Grid,
    saturation: Grid,
    /// `f p_ws` at -100 degC, Pa: the lowest dew point's vapour pressure.
    lowest_pvs: f64,
    /// The last root found over liquid water and over ice.
    last_root: [Option<LastRoot>; 2],
}

#[cfg(test)]
thread_local! {
    /// Searches begun from the last root, on this thread (for the tests).
    static WARM_STARTS: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

thread_local! {
    /// The cache of the last pressure used on this thread.
    static CACHE: RefCell<Option<PressureCache>> = const { RefCell::new(None) };
}

/// Run `f` on the cache of pressure `p` (Pa): this thread's, or a new one
/// (the boiling limits computed, the wet-bulb tables empty) when `p` differs
/// from the last pressure used. `f` must not use the cache itself.
pub(super) fn with_pressure<R>(
    p: f64,
    f: impl FnOnce(&mut PressureCache) -> Result<R, AirError>,
) -> Result<R, AirError> {
    CACHE.with(|cell| {
        let mut cell = cell.borrow_mut();
        match cell.as_mut() {
            Some(cache) if cache.limits.p_pa == p => f(cache),
            _ => f(cell.insert(PressureCache::new(p)?)),
        }
    })
}

impl PressureCache {
    fn new(p: f64) -> Result<PressureCache, AirError> {
        let limits = BoilingLimits {
            p_pa: p,
            boiling_k: sat::boiling_point(p).map_err(|e| AirError::NotConverged {
                what: "boiling point",
                reason: e,
            })?,
            wet_bulb_cap_k: wet_bulb_cap_k(p)?,
        };
        let cap = limits.wet_bulb_cap_k;
        let lowest = sat::T_MIN_SATURATION;
        Ok(PressureCache {
            limits,
            liquid: Grid::new(T_ZERO_C, STEP, node_count(T_ZERO_C, cap, STEP)),
            ice: Grid::new(lowest, STEP, node_count(lowest, T_ZERO_C.min(cap), STEP)),
            saturation: Grid::new(
                lowest,
                SATURATION_STEP,
                node_count(lowest, cap, SATURATION_STEP),
            ),
            lowest_pvs: sat::saturated_vapour_pressure(lowest, p),
            last_root: [None; 2],
        })
    }

    /// The boiling limits at this pressure.
    pub(super) fn limits(&self) -> BoilingLimits {
        self.limits
    }

    /// `f p_ws` at -100 degC at this pressure, Pa.
    pub(super) fn lowest_saturation_pressure(&self) -> f64 {
        self.lowest_pvs
    }

    /// A start for the wet-bulb of air with humidity ratio `w` and enthalpy
    /// `h1` (J/kg dry air), over ice or liquid water, from the table: `None`
    /// when the root is not between two nodes.
    ///
    /// The search of the table begins at `rough()` (K), or, when the last root
    /// this table gave is close, at that root moved by one Newton step for the
    /// change in `w` and `h1` (within [`WARM_REACH_K`] of it). Where it begins
    /// sets only how many nodes the search reads: the interval it finds, and so
    /// everything returned, is the same from any start
    /// ([`Grid::invert`]).
    pub(super) fn wet_bulb_start(
        &mut self,
        w: f64,
        h1: f64,
        rough: impl FnOnce() -> f64,
        ice: bool,
    ) -> Option<TableStart> {
        let p = self.limits.p_pa;
        let (grid, last) = if ice {
            (&mut self.ice, &mut self.last_root[1])
        } else {
            (&mut self.liquid, &mut self.last_root[0])
        };
        let begin = match *last {
            Some(l) => {
                // The balance at the last root for this state, less h1.
                let condensed = if ice {
                    thermo::ice_enthalpy(l.t)
                } else {
                    thermo::liquid_enthalpy(l.t)
                };
                let warm = l.t - (l.h1 - h1 + (w - l.w) * condensed) / l.slope;
                if (warm - l.t).abs() <= WARM_REACH_K {
                    #[cfg(test)]
                    WARM_STARTS.with(|n| n.set(n.get() + 1));
                    warm
                } else {
                    rough()
                }
            }
            None => rough(),
        };
        let start = grid.invert(h1, begin, &balance(p, w, ice))?;
        *last = (start.slope > 0.0).then_some(LastRoot {
            w,
            h1,
            t: start.t,
            slope: start.slope,
        });
        Some(grid.bounded_where_smooth(start, ice))
    }

    /// Whether the wet-bulb lies over liquid water (at or above 0 degC): the
    /// balance at 0 degC over liquid water is at or below h1. `None` when
    /// saturated air at 0 degC does not exist at this pressure.
    pub(super) fn wet_bulb_over_liquid(&mut self, w: f64, h1: f64) -> Option<bool> {
        let p = self.limits.p_pa;
        Some(self.liquid.node(0, &balance(p, w, false))?.0 <= h1)
    }

    /// A start for the dew point where `ln(f p_ws) = ln_pv`, from the table;
    /// `None` when it is not between two nodes.
    pub(super) fn dew_point_start(&mut self, ln_pv: f64, rough: f64) -> Option<f64> {
        let p = self.limits.p_pa;
        let saturation = |t: f64| Some(sat::ln_saturated_vapour_pressure_and_slope(t, p));
        self.saturation
            .invert(ln_pv, rough, &(saturation, |_| (0.0, 0.0)))
            .map(|start| start.t)
    }
}

/// Nodes of a table from `from` to `to` (K) every `step` (K), both ends
/// included (`to` within rounding); none when `to` is below `from`.
fn node_count(from: f64, to: f64, step: f64) -> usize {
    if to >= from {
        ((to - from) / step + 1e-9).floor() as usize + 1
    } else {
        0
    }
}

/// The wet-bulb balance as a table function: G at a node (computed once per
/// pressure) and the `w h_c` added for one state, with their slopes.
fn balance(p: f64, w: f64, ice: bool) -> TableFunction<impl Fill, impl Add> {
    let fill = move |t: f64| Some(SaturatedSide::at(t, p, ice)?.balance_enthalpy(0.0));
    let add = move |t: f64| {
        if ice {
            (w * thermo::ice_enthalpy(t), w * thermo::ICE_CP)
        } else {
            (w * thermo::liquid_enthalpy(t), w * thermo::LIQUID_CP)
        }
    };
    (fill, add)
}

/// Just below the boiling point at p (IF97 backward equation, within 0.01 K of
/// our curve): w_s* there exceeds 100 kg/kg, so the wet-bulb balance is positive.
fn wet_bulb_cap_k(p: f64) -> Result<f64, AirError> {
    let tb = sat::if97_saturation_temperature(p.clamp(611.3, sat::P_CRITICAL));
    let mut hi = tb - 0.02;
    for _ in 0..40 {
        if ws_of(hi, p).is_some() {
            return Ok(hi);
        }
        hi -= 0.02;
    }
    Err(AirError::ProcessOutOfRange {
        what: "no saturated state below the boiling point".into(),
    })
}

/// A table function: how to fill a node (`None` where it is undefined), and
/// what one caller adds to every node value (with its slope).
type TableFunction<F, A> = (F, A);

/// Fills a node at a temperature: `(value, slope)`, `None` where undefined.
trait Fill: Fn(f64) -> Option<(f64, f64)> {}
impl<F: Fn(f64) -> Option<(f64, f64)>> Fill for F {}

/// What one caller adds to a node value at a temperature, with its slope.
trait Add: Fn(f64) -> (f64, f64) {}
impl<A: Fn(f64) -> (f64, f64)> Add for A {}

impl Grid {
    /// A table of `len` nodes from `origin` (K) every `step` (K), all unset.
    fn new(origin: f64, step: f64, len: usize) -> Grid {
        Grid {
            origin,
            step,
            len,
            pages: (0..len.div_ceil(PAGE)).map(|_| None).collect(),
        }
    }

    /// Node k with the caller's addition, filling the node on first use.
    #[inline(always)]
    fn node<F, A>(&mut self, k: usize, (fill, add): &TableFunction<F, A>) -> Option<(f64, f64)>
    where
        F: Fill,
        A: Add,
    {
        if k >= self.len {
            return None;
        }
        let t = self.origin + k as f64 * self.step;
        let stored = match &self.pages[k / PAGE] {
            Some(page) if !page[k % PAGE].0.is_nan() => page[k % PAGE],
            _ => self.fill_node(k, t, fill)?,
        };
        let (value, slope) = add(t);
        Some((stored.0 + value, stored.1 + slope))
    }

    /// Fill node k (at `t`, K) on first use, allocating its page if need be.
    #[cold]
    #[inline(never)]
    fn fill_node<F: Fill>(&mut self, k: usize, t: f64, fill: &F) -> Option<(f64, f64)> {
        let page =
            self.pages[k / PAGE].get_or_insert_with(|| Box::new([(f64::NAN, f64::NAN); PAGE]));
        let node = &mut page[k % PAGE];
        *node = fill(t)?;
        Some(*node)
    }

    /// `start` (from a wet-bulb table, over ice or not) without the bounds
    /// where the balance is not smooth enough for them. The first liquid
    /// intervals hold the ice-liquid join of the saturation pressure (0..0.01
    /// degC), where the slope of the balance jumps: no bound there. Above
    /// 150 degC (wet-bulbs at pressures above about 480 kPa) the
    /// vapour-pressure slope is a central difference and the join to IF97
    /// bends the balance by a blend with a jump in its second derivative: no
    /// bound on the table's root there (the one-step bound allows for the
    /// slope's error).
    fn bounded_where_smooth(&self, mut start: TableStart, ice: bool) -> TableStart {
        let lower = self.origin + start.interval as f64 * self.step;
        if !ice && lower < sat::T_TRIPLE {
            start.curvature = f64::INFINITY;
            start.error_k = f64::INFINITY;
        }
        if !ice && lower + self.step > sat::JOIN_START {
            start.error_k = f64::INFINITY;
        }
        start
    }

    /// Where the (increasing) function equals `target`, by inverse cubic
    /// Hermite interpolation between the two nodes around it; `None` when
    /// they are not in the table. The search begins at `rough` (K) and jumps
    /// by Newton steps on the nodes, narrowing the candidate intervals.
    ///
    /// The interval is the one whose lower node is at or below `target` and
    /// whose upper node is above it: one interval wherever the search begins
    /// (a target equal to a node's value takes the interval above that node,
    /// none at the last node), so the result does not depend on `rough`.
    fn invert<F, A>(
        &mut self,
        target: f64,
        rough: f64,
        f: &TableFunction<F, A>,
    ) -> Option<TableStart>
    where
        F: Fill,
        A: Add,
    {
        // Interval k lies between nodes k and k + 1; search lo..=hi, narrowing.
        let mut hi = self.len.checked_sub(2)?;
        let mut lo = 0;
        let (origin, step) = (self.origin, self.step);
        let per_step = 1.0 / step;
        // The interval holding t (truncation is the floor for t >= origin; NaN
        // maps to 0), kept in lo..=hi.
        let index = |t: f64, lo: usize, hi: usize| {
            (((t - origin) * per_step).max(0.0) as usize).clamp(lo, hi)
        };
        let mut k = index(rough, lo, hi);
        // Each pass narrows lo..=hi by at least one interval.
        for _ in 0..self.len {
            let (ya, da) = self.node(k, f)?;
            let ta = origin + k as f64 * step;
            if ya > target {
                hi = k.checked_sub(1)?;
                if lo > hi {
                    return None;
                }
                k = index(ta - (ya - target) / da, lo, hi);
                continue;
            }
            let (yb, db) = self.node(k + 1, f)?;
            if yb <= target {
                lo = k + 1;
                if lo > hi {
                    return None;
                }
                k = index(ta + step + (target - yb) / db, lo, hi);
                continue;
            }
            let (m0, m1) = (da * step, db * step);
            let s = inverse_hermite(target, (ya, m0), (yb, m1));
            let (curvature, error_k) = interval_bounds((ya, m0), (yb, m1), step);
            return Some(TableStart {
                t: ta + s * step,
                interval: k,
                curvature,
                error_k,
                slope: da,
            });
        }
        None
    }
}

/// What an interval of a table bounds, from the cubic Hermite interpolant
/// through `(y0, slope m0)` at 0 and `(y1, m1)` at 1 (slopes per node spacing
/// `step`, K): `(curvature, error_k)` as [`TableStart`] keeps them, both
/// infinite when the interpolant's second derivative at one end exceeds the
/// other's in magnitude by more than a factor 1.5 (the curvature changes
/// fast, as next to the boiling point, and the ends bound nothing).
///
/// The curvature is the larger magnitude of that second derivative at the
/// two ends (it is linear in between), per K^2.
///
/// `error_k` bounds how far the interpolant's root lies from the root of the
/// function it interpolates, within the interval, K. The interpolant's error
/// is at most `M4 step^4 / 384` for `|f''''| <= M4` over the interval (the
/// cubic Hermite remainder), and the root moves by at most that over the
/// least slope. The balance's second derivative grows nearly like an
/// exponential (the vapour pressure), for which `f'''' = f'''^2 / f''`
/// exactly: with the interpolant's (constant) third derivative and its second
/// derivatives at the two ends, of one sign, `M4` is taken as
/// [`hermite::FOURTH_SAFETY`] times that ratio at the smaller end; infinite when the
/// ends differ in sign or a slope is not positive.
fn interval_bounds(a: (f64, f64), b: (f64, f64), step: f64) -> (f64, f64) {
    let (c0, c1) = hermite::end_curvatures(a, b);
    let (small, large) = (c0.abs().min(c1.abs()), c0.abs().max(c1.abs()));
    let curvature = if large <= 1.5 * small {
        large / (step * step)
    } else {
        return (f64::INFINITY, f64::INFINITY);
    };
    let least_slope = a.1.min(b.1);
    let fourth = match hermite::fourth_estimate((c0, c1)) {
        Some(fourth) if least_slope > 0.0 => fourth,
        _ => return (curvature, f64::INFINITY),
    };
    // Error in the table's units over the slope per step, in steps, to K.
    (curvature, fourth * (1.0 / 384.0) / least_slope * step)
}

/// The s in [0, 1] where the cubic Hermite interpolant through `(y0, slope m0)`
/// at 0 and `(y1, m1)` at 1 equals `y` (`y0 <= y <= y1`, increasing), by Newton
/// steps from linear interpolation (two steps: the interpolant is nearly
/// linear over one node spacing, and the start needs no more).
fn inverse_hermite(y: f64, (y0, m0): (f64, f64), (y1, m1): (f64, f64)) -> f64 {
    let rise = y1 - y0;
    if rise <= 0.0 {
        return 0.5;
    }
    let mut s = ((y - y0) / rise).clamp(0.0, 1.0);
    for _ in 0..2 {
        let (value, slope) = hermite::value_and_slope((y0, m0), (y1, m1), s);
        if slope <= 0.0 {
            break;
        }
        s = (s - (value - y) / slope).clamp(0.0, 1.0);
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::air::state::{CURVATURE_SAFETY, TABLE_MAX_ERROR};

    /// The intervals of a table of `len` nodes a test looks at: every one
    /// within 2 K of either end (the ice-liquid join, the boiling point),
    /// and about 400 spread evenly over the rest.
    fn sampled_intervals(len: usize, step: f64) -> impl Iterator<Item = usize> {
        let intervals = len.saturating_sub(1);
        let edge = (2.0 / step) as usize;
        let stride = (intervals / 400).max(1);
        (0..intervals).filter(move |&k| k < edge || k + edge >= intervals || k % stride == 0)
    }

    /// The curvature bound the one-step wet-bulb relies on, over the
    /// intervals of both wet-bulb tables ([`sampled_intervals`]) at pressures
    /// across the engine's whole range
    /// (1 kPa to 10 MPa): where it is finite, `CURVATURE_SAFETY` times it is at
    /// least the balance's second derivative, taken as a central difference
    /// (step 1e-3 K) of its exact slope at 5 points of the interval, from
    /// 1e-3 K inside each end (so as not to reach across the 0..0.01 degC join). In the design range (50..200 kPa) the bound must also be
    /// finite on nine intervals in ten (else the shortcut would rarely apply).
    #[test]
    fn curvature_bound_holds_over_the_tables() {
        let mut worst: f64 = 0.0;
        for p in [
            1e3, 10e3, 50e3, 70e3, 101_325.0, 150e3, 200e3, 1e6, 5e6, 10e6,
        ] {
            let mut cache = PressureCache::new(p).unwrap();
            for ice in [false, true] {
                let f = balance(p, 0.0, ice);
                let grid = if ice {
                    &mut cache.ice
                } else {
                    &mut cache.liquid
                };
                let (mut finite, mut total) = (0, 0);
                for k in sampled_intervals(grid.len, STEP) {
                    let (Some(a), Some(b)) = (grid.node(k, &f), grid.node(k + 1, &f)) else {
                        continue;
                    };
                    total += 1;
                    let (bound, _) = interval_bounds((a.0, a.1 * STEP), (b.0, b.1 * STEP), STEP);
                    if !bound.is_finite() || (!ice && grid.origin + k as f64 * STEP < sat::T_TRIPLE)
                    {
                        continue;
                    }
                    finite += 1;
                    let t0 = grid.origin + k as f64 * STEP;
                    let slope = |t: f64| {
                        SaturatedSide::at(t, p, ice)
                            .unwrap()
                            .balance_enthalpy(0.0)
                            .1
                    };
                    let d = 1e-3;
                    for i in 0..=4 {
                        let t = t0 + d + (STEP - 2.0 * d) * i as f64 / 4.0;
                        let second = (slope(t + d) - slope(t - d)) / (2.0 * d);
                        let ratio = second.abs() / (CURVATURE_SAFETY * bound);
                        worst = worst.max(ratio);
                        assert!(
                            ratio <= 1.0,
                            "p={p} ice={ice} T={t}: {second} vs bound {bound}"
                        );
                    }
                }
                if (50e3..=200e3).contains(&p) {
                    assert!(
                        finite * 10 >= total * 9,
                        "p={p} ice={ice}: {finite} of {total}"
                    );
                }
            }
        }
        // Measured: 0.25, the second derivative 1.01 times the bound itself next
        // to the boiling point.
        assert!(worst > 0.0);
    }

    /// The bound on the table's root ([`interval_bounds`]) holds: for
    /// the balance's exact value at 9 points inside each sampled interval
    /// ([`sampled_intervals`]) of both wet-bulb tables at pressures across
    /// the engine's whole range, the table's root lies within the bound of
    /// the point, plus the rounding of the two (8 eps T) and of the value
    /// (32 eps |value| over the slope), wherever the bound
    /// is finite. On tables 5, 10 and 25 times coarser than the engine's,
    /// whose interpolation errors stand well above rounding, this tests the
    /// bound itself; on the engine's own, that the
    /// root is that close. In the design range (50..200 kPa) the bound at the
    /// engine's spacing must also be within `TABLE_MAX_ERROR` on five
    /// intervals in six away from the two ends (measured: 89 to 92 %; the
    /// top 8 to 9 K below the boiling point, where the balance steepens
    /// fast, takes the one-step path instead).
    #[test]
    fn table_root_is_within_its_bound() {
        let mut worst: f64 = 0.0;
        for scale in [1.0, 5.0, 10.0, 25.0] {
            let step = STEP * scale;
            for p in [
                1e3, 10e3, 50e3, 70e3, 101_325.0, 150e3, 200e3, 1e6, 5e6, 10e6,
            ] {
                let limits = PressureCache::new(p).unwrap().limits;
                let cap = limits.wet_bulb_cap_k;
                for ice in [false, true] {
                    let f = balance(p, 0.0, ice);
                    let (origin, top) = if ice {
                        (sat::T_MIN_SATURATION, T_ZERO_C.min(cap))
                    } else {
                        (T_ZERO_C, cap)
                    };
                    let len = node_count(origin, top, step);
                    if len == 0 {
                        continue;
                    }
                    let mut grid = Grid::new(origin, step, len);
                    let edge = (2.0 / step) as usize;
                    let (mut tight, mut total) = (0, 0);
                    for k in sampled_intervals(len, step) {
                        // Away from the two ends (the share of intervals whose bound is tight).
                        let inner = (edge..(len - 1).saturating_sub(edge)).contains(&k);
                        total += usize::from(inner);
                        let mut all_tight = true;
                        for i in 1..=9 {
                            let t = origin + (k as f64 + i as f64 / 10.0) * step;
                            let (target, slope) = (f.0)(t).unwrap();
                            let Some(start) = grid.invert(target, t, &f) else {
                                panic!("p={p} ice={ice} T={t}: not in the table");
                            };
                            let start = grid.bounded_where_smooth(start, ice);
                            all_tight &= start.error_k <= TABLE_MAX_ERROR;
                            if !start.error_k.is_finite() {
                                continue;
                            }
                            let rounding = 8.0 * f64::EPSILON * (t + 4.0 * target.abs() / slope);
                            let err = (start.t - t).abs();
                            assert!(
                                err <= start.error_k + rounding,
                                "p={p} ice={ice} step={step} T={t}: {err} vs bound {}",
                                start.error_k
                            );
                            worst = worst.max((err - rounding).max(0.0) / start.error_k);
                        }
                        tight += usize::from(all_tight && inner);
                    }
                    if scale == 1.0 && (50e3..=200e3).contains(&p) {
                        assert!(
                            tight * 6 >= total * 5,
                            "p={p} ice={ice}: {tight} of {total}"
                        );
                    }
                }
            }
        }
        // Measured: 0.33, on a table 25 times coarser than the engine's.
        assert!(worst > 0.0);
    }

    /// Fields of a table start, bit for bit.
    fn start_bits(s: &TableStart) -> [u64; 5] {
        [
            s.t.to_bits(),
            s.interval as u64,
            s.curvature.to_bits(),
            s.error_k.to_bits(),
            s.slope.to_bits(),
        ]
    }

    /// `Grid::invert` finds the same interval, and returns the same bits,
    /// from any start: 40 starts spread over the whole table and 40 within
    /// 0.1 K of the root, for targets inside intervals and equal to a node's
    /// value (which takes the interval above that node), over liquid water
    /// and ice at three pressures and three humidity ratios.
    #[test]
    fn table_root_does_not_depend_on_the_start() {
        let mut checked = 0;
        for p in [60e3, 101_325.0, 180e3] {
            let mut cache = PressureCache::new(p).unwrap();
            for ice in [false, true] {
                for w in [0.0, 0.004, 0.05] {
                    let f = balance(p, w, ice);
                    let grid = if ice {
                        &mut cache.ice
                    } else {
                        &mut cache.liquid
                    };
                    let (origin, len) = (grid.origin, grid.len);
                    let top = origin + (len - 1) as f64 * STEP;
                    for k in [1, len / 7, len / 3, len / 2, len - 3] {
                        let at_node = grid.node(k, &f).unwrap().0;
                        let root = origin + (k as f64 + 0.37) * STEP;
                        let inside = (f.0)(root).unwrap().0 + (f.1)(root).0;
                        for (target, interval) in [(at_node, k), (inside, k)] {
                            let starts = (0..40)
                                .map(|i| origin + (top - origin) * i as f64 / 39.0)
                                .chain((0..40).map(|i| root - 0.1 + 0.2 * i as f64 / 39.0));
                            let mut first = None;
                            for begin in starts {
                                let s = grid.invert(target, begin, &f).unwrap();
                                assert_eq!(s.interval, interval, "p={p} ice={ice} w={w} k={k}");
                                let bits = start_bits(&s);
                                assert_eq!(*first.get_or_insert(bits), bits, "from {begin} K");
                                checked += 1;
                            }
                        }
                    }
                }
            }
        }
        assert_eq!(checked, 3 * 2 * 3 * 5 * 2 * 80);
    }

    /// A sweep's wet-bulbs, each begun from the last root (the warm start),
    /// are bit for bit the ones each state gives from its rough estimate with
    /// no last root kept: 3,000 neighbouring states (40 dry-bulbs by 75
    /// humidity ratios, in sweep order) at two pressures. The warm start must
    /// also have been taken, for the test to mean anything.
    #[test]
    fn warm_start_gives_the_cold_result() {
        use crate::engine::air::AirState;
        use uom::si::f64::{Pressure, ThermodynamicTemperature};
        use uom::si::pressure::pascal;
        use uom::si::thermodynamic_temperature::kelvin;
        let forget = |p: f64| {
            with_pressure(p, |cache| {
                cache.last_root = [None; 2];
                Ok(())
            })
            .unwrap()
        };
        let before = WARM_STARTS.with(|n| n.get());
        for p in [70e3, 101_325.0] {
            for i in 0..40 {
                for j in 0..75 {
                    let t = 273.15 + 45.0 + 2.5 * i as f64;
                    let w = 0.0002 + 0.001 * j as f64;
                    let pressure = Pressure::new::<pascal>(p);
                    let s =
                        AirState::from_w(ThermodynamicTemperature::new::<kelvin>(t), w, pressure);
                    let Ok(s) = s else { continue };
                    let warm = s.wet_bulb_k();
                    forget(p);
                    let cold = s.wet_bulb_k();
                    assert_eq!(
                        warm.map(f64::to_bits).ok(),
                        cold.map(f64::to_bits).ok(),
                        "p={p} T={t} w={w}"
                    );
                }
            }
        }
        // Measured: 5,911 of the 6,000 states began from the last root (not
        // the first of each row of humidity ratios, nor the few whose start
        // moved more than WARM_REACH_K).
        let warm_taken = WARM_STARTS.with(|n| n.get()) - before;
        assert!(warm_taken > 5_000, "{warm_taken}");
    }

    /// Over one node spacing the balance bends a few percent from a line; two
    /// Newton steps invert such a cubic to well under 1e-6 of the spacing.
    #[test]
    fn inverse_hermite_inverts_a_cubic() {
        // p(s) = 1 + s + 0.05 s^3: p(0) = 1, p'(0) = 1, p(1) = 2.05, p'(1) = 1.15.
        for i in 0..=10 {
            let s = i as f64 / 10.0;
            let y = 1.0 + s + 0.05 * s * s * s;
            let got = inverse_hermite(y, (1.0, 1.0), (2.05, 1.15));
            assert!((got - s).abs() < 1e-7, "{s}: {got}");
        }
    }
}
