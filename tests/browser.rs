//! The web page in a real browser: a headless Chromium, driven through WebDriver, fills the
//! fill form, submits it and reads the decision and the peak temperature; makes a worksheet
//! from the site page and downloads its PDF. It takes a screenshot of each page on the way
//! (under target/tmp/screenshots) for a person to look at.
//!
//! Needs Debian's `chromium` and `chromium-driver`; with PVHAZARD_BROWSER=required (as CI
//! sets it) their absence fails the test, otherwise it is skipped with a note.

#[path = "support/server.rs"]
mod server;
#[path = "support/webdriver.rs"]
mod webdriver;

use std::path::{Path, PathBuf};
use std::time::Duration;

use server::Server;
use webdriver::{wait_for_file, Browser, CHROMIUM, DRIVER};

fn browser_present() -> bool {
    let present = Path::new(CHROMIUM).exists() && Path::new(DRIVER).exists();
    if !present {
        let required = std::env::var("PVHAZARD_BROWSER").is_ok_and(|v| v == "required");
        assert!(
            !required,
            "PVHAZARD_BROWSER=required, and {CHROMIUM} or {DRIVER} is missing (apt-get install chromium chromium-driver)"
        );
        eprintln!("note: browser test skipped: {CHROMIUM} and {DRIVER} are not installed (apt-get install chromium chromium-driver; PVHAZARD_BROWSER=required makes this a failure)");
    }
    present
}

fn fresh(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(name);
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("creates the folder");
    dir
}

/// Types a quantity into the form: its number, its unit and, for a pressure, its basis.
fn quantity(b: &Browser, option: &str, number: &str, unit: &str, basis: Option<&str>) {
    b.type_into(&b.find(&format!("input[name='{option}']")), number);
    b.click(&b.find(&format!(
        "select[name='{option}.unit'] option[value='{unit}']"
    )));
    if let Some(basis) = basis {
        b.click(&b.find(&format!(
            "select[name='{option}.basis'] option[value='{basis}']"
        )));
    }
}

/// The value shown beside a result's label.
fn result_value(b: &Browser, label: &str) -> String {
    b.text(&b.xpath(&format!(
        "//table[@class='entries']//th[normalize-space()='{label}']/following-sibling::td/span[@class='value']"
    )))
}

#[test]
fn a_crew_member_fills_the_forms_and_makes_a_worksheet_in_a_browser() {
    if !browser_present() {
        return;
    }
    let shots = fresh("screenshots");
    let records = fresh("browser-records");
    let downloads = fresh("browser-downloads");
    let profile = fresh("browser-profile");
    let server = Server::start(&[
        "--site",
        "sample_sites/kestrel-fill-room.toml",
        "--records",
        &records.to_string_lossy(),
    ]);
    let b = Browser::start(&profile, &downloads);
    let shot = |name: &str, width: u32| b.screenshot(width, &shots.join(format!("{name}.png")));

    b.go(&server.url("/"));
    assert!(b.title().contains("pvhazard"), "{}", b.title());
    shot("index", 1000);

    // The fill form, as at the fill station: 50 L cylinder, 1 barg to 200 barg at 25 bar/min.
    b.go(&server.url("/fill"));
    shot("fill-form", 1000);
    shot("fill-form-phone", 390);
    b.resize(1000, 1200);
    b.click(&b.find("select[name='gas'] option[value='air']"));
    quantity(&b, "volume", "50", "L", None);
    quantity(&b, "from", "1", "bar", Some("g"));
    quantity(&b, "to", "200", "bar", Some("g"));
    b.click(&b.find("form details summary"));
    quantity(&b, "rate", "25", "bar/min", None);
    quantity(&b, "rated-temperature", "65", "C", None);
    b.click(&b.find("form button[type='submit']"));
    let decision = b.text(&b.wait_for("#decision"));
    assert!(
        ["GO", "GO WITH ACTIONS", "NO-GO"].contains(&decision.as_str()),
        "{decision}"
    );
    let peak = result_value(&b, "Peak gas temperature");
    shot("fill-result", 1000);
    shot("fill-result-phone", 390);
    // The page shows what the command line computes for the same inputs.
    let json = server.api(
        "fill",
        &serde_json::json!({"gas": "air", "volume": "50 L", "from": "1 bar(g)", "to": "200 bar(g)", "rate": "25 bar/min", "rated-temperature": "65 C"}),
    );
    let v: serde_json::Value = serde_json::from_slice(&json.body).expect("JSON");
    let kelvin = v["transient"]["peak_gas_temperature_k"]
        .as_f64()
        .expect("the peak");
    let shown: f64 = peak
        .split_whitespace()
        .next()
        .and_then(|n| n.parse().ok())
        .unwrap_or_else(|| panic!("no number in {peak:?}"));
    assert!(peak.contains("°C"), "{peak}");
    assert!(
        (shown - (kelvin - 273.15)).abs() <= 0.051,
        "{peak} against {kelvin} K"
    );
    let api_decision = v["verdict"]["decision"].as_str().unwrap_or_default();
    assert_eq!(
        decision.to_lowercase().replace(' ', "-"),
        api_decision,
        "{v}"
    );

    // A refusal is shown beside its field.
    b.go(&server.url("/energy"));
    b.click(&b.find("select[name='gas'] option[value='nitrogen']"));
    quantity(&b, "volume", "2", "m3", None);
    quantity(&b, "pressure", "10", "bar", None);
    b.click(&b.find("form button[type='submit']"));
    let error = b.text(&b.wait_for("#f-pressure-error"));
    assert!(error.contains("gauge or absolute"), "{error}");
    shot("energy-refused", 1000);
    quantity(&b, "pressure", "", "bar", Some("g"));
    b.click(&b.find("form button[type='submit']"));
    assert!(!b.text(&b.wait_for("#decision")).is_empty());
    shot("energy-result", 1000);

    b.go(&server.url("/vent"));
    b.click(&b.find("select[name='gas'] option[value='nitrogen']"));
    quantity(&b, "volume", "500", "L", None);
    quantity(&b, "pressure", "50", "bar", Some("g"));
    b.click(&b.find("form details summary"));
    quantity(&b, "orifice", "6", "mm", None);
    quantity(&b, "room-volume", "60", "m3", None);
    b.click(&b.find("input[name='depressuring-check']"));
    b.click(&b.find("form button[type='submit']"));
    assert!(!b.text(&b.wait_for("#decision")).is_empty());
    shot("vent-result", 1000);

    // The site page: items ranked; a worksheet for the first, then its PDF downloaded.
    b.go(&server.url("/site/0"));
    shot("site", 1000);
    let form = "(//form[contains(@action, '/worksheet')])[1]";
    let tag = b
        .text(&b.xpath(&format!("{form}//legend")))
        .replace("Worksheet for ", "");
    b.type_into(
        &b.xpath(&format!("{form}//input[@name='work_order']")),
        "WO-4471",
    );
    b.type_into(
        &b.xpath(&format!("{form}//input[@name='prepared_by']")),
        "R. Okafor",
    );
    b.click(&b.xpath(&format!("{form}//button")));
    // The page made (the one with the records' download links) leads with the worksheet's
    // own decision and its findings.
    b.wait_for("a[download]");
    assert!(!b.text(&b.find("#decision")).is_empty());
    assert!(!b.text(&b.find("ul.findings li")).is_empty());
    shot("worksheet", 1000);
    b.click(&b.xpath("//a[contains(@href, '.pdf')]"));
    let pdf = wait_for_file(&downloads, ".pdf", Duration::from_secs(30))
        .unwrap_or_else(|| panic!("no PDF downloaded into {}", downloads.display()));
    let bytes = std::fs::read(&pdf).expect("reads the PDF");
    let doc = lopdf::Document::load_mem(&bytes).expect("the PDF parses");
    let pages: Vec<u32> = doc.get_pages().keys().copied().collect();
    let text = doc.extract_text(&pages).expect("its text");
    for expected in [tag.as_str(), "WO-4471", "R. Okafor"] {
        assert!(text.contains(expected), "{expected} not in the PDF's text");
    }
    // The same record is in the records folder, under the command line's name, with its JSON.
    let name = pdf
        .file_name()
        .expect("a name")
        .to_string_lossy()
        .into_owned();
    assert!(name.contains("wo-4471"), "{name}");
    assert_eq!(
        std::fs::read(records.join(&name)).expect("the record"),
        bytes
    );
    assert!(records.join(name.replace(".pdf", ".json")).exists());
    eprintln!("screenshots in {}", shots.display());
}
