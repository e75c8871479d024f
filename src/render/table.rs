//! Tables as aligned terminal text, HTML (notebooks), Markdown and CSV, with
//! units in the column headers (`name [unit]`) and one number format per column.
//!
//! Every renderer goes through [`Layout`], which checks the table once (not
//! empty, columns of equal length, each cell in its column's unit) and formats
//! every cell. CSV keeps full precision; the other formats show
//! [`SIG_FIGS`](super::number::SIG_FIGS) significant figures of the largest value.

use std::path::Path;

use crate::units::{Quantity, Unit};
use crate::value::{Column, Record, Table, Value};

use super::error::RenderError;
use super::file::write_atomic;
use super::number::{default_unit, dim_words, exact_text, in_unit, NumberFormat, Texts, SIG_FIGS};

/// A table checked and formatted, ready for any output format.
#[derive(Clone, Debug)]
pub struct Layout {
    pub title: Option<String>,
    /// Column names and unit symbols (empty when the column has no unit).
    pub headers: Vec<(String, String)>,
    /// Right-align (numbers) or left-align (text), per column.
    pub numeric: Vec<bool>,
    /// Rows in the table.
    pub rows: usize,
    /// Formatted cells, one [`Texts`] per column (each cell formatted once,
    /// with the column's significant figures).
    pub columns: Vec<Texts>,
    /// The cells as numbers, per column, for CSV's full precision.
    cells: Vec<Vec<Cell>>,
}

/// One column's cells as numbers in its unit, numbers in a unit of their own
/// (a column whose quantities differ in unit), or text.
#[derive(Clone, Debug)]
enum Cell {
    Number(f64),
    Own(f64, String),
    Text(String),
}

impl Layout {
    /// Check and format a table.
    pub fn new(table: &Table) -> Result<Layout, RenderError> {
        let rows = check_shape(table)?;
        let mut layout = Layout {
            title: table.title.clone(),
            headers: Vec::new(),
            numeric: Vec::new(),
            rows,
            columns: Vec::with_capacity(table.columns.len()),
            cells: Vec::with_capacity(table.columns.len()),
        };
        for column in &table.columns {
            layout.add_column(column)?;
        }
        Ok(layout)
    }

    fn add_column(&mut self, column: &Column) -> Result<(), RenderError> {
        let (unit, cells) = if mixed_units(column) {
            (None, own_unit_cells(column)?)
        } else {
            let unit = column_unit(column);
            let cells = column_cells(column, unit.as_ref())?;
            (unit, cells)
        };
        let numbers: Vec<f64> = cells
            .iter()
            .filter_map(|c| {
                if let Cell::Number(x) = c {
                    Some(*x)
                } else {
                    None
                }
            })
            .collect();
        let (format, written) = NumberFormat::column(&numbers, SIG_FIGS);
        let texts = match written {
            Some(all) if numbers.len() == cells.len() => all,
            written => shown_cells(&cells, format, written.as_ref()),
        };
        self.columns.push(texts);
        let symbol = unit.map(|u| u.symbol.to_string()).unwrap_or_default();
        self.headers.push((column.name.clone(), symbol));
        let quantities = cells.iter().filter(|c| !matches!(c, Cell::Text(_)));
        self.numeric.push(quantities.count() == cells.len());
        self.cells.push(cells);
        Ok(())
    }

    /// Cells at full precision (shortest round-trip text), row-major, for CSV.
    pub fn exact(&self) -> Vec<Vec<String>> {
        (0..self.rows)
            .map(|r| self.cells.iter().map(|c| exact_cell(&c[r])).collect())
            .collect()
    }

    /// Header text of one column: `name [unit]`, or `name` without a unit.
    pub fn header(&self, i: usize) -> String {
        let (name, unit) = &self.headers[i];
        if unit.is_empty() {
            name.clone()
        } else {
            format!("{name} [{unit}]")
        }
    }
}

/// A column's cells as shown: numbers in `format` (taken from `written`, the
/// column's numbers already written in it, when there), numbers in their own
/// unit with its symbol, text as it is.
fn shown_cells(cells: &[Cell], format: NumberFormat, written: Option<&Texts>) -> Texts {
    let mut texts = Texts::with_capacity(cells.len());
    let mut next = 0;
    for cell in cells {
        match cell {
            Cell::Number(x) => {
                match written {
                    Some(w) => texts.text.push_str(w.get(next)),
                    None => format.push(&mut texts.text, *x),
                }
                next += 1;
            }
            Cell::Own(x, symbol) => {
                NumberFormat::for_column(&[*x], SIG_FIGS).push(&mut texts.text, *x);
                if !symbol.is_empty() {
                    texts.text.push(' ');
                    texts.text.push_str(symbol);
                }
            }
            Cell::Text(t) => texts.text.push_str(t),
        }
        texts.end();
    }
    texts
}

/// One cell at full precision, for CSV.
fn exact_cell(cell: &Cell) -> String {
    match cell {
        Cell::Number(x) => exact_text(*x),
        Cell::Own(x, symbol) => with_symbol(exact_text(*x), symbol),
        Cell::Text(t) => t.clone(),
    }
}

/// Rows in the table; errors for an empty or ragged table.
fn check_shape(table: &Table) -> Result<usize, RenderError> {
    let first = table
        .columns
        .first()
        .ok_or_else(|| RenderError::EmptyTable {
            title: table.title.clone(),
        })?;
    let rows = first.cells.len();
    if rows == 0 {
        return Err(RenderError::EmptyTable {
            title: table.title.clone(),
        });
    }
    for column in &table.columns[1..] {
        if column.cells.len() != rows {
            return Err(RenderError::RaggedTable {
                first: first.name.clone(),
                expected: rows,
                column: column.name.clone(),
                found: column.cells.len(),
            });
        }
    }
    Ok(rows)
}

/// The column's unit: the one set on it, else that of its first quantity.
fn column_unit(column: &Column) -> Option<Unit> {
    if column.unit.is_some() {
        return column.unit.clone();
    }
    column.cells.iter().find_map(|cell| match cell {
        Value::Quantity(q, shown) => Some(default_unit(q, shown.as_ref())),
        _ => None,
    })
}

/// True when a column without a set unit holds quantities that would show in
/// different units (a fit's parameters: `db`, `1/K` and plain numbers), so no
/// one unit can head it.
fn mixed_units(column: &Column) -> bool {
    if column.unit.is_some() {
        return false;
    }
    let mut symbols = column.cells.iter().filter_map(|cell| match cell {
        Value::Quantity(q, shown) => Some(default_unit(q, shown.as_ref()).symbol.clone()),
        _ => None,
    });
    let first = symbols.next();
    symbols.any(|s| Some(&s) != first.as_ref())
}

/// Cells of a mixed column: each quantity as a number in its own unit.
fn own_unit_cells(column: &Column) -> Result<Vec<Cell>, RenderError> {
    let mut cells = Vec::with_capacity(column.cells.len());
    for (row, cell) in column.cells.iter().enumerate() {
        cells.push(match cell {
            Value::Quantity(q, shown) => {
                let unit = default_unit(q, shown.as_ref());
                match quantity_cell(column, row + 1, q, &unit)? {
                    Cell::Number(x) => Cell::Own(x, unit.symbol.to_string()),
                    other => other,
                }
            }
            other => cell_value(column, row + 1, other, None)?,
        });
    }
    Ok(cells)
}

/// A number followed by its unit symbol (nothing for a plain number).
fn with_symbol(number: String, symbol: &str) -> String {
    if symbol.is_empty() {
        number
    } else {
        format!("{number} {symbol}")
    }
}

fn column_cells(column: &Column, unit: Option<&Unit>) -> Result<Vec<Cell>, RenderError> {
    column
        .cells
        .iter()
        .enumerate()
        .map(|(row, cell)| cell_value(column, row + 1, cell, unit))
        .collect()
}

fn cell_value(
    column: &Column,
    row: usize,
    cell: &Value,
    unit: Option<&Unit>,
) -> Result<Cell, RenderError> {
    match (cell, unit) {
        (Value::Quantity(q, _), Some(unit)) => quantity_cell(column, row, q, unit),
        (Value::Quantity(q, _), None) => finite(column, row, q.si),
        (Value::Bool(b), _) => Ok(Cell::Text(if *b { "yes" } else { "no" }.into())),
        (Value::Str(s), _) => Ok(Cell::Text(s.clone())),
        (other, _) => Ok(Cell::Text(format!(
            "({})",
            crate::library::type_word(other)
        ))),
    }
}

fn quantity_cell(
    column: &Column,
    row: usize,
    q: &Quantity,
    unit: &Unit,
) -> Result<Cell, RenderError> {
    if !q.si.is_finite() {
        return finite(column, row, q.si);
    }
    if q.dim != unit.dim {
        return Err(RenderError::CellUnit {
            column: column.name.clone(),
            row,
            unit: format!("{} ({})", unit.symbol, dim_words(unit.dim)),
            found: dim_words(q.dim),
        });
    }
    let x = in_unit(q, unit).map_err(RenderError::Invalid)?;
    finite(column, row, x)
}

fn finite(column: &Column, row: usize, x: f64) -> Result<Cell, RenderError> {
    if x.is_finite() {
        Ok(Cell::Number(x))
    } else {
        Err(RenderError::NotFinite {
            what: format!("column `{}`, row {row}", column.name),
        })
    }
}

/// Aligned plain text for the terminal: title, header, a rule, then rows.
pub fn text(table: &Table) -> Result<String, RenderError> {
    let layout = Layout::new(table)?;
    let headers: Vec<String> = (0..layout.headers.len())
        .map(|i| layout.header(i))
        .collect();
    let widths = column_widths(&headers, &layout.columns);
    let line: usize = widths.iter().map(|w| w + 2).sum::<usize>() + 1;
    let mut out = String::with_capacity(line * (layout.rows + 3));
    if let Some(title) = &layout.title {
        out.push_str(title);
        out.push('\n');
    }
    push_text_row(
        &mut out,
        headers.iter().map(String::as_str),
        &widths,
        &layout.numeric,
    );
    let rule: Vec<String> = widths.iter().map(|w| "-".repeat(*w)).collect();
    out.push_str(rule.join("  ").trim_end());
    out.push('\n');
    for r in 0..layout.rows {
        let cells = layout.columns.iter().map(|c| c.get(r));
        push_text_row(&mut out, cells, &widths, &layout.numeric);
    }
    Ok(out)
}

fn column_widths(headers: &[String], columns: &[Texts]) -> Vec<usize> {
    headers
        .iter()
        .zip(columns)
        .map(|(h, cells)| cells.iter().map(width).fold(width(h), usize::max))
        .collect()
}

/// Characters in a cell, as padding counts them.
fn width(text: &str) -> usize {
    if text.is_ascii() {
        text.len()
    } else {
        text.chars().count()
    }
}

/// One row: cells padded to their column's width (numbers on the right),
/// two spaces apart, without trailing white space.
fn push_text_row<'a>(
    out: &mut String,
    cells: impl Iterator<Item = &'a str>,
    widths: &[usize],
    numeric: &[bool],
) {
    let start = out.len();
    for (i, ((cell, w), right)) in cells.zip(widths).zip(numeric).enumerate() {
        if i > 0 {
            out.push_str("  ");
        }
        let pad = w.saturating_sub(width(cell));
        if *right {
            out.extend(std::iter::repeat_n(' ', pad));
            out.push_str(cell);
        } else {
            out.push_str(cell);
            out.extend(std::iter::repeat_n(' ', pad));
        }
    }
    let kept = out[start..].trim_end().len();
    out.truncate(start + kept);
    out.push('\n');
}

const RIGHT: &str = " style=\"text-align:right\"";

/// An HTML `<table>` fragment (class `siccant-table`), numbers right-aligned.
pub fn html(table: &Table) -> Result<String, RenderError> {
    let layout = Layout::new(table)?;
    let mut out = String::from("<table class=\"siccant-table\">\n");
    if let Some(title) = &layout.title {
        out.push_str(&format!("<caption>{}</caption>\n", escape_html(title)));
    }
    out.push_str("<thead><tr>");
    for (i, (name, unit)) in layout.headers.iter().enumerate() {
        let align = if layout.numeric[i] { RIGHT } else { "" };
        let unit = if unit.is_empty() {
            String::new()
        } else {
            format!(" <span class=\"unit\">[{}]</span>", escape_html(unit))
        };
        out.push_str(&format!("<th{align}>{}{unit}</th>", escape_html(name)));
    }
    out.push_str("</tr></thead>\n<tbody>\n");
    for r in 0..layout.rows {
        out.push_str("<tr>");
        for (cells, right) in layout.columns.iter().zip(&layout.numeric) {
            out.push_str("<td");
            if *right {
                out.push_str(RIGHT);
            }
            out.push('>');
            push_escaped_html(&mut out, cells.get(r));
            out.push_str("</td>");
        }
        out.push_str("</tr>\n");
    }
    out.push_str("</tbody>\n</table>\n");
    Ok(out)
}

/// A Markdown (GitHub-flavoured) table, numeric columns right-aligned.
pub fn markdown(table: &Table) -> Result<String, RenderError> {
    let layout = Layout::new(table)?;
    let mut out = String::new();
    if let Some(title) = &layout.title {
        out.push_str(&format!("**{}**\n\n", escape_markdown(title)));
    }
    let headers: Vec<String> = (0..layout.headers.len())
        .map(|i| escape_markdown(&layout.header(i)))
        .collect();
    out.push_str(&format!("| {} |\n", headers.join(" | ")));
    let rule: Vec<&str> = layout
        .numeric
        .iter()
        .map(|n| if *n { "---:" } else { "---" })
        .collect();
    out.push_str(&format!("| {} |\n", rule.join(" | ")));
    for r in 0..layout.rows {
        out.push('|');
        for cells in &layout.columns {
            out.push(' ');
            push_escaped_markdown(&mut out, cells.get(r));
            out.push_str(" |");
        }
        out.push('\n');
    }
    Ok(out)
}

/// CSV with a `name [unit]` header row and numbers at full precision.
pub fn csv(table: &Table) -> Result<String, RenderError> {
    let layout = Layout::new(table)?;
    let mut writer = csv::Writer::from_writer(Vec::new());
    let headers: Vec<String> = (0..layout.headers.len())
        .map(|i| layout.header(i))
        .collect();
    let draw = |e: csv::Error| RenderError::Draw(e.to_string());
    writer.write_record(&headers).map_err(draw)?;
    for row in &layout.exact() {
        writer.write_record(row).map_err(draw)?;
    }
    let bytes = writer
        .into_inner()
        .map_err(|e| RenderError::Draw(e.to_string()))?;
    String::from_utf8(bytes).map_err(|e| RenderError::Draw(e.to_string()))
}

/// Write a table to `path` atomically, in the format its extension names
/// (`.csv`, `.md`, `.html`/`.htm`, `.txt`).
pub fn export(table: &Table, path: &Path) -> Result<(), RenderError> {
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .map(|e| e.to_ascii_lowercase());
    let body = match ext.as_deref() {
        Some("csv") => csv(table)?,
        Some("md") => markdown(table)?,
        Some("html" | "htm") => html(table)?,
        Some("txt") => text(table)?,
        _ => {
            return Err(RenderError::Format {
                path: path.to_path_buf(),
                expected: ".csv, .md, .html or .txt",
            })
        }
    };
    write_atomic(path, body.as_bytes())
}

/// A table from a list of records (one row each), columns in the order the
/// first record's fields appear; every record must have those fields.
pub fn from_records(title: Option<String>, rows: &[Value]) -> Result<Table, RenderError> {
    let records = rows
        .iter()
        .enumerate()
        .map(|(i, v)| as_record(i, v))
        .collect::<Result<Vec<_>, _>>()?;
    let first = records.first().ok_or(RenderError::EmptyTable {
        title: title.clone(),
    })?;
    let mut columns = Vec::new();
    for (name, _) in first.fields.iter() {
        let cells = records
            .iter()
            .enumerate()
            .map(|(i, r)| field_of(i, r, name))
            .collect::<Result<Vec<_>, _>>()?;
        columns.push(Column {
            name: name.to_string(),
            unit: None,
            cells,
        });
    }
    Ok(Table { title, columns })
}

fn as_record(i: usize, v: &Value) -> Result<&Record, RenderError> {
    match v {
        Value::Record(r) => Ok(r),
        other => Err(RenderError::Invalid(format!(
            "row {} is {}, not a record; a table needs a list of records",
            i + 1,
            crate::library::type_word(other)
        ))),
    }
}

fn field_of(i: usize, r: &Record, name: &str) -> Result<Value, RenderError> {
    r.get(name).cloned().ok_or_else(|| {
        RenderError::Invalid(format!(
            "row {} has no field `{name}`, which the first row has",
            i + 1
        ))
    })
}

/// Escape text for HTML element content and attribute values.
pub fn escape_html(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    push_escaped_html(&mut out, text);
    out
}

/// [`escape_html`] appended to `out`.
fn push_escaped_html(out: &mut String, text: &str) {
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            _ => out.push(c),
        }
    }
}

/// Escape text for a Markdown table cell or paragraph.
pub fn escape_markdown(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    push_escaped_markdown(&mut out, text);
    out
}

/// [`escape_markdown`] appended to `out`.
fn push_escaped_markdown(out: &mut String, text: &str) {
    for c in text.chars() {
        if matches!(c, '|' | '*' | '_' | '`' | '\\' | '<' | '>') {
            out.push('\\');
        }
        out.push(if c == '\n' { ' ' } else { c });
    }
}
