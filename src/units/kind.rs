//! Kinds of quantity that share a dimension but must not be mixed.
//!
//! The rules that combine kinds under `+ - * /` live here as small pure
//! functions over kinds; `quantity.rs` applies them and builds the errors.

/// What a quantity means beyond its dimension.
///
/// Dimensionless ratios carry a kind because mixing them is the classic drying
/// error; temperatures carry a kind because they are affine.
///
/// `TemperatureDifference` was added to the original five kinds so that an
/// explicit difference (`80 degC - 35 degC`) can be told apart from a kelvin
/// literal (`300 K`), which stays `Plain` and may be read either way. Without
/// it, `dT as degC` could not know whether to apply the 273.15 offset, and
/// `air(T: dT)` could not be refused.
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug, Default)]
pub enum Kind {
    /// An ordinary quantity. A temperature in kelvin or degR that has not been
    /// declared absolute or a difference is `Plain` and is accepted as either.
    #[default]
    Plain,
    /// An absolute temperature written in an offset scale (degC, degF) or produced
    /// as one; `abs + abs` is an error, `abs - abs` is a difference.
    AbsoluteTemperature,
    /// A temperature difference made by `abs - abs` or written in `delta_degC`,
    /// `delta_degF`; `abs + difference` is absolute again.
    TemperatureDifference,
    /// Solid moisture content, stored on the dry basis (kg water / kg dry solid).
    /// `wb` is a way of showing it, converted exactly.
    Moisture,
    /// Air humidity ratio (kg water / kg dry air).
    HumidityRatio,
    /// Relative humidity or water activity (0..1).
    Activity,
    /// A plain fraction, including values written in %.
    Fraction,
}

impl Kind {
    /// The kind in words, for messages ("a dry-basis moisture content").
    pub fn describe(self) -> &'static str {
        match self {
            Kind::Plain => "a plain quantity",
            Kind::AbsoluteTemperature => "an absolute temperature",
            Kind::TemperatureDifference => "a temperature difference",
            Kind::Moisture => "a moisture content (kg water/kg dry solid)",
            Kind::HumidityRatio => "a humidity ratio (kg water/kg dry air)",
            Kind::Activity => "a relative humidity or water activity",
            Kind::Fraction => "a fraction",
        }
    }

    /// True for the dimensionless kinds that name a physical ratio
    /// (moisture, humidity ratio, activity): two different ones never mix.
    #[inline]
    pub fn is_named_ratio(self) -> bool {
        matches!(self, Kind::Moisture | Kind::HumidityRatio | Kind::Activity)
    }

    /// True for the temperature kinds (absolute or difference).
    #[inline]
    pub fn is_temperature(self) -> bool {
        matches!(
            self,
            Kind::AbsoluteTemperature | Kind::TemperatureDifference
        )
    }
}

/// Why two kinds cannot be added, subtracted or compared.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
pub enum KindClash {
    /// `abs + abs`.
    AbsolutePlusAbsolute,
    /// `difference - abs`, or comparing a difference with an absolute temperature.
    DifferenceAgainstAbsolute,
    /// Two different named ratios (e.g. moisture and humidity ratio).
    Ratios(Kind, Kind),
    /// A `%` fraction with a moisture content or a humidity ratio: a percentage
    /// does not say its basis (wet or dry, per kg of what).
    AmbiguousPercent(Kind),
}

/// Kind of `a + b` (dimensions already equal).
///
/// Rules: abs + abs is refused; abs + (difference or plain) is abs;
/// difference + plain is a difference; two different named ratios are refused;
/// a named ratio with a plain number keeps the ratio's kind; a fraction (`%`)
/// joins a relative humidity / activity but is refused with a moisture content
/// or a humidity ratio, since a percentage does not say its basis.
#[inline]
pub fn add_kind(a: Kind, b: Kind) -> Result<Kind, KindClash> {
    use Kind::*;
    match (a, b) {
        (AbsoluteTemperature, AbsoluteTemperature) => Err(KindClash::AbsolutePlusAbsolute),
        (AbsoluteTemperature, _) | (_, AbsoluteTemperature) => Ok(AbsoluteTemperature),
        (TemperatureDifference, _) | (_, TemperatureDifference) => Ok(TemperatureDifference),
        _ => ratio_kind(a, b),
    }
}

/// Kind of `a - b` (dimensions already equal).
///
/// Rules: abs - abs is a difference; abs - (difference or plain) is abs;
/// plain - abs is a difference (the plain value is read as absolute kelvin);
/// difference - abs is refused; otherwise as for `+`.
#[inline]
pub fn sub_kind(a: Kind, b: Kind) -> Result<Kind, KindClash> {
    use Kind::*;
    match (a, b) {
        (AbsoluteTemperature, AbsoluteTemperature) => Ok(TemperatureDifference),
        (AbsoluteTemperature, _) => Ok(AbsoluteTemperature),
        (TemperatureDifference, AbsoluteTemperature) => Err(KindClash::DifferenceAgainstAbsolute),
        (_, AbsoluteTemperature) => Ok(TemperatureDifference),
        (TemperatureDifference, _) | (_, TemperatureDifference) => Ok(TemperatureDifference),
        _ => ratio_kind(a, b),
    }
}

/// Whether `a` and `b` may be compared (`< > = ...`), dimensions already equal.
///
/// Absolute temperatures compare with each other and with plain kelvin values;
/// a difference never compares with an absolute temperature; different named
/// ratios never compare.
pub fn compare_kinds(a: Kind, b: Kind) -> Result<(), KindClash> {
    use Kind::*;
    match (a, b) {
        (TemperatureDifference, AbsoluteTemperature)
        | (AbsoluteTemperature, TemperatureDifference) => Err(KindClash::DifferenceAgainstAbsolute),
        _ if a.is_temperature() || b.is_temperature() => Ok(()),
        _ => ratio_kind(a, b).map(|_| ()),
    }
}

/// Combine two non-temperature kinds under `+ - compare`.
#[inline]
fn ratio_kind(a: Kind, b: Kind) -> Result<Kind, KindClash> {
    use Kind::*;
    match (a, b) {
        _ if a == b => Ok(a),
        _ if a.is_named_ratio() && b.is_named_ratio() => Err(KindClash::Ratios(a, b)),
        (Moisture | HumidityRatio, Fraction) => Err(KindClash::AmbiguousPercent(a)),
        (Fraction, Moisture | HumidityRatio) => Err(KindClash::AmbiguousPercent(b)),
        _ if a.is_named_ratio() => Ok(a),
        _ if b.is_named_ratio() => Ok(b),
        (Fraction, _) | (_, Fraction) => Ok(Fraction),
        _ => Ok(Plain),
    }
}

/// Kind of a product `a * b`; `a_scalar`/`b_scalar` say whether each side is
/// a dimensionless plain number or fraction (a pure scaling factor).
///
/// Rules: an absolute temperature in a product is used as its kelvin value and
/// the result is plain (`p*V = n*R*T`, `sigma*T^4` need kelvin); scaling by a
/// plain number or fraction keeps the other side's kind (`2 * dT` is still a
/// difference, `0.5 * X` still a moisture, `50 % * 20 %` still a fraction);
/// anything else is plain.
#[inline]
pub fn mul_kind(a: Kind, a_scalar: bool, b: Kind, b_scalar: bool) -> Kind {
    if a == Kind::AbsoluteTemperature || b == Kind::AbsoluteTemperature {
        return Kind::Plain;
    }
    match (a_scalar, b_scalar) {
        (true, true) => ratio_kind(a, b).unwrap_or(Kind::Plain),
        (true, false) => b,
        (false, true) => a,
        (false, false) => Kind::Plain,
    }
}

/// Kind of a quotient `a / b` (see [`mul_kind`]); `b_scalar` as there.
///
/// Rules: a ratio of two equal kinds is plain (`X1 / X2`); dividing by a plain
/// number or fraction keeps `a`'s kind; absolute temperatures are used as kelvin
/// and give plain results; anything else is plain.
#[inline]
pub fn div_kind(a: Kind, b: Kind, b_scalar: bool) -> Kind {
    if a == Kind::AbsoluteTemperature || b == Kind::AbsoluteTemperature {
        return Kind::Plain;
    }
    if a == b || !b_scalar {
        return Kind::Plain;
    }
    a
}
