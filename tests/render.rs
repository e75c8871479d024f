//! Snapshot tests of table and plot renderings (invented data).

use siccant::render::{table, RenderError};
use siccant::units::{Dim, Kind, Quantity, Unit};
use siccant::value::{Column, Table, Value};

fn unit(symbol: &str, factor: f64, offset: f64, dim: Dim, kind: Kind) -> Unit {
    Unit { symbol: symbol.into(), factor, offset, dim, kind }
}

fn hours() -> Unit {
    unit("h", 3600.0, 0.0, Dim::TIME, Kind::Plain)
}

fn deg_c() -> Unit {
    unit("degC", 1.0, 273.15, Dim::TEMPERATURE, Kind::AbsoluteTemperature)
}

fn q(si: f64, dim: Dim, kind: Kind) -> Value {
    Value::Quantity(Quantity { si, dim, kind }, None)
}

/// An invented tray-drying run: time, moisture (dry basis), product temperature, note.
fn drying_run() -> Table {
    let t_h = [0.0, 0.5, 1.0, 2.0, 4.0];
    let x_db = [1.85, 1.52, 1.2071, 0.6403, 0.0912];
    let t_c = [21.0, 38.2, 41.05, 44.9, 63.27];
    let notes = ["start", "", "", "falling rate", "end | unload"];
    Table {
        title: Some("Tray run 3 (invented)".into()),
        columns: vec![
            Column { name: "t".into(), unit: Some(hours()), cells: t_h.iter().map(|h| q(h * 3600.0, Dim::TIME, Kind::Plain)).collect() },
            Column { name: "X".into(), unit: None, cells: x_db.iter().map(|x| q(*x, Dim::NONE, Kind::Moisture)).collect() },
            Column {
                name: "T_product".into(),
                unit: Some(deg_c()),
                cells: t_c.iter().map(|c| q(c + 273.15, Dim::TEMPERATURE, Kind::AbsoluteTemperature)).collect(),
            },
            Column { name: "note".into(), unit: None, cells: notes.iter().map(|n| Value::Str(n.to_string())).collect() },
        ],
    }
}

#[test]
fn table_text() {
    insta::assert_snapshot!(table::text(&drying_run()).unwrap());
}

#[test]
fn table_markdown() {
    insta::assert_snapshot!(table::markdown(&drying_run()).unwrap());
}

#[test]
fn table_html() {
    insta::assert_snapshot!(table::html(&drying_run()).unwrap());
}

#[test]
fn table_csv_keeps_full_precision() {
    insta::assert_snapshot!(table::csv(&drying_run()).unwrap());
}

#[test]
fn empty_table_is_a_clear_error() {
    let empty = Table { title: Some("nothing".into()), columns: vec![] };
    let err = table::text(&empty).unwrap_err();
    assert_eq!(err.to_string(), "the table `nothing` is empty: there is nothing to show");
    let no_rows = Table { title: None, columns: vec![Column { name: "a".into(), unit: None, cells: vec![] }] };
    assert!(matches!(table::markdown(&no_rows), Err(RenderError::EmptyTable { .. })));
}

#[test]
fn ragged_table_is_an_error() {
    let mut t = drying_run();
    t.columns[1].cells.pop();
    assert_eq!(table::html(&t).unwrap_err().to_string(), "column `X` has 4 rows but column `t` has 5");
}

#[test]
fn cell_in_wrong_unit_is_an_error() {
    let mut t = drying_run();
    t.columns[0].cells[2] = q(1.0, Dim::LENGTH, Kind::Plain);
    let err = table::text(&t).unwrap_err().to_string();
    assert!(err.starts_with("column `t`, row 3: "), "{err}");
    assert!(err.contains("cannot be shown in h"), "{err}");
}

#[test]
fn nan_cell_is_an_error_not_shown() {
    let mut t = drying_run();
    t.columns[1].cells[0] = q(f64::NAN, Dim::NONE, Kind::Moisture);
    assert!(matches!(table::csv(&t), Err(RenderError::NotFinite { .. })));
}

#[test]
fn export_writes_atomically_by_extension() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("run.csv");
    table::export(&drying_run(), &path).unwrap();
    let written = std::fs::read_to_string(&path).unwrap();
    assert!(written.starts_with("t [h],X [kg/kg_db],T_product [degC],note\n"), "{written}");
    let bad = dir.path().join("run.xyz");
    assert!(matches!(table::export(&drying_run(), &bad), Err(RenderError::Format { .. })));
    let unwritable = dir.path().join("missing/run.csv");
    assert!(matches!(table::export(&drying_run(), &unwritable), Err(RenderError::Write { .. })));
    let empty = Table::default();
    assert!(table::export(&empty, &dir.path().join("e.csv")).is_err());
    let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().map(|e| e.unwrap().file_name()).collect();
    assert_eq!(names, vec![std::ffi::OsString::from("run.csv")]);
}

#[test]
fn records_become_rows() {
    use siccant::value::Record;
    let rows: Vec<Value> = [(0.2, 300.0), (0.4, 310.0)]
        .iter()
        .map(|(aw, t)| {
            Value::Record(
                Record::new("point").with("aw", q(*aw, Dim::NONE, Kind::Activity)).with("T", q(*t, Dim::TEMPERATURE, Kind::AbsoluteTemperature)),
            )
        })
        .collect();
    let t = table::from_records(None, &rows).unwrap();
    insta::assert_snapshot!(table::text(&t).unwrap());
}
