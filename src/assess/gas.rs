//! Findings about the gas itself: what the released gas does, and liquid or solid formed
//! where an expansion ends.

use uom::si::f64::ThermodynamicTemperature;
use uom::si::thermodynamic_temperature::kelvin;

use super::finding::{Finding, Hazard};
use crate::caution::{Level, Part};
use crate::gas::{GasHazard, GasModel, State};
use crate::units::Value;

/// What the released gas does, a hazard that always applies to it (none for air).
pub(super) fn released(model: &dyn GasModel) -> Option<Finding> {
    let gas = model.gas().name;
    let (hazard, result, action) = match model.gas().hazard {
        GasHazard::Air => return None,
        GasHazard::Asphyxiant => (
            Hazard::OxygenDepletion,
            format!("Released {gas} displaces oxygen."),
            "Vent outdoors or to a safe location, never into an enclosed, low or poorly ventilated space; check the atmosphere before entry.",
        ),
        GasHazard::Oxidiser => (
            Hazard::OxygenEnrichment,
            format!("Released {gas} intensifies fire."),
            "Keep oil, grease and ignition sources away, vent to a safe location, and do not let clothing become oxygen-enriched.",
        ),
        GasHazard::Flammable => (
            Hazard::Flammable,
            format!("Released {gas} is flammable."),
            "Vent to a safe location away from ignition sources, with the vent path bonded and earthed; check for a flammable atmosphere.",
        ),
        GasHazard::ToxicAsphyxiant => (
            Hazard::Toxic,
            format!("Released {gas} is toxic at high concentration and collects in low spaces."),
            "Vent outdoors or to a safe location and check the atmosphere before entry.",
        ),
    };
    Some(Finding::action(
        hazard,
        Level::Warning,
        "the gas's own hazard",
        vec![Part::from(result)],
        vec![Part::from(action)],
    ))
}

/// A finding when an expansion's end state (`what`, at `end`) lies where the gas would no
/// longer be all gas: partly condensed (a two-phase state the model computed, or a gas state
/// below the condensation temperature the ideal model cannot see), or below its triple point.
pub(super) fn end_phase(
    model: &dyn GasModel,
    what: &str,
    basis: &str,
    end: &State,
) -> Option<Finding> {
    let gas = model.gas();
    let t = end.temperature.get::<kelvin>();
    let found = |result: Vec<Part>, action: &str| {
        Finding::action(
            Hazard::TwoPhase,
            Level::Caution,
            basis,
            result,
            vec![Part::from(action)],
        )
        .against(Value::Temperature(end.temperature), None)
    };
    if let Some(x) = end.quality {
        return Some(found(
            vec![
                Part::from(format!("{what} ends at ")),
                Part::from(Value::Temperature(end.temperature)),
                Part::from(format!(
                    " with liquid and vapour together: about {:.0} % of the {} by mass condenses (the real-gas model includes this in the result){}.",
                    (1.0 - x) * 100.0,
                    gas.name,
                    if gas.name == "air" {
                        "; air is modelled as one pseudo-pure fluid, so its bubble and dew lines, a few kelvin apart, are one saturation line here"
                    } else {
                        ""
                    }
                )),
            ],
            "Expect liquid and frost in the vent path and on the metal.",
        ));
    }
    if t < gas.min_temperature_k {
        return Some(found(
            vec![
                Part::from(format!("{what} ends at ")),
                Part::from(Value::Temperature(end.temperature)),
                Part::from(", below "),
                Part::from(Value::Temperature(ThermodynamicTemperature::new::<kelvin>(
                    gas.min_temperature_k,
                ))),
                Part::from(format!(
                    ", {}'s triple point: the gas would partly freeze{}, which these methods do not model.",
                    gas.name,
                    if gas.name == "carbon-dioxide" {
                        " (dry-ice snow, which can block a vent)"
                    } else {
                        ""
                    }
                )),
            ],
            "Treat the result as an estimate and expect solid or liquid in the vent path.",
        ));
    }
    let tsat = model.saturation_temperature(end.pressure)?;
    (end.temperature < tsat).then(|| {
        found(
            vec![
                Part::from(format!("{what} ends at ")),
                Part::from(Value::Temperature(end.temperature)),
                Part::from(format!(", below {}'s condensation temperature there (", gas.name)),
                Part::from(Value::Temperature(tsat)),
                Part::from(
                    "): part of the gas would condense, which the ideal-gas model does not include.",
                ),
            ],
            "Treat the result as an estimate and expect liquid in the vent path.",
        )
    })
}
