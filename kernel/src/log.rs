//! Kernel log lines on stderr (Jupyter servers keep a kernel's stderr in their log).

use std::time::{SystemTime, UNIX_EPOCH};

/// Write one log line: `[siccant-kernel <unix seconds>] <level>: <message>`.
pub fn line(level: &str, message: &str) {
    let now = SystemTime::now()
        .duration_since(UNIX_EPOCH)
        .map(|d| d.as_secs_f64())
        .unwrap_or(0.0);
    eprintln!("[siccant-kernel {now:.3}] {level}: {message}");
}

/// Log a complaint about a message from a client (it was dropped or answered with an error).
pub fn complaint(channel: &str, message: &str) {
    line("complaint", &format!("{channel}: {message}"));
}

/// Log a problem of the kernel's own (socket errors and the like).
pub fn problem(message: &str) {
    line("error", message);
}

/// Log what the kernel is doing.
pub fn info(message: &str) {
    line("info", message);
}
