//! What the humid-air engine keeps per total pressure, on each thread: the
//! boiling limits, and a table of the wet-bulb balance on a 0.25 K grid of
//! trial wet-bulbs, filled node by node as states ask for it. A sweep at one
//! pressure solves for the boiling point once and evaluates each node of the
//! table once; a state at a new pressure replaces both.
//!
//! The table holds, at T_k = 0 degC + k 0.25 K (liquid water, up to the top of
//! the wet-bulb bracket), the enthalpy `G = h(T*, w_s*) - w_s* h_c(T*)` of the
//! balance `G(T*) + w h_c(T*) = h1` and its exact slope. Cubic Hermite
//! interpolation between two nodes, inverted, puts the wet-bulb within about
//! 1e-7 K of the root (the fourth derivative of G over 0.25 K is small), and
//! the interpolant's second derivative at the two ends bounds the balance's
//! over the interval: with it, one exact Newton step from there is proven to
//! land within 1e-14 K of the root (`state::wet_bulb_one_step`), else the
//! solve goes on. The table only chooses where the solve starts and whether a
//! step is enough: the result is the root of the exact balance either way.

use std::cell::RefCell;

use super::saturation::{self as sat, T_ZERO_C};
use super::state::{ws_of, SaturatedSide};
use super::thermo;
use super::AirError;

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

/// Spacing of the tables, K.
pub(super) const STEP: f64 = 0.25;

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
}

/// Nodes of an increasing function of temperature at `origin + k STEP`.
struct Grid {
    origin: f64,
    /// `(value, slope)` at node k; NaN until first used.
    nodes: Vec<(f64, f64)>,
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
        let count = |from: f64, to: f64| {
            if to >= from {
                ((to - from) / STEP + 1e-9).floor() as usize + 1
            } else {
                0
            }
        };
        let grid = |origin: f64, count: usize| Grid {
            origin,
            nodes: vec![(f64::NAN, f64::NAN); count],
        };
        let lowest = sat::T_MIN_SATURATION;
        Ok(PressureCache {
            limits,
            liquid: grid(T_ZERO_C, count(T_ZERO_C, cap)),
            ice: grid(lowest, count(lowest, T_ZERO_C.min(cap))),
            saturation: grid(lowest, count(lowest, cap)),
            lowest_pvs: sat::saturated_vapour_pressure(lowest, p),
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
    /// when the root is not between two nodes. `rough` (K) is where the search
    /// of the table begins.
    pub(super) fn wet_bulb_start(
        &mut self,
        w: f64,
        h1: f64,
        rough: f64,
        ice: bool,
    ) -> Option<TableStart> {
        let p = self.limits.p_pa;
        let grid = if ice { &mut self.ice } else { &mut self.liquid };
        let mut start = grid.invert(h1, rough, &balance(p, w, ice))?;
        if !ice && start.interval == 0 {
            // The first liquid interval holds the ice-liquid join of the
            // saturation pressure (0..0.01 degC), where the slope of the
            // balance jumps: no curvature bound there.
            start.curvature = f64::INFINITY;
        }
        Some(start)
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
    /// Node k with the caller's addition, filling the node on first use.
    fn node<F, A>(&mut self, k: usize, (fill, add): &TableFunction<F, A>) -> Option<(f64, f64)>
    where
        F: Fill,
        A: Add,
    {
        let t = self.origin + k as f64 * STEP;
        let node = self.nodes.get_mut(k)?;
        if node.0.is_nan() {
            *node = fill(t)?;
        }
        let (value, slope) = add(t);
        Some((node.0 + value, node.1 + slope))
    }

    /// Where the (increasing) function equals `target`, by inverse cubic
    /// Hermite interpolation between the two nodes around it; `None` when
    /// they are not in the table. The search begins at `rough` (K) and jumps
    /// by Newton steps on the nodes, narrowing the candidate intervals.
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
        let mut hi = self.nodes.len().checked_sub(2)?;
        let mut lo = 0;
        let origin = self.origin;
        // The interval holding t (truncation is the floor for t >= origin; NaN
        // maps to 0), kept in lo..=hi.
        let index = |t: f64, lo: usize, hi: usize| {
            (((t - origin) * (1.0 / STEP)).max(0.0) as usize).clamp(lo, hi)
        };
        let mut k = index(rough, lo, hi);
        // Each pass narrows lo..=hi by at least one interval.
        for _ in 0..self.nodes.len() {
            let (ya, da) = self.node(k, f)?;
            let ta = origin + k as f64 * STEP;
            if ya > target {
                hi = k.checked_sub(1)?;
                if lo > hi {
                    return None;
                }
                k = index(ta - (ya - target) / da, lo, hi);
                continue;
            }
            let (yb, db) = self.node(k + 1, f)?;
            if yb < target {
                lo = k + 1;
                if lo > hi {
                    return None;
                }
                k = index(ta + STEP + (target - yb) / db, lo, hi);
                continue;
            }
            let (m0, m1) = (da * STEP, db * STEP);
            let s = inverse_hermite(target, (ya, m0), (yb, m1));
            return Some(TableStart {
                t: ta + s * STEP,
                interval: k,
                curvature: interval_curvature((ya, m0), (yb, m1)),
            });
        }
        None
    }
}

/// The larger magnitude of the second derivative of the cubic Hermite
/// interpolant through `(y0, slope m0)` at 0 and `(y1, m1)` at 1 at its two
/// ends, per STEP^2 converted to per K^2; infinite when one end's exceeds the
/// other's by more than a factor 1.5 (see [`TableStart::curvature`]).
fn interval_curvature((y0, m0): (f64, f64), (y1, m1): (f64, f64)) -> f64 {
    let rise = y1 - y0;
    let c0 = (6.0 * rise - 4.0 * m0 - 2.0 * m1).abs();
    let c1 = (2.0 * m0 + 4.0 * m1 - 6.0 * rise).abs();
    let (small, large) = (c0.min(c1), c0.max(c1));
    if large <= 1.5 * small {
        large * (1.0 / (STEP * STEP))
    } else {
        f64::INFINITY
    }
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
        let s2 = s * s;
        let s3 = s2 * s;
        let value = y0 + m0 * (s3 - 2.0 * s2 + s) + rise * (3.0 * s2 - 2.0 * s3) + m1 * (s3 - s2);
        let slope = m0 * (3.0 * s2 - 4.0 * s + 1.0)
            + rise * (6.0 * s - 6.0 * s2)
            + m1 * (3.0 * s2 - 2.0 * s);
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
    use crate::engine::air::state::CURVATURE_SAFETY;

    /// The curvature bound the one-step wet-bulb relies on, over every interval
    /// of both wet-bulb tables at pressures across the engine's whole range
    /// (1 kPa to 10 MPa): where it is finite, `CURVATURE_SAFETY` times it is at
    /// least the balance's second derivative, taken as a central difference
    /// (step 1e-3 K) of its exact slope at 21 points of the interval, from
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
                for k in 0..grid.nodes.len().saturating_sub(1) {
                    let (Some(a), Some(b)) = (grid.node(k, &f), grid.node(k + 1, &f)) else {
                        continue;
                    };
                    total += 1;
                    let bound = interval_curvature((a.0, a.1 * STEP), (b.0, b.1 * STEP));
                    if !bound.is_finite() || (!ice && k == 0) {
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
                    for i in 0..=20 {
                        let t = t0 + d + (STEP - 2.0 * d) * i as f64 / 20.0;
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
