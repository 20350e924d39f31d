//! The examples in README.md (and docs/*.md) are run and their output compared, so that a
//! changed number fails here until the document is updated.
//!
//! An example is a ```sh block holding one `pvhazard ...` command (or starting with
//! `cargo run --release -- ...`), followed by a ```text block with what it prints. A line `...` in the text stands for any lines (none or many)
//! that the document leaves out; every other line must appear, in order and exactly, in
//! the output (trailing spaces aside). A ```text block that opens with `$ pvhazard ...` is a
//! transcript: the lines after it are what the command prints on its output and then its
//! error stream (a refusal's message). Commands run in a scratch folder holding a copy of
//! the sample sites and templates, with the date pinned by SOURCE_DATE_EPOCH.

use std::path::{Path, PathBuf};

/// A command and the text the document says it prints, with where it stands.
struct Example {
    file: String,
    line: usize,
    args: Vec<String>,
    expected: Vec<String>,
    /// A transcript: the error stream is part of what it shows.
    transcript: bool,
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
    let transcripts = blocks.iter().filter_map(|(line, lang, body)| {
        let command = body.first()?.strip_prefix("$ pvhazard ")?;
        (lang == "text").then(|| Example {
            file: path.display().to_string(),
            line: *line,
            args: split(command),
            expected: body[1..].to_vec(),
            transcript: true,
        })
    });
    let mut out: Vec<Example> = blocks
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
                transcript: false,
            })
        })
        .collect();
    out.extend(transcripts);
    out
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
            let mut stdout =
                String::from_utf8_lossy(&out.stdout).replace(&cwd.display().to_string(), ".");
            if ex.transcript {
                stdout.push_str(&String::from_utf8_lossy(&out.stderr));
            }
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

/// Where a claim's numbers are read: the command's standard output, or the text of the one
/// PDF it writes into its `--out` folder.
enum Read {
    Stdout,
    Pdf,
}

/// A number a document states in its prose, not in an example's output, and the command
/// whose output holds it. When the tool's answer changes, the output no longer holds the
/// number and the test names the document to correct (and this table with it).
struct Claim {
    file: &'static str,
    /// The command after `pvhazard`, as a shell would read it.
    command: &'static str,
    read: Read,
    /// Each as the document prints it and as the output holds it (a minus sign as `-`).
    numbers: &'static [&'static str],
}

const CLAIMS: &[Claim] = &[
    Claim {
        file: "README.md",
        command: "worksheet sample_sites/larkspur-fabrication.toml --tag AR-101 --work-order WO-2291 --out out",
        read: Read::Pdf,
        numbers: &[
            "208 m",
            "1.006 bar(a)",
            "15.7 m",
            "-15.2 °C",
            "12.5 °C",
            "-22.1 °C",
            "12.2 °C",
            "2.701 MJ",
            "397.4 s",
            "326.8 s",
            "-126.8 °C",
            "2.729 MJ",
            "326.9 s",
        ],
    },
    Claim {
        file: "docs/worksheets.md",
        command: "worksheet sample_sites/kestrel-fill-room.toml --tag BA-07 --out out",
        read: Read::Pdf,
        numbers: &[
            "138.1 °F",
            "59.0 °C",
            "136.9 °F",
            "5419 psia",
            "262.8 °F",
            "1316 psi/min",
        ],
    },
    Claim {
        file: "docs/check.md",
        command: "check sample_sites/kestrel-fill-room.toml --model ideal",
        read: Read::Stdout,
        numbers: &["12.57 MJ"],
    },
    Claim {
        file: "docs/check.md",
        command: "check sample_sites/kestrel-fill-room.toml",
        read: Read::Stdout,
        numbers: &["148 psi/min"],
    },
    Claim {
        file: "docs/vent.md",
        command: r#"vent --gas nitrogen --volume "500 L" --pressure "8 barg" --orifice "6 mm" --process isothermal"#,
        read: Read::Stdout,
        numbers: &["341.0 s", "5.68 min"],
    },
    Claim {
        file: "docs/vent.md",
        command: r#"vent --gas air --volume "2 m3" --pressure "10 barg" --orifice "12 mm" --heat-transfer lumped --wall-mass "540 kg" --process isothermal"#,
        read: Read::Stdout,
        numbers: &["376.3 s"],
    },
    Claim {
        file: "docs/fill.md",
        command: r#"fill --gas air --volume "6.8 L" --from "20 bara" --to "300 bara" --rate "100 bar/min" --rated-temperature "65 C" --construction composite --liner plastic"#,
        read: Read::Stdout,
        numbers: &["1.124 kg", "2.711 kg"],
    },
    Claim {
        file: "docs/fill.md",
        command: r#"fill --gas air --volume "6.8 L" --from "20 bara" --to "300 bara" --rate "100 bar/min" --rated-temperature "65 C" --construction composite --liner aluminium"#,
        read: Read::Stdout,
        numbers: &["58.2 °C", "59.6 °C", "195 bar/min"],
    },
    Claim {
        file: "docs/gas-models.md",
        command: r#"energy --gas air --volume "1 m3" --pressure "10 barg""#,
        read: Read::Stdout,
        numbers: &["1.01 % lower", "0.774 K colder"],
    },
];

/// All the text of the one PDF in `dir`.
fn pdf_text(dir: &Path) -> String {
    let pdf = std::fs::read_dir(dir)
        .expect("the worksheet folder")
        .map(|e| e.expect("an entry").path())
        .find(|p| p.extension().is_some_and(|x| x == "pdf"))
        .expect("a PDF");
    let doc = lopdf::Document::load(&pdf).expect("the PDF parses");
    let pages: Vec<u32> = doc.get_pages().keys().copied().collect();
    doc.extract_text(&pages).expect("the PDF's text")
}

#[test]
fn the_numbers_the_documents_state_in_prose_are_what_the_tool_prints() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let scratch = std::env::temp_dir().join(format!("pvhazard-prose-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&scratch);
    let mut failures = Vec::new();
    for (i, claim) in CLAIMS.iter().enumerate() {
        let doc = std::fs::read_to_string(root.join(claim.file))
            .expect("the document")
            .replace('−', "-")
            .split_whitespace()
            .collect::<Vec<_>>()
            .join(" ");
        let cwd = scratch.join(i.to_string());
        copy_dir(&root.join("sample_sites"), &cwd.join("sample_sites"));
        let out = std::process::Command::new(env!("CARGO_BIN_EXE_pvhazard"))
            .args(split(claim.command))
            .current_dir(&cwd)
            .env("SOURCE_DATE_EPOCH", "1798761600")
            .output()
            .unwrap();
        let text = match claim.read {
            Read::Stdout => String::from_utf8_lossy(&out.stdout).into_owned(),
            Read::Pdf => pdf_text(&cwd.join("out")),
        };
        let text = text.split_whitespace().collect::<Vec<_>>().join(" ");
        for n in claim.numbers {
            if !doc.contains(n) {
                failures.push(format!("{}: does not state '{n}' any more: correct the table of claims in tests/docs.rs", claim.file));
            } else if !text.contains(n) {
                failures.push(format!(
                    "{}: states '{n}', which `pvhazard {}` no longer prints: correct the document (and the table of claims)",
                    claim.file,
                    claim.command
                ));
            }
        }
    }
    let _ = std::fs::remove_dir_all(&scratch);
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn the_readme_stays_short_and_its_test_command_is_the_one_ci_runs() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let readme = std::fs::read_to_string(root.join("README.md")).expect("README.md");
    let lines = readme.lines().count();
    assert!(
        lines < 400,
        "README.md is {lines} lines; the manual lives in docs/"
    );
    // The first block of "Three commands": the main job, then the tests (the third, the
    // web page, follows in a block of its own).
    let section = readme
        .split("## Three commands on a fresh machine")
        .nth(1)
        .expect("the commands section");
    let block = section
        .split("```sh\n")
        .nth(1)
        .and_then(|b| b.split("```").next())
        .expect("its commands");
    let commands: Vec<&str> = block.lines().collect();
    assert_eq!(commands.len(), 2, "{commands:?}");
    assert!(commands[0].starts_with("cargo run --release -- "));
    let ci = std::fs::read_to_string(root.join(".ci/run")).expect(".ci/run");
    let ci_runs = ci
        .lines()
        .map(str::trim)
        .any(|l| l == commands[1] || l == format!("{} --locked", commands[1]));
    assert!(
        ci_runs,
        "CI does not run the README's test command `{}`",
        commands[1]
    );
    // CI runs it in the same profile as the first command, so the second reuses its build.
    assert!(commands[1].contains("--release"));
}
