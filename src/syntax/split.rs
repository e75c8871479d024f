//! Splitting a worksheet into statements before parsing.
//!
//! A statement ends at a newline outside brackets. Scanning brackets, strings and
//! comments once, here, lets each statement be parsed on its own (so every bad
//! line is reported, not just the first), gives precise errors for unclosed
//! brackets and strings, and answers "is this input complete?" for the REPL.

use crate::diag::{Diagnostic, Span};

/// Deepest bracket nesting accepted; deeper input is refused before parsing.
pub const MAX_NESTING: usize = 64;

/// One statement's byte range in the source.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Chunk {
    /// First byte.
    pub start: usize,
    /// One past the last byte.
    pub end: usize,
}

/// The result of scanning a source text.
#[derive(Debug, Default)]
pub struct Scan {
    /// Statements found, in order (bad ones left out).
    pub chunks: Vec<Chunk>,
    /// Bracket and string errors.
    pub errors: Vec<Diagnostic>,
    /// Brackets still open at the end of the text (for the REPL).
    pub open_at_end: usize,
}

struct Scanner<'a> {
    bytes: &'a [u8],
    file: u32,
    scan: Scan,
    stack: Vec<(u8, usize)>,
    chunk_start: usize,
    chunk_bad: bool,
}

/// Scan `text` (file id `file`) into statement chunks and bracket/string errors.
pub fn scan(text: &str, file: u32) -> Scan {
    let mut total = Scan::default();
    let mut start = 0;
    let mut first = true;
    loop {
        let (pass, unclosed) = scan_from(text, file, start);
        if first {
            total.open_at_end = pass.open_at_end;
            first = false;
        }
        // An unclosed bracket swallows the rest of the text. Report it, then
        // recover by scanning again from the line after it, so that errors
        // further down are still found (and found once).
        let restart = unclosed.and_then(|at| text[at..].find('\n').map(|n| at + n + 1));
        let keep = |d: &Diagnostic| restart.is_none_or(|r| (d.span.start as usize) < r);
        total.errors.extend(pass.errors.into_iter().filter(keep));
        total.chunks.extend(pass.chunks);
        match restart {
            Some(r) if r < text.len() => start = r,
            _ => return total,
        }
    }
}

/// One scanning pass from byte `start`; also returns where an unclosed
/// bracket opened, if one did.
fn scan_from(text: &str, file: u32, start: usize) -> (Scan, Option<usize>) {
    let mut s = Scanner {
        bytes: text.as_bytes(),
        file,
        scan: Scan::default(),
        stack: Vec::new(),
        chunk_start: start,
        chunk_bad: false,
    };
    let mut i = start;
    while i < s.bytes.len() {
        i = s.step(i);
    }
    let unclosed = s.stack.first().map(|&(_, at)| at);
    s.end_of_text();
    (s.scan, unclosed)
}

impl Scanner<'_> {
    fn span(&self, start: usize, end: usize) -> Span {
        Span {
            file: self.file,
            start: start as u32,
            end: end as u32,
        }
    }

    fn error(&mut self, start: usize, end: usize, message: String, hint: &str) {
        let d = Diagnostic::error(self.span(start, end), message).with_hint(hint);
        self.scan.errors.push(d);
        self.chunk_bad = true;
    }

    /// Handle the byte at `i`; return the next index.
    fn step(&mut self, i: usize) -> usize {
        match self.bytes[i] {
            b'#' => self.skip_comment(i),
            b'"' => self.skip_string(i),
            b'(' | b'[' | b'{' => {
                self.open(i);
                i + 1
            }
            c @ (b')' | b']' | b'}') => {
                self.close(c, i);
                i + 1
            }
            b'\n' if self.stack.is_empty() => {
                self.finish_chunk(i);
                self.chunk_start = i + 1;
                i + 1
            }
            _ => i + 1,
        }
    }

    fn skip_comment(&self, i: usize) -> usize {
        let rest = &self.bytes[i..];
        i + rest.iter().position(|&b| b == b'\n').unwrap_or(rest.len())
    }

    fn skip_string(&mut self, i: usize) -> usize {
        let mut j = i + 1;
        while j < self.bytes.len() {
            match self.bytes[j] {
                b'\\' => j += 2,
                b'"' => return j + 1,
                b'\n' => break,
                _ => j += 1,
            }
        }
        let end = j.min(self.bytes.len());
        self.error(
            i,
            end,
            "unterminated string".into(),
            "close the text with `\"` on the same line",
        );
        end
    }

    fn open(&mut self, i: usize) {
        self.stack.push((self.bytes[i], i));
        if self.stack.len() == MAX_NESTING + 1 {
            self.error(
                i,
                i + 1,
                format!("brackets nested deeper than {MAX_NESTING} levels"),
                "split the expression into named values",
            );
        }
    }

    fn close(&mut self, c: u8, i: usize) {
        let want = match c {
            b')' => b'(',
            b']' => b'[',
            _ => b'{',
        };
        match self.stack.last() {
            Some(&(open, _)) if open == want => {
                self.stack.pop();
            }
            Some(&(open, at)) => {
                let msg = format!("`{}` does not match the open `{}`", c as char, open as char);
                let hint = format!("close `{}` first", open as char);
                self.error(i, i + 1, msg, &hint);
                let _ = at;
                self.stack.pop();
            }
            None => self.error(
                i,
                i + 1,
                format!("unexpected `{}` with no open bracket", c as char),
                "remove it",
            ),
        }
    }

    fn end_of_text(&mut self) {
        self.scan.open_at_end = self.stack.len();
        if let Some(&(open, at)) = self.stack.first() {
            let close = match open {
                b'(' => ')',
                b'[' => ']',
                _ => '}',
            };
            self.error(
                at,
                at + 1,
                format!("unclosed `{}`", open as char),
                &format!("add `{close}` to close it"),
            );
        }
        self.stack.clear();
        self.finish_chunk(self.bytes.len());
    }

    fn finish_chunk(&mut self, end: usize) {
        let text = &self.bytes[self.chunk_start..end];
        let blank = text.iter().all(|b| b.is_ascii_whitespace());
        if !blank && !self.chunk_bad {
            self.scan.chunks.push(Chunk {
                start: self.chunk_start,
                end,
            });
        }
        self.chunk_bad = false;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn splits_at_newlines_outside_brackets() {
        let s = scan("a = 1\nb = f(1,\n 2)\n\n# c\n", 0);
        assert_eq!(s.chunks.len(), 3);
        assert!(s.errors.is_empty());
    }

    #[test]
    fn reports_unclosed_bracket_and_string() {
        assert_eq!(scan("a = (1 + 2", 0).errors[0].message, "unclosed `(`");
        assert_eq!(
            scan("a = \"abc\nb = 2", 0).errors[0].message,
            "unterminated string"
        );
        assert_eq!(scan("a = (1 + 2", 0).open_at_end, 1);
    }
}
