//! The worksheet model: what a calculation reports, built from a rule's result and its
//! inputs. The JSON form is the contract other tools read; the [`Worksheet`] form is what the
//! text (and, later, PDF) renderers lay out. Nothing here computes physics.

mod axis;
mod colour;
mod document;
mod energy;
mod fill;
mod fragments;
pub mod html;
mod json;
mod pdf;
pub mod plots;
mod release;
mod text;
mod vent;

pub use crate::units::AxisKind;
pub use crate::units::Value;
pub use document::{Axis, Document, Plot, Section, Series};
pub use energy::{EnergyComparison, EnergyInputs, EnergyReport, StandoffEntry};
pub use fill::{FillComparison, FillInputs, FillReport, FillTransientReport};
pub use json::to_json;
pub use pdf::{render_pdf, Paper, PdfError};
pub use text::{render_text, value_text};
pub use vent::{DepressuringReport, VentComparison, VentInputs, VentReport, VentTransientReport};

use serde::Serialize;
use uom::si::f64::{
    AvailableEnergy, Energy, Length, Mass, MassRate, Pressure, ThermodynamicTemperature, Time,
    Volume,
};

use crate::assess::Verdict;
use crate::caution::{ordered, Assessed, Caution, Note};
use crate::gas::{GasModel, ModelKind};
use crate::heat::InnerBasis;
use crate::rules::blast::DistanceBasis;
use crate::rules::energy::{Energies, EnergyInput, EnergyResult};
use crate::rules::fill::{FillInput, FillResult, FillSample};
use crate::rules::fragments::Fragments;
use crate::rules::room::RoomRelease;
use crate::rules::transient::{
    Depressuring, Exchange, FillRate, FillTransient, HeatTransfer, MaxRate, Sample, VentTransient,
    Wall,
};
use crate::rules::vent::{Process, VentInput, VentResult, VentSample};

/// The tool's version, written into every record.
pub const TOOL_VERSION: &str = env!("CARGO_PKG_VERSION");

/// A comparison line: the ideal value, labelled with how far the real gas's value lies
/// from it.
fn compared(label: &str, real: f64, ideal: f64, value: Value) -> Entry {
    let how = if ideal != 0.0 && real.is_finite() && ideal.is_finite() {
        let d = (real - ideal) / ideal.abs() * 100.0;
        if d.abs() < 0.05 {
            "real gas within 0.1 %".to_string()
        } else {
            format!(
                "real gas {} % {}",
                crate::units::fmt_sig(d.abs(), 3),
                if d > 0.0 { "higher" } else { "lower" }
            )
        }
    } else {
        "no difference to state".to_string()
    };
    entry(format!("{label} ({how})"), value)
}

/// A temperature compared as a difference in kelvin, which percentages of an absolute
/// temperature would understate.
fn compared_temperature(
    label: &str,
    real: ThermodynamicTemperature,
    ideal: ThermodynamicTemperature,
) -> Entry {
    use uom::si::thermodynamic_temperature::kelvin;
    let d = real.get::<kelvin>() - ideal.get::<kelvin>();
    let how = if d.abs() < 0.05 {
        "real gas within 0.1 K".to_string()
    } else {
        format!(
            "real gas {} K {}",
            crate::units::fmt_sig(d.abs(), 3),
            if d > 0.0 { "warmer" } else { "colder" }
        )
    };
    entry(format!("{label} ({how})"), Value::Temperature(ideal))
}

/// One line of a worksheet: a label, a value and, for results, the method that gave it.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// What the value is; a `{}` in it stands for `label_value`.
    pub label: String,
    /// A value inside the label, shown in the reader's units (the overpressure of a
    /// standoff).
    pub label_value: Option<Value>,
    /// The value.
    pub value: Value,
    /// Method and source, for results.
    pub method: Option<&'static str>,
}

impl Entry {
    /// The label as a reader sees it, its value in `d`'s units.
    pub fn label_text(&self, d: &crate::units::Display) -> String {
        match &self.label_value {
            Some(v) => self.label.replacen("{}", &text::value_text(v, d), 1),
            None => self.label.clone(),
        }
    }
}

fn entry(label: impl Into<String>, value: Value) -> Entry {
    Entry {
        label: label.into(),
        label_value: None,
        value,
        method: None,
    }
}

fn result(label: impl Into<String>, value: Value, method: &'static str) -> Entry {
    Entry {
        label: label.into(),
        label_value: None,
        value,
        method: Some(method),
    }
}

/// What every renderer lays out: title, cautions first, inputs, results.
#[derive(Debug, Clone, PartialEq)]
pub struct Worksheet {
    /// Title line.
    pub title: String,
    /// Ambient pressure, for showing gauge readings.
    pub ambient: Pressure,
    /// The decision and the findings behind it.
    pub verdict: Verdict,
    /// Banners, highest first, the deferral last.
    pub cautions: Vec<Caution>,
    /// Inputs as used.
    pub inputs: Vec<Entry>,
    /// Results with their methods.
    pub results: Vec<Entry>,
    /// The ideal gas's values beside the real gas's, when the real-gas model was used.
    pub comparison: Vec<Entry>,
    /// How the results were reached.
    pub basis: Vec<Note>,
}
