//! The evaluation thread: it owns the session, so shell requests run there
//! while the async side keeps serving control, heartbeat and iopub.
//!
//! A job is a closure over [`Worksheet`]; a panic inside one is caught and
//! reported as a failed job, so a bug in the language never kills the kernel.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::atomic::AtomicBool;
use std::sync::{mpsc, Arc};

use tokio::sync::oneshot;

use crate::api::Session;
use crate::history::History;

/// State kept between cells.
pub struct Worksheet {
    pub session: Session,
    /// The count of the last cell that stored history (0 before the first).
    pub execution_count: usize,
    pub history: History,
}

type Job = Box<dyn FnOnce(&mut Worksheet) + Send>;

/// Handle to the evaluation thread.
#[derive(Clone)]
pub struct Worker {
    jobs: mpsc::Sender<Job>,
    interrupt: Arc<AtomicBool>,
}

/// The job did not finish: it panicked or the thread is gone.
#[derive(Debug)]
pub struct JobFailed;

impl Worker {
    /// Start the thread with a fresh session.
    pub fn start() -> std::io::Result<Worker> {
        let (jobs, queue) = mpsc::channel::<Job>();
        let (handle_tx, handle_rx) = mpsc::channel();
        std::thread::Builder::new()
            .name("siccant-eval".into())
            .spawn(move || {
                let session = Session::new();
                let _ = handle_tx.send(session.interrupt_handle());
                let mut sheet = Worksheet {
                    session,
                    execution_count: 0,
                    history: History::default(),
                };
                for job in queue {
                    if catch_unwind(AssertUnwindSafe(|| job(&mut sheet))).is_err() {
                        crate::log::problem("an evaluation job panicked; the kernel carries on");
                    }
                }
            })?;
        let interrupt = handle_rx
            .recv()
            .map_err(|_| std::io::Error::other("evaluation thread died at start"))?;
        Ok(Worker { jobs, interrupt })
    }

    /// The session's interrupt flag.
    pub fn interrupt_flag(&self) -> Arc<AtomicBool> {
        self.interrupt.clone()
    }

    /// Run `f` on the evaluation thread and wait for its result.
    pub async fn call<R, F>(&self, f: F) -> Result<R, JobFailed>
    where
        R: Send + 'static,
        F: FnOnce(&mut Worksheet) -> R + Send + 'static,
    {
        let (tx, rx) = oneshot::channel();
        let job: Job = Box::new(move |sheet| {
            let _ = tx.send(f(sheet));
        });
        self.jobs.send(job).map_err(|_| JobFailed)?;
        rx.await.map_err(|_| JobFailed)
    }
}
