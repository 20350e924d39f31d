//! The worksheet model: what a calculation reports, built from a rule's result and its
//! inputs. The JSON form is the contract other tools read; the [`Worksheet`] form is what the
//! text (and, later, PDF) renderers lay out. Nothing here computes physics.

mod axis;
mod colour;
mod document;
mod fragments;
pub mod html;
mod json;
mod pdf;
pub mod plots;
mod release;
mod text;

pub use crate::units::AxisKind;
pub use crate::units::Value;
pub use document::{Axis, Document, Plot, Section, Series};
pub use json::to_json;
pub use pdf::{render_pdf, Paper, PdfError};
pub use text::{render_text, value_text};

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

/// The stored-energy report (`pvhazard energy`). Field names are the JSON contract.
#[derive(Debug, Clone, Serialize)]
pub struct EnergyReport {
    /// Always `energy`.
    pub command: &'static str,
    /// pvhazard's version.
    pub tool_version: &'static str,
    /// The gas model used.
    pub model: ModelKind,
    /// The gas.
    pub gas: &'static str,
    /// The inputs, SI, pressures absolute.
    pub inputs: EnergyInputs,
    /// Gas mass, kg.
    pub gas_mass_kg: Mass,
    /// Expansion energies, J.
    pub energy_j: Energies,
    /// Gas temperature at the end of the isentropic expansion, K.
    pub isentropic_end_temperature_k: ThermodynamicTemperature,
    /// TNT mass equivalent of the isentropic energy, kg.
    pub tnt_equivalent_kg: Mass,
    /// Pneumatic-test exclusion distance, m.
    pub exclusion_distance_m: Length,
    /// Which clause set the exclusion distance.
    pub exclusion_basis: DistanceBasis,
    /// Overpressure standoffs.
    pub standoff_m: Vec<StandoffEntry>,
    /// Energy of the same vessel on a hydrostatic test at the same gauge pressure, J.
    pub hydrotest_energy_j: Energy,
    /// Pressure to vent to before the energy is at or below `--energy-limit`, Pa(a).
    pub vent_down_target_pa: Option<Pressure>,
    /// If the vessel bursts: the fragments' velocity and range (null without the empty
    /// vessel's mass).
    pub fragments: Option<Fragments>,
    /// The ideal gas's results for the same inputs, when the real-gas model was used.
    pub ideal_gas_comparison: Option<EnergyComparison>,
    /// The decision and the findings behind it.
    pub verdict: Verdict,
    /// Banners: the hazards that apply and the limits of the result, highest first, the
    /// deferral last.
    pub cautions: Vec<Caution>,
    /// How the results were reached: methods, models, constants, assumptions.
    pub basis: Vec<Note>,
}

/// The energy command's inputs as used.
#[derive(Debug, Clone, Serialize)]
pub struct EnergyInputs {
    /// Gas volume, m³.
    pub volume_m3: Volume,
    /// Absolute pressure, Pa.
    pub pressure_pa: Pressure,
    /// Gas temperature, K.
    pub temperature_k: ThermodynamicTemperature,
    /// Absolute ambient pressure, Pa.
    pub ambient_pressure_pa: Pressure,
    /// TNT energy, J/kg.
    pub tnt_energy_j_per_kg: AvailableEnergy,
    /// Energy limit for the vent-down target, J.
    pub energy_limit_j: Option<Energy>,
    /// MAWP, absolute, Pa.
    pub mawp_pa: Option<Pressure>,
    /// Distance the site can keep clear, m.
    pub clearance_m: Option<Length>,
    /// The empty vessel's mass, for the fragments, kg.
    pub empty_mass_kg: Option<Mass>,
    /// What the keep-back distance is for: `in-service` or `pressure-test`.
    pub work: &'static str,
    /// For in-service work, the overpressure whose standoff keeps people back, Pa.
    pub keep_back_overpressure_pa: Option<Pressure>,
}

/// One overpressure standoff.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct StandoffEntry {
    /// Incident overpressure, Pa.
    pub overpressure_pa: Pressure,
    /// Distance, m; null outside the Kingery–Bulmash fits.
    pub distance_m: Option<Length>,
}

impl EnergyReport {
    /// The report of a stored-energy calculation.
    pub fn new(model: &dyn GasModel, input: &EnergyInput, out: Assessed<EnergyResult>) -> Self {
        let r = out.value;
        EnergyReport {
            command: "energy",
            tool_version: TOOL_VERSION,
            model: model.kind(),
            gas: model.gas().name,
            inputs: EnergyInputs {
                volume_m3: input.volume,
                pressure_pa: input.pressure,
                temperature_k: input.temperature,
                ambient_pressure_pa: input.ambient,
                tnt_energy_j_per_kg: input.tnt_energy,
                energy_limit_j: input.energy_limit,
                mawp_pa: input.mawp,
                clearance_m: input.clearance,
                empty_mass_kg: None,
                work: "in-service",
                keep_back_overpressure_pa: None,
            },
            gas_mass_kg: r.gas_mass,
            energy_j: r.energy,
            isentropic_end_temperature_k: r.isentropic_end.temperature,
            tnt_equivalent_kg: r.tnt_equivalent,
            exclusion_distance_m: r.exclusion_distance,
            exclusion_basis: r.exclusion_basis,
            standoff_m: r
                .standoffs
                .iter()
                .map(|s| StandoffEntry {
                    overpressure_pa: s.overpressure,
                    distance_m: s.distance,
                })
                .collect(),
            hydrotest_energy_j: r.hydrotest_energy,
            vent_down_target_pa: r.vent_down_target,
            fragments: None,
            ideal_gas_comparison: None,
            verdict: Verdict::default(),
            cautions: ordered(out.cautions),
            basis: out.basis,
        }
    }
}

/// The fill report (`pvhazard fill`). Field names are the JSON contract.
#[derive(Debug, Clone, Serialize)]
pub struct FillReport {
    /// Always `fill`.
    pub command: &'static str,
    /// pvhazard's version.
    pub tool_version: &'static str,
    /// The gas model used.
    pub model: ModelKind,
    /// The gas.
    pub gas: &'static str,
    /// The inputs, SI, pressures absolute.
    pub inputs: FillInputs,
    /// Gas temperature at the end of the adiabatic fill, K.
    pub final_temperature_k: ThermodynamicTemperature,
    /// Gas mass before the fill, kg.
    pub initial_mass_kg: Mass,
    /// Mass added, kg.
    pub mass_added_kg: Mass,
    /// Pressure after cooling to ambient, Pa(a).
    pub settled_pressure_pa: Pressure,
    /// Stop pressure that settles at the target, Pa(a); null when no fill is needed.
    pub fill_to_pressure_pa: Option<Pressure>,
    /// Gas temperature against pressure through the fill.
    pub path: Vec<FillSample>,
    /// The fill with heat exchanged with the wall, when a rate or duration was given.
    pub transient: Option<FillTransientReport>,
    /// The ideal gas's results for the same inputs, when the real-gas model was used.
    pub ideal_gas_comparison: Option<FillComparison>,
    /// The decision and the findings behind it.
    pub verdict: Verdict,
    /// Banners: the hazards that apply and the limits of the result, highest first, the
    /// deferral last.
    pub cautions: Vec<Caution>,
    /// How the results were reached: methods, models, constants, assumptions.
    pub basis: Vec<Note>,
}

/// The fill with wall heat transfer.
#[derive(Debug, Clone, Serialize)]
pub struct FillTransientReport {
    /// `lumped` or `none`.
    pub heat_transfer: HeatTransfer,
    /// The inner coefficient given instead of the correlations, W/(m²·K).
    pub inner_coefficient_w_per_m2_k: Option<f64>,
    /// The wall used: its layers and their masses.
    pub wall: Wall,
    /// How the inner coefficient was found.
    pub inner_coefficient_basis: InnerBasis,
    /// The planned pressure ramp, Pa/s (null for a mass-flow fill).
    pub planned_rate_pa_per_s: Option<Pressure>,
    /// The planned mass flow, kg/s (null for a pressure-ramp fill).
    pub planned_mass_flow_kg_per_s: Option<MassRate>,
    /// Highest gas temperature, K: the central result.
    pub peak_gas_temperature_k: ThermodynamicTemperature,
    /// The conservative edge of the highest gas temperature, K: with the correlation's
    /// coefficient at the low end of its scatter (the central value where the coefficient
    /// was given). The go/no-go and the highest safe rate are decided on it.
    pub peak_gas_temperature_upper_k: ThermodynamicTemperature,
    /// Highest wall temperature at its inner face (a composite's liner), K.
    pub peak_wall_temperature_k: ThermodynamicTemperature,
    /// Highest temperature of a composite cylinder's wrap, K (absent for metal cylinders).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub peak_wrap_temperature_k: Option<ThermodynamicTemperature>,
    /// Pressure at the end of the fill, Pa(a).
    pub end_pressure_pa: Pressure,
    /// Duration of the fill, s.
    pub fill_time_s: Time,
    /// Pressure after cooling to ambient, Pa(a).
    pub settled_pressure_pa: Pressure,
    /// Stop pressure at the planned rate that settles at the target, Pa(a).
    pub fill_to_pressure_pa: Option<Pressure>,
    /// Highest ramp keeping the gas within the rating, Pa/s; null when none is needed or none
    /// is safe (see `max_rate`).
    pub max_rate_pa_per_s: Option<Pressure>,
    /// `ramp` (a finite maximum), `unlimited` (even the adiabatic bound is within the
    /// rating), `inlet-limited` (even the fastest fill the inlet passes, `max_rate_pa_per_s`,
    /// is within it), `none-safe` (even a day-long fill exceeds it), `unresolved` (the search
    /// failed on the model), or null without a rating.
    pub max_rate: Option<&'static str>,
    /// Whether the planned fill keeps the gas within the rating on the conservative edge
    /// (null without a rating).
    pub go: Option<bool>,
    /// Energy not accounted for over the run, relative.
    pub energy_residual: f64,
    /// The time series.
    pub samples: Vec<Sample>,
}

impl FillTransientReport {
    /// The report of a transient fill run at `rate`.
    pub fn new(
        t: &FillTransient,
        rate: FillRate,
        rated: Option<ThermodynamicTemperature>,
        exchange: &Exchange,
    ) -> Self {
        let (planned_rate_pa_per_s, planned_mass_flow_kg_per_s) = match rate {
            FillRate::Ramp(r) => (Some(r.per_second), None),
            FillRate::MassFlow(m) => (None, Some(m)),
        };
        let (max_rate_pa_per_s, max_rate) = match t.max_rate {
            None => (None, None),
            Some(MaxRate::Ramp(r)) => (Some(r.per_second), Some("ramp")),
            Some(MaxRate::Unlimited) => (None, Some("unlimited")),
            Some(MaxRate::NoneSafe) => (None, Some("none-safe")),
            Some(MaxRate::InletLimited(r)) => (Some(r.per_second), Some("inlet-limited")),
            Some(MaxRate::Unresolved) => (None, Some("unresolved")),
        };
        FillTransientReport {
            heat_transfer: exchange.mode,
            inner_coefficient_w_per_m2_k: exchange.inner_coefficient,
            wall: t.wall,
            inner_coefficient_basis: t.run.basis,
            planned_rate_pa_per_s,
            planned_mass_flow_kg_per_s,
            peak_gas_temperature_k: t.run.peak_gas(),
            peak_gas_temperature_upper_k: t.peak_gas_upper,
            peak_wall_temperature_k: t.run.peak_wall(),
            peak_wrap_temperature_k: t.run.peak_wrap(),
            end_pressure_pa: t.run.end.pressure,
            fill_time_s: t.run.duration(),
            settled_pressure_pa: t.settled_pressure,
            fill_to_pressure_pa: t.fill_to_pressure,
            max_rate_pa_per_s,
            max_rate,
            go: rated.map(|r| t.peak_gas_upper <= r),
            energy_residual: t.run.energy_residual,
            samples: t.run.samples.clone(),
        }
    }

    /// The transient's results, with methods.
    pub fn result_entries(&self) -> Vec<Entry> {
        let method = self.heat_transfer.method();
        let mut out = Vec::new();
        out.push(result(
            "Peak gas temperature",
            Value::Temperature(self.peak_gas_temperature_k),
            method,
        ));
        if self.peak_gas_temperature_upper_k != self.peak_gas_temperature_k {
            out.push(result(
                "Peak gas temperature, conservative edge",
                Value::Temperature(self.peak_gas_temperature_upper_k),
                "inner coefficient 30 % lower (the correlation's scatter): the go/no-go is decided on it",
            ));
        }
        out.push(result(
            "Peak wall temperature",
            Value::Temperature(self.peak_wall_temperature_k),
            if self.peak_wrap_temperature_k.is_some() {
                "the liner, at its inner face"
            } else {
                "at the inner face"
            },
        ));
        if let Some(t) = self.peak_wrap_temperature_k {
            out.push(result(
                "Peak wrap temperature",
                Value::Temperature(t),
                "the carbon-fibre wrap next to the liner, with conduction through the wrap",
            ));
        }
        out.push(result("Fill time", Value::Time(self.fill_time_s), method));
        out.push(result(
            "Settled pressure after the planned fill",
            Value::Pressure(self.settled_pressure_pa),
            "constant mass, cooled to ambient",
        ));
        if let Some(p) = self.fill_to_pressure_pa {
            out.push(result(
                "Fill to at the planned rate (settles at target)",
                Value::Pressure(p),
                "stop pressure at the planned rate whose mass settles at the target",
            ));
        }
        let max = match (self.max_rate, self.max_rate_pa_per_s) {
            (Some("ramp"), Some(r)) => Some(Value::PressureRate(r)),
            (Some("unlimited"), _) => Some(Value::Text(
                "no limit: even the adiabatic bound stays within the rating".to_string(),
            )),
            (Some("inlet-limited"), Some(r)) => {
                out.push(result(
                    "Highest fill rate within the rating",
                    Value::PressureRate(r),
                    "the inlet's fastest fill (choked from the supply): the rating is not reached even there",
                ));
                None
            }
            (Some("unresolved"), _) => Some(Value::Text(
                "not solved: a fill the search tried did not complete on the model".to_string(),
            )),
            (Some(_), _) => Some(Value::Text(
                "none: even a day-long fill exceeds the rating".to_string(),
            )),
            (None, _) => None,
        };
        if let Some(v) = max {
            out.push(result(
                "Highest fill rate within the rating",
                v,
                "the ramp whose peak gas temperature equals the rating, solved on the model",
            ));
        }
        out
    }
}

/// The fill command's inputs as used.
#[derive(Debug, Clone, Serialize)]
pub struct FillInputs {
    /// Cylinder volume, m³.
    pub volume_m3: Volume,
    /// Starting pressure, Pa(a).
    pub from_pa: Pressure,
    /// Stop pressure, Pa(a).
    pub to_pa: Pressure,
    /// Starting gas temperature, K.
    pub initial_temperature_k: ThermodynamicTemperature,
    /// Supply gas temperature, K.
    pub supply_temperature_k: ThermodynamicTemperature,
    /// Supply pressure, absolute, Pa (where the supply's enthalpy is taken).
    pub supply_pressure_pa: Pressure,
    /// Inlet bore for the jet correlation, m, when given.
    pub inlet_diameter_m: Option<Length>,
    /// Ambient temperature, K.
    pub ambient_temperature_k: ThermodynamicTemperature,
    /// Rated maximum gas temperature, K.
    pub rated_temperature_k: Option<ThermodynamicTemperature>,
    /// Ambient pressure used for gauge readings, Pa(a).
    pub ambient_pressure_pa: Pressure,
}

impl FillReport {
    /// The report of a fill calculation; `ambient` is the pressure gauge readings refer to.
    pub fn new(
        model: &dyn GasModel,
        input: &FillInput,
        ambient: Pressure,
        out: Assessed<FillResult>,
    ) -> Self {
        let r = out.value;
        FillReport {
            command: "fill",
            tool_version: TOOL_VERSION,
            model: model.kind(),
            gas: model.gas().name,
            inputs: FillInputs {
                volume_m3: input.volume,
                from_pa: input.from,
                to_pa: input.to,
                initial_temperature_k: input.initial_temperature,
                supply_temperature_k: input.supply_temperature,
                supply_pressure_pa: input.supply_pressure.unwrap_or(input.to),
                inlet_diameter_m: None,
                ambient_temperature_k: input.ambient_temperature,
                rated_temperature_k: input.rated_temperature,
                ambient_pressure_pa: ambient,
            },
            final_temperature_k: r.final_temperature,
            initial_mass_kg: r.initial_mass,
            mass_added_kg: r.mass_added,
            settled_pressure_pa: r.settled_pressure,
            fill_to_pressure_pa: r.fill_to_pressure,
            path: r.path,
            transient: None,
            ideal_gas_comparison: None,
            verdict: Verdict::default(),
            cautions: ordered(out.cautions),
            basis: out.basis,
        }
    }
}

/// The blow-down report (`pvhazard vent`). Field names are the JSON contract.
#[derive(Debug, Clone, Serialize)]
pub struct VentReport {
    /// Always `vent`.
    pub command: &'static str,
    /// pvhazard's version.
    pub tool_version: &'static str,
    /// The gas model used.
    pub model: ModelKind,
    /// The gas.
    pub gas: &'static str,
    /// The inputs, SI, pressures absolute.
    pub inputs: VentInputs,
    /// Time to the target through the orifice, s (null without `--orifice`).
    pub time_s: Option<Time>,
    /// Part of that time with the orifice choked, s.
    pub choked_time_s: Option<Time>,
    /// Gas temperature at the target, K.
    pub final_temperature_k: ThermodynamicTemperature,
    /// Mass vented, kg.
    pub mass_vented_kg: Mass,
    /// Mass flow at the start, kg/s.
    pub initial_mass_flow_kg_per_s: Option<MassRate>,
    /// Orifice diameter that vents within `--within`, m.
    pub required_orifice_m: Option<Length>,
    /// Pressure and gas temperature against time through the given orifice.
    pub history: Vec<VentSample>,
    /// The room the gas is vented into and what its atmosphere does (null: vented
    /// outdoors, no room calculation).
    pub release: Option<RoomRelease>,

    /// The vent with heat from the wall, when asked for.
    pub transient: Option<VentTransientReport>,
    /// The depressuring check, when asked for.
    pub depressuring: Option<DepressuringReport>,
    /// The ideal gas's results for the same inputs, when the real-gas model was used.
    pub ideal_gas_comparison: Option<VentComparison>,
    /// The decision and the findings behind it.
    pub verdict: Verdict,
    /// Banners: the hazards that apply and the limits of the result, highest first, the
    /// deferral last.
    pub cautions: Vec<Caution>,
    /// How the results were reached: methods, models, constants, assumptions.
    pub basis: Vec<Note>,
}

/// The vent with wall heat transfer.
#[derive(Debug, Clone, Serialize)]
pub struct VentTransientReport {
    /// `lumped` or `none`.
    pub heat_transfer: HeatTransfer,
    /// The inner coefficient given instead of the correlations, W/(m²·K).
    pub inner_coefficient_w_per_m2_k: Option<f64>,
    /// The wall used: its layers and their masses.
    pub wall: Wall,
    /// How the inner coefficient was found.
    pub inner_coefficient_basis: InnerBasis,
    /// Time to the target, s.
    pub time_s: Time,
    /// Lowest gas temperature, K: the central result.
    pub min_gas_temperature_k: ThermodynamicTemperature,
    /// The conservative edge of the lowest gas temperature, K: the lowest over the inner
    /// coefficient's scatter (the central value where the coefficient was given).
    pub min_gas_temperature_lower_k: ThermodynamicTemperature,
    /// Lowest wall temperature at its inner face, K: the central result.
    pub min_wall_temperature_k: ThermodynamicTemperature,
    /// The conservative edge of the lowest wall temperature, K: the cold-metal finding is
    /// decided on it.
    pub min_wall_temperature_lower_k: ThermodynamicTemperature,
    /// Energy not accounted for over the run, relative.
    pub energy_residual: f64,
    /// The time series.
    pub samples: Vec<Sample>,
}

/// The depressuring check's outcome.
#[derive(Debug, Clone, Copy, Serialize)]
pub struct DepressuringReport {
    /// The pressure to reach, Pa(a).
    pub target_pressure_pa: Pressure,
    /// The time taken, s (null if never reached).
    pub time_s: Option<Time>,
    /// The time allowed, s.
    pub limit_s: Time,
    /// Whether it is reached in time.
    pub meets: bool,
}

impl VentTransientReport {
    /// The report of a transient vent and its depressuring check.
    pub fn new(
        t: &VentTransient,
        check: Option<Depressuring>,
        exchange: &Exchange,
    ) -> (Self, Option<DepressuringReport>) {
        let report = VentTransientReport {
            heat_transfer: exchange.mode,
            inner_coefficient_w_per_m2_k: exchange.inner_coefficient,
            wall: t.wall,
            inner_coefficient_basis: t.run.basis,
            time_s: t.run.duration(),
            min_gas_temperature_k: t.run.min_gas(),
            min_gas_temperature_lower_k: t.min_gas_lower,
            min_wall_temperature_k: t.run.min_wall(),
            min_wall_temperature_lower_k: t.min_wall_lower,
            energy_residual: t.run.energy_residual,
            samples: t.run.samples.clone(),
        };
        let dep = check.map(|c| DepressuringReport {
            target_pressure_pa: c.target,
            time_s: t.depressuring_time,
            limit_s: c.limit,
            meets: t.depressuring_time.is_some_and(|x| x <= c.limit),
        });
        (report, dep)
    }

    /// The transient's results, with methods.
    pub fn result_entries(&self, dep: Option<&DepressuringReport>) -> Vec<Entry> {
        let method = self.heat_transfer.method();
        let mut out = vec![
            result(
                "Time to target with wall heat",
                Value::Time(self.time_s),
                method,
            ),
            result(
                "Lowest gas temperature",
                Value::Temperature(self.min_gas_temperature_k),
                method,
            ),
            result(
                "Lowest wall temperature",
                Value::Temperature(self.min_wall_temperature_k),
                "at the inner face",
            ),
        ];
        if self.min_gas_temperature_lower_k != self.min_gas_temperature_k
            || self.min_wall_temperature_lower_k != self.min_wall_temperature_k
        {
            out.push(result(
                "Lowest gas temperature, conservative edge",
                Value::Temperature(self.min_gas_temperature_lower_k),
                "inner coefficient 30 % lower or higher (the correlation's scatter)",
            ));
            out.push(result(
                "Lowest wall temperature, conservative edge",
                Value::Temperature(self.min_wall_temperature_lower_k),
                "the same runs: the cold-metal finding is decided on it",
            ));
        }
        if let Some(d) = dep {
            out.push(result(
                "Depressuring check",
                Value::Text(match (d.meets, d.time_s) {
                    (true, Some(t)) => format!("met: {} s to the check pressure", crate::units::fmt_sig(t.get::<uom::si::time::second>(), 3)),
                    (false, Some(t)) => format!("NOT met: {} s to the check pressure", crate::units::fmt_sig(t.get::<uom::si::time::second>(), 3)),
                    (_, None) => "NOT met: the check pressure is not reached".to_string(),
                }),
                "the check pressure (by default the lower of 50 % of design gauge and 690 kPa(g)) within the time allowed (by default 15 min), in the spirit of API 521",
            ));
        }
        out
    }
}

/// The vent command's inputs as used.
#[derive(Debug, Clone, Serialize)]
pub struct VentInputs {
    /// Vessel volume, m³.
    pub volume_m3: Volume,
    /// Starting pressure, Pa(a).
    pub pressure_pa: Pressure,
    /// Starting gas temperature, K.
    pub temperature_k: ThermodynamicTemperature,
    /// Ambient pressure, Pa(a).
    pub ambient_pressure_pa: Pressure,
    /// Orifice diameter, m.
    pub orifice_m: Option<Length>,
    /// Discharge coefficient.
    pub cd: f64,
    /// Target pressure, Pa(a).
    pub down_to_pa: Pressure,
    /// The process assumed.
    pub process: Process,
    /// MDMT, K.
    pub min_metal_temperature_k: Option<ThermodynamicTemperature>,
    /// Time allowed, s.
    pub within_s: Option<Time>,
    /// Design (MAWP) pressure for the wall estimate and the depressuring check, absolute,
    /// Pa, when given.
    pub design_pressure_pa: Option<Pressure>,
}

impl VentReport {
    /// The report of a blow-down calculation.
    pub fn new(model: &dyn GasModel, input: &VentInput, out: Assessed<VentResult>) -> Self {
        let r = out.value;
        VentReport {
            command: "vent",
            tool_version: TOOL_VERSION,
            model: model.kind(),
            gas: model.gas().name,
            inputs: VentInputs {
                volume_m3: input.volume,
                pressure_pa: input.pressure,
                temperature_k: input.temperature,
                ambient_pressure_pa: input.ambient,
                orifice_m: input.orifice,
                cd: input.cd,
                down_to_pa: input.down_to,
                process: input.process,
                min_metal_temperature_k: input.min_metal_temperature,
                within_s: input.within,
                design_pressure_pa: None,
            },
            time_s: r.time,
            choked_time_s: r.choked_time,
            final_temperature_k: r.end.temperature,
            mass_vented_kg: r.mass_vented,
            initial_mass_flow_kg_per_s: r.initial_mass_flow,
            required_orifice_m: r.required_orifice,
            history: r.history,
            transient: None,
            depressuring: None,
            release: None,
            ideal_gas_comparison: None,
            verdict: Verdict::default(),
            cautions: ordered(out.cautions),
            basis: out.basis,
        }
    }
}

/// The ideal gas's stored-energy results for the same inputs.
#[derive(Debug, Clone, Serialize)]
pub struct EnergyComparison {
    /// Gas mass, kg.
    pub gas_mass_kg: Mass,
    /// Expansion energies, J.
    pub energy_j: Energies,
    /// Gas temperature at the end of the isentropic expansion, K.
    pub isentropic_end_temperature_k: ThermodynamicTemperature,
    /// TNT mass equivalent, kg.
    pub tnt_equivalent_kg: Mass,
    /// Pneumatic-test exclusion distance, m.
    pub exclusion_distance_m: Length,
}

/// The ideal gas's fill results for the same inputs.
#[derive(Debug, Clone, Serialize)]
pub struct FillComparison {
    /// Gas temperature at the end of the adiabatic fill, K.
    pub final_temperature_k: ThermodynamicTemperature,
    /// Mass added, kg.
    pub mass_added_kg: Mass,
    /// Pressure after cooling to ambient, Pa(a).
    pub settled_pressure_pa: Pressure,
    /// Stop pressure that settles at the target, Pa(a).
    pub fill_to_pressure_pa: Option<Pressure>,
}

/// The ideal gas's vent results for the same inputs.
#[derive(Debug, Clone, Serialize)]
pub struct VentComparison {
    /// Time to the target pressure, s.
    pub time_s: Option<Time>,
    /// Gas temperature at the target pressure, K.
    pub final_temperature_k: ThermodynamicTemperature,
    /// Mass vented, kg.
    pub mass_vented_kg: Mass,
    /// Mass flow at the start, kg/s.
    pub initial_mass_flow_kg_per_s: Option<MassRate>,
}

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

impl EnergyReport {
    /// Keeps the ideal gas's results from `ideal` (the same inputs on the ideal model).
    pub fn compare_with(&mut self, ideal: &EnergyReport) {
        self.ideal_gas_comparison = Some(EnergyComparison {
            gas_mass_kg: ideal.gas_mass_kg,
            energy_j: ideal.energy_j,
            isentropic_end_temperature_k: ideal.isentropic_end_temperature_k,
            tnt_equivalent_kg: ideal.tnt_equivalent_kg,
            exclusion_distance_m: ideal.exclusion_distance_m,
        });
    }

    /// The ideal gas's values beside the real gas's, for the worksheet.
    pub fn comparison_entries(&self) -> Vec<Entry> {
        use uom::si::{energy::joule, length::meter, mass::kilogram};
        let Some(c) = &self.ideal_gas_comparison else {
            return Vec::new();
        };
        let e = |label: &str, real: Energy, ideal: Energy| {
            compared(
                label,
                real.get::<joule>(),
                ideal.get::<joule>(),
                Value::Energy(ideal),
            )
        };
        vec![
            compared(
                "Gas mass",
                self.gas_mass_kg.get::<kilogram>(),
                c.gas_mass_kg.get::<kilogram>(),
                Value::Mass(c.gas_mass_kg),
            ),
            e(
                "Isentropic energy",
                self.energy_j.isentropic,
                c.energy_j.isentropic,
            ),
            e(
                "Isothermal energy",
                self.energy_j.isothermal,
                c.energy_j.isothermal,
            ),
            e("Brode energy", self.energy_j.brode, c.energy_j.brode),
            compared_temperature(
                "Isentropic end temperature",
                self.isentropic_end_temperature_k,
                c.isentropic_end_temperature_k,
            ),
            compared(
                "TNT equivalent",
                self.tnt_equivalent_kg.get::<kilogram>(),
                c.tnt_equivalent_kg.get::<kilogram>(),
                Value::Mass(c.tnt_equivalent_kg),
            ),
            compared(
                "Exclusion distance",
                self.exclusion_distance_m.get::<meter>(),
                c.exclusion_distance_m.get::<meter>(),
                Value::Distance(c.exclusion_distance_m),
            ),
        ]
    }
}

impl FillReport {
    /// Keeps the ideal gas's results from `ideal` (the same inputs on the ideal model).
    pub fn compare_with(&mut self, ideal: &FillReport) {
        self.ideal_gas_comparison = Some(FillComparison {
            final_temperature_k: ideal.final_temperature_k,
            mass_added_kg: ideal.mass_added_kg,
            settled_pressure_pa: ideal.settled_pressure_pa,
            fill_to_pressure_pa: ideal.fill_to_pressure_pa,
        });
    }

    /// The ideal gas's values beside the real gas's, for the worksheet.
    pub fn comparison_entries(&self) -> Vec<Entry> {
        use uom::si::{mass::kilogram, pressure::pascal};
        let Some(c) = &self.ideal_gas_comparison else {
            return Vec::new();
        };
        let mut out = vec![
            compared_temperature(
                "Final gas temperature (adiabatic)",
                self.final_temperature_k,
                c.final_temperature_k,
            ),
            compared(
                "Mass added",
                self.mass_added_kg.get::<kilogram>(),
                c.mass_added_kg.get::<kilogram>(),
                Value::Mass(c.mass_added_kg),
            ),
            compared(
                "Settled pressure",
                self.settled_pressure_pa.get::<pascal>(),
                c.settled_pressure_pa.get::<pascal>(),
                Value::Pressure(c.settled_pressure_pa),
            ),
        ];
        if let (Some(r), Some(i)) = (self.fill_to_pressure_pa, c.fill_to_pressure_pa) {
            out.push(compared(
                "Fill to",
                r.get::<pascal>(),
                i.get::<pascal>(),
                Value::Pressure(i),
            ));
        }
        out
    }
}

impl VentReport {
    /// Keeps the ideal gas's results from `ideal` (the same inputs on the ideal model).
    pub fn compare_with(&mut self, ideal: &VentReport) {
        self.ideal_gas_comparison = Some(VentComparison {
            time_s: ideal.time_s,
            final_temperature_k: ideal.final_temperature_k,
            mass_vented_kg: ideal.mass_vented_kg,
            initial_mass_flow_kg_per_s: ideal.initial_mass_flow_kg_per_s,
        });
    }

    /// The ideal gas's values beside the real gas's, for the worksheet.
    pub fn comparison_entries(&self) -> Vec<Entry> {
        use uom::si::{mass::kilogram, mass_rate::kilogram_per_second, time::second};
        let Some(c) = &self.ideal_gas_comparison else {
            return Vec::new();
        };
        let mut out = Vec::new();
        if let (Some(r), Some(i)) = (self.time_s, c.time_s) {
            out.push(compared(
                "Time to the target",
                r.get::<second>(),
                i.get::<second>(),
                Value::Time(i),
            ));
        }
        out.push(compared_temperature(
            "Gas temperature at the target",
            self.final_temperature_k,
            c.final_temperature_k,
        ));
        out.push(compared(
            "Mass vented",
            self.mass_vented_kg.get::<kilogram>(),
            c.mass_vented_kg.get::<kilogram>(),
            Value::Mass(c.mass_vented_kg),
        ));
        if let (Some(r), Some(i)) = (
            self.initial_mass_flow_kg_per_s,
            c.initial_mass_flow_kg_per_s,
        ) {
            out.push(compared(
                "Initial mass flow",
                r.get::<kilogram_per_second>(),
                i.get::<kilogram_per_second>(),
                Value::MassFlow(i),
            ));
        }
        out
    }
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

impl EnergyReport {
    /// Stored energy and TNT equivalent, with methods.
    pub fn stored_entries(&self) -> Vec<Entry> {
        vec![
            result("Gas mass", Value::Mass(self.gas_mass_kg), "density from the gas model × volume"),
            result("Isentropic expansion energy", Value::Energy(self.energy_j.isentropic), "m·[u(p1,T1) − u(pa,s1)]; ASME PCC-2 stored-energy form; basis of TNT and distances"),
            result("Isothermal expansion energy", Value::Energy(self.energy_j.isothermal), "m·[a(p1,T1) − a(pa,T1)] = p1·V·ln(p1/pa) ideal"),
            result("Brode energy", Value::Energy(self.energy_j.brode), "(p1 − pa)·V/(γ−1) ideal; Brode 1959"),
            result("Availability (exergy)", Value::Energy(self.energy_j.availability), "dead state at ambient pressure and gas temperature"),
            result("Isentropic end temperature", Value::Temperature(self.isentropic_end_temperature_k), "state at (pa, s1)"),
            result("TNT equivalent", Value::Mass(self.tnt_equivalent_kg), "isentropic energy / TNT energy"),
        ]
    }

    /// A burst's fragments, where the vessel's mass was given.
    pub fn fragment_entries(&self) -> Vec<Entry> {
        self.fragments
            .as_ref()
            .map(fragments::entries)
            .unwrap_or_default()
    }

    /// Exclusion distance and overpressure standoffs.
    pub fn distance_entries(&self) -> Vec<Entry> {
        let mut out = vec![result(
            "Exclusion distance",
            Value::Distance(self.exclusion_distance_m),
            "ASME PCC-2 pneumatic-test safe distance",
        )];
        for s in &self.standoff_m {
            let value = s
                .distance_m
                .map_or(Value::Text("outside the fits".to_string()), Value::Distance);
            out.push(Entry {
                label_value: Some(Value::Overpressure(s.overpressure_pa)),
                ..result(
                    "Standoff to {} overpressure",
                    value,
                    "Kingery–Bulmash surface burst, Swisdak 1994 fits",
                )
            });
        }
        out
    }

    /// The same vessel on a hydrostatic test.
    pub fn liquid_test_entries(&self) -> Vec<Entry> {
        vec![result(
            "Same vessel on a hydrostatic test",
            Value::Energy(self.hydrotest_energy_j),
            "p²·V/(2K), water K = 2.2 GPa",
        )]
    }

    /// The vent-down target for the energy limit, if one was asked for.
    pub fn target_entries(&self) -> Vec<Entry> {
        self.vent_down_target_pa
            .map(|p| {
                result(
                    "Vent down to",
                    Value::Pressure(p),
                    "isentropic energy at the limit",
                )
            })
            .into_iter()
            .collect()
    }
}

impl From<&EnergyReport> for Worksheet {
    fn from(r: &EnergyReport) -> Worksheet {
        let i = &r.inputs;
        let mut inputs = vec![
            entry("Gas", Value::Text(r.gas.to_string())),
            entry("Gas volume", Value::Volume(i.volume_m3)),
            entry("Pressure", Value::Pressure(i.pressure_pa)),
            entry("Gas temperature", Value::Temperature(i.temperature_k)),
            entry(
                "Ambient pressure",
                Value::AbsolutePressure(i.ambient_pressure_pa),
            ),
            entry("TNT energy", Value::SpecificEnergy(i.tnt_energy_j_per_kg)),
        ];
        inputs.extend(i.mawp_pa.map(|p| entry("MAWP", Value::Pressure(p))));
        inputs.extend(
            i.energy_limit_j
                .map(|e| entry("Energy limit", Value::Energy(e))),
        );
        inputs.extend(
            i.clearance_m
                .map(|d| entry("Site clearance", Value::Distance(d))),
        );
        inputs.extend(
            i.empty_mass_kg
                .map(|m| entry("Empty vessel mass", Value::Mass(m))),
        );
        let results = [
            r.stored_entries(),
            r.distance_entries(),
            r.fragment_entries(),
            r.liquid_test_entries(),
            r.target_entries(),
        ]
        .concat();
        Worksheet {
            title: format!("Stored energy — {}, {} gas model", r.gas, r.model.name()),
            ambient: i.ambient_pressure_pa,
            verdict: r.verdict.clone(),
            cautions: r.cautions.clone(),
            inputs,
            results,
            comparison: r.comparison_entries(),
            basis: r.basis.clone(),
        }
    }
}

impl FillReport {
    /// The fill's results, with methods.
    pub fn result_entries(&self) -> Vec<Entry> {
        let mut results = vec![
            result(
                "Final gas temperature (adiabatic)",
                Value::Temperature(self.final_temperature_k),
                "m_f·u_f − m_i·u_i = (m_f − m_i)·h_in, no heat to the wall",
            ),
            result(
                "Gas mass before",
                Value::Mass(self.initial_mass_kg),
                "density × volume",
            ),
            result(
                "Mass added",
                Value::Mass(self.mass_added_kg),
                "density × volume",
            ),
            result(
                "Settled pressure at ambient",
                Value::Pressure(self.settled_pressure_pa),
                "constant mass, cooled to ambient",
            ),
        ];
        results.extend(self.fill_to_pressure_pa.map(|p| {
            result(
                "Fill to (settles at target)",
                Value::Pressure(p),
                "stop pressure whose mass settles at the target",
            )
        }));
        results
    }
}

impl From<&FillReport> for Worksheet {
    fn from(r: &FillReport) -> Worksheet {
        let i = &r.inputs;
        let mut inputs = vec![
            entry("Gas", Value::Text(r.gas.to_string())),
            entry("Cylinder volume", Value::Volume(i.volume_m3)),
            entry("From", Value::Pressure(i.from_pa)),
            entry("To", Value::Pressure(i.to_pa)),
            entry(
                "Initial gas temperature",
                Value::Temperature(i.initial_temperature_k),
            ),
            entry(
                "Supply temperature",
                Value::Temperature(i.supply_temperature_k),
            ),
            entry(
                "Ambient temperature",
                Value::Temperature(i.ambient_temperature_k),
            ),
        ];
        inputs.extend(
            i.rated_temperature_k
                .map(|t| entry("Rated temperature", Value::Temperature(t))),
        );
        let mut results = r.result_entries();
        if let Some(t) = &r.transient {
            results.extend(t.result_entries());
        }
        Worksheet {
            title: format!("Fill check — {}, {} gas model", r.gas, r.model.name()),
            ambient: i.ambient_pressure_pa,
            verdict: r.verdict.clone(),
            cautions: r.cautions.clone(),
            inputs,
            results,
            comparison: r.comparison_entries(),
            basis: r.basis.clone(),
        }
    }
}

impl VentReport {
    /// The room the gas is vented into, as given, and its atmosphere's results.
    pub fn release_entries(&self) -> Vec<Entry> {
        self.release
            .as_ref()
            .map(|r| {
                [
                    release::inputs(r),
                    release::results(r, self.inputs.orifice_m),
                ]
                .concat()
            })
            .unwrap_or_default()
    }

    /// The vent-down's results, with methods.
    pub fn result_entries(&self) -> Vec<Entry> {
        let method = "V·dρ/dt = −Cd·A·G(ρ), isentropic nozzle, integrated";
        let mut results = Vec::new();
        results.extend(
            self.time_s
                .map(|t| result("Time to target", Value::Time(t), method)),
        );
        results.extend(
            self.choked_time_s
                .map(|t| result("of which choked", Value::Time(t), method)),
        );
        results.push(result(
            "Final gas temperature",
            Value::Temperature(self.final_temperature_k),
            "end of the process path at the target",
        ));
        results.push(result(
            "Mass vented",
            Value::Mass(self.mass_vented_kg),
            "density change × volume",
        ));
        results.extend(self.initial_mass_flow_kg_per_s.map(|m| {
            result(
                "Initial mass flow",
                Value::MassFlow(m),
                "Cd·A·G at the starting state",
            )
        }));
        results.extend(self.required_orifice_m.map(|d| {
            result(
                "Orifice needed for the time allowed",
                Value::Diameter(d),
                "time scales as 1/(Cd·A)",
            )
        }));
        results
    }
}

impl From<&VentReport> for Worksheet {
    fn from(r: &VentReport) -> Worksheet {
        let i = &r.inputs;
        let mut inputs = vec![
            entry("Gas", Value::Text(r.gas.to_string())),
            entry("Vessel volume", Value::Volume(i.volume_m3)),
            entry("Pressure", Value::Pressure(i.pressure_pa)),
            entry("Gas temperature", Value::Temperature(i.temperature_k)),
            entry(
                "Ambient pressure",
                Value::AbsolutePressure(i.ambient_pressure_pa),
            ),
        ];
        inputs.extend(i.orifice_m.map(|d| entry("Orifice", Value::Diameter(d))));
        inputs.push(entry("Discharge coefficient Cd", Value::Number(i.cd)));
        inputs.push(entry("Vent down to", Value::Pressure(i.down_to_pa)));
        inputs.push(entry(
            "Process",
            Value::Text(format!("{:?}", i.process).to_lowercase()),
        ));
        inputs.extend(
            i.min_metal_temperature_k
                .map(|t| entry("MDMT", Value::Temperature(t))),
        );
        inputs.extend(i.within_s.map(|t| entry("Required within", Value::Time(t))));
        let mut results = r.result_entries();
        if let Some(t) = &r.transient {
            results.extend(t.result_entries(r.depressuring.as_ref()));
        }
        if let Some(room) = &r.release {
            inputs.extend(release::inputs(room));
            results.extend(release::results(room, i.orifice_m));
        }
        Worksheet {
            title: format!("Vent-down — {}, {} gas model", r.gas, r.model.name()),
            ambient: i.ambient_pressure_pa,
            verdict: r.verdict.clone(),
            cautions: r.cautions.clone(),
            inputs,
            results,
            comparison: r.comparison_entries(),
            basis: r.basis.clone(),
        }
    }
}
