//! Gas models: one trait, [`GasModel`], with the ideal gas and the real gas (reference
//! equations of state) behind it. The rules see only the trait, so they never ask which model
//! they have.
//!
//! A model turns a pair of state variables into a [`State`] and gives the caloric properties
//! (u, h, s, a) at a state. Everything a rule needs — expansion work, fill temperatures,
//! nozzle flow — is written in those terms, which is what lets a real-gas model slot in.

mod catalogue;
mod ideal;
pub mod real;
pub mod transport;

pub use catalogue::{GASES, MOLAR_GAS_CONSTANT};
pub use ideal::IdealGas;
pub use real::RealGas;
pub use transport::DiluteViscosity;

use serde::Serialize;
use uom::si::f64::{
    AvailableEnergy, MassDensity, MassFlux, Pressure, SpecificHeatCapacity,
    ThermodynamicTemperature,
};
use uom::si::{pressure::pascal, thermodynamic_temperature::kelvin};

use crate::caution::Caution;

/// A pure gas (or air as a pseudo-pure fluid) and its constants.
///
/// Fields are plain SI numbers so that the catalogue can be a `static`; use the methods for
/// uom quantities.
#[derive(Debug)]
pub struct Gas {
    /// The name used on the command line and in files (`carbon-dioxide`).
    pub name: &'static str,
    /// The chemical formula (`CO2`), also accepted as a name.
    pub formula: &'static str,
    /// Further accepted spellings, lower case.
    pub aliases: &'static [&'static str],
    /// Molar mass, kg/mol.
    pub molar_mass_kg_per_mol: f64,
    /// Ideal-gas isobaric heat capacity at 300 K, J/(kg·K).
    pub cp_300k_j_per_kg_k: f64,
    /// Critical temperature, K.
    pub critical_temperature_k: f64,
    /// Critical pressure, Pa.
    pub critical_pressure_pa: f64,
    /// Critical density, kg/m³ (the transport properties' reducing density).
    pub critical_density_kg_per_m3: f64,
    /// Pitzer acentric factor.
    pub acentric_factor: f64,
    /// The lowest temperature accepted for the gas (its triple point; helium's lambda
    /// point, having none), K.
    pub min_temperature_k: f64,
    /// The reference equation of state for the gas, the source of its critical point.
    pub eos: &'static str,
    /// What the gas does to people when it escapes.
    pub hazard: GasHazard,
    /// Where the dilute-gas viscosity's Lennard-Jones parameters come from.
    pub dilute_viscosity: DiluteViscosity,
}

/// The hazard of the released gas itself, apart from the stored energy.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum GasHazard {
    /// Breathing air: no hazard from the gas itself at ambient pressure.
    Air,
    /// Displaces oxygen: asphyxiation in enclosed or low spaces.
    Asphyxiant,
    /// Supports and intensifies fire.
    Oxidiser,
    /// Burns or explodes with air.
    Flammable,
    /// Toxic at high concentrations and displaces oxygen (carbon dioxide).
    ToxicAsphyxiant,
}

impl Gas {
    /// Finds a gas by name, formula or alias, ignoring case.
    pub fn find(name: &str) -> Option<&'static Gas> {
        let n = name.trim().to_lowercase();
        GASES.iter().find(|g| {
            g.name == n || g.formula.to_lowercase() == n || g.aliases.contains(&n.as_str())
        })
    }

    /// The names accepted on the command line, for error messages.
    pub fn accepted_names() -> String {
        GASES
            .iter()
            .map(|g| format!("{} ({})", g.name, g.formula))
            .collect::<Vec<_>>()
            .join(", ")
    }

    /// Specific gas constant R = R̄/M, J/(kg·K).
    pub fn specific_gas_constant(&self) -> f64 {
        MOLAR_GAS_CONSTANT / self.molar_mass_kg_per_mol
    }

    /// Ratio of specific heats γ = cp/(cp − R) of the ideal gas at 300 K.
    pub fn gamma_300k(&self) -> f64 {
        self.cp_300k_j_per_kg_k / (self.cp_300k_j_per_kg_k - self.specific_gas_constant())
    }

    /// Viscosity (Pa·s) and thermal conductivity (W/(m·K)) at temperature `t` and `density`,
    /// for the heat-transfer correlations: the dilute-gas value plus the dense-gas rise,
    /// which at 300 bar is half the dilute value or more ([`transport`] gives the methods
    /// and how close they come). Finite and positive for every temperature and density.
    pub fn transport(&self, t: ThermodynamicTemperature, density: MassDensity) -> (f64, f64) {
        use uom::si::mass_density::kilogram_per_cubic_meter;
        transport::viscosity_conductivity(
            self,
            t.get::<kelvin>(),
            density.get::<kilogram_per_cubic_meter>(),
        )
    }

    /// Saturation (vapour) pressure at `t`, or `None` at or above the critical temperature.
    ///
    /// Ambrose–Walton corresponding-states correlation (Poling, Prausnitz & O'Connell, The
    /// Properties of Gases and Liquids, 5th ed., eq. 7-4.1), from Tc, pc and ω. Good to a few
    /// percent, which is what the gate against liquefied gas needs; the real-gas model will
    /// replace it with the equations of state's own phase equilibria.
    pub fn saturation_pressure(&self, t: ThermodynamicTemperature) -> Option<Pressure> {
        let tr = t.get::<kelvin>() / self.critical_temperature_k;
        if tr >= 1.0 || tr <= 0.0 {
            return None;
        }
        let tau = 1.0 - tr;
        let terms = |a: [f64; 4]| {
            (a[0] * tau + a[1] * tau.powf(1.5) + a[2] * tau.powf(2.5) + a[3] * tau.powi(5)) / tr
        };
        let f0 = terms([-5.97616, 1.29874, -0.60394, -1.06841]);
        let f1 = terms([-5.03365, 1.11505, -5.41217, -7.46628]);
        let f2 = terms([-0.64771, 2.41539, -4.26979, 3.25259]);
        let w = self.acentric_factor;
        let ln_pr = f0 + w * f1 + w * w * f2;
        Some(Pressure::new::<pascal>(
            self.critical_pressure_pa * ln_pr.exp(),
        ))
    }

    /// Saturation temperature at `p`, or `None` at or above the critical pressure.
    pub fn saturation_temperature(&self, p: Pressure) -> Option<ThermodynamicTemperature> {
        if p.get::<pascal>() >= self.critical_pressure_pa {
            return None;
        }
        let target = p.get::<pascal>().ln();
        let f = |t: f64| {
            self.saturation_pressure(ThermodynamicTemperature::new::<kelvin>(t))
                .map_or(self.critical_pressure_pa.ln(), |ps| ps.get::<pascal>().ln())
                - target
        };
        let lo = 0.3 * self.critical_temperature_k;
        let hi = self.critical_temperature_k * (1.0 - 1e-12);
        crate::solve::root(f, lo, hi, 1e-10)
            .ok()
            .map(ThermodynamicTemperature::new::<kelvin>)
    }

    /// Compressibility factor from the second virial coefficient (Abbott's correlation,
    /// Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, eqs.
    /// 3.61–3.66), or `None` above the critical pressure where a two-term virial series fails.
    pub fn virial_compressibility(&self, p: Pressure, t: ThermodynamicTemperature) -> Option<f64> {
        let pr = p.get::<pascal>() / self.critical_pressure_pa;
        let tr = t.get::<kelvin>() / self.critical_temperature_k;
        if pr > 1.0 {
            return None;
        }
        let b0 = 0.083 - 0.422 / tr.powf(1.6);
        let b1 = 0.139 - 0.172 / tr.powf(4.2);
        Some(1.0 + (b0 + self.acentric_factor * b1) * pr / tr)
    }

    /// Refuses a state these gas methods do not cover: below the triple point, or above the
    /// saturation pressure (a liquefied gas).
    pub fn check_gas_phase(
        &self,
        p: Pressure,
        t: ThermodynamicTemperature,
    ) -> Result<(), GasError> {
        let tk = t.get::<kelvin>();
        if tk < self.min_temperature_k {
            return Err(GasError::BelowTriplePoint {
                gas: self.name,
                temperature_k: tk,
                min_k: self.min_temperature_k,
            });
        }
        if let Some(psat) = self.saturation_pressure(t) {
            if p > psat {
                return Err(GasError::Liquefied {
                    gas: self.name,
                    pressure_pa: p.get::<pascal>(),
                    temperature_k: tk,
                    saturation_pa: psat.get::<pascal>(),
                });
            }
        }
        Ok(())
    }
}

/// (∂p/∂ρ)_u and (∂p/∂u)_ρ by central differences of the model's (ρ, u) states.
fn pressure_partials_by_differences<M: GasModel + ?Sized>(
    model: &M,
    state: &State,
) -> Option<(f64, f64)> {
    use uom::si::{available_energy::joule_per_kilogram, mass_density::kilogram_per_cubic_meter};
    let rho = state.density.get::<kilogram_per_cubic_meter>();
    let u = model.internal_energy(state).get::<joule_per_kilogram>();
    let p = |rho: f64, u: f64| {
        model
            .state_rho_u(
                MassDensity::new::<kilogram_per_cubic_meter>(rho),
                AvailableEnergy::new::<joule_per_kilogram>(u),
            )
            .ok()
            .map(|s| s.pressure.get::<pascal>())
    };
    let (e_rho, e_u) = (rho * 1e-6, u.abs().max(1.0) * 1e-6);
    Some((
        (p(rho + e_rho, u)? - p(rho - e_rho, u)?) / (2.0 * e_rho),
        (p(rho, u + e_u)? - p(rho, u - e_u)?) / (2.0 * e_u),
    ))
}

/// cp by a small isobaric step of the model's enthalpy.
fn heat_capacity_by_differences<M: GasModel + ?Sized>(
    model: &M,
    state: &State,
) -> Option<SpecificHeatCapacity> {
    use uom::si::{
        available_energy::joule_per_kilogram, specific_heat_capacity::joule_per_kilogram_kelvin,
    };
    let t = state.temperature.get::<kelvin>();
    let up = model
        .state_pt(
            state.pressure,
            ThermodynamicTemperature::new::<kelvin>(t * 1.0005),
        )
        .ok()?;
    let dh = (model.enthalpy(&up) - model.enthalpy(state)).get::<joule_per_kilogram>();
    Some(SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(
        dh / (t * 0.0005),
    ))
}

/// The ideal gas of a real-gas model's gas, whose results are shown beside the real ones;
/// `None` for a model that is already ideal.
pub fn ideal_twin(model: &dyn GasModel) -> Option<IdealGas> {
    (model.kind() == ModelKind::Real).then(|| IdealGas::new(model.gas()))
}

/// Which model computed a result; printed and written to JSON with every result.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum ModelKind {
    /// Ideal gas with constant heat capacities.
    Ideal,
    /// Reference multiparameter Helmholtz-energy equations of state.
    Real,
}

impl ModelKind {
    /// The name as printed and as given to `--model`.
    pub fn name(self) -> &'static str {
        match self {
            ModelKind::Ideal => "ideal",
            ModelKind::Real => "real",
        }
    }
}

/// A thermodynamic state of the gas: pressure, temperature and density together.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct State {
    /// Absolute pressure.
    pub pressure: Pressure,
    /// Temperature.
    pub temperature: ThermodynamicTemperature,
    /// Mass density (of the mixture, when two-phase).
    pub density: MassDensity,
    /// Vapour mass fraction when liquid and vapour are both present; `None` in one phase.
    pub quality: Option<f64>,
}

/// Steady isentropic flow from a stagnation state through a nozzle to a back pressure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NozzleFlow {
    /// Mass flow per unit throat area of an ideal (Cd = 1) nozzle.
    pub mass_flux: MassFlux,
    /// Whether the throat is sonic (the flow no longer depends on the back pressure).
    pub choked: bool,
    /// Where the expansion is at the throat (or at the back pressure, unchoked). Where this
    /// changes along a vent, the flux has a kink.
    pub throat: Throat,
}

/// The phase of a nozzle's flow at its throat.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Throat {
    /// One phase: the expansion reaches its sonic point (or the back pressure) as gas.
    Gas,
    /// At the dew point: the expansion meets the two-phase region before its sonic point,
    /// and the flux peaks at that corner.
    DewPoint,
    /// Inside the two-phase region, in homogeneous equilibrium.
    TwoPhase,
}

/// A state a gas model cannot give.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum GasError {
    /// Above the saturation pressure: liquid in the vessel, outside these gas methods.
    #[error("{gas} at {} bar(a) and {:.1} C is a liquefied gas (its saturation pressure there is about {} bar(a)); these gas-expansion methods do not cover a liquid, which stores and releases energy very differently (flashing, boiling-liquid expansion); accepted: the gas, below {} bar(a) at this temperature", fmt_bar(*pressure_pa), temperature_k - 273.15, fmt_bar(*saturation_pa), fmt_bar(*saturation_pa))]
    Liquefied {
        /// The gas.
        gas: &'static str,
        /// The pressure given, Pa.
        pressure_pa: f64,
        /// The temperature given, K.
        temperature_k: f64,
        /// The saturation pressure at that temperature, Pa.
        saturation_pa: f64,
    },
    /// Below the triple point the substance is solid or liquid.
    #[error("{gas} at {temperature_k:.2} K is below {min_k:.2} K, the lowest temperature accepted for it (its triple point; for helium, its lambda point), where it is no longer a gas; accepted: a temperature above it")]
    BelowTriplePoint {
        /// The gas.
        gas: &'static str,
        /// The temperature given, K.
        temperature_k: f64,
        /// The lowest temperature accepted, K.
        min_k: f64,
    },
    /// An expansion that would end in solid (below the triple point, above the sublimation
    /// pressure where the model has one), which the real-gas model, covering fluid states
    /// only, cannot follow.
    #[error("{what} of {gas} would form solid{}: it would cross the line below its triple point where the gas freezes or sublimes; the real-gas model covers gas and liquid states only; accepted: a state whose expansion stays clear of solid, or --model ideal for an estimate, with its cautions", if *gas == "carbon-dioxide" { " (dry ice)" } else { "" })]
    Freezes {
        /// The gas.
        gas: &'static str,
        /// The process, e.g. "the expansion to 1.013 bar(a)".
        what: String,
    },
    /// A state variable outside what the model accepts.
    #[error("{what} = {value} is outside the model's range; accepted: {accepted}")]
    OutOfRange {
        /// The quantity.
        what: &'static str,
        /// Its value, with unit.
        value: String,
        /// The range accepted.
        accepted: String,
    },
}

fn fmt_bar(pa: f64) -> String {
    crate::units::fmt_sig(pa / 1e5, 4)
}

/// A model of a gas's thermodynamic behaviour: states from pairs of variables, and caloric
/// properties at a state (mass-specific, reference state the model's own — use differences).
pub trait GasModel {
    /// The gas modelled.
    fn gas(&self) -> &'static Gas;

    /// Which model this is.
    fn kind(&self) -> ModelKind;

    /// One line naming the model and its constants, for the output's NOTICE.
    fn describe(&self) -> String;

    /// Refuses a state the gas methods do not cover: below the triple point, or above the
    /// saturation pressure (a liquefied gas).
    fn check_gas_phase(&self, p: Pressure, t: ThermodynamicTemperature) -> Result<(), GasError> {
        self.gas().check_gas_phase(p, t)
    }

    /// The temperature at which the gas condenses at pressure `p`, or `None` at or above
    /// the critical pressure (or below the triple point).
    fn saturation_temperature(&self, p: Pressure) -> Option<ThermodynamicTemperature> {
        self.gas().saturation_temperature(p)
    }

    /// The highest pressure at which the model holds (an equation of state's stated
    /// limit), or `None` for a model without one. A search clips its bracket to it: a state
    /// found from other variables (ρ, u) can lie above it without the model refusing it.
    fn max_pressure(&self) -> Option<Pressure> {
        None
    }

    /// The state at pressure and temperature (the gas-like root).
    fn state_pt(&self, p: Pressure, t: ThermodynamicTemperature) -> Result<State, GasError>;

    /// The state at density and temperature.
    fn state_rho_t(&self, rho: MassDensity, t: ThermodynamicTemperature)
        -> Result<State, GasError>;

    /// The state at density and specific entropy (isentropic change at fixed volume).
    fn state_rho_s(&self, rho: MassDensity, s: SpecificHeatCapacity) -> Result<State, GasError>;

    /// The state at pressure and specific entropy (end of an isentropic expansion).
    fn state_p_s(&self, p: Pressure, s: SpecificHeatCapacity) -> Result<State, GasError>;

    /// The state at density and pressure.
    fn state_rho_p(&self, rho: MassDensity, p: Pressure) -> Result<State, GasError>;

    /// The state at density and specific internal energy (a closed vessel's gas, from its
    /// mass and energy balances).
    fn state_rho_u(&self, rho: MassDensity, u: AvailableEnergy) -> Result<State, GasError>;

    /// The state at density and specific internal energy, starting the search from the
    /// temperature `near` (a time-marching caller knows the last step's); the same state as
    /// [`GasModel::state_rho_u`], found faster.
    fn state_rho_u_near(
        &self,
        rho: MassDensity,
        u: AvailableEnergy,
        near: ThermodynamicTemperature,
    ) -> Result<State, GasError> {
        let _ = near;
        self.state_rho_u(rho, u)
    }

    /// (∂p/∂ρ) at constant u (Pa·m³/kg) and (∂p/∂u) at constant ρ (Pa·kg/J) at `state`: how
    /// a closed vessel's pressure answers mass and energy added. By central differences
    /// unless a model knows them exactly.
    fn pressure_partials(&self, state: &State) -> Option<(f64, f64)> {
        pressure_partials_by_differences(self, state)
    }

    /// Isobaric specific heat capacity at `state`, for the heat-transfer correlations. By
    /// a small isobaric step of the enthalpy unless a model knows it exactly.
    fn isobaric_heat_capacity(&self, state: &State) -> Option<SpecificHeatCapacity> {
        heat_capacity_by_differences(self, state)
    }

    /// Specific internal energy u.
    fn internal_energy(&self, state: &State) -> AvailableEnergy;

    /// Specific entropy s.
    fn entropy(&self, state: &State) -> SpecificHeatCapacity;

    /// Specific enthalpy h = u + p/ρ.
    fn enthalpy(&self, state: &State) -> AvailableEnergy {
        self.internal_energy(state) + state.pressure / state.density
    }

    /// Specific Helmholtz energy a = u − T·s.
    fn helmholtz_energy(&self, state: &State) -> AvailableEnergy {
        let ts = AvailableEnergy::new::<uom::si::available_energy::joule_per_kilogram>(
            state.temperature.get::<kelvin>()
                * self
                    .entropy(state)
                    .get::<uom::si::specific_heat_capacity::joule_per_kilogram_kelvin>(),
        );
        self.internal_energy(state) - ts
    }

    /// Isentropic flow from `stagnation` through an ideal nozzle to `back` pressure.
    fn nozzle(&self, stagnation: &State, back: Pressure) -> NozzleFlow;

    /// The model's own limits at a state the user gave: a WARNING where the model is known to
    /// be off by more than a few percent there.
    fn limitations(&self, state: &State) -> Vec<Caution>;
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_gases_by_name_formula_and_case() {
        assert_eq!(Gas::find("nitrogen").unwrap().name, "nitrogen");
        assert_eq!(Gas::find("N2").unwrap().name, "nitrogen");
        assert_eq!(Gas::find("CO2").unwrap().name, "carbon-dioxide");
        assert_eq!(Gas::find("Carbon-Dioxide").unwrap().name, "carbon-dioxide");
        assert!(Gas::find("steam").is_none());
    }

    #[test]
    fn carbon_dioxide_liquefies_above_57_bar_at_20_c() {
        // source: Span & Wagner (1996) CO2 vapour pressure at 293.15 K is 5.729 MPa (CoolProp
        // 8.0.0 gives the same, tests/data/saturation_pressure.csv); Ambrose–Walton within 1 %.
        let co2 = Gas::find("co2").unwrap();
        let t = ThermodynamicTemperature::new::<kelvin>(293.15);
        let ps = co2.saturation_pressure(t).unwrap().get::<pascal>();
        assert!((ps - 5.729e6).abs() / 5.729e6 < 0.01, "{ps}");
        assert!(co2
            .check_gas_phase(Pressure::new::<pascal>(60e5), t)
            .is_err());
        assert!(co2
            .check_gas_phase(Pressure::new::<pascal>(50e5), t)
            .is_ok());
    }

    #[test]
    fn saturation_temperature_inverts_saturation_pressure() {
        let n2 = Gas::find("nitrogen").unwrap();
        let t = n2
            .saturation_temperature(Pressure::new::<pascal>(101_325.0))
            .unwrap();
        // source: normal boiling point of nitrogen 77.355 K (Span et al. 2000); the
        // correlation is good to about 0.5 K here.
        assert!((t.get::<kelvin>() - 77.355).abs() < 0.5, "{:?}", t);
    }
}
