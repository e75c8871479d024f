//! Snapshots of rendered diagnostics: what a user actually reads.
//! Review changes with `cargo insta review` (or `INSTA_UPDATE=always`).

use siccant::session::Session;

fn rendered(text: &str) -> String {
    let mut s = Session::with_file("sheet.sicc");
    match s.eval(text) {
        Ok(_) => String::from("(no errors)"),
        Err(diags) => diags
            .iter()
            .map(|d| s.render_diagnostic(d, false))
            .collect(),
    }
}

#[test]
fn dimension_mismatch_names_both_dimensions() {
    insta::assert_snapshot!(rendered("q = 2 kW/m^2\ne = 3 kJ/kg\ns = q + e\n"));
}

#[test]
fn absolute_temperatures_cannot_be_added() {
    insta::assert_snapshot!(rendered("T = 20 degC + 10 degC\n"));
}

#[test]
fn misspelt_unit_and_name_suggest_corrections() {
    insta::assert_snapshot!(rendered(
        "load = 14 kg/m^2\narea = 3 m^2\nm = lod * area\nx = 3 degc\n"
    ));
}

#[test]
fn every_parse_error_is_reported() {
    insta::assert_snapshot!(rendered("a = 1.2.3\nb = (1 + 2\nc = 2 m 3\nd = \"abc\n"));
}

#[test]
fn cycles_and_duplicates() {
    insta::assert_snapshot!(rendered("a = b + 1\nb = a * 2\nc = 1\nc = 2\n"));
}

#[test]
fn parse_and_unit_errors_are_reported_together_without_cascades() {
    // `c` uses `a`, whose line did not parse: only the two real errors show.
    insta::assert_snapshot!(rendered("a = 1.2.3\nb = 2 m + 3 s\nc = a * 2\n"));
}
