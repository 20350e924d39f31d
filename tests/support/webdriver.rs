//! A small WebDriver client for the browser test: a headless Chromium driven through
//! chromedriver over the W3C WebDriver protocol (JSON over HTTP).

use std::net::TcpListener;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

use serde_json::{json, Value};

use super::server::request;

/// The key W3C WebDriver names an element by.
const ELEMENT: &str = "element-6066-11e4-a52e-4f735466cecf";

/// The browser and driver binaries Debian installs.
pub const CHROMIUM: &str = "/usr/bin/chromium";
pub const DRIVER: &str = "/usr/bin/chromedriver";

/// A chromedriver process and one browser session in it; both end when dropped.
pub struct Browser {
    driver: Child,
    addr: String,
    session: String,
}

/// An element on the page.
pub struct Element(String);

fn free_port() -> u16 {
    TcpListener::bind("127.0.0.1:0")
        .and_then(|l| l.local_addr())
        .map(|a| a.port())
        .expect("a free port")
}

impl Browser {
    /// Starts chromedriver and a headless Chromium with a fresh profile in `profile`,
    /// downloads going to `downloads`.
    pub fn start(profile: &Path, downloads: &Path) -> Browser {
        let port = free_port();
        let driver = Command::new(DRIVER)
            .arg(format!("--port={port}"))
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .expect("chromedriver starts");
        let addr = format!("127.0.0.1:{port}");
        let start = Instant::now();
        loop {
            if std::net::TcpStream::connect(&addr).is_ok() {
                break;
            }
            assert!(
                start.elapsed() < Duration::from_secs(30),
                "chromedriver did not start"
            );
            std::thread::sleep(Duration::from_millis(100));
        }
        let mut browser = Browser {
            driver,
            addr,
            session: String::new(),
        };
        let caps = json!({"capabilities": {"alwaysMatch": {
            "browserName": "chrome",
            "goog:chromeOptions": {
                "binary": CHROMIUM,
                "args": [
                    "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                    "--no-first-run", "--disable-background-networking",
                    "--disable-component-update", "--disable-sync",
                    format!("--user-data-dir={}", profile.display()),
                    "--window-size=1000,1200",
                ],
                "prefs": {
                    "download.default_directory": downloads.display().to_string(),
                    "download.prompt_for_download": false,
                },
            },
        }}});
        let v = browser.call("POST", "/session", &caps);
        browser.session = v["sessionId"]
            .as_str()
            .unwrap_or_else(|| panic!("no session: {v}"))
            .to_string();
        // Headless Chromium downloads only where it is told to.
        browser.call(
            "POST",
            &format!("/session/{}/goog/cdp/execute", browser.session),
            &json!({"cmd": "Browser.setDownloadBehavior", "params": {"behavior": "allow", "downloadPath": downloads.display().to_string()}}),
        );
        browser
    }

    fn call(&self, method: &str, path: &str, body: &Value) -> Value {
        let body = if method == "GET" || method == "DELETE" {
            Vec::new()
        } else {
            body.to_string().into_bytes()
        };
        let answer = request(&self.addr, method, path, "application/json", &body);
        let v: Value = serde_json::from_slice(&answer.body)
            .unwrap_or_else(|_| panic!("{method} {path}: {}", answer.text()));
        assert_eq!(answer.status, 200, "{method} {path}: {v}");
        v["value"].clone()
    }

    fn session_call(&self, method: &str, path: &str, body: &Value) -> Value {
        self.call(method, &format!("/session/{}{path}", self.session), body)
    }

    /// Goes to `url` and waits for the page.
    pub fn go(&self, url: &str) {
        self.session_call("POST", "/url", &json!({ "url": url }));
    }

    /// The first element matching a CSS selector.
    pub fn find(&self, css: &str) -> Element {
        let v = self.session_call(
            "POST",
            "/element",
            &json!({"using": "css selector", "value": css}),
        );
        Element(
            v[ELEMENT]
                .as_str()
                .unwrap_or_else(|| panic!("{css}: {v}"))
                .to_string(),
        )
    }

    /// The first element matching a CSS selector, waiting up to 30 s for it to appear (a
    /// page loading after a submit); on failure, the page's text is in the message.
    pub fn wait_for(&self, css: &str) -> Element {
        let start = Instant::now();
        loop {
            let v = self.session_call(
                "POST",
                "/elements",
                &json!({"using": "css selector", "value": css}),
            );
            if let Some(id) = v.get(0).and_then(|e| e[ELEMENT].as_str()) {
                return Element(id.to_string());
            }
            if start.elapsed() > Duration::from_secs(30) {
                let body = self.session_call(
                    "POST",
                    "/elements",
                    &json!({"using": "css selector", "value": "main"}),
                );
                let text = body
                    .get(0)
                    .and_then(|e| e[ELEMENT].as_str())
                    .map(|id| self.text(&Element(id.to_string())))
                    .unwrap_or_default();
                panic!("{css} did not appear; the page says:\n{text}");
            }
            std::thread::sleep(Duration::from_millis(200));
        }
    }

    /// The first element matching an XPath.
    pub fn xpath(&self, path: &str) -> Element {
        let v = self.session_call(
            "POST",
            "/element",
            &json!({"using": "xpath", "value": path}),
        );
        Element(
            v[ELEMENT]
                .as_str()
                .unwrap_or_else(|| panic!("{path}: {v}"))
                .to_string(),
        )
    }

    /// Clicks `e` (a button, a link, an option of a select).
    pub fn click(&self, e: &Element) {
        self.session_call("POST", &format!("/element/{}/click", e.0), &json!({}));
    }

    /// Types `text` into `e`.
    pub fn type_into(&self, e: &Element, text: &str) {
        self.session_call(
            "POST",
            &format!("/element/{}/value", e.0),
            &json!({ "text": text }),
        );
    }

    /// The rendered text of `e`.
    pub fn text(&self, e: &Element) -> String {
        self.session_call("GET", &format!("/element/{}/text", e.0), &json!({}))
            .as_str()
            .unwrap_or_default()
            .to_string()
    }

    /// The page's title.
    pub fn title(&self) -> String {
        self.session_call("GET", "/title", &json!({}))
            .as_str()
            .unwrap_or_default()
            .to_string()
    }

    /// Sets the window to `width` × `height` CSS pixels.
    pub fn resize(&self, width: u32, height: u32) {
        self.session_call(
            "POST",
            "/window/rect",
            &json!({"width": width, "height": height}),
        );
    }

    /// The page's full height, CSS pixels.
    pub fn page_height(&self) -> u32 {
        self.session_call(
            "POST",
            "/execute/sync",
            &json!({"script": "return document.documentElement.scrollHeight", "args": []}),
        )
        .as_u64()
        .unwrap_or(1200) as u32
    }

    /// A PNG of the whole page at `width`, written to `path`.
    pub fn screenshot(&self, width: u32, path: &Path) {
        self.resize(width, 800);
        let height = self.page_height().clamp(400, 6000);
        self.resize(width, height);
        let b64 = self.session_call("GET", "/screenshot", &json!({}));
        let png = base64(b64.as_str().unwrap_or_default());
        assert!(png.starts_with(b"\x89PNG"), "a PNG");
        std::fs::write(path, png).expect("writes the screenshot");
    }
}

impl Drop for Browser {
    fn drop(&mut self) {
        if !self.session.is_empty() {
            let _ = request(
                &self.addr,
                "DELETE",
                &format!("/session/{}", self.session),
                "application/json",
                b"",
            );
        }
        let _ = self.driver.kill();
        let _ = self.driver.wait();
    }
}

/// Decodes standard base64 (the screenshots WebDriver sends).
fn base64(text: &str) -> Vec<u8> {
    let value = |c: u8| match c {
        b'A'..=b'Z' => Some(c - b'A'),
        b'a'..=b'z' => Some(c - b'a' + 26),
        b'0'..=b'9' => Some(c - b'0' + 52),
        b'+' => Some(62),
        b'/' => Some(63),
        _ => None,
    };
    let digits: Vec<u8> = text.bytes().filter_map(value).collect();
    let mut out = Vec::with_capacity(digits.len() * 3 / 4);
    for chunk in digits.chunks(4) {
        let n = chunk
            .iter()
            .enumerate()
            .fold(0u32, |n, (i, &d)| n | (u32::from(d) << (18 - 6 * i)));
        out.extend_from_slice(&n.to_be_bytes()[1..chunk.len()]);
    }
    out
}

/// Waits up to `limit` for a file in `dir` whose name ends with `suffix` and that is whole
/// (no partial download beside it).
pub fn wait_for_file(dir: &Path, suffix: &str, limit: Duration) -> Option<PathBuf> {
    let start = Instant::now();
    while start.elapsed() < limit {
        let names: Vec<PathBuf> = std::fs::read_dir(dir)
            .map(|d| d.filter_map(|e| e.ok().map(|e| e.path())).collect())
            .unwrap_or_default();
        let partial = names
            .iter()
            .any(|p| p.extension().is_some_and(|x| x == "crdownload"));
        if let Some(p) = names.iter().find(|p| p.to_string_lossy().ends_with(suffix)) {
            if !partial {
                return Some(p.clone());
            }
        }
        std::thread::sleep(Duration::from_millis(200));
    }
    None
}
