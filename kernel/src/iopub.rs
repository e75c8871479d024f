//! The iopub publisher: one task owns the XPUB socket, publishes what the
//! other tasks queue, and greets each new subscriber with `iopub_welcome`.
//!
//! The queue is bounded like a ZeroMQ PUB socket's high-water mark: when a
//! subscriber stops reading, new messages are dropped (and counted in the log)
//! instead of piling up in memory.

use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Arc;

use bytes::Bytes;
use jupyter_protocol::messaging::{IoPubWelcome, JupyterMessage, JupyterMessageContent};
use jupyter_zmq_client::{
    parse_subscription_message, KernelIoPubXPubConnection, SubscriptionEvent,
};
use tokio::sync::{mpsc, oneshot};
use zeromq::SocketRecv;

use crate::log;

/// Messages queued for iopub before new ones are dropped (ZeroMQ's default SNDHWM).
pub const HIGH_WATER_MARK: usize = 1000;

enum Command {
    Publish(Box<JupyterMessage>),
    Flush(oneshot::Sender<()>),
}

/// A handle for queueing iopub messages.
#[derive(Clone)]
pub struct Iopub {
    queue: mpsc::Sender<Command>,
    kernel_id: String,
    dropped: Arc<AtomicUsize>,
}

impl Iopub {
    /// Start the publisher task on `conn`.
    pub fn start(conn: KernelIoPubXPubConnection, kernel_id: &str) -> Iopub {
        let (queue, commands) = mpsc::channel(HIGH_WATER_MARK);
        tokio::spawn(serve(conn, commands));
        Iopub {
            queue,
            kernel_id: kernel_id.to_string(),
            dropped: Arc::new(AtomicUsize::new(0)),
        }
    }

    /// Publish `content` as a child of `parent`, with an ipykernel-style topic.
    pub fn publish(&self, content: impl Into<JupyterMessageContent>, parent: &JupyterMessage) {
        let mut message = JupyterMessage::new(content, Some(parent));
        let topic = format!("kernel.{}.{}", self.kernel_id, message.header.msg_type);
        message.zmq_identities = vec![Bytes::from(topic)];
        if self
            .queue
            .try_send(Command::Publish(Box::new(message)))
            .is_err()
        {
            let dropped = self.dropped.fetch_add(1, Ordering::Relaxed) + 1;
            if dropped == 1 || dropped % HIGH_WATER_MARK == 0 {
                log::complaint(
                    "iopub",
                    &format!("subscribers are not reading: {dropped} messages dropped so far"),
                );
            }
        }
    }

    /// Wait until everything queued so far has been handed to the socket.
    pub async fn flush(&self) {
        let (done, wait) = oneshot::channel();
        if self.queue.send(Command::Flush(done)).await.is_ok() {
            let _ = wait.await;
        }
    }
}

async fn serve(mut conn: KernelIoPubXPubConnection, mut commands: mpsc::Receiver<Command>) {
    loop {
        tokio::select! {
            command = commands.recv() => match command {
                Some(Command::Publish(message)) => send(&mut conn, *message).await,
                Some(Command::Flush(done)) => { let _ = done.send(()); }
                None => return,
            },
            event = conn.socket.recv() => match event {
                Ok(frames) => welcome(&mut conn, parse_subscription_message(&frames)).await,
                Err(e) => log::problem(&format!("iopub: receiving a subscription failed: {e}")),
            },
        }
    }
}

async fn send(conn: &mut KernelIoPubXPubConnection, message: JupyterMessage) {
    if let Err(e) = conn.send(message).await {
        log::problem(&format!("iopub: publishing failed: {e}"));
    }
}

/// Answer a subscription with `iopub_welcome` on the subscribed topic (JEP 65).
async fn welcome(conn: &mut KernelIoPubXPubConnection, event: Option<SubscriptionEvent>) {
    if let Some(SubscriptionEvent::Subscribe(topic)) = event {
        let mut message: JupyterMessage = IoPubWelcome::new(topic.clone()).into();
        if !topic.is_empty() {
            message.zmq_identities = vec![Bytes::from(topic)];
        }
        send(conn, message).await;
    }
}
