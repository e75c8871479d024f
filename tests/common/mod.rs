//! Helpers shared by the integration tests that evaluate whole worksheets.

use siccant::session::Session;
use siccant::value::{Record, Value};

/// Evaluate `text` in a new session; a diagnostic fails the test with its
/// rendered text.
pub fn run(text: &str) -> Session {
    let mut s = Session::new();
    if let Err(d) = s.eval(text) {
        let shown: String = d.iter().map(|d| s.render_diagnostic(d, false)).collect();
        panic!("{shown}");
    }
    s
}

/// The record value `name`.
pub fn record(s: &Session, name: &str) -> Record {
    match s.value(name) {
        Some(Value::Record(r)) => r.clone(),
        other => panic!("`{name}` is not a record: {other:?}"),
    }
}

/// The SI magnitude of a quantity.
pub fn si(v: Option<&Value>) -> f64 {
    match v {
        Some(Value::Quantity(q, _)) => q.si,
        other => panic!("not a quantity: {other:?}"),
    }
}
