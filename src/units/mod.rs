//! Runtime quantities for the language: SI magnitude, dimension vector and kind.
//!
//! The engine never sees these; library functions convert them to uom
//! quantities at the call boundary.

mod dim;
mod kind;
mod quantity;
mod table;

pub use dim::Dim;
pub use kind::Kind;
pub use quantity::{Quantity, UnitError};
pub use table::{describe_dim, format_quantity, lookup_unit, suggest_unit, unit_names, Unit};
