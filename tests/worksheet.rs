//! Integration tests of `pvhazard worksheet` and `pvhazard check` on site files and
//! templates: the PDF and JSON record of each item, file names, no-overwrite writes,
//! determinism, paper sizes, edited templates, located errors in site and template files,
//! and the ranking and exit code of `check`.
//!
//! Exit codes (src/cli.rs): 0 computed, 2 bad input or a record that exists, 3 `check` found
//! DANGER.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use assert_cmd::Command;
use predicates::prelude::*;
use pvhazard::assess::Hazard;
use serde_json::Value;

type TestResult = Result<(), Box<dyn std::error::Error>>;

/// The date, work order and preparer every worksheet run here uses unless it tests them.
const DATE: &str = "2026-03-14T09:30:00+01:00";
const WORK_ORDER: &str = "WO-TEST-7";
const PREPARED_BY: &str = "A. Tester";
/// 2026-03-14T08:30:00Z, the same instant as [`DATE`].
const EPOCH: &str = "1773477000";

const LARKSPUR: &str = "larkspur-fabrication.toml";
const KESTREL: &str = "kestrel-fill-room.toml";
const BUILT_IN_TEMPLATES: [&str; 3] = ["pre-maintenance", "fill-check", "pressure-test"];
const SIGNAL_WORDS: [&str; 4] = ["NOTICE", "CAUTION", "WARNING", "DANGER"];

/// A folder of its own for one test, removed when the test ends.
struct Scratch(PathBuf);

impl Scratch {
    fn new(test: &str) -> Scratch {
        let dir = std::env::temp_dir().join(format!("pvhazard-ws-{test}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).expect("the scratch folder can be created");
        Scratch(dir)
    }

    fn path(&self, name: &str) -> PathBuf {
        self.0.join(name)
    }

    /// Writes `text` to `name` in the folder and returns its path.
    fn write(&self, name: &str, text: &str) -> PathBuf {
        let p = self.path(name);
        std::fs::write(&p, text).expect("the scratch file can be written");
        p
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn repo(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

fn sample(name: &str) -> PathBuf {
    repo("sample_sites").join(name)
}

fn read_text(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("cannot read {}: {e}", p.display()))
}

/// The binary, with SOURCE_DATE_EPOCH cleared so only the tests that set it see it.
fn pvhazard() -> Command {
    let mut cmd = Command::cargo_bin("pvhazard").expect("the pvhazard binary is built");
    cmd.env_remove("SOURCE_DATE_EPOCH");
    cmd
}

/// `pvhazard worksheet SITE --out OUT` with `extra`, and the fixed date, work order and
/// preparer where `extra` does not give its own.
fn worksheet(site: &Path, out: &Path, extra: &[&str]) -> Command {
    let mut cmd = bare_worksheet(site, out, extra);
    for (flag, value) in [
        ("--date", DATE),
        ("--work-order", WORK_ORDER),
        ("--prepared-by", PREPARED_BY),
    ] {
        if !extra.contains(&flag) {
            cmd.args([flag, value]);
        }
    }
    cmd
}

/// `pvhazard worksheet SITE --out OUT` with only `extra` (no date, work order or preparer).
fn bare_worksheet(site: &Path, out: &Path, extra: &[&str]) -> Command {
    let mut cmd = pvhazard();
    cmd.arg("worksheet")
        .arg(site)
        .arg("--out")
        .arg(out)
        .args(extra);
    cmd
}

/// The file names in `dir`, sorted; empty if it does not exist.
fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = match std::fs::read_dir(dir) {
        Ok(rd) => rd
            .map(|e| {
                e.expect("a folder entry")
                    .file_name()
                    .to_string_lossy()
                    .into_owned()
            })
            .collect(),
        Err(_) => Vec::new(),
    };
    v.sort();
    v
}

/// Every file in `dir` by name, with its bytes.
fn contents(dir: &Path) -> BTreeMap<String, Vec<u8>> {
    names(dir)
        .into_iter()
        .map(|n| {
            let bytes = std::fs::read(dir.join(&n)).expect("a written file is readable");
            (n, bytes)
        })
        .collect()
}

fn assert_no_temporary_files(dir: &Path) {
    let hidden: Vec<String> = names(dir)
        .into_iter()
        .filter(|n| n.starts_with('.'))
        .collect();
    assert!(
        hidden.is_empty(),
        "temporary files left in {}: {hidden:?}",
        dir.display()
    );
}

fn pdf_doc(bytes: &[u8]) -> lopdf::Document {
    lopdf::Document::load_mem(bytes).expect("the PDF parses")
}

/// All the text of a PDF, every page.
fn pdf_text(path: &Path) -> String {
    let bytes = std::fs::read(path).expect("the PDF is readable");
    let doc = pdf_doc(&bytes);
    let pages: Vec<u32> = doc.get_pages().keys().copied().collect();
    doc.extract_text(&pages)
        .expect("the PDF's text can be extracted")
}

/// Each page's MediaBox, following Parent links for an inherited one.
fn media_boxes(path: &Path) -> Vec<[f32; 4]> {
    let bytes = std::fs::read(path).expect("the PDF is readable");
    let doc = pdf_doc(&bytes);
    doc.get_pages()
        .values()
        .map(|&id| {
            let mut dict = doc.get_dictionary(id).expect("a page dictionary");
            loop {
                if let Ok(b) = dict.get(b"MediaBox") {
                    let a = b.as_array().expect("MediaBox is an array");
                    let f: Vec<f32> = a.iter().map(|o| o.as_float().expect("a number")).collect();
                    return [f[0], f[1], f[2], f[3]];
                }
                let parent = dict
                    .get(b"Parent")
                    .and_then(|p| p.as_reference())
                    .expect("a page without a MediaBox has a parent");
                dict = doc.get_dictionary(parent).expect("the parent dictionary");
            }
        })
        .collect()
}

fn json_file(path: &Path) -> Value {
    serde_json::from_str(&read_text(path))
        .unwrap_or_else(|e| panic!("{} is not JSON: {e}", path.display()))
}

/// `x` with four significant figures, as the worksheets print energies in MJ.
fn sig4(x: f64) -> String {
    let magnitude = x.abs().log10().floor() as i32;
    let decimals = (3 - magnitude).max(0) as usize;
    format!("{x:.decimals$}")
}

/// The 1-based line of the first line of `text` containing `needle`.
fn line_of(text: &str, needle: &str) -> usize {
    text.lines()
        .position(|l| l.contains(needle))
        .unwrap_or_else(|| panic!("no line contains {needle:?}"))
        + 1
}

/// `text` with the first `from` replaced by `to`; fails if `from` is not there.
fn edit(text: &str, from: &str, to: &str) -> String {
    assert!(text.contains(from), "{from:?} is not in the text");
    text.replacen(from, to, 1)
}

/// The items of a site file: (tag, "vessel" or "cylinder", has a test_pressure).
fn items_of(site: &Path) -> Vec<(String, &'static str, bool)> {
    let t: toml::Table = toml::from_str(&read_text(site)).expect("the sample site is TOML");
    let mut out = Vec::new();
    for kind in ["vessel", "cylinder"] {
        let Some(list) = t.get(kind).and_then(|v| v.as_array()) else {
            continue;
        };
        for item in list {
            let tag = item["tag"].as_str().expect("a tag").to_string();
            out.push((tag, kind, item.get("test_pressure").is_some()));
        }
    }
    out
}

/// The title of a shipped template.
fn template_title(name: &str) -> String {
    let path = repo("templates").join(format!("{name}.toml"));
    let t: toml::Table = toml::from_str(&read_text(&path)).expect("the template is TOML");
    t["template"]["title"]
        .as_str()
        .expect("a title")
        .to_string()
}

fn level_rank(word: &str) -> usize {
    SIGNAL_WORDS
        .iter()
        .position(|w| *w == word)
        .unwrap_or_else(|| panic!("{word:?} is not a signal word"))
}

/// Checks one worksheet's PDF and JSON record (the files `stem.pdf` and `stem.json` in `dir`).
fn assert_worksheet(dir: &Path, stem: &str, tag: &str, kind: &str, template: &str) {
    let pdf_path = dir.join(format!("{stem}.pdf"));
    let json_path = dir.join(format!("{stem}.json"));
    let bytes = std::fs::read(&pdf_path)
        .unwrap_or_else(|e| panic!("{} is not there: {e}", pdf_path.display()));
    assert!(
        bytes.starts_with(b"%PDF"),
        "{} is not a PDF",
        pdf_path.display()
    );
    let rec = json_file(&json_path);

    // The record.
    let fp = rec["fingerprint"].as_str().expect("a fingerprint string");
    assert_eq!(fp.len(), 64, "fingerprint {fp:?}");
    assert!(
        fp.chars().all(|c| c.is_ascii_hexdigit()),
        "fingerprint {fp:?}"
    );
    for key in [
        "inputs",
        "results",
        "cautions",
        "tool_version",
        "date",
        "work_order",
    ] {
        assert!(rec.get(key).is_some(), "{stem}.json has no {key}");
    }
    assert_eq!(rec["date"], DATE);
    assert_eq!(rec["work_order"], WORK_ORDER);
    assert_eq!(rec["prepared_by"], PREPARED_BY);
    assert_eq!(rec["template"], template);
    let cautions = rec["cautions"].as_array().expect("cautions is a list");
    assert!(!cautions.is_empty());

    // The print.
    let text = pdf_text(&pdf_path);
    let ctx = format!("{stem}.pdf ({template})");
    let has = |needle: &str| {
        assert!(
            text.contains(needle),
            "{ctx} lacks {needle:?}; its text:\n{text}"
        );
    };
    // The decision leads; every banner but the deferral (which is in the footer) is shown.
    has(
        match rec["verdict"]["decision"].as_str().expect("a decision") {
            "go" => "GO",
            "go-with-actions" => "GO WITH ACTIONS",
            _ => "NO-GO",
        },
    );
    has("Basis and assumptions");
    for c in cautions {
        if !c["message"]
            .as_str()
            .is_some_and(|m| m.contains("licensed or authorised inspector"))
        {
            has(c["level"].as_str().expect("a caution level"));
        }
    }
    has("inspector");
    has("local codes");
    has(WORK_ORDER);
    has(PREPARED_BY);
    has("2026-03-14");
    has(tag);
    has(&template_title(template));
    has("Page 1 of");
    has("Signature");
    assert!(
        text.contains(fp) || text.contains(&fp[..16]),
        "{ctx} shows neither the fingerprint {fp} nor its first 16 characters"
    );
    match kind {
        "vessel" => {
            let j = rec["results"]["energy"]["energy_j"]["isentropic"]
                .as_f64()
                .expect("a vessel's record has results.energy.energy_j.isentropic");
            has(&format!("{} MJ", sig4(j / 1e6)));
        }
        _ => {
            let k = rec["results"]["fill"]["final_temperature_k"]
                .as_f64()
                .expect("a cylinder's record has results.fill.final_temperature_k");
            has(&format!("{k:.2} K"));
        }
    }
}

// ---- 1. Every sample item with every template that fits it -------------------------------

#[test]
fn every_sample_item_with_each_fitting_template_prints_banners_deferral_header_and_key_values(
) -> TestResult {
    let scratch = Scratch::new("every-item");
    let mut checked = 0;
    for (site_file, site_slug) in [
        (LARKSPUR, "larkspur-fabrication-shop-demo"),
        (KESTREL, "kestrel-point-fill-room-demo"),
    ] {
        let site = sample(site_file);
        let items = items_of(&site);
        assert!(!items.is_empty());
        for template in BUILT_IN_TEMPLATES {
            let fits: Vec<&(String, &str, bool)> = items
                .iter()
                .filter(|(_, kind, has_test)| match template {
                    "pre-maintenance" => *kind == "vessel",
                    "pressure-test" => *kind == "vessel" && *has_test,
                    _ => *kind == "cylinder",
                })
                .collect();
            if fits.is_empty() {
                continue;
            }
            // One folder per template, so each folder holds one template's records.
            let out = scratch.path(&format!("{site_slug}-{template}"));
            let mut args = vec!["--template", template];
            for (tag, _, _) in &fits {
                args.extend(["--tag", tag.as_str()]);
            }
            let run = worksheet(&site, &out, &args).assert().code(0);
            let stdout = String::from_utf8(run.get_output().stdout.clone())?;
            for (tag, kind, _) in &fits {
                assert!(
                    stdout.contains(tag.as_str()),
                    "stdout does not list {tag}: {stdout}"
                );
                let stem = format!(
                    "{site_slug}_{}_{template}_wo-test-7_2026-03-14",
                    tag.to_lowercase()
                );
                assert_worksheet(&out, &stem, tag, kind, template);
                checked += 1;
            }
            assert_eq!(names(&out).len(), 2 * fits.len(), "{:?}", names(&out));
        }
    }
    // Larkspur: 3 vessels pre-maintenance + N2-201 pressure-test; Kestrel: BANK-1 + 3 cylinders.
    assert_eq!(checked, 8);
    Ok(())
}

#[test]
fn the_default_template_is_pre_maintenance_for_vessels_and_fill_check_for_cylinders() {
    let scratch = Scratch::new("default-template");
    let out = scratch.path("out");
    worksheet(&sample(KESTREL), &out, &["--all"])
        .assert()
        .code(0);
    for (tag, template) in [
        ("bank-1", "pre-maintenance"),
        ("ba-07", "fill-check"),
        ("sc-80", "fill-check"),
        ("ar-50", "fill-check"),
    ] {
        let rec = json_file(&out.join(format!(
            "kestrel-point-fill-room-demo_{tag}_{template}_wo-test-7_2026-03-14.json"
        )));
        assert_eq!(rec["template"], template, "{tag}");
    }
}

#[test]
fn a_danger_caution_in_the_record_is_printed_with_its_signal_word() {
    let scratch = Scratch::new("danger-banner");
    let out = scratch.path("out");
    worksheet(&sample(KESTREL), &out, &["--tag", "BANK-1"])
        .assert()
        .code(0);
    let stem = "kestrel-point-fill-room-demo_bank-1_pre-maintenance_wo-test-7_2026-03-14";
    let rec = json_file(&out.join(format!("{stem}.json")));
    let levels: Vec<&str> = rec["cautions"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["level"].as_str().unwrap())
        .collect();
    assert_eq!(levels.first(), Some(&"DANGER"), "{levels:?}");
    let text = pdf_text(&out.join(format!("{stem}.pdf")));
    assert!(text.contains("DANGER"));
    assert!(text.contains("WARNING"));
}

// ---- 2. Records are never overwritten without --force -------------------------------------

#[test]
fn a_second_run_is_refused_with_already_exists_and_force_and_leaves_the_first_files_identical() {
    let scratch = Scratch::new("refuse-second");
    let out = scratch.path("out");
    let site = sample(LARKSPUR);
    worksheet(&site, &out, &["--tag", "AR-101"])
        .assert()
        .code(0);
    let first = contents(&out);
    assert_eq!(first.len(), 2);
    assert_no_temporary_files(&out);

    // The same command again finds the same bytes: done, nothing rewritten.
    worksheet(&site, &out, &["--tag", "AR-101"])
        .assert()
        .code(0)
        .stdout(predicate::str::contains(
            "already there with the same contents",
        ));
    assert_eq!(contents(&out), first);
    assert_no_temporary_files(&out);

    // Different contents under the same names are refused.
    worksheet(
        &site,
        &out,
        &["--tag", "AR-101", "--prepared-by", "B. Other"],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains("already exists"))
    .stderr(predicate::str::contains("--force"));
    assert_eq!(contents(&out), first);
    assert_no_temporary_files(&out);

    // Another time on the same day gives the same names and other bytes: refused as well.
    worksheet(
        &site,
        &out,
        &["--tag", "AR-101", "--date", "2026-03-14T10:45:00+01:00"],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains("already exists"));
    assert_eq!(contents(&out), first);
    assert_no_temporary_files(&out);
}

#[test]
fn a_refused_batch_writes_none_of_its_new_records() {
    let scratch = Scratch::new("refuse-batch");
    let out = scratch.path("out");
    let site = sample(LARKSPUR);
    worksheet(&site, &out, &["--tag", "AR-102"])
        .assert()
        .code(0);
    let first = contents(&out);
    // AR-101 is new, AR-102 exists with other contents: nothing is written.
    worksheet(
        &site,
        &out,
        &[
            "--tag",
            "AR-101",
            "--tag",
            "AR-102",
            "--prepared-by",
            "B. Other",
        ],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains("already exists"));
    assert_eq!(contents(&out), first);
    assert_no_temporary_files(&out);
}

#[test]
fn force_replaces_existing_records_and_exits_0() {
    let scratch = Scratch::new("force");
    let out = scratch.path("out");
    let site = sample(LARKSPUR);
    worksheet(&site, &out, &["--tag", "AR-101"])
        .assert()
        .code(0);
    let first = contents(&out);
    worksheet(&site, &out, &["--tag", "AR-101", "--force"])
        .assert()
        .code(0);
    assert_eq!(contents(&out), first, "same inputs, same bytes");

    worksheet(
        &site,
        &out,
        &["--tag", "AR-101", "--prepared-by", "B. Other", "--force"],
    )
    .assert()
    .code(0);
    let second = contents(&out);
    assert_eq!(
        second.keys().collect::<Vec<_>>(),
        first.keys().collect::<Vec<_>>()
    );
    for (name, bytes) in &second {
        assert_ne!(bytes, &first[name], "{name} was not replaced");
    }
    let stem = "larkspur-fabrication-shop-demo_ar-101_pre-maintenance_wo-test-7_2026-03-14";
    assert_eq!(
        json_file(&out.join(format!("{stem}.json")))["prepared_by"],
        "B. Other"
    );
    assert!(pdf_text(&out.join(format!("{stem}.pdf"))).contains("B. Other"));
    assert_no_temporary_files(&out);
}

// ---- 3. Determinism and the fingerprint ---------------------------------------------------

#[test]
fn two_runs_with_the_same_inputs_and_date_give_byte_identical_pdfs_and_json() {
    let scratch = Scratch::new("same-date");
    for site in [LARKSPUR, KESTREL] {
        let a = scratch.path(&format!("{site}-a"));
        let b = scratch.path(&format!("{site}-b"));
        worksheet(&sample(site), &a, &["--all"]).assert().code(0);
        worksheet(&sample(site), &b, &["--all"]).assert().code(0);
        let (ca, cb) = (contents(&a), contents(&b));
        assert!(!ca.is_empty());
        assert_eq!(ca.keys().collect::<Vec<_>>(), cb.keys().collect::<Vec<_>>());
        for (name, bytes) in &ca {
            assert!(bytes == &cb[name], "{name} differs between two runs");
        }
    }
}

#[test]
fn source_date_epoch_without_date_gives_byte_identical_files_dated_from_it() {
    let scratch = Scratch::new("epoch");
    let site = sample(LARKSPUR);
    let a = scratch.path("a");
    let b = scratch.path("b");
    for dir in [&a, &b] {
        bare_worksheet(&site, dir, &["--tag", "AR-101", "--work-order", WORK_ORDER])
            .env("SOURCE_DATE_EPOCH", EPOCH)
            .assert()
            .code(0);
    }
    let (ca, cb) = (contents(&a), contents(&b));
    assert_eq!(ca, cb);
    let stem = "larkspur-fabrication-shop-demo_ar-101_pre-maintenance_wo-test-7_2026-03-14";
    // In the site's time zone (+01:00), the same instant as DATE.
    assert_eq!(json_file(&a.join(format!("{stem}.json")))["date"], DATE);
}

#[test]
fn source_date_epoch_and_the_same_date_given_give_the_same_record() {
    let scratch = Scratch::new("epoch-vs-date");
    let site = sample(LARKSPUR);
    let a = scratch.path("a");
    let b = scratch.path("b");
    worksheet(&site, &a, &["--tag", "AR-101"]).assert().code(0);
    bare_worksheet(
        &site,
        &b,
        &[
            "--tag",
            "AR-101",
            "--work-order",
            WORK_ORDER,
            "--prepared-by",
            PREPARED_BY,
        ],
    )
    .env("SOURCE_DATE_EPOCH", EPOCH)
    .assert()
    .code(0);
    assert_eq!(contents(&a), contents(&b));
}

#[test]
fn a_different_date_changes_the_pdf_but_not_the_fingerprint() {
    let scratch = Scratch::new("other-date");
    let site = sample(LARKSPUR);
    let a = scratch.path("a");
    let b = scratch.path("b");
    worksheet(&site, &a, &["--tag", "AR-101"]).assert().code(0);
    worksheet(
        &site,
        &b,
        &["--tag", "AR-101", "--date", "2026-03-15T14:05:00+01:00"],
    )
    .assert()
    .code(0);
    let sa = "larkspur-fabrication-shop-demo_ar-101_pre-maintenance_wo-test-7_2026-03-14";
    let sb = "larkspur-fabrication-shop-demo_ar-101_pre-maintenance_wo-test-7_2026-03-15";
    let pa = std::fs::read(a.join(format!("{sa}.pdf"))).unwrap();
    let pb = std::fs::read(b.join(format!("{sb}.pdf"))).unwrap();
    assert_ne!(pa, pb);
    assert!(pdf_text(&b.join(format!("{sb}.pdf"))).contains("2026-03-15"));
    let ja = json_file(&a.join(format!("{sa}.json")));
    let jb = json_file(&b.join(format!("{sb}.json")));
    assert_eq!(ja["fingerprint"], jb["fingerprint"]);
    assert_eq!(ja["inputs"], jb["inputs"]);
    assert_eq!(jb["date"], "2026-03-15T14:05:00+01:00");
}

#[test]
fn a_changed_operating_pressure_changes_the_fingerprint() {
    let scratch = Scratch::new("other-input");
    let text = read_text(&sample(LARKSPUR));
    let changed = scratch.write(
        "larkspur-changed.toml",
        &edit(
            &text,
            "operating_pressure = \"10 barg\"",
            "operating_pressure = \"9 barg\"",
        ),
    );
    let a = scratch.path("a");
    let b = scratch.path("b");
    worksheet(&sample(LARKSPUR), &a, &["--tag", "AR-101"])
        .assert()
        .code(0);
    worksheet(&changed, &b, &["--tag", "AR-101"])
        .assert()
        .code(0);
    let stem = "larkspur-fabrication-shop-demo_ar-101_pre-maintenance_wo-test-7_2026-03-14";
    let ja = json_file(&a.join(format!("{stem}.json")));
    let jb = json_file(&b.join(format!("{stem}.json")));
    assert_ne!(ja["fingerprint"], jb["fingerprint"]);
    let fb = jb["fingerprint"].as_str().unwrap();
    let text_b = pdf_text(&b.join(format!("{stem}.pdf")));
    assert!(
        text_b.contains(&fb[..16]),
        "the PDF shows the new fingerprint"
    );
}

#[test]
fn the_same_site_text_in_another_file_keeps_the_fingerprint() {
    // The fingerprint is of the inputs, not of where the site file lies.
    let scratch = Scratch::new("same-input-copy");
    let copy = scratch.write("copy.toml", &read_text(&sample(LARKSPUR)));
    let a = scratch.path("a");
    let b = scratch.path("b");
    worksheet(&sample(LARKSPUR), &a, &["--tag", "N2-201"])
        .assert()
        .code(0);
    worksheet(&copy, &b, &["--tag", "N2-201"]).assert().code(0);
    assert_eq!(contents(&a), contents(&b));
}

// ---- 4. Paper sizes -----------------------------------------------------------------------

#[test]
fn paper_letter_is_612_by_792_pt_and_a4_is_595_by_842_pt_on_every_page() {
    let scratch = Scratch::new("paper");
    for (paper, w, h) in [("letter", 612.0, 792.0), ("a4", 595.0, 842.0)] {
        let out = scratch.path(paper);
        worksheet(
            &sample(LARKSPUR),
            &out,
            &["--tag", "AR-101", "--paper", paper],
        )
        .assert()
        .code(0);
        let pdf = out
            .join("larkspur-fabrication-shop-demo_ar-101_pre-maintenance_wo-test-7_2026-03-14.pdf");
        let boxes = media_boxes(&pdf);
        assert!(!boxes.is_empty());
        for b in boxes {
            let (bw, bh) = (b[2] - b[0], b[3] - b[1]);
            assert!(
                (bw - w).abs() <= 1.0 && (bh - h).abs() <= 1.0,
                "{paper}: MediaBox {b:?}"
            );
        }
    }
}

#[test]
fn the_default_paper_is_a4() {
    let scratch = Scratch::new("paper-default");
    let out = scratch.path("out");
    worksheet(&sample(KESTREL), &out, &["--tag", "BA-07"])
        .assert()
        .code(0);
    let b = media_boxes(
        &out.join("kestrel-point-fill-room-demo_ba-07_fill-check_wo-test-7_2026-03-14.pdf"),
    )[0];
    assert!(
        (b[2] - b[0] - 595.0).abs() <= 1.0 && (b[3] - b[1] - 842.0).abs() <= 1.0,
        "{b:?}"
    );
}

// ---- 5. File names ------------------------------------------------------------------------

#[test]
fn file_names_carry_site_tag_template_work_order_and_date() {
    let scratch = Scratch::new("names");
    let out = scratch.path("out");
    let run = worksheet(&sample(LARKSPUR), &out, &["--all"])
        .assert()
        .code(0);
    let mut expected = Vec::new();
    for tag in ["ar-101", "ar-102", "n2-201"] {
        for ext in ["json", "pdf"] {
            expected.push(format!(
                "larkspur-fabrication-shop-demo_{tag}_pre-maintenance_wo-test-7_2026-03-14.{ext}"
            ));
        }
    }
    expected.sort();
    assert_eq!(names(&out), expected);
    let stdout = String::from_utf8(run.get_output().stdout.clone()).unwrap();
    for name in &expected {
        assert!(
            stdout.contains(name.as_str()),
            "stdout lacks {name}: {stdout}"
        );
    }
}

#[test]
fn without_a_work_order_the_file_name_says_no_wo_and_the_date_is_the_given_dates_day() {
    let scratch = Scratch::new("names-no-wo");
    let out = scratch.path("out");
    bare_worksheet(
        &sample(KESTREL),
        &out,
        &["--tag", "SC-80", "--date", "2026-07-01T23:15:00-06:00"],
    )
    .assert()
    .code(0);
    assert_eq!(
        names(&out),
        [
            "kestrel-point-fill-room-demo_sc-80_fill-check_no-wo_2026-07-01.json",
            "kestrel-point-fill-room-demo_sc-80_fill-check_no-wo_2026-07-01.pdf",
        ]
    );
    let rec =
        json_file(&out.join("kestrel-point-fill-room-demo_sc-80_fill-check_no-wo_2026-07-01.json"));
    assert!(rec["work_order"].is_null());
}

// ---- 6. An edited copy of a template ------------------------------------------------------

#[test]
fn an_edited_copy_of_a_template_prints_its_new_title_and_checklist_item() {
    let scratch = Scratch::new("edited-template");
    let text = read_text(&repo("templates/pre-maintenance.toml"));
    let text = edit(
        &text,
        "title = \"Pre-maintenance hazard worksheet\"",
        "title = \"Receiver shutdown sheet, Unit 7\"",
    );
    let text = edit(
        &text,
        "checklist = [\n",
        "checklist = [\n    \"Drain line checked clear of the wash-down hose.\",\n",
    );
    let template = scratch.write("my-template.toml", &text);
    let out = scratch.path("out");
    let template_arg = template.to_str().unwrap();
    worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-102", "--template", template_arg],
    )
    .assert()
    .code(0);
    let stem = "larkspur-fabrication-shop-demo_ar-102_pre-maintenance_wo-test-7_2026-03-14";
    let pdf = pdf_text(&out.join(format!("{stem}.pdf")));
    assert!(pdf.contains("Receiver shutdown sheet, Unit 7"), "{pdf}");
    assert!(
        pdf.contains("Drain line checked clear of the wash-down hose."),
        "{pdf}"
    );
    assert!(!pdf.contains("Pre-maintenance hazard worksheet"));
    // The template's text is an input: the fingerprint changes with it.
    let edited = json_file(&out.join(format!("{stem}.json")));
    let plain = scratch.path("plain");
    worksheet(&sample(LARKSPUR), &plain, &["--tag", "AR-102"])
        .assert()
        .code(0);
    let original = json_file(&plain.join(format!("{stem}.json")));
    assert_ne!(edited["fingerprint"], original["fingerprint"]);
}

#[test]
fn a_built_in_templates_name_is_the_built_in_whatever_the_working_folder_holds() {
    // An output folder is often named like its template; a file of a built-in's name is
    // reached as ./NAME.
    let scratch = Scratch::new("template-name-in-cwd");
    std::fs::create_dir_all(scratch.path("fill-check")).unwrap();
    let text = edit(
        &read_text(&repo("templates/pre-maintenance.toml")),
        "title = \"Pre-maintenance hazard worksheet\"",
        "title = \"Local pre-maintenance sheet\"",
    );
    scratch.write("pre-maintenance", &text);
    let run = |site: &str, tag: &str, template: &str, out: &str| {
        worksheet(
            &sample(site),
            &scratch.path(out),
            &["--tag", tag, "--template", template],
        )
        .current_dir(&scratch.0)
        .assert()
        .code(0);
    };
    run(KESTREL, "AR-50", "fill-check", "a");
    assert!(names(&scratch.path("a"))
        .iter()
        .any(|n| n.contains("_fill-check_")));
    run(LARKSPUR, "AR-102", "pre-maintenance", "b");
    let built_in = names(&scratch.path("b"));
    let pdf = built_in.iter().find(|n| n.ends_with(".pdf")).unwrap();
    assert!(pdf_text(&scratch.path("b").join(pdf)).contains("Pre-maintenance hazard worksheet"));
    run(LARKSPUR, "AR-102", "./pre-maintenance", "c");
    let local = names(&scratch.path("c"));
    let pdf = local.iter().find(|n| n.ends_with(".pdf")).unwrap();
    assert!(pdf_text(&scratch.path("c").join(pdf)).contains("Local pre-maintenance sheet"));
}

// ---- 7. Bad site and template files -------------------------------------------------------

/// Runs `worksheet --all` on a copy of the Larkspur site edited by `from` -> `to`, saved as
/// `file`; asserts exit 2, that stderr names `file:LINE:` (LINE of `line_needle` in the
/// edited text) and contains each of `words`, and that nothing was written.
fn refused_site(test: &str, file: &str, from: &str, to: &str, line_needle: &str, words: &[&str]) {
    refused_sample(LARKSPUR, test, file, (from, to), line_needle, words);
}

/// [`refused_site`] on the sample site `base`.
fn refused_sample(
    base: &str,
    test: &str,
    file: &str,
    (from, to): (&str, &str),
    line_needle: &str,
    words: &[&str],
) {
    let scratch = Scratch::new(test);
    let text = edit(&read_text(&sample(base)), from, to);
    let line = line_of(&text, line_needle);
    let site = scratch.write(file, &text);
    let out = scratch.path("out");
    let run = worksheet(&site, &out, &["--all"]).assert().code(2);
    let stderr = String::from_utf8(run.get_output().stderr.clone()).unwrap();
    let at = format!("{file}:{line}:");
    assert!(stderr.contains(&at), "stderr does not name {at}: {stderr}");
    for w in words {
        assert!(stderr.contains(w), "stderr lacks {w:?}: {stderr}");
    }
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert!(names(&out).is_empty(), "files written: {:?}", names(&out));
}

#[test]
fn a_liner_on_a_metal_cylinder_or_an_unknown_liner_is_refused_at_its_line() {
    refused_sample(
        KESTREL,
        "liner-on-metal",
        "liner-on-metal.toml",
        (
            "construction = \"aluminium\"",
            "construction = \"aluminium\"\nliner = \"plastic\"",
        ),
        "liner = \"plastic\"",
        &["cylinder[2].liner", "only a composite cylinder has a liner"],
    );
    refused_sample(
        KESTREL,
        "unknown-liner",
        "unknown-liner.toml",
        ("liner = \"aluminium\"", "liner = \"glass\""),
        "liner = \"glass\"",
        &["cylinder[1].liner", "accepted: aluminium, plastic"],
    );
}

#[test]
fn a_cylinders_empty_mass_is_split_between_liner_and_wrap_on_its_worksheet() {
    let scratch = Scratch::new("cylinder-empty-mass");
    let out = scratch.path("out");
    worksheet(&sample(KESTREL), &out, &["--tag", "BA-07"])
        .assert()
        .code(0);
    let rec = json_file(
        &out.join("kestrel-point-fill-room-demo_ba-07_fill-check_wo-test-7_2026-03-14.json"),
    );
    let wall = &rec["results"]["fill"]["transient"]["wall"];
    let (liner, wrap) = (
        wall["mass_kg"].as_f64().unwrap(),
        wall["wrap"]["mass_kg"].as_f64().unwrap(),
    );
    // The site's 9.0 lb, a third of it the aluminium liner.
    assert!((liner + wrap - 9.0 * 0.453_592_37).abs() < 1e-9, "{wall}");
    assert!((liner / (liner + wrap) - 1.0 / 3.0).abs() < 1e-9);
    assert_eq!(wall["wrap"]["split_from_empty"], true);
    assert_eq!(wall["wrap"]["liner_assumed"], false);
}

#[test]
fn a_bad_cylinder_empty_mass_is_refused_at_its_line() {
    refused_sample(
        KESTREL,
        "cylinder-empty-mass-bad",
        "cylinder-empty-mass-bad.toml",
        ("empty_mass = \"9.0 lb\"", "empty_mass = \"-9.0 lb\""),
        "empty_mass = \"-9.0 lb\"",
        &["cylinder[1].empty_mass"],
    );
}

#[test]
fn a_vessel_without_volume_is_refused_at_its_table_line() {
    refused_site(
        "missing-volume",
        "missing-volume.toml",
        "volume = \"2 m3\"\n",
        "",
        "[[vessel]]",
        &["volume"],
    );
}

#[test]
fn an_unknown_gas_is_refused_at_its_line_with_the_accepted_gases() {
    refused_site(
        "unknown-gas",
        "unknown-gas.toml",
        "gas = \"air\"",
        "gas = \"unobtainium\"",
        "unobtainium",
        &["vessel[1].gas", "unobtainium", "nitrogen"],
    );
}

#[test]
fn a_bare_bar_pressure_is_refused_as_neither_gauge_nor_absolute() {
    refused_site(
        "bare-bar",
        "bare-bar.toml",
        "operating_pressure = \"10 barg\"",
        "operating_pressure = \"10 bar\"",
        "\"10 bar\"",
        &["vessel[1].operating_pressure", "gauge", "absolute"],
    );
}

#[test]
fn a_negative_volume_is_refused_at_its_line() {
    refused_site(
        "negative-volume",
        "negative-volume.toml",
        "volume = \"2 m3\"",
        "volume = \"-2 m3\"",
        "-2 m3",
        &["vessel[1].volume", "1 mL to 100000 m3"],
    );
}

#[test]
fn a_duplicate_tag_is_refused_at_the_second_use() {
    refused_site(
        "duplicate-tag",
        "duplicate-tag.toml",
        "tag = \"AR-102\"",
        "tag = \"ar-101\"",
        "tag = \"ar-101\"",
        &["tag", "twice"],
    );
}

#[test]
fn malformed_toml_is_refused_at_the_unclosed_string() {
    refused_site(
        "malformed",
        "malformed.toml",
        "description = \"Vertical air receiver, compressor house, no. 1\"",
        "description = \"Vertical air receiver, compressor house, no. 1",
        "no. 1",
        &["string"],
    );
}

#[test]
fn an_unknown_key_is_refused_at_its_line_naming_it() {
    refused_site(
        "unknown-key",
        "unknown-key.toml",
        "volume = \"2 m3\"",
        "volumee = \"2 m3\"",
        "volumee",
        &["volumee", "volume"],
    );
}

#[test]
fn a_gauge_ambient_pressure_is_refused_as_not_absolute() {
    refused_site(
        "gauge-ambient",
        "gauge-ambient.toml",
        "elevation = \"120 m\"",
        "ambient_pressure = \"0 barg\"",
        "ambient_pressure",
        &["site.ambient_pressure", "absolute"],
    );
}

#[test]
fn a_bad_time_zone_is_refused_with_the_accepted_forms() {
    refused_site(
        "bad-time-zone",
        "bad-time-zone.toml",
        "time_zone = \"+01:00\"",
        "time_zone = \"Europe/Somewhere\"",
        "time_zone",
        &["site.time_zone", "UTC offset"],
    );
}

#[test]
fn a_time_zone_with_a_non_ascii_character_is_refused_without_a_panic() {
    refused_site(
        "time-zone-non-ascii",
        "time-zone-non-ascii.toml",
        "time_zone = \"+01:00\"",
        "time_zone = \"+1é2\"",
        "time_zone",
        &["site.time_zone"],
    );
}

#[test]
fn a_rule_refusing_a_site_value_exits_2_naming_the_file_and_item() {
    let scratch = Scratch::new("rule-refusal");
    let text = edit(
        &read_text(&sample(LARKSPUR)),
        "operating_pressure = \"10 barg\"",
        "operating_pressure = \"100000 barg\"",
    );
    let site = scratch.write("too-high.toml", &text);
    let out = scratch.path("out");
    worksheet(&site, &out, &["--all"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("too-high.toml"))
        .stderr(predicate::str::contains("AR-101"))
        .stderr(predicate::str::contains("panicked").not());
    assert!(names(&out).is_empty());
}

#[test]
fn a_rule_refusing_a_site_value_names_its_line_and_key() {
    refused_site(
        "rule-refusal-line",
        "too-high.toml",
        "operating_pressure = \"10 barg\"",
        "operating_pressure = \"100000 barg\"",
        "100000 barg",
        &["operating_pressure"],
    );
}

#[test]
fn an_unknown_template_name_is_refused_listing_the_built_in_templates() {
    let scratch = Scratch::new("unknown-template");
    let out = scratch.path("out");
    let mut a = worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-101", "--template", "no-such-template"],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains("no-such-template"))
    .stderr(predicate::str::contains("--template"));
    for name in BUILT_IN_TEMPLATES {
        a = a.stderr(predicate::str::contains(name));
    }
    assert!(names(&out).is_empty());
}

#[test]
fn a_template_with_an_unknown_calculation_is_refused_at_its_line() {
    let scratch = Scratch::new("unknown-calculation");
    let text = edit(
        &read_text(&repo("templates/pre-maintenance.toml")),
        "\"vent-target\"",
        "\"blast-radius\"",
    );
    let line = line_of(&text, "blast-radius");
    let template = scratch.write("bad-calc.toml", &text);
    let out = scratch.path("out");
    worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-101", "--template", template.to_str().unwrap()],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains(format!("bad-calc.toml:{line}:")))
    .stderr(predicate::str::contains("template.calculations"))
    .stderr(predicate::str::contains("blast-radius"))
    .stderr(predicate::str::contains("stored-energy"));
    assert!(names(&out).is_empty());
}

#[test]
fn a_fill_template_on_a_vessel_is_refused_naming_template_equipment() {
    let scratch = Scratch::new("fill-on-vessel");
    let out = scratch.path("out");
    worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-101", "--template", "fill-check"],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains("template.equipment"))
    .stderr(predicate::str::contains("fill-check"))
    .stderr(predicate::str::contains("cylinder"))
    .stderr(predicate::str::contains("vessel"));
    assert!(names(&out).is_empty());
}

#[test]
fn a_fill_template_file_on_a_vessel_names_the_file_its_equipment_line_and_the_tag() {
    let scratch = Scratch::new("fill-file-on-vessel");
    let text = read_text(&repo("templates/fill-check.toml"));
    let line = line_of(&text, "equipment =");
    let template = scratch.write("my-fill.toml", &text);
    let out = scratch.path("out");
    worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-101", "--template", template.to_str().unwrap()],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains(format!("my-fill.toml:{line}:")))
    .stderr(predicate::str::contains("template.equipment"))
    .stderr(predicate::str::contains("AR-101"));
    assert!(names(&out).is_empty());
}

#[test]
fn an_unknown_tag_is_refused_listing_the_accepted_tags() {
    let scratch = Scratch::new("unknown-tag");
    let out = scratch.path("out");
    worksheet(&sample(LARKSPUR), &out, &["--tag", "NOPE"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--tag"))
        .stderr(predicate::str::contains("NOPE"))
        .stderr(predicate::str::contains("AR-101"))
        .stderr(predicate::str::contains("AR-102"))
        .stderr(predicate::str::contains("N2-201"));
    assert!(names(&out).is_empty());
}

#[test]
fn tags_match_without_regard_to_case() {
    let scratch = Scratch::new("tag-case");
    let out = scratch.path("out");
    worksheet(&sample(LARKSPUR), &out, &["--tag", "n2-201"])
        .assert()
        .code(0);
    assert_eq!(names(&out).len(), 2);
}

#[test]
fn a_pressure_test_template_on_a_vessel_without_test_pressure_is_refused_naming_test_pressure() {
    let scratch = Scratch::new("no-test-pressure");
    let out = scratch.path("out");
    worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-101", "--template", "pressure-test"],
    )
    .assert()
    .code(2)
    .stderr(predicate::str::contains(LARKSPUR))
    .stderr(predicate::str::contains("test_pressure"))
    .stderr(predicate::str::contains("AR-101"));
    assert!(names(&out).is_empty());
}

#[test]
fn a_pressure_test_template_on_a_vessel_without_test_pressure_names_the_vessels_line() {
    let scratch = Scratch::new("no-test-pressure-line");
    let text = read_text(&sample(LARKSPUR));
    let table = line_of(&text, "[[vessel]]");
    let tag = line_of(&text, "tag = \"AR-101\"");
    let out = scratch.path("out");
    let run = worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-101", "--template", "pressure-test"],
    )
    .assert()
    .code(2);
    let stderr = String::from_utf8(run.get_output().stderr.clone()).unwrap();
    assert!(
        stderr.contains(&format!("{LARKSPUR}:{table}:"))
            || stderr.contains(&format!("{LARKSPUR}:{tag}:")),
        "no line of AR-101's table: {stderr}"
    );
    assert!(stderr.contains("test_pressure"));
}

#[test]
fn a_bad_item_writes_no_worksheet_for_the_good_ones() {
    // N2-201 has a test pressure, AR-101 does not: the batch is refused as a whole.
    let scratch = Scratch::new("partial-batch");
    let out = scratch.path("out");
    worksheet(
        &sample(LARKSPUR),
        &out,
        &[
            "--tag",
            "N2-201",
            "--tag",
            "AR-101",
            "--template",
            "pressure-test",
        ],
    )
    .assert()
    .code(2);
    assert!(names(&out).is_empty(), "{:?}", names(&out));
}

#[test]
fn items_whose_tags_share_a_file_name_never_overwrite_each_other() {
    let scratch = Scratch::new("slug-collision");
    let text = edit(
        &read_text(&sample(LARKSPUR)),
        "tag = \"AR-102\"",
        "tag = \"AR 101\"",
    );
    let site = scratch.write("slug-collision.toml", &text);
    for force in [false, true] {
        let out = scratch.path(&format!("out-{force}"));
        let mut cmd = worksheet(&site, &out, &["--all"]);
        if force {
            cmd.arg("--force");
        }
        let code = cmd.output().unwrap().status.code();
        let written = names(&out)
            .into_iter()
            .filter(|n| n.ends_with(".json"))
            .count();
        // Either every item gets its own record, or the run is refused and writes nothing.
        assert!(
            (code == Some(0) && written == 3) || (code == Some(2) && written == 0),
            "--force {force}: exit {code:?} with {written} record(s) for 3 items"
        );
    }
}

#[test]
fn the_same_tag_given_twice_is_not_refused_by_its_own_record() {
    let scratch = Scratch::new("same-tag-twice");
    let out = scratch.path("out");
    let code = worksheet(
        &sample(LARKSPUR),
        &out,
        &["--tag", "AR-101", "--tag", "ar-101"],
    )
    .output()
    .unwrap()
    .status
    .code();
    let written = names(&out).len();
    assert!(
        (code == Some(0) && written == 2) || (code == Some(2) && written == 0),
        "exit {code:?} with {written} file(s)"
    );
}

// ---- 8. check -----------------------------------------------------------------------------

fn check_json(site: &Path, expected_code: i32) -> Value {
    let run = pvhazard()
        .arg("check")
        .arg(site)
        .arg("--json")
        .assert()
        .code(expected_code);
    let stdout = String::from_utf8(run.get_output().stdout.clone()).unwrap();
    serde_json::from_str(&stdout).unwrap_or_else(|e| panic!("not one JSON object ({e}): {stdout}"))
}

/// Asserts the items are sorted by signal word (DANGER first), then by stored energy, and
/// returns their tags in order.
fn assert_ranked(summary: &Value) -> Vec<String> {
    let items = summary["items"].as_array().expect("items is a list");
    let mut last: Option<(usize, usize, f64)> = None;
    let mut tags = Vec::new();
    for i in items {
        let tag = i["tag"].as_str().expect("a tag");
        let decision = ["go", "go-with-actions", "no-go"]
            .iter()
            .position(|d| i["verdict"]["decision"] == *d)
            .expect("a decision");
        let level = level_rank(i["highest_level"].as_str().expect("a highest_level"));
        let energy = i["stored_energy_j"]
            .as_f64()
            .expect("stored_energy_j is a number");
        assert!(energy > 0.0, "{tag}: {energy}");
        if let Some((d, l, e)) = last {
            assert!(
                decision < d
                    || (decision == d && level < l)
                    || (decision == d && level == l && energy <= e),
                "{tag} is out of order: {items:?}"
            );
        }
        last = Some((decision, level, energy));
        tags.push(tag.to_string());
    }
    tags
}

#[test]
fn check_larkspur_exits_0_and_lists_its_items_ranked() {
    let summary = check_json(&sample(LARKSPUR), 0);
    assert_eq!(summary["danger"], false);
    let tags = assert_ranked(&summary);
    let mut sorted = tags.clone();
    sorted.sort();
    assert_eq!(sorted, ["AR-101", "AR-102", "N2-201"]);

    let run = pvhazard()
        .arg("check")
        .arg(sample(LARKSPUR))
        .assert()
        .code(0);
    let stdout = String::from_utf8(run.get_output().stdout.clone()).unwrap();
    assert!(!stdout.contains("DANGER"), "{stdout}");
    let positions: Vec<usize> = tags
        .iter()
        .map(|t| {
            stdout
                .find(t.as_str())
                .unwrap_or_else(|| panic!("{t} not listed: {stdout}"))
        })
        .collect();
    assert!(
        positions.windows(2).all(|w| w[0] < w[1]),
        "table order differs from the JSON: {stdout}"
    );
}

#[test]
fn check_kestrel_exits_3_because_bank_1_raises_danger_and_says_so() {
    let run = pvhazard()
        .arg("check")
        .arg(sample(KESTREL))
        .assert()
        .code(3);
    let stdout = String::from_utf8(run.get_output().stdout.clone()).unwrap();
    assert!(stdout.contains("DANGER"), "{stdout}");
    let first_row = stdout
        .lines()
        .find(|l| SIGNAL_WORDS.iter().any(|w| l.contains(w)))
        .expect("a ranked row");
    assert!(
        first_row.starts_with("BANK-1") && first_row.contains("DANGER"),
        "{stdout}"
    );
    assert!(stdout.contains("exit code 3"), "{stdout}");
}

#[test]
fn check_json_sorts_danger_first_and_sets_danger_true_for_kestrel() {
    let summary = check_json(&sample(KESTREL), 3);
    assert_eq!(summary["danger"], true);
    let tags = assert_ranked(&summary);
    assert_eq!(tags.len(), 4);
    assert_eq!(tags[0], "BANK-1");
    let bank = &summary["items"][0];
    assert_eq!(bank["highest_level"], "DANGER");
    let dangers: Vec<&str> = bank["cautions"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|c| c["level"] == "DANGER")
        .map(|c| c["message"].as_str().unwrap())
        .collect();
    assert!(
        dangers
            .iter()
            .any(|m| m.contains("keep people back") && m.contains("clear")),
        "{dangers:?}"
    );
    assert_eq!(bank["verdict"]["decision"], "no-go");
    let zone = bank["verdict"]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["hazard"] == "blast-zone")
        .expect("a blast-zone finding");
    assert_eq!(zone["status"], "stop");
    for i in summary["items"].as_array().unwrap().iter().skip(1) {
        assert_ne!(i["highest_level"], "DANGER", "only BANK-1 raises DANGER");
    }
}

#[test]
fn check_kestrel_with_enough_site_clearance_raises_no_danger_and_exits_0() {
    let scratch = Scratch::new("check-clearance");
    let text = edit(
        &read_text(&sample(KESTREL)),
        "clearance = \"60 ft\"",
        "clearance = \"300 ft\"",
    );
    let site = scratch.write("kestrel-clear.toml", &text);
    let summary = check_json(&site, 0);
    assert_eq!(summary["danger"], false);
    assert_ranked(&summary);
}

#[test]
fn check_refuses_a_bad_site_file_with_exit_2_and_its_line() {
    let scratch = Scratch::new("check-bad-site");
    let text = edit(
        &read_text(&sample(LARKSPUR)),
        "gas = \"nitrogen\"",
        "gas = \"phlogiston\"",
    );
    let line = line_of(&text, "phlogiston");
    let site = scratch.write("bad-gas.toml", &text);
    pvhazard()
        .arg("check")
        .arg(&site)
        .assert()
        .code(2)
        .stderr(predicate::str::contains(format!("bad-gas.toml:{line}:")))
        .stderr(predicate::str::contains("vessel[3].gas"));
}

#[test]
fn check_output_is_the_same_on_every_run() {
    let a = pvhazard()
        .arg("check")
        .arg(sample(KESTREL))
        .arg("--json")
        .output()
        .unwrap();
    let b = pvhazard()
        .arg("check")
        .arg(sample(KESTREL))
        .arg("--json")
        .output()
        .unwrap();
    assert_eq!(a.stdout, b.stdout);
}

// ---------------------------------------------------------------------------------------
// Decision first: verdicts, findings and banners that apply.
// ---------------------------------------------------------------------------------------

/// Runs `worksheet --all` on `site` with `template` (or the defaults) in a scratch folder
/// named for `test`; returns the folder and the names of the records written.
fn write_all(test: &str, site: &str, template: Option<&str>) -> (Scratch, Vec<String>) {
    let scratch = Scratch::new(&format!("{test}-{site}-{}", template.unwrap_or("default")));
    let out = scratch.path("out");
    let mut extra = vec!["--all"];
    if let Some(t) = template {
        extra.extend(["--template", t]);
    }
    worksheet(&sample(site), &out, &extra).assert().code(0);
    let records = names(&out)
        .into_iter()
        .filter(|n| n.ends_with(".json"))
        .collect();
    (scratch, records)
}

/// Every record `worksheet --all` writes for `site` with `template` (or the defaults).
fn records(site: &str, template: Option<&str>) -> Vec<Value> {
    let (scratch, names) = write_all("records", site, template);
    names
        .iter()
        .map(|n| json_file(&scratch.path("out").join(n)))
        .collect()
}

/// The verdict is `no-go` exactly when a finding stops the work and `go` exactly when all
/// are ok; no banner is repeated; no DANGER or WARNING stands on a hazard whose governing
/// finding is ok; every finding not ok has its banner.
fn assert_decision_first(record: &Value) {
    let verdict = &record["verdict"];
    let findings = verdict["findings"].as_array().expect("findings");
    let statuses: Vec<&str> = findings
        .iter()
        .map(|f| f["status"].as_str().unwrap())
        .collect();
    let expected = if statuses.contains(&"stop") {
        "no-go"
    } else if statuses.contains(&"action") {
        "go-with-actions"
    } else {
        "go"
    };
    assert_eq!(verdict["decision"], expected, "{verdict:#}");
    let cautions = record["cautions"].as_array().expect("cautions");
    let messages: Vec<&str> = cautions
        .iter()
        .map(|c| c["message"].as_str().unwrap())
        .collect();
    let mut seen = std::collections::HashSet::new();
    for m in &messages {
        assert!(seen.insert(*m), "repeated banner: {m}");
    }
    for f in findings {
        let result = f["result"].as_str().unwrap();
        let bannered = messages.iter().any(|m| m.starts_with(result));
        if f["status"] == "ok" {
            assert!(!bannered, "a banner for an ok finding: {result}");
        } else {
            assert!(bannered, "no banner for {}: {result}", f["hazard"]);
        }
    }
    // The hazards the wall model and a bound both assess: no WARNING from the bound while
    // the governing finding is ok.
    for (hazard, bound_words) in [
        ("cold-metal", "cold bound"),
        ("fill-temperature", "adiabatic"),
    ] {
        if findings
            .iter()
            .any(|f| f["hazard"] == hazard && f["status"] == "ok")
        {
            assert!(
                !cautions
                    .iter()
                    .any(|c| (c["level"] == "WARNING" || c["level"] == "DANGER")
                        && c["message"].as_str().unwrap().contains(bound_words)),
                "a bound's WARNING on {hazard} while it is ok: {messages:?}"
            );
        }
    }
}

#[test]
fn every_sample_worksheet_leads_with_a_verdict_its_banners_apply() {
    for (site, template) in [
        (LARKSPUR, None),
        (LARKSPUR, Some("pressure-test")),
        (KESTREL, None),
    ] {
        let recs = records(site, template);
        assert!(!recs.is_empty());
        for r in &recs {
            assert_decision_first(r);
            assert!(r["basis"].as_array().is_some_and(|b| !b.is_empty()));
        }
    }
}

#[test]
fn a_fill_within_its_rating_at_the_planned_rate_shows_no_adiabatic_warning() {
    // BA-07: the adiabatic bound exceeds the 149 °F rating; at the planned 400 psi/min with
    // heat to the wall the gas stays within it, and that governs.
    let recs = records(KESTREL, None);
    let ba07 = recs
        .iter()
        .find(|r| r["inputs"]["equipment"]["tag"] == "BA-07")
        .expect("BA-07's record");
    let fill = &ba07["results"]["fill"];
    assert!(fill["final_temperature_k"].as_f64().unwrap() > 338.15);
    let finding = ba07["verdict"]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["hazard"] == "fill-temperature")
        .unwrap();
    assert_eq!(finding["status"], "ok");
    assert_eq!(finding["basis"], "wall model at the planned rate");
    assert!(!ba07["cautions"]
        .as_array()
        .unwrap()
        .iter()
        .any(|c| c["message"].as_str().unwrap().contains("adiabatic")));
}

#[test]
fn check_tells_a_too_fast_fill_from_a_slow_one() {
    // The same 6.8 L composite air cylinder planned at 3000 bar/min and at 8 bar/min.
    let scratch = Scratch::new("check-rates");
    let cylinder = |tag: &str, rate: &str| {
        format!(
            "[[cylinder]]\ntag = \"{tag}\"\ndescription = \"Composite air cylinder\"\ngas = \"air\"\nwater_capacity = \"6.8 L\"\nservice_pressure = \"300 barg\"\nrated_temperature = \"65 C\"\nconstruction = \"composite\"\nliner = \"aluminium\"\nsupply_temperature = \"20 C\"\nfill_rate = \"{rate}\"\nresidual_pressure = \"20 barg\"\n\n"
        )
    };
    let site = scratch.write(
        "rates.toml",
        &format!(
            "[site]\nname = \"Rate test (demo)\"\nlocation = \"Bench\"\nambient_temperature = \"20 C\"\n\n{}{}",
            cylinder("FAST", "3000 bar/min"),
            cylinder("SLOW", "8 bar/min")
        ),
    );
    let summary = check_json(&site, 0);
    let decision = |tag: &str| {
        summary["items"]
            .as_array()
            .unwrap()
            .iter()
            .find(|i| i["tag"] == tag)
            .map(|i| i["verdict"]["decision"].as_str().unwrap().to_string())
            .unwrap()
    };
    assert_eq!(decision("FAST"), "no-go", "{summary:#}");
    // The slow fill's gas stays within the rating; what is left is the note on topping up.
    assert_ne!(decision("SLOW"), "no-go", "{summary:#}");
    assert_eq!(assert_ranked(&summary), ["FAST", "SLOW"]);
    let text = pvhazard().arg("check").arg(&site).assert().code(0);
    let stdout = String::from_utf8(text.get_output().stdout.clone()).unwrap();
    assert!(
        stdout.contains("NO-GO") && stdout.contains("Fill temperature"),
        "{stdout}"
    );
}

#[test]
fn a_site_that_asks_for_the_bound_to_govern_gets_it() {
    let scratch = Scratch::new("governing-bound");
    let text = edit(
        &read_text(&sample(LARKSPUR)),
        "clearance = \"40 m\"",
        "clearance = \"40 m\"\ngoverning = \"bound\"",
    );
    let site = scratch.write("site.toml", &text);
    let summary = check_json(&site, 0);
    let ar101 = summary["items"]
        .as_array()
        .unwrap()
        .iter()
        .find(|i| i["tag"] == "AR-101")
        .unwrap();
    let cold = ar101["verdict"]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["hazard"] == "cold-metal")
        .unwrap();
    assert_eq!(
        (cold["status"].as_str(), cold["basis"].as_str()),
        (Some("stop"), Some("isentropic bound"))
    );
    let bad = scratch.write(
        "bad.toml",
        &edit(&text, "governing = \"bound\"", "governing = \"worst\""),
    );
    let run = pvhazard().arg("check").arg(&bad).assert().code(2);
    let stderr = String::from_utf8(run.get_output().stderr.clone()).unwrap();
    assert!(
        stderr.contains("site.governing") && stderr.contains("model, bound"),
        "{stderr}"
    );
}

/// The text of a PDF's first page.
fn first_page_text(path: &Path) -> String {
    let bytes = std::fs::read(path).expect("the PDF is readable");
    let doc = pdf_doc(&bytes);
    doc.extract_text(&[1])
        .expect("the first page's text can be extracted")
}

#[test]
fn page_one_holds_the_decision_and_every_finding() {
    for (site, template) in [
        (LARKSPUR, None),
        (LARKSPUR, Some("pressure-test")),
        (KESTREL, None),
    ] {
        let (scratch, jsons) = write_all("page-one", site, template);
        let out = scratch.path("out");
        for json in &jsons {
            let rec = json_file(&out.join(json));
            let page = first_page_text(&out.join(json.replace(".json", ".pdf")));
            let decision = match rec["verdict"]["decision"].as_str().unwrap() {
                "go" => "GO",
                "go-with-actions" => "GO WITH ACTIONS",
                _ => "NO-GO",
            };
            assert!(
                page.contains(decision),
                "{json}: no {decision} on page 1:\n{page}"
            );
            for f in rec["verdict"]["findings"].as_array().unwrap() {
                let id = f["hazard"].as_str().unwrap();
                let title = Hazard::ALL
                    .iter()
                    .find(|h| h.id() == id)
                    .unwrap_or_else(|| panic!("unknown hazard {id}"))
                    .title();
                assert!(
                    page.contains(title),
                    "{json}: finding {title} is not on page 1:\n{page}"
                );
            }
        }
    }
}

#[test]
fn a_site_room_takes_the_vented_gas_and_a_drain_outdoors_says_so() {
    let dir = Scratch::new("room");
    let text = read_text(&sample(LARKSPUR));
    // The nitrogen drum's drain into the compressor house instead of the vent stack.
    let indoors = dir.write(
        "indoors.toml",
        &edit(
            &text,
            "cd = 0.8, to = \"outdoors\"",
            "cd = 0.8, to = \"room\"",
        ),
    );
    let out = dir.path("out");
    worksheet(&indoors, &out, &["--tag", "N2-201"])
        .assert()
        .success();
    let record = names(&out)
        .into_iter()
        .find(|n| n.ends_with(".json"))
        .expect("a record");
    let v = json_file(&out.join(&record));
    let found = v["verdict"]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["hazard"] == "oxygen-depletion")
        .expect("the room's oxygen finding")
        .clone();
    assert_eq!(found["basis"], "room, well mixed");
    let pdf = out.join(record.replace(".json", ".pdf"));
    let text = pdf_text(&pdf);
    assert!(text.contains("Where the gas goes"));
    assert!(text.contains("the room's atmosphere"), "the room's plot");
    assert!(text.contains("Largest orifice that keeps the room within limits"));
    // The sample site's own drain goes outdoors: a NOTICE, and no room computed.
    let out = dir.path("sample");
    worksheet(&sample(LARKSPUR), &out, &["--tag", "N2-201"])
        .assert()
        .success();
    let pdf = names(&out)
        .into_iter()
        .find(|n| n.ends_with(".pdf"))
        .unwrap();
    let text = pdf_text(&out.join(pdf));
    assert!(text.contains("vented outdoors"), "{text}");
    assert!(!text.contains("Where the gas goes"));
}

#[test]
fn a_drain_into_a_room_the_site_does_not_name_is_refused() {
    let dir = Scratch::new("no-room");
    // No room on the site, the receivers' drains saying nowhere, the drum's into a room.
    let text = edit(
        &read_text(&sample(LARKSPUR)),
        "room_volume = \"180 m3\"\nroom_ventilation = \"2 /h\"\n",
        "",
    )
    .replace(", to = \"room\" }", " }");
    let site = dir.write(
        "site.toml",
        &edit(
            &text,
            "cd = 0.8, to = \"outdoors\"",
            "cd = 0.8, to = \"room\"",
        ),
    );
    worksheet(&site, &dir.path("out"), &["--tag", "N2-201"])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("vessel[3].drain.to"))
        .stderr(predicates::str::contains("site.room_volume"));
}

#[test]
fn a_worksheet_without_a_tag_points_at_tag_and_all() {
    let dir = Scratch::new("no-tag");
    bare_worksheet(&sample(LARKSPUR), &dir.path("out"), &[])
        .assert()
        .code(2)
        .stderr(predicates::str::contains("--tag"))
        .stderr(predicates::str::contains("--all"))
        .stderr(predicates::str::contains("AR-101"));
    assert!(!dir.path("out").exists(), "nothing written");
}

#[test]
fn check_ranks_an_item_by_its_room_and_its_fragments() {
    let dir = Scratch::new("check-room");
    let site = dir.write(
        "indoors.toml",
        &edit(
            &read_text(&sample(LARKSPUR)),
            "cd = 0.8, to = \"outdoors\"",
            "cd = 0.8, to = \"room\"",
        ),
    );
    let summary = check_json(&site, 0);
    let items = summary["items"].as_array().unwrap();
    // The nitrogen drum venting into the compressor house is the one NO-GO, and leads.
    assert_eq!(items[0]["tag"], "N2-201");
    assert_eq!(items[0]["verdict"]["decision"], "no-go");
    let status = |item: &Value, hazard: &str| {
        item["verdict"]["findings"]
            .as_array()
            .unwrap()
            .iter()
            .find(|f| f["hazard"] == hazard)
            .map(|f| f["status"].clone())
    };
    assert_eq!(
        status(&items[0], "oxygen-depletion"),
        Some(Value::from("stop"))
    );
    // Every receiver has its empty mass on the site: each carries the fragments.
    for item in items {
        assert!(status(item, "fragments").is_some(), "{}", item["tag"]);
    }
}
