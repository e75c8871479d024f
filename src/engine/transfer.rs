//! Wet-surface heat and mass transfer: film coefficients, the dimensionless
//! groups they are written in, the Chilton-Colburn analogy, the wet-surface
//! temperature and the constant-rate drying period.
//!
//! Every correlation returns its value together with the list of validity
//! ranges it was called outside ([`Correlated`]): the value is still returned,
//! the caller decides how loudly to warn. Method notes with equations and
//! sources: `docs/methods/transfer.md`.

pub mod analogy;
pub mod constant_rate;
pub mod film;
pub mod groups;
pub mod jets;
mod surface_side;
mod surface_table;
pub mod wet_surface;

use std::fmt;

pub use analogy::{colburn_humidity_coefficient, colburn_mass_transfer_coefficient};
pub use constant_rate::constant_rate_time;
pub use film::{
    cylinder_churchill_bernstein, flat_plate, packed_bed_wakao_kaguei, sphere_ranz_marshall,
    tray_parallel_flow, tray_perpendicular_flow, PlateFlow,
};
pub use groups::{
    mass_velocity, nusselt, prandtl, reynolds, schmidt, sherwood, velocity_from_mass_velocity,
};
pub use jets::{round_jet_array, round_jet_single, slot_jet_array, slot_jet_single};
pub use wet_surface::{wet_surface, ExtraHeat, Layer, Radiation, TrayBottom, WetSurface};

/// A correlation's value with the validity ranges the call fell outside.
#[derive(Clone, Debug, PartialEq)]
pub struct Correlated<T> {
    /// The value the formula gives (returned even outside its range).
    pub value: T,
    /// One entry per input outside the range the correlation was fitted on.
    pub warnings: Vec<RangeWarning>,
}

impl<T> Correlated<T> {
    /// A value with no warnings yet.
    pub fn new(value: T) -> Correlated<T> {
        Correlated {
            value,
            warnings: Vec::new(),
        }
    }

    /// Apply `f` to the value, keeping the warnings.
    pub fn map<U>(self, f: impl FnOnce(T) -> U) -> Correlated<U> {
        Correlated {
            value: f(self.value),
            warnings: self.warnings,
        }
    }

    /// Append warnings (e.g. from an inner correlation).
    pub fn with_warnings(mut self, more: Vec<RangeWarning>) -> Correlated<T> {
        self.warnings.extend(more);
        self
    }
}

/// One input outside a correlation's validity range.
#[derive(Clone, Debug, PartialEq)]
pub struct RangeWarning {
    /// The correlation, e.g. `Ranz-Marshall sphere`.
    pub correlation: &'static str,
    /// The input, e.g. `Re` or `G`.
    pub input: &'static str,
    /// The value given, in `unit`.
    pub value: f64,
    /// Lower end of the fitted range, in `unit`.
    pub low: f64,
    /// Upper end of the fitted range, in `unit` (may be infinite).
    pub high: f64,
    /// Unit of `value`, `low`, `high` (`""` for dimensionless groups).
    pub unit: &'static str,
}

impl fmt::Display for RangeWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message())
    }
}

impl RangeWarning {
    /// The warning's text ([`fmt::Display`]), written piece by piece into
    /// one string sized for it at once (no padding or argument machinery,
    /// no string for each number: a what-if study may format one of these
    /// at every point).
    pub fn message(&self) -> String {
        let mut text = String::with_capacity(160);
        let space = if self.unit.is_empty() { "" } else { " " };
        for piece in [self.correlation, ": ", self.input, " = "] {
            text.push_str(piece);
        }
        push_sig(&mut text, self.value);
        for piece in [space, self.unit, " is outside the fitted range "] {
            text.push_str(piece);
        }
        if self.high.is_infinite() {
            text.push_str("at least ");
            push_sig(&mut text, self.low);
        } else {
            push_sig(&mut text, self.low);
            text.push('-');
            push_sig(&mut text, self.high);
        }
        for piece in [space, self.unit, "; the value is an extrapolation"] {
            text.push_str(piece);
        }
        text
    }
}

/// Four significant figures, without trailing noise; powers of ten for very
/// large or small magnitudes (Reynolds numbers read as 5e5, not 500000).
#[cfg(test)]
fn sig(x: f64) -> String {
    let mut text = String::new();
    push_sig(&mut text, x);
    text
}

/// Append the text of [`sig`] of `x` to `text`.
fn push_sig(text: &mut String, x: f64) {
    use fmt::Write;
    if x == 0.0 || !x.is_finite() {
        let _ = write!(text, "{x}");
        return;
    }
    let magnitude = x.abs().log10().floor() as i32;
    if !(-3..5).contains(&magnitude) {
        let mantissa = format!("{:.3}", x / 10f64.powi(magnitude));
        let mantissa = mantissa.trim_end_matches('0').trim_end_matches('.');
        let _ = write!(text, "{mantissa}e{magnitude}");
        return;
    }
    let digits = (3 - magnitude).max(0) as usize;
    let mut buffer = [0u8; FIXED_LEN];
    if let Some(fixed) = fixed(x, digits, &mut buffer) {
        let trimmed = if digits > 0 {
            fixed.trim_end_matches('0').trim_end_matches('.')
        } else {
            fixed
        };
        text.push_str(trimmed);
        return;
    }
    let formatted = format!("{x:.digits$}");
    if formatted.contains('.') {
        text.push_str(formatted.trim_end_matches('0').trim_end_matches('.'));
    } else {
        text.push_str(&formatted);
    }
}

/// Room for the text of [`fixed`]: a sign, ten digits and a point.
const FIXED_LEN: usize = 24;

/// The text of `format!("{x:.digits$}")`, written into `buffer` by integer
/// arithmetic, for `digits` up to 6 and `|x| 10^digits` from 1 to 1e9;
/// `None` elsewhere and where the rounding could go either way. The product
/// `|x| 10^digits` is within 1.2e-7 of its exact value there (half an ulp
/// of 1e9), so outside 1e-6 of a half it rounds to the integer the exact
/// decimal expansion rounds to. (The general formatter takes a few thousand
/// instructions, and a what-if study formats a warning at each point outside
/// a correlation's range.)
fn fixed(x: f64, digits: usize, buffer: &mut [u8; FIXED_LEN]) -> Option<&str> {
    const SCALE: [f64; 7] = [1.0, 10.0, 100.0, 1e3, 1e4, 1e5, 1e6];
    let y = x.abs() * *SCALE.get(digits)?;
    if !(1.0..1e9).contains(&y) {
        return None;
    }
    let whole = y.floor();
    let fraction = y - whole;
    if (fraction - 0.5).abs() < 1e-6 {
        return None;
    }
    let mut n = whole as u64 + u64::from(fraction > 0.5);
    // From the right: the decimals, the point, the integer part (at least
    // one digit), the sign.
    let mut at = FIXED_LEN;
    let mut put = |c: u8| {
        at -= 1;
        buffer[at] = c;
    };
    for _ in 0..digits {
        put(b'0' + (n % 10) as u8);
        n /= 10;
    }
    if digits > 0 {
        put(b'.');
    }
    loop {
        put(b'0' + (n % 10) as u8);
        n /= 10;
        if n == 0 {
            break;
        }
    }
    if x < 0.0 {
        put(b'-');
    }
    std::str::from_utf8(&buffer[at..]).ok()
}

/// Check `value` against `[low, high]` and record a warning when outside.
///
/// A relative slack of 1e-9 keeps unit round-off at a range end (G given in
/// kg/(m^2 s) and checked in kg/(m^2 h)) from raising a warning.
pub(crate) fn check_range(
    warnings: &mut Vec<RangeWarning>,
    correlation: &'static str,
    input: &'static str,
    value: f64,
    (low, high): (f64, f64),
    unit: &'static str,
) {
    const SLACK: f64 = 1e-9;
    if value < low - SLACK * low.abs() || value > high + SLACK * high.abs() {
        warnings.push(RangeWarning {
            correlation,
            input,
            value,
            low,
            high,
            unit,
        });
    }
}

/// Errors from the transfer engine; each names the argument and the limit.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum TransferError {
    /// A length, velocity, area, flow or property that must be positive was not.
    #[error("{name} must be positive, got {value} {unit}")]
    NotPositive {
        name: &'static str,
        value: f64,
        unit: &'static str,
    },
    /// An input outside the range where the formula means anything (not a fit range).
    #[error("{name} = {value} is outside {low}..{high}")]
    OutOfBounds {
        name: &'static str,
        value: f64,
        low: f64,
        high: f64,
    },
    /// Moisture span of the constant-rate period is empty or reversed.
    #[error("initial moisture {x1} must exceed final moisture {x2} (kg water/kg dry solid)")]
    MoistureSpan { x1: f64, x2: f64 },
    /// The air cannot take up water from the surface.
    #[error("no driving force: {0}")]
    NoDrivingForce(String),
    /// A property of air could not be evaluated.
    #[error("air property: {0}")]
    Air(String),
    /// The surface-temperature iteration failed.
    #[error("wet-surface temperature did not converge: {0}")]
    NoConvergence(String),
}

/// Require `value > 0` (and finite).
pub(crate) fn positive(
    name: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, TransferError> {
    if value > 0.0 && value.is_finite() {
        Ok(value)
    } else {
        Err(TransferError::NotPositive { name, value, unit })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The text of `format!("{x:.digits$}")`, which [`fixed`] replaces:
    /// equal wherever it gives one (numbers of every size and sign, exact
    /// and near halves), and given for all but a few in a million.
    #[test]
    fn fixed_point_text_is_the_formatters() {
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        let (mut given, mut tried) = (0, 0);
        for _ in 0..200_000 {
            let r = next();
            let digits = (r % 7) as usize;
            let magnitude = ((r >> 3) % 14) as i32 - 6;
            let mantissa = 1.0 + (next() >> 11) as f64 / (1u64 << 53) as f64 * 9.0;
            let sign = if r >> 63 == 1 { -1.0 } else { 1.0 };
            let x = sign * mantissa * 10f64.powi(magnitude);
            tried += 1;
            if let Some(text) = fixed(x, digits, &mut [0; FIXED_LEN]) {
                assert_eq!(text, format!("{x:.digits$}"), "{x:e} {digits}");
                given += 1;
            }
        }
        // Halves and their neighbours, where the rounding decides.
        for n in 0..20_000u32 {
            for digits in 0..=6 {
                let half = (f64::from(n) + 0.5) / 10f64.powi(digits as i32);
                for x in [half, -half, half.next_up(), half.next_down()] {
                    if let Some(text) = fixed(x, digits, &mut [0; FIXED_LEN]) {
                        assert_eq!(text, format!("{x:.digits$}"), "{x:e} {digits}");
                    }
                }
            }
        }
        assert!(given * 10 > tried * 6, "{given} of {tried}");
    }

    /// The range warnings' numbers as before the fixed-point shortcut.
    #[test]
    fn significant_figures_are_the_formatters() {
        fn by_format(x: f64) -> String {
            if x == 0.0 || !x.is_finite() {
                return format!("{x}");
            }
            let magnitude = x.abs().log10().floor() as i32;
            if !(-3..5).contains(&magnitude) {
                let mantissa = format!("{:.3}", x / 10f64.powi(magnitude));
                let mantissa = mantissa.trim_end_matches('0').trim_end_matches('.');
                return format!("{mantissa}e{magnitude}");
            }
            let digits = (3 - magnitude).max(0) as usize;
            let text = format!("{x:.digits$}");
            if text.contains('.') {
                text.trim_end_matches('0').trim_end_matches('.').to_string()
            } else {
                text
            }
        }
        let mut x: f64 = 1.234_567e-5;
        while x < 1e7 {
            for v in [x, -x, x.next_up(), x.next_down()] {
                assert_eq!(sig(v), by_format(v), "{v:e}");
            }
            x *= 1.000_37;
        }
        for v in [
            0.0,
            f64::NAN,
            f64::INFINITY,
            45.0,
            150.0,
            40.2,
            0.5985,
            2450.0,
            29300.0,
        ] {
            assert_eq!(sig(v), by_format(v), "{v}");
        }
    }

    /// The text written into one string is the pieces with each number
    /// as its own string ([`sig`]), as the warnings were written before;
    /// shown with `{}` it is the same text.
    #[test]
    fn warning_text_is_its_pieces() {
        let numbers = [
            0.0,
            -3.5,
            44.8,
            0.5985,
            29300.0,
            5e5,
            1.234_567e-5,
            f64::NAN,
        ];
        for (i, &value) in numbers.iter().enumerate() {
            for (unit, high) in [
                ("", f64::INFINITY),
                ("degC", 150.0),
                ("m/s", numbers[(i + 3) % 8]),
            ] {
                let w = RangeWarning {
                    correlation: "tray, parallel flow",
                    input: "T",
                    value,
                    low: numbers[(i + 1) % numbers.len()],
                    high,
                    unit,
                };
                let space = if unit.is_empty() { "" } else { " " };
                let range = if high.is_infinite() {
                    format!("at least {}", sig(w.low))
                } else {
                    format!("{}-{}", sig(w.low), sig(high))
                };
                let pieces = format!(
                    "tray, parallel flow: T = {}{space}{unit} is outside the fitted range \
                     {range}{space}{unit}; the value is an extrapolation",
                    sig(value)
                );
                assert_eq!(w.message(), pieces);
                assert_eq!(w.to_string(), pieces);
            }
        }
    }

    #[test]
    fn warning_text_is_readable() {
        let w = RangeWarning {
            correlation: "c",
            input: "Re",
            value: 1.0e5,
            low: 5.0e5,
            high: 1.0e8,
            unit: "",
        };
        assert_eq!(
            w.to_string(),
            "c: Re = 1e5 is outside the fitted range 5e5-1e8; the value is an extrapolation"
        );
        let w = RangeWarning {
            correlation: "c",
            input: "G",
            value: 2400.0,
            low: 2450.0,
            high: 29300.0,
            unit: "kg/(m^2 h)",
        };
        assert!(w
            .to_string()
            .contains("G = 2400 kg/(m^2 h) is outside the fitted range 2450-29300 kg/(m^2 h)"));
        let w = RangeWarning {
            correlation: "c",
            input: "Re Pr",
            value: 0.1234,
            low: 0.2,
            high: f64::INFINITY,
            unit: "",
        };
        assert!(
            w.to_string()
                .contains("Re Pr = 0.1234 is outside the fitted range at least 0.2"),
            "{w}"
        );
        let w = RangeWarning {
            correlation: "c",
            input: "T",
            value: 30.0,
            low: 45.0,
            high: 150.0,
            unit: "degC",
        };
        assert!(
            w.to_string()
                .contains("T = 30 degC is outside the fitted range 45-150 degC"),
            "{w}"
        );
    }
}
