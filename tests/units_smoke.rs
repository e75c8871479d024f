//! Smoke test of the issue's worked example (invented numbers), through the units API only.

use siccant::units::{format_quantity, lookup_unit, Dim, Kind, Unit};

fn u(s: &str) -> Unit {
    lookup_unit(s).unwrap_or_else(|| panic!("unknown unit {s}"))
}

#[test]
fn worked_example_from_issue() {
    let area = u("m").to_si(2.4).mul(&u("m").to_si(1.8)).unwrap();
    let load = u("kg").div(&u("m").powi(2)).to_si(14.0);
    let dry_solid = load.mul(&area).unwrap();
    assert_eq!(format_quantity(&dry_solid, None), "60.48 kg");
    let x1 = u("db").to_si(1.40);
    assert_eq!(format_quantity(&x1, Some(&u("wb"))), "0.5833 wb");
    let htc = u("BTU").div(&u("h").mul(&u("ft").powi(2)).mul(&u("degF")));
    assert_eq!(&*htc.symbol, "BTU/(h*ft^2*degF)");
    let big_u = htc.to_si(5.0);
    let si = u("W").div(&u("m").powi(2).mul(&u("K")));
    assert_eq!(format_quantity(&big_u, Some(&si)), "28.39 W/(m^2*K)");
    let dt = u("degC").to_si(80.0).sub(&u("degC").to_si(35.0)).unwrap();
    assert_eq!(dt.kind, Kind::TemperatureDifference);
    assert_eq!(format_quantity(&dt, None), "45 K");
    let q = big_u.mul(&dt).unwrap();
    assert_eq!(q.dim, Dim::HEAT_FLUX);
    let limit = u("kW").div(&u("m").powi(2)).to_si(1.0);
    assert_eq!(q.cmp(&limit).unwrap(), std::cmp::Ordering::Greater);
}
