//! A worksheet's definitions: named values, inputs and user functions, with the
//! dependencies each one reads, and the cache of values already computed.

use std::collections::{HashMap, HashSet};
use std::path::{Path, PathBuf};
use std::sync::Arc;

use super::fastmap::FastMap;
use super::graph;
use crate::diag::{Diagnostic, Span};
use crate::syntax::{Expr, Ident, Stmt, StmtKind};
use crate::units::Unit;
use crate::value::Value;

/// Most distinct unit texts cached before the by-text cache is emptied (it
/// refills on use; this only bounds a long-lived session).
pub const MAX_UNIT_TEXTS: usize = 4096;

/// What a definition defines.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DefKind {
    /// `name = expr`
    Value,
    /// `input name = expr`
    Input,
    /// `f(x) = expr`
    Function,
}

/// One definition: `name = expr`, `input name = expr` or `f(x) = expr`.
#[derive(Clone, Debug)]
pub struct Def {
    /// The defined name, with its span.
    pub name: Ident,
    /// The name, shared: the key of its value in [`Sheet::cache`].
    pub key: Arc<str>,
    /// Value, input or function.
    pub kind: DefKind,
    /// Parameter names of a function; empty otherwise.
    pub params: Vec<String>,
    /// The defining expression (a function's body).
    pub expr: Arc<Expr>,
    /// Names the expression reads.
    pub deps: Vec<String>,
    /// Span of the whole statement.
    pub span: Span,
    /// For a value that is a built-in call: the only fields of its record
    /// that are ever read, when a what-if study has worked them out (passed to
    /// the built-in as [`crate::library::Args::wanted`]); `None` otherwise.
    pub wanted: Option<Arc<[String]>>,
}

/// What [`Sheet::define_all`] did.
#[derive(Debug, Default)]
pub struct Defined {
    /// Names added or replaced.
    pub names: Vec<String>,
    /// Duplicates and cycles.
    pub errors: Vec<Diagnostic>,
    /// Names caught in a cycle (not to be evaluated).
    pub cyclic: Vec<String>,
}

/// The definitions of one worksheet (or of a REPL / notebook session).
#[derive(Clone, Debug, Default)]
pub struct Sheet {
    /// Definitions by name.
    pub defs: FastMap<String, Def>,
    /// Names in definition order.
    pub order: Vec<String>,
    /// Values already computed, by name (the definitions' shared
    /// [`Def::key`]s, so that caching a value allocates no name).
    pub cache: FastMap<Arc<str>, Value>,
    /// Input values set from outside (`--set`, `load(..., name: value)`).
    pub overrides: FastMap<String, Value>,
    /// Resolved units by their text (`kg/m^2`), so each is looked up once.
    pub unit_texts: FastMap<String, Unit>,
    /// Directory `load` paths are relative to.
    pub dir: PathBuf,
    /// `dir` shared with built-ins (each call receives it), made on first use.
    shared_dir: Option<Arc<Path>>,
}

impl Sheet {
    /// An empty sheet whose loads are relative to `dir`.
    pub fn new(dir: PathBuf) -> Sheet {
        Sheet {
            dir,
            ..Sheet::default()
        }
    }

    /// [`Sheet::dir`] as a shared path (built once, then cloned cheaply).
    pub fn shared_dir(&mut self) -> Arc<Path> {
        match &self.shared_dir {
            // Byte for byte (comparing paths parses their components).
            Some(d) if d.as_os_str() == self.dir.as_os_str() => d.clone(),
            _ => {
                let d: Arc<Path> = Arc::from(self.dir.as_path());
                self.shared_dir = Some(d.clone());
                d
            }
        }
    }

    /// Add the definitions in `stmts`. With `strict`, redefining a name that
    /// already exists is an error (a worksheet file); otherwise the new
    /// definition replaces the old one (REPL, notebook). Names defined twice
    /// within `stmts` are always an error. On error nothing changes.
    pub fn define(&mut self, stmts: &[Stmt], strict: bool) -> Result<Vec<String>, Vec<Diagnostic>> {
        let (new_defs, errors) = self.unique_definitions(stmts, strict);
        if !errors.is_empty() {
            return Err(errors);
        }
        let backup = (self.defs.clone(), self.order.clone());
        let names = self.insert(new_defs);
        let (errors, _) = self.cycle_errors(&names);
        if !errors.is_empty() {
            (self.defs, self.order) = backup;
            return Err(errors);
        }
        self.invalidate(&names);
        Ok(names)
    }

    /// Add what can be added from a worksheet file and report the rest: a
    /// second definition of a name is skipped, and names caught in a cycle
    /// are returned so the evaluator can leave them alone. Used so that one
    /// run reports every error at once.
    pub fn define_all(&mut self, stmts: &[Stmt]) -> Defined {
        let (new_defs, mut errors) = self.unique_definitions(stmts, true);
        let names = self.insert(new_defs);
        let (cycle_errors, cyclic) = self.cycle_errors(&names);
        errors.extend(cycle_errors);
        self.invalidate(&names);
        Defined {
            names,
            errors,
            cyclic,
        }
    }

    fn unique_definitions(&self, stmts: &[Stmt], strict: bool) -> (Vec<Def>, Vec<Diagnostic>) {
        let mut errors = Vec::new();
        let mut seen: HashMap<String, Span> = HashMap::new();
        let mut new_defs = Vec::new();
        for def in stmts.iter().filter_map(definition) {
            let earlier = seen.get(&def.name.name).copied().or_else(|| {
                strict
                    .then(|| self.defs.get(&def.name.name).map(|d| d.name.span))
                    .flatten()
            });
            if let Some(first) = earlier {
                errors.push(duplicate(&def.name, first));
                continue;
            }
            seen.insert(def.name.name.clone(), def.name.span);
            new_defs.push(def);
        }
        (new_defs, errors)
    }

    fn insert(&mut self, new_defs: Vec<Def>) -> Vec<String> {
        let names: Vec<String> = new_defs.iter().map(|d| d.name.name.clone()).collect();
        for def in new_defs {
            let name = def.name.name.clone();
            if self.defs.insert(name.clone(), def).is_none() {
                self.order.push(name);
            }
        }
        names
    }

    fn cycle_errors(&self, new: &[String]) -> (Vec<Diagnostic>, Vec<String>) {
        let deps: HashMap<String, Vec<String>> = self
            .defs
            .iter()
            .map(|(n, d)| {
                (
                    n.clone(),
                    d.deps
                        .iter()
                        .filter(|x| self.defs.contains_key(*x))
                        .cloned()
                        .collect(),
                )
            })
            .collect();
        let mut out = Vec::new();
        let mut members: Vec<String> = Vec::new();
        for cycle in graph::cycles(&self.order, &deps) {
            // A cycle of functions only is recursion, limited at run time.
            let has_value = cycle.iter().any(|n| {
                self.defs
                    .get(n)
                    .is_some_and(|d| d.kind != DefKind::Function)
            });
            if !has_value || !cycle.iter().any(|n| new.contains(n)) {
                continue;
            }
            members.extend(cycle.iter().cloned());
            let Some(first) = self.defs.get(&cycle[0]) else {
                continue;
            };
            let msg = if cycle.len() == 2 {
                format!("`{}` depends on itself", cycle[0])
            } else {
                format!("cycle: {}", cycle.join(" -> "))
            };
            out.push(Diagnostic::error(first.name.span, msg).with_hint("a worksheet is a set of definitions; each value must be computable from the others without going round in a circle"));
        }
        (out, members)
    }

    /// Forget cached values of `names` and of everything that depends on them.
    pub fn invalidate(&mut self, names: &[String]) {
        if self.cache.is_empty() {
            return;
        }
        let mut readers: HashMap<&str, Vec<&str>> = HashMap::new();
        for d in self.defs.values() {
            for dep in &d.deps {
                readers
                    .entry(dep.as_str())
                    .or_default()
                    .push(d.name.name.as_str());
            }
        }
        let mut dirty: HashSet<String> = HashSet::new();
        let mut queue: Vec<&str> = names.iter().map(String::as_str).collect();
        while let Some(n) = queue.pop() {
            if dirty.insert(n.to_string()) {
                queue.extend(readers.get(n).into_iter().flatten().copied());
            }
        }
        self.cache.retain(|k, _| !dirty.contains(&**k));
    }

    /// Source files a live definition points into (its statement and name).
    pub fn live_files(&self) -> HashSet<u32> {
        self.defs
            .values()
            .flat_map(|d| [d.span.file, d.name.span.file])
            .collect()
    }

    /// Forget the by-text unit cache when it has grown past
    /// [`MAX_UNIT_TEXTS`] entries. (The unit of each literal and `as` is kept
    /// in its syntax tree and goes with it.)
    pub fn trim_unit_texts(&mut self) {
        if self.unit_texts.len() > MAX_UNIT_TEXTS {
            self.unit_texts.clear();
        }
    }

    /// Names of the inputs, in definition order.
    pub fn inputs(&self) -> Vec<&str> {
        self.order
            .iter()
            .filter(|n| self.defs.get(*n).is_some_and(|d| d.kind == DefKind::Input))
            .map(String::as_str)
            .collect()
    }
}

fn duplicate(name: &Ident, first: Span) -> Diagnostic {
    let mut d = Diagnostic::error(name.span, format!("`{}` is defined twice", name.name));
    d.hints.push((Some(first), "first defined here".into()));
    d.with_hint("give the second one another name")
}

/// The definition a statement makes, if any.
pub fn definition(stmt: &Stmt) -> Option<Def> {
    let (name, kind, params, expr) = match &stmt.kind {
        StmtKind::Binding { name, expr } => (name, DefKind::Value, Vec::new(), expr),
        StmtKind::Input { name, expr } => (name, DefKind::Input, Vec::new(), expr),
        StmtKind::Function { name, params, body } => (
            name,
            DefKind::Function,
            params.iter().map(|p| p.name.clone()).collect(),
            body,
        ),
        StmtKind::Check(_) | StmtKind::Show(_) => return None,
    };
    let deps = graph::dependencies(expr, &params);
    Some(Def {
        key: Arc::from(name.name.as_str()),
        name: name.clone(),
        kind,
        params,
        expr: expr.clone(),
        deps,
        span: stmt.span,
        wanted: None,
    })
}
