//! The runtime quantity and its checked arithmetic.
//!
//! Every operation returns `Result<Quantity, UnitError>`: dimensions are
//! checked for `+ - <`, kinds are combined by the rules in `kind.rs`, and a
//! result that is not a finite number is an error, never a value.

use std::cmp::Ordering;
use std::fmt;

use super::kind::{self, KindClash};
use super::names::{describe_dim_with_si, named_dim};
use super::{Dim, Kind};

/// Relative difference below which [`Quantity::cmp`] calls two values equal.
pub const EQUAL_REL_TOL: f64 = 1e-12;

/// A quantity: SI magnitude, dimension and kind.
#[derive(Clone, Copy, PartialEq, Debug)]
pub struct Quantity {
    /// Magnitude in coherent SI units (kelvin for temperatures, dry basis for moisture).
    pub si: f64,
    /// Dimension vector.
    pub dim: Dim,
    /// What the quantity means beyond its dimension (see [`Kind`]).
    pub kind: Kind,
}

/// A span-less error from a unit or value operation; the evaluator attaches the span.
#[derive(Clone, PartialEq, Debug)]
pub struct UnitError {
    /// What went wrong, naming dimensions in words and SI.
    pub message: String,
    /// Suggestions, each a short sentence without the word "hint".
    pub hints: Vec<String>,
}

impl UnitError {
    /// An error with a message and no hints.
    pub fn new(message: impl Into<String>) -> UnitError {
        UnitError {
            message: message.into(),
            hints: Vec::new(),
        }
    }

    /// Add a hint (builder style).
    pub fn with_hint(mut self, hint: impl Into<String>) -> UnitError {
        self.hints.push(hint.into());
        self
    }

    /// "expected power per area [W/m^2], found energy per mass [J/kg]" with a
    /// hint naming the missing factor when it is a named dimension.
    pub fn dim_mismatch(context: &str, expected: Dim, found: Dim) -> UnitError {
        let message = format!(
            "{context}expected {}, found {}",
            describe_dim_with_si(expected),
            describe_dim_with_si(found)
        );
        let mut err = UnitError::new(message);
        if let Some(hint) = missing_factor_hint(expected, found) {
            err.hints.push(hint);
        }
        err
    }
}

impl fmt::Display for UnitError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)?;
        for h in &self.hints {
            write!(f, "; hint: {h}")?;
        }
        Ok(())
    }
}

impl std::error::Error for UnitError {}

/// "multiply by a mass flux [kg/(m^2*s)]" when `expected / found` (or its
/// reciprocal) is a named dimension.
fn missing_factor_hint(expected: Dim, found: Dim) -> Option<String> {
    let times = expected / found;
    if times.is_dimensionless() {
        return None;
    }
    if let Some(n) = named_dim(times) {
        return Some(format!("multiply by {} [{}]", article(n.words), n.si));
    }
    let per = found / expected;
    named_dim(per).map(|n| format!("divide by {} [{}]", article(n.words), n.si))
}

/// "a mass flux", "an area".
fn article(words: &str) -> String {
    let vowel = words.starts_with(['a', 'e', 'i', 'o', 'u']);
    if vowel {
        format!("an {words}")
    } else {
        format!("a {words}")
    }
}

impl Quantity {
    /// A quantity from its SI magnitude, dimension and kind.
    #[inline]
    pub fn new(si: f64, dim: Dim, kind: Kind) -> Quantity {
        Quantity { si, dim, kind }
    }

    /// A dimensionless plain number.
    pub fn number(x: f64) -> Quantity {
        Quantity::new(x, Dim::NONE, Kind::Plain)
    }

    /// True for a dimensionless plain number or fraction: a pure scaling factor.
    #[inline]
    pub fn is_scalar(&self) -> bool {
        self.dim.is_dimensionless() && matches!(self.kind, Kind::Plain | Kind::Fraction)
    }

    /// `self + other`: equal dimensions, kinds combined by [`kind::add_kind`].
    #[inline(always)]
    pub fn add(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        self.same_dim("`+` needs equal dimensions: ", other)?;
        let kind = kind::add_kind(self.kind, other.kind).map_err(|c| clash_error("add", c))?;
        finite(self.si + other.si, self.dim, kind)
    }

    /// `self - other`: equal dimensions, kinds combined by [`kind::sub_kind`]
    /// (absolute - absolute is a temperature difference).
    #[inline(always)]
    pub fn sub(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        self.same_dim("`-` needs equal dimensions: ", other)?;
        let kind = kind::sub_kind(self.kind, other.kind).map_err(|c| clash_error("subtract", c))?;
        finite(self.si - other.si, self.dim, kind)
    }

    /// `self * other`: dimensions add, kinds by [`kind::mul_kind`].
    #[inline(always)]
    pub fn mul(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        let dim = combine_dims(self.dim, other.dim, 1)?;
        // Plain times plain is plain whatever the dimensions (the common case).
        let kind = if self.kind == Kind::Plain && other.kind == Kind::Plain {
            Kind::Plain
        } else {
            kind::mul_kind(self.kind, self.is_scalar(), other.kind, other.is_scalar())
        };
        finite(self.si * other.si, dim, kind)
    }

    /// `self / other`: dimensions subtract, kinds by [`kind::div_kind`];
    /// division by zero is an error.
    #[inline(always)]
    pub fn div(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        if other.si == 0.0 {
            return Err(division_by_zero());
        }
        let dim = combine_dims(self.dim, other.dim, -1)?;
        // A ratio of two equal kinds is plain (the common case).
        let kind = if self.kind == other.kind {
            Kind::Plain
        } else {
            kind::div_kind(self.kind, other.kind, other.is_scalar())
        };
        finite(self.si / other.si, dim, kind)
    }

    /// `-self`. Negating an absolute temperature is an error (it would lie
    /// below absolute zero); every other kind is kept.
    pub fn neg(&self) -> Result<Quantity, UnitError> {
        if self.kind == Kind::AbsoluteTemperature {
            return Err(UnitError::new("cannot negate an absolute temperature")
                .with_hint("negate a difference instead, e.g. -(T2 - T1)"));
        }
        Ok(Quantity::new(-self.si, self.dim, self.kind))
    }

    /// `self ^ n` for an integer `n`. `^1` keeps the kind, any other power is
    /// plain (an absolute temperature is raised as kelvin, as in `T^4`).
    pub fn powi(&self, n: i32) -> Result<Quantity, UnitError> {
        let dim = scale_dim(self.dim, n)?;
        let kind = if n == 1 { self.kind } else { Kind::Plain };
        if n < 0 && self.si == 0.0 {
            return Err(UnitError::new(
                "division by zero (zero raised to a negative power)",
            ));
        }
        finite(self.si.powi(n), dim, kind)
    }

    /// `self ^ e` for a real exponent. A dimensionless base takes any real
    /// exponent; a dimensioned base needs a rational exponent p/q (q <= 12)
    /// whose root divides every dimension exponent evenly (`(4 m^2)^0.5` is 2 m,
    /// `(4 m)^0.5` is an error).
    pub fn powf(&self, e: f64) -> Result<Quantity, UnitError> {
        if !e.is_finite() {
            return Err(UnitError::new("the exponent is not a finite number"));
        }
        if e.fract() == 0.0 && e.abs() <= i32::MAX as f64 {
            return self.powi(e as i32);
        }
        let dim = if self.dim.is_dimensionless() {
            Dim::NONE
        } else {
            self.root_dim(e)?
        };
        if self.si < 0.0 {
            return Err(UnitError::new(format!(
                "cannot raise a negative value to the non-integer power {e}"
            )));
        }
        if self.si == 0.0 && e < 0.0 {
            return Err(UnitError::new(
                "division by zero (zero raised to a negative power)",
            ));
        }
        finite(self.si.powf(e), dim, Kind::Plain)
    }

    /// `self ^ other` where the exponent is itself a quantity: it must be a
    /// dimensionless number.
    pub fn pow(&self, exponent: &Quantity) -> Result<Quantity, UnitError> {
        if !exponent.dim.is_dimensionless() {
            return Err(UnitError::dim_mismatch(
                "an exponent must be a dimensionless number: ",
                Dim::NONE,
                exponent.dim,
            ));
        }
        self.powf(exponent.si)
    }

    /// Compare with equal dimensions and compatible kinds.
    ///
    /// Values within [`EQUAL_REL_TOL`] of each other (relative) are `Equal`, so
    /// that `80 degC = 176 degF` and `1 ft = 12 in` hold despite the round-off
    /// of unit conversions.
    ///
    /// Named `cmp` by the shared API; it is fallible, so it is not `Ord::cmp`.
    #[allow(clippy::should_implement_trait)]
    pub fn cmp(&self, other: &Quantity) -> Result<Ordering, UnitError> {
        self.same_dim("comparison needs equal dimensions: ", other)?;
        kind::compare_kinds(self.kind, other.kind).map_err(|c| clash_error("compare", c))?;
        let scale = self.si.abs().max(other.si.abs());
        if (self.si - other.si).abs() <= EQUAL_REL_TOL * scale {
            return Ok(Ordering::Equal);
        }
        self.si
            .partial_cmp(&other.si)
            .ok_or_else(|| UnitError::new("cannot compare a value that is not a number"))
    }

    /// The value as kelvin if it is a temperature that may be read as absolute
    /// (an absolute temperature or a plain kelvin value); errors for a
    /// difference or another dimension. For library arguments like `T:`.
    pub fn absolute_kelvin(&self) -> Result<f64, UnitError> {
        self.expect_kind(Dim::TEMPERATURE, Kind::AbsoluteTemperature)
            .map(|q| q.si)
    }

    /// Check this value can stand where a quantity of `dim` and `kind` is
    /// expected, and return it with that kind.
    ///
    /// Accepted: the same kind; a plain value for any kind (a bare number where
    /// a ratio is expected, a kelvin value where an absolute temperature is
    /// expected); a fraction or `%` where a relative humidity / activity is
    /// expected (`rh: 55 %`); any kind where `Plain` is expected. Refused: a
    /// different named ratio, a `%` where moisture or humidity ratio is expected
    /// (ambiguous basis), a difference where an absolute temperature is expected
    /// and vice versa.
    pub fn expect_kind(&self, dim: Dim, kind: Kind) -> Result<Quantity, UnitError> {
        if self.dim != dim {
            return Err(UnitError::dim_mismatch("", dim, self.dim));
        }
        if accepts(kind, self.kind) {
            return Ok(Quantity::new(self.si, self.dim, kind));
        }
        Err(expect_kind_error(kind, self.kind))
    }

    /// Does [`Quantity::expect_kind`] accept this quantity (giving its
    /// magnitude unchanged)? Answered without building its error.
    #[inline]
    pub fn fits_kind(&self, dim: Dim, kind: Kind) -> bool {
        self.dim == dim && accepts(kind, self.kind)
    }

    #[inline]
    fn same_dim(&self, context: &str, other: &Quantity) -> Result<(), UnitError> {
        if self.dim == other.dim {
            Ok(())
        } else {
            Err(dim_mismatch(context, self.dim, other.dim))
        }
    }

    fn root_dim(&self, e: f64) -> Result<Dim, UnitError> {
        let (p, q) = rational(e).ok_or_else(|| {
            UnitError::new(format!(
                "cannot raise {} to the power {e}: a dimensioned value needs a simple fractional exponent",
                describe_dim_with_si(self.dim)
            ))
        })?;
        let raised = scale_dim(self.dim, p)?;
        raised.root(q).ok_or_else(|| {
            UnitError::new(format!(
                "cannot take the root {q} of {}: its exponents do not divide evenly by {q}",
                describe_dim_with_si(self.dim)
            ))
        })
    }
}

#[cold]
fn division_by_zero() -> UnitError {
    UnitError::new("division by zero")
}

#[cold]
fn dim_mismatch(context: &str, expected: Dim, found: Dim) -> UnitError {
    UnitError::dim_mismatch(context, expected, found)
}

/// Whether a value of kind `found` may stand where `wanted` is expected.
#[inline]
fn accepts(wanted: Kind, found: Kind) -> bool {
    use Kind::*;
    match (wanted, found) {
        _ if wanted == found => true,
        (Plain, _) => true,
        (_, Plain) => true,
        (Activity, Fraction) => true,
        _ => false,
    }
}

fn expect_kind_error(wanted: Kind, found: Kind) -> UnitError {
    let err = UnitError::new(format!(
        "expected {}, found {}",
        wanted.describe(),
        found.describe()
    ));
    match (wanted, found) {
        (Kind::Moisture, Kind::Fraction) => {
            err.with_hint("a percentage does not say its basis: write 25 %db or 20 %wb")
        }
        (Kind::HumidityRatio, Kind::Fraction) => {
            err.with_hint("write a humidity ratio as e.g. 0.012 kg/kg_da or 12 g/kg_da")
        }
        (Kind::AbsoluteTemperature, Kind::TemperatureDifference) => {
            err.with_hint("add the difference to a temperature, e.g. T + dT")
        }
        (Kind::TemperatureDifference, Kind::AbsoluteTemperature) => {
            err.with_hint("subtract two temperatures to get a difference, e.g. T2 - T1")
        }
        (Kind::Moisture, Kind::HumidityRatio) | (Kind::HumidityRatio, Kind::Moisture) => err
            .with_hint("moisture content is per kg of dry solid, humidity ratio per kg of dry air"),
        _ => err,
    }
}

/// The error for a kind clash under `+ - compare`.
fn clash_error(verb: &str, clash: KindClash) -> UnitError {
    match clash {
        KindClash::AbsolutePlusAbsolute => {
            UnitError::new(format!("cannot {verb} two absolute temperatures"))
                .with_hint("subtract to get a difference, or add a difference like 5 K")
                .with_hint("for a mean temperature write T1 + (T2 - T1)/2")
        }
        KindClash::DifferenceAgainstAbsolute => UnitError::new(format!(
            "cannot {verb} a temperature difference and an absolute temperature this way"
        ))
        .with_hint("an absolute temperature minus a difference is absolute: write T - dT"),
        KindClash::AmbiguousPercent(k) => {
            UnitError::new(format!("cannot {verb} {} and a percentage", k.describe())).with_hint(
                match k {
                    Kind::Moisture => "a percentage does not say its basis: write %db or %wb",
                    _ => "write a humidity ratio in kg/kg_da or g/kg_da",
                },
            )
        }
        KindClash::Ratios(a, b) => UnitError::new(format!(
            "cannot {verb} {} and {}",
            a.describe(),
            b.describe()
        ))
        .with_hint(ratio_hint(a, b)),
    }
}

fn ratio_hint(a: Kind, b: Kind) -> &'static str {
    let pair = |x, y| (a == x && b == y) || (a == y && b == x);
    if pair(Kind::Moisture, Kind::HumidityRatio) {
        "moisture content is kg water per kg dry solid, humidity ratio is kg water per kg dry air: they describe different materials"
    } else if pair(Kind::Moisture, Kind::Activity) {
        "relate moisture content and water activity through a sorption isotherm"
    } else {
        "relate humidity ratio and relative humidity through an air state, e.g. air(T: ..., rh: ...).w"
    }
}

/// Add (`sign = 1`) or subtract (`sign = -1`) dimension vectors, refusing
/// exponents outside the i8 range.
#[inline(always)]
fn combine_dims(a: Dim, b: Dim, sign: i32) -> Result<Dim, UnitError> {
    // The seven exponents as bytes of one word, added or subtracted lane by
    // lane without carries between lanes; a lane overflows when its result
    // leaves the i8 range (Warren, Hacker's Delight, 2nd ed., sec. 2-18 and
    // 2-13). This runs on every `*` and `/`.
    const HIGH: u64 = 0x8080_8080_8080_8080;
    let (x, y) = (word(a), word(b));
    let (sum, overflow) = if sign >= 0 {
        let s = ((x & !HIGH) + (y & !HIGH)) ^ ((x ^ y) & HIGH);
        (s, (x ^ s) & (y ^ s) & HIGH)
    } else {
        let s = ((x | HIGH) - (y & !HIGH)) ^ ((x ^ !y) & HIGH);
        (s, (x ^ y) & (x ^ s) & HIGH)
    };
    if overflow == 0 {
        let b = sum.to_le_bytes();
        Ok(Dim(
            [b[0], b[1], b[2], b[3], b[4], b[5], b[6]].map(|e| e as i8)
        ))
    } else {
        Err(exponent_too_large())
    }
}

#[cold]
fn exponent_too_large() -> UnitError {
    UnitError::new("a dimension exponent is too large")
}

/// A dimension's exponents as the low seven bytes of a word (the eighth is 0).
#[inline]
fn word(d: Dim) -> u64 {
    let e = d.0.map(|e| e as u8);
    u64::from_le_bytes([e[0], e[1], e[2], e[3], e[4], e[5], e[6], 0])
}

/// Multiply a dimension's exponents by `p` (then the caller may take a root),
/// refusing exponents outside the i8 range.
fn scale_dim(a: Dim, p: i32) -> Result<Dim, UnitError> {
    let mut out = [0i8; 7];
    for (i, o) in out.iter_mut().enumerate() {
        let e = (a.0[i] as i64) * (p as i64);
        *o = exponent(e.clamp(i32::MIN as i64, i32::MAX as i64) as i32)?;
    }
    Ok(Dim(out))
}

fn exponent(e: i32) -> Result<i8, UnitError> {
    i8::try_from(e).map_err(|_| UnitError::new("a dimension exponent is too large"))
}

/// `e` as p/q with the smallest q <= 12, if it is one.
fn rational(e: f64) -> Option<(i32, i32)> {
    (1..=12).find_map(|q| {
        let p = (e * q as f64).round();
        let close = (p / q as f64 - e).abs() < 1e-9;
        (close && p.abs() < 1e6).then_some((p as i32, q))
    })
}

/// A result quantity, or an error when the magnitude is not finite.
#[inline]
fn finite(si: f64, dim: Dim, kind: Kind) -> Result<Quantity, UnitError> {
    if si.is_finite() {
        Ok(Quantity::new(si, dim, kind))
    } else {
        Err(not_finite())
    }
}

#[cold]
fn not_finite() -> UnitError {
    UnitError::new("the result is not a finite number (overflow or invalid operation)")
        .with_hint("an operand may itself be invalid, e.g. a wet-basis moisture of 1 or more")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn products_and_quotients_refuse_exponents_past_the_i8_range() {
        let big = Quantity::new(2.0, Dim([100, -100, 0, 0, 0, 0, 1]), Kind::Plain);
        let small = Quantity::new(4.0, Dim([27, -28, 0, 0, 0, 0, -1]), Kind::Plain);
        let p = big.mul(&small).expect("exponents 127 and -128 fit");
        assert_eq!(p.dim, Dim([127, -128, 0, 0, 0, 0, 0]));
        assert_eq!(p.si, 8.0);
        let e = big.mul(&big).expect_err("200 does not fit");
        assert!(e.message.contains("too large"), "{}", e.message);
        let q = big.div(&small).expect("73 and -72 fit");
        assert_eq!(q.dim, Dim([73, -72, 0, 0, 0, 0, 2]));
        assert!(big
            .div(&Quantity::new(
                1.0,
                Dim([-28, 0, 0, 0, 0, 0, 0]),
                Kind::Plain
            ))
            .is_err());
    }

    /// Lane by lane, the definition the word-wide `combine_dims` must match.
    fn combine_lanes(a: Dim, b: Dim, sign: i32) -> Option<Dim> {
        let mut out = [0i8; 7];
        for (o, (x, y)) in out.iter_mut().zip(a.0.iter().zip(&b.0)) {
            *o = i8::try_from(i32::from(*x) + sign * i32::from(*y)).ok()?;
        }
        Some(Dim(out))
    }

    #[test]
    fn word_wide_exponent_arithmetic_matches_lane_by_lane() {
        let edges = [
            -128i8, -127, -100, -64, -2, -1, 0, 1, 2, 63, 64, 100, 126, 127,
        ];
        for (i, &x) in edges.iter().enumerate() {
            for (j, &y) in edges.iter().enumerate() {
                // The pair in a lane that moves with it, neighbours in the
                // other lanes, so that a carry between lanes would show.
                let lane = (i + j) % 7;
                let mut a: [i8; 7] = std::array::from_fn(|k| edges[(i + k) % edges.len()]);
                let mut b: [i8; 7] = std::array::from_fn(|k| edges[(j + 2 * k) % edges.len()]);
                a[lane] = x;
                b[lane] = y;
                for sign in [1, -1] {
                    let got = combine_dims(Dim(a), Dim(b), sign).ok();
                    let want = combine_lanes(Dim(a), Dim(b), sign);
                    assert_eq!(got, want, "{a:?} {sign} {b:?}");
                }
            }
        }
    }
}
