//! Serving the shell and control ROUTER sockets: each request is wrapped in
//! busy/idle status messages on iopub and answered on its own socket.
//!
//! Shell requests that need the session go to the evaluation thread and are
//! awaited; control runs in its own task, so interrupt and shutdown are
//! served while a cell is running.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
use std::time::Duration;

use jupyter_protocol::messaging::{
    CommInfoReply, ExecuteInput, ExecuteReply, ExecuteRequest, InterruptReply, JupyterMessage,
    JupyterMessageContent, ReplyError, ReplyStatus, ShutdownReply, ShutdownRequest, Status,
};
use jupyter_protocol::{ExecutionCount, HistoryReply};
use jupyter_zmq_client::Connection;
use tokio::sync::Notify;
use zeromq::RouterSocket;

use crate::execution::{self, Cell};
use crate::iopub::Iopub;
use crate::wire::{self, Incoming};
use crate::worker::Worker;
use crate::{assistance, info, log};

/// What both ROUTER channels share.
pub struct Context {
    pub iopub: Iopub,
    pub worker: Worker,
    pub interrupt: Arc<AtomicBool>,
    /// Notified once a shutdown reply has gone out.
    pub shutdown: Notify,
}

/// Which socket a [`Router`] serves.
#[derive(Clone, Copy, PartialEq, Eq)]
pub enum Role {
    Shell,
    Control,
}

/// One ROUTER socket and its request loop.
pub struct Router {
    conn: Connection<RouterSocket>,
    role: Role,
    ctx: Arc<Context>,
    execution_count: usize,
}

/// How a request is answered.
enum Answer {
    Reply(JupyterMessageContent),
    Raw(Box<JupyterMessage>),
    Nothing,
    Shutdown(ShutdownRequest),
}

impl Router {
    /// A router for `conn` in `role`.
    pub fn new(conn: Connection<RouterSocket>, role: Role, ctx: Arc<Context>) -> Router {
        Router {
            conn,
            role,
            ctx,
            execution_count: 0,
        }
    }

    fn name(&self) -> &'static str {
        match self.role {
            Role::Shell => "shell",
            Role::Control => "control",
        }
    }

    /// Serve requests until the process ends.
    pub async fn serve(mut self) {
        loop {
            let name = self.name();
            match wire::read(&mut self.conn, name).await {
                Ok(Incoming::Request(request)) => self.handle(request).await,
                Ok(Incoming::Malformed { request, reason }) => {
                    let reply = wire::error_reply(&request, "BadRequest", &reason);
                    self.answer(
                        &request,
                        reply.map_or(Answer::Nothing, |m| Answer::Raw(Box::new(m))),
                    )
                    .await;
                }
                Ok(Incoming::Dropped) => {}
                Err(e) => {
                    log::problem(&format!("{}: receive failed: {e}", self.name()));
                    tokio::time::sleep(Duration::from_millis(20)).await;
                }
            }
        }
    }

    async fn handle(&mut self, request: JupyterMessage) {
        let answer = self.dispatch(&request).await;
        if stops_on_error(&request, &answer) {
            // Before the failed cell's reply, so a request sent after the client
            // saw that reply is never aborted.
            self.abort_queued().await;
        }
        self.answer(&request, answer).await;
    }

    /// Answer every request already waiting on the socket with status aborted,
    /// as a cell failed with `stop_on_error` (a "run all" stops at the error).
    async fn abort_queued(&mut self) {
        loop {
            let name = self.name();
            let next = tokio::time::timeout(Duration::ZERO, wire::read(&mut self.conn, name)).await;
            let request = match next {
                Ok(Ok(Incoming::Request(r))) | Ok(Ok(Incoming::Malformed { request: r, .. })) => r,
                Ok(Ok(Incoming::Dropped)) => continue,
                _ => return,
            };
            self.ctx.iopub.publish(Status::busy(), &request);
            log::info(&format!(
                "aborting queued `{}` after a failed cell",
                request.header.msg_type
            ));
            let reply = wire::aborted_reply(&request);
            self.answer(
                &request,
                reply.map_or(Answer::Nothing, |m| Answer::Raw(Box::new(m))),
            )
            .await;
        }
    }

    /// Busy, the reply, idle; then shut down if asked.
    async fn answer(&mut self, request: &JupyterMessage, answer: Answer) {
        match answer {
            Answer::Reply(content) => self.send(JupyterMessage::new(content, Some(request))).await,
            Answer::Raw(message) => self.send(*message).await,
            Answer::Nothing => {}
            Answer::Shutdown(shutdown) => return self.shut_down(request, shutdown).await,
        }
        self.ctx.iopub.publish(Status::idle(), request);
    }

    async fn send(&mut self, message: JupyterMessage) {
        if let Err(e) = self.conn.send(message).await {
            log::problem(&format!("{}: sending a reply failed: {e}", self.name()));
        }
    }

    async fn dispatch(&mut self, request: &JupyterMessage) -> Answer {
        self.ctx.iopub.publish(Status::busy(), request);
        use JupyterMessageContent as C;
        match &request.content {
            C::KernelInfoRequest(_) => Answer::Reply(info::kernel_info().into()),
            C::InterruptRequest(_) => self.interrupt(),
            C::ShutdownRequest(s) => Answer::Shutdown(s.clone()),
            C::ExecuteRequest(e) if self.role == Role::Shell => self.execute(request, e).await,
            C::CompleteRequest(r) if self.role == Role::Shell => {
                let (code, cursor) = (r.code.clone(), r.cursor_pos);
                self.on_worker(request, move |s| {
                    assistance::complete(&s.session, &code, cursor).into()
                })
                .await
            }
            C::InspectRequest(r) if self.role == Role::Shell => {
                let (code, cursor) = (r.code.clone(), r.cursor_pos);
                self.on_worker(request, move |s| {
                    assistance::inspect(&s.session, &code, cursor).into()
                })
                .await
            }
            C::IsCompleteRequest(r) if self.role == Role::Shell => {
                let code = r.code.clone();
                self.on_worker(request, move |s| {
                    assistance::is_complete(&s.session, &code).into()
                })
                .await
            }
            C::UnknownMessage(u) if u.msg_type == "history_request" && self.role == Role::Shell => {
                let query = u.content.clone();
                self.on_worker(request, move |s| {
                    HistoryReply::new(s.history.query(&query)).into()
                })
                .await
            }
            C::CommInfoRequest(_) => Answer::Reply(CommInfoReply::default().into()),
            C::CommOpen(_) | C::CommMsg(_) | C::CommClose(_) => {
                log::info(&format!(
                    "{}: ignoring `{}` (no comm targets)",
                    self.name(),
                    request.header.msg_type
                ));
                Answer::Nothing
            }
            _ => self.unexpected(request),
        }
    }

    /// Run a job on the evaluation thread; a failed job becomes an error reply.
    async fn on_worker<F>(&self, request: &JupyterMessage, job: F) -> Answer
    where
        F: FnOnce(&mut crate::worker::Worksheet) -> JupyterMessageContent + Send + 'static,
    {
        match self.ctx.worker.call(job).await {
            Ok(content) => Answer::Reply(content),
            Err(_) => wire::error_reply(
                request,
                "InternalError",
                "the evaluation thread failed on this request",
            )
            .map_or(Answer::Nothing, |m| Answer::Raw(Box::new(m))),
        }
    }

    fn unexpected(&self, request: &JupyterMessage) -> Answer {
        let what = format!(
            "unexpected message type `{}` on {}",
            request.header.msg_type,
            self.name()
        );
        log::complaint(self.name(), &what);
        wire::error_reply(request, "UnknownMessageType", &what)
            .map_or(Answer::Nothing, |m| Answer::Raw(Box::new(m)))
    }

    fn interrupt(&self) -> Answer {
        self.ctx.interrupt.store(true, Ordering::SeqCst);
        log::info("interrupt requested");
        Answer::Reply(InterruptReply::new().into())
    }

    async fn shut_down(&mut self, request: &JupyterMessage, shutdown: ShutdownRequest) {
        let reply = ShutdownReply {
            restart: shutdown.restart,
            status: ReplyStatus::Ok,
            error: None,
        };
        self.ctx.interrupt.store(true, Ordering::SeqCst);
        self.send(JupyterMessage::new(reply.clone(), Some(request)))
            .await;
        self.ctx.iopub.publish(reply, request);
        self.ctx.iopub.publish(Status::idle(), request);
        self.ctx.iopub.flush().await;
        log::info(&format!(
            "shutdown requested (restart: {})",
            shutdown.restart
        ));
        self.ctx.shutdown.notify_one();
    }

    async fn execute(&mut self, request: &JupyterMessage, ex: &ExecuteRequest) -> Answer {
        let store = ex.store_history && !ex.silent;
        if store {
            self.execution_count += 1;
        }
        let count = self.execution_count;
        // Clear a stale interrupt before the client learns the cell started, so an
        // interrupt sent after execute_input is never lost.
        self.ctx.interrupt.store(false, Ordering::SeqCst);
        if !ex.silent {
            let input = ExecuteInput {
                code: ex.code.clone(),
                execution_count: ExecutionCount::new(count),
            };
            self.ctx.iopub.publish(input, request);
        }
        let cell = Cell {
            code: ex.code.clone(),
            silent: ex.silent,
            store_history: store,
            count,
        };
        let flag = self.ctx.interrupt.clone();
        let executed = match self
            .ctx
            .worker
            .call(move |s| execution::execute(s, &cell, &flag))
            .await
        {
            Ok(executed) => executed,
            Err(_) => execution::Executed {
                outputs: Vec::new(),
                error: Some(crate::bundle::internal_error()),
            },
        };
        for output in executed.outputs {
            self.ctx.iopub.publish(output, request);
        }
        let mut reply = ExecuteReply {
            execution_count: ExecutionCount::new(count),
            user_expressions: Some(Default::default()),
            ..Default::default()
        };
        if let Some(error) = executed.error {
            if !ex.silent {
                self.ctx.iopub.publish(error.clone(), request);
            }
            reply.status = ReplyStatus::Error;
            reply.error = Some(Box::new(ReplyError {
                ename: error.ename,
                evalue: error.evalue,
                traceback: error.traceback,
            }));
        }
        Answer::Reply(reply.into())
    }
}

/// Did an execute request with `stop_on_error` just fail?
fn stops_on_error(request: &JupyterMessage, answer: &Answer) -> bool {
    let stop =
        matches!(&request.content, JupyterMessageContent::ExecuteRequest(e) if e.stop_on_error);
    let failed = matches!(answer, Answer::Reply(JupyterMessageContent::ExecuteReply(r)) if r.status == ReplyStatus::Error);
    stop && failed
}
