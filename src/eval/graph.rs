//! The dependency graph of named values: what each definition reads, and the
//! cycles that make a worksheet meaningless.

use std::collections::HashMap;

use crate::syntax::{Expr, ExprKind};

/// Names an expression reads (values and called functions), excluding `params`,
/// in first-use order without repeats.
pub fn dependencies(expr: &Expr, params: &[String]) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    let mut stack = vec![expr];
    while let Some(e) = stack.pop() {
        let name = match &e.kind {
            ExprKind::Name(n) => Some(n),
            ExprKind::Call { callee, .. } => Some(&callee.name),
            _ => None,
        };
        if let Some(n) = name {
            if !params.contains(n) && !out.contains(n) {
                out.push(n.clone());
            }
        }
        push_children_reversed(e, &mut stack);
    }
    out
}

/// Push `e`'s sub-expressions last-first, so that they pop in source order
/// (the same order as [`crate::syntax::children`], without a list per node).
fn push_children_reversed<'e>(e: &'e Expr, stack: &mut Vec<&'e Expr>) {
    match &e.kind {
        ExprKind::Quantity { .. } | ExprKind::Bool(_) | ExprKind::Str(_) | ExprKind::Name(_) => {}
        ExprKind::List(items) => stack.extend(items.iter().rev()),
        ExprKind::Record(fields) => stack.extend(fields.iter().rev().map(|(_, e)| e)),
        ExprKind::Unary(_, a) | ExprKind::Field(a, _) | ExprKind::As(a, _) => stack.push(a),
        ExprKind::Binary(_, a, b) => stack.extend([&**b, &**a]),
        ExprKind::Call { args, .. } => stack.extend(args.iter().rev().map(|a| &a.value)),
        ExprKind::If(c, a, b) => stack.extend([&**b, &**a, &**c]),
    }
}

/// Every cycle among `names` (in definition order), each as the chain of names
/// ending where it started, e.g. `[a, b, a]`.
pub fn cycles(names: &[String], deps: &HashMap<String, Vec<String>>) -> Vec<Vec<String>> {
    #[derive(Clone, Copy, PartialEq)]
    enum Mark {
        New,
        Active,
        Done,
    }
    let mut mark: HashMap<&str, Mark> = names.iter().map(|n| (n.as_str(), Mark::New)).collect();
    let mut found = Vec::new();
    for root in names {
        if mark[root.as_str()] != Mark::New {
            continue;
        }
        // Iterative depth-first search: (name, next dependency index).
        let mut path: Vec<(&str, usize)> = vec![(root.as_str(), 0)];
        mark.insert(root, Mark::Active);
        while let Some(&mut (node, ref mut i)) = path.last_mut() {
            let next = deps.get(node).and_then(|d| d.get(*i));
            *i += 1;
            match next {
                None => {
                    mark.insert(node, Mark::Done);
                    path.pop();
                }
                Some(dep) => match mark.get(dep.as_str()).copied() {
                    Some(Mark::New) => {
                        mark.insert(dep, Mark::Active);
                        path.push((dep.as_str(), 0));
                    }
                    Some(Mark::Active) => {
                        let from = path.iter().position(|(n, _)| *n == dep).unwrap_or(0);
                        let mut cycle: Vec<String> =
                            path[from..].iter().map(|(n, _)| n.to_string()).collect();
                        cycle.push(dep.clone());
                        found.push(cycle);
                    }
                    _ => {}
                },
            }
        }
    }
    found
}

/// Names reachable from `roots` through `deps`, each after everything it
/// depends on (post-order), without recursion. Names without an entry in
/// `deps` are leaves; cycles are cut where they close.
pub fn postorder<'a>(
    roots: impl IntoIterator<Item = &'a str>,
    deps: &dyn Fn(&str) -> Option<&'a [String]>,
) -> Vec<&'a str> {
    let mut out = Vec::new();
    let mut seen: std::collections::HashSet<&str> = std::collections::HashSet::new();
    for root in roots {
        if !seen.insert(root) {
            continue;
        }
        let mut stack: Vec<(&str, usize)> = vec![(root, 0)];
        while let Some(&mut (node, ref mut i)) = stack.last_mut() {
            let next = deps(node).and_then(|d| d.get(*i));
            *i += 1;
            match next {
                Some(dep) => {
                    if seen.insert(dep.as_str()) {
                        stack.push((dep.as_str(), 0));
                    }
                }
                None => {
                    out.push(node);
                    stack.pop();
                }
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn postorder_puts_dependencies_first() {
        let deps: HashMap<String, Vec<String>> = [
            ("c".to_string(), vec!["b".to_string()]),
            ("b".to_string(), vec!["a".to_string()]),
        ]
        .into();
        let get = |n: &str| deps.get(n).map(Vec::as_slice);
        assert_eq!(postorder(["c"], &get), vec!["a", "b", "c"]);
    }

    #[test]
    fn dependencies_in_first_use_order_through_every_form() {
        let text = "x = if c then f(a, k: [b, {r: d.e}]) else -g as m + (h < i)\n";
        let (stmts, errors) = crate::syntax::parse(text, 0);
        assert!(errors.is_empty(), "{errors:?}");
        let def = crate::eval::definition(&stmts[0]).expect("a binding");
        assert_eq!(
            dependencies(&def.expr, &["k".to_string(), "h".to_string()]),
            ["c", "f", "a", "b", "d", "g", "i"]
        );
    }

    #[test]
    fn finds_a_two_name_cycle() {
        let names = vec!["a".to_string(), "b".to_string(), "c".to_string()];
        let deps: HashMap<String, Vec<String>> = [
            ("a".to_string(), vec!["b".to_string()]),
            ("b".to_string(), vec!["a".to_string()]),
            ("c".to_string(), vec!["a".to_string()]),
        ]
        .into();
        assert_eq!(cycles(&names, &deps), vec![vec!["a", "b", "a"]]);
    }
}
