//! The vent assessment: the quasi-steady vent (the isentropic bound, or the process asked),
//! its ideal-gas twin, the vent with heat from the wall (the model) and its depressuring
//! check, and the findings on cold metal, the vent time, liquid in the vent path and the
//! jet.

use super::finding::{Finding, Hazard};
use super::{edge_and_central, gas, margin, room, Governing};
use crate::caution::{Level, Part};
use crate::gas::{ideal_twin, GasModel};
use crate::report::{DepressuringReport, VentReport, VentTransientReport};
use crate::rules::room::Room;
use crate::rules::transient::{self, Depressuring, Exchange, HeatTransfer};
use crate::rules::vent::{self, Process, VentInput};
use crate::units::Value;
use crate::InputError;

/// A vent with heat from the wall, and the depressuring check if asked.
#[derive(Debug, Clone, Copy)]
pub struct WallVent {
    /// The depressuring check, if asked.
    pub check: Option<Depressuring>,
    /// The wall and its heat-transfer settings.
    pub exchange: Exchange,
}

/// Where the vented gas goes.
#[derive(Debug, Clone, Copy)]
pub enum Discharge<'a> {
    /// Not said: the gas's own hazard is named, nothing computed.
    Unstated,
    /// Outdoors or through a line to outside: no room to compute, and a NOTICE says so.
    Outdoors,
    /// Into this room: its atmosphere decides the gas's hazards.
    Room(&'a Room),
}

/// The vent report of `input` with its findings, verdict, banners and basis; with the
/// wall-model run when `wall` is given, and where the gas goes.
pub fn vent(
    model: &dyn GasModel,
    input: &VentInput,
    wall: Option<&WallVent>,
    discharge: Discharge,
    governing: Governing,
) -> Result<VentReport, InputError> {
    let out = vent::blow_down(model, input)?;
    let end = out.value.end;
    let mut report = VentReport::new(model, input, out);
    let mut cautions = std::mem::take(&mut report.cautions);
    let mut basis = std::mem::take(&mut report.basis);
    if let Some(ideal) = ideal_twin(model) {
        if let Ok(o) = vent::blow_down(&ideal, input) {
            report.compare_with(&VentReport::new(&ideal, input, o));
        }
    }
    if let Some(w) = wall {
        let t = transient::vent_from(model, input, w.check, &w.exchange)?;
        cautions.extend(t.cautions);
        basis.extend(t.basis);
        let (t_report, dep) = VentTransientReport::new(&t.value, w.check, &w.exchange);
        report.transient = Some(t_report);
        report.depressuring = dep;
    }
    let mut found = Vec::new();
    if input.pressure > input.down_to {
        let bound = match input.process {
            Process::Isentropic => "isentropic bound",
            Process::Isothermal => "isothermal process",
        };
        found.push(cold_metal(&report, input, governing));
        found.push(vent_time(&report, governing));
        found.extend(gas::end_phase(model, "The vent-down", bound, &end));
        found.push(Finding::action(
            Hazard::VentJet,
            Level::Caution,
            "common practice",
            vec![Part::from(
                "A venting gas jet is loud and its reaction force can whip an unrestrained line.",
            )],
            vec![Part::from(
                "Wear hearing protection, restrain the vent line, and keep out of the jet's path.",
            )],
        ));
    }
    // The room, where given, decides the gas's own hazards; without one they are named.
    match discharge {
        Discharge::Room(room) => {
            let r = room::release(model, &report, room);
            found.extend(room::findings(model, &r, input.orifice));
            basis.push(room::basis(model));
            cautions.extend(room::pooling(model));
            report.release = Some(r);
        }
        Discharge::Outdoors => cautions.push(room::outdoors(model)),
        Discharge::Unstated => {}
    }
    if let Some(g) = gas::released(model) {
        if !found.iter().any(|f| f.hazard == g.hazard) {
            found.push(g);
        }
    }
    (report.verdict, report.cautions, report.basis) =
        super::conclude(found, cautions, basis, governing);
    Ok(report)
}

/// The coldest metal against the MDMT: the wall model's wall where it ran, else the gas at
/// the bound (the metal lags the gas but can approach it).
fn cold_metal(r: &VentReport, input: &VentInput, governing: Governing) -> Finding {
    // A run with no heat exchanged keeps its wall at the start: it is no wall model.
    let model = r
        .transient
        .as_ref()
        .filter(|t| governing == Governing::Model && t.heat_transfer != HeatTransfer::None);
    let bound_basis = match input.process {
        Process::Isentropic => "isentropic bound",
        Process::Isothermal => "isothermal process",
    };
    let Some(mdmt) = input.min_metal_temperature else {
        let (coldest, basis, what) = match model {
            Some(t) => (
                (t.min_wall_temperature_lower_k, t.min_wall_temperature_k),
                "wall model",
                "The wall cools to ",
            ),
            None => (
                (r.final_temperature_k, r.final_temperature_k),
                bound_basis,
                "The gas falls to ",
            ),
        };
        let mut result = vec![Part::from(what)];
        result.extend(edge_and_central(coldest.0, coldest.1));
        result.push(Part::from("."));
        let coldest = coldest.0;
        return Finding::action(
            Hazard::ColdMetal,
            Level::Notice,
            basis,
            result,
            vec![Part::from(
                "Compare it with the MDMT on the vessel's rating plate.",
            )],
        )
        .against(Value::Temperature(coldest), None);
    };
    let limit = Some(Value::Temperature(mdmt));
    match model {
        Some(t) => {
            // Decided on the conservative edges; the central results are shown beside them.
            let wall = t.min_wall_temperature_lower_k;
            let gas = t.min_gas_temperature_lower_k;
            let wall_words = edge_and_central(wall, t.min_wall_temperature_k);
            let gas_words = edge_and_central(gas, t.min_gas_temperature_k);
            let found = if wall < mdmt {
                Finding::stop(
                    Hazard::ColdMetal,
                    Level::Warning,
                    "wall model",
                    [
                        vec![Part::from("The wall cools to ")],
                        wall_words,
                        vec![Part::from(", below the MDMT ("),
                        Part::from(Value::Temperature(mdmt)),
                        Part::from(")")],
                        margin(wall, mdmt),
                        vec![Part::from(": brittle fracture is possible while the vessel is still under pressure.")],
                    ]
                    .concat(),
                    vec![Part::from("Vent more slowly or in stages, and have an authorised inspector confirm the low-temperature rating.")],
                )
            } else if gas < mdmt {
                Finding::action(
                    Hazard::ColdMetal,
                    Level::Caution,
                    "wall model",
                    [
                        vec![Part::from("The gas falls to ")],
                        gas_words,
                        vec![Part::from(
                            ", below the MDMT, while the wall stays at or above it (lowest ",
                        )],
                        wall_words,
                        vec![Part::from(").")],
                    ]
                    .concat(),
                    vec![Part::from(
                        "Keep to the vent rate assumed here and do not repeat vents back to back.",
                    )],
                )
            } else {
                Finding::ok(
                    Hazard::ColdMetal,
                    "wall model",
                    [
                        vec![Part::from("The wall stays at ")],
                        wall_words,
                        vec![Part::from(" or warmer and the gas at ")],
                        gas_words,
                        vec![
                            Part::from(" or warmer, above the MDMT ("),
                            Part::from(Value::Temperature(mdmt)),
                            Part::from(")."),
                        ],
                    ]
                    .concat(),
                )
            };
            found.against(Value::Temperature(wall), limit)
        }
        None => {
            let gas = r.final_temperature_k;
            let found = if gas < mdmt {
                Finding::stop(
                    Hazard::ColdMetal,
                    Level::Warning,
                    bound_basis,
                    vec![
                        Part::from("With no heat from the wall (the cold bound) the gas falls to "),
                        Part::from(Value::Temperature(gas)),
                        Part::from(", below the MDMT ("),
                        Part::from(Value::Temperature(mdmt)),
                        Part::from("); the metal lags the gas but can approach it in a long or repeated vent."),
                    ],
                    vec![Part::from(if r.transient.is_some() {
                        "Vent more slowly or in stages, and have an authorised inspector confirm the low-temperature rating."
                    } else {
                        "Run the vent with heat from the wall (vent --heat-transfer lumped) for the wall's temperature, or vent more slowly or in stages; have an authorised inspector confirm the low-temperature rating."
                    })],
                )
            } else {
                Finding::ok(
                    Hazard::ColdMetal,
                    bound_basis,
                    vec![
                        Part::from("The gas stays at "),
                        Part::from(Value::Temperature(gas)),
                        Part::from(" or warmer, above the MDMT ("),
                        Part::from(Value::Temperature(mdmt)),
                        Part::from(")."),
                    ],
                )
            };
            found.against(Value::Temperature(gas), limit)
        }
    }
}

/// The vent's time: against the depressuring check where asked, else the time to the target
/// through the orifice given.
fn vent_time(r: &VentReport, governing: Governing) -> Finding {
    let model = r
        .transient
        .as_ref()
        .filter(|_| governing == Governing::Model);
    let (time, basis) = match (model, r.time_s) {
        (Some(t), _) => (Some(t.time_s), "wall model"),
        (None, t) => (t, "quasi-steady vent"),
    };
    let whole = |t| {
        vec![
            Part::from("Venting to "),
            Part::from(Value::Pressure(r.inputs.down_to_pa)),
            Part::from(" takes "),
            Part::from(Value::Time(t)),
            Part::from(". "),
        ]
    };
    if let Some(d) = r.depressuring.as_ref() {
        let mut f = depressuring(d);
        if let Some(t) = time {
            f.result.splice(0..0, whole(t));
        }
        return f;
    }
    match time {
        Some(t) => Finding::ok(Hazard::VentTime, basis, whole(t)).against(Value::Time(t), None),
        None => Finding::ok(
            Hazard::VentTime,
            basis,
            match r.required_orifice_m {
                Some(d) => vec![
                    Part::from("An orifice of "),
                    Part::from(Value::Diameter(d)),
                    Part::from(" vents to the target in the time allowed."),
                ],
                None => vec![Part::from("No orifice given: no vent time.")],
            },
        ),
    }
}

fn depressuring(d: &DepressuringReport) -> Finding {
    let limit = Some(Value::Time(d.limit_s));
    let basis = "depressuring check, wall model";
    match d.time_s {
        Some(t) if d.meets => Finding::ok(
            Hazard::VentTime,
            basis,
            vec![
                Part::from("The vessel reaches "),
                Part::from(Value::Pressure(d.target_pressure_pa)),
                Part::from(" in "),
                Part::from(Value::Time(t)),
                Part::from(", within the "),
                Part::from(Value::Time(d.limit_s)),
                Part::from(" allowed."),
            ],
        )
        .against(Value::Time(t), limit),
        t => {
            let found = Finding::action(
                Hazard::VentTime,
                Level::Warning,
                basis,
                vec![
                    Part::from("Depressuring check not met: the vessel does not reach "),
                    Part::from(Value::Pressure(d.target_pressure_pa)),
                    Part::from(" within "),
                    Part::from(Value::Time(d.limit_s)),
                    Part::from(" through this vent path (in the spirit of API 521): in a fire or emergency it stays pressurised longer than intended."),
                ],
                vec![Part::from("Review the vent path with the responsible engineer.")],
            );
            match t {
                Some(t) => found.against(Value::Time(t), limit),
                None => found,
            }
        }
    }
}
