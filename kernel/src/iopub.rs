//! The iopub publisher: one task owns the XPUB socket, publishes what the
//! other tasks queue, and greets each new subscriber with `iopub_welcome`.

use bytes::Bytes;
use jupyter_protocol::messaging::{IoPubWelcome, JupyterMessage, JupyterMessageContent};
use jupyter_zmq_client::{
    parse_subscription_message, KernelIoPubXPubConnection, SubscriptionEvent,
};
use tokio::sync::{mpsc, oneshot};
use zeromq::SocketRecv;

use crate::log;

enum Command {
    Publish(Box<JupyterMessage>),
    Flush(oneshot::Sender<()>),
}

/// A handle for queueing iopub messages.
#[derive(Clone)]
pub struct Iopub {
    queue: mpsc::UnboundedSender<Command>,
    kernel_id: String,
}

impl Iopub {
    /// Start the publisher task on `conn`.
    pub fn start(conn: KernelIoPubXPubConnection, kernel_id: &str) -> Iopub {
        let (queue, commands) = mpsc::unbounded_channel();
        tokio::spawn(serve(conn, commands));
        Iopub {
            queue,
            kernel_id: kernel_id.to_string(),
        }
    }

    /// Publish `content` as a child of `parent`, with an ipykernel-style topic.
    pub fn publish(&self, content: impl Into<JupyterMessageContent>, parent: &JupyterMessage) {
        let mut message = JupyterMessage::new(content, Some(parent));
        let topic = format!("kernel.{}.{}", self.kernel_id, message.header.msg_type);
        message.zmq_identities = vec![Bytes::from(topic)];
        let _ = self.queue.send(Command::Publish(Box::new(message)));
    }

    /// Wait until everything queued so far has been handed to the socket.
    pub async fn flush(&self) {
        let (done, wait) = oneshot::channel();
        if self.queue.send(Command::Flush(done)).is_ok() {
            let _ = wait.await;
        }
    }
}

async fn serve(
    mut conn: KernelIoPubXPubConnection,
    mut commands: mpsc::UnboundedReceiver<Command>,
) {
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
