//! Progress of long what-if studies, for front ends.
//!
//! A front end installs a [`Reporter`] (the CLI draws an indicatif bar, the
//! kernel can send status messages); studies call it after each block of
//! points. Cancellation goes the other way, through the session's interrupt
//! flag, which studies check between blocks and the evaluator checks inside.

use std::sync::{Arc, RwLock};

/// How far a study has come.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Progress {
    /// What is running: `sweep`, `uncertainty`, ...
    pub label: &'static str,
    /// Points evaluated so far.
    pub done: usize,
    /// Points in the study.
    pub total: usize,
    /// True on the last report of a study (finished or stopped).
    pub finished: bool,
}

/// Receives progress reports; called from the evaluating thread.
pub type Reporter = Arc<dyn Fn(&Progress) + Send + Sync>;

static REPORTER: RwLock<Option<Reporter>> = RwLock::new(None);

/// Install (or with `None` remove) the process-wide progress reporter.
pub fn set_reporter(reporter: Option<Reporter>) {
    let mut slot = REPORTER.write().unwrap_or_else(|e| e.into_inner());
    *slot = reporter;
}

/// Send a report to the installed reporter, if any.
pub(super) fn report(progress: &Progress) {
    let reporter = REPORTER.read().unwrap_or_else(|e| e.into_inner()).clone();
    if let Some(r) = reporter {
        r(progress);
    }
}
