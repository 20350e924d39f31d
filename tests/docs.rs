//! The examples in README.md (and docs/*.md) are run and their output compared, so that a
//! changed number fails here until the document is updated.
//!
//! An example is a ```sh block holding one `pvhazard ...` command (or starting with
//! `cargo run --release -- ...`), followed by a ```text block with what it prints. A line `...` in the text stands for any lines (none or many)
//! that the document leaves out; every other line must appear, in order and exactly, in
//! the output (trailing spaces aside). Commands run in a scratch folder holding a copy of
//! the sample sites and templates, with the date pinned by SOURCE_DATE_EPOCH.

use std::path::{Path, PathBuf};

/// A command and the text the document says it prints, with where it stands.
struct Example {
    file: String,
    line: usize,
    args: Vec<String>,
    expected: Vec<String>,
}

/// The examples of one Markdown file.
fn examples(path: &Path) -> Vec<Example> {
    let text = std::fs::read_to_string(path).unwrap();
    let mut blocks: Vec<(usize, String, Vec<String>)> = Vec::new();
    let mut open: Option<(usize, String, Vec<String>)> = None;
    for (i, line) in text.lines().enumerate() {
        match (&mut open, line.strip_prefix("```")) {
            (None, Some(lang)) => open = Some((i + 1, lang.trim().to_string(), Vec::new())),
            (Some(_), Some(_)) => blocks.push(open.take().unwrap()),
            (Some((_, _, body)), None) => body.push(line.to_string()),
            (None, None) => {}
        }
    }
    blocks
        .windows(2)
        .filter_map(|w| {
            let ((line, lang, body), next, output) = (&w[0], &w[1].1, &w[1].2);
            if lang != "sh" || next != "text" {
                return None;
            }
            // One `pvhazard ...` line, or a block that starts by building and running it.
            let command = match body.as_slice() {
                [one] => one.strip_prefix("pvhazard ")?,
                [first, ..] => first.strip_prefix("cargo run --release -- ")?,
                [] => return None,
            };
            // Synopses (`[--json]`, `GAS`) are not examples.
            if command.contains('[') || command.contains('|') || command.contains('>') {
                return None;
            }
            Some(Example {
                file: path.display().to_string(),
                line: *line,
                args: split(command),
                expected: output.clone(),
            })
        })
        .collect()
}

/// Splits a command line as a POSIX shell does for plain and double-quoted words.
fn split(command: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut word = String::new();
    let (mut quoted, mut any) = (false, false);
    for c in command.chars() {
        match c {
            '"' => {
                quoted = !quoted;
                any = true;
            }
            ' ' if !quoted => {
                if any {
                    out.push(std::mem::take(&mut word));
                    any = false;
                }
            }
            _ => {
                word.push(c);
                any = true;
            }
        }
    }
    if any {
        out.push(word);
    }
    out
}

/// Whether `actual` holds every line of `expected` in order, `...` standing for any lines;
/// on a mismatch, the first expected line not found.
fn matches(expected: &[String], actual: &[&str]) -> Result<(), String> {
    let mut at = 0;
    let mut gap = false;
    for e in expected {
        if e.trim() == "..." {
            gap = true;
            continue;
        }
        let e = e.trim_end();
        let found = if gap {
            actual[at..]
                .iter()
                .position(|a| a.trim_end() == e)
                .map(|p| at + p)
        } else {
            (actual.get(at).map(|a| a.trim_end()) == Some(e)).then_some(at)
        };
        match found {
            Some(p) => at = p + 1,
            None => return Err(e.to_string()),
        }
        gap = false;
    }
    if gap || at == actual.len() {
        Ok(())
    } else {
        Err(format!("(more output after line {at}, and no `...`)"))
    }
}

fn documents() -> Vec<PathBuf> {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut out = vec![root.join("README.md")];
    if let Ok(dir) = std::fs::read_dir(root.join("docs")) {
        let mut more: Vec<PathBuf> = dir
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|p| p.extension().is_some_and(|x| x == "md"))
            .collect();
        more.sort();
        out.extend(more);
    }
    out
}

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let e = e.unwrap();
        std::fs::copy(e.path(), to.join(e.file_name())).unwrap();
    }
}

#[test]
fn every_documented_example_prints_what_the_document_says() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let scratch = std::env::temp_dir().join(format!("pvhazard-docs-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&scratch);
    let mut failures = Vec::new();
    let mut ran = 0;
    for doc in documents() {
        for ex in examples(&doc) {
            // Each example in a folder of its own: worksheets are never written over.
            let cwd = scratch.join(format!("{}", ran));
            copy_dir(&root.join("sample_sites"), &cwd.join("sample_sites"));
            copy_dir(&root.join("templates"), &cwd.join("templates"));
            let out = std::process::Command::new(env!("CARGO_BIN_EXE_pvhazard"))
                .args(&ex.args)
                .current_dir(&cwd)
                .env("SOURCE_DATE_EPOCH", "1798761600")
                .output()
                .unwrap();
            ran += 1;
            let stdout =
                String::from_utf8_lossy(&out.stdout).replace(&cwd.display().to_string(), ".");
            let lines: Vec<&str> = stdout.lines().collect();
            if let Err(line) = matches(&ex.expected, &lines) {
                failures.push(format!(
                    "{}:{}: `pvhazard {}`: the document's line\n    {line}\nis not in the output:\n{stdout}",
                    ex.file,
                    ex.line,
                    ex.args.join(" ")
                ));
            }
        }
    }
    let _ = std::fs::remove_dir_all(&scratch);
    assert!(ran >= 10, "only {ran} examples found");
    assert!(
        failures.is_empty(),
        "{} of {ran} examples differ:\n\n{}",
        failures.len(),
        failures.join("\n\n")
    );
}

#[test]
fn the_elision_rule_is_strict_where_it_should_be() {
    let e = |lines: &[&str]| lines.iter().map(|s| s.to_string()).collect::<Vec<_>>();
    assert!(matches(&e(&["a", "...", "c"]), &["a", "b", "c"]).is_ok());
    assert!(matches(&e(&["a", "c"]), &["a", "b", "c"]).is_err());
    assert!(matches(&e(&["a", "..."]), &["a", "b"]).is_ok());
    assert!(matches(&e(&["a"]), &["a", "b"]).is_err());
    assert!(matches(&e(&["b", "a"]), &["a", "b"]).is_err());
}
