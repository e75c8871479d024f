//! The interactive REPL (placeholder until the rustyline front end lands).

/// Run the REPL; returns the exit code.
pub fn run() -> i32 {
    0
}
