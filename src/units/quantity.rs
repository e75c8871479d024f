//! The runtime quantity and its checked arithmetic.

use super::{Dim, Kind};

/// A quantity: SI magnitude, dimension and kind.
#[derive(Clone, Copy, PartialEq, Debug)]
pub struct Quantity {
    /// Magnitude in coherent SI units (kelvin for temperatures, dry basis for moisture).
    pub si: f64,
    pub dim: Dim,
    pub kind: Kind,
}

/// A span-less error from a unit or value operation; the evaluator attaches the span.
#[derive(Clone, PartialEq, Debug)]
pub struct UnitError {
    pub message: String,
    pub hints: Vec<String>,
}
