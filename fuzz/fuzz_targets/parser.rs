//! Fuzz the parser: any text lowers to statements or diagnostics, never a
//! panic, and every diagnostic span lies inside the text.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    let (_, diagnostics) = siccant::syntax::parse(&text, 0);
    for d in &diagnostics {
        assert!(d.span.start <= d.span.end && d.span.end as usize <= text.len());
    }
    let _ = siccant::syntax::parse_expr(&text, 0);
});
