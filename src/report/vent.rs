//! The vent report: what `pvhazard vent` records, with the wall model's run and the
//! depressuring check, its ideal-gas comparison and its worksheet.

use super::*;

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
        // The process path's results carry its name: beside the wall model's, an isentropic
        // time and temperature are the bound, not what the gas does.
        let process = format!("{:?}", self.inputs.process).to_lowercase();
        let mut results = Vec::new();
        results.extend(self.time_s.map(|t| {
            result(
                format!("Time to target ({process})"),
                Value::Time(t),
                method,
            )
        }));
        results.extend(
            self.choked_time_s
                .map(|t| result("of which choked", Value::Time(t), method)),
        );
        results.push(result(
            format!("Final gas temperature ({process})"),
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
