//! Dryer built-ins: a wet product, belt zones, belt and tunnel dryers, tray
//! (batch) dryers, through-circulation deep beds and direct rotary dryers.
//!
//! Each built-in checks dimensions, kinds and signs here, builds the typed
//! engine model of `engine::dryers`, runs it and returns a record with the key
//! results as fields with units, a table of energy flows, a profile or history
//! table, the closure of the mass and energy balances and the cautions text.
//! The engine's design warnings (product above its maximum temperature, exhaust
//! near saturation, correlations outside their range) become call warnings; an
//! infeasible design is an error on the argument that makes it infeasible.
//! Methods and sources: docs/methods/dryers.md.

use std::any::Any;
use std::sync::Arc;

use uom::si::f64::{DynamicViscosity, Length, MassDensity, ThermodynamicTemperature, Velocity};

use super::{type_word, Args, Builtin};
use crate::diag::{Diagnostic, Span};
use crate::engine::air::AirState;
use crate::engine::dryers::batch::{BatchDryer, BatchResult, BatchSample, Element, Fan};
use crate::engine::dryers::continuous::{Belt, BeltResult, Flow, Zone};
use crate::engine::dryers::product::{Equilibrium, FallingRate, Product, Surface};
use crate::engine::dryers::rotary::{Rotary, RotaryResult};
use crate::engine::dryers::{ergun, Closure, DryerError, EnergyFlows, CAUTIONS};
use crate::engine::sorption::{Isotherm, Material};
use crate::engine::transfer;
use crate::engine::transport::Transport;
use crate::library::air::{air_record, AirPayload};
use crate::library::sorption::isotherm_record;
use crate::render::plot::{drying_curve, AxisUnits, Curve, PlotBuilder};
use crate::units::{parse_unit, Dim, Kind, Quantity};
use crate::value::{Column, Payload, Plot, Record, SeriesStyle, Table, Value};

mod params;
use params::*;

/// Published sources shared by the dryer built-ins.
const SOURCE_BALANCES: &str = "Mujumdar (ed.), Handbook of Industrial Drying, 4th ed. (2014), chapters on dryer \
calculations and energy; Keey, Drying of Loose and Particulate Materials (1992); McCabe, Smith and Harriott, \
Unit Operations of Chemical Engineering, 7th ed., ch. 24; Chilton and Colburn, Ind. Eng. Chem. 26 (1934) 1183";

/// The dryer family.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "wet_product",
        family: "dryers",
        params: WET_PRODUCT,
        returns: "wet_product record: cp_solid, X_critical, X_eq, exponent, T_max",
        doc: "A product as the dryer models need it: specific heat of the dry solid, critical moisture content (end of the constant-rate period), equilibrium moisture content, the shape of the falling-rate period and, optionally, the maximum temperature the product may reach. Pass it to belt_dryer, tray_dryer, deep_bed or rotary_dryer.",
        method: "constant rate above X_critical; rate fraction ((X - X_eq)/(X_critical - X_eq))^n below it (n = 1: linear falling rate)",
        source: "McCabe, Smith and Harriott, Unit Operations of Chemical Engineering, 7th ed., ch. 24; Geankoplis, Transport Processes and Separation Process Principles, 4th ed., sections 9.5-9.7",
        validity: "X_critical >= X_eq >= 0; exponent > 0; the falling-rate law is an empirical fit to drying curves of the product",
        example: "wet_product(cp_solid: 1.5 kJ/(kg*K), X_critical: 0.6 db, X_eq: 0.05 db, T_max: 75 degC)",
        func: wet_product,
    },
    Builtin {
        name: "belt_zone",
        family: "dryers",
        params: BELT_ZONE,
        returns: "belt_zone record: the zone's air, heater, recirculation, flow direction and fan",
        doc: "One zone of a belt or tunnel dryer: fresh air heated to T_supply, a dry-air flow along the zone, cocurrent or countercurrent to the product, part of the exhaust recirculated to the heater, wall losses and a fan. Give every zone a length except the last, whose length belt_dryer solves for the target moisture.",
        method: "zone inputs checked here; see belt_dryer for the model",
        source: SOURCE_BALANCES,
        validity: "recirculated 0-95 %; air flow, h positive; supply at or above the fresh air; the supply air must be able to take up water",
        example: "belt_zone(air: air(T: 20 degC, rh: 60 %), T_supply: 90 degC, air_flow: 3 kg/s, h: 30 W/(m^2*K), length: 10 m, recirculated: 50 %)",
        func: belt_zone,
    },
    Builtin {
        name: "belt_dryer",
        family: "dryers",
        params: BELT_DRYER,
        returns: "belt_dryer record: length, residence_time, belt_speed, zone_lengths, X_out, T_out, water, heater, fan, specific_energy, latent_minimum, efficiency, closure, periods, exhaust margins, tables zones, energy and profile, cautions",
        doc: "Continuous belt or tunnel dryer: the product moves along the zones at belt speed throughput/(width x load) while each zone's air flows with it or against it. Returns the profiles of moisture, product temperature, air temperature and humidity along the length, the length of the last zone (and so of the belt) for the target moisture, the heater and fan duties, energy per kg of water against the latent-heat minimum, and the energy flow table with the closure of the balances.",
        method: "product-air exchange per segment with NTU for heat and for water (Chilton-Colburn k_Y = h/(c_s Le^2/3)); cocurrent zones marched, countercurrent zones by alternate sweeps until the air profile settles; recirculation loops by fixed point with Aitken acceleration; last zone length by Brent's method",
        source: SOURCE_BALANCES,
        validity: "air temperature -40 to 350 degC; product below boiling; one product temperature through the layer; target above the equilibrium moisture in the supply air; belts up to 20 km",
        example: "belt_dryer(product: p, zones: [z1, z2], throughput: 400 kg/h, width: 2 m, load: 12 kg/m^2, X_in: 1.5 db, X_out: 0.1 db)",
        func: belt_dryer,
    },
    Builtin {
        name: "tray_dryer",
        family: "dryers",
        params: TRAY_DRYER,
        returns: "tray_dryer record: batch_time, tray_times, water, heater, heater_energy, fan, specific_energy, latent_minimum, efficiency, closure, exhaust margins, tables energy and history, cautions",
        doc: "Batch tray or truck dryer: the supply air crosses the trays in series, cooling and taking up water on the way, so trays further along the air path dry later. Fresh air is mixed with the recirculated part of the exhaust and heated to T_supply. Returns the drying time of each tray and of the load, the drying curves (history table), heater and fan energy and mean duty, energy per kg of water against the latent-heat minimum, thermal efficiency and the energy flow table with the balance closure.",
        method: "explicit time steps of the product-air exchange on every tray (NTU for heat and water, Chilton-Colburn k_Y), recirculation loop solved in each step",
        source: SOURCE_BALANCES,
        validity: "trays 1-200; air temperature -40 to 350 degC; one product temperature through each tray; target above the equilibrium moisture in the supply air",
        example: "tray_dryer(product: p, trays: 10, tray_area: 0.8 m^2, load: 15 kg/m^2, X_initial: 1.5 db, X_final: 0.1 db, air: air(T: 20 degC, rh: 50 %), T_supply: 70 degC, air_flow: 1 kg/s, h: 30 W/(m^2*K))",
        func: tray_dryer,
    },
    Builtin {
        name: "deep_bed",
        family: "dryers",
        params: DEEP_BED,
        returns: "deep_bed record: batch_time, layer_times, pressure_drop, h, specific_area, air_flow, heater, fan, energy figures, closure, tables energy and history, cautions",
        doc: "Through-circulation deep bed: air flows up (or down) through a packed bed of wet particles cut into layers; a drying front moves through the bed while the outlet air stays cool and humid. Layer exchange area a A dz with a = 6(1 - voidage)/d_p; fluid-to-particle coefficient by Wakao-Kaguei unless h is given; fan pressure from the Ergun equation plus extra_pressure. Returns the time for each layer and for the bed, outlet air temperature and humidity against time (history table), fan power and the energy figures.",
        method: "layers as elements in series on the air path (same exchange as tray_dryer); Wakao-Kaguei Nu = 2 + 1.1 Pr^1/3 Re^0.6; Ergun pressure drop",
        source: "Ergun, Chem. Eng. Prog. 48 (1952) 89-94; Wakao, Kaguei and Funazkri, Chem. Eng. Sci. 34 (1979) 325-336; Keey, Drying of Loose and Particulate Materials (1992)",
        validity: "voidage 0-1 (Ergun fitted on 0.3-0.6); particle Re 15-8500 for Wakao-Kaguei (warned outside); layers 2-200; rigid bed (no shrinkage)",
        example: "deep_bed(product: p, depth: 0.4 m, bed_area: 2 m^2, particle_diameter: 6 mm, voidage: 0.4, bulk_density: 550 kg/m^3, X_initial: 0.6 db, X_final: 0.12 db, air: air(T: 20 degC, rh: 50 %), T_supply: 60 degC, velocity: 0.5 m/s)",
        func: deep_bed,
    },
    Builtin {
        name: "rotary_dryer",
        family: "dryers",
        params: ROTARY_DRYER,
        returns: "rotary_dryer record: gas_flow, gas_out, length, L_over_D, retention_time, holdup, Ua, G, water, heater, fan, energy figures, closure, energy table, cautions",
        doc: "Direct-heat rotary dryer design case: the dry-gas flow follows from the energy balance for the chosen gas outlet temperature, the drum volume from McCormick's volumetric coefficient Ua = 0.5 G^0.67/D (Btu/(h ft^3 degF), G in lb/(h ft^2), D in ft; about 237 G^0.67/D W/(m^3 K) in SI) and one log-mean temperature difference, and the retention time from Friedman and Marshall's correlation. Heater duty counts the gas heated from `ambient`.",
        method: "steady energy and water balances; McCormick volumetric coefficient; Friedman-Marshall retention time 0.23 L/(S N^0.9 D) +/- 0.6 B L G/F, B = 5 dp^-0.5",
        source: "Perry's Chemical Engineers' Handbook, section on solids drying (McCormick; Friedman and Marshall, Chem. Eng. Prog. 45 (1949) 482-493, 573-588), from memory; Geankoplis, Transport Processes and Separation Process Principles, 4th ed., section 9.10",
        validity: "gas mass velocity about 0.5-5 kg/(m^2 s) (warned outside); holdup 3-15 % of the drum (warned outside); one log-mean difference over the drum (a simplification)",
        example: "rotary_dryer(product: p, throughput: 3.6 t/h, X_in: 0.25 db, X_out: 0.02 db, T_solid_in: 20 degC, T_solid_out: 80 degC, gas: air(T: 300 degC, w: 0.02 kg/kg_da), T_gas_out: 120 degC, diameter: 1.8 m, slope: 0.04, speed: 4 min^-1, particle_diameter: 500 um)",
        func: rotary_dryer,
    },
];

// ---------------------------------------------------------------------------
// Payloads
// ---------------------------------------------------------------------------

/// The typed product carried by a `wet_product` record.
#[derive(Debug)]
pub struct ProductPayload(pub Product);

impl Payload for ProductPayload {
    fn as_any(&self) -> &dyn Any {
        self
    }
}

/// The typed zone carried by a `belt_zone` record.
#[derive(Debug)]
pub struct ZonePayload(pub Zone);

impl Payload for ZonePayload {
    fn as_any(&self) -> &dyn Any {
        self
    }
}

// ---------------------------------------------------------------------------
// Blame: engine errors on the argument they are about
// ---------------------------------------------------------------------------

/// Where each parameter was given, and which engine names belong to which parameter.
struct Blame {
    builtin: &'static str,
    call: Span,
    given: Vec<(&'static str, Span)>,
    names: &'static [(&'static str, &'static str)],
}

impl Blame {
    /// Capture the spans before the arguments are consumed.
    fn of(args: &Args, names: &'static [(&'static str, &'static str)]) -> Blame {
        let given = args
            .builtin
            .params
            .iter()
            .filter(|p| args.has(p.name))
            .map(|p| (p.name, args.span_of(p.name)))
            .collect();
        Blame {
            builtin: args.builtin.name,
            call: args.call_span,
            given,
            names,
        }
    }

    fn span(&self, param: &str) -> Span {
        self.given
            .iter()
            .find(|(n, _)| *n == param)
            .map_or(self.call, |(_, s)| *s)
    }

    /// The engine error as a diagnostic on the argument it names, else on the call.
    fn error(&self, e: DryerError) -> Diagnostic {
        let key = match &e {
            DryerError::Invalid { name, .. } => *name,
            DryerError::BelowEquilibrium { .. } => "target",
            DryerError::AirSaturates { what } if what.starts_with("the supply air") => "supply air",
            DryerError::AirSaturates { .. } => "saturates",
            DryerError::NotConverged { .. } | DryerError::Air(_) => "",
        };
        let span = self
            .names
            .iter()
            .find(|(k, _)| *k == key)
            .map_or(self.call, |(_, p)| self.span(p));
        let d = Diagnostic::error(span, format!("`{}`: {e}", self.builtin));
        match e {
            DryerError::BelowEquilibrium { .. } => d.with_hint(
                "the equilibrium moisture comes from the product (X_eq) and the supply air",
            ),
            _ => d,
        }
    }
}

// ---------------------------------------------------------------------------
// Argument helpers
// ---------------------------------------------------------------------------

/// The parameters that read nothing of the record given to them but its
/// engine state ([`crate::library::Builtin::reads_only_payload`]), as
/// (built-in, parameter): each is read only through [`air_arg`], which takes
/// the `AirState` payload (a record without one is an error, with or without
/// fields), and otherwise only for the span of its argument ([`Blame`]); none
/// keeps the record or returns it (the air records of the results are built
/// afresh from the engine's states).
pub const PAYLOAD_ONLY: &[(&str, &str)] = &[
    ("belt_zone", "air"),
    ("tray_dryer", "air"),
    ("deep_bed", "air"),
    ("rotary_dryer", "gas"),
];

fn air_arg(args: &mut Args, name: &str) -> Result<AirState, Diagnostic> {
    let span = args.span_of(name);
    let record = args.record(name, "air")?;
    record.payload::<AirPayload>().map(|p| p.0).ok_or_else(|| {
        Diagnostic::error(
            span,
            format!("argument `{name}` is not an air state made by air(...)"),
        )
    })
}

fn product_arg(args: &mut Args) -> Result<Product, Diagnostic> {
    let span = args.span_of("product");
    let record = args.record("product", "wet_product")?;
    record
        .payload::<ProductPayload>()
        .map(|p| p.0.clone())
        .ok_or_else(|| Diagnostic::error(span, "`product` must be made by wet_product(...)"))
}

/// A quantity of `dim` and `kind` (kind rules of the unit system), SI magnitude.
fn kinded(args: &mut Args, name: &str, dim: Dim, kind: Kind) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of(name);
    match args.opt_quantity(name, dim)? {
        Some(q) => q
            .expect_kind(dim, kind)
            .map(|q| Some(q.si))
            .map_err(|e| Diagnostic::error(span, format!("`{name}`: {e}"))),
        None => Ok(None),
    }
}

fn required<T>(args: &Args, name: &str, value: Option<T>) -> Result<T, Diagnostic> {
    value.ok_or_else(|| {
        Diagnostic::error(
            args.call_span,
            format!("`{}` needs the argument `{name}`", args.builtin.name),
        )
        .with_hint(format!("call it as {}", args.builtin.example))
    })
}

/// A finite value checked against a rule, blamed on its argument.
fn checked(
    span: Span,
    name: &str,
    value: f64,
    ok: bool,
    expected: &str,
) -> Result<f64, Diagnostic> {
    if value.is_finite() && ok {
        Ok(value)
    } else {
        Err(Diagnostic::error(
            span,
            format!("`{name}` must be {expected}, got {value}"),
        ))
    }
}

/// A required positive quantity of `dim`, SI.
fn positive(args: &mut Args, name: &str, dim: Dim) -> Result<f64, Diagnostic> {
    let span = args.span_of(name);
    let q = args.quantity(name, dim)?;
    let unit = dim.si_unit();
    checked(span, name, q.si, q.si > 0.0, "positive").map_err(|_| {
        Diagnostic::error(
            span,
            format!("`{name}` must be positive, got {} {unit}", q.si),
        )
    })
}

/// An optional non-negative quantity of `dim` with a default, SI.
fn non_negative_or(args: &mut Args, name: &str, dim: Dim, default: f64) -> Result<f64, Diagnostic> {
    let span = args.span_of(name);
    match args.opt_quantity(name, dim)? {
        Some(q) => checked(span, name, q.si, q.si >= 0.0, "zero or positive"),
        None => Ok(default),
    }
}

/// A required dry-basis moisture content (db or a plain number), at least 0.
fn moisture(args: &mut Args, name: &str) -> Result<f64, Diagnostic> {
    let span = args.span_of(name);
    let x = kinded(args, name, Dim::NONE, Kind::Moisture)?;
    let x = required(args, name, x)?;
    checked(
        span,
        name,
        x,
        x >= 0.0,
        "a moisture content of at least 0 db",
    )
}

/// An absolute temperature, K.
fn temperature(args: &mut Args, name: &str) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of(name);
    match kinded(args, name, Dim::TEMPERATURE, Kind::AbsoluteTemperature)? {
        Some(t) => checked(span, name, t, t > 0.0, "above absolute zero").map(Some),
        None => Ok(None),
    }
}

fn required_temperature(args: &mut Args, name: &str) -> Result<f64, Diagnostic> {
    let t = temperature(args, name)?;
    required(args, name, t)
}

/// A fraction (plain or %), with a default.
fn fraction_or(args: &mut Args, name: &str, default: f64) -> Result<f64, Diagnostic> {
    let span = args.span_of(name);
    match kinded(args, name, Dim::NONE, Kind::Fraction)? {
        Some(x) => checked(span, name, x, true, "a finite fraction"),
        None => Ok(default),
    }
}

/// A whole number between `lo` and `hi`.
fn count(
    args: &mut Args,
    name: &str,
    lo: usize,
    hi: usize,
    default: Option<usize>,
) -> Result<usize, Diagnostic> {
    let span = args.span_of(name);
    let Some(q) = args.opt_quantity(name, Dim::NONE)? else {
        return required(args, name, default);
    };
    let n = q.si.round();
    if (q.si - n).abs() > 1e-9 || n < lo as f64 || n > hi as f64 {
        return Err(Diagnostic::error(
            span,
            format!(
                "`{name}` must be a whole number from {lo} to {hi}, got {}",
                q.si
            ),
        ));
    }
    Ok(n as usize)
}

/// A word from a list, with a default.
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
        _ => {
            let words: Vec<String> = allowed.iter().map(|w| format!("\"{w}\"")).collect();
            Err(Diagnostic::error(
                arg.span,
                format!("`{name}` must be one of {}", words.join(", ")),
            ))
        }
    }
}

fn flow_direction(args: &mut Args, default: &str) -> Result<Flow, Diagnostic> {
    let w = word(args, "flow", &["cocurrent", "countercurrent"], default)?;
    Ok(if w == "countercurrent" {
        Flow::Countercurrent
    } else {
        Flow::Cocurrent
    })
}

fn kelvin(t: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<uom::si::thermodynamic_temperature::kelvin>(t)
}

/// The supply air: fresh air heated to `t_supply` (no recirculation), blamed on `T_supply`.
fn supply_air(fresh: &AirState, t_supply: f64, span: Span) -> Result<AirState, Diagnostic> {
    AirState::from_w(kelvin(t_supply), fresh.humidity_ratio(), fresh.pressure())
        .map_err(|e| Diagnostic::error(span, format!("`T_supply`: {e}")))
}

/// The Lewis number: given, or from the supply air's transport properties.
fn lewis(args: &mut Args, supply: &AirState) -> Result<f64, Diagnostic> {
    let span = args.span_of("lewis");
    match args.opt_quantity("lewis", Dim::NONE)? {
        Some(q) => checked(span, "lewis", q.si, q.si > 0.0, "positive"),
        None => Ok(Transport::of(supply).lewis()),
    }
}

fn fan(args: &mut Args) -> Result<Fan, Diagnostic> {
    Ok(Fan {
        pressure_rise_pa: non_negative_or(args, "fan_pressure", Dim::PRESSURE, 0.0)?,
        efficiency: fraction_or(args, "fan_efficiency", 0.6)?,
    })
}

// ---------------------------------------------------------------------------
// Values
// ---------------------------------------------------------------------------

fn q(si: f64, dim: Dim, kind: Kind) -> Value {
    Value::Quantity(Quantity::new(si, dim, kind), None)
}

/// A quantity shown in the trade's usual unit (the value stays SI).
fn shown(si: f64, dim: Dim, unit: &str) -> Value {
    Value::Quantity(Quantity::new(si, dim, Kind::Plain), parse_unit(unit).ok())
}

fn abs_t(k: f64) -> Value {
    Value::Quantity(
        Quantity::new(k, Dim::TEMPERATURE, Kind::AbsoluteTemperature),
        parse_unit("degC").ok(),
    )
}

fn delta_t(k: f64) -> Value {
    q(k, Dim::TEMPERATURE, Kind::TemperatureDifference)
}

fn moisture_v(x: f64) -> Value {
    q(x, Dim::NONE, Kind::Moisture)
}

fn fraction_v(x: f64) -> Value {
    Value::Quantity(
        Quantity::new(x, Dim::NONE, Kind::Fraction),
        parse_unit("%").ok(),
    )
}

fn number(x: f64) -> Value {
    Value::Quantity(Quantity::number(x), None)
}

fn column(name: &str, unit: Option<&str>, cells: Vec<Value>) -> Column {
    Column {
        name: name.to_string(),
        unit: unit.and_then(|u| parse_unit(u).ok()),
        cells,
    }
}

fn cautions() -> Value {
    Value::Str(CAUTIONS.join("\n"))
}

/// Closure fields: water and energy residuals (relative) and the larger of the two.
fn with_closure(r: Record, c: &Closure) -> Record {
    r.with("closure_water", number(c.water_relative))
        .with("closure_energy", number(c.energy_relative))
        .with(
            "closure",
            number(c.water_relative.abs().max(c.energy_relative.abs())),
        )
}

/// Figures of merit shared by every dryer: per kg of water and efficiency.
fn with_merit(r: Record, f: &EnergyFlows, latent_minimum: f64) -> Record {
    r.with(
        "specific_energy",
        shown(f.specific_energy_j_per_kg(), Dim::SPECIFIC_ENERGY, "kJ/kg"),
    )
    .with(
        "latent_minimum",
        shown(latent_minimum, Dim::SPECIFIC_ENERGY, "kJ/kg"),
    )
    .with("efficiency", fraction_v(f.thermal_efficiency()))
}

/// The energy flow table. `dim`/`unit` say whether the flows are totals (J) or rates (W).
fn energy_table(f: &EnergyFlows, dim: Dim, unit: &str) -> Table {
    let rows = f.rows();
    let mut names = Vec::new();
    let mut amounts = Vec::new();
    let mut per_kg = Vec::new();
    let mut shares = Vec::new();
    for (name, amount) in rows {
        names.push(Value::Str(name.to_string()));
        amounts.push(q(amount, dim, Kind::Plain));
        per_kg.push(q(amount / f.water, Dim::SPECIFIC_ENERGY, Kind::Plain));
        shares.push(q(amount / f.heater, Dim::NONE, Kind::Fraction));
    }
    Table {
        title: Some("energy flows".into()),
        columns: vec![
            column("flow", None, names),
            column("amount", Some(unit), amounts),
            column("per kg water", Some("kJ/kg"), per_kg),
            column("share of heater", Some("%"), shares),
        ],
    }
}

/// Builder helpers for dryer records.
trait DryerRecord {
    /// The `exhaust_margin` field (exhaust temperature above its dew point), left
    /// out when the exhaust is bone dry and has no dew point.
    fn with_margin(self, margin: f64) -> Record;
}

impl DryerRecord for Record {
    fn with_margin(self, margin: f64) -> Record {
        if margin.is_finite() {
            self.with("exhaust_margin", delta_t(margin))
        } else {
            self
        }
    }
}

/// Temperature above dew point of an air state, K (None when no dew point).
fn dew_margin(a: &AirState) -> Option<f64> {
    a.dew_point().ok().map(|d| a.t_kelvin() - d.value)
}

/// Over a run's exhaust states: the smallest margin above the dew point, K
/// (infinite when none has a dew point), and the highest relative humidity.
fn exhaust_extremes<'a>(exhausts: impl Iterator<Item = &'a AirState>) -> (f64, f64) {
    exhausts.fold((f64::INFINITY, 0.0), |(margin, rh), e| {
        let margin = dew_margin(e).map_or(margin, |m| margin.min(m));
        (margin, rh.max(e.relative_humidity()))
    })
}

fn warn_all(args: &mut Args, warnings: &[String]) {
    for w in warnings {
        args.warn(w.clone());
    }
}

// ---------------------------------------------------------------------------
// wet_product
// ---------------------------------------------------------------------------

/// The isotherm in a sorption record: an `isotherm`, a `material`, or a fit with an `isotherm` field.
fn isotherm_of(record: &Record) -> Option<Isotherm> {
    if let Some(iso) = record.payload::<Isotherm>() {
        return Some(iso.clone());
    }
    if let Some(m) = record.payload::<Material>() {
        return Some(m.isotherm.clone());
    }
    match record.get("isotherm") {
        Some(Value::Record(inner)) => inner.payload::<Isotherm>().cloned(),
        _ => None,
    }
}

/// The `material` argument, if given.
fn material_arg(args: &mut Args) -> Result<Option<Material>, Diagnostic> {
    let Some(arg) = args.take("material") else {
        return Ok(None);
    };
    match &arg.value {
        Value::Record(r) if r.payload::<Material>().is_some() => {
            Ok(r.payload::<Material>().cloned())
        }
        other => Err(Diagnostic::error(
            arg.span,
            format!(
                "`material` must be a material record (from the sorption family), found {}",
                type_word(other)
            ),
        )),
    }
}

/// `X_eq`: a constant moisture, or an isotherm (isotherm, material or fit record).
fn equilibrium_arg(
    args: &mut Args,
    material: Option<&Material>,
) -> Result<(Equilibrium, Value), Diagnostic> {
    let from_material = material.map(|m| m.isotherm.clone());
    let Some(arg) = args.take("X_eq") else {
        return Ok(match from_material {
            Some(iso) => isotherm_equilibrium(iso),
            None => (Equilibrium::Constant(0.0), moisture_v(0.0)),
        });
    };
    match &arg.value {
        Value::Record(r) => isotherm_of(r).map(isotherm_equilibrium).ok_or_else(|| {
            Diagnostic::error(
                arg.span,
                format!(
                    "`X_eq` must be a moisture content or an isotherm, found {}",
                    type_word(&arg.value)
                ),
            )
        }),
        Value::Quantity(q, _) => {
            let x = q
                .expect_kind(Dim::NONE, Kind::Moisture)
                .map_err(|e| Diagnostic::error(arg.span, format!("`X_eq`: {e}")))?
                .si;
            let x = checked(
                arg.span,
                "X_eq",
                x,
                x >= 0.0,
                "a moisture content of at least 0 db",
            )?;
            Ok((Equilibrium::Constant(x), moisture_v(x)))
        }
        other => Err(Diagnostic::error(
            arg.span,
            format!(
                "`X_eq` must be a moisture content or an isotherm, found {}",
                type_word(other)
            ),
        )),
    }
}

/// Equilibrium from an isotherm, at the air's temperature and relative humidity.
fn isotherm_equilibrium(iso: Isotherm) -> (Equilibrium, Value) {
    let shown = Value::Record(isotherm_record(iso.clone()));
    let curve = move |t_k: f64, rh: f64| iso.moisture_raw(rh.clamp(0.0, 1.0), t_k);
    (Equilibrium::Curve(Arc::new(curve)), shown)
}

fn wet_product(args: &mut Args) -> Result<Value, Diagnostic> {
    let material = material_arg(args)?;
    let cp_span = args.span_of("cp_solid");
    let cp = match (args.has("cp_solid"), &material) {
        (false, Some(m)) => m.cp_solid.value,
        _ => positive(args, "cp_solid", Dim::SPECIFIC_HEAT)?,
    };
    let xc = match (
        args.has("X_critical"),
        material.as_ref().and_then(|m| m.critical_moisture_db),
    ) {
        (false, Some(x)) => x,
        _ => moisture(args, "X_critical")?,
    };
    let xe_span = args.span_of("X_eq");
    let (equilibrium, xe_value) = equilibrium_arg(args, material.as_ref())?;
    if let Equilibrium::Constant(xe) = equilibrium {
        checked(xe_span, "X_eq", xe, xe <= xc, "between 0 db and X_critical")?;
    }
    let n_span = args.span_of("exponent");
    let n = args
        .opt_quantity("exponent", Dim::NONE)?
        .map_or(1.0, |q| q.si);
    checked(n_span, "exponent", n, n > 0.0, "positive")?;
    let t_max = match temperature(args, "T_max")? {
        Some(t) => Some(t),
        None => material
            .as_ref()
            .and_then(|m| m.max_product_temperature)
            .map(|t| t.value),
    };
    args.finish()?;
    checked(cp_span, "cp_solid", cp, cp > 0.0, "positive")?;
    let product = Product {
        cp_solid_j_per_kg_k: cp,
        x_critical_db: xc,
        equilibrium,
        falling: if n == 1.0 {
            FallingRate::Linear
        } else {
            FallingRate::Power(n)
        },
        t_max_k: t_max,
    };
    let mut r = Record::new("wet_product")
        .with("cp_solid", q(cp, Dim::SPECIFIC_HEAT, Kind::Plain))
        .with("X_critical", moisture_v(xc))
        .with("X_eq", xe_value)
        .with("exponent", number(n));
    if let Some(t) = t_max {
        r = r.with("T_max", abs_t(t));
    }
    r.payload = Some(Arc::new(ProductPayload(product)));
    Ok(Value::Record(r))
}

// ---------------------------------------------------------------------------
// belt_zone and belt_dryer
// ---------------------------------------------------------------------------

const ZONE_NAMES: &[(&str, &str)] = &[
    ("zone length", "length"),
    ("zone air flow", "air_flow"),
    ("recirculated fraction", "recirculated"),
    ("heat transfer coefficient", "h"),
    ("Lewis number", "lewis"),
    ("wall loss", "wall_loss"),
    ("fan pressure rise", "fan_pressure"),
    ("fan efficiency", "fan_efficiency"),
    ("supply temperature", "T_supply"),
    ("supply air", "air"),
];

fn belt_zone(args: &mut Args) -> Result<Value, Diagnostic> {
    let blame = Blame::of(args, ZONE_NAMES);
    let fresh = air_arg(args, "air")?;
    let t_supply = required_temperature(args, "T_supply")?;
    let supply = supply_air(&fresh, t_supply, blame.span("T_supply"))?;
    let m = positive(args, "air_flow", Dim::MASS_FLOW)?;
    let h = positive(args, "h", Dim::HEAT_TRANSFER_COEFFICIENT)?;
    let length = match args.opt_quantity("length", Dim::LENGTH)? {
        Some(l) => Some(checked(
            blame.span("length"),
            "length",
            l.si,
            l.si > 0.0,
            "positive",
        )?),
        None => None,
    };
    let flow = flow_direction(args, "cocurrent")?;
    let zone = Zone {
        length_m: length,
        fresh_air: fresh,
        supply_t_k: t_supply,
        dry_air_kg_per_s: m,
        recirculated: fraction_or(args, "recirculated", 0.0)?,
        flow,
        surface: Surface {
            h_w_per_m2_k: h,
            lewis: lewis(args, &supply)?,
        },
        loss_w_per_m_k: non_negative_or(args, "wall_loss", Dim::THERMAL_CONDUCTIVITY, 0.0)?,
        fan: fan(args)?,
    };
    args.finish()?;
    zone.validate().map_err(|e| blame.error(e))?;
    Ok(Value::Record(zone_record(zone)))
}

fn zone_record(zone: Zone) -> Record {
    let flow = match zone.flow {
        Flow::Cocurrent => "cocurrent",
        Flow::Countercurrent => "countercurrent",
    };
    let mut r = Record::new("belt_zone");
    if let Some(l) = zone.length_m {
        r = r.with("length", q(l, Dim::LENGTH, Kind::Plain));
    }
    r = r
        .with("T_supply", abs_t(zone.supply_t_k))
        .with(
            "air_flow",
            q(zone.dry_air_kg_per_s, Dim::MASS_FLOW, Kind::Plain),
        )
        .with("recirculated", fraction_v(zone.recirculated))
        .with("flow", Value::Str(flow.into()))
        .with(
            "h",
            q(
                zone.surface.h_w_per_m2_k,
                Dim::HEAT_TRANSFER_COEFFICIENT,
                Kind::Plain,
            ),
        )
        .with("lewis", number(zone.surface.lewis));
    r.payload = Some(Arc::new(ZonePayload(zone)));
    r
}

/// The `zones` argument: a list of belt_zone records, or one.
fn zones_arg(args: &mut Args) -> Result<Vec<Zone>, Diagnostic> {
    let arg = args.required("zones")?;
    let items = match arg.value {
        Value::List(items) => items,
        one => vec![one],
    };
    if items.is_empty() {
        return Err(Diagnostic::error(
            arg.span,
            "`zones` needs at least one belt_zone",
        ));
    }
    items
        .iter()
        .enumerate()
        .map(|(i, v)| {
            match v {
                Value::Record(r) => r.payload::<ZonePayload>().map(|z| z.0.clone()),
                _ => None,
            }
            .ok_or_else(|| {
                Diagnostic::error(
                    arg.span,
                    format!(
                        "`zones` item {} must be a belt_zone(...), found {}",
                        i + 1,
                        type_word(v)
                    ),
                )
            })
        })
        .collect()
}

const BELT_NAMES: &[(&str, &str)] = &[
    ("zones", "zones"),
    ("zone length", "zones"),
    ("throughput", "throughput"),
    ("belt width", "width"),
    ("belt load", "load"),
    ("exchange area per belt area", "area_ratio"),
    ("inlet moisture", "X_in"),
    ("target moisture", "X_out"),
    ("target", "X_out"),
    ("saturates", "zones"),
    ("supply air", "zones"),
];

fn belt_dryer(args: &mut Args) -> Result<Value, Diagnostic> {
    let blame = Blame::of(args, BELT_NAMES);
    let product = product_arg(args)?;
    let zones = zones_arg(args)?;
    let fresh_t = zones[0].fresh_air.t_kelvin();
    let belt = Belt {
        product,
        dry_solid_kg_per_s: positive(args, "throughput", Dim::MASS_FLOW)?,
        width_m: positive(args, "width", Dim::LENGTH)?,
        load_kg_per_m2: positive(args, "load", Dim::AREAL_DENSITY)?,
        x_in_db: moisture(args, "X_in")?,
        x_target_db: moisture(args, "X_out")?,
        t_in_k: temperature(args, "T_product")?.unwrap_or(fresh_t),
        area_per_belt_area: match args.opt_quantity("area_ratio", Dim::NONE)? {
            Some(a) => checked(
                blame.span("area_ratio"),
                "area_ratio",
                a.si,
                a.si > 0.0,
                "positive",
            )?,
            None => 1.0,
        },
        ambient_t_k: temperature(args, "ambient")?.unwrap_or(fresh_t),
        zones,
    };
    args.finish()?;
    let r = belt.solve().map_err(|e| blame.error(e))?;
    warn_all(args, &r.warnings);
    Ok(Value::Record(belt_record(&belt, &r)))
}

fn belt_record(belt: &Belt, r: &BeltResult) -> Record {
    let lengths = r
        .zones
        .iter()
        .map(|z| q(z.length_m, Dim::LENGTH, Kind::Plain))
        .collect();
    let (margin, rh_max) = exhaust_extremes(r.zones.iter().map(|z| &z.exhaust));
    let t_max = r
        .profile
        .iter()
        .map(|p| p.t_product_k)
        .fold(r.t_out_k, f64::max);
    let rec = Record::new("belt_dryer")
        .with("length", shown(r.length_m, Dim::LENGTH, "m"))
        .with("residence_time", shown(r.residence_s, Dim::TIME, "min"))
        .with(
            "belt_speed",
            shown(r.belt_speed_m_per_s, Dim::VELOCITY, "m/min"),
        )
        .with("zone_lengths", Value::List(lengths))
        .with("X_out", moisture_v(r.x_out_db))
        .with("T_out", abs_t(r.t_out_k))
        .with("T_product_max", abs_t(t_max))
        .with("water", shown(r.flows.water, Dim::MASS_FLOW, "kg/h"))
        .with("heater", shown(r.flows.heater, Dim::POWER, "kW"))
        .with("fan", shown(r.flows.fan, Dim::POWER, "kW"));
    let rec = with_merit(rec, &r.flows, r.latent_minimum_j_per_kg);
    let rec = with_closure(rec, &r.closure)
        .with("preheat_length", shown(r.periods_m[0], Dim::LENGTH, "m"))
        .with(
            "constant_rate_length",
            shown(r.periods_m[1], Dim::LENGTH, "m"),
        )
        .with(
            "falling_rate_length",
            shown(r.periods_m[2], Dim::LENGTH, "m"),
        )
        .with_margin(margin)
        .with("exhaust_rh_max", q(rh_max, Dim::NONE, Kind::Activity))
        .with("zones", Value::Table(zones_table(belt, r)))
        .with(
            "energy",
            Value::Table(energy_table(&r.flows, Dim::POWER, "kW")),
        )
        .with("profile", Value::Table(profile_table(r)));
    let rec = with_plot(rec, "moisture_plot", moisture_profile_plot(r));
    let rec = with_plot(rec, "temperature_plot", temperature_profile_plot(r));
    rec.with("cautions", cautions())
}

fn zones_table(belt: &Belt, r: &BeltResult) -> Table {
    let mut cols: Vec<(&str, Option<&str>, Vec<Value>)> = vec![
        ("zone", None, vec![]),
        ("flow", None, vec![]),
        ("length", Some("m"), vec![]),
        ("residence", Some("min"), vec![]),
        ("T supply", Some("degC"), vec![]),
        ("T exhaust", Some("degC"), vec![]),
        ("exhaust dew point", Some("degC"), vec![]),
        ("exhaust rh", Some("%rh"), vec![]),
        ("heater", Some("kW"), vec![]),
        ("fan", Some("kW"), vec![]),
    ];
    for (i, (z, spec)) in r.zones.iter().zip(&belt.zones).enumerate() {
        let dew = z
            .exhaust
            .dew_point()
            .map_or(Value::Str("none".into()), |d| abs_t(d.value));
        let flow = match spec.flow {
            Flow::Cocurrent => "cocurrent",
            Flow::Countercurrent => "countercurrent",
        };
        let cells = [
            number((i + 1) as f64),
            Value::Str(flow.into()),
            q(z.length_m, Dim::LENGTH, Kind::Plain),
            q(z.residence_s, Dim::TIME, Kind::Plain),
            abs_t(z.supply.t_kelvin()),
            abs_t(z.exhaust.t_kelvin()),
            dew,
            q(z.exhaust.relative_humidity(), Dim::NONE, Kind::Activity),
            q(z.heater_w, Dim::POWER, Kind::Plain),
            q(z.fan_w, Dim::POWER, Kind::Plain),
        ];
        for (c, v) in cols.iter_mut().zip(cells) {
            c.2.push(v);
        }
    }
    Table {
        title: Some("zones".into()),
        columns: cols.into_iter().map(|(n, u, c)| column(n, u, c)).collect(),
    }
}

fn profile_table(r: &BeltResult) -> Table {
    let p = &r.profile;
    Table {
        title: Some("profile along the belt".into()),
        columns: vec![
            column(
                "z",
                Some("m"),
                p.iter()
                    .map(|p| q(p.z_m, Dim::LENGTH, Kind::Plain))
                    .collect(),
            ),
            column(
                "zone",
                None,
                p.iter().map(|p| number((p.zone + 1) as f64)).collect(),
            ),
            column(
                "X",
                Some("db"),
                p.iter().map(|p| moisture_v(p.x_db)).collect(),
            ),
            column(
                "T product",
                Some("degC"),
                p.iter().map(|p| abs_t(p.t_product_k)).collect(),
            ),
            column(
                "T air",
                Some("degC"),
                p.iter().map(|p| abs_t(p.air.t_kelvin())).collect(),
            ),
            column(
                "w air",
                Some("g/kg_da"),
                p.iter()
                    .map(|p| q(p.air.humidity_ratio(), Dim::NONE, Kind::HumidityRatio))
                    .collect(),
            ),
            column(
                "rh air",
                Some("%rh"),
                p.iter()
                    .map(|p| q(p.air.relative_humidity(), Dim::NONE, Kind::Activity))
                    .collect(),
            ),
        ],
    }
}

// ---------------------------------------------------------------------------
// Batch dryers: tray_dryer and deep_bed
// ---------------------------------------------------------------------------

const BATCH_NAMES: &[(&str, &str)] = &[
    ("area", "tray_area"),
    ("dry solid", "load"),
    ("heat transfer coefficient", "h"),
    ("Lewis number", "lewis"),
    ("initial moisture", "X_initial"),
    ("target moisture", "X_final"),
    ("target", "X_final"),
    ("air flow", "air_flow"),
    ("recirculated fraction", "recirculated"),
    ("wall loss conductance", "wall_loss"),
    ("fan pressure rise", "fan_pressure"),
    ("fan efficiency", "fan_efficiency"),
    ("maximum time", "max_time"),
    ("supply temperature", "T_supply"),
    ("supply air", "air"),
    ("saturates", "air_flow"),
    ("cp_solid", "product"),
    ("x_critical", "product"),
];

/// The inputs every batch dryer shares, read in one place.
struct BatchAir {
    fresh: AirState,
    supply: AirState,
    t_supply: f64,
    recirculated: f64,
    t_product: f64,
    ambient: f64,
    max_time_s: f64,
}

fn batch_air(args: &mut Args, blame: &Blame) -> Result<BatchAir, Diagnostic> {
    let fresh = air_arg(args, "air")?;
    let t_supply = required_temperature(args, "T_supply")?;
    let supply = supply_air(&fresh, t_supply, blame.span("T_supply"))?;
    Ok(BatchAir {
        fresh,
        supply,
        t_supply,
        recirculated: fraction_or(args, "recirculated", 0.0)?,
        t_product: temperature(args, "T_product")?.unwrap_or(fresh.t_kelvin()),
        ambient: temperature(args, "ambient")?.unwrap_or(fresh.t_kelvin()),
        max_time_s: match args.opt_quantity("max_time", Dim::TIME)? {
            Some(t) => checked(
                blame.span("max_time"),
                "max_time",
                t.si,
                t.si > 0.0,
                "positive",
            )?,
            None => 100.0 * 3600.0,
        },
    })
}

#[allow(clippy::too_many_arguments)]
fn batch_dryer(
    product: Product,
    elements: Vec<Element>,
    x: (f64, f64),
    air: &BatchAir,
    m: f64,
    wall_loss: f64,
    fan: Fan,
) -> BatchDryer {
    BatchDryer {
        elements,
        product,
        x_initial_db: x.0,
        x_target_db: x.1,
        t_product_initial_k: air.t_product,
        fresh_air: air.fresh,
        supply_t_k: air.t_supply,
        dry_air_kg_per_s: m,
        recirculated: air.recirculated,
        loss_w_per_k: wall_loss,
        ambient_t_k: air.ambient,
        fan,
        max_time_s: air.max_time_s,
    }
}

fn tray_dryer(args: &mut Args) -> Result<Value, Diagnostic> {
    let blame = Blame::of(args, BATCH_NAMES);
    let product = product_arg(args)?;
    let trays = count(args, "trays", 1, 200, None)?;
    let area = positive(args, "tray_area", Dim::AREA)?;
    let load = positive(args, "load", Dim::AREAL_DENSITY)?;
    let x = (moisture(args, "X_initial")?, moisture(args, "X_final")?);
    let air = batch_air(args, &blame)?;
    let m = positive(args, "air_flow", Dim::MASS_FLOW)?;
    let surface = Surface {
        h_w_per_m2_k: positive(args, "h", Dim::HEAT_TRANSFER_COEFFICIENT)?,
        lewis: lewis(args, &air.supply)?,
    };
    let wall_loss = non_negative_or(
        args,
        "wall_loss",
        Dim::HEAT_TRANSFER_COEFFICIENT * Dim::AREA,
        0.0,
    )?;
    let fan = fan(args)?;
    args.finish()?;
    let element = Element {
        area_m2: area,
        dry_solid_kg: load * area,
        surface,
    };
    let dryer = batch_dryer(product, vec![element; trays], x, &air, m, wall_loss, fan);
    let r = dryer.simulate().map_err(|e| blame.error(e))?;
    warn_all(args, &r.warnings);
    let rec = batch_record("tray_dryer", &r, "tray_times", "tray");
    Ok(Value::Record(rec.with("cautions", cautions())))
}

/// Fields shared by the batch dryers.
fn batch_record(
    type_name: &'static str,
    r: &BatchResult,
    times_name: &'static str,
    element: &str,
) -> Record {
    let f = &r.flows;
    let times = r
        .element_times_s
        .iter()
        .map(|t| shown(*t, Dim::TIME, "h"))
        .collect();
    // The energies run to the end of the last time step (just past the batch time).
    let t = r
        .history
        .last()
        .map_or(r.batch_time_s, |s| s.t_s)
        .max(f64::MIN_POSITIVE);
    let (margin, rh_max) = exhaust_extremes(r.history.iter().map(|s| &s.exhaust));
    let t_max = r
        .history
        .iter()
        .flat_map(|s| s.t_product_k.iter().copied())
        .fold(f64::MIN, f64::max);
    let rec = Record::new(type_name)
        .with("batch_time", shown(r.batch_time_s, Dim::TIME, "h"))
        .with(times_name, Value::List(times))
        .with("water", shown(f.water, Dim::MASS, "kg"))
        .with("heater", shown(f.heater / t, Dim::POWER, "kW"))
        .with("heater_energy", shown(f.heater, Dim::ENERGY, "kWh"))
        .with("fan", shown(f.fan / t, Dim::POWER, "kW"))
        .with("fan_energy", shown(f.fan, Dim::ENERGY, "kWh"));
    let rec = with_merit(rec, f, r.latent_minimum_j_per_kg);
    let rec = with_plot(rec, "drying_plot", drying_plot(&r.history, element));
    with_closure(rec, &r.closure)
        .with("T_product_max", abs_t(t_max))
        .with_margin(margin)
        .with("exhaust_rh_max", q(rh_max, Dim::NONE, Kind::Activity))
        .with("energy", Value::Table(energy_table(f, Dim::ENERGY, "kWh")))
        .with("history", Value::Table(history_table(&r.history, element)))
}

/// At most about 100 rows of a batch history, always with the last sample.
fn thin(history: &[BatchSample]) -> Vec<&BatchSample> {
    let step = history.len().div_ceil(100).max(1);
    let mut rows: Vec<&BatchSample> = history.iter().step_by(step).collect();
    if let (Some(last), Some(kept)) = (history.last(), rows.last()) {
        if !std::ptr::eq(last, *kept) {
            rows.push(last);
        }
    }
    rows
}

fn history_table(history: &[BatchSample], element: &str) -> Table {
    let rows = thin(history);
    let n = rows.first().map_or(0, |s| s.x_db.len());
    let mut columns = vec![column(
        "t",
        Some("h"),
        rows.iter()
            .map(|s| q(s.t_s, Dim::TIME, Kind::Plain))
            .collect(),
    )];
    for i in 0..n {
        columns.push(column(
            &format!("X {element} {}", i + 1),
            Some("db"),
            rows.iter().map(|s| moisture_v(s.x_db[i])).collect(),
        ));
    }
    let last = n.saturating_sub(1);
    columns.extend([
        column(
            "T product first",
            Some("degC"),
            rows.iter().map(|s| abs_t(s.t_product_k[0])).collect(),
        ),
        column(
            "T product last",
            Some("degC"),
            rows.iter().map(|s| abs_t(s.t_product_k[last])).collect(),
        ),
        column(
            "T supply",
            Some("degC"),
            rows.iter().map(|s| abs_t(s.supply.t_kelvin())).collect(),
        ),
        column(
            "T exhaust",
            Some("degC"),
            rows.iter().map(|s| abs_t(s.exhaust.t_kelvin())).collect(),
        ),
        column(
            "w exhaust",
            Some("g/kg_da"),
            rows.iter()
                .map(|s| q(s.exhaust.humidity_ratio(), Dim::NONE, Kind::HumidityRatio))
                .collect(),
        ),
        column(
            "rh exhaust",
            Some("%rh"),
            rows.iter()
                .map(|s| q(s.exhaust.relative_humidity(), Dim::NONE, Kind::Activity))
                .collect(),
        ),
    ]);
    Table {
        title: Some("drying history".into()),
        columns,
    }
}

const BED_NAMES: &[(&str, &str)] = &[
    ("superficial velocity", "velocity"),
    ("bed depth", "depth"),
    ("particle diameter", "particle_diameter"),
    ("voidage", "voidage"),
    ("area", "bed_area"),
    ("dry solid", "bulk_density"),
    ("heat transfer coefficient", "h"),
    ("Lewis number", "lewis"),
    ("initial moisture", "X_initial"),
    ("target moisture", "X_final"),
    ("target", "X_final"),
    ("air flow", "velocity"),
    ("recirculated fraction", "recirculated"),
    ("wall loss conductance", "wall_loss"),
    ("fan efficiency", "fan_efficiency"),
    ("maximum time", "max_time"),
    ("supply temperature", "T_supply"),
    ("supply air", "air"),
    ("saturates", "velocity"),
];

/// Bed geometry as read from the arguments.
struct Bed {
    depth: f64,
    area: f64,
    dp: f64,
    voidage: f64,
    bulk: f64,
    layers: usize,
}

fn bed_arg(args: &mut Args, blame: &Blame) -> Result<Bed, Diagnostic> {
    let depth = positive(args, "depth", Dim::LENGTH)?;
    let area = positive(args, "bed_area", Dim::AREA)?;
    let dp = positive(args, "particle_diameter", Dim::LENGTH)?;
    let e = args.quantity("voidage", Dim::NONE)?.si;
    checked(
        blame.span("voidage"),
        "voidage",
        e,
        e > 0.0 && e < 1.0,
        "a fraction between 0 and 1",
    )?;
    let bulk = positive(args, "bulk_density", Dim::DENSITY)?;
    let layers = count(args, "layers", 2, 200, Some(10))?;
    Ok(Bed {
        depth,
        area,
        dp,
        voidage: e,
        bulk,
        layers,
    })
}

/// Wakao-Kaguei film coefficient at the supply air, with its range warnings.
fn packed_bed_h(
    args: &mut Args,
    blame: &Blame,
    supply: &AirState,
    u: f64,
    dp: f64,
) -> Result<f64, Diagnostic> {
    let t = Transport::of(supply);
    let re = t.density_kg_per_m3 * u * dp / t.viscosity_pa_s;
    let nu = transfer::packed_bed_wakao_kaguei(re, t.prandtl())
        .map_err(|e| Diagnostic::error(blame.span("velocity"), format!("`deep_bed`: {e}")))?;
    for w in &nu.warnings {
        args.warn(format!("film coefficient: {w}"));
    }
    Ok(nu.value * t.conductivity_w_per_m_k / dp)
}

fn deep_bed(args: &mut Args) -> Result<Value, Diagnostic> {
    let blame = Blame::of(args, BED_NAMES);
    let product = product_arg(args)?;
    let bed = bed_arg(args, &blame)?;
    let x = (moisture(args, "X_initial")?, moisture(args, "X_final")?);
    let air = batch_air(args, &blame)?;
    let u = positive(args, "velocity", Dim::VELOCITY)?;
    let h = match args.opt_quantity("h", Dim::HEAT_TRANSFER_COEFFICIENT)? {
        Some(h) => checked(blame.span("h"), "h", h.si, h.si > 0.0, "positive")?,
        None => packed_bed_h(args, &blame, &air.supply, u, bed.dp)?,
    };
    let surface = Surface {
        h_w_per_m2_k: h,
        lewis: lewis(args, &air.supply)?,
    };
    let wall_loss = non_negative_or(
        args,
        "wall_loss",
        Dim::HEAT_TRANSFER_COEFFICIENT * Dim::AREA,
        0.0,
    )?;
    let extra = non_negative_or(args, "extra_pressure", Dim::PRESSURE, 0.0)?;
    let efficiency = fraction_or(args, "fan_efficiency", 0.6)?;
    args.finish()?;
    let t = Transport::of(&air.supply);
    let bed_dp = ergun::pressure_drop(
        Velocity::new::<uom::si::velocity::meter_per_second>(u),
        Length::new::<uom::si::length::meter>(bed.depth),
        Length::new::<uom::si::length::meter>(bed.dp),
        bed.voidage,
        MassDensity::new::<uom::si::mass_density::kilogram_per_cubic_meter>(t.density_kg_per_m3),
        DynamicViscosity::new::<uom::si::dynamic_viscosity::pascal_second>(t.viscosity_pa_s),
    )
    .map_err(|e| blame.error(e))?
    .value;
    let a = 6.0 * (1.0 - bed.voidage) / bed.dp;
    let dz = bed.depth / bed.layers as f64;
    let element = Element {
        area_m2: a * bed.area * dz,
        dry_solid_kg: bed.bulk * bed.area * dz,
        surface,
    };
    let m = u * bed.area / air.supply.humid_volume().value;
    let fan = Fan {
        pressure_rise_pa: bed_dp + extra,
        efficiency,
    };
    let dryer = batch_dryer(
        product,
        vec![element; bed.layers],
        x,
        &air,
        m,
        wall_loss,
        fan,
    );
    let r = dryer.simulate().map_err(|e| blame.error(e))?;
    warn_all(args, &r.warnings);
    let rec = batch_record("deep_bed", &r, "layer_times", "layer");
    let rec = with_plot(rec, "outlet_plot", outlet_plot(&r.history))
        .with("pressure_drop", shown(bed_dp, Dim::PRESSURE, "Pa"))
        .with("h", q(h, Dim::HEAT_TRANSFER_COEFFICIENT, Kind::Plain))
        .with("specific_area", q(a, Dim::LENGTH.recip(), Kind::Plain))
        .with("air_flow", q(m, Dim::MASS_FLOW, Kind::Plain))
        .with("cautions", cautions());
    Ok(Value::Record(rec))
}

// ---------------------------------------------------------------------------
// rotary_dryer
// ---------------------------------------------------------------------------

const ROTARY_NAMES: &[(&str, &str)] = &[
    ("solids flow", "throughput"),
    ("diameter", "diameter"),
    ("slope", "slope"),
    ("speed", "speed"),
    ("particle diameter", "particle_diameter"),
    ("outlet moisture", "X_out"),
    ("loss fraction", "loss_fraction"),
    ("fan efficiency", "fan_efficiency"),
    ("fan pressure rise", "fan_pressure"),
    ("ambient temperature", "ambient"),
    ("gas outlet temperature", "T_gas_out"),
    ("temperatures", "T_gas_out"),
    ("retention time", "diameter"),
    ("saturates", "T_gas_out"),
];

fn rotary_dryer(args: &mut Args) -> Result<Value, Diagnostic> {
    let blame = Blame::of(args, ROTARY_NAMES);
    let product = product_arg(args)?;
    let solids = positive(args, "throughput", Dim::MASS_FLOW)?;
    let x_in = moisture(args, "X_in")?;
    let x_out = moisture(args, "X_out")?;
    let t_solid_in = required_temperature(args, "T_solid_in")?;
    let t_solid_out = required_temperature(args, "T_solid_out")?;
    let gas_in = air_arg(args, "gas")?;
    let t_gas_out = required_temperature(args, "T_gas_out")?;
    let diameter = positive(args, "diameter", Dim::LENGTH)?;
    let slope = positive(args, "slope", Dim::NONE)?;
    let speed_per_s = positive(args, "speed", Dim::TIME.recip())?;
    let dp = positive(args, "particle_diameter", Dim::LENGTH)?;
    let flow = flow_direction(args, "countercurrent")?;
    let loss_fraction = fraction_or(args, "loss_fraction", 0.0)?;
    let ambient = temperature(args, "ambient")?.unwrap_or(293.15);
    let fan = fan(args)?;
    args.finish()?;
    let rotary = Rotary {
        product,
        dry_solid_kg_per_s: solids,
        x_in_db: x_in,
        x_out_db: x_out,
        t_solid_in_k: t_solid_in,
        t_solid_out_k: t_solid_out,
        gas_in,
        t_gas_out_k: t_gas_out,
        diameter_m: diameter,
        slope,
        speed_rpm: speed_per_s * 60.0,
        particle_diameter_m: dp,
        flow,
        loss_fraction,
        ambient_t_k: ambient,
        fan,
    };
    let r = rotary.design().map_err(|e| blame.error(e))?;
    warn_all(args, &r.warnings);
    let gas_out = air_record(args, &r.gas_out)?;
    Ok(Value::Record(rotary_record(&rotary, &r, gas_out)))
}

fn rotary_record(rotary: &Rotary, r: &RotaryResult, gas_out: Record) -> Record {
    let f = &r.flows;
    let g = r
        .gas_mass_velocity
        .get::<uom::si::mass_flux::kilogram_per_square_meter_second>();
    let rec = Record::new("rotary_dryer")
        .with(
            "gas_flow",
            shown(r.dry_gas_kg_per_s, Dim::MASS_FLOW, "kg/s"),
        )
        .with("gas_out", Value::Record(gas_out))
        .with("length", shown(r.length_m, Dim::LENGTH, "m"))
        .with("L_over_D", number(r.length_m / rotary.diameter_m))
        .with(
            "retention_time",
            shown(r.retention_time_s, Dim::TIME, "min"),
        )
        .with("holdup", fraction_v(r.holdup_fraction))
        .with(
            "Ua",
            shown(
                r.ua_w_per_m3_k,
                Dim::HEAT_TRANSFER_COEFFICIENT / Dim::LENGTH,
                "W/(m^3*K)",
            ),
        )
        .with("log_mean_difference", delta_t(r.log_mean_difference_k))
        .with("G", shown(g, Dim::MASS_FLUX, "kg/(m^2*h)"))
        .with("water", shown(r.water_kg_per_s, Dim::MASS_FLOW, "kg/h"))
        .with(
            "heat_to_product",
            shown(r.heat_to_product_w, Dim::POWER, "kW"),
        )
        .with("heater", shown(f.heater, Dim::POWER, "kW"))
        .with("fan", shown(f.fan, Dim::POWER, "kW"));
    let rec = with_merit(rec, f, r.latent_minimum_j_per_kg);
    let margin = dew_margin(&r.gas_out).unwrap_or(f64::INFINITY);
    with_closure(rec, &r.closure)
        .with_margin(margin)
        .with("energy", Value::Table(energy_table(f, Dim::POWER, "kW")))
        .with("cautions", cautions())
}

// ---------------------------------------------------------------------------
// Plots (arranged by render::plot; no physics there)
// ---------------------------------------------------------------------------

/// Add a plot field when the plot could be built (it always can from finite results).
fn with_plot(r: Record, name: &'static str, plot: Option<Plot>) -> Record {
    match plot {
        Some(p) => r.with(name, Value::Plot(Arc::new(p))),
        None => r,
    }
}

fn quantities(values: impl Iterator<Item = f64>, dim: Dim, kind: Kind) -> Vec<Quantity> {
    values.map(|v| Quantity::new(v, dim, kind)).collect()
}

fn units(x: &str, y: &str) -> AxisUnits {
    AxisUnits {
        x: parse_unit(x).ok(),
        y: parse_unit(y).ok(),
    }
}

/// Zone boundaries as vertical lines on a profile plot.
fn zone_marks(b: &mut PlotBuilder, r: &BeltResult) -> Option<()> {
    let mut z = 0.0;
    for i in 1..r.zones.len() {
        z += r.zones[i - 1].length_m;
        b.vline(
            &Quantity::new(z, Dim::LENGTH, Kind::Plain),
            format!("zone {}", i + 1),
        )
        .ok()?;
    }
    Some(())
}

fn profile_positions(r: &BeltResult) -> Vec<Quantity> {
    quantities(r.profile.iter().map(|p| p.z_m), Dim::LENGTH, Kind::Plain)
}

fn moisture_profile_plot(r: &BeltResult) -> Option<Plot> {
    let x = profile_positions(r);
    let mut b = PlotBuilder::new(
        "Moisture along the belt",
        "position along the dryer",
        "moisture content X",
    )
    .units(units("m", "db"));
    let xs = quantities(r.profile.iter().map(|p| p.x_db), Dim::NONE, Kind::Moisture);
    b.series(&Curve::new("product X", x, xs), SeriesStyle::Line)
        .ok()?;
    zone_marks(&mut b, r)?;
    b.build().ok()
}

fn temperature_profile_plot(r: &BeltResult) -> Option<Plot> {
    let x = profile_positions(r);
    let mut b = PlotBuilder::new(
        "Temperatures along the belt",
        "position along the dryer",
        "temperature",
    )
    .units(units("m", "degC"));
    let abs = Kind::AbsoluteTemperature;
    let tp = quantities(
        r.profile.iter().map(|p| p.t_product_k),
        Dim::TEMPERATURE,
        abs,
    );
    let ta = quantities(
        r.profile.iter().map(|p| p.air.t_kelvin()),
        Dim::TEMPERATURE,
        abs,
    );
    b.series(&Curve::new("product", x.clone(), tp), SeriesStyle::Line)
        .ok()?;
    b.series(&Curve::new("air", x, ta), SeriesStyle::Dashed)
        .ok()?;
    zone_marks(&mut b, r)?;
    b.build().ok()
}

/// Drying curves of a batch: moisture of each tray or layer against time.
fn drying_plot(history: &[BatchSample], element: &str) -> Option<Plot> {
    let rows = thin(history);
    let t = quantities(rows.iter().map(|s| s.t_s), Dim::TIME, Kind::Plain);
    let n = rows.first().map_or(0, |s| s.x_db.len());
    let curves: Vec<Curve> = (0..n)
        .map(|i| {
            let x = quantities(rows.iter().map(|s| s.x_db[i]), Dim::NONE, Kind::Moisture);
            Curve::new(format!("{element} {}", i + 1), t.clone(), x)
        })
        .collect();
    drying_curve("Drying curves", &[], &curves, units("h", "db")).ok()
}

/// Air leaving a through-circulation bed against time: it stays cool and humid
/// while the drying front crosses the bed, then rises towards the supply.
fn outlet_plot(history: &[BatchSample]) -> Option<Plot> {
    let rows = thin(history);
    let t = quantities(rows.iter().map(|s| s.t_s), Dim::TIME, Kind::Plain);
    let abs = Kind::AbsoluteTemperature;
    let supply = quantities(
        rows.iter().map(|s| s.supply.t_kelvin()),
        Dim::TEMPERATURE,
        abs,
    );
    let outlet = quantities(
        rows.iter().map(|s| s.exhaust.t_kelvin()),
        Dim::TEMPERATURE,
        abs,
    );
    let mut b = PlotBuilder::new("Air through the bed", "time", "air temperature")
        .units(units("h", "degC"));
    b.series(
        &Curve::new("supply", t.clone(), supply),
        SeriesStyle::Dashed,
    )
    .ok()?;
    b.series(&Curve::new("outlet", t, outlet), SeriesStyle::Line)
        .ok()?;
    b.build().ok()
}
