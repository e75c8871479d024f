//! Humid-air built-ins: the `air(...)` state, processes on air and streams,
//! the standard atmosphere, water saturation and transport properties.
//!
//! Each function checks dimensions and kinds here, converts to uom and calls
//! `engine::air` / `engine::transport`. Methods, sources and ranges are in
//! docs/methods/air.md.

use std::any::Any;

use uom::si::available_energy::joule_per_kilogram;
use uom::si::f64::{
    AvailableEnergy, Length, MassRate, Pressure, ThermodynamicTemperature, VolumeRate,
};
use uom::si::length::meter;
use uom::si::mass_rate::kilogram_per_second;
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::kelvin;
use uom::si::volume_rate::cubic_meter_per_second;

use super::{const_eq, p, param_at, type_word, Args, Builtin, Param};
use crate::diag::{Diagnostic, Span};
use crate::engine::air::{self, AirError, AirState, ProcessOutcome, Stream};
use crate::engine::transport::Transport;
use crate::units::{Dim, Kind, Quantity};
use crate::value::{FieldName, Payload, Record, Value};

/// The typed engine state carried by every `air` record.
#[derive(Debug)]
pub struct AirPayload(pub AirState);

impl Payload for AirPayload {
    fn as_any(&self) -> &dyn Any {
        self
    }

    fn as_any_mut(&mut self) -> Option<&mut dyn Any> {
        Some(self)
    }
}

const SOURCE: &str = "ASHRAE Handbook - Fundamentals (2017) ch. 1 (Hyland-Wexler saturation, psychrometric relations); \
IAPWS-IF97 R7-97(2012) region 4 and region 2; Lemmon et al. (2000) J. Phys. Chem. Ref. Data 29, 331 (dry air); \
Hardy (1998) enhancement factor; Hyland & Wexler (1983) ASHRAE Trans. 89(2A) virial coefficients";
const METHOD_STATE: &str = "Ideal-gas mixture with second-virial corrections; saturation over ice below 0 degC with \
the enhancement factor; thermodynamic wet-bulb and dew point by Newton's method with exact slopes on the exact adiabatic-saturation \
balance and the saturation curve, started from per-pressure tables (see docs/methods/air.md)";
const VALIDITY: &str =
    "dry-bulb -40 to 350 degC (error outside); total pressure 50 to 200 kPa (warning outside, \
error outside 1 kPa to 10 MPa)";
const METHOD_PROCESS: &str =
    "Steady-flow energy and water balances per kg of dry air; condensate leaves at the \
outlet temperature; kinetic energy and fan work neglected";

const AIR_PARAMS: &[Param] = &[
    p("T", "degC", None, "dry-bulb temperature, -40 to 350 degC"),
    p(
        "rh",
        "%rh",
        None,
        "relative humidity 0..100 % (over ice below 0 degC)",
    ),
    p(
        "w",
        "kg/kg_da",
        None,
        "humidity ratio, kg water per kg dry air",
    ),
    p(
        "wetbulb",
        "degC",
        None,
        "thermodynamic wet-bulb temperature",
    ),
    p(
        "dewpoint",
        "degC",
        None,
        "dew point (frost point below 0 degC)",
    ),
    p(
        "h",
        "kJ/kg",
        None,
        "enthalpy per kg dry air (dry air and liquid water at 0 degC = 0)",
    ),
    p("p", "kPa", Some("101.325 kPa"), "total pressure"),
];
const STATE: Param = p(
    "air",
    "air",
    None,
    "the inlet air, from air(...) or a process",
);
const FLOW: Param = p(
    "flow",
    "kg/s or m^3/s",
    None,
    "optional: dry-air mass flow, or volumetric flow at the inlet state; adds duty and water flow",
);
const HEAT_PARAMS: &[Param] = &[
    STATE,
    p("to", "degC", None, "outlet dry-bulb (or give `by`)"),
    p(
        "by",
        "kJ/kg or kW",
        None,
        "heat per kg dry air, or a power with `flow`",
    ),
    FLOW,
];
const MIX_PARAMS: &[Param] = &[
    p("a", "air", None, "first stream's air"),
    p(
        "flow_a",
        "kg/s or m^3/s",
        None,
        "first stream's dry-air mass flow or volumetric flow",
    ),
    p("b", "air", None, "second stream's air"),
    p(
        "flow_b",
        "kg/s or m^3/s",
        None,
        "second stream's dry-air mass flow or volumetric flow",
    ),
];
const SATURATE_PARAMS: &[Param] = &[
    STATE,
    p(
        "effectiveness",
        "%",
        Some("100 %"),
        "saturation effectiveness (T1 - T2) / (T1 - T_wetbulb)",
    ),
    FLOW,
];
const ADD_WATER_PARAMS: &[Param] = &[
    STATE,
    p(
        "amount",
        "kg/kg_da or kg/h",
        None,
        "water per kg dry air, or a water flow with `flow` (or give `to_w` / `to_rh`)",
    ),
    p("to_w", "kg/kg_da", None, "target humidity ratio"),
    p(
        "to_rh",
        "%rh",
        None,
        "target relative humidity at the outlet",
    ),
    p(
        "water_T",
        "degC",
        Some("15 degC"),
        "temperature of the liquid water supplied",
    ),
    FLOW,
];
const ADD_STEAM_PARAMS: &[Param] = &[
    STATE,
    p(
        "amount",
        "kg/kg_da or kg/h",
        None,
        "steam per kg dry air, or a steam flow with `flow` (or give `to_w` / `to_rh`)",
    ),
    p("to_w", "kg/kg_da", None, "target humidity ratio"),
    p(
        "to_rh",
        "%rh",
        None,
        "target relative humidity at the outlet",
    ),
    p(
        "steam_T",
        "degC",
        Some("100 degC"),
        "temperature of the saturated steam supplied",
    ),
    FLOW,
];
const ALTITUDE_PARAMS: &[Param] = &[p(
    "z",
    "m",
    None,
    "geometric altitude above sea level, -2000 to 11000 m",
)];
const T_PARAM: &[Param] = &[p("T", "degC", None, "temperature")];
const P_PARAM: &[Param] = &[p("p", "kPa", None, "pressure")];
const AIR_ONLY: &[Param] = &[STATE];

const TRANSPORT_SOURCE: &str = "Lemmon & Jacobsen (2004) Int. J. Thermophys. 25, 21 (air); IAPWS R12-08 and R15-11 \
(water vapour); Wilke (1950) J. Chem. Phys. 18, 517; Mason & Saxena (1958); Fuller, Schettler & Giddings (1966) \
with Fuller et al. (1969) diffusion volumes, as in Poling, Prausnitz & O'Connell (2001)";
const TRANSPORT_VALIDITY: &str = "-40 to 350 degC, 50 to 200 kPa, any humidity up to saturation";

const fn transport(
    name: &'static str,
    returns: &'static str,
    doc: &'static str,
    method: &'static str,
    example: &'static str,
    func: fn(&mut Args) -> Result<Value, Diagnostic>,
) -> Builtin {
    Builtin {
        name,
        family: "air",
        params: AIR_ONLY,
        returns,
        doc,
        method,
        source: TRANSPORT_SOURCE,
        validity: TRANSPORT_VALIDITY,
        example,
        func,
    }
}

/// The air family.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "air",
        family: "air",
        params: AIR_PARAMS,
        returns: "air state",
        doc: "Humid air from the dry-bulb `T` and exactly one of `rh`, `w`, `wetbulb`, `dewpoint`, `h`, at total \
pressure `p`. Fields: T, rh, w, dewpoint, wetbulb, h (per kg dry air), v (humid volume per kg dry air), rho (kg humid \
air per m^3), cp (humid heat per kg dry air), p, pv (vapour pressure), w_sat (saturation humidity ratio) and \
degree_of_saturation (w / w_sat). Above the boiling point at p, w_sat and degree_of_saturation are absent; for \
bone-dry air the dew point is absent.",
        method: METHOD_STATE,
        source: SOURCE,
        validity: VALIDITY,
        example: "air(T: 24 degC, rh: 55 %)",
        func: air_state,
    },
    Builtin {
        name: "heat",
        family: "air",
        params: HEAT_PARAMS,
        returns: "air state with q (and flow, duty, volume_flow with flow)",
        doc: "Heat air to the dry-bulb `to`, or by `by` (kJ/kg dry air, or kW with `flow`). The humidity ratio is \
unchanged. The result is the outlet air with extra fields q (heat per kg dry air) and, when `flow` is given, flow \
(dry-air mass flow), duty and volume_flow (at the outlet).",
        method: METHOD_PROCESS,
        source: SOURCE,
        validity: VALIDITY,
        example: "heat(air(T: 24 degC, rh: 55 %), to: 80 degC)",
        func: heat,
    },
    Builtin {
        name: "cool",
        family: "air",
        params: HEAT_PARAMS,
        returns: "air state with q, condensate (and flow, duty, volume_flow, condensate_flow with flow)",
        doc: "Cool air to the dry-bulb `to`, or by `by` (heat removed: kJ/kg dry air, or kW with `flow`). Below the \
dew point the outlet is saturated and the condensate is removed at the outlet temperature. Extra fields: q (heat \
added per kg dry air, negative), condensate (kg per kg dry air) and with `flow`: duty (negative), condensate_flow.",
        method: METHOD_PROCESS,
        source: SOURCE,
        validity: VALIDITY,
        example: "cool(air(T: 30 degC, rh: 70 %), to: 12 degC)",
        func: cool,
    },
    Builtin {
        name: "mix",
        family: "air",
        params: MIX_PARAMS,
        returns: "air state with flow (and fog)",
        doc: "Adiabatic mixing of two streams at the same total pressure by dry-air mass flow (a volumetric flow \
is converted at its own stream's state). When the mixture would be supersaturated, the outlet is saturated and \
the field fog gives the liquid water carried per kg dry air (condensation in ducts).",
        method: "Dry-air-weighted balances of water and enthalpy; supersaturated mixtures split into saturated air \
and liquid (ice below 0 degC)",
        source: SOURCE,
        validity: VALIDITY,
        example: "mix(air(T: 60 degC, rh: 30 %), 2 kg/s, air(T: 15 degC, rh: 60 %), 1 kg/s)",
        func: mix,
    },
    Builtin {
        name: "saturate",
        family: "air",
        params: SATURATE_PARAMS,
        returns: "air state with water (and water_flow with flow)",
        doc: "Adiabatic saturation (evaporative cooler or humidifier with recirculated water at the wet-bulb): \
the outlet dry-bulb is T1 - effectiveness * (T1 - wet-bulb) on the adiabatic-saturation line. Extra field water \
(kg evaporated per kg dry air) and, with `flow`, water_flow.",
        method: "Adiabatic-saturation balance h2 - w2 h_w(T*) = h1 - w1 h_w(T*), water at the wet-bulb T*",
        source: SOURCE,
        validity: VALIDITY,
        example: "saturate(air(T: 35 degC, rh: 20 %), effectiveness: 85 %)",
        func: saturate,
    },
    Builtin {
        name: "add_water",
        family: "air",
        params: ADD_WATER_PARAMS,
        returns: "air state with water (and water_flow with flow)",
        doc: "Spray liquid water at `water_T` into air and evaporate all of it: give `amount` (per kg dry air, or a \
flow with `flow`), or a target `to_w` or `to_rh`. Errors when the water cannot all evaporate.",
        method: "Energy balance h2 = h1 + dw h_liquid(water_T), w2 = w1 + dw; targets solved by Brent's method",
        source: SOURCE,
        validity: VALIDITY,
        example: "add_water(air(T: 60 degC, rh: 10 %), to_rh: 40 %)",
        func: add_water,
    },
    Builtin {
        name: "add_steam",
        family: "air",
        params: ADD_STEAM_PARAMS,
        returns: "air state with water (and water_flow with flow)",
        doc: "Inject saturated steam at `steam_T` into air: give `amount` (per kg dry air, or a flow with `flow`), \
or a target `to_w` or `to_rh`. Nearly isothermal. Errors when the outlet would be supersaturated.",
        method: "Energy balance h2 = h1 + dw h_steam(steam_T), w2 = w1 + dw; saturated steam enthalpy from \
IAPWS-IF97 region 2 (second-virial level) at the saturation pressure",
        source: SOURCE,
        validity: VALIDITY,
        example: "add_steam(air(T: 20 degC, rh: 20 %), to_rh: 50 %)",
        func: add_steam,
    },
    Builtin {
        name: "altitude_pressure",
        family: "air",
        params: ALTITUDE_PARAMS,
        returns: "kPa",
        doc: "Pressure of the ISO 2533 standard atmosphere at altitude `z`: plants are not at sea level. Weather \
moves the actual pressure by a few percent.",
        method: "p = p0 (1 - L H / T0)^(g0 M / (R L)) with geopotential altitude H; p0 = 101.325 kPa, T0 = 288.15 K, \
L = 6.5 K/km",
        source: "ISO 2533:1975 Standard Atmosphere",
        validity: "-2000 to 11000 m (troposphere); error outside",
        example: "altitude_pressure(1500 m)",
        func: altitude_pressure,
    },
    Builtin {
        name: "saturation_pressure",
        family: "air",
        params: T_PARAM,
        returns: "kPa",
        doc: "Saturation vapour pressure of pure water at `T`: over ice below 0 degC, over liquid above (no \
enhancement factor).",
        method: "Hyland-Wexler to 150 degC, IAPWS-IF97 region 4 above 200 degC, smooth join between",
        source: SOURCE,
        validity: "-100 to 373.946 degC (critical point); error outside",
        example: "saturation_pressure(60 degC)",
        func: saturation_pressure,
    },
    Builtin {
        name: "latent_heat",
        family: "air",
        params: T_PARAM,
        returns: "kJ/kg",
        doc: "Latent heat of vaporization of water at `T` (per kg water): about 2501 kJ/kg at 0 degC, 2257 kJ/kg at \
100 degC.",
        method: "Clausius-Clapeyron on the liquid saturation line with Wagner-Pruss (1993) saturated densities",
        source: "IAPWS-IF97 R7-97(2012); Wagner & Pruss (1993) J. Phys. Chem. Ref. Data 22, 783",
        validity: "0 to 300 degC within 0.3 % of IAPWS-95 (warning outside, zero at the critical point); error \
below -100 degC",
        example: "latent_heat(45 degC)",
        func: latent_heat,
    },
    Builtin {
        name: "boiling_point",
        family: "air",
        params: P_PARAM,
        returns: "degC",
        doc: "Boiling point of water at pressure `p`.",
        method: "Inverse of the saturation curve (IAPWS-IF97 eq. 31 start, polished by Brent's method)",
        source: "IAPWS-IF97 R7-97(2012)",
        validity: "0.6112 kPa to 22.064 MPa; error outside",
        example: "boiling_point(80 kPa)",
        func: boiling_point,
    },
    transport(
        "air_viscosity",
        "Pa*s",
        "Dynamic viscosity of the humid air `air`.",
        "Wilke mixing of dilute-gas dry air (Lemmon-Jacobsen 2004) and water vapour (IAPWS 2008)",
        "air_viscosity(air(T: 60 degC, rh: 20 %))",
        air_viscosity,
    ),
    transport(
        "air_conductivity",
        "W/(m*K)",
        "Thermal conductivity of the humid air `air`.",
        "Wassiljewa equation with Mason-Saxena factors over dilute-gas dry air (Lemmon-Jacobsen 2004) and water \
vapour (IAPWS 2011)",
        "air_conductivity(air(T: 60 degC, rh: 20 %))",
        air_conductivity,
    ),
    transport(
        "air_cp",
        "J/(kg*K)",
        "Isobaric specific heat per kg of humid air (not per kg dry air: for that use the cp field of the air state).",
        "Temperature derivative of the humid-air enthalpy, divided by 1 + w",
        "air_cp(air(T: 60 degC, rh: 20 %))",
        air_cp,
    ),
    transport(
        "air_density",
        "kg/m^3",
        "Density of the humid air (kg of humid air per m^3), the same as its rho field.",
        "(1 + w) / v with the virial humid volume",
        "air_density(air(T: 60 degC, rh: 20 %))",
        air_density,
    ),
    transport(
        "vapour_diffusivity",
        "m^2/s",
        "Diffusivity of water vapour in the air `air` (about 2.5e-5 m^2/s at 25 degC, 1 atm).",
        "Fuller-Schettler-Giddings (1966) with diffusion volumes air 19.7, H2O 13.1",
        "vapour_diffusivity(air(T: 60 degC, rh: 20 %))",
        vapour_diffusivity,
    ),
    transport(
        "air_prandtl",
        "-",
        "Prandtl number cp mu / k of the humid air.",
        "From air_cp, air_viscosity, air_conductivity",
        "air_prandtl(air(T: 60 degC, rh: 20 %))",
        air_prandtl,
    ),
    transport(
        "air_schmidt",
        "-",
        "Schmidt number mu / (rho D) of water vapour in the humid air.",
        "From air_viscosity, air_density, vapour_diffusivity",
        "air_schmidt(air(T: 60 degC, rh: 20 %))",
        air_schmidt,
    ),
    transport(
        "air_lewis",
        "-",
        "Lewis number k / (rho cp D) of water vapour in the humid air (about 0.85 near room temperature).",
        "From air_conductivity, air_density, air_cp, vapour_diffusivity",
        "air_lewis(air(T: 60 degC, rh: 20 %))",
        air_lewis,
    ),
];

// ---- argument reading -------------------------------------------------------------

/// A unit or kind error on argument `name` at `span`, with its hints.
fn unit_error(
    span: crate::diag::Span,
    builtin: &str,
    name: &str,
    e: crate::units::UnitError,
) -> Diagnostic {
    let mut d = Diagnostic::error(
        span,
        format!("argument `{name}` of `{builtin}`: {}", e.message),
    );
    for h in e.hints {
        d = d.with_hint(h);
    }
    d
}

/// An optional quantity of the given dimension and kind (kind rules of `Quantity::expect_kind`).
fn opt_kind(args: &mut Args, name: &str, dim: Dim, kind: Kind) -> Result<Option<f64>, Diagnostic> {
    let Some(arg) = args.take(name) else {
        return Ok(None);
    };
    match &arg.value {
        Value::Quantity(q, _) => q
            .expect_kind(dim, kind)
            .map(|q| Some(q.si))
            .map_err(|e| unit_error(arg.span, args.builtin.name, name, e)),
        other => Err(Diagnostic::error(
            arg.span,
            format!(
                "argument `{name}` of `{}` expects a quantity, found {}",
                args.builtin.name,
                type_word(other)
            ),
        )),
    }
}

/// The position of parameter `name` in [`AIR_PARAMS`] (evaluated at compile
/// time, where a name not in the list is an error).
const fn air_param(name: &str) -> usize {
    param_at(AIR_PARAMS, name)
}

/// [`opt_kind`] for `air`'s parameter `name` at position `index` of
/// [`AIR_PARAMS`], taken in place when it is what `air` expects
/// ([`Args::take_si_at`]); anything else goes the general way, which reports it.
#[inline]
fn air_kind(
    args: &mut Args,
    index: usize,
    name: &str,
    dim: Dim,
    kind: Kind,
) -> Result<Option<f64>, Diagnostic> {
    match args.take_si_at(index, dim, kind) {
        Some(si) => Ok(Some(si)),
        None => opt_kind(args, name, dim, kind),
    }
}

fn opt_temperature(
    args: &mut Args,
    name: &str,
) -> Result<Option<ThermodynamicTemperature>, Diagnostic> {
    Ok(
        opt_kind(args, name, Dim::TEMPERATURE, Kind::AbsoluteTemperature)?
            .map(ThermodynamicTemperature::new::<kelvin>),
    )
}

/// A required absolute temperature (degC, degF, or kelvin).
fn temperature(args: &mut Args, name: &str) -> Result<ThermodynamicTemperature, Diagnostic> {
    match opt_temperature(args, name)? {
        Some(t) => Ok(t),
        None => Err(args
            .required(name)
            .err()
            .unwrap_or_else(|| args.error_at(name, format!("`{name}` is required")))),
    }
}

/// The default total pressure of `air`, Pa (its `p` parameter's default).
const DEFAULT_P_PA: f64 = 101_325.0;

/// The `p` argument, defaulting to 101.325 kPa, with a warning outside 50..200 kPa.
fn pressure(args: &mut Args) -> Result<Pressure, Diagnostic> {
    let p = args
        .opt_quantity("p", Dim::PRESSURE)?
        .map_or(DEFAULT_P_PA, |q| q.si);
    if p.is_finite() && p > 0.0 && !(air::P_MIN_PA..=air::P_MAX_PA).contains(&p) {
        args.warn(format!(
            "total pressure {:.3} kPa is outside the design range 50 to 200 kPa of the humid-air formulation",
            p / 1e3
        ));
    }
    Ok(Pressure::new::<pascal>(p))
}

/// The air state carried by an `air` record argument.
fn air_arg(args: &mut Args, name: &str) -> Result<AirState, Diagnostic> {
    if let Some(state) = args.take_payload(name, "air", |p: &AirPayload| p.0) {
        return Ok(state);
    }
    let span = args.span_of(name);
    let record = args.record(name, "air")?;
    record.payload::<AirPayload>().map(|p| p.0).ok_or_else(|| {
        Diagnostic::error(
            span,
            format!("argument `{name}` is not an air state made by air(...)"),
        )
    })
}

/// A stream flow: dry-air mass flow, or volumetric flow at `state`.
fn opt_stream(args: &mut Args, name: &str, state: &AirState) -> Result<Option<Stream>, Diagnostic> {
    let Some(arg) = args.take(name) else {
        return Ok(None);
    };
    let q = match &arg.value {
        Value::Quantity(q, _) => *q,
        other => {
            return Err(Diagnostic::error(
                arg.span,
                format!("`{name}` expects a flow, found {}", type_word(other)),
            ))
        }
    };
    let stream = if q.dim == Dim::MASS_FLOW {
        Stream::from_dry_air_flow(*state, MassRate::new::<kilogram_per_second>(q.si))
    } else if q.dim == Dim::VOLUME_FLOW {
        Stream::from_volume_flow(*state, VolumeRate::new::<cubic_meter_per_second>(q.si))
    } else {
        return Err(Diagnostic::error(
            arg.span,
            format!(
                "`{name}` expects a dry-air mass flow [kg/s] or a volumetric flow [m^3/s], found {}",
                crate::eval::dim_words(q.dim)
            ),
        ));
    };
    stream
        .map(Some)
        .map_err(|e| Diagnostic::error(arg.span, format!("`{name}`: {e}")))
}

/// Where each parameter was given (captured before arguments are consumed).
struct Spans {
    call: Span,
    given: Given,
}

/// The given parameters with their spans: up to three inline (`air`'s T, p
/// and second property, without allocating), or any number.
enum Given {
    Few([(&'static str, Span); 3], usize),
    Many(Vec<(&'static str, Span)>),
}

impl Spans {
    fn of(args: &Args) -> Spans {
        let given = args
            .builtin
            .params
            .iter()
            .filter(|p| args.has(p.name))
            .map(|p| (p.name, args.span_of(p.name)))
            .collect();
        Spans {
            call: args.call_span,
            given: Given::Many(given),
        }
    }

    /// An engine error as a diagnostic on the argument it names (else on the call).
    fn blame(&self, e: AirError) -> Diagnostic {
        let name = error_argument(&e);
        let given = match &self.given {
            Given::Few(few, len) => &few[..*len],
            Given::Many(many) => many.as_slice(),
        };
        let span = given
            .iter()
            .find(|(n, _)| *n == name)
            .map_or(self.call, |(_, s)| *s);
        Diagnostic::error(span, e.to_string())
    }
}

/// The language argument an engine error is about.
fn error_argument(e: &AirError) -> &'static str {
    match e {
        AirError::TemperatureOutOfRange { name, .. }
        | AirError::PressureNotPositive { name, .. }
        | AirError::PressureOutOfRange { name, .. }
        | AirError::HumidityRatioNegative { name, .. }
        | AirError::HumidityRatioAboveSaturation { name, .. }
        | AirError::AboveDryBulb { name, .. }
        | AirError::EnthalpyOutOfRange { name, .. }
        | AirError::NotPositive { name, .. }
        | AirError::FractionOutOfRange { name, .. } => name,
        AirError::RelativeHumidityOutOfRange { .. }
        | AirError::RelativeHumidityAboveBoiling { .. } => "rh",
        AirError::WetBulbTooLow { .. } => "wetbulb",
        _ => "",
    }
}

// ---- values ----------------------------------------------------------------------------

fn q(si: f64, dim: Dim, kind: Kind) -> Value {
    Value::Quantity(Quantity::new(si, dim, kind), None)
}

fn abs_t(t_k: f64) -> Value {
    q(t_k, Dim::TEMPERATURE, Kind::AbsoluteTemperature)
}

/// Fields of an `air` record (with the outlet fields a process adds).
const AIR_FIELDS: usize = 20;

/// The fields of an `air` record, in order.
const AIR_RECORD_FIELDS: [&str; 13] = [
    "T",
    "rh",
    "w",
    "dewpoint",
    "wetbulb",
    "h",
    "v",
    "rho",
    "cp",
    "p",
    "pv",
    "w_sat",
    "degree_of_saturation",
];

/// The position of `name` in [`AIR_RECORD_FIELDS`] (evaluated at compile
/// time, where a name not in the list is an error).
const fn field_index(name: &str) -> usize {
    let mut i = 0;
    while i < AIR_RECORD_FIELDS.len() {
        if const_eq(AIR_RECORD_FIELDS[i], name) {
            return i;
        }
        i += 1;
    }
    panic!("not a field of an air record")
}

/// The fields of [`AIR_RECORD_FIELDS`] a caller reads, one bit each by
/// position: those named in `wanted` ([`Args::wanted`]), or all of them when
/// it names none ([`Args::wants`] of each, with one pass over the few names).
fn field_mask(wanted: Option<&[String]>) -> u16 {
    let Some(wanted) = wanted else {
        return (1 << AIR_RECORD_FIELDS.len()) - 1;
    };
    wanted.iter().fold(0, |mask, name| {
        let name = name.as_bytes();
        match AIR_RECORD_FIELDS.iter().position(|f| f.as_bytes() == name) {
            Some(i) => mask | 1 << i,
            None => mask,
        }
    })
}

/// The bit of [`wanted_bits`] that says the caller reads the payload.
const PAYLOAD_BIT: u64 = 1 << 63;

/// [`field_mask`], with [`PAYLOAD_BIT`] set when the caller reads the payload
/// ([`Args::wants_payload`]): what [`air_record`] keeps in its `Args`
/// ([`Args::wanted_mask`]).
fn wanted_bits(wanted: Option<&[String]>) -> u64 {
    let payload = wanted.is_none_or(|w| w.iter().any(|f| f == crate::library::PAYLOAD));
    u64::from(field_mask(wanted)) | if payload { PAYLOAD_BIT } else { 0 }
}

/// The record of an air state, with its payload. Warnings go to `args`.
///
/// Only the fields the caller reads are computed when it says which
/// ([`Args::wants`]; a what-if study's points), except the dew point and
/// wet-bulb where they may fail (see below).
pub fn air_record(args: &mut Args, s: &AirState) -> Result<Record, Diagnostic> {
    let bits = args.wanted_mask(wanted_bits);
    let mask = bits as u16;
    // By position in AIR_RECORD_FIELDS, found at compile time.
    macro_rules! wants {
        ($name:literal) => {
            mask & 1 << const { field_index($name) } != 0
        };
    }
    let room = if args.wanted.is_none() {
        AIR_FIELDS
    } else {
        mask.count_ones() as usize
    };
    let mut record = Record::reusing(FieldName::Borrowed("air"), args.take_spare(), room);
    let fields = record.fields_mut();
    let mut field =
        |name: &'static str, value: Value| fields.push((FieldName::Borrowed(name), value));
    let w = s.humidity_ratio();
    if wants!("T") {
        field("T", abs_t(s.t_kelvin()));
    }
    if wants!("rh") {
        field("rh", q(s.relative_humidity(), Dim::NONE, Kind::Activity));
    }
    if wants!("w") {
        field("w", q(w, Dim::NONE, Kind::HumidityRatio));
    }
    // Near the edges of the formulation an unread dew point or wet-bulb is
    // computed anyway, so that its warning or error is raised just as when
    // the whole record is built: the dew point fails for bone-dry air and
    // below -100 degC (a vapour pressure far under 1 Pa, about -61 degC over
    // ice), the wet-bulb of nearly pure steam (w of tens of kg/kg).
    let near_no_dew_point = w <= 0.0 || s.vapour_pressure().get::<pascal>() < 1.0;
    let near_steam = w > 1.0;
    if wants!("dewpoint") || near_no_dew_point {
        match s.dew_point() {
            Ok(td) => field("dewpoint", abs_t(td.get::<kelvin>())),
            Err(e) => args.warn(format!("no dew point field: {e}")),
        }
    }
    if wants!("wetbulb") || near_steam {
        let twb = s
            .wet_bulb()
            .map_err(|e| Diagnostic::error(args.call_span, e.to_string()))?;
        field("wetbulb", abs_t(twb.get::<kelvin>()));
    }
    if wants!("h") {
        field(
            "h",
            q(s.enthalpy().value, Dim::SPECIFIC_ENERGY, Kind::Plain),
        );
    }
    if wants!("v") || wants!("rho") {
        // rho = (1 + w) / v, as AirState::density, from the volume just computed.
        let v = s.humid_volume().value;
        if wants!("v") {
            field("v", q(v, Dim::SPECIFIC_VOLUME, Kind::Plain));
        }
        if wants!("rho") {
            field("rho", q((1.0 + w) / v, Dim::DENSITY, Kind::Plain));
        }
    }
    if wants!("cp") {
        field(
            "cp",
            q(s.humid_heat().value, Dim::SPECIFIC_HEAT, Kind::Plain),
        );
    }
    if wants!("p") {
        field("p", q(s.p_pascal(), Dim::PRESSURE, Kind::Plain));
    }
    if wants!("pv") {
        field(
            "pv",
            q(
                s.vapour_pressure().get::<pascal>(),
                Dim::PRESSURE,
                Kind::Plain,
            ),
        );
    }
    if wants!("w_sat") || wants!("degree_of_saturation") {
        if let Some(ws) = s.saturation_humidity_ratio() {
            // The degree of saturation w / w_s, from the w_s just computed.
            if wants!("w_sat") {
                field("w_sat", q(ws, Dim::NONE, Kind::HumidityRatio));
            }
            if wants!("degree_of_saturation") {
                field("degree_of_saturation", q(w / ws, Dim::NONE, Kind::Fraction));
            }
        }
    }
    // A caller that named what it reads reads nothing else: the payload only
    // when it passes the record to a parameter reading only that.
    if bits & PAYLOAD_BIT != 0 {
        record.set_payload(AirPayload(*s));
    } else {
        record.payload = None;
    }
    Ok(record)
}

// ---- air(...) ------------------------------------------------------------------------

/// The second properties `air` takes besides T, in declaration order.
const SECOND: [&str; 5] = ["rh", "w", "wetbulb", "dewpoint", "h"];

/// The positions in [`AIR_PARAMS`] of the second properties, in [`SECOND`]'s order.
const SECOND_AT: [usize; 5] = [
    air_param(SECOND[0]),
    air_param(SECOND[1]),
    air_param(SECOND[2]),
    air_param(SECOND[3]),
    air_param(SECOND[4]),
];

fn air_state(args: &mut Args) -> Result<Value, Diagnostic> {
    // The second properties given (positions in SECOND, in declaration
    // order), and the spans engine errors may blame (T, p, the first second
    // property), by parameter position and without allocating.
    const T_AT: usize = air_param("T");
    const P_AT: usize = air_param("p");
    let mut given = [0; 5];
    let mut count = 0;
    let mut few = [("", args.call_span); 3];
    let mut spans_len = 0;
    for (name, at) in [("T", T_AT), ("p", P_AT)] {
        if let Some(span) = args.span_at(at) {
            few[spans_len] = (name, span);
            spans_len += 1;
        }
    }
    let p_given = args.span_at(P_AT).is_some();
    for (k, &at) in SECOND_AT.iter().enumerate() {
        if let Some(span) = args.span_at(at) {
            if count == 0 {
                few[spans_len] = (SECOND[k], span);
                spans_len += 1;
            }
            given[count] = k;
            count += 1;
        }
    }
    let spans = Spans {
        call: args.call_span,
        given: Given::Few(few, spans_len),
    };
    let t = match args.take_si_at(T_AT, Dim::TEMPERATURE, Kind::AbsoluteTemperature) {
        Some(k) => ThermodynamicTemperature::new::<kelvin>(k),
        None => temperature(args, "T")?,
    };
    if count != 1 {
        return Err(not_one_second_property(args, &given[..count]));
    }
    // Without `p`, the default (inside the design range: no warning).
    let p = if p_given {
        pressure(args)?
    } else {
        Pressure::new::<pascal>(DEFAULT_P_PA)
    };
    let state = match given[0] {
        0 => {
            let at = const { air_param("rh") };
            let rh = air_kind(args, at, "rh", Dim::NONE, Kind::Activity)?.unwrap_or(f64::NAN);
            AirState::from_rh(t, rh, p)
        }
        1 => {
            let at = const { air_param("w") };
            let w = air_kind(args, at, "w", Dim::NONE, Kind::HumidityRatio)?;
            AirState::from_w(t, w.unwrap_or(f64::NAN), p)
        }
        2 => AirState::from_wet_bulb(t, temperature(args, "wetbulb")?, p),
        3 => AirState::from_dew_point(t, temperature(args, "dewpoint")?, p),
        _ => {
            let h = args.quantity("h", Dim::SPECIFIC_ENERGY)?.si;
            AirState::from_enthalpy(t, AvailableEnergy::new::<joule_per_kilogram>(h), p)
        }
    }
    .map_err(|e| spans.blame(e))?;
    args.finish()?;
    Ok(Value::Record(air_record(args, &state)?))
}

/// The error of an `air` call given no second property or more than one
/// (`given`: their positions in [`SECOND`]).
#[cold]
fn not_one_second_property(args: &Args, given: &[usize]) -> Diagnostic {
    let names: Vec<&str> = given.iter().map(|&k| SECOND[k]).collect();
    let message = if names.is_empty() {
        "`air` needs one of rh, w, wetbulb, dewpoint or h besides T".to_string()
    } else {
        format!(
            "`air` takes exactly one of rh, w, wetbulb, dewpoint, h; found {}",
            names.join(", ")
        )
    };
    let span = if names.len() > 1 {
        args.span_of(names[1])
    } else {
        args.call_span
    };
    Diagnostic::error(span, message).with_hint(format!("call it as {}", args.builtin.example))
}

// ---- processes --------------------------------------------------------------------------

/// The outlet record of a process with its balance fields.
fn process_record(
    args: &mut Args,
    o: &ProcessOutcome,
    stream: Option<&Stream>,
    water: Option<(&'static str, f64)>,
) -> Result<Value, Diagnostic> {
    let mut r = air_record(args, &o.outlet)?;
    r = r.with("q", q(o.heat.value, Dim::SPECIFIC_ENERGY, Kind::Plain));
    if let Some((name, sign)) = water {
        r = r.with(
            name,
            q(sign * o.water_kg_per_kg_da, Dim::NONE, Kind::HumidityRatio),
        );
    }
    if let Some(s) = stream {
        let m = s.dry_air.get::<kilogram_per_second>();
        let out = Stream::from_dry_air_flow(o.outlet, s.dry_air)
            .map_err(|e| Diagnostic::error(args.call_span, e.to_string()))?;
        r = r
            .with("flow", q(m, Dim::MASS_FLOW, Kind::Plain))
            .with("duty", q(s.duty(o).value, Dim::POWER, Kind::Plain))
            .with(
                "volume_flow",
                q(
                    out.volume_flow().get::<cubic_meter_per_second>(),
                    Dim::VOLUME_FLOW,
                    Kind::Plain,
                ),
            );
        if let Some((name, sign)) = water {
            r = r.with(
                format!("{name}_flow"),
                q(m * sign * o.water_kg_per_kg_da, Dim::MASS_FLOW, Kind::Plain),
            );
        }
    }
    Ok(Value::Record(r))
}

/// `by:` as heat per kg dry air: a specific energy, or a power divided by the stream's dry-air flow.
fn duty_per_kg(
    args: &mut Args,
    stream: Option<&Stream>,
) -> Result<Option<AvailableEnergy>, Diagnostic> {
    let Some(arg) = args.take("by") else {
        return Ok(None);
    };
    let Value::Quantity(value, _) = &arg.value else {
        return Err(Diagnostic::error(
            arg.span,
            format!("`by` expects a quantity, found {}", type_word(&arg.value)),
        ));
    };
    let per_kg = if value.dim == Dim::SPECIFIC_ENERGY {
        value.si
    } else if value.dim == Dim::POWER {
        let s = stream.ok_or_else(|| {
            Diagnostic::error(arg.span, "a duty in power units needs the stream's `flow`")
                .with_hint(
                    "give `flow:` (dry-air kg/s or m^3/s), or the heat per kg dry air in kJ/kg",
                )
        })?;
        value.si / s.dry_air.get::<kilogram_per_second>()
    } else {
        return Err(Diagnostic::error(
            arg.span,
            format!(
                "`by` expects energy per mass [J/kg] or power [W], found {}",
                crate::eval::dim_words(value.dim)
            ),
        ));
    };
    Ok(Some(AvailableEnergy::new::<joule_per_kilogram>(per_kg)))
}

type ToFn = fn(&AirState, ThermodynamicTemperature) -> Result<ProcessOutcome, AirError>;
type ByFn = fn(&AirState, AvailableEnergy) -> Result<ProcessOutcome, AirError>;

fn heat_or_cool(
    args: &mut Args,
    to_fn: ToFn,
    by_fn: ByFn,
    cooling: bool,
) -> Result<Value, Diagnostic> {
    let spans = Spans::of(args);
    let state = air_arg(args, "air")?;
    let stream = opt_stream(args, "flow", &state)?;
    let to = opt_temperature(args, "to")?;
    let by = duty_per_kg(args, stream.as_ref())?;
    args.finish()?;
    let outcome = match (to, by) {
        (Some(t), None) => to_fn(&state, t),
        (None, Some(q)) => by_fn(&state, q),
        _ => {
            return Err(Diagnostic::error(
                args.call_span,
                format!("`{}` needs exactly one of `to` or `by`", args.builtin.name),
            )
            .with_hint(format!("call it as {}", args.builtin.example)))
        }
    }
    .map_err(|e| spans.blame(e))?;
    let water = cooling.then_some(("condensate", -1.0));
    process_record(args, &outcome, stream.as_ref(), water)
}

fn heat(args: &mut Args) -> Result<Value, Diagnostic> {
    heat_or_cool(args, air::heat_to, air::heat_by, false)
}

fn cool(args: &mut Args) -> Result<Value, Diagnostic> {
    heat_or_cool(args, air::cool_to, air::cool_by, true)
}

fn mix(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = Spans::of(args);
    let a = air_arg(args, "a")?;
    let b = air_arg(args, "b")?;
    let sa = opt_stream(args, "flow_a", &a)?
        .ok_or_else(|| args.error_at("flow_a", "`mix` needs `flow_a`"))?;
    let sb = opt_stream(args, "flow_b", &b)?
        .ok_or_else(|| args.error_at("flow_b", "`mix` needs `flow_b`"))?;
    args.finish()?;
    let o = air::mix(&a, sa.dry_air, &b, sb.dry_air).map_err(|e| spans.blame(e))?;
    let m = sa.dry_air.get::<kilogram_per_second>() + sb.dry_air.get::<kilogram_per_second>();
    let mut r = air_record(args, &o.outlet)?.with("flow", q(m, Dim::MASS_FLOW, Kind::Plain));
    if o.water_kg_per_kg_da < 0.0 {
        args.warn("the mixture is supersaturated: fog forms (liquid reported in the field fog)");
        r = r.with(
            "fog",
            q(-o.water_kg_per_kg_da, Dim::NONE, Kind::HumidityRatio),
        );
    }
    Ok(Value::Record(r))
}

fn saturate(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = Spans::of(args);
    let state = air_arg(args, "air")?;
    let e = opt_kind(args, "effectiveness", Dim::NONE, Kind::Fraction)?.unwrap_or(1.0);
    let stream = opt_stream(args, "flow", &state)?;
    args.finish()?;
    let o = air::saturate(&state, e).map_err(|err| spans.blame(err))?;
    process_record(args, &o, stream.as_ref(), Some(("water", 1.0)))
}

/// How much water to add: an amount, or a target w or rh.
enum WaterTarget {
    Amount(f64),
    W(f64),
    Rh(f64),
}

fn water_target(args: &mut Args, stream: Option<&Stream>) -> Result<WaterTarget, Diagnostic> {
    let given: Vec<&str> = ["amount", "to_w", "to_rh"]
        .into_iter()
        .filter(|n| args.has(n))
        .collect();
    if given.len() != 1 {
        return Err(Diagnostic::error(
            args.call_span,
            format!(
                "`{}` needs exactly one of amount, to_w, to_rh",
                args.builtin.name
            ),
        )
        .with_hint(format!("call it as {}", args.builtin.example)));
    }
    match given[0] {
        "to_w" => Ok(WaterTarget::W(
            opt_kind(args, "to_w", Dim::NONE, Kind::HumidityRatio)?.unwrap_or(f64::NAN),
        )),
        "to_rh" => Ok(WaterTarget::Rh(
            opt_kind(args, "to_rh", Dim::NONE, Kind::Activity)?.unwrap_or(f64::NAN),
        )),
        _ => amount(args, stream).map(WaterTarget::Amount),
    }
}

/// `amount:` per kg dry air, or a mass flow divided by the stream's dry-air flow.
fn amount(args: &mut Args, stream: Option<&Stream>) -> Result<f64, Diagnostic> {
    let span = args.span_of("amount");
    let Some(arg) = args.take("amount") else {
        return Err(args.error_at("amount", "missing"));
    };
    let Value::Quantity(v, _) = arg.value else {
        return Err(Diagnostic::error(span, "`amount` expects a quantity"));
    };
    if v.dim == Dim::MASS_FLOW {
        let s = stream
            .ok_or_else(|| Diagnostic::error(span, "a water flow needs the stream's `flow`"))?;
        return Ok(v.si / s.dry_air.get::<kilogram_per_second>());
    }
    v.expect_kind(Dim::NONE, Kind::HumidityRatio)
        .map(|q| q.si)
        .map_err(|e| unit_error(span, args.builtin.name, "amount", e))
}

type AddFn = fn(&AirState, f64, f64) -> Result<ProcessOutcome, AirError>;

fn add_liquid(state: &AirState, dw: f64, t_k: f64) -> Result<ProcessOutcome, AirError> {
    air::add_water(state, dw, ThermodynamicTemperature::new::<kelvin>(t_k))
}

fn add_vapour(state: &AirState, dw: f64, t_k: f64) -> Result<ProcessOutcome, AirError> {
    let h = air::saturated_steam_enthalpy(ThermodynamicTemperature::new::<kelvin>(t_k))?;
    air::add_steam(state, dw, h)
}

/// The water to add to reach a target (Brent's method on the outlet rh for `to_rh`).
fn solve_amount(
    state: &AirState,
    target: WaterTarget,
    t_k: f64,
    add: AddFn,
) -> Result<f64, AirError> {
    let w1 = state.humidity_ratio();
    match target {
        WaterTarget::Amount(dw) => Ok(dw),
        WaterTarget::W(w) if w >= w1 => Ok(w - w1),
        WaterTarget::W(w) => Err(AirError::ProcessOutOfRange {
            what: format!("`to_w` = {w:.6} kg/kg is below the inlet humidity ratio {w1:.6}: adding water cannot dry air"),
        }),
        WaterTarget::Rh(rh) => {
            let rh1 = state.relative_humidity();
            if !(rh.is_finite() && rh >= rh1 && rh <= 1.0) {
                return Err(AirError::ProcessOutOfRange {
                    what: format!("`to_rh` = {:.3} % must lie between the inlet {:.3} % and 100 %", rh * 100.0, rh1 * 100.0),
                });
            }
            let f = |dw: f64| add(state, dw, t_k).map_or(1.0, |o| o.outlet.relative_humidity() - rh);
            let hi = crate::engine::solve::expand_bracket(f, 0.0, 1e-3, 50.0)
                .map_err(|e| AirError::NotConverged { what: "water to reach the target rh", reason: e })?
                .1;
            crate::engine::solve::brent(f, 0.0, hi, crate::engine::solve::Tolerance::new(1e-15, 1e-13))
                .map_err(|e| AirError::NotConverged { what: "water to reach the target rh", reason: e })
        }
    }
}

fn add_generic(
    args: &mut Args,
    t_name: &str,
    t_default_k: f64,
    add: AddFn,
) -> Result<Value, Diagnostic> {
    let spans = Spans::of(args);
    let state = air_arg(args, "air")?;
    let stream = opt_stream(args, "flow", &state)?;
    let target = water_target(args, stream.as_ref())?;
    let t_k = opt_temperature(args, t_name)?.map_or(t_default_k, |t| t.get::<kelvin>());
    args.finish()?;
    let dw = solve_amount(&state, target, t_k, add).map_err(|e| spans.blame(e))?;
    let o = add(&state, dw, t_k).map_err(|e| spans.blame(e))?;
    process_record(args, &o, stream.as_ref(), Some(("water", 1.0)))
}

fn add_water(args: &mut Args) -> Result<Value, Diagnostic> {
    add_generic(args, "water_T", 288.15, add_liquid)
}

fn add_steam(args: &mut Args) -> Result<Value, Diagnostic> {
    add_generic(args, "steam_T", 373.15, add_vapour)
}

// ---- single quantities -------------------------------------------------------------------

fn altitude_pressure(args: &mut Args) -> Result<Value, Diagnostic> {
    let span = args.span_of("z");
    let z = args.quantity("z", Dim::LENGTH)?.si;
    args.finish()?;
    let p = air::standard_atmosphere_pressure(Length::new::<meter>(z))
        .map_err(|e| Diagnostic::error(span, e.to_string()))?;
    Ok(q(p.get::<pascal>(), Dim::PRESSURE, Kind::Plain))
}

fn saturation_pressure(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = Spans::of(args);
    let t = temperature(args, "T")?;
    args.finish()?;
    let p = air::saturation_pressure(t).map_err(|e| spans.blame(e))?;
    Ok(q(p.get::<pascal>(), Dim::PRESSURE, Kind::Plain))
}

fn latent_heat(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = Spans::of(args);
    let t = temperature(args, "T")?;
    args.finish()?;
    air::saturation_pressure_over_water(t).map_err(|e| spans.blame(e))?;
    let t_k = t.get::<kelvin>();
    if !(273.15..=573.15).contains(&t_k) {
        args.warn(format!(
            "latent heat at {:.2} degC is outside 0 to 300 degC, where it is checked against IAPWS-95 within 0.3 %",
            t_k - 273.15
        ));
    }
    Ok(q(
        air::latent_heat_vaporization(t).value,
        Dim::SPECIFIC_ENERGY,
        Kind::Plain,
    ))
}

fn boiling_point(args: &mut Args) -> Result<Value, Diagnostic> {
    let spans = Spans::of(args);
    let p = args.quantity("p", Dim::PRESSURE)?.si;
    args.finish()?;
    let t = air::boiling_point(Pressure::new::<pascal>(p)).map_err(|e| spans.blame(e))?;
    Ok(abs_t(t.get::<kelvin>()))
}

fn transport_of(args: &mut Args) -> Result<Transport, Diagnostic> {
    let s = air_arg(args, "air")?;
    args.finish()?;
    let p = s.pressure().get::<pascal>();
    if !(air::P_MIN_PA..=air::P_MAX_PA).contains(&p) {
        args.warn(format!("total pressure {:.3} kPa is outside 50 to 200 kPa, the range of the transport correlations", p / 1e3));
    }
    Ok(Transport::of(&s))
}

fn air_viscosity(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(
        transport_of(args)?.viscosity_pa_s,
        Dim::DYNAMIC_VISCOSITY,
        Kind::Plain,
    ))
}

fn air_conductivity(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(
        transport_of(args)?.conductivity_w_per_m_k,
        Dim::THERMAL_CONDUCTIVITY,
        Kind::Plain,
    ))
}

fn air_cp(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(
        transport_of(args)?.cp_j_per_kg_k,
        Dim::SPECIFIC_HEAT,
        Kind::Plain,
    ))
}

fn air_density(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(
        transport_of(args)?.density_kg_per_m3,
        Dim::DENSITY,
        Kind::Plain,
    ))
}

fn vapour_diffusivity(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(
        transport_of(args)?.diffusivity_m2_per_s,
        Dim::DIFFUSIVITY,
        Kind::Plain,
    ))
}

fn air_prandtl(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(transport_of(args)?.prandtl(), Dim::NONE, Kind::Plain))
}

fn air_schmidt(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(transport_of(args)?.schmidt(), Dim::NONE, Kind::Plain))
}

fn air_lewis(args: &mut Args) -> Result<Value, Diagnostic> {
    Ok(q(transport_of(args)?.lewis(), Dim::NONE, Kind::Plain))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The default pressure used without a `p` argument is the one the
    /// parameter declares (and the one `pressure` falls back to).
    #[test]
    fn default_pressure_is_the_declared_one() {
        let declared = AIR_PARAMS
            .iter()
            .find(|p| p.name == "p")
            .and_then(|p| p.default);
        assert_eq!(declared, Some("101.325 kPa"));
        assert_eq!(DEFAULT_P_PA, 101.325e3);
        assert!((air::P_MIN_PA..=air::P_MAX_PA).contains(&DEFAULT_P_PA));
    }

    /// The second properties are `air`'s parameters other than T and p, in
    /// declaration order, at the positions `SECOND_AT` gives.
    #[test]
    fn second_properties_are_the_parameters_besides_t_and_p() {
        let declared: Vec<&str> = AIR_PARAMS
            .iter()
            .map(|p| p.name)
            .filter(|n| *n != "T" && *n != "p")
            .collect();
        assert_eq!(declared, SECOND);
        for (k, name) in SECOND.iter().enumerate() {
            assert_eq!(AIR_PARAMS[SECOND_AT[k]].name, *name);
        }
    }

    /// The bits an `Args` keeps are worked out afresh whenever its wanted
    /// list changes, and say what `Args::wants` / `Args::wants_payload` say.
    #[test]
    fn kept_wanted_bits_follow_the_wanted_list() {
        let builtin = crate::library::find("air").expect("air is registered");
        let mut args = Args::unbound(builtin, Span::default());
        let lists: &[Option<&[&str]>] = &[
            None,
            Some(&["wetbulb"]),
            Some(&["wetbulb"]),
            Some(&["payload", "h"]),
            None,
            Some(&[]),
        ];
        for list in lists {
            args.wanted = list.map(|l| l.iter().map(|n| n.to_string()).collect());
            for _ in 0..2 {
                let bits = args.wanted_mask(wanted_bits);
                assert_eq!(bits & PAYLOAD_BIT != 0, args.wants_payload(), "{list:?}");
                for (i, field) in AIR_RECORD_FIELDS.iter().enumerate() {
                    assert_eq!(bits & 1 << i != 0, args.wants(field), "{list:?} {field}");
                }
            }
        }
    }

    /// The field mask has the bit of each field a caller names (and no other),
    /// as `Args::wants` answers field by field, and every bit without names.
    #[test]
    fn field_mask_is_what_wants_answers() {
        let cases: &[&[&str]] = &[
            &[],
            &["wetbulb"],
            &["T", "degree_of_saturation", "payload", "nonsense"],
            &["rho", "v", "rho"],
        ];
        for names in cases {
            let wanted: Vec<String> = names.iter().map(|n| n.to_string()).collect();
            let mask = field_mask(Some(&wanted));
            for (i, field) in AIR_RECORD_FIELDS.iter().enumerate() {
                assert_eq!(
                    mask & 1 << i != 0,
                    names.contains(field),
                    "{names:?} {field}"
                );
            }
        }
        assert_eq!(
            field_mask(None).count_ones() as usize,
            AIR_RECORD_FIELDS.len()
        );
    }
}
