//! Syntax: worksheet text to a typed AST with spans on every node.
//!
//! `split` finds the statements; `lower` parses each with the pest grammar in
//! `grammar/siccant.pest` and lowers it once into [`ast`] nodes.

pub mod ast;
mod lower;
pub mod split;

pub use ast::*;

use crate::diag::{Diagnostic, Span};

/// Deepest expression nesting the evaluator accepts.
pub const MAX_DEPTH: usize = 200;

/// Parse a whole source text (file id `file`): every statement that parses, and
/// every error found (one per bad statement, plus bracket and string errors).
pub fn parse(text: &str, file: u32) -> (Vec<Stmt>, Vec<Diagnostic>) {
    let scan = split::scan(text, file);
    let mut errors = scan.errors;
    let mut stmts = Vec::new();
    for chunk in scan.chunks {
        match lower::parse_statement(&text[chunk.start..chunk.end], chunk.start, file) {
            Ok(Some(stmt)) => match check_depth(&stmt) {
                Ok(()) => stmts.push(stmt),
                Err(d) => errors.push(d),
            },
            Ok(None) => {}
            Err(d) => errors.push(d),
        }
    }
    errors.sort_by_key(|d| d.span.start);
    (stmts, errors)
}

/// Parse a single expression (for `--set NAME=EXPR`).
pub fn parse_expr(text: &str, file: u32) -> Result<Expr, Vec<Diagnostic>> {
    let (stmts, errors) = parse(text, file);
    if !errors.is_empty() {
        return Err(errors);
    }
    match stmts.into_iter().next() {
        Some(Stmt { kind: StmtKind::Show(e), .. }) => Ok(e),
        Some(s) => Err(vec![Diagnostic::error(s.span, "expected a value here, not a statement")]),
        None => Err(vec![Diagnostic::error(Span { file, start: 0, end: 0 }, "expected a value, found nothing")]),
    }
}

/// Refuse expressions nested deeper than [`MAX_DEPTH`] (iteratively, so the check
/// itself cannot overflow the stack).
fn check_depth(stmt: &Stmt) -> Result<(), Diagnostic> {
    let root = match &stmt.kind {
        StmtKind::Binding { expr, .. } | StmtKind::Input { expr, .. } | StmtKind::Check(expr) | StmtKind::Show(expr) => expr,
        StmtKind::Function { body, .. } => body,
    };
    let mut stack = vec![(root, 1usize)];
    while let Some((e, d)) = stack.pop() {
        if d > MAX_DEPTH {
            return Err(Diagnostic::error(e.span, format!("expression nested deeper than {MAX_DEPTH} levels"))
                .with_hint("split it into named values"));
        }
        for child in children(e) {
            stack.push((child, d + 1));
        }
    }
    Ok(())
}

/// The direct sub-expressions of an expression.
pub fn children(e: &Expr) -> Vec<&Expr> {
    match &e.kind {
        ExprKind::Quantity { .. } | ExprKind::Bool(_) | ExprKind::Str(_) | ExprKind::Name(_) => vec![],
        ExprKind::List(items) => items.iter().collect(),
        ExprKind::Record(fields) => fields.iter().map(|(_, e)| e).collect(),
        ExprKind::Unary(_, a) | ExprKind::Field(a, _) | ExprKind::As(a, _) => vec![a],
        ExprKind::Binary(_, a, b) => vec![a, b],
        ExprKind::Call { args, .. } => args.iter().map(|a| &a.value).collect(),
        ExprKind::If(c, a, b) => vec![c, a, b],
    }
}
