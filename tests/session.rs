//! The Session API that the CLI, the REPL and the kernel share.

use siccant::session::{Completeness, OutputItem, Session};
use siccant::value::Value;

fn shown(session: &mut Session, text: &str) -> String {
    match session.eval(text) {
        Ok(out) => match out.items.last() {
            Some(OutputItem::Value { value, .. }) => siccant::render::text(value),
            other => panic!("no value: {other:?}"),
        },
        Err(d) => panic!(
            "{}",
            d.iter()
                .map(|d| session.render_diagnostic(d, false))
                .collect::<String>()
        ),
    }
}

#[test]
fn redefinition_in_a_session_recomputes_dependents() {
    let mut s = Session::new();
    assert_eq!(shown(&mut s, "a = 2 m\nb = a * 3\nb"), "6 m");
    assert_eq!(shown(&mut s, "a = 5 m"), "5 m");
    assert_eq!(shown(&mut s, "b"), "15 m");
}

#[test]
fn a_cycle_made_in_a_session_is_refused_and_leaves_the_old_definition() {
    let mut s = Session::new();
    shown(&mut s, "a = 1 m\nb = a + 1 m");
    assert!(s.eval("a = b").is_err());
    assert_eq!(shown(&mut s, "b"), "2 m");
}

#[test]
fn is_complete_waits_for_open_brackets() {
    let s = Session::new();
    assert_eq!(s.is_complete("x = 1"), Completeness::Complete);
    assert!(matches!(
        s.is_complete("x = f(1,"),
        Completeness::Incomplete { .. }
    ));
    assert!(matches!(
        s.is_complete("x = [1,\n 2"),
        Completeness::Incomplete { .. }
    ));
    assert_eq!(s.is_complete("x = 1)"), Completeness::Invalid);
}

#[test]
fn completion_offers_names_builtins_and_units() {
    let mut s = Session::new();
    shown(&mut s, "dry_solid = 60 kg");
    let c = s.complete("x = dry", 7);
    assert_eq!((c.start, c.end), (4, 7));
    assert!(c.matches.contains(&"dry_solid".to_string()));
    assert!(s
        .complete("y = sq", 6)
        .matches
        .contains(&"sqrt".to_string()));
    assert!(s
        .complete("z = 3 de", 8)
        .matches
        .contains(&"degC".to_string()));
}

#[test]
fn inspect_shows_builtin_docs_and_definitions() {
    let mut s = Session::new();
    shown(&mut s, "area = 2 m * 3 m");
    let doc = s.inspect("sqrt(4)", 2).unwrap_or_default();
    assert!(doc.contains("Square root"), "{doc}");
    let def = s.inspect("area * 2", 1).unwrap_or_default();
    assert!(
        def.contains("area = 2 m * 3 m") && def.contains("6 m^2"),
        "{def}"
    );
}

#[test]
fn interrupt_flag_stops_evaluation() {
    use std::sync::atomic::{AtomicBool, Ordering};
    use std::sync::Arc;
    let mut s = Session::new();
    s.limits_mut().max_operations = u64::MAX;
    assert!(s
        .eval("t(n) = if n > 0 then t(n - 1) + t(n - 1) else 1")
        .is_ok());
    let flag = s.interrupt_handle();
    let done = Arc::new(AtomicBool::new(false));
    let done2 = done.clone();
    // Keep raising the flag until the evaluation has stopped; 2^60 calls
    // would otherwise run for years, so only the interrupt can end it.
    let raiser = std::thread::spawn(move || {
        while !done2.load(Ordering::Relaxed) {
            flag.store(true, Ordering::Relaxed);
            std::thread::sleep(std::time::Duration::from_millis(5));
        }
    });
    let r = s.eval("t(60)");
    done.store(true, Ordering::Relaxed);
    let _ = raiser.join();
    let message = r
        .err()
        .and_then(|d| d.first().map(|d| d.message.clone()))
        .unwrap_or_default();
    assert_eq!(message, "interrupted");
    // The flag stays raised until the front end clears it for the next request.
    assert!(s.eval("1 + 1").is_err());
    s.clear_interrupt();
    assert!(s.eval("1 + 1").is_ok());
}

#[test]
fn diagnostics_render_with_file_line_and_column() {
    let mut s = Session::with_file("plant.sicc");
    let errors = s.eval("a = 1 m\nb = a + 2 s\n").err().unwrap_or_default();
    let text = s.render_diagnostic(&errors[0], false);
    assert!(text.contains("plant.sicc:2:5"), "{text}");
    assert!(text.contains("length") && text.contains("time"), "{text}");
}

#[test]
fn set_input_overrides_before_eval() {
    let mut s = Session::with_file("x.sicc");
    s.set_input(
        "L",
        Value::Quantity(siccant::units::Quantity::number(2.0), None),
    );
    assert_eq!(shown(&mut s, "input L = 1\ny = L * 3\ny"), "6");
}

#[test]
fn a_long_lived_session_keeps_a_bounded_amount_between_cells() {
    let mut s = Session::new();
    s.eval("keep = 3 kg").expect("first cell");
    let after_warm_up = {
        for _ in 0..50 {
            s.eval("x = 1 m").expect("definition");
            s.eval("x + 1 m").expect("expression");
            s.eval("x as cm").expect("conversion");
        }
        s.retained()
    };
    for _ in 0..5_000 {
        s.eval("x = 1 m").expect("definition");
        s.eval("x + 1 m").expect("expression");
        s.eval("x as cm").expect("conversion");
    }
    let r = s.retained();
    assert_eq!(r, after_warm_up, "retained collections grew with cells");
    // `keep`, `x` and the last cell's text: nothing more.
    assert_eq!(r.sources, 3);
    assert_eq!(r.definitions, 2);
    assert_eq!(shown(&mut s, "keep"), "3 kg");
}

#[test]
fn an_old_cell_that_is_still_defined_keeps_its_source_for_diagnostics() {
    let mut s = Session::new();
    assert!(s.eval("a = 2 m\nbad = a + 1 s").is_err());
    for _ in 0..100 {
        s.eval("y = 1 m").expect("definition");
    }
    let errors = s.eval("bad").expect_err("still a dimension error");
    let shown: String = errors
        .iter()
        .map(|d| s.render_diagnostic(d, false))
        .collect();
    assert!(shown.contains("bad = a + 1 s"), "{shown}");
    assert!(shown.contains("<input 1>"), "{shown}");
}
