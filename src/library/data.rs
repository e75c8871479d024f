//! Lab data: CSV files with units in the headers, read into and written from
//! table values.
//!
//! A header cell is `name [unit]`, for example `aw [-]`, `X [kg/kg db]`,
//! `t [min]`, `m [g]`, `T [degC]`. `[-]` (or `[1]`) marks a plain number and
//! `[text]` a column of words. Units are the language's units; a trailing basis
//! word after a mass ratio names its kind: `kg/kg db` (or `ds`) is a dry-basis
//! moisture, `kg/kg wb` a wet-basis moisture, `kg/kg da` a humidity ratio.
//! Lines starting with `#` are comments. Files are written atomically (a
//! temporary file in the same folder, then a rename).

use std::fmt;
use std::path::{Path, PathBuf};

use crate::diag::Diagnostic;
use crate::library::{Args, Builtin, Param};
use crate::units::{lookup_unit, suggest_unit, Kind, Unit};
use crate::value::{Column, Table, Value};

/// Why reading or writing a CSV table failed; messages name line and column.
#[derive(Clone, Debug, PartialEq)]
pub struct DataError {
    pub message: String,
    pub hint: Option<String>,
}

impl DataError {
    fn new(message: impl Into<String>) -> DataError {
        DataError {
            message: message.into(),
            hint: None,
        }
    }

    fn with_hint(mut self, hint: impl Into<String>) -> DataError {
        self.hint = Some(hint.into());
        self
    }
}

impl fmt::Display for DataError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)?;
        if let Some(h) = &self.hint {
            write!(f, " (hint: {h})")?;
        }
        Ok(())
    }
}

/// How a column's cells are read.
#[derive(Clone, Debug)]
enum ColumnUnit {
    Number(Unit),
    Text,
}

/// Read a CSV file with `name [unit]` headers into a table.
pub fn read_table(path: &Path) -> Result<Table, DataError> {
    let text = read_text_file(path)
        .map_err(|e| DataError::new(format!("cannot read `{}`: {e}", path.display())))?;
    let mut table = parse_table(&text)?;
    table.title = path.file_name().map(|n| n.to_string_lossy().into_owned());
    Ok(table)
}

/// Largest text file a worksheet may read (a CSV table or a loaded worksheet).
pub const MAX_FILE_BYTES: u64 = 64 * 1024 * 1024;

/// Read a text file of at most [`MAX_FILE_BYTES`]. A device (`/dev/zero`),
/// a directory or a larger file is an error, never a memory exhaustion.
pub fn read_text_file(path: &Path) -> std::io::Result<String> {
    use std::io::{Error, ErrorKind, Read};
    let file = std::fs::File::open(path)?;
    if !file.metadata()?.is_file() {
        return Err(Error::new(ErrorKind::InvalidInput, "not a regular file"));
    }
    let mut text = String::new();
    file.take(MAX_FILE_BYTES + 1).read_to_string(&mut text)?;
    if text.len() as u64 > MAX_FILE_BYTES {
        let mb = MAX_FILE_BYTES >> 20;
        return Err(Error::new(
            ErrorKind::InvalidData,
            format!("larger than {mb} MB"),
        ));
    }
    Ok(text)
}

/// Parse CSV text with `name [unit]` headers into a table.
pub fn parse_table(text: &str) -> Result<Table, DataError> {
    // Spreadsheet programs often start UTF-8 files with a byte-order mark.
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let mut records = reader.records();
    let header = match records.next() {
        Some(r) => r.map_err(csv_error)?,
        None => {
            return Err(DataError::new(
                "the CSV file is empty: it needs a header line such as `aw [-], X [kg/kg db]`",
            ))
        }
    };
    let line = header.position().map_or(1, |p| p.line());
    let heads: Vec<(String, ColumnUnit)> = header
        .iter()
        .enumerate()
        .map(|(i, h)| parse_header(h, line, i + 1))
        .collect::<Result<_, _>>()?;
    if let Some(i) = (1..heads.len()).find(|&i| heads[..i].iter().any(|h| h.0 == heads[i].0)) {
        return Err(DataError::new(format!(
            "line {line}, column {}: the column `{}` is named twice",
            i + 1,
            heads[i].0
        ))
        .with_hint("give every column its own name, so that functions can find it"));
    }
    let mut columns: Vec<Column> = heads
        .iter()
        .map(|(name, unit)| Column {
            name: name.clone(),
            unit: match unit {
                ColumnUnit::Number(u) => display_unit(u),
                ColumnUnit::Text => None,
            },
            cells: Vec::new(),
        })
        .collect();
    for record in records {
        let record = record.map_err(csv_error)?;
        let line = record.position().map_or(0, |p| p.line());
        read_row(&record, line, &heads, &mut columns)?;
    }
    Ok(Table {
        title: None,
        columns,
    })
}

fn csv_error(e: csv::Error) -> DataError {
    DataError::new(format!("malformed CSV: {e}"))
}

fn read_row(
    record: &csv::StringRecord,
    line: u64,
    heads: &[(String, ColumnUnit)],
    columns: &mut [Column],
) -> Result<(), DataError> {
    if record.len() != heads.len() {
        return Err(DataError::new(format!(
            "line {line} has {} cells but the header has {} columns",
            record.len(),
            heads.len()
        ))
        .with_hint("every row needs one cell per column; check for a missing or extra comma"));
    }
    for (i, (cell, (name, unit))) in record.iter().zip(heads).enumerate() {
        let value = read_cell(cell, unit).map_err(|why| {
            DataError::new(format!("line {line}, column {} (`{name}`): {why}", i + 1))
        })?;
        columns[i].cells.push(value);
    }
    Ok(())
}

fn read_cell(cell: &str, unit: &ColumnUnit) -> Result<Value, String> {
    let unit = match unit {
        ColumnUnit::Text => return Ok(Value::Str(cell.to_string())),
        ColumnUnit::Number(u) => u,
    };
    if cell.is_empty() {
        return Err("the cell is empty; every cell of a number column needs a number".into());
    }
    let x: f64 = cell
        .parse()
        .map_err(|_| format!("`{cell}` is not a number"))?;
    if !x.is_finite() {
        return Err(format!("`{cell}` is not a finite number"));
    }
    unit.try_to_si(x)
        .map(|q| Value::Quantity(q, display_unit(unit)))
        .map_err(|e| e.message)
}

/// The unit to show a column in: none for a plain number (`[-]`).
fn display_unit(unit: &Unit) -> Option<Unit> {
    let plain = unit.symbol.is_empty()
        && unit.dim.is_dimensionless()
        && unit.kind == Kind::Plain
        && unit.factor == 1.0;
    (!plain).then(|| unit.clone())
}

/// Split `name [unit]` and resolve the unit; `line` and `column` (1-based) for messages.
fn parse_header(head: &str, line: u64, column: usize) -> Result<(String, ColumnUnit), DataError> {
    let where_ = format!("line {line}, column {column}");
    let (name, unit_text) = match (head.find('['), head.rfind(']')) {
        (Some(open), Some(close)) if close > open => {
            (head[..open].trim(), head[open + 1..close].trim())
        }
        _ => {
            return Err(
                DataError::new(format!("{where_}: the header `{head}` has no unit")).with_hint(
                    format!(
                        "write it as `{} [unit]`, e.g. `X [kg/kg db]`; use [-] for a plain number",
                        head.trim()
                    ),
                ),
            )
        }
    };
    if name.is_empty() {
        return Err(DataError::new(format!(
            "{where_}: the header `{head}` has no column name"
        )));
    }
    let unit = match unit_text {
        "text" => ColumnUnit::Text,
        _ => ColumnUnit::Number(parse_unit_text(unit_text).map_err(|e| DataError {
            message: format!("{where_} (`{name}`): {}", e.message),
            hint: e.hint,
        })?),
    };
    Ok((name.to_string(), unit))
}

/// Resolve the unit text of a header: `-` and `1` are plain numbers; a
/// trailing `db`/`ds`/`wb`/`da` after a mass ratio gives its kind.
pub fn parse_unit_text(text: &str) -> Result<Unit, DataError> {
    if text == "-" || text == "1" || text.is_empty() {
        return Ok(Unit::one());
    }
    if let Some((ratio, basis)) = text.rsplit_once(' ') {
        if let Some(unit) = basis_unit(ratio.trim(), basis.trim(), text)? {
            return Ok(unit);
        }
    }
    UnitParser::new(text).parse()
}

/// `kg/kg db` and friends: the ratio's factor with the basis word's kind.
fn basis_unit(ratio: &str, basis: &str, whole: &str) -> Result<Option<Unit>, DataError> {
    let (kind_unit, kind) = match basis {
        "db" | "ds" => ("db", Kind::Moisture),
        "wb" => ("wb", Kind::Moisture),
        "da" => ("db", Kind::HumidityRatio),
        _ => return Ok(None),
    };
    let ratio_unit = UnitParser::new(ratio).parse()?;
    if !ratio_unit.dim.is_dimensionless() {
        return Err(DataError::new(format!(
            "`{whole}`: `{basis}` must follow a mass ratio such as kg/kg or g/kg"
        )));
    }
    let unit = lookup_unit(kind_unit)
        .ok_or_else(|| DataError::new(format!("unit table lacks `{kind_unit}`")))?;
    let mut data = (*unit).clone();
    data.factor *= ratio_unit.factor;
    data.kind = kind;
    data.symbol = std::sync::Arc::from(whole);
    Ok(Some(Unit::from(data)))
}

/// A small recursive-descent reader for unit expressions:
/// `unit := factor (('*' | '/') factor)*`, `factor := atom ('^' integer)?`,
/// `atom := symbol | '(' unit ')'`.
struct UnitParser<'a> {
    text: &'a str,
    pos: usize,
}

impl<'a> UnitParser<'a> {
    fn new(text: &'a str) -> UnitParser<'a> {
        UnitParser { text, pos: 0 }
    }

    fn parse(mut self) -> Result<Unit, DataError> {
        let unit = self.product()?;
        self.skip_space();
        if self.pos < self.text.len() {
            return Err(DataError::new(format!(
                "cannot read the unit `{}` after `{}`",
                self.text,
                &self.text[..self.pos]
            ))
            .with_hint("write compound units with * and /, e.g. kg/(m^2*h)"));
        }
        Ok(unit)
    }

    fn skip_space(&mut self) {
        while self.text[self.pos..].starts_with(' ') {
            self.pos += 1;
        }
    }

    fn peek(&mut self) -> Option<char> {
        self.skip_space();
        self.text[self.pos..].chars().next()
    }

    fn product(&mut self) -> Result<Unit, DataError> {
        let mut unit = self.factor()?;
        while let Some(op @ ('*' | '/')) = self.peek() {
            self.pos += 1;
            let rhs = self.factor()?;
            unit = if op == '*' {
                unit.mul(&rhs)
            } else {
                unit.div(&rhs)
            };
        }
        Ok(unit)
    }

    fn factor(&mut self) -> Result<Unit, DataError> {
        let base = self.atom()?;
        if self.peek() != Some('^') {
            return Ok(base);
        }
        self.pos += 1;
        self.skip_space();
        let rest = &self.text[self.pos..];
        let len = rest
            .char_indices()
            .find(|&(i, c)| !(c.is_ascii_digit() || (i == 0 && c == '-')))
            .map_or(rest.len(), |(i, _)| i);
        let n: i32 = rest[..len].parse().map_err(|_| {
            DataError::new(format!(
                "`{}`: expected a whole-number power after ^",
                self.text
            ))
        })?;
        self.pos += len;
        Ok(base.powi(n))
    }

    fn atom(&mut self) -> Result<Unit, DataError> {
        if self.peek() == Some('(') {
            self.pos += 1;
            let inner = self.product()?;
            if self.peek() != Some(')') {
                return Err(DataError::new(format!(
                    "`{}`: a `(` is not closed",
                    self.text
                )));
            }
            self.pos += 1;
            return Ok(inner);
        }
        let rest = &self.text[self.pos..];
        let len = rest
            .find(['*', '/', '^', '(', ')', ' '])
            .unwrap_or(rest.len());
        let symbol = &rest[..len];
        if symbol.is_empty() {
            return Err(DataError::new(format!(
                "`{}`: a unit symbol is missing",
                self.text
            )));
        }
        self.pos += len;
        if symbol == "1" {
            return Ok(Unit::one());
        }
        lookup_unit(symbol).ok_or_else(|| unknown_unit(symbol))
    }
}

fn unknown_unit(symbol: &str) -> DataError {
    let e = DataError::new(format!("unknown unit `{symbol}`"));
    match suggest_unit(symbol) {
        Some(best) => e.with_hint(format!("did you mean `{best}`?")),
        None => e.with_hint("see `siccant help units` for the units siccant knows"),
    }
}

/// Write a table as CSV with `name [unit]` headers, atomically: the text goes
/// to a temporary file in the target folder, which is then renamed over `path`.
pub fn write_table(table: &Table, path: &Path) -> Result<(), DataError> {
    let text = table_csv(table)?;
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let fail =
        |e: std::io::Error| DataError::new(format!("cannot write `{}`: {e}", path.display()));
    let mut tmp = tempfile::NamedTempFile::new_in(&dir).map_err(fail)?;
    std::io::Write::write_all(&mut tmp, text.as_bytes()).map_err(fail)?;
    tmp.persist(path).map_err(|e| fail(e.error))?;
    Ok(())
}

/// A table as CSV text (numbers in each column's unit, shortest exact form).
pub fn table_csv(table: &Table) -> Result<String, DataError> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let header: Vec<String> = table.columns.iter().map(header_text).collect();
    w.write_record(&header).map_err(csv_error)?;
    let rows = table
        .columns
        .iter()
        .map(|c| c.cells.len())
        .max()
        .unwrap_or(0);
    for r in 0..rows {
        let cells: Vec<String> = table
            .columns
            .iter()
            .map(|c| cell_text(c, r))
            .collect::<Result<_, _>>()?;
        w.write_record(&cells).map_err(csv_error)?;
    }
    let bytes = w
        .into_inner()
        .map_err(|e| DataError::new(format!("cannot write CSV: {e}")))?;
    String::from_utf8(bytes).map_err(|e| DataError::new(format!("cannot write CSV: {e}")))
}

fn header_text(c: &Column) -> String {
    let is_text = c.cells.iter().any(|v| !matches!(v, Value::Quantity(..)));
    match &c.unit {
        _ if is_text => format!("{} [text]", c.name),
        Some(u) if !u.symbol.is_empty() => format!("{} [{}]", c.name, u.symbol),
        _ => format!("{} [-]", c.name),
    }
}

fn cell_text(c: &Column, row: usize) -> Result<String, DataError> {
    match c.cells.get(row) {
        None => Ok(String::new()),
        Some(Value::Quantity(q, _)) => {
            let x = match &c.unit {
                Some(u) => u
                    .from_si(q)
                    .map_err(|e| DataError::new(format!("column `{}`: {}", c.name, e.message)))?,
                None => q.si,
            };
            Ok(format!("{x}"))
        }
        Some(Value::Str(s)) => Ok(s.clone()),
        Some(Value::Bool(b)) => Ok(b.to_string()),
        Some(_) => Err(DataError::new(format!(
            "column `{}` holds a value that cannot go in a CSV cell",
            c.name
        ))),
    }
}

/// Resolve a path argument against the worksheet's folder.
fn resolve(args: &Args, path: &str) -> PathBuf {
    let p = PathBuf::from(path);
    match (&args.dir, p.is_relative()) {
        (Some(dir), true) => dir.join(p),
        _ => p,
    }
}

fn text_arg(args: &mut Args, name: &str) -> Result<(String, crate::diag::Span), Diagnostic> {
    let arg = args.required(name)?;
    match arg.value {
        Value::Str(s) => Ok((s, arg.span)),
        other => Err(Diagnostic::error(
            arg.span,
            format!(
                "argument `{name}` must be text in quotes, found {}",
                super::type_word(&other)
            ),
        )),
    }
}

/// Read a table argument.
pub fn table_arg(args: &mut Args, name: &str) -> Result<Table, Diagnostic> {
    let arg = args.required(name)?;
    match arg.value {
        Value::Table(t) => Ok(t),
        other => Err(Diagnostic::error(
            arg.span,
            format!(
                "argument `{name}` must be a table, found {}",
                super::type_word(&other)
            ),
        )
        .with_hint("read one with lab_data(\"file.csv\")")),
    }
}

fn data_diagnostic(span: crate::diag::Span, e: DataError) -> Diagnostic {
    let d = Diagnostic::error(span, e.message);
    match e.hint {
        Some(h) => d.with_hint(h),
        None => d,
    }
}

fn lab_data(args: &mut Args) -> Result<Value, Diagnostic> {
    let (path, span) = text_arg(args, "file")?;
    args.finish()?;
    read_table(&resolve(args, &path))
        .map(Value::Table)
        .map_err(|e| data_diagnostic(span, e))
}

fn save_csv(args: &mut Args) -> Result<Value, Diagnostic> {
    let table = table_arg(args, "table")?;
    let (path, span) = text_arg(args, "file")?;
    args.finish()?;
    let full = resolve(args, &path);
    write_table(&table, &full).map_err(|e| data_diagnostic(span, e))?;
    Ok(Value::Str(full.display().to_string()))
}

fn column(args: &mut Args) -> Result<Value, Diagnostic> {
    let table = table_arg(args, "table")?;
    let (name, span) = text_arg(args, "name")?;
    args.finish()?;
    find_column(&table, &name, span).map(|c| Value::List(c.cells.clone()))
}

/// A column of `table` by name, with a did-you-mean error.
pub fn find_column<'t>(
    table: &'t Table,
    name: &str,
    span: crate::diag::Span,
) -> Result<&'t Column, Diagnostic> {
    table
        .columns
        .iter()
        .find(|c| c.name == name)
        .ok_or_else(|| {
            let names: Vec<&str> = table.columns.iter().map(|c| c.name.as_str()).collect();
            let d = Diagnostic::error(span, format!("the table has no column `{name}`"));
            let d = match super::closest(name, &names) {
                Some(best) => d.with_hint(format!("did you mean `{best}`?")),
                None => d,
            };
            d.with_hint(format!("columns: {}", names.join(", ")))
        })
}

/// The data family: lab tables in and out.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "lab_data",
        family: "data",
        params: &[Param { name: "file", unit: "text", default: None, doc: "CSV file, relative to the worksheet" }],
        returns: "table",
        doc: "Read lab measurements from a CSV file whose header cells carry units, `name [unit]` \
              (`aw [-]`, `X [kg/kg db]`, `t [min]`, `m [g]`, `T [degC]`; `[text]` for words). \
              Every cell is checked: a missing or unknown unit, a ragged row or a cell that is not a number \
              is an error naming the line and column.",
        method: "CSV (RFC 4180) with a unit in brackets in each header cell; `#` starts a comment line",
        source: "RFC 4180, Common Format and MIME Type for CSV Files (2005)",
        validity: "numbers in each column's unit; wet-basis moisture below 1",
        example: "lab_data(\"data/sorption_40C.csv\")",
        func: lab_data,
    },
    Builtin {
        name: "save_csv",
        family: "data",
        params: &[
            Param { name: "table", unit: "table", default: None, doc: "table to write" },
            Param { name: "file", unit: "text", default: None, doc: "CSV file, relative to the worksheet" },
        ],
        returns: "text (the path written)",
        doc: "Write a table to a CSV file with `name [unit]` headers, numbers in each column's unit. \
              The file is replaced atomically (written beside it, then renamed), so a reader never sees half a file.",
        method: "CSV (RFC 4180); temporary file and rename",
        source: "RFC 4180, Common Format and MIME Type for CSV Files (2005)",
        validity: "any table of numbers and text",
        example: "save_csv(fit.residuals, \"out/residuals.csv\")",
        func: save_csv,
    },
    Builtin {
        name: "column",
        family: "data",
        params: &[
            Param { name: "table", unit: "table", default: None, doc: "table to read" },
            Param { name: "name", unit: "text", default: None, doc: "column name as in the header" },
        ],
        returns: "list of quantities",
        doc: "One column of a table as a list, with its unit.",
        method: "selection by header name",
        source: "our own",
        validity: "any table",
        example: "column(lab, \"X\")",
        func: column,
    },
];

#[cfg(test)]
mod tests {
    use super::*;

    fn si(t: &Table, col: usize, row: usize) -> f64 {
        match &t.columns[col].cells[row] {
            Value::Quantity(q, _) => q.si,
            other => panic!("not a quantity: {other:?}"),
        }
    }

    #[test]
    fn reads_units_from_headers() {
        let t = parse_table("# invented\naw [-], X [kg/kg db], t [min], m [g], T [degC], note [text]\n0.5, 0.12, 30, 250, 40, first\n").unwrap();
        assert_eq!(t.columns.len(), 6);
        assert_eq!(t.columns[1].unit.as_ref().unwrap().kind, Kind::Moisture);
        assert!((si(&t, 1, 0) - 0.12).abs() < 1e-15);
        assert!((si(&t, 2, 0) - 1800.0).abs() < 1e-9);
        assert!((si(&t, 3, 0) - 0.25).abs() < 1e-12);
        assert!((si(&t, 4, 0) - 313.15).abs() < 1e-9);
        assert!(matches!(&t.columns[5].cells[0], Value::Str(s) if s == "first"));
    }

    #[test]
    fn byte_order_mark_and_crlf_are_accepted() {
        let t = parse_table("\u{feff}aw [-],X [kg/kg db]\r\n0.5,0.1\r\n\r\n0.6,0.2\r\n").unwrap();
        assert_eq!(t.columns[0].name, "aw");
        assert_eq!(t.columns[1].cells.len(), 2);
    }

    #[test]
    fn wet_basis_and_percent_columns_convert() {
        let t = parse_table("w [kg/kg wb], X [%db], u [kg/(m^2*h)]\n0.5, 20, 3.6\n").unwrap();
        assert!((si(&t, 0, 0) - 1.0).abs() < 1e-12); // 0.5 wb is 1 kg/kg dry basis
        assert!((si(&t, 1, 0) - 0.2).abs() < 1e-12);
        assert!((si(&t, 2, 0) - 0.001).abs() < 1e-12);
    }

    #[test]
    fn errors_name_line_and_column() {
        let missing = parse_table("aw, X [kg/kg db]\n0.5, 0.1\n").unwrap_err();
        assert!(
            missing.message.contains("line 1, column 1") && missing.message.contains("has no unit"),
            "{missing}"
        );
        let unknown = parse_table("aw [-], X [kg/kgg db]\n").unwrap_err();
        assert!(unknown.message.contains("unknown unit `kgg`"), "{unknown}");
        let ragged = parse_table("aw [-], X [kg/kg db]\n0.5, 0.1\n0.6\n").unwrap_err();
        assert!(ragged.message.contains("line 3 has 1 cells"), "{ragged}");
        let text = parse_table("aw [-], X [kg/kg db]\n0.5, 0.1\n0.6, abc\n").unwrap_err();
        assert!(
            text.message
                .contains("line 3, column 2 (`X`): `abc` is not a number"),
            "{text}"
        );
        assert!(parse_table("").is_err());
    }

    #[test]
    fn devices_and_directories_are_not_read() {
        for path in ["/dev/zero", "."] {
            let e = read_text_file(Path::new(path)).err().map(|e| e.to_string());
            assert_eq!(e.as_deref(), Some("not a regular file"), "{path}");
        }
    }

    #[test]
    fn a_column_named_twice_is_an_error() {
        let e = parse_table("t [h], m [g], t [min]\n0, 1, 2\n").err();
        let msg = e.map(|e| e.message).unwrap_or_default();
        assert!(
            msg.contains("column 3: the column `t` is named twice"),
            "{msg}"
        );
    }

    #[test]
    fn write_then_read_round_trips() {
        let src = "aw [-],X [kg/kg db],T [degC]\n0.11,0.031,40\n0.753,0.1875,40\n";
        let t = parse_table(src).unwrap();
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.csv");
        write_table(&t, &path).unwrap();
        let back = read_table(&path).unwrap();
        assert_eq!(std::fs::read_to_string(&path).unwrap(), src);
        for c in 0..3 {
            for r in 0..2 {
                assert!((si(&t, c, r) - si(&back, c, r)).abs() < 1e-12);
            }
        }
    }
}
