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
    check: Option<Depressuring>,
    exchange: &Exchange,
) -> Result<Assessed<VentTransient>, InputError> {
    let setup = Setup::new(model, volume, exchange);
    let m0 = start.density.get::<kilogram_per_cubic_meter>() * setup.volume;
    let u0 = model.internal_energy(start).get::<joule_per_kilogram>() * m0;
    let wall_t0 = start.temperature.get::<kelvin>();
    // Time scale: the isothermal choked time constant V/(Cd·A·√(R·T)) times a few.
    let flux0 = model
        .nozzle(start, ambient)
        .mass_flux
        .get::<kilogram_per_square_meter_second>();
    let tau = m0 / (flux0 * effective_area_m2).max(1e-30);
    let horizon = 50.0 * tau.max(1e-3);
    let nodes = Nodes::new(&exchange.wall, setup.area, tau.max(1e-3), setup.grid);
    let flows = |y: &[f64]| -> Option<(Vec<f64>, f64)> {
        let st = setup.gas(y[0], y[1])?;
        let flow = model
            .nozzle(&st, ambient)
            .mass_flux
            .get::<kilogram_per_square_meter_second>()
            * effective_area_m2;
        let h = model.enthalpy(&st).get::<joule_per_kilogram>();
        let (h_i, h_o, _) = setup.coefficients(&st, y[INNER], None);
        let wall = setup.wall_flows(&nodes, (h_i, h_o), st.temperature.get::<kelvin>(), y);
        Some(setup.derivatives(-flow, h, &wall))
    };
    let rhs = |_: f64, y: &[f64]| flows(y).map(|(d, _)| d);
    let basis = setup.coefficients(start, wall_t0, None).2;
    let (y0, scale) = setup.start(&nodes, m0, u0, wall_t0);
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
        run: setup.finish(&nodes, run, basis, |y| flows(y).map(|(_, face)| face))?,
        depressuring_time,
        wall: exchange.wall,
    };
    Ok(Assessed {
        value: result,
        cautions: Vec::new(),
        basis: model_basis(basis, exchange),
    })
}
