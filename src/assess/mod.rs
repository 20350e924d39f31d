//! The assessment: runs what a calculation or a worksheet asks (the rule, its ideal-gas
//! twin, the run with wall heat transfer and its searches), and returns the report with its
//! findings, verdict, banners and basis. The command line, the worksheets and `check` call
//! this and render; none of them decides a hazard.
//!
//! Findings are decided on the most realistic result that ran ([`Governing::Model`]): the
//! wall model where it ran, the bound where it did not, each finding naming its basis. A
//! bound is then a result shown for comparison, never a contradicting banner.

mod energy;
mod fill;
pub mod finding;
mod gas;
mod room;
mod vent;

pub use energy::{energy, EnergyAsk, Work};
pub use fill::{fill, PlannedFill};
pub use finding::{Decision, Finding, Hazard, Status, Verdict};
pub use vent::{vent, Discharge, WallVent};

use crate::caution::{distinct, ordered, Caution, Note};

/// Which result governs a hazard that both a bound and the wall model assess.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Governing {
    /// The wall model where it ran (the default); the bound otherwise.
    #[default]
    Model,
    /// The bound (adiabatic fill, isentropic vent), even where the wall model ran.
    Bound,
}

impl Governing {
    /// The bound if either asks for it, else the model.
    pub fn either(a: Option<Governing>, b: Option<Governing>) -> Governing {
        if a == Some(Governing::Bound) || b == Some(Governing::Bound) {
            Governing::Bound
        } else {
            Governing::Model
        }
    }

    /// The basis note that says which governs.
    fn note(self) -> Note {
        Note::new(
            "governing result",
            match self {
                Governing::Model => "The findings are decided on the most realistic result that ran: the wall heat-transfer model where it ran, the bound (adiabatic fill, isentropic vent) where it did not. The bounds are shown in the results for comparison.",
                Governing::Bound => "The findings are decided on the bounds (adiabatic fill, isentropic vent), as the site or template asks (governing = \"bound\"); the wall model's results are shown for comparison.",
            },
        )
    }
}

/// The verdict on `findings`; its banners with the results' own `cautions`, ordered, the
/// deferral last; and `basis` without repeats, with the note on which result governs.
fn conclude(
    findings: Vec<Finding>,
    cautions: Vec<Caution>,
    mut basis: Vec<Note>,
    governing: Governing,
) -> (Verdict, Vec<Caution>, Vec<Note>) {
    let verdict = Verdict::new(findings);
    let cautions = ordered(verdict.banners().into_iter().chain(cautions).collect());
    basis.push(governing.note());
    (verdict, cautions, distinct(basis))
}

#[cfg(test)]
mod tests;

/// A governing temperature in words: its conservative edge, with the central result beside
/// it where the two differ by half a kelvin or more (findings show whole degrees).
fn edge_and_central(
    edge: uom::si::f64::ThermodynamicTemperature,
    central: uom::si::f64::ThermodynamicTemperature,
) -> Vec<crate::caution::Part> {
    use crate::caution::Part;
    use crate::units::Value;
    use uom::si::thermodynamic_temperature::kelvin;
    if (edge.get::<kelvin>() - central.get::<kelvin>()).abs() < 0.5 {
        return vec![Part::from(Value::Temperature(edge))];
    }
    vec![
        Part::from(Value::Temperature(edge)),
        Part::from(" (conservative edge; central "),
        Part::from(Value::Temperature(central)),
        Part::from(")"),
    ]
}

/// Where a temperature and its limit differ by less than a kelvin, the findings' whole
/// degrees would read alike ("85 °C, above the rated 85 °C"): the margin in words (under
/// 0.05 K, "less than 0.1 K"), empty otherwise.
fn margin(
    value: uom::si::f64::ThermodynamicTemperature,
    limit: uom::si::f64::ThermodynamicTemperature,
) -> Vec<crate::caution::Part> {
    use uom::si::thermodynamic_temperature::kelvin;
    let d = (value.get::<kelvin>() - limit.get::<kelvin>()).abs();
    if d == 0.0 || d >= 1.0 {
        return Vec::new();
    }
    // Under 0.05 K the one decimal would read "by 0.0 K": say how small it is instead.
    let text = if d < 0.05 {
        ", by less than 0.1 K (0.2 °F)".to_owned()
    } else {
        format!(", by {d:.1} K ({:.1} °F)", d * 1.8)
    };
    vec![crate::caution::Part::from(text)]
}
