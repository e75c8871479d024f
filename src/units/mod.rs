//! Runtime quantities for the language: SI magnitude, dimension vector and kind.
//!
//! The engine never sees these; library functions convert them to uom
//! quantities at the call boundary.
//!
//! | file | role |
//! |---|---|
//! | `dim.rs` | dimension vectors over the SI base dimensions |
//! | `kind.rs` | kinds (absolute temperature, moisture, ...) and their combination rules |
//! | `quantity.rs` | `Quantity` and its checked arithmetic, `UnitError` |
//! | `names.rs` | named dimensions in words with their SI unit (`describe_dim`) |
//! | `catalog.rs` | named units and SI prefixes, factors from uom |
//! | `table.rs` | `Unit`: lookup, compound units, conversion to and from SI |
//! | `parse.rs` | unit expressions as text (`W/(m^2*K)`) |
//! | `format.rs` | showing quantities with fixed significant figures |
//! | `memo.rs` | per-thread memory of units already looked up or parsed |
//!
//! The rules are written up for users in `docs/units.md`.

mod catalog;
mod dim;
mod format;
mod kind;
mod memo;
mod names;
mod parse;
mod quantity;
mod table;

pub use catalog::{base_units, BaseUnit, Basis, Prefix, Scale, PREFIXES};
pub use dim::Dim;
pub use format::{
    default_unit, format_number, format_quantity, format_quantity_sig, push_int, push_number,
    push_quantity_sig, round_scaled, DISPLAY_SIG_FIGS,
};
pub use kind::{add_kind, compare_kinds, div_kind, mul_kind, sub_kind, Kind, KindClash};
pub use names::{describe_dim_with_si, named_dim, si_symbol, NamedDim, NAMED_DIMS};
pub use parse::{parse_unit, unknown_unit};
pub use quantity::{Quantity, UnitError, EQUAL_REL_TOL};
pub use table::{
    describe_dim, dry_from_wet, lookup_unit, suggest_unit, unit_names, wet_from_dry, Unit, UnitData,
};
