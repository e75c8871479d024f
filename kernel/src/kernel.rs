//! Starting the kernel: bind the sockets, start the evaluation thread and the
//! channel tasks, and wait for a shutdown request.

use std::path::Path;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::Duration;

use jupyter_zmq_client::{KernelHeartbeatConnection, KernelStdinConnection};
use tokio::sync::Notify;
use zeromq::{SocketRecv, SocketSend};

use crate::connection::{self, StartError};
use crate::iopub::Iopub;
use crate::log;
use crate::router::{Context, Role, Router};
use crate::wire::{self, Incoming};
use crate::worker::Worker;

/// Run a kernel for the connection file at `path` until it is asked to shut down.
pub async fn run(path: &Path) -> Result<(), StartError> {
    let info = connection::read(path)?;
    let session_id = uuid::Uuid::new_v4().to_string();
    let sockets = connection::bind(&info, &session_id).await?;
    let worker = Worker::start()
        .map_err(|e| StartError(format!("cannot start the evaluation thread: {e}")))?;
    let ctx = Arc::new(Context {
        iopub: Iopub::start(sockets.iopub, &session_id),
        interrupt: worker.interrupt_flag(),
        worker,
        shutdown: Notify::new(),
    });
    tokio::spawn(heartbeat(sockets.heartbeat));
    tokio::spawn(stdin(sockets.stdin));
    tokio::spawn(on_sigint(ctx.interrupt.clone()));
    tokio::spawn(Router::new(sockets.control, Role::Control, ctx.clone()).serve());
    tokio::spawn(Router::new(sockets.shell, Role::Shell, ctx.clone()).serve());
    log::info(&format!(
        "serving {} on {}",
        path.display(),
        info.shell_url()
    ));
    ctx.shutdown.notified().await;
    Ok(())
}

/// Echo every heartbeat back unchanged.
async fn heartbeat(mut conn: KernelHeartbeatConnection) {
    loop {
        let echoed = match conn.socket.recv().await {
            Ok(ping) => conn.socket.send(ping).await,
            Err(e) => Err(e),
        };
        if let Err(e) = echoed {
            log::problem(&format!("heartbeat: {e}"));
            tokio::time::sleep(Duration::from_millis(20)).await;
        }
    }
}

/// The kernel never asks for input, so anything arriving on stdin is unexpected.
async fn stdin(mut conn: KernelStdinConnection) {
    loop {
        match wire::read(&mut conn, "stdin").await {
            Ok(Incoming::Request(m)) | Ok(Incoming::Malformed { request: m, .. }) => {
                log::complaint(
                    "stdin",
                    &format!("ignoring unexpected `{}`", m.header.msg_type),
                )
            }
            Ok(Incoming::Dropped) => {}
            Err(e) => {
                log::problem(&format!("stdin: {e}"));
                tokio::time::sleep(Duration::from_millis(20)).await;
            }
        }
    }
}

/// SIGINT interrupts the running cell instead of ending the process.
async fn on_sigint(flag: Arc<AtomicBool>) {
    use tokio::signal::unix::{signal, SignalKind};
    let mut interrupts = match signal(SignalKind::interrupt()) {
        Ok(s) => s,
        Err(e) => return log::problem(&format!("cannot catch SIGINT: {e}")),
    };
    while interrupts.recv().await.is_some() {
        log::info("SIGINT: interrupting the running cell");
        flag.store(true, Ordering::SeqCst);
    }
}
