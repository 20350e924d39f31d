//! The printed worksheet's model: everything a page shows, already computed and typed, so
//! that a renderer only lays it out. Values are SI quantities; renderers choose units.

use uom::si::f64::Pressure;

use super::Entry;
use crate::assess::Verdict;
use crate::caution::{Caution, Note};
use crate::units::{AxisKind, UnitSystem};

/// One worksheet for one piece of equipment, as a template arranges it.
#[derive(Debug, Clone, PartialEq)]
pub struct Document {
    /// The template's title ("Pre-maintenance hazard worksheet").
    pub title: String,
    /// The template's name, as given to `--template`.
    pub template: String,
    /// One paragraph: what the worksheet is for.
    pub purpose: String,
    /// The title block: label and value pairs (site, location, tag, description, work order,
    /// date and time with time zone, prepared by).
    pub header: Vec<(String, String)>,
    /// The decision and the findings behind it.
    pub verdict: Verdict,
    /// Banners: the hazards that apply and a result's limits, highest first, the deferral
    /// last.
    pub cautions: Vec<Caution>,
    /// How the results were reached: methods, models, constants, assumptions.
    pub basis: Vec<Note>,
    /// Inputs as used.
    pub inputs: Vec<Entry>,
    /// Result sections in template order, each with a heading.
    pub sections: Vec<Section>,
    /// Plots, each a picture of a time history or a path.
    pub plots: Vec<Plot>,
    /// Checklist items, each printed with a tick box.
    pub checklist: Vec<String>,
    /// Sign-off roles ("Prepared", "Checked", "Authorised"), each with name, signature and
    /// date lines.
    pub signoff: Vec<String>,
    /// The deferral printed in every page's footer.
    pub footer: String,
    /// pvhazard's version, printed in the footer.
    pub tool_version: String,
    /// SHA-256 fingerprint of the canonical inputs, hex, printed on every page.
    pub fingerprint: String,
    /// The worksheet's date and time, RFC 3339 with offset; also the PDF's creation date.
    pub date: chrono::DateTime<chrono::FixedOffset>,
    /// The unit system shown first.
    pub units: UnitSystem,
    /// Ambient pressure, for showing gauge readings.
    pub ambient: Pressure,
}

/// A titled group of results.
#[derive(Debug, Clone, PartialEq)]
pub struct Section {
    /// The heading.
    pub heading: String,
    /// The results, each with its method.
    pub entries: Vec<Entry>,
}

/// One axis of a plot.
#[derive(Debug, Clone, PartialEq)]
pub struct Axis {
    /// The quantity's name ("Pressure"); the renderer appends the unit.
    pub label: String,
    /// What it measures.
    pub kind: AxisKind,
}

/// One line on a plot, as (x, y) points in SI.
#[derive(Debug, Clone, PartialEq)]
pub struct Series {
    /// Legend text.
    pub label: String,
    /// Whether the series is read on the right-hand axis.
    pub right_axis: bool,
    /// The points, SI, x increasing.
    pub points: Vec<(f64, f64)>,
}

/// A line plot with one x axis and one or two y axes.
#[derive(Debug, Clone, PartialEq)]
pub struct Plot {
    /// Title above the plot.
    pub title: String,
    /// The horizontal axis.
    pub x: Axis,
    /// The left vertical axis.
    pub left: Axis,
    /// The right vertical axis, if any series uses one.
    pub right: Option<Axis>,
    /// The lines.
    pub series: Vec<Series>,
    /// Horizontal reference lines on the left axis (SI) with labels, e.g. MDMT or rating.
    pub limits: Vec<(f64, String)>,
}
