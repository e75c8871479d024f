//! The unit table, built from uom's unit definitions.
//!
//! TEMPORARY minimal table written by the core helper so the language compiles;
//! the units helper's versions replace it on merge.

use super::{Dim, Kind, Quantity, UnitError};

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

const BASE: &[(&str, f64, f64, Dim, Kind)] = &[
    ("m", 1.0, 0.0, Dim::LENGTH, Kind::Plain),
    ("mm", 1e-3, 0.0, Dim::LENGTH, Kind::Plain),
    ("ft", 0.3048, 0.0, Dim::LENGTH, Kind::Plain),
    ("kg", 1.0, 0.0, Dim::MASS, Kind::Plain),
    ("g", 1e-3, 0.0, Dim::MASS, Kind::Plain),
    ("s", 1.0, 0.0, Dim::TIME, Kind::Plain),
    ("min", 60.0, 0.0, Dim::TIME, Kind::Plain),
    ("h", 3600.0, 0.0, Dim::TIME, Kind::Plain),
    ("Pa", 1.0, 0.0, Dim::PRESSURE, Kind::Plain),
    ("kPa", 1e3, 0.0, Dim::PRESSURE, Kind::Plain),
    ("J", 1.0, 0.0, Dim::ENERGY, Kind::Plain),
    ("kJ", 1e3, 0.0, Dim::ENERGY, Kind::Plain),
    ("BTU", 1055.05585262, 0.0, Dim::ENERGY, Kind::Plain),
    ("W", 1.0, 0.0, Dim::POWER, Kind::Plain),
    ("kW", 1e3, 0.0, Dim::POWER, Kind::Plain),
    ("K", 1.0, 0.0, Dim::TEMPERATURE, Kind::Plain),
    ("degC", 1.0, 273.15, Dim::TEMPERATURE, Kind::AbsoluteTemperature),
    ("degF", 5.0 / 9.0, 255.372_222_222_222_2, Dim::TEMPERATURE, Kind::AbsoluteTemperature),
    ("%", 0.01, 0.0, Dim::NONE, Kind::Fraction),
    ("db", 1.0, 0.0, Dim::NONE, Kind::Moisture),
    ("wb", 1.0, 0.0, Dim::NONE, Kind::Moisture),
];

/// Look up a unit symbol, with SI prefixes (`kPa`, `mm`, `kJ`).
pub fn lookup_unit(symbol: &str) -> Option<Unit> {
    BASE.iter().find(|u| u.0 == symbol).map(|&(s, factor, offset, dim, kind)| Unit {
        symbol: s.into(),
        factor,
        offset,
        dim,
        kind,
    })
}

/// The closest known unit symbol to a misspelt one.
pub fn suggest_unit(symbol: &str) -> Option<String> {
    let names = unit_names();
    crate::library::closest(symbol, &names).map(str::to_string)
}

/// Every unit symbol (without prefixes), for completion and docs.
pub fn unit_names() -> Vec<&'static str> {
    BASE.iter().map(|u| u.0).collect()
}

/// A dimension in words, e.g. "energy per mass" or "power per area".
pub fn describe_dim(dim: Dim) -> String {
    if dim.is_dimensionless() {
        "dimensionless".into()
    } else if dim == Dim::LENGTH {
        "length".into()
    } else if dim == Dim::TEMPERATURE {
        "temperature".into()
    } else {
        dim.si_unit()
    }
}

impl Unit {
    fn compound(symbol: String, factor: f64, dim: Dim) -> Unit {
        Unit { symbol, factor, offset: 0.0, dim, kind: Kind::Plain }
    }

    /// Product of two units.
    pub fn mul(&self, other: &Unit) -> Unit {
        Unit::compound(format!("{}*{}", self.symbol, other.symbol), self.factor * other.factor, self.dim * other.dim)
    }

    /// Quotient of two units.
    pub fn div(&self, other: &Unit) -> Unit {
        let den = if other.symbol.contains(['*', '/']) { format!("({})", other.symbol) } else { other.symbol.clone() };
        Unit::compound(format!("{}/{den}", self.symbol), self.factor / other.factor, self.dim / other.dim)
    }

    /// Integer power.
    pub fn powi(&self, n: i32) -> Unit {
        Unit::compound(format!("{}^{n}", self.symbol), self.factor.powi(n), self.dim.powi(n))
    }

    /// A number written in this unit, as a quantity.
    pub fn to_si(&self, x: f64) -> Quantity {
        let x = if self.symbol == "wb" { x / (1.0 - x) } else { x };
        Quantity::new(x * self.factor + self.offset, self.dim, self.kind)
    }

    /// A quantity's magnitude in this unit.
    pub fn from_si(&self, q: &Quantity) -> Result<f64, UnitError> {
        if q.dim != self.dim {
            return Err(UnitError {
                message: format!("cannot show {} in {}", describe_dim(q.dim), self.symbol),
                hints: vec![],
            });
        }
        let offset = if q.kind == Kind::AbsoluteTemperature { self.offset } else { 0.0 };
        let x = (q.si - offset) / self.factor;
        Ok(if self.symbol == "wb" { x / (1.0 + x) } else { x })
    }
}

/// Format a quantity with four significant figures, in `unit` or its SI unit.
pub fn format_quantity(q: &Quantity, unit: Option<&Unit>) -> String {
    let default = match q.kind {
        Kind::AbsoluteTemperature => lookup_unit("degC"),
        Kind::Moisture => lookup_unit("db"),
        _ => None,
    };
    match unit.or(default.as_ref()) {
        Some(u) => match u.from_si(q) {
            Ok(x) => format!("{} {}", sig4(x), u.symbol),
            Err(_) => format!("{} {}", sig4(q.si), q.dim.si_unit()),
        },
        None => format!("{} {}", sig4(q.si), q.dim.si_unit()).trim_end().to_string(),
    }
}

fn sig4(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let digits = (3 - x.abs().log10().floor() as i32).max(0) as usize;
    let s = format!("{x:.digits$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}
