//! The source map: the texts the session still needs, by file id.
//!
//! File ids are handed out in increasing order and never reused, so a span
//! stays valid for as long as its file is kept. A long-lived session drops the
//! texts no live definition points into ([`Sources::retain`]).

use std::collections::BTreeMap;
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

/// Source texts by id; a [`crate::diag::Span`]'s `file` is such an id.
#[derive(Clone, Debug, Default)]
pub struct Sources {
    files: BTreeMap<u32, SourceFile>,
    next: u32,
}

impl Sources {
    /// Add a text and return its file id.
    pub fn add(&mut self, name: impl Into<String>, text: impl Into<String>, dir: &Path) -> u32 {
        let id = self.next;
        // Four billion texts in one session is out of reach; saturate rather than wrap.
        self.next = self.next.saturating_add(1);
        self.files.insert(
            id,
            SourceFile {
                name: name.into(),
                text: text.into(),
                dir: dir.to_path_buf(),
            },
        );
        id
    }

    /// The file with id `file`, if it is still kept.
    pub fn get(&self, file: u32) -> Option<&SourceFile> {
        self.files.get(&file)
    }

    /// The source text under a span (empty when out of range or forgotten).
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

    /// The kept files, in id order.
    pub fn files(&self) -> impl Iterator<Item = &SourceFile> {
        self.files.values()
    }

    /// The kept files with their ids, in id order.
    pub fn iter(&self) -> impl Iterator<Item = (u32, &SourceFile)> {
        self.files.iter().map(|(id, f)| (*id, f))
    }

    /// How many files are kept.
    pub fn len(&self) -> usize {
        self.files.len()
    }

    /// Is no file kept?
    pub fn is_empty(&self) -> bool {
        self.files.is_empty()
    }

    /// Keep only the files whose id passes `keep`; ids of the others are not reused.
    pub fn retain(&mut self, mut keep: impl FnMut(u32) -> bool) {
        self.files.retain(|id, _| keep(*id));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::diag::Span;

    #[test]
    fn a_forgotten_file_leaves_other_ids_valid() {
        let mut s = Sources::default();
        let a = s.add("a", "x = 1", Path::new("."));
        let b = s.add("b", "y = 2", Path::new("."));
        s.retain(|id| id == b);
        assert!(s.get(a).is_none());
        let span = Span {
            file: b,
            start: 0,
            end: 1,
        };
        assert_eq!(s.slice(span), "y");
        assert_eq!(s.add("c", "z", Path::new(".")), b + 1);
        assert_eq!(s.len(), 2);
    }
}
