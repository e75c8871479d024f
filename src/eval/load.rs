//! Loading one worksheet from another: `load("tray.sicc", T_in: 90 degC)`
//! returns a record of the loaded sheet's named values, with the given inputs
//! overridden. Paths are relative to the loading file; load cycles are errors.

use std::path::{Path, PathBuf};

use super::ctx::{Ctx, Flow, Mode, Stop};
use super::{run_statements, OutputItem, Sheet};
use crate::diag::{Diagnostic, Span};
use crate::library::type_word;
use crate::syntax::CallArg;
use crate::value::{Record, Value};

impl Ctx<'_> {
    /// Evaluate a `load(...)` call.
    pub fn load(&mut self, args: &[CallArg], span: Span) -> Flow<Value> {
        let (path_arg, overrides) = self.load_arguments(args, span)?;
        let shown = path_arg.0.clone();
        let path = self.locate(&path_arg.0, path_arg.1)?;
        if let Some(at) = self.load_stack.iter().position(|p| *p == path) {
            let chain: Vec<String> = self.load_stack[at..]
                .iter()
                .chain([&path])
                .map(|p| file_name(p))
                .collect();
            let msg = format!("load cycle: {}", chain.join(" -> "));
            return Err(Diagnostic::error(span, msg)
                .with_hint("a worksheet cannot load itself, directly or through others")
                .into());
        }
        if self.depth >= self.limits.max_call_depth {
            return Err(Diagnostic::error(span, "worksheet loads nested too deeply").into());
        }
        let text = crate::library::data::read_text_file(&path)
            .map_err(|e| Diagnostic::error(path_arg.1, format!("cannot read `{shown}`: {e}")))?;
        let dir = path.parent().map_or_else(PathBuf::new, Path::to_path_buf);
        let file = self.sources.add(shown.clone(), text.clone(), &dir);
        let (stmts, errors) = crate::syntax::parse(&text, file);
        if !errors.is_empty() {
            return self.loaded_errors(errors, &shown, span);
        }
        let mut sheet = Sheet::new(dir);
        if let Err(errors) = sheet.define(&stmts, true) {
            return self.loaded_errors(errors, &shown, span);
        }
        sheet.overrides = self.check_overrides(&sheet, overrides, &shown)?;
        self.run_loaded(sheet, &stmts, path, &shown, span)
    }

    /// The path (with its span) and the named input overrides.
    #[allow(clippy::type_complexity)]
    fn load_arguments(
        &mut self,
        args: &[CallArg],
        span: Span,
    ) -> Flow<((String, Span), Vec<(String, Span, Value)>)> {
        let mut path = None;
        let mut overrides = Vec::new();
        for a in args {
            let value = self.expr(&a.value)?;
            match (&a.name, value) {
                (None, Value::Str(s)) if path.is_none() => path = Some((s, a.span)),
                (None, other) if path.is_none() => {
                    let msg = format!(
                        "`load` needs the worksheet's path as text, found {}",
                        type_word(&other)
                    );
                    return Err(Diagnostic::error(a.span, msg)
                        .with_hint("e.g. load(\"tray.sicc\", T_in: 90 degC)")
                        .into());
                }
                (None, _) => {
                    return Err(Diagnostic::error(
                        a.span,
                        "inputs of a loaded worksheet are given by name",
                    )
                    .with_hint("e.g. load(\"tray.sicc\", T_in: 90 degC)")
                    .into())
                }
                (Some(n), v) => overrides.push((n.name.clone(), n.span, v)),
            }
        }
        let path = path.ok_or_else(|| {
            Diagnostic::error(span, "`load` needs the path of a worksheet")
                .with_hint("e.g. load(\"tray.sicc\", T_in: 90 degC)")
        })?;
        Ok((path, overrides))
    }

    fn locate(&self, path: &str, span: Span) -> Flow<PathBuf> {
        let full = self.sheet.dir.join(path);
        full.canonicalize().map_err(|_| {
            let msg = format!(
                "cannot find worksheet `{path}` (looked for {})",
                full.display()
            );
            Diagnostic::error(span, msg)
                .with_hint("paths are relative to the worksheet that loads them")
                .into()
        })
    }

    fn loaded_errors(&mut self, errors: Vec<Diagnostic>, shown: &str, span: Span) -> Flow<Value> {
        self.errors.extend(errors);
        Err(Diagnostic::error(span, format!("the loaded worksheet `{shown}` has errors")).into())
    }

    fn check_overrides(
        &self,
        sheet: &Sheet,
        overrides: Vec<(String, Span, Value)>,
        shown: &str,
    ) -> Flow<super::FastMap<String, Value>> {
        let inputs = sheet.inputs();
        let mut out = super::FastMap::default();
        for (name, span, value) in overrides {
            if !inputs.contains(&name.as_str()) {
                let mut d =
                    Diagnostic::error(span, format!("`{name}` is not an input of `{shown}`"));
                if let Some(best) = super::suggest(&name, &inputs) {
                    d = d.with_hint(format!("did you mean `{best}`?"));
                }
                let list = if inputs.is_empty() {
                    "none".to_string()
                } else {
                    inputs.join(", ")
                };
                return Err(d.with_hint(format!("its inputs: {list}")).into());
            }
            out.insert(name, value);
        }
        Ok(out)
    }

    fn run_loaded(
        &mut self,
        mut sheet: Sheet,
        stmts: &[crate::syntax::Stmt],
        path: PathBuf,
        shown: &str,
        span: Span,
    ) -> Flow<Value> {
        let mut child = Ctx::new(&mut sheet, self.sources, self.limits, self.mode);
        child.ops = self.ops;
        child.depth = self.depth + 1;
        child.load_stack = self.load_stack.iter().cloned().chain([path]).collect();
        let items = run_statements(&mut child, stmts);
        self.ops = child.ops;
        self.warnings.append(&mut child.warnings);
        let child_errors = std::mem::take(&mut child.errors);
        drop(child);
        if !child_errors.is_empty() {
            return self.loaded_errors(child_errors, shown, span);
        }
        if self.mode == Mode::CheckOnly {
            return Err(Stop::Skip);
        }
        for item in &items {
            if let OutputItem::Check {
                text,
                passed: false,
            } = item
            {
                self.warnings.push(Diagnostic::warning(
                    span,
                    format!("check failed in `{shown}`: {text}"),
                ));
            }
        }
        let mut record = Record::new("worksheet");
        for name in &sheet.order {
            if let Some(v) = sheet.cache.get(name.as_str()) {
                record.push(name.clone(), v.clone());
            }
        }
        Ok(Value::Record(record))
    }
}

fn file_name(p: &Path) -> String {
    p.file_name().map_or_else(
        || p.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}
