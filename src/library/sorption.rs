//! Sorption built-ins: isotherm models, equilibrium moisture and water
//! activity, free moisture, materials, and fitting isotherms to lab tables.
//!
//! Isotherms are records of type `isotherm` (fields: `model`, the parameters,
//! `T`), materials records of type `material`; both carry the engine object as
//! payload. Any built-in that needs an isotherm also takes a material or an
//! isotherm fit in its place.

use std::sync::Arc;

use uom::si::f64::ThermodynamicTemperature;
use uom::si::thermodynamic_temperature::kelvin;

use super::data::{find_column, table_arg};
use super::fit::{comparison_table, fit_record, FitPayload, QuantitySpec};
use crate::diag::{Diagnostic, Span};
use crate::engine::sorption::{
    demo_materials, fit_isotherm as engine_fit, Geometry, Isotherm, IsothermFit, IsothermKind,
    Material, Reading, SorptionError, ALL_KINDS,
};
use crate::library::{type_word, Args, Builtin, Param};
use crate::units::{lookup_unit, Dim, Kind, Quantity};
use crate::value::{Payload, Record, Table, Value};

impl Payload for Isotherm {
    fn as_any(&self) -> &dyn std::any::Any {
        self
    }
}

impl Payload for Material {
    fn as_any(&self) -> &dyn std::any::Any {
        self
    }
}

fn kelvin_t(t_k: f64) -> ThermodynamicTemperature {
    ThermodynamicTemperature::new::<kelvin>(t_k)
}

fn temperature_value(t_k: f64) -> Value {
    Value::Quantity(
        Quantity::new(t_k, Dim::TEMPERATURE, Kind::AbsoluteTemperature),
        None,
    )
}

fn moisture_value(x_db: f64) -> Value {
    Value::Quantity(Quantity::new(x_db, Dim::NONE, Kind::Moisture), None)
}

/// Dimension, kind and display unit of parameter `index` of `kind`.
pub fn param_spec(kind: IsothermKind, index: usize) -> QuantitySpec {
    use IsothermKind as M;
    let name = kind.param_names()[index];
    let per_kelvin = Dim::TEMPERATURE.recip();
    let (dim, k, unit) = match (kind, name) {
        (M::Gab | M::Bet | M::BetLayers, "Xm") => (Dim::NONE, Kind::Moisture, "db"),
        (M::Oswin | M::ModifiedOswin, "A") | (M::Peleg | M::Smith, "A" | "B") => {
            (Dim::NONE, Kind::Moisture, "db")
        }
        (M::Gab, "dHc" | "dHk") => (Dim::MOLAR_ENERGY, Kind::Plain, "kJ/mol"),
        (M::ModifiedOswin, "B") => (per_kelvin, Kind::Plain, "K^-1"),
        (M::Henderson, "k") | (M::ModifiedHenderson, "A") | (M::ModifiedHalsey, "B") => {
            (per_kelvin, Kind::Plain, "K^-1")
        }
        (M::ModifiedHenderson, "B") | (M::ModifiedChungPfost, "A" | "B") => {
            (Dim::TEMPERATURE, Kind::TemperatureDifference, "K")
        }
        _ => (Dim::NONE, Kind::Plain, ""),
    };
    let spec = QuantitySpec::new(name, dim, k);
    if unit.is_empty() {
        spec
    } else {
        spec.shown_in(unit)
    }
}

/// An isotherm as a record: `model`, parameters, `T`, and flags in words.
pub fn isotherm_record(iso: Isotherm) -> Record {
    let mut rec = Record::new("isotherm").with("model", Value::Str(iso.kind.name().into()));
    for (i, &v) in iso.params.iter().enumerate() {
        rec = rec.with(iso.kind.param_names()[i], param_spec(iso.kind, i).value(v));
    }
    if iso.isothermal || iso.kind == IsothermKind::Gab {
        rec = rec.with("T", temperature_value(iso.t_ref_k));
    }
    let scope = if iso.isothermal {
        "at T only"
    } else {
        "temperature-dependent"
    };
    rec = rec.with("scope", Value::Str(scope.into()));
    rec.payload = Some(Arc::new(iso));
    rec
}

// ---------------------------------------------------------------- arguments

/// A dimensionless argument of the given kind (a plain number is accepted).
fn ratio(args: &mut Args, name: &str, kind: Kind) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of(name);
    let Some(q) = args.opt_quantity(name, Dim::NONE)? else {
        return Ok(None);
    };
    q.expect_kind(Dim::NONE, kind)
        .map(|q| Some(q.si))
        .map_err(|e| Diagnostic::error(span, format!("argument `{name}`: {}", e.message)))
}

fn required_ratio(args: &mut Args, name: &str, kind: Kind) -> Result<f64, Diagnostic> {
    match ratio(args, name, kind)? {
        Some(v) => Ok(v),
        None => Err(args
            .required(name)
            .err()
            .unwrap_or_else(|| args.error_at(name, format!("`{name}` is needed")))),
    }
}

fn temperature(args: &mut Args, name: &str) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of(name);
    let Some(q) = args.opt_quantity(name, Dim::TEMPERATURE)? else {
        return Ok(None);
    };
    q.absolute_kelvin()
        .map(Some)
        .map_err(|e| Diagnostic::error(span, format!("argument `{name}`: {}", e.message)))
}

fn required_temperature(args: &mut Args, name: &str) -> Result<f64, Diagnostic> {
    match temperature(args, name)? {
        Some(t) => Ok(t),
        None => Err(args
            .required(name)
            .err()
            .unwrap_or_else(|| args.error_at(name, format!("`{name}` is needed")))),
    }
}

/// A parameter argument checked against its spec's dimension and kind.
fn spec_arg(args: &mut Args, spec: &QuantitySpec) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of(&spec.name);
    let Some(q) = args.opt_quantity(&spec.name, spec.dim)? else {
        return Ok(None);
    };
    let q = match spec.kind {
        Kind::Plain => q,
        k => q
            .expect_kind(spec.dim, k)
            .map_err(|e| Diagnostic::error(span, e.message))?,
    };
    Ok(Some(q.si))
}

/// What a product argument can be: an isotherm, a material, or an isotherm fit.
struct Product {
    isotherm: Isotherm,
    material: Option<Material>,
}

fn product(args: &mut Args) -> Result<Product, Diagnostic> {
    let arg = args.required("product")?;
    let record = match &arg.value {
        Value::Record(r) => r,
        other => return Err(not_a_product(arg.span, other)),
    };
    if let Some(m) = record.payload::<Material>() {
        return Ok(Product {
            isotherm: m.isotherm.clone(),
            material: Some(m.clone()),
        });
    }
    if let Some(iso) = record.payload::<Isotherm>() {
        return Ok(Product {
            isotherm: iso.clone(),
            material: None,
        });
    }
    match record.get("isotherm") {
        Some(Value::Record(r)) => match r.payload::<Isotherm>() {
            Some(iso) => Ok(Product {
                isotherm: iso.clone(),
                material: None,
            }),
            None => Err(not_a_product(arg.span, &arg.value)),
        },
        _ => Err(not_a_product(arg.span, &arg.value)),
    }
}

fn not_a_product(span: Span, found: &Value) -> Diagnostic {
    Diagnostic::error(
        span,
        format!(
            "expected an isotherm, a material or an isotherm fit, found {}",
            type_word(found)
        ),
    )
    .with_hint("make one with gab(...), oswin(...), material(...) or fit_isotherm(...)")
}

/// Air conditions: `air:` (an air state or a record with `T` and `rh`), or `aw:` and `T:`.
fn conditions(args: &mut Args) -> Result<(f64, f64), Diagnostic> {
    if let Some(arg) = args.take("air") {
        let fields = match &arg.value {
            Value::Record(r) => (r.get("T").cloned(), r.get("rh").cloned()),
            other => {
                return Err(Diagnostic::error(
                    arg.span,
                    format!("`air` must be an air state, found {}", type_word(other)),
                ))
            }
        };
        if args.has("aw") || args.has("T") {
            return Err(Diagnostic::error(
                arg.span,
                "give either `air` or `aw` and `T`, not both",
            ));
        }
        return air_fields(fields, arg.span);
    }
    let aw = required_ratio(args, "aw", Kind::Activity)?;
    let t_k = required_temperature(args, "T")?;
    Ok((aw, t_k))
}

fn air_fields(
    fields: (Option<Value>, Option<Value>),
    span: Span,
) -> Result<(f64, f64), Diagnostic> {
    let missing = || {
        Diagnostic::error(span, "the air state needs fields `T` and `rh`")
            .with_hint("e.g. air(T: 60 degC, rh: 25 %)")
    };
    let (Some(Value::Quantity(t, _)), Some(Value::Quantity(rh, _))) = fields else {
        return Err(missing());
    };
    let t_k = t
        .absolute_kelvin()
        .map_err(|e| Diagnostic::error(span, format!("air temperature: {}", e.message)))?;
    let rh = rh
        .expect_kind(Dim::NONE, Kind::Activity)
        .map_err(|e| Diagnostic::error(span, format!("air rh: {}", e.message)))?;
    Ok((rh.si, t_k))
}

fn engine_error(span: Span, e: impl std::fmt::Display) -> Diagnostic {
    Diagnostic::error(span, e.to_string())
}

/// The span to blame for bad air conditions: `air` if given, else `aw`.
fn conditions_span(args: &Args) -> Span {
    if args.has("air") {
        args.span_of("air")
    } else {
        args.span_of("aw")
    }
}

fn warn_all(args: &mut Args, reading: &Reading) {
    for w in &reading.warnings {
        args.warn(w.clone());
    }
}

fn warn_hot(args: &mut Args, material: &Option<Material>, t_k: f64) {
    if let Some(w) = material
        .as_ref()
        .and_then(|m| m.temperature_warning(kelvin_t(t_k)))
    {
        args.warn(w);
    }
}

// ---------------------------------------------------------------- isotherm constructors

/// Build an isotherm of `kind` from its named parameters.
fn construct(args: &mut Args, kind: IsothermKind) -> Result<Value, Diagnostic> {
    let mut kind = kind;
    let spans: Vec<Span> = kind.param_names().iter().map(|n| args.span_of(n)).collect();
    let mut params = Vec::new();
    for i in 0..kind.param_names().len() {
        let spec = param_spec(kind, i);
        let value = match (kind, spec.name.as_str()) {
            (IsothermKind::Gab, "dHc" | "dHk") => spec_arg(args, &spec)?.unwrap_or(0.0),
            _ => match spec_arg(args, &spec)? {
                Some(v) => v,
                None => {
                    return Err(args
                        .required(&spec.name)
                        .err()
                        .unwrap_or_else(|| args.error_at(&spec.name, "missing")))
                }
            },
        };
        params.push(value);
    }
    if kind == IsothermKind::Bet {
        if let Some(n) = ratio(args, "layers", Kind::Plain)? {
            kind = IsothermKind::BetLayers;
            params.push(n);
        }
    }
    // GAB without heat terms has no temperature dependence: known at T only.
    let gab_isothermal = kind == IsothermKind::Gab && params[3] == 0.0 && params[4] == 0.0;
    let t_k = if kind.has_temperature() && kind != IsothermKind::Gab {
        298.15
    } else {
        required_temperature(args, "T")?
    };
    args.finish()?;
    let mut iso = Isotherm::new(kind, &params, kelvin_t(t_k)).map_err(|e| {
        let span = match &e {
            SorptionError::BadParameter { name, .. } => kind
                .param_names()
                .iter()
                .position(|n| n == name)
                .map_or(args.call_span, |i| spans[i]),
            _ => args.call_span,
        };
        Diagnostic::error(span, e.to_string())
    })?;
    if gab_isothermal {
        iso = iso.at_one_temperature();
    }
    Ok(Value::Record(isotherm_record(iso)))
}

fn gab(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::Gab)
}
fn bet(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::Bet)
}
fn oswin(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::Oswin)
}
fn modified_oswin(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::ModifiedOswin)
}
fn henderson(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::Henderson)
}
fn modified_henderson(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::ModifiedHenderson)
}
fn modified_halsey(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::ModifiedHalsey)
}
fn modified_chung_pfost(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::ModifiedChungPfost)
}
fn peleg(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::Peleg)
}
fn smith(args: &mut Args) -> Result<Value, Diagnostic> {
    construct(args, IsothermKind::Smith)
}

// ---------------------------------------------------------------- equilibrium

fn equilibrium_moisture(args: &mut Args) -> Result<Value, Diagnostic> {
    let p = product(args)?;
    let span = conditions_span(args);
    let (aw, t_k) = conditions(args)?;
    args.finish()?;
    let reading = p
        .isotherm
        .equilibrium_moisture(aw, kelvin_t(t_k))
        .map_err(|e| engine_error(span, e))?;
    warn_all(args, &reading);
    warn_hot(args, &p.material, t_k);
    Ok(moisture_value(reading.value))
}

fn water_activity(args: &mut Args) -> Result<Value, Diagnostic> {
    let p = product(args)?;
    let span = args.span_of("X");
    let x = required_ratio(args, "X", Kind::Moisture)?;
    let t_k = required_temperature(args, "T")?;
    args.finish()?;
    let reading = p
        .isotherm
        .water_activity(x, kelvin_t(t_k))
        .map_err(|e| engine_error(span, e))?;
    warn_all(args, &reading);
    Ok(Value::Quantity(
        Quantity::new(reading.value, Dim::NONE, Kind::Activity),
        lookup_unit("aw"),
    ))
}

fn free_moisture(args: &mut Args) -> Result<Value, Diagnostic> {
    let p = product(args)?;
    let span = conditions_span(args);
    let x = required_ratio(args, "X", Kind::Moisture)?;
    let (aw, t_k) = conditions(args)?;
    args.finish()?;
    let reading = p
        .isotherm
        .free_moisture(x, aw, kelvin_t(t_k))
        .map_err(|e| engine_error(span, e))?;
    warn_all(args, &reading);
    Ok(moisture_value(reading.value))
}

// ---------------------------------------------------------------- isosteric heat

fn isotherm_list(args: &mut Args) -> Result<Option<(Vec<Isotherm>, Span)>, Diagnostic> {
    let Some(a) = args.take("isotherms") else {
        return Ok(None);
    };
    let items = match a.value {
        Value::List(items) => items,
        other => {
            return Err(Diagnostic::error(
                a.span,
                format!("`isotherms` must be a list, found {}", type_word(&other)),
            ))
        }
    };
    let mut out = Vec::new();
    for item in &items {
        match item {
            Value::Record(r) => match r.payload::<Isotherm>() {
                Some(iso) => out.push(iso.clone()),
                None => match r.get("isotherm") {
                    Some(Value::Record(inner)) if inner.payload::<Isotherm>().is_some() => {
                        out.extend(inner.payload::<Isotherm>().cloned())
                    }
                    _ => return Err(not_a_product(a.span, item)),
                },
            },
            other => return Err(not_a_product(a.span, other)),
        }
    }
    Ok(Some((out, a.span)))
}

fn isosteric_heat(args: &mut Args) -> Result<Value, Diagnostic> {
    use crate::engine::air::latent_heat_vaporization;
    use crate::engine::sorption::{isosteric_heat as from_model, isosteric_heat_from_isotherms};
    let list = isotherm_list(args)?;
    let single = if list.is_none() {
        Some(product(args)?.isotherm)
    } else {
        None
    };
    let x_span = args.span_of("X");
    let x = required_ratio(args, "X", Kind::Moisture)?;
    let t_given = temperature(args, "T")?;
    args.finish()?;
    let (heat, t_k) = match (single, list) {
        (Some(iso), _) => {
            let t_k = t_given.ok_or_else(|| {
                Diagnostic::error(args.call_span, "`isosteric_heat` of one isotherm needs `T`")
            })?;
            let latent = latent_heat_vaporization(kelvin_t(t_k));
            (
                from_model(&iso, x, kelvin_t(t_k), latent).map_err(|e| engine_error(x_span, e))?,
                t_k,
            )
        }
        (None, Some((isos, span))) => {
            let t_k = isos.iter().map(|i| i.t_ref_k).sum::<f64>() / isos.len().max(1) as f64;
            let latent = latent_heat_vaporization(kelvin_t(t_k));
            (
                isosteric_heat_from_isotherms(&isos, x, latent)
                    .map_err(|e| engine_error(span, e))?,
                t_k,
            )
        }
        (None, None) => {
            return Err(args
                .required("product")
                .err()
                .unwrap_or_else(|| args.error_at("product", "missing")))
        }
    };
    let energy = |si: f64| {
        Value::Quantity(
            Quantity::new(si, Dim::SPECIFIC_ENERGY, Kind::Plain),
            lookup_unit("kJ/kg"),
        )
    };
    let rec = Record::new("isosteric_heat")
        .with("net", energy(heat.net.value))
        .with("total", energy(heat.total.value))
        .with("X", moisture_value(x))
        .with("T", temperature_value(t_k));
    Ok(Value::Record(rec))
}

// ---------------------------------------------------------------- materials

/// A material as a record with its payload.
pub fn material_record(m: Material) -> Record {
    let q = |si: f64, dim: Dim, unit: &str| {
        Value::Quantity(Quantity::new(si, dim, Kind::Plain), lookup_unit(unit))
    };
    let mut rec = Record::new("material")
        .with("name", Value::Str(m.name.clone()))
        .with(
            "isotherm",
            Value::Record(isotherm_record(m.isotherm.clone())),
        )
        .with(
            "rho_solid",
            q(m.solid_density.value, Dim::DENSITY, "kg/m^3"),
        )
        .with("rho_bulk", q(m.bulk_density.value, Dim::DENSITY, "kg/m^3"))
        .with(
            "cp_solid",
            q(m.cp_solid.value, Dim::SPECIFIC_HEAT, "kJ/(kg*K)"),
        )
        .with(
            "cp_water",
            q(m.cp_water.value, Dim::SPECIFIC_HEAT, "kJ/(kg*K)"),
        )
        .with("shape", Value::Str(m.geometry.shape().into()))
        .with("size", q(m.geometry.size().value, Dim::LENGTH, "mm"));
    if let Some(x) = m.critical_moisture_db {
        rec = rec.with("X_crit", moisture_value(x));
    }
    if let Some(t) = m.max_product_temperature {
        rec = rec.with("T_max", temperature_value(t.get::<kelvin>()));
    }
    rec = rec
        .with("notes", Value::Str(m.notes.clone()))
        .with("source", Value::Str(m.source.clone()));
    rec.payload = Some(Arc::new(m));
    rec
}

fn text(args: &mut Args, name: &str) -> Result<Option<String>, Diagnostic> {
    match args.take(name) {
        None => Ok(None),
        Some(a) => match a.value {
            Value::Str(s) => Ok(Some(s)),
            other => Err(Diagnostic::error(
                a.span,
                format!(
                    "`{name}` must be text in quotes, found {}",
                    type_word(&other)
                ),
            )),
        },
    }
}

fn positive(args: &mut Args, name: &str, dim: Dim) -> Result<Option<f64>, Diagnostic> {
    let span = args.span_of(name);
    match args.opt_quantity(name, dim)? {
        Some(q) if q.si > 0.0 => Ok(Some(q.si)),
        Some(q) => Err(Diagnostic::error(
            span,
            format!("`{name}` must be positive, found {}", q.si),
        )),
        None => Ok(None),
    }
}

fn required_positive(args: &mut Args, name: &str, dim: Dim) -> Result<f64, Diagnostic> {
    match positive(args, name, dim)? {
        Some(v) => Ok(v),
        None => Err(args
            .required(name)
            .err()
            .unwrap_or_else(|| args.error_at(name, "missing"))),
    }
}

fn material(args: &mut Args) -> Result<Value, Diagnostic> {
    use uom::si::f64::{Length, MassDensity, SpecificHeatCapacity};
    use uom::si::{
        length::meter, mass_density::kilogram_per_cubic_meter as kgm3,
        specific_heat_capacity::joule_per_kilogram_kelvin as jkgk,
    };
    let name = text(args, "name")?.unwrap_or_else(|| "material".into());
    let iso = product(args)?.isotherm;
    let solid = required_positive(args, "rho_solid", Dim::DENSITY)?;
    let bulk = required_positive(args, "rho_bulk", Dim::DENSITY)?;
    let cp_solid = required_positive(args, "cp_solid", Dim::SPECIFIC_HEAT)?;
    let cp_water = positive(args, "cp_water", Dim::SPECIFIC_HEAT)?.unwrap_or(4180.0);
    let shape = text(args, "shape")?.unwrap_or_else(|| "slab".into());
    let size = Length::new::<meter>(required_positive(args, "size", Dim::LENGTH)?);
    let geometry = match shape.as_str() {
        "slab" => Geometry::Slab { thickness: size },
        "sphere" => Geometry::Sphere { diameter: size },
        "cylinder" => Geometry::Cylinder { diameter: size },
        other => {
            return Err(args.error_at(
                "shape",
                format!("unknown shape `{other}`; use \"slab\", \"sphere\" or \"cylinder\""),
            ))
        }
    };
    let critical = ratio(args, "X_crit", Kind::Moisture)?;
    let t_max = temperature(args, "T_max")?.map(kelvin_t);
    let notes = text(args, "notes")?.unwrap_or_default();
    let source = text(args, "source")?.unwrap_or_default();
    args.finish()?;
    let m = Material {
        name,
        isotherm: iso,
        solid_density: MassDensity::new::<kgm3>(solid),
        bulk_density: MassDensity::new::<kgm3>(bulk),
        cp_solid: SpecificHeatCapacity::new::<jkgk>(cp_solid),
        cp_water: SpecificHeatCapacity::new::<jkgk>(cp_water),
        geometry,
        critical_moisture_db: critical,
        max_product_temperature: t_max,
        notes,
        source,
    };
    m.validate()
        .map_err(|e| Diagnostic::error(args.call_span, e.to_string()))?;
    Ok(Value::Record(material_record(m)))
}

fn demo_material(args: &mut Args) -> Result<Value, Diagnostic> {
    let span = args.span_of("name");
    let name = text(args, "name")?
        .ok_or_else(|| Diagnostic::error(span, "`demo_material` needs a name"))?;
    args.finish()?;
    let all = demo_materials();
    let names: Vec<String> = all.iter().map(|m| m.name.clone()).collect();
    match all.into_iter().find(|m| m.name == name) {
        Some(m) => {
            args.warn(format!(
                "{name} has invented properties, for examples only; do not design with them"
            ));
            Ok(Value::Record(material_record(m)))
        }
        None => Err(
            Diagnostic::error(span, format!("no demo material `{name}`"))
                .with_hint(format!("demo materials: {}", names.join(", "))),
        ),
    }
}

// ---------------------------------------------------------------- fitting

/// Model names as people write them: `GAB`, `modified Halsey`, `modified_halsey`, `Chung-Pfost`.
fn model_kind(name: &str) -> Option<IsothermKind> {
    let norm = |s: &str| s.to_lowercase().replace(['-', '_', ' '], "");
    let wanted = norm(name);
    ALL_KINDS.into_iter().find(|k| {
        norm(k.name()) == wanted || (*k == IsothermKind::BetLayers && wanted == "betlayers")
    })
}

fn model_names() -> String {
    ALL_KINDS
        .iter()
        .map(|k| format!("\"{}\"", k.name()))
        .collect::<Vec<_>>()
        .join(", ")
}

fn model_arg(value: &Value, span: Span) -> Result<IsothermKind, Diagnostic> {
    match value {
        Value::Str(s) => model_kind(s).ok_or_else(|| {
            Diagnostic::error(span, format!("unknown isotherm model `{s}`"))
                .with_hint(format!("models: {}", model_names()))
        }),
        other => Err(Diagnostic::error(
            span,
            format!(
                "a model name in quotes was expected, found {}",
                type_word(other)
            ),
        )),
    }
}

/// Lab points read from a table: activity, temperature (K), moisture.
struct LabPoints {
    aw: Vec<f64>,
    t_k: Vec<f64>,
    x: Vec<f64>,
}

fn column_name(args: &mut Args, name: &str) -> Result<(String, Span), Diagnostic> {
    let span = args.span_of(name);
    match args.take(name) {
        None => Ok((name.to_string(), span)),
        Some(a) => match a.value {
            Value::Str(s) => Ok((s, a.span)),
            other => Err(Diagnostic::error(
                a.span,
                format!(
                    "`{name}` names a column, in quotes; found {}",
                    type_word(&other)
                ),
            )),
        },
    }
}

fn column_values(
    table: &Table,
    name: &str,
    span: Span,
    read: &dyn Fn(&Quantity) -> Result<f64, String>,
) -> Result<Vec<f64>, Diagnostic> {
    let col = find_column(table, name, span)?;
    col.cells
        .iter()
        .enumerate()
        .map(|(row, v)| match v {
            Value::Quantity(q, _) => read(q).map_err(|e| {
                Diagnostic::error(span, format!("column `{name}`, row {}: {e}", row + 1))
            }),
            other => Err(Diagnostic::error(
                span,
                format!(
                    "column `{name}`, row {}: {} is not a number",
                    row + 1,
                    type_word(other)
                ),
            )),
        })
        .collect()
}

fn lab_points(args: &mut Args) -> Result<LabPoints, Diagnostic> {
    let table = table_arg(args, "data")?;
    let (aw_name, aw_span) = column_name(args, "aw")?;
    let (x_name, x_span) = column_name(args, "X")?;
    let aw = column_values(&table, &aw_name, aw_span, &|q| {
        q.expect_kind(Dim::NONE, Kind::Activity)
            .map(|q| q.si)
            .map_err(|e| e.message)
    })?;
    let x = column_values(&table, &x_name, x_span, &|q| {
        q.expect_kind(Dim::NONE, Kind::Moisture)
            .map(|q| q.si)
            .map_err(|e| e.message)
    })?;
    let t_k = match args.take("T") {
        Some(a) => match &a.value {
            Value::Str(name) => column_values(&table, name, a.span, &|q| {
                q.absolute_kelvin().map_err(|e| e.message)
            })?,
            Value::Quantity(q, _) => {
                let t = q
                    .absolute_kelvin()
                    .map_err(|e| Diagnostic::error(a.span, format!("`T`: {}", e.message)))?;
                vec![t; aw.len()]
            }
            other => {
                return Err(Diagnostic::error(
                    a.span,
                    format!(
                        "`T` is a temperature or a column name, found {}",
                        type_word(other)
                    ),
                ))
            }
        },
        None => {
            let span = args.call_span;
            column_values(&table, "T", span, &|q| {
                q.absolute_kelvin().map_err(|e| e.message)
            })
            .map_err(|d| {
                d.with_hint("give the temperature of the data as `T: 40 degC`, or a column name")
            })?
        }
    };
    Ok(LabPoints { aw, t_k, x })
}

fn fit_payload(f: &IsothermFit, points: &LabPoints) -> FitPayload {
    let kind = f.isotherm.kind;
    FitPayload {
        model: kind.name().to_string(),
        params: f.free.iter().map(|&i| param_spec(kind, i)).collect(),
        x: QuantitySpec::new("aw", Dim::NONE, Kind::Activity).shown_in("aw"),
        y: QuantitySpec::new("X", Dim::NONE, Kind::Moisture).shown_in("db"),
        x_si: points.aw.clone(),
        result: f.result.clone(),
    }
}

fn isotherm_fit_record(f: IsothermFit, points: &LabPoints) -> Record {
    let mut rec = fit_record(fit_payload(&f, points));
    let at_bound: Vec<&str> = f
        .free
        .iter()
        .zip(&f.result.at_bound)
        .filter(|(_, b)| **b)
        .map(|(&i, _)| f.isotherm.kind.param_names()[i])
        .collect();
    rec = rec.with("isotherm", Value::Record(isotherm_record(f.isotherm)));
    if !at_bound.is_empty() {
        rec = rec.with(
            "warning",
            Value::Str(format!("{} ended on a bound", at_bound.join(", "))),
        );
    }
    rec
}

fn start_arg(args: &mut Args) -> Result<Option<Vec<f64>>, Diagnostic> {
    let Some(a) = args.take("start") else {
        return Ok(None);
    };
    match a.value {
        Value::List(items) => items
            .iter()
            .map(|v| match v {
                Value::Quantity(q, _) => Ok(q.si),
                other => Err(Diagnostic::error(
                    a.span,
                    format!("start values must be numbers, found {}", type_word(other)),
                )),
            })
            .collect::<Result<Vec<f64>, _>>()
            .map(Some),
        other => Err(Diagnostic::error(
            a.span,
            format!("`start` must be a list, found {}", type_word(&other)),
        )),
    }
}

fn fit_isotherm(args: &mut Args) -> Result<Value, Diagnostic> {
    let model_span = args.span_of("model");
    let kind = match args.take("model") {
        Some(a) => model_arg(&a.value, a.span)?,
        None => IsothermKind::Gab,
    };
    let points = lab_points(args)?;
    let start = start_arg(args)?;
    args.finish()?;
    let fit = engine_fit(kind, &points.aw, &points.t_k, &points.x, start.as_deref())
        .map_err(|e| Diagnostic::error(model_span, e.to_string()))?;
    warn_bounds(args, &fit);
    Ok(Value::Record(isotherm_fit_record(fit, &points)))
}

fn warn_bounds(args: &mut Args, fit: &IsothermFit) {
    for (&i, &b) in fit.free.iter().zip(&fit.result.at_bound) {
        if b {
            let name = fit.isotherm.kind.param_names()[i];
            args.warn(format!(
                "{} parameter {name} ended on its bound; its standard error means little",
                fit.isotherm.kind.name()
            ));
        }
    }
}

fn compare_isotherms(args: &mut Args) -> Result<Value, Diagnostic> {
    let span = args.span_of("models");
    let kinds = match args.take("models") {
        Some(a) => match &a.value {
            Value::List(items) => items
                .iter()
                .map(|v| model_arg(v, a.span))
                .collect::<Result<Vec<_>, _>>()?,
            other => {
                return Err(Diagnostic::error(
                    a.span,
                    format!(
                        "`models` must be a list of model names, found {}",
                        type_word(other)
                    ),
                ))
            }
        },
        None => vec![
            IsothermKind::Gab,
            IsothermKind::Oswin,
            IsothermKind::ModifiedHalsey,
            IsothermKind::ModifiedHenderson,
        ],
    };
    let points = lab_points(args)?;
    args.finish()?;
    let mut fits = Vec::new();
    for kind in kinds {
        match engine_fit(kind, &points.aw, &points.t_k, &points.x, None) {
            Ok(f) => fits.push(f),
            Err(e) => args.warn(format!("{} left out of the comparison: {e}", kind.name())),
        }
    }
    if fits.is_empty() {
        return Err(
            Diagnostic::error(span, "no model could be fitted to these data")
                .with_hint("see the warnings for each model"),
        );
    }
    let payloads: Vec<FitPayload> = fits.iter().map(|f| fit_payload(f, &points)).collect();
    let table = comparison_table(&payloads.iter().collect::<Vec<_>>());
    let best = fits
        .iter()
        .enumerate()
        .min_by(|a, b| a.1.result.aic.total_cmp(&b.1.result.aic))
        .map_or(0, |(i, _)| i);
    let best_name = fits[best].isotherm.kind.name().to_string();
    let best_isotherm = isotherm_record(fits[best].isotherm.clone());
    let records: Vec<Value> = fits
        .into_iter()
        .map(|f| Value::Record(isotherm_fit_record(f, &points)))
        .collect();
    let rec = Record::new("isotherm_comparison")
        .with("table", Value::Table(table))
        .with("best", Value::Str(best_name))
        .with("isotherm", Value::Record(best_isotherm))
        .with("fits", Value::List(records));
    Ok(Value::Record(rec))
}

// ---------------------------------------------------------------- registry

const P_T_DATA: Param = Param {
    name: "T",
    unit: "degC",
    default: None,
    doc: "temperature the isotherm was measured at",
};

macro_rules! param {
    ($name:expr, $unit:expr, $doc:expr) => {
        Param {
            name: $name,
            unit: $unit,
            default: None,
            doc: $doc,
        }
    };
}

const ISO_SOURCE: &str = "ASABE D245.6 (2007), Moisture relationships of plant-based agricultural products; \
                          van den Berg & Bruin (1981) in Water Activity: Influences on Food Quality, Academic Press";

/// The sorption family.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "gab",
        family: "sorption",
        params: &[
            param!("Xm", "db", "monolayer moisture content"),
            param!("C", "-", "Guggenheim constant at T"),
            param!("K", "-", "multilayer factor at T (usually 0.7..1)"),
            Param { name: "T", unit: "degC", default: None, doc: "reference temperature of C and K" },
            Param { name: "dHc", unit: "kJ/mol", default: Some("0 kJ/mol"), doc: "heat term of C: C(T) = C exp(dHc/R (1/T - 1/T_ref))" },
            Param { name: "dHk", unit: "kJ/mol", default: Some("0 kJ/mol"), doc: "heat term of K, likewise" },
        ],
        returns: "isotherm",
        doc: "The GAB sorption isotherm X = Xm C K aw / ((1 - K aw)(1 - K aw + C K aw)), with Arrhenius-type \
              temperature terms for C and K. Without dHc and dHk it is known at T only, and using it at another \
              temperature warns.",
        method: "Guggenheim-Anderson-de Boer multilayer sorption",
        source: "van den Berg & Bruin (1981); Bizot (1983) in Physical Properties of Foods, Applied Science",
        validity: "aw 0.05..0.9",
        example: "gab(Xm: 0.08 db, C: 12, K: 0.85, T: 40 degC)",
        func: gab,
    },
    Builtin {
        name: "bet",
        family: "sorption",
        params: &[
            param!("Xm", "db", "monolayer moisture content"),
            param!("C", "-", "BET constant"),
            P_T_DATA,
            Param { name: "layers", unit: "-", default: Some("infinite"), doc: "number of layers n for n-layer BET" },
        ],
        returns: "isotherm",
        doc: "The BET isotherm X = Xm C aw / ((1 - aw)(1 + (C - 1) aw)), or with `layers` the n-layer BET form. \
              It holds at low activity only.",
        method: "Brunauer-Emmett-Teller multilayer adsorption",
        source: "Brunauer, Emmett & Teller (1938), J. Am. Chem. Soc. 60, 309",
        validity: "aw 0.05..0.45",
        example: "bet(Xm: 0.06 db, C: 15, T: 25 degC)",
        func: bet,
    },
    Builtin {
        name: "oswin",
        family: "sorption",
        params: &[param!("A", "db", "moisture at aw = 0.5"), param!("B", "-", "exponent"), P_T_DATA],
        returns: "isotherm",
        doc: "The Oswin isotherm X = A (aw / (1 - aw))^B, at one temperature.",
        method: "Oswin empirical series expansion",
        source: "Oswin (1946), J. Soc. Chem. Ind. 65, 419",
        validity: "aw 0.05..0.9",
        example: "oswin(A: 0.1 db, B: 0.4, T: 40 degC)",
        func: oswin,
    },
    Builtin {
        name: "modified_oswin",
        family: "sorption",
        params: &[param!("A", "db", "moisture term"), param!("B", "K^-1", "temperature slope (per degC)"), param!("C", "-", "exponent divisor")],
        returns: "isotherm",
        doc: "The modified Oswin isotherm X = (A + B T) (aw / (1 - aw))^(1/C), T in degC.",
        method: "modified Oswin (ASABE standard form)",
        source: ISO_SOURCE,
        validity: "aw 0.05..0.9",
        example: "modified_oswin(A: 0.15 db, B: -0.001 K^-1, C: 2.5)",
        func: modified_oswin,
    },
    Builtin {
        name: "henderson",
        family: "sorption",
        params: &[param!("k", "K^-1", "coefficient"), param!("n", "-", "exponent")],
        returns: "isotherm",
        doc: "The Henderson isotherm 1 - aw = exp(-k T X^n), T absolute.",
        method: "Henderson (1952)",
        source: "Henderson (1952), Agricultural Engineering 33, 29",
        validity: "aw 0.1..0.9",
        example: "henderson(k: 0.02 K^-1, n: 1.8)",
        func: henderson,
    },
    Builtin {
        name: "modified_henderson",
        family: "sorption",
        params: &[param!("A", "K^-1", "coefficient"), param!("B", "K", "temperature offset"), param!("C", "-", "exponent")],
        returns: "isotherm",
        doc: "The modified Henderson isotherm 1 - aw = exp(-A (T + B) X^C), T in degC.",
        method: "modified Henderson (Thompson)",
        source: ISO_SOURCE,
        validity: "aw 0.1..0.9",
        example: "modified_henderson(A: 0.035 K^-1, B: 60 K, C: 1.9)",
        func: modified_henderson,
    },
    Builtin {
        name: "modified_halsey",
        family: "sorption",
        params: &[param!("A", "-", "constant"), param!("B", "K^-1", "temperature slope"), param!("C", "-", "exponent")],
        returns: "isotherm",
        doc: "The modified Halsey isotherm aw = exp(-exp(A + B T) / X^C), T in degC.",
        method: "modified Halsey (Iglesias & Chirife)",
        source: ISO_SOURCE,
        validity: "aw 0.05..0.9",
        example: "modified_halsey(A: -3, B: -0.01 K^-1, C: 1.6)",
        func: modified_halsey,
    },
    Builtin {
        name: "modified_chung_pfost",
        family: "sorption",
        params: &[param!("A", "K", "constant"), param!("B", "K", "temperature offset"), param!("C", "-", "moisture coefficient (per kg/kg)")],
        returns: "isotherm",
        doc: "The modified Chung-Pfost isotherm aw = exp(-(A / (T + B)) exp(-C X)), T in degC. \
              At low activity it would give a negative moisture, which is refused as an error.",
        method: "modified Chung-Pfost",
        source: ISO_SOURCE,
        validity: "aw 0.2..0.9",
        example: "modified_chung_pfost(A: 600 K, B: 50 K, C: 15)",
        func: modified_chung_pfost,
    },
    Builtin {
        name: "peleg",
        family: "sorption",
        params: &[
            param!("A", "db", "first coefficient"),
            param!("B", "db", "second coefficient"),
            param!("C", "-", "first exponent (< 1)"),
            param!("D", "-", "second exponent (> 1)"),
            P_T_DATA,
        ],
        returns: "isotherm",
        doc: "Peleg's two-term isotherm X = A aw^C + B aw^D, at one temperature.",
        method: "Peleg (1993) empirical double power law",
        source: "Peleg (1993), J. Food Process Eng. 16, 21",
        validity: "aw 0..0.95",
        example: "peleg(A: 0.1 db, B: 0.3 db, C: 0.6, D: 5, T: 25 degC)",
        func: peleg,
    },
    Builtin {
        name: "smith",
        family: "sorption",
        params: &[param!("A", "db", "bound water"), param!("B", "db", "multilayer coefficient"), P_T_DATA],
        returns: "isotherm",
        doc: "The Smith isotherm X = A - B ln(1 - aw), at one temperature.",
        method: "Smith (1947)",
        source: "Smith (1947), J. Am. Chem. Soc. 69, 646",
        validity: "aw 0.3..0.95",
        example: "smith(A: 0.03 db, B: 0.05 db, T: 25 degC)",
        func: smith,
    },
    Builtin {
        name: "equilibrium_moisture",
        family: "sorption",
        params: &[
            param!("product", "isotherm", "isotherm, material or isotherm fit"),
            Param { name: "air", unit: "air", default: Some("none"), doc: "air state (its T and rh are used)" },
            Param { name: "aw", unit: "-", default: Some("none"), doc: "water activity (or rh) when no air is given" },
            Param { name: "T", unit: "degC", default: Some("none"), doc: "temperature when no air is given" },
        ],
        returns: "moisture (db)",
        doc: "Equilibrium moisture content X_eq of a product in air of the given relative humidity and temperature: \
              the moisture it dries (or wets) to. Zero in perfectly dry air.",
        method: "the product's sorption isotherm evaluated at aw = rh",
        source: ISO_SOURCE,
        validity: "the isotherm's activity range; aw 0..1",
        example: "equilibrium_moisture(fit.isotherm, air: air(T: 60 degC, rh: 25 %))",
        func: equilibrium_moisture,
    },
    Builtin {
        name: "water_activity",
        family: "sorption",
        params: &[
            param!("product", "isotherm", "isotherm, material or isotherm fit"),
            param!("X", "db", "moisture content"),
            param!("T", "degC", "temperature"),
        ],
        returns: "activity",
        doc: "Water activity (equilibrium relative humidity) of a product at moisture X and temperature T: \
              the inverse of the isotherm, found by bisection on a bracket of aw.",
        method: "bracketed bisection on the monotone isotherm",
        source: ISO_SOURCE,
        validity: "X between the isotherm's values at aw = 0 and aw -> 1",
        example: "water_activity(demo_material(\"demo_grain\"), X: 0.16 db, T: 25 degC)",
        func: water_activity,
    },
    Builtin {
        name: "free_moisture",
        family: "sorption",
        params: &[
            param!("product", "isotherm", "isotherm, material or isotherm fit"),
            param!("X", "db", "moisture content"),
            Param { name: "air", unit: "air", default: Some("none"), doc: "air state" },
            Param { name: "aw", unit: "-", default: Some("none"), doc: "water activity when no air is given" },
            Param { name: "T", unit: "degC", default: Some("none"), doc: "temperature when no air is given" },
        ],
        returns: "moisture (db)",
        doc: "Free moisture X - X_eq: the water that drying in this air can remove. Negative when the product \
              would take up water.",
        method: "X minus the isotherm's equilibrium moisture",
        source: ISO_SOURCE,
        validity: "as equilibrium_moisture",
        example: "free_moisture(m, X: 1.2 db, aw: 0.3, T: 60 degC)",
        func: free_moisture,
    },
    Builtin {
        name: "isosteric_heat",
        family: "sorption",
        params: &[
            Param { name: "product", unit: "isotherm", default: Some("none"), doc: "a temperature-dependent isotherm, material or fit" },
            Param { name: "isotherms", unit: "list", default: Some("none"), doc: "isotherms each known at one temperature (two or more temperatures)" },
            param!("X", "db", "moisture content"),
            Param { name: "T", unit: "degC", default: Some("none"), doc: "temperature (with `product`)" },
        ],
        returns: "record (net, total in kJ/kg water)",
        doc: "Isosteric heat of sorption at moisture X by the Clausius-Clapeyron equation: the net heat \
              -R d(ln aw)/d(1/T) at constant X (per kg of water), and the total heat net + latent heat of \
              vaporisation of free water. From one temperature-dependent isotherm, or from isotherms at two or \
              more temperatures (least-squares line of ln aw against 1/T).",
        method: "Clausius-Clapeyron at constant moisture; latent heat from the air family",
        source: "Iglesias & Chirife (1976), J. Food Technol. 11, 109",
        validity: "X within every isotherm's range; temperatures a few tens of kelvin apart",
        example: "isosteric_heat(isotherms: [fit25.isotherm, fit40.isotherm], X: 0.1 db)",
        func: isosteric_heat,
    },
    Builtin {
        name: "material",
        family: "sorption",
        params: &[
            Param { name: "name", unit: "text", default: Some("\"material\""), doc: "name" },
            param!("product", "isotherm", "the product's isotherm (or a fit)"),
            param!("rho_solid", "kg/m^3", "density of the dry solid itself"),
            param!("rho_bulk", "kg/m^3", "bulk density as loaded, dry solid per bed volume"),
            param!("cp_solid", "kJ/(kg*K)", "specific heat of the dry solid"),
            Param { name: "cp_water", unit: "kJ/(kg*K)", default: Some("4.18 kJ/(kg*K)"), doc: "specific heat of the held water" },
            Param { name: "shape", unit: "text", default: Some("\"slab\""), doc: "\"slab\", \"sphere\" or \"cylinder\"" },
            param!("size", "mm", "slab thickness or particle diameter"),
            Param { name: "X_crit", unit: "db", default: Some("none"), doc: "critical moisture content" },
            Param { name: "T_max", unit: "degC", default: Some("none"), doc: "maximum product temperature" },
            Param { name: "notes", unit: "text", default: Some("\"\""), doc: "notes" },
            Param { name: "source", unit: "text", default: Some("\"\""), doc: "where the numbers come from" },
        ],
        returns: "material",
        doc: "A product to be dried: its isotherm, densities, specific heats, geometry, critical moisture content \
              and maximum product temperature (calls at a hotter product temperature warn).",
        method: "record of properties",
        source: "our own",
        validity: "bulk density not above the solid density",
        example: "material(name: \"slices\", product: iso, rho_solid: 1500 kg/m^3, rho_bulk: 200 kg/m^3, cp_solid: 1.5 kJ/(kg*K), size: 5 mm)",
        func: material,
    },
    Builtin {
        name: "demo_material",
        family: "sorption",
        params: &[param!("name", "text", "demo_fruit_slices, demo_grain or demo_clay_granules")],
        returns: "material",
        doc: "A demo material with INVENTED properties, for examples and tests only.",
        method: "invented values of typical size",
        source: "invented",
        validity: "examples only",
        example: "demo_material(\"demo_grain\")",
        func: demo_material,
    },
    Builtin {
        name: "fit_isotherm",
        family: "sorption",
        params: &[
            param!("data", "table", "lab table"),
            Param { name: "model", unit: "text", default: Some("\"GAB\""), doc: "isotherm model name" },
            Param { name: "aw", unit: "text", default: Some("\"aw\""), doc: "activity column" },
            Param { name: "X", unit: "text", default: Some("\"X\""), doc: "moisture column" },
            Param { name: "T", unit: "text or degC", default: Some("\"T\""), doc: "temperature column, or the temperature of all points" },
            Param { name: "start", unit: "list", default: Some("from linearised forms"), doc: "start values of all parameters (SI)" },
        ],
        returns: "fit",
        doc: "Fit an isotherm model to lab points by nonlinear least squares (Levenberg-Marquardt with bounds): \
              parameters with standard errors and 95 % intervals, R2, RMSE, P, chi2, AIC, BIC, residuals, and \
              the fitted `isotherm`. Points at one temperature fit the isothermal form.",
        method: "Levenberg-Marquardt least squares; start values from linearised forms",
        source: "Moré (1978), Numerical Analysis, Springer LNM 630; Bates & Watts (1988), Nonlinear Regression Analysis",
        validity: "more points than parameters; aw strictly between 0 and 1",
        example: "fit_isotherm(lab, model: \"GAB\", T: 40 degC)",
        func: fit_isotherm,
    },
    Builtin {
        name: "compare_isotherms",
        family: "sorption",
        params: &[
            param!("data", "table", "lab table"),
            Param { name: "models", unit: "list", default: Some("[\"GAB\", \"Oswin\", \"modified Halsey\", \"modified Henderson\"]"), doc: "model names" },
            Param { name: "aw", unit: "text", default: Some("\"aw\""), doc: "activity column" },
            Param { name: "X", unit: "text", default: Some("\"X\""), doc: "moisture column" },
            Param { name: "T", unit: "text or degC", default: Some("\"T\""), doc: "temperature column or value" },
        ],
        returns: "comparison record (table, best, isotherm, fits)",
        doc: "Fit several isotherm models to the same points and compare them in a table (R2, RMSE, P, chi2, AIC, \
              BIC, Akaike weight). `best` names the model with the lowest AIC and `isotherm` is its isotherm.",
        method: "least-squares fits ranked by AIC",
        source: "Burnham & Anderson (2002), Model Selection and Multimodel Inference",
        validity: "more points than the largest parameter count",
        example: "compare_isotherms(lab, models: [\"GAB\", \"Oswin\", \"modified Halsey\"], T: 40 degC)",
        func: compare_isotherms,
    },
];
