//! What the humid-air engine keeps of the last dry-bulb it used, on each
//! thread: the saturated vapour pressure at that dry-bulb and pressure, and
//! the parts of the enthalpy and of the humid heat that depend on the
//! temperature alone. A sweep
//! over humidity at one dry-bulb (the inner axis of a worksheet sweep over
//! temperature and humidity) computes them once instead of at every state.
//!
//! A value kept here is the one the function it stands for returns for the
//! same input bits, so the results are the same to the last bit whether it
//! is kept or not (`tests::kept_values_equal_fresh_ones`).

use std::cell::Cell;

use super::saturation as sat;
use super::thermo::{AirPartTerms, HeatTerms, VapourTerms};

/// `f p_ws` at one dry-bulb and pressure.
#[derive(Clone, Copy)]
struct Saturation {
    t: u64,
    p: u64,
    pvs: f64,
}

/// The temperature-only enthalpy terms at one temperature.
#[derive(Clone, Copy)]
struct Enthalpy {
    t: u64,
    air: AirPartTerms,
    vapour: VapourTerms,
}

/// The temperature-only humid-heat terms at one temperature.
#[derive(Clone, Copy)]
struct Heat {
    t: u64,
    terms: HeatTerms,
}

thread_local! {
    static SATURATION: Cell<Option<Saturation>> = const { Cell::new(None) };
    static ENTHALPY: Cell<Option<Enthalpy>> = const { Cell::new(None) };
    static HEAT: Cell<Option<Heat>> = const { Cell::new(None) };
}

/// The humid-heat terms at T (K), kept for the last T on this thread.
#[inline]
pub(super) fn heat_terms(t: f64) -> HeatTerms {
    let tb = t.to_bits();
    HEAT.with(|cell| match cell.get() {
        Some(h) if h.t == tb => h.terms,
        _ => {
            let terms = HeatTerms::at(t);
            cell.set(Some(Heat { t: tb, terms }));
            terms
        }
    })
}

/// `f p_ws` at T (K) and p (Pa): [`sat::saturated_vapour_pressure`], kept for
/// the last (T, p) on this thread.
#[inline]
pub(super) fn saturated_vapour_pressure(t: f64, p: f64) -> f64 {
    let (tb, pb) = (t.to_bits(), p.to_bits());
    SATURATION.with(|cell| match cell.get() {
        Some(s) if s.t == tb && s.p == pb => s.pvs,
        _ => {
            let pvs = sat::saturated_vapour_pressure(t, p);
            cell.set(Some(Saturation { t: tb, p: pb, pvs }));
            pvs
        }
    })
}

/// The enthalpy terms at T (K) of the air part and of the vapour, kept for
/// the last T on this thread.
#[inline]
pub(super) fn enthalpy_terms(t: f64) -> (AirPartTerms, VapourTerms) {
    let tb = t.to_bits();
    ENTHALPY.with(|cell| match cell.get() {
        Some(e) if e.t == tb => (e.air, e.vapour),
        _ => {
            let (air, vapour) = (AirPartTerms::at(t), VapourTerms::at(t));
            cell.set(Some(Enthalpy { t: tb, air, vapour }));
            (air, vapour)
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Kept values equal fresh ones bit for bit, whether the temperature
    /// repeats (as along a sweep's humidity axis) or changes at every call,
    /// over -100..350 degC and 1 kPa..10 MPa, ice and liquid, below and
    /// above the boiling point.
    #[test]
    fn kept_values_equal_fresh_ones() {
        let pressures = [1e3, 50e3, 101_325.0, 200e3, 10e6];
        let mut checked = 0;
        for repeat in [1, 3] {
            for i in 0..2000 {
                let t = 173.15 + 0.2251 * i as f64;
                for &p in &pressures {
                    for _ in 0..repeat {
                        let fresh = sat::saturated_vapour_pressure(t, p);
                        assert_eq!(saturated_vapour_pressure(t, p).to_bits(), fresh.to_bits());
                        let (air, vapour) = enthalpy_terms(t);
                        assert_eq!(air, AirPartTerms::at(t));
                        assert_eq!(vapour, VapourTerms::at(t));
                        assert_eq!(heat_terms(t), HeatTerms::at(t));
                        checked += 1;
                    }
                }
            }
        }
        assert_eq!(checked, 2000 * 5 * 4);
    }
}
