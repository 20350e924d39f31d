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
use crate::caution::{Assessed, Caution, Level};
use crate::gas::{GasModel, State};
use crate::heat::{self, Film, InnerBasis};
use crate::site::Material;
use crate::solve::ode::{self, Options};
use crate::units::PressureRate;
use crate::units::Value;
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

impl HeatTransfer {
    /// The method, in words, for the output.
    pub fn method(self) -> &'static str {
        match self {
            HeatTransfer::None => "first law, no heat to the wall, adaptive integration",
            HeatTransfer::Lumped => "lumped gas and wall, first law, adaptive integration",
        }
    }
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

/// The fixed numbers of a run, in SI.
struct Setup<'a> {
    model: &'a dyn GasModel,
    volume: f64,
    diameter: f64,
    area: f64,
    wall_capacity: f64,
    ambient: f64,
    exchange: &'a Exchange,
    /// Relative tolerance per step of the integration.
    rtol: f64,
    /// The gas temperature last found, where the next state search starts.
    last_temperature: std::cell::Cell<ThermodynamicTemperature>,
    /// The last state found, by its mass and internal energy.
    last_state: std::cell::Cell<Option<((f64, f64), State)>>,
}

/// The integration's relative tolerance per step: results change by less than 1e-6 when it
/// is tightened a hundredfold (see the tests).
const RTOL: f64 = 1e-7;

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
            rtol: RTOL,
            last_temperature: std::cell::Cell::new(exchange.ambient_temperature),
            last_state: std::cell::Cell::new(None),
        }
    }

    /// The gas state from its mass and internal energy, the search started from the last
    /// state found (the integrator asks for neighbouring states in turn).
    fn gas(&self, m: f64, u_total: f64) -> Option<State> {
        // The step's end state is asked for again by the stopping test: answer from memory.
        if let Some((key, st)) = self.last_state.get() {
            if key == (m, u_total) {
                return Some(st);
            }
        }
        let st = self
            .model
            .state_rho_u_near(
                MassDensity::new::<kilogram_per_cubic_meter>(m / self.volume),
                AvailableEnergy::new::<joule_per_kilogram>(u_total / m),
                self.last_temperature.get(),
            )
            .ok()?;
        self.last_temperature.set(st.temperature);
        self.last_state.set(Some(((m, u_total), st)));
        Some(st)
    }

    fn film(&self, st: &State) -> Film {
        let (viscosity, conductivity) = self.model.gas().transport(st.temperature);
        let t = st.temperature.get::<kelvin>();
        let cp = self.model.isobaric_heat_capacity(st).map_or(1000.0, |c| {
            c.get::<uom::si::specific_heat_capacity::joule_per_kilogram_kelvin>()
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
    fn coefficients(
        &self,
        st: &State,
        wall_t: f64,
        fill_flow: Option<(f64, f64)>,
    ) -> (f64, f64, InnerBasis) {
        if self.exchange.mode == HeatTransfer::None {
            return (0.0, 0.0, InnerBasis::None);
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

fn options(duration: f64, rtol: f64) -> Options {
    Options {
        rtol,
        atol: rtol,
        max_step: duration / 10.0,
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
    let u0 = setup
        .model
        .internal_energy(initial)
        .get::<joule_per_kilogram>()
        * m0;
    let p0 = initial.pressure.get::<pascal>();
    let mut basis = InnerBasis::FillConstant;
    let flow_at = |y: &[f64], q: f64| -> Option<f64> {
        match rate {
            FillRate::MassFlow(f) => Some(f.get::<kilogram_per_second>()),
            FillRate::Ramp(r) => {
                // The inflow that keeps dp/dt on the ramp: from p(ρ, u),
                // dp/dt = p_ρ·ṁ/V + p_u·(ṁ·(h_in − u) − Q)/m.
                let (m, u) = (y[0], y[1] / y[0]);
                let (p_rho, p_u) = setup.model.pressure_partials(&setup.gas(m, y[1])?)?;
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
    let scale = [
        m0.max(1e-6),
        u0.abs().max(1.0),
        wall_t0,
        u0.abs().max(1.0),
        u0.abs().max(1.0),
    ];
    let event = |_: f64, y: &[f64]| {
        setup
            .gas(y[0], y[1])
            .map_or(-1.0, |s| to - s.pressure.get::<pascal>())
    };
    let run = ode::integrate(
        rhs,
        (0.0, &y0),
        3.0 * nominal.max(1e-3),
        event,
        &scale,
        &options(nominal.max(1e-3), setup.rtol),
    )
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
    /// Stop pressure at the planned rate that settles at the target, if one is found.
    pub fill_to_pressure: Option<Pressure>,
    /// The highest pressure-ramp rate that keeps the gas at or below the rated temperature,
    /// if a rating was given.
    pub max_rate: Option<MaxRate>,
    /// The wall used.
    pub wall: Wall,
}

/// A fill to run: the cylinder's volume and starting state (the wall starts at the gas's
/// temperature), the supply gas, the stop pressure and the drive.
#[derive(Debug, Clone, Copy)]
pub struct FillCase<'a> {
    /// Internal volume.
    pub volume: Volume,
    /// The gas before the fill.
    pub initial: &'a State,
    /// The gas arriving.
    pub supply: &'a State,
    /// Absolute pressure at which the fill stops.
    pub to: Pressure,
    /// How the fill is driven.
    pub rate: FillRate,
    /// Inlet bore, for the jet correlation.
    pub inlet_diameter: Option<Length>,
}

/// One fill run: the time series alone, without the searches of [`fill`].
pub fn fill_once(
    model: &dyn GasModel,
    case: &FillCase,
    exchange: &Exchange,
) -> Result<Run, InputError> {
    let setup = Setup::new(model, case.volume, exchange);
    fill_run(
        &setup,
        case.initial,
        case.initial.temperature.get::<kelvin>(),
        model.enthalpy(case.supply).get::<joule_per_kilogram>(),
        case.to.get::<pascal>(),
        case.rate,
        case.inlet_diameter.map_or(0.0, |d| d.get::<meter>()),
    )
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
    /// Even the fastest fill the inlet can pass (this mean ramp, inlet choked from the
    /// supply throughout) stays within the rating.
    InletLimited(PressureRate),
}

/// The mean pressure ramp of the fastest fill an inlet of bore `d` can pass, Pa/s: the
/// choked flow from the supply (Cd = 1) throughout, an upper bound, since the flow falls once
/// the cylinder passes the critical pressure ratio. It keeps the search for the highest safe
/// rate among fills the connection can deliver, where the jet correlation is meaningful.
fn fastest_ramp(model: &dyn GasModel, case: &FillCase, d: Length) -> Option<f64> {
    let area = std::f64::consts::PI / 4.0 * d.get::<meter>().powi(2);
    let flow = model
        .nozzle(case.supply, case.initial.pressure)
        .mass_flux
        .get::<kilogram_per_square_meter_second>()
        * area;
    let full = model
        .state_pt(case.to, case.supply.temperature)
        .ok()?
        .density
        .get::<kilogram_per_cubic_meter>();
    let added = (full - case.initial.density.get::<kilogram_per_cubic_meter>())
        * case.volume.get::<cubic_meter>();
    let span = (case.to - case.initial.pressure).get::<pascal>();
    (flow > 0.0 && added > 0.0).then(|| span * flow / added)
}

/// The fill of `case` with heat exchanged as `exchange` says: the run, the settled and
/// fill-to pressures, and (given a rating) the highest safe pressure ramp.
pub fn fill(
    model: &dyn GasModel,
    case: &FillCase,
    rated: Option<ThermodynamicTemperature>,
    exchange: &Exchange,
) -> Result<Assessed<FillTransient>, InputError> {
    let FillCase {
        volume,
        initial,
        supply,
        to,
        rate,
        inlet_diameter,
    } = *case;
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
    // Without heat transfer the peak does not depend on the rate: no rate to solve for.
    let max_rate =
        rated
            .filter(|_| exchange.mode == HeatTransfer::Lumped)
            .map(|rated| {
                let excess = |rate_pa_s: f64| {
                    let r = FillRate::Ramp(PressureRate {
                        per_second: Pressure::new::<pascal>(rate_pa_s),
                    });
                    fill_run(&setup, initial, wall_t0, h_in, to_pa, r, inlet)
                        .map(|run| run.peak_gas().get::<kelvin>() - rated.get::<kelvin>())
                        .unwrap_or(f64::NAN)
                };
                // Between a fill over a day and one over a second, or, with the inlet's bore
                // known, the fastest fill it can pass: the peak rises with the rate.
                let span = to_pa - initial.pressure.get::<pascal>();
                let inlet_limit = inlet_diameter
                    .and_then(|d| fastest_ramp(model, case, d))
                    .filter(|r| *r < span);
                let (slow, fast) = (span / 86_400.0, inlet_limit.unwrap_or(span));
                if excess(fast) <= 0.0 {
                    match inlet_limit {
                        Some(r) => MaxRate::InletLimited(PressureRate {
                            per_second: Pressure::new::<pascal>(r),
                        }),
                        None => MaxRate::Unlimited,
                    }
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
    // The stop pressure whose mass, cooled to ambient, settles at the target.
    let target_density = model
        .state_pt(to, exchange.ambient_temperature)
        .map_err(|e| model_failure(&e.to_string()))?
        .density
        .get::<kilogram_per_cubic_meter>();
    let gap = |p_stop: f64| {
        fill_run(&setup, initial, wall_t0, h_in, p_stop, rate, inlet)
            .map(|r| r.end.density.get::<kilogram_per_cubic_meter>() / target_density - 1.0)
            .unwrap_or(f64::NAN)
    };
    let fill_to_pressure = crate::solve::root(gap, to_pa * 0.8, to_pa * 1.6, to_pa * 1e-9)
        .ok()
        .map(Pressure::new::<pascal>);
    let result = FillTransient {
        run,
        settled_pressure: settled,
        fill_to_pressure,
        max_rate,
        wall: exchange.wall,
    };
    let cautions = fill_cautions(&result, rated, exchange);
    Ok(Assessed {
        value: result,
        cautions,
    })
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

/// The fill a [`FillInput`] describes, at `rate`, with heat exchanged as `exchange` says.
pub fn fill_from(
    model: &dyn GasModel,
    input: &FillInput,
    rate: FillRate,
    inlet_diameter: Option<Length>,
    exchange: &Exchange,
) -> Result<Assessed<FillTransient>, InputError> {
    let initial = model
        .state_pt(input.from, input.initial_temperature)
        .map_err(gas_error("from"))?;
    let supply = model
        .state_pt(
            input.supply_pressure.unwrap_or(input.to),
            input.supply_temperature,
        )
        .map_err(gas_error("supply-temperature"))?;
    let case = FillCase {
        volume: input.volume,
        initial: &initial,
        supply: &supply,
        to: input.to,
        rate,
        inlet_diameter,
    };
    fill(model, &case, input.rated_temperature, exchange)
}

/// The vent a [`VentInput`] describes (its orifice is required), with heat exchanged as
/// `exchange` says and an optional depressuring check.
pub fn vent_from(
    model: &dyn GasModel,
    input: &VentInput,
    check: Option<Depressuring>,
    exchange: &Exchange,
) -> Result<Assessed<VentTransient>, InputError> {
    let Some(orifice) = input.orifice else {
        return Err(InputError::new(
            "orifice",
            "(none)",
            "the vent with wall heat transfer and the depressuring check need the orifice diameter; accepted: give --orifice (with or without --within)",
        ));
    };
    let start = model
        .state_pt(input.pressure, input.temperature)
        .map_err(gas_error("pressure"))?;
    let area = input.cd * std::f64::consts::PI / 4.0 * orifice.get::<meter>().powi(2);
    vent(
        model,
        input.volume,
        &start,
        area,
        input.ambient,
        input.down_to,
        (check, input.min_metal_temperature),
        exchange,
    )
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
    (check, mdmt): (Option<Depressuring>, Option<ThermodynamicTemperature>),
    exchange: &Exchange,
) -> Result<Assessed<VentTransient>, InputError> {
    let setup = Setup::new(model, volume, exchange);
    let m0 = start.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = model.internal_energy(start).get::<joule_per_kilogram>() * m0;
    let wall_t0 = start.temperature.get::<kelvin>();
    let rhs = |_: f64, y: &[f64]| -> Option<Vec<f64>> {
        let st = setup.gas(y[0], y[1])?;
        let flow = model
            .nozzle(&st, ambient)
            .mass_flux
            .get::<kilogram_per_square_meter_second>()
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
    let flux0 = model
        .nozzle(start, ambient)
        .mass_flux
        .get::<kilogram_per_square_meter_second>();
    let tau = m0 / (flux0 * effective_area_m2).max(1e-30);
    let horizon = 50.0 * tau.max(1e-3);
    let y0 = [m0, u0, wall_t0, 0.0, 0.0];
    let scale = [
        m0,
        u0.abs().max(1.0),
        wall_t0,
        u0.abs().max(1.0),
        u0.abs().max(1.0),
    ];
    let setup = &setup;
    let until = |p_end: f64| {
        move |_: f64, y: &[f64]| {
            setup
                .gas(y[0], y[1])
                .map_or(-1.0, |s| s.pressure.get::<pascal>() - p_end)
        }
    };
    let opts = options(tau.max(1e-3), setup.rtol);
    let run = ode::integrate(
        rhs,
        (0.0, &y0),
        horizon,
        until(down_to.get::<pascal>()),
        &scale,
        &opts,
    )
    .map_err(|e| model_failure(&e.to_string()))?;
    if !run.stopped_at_event {
        return Err(InputError::new(
            "down-to",
            "(given)",
            "the vent does not reach the target in a reasonable time; accepted: a target above ambient",
        ));
    }
    let depressuring_time = match check.map(|c| c.target) {
        Some(p) if p < start.pressure => ode::integrate(
            rhs,
            (0.0, &y0),
            horizon,
            until(p.get::<pascal>()),
            &scale,
            &opts,
        )
        .ok()
        .filter(|r| r.stopped_at_event)
        .and_then(|r| r.t.last().copied())
        .map(Time::new::<second>),
        Some(_) => Some(Time::new::<second>(0.0)),
        None => None,
    };
    let result = VentTransient {
        run: setup.finish(run, basis)?,
        depressuring_time,
        wall: exchange.wall,
    };
    let cautions = vent_cautions(&result, check, mdmt, exchange);
    Ok(Assessed {
        value: result,
        cautions,
    })
}

/// Where the inner coefficient came from, and the wall, in words for the output.
fn model_notice(basis: InnerBasis, exchange: &Exchange) -> Vec<Caution> {
    if exchange.mode == HeatTransfer::None {
        return vec![Caution::new(
            Level::Notice,
            "Heat transfer: none. The gas exchanges no heat with the wall (the adiabatic bound).",
        )];
    }
    let inner = match basis {
        InnerBasis::Given => "a coefficient given by the user",
        InnerBasis::None => "no heat transfer",
        InnerBasis::JetCorrelation => "the inlet jet and natural convection, Nu = 0.56·Re_d^0.67 + 0.104·Ra^0.352 (Woodfield, Monde & Takano 2008), capped at the 500 W/(m²·K) measured in fills so that it is not extrapolated to faster ones (a conservative choice, no source)",
        InnerBasis::FillConstant => "500 W/(m²·K) while filling, as measured in fill experiments (Woodfield, Monde & Takano 2008); give --inlet-diameter for the jet correlation",
        InnerBasis::NaturalConvection => "natural convection in the vessel, Nu = 0.104·Ra^0.352 (Woodfield, Monde & Takano 2008)",
    };
    let mut out = vec![crate::caution!(
        Level::Notice,
        "Heat transfer: lumped gas and wall (",
        Value::Mass(exchange.wall.mass),
        format!(
            " of {}); inside, {inner}; outside, 4.5 W/(m²·K) to still air. Integrated with an adaptive Dormand–Prince 5(4) scheme; results hold to 1e-6 when the tolerance is tightened.",
            exchange.wall.material.name()
        ),
    )];
    if exchange.wall.estimated {
        out.push(Caution::new(
            Level::Notice,
            "The wall mass was not given and is estimated from the volume, pressure rating and material by a membrane-stress rule (common practice, no source). Give the real mass from the nameplate or data sheet for a better result.",
        ));
    }
    out
}

fn fill_cautions(
    r: &FillTransient,
    rated: Option<ThermodynamicTemperature>,
    exchange: &Exchange,
) -> Vec<Caution> {
    let mut out = model_notice(r.run.basis, exchange);
    out.extend(r.fill_to_pressure.and_then(|p| {
        super::fill::fill_to_warning(
            p,
            r.run.end.pressure,
            "The fill-to pressure at the planned rate (",
            "",
        )
    }));
    let peak = r.run.peak_gas();
    if let Some(rated) = rated {
        if peak > rated {
            out.push(crate::caution!(
                Level::Warning,
                "At the planned rate the gas peaks at ",
                Value::Temperature(peak),
                ", above the rated temperature (",
                Value::Temperature(rated),
                "). Fill more slowly or in stages: see the highest safe rate.",
            ));
        }
        if let Some(MaxRate::InletLimited(rate)) = r.max_rate {
            out.push(crate::caution!(
                Level::Notice,
                "Even the fastest fill the inlet bore can pass (choked from the supply, about ",
                Value::PressureRate(rate.per_second),
                " on average) keeps the gas within the rated temperature: the connection, not the heating, limits the rate.",
            ));
        }
        if r.max_rate == Some(MaxRate::NoneSafe) {
            out.push(Caution::new(
                Level::Warning,
                "Even a fill over a day exceeds the rated temperature: the supply gas is too hot for this cylinder. Cool the supply.",
            ));
        }
    }
    out
}

fn vent_cautions(
    r: &VentTransient,
    check: Option<Depressuring>,
    mdmt: Option<ThermodynamicTemperature>,
    exchange: &Exchange,
) -> Vec<Caution> {
    let mut out = model_notice(r.run.basis, exchange);
    if let Some(mdmt) = mdmt {
        let wall = r.run.min_wall();
        if wall < mdmt {
            out.push(crate::caution!(
                Level::Warning,
                "The wall cools to ",
                Value::Temperature(wall),
                ", below the MDMT (",
                Value::Temperature(mdmt),
                "): brittle fracture is possible while the vessel is still under pressure. Vent more slowly or in stages, and have an authorised inspector confirm the low-temperature rating.",
            ));
        } else if r.run.min_gas() < mdmt {
            out.push(crate::caution!(
                Level::Caution,
                "The gas falls to ",
                Value::Temperature(r.run.min_gas()),
                ", below the MDMT, while the wall stays at or above it (lowest ",
                Value::Temperature(wall),
                "). Keep to the vent rate assumed here and do not repeat vents back to back.",
            ));
        }
    }
    if let Some(c) = check {
        let meets = r.depressuring_time.is_some_and(|t| t <= c.limit);
        if !meets {
            out.push(crate::caution!(
                Level::Warning,
                "Depressuring check not met: the vessel does not reach ",
                Value::Pressure(c.target),
                " within ",
                Value::Time(c.limit),
                " through this vent path (the depressuring check, in the spirit of API 521). In a fire or emergency the vessel stays pressurised longer than intended; review the vent path with the responsible engineer.",
            ));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::{Gas, IdealGas};
    use crate::rules::fill::{adiabatic_fill, FillInput};
    use crate::rules::vent::{blow_down, Process, VentInput};
    use approx::assert_relative_eq;

    fn kelvin_of(t: ThermodynamicTemperature) -> f64 {
        t.get::<kelvin>()
    }

    fn k(t: f64) -> ThermodynamicTemperature {
        ThermodynamicTemperature::new::<kelvin>(t)
    }

    fn pa(p: f64) -> Pressure {
        Pressure::new::<pascal>(p)
    }

    fn exchange(mode: HeatTransfer, wall_kg: f64, inner: Option<f64>) -> Exchange {
        Exchange {
            mode,
            wall: Wall {
                mass: Mass::new::<kilogram>(wall_kg),
                material: Material::CarbonSteel,
                estimated: false,
            },
            inner_coefficient: inner,
            ambient_temperature: k(293.15),
            aspect: heat::CYLINDER_ASPECT,
        }
    }

    fn air() -> IdealGas {
        IdealGas::new(Gas::find("air").unwrap())
    }

    fn ramp(bar_per_min: f64) -> FillRate {
        FillRate::Ramp(PressureRate {
            per_second: pa(bar_per_min * 1e5 / 60.0),
        })
    }

    /// 50 L of air from 20 to 300 bar(a) at 20 °C, supply at 20 °C.
    fn cylinder_fill(rate: FillRate, ex: &Exchange) -> FillTransient {
        let model = air();
        let initial = model.state_pt(pa(20e5), k(293.15)).unwrap();
        let supply = model.state_pt(pa(300e5), k(293.15)).unwrap();
        let case = FillCase {
            volume: Volume::new::<cubic_meter>(0.05),
            initial: &initial,
            supply: &supply,
            to: pa(300e5),
            rate,
            inlet_diameter: None,
        };
        fill(&model, &case, Some(k(338.15)), ex).unwrap().value
    }

    #[test]
    fn without_heat_transfer_the_fill_is_the_adiabatic_closed_form() {
        let r = cylinder_fill(ramp(25.0), &exchange(HeatTransfer::None, 60.0, None));
        let closed = adiabatic_fill(
            &air(),
            &FillInput {
                volume: Volume::new::<cubic_meter>(0.05),
                from: pa(20e5),
                to: pa(300e5),
                initial_temperature: k(293.15),
                supply_temperature: k(293.15),
                supply_pressure: None,
                ambient_temperature: k(293.15),
                rated_temperature: None,
            },
        )
        .unwrap()
        .value;
        assert_relative_eq!(
            kelvin_of(r.run.peak_gas()),
            kelvin_of(closed.final_temperature),
            max_relative = 1e-6
        );
        assert_relative_eq!(
            r.run.end.pressure.get::<pascal>(),
            300e5,
            max_relative = 1e-9
        );
        // 280 bar at 25 bar/min: 672 s.
        assert_relative_eq!(r.run.duration().get::<second>(), 672.0, max_relative = 1e-6);
    }

    #[test]
    fn energy_is_conserved_over_a_fill_and_a_vent() {
        let r = cylinder_fill(ramp(25.0), &exchange(HeatTransfer::Lumped, 60.0, None));
        assert!(r.run.energy_residual < 1e-6, "{}", r.run.energy_residual);
        let v = receiver_vent(&exchange(HeatTransfer::Lumped, 500.0, None), 0.01);
        assert!(v.run.energy_residual < 1e-6, "{}", v.run.energy_residual);
    }

    #[test]
    fn results_do_not_depend_on_the_step_size() {
        let model = air();
        let ex = exchange(HeatTransfer::Lumped, 60.0, None);
        let v = Volume::new::<cubic_meter>(0.05);
        let initial = model.state_pt(pa(20e5), k(293.15)).unwrap();
        let supply = model.state_pt(pa(300e5), k(293.15)).unwrap();
        let h_in = model.enthalpy(&supply).get::<joule_per_kilogram>();
        let peak = |rtol: f64| {
            let mut setup = Setup::new(&model, v, &ex);
            setup.rtol = rtol;
            kelvin_of(
                fill_run(&setup, &initial, 293.15, h_in, 300e5, ramp(25.0), 0.0)
                    .unwrap()
                    .peak_gas(),
            )
        };
        assert_relative_eq!(peak(1e-7), peak(1e-11), max_relative = 1e-6);
    }

    #[test]
    fn the_wall_lowers_the_peak_and_a_slower_or_heavier_fill_lowers_it_more() {
        let peak = |bar_per_min: f64, mode: HeatTransfer, wall_kg: f64| {
            kelvin_of(
                cylinder_fill(ramp(bar_per_min), &exchange(mode, wall_kg, None))
                    .run
                    .peak_gas(),
            )
        };
        let adiabatic = peak(25.0, HeatTransfer::None, 60.0);
        let fast = peak(100.0, HeatTransfer::Lumped, 60.0);
        let planned = peak(25.0, HeatTransfer::Lumped, 60.0);
        let slow = peak(5.0, HeatTransfer::Lumped, 60.0);
        let heavy = peak(25.0, HeatTransfer::Lumped, 200.0);
        assert!(
            adiabatic > fast && fast > planned && planned > slow,
            "{adiabatic} {fast} {planned} {slow}"
        );
        assert!(heavy < planned, "{heavy} {planned}");
        assert!(slow > 293.15);
    }

    #[test]
    fn filling_at_the_maximum_rate_reaches_the_rating() {
        let ex = exchange(HeatTransfer::Lumped, 60.0, None);
        let r = cylinder_fill(ramp(25.0), &ex);
        let Some(MaxRate::Ramp(max)) = r.max_rate else {
            panic!("expected a finite maximum rate, got {:?}", r.max_rate);
        };
        let at_max = cylinder_fill(FillRate::Ramp(max), &ex);
        assert!((kelvin_of(at_max.run.peak_gas()) - 338.15).abs() < 1.0);
    }

    /// 2 m³ of air at 10 barg vented through `d` (Cd 1) to 1.01 atm.
    fn receiver_vent(ex: &Exchange, d: f64) -> VentTransient {
        let model = air();
        let start = model.state_pt(pa(11.01325e5), k(293.15)).unwrap();
        let area = std::f64::consts::PI / 4.0 * d * d;
        vent(
            &model,
            Volume::new::<cubic_meter>(2.0),
            &start,
            area,
            pa(101_325.0),
            pa(1.01 * 101_325.0),
            (
                Some(Depressuring {
                    target: pa(5e5),
                    limit: Time::new::<second>(900.0),
                }),
                None,
            ),
            ex,
        )
        .unwrap()
        .value
    }

    fn quasi_steady(process: Process, d: f64) -> (f64, f64) {
        let r = blow_down(
            &air(),
            &VentInput {
                volume: Volume::new::<cubic_meter>(2.0),
                pressure: pa(11.01325e5),
                temperature: k(293.15),
                ambient: pa(101_325.0),
                orifice: Some(Length::new::<meter>(d)),
                cd: 1.0,
                down_to: pa(1.01 * 101_325.0),
                process,
                min_metal_temperature: None,
                within: None,
            },
        )
        .unwrap()
        .value;
        (
            r.time.unwrap().get::<second>(),
            kelvin_of(r.end.temperature),
        )
    }

    #[test]
    fn without_heat_transfer_the_vent_is_isentropic() {
        let r = receiver_vent(&exchange(HeatTransfer::None, 500.0, None), 0.01);
        let (t, end) = quasi_steady(Process::Isentropic, 0.01);
        assert_relative_eq!(r.run.duration().get::<second>(), t, max_relative = 1e-6);
        assert_relative_eq!(kelvin_of(r.run.end.temperature), end, max_relative = 1e-6);
    }

    #[test]
    fn a_huge_coefficient_and_wall_make_the_vent_isothermal() {
        let r = receiver_vent(&exchange(HeatTransfer::Lumped, 1.0e7, Some(1.0e5)), 0.01);
        let (t, _) = quasi_steady(Process::Isothermal, 0.01);
        assert_relative_eq!(r.run.duration().get::<second>(), t, max_relative = 2e-3);
        assert!((kelvin_of(r.run.min_gas()) - 293.15).abs() < 0.5);
    }

    #[test]
    fn the_coldest_gas_lies_between_the_isentropic_end_and_ambient() {
        let r = receiver_vent(&exchange(HeatTransfer::Lumped, 500.0, None), 0.01);
        let (_, isentropic_end) = quasi_steady(Process::Isentropic, 0.01);
        let min = kelvin_of(r.run.min_gas());
        assert!(
            min > isentropic_end && min < 293.15,
            "{isentropic_end} < {min} < 293.15"
        );
        assert!(kelvin_of(r.run.min_wall()) > min);
        let t = r.depressuring_time.unwrap().get::<second>();
        assert!(t > 0.0 && t < r.run.duration().get::<second>());
    }
}
