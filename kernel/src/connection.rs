//! The connection file and the five sockets bound from it.
//!
//! Sockets bind only to the transport and address the file names; nothing
//! else is opened. With an empty key, messages are unsigned (the file's choice).

use std::path::Path;

use jupyter_protocol::ConnectionInfo;
use jupyter_zmq_client::{
    create_kernel_control_connection, create_kernel_heartbeat_connection,
    create_kernel_iopub_xpub_connection, create_kernel_shell_connection,
    create_kernel_stdin_connection, KernelControlConnection, KernelHeartbeatConnection,
    KernelIoPubXPubConnection, KernelShellConnection, KernelStdinConnection,
};

use crate::log;

/// Why the kernel could not start.
#[derive(Debug)]
pub struct StartError(pub String);

impl std::fmt::Display for StartError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

/// The five kernel-side sockets.
pub struct Sockets {
    pub shell: KernelShellConnection,
    pub control: KernelControlConnection,
    pub stdin: KernelStdinConnection,
    pub iopub: KernelIoPubXPubConnection,
    pub heartbeat: KernelHeartbeatConnection,
}

/// Read and check a connection file.
pub fn read(path: &Path) -> Result<ConnectionInfo, StartError> {
    let text = std::fs::read_to_string(path).map_err(|e| {
        StartError(format!(
            "cannot read connection file {}: {e}",
            path.display()
        ))
    })?;
    let info: ConnectionInfo = serde_json::from_str(&text).map_err(|e| {
        StartError(format!(
            "connection file {} is not valid: {e}",
            path.display()
        ))
    })?;
    if info.key.is_empty() {
        log::info("the connection file has an empty key: messages are not signed");
    } else if info.signature_scheme != "hmac-sha256" {
        return Err(StartError(format!(
            "signature scheme `{}` is not supported (use hmac-sha256)",
            info.signature_scheme
        )));
    }
    Ok(info)
}

/// Bind all five sockets to the endpoints in `info`.
pub async fn bind(info: &ConnectionInfo, session_id: &str) -> Result<Sockets, StartError> {
    fn fail(
        what: &'static str,
        url: String,
    ) -> impl FnOnce(jupyter_zmq_client::RuntimeError) -> StartError {
        move |e| StartError(format!("cannot bind the {what} socket to {url}: {e}"))
    }
    Ok(Sockets {
        shell: create_kernel_shell_connection(info, session_id)
            .await
            .map_err(fail("shell", info.shell_url()))?,
        control: create_kernel_control_connection(info, session_id)
            .await
            .map_err(fail("control", info.control_url()))?,
        stdin: create_kernel_stdin_connection(info, session_id)
            .await
            .map_err(fail("stdin", info.stdin_url()))?,
        iopub: create_kernel_iopub_xpub_connection(info, session_id)
            .await
            .map_err(fail("iopub", info.iopub_url()))?,
        heartbeat: create_kernel_heartbeat_connection(info)
            .await
            .map_err(fail("heartbeat", info.hb_url()))?,
    })
}
