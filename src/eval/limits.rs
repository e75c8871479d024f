//! Limits that keep a worksheet from running away: call depth, an operation
//! budget and an interrupt flag the REPL and the kernel can set.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

/// Resource limits for one evaluation.
#[derive(Clone, Debug)]
pub struct Limits {
    /// Deepest chain of user-function calls and worksheet loads.
    pub max_call_depth: usize,
    /// Most expression steps in one `eval`.
    pub max_operations: u64,
    /// Most items in one list value (nested lists counted item by item); every
    /// item built also counts as one step.
    pub max_list_items: usize,
    /// Set from another thread to stop the evaluation.
    pub interrupt: Arc<AtomicBool>,
    /// Run what-if studies through a compiled plan where one can be made
    /// (`eval/whatif/plan.rs`); on by default. Off only to test the plan
    /// against the general evaluator, which gives the same results.
    #[doc(hidden)]
    pub study_plans: bool,
}

impl Default for Limits {
    fn default() -> Limits {
        Limits {
            max_call_depth: 64,
            max_operations: 50_000_000,
            max_list_items: 1_000_000,
            interrupt: Arc::new(AtomicBool::new(false)),
            study_plans: true,
        }
    }
}

impl Limits {
    /// True when someone asked the evaluation to stop.
    pub fn interrupted(&self) -> bool {
        self.interrupt.load(Ordering::Relaxed)
    }

    /// Lower the interrupt flag (the front end does it when a new request begins).
    pub fn reset(&self) {
        self.interrupt.store(false, Ordering::Relaxed);
    }
}
