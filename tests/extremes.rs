//! Inputs at the ends of the accepted ranges: each gives finite results (exit 0, JSON that
//! parses) or a refusal naming what to change (exit 2), never an internal error (exit 1).

use std::process::Command;

fn run(args: &str) -> (Option<i32>, String, String) {
    let o = Command::new(env!("CARGO_BIN_EXE_pvhazard"))
        .args(args.split(' ').map(|a| a.replace('_', " ")))
        .arg("--json")
        .output()
        .expect("pvhazard runs");
    (
        o.status.code(),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

#[test]
fn the_ends_of_the_accepted_ranges_give_finite_results_or_a_refusal() {
    // Arguments split at spaces; `_` stands for a space inside a value.
    let cases = [
        "vent --gas air --volume 1e5_m3 --pressure 1e4_bara --orifice 0.01_mm --cd 0.1",
        "vent --gas air --volume 1_mL --pressure 10_barg --orifice 5_m --cd 1",
        "vent --gas air --volume 1e5_m3 --pressure 10_barg --within 1_s",
        "vent --gas air --volume 1_mL --pressure 10_barg --within 720_h",
        "vent --gas hydrogen --volume 1_mL --pressure 1000_bara --within 1_s",
        "vent --gas air --volume 1e5_m3 --pressure 1e4_bara --orifice 5_m --depressuring-check --depressuring-fraction 0.05 --depressuring-cap 1_kPa --depressuring-limit 1_s",
        "vent --gas air --volume 2_m3 --pressure 10_barg --orifice 12_mm --depressuring-check --depressuring-fraction 1 --depressuring-cap 1000_bar --depressuring-limit 24_h",
        "fill --gas air --volume 1_mL --from 0_barg --to 300_barg --rate 100_kg/min",
        "fill --gas air --volume 1_mL --from 0_barg --to 300_barg --duration 1_s",
        "fill --gas air --volume 50_L --from 0_barg --to 300_barg --rate 10000_bar/min",
        "energy --gas air --volume 1_mL --pressure 1e4_bara",
        "energy --gas air --volume 1e5_m3 --pressure 1e4_bara",
    ];
    for args in cases {
        let (code, stdout, stderr) = run(args);
        match code {
            Some(0) => {
                let v: serde_json::Value = serde_json::from_str(&stdout)
                    .unwrap_or_else(|e| panic!("{args}: not JSON ({e})"));
                assert!(v.is_object(), "{args}");
            }
            Some(2) => assert!(
                stderr.contains(" = '") && stderr.contains("accepted"),
                "{args}: {stderr}"
            ),
            other => panic!("{args}: exit {other:?}: {stderr}"),
        }
    }
}
