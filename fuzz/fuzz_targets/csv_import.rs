//! Fuzz CSV import: any bytes give a table of finite numbers or an error.
#![no_main]

use libfuzzer_sys::fuzz_target;
use siccant::value::Value;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(table) = siccant::library::data::parse_table(text) {
        for column in &table.columns {
            for cell in &column.cells {
                if let Value::Quantity(q, _) = cell {
                    assert!(q.si.is_finite(), "non-finite cell from {text:?}");
                }
            }
        }
        let _ = siccant::library::data::table_csv(&table);
    }
});
