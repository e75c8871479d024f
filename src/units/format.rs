//! Showing quantities: a deterministic number format with fixed significant
//! figures, and a default display unit per kind and dimension.

use super::catalog::{Basis, Scale};
use super::names::{named_dim, si_symbol};
use super::{lookup_unit, Dim, Kind, Quantity, Unit};

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
    if let Some(u) = unit {
        if let Ok(x) = u.from_si(q) {
            return join(&format_number(x, sig), &u.symbol);
        }
    }
    let u = default_unit(q);
    match u.from_si(q) {
        Ok(x) => join(&format_number(x, sig), &u.symbol),
        Err(_) => join(&format_number(q.si, sig), &si_symbol(q.dim)),
    }
}

fn join(number: &str, symbol: &str) -> String {
    if symbol.is_empty() {
        number.to_string()
    } else {
        format!("{number} {symbol}")
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
    Unit {
        parts: std::sync::Arc::from([(symbol.clone(), 1)]),
        symbol: symbol.into(),
        factor,
        offset: 0.0,
        dim,
        kind: Kind::Plain,
        scale: Scale::Linear,
        basis: Basis::None,
    }
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
/// Deterministic: built from Rust's exact decimal formatting. Non-finite
/// numbers are shown as `invalid` (operations never produce them).
pub fn format_number(x: f64, sig: usize) -> String {
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
        scientific(&digits, exp)
    } else {
        positional(&digits, exp)
    };
    format!("{sign}{body}")
}

fn scientific(digits: &str, exp: i32) -> String {
    let (head, tail) = digits.split_at(1);
    let tail = tail.trim_end_matches('0');
    if tail.is_empty() {
        format!("{head}e{exp}")
    } else {
        format!("{head}.{tail}e{exp}")
    }
}

fn positional(digits: &str, exp: i32) -> String {
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
}
