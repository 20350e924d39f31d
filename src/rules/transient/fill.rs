//! The fill at a planned rate, and the searches on it: the highest safe rate, the fill-to
//! pressure.

use super::*;

/// The highest stop pressure the fill-to search looks at, as a multiple of the target.
pub const FILL_TO_CAP: f64 = 1.6;

/// The longest fill run, s: a month. A slower "fill" is storage, and its run would only
/// spend steps (the search for the highest safe rate starts at a fill over a day).
const MAX_FILL_DURATION: f64 = 30.0 * 86_400.0;

/// A fill carried on past its stop pressure until the gas reaches a mass: the same run,
/// its wall slices and step limit those of the fill to the stop pressure, so the two agree
/// wherever they overlap.
#[derive(Debug, Clone, Copy)]
pub(super) struct Beyond {
    /// The mass to stop at, kg.
    pub(super) mass: f64,
    /// The pressure, Pa, at which the run gives up on reaching it.
    pub(super) cap: f64,
}

/// The fill from `initial` to `to` with enthalpy `h_in` arriving at `rate`, in SI; with
/// `beyond`, carried on from there to its mass instead.
#[allow(clippy::too_many_arguments)]
pub(super) fn fill_run(
    setup: &Setup,
    initial: &State,
    wall_t0: f64,
    h_in: f64,
    to: f64,
    rate: FillRate,
    inlet: f64,
    beyond: Option<Beyond>,
) -> Result<Run, InputError> {
    let m0 = initial.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = setup
        .model
        .internal_energy(initial)
        .get::<joule_per_kilogram>()
        * m0;
    let p0 = initial.pressure.get::<pascal>();
    // The mass at `to` at the starting temperature: the time scale of a mass-flow fill, and
    // the gas's heat capacity where its peak is.
    let full = setup
        .model
        .state_pt(Pressure::new::<pascal>(to), initial.temperature)
        .map(|s| s.density.get::<kilogram_per_cubic_meter>() * setup.volume)
        .unwrap_or(m0 * to / p0);
    let nominal = match rate {
        FillRate::Ramp(r) => (to - p0) / r.per_second.get::<pascal>(),
        FillRate::MassFlow(f) => (full - m0).max(0.0) / f.get::<kilogram_per_second>(),
    };
    if nominal.is_nan() || nominal > MAX_FILL_DURATION {
        let given = match rate {
            FillRate::Ramp(r) => format!(
                "{} bar/min",
                crate::units::fmt_sig(r.per_second.get::<pascal>() * 60.0 / 1e5, 3)
            ),
            FillRate::MassFlow(f) => format!(
                "{} kg/s",
                crate::units::fmt_sig(f.get::<kilogram_per_second>(), 3)
            ),
        };
        return Err(InputError::new(
            "rate",
            given,
            format!(
                "the fill would take {} days; accepted: a rate that fills the cylinder within {} days",
                crate::units::fmt_sig(nominal / 86_400.0, 3),
                MAX_FILL_DURATION / 86_400.0
            ),
        ));
    }
    let nodes = setup.nodes(nominal, full.max(m0));
    let basis = setup.inner_basis(Some(inlet));
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
    let flows = |y: &[f64]| -> Option<(Vec<f64>, Faces)> {
        let st = setup.gas(y[0], y[1])?;
        // On a ramp the inflow depends on the heat to the wall, and the jet's coefficient on
        // the inflow: one fixed-point pass from the no-jet coefficient settles both.
        let guess = setup.exchange_flows(&nodes, &st, y, Some((0.0, inlet)));
        let flow_guess = flow_at(y, guess.into_wall)?;
        let wall = setup.exchange_flows(&nodes, &st, y, Some((flow_guess, inlet)));
        let flow = flow_at(y, wall.into_wall)?;
        Some(setup.derivatives(flow, h_in, &wall))
    };
    let rhs = |_: f64, y: &[f64]| flows(y).map(|(d, _)| d);
    let (y0, scale) = setup.start(&nodes, m0, u0, wall_t0);
    // Stop at the pressure, or carried on, at the mass or the cap, whichever comes first.
    let stop_p = beyond.map_or(to, |b| b.cap);
    let event = |_: f64, y: &[f64]| {
        setup.gas(y[0], y[1]).map_or(-1.0, |s| {
            let by_pressure = (stop_p - s.pressure.get::<pascal>()) / stop_p;
            beyond.map_or(by_pressure, |b| by_pressure.min((b.mass - y[0]) / b.mass))
        })
    };
    // Time enough for the fill to its last stop at the nominal pace.
    let span = (stop_p - p0) / (to - p0);
    let run = ode::integrate(
        rhs,
        (0.0, &y0),
        3.0 * nominal.max(1e-3) * span.max(1.0),
        event,
        &scale,
        &options(nominal.max(1e-3), setup.rtol),
    )
    .map_err(integration_failure)?;
    if !run.stopped_at_event {
        return Err(InputError::new(
            "rate",
            "(given)",
            "the fill does not reach --to within three times its nominal duration; accepted: a rate that fills the cylinder",
        ));
    }
    setup.finish(&nodes, run, basis, |y| flows(y).map(|(_, face)| face))
}

/// A fill with heat exchanged with the wall, and what it means for the cylinder.
#[derive(Debug, Clone, PartialEq)]
pub struct FillTransient {
    /// The run at the planned rate.
    pub run: Run,
    /// The conservative edge of the peak gas temperature: the planned run again with a
    /// correlation's inner coefficient scaled down by [`heat::CORRELATION_SCATTER`]; the
    /// central peak where the coefficient was given or no heat is exchanged.
    pub peak_gas_upper: ThermodynamicTemperature,
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
        None,
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
    /// The search failed: a fill it tried did not complete on the model (it left the gas
    /// model's range, or a very light wall, following the gas within milliseconds, ran a
    /// slow fill past the integrator's step budget).
    Unresolved,
}

/// How close below the rating, K, the highest safe rate brings the peak gas temperature:
/// the search stops once a rate's peak lies within this of the rating, never above it.
pub const RATE_PEAK_TOLERANCE: f64 = 0.1;

/// Each step down from a rate too fast divides it by this, until a rate within the rating
/// brackets the answer.
const STEP_DOWN: f64 = 4.0;

/// The highest safe ramp, Pa/s, from `excess` (the peak's excess over the rating at a
/// ramp, K; NaN where the run failed), searched between a `slow` and a `fast` ramp, or up
/// to the inlet's fastest where its bore is known: the peak rises with the rate.
///
/// The search starts at `start`, a ramp with its excess where a run already gave it (the
/// planned fill's), steps down from there to a ramp within the rating only where needed,
/// and closes the bracket by Brent's method on ln r to [`RATE_PEAK_TOLERANCE`]: the ramp
/// returned keeps the peak within the rating.
pub(super) fn highest_rate(
    excess: impl Fn(f64) -> f64,
    start: (f64, Option<f64>),
    (slow, fast): (f64, f64),
    inlet_limit: Option<f64>,
) -> MaxRate {
    let ramp = |r: f64| PressureRate {
        per_second: Pressure::new::<pascal>(r),
    };
    let fast = inlet_limit.unwrap_or(fast);
    let at_fast = excess(fast);
    if at_fast.is_nan() {
        return MaxRate::Unresolved;
    }
    if at_fast <= 0.0 {
        return inlet_limit.map_or(MaxRate::Unlimited, |r| MaxRate::InletLimited(ramp(r)));
    }
    // The bracket's lower end: the first rate within the rating, from `start` down to the
    // fill over a day. A run that fails is no answer: never read it as "no rate is safe".
    let (mut hi, mut e_hi) = (fast, at_fast);
    let mut next = (start.0.clamp(slow, fast), start.1);
    let lo = loop {
        let (r, known) = next;
        let e = known.unwrap_or_else(|| excess(r));
        if e.is_nan() {
            return MaxRate::Unresolved;
        }
        if e <= 0.0 {
            break (r, e);
        }
        if r <= slow {
            return MaxRate::NoneSafe;
        }
        (hi, e_hi) = (r, e);
        next = ((r / STEP_DOWN).max(slow), None);
    };
    if lo.1 >= -RATE_PEAK_TOLERANCE || hi <= lo.0 {
        return MaxRate::Ramp(ramp(lo.0));
    }
    // Aim at the middle of the band [rating − tolerance, rating].
    let half = RATE_PEAK_TOLERANCE / 2.0;
    let g = |ln_r: f64| excess(ln_r.exp()) + half;
    let ends = ((lo.0.ln(), lo.1 + half), (hi.ln(), e_hi + half));
    match crate::solve::root_within(g, ends, 1e-7, half) {
        // The iterate if its peak is within the rating, else the bracket's slower end.
        Ok(s) if s.fx.is_finite() => {
            let ln_r = if s.fx <= half { s.x } else { s.other };
            MaxRate::Ramp(ramp(ln_r.exp()))
        }
        _ => MaxRate::Unresolved,
    }
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
    let run = fill_run(&setup, initial, wall_t0, h_in, to_pa, rate, inlet, None)?;
    // The go/no-go and the highest safe rate are decided on the conservative edge: the
    // correlation's coefficient at the low end of its scatter, so the gas runs hotter.
    let correlated = matches!(
        run.basis,
        InnerBasis::JetCorrelation | InnerBasis::JetCorrelationAssumedInlet
    );
    let edge = setup.scaled(1.0 - heat::CORRELATION_SCATTER);
    let decide = if correlated { &edge } else { &setup };
    let peak_gas_upper = if correlated {
        fill_run(&edge, initial, wall_t0, h_in, to_pa, rate, inlet, None)?.peak_gas()
    } else {
        run.peak_gas()
    };
    let settled = model
        .state_rho_t(run.end.density, exchange.ambient_temperature)
        .map_err(|e| model_failure(&e.to_string()))?
        .pressure;
    // Without heat transfer the peak does not depend on the rate: no rate to solve for.
    let max_rate = rated
        .filter(|_| exchange.mode == HeatTransfer::Lumped)
        .map(|rated| {
            let excess = |rate_pa_s: f64| {
                let r = FillRate::Ramp(PressureRate {
                    per_second: Pressure::new::<pascal>(rate_pa_s),
                });
                fill_run(decide, initial, wall_t0, h_in, to_pa, r, inlet, None)
                    .map(|run| run.peak_gas().get::<kelvin>() - rated.get::<kelvin>())
                    .unwrap_or(f64::NAN)
            };
            // Between a fill over a day and one over a second, or, with the inlet's bore
            // known, the fastest fill it can pass: the peak rises with the rate. The
            // search starts at the planned ramp, whose conservative peak is known, or at
            // the mean ramp of the planned mass flow.
            let span = to_pa - initial.pressure.get::<pascal>();
            let inlet_limit = inlet_diameter
                .and_then(|d| fastest_ramp(model, case, d))
                .filter(|r| *r < span);
            let start = match rate {
                FillRate::Ramp(r) => (
                    r.per_second.get::<pascal>(),
                    Some(peak_gas_upper.get::<kelvin>() - rated.get::<kelvin>()),
                ),
                FillRate::MassFlow(_) => (span / run.duration().get::<second>(), None),
            };
            highest_rate(excess, start, (span / 86_400.0, span), inlet_limit)
        });
    // The stop pressure whose mass, cooled to ambient, settles at the target: the planned
    // fill carried on to that mass, up to 1.6 times the target and within the model's range
    // (a run beyond it is no answer).
    let target_mass = model
        .state_pt(to, exchange.ambient_temperature)
        .map_err(|e| model_failure(&e.to_string()))?
        .density
        .get::<kilogram_per_cubic_meter>()
        * volume.get::<cubic_meter>();
    let top = model
        .max_pressure()
        .map_or(f64::INFINITY, |p| p.get::<pascal>());
    let beyond = Beyond {
        mass: target_mass,
        cap: (to_pa * FILL_TO_CAP).min(top),
    };
    let fill_to_pressure = if initial.density.get::<kilogram_per_cubic_meter>()
        * volume.get::<cubic_meter>()
        >= target_mass
    {
        None
    } else {
        fill_run(
            &setup,
            initial,
            wall_t0,
            h_in,
            to_pa,
            rate,
            inlet,
            Some(beyond),
        )
        .ok()
        .filter(|r| {
            let m = r.end.density.get::<kilogram_per_cubic_meter>() * volume.get::<cubic_meter>();
            m >= target_mass * (1.0 - 1e-9)
        })
        .map(|r| r.end.pressure)
    };
    let result = FillTransient {
        run,
        peak_gas_upper,
        settled_pressure: settled,
        fill_to_pressure,
        max_rate,
        wall: exchange.wall,
    };
    let (cautions, basis) = fill_cautions(&result, exchange);
    Ok(Assessed {
        value: result,
        cautions,
        basis,
    })
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

/// A fill's cautions (a highest rate not resolved) and basis. Its hazards (the peak against
/// the rating, the fill-to pressure) are the assessment's findings.
pub(super) fn fill_cautions(r: &FillTransient, exchange: &Exchange) -> (Vec<Caution>, Vec<Note>) {
    let mut basis = model_basis(r.run.basis, exchange);
    let mut out = Vec::new();
    if let Some(MaxRate::InletLimited(rate)) = r.max_rate {
        basis.push(crate::note!(
            "highest rate",
            "Even the fastest fill the inlet bore can pass (choked from the supply, about ",
            Value::PressureRate(rate.per_second),
            " on average) keeps the gas within the rated temperature: the connection, not the heating, limits the rate.",
        ));
    }
    if r.max_rate == Some(MaxRate::Unresolved) {
        out.push(Caution::new(
            Level::Caution,
            "The highest fill rate within the rating is not resolved: a fill the search tried did not complete on the model. A very light wall (check the wall's mass as given, and its unit) follows the gas so closely that a slow fill exceeds the integration's step budget. Do not rely on a highest rate; the planned rate's result stands.",
        ));
    }
    (out, basis)
}
