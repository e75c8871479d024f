//! The physics, typed with uom. Engine code never sees syntax, strings or
//! dynamic units: it takes and returns uom quantities and plain structs.

pub mod air;
pub mod diffusion;
pub mod dryers;
pub mod fit;
mod hermite;
pub mod integrate;
pub mod kinetics;
pub mod minimise;
pub mod psychrometric_chart;
pub mod solve;
pub mod sorption;
pub mod stats;
pub mod thin_layer;
pub mod transfer;
pub mod transport;
mod transport_table;
