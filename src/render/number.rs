//! Number formatting for tables, plots and records: fixed significant figures,
//! one format per column so decimal points line up, and the conversion of a
//! quantity into the unit it is shown in.
//!
//! The text is that of Rust's correctly rounded `{:.N}` / `{:.Ne}`
//! formatting, so the same number always prints the same text on every
//! platform; fixed-point numbers whose rounding one f64 product decides are
//! written without it (same text, tested against it).

use crate::units::{Dim, Quantity, Unit};

/// Significant figures shown in tables and records.
pub const SIG_FIGS: usize = 4;

/// How the numbers of one column (or one value) are written.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NumberFormat {
    /// Fixed point with this many decimals.
    Fixed(usize),
    /// Scientific notation with this many decimals in the mantissa.
    Scientific(usize),
}

impl NumberFormat {
    /// Choose a format showing `sig` significant figures of the largest value.
    ///
    /// Whole numbers below 10^6 print without decimals; magnitudes of 10^6 and
    /// above, or below 10^-3, or with a non-zero value that would print as 0,
    /// switch to scientific notation.
    pub fn for_values(values: &[f64], sig: usize) -> NumberFormat {
        let sig = sig.max(1);
        let finite = values.iter().copied().filter(|v| v.is_finite());
        let max_abs = finite.clone().fold(0.0_f64, |m, v| m.max(v.abs()));
        if max_abs == 0.0 {
            return NumberFormat::Fixed(0);
        }
        let whole = finite.clone().all(is_whole);
        if whole && max_abs < 1e6 {
            return NumberFormat::Fixed(0);
        }
        if !(1e-3..1e6).contains(&max_abs) {
            return NumberFormat::Scientific(sig - 1);
        }
        let exponent = libm::floor(libm::log10(max_abs)) as i32;
        let decimals = (sig as i32 - 1 - exponent).clamp(0, 12);
        // A small non-zero value that would print as 0 needs scientific notation.
        let min_abs = finite
            .map(f64::abs)
            .filter(|v| *v > 0.0)
            .fold(max_abs, f64::min);
        if min_abs < libm::pow(10.0, -f64::from(decimals)) {
            return NumberFormat::Scientific(sig - 1);
        }
        NumberFormat::Fixed(decimals as usize)
    }

    /// Like [`for_values`](Self::for_values), then drop decimals that are
    /// zero in every value (0.0, 0.5, 1.0 rather than 0.000, 0.500, 1.000).
    pub fn for_column(values: &[f64], sig: usize) -> NumberFormat {
        Self::column(values, sig).0
    }

    /// [`for_column`](Self::for_column) and, when the column keeps every
    /// decimal of its first choice, the finite values already written in it
    /// (in order), so a table formats each cell once.
    pub fn column(values: &[f64], sig: usize) -> (NumberFormat, Option<Texts>) {
        let format = NumberFormat::for_values(values, sig);
        let decimals = match format {
            NumberFormat::Fixed(d) | NumberFormat::Scientific(d) => d,
        };
        let mut written = Texts::with_capacity(values.len());
        for v in values.iter().filter(|v| v.is_finite()) {
            format.push(&mut written.text, *v);
            written.end();
        }
        let spare = written.iter().map(zero_tail).min().unwrap_or(0);
        let keep = decimals - spare.min(decimals);
        let keep = if matches!(format, NumberFormat::Fixed(_)) && decimals > 0 {
            keep.max(1)
        } else {
            keep
        };
        let chosen = match format {
            NumberFormat::Fixed(_) => NumberFormat::Fixed(keep),
            NumberFormat::Scientific(_) => NumberFormat::Scientific(keep),
        };
        (chosen, (chosen == format).then_some(written))
    }

    /// Write one number in this format (no `-0`, exponents as `e-5`).
    pub fn write(self, x: f64) -> String {
        let mut out = String::with_capacity(12);
        self.push(&mut out, x);
        out
    }

    /// [`write`](Self::write) appended to `out`.
    pub fn push(self, out: &mut String, x: f64) {
        if let NumberFormat::Fixed(d) = self {
            if push_fixed(out, x, d) {
                return;
            }
        }
        let text = match self {
            NumberFormat::Fixed(d) => format!("{x:.d$}"),
            NumberFormat::Scientific(d) => format!("{x:.d$e}"),
        };
        out.push_str(&strip_negative_zero(text));
    }
}

/// `x` with `decimals` decimals, as `{x:.decimals$}` writes it without its
/// `-0`, when one f64 product decides the rounding (see
/// [`round_scaled`](crate::units::round_scaled)); false, writing nothing, otherwise.
fn push_fixed(out: &mut String, x: f64, decimals: usize) -> bool {
    let Ok(d) = u32::try_from(decimals) else {
        return false;
    };
    if !x.is_finite() || d > 15 {
        return false;
    }
    let Some(n) = crate::units::round_scaled(x.abs(), d) else {
        return false;
    };
    // Digits from the right: decimals, the point, the whole part, the sign.
    let mut buffer = [b'0'; 40];
    let mut i = buffer.len();
    let mut rest = n;
    for _ in 0..decimals {
        i -= 1;
        buffer[i] = b'0' + (rest % 10) as u8;
        rest /= 10;
    }
    if decimals > 0 {
        i -= 1;
        buffer[i] = b'.';
    }
    loop {
        i -= 1;
        buffer[i] = b'0' + (rest % 10) as u8;
        rest /= 10;
        if rest == 0 {
            break;
        }
    }
    if x < 0.0 && n != 0 {
        i -= 1;
        buffer[i] = b'-';
    }
    match std::str::from_utf8(&buffer[i..]) {
        Ok(text) => {
            out.push_str(text);
            true
        }
        Err(_) => false,
    }
}

/// Many short texts kept end to end in one string (a column's cells), so a
/// large table costs two allocations per column rather than one per cell.
#[derive(Clone, Debug, Default)]
pub struct Texts {
    /// The texts, end to end.
    pub text: String,
    ends: Vec<usize>,
}

impl Texts {
    pub fn with_capacity(count: usize) -> Texts {
        Texts {
            text: String::with_capacity(count * 8),
            ends: Vec::with_capacity(count),
        }
    }

    /// Close the text written to `self.text` since the last end.
    pub fn end(&mut self) {
        self.ends.push(self.text.len());
    }

    /// Append one whole text.
    pub fn push(&mut self, text: &str) {
        self.text.push_str(text);
        self.end();
    }

    pub fn len(&self) -> usize {
        self.ends.len()
    }

    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    /// The `i`th text.
    pub fn get(&self, i: usize) -> &str {
        let start = if i == 0 { 0 } else { self.ends[i - 1] };
        &self.text[start..self.ends[i]]
    }

    pub fn iter(&self) -> impl Iterator<Item = &str> + '_ {
        (0..self.len()).map(|i| self.get(i))
    }
}

/// Trailing zeros after the decimal point of a formatted number's mantissa.
fn zero_tail(text: &str) -> usize {
    let bytes = text.as_bytes();
    let mantissa = match bytes.iter().position(|&b| b == b'e') {
        Some(e) => &bytes[..e],
        None => bytes,
    };
    match mantissa.iter().position(|&b| b == b'.') {
        Some(dot) => mantissa[dot + 1..]
            .iter()
            .rev()
            .take_while(|&&b| b == b'0')
            .count(),
        None => 0,
    }
}

/// A number rounded to 12 significant figures, written in the shortest text
/// that reads back as that number: exact data for CSV without the noise of
/// unit conversion (38.2, not 38.19999999999999).
pub fn exact_text(x: f64) -> String {
    let rounded: f64 = format!("{x:.11e}").parse().unwrap_or(x);
    strip_negative_zero(format!("{rounded}"))
}

/// Whole up to rounding noise (80.00000000000006 from 353.15 K - 273.15 K).
fn is_whole(v: f64) -> bool {
    (v - libm::round(v)).abs() <= 1e-9 * v.abs()
}

fn strip_negative_zero(text: String) -> String {
    match text.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| matches!(c, '0' | '.' | 'e')) => rest.to_string(),
        _ => text,
    }
}

/// One number with at most `sig` significant figures and no trailing zeros,
/// e.g. `format_sig(1234.567, 4) == "1235"`, `format_sig(61.2, 4) == "61.2"`.
pub fn format_sig(x: f64, sig: usize) -> String {
    let text = NumberFormat::for_values(&[x], sig).write(x);
    trim_zeros(text)
}

fn trim_zeros(text: String) -> String {
    let (mantissa, exponent) = match text.find('e') {
        Some(i) => (&text[..i], &text[i..]),
        None => (text.as_str(), ""),
    };
    if !mantissa.contains('.') {
        return text;
    }
    let trimmed = mantissa.trim_end_matches('0').trim_end_matches('.');
    format!("{trimmed}{exponent}")
}

/// The number a quantity shows in `unit` (see [`Unit::from_si`]): absolute
/// temperatures use the unit's offset, wet-basis moisture is converted from
/// the dry basis; an error names a dimension or kind that does not fit.
pub fn in_unit(q: &Quantity, unit: &Unit) -> Result<f64, String> {
    unit.from_si(q).map_err(|e| e.message)
}

/// The unit a quantity is shown in: its own `as` unit when that fits, else
/// the default unit of its kind and dimension (degC, db, kg/kg_da, kPa...).
pub fn default_unit(q: &Quantity, shown: Option<&Unit>) -> Unit {
    match shown {
        Some(u) if u.from_si(q).is_ok() => u.clone(),
        _ => crate::units::default_unit(q),
    }
}

/// A dimension in words with its SI unit, for messages: `time [s]`.
pub fn dim_words(dim: Dim) -> String {
    crate::units::describe_dim_with_si(dim)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fixed_decimals_follow_largest_magnitude() {
        assert_eq!(
            NumberFormat::for_values(&[0.05, 2.5], 4),
            NumberFormat::Fixed(3)
        );
        assert_eq!(
            NumberFormat::for_values(&[1234.5], 4),
            NumberFormat::Fixed(0)
        );
        assert_eq!(
            NumberFormat::for_values(&[0.01234], 4),
            NumberFormat::Fixed(5)
        );
    }

    #[test]
    fn column_drops_shared_zero_decimals() {
        assert_eq!(
            NumberFormat::for_column(&[0.0, 0.5, 4.0], 4),
            NumberFormat::Fixed(1)
        );
        assert_eq!(
            NumberFormat::for_column(&[1.85, 0.0912], 4),
            NumberFormat::Fixed(3)
        );
        assert_eq!(
            NumberFormat::for_column(&[2.0, 2.5e7], 4),
            NumberFormat::Scientific(1)
        );
    }

    #[test]
    fn exact_text_hides_conversion_noise() {
        assert_eq!(exact_text(311.34999999999997 - 273.15), "38.2");
        assert_eq!(exact_text(0.1 + 0.2), "0.3");
        assert_eq!(exact_text(1.0 / 3.0), "0.333333333333");
    }

    #[test]
    fn extremes_go_scientific() {
        assert_eq!(format_sig(1.23456e7, 4), "1.235e7");
        assert_eq!(format_sig(2.5e-5, 3), "2.5e-5");
        assert_eq!(
            NumberFormat::for_values(&[2.5e-5], 3).write(2.5e-5),
            "2.50e-5"
        );
    }

    #[test]
    fn whole_numbers_and_zero() {
        assert_eq!(format_sig(3.0, 4), "3");
        assert_eq!(format_sig(2.1e-10, 4), "2.1e-10");
        assert_eq!(
            NumberFormat::for_values(&[1e-5, 100.0], 4),
            NumberFormat::Scientific(3)
        );
        assert_eq!(
            NumberFormat::for_values(&[0.02, 100.0], 4),
            NumberFormat::Scientific(3)
        );
        assert_eq!(
            NumberFormat::for_values(&[0.1, 100.0], 4),
            NumberFormat::Fixed(1)
        );
        assert_eq!(format_sig(353.15 - 273.15, 4), "80");
        assert_eq!(format_sig(61.2, 4), "61.2");
        assert_eq!(format_sig(0.0, 4), "0");
        assert_eq!(NumberFormat::Fixed(2).write(-0.001), "0.00");
    }

    /// The writer before the fast path: every number through `format!`.
    fn oracle(format: NumberFormat, x: f64) -> String {
        strip_negative_zero(match format {
            NumberFormat::Fixed(d) => format!("{x:.d$}"),
            NumberFormat::Scientific(d) => format!("{x:.d$e}"),
        })
    }

    #[test]
    fn fast_fixed_text_matches_the_exact_formatter() {
        let mut state = 0x0dd_ba11_cafe_f00d_u64;
        let mut next = move || {
            state ^= state >> 12;
            state ^= state << 25;
            state ^= state >> 27;
            state.wrapping_mul(0x2545_F491_4F6C_DD1D)
        };
        let mut values = vec![
            0.0, -0.0, -0.001, 0.5, 1.5, 2.5, -2.5, 1e15, 4.5e15, 1e300, 1e-300,
        ];
        for _ in 0..400_000 {
            let r = next();
            let n = (r % 2_000_000_000) as f64 - 1_000_000_000.0;
            let k = ((r >> 40) % 14) as i32;
            // Decimal-looking numbers, exact binary halves (ties), random bits.
            values.push(n / 10f64.powi(k));
            values.push(n / 2f64.powi(k + 1));
            values.push(f64::from_bits(next()));
        }
        assert!(values.len() > 1_000_000);
        for (i, x) in values.iter().enumerate() {
            let d = i % 16;
            let format = NumberFormat::Fixed(d);
            assert_eq!(
                format.write(*x),
                oracle(format, *x),
                "{x:e} with {d} decimals"
            );
            if i % 7 == 0 {
                let format = NumberFormat::Fixed(3);
                assert_eq!(
                    format.write(*x),
                    oracle(format, *x),
                    "{x:e} with 3 decimals"
                );
            }
        }
        for x in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            for format in [NumberFormat::Fixed(2), NumberFormat::Scientific(2)] {
                assert_eq!(format.write(x), oracle(format, x));
            }
        }
    }

    #[test]
    fn zero_tail_counts_trailing_decimal_zeros_of_the_mantissa() {
        // The definition it replaces, on strings rather than bytes.
        let by_strings = |text: &str| {
            let mantissa = text.split('e').next().unwrap_or(text);
            match mantissa.split_once('.') {
                Some((_, d)) => d.len() - d.trim_end_matches('0').len(),
                None => 0,
            }
        };
        for text in [
            "0",
            "10",
            "1.500",
            "-2.000e-5",
            "3.0e10",
            "1.25e0",
            "100.",
            "NaN",
            "inf",
        ] {
            assert_eq!(zero_tail(text), by_strings(text), "{text}");
        }
    }

    #[test]
    fn column_texts_are_the_column_format_applied_to_each_value() {
        let columns: [&[f64]; 5] = [
            &[50.25, 50.5, 61.0],
            &[0.0003, 0.0006, 0.075],
            &[1.85, 0.0912, -0.25],
            &[2.0, 2.5e7],
            &[0.0, 0.5, 4.0],
        ];
        for values in columns {
            let (format, written) = NumberFormat::column(values, SIG_FIGS);
            assert_eq!(format, NumberFormat::for_column(values, SIG_FIGS));
            if let Some(w) = written {
                let texts: Vec<&str> = w.iter().collect();
                let expected: Vec<String> = values.iter().map(|v| format.write(*v)).collect();
                assert_eq!(texts, expected);
            }
        }
    }

    #[test]
    fn absolute_temperature_uses_offset_difference_does_not() {
        use crate::units::{lookup_unit, Kind};
        let degc = lookup_unit("degC").unwrap();
        let abs = Quantity {
            si: 353.15,
            dim: Dim::TEMPERATURE,
            kind: Kind::AbsoluteTemperature,
        };
        let diff = Quantity {
            si: 10.0,
            dim: Dim::TEMPERATURE,
            kind: Kind::TemperatureDifference,
        };
        assert!((in_unit(&abs, &degc).unwrap() - 80.0).abs() < 1e-9);
        assert!(in_unit(&diff, &degc).is_err());
        assert_eq!(in_unit(&diff, &lookup_unit("K").unwrap()).unwrap(), 10.0);
    }

    #[test]
    fn wrong_dimension_is_an_error() {
        let q = Quantity::new(1.0, Dim::TIME, crate::units::Kind::Plain);
        assert!(in_unit(&q, &crate::units::lookup_unit("m").unwrap()).is_err());
    }
}
