//! Site files: a site's ambient conditions and its equipment, each with a unique tag.
//!
//! Quantities use the command line's unit strings (every pressure gauge or absolute); each
//! is parsed where it stands, so a problem is reported with its file, line and key.

mod raw;
mod read;

pub use crate::heat::{Construction, Liner, Material};
pub use read::{from_source, load, parse_offset};

use chrono::FixedOffset;
use serde::Deserialize;
use uom::si::f64::{Length, Mass, Pressure, ThermodynamicTemperature, Volume};

use crate::assess::Governing;
use crate::gas::Gas;
use crate::rules::room::Ventilation;
use crate::source::{Source, Spanned};
use crate::units::{PressureRate, PressureReading, UnitSystem};

/// A site: where the equipment is and the conditions there.
#[derive(Debug, Clone)]
pub struct Site {
    /// The site file it was read from.
    pub path: std::path::PathBuf,
    /// The site's name.
    pub name: String,
    /// Where on the site, or its address.
    pub location: String,
    /// Local atmospheric pressure, absolute.
    pub ambient: Pressure,
    /// How the ambient pressure was set, for the record ("elevation 350 m", "given").
    pub ambient_basis: String,
    /// Usual ambient temperature.
    pub ambient_temperature: ThermodynamicTemperature,
    /// The lowest ambient temperature in winter, if known.
    pub winter_minimum: Option<ThermodynamicTemperature>,
    /// The units the crew reads.
    pub units: UnitSystem,
    /// The site's time zone, for dates on its worksheets.
    pub time_zone: FixedOffset,
    /// The distance the site can keep clear around equipment under pressure.
    pub clearance: Option<Length>,
    /// Which result governs the findings the wall model and a bound both assess, if the
    /// site says.
    pub governing: Option<Governing>,
    /// The room the site's drains vent into, where one is named.
    pub room: Option<SiteRoom>,
    /// The equipment, in file order.
    pub equipment: Vec<Equipment>,
    /// Where the site's own values stood.
    pub origin: Origin,
}

/// Where an item's values stood in its site file, so that a later refusal of a value (by a
/// rule, or for a template's needs) can point at the line a person must edit.
#[derive(Debug, Clone, Default)]
pub struct Origin {
    /// The item's key prefix, e.g. `vessel[2]`.
    pub prefix: String,
    /// The line of the item's tag.
    pub line: usize,
    /// Each key given: its line and its text as written.
    pub keys: std::collections::BTreeMap<&'static str, (usize, String)>,
}

impl Origin {
    fn note(&mut self, src: &Source, key: &'static str, v: &Spanned<String>) {
        self.keys
            .insert(key, (src.line_of(v.span().start), v.get_ref().clone()));
    }

    fn note_opt(&mut self, src: &Source, key: &'static str, v: &Option<Spanned<String>>) {
        if let Some(v) = v {
            self.note(src, key, v);
        }
    }
}

/// One item on a site.
#[derive(Debug, Clone)]
pub enum Equipment {
    /// A pressure vessel or air receiver.
    Vessel(Vessel),
    /// A gas cylinder filled on site.
    Cylinder(Cylinder),
}

impl Equipment {
    /// The item's tag.
    pub fn tag(&self) -> &str {
        match self {
            Equipment::Vessel(v) => &v.tag,
            Equipment::Cylinder(c) => &c.tag,
        }
    }

    /// The item's description.
    pub fn description(&self) -> &str {
        match self {
            Equipment::Vessel(v) => &v.description,
            Equipment::Cylinder(c) => &c.description,
        }
    }

    /// Where the item stood in the site file.
    pub fn origin(&self) -> &Origin {
        match self {
            Equipment::Vessel(v) => &v.origin,
            Equipment::Cylinder(c) => &c.origin,
        }
    }

    /// The item's gas.
    pub fn gas(&self) -> &'static Gas {
        match self {
            Equipment::Vessel(v) => v.gas,
            Equipment::Cylinder(c) => c.gas,
        }
    }

    /// `vessel` or `cylinder`, as templates name them.
    pub fn kind(&self) -> EquipmentKind {
        match self {
            Equipment::Vessel(_) => EquipmentKind::Vessel,
            Equipment::Cylinder(_) => EquipmentKind::Cylinder,
        }
    }
}

/// The two kinds of equipment, as templates name them.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum EquipmentKind {
    /// Vessels and receivers.
    Vessel,
    /// Cylinders and fill stations.
    Cylinder,
}

/// A vessel or receiver.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Vessel {
    /// Unique tag on the site.
    pub tag: String,
    /// What and where it is.
    pub description: String,
    /// The gas it holds.
    #[serde(serialize_with = "gas_name")]
    pub gas: &'static Gas,
    /// Gas volume.
    #[serde(rename = "volume_m3")]
    pub volume: Volume,
    /// Maximum allowable working pressure (design pressure), absolute.
    #[serde(rename = "mawp_pa")]
    pub mawp: Pressure,
    /// Normal operating pressure, absolute.
    #[serde(rename = "operating_pressure_pa")]
    pub operating_pressure: Pressure,
    /// Relief device set pressure, absolute, if fitted.
    #[serde(rename = "relief_set_pressure_pa")]
    pub relief_set_pressure: Option<Pressure>,
    /// Minimum design metal temperature, if known.
    #[serde(rename = "mdmt_k")]
    pub mdmt: Option<ThermodynamicTemperature>,
    /// Shell material.
    pub material: Option<Material>,
    /// Shell wall thickness.
    #[serde(rename = "wall_thickness_m")]
    pub wall_thickness: Option<Length>,
    /// Empty mass.
    #[serde(rename = "empty_mass_kg")]
    pub empty_mass: Option<Mass>,
    /// Gas temperature in service.
    #[serde(rename = "temperature_k")]
    pub temperature: ThermodynamicTemperature,
    /// The path used to depressurise it.
    pub drain: Option<Drain>,
    /// Pneumatic or hydrostatic test pressure, absolute, if a test is planned.
    #[serde(rename = "test_pressure_pa")]
    pub test_pressure: Option<Pressure>,
    /// Where it stood in the site file.
    #[serde(skip)]
    pub origin: Origin,
}

/// A room drains vent into: its free volume and its fresh air.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct SiteRoom {
    /// Free volume.
    #[serde(rename = "volume_m3")]
    pub volume: Volume,
    /// Fresh air (`0 /h` when not given: a closed room).
    pub ventilation: Ventilation,
}

/// Where a drain discharges.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum VentTo {
    /// Into the site's room.
    Room,
    /// Outdoors, or through a line to outside.
    Outdoors,
}

/// A vent or drain path: the orifice that limits the flow.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Drain {
    /// What it is ("1/2 in ball valve to vent stack").
    pub description: String,
    /// The limiting orifice diameter.
    #[serde(rename = "orifice_m")]
    pub orifice: Length,
    /// Its discharge coefficient.
    pub cd: f64,
    /// Where it discharges: without a `to`, into the site's room where one is named, else
    /// unstated.
    pub to: Option<VentTo>,
}

/// A cylinder filled on site.
#[derive(Debug, Clone, serde::Serialize)]
pub struct Cylinder {
    /// Unique tag on the site.
    pub tag: String,
    /// What it is.
    pub description: String,
    /// The gas it is filled with.
    #[serde(serialize_with = "gas_name")]
    pub gas: &'static Gas,
    /// Water (internal) capacity.
    #[serde(rename = "water_capacity_m3")]
    pub water_capacity: Volume,
    /// Service (working) pressure at the reference temperature, absolute.
    #[serde(rename = "service_pressure_pa")]
    pub service_pressure: Pressure,
    /// Rated maximum gas temperature.
    #[serde(rename = "rated_temperature_k")]
    pub rated_temperature: ThermodynamicTemperature,
    /// Construction.
    pub construction: Construction,
    /// A composite cylinder's liner, if the site file names it.
    pub liner: Option<Liner>,
    /// The empty cylinder's mass without its valve (its tare weight), if known.
    #[serde(rename = "empty_mass_kg")]
    pub empty_mass: Option<Mass>,
    /// Supply gas temperature at the fill station.
    #[serde(rename = "supply_temperature_k")]
    pub supply_temperature: ThermodynamicTemperature,
    /// Planned fill rate.
    #[serde(rename = "fill_rate_pa_per_s")]
    pub fill_rate: Option<PressureRate>,
    /// Pressure left in the cylinder when it comes to be filled, absolute.
    #[serde(rename = "residual_pressure_pa")]
    pub residual_pressure: Pressure,
    /// Where it stood in the site file.
    #[serde(skip)]
    pub origin: Origin,
}

fn gas_name<S: serde::Serializer>(gas: &&'static Gas, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(gas.name)
}
