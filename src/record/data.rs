//! The audit record as plain data: what was run, on which files, with which
//! overrides, and for every named value its expression, dependencies, result,
//! methods and warnings. The renderers (HTML, Markdown, JSON) only read this.

use crate::library::Builtin;
use crate::value::Value;

/// Everything an audit record shows about one run of a worksheet.
#[derive(Clone, Debug, Default)]
pub struct RecordData {
    /// The worksheet that was run.
    pub worksheet: FileDigest,
    /// Worksheets it loaded, in load order (each once).
    pub loaded: Vec<FileDigest>,
    /// `siccant` version that made the record.
    pub tool_version: String,
    /// `--set NAME=EXPR` overrides as given on the command line.
    pub overrides: Vec<String>,
    /// UTC time of the run (ISO 8601); `None` in a reproducible record.
    pub timestamp: Option<String>,
    /// Inputs, bindings and shown expressions, in source order.
    pub entries: Vec<Entry>,
    /// Checks with their outcome, in source order.
    pub checks: Vec<CheckEntry>,
    /// Warnings not tied to one entry (for example from inside a loaded worksheet).
    pub other_warnings: Vec<String>,
}

/// A file with the SHA-256 of its bytes as read.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct FileDigest {
    /// The path as written (command line or `load`).
    pub path: String,
    /// Lower-case hex SHA-256.
    pub sha256: String,
}

/// What kind of statement an entry comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum EntryKind {
    /// `input name = expr` (a parameter a reader may override).
    Input,
    /// `name = expr`.
    Value,
    /// A bare expression shown by the worksheet.
    Shown,
}

/// One named value (or shown expression) with its paper trail.
#[derive(Clone, Debug)]
pub struct Entry {
    /// The name, or the expression text for a shown expression.
    pub name: String,
    pub kind: EntryKind,
    /// The statement as written, e.g. `area = 2.4 m * 1.8 m`.
    pub source: String,
    /// 1-based line of the statement in the worksheet (0 when unknown).
    pub line: usize,
    /// Named values and user functions the expression reads.
    pub depends_on: Vec<String>,
    /// The result.
    pub value: Value,
    /// For an input: set from outside with `--set`.
    pub overridden: bool,
    /// Built-in functions the expression calls, with their method and source.
    pub builtins: Vec<&'static Builtin>,
    /// Validity warnings and other warnings raised while computing it.
    pub warnings: Vec<String>,
}

/// A `check` and its outcome.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct CheckEntry {
    pub text: String,
    pub line: usize,
    pub passed: bool,
}

impl RecordData {
    /// Entries of one kind, in order.
    pub fn entries_of(&self, kind: EntryKind) -> impl Iterator<Item = &Entry> {
        self.entries.iter().filter(move |e| e.kind == kind)
    }

    /// Every built-in used anywhere, each once, sorted by name.
    pub fn builtins_used(&self) -> Vec<&'static Builtin> {
        let mut all: Vec<&'static Builtin> = self
            .entries
            .iter()
            .flat_map(|e| e.builtins.iter().copied())
            .collect();
        all.sort_by_key(|b| b.name);
        all.dedup_by_key(|b| b.name);
        all
    }

    /// Checks that failed.
    pub fn failed_checks(&self) -> usize {
        self.checks.iter().filter(|c| !c.passed).count()
    }

    /// All warnings, attributed or not.
    pub fn warning_count(&self) -> usize {
        self.entries.iter().map(|e| e.warnings.len()).sum::<usize>() + self.other_warnings.len()
    }
}

/// The cautions printed at the end of every record.
pub const CAUTIONS: &[&str] = &[
    "Combustible dust and solvent vapour can explode in dryers, ducts, cyclones and filters. Assess the product's explosibility and provide venting, suppression or inerting and ignition control as the applicable codes require.",
    "Overheated or smouldering product can start a fire, also hours after a batch. Respect the product's maximum temperature, keep dryers clean and plan for fire detection and suppression.",
    "Hot air, steam coils, heater surfaces and product cause burns. Guard hot surfaces and lock out heaters and fans before entering or cleaning a dryer.",
    "Direct-fired heaters put combustion gases, including carbon monoxide and nitrogen oxides, into the drying air and the room. Ventilate, monitor carbon monoxide and maintain burners.",
    "Drying food at the wrong temperature, humidity or time can leave it unsafe (microbial growth, toxins) or scorched. Validate food processes against food-safety rules.",
    "This record documents a calculation; it is not a design approval. The numbers depend on the methods and inputs shown. Defer to local codes, standards and licensed professional practice, and have designs checked by a qualified engineer.",
];
