//! Kinds of quantity that share a dimension but must not be mixed.

/// What a quantity means beyond its dimension.
///
/// Dimensionless ratios carry a kind because mixing them is the classic drying
/// error; temperatures carry a kind because they are affine.
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug, Default)]
pub enum Kind {
    /// An ordinary quantity (including a temperature difference or a kelvin value
    /// that has not been declared absolute).
    #[default]
    Plain,
    /// An absolute temperature written in an offset scale (degC, degF) or produced
    /// as one; `abs + abs` is an error, `abs - abs` is a difference.
    AbsoluteTemperature,
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
