//! The stored-energy assessment: the rule, its ideal-gas twin, and the findings on the
//! pressure rating, the keep-back distance and the energy left before opening.

use uom::si::f64::{Length, Mass, Pressure};
use uom::si::{length::meter, pressure::pascal};

use super::finding::{Finding, Hazard};
use super::gas;
use crate::caution::{Level, Note, Part};
use crate::gas::{ideal_twin, GasModel};
use crate::report::EnergyReport;
use crate::rules::blast::DistanceBasis;
use crate::rules::energy::{self, EnergyInput, EnergyResult};
use crate::rules::fragments::{self, Fragments};
use crate::units::Value;
use crate::InputError;

/// What the distance to keep people back is for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Work {
    /// Work on a vessel in service (maintenance, a fill): people are kept back to the
    /// standoff at this incident overpressure.
    InService {
        /// The overpressure whose standoff governs (6.9 kPa by default).
        overpressure: Pressure,
    },
    /// A pneumatic pressure test: the test standard's exclusion distance governs.
    PressureTest,
}

impl Work {
    /// In-service work with the default 6.9 kPa (1 psi) standoff.
    pub fn in_service() -> Work {
        Work::InService {
            overpressure: Pressure::new::<pascal>(energy::DEFAULT_OVERPRESSURES_PA[0]),
        }
    }
}

/// What the energy assessment is asked.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EnergyAsk {
    /// What the keep-back distance is for.
    pub work: Work,
    /// Whether the vessel is to be opened: then the energy left before opening is a finding.
    pub before_opening: bool,
    /// The empty vessel's mass: with it, how far the pieces fly if it bursts is a finding.
    pub vessel_mass: Option<Mass>,
}

/// The stored-energy report of `input` with its findings, verdict, banners and basis.
pub fn energy(
    model: &dyn GasModel,
    input: &EnergyInput,
    ask: &EnergyAsk,
) -> Result<EnergyReport, InputError> {
    let mut input = input.clone();
    if let Work::InService { overpressure } = ask.work {
        if !input.overpressures.contains(&overpressure) {
            input.overpressures.insert(0, overpressure);
        }
    }
    let out = energy::stored_energy(model, &input)?;
    let mut found = findings(model, &input, &out.value, ask);
    let mut report = EnergyReport::new(model, &input, out);
    if let Some(m) = ask.vessel_mass {
        let f = fragments::fragments(
            report.energy_j.isentropic,
            m,
            report.gas_mass_kg,
            input.volume,
        );
        found.push(fragment_finding(&f, input.clearance));
        report.fragments = Some(f);
        report.inputs.empty_mass_kg = Some(m);
    }
    if let Some(ideal) = ideal_twin(model) {
        if let Ok(out) = energy::stored_energy(&ideal, &input) {
            report.compare_with(&EnergyReport::new(&ideal, &input, out));
        }
    }
    (report.inputs.work, report.inputs.keep_back_overpressure_pa) = match ask.work {
        Work::InService { overpressure } => ("in-service", Some(overpressure)),
        Work::PressureTest => ("pressure-test", None),
    };
    let mut basis = std::mem::take(&mut report.basis);
    basis.push(zone_note(ask.work));
    (report.verdict, report.cautions, report.basis) = super::conclude(
        found,
        std::mem::take(&mut report.cautions),
        basis,
        super::Governing::Model,
    );
    Ok(report)
}

/// How far the pieces fly against the clearance the site can keep: no distance makes a
/// burst safe from fragments, so beyond the clearance the action is to barricade.
fn fragment_finding(f: &Fragments, clearance: Option<Length>) -> Finding {
    let result = vec![
        Part::from("If the vessel bursts, an end cap can fly "),
        Part::from(Value::Distance(f.drag_range)),
        Part::from(" (with air drag; up to "),
        Part::from(Value::Distance(f.max_range)),
        Part::from(" without, at "),
        Part::from(Value::Speed(f.velocity)),
        Part::from(" by Moore's equation)."),
    ];
    let basis = "Moore's equation, range with drag";
    let barricade = || {
        vec![Part::from(
            "Keep people out of line with the vessel's ends and behind a barricade or a solid structure while it is under pressure; fragment ranges scatter widely, and no distance makes a burst safe.",
        )]
    };
    let finding = match clearance {
        Some(c) if f.drag_range <= c => {
            let mut r = result;
            r.extend([
                Part::from(" Within the site's clearance of "),
                Part::from(Value::Distance(c)),
                Part::from("."),
            ]);
            Finding::ok(Hazard::Fragments, basis, r)
        }
        _ => Finding::action(
            Hazard::Fragments,
            Level::Warning,
            basis,
            result,
            barricade(),
        ),
    };
    finding.against(
        Value::Distance(f.drag_range),
        clearance.map(Value::Distance),
    )
}

fn zone_note(work: Work) -> Note {
    match work {
        Work::InService { overpressure } => crate::note!(
            "keep-back distance",
            "Work in service: people are kept back to the standoff at which the blast overpressure falls to ",
            Value::Overpressure(overpressure),
            " (Kingery–Bulmash); the pneumatic-test exclusion distance is shown for reference.",
        ),
        Work::PressureTest => Note::new(
            "keep-back distance",
            "Pressure test: people are kept back to the pneumatic-test exclusion distance (ASME PCC-2 safe-distance rule).",
        ),
    }
}

fn findings(
    model: &dyn GasModel,
    input: &EnergyInput,
    r: &EnergyResult,
    ask: &EnergyAsk,
) -> Vec<Finding> {
    let mut out = Vec::new();
    if let Some(mawp) = input.mawp {
        let against =
            |f: Finding| f.against(Value::Pressure(input.pressure), Some(Value::Pressure(mawp)));
        out.push(if input.pressure > mawp {
            against(Finding::stop(
                Hazard::PressureRating,
                Level::Danger,
                "rating plate",
                vec![
                    Part::from("The pressure given is above the MAWP ("),
                    Part::from(Value::Pressure(input.pressure)),
                    Part::from(" > "),
                    Part::from(Value::Pressure(mawp)),
                    Part::from(")."),
                ],
                vec![Part::from("Do not approach or work on the vessel: reduce the pressure from a safe location and have the vessel and its relief device examined by an authorised inspector.")],
            ))
        } else {
            against(Finding::ok(
                Hazard::PressureRating,
                "rating plate",
                vec![
                    Part::from("The pressure ("),
                    Part::from(Value::Pressure(input.pressure)),
                    Part::from(") is within the MAWP ("),
                    Part::from(Value::Pressure(mawp)),
                    Part::from(")."),
                ],
            ))
        });
    }
    out.extend(zone(input, r, ask.work));
    if ask.before_opening {
        out.push(before_opening(input, r));
    }
    if input.pressure > input.ambient {
        out.extend(gas::end_phase(
            model,
            "The isentropic expansion to ambient",
            "isentropic bound",
            &r.isentropic_end,
        ));
    }
    out.extend(gas::released(model));
    out
}

/// The distance to keep people back against what the site can keep clear.
fn zone(input: &EnergyInput, r: &EnergyResult, work: Work) -> Option<Finding> {
    if r.exclusion_basis == DistanceBasis::NoStoredEnergy {
        return Some(Finding::ok(
            Hazard::BlastZone,
            "no stored energy",
            vec![Part::from("The gas is at or below ambient pressure: it stores no expansion energy and needs no zone.")],
        ));
    }
    let test = (
        r.exclusion_distance,
        vec![Part::from(" (the pneumatic-test exclusion distance)")],
    );
    let (distance, what, basis) = match work {
        Work::PressureTest => (test.0, test.1, "ASME PCC-2 safe distance"),
        Work::InService { overpressure } => {
            match r
                .standoffs
                .iter()
                .find(|s| s.overpressure == overpressure)
                .and_then(|s| s.distance)
            {
                Some(d) => (
                    d,
                    vec![
                        Part::from(" (the blast standoff at "),
                        Part::from(Value::Overpressure(overpressure)),
                        Part::from(")"),
                    ],
                    "Kingery–Bulmash blast standoff",
                ),
                // Outside the fits (a tiny or huge vessel) the test rule stands in.
                None => (test.0, test.1, "ASME PCC-2 safe distance"),
            }
        }
    };
    if work == Work::PressureTest && r.exclusion_basis == DistanceBasis::BeyondRule {
        return Some(
            Finding::stop(
                Hazard::BlastZone,
                Level::Danger,
                basis,
                vec![
                    Part::from("Stored energy "),
                    Part::from(Value::Energy(r.energy.isentropic)),
                    Part::from(" exceeds 271 MJ: the pneumatic-test safe-distance rule does not settle the exclusion zone."),
                ],
                vec![Part::from("Have a competent person analyse blast, fragments and barricades before any pressurised work or test.")],
            )
            .against(Value::Distance(distance), input.clearance.map(Value::Distance)),
        );
    }
    let keep = |lead: &str| {
        [
            vec![Part::from(lead), Part::from(Value::Distance(distance))],
            what.clone(),
        ]
        .concat()
    };
    let farthest = r
        .standoffs
        .iter()
        .filter_map(|s| s.distance)
        .fold(Length::new::<meter>(0.0), |a, b| if b > a { b } else { a });
    let finding = match input.clearance {
        None => Finding::action(
            Hazard::BlastZone,
            Level::Warning,
            basis,
            [keep("Keep everyone not needed for the task at least "), vec![Part::from(" away while the vessel is under pressure.")]].concat(),
            vec![Part::from("Mark the zone and keep it clear; blast standoffs do not protect against fragments, which can travel much farther, so shield or barricade where the zone cannot be cleared.")],
        ),
        Some(clear) if distance > clear => Finding::stop(
            Hazard::BlastZone,
            Level::Danger,
            basis,
            [
                keep("The distance to keep people back, "),
                vec![
                    Part::from(", is more than the site can keep clear ("),
                    Part::from(Value::Distance(clear)),
                    Part::from(")."),
                ],
            ]
            .concat(),
            vec![Part::from(match work {
                Work::PressureTest => "Reduce the pressure or volume at risk, test hydrostatically, or provide engineered barricades before pressurising.",
                Work::InService { .. } => "Reduce the pressure or volume at risk before the work, or provide engineered barricades.",
            })],
        ),
        Some(clear) if farthest > clear => Finding::action(
            Hazard::BlastZone,
            Level::Warning,
            basis,
            vec![
                Part::from("An overpressure standoff ("),
                Part::from(Value::Distance(farthest)),
                Part::from(") reaches beyond what the site can keep clear ("),
                Part::from(Value::Distance(clear)),
                Part::from(")."),
            ],
            vec![Part::from("Warn occupants of nearby buildings and keep them away from windows.")],
        ),
        Some(clear) => Finding::ok(
            Hazard::BlastZone,
            basis,
            [
                keep("Keep everyone not needed for the task "),
                vec![
                    Part::from(" away while the vessel is under pressure: within the site's clearance of "),
                    Part::from(Value::Distance(clear)),
                    Part::from("."),
                ],
            ]
            .concat(),
        ),
    };
    // Where a farther standoff is what reaches past the clearance, that is the value.
    let shown = match input.clearance {
        Some(clear) if distance <= clear && farthest > clear => farthest,
        _ => distance,
    };
    Some(finding.against(Value::Distance(shown), input.clearance.map(Value::Distance)))
}

/// The energy left before the vessel is opened, against the limit where one is set.
fn before_opening(input: &EnergyInput, r: &EnergyResult) -> Finding {
    let e = Value::Energy(r.energy.isentropic);
    let limit = input.energy_limit.map(Value::Energy);
    if input.pressure <= input.ambient {
        return Finding::ok(
            Hazard::StoredEnergy,
            "pressure given",
            vec![Part::from("The pressure given is at or below ambient: the gas stores no expansion energy. Confirm zero on two independent indications before opening.")],
        )
        .against(e, limit);
    }
    let finding = match (input.energy_limit, r.vent_down_target) {
        (Some(_), None) if r.vent_down_unresolved.is_some() => Finding::action(
            Hazard::StoredEnergy,
            Level::Caution,
            "isentropic energy on the way down",
            vec![
                Part::from("The vessel stores "),
                Part::from(e.clone()),
                Part::from(format!(
                    "; the pressure to vent down to is not resolved: {}.",
                    r.vent_down_unresolved.as_ref().map_or("", |u| u.reason.as_str())
                )),
            ],
            vec![Part::from("Vent to zero, isolate and lock out, and verify on two independent indications before opening.")],
        ),
        // Within the limit, yet a dense fluid can store more at a lower pressure: venting
        // passes through those states.
        (Some(l), Some(p)) if r.energy.isentropic <= l => Finding::action(
            Hazard::StoredEnergy,
            Level::Notice,
            "isentropic energy on the way down",
            vec![
                Part::from("The vessel stores "),
                Part::from(e.clone()),
                Part::from(", within the limit of "),
                Part::from(Value::Energy(l)),
                Part::from(", but venting passes through states that store more (up to "),
                Part::from(Value::Energy(r.vent_down_peak.unwrap_or(r.energy.isentropic))),
                Part::from(")."),
            ],
            vec![
                Part::from("Vent down to "),
                Part::from(Value::Pressure(p)),
                Part::from(" or below, isolate and lock out, and verify on two independent indications before opening."),
            ],
        ),
        (Some(l), Some(p)) => Finding::action(
            Hazard::StoredEnergy,
            Level::Notice,
            "isentropic energy at the limit",
            vec![
                Part::from("The vessel stores "),
                Part::from(e.clone()),
                Part::from(", above the limit of "),
                Part::from(Value::Energy(l)),
                Part::from(" for opening."),
            ],
            vec![
                Part::from("Vent down to "),
                Part::from(Value::Pressure(p)),
                Part::from(" or below, isolate and lock out, and verify on two independent indications before opening."),
            ],
        ),
        (Some(l), None) => Finding::ok(
            Hazard::StoredEnergy,
            "isentropic energy",
            vec![
                Part::from("The stored energy ("),
                Part::from(e.clone()),
                Part::from(") is already within the limit for opening ("),
                Part::from(Value::Energy(l)),
                Part::from("): no vent-down is needed to meet it."),
            ],
        ),
        (None, _) => Finding::action(
            Hazard::StoredEnergy,
            Level::Notice,
            "isentropic energy",
            vec![Part::from("The vessel stores "), Part::from(e.clone()), Part::from(".")],
            vec![Part::from("Before opening: isolate, lock out and tag out, vent to zero, verify zero on two independent indications, and open slowly.")],
        ),
    };
    finding.against(e, limit)
}
