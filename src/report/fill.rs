//! The fill report: what `pvhazard fill` records, with the wall model's run, its ideal-gas
//! comparison and its worksheet.

use super::*;

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
                "Settled pressure (adiabatic)",
                self.settled_pressure_pa.get::<pascal>(),
                c.settled_pressure_pa.get::<pascal>(),
                Value::Pressure(c.settled_pressure_pa),
            ),
        ];
        if let (Some(r), Some(i)) = (self.fill_to_pressure_pa, c.fill_to_pressure_pa) {
            out.push(compared(
                "Fill to (adiabatic)",
                r.get::<pascal>(),
                i.get::<pascal>(),
                Value::Pressure(i),
            ));
        }
        out
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
                "Settled pressure at ambient (adiabatic)",
                Value::Pressure(self.settled_pressure_pa),
                "the adiabatic fill's gas, cooled to ambient at constant mass",
            ),
        ];
        results.extend(self.fill_to_pressure_pa.map(|p| {
            result(
                "Fill to, settles at target (adiabatic)",
                Value::Pressure(p),
                "stop pressure of an adiabatic fill whose mass settles at the target",
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
