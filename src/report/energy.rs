//! The stored-energy report: what `pvhazard energy` records, its ideal-gas comparison and
//! its worksheet.

use super::*;

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
