//! The physics, typed with uom. Engine code never sees syntax, strings or
//! dynamic units: it takes and returns uom quantities and plain structs.

pub mod air;
pub mod dryers;
pub mod minimise;
pub mod solve;
pub mod stats;
pub mod transfer;
pub mod transport;
