//! The manual pages in docs/man are generated from the command line's own definitions: this
//! test renders them and fails where a committed page differs. Run it with
//! `PVHAZARD_WRITE_MAN=1` to write them afresh.

use clap::CommandFactory;
use std::path::Path;

/// Each page: its file name and its roff text.
fn pages() -> Vec<(String, Vec<u8>)> {
    let top = pvhazard::cli::Cli::command();
    let mut out = Vec::new();
    let mut render = |name: String, cmd: clap::Command| {
        let mut roff = Vec::new();
        clap_mangen::Man::new(cmd)
            .render(&mut roff)
            .expect("a manual page renders");
        out.push((format!("{name}.1"), roff));
    };
    for sub in top.get_subcommands() {
        if sub.get_name() == "help" {
            continue;
        }
        // Leaked: clap names a command with a `&'static str`; a test's few pages only.
        let name: &'static str = Box::leak(format!("pvhazard-{}", sub.get_name()).into_boxed_str());
        render(name.to_string(), sub.clone().name(name));
    }
    render("pvhazard".to_string(), top);
    out
}

#[test]
fn the_manual_pages_match_the_command_line() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/man");
    let write = std::env::var_os("PVHAZARD_WRITE_MAN").is_some();
    if write {
        std::fs::create_dir_all(&dir).unwrap();
    }
    for (name, roff) in pages() {
        let path = dir.join(&name);
        if write {
            std::fs::write(&path, &roff).unwrap();
            continue;
        }
        let committed = std::fs::read(&path)
            .unwrap_or_else(|e| panic!("{}: {e}; run with PVHAZARD_WRITE_MAN=1", path.display()));
        assert!(
            committed == roff,
            "{} is out of date; run `PVHAZARD_WRITE_MAN=1 cargo test --test man`",
            path.display()
        );
    }
}
