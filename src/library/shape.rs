//! What `siccant check` knows about built-ins without running them: the
//! shape of each result (a quantity's dimension and kind, or a record's
//! fields) and what each parameter accepts.
//!
//! Results come from the registry's `returns` text when it is a unit (or ends
//! in `, UNIT`), else from [`SHAPES`], a table keyed by name. A result whose
//! shape is not fixed (tables, plots, lists, fits, dryer results) is
//! [`Shape::Unknown`], and what depends on it stays unchecked. Parameters are
//! read from their `unit` text (`degC`, `kg/s or m^3/s`, `air`, `text`, ...).
//! Tests check that every built-in's `returns` and every parameter's text is
//! understood, and that each declared shape matches what the example call
//! really returns.

use crate::diag::Diagnostic;
use crate::units::{describe_dim, parse_unit, Dim, Kind, Quantity};
use crate::value::{Record, Value};

use super::{type_word, Arg, Builtin};

/// The shape of a built-in's result.
#[derive(Clone, Copy, Debug)]
pub enum Shape {
    /// A quantity in this unit (its dimension and kind; the magnitude unknown).
    Unit(&'static str),
    /// Shaped like the named argument (`abs`, `max`, `min`).
    SameAs(&'static str),
    /// Shaped like the items of the named list argument (`mean`, `sum`).
    ItemOf(&'static str),
    /// The square root of the named argument's dimension.
    Root(&'static str),
    /// A record of this type, with field groups of (name, unit or `text`).
    Record(
        &'static str,
        &'static [&'static [(&'static str, &'static str)]],
    ),
    /// Not fixed before the call runs (tables, plots, lists, fits, ...).
    Unknown,
}

type Fields = &'static [(&'static str, &'static str)];

/// Every air state's fields (DESIGN.md), in the units they are kept in.
const AIR: Fields = &[
    ("T", "degC"),
    ("rh", "%rh"),
    ("w", "kg/kg_da"),
    ("dewpoint", "degC"),
    ("wetbulb", "degC"),
    ("h", "kJ/kg"),
    ("v", "m^3/kg"),
    ("rho", "kg/m^3"),
    ("cp", "kJ/(kg*K)"),
    ("p", "kPa"),
    ("pv", "kPa"),
    ("w_sat", "kg/kg_da"),
    ("degree_of_saturation", "%"),
];
/// Fields a process adds when given an air `flow`.
const FLOW: Fields = &[("flow", "kg/s"), ("duty", "kW"), ("volume_flow", "m^3/s")];
const HEAT: Fields = &[("q", "kJ/kg")];
const COOL: Fields = &[
    ("q", "kJ/kg"),
    ("condensate", "kg/kg_da"),
    ("condensate_flow", "kg/s"),
];
const WATER: Fields = &[
    ("q", "kJ/kg"),
    ("water", "kg/kg_da"),
    ("water_flow", "kg/s"),
];
const MIX: Fields = &[("flow", "kg/s"), ("fog", "kg/kg_da")];
const ISOTHERM: Fields = &[("model", "text"), ("scope", "text")];

/// Results whose `returns` text is not a plain unit, by built-in name.
pub const SHAPES: &[(&str, Shape)] = &[
    ("abs", Shape::SameAs("x")),
    ("max", Shape::SameAs("a")),
    ("min", Shape::SameAs("a")),
    ("mean", Shape::ItemOf("values")),
    ("sum", Shape::ItemOf("values")),
    ("sqrt", Shape::Root("x")),
    ("air", Shape::Record("air", &[AIR])),
    ("heat", Shape::Record("air", &[AIR, HEAT, FLOW])),
    ("cool", Shape::Record("air", &[AIR, COOL, FLOW])),
    ("saturate", Shape::Record("air", &[AIR, WATER, FLOW])),
    ("add_steam", Shape::Record("air", &[AIR, WATER, FLOW])),
    ("add_water", Shape::Record("air", &[AIR, WATER, FLOW])),
    ("mix", Shape::Record("air", &[AIR, MIX])),
    ("wet_surface", Shape::Record("wet_surface", &[WET_SURFACE])),
    ("wet_product", Shape::Record("wet_product", &[WET_PRODUCT])),
    (
        "arrhenius_diffusivity",
        Shape::Record("arrhenius_fit", &[ARRHENIUS]),
    ),
    ("gab", Shape::Record("isotherm", &[ISOTHERM, GAB])),
    ("bet", Shape::Record("isotherm", &[ISOTHERM, BET])),
    ("oswin", Shape::Record("isotherm", &[ISOTHERM, OSWIN])),
    ("smith", Shape::Record("isotherm", &[ISOTHERM, SMITH])),
    ("peleg", Shape::Record("isotherm", &[ISOTHERM, PELEG])),
    (
        "henderson",
        Shape::Record("isotherm", &[ISOTHERM, HENDERSON]),
    ),
    (
        "modified_halsey",
        Shape::Record("isotherm", &[ISOTHERM, MOD_HALSEY]),
    ),
    (
        "modified_oswin",
        Shape::Record("isotherm", &[ISOTHERM, MOD_OSWIN]),
    ),
    (
        "modified_henderson",
        Shape::Record("isotherm", &[ISOTHERM, MOD_HENDERSON]),
    ),
    (
        "modified_chung_pfost",
        Shape::Record("isotherm", &[ISOTHERM, CHUNG_PFOST]),
    ),
    ("nu_cylinder", Shape::Unit("-")),
    ("nu_flat_plate", Shape::Unit("-")),
    ("nu_packed_bed", Shape::Unit("-")),
    ("nu_sphere", Shape::Unit("-")),
    ("nusselt", Shape::Unit("-")),
    ("reynolds", Shape::Unit("-")),
    ("sherwood", Shape::Unit("-")),
    ("crank_ratio", Shape::Unit("-")),
    ("equilibrium_moisture", Shape::Unit("db")),
    ("free_moisture", Shape::Unit("db")),
    ("water_activity", Shape::Unit("aw")),
    ("colburn_ky", Shape::Unit("kg/(m^2*s)")),
];

const WET_SURFACE: Fields = &[
    ("Ts", "degC"),
    ("w_s", "kg/kg_da"),
    ("Rc", "kg/(m^2*s)"),
    ("q", "W/m^2"),
    ("q_conv", "W/m^2"),
    ("q_rad", "W/m^2"),
    ("q_cond", "W/m^2"),
    ("latent", "kJ/kg"),
    ("ky", "kg/(m^2*s)"),
    ("h", "W/(m^2*K)"),
];
const WET_PRODUCT: Fields = &[
    ("cp_solid", "kJ/(kg*K)"),
    ("X_critical", "db"),
    ("X_eq", "db"),
    ("exponent", "-"),
    ("T_max", "degC"),
];
const ARRHENIUS: Fields = &[
    ("D0", "m^2/s"),
    ("Ea", "kJ/mol"),
    ("Ea_se", "kJ/mol"),
    ("R2", "-"),
];
const GAB: Fields = &[
    ("Xm", "db"),
    ("C", "-"),
    ("K", "-"),
    ("dHc", "kJ/mol"),
    ("dHk", "kJ/mol"),
    ("T", "degC"),
];
const BET: Fields = &[("Xm", "db"), ("C", "-"), ("T", "degC")];
const OSWIN: Fields = &[("A", "db"), ("B", "-"), ("T", "degC")];
const SMITH: Fields = &[("A", "db"), ("B", "db"), ("T", "degC")];
const PELEG: Fields = &[
    ("A", "db"),
    ("B", "db"),
    ("C", "-"),
    ("D", "-"),
    ("T", "degC"),
];
const HENDERSON: Fields = &[("k", "1/K"), ("n", "-")];
const MOD_OSWIN: Fields = &[("A", "db"), ("B", "1/K"), ("C", "-")];
const MOD_HALSEY: Fields = &[("A", "-"), ("B", "1/K"), ("C", "-")];
const MOD_HENDERSON: Fields = &[("A", "1/K"), ("B", "delta_degC"), ("C", "-")];
const CHUNG_PFOST: Fields = &[("A", "delta_degC"), ("B", "delta_degC"), ("C", "-")];

/// The shape of `b`'s result: from [`SHAPES`], else its `returns` text read as
/// a unit, else unknown.
pub fn result_shape(b: &Builtin) -> Shape {
    if let Some((_, s)) = SHAPES.iter().find(|(n, _)| *n == b.name) {
        return *s;
    }
    match returns_unit(b.returns) {
        Some(unit) => Shape::Unit(unit),
        None => Shape::Unknown,
    }
}

/// Words of a `returns` text for results whose shape is not fixed before the
/// call runs (see [`Shape::Unknown`]).
const NOT_FIXED: &[&str] = &[
    "record",
    "table",
    "plot",
    "list",
    "fit",
    "material",
    "distribution",
    "curve",
    "text",
    "the input's value",
];

/// Does a `returns` text say the result's shape is not fixed (a table, a
/// plot, a list, a fit, a dryer result, ...)? A test checks that every
/// built-in's result is either shaped or says so.
pub fn says_not_fixed(returns: &str) -> bool {
    NOT_FIXED.iter().any(|w| returns.contains(w))
}

/// The unit in a `returns` text: all of it, or the part after the last `, `.
pub fn returns_unit(returns: &'static str) -> Option<&'static str> {
    let tail = returns.rsplit_once(", ").map_or(returns, |(_, t)| t);
    [returns, tail]
        .into_iter()
        .find(|t| *t == "-" || parse_unit(t).is_ok())
}

/// A quantity of unknown magnitude (NaN) in `unit` (`-` for a plain number).
pub fn unknown_in(unit: &str) -> Option<Value> {
    if unit == "-" {
        return Some(Value::Quantity(
            Quantity::new(f64::NAN, Dim::NONE, Kind::Plain),
            None,
        ));
    }
    let u = parse_unit(unit).ok()?;
    Some(Value::Quantity(
        Quantity::new(f64::NAN, u.dim, u.kind),
        None,
    ))
}

/// The value `siccant check` gives a call of `b`: the shape of its result with
/// unknown magnitudes, or `None` when the shape is not fixed.
pub fn shaped_result(b: &Builtin, args: &[(usize, &Arg)]) -> Option<Value> {
    let arg = |name: &str| {
        let i = b.param_index(name)?;
        args.iter().find(|(j, _)| *j == i).map(|(_, a)| &a.value)
    };
    match result_shape(b) {
        Shape::Unit(u) => unknown_in(u),
        Shape::SameAs(p) => arg(p).and_then(quantity_like),
        Shape::ItemOf(p) => match arg(p)? {
            Value::List(items) => items.first().and_then(quantity_like),
            _ => None,
        },
        Shape::Root(p) => match arg(p).and_then(quantity_like)? {
            Value::Quantity(q, _) => {
                let dim = q.dim.root(2)?;
                Some(Value::Quantity(
                    Quantity::new(f64::NAN, dim, Kind::Plain),
                    None,
                ))
            }
            _ => None,
        },
        Shape::Record(type_name, groups) => record(type_name, groups),
        Shape::Unknown => None,
    }
}

/// A quantity's shape with its magnitude forgotten.
fn quantity_like(v: &Value) -> Option<Value> {
    match v {
        Value::Quantity(q, _) => Some(Value::Quantity(
            Quantity::new(f64::NAN, q.dim, q.kind),
            None,
        )),
        _ => None,
    }
}

fn record(type_name: &'static str, groups: &[Fields]) -> Option<Value> {
    let mut r = Record::new(type_name);
    for (name, unit) in groups.iter().flat_map(|g| g.iter()) {
        let v = match *unit {
            "text" => Value::Str(String::new()),
            u => unknown_in(u)?,
        };
        r.push(*name, v);
    }
    Some(Value::Record(r))
}

/// What a parameter's `unit` text accepts.
#[derive(Clone, Debug, PartialEq)]
pub enum Accepts {
    /// A quantity of one of these dimensions (or a list of them).
    Dims(Vec<Dim>),
    /// A record of one of these types.
    Records(Vec<&'static str>),
    /// Text.
    Text,
    /// A mixture, or something `check` does not decide (lists, tables, `any`).
    Anything,
}

/// Record types a parameter can name.
const RECORD_TYPES: &[&str] = &[
    "air",
    "isotherm",
    "material",
    "wet_product",
    "rate_curve",
    "drying_test",
    "distribution",
    "curve",
];

/// Read a parameter's `unit` text, e.g. `degC`, `kg/s or m^3/s`, `air`,
/// `text`, `list of degC`. `None` when the text is not understood.
pub fn accepts(unit: &'static str) -> Option<Accepts> {
    let mut dims = Vec::new();
    let mut records = Vec::new();
    let mut text = false;
    for alt in unit.split(" or ") {
        if alt == "-" {
            dims.push(Dim::NONE);
        } else if let Ok(u) = parse_unit(alt) {
            dims.push(u.dim);
        } else if let Some(t) = RECORD_TYPES.iter().find(|t| **t == alt) {
            records.push(*t);
        } else if alt == "text" {
            text = true;
        } else if is_open(alt) {
            return Some(Accepts::Anything);
        } else {
            return None;
        }
    }
    Some(match (dims.is_empty(), records.is_empty(), text) {
        (false, true, false) => Accepts::Dims(dims),
        (true, false, false) => Accepts::Records(records),
        (true, true, true) => Accepts::Text,
        _ => Accepts::Anything,
    })
}

/// Parameter texts whose check is left to the call itself.
fn is_open(alt: &str) -> bool {
    alt == "any"
        || alt == "list"
        || alt == "table"
        || alt.starts_with("list of ")
        || alt.starts_with("same as ")
        || alt.starts_with("difference of ")
        || alt.starts_with('[')
}

/// Check one argument against its parameter without running the call, with
/// the messages the call itself would give.
pub fn check_arg(b: &Builtin, index: usize, arg: &Arg) -> Result<(), Diagnostic> {
    let Some(param) = b.params.get(index) else {
        return Ok(());
    };
    let Some(accepted) = accepts(param.unit) else {
        return Ok(());
    };
    let name = param.name;
    let wrong = |what: String| {
        Diagnostic::error(
            arg.span,
            format!("argument `{name}` of `{}` {what}", b.name),
        )
    };
    match (&accepted, &arg.value) {
        (Accepts::Dims(dims), v) => match quantity_dim(v) {
            Some(Some(d)) if dims.contains(&d) => Ok(()),
            Some(Some(d)) => Err(wrong(format!(
                "expects {}, found {}",
                dims_words(dims),
                dim_words(d)
            ))),
            Some(None) => Ok(()),
            None => Err(wrong(format!("expects a quantity, found {}", type_word(v)))),
        },
        (Accepts::Records(types), Value::Record(r)) if types.contains(&&*r.type_name) => Ok(()),
        // Only air parameters take one record type and nothing else; others
        // also take records their text does not name (a material, a fit).
        (Accepts::Records(types), Value::Record(r))
            if r.type_name == "record" || types != &["air"] =>
        {
            Ok(())
        }
        (Accepts::Records(types), v) => Err(wrong(format!(
            "must be {}, found {}",
            types.join(" or "),
            type_word(v)
        ))),
        (Accepts::Text, Value::Str(_)) | (Accepts::Anything, _) => Ok(()),
        (Accepts::Text, v) => Err(wrong(format!("expects text, found {}", type_word(v)))),
    }
}

/// The dimension of a quantity, or of a list's quantities: `Some(None)` for a
/// list that is empty or mixed (left to the call), `None` for anything else.
fn quantity_dim(v: &Value) -> Option<Option<Dim>> {
    match v {
        Value::Quantity(q, _) => Some(Some(q.dim)),
        Value::List(items) => {
            let dims: Option<Vec<Option<Dim>>> = items.iter().map(quantity_dim).collect();
            let dims = dims?;
            let first = dims.first().copied().flatten();
            Some(first.filter(|d| dims.iter().all(|x| *x == Some(*d))))
        }
        _ => None,
    }
}

fn dims_words(dims: &[Dim]) -> String {
    let words: Vec<String> = dims.iter().map(|d| dim_words(*d)).collect();
    words.join(" or ")
}

/// "length [m]", or "dimensionless number" without an empty unit.
fn dim_words(d: Dim) -> String {
    match d.si_unit() {
        u if u.is_empty() => describe_dim(d),
        u => format!("{} [{u}]", describe_dim(d)),
    }
}
