//! A progress bar (indicatif) for long what-if studies in `siccant run`.
//!
//! The bar appears only when a study has run for more than a second, on
//! stderr, and only when stderr is a terminal (indicatif hides it otherwise).

use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use indicatif::{ProgressBar, ProgressStyle};

use crate::eval::whatif::{set_reporter, Progress};

/// How long a study runs before the bar appears.
const QUIET: Duration = Duration::from_secs(1);

/// The bar of the study in progress.
#[derive(Default)]
struct State {
    started: Option<Instant>,
    bar: Option<ProgressBar>,
}

/// Removes the reporter when dropped.
pub struct Installed;

impl Drop for Installed {
    fn drop(&mut self) {
        set_reporter(None);
    }
}

/// Install the progress-bar reporter for the life of the returned guard.
pub fn install() -> Installed {
    let state = Arc::new(Mutex::new(State::default()));
    set_reporter(Some(Arc::new(move |p: &Progress| {
        let mut s = state.lock().unwrap_or_else(|e| e.into_inner());
        update(&mut s, p);
    })));
    Installed
}

fn update(s: &mut State, p: &Progress) {
    let started = *s.started.get_or_insert_with(Instant::now);
    if p.finished {
        if let Some(bar) = s.bar.take() {
            bar.finish_and_clear();
        }
        s.started = None;
        return;
    }
    if s.bar.is_none() && started.elapsed() >= QUIET {
        let bar = ProgressBar::new(p.total as u64);
        if let Ok(style) =
            ProgressStyle::with_template("{msg} [{bar:40}] {pos}/{len} points, {eta} left")
        {
            bar.set_style(style.progress_chars("=> "));
        }
        bar.set_message(p.label);
        s.bar = Some(bar);
    }
    if let Some(bar) = &s.bar {
        bar.set_position(p.done as u64);
    }
}
