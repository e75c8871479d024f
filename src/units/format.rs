//! Showing quantities: a deterministic number format with fixed significant
//! figures, and a default display unit per kind and dimension.

use super::catalog::{Basis, Scale};
use super::names::{named_dim, si_symbol};
use super::{lookup_unit, Dim, Kind, Quantity, Unit, UnitData};

/// Significant figures used when a quantity is shown.
pub const DISPLAY_SIG_FIGS: usize = 4;

/// A quantity as text, e.g. `28.39 W/(m^2*K)`, `0.5833 wb`, `45 K`.
///
/// Shown in `unit` when given and compatible (dimension and kind, see
/// [`Unit::from_si`]), else in the default unit of [`default_unit`]. Four
/// significant figures, trailing zeros dropped, scientific notation outside
/// 1e-3..1e6.
pub fn format_quantity(q: &Quantity, unit: Option<&Unit>) -> String {
    format_quantity_sig(q, unit, DISPLAY_SIG_FIGS)
}

/// [`format_quantity`] with a chosen number of significant figures (1..=17).
pub fn format_quantity_sig(q: &Quantity, unit: Option<&Unit>, sig: usize) -> String {
    let mut out = String::with_capacity(24);
    push_quantity_sig(&mut out, q, unit, sig);
    out
}

/// [`format_quantity_sig`] appended to `out`.
pub fn push_quantity_sig(out: &mut String, q: &Quantity, unit: Option<&Unit>, sig: usize) {
    if let Some(u) = unit {
        if let Ok(x) = u.from_si(q) {
            return push_joined(out, x, sig, &u.symbol);
        }
    }
    let u = default_unit(q);
    match u.from_si(q) {
        Ok(x) => push_joined(out, x, sig, &u.symbol),
        Err(_) => push_joined(out, q.si, sig, &si_symbol(q.dim)),
    }
}

fn push_joined(out: &mut String, x: f64, sig: usize, symbol: &str) {
    push_number(out, x, sig);
    if !symbol.is_empty() {
        out.push(' ');
        out.push_str(symbol);
    }
}

/// The unit a quantity is shown in when no `as` chose one.
///
/// Absolute temperatures in degC, differences in K, moisture in db, humidity
/// ratio in kg/kg_da, relative humidity / activity in %rh, fractions in %;
/// plain quantities in their coherent SI unit (`W/m^2`, `J/(kg*K)`), with a
/// k/M/G prefix on Pa, J, W and N chosen by magnitude (`101.3 kPa`, `2257 kJ/kg`).
pub fn default_unit(q: &Quantity) -> Unit {
    let by_kind = match q.kind {
        Kind::AbsoluteTemperature => lookup_unit("degC"),
        Kind::TemperatureDifference | Kind::Plain => None,
        Kind::Moisture => lookup_unit("db"),
        Kind::HumidityRatio => humidity_ratio_unit(),
        Kind::Activity => lookup_unit("%rh"),
        Kind::Fraction => lookup_unit("%"),
    };
    by_kind.unwrap_or_else(|| coherent_unit(q.dim, q.si))
}

fn humidity_ratio_unit() -> Option<Unit> {
    Some(lookup_unit("kg")?.div(&lookup_unit("kg_da")?))
}

/// The coherent SI unit of `dim`, prefixed by magnitude for the units engineers
/// read with prefixes.
fn coherent_unit(dim: Dim, si: f64) -> Unit {
    if dim.is_dimensionless() {
        return Unit::one();
    }
    let symbol = si_symbol(dim);
    let (prefix, factor) = engineering_prefix(dim, si.abs());
    let symbol = if prefix.is_empty() {
        symbol
    } else {
        format!("{prefix}{symbol}")
    };
    Unit::from(UnitData {
        parts: std::sync::Arc::from([(symbol.clone(), 1)]),
        symbol: symbol.into(),
        factor,
        offset: 0.0,
        dim,
        kind: Kind::Plain,
        scale: Scale::Linear,
        basis: Basis::None,
    })
}

/// k, M or G for named dimensions whose SI symbol starts with Pa, J, W or N.
fn engineering_prefix(dim: Dim, magnitude: f64) -> (&'static str, f64) {
    let prefixable = named_dim(dim).is_some_and(|n| {
        ["Pa", "J", "W", "N"]
            .iter()
            .any(|s| n.si == *s || n.si.starts_with(&format!("{s}/")))
    });
    if !prefixable {
        return ("", 1.0);
    }
    [
        ("G", uom::prefix!(giga)),
        ("M", uom::prefix!(mega)),
        ("k", uom::prefix!(kilo)),
    ]
    .into_iter()
    .find(|(_, f)| magnitude >= *f)
    .unwrap_or(("", 1.0))
}

/// A number with `sig` significant figures (clamped to 1..=17), trailing
/// zeros dropped; scientific notation (`1.235e-5`) below 1e-3 and from 1e6 up.
/// Deterministic: the digits of Rust's exact decimal formatting (found
/// without it when one f64 product decides the rounding). Non-finite
/// numbers are shown as `invalid` (operations never produce them).
pub fn format_number(x: f64, sig: usize) -> String {
    let mut out = String::with_capacity(12);
    push_number(&mut out, x, sig);
    out
}

/// [`format_number`] appended to `out`.
pub fn push_number(out: &mut String, x: f64, sig: usize) {
    if !x.is_finite() {
        out.push_str("invalid");
        return;
    }
    if x == 0.0 {
        out.push('0');
        return;
    }
    let sig = sig.clamp(1, 17);
    let mut buffer = [0u8; 20];
    let (digits, exp) = match significant_digits(x.abs(), sig, &mut buffer) {
        Some(found) => found,
        None => return push_number_slow(out, x, sig),
    };
    push_assembled(out, x < 0.0, digits, exp);
}

/// The `sig` significant digits of `magnitude` (finite, > 0) and its decimal
/// exponent, as `{:.(sig-1)e}` would write them, for magnitudes in
/// 1e-3..1e6 with up to 15 digits; `None` when the exponent or the rounding is
/// too close to call in f64 (the caller then asks the exact formatter).
fn significant_digits(magnitude: f64, sig: usize, buffer: &mut [u8; 20]) -> Option<(&[u8], i32)> {
    const POWERS: [f64; 10] = [1e-3, 1e-2, 1e-1, 1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6];
    if sig > 15 || !(1e-3..1e6).contains(&magnitude) {
        return None;
    }
    // The decade, kept clear of its ends, where f64 powers of ten are inexact.
    let index = POWERS.iter().rposition(|p| magnitude >= *p)?;
    let (low, high) = (POWERS[index], POWERS[index + 1]);
    if magnitude < low * (1.0 + 1e-12) || magnitude > high * (1.0 - 1e-12) {
        return None;
    }
    let exp = index as i32 - 3;
    let decimals = sig as i32 - 1 - exp;
    let scaled = if decimals >= 0 {
        round_scaled(magnitude, decimals as u32)?
    } else {
        round_shrunk(magnitude, (-decimals) as u32)?
    };
    // A carry into the next decade (9.9996 to 10.00) goes the exact way.
    if scaled < 10u64.pow(sig as u32 - 1) || scaled >= 10u64.pow(sig as u32) {
        return None;
    }
    Some((write_digits(scaled, sig, buffer), exp))
}

/// The powers of ten that f64 holds exactly.
const POWERS_OF_TEN: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// `magnitude * 10^decimals` rounded to the nearest integer, exactly as the
/// decimal value of the f64 would round, or `None` when the product is too
/// large or too close to a half for one f64 multiplication to decide.
///
/// 10^d is exact in f64 for d <= 22, so the product is within half an ulp of
/// the exact one; when it lies more than two ulps from the nearest half, the
/// exact product rounds the same way (ties included, which are never decided
/// here).
pub fn round_scaled(magnitude: f64, decimals: u32) -> Option<u64> {
    let y = magnitude * POWERS_OF_TEN.get(decimals as usize)?;
    decide(y)
}

/// `magnitude / 10^shift` rounded to the nearest integer; as [`round_scaled`]
/// (one correctly rounded division by an exact power of ten).
fn round_shrunk(magnitude: f64, shift: u32) -> Option<u64> {
    let y = magnitude / POWERS_OF_TEN.get(shift as usize)?;
    decide(y)
}

/// The integer nearest `y`, when `y` (within half an ulp of the exact value)
/// is clear of the half by more than two ulps.
fn decide(y: f64) -> Option<u64> {
    if !(0.0..4.0e15).contains(&y) {
        return None;
    }
    let floor = y.floor();
    let fraction = y - floor;
    let margin = y * f64::EPSILON * 2.0 + f64::MIN_POSITIVE;
    if (fraction - 0.5).abs() <= margin {
        return None;
    }
    let n = floor as u64;
    Some(if fraction > 0.5 { n + 1 } else { n })
}

/// The `count` decimal digits of `n` (zero-padded on the left) as ASCII.
fn write_digits(mut n: u64, count: usize, buffer: &mut [u8; 20]) -> &[u8] {
    let digits = &mut buffer[..count];
    for d in digits.iter_mut().rev() {
        *d = b'0' + (n % 10) as u8;
        n /= 10;
    }
    digits
}

/// The exact formatter's way, for what [`significant_digits`] leaves.
#[cold]
fn push_number_slow(out: &mut String, x: f64, sig: usize) {
    let sci = format!("{:.*e}", sig - 1, x.abs());
    let (mantissa, exp) = sci.split_once('e').unwrap_or((&sci, "0"));
    let exp: i32 = exp.parse().unwrap_or(0);
    let digits: Vec<u8> = mantissa.bytes().filter(u8::is_ascii_digit).collect();
    push_assembled(out, x < 0.0, &digits, exp);
}

/// A number's text from its sign, significant digits and decimal exponent:
/// scientific outside 1e-3..1e6, positional inside, trailing zeros dropped.
/// Built on the stack and appended once.
fn push_assembled(out: &mut String, negative: bool, digits: &[u8], exp: i32) {
    let mut text = Bytes::default();
    if negative {
        text.push(b'-');
    }
    if !(-3..6).contains(&exp) {
        scientific(&mut text, digits, exp);
    } else {
        positional(&mut text, digits, exp);
    }
    match std::str::from_utf8(text.as_slice()) {
        Ok(t) => out.push_str(t),
        Err(_) => out.extend(text.as_slice().iter().map(|&b| char::from(b))),
    }
}

/// A short text built on the stack (a number: at most 17 digits, a sign, a
/// point, six padding zeros and an exponent).
struct Bytes {
    bytes: [u8; 48],
    len: usize,
}

impl Default for Bytes {
    fn default() -> Bytes {
        Bytes {
            bytes: [0; 48],
            len: 0,
        }
    }
}

impl Bytes {
    fn push(&mut self, b: u8) {
        if let Some(slot) = self.bytes.get_mut(self.len) {
            *slot = b;
            self.len += 1;
        }
    }

    fn extend(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.push(b);
        }
    }

    fn zeros(&mut self, count: usize) {
        for _ in 0..count {
            self.push(b'0');
        }
    }

    fn as_slice(&self) -> &[u8] {
        &self.bytes[..self.len]
    }
}

fn trim_zero_tail(digits: &[u8]) -> &[u8] {
    let keep = digits.iter().rposition(|&d| d != b'0').map_or(0, |i| i + 1);
    &digits[..keep]
}

fn scientific(text: &mut Bytes, digits: &[u8], exp: i32) {
    let (head, tail) = digits.split_at(1);
    text.extend(head);
    let tail = trim_zero_tail(tail);
    if !tail.is_empty() {
        text.push(b'.');
        text.extend(tail);
    }
    text.push(b'e');
    if exp < 0 {
        text.push(b'-');
    }
    text.extend(whole_digits(u64::from(exp.unsigned_abs()), &mut [0; 20]));
}

fn positional(text: &mut Bytes, digits: &[u8], exp: i32) {
    let frac = if exp >= 0 {
        let split = (exp as usize + 1).min(digits.len());
        text.extend(&digits[..split]);
        text.zeros(exp as usize + 1 - split);
        trim_zero_tail(&digits[split..])
    } else {
        text.push(b'0');
        trim_zero_tail(digits)
    };
    if frac.is_empty() {
        return;
    }
    text.push(b'.');
    if exp < 0 {
        text.zeros((-exp - 1) as usize);
    }
    text.extend(frac);
}

/// ASCII digits as text (they are always ASCII).
fn push_ascii(out: &mut String, digits: &[u8]) {
    match std::str::from_utf8(digits) {
        Ok(text) => out.push_str(text),
        Err(_) => out.extend(digits.iter().map(|&b| char::from(b))),
    }
}

/// A whole number in decimal, without allocating.
pub fn push_int(out: &mut String, n: i64) {
    if n < 0 {
        out.push('-');
    }
    push_ascii(out, whole_digits(n.unsigned_abs(), &mut [0; 20]));
}

/// The decimal digits of `n` as ASCII, without leading zeros (`0` for zero).
fn whole_digits(mut n: u64, buffer: &mut [u8; 20]) -> &[u8] {
    let mut i = buffer.len();
    loop {
        i -= 1;
        buffer[i] = b'0' + (n % 10) as u8;
        n /= 10;
        if n == 0 {
            break;
        }
    }
    &buffer[i..]
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The formatter before the fast path: every number through `{:.Ne}`.
    fn oracle(x: f64, sig: usize) -> String {
        if !x.is_finite() {
            return "invalid".to_string();
        }
        if x == 0.0 {
            return "0".to_string();
        }
        let sig = sig.clamp(1, 17);
        let sci = format!("{:.*e}", sig - 1, x.abs());
        let (mantissa, exp) = sci.split_once('e').unwrap_or((&sci, "0"));
        let exp: i32 = exp.parse().unwrap_or(0);
        let digits: String = mantissa.chars().filter(char::is_ascii_digit).collect();
        let sign = if x < 0.0 { "-" } else { "" };
        let body = if !(-3..6).contains(&exp) {
            let (head, tail) = digits.split_at(1);
            let tail = tail.trim_end_matches('0');
            if tail.is_empty() {
                format!("{head}e{exp}")
            } else {
                format!("{head}.{tail}e{exp}")
            }
        } else {
            let (int, frac) = if exp >= 0 {
                let split = (exp as usize + 1).min(digits.len());
                let mut int = digits[..split].to_string();
                int.extend(std::iter::repeat_n('0', exp as usize + 1 - split));
                (int, digits[split..].to_string())
            } else {
                let zeros = "0".repeat((-exp - 1) as usize);
                ("0".to_string(), format!("{zeros}{digits}"))
            };
            let frac = frac.trim_end_matches('0');
            if frac.is_empty() {
                int
            } else {
                format!("{int}.{frac}")
            }
        };
        format!("{sign}{body}")
    }

    /// A repeatable stream of bit patterns (xorshift64*).
    fn stream(mut state: u64) -> impl FnMut() -> u64 {
        move || {
            state ^= state >> 12;
            state ^= state << 25;
            state ^= state >> 27;
            state.wrapping_mul(0x2545_F491_4F6C_DD1D)
        }
    }

    /// Values that stress rounding: decimal-looking numbers, exact halves and
    /// ties at several scales, neighbours of powers of ten, random bits.
    fn hard_values() -> Vec<f64> {
        let mut next = stream(0x5eed_1234_abcd_0001);
        let mut values = vec![
            0.0,
            -0.0,
            f64::NAN,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::MIN_POSITIVE,
            f64::MAX,
            5e-324,
        ];
        for k in -4..=7 {
            let p = 10f64.powi(k);
            for x in [
                p,
                p * (1.0 - 1e-16),
                p * (1.0 + 1e-16),
                p * (1.0 - 5e-5),
                p * 0.99995,
            ] {
                values.push(x);
                values.push(f64::from_bits(x.to_bits() + 1));
                values.push(f64::from_bits(x.to_bits() - 1));
            }
        }
        for _ in 0..200_000 {
            let r = next();
            // n / 10^k and n / 2^k with n up to 10^7: decimal text and exact ties.
            let n = (r % 20_000_000) as f64 - 10_000_000.0;
            let k = ((r >> 40) % 12) as i32;
            values.push(n / 10f64.powi(k));
            values.push(n / 2f64.powi(k + 1));
            values.push((n + 0.5) / 10f64.powi(k));
        }
        for _ in 0..300_000 {
            let bits = next();
            values.push(f64::from_bits(bits));
            // Random magnitudes in the 1e-5..1e8 range.
            let u = (bits >> 11) as f64 / (1u64 << 53) as f64;
            let x = 10f64.powf(u * 13.0 - 5.0);
            values.push(if bits & 1 == 0 { x } else { -x });
        }
        values
    }

    #[test]
    fn fast_number_text_matches_the_exact_formatter() {
        let values = hard_values();
        assert!(values.len() > 1_000_000);
        for x in &values {
            for sig in [1, 2, 3, 4, 6, 15, 16, 17] {
                assert_eq!(format_number(*x, sig), oracle(*x, sig), "{x:e} at {sig}");
            }
        }
    }

    #[test]
    fn fast_path_is_taken_for_everyday_numbers() {
        // Reached without the exact formatter (the test above would not notice
        // a fast path that never runs).
        let mut buffer = [0u8; 20];
        let (digits, exp) = significant_digits(38.19999999999999, 4, &mut buffer).unwrap();
        assert_eq!((digits, exp), (&b"3820"[..], 1));
        assert!(significant_digits(0.125, 2, &mut buffer).is_none(), "a tie");
        assert_eq!(round_scaled(2.6751, 2), Some(268));
        // 2.675 is 2.67499999999999982236431605997495353221893310546875: the
        // product lands within two ulps of the half, so the exact path decides.
        assert_eq!(round_scaled(2.675, 2), None);
        assert_eq!(round_scaled(0.5, 0), None);
    }

    #[test]
    fn push_int_writes_every_magnitude() {
        for n in [0, 7, -7, 10, 1234567890, i64::MAX, i64::MIN] {
            let mut s = String::new();
            push_int(&mut s, n);
            assert_eq!(s, n.to_string());
        }
    }
}
