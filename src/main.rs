//! The `siccant` binary: a thin shell over [`siccant::cli`].

fn main() {
    // Evaluate on a thread with a roomy stack: deeply nested (but accepted)
    // expressions must never overflow it.
    let worker = std::thread::Builder::new()
        .stack_size(256 * 1024 * 1024)
        .spawn(siccant::cli::main);
    let code = match worker.map(|h| h.join()) {
        Ok(Ok(code)) => code,
        _ => 1,
    };
    std::process::exit(code);
}
