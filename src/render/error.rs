//! Errors from rendering tables, plots and records, and from writing them to files.

use std::path::PathBuf;

/// Why a value could not be rendered or written.
///
/// Every variant names what is wrong in words a worksheet author can act on;
/// the front end decides how to show it.
#[derive(Debug, thiserror::Error)]
pub enum RenderError {
    /// A table with no columns or no rows.
    #[error("the table{} is empty: there is nothing to show", title_suffix(.title))]
    EmptyTable { title: Option<String> },
    /// Table columns of different lengths.
    #[error("column `{column}` has {found} rows but column `{first}` has {expected}")]
    RaggedTable {
        first: String,
        expected: usize,
        column: String,
        found: usize,
    },
    /// A cell whose dimension does not match its column's unit.
    #[error("column `{column}`, row {row}: {found} cannot be shown in {unit}")]
    CellUnit {
        column: String,
        row: usize,
        unit: String,
        found: String,
    },
    /// A number that is not finite (NaN or infinite) where a result is shown.
    #[error("{what} is not a finite number")]
    NotFinite { what: String },
    /// A plot series whose x and y lists differ in length.
    #[error("series `{series}` has {x_len} x values but {y_len} y values")]
    SeriesLength {
        series: String,
        x_len: usize,
        y_len: usize,
    },
    /// Two series (or a series and the axis) in incompatible units on one axis.
    #[error("the {axis} axis already shows {expected}; series `{series}` is {found}")]
    AxisUnits {
        axis: &'static str,
        expected: String,
        series: String,
        found: String,
    },
    /// A plot with nothing to draw.
    #[error("the plot `{title}` has no data to draw")]
    EmptyPlot { title: String },
    /// A heat map whose grid does not match its z values.
    #[error("heat map grid is {nx} x {ny} = {} cells but has {nz} values", .nx * .ny)]
    HeatGrid { nx: usize, ny: usize, nz: usize },
    /// Something else that is wrong with the data handed to a renderer.
    #[error("{0}")]
    Invalid(String),
    /// The drawing library failed (should not happen with valid data).
    #[error("drawing failed: {0}")]
    Draw(String),
    /// The output file could not be written; nothing was left at `path`.
    #[error("cannot write {}: {source}", .path.display())]
    Write {
        path: PathBuf,
        source: std::io::Error,
    },
    /// The file extension does not name a format we write.
    #[error("cannot tell the format of {} from its extension; use {expected}", .path.display())]
    Format {
        path: PathBuf,
        expected: &'static str,
    },
}

fn title_suffix(title: &Option<String>) -> String {
    match title {
        Some(t) => format!(" `{t}`"),
        None => String::new(),
    }
}
