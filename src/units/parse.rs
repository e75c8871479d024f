//! Parsing unit expressions written as text: `W/(m^2*K)`, `BTU/(h*ft^2*degF)`,
//! `1/h`, `s^-1`, `kg/kg_da`.
//!
//! The worksheet grammar parses units in worksheets itself and builds them with
//! [`Unit::mul`], [`Unit::div`] and [`Unit::powi`]; this parser serves text that
//! arrives outside a worksheet (`--set`, built-in docs, tests, fixtures) and
//! follows the same rules: `*` and `/` associate left to right, `^` binds
//! tighter and takes an integer exponent, parentheses group.

use crate::eval::FastMap;
use std::cell::RefCell;

use super::{lookup_unit, memo, suggest_unit, Unit, UnitError};

/// Parse a unit expression into a [`Unit`].
///
/// Errors name the unknown symbol (with a "did you mean" hint) or the
/// position of the syntax error.
pub fn parse_unit(text: &str) -> Result<Unit, UnitError> {
    thread_local! {
        static PARSED: memo::Texts = RefCell::new(FastMap::default());
    }
    memo::remembered(&PARSED, text, parse_uncached)
}

fn parse_uncached(text: &str) -> Result<Unit, UnitError> {
    let mut p = Parser {
        chars: text.chars().collect(),
        pos: 0,
    };
    let unit = p.product()?;
    p.skip_space();
    if p.pos < p.chars.len() {
        return Err(p.error("expected `*`, `/` or the end of the unit"));
    }
    Ok(unit)
}

struct Parser {
    chars: Vec<char>,
    pos: usize,
}

impl Parser {
    fn peek(&mut self) -> Option<char> {
        self.skip_space();
        self.chars.get(self.pos).copied()
    }

    fn skip_space(&mut self) {
        while self.chars.get(self.pos).is_some_and(|c| c.is_whitespace()) {
            self.pos += 1;
        }
    }

    fn error(&self, what: &str) -> UnitError {
        UnitError::new(format!(
            "in unit `{}` at character {}: {what}",
            self.chars.iter().collect::<String>(),
            self.pos + 1
        ))
    }

    /// product = power (('*' | '/') power)*
    fn product(&mut self) -> Result<Unit, UnitError> {
        let mut acc = self.power()?;
        while let Some(op) = self.peek().filter(|c| *c == '*' || *c == '/') {
            self.pos += 1;
            let rhs = self.power()?;
            acc = if op == '*' {
                acc.mul(&rhs)
            } else {
                acc.div(&rhs)
            };
        }
        Ok(acc)
    }

    /// power = atom ('^' integer)?
    fn power(&mut self) -> Result<Unit, UnitError> {
        let base = self.atom()?;
        if self.peek() != Some('^') {
            return Ok(base);
        }
        self.pos += 1;
        let n = self.exponent()?;
        Ok(base.powi(n))
    }

    /// An integer exponent, optionally signed and optionally in parentheses.
    fn exponent(&mut self) -> Result<i32, UnitError> {
        let paren = self.peek() == Some('(');
        if paren {
            self.pos += 1;
        }
        let start = self.pos;
        if matches!(self.peek(), Some('-' | '+')) {
            self.pos += 1;
        }
        while self.chars.get(self.pos).is_some_and(|c| c.is_ascii_digit()) {
            self.pos += 1;
        }
        let text: String = self.chars[start..self.pos].iter().collect();
        let n = text
            .parse::<i32>()
            .ok()
            .filter(|n| n.abs() <= 12)
            .ok_or_else(|| self.error("expected an integer exponent between -12 and 12"))?;
        if paren {
            self.expect(')')?;
        }
        Ok(n)
    }

    /// atom = symbol | '1' | '(' product ')'
    fn atom(&mut self) -> Result<Unit, UnitError> {
        match self.peek() {
            Some('(') => {
                self.pos += 1;
                let inner = self.product()?;
                self.expect(')')?;
                Ok(inner)
            }
            Some('1') => {
                self.pos += 1;
                Ok(Unit::one())
            }
            Some(c) if starts_symbol(c) => self.symbol(),
            _ => Err(self.error("expected a unit symbol or `(`")),
        }
    }

    fn symbol(&mut self) -> Result<Unit, UnitError> {
        let start = self.pos;
        self.pos += 1;
        while self
            .chars
            .get(self.pos)
            .is_some_and(|c| continues_symbol(*c))
        {
            self.pos += 1;
        }
        let sym: String = self.chars[start..self.pos].iter().collect();
        lookup_unit(&sym).ok_or_else(|| unknown_unit(&sym))
    }

    fn expect(&mut self, c: char) -> Result<(), UnitError> {
        if self.peek() == Some(c) {
            self.pos += 1;
            Ok(())
        } else {
            Err(self.error(&format!("expected `{c}`")))
        }
    }
}

/// "unknown unit `kpa`; hint: did you mean `kPa`?"
pub fn unknown_unit(sym: &str) -> UnitError {
    let err = UnitError::new(format!("unknown unit `{sym}`"));
    match suggest_unit(sym) {
        Some(s) => err.with_hint(format!("did you mean `{s}`?")),
        None => err.with_hint("see docs/units.md for the list of units"),
    }
}

fn starts_symbol(c: char) -> bool {
    c.is_alphabetic() || matches!(c, '%' | '°' | '℃' | 'µ' | '_')
}

fn continues_symbol(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}
