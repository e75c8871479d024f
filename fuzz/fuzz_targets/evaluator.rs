//! Fuzz the evaluator on arbitrary worksheets, with a small step budget so
//! that no input can hang it; every value shown must be a finite number, and
//! the session must answer a plain cell afterwards.
#![no_main]

use libfuzzer_sys::fuzz_target;
use siccant::session::{OutputItem, Session};
use siccant::value::Value;

fn finite(v: &Value) -> bool {
    match v {
        Value::Quantity(q, _) => q.si.is_finite(),
        Value::List(items) => items.iter().all(finite),
        Value::Record(r) => r.fields.iter().all(|(_, v)| finite(v)),
        _ => true,
    }
}

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    // Worksheets must not reach the file system from the fuzzer.
    if text.contains("load") || text.contains("save_csv") || text.contains("lab_data") {
        return;
    }
    let mut session = Session::new();
    session.limits_mut().max_operations = 200_000;
    if let Ok(out) = session.eval(&text) {
        for item in &out.items {
            if let OutputItem::Value { value, .. } = item {
                assert!(finite(value), "non-finite value from {text:?}");
                let _ = siccant::render::text(value);
            }
        }
    }
    assert!(session.eval("fuzz_after = 1 m + 2 m").is_ok());
});
