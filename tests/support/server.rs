//! A pvhazard server for a test: started on a free port of the loopback address, stopped
//! when dropped; and a small HTTP/1.1 client that sends exactly the bytes it is given.
//! Shared by the API and browser tests, each of which uses part of it.
#![allow(dead_code)]

use std::io::{BufRead, BufReader, Read, Write};
use std::net::TcpStream;
use std::path::Path;
use std::process::{Child, Command, Stdio};
use std::time::Duration;

/// A running `pvhazard serve`.
pub struct Server {
    child: Child,
    /// `127.0.0.1:PORT`.
    pub addr: String,
}

impl Server {
    /// Starts `pvhazard serve --listen 127.0.0.1:0` with `args` and waits for its address.
    pub fn start(args: &[&str]) -> Server {
        let mut child = Command::new(env!("CARGO_BIN_EXE_pvhazard"))
            .args(["serve", "--listen", "127.0.0.1:0"])
            .args(args)
            .current_dir(env!("CARGO_MANIFEST_DIR"))
            .stdout(Stdio::piped())
            .stderr(Stdio::inherit())
            .spawn()
            .expect("pvhazard serve starts");
        let stdout = child.stdout.take().expect("its standard output");
        let mut line = String::new();
        BufReader::new(stdout)
            .read_line(&mut line)
            .expect("the address line");
        let addr = line
            .split("http://")
            .nth(1)
            .and_then(|r| r.split('/').next())
            .unwrap_or_else(|| panic!("no address in {line:?}"))
            .to_string();
        Server { child, addr }
    }

    /// The server's URL for `path`.
    pub fn url(&self, path: &str) -> String {
        format!("http://{}{path}", self.addr)
    }

    /// Sends `method path` with `body` (of `content_type`) and returns the status and body.
    pub fn request(&self, method: &str, path: &str, content_type: &str, body: &[u8]) -> Answer {
        request(&self.addr, method, path, content_type, body)
    }

    /// `POST /api/{calc}` with a JSON body.
    pub fn api(&self, calc: &str, json: &serde_json::Value) -> Answer {
        self.request(
            "POST",
            &format!("/api/{calc}"),
            "application/json",
            json.to_string().as_bytes(),
        )
    }
}

impl Drop for Server {
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}

/// An HTTP answer.
#[derive(Debug)]
pub struct Answer {
    /// The status code.
    pub status: u16,
    /// The head, lines as sent.
    pub head: String,
    /// The body (a chunked body is joined).
    pub body: Vec<u8>,
}

impl Answer {
    /// The body as text.
    pub fn text(&self) -> String {
        String::from_utf8_lossy(&self.body).into_owned()
    }
}

/// One request on a fresh connection; the path is sent as given, not normalised.
pub fn request(addr: &str, method: &str, path: &str, content_type: &str, body: &[u8]) -> Answer {
    let mut s = TcpStream::connect(addr).expect("connects");
    s.set_read_timeout(Some(Duration::from_secs(120))).ok();
    let head = format!(
        "{method} {path} HTTP/1.1\r\nHost: {addr}\r\nConnection: close\r\nContent-Type: {content_type}\r\nContent-Length: {}\r\n\r\n",
        body.len()
    );
    s.write_all(head.as_bytes()).expect("sends the head");
    // A server may answer (413) before reading a large body and close: a failed write of
    // the rest is then expected.
    let _ = s.write_all(body);
    read_answer(&mut s)
}

/// Reads one answer: the head, then a body of its Content-Length, or chunked, or to the end
/// (a client that waits for the end hangs on a server that keeps the connection open).
fn read_answer(s: &mut TcpStream) -> Answer {
    let mut raw = Vec::new();
    let mut buf = [0u8; 8192];
    let split = loop {
        if let Some(p) = raw.windows(4).position(|w| w == b"\r\n\r\n") {
            break p;
        }
        match s.read(&mut buf) {
            Ok(0) | Err(_) => panic!("no head in {:?}", String::from_utf8_lossy(&raw)),
            Ok(n) => raw.extend_from_slice(&buf[..n]),
        }
    };
    let head = String::from_utf8_lossy(&raw[..split]).into_owned();
    let status = head
        .split_whitespace()
        .nth(1)
        .and_then(|s| s.parse().ok())
        .expect("a status code");
    let lower = head.to_ascii_lowercase();
    let length: Option<usize> = lower
        .lines()
        .find_map(|l| l.strip_prefix("content-length:"))
        .and_then(|v| v.trim().parse().ok());
    let chunked = lower.contains("transfer-encoding: chunked");
    let mut body = raw[split + 4..].to_vec();
    loop {
        let done = match length {
            Some(n) => body.len() >= n,
            None if chunked => body.windows(5).any(|w| w == b"0\r\n\r\n"),
            None => false,
        };
        if done {
            break;
        }
        match s.read(&mut buf) {
            Ok(0) | Err(_) => break,
            Ok(n) => body.extend_from_slice(&buf[..n]),
        }
    }
    if chunked {
        body = unchunk(&body);
    }
    if let Some(n) = length {
        body.truncate(n);
    }
    Answer { status, head, body }
}

fn unchunk(mut b: &[u8]) -> Vec<u8> {
    let mut out = Vec::new();
    while let Some(eol) = b.windows(2).position(|w| w == b"\r\n") {
        let size =
            usize::from_str_radix(String::from_utf8_lossy(&b[..eol]).trim(), 16).unwrap_or(0);
        if size == 0 {
            break;
        }
        out.extend_from_slice(&b[eol + 2..eol + 2 + size]);
        b = &b[eol + 2 + size + 2..];
    }
    out
}

/// The repository's path for `rel`.
pub fn repo(rel: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join(rel)
        .to_string_lossy()
        .into_owned()
}
