//! Ctrl-C for the command line and the REPL.
//!
//! One process-wide handler (the `ctrlc` crate) sets the session's interrupt
//! flag, which the evaluator checks every few thousand steps and what-if
//! studies check between blocks of points. The evaluation then stops with an
//! `interrupted` diagnostic at the statement it was working on.
//!
//! - Batch commands (`run`, `record`, `check`) evaluate once: the first Ctrl-C
//!   raises the flag, which stays raised (the session never lowers it by
//!   itself, so a press just before the evaluation starts is not lost), and a
//!   second Ctrl-C stops the process at once with [`EXIT_INTERRUPTED`], for a
//!   built-in that takes long between checks.
//! - The REPL only raises the flag: the cell stops, the session stays, and the
//!   REPL lowers the flag before the next entry. At the prompt rustyline reads Ctrl-C
//!   itself (the terminal is in raw mode), so no signal arrives there.

use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::Arc;

/// Exit code after Ctrl-C (128 + SIGINT, the shell convention).
pub const EXIT_INTERRUPTED: i32 = 130;

/// How the process answers Ctrl-C.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Policy {
    /// One evaluation, then exit: a second Ctrl-C exits at once.
    Batch,
    /// A REPL: Ctrl-C stops the running cell only.
    Interactive,
}

/// Counts the Ctrl-C presses seen since [`install`].
#[derive(Clone, Debug, Default)]
pub struct Presses {
    count: Arc<AtomicUsize>,
}

impl Presses {
    /// Was Ctrl-C pressed since the handler was installed?
    pub fn any(&self) -> bool {
        self.count.load(Ordering::SeqCst) > 0
    }

    /// Record one press; returns how many there were, this one included.
    fn press(&self) -> usize {
        self.count.fetch_add(1, Ordering::SeqCst) + 1
    }
}

/// Install the Ctrl-C handler raising `flag`. Without a handler (another was
/// installed first, or the platform refuses) Ctrl-C keeps its default action
/// and the returned counter stays at zero.
pub fn install(flag: Arc<AtomicBool>, policy: Policy) -> Presses {
    let presses = Presses::default();
    let seen = presses.clone();
    let result = ctrlc::set_handler(move || on_press(&flag, &seen, policy));
    if let Err(e) = result {
        eprintln!("warning: Ctrl-C cannot stop an evaluation here: {e}");
    }
    presses
}

/// What one Ctrl-C does (runs on the handler's own thread).
fn on_press(flag: &Arc<AtomicBool>, presses: &Presses, policy: Policy) {
    let n = presses.press();
    flag.store(true, Ordering::SeqCst);
    if policy == Policy::Interactive {
        return;
    }
    if n > 1 {
        eprintln!("error: interrupted again; stopping at once");
        std::process::exit(EXIT_INTERRUPTED);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn interactive_press_raises_the_flag_and_counts() {
        let flag = Arc::new(AtomicBool::new(false));
        let presses = Presses::default();
        assert!(!presses.any());
        on_press(&flag, &presses, Policy::Interactive);
        assert!(flag.load(Ordering::SeqCst));
        assert!(presses.any());
        on_press(&flag, &presses, Policy::Interactive);
        assert_eq!(presses.count.load(Ordering::SeqCst), 2);
    }

    #[test]
    fn batch_first_press_raises_the_flag_and_counts() {
        let flag = Arc::new(AtomicBool::new(false));
        let presses = Presses::default();
        on_press(&flag, &presses, Policy::Batch);
        assert!(flag.load(Ordering::SeqCst));
        assert!(presses.any());
    }
}
