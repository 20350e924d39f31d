//! Fill and vent as time histories with heat exchanged between the gas, a lumped wall and
//! the surroundings. The adiabatic fill and the isentropic vent are the bounds; these give
//! what the gas and the metal actually reach.
//!
//! States integrated (SI): gas mass m, gas internal energy U, wall temperature T_w, and two
//! running totals for the energy audit — enthalpy carried in or out, and heat to ambient.
//! The gas state comes from the gas model at (ρ = m/V, u = U/m), so any model serves.

use serde::Serialize;
use uom::si::f64::{
    AvailableEnergy, Length, Mass, MassDensity, MassRate, Pressure, ThermodynamicTemperature, Time,
    Volume,
};
use uom::si::{
    available_energy::joule_per_kilogram, length::meter, mass::kilogram,
    mass_density::kilogram_per_cubic_meter, mass_flux::kilogram_per_square_meter_second,
    mass_rate::kilogram_per_second, pressure::pascal, thermodynamic_temperature::kelvin,
    time::second, volume::cubic_meter,
};

use super::fill::FillInput;
use super::gas_error;
use super::vent::VentInput;
use crate::caution::{Assessed, Caution, Level, Note, Part};
use crate::gas::{GasModel, State};
use crate::heat::{self, Film, InnerBasis};
use crate::heat::{Construction, Liner, Material};
use crate::solve::ode::{self, Options};
use crate::units::PressureRate;
use crate::units::Value;
use crate::InputError;

mod basis;
mod fill;
mod nodes;
mod setup;
#[cfg(test)]
mod tests;
mod vent;

pub use fill::{
    fill, fill_from, fill_once, FillCase, FillTransient, MaxRate, FILL_TO_CAP, RATE_PEAK_TOLERANCE,
};
pub use setup::MAX_STEPS;
pub use vent::{vent, vent_from, VentTransient};

use basis::model_basis;
use nodes::{Nodes, INNER, SLICE_GRID};
use setup::{integration_failure, model_failure, options, Faces, Setup};

/// Whether heat passes between the gas and the wall.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum HeatTransfer {
    /// No heat exchanged: the adiabatic fill and the isentropic vent.
    None,
    /// Lumped gas and wall nodes with convection inside and out.
    Lumped,
}

impl HeatTransfer {
    /// The method, in words, for the output.
    pub fn method(self) -> &'static str {
        match self {
            HeatTransfer::None => "first law, no heat to the wall, adaptive integration",
            HeatTransfer::Lumped => "lumped gas and wall, first law, adaptive integration",
        }
    }
}

/// The wall that exchanges heat with the gas: one node, or for a composite cylinder a
/// liner node and the wrap over it.
///
/// Each node is lumped at its mid-thickness, the thickness taken from its mass, density and
/// the inner area; half of each node's conduction resistance lies between it and each of its
/// faces. For metals that resistance is small beside the convection; insulating layers
/// (the carbon-fibre wrap at 0.5 W/(m·K), a plastic liner) conduct so slowly that they are
/// cut into slices through their thickness (see `Nodes`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Wall {
    /// The inner node's mass (a composite cylinder's liner).
    #[serde(rename = "mass_kg")]
    pub mass: Mass,
    /// The inner node's material.
    pub material: Material,
    /// Whether the mass was estimated (no wall mass given).
    pub estimated: bool,
    /// A composite cylinder's wrap, the outer node.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub wrap: Option<Wrap>,
}

/// The carbon-fibre wrap of a composite cylinder, of [`Material::Composite`].
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Wrap {
    /// Its mass.
    #[serde(rename = "mass_kg")]
    pub mass: Mass,
    /// Whether the mass was estimated (no wrap mass given).
    pub estimated: bool,
    /// Whether the liner was not named and is taken as aluminium.
    pub liner_assumed: bool,
    /// Whether liner and wrap were split from the cylinder's empty mass.
    pub split_from_empty: bool,
}

/// What is known of a cylinder's wall mass.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CylinderMass {
    /// The layers' masses (a composite's liner, then its wrap), each estimated when not
    /// given.
    Layers(Option<Mass>, Option<Mass>),
    /// The empty cylinder's mass without its valve (the tare weight stamped on it): a
    /// composite's is split between liner and wrap in the proportions of their estimates.
    Empty(Mass),
}

impl Wall {
    /// A cylinder's wall from what is known of its mass, with estimates from the
    /// construction (and a composite's liner, aluminium unless named), the water capacity
    /// and the service gauge pressure where needed; a composite's liner and wrap apart.
    pub fn cylinder(
        (construction, liner): (Construction, Option<Liner>),
        water_capacity: Volume,
        service_gauge: Pressure,
        known: CylinderMass,
    ) -> Wall {
        let (v, p) = (
            water_capacity.get::<cubic_meter>(),
            service_gauge.get::<pascal>(),
        );
        let lining = liner.unwrap_or(Liner::Aluminium);
        let estimate = (
            construction.estimated_wall_mass(lining, v, p),
            construction.estimated_wrap_mass(v, p),
        );
        let (wall_mass, wrap_mass, split) = match known {
            CylinderMass::Layers(wall, wrap) => (wall, wrap, false),
            CylinderMass::Empty(total) => {
                let liner_share = match estimate {
                    (l, Some(w)) if l + w > 0.0 => l / (l + w),
                    _ => 1.0,
                };
                (
                    Some(total * liner_share),
                    Some(total * (1.0 - liner_share)),
                    true,
                )
            }
        };
        let kg = Mass::new::<kilogram>;
        Wall {
            mass: wall_mass.unwrap_or_else(|| kg(estimate.0)),
            material: construction.inner_material(lining),
            estimated: wall_mass.is_none(),
            wrap: estimate.1.map(|m| Wrap {
                mass: wrap_mass.unwrap_or_else(|| kg(m)),
                estimated: wrap_mass.is_none(),
                liner_assumed: liner.is_none(),
                split_from_empty: split,
            }),
        }
    }

    /// A vessel's shell, one node: the given mass, or an estimate from the material, the
    /// volume and the design gauge pressure.
    pub fn vessel(
        material: Material,
        volume: Volume,
        design_gauge: Pressure,
        mass: Option<Mass>,
    ) -> Wall {
        Wall {
            mass: mass.unwrap_or_else(|| {
                Mass::new::<kilogram>(material.estimated_vessel_wall_mass(
                    volume.get::<cubic_meter>(),
                    design_gauge.get::<pascal>(),
                ))
            }),
            material,
            estimated: mass.is_none(),
            wrap: None,
        }
    }

    /// Whether any part of the wall's mass was estimated.
    pub fn any_estimated(&self) -> bool {
        self.estimated || self.wrap.is_some_and(|w| w.estimated)
    }
}

/// How the fill is driven.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FillRate {
    /// A steady pressure rise.
    Ramp(PressureRate),
    /// A steady mass flow.
    MassFlow(MassRate),
}

/// Heat-transfer settings shared by fill and vent.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Exchange {
    /// Lumped or none.
    pub mode: HeatTransfer,
    /// The wall node.
    pub wall: Wall,
    /// An inner coefficient to use instead of the correlations, W/(m²·K).
    pub inner_coefficient: Option<f64>,
    /// Ambient temperature outside the wall.
    pub ambient_temperature: ThermodynamicTemperature,
    /// Length over diameter of the vessel, for its inner area and diameter.
    pub aspect: f64,
}

/// One moment of a transient.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Sample {
    /// Time from the start.
    #[serde(rename = "time_s")]
    pub time: Time,
    /// Absolute pressure.
    #[serde(rename = "pressure_pa")]
    pub pressure: Pressure,
    /// Gas temperature.
    #[serde(rename = "gas_temperature_k")]
    pub gas_temperature: ThermodynamicTemperature,
    /// Wall temperature at its inner face (a composite cylinder's liner).
    #[serde(rename = "wall_temperature_k")]
    pub wall_temperature: ThermodynamicTemperature,
    /// A composite cylinder's wrap temperature next to the liner (its innermost slice).
    #[serde(rename = "wrap_temperature_k", skip_serializing_if = "Option::is_none")]
    pub wrap_temperature: Option<ThermodynamicTemperature>,
}

/// A transient run's outcome.
#[derive(Debug, Clone, PartialEq)]
pub struct Run {
    /// The time series, every accepted step.
    pub samples: Vec<Sample>,
    /// The gas state at the end.
    pub end: State,
    /// Energy not accounted for, relative to the energy moved (the audit).
    pub energy_residual: f64,
    /// How the inner coefficient was found.
    pub basis: InnerBasis,
}

impl Run {
    /// The highest gas temperature.
    pub fn peak_gas(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.gas_temperature, f64::max)
    }
    /// The highest wall temperature.
    pub fn peak_wall(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.wall_temperature, f64::max)
    }
    /// The lowest gas temperature.
    pub fn min_gas(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.gas_temperature, f64::min)
    }
    /// The lowest wall temperature.
    pub fn min_wall(&self) -> ThermodynamicTemperature {
        fold(&self.samples, |s| s.wall_temperature, f64::min)
    }
    /// The highest wrap temperature, for a composite cylinder.
    pub fn peak_wrap(&self) -> Option<ThermodynamicTemperature> {
        self.samples.first()?.wrap_temperature?;
        Some(fold(
            &self.samples,
            |s| s.wrap_temperature.unwrap_or(s.wall_temperature),
            f64::max,
        ))
    }
    /// The run's duration.
    pub fn duration(&self) -> Time {
        self.samples
            .last()
            .map_or(Time::new::<second>(0.0), |s| s.time)
    }
}

fn fold(
    samples: &[Sample],
    get: impl Fn(&Sample) -> ThermodynamicTemperature,
    pick: fn(f64, f64) -> f64,
) -> ThermodynamicTemperature {
    let first = samples.first().map_or(0.0, |s| get(s).get::<kelvin>());
    ThermodynamicTemperature::new::<kelvin>(
        samples
            .iter()
            .map(|s| get(s).get::<kelvin>())
            .fold(first, pick),
    )
}
/// A depressuring check in the spirit of API 521: reach a pressure within a time.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Depressuring {
    /// The pressure to reach, absolute: the lower of a fraction of the design gauge
    /// pressure and a cap (50 % and 690 kPa(g) by default).
    #[serde(rename = "target_pressure_pa")]
    pub target: Pressure,
    /// The time allowed (15 min by default).
    #[serde(rename = "limit_s")]
    pub limit: Time,
}
