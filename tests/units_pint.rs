//! Unit factors against the pint library's, through the committed fixture
//! tests/reference/pint/units.csv (made by tests/reference/pint/make_fixture.py,
//! pint 0.25.3; see the README there for the tolerance).

use siccant::units::{parse_unit, Dim};

const FIXTURE: &str = include_str!("reference/pint/units.csv");
/// Relative tolerance on factors (uom stores some US customary units to NIST
/// SP 811's seven significant figures; pint derives them exactly).
const REL_TOL: f64 = 1e-6;

struct Row {
    siccant: String,
    pint: String,
    factor: f64,
    offset: f64,
    dim: Dim,
}

fn rows() -> Vec<Row> {
    let mut reader = csv::Reader::from_reader(FIXTURE.as_bytes());
    reader
        .records()
        .map(|r| {
            let r = r.expect("fixture row");
            let exps: Vec<i8> = r[4]
                .split(' ')
                .map(|e| e.parse().expect("exponent"))
                .collect();
            Row {
                siccant: r[0].to_string(),
                pint: r[1].to_string(),
                factor: r[2].parse().expect("factor"),
                offset: r[3].parse().expect("offset"),
                dim: Dim(exps.try_into().expect("seven exponents")),
            }
        })
        .collect()
}

#[test]
fn fixture_is_not_empty() {
    assert!(
        rows().len() > 100,
        "fixture should cover the unit catalogue"
    );
}

#[test]
fn every_factor_matches_pint() {
    let mut failures = Vec::new();
    for row in rows() {
        let unit = match parse_unit(&row.siccant) {
            Ok(u) => u,
            Err(e) => {
                failures.push(format!("{}: {e}", row.siccant));
                continue;
            }
        };
        let rel = (unit.factor - row.factor).abs() / row.factor.abs();
        if rel > REL_TOL {
            failures.push(format!(
                "{} factor {} vs pint {} = {} (rel {rel:.2e})",
                row.siccant, unit.factor, row.pint, row.factor
            ));
        }
        if (unit.offset - row.offset).abs() > 1e-9 {
            failures.push(format!(
                "{} offset {} vs pint {}",
                row.siccant, unit.offset, row.offset
            ));
        }
        if unit.dim != row.dim {
            failures.push(format!(
                "{} dim {:?} vs pint {:?}",
                row.siccant, unit.dim, row.dim
            ));
        }
    }
    assert!(
        failures.is_empty(),
        "mismatches against pint:\n{}",
        failures.join("\n")
    );
}

#[test]
fn every_catalogued_unit_is_in_the_fixture() {
    let rows = rows();
    let missing: Vec<&str> = siccant::units::unit_names()
        .into_iter()
        .filter(|n| !matches!(*n, "wb" | "%wb")) // not linear; see the README
        .filter(|n| !rows.iter().any(|r| r.siccant == *n))
        .collect();
    assert!(
        missing.is_empty(),
        "units missing from the pint fixture: {missing:?}"
    );
}
