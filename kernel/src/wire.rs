//! Reading requests off a socket: signature check, tolerant decoding, and a
//! logged complaint (never a crash) for anything malformed.
//!
//! `jupyter-zmq-client` verifies the HMAC signature; this module decodes the
//! JSON frames itself so that a request whose content is malformed can still
//! be answered with an error reply, and so that missing header fields or bad
//! JSON are reported instead of silently lost.

use jupyter_protocol::messaging::{Header, JupyterMessage, JupyterMessageContent, UnknownMessage};
use jupyter_zmq_client::{Connection, RawMessage};
use serde_json::{json, Value as Json};
use zeromq::SocketRecv;

use crate::log;

/// One request as read off a socket.
pub enum Incoming {
    /// A well-formed request.
    Request(JupyterMessage),
    /// A request whose header parsed but whose content did not: answer with an error.
    Malformed {
        request: JupyterMessage,
        reason: String,
    },
    /// Dropped (bad signature, broken framing, unparseable header); already logged.
    Dropped,
}

/// Read the next request from `conn`, verifying its signature.
pub async fn read<S: SocketRecv>(
    conn: &mut Connection<S>,
    channel: &str,
) -> Result<Incoming, zeromq::ZmqError> {
    let multipart = conn.socket.recv().await?;
    let raw = match RawMessage::from_multipart(multipart, &conn.mac) {
        Ok(raw) => raw,
        Err(e) => {
            log::complaint(
                channel,
                &format!("dropped a message that failed the signature or framing check: {e}"),
            );
            return Ok(Incoming::Dropped);
        }
    };
    Ok(decode(raw, channel))
}

/// Decode the JSON frames of a verified message.
pub fn decode(raw: RawMessage, channel: &str) -> Incoming {
    if raw.jparts.len() < 4 {
        log::complaint(
            channel,
            &format!(
                "dropped a message with {} of 4 JSON frames",
                raw.jparts.len()
            ),
        );
        return Incoming::Dropped;
    }
    let header: Header = match serde_json::from_slice(&raw.jparts[0]) {
        Ok(h) => h,
        Err(e) => {
            log::complaint(
                channel,
                &format!("dropped a message whose header is malformed or misses fields: {e}"),
            );
            return Incoming::Dropped;
        }
    };
    let parent_header = serde_json::from_slice(&raw.jparts[1]).ok();
    let metadata = serde_json::from_slice(&raw.jparts[2]).unwrap_or_else(|_| json!({}));
    let mut request = JupyterMessage {
        zmq_identities: raw.zmq_identities,
        header,
        parent_header,
        metadata,
        content: unknown(String::new(), Json::Null),
        buffers: raw.jparts[4..].to_vec(),
        channel: None,
    };
    let msg_type = request.header.msg_type.clone();
    match content(&msg_type, &raw.jparts[3]) {
        Ok(c) => {
            request.content = c;
            Incoming::Request(request)
        }
        Err(reason) => {
            log::complaint(
                channel,
                &format!("`{msg_type}` has malformed content: {reason}"),
            );
            request.content = unknown(msg_type, Json::Null);
            Incoming::Malformed { request, reason }
        }
    }
}

/// Parse the content frame into its typed form. `history_request` is kept as
/// raw JSON because clients omit fields the typed form requires.
fn content(msg_type: &str, frame: &[u8]) -> Result<JupyterMessageContent, String> {
    let value: Json = serde_json::from_slice(frame).map_err(|e| format!("not JSON: {e}"))?;
    if msg_type == "history_request" {
        return Ok(unknown(msg_type.to_string(), value));
    }
    JupyterMessageContent::from_type_and_content(msg_type, value).map_err(|e| e.to_string())
}

fn unknown(msg_type: String, content: Json) -> JupyterMessageContent {
    JupyterMessageContent::UnknownMessage(UnknownMessage { msg_type, content })
}

/// An error reply (`<x>_reply` with status error) to a request of type `<x>_request`,
/// or `None` when the message is not a request.
pub fn error_reply(request: &JupyterMessage, ename: &str, evalue: &str) -> Option<JupyterMessage> {
    let base = request.header.msg_type.strip_suffix("_request")?;
    let content = json!({ "status": "error", "ename": ename, "evalue": evalue, "traceback": [] });
    let reply = unknown(format!("{base}_reply"), content);
    Some(JupyterMessage::new(reply, Some(request)))
}

/// An aborted reply (`<x>_reply` with status aborted) to a request of type `<x>_request`,
/// sent for requests queued behind a cell that failed with `stop_on_error`.
pub fn aborted_reply(request: &JupyterMessage) -> Option<JupyterMessage> {
    let base = request.header.msg_type.strip_suffix("_request")?;
    let reply = unknown(format!("{base}_reply"), json!({ "status": "aborted" }));
    Some(JupyterMessage::new(reply, Some(request)))
}
