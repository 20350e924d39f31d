//! The ideal gas with constant heat capacities (taken at 300 K).

use uom::si::f64::{
    AvailableEnergy, MassDensity, MassFlux, Pressure, SpecificHeatCapacity,
    ThermodynamicTemperature,
};
use uom::si::{
    available_energy::joule_per_kilogram, mass_density::kilogram_per_cubic_meter,
    mass_flux::kilogram_per_square_meter_second, pressure::pascal,
    specific_heat_capacity::joule_per_kilogram_kelvin, thermodynamic_temperature::kelvin,
};

use super::{Gas, GasError, GasModel, ModelKind, NozzleFlow, State, Throat};
use crate::caution::{Caution, Level};

/// Entropy reference state: 298.15 K and 101.325 kPa, where s = 0.
const REFERENCE_TEMPERATURE_K: f64 = 298.15;
const REFERENCE_PRESSURE_PA: f64 = 101_325.0;

/// Above this pressure the ideal gas is off by more than a few percent for most gases.
pub const IDEAL_GAS_PRESSURE_LIMIT_PA: f64 = 100.0e5;
/// A compressibility further than this from one raises the ideal-gas WARNING.
const COMPRESSIBILITY_TOLERANCE: f64 = 0.03;

/// p = ρ·R·T with cp, cv constant: u = cv·T, h = cp·T.
#[derive(Debug, Clone, Copy)]
pub struct IdealGas {
    gas: &'static Gas,
    r: f64,
    cp: f64,
    cv: f64,
}

impl IdealGas {
    /// The ideal-gas model of `gas` with its 300 K heat capacity.
    pub fn new(gas: &'static Gas) -> IdealGas {
        let r = gas.specific_gas_constant();
        let cp = gas.cp_300k_j_per_kg_k;
        IdealGas {
            gas,
            r,
            cp,
            cv: cp - r,
        }
    }

    /// The same gas with γ forced to `gamma` (cp from R), as worked examples assume.
    #[cfg(test)]
    pub(crate) fn with_gamma(gas: &'static Gas, gamma: f64) -> IdealGas {
        let r = gas.specific_gas_constant();
        IdealGas {
            gas,
            r,
            cp: gamma * r / (gamma - 1.0),
            cv: r / (gamma - 1.0),
        }
    }

    /// Ratio of specific heats γ = cp/cv.
    pub fn gamma(&self) -> f64 {
        self.cp / self.cv
    }

    fn state(&self, p: f64, t: f64, rho: f64) -> Result<State, GasError> {
        for (what, v, unit) in [
            ("pressure", p, "Pa"),
            ("temperature", t, "K"),
            ("density", rho, "kg/m3"),
        ] {
            if !(v.is_finite() && v > 0.0) {
                return Err(GasError::OutOfRange {
                    what,
                    value: format!("{v} {unit}"),
                    accepted: "a finite value above zero".to_string(),
                });
            }
        }
        Ok(State {
            pressure: Pressure::new::<pascal>(p),
            temperature: ThermodynamicTemperature::new::<kelvin>(t),
            density: MassDensity::new::<kilogram_per_cubic_meter>(rho),
            quality: None,
        })
    }

    fn s(&self, p: f64, t: f64) -> f64 {
        self.cp * (t / REFERENCE_TEMPERATURE_K).ln() - self.r * (p / REFERENCE_PRESSURE_PA).ln()
    }
}

fn si(st: &State) -> (f64, f64, f64) {
    (
        st.pressure.get::<pascal>(),
        st.temperature.get::<kelvin>(),
        st.density.get::<kilogram_per_cubic_meter>(),
    )
}

impl GasModel for IdealGas {
    fn gas(&self) -> &'static Gas {
        self.gas
    }

    fn kind(&self) -> ModelKind {
        ModelKind::Ideal
    }

    fn describe(&self) -> String {
        format!(
            "ideal gas with constant heat capacities at 300 K: R = {:.2} J/(kg·K), cp = {:.1} J/(kg·K), γ = {:.4}",
            self.r,
            self.cp,
            self.gamma()
        )
    }

    fn state_pt(&self, p: Pressure, t: ThermodynamicTemperature) -> Result<State, GasError> {
        let (p, t) = (p.get::<pascal>(), t.get::<kelvin>());
        self.state(p, t, p / (self.r * t))
    }

    fn state_rho_t(
        &self,
        rho: MassDensity,
        t: ThermodynamicTemperature,
    ) -> Result<State, GasError> {
        let (rho, t) = (rho.get::<kilogram_per_cubic_meter>(), t.get::<kelvin>());
        self.state(rho * self.r * t, t, rho)
    }

    fn state_rho_s(&self, rho: MassDensity, s: SpecificHeatCapacity) -> Result<State, GasError> {
        // s = cv·ln T − R·ln ρ + const, solved for T at the reference state's constant.
        let rho = rho.get::<kilogram_per_cubic_meter>();
        let s = s.get::<joule_per_kilogram_kelvin>();
        let rho_ref = REFERENCE_PRESSURE_PA / (self.r * REFERENCE_TEMPERATURE_K);
        let t = REFERENCE_TEMPERATURE_K * ((s + self.r * (rho / rho_ref).ln()) / self.cv).exp();
        self.state(rho * self.r * t, t, rho)
    }

    fn state_p_s(&self, p: Pressure, s: SpecificHeatCapacity) -> Result<State, GasError> {
        let p = p.get::<pascal>();
        let s = s.get::<joule_per_kilogram_kelvin>();
        let t = REFERENCE_TEMPERATURE_K
            * ((s + self.r * (p / REFERENCE_PRESSURE_PA).ln()) / self.cp).exp();
        self.state(p, t, p / (self.r * t))
    }

    fn state_rho_p(&self, rho: MassDensity, p: Pressure) -> Result<State, GasError> {
        let (rho, p) = (rho.get::<kilogram_per_cubic_meter>(), p.get::<pascal>());
        self.state(p, p / (rho * self.r), rho)
    }

    fn state_rho_u(&self, rho: MassDensity, u: AvailableEnergy) -> Result<State, GasError> {
        let rho = rho.get::<kilogram_per_cubic_meter>();
        let t = u.get::<joule_per_kilogram>() / self.cv;
        self.state(rho * self.r * t, t, rho)
    }

    fn internal_energy(&self, st: &State) -> AvailableEnergy {
        AvailableEnergy::new::<joule_per_kilogram>(self.cv * st.temperature.get::<kelvin>())
    }

    fn entropy(&self, st: &State) -> SpecificHeatCapacity {
        let (p, t, _) = si(st);
        SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(self.s(p, t))
    }

    fn nozzle(&self, stagnation: &State, back: Pressure) -> NozzleFlow {
        // Isentropic ideal-gas nozzle (e.g. Bar-Meir, Fundamentals of Compressible Fluid
        // Mechanics, ch. 11; API 520 Part I, eqs. for critical and subcritical gas flow).
        let (p0, t0, _) = si(stagnation);
        let g = self.gamma();
        let critical_ratio = (2.0 / (g + 1.0)).powf(g / (g - 1.0));
        let pressure_ratio = back.get::<pascal>() / p0;
        let (flux, choked) = if pressure_ratio <= critical_ratio {
            let psi = g.sqrt() * (2.0 / (g + 1.0)).powf((g + 1.0) / (2.0 * (g - 1.0)));
            (p0 * psi / (self.r * t0).sqrt(), true)
        } else if pressure_ratio < 1.0 {
            let bracket = pressure_ratio.powf(2.0 / g) - pressure_ratio.powf((g + 1.0) / g);
            let flux = p0 * (2.0 * g / ((g - 1.0) * self.r * t0) * bracket.max(0.0)).sqrt();
            (flux, false)
        } else {
            (0.0, false)
        };
        NozzleFlow {
            mass_flux: MassFlux::new::<kilogram_per_square_meter_second>(flux),
            choked,
            throat: Throat::Gas,
        }
    }

    fn limitations(&self, st: &State) -> Vec<Caution> {
        let p = st.pressure.get::<pascal>();
        let mut out = Vec::new();
        if p > IDEAL_GAS_PRESSURE_LIMIT_PA {
            out.push(crate::caution!(
                Level::Warning,
                "Ideal gas used at ",
                crate::units::Value::Pressure(st.pressure),
                ", above about 100 bar: real-gas effects there reach tens of percent (nitrogen at 200 bar: isentropic energy about 25 % high; hydrogen at 700 bar: mass about 47 % high). Treat these results as estimates: the default real-gas model (--model real) covers these pressures.",
            ));
        } else if let Some(z) = self.gas.virial_compressibility(st.pressure, st.temperature) {
            if (z - 1.0).abs() > COMPRESSIBILITY_TOLERANCE {
                out.push(Caution::new(
                    Level::Warning,
                    format!(
                        "{} at this pressure and temperature has a compressibility factor of about Z = {:.2} (second-virial estimate): the ideal gas is off by roughly {:.0} % in mass and energy here.",
                        self.gas.name,
                        z,
                        (z - 1.0).abs() * 100.0
                    ),
                ));
            }
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn air() -> IdealGas {
        IdealGas::new(Gas::find("air").unwrap())
    }

    #[test]
    fn state_constructors_agree() {
        let m = air();
        let a = m
            .state_pt(
                Pressure::new::<pascal>(11e5),
                ThermodynamicTemperature::new::<kelvin>(293.15),
            )
            .unwrap();
        let s = m.entropy(&a);
        let b = m.state_rho_s(a.density, s).unwrap();
        let c = m.state_p_s(a.pressure, s).unwrap();
        let d = m.state_rho_p(a.density, a.pressure).unwrap();
        for x in [b, c, d] {
            assert_relative_eq!(x.temperature.get::<kelvin>(), 293.15, max_relative = 1e-12);
        }
    }

    #[test]
    fn isentrope_follows_the_power_law() {
        // T2/T1 = (p2/p1)^((γ−1)/γ) for the ideal gas (any thermodynamics text).
        let m = air();
        let a = m
            .state_pt(
                Pressure::new::<pascal>(11e5),
                ThermodynamicTemperature::new::<kelvin>(293.15),
            )
            .unwrap();
        let b = m
            .state_p_s(Pressure::new::<pascal>(1e5), m.entropy(&a))
            .unwrap();
        let g = m.gamma();
        assert_relative_eq!(
            b.temperature.get::<kelvin>(),
            293.15 * (1.0f64 / 11.0).powf((g - 1.0) / g),
            max_relative = 1e-12
        );
    }

    #[test]
    fn choked_mass_flux_coefficient_for_gamma_1_4() {
        // source: reference notes / Bar-Meir ch. 11: Ψ = 0.6847 for γ = 1.4.
        let g: f64 = 1.4;
        let psi = g.sqrt() * (2.0 / (g + 1.0)).powf((g + 1.0) / (2.0 * (g - 1.0)));
        assert_relative_eq!(psi, 0.6847, max_relative = 1e-4);
    }
}
