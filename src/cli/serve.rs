//! The `serve` command: its options, the files it is given, and the start of the server.

use std::io::Write;
use std::net::SocketAddr;

use clap::Args;

use super::Failure;
use crate::serve::{self, Config, DEFAULT_LISTEN};
use crate::site;
use crate::source::{FileError, Source};
use crate::template;

#[derive(Debug, Args)]
pub(super) struct ServeArgs {
    /// Address and port to listen on. Any address but a loopback one lets everyone on that network use the page (there are no user accounts) [default: 127.0.0.1:8765].
    #[arg(long, value_name = "ADDR:PORT")]
    listen: Option<SocketAddr>,
    /// A site file whose items the page ranks and makes worksheets for; repeatable.
    #[arg(long, value_name = "SITE.toml")]
    site: Vec<std::path::PathBuf>,
    /// Folder the worksheets' PDFs and JSON records are written to (created if missing), never over an existing record; without it, no worksheets are made.
    #[arg(long, value_name = "DIR")]
    records: Option<std::path::PathBuf>,
    /// A folder of template files (*.toml), offered beside the built-in templates.
    #[arg(long, value_name = "DIR")]
    templates: Option<std::path::PathBuf>,
}

/// The template files in `dir`, by name.
fn templates_in(dir: &std::path::Path) -> Result<Vec<template::Template>, FileError> {
    let unreadable = |e: std::io::Error| FileError {
        file: dir.to_path_buf(),
        line: 0,
        key: "--templates".to_string(),
        problem: format!(
            "cannot read the folder: {e}; accepted: a folder of template files (*.toml)"
        ),
    };
    let mut paths: Vec<std::path::PathBuf> = std::fs::read_dir(dir)
        .map_err(unreadable)?
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "toml") && p.is_file())
        .collect();
    paths.sort();
    paths
        .iter()
        .map(|p| template::parse(&Source::read(p)?))
        .collect()
}

pub(super) fn serve_command(a: ServeArgs) -> Result<String, Failure> {
    let sites = a
        .site
        .iter()
        .map(|p| site::load(p))
        .collect::<Result<Vec<_>, _>>()?;
    let templates = match &a.templates {
        Some(dir) => templates_in(dir)?,
        None => Vec::new(),
    };
    let default: SocketAddr = DEFAULT_LISTEN
        .parse()
        .map_err(|e| Failure::Internal(format!("the default address: {e}")))?;
    let listen = a.listen.unwrap_or(default);
    if !listen.ip().is_loopback() {
        eprintln!(
            "pvhazard: warning: listening on {listen}: anyone who can reach this address on the network can use the page and make worksheets; there are no user accounts"
        );
    }
    let config = Config {
        listen,
        sites,
        records: a.records,
        templates,
    };
    serve::run(config, |addr| {
        // The address first, on a line of its own, so that a script can read the port.
        let mut out = std::io::stdout().lock();
        let _ = writeln!(
            out,
            "pvhazard: serving on http://{addr}/ (stop with Ctrl-C)"
        );
        let _ = out.flush();
    })
    .map_err(|e| Failure::Refused(e.to_string()))?;
    Ok(String::new())
}
