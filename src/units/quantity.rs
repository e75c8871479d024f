//! The runtime quantity and its checked arithmetic.
//!
//! TEMPORARY minimal bodies written by the core helper so the language compiles;
//! the units helper's versions replace them on merge.

use std::cmp::Ordering;

use super::{describe_dim, Dim, Kind};

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

impl UnitError {
    fn new(message: impl Into<String>) -> UnitError {
        UnitError { message: message.into(), hints: Vec::new() }
    }
}

fn words(d: Dim) -> String {
    let unit = d.si_unit();
    if unit.is_empty() {
        describe_dim(d)
    } else {
        format!("{} [{}]", describe_dim(d), unit)
    }
}

impl Quantity {
    /// A quantity from its SI magnitude, dimension and kind.
    pub fn new(si: f64, dim: Dim, kind: Kind) -> Quantity {
        Quantity { si, dim, kind }
    }

    /// A dimensionless plain number.
    pub fn number(x: f64) -> Quantity {
        Quantity::new(x, Dim::NONE, Kind::Plain)
    }

    fn same_dim(&self, other: &Quantity, verb: &str) -> Result<(), UnitError> {
        if self.dim == other.dim {
            Ok(())
        } else {
            Err(UnitError::new(format!("cannot {verb} {} and {}", words(self.dim), words(other.dim))))
        }
    }

    fn additive_kind(&self, other: &Quantity, subtract: bool) -> Result<Kind, UnitError> {
        use Kind::*;
        match (self.kind, other.kind) {
            (AbsoluteTemperature, AbsoluteTemperature) if subtract => Ok(Plain),
            (AbsoluteTemperature, AbsoluteTemperature) => Err(UnitError {
                message: "cannot add two absolute temperatures".into(),
                hints: vec!["add a temperature difference instead, e.g. `T + 10 K`".into()],
            }),
            (Plain, AbsoluteTemperature) if subtract => Err(UnitError::new(
                "cannot subtract an absolute temperature from a temperature difference",
            )),
            (a, Plain) | (Plain, a) => Ok(a),
            (a, b) if a == b => Ok(a),
            (a, b) => Err(UnitError::new(format!("cannot mix {a:?} with {b:?}"))),
        }
    }

    /// Checked sum.
    pub fn add(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        self.same_dim(other, "add")?;
        let kind = self.additive_kind(other, false)?;
        Ok(Quantity::new(self.si + other.si, self.dim, kind))
    }

    /// Checked difference.
    pub fn sub(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        self.same_dim(other, "subtract")?;
        let kind = self.additive_kind(other, true)?;
        Ok(Quantity::new(self.si - other.si, self.dim, kind))
    }

    fn product_kind(&self, other: &Quantity) -> Kind {
        match (self.kind, other.kind, self.dim.is_dimensionless(), other.dim.is_dimensionless()) {
            (k, Kind::Plain, true, true) if k != Kind::AbsoluteTemperature => k,
            (Kind::Plain, k, true, true) if k != Kind::AbsoluteTemperature => k,
            _ => Kind::Plain,
        }
    }

    /// Checked product.
    pub fn mul(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        Ok(Quantity::new(self.si * other.si, self.dim * other.dim, self.product_kind(other)))
    }

    /// Checked quotient; division by zero is an error.
    pub fn div(&self, other: &Quantity) -> Result<Quantity, UnitError> {
        if other.si == 0.0 {
            return Err(UnitError::new("division by zero"));
        }
        Ok(Quantity::new(self.si / other.si, self.dim / other.dim, self.product_kind(other)))
    }

    /// Negation.
    pub fn neg(&self) -> Result<Quantity, UnitError> {
        Ok(Quantity::new(-self.si, self.dim, self.kind))
    }

    /// Integer power.
    pub fn powi(&self, n: i32) -> Result<Quantity, UnitError> {
        Ok(Quantity::new(self.si.powi(n), self.dim.powi(n), Kind::Plain))
    }

    /// Real power: dimensionless base, or an exact root of a dimensioned one.
    pub fn powf(&self, x: f64) -> Result<Quantity, UnitError> {
        if self.dim.is_dimensionless() {
            return Ok(Quantity::number(self.si.powf(x)));
        }
        let inv = 1.0 / x;
        if (inv - inv.round()).abs() < 1e-9 {
            if let Some(d) = self.dim.root(inv.round() as i32) {
                return Ok(Quantity::new(self.si.powf(x), d, Kind::Plain));
            }
        }
        Err(UnitError::new(format!("cannot raise {} to the power {x}", words(self.dim))))
    }

    /// Checked comparison.
    pub fn cmp(&self, other: &Quantity) -> Result<Ordering, UnitError> {
        self.same_dim(other, "compare")?;
        self.si.partial_cmp(&other.si).ok_or_else(|| UnitError::new("cannot compare NaN"))
    }
}
