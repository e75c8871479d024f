//! Snapshot tests of table and plot renderings (invented data).

use siccant::render::{table, RenderError};
use siccant::units::{lookup_unit, Dim, Kind, Quantity, Unit};
use siccant::value::{Column, Table, Value};

fn unit(symbol: &str) -> Unit {
    lookup_unit(symbol).unwrap_or_else(|| panic!("unit {symbol}"))
}

fn hours() -> Unit {
    unit("h")
}

fn deg_c() -> Unit {
    unit("degC")
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
            Column {
                name: "t".into(),
                unit: Some(hours()),
                cells: t_h
                    .iter()
                    .map(|h| q(h * 3600.0, Dim::TIME, Kind::Plain))
                    .collect(),
            },
            Column {
                name: "X".into(),
                unit: None,
                cells: x_db
                    .iter()
                    .map(|x| q(*x, Dim::NONE, Kind::Moisture))
                    .collect(),
            },
            Column {
                name: "T_product".into(),
                unit: Some(deg_c()),
                cells: t_c
                    .iter()
                    .map(|c| q(c + 273.15, Dim::TEMPERATURE, Kind::AbsoluteTemperature))
                    .collect(),
            },
            Column {
                name: "note".into(),
                unit: None,
                cells: notes.iter().map(|n| Value::Str(n.to_string())).collect(),
            },
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
fn table_json() {
    let json = siccant::render::json(&Value::Table(drying_run()));
    insta::assert_snapshot!(serde_json::to_string_pretty(&json).unwrap());
}

#[test]
fn empty_table_is_a_clear_error() {
    let empty = Table {
        title: Some("nothing".into()),
        columns: vec![],
    };
    let err = table::text(&empty).unwrap_err();
    assert_eq!(
        err.to_string(),
        "the table `nothing` is empty: there is nothing to show"
    );
    let no_rows = Table {
        title: None,
        columns: vec![Column {
            name: "a".into(),
            unit: None,
            cells: vec![],
        }],
    };
    assert!(matches!(
        table::markdown(&no_rows),
        Err(RenderError::EmptyTable { .. })
    ));
}

#[test]
fn ragged_table_is_an_error() {
    let mut t = drying_run();
    t.columns[1].cells.pop();
    assert_eq!(
        table::html(&t).unwrap_err().to_string(),
        "column `X` has 4 rows but column `t` has 5"
    );
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
    assert!(
        written.starts_with("t [h],X [db],T_product [degC],note\n"),
        "{written}"
    );
    let bad = dir.path().join("run.xyz");
    assert!(matches!(
        table::export(&drying_run(), &bad),
        Err(RenderError::Format { .. })
    ));
    let unwritable = dir.path().join("missing/run.csv");
    assert!(matches!(
        table::export(&drying_run(), &unwritable),
        Err(RenderError::Write { .. })
    ));
    let empty = Table::default();
    assert!(table::export(&empty, &dir.path().join("e.csv")).is_err());
    let names: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(names, vec![std::ffi::OsString::from("run.csv")]);
}

#[test]
fn records_become_rows() {
    use siccant::value::Record;
    let rows: Vec<Value> = [(0.2, 300.0), (0.4, 310.0)]
        .iter()
        .map(|(aw, t)| {
            Value::Record(
                Record::new("point")
                    .with("aw", q(*aw, Dim::NONE, Kind::Activity))
                    .with("T", q(*t, Dim::TEMPERATURE, Kind::AbsoluteTemperature)),
            )
        })
        .collect();
    let t = table::from_records(None, &rows).unwrap();
    insta::assert_snapshot!(table::text(&t).unwrap());
}

mod plots {
    use super::*;
    use siccant::render::plot::{self, AxisUnits, Curve, Grid, RatePeriods};
    use siccant::value::{Plot, SeriesStyle};

    fn time(h: &[f64]) -> Vec<Quantity> {
        h.iter()
            .map(|h| Quantity {
                si: h * 3600.0,
                dim: Dim::TIME,
                kind: Kind::Plain,
            })
            .collect()
    }

    fn moisture(x: &[f64]) -> Vec<Quantity> {
        x.iter()
            .map(|x| Quantity {
                si: *x,
                dim: Dim::NONE,
                kind: Kind::Moisture,
            })
            .collect()
    }

    fn plain(v: &[f64], dim: Dim) -> Vec<Quantity> {
        v.iter()
            .map(|v| Quantity {
                si: *v,
                dim,
                kind: Kind::Plain,
            })
            .collect()
    }

    fn hours_axis() -> AxisUnits {
        AxisUnits {
            x: Some(hours()),
            y: None,
        }
    }

    /// Invented drying run and an invented exponential model through it.
    pub fn drying() -> Plot {
        let data = Curve::new(
            "run 3 (invented)",
            time(&[0.0, 0.5, 1.0, 2.0, 3.0, 4.0]),
            moisture(&[1.85, 1.52, 1.21, 0.64, 0.31, 0.12]),
        );
        let t: Vec<f64> = (0..=40).map(|i| i as f64 * 0.1).collect();
        let x: Vec<f64> = t.iter().map(|t| 0.05 + 1.8 * (-0.62 * t).exp()).collect();
        let model = Curve::new("model (invented)", time(&t), moisture(&x));
        plot::drying_curve("Drying curve, tray 3", &[data], &[model], hours_axis()).unwrap()
    }

    pub fn rate() -> Plot {
        let x = [0.05, 0.2, 0.4, 0.6, 0.8, 1.0, 1.4, 1.85];
        let r = [0.0, 0.21, 0.42, 0.63, 0.8, 0.8, 0.8, 0.8];
        let flux = Dim::MASS_FLUX;
        let curve = Curve::new(
            "rate (invented)",
            moisture(&x),
            plain(&r.map(|r| r / 3600.0), flux),
        );
        let periods = RatePeriods {
            critical: Some(moisture(&[0.78])[0]),
            equilibrium: Some(moisture(&[0.05])[0]),
        };
        let per_h = unit("kg").div(&unit("m").powi(2)).div(&unit("h"));
        plot::rate_curve(
            "Rate curve",
            &[curve],
            &periods,
            AxisUnits {
                x: None,
                y: Some(per_h),
            },
        )
        .unwrap()
    }

    /// Invented sorption data at two temperatures and invented smooth model curves through them.
    pub fn isotherm() -> Plot {
        let aw = |v: &[f64]| {
            v.iter()
                .map(|a| Quantity {
                    si: *a,
                    dim: Dim::NONE,
                    kind: Kind::Activity,
                })
                .collect::<Vec<_>>()
        };
        let d30 = Curve::new(
            "30 degC data",
            aw(&[0.11, 0.33, 0.53, 0.75, 0.85]),
            moisture(&[0.04, 0.07, 0.10, 0.17, 0.25]),
        );
        let d50 = Curve::new(
            "50 degC data",
            aw(&[0.11, 0.33, 0.53, 0.75, 0.85]),
            moisture(&[0.03, 0.055, 0.085, 0.15, 0.22]),
        );
        let grid: Vec<f64> = (1..=18).map(|i| i as f64 * 0.05).collect();
        let model = |k: f64| {
            grid.iter()
                .map(|a| k * a / ((1.0 - 0.9 * a) * (1.0 + 2.0 * a)))
                .collect::<Vec<_>>()
        };
        let m30 = Curve::new("30 degC model", aw(&grid), moisture(&model(0.115)));
        let m50 = Curve::new("50 degC model", aw(&grid), moisture(&model(0.1)));
        plot::isotherms(
            "Sorption isotherms (invented)",
            &[d30, d50],
            &[m30, m50],
            AxisUnits::default(),
        )
        .unwrap()
    }

    /// Invented air and product temperatures along a belt dryer.
    pub fn profile() -> Plot {
        let z: Vec<f64> = (0..=20).map(|i| i as f64 * 0.5).collect();
        let temp = |f: &dyn Fn(f64) -> f64| {
            z.iter()
                .map(|z| Quantity {
                    si: f(*z) + 273.15,
                    dim: Dim::TEMPERATURE,
                    kind: Kind::AbsoluteTemperature,
                })
                .collect::<Vec<_>>()
        };
        let air = Curve::new("air", plain(&z, Dim::LENGTH), temp(&|z| 80.0 - 2.0 * z));
        let product = Curve::new(
            "product",
            plain(&z, Dim::LENGTH),
            temp(&|z| 20.0 + 40.0 * (1.0 - (-0.4 * z).exp())),
        );
        plot::profile(
            "Belt dryer profile (invented)",
            "temperature",
            &[air, product],
            AxisUnits::default(),
        )
        .unwrap()
    }

    pub fn heat() -> Plot {
        let xs = [50.0, 60.0, 70.0, 80.0];
        let ys = [1.0, 1.5, 2.0];
        let z: Vec<f64> = ys
            .iter()
            .flat_map(|v| xs.iter().map(move |t| 10.0 / (v * (t - 20.0) / 30.0)))
            .collect();
        let grid = Grid {
            x_name: "air temperature".into(),
            y_name: "air velocity".into(),
            z_name: "batch time".into(),
            x: xs
                .iter()
                .map(|c| Quantity {
                    si: c + 273.15,
                    dim: Dim::TEMPERATURE,
                    kind: Kind::AbsoluteTemperature,
                })
                .collect(),
            y: plain(&ys, Dim::VELOCITY),
            z: time(&z),
            z_unit: Some(hours()),
        };
        plot::sweep_heat(
            "Batch time over a two-input sweep (invented)",
            &grid,
            AxisUnits {
                x: Some(deg_c()),
                y: None,
            },
        )
        .unwrap()
    }

    #[test]
    fn svg_is_deterministic_and_png_decodes() {
        let dir = std::path::Path::new(env!("CARGO_TARGET_TMPDIR")).join("render-gallery");
        std::fs::create_dir_all(&dir).unwrap();
        for (name, p) in [
            ("drying", drying()),
            ("rate", rate()),
            ("heat", heat()),
            ("isotherm", isotherm()),
            ("profile", profile()),
        ] {
            let a = siccant::render::svg(&p).unwrap();
            assert_eq!(a, siccant::render::svg(&p).unwrap());
            assert!(a.starts_with("<svg"), "{name}");
            let png = siccant::render::png(&p).unwrap();
            assert_eq!(&png[1..4], b"PNG");
            std::fs::write(dir.join(format!("{name}.svg")), &a).unwrap();
            std::fs::write(dir.join(format!("{name}.png")), &png).unwrap();
        }
    }

    #[test]
    fn axis_labels_carry_units() {
        let p = drying();
        assert_eq!(p.x_label, "time [h]");
        assert_eq!(p.y_label, "moisture content X [db]");
    }

    #[test]
    fn series_of_different_lengths_is_an_error() {
        let c = Curve::new("short", time(&[0.0, 1.0]), moisture(&[1.0]));
        let err = plot::drying_curve("t", &[c], &[], AxisUnits::default()).unwrap_err();
        assert_eq!(
            err.to_string(),
            "series `short` has 2 x values but 1 y values"
        );
    }

    #[test]
    fn incompatible_units_on_one_axis_is_an_error() {
        let a = Curve::new("a", time(&[0.0, 1.0]), moisture(&[1.0, 0.5]));
        let b = Curve::new("b", plain(&[0.0, 1.0], Dim::LENGTH), moisture(&[1.0, 0.5]));
        let err = plot::sweep_lines("t", "x", "y", &[a, b], AxisUnits::default())
            .unwrap_err()
            .to_string();
        assert!(err.starts_with("the x axis already shows"), "{err}");
        assert!(err.contains("series `b`"), "{err}");
    }

    #[test]
    fn raw_plot_checks() {
        let mut p = drying();
        p.series[0].y.pop();
        assert!(matches!(
            siccant::render::svg(&p),
            Err(RenderError::SeriesLength { .. })
        ));
        let mut p = drying();
        p.series[1].y[3] = f64::NAN;
        assert!(matches!(
            siccant::render::png(&p),
            Err(RenderError::NotFinite { .. })
        ));
        let empty = Plot {
            title: "nothing".into(),
            ..Plot::default()
        };
        assert_eq!(
            siccant::render::svg(&empty).unwrap_err().to_string(),
            "the plot `nothing` has no data to draw"
        );
        let mut h = heat();
        if let Some(grid) = h.heat.as_mut() {
            grid.z.pop();
        }
        assert!(matches!(
            siccant::render::svg(&h),
            Err(RenderError::HeatGrid {
                nx: 4,
                ny: 3,
                nz: 11
            })
        ));
        let _ = SeriesStyle::Dotted;
    }
}

mod chart {
    use siccant::session::{OutputItem, Session};
    use siccant::value::Value;

    /// Invented states: ambient air heated, then cooled along its wet-bulb in a dryer.
    const SHEET: &str = r#"
amb = air(T: 24 degC, rh: 55 %)
hot = heat(amb, to: 45 degC)
out = saturate(hot, effectiveness: 0.8)
chart = psychrometric_chart(states: [amb, hot, out], labels: ["ambient", "heated", "exhaust"], path: [amb, hot, out])
"#;

    #[test]
    fn psychrometric_chart_renders_with_states_and_path() {
        let out = Session::new().eval(SHEET).unwrap();
        let plot = out
            .items
            .iter()
            .find_map(|i| match i {
                OutputItem::Value {
                    value: Value::Plot(p),
                    ..
                } => Some(p.clone()),
                _ => None,
            })
            .expect("a plot");
        assert_eq!(plot.x_label, "dry-bulb temperature [degC]");
        assert!(plot
            .series
            .iter()
            .any(|s| s.label == "process" && s.x.len() == 3));
        let svg = siccant::render::svg(&plot).unwrap();
        for label in ["ambient", "heated", "exhaust", "saturation", "40 %"] {
            assert!(svg.contains(label), "{label}");
        }
        let dir = std::path::Path::new(env!("CARGO_TARGET_TMPDIR")).join("render-gallery");
        std::fs::create_dir_all(&dir).unwrap();
        std::fs::write(dir.join("chart.svg"), &svg).unwrap();
        std::fs::write(dir.join("chart.png"), siccant::render::png(&plot).unwrap()).unwrap();
    }

    #[test]
    fn chart_window_errors_are_clear() {
        let err = Session::new()
            .eval("c = psychrometric_chart(T_max: 900 degC)")
            .unwrap_err();
        assert!(
            err[0].message.starts_with("cannot draw the chart:"),
            "{}",
            err[0].message
        );
        let err = Session::new()
            .eval("c = psychrometric_chart(states: [1 m])")
            .unwrap_err();
        assert!(
            err[0].message.contains("not an air state"),
            "{}",
            err[0].message
        );
    }
}

#[test]
fn extreme_values_are_refused_and_tiny_ranges_draw() {
    use siccant::value::{Plot, Series};
    let plot = |x: Vec<f64>, y: Vec<f64>| {
        let series = Series {
            label: "s".into(),
            x,
            y,
            ..Series::default()
        };
        Plot {
            title: "extremes".into(),
            series: vec![series],
            ..Plot::default()
        }
    };
    let huge = siccant::render::svg(&plot(vec![-1e308, 1e308], vec![0.0, 1.0])).unwrap_err();
    assert!(huge.to_string().contains("too large to plot"), "{huge}");
    assert!(siccant::render::svg(&plot(vec![0.0, 1e-20], vec![3e-9, 3e-9])).is_ok());
    assert!(siccant::render::svg(&plot(vec![5.0], vec![0.0])).is_ok());
}

mod robustness {
    use proptest::prelude::*;
    use siccant::value::{Mark, Plot, Series, SeriesStyle};

    fn style(i: u8) -> SeriesStyle {
        [
            SeriesStyle::Line,
            SeriesStyle::Points,
            SeriesStyle::Dashed,
            SeriesStyle::Thin,
            SeriesStyle::Dotted,
        ][i as usize % 5]
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(24))]
        /// Any finite data within the plot limit draws (or is refused) without panicking.
        #[test]
        fn any_finite_plot_draws(
            xs in prop::collection::vec(-1e12f64..1e12, 0..12),
            scale in -30i32..30,
            s in 0u8..5,
            vline in -1e3f64..1e3,
        ) {
            let ys: Vec<f64> = xs.iter().map(|x| x * 10f64.powi(scale)).collect();
            let series = Series { label: "data".into(), x: xs.clone(), y: ys, style: style(s) };
            let marks = vec![Mark::VLine { x: vline, label: "m".into() }, Mark::Span { x0: vline, x1: vline + 1.0, label: "band".into() }];
            let plot = Plot { title: "random".into(), series: vec![series], marks, ..Plot::default() };
            match siccant::render::svg(&plot) {
                Ok(svg) => prop_assert!(svg.ends_with("</svg>\n")),
                Err(e) => prop_assert!(!e.to_string().is_empty()),
            }
        }
    }
}

#[test]
fn mixed_cells_negative_and_scientific_columns() {
    let flux = |v: f64| q(v, Dim::HEAT_FLUX, Kind::Plain);
    let t = Table {
        title: None,
        columns: vec![
            Column {
                name: "case".into(),
                unit: None,
                cells: vec![
                    Value::Str("a".into()),
                    Value::Str("b".into()),
                    Value::Str("c".into()),
                ],
            },
            Column {
                name: "q_loss".into(),
                unit: None,
                cells: vec![flux(-12.5), flux(0.0), flux(3.25)],
            },
            Column {
                name: "D_eff".into(),
                unit: None,
                cells: vec![
                    q(2.1e-10, Dim::DIFFUSIVITY, Kind::Plain),
                    q(3.35e-10, Dim::DIFFUSIVITY, Kind::Plain),
                    q(1e-9, Dim::DIFFUSIVITY, Kind::Plain),
                ],
            },
            Column {
                name: "ok".into(),
                unit: None,
                cells: vec![Value::Bool(true), Value::Bool(false), Value::Bool(true)],
            },
            Column {
                name: "mixed".into(),
                unit: None,
                cells: vec![
                    q(1.5, Dim::LENGTH, Kind::Plain),
                    Value::Str("n/a".into()),
                    q(2.0, Dim::LENGTH, Kind::Plain),
                ],
            },
        ],
    };
    insta::assert_snapshot!(table::text(&t).unwrap());
}

/// A fit's parameter table (invented values): one column holds a moisture
/// (`db`), a plain number and a coefficient per kelvin, so no one unit can
/// head it and each cell shows its own.
fn mixed_parameters() -> Table {
    let per_kelvin = Dim::TEMPERATURE.recip();
    Table {
        title: Some("parameters (invented)".into()),
        columns: vec![
            Column {
                name: "parameter".into(),
                unit: None,
                cells: ["A", "B", "C"]
                    .iter()
                    .map(|n| Value::Str(n.to_string()))
                    .collect(),
            },
            Column {
                name: "value".into(),
                unit: None,
                cells: vec![
                    q(0.1144, Dim::NONE, Kind::Moisture),
                    q(-0.0031, per_kelvin, Kind::Plain),
                    q(2.209, Dim::NONE, Kind::Plain),
                ],
            },
        ],
    }
}

#[test]
fn column_of_mixed_units_shows_each_cell_in_its_own() {
    let text = table::text(&mixed_parameters()).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(
        lines[1].split_whitespace().collect::<Vec<_>>(),
        ["parameter", "value"]
    );
    assert!(lines[3].ends_with("0.1144 db"), "{text}");
    assert!(lines[4].ends_with("-0.0031 1/K"), "{text}");
    assert!(lines[5].ends_with("2.209"), "{text}");
    let csv = table::csv(&mixed_parameters()).unwrap();
    assert!(csv.contains("-0.0031 1/K"), "{csv}");
    let json = siccant::render::json(&Value::Table(mixed_parameters()));
    assert_eq!(json["columns"][1]["unit"], serde_json::Value::Null);
    assert_eq!(json["rows"][1][1]["unit"], "1/K");
    assert_eq!(json["rows"][1][1]["si"], -0.0031);
    // A column that does set its unit still refuses a cell of another dimension.
    let mut t = mixed_parameters();
    t.columns[1].unit = Some(unit("db"));
    assert!(table::text(&t).unwrap_err().to_string().contains("row 2"));
}
