//! The lines of a psychrometric chart (dry-bulb against humidity ratio) at one
//! total pressure: saturation, relative-humidity lines, thermodynamic wet-bulb
//! lines and humid-volume lines, each computed point by point with the humid-air
//! engine ([`crate::engine::air`]), so the chart agrees with every air state the
//! worksheet computes. Points are (dry-bulb in K, humidity ratio in kg/kg dry air).
//!
//! Method: each line is a locus of the engine's own state functions; humid-volume
//! points solve v(T, w) = v for w with Brent's method ([`crate::engine::solve`]).
//! Validity: that of the air engine (dry-bulb -40..350 degC); lines stop at the
//! chart's humidity-ratio ceiling and where the states stop existing (w < 0,
//! saturation above the boiling point).

use uom::si::f64::{Pressure, ThermodynamicTemperature};
use uom::si::thermodynamic_temperature::kelvin;

use super::air::{AirError, AirState};
use super::solve::{brent, Tolerance};

/// A polyline of (dry-bulb K, humidity ratio kg/kg_da) points.
pub type Line = Vec<(f64, f64)>;

/// The window of a chart: dry-bulb range and humidity-ratio ceiling.
#[derive(Clone, Copy, Debug)]
pub struct ChartWindow {
    pub t_min_k: f64,
    pub t_max_k: f64,
    pub w_max_kg_per_kg_da: f64,
    pub pressure: Pressure,
}

/// Every line of the chart, each with the value it holds constant.
#[derive(Clone, Debug, Default)]
pub struct ChartLines {
    pub saturation: Line,
    /// (relative humidity 0..1, line).
    pub relative_humidity: Vec<(f64, Line)>,
    /// (wet-bulb K, line), from the saturation curve down to dry air.
    pub wet_bulb: Vec<(f64, Line)>,
    /// (humid volume m^3/kg dry air, line).
    pub humid_volume: Vec<(f64, Line)>,
}

/// Points along each dry-bulb sweep.
const STEPS: usize = 120;

/// Compute the chart's lines inside `window`.
///
/// Errors: a window the air engine cannot evaluate (dry-bulb outside -40..350
/// degC, pressure out of range), an empty window, or a ceiling that is not positive.
pub fn chart_lines(window: &ChartWindow) -> Result<ChartLines, AirError> {
    check_window(window)?;
    let saturation = rh_line(window, 1.0)?;
    let relative_humidity = (1..10)
        .map(|i| f64::from(i) / 10.0)
        .map(|rh| rh_line(window, rh).map(|l| (rh, l)))
        .collect::<Result<_, _>>()?;
    Ok(ChartLines {
        saturation,
        relative_humidity,
        wet_bulb: wet_bulb_lines(window),
        humid_volume: volume_lines(window)?,
    })
}

fn check_window(window: &ChartWindow) -> Result<(), AirError> {
    // The engine's own range check names the limits.
    AirState::from_w(kelvin_t(window.t_min_k), 0.0, window.pressure)?;
    AirState::from_w(kelvin_t(window.t_max_k), 0.0, window.pressure)?;
    let ok = window.t_max_k > window.t_min_k
        && window.w_max_kg_per_kg_da > 0.0
        && window.w_max_kg_per_kg_da.is_finite();
    match ok {
        true => Ok(()),
        false => Err(AirError::HumidityRatioNegative {
            name: "chart window",
            value: window
                .w_max_kg_per_kg_da
                .min(window.t_max_k - window.t_min_k),
        }),
    }
}

fn kelvin_t(t_k: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<kelvin>(t_k)
}

fn sweep(window: &ChartWindow) -> impl Iterator<Item = f64> + '_ {
    (0..=STEPS)
        .map(move |i| window.t_min_k + (window.t_max_k - window.t_min_k) * i as f64 / STEPS as f64)
}

/// A constant relative-humidity line, cut where it crosses the ceiling.
fn rh_line(window: &ChartWindow, rh: f64) -> Result<Line, AirError> {
    let mut line = Line::new();
    for t in sweep(window) {
        let w = match AirState::from_rh(kelvin_t(t), rh, window.pressure) {
            Ok(s) => s.humidity_ratio(),
            // Above the boiling point the line has left every chart.
            Err(AirError::RelativeHumidityAboveBoiling { .. }) => f64::INFINITY,
            Err(e) => return Err(e),
        };
        if w > window.w_max_kg_per_kg_da {
            if let Some(&(t0, w0)) = line.last() {
                let f = (window.w_max_kg_per_kg_da - w0) / (w - w0);
                let t_cross = if w.is_finite() { t0 + f * (t - t0) } else { t0 };
                line.push((t_cross, window.w_max_kg_per_kg_da));
            }
            break;
        }
        line.push((t, w));
    }
    Ok(line)
}

/// Wet-bulb lines every 5 degC, from saturation to bone-dry air.
fn wet_bulb_lines(window: &ChartWindow) -> Vec<(f64, Line)> {
    let first_c = ((window.t_min_k - 273.15) / 5.0).ceil() * 5.0;
    let mut lines = Vec::new();
    let mut twb_c = first_c;
    while twb_c + 273.15 < window.t_max_k {
        let line = wet_bulb_line(window, twb_c + 273.15);
        if line.len() >= 2 {
            lines.push((twb_c + 273.15, line));
        }
        twb_c += 5.0;
    }
    lines
}

fn wet_bulb_line(window: &ChartWindow, twb_k: f64) -> Line {
    let state = |t: f64| {
        AirState::from_wet_bulb(kelvin_t(t), kelvin_t(twb_k), window.pressure)
            .ok()
            .map(|s| s.humidity_ratio())
    };
    let mut line = Line::new();
    let mut last_ok = twb_k;
    for t in std::iter::once(twb_k).chain(sweep(window).filter(|t| *t > twb_k)) {
        match state(t) {
            Some(w) if w <= window.w_max_kg_per_kg_da => {
                line.push((t, w));
                last_ok = t;
            }
            Some(_) => continue,
            None => {
                line.extend(dry_end(&state, last_ok, t));
                break;
            }
        }
    }
    line
}

/// Where a wet-bulb line meets w = 0, between the last state that exists and the first that does not (bisection).
fn dry_end(state: &impl Fn(f64) -> Option<f64>, mut ok: f64, mut bad: f64) -> Option<(f64, f64)> {
    for _ in 0..40 {
        let mid = 0.5 * (ok + bad);
        match state(mid) {
            Some(_) => ok = mid,
            None => bad = mid,
        }
    }
    state(ok).map(|w| (ok, w))
}

/// Humid-volume lines every 0.05 m^3/kg dry air across the window.
fn volume_lines(window: &ChartWindow) -> Result<Vec<(f64, Line)>, AirError> {
    let v_of = |t: f64, w: f64| {
        AirState::from_w(kelvin_t(t), w, window.pressure).map(|s| s.humid_volume().value)
    };
    let v_low = v_of(window.t_min_k, 0.0)?;
    let v_high = v_of(window.t_max_k, 0.0)?;
    let mut lines = Vec::new();
    let mut v = (v_low / 0.05).ceil() * 0.05;
    while v <= v_high + 0.2 {
        let line: Line = sweep(window)
            .filter_map(|t| volume_point(window, t, v))
            .collect();
        if line.len() >= 2 {
            lines.push((v, line));
        }
        v += 0.05;
    }
    Ok(lines)
}

/// The humidity ratio at dry-bulb `t` where the humid volume is `v`, if inside the chart.
fn volume_point(window: &ChartWindow, t: f64, v: f64) -> Option<(f64, f64)> {
    let top = AirState::from_rh(kelvin_t(t), 1.0, window.pressure)
        .map_or(window.w_max_kg_per_kg_da, |s| s.humidity_ratio());
    let top = top.min(window.w_max_kg_per_kg_da);
    let f = |w: f64| {
        AirState::from_w(kelvin_t(t), w, window.pressure)
            .map_or(f64::NAN, |s| s.humid_volume().value - v)
    };
    let w = brent(f, 0.0, top, Tolerance::new(1e-9, 1e-9)).ok()?;
    Some((t, w))
}

#[cfg(test)]
mod tests {
    use super::*;
    use uom::si::pressure::kilopascal;

    fn window() -> ChartWindow {
        ChartWindow {
            t_min_k: 273.15,
            t_max_k: 323.15,
            w_max_kg_per_kg_da: 0.03,
            pressure: Pressure::new::<kilopascal>(101.325),
        }
    }

    #[test]
    fn lines_lie_on_the_states_they_name() {
        let lines = chart_lines(&window()).unwrap();
        let p = window().pressure;
        for (rh, line) in &lines.relative_humidity {
            for &(t, w) in line.iter().take(line.len() - 1) {
                let s = AirState::from_w(kelvin_t(t), w, p).unwrap();
                assert!(
                    (s.relative_humidity() - rh).abs() < 1e-6,
                    "rh {rh} at {t} K"
                );
            }
        }
        for (v, line) in &lines.humid_volume {
            for &(t, w) in line {
                let s = AirState::from_w(kelvin_t(t), w, p).unwrap();
                assert!((s.humid_volume().value - v).abs() < 1e-6);
            }
        }
        for (twb, line) in &lines.wet_bulb {
            let &(t, w) = &line[line.len() / 2];
            let s = AirState::from_w(kelvin_t(t), w, p).unwrap();
            assert!((s.wet_bulb().unwrap().get::<kelvin>() - twb).abs() < 1e-6);
        }
    }

    #[test]
    fn every_point_is_inside_the_window() {
        let lines = chart_lines(&window()).unwrap();
        let all = lines
            .relative_humidity
            .iter()
            .chain(&lines.wet_bulb)
            .chain(&lines.humid_volume)
            .flat_map(|(_, l)| l.iter());
        for &(t, w) in all.chain(lines.saturation.iter()) {
            assert!(
                (273.15 - 1e-9..=323.15 + 1e-9).contains(&t)
                    && (-1e-12..=0.03 + 1e-12).contains(&w),
                "({t}, {w})"
            );
        }
        assert_eq!(lines.relative_humidity.len(), 9);
        assert!(lines.wet_bulb.len() >= 6, "{}", lines.wet_bulb.len());
        assert!(
            lines.humid_volume.len() >= 3,
            "{}",
            lines.humid_volume.len()
        );
    }

    #[test]
    fn bad_window_is_an_error() {
        let mut w = window();
        w.t_max_k = 1000.0;
        assert!(chart_lines(&w).is_err());
        let mut w = window();
        w.w_max_kg_per_kg_da = 0.0;
        assert!(chart_lines(&w).is_err());
    }
}
