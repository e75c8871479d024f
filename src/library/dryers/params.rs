//! Parameter lists of the dryer built-ins (names, units for docs, defaults).

use crate::library::{opt, req, Param};

const PRODUCT: Param = req(
    "product",
    "wet_product",
    "the product, from wet_product(...)",
);
const AIR: Param = req(
    "air",
    "air",
    "fresh air drawn into the heater (an `air` record)",
);
const T_SUPPLY: Param = req("T_supply", "degC", "air temperature after the heater");
const RECIRCULATED: Param = opt(
    "recirculated",
    "%",
    "0 %",
    "fraction of the exhaust returned to the heater, 0 to 95 %",
);
const H: Param = req(
    "h",
    "W/(m^2*K)",
    "heat-transfer coefficient air to product surface (e.g. from h_tray_parallel)",
);
const LEWIS: Param = opt(
    "lewis",
    "-",
    "from the supply air",
    "Lewis number alpha/D of the air; default from the supply air's transport properties (about 0.85)",
);
const FAN_PRESSURE: Param = opt(
    "fan_pressure",
    "Pa",
    "0 Pa",
    "fan total pressure rise (ducts, heater, product, filters)",
);
const FAN_EFFICIENCY: Param = opt(
    "fan_efficiency",
    "%",
    "60 %",
    "overall fan and motor efficiency, above 0 and at most 100 %",
);
const AMBIENT: Param = opt(
    "ambient",
    "degC",
    "the fresh-air temperature",
    "temperature around the dryer, for wall losses",
);
const MAX_TIME: Param = opt(
    "max_time",
    "h",
    "100 h",
    "give up if the load is not dry after this long",
);
const T_PRODUCT: Param = opt(
    "T_product",
    "degC",
    "the fresh-air temperature",
    "product temperature at the start (batch) or at the feed (continuous)",
);

/// wet_product(...)
pub const WET_PRODUCT: &[Param] = &[
    opt(
        "cp_solid",
        "J/(kg*K)",
        "from `material`",
        "specific heat of the dry solid",
    ),
    opt(
        "X_critical",
        "db",
        "from `material`",
        "critical moisture content: the constant-rate period ends here",
    ),
    opt(
        "X_eq",
        "db or isotherm",
        "0 db, or the material's isotherm",
        "equilibrium moisture content: a constant, or an isotherm (isotherm, material or isotherm fit record) evaluated at the local air temperature and relative humidity",
    ),
    opt(
        "exponent",
        "-",
        "1",
        "falling-rate exponent n: rate = constant rate x ((X - X_eq)/(X_critical - X_eq))^n; 1 is the linear falling rate",
    ),
    opt(
        "T_max",
        "degC",
        "from `material`, else none",
        "maximum product temperature; designs above it are warned",
    ),
    opt(
        "material",
        "material",
        "none",
        "a material record (sorption family) supplying cp_solid, X_critical, the isotherm and T_max; arguments given here win",
    ),
];

/// belt_zone(...)
pub const BELT_ZONE: &[Param] = &[
    AIR,
    T_SUPPLY,
    req("air_flow", "kg/s", "dry-air mass flow along the zone"),
    req("h", "W/(m^2*K)", "heat-transfer coefficient air to product"),
    opt(
        "length",
        "m",
        "solved",
        "zone length; leave it out on the last zone to solve for the target moisture",
    ),
    opt(
        "flow",
        "text",
        "\"cocurrent\"",
        "\"cocurrent\" (air moves with the product) or \"countercurrent\"",
    ),
    RECIRCULATED,
    LEWIS,
    opt(
        "wall_loss",
        "W/(m*K)",
        "0 W/(m*K)",
        "wall loss conductance per metre of zone",
    ),
    FAN_PRESSURE,
    FAN_EFFICIENCY,
];

/// belt_dryer(...)
pub const BELT_DRYER: &[Param] = &[
    PRODUCT,
    req(
        "zones",
        "list",
        "the zones in the order the product meets them, from belt_zone(...)",
    ),
    req("throughput", "kg/h", "dry-solid mass flow"),
    req("width", "m", "belt width"),
    req("load", "kg/m^2", "dry solid per m^2 of belt"),
    req("X_in", "db", "feed moisture content"),
    req("X_out", "db", "target moisture content at discharge"),
    T_PRODUCT,
    opt(
        "area_ratio",
        "-",
        "1",
        "exchange area per m^2 of belt (1 for air over a flat layer)",
    ),
    AMBIENT,
];

/// tray_dryer(...)
pub const TRAY_DRYER: &[Param] = &[
    PRODUCT,
    req(
        "trays",
        "-",
        "number of trays the air crosses in series (1 to 200)",
    ),
    req("tray_area", "m^2", "exposed product area per tray"),
    req("load", "kg/m^2", "dry solid per m^2 of tray"),
    req("X_initial", "db", "moisture content at loading"),
    req("X_final", "db", "moisture content every tray must reach"),
    AIR,
    T_SUPPLY,
    req("air_flow", "kg/s", "dry-air mass flow over the trays"),
    H,
    RECIRCULATED,
    T_PRODUCT,
    LEWIS,
    opt(
        "wall_loss",
        "W/K",
        "0 W/K",
        "wall loss conductance of the cabinet",
    ),
    AMBIENT,
    FAN_PRESSURE,
    FAN_EFFICIENCY,
    MAX_TIME,
];

/// deep_bed(...)
pub const DEEP_BED: &[Param] = &[
    PRODUCT,
    req("depth", "m", "bed depth in the air direction"),
    req("bed_area", "m^2", "bed cross-section"),
    req(
        "particle_diameter",
        "mm",
        "particle diameter (equivalent sphere)",
    ),
    req("voidage", "-", "bed voidage, 0.3 to 0.6 typical"),
    req("bulk_density", "kg/m^3", "dry solid per m^3 of bed"),
    req("X_initial", "db", "moisture content at loading"),
    req("X_final", "db", "moisture content every layer must reach"),
    AIR,
    T_SUPPLY,
    req(
        "velocity",
        "m/s",
        "superficial (empty-bed) air velocity at the supply state",
    ),
    opt(
        "layers",
        "-",
        "10",
        "number of layers the bed is cut into (2 to 200)",
    ),
    opt(
        "h",
        "W/(m^2*K)",
        "Wakao-Kaguei",
        "fluid-to-particle coefficient; default from h_packed_bed's correlation at the supply air",
    ),
    RECIRCULATED,
    T_PRODUCT,
    LEWIS,
    opt(
        "wall_loss",
        "W/K",
        "0 W/K",
        "wall loss conductance of the bed housing",
    ),
    AMBIENT,
    opt(
        "extra_pressure",
        "Pa",
        "0 Pa",
        "pressure drop outside the bed (plenum, heater, ducts) added to the Ergun drop",
    ),
    FAN_EFFICIENCY,
    MAX_TIME,
];

/// rotary_dryer(...)
pub const ROTARY_DRYER: &[Param] = &[
    PRODUCT,
    req("throughput", "kg/h", "dry-solid mass flow"),
    req("X_in", "db", "feed moisture content"),
    req("X_out", "db", "discharge moisture content"),
    req("T_solid_in", "degC", "solids temperature at the feed"),
    req("T_solid_out", "degC", "solids temperature at discharge"),
    req("gas", "air", "hot gas entering the drum (an `air` record)"),
    req(
        "T_gas_out",
        "degC",
        "gas temperature leaving the drum (a design choice)",
    ),
    req("diameter", "m", "drum diameter"),
    req("slope", "-", "drum slope, m/m (e.g. 0.04 or 4 %)"),
    req(
        "speed",
        "1/min",
        "drum speed in revolutions per time, e.g. 4 min^-1",
    ),
    req(
        "particle_diameter",
        "um",
        "mean particle diameter (for the Friedman-Marshall gas term)",
    ),
    opt(
        "flow",
        "text",
        "\"countercurrent\"",
        "\"countercurrent\" or \"cocurrent\" gas",
    ),
    opt(
        "loss_fraction",
        "%",
        "0 %",
        "fraction of the heat the gas gives up that is lost through the shell, 0 to 50 %",
    ),
    opt(
        "ambient",
        "degC",
        "20 degC",
        "temperature of the air drawn into the heater, for the heater duty",
    ),
    FAN_PRESSURE,
    FAN_EFFICIENCY,
];
