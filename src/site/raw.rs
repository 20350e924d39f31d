//! The site file as written: every value still text, with where it stood.

use serde::Deserialize;

use crate::source::Spanned;

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawFile {
    pub(super) site: RawSite,
    #[serde(default)]
    pub(super) vessel: Vec<RawVessel>,
    #[serde(default)]
    pub(super) cylinder: Vec<RawCylinder>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawSite {
    pub(super) name: Spanned<String>,
    pub(super) location: Spanned<String>,
    pub(super) ambient_pressure: Option<Spanned<String>>,
    pub(super) elevation: Option<Spanned<String>>,
    pub(super) ambient_temperature: Spanned<String>,
    pub(super) winter_minimum_temperature: Option<Spanned<String>>,
    pub(super) units: Option<Spanned<String>>,
    pub(super) time_zone: Option<Spanned<String>>,
    pub(super) clearance: Option<Spanned<String>>,
    pub(super) governing: Option<Spanned<String>>,
    pub(super) room_volume: Option<Spanned<String>>,
    pub(super) room_ventilation: Option<Spanned<String>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawVessel {
    pub(super) tag: Spanned<String>,
    pub(super) description: Spanned<String>,
    pub(super) gas: Spanned<String>,
    pub(super) volume: Spanned<String>,
    pub(super) mawp: Spanned<String>,
    pub(super) operating_pressure: Spanned<String>,
    pub(super) relief_set_pressure: Option<Spanned<String>>,
    pub(super) mdmt: Option<Spanned<String>>,
    pub(super) material: Option<Spanned<String>>,
    pub(super) wall_thickness: Option<Spanned<String>>,
    pub(super) empty_mass: Option<Spanned<String>>,
    pub(super) temperature: Option<Spanned<String>>,
    pub(super) drain: Option<RawDrain>,
    pub(super) test_pressure: Option<Spanned<String>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawDrain {
    pub(super) description: Option<Spanned<String>>,
    pub(super) orifice: Spanned<String>,
    pub(super) cd: Option<Spanned<f64>>,
    pub(super) to: Option<Spanned<String>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawCylinder {
    pub(super) tag: Spanned<String>,
    pub(super) description: Spanned<String>,
    pub(super) gas: Spanned<String>,
    pub(super) water_capacity: Spanned<String>,
    pub(super) service_pressure: Spanned<String>,
    pub(super) rated_temperature: Spanned<String>,
    pub(super) construction: Spanned<String>,
    pub(super) liner: Option<Spanned<String>>,
    pub(super) empty_mass: Option<Spanned<String>>,
    pub(super) supply_temperature: Option<Spanned<String>>,
    pub(super) fill_rate: Option<Spanned<String>>,
    pub(super) residual_pressure: Option<Spanned<String>>,
}
