//! The source map: every text the session has seen, by file id.

use std::path::{Path, PathBuf};

/// One source text: a worksheet file, a REPL entry or a notebook cell.
#[derive(Clone, Debug)]
pub struct SourceFile {
    /// Name shown in diagnostics (a path or `<repl 3>`).
    pub name: String,
    /// The full text.
    pub text: String,
    /// Directory that `load("...")` paths in this text are relative to.
    pub dir: PathBuf,
}

/// All source texts; a [`crate::diag::Span`]'s `file` indexes this list.
#[derive(Clone, Debug, Default)]
pub struct Sources {
    files: Vec<SourceFile>,
}

impl Sources {
    /// Add a text and return its file id.
    pub fn add(&mut self, name: impl Into<String>, text: impl Into<String>, dir: &Path) -> u32 {
        self.files.push(SourceFile {
            name: name.into(),
            text: text.into(),
            dir: dir.to_path_buf(),
        });
        (self.files.len() - 1) as u32
    }

    /// The file with id `file`.
    pub fn get(&self, file: u32) -> Option<&SourceFile> {
        self.files.get(file as usize)
    }

    /// The source text under a span (empty when out of range).
    pub fn slice(&self, span: crate::diag::Span) -> &str {
        self.get(span.file)
            .and_then(|f| f.text.get(span.start as usize..span.end as usize))
            .unwrap_or("")
    }

    /// 1-based line and column of a span's start.
    pub fn line_col(&self, span: crate::diag::Span) -> (usize, usize) {
        let text = self.get(span.file).map_or("", |f| f.text.as_str());
        let upto = text.get(..span.start as usize).unwrap_or(text);
        let line = upto.matches('\n').count() + 1;
        let col = upto.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
        (line, col)
    }

    /// All files, in id order.
    pub fn files(&self) -> &[SourceFile] {
        &self.files
    }
}
