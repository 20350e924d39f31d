//! Fill and vent as time histories with heat exchanged between the gas, a lumped wall and
//! the surroundings. The adiabatic fill and the isentropic vent are the bounds; these give
//! what the gas and the metal actually reach.
//!
//! States integrated (SI): gas mass m, gas internal energy U, wall temperature T_w, and two
//! running totals for the energy audit — enthalpy carried in or out, and heat to ambient.
//! The gas state comes from the gas model at (ρ = m/V, u = U/m), so any model serves.

use serde::Serialize;
use uom::si::f64::{
    AvailableEnergy, Length, Mass, MassDensity, MassRate, Pressure, ThermodynamicTemperature,
    Time, Volume,
};
use uom::si::{
    available_energy::joule_per_kilogram, length::meter, mass::kilogram,
    mass_density::kilogram_per_cubic_meter, mass_flux::kilogram_per_square_meter_second,
    mass_rate::kilogram_per_second, pressure::pascal, thermodynamic_temperature::kelvin,
    time::second, volume::cubic_meter,
};

use crate::gas::{GasModel, State};
use crate::heat::{self, Film, InnerBasis};
use crate::site::Material;
use crate::solve::ode::{self, Options};
use crate::units::PressureRate;
use crate::InputError;

/// Whether heat passes between the gas and the wall.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum HeatTransfer {
    /// No heat exchanged: the adiabatic fill and the isentropic vent.
    None,
    /// Lumped gas and wall nodes with convection inside and out.
    Lumped,
}

/// The part of the wall that exchanges heat with the gas.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Wall {
    /// Its mass.
    #[serde(rename = "mass_kg")]
    pub mass: Mass,
    /// Its material.
    pub material: Material,
    /// Whether the mass was estimated (no wall mass given).
    pub estimated: bool,
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
    /// Wall temperature.
    #[serde(rename = "wall_temperature_k")]
    pub wall_temperature: ThermodynamicTemperature,
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
    /// The run's duration.
    pub fn duration(&self) -> Time {
        self.samples.last().map_or(Time::new::<second>(0.0), |s| s.time)
    }
}

fn fold(
    samples: &[Sample],
    get: impl Fn(&Sample) -> ThermodynamicTemperature,
    pick: fn(f64, f64) -> f64,
) -> ThermodynamicTemperature {
    let first = samples.first().map_or(0.0, |s| get(s).get::<kelvin>());
    ThermodynamicTemperature::new::<kelvin>(
        samples.iter().map(|s| get(s).get::<kelvin>()).fold(first, pick),
    )
}

/// The fixed numbers of a run, in SI.
struct Setup<'a> {
    model: &'a dyn GasModel,
    volume: f64,
    diameter: f64,
    area: f64,
    wall_capacity: f64,
    ambient: f64,
    exchange: &'a Exchange,
}

impl<'a> Setup<'a> {
    fn new(model: &'a dyn GasModel, volume: Volume, exchange: &'a Exchange) -> Setup<'a> {
        let v = volume.get::<cubic_meter>();
        let (diameter, area) = heat::geometry(v, exchange.aspect);
        Setup {
            model,
            volume: v,
            diameter,
            area,
            wall_capacity: exchange.wall.mass.get::<kilogram>()
                * exchange.wall.material.specific_heat(),
            ambient: exchange.ambient_temperature.get::<kelvin>(),
            exchange,
        }
    }

    fn gas(&self, m: f64, u_total: f64) -> Option<State> {
        self.model
            .state_rho_u(
                MassDensity::new::<kilogram_per_cubic_meter>(m / self.volume),
                AvailableEnergy::new::<joule_per_kilogram>(u_total / m),
            )
            .ok()
    }

    fn film(&self, st: &State) -> Film {
        let (viscosity, conductivity) = self.model.gas().transport(st.temperature);
        // cp from the model by a small isobaric step: h(T+dT) − h(T).
        let t = st.temperature.get::<kelvin>();
        let cp = self
            .model
            .state_pt(st.pressure, ThermodynamicTemperature::new::<kelvin>(t * 1.0005))
            .ok()
            .map_or(1000.0, |up| {
                (self.model.enthalpy(&up) - self.model.enthalpy(st)).get::<joule_per_kilogram>()
                    / (t * 0.0005)
            });
        Film {
            density: st.density.get::<kilogram_per_cubic_meter>(),
            viscosity,
            conductivity,
            cp,
            temperature: t,
        }
    }

    /// (inner coefficient W/(m²·K), outer coefficient, basis) for the gas at `st`.
    fn coefficients(&self, st: &State, wall_t: f64, fill_flow: Option<(f64, f64)>) -> (f64, f64, InnerBasis) {
        if self.exchange.mode == HeatTransfer::None {
            return (0.0, 0.0, InnerBasis::Given);
        }
        let h_out = heat::OUTSIDE_COEFFICIENT;
        if let Some(h) = self.exchange.inner_coefficient {
            return (h, h_out, InnerBasis::Given);
        }
        let dt = st.temperature.get::<kelvin>() - wall_t;
        match fill_flow {
            Some((flow, inlet)) if inlet > 0.0 => (
                heat::jet(&self.film(st), flow, inlet, dt, self.diameter),
                h_out,
                InnerBasis::JetCorrelation,
            ),
            Some(_) => (heat::FILL_CONSTANT, h_out, InnerBasis::FillConstant),
            None => (
                heat::natural(&self.film(st), dt, self.diameter),
                h_out,
                InnerBasis::NaturalConvection,
            ),
        }
    }

    fn sample(&self, t: f64, y: &[f64]) -> Option<Sample> {
        let st = self.gas(y[0], y[1])?;
        Some(Sample {
            time: Time::new::<second>(t),
            pressure: st.pressure,
            gas_temperature: st.temperature,
            wall_temperature: ThermodynamicTemperature::new::<kelvin>(y[2]),
        })
    }

    fn finish(&self, run: ode::Trajectory, basis: InnerBasis) -> Result<Run, InputError> {
        let samples = run
            .t
            .iter()
            .zip(&run.y)
            .map(|(&t, y)| self.sample(t, y))
            .collect::<Option<Vec<_>>>()
            .ok_or_else(|| model_failure("the transient left the gas model's range"))?;
        let (first, last) = (&run.y[0], &run.y[run.y.len() - 1]);
        let end = self
            .gas(last[0], last[1])
            .ok_or_else(|| model_failure("the final state is outside the gas model's range"))?;
        // Energy audit: ΔU_gas + ΔU_wall = enthalpy in (or −out) − heat to ambient.
        let stored = (last[1] - first[1]) + self.wall_capacity * (last[2] - first[2]);
        let moved = last[3] - last[4];
        let scale = last[3].abs().max(last[4].abs()).max(stored.abs()).max(1e-9);
        Ok(Run {
            samples,
            end,
            energy_residual: (stored - moved).abs() / scale,
            basis,
        })
    }
}

fn model_failure(what: &str) -> InputError {
    InputError::new(
        "heat-transfer",
        "lumped",
        format!("{what}; accepted: inputs that keep the gas within the model's range"),
    )
}

fn options(duration: f64) -> Options {
    Options {
        rtol: 1e-9,
        atol: 1e-9,
        max_step: duration / 50.0,
        max_steps: 200_000,
    }
}

/// The fill from `initial` to `to` with enthalpy `h_in` arriving at `rate`, in SI.
#[allow(clippy::too_many_arguments)]
fn fill_run(
    setup: &Setup,
    initial: &State,
    wall_t0: f64,
    h_in: f64,
    to: f64,
    rate: FillRate,
    inlet: f64,
) -> Result<Run, InputError> {
    let m0 = initial.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = setup.model.internal_energy(initial).get::<joule_per_kilogram>() * m0;
    let p0 = initial.pressure.get::<pascal>();
    let mut basis = InnerBasis::FillConstant;
    let flow_at = |y: &[f64], q: f64| -> Option<f64> {
        match rate {
            FillRate::MassFlow(f) => Some(f.get::<kilogram_per_second>()),
            FillRate::Ramp(r) => {
                // The inflow that keeps dp/dt on the ramp: from p(ρ, u),
                // dp/dt = p_ρ·ṁ/V + p_u·(ṁ·(h_in − u) − Q)/m.
                let (m, u) = (y[0], y[1] / y[0]);
                let rho = m / setup.volume;
                let p = |rho: f64, u: f64| {
                    setup
                        .model
                        .state_rho_u(
                            MassDensity::new::<kilogram_per_cubic_meter>(rho),
                            AvailableEnergy::new::<joule_per_kilogram>(u),
                        )
                        .ok()
                        .map(|s| s.pressure.get::<pascal>())
                };
                let (e_rho, e_u) = (rho * 1e-6, u.abs().max(1.0) * 1e-6);
                let p_rho = (p(rho + e_rho, u)? - p(rho - e_rho, u)?) / (2.0 * e_rho);
                let p_u = (p(rho, u + e_u)? - p(rho, u - e_u)?) / (2.0 * e_u);
                let denom = p_rho / setup.volume + p_u * (h_in - u) / m;
                Some((r.per_second.get::<pascal>() + p_u * q / m) / denom)
            }
        }
    };
    let rhs = |_: f64, y: &[f64]| -> Option<Vec<f64>> {
        let st = setup.gas(y[0], y[1])?;
        let tg = st.temperature.get::<kelvin>();
        // On a ramp the inflow depends on the heat to the wall, and the jet's coefficient on
        // the inflow: one fixed-point pass from the no-jet coefficient settles both.
        let (h_guess, _, _) = setup.coefficients(&st, y[2], Some((0.0, inlet)));
        let flow_guess = flow_at(y, h_guess * setup.area * (tg - y[2]))?;
        let (h_inner, h_out, _) = setup.coefficients(&st, y[2], Some((flow_guess, inlet)));
        let q = h_inner * setup.area * (tg - y[2]);
        let flow = flow_at(y, q)?;
        let q_out = h_out * setup.area * (y[2] - setup.ambient);
        let dwall = if setup.wall_capacity > 0.0 {
            (q - q_out) / setup.wall_capacity
        } else {
            0.0
        };
        Some(vec![flow, flow * h_in - q, dwall, flow * h_in, q_out])
    };
    if let Some(st) = setup.gas(m0, u0) {
        basis = setup.coefficients(&st, wall_t0, Some((1.0, inlet))).2;
    }
    let nominal = match rate {
        FillRate::Ramp(r) => (to - p0) / r.per_second.get::<pascal>(),
        FillRate::MassFlow(f) => {
            // Mass to reach `to` at the supply temperature's density, as a time scale.
            let full = setup
                .model
                .state_pt(Pressure::new::<pascal>(to), initial.temperature)
                .map(|s| s.density.get::<kilogram_per_cubic_meter>() * setup.volume)
                .unwrap_or(m0 * to / p0);
            (full - m0).max(0.0) / f.get::<kilogram_per_second>()
        }
    };
    let y0 = [m0, u0, wall_t0, 0.0, 0.0];
    let scale = [m0.max(1e-6), u0.abs().max(1.0), wall_t0, u0.abs().max(1.0), u0.abs().max(1.0)];
    let event = |_: f64, y: &[f64]| {
        setup
            .gas(y[0], y[1])
            .map_or(-1.0, |s| to - s.pressure.get::<pascal>())
    };
    let run = ode::integrate(rhs, (0.0, &y0), 3.0 * nominal.max(1e-3), event, &scale, &options(nominal.max(1e-3)))
        .map_err(|e| model_failure(&e.to_string()))?;
    if !run.stopped_at_event {
        return Err(InputError::new(
            "rate",
            "(given)",
            "the fill does not reach --to within three times its nominal duration; accepted: a rate that fills the cylinder",
        ));
    }
    setup.finish(run, basis)
}

/// A fill with heat exchanged with the wall, and what it means for the cylinder.
#[derive(Debug, Clone, PartialEq)]
pub struct FillTransient {
    /// The run at the planned rate.
    pub run: Run,
    /// Pressure once the gas has cooled to ambient at constant mass.
    pub settled_pressure: Pressure,
    /// The highest pressure-ramp rate that keeps the gas at or below the rated temperature,
    /// if a rating was given.
    pub max_rate: Option<MaxRate>,
    /// The wall used.
    pub wall: Wall,
}

/// The fastest fill that keeps the gas within its rating.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum MaxRate {
    /// This pressure ramp brings the peak gas temperature to the rating.
    Ramp(PressureRate),
    /// Even the adiabatic bound stays within the rating: no rate is too fast.
    Unlimited,
    /// Even a fill over a day exceeds the rating (a supply hotter than the rating).
    NoneSafe,
}

/// The fill of `volume` from `initial` (gas and wall at its temperature) to `to`, the gas
/// arriving with enthalpy `h_in` at `rate`.
#[allow(clippy::too_many_arguments)]
pub fn fill(
    model: &dyn GasModel,
    volume: Volume,
    initial: &State,
    supply: &State,
    to: Pressure,
    rate: FillRate,
    inlet_diameter: Option<Length>,
    rated: Option<ThermodynamicTemperature>,
    exchange: &Exchange,
) -> Result<FillTransient, InputError> {
    let setup = Setup::new(model, volume, exchange);
    let h_in = model.enthalpy(supply).get::<joule_per_kilogram>();
    let inlet = inlet_diameter.map_or(0.0, |d| d.get::<meter>());
    let wall_t0 = initial.temperature.get::<kelvin>();
    let to_pa = to.get::<pascal>();
    let run = fill_run(&setup, initial, wall_t0, h_in, to_pa, rate, inlet)?;
    let settled = model
        .state_rho_t(run.end.density, exchange.ambient_temperature)
        .map_err(|e| model_failure(&e.to_string()))?
        .pressure;
    let max_rate = rated.map(|rated| {
        let excess = |rate_pa_s: f64| {
            let r = FillRate::Ramp(PressureRate {
                per_second: Pressure::new::<pascal>(rate_pa_s),
            });
            fill_run(&setup, initial, wall_t0, h_in, to_pa, r, inlet)
                .map(|run| run.peak_gas().get::<kelvin>() - rated.get::<kelvin>())
                .unwrap_or(f64::NAN)
        };
        // Between a fill over a day and one over a second: the peak rises with the rate.
        let span = to_pa - initial.pressure.get::<pascal>();
        let (slow, fast) = (span / 86_400.0, span);
        if excess(fast) <= 0.0 {
            MaxRate::Unlimited
        } else if excess(slow) > 0.0 {
            MaxRate::NoneSafe
        } else {
            crate::solve::root(|ln_r| excess(ln_r.exp()), slow.ln(), fast.ln(), 1e-7)
                .map_or(MaxRate::NoneSafe, |ln_r| {
                    MaxRate::Ramp(PressureRate {
                        per_second: Pressure::new::<pascal>(ln_r.exp()),
                    })
                })
        }
    });
    Ok(FillTransient {
        run,
        settled_pressure: settled,
        max_rate,
        wall: exchange.wall,
    })
}

/// A vent with heat from the wall.
#[derive(Debug, Clone, PartialEq)]
pub struct VentTransient {
    /// The run to the target.
    pub run: Run,
    /// Time to reach the depressuring check's pressure, if asked and reached.
    pub depressuring_time: Option<Time>,
    /// The wall used.
    pub wall: Wall,
}

/// The vent of `volume` from `start` (wall at its temperature) through an effective area
/// Cd·A to `ambient`, until `down_to`; `check` is the depressuring check's pressure.
#[allow(clippy::too_many_arguments)]
pub fn vent(
    model: &dyn GasModel,
    volume: Volume,
    start: &State,
    effective_area_m2: f64,
    ambient: Pressure,
    down_to: Pressure,
    check: Option<Pressure>,
    exchange: &Exchange,
) -> Result<VentTransient, InputError> {
    let setup = Setup::new(model, volume, exchange);
    let m0 = start.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = model.internal_energy(start).get::<joule_per_kilogram>() * m0;
    let wall_t0 = start.temperature.get::<kelvin>();
    let rhs = |_: f64, y: &[f64]| -> Option<Vec<f64>> {
        let st = setup.gas(y[0], y[1])?;
        let flow = model.nozzle(&st, ambient).mass_flux.get::<kilogram_per_square_meter_second>()
            * effective_area_m2;
        let h = model.enthalpy(&st).get::<joule_per_kilogram>();
        let (h_i, h_o, _) = setup.coefficients(&st, y[2], None);
        let q = h_i * setup.area * (y[2] - st.temperature.get::<kelvin>());
        let q_out = h_o * setup.area * (y[2] - setup.ambient);
        let dwall = if setup.wall_capacity > 0.0 {
            (-q - q_out) / setup.wall_capacity
        } else {
            0.0
        };
        Some(vec![-flow, -flow * h + q, dwall, -flow * h, q_out])
    };
    let basis = setup.coefficients(start, wall_t0, None).2;
    // Time scale: the isothermal choked time constant V/(Cd·A·√(R·T)) times a few.
    let flux0 = model.nozzle(start, ambient).mass_flux.get::<kilogram_per_square_meter_second>();
    let tau = m0 / (flux0 * effective_area_m2).max(1e-30);
    let horizon = 50.0 * tau.max(1e-3);
    let y0 = [m0, u0, wall_t0, 0.0, 0.0];
    let scale = [m0, u0.abs().max(1.0), wall_t0, u0.abs().max(1.0), u0.abs().max(1.0)];
    let setup = &setup;
    let until = |p_end: f64| {
        move |_: f64, y: &[f64]| {
            setup
                .gas(y[0], y[1])
                .map_or(-1.0, |s| s.pressure.get::<pascal>() - p_end)
        }
    };
    let opts = options(tau.max(1e-3));
    let run = ode::integrate(rhs, (0.0, &y0), horizon, until(down_to.get::<pascal>()), &scale, &opts)
        .map_err(|e| model_failure(&e.to_string()))?;
    if !run.stopped_at_event {
        return Err(InputError::new(
            "down-to",
            "(given)",
            "the vent does not reach the target in a reasonable time; accepted: a target above ambient",
        ));
    }
    let depressuring_time = match check {
        Some(p) if p < start.pressure => ode::integrate(rhs, (0.0, &y0), horizon, until(p.get::<pascal>()), &scale, &opts)
            .ok()
            .filter(|r| r.stopped_at_event)
            .and_then(|r| r.t.last().copied())
            .map(Time::new::<second>),
        Some(_) => Some(Time::new::<second>(0.0)),
        None => None,
    };
    Ok(VentTransient {
        run: setup.finish(run, basis)?,
        depressuring_time,
        wall: exchange.wall,
    })
}
