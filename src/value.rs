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

    /// The typed payload, if it is a `T`.
    pub fn payload<T: 'static>(&self) -> Option<&T> {
        self.payload.as_ref()?.as_any().downcast_ref::<T>()
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
}
