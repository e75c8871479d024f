//! The catalogue of named units and SI prefixes, with conversion factors taken
//! from uom's unit definitions (no factor is typed here by hand).
//!
//! Each entry says which uom unit it comes from; `tests/units_table.rs` checks
//! every entry against its composition from SI base units and NIST SP 811.

use std::sync::OnceLock;

use uom::si::f64::ThermodynamicTemperature;
use uom::si::{
    amount_of_substance as amount, angle, electric_current as current, energy, force, length, mass,
    power, pressure, ratio, thermodynamic_temperature as temp, time, volume,
};
use uom::Conversion;

use super::{Dim, Kind};

/// How a number written in a unit maps to its SI magnitude beyond
/// `si = x * factor + offset`.
#[derive(Clone, Copy, PartialEq, Eq, Debug, Default)]
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
#[derive(Clone, Copy, PartialEq, Eq, Debug, Default)]
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
    pub dim: Dim,
    pub kind: Kind,
    pub scale: Scale,
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

struct Spec {
    symbol: &'static str,
    name: &'static str,
    source: &'static str,
    factor: f64,
    dim: Dim,
}

fn spec(
    symbol: &'static str,
    name: &'static str,
    source: &'static str,
    factor: f64,
    dim: Dim,
) -> Spec {
    Spec {
        symbol,
        name,
        source,
        factor,
        dim,
    }
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
}

/// Every named unit, built once.
pub fn base_units() -> &'static [BaseUnit] {
    static TABLE: OnceLock<Vec<BaseUnit>> = OnceLock::new();
    TABLE.get_or_init(build_table)
}

fn build_table() -> Vec<BaseUnit> {
    let mut t = Vec::new();
    t.extend(mechanical_units());
    t.extend(thermal_units());
    t.extend(dry_mass_units());
    t.extend(ratio_units());
    t
}

fn mechanical_units() -> Vec<BaseUnit> {
    use Dim as D;
    vec![
        spec(
            "m",
            "metre",
            "uom::si::length::meter",
            coef::<length::meter>(),
            D::LENGTH,
        )
        .si(),
        spec(
            "ft",
            "foot",
            "uom::si::length::foot",
            coef::<length::foot>(),
            D::LENGTH,
        )
        .plain(),
        spec(
            "in",
            "inch",
            "uom::si::length::inch",
            coef::<length::inch>(),
            D::LENGTH,
        )
        .plain(),
        spec(
            "yd",
            "yard",
            "uom::si::length::yard",
            coef::<length::yard>(),
            D::LENGTH,
        )
        .plain(),
        spec(
            "mi",
            "mile",
            "uom::si::length::mile",
            coef::<length::mile>(),
            D::LENGTH,
        )
        .plain(),
        spec(
            "kg",
            "kilogram",
            "uom::si::mass::kilogram",
            coef::<mass::kilogram>(),
            D::MASS,
        )
        .plain(),
        spec(
            "g",
            "gram",
            "uom::si::mass::gram",
            coef::<mass::gram>(),
            D::MASS,
        )
        .si(),
        spec(
            "t",
            "tonne",
            "uom::si::mass::ton",
            coef::<mass::ton>(),
            D::MASS,
        )
        .plain(),
        spec(
            "lb",
            "pound (avoirdupois)",
            "uom::si::mass::pound",
            coef::<mass::pound>(),
            D::MASS,
        )
        .plain(),
        spec(
            "oz",
            "ounce (avoirdupois)",
            "uom::si::mass::ounce",
            coef::<mass::ounce>(),
            D::MASS,
        )
        .plain(),
        spec(
            "gr",
            "grain",
            "uom::si::mass::grain",
            coef::<mass::grain>(),
            D::MASS,
        )
        .plain(),
        spec(
            "s",
            "second",
            "uom::si::time::second",
            coef::<time::second>(),
            D::TIME,
        )
        .si(),
        spec(
            "min",
            "minute",
            "uom::si::time::minute",
            coef::<time::minute>(),
            D::TIME,
        )
        .plain(),
        spec(
            "h",
            "hour",
            "uom::si::time::hour",
            coef::<time::hour>(),
            D::TIME,
        )
        .plain(),
        spec(
            "d",
            "day",
            "uom::si::time::day",
            coef::<time::day>(),
            D::TIME,
        )
        .plain(),
        spec(
            "mol",
            "mole",
            "uom::si::amount_of_substance::mole",
            coef::<amount::mole>(),
            D::AMOUNT,
        )
        .si(),
        spec(
            "A",
            "ampere",
            "uom::si::electric_current::ampere",
            coef::<current::ampere>(),
            D::CURRENT,
        )
        .si(),
        spec(
            "rad",
            "radian",
            "uom::si::angle::radian",
            coef::<angle::radian>(),
            D::NONE,
        )
        .si(),
        spec(
            "N",
            "newton",
            "uom::si::force::newton",
            coef::<force::newton>(),
            Dim([1, 1, -2, 0, 0, 0, 0]),
        )
        .si(),
        spec(
            "lbf",
            "pound-force",
            "uom::si::force::pound_force",
            coef::<force::pound_force>(),
            Dim([1, 1, -2, 0, 0, 0, 0]),
        )
        .plain(),
        spec(
            "Pa",
            "pascal",
            "uom::si::pressure::pascal",
            coef::<pressure::pascal>(),
            D::PRESSURE,
        )
        .si(),
        spec(
            "bar",
            "bar",
            "uom::si::pressure::bar",
            coef::<pressure::bar>(),
            D::PRESSURE,
        )
        .si(),
        spec(
            "atm",
            "standard atmosphere",
            "uom::si::pressure::atmosphere",
            coef::<pressure::atmosphere>(),
            D::PRESSURE,
        )
        .plain(),
        spec(
            "psi",
            "pound-force per square inch",
            "uom::si::pressure::psi",
            coef::<pressure::psi>(),
            D::PRESSURE,
        )
        .plain(),
        spec(
            "inHg",
            "inch of mercury (conventional)",
            "uom::si::pressure::inch_of_mercury",
            coef::<pressure::inch_of_mercury>(),
            D::PRESSURE,
        )
        .plain(),
        spec(
            "mmHg",
            "millimetre of mercury (conventional)",
            "uom::si::pressure::millimeter_of_mercury",
            coef::<pressure::millimeter_of_mercury>(),
            D::PRESSURE,
        )
        .plain(),
        spec(
            "inH2O",
            "inch of water (conventional)",
            "uom::si::pressure::inch_of_water",
            coef::<pressure::inch_of_water>(),
            D::PRESSURE,
        )
        .plain(),
        spec(
            "mmH2O",
            "millimetre of water (conventional)",
            "uom::si::pressure::millimeter_of_water",
            coef::<pressure::millimeter_of_water>(),
            D::PRESSURE,
        )
        .plain(),
        spec(
            "J",
            "joule",
            "uom::si::energy::joule",
            coef::<energy::joule>(),
            D::ENERGY,
        )
        .si(),
        spec(
            "Wh",
            "watt hour",
            "uom::si::energy::watt_hour",
            coef::<energy::watt_hour>(),
            D::ENERGY,
        )
        .si(),
        spec(
            "BTU",
            "British thermal unit (International Table)",
            "uom::si::energy::btu_it",
            coef::<energy::btu_it>(),
            D::ENERGY,
        )
        .plain(),
        spec(
            "Btu",
            "British thermal unit (International Table)",
            "uom::si::energy::btu_it",
            coef::<energy::btu_it>(),
            D::ENERGY,
        )
        .plain(),
        spec(
            "cal",
            "calorie (International Table)",
            "uom::si::energy::calorie_it",
            coef::<energy::calorie_it>(),
            D::ENERGY,
        )
        .plain(),
        spec(
            "kcal",
            "kilocalorie (International Table)",
            "uom::si::energy::kilocalorie_it",
            coef::<energy::kilocalorie_it>(),
            D::ENERGY,
        )
        .plain(),
        spec(
            "cal_th",
            "calorie (thermochemical)",
            "uom::si::energy::calorie",
            coef::<energy::calorie>(),
            D::ENERGY,
        )
        .plain(),
        spec(
            "kcal_th",
            "kilocalorie (thermochemical)",
            "uom::si::energy::kilocalorie",
            coef::<energy::kilocalorie>(),
            D::ENERGY,
        )
        .plain(),
        spec(
            "W",
            "watt",
            "uom::si::power::watt",
            coef::<power::watt>(),
            D::POWER,
        )
        .si(),
        spec(
            "hp",
            "horsepower (mechanical, 550 ft lbf/s)",
            "uom::si::power::horsepower",
            coef::<power::horsepower>(),
            D::POWER,
        )
        .plain(),
        spec(
            "L",
            "litre",
            "uom::si::volume::liter",
            coef::<volume::liter>(),
            D::VOLUME,
        )
        .si(),
        spec(
            "gal",
            "gallon (US liquid)",
            "uom::si::volume::gallon",
            coef::<volume::gallon>(),
            D::VOLUME,
        )
        .plain(),
    ]
}

fn thermal_units() -> Vec<BaseUnit> {
    let t = Dim::TEMPERATURE;
    let mut celsius = spec(
        "degC",
        "degree Celsius",
        "uom::si::thermodynamic_temperature::degree_celsius",
        coef::<temp::degree_celsius>(),
        t,
    )
    .unit(Kind::AbsoluteTemperature, false);
    celsius.offset = zero_of::<temp::degree_celsius>();
    let mut fahrenheit = spec(
        "degF",
        "degree Fahrenheit",
        "uom::si::thermodynamic_temperature::degree_fahrenheit",
        coef::<temp::degree_fahrenheit>(),
        t,
    )
    .unit(Kind::AbsoluteTemperature, false);
    fahrenheit.offset = zero_of::<temp::degree_fahrenheit>();
    vec![
        spec(
            "K",
            "kelvin",
            "uom::si::thermodynamic_temperature::kelvin",
            coef::<temp::kelvin>(),
            t,
        )
        .si(),
        celsius,
        fahrenheit,
        spec(
            "degR",
            "degree Rankine",
            "uom::si::thermodynamic_temperature::degree_rankine",
            coef::<temp::degree_rankine>(),
            t,
        )
        .plain(),
        spec(
            "delta_degC",
            "degree Celsius (difference)",
            "uom::si::temperature_interval::degree_celsius",
            coef::<uom::si::temperature_interval::degree_celsius>(),
            t,
        )
        .unit(Kind::TemperatureDifference, false),
        spec(
            "delta_degF",
            "degree Fahrenheit (difference)",
            "uom::si::temperature_interval::degree_fahrenheit",
            coef::<uom::si::temperature_interval::degree_fahrenheit>(),
            t,
        )
        .unit(Kind::TemperatureDifference, false),
    ]
}

fn dry_mass_units() -> Vec<BaseUnit> {
    let with = |mut u: BaseUnit, basis: Basis| {
        u.basis = basis;
        u
    };
    let kg = coef::<mass::kilogram>();
    let lb = coef::<mass::pound>();
    vec![
        with(
            spec(
                "kg_da",
                "kilogram of dry air",
                "uom::si::mass::kilogram",
                kg,
                Dim::MASS,
            )
            .plain(),
            Basis::DryAir,
        ),
        with(
            spec(
                "lb_da",
                "pound of dry air",
                "uom::si::mass::pound",
                lb,
                Dim::MASS,
            )
            .plain(),
            Basis::DryAir,
        ),
        with(
            spec(
                "kg_ds",
                "kilogram of dry solid",
                "uom::si::mass::kilogram",
                kg,
                Dim::MASS,
            )
            .plain(),
            Basis::DrySolid,
        ),
        with(
            spec(
                "lb_ds",
                "pound of dry solid",
                "uom::si::mass::pound",
                lb,
                Dim::MASS,
            )
            .plain(),
            Basis::DrySolid,
        ),
    ]
}

fn ratio_units() -> Vec<BaseUnit> {
    let one = coef::<ratio::ratio>();
    let pct = coef::<ratio::percent>();
    let none = Dim::NONE;
    let wet = |mut u: BaseUnit| {
        u.scale = Scale::WetBasis;
        u
    };
    vec![
        spec("%", "percent", "uom::si::ratio::percent", pct, none).unit(Kind::Fraction, false),
        spec(
            "db",
            "moisture content, dry basis (kg water/kg dry solid)",
            "uom::si::ratio::ratio",
            one,
            none,
        )
        .unit(Kind::Moisture, false),
        wet(spec(
            "wb",
            "moisture content, wet basis (kg water/kg wet material)",
            "uom::si::ratio::ratio",
            one,
            none,
        )
        .unit(Kind::Moisture, false)),
        spec(
            "%db",
            "moisture content, dry basis, in percent",
            "uom::si::ratio::percent",
            pct,
            none,
        )
        .unit(Kind::Moisture, false),
        wet(spec(
            "%wb",
            "moisture content, wet basis, in percent",
            "uom::si::ratio::percent",
            pct,
            none,
        )
        .unit(Kind::Moisture, false)),
        spec(
            "aw",
            "water activity (0..1)",
            "uom::si::ratio::ratio",
            one,
            none,
        )
        .unit(Kind::Activity, false),
        spec(
            "%rh",
            "relative humidity in percent",
            "uom::si::ratio::percent",
            pct,
            none,
        )
        .unit(Kind::Activity, false),
    ]
}

/// An SI prefix: symbol and factor.
#[derive(Clone, Copy, Debug)]
pub struct Prefix {
    pub symbol: &'static str,
    pub name: &'static str,
    pub factor: f64,
}

/// The SI prefixes, factors from uom's `prefix!` definitions. `u` is accepted
/// as an ASCII spelling of micro.
pub const PREFIXES: &[Prefix] = &[
    Prefix {
        symbol: "Y",
        name: "yotta",
        factor: uom::prefix!(yotta),
    },
    Prefix {
        symbol: "Z",
        name: "zetta",
        factor: uom::prefix!(zetta),
    },
    Prefix {
        symbol: "E",
        name: "exa",
        factor: uom::prefix!(exa),
    },
    Prefix {
        symbol: "P",
        name: "peta",
        factor: uom::prefix!(peta),
    },
    Prefix {
        symbol: "T",
        name: "tera",
        factor: uom::prefix!(tera),
    },
    Prefix {
        symbol: "G",
        name: "giga",
        factor: uom::prefix!(giga),
    },
    Prefix {
        symbol: "M",
        name: "mega",
        factor: uom::prefix!(mega),
    },
    Prefix {
        symbol: "k",
        name: "kilo",
        factor: uom::prefix!(kilo),
    },
    Prefix {
        symbol: "h",
        name: "hecto",
        factor: uom::prefix!(hecto),
    },
    Prefix {
        symbol: "da",
        name: "deca",
        factor: uom::prefix!(deca),
    },
    Prefix {
        symbol: "d",
        name: "deci",
        factor: uom::prefix!(deci),
    },
    Prefix {
        symbol: "c",
        name: "centi",
        factor: uom::prefix!(centi),
    },
    Prefix {
        symbol: "m",
        name: "milli",
        factor: uom::prefix!(milli),
    },
    Prefix {
        symbol: "µ",
        name: "micro",
        factor: uom::prefix!(micro),
    },
    Prefix {
        symbol: "u",
        name: "micro",
        factor: uom::prefix!(micro),
    },
    Prefix {
        symbol: "n",
        name: "nano",
        factor: uom::prefix!(nano),
    },
    Prefix {
        symbol: "p",
        name: "pico",
        factor: uom::prefix!(pico),
    },
    Prefix {
        symbol: "f",
        name: "femto",
        factor: uom::prefix!(femto),
    },
    Prefix {
        symbol: "a",
        name: "atto",
        factor: uom::prefix!(atto),
    },
    Prefix {
        symbol: "z",
        name: "zepto",
        factor: uom::prefix!(zepto),
    },
    Prefix {
        symbol: "y",
        name: "yocto",
        factor: uom::prefix!(yocto),
    },
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
