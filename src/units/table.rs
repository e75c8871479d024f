//! Units as values: lookup with SI prefixes, compound units built by the
//! evaluator from unit expressions (`W/(m^2*K)`), and conversion to and from SI.
//!
//! Temperature rule: a *bare* `degC` or `degF` is affine (an absolute
//! temperature, offset applied); inside a compound (`W/(m^2*degC)`,
//! `BTU/(h*ft^2*degF)`) it is a difference of size 1 K or 5/9 K.

use crate::eval::FastMap;
use std::cell::RefCell;
use std::sync::Arc;

use strsim::levenshtein;

use super::catalog::{base_units, find_base, find_prefixed, BaseUnit, Basis, Prefix, Scale};
use super::{memo, Dim, Kind, Quantity, UnitError};

pub use super::names::describe_dim;

/// A unit: how to turn a number written in it into SI, and back.
///
/// Its data ([`UnitData`], read through `Deref`: `unit.factor`) is kept once
/// per distinct unit for the life of the program ([`intern`]): a unit is one
/// pointer, and copying one (as every quantity shown in a unit does when its
/// value is copied) copies the pointer and counts nothing. Threads that copy
/// the same unit at every point of a study no longer share a reference count.
#[derive(Clone)]
pub struct Unit(&'static UnitData);

impl std::ops::Deref for Unit {
    type Target = UnitData;

    #[inline]
    fn deref(&self) -> &UnitData {
        self.0
    }
}

impl From<UnitData> for Unit {
    fn from(data: UnitData) -> Unit {
        Unit(intern(data))
    }
}

impl PartialEq for Unit {
    fn eq(&self, other: &Unit) -> bool {
        std::ptr::eq(self.0, other.0) || *self.0 == *other.0
    }
}

impl std::fmt::Debug for Unit {
    /// As the data (a unit prints as `UnitData { symbol: .. }`).
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        self.0.fmt(f)
    }
}

/// The one kept copy of `data`: the same data (bit for bit) gives the same
/// address, so the units a program keeps are as many as the distinct units
/// it ever made (its worksheets' unit expressions, the catalogue's units
/// with prefixes, the display units of each dimension), not one per value.
/// They are never freed; a session that keeps making new units (a REPL run
/// for days) keeps each distinct one, a few hundred bytes.
fn intern(data: UnitData) -> &'static UnitData {
    use std::hash::{Hash, Hasher};
    use std::sync::{Mutex, OnceLock};
    type Buckets = FastMap<u64, Vec<&'static UnitData>>;
    static KEPT: OnceLock<Mutex<Buckets>> = OnceLock::new();
    let mut h = std::collections::hash_map::DefaultHasher::new();
    data.symbol.hash(&mut h);
    data.factor.to_bits().hash(&mut h);
    data.offset.to_bits().hash(&mut h);
    data.dim.hash(&mut h);
    data.kind.hash(&mut h);
    data.scale.hash(&mut h);
    data.basis.hash(&mut h);
    data.parts.hash(&mut h);
    let key = h.finish();
    let kept = KEPT.get_or_init(|| Mutex::new(FastMap::default()));
    // (A panic while the lock was held left the buckets whole: take them.)
    let mut kept = kept.lock().unwrap_or_else(|e| e.into_inner());
    let bucket = kept.entry(key).or_default();
    if let Some(same) = bucket.iter().find(|d| d.same_bits(&data)) {
        return same;
    }
    let leaked: &'static UnitData = Box::leak(Box::new(data));
    bucket.push(leaked);
    leaked
}

/// What a [`Unit`] is made of.
#[derive(Clone, PartialEq, Debug)]
pub struct UnitData {
    /// Canonical display symbol, e.g. `W/(m^2*K)` (shared: cloning a unit is cheap).
    pub symbol: Arc<str>,
    /// SI value of one unit (for affine units, of one degree).
    pub factor: f64,
    /// SI offset added after scaling (273.15 for degC); zero for linear units.
    pub offset: f64,
    /// Dimension of the unit.
    pub dim: Dim,
    /// Kind of the quantities a number in this unit makes (`degC` absolute, `db` moisture).
    pub kind: Kind,
    /// Non-linear reading beyond factor/offset (wet-basis moisture).
    pub scale: Scale,
    /// Which dry mass the unit counts (`kg_da`, `kg_ds`); decides the kind of a ratio.
    pub basis: Basis,
    /// The symbols and exponents the unit is built from, for its display symbol
    /// (shared: cloning a unit is cheap).
    pub parts: Arc<[(String, i32)]>,
}

impl UnitData {
    /// Equal field for field, the numbers bit for bit (what [`intern`] keeps
    /// once; `==` also takes -0.0 for 0.0).
    fn same_bits(&self, other: &UnitData) -> bool {
        self.symbol == other.symbol
            && self.factor.to_bits() == other.factor.to_bits()
            && self.offset.to_bits() == other.offset.to_bits()
            && self.dim == other.dim
            && self.kind == other.kind
            && self.scale == other.scale
            && self.basis == other.basis
            && self.parts == other.parts
    }
}

/// Look up a unit symbol, with SI prefixes (`kPa`, `mm`, `kJ`, `kWh`).
///
/// Exact symbols win over prefixed readings; prefixes apply only to SI-named
/// units (m, g, s, K, mol, A, rad, N, Pa, bar, J, Wh, W, L).
pub fn lookup_unit(symbol: &str) -> Option<Unit> {
    thread_local! {
        static LOOKED_UP: memo::Texts = RefCell::new(FastMap::default());
    }
    memo::remembered(&LOOKED_UP, symbol, |s| lookup_uncached(s).ok_or(())).ok()
}

fn lookup_uncached(symbol: &str) -> Option<Unit> {
    if let Some(base) = find_base(symbol) {
        return Some(Unit::from_base(base, None));
    }
    let (prefix, base) = find_prefixed(symbol)?;
    Some(Unit::from_base(base, Some(prefix)))
}

/// The closest known unit symbol to a misspelt one ("did you mean").
///
/// Common spellings from other conventions are mapped first (`C` -> `degC`,
/// `hr` -> `h`, `m3` -> `m^3`); otherwise the nearest catalogue or common
/// prefixed symbol by edit distance, if it is close.
pub fn suggest_unit(symbol: &str) -> Option<String> {
    if let Some(s) = common_misspelling(symbol) {
        return Some(s.to_string());
    }
    if let Some(s) = power_spelling(symbol) {
        return Some(s);
    }
    let all = candidates();
    let lower = symbol.to_lowercase();
    if let Some((_, s)) = all.iter().find(|(key, _)| key.to_lowercase() == lower) {
        return Some(s.clone());
    }
    let limit = if symbol.chars().count() <= 3 { 1 } else { 2 };
    all.into_iter()
        .map(|(key, suggestion)| (levenshtein(symbol, &key), suggestion))
        .filter(|(d, _)| *d <= limit)
        .min_by(|a, b| a.0.cmp(&b.0).then_with(|| a.1.len().cmp(&b.1.len())))
        .map(|(_, s)| s)
}

/// Spellings from other conventions and their siccant symbol.
const MISSPELLINGS: &[(&str, &str)] = &[
    ("C", "degC"),
    ("F", "degF"),
    ("R", "degR"),
    ("degK", "K"),
    ("celsius", "degC"),
    ("fahrenheit", "degF"),
    ("kelvin", "K"),
    ("hr", "h"),
    ("hrs", "h"),
    ("sec", "s"),
    ("secs", "s"),
    ("mins", "min"),
    ("day", "d"),
    ("days", "d"),
    ("lbs", "lb"),
    ("lbm", "lb"),
    ("l", "L"),
    ("ml", "mL"),
    ("btu", "BTU"),
    ("KW", "kW"),
    ("Kw", "kW"),
    ("kw", "kW"),
    ("KJ", "kJ"),
    ("kj", "kJ"),
    ("Kpa", "kPa"),
    ("KPa", "kPa"),
    ("kpa", "kPa"),
    ("pa", "Pa"),
    ("KG", "kg"),
    ("Kg", "kg"),
    ("RH", "%rh"),
    ("rh", "%rh"),
    ("pct", "%"),
    ("percent", "%"),
    ("tonne", "t"),
    ("psia", "psi"),
    ("psig", "psi"),
    ("kwh", "kWh"),
    ("deg", "degC"),
    ("dC", "degC"),
    ("dF", "degF"),
    ("cfm", "ft^3/min"),
    ("CFM", "ft^3/min"),
    ("gpm", "gal/min"),
    ("mph", "mi/h"),
    ("kph", "km/h"),
    ("Torr", "mmHg"),
    ("torr", "mmHg"),
    ("micron", "um"),
];

fn common_misspelling(symbol: &str) -> Option<&'static str> {
    MISSPELLINGS
        .iter()
        .find(|(wrong, _)| *wrong == symbol)
        .map(|(_, right)| *right)
}

/// `m3` -> `m^3`, `ft2` -> `ft^2`.
fn power_spelling(symbol: &str) -> Option<String> {
    let digits = symbol.trim_start_matches(|c: char| !c.is_ascii_digit());
    let stem = &symbol[..symbol.len() - digits.len()];
    let all_digits = !digits.is_empty() && digits.chars().all(|c| c.is_ascii_digit());
    (all_digits && lookup_unit(stem).is_some()).then(|| format!("{stem}^{digits}"))
}

/// (what might have been typed, what to suggest): catalogue symbols, the
/// prefixed forms people commonly write, one-word unit names (`pascal` -> `Pa`)
/// and the common misspellings.
fn candidates() -> Vec<(String, String)> {
    let mut out: Vec<(String, String)> = Vec::new();
    for base in base_units() {
        out.push((base.symbol.to_string(), base.symbol.to_string()));
        if !base.name.contains(' ') {
            out.push((base.name.to_string(), base.symbol.to_string()));
        }
        if base.prefixable {
            for p in ["k", "M", "m", "c", "µ"] {
                let s = format!("{p}{}", base.symbol);
                out.push((s.clone(), s));
            }
        }
    }
    out.extend(
        MISSPELLINGS
            .iter()
            .map(|(w, r)| (w.to_string(), r.to_string())),
    );
    out
}

/// Every unit symbol (without prefixes), for completion and docs.
pub fn unit_names() -> Vec<&'static str> {
    base_units().iter().map(|u| u.symbol).collect()
}

impl Unit {
    fn from_base(base: &BaseUnit, prefix: Option<&Prefix>) -> Unit {
        let (p_sym, p_factor) = prefix.map_or(("", 1.0), |p| (p.symbol, p.factor));
        let symbol = format!("{p_sym}{}", base.symbol);
        Unit::from(UnitData {
            parts: Arc::from([(symbol.clone(), 1)]),
            symbol: symbol.into(),
            factor: base.factor * p_factor,
            offset: base.offset,
            dim: base.dim,
            kind: base.kind,
            scale: base.scale,
            basis: base.basis,
        })
    }

    /// The unit of a dimensionless plain number (`1`, as in `1/h`).
    pub fn one() -> Unit {
        Unit::from(UnitData {
            symbol: Arc::from(""),
            factor: 1.0,
            offset: 0.0,
            dim: Dim::NONE,
            kind: Kind::Plain,
            scale: Scale::Linear,
            basis: Basis::None,
            parts: Arc::from([]),
        })
    }

    /// Product of two units (`kW*h`). Offsets are dropped: inside a compound a
    /// degree is a difference.
    pub fn mul(&self, other: &Unit) -> Unit {
        let parts = merge_parts(&self.parts, &other.parts, 1);
        compound(
            parts,
            self.factor * other.factor,
            dim_mul(self.dim, other.dim, 1),
            Kind::Plain,
        )
    }

    /// Quotient of two units (`kg/kg_da` is a humidity ratio, `kg/kg_ds` a
    /// dry-basis moisture; anything else is plain).
    pub fn div(&self, other: &Unit) -> Unit {
        let parts = merge_parts(&self.parts, &other.parts, -1);
        let dim = dim_mul(self.dim, other.dim, -1);
        let kind = ratio_kind(self, other, dim);
        compound(parts, self.factor / other.factor, dim, kind)
    }

    /// Integer power of a unit (`m^3`, `s^-1`). `^1` returns the unit itself.
    pub fn powi(&self, n: i32) -> Unit {
        if n == 1 {
            return self.clone();
        }
        let parts = self
            .parts
            .iter()
            .map(|(s, e)| (s.clone(), e.saturating_mul(n)))
            .collect();
        compound(
            parts,
            self.factor.powi(n),
            dim_pow(self.dim, n),
            Kind::Plain,
        )
    }

    /// True when a number in this unit is read through an offset (bare degC, degF).
    pub fn is_affine(&self) -> bool {
        self.offset != 0.0
    }

    /// A number written in this unit, as a quantity.
    ///
    /// Linear units: `si = x * factor + offset`. Wet basis (`wb`, `%wb`):
    /// `w = x * factor`, stored as `X = w/(1-w)`; a wet basis of 1 or more has no
    /// dry-basis value and gives `si = +inf` here; use [`Unit::try_to_si`] to
    /// get the error instead.
    pub fn to_si(&self, x: f64) -> Quantity {
        self.try_to_si(x)
            .unwrap_or_else(|_| Quantity::new(f64::INFINITY, self.dim, self.kind))
    }

    /// Like [`Unit::to_si`], with an error for a wet-basis value outside 0..1
    /// or a non-finite result.
    pub fn try_to_si(&self, x: f64) -> Result<Quantity, UnitError> {
        let si = match self.scale {
            Scale::Linear => x * self.factor + self.offset,
            Scale::WetBasis => dry_from_wet(x * self.factor)?,
        };
        if !si.is_finite() {
            return Err(UnitError::new(format!(
                "{x} {} is not a finite quantity",
                self.symbol
            )));
        }
        Ok(Quantity::new(si, self.dim, self.kind))
    }

    /// A quantity's magnitude in this unit, for display (`expr as UNIT`).
    ///
    /// Checks the dimension and the kind: an absolute temperature or a plain
    /// kelvin value may be shown in degC/degF (offset applied); a temperature
    /// difference may not (show it in K or delta_degC); an absolute temperature
    /// may not be shown in delta_degC; a named ratio (moisture, humidity ratio,
    /// activity) is shown only in its own kind's units or as a plain number.
    #[inline]
    pub fn from_si(&self, q: &Quantity) -> Result<f64, UnitError> {
        if q.dim != self.dim {
            return Err(self.cannot_show_dim(q.dim));
        }
        // Most units are plain or of the quantity's own kind.
        if self.kind != Kind::Plain && self.kind != q.kind {
            self.check_display_kind(q.kind)?;
        }
        let x = match self.scale {
            Scale::Linear => self.linear_value(q.si),
            Scale::WetBasis => wet_from_dry(q.si)? / self.factor,
        };
        if x.is_finite() {
            Ok(x)
        } else {
            Err(not_finite_value())
        }
    }

    /// An SI magnitude in this unit when its scale is linear.
    #[inline]
    fn linear_value(&self, si: f64) -> f64 {
        (si - self.offset) / self.factor
    }

    /// What [`Unit::from_si`] gives, or the SI magnitude where it fails,
    /// without building its error in the usual case (a linear unit of the
    /// quantity's dimension, plain or of its kind): for a column of many
    /// values shown in one unit.
    #[inline]
    pub fn from_si_or_si(&self, q: &Quantity) -> f64 {
        if self.scale == Scale::Linear
            && q.dim == self.dim
            && (self.kind == Kind::Plain || self.kind == q.kind)
        {
            let x = self.linear_value(q.si);
            return if x.is_finite() { x } else { q.si };
        }
        self.from_si(q).unwrap_or(q.si)
    }

    #[cold]
    fn cannot_show_dim(&self, dim: Dim) -> UnitError {
        UnitError::dim_mismatch(
            &format!("cannot show the value in {}: ", self.symbol),
            self.dim,
            dim,
        )
    }

    #[inline(never)]
    fn check_display_kind(&self, kind: Kind) -> Result<(), UnitError> {
        use Kind::*;
        let ok = match (self.kind, kind) {
            (AbsoluteTemperature, AbsoluteTemperature | Plain) => true,
            (AbsoluteTemperature, _) => false,
            (TemperatureDifference, TemperatureDifference | Plain) => true,
            (TemperatureDifference, _) => false,
            (Plain, _) => true,
            (a, b) if a == b => true,
            (Fraction, Plain | Activity) | (Activity, Fraction | Plain) => true,
            (Moisture | HumidityRatio, Plain) => true,
            _ => false,
        };
        if ok {
            return Ok(());
        }
        Err(display_kind_error(&self.symbol, self.kind, kind))
    }
}

#[cold]
fn not_finite_value() -> UnitError {
    UnitError::new("the value is not a finite number")
}

#[cold]
fn display_kind_error(symbol: &str, unit_kind: Kind, kind: Kind) -> UnitError {
    let err = UnitError::new(format!(
        "cannot show {} in {symbol}, which is a unit of {}",
        kind.describe(),
        unit_kind.describe()
    ));
    match kind {
        Kind::TemperatureDifference => {
            err.with_hint("show a difference in K or delta_degC/delta_degF")
        }
        Kind::AbsoluteTemperature => {
            err.with_hint("show an absolute temperature in degC, degF, K or degR")
        }
        Kind::Moisture => err.with_hint("show a moisture content in db, wb, %db or %wb"),
        Kind::HumidityRatio => err.with_hint("show a humidity ratio in kg/kg_da or g/kg_da"),
        _ => err,
    }
}

/// Dry basis from wet basis: `X = w / (1 - w)`, for `0 <= w < 1`.
pub fn dry_from_wet(w: f64) -> Result<f64, UnitError> {
    if (0.0..1.0).contains(&w) {
        Ok(w / (1.0 - w))
    } else {
        Err(UnitError::new(format!(
            "a wet-basis moisture content must be at least 0 and below 1 (100 %wb), found {w}"
        ))
        .with_hint("a wet basis of 1 would be pure water; did you mean a dry basis (db)?"))
    }
}

/// Wet basis from dry basis: `w = X / (1 + X)`, for `X >= 0`.
pub fn wet_from_dry(x: f64) -> Result<f64, UnitError> {
    if x >= 0.0 && x.is_finite() {
        Ok(x / (1.0 + x))
    } else {
        Err(UnitError::new(format!(
            "a negative dry-basis moisture ({x}) has no wet-basis value"
        )))
    }
}

/// The kind of `a / b` for units: mass per dry-air mass is a humidity ratio,
/// mass per dry-solid mass a dry-basis moisture; anything else is plain.
fn ratio_kind(a: &Unit, b: &Unit, dim: Dim) -> Kind {
    let mass_over_mass = a.dim == Dim::MASS && dim.is_dimensionless() && a.basis == Basis::None;
    match (mass_over_mass, b.basis) {
        (true, Basis::DryAir) => Kind::HumidityRatio,
        (true, Basis::DrySolid) => Kind::Moisture,
        _ => Kind::Plain,
    }
}

fn compound(parts: Vec<(String, i32)>, factor: f64, dim: Dim, kind: Kind) -> Unit {
    Unit::from(UnitData {
        symbol: render_parts(&parts).into(),
        factor,
        offset: 0.0,
        dim,
        kind,
        scale: Scale::Linear,
        basis: Basis::None,
        parts: parts.into(),
    })
}

/// Append `b`'s parts (exponents times `sign`) to `a`'s, merging a symbol that
/// appears on the same side (`m*m` -> `m^2`) but keeping written cancellations
/// (`kg/kg_da` stays as written, as does `m^3/m`).
fn merge_parts(a: &[(String, i32)], b: &[(String, i32)], sign: i32) -> Vec<(String, i32)> {
    let mut out = a.to_vec();
    for (s, e) in b {
        let e = e * sign;
        match out.iter_mut().find(|(t, f)| t == s && (*f > 0) == (e > 0)) {
            Some(slot) => slot.1 = slot.1.saturating_add(e),
            None => out.push((s.clone(), e)),
        }
    }
    out
}

/// `kg*m/s^2`, `W/(m^2*K)`, `1/h`.
pub(crate) fn render_parts(parts: &[(String, i32)]) -> String {
    let power = |s: &str, e: i32| {
        if e == 1 {
            s.to_string()
        } else {
            format!("{s}^{e}")
        }
    };
    let num: Vec<String> = parts
        .iter()
        .filter(|p| p.1 > 0)
        .map(|(s, e)| power(s, *e))
        .collect();
    let den: Vec<String> = parts
        .iter()
        .filter(|p| p.1 < 0)
        .map(|(s, e)| power(s, -e))
        .collect();
    let n = if num.is_empty() {
        "1".to_string()
    } else {
        num.join("*")
    };
    match den.len() {
        0 if num.is_empty() => String::new(),
        0 => n,
        1 => format!("{n}/{}", den[0]),
        _ => format!("{n}/({})", den.join("*")),
    }
}

/// Dimension product with saturation at the i8 limits (unit exponents come
/// from literal text; a saturated unit fails its dimension checks loudly).
fn dim_mul(a: Dim, b: Dim, sign: i8) -> Dim {
    let mut out = a.0;
    for (o, e) in out.iter_mut().zip(b.0) {
        *o = o.saturating_add(e.saturating_mul(sign));
    }
    Dim(out)
}

fn dim_pow(a: Dim, n: i32) -> Dim {
    let mut out = a.0;
    for o in &mut out {
        *o = (*o as i32)
            .saturating_mul(n)
            .clamp(i8::MIN as i32, i8::MAX as i32) as i8;
    }
    Dim(out)
}

#[cfg(test)]
mod tests {
    use super::super::parse_unit;
    use super::*;

    /// The same unit, however and wherever it is made, is one kept copy; a
    /// different unit is another (see `intern`).
    #[test]
    fn a_unit_is_kept_once() {
        let a = parse_unit("kg/kg_da").expect("parses");
        let b = parse_unit("kg/kg_da").expect("parses");
        assert!(std::ptr::eq(&*a, &*b));
        let elsewhere = std::thread::spawn(|| {
            let u = parse_unit("kg/kg_da").expect("parses");
            &*u as *const UnitData as usize
        })
        .join()
        .expect("thread");
        assert_eq!(elsewhere, &*a as *const UnitData as usize);
        // Same dimension and factor, another symbol and kind: another unit.
        let g = parse_unit("kg/kg").expect("parses");
        assert!(!std::ptr::eq(&*a, &*g));
        assert_eq!(a.factor, g.factor);
        assert_ne!(a, g);
        // A prefixed catalogue unit and the same unit made again by lookup.
        let kpa = lookup_uncached("kPa").expect("known");
        assert!(std::ptr::eq(&*kpa, &*lookup_unit("kPa").expect("known")));
        assert!(!std::ptr::eq(
            &*kpa,
            &*lookup_uncached("Pa").expect("known")
        ));
    }
}
