//! `pvhazard serve`: the calculations and the site files as a local web page, with a JSON API
//! for scripts.
//!
//! The server is one more front to the same code as the command line: a form or a JSON
//! object becomes the command line's options ([`crate::cli::api`]), the assessment runs, and
//! the HTML renderer ([`crate::report::html`]) lays the report out. What a request can reach
//! is fixed when the server starts: the site files and templates named on its command line,
//! and the records folder, read only for records this server wrote.

mod form;
mod listen;
mod pages;
mod routes;
mod sites;

use std::net::SocketAddr;
use std::path::PathBuf;

use crate::site::Site;
use crate::template::Template;

/// Where the server listens unless told otherwise: this machine only.
pub const DEFAULT_LISTEN: &str = "127.0.0.1:8765";

/// What the server offers, fixed at its start.
#[derive(Debug)]
pub struct Config {
    /// The address to listen on.
    pub listen: SocketAddr,
    /// The site files given, loaded.
    pub sites: Vec<Site>,
    /// The folder worksheets are written to; without it, the site pages make none.
    pub records: Option<PathBuf>,
    /// Templates offered beside the built-in ones.
    pub templates: Vec<Template>,
}

/// Why the server could not run.
#[derive(Debug, thiserror::Error)]
pub enum ServeError {
    /// The address could not be listened on (in use, not this machine's, no permission).
    #[error("cannot listen on {addr}: {source}; accepted: a free port on an address of this machine, e.g. --listen 127.0.0.1:8766")]
    Listen {
        /// The address.
        addr: SocketAddr,
        /// Why.
        source: std::io::Error,
    },
    /// The runtime could not start.
    #[error("cannot start the server: {0}")]
    Runtime(std::io::Error),
}

/// Runs the server until the process is stopped; `ready` is told the address it listens on
/// (the port chosen, where port 0 was asked for) once it accepts connections.
pub fn run(config: Config, ready: impl FnOnce(SocketAddr)) -> Result<(), ServeError> {
    let runtime = tokio::runtime::Builder::new_multi_thread()
        .worker_threads(2)
        // The calculations run here; a few at a time is all two cores can do.
        .max_blocking_threads(4)
        .enable_io()
        .enable_time()
        .build()
        .map_err(ServeError::Runtime)?;
    runtime.block_on(async move {
        let listener = tokio::net::TcpListener::bind(config.listen)
            .await
            .map_err(|source| ServeError::Listen {
                addr: config.listen,
                source,
            })?;
        let addr = listener.local_addr().map_err(|source| ServeError::Listen {
            addr: config.listen,
            source,
        })?;
        ready(addr);
        listen::serve(listener, routes::router(config)).await;
        Ok(())
    })
}
