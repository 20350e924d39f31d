//! The bad-input catalogue: values a user may type or write in a file that pvhazard must
//! refuse. Every case exits 2, and its message names the option or key, echoes the value as
//! typed, and says what is accepted.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// One refusal: the arguments, the field the message must name, the value it must echo.
struct Case {
    args: Vec<String>,
    env: Option<(&'static str, &'static str)>,
    field: &'static str,
    typed: String,
}

fn pvhazard() -> Command {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_pvhazard"));
    cmd.env_remove("SOURCE_DATE_EPOCH");
    cmd
}

fn check(case: &Case) -> Result<(), String> {
    let mut cmd = pvhazard();
    cmd.args(&case.args);
    if let Some((k, v)) = case.env {
        cmd.env(k, v);
    }
    let o: Output = cmd.output().expect("pvhazard runs");
    let stderr = String::from_utf8_lossy(&o.stderr);
    let mut wrong = Vec::new();
    if o.status.code() != Some(2) {
        wrong.push(format!("exit {:?}, not 2", o.status.code()));
    }
    if !o.stdout.is_empty() {
        wrong.push("printed a result".into());
    }
    if !stderr.contains(case.field) {
        wrong.push(format!("does not name {}", case.field));
    }
    if !stderr.contains(&case.typed) {
        wrong.push(format!("does not echo '{}'", case.typed));
    }
    if !stderr.contains("accepted") {
        wrong.push("does not say what is accepted".into());
    }
    if wrong.is_empty() {
        Ok(())
    } else {
        Err(format!(
            "{:?}: {}\n    {}",
            case.args,
            wrong.join("; "),
            stderr.trim()
        ))
    }
}

/// All the cases, each reported, so that one run shows every message that falls short.
fn assert_all(cases: &[Case]) {
    let failures: Vec<String> = cases.iter().filter_map(|c| check(c).err()).collect();
    assert!(
        failures.is_empty(),
        "{} of {} cases fall short:\n{}",
        failures.len(),
        cases.len(),
        failures.join("\n")
    );
}

const ENERGY: &[&str] = &[
    "energy",
    "--gas",
    "air",
    "--volume",
    "1 m3",
    "--pressure",
    "10 barg",
];
const FILL: &[&str] = &[
    "fill", "--gas", "air", "--volume", "50 L", "--from", "0 barg", "--to", "300 barg",
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

/// A case on `base` with `option` set to `value` (replacing the base's own), and `extra`.
fn opt(base: &[&str], option: &'static str, value: &str, extra: &[&str]) -> Case {
    let mut args: Vec<String> = Vec::new();
    let mut i = 0;
    while i < base.len() {
        if base[i] == option {
            i += 2;
            continue;
        }
        args.push(base[i].to_string());
        i += 1;
    }
    args.push(option.to_string());
    args.push(value.to_string());
    args.extend(extra.iter().map(|s| s.to_string()));
    Case {
        args,
        env: None,
        field: option,
        typed: value.to_string(),
    }
}

#[test]
fn the_command_line_refuses_each_bad_value_naming_the_option_and_the_value_as_typed() {
    let scratch = Scratch::new("options");
    let rate = ["--rate", "25 bar/min"];
    let orifice = ["--orifice", "10 mm"];
    let check = ["--orifice", "10 mm", "--depressuring-check"];
    let long_wo = "W".repeat(5000);
    let cases = vec![
        opt(ENERGY, "--volume", "0 m3", &[]),
        opt(ENERGY, "--volume", "-2 m3", &[]),
        opt(ENERGY, "--volume", "1e300 m3", &[]),
        opt(ENERGY, "--volume", "1e-300 m3", &[]),
        opt(VENT, "--volume", "0.1 mL", &orifice),
        opt(ENERGY, "--volume", "2 barg", &[]),
        opt(ENERGY, "--volume", "2", &[]),
        opt(ENERGY, "--volume", "two m3", &[]),
        opt(ENERGY, "--volume", "nan m3", &[]),
        opt(ENERGY, "--volume", "1e400 m3", &[]),
        opt(ENERGY, "--pressure", "10 bar", &[]),
        opt(ENERGY, "--pressure", "-5 barg", &[]),
        opt(ENERGY, "--pressure", "1e300 bara", &[]),
        opt(ENERGY, "--pressure", "20000 bara", &[]),
        opt(ENERGY, "--temperature", "-300 C", &[]),
        opt(ENERGY, "--temperature", "5000 K", &[]),
        opt(ENERGY, "--temperature", "20 X", &[]),
        opt(ENERGY, "--tnt-energy", "4 MJ", &[]),
        opt(ENERGY, "--tnt-energy", "0 MJ/kg", &[]),
        opt(ENERGY, "--overpressure", "7 kPa(a)", &[]),
        opt(ENERGY, "--overpressure", "0 kPa", &[]),
        opt(ENERGY, "--energy-limit", "-1 kJ", &[]),
        opt(ENERGY, "--mawp", "10 bar", &[]),
        opt(ENERGY, "--clearance", "-5 m", &[]),
        opt(ENERGY, "--ambient-pressure", "0 kPa(g)", &[]),
        opt(ENERGY, "--ambient-pressure", "500 kPa(a)", &[]),
        opt(ENERGY, "--elevation", "50 km", &[]),
        opt(ENERGY, "--gas", "unobtainium", &[]),
        // The fill is refused on its end: --to must lie above --from.
        Case {
            field: "--to",
            typed: "300 barg".into(),
            ..opt(FILL, "--from", "350 barg", &[])
        },
        opt(FILL, "--volume", "0 L", &[]),
        opt(FILL, "--rate", "0 bar/min", &[]),
        opt(FILL, "--rate", "1e9 kg/s", &[]),
        opt(FILL, "--rate", "1e9 bar/min", &[]),
        opt(FILL, "--rate", "25 L/min", &[]),
        opt(FILL, "--duration", "0 s", &[]),
        opt(FILL, "--duration", "1e-300 s", &[]),
        opt(FILL, "--duration", "1e9 s", &[]),
        opt(FILL, "--supply-pressure", "100 barg", &[]),
        opt(FILL, "--supply-temperature", "-500 F", &[]),
        opt(FILL, "--rated-temperature", "abc", &[]),
        opt(FILL, "--wall-mass", "0 kg", &rate),
        opt(FILL, "--inner-coefficient", "-5 W/m2K", &rate),
        opt(FILL, "--inlet-diameter", "2 m", &rate),
        opt(FILL, "--empty-mass", "1e9 kg", &rate),
        opt(FILL, "--wrap-mass", "5 kg", &rate),
        opt(VENT, "--cd", "1e-320", &orifice),
        opt(VENT, "--cd", "1e-308", &orifice),
        opt(VENT, "--cd", "1.5", &orifice),
        opt(VENT, "--cd", "abc", &orifice),
        opt(VENT, "--within", "1e-320s", &[]),
        opt(VENT, "--within", "1e-300s", &[]),
        opt(VENT, "--within", "0 s", &[]),
        opt(VENT, "--orifice", "0 mm", &[]),
        opt(VENT, "--orifice", "10 m", &[]),
        opt(VENT, "--down-to", "20 barg", &orifice),
        opt(VENT, "--min-metal-temperature", "-500 C", &orifice),
        opt(VENT, "--depressuring-limit", "0 s", &check),
        opt(VENT, "--depressuring-fraction", "0", &check),
        opt(VENT, "--depressuring-fraction", "1e-320", &check),
        opt(VENT, "--depressuring-cap", "0 kPa", &check),
        opt(VENT, "--design-pressure", "5 bar", &check),
        // A vent time no orifice up to 5 m reaches.
        opt(
            &[
                "vent",
                "--gas",
                "air",
                "--volume",
                "1e5 m3",
                "--pressure",
                "100 barg",
            ],
            "--within",
            "1 s",
            &[],
        ),
        opt(
            &["worksheet", LARKSPUR_ARG, "--all"],
            "--work-order",
            "",
            &[],
        ),
        opt(
            &["worksheet", LARKSPUR_ARG, "--all"],
            "--work-order",
            "#!?",
            &[],
        ),
        // A control character is echoed as its escape, so that it cannot act on the terminal.
        Case {
            typed: "WO\\u{7}2291".into(),
            ..opt(
                &["worksheet", LARKSPUR_ARG, "--all"],
                "--work-order",
                "WO\u{7}2291",
                &[],
            )
        },
        Case {
            typed: "W".repeat(40),
            ..opt(
                &["worksheet", LARKSPUR_ARG, "--all"],
                "--work-order",
                &long_wo,
                &[],
            )
        },
        opt(
            &["worksheet", LARKSPUR_ARG, "--all"],
            "--prepared-by",
            " ",
            &[],
        ),
        opt(
            &["worksheet", LARKSPUR_ARG, "--all"],
            "--date",
            "yesterday",
            &[],
        ),
        opt(
            &["worksheet", LARKSPUR_ARG, "--all"],
            "--date",
            "1199-01-01T00:00:00Z",
            &[],
        ),
        opt(&["worksheet", LARKSPUR_ARG], "--tag", "NOPE-1", &[]),
        // A folder that cannot be made: under a file.
        opt(
            &["worksheet", LARKSPUR_ARG, "--all"],
            "--out",
            "/dev/null/records",
            &[],
        ),
        opt(
            &["worksheet", LARKSPUR_ARG, "--all"],
            "--template",
            "no-such-template",
            &[],
        ),
        Case {
            env: Some(("SOURCE_DATE_EPOCH", "-99999999999")),
            field: "SOURCE_DATE_EPOCH",
            typed: "-99999999999".into(),
            ..opt(
                &["worksheet", LARKSPUR_ARG, "--all"],
                "--out",
                "unused",
                &[],
            )
        },
        Case {
            env: Some(("SOURCE_DATE_EPOCH", "soon")),
            field: "SOURCE_DATE_EPOCH",
            typed: "soon".into(),
            ..opt(
                &["worksheet", LARKSPUR_ARG, "--all"],
                "--out",
                "unused",
                &[],
            )
        },
    ];
    let cases: Vec<Case> = cases
        .into_iter()
        .map(|mut c| {
            for a in &mut c.args {
                if a == LARKSPUR_ARG {
                    *a = larkspur().display().to_string();
                }
            }
            // Were a case accepted, its records go to a scratch folder.
            if c.args[0] == "worksheet" && !c.args.iter().any(|a| a == "--out") {
                c.args.push("--out".into());
                c.args.push(scratch.0.join("out").display().to_string());
            }
            c
        })
        .collect();
    assert!(cases.len() >= 60, "{} cases", cases.len());
    assert_all(&cases);
}

/// Stands for the sample site's path in the tables above.
const LARKSPUR_ARG: &str = "@larkspur";

fn larkspur() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("sample_sites/larkspur-fabrication.toml")
}

/// A scratch folder for edited site and template files.
struct Scratch(PathBuf);

impl Scratch {
    fn new(name: &str) -> Scratch {
        let d = std::env::temp_dir().join(format!("pvhazard-bad-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&d);
        std::fs::create_dir_all(&d).expect("a scratch folder");
        Scratch(d)
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// The sample site with `from` replaced by `to` (once), checked with `pvhazard check`.
fn site_case(
    scratch: &Scratch,
    i: usize,
    from: &str,
    to: &str,
    key: &'static str,
    typed: &str,
) -> Case {
    let text = std::fs::read_to_string(larkspur()).expect("the sample site");
    assert!(text.contains(from), "the sample site has no {from}");
    let path = scratch.0.join(format!("site-{i}.toml"));
    std::fs::write(&path, text.replacen(from, to, 1)).expect("a scratch site");
    Case {
        args: vec!["check".into(), path.display().to_string()],
        env: None,
        field: key,
        typed: typed.to_string(),
    }
}

#[test]
fn site_and_template_files_refuse_each_bad_value_naming_the_key_and_the_value_as_written() {
    let scratch = Scratch::new("files");
    let long_tag = format!("tag = \"{}\"", "T".repeat(5000));
    let edits: Vec<(&str, String, &'static str, String)> = vec![
        (
            "volume = \"2 m3\"",
            "volume = 2".into(),
            "vessel[1].volume",
            "2".into(),
        ),
        (
            "volume = \"2 m3\"",
            "volume = \"2 m3\"\nvolume = \"3 m3\"".into(),
            "vessel[1].volume",
            "volume = \"3 m3\"".into(),
        ),
        (
            "volume = \"2 m3\"",
            "volume = \"1e300 m3\"".into(),
            "vessel[1].volume",
            "1e300 m3".into(),
        ),
        (
            "volume = \"2 m3\"",
            "volume = \"0 m3\"".into(),
            "vessel[1].volume",
            "0 m3".into(),
        ),
        (
            "volume = \"2 m3\"",
            "volume = \"1e-300 m3\"".into(),
            "vessel[1].volume",
            "1e-300 m3".into(),
        ),
        (
            "mawp = \"13 barg\"",
            "mawp = \"13 bar\"".into(),
            "vessel[1].mawp",
            "13 bar".into(),
        ),
        (
            "cd = 0.61",
            "cd = 1e-320".into(),
            "vessel[1].drain.cd",
            "1e-320".into(),
        ),
        (
            "location = \"Compressor house and weld bay, Unit 7\"",
            "location = \"Unit 7\\u0007\"".into(),
            "site.location",
            "U+0007".into(),
        ),
        (
            "description = \"Vertical air receiver, compressor house, no. 1\"",
            "description = \"\"".into(),
            "vessel[1].description",
            "''".into(),
        ),
        (
            "description = \"1/2 in ball valve to the drain line\"",
            format!("description = \"{}\"", "v".repeat(300)),
            "vessel[1].drain.description",
            "300 characters".into(),
        ),
        (
            "mawp = \"13 barg\"",
            "mawp = \"0 barg\"".into(),
            "vessel[1].mawp",
            "0 barg".into(),
        ),
        (
            "orifice = \"12 mm\"",
            "orifice = \"-12 mm\"".into(),
            "vessel[1].drain.orifice",
            "-12 mm".into(),
        ),
        (
            "name = \"Larkspur Fabrication Shop (demo)\"",
            "name = \"\"".into(),
            "site.name",
            "''".into(),
        ),
        (
            "name = \"Larkspur Fabrication Shop (demo)\"",
            "name = \"***\"".into(),
            "site.name",
            "***".into(),
        ),
        (
            "tag = \"AR-101\"",
            "tag = \"#!\"".into(),
            "vessel[1].tag",
            "#!".into(),
        ),
        (
            "tag = \"AR-101\"",
            long_tag,
            "vessel[1].tag",
            "T".repeat(40),
        ),
        (
            "tag = \"AR-101\"",
            "tag = \"AR\\u0007101\"".into(),
            "vessel[1].tag",
            "U+0007".into(),
        ),
        (
            "time_zone = \"+01:00\"",
            "time_zone = \"Mars/Base\"".into(),
            "site.time_zone",
            "Mars/Base".into(),
        ),
        (
            "units = \"si\"",
            "units = \"imperial\"".into(),
            "site.units",
            "imperial".into(),
        ),
        (
            "ambient_temperature = \"18 C\"",
            "ambient_temperature = \"18\"".into(),
            "site.ambient_temperature",
            "18".into(),
        ),
        (
            "elevation = \"120 m\"",
            "elevation = \"99 km\"".into(),
            "site.elevation",
            "99 km".into(),
        ),
        (
            "gas = \"air\"",
            "gas = \"aether\"".into(),
            "vessel[1].gas",
            "aether".into(),
        ),
        (
            "material = \"carbon-steel\"",
            "material = \"cheese\"".into(),
            "vessel[1].material",
            "cheese".into(),
        ),
    ];
    let mut cases: Vec<Case> = edits
        .iter()
        .enumerate()
        .map(|(i, (from, to, key, typed))| site_case(&scratch, i, from, to, key, typed))
        .collect();
    // A template whose name cannot name a file.
    let template = scratch.0.join("t.toml");
    std::fs::write(
        &template,
        "[template]\nname = \"???\"\ntitle = \"x\"\npurpose = \"x\"\nequipment = \"vessel\"\ncalculations = [\"stored-energy\"]\nsignoff = [\"Prepared\"]\n",
    )
    .expect("a scratch template");
    cases.push(Case {
        args: vec![
            "worksheet".into(),
            larkspur().display().to_string(),
            "--all".into(),
            "--out".into(),
            scratch.0.join("out").display().to_string(),
            "--template".into(),
            template.display().to_string(),
        ],
        env: None,
        field: "template.name",
        typed: "???".into(),
    });
    assert_all(&cases);
}
