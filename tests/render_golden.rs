//! Rendering stays byte-identical: worksheets run in every output format and
//! compared with the outputs of the renderer before it was made faster
//! (tests/render_golden/README.md says how they were made).

use std::path::{Path, PathBuf};
use std::process::Command;

fn folder() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/render_golden")
}

fn siccant(args: &[&str]) -> String {
    let out = Command::new(env!("CARGO_BIN_EXE_siccant"))
        .args(args)
        .current_dir(folder())
        .output()
        .expect("siccant runs");
    String::from_utf8(out.stdout).expect("output is UTF-8")
}

fn golden(name: &str) -> String {
    std::fs::read_to_string(folder().join(name)).expect("golden output is there")
}

/// The first line that differs, for a readable failure.
fn first_difference(expected: &str, found: &str) -> String {
    let pairs = expected.lines().zip(found.lines()).enumerate();
    for (i, (e, f)) in pairs {
        if e != f {
            return format!("line {}:\nexpected {e}\nfound    {f}", i + 1);
        }
    }
    format!(
        "lengths differ: {} vs {} lines",
        expected.lines().count(),
        found.lines().count()
    )
}

const SHEETS: [&str; 3] = ["sweep_air", "sweep_failed", "mixed_units"];

#[test]
fn run_output_is_byte_identical_in_every_format() {
    for sheet in SHEETS {
        let file = format!("{sheet}.sicc");
        for format in ["text", "json", "markdown", "html"] {
            let found = siccant(&["run", "--format", format, &file]);
            let expected = golden(&format!("{sheet}.{format}"));
            assert!(
                found == expected,
                "{sheet} as {format}: {}",
                first_difference(&expected, &found)
            );
        }
    }
}

#[test]
fn record_tables_are_byte_identical() {
    // The tool's version line is left out: it changes with releases, not rendering.
    let without_version = |s: &str| {
        s.lines()
            .filter(|l| !l.starts_with("| Tool |"))
            .collect::<Vec<_>>()
            .join("\n")
    };
    let dir = std::env::temp_dir().join(format!("siccant-golden-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temporary folder");
    for sheet in ["sweep_air", "mixed_units"] {
        let out = dir.join(format!("{sheet}.md"));
        let file = format!("{sheet}.sicc");
        siccant(&[
            "record",
            "--reproducible",
            "-o",
            out.to_str().unwrap(),
            &file,
        ]);
        let found = std::fs::read_to_string(&out).expect("record written");
        let expected = golden(&format!("{sheet}.record.md"));
        let (expected, found) = (without_version(&expected), without_version(&found));
        assert!(
            found == expected,
            "{sheet} record: {}",
            first_difference(&expected, &found)
        );
    }
    let _ = std::fs::remove_dir_all(&dir);
}
