//! Values produced by evaluating a worksheet.

use std::any::Any;
use std::borrow::Cow;
use std::fmt;
use std::sync::Arc;

use crate::units::{Quantity, Unit};

/// A value in the language.
#[derive(Clone, Debug)]
pub enum Value {
    /// A quantity, with the unit it should be shown in when `as` set one.
    Quantity(Quantity, Option<Unit>),
    Bool(bool),
    Str(String),
    List(Vec<Value>),
    Record(Record),
    Table(Table),
    Plot(Arc<Plot>),
    /// A user function or a built-in, callable.
    Function(Arc<dyn Callable>),
}

/// Something that can be called like a function (user functions, loaded worksheets).
pub trait Callable: fmt::Debug + Send + Sync {
    fn name(&self) -> &str;
}

/// The name of a record field or type: a `&'static str` for the records the
/// library builds (no allocation), an owned string for records written in a
/// worksheet.
pub type FieldName = Cow<'static, str>;

/// A record: ordered named fields, read with `.`.
///
/// Engine objects (an air state, an isotherm model, a material, a fit, a drying
/// stage) are records whose `type_name` says what they are, with fields for
/// people and an optional typed payload for the library functions that consume them.
///
/// The fields are shared: cloning a record (reading it by name, passing it to
/// a built-in) copies two pointers, not its fields. Adding a field to a shared
/// record copies the fields first ([`Arc::make_mut`]).
#[derive(Clone, Debug, Default)]
pub struct Record {
    pub type_name: FieldName,
    pub fields: Arc<Vec<(FieldName, Value)>>,
    pub payload: Option<Arc<dyn Payload>>,
}

/// Typed engine data carried by a record (downcast with `as_any`).
pub trait Payload: fmt::Debug + Send + Sync {
    fn as_any(&self) -> &dyn Any;

    /// The payload to overwrite in place ([`Record::set_payload`] on a
    /// record built in reused storage: [`Record::reusing`]); `None`, the
    /// default, for a payload that is always allocated afresh.
    fn as_any_mut(&mut self) -> Option<&mut dyn Any> {
        None
    }
}

impl Value {
    /// A copy of this value, as [`Clone::clone`] gives, with a quantity (the
    /// usual value, copied at every point of a study) copied in line rather
    /// than through the general clone.
    #[inline]
    pub fn copied(&self) -> Value {
        match self {
            Value::Quantity(q, unit) => Value::Quantity(*q, unit.clone()),
            other => other.clone(),
        }
    }
}

impl Record {
    /// A record with no payload.
    pub fn new(type_name: impl Into<FieldName>) -> Record {
        Record {
            type_name: type_name.into(),
            fields: Arc::new(Vec::new()),
            payload: None,
        }
    }

    /// A record with room for `fields` fields (built-ins that know their
    /// record's size, so the fields are allocated once).
    pub fn with_capacity(type_name: impl Into<FieldName>, fields: usize) -> Record {
        Record {
            type_name: type_name.into(),
            fields: Arc::new(Vec::with_capacity(fields)),
            payload: None,
        }
    }

    /// An empty record of type `type_name` built in the storage of `spare`
    /// (a record the same built-in returned before, at the same call:
    /// [`crate::library::Args::take_spare`]) where nothing else holds it:
    /// its field list, emptied, and its payload, for
    /// [`Record::set_payload`] to overwrite. Otherwise, or without a spare,
    /// a new record with room for `fields` fields, as
    /// [`Record::with_capacity`]. Either way the same record once filled.
    pub fn reusing(
        type_name: impl Into<FieldName>,
        spare: Option<Record>,
        fields: usize,
    ) -> Record {
        let Some(mut spare) = spare else {
            return Record::with_capacity(type_name, fields);
        };
        match Arc::get_mut(&mut spare.fields) {
            Some(list) => list.clear(),
            None => spare.fields = Arc::new(Vec::with_capacity(fields)),
        }
        Record {
            type_name: type_name.into(),
            fields: spare.fields,
            payload: spare.payload,
        }
    }

    /// The field list to append to: in place when this record alone holds
    /// it (a record being built), else a copy ([`Arc::make_mut`]).
    pub fn fields_mut(&mut self) -> &mut Vec<(FieldName, Value)> {
        Arc::make_mut(&mut self.fields)
    }

    /// Set the payload to `value`: written over the payload in place when
    /// it is a `T` this record alone holds ([`Record::reusing`] kept it),
    /// else newly allocated.
    pub fn set_payload<T: Payload + 'static>(&mut self, value: T) {
        if let Some(place) = self
            .payload
            .as_mut()
            .and_then(Arc::get_mut)
            .and_then(|p| p.as_any_mut())
            .and_then(|p| p.downcast_mut::<T>())
        {
            *place = value;
            return;
        }
        self.payload = Some(Arc::new(value));
    }

    /// Append a field (builder style).
    pub fn with(mut self, name: impl Into<FieldName>, value: Value) -> Record {
        self.push(name, value);
        self
    }

    /// Append a field.
    pub fn push(&mut self, name: impl Into<FieldName>, value: Value) {
        Arc::make_mut(&mut self.fields).push((name.into(), value));
    }

    /// Read a field by name.
    pub fn get(&self, name: &str) -> Option<&Value> {
        self.fields.iter().find(|(n, _)| n == name).map(|(_, v)| v)
    }

    /// [`Record::get`], in line and with short names compared without a
    /// call ([`same_name`]): for a what-if study's field reads at every
    /// point (kept apart from `get`, which is used everywhere, so that only
    /// that read grows).
    #[inline(always)]
    pub fn get_in_line(&self, name: &str) -> Option<&Value> {
        for (n, v) in self.fields.iter() {
            if same_name(n, name) {
                return Some(v);
            }
        }
        None
    }

    /// The typed payload, if it is a `T`.
    pub fn payload<T: 'static>(&self) -> Option<&T> {
        self.payload.as_ref()?.as_any().downcast_ref::<T>()
    }
}

/// `a == b`, with names of up to 16 bytes (field names usually are)
/// compared in line, two overlapping words that cover every byte, instead
/// of through a call of `memcmp`.
#[inline(always)]
fn same_name(a: &str, b: &str) -> bool {
    let (a, b) = (a.as_bytes(), b.as_bytes());
    let n = a.len();
    if n != b.len() {
        return false;
    }
    // (Each range is inside the name: `n` is at least the word's size.)
    let word4 = |s: &[u8], i: usize| u32::from_ne_bytes(s[i..i + 4].try_into().unwrap_or([0; 4]));
    let word8 = |s: &[u8], i: usize| u64::from_ne_bytes(s[i..i + 8].try_into().unwrap_or([0; 8]));
    match n {
        0 => true,
        // Bytes 0, n / 2 and n - 1 are every byte of a name this short.
        1..=3 => a[0] == b[0] && a[n / 2] == b[n / 2] && a[n - 1] == b[n - 1],
        4..=8 => word4(a, 0) == word4(b, 0) && word4(a, n - 4) == word4(b, n - 4),
        9..=16 => word8(a, 0) == word8(b, 0) && word8(a, n - 8) == word8(b, n - 8),
        _ => a == b,
    }
}

/// A table: named columns of equal length, each with an optional display unit.
#[derive(Clone, Debug, Default)]
pub struct Table {
    pub title: Option<String>,
    pub columns: Vec<Column>,
}

/// One column of a table.
#[derive(Clone, Debug)]
pub struct Column {
    pub name: String,
    /// Unit the column is shown in (header `name [unit]`); `None` for plain numbers or text.
    pub unit: Option<Unit>,
    pub cells: Vec<Value>,
}

/// A plot description; renderers turn it into SVG or PNG. No renderer computes physics.
#[derive(Clone, Debug, Default)]
pub struct Plot {
    pub title: String,
    pub x_label: String,
    pub y_label: String,
    pub series: Vec<Series>,
    /// Extra marks (vertical/horizontal lines, labelled points, shaded spans).
    pub marks: Vec<Mark>,
    /// For a heat map: z values on a grid, row-major over (y, x).
    pub heat: Option<HeatMap>,
}

/// A data series on a plot.
#[derive(Clone, Debug, Default)]
pub struct Series {
    pub label: String,
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    pub style: SeriesStyle,
}

/// How a series is drawn.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum SeriesStyle {
    #[default]
    Line,
    Points,
    Dashed,
    Thin,
    /// A dotted reference line (for example humid-volume lines on a psychrometric chart).
    Dotted,
}

/// An annotation on a plot.
#[derive(Clone, Debug)]
pub enum Mark {
    VLine { x: f64, label: String },
    HLine { y: f64, label: String },
    Point { x: f64, y: f64, label: String },
    Text { x: f64, y: f64, label: String },
    Span { x0: f64, x1: f64, label: String },
}

/// A heat map over a grid.
#[derive(Clone, Debug, Default)]
pub struct HeatMap {
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    pub z: Vec<f64>,
    pub z_label: String,
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(Debug, PartialEq)]
    struct Refilled(u32);
    impl Payload for Refilled {
        fn as_any(&self) -> &dyn Any {
            self
        }
        fn as_any_mut(&mut self) -> Option<&mut dyn Any> {
            Some(self)
        }
    }

    #[derive(Debug, PartialEq)]
    struct Fixed(u32);
    impl Payload for Fixed {
        fn as_any(&self) -> &dyn Any {
            self
        }
    }

    fn number(x: f64) -> Value {
        Value::Quantity(
            Quantity::new(x, crate::units::Dim::NONE, crate::units::Kind::Plain),
            None,
        )
    }

    fn spare(payload: Arc<dyn Payload>) -> Record {
        let mut r = Record::new("old")
            .with("a", number(1.0))
            .with("b", number(2.0));
        r.payload = Some(payload);
        r
    }

    /// The fields and payload of `r`, for comparing records.
    fn shown(r: &Record) -> String {
        format!("{} {:?} {:?}", r.type_name, r.fields, r.payload)
    }

    /// A record built in a spare's storage is the record built afresh; the
    /// storage is reused only where nothing else holds it, and a record
    /// still held elsewhere is left as it was.
    #[test]
    fn a_record_built_in_a_spare_is_the_record_built_afresh() {
        let build = |spare: Option<Record>, payload: u32| {
            let mut r = Record::reusing("new", spare, 1);
            r.fields_mut().push(("x".into(), number(3.0)));
            r.set_payload(Refilled(payload));
            r
        };
        let fresh = build(None, 7);
        // Held by nothing else: the same field list and payload, refilled.
        let old = spare(Arc::new(Refilled(1)));
        let (fields, payload) = (
            Arc::as_ptr(&old.fields),
            old.payload.as_ref().map(|p| Arc::as_ptr(p) as *const u8),
        );
        let reused = build(Some(old), 7);
        assert_eq!(shown(&reused), shown(&fresh));
        assert!(std::ptr::eq(Arc::as_ptr(&reused.fields), fields));
        assert_eq!(
            reused.payload.as_ref().map(|p| Arc::as_ptr(p) as *const u8),
            payload
        );
        // Held elsewhere too: new storage, and the other holder unchanged.
        let old = spare(Arc::new(Refilled(1)));
        let kept = old.clone();
        let before = shown(&kept);
        let rebuilt = build(Some(old), 7);
        assert_eq!(shown(&rebuilt), shown(&fresh));
        assert_eq!(shown(&kept), before);
        assert!(!Arc::ptr_eq(&kept.fields, &rebuilt.fields));
        // Only the payload shared, or a payload of another type, or one not
        // refilled in place: a new payload.
        let shared: Arc<dyn Payload> = Arc::new(Refilled(1));
        for payload in [shared.clone(), Arc::new(Fixed(1)) as Arc<dyn Payload>] {
            let rebuilt = build(Some(spare(payload)), 7);
            assert_eq!(shown(&rebuilt), shown(&fresh));
        }
        assert_eq!(
            shared.as_any().downcast_ref::<Refilled>(),
            Some(&Refilled(1))
        );
    }

    /// A value is copied at every step of a what-if point; a quantity's
    /// display unit is one pointer to its kept data ([`Unit`]), so a value
    /// stays small (the largest variants are a record and a table).
    #[test]
    fn a_value_is_at_most_seven_words() {
        assert!(std::mem::size_of::<Option<Unit>>() == std::mem::size_of::<usize>());
        assert!(
            std::mem::size_of::<Value>() <= 7 * std::mem::size_of::<usize>(),
            "size of Value: {}",
            std::mem::size_of::<Value>()
        );
    }

    /// `copied` is `clone`: the same variant, bits, unit and shared parts.
    #[test]
    fn copied_is_clone() {
        use crate::units::{parse_unit, Quantity};
        let unit = parse_unit("degC").ok();
        let record = Record::new("air").with("T", Value::Quantity(Quantity::number(2.0), None));
        let values = [
            Value::Quantity(Quantity::number(-0.0), unit),
            Value::Quantity(Quantity::number(f64::MIN_POSITIVE), None),
            Value::Bool(true),
            Value::Str("x".into()),
            Value::List(vec![Value::Bool(false)]),
            Value::Record(record),
        ];
        for v in &values {
            let (a, b) = (v.copied(), v.clone());
            assert_eq!(format!("{a:?}"), format!("{b:?}"));
            if let (Value::Quantity(x, _), Value::Quantity(y, _)) = (&a, &b) {
                assert_eq!(x.si.to_bits(), y.si.to_bits());
            }
            if let (Value::Record(x), Value::Record(y)) = (&a, v) {
                assert!(Arc::ptr_eq(&x.fields, &y.fields));
            }
        }
    }

    /// The in-line name comparison is `==`: for every length up to past
    /// the in-line cases, equal names, and names that differ in any one
    /// byte or in length, including multi-byte characters.
    #[test]
    fn same_name_is_equality() {
        let base = "abcdefghijklmnopqrstu";
        let mut checked = 0;
        for n in 0..=base.len() {
            let a = &base[..n];
            // (A copy elsewhere in memory: the bytes are compared.)
            let copy = String::from(a);
            assert!(same_name(a, copy.as_str()), "{a}");
            for i in 0..n {
                let mut b = a.as_bytes().to_vec();
                b[i] = b'Z';
                let b = String::from_utf8(b).expect("ascii");
                assert!(!same_name(a, &b), "{a} {b}");
                checked += 1;
            }
            for m in 0..=base.len() {
                assert_eq!(same_name(a, &base[..m]), n == m, "{n} {m}");
            }
        }
        for (a, b) in [
            ("T", "T"),
            ("rh", "rH"),
            ("\u{e9}t\u{e9}", "\u{e9}t\u{e8}"),
            ("", "x"),
        ] {
            assert_eq!(same_name(a, b), a == b, "{a} {b}");
        }
        assert_eq!(checked, base.len() * (base.len() + 1) / 2);
    }
}
