//! Evaluation: a worksheet is a dependency graph of named values.
//!
//! [`Sheet`] holds the definitions and what each reads; [`Ctx`] forces values
//! through the graph (lazily, each once), calls built-ins and user functions,
//! and loads other worksheets. Errors are collected, not thrown: one bad value
//! is reported once and its dependents are skipped silently.

mod call;
mod ctx;
mod fastmap;
mod graph;
mod limits;
mod load;
mod ops;
mod shape;
mod sheet;
mod sources;
mod suggest;
pub mod whatif;

pub use ctx::{resolve_unit, Ctx, Flow, Mode, Stop};
pub use fastmap::FastMap;
pub use graph::{cycles, dependencies};
pub use limits::Limits;
pub use ops::dim_words;
pub use sheet::{definition, Def, DefKind, Defined, Sheet};
pub use sources::{SourceFile, Sources};
pub use suggest::suggest;

use crate::syntax::{Stmt, StmtKind};
use crate::value::Value;

/// One result of evaluating a statement.
#[derive(Clone, Debug)]
pub enum OutputItem {
    /// A named value (binding or input) or a bare expression (`name: None`).
    Value {
        /// The name of a binding or input; `None` for a bare expression.
        name: Option<String>,
        /// What it evaluated to.
        value: Value,
    },
    /// The outcome of a `check`.
    Check {
        /// The condition as written.
        text: String,
        /// Whether it held.
        passed: bool,
    },
}

/// Evaluate statements in source order. Errors and warnings collect in `ctx`.
pub fn run_statements(ctx: &mut Ctx, stmts: &[Stmt]) -> Vec<OutputItem> {
    precompute(ctx, stmts);
    let mut items = Vec::new();
    for stmt in stmts {
        if ctx.limits.interrupted() {
            report_interrupt(ctx, stmt.span);
            break;
        }
        let item = match &stmt.kind {
            StmtKind::Binding { name, .. } | StmtKind::Input { name, .. } => ctx
                .force(&name.name, name.span)
                .map(|value| OutputItem::Value {
                    name: Some(name.name.clone()),
                    value,
                }),
            StmtKind::Function { .. } => continue,
            StmtKind::Show(e) => ctx
                .expr(e)
                .map(|value| OutputItem::Value { name: None, value }),
            StmtKind::Check(e) => ctx.truth(e, "check").map(|passed| OutputItem::Check {
                text: ctx.sources.slice(e.span).to_string(),
                passed,
            }),
        };
        match item {
            Ok(i) => items.push(i),
            Err(stop) => {
                ctx.report(stop);
            }
        }
    }
    items
}

/// Compute every value the statements need, dependencies first, so that
/// forcing a value never recurses down a long chain of names.
fn precompute(ctx: &mut Ctx, stmts: &[Stmt]) {
    let order: Vec<(String, crate::diag::Span)> = {
        let defs = &ctx.sheet.defs;
        let mut roots: Vec<String> = Vec::new();
        for s in stmts {
            match defined_name(s) {
                // The sheet already knows what the definition reads.
                Some(name) => {
                    if let Some(d) = defs.get(name) {
                        roots.extend(d.deps.iter().cloned());
                    }
                    roots.push(name.to_string());
                }
                None => roots.extend(statement_deps(s)),
            }
        }
        let get = |n: &str| defs.get(n).map(|d| d.deps.as_slice());
        graph::postorder(roots.iter().map(String::as_str), &get)
            .into_iter()
            .filter_map(|n| {
                defs.get(n)
                    .filter(|d| d.kind != DefKind::Function)
                    .map(|d| (n.to_string(), d.name.span))
            })
            .collect()
    };
    for (name, span) in order {
        if ctx.limits.interrupted() {
            break;
        }
        if let Err(stop) = ctx.force(&name, span) {
            ctx.report(stop);
        }
    }
}

/// Report `interrupted` at the statement reached, unless a value already did.
fn report_interrupt(ctx: &mut Ctx, span: crate::diag::Span) {
    if !ctx
        .errors
        .iter()
        .any(|d| d.message.starts_with("interrupted"))
    {
        ctx.errors
            .push(crate::diag::Diagnostic::error(span, "interrupted"));
    }
}

/// The name a binding, input or function statement defines.
fn defined_name(stmt: &Stmt) -> Option<&str> {
    match &stmt.kind {
        StmtKind::Binding { name, .. }
        | StmtKind::Input { name, .. }
        | StmtKind::Function { name, .. } => Some(&name.name),
        StmtKind::Check(_) | StmtKind::Show(_) => None,
    }
}

fn statement_deps(stmt: &Stmt) -> Vec<String> {
    match &stmt.kind {
        StmtKind::Check(e) | StmtKind::Show(e) => graph::dependencies(e, &[]),
        _ => Vec::new(),
    }
}
