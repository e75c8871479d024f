//! The catalogue of named units and SI prefixes, with conversion factors taken
//! from uom's unit definitions (no factor is typed here by hand).
//!
//! Each entry says which uom unit it comes from; `tests/units_table.rs` checks
//! every entry against its composition from SI base units and NIST SP 811.

use std::sync::OnceLock;

use uom::si::f64::ThermodynamicTemperature;
use uom::si::thermodynamic_temperature as temp;
use uom::Conversion;

use super::{Dim, Kind};

/// How a number written in a unit maps to its SI magnitude beyond
/// `si = x * factor + offset`.
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug, Default)]
pub enum Scale {
    /// `si = x * factor + offset`.
    #[default]
    Linear,
    /// Wet-basis moisture: `w = x * factor` (kg water / kg wet material, must be
    /// in 0..1), stored on the dry basis as `X = w / (1 - w)`.
    WetBasis,
}

/// Which dry mass a mass unit counts; decides the kind of `kg/kg_da` (humidity
/// ratio) and `kg/kg_ds` (dry-basis moisture).
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug, Default)]
pub enum Basis {
    /// An ordinary unit.
    #[default]
    None,
    /// Mass of dry air (`kg_da`, `lb_da`).
    DryAir,
    /// Mass of dry solid (`kg_ds`, `lb_ds`).
    DrySolid,
}

/// A named unit of the catalogue.
#[derive(Clone, Debug)]
pub struct BaseUnit {
    /// The symbol written in worksheets, e.g. `ft`.
    pub symbol: &'static str,
    /// Name in words, e.g. "foot".
    pub name: &'static str,
    /// Where the factor comes from, e.g. `uom::si::length::foot`.
    pub source: &'static str,
    /// SI value of one unit (of one degree for temperatures).
    pub factor: f64,
    /// SI offset (kelvin at zero of the scale) for degC and degF, else zero.
    pub offset: f64,
    /// Dimension.
    pub dim: Dim,
    /// Kind of the quantities it makes.
    pub kind: Kind,
    /// Linear or wet-basis reading.
    pub scale: Scale,
    /// Dry-air or dry-solid mass marker.
    pub basis: Basis,
    /// Whether SI prefixes apply (`kPa`, `mm`, `kWh`).
    pub prefixable: bool,
}

/// The coefficient of a uom unit: the SI value of one unit.
fn coef<U: Conversion<f64, T = f64>>() -> f64 {
    U::coefficient()
}

/// The kelvin value at zero of a uom temperature scale.
fn zero_of<U>() -> f64
where
    U: temp::Unit + Conversion<f64, T = f64>,
{
    ThermodynamicTemperature::new::<U>(0.0).value
}

/// One catalogue row before its kind is set.
struct Spec {
    symbol: &'static str,
    name: &'static str,
    source: &'static str,
    factor: f64,
    dim: Dim,
}

impl Spec {
    fn unit(self, kind: Kind, prefixable: bool) -> BaseUnit {
        BaseUnit {
            symbol: self.symbol,
            name: self.name,
            source: self.source,
            factor: self.factor,
            offset: 0.0,
            dim: self.dim,
            kind,
            scale: Scale::Linear,
            basis: Basis::None,
            prefixable,
        }
    }
    /// A plain unit to which SI prefixes apply.
    fn si(self) -> BaseUnit {
        self.unit(Kind::Plain, true)
    }
    /// A plain unit without prefixes.
    fn plain(self) -> BaseUnit {
        self.unit(Kind::Plain, false)
    }
    /// A temperature-difference unit (`delta_degC`).
    fn difference(self) -> BaseUnit {
        self.unit(Kind::TemperatureDifference, false)
    }
    /// A mass of dry air (`kg_da`).
    fn dry_air(self) -> BaseUnit {
        BaseUnit {
            basis: Basis::DryAir,
            ..self.plain()
        }
    }
    /// A mass of dry solid (`kg_ds`).
    fn dry_solid(self) -> BaseUnit {
        BaseUnit {
            basis: Basis::DrySolid,
            ..self.plain()
        }
    }
    /// A percentage (`%`).
    fn fraction(self) -> BaseUnit {
        self.unit(Kind::Fraction, false)
    }
    /// A dry-basis moisture unit (`db`).
    fn moisture(self) -> BaseUnit {
        self.unit(Kind::Moisture, false)
    }
    /// A wet-basis moisture unit (`wb`): read through X = w/(1-w).
    fn wet_basis(self) -> BaseUnit {
        BaseUnit {
            scale: Scale::WetBasis,
            ..self.moisture()
        }
    }
    /// A relative humidity or water activity unit (`aw`).
    fn activity(self) -> BaseUnit {
        self.unit(Kind::Activity, false)
    }
}

/// Catalogue rows: `symbol, name, uom unit path under uom::si, dimension, role;`.
/// The factor is the uom unit's coefficient and the source text is its path,
/// so the two cannot drift apart.
macro_rules! rows {
    ($( $sym:literal, $name:literal, $first:ident $(:: $rest:ident)*, $dim:expr, $role:ident; )*) => {
        vec![$(
            Spec {
                symbol: $sym,
                name: $name,
                source: concat!("uom::si::", stringify!($first) $(, "::", stringify!($rest))*),
                factor: coef::<uom::si::$first $(:: $rest)*>(),
                dim: $dim,
            }
            .$role(),
        )*]
    };
}

/// Every named unit, built once.
pub fn base_units() -> &'static [BaseUnit] {
    static TABLE: OnceLock<Vec<BaseUnit>> = OnceLock::new();
    TABLE.get_or_init(build_table)
}

fn build_table() -> Vec<BaseUnit> {
    let mut t = Vec::new();
    t.extend(mechanical_units());
    t.extend(energy_units());
    t.extend(thermal_units());
    t.extend(ratio_units());
    t
}

const FORCE: Dim = Dim([1, 1, -2, 0, 0, 0, 0]);

#[rustfmt::skip]
fn mechanical_units() -> Vec<BaseUnit> {
    use Dim as D;
    rows![
        "m", "metre", length::meter, D::LENGTH, si;
        "ft", "foot", length::foot, D::LENGTH, plain;
        "in", "inch", length::inch, D::LENGTH, plain;
        "yd", "yard", length::yard, D::LENGTH, plain;
        "mi", "mile", length::mile, D::LENGTH, plain;
        "kg", "kilogram", mass::kilogram, D::MASS, plain;
        "g", "gram", mass::gram, D::MASS, si;
        "t", "tonne", mass::ton, D::MASS, plain;
        "lb", "pound (avoirdupois)", mass::pound, D::MASS, plain;
        "oz", "ounce (avoirdupois)", mass::ounce, D::MASS, plain;
        "gr", "grain", mass::grain, D::MASS, plain;
        "kg_da", "kilogram of dry air", mass::kilogram, D::MASS, dry_air;
        "lb_da", "pound of dry air", mass::pound, D::MASS, dry_air;
        "kg_ds", "kilogram of dry solid", mass::kilogram, D::MASS, dry_solid;
        "lb_ds", "pound of dry solid", mass::pound, D::MASS, dry_solid;
        "s", "second", time::second, D::TIME, si;
        "min", "minute", time::minute, D::TIME, plain;
        "h", "hour", time::hour, D::TIME, plain;
        "d", "day", time::day, D::TIME, plain;
        "mol", "mole", amount_of_substance::mole, D::AMOUNT, si;
        "A", "ampere", electric_current::ampere, D::CURRENT, si;
        "rad", "radian", angle::radian, D::NONE, si;
        "N", "newton", force::newton, FORCE, si;
        "lbf", "pound-force", force::pound_force, FORCE, plain;
        "Pa", "pascal", pressure::pascal, D::PRESSURE, si;
        "bar", "bar", pressure::bar, D::PRESSURE, si;
        "atm", "standard atmosphere", pressure::atmosphere, D::PRESSURE, plain;
        "psi", "pound-force per square inch", pressure::psi, D::PRESSURE, plain;
        "inHg", "inch of mercury (conventional)", pressure::inch_of_mercury, D::PRESSURE, plain;
        "mmHg", "millimetre of mercury (conventional)", pressure::millimeter_of_mercury, D::PRESSURE, plain;
        "inH2O", "inch of water (conventional)", pressure::inch_of_water, D::PRESSURE, plain;
        "mmH2O", "millimetre of water (conventional)", pressure::millimeter_of_water, D::PRESSURE, plain;
        "L", "litre", volume::liter, D::VOLUME, si;
        "gal", "gallon (US liquid)", volume::gallon, D::VOLUME, plain;
    ]
}

#[rustfmt::skip]
fn energy_units() -> Vec<BaseUnit> {
    use Dim as D;
    rows![
        "J", "joule", energy::joule, D::ENERGY, si;
        "Wh", "watt hour", energy::watt_hour, D::ENERGY, si;
        "BTU", "British thermal unit (International Table)", energy::btu_it, D::ENERGY, plain;
        "Btu", "British thermal unit (International Table)", energy::btu_it, D::ENERGY, plain;
        "cal", "calorie (International Table)", energy::calorie_it, D::ENERGY, plain;
        "kcal", "kilocalorie (International Table)", energy::kilocalorie_it, D::ENERGY, plain;
        "cal_th", "calorie (thermochemical)", energy::calorie, D::ENERGY, plain;
        "kcal_th", "kilocalorie (thermochemical)", energy::kilocalorie, D::ENERGY, plain;
        "W", "watt", power::watt, D::POWER, si;
        "hp", "horsepower (mechanical, 550 ft lbf/s)", power::horsepower, D::POWER, plain;
    ]
}

#[rustfmt::skip]
fn thermal_units() -> Vec<BaseUnit> {
    let t = Dim::TEMPERATURE;
    let mut out = rows![
        "K", "kelvin", thermodynamic_temperature::kelvin, t, si;
        "degC", "degree Celsius", thermodynamic_temperature::degree_celsius, t, plain;
        "degF", "degree Fahrenheit", thermodynamic_temperature::degree_fahrenheit, t, plain;
        "degR", "degree Rankine", thermodynamic_temperature::degree_rankine, t, plain;
        "delta_degC", "degree Celsius (difference)", temperature_interval::degree_celsius, t, difference;
        "delta_degF", "degree Fahrenheit (difference)", temperature_interval::degree_fahrenheit, t, difference;
    ];
    // Bare degC and degF are absolute temperatures on an offset scale.
    make_absolute(&mut out, "degC", zero_of::<temp::degree_celsius>());
    make_absolute(&mut out, "degF", zero_of::<temp::degree_fahrenheit>());
    out
}

/// Mark the row `symbol` as an absolute-temperature scale whose zero lies at
/// `zero_kelvin`.
fn make_absolute(rows: &mut [BaseUnit], symbol: &str, zero_kelvin: f64) {
    for row in rows.iter_mut().filter(|r| r.symbol == symbol) {
        row.offset = zero_kelvin;
        row.kind = Kind::AbsoluteTemperature;
    }
}

#[rustfmt::skip]
fn ratio_units() -> Vec<BaseUnit> {
    let none = Dim::NONE;
    rows![
        "%", "percent", ratio::percent, none, fraction;
        "db", "moisture content, dry basis (kg water/kg dry solid)", ratio::ratio, none, moisture;
        "wb", "moisture content, wet basis (kg water/kg wet material)", ratio::ratio, none, wet_basis;
        "%db", "moisture content, dry basis, in percent", ratio::percent, none, moisture;
        "%wb", "moisture content, wet basis, in percent", ratio::percent, none, wet_basis;
        "aw", "water activity (0..1)", ratio::ratio, none, activity;
        "%rh", "relative humidity in percent", ratio::percent, none, activity;
    ]
}

/// An SI prefix: symbol and factor.
#[derive(Clone, Copy, Debug)]
pub struct Prefix {
    /// Symbol, e.g. `k`.
    pub symbol: &'static str,
    /// Name, e.g. "kilo".
    pub name: &'static str,
    /// Factor, e.g. 1000.
    pub factor: f64,
}

/// The SI prefixes, factors from uom's `prefix!` definitions. `u` is accepted
/// as an ASCII spelling of micro.
#[rustfmt::skip]
pub const PREFIXES: &[Prefix] = &[
    Prefix { symbol: "Y", name: "yotta", factor: uom::prefix!(yotta) },
    Prefix { symbol: "Z", name: "zetta", factor: uom::prefix!(zetta) },
    Prefix { symbol: "E", name: "exa", factor: uom::prefix!(exa) },
    Prefix { symbol: "P", name: "peta", factor: uom::prefix!(peta) },
    Prefix { symbol: "T", name: "tera", factor: uom::prefix!(tera) },
    Prefix { symbol: "G", name: "giga", factor: uom::prefix!(giga) },
    Prefix { symbol: "M", name: "mega", factor: uom::prefix!(mega) },
    Prefix { symbol: "k", name: "kilo", factor: uom::prefix!(kilo) },
    Prefix { symbol: "h", name: "hecto", factor: uom::prefix!(hecto) },
    Prefix { symbol: "da", name: "deca", factor: uom::prefix!(deca) },
    Prefix { symbol: "d", name: "deci", factor: uom::prefix!(deci) },
    Prefix { symbol: "c", name: "centi", factor: uom::prefix!(centi) },
    Prefix { symbol: "m", name: "milli", factor: uom::prefix!(milli) },
    Prefix { symbol: "µ", name: "micro", factor: uom::prefix!(micro) },
    Prefix { symbol: "u", name: "micro", factor: uom::prefix!(micro) },
    Prefix { symbol: "n", name: "nano", factor: uom::prefix!(nano) },
    Prefix { symbol: "p", name: "pico", factor: uom::prefix!(pico) },
    Prefix { symbol: "f", name: "femto", factor: uom::prefix!(femto) },
    Prefix { symbol: "a", name: "atto", factor: uom::prefix!(atto) },
    Prefix { symbol: "z", name: "zepto", factor: uom::prefix!(zepto) },
    Prefix { symbol: "y", name: "yocto", factor: uom::prefix!(yocto) },
];

/// Other spellings accepted for a symbol (resolved to the canonical symbol).
const ALIASES: &[(&str, &str)] = &[
    ("°C", "degC"),
    ("°F", "degF"),
    ("°R", "degR"),
    ("℃", "degC"),
];

/// A catalogue entry by exact symbol or alias.
pub fn find_base(symbol: &str) -> Option<&'static BaseUnit> {
    let canonical = ALIASES
        .iter()
        .find(|(alias, _)| *alias == symbol)
        .map_or(symbol, |(_, c)| *c);
    base_units().iter().find(|u| u.symbol == canonical)
}

/// A prefixed symbol split into prefix and catalogue entry (`kPa` -> k, Pa).
/// Exact symbols win over prefixed readings (`min` is minute, not milli-inch).
pub fn find_prefixed(symbol: &str) -> Option<(&'static Prefix, &'static BaseUnit)> {
    PREFIXES.iter().find_map(|p| {
        let rest = symbol.strip_prefix(p.symbol)?;
        let base = base_units().iter().find(|u| u.symbol == rest)?;
        base.prefixable.then_some((p, base))
    })
}
