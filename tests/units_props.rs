//! Property tests for the quantity algebra and unit conversions.

use std::cmp::Ordering;

use proptest::prelude::*;
use siccant::units::{format_number, parse_unit, Dim, Kind, Quantity};

/// Units covering linear, prefixed, compound, affine and wet-basis readings.
const UNITS: &[&str] = &[
    "m",
    "mm",
    "ft",
    "in",
    "kg",
    "lb",
    "h",
    "min",
    "kPa",
    "psi",
    "inHg",
    "bar",
    "kJ",
    "BTU",
    "kWh",
    "kW",
    "hp",
    "L",
    "gal",
    "m^3/h",
    "ft^3/min",
    "W/(m^2*K)",
    "BTU/(h*ft^2*degF)",
    "kg/(m^2*h)",
    "kJ/kg",
    "degC",
    "degF",
    "K",
    "degR",
    "delta_degF",
    "%",
    "db",
    "%db",
    "aw",
    "%rh",
    "g/kg_da",
    "gr/lb_da",
    "1/h",
];

fn dim() -> impl Strategy<Value = Dim> {
    proptest::array::uniform7(-3i8..=3).prop_map(Dim)
}

fn plain(mag: std::ops::Range<f64>) -> impl Strategy<Value = Quantity> {
    (mag, dim()).prop_map(|(x, d)| Quantity::new(x, d, Kind::Plain))
}

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(1e-300)
}

proptest! {
    #[test]
    fn mul_then_div_is_identity(a in plain(-1e6..1e6), b in plain(1e-6..1e6)) {
        let back = a.mul(&b).unwrap().div(&b).unwrap();
        prop_assert_eq!(back.dim, a.dim);
        prop_assert!(close(back.si, a.si, 1e-12));
    }

    #[test]
    fn mul_commutes(a in plain(-1e6..1e6), b in plain(-1e6..1e6)) {
        let ab = a.mul(&b).unwrap();
        let ba = b.mul(&a).unwrap();
        prop_assert_eq!(ab, ba);
    }

    #[test]
    fn add_then_sub_is_identity(x in -1e6f64..1e6, y in -1e6f64..1e6, d in dim()) {
        let a = Quantity::new(x, d, Kind::Plain);
        let b = Quantity::new(y, d, Kind::Plain);
        let back = a.add(&b).unwrap().sub(&b).unwrap();
        prop_assert!((back.si - x).abs() <= 1e-9 * (x.abs() + y.abs() + 1.0));
    }

    #[test]
    fn add_needs_equal_dimensions(a in plain(-1e3..1e3), b in plain(-1e3..1e3)) {
        prop_assert_eq!(a.add(&b).is_ok(), a.dim == b.dim);
        prop_assert_eq!(a.cmp(&b).is_ok(), a.dim == b.dim);
    }

    #[test]
    fn cmp_is_antisymmetric(x in -1e6f64..1e6, y in -1e6f64..1e6) {
        let a = Quantity::number(x);
        let b = Quantity::number(y);
        prop_assert_eq!(a.cmp(&b).unwrap(), b.cmp(&a).unwrap().reverse());
        prop_assert_eq!(a.cmp(&a).unwrap(), Ordering::Equal);
    }

    #[test]
    fn square_root_undoes_square(x in 1e-6f64..1e6, d in dim()) {
        let a = Quantity::new(x, d, Kind::Plain);
        let back = a.powi(2).unwrap().powf(0.5).unwrap();
        prop_assert_eq!(back.dim, d);
        prop_assert!(close(back.si, x, 1e-12));
    }

    #[test]
    fn results_are_finite_or_errors(x in any::<f64>(), y in any::<f64>(), e in -5.0f64..5.0) {
        prop_assume!(x.is_finite() && y.is_finite());
        let a = Quantity::number(x);
        let b = Quantity::number(y);
        let results = [a.add(&b), a.sub(&b), a.mul(&b), a.div(&b), a.powf(e), a.powi(3)];
        for q in results.into_iter().flatten() {
            prop_assert!(q.si.is_finite());
        }
    }

    #[test]
    fn conversion_round_trips(i in 0..UNITS.len(), x in 0.0f64..0.99) {
        let unit = parse_unit(UNITS[i]).unwrap();
        // Spread x over a useful range for linear units; wet basis must stay below 1.
        let x = if unit.symbol.contains("wb") { x } else { (x - 0.5) * 2000.0 };
        let q = unit.try_to_si(x).unwrap();
        let back = unit.from_si(&q).unwrap();
        prop_assert!((back - x).abs() <= 1e-9 * x.abs().max(1.0), "{} {} -> {}", x, UNITS[i], back);
    }

    #[test]
    fn wet_basis_round_trips(w in 0.0f64..0.999) {
        let wb = parse_unit("wb").unwrap();
        let db = parse_unit("db").unwrap();
        let q = wb.try_to_si(w).unwrap();
        prop_assert_eq!(q.kind, Kind::Moisture);
        let x = db.from_si(&q).unwrap();
        prop_assert!(close(x, w / (1.0 - w), 1e-12));
        prop_assert!(close(wb.from_si(&q).unwrap(), w, 1e-9) || w < 1e-12);
    }

    #[test]
    fn conversion_between_units_of_one_dimension(x in -1e4f64..1e4) {
        // kPa -> psi -> kPa, degC -> degF -> degC
        for (a, b) in [("kPa", "psi"), ("degC", "degF"), ("BTU/(h*ft^2*degF)", "W/(m^2*K)"), ("kg/(m^2*h)", "g/(m^2*h)")] {
            let ua = parse_unit(a).unwrap();
            let ub = parse_unit(b).unwrap();
            let in_b = ub.from_si(&ua.to_si(x)).unwrap();
            let back = ua.from_si(&ub.to_si(in_b)).unwrap();
            prop_assert!((back - x).abs() <= 1e-9 * x.abs().max(1.0));
        }
    }

    #[test]
    fn formatted_numbers_keep_four_significant_figures(x in -1e9f64..1e9) {
        prop_assume!(x.abs() > 1e-9);
        let text = format_number(x, 4);
        let back: f64 = text.parse().unwrap();
        prop_assert!(close(back, x, 5e-4 + 1e-12), "{} -> {}", x, text);
        prop_assert_eq!(text.clone(), format_number(x, 4));
    }
}
