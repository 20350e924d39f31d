//! The real-gas model: each gas's reference multiparameter Helmholtz-energy equation of
//! state, evaluated by the project itself ([`Equation`]: its `helmholtz` module), with the
//! two-phase region handled by the Maxwell criterion (`saturation`) and states from any pair
//! of variables (`flash`).

mod flash;
mod helmholtz;
mod nozzle;
mod props;
mod saturation;
mod sublimation;

pub use flash::{Equilibrium, FlashError};
pub use helmholtz::{equation, equations, Derivatives, Equation, Isotherm, Isothermal};
pub use props::Props;
pub use saturation::Saturation;
pub use sublimation::Sublimation;

use uom::si::f64::{
    AvailableEnergy, MassDensity, Pressure, SpecificHeatCapacity, ThermodynamicTemperature,
};
use uom::si::{
    available_energy::joule_per_kilogram, mass_density::kilogram_per_cubic_meter, pressure::pascal,
    specific_heat_capacity::joule_per_kilogram_kelvin, thermodynamic_temperature::kelvin,
};

use super::{Gas, GasError, GasModel, ModelKind, NozzleFlow, State};
use crate::caution::{Caution, Level};

/// A gas described by its reference equation of state.
#[derive(Debug, Clone)]
pub struct RealGas {
    gas: &'static Gas,
    eq: &'static Equation,
    /// The last sonic throat's density as a fraction of its stagnation density: where the
    /// next throat search starts (a vent asks for neighbouring states in turn). The speed
    /// depends on it, and the flux's last digits (well below the integration's tolerance).
    throat_ratio: std::cell::Cell<Option<f64>>,
    /// The slope of the sonic condition over that ratio at the last throat, for a first
    /// Newton step from the next start.
    throat_slope: std::cell::Cell<Option<f64>>,
    /// The last two-phase throat's ln(p/p₀), where the next one's search starts.
    hem_throat: std::cell::Cell<Option<f64>>,
    /// The last two-phase throat's T − T₀, from a two-phase stagnation state.
    hem_throat_t: std::cell::Cell<Option<f64>>,
    /// Whether the last homogeneous-equilibrium throat was pinned at the dew point, where
    /// the next is tried first.
    hem_pinned: std::cell::Cell<bool>,
    /// The last isentrope's dew point (its saturation state), by its entropy.
    dew: std::cell::Cell<Option<(f64, Option<Saturation>)>>,
    /// The last state's equilibrium, by its (ρ, T): a time step asks for h, cp and the
    /// nozzle flux of one state in turn.
    last: std::cell::Cell<Option<Equilibrium>>,
}

impl RealGas {
    /// The real-gas model of `gas` (every gas in the catalogue has an equation).
    pub fn new(gas: &'static Gas) -> RealGas {
        let eq =
            equation(gas.name).unwrap_or_else(|| panic!("no equation of state for {}", gas.name));
        RealGas {
            gas,
            eq,
            throat_ratio: std::cell::Cell::new(None),
            throat_slope: std::cell::Cell::new(None),
            hem_throat: std::cell::Cell::new(None),
            hem_throat_t: std::cell::Cell::new(None),
            hem_pinned: std::cell::Cell::new(false),
            dew: std::cell::Cell::new(None),
            last: std::cell::Cell::new(None),
        }
    }

    /// The equation of state behind the model.
    pub fn equation(&self) -> &'static Equation {
        self.eq
    }

    fn error(&self, e: FlashError, what: &'static str, value: String) -> GasError {
        let f = &self.eq.fluid;
        match e {
            FlashError::BelowTriplePoint => GasError::Freezes {
                gas: self.gas.name,
                what: value,
            },
            FlashError::OutOfRange => GasError::OutOfRange {
                what,
                value,
                accepted: format!(
                    "states within the range of {}'s equation of state: {:.2} K to {:.0} K and up to {} bar(a)",
                    self.gas.name,
                    f.t_triple,
                    f.t_max,
                    crate::units::fmt_sig(f.p_max / 1e5, 4)
                ),
            },
            FlashError::NoConvergence => GasError::OutOfRange {
                what,
                value,
                accepted: "a state the equation-of-state solver can reach (it did not converge here; please report this case)".to_string(),
            },
        }
    }

    fn state(&self, e: Equilibrium) -> State {
        State {
            pressure: Pressure::new::<pascal>(e.p),
            temperature: ThermodynamicTemperature::new::<kelvin>(e.t),
            density: MassDensity::new::<kilogram_per_cubic_meter>(e.rho),
            quality: e.quality,
        }
    }

    /// The equilibrium state behind a `State` this model made.
    fn equilibrium(&self, st: &State) -> Equilibrium {
        let (rho, t) = (
            st.density.get::<kilogram_per_cubic_meter>(),
            st.temperature.get::<kelvin>(),
        );
        if let Some(e) = self.last.get().filter(|e| e.rho == rho && e.t == t) {
            return e;
        }
        let e = self.eq.at_rho_t(rho, t).unwrap_or(Equilibrium {
            rho,
            t,
            p: f64::NAN,
            u: f64::NAN,
            h: f64::NAN,
            s: f64::NAN,
            quality: None,
            single: None,
        });
        self.last.set(Some(e));
        e
    }

    /// The state at density and internal energy, the temperature search started at `guess`.
    fn rho_u(&self, rho: MassDensity, u: AvailableEnergy, guess: f64) -> Result<State, GasError> {
        let (r, uv) = (
            rho.get::<kilogram_per_cubic_meter>(),
            u.get::<joule_per_kilogram>(),
        );
        self.eq
            .at_rho(r, uv, guess, |e| e.u, |p| p.cv)
            .map(|e| self.state(e))
            .map_err(|e| {
                self.error(
                    e,
                    "state",
                    format!(
                        "the gas at {} kg/m3 and u = {} kJ/kg",
                        crate::units::fmt_sig(r, 4),
                        crate::units::fmt_sig(uv / 1e3, 5)
                    ),
                )
            })
    }

    /// The state on the isentrope `s` at density `rho`.
    fn on_isentrope(&self, rho: f64, s: f64, guess: f64) -> Result<Equilibrium, FlashError> {
        self.eq.at_rho(rho, s, guess, |e| e.s, |p| p.cv / p.t)
    }
}

impl GasModel for RealGas {
    fn gas(&self) -> &'static Gas {
        self.gas
    }

    fn kind(&self) -> ModelKind {
        ModelKind::Real
    }

    fn describe(&self) -> String {
        format!(
            "real gas, the reference multiparameter equation of state ({}), R = {} J/(mol·K) as the equation gives it",
            self.gas.eos, self.eq.fluid.gas_constant
        )
    }

    fn check_gas_phase(&self, p: Pressure, t: ThermodynamicTemperature) -> Result<(), GasError> {
        let tk = t.get::<kelvin>();
        let f = &self.eq.fluid;
        let gas_below_triple = self
            .eq
            .sublimation
            .is_some_and(|s| s.gas_at(p.get::<pascal>(), tk));
        if tk < f.t_triple && !gas_below_triple {
            return Err(GasError::BelowTriplePoint {
                gas: self.gas.name,
                temperature_k: tk,
                min_k: f.t_triple,
            });
        }
        if tk < f.t_critical {
            if let Some(sat) = self.eq.saturation_t(tk) {
                if p.get::<pascal>() > sat.p {
                    return Err(GasError::Liquefied {
                        gas: self.gas.name,
                        pressure_pa: p.get::<pascal>(),
                        temperature_k: tk,
                        saturation_pa: sat.p,
                    });
                }
            }
        }
        Ok(())
    }

    fn saturation_temperature(&self, p: Pressure) -> Option<ThermodynamicTemperature> {
        self.eq
            .saturation_p(p.get::<pascal>())
            .map(|s| ThermodynamicTemperature::new::<kelvin>(s.t))
    }

    fn max_pressure(&self) -> Option<Pressure> {
        Some(Pressure::new::<pascal>(self.eq.fluid.p_max))
    }

    fn state_pt(&self, p: Pressure, t: ThermodynamicTemperature) -> Result<State, GasError> {
        self.check_gas_phase(p, t)?;
        let (pp, tk) = (p.get::<pascal>(), t.get::<kelvin>());
        let value = || format!("{} bar(a) at {tk:.2} K", crate::units::fmt_sig(pp / 1e5, 6));
        let props = self
            .eq
            .at_pt(pp, tk)
            .map_err(|e| self.error(e, "state", value()))?;
        Ok(State {
            pressure: p,
            temperature: t,
            density: MassDensity::new::<kilogram_per_cubic_meter>(props.rho),
            quality: None,
        })
    }

    fn state_rho_t(
        &self,
        rho: MassDensity,
        t: ThermodynamicTemperature,
    ) -> Result<State, GasError> {
        let (r, tk) = (rho.get::<kilogram_per_cubic_meter>(), t.get::<kelvin>());
        self.eq.at_rho_t(r, tk).map(|e| self.state(e)).map_err(|e| {
            self.error(
                e,
                "state",
                format!("{} kg/m3 at {tk:.2} K", crate::units::fmt_sig(r, 4)),
            )
        })
    }

    fn state_rho_s(&self, rho: MassDensity, s: SpecificHeatCapacity) -> Result<State, GasError> {
        let (r, sv) = (
            rho.get::<kilogram_per_cubic_meter>(),
            s.get::<joule_per_kilogram_kelvin>(),
        );
        self.on_isentrope(r, sv, self.eq.fluid.t_critical.max(250.0))
            .map(|e| self.state(e))
            .map_err(|e| {
                self.error(
                    e,
                    "state",
                    format!(
                        "the isentropic change to {} kg/m3",
                        crate::units::fmt_sig(r, 4)
                    ),
                )
            })
    }

    fn state_p_s(&self, p: Pressure, s: SpecificHeatCapacity) -> Result<State, GasError> {
        let (pp, sv) = (p.get::<pascal>(), s.get::<joule_per_kilogram_kelvin>());
        self.eq
            .at_p(pp, sv, |e| e.s, |p| p.cp / p.t)
            .map(|e| self.state(e))
            .map_err(|e| {
                self.error(
                    e,
                    "state",
                    format!(
                        "the isentropic expansion to {} bar(a)",
                        crate::units::fmt_sig(pp / 1e5, 4)
                    ),
                )
            })
    }

    fn state_rho_p(&self, rho: MassDensity, p: Pressure) -> Result<State, GasError> {
        let (r, pp) = (rho.get::<kilogram_per_cubic_meter>(), p.get::<pascal>());
        let guess = pp / (r * self.eq.r_specific());
        self.eq
            .at_rho(r, pp, guess, |e| e.p, |p| p.dp_dt)
            .map(|e| self.state(e))
            .map_err(|e| {
                self.error(
                    e,
                    "state",
                    format!(
                        "cooling at {} kg/m3 to {} bar(a)",
                        crate::units::fmt_sig(r, 4),
                        crate::units::fmt_sig(pp / 1e5, 4)
                    ),
                )
            })
    }

    fn state_rho_u(&self, rho: MassDensity, u: AvailableEnergy) -> Result<State, GasError> {
        self.rho_u(rho, u, self.eq.fluid.t_critical.max(250.0))
    }

    fn state_rho_u_near(
        &self,
        rho: MassDensity,
        u: AvailableEnergy,
        near: ThermodynamicTemperature,
    ) -> Result<State, GasError> {
        self.rho_u(rho, u, near.get::<kelvin>())
            .or_else(|_| self.state_rho_u(rho, u))
    }

    fn pressure_partials(&self, st: &State) -> Option<(f64, f64)> {
        // One phase: from (∂p/∂ρ)_T, (∂p/∂T)_ρ and cv, with (∂u/∂ρ)_T = (p − T·(∂p/∂T)_ρ)/ρ².
        // Two-phase: by differences along the saturation states.
        let Some(p) = self.equilibrium(st).single else {
            return super::pressure_partials_by_differences(self, st);
        };
        let du_drho = (p.p - p.t * p.dp_dt) / (p.rho * p.rho);
        Some((p.dp_drho - p.dp_dt * du_drho / p.cv, p.dp_dt / p.cv))
    }

    fn isobaric_heat_capacity(&self, st: &State) -> Option<SpecificHeatCapacity> {
        match self.equilibrium(st).single {
            Some(p) => Some(SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(p.cp)),
            None => super::heat_capacity_by_differences(self, st),
        }
    }

    fn internal_energy(&self, st: &State) -> AvailableEnergy {
        AvailableEnergy::new::<joule_per_kilogram>(self.equilibrium(st).u)
    }

    fn entropy(&self, st: &State) -> SpecificHeatCapacity {
        SpecificHeatCapacity::new::<joule_per_kilogram_kelvin>(self.equilibrium(st).s)
    }

    fn enthalpy(&self, st: &State) -> AvailableEnergy {
        AvailableEnergy::new::<joule_per_kilogram>(self.equilibrium(st).h)
    }

    fn nozzle(&self, stagnation: &State, back: Pressure) -> NozzleFlow {
        self.nozzle_flow(stagnation, back)
    }

    fn limitations(&self, st: &State) -> Vec<Caution> {
        let f = &self.eq.fluid;
        let tr = st.temperature.get::<kelvin>() / f.t_critical;
        let pr = st.pressure.get::<pascal>() / f.p_critical;
        let mut out = Vec::new();
        if (tr - 1.0).abs() < 0.05 && (pr - 1.0).abs() < 0.3 {
            out.push(Caution::new(
                Level::Caution,
                format!("{} is near its critical point here: its properties change steeply, so small errors in the pressure or temperature given make large differences in the results.", self.gas.name),
            ));
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::GASES;

    #[test]
    fn the_ancillary_densities_hold_well_inside_the_one_phase_margin() {
        // A density outside the ancillaries' saturated densities by the margin is taken as
        // one phase without a saturation solve: they must agree with the equation's own
        // Maxwell solution well within it, up to the solver's highest temperature (measured:
        // within 6.3 % for the pure gases, helium near its critical point the worst; air's
        // vapour curve, its dew line, lies up to 41 % below its Maxwell vapour).
        for eq in equations() {
            let (f, m) = (&eq.fluid, eq.fluid.molar_mass);
            for i in 0..=200 {
                let t = f.t_triple + (eq.t_sat_max - f.t_triple) * i as f64 / 200.0;
                let sat = eq.saturation_t(t).unwrap();
                let liquid = f.ancillary.rho_liquid.at(t) * m / sat.liquid.rho - 1.0;
                let vapour = f.ancillary.rho_vapour.at(t) * m / sat.vapour.rho - 1.0;
                let within = 0.75 * eq.one_phase_margin();
                assert!(
                    liquid.abs() < within && vapour.abs() < within,
                    "{} at {t} K: liquid {liquid}, vapour {vapour}",
                    f.gas
                );
            }
        }
    }

    #[test]
    fn every_catalogue_gas_has_its_equation_with_matching_constants() {
        // The catalogue's constants and the equations' come from the same papers (via
        // CoolProp 8.0.0): molar mass within 5e-5, critical temperature within 1e-3.
        for gas in GASES {
            let eq = equation(gas.name).unwrap_or_else(|| panic!("{} has no equation", gas.name));
            let f = &eq.fluid;
            assert!(
                (f.molar_mass / gas.molar_mass_kg_per_mol - 1.0).abs() < 5e-5,
                "{}",
                gas.name
            );
            assert!(
                (f.t_critical / gas.critical_temperature_k - 1.0).abs() < 1e-3,
                "{}",
                gas.name
            );
            assert!(
                eq.p_triple.is_finite() && eq.p_sat_max.is_finite(),
                "{}",
                gas.name
            );
        }
    }

    #[test]
    fn nitrogen_from_200_bar_ends_two_phase_at_its_boiling_point() {
        // source: CoolProp 8.0.0, PropsSI('T'/'Q', 'P', 101325, 'S', s(200 bar, 300 K),
        // 'Nitrogen') = 77.35499 K, quality 0.904460 (tests/reference/energy.csv holds more).
        let m = RealGas::new(Gas::find("nitrogen").unwrap());
        let st = m
            .state_pt(
                Pressure::new::<pascal>(200e5),
                ThermodynamicTemperature::new::<kelvin>(300.0),
            )
            .unwrap();
        let end = m
            .state_p_s(Pressure::new::<pascal>(101_325.0), m.entropy(&st))
            .unwrap();
        assert!((end.temperature.get::<kelvin>() - 77.35499).abs() < 1e-4);
        assert!((end.quality.unwrap() - 0.904460).abs() < 1e-6);
        // The mixture's u is between the saturated liquid's and vapour's.
        let u = m.internal_energy(&end).get::<joule_per_kilogram>();
        let sat = m.equation().saturation_p(101_325.0).unwrap();
        assert!(u > sat.liquid.u && u < sat.vapour.u);
    }
}
