//! Drives a real `siccant-kernel` process over ZeroMQ on 127.0.0.1 with the
//! client side of `jupyter-zmq-client`: execute, errors, completion,
//! inspection, completeness, interrupt, shutdown, and hostile input (wrong
//! signatures, malformed JSON, missing header fields, unknown message types).
//!
//! Timeouts below only keep a broken kernel from hanging the suite; no test
//! asserts on how long anything takes.

use std::net::TcpListener;
use std::process::{Child, Command, Stdio};
use std::time::Duration;

use bytes::Bytes;
use jupyter_protocol::messaging::*;
use jupyter_protocol::{ConnectionInfo, MediaType};
use jupyter_zmq_client::*;
use serde_json::json;
use tempfile::TempDir;
use zeromq::{Socket, SocketRecv, SocketSend};

const GUARD: Duration = Duration::from_secs(120);
const KEY: &str = "a-test-key-0123456789";

struct Harness {
    child: Child,
    dir: TempDir,
    info: ConnectionInfo,
    session: String,
    shell: ClientShellConnection,
    iopub: ClientIoPubConnection,
    control: ClientControlConnection,
}

fn free_ports() -> Vec<u16> {
    let listeners: Vec<TcpListener> = (0..5)
        .map(|_| TcpListener::bind("127.0.0.1:0").unwrap())
        .collect();
    listeners
        .iter()
        .map(|l| l.local_addr().unwrap().port())
        .collect()
}

fn connection_info() -> ConnectionInfo {
    let p = free_ports();
    ConnectionInfo {
        ip: "127.0.0.1".into(),
        transport: jupyter_protocol::connection_info::Transport::TCP,
        shell_port: p[0],
        iopub_port: p[1],
        stdin_port: p[2],
        control_port: p[3],
        hb_port: p[4],
        key: KEY.into(),
        signature_scheme: "hmac-sha256".into(),
        kernel_name: Some("siccant".into()),
    }
}

async fn guarded<T>(what: &str, fut: impl std::future::Future<Output = T>) -> T {
    tokio::time::timeout(GUARD, fut)
        .await
        .unwrap_or_else(|_| panic!("no answer from the kernel: {what}"))
}

impl Harness {
    async fn start() -> Harness {
        let dir = tempfile::tempdir().unwrap();
        let info = connection_info();
        let file = dir.path().join("connection.json");
        std::fs::write(&file, serde_json::to_string(&info).unwrap()).unwrap();
        let log = std::fs::File::create(dir.path().join("kernel.log")).unwrap();
        let child = Command::new(env!("CARGO_BIN_EXE_siccant-kernel"))
            .args(["run", "--connection-file"])
            .arg(&file)
            .stdout(Stdio::null())
            .stderr(Stdio::from(log))
            .spawn()
            .unwrap();
        let session = uuid::Uuid::new_v4().to_string();
        let identity = peer_identity_for_session(&session).unwrap();
        let shell = guarded(
            "shell connect",
            retry(|| {
                create_client_shell_connection_with_identity(&info, &session, identity.clone())
            }),
        )
        .await;
        let mut iopub = guarded(
            "iopub connect",
            retry(|| create_client_iopub_connection(&info, "", &session)),
        )
        .await;
        let control = guarded(
            "control connect",
            retry(|| create_client_control_connection(&info, &session)),
        )
        .await;
        let welcome = guarded("welcome", wait_for_iopub_welcome(&mut iopub, GUARD))
            .await
            .unwrap();
        assert_eq!(
            welcome.as_deref(),
            Some(""),
            "iopub_welcome on the empty topic (XPUB, JEP 65)"
        );
        let mut h = Harness {
            child,
            dir,
            info,
            session,
            shell,
            iopub,
            control,
        };
        let reply = h.shell_request(KernelInfoRequest {}.into()).await;
        assert!(matches!(
            reply.content,
            JupyterMessageContent::KernelInfoReply(_)
        ));
        h
    }

    /// Send on shell and return the reply to it (skipping nothing: the shell is sequential).
    async fn shell_request(&mut self, request: JupyterMessage) -> JupyterMessage {
        let id = request.header.msg_id.clone();
        self.shell.send(request).await.unwrap();
        let reply = guarded("shell reply", self.shell.read()).await.unwrap();
        assert_eq!(reply.parent_header.as_ref().unwrap().msg_id, id);
        reply
    }

    async fn control_request(&mut self, request: JupyterMessage) -> JupyterMessage {
        self.control.send(request).await.unwrap();
        guarded("control reply", self.control.read()).await.unwrap()
    }

    /// Iopub messages for `parent_id` up to and including its idle status.
    async fn iopub_until_idle(&mut self, parent_id: &str) -> Vec<JupyterMessage> {
        let mut seen = Vec::new();
        loop {
            let m = guarded("iopub", self.iopub.read()).await.unwrap();
            if m.parent_header.as_ref().map(|h| h.msg_id.as_str()) != Some(parent_id) {
                continue;
            }
            let idle = matches!(&m.content, JupyterMessageContent::Status(s) if s.execution_state == ExecutionState::Idle);
            seen.push(m);
            if idle {
                return seen;
            }
        }
    }

    async fn execute(&mut self, code: &str) -> (ExecuteReply, Vec<JupyterMessage>) {
        let request: JupyterMessage = ExecuteRequest::new(code.into()).into();
        let id = request.header.msg_id.clone();
        let reply = self.shell_request(request).await;
        let outputs = self.iopub_until_idle(&id).await;
        match reply.content {
            JupyterMessageContent::ExecuteReply(r) => (r, outputs),
            other => panic!("expected execute_reply, got {other:?}"),
        }
    }

    /// Stop the kernel and return what it logged.
    fn finish(mut self) -> String {
        let _ = self.child.kill();
        let _ = self.child.wait();
        std::fs::read_to_string(self.dir.path().join("kernel.log")).unwrap()
    }
}

impl Drop for Harness {
    /// A failing test must not leave a kernel behind.
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}

/// Text without ANSI colour sequences.
fn strip_ansi(text: &str) -> String {
    let mut out = String::new();
    let mut chars = text.chars();
    while let Some(c) = chars.next() {
        if c == '\u{1b}' {
            for d in chars.by_ref() {
                if d.is_ascii_alphabetic() {
                    break;
                }
            }
        } else {
            out.push(c);
        }
    }
    out
}

async fn retry<T, F, Fut>(mut connect: F) -> T
where
    F: FnMut() -> Fut,
    Fut: std::future::Future<Output = jupyter_zmq_client::Result<T>>,
{
    loop {
        match connect().await {
            Ok(c) => return c,
            Err(_) => tokio::time::sleep(Duration::from_millis(50)).await,
        }
    }
}

fn plain(data: &jupyter_protocol::Media) -> String {
    data.content
        .iter()
        .find_map(|m| {
            if let MediaType::Plain(t) = m {
                Some(t.clone())
            } else {
                None
            }
        })
        .unwrap_or_default()
}

fn types(messages: &[JupyterMessage]) -> Vec<&str> {
    messages
        .iter()
        .map(|m| m.header.msg_type.as_str())
        .collect()
}

#[tokio::test(flavor = "multi_thread")]
async fn execute_keeps_state_and_publishes_results() {
    let mut k = Harness::start().await;
    let (reply, outputs) = k.execute("tray_load = 12\ntrays = 20").await;
    assert_eq!(reply.status, ReplyStatus::Ok);
    assert_eq!(reply.execution_count.value(), 1);
    let kinds = types(&outputs);
    assert_eq!(kinds.first(), Some(&"status"));
    assert!(kinds.contains(&"execute_input"), "{kinds:?}");

    let (reply, outputs) = k.execute("tray_load * trays").await;
    assert_eq!(reply.execution_count.value(), 2);
    let result = outputs
        .iter()
        .find_map(|m| {
            if let JupyterMessageContent::ExecuteResult(r) = &m.content {
                Some(r.clone())
            } else {
                None
            }
        })
        .expect("an execute_result");
    assert_eq!(result.execution_count.value(), 2);
    assert!(
        plain(&result.data).contains("240"),
        "{}",
        plain(&result.data)
    );
    let mimes: Vec<&str> = result.data.content.iter().map(|m| m.mime_type()).collect();
    assert!(
        mimes.contains(&"text/html") && mimes.contains(&"application/json"),
        "{mimes:?}"
    );
    k.finish();
}

#[tokio::test(flavor = "multi_thread")]
async fn silent_cells_show_nothing_and_do_not_count() {
    let mut k = Harness::start().await;
    let request: JupyterMessage = ExecuteRequest {
        silent: true,
        ..ExecuteRequest::new("q = 5\nq".into())
    }
    .into();
    let id = request.header.msg_id.clone();
    let reply = k.shell_request(request).await;
    let outputs = k.iopub_until_idle(&id).await;
    assert_eq!(types(&outputs), vec!["status", "status"]);
    assert!(
        matches!(reply.content, JupyterMessageContent::ExecuteReply(ref r) if r.execution_count.value() == 0)
    );
    let (reply, _) = k.execute("q + 1").await;
    assert_eq!(
        reply.status,
        ReplyStatus::Ok,
        "state from the silent cell persists"
    );
    assert_eq!(reply.execution_count.value(), 1);
    k.finish();
}

#[tokio::test(flavor = "multi_thread")]
async fn errors_carry_name_value_and_a_traceback_with_the_source_line() {
    let mut k = Harness::start().await;
    let (reply, outputs) = k
        .execute("belt_speed = 2\nbelt_length = belt_sped * 3")
        .await;
    assert_eq!(reply.status, ReplyStatus::Error);
    let error = outputs
        .iter()
        .find_map(|m| {
            if let JupyterMessageContent::ErrorOutput(e) = &m.content {
                Some(e.clone())
            } else {
                None
            }
        })
        .expect("an error message on iopub");
    assert_eq!(error.ename, "WorksheetError");
    assert!(error.evalue.contains("belt_sped"), "{}", error.evalue);
    let traceback = strip_ansi(&error.traceback.join("\n"));
    assert!(
        traceback.contains("belt_length = belt_sped * 3"),
        "{traceback}"
    );
    assert!(
        traceback.contains('^'),
        "the span is underlined: {traceback}"
    );
    let (reply, _) = k.execute("1 + 1").await;
    assert_eq!(
        reply.status,
        ReplyStatus::Ok,
        "the kernel stays usable after an error"
    );
    k.finish();
}

#[tokio::test(flavor = "multi_thread")]
async fn complete_inspect_and_is_complete_answer_from_the_session() {
    let mut k = Harness::start().await;
    k.execute("dryer_load = 3").await;
    let reply = k
        .shell_request(
            CompleteRequest {
                code: "x = 2 * dry".into(),
                cursor_pos: 11,
            }
            .into(),
        )
        .await;
    let JupyterMessageContent::CompleteReply(c) = reply.content else {
        panic!("complete_reply expected")
    };
    assert!(
        c.matches.contains(&"dryer_load".to_string()),
        "{:?}",
        c.matches
    );
    assert_eq!((c.cursor_start, c.cursor_end), (8, 11));

    let inspect = InspectRequest {
        code: "dryer_load".into(),
        cursor_pos: 3,
        detail_level: Some(0),
    };
    let JupyterMessageContent::InspectReply(i) = k.shell_request(inspect.into()).await.content
    else {
        panic!()
    };
    assert!(i.found);
    assert!(
        plain(&i.data).contains("dryer_load = 3"),
        "{}",
        plain(&i.data)
    );

    for (code, status) in [
        ("a = (1 +", IsCompleteReplyStatus::Incomplete),
        ("a = 1", IsCompleteReplyStatus::Complete),
        ("a = 1)", IsCompleteReplyStatus::Invalid),
    ] {
        let reply = k
            .shell_request(IsCompleteRequest { code: code.into() }.into())
            .await;
        let JupyterMessageContent::IsCompleteReply(r) = reply.content else {
            panic!()
        };
        assert_eq!(r.status, status, "{code}");
        if status == IsCompleteReplyStatus::Incomplete {
            assert!(!r.indent.is_empty());
        }
    }
    k.finish();
}

/// A cell that takes far longer than the test: 4^14 nested calls.
fn slow_cell() -> String {
    let mut code = String::from("g0(x) = x + 1\n");
    for i in 1..=14 {
        let p = i - 1;
        code.push_str(&format!(
            "g{i}(x) = g{p}(x) + g{p}(x) + g{p}(x) + g{p}(x)\n"
        ));
    }
    code + "g14(1)\n"
}

#[tokio::test(flavor = "multi_thread")]
async fn interrupt_on_control_stops_a_long_cell_and_the_kernel_stays_usable() {
    let mut k = Harness::start().await;
    let request: JupyterMessage = ExecuteRequest::new(slow_cell()).into();
    let id = request.header.msg_id.clone();
    k.shell.send(request).await.unwrap();
    loop {
        let m = guarded("execute_input", k.iopub.read()).await.unwrap();
        if m.header.msg_type == "execute_input" && m.parent_header.as_ref().unwrap().msg_id == id {
            break;
        }
    }
    let reply = k.control_request(InterruptRequest {}.into()).await;
    assert!(
        matches!(reply.content, JupyterMessageContent::InterruptReply(ref r) if r.status == ReplyStatus::Ok)
    );
    let reply = guarded("execute_reply", k.shell.read()).await.unwrap();
    let JupyterMessageContent::ExecuteReply(r) = reply.content else {
        panic!("execute_reply expected")
    };
    assert_eq!(r.status, ReplyStatus::Error);
    assert_eq!(r.error.unwrap().ename, "Interrupted");
    let (reply, _) = k.execute("2 + 2").await;
    assert_eq!(reply.status, ReplyStatus::Ok);
    k.finish();
}

#[tokio::test(flavor = "multi_thread")]
async fn sigint_stops_a_long_cell() {
    let mut k = Harness::start().await;
    let request: JupyterMessage = ExecuteRequest::new(slow_cell()).into();
    let id = request.header.msg_id.clone();
    k.shell.send(request).await.unwrap();
    loop {
        let m = guarded("execute_input", k.iopub.read()).await.unwrap();
        if m.header.msg_type == "execute_input" && m.parent_header.as_ref().unwrap().msg_id == id {
            break;
        }
    }
    let status = Command::new("kill")
        .args(["-INT", &k.child.id().to_string()])
        .status()
        .unwrap();
    assert!(status.success());
    let reply = guarded("execute_reply", k.shell.read()).await.unwrap();
    let JupyterMessageContent::ExecuteReply(r) = reply.content else {
        panic!("execute_reply expected")
    };
    assert_eq!(r.error.unwrap().ename, "Interrupted");
    let (reply, _) = k.execute("3 + 3").await;
    assert_eq!(
        reply.status,
        ReplyStatus::Ok,
        "SIGINT does not end the kernel"
    );
    k.finish();
}

#[tokio::test(flavor = "multi_thread")]
async fn shutdown_replies_then_the_process_exits() {
    let mut k = Harness::start().await;
    let reply = k
        .control_request(ShutdownRequest { restart: false }.into())
        .await;
    assert!(matches!(reply.content, JupyterMessageContent::ShutdownReply(ref r) if !r.restart));
    let status = guarded("exit", async {
        loop {
            if let Some(status) = k.child.try_wait().unwrap() {
                return status;
            }
            tokio::time::sleep(Duration::from_millis(20)).await;
        }
    })
    .await;
    assert!(status.success());
}

#[tokio::test(flavor = "multi_thread")]
async fn heartbeat_echoes() {
    let k = Harness::start().await;
    let mut hb = create_client_heartbeat_connection(&k.info).await.unwrap();
    guarded("heartbeat", hb.single_heartbeat()).await.unwrap();
    k.finish();
}

#[tokio::test(flavor = "multi_thread")]
async fn a_wrongly_signed_message_is_dropped_and_logged() {
    let mut k = Harness::start().await;
    let good_mac = k.shell.mac.clone();
    k.shell.mac = Some(ring::hmac::Key::new(
        ring::hmac::HMAC_SHA256,
        b"not-the-key",
    ));
    k.shell
        .send(ExecuteRequest::new("forged = 1".into()).into())
        .await
        .unwrap();
    k.shell.mac = None;
    k.shell
        .send(ExecuteRequest::new("unsigned = 1".into()).into())
        .await
        .unwrap();
    k.shell.mac = good_mac;
    let (reply, _) = k.execute("forged + unsigned").await;
    assert_eq!(reply.status, ReplyStatus::Error, "neither forged cell ran");
    assert!(reply.error.unwrap().evalue.contains("not defined"));
    let log = k.finish();
    assert_eq!(
        log.matches("failed the signature or framing check").count(),
        2,
        "{log}"
    );
}

/// Send raw frames, correctly signed, on a fresh DEALER socket.
async fn send_raw(info: &ConnectionInfo, frames: [&str; 4]) -> zeromq::DealerSocket {
    let mut socket = zeromq::DealerSocket::new();
    socket.connect(&info.shell_url()).await.unwrap();
    let key = ring::hmac::Key::new(ring::hmac::HMAC_SHA256, KEY.as_bytes());
    let mut ctx = ring::hmac::Context::with_key(&key);
    for f in frames {
        ctx.update(f.as_bytes());
    }
    let signature = data_encoding::HEXLOWER.encode(ctx.sign().as_ref());
    let mut parts = vec![Bytes::from_static(b"<IDS|MSG>"), Bytes::from(signature)];
    parts.extend(frames.iter().map(|f| Bytes::from(f.to_string())));
    socket
        .send(zeromq::ZmqMessage::try_from(parts).unwrap())
        .await
        .unwrap();
    socket
}

fn header(msg_type: &str, id: &str) -> String {
    json!({"msg_id": id, "username": "t", "session": "s", "date": "2026-01-01T00:00:00Z",
           "msg_type": msg_type, "version": "5.3"})
    .to_string()
}

async fn raw_reply(socket: &mut zeromq::DealerSocket) -> serde_json::Value {
    let frames = guarded("raw reply", socket.recv())
        .await
        .unwrap()
        .into_vec();
    let at = frames
        .iter()
        .position(|f| f.as_ref() == b"<IDS|MSG>")
        .unwrap();
    let header: serde_json::Value = serde_json::from_slice(&frames[at + 2]).unwrap();
    let content: serde_json::Value = serde_json::from_slice(&frames[at + 5]).unwrap();
    json!({"msg_type": header["msg_type"], "content": content})
}

#[tokio::test(flavor = "multi_thread")]
async fn malformed_messages_get_a_complaint_never_a_crash() {
    let mut k = Harness::start().await;
    let info = k.info.clone();
    send_raw(&info, ["{not json", "{}", "{}", "{}"]).await;
    send_raw(
        &info,
        [
            &json!({"msg_id": "m1", "session": "s"}).to_string(),
            "{}",
            "{}",
            "{}",
        ],
    )
    .await;
    let mut bad_content = send_raw(
        &info,
        [&header("execute_request", "m2"), "{}", "{}", "{\"code\": "],
    )
    .await;
    let reply = raw_reply(&mut bad_content).await;
    assert_eq!(reply["msg_type"], "execute_reply");
    assert_eq!(reply["content"]["status"], "error");
    let mut missing_fields =
        send_raw(&info, [&header("complete_request", "m3"), "{}", "{}", "{}"]).await;
    let reply = raw_reply(&mut missing_fields).await;
    assert_eq!(reply["msg_type"], "complete_reply");
    assert_eq!(reply["content"]["status"], "error");
    let mut unknown = send_raw(
        &info,
        [&header("frobnicate_request", "m4"), "{}", "{}", "{}"],
    )
    .await;
    let reply = raw_reply(&mut unknown).await;
    assert_eq!(reply["msg_type"], "frobnicate_reply");
    assert_eq!(reply["content"]["status"], "error");
    let (reply, _) = k.execute("1 + 2").await;
    assert_eq!(reply.status, ReplyStatus::Ok, "the kernel is still up");
    let session = k.session.clone();
    let log = k.finish();
    assert!(
        log.contains("header is malformed or misses fields"),
        "{log}"
    );
    assert_eq!(log.matches("header is malformed").count(), 2, "{log}");
    assert!(
        log.contains("`execute_request` has malformed content"),
        "{log}"
    );
    assert!(
        log.contains("unexpected message type `frobnicate_request`"),
        "{log}"
    );
    assert!(!session.is_empty());
}

#[tokio::test(flavor = "multi_thread")]
async fn cells_queued_behind_a_failed_cell_are_aborted() {
    let mut k = Harness::start().await;
    // The first cell computes for a while (4^9 calls) and then fails, so the
    // second, sent right behind it, is already waiting when it fails.
    let failing: JupyterMessage =
        ExecuteRequest::new(slow_cell().replace("g14(1)", "g9(1) + \"text\"")).into();
    let queued: JupyterMessage = ExecuteRequest::new("after = 1".into()).into();
    let (failing_id, queued_id) = (failing.header.msg_id.clone(), queued.header.msg_id.clone());
    k.shell.send(failing).await.unwrap();
    k.shell.send(queued).await.unwrap();
    let mut statuses = std::collections::HashMap::new();
    while statuses.len() < 2 {
        let reply = guarded("replies", k.shell.read()).await.unwrap();
        let id = reply.parent_header.unwrap().msg_id;
        let JupyterMessageContent::ExecuteReply(r) = reply.content else {
            panic!("execute_reply expected")
        };
        statuses.insert(id, r.status);
    }
    assert_eq!(statuses[&failing_id], ReplyStatus::Error);
    assert_eq!(statuses[&queued_id], ReplyStatus::Aborted);
    let (reply, _) = k.execute("after").await;
    assert_eq!(
        reply.status,
        ReplyStatus::Error,
        "the aborted cell did not run"
    );
    let (reply, _) = k.execute("after = 2").await;
    assert_eq!(
        reply.status,
        ReplyStatus::Ok,
        "a cell sent after the failure runs"
    );
    k.finish();
}

#[tokio::test(flavor = "multi_thread")]
async fn a_plot_is_shown_as_svg_and_png() {
    let mut k = Harness::start().await;
    let code = "xs = [1, 2, 3] * 1 m\nplot(curve(xs, xs * 2, label: \"twice\"), title: \"t\", x: \"a\", y: \"b\")";
    let (reply, outputs) = k.execute(code).await;
    assert_eq!(reply.status, ReplyStatus::Ok);
    let result = outputs
        .iter()
        .find_map(|m| {
            if let JupyterMessageContent::ExecuteResult(r) = &m.content {
                Some(r.clone())
            } else {
                None
            }
        })
        .expect("an execute_result");
    let svg = result.data.content.iter().find_map(|m| {
        if let MediaType::Svg(s) = m {
            Some(s.clone())
        } else {
            None
        }
    });
    assert!(svg.expect("image/svg+xml").contains("<svg"));
    let png = result.data.content.iter().find_map(|m| {
        if let MediaType::Png(p) = m {
            Some(p.clone())
        } else {
            None
        }
    });
    assert!(
        png.expect("image/png").starts_with("iVBORw0KGgo"),
        "base64 of the PNG signature"
    );
    k.finish();
}
