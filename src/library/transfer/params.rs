//! Parameter lists of the transfer built-ins (names, units for docs, defaults).

use crate::library::{opt, req, Param};

const AIR: Param = req("air", "air", "the humid air (an `air` record)");
const VELOCITY: Param = req(
    "velocity",
    "m/s",
    "air velocity approaching the body or surface",
);
const SURFACE: Param = opt(
    "surface",
    "degC",
    "none",
    "surface temperature; properties then at the film temperature (T + Ts)/2",
);

pub const MASS_VELOCITY: &[Param] = &[
    AIR,
    opt("velocity", "m/s", "none", "mean air velocity"),
    opt(
        "mass_flow",
        "kg/s",
        "none",
        "mass flow of humid air through `area`",
    ),
    opt(
        "volume_flow",
        "m^3/s",
        "none",
        "volume flow of humid air through `area`",
    ),
    opt("area", "m^2", "none", "free-flow (duct or channel) area"),
];

pub const AIR_VELOCITY: &[Param] = &[
    AIR,
    opt("G", "kg/(m^2*s)", "none", "mass velocity"),
    opt(
        "mass_flow",
        "kg/s",
        "none",
        "mass flow of humid air through `area`",
    ),
    opt(
        "volume_flow",
        "m^3/s",
        "none",
        "volume flow of humid air through `area`",
    ),
    opt("area", "m^2", "none", "free-flow (duct or channel) area"),
];

pub const TRAY: &[Param] = &[
    opt("G", "kg/(m^2*h)", "none", "mass velocity of the humid air"),
    opt(
        "air",
        "air",
        "none",
        "the air, to compute G with `velocity` and check the temperature range",
    ),
    opt("velocity", "m/s", "none", "air velocity over the surface"),
];

pub const FLAT_PLATE: &[Param] = &[
    AIR,
    VELOCITY,
    req("length", "m", "plate length in the flow direction"),
    SURFACE,
    opt(
        "regime",
        "text",
        "\"mixed\"",
        "\"laminar\", \"turbulent\" (from the leading edge) or \"mixed\"",
    ),
];

pub const BODY: &[Param] = &[
    AIR,
    VELOCITY,
    req("diameter", "m", "sphere, cylinder or particle diameter"),
    SURFACE,
];

pub const JET_ROUND: &[Param] = &[
    AIR,
    req("velocity", "m/s", "nozzle exit velocity"),
    req("diameter", "m", "nozzle diameter D"),
    req("distance", "m", "nozzle-to-surface distance H"),
    req(
        "radius",
        "m",
        "radius of the averaging circle around the stagnation point",
    ),
];

pub const JET_ARRAY_ROUND: &[Param] = &[
    AIR,
    req("velocity", "m/s", "nozzle exit velocity"),
    req("diameter", "m", "nozzle diameter D"),
    req("distance", "m", "nozzle-to-surface distance H"),
    req(
        "pitch",
        "m",
        "centre-to-centre spacing of a square nozzle array",
    ),
];

pub const JET_SLOT: &[Param] = &[
    AIR,
    req("velocity", "m/s", "slot exit velocity"),
    req("width", "m", "slot width B (S = 2B)"),
    req("distance", "m", "nozzle-to-surface distance H"),
    req(
        "half_width",
        "m",
        "distance x either side of the slot centreline to average over",
    ),
];

pub const JET_ARRAY_SLOT: &[Param] = &[
    AIR,
    req("velocity", "m/s", "slot exit velocity"),
    req("width", "m", "slot width B (S = 2B)"),
    req("distance", "m", "nozzle-to-surface distance H"),
    req("pitch", "m", "centre-to-centre spacing of the slots"),
];

pub const NU: &[Param] = &[
    req("Re", "-", "Reynolds number"),
    req("Pr", "-", "Prandtl number"),
];

pub const NU_PLATE: &[Param] = &[
    req("Re", "-", "Reynolds number on the plate length"),
    req("Pr", "-", "Prandtl number"),
    opt(
        "regime",
        "text",
        "\"mixed\"",
        "\"laminar\", \"turbulent\" or \"mixed\"",
    ),
];

pub const REYNOLDS: &[Param] = &[
    AIR,
    VELOCITY,
    req("length", "m", "characteristic length of the correlation"),
    SURFACE,
];

pub const NUSSELT: &[Param] = &[
    req("h", "W/(m^2*K)", "heat-transfer coefficient"),
    req("length", "m", "characteristic length"),
    AIR,
];

pub const SHERWOOD: &[Param] = &[
    req(
        "kc",
        "m/s",
        "mass-transfer coefficient, concentration basis",
    ),
    req("length", "m", "characteristic length"),
    AIR,
];

pub const COLBURN: &[Param] = &[
    req(
        "h",
        "W/(m^2*K)",
        "heat-transfer coefficient for the same flow",
    ),
    AIR,
    SURFACE,
];

pub const WET_SURFACE: &[Param] = &[
    AIR,
    req(
        "h",
        "W/(m^2*K)",
        "film coefficient between the air and the wet surface",
    ),
    opt(
        "emissivity",
        "-",
        "0.92 when `wall` is given",
        "emissivity of the wet surface, 0..1",
    ),
    opt(
        "wall",
        "degC",
        "none",
        "temperature of radiating surroundings",
    ),
    opt(
        "h_under",
        "W/(m^2*K)",
        "h",
        "film coefficient under the tray (enables conduction through the bottom)",
    ),
    opt("tray_thickness", "m", "none", "thickness of the tray sheet"),
    opt(
        "tray_k",
        "W/(m*K)",
        "none",
        "thermal conductivity of the tray sheet",
    ),
    opt(
        "bed_thickness",
        "m",
        "none",
        "depth of the wet solid above the tray bottom",
    ),
    opt(
        "bed_k",
        "W/(m*K)",
        "none",
        "thermal conductivity of the wet solid",
    ),
];

pub const CONSTANT_RATE_TIME: &[Param] = &[
    req(
        "load",
        "kg/m^2",
        "dry-solid mass per exposed drying area, Ls/A",
    ),
    req("X1", "db", "moisture at the start, dry basis"),
    req(
        "X2",
        "db",
        "moisture at the end, dry basis (not below the critical moisture)",
    ),
    req("Rc", "kg/(m^2*h)", "constant drying rate"),
];
