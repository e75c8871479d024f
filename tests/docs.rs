//! docs/builtins.md is generated from the library registry (the same one that
//! feeds `help`); this test fails when the committed file is stale.
//!
//! Regenerate with `cargo run -- help --markdown > docs/builtins.md`
//! or `UPDATE_DOCS=1 cargo test --test docs`.

use std::path::PathBuf;

#[test]
fn builtin_reference_is_up_to_date() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("docs/builtins.md");
    let fresh = siccant::cli::builtins_markdown();
    if std::env::var_os("UPDATE_DOCS").is_some() {
        std::fs::write(&path, &fresh).expect("write docs/builtins.md");
        return;
    }
    let committed = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        committed == fresh,
        "docs/builtins.md is stale: run `UPDATE_DOCS=1 cargo test --test docs` (or `cargo run -- help --markdown > docs/builtins.md`) and commit it"
    );
}

#[test]
fn every_builtin_has_its_paper_trail() {
    for b in siccant::library::registry() {
        assert!(
            !b.doc.is_empty() && !b.method.is_empty() && !b.source.is_empty(),
            "`{}` lacks doc, method or source",
            b.name
        );
        assert!(
            !b.validity.is_empty() && !b.example.is_empty(),
            "`{}` lacks validity or example",
            b.name
        );
        assert!(
            siccant::session::Session::new().help(b.name).is_some(),
            "`help {}` finds nothing",
            b.name
        );
    }
}
