//! Property tests (bounded cases, part of the normal suite) that complement
//! tests/units_props.rs: dimension algebra laws and compound-unit parsing,
//! humid-air constructors that round-trip over the whole formulation range,
//! isotherm inverses, drying-time integration against closed forms, and
//! sweeps that equal their points evaluated one by one.
//!
//! The closed form of the drying time on a constant-rate + linear-falling-rate
//! curve, t = (Ls/A) [(X1 - Xc)/Rc + (Xc - Xe)/Rc ln((Xc - Xe)/(X2 - Xe))], is the
//! textbook integral of dX/R(X) (Geankoplis, Transport Processes and Separation
//! Process Principles, section 9.7; common practice).

use proptest::prelude::*;
use siccant::engine::air::{AirState, T_MAX_K, T_MIN_K};
use siccant::engine::integrate::gauss_kronrod;
use siccant::engine::kinetics::{drying_time, numerical_time, RateCurve};
use siccant::engine::sorption::{Isotherm, IsothermKind};
use siccant::session::{OutputItem, Session};
use siccant::units::{parse_unit, Dim, Kind, Quantity};
use siccant::value::Value;
use uom::si::f64::{Pressure, ThermodynamicTemperature};
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::kelvin;

fn close(a: f64, b: f64, rel: f64, abs: f64) -> bool {
    (a - b).abs() <= abs + rel * a.abs().max(b.abs())
}

fn dim() -> impl Strategy<Value = Dim> {
    proptest::array::uniform7(-3i8..=3).prop_map(Dim)
}

fn kelvins(t: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<kelvin>(t)
}

fn pascals(p: f64) -> Pressure {
    Pressure::new::<pascal>(p)
}

/// Simple units of distinct dimensions, for building compound units.
const SIMPLE: &[&str] = &[
    "m", "kg", "s", "K", "mol", "J", "W", "Pa", "N", "h", "ft", "lb",
];

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    // ---- dimension algebra: an abelian group under multiplication

    #[test]
    fn dimensions_form_a_group(a in dim(), b in dim(), c in dim()) {
        prop_assert_eq!((a * b) * c, a * (b * c));
        prop_assert_eq!(a * b, b * a);
        prop_assert_eq!(a * Dim::NONE, a);
        prop_assert_eq!(a * a.recip(), Dim::NONE);
        prop_assert_eq!((a * b) / b, a);
        prop_assert_eq!(a.powi(2), a * a);
        prop_assert_eq!(a.powi(-1), a.recip());
        prop_assert_eq!(a.powi(2).root(2), Some(a));
    }

    #[test]
    fn quantity_products_carry_the_product_of_dimensions(
        x in 1e-3f64..1e3, y in 1e-3f64..1e3, z in 1e-3f64..1e3,
        a in dim(), b in dim(), c in dim(),
    ) {
        let (qa, qb, qc) = (
            Quantity::new(x, a, Kind::Plain),
            Quantity::new(y, b, Kind::Plain),
            Quantity::new(z, c, Kind::Plain),
        );
        let left = qa.mul(&qb).and_then(|p| p.mul(&qc)).expect("finite product");
        let right = qb.mul(&qc).and_then(|p| qa.mul(&p)).expect("finite product");
        prop_assert_eq!(left.dim, a * b * c);
        prop_assert_eq!(right.dim, left.dim);
        prop_assert!(close(left.si, right.si, 1e-12, 0.0));
        // distributivity: a (b + c) = a b + a c when b and c share a dimension
        let qc_b = Quantity::new(z, b, Kind::Plain);
        let sum = qb.add(&qc_b).and_then(|s| qa.mul(&s)).expect("sum");
        let parts = qa.mul(&qb).and_then(|p| qa.mul(&qc_b).and_then(|q| p.add(&q))).expect("parts");
        prop_assert!(close(sum.si, parts.si, 1e-12, 0.0));
        prop_assert_eq!(sum.dim, parts.dim);
    }

    #[test]
    fn compound_unit_text_equals_the_unit_algebra(
        i in 0..SIMPLE.len(), j in 0..SIMPLE.len(), n in 1i32..4,
    ) {
        let (a, b) = (parse_unit(SIMPLE[i]).expect("unit"), parse_unit(SIMPLE[j]).expect("unit"));
        let quotient = parse_unit(&format!("{}/{}^{n}", SIMPLE[i], SIMPLE[j])).expect("compound");
        let built = a.div(&b.powi(n));
        prop_assert_eq!(quotient.dim, built.dim);
        prop_assert!(close(quotient.to_si(1.0).si, built.to_si(1.0).si, 1e-12, 0.0));
        let product = parse_unit(&format!("{}*{}", SIMPLE[i], SIMPLE[j])).expect("compound");
        prop_assert_eq!(product.dim, a.mul(&b).dim);
        prop_assert!(close(product.to_si(2.5).si, a.mul(&b).to_si(2.5).si, 1e-12, 0.0));
    }

    // ---- humid air: every constructor gives back the state it was built from

    #[test]
    fn humid_air_constructors_round_trip(
        t in T_MIN_K..T_MAX_K,
        rh in 0.0f64..=1.0,
        p in 50e3f64..200e3,
    ) {
        let state = match AirState::from_rh(kelvins(t), rh, pascals(p)) {
            Ok(s) => s,
            // near and above boiling, high rh is refused: an error, never a number
            Err(_) => return Ok(()),
        };
        let w = state.humidity_ratio();
        prop_assert!(w.is_finite() && w >= 0.0);
        prop_assert!(close(state.relative_humidity(), rh, 1e-9, 1e-12));

        let by_w = AirState::from_w(kelvins(t), w, pascals(p)).expect("from_w of a valid w");
        prop_assert!(close(by_w.relative_humidity(), rh, 1e-9, 1e-12));

        let h = state.enthalpy();
        let by_h = AirState::from_enthalpy(kelvins(t), h, pascals(p)).expect("from_enthalpy");
        prop_assert!(close(by_h.humidity_ratio(), w, 1e-7, 1e-9), "h: {} vs {}", by_h.humidity_ratio(), w);

        if let Ok(wb) = state.wet_bulb() {
            prop_assert!(wb.get::<kelvin>() <= t + 1e-9);
            let by_wb = AirState::from_wet_bulb(kelvins(t), wb, pascals(p)).expect("from_wet_bulb");
            prop_assert!(close(by_wb.humidity_ratio(), w, 1e-6, 1e-8), "wb: {} vs {}", by_wb.humidity_ratio(), w);
        }
        if w > 1e-6 {
            if let Ok(dp) = state.dew_point() {
                prop_assert!(dp.get::<kelvin>() <= t + 1e-6);
                let by_dp = AirState::from_dew_point(kelvins(t), dp, pascals(p)).expect("from_dew_point");
                prop_assert!(close(by_dp.humidity_ratio(), w, 1e-6, 1e-9), "dp: {} vs {}", by_dp.humidity_ratio(), w);
            }
        }
    }

    #[test]
    fn humid_air_outside_the_range_is_an_error_not_a_number(
        t in prop_oneof![0.0f64..T_MIN_K - 1e-6, T_MAX_K + 1e-6..5000.0],
        rh in -1.0f64..2.0,
    ) {
        prop_assert!(AirState::from_rh(kelvins(t), rh, pascals(101_325.0)).is_err());
        let atm = pascals(101_325.0);
        prop_assert!(AirState::from_rh(kelvins(300.0), 1.0 + 1e-3 + rh.abs(), atm).is_err());
        prop_assert!(AirState::from_rh(kelvins(300.0), -1e-3 - rh.abs(), atm).is_err());
        prop_assert!(AirState::from_w(kelvins(300.0), -1e-6 - rh.abs(), atm).is_err());
    }

    // ---- sorption: the inverse of each isotherm returns the activity

    #[test]
    fn isotherm_inverse_round_trips(
        aw in 0.06f64..0.9,
        t in 283.15f64..353.15,
        model in 0usize..6,
        scale in 0.7f64..1.4,
    ) {
        let (kind, params): (IsothermKind, Vec<f64>) = match model {
            0 => (IsothermKind::Gab, vec![0.08 * scale, 12.0, 0.85, 3000.0, -500.0]),
            1 => (IsothermKind::Oswin, vec![0.1 * scale, 0.4]),
            2 => (IsothermKind::Henderson, vec![1e-4 * scale, 1.6]),
            3 => (IsothermKind::ModifiedHalsey, vec![3.0 * scale, -0.01, 1.5]),
            4 => (IsothermKind::Smith, vec![0.02 * scale, 0.1]),
            _ => (IsothermKind::Peleg, vec![0.1 * scale, 0.4, 0.7, 5.0]),
        };
        let iso = Isotherm::new(kind, &params, kelvins(298.15)).expect("valid parameters");
        let x = iso.equilibrium_moisture(aw, kelvins(t)).expect("moisture").value;
        prop_assume!(x > 0.0);
        let back = iso.water_activity(x, kelvins(t)).expect("activity").value;
        prop_assert!(close(back, aw, 1e-7, 1e-9), "{}: aw {} -> X {} -> aw {}", kind.name(), aw, x, back);
    }

    // ---- kinetics: quadrature of 1/R matches the closed forms

    #[test]
    fn drying_time_integral_matches_the_closed_form(
        rc in 1e-5f64..1e-3,
        xe in 0.0f64..0.1,
        gap in 0.05f64..1.0,
        above in 0.0f64..2.0,
        end_frac in 0.02f64..0.98,
        load in 1.0f64..50.0,
    ) {
        let xc = xe + gap;
        let x1 = xc + above;
        let x2 = xe + end_frac * gap;
        let curve = RateCurve::constant_linear(rc, xc, xe).expect("valid curve");
        let closed = drying_time(&curve, load, x1, x2).expect("closed form").total_s;
        let quadrature = numerical_time(&curve, load, x1, x2).expect("quadrature").total_s;
        let textbook = load * ((x1 - xc) / rc + (xc - xe) / rc * ((xc - xe) / (x2 - xe)).ln());
        prop_assert!(close(closed, textbook, 1e-12, 0.0), "{} vs {}", closed, textbook);
        prop_assert!(close(quadrature, textbook, 1e-8, 0.0), "{} vs {}", quadrature, textbook);
    }

    #[test]
    fn power_law_falling_rate_matches_its_closed_form(
        n in 0.3f64..3.0,
        end_frac in 0.05f64..0.95,
    ) {
        let (rc, xc, xe, load, x1) = (2e-4, 0.6, 0.05, 12.0, 1.4);
        let x2 = xe + end_frac * (xc - xe);
        let curve = RateCurve::constant_power(rc, xc, xe, n).expect("valid curve");
        let closed = drying_time(&curve, load, x1, x2).expect("closed").total_s;
        let quadrature = numerical_time(&curve, load, x1, x2).expect("quadrature").total_s;
        prop_assert!(close(closed, quadrature, 1e-8, 0.0), "n {}: {} vs {}", n, closed, quadrature);
    }

    #[test]
    fn gauss_kronrod_integrates_exponentials_exactly(a in -5.0f64..5.0, width in 1e-3f64..10.0, k in -3.0f64..3.0) {
        let b = a + width;
        let q = gauss_kronrod(|x| (k * x).exp(), a, b, 1e-12, 0.0).expect("smooth integrand");
        let exact = if k.abs() < 1e-12 { width } else { ((k * b).exp() - (k * a).exp()) / k };
        prop_assert!(close(q.value, exact, 1e-10, 1e-14), "{} vs {}", q.value, exact);
    }
}

#[test]
fn quadrature_of_a_non_finite_integrand_is_an_error() {
    assert!(gauss_kronrod(|x| 1.0 / x, -1.0, 1.0, 1e-10, 0.0).is_err());
    assert!(gauss_kronrod(|x| 1.0 / x.sqrt(), -1.0, 1.0, 1e-10, 0.0).is_err());
}

/// The SI magnitudes of the last value a cell shows (a quantity or a list).
fn shown_si(session: &mut Session, text: &str) -> Vec<f64> {
    let out = session
        .eval(text)
        .unwrap_or_else(|d| panic!("`{text}`: {d:?}"));
    let value = out.items.iter().rev().find_map(|i| match i {
        OutputItem::Value { value, .. } => Some(value.clone()),
        _ => None,
    });
    match value {
        Some(Value::Quantity(q, _)) => vec![q.si],
        Some(Value::List(items)) => items
            .iter()
            .map(|v| match v {
                Value::Quantity(q, _) => q.si,
                other => panic!("not a quantity: {other:?}"),
            })
            .collect(),
        other => panic!("`{text}` shows {other:?}"),
    }
}

const SHEET: &str =
    "a = air(T: T, rh: 10 %)\nwb = a.wetbulb\nh = h_tray_parallel(air: a, velocity: v)\n";

proptest! {
    #![proptest_config(ProptestConfig { cases: 8, ..ProptestConfig::default() })]

    #[test]
    fn a_sweep_equals_its_points_evaluated_one_by_one(
        temps in prop::collection::vec(30.0f64..140.0, 1..4),
        speeds in prop::collection::vec(0.5f64..6.0, 1..3),
    ) {
        let list = |xs: &[f64], unit: &str| {
            let items: Vec<String> = xs.iter().map(|x| format!("{x:.3} {unit}")).collect();
            format!("[{}]", items.join(", "))
        };
        let mut swept = Session::new();
        let text = format!(
            "input T = 60 degC\ninput v = 2 m/s\n{SHEET}s = sweep([wb, h], T: {}, v: {})",
            list(&temps, "degC"),
            list(&speeds, "m/s")
        );
        swept.eval(&text).unwrap_or_else(|d| panic!("{d:?}"));
        let (wb_all, h_all) = (shown_si(&mut swept, "s.wb"), shown_si(&mut swept, "s.h"));
        prop_assert_eq!(wb_all.len(), temps.len() * speeds.len());
        // the first input varies slowest
        for (i, t) in temps.iter().enumerate() {
            for (j, v) in speeds.iter().enumerate() {
                let mut one = Session::new();
                let text = format!("input T = {t:.3} degC\ninput v = {v:.3} m/s\n{SHEET}");
                one.eval(&text).unwrap_or_else(|d| panic!("{d:?}"));
                let k = i * speeds.len() + j;
                prop_assert!(close(shown_si(&mut one, "wb")[0], wb_all[k], 1e-12, 0.0));
                prop_assert!(close(shown_si(&mut one, "h")[0], h_all[k], 1e-12, 0.0));
            }
        }
    }
}
