//! `pvhazard serve`: the JSON API answers what `--json` prints, refuses bad input by option,
//! and the server keeps to its limits (body size, paths, loopback by default).

#[path = "support/server.rs"]
mod server;

use std::io::{BufRead, BufReader, Read, Write};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use serde_json::{json, Value};
use server::{request, Server};

/// The command line for a JSON object of options: `--key value`, repeated for an array,
/// `--key` for true.
fn cli_json(calc: &str, options: &Value) -> (i32, String) {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_pvhazard"));
    cmd.arg(calc);
    for (k, v) in options.as_object().expect("an object") {
        match v {
            Value::Bool(true) => {
                cmd.arg(format!("--{k}"));
            }
            Value::Array(items) => {
                for i in items {
                    cmd.arg(format!("--{k}")).arg(i.as_str().expect("a string"));
                }
            }
            Value::String(s) => {
                cmd.arg(format!("--{k}")).arg(s);
            }
            other => {
                cmd.arg(format!("--{k}")).arg(other.to_string());
            }
        }
    }
    let out = cmd.arg("--json").output().expect("pvhazard runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8(out.stdout).expect("UTF-8"),
    )
}

fn cases() -> Vec<(&'static str, Value)> {
    vec![
        (
            "energy",
            json!({"gas": "air", "volume": "2 m3", "pressure": "10 barg"}),
        ),
        (
            "energy",
            json!({"gas": "nitrogen", "volume": "500 L", "pressure": "150 psig", "temperature": "30 C", "overpressure": ["20 kPa", "35 kPa"], "mawp": "12 barg", "empty-mass": "300 kg", "clearance": "10 m"}),
        ),
        (
            "energy",
            json!({"gas": "helium", "volume": "1 m3", "pressure": "2 MPa(a)", "work": "pressure-test", "model": "ideal", "energy-limit": "100 kJ"}),
        ),
        (
            "energy",
            json!({"gas": "argon", "volume": "20 gal", "pressure": "500 psig", "elevation": "1500 m", "units": "us"}),
        ),
        (
            "fill",
            json!({"gas": "air", "volume": "50 L", "from": "1 barg", "to": "200 barg"}),
        ),
        (
            "fill",
            json!({"gas": "hydrogen", "volume": "100 L", "from": "20 barg", "to": "350 barg", "rated-temperature": "65 C", "rate": "25 bar/min", "construction": "composite"}),
        ),
        (
            "fill",
            json!({"gas": "nitrogen", "volume": "50 L", "from": "1 barg", "to": "200 barg", "duration": "10 min", "empty-mass": "60 kg", "supply-temperature": "25 C"}),
        ),
        (
            "fill",
            json!({"gas": "oxygen", "volume": "10 L", "from": "5 bara", "to": "150 barg", "ambient-temperature": "30 C", "model": "ideal"}),
        ),
        (
            "vent",
            json!({"gas": "air", "volume": "2 m3", "pressure": "10 barg", "orifice": "10 mm"}),
        ),
        (
            "vent",
            json!({"gas": "nitrogen", "volume": "1 m3", "pressure": "30 barg", "within": "10 min", "process": "isothermal"}),
        ),
        (
            "vent",
            json!({"gas": "nitrogen", "volume": "500 L", "pressure": "50 barg", "orifice": "6 mm", "depressuring-check": true, "min-metal-temperature": "-29 C", "room-volume": "100 m3", "ventilation": "2 /h"}),
        ),
        (
            "vent",
            json!({"gas": "methane", "volume": "1 m3", "pressure": "8 barg", "orifice": "12 mm", "cd": 0.8, "heat-transfer": "lumped", "down-to": "1 barg"}),
        ),
    ]
}

#[test]
fn every_calculation_through_the_api_equals_the_command_lines_json() {
    let server = Server::start(&[]);
    for (calc, options) in cases() {
        let (code, expected) = cli_json(calc, &options);
        assert_eq!(code, 0, "{calc} {options}: the command line refused it");
        let answer = server.api(calc, &options);
        assert_eq!(answer.status, 200, "{calc} {options}: {}", answer.text());
        assert!(
            answer
                .head
                .to_ascii_lowercase()
                .contains("content-type: application/json"),
            "{}",
            answer.head
        );
        assert_eq!(answer.text(), expected, "{calc} {options}");
    }
}

#[test]
fn bad_inputs_answer_400_naming_the_option() {
    let server = Server::start(&[]);
    let bad = [
        (
            "energy",
            json!({"gas": "air", "volume": "2", "pressure": "10 barg"}),
            "volume",
        ),
        (
            "energy",
            json!({"gas": "air", "volume": "2 m3", "pressure": "10 bar"}),
            "pressure",
        ),
        (
            "energy",
            json!({"gas": "unobtainium", "volume": "2 m3", "pressure": "10 barg"}),
            "gas",
        ),
        (
            "energy",
            json!({"gas": "air", "volume": "2 m3"}),
            "pressure",
        ),
        (
            "energy",
            json!({"gas": "air", "volume": "2 m3", "pressure": "10 barg", "colour": "red"}),
            "colour",
        ),
        (
            "fill",
            json!({"gas": "air", "volume": "50 L", "from": "1 barg", "to": "200 barg", "rate": "25 bar/min", "csv": "/tmp/series.csv"}),
            "csv",
        ),
        (
            "fill",
            json!({"gas": "air", "volume": "50 L", "from": "1 barg", "to": "200 barg", "supply-pressure": "100 barg"}),
            "supply-pressure",
        ),
        (
            "vent",
            json!({"gas": "air", "volume": "2 m3", "pressure": "10 barg", "orifice": "10 mm", "depressuring-check": "yes"}),
            "depressuring-check",
        ),
        (
            "vent",
            json!({"gas": "air", "volume": "2 m3", "pressure": "10 barg", "orifice": "10 mm", "cd": 7}),
            "cd",
        ),
        (
            "vent",
            json!({"gas": "air", "volume": "2 m3", "pressure": "10 barg", "orifice": "10 mm", "process": "sideways"}),
            "process",
        ),
    ];
    for (calc, options, option) in bad {
        let answer = server.api(calc, &options);
        assert_eq!(answer.status, 400, "{calc} {options}: {}", answer.text());
        let v: Value = serde_json::from_slice(&answer.body).expect("a JSON error");
        let e = &v["error"];
        assert_eq!(e["option"], option, "{options}: {e}");
        for key in ["value", "accepted", "message"] {
            assert!(e[key].is_string(), "{key} in {e}");
        }
        assert!(!e["message"].as_str().unwrap_or_default().is_empty());
    }
    // The command line refuses the same input by the same option.
    let (code, _) = cli_json(
        "energy",
        &json!({"gas": "air", "volume": "2 m3", "pressure": "10 bar"}),
    );
    assert_eq!(code, 2);
    for body in [&b"[1, 2]"[..], b"{not json", b""] {
        let answer = server.request("POST", "/api/fill", "application/json", body);
        assert_eq!(answer.status, 400, "{}", answer.text());
        assert!(answer.text().contains("\"error\""));
    }
}

#[test]
fn a_body_over_one_mebibyte_is_refused_with_413() {
    let server = Server::start(&[]);
    let big = format!("{{\"gas\": \"{}\"}}", "a".repeat(1 << 20));
    let answer = server.request("POST", "/api/energy", "application/json", big.as_bytes());
    assert_eq!(answer.status, 413, "{}", answer.text());
    let form = format!("gas={}", "a".repeat(1 << 20));
    let answer = server.request(
        "POST",
        "/fill",
        "application/x-www-form-urlencoded",
        form.as_bytes(),
    );
    assert_eq!(answer.status, 413);
    // Just under the limit is read (and refused for its content, not its size).
    let near = format!("{{\"gas\": \"{}\"}}", "a".repeat((1 << 20) - 100));
    let answer = server.request("POST", "/api/energy", "application/json", near.as_bytes());
    assert_eq!(answer.status, 400, "{}", answer.text());
}

#[test]
fn paths_that_climb_out_or_name_files_lead_nowhere() {
    let dir = tempdir("traversal");
    std::fs::write(dir.join("secret.json"), "{}").expect("writes");
    let records = dir.to_string_lossy().into_owned();
    let server = Server::start(&["--records", &records]);
    for path in [
        "/../../../../etc/passwd",
        "/%2e%2e/%2e%2e/etc/passwd",
        "/records/..%2F..%2F..%2Fetc%2Fpasswd",
        "/records/../../etc/passwd",
        "/records/%2e%2e%2fsecret.json",
        "/records/secret.json",
        "/records/.lock",
        "/site/0",
        "/site/..%2F0",
        "/Cargo.toml",
        "/src/main.rs",
        "/favicon.ico",
    ] {
        let answer = server.request("GET", path, "text/plain", b"");
        assert_eq!(answer.status, 404, "{path}: {}", answer.text());
        assert!(!answer.text().contains("root:"), "{path}");
    }
    let answer = server.request("POST", "/api/..%2Fenergy", "application/json", b"{}");
    assert_eq!(answer.status, 404);
}

#[test]
fn the_forms_and_pages_answer_and_a_refusal_is_shown_beside_its_field() {
    let server = Server::start(&["--site", "sample_sites/kestrel-fill-room.toml"]);
    for path in ["/", "/energy", "/fill", "/vent", "/site/0"] {
        let answer = server.request("GET", path, "text/plain", b"");
        assert_eq!(answer.status, 200, "{path}");
        let text = answer.text();
        assert!(text.starts_with("<!DOCTYPE html>"), "{path}");
        assert!(
            !text.contains("<script"),
            "{path}: the pages need no script"
        );
        // An id names one element: the site page's items have no id of their own.
        let mut ids: Vec<&str> = text
            .split(" id=\"")
            .skip(1)
            .filter_map(|rest| rest.split('"').next())
            .collect();
        let all = ids.len();
        ids.sort_unstable();
        ids.dedup();
        assert_eq!(ids.len(), all, "{path}: an id used twice");
    }
    let form =
        "gas=air&volume=50&volume.unit=L&from=1&from.unit=bar&from.basis=g&to=200&to.unit=bar";
    let answer = server.request(
        "POST",
        "/fill",
        "application/x-www-form-urlencoded",
        form.as_bytes(),
    );
    assert_eq!(answer.status, 400);
    let text = answer.text();
    // The refusal sits in the field of --to, with the command line's message.
    let field = text.split("id=\"f-to\"").nth(1).expect("the to field");
    let error = field
        .split("class=\"error\"")
        .nth(1)
        .expect("an error beside it");
    assert!(error.contains("gauge or absolute"), "{error}");
    let answer = server.request(
        "POST",
        "/fill",
        "application/x-www-form-urlencoded",
        (form.to_string() + "&to.basis=g").as_bytes(),
    );
    assert_eq!(answer.status, 200);
    let text = answer.text();
    assert!(text.contains("id=\"decision\""));
    assert!(text.contains("<svg"), "the fill plot");
    assert!(text.contains("licensed or authorised"), "the deferral");
}

#[test]
fn the_default_address_is_this_machine_only_and_another_is_warned_about() {
    let help = Command::new(env!("CARGO_BIN_EXE_pvhazard"))
        .args(["serve", "--help"])
        .output()
        .expect("runs");
    assert!(String::from_utf8_lossy(&help.stdout).contains("[default: 127.0.0.1:8765]"));
    assert!(pvhazard::serve::DEFAULT_LISTEN
        .parse::<std::net::SocketAddr>()
        .expect("an address")
        .ip()
        .is_loopback());
    // Started without --listen, it listens on the loopback address (or says it cannot,
    // where another program holds the port).
    let mut child = Command::new(env!("CARGO_BIN_EXE_pvhazard"))
        .arg("serve")
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("starts");
    let mut line = String::new();
    let _ = BufReader::new(child.stdout.take().expect("stdout")).read_line(&mut line);
    let _ = child.kill();
    let out = child.wait_with_output().expect("ends");
    let said = line + &String::from_utf8_lossy(&out.stderr);
    assert!(said.contains("127.0.0.1:8765"), "{said}");
    assert!(!said.contains("warning"), "{said}");
    // Any other address is allowed only when asked for, with a warning.
    let mut child = Command::new(env!("CARGO_BIN_EXE_pvhazard"))
        .args(["serve", "--listen", "0.0.0.0:0"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("starts");
    let mut line = String::new();
    let _ = BufReader::new(child.stdout.take().expect("stdout")).read_line(&mut line);
    let _ = child.kill();
    let out = child.wait_with_output().expect("ends");
    let warned = String::from_utf8_lossy(&out.stderr);
    assert!(
        warned.contains("anyone") && warned.contains("no user accounts"),
        "{warned}"
    );
}

#[test]
fn a_client_that_never_finishes_its_request_is_disconnected() {
    let server = Server::start(&[]);
    let mut s = std::net::TcpStream::connect(&server.addr).expect("connects");
    s.write_all(b"GET / HTTP/1.1\r\nHost: x\r\n")
        .expect("half a head");
    s.set_read_timeout(Some(Duration::from_secs(60))).ok();
    let start = Instant::now();
    let mut buf = Vec::new();
    let _ = s.read_to_end(&mut buf);
    // Closed by the server's header timeout, well before the read timeout above.
    assert!(
        start.elapsed() < Duration::from_secs(45),
        "{:?}",
        start.elapsed()
    );
    // And the server still answers others.
    let answer = request(&server.addr, "GET", "/", "text/plain", b"");
    assert_eq!(answer.status, 200);
}

/// A fresh folder under the target directory.
fn tempdir(name: &str) -> std::path::PathBuf {
    let dir = std::path::Path::new(env!("CARGO_TARGET_TMPDIR"))
        .join(format!("serve-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("creates the folder");
    dir
}
