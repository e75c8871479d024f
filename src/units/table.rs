//! The unit table, built from uom's unit definitions.

use super::{Dim, Kind};

/// A unit: how to turn a number written in it into SI, and back.
#[derive(Clone, PartialEq, Debug)]
pub struct Unit {
    /// Canonical display symbol, e.g. `W/(m^2*K)`.
    pub symbol: String,
    /// SI value of one unit (for affine units, of one degree).
    pub factor: f64,
    /// SI offset added after scaling (273.15 for degC); zero for linear units.
    pub offset: f64,
    pub dim: Dim,
    pub kind: Kind,
}

/// Look up a unit symbol, with SI prefixes (`kPa`, `mm`, `kJ`).
pub fn lookup_unit(_symbol: &str) -> Option<Unit> {
    None // placeholder until the unit table lands
}

/// The closest known unit symbol to a misspelt one.
pub fn suggest_unit(_symbol: &str) -> Option<String> {
    None
}

/// Every unit symbol (without prefixes), for completion and docs.
pub fn unit_names() -> Vec<&'static str> {
    Vec::new()
}

/// A dimension in words, e.g. "energy per mass" or "power per area".
pub fn describe_dim(dim: Dim) -> String {
    dim.si_unit()
}
