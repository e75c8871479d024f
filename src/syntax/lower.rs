//! The pest parser and the one place where pest pairs are lowered into our AST.
//! No pest type leaves this file.

use pest::error::{ErrorVariant, InputLocation};
use pest::iterators::Pair;
use pest::pratt_parser::{Assoc, Op, PrattParser};
use pest::Parser;

use super::ast::*;
use crate::diag::{Diagnostic, Span};

#[derive(pest_derive::Parser)]
#[grammar = "../grammar/siccant.pest"]
struct WorksheetParser;

/// Words that cannot be names.
pub const KEYWORDS: &[&str] = &[
    "input", "check", "as", "and", "or", "not", "true", "false", "if", "then", "else",
];

/// Most operands in one chain like `a + b + c ...`; longer chains are refused.
pub const MAX_CHAIN: usize = 256;

/// Parse one statement chunk starting at byte `offset` of file `file`.
pub fn parse_statement(text: &str, offset: usize, file: u32) -> Result<Option<Stmt>, Diagnostic> {
    let lower = Lower { offset, file };
    let mut pairs = WorksheetParser::parse(Rule::statement_line, text)
        .map_err(|e| lower.parse_error(e, text))?;
    let line = pairs
        .next()
        .ok_or_else(|| Diagnostic::error(lower.at(0, text.len()), "empty statement"))?;
    match line.into_inner().find(|p| p.as_rule() != Rule::EOI) {
        Some(stmt) => lower.statement(stmt).map(Some),
        None => Ok(None),
    }
}

struct Lower {
    offset: usize,
    file: u32,
}

type Lowered<T> = Result<T, Diagnostic>;

impl Lower {
    fn at(&self, start: usize, end: usize) -> Span {
        Span {
            file: self.file,
            start: (self.offset + start) as u32,
            end: (self.offset + end) as u32,
        }
    }

    fn span(&self, pair: &Pair<Rule>) -> Span {
        let s = pair.as_span();
        self.at(s.start(), s.end())
    }

    fn parse_error(&self, e: pest::error::Error<Rule>, text: &str) -> Diagnostic {
        let pos = match e.location {
            InputLocation::Pos(p) => p,
            InputLocation::Span((s, _)) => s,
        };
        let found = found_token(text, pos);
        let end = (pos + found.len().max(1)).min(text.len().max(pos));
        let message = match e.variant {
            ErrorVariant::ParsingError { positives, .. } => expected_message(&positives, &found),
            ErrorVariant::CustomError { message } => message,
        };
        let mut d = Diagnostic::error(self.at(pos, end.max(pos)), message);
        if let Some(h) = parse_hint(text, pos) {
            d = d.with_hint(h);
        }
        d
    }

    fn statement(&self, pair: Pair<Rule>) -> Lowered<Stmt> {
        let span = self.span(&pair);
        let rule = pair.as_rule();
        let mut inner = pair
            .into_inner()
            .filter(|p| !matches!(p.as_rule(), Rule::kw_input | Rule::kw_check));
        let kind = match rule {
            Rule::input_stmt => {
                let name = self.defined(next(&mut inner)?)?;
                StmtKind::Input {
                    name,
                    expr: self.expr(next(&mut inner)?)?.into(),
                }
            }
            Rule::check_stmt => StmtKind::Check(self.expr(next(&mut inner)?)?.into()),
            Rule::binding => {
                let name = self.defined(next(&mut inner)?)?;
                StmtKind::Binding {
                    name,
                    expr: self.expr(next(&mut inner)?)?.into(),
                }
            }
            Rule::function_def => self.function_def(inner.collect())?,
            _ => StmtKind::Show(self.expr(next(&mut inner)?)?.into()),
        };
        Ok(Stmt { kind, span })
    }

    fn function_def(&self, parts: Vec<Pair<Rule>>) -> Lowered<StmtKind> {
        let mut parts = parts.into_iter();
        let name = self.defined(next(&mut parts)?)?;
        let mut params = Vec::new();
        let mut body = None;
        for p in parts {
            match p.as_rule() {
                Rule::params => {
                    params = p
                        .into_inner()
                        .map(|i| self.defined(i))
                        .collect::<Lowered<_>>()?
                }
                _ => body = Some(self.expr(p)?),
            }
        }
        let body = body.ok_or_else(|| Diagnostic::error(name.span, "function has no body"))?;
        Ok(StmtKind::Function {
            name,
            params,
            body: body.into(),
        })
    }

    /// A name being defined: keywords are refused.
    fn defined(&self, pair: Pair<Rule>) -> Lowered<Ident> {
        let ident = self.ident(pair);
        if KEYWORDS.contains(&ident.name.as_str()) {
            let msg = format!("`{}` is a keyword and cannot be a name", ident.name);
            return Err(
                Diagnostic::error(ident.span, msg).with_hint(format!("try `{}_`", ident.name))
            );
        }
        Ok(ident)
    }

    fn ident(&self, pair: Pair<Rule>) -> Ident {
        Ident {
            name: pair.as_str().to_string(),
            span: self.span(&pair),
        }
    }

    /// Lower any expression-level pair.
    fn expr(&self, pair: Pair<Rule>) -> Lowered<Expr> {
        let span = self.span(&pair);
        match pair.as_rule() {
            Rule::expr => self.as_expr(pair),
            Rule::operation => self.operation(pair),
            Rule::group => self.expr(first(pair)?),
            Rule::quantity => self.quantity(pair),
            Rule::string => Ok(Expr {
                kind: ExprKind::Str(unescape(first(pair)?.as_str())),
                span,
            }),
            Rule::boolean => Ok(Expr {
                kind: ExprKind::Bool(pair.as_str() == "true"),
                span,
            }),
            Rule::name => Ok(Expr {
                kind: ExprKind::Name(pair.as_str().to_string()),
                span,
            }),
            Rule::list => {
                let items = pair
                    .into_inner()
                    .map(|p| self.expr(p))
                    .collect::<Lowered<Vec<_>>>()?;
                Ok(Expr {
                    kind: ExprKind::List(items),
                    span,
                })
            }
            Rule::record => self.record(pair),
            Rule::if_expr => self.if_expr(pair),
            other => Err(Diagnostic::error(
                span,
                format!("internal: unexpected {other:?} in an expression"),
            )),
        }
    }

    fn as_expr(&self, pair: Pair<Rule>) -> Lowered<Expr> {
        let span = self.span(&pair);
        let mut inner = pair.into_inner();
        let value = self.expr(next(&mut inner)?)?;
        let _kw = inner.next();
        match inner.next() {
            Some(unit) => Ok(Expr {
                kind: ExprKind::As(Box::new(value), self.unit(unit)?),
                span,
            }),
            None => Ok(value),
        }
    }

    /// An operation: operands and operators, structured by the Pratt parser.
    fn operation(&self, pair: Pair<Rule>) -> Lowered<Expr> {
        let span = self.span(&pair);
        let pairs = pair.into_inner();
        let operators = pairs.clone().filter(|p| is_infix(p.as_rule())).count();
        if operators >= MAX_CHAIN {
            return Err(Diagnostic::error(
                span,
                format!("more than {MAX_CHAIN} terms in one expression"),
            )
            .with_hint("split it into named values"));
        }
        pratt()
            .map_primary(|p| self.expr(p))
            .map_prefix(|op, rhs| {
                let rhs = rhs?;
                let kind = if op.as_rule() == Rule::op_not {
                    UnaryOp::Not
                } else {
                    UnaryOp::Neg
                };
                let span = Span {
                    end: rhs.span.end,
                    ..self.span(&op)
                };
                Ok(Expr {
                    kind: ExprKind::Unary(kind, Box::new(rhs)),
                    span,
                })
            })
            .map_postfix(|lhs, op| {
                let lhs = lhs?;
                let span = Span {
                    end: self.span(&op).end,
                    ..lhs.span
                };
                match op.as_rule() {
                    Rule::field => Ok(Expr {
                        kind: ExprKind::Field(Box::new(lhs), self.ident(first(op)?)),
                        span,
                    }),
                    _ => self.call(lhs, op, span),
                }
            })
            .map_infix(|lhs, op, rhs| {
                let (lhs, rhs) = (lhs?, rhs?);
                let span = Span {
                    file: self.file,
                    start: lhs.span.start,
                    end: rhs.span.end,
                };
                Ok(Expr {
                    kind: ExprKind::Binary(binary_op(op.as_str()), Box::new(lhs), Box::new(rhs)),
                    span,
                })
            })
            .parse(pairs)
    }

    fn call(&self, callee: Expr, args: Pair<Rule>, span: Span) -> Lowered<Expr> {
        let callee = match callee.kind {
            ExprKind::Name(name) => Ident {
                name,
                span: callee.span,
            },
            _ => {
                return Err(
                    Diagnostic::error(callee.span, "only a named function can be called")
                        .with_hint("write `name(arguments)`, e.g. `sqrt(x)`"),
                )
            }
        };
        let args = args
            .into_inner()
            .map(|a| self.call_arg(a))
            .collect::<Lowered<Vec<_>>>()?;
        Ok(Expr {
            kind: ExprKind::Call { callee, args },
            span,
        })
    }

    fn call_arg(&self, pair: Pair<Rule>) -> Lowered<CallArg> {
        let span = self.span(&pair);
        let inner = first(pair)?;
        if inner.as_rule() == Rule::named_arg {
            let mut parts = inner.into_inner();
            let name = self.ident(next(&mut parts)?);
            let value = self.expr(next(&mut parts)?)?;
            return Ok(CallArg {
                name: Some(name),
                value,
                span,
            });
        }
        Ok(CallArg {
            name: None,
            value: self.expr(inner)?,
            span,
        })
    }

    fn record(&self, pair: Pair<Rule>) -> Lowered<Expr> {
        let span = self.span(&pair);
        let mut fields: Vec<(Ident, Expr)> = Vec::new();
        for f in pair.into_inner() {
            let mut parts = f.into_inner();
            let name = self.ident(next(&mut parts)?);
            if fields.iter().any(|(n, _)| n.name == name.name) {
                return Err(Diagnostic::error(
                    name.span,
                    format!("field `{}` is given twice", name.name),
                ));
            }
            fields.push((name, self.expr(next(&mut parts)?)?));
        }
        Ok(Expr {
            kind: ExprKind::Record(fields),
            span,
        })
    }

    fn if_expr(&self, pair: Pair<Rule>) -> Lowered<Expr> {
        let span = self.span(&pair);
        let mut parts = pair
            .into_inner()
            .filter(|p| !matches!(p.as_rule(), Rule::kw_if | Rule::kw_then | Rule::kw_else));
        let c = self.expr(next(&mut parts)?)?;
        let a = self.expr(next(&mut parts)?)?;
        let b = self.expr(next(&mut parts)?)?;
        Ok(Expr {
            kind: ExprKind::If(Box::new(c), Box::new(a), Box::new(b)),
            span,
        })
    }

    fn quantity(&self, pair: Pair<Rule>) -> Lowered<Expr> {
        let span = self.span(&pair);
        let mut inner = pair.into_inner();
        let number = next(&mut inner)?;
        let value = self.number(&number)?;
        let unit = inner.next().map(|u| self.unit(u)).transpose()?;
        Ok(Expr {
            kind: ExprKind::Quantity { value, unit },
            span,
        })
    }

    fn number(&self, pair: &Pair<Rule>) -> Lowered<f64> {
        let text = pair.as_str();
        match text.parse::<f64>() {
            Ok(x) if x.is_finite() => Ok(x),
            Ok(_) => Err(Diagnostic::error(
                self.span(pair),
                format!("number `{text}` is too large"),
            )),
            Err(_) => Err(
                Diagnostic::error(self.span(pair), format!("malformed number `{text}`"))
                    .with_hint("write numbers like `12`, `0.5`, `1.5e-3`"),
            ),
        }
    }

    /// Lower `unit`, `unit_inner`, `unit_factor`, `unit_group`, `unit_name`.
    fn unit(&self, pair: Pair<Rule>) -> Lowered<UnitExpr> {
        let span = self.span(&pair);
        match pair.as_rule() {
            Rule::unit | Rule::unit_inner => self.unit_chain(pair),
            Rule::unit_group => Ok(UnitExpr {
                span,
                ..self.unit(first(pair)?)?
            }),
            Rule::unit_name => Ok(UnitExpr::new(
                UnitKind::Name(pair.as_str().to_string()),
                span,
            )),
            Rule::unit_factor => {
                let mut inner = pair.into_inner();
                let base = self.unit(next(&mut inner)?)?;
                match inner.next() {
                    Some(pow) => {
                        let exp = first(pow)?;
                        let n: i32 = exp.as_str().parse().map_err(|_| {
                            Diagnostic::error(
                                self.span(&exp),
                                format!("exponent `{}` is too large", exp.as_str()),
                            )
                        })?;
                        Ok(UnitExpr::new(UnitKind::Pow(Box::new(base), n), span))
                    }
                    None => Ok(base),
                }
            }
            other => Err(Diagnostic::error(
                span,
                format!("internal: unexpected {other:?} in a unit"),
            )),
        }
    }

    fn unit_chain(&self, pair: Pair<Rule>) -> Lowered<UnitExpr> {
        let mut inner = pair.into_inner();
        let first = next(&mut inner)?;
        let mut acc = if first.as_rule() == Rule::unit_one {
            // `1/u` is `u^-1`; the grammar puts `/` between them.
            let start = self.span(&first).start;
            next(&mut inner)?;
            let base = self.unit(next(&mut inner)?)?;
            let span = Span {
                file: self.file,
                start,
                end: base.span.end,
            };
            UnitExpr::new(UnitKind::Pow(Box::new(base), -1), span)
        } else {
            self.unit(first)?
        };
        while let Some(op) = inner.next() {
            let rhs = self.unit(next(&mut inner)?)?;
            let span = Span {
                file: self.file,
                start: acc.span.start,
                end: rhs.span.end,
            };
            let kind = if op.as_str() == "*" {
                UnitKind::Mul(Box::new(acc), Box::new(rhs))
            } else {
                UnitKind::Div(Box::new(acc), Box::new(rhs))
            };
            acc = UnitExpr::new(kind, span);
        }
        Ok(acc)
    }
}

/// The operator table: loosest first.
fn pratt() -> &'static PrattParser<Rule> {
    static PRATT: std::sync::OnceLock<PrattParser<Rule>> = std::sync::OnceLock::new();
    PRATT.get_or_init(|| {
        PrattParser::new()
            .op(Op::infix(Rule::op_or, Assoc::Left))
            .op(Op::infix(Rule::op_and, Assoc::Left))
            .op(Op::prefix(Rule::op_not))
            .op(Op::infix(Rule::cmp_op, Assoc::Left))
            .op(Op::infix(Rule::add_op, Assoc::Left))
            .op(Op::infix(Rule::mul_op, Assoc::Left))
            .op(Op::prefix(Rule::op_neg))
            .op(Op::infix(Rule::op_pow, Assoc::Right))
            .op(Op::postfix(Rule::call_args) | Op::postfix(Rule::field))
    })
}

fn is_infix(rule: Rule) -> bool {
    matches!(
        rule,
        Rule::op_or | Rule::op_and | Rule::cmp_op | Rule::add_op | Rule::mul_op | Rule::op_pow
    )
}

fn next<'i>(it: &mut impl Iterator<Item = Pair<'i, Rule>>) -> Lowered<Pair<'i, Rule>> {
    it.next()
        .ok_or_else(|| Diagnostic::error(Span::default(), "internal: parse tree is missing a part"))
}

fn first(pair: Pair<Rule>) -> Lowered<Pair<Rule>> {
    next(&mut pair.into_inner())
}

fn binary_op(s: &str) -> BinaryOp {
    match s {
        "+" => BinaryOp::Add,
        "-" => BinaryOp::Sub,
        "*" => BinaryOp::Mul,
        "/" => BinaryOp::Div,
        "<" => BinaryOp::Lt,
        "<=" => BinaryOp::Le,
        ">" => BinaryOp::Gt,
        ">=" => BinaryOp::Ge,
        "==" => BinaryOp::Eq,
        "!=" => BinaryOp::Ne,
        "and" => BinaryOp::And,
        "^" => BinaryOp::Pow,
        _ => BinaryOp::Or,
    }
}

fn unescape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    let mut chars = s.chars();
    while let Some(c) = chars.next() {
        if c == '\\' {
            match chars.next() {
                Some('n') => out.push('\n'),
                Some('t') => out.push('\t'),
                Some(other) => out.push(other),
                None => {}
            }
        } else {
            out.push(c);
        }
    }
    out
}

/// The token at `pos`, for "found ..." in messages.
fn found_token(text: &str, pos: usize) -> String {
    let rest = text.get(pos..).unwrap_or("");
    let rest = rest.split('#').next().unwrap_or("");
    let word: String = rest
        .chars()
        .take_while(|c| c.is_alphanumeric() || *c == '_' || *c == '.')
        .collect();
    if !word.is_empty() {
        return word;
    }
    rest.chars()
        .next()
        .filter(|c| !c.is_whitespace())
        .map(String::from)
        .unwrap_or_default()
}

/// Human names of grammar rules, for "expected ..." messages.
fn rule_name(rule: Rule) -> &'static str {
    use Rule::*;
    match rule {
        EOI => "the end of the line",
        ident | name | params => "a name",
        expr | operation | quantity | number | group | list | record | boolean | if_expr
        | string => "a value",
        cmp_op | add_op | mul_op | op_pow | op_and | op_or => "an operator",
        call_args => "`(`",
        field => "`.`",
        unit | unit_factor | unit_name | unit_group | unit_inner => "a unit",
        unit_op => "`*` or `/`",
        unit_power | int_exp => "a whole-number exponent",
        kw_as => "`as`",
        kw_then => "`then`",
        kw_else => "`else`",
        arg | named_arg => "an argument",
        field_init => "a field `name: value`",
        string_inner => "text",
        _ => "something else",
    }
}

fn expected_message(positives: &[Rule], found: &str) -> String {
    let mut names: Vec<&str> = Vec::new();
    for r in positives {
        let n = rule_name(*r);
        if !names.contains(&n) {
            names.push(n);
        }
    }
    // After a complete value, "an operator" says enough; drop the postfix noise.
    if names.contains(&"an operator") {
        names.retain(|n| {
            !matches!(
                *n,
                "`(`" | "`.`" | "a whole-number exponent" | "`*` or `/`" | "`as`"
            )
        });
    }
    let expected = match names.len() {
        0 => String::new(),
        1 => names[0].to_string(),
        _ => format!(
            "{} or {}",
            names[..names.len() - 1].join(", "),
            names[names.len() - 1]
        ),
    };
    match (expected.is_empty(), found.is_empty()) {
        (true, true) => "unexpected end of the line".into(),
        (true, false) => format!("unexpected `{found}`"),
        (false, true) => format!("expected {expected}, found the end of the line"),
        (false, false) => format!("expected {expected}, found `{found}`"),
    }
}

/// Hints for characters from word processors and other notations.
fn typography_hint(c: char, before: &str) -> Option<&'static str> {
    match c {
        '°' => Some("write temperatures as `80 degC`, `176 degF` or `353 K`"),
        '²' | '³' | '⁻' | '¹' => Some("write powers with `^`, e.g. `m^2`, `s^-1`"),
        '×' | '·' | '⋅' => Some("multiply with `*`"),
        '÷' => Some("divide with `/`"),
        '−' | '–' => Some("write minus as `-`"),
        ',' if before.ends_with(|b: char| b.is_ascii_digit()) => {
            Some("the decimal separator is `.`; separate arguments inside brackets")
        }
        c if !c.is_ascii() && c.is_alphabetic() => {
            Some("names and units use ASCII letters, digits and `_`")
        }
        _ => None,
    }
}

/// A hint for common slips at `pos`.
fn parse_hint(text: &str, pos: usize) -> Option<String> {
    let rest = text.get(pos..)?.trim_start();
    let before = text.get(..pos)?.trim_end();
    if let Some(h) = rest.chars().next().and_then(|c| typography_hint(c, before)) {
        return Some(h.into());
    }
    if rest.starts_with('=') && !rest.starts_with("==") && !before.is_empty() {
        return Some("to compare, write `==`; to define a name, put it alone left of `=`".into());
    }
    if before.ends_with(['*', '/']) || rest.starts_with(['*', '/']) {
        return Some(
            "write compound units without spaces, e.g. `14 kg/m^2`, or in parentheses".into(),
        );
    }
    if let Some(first) = rest.chars().next() {
        if (first.is_alphanumeric() || first == '(')
            && before
                .chars()
                .last()
                .is_some_and(|c| c.is_alphanumeric() || c == ')')
        {
            return Some("two values side by side need an operator between them, e.g. `*`".into());
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    fn stmt(text: &str) -> Stmt {
        match parse_statement(text, 0, 0) {
            Ok(Some(s)) => s,
            other => panic!("`{text}` did not parse: {other:?}"),
        }
    }

    fn show(text: &str) -> ExprKind {
        match stmt(text).kind {
            StmtKind::Show(e) => e.kind.clone(),
            other => panic!("`{text}` is not a bare expression: {other:?}"),
        }
    }

    #[test]
    fn statement_forms() {
        assert!(matches!(
            stmt("input L = 12 mm").kind,
            StmtKind::Input { .. }
        ));
        assert!(matches!(
            stmt("check q > 1 kW/m^2").kind,
            StmtKind::Check(_)
        ));
        assert!(
            matches!(stmt("f(x, y) = x * y").kind, StmtKind::Function { ref params, .. } if params.len() == 2)
        );
        assert!(matches!(
            stmt("area = 2 m * 3 m").kind,
            StmtKind::Binding { .. }
        ));
        assert!(matches!(stmt("f(2)").kind, StmtKind::Show(_)));
        assert!(matches!(stmt("f(x) == 3").kind, StmtKind::Show(_)));
    }

    #[test]
    fn unit_after_number_without_spaces_is_compound() {
        let ExprKind::Quantity { unit: Some(u), .. } = show("14 kg/m^2") else {
            panic!("no unit")
        };
        assert!(matches!(u.kind, UnitKind::Div(..)));
        let ExprKind::Binary(BinaryOp::Mul, a, b) = show("2.4 m * 1.8 m") else {
            panic!("not a product")
        };
        assert!(matches!(a.kind, ExprKind::Quantity { unit: Some(_), .. }));
        assert!(matches!(b.kind, ExprKind::Quantity { unit: Some(_), .. }));
    }

    #[test]
    fn spaces_allowed_inside_unit_parentheses() {
        let ExprKind::Quantity { unit: Some(u), .. } = show("5 BTU/(h * ft^2 * degF)") else {
            panic!("no unit")
        };
        assert_eq!(u.span.end as usize, "5 BTU/(h * ft^2 * degF)".len());
    }

    #[test]
    fn as_binds_loosest_and_power_is_right_associative() {
        assert!(matches!(show("q * t as kWh"), ExprKind::As(..)));
        let ExprKind::Unary(UnaryOp::Neg, inner) = show("-2^2") else {
            panic!("not a negation")
        };
        assert!(matches!(inner.kind, ExprKind::Binary(BinaryOp::Pow, ..)));
    }

    #[test]
    fn spans_are_offset_by_the_chunk_start() {
        let s = parse_statement("x = 1", 10, 3)
            .ok()
            .flatten()
            .map(|s| s.span);
        assert_eq!(
            s,
            Some(Span {
                file: 3,
                start: 10,
                end: 15
            })
        );
    }

    #[test]
    fn errors_use_human_rule_names() {
        let e = parse_statement("x = ", 0, 0)
            .err()
            .map(|d| d.message)
            .unwrap_or_default();
        assert_eq!(e, "expected a value, found the end of the line");
        let e = parse_statement("x = 2 m 3", 0, 0)
            .err()
            .map(|d| d.message)
            .unwrap_or_default();
        assert!(e.contains("expected") && e.contains("found `3`"), "{e}");
    }
}
