//! Ctrl-C (SIGINT) in `siccant run`, `siccant record` and the REPL: the
//! evaluation stops with an `interrupted` diagnostic; `run` and `record` exit
//! with 130 and print or write nothing; the REPL keeps its session.
//!
//! No timing is asserted: the tests wait for the process to install its
//! handler (Linux: the caught-signal mask in /proc/PID/status), send SIGINT,
//! and poll for the process to end within a generous bound.

#![cfg(target_os = "linux")]

use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::sync::{Arc, Mutex};
use std::time::Duration;

/// Generous bound on every wait, in polls of 50 ms (a stuck process fails the
/// test instead of hanging it).
const POLLS: usize = 2400;

/// A sweep of 700 000 wet-bulb solutions: far longer than any wait here.
const LONG_SHEET: &str = "\
input T_air = 60 degC
a = air(T: T_air, rh: 20 %)
Tw = a.wetbulb
study = sweep([Tw], T_air: steps(20 degC, 90 degC, 0.0001 K))
";

fn sheet(text: &str) -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().expect("temp dir");
    let path = dir.path().join("long.sicc");
    std::fs::write(&path, text).expect("write sheet");
    (dir, path)
}

fn spawn(args: &[&str]) -> Child {
    Command::new(env!("CARGO_BIN_EXE_siccant"))
        .args(args)
        .env("NO_COLOR", "1")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("binary starts")
}

/// Does the process catch SIGINT (has it installed its handler)?
fn catches_sigint(pid: u32) -> bool {
    let status = std::fs::read_to_string(format!("/proc/{pid}/status")).unwrap_or_default();
    let mask = status
        .lines()
        .find_map(|l| l.strip_prefix("SigCgt:"))
        .and_then(|hex| u64::from_str_radix(hex.trim(), 16).ok())
        .unwrap_or(0);
    mask & (1 << (libc::SIGINT - 1)) != 0
}

fn wait_for_handler(child: &Child) {
    let ready = (0..POLLS).any(|_| {
        std::thread::sleep(Duration::from_millis(50));
        catches_sigint(child.id())
    });
    assert!(ready, "siccant never installed a SIGINT handler");
}

fn sigint(child: &Child) {
    let pid = libc::pid_t::try_from(child.id()).expect("pid fits");
    // SAFETY: kill(2) with a valid pid of our own child and a valid signal.
    let rc = unsafe { libc::kill(pid, libc::SIGINT) };
    assert_eq!(rc, 0, "kill(SIGINT) failed");
}

/// A pipe read to its end on a thread, into a shared string.
struct Reader {
    text: Arc<Mutex<String>>,
    thread: std::thread::JoinHandle<()>,
}

impl Reader {
    /// What has been read so far.
    fn contains(&self, fragment: &str) -> bool {
        self.text.lock().expect("lock").contains(fragment)
    }

    /// Everything, once the pipe is closed (the process has ended).
    fn finish(self) -> String {
        self.thread.join().expect("reader thread");
        let text = self.text.lock().expect("lock").clone();
        text
    }
}

fn collect(mut pipe: impl Read + Send + 'static) -> Reader {
    let text = Arc::new(Mutex::new(String::new()));
    let sink = text.clone();
    let thread = std::thread::spawn(move || {
        let mut buf = [0u8; 4096];
        while let Ok(n) = pipe.read(&mut buf) {
            if n == 0 {
                break;
            }
            let chunk = String::from_utf8_lossy(&buf[..n]).into_owned();
            sink.lock().expect("lock").push_str(&chunk);
        }
    });
    Reader { text, thread }
}

fn wait_exit(child: &mut Child) -> i32 {
    for _ in 0..POLLS {
        if let Some(status) = child.try_wait().expect("wait") {
            return status
                .code()
                .expect("exited with a code, not killed by the signal");
        }
        std::thread::sleep(Duration::from_millis(50));
    }
    let _ = child.kill();
    panic!("siccant did not stop after SIGINT");
}

fn interrupt_batch(args: &[&str]) -> (i32, String, String) {
    let mut child = spawn(args);
    let out = collect(child.stdout.take().expect("stdout"));
    let err = collect(child.stderr.take().expect("stderr"));
    wait_for_handler(&child);
    sigint(&child);
    let code = wait_exit(&mut child);
    (code, out.finish(), err.finish())
}

#[test]
fn ctrl_c_stops_run_with_exit_130_and_prints_no_values() {
    let (_dir, path) = sheet(LONG_SHEET);
    let (code, stdout, stderr) = interrupt_batch(&["run", path.to_str().expect("utf-8")]);
    assert_eq!(code, 130, "stderr: {stderr}");
    assert!(stderr.contains("interrupted"), "stderr: {stderr}");
    assert!(stdout.trim().is_empty(), "no values after Ctrl-C: {stdout}");
    // When the sweep saw the flag, the diagnostic names the statement.
    if stderr.contains("interrupted after") {
        assert!(stderr.contains("long.sicc:4:"), "stderr: {stderr}");
    }
}

#[test]
fn ctrl_c_stops_record_and_writes_nothing() {
    let (dir, path) = sheet(LONG_SHEET);
    let record = dir.path().join("out.html");
    let args = [
        "record",
        path.to_str().expect("utf-8"),
        "-o",
        record.to_str().expect("utf-8"),
    ];
    let (code, _stdout, stderr) = interrupt_batch(&args);
    assert_eq!(code, 130, "stderr: {stderr}");
    assert!(stderr.contains("no record written"), "stderr: {stderr}");
    assert!(!Path::new(&record).exists(), "a record was written");
    let leftovers = std::fs::read_dir(dir.path()).expect("dir").count();
    assert_eq!(leftovers, 1, "only the worksheet is left in the folder");
}

#[test]
fn ctrl_c_in_the_repl_stops_the_cell_and_keeps_the_session() {
    let mut child = spawn(&["repl"]);
    let mut stdin = child.stdin.take().expect("stdin");
    let out = collect(child.stdout.take().expect("stdout"));
    let _err = collect(child.stderr.take().expect("stderr"));
    wait_for_handler(&child);
    let mut send = |cell: &str, shows: &str| {
        stdin
            .write_all(format!("{cell}\n").as_bytes())
            .expect("write");
        stdin.flush().expect("flush");
        let shown = (0..POLLS).any(|_| {
            std::thread::sleep(Duration::from_millis(50));
            out.contains(shows)
        });
        assert!(shown, "`{cell}` never showed `{shows}`");
    };
    send("k = 7 m", "k = 7 m");
    send("input T_air = 60 degC", "T_air = ");
    send("Tw = air(T: T_air, rh: 20 %).wetbulb", "Tw = ");
    let long = "study = sweep([Tw], T_air: steps(20 degC, 90 degC, 0.0001 K))";
    stdin
        .write_all(format!("{long}\n").as_bytes())
        .expect("write");
    stdin.flush().expect("flush");
    // Keep pressing Ctrl-C until the cell reports it stopped (a press that
    // lands before the cell starts is cleared when it starts). Only this cell
    // can be interrupted: the earlier ones have shown their results.
    let stopped = (0..POLLS).any(|_| {
        sigint(&child);
        std::thread::sleep(Duration::from_millis(50));
        out.contains("interrupted")
    });
    assert!(stopped, "the cell never reported the interruption");
    stdin.write_all(b"k * 2\n").expect("write");
    drop(stdin);
    let code = wait_exit(&mut child);
    let text = out.finish();
    assert_eq!(code, 0, "stdout: {text}");
    let after = text.rsplit("interrupted").next().unwrap_or_default();
    assert!(after.contains("14 m"), "the session survived: {text}");
}
