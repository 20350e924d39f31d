//! The fill assessment: the adiabatic fill (the bound), its ideal-gas twin, the fill at the
//! planned rate with heat to the wall (the model) and its searches, and the findings on the
//! fill temperature and the fill-to pressure.

use uom::si::f64::{Length, Pressure};

use super::finding::{Finding, Hazard};
use super::{edge_and_central, gas, margin, Governing};
use crate::caution::{Level, Part};
use crate::gas::{ideal_twin, GasModel};
use crate::report::{FillReport, FillTransientReport};
use crate::rules::fill::{self, FillInput, FILL_TO_LIMIT_RATIO};
use crate::rules::transient::{self, Exchange, FillRate, MaxRate};
use crate::solve::NotResolved;
use crate::units::Value;
use crate::InputError;

/// A fill at a planned rate, with heat exchanged with the wall.
#[derive(Debug, Clone, Copy)]
pub struct PlannedFill {
    /// The planned rate.
    pub rate: FillRate,
    /// The inlet bore, for the jet correlation.
    pub inlet: Option<Length>,
    /// The wall and its heat-transfer settings.
    pub exchange: Exchange,
}

/// The fill report of `input` (gauge readings against `ambient`) with its findings,
/// verdict, banners and basis; with the planned-rate run when `planned` is given.
pub fn fill(
    model: &dyn GasModel,
    input: &FillInput,
    ambient: Pressure,
    planned: Option<&PlannedFill>,
    governing: Governing,
) -> Result<FillReport, InputError> {
    let out = fill::adiabatic_fill(model, input)?;
    let unresolved = out.value.fill_to_unresolved.clone();
    let mut report = FillReport::new(model, input, ambient, out);
    let mut cautions = std::mem::take(&mut report.cautions);
    let mut basis = std::mem::take(&mut report.basis);
    if let Some(ideal) = ideal_twin(model) {
        if let Ok(out) = fill::adiabatic_fill(&ideal, input) {
            report.compare_with(&FillReport::new(&ideal, input, ambient, out));
        }
    }
    let mut max_rate = None;
    if let Some(p) = planned {
        let t = transient::fill_from(model, input, p.rate, p.inlet, &p.exchange)?;
        cautions.extend(t.cautions);
        basis.extend(t.basis);
        max_rate = t.value.max_rate;
        report.transient = Some(FillTransientReport::new(
            &t.value,
            p.rate,
            input.rated_temperature,
            &p.exchange,
        ));
        report.inputs.inlet_diameter_m = p.inlet;
    }
    let mut found = findings(&report, max_rate, governing, unresolved.as_ref());
    found.extend(gas::released(model));
    (report.verdict, report.cautions, report.basis) =
        super::conclude(found, cautions, basis, governing);
    Ok(report)
}

fn findings(
    r: &FillReport,
    max_rate: Option<MaxRate>,
    governing: Governing,
    unresolved: Option<&NotResolved>,
) -> Vec<Finding> {
    let model = r
        .transient
        .as_ref()
        .filter(|_| governing == Governing::Model);
    vec![
        temperature(r, model, max_rate),
        fill_to(r, model, unresolved),
    ]
}

/// The peak gas temperature against the rating: at the planned rate where it ran, else the
/// adiabatic bound.
fn temperature(
    r: &FillReport,
    model: Option<&FillTransientReport>,
    max_rate: Option<MaxRate>,
) -> Finding {
    // Decided on the conservative edge; the central peak is shown beside it.
    let (peak, central, basis, lead) = match model {
        Some(t) => (
            t.peak_gas_temperature_upper_k,
            t.peak_gas_temperature_k,
            "wall model at the planned rate",
            "At the planned rate the gas peaks at ",
        ),
        None => (
            r.final_temperature_k,
            r.final_temperature_k,
            "adiabatic bound",
            "With no heat to the wall (the adiabatic bound) the gas reaches ",
        ),
    };
    let Some(rated) = r.inputs.rated_temperature_k else {
        return Finding::action(
            Hazard::FillTemperature,
            Level::Notice,
            basis,
            [vec![Part::from(lead)], edge_and_central(peak, central), vec![Part::from(".")]].concat(),
            vec![Part::from("Compare it with the maximum marked on the cylinder or in its standard (often 65 °C).")],
        )
        .against(Value::Temperature(peak), None);
    };
    let against = |f: Finding| f.against(Value::Temperature(peak), Some(Value::Temperature(rated)));
    let result = |relation: &str| {
        [
            vec![Part::from(lead)],
            edge_and_central(peak, central),
            vec![
                Part::from(relation),
                Part::from(Value::Temperature(rated)),
                Part::from(")"),
            ],
            margin(peak, rated),
            vec![Part::from(".")],
        ]
        .concat()
    };
    if peak <= rated {
        let mut found = result(", within the rated temperature (");
        // The rate a crew may go up to, on page one beside the decision.
        if let (Some(_), Some(MaxRate::Ramp(m) | MaxRate::InletLimited(m))) = (model, max_rate) {
            found.extend([
                Part::from(" The highest rate within the rating is "),
                Part::from(Value::PressureRate(m.per_second)),
                Part::from("."),
            ]);
        }
        return against(Finding::ok(Hazard::FillTemperature, basis, found));
    }
    let action = match (model, max_rate) {
        (None, _) => vec![Part::from("Give the planned fill rate for the fill with heat to the wall, or fill more slowly, in stages or with a cooled supply, and confirm by measurement.")],
        (Some(_), Some(MaxRate::Ramp(m))) => vec![
            Part::from("Fill no faster than "),
            Part::from(Value::PressureRate(m.per_second)),
            Part::from(" (the highest rate within the rating), or in stages."),
        ],
        (Some(_), Some(MaxRate::NoneSafe)) => vec![Part::from("Cool the supply: even a fill over a day exceeds the rating.")],
        (Some(_), _) => vec![Part::from("Fill more slowly or in stages, and confirm by measurement.")],
    };
    against(Finding::stop(
        Hazard::FillTemperature,
        Level::Warning,
        basis,
        result(", above the rated temperature ("),
        action,
    ))
}

/// The pressure to stop at so that the cylinder settles at its service pressure, against
/// what a hot fill may stop at. `unresolved` says why the bound's search did not settle.
fn fill_to(
    r: &FillReport,
    model: Option<&FillTransientReport>,
    unresolved: Option<&NotResolved>,
) -> Finding {
    let target = r.inputs.to_pa;
    let limit = target * FILL_TO_LIMIT_RATIO;
    let (stop_at, settled, basis) = match model {
        Some(t) => (
            t.fill_to_pressure_pa,
            t.settled_pressure_pa,
            "wall model at the planned rate",
        ),
        None => (
            r.fill_to_pressure_pa,
            r.settled_pressure_pa,
            "adiabatic bound",
        ),
    };
    let limit_value = Some(Value::Pressure(limit));
    let Some(p) = stop_at else {
        let not_resolved = |why: String| {
            Finding::action(
                Hazard::FillTo,
                Level::Caution,
                basis,
                vec![Part::from(format!(
                    "The pressure to stop at is not resolved: {why}."
                ))],
                vec![Part::from(
                    "Fill to the service pressure and top up after the cylinder cools.",
                )],
            )
        };
        if let (None, Some(e)) = (model, unresolved) {
            return not_resolved(e.reason.clone());
        }
        if settled >= target || model.is_none() {
            return Finding::action(
                Hazard::FillTo,
                Level::Warning,
                basis,
                vec![
                    Part::from("The gas already in the cylinder settles at or above "),
                    Part::from(Value::Pressure(target)),
                    Part::from(" once it reaches ambient temperature: no fill is needed to reach the target."),
                ],
                vec![Part::from("Check the settled pressure against the cylinder's service pressure before filling.")],
            )
            .against(Value::Pressure(settled), limit_value);
        }
        return not_resolved(
            format!(
                "the fill carried on at the planned rate does not reach the target's mass by {} times the target on the model",
                transient::FILL_TO_CAP
            ),
        );
    };
    let against = |f: Finding| f.against(Value::Pressure(p), limit_value.clone());
    let result = vec![
        Part::from("A fill stopped at "),
        Part::from(Value::Pressure(target)),
        Part::from(" settles to "),
        Part::from(Value::Pressure(settled)),
        Part::from("; to settle at the target, stop at "),
        Part::from(Value::Pressure(p)),
    ];
    // Stopping at the service pressure and topping up once cool is always open to the crew,
    // so a fill-to pressure above what a hot fill may stop at is a condition of the fill,
    // not a reason to call it off.
    if p > limit {
        return against(Finding::action(
            Hazard::FillTo,
            Level::Warning,
            basis,
            [
                result,
                vec![
                    Part::from(", above "),
                    Part::from(Value::Pressure(limit)),
                    Part::from(format!(
                        " ({:.0} % of the target, what a hot fill may stop at).",
                        FILL_TO_LIMIT_RATIO * 100.0
                    )),
                ],
            ]
            .concat(),
            vec![Part::from("Do not stop there: stop at the service pressure and top up after the cylinder cools, never above the pressure the cylinder's marking permits at the fill temperature.")],
        ));
    }
    against(Finding::ok(
        Hazard::FillTo,
        basis,
        [
            result,
            vec![Part::from(
                ", or fill to the target and top up after the cylinder cools.",
            )],
        ]
        .concat(),
    ))
}
