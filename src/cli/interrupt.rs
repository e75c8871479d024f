//! Ctrl-C for the command line and the REPL.
//!
//! One process-wide handler (the `ctrlc` crate) sets the session's interrupt
//! flag, which the evaluator checks every few thousand steps and what-if
//! studies check between blocks of points. The evaluation then stops with an
//! `interrupted` diagnostic at the statement it was working on.
//!
//! - Batch commands (`run`, `record`, `check`) evaluate once: the first Ctrl-C
//!   keeps the flag raised until the process ends (so that a press just before
//!   the evaluation starts is not cleared by the session's per-evaluation
//!   reset), and a second Ctrl-C stops the process at once with
//!   [`EXIT_INTERRUPTED`], for a built-in that takes long between checks.
//! - The REPL only raises the flag: the cell stops, the session stays, and the
//!   next evaluation clears the flag. At the prompt rustyline reads Ctrl-C
//!   itself (the terminal is in raw mode), so no signal arrives there.

use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::Arc;
use std::time::Duration;

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
    if n == 1 {
        keep_raised(flag.clone());
    } else {
        eprintln!("error: interrupted again; stopping at once");
        std::process::exit(EXIT_INTERRUPTED);
    }
}

/// Re-raise the flag now and then until the process ends: a batch command
/// evaluates once, and the session clears the flag when an evaluation starts.
fn keep_raised(flag: Arc<AtomicBool>) {
    // Without the thread the flag is still raised once; a press just before
    // the evaluation starts may then be missed, and the command reports the
    // interruption when the evaluation ends.
    let _ = std::thread::Builder::new()
        .name("ctrl-c".into())
        .spawn(move || loop {
            flag.store(true, Ordering::SeqCst);
            std::thread::sleep(Duration::from_millis(20));
        });
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
    fn batch_press_keeps_the_flag_raised_after_a_reset() {
        let flag = Arc::new(AtomicBool::new(false));
        let presses = Presses::default();
        on_press(&flag, &presses, Policy::Batch);
        flag.store(false, Ordering::SeqCst);
        // Poll with a generous bound (no speed is asserted): the keeper
        // thread raises the flag again.
        let raised = (0..3000).any(|_| {
            std::thread::sleep(Duration::from_millis(10));
            flag.load(Ordering::SeqCst)
        });
        assert!(raised, "the flag stayed down after a reset");
        assert!(presses.any());
    }
}
