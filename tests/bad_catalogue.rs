//! The catalogue of bad worksheets in `tests/bad/`: each one is run through
//! the `siccant run` binary, which must not panic, must exit with the
//! annotated code, must print no non-finite number, and must report the
//! annotated message at the annotated place. The header format is described
//! in tests/bad/README.md.

use std::path::{Path, PathBuf};
use std::process::Command;

/// What one bad worksheet's header comments expect.
#[derive(Debug, Default)]
struct Expect {
    /// `run` (default) or `check`.
    command: String,
    args: Vec<String>,
    exit: i32,
    /// (line, column, fragment) of diagnostics in this file
    errors: Vec<(usize, usize, String)>,
    /// fragments that stderr must contain (diagnostics in other text)
    messages: Vec<String>,
    /// fragments that stdout must contain
    outputs: Vec<String>,
}

fn catalogue_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/bad")
}

fn worksheets() -> Vec<PathBuf> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(catalogue_dir())
        .expect("tests/bad exists")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|e| e == "sicc"))
        .filter(|p| !file_name(p).starts_with('_'))
        .collect();
    files.sort();
    files
}

fn file_name(p: &Path) -> String {
    p.file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default()
}

/// Read the `# key: value` header lines at the top of a worksheet.
fn expectations(text: &str) -> Result<Expect, String> {
    let mut e = Expect {
        exit: 1,
        command: "run".into(),
        ..Expect::default()
    };
    for line in text.lines().take_while(|l| l.starts_with('#')) {
        let Some((key, value)) = line[1..].split_once(':') else {
            continue;
        };
        let value = value.trim().to_string();
        match key.trim() {
            "arg" => e.args.push(value),
            "command" => e.command = value,
            "expect-exit" => e.exit = value.parse().map_err(|_| format!("bad exit `{value}`"))?,
            "expect-error" => e.errors.push(location(&value)?),
            "expect-message" => e.messages.push(value),
            "expect-output" => e.outputs.push(value),
            _ => {}
        }
    }
    if e.errors.is_empty() && e.messages.is_empty() && e.outputs.is_empty() {
        return Err("no expect-error, expect-message or expect-output line".into());
    }
    Ok(e)
}

/// `L:C fragment` -> (L, C, fragment)
fn location(spec: &str) -> Result<(usize, usize, String), String> {
    let (place, fragment) = spec.split_once(' ').ok_or(format!("bad spec `{spec}`"))?;
    let (l, c) = place
        .split_once(':')
        .ok_or(format!("bad place `{place}`"))?;
    let parse = |s: &str| {
        s.parse::<usize>()
            .map_err(|_| format!("bad place `{place}`"))
    };
    Ok((parse(l)?, parse(c)?, fragment.trim().to_string()))
}

/// Diagnostics on stderr: (file, line, column, whole block text).
fn diagnostics(stderr: &str) -> Vec<(String, usize, usize, String)> {
    let mut blocks: Vec<String> = Vec::new();
    for line in stderr.lines() {
        if line.starts_with("error:") || line.starts_with("warning:") || blocks.is_empty() {
            blocks.push(String::new());
        }
        if let Some(b) = blocks.last_mut() {
            b.push_str(line);
            b.push('\n');
        }
    }
    blocks
        .into_iter()
        .filter_map(|b| {
            let at = b.lines().find_map(|l| l.trim().strip_prefix("┌─ "))?;
            let mut parts = at.rsplitn(3, ':');
            let col = parts.next()?.trim().parse().ok()?;
            let line = parts.next()?.parse().ok()?;
            let file = parts.next()?.to_string();
            Some((file, line, col, b))
        })
        .collect()
}

/// Words that would be a non-finite number shown to a reader. Text quoted
/// in backticks (the user's own input echoed back) is skipped.
fn non_finite_words(text: &str) -> Vec<String> {
    let unquoted: String = text
        .split('`')
        .enumerate()
        .filter(|(i, _)| i % 2 == 0)
        .map(|(_, s)| s)
        .collect::<Vec<_>>()
        .join(" ");
    unquoted
        .split(|c: char| !(c.is_alphanumeric() || c == '_'))
        .filter(|w| matches!(w.to_ascii_lowercase().as_str(), "nan" | "inf" | "infinity"))
        .map(str::to_string)
        .collect()
}

/// Run one worksheet (text and JSON formats) and list what is wrong.
fn check_one(path: &Path) -> Vec<String> {
    let name = file_name(path);
    let text = std::fs::read_to_string(path).unwrap_or_default();
    let expect = match expectations(&text) {
        Ok(e) => e,
        Err(why) => return vec![format!("{name}: header: {why}")],
    };
    let mut problems = Vec::new();
    // `check` has one output format.
    let formats: &[&str] = if expect.command == "run" {
        &["text", "json"]
    } else {
        &["text"]
    };
    for &format in formats {
        let mut command = Command::new(env!("CARGO_BIN_EXE_siccant"));
        command
            .current_dir(catalogue_dir())
            .arg(&expect.command)
            .arg(&name)
            .args(&expect.args);
        if expect.command == "run" {
            command.args(["--format", format]);
        }
        let out = command.output().expect("the siccant binary runs");
        let stdout = String::from_utf8_lossy(&out.stdout);
        let stderr = String::from_utf8_lossy(&out.stderr);
        let mut fail = |what: String| problems.push(format!("{name} ({format}): {what}"));
        let code = out.status.code();
        if code == Some(101) || stderr.contains("panicked") {
            fail(format!("panicked:\n{stderr}"));
            continue;
        }
        if code != Some(expect.exit) {
            fail(format!("exit {code:?}, want {}\n{stderr}", expect.exit));
        }
        let words = non_finite_words(&format!("{stdout}\n{stderr}"));
        if !words.is_empty() {
            fail(format!(
                "non-finite number shown: {words:?}\n{stdout}{stderr}"
            ));
        }
        let diags = diagnostics(&stderr);
        for (line, col, fragment) in &expect.errors {
            let hit = diags.iter().any(|(f, l, c, block)| {
                f.ends_with(&name) && l == line && c == col && block.contains(fragment.as_str())
            });
            if !hit {
                fail(format!("want {line}:{col} `{fragment}`, got:\n{stderr}"));
            }
        }
        for m in expect
            .messages
            .iter()
            .filter(|m| !stderr.contains(m.as_str()))
        {
            fail(format!("stderr lacks `{m}`:\n{stderr}"));
        }
        if format == "text" {
            for o in expect
                .outputs
                .iter()
                .filter(|o| !stdout.contains(o.as_str()))
            {
                fail(format!("stdout lacks `{o}`:\n{stdout}"));
            }
        }
    }
    problems
}

#[test]
fn catalogue_has_at_least_a_hundred_bad_worksheets() {
    let n = worksheets().len();
    assert!(n >= 100, "only {n} bad worksheets in tests/bad");
}

#[test]
fn every_bad_worksheet_fails_clearly_at_its_place() {
    let files = worksheets();
    let problems: Vec<String> = files.iter().flat_map(|p| check_one(p)).collect();
    assert!(
        problems.is_empty(),
        "{} problems in {} bad worksheets:\n\n{}",
        problems.len(),
        files.len(),
        problems.join("\n\n")
    );
}

#[test]
fn the_header_reader_and_the_non_finite_scan_work() {
    let e = expectations("# bad: x\n# arg: --set\n# expect-exit: 2\n# expect-error: 3:5 boom here\nx = 1\n# expect-error: 9:9 not a header\n");
    let e = e.expect("header parses");
    assert_eq!(e.args, ["--set"]);
    assert_eq!(e.exit, 2);
    assert_eq!(e.errors, [(3, 5, "boom here".to_string())]);
    assert!(expectations("x = 1\n").is_err());
    assert_eq!(non_finite_words("x = NaN m, y = -inf"), ["NaN", "inf"]);
    assert!(non_finite_words("`inf` is not finite; infinite; data/inf_cell.csv").is_empty());
    let d = diagnostics("error: boom\n  ┌─ a.sicc:3:7\n  │\nwarning: w\n  ┌─ b.sicc:1:1\n");
    assert_eq!(d.len(), 2);
    assert_eq!((d[0].1, d[0].2), (3, 7));
    assert!(d[0].3.contains("boom"));
}
