//! Named dimensions: words and a preferred coherent SI unit for each.
//!
//! Used by [`describe_dim`] for messages ("expected power per area [W/m^2]")
//! and by the formatter to choose a default display unit.

use super::Dim;

/// A dimension with a name people use and its coherent SI unit as written in
/// the language.
#[derive(Clone, Copy, Debug)]
pub struct NamedDim {
    /// The dimension.
    pub dim: Dim,
    /// In words, e.g. "energy per mass".
    pub words: &'static str,
    /// Coherent SI unit, e.g. `J/kg`.
    pub si: &'static str,
}

/// Dimension from exponents of length, mass, time, temperature, amount.
const fn d(l: i8, m: i8, t: i8, th: i8, n: i8) -> Dim {
    Dim([l, m, t, 0, th, n, 0])
}

const fn named(dim: Dim, words: &'static str, si: &'static str) -> NamedDim {
    NamedDim { dim, words, si }
}

/// Every named dimension. The first entry for a dimension wins; order the
/// table so that the drying trade's reading comes first.
pub const NAMED_DIMS: &[NamedDim] = &[
    named(Dim::NONE, "dimensionless number", ""),
    named(Dim::LENGTH, "length", "m"),
    named(Dim::MASS, "mass", "kg"),
    named(Dim::TIME, "time", "s"),
    named(Dim::CURRENT, "electric current", "A"),
    named(Dim::TEMPERATURE, "temperature", "K"),
    named(Dim::AMOUNT, "amount of substance", "mol"),
    named(Dim::LUMINOUS, "luminous intensity", "cd"),
    named(Dim::AREA, "area", "m^2"),
    named(Dim::VOLUME, "volume", "m^3"),
    named(Dim::VELOCITY, "velocity", "m/s"),
    named(d(1, 0, -2, 0, 0), "acceleration", "m/s^2"),
    named(d(0, 0, -1, 0, 0), "rate (per time)", "1/s"),
    named(d(-1, 0, 0, 0, 0), "per length", "1/m"),
    named(d(0, 0, 0, -1, 0), "per temperature", "1/K"),
    named(d(1, 1, -2, 0, 0), "force", "N"),
    named(Dim::PRESSURE, "pressure", "Pa"),
    named(Dim::ENERGY, "energy", "J"),
    named(Dim::POWER, "power", "W"),
    named(Dim::DENSITY, "density", "kg/m^3"),
    named(Dim::SPECIFIC_ENERGY, "energy per mass", "J/kg"),
    named(Dim::SPECIFIC_HEAT, "specific heat", "J/(kg*K)"),
    named(Dim::SPECIFIC_VOLUME, "specific volume", "m^3/kg"),
    named(Dim::MASS_FLUX, "mass flux", "kg/(m^2*s)"),
    named(Dim::MASS_FLOW, "mass flow", "kg/s"),
    named(Dim::VOLUME_FLOW, "volume flow", "m^3/s"),
    named(Dim::HEAT_FLUX, "power per area", "W/m^2"),
    named(
        Dim::HEAT_TRANSFER_COEFFICIENT,
        "heat transfer coefficient",
        "W/(m^2*K)",
    ),
    named(Dim::THERMAL_CONDUCTIVITY, "thermal conductivity", "W/(m*K)"),
    named(Dim::DYNAMIC_VISCOSITY, "viscosity", "Pa*s"),
    named(Dim::DIFFUSIVITY, "diffusivity", "m^2/s"),
    named(Dim::MOLAR_ENERGY, "energy per amount", "J/mol"),
    named(Dim::AREAL_DENSITY, "mass per area", "kg/m^2"),
    named(d(0, 1, 0, 0, -1), "molar mass", "kg/mol"),
    named(d(0, -1, 0, 0, 1), "amount per mass", "mol/kg"),
    named(d(-3, 0, 0, 0, 1), "molar concentration", "mol/m^3"),
    named(d(-2, 0, -1, 0, 1), "molar flux", "mol/(m^2*s)"),
    named(d(2, 1, -2, -1, 0), "heat capacity", "J/K"),
    named(d(2, 1, -2, -1, -1), "molar heat capacity", "J/(mol*K)"),
    named(d(-1, 1, -2, -1, 0), "volumetric heat capacity", "J/(m^3*K)"),
    named(d(0, 1, -2, 0, 0), "energy per area", "J/m^2"),
    named(d(-1, 1, -3, 0, 0), "power per volume", "W/m^3"),
    named(d(2, 0, -3, 0, 0), "power per mass", "W/kg"),
    named(d(2, 1, -3, -1, 0), "thermal conductance", "W/K"),
    named(d(0, -1, 3, 1, 0), "area thermal resistance", "m^2*K/W"),
    named(d(-1, 0, 0, 1, 0), "temperature gradient", "K/m"),
    named(d(0, 0, -1, 1, 0), "temperature rate", "K/s"),
    named(d(-3, 1, -1, 0, 0), "mass flow per volume", "kg/(m^3*s)"),
    named(d(1, 1, -1, 0, 0), "momentum", "kg*m/s"),
    named(d(-1, 0, 1, 0, 0), "inverse velocity", "s/m"),
    named(d(1, -1, 2, 0, 0), "per pressure", "1/Pa"),
];

/// The named entry for a dimension, if it has one.
pub fn named_dim(dim: Dim) -> Option<&'static NamedDim> {
    NAMED_DIMS.iter().find(|n| n.dim == dim)
}

/// The coherent SI unit for a dimension as written in the language:
/// the named one (`W/m^2`) or one built from base units (`kg/(m*s^3)`).
pub fn si_symbol(dim: Dim) -> String {
    match named_dim(dim) {
        Some(n) => n.si.to_string(),
        None => dim.si_unit(),
    }
}

/// A dimension in words, e.g. "energy per mass" or "power per area".
///
/// Unnamed dimensions fall back to "quantity in <SI unit>".
pub fn describe_dim(dim: Dim) -> String {
    match named_dim(dim) {
        Some(n) => n.words.to_string(),
        None => format!("quantity in {}", dim.si_unit()),
    }
}

/// Words and SI together, as used in mismatch messages: `power per area [W/m^2]`.
pub fn describe_dim_with_si(dim: Dim) -> String {
    if dim.is_dimensionless() {
        return "a dimensionless number".to_string();
    }
    format!("{} [{}]", describe_dim(dim), si_symbol(dim))
}
