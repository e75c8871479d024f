//! Property tests: arbitrary text never panics the language, and every
//! quantity it shows is a finite number.

use proptest::prelude::*;
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

fn tokens() -> impl Strategy<Value = String> {
    let token = prop_oneof![
        Just("x".to_string()),
        Just("y".to_string()),
        Just("f".to_string()),
        Just(" = ".to_string()),
        Just("\n".to_string()),
        Just("input ".to_string()),
        Just("check ".to_string()),
        Just(" as ".to_string()),
        "[0-9]{1,3}(\\.[0-9]{1,2})?".prop_map(|s| s),
        Just(" m".to_string()),
        Just(" degC".to_string()),
        Just(" kg/m^2".to_string()),
        Just(" db".to_string()),
        Just(" wb".to_string()),
        Just(" K".to_string()),
        Just(" %".to_string()),
        "[-+*/^<>(),\\[\\]{}.:\"#]".prop_map(|s| s),
        Just("sqrt(".to_string()),
        Just("load(".to_string()),
        Just("if ".to_string()),
        Just(" then ".to_string()),
        Just(" else ".to_string()),
    ];
    prop::collection::vec(token, 0..24).prop_map(|v| v.concat())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 600, ..ProptestConfig::default() })]

    #[test]
    fn arbitrary_worksheets_never_panic(text in tokens()) {
        let mut s = Session::new();
        if let Ok(out) = s.eval(&text) {
            for item in &out.items {
                if let OutputItem::Value { value, .. } = item {
                    prop_assert!(finite(value), "non-finite value from {text:?}");
                }
            }
        }
        let mut file = Session::with_file("fuzz.sicc");
        let _ = file.eval(&text);
        let _ = s.complete(&text, text.len() / 2);
        let _ = s.is_complete(&text);
        let _ = s.inspect(&text, text.len() / 3);
    }

    #[test]
    fn arbitrary_bytes_never_panic(text in "\\PC{0,60}") {
        let mut s = Session::new();
        let _ = s.eval(&text);
        let _ = s.complete(&text, text.len());
        let _ = s.inspect(&text, text.len() / 2);
    }
}
