//! What-if studies over a worksheet's dependency graph: sweeps, goal seeking,
//! optimisation and uncertainty.
//!
//! The forms look like calls and name the inputs they vary as named
//! arguments, e.g. `sweep([t_dry], T_air: steps(60 degC, 90 degC, 5 K))`.
//! They are run here rather than in the library because they re-evaluate the
//! worksheet: [`model::Model`] recomputes only the values that depend on the
//! varied inputs, in parallel. See docs/whatif.md.

mod model;
mod optimise;
mod plan;
pub mod progress;
mod seek;
mod spec;
mod sweep;
mod uncertainty;

#[doc(hidden)]
pub use plan::plans_compiled;
pub use progress::{set_reporter, Progress, Reporter};

use super::{Ctx, Flow};
use crate::diag::Span;
use crate::syntax::{CallArg, Ident};
use crate::value::Value;

/// The names of the what-if forms.
pub const FORMS: &[&str] = &[
    "sweep",
    "seek",
    "minimise",
    "maximise",
    "uncertainty",
    "propagate",
    "tornado",
];

/// Is `name` a what-if form (run by the evaluator)?
pub fn is_form(name: &str) -> bool {
    FORMS.contains(&name)
}

impl Ctx<'_> {
    /// Run the what-if form `callee` (one of [`FORMS`]).
    pub fn whatif(&mut self, callee: &Ident, args: &[CallArg], span: Span) -> Flow<Value> {
        match callee.name.as_str() {
            "sweep" => self.sweep(args, span),
            "seek" => self.seek(args, span),
            "minimise" => self.optimise(args, span, false),
            "maximise" => self.optimise(args, span, true),
            "uncertainty" => self.uncertainty(args, span),
            "propagate" => self.propagate(args, span),
            _ => self.tornado(args, span),
        }
    }
}
