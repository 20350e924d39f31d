//! Where the gas and the pieces go, through the command line: venting into a room (its
//! atmosphere, `release`) and a burst's fragments (`fragments`), and the findings they
//! decide.

use assert_cmd::Command;
use serde_json::Value;

/// The JSON of a command that succeeds.
fn run(command: &[&str], args: &[&str]) -> Value {
    let out = Command::cargo_bin("pvhazard")
        .unwrap()
        .args(command)
        .args(args)
        .arg("--json")
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    serde_json::from_slice(&out).unwrap()
}

fn vent(args: &[&str]) -> Value {
    run(&["vent"], args)
}

fn finding<'a>(v: &'a Value, hazard: &str) -> &'a Value {
    v["verdict"]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["hazard"] == hazard)
        .unwrap_or_else(|| panic!("no {hazard} finding in {}", v["verdict"]))
}

const NITROGEN: [&str; 8] = [
    "--gas",
    "nitrogen",
    "--volume",
    "50 L",
    "--pressure",
    "200 barg",
    "--orifice",
    "3 mm",
];

#[test]
fn nitrogen_into_a_closed_room_lies_between_displacement_and_full_mixing() {
    let v = vent(&[&NITROGEN[..], &["--room-volume", "40 m3"]].concat());
    let r = &v["release"];
    let kg = r["released_mass_kg"].as_f64().unwrap();
    assert!((kg / v["mass_vented_kg"].as_f64().unwrap() - 1.0).abs() < 1e-9);
    // The nitrogen's volume at 1 atm and 20 °C over the room's (ideal gas).
    let vg = kg / 0.028_013_4 * 8.314_462_618 * 293.15 / 101_325.0 / 40.0;
    let o2 = r["min_oxygen_fraction"].as_f64().unwrap();
    assert!(o2 >= 0.2095 * (1.0 - vg), "{o2}");
    assert!((o2 / (0.2095 * (-vg).exp()) - 1.0).abs() < 1e-3, "{o2}");
    assert!(r["recovery_time_s"].is_null());
    assert!(r["time_below_19_5_percent_s"].is_null());
    let f = finding(&v, "oxygen-depletion");
    assert_eq!(f["status"], "stop");
    assert_eq!(v["verdict"]["decision"], "no-go");
    // The generic gas finding gives way to the room's.
    let n = v["verdict"]["findings"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|f| f["hazard"] == "oxygen-depletion")
        .count();
    assert_eq!(n, 1);
}

#[test]
fn enough_ventilation_keeps_the_room_within_its_limits() {
    let closed = vent(&[&NITROGEN[..], &["--room-volume", "40 m3"]].concat());
    let needed = closed["release"]["ventilation_needed_per_h"]
        .as_f64()
        .unwrap();
    let rate = format!("{} /h", needed * 1.01);
    let v = vent(
        &[
            &NITROGEN[..],
            &["--room-volume", "40 m3", "--ventilation", &rate],
        ]
        .concat(),
    );
    assert_eq!(v["release"]["within_limits"], true);
    assert_eq!(finding(&v, "oxygen-depletion")["status"], "ok");
    // The same air as a flow: 40 m³ an hour is one change an hour.
    let one = vent(
        &[
            &NITROGEN[..],
            &["--room-volume", "40 m3", "--ventilation", "40 m3/h"],
        ]
        .concat(),
    );
    assert!((one["release"]["air_changes_per_h"].as_f64().unwrap() - 1.0).abs() < 1e-12);
}

#[test]
fn hydrogen_is_judged_on_its_flammable_limit_and_outdoors_computes_nothing() {
    let h2 = [
        "--gas",
        "hydrogen",
        "--volume",
        "50 L",
        "--pressure",
        "200 barg",
        "--orifice",
        "1 mm",
    ];
    let v = vent(
        &[
            &h2[..],
            &["--room-volume", "100 m3", "--ventilation", "3 /h"],
        ]
        .concat(),
    );
    let share = v["release"]["peak_flammable_fraction_of_lfl"]
        .as_f64()
        .unwrap();
    assert!(share > 1.0, "{share}");
    let f = finding(&v, "flammable");
    assert_eq!(f["status"], "stop");
    assert_eq!(f["level"], "DANGER");
    // Without a room: no room calculation, the gas's own hazard named.
    let outdoors = vent(&h2);
    assert!(outdoors["release"].is_null());
    assert_eq!(
        finding(&outdoors, "flammable")["basis"],
        "the gas's own hazard"
    );
}

#[test]
fn room_refusals_name_the_option() {
    for (args, option) in [
        (
            vec!["--room-volume", "40 m3", "--ventilation", "2 bar"],
            "--ventilation",
        ),
        (
            vec!["--room-volume", "40 m3", "--ventilation", "-1 /h"],
            "--ventilation",
        ),
        (vec!["--room-volume", "0 m3"], "room-volume"),
        (vec!["--ventilation", "2 /h"], "--room-volume"),
    ] {
        Command::cargo_bin("pvhazard")
            .unwrap()
            .arg("vent")
            .args(NITROGEN)
            .args(&args)
            .assert()
            .code(2)
            .stderr(predicates::str::contains(option));
    }
}

fn energy(args: &[&str]) -> Value {
    let out = Command::cargo_bin("pvhazard")
        .unwrap()
        .args([
            "energy",
            "--gas",
            "air",
            "--volume",
            "2 m3",
            "--pressure",
            "10 barg",
        ])
        .args(args)
        .arg("--json")
        .assert()
        .success()
        .get_output()
        .stdout
        .clone();
    serde_json::from_slice(&out).unwrap()
}

#[test]
fn fragments_follow_moores_equation_and_are_judged_against_the_clearance() {
    let v = energy(&["--empty-mass", "540 kg", "--clearance", "40 m"]);
    let f = &v["fragments"];
    let e = v["energy_j"]["isentropic"].as_f64().unwrap();
    let c = v["gas_mass_kg"].as_f64().unwrap();
    let expected = 1.092 * (e / (1.0 + c / (2.0 * 540.0)) / 540.0).sqrt();
    let speed = f["velocity_m_per_s"].as_f64().unwrap();
    assert!((speed / expected - 1.0).abs() < 1e-9, "{speed} {expected}");
    let (free, drag) = (
        f["max_range_m"].as_f64().unwrap(),
        f["drag_range_m"].as_f64().unwrap(),
    );
    assert!((free / (speed * speed / 9.806_65) - 1.0).abs() < 1e-9);
    assert!(drag < free && drag > 40.0, "{drag} {free}");
    assert_eq!(v["inputs"]["empty_mass_kg"], 540.0);
    let found = finding(&v, "fragments");
    assert_eq!(found["status"], "action");
    assert_eq!(found["level"], "WARNING");
    // Within a clearance past the range: ok. Without the mass: nothing computed.
    let far = energy(&["--empty-mass", "540 kg", "--clearance", "1000 m"]);
    assert_eq!(finding(&far, "fragments")["status"], "ok");
    let none = energy(&[]);
    assert!(none["fragments"].is_null());
}
