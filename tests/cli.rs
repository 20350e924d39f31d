//! Command-line tests of the `pvhazard` binary: exit codes, error messages, the JSON
//! contract, the text layout and a few reference values checked end to end.
//!
//! Exit codes (src/main.rs): 0 computed, 1 internal failure, 2 bad input.

use assert_cmd::Command;
use predicates::prelude::*;
use serde_json::Value;

/// The signal words a caution may carry, highest first.
const SIGNAL_WORDS: [&str; 4] = ["DANGER", "WARNING", "CAUTION", "NOTICE"];

/// The eight gases of the catalogue, in the order `pvhazard gases` lists them.
const GASES: [&str; 8] = [
    "air",
    "nitrogen",
    "oxygen",
    "argon",
    "helium",
    "hydrogen",
    "methane",
    "carbon-dioxide",
];

/// An air vessel of 1 m³ at 10 barg, the base of most energy and vent runs.
const ENERGY: &[&str] = &[
    "energy",
    "--gas",
    "air",
    "--volume",
    "1 m3",
    "--pressure",
    "10 barg",
];
const VENT: &[&str] = &[
    "vent",
    "--gas",
    "air",
    "--volume",
    "1 m3",
    "--pressure",
    "10 barg",
];
const FILL: &[&str] = &[
    "fill", "--gas", "air", "--volume", "50 L", "--from", "50 bara", "--to", "300 bara",
];

/// The binary with `args`.
fn pvhazard(args: &[&str]) -> Command {
    let mut cmd = Command::cargo_bin("pvhazard").expect("the pvhazard binary is built");
    cmd.args(args);
    cmd
}

/// `base` followed by `extra`.
fn with(base: &[&str], extra: &[&str]) -> Vec<String> {
    base.iter().chain(extra).map(|s| s.to_string()).collect()
}

fn as_strs(args: &[String]) -> Vec<&str> {
    args.iter().map(String::as_str).collect()
}

/// Asserts that `args` is refused as bad input: exit 2, nothing on stdout, no panic, and a
/// message on stderr that contains every one of `needles` (the option and the reason).
fn refused(args: &[&str], needles: &[&str]) {
    let mut assert = pvhazard(args)
        .assert()
        .code(2)
        .stdout(predicate::str::is_empty())
        .stderr(predicate::str::contains("panicked").not());
    for needle in needles {
        assert = assert.stderr(predicate::str::contains(*needle));
    }
}

/// Runs `args` and returns its stdout, asserting exit 0 and an empty stderr.
fn text(args: &[&str]) -> String {
    let out = pvhazard(args)
        .assert()
        .success()
        .stderr(predicate::str::is_empty());
    String::from_utf8(out.get_output().stdout.clone()).expect("stdout is UTF-8")
}

/// Runs `args` with `--json`, asserting exit 0, and parses the whole of stdout as one
/// JSON object whose numbers are all finite.
fn json(args: &[&str]) -> Value {
    let mut all = args.to_vec();
    all.push("--json");
    let stdout = text(&all);
    let v: Value = serde_json::from_str(&stdout)
        .unwrap_or_else(|e| panic!("stdout is not exactly one JSON value ({e}):\n{stdout}"));
    assert!(v.is_object(), "stdout is not a JSON object:\n{stdout}");
    assert_finite(&v, "");
    v
}

fn assert_finite(v: &Value, at: &str) {
    match v {
        Value::Number(n) => {
            let x = n.as_f64().expect("a JSON number reads as f64");
            assert!(x.is_finite(), "{at} = {x} is not finite");
        }
        Value::Array(a) => a
            .iter()
            .enumerate()
            .for_each(|(i, x)| assert_finite(x, &format!("{at}/{i}"))),
        Value::Object(o) => o
            .iter()
            .for_each(|(k, x)| assert_finite(x, &format!("{at}/{k}"))),
        _ => {}
    }
}

/// The number at JSON `pointer` (e.g. `/energy_j/isentropic`).
fn num(v: &Value, pointer: &str) -> f64 {
    v.pointer(pointer)
        .and_then(Value::as_f64)
        .unwrap_or_else(|| panic!("no number at {pointer} in\n{v:#}"))
}

fn assert_close(actual: f64, expected: f64, rel: f64, what: &str) {
    assert!(
        ((actual - expected) / expected).abs() <= rel,
        "{what}: {actual} is not within {} % of {expected}",
        rel * 100.0
    );
}

/// Asserts the `cautions` list is non-empty, each with a signal word and a message, and
/// ends with the deferral to the inspector and the local codes.
fn assert_cautions(v: &Value) {
    let cautions = v["cautions"].as_array().expect("cautions is a list");
    assert!(!cautions.is_empty(), "no cautions in\n{v:#}");
    for c in cautions {
        let level = c["level"].as_str().expect("a caution has a level");
        assert!(SIGNAL_WORDS.contains(&level), "unknown level {level}");
        let message = c["message"].as_str().expect("a caution has a message");
        assert!(!message.is_empty());
    }
    assert!(
        cautions
            .iter()
            .any(|c| c["level"] == "NOTICE" && c["message"].as_str().is_some_and(is_deferral)),
        "no deferral NOTICE in\n{v:#}"
    );
}

fn is_deferral(message: &str) -> bool {
    message.contains("inspector") && message.contains("local codes")
}

/// The banners of a text report as (signal word, message with its line breaks undone):
/// every block that starts with a signal word at the margin.
fn text_cautions(report: &str) -> Vec<(String, String)> {
    let mut out: Vec<(String, String)> = Vec::new();
    let mut open = false;
    for line in report.lines().skip(1) {
        let first = line.split_whitespace().next().unwrap_or("");
        if SIGNAL_WORDS.contains(&first) && !line.starts_with(' ') {
            out.push((first.to_string(), line[first.len()..].trim().to_string()));
            open = true;
        } else if open && line.starts_with("         ") {
            let last = out.last_mut().expect("a caution precedes its continuation");
            last.1.push(' ');
            last.1.push_str(line.trim());
        } else {
            open = false;
        }
    }
    out
}

fn assert_text_deferral(report: &str) {
    let cautions = text_cautions(report);
    assert!(
        cautions
            .iter()
            .any(|(word, message)| word == "NOTICE" && is_deferral(message)),
        "no deferral NOTICE in\n{report}"
    );
}

// ---------------------------------------------------------------------------------------
// Bad input: exit 2, the option named, the reason given, nothing on stdout, no panic.
// ---------------------------------------------------------------------------------------

#[test]
fn a_vent_outdoors_computes_no_room_and_says_where_to_look() {
    let vent = [
        "vent",
        "--gas",
        "air",
        "--volume",
        "2 m3",
        "--pressure",
        "10 barg",
        "--orifice",
        "12 mm",
    ];
    let out = pvhazard(
        &with(&vent, &["--outdoors", "--json"])
            .iter()
            .map(String::as_str)
            .collect::<Vec<_>>(),
    )
    .assert()
    .success()
    .get_output()
    .stdout
    .clone();
    let v: serde_json::Value = serde_json::from_slice(&out).expect("JSON");
    assert!(v["release"].is_null(), "{}", v["release"]);
    let text = String::from_utf8_lossy(&out);
    assert!(
        text.contains("vented outdoors: no room atmosphere is computed"),
        "{text}"
    );
    // Outdoors and a room at once is refused.
    refused(
        &as_strs(&with(&vent, &["--outdoors", "--room-volume", "40 m3"])),
        &["--outdoors", "--room-volume"],
    );
}

/// The JSON `pvhazard` prints for `args`.
fn json_of(args: &[&str]) -> Value {
    let out = pvhazard(args)
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    serde_json::from_slice(&out).expect("JSON")
}

#[test]
fn forgiving_spellings_mean_what_they_say() {
    let vent = [
        "vent",
        "--gas",
        "air",
        "--volume",
        "2 m3",
        "--pressure",
        "10 barg",
        "--json",
    ];
    // A fraction of an inch, as drain valves are named: 1/2 in = 12.7 mm exactly.
    let half = json_of(&as_strs(&with(&vent, &["--orifice", "1/2 in"])));
    let mm = json_of(&as_strs(&with(&vent, &["--orifice", "12.7 mm"])));
    assert_eq!(half["time_s"], mm["time_s"]);
    assert!(half["time_s"].as_f64().is_some());
    // Enum values in any case.
    let upper = json_of(&as_strs(&with(
        &vent,
        &[
            "--orifice",
            "12 mm",
            "--process",
            "Isentropic",
            "--units",
            "US",
        ],
    )));
    let lower = json_of(&as_strs(&with(&vent, &["--orifice", "12 mm"])));
    assert_eq!(upper["time_s"], lower["time_s"]);
    // Down to 0 barg is down to ambient: the usual end just above it, said in the basis.
    let zero = json_of(&as_strs(&with(
        &vent,
        &["--orifice", "12 mm", "--down-to", "0 barg"],
    )));
    assert_eq!(zero["time_s"], lower["time_s"]);
    assert!(
        zero.to_string().contains("read as down to ambient"),
        "{zero}"
    );
    // A wall option alone switches the wall model on, and says so.
    let wall = json_of(&as_strs(&with(
        &vent,
        &["--orifice", "12 mm", "--wall-mass", "540 kg"],
    )));
    assert!(wall["transient"].is_object(), "{}", wall["transient"]);
    assert!(wall.to_string().contains("also run with the wall model"));
    assert!(lower["transient"].is_null());
}

#[test]
fn a_worksheet_date_without_an_offset_is_read_in_the_sites_time_zone() {
    let dir = std::env::temp_dir().join(format!("pvhazard-cli-date-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    let site = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/sample_sites/larkspur-fabrication.toml"
    );
    for (given, recorded) in [
        ("2026-03-14T09:30", "2026-03-14T09:30:00+01:00"),
        ("2026-03-14", "2026-03-14T00:00:00+01:00"),
        ("2026-03-14T09:30:00Z", "2026-03-14T09:30:00+00:00"),
    ] {
        let out = dir.join(given.replace(':', "-"));
        pvhazard(&[
            "worksheet",
            site,
            "--tag",
            "AR-101",
            "--date",
            given,
            "--out",
            out.to_str().unwrap(),
        ])
        .assert()
        .success();
        let json = std::fs::read_dir(&out)
            .unwrap()
            .map(|e| e.unwrap().path())
            .find(|p| p.extension().is_some_and(|x| x == "json"))
            .unwrap();
        let v: Value = serde_json::from_str(&std::fs::read_to_string(json).unwrap()).unwrap();
        assert_eq!(v["date"], recorded, "--date {given}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn bare_bar_is_refused_because_it_says_neither_gauge_nor_absolute() {
    let args = with(&ENERGY[..5], &["--pressure", "10 bar"]);
    refused(
        &as_strs(&args),
        &["--pressure", "gauge or absolute", "10 barg", "10 bara"],
    );
}

#[test]
fn bare_psi_is_refused_because_it_says_neither_gauge_nor_absolute() {
    let args = with(&ENERGY[..5], &["--pressure", "150 psi"]);
    refused(
        &as_strs(&args),
        &["--pressure", "gauge or absolute", "150 psig", "150 psia"],
    );
}

#[test]
fn bare_mpa_is_refused_because_it_says_neither_gauge_nor_absolute() {
    let args = with(&ENERGY[..5], &["--pressure", "1 MPa"]);
    refused(&as_strs(&args), &["--pressure", "gauge or absolute"]);
}

#[test]
fn a_pressure_without_gauge_or_absolute_is_refused_on_every_pressure_option() {
    refused(
        &as_strs(&with(ENERGY, &["--mawp", "12 bar"])),
        &["--mawp", "gauge or absolute"],
    );
    refused(
        &as_strs(&with(VENT, &["--orifice", "10 mm", "--down-to", "5 bar"])),
        &["--down-to", "gauge or absolute"],
    );
    refused(
        &[
            "fill", "--gas", "air", "--volume", "50 L", "--from", "50 bar", "--to", "300 bara",
        ],
        &["--from", "gauge or absolute"],
    );
}

#[test]
fn zero_volume_is_refused_as_not_above_zero() {
    let args = [
        "energy",
        "--gas",
        "air",
        "--volume",
        "0 m3",
        "--pressure",
        "10 barg",
    ];
    refused(&args, &["--volume", "1 mL to 100000 m3"]);
}

#[test]
fn negative_volume_is_refused_as_not_above_zero() {
    let args = [
        "energy",
        "--gas",
        "air",
        "--volume",
        "-1 m3",
        "--pressure",
        "10 barg",
    ];
    refused(&args, &["--volume", "1 mL to 100000 m3"]);
}

#[test]
fn unknown_gas_is_refused_with_the_accepted_names() {
    let args = [
        "energy",
        "--gas",
        "steam",
        "--volume",
        "1 m3",
        "--pressure",
        "10 barg",
    ];
    refused(&args, &["--gas", "unknown gas", "steam", "carbon-dioxide"]);
}

#[test]
fn a_missing_gas_is_refused_as_required() {
    refused(
        &["energy", "--volume", "1 m3", "--pressure", "10 barg"],
        &["--gas", "required"],
    );
}

#[test]
fn a_word_for_a_number_is_refused() {
    let args = with(&ENERGY[..5], &["--pressure", "ten barg"]);
    refused(
        &as_strs(&args),
        &["--pressure", "does not start with a number"],
    );
}

#[test]
fn nan_is_refused_as_not_a_number() {
    let args = with(&ENERGY[..5], &["--pressure", "NaN barg"]);
    refused(&as_strs(&args), &["--pressure", "number"]);
}

#[test]
fn infinite_volume_is_refused_as_not_a_number() {
    let args = [
        "energy",
        "--gas",
        "air",
        "--volume",
        "inf m3",
        "--pressure",
        "10 barg",
    ];
    refused(&args, &["--volume", "number"]);
}

#[test]
fn a_huge_exponent_is_refused_as_too_large() {
    let args = with(&ENERGY[..5], &["--pressure", "1e400 barg"]);
    refused(&as_strs(&args), &["--pressure", "too large", "finite"]);
}

#[test]
fn a_temperature_below_absolute_zero_is_refused() {
    refused(
        &as_strs(&with(ENERGY, &["--temperature", "-300 C"])),
        &["--temperature", "absolute zero"],
    );
}

#[test]
fn an_unknown_temperature_unit_is_refused() {
    refused(
        &as_strs(&with(ENERGY, &["--temperature", "20 Q"])),
        &["--temperature", "not a unit of a temperature"],
    );
}

#[test]
fn a_pressure_given_as_volume_is_refused_as_the_wrong_kind_of_unit() {
    let args = [
        "energy",
        "--gas",
        "air",
        "--volume",
        "5 barg",
        "--pressure",
        "10 barg",
    ];
    refused(&args, &["--volume", "not a unit of a volume"]);
}

#[test]
fn a_volume_given_as_orifice_is_refused_as_the_wrong_kind_of_unit() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "2 L"])),
        &["--orifice", "not a unit of a length"],
    );
}

#[test]
fn a_quantity_without_a_unit_is_refused() {
    let args = [
        "energy",
        "--gas",
        "air",
        "--volume",
        "2",
        "--pressure",
        "10 barg",
    ];
    refused(&args, &["--volume", "no unit"]);
}

#[test]
fn a_fill_that_ends_below_its_start_is_refused() {
    let args = [
        "fill", "--gas", "air", "--volume", "50 L", "--from", "300 bara", "--to", "50 bara",
    ];
    refused(&args, &["--to", "above --from"]);
}

#[test]
fn a_fill_that_ends_where_it_starts_is_refused() {
    let args = [
        "fill", "--gas", "air", "--volume", "50 L", "--from", "50 bara", "--to", "50 bara",
    ];
    refused(&args, &["--to", "above --from"]);
}

#[test]
fn a_discharge_coefficient_of_zero_is_refused() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "10 mm", "--cd", "0"])),
        &["--cd", "outside 0.1 to 1"],
    );
}

#[test]
fn a_discharge_coefficient_above_one_is_refused() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "10 mm", "--cd", "1.5"])),
        &["--cd", "outside 0.1 to 1"],
    );
}

#[test]
fn a_negative_discharge_coefficient_written_with_equals_is_refused() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "10 mm", "--cd=-0.2"])),
        &["--cd", "outside 0.1 to 1"],
    );
}

#[test]
fn a_negative_discharge_coefficient_exits_2_without_output() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "10 mm", "--cd", "-0.2"])),
        &[],
    );
}

#[test]
fn a_negative_discharge_coefficient_is_refused_naming_cd() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "10 mm", "--cd", "-0.2"])),
        &["--cd", "outside 0.1 to 1"],
    );
}

#[test]
fn a_discharge_coefficient_that_is_not_a_number_is_refused() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "10 mm", "--cd", "abc"])),
        &["--cd", "not a number"],
    );
}

#[test]
fn liquefied_carbon_dioxide_is_refused() {
    let args = [
        "energy",
        "--gas",
        "co2",
        "--volume",
        "1 m3",
        "--pressure",
        "70 barg",
        "--temperature",
        "20 C",
    ];
    refused(&args, &["--pressure", "liquefied"]);
}

#[test]
fn filling_carbon_dioxide_into_its_liquid_range_is_refused() {
    let args = [
        "fill", "--gas", "co2", "--volume", "50 L", "--from", "1 bara", "--to", "70 barg",
    ];
    refused(&args, &["--to", "liquefied"]);
}

#[test]
fn the_real_gas_model_is_the_default_and_named_in_the_output() {
    let v = json(ENERGY);
    assert_eq!(v["model"], "real");
    let out = text(ENERGY);
    assert!(
        out.contains("reference multiparameter equation of state"),
        "{out}"
    );
    assert!(!out.contains("Ideal gas used at"), "{out}");
}

#[test]
fn a_vent_target_below_ambient_is_refused() {
    refused(
        &as_strs(&with(
            VENT,
            &["--orifice", "10 mm", "--down-to", "0.5 bara"],
        )),
        &["--down-to", "ambient"],
    );
    refused(
        &as_strs(&with(
            VENT,
            &["--orifice", "10 mm", "--down-to", "-0.1 barg"],
        )),
        &["--down-to", "ambient"],
    );
}

#[test]
fn a_gauge_ambient_pressure_is_refused_as_it_must_be_absolute() {
    refused(
        &as_strs(&with(ENERGY, &["--ambient-pressure", "101 kPa(g)"])),
        &["--ambient-pressure", "must be absolute"],
    );
}

#[test]
fn an_ambient_pressure_off_the_ground_is_refused() {
    refused(
        &as_strs(&with(ENERGY, &["--ambient-pressure", "0.5 kPa(a)"])),
        &["--ambient-pressure", "outside the range"],
    );
}

#[test]
fn ambient_pressure_and_elevation_together_are_refused() {
    let args = with(
        ENERGY,
        &["--ambient-pressure", "101 kPa(a)", "--elevation", "100 m"],
    );
    refused(
        &as_strs(&args),
        &["--ambient-pressure", "--elevation", "cannot be used with"],
    );
}

#[test]
fn an_elevation_above_the_troposphere_is_refused() {
    refused(
        &as_strs(&with(ENERGY, &["--elevation", "20000 m"])),
        &["--elevation", "troposphere", "11000 m"],
    );
}

#[test]
fn a_gauge_pressure_below_vacuum_is_refused() {
    let args = with(&ENERGY[..5], &["--pressure", "-2 barg"]);
    refused(&as_strs(&args), &["--pressure", "vacuum"]);
}

#[test]
fn a_mawp_below_vacuum_is_refused() {
    refused(
        &as_strs(&with(ENERGY, &["--mawp", "-5 barg"])),
        &["--mawp", "vacuum"],
    );
}

#[test]
fn a_vent_without_orifice_or_time_is_refused() {
    refused(VENT, &["--orifice", "required"]);
}

#[test]
fn a_zero_orifice_is_refused() {
    refused(
        &as_strs(&with(VENT, &["--orifice", "0 mm"])),
        &["--orifice", "above zero"],
    );
}

#[test]
fn a_zero_vent_time_is_refused() {
    refused(
        &as_strs(&with(VENT, &["--within", "0 s"])),
        &["--within", "'0 s'", "1 s to 30 days"],
    );
}

#[test]
fn an_unknown_process_is_refused_with_the_possible_values() {
    refused(
        &as_strs(&with(
            VENT,
            &["--orifice", "10 mm", "--process", "adiabatic"],
        )),
        &["--process", "adiabatic", "possible values", "isothermal"],
    );
}

#[test]
fn carbon_dioxide_below_its_triple_point_is_refused() {
    let args = [
        "energy",
        "--gas",
        "co2",
        "--volume",
        "1 m3",
        "--pressure",
        "10 barg",
        "--temperature",
        "-100 C",
    ];
    refused(&args, &["--temperature", "triple point"]);
}

#[test]
fn a_zero_tnt_energy_is_refused() {
    refused(
        &as_strs(&with(ENERGY, &["--tnt-energy", "0 MJ/kg"])),
        &["--tnt-energy", "above zero"],
    );
}

#[test]
fn an_absolute_overpressure_is_refused_as_it_is_a_difference() {
    refused(
        &as_strs(&with(ENERGY, &["--overpressure", "7 kPa(a)"])),
        &["--overpressure", "difference above ambient"],
    );
}

#[test]
fn a_negative_clearance_is_refused() {
    refused(
        &as_strs(&with(ENERGY, &["--clearance", "-5 m"])),
        &["--clearance", "above zero"],
    );
}

#[test]
fn a_supply_temperature_below_the_triple_point_is_refused() {
    refused(
        &as_strs(&with(FILL, &["--supply-temperature", "1 K"])),
        &["--supply-temperature", "triple point"],
    );
}

#[test]
fn a_too_cold_ambient_temperature_is_reported_under_its_own_name() {
    let args = with(FILL, &["--ambient-temperature", "-250 C"]);
    pvhazard(&as_strs(&args))
        .assert()
        .code(2)
        .stderr(predicate::str::contains("--ambient-temperature"))
        .stderr(predicate::str::contains("--initial-temperature").not());
}

#[test]
fn an_orifice_too_small_to_vent_is_refused_not_shown_as_zero_seconds() {
    let args = with(VENT, &["--orifice", "1e-300 mm"]);
    refused(&as_strs(&args), &["--orifice"]);
    refused(
        &as_strs(&with(&as_strs(&args), &["--json"])),
        &["--orifice"],
    );
}

#[test]
fn a_pressure_too_large_to_compute_is_refused_as_bad_input() {
    let args = with(&ENERGY[..5], &["--pressure", "1e300 barg"]);
    refused(&as_strs(&args), &["--pressure"]);
    refused(
        &as_strs(&with(&as_strs(&args), &["--json"])),
        &["--pressure"],
    );
}

// ---------------------------------------------------------------------------------------
// Good runs: the JSON contract.
// ---------------------------------------------------------------------------------------

#[test]
fn energy_json_is_one_object_with_the_contract_fields() {
    let v = json(ENERGY);
    for pointer in [
        "/gas_mass_kg",
        "/energy_j/isothermal",
        "/energy_j/isentropic",
        "/energy_j/brode",
        "/energy_j/availability",
        "/tnt_equivalent_kg",
        "/exclusion_distance_m",
        "/hydrotest_energy_j",
    ] {
        assert!(num(&v, pointer) > 0.0, "{pointer} is not above zero");
    }
    let standoffs = v["standoff_m"].as_array().expect("standoff_m is a list");
    assert!(!standoffs.is_empty());
    for s in standoffs {
        assert!(s["overpressure_pa"].as_f64().is_some_and(|p| p > 0.0));
        assert!(s["distance_m"].as_f64().is_some_and(|d| d > 0.0));
    }
    assert_cautions(&v);
}

#[test]
fn fill_json_is_one_object_with_the_contract_fields() {
    let v = json(FILL);
    for pointer in [
        "/final_temperature_k",
        "/mass_added_kg",
        "/settled_pressure_pa",
        "/fill_to_pressure_pa",
    ] {
        assert!(num(&v, pointer) > 0.0, "{pointer} is not above zero");
    }
    assert_cautions(&v);
}

#[test]
fn vent_json_is_one_object_with_the_contract_fields() {
    let v = json(&as_strs(&with(VENT, &["--orifice", "10 mm"])));
    for pointer in ["/time_s", "/choked_time_s", "/final_temperature_k"] {
        assert!(num(&v, pointer) > 0.0, "{pointer} is not above zero");
    }
    assert_cautions(&v);
}

#[test]
fn every_text_report_carries_the_deferral_notice() {
    assert_text_deferral(&text(ENERGY));
    assert_text_deferral(&text(FILL));
    assert_text_deferral(&text(&as_strs(&with(VENT, &["--orifice", "10 mm"]))));
    assert_text_deferral(&text(&as_strs(&with(VENT, &["--within", "10 min"]))));
    assert_text_deferral(&text(&as_strs(&with(
        &ENERGY[..5],
        &["--pressure", "0 barg"],
    ))));
}

// ---------------------------------------------------------------------------------------
// Reference values through the command line.
// ---------------------------------------------------------------------------------------

#[test]
fn air_at_one_megapascal_gauge_stores_the_reference_energies() {
    let v = json(&[
        "energy",
        "--gas",
        "air",
        "--volume",
        "1 m3",
        "--pressure",
        "1.0 MPa(g)",
        "--ambient-pressure",
        "101 kPa(a)",
        "--model",
        "ideal",
    ]);
    // source: reference notes, stored-energy check, computed from the closed forms.
    assert_close(
        num(&v, "/energy_j/isentropic"),
        1.362e6,
        0.005,
        "isentropic",
    );
    assert_close(num(&v, "/energy_j/brode"), 2.500e6, 0.005, "Brode");
    assert_close(
        num(&v, "/energy_j/isothermal"),
        2.630e6,
        0.005,
        "isothermal",
    );
    assert_close(
        num(&v, "/energy_j/availability"),
        1.630e6,
        0.005,
        "availability",
    );
    // source: ASME PCC-2 pneumatic-test safe distance, 30 m floor up to 135.5 MJ.
    assert_close(
        num(&v, "/exclusion_distance_m"),
        30.0,
        1e-9,
        "exclusion distance",
    );
}

#[test]
fn a_fast_air_fill_from_50_to_300_bar_reaches_the_reference_temperature() {
    let v = json(&[
        "fill",
        "--gas",
        "air",
        "--volume",
        "50 L",
        "--from",
        "50 bara",
        "--to",
        "300 bara",
        "--initial-temperature",
        "293.15 K",
        "--supply-temperature",
        "293.15 K",
        "--ambient-temperature",
        "293.15 K",
        "--model",
        "ideal",
    ]);
    // source: reference notes, fast-fill check, closed form T_f = p_f/(p_i/T_i + Δp/(γ·T0)).
    assert_close(
        num(&v, "/final_temperature_k"),
        384.8,
        0.002,
        "final temperature",
    );
}

#[test]
fn an_air_vent_from_10_to_5_barg_takes_the_reference_times() {
    let run = |process: &str| {
        json(&[
            "vent",
            "--gas",
            "air",
            "--volume",
            "1 m3",
            "--pressure",
            "10 barg",
            "--temperature",
            "293.15 K",
            "--orifice",
            "10 mm",
            "--cd",
            "1",
            "--down-to",
            "5 barg",
            "--process",
            process,
        ])
    };
    // source: reference notes, blow-down check; Bar-Meir, Fundamentals of Compressible
    // Fluid Mechanics, ch. 11 closed forms for the choked vent.
    assert_close(num(&run("isothermal"), "/time_s"), 38.8, 0.01, "isothermal");
    assert_close(num(&run("isentropic"), "/time_s"), 28.9, 0.01, "isentropic");
}

// ---------------------------------------------------------------------------------------
// Units.
// ---------------------------------------------------------------------------------------

#[test]
fn psig_and_barg_of_the_same_pressure_give_the_same_energy() {
    // 10 bar = 145.038 psi (1 psi = 6894.757 Pa, NIST SP 811 appendix B).
    let psig = json(&as_strs(&with(
        &ENERGY[..5],
        &["--pressure", "145.04 psig"],
    )));
    let barg = json(ENERGY);
    for pointer in [
        "/energy_j/isentropic",
        "/energy_j/brode",
        "/energy_j/isothermal",
    ] {
        assert_close(num(&psig, pointer), num(&barg, pointer), 0.001, pointer);
    }
}

#[test]
fn a_pressure_without_a_space_before_its_unit_is_read() {
    let v = json(&as_strs(&with(&ENERGY[..5], &["--pressure", "10barg"])));
    assert_close(
        num(&v, "/inputs/pressure_pa"),
        1_101_325.0,
        1e-12,
        "pressure",
    );
}

#[test]
fn us_units_put_psig_before_barg_on_the_pressure_line() {
    let report = text(&as_strs(&with(ENERGY, &["--units", "us"])));
    let line = report
        .lines()
        .find(|l| l.trim_start().starts_with("Pressure"))
        .expect("a pressure line");
    let (psig, barg) = (line.find("psig"), line.find("barg"));
    assert!(
        psig.is_some() && barg.is_some() && psig < barg,
        "psig is not before barg: {line}"
    );
}

#[test]
fn ten_barg_equals_its_absolute_value_at_standard_ambient() {
    let ambient = ["--ambient-pressure", "101.325 kPa(a)"];
    let gauge = json(&as_strs(&with(ENERGY, &ambient)));
    let absolute = json(&as_strs(&with(
        &ENERGY[..5],
        &["--pressure", "11.01325 bara", ambient[0], ambient[1]],
    )));
    for pointer in [
        "/inputs/pressure_pa",
        "/gas_mass_kg",
        "/energy_j/isentropic",
        "/energy_j/brode",
        "/energy_j/isothermal",
        "/energy_j/availability",
    ] {
        assert_close(num(&gauge, pointer), num(&absolute, pointer), 1e-9, pointer);
    }
}

#[test]
fn an_elevation_of_1500_m_lowers_the_ambient_pressure_to_the_standard_atmosphere() {
    let v = json(&as_strs(&with(ENERGY, &["--elevation", "1500 m"])));
    // source: U.S. Standard Atmosphere 1976, table I: 84 556 Pa at 1500 m geometric.
    assert_close(
        num(&v, "/inputs/ambient_pressure_pa"),
        84_556.0,
        0.001,
        "ambient pressure",
    );
}

// ---------------------------------------------------------------------------------------
// Text layout and cautions.
// ---------------------------------------------------------------------------------------

#[test]
fn text_reports_lead_with_the_decision_then_findings_banners_results_and_basis() {
    for args in [
        ENERGY.to_vec(),
        FILL.to_vec(),
        as_strs(&with(VENT, &["--orifice", "10 mm"])),
    ] {
        let report = text(&args);
        let lines: Vec<&str> = report.lines().collect();
        let first = lines
            .iter()
            .skip(1)
            .find(|l| !l.trim().is_empty())
            .expect("a line after the title");
        assert!(
            first.starts_with("Decision: "),
            "the first line after the title is not the decision: {first}"
        );
        let at = |heading: &str| {
            lines
                .iter()
                .position(|l| *l == heading)
                .unwrap_or_else(|| panic!("no {heading} in\n{report}"))
        };
        let (findings, inputs, results, basis) = (
            at("Findings"),
            at("Inputs"),
            at("Results"),
            at("Basis and assumptions"),
        );
        assert!(findings < inputs && inputs < results && results < basis);
        // Banners sit between the findings and the inputs; only the deferral follows the
        // basis, at the very end.
        for (i, l) in lines.iter().enumerate() {
            if SIGNAL_WORDS.iter().any(|w| l.starts_with(w)) {
                assert!(
                    (findings < i && i < inputs) || (i > basis && l.starts_with("NOTICE")),
                    "a banner out of place at line {i}:\n{report}"
                );
            }
        }
        let (word, last) = text_cautions(&report).pop().expect("a banner");
        assert!(word == "NOTICE" && is_deferral(&last), "{report}");
    }
}

#[test]
fn a_vessel_at_ambient_stores_zero_energy_with_a_notice() {
    let v = json(&as_strs(&with(&ENERGY[..5], &["--pressure", "0 barg"])));
    for pointer in [
        "/energy_j/isothermal",
        "/energy_j/isentropic",
        "/energy_j/brode",
        "/energy_j/availability",
    ] {
        assert_eq!(num(&v, pointer), 0.0, "{pointer}");
    }
    let findings = v["verdict"]["findings"].as_array().expect("findings");
    assert!(findings.iter().any(|f| f["hazard"] == "stored-energy"
        && f["status"] == "ok"
        && f["result"]
            .as_str()
            .is_some_and(|m| m.contains("no expansion energy"))));
    assert_eq!(v["verdict"]["decision"], "go", "{v:#}");
    assert_cautions(&v);
}

fn has_caution(v: &Value, level: &str, words: &[&str]) -> bool {
    v["cautions"].as_array().expect("cautions").iter().any(|c| {
        c["level"] == level
            && c["message"]
                .as_str()
                .is_some_and(|m| words.iter().all(|w| m.contains(w)))
    })
}

#[test]
fn a_pressure_above_the_mawp_raises_a_danger() {
    let v = json(&as_strs(&with(ENERGY, &["--mawp", "8 barg"])));
    assert!(has_caution(&v, "DANGER", &["MAWP"]), "{v:#}");
    let below = json(&as_strs(&with(ENERGY, &["--mawp", "12 barg"])));
    assert!(!has_caution(&below, "DANGER", &["MAWP"]), "{below:#}");
}

#[test]
fn a_fill_hotter_than_the_rated_temperature_raises_a_warning() {
    let v = json(&as_strs(&with(FILL, &["--rated-temperature", "65 C"])));
    assert!(has_caution(&v, "WARNING", &["rated temperature"]), "{v:#}");
}

#[test]
fn a_vent_colder_than_the_mdmt_raises_a_warning() {
    let v = json(&as_strs(&with(
        VENT,
        &["--orifice", "10 mm", "--min-metal-temperature", "-20 C"],
    )));
    assert!(num(&v, "/final_temperature_k") < 253.15);
    assert!(has_caution(&v, "WARNING", &["MDMT"]), "{v:#}");
}

#[test]
fn the_orifice_found_for_ten_minutes_vents_in_ten_minutes() {
    let v = json(&as_strs(&with(VENT, &["--within", "10 min"])));
    assert!(v["time_s"].is_null());
    let d = num(&v, "/required_orifice_m");
    assert!(d > 0.0);
    let orifice = format!("{d} m");
    let check = json(&as_strs(&with(VENT, &["--orifice", &orifice])));
    assert_close(num(&check, "/time_s"), 600.0, 0.001, "vent time");
}

// ---------------------------------------------------------------------------------------
// Gases, help and version.
// ---------------------------------------------------------------------------------------

#[test]
fn gases_lists_all_eight_gases() {
    let table = text(&["gases"]);
    for gas in GASES {
        assert!(
            table
                .lines()
                .any(|l| l.split_whitespace().next() == Some(gas)),
            "{gas} missing from\n{table}"
        );
    }
}

#[test]
fn gases_json_lists_all_eight_gases() {
    let v = json(&["gases"]);
    let names: Vec<&str> = v["gases"]
        .as_array()
        .expect("gases is a list")
        .iter()
        .map(|g| g["name"].as_str().expect("a gas has a name"))
        .collect();
    assert_eq!(names, GASES);
}

#[test]
fn help_exits_0() {
    pvhazard(&["--help"])
        .assert()
        .success()
        .stdout(predicate::str::contains("Usage"));
}

#[test]
fn version_exits_0_with_the_package_version() {
    pvhazard(&["--version"])
        .assert()
        .success()
        .stdout(predicate::str::contains(env!("CARGO_PKG_VERSION")));
}

#[test]
fn the_real_gas_result_carries_the_ideal_gas_values_for_the_same_inputs() {
    // source: the real-gas issue's figures for nitrogen at 200 bar: the ideal isentropic
    // energy about 25 % high and the mass about 5 % high (CoolProp 8.0.0 gives 25.4 % and
    // 5.3 % at 201 bar(a), 20 °C; tests/reference/energy.csv is the finer check).
    let args = [
        "energy",
        "--gas",
        "nitrogen",
        "--volume",
        "50 L",
        "--pressure",
        "200 barg",
    ];
    let v = json(&args);
    let ideal = &v["ideal_gas_comparison"];
    let over = |real: &str, ideal_path: &str| num(&v, ideal_path) / num(&v, real) - 1.0;
    let e = over(
        "/energy_j/isentropic",
        "/ideal_gas_comparison/energy_j/isentropic",
    );
    assert!(
        (0.22..0.28).contains(&e),
        "ideal isentropic energy {e} high"
    );
    let m = over("/gas_mass_kg", "/ideal_gas_comparison/gas_mass_kg");
    assert!((0.04..0.06).contains(&m), "ideal mass {m} high");
    assert!(ideal["exclusion_distance_m"].is_number());
    let out = text(&args);
    assert!(out.contains("Ideal gas, for comparison"), "{out}");
    assert!(out.contains("real gas 20.3 % lower"), "{out}");
    // On the ideal model there is nothing to compare with.
    let mut ideal_args = args.to_vec();
    ideal_args.extend(["--model", "ideal"]);
    assert!(json(&ideal_args)["ideal_gas_comparison"].is_null());
}

#[test]
fn fill_and_vent_compare_with_the_ideal_gas_and_echo_the_supply_pressure() {
    let v = json(&[
        "fill",
        "--gas",
        "hydrogen",
        "--volume",
        "50 L",
        "--from",
        "20 bara",
        "--to",
        "700 bara",
        "--supply-pressure",
        "875 bara",
        "--supply-temperature",
        "-40 C",
        "--ambient-temperature",
        "15 C",
    ]);
    assert_eq!(num(&v, "/inputs/supply_pressure_pa"), 875e5);
    // Hydrogen at 700 bar: the ideal gas overstates the mass added by about half.
    let m = num(&v, "/ideal_gas_comparison/mass_added_kg") / num(&v, "/mass_added_kg");
    assert!((1.4..1.7).contains(&m), "{m}");
    let v = json(&[
        "vent",
        "--gas",
        "air",
        "--volume",
        "1 m3",
        "--pressure",
        "10 barg",
        "--orifice",
        "10 mm",
    ]);
    assert!(num(&v, "/ideal_gas_comparison/time_s") > 0.0);
}

#[test]
fn a_supply_pressure_below_vacuum_is_refused() {
    refused(
        &[
            "fill",
            "--gas",
            "air",
            "--volume",
            "50 L",
            "--from",
            "20 bara",
            "--to",
            "300 bara",
            "--supply-pressure",
            "-2 barg",
        ],
        &["--supply-pressure", "vacuum"],
    );
}

#[test]
fn carbon_dioxide_that_would_freeze_on_expansion_is_refused_with_the_way_forward() {
    // Span & Wagner's equation covers fluid states only: from 30 bar at 20 °C the isentrope
    // to 1 atm ends in dry ice (its triple point is 5.18 bar, 216.6 K).
    let args = [
        "energy",
        "--gas",
        "CO2",
        "--volume",
        "50 L",
        "--pressure",
        "30 bara",
    ];
    refused(&args, &["--pressure", "freezes", "--model ideal"]);
    let mut ideal = args.to_vec();
    ideal.extend(["--model", "ideal"]);
    assert!(num(&json(&ideal), "/energy_j/isentropic") > 0.0);
}

#[test]
fn energy_json_echoes_what_the_keep_back_distance_is_for() {
    let base = [
        "energy",
        "--gas",
        "air",
        "--volume",
        "2 m3",
        "--pressure",
        "10 barg",
    ];
    let v = json(&base);
    assert_eq!(v["inputs"]["work"], "in-service");
    assert_eq!(v["inputs"]["keep_back_overpressure_pa"], 6900.0);
    let test = json(&[&base[..], &["--work", "pressure-test"]].concat());
    assert_eq!(test["inputs"]["work"], "pressure-test");
    assert!(test["inputs"]["keep_back_overpressure_pa"].is_null());
}

#[test]
fn a_csv_to_standard_output_replaces_the_report() {
    let out = text(&[
        "fill",
        "--gas",
        "air",
        "--volume",
        "6.8 L",
        "--from",
        "20 barg",
        "--to",
        "300 barg",
        "--rate",
        "100 bar/min",
        "--csv",
        "-",
    ]);
    let mut lines = out.lines();
    assert_eq!(
        lines.next(),
        Some("time_s,pressure_pa,gas_temperature_k,wall_temperature_k")
    );
    assert!(lines.all(|l| l.split(',').count() == 4), "{out}");
    assert!(!std::path::Path::new("-").exists(), "no file named '-'");
}

#[test]
fn parse_errors_and_the_tools_own_share_one_style() {
    // A value the parser refuses, a missing option, and a refusal by the rules: each one
    // line (or block) starting "pvhazard: error:", exit 2.
    for (args, starts) in [
        (
            vec![
                "vent",
                "--gas",
                "air",
                "--volume",
                "2 m3",
                "--pressure",
                "10 barg",
                "--orifice",
                "12 mm",
                "--cd",
                "7",
            ],
            "pvhazard: error: --cd = '7': ",
        ),
        (
            vec!["fill", "--gas", "air", "--volume", "6.8 L"],
            "pvhazard: error: ",
        ),
        (
            vec![
                "fill",
                "--gas",
                "air",
                "--volume",
                "6.8 L",
                "--from",
                "20 barg",
                "--to",
                "300 barg",
                "--rate",
                "1e-3 bar/min",
            ],
            "pvhazard: error: --rate = '1e-3 bar/min': ",
        ),
    ] {
        let out = pvhazard(&args).assert().code(2).get_output().stderr.clone();
        let err = String::from_utf8(out).unwrap();
        assert!(err.starts_with(starts), "{err}");
    }
}

#[test]
fn help_gives_the_exit_codes() {
    let help = text(&["--help"]);
    for code in [
        "0 computed",
        "1 internal failure",
        "2 bad input",
        "3 `check`",
    ] {
        assert!(help.contains(code), "{code}: {help}");
    }
}

#[test]
fn completions_are_printed_for_each_shell() {
    for (shell, mark) in [
        ("bash", "_pvhazard()"),
        ("zsh", "#compdef pvhazard"),
        ("fish", "complete -c pvhazard"),
    ] {
        let script = text(&["completions", shell]);
        assert!(script.contains(mark), "{shell}");
        assert!(
            script.contains("room-volume"),
            "{shell}: every option is offered"
        );
    }
}
