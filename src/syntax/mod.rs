//! Syntax: worksheet text to a typed AST with spans on every node.
//!
//! `split` finds the statements; `lower` parses each with the pest grammar in
//! `grammar/siccant.pest` and lowers it once into [`ast`] nodes.

pub mod ast;
mod lower;
pub mod split;

pub use ast::*;

use std::sync::Arc;

use crate::diag::{Diagnostic, Span};

/// Deepest expression nesting the evaluator accepts.
pub const MAX_DEPTH: usize = 200;

/// Parse a whole source text (file id `file`): every statement that parses, and
/// every error found (one per bad statement, plus bracket and string errors).
pub fn parse(text: &str, file: u32) -> (Vec<Stmt>, Vec<Diagnostic>) {
    let p = parse_recovering(text, file);
    (p.stmts, p.errors)
}

/// The result of [`parse_recovering`].
#[derive(Debug, Default)]
pub struct Parsed {
    /// Statements that parsed.
    pub stmts: Vec<Stmt>,
    /// Every parse error, by position.
    pub errors: Vec<Diagnostic>,
    /// Names that lines which failed to parse seem to define (`name = ...`),
    /// so that their uses elsewhere are not reported again as undefined.
    pub broken: Vec<String>,
}

/// Like [`parse`], also guessing the names that bad lines meant to define.
pub fn parse_recovering(text: &str, file: u32) -> Parsed {
    let scan = split::scan(text, file);
    let mut out = Parsed {
        errors: scan.errors,
        ..Parsed::default()
    };
    for chunk in scan.chunks {
        let source = &text[chunk.start..chunk.end];
        match lower::parse_statement(source, chunk.start, file) {
            Ok(Some(stmt)) => match check_depth(&stmt) {
                Ok(()) => out.stmts.push(stmt),
                Err(d) => out.errors.push(d),
            },
            Ok(None) => {}
            Err(d) => {
                out.errors.push(d);
                out.broken.extend(guess_defined_name(source));
            }
        }
    }
    for d in &out.errors {
        let start = d.span.start as usize;
        let line_start = text[..start.min(text.len())]
            .rfind('\n')
            .map_or(0, |i| i + 1);
        let line_end = text[line_start..]
            .find('\n')
            .map_or(text.len(), |i| line_start + i);
        out.broken
            .extend(guess_defined_name(&text[line_start..line_end]));
    }
    out.errors.sort_by_key(|d| d.span.start);
    out
}

/// `name` from `name = ...`, `input name = ...` or `name(x) = ...`.
fn guess_defined_name(line: &str) -> Option<String> {
    let line = line.trim_start();
    let line = line.strip_prefix("input ").map_or(line, str::trim_start);
    let name: String = line
        .chars()
        .take_while(|c| c.is_ascii_alphanumeric() || *c == '_')
        .collect();
    let rest = line[name.len()..].trim_start();
    let defines = rest.starts_with('(') || (rest.starts_with('=') && !rest.starts_with("=="));
    (!name.is_empty() && defines && !name.starts_with(|c: char| c.is_ascii_digit())).then_some(name)
}

/// Parse a single expression (for `--set NAME=EXPR`).
pub fn parse_expr(text: &str, file: u32) -> Result<Expr, Vec<Diagnostic>> {
    let (stmts, errors) = parse(text, file);
    if !errors.is_empty() {
        return Err(errors);
    }
    match stmts.into_iter().next() {
        Some(Stmt {
            kind: StmtKind::Show(e),
            ..
        }) => Ok(Arc::unwrap_or_clone(e)),
        Some(s) => Err(vec![Diagnostic::error(
            s.span,
            "expected a value here, not a statement",
        )]),
        None => Err(vec![Diagnostic::error(
            Span {
                file,
                start: 0,
                end: 0,
            },
            "expected a value, found nothing",
        )]),
    }
}

/// Refuse expressions nested deeper than [`MAX_DEPTH`] (iteratively, so the check
/// itself cannot overflow the stack).
fn check_depth(stmt: &Stmt) -> Result<(), Diagnostic> {
    let root = match &stmt.kind {
        StmtKind::Binding { expr, .. }
        | StmtKind::Input { expr, .. }
        | StmtKind::Check(expr)
        | StmtKind::Show(expr) => expr,
        StmtKind::Function { body, .. } => body,
    };
    let mut stack: Vec<(&Expr, usize)> = vec![(root, 1usize)];
    while let Some((e, d)) = stack.pop() {
        if d > MAX_DEPTH {
            return Err(Diagnostic::error(
                e.span,
                format!("expression nested deeper than {MAX_DEPTH} levels"),
            )
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
        ExprKind::Quantity { .. } | ExprKind::Bool(_) | ExprKind::Str(_) | ExprKind::Name(_) => {
            vec![]
        }
        ExprKind::List(items) => items.iter().collect(),
        ExprKind::Record(fields) => fields.iter().map(|(_, e)| e).collect(),
        ExprKind::Unary(_, a) | ExprKind::Field(a, _) | ExprKind::As(a, _) => vec![a],
        ExprKind::Binary(_, a, b) => vec![a, b],
        ExprKind::Call { args, .. } => args.iter().map(|a| &a.value).collect(),
        ExprKind::If(c, a, b) => vec![c, a, b],
    }
}
