//! Resource limits through the Session API (what the REPL and the kernel
//! use): a worksheet that recurses without end, builds a huge list, never
//! converges or is interrupted ends with a clear error, and the session
//! answers the next cell normally.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

use siccant::session::{OutputItem, Session};

/// The messages of a failed evaluation (panics if it succeeded).
fn errors(session: &mut Session, text: &str) -> String {
    match session.eval(text) {
        Ok(out) => panic!("`{text}` should fail, gave {} items", out.items.len()),
        Err(diags) => diags
            .iter()
            .map(|d| session.render_diagnostic(d, false))
            .collect(),
    }
}

/// The session still evaluates ordinary cells, and keeps earlier values.
fn still_usable(session: &mut Session) {
    let out = session
        .eval("ok_after = 2 m * 3")
        .expect("a plain cell evaluates");
    let shown: Vec<String> = out
        .items
        .iter()
        .filter_map(|i| match i {
            OutputItem::Value { value, .. } => Some(siccant::render::text(value)),
            _ => None,
        })
        .collect();
    assert_eq!(shown.last().map(String::as_str), Some("6 m"));
    assert!(session.eval("kept * 2").is_ok(), "earlier values survive");
}

fn session() -> Session {
    let mut s = Session::new();
    s.eval("kept = 4 kg").expect("setup");
    s
}

#[test]
fn endless_recursion_stops_at_the_depth_limit() {
    let mut s = session();
    let e = errors(&mut s, "f(x) = f(x + 1)\ny = f(1)");
    assert!(e.contains("nested deeper than 64"), "{e}");
    still_usable(&mut s);
}

#[test]
fn exponential_recursion_stops_at_the_step_budget() {
    let mut s = session();
    s.limits_mut().max_operations = 200_000;
    let e = errors(
        &mut s,
        "f(n) = if n < 1 then 1 else f(n - 1) + f(n - 1)\ny = f(60)",
    );
    assert!(e.contains("evaluation stopped after 200000 steps"), "{e}");
    still_usable(&mut s);
}

#[test]
fn a_list_too_large_for_memory_is_refused() {
    let mut s = session();
    let text = "a = linspace(1, 2, 10000)\nb = [a, a, a, a, a, a, a, a, a, a]\n\
                f(n) = if n < 1 then b else [f(n - 1), f(n - 1)]\ny = f(40)";
    let e = errors(&mut s, text);
    assert!(e.contains("larger than the limit of 1000000"), "{e}");
    still_usable(&mut s);
}

#[test]
fn list_items_count_against_the_step_budget() {
    let mut s = session();
    s.limits_mut().max_operations = 50_000;
    // each linspace result is 10000 items: a handful of them exhausts 50000 steps
    let text = "a = linspace(1, 2, 10000)\nf(n) = if n < 1 then a else f(n - 1) + a\ny = f(20)";
    let e = errors(&mut s, text);
    assert!(e.contains("evaluation stopped after 50000 steps"), "{e}");
    still_usable(&mut s);
}

#[test]
fn values_nested_too_deeply_are_refused_not_overflowed() {
    // Each name wraps the previous one: 2000 levels would overflow the stack
    // when the value is copied or dropped, so nesting stops at 32 levels.
    for wrap in ["[a#]", "{x: a#}"] {
        let mut s = session();
        let mut text = String::from("a0 = [1]\n");
        for i in 1..=2000 {
            let inner = wrap.replace("#", &(i - 1).to_string());
            text.push_str(&format!("a{i} = {inner}\n"));
        }
        let e = errors(&mut s, &text);
        assert!(e.contains("nested deeper than 32 levels"), "{e}");
        still_usable(&mut s);
    }
    let mut s = session();
    assert!(s
        .eval("m = [[1, 2], [3, 4]]\nr = {grid: m, air: air(T: 20 degC, rh: 50 %)}")
        .is_ok());
}

#[test]
fn a_dryer_that_never_dries_is_an_error_and_the_session_goes_on() {
    let mut s = session();
    let text = "p = wet_product(cp_solid: 1.5 kJ/(kg*K), X_critical: 0.6 db, X_eq: 0.05 db)\n\
                amb = air(T: 20 degC, rh: 50 %)\n\
                d = tray_dryer(product: p, trays: 10, tray_area: 0.8 m^2, load: 15 kg/m^2, \
                X_initial: 1.5 db, X_final: 0.1 db, air: amb, T_supply: 25 degC, \
                air_flow: 0.001 kg/s, h: 30 W/(m^2*K), max_time: 1 h)";
    let e = errors(&mut s, text);
    assert!(e.contains("did not converge"), "{e}");
    still_usable(&mut s);
}

#[test]
fn an_interrupt_from_another_thread_stops_the_evaluation() {
    let mut s = session();
    let flag = s.interrupt_handle();
    let done = Arc::new(AtomicBool::new(false));
    let setter = {
        let (flag, done) = (flag.clone(), done.clone());
        // Keep raising the flag until the evaluation has ended (one store
        // would do; repeating it shows a busy raiser does no harm).
        std::thread::spawn(move || {
            while !done.load(Ordering::Relaxed) {
                flag.store(true, Ordering::Relaxed);
                std::thread::sleep(std::time::Duration::from_millis(5));
            }
        })
    };
    let e = errors(
        &mut s,
        "f(n) = if n < 1 then 1 else f(n - 1) + f(n - 1)\ny = f(60)",
    );
    done.store(true, Ordering::Relaxed);
    setter.join().expect("setter thread");
    assert!(e.contains("interrupted"), "{e}");
    // the front end lowers the flag before the next request
    s.clear_interrupt();
    still_usable(&mut s);
}
