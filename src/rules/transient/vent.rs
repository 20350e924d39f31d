//! The vent through an orifice with heat from the wall, and the depressuring check.

use super::*;

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
        check,
        exchange,
    )
}

/// A vent with heat from the wall.
#[derive(Debug, Clone, PartialEq)]
pub struct VentTransient {
    /// The run to the target.
    pub run: Run,
    /// The conservative edge of the lowest gas temperature: the lowest of the central run
    /// and the runs with the correlation's coefficient scaled by 1 ∓
    /// [`heat::CORRELATION_SCATTER`] (less heat from the wall leaves the gas colder).
    pub min_gas_lower: ThermodynamicTemperature,
    /// The conservative edge of the lowest wall temperature, from the same runs (more heat
    /// drawn from the wall leaves it colder).
    pub min_wall_lower: ThermodynamicTemperature,
    /// Time to reach the depressuring check's pressure, if asked and reached.
    pub depressuring_time: Option<Time>,
    /// The wall used.
    pub wall: Wall,
}

/// Where a vent discharges: its start, the orifice's effective area Cd·A (m²) and the
/// pressure outside.
struct Outlet<'a> {
    start: &'a State,
    effective_area_m2: f64,
    ambient: Pressure,
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
    check: Option<Depressuring>,
    exchange: &Exchange,
) -> Result<Assessed<VentTransient>, InputError> {
    let setup = Setup::new(model, volume, exchange);
    let outlet = Outlet {
        start,
        effective_area_m2,
        ambient,
    };
    let not_reached = || {
        InputError::new(
            "down-to",
            "(given)",
            "the vent does not reach the target in a reasonable time; accepted: a target above ambient",
        )
    };
    // The depressuring check's pressure on the way down is a stop on the same run; one
    // below the target needs a run of its own.
    let (run, depressuring_time) = match check.map(|c| c.target) {
        Some(p) if p < start.pressure && p > down_to => {
            let (run, reached) =
                vent_run(&setup, &outlet, &[p, down_to])?.ok_or_else(not_reached)?;
            (run, reached.first().copied())
        }
        other => {
            let (run, _) = vent_run(&setup, &outlet, &[down_to])?.ok_or_else(not_reached)?;
            let time = match other {
                Some(p) if p < start.pressure => vent_run(&setup, &outlet, &[p])
                    .ok()
                    .flatten()
                    .and_then(|(_, reached)| reached.first().copied()),
                Some(_) => Some(Time::new::<second>(0.0)),
                None => None,
            };
            (run, time)
        }
    };
    let (mut min_gas_lower, mut min_wall_lower) = (run.min_gas(), run.min_wall());
    if run.basis == InnerBasis::NaturalConvection {
        for edge in [
            1.0 - heat::CORRELATION_SCATTER,
            1.0 + heat::CORRELATION_SCATTER,
        ] {
            let (other, _) = vent_run(&setup.scaled(edge), &outlet, &[down_to])?
                .ok_or_else(|| model_failure("a conservative-edge run did not reach the target"))?;
            min_gas_lower = min_gas_lower.min(other.min_gas());
            min_wall_lower = min_wall_lower.min(other.min_wall());
        }
    }
    let basis = model_basis(run.basis, exchange);
    Ok(Assessed {
        value: VentTransient {
            run,
            min_gas_lower,
            min_wall_lower,
            depressuring_time,
            wall: exchange.wall,
        },
        cautions: Vec::new(),
        basis,
    })
}

/// One vent run from the outlet's start through each of `stops` (absolute pressures, the
/// highest first) to the last: the run and the time each stop was reached; `None` when the
/// vent does not get there within fifty of its time constants. Each leg starts where the
/// last ended, at the located crossing, so the legs are one integration.
fn vent_run(
    setup: &Setup,
    outlet: &Outlet,
    stops: &[Pressure],
) -> Result<Option<(Run, Vec<Time>)>, InputError> {
    let (model, start, area) = (setup.model, outlet.start, outlet.effective_area_m2);
    let m0 = start.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = model.internal_energy(start).get::<joule_per_kilogram>() * m0;
    let wall_t0 = start.temperature.get::<kelvin>();
    // Time scale: the isothermal choked time constant V/(Cd·A·√(R·T)) times a few.
    let flux0 = model
        .nozzle(start, outlet.ambient)
        .mass_flux
        .get::<kilogram_per_square_meter_second>();
    let tau = m0 / (flux0 * area).max(1e-30);
    let last = stops.last().copied().unwrap_or(outlet.ambient);
    // The gas's mass at the end, where its lowest temperature is: at least the isothermal
    // vent's.
    let m_end = m0 * (last / start.pressure).value.clamp(0.0, 1.0);
    let nodes = setup.nodes(tau.max(1e-3), m_end);
    let flows = |y: &[f64]| -> Option<(Vec<f64>, Faces)> {
        let st = setup.gas(y[0], y[1])?;
        let flow = model
            .nozzle(&st, outlet.ambient)
            .mass_flux
            .get::<kilogram_per_square_meter_second>()
            * area;
        let h = model.enthalpy(&st).get::<joule_per_kilogram>();
        let wall = setup.exchange_flows(&nodes, &st, y, None);
        Some(setup.derivatives(-flow, h, &wall))
    };
    let (y0, scale) = setup.start(&nodes, m0, u0, wall_t0);
    let horizon = 50.0 * tau.max(1e-3);
    let opts = options(tau.max(1e-3), setup.rtol);
    let mut whole = ode::Trajectory {
        t: vec![0.0],
        y: vec![y0],
        stopped_at_event: true,
    };
    let mut reached = Vec::new();
    for stop in stops {
        let p_stop = stop.get::<pascal>();
        let (t0, y_from) = (
            whole.t[whole.t.len() - 1],
            whole.y[whole.y.len() - 1].clone(),
        );
        let leg = ode::integrate(
            |_: f64, y: &[f64]| flows(y).map(|(d, _)| d),
            (t0, &y_from),
            horizon,
            |_: f64, y: &[f64]| {
                setup
                    .gas(y[0], y[1])
                    .map_or(-1.0, |s| s.pressure.get::<pascal>() - p_stop)
            },
            &scale,
            &opts,
        )
        .map_err(integration_failure)?;
        if !leg.stopped_at_event {
            return Ok(None);
        }
        reached.push(Time::new::<second>(leg.t[leg.t.len() - 1]));
        whole.t.extend(&leg.t[1..]);
        whole.y.extend(leg.y.into_iter().skip(1));
    }
    let basis = setup.inner_basis(None);
    let run = setup.finish(&nodes, whole, basis, |y| flows(y).map(|(_, face)| face))?;
    Ok(Some((run, reached)))
}
