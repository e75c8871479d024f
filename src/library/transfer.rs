//! Built-ins for wet-surface heat and mass transfer: film coefficients, the
//! dimensionless groups, the Chilton-Colburn analogy, the wet-surface
//! temperature and the constant-rate drying period.
//!
//! Each built-in checks dimensions and signs here, converts to uom and calls
//! `engine::transfer`; range warnings from a correlation become call warnings.
//! Air arguments are `air` records; their properties (density, viscosity,
//! conductivity, heat capacity, diffusivity) come from `engine::transport`.

use std::any::Any;

use uom::si::f64::{
    ArealMassDensity, DiffusionCoefficient, HeatTransfer, Length, MassDensity, MassFlux, MassRate,
    ThermalConductivity, ThermodynamicTemperature, Velocity, VolumeRate,
};

use super::{param_at, Args, Builtin};
use crate::diag::{Diagnostic, Span};
use crate::engine::air::AirState;
use crate::engine::transfer::{
    self as engine, Correlated, ExtraHeat, Layer, PlateFlow, Radiation, TransferError, TrayBottom,
    WetSurface,
};
use crate::engine::transport::Transport;
use crate::library::air::AirPayload;
use crate::units::{parse_unit, Dim, Kind, Quantity};
use crate::value::{Payload, Record, Value};

mod params;
use params::*;

// Positions of the parameters that the tray built-ins, `wet_surface` and
// `constant_rate_time` read at every call, found at compile time
// ([`param_at`]): a what-if study calls them at every point, and a position
// spares the search of the list by name. (A test checks each against the
// built-in's own list in the registry.)
const TRAY_G: usize = param_at(TRAY, "G");
const TRAY_AIR: usize = param_at(TRAY, "air");
const TRAY_VELOCITY: usize = param_at(TRAY, "velocity");
const WET_SURFACE_AIR: usize = param_at(WET_SURFACE, "air");
const WET_SURFACE_H: usize = param_at(WET_SURFACE, "h");
const CRT_LOAD: usize = param_at(CONSTANT_RATE_TIME, "load");
const CRT_X1: usize = param_at(CONSTANT_RATE_TIME, "X1");
const CRT_X2: usize = param_at(CONSTANT_RATE_TIME, "X2");
const CRT_RC: usize = param_at(CONSTANT_RATE_TIME, "Rc");

// ---------------------------------------------------------------------------
// Registry
// ---------------------------------------------------------------------------

/// The transfer family.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "mass_velocity",
        family: "transfer",
        params: MASS_VELOCITY,
        returns: "mass velocity G, kg/(m^2*s)",
        doc: "Mass velocity G of humid air (kg of air-vapour mixture per free-flow area and time): rho*velocity, or a mass flow or volume flow over a free-flow (duct) area. The classic tray correlations are written in G.",
        method: "G = rho v = m_dot / A = rho Q / A, rho the humid-air density of the air record",
        source: "definition; Geankoplis, Transport Processes and Separation Process Principles, section 9.6",
        validity: "velocity, flows and area positive",
        example: "mass_velocity(air(T: 70 degC, rh: 4 %), velocity: 3 m/s)",
        func: mass_velocity,
    },
    Builtin {
        name: "air_velocity",
        family: "transfer",
        params: AIR_VELOCITY,
        returns: "velocity, m/s",
        doc: "Mean air velocity from a mass velocity G, or from a mass or volume flow through a free-flow area.",
        method: "v = G / rho = m_dot / (rho A) = Q / A",
        source: "definition",
        validity: "G, flows and area positive",
        example: "air_velocity(air(T: 70 degC, rh: 4 %), volume_flow: 2 m^3/s, area: 0.6 m^2)",
        func: air_velocity,
    },
    Builtin {
        name: "h_tray_parallel",
        family: "transfer",
        params: TRAY,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Film coefficient for air flowing parallel to a wet tray surface: h = 0.0204 G^0.8 (G in kg/(m^2*h), h in W/(m^2*K)). Give G, or an air record and its velocity. Warns outside G 2450-29300 kg/(m^2*h), air 45-150 degC, velocity 0.61-7.6 m/s.",
        method: "empirical power law in mass velocity from tray-drying measurements",
        source: "Geankoplis, Transport Processes and Separation Process Principles, section 9.6",
        validity: "G 2450-29300 kg/(m^2*h); air 45-150 degC; velocity 0.61-7.6 m/s",
        example: "h_tray_parallel(air: air(T: 70 degC, rh: 4 %), velocity: 3 m/s)",
        func: h_tray_parallel,
    },
    Builtin {
        name: "h_tray_impinging",
        family: "transfer",
        params: TRAY,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Film coefficient for air flowing perpendicular to (impinging on) a wet surface: h = 1.17 G^0.37 (G in kg/(m^2*h), h in W/(m^2*K)). Give G, or an air record and its velocity.",
        method: "empirical power law in mass velocity from tray-drying measurements",
        source: "Geankoplis, Transport Processes and Separation Process Principles, section 9.6",
        validity: "G 3900-19500 kg/(m^2*h); velocity 0.9-4.6 m/s",
        example: "h_tray_impinging(G: 10000 kg/(m^2*h))",
        func: h_tray_impinging,
    },
    Builtin {
        name: "h_flat_plate",
        family: "transfer",
        params: FLAT_PLATE,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Mean film coefficient over a flat plate of length L in the flow direction. regime: \"laminar\" (0.664 Re^1/2 Pr^1/3), \"turbulent\" from the leading edge (0.037 Re^4/5 Pr^1/3) or \"mixed\" (transition at Re 5e5). Properties at the film temperature when `surface` is given, else at the air temperature.",
        method: "Nu = h L / k from the laminar (Pohlhausen) and turbulent flat-plate correlations",
        source: "Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, section 7.2",
        validity: "laminar Re < 5e5, Pr > 0.6; turbulent/mixed Re up to 1e8, Pr 0.6-60",
        example: "h_flat_plate(air(T: 70 degC, rh: 4 %), velocity: 3 m/s, length: 0.8 m, regime: \"turbulent\")",
        func: h_flat_plate,
    },
    Builtin {
        name: "h_sphere",
        family: "transfer",
        params: BODY,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Film coefficient of a single sphere (drop, granule) in an air stream: Ranz-Marshall Nu = 2 + 0.6 Re^1/2 Pr^1/3, Re on the diameter and the slip velocity.",
        method: "Ranz-Marshall correlation",
        source: "Ranz and Marshall, Chem. Eng. Prog. 48 (1952) 141-146, 173-180",
        validity: "Re 0-1000 (fitted to about 200), Pr 0.6-400",
        example: "h_sphere(air(T: 90 degC, rh: 5 %), velocity: 1.5 m/s, diameter: 3 mm)",
        func: h_sphere,
    },
    Builtin {
        name: "h_cylinder",
        family: "transfer",
        params: BODY,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Film coefficient of a long cylinder (rod, extrudate strand) in cross flow: Churchill-Bernstein.",
        method: "Churchill-Bernstein correlation",
        source: "Churchill and Bernstein, J. Heat Transfer 99 (1977) 300-306",
        validity: "Re*Pr >= 0.2",
        example: "h_cylinder(air(T: 90 degC, rh: 5 %), velocity: 2 m/s, diameter: 6 mm)",
        func: h_cylinder,
    },
    Builtin {
        name: "h_packed_bed",
        family: "transfer",
        params: BODY,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Fluid-to-particle film coefficient for air flowing through a packed bed of particles (through-circulation drying): Wakao-Kaguei Nu = 2 + 1.1 Pr^1/3 Re^0.6, Re on the particle diameter and the superficial (empty-bed) velocity.",
        method: "Wakao-Kaguei correlation",
        source: "Wakao, Kaguei and Funazkri, Chem. Eng. Sci. 34 (1979) 325-336",
        validity: "Re 15-8500",
        example: "h_packed_bed(air(T: 80 degC, rh: 5 %), velocity: 0.8 m/s, diameter: 5 mm)",
        func: h_packed_bed,
    },
    Builtin {
        name: "h_jet_round",
        family: "transfer",
        params: JET_ROUND,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Mean film coefficient under a single round nozzle, averaged over a circle of `radius` around the stagnation point; `distance` is nozzle to surface, `velocity` the exit velocity.",
        method: "Martin's single-round-nozzle correlation, Pr^0.42",
        source: "Martin, Advances in Heat Transfer 13 (1977) 1-60",
        validity: "Re 2000-400000, H/D 2-12, r/D 2.5-7.5",
        example: "h_jet_round(air(T: 120 degC, rh: 2 %), velocity: 30 m/s, diameter: 10 mm, distance: 50 mm, radius: 40 mm)",
        func: h_jet_round,
    },
    Builtin {
        name: "h_jet_round_array",
        family: "transfer",
        params: JET_ARRAY_ROUND,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Mean film coefficient under a square array of round nozzles at `pitch` (relative open area pi D^2/(4 pitch^2)).",
        method: "Martin's array-of-round-nozzles correlation, Pr^0.42",
        source: "Martin, Advances in Heat Transfer 13 (1977) 1-60",
        validity: "Re 2000-100000, H/D 2-12, open area 0.004-0.04",
        example: "h_jet_round_array(air(T: 120 degC, rh: 2 %), velocity: 30 m/s, diameter: 10 mm, distance: 50 mm, pitch: 70 mm)",
        func: h_jet_round_array,
    },
    Builtin {
        name: "h_jet_slot",
        family: "transfer",
        params: JET_SLOT,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Mean film coefficient under a single slot nozzle of `width`, averaged over `half_width` either side of the centreline.",
        method: "Martin's single-slot-nozzle correlation on S = 2 x width, Pr^0.42",
        source: "Martin, Advances in Heat Transfer 13 (1977) 1-60",
        validity: "Re 3000-90000, H/S 2-10, x/S 2-25 (S = 2 x slot width)",
        example: "h_jet_slot(air(T: 120 degC, rh: 2 %), velocity: 25 m/s, width: 5 mm, distance: 40 mm, half_width: 60 mm)",
        func: h_jet_slot,
    },
    Builtin {
        name: "h_jet_slot_array",
        family: "transfer",
        params: JET_ARRAY_SLOT,
        returns: "heat-transfer coefficient, W/(m^2*K)",
        doc: "Mean film coefficient under an array of slot nozzles of `width` at `pitch` (relative open area width/pitch).",
        method: "Martin's array-of-slot-nozzles correlation on S = 2 x width, Pr^0.42",
        source: "Martin, Advances in Heat Transfer 13 (1977) 1-60",
        validity: "Re 1500-40000, H/S 1-40, open area 0.008 to 2.5 times the optimum",
        example: "h_jet_slot_array(air(T: 120 degC, rh: 2 %), velocity: 25 m/s, width: 5 mm, distance: 40 mm, pitch: 100 mm)",
        func: h_jet_slot_array,
    },
    Builtin {
        name: "nu_flat_plate",
        family: "transfer",
        params: NU_PLATE,
        returns: "Nusselt number (plain)",
        doc: "Mean Nusselt number over a flat plate from Re and Pr; regime \"laminar\", \"turbulent\" or \"mixed\" (default).",
        method: "laminar (Pohlhausen) and turbulent flat-plate correlations",
        source: "Incropera and DeWitt, Fundamentals of Heat and Mass Transfer, section 7.2",
        validity: "laminar Re < 5e5, Pr > 0.6; turbulent/mixed Re up to 1e8, Pr 0.6-60",
        example: "nu_flat_plate(2e5, 0.71, regime: \"laminar\")",
        func: nu_flat_plate,
    },
    Builtin {
        name: "nu_sphere",
        family: "transfer",
        params: NU,
        returns: "Nusselt number (plain)",
        doc: "Ranz-Marshall Nusselt number of a sphere, 2 + 0.6 Re^1/2 Pr^1/3.",
        method: "Ranz-Marshall correlation",
        source: "Ranz and Marshall, Chem. Eng. Prog. 48 (1952) 141-146, 173-180",
        validity: "Re 0-1000, Pr 0.6-400",
        example: "nu_sphere(150, 0.71)",
        func: nu_sphere,
    },
    Builtin {
        name: "nu_cylinder",
        family: "transfer",
        params: NU,
        returns: "Nusselt number (plain)",
        doc: "Churchill-Bernstein Nusselt number of a cylinder in cross flow.",
        method: "Churchill-Bernstein correlation",
        source: "Churchill and Bernstein, J. Heat Transfer 99 (1977) 300-306",
        validity: "Re*Pr >= 0.2",
        example: "nu_cylinder(7000, 0.71)",
        func: nu_cylinder,
    },
    Builtin {
        name: "nu_packed_bed",
        family: "transfer",
        params: NU,
        returns: "Nusselt number (plain)",
        doc: "Wakao-Kaguei fluid-to-particle Nusselt number in a packed bed, 2 + 1.1 Pr^1/3 Re^0.6.",
        method: "Wakao-Kaguei correlation",
        source: "Wakao, Kaguei and Funazkri, Chem. Eng. Sci. 34 (1979) 325-336",
        validity: "Re 15-8500",
        example: "nu_packed_bed(300, 0.71)",
        func: nu_packed_bed,
    },
    Builtin {
        name: "reynolds",
        family: "transfer",
        params: REYNOLDS,
        returns: "Reynolds number (plain)",
        doc: "Reynolds number rho v L / mu of humid air at the air (or film, with `surface`) temperature.",
        method: "definition; humid-air density and viscosity from the air engine",
        source: "definition (Incropera and DeWitt, ch. 6)",
        validity: "velocity and length positive",
        example: "reynolds(air(T: 70 degC, rh: 4 %), velocity: 3 m/s, length: 0.8 m)",
        func: reynolds,
    },
    Builtin {
        name: "nusselt",
        family: "transfer",
        params: NUSSELT,
        returns: "Nusselt number (plain)",
        doc: "Nusselt number h L / k, k the thermal conductivity of the humid air.",
        method: "definition",
        source: "definition (Incropera and DeWitt, ch. 6)",
        validity: "h and length positive",
        example: "nusselt(25 W/(m^2*K), length: 0.8 m, air: air(T: 70 degC, rh: 4 %))",
        func: nusselt,
    },
    Builtin {
        name: "sherwood",
        family: "transfer",
        params: SHERWOOD,
        returns: "Sherwood number (plain)",
        doc: "Sherwood number k_c L / D, D the diffusivity of water vapour in the air.",
        method: "definition",
        source: "definition (Incropera and DeWitt, ch. 6)",
        validity: "k_c and length positive",
        example: "sherwood(0.03 m/s, length: 0.8 m, air: air(T: 70 degC, rh: 4 %))",
        func: sherwood,
    },
    Builtin {
        name: "colburn_kc",
        family: "transfer",
        params: COLBURN,
        returns: "mass-transfer coefficient k_c, m/s",
        doc: "Mass-transfer coefficient on a concentration basis from a heat-transfer coefficient for the same flow: k_c = h / (rho cp) (Pr/Sc)^(2/3).",
        method: "Chilton-Colburn analogy j_H = j_D",
        source: "Chilton and Colburn, Ind. Eng. Chem. 26 (1934) 1183-1187",
        validity: "Pr 0.6-60, Sc 0.6-3000",
        example: "colburn_kc(25 W/(m^2*K), air(T: 70 degC, rh: 4 %))",
        func: colburn_kc,
    },
    Builtin {
        name: "colburn_ky",
        family: "transfer",
        params: COLBURN,
        returns: "mass-transfer coefficient k_Y, kg/(m^2*s) per unit humidity ratio",
        doc: "Mass-transfer coefficient on a humidity-ratio basis: k_Y = h / c_s (Pr/Sc)^(2/3), c_s the humid heat per kg dry air; water flux = k_Y (w_surface - w_air).",
        method: "Chilton-Colburn analogy j_H = j_D",
        source: "Chilton and Colburn, Ind. Eng. Chem. 26 (1934) 1183-1187",
        validity: "Pr 0.6-60, Sc 0.6-3000",
        example: "colburn_ky(25 W/(m^2*K), air(T: 70 degC, rh: 4 %))",
        func: colburn_ky,
    },
    Builtin {
        name: "wet_surface",
        family: "transfer",
        params: WET_SURFACE,
        returns: "wet_surface record: Ts, w_s, Rc, q, q_conv, q_rad, q_cond, latent, ky, h",
        doc: "Temperature and constant drying rate of a freely wet surface under air with film coefficient h, solving the coupled heat and mass balance exactly (Chilton-Colburn k_Y, saturation pressure at Ts). Optional radiation from surroundings at `wall` (emissivity 0..1) and conduction from the air under the tray through the tray bottom (h_under in series with tray and bed layers) lift the surface above the wet-bulb.",
        method: "h(T-Ts) + eps sigma (Tw^4-Ts^4) + U(T-Ts) = k_Y (w_s(Ts)-w) lambda(Ts), solved by Newton's method with the exact slope (Brent's method in a bracket where Newton's cannot vouch for the root)",
        source: "Geankoplis, Transport Processes and Separation Process Principles, section 9.6; Chilton and Colburn (1934)",
        validity: "surface above 0 degC and below boiling; air must be able to take up water",
        example: "wet_surface(air(T: 70 degC, rh: 4 %), h: 25 W/(m^2*K))",
        func: wet_surface,
    },
    Builtin {
        name: "constant_rate_time",
        family: "transfer",
        params: CONSTANT_RATE_TIME,
        returns: "time, s",
        doc: "Duration of the constant-rate period, t = (Ls/A)(X1 - X2)/Rc, from the dry-solid load per exposed area, the moisture span on the dry basis and the constant drying rate.",
        method: "integration of -dX/dt = Rc A / Ls at constant Rc",
        source: "Geankoplis, Transport Processes and Separation Process Principles, section 9.5; McCabe, Smith and Harriott, Unit Operations of Chemical Engineering, ch. 24",
        validity: "X1 > X2 >= 0 and both at or above the critical moisture (the constant-rate period only)",
        example: "constant_rate_time(load: 20 kg/m^2, X1: 1.6 db, X2: 0.5 db, Rc: 1.8 kg/(m^2*h))",
        func: constant_rate_time,
    },
];

// ---------------------------------------------------------------------------
// Argument helpers
// ---------------------------------------------------------------------------

/// The parameters that read nothing of the record given to them but its
/// engine state ([`crate::library::Builtin::reads_only_payload`]), as
/// (built-in, parameter). Each built-in here reads its `air` argument only
/// through [`air_arg`] (directly, or by `opt_air`, `tray_inputs`, `body_flow`,
/// `slot_flow`, `colburn_inputs`): the `AirState` payload (its `T`, `w` and
/// `p` fields only for a record without one, which a record made for such a
/// parameter never is), and otherwise only whether and where the argument
/// was given; none keeps the record or returns it.
pub const PAYLOAD_ONLY: &[(&str, &str)] = &[
    ("mass_velocity", "air"),
    ("air_velocity", "air"),
    ("h_tray_parallel", "air"),
    ("h_tray_impinging", "air"),
    ("h_flat_plate", "air"),
    ("h_sphere", "air"),
    ("h_cylinder", "air"),
    ("h_packed_bed", "air"),
    ("h_jet_round", "air"),
    ("h_jet_round_array", "air"),
    ("h_jet_slot", "air"),
    ("h_jet_slot_array", "air"),
    ("reynolds", "air"),
    ("nusselt", "air"),
    ("sherwood", "air"),
    ("colburn_kc", "air"),
    ("colburn_ky", "air"),
    ("wet_surface", "air"),
];

/// The humid-air state in an `air` record: its typed payload, else its
/// `T`, `w` and `p` fields.
fn air_arg(args: &mut Args, name: &str) -> Result<AirState, Diagnostic> {
    air_arg_at(args, args.position(name))
}

/// [`air_arg`] for the parameter at `index`.
fn air_arg_at(args: &mut Args, index: usize) -> Result<AirState, Diagnostic> {
    if let Some(state) = args.take_payload_at(index, "air", |p: &AirPayload| p.0) {
        return Ok(state);
    }
    let span = args.span_of_at(index);
    let record = args.record_at(index, "air")?;
    if let Some(state) = record.payload::<AirPayload>() {
        return Ok(state.0);
    }
    air_from_fields(&record).ok_or_else(|| {
        Diagnostic::error(span, "this air record has no T, w and p to read")
            .with_hint("build it with air(T: ..., rh: ...)")
    })
}

fn air_from_fields(record: &Record) -> Option<AirState> {
    let field = |n: &str| match record.get(n) {
        Some(Value::Quantity(q, _)) => Some(q.si),
        _ => None,
    };
    let t =
        ThermodynamicTemperature::new::<uom::si::thermodynamic_temperature::kelvin>(field("T")?);
    let p = uom::si::f64::Pressure::new::<uom::si::pressure::pascal>(field("p")?);
    AirState::from_w(t, field("w")?, p).ok()
}

/// [`air_arg`] for an optional parameter at `index`.
fn opt_air_at(args: &mut Args, index: usize) -> Result<Option<AirState>, Diagnostic> {
    if args.has_at(index) {
        air_arg_at(args, index).map(Some)
    } else {
        Ok(None)
    }
}

/// A required quantity of `dim` that must be positive and finite; SI magnitude.
/// (The argument is looked up once: taken, then checked with its own span,
/// as [`Args::quantity`] checks it.)
fn positive(args: &mut Args, name: &str, dim: Dim) -> Result<f64, Diagnostic> {
    positive_at(args, args.position(name), dim)
}

/// [`positive`] for the parameter at `index`: a positive finite quantity
/// of `dim` taken in place ([`Args::take_si_if`]), anything else the
/// general way ([`positive_general`]), which reports it.
#[inline]
fn positive_at(args: &mut Args, index: usize, dim: Dim) -> Result<f64, Diagnostic> {
    match args.take_si_if(index, dim, |q| is_positive(q.si)) {
        Some(si) => Ok(si),
        None => positive_general(args, index, dim),
    }
}

/// [`positive_at`] taking the argument and checking it step by step.
#[inline(never)]
fn positive_general(args: &mut Args, index: usize, dim: Dim) -> Result<f64, Diagnostic> {
    let (q, span) = args.required_spanned_at(index, dim)?;
    check_positive(span, args.name_at(index), q)
}

fn opt_positive(args: &mut Args, name: &str, dim: Dim) -> Result<Option<f64>, Diagnostic> {
    opt_positive_at(args, args.position(name), dim)
}

/// [`opt_positive`] for the parameter at `index`: nothing given, or a
/// positive finite quantity of `dim`, read without a search or a copy of
/// the argument; anything else the general way, which reports it.
#[inline]
fn opt_positive_at(args: &mut Args, index: usize, dim: Dim) -> Result<Option<f64>, Diagnostic> {
    if !args.has_at(index) {
        return Ok(None);
    }
    match args.take_si_if(index, dim, |q| is_positive(q.si)) {
        Some(si) => Ok(Some(si)),
        None => opt_positive_general(args, index, dim),
    }
}

/// [`opt_positive_at`] taking the argument and checking it step by step.
#[inline(never)]
fn opt_positive_general(
    args: &mut Args,
    index: usize,
    dim: Dim,
) -> Result<Option<f64>, Diagnostic> {
    match args.opt_spanned_at(index, dim)? {
        Some((q, span)) => check_positive(span, args.name_at(index), q).map(Some),
        None => Ok(None),
    }
}

/// What [`check_positive`] accepts: a positive finite magnitude.
#[inline]
fn is_positive(si: f64) -> bool {
    si > 0.0 && si.is_finite()
}

#[inline]
fn check_positive(span: Span, name: &str, q: Quantity) -> Result<f64, Diagnostic> {
    if is_positive(q.si) {
        Ok(q.si)
    } else {
        Err(not_positive(span, name, q))
    }
}

#[cold]
fn not_positive(span: Span, name: &str, q: Quantity) -> Diagnostic {
    let unit = q.dim.si_unit();
    Diagnostic::error(
        span,
        format!("`{name}` must be positive, got {} {unit}", q.si),
    )
}

/// A plain (dimensionless) number.
fn plain(args: &mut Args, name: &str) -> Result<f64, Diagnostic> {
    let span = args.span_of(name);
    let q = args.quantity(name, Dim::NONE)?;
    if q.si.is_finite() {
        Ok(q.si)
    } else {
        Err(Diagnostic::error(
            span,
            format!("`{name}` must be a finite number"),
        ))
    }
}

/// An optional absolute temperature, kelvin.
fn opt_temperature(args: &mut Args, name: &str) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of(name);
    match args.opt_quantity(name, Dim::TEMPERATURE)? {
        Some(q) if q.si > 0.0 && q.si.is_finite() => Ok(Some(q.si)),
        Some(q) => Err(Diagnostic::error(
            span,
            format!("`{name}` must be above absolute zero, got {} K", q.si),
        )),
        None => Ok(None),
    }
}

/// Text argument with a default, checked against the allowed words.
fn word(
    args: &mut Args,
    name: &str,
    allowed: &[&str],
    default: &str,
) -> Result<String, Diagnostic> {
    let Some(arg) = args.take(name) else {
        return Ok(default.to_string());
    };
    match arg.value {
        Value::Str(s) if allowed.contains(&s.as_str()) => Ok(s),
        _ => Err(Diagnostic::error(
            arg.span,
            format!("`{name}` must be one of {}", quoted(allowed)),
        )),
    }
}

fn quoted(words: &[&str]) -> String {
    words
        .iter()
        .map(|w| format!("\"{w}\""))
        .collect::<Vec<_>>()
        .join(", ")
}

/// Turn an engine error into a diagnostic at the call.
fn engine_error(args: &Args, e: TransferError) -> Diagnostic {
    let d = Diagnostic::error(args.call_span, format!("`{}`: {e}", args.builtin.name));
    match e {
        TransferError::NoDrivingForce(_) => {
            d.with_hint("a surface dries only into air drier than saturated at its temperature")
        }
        _ => d,
    }
}

/// Carry a correlation's range warnings into the call's warnings.
fn take_value<T>(args: &mut Args, c: Correlated<T>) -> T {
    for w in c.warnings {
        args.warn(w.message());
    }
    c.value
}

fn quantity(si: f64, dim: Dim) -> Value {
    Value::Quantity(Quantity::new(si, dim, Kind::Plain), None)
}

/// A quantity shown in the trade's usual unit (`text` parsed by the unit
/// table; the value itself stays SI). The unit is parsed once per thread and
/// call site (each thread keeps its own copy, so that cloning it touches no
/// count shared with another thread).
macro_rules! shown {
    ($si:expr, $dim:expr, $text:literal $(,)?) => {{
        thread_local! {
            static UNIT: Option<crate::units::Unit> = parse_unit($text).ok();
        }
        Value::Quantity(
            Quantity::new($si, $dim, Kind::Plain),
            UNIT.with(Clone::clone),
        )
    }};
}

fn number(x: f64) -> Value {
    Value::Quantity(Quantity::number(x), None)
}

// uom constructors from SI magnitudes (the language hands us SI).
fn velocity_si(x: f64) -> Velocity {
    Velocity::new::<uom::si::velocity::meter_per_second>(x)
}
fn length_si(x: f64) -> Length {
    Length::new::<uom::si::length::meter>(x)
}
fn h_si(x: f64) -> HeatTransfer {
    HeatTransfer::new::<uom::si::heat_transfer::watt_per_square_meter_kelvin>(x)
}
fn mass_flux_si(x: f64) -> MassFlux {
    MassFlux::new::<uom::si::mass_flux::kilogram_per_square_meter_second>(x)
}
fn kelvin(x: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<uom::si::thermodynamic_temperature::kelvin>(x)
}

/// Transport properties of the air at the film temperature (T + Ts)/2 when a
/// surface temperature is given, else at the air temperature.
fn film_properties(
    args: &Args,
    air: &AirState,
    surface_k: Option<f64>,
) -> Result<Transport, Diagnostic> {
    let state = match surface_k {
        None => *air,
        Some(ts) => {
            let t_film = kelvin(0.5 * (air.t_kelvin() + ts));
            AirState::from_w(t_film, air.humidity_ratio(), air.pressure()).map_err(|e| {
                Diagnostic::error(
                    args.call_span,
                    format!("film temperature from `surface`: {e}"),
                )
            })?
        }
    };
    Ok(Transport::of(&state))
}

// ---------------------------------------------------------------------------
// Mass velocity and velocity
// ---------------------------------------------------------------------------

fn density_si(air: &AirState) -> f64 {
    air.density()
        .get::<uom::si::mass_density::kilogram_per_cubic_meter>()
}

fn mass_velocity(args: &mut Args) -> Result<Value, Diagnostic> {
    let air = air_arg(args, "air")?;
    let rho = MassDensity::new::<uom::si::mass_density::kilogram_per_cubic_meter>(density_si(&air));
    let g = if let Some(v) = opt_positive(args, "velocity", Dim::VELOCITY)? {
        engine::mass_velocity(rho, velocity_si(v))
    } else {
        let v = velocity_from_flows(args, &air)?;
        engine::mass_velocity(rho, velocity_si(v))
    }
    .map_err(|e| engine_error(args, e))?;
    args.finish()?;
    Ok(shown!(
        g.get::<uom::si::mass_flux::kilogram_per_square_meter_second>(),
        Dim::MASS_FLUX,
        "kg/(m^2*h)",
    ))
}

/// Velocity from `mass_flow` or `volume_flow` through `area`.
fn velocity_from_flows(args: &mut Args, air: &AirState) -> Result<f64, Diagnostic> {
    let mass = opt_positive(args, "mass_flow", Dim::MASS_FLOW)?;
    let volume = opt_positive(args, "volume_flow", Dim::VOLUME_FLOW)?;
    let need = "give `velocity`, or `mass_flow` or `volume_flow` with `area`";
    let area = match opt_positive(args, "area", Dim::AREA)? {
        Some(a) => a,
        None => {
            return Err(Diagnostic::error(
                args.call_span,
                format!("`{}`: {need}", args.builtin.name),
            ))
        }
    };
    let area = uom::si::f64::Area::new::<uom::si::area::square_meter>(area);
    let v = match (mass, volume) {
        (Some(m), None) => {
            let g = engine::groups::mass_velocity_from_flow(
                MassRate::new::<uom::si::mass_rate::kilogram_per_second>(m),
                area,
            );
            g.and_then(|g| engine::velocity_from_mass_velocity(g, air.density()))
        }
        (None, Some(q)) => engine::groups::velocity_from_volume_flow(
            VolumeRate::new::<uom::si::volume_rate::cubic_meter_per_second>(q),
            area,
        ),
        _ => {
            return Err(Diagnostic::error(
                args.call_span,
                format!("`{}`: {need}, not both flows", args.builtin.name),
            ))
        }
    };
    v.map(|v| v.get::<uom::si::velocity::meter_per_second>())
        .map_err(|e| engine_error(args, e))
}

fn air_velocity(args: &mut Args) -> Result<Value, Diagnostic> {
    let air = air_arg(args, "air")?;
    let v = if let Some(g) = opt_positive(args, "G", Dim::MASS_FLUX)? {
        engine::velocity_from_mass_velocity(mass_flux_si(g), air.density())
            .map(|v| v.get::<uom::si::velocity::meter_per_second>())
            .map_err(|e| engine_error(args, e))?
    } else {
        velocity_from_flows(args, &air)?
    };
    args.finish()?;
    Ok(quantity(v, Dim::VELOCITY))
}

// ---------------------------------------------------------------------------
// Tray correlations
// ---------------------------------------------------------------------------

/// G given directly, or from `air` and `velocity`; also the air temperature
/// and velocity for range checks when known.
fn tray_inputs(
    args: &mut Args,
) -> Result<(MassFlux, Option<ThermodynamicTemperature>, Option<Velocity>), Diagnostic> {
    let g = opt_positive_at(args, TRAY_G, Dim::MASS_FLUX)?;
    let air = opt_air_at(args, TRAY_AIR)?;
    let v = opt_positive_at(args, TRAY_VELOCITY, Dim::VELOCITY)?;
    let t = air.map(|a| a.temperature());
    let g = match (g, air, v) {
        (Some(g), _, _) => g,
        (None, Some(a), Some(v)) => density_si(&a) * v,
        _ => {
            return Err(Diagnostic::error(
                args.call_span,
                format!("`{}` needs `G`, or `air` and `velocity`", args.builtin.name),
            )
            .with_hint(format!("call it as {}", args.builtin.example)))
        }
    };
    let v = v.or_else(|| air.map(|a| g / density_si(&a)));
    Ok((mass_flux_si(g), t, v.map(velocity_si)))
}

fn h_value(
    args: &mut Args,
    h: Result<Correlated<HeatTransfer>, TransferError>,
) -> Result<Value, Diagnostic> {
    let h = h.map_err(|e| engine_error(args, e))?;
    let h = take_value(args, h);
    args.finish()?;
    Ok(quantity(
        h.get::<uom::si::heat_transfer::watt_per_square_meter_kelvin>(),
        Dim::HEAT_TRANSFER_COEFFICIENT,
    ))
}

fn h_tray_parallel(args: &mut Args) -> Result<Value, Diagnostic> {
    let (g, t, v) = tray_inputs(args)?;
    h_value(args, engine::tray_parallel_flow(g, t, v))
}

fn h_tray_impinging(args: &mut Args) -> Result<Value, Diagnostic> {
    let (g, _, v) = tray_inputs(args)?;
    h_value(args, engine::tray_perpendicular_flow(g, v))
}

// ---------------------------------------------------------------------------
// Nusselt correlations on bodies
// ---------------------------------------------------------------------------

/// Re and Pr for air over a body of characteristic `length_name`, with the
/// conductivity to turn Nu into h and the characteristic length in metres.
struct Flow {
    re: f64,
    pr: f64,
    k: f64,
    length: f64,
}

fn body_flow(args: &mut Args, length_name: &str) -> Result<Flow, Diagnostic> {
    let air = air_arg(args, "air")?;
    let v = positive(args, "velocity", Dim::VELOCITY)?;
    let length = positive(args, length_name, Dim::LENGTH)?;
    let surface = if args.builtin.params.iter().any(|p| p.name == "surface") {
        opt_temperature(args, "surface")?
    } else {
        None
    };
    let props = film_properties(args, &air, surface)?;
    Ok(Flow {
        re: props.density_kg_per_m3 * v * length / props.viscosity_pa_s,
        pr: props.prandtl(),
        k: props.conductivity_w_per_m_k,
        length,
    })
}

fn h_from_nu(
    args: &mut Args,
    flow: &Flow,
    nu: Result<Correlated<f64>, TransferError>,
) -> Result<Value, Diagnostic> {
    let nu = nu.map_err(|e| engine_error(args, e))?;
    let nu = take_value(args, nu);
    args.finish()?;
    Ok(quantity(
        nu * flow.k / flow.length,
        Dim::HEAT_TRANSFER_COEFFICIENT,
    ))
}

fn plate_flow(regime: &str) -> PlateFlow {
    match regime {
        "laminar" => PlateFlow::Laminar,
        "turbulent" => PlateFlow::Turbulent,
        _ => PlateFlow::Mixed,
    }
}

const REGIMES: &[&str] = &["laminar", "turbulent", "mixed"];

fn h_flat_plate(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = body_flow(args, "length")?;
    let regime = word(args, "regime", REGIMES, "mixed")?;
    let nu = engine::flat_plate(flow.re, flow.pr, plate_flow(&regime));
    h_from_nu(args, &flow, nu)
}

fn h_sphere(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = body_flow(args, "diameter")?;
    h_from_nu(args, &flow, engine::sphere_ranz_marshall(flow.re, flow.pr))
}

fn h_cylinder(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = body_flow(args, "diameter")?;
    h_from_nu(
        args,
        &flow,
        engine::cylinder_churchill_bernstein(flow.re, flow.pr),
    )
}

fn h_packed_bed(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = body_flow(args, "diameter")?;
    h_from_nu(
        args,
        &flow,
        engine::packed_bed_wakao_kaguei(flow.re, flow.pr),
    )
}

// ---------------------------------------------------------------------------
// Impinging jets
// ---------------------------------------------------------------------------

fn h_jet_round(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = body_flow(args, "diameter")?;
    let h_over_d = positive(args, "distance", Dim::LENGTH)? / flow.length;
    let r_over_d = positive(args, "radius", Dim::LENGTH)? / flow.length;
    h_from_nu(
        args,
        &flow,
        engine::round_jet_single(flow.re, flow.pr, h_over_d, r_over_d),
    )
}

fn h_jet_round_array(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = body_flow(args, "diameter")?;
    let h_over_d = positive(args, "distance", Dim::LENGTH)? / flow.length;
    let pitch = positive(args, "pitch", Dim::LENGTH)?;
    let open = std::f64::consts::PI * flow.length * flow.length / (4.0 * pitch * pitch);
    h_from_nu(
        args,
        &flow,
        engine::round_jet_array(flow.re, flow.pr, h_over_d, open),
    )
}

/// A slot's Re and Nu use S = 2 x width: scale the flow to that length.
fn slot_flow(args: &mut Args) -> Result<Flow, Diagnostic> {
    let mut flow = body_flow(args, "width")?;
    flow.re *= 2.0;
    flow.length *= 2.0;
    Ok(flow)
}

fn h_jet_slot(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = slot_flow(args)?;
    let h_over_s = positive(args, "distance", Dim::LENGTH)? / flow.length;
    let x_over_s = positive(args, "half_width", Dim::LENGTH)? / flow.length;
    h_from_nu(
        args,
        &flow,
        engine::slot_jet_single(flow.re, flow.pr, h_over_s, x_over_s),
    )
}

fn h_jet_slot_array(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = slot_flow(args)?;
    let h_over_s = positive(args, "distance", Dim::LENGTH)? / flow.length;
    let open = 0.5 * flow.length / positive(args, "pitch", Dim::LENGTH)?;
    h_from_nu(
        args,
        &flow,
        engine::slot_jet_array(flow.re, flow.pr, h_over_s, open),
    )
}

// ---------------------------------------------------------------------------
// Nusselt numbers from groups
// ---------------------------------------------------------------------------

fn nu_value(
    args: &mut Args,
    nu: Result<Correlated<f64>, TransferError>,
) -> Result<Value, Diagnostic> {
    let nu = nu.map_err(|e| engine_error(args, e))?;
    let nu = take_value(args, nu);
    args.finish()?;
    Ok(number(nu))
}

fn re_pr(args: &mut Args) -> Result<(f64, f64), Diagnostic> {
    Ok((plain(args, "Re")?, plain(args, "Pr")?))
}

fn nu_flat_plate(args: &mut Args) -> Result<Value, Diagnostic> {
    let (re, pr) = re_pr(args)?;
    let regime = word(args, "regime", REGIMES, "mixed")?;
    nu_value(args, engine::flat_plate(re, pr, plate_flow(&regime)))
}

fn nu_sphere(args: &mut Args) -> Result<Value, Diagnostic> {
    let (re, pr) = re_pr(args)?;
    nu_value(args, engine::sphere_ranz_marshall(re, pr))
}

fn nu_cylinder(args: &mut Args) -> Result<Value, Diagnostic> {
    let (re, pr) = re_pr(args)?;
    nu_value(args, engine::cylinder_churchill_bernstein(re, pr))
}

fn nu_packed_bed(args: &mut Args) -> Result<Value, Diagnostic> {
    let (re, pr) = re_pr(args)?;
    nu_value(args, engine::packed_bed_wakao_kaguei(re, pr))
}

// ---------------------------------------------------------------------------
// Dimensionless groups
// ---------------------------------------------------------------------------

fn reynolds(args: &mut Args) -> Result<Value, Diagnostic> {
    let flow = body_flow(args, "length")?;
    args.finish()?;
    Ok(number(flow.re))
}

fn nusselt(args: &mut Args) -> Result<Value, Diagnostic> {
    let h = positive(args, "h", Dim::HEAT_TRANSFER_COEFFICIENT)?;
    let length = positive(args, "length", Dim::LENGTH)?;
    let air = air_arg(args, "air")?;
    args.finish()?;
    let k = ThermalConductivity::new::<uom::si::thermal_conductivity::watt_per_meter_kelvin>(
        Transport::of(&air).conductivity_w_per_m_k,
    );
    let nu = engine::nusselt(h_si(h), length_si(length), k).map_err(|e| engine_error(args, e))?;
    Ok(number(nu))
}

fn sherwood(args: &mut Args) -> Result<Value, Diagnostic> {
    let kc = positive(args, "kc", Dim::VELOCITY)?;
    let length = positive(args, "length", Dim::LENGTH)?;
    let air = air_arg(args, "air")?;
    args.finish()?;
    let d = DiffusionCoefficient::new::<uom::si::diffusion_coefficient::square_meter_per_second>(
        Transport::of(&air).diffusivity_m2_per_s,
    );
    let sh = engine::sherwood(velocity_si(kc), length_si(length), d)
        .map_err(|e| engine_error(args, e))?;
    Ok(number(sh))
}

// ---------------------------------------------------------------------------
// Chilton-Colburn
// ---------------------------------------------------------------------------

fn colburn_inputs(args: &mut Args) -> Result<(HeatTransfer, AirState, Transport), Diagnostic> {
    let h = positive(args, "h", Dim::HEAT_TRANSFER_COEFFICIENT)?;
    let air = air_arg(args, "air")?;
    let surface = opt_temperature(args, "surface")?;
    let props = film_properties(args, &air, surface)?;
    Ok((h_si(h), air, props))
}

fn colburn_kc(args: &mut Args) -> Result<Value, Diagnostic> {
    let (h, _, t) = colburn_inputs(args)?;
    let rho =
        MassDensity::new::<uom::si::mass_density::kilogram_per_cubic_meter>(t.density_kg_per_m3);
    let cp = uom::si::f64::SpecificHeatCapacity::new::<
        uom::si::specific_heat_capacity::joule_per_kilogram_kelvin,
    >(t.cp_j_per_kg_k);
    let kc = engine::colburn_mass_transfer_coefficient(h, rho, cp, t.prandtl(), t.schmidt())
        .map_err(|e| engine_error(args, e))?;
    let kc = take_value(args, kc);
    args.finish()?;
    Ok(quantity(
        kc.get::<uom::si::velocity::meter_per_second>(),
        Dim::VELOCITY,
    ))
}

fn colburn_ky(args: &mut Args) -> Result<Value, Diagnostic> {
    let (h, air, t) = colburn_inputs(args)?;
    let ky = engine::colburn_humidity_coefficient(h, air.humid_heat(), t.prandtl(), t.schmidt())
        .map_err(|e| engine_error(args, e))?;
    let ky = take_value(args, ky);
    args.finish()?;
    Ok(quantity(
        ky.get::<uom::si::mass_flux::kilogram_per_square_meter_second>(),
        Dim::MASS_FLUX,
    ))
}

// ---------------------------------------------------------------------------
// Wet surface and constant-rate time
// ---------------------------------------------------------------------------

impl Payload for WetSurface {
    fn as_any(&self) -> &dyn Any {
        self
    }

    fn as_any_mut(&mut self) -> Option<&mut dyn Any> {
        Some(self)
    }
}

fn radiation_arg(args: &mut Args) -> Result<Option<Radiation>, Diagnostic> {
    if !args.has("emissivity") && !args.has("wall") {
        return Ok(None);
    }
    let eps_span = args.span_of("emissivity");
    let eps = match args.opt_quantity("emissivity", Dim::NONE)? {
        Some(q) if (0.0..=1.0).contains(&q.si) => Some(q.si),
        Some(q) => {
            return Err(Diagnostic::error(
                eps_span,
                format!("`emissivity` must be between 0 and 1, got {}", q.si),
            ))
        }
        None => None,
    };
    let wall = opt_temperature(args, "wall")?;
    match (eps, wall) {
        (None, None) => Ok(None),
        (eps, Some(tw)) => Ok(Some(Radiation {
            emissivity: eps.unwrap_or(0.92),
            wall: kelvin(tw),
        })),
        (Some(_), None) => Err(Diagnostic::error(
            eps_span,
            "radiation needs the temperature of the surroundings, `wall`",
        )),
    }
}

/// Tray bottom: `h_under` (default: h) in series with an optional metal
/// layer (`tray_thickness`, `tray_k`) and wet-bed layer (`bed_thickness`,
/// `bed_k`); present when any of these is given.
fn bottom_arg(args: &mut Args, h: f64) -> Result<Option<TrayBottom>, Diagnostic> {
    const NAMES: [&str; 5] = [
        "h_under",
        "tray_thickness",
        "tray_k",
        "bed_thickness",
        "bed_k",
    ];
    if !NAMES.iter().any(|name| args.has(name)) {
        return Ok(None);
    }
    let h_under = opt_positive(args, "h_under", Dim::HEAT_TRANSFER_COEFFICIENT)?;
    let tray = layer_arg(args, "tray_thickness", "tray_k")?;
    let bed = layer_arg(args, "bed_thickness", "bed_k")?;
    if h_under.is_none() && tray.is_none() && bed.is_none() {
        return Ok(None);
    }
    let layers = tray.into_iter().chain(bed).collect();
    Ok(Some(TrayBottom {
        h_underside: h_si(h_under.unwrap_or(h)),
        layers,
    }))
}

fn layer_arg(
    args: &mut Args,
    thickness: &str,
    conductivity: &str,
) -> Result<Option<Layer>, Diagnostic> {
    if !args.has(thickness) && !args.has(conductivity) {
        return Ok(None);
    }
    let (z_span, k_span) = (args.span_of(thickness), args.span_of(conductivity));
    let z = opt_positive(args, thickness, Dim::LENGTH)?;
    let k = opt_positive(args, conductivity, Dim::THERMAL_CONDUCTIVITY)?;
    match (z, k) {
        (None, None) => Ok(None),
        (Some(z), Some(k)) => Ok(Some(Layer {
            thickness: length_si(z),
            conductivity: ThermalConductivity::new::<
                uom::si::thermal_conductivity::watt_per_meter_kelvin,
            >(k),
        })),
        (Some(_), None) => Err(Diagnostic::error(
            z_span,
            format!("give `{conductivity}` with `{thickness}`"),
        )),
        (None, Some(_)) => Err(Diagnostic::error(
            k_span,
            format!("give `{thickness}` with `{conductivity}`"),
        )),
    }
}

fn wet_surface(args: &mut Args) -> Result<Value, Diagnostic> {
    let air = air_arg_at(args, WET_SURFACE_AIR)?;
    let h = positive_at(args, WET_SURFACE_H, Dim::HEAT_TRANSFER_COEFFICIENT)?;
    // Radiation and the tray bottom are read only when some argument is
    // left (one pass over the slots, not a search for each of their names).
    let extra = if args.given().next().is_none() {
        ExtraHeat::default()
    } else {
        ExtraHeat {
            radiation: radiation_arg(args)?,
            bottom: bottom_arg(args, h)?,
        }
    };
    args.finish()?;
    let s = engine::wet_surface(&air, h_si(h), &extra).map_err(|e| engine_error(args, e))?;
    for w in &s.warnings {
        args.warn(w.message());
    }
    Ok(Value::Record(surface_record(args, s, h)))
}

/// The fields of a `wet_surface` record, in order.
const SURFACE_FIELDS: [&str; 10] = [
    "Ts", "w_s", "Rc", "q", "q_conv", "q_rad", "q_cond", "latent", "ky", "h",
];

/// The fields of [`SURFACE_FIELDS`] a caller reads, one bit each by
/// position ([`Args::wants`] of each): worked out once per wanted list
/// ([`Args::wanted_mask`]).
fn surface_mask(wanted: Option<&[String]>) -> u64 {
    SURFACE_FIELDS
        .iter()
        .enumerate()
        .filter(|(_, name)| wanted.is_none_or(|w| w.iter().any(|f| f == *name)))
        .fold(0, |m, (i, _)| m | 1 << i)
}

/// The record of a wet-surface solution, with the solution as its payload.
///
/// Only the fields the caller reads are built when it says which
/// ([`Args::wants`]; a what-if study's points), and the payload only when
/// asked for; the engine has computed every field already, so leaving one
/// out hides no warning or error.
fn surface_record(args: &mut Args, s: WetSurface, h: f64) -> Record {
    use uom::si::heat_flux_density::watt_per_square_meter as w_m2;
    let mask = args.wanted_mask(surface_mask) as u16;
    let q = |x: uom::si::f64::HeatFluxDensity| quantity(x.get::<w_m2>(), Dim::HEAT_FLUX);
    let mut record = Record::reusing("wet_surface", args.take_spare(), mask.count_ones() as usize);
    let fields = record.fields_mut();
    for (i, name) in SURFACE_FIELDS.iter().enumerate() {
        if mask & 1 << i == 0 {
            continue;
        }
        let value = match i {
            0 => Value::Quantity(
                Quantity::new(
                    s.temperature
                        .get::<uom::si::thermodynamic_temperature::kelvin>(),
                    Dim::TEMPERATURE,
                    Kind::AbsoluteTemperature,
                ),
                None,
            ),
            1 => Value::Quantity(
                Quantity::new(s.w_surface_kg_per_kg_da, Dim::NONE, Kind::HumidityRatio),
                None,
            ),
            2 => shown!(
                s.rate
                    .get::<uom::si::mass_flux::kilogram_per_square_meter_second>(),
                Dim::MASS_FLUX,
                "kg/(m^2*h)"
            ),
            3 => q(s.heat_flux),
            4 => q(s.convective),
            5 => q(s.radiative),
            6 => q(s.conductive),
            7 => quantity(
                s.latent_heat
                    .get::<uom::si::available_energy::joule_per_kilogram>(),
                Dim::SPECIFIC_ENERGY,
            ),
            8 => quantity(
                s.k_y
                    .get::<uom::si::mass_flux::kilogram_per_square_meter_second>(),
                Dim::MASS_FLUX,
            ),
            _ => quantity(h, Dim::HEAT_TRANSFER_COEFFICIENT),
        };
        fields.push(((*name).into(), value));
    }
    if args.wants_payload() {
        record.set_payload(s);
    } else {
        record.payload = None;
    }
    record
}

/// A dry-basis moisture content: kind Moisture or a plain number.
/// (The parameter at `index`.) What [`moisture_general`] accepts is taken
/// in place ([`Args::take_si_if`]); anything else goes that way, which
/// reports it.
#[inline]
fn moisture(args: &mut Args, index: usize) -> Result<f64, Diagnostic> {
    match args.take_si_if(index, Dim::NONE, is_moisture) {
        Some(x) => Ok(x),
        None => moisture_general(args, index),
    }
}

/// What [`moisture_general`] accepts unchanged: a finite moisture content
/// of at least 0, of kind `Moisture` or a plain number.
#[inline]
fn is_moisture(q: &Quantity) -> bool {
    matches!(q.kind, Kind::Moisture | Kind::Plain) && q.si.is_finite() && q.si >= 0.0
}

/// [`moisture`] taking the argument and checking it step by step.
#[inline(never)]
fn moisture_general(args: &mut Args, index: usize) -> Result<f64, Diagnostic> {
    let name = args.name_at(index);
    let (q, span) = args.required_spanned_at(index, Dim::NONE)?;
    match q.kind {
        _ if is_moisture(&q) => Ok(q.si),
        Kind::Moisture | Kind::Plain => Err(Diagnostic::error(
            span,
            format!(
                "`{name}` must be a moisture content of at least 0, got {}",
                q.si
            ),
        )),
        other => Err(Diagnostic::error(
            span,
            format!(
                "`{name}` must be a solid moisture content (dry basis), not {}",
                kind_words(other)
            ),
        )
        .with_hint("write moisture on the dry basis, e.g. `1.6 db`")),
    }
}

fn kind_words(kind: Kind) -> &'static str {
    match kind {
        Kind::HumidityRatio => "an air humidity ratio",
        Kind::Activity => "a relative humidity or water activity",
        Kind::Fraction => "a plain fraction or percentage",
        Kind::AbsoluteTemperature => "an absolute temperature",
        Kind::TemperatureDifference => "a temperature difference",
        Kind::Moisture | Kind::Plain => "a plain number",
    }
}

fn constant_rate_time(args: &mut Args) -> Result<Value, Diagnostic> {
    let load = positive_at(args, CRT_LOAD, Dim::AREAL_DENSITY)?;
    let x1 = moisture(args, CRT_X1)?;
    let x2 = moisture(args, CRT_X2)?;
    let rc = match args.take_si_if(CRT_RC, Dim::MASS_FLUX, |_| true) {
        Some(si) => si,
        None => args.required_spanned_at(CRT_RC, Dim::MASS_FLUX)?.0.si,
    };
    args.finish()?;
    let load =
        ArealMassDensity::new::<uom::si::areal_mass_density::kilogram_per_square_meter>(load);
    let t = engine::constant_rate_time(load, x1, x2, mass_flux_si(rc))
        .map_err(|e| engine_error(args, e))?;
    Ok(shown!(t.get::<uom::si::time::second>(), Dim::TIME, "h"))
}

#[cfg(test)]
mod tests;
